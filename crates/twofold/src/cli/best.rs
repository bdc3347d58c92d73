//! The `best` subcommand: the settings that satisfy every response's goal at once, with noise
//! factors held in check.
//!
//! ```text
//! twofold best PROJECT.ron [--goal NAME=SPEC]... [--importance NAME=I]... [--terms NAME=A,B,AB]...
//!              [--noise C,D] [--noise-sd C=0.5]... [--json]
//! twofold best --csv FILE --goal NAME=SPEC ...
//! ```
//!
//! A thin front end: the goals and choices are written into (a copy of) the project, every
//! response's report is built by [`Report::build`] as the window builds it, and the one decision
//! ([`twofold_study::report::decide`]) is rendered by
//! [`twofold_study::report::decision_out`].

use std::io::Write;
use std::path::PathBuf;

use twofold_study::project::{GoalAim, Project, ResponseGoal};
use twofold_study::report::decision_out::{decision_json, decision_text};
use twofold_study::report::{DecideOptions, Report, decide};

use super::{EXIT_BAD_INPUT, EXIT_FAILURE};

/// The long description shown by `--help`.
pub(crate) const LONG_ABOUT: &str = "\
The settings that satisfy every response's goal at once (Derringer & Suich's overall
desirability, the weighted geometric mean of each goal's desirability), with the prediction of
every response there, its interval for one new run, and the spread transmitted by noise factors.

Goals are written NAME=SPEC with SPEC one of
  max:LOW:HIGH[:W]            as large as possible: worthless at LOW, fully met at HIGH
  min:LOW:HIGH[:W]            as small as possible: fully met at LOW, worthless at HIGH
  target:LOW:TARGET:HIGH[:S[:T]]  as near TARGET as possible, worthless outside LOW..HIGH
W, S and T are shape exponents (default 1). NAME.sd=min:LOW:HIGH asks for a small spread
transmitted by the noise factors. Goals given here replace the project's goals; responses not
named are then left out of the choice (but still predicted). Noise factors are held at their
centre for the mean; their standard deviation in use is in coded units (1 = half the tested
range).";

/// The examples shown by `--help`.
pub(crate) const AFTER_HELP: &str = "\
Examples:
  twofold best cure.ron
  twofold best cure.ron --goal 'Solvent rubs=max:50:80' --goal 'Gloss 60°=min:80:90' --json
  twofold best --csv results.csv --goal Y=target:40:45:50 --noise D --goal Y.sd=min:0:2";

/// The options of `twofold best`, as typed.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct BestArgs {
    /// A project file: its run sheet, chosen models, goals and noise factors
    #[arg(value_name = "PROJECT.ron")]
    pub project: Option<PathBuf>,
    /// A coded table (CSV, as for `analyze`) instead of a project
    #[arg(long, value_name = "FILE")]
    pub csv: Option<PathBuf>,
    /// A goal, NAME=SPEC (repeatable; see above)
    #[arg(long = "goal", value_name = "NAME=SPEC")]
    pub goals: Vec<String>,
    /// Importance of a goal in the overall desirability, NAME=I (repeatable; default 1)
    #[arg(long = "importance", value_name = "NAME=I")]
    pub importance: Vec<String>,
    /// Model terms of a response, NAME=A,B,AB (repeatable; default the project's or the default
    /// choice)
    #[arg(long = "terms", value_name = "NAME=LIST")]
    pub terms: Vec<String>,
    /// Noise factors, by letter or name, separated by commas
    #[arg(long, value_name = "LIST")]
    pub noise: Option<String>,
    /// Standard deviation of a noise factor in use, coded units, C=0.5 (repeatable; default 1)
    #[arg(long = "noise-sd", value_name = "C=SD")]
    pub noise_sd: Vec<String>,
    /// Print the result as one JSON object
    #[arg(long)]
    pub json: bool,
}

/// Runs `twofold best`.
pub fn run(a: &BestArgs, out: &mut dyn Write, err: &mut dyn Write) -> i32 {
    let project = match prepare(a) {
        Ok(p) => p,
        Err(message) => return bad_input(err, &message),
    };
    let reports: Vec<Report> = (0..project.responses.len())
        .map(|i| Report::build(&project, 0, i, &project.responses[i].model))
        .collect();
    let refs: Vec<&Report> = reports.iter().collect();
    let decision = decide(&project, &refs, &DecideOptions::default());
    let text = if a.json {
        match decision_json(&project, &decision)
            .and_then(|v| serde_json::to_string_pretty(&v).map_err(|e| e.to_string()))
        {
            Ok(s) => s + "\n",
            Err(message) => return bad_input(err, &message),
        }
    } else {
        match decision_text(&project, &decision) {
            Ok(s) => s,
            Err(message) => return bad_input(err, &message),
        }
    };
    match out.write_all(text.as_bytes()) {
        Ok(()) => 0,
        Err(_) => EXIT_FAILURE,
    }
}

fn bad_input(err: &mut dyn Write, message: &str) -> i32 {
    let line = message.replace(['\n', '\r'], " ");
    let _ = writeln!(err, "error: {line}");
    EXIT_BAD_INPUT
}

/// The project with the command line's goals, importances, terms and noise factors written in.
fn prepare(a: &BestArgs) -> Result<Project, String> {
    let mut project = match (&a.project, &a.csv) {
        (Some(_), Some(_)) => return Err("give a project file or --csv FILE, not both".into()),
        (Some(p), None) => twofold_study::project::load_project(p).map_err(|e| e.to_string())?,
        (None, Some(path)) => {
            let bytes = std::fs::read(path)
                .map_err(|e| format!("cannot read `{}`: {e}", path.display()))?;
            let table = twofold_study::interchange::coded::read_coded_csv(&bytes)
                .map_err(|e| format!("{}: {e}", path.display()))?;
            let name = path
                .file_stem()
                .map_or_else(String::new, |s| s.to_string_lossy().into_owned());
            twofold_study::report::project_from_coded(&table, &name)
        }
        (None, None) => {
            return Err(
                "`best` needs a project file or a coded table: --csv FILE (see `twofold best --help`)"
                    .into(),
            );
        }
    };
    if project.responses.is_empty() {
        return Err("the project has no responses".into());
    }
    if !a.goals.is_empty() {
        for r in &mut project.responses {
            r.goal = ResponseGoal::default();
            r.spread_goal = ResponseGoal::default();
        }
    }
    for g in &a.goals {
        let (name, spec) = split_pair(g, "--goal", "NAME=SPEC")?;
        let (index, spread) = response_of(&project, name, "--goal")?;
        let aim = parse_aim(spec).map_err(|why| format!("--goal `{g}`: {why}"))?;
        let goal = ResponseGoal {
            aim,
            importance: 1.0,
        };
        goal.to_core()
            .map(|c| c.validate())
            .transpose()
            .map_err(|e| format!("--goal `{g}`: {e}"))?;
        let def = &mut project.responses[index];
        if spread {
            def.spread_goal = goal;
        } else {
            def.goal = goal;
        }
    }
    for item in &a.importance {
        let (name, value) = split_pair(item, "--importance", "NAME=I")?;
        let (index, spread) = response_of(&project, name, "--importance")?;
        let w = number(value).filter(|w| *w > 0.0).ok_or_else(|| {
            format!("--importance `{item}`: the importance must be a number greater than 0")
        })?;
        let def = &mut project.responses[index];
        let goal = if spread {
            &mut def.spread_goal
        } else {
            &mut def.goal
        };
        if goal.is_ignored() {
            return Err(format!(
                "--importance `{item}`: “{name}” has no goal to weigh"
            ));
        }
        goal.importance = w;
    }
    let k = project.factors.len();
    for item in &a.terms {
        let (name, list) = split_pair(item, "--terms", "NAME=A,B,AB")?;
        let (index, spread) = response_of(&project, name, "--terms")?;
        if spread {
            return Err(format!("--terms `{item}`: name a response, not its spread"));
        }
        let mut terms = Vec::new();
        for label in list.split(',').map(str::trim) {
            let t = twofold_core::term::Term::parse(label, k)
                .map_err(|e| format!("--terms `{item}`: {e}"))?;
            terms.push(t.label());
        }
        let model = &mut project.responses[index].model;
        model.terms = terms;
        model.hierarchical = false;
    }
    if let Some(list) = &a.noise {
        for f in &mut project.factors {
            f.noise_sd = None;
        }
        for part in list.split(',').map(str::trim) {
            let j = factor_of(&project, part, "--noise")?;
            project.factors[j].noise_sd = Some(1.0);
        }
    }
    for item in &a.noise_sd {
        let (name, value) = split_pair(item, "--noise-sd", "C=SD")?;
        let j = factor_of(&project, name, "--noise-sd")?;
        let sd = number(value).filter(|v| *v > 0.0).ok_or_else(|| {
            format!("--noise-sd `{item}`: the standard deviation must be a number greater than 0")
        })?;
        project.factors[j].noise_sd = Some(sd);
    }
    Ok(project)
}

fn number(text: &str) -> Option<f64> {
    text.trim().parse::<f64>().ok().filter(|v| v.is_finite())
}

fn split_pair<'a>(item: &'a str, option: &str, form: &str) -> Result<(&'a str, &'a str), String> {
    match item.rsplit_once('=') {
        Some((name, value)) if !name.trim().is_empty() => Ok((name.trim(), value.trim())),
        _ => Err(format!("{option} `{item}`: write {form}")),
    }
}

/// The response a name refers to, and whether it names its spread (`NAME.sd`).
fn response_of(project: &Project, name: &str, option: &str) -> Result<(usize, bool), String> {
    let find = |n: &str| project.responses.iter().position(|r| r.name == n);
    if let Some(i) = find(name) {
        return Ok((i, false));
    }
    if let Some(i) = name.strip_suffix(".sd").and_then(find) {
        return Ok((i, true));
    }
    let names: Vec<&str> = project.responses.iter().map(|r| r.name.as_str()).collect();
    Err(format!(
        "{option}: unknown response `{name}` (the responses are: {})",
        names.join(", ")
    ))
}

/// A factor by letter (A, B, ...) or by name.
fn factor_of(project: &Project, name: &str, option: &str) -> Result<usize, String> {
    let mut chars = name.chars();
    if let (Some(c), None) = (chars.next(), chars.next())
        && let Some(j) = twofold_core::term::factor_index(c.to_ascii_uppercase())
        && j < project.factors.len()
    {
        return Ok(j);
    }
    project
        .factors
        .iter()
        .position(|f| f.name == name)
        .ok_or_else(|| format!("{option}: unknown factor `{name}` (give its letter or name)"))
}

/// Reads `max:LOW:HIGH[:W]`, `min:LOW:HIGH[:W]` or `target:LOW:TARGET:HIGH[:S[:T]]`.
pub fn parse_aim(spec: &str) -> Result<GoalAim, String> {
    let parts: Vec<&str> = spec.split(':').map(str::trim).collect();
    let kind = parts
        .first()
        .map(|s| s.to_ascii_lowercase())
        .unwrap_or_default();
    let mut numbers = Vec::new();
    for p in &parts[1..] {
        numbers.push(number(p).ok_or_else(|| format!("`{p}` is not a number"))?);
    }
    let shape = |i: usize, fallback: f64| numbers.get(i).copied().unwrap_or(fallback);
    let aim = match (kind.as_str(), numbers.len()) {
        ("max", 2 | 3) => GoalAim::Maximise {
            low: numbers[0],
            high: numbers[1],
            shape: shape(2, 1.0),
        },
        ("min", 2 | 3) => GoalAim::Minimise {
            low: numbers[0],
            high: numbers[1],
            shape: shape(2, 1.0),
        },
        ("target", 3..=5) => GoalAim::Target {
            low: numbers[0],
            target: numbers[1],
            high: numbers[2],
            shape_below: shape(3, 1.0),
            shape_above: shape(4, shape(3, 1.0)),
        },
        ("max" | "min", _) => return Err(format!("write {kind}:LOW:HIGH or {kind}:LOW:HIGH:W")),
        ("target", _) => return Err("write target:LOW:TARGET:HIGH (then optional shapes)".into()),
        _ => return Err(format!("unknown goal `{kind}` (use max, min or target)")),
    };
    Ok(aim)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn goal_specs_read_and_refuse() {
        assert_eq!(
            parse_aim("max:50:80"),
            Ok(GoalAim::Maximise {
                low: 50.0,
                high: 80.0,
                shape: 1.0
            })
        );
        assert_eq!(
            parse_aim("target:1:2:4:2"),
            Ok(GoalAim::Target {
                low: 1.0,
                target: 2.0,
                high: 4.0,
                shape_below: 2.0,
                shape_above: 2.0
            })
        );
        assert!(parse_aim("max:5").is_err());
        assert!(parse_aim("most:1:2").unwrap_err().contains("unknown goal"));
        assert!(parse_aim("min:a:2").unwrap_err().contains("not a number"));
    }
}
