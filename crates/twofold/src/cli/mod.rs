//! Headless subcommands: `plan`, `analyze` and `export`, and the choice between them and the
//! window.
//!
//! [`run`] takes the arguments after the program name and writes to the given streams, so tests
//! call it in-process; it never ends the process. Exit codes: 0 success (including `--help` and
//! `--version`), 1 failure while working, 2 bad input (a one-line message naming the problem).
//! [`launch`] decides whether a command line opens the window or runs a command.

use std::io::Write;
use std::path::{Path, PathBuf};

pub mod analyze;
pub mod args;
pub mod best;
pub mod export;
pub mod plan;
mod plan_axial;
mod plan_follow;
mod plan_power;
mod plan_require;
mod plan_screening;
mod plan_split;

/// Exit code for bad input.
pub const EXIT_BAD_INPUT: i32 = 2;
/// Exit code for a failure while working (e.g. a file could not be written).
pub const EXIT_FAILURE: i32 = 1;

/// What a command line asks the program to do.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Launch {
    /// Open the window: on the bundled demo project (`None`) or on a project file.
    Window(Option<PathBuf>),
    /// Run a command, print help or version, or refuse the command line: see [`run`].
    Command,
}

/// Decides between the window and the commands, without opening anything.
///
/// No argument opens the window on the demo. One argument opens the window on that project when
/// it reads as a path: it is not a command name nor an option, and it ends in `.ron`, names a
/// folder (`dir/name`) or is an existing file. Everything else goes to [`run`], so a mistyped
/// command (`twofold plna`) is reported as such instead of being opened as a project.
pub fn launch(args: &[String]) -> Launch {
    match args {
        [] => Launch::Window(None),
        [one] if reads_as_project(one) => Launch::Window(Some(PathBuf::from(one))),
        _ => Launch::Command,
    }
}

fn reads_as_project(arg: &str) -> bool {
    if arg.is_empty() || arg.starts_with('-') || args::command_names().iter().any(|c| c == arg) {
        return false;
    }
    let path = Path::new(arg);
    path.extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("ron"))
        || path.components().count() > 1
        || path.is_file()
}

/// Runs a command line (the arguments after the program name; `args[0]` is the subcommand).
pub fn run(args: &[String], out: &mut dyn Write, err: &mut dyn Write) -> i32 {
    match args::read(args) {
        args::Reading::Run(command) => match *command {
            args::Command::Plan(a) => plan::run(&a, out, err),
            args::Command::Analyze(a) => match a.into_args() {
                Ok(a) => analyze::run(a, out, err),
                Err(message) => {
                    let _ = writeln!(err, "error: {message}");
                    EXIT_BAD_INPUT
                }
            },
            args::Command::Best(a) => best::run(&a, out, err),
            args::Command::Export(a) => export::run(&a, out, err),
        },
        args::Reading::Asked(text) => match out.write_all(text.as_bytes()) {
            Ok(()) => 0,
            Err(_) => EXIT_FAILURE,
        },
        args::Reading::Refused(message) => {
            let _ = writeln!(err, "{message}");
            EXIT_BAD_INPUT
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn s(v: &[&str]) -> Vec<String> {
        v.iter().map(|x| x.to_string()).collect()
    }

    fn run_args(v: &[&str]) -> (i32, String, String) {
        let (mut out, mut err) = (Vec::new(), Vec::new());
        let code = run(&s(v), &mut out, &mut err);
        (
            code,
            String::from_utf8(out).unwrap(),
            String::from_utf8(err).unwrap(),
        )
    }

    #[test]
    fn bare_paths_open_the_window_and_commands_do_not() {
        assert_eq!(launch(&[]), Launch::Window(None));
        for path in [
            "cure.ron",
            "CURE.RON",
            "projects/cure",
            "./plan",
            "/tmp/x.ron",
        ] {
            assert_eq!(
                launch(&s(&[path])),
                Launch::Window(Some(PathBuf::from(path))),
                "{path}"
            );
        }
        let dir = tempfile::tempdir().unwrap();
        let file = dir.path().join("project-without-extension");
        std::fs::write(&file, "").unwrap();
        let file = file.display().to_string();
        assert_eq!(
            launch(std::slice::from_ref(&file)),
            Launch::Window(Some(PathBuf::from(&file)))
        );
        for argv in [
            &["plan"][..],
            &["analyze"],
            &["export"],
            &["help"],
            &["--help"],
            &["-h"],
            &["--version"],
            &["-V"],
            &["plna"],
            &["plan", "--factors", "3"],
            &["cure.ron", "other.ron"],
        ] {
            assert_eq!(launch(&s(argv)), Launch::Command, "{argv:?}");
        }
    }

    #[test]
    fn help_and_version_print_to_stdout_and_exit_zero() {
        for argv in [
            &["--help"][..],
            &["-h"],
            &["help"],
            &["plan", "--help"],
            &["analyze", "--help"],
            &["export", "--help"],
            &["help", "plan"],
            &["plan", "-h"],
        ] {
            let (code, out, err) = run_args(argv);
            assert_eq!(code, 0, "{argv:?}: {err}");
            assert!(err.is_empty(), "{argv:?}: {err}");
            assert!(out.contains("Usage: twofold"), "{argv:?}: {out}");
        }
        let (code, out, _) = run_args(&["--help"]);
        assert_eq!(code, 0);
        for needle in [
            "twofold [PROJECT.ron]",
            "plan",
            "analyze",
            "export",
            "Exit codes",
        ] {
            assert!(out.contains(needle), "{needle}: {out}");
        }
        let (_, out, _) = run_args(&["plan", "--help"]);
        for option in [
            "--factors",
            "--runs",
            "--generators",
            "--fold",
            "--search-seconds",
        ] {
            assert!(out.contains(option), "{option}: {out}");
        }
        // Each command's long description and examples come with `--help`.
        for (argv, needle) in [
            (&["plan", "--help"], "of least aberration is searched for"),
            (
                &["analyze", "--help"],
                "An empty response\ncell is a missing value",
            ),
            (&["export", "--help"], "300 dpi"),
            (
                &["help", "plan"],
                "twofold plan --factors 5 --runs 16 --json",
            ),
        ] {
            let (_, out, _) = run_args(argv);
            assert!(out.contains(needle), "{argv:?}: {out}");
        }
        let (code, out, _) = run_args(&["--version"]);
        assert_eq!(code, 0);
        assert_eq!(out.trim(), format!("twofold {}", env!("CARGO_PKG_VERSION")));
    }

    #[test]
    fn usage_errors_exit_two_with_one_line() {
        for argv in [
            &["plan", "--bogus"][..],
            &["analyze", "--csv"],
            &["export", "--out", "x.pdf", "--paper"],
            &["plna"],
            &["--colour"],
        ] {
            let (code, out, err) = run_args(argv);
            assert_eq!(code, EXIT_BAD_INPUT, "{argv:?}");
            assert!(out.is_empty(), "{argv:?}: {out}");
            assert_eq!(err.trim_end().lines().count(), 1, "{argv:?}: {err}");
            assert!(err.starts_with("error: "), "{argv:?}: {err}");
        }
        // No command at all: the overview goes to stderr, exit 2 (the program itself opens the
        // window instead, see `launch`).
        let (code, out, err) = run_args(&[]);
        assert_eq!(code, EXIT_BAD_INPUT);
        assert!(out.is_empty());
        assert!(err.contains("Usage: twofold"), "{err}");
    }
}
