//! Twofold: plan and analyse two-level factorial experiments.
//!
//! `twofold` opens the window on the embedded demo project, `twofold PATH.ron` opens a project,
//! `twofold plan|analyze|export ...` runs headless.

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    if args
        .first()
        .is_some_and(|a| twofold_app::cli::is_subcommand(a))
    {
        let stdout = std::io::stdout();
        let stderr = std::io::stderr();
        let code = twofold_app::cli::run(&args, &mut stdout.lock(), &mut stderr.lock());
        std::process::exit(code);
    }
    std::process::exit(twofold_app::app::run_window(
        args.first().map(std::path::PathBuf::from),
    ));
}
