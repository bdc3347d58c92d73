//! Headless subcommands: `plan`, `analyze` and `export`.
//!
//! [`run`] takes the arguments after the program name and writes to the given streams, so tests
//! call it in-process. Exit codes: 0 success, 1 failure while working, 2 bad input (a one-line
//! message naming the problem).

use std::io::Write;

pub mod analyze;
pub mod args;
pub mod export;
pub mod plan;

/// Exit code for bad input.
pub const EXIT_BAD_INPUT: i32 = 2;
/// Exit code for a failure while working (e.g. a file could not be written).
pub const EXIT_FAILURE: i32 = 1;

/// Whether `first` names a headless subcommand.
pub fn is_subcommand(first: &str) -> bool {
    matches!(first, "plan" | "analyze" | "export")
}

/// Runs a subcommand. `args[0]` is the subcommand name.
pub fn run(args: &[String], out: &mut dyn Write, err: &mut dyn Write) -> i32 {
    let Some(first) = args.first() else {
        let _ = writeln!(err, "error: no subcommand given (plan, analyze or export)");
        return EXIT_BAD_INPUT;
    };
    let rest = &args[1..];
    match first.as_str() {
        "plan" => plan::run(rest, out, err),
        "analyze" => analyze::run(rest, out, err),
        "export" => export::run(rest, out, err),
        other => {
            let _ = writeln!(
                err,
                "error: unknown subcommand `{other}` (plan, analyze or export)"
            );
            EXIT_BAD_INPUT
        }
    }
}
