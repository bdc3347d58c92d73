//! The arguments of `twofold analyze`, read strictly into [`AnalyzeArgs`].

use std::path::PathBuf;

use twofold_core::transform::Transform;

/// The long description shown by `--help`.
pub(crate) const LONG_ABOUT: &str = "\
Effects, Lenth's margins, half-normal positions, a model fit and its ANOVA for one response.

The data come from a project file (its run sheet, and by default its chosen terms and
transform, as the window analyses them) or from a coded table, a CSV file: a header row; one
column per factor named by its letter in order (A, B, C, ...) with cells -1, 0 or +1 (all 0 is a
centre point); an optional `block` column; then one or more response columns. An empty response
cell is a missing value.";

/// The examples shown by `--help`.
pub(crate) const AFTER_HELP: &str = "\
Examples:
  twofold analyze --csv results.csv --json
  twofold analyze cure.ron --response Gloss --terms A,B,AB --transform ln";

/// The options of `twofold analyze`, as typed; [`AnalyzeCommand::into_args`] checks them.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct AnalyzeCommand {
    /// A project file: its run sheet, chosen terms and transform
    #[arg(value_name = "PROJECT.ron")]
    pub project: Option<PathBuf>,
    /// A coded table (CSV) to analyse instead of a project
    #[arg(long, value_name = "FILE")]
    pub csv: Option<PathBuf>,
    /// The response column [default: the first one]
    #[arg(long, value_name = "NAME")]
    pub response: Option<String>,
    /// Model terms separated by commas, e.g. A,C,D,AC,AD [default: the project's chosen terms;
    /// else, with replicated runs or centre points, the terms significant against pure error at
    /// 5 %; otherwise the effects beyond Lenth's margin of error; kept hierarchical]
    #[arg(long, value_name = "LIST")]
    pub terms: Option<String>,
    /// Transform of the response: none, ln, log10, sqrt, inverse or power:L (e.g. power:0.5)
    #[arg(long, value_name = "T", allow_hyphen_values = true)]
    pub transform: Option<String>,
    /// Print the results as one JSON object
    #[arg(long)]
    pub json: bool,
}

/// The options of one `analyze` call, validated.
#[derive(Debug, Clone, PartialEq)]
pub struct AnalyzeArgs {
    /// Where the data come from: a coded table or a project file.
    pub input: Input,
    /// The response column; `None` = the first.
    pub response: Option<String>,
    /// Model terms as typed; `None` = chosen by Lenth's method.
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

impl AnalyzeCommand {
    /// Checks the options: one data source, a well-formed term list and transform. Errors are
    /// one-line messages.
    pub fn into_args(self) -> Result<AnalyzeArgs, String> {
        let input = match (self.csv, self.project) {
            (Some(_), Some(_)) => {
                return Err("give a project file or --csv FILE, not both".into());
            }
            (Some(c), None) => Input::Csv(c),
            (None, Some(p)) => Input::Project(p),
            (None, None) => {
                return Err(
                    "`analyze` needs a project file or a coded table: --csv FILE (see `twofold analyze --help`)"
                        .into(),
                );
            }
        };
        Ok(AnalyzeArgs {
            input,
            response: self.response,
            terms: self.terms.as_deref().map(split_terms).transpose()?,
            transform: self.transform.as_deref().map(parse_transform).transpose()?,
            json: self.json,
        })
    }
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
    use crate::cli::args::{Command, Reading, read};

    /// Reads `twofold analyze LIST...` as the program does: the command line, then the checks.
    fn parse(list: &[&str]) -> Result<AnalyzeArgs, String> {
        let full: Vec<String> = std::iter::once("analyze")
            .chain(list.iter().copied())
            .map(str::to_string)
            .collect();
        match read(&full) {
            Reading::Run(command) => match *command {
                Command::Analyze(a) => a.into_args(),
                other => Err(format!("{other:?}")),
            },
            Reading::Refused(message) => Err(message),
            other => Err(format!("{other:?}")),
        }
    }

    #[test]
    fn arguments_are_read_strictly() {
        let a = parse(&["--csv", "t.csv", "--json", "--transform=power:0.5"]).unwrap();
        assert_eq!(a.input, Input::Csv(PathBuf::from("t.csv")));
        assert!(a.json);
        assert_eq!(a.transform, Some(Transform::Power(0.5)));
        let a = parse(&["p.ron", "--terms", "A, C,AC", "--transform", "power:-1"]).unwrap();
        assert_eq!(a.input, Input::Project(PathBuf::from("p.ron")));
        assert_eq!(a.terms, Some(vec!["A".into(), "C".into(), "AC".into()]));
        assert_eq!(a.transform, Some(Transform::Power(-1.0)));
        let cases: &[(&[&str], &str)] = &[
            (&["--csv"], "a value is required for '--csv <FILE>'"),
            (&["--csv", "a", "--bogus"], "unknown option `--bogus`"),
            (&["--json"], "needs a project file or a coded table"),
            (
                &["--csv", "a", "--csv", "b"],
                "cannot be used multiple times",
            ),
            (&["--csv", "a", "--terms", "A,,B"], "empty term"),
            (&["--csv", "a", "--transform", "cube"], "use none, ln"),
            (&["--csv", "a", "--transform", "power:0"], "power of 0"),
            (
                &["--csv", "a", "--json=yes"],
                "unexpected value 'yes' for '--json'",
            ),
            (&["a.ron", "b.ron"], "unexpected argument `b.ron`"),
            (&["a.ron", "--csv", "b.csv"], "not both"),
        ];
        for (list, needle) in cases {
            let e = parse(list).unwrap_err();
            assert!(e.contains(needle), "{list:?}: {e}");
        }
    }
}
