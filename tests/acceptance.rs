//! Acceptance tests: Twofold's computations checked against published sources and an independent
//! statistics library. Each module names its sources beside every check.

mod util;

/// Published worked examples: ANOVA, curvature, lack of fit, pure error.
mod anova_examples;
/// Published blocking arrangements.
mod blocking_tables;
/// The headless `analyze` command.
mod cli_analyze;
/// The headless `best` command: keys, a hand-derived robust setting, one-line errors.
mod cli_best;
/// The headless `export` command and interchange formats.
mod cli_export;
/// The headless `plan` command.
mod cli_plan;
/// `plan --fold semifold:...` and `--augment separate:...`, and the window's same runs.
mod cli_plan_follow;
/// Published fractional designs: generators, defining relations, resolution, word-length patterns.
mod design_tables;
/// Desirability: Derringer & Suich's worked example and scipy's optimiser on the same problems.
mod desirability_fixtures;
/// Published worked examples: effects, Lenth's method, half-normal positions.
mod effects_examples;
/// Semifolds and runs added to separate interactions against numpy (brute force included).
mod followup_fixtures;
/// Published minimum-aberration word-length patterns reproduced by the search.
mod min_aberration;
/// One report behind the window, the summary page and `analyze`; the default model choice.
mod one_report;
/// Text read back from exported PDF files (used by `cli_export`).
mod pdf_read;
/// Power and the smallest detectable effect against scipy's noncentral t.
mod power_fixtures;
/// Coefficients, sums of squares, PRESS, leverage and Cook's distance against statsmodels fixtures.
mod statsmodels_fixtures;
