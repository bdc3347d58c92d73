//! What the summary page shows, as plain data.
//!
//! The page is one renderer of the numbers the app shows: [`super::build`] fills a
//! [`SummaryInput`] from the project and the analysis cache, and [`super::summary`] draws it. The
//! page never computes a statistic itself; it only formats and places what it is given, so what
//! is printed cannot drift from what is on screen.

use serde::{Deserialize, Serialize};

/// Everything on the summary: the project's facts once, then one section per response.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct SummaryInput {
    /// Project title.
    pub title: String,
    /// Date printed in the header, as given (from the project or an option, never the clock,
    /// so an unchanged project gives an identical page). Empty: no date is printed.
    pub date: String,
    /// The engineer's description of the experiment.
    pub description: String,
    /// Factors in letter order.
    pub factors: Vec<FactorRow>,
    /// The design as run.
    pub design: DesignFacts,
    /// The one-factor-at-a-time comparison.
    pub ofat: Option<OfatFacts>,
    /// The responses summarised, in project order (one, or all of them); each gets its page.
    pub responses: Vec<ResponseSummary>,
    /// Warnings about the project and its design (not about one response), one sentence each.
    pub warnings: Vec<String>,
    /// The settings chosen for every response's goal at once, when the project has goals.
    #[serde(default)]
    pub decision: Option<DecisionFacts>,
    /// Reproducibility facts for the footer.
    pub footer: Footer,
}

/// What the summary shows of one response: every number comes from that response's report.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct ResponseSummary {
    /// The response this section analyses.
    pub response: ResponseFacts,
    /// Effects, largest magnitude first.
    pub effects: Vec<EffectRow>,
    /// Lenth's pseudo standard error and decision limits, when the effects allow them.
    pub lenth: Option<LenthFacts>,
    /// Points of the half-normal plot.
    pub half_normal: Vec<HalfNormalPoint>,
    /// A split-plot study: one half-normal plot per stratum (title, points, that stratum's own
    /// Lenth facts), drawn instead of the pooled one.
    #[serde(default)]
    pub strata_half_normal: Vec<(String, Vec<HalfNormalPoint>, Option<LenthFacts>)>,
    /// Interaction plots, strongest first.
    pub interactions: Vec<InteractionPanel>,
    /// Sentence under the interaction plots saying which were chosen; empty for the default.
    pub interaction_note: String,
    /// ANOVA of the chosen model, when one is fitted.
    pub anova: Option<AnovaTable>,
    /// The fitted equation in natural units.
    pub equation: Option<Equation>,
    /// The best settings found within the design's range.
    pub best: Option<BestSettings>,
    /// Warnings about this response's analysis as the app shows them, one sentence each.
    pub warnings: Vec<String>,
}

fn default_true() -> bool {
    true
}

/// The analysed response.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct ResponseFacts {
    /// Name ("Yield").
    pub name: String,
    /// Unit ("%"); may be empty.
    pub unit: String,
    /// Transform applied before analysis in words ("natural log"); empty for none.
    pub transform: String,
    /// Runs that entered the analysis.
    pub runs_used: usize,
    /// Runs in the run sheet.
    pub runs_total: usize,
}

/// A factor level in natural units.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum LevelValue {
    /// A number in the factor's unit.
    Number(f64),
    /// A named setting of a categorical factor.
    Label(String),
}

impl LevelValue {
    /// The level as printed (numbers in their shortest exact form).
    pub fn text(&self) -> String {
        match self {
            LevelValue::Number(x) => crate::numbers::level(*x),
            LevelValue::Label(s) => s.clone(),
        }
    }
}

/// One factor row.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FactorRow {
    /// Letter (A, B, ... without I).
    pub letter: char,
    /// Name.
    pub name: String,
    /// Unit; may be empty.
    pub unit: String,
    /// Setting coded −1.
    pub low: LevelValue,
    /// Setting coded +1.
    pub high: LevelValue,
}

/// The design as run.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct DesignFacts {
    /// Number of factors k.
    pub factors: usize,
    /// Number of generators p (0 for a full factorial).
    pub generators_count: usize,
    /// Runs of one replicate without centre points.
    pub base_runs: usize,
    /// Centre points in the whole run sheet.
    pub centre_points: usize,
    /// Complete copies of the design.
    pub replicates: usize,
    /// Blocks.
    pub blocks: usize,
    /// Runs in the run sheet.
    pub total_runs: usize,
    /// Generators as written (`E = ABCD`).
    pub generators: Vec<String>,
    /// Block generators as written; empty when unblocked.
    pub block_generators: Vec<String>,
    /// Resolution (None for a full factorial, where no main effect or interaction is aliased).
    pub resolution: Option<u32>,
    /// Alias chains led by a main effect (`A = BCE = BDF`), each chain once, in letter order;
    /// empty when no main effect has an alias of up to three letters.
    pub main_effect_chains: Vec<String>,
    /// Alias chains led by a two-factor interaction (`AB = CE = DF = GH`), each once.
    pub interaction_chains: Vec<String>,
    /// How many of those chains hold two or more two-factor interactions.
    pub tangled_chains: usize,
    /// Seed of the run-order randomisation; `None` when runs are in standard order.
    pub seed: Option<u64>,
    /// Runs of a Plackett–Burman screening design (`None` for a regular design).
    #[serde(default)]
    pub screening_runs: Option<usize>,
    /// What the design can see, in words ("an effect of 3.8 is found with probability 0.8 …"),
    /// when a process standard deviation was given.
    #[serde(default)]
    pub detectable: Option<String>,
    /// The follow-up block, in words (a fold-over, half of one, or runs added to separate
    /// interactions, with what the combined runs estimate); `None` without one.
    #[serde(default)]
    pub follow_up: Option<String>,
    /// Whether the follow-up block makes the runs an irregular design (no alias chains apply).
    #[serde(default)]
    pub irregular: bool,
    /// The runs of the whole sheet in words, block by block (the design step's line, from
    /// [`crate::project::SheetRuns`]); `None` when the sheet does not follow the design settings,
    /// and the page then states its parts from the runs themselves.
    #[serde(default)]
    pub runs_in_words: Option<String>,
}

/// One effect.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EffectRow {
    /// Label of the estimated term (`A`, `BD`).
    pub term: String,
    /// Its aliases of one or two letters, signed (`CE`, `-DF`); the longer ones are in the alias
    /// chains of the design.
    #[serde(default)]
    pub aliases: Vec<String>,
    /// Effect (high minus low average) in response units.
    pub effect: f64,
    /// Whether the term is in the chosen model.
    pub in_model: bool,
}

/// Lenth's method.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct LenthFacts {
    /// Pseudo standard error.
    pub pse: f64,
    /// Margin of error (individual limit).
    pub me: f64,
    /// Simultaneous margin of error.
    pub sme: f64,
    /// Significance level of both limits.
    pub alpha: f64,
    /// Degrees of freedom of the t quantiles (m / 3).
    pub df: f64,
}

/// One point of the half-normal plot.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct HalfNormalPoint {
    /// Term label.
    pub term: String,
    /// |effect|.
    pub abs_effect: f64,
    /// Whether the effect is positive (raises the response); drawn as the marker's shape.
    #[serde(default = "default_true")]
    pub positive: bool,
    /// Half-normal quantile of the point's rank.
    pub quantile: f64,
    /// Whether the term is in the chosen model.
    pub in_model: bool,
}

/// An interaction plot of two factors: mean response at the four corners.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct InteractionPanel {
    /// The interaction (`AB`).
    pub term: String,
    /// Factor on the horizontal axis.
    pub x_factor: String,
    /// Its low and high settings as printed.
    pub x_levels: [String; 2],
    /// Factor drawn as two lines.
    pub trace_factor: String,
    /// Its low and high settings as printed.
    pub trace_levels: [String; 2],
    /// `means[t][x]`: mean response with the trace factor at `t` and the x factor at `x`
    /// (0 = low, 1 = high); `None` where no run was measured.
    pub means: [[Option<f64>; 2]; 2],
}

/// One ANOVA row.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AnovaRow {
    /// Source of variation (`Model`, `A`, `Residual`, `Lack of fit`, ...).
    pub source: String,
    /// Degrees of freedom.
    pub df: u32,
    /// Sum of squares.
    pub ss: f64,
    /// Mean square.
    pub ms: Option<f64>,
    /// F ratio.
    pub f: Option<f64>,
    /// p-value.
    pub p: Option<f64>,
    /// Whether the row is a total or subtotal (printed in bold).
    pub emphasis: bool,
}

/// The ANOVA of the chosen model.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct AnovaTable {
    /// Rows in print order.
    pub rows: Vec<AnovaRow>,
    /// R².
    pub r_squared: Option<f64>,
    /// Adjusted R².
    pub adj_r_squared: Option<f64>,
    /// Predicted R² (from PRESS).
    pub pred_r_squared: Option<f64>,
    /// Residual standard deviation.
    pub std_dev: Option<f64>,
    /// How the terms were chosen and which error the tests use, in one sentence.
    #[serde(default)]
    pub tests_note: String,
}

/// The fitted equation, in natural units where every factor is numeric, else in coded units.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct Equation {
    /// The equation written out exactly as the app shows it
    /// (`Yield = 52.3 + 0.125*Temperature - 3.2*Time*Speed`).
    pub text: String,
    /// Note printed under the equation (e.g. how categorical factors are coded); may be empty.
    pub note: String,
    /// Whether the equation is in coded units (−1 to +1) because it has none in natural units.
    #[serde(default)]
    pub coded: bool,
}

/// The settings chosen for every goal at once (the engine's decision).
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct DecisionFacts {
    /// Each goal in words: (response or "spread of …", goal).
    pub goals: Vec<(String, String)>,
    /// Noise factors with their standard deviation in use, in words.
    pub noise: Vec<String>,
    /// Factor name and setting, in letter order.
    pub settings: Vec<(String, String)>,
    /// Overall desirability D.
    pub overall: f64,
    /// Every response at these settings.
    pub responses: Vec<DecisionResponse>,
    /// What holds D down, and notes (curvature, safe ranges), one sentence each.
    pub binding: Vec<String>,
}

/// One response at the chosen settings.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct DecisionResponse {
    /// Name.
    pub name: String,
    /// Unit.
    pub unit: String,
    /// Predicted mean, measured scale.
    pub predicted: Option<f64>,
    /// 95 % prediction interval of one new run.
    pub interval: Option<(f64, f64)>,
    /// Desirability of the mean (`None`: no goal).
    pub desirability: Option<f64>,
    /// Spread transmitted by the noise factors (`None`: none).
    pub transmitted_sd: Option<f64>,
}

/// The best settings found.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct BestSettings {
    /// What was sought ("maximise Yield").
    pub goal: String,
    /// Factor name and setting, in letter order.
    pub settings: Vec<(String, String)>,
    /// Predicted response at these settings on the measured scale; `None` when the
    /// prediction has no value there (e.g. a negative square root).
    pub predicted: Option<f64>,
    /// Interval around the prediction (`(low, high)`) and its description ("95 % prediction
    /// interval"), when available.
    pub interval: Option<(f64, f64, String)>,
}

/// The one-factor-at-a-time comparison.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct OfatFacts {
    /// Runs a one-factor-at-a-time study would need for the same precision of main effects.
    pub ofat_runs: usize,
    /// Runs of this design.
    pub design_runs: usize,
    /// One sentence on how the count was reached.
    pub explanation: String,
}

/// Reproducibility footer.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct Footer {
    /// Program name and version.
    pub tool: String,
    /// Seed of the run order; `None` for standard order.
    pub seed: Option<u64>,
    /// SHA-256 of the project's data, as lowercase hex.
    pub data_hash: String,
}

impl EffectRow {
    /// The term with its short aliases, as the effect table prints it (`AB=CE=-DF`).
    pub fn label(&self) -> String {
        std::iter::once(self.term.as_str())
            .chain(self.aliases.iter().map(String::as_str))
            .collect::<Vec<_>>()
            .join("=")
    }

    /// The label followed by the effect's sign, `+` or `−` (`AB=CE −`, `C +`): with the
    /// marker's shape, the one way the page shows a sign.
    pub fn label_with_sign(&self) -> String {
        match sign_word(self.effect) {
            "" => self.label(),
            s => format!("{} {s}", self.label()),
        }
    }
}

/// `+` for an effect that raises the response, `−` (minus sign) for one that lowers it, nothing
/// for a value that is not a number.
pub fn sign_word(effect: f64) -> &'static str {
    if !effect.is_finite() {
        ""
    } else if effect >= 0.0 {
        "+"
    } else {
        "\u{2212}"
    }
}
