//! `twofold export`: the summary (a page per response), the printable blank run sheet, or the
//! run sheet as CSV, from a project file, without a window.
//!
//! ```text
//! twofold export PROJECT.ron --out FILE [--paper a4|letter] [--response NAME|N]
//!                [--goal max|min|target:VALUE] [--date TEXT] [--run-sheet] [--overwrite]
//! ```
//!
//! The extension of FILE picks the format: `.png` (300 dpi), `.svg`, `.pdf`, or `.csv` (the run
//! sheet as data). An existing file is never replaced unless `--overwrite` is given. The page
//! carries no clock time: the date is `--date`, or the date of the latest value entered.

use std::io::Write;
use std::path::{Path, PathBuf};

use twofold_core::predict::Goal;

use super::{EXIT_BAD_INPUT, EXIT_FAILURE};
use twofold_study::export::{self, BuildOptions, Format, Paper};
use twofold_study::interchange;
use twofold_study::project::{Project, load_project};
use twofold_study::report::Report;

/// The long description shown by `--help`.
pub(crate) const LONG_ABOUT: &str = "\
Write, from a project file, the summary of the experiment (FILE ending in .png, .svg or .pdf):
a page per response (every response, or the one named by --response) and, where a page has no
room for everything, pages of more detail at the end. Or write the printable blank run sheet to
carry to the bench (--run-sheet), or the run sheet as data (FILE ending in .csv).

PNG pages are drawn at 300 dpi: 2480 x 3508 pixels on A4, 2550 x 3300 on letter. A document of
several pages gives one PNG or SVG file per page (FILE-1.png, FILE-2.png, ...), or one PDF with
all pages. An existing
file is never replaced unless --overwrite is given. The page never reads the clock: its date is
--date, or the date of the latest value entered.";

/// The options of `twofold export`, as typed.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct ExportArgs {
    /// The project file to export from
    #[arg(value_name = "PROJECT.ron")]
    pub project: Option<PathBuf>,
    /// The file to write; its extension (.png, .svg, .pdf or .csv) picks the format
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
    /// Paper size: a4 or letter [default: a4]
    #[arg(long, value_name = "a4|letter")]
    pub paper: Option<String>,
    /// The one response to summarise, by name or by number counted from 1 [default: every response]
    #[arg(long, value_name = "NAME|N")]
    pub response: Option<String>,
    /// What the best settings aim at: max, min, or target:VALUE with --response [default: max]
    #[arg(long, value_name = "GOAL", allow_hyphen_values = true)]
    pub goal: Option<String>,
    /// Date printed on the page [default: the date of the latest value entered, if recorded]
    #[arg(long, value_name = "TEXT", allow_hyphen_values = true)]
    pub date: Option<String>,
    /// Write the blank run sheet instead of the summary
    #[arg(long = "run-sheet")]
    pub run_sheet: bool,
    /// Replace FILE if it exists already
    #[arg(long)]
    pub overwrite: bool,
}

/// What to write.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kind {
    Summary,
    RunSheet,
    Csv,
}

/// The options of one call, checked.
#[derive(Debug, Clone, PartialEq)]
struct Request {
    project: PathBuf,
    out: PathBuf,
    kind: Kind,
    paper: Paper,
    response: Option<String>,
    goal: Goal,
    date: Option<String>,
    overwrite: bool,
}

/// Bad input, in words for the command line.
#[derive(Debug, thiserror::Error)]
#[error("{0}")]
struct InputError(String);

fn invalid(msg: impl Into<String>) -> InputError {
    InputError(msg.into())
}

fn parse_goal(text: &str) -> Result<Goal, InputError> {
    let t = text.trim().to_ascii_lowercase();
    match t.as_str() {
        "max" | "maximise" | "maximize" => Ok(Goal::Maximise),
        "min" | "minimise" | "minimize" => Ok(Goal::Minimise),
        _ => match t.strip_prefix("target:") {
            Some(v) => v
                .trim()
                .parse::<f64>()
                .ok()
                .filter(|x| x.is_finite())
                .map(Goal::Target)
                .ok_or_else(|| invalid(format!("option `--goal`: `{v}` is not a number"))),
            None => Err(invalid(format!(
                "option `--goal`: `{text}` is not max, min or target:VALUE"
            ))),
        },
    }
}

/// Checks the options of one call.
fn parse_request(parsed: &ExportArgs) -> Result<Request, InputError> {
    let project = parsed
        .project
        .clone()
        .ok_or_else(|| invalid("no project file given (twofold export PROJECT.ron --out FILE)"))?;
    let out = parsed.out.clone().ok_or_else(|| {
        invalid("no output file given: add --out FILE (.png, .svg, .pdf or .csv)")
    })?;
    let run_sheet = parsed.run_sheet;
    let ext = out
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase)
        .unwrap_or_default();
    let kind = match (ext.as_str(), run_sheet) {
        ("csv", _) => Kind::Csv,
        ("png" | "svg" | "pdf", true) => Kind::RunSheet,
        ("png" | "svg" | "pdf", false) => Kind::Summary,
        _ => {
            return Err(invalid(format!(
                "`{}`: the output file must end in .png, .svg, .pdf or .csv",
                out.display()
            )));
        }
    };
    let paper = match parsed.paper.as_deref() {
        None => Paper::A4,
        Some(p) => Paper::parse(p)
            .ok_or_else(|| invalid(format!("option `--paper`: `{p}` is not a4 or letter")))?,
    };
    let goal = match parsed.goal.as_deref() {
        None => Goal::Maximise,
        Some(g) => parse_goal(g)?,
    };
    Ok(Request {
        project,
        out,
        kind,
        paper,
        response: parsed.response.clone(),
        goal,
        date: parsed.date.clone(),
        overwrite: parsed.overwrite,
    })
}

/// The response index named by `--response` (a name, any case, or a 1-based number).
fn response_index(project: &Project, wanted: Option<&str>) -> Result<usize, InputError> {
    if project.responses.is_empty() {
        return Err(invalid(
            "the project has no response to summarise: add one first",
        ));
    }
    let Some(w) = wanted else {
        return Ok(0);
    };
    let w = w.trim();
    if let Some(i) = project
        .responses
        .iter()
        .position(|r| r.name.trim().eq_ignore_ascii_case(w))
    {
        return Ok(i);
    }
    if let Ok(n) = w.parse::<usize>()
        && (1..=project.responses.len()).contains(&n)
    {
        return Ok(n - 1);
    }
    let names: Vec<String> = project
        .responses
        .iter()
        .map(|r| format!("“{}”", r.name))
        .collect();
    Err(invalid(format!(
        "no response “{w}” in the project (it has {})",
        names.join(", ")
    )))
}

fn human_size(bytes: usize) -> String {
    if bytes >= 1024 * 1024 {
        format!("{:.1} MB", bytes as f64 / (1024.0 * 1024.0))
    } else if bytes >= 1024 {
        format!("{} kB", bytes.div_ceil(1024))
    } else {
        format!("{bytes} bytes")
    }
}

/// Runs `twofold export` with the arguments after the subcommand name.
pub fn run(argv: &ExportArgs, out: &mut dyn Write, err: &mut dyn Write) -> i32 {
    let request = match parse_request(argv) {
        Ok(r) => r,
        Err(e) => {
            let _ = writeln!(err, "error: {e}");
            return EXIT_BAD_INPUT;
        }
    };
    let project = match load_project(&request.project) {
        Ok(p) => p,
        Err(e) => {
            let _ = writeln!(err, "error: {e}");
            return EXIT_BAD_INPUT;
        }
    };
    match execute(&request, &project) {
        Ok(lines) => {
            for l in lines {
                let _ = writeln!(out, "{l}");
            }
            0
        }
        Err((code, message)) => {
            let _ = writeln!(err, "error: {message}");
            code
        }
    }
}

/// Refuses to replace existing files unless asked to.
fn check_targets(paths: &[PathBuf], overwrite: bool) -> Result<(), (i32, String)> {
    if overwrite {
        return Ok(());
    }
    match paths.iter().find(|p| p.exists()) {
        Some(p) => Err((
            EXIT_BAD_INPUT,
            format!(
                "`{}` exists already; pass --overwrite to replace it",
                p.display()
            ),
        )),
        None => Ok(()),
    }
}

fn execute(request: &Request, project: &Project) -> Result<Vec<String>, (i32, String)> {
    let bad = |e: InputError| (EXIT_BAD_INPUT, e.to_string());
    match request.kind {
        Kind::Csv => {
            check_targets(std::slice::from_ref(&request.out), request.overwrite)?;
            let bytes = interchange::write_run_sheet_csv(project, &request.out)
                .map_err(|e| (EXIT_FAILURE, e.to_string()))?;
            Ok(vec![format!(
                "wrote {} (run sheet, {} runs, CSV, {})",
                request.out.display(),
                project.runs.len(),
                human_size(bytes)
            )])
        }
        Kind::RunSheet => {
            if project.runs.is_empty() {
                return Err((
                    EXIT_BAD_INPUT,
                    "the project has no runs yet: generate the run sheet from the design first"
                        .into(),
                ));
            }
            let sheet = export::run_sheet_input(project, request.date.clone());
            let pages = export::run_sheet::render_pages(&sheet, request.paper);
            let title = export::run_sheet::document_title(&sheet);
            let report = write_document(request, &pages, &title)?;
            Ok(report_lines(&report, "blank run sheet", request.paper))
        }
        Kind::Summary => {
            let chosen = match request.response.as_deref() {
                Some(wanted) => vec![response_index(project, Some(wanted)).map_err(bad)?],
                None => {
                    response_index(project, None).map_err(bad)?;
                    (0..project.responses.len()).collect()
                }
            };
            if chosen.len() > 1 && matches!(request.goal, Goal::Target(_)) {
                return Err((
                    EXIT_BAD_INPUT,
                    "option `--goal target:VALUE` is for one response: add --response NAME|N"
                        .into(),
                ));
            }
            // One report per response, each built once; every number on the pages comes from it.
            let reports: Vec<Report> = chosen
                .iter()
                .map(|&i| Report::for_response(project, 0, i))
                .collect();
            let refs: Vec<&Report> = reports.iter().collect();
            let options = BuildOptions {
                date: request.date.clone(),
                goal: request.goal,
                goal_response: None,
            };
            let input = export::summary_input(project, &refs, &options);
            let pages = export::summary_pages(&input, request.paper);
            write_document(request, &pages, &export::summary_title(&input)).map(|report| {
                let names: Vec<&str> = chosen
                    .iter()
                    .filter_map(|&i| project.responses.get(i).map(|r| r.name.as_str()))
                    .collect();
                let what = format!("summary of {}", names.join(", "));
                report_lines(&report, &what, request.paper)
            })
        }
    }
}

/// Writes `pages` to the request's file (PDF: one document; PNG or SVG: one file per page),
/// refusing to replace any existing file unless asked to.
fn write_document(
    request: &Request,
    pages: &[String],
    title: &str,
) -> Result<export::ExportReport, (i32, String)> {
    let failed = |e: export::ExportError| (EXIT_FAILURE, e.to_string());
    let format = Format::from_path(&request.out).map_err(failed)?;
    let files = if format == Format::Pdf {
        1
    } else {
        pages.len()
    };
    check_targets(&export::page_paths(&request.out, files), request.overwrite)?;
    export::write_pages(pages, request.paper, &request.out, title, &|_| {}, &|| {
        false
    })
    .map_err(failed)
}

fn report_lines(report: &export::ExportReport, what: &str, paper: Paper) -> Vec<String> {
    let pages = if report.pages == 1 {
        "1 page".to_string()
    } else {
        format!("{} pages", report.pages)
    };
    let format = report.format.extension().to_ascii_uppercase();
    if report.paths.len() == 1 {
        let path = report
            .paths
            .first()
            .map(|p| p.display().to_string())
            .unwrap_or_default();
        return vec![format!(
            "wrote {path} ({what}, {pages}, {}, {format}, {})",
            paper.name(),
            human_size(report.bytes)
        )];
    }
    let mut lines = vec![format!(
        "{what}: {pages}, {}, {format}, one file per page:",
        paper.name()
    )];
    lines.extend(
        report
            .paths
            .iter()
            .map(|p: &PathBuf| format!("wrote {}", Path::new(p).display())),
    );
    lines
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Reads `twofold export ARGV...` as the program does: the command line, then the checks.
    fn parse(argv: &[&str]) -> Result<Request, String> {
        let full: Vec<String> = std::iter::once("export")
            .chain(argv.iter().copied())
            .map(str::to_string)
            .collect();
        match crate::cli::args::read(&full) {
            crate::cli::args::Reading::Run(command) => match *command {
                crate::cli::args::Command::Export(a) => {
                    parse_request(&a).map_err(|e| e.to_string())
                }
                other => Err(format!("{other:?}")),
            },
            other => Err(format!("{other:?}")),
        }
    }

    #[test]
    fn reads_the_options() {
        let r = parse(&[
            "p.ron",
            "--out",
            "x.PDF",
            "--paper",
            "letter",
            "--goal",
            "target:12.5",
            "--date=2025-01-02",
        ])
        .unwrap();
        assert_eq!(r.kind, Kind::Summary);
        assert_eq!(r.paper, Paper::Letter);
        assert_eq!(r.goal, Goal::Target(12.5));
        assert_eq!(r.date.as_deref(), Some("2025-01-02"));
        let r = parse(&["p.ron", "--out", "x.png", "--run-sheet"]).unwrap();
        assert_eq!(r.kind, Kind::RunSheet);
        // A date or a target may begin with a minus sign.
        let r = parse(&[
            "p.ron",
            "--out",
            "x.pdf",
            "--goal",
            "target:-3",
            "--date",
            "-",
        ])
        .unwrap();
        assert_eq!(r.goal, Goal::Target(-3.0));
        assert_eq!(r.date.as_deref(), Some("-"));
    }

    #[test]
    fn bad_input_is_named() {
        let cases: &[(&[&str], &str)] = &[
            (&["--out", "x.pdf"], "no project file"),
            (&["p.ron"], "no output file"),
            (
                &["p.ron", "--out", "x.jpg"],
                "must end in .png, .svg, .pdf or .csv",
            ),
            (
                &["p.ron", "--out", "x.pdf", "--paper", "a5"],
                "`a5` is not a4 or letter",
            ),
            (
                &["p.ron", "--out", "x.pdf", "--goal", "big"],
                "not max, min or target",
            ),
            (
                &["p.ron", "--out", "x.pdf", "--goal", "target:x"],
                "`x` is not a number",
            ),
            (
                &["p.ron", "--out", "x.pdf", "--colour"],
                "unknown option `--colour`",
            ),
            (
                &["p.ron", "q.ron", "--out", "x.pdf"],
                "unexpected argument `q.ron`",
            ),
        ];
        for (argv, want) in cases {
            let e = parse(argv).unwrap_err();
            assert!(e.contains(want), "{argv:?}: {e}");
        }
    }
}
