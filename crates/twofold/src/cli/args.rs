//! The command line of the program, declared with `clap`: the subcommands, their options and
//! help texts, and the translation of `clap`'s outcomes into our exit codes and one-line errors.
//!
//! Only the form of the command line is checked here (known options, one value each, whole
//! numbers where a count is asked for). What a value means — a factor list, generator words, a
//! transform, a paper size — is checked by the subcommand itself, with messages in its own words.

use clap::error::{ContextKind, ContextValue, ErrorKind};
use clap::{ColorChoice, CommandFactory, Parser, Subcommand};

use super::analyze::AnalyzeCommand;
use super::export::ExportArgs;
use super::plan::PlanArgs;

const ABOUT: &str = "Plan and analyse two-level factorial experiments.";

const LONG_ABOUT: &str = "\
Plan and analyse two-level factorial experiments.

Without a command the window opens: on the bundled demo project, or on the project file given
(twofold PROJECT.ron). The commands below work without a window and write to the terminal or to
files. A project file whose name is also a command name is opened as ./NAME.";

const AFTER_HELP: &str = "\
Exit codes: 0 done, 1 failure while working (e.g. a file could not be written), 2 bad input
(one line on standard error naming the problem).

Examples:
  twofold plan --factors 5 --runs 16
  twofold analyze --csv results.csv --json
  twofold best project.ron --json
  twofold export project.ron --out summary.pdf";

/// The whole command line after the program name.
#[derive(Debug, Parser)]
#[command(
    name = "twofold",
    version,
    about = ABOUT,
    long_about = LONG_ABOUT,
    after_help = AFTER_HELP,
    override_usage = "twofold [PROJECT.ron]\n       twofold <COMMAND> [OPTIONS]",
    subcommand_required = true,
    arg_required_else_help = true,
    color = ColorChoice::Never
)]
pub struct Cli {
    /// The command to run.
    #[command(subcommand)]
    pub command: Command,
}

/// The headless commands.
#[derive(Debug, Subcommand)]
#[expect(
    clippy::large_enum_variant,
    reason = "parsed once per run of the program; boxing the arguments would save nothing that matters"
)]
pub enum Command {
    /// Choose a design, show its aliasing and print the randomised run sheet.
    #[command(long_about = super::plan::LONG_ABOUT, after_help = super::plan::AFTER_HELP)]
    Plan(PlanArgs),
    /// Effects, Lenth's margins, a model fit and its ANOVA for one response.
    #[command(
        long_about = super::analyze::LONG_ABOUT,
        after_help = super::analyze::AFTER_HELP
    )]
    Analyze(AnalyzeCommand),
    /// The settings that satisfy every response's goal at once, noise factors held in check.
    #[command(long_about = super::best::LONG_ABOUT, after_help = super::best::AFTER_HELP)]
    Best(super::best::BestArgs),
    /// Write the summary (a page per response), the blank run sheet or the run sheet as CSV.
    #[command(long_about = super::export::LONG_ABOUT)]
    Export(ExportArgs),
}

/// The names of the commands, and `help`, as typed on the command line.
pub fn command_names() -> Vec<String> {
    let mut names: Vec<String> = Cli::command()
        .get_subcommands()
        .flat_map(|c| {
            std::iter::once(c.get_name().to_string()).chain(c.get_all_aliases().map(str::to_string))
        })
        .collect();
    names.push("help".to_string());
    names
}

/// What reading the command line gave.
#[derive(Debug)]
pub enum Reading {
    /// A command to run.
    Run(Box<Command>),
    /// Text the user asked for (`--help`, `--version`, `help plan`): print it, exit 0.
    Asked(String),
    /// The command line is malformed: a message for standard error, exit 2. It is one line
    /// starting `error: `, except when no command is given at all (then it is the overview).
    Refused(String),
}

/// Reads the arguments after the program name.
pub fn read(args: &[String]) -> Reading {
    let argv = std::iter::once("twofold".to_string()).chain(args.iter().cloned());
    match Cli::try_parse_from(argv) {
        Ok(cli) => Reading::Run(Box::new(cli.command)),
        Err(e) => match e.kind() {
            ErrorKind::DisplayHelp | ErrorKind::DisplayVersion => {
                Reading::Asked(e.render().to_string())
            }
            // Nothing at all to run: the overview is the most useful answer.
            ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand => {
                Reading::Refused(e.render().to_string().trim_end().to_string())
            }
            _ => Reading::Refused(one_line(&e, args)),
        },
    }
}

/// A `clap` error as one line: what is wrong, a suggestion if `clap` has one, and where to read
/// the usage.
fn one_line(e: &clap::Error, args: &[String]) -> String {
    let names = command_names();
    let help = match args.first() {
        Some(first) if names.contains(first) && first != "help" => {
            format!("twofold {first} --help")
        }
        _ => "twofold --help".to_string(),
    };
    let context = |kind: ContextKind| match e.get(kind) {
        Some(ContextValue::String(s)) => Some(s.clone()),
        Some(ContextValue::Strings(list)) => Some(list.join(", ")),
        _ => None,
    };
    let problem = match e.kind() {
        ErrorKind::UnknownArgument => {
            let arg = context(ContextKind::InvalidArg).unwrap_or_default();
            if arg.starts_with('-') {
                format!("unknown option `{arg}`")
            } else {
                format!("unexpected argument `{arg}`")
            }
        }
        ErrorKind::InvalidSubcommand => {
            let arg = context(ContextKind::InvalidSubcommand).unwrap_or_default();
            format!("unknown command `{arg}` (the commands are plan, analyze, best and export)")
        }
        _ => first_sentence(&e.render().to_string()),
    };
    let suggestion = context(ContextKind::SuggestedArg)
        .or_else(|| context(ContextKind::SuggestedSubcommand))
        .map(|s| format!("; did you mean `{s}`?"))
        .unwrap_or_default();
    format!("error: {problem}{suggestion} (see `{help}`)")
}

/// The message of a rendered `clap` error without its `error: ` prefix, its tips and its usage
/// block; a message ending in a colon keeps the indented list that follows it, on the same line.
fn first_sentence(rendered: &str) -> String {
    let mut lines = rendered.lines();
    let first = lines.next().unwrap_or_default();
    let first = first.strip_prefix("error: ").unwrap_or(first).trim_end();
    if let Some(head) = first.strip_suffix(':') {
        let items: Vec<&str> = lines
            .take_while(|l| l.starts_with("  ") && !l.trim_start().starts_with("tip:"))
            .map(str::trim)
            .collect();
        if !items.is_empty() {
            return format!("{head}: {}", items.join(", "));
        }
    }
    first.to_string()
}

/// Reads a count or a seed, with the message used everywhere for a malformed number.
pub fn whole_number<T: std::str::FromStr>(text: &str) -> Result<T, String> {
    text.trim()
        .parse::<T>()
        .map_err(|_| format!("`{text}` is not a whole number"))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn s(v: &[&str]) -> Vec<String> {
        v.iter().map(|x| x.to_string()).collect()
    }

    #[test]
    fn the_declaration_is_consistent() {
        // clap's own check of the declared options (duplicate names, bad defaults...).
        Cli::command().debug_assert();
    }

    #[test]
    fn usage_errors_are_one_line_naming_the_help() {
        let cases: &[(&[&str], &str)] = &[
            (&["plan", "--bogus"], "unknown option `--bogus`"),
            (&["plan", "--fator", "3"], "did you mean `--factors`?"),
            (&["export", "p.ron", "q.ron"], "unexpected argument `q.ron`"),
            (&["plna"], "unknown command `plna`"),
            (&["plan", "--seed", "x"], "`x` is not a whole number"),
            (&["plan", "--runs"], "a value is required for '--runs <N>'"),
            (
                &["analyze", "--json", "--json"],
                "cannot be used multiple times",
            ),
        ];
        for (argv, needle) in cases {
            let Reading::Refused(message) = read(&s(argv)) else {
                panic!("{argv:?} should be refused")
            };
            assert_eq!(message.lines().count(), 1, "{argv:?}: {message}");
            assert!(message.starts_with("error: "), "{message}");
            assert!(message.contains(needle), "{argv:?}: {message}");
            let help = if argv[0] == "plna" {
                "`twofold --help`"
            } else {
                "--help`"
            };
            assert!(message.ends_with(&format!("{help})")), "{message}");
        }
    }

    #[test]
    fn names_of_the_commands() {
        let names = command_names();
        for n in ["plan", "analyze", "export", "help"] {
            assert!(names.iter().any(|m| m == n), "{n} in {names:?}");
        }
    }
}
