//! The arguments of `twofold analyze`, read strictly into [`AnalyzeArgs`].

use std::path::PathBuf;

use twofold_core::transform::Transform;

/// Usage text printed by `--help`.
pub const USAGE: &str = "\
usage: twofold analyze --csv FILE [options]
       twofold analyze PROJECT.ron [options]

Effects, Lenth's margins, half-normal positions, a model fit and its ANOVA for one response of a
coded table (header row: factor columns A, B, C, ... with cells -1, 0 or +1, an optional `block`
column, then response columns; an empty response cell is a missing value).

options:
  PROJECT.ron         a project file: its run sheet, chosen terms and transform
  --csv FILE          the coded table to analyse
  --response NAME     the response column (default: the first one)
  --terms LIST        model terms, comma-separated, e.g. A,C,D,AC,AD
                      (default: with replicated runs or centre points, the terms significant
                      against pure error at 5 %; otherwise the effects beyond Lenth's margin
                      of error; kept hierarchical)
  --transform T       none, ln, log10, sqrt, inverse or power:L (e.g. power:0.5)
  --json              print the results as one JSON object
  -h, --help          print this help
";

/// The options of one `analyze` call, validated.
#[derive(Debug, Clone, PartialEq)]
pub struct AnalyzeArgs {
    /// Where the data come from: a coded table or a project file.
    pub input: Input,
    /// The response column; `None` = the first.
    pub response: Option<String>,
    /// Model terms as typed; `None` = the report's default choice.
    pub terms: Option<Vec<String>>,
    /// Transform of the response; `None` = none for a table, the project's choice for a project.
    pub transform: Option<Transform>,
    /// Print JSON instead of the text report.
    pub json: bool,
}

/// The data source of an `analyze` call.
#[derive(Debug, Clone, PartialEq)]
pub enum Input {
    /// A coded CSV table (`--csv FILE`).
    Csv(PathBuf),
    /// A project file (`twofold analyze PROJECT.ron`): its run sheet, and by default its chosen
    /// model terms and transform, exactly as the window analyses them.
    Project(PathBuf),
}

/// What the command line asked for.
#[derive(Debug, Clone, PartialEq)]
pub enum Request {
    /// Print the usage.
    Help,
    /// Analyse a table.
    Analyze(AnalyzeArgs),
}

/// Reads the arguments after `analyze`. Errors are one-line messages.
pub fn parse_args(args: &[String]) -> Result<Request, String> {
    let mut csv: Option<PathBuf> = None;
    let mut project: Option<PathBuf> = None;
    let mut response: Option<String> = None;
    let mut terms: Option<Vec<String>> = None;
    let mut transform: Option<Transform> = None;
    let mut json = false;
    let mut i = 0;
    while i < args.len() {
        let arg = args[i].as_str();
        let (name, inline) = match arg.split_once('=') {
            Some((n, v)) if n.starts_with("--") => (n, Some(v.to_string())),
            _ => (arg, None),
        };
        let takes_value = matches!(name, "--csv" | "--response" | "--terms" | "--transform");
        let value = if takes_value {
            match inline {
                Some(v) => Some(v),
                None => {
                    i += 1;
                    match args.get(i) {
                        Some(v) if !v.starts_with("--") => Some(v.clone()),
                        _ => return Err(format!("option `{name}` needs a value")),
                    }
                }
            }
        } else {
            if inline.is_some() {
                return Err(format!("option `{name}` takes no value"));
            }
            None
        };
        match (name, value) {
            ("-h" | "--help", _) => return Ok(Request::Help),
            ("--json", _) => {
                if json {
                    return Err("option `--json` given twice".into());
                }
                json = true;
            }
            ("--csv", Some(v)) => set_once(&mut csv, PathBuf::from(v), "--csv")?,
            ("--response", Some(v)) => set_once(&mut response, v, "--response")?,
            ("--terms", Some(v)) => set_once(&mut terms, split_terms(&v)?, "--terms")?,
            ("--transform", Some(v)) => {
                set_once(&mut transform, parse_transform(&v)?, "--transform")?;
            }
            (other, _) if other.starts_with('-') => {
                return Err(format!(
                    "unknown option `{other}` for `analyze` (see --help)"
                ));
            }
            (other, _) => {
                if project.is_some() {
                    return Err(format!(
                        "unexpected argument `{other}`: give one project file"
                    ));
                }
                project = Some(PathBuf::from(other));
            }
        }
        i += 1;
    }
    let input = match (csv, project) {
        (Some(_), Some(_)) => {
            return Err("give a project file or --csv FILE, not both".into());
        }
        (Some(c), None) => Input::Csv(c),
        (None, Some(p)) => Input::Project(p),
        (None, None) => {
            return Err(
                "`analyze` needs a project file or a coded table: --csv FILE (see --help)".into(),
            );
        }
    };
    Ok(Request::Analyze(AnalyzeArgs {
        input,
        response,
        terms,
        transform,
        json,
    }))
}

fn set_once<T>(slot: &mut Option<T>, value: T, name: &str) -> Result<(), String> {
    if slot.is_some() {
        return Err(format!("option `{name}` given twice"));
    }
    *slot = Some(value);
    Ok(())
}

fn split_terms(list: &str) -> Result<Vec<String>, String> {
    let parts: Vec<String> = list.split(',').map(|s| s.trim().to_string()).collect();
    if parts.iter().any(String::is_empty) {
        return Err(format!(
            "--terms `{list}`: empty term (write terms separated by commas, e.g. A,C,AC)"
        ));
    }
    Ok(parts)
}

/// Reads a transform name: `none`, `ln`, `log10`, `sqrt`, `inverse` or `power:L`.
pub fn parse_transform(text: &str) -> Result<Transform, String> {
    let t = text.trim().to_ascii_lowercase();
    let tr = match t.as_str() {
        "none" => Transform::None,
        "ln" => Transform::Ln,
        "log10" => Transform::Log10,
        "sqrt" => Transform::Sqrt,
        "inverse" => Transform::Inverse,
        _ => match t.strip_prefix("power:") {
            Some(l) => {
                let lambda: f64 = l.trim().parse().map_err(|_| {
                    format!("--transform `{text}`: `{l}` is not a number (e.g. power:0.5)")
                })?;
                Transform::Power(lambda)
            }
            None => {
                return Err(format!(
                    "--transform `{text}`: use none, ln, log10, sqrt, inverse or power:L"
                ));
            }
        },
    };
    tr.validate()
        .map_err(|e| format!("--transform `{text}`: {e}"))?;
    Ok(tr)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn args(list: &[&str]) -> Vec<String> {
        list.iter().map(|s| s.to_string()).collect()
    }

    #[test]
    fn arguments_are_read_strictly() {
        let ok = parse_args(&args(&[
            "--csv",
            "t.csv",
            "--json",
            "--transform=power:0.5",
        ]))
        .unwrap();
        let Request::Analyze(a) = ok else {
            panic!("expected an analysis request")
        };
        assert!(a.json);
        assert_eq!(a.transform, Some(Transform::Power(0.5)));
        let cases: &[(&[&str], &str)] = &[
            (&["--csv"], "option `--csv` needs a value"),
            (&["--csv", "a", "--bogus"], "unknown option `--bogus`"),
            (&["--json"], "needs a project file or a coded table"),
            (&["--csv", "a", "--csv", "b"], "given twice"),
            (&["--csv", "a", "--terms", "A,,B"], "empty term"),
            (&["--csv", "a", "--transform", "cube"], "use none, ln"),
            (&["--csv", "a", "--transform", "power:0"], "power of 0"),
            (&["--csv", "a", "--json=yes"], "takes no value"),
            (&["a.ron", "b.ron"], "give one project file"),
            (&["a.ron", "--csv", "b.csv"], "not both"),
        ];
        for (list, needle) in cases {
            let e = parse_args(&args(list)).unwrap_err();
            assert!(e.contains(needle), "{list:?}: {e}");
        }
        assert_eq!(parse_args(&args(&["-h"])).unwrap(), Request::Help);
    }
}
