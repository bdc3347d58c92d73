//! The desktop window (being written).

use std::path::PathBuf;

/// Opens the window on `path`, or on the embedded demo project; returns the process exit code.
pub fn run_window(_path: Option<PathBuf>) -> i32 {
    eprintln!("error: the window is not available yet");
    1
}
