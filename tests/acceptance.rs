//! Acceptance tests: Twofold's computations checked against published sources and an independent
//! statistics library. Each module names its sources beside every check.

mod util;

/// Published fractional designs: generators, defining relations, resolution, word-length patterns.
mod design_tables;
/// Published minimum-aberration word-length patterns reproduced by the search.
mod min_aberration;
/// Published blocking arrangements.
mod blocking_tables;
/// Published worked examples: effects, Lenth's method, half-normal positions.
mod effects_examples;
/// Published worked examples: ANOVA, curvature, lack of fit, pure error.
mod anova_examples;
/// Coefficients, sums of squares, PRESS, leverage and Cook's distance against statsmodels fixtures.
mod statsmodels_fixtures;
/// The headless `plan` command.
mod cli_plan;
/// The headless `analyze` command.
mod cli_analyze;
/// The headless `export` command and interchange formats.
mod cli_export;
