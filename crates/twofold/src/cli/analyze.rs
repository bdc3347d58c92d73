//! The `analyze` subcommand (being written).

use std::io::Write;

/// Runs `twofold analyze` with the arguments after the subcommand name.
pub fn run(_args: &[String], _out: &mut dyn Write, err: &mut dyn Write) -> i32 {
    let _ = writeln!(err, "error: `analyze` is not available yet");
    super::EXIT_FAILURE
}
