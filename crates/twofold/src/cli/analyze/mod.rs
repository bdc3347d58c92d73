//! The `analyze` subcommand: effects, Lenth's method, half-normal positions, a model fit and its
//! ANOVA for one response of a coded table or a project file.
//!
//! ```text
//! twofold analyze --csv FILE [--response NAME] [--terms A,C,AC] [--transform T] [--json]
//! twofold analyze PROJECT.ron [--response NAME] [--terms A,C,AC] [--transform T] [--json]
//! ```
//!
//! The CSV file is a coded table: a header row, one column per factor named by its letter in
//! order (`A`, `B`, `C`, ...; cells −1, 0 or +1, all 0 = centre point), an optional `block`
//! column, then one or more response columns; an empty response cell is a missing value. The
//! factor columns are the leading run of headers `A`, `B`, ... in sequence; the first other
//! header ends them.
//!
//! This is a thin front end: the table is read into a project
//! ([`twofold_study::report::project_from_coded`]), the one report is built by
//! [`Report::build`] exactly as the window builds it, and rendered by
//! [`twofold_study::report::json::report_json`] or [`twofold_study::report::text::report_text`].
//! Only the wording of errors is added here, naming rows and columns of the table.

mod args;

use std::io::Write;

use twofold_core::anova::FitError;
use twofold_core::effects::EffectsError;
use twofold_core::term::Term;
use twofold_core::transform::TransformError;
use twofold_study::project::{ModelSettings, Project};
use twofold_study::report::json::{follow_up_json, report_json_stream};
use twofold_study::report::text::{follow_up_text, report_text};
use twofold_study::report::{NextRun, Report, ReportError, next_runs};

use super::{EXIT_BAD_INPUT, EXIT_FAILURE};

pub(crate) use args::{AFTER_HELP, LONG_ABOUT};
pub use args::{AnalyzeArgs, AnalyzeCommand, Input, parse_transform};
pub use twofold_study::interchange::coded::{
    CodedTable, ResponseColumn, TableError, read_coded_csv,
};

/// Turns the error that stopped a report into a one-line message, naming rows through the table.
fn report_message(err: &ReportError, table: &CodedTable, response: &str) -> String {
    match err {
        ReportError::Data(e) => format!("column `{response}`: {e}"),
        ReportError::Transform(TransformError::Domain {
            transform,
            needs,
            runs,
        }) => match runs.first() {
            Some((run, value)) => {
                let more = if runs.len() > 1 {
                    format!(" (and {} more)", runs.len() - 1)
                } else {
                    String::new()
                };
                format!(
                    "{}, column `{response}`: {transform} needs {needs} responses, found {value}{more}",
                    table.locate(*run)
                )
            }
            None => err.to_string(),
        },
        ReportError::Effects(EffectsError::PartialCentre { run }) => format!(
            "{}: some factors are at 0 and others at -1 or +1; only full centre points (every factor at 0) can be analysed",
            table.locate(*run)
        ),
        ReportError::Effects(EffectsError::TooFewRuns { used }) => format!(
            "column `{response}`: only {used} two-level run(s) have a value; at least 2 are needed"
        ),
        ReportError::Fit(FitError::TooFewRuns { runs, parameters }) => format!(
            "column `{response}`: the model needs {parameters} parameters but only {runs} runs have a value; choose fewer terms"
        ),
        other => other.to_string(),
    }
}

/// Runs `twofold analyze` with its checked options.
pub fn run(a: AnalyzeArgs, out: &mut dyn Write, err: &mut dyn Write) -> i32 {
    let report = match &a.input {
        Input::Csv(path) => report_csv(path, &a),
        Input::Project(path) => report_project(path, &a),
    };
    let (report, follow_up) = match report {
        Ok(x) => x,
        Err(message) => return bad_input(err, &message),
    };
    let text = if a.json {
        let mut value = match report_json_stream(&report) {
            Ok(v) => v,
            Err(message) => return bad_input(err, &message),
        };
        value.insert("follow_up", follow_up_json(&follow_up));
        // Written as it is made: a 2^16 has 65 535 effects, and a value tree of them would
        // take hundreds of megabytes.
        let mut buffered = std::io::BufWriter::new(out);
        let written = serde_json::to_writer_pretty(&mut buffered, &value)
            .map_err(|e| e.to_string())
            .and_then(|()| buffered.write_all(b"\n").map_err(|e| e.to_string()))
            .and_then(|()| buffered.flush().map_err(|e| e.to_string()));
        return match written {
            Ok(()) => 0,
            Err(e) => {
                let _ = writeln!(err, "error: could not write the results as JSON: {e}");
                EXIT_FAILURE
            }
        };
    } else {
        match report_text(&report) {
            Ok(s) => {
                let more = follow_up_text(&follow_up);
                if more.is_empty() {
                    s
                } else {
                    format!("{s}\n{more}")
                }
            }
            Err(message) => return bad_input(err, &message),
        }
    };
    match out.write_all(text.as_bytes()) {
        Ok(()) => 0,
        Err(_) => EXIT_FAILURE,
    }
}

/// The model settings of a call: `--terms` are fitted as typed (no parents added), otherwise
/// `base` (the project's settings, or the defaults for a table: no terms, so the one default
/// choice); `--transform` overrides the transform.
fn settings(a: &AnalyzeArgs, base: ModelSettings) -> Result<ModelSettings, String> {
    let mut s = base;
    if let Some(terms) = &a.terms {
        s.terms = terms.clone();
        s.hierarchical = false;
    }
    if let Some(t) = a.transform {
        s.transform = twofold_study::report::project_transform(t)
            .ok_or_else(|| format!("--transform: {t} cannot be applied here"))?;
    }
    Ok(s)
}

/// Builds the report of a response and turns a stopping error into a message.
fn build(
    project: &Project,
    index: usize,
    model: &ModelSettings,
    word: impl Fn(&ReportError) -> String,
) -> Result<Report, String> {
    let report = Report::build(project, 0, index, model);
    if let Some(e) = &report.stopped {
        return Err(word(e));
    }
    Ok(report)
}

/// Reads a coded table into a project and builds the report; errors are one-line messages. A
/// table carries no design settings, so there are no follow-up options.
fn report_csv(path: &std::path::Path, a: &AnalyzeArgs) -> Result<(Report, Vec<NextRun>), String> {
    let bytes = match std::fs::read(path) {
        Ok(b) => b,
        Err(e) => {
            return Err(format!("cannot read `{}`: {e}", path.display()));
        }
    };
    let table = read_coded_csv(&bytes);
    // The file's text is not needed past this point (a 2^20 table is 61 MB of it).
    drop(bytes);
    let mut table = match table {
        Ok(t) => t,
        Err(e) => return Err(format!("{}: {e}", path.display())),
    };
    let index = match &a.response {
        None => 0,
        Some(name) => match table.responses.iter().position(|r| &r.name == name) {
            Some(i) => i,
            None => {
                let names: Vec<&str> = table.responses.iter().map(|r| r.name.as_str()).collect();
                return Err(format!(
                    "unknown response `{name}` (the file has: {})",
                    names.join(", ")
                ));
            }
        },
    };
    let response = table.responses[index].name.clone();
    if let Some(list) = &a.terms {
        for label in list {
            Term::parse(label, table.factor_count).map_err(|e| format!("--terms: {e}"))?;
        }
    }
    let model = settings(a, ModelSettings::default())?;
    let name = path
        .file_stem()
        .map_or_else(String::new, |s| s.to_string_lossy().into_owned());
    let project = twofold_study::report::project_from_coded(&table, &name);
    // The project holds the settings and values now; the table keeps only what locates a row
    // in an error message.
    table.levels = Vec::new();
    for r in &mut table.responses {
        r.values = Vec::new();
    }
    build(&project, index, &model, |e| {
        report_message(e, &table, &response)
    })
    .map(|r| (r, Vec::new()))
}

/// Reads a project file and builds the report of one response the way the window does: the
/// same table (bad and empty cells missing, excluded runs out of the fit), by default the
/// response's chosen transform and model terms (the default choice when none are chosen yet).
/// The follow-up options are the window's, read from the same report.
fn report_project(
    path: &std::path::Path,
    a: &AnalyzeArgs,
) -> Result<(Report, Vec<NextRun>), String> {
    let project = twofold_study::project::load_project(path).map_err(|e| e.to_string())?;
    let index = match &a.response {
        None if project.responses.is_empty() => {
            return Err(format!("project `{}` has no responses", path.display()));
        }
        None => 0,
        Some(name) => project
            .responses
            .iter()
            .position(|r| &r.name == name)
            .ok_or_else(|| {
                let names: Vec<&str> = project.responses.iter().map(|r| r.name.as_str()).collect();
                format!(
                    "unknown response `{name}` (the project has: {})",
                    names.join(", ")
                )
            })?,
    };
    let def = &project.responses[index];
    let model = settings(a, def.model.clone())?;
    let report = build(&project, index, &model, |e| match e {
        ReportError::Data(_) | ReportError::NoRuns => format!("response `{}`: {e}", def.name),
        other => other.to_string(),
    })?;
    let follow_up = next_runs(&project, Some(&report));
    Ok((report, follow_up))
}

fn bad_input(err: &mut dyn Write, message: &str) -> i32 {
    // One line, whatever the message holds.
    let line = message.replace(['\n', '\r'], " ");
    let _ = writeln!(err, "error: {line}");
    EXIT_BAD_INPUT
}
