//! One analysis report per response: everything known about one response of one project at one
//! data revision under given model settings, built by one function ([`Report::build`]) and
//! rendered by every front end: the window's panes, the summary page
//! ([`crate::export::summary_input`]) and `twofold analyze` ([`json::report_json`],
//! [`text::report_text`]). Nothing downstream re-derives what the report holds.
//!
//! # Files
//! - `data`: the project (or a coded table read into a project) to the core's table;
//! - `choice`: which terms the model holds and which error the tests use (the one default
//!   choice: pure-error tests when the data carry pure error, Lenth's margins otherwise);
//! - `build`: [`Report::build`], the counts, corner means and warnings in words;
//! - `cache`: [`ReportCache`], a few reports keyed on (revision, response, model settings);
//! - `json`, `text`: the renderers of `twofold analyze`;
//! - `decision`: which settings to run for every response's goal at once, noise factors held
//!   in check ([`decide`]);
//! - `next_runs`: the follow-up runs a project can add, and the one the report points to;
//! - `quadratic`: the quadratic model of a study with axial runs (a central composite design).
//!
//! # What a report holds
//! Data counts (used, missing, excluded, bad cells), the transform, effects with Lenth's margins
//! and half-normal and normal positions, main-effect means, observed corner means, the model
//! choice (terms, how chosen, terms added for hierarchy, notes), the fit with its ANOVA,
//! equations in coded and natural units, diagnostics and residuals in run order, the model-based
//! interaction cells and the Box–Cox profile, the curvature test, which error the tests use
//! ([`ErrorBasis`]), and warnings in plain words. Every step that cannot be done keeps its
//! reason in words; the first typed error that stopped a step is kept in [`Report::stopped`] for
//! front ends that word it their own way (the command names rows and columns of a table).
//!
//! # The fit
//! With terms chosen, those are fitted. With none chosen, the default choice is fitted (the
//! page and the command show it); the window still says "no terms chosen" and offers the same
//! choice as its suggestion ([`Report::chosen_fit`], [`Report::suggested_terms`]).

mod build;
mod cache;
mod choice;
mod data;
pub mod decision;
pub mod decision_out;
pub mod json;
pub mod next_runs;
pub mod next_runs_added;
pub mod quadratic;
pub mod text;

use twofold_core::anova::{Equation, FitError, ModelFit, RangeError};
use twofold_core::boxcox::{BoxCox, BoxCoxError};
use twofold_core::data::{DataError, Observations};
use twofold_core::diagnostics::{Diagnostics, NormalPlotPoint, RunOrderError, RunOrderPoint};
use twofold_core::effects::{EffectTable, EffectsError};
use twofold_core::halfnormal::{HalfNormalPoint, NormalPoint};
use twofold_core::lenth::{Lenth, LenthError, LenthFlag};
use twofold_core::means::{InteractionMeans, MainEffectMeans, MeansError};
use twofold_core::predict::{
    DEFAULT_CONFIDENCE, Goal, Optimum, PredictError, Prediction, best_settings, predict,
};
use twofold_core::term::{Term, TermError};
use twofold_core::transform::{Transform, TransformError};

use crate::project::ModelSettings;

pub use cache::{CACHE_ENTRIES, ReportCache};
pub use choice::{
    CurvatureTest, ErrorBasis, ModelChoice, PureError, Selection, TERM_ALPHA, TermTest,
    default_choice, given_choice, lenth_selection,
};
pub use data::{
    ResponseData, core_transform, natural_ranges, plot_ranges, project_from_coded,
    project_transform, response_data,
};
pub use decision::{Choice, DecideOptions, Decision, ResponseOutcome, Setting, decide};
pub use next_runs::{NextRun, next_runs};
pub use next_runs_added::{half_words, semifold_halves, semifold_option, separate_option};
pub use quadratic::QuadraticReport;

/// Why (part of) a report could not be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum ReportError {
    /// The response index is past the end of the list.
    #[error("there is no response number {0}")]
    NoSuchResponse(usize),
    /// The run sheet is empty.
    #[error("the run sheet is empty: generate the runs from the design first")]
    NoRuns,
    /// The table of runs is not a valid design table.
    #[error(transparent)]
    Data(#[from] DataError),
    /// The response transform cannot be applied to the values.
    #[error(transparent)]
    Transform(#[from] TransformError),
    /// Effects cannot be estimated.
    #[error(transparent)]
    Effects(#[from] EffectsError),
    /// Lenth's method cannot be applied.
    #[error(transparent)]
    Lenth(#[from] LenthError),
    /// A model term label does not name factors of this project.
    #[error("model term: {0}")]
    Term(#[from] TermError),
    /// A model term is aliased with the mean in this design.
    #[error(
        "term `{term}` is aliased with the mean in this design (its column is constant), so it cannot be a model term"
    )]
    TermAliasedWithMean {
        /// The term.
        term: String,
    },
    /// The model cannot be fitted.
    #[error(transparent)]
    Fit(#[from] FitError),
    /// Plot cells cannot be computed.
    #[error(transparent)]
    Means(#[from] MeansError),
    /// The Box–Cox profile cannot be computed.
    #[error(transparent)]
    BoxCox(#[from] BoxCoxError),
    /// Natural-unit ranges are unusable.
    #[error(transparent)]
    Range(#[from] RangeError),
    /// Residuals cannot be put in run order.
    #[error(transparent)]
    RunOrder(#[from] RunOrderError),
    /// A prediction cannot be made.
    #[error(transparent)]
    Predict(#[from] PredictError),
    /// A natural-unit equation needs every factor numeric.
    #[error("factor “{0}” is categorical, so the equation exists in coded units only")]
    Categorical(String),
}

/// A cell whose text is not a number, for the warnings.
#[derive(Debug, Clone, PartialEq)]
pub struct BadCell {
    /// Run-order number of the run.
    pub run_order: u32,
    /// The text as typed.
    pub text: String,
    /// Why it is not a number.
    pub reason: String,
}

/// What a warning is about, so each pane shows the ones that concern it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum WarningKind {
    /// The data: cells that are not numbers.
    Data,
    /// The effect estimates: chains that missing runs leave inestimable.
    Effects,
    /// The fitted model: curvature, aliased or inestimable terms.
    Model,
}

/// A warning in plain words.
#[derive(Debug, Clone, PartialEq)]
pub struct Warning {
    /// What it is about.
    pub kind: WarningKind,
    /// The text.
    pub text: String,
}

/// Observed means of one pair of factors at its four corners.
#[derive(Debug, Clone, PartialEq)]
pub struct PairMeans {
    /// The two factors (0-based), `a < b`.
    pub factors: (usize, usize),
    /// `means[j][i]`: mean at level `i` of `a` and level `j` of `b` (0 = low, 1 = high).
    pub means: [[Option<f64>; 2]; 2],
}

/// What a report is for (the key of [`ReportCache`]).
#[derive(Debug, Clone, PartialEq)]
pub struct ReportKey {
    /// Project revision.
    pub revision: u64,
    /// Response index.
    pub response: usize,
    /// Model settings used.
    pub model: ModelSettings,
}

/// Everything known about one response (see the module documentation).
#[derive(Debug, Clone, PartialEq)]
pub struct Report {
    /// What this was built for.
    pub key: ReportKey,
    /// Revision of the project data analysed (as in `key`).
    pub revision: u64,
    /// Response position (as in `key`).
    pub response: usize,
    /// Response name (empty when there is no such response).
    pub response_name: String,
    /// Factors in the project.
    pub factor_count: usize,
    /// Whether the run sheet is out of date with the factors or design (the window warns).
    pub runs_outdated: bool,
    /// Runs in the sheet.
    pub total_runs: usize,
    /// Runs with a number and not excluded.
    pub used_runs: usize,
    /// Runs still without a value (and not excluded).
    pub missing_runs: usize,
    /// Runs without a number (empty or bad text), excluded or not.
    pub values_missing: usize,
    /// Runs excluded by the engineer.
    pub excluded_runs: usize,
    /// Cells with text that is not a number.
    pub bad_cells: Vec<BadCell>,
    /// The transform applied before analysis.
    pub transform: Transform,
    /// The core's tables (raw and transformed) with the run lists, or why there are none.
    pub data: Result<ResponseData, String>,
    /// The checked table of the used data (transformed), or why there is none.
    pub observations: Result<Observations, String>,
    /// Effects of every estimable chain, or why there are none.
    pub effects: Result<EffectTable, String>,
    /// Lenth's margins, or why they cannot be computed.
    pub lenth: Result<Lenth, String>,
    /// Lenth's verdict per effect (effect order; empty without Lenth).
    pub lenth_flags: Vec<LenthFlag>,
    /// Half-normal positions of the effects.
    pub half_normal: Vec<HalfNormalPoint>,
    /// Normal plot positions of the effects, most negative first.
    pub normal: Vec<NormalPoint>,
    /// Mean at − and + of every factor (analysis scale).
    pub main_means: Vec<MainEffectMeans>,
    /// Mean of the used centre points.
    pub centre_mean: Option<f64>,
    /// Observed means of every pair of factors.
    pub pairs: Vec<PairMeans>,
    /// The terms the engineer chose, as parsed (empty = none chosen).
    pub chosen_terms: Vec<Term>,
    /// The default choice (pure-error tests or Lenth's margins), or why there is none.
    pub suggested: Result<ModelChoice, String>,
    /// The model fitted: the engineer's terms, or the default choice when none are chosen.
    pub choice: Result<ModelChoice, String>,
    /// The pure error of the data, when runs are replicated or centre points repeated.
    pub pure_error: Option<PureError>,
    /// Which error the tests use.
    pub error_basis: ErrorBasis,
    /// The fitted model with its ANOVA, or why there is none.
    pub fit: Result<ModelFit, String>,
    /// The centre-point curvature test against [`Self::error_basis`]'s error.
    pub curvature: Option<CurvatureTest>,
    /// Residual diagnostics of the fit.
    pub diagnostics: Option<Diagnostics>,
    /// Run-order number of each table run (for residuals against run order).
    pub run_order: Vec<usize>,
    /// Residuals in the order the runs were made.
    pub in_run_order: Result<Vec<RunOrderPoint>, String>,
    /// Residuals on a normal probability plot.
    pub residual_normal_plot: Vec<NormalPlotPoint>,
    /// Model-based cells of every pair of factors (observed and predicted, 95 % intervals).
    pub interactions: Result<Vec<InteractionMeans>, String>,
    /// The Box–Cox profile of the raw response under the fitted model.
    pub box_cox: Result<BoxCox, String>,
    /// The equation in coded units.
    pub equation_coded: Option<Equation>,
    /// The equation in natural units, or why there is none.
    pub equation_natural: Result<Equation, String>,
    /// Each factor's (low, high) in natural units; categorical factors as (−1, +1).
    pub ranges: Vec<(f64, f64)>,
    /// Warnings in plain words.
    pub warnings: Vec<Warning>,
    /// The first typed error that stopped a step (data, effects, model choice or fit).
    pub stopped: Option<ReportError>,
    /// For a split-plot study (runs grouped into whole plots): the stratum of every effect and
    /// Lenth's margins of each stratum.
    pub strata: Option<Strata>,
    /// For a study with axial runs: the quadratic model from every run (the rest of the report
    /// is the two-level part's, see [`quadratic`]).
    pub quadratic: Option<QuadraticReport>,
}

impl Strata {
    /// The strata in words, one sentence each, as the window, the page and `analyze` write them:
    /// the whole plots, then each stratum's effects and its Lenth margins.
    pub fn sentences(&self, table: &EffectTable) -> Vec<String> {
        use twofold_core::splitplot::Stratum;
        let num = |x: f64| crate::numbers::fmt_num(x, 4);
        let mut out = vec![format!(
            "Split-plot study with {} whole plots: each stratum's effects are judged against their own Lenth margins (Loeppky & Sitter 2002).",
            self.whole_plots
        )];
        match &self.anova {
            Some(Ok(a)) => {
                let num = |x: f64| crate::numbers::fmt_num(x, 4);
                out.push(format!(
                    "Replicated whole plots: whole-plot error MS {} on {} df, subplot error MS {} on {} df.",
                    num(a.whole_plot_error.ms),
                    a.whole_plot_error.df,
                    num(a.subplot_error.ms),
                    a.subplot_error.df
                ));
                for t in &a.terms {
                    out.push(format!(
                        "{} ({}): F = {}, p = {}.",
                        t.term.label(),
                        match t.stratum {
                            Stratum::WholePlot => "against the whole-plot error",
                            Stratum::Subplot => "against the subplot error",
                        },
                        num(t.f),
                        t.p.map_or_else(|| "—".to_string(), |p| crate::numbers::fmt_sig(p, 3))
                    ));
                }
            }
            Some(Err(why)) => out.push(format!("No split-plot analysis of variance: {why}.")),
            None => {}
        }
        for (stratum, l) in &self.lenth {
            let terms: Vec<String> = table
                .effects
                .iter()
                .zip(&self.of_effect)
                .filter(|(_, st)| *st == stratum)
                .map(|(x, _)| x.term.label())
                .collect();
            let margins = match l {
                Ok(l) => format!("PSE {}, ME {}, SME {}", num(l.pse), num(l.me), num(l.sme)),
                Err(err) => format!("no margins: {err}"),
            };
            let shown = if terms.len() > 12 {
                format!("{}, … ({} in all)", terms[..12].join(", "), terms.len())
            } else {
                terms.join(", ")
            };
            out.push(format!(
                "{}: {shown} — {margins}.",
                match stratum {
                    Stratum::WholePlot => "Whole-plot effects",
                    Stratum::Subplot => "Subplot effects",
                }
            ));
        }
        out
    }
}

/// The strata of a split-plot study ([`twofold_core::splitplot`]).
#[derive(Debug, Clone, PartialEq)]
pub struct Strata {
    /// The stratum of each effect, in the order of the effect table.
    pub of_effect: Vec<twofold_core::splitplot::Stratum>,
    /// Lenth's margins of the whole-plot and the subplot effects, each from its own contrasts.
    pub lenth: Vec<(twofold_core::splitplot::Stratum, Result<Lenth, String>)>,
    /// Whole plots in the sheet.
    pub whole_plots: usize,
    /// The half-normal plot of each stratum, from its own effects alone (Loeppky & Sitter 2002:
    /// one plot per stratum, each read against its own Lenth margins).
    pub half_normal: Vec<(
        twofold_core::splitplot::Stratum,
        Vec<twofold_core::halfnormal::HalfNormalPoint>,
    )>,
    /// With replicated whole plots: the fitted terms tested against their stratum's error
    /// (Bisgaard 2000), or why not; `None` without replicated whole plots.
    pub anova: Option<Result<twofold_core::splitplot::SplitPlotAnova, String>>,
}

/// What the window says while the engineer has chosen no terms.
pub const NO_TERMS_CHOSEN: &str =
    "no terms chosen yet: click the largest effects in the effect bars or the half-normal plot";

impl Report {
    /// The warnings of the given kinds, in order.
    pub fn warnings_of<'a>(
        &'a self,
        kinds: &'a [WarningKind],
    ) -> impl Iterator<Item = &'a str> + 'a {
        self.warnings
            .iter()
            .filter(|w| kinds.contains(&w.kind))
            .map(|w| w.text.as_str())
    }

    /// Whether the engineer chose terms (rather than the default choice being fitted).
    pub fn terms_given(&self) -> bool {
        self.choice
            .as_ref()
            .is_ok_and(|c| c.selection == Selection::Given)
    }

    /// The ANOVA rows as every front end shows them: the fit's rows, except that the curvature
    /// row carries the report's curvature test ([`Self::curvature`]), which is made against pure
    /// error when the data carry it (Montgomery, *Design and Analysis of Experiments*, Example
    /// 6-6: a 2^2 with five centre points). Empty without a fit.
    pub fn anova_rows(&self) -> Vec<twofold_core::anova::AnovaRow> {
        let Ok(fit) = &self.fit else {
            return Vec::new();
        };
        fit.anova
            .iter()
            .map(|row| match (&row.source, &self.curvature) {
                (twofold_core::anova::Source::Curvature, Some(c)) => {
                    twofold_core::anova::AnovaRow {
                        f: c.f,
                        p: c.p,
                        ..*row
                    }
                }
                _ => *row,
            })
            .collect()
    }

    /// The fit of the engineer's terms, for the window: with none chosen it says so (and names
    /// the suggested terms) instead of showing the default choice's fit.
    pub fn chosen_fit(&self) -> Result<&ModelFit, String> {
        if self.terms_given() {
            return self.fit.as_ref().map_err(Clone::clone);
        }
        if let Err(why) = &self.effects {
            return Err(why.clone());
        }
        if !self.key.model.terms.is_empty() {
            // Terms were typed but could not be used: say why.
            if let Err(why) = &self.choice {
                return Err(why.clone());
            }
        }
        Err(match self.suggestion_words() {
            Some(s) => format!("{NO_TERMS_CHOSEN} ({s})"),
            None => NO_TERMS_CHOSEN.to_string(),
        })
    }

    /// The default choice's terms: the window's suggestion, never applied without the engineer.
    pub fn suggested_terms(&self) -> Vec<Term> {
        self.suggested
            .as_ref()
            .map(|c| c.terms.clone())
            .unwrap_or_default()
    }

    /// "suggested: A, B, AB (how chosen)", or `None` without a suggestion.
    pub fn suggestion_words(&self) -> Option<String> {
        let c = self.suggested.as_ref().ok()?;
        let list: Vec<String> = c.terms.iter().map(|t| t.label()).collect();
        Some(format!(
            "suggested: {} ({})",
            if list.is_empty() {
                "mean only".to_string()
            } else {
                list.join(", ")
            },
            c.selection.words()
        ))
    }

    /// Whether `term` is in the engineer's chosen model.
    pub fn in_model(&self, term: Term) -> bool {
        self.chosen_terms.contains(&term)
    }

    /// Whether `term` is fitted in the engineer's model (chosen, or added for hierarchy).
    pub fn fitted(&self, term: Term) -> bool {
        self.terms_given() && self.fit.as_ref().is_ok_and(|f| f.terms.contains(&term))
    }

    /// Prediction at a coded point with intervals at `confidence` (on the analysis scale; use
    /// [`Prediction::back_transformed`] with [`Report::transform`] for the measured scale).
    pub fn predict(&self, coded: &[f64], confidence: f64) -> Result<Prediction, String> {
        let fit = self.fit.as_ref().map_err(Clone::clone)?;
        predict(fit, coded, confidence).map_err(|e| e.to_string())
    }

    /// Best factor settings for `goal` (on the measured scale) at 95 % confidence.
    pub fn best_settings(&self, goal: Goal) -> Result<Optimum, String> {
        let fit = self.fit.as_ref().map_err(Clone::clone)?;
        best_settings(fit, goal, &self.transform, DEFAULT_CONFIDENCE).map_err(|e| e.to_string())
    }
}
