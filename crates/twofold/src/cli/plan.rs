//! The `plan` subcommand (being written).

use std::io::Write;

/// Runs `twofold plan` with the arguments after the subcommand name.
pub fn run(_args: &[String], _out: &mut dyn Write, err: &mut dyn Write) -> i32 {
    let _ = writeln!(err, "error: `plan` is not available yet");
    super::EXIT_FAILURE
}
