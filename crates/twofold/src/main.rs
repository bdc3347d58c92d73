//! Twofold: plan and analyse two-level factorial experiments.
//!
//! `twofold` opens the window on the embedded demo project, `twofold PATH.ron` opens a project,
//! `twofold plan|analyze|export ...` runs headless; `twofold --help` lists it all.

use std::ffi::OsString;
use std::path::PathBuf;

use twofold_app::cli::{self, Launch};

fn main() {
    let raw: Vec<OsString> = std::env::args_os().skip(1).collect();
    let args: Vec<String> = match raw
        .iter()
        .map(|a| a.clone().into_string())
        .collect::<Result<_, _>>()
    {
        Ok(args) => args,
        // A project path need not be valid text; it is passed on exactly as given.
        Err(_) if raw.len() == 1 => {
            let path = raw.into_iter().next().map(PathBuf::from);
            std::process::exit(twofold_app::app::run_window(path));
        }
        Err(bad) => {
            eprintln!(
                "error: the argument `{}` is not valid text (UTF-8)",
                bad.to_string_lossy()
            );
            std::process::exit(cli::EXIT_BAD_INPUT);
        }
    };
    let code = match cli::launch(&args) {
        Launch::Window(path) => twofold_app::app::run_window(path),
        Launch::Command => {
            let stdout = std::io::stdout();
            let stderr = std::io::stderr();
            cli::run(&args, &mut stdout.lock(), &mut stderr.lock())
        }
    };
    std::process::exit(code);
}
