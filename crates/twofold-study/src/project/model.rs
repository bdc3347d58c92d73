//! The project as plain data: what the engineer typed and chose, nothing computed.
//!
//! Everything here is `serde` data written to the project file. Derived things (parsed cell
//! values, natural-unit settings, validation problems) are computed by methods on demand and never
//! stored, so the file cannot disagree with itself.

use serde::{Deserialize, Serialize};

use super::cell::Cell;
use super::goals::{PowerSettings, ResponseGoal};

/// Version of the project file format written by this build. Older versions are migrated on load
/// (see [`super::migrate`]); newer ones are refused with a clear message.
pub const FORMAT_VERSION: u32 = 1;

/// Fewest factors a project may have.
pub const MIN_FACTORS: usize = 2;

/// Most factors a project may have (the letters A..Z without I).
pub const MAX_FACTORS: usize = twofold_core::term::MAX_FACTORS;

/// One experiment: factors, the chosen design, responses, the run sheet and the analysis choices.
///
/// Invariants kept by [`Project::apply`](super::edit) and checked on load
/// ([`Project::check_structure`]): every run has one coded setting per factor and one cell per
/// response; every response has its own [`ModelSettings`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Project {
    /// File format version; [`FORMAT_VERSION`] for a project made by this build.
    pub format_version: u32,
    /// Short title shown in the window and on reports.
    pub name: String,
    /// Free text: purpose, material lot, anything the engineer wants to keep with the data.
    #[serde(default)]
    pub description: String,
    /// The factors in letter order (the first is A, the second B, ... skipping I).
    pub factors: Vec<Factor>,
    /// What the engineer chose for the design.
    pub design: DesignSettings,
    /// Measured quantities, each with its own analysis choices.
    #[serde(default)]
    pub responses: Vec<ResponseDef>,
    /// The run sheet, in standard order of generation (display order is the engineer's choice).
    #[serde(default)]
    pub runs: Vec<RunRecord>,
    /// `true` when factors or design settings changed after the runs were generated, so the run
    /// sheet no longer follows from them; cleared by regenerating the runs.
    #[serde(default)]
    pub runs_outdated: bool,
    /// What the power of a design rests on (process σ, α, power, an effect size).
    #[serde(default, skip_serializing_if = "PowerSettings::is_default")]
    pub power: PowerSettings,
}

/// One factor: a name, a unit and its two levels.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Factor {
    /// Name as shown to the engineer ("Cure temperature").
    pub name: String,
    /// Unit of the levels ("°C"); empty for categorical factors or dimensionless numbers.
    #[serde(default)]
    pub unit: String,
    /// Numeric or categorical, with its levels.
    pub kind: FactorKind,
    /// Range the process is known to tolerate, `(lowest, highest)`, numeric factors only. A level
    /// outside it is a warning, never an error: the engineer may have good reason.
    #[serde(default)]
    pub safe_range: Option<(f64, f64)>,
    /// `Some(σ)` for a noise factor: varied in the study but not controlled in use, where it
    /// varies about its centre with standard deviation σ in coded units (1 = half the tested
    /// range). `None` for a control factor.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub noise_sd: Option<f64>,
    /// Slow or costly to reset (an oven temperature, a bath): the run sheet groups the runs into
    /// whole plots in which it stays set.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub hard_to_change: bool,
}

/// Whether a factor has numeric levels (and so a centre) or two named settings.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum FactorKind {
    /// A quantity set at two values; the centre is their midpoint.
    Numeric {
        /// Value coded −1.
        low: f64,
        /// Value coded +1.
        high: f64,
    },
    /// Two named settings ("supplier X" / "supplier Y"); no centre exists.
    Categorical {
        /// Setting coded −1.
        low_label: String,
        /// Setting coded +1.
        high_label: String,
    },
}

/// A factor setting in natural units, as the engineer sets it at the bench.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Level<'a> {
    /// A numeric value in the factor's unit.
    Number(f64),
    /// A named setting of a categorical factor.
    Label(&'a str),
}

impl Factor {
    /// A numeric factor without a safe range.
    pub fn numeric(name: &str, unit: &str, low: f64, high: f64) -> Factor {
        Factor {
            name: name.to_string(),
            unit: unit.to_string(),
            kind: FactorKind::Numeric { low, high },
            safe_range: None,
            noise_sd: None,
            hard_to_change: false,
        }
    }

    /// A categorical factor.
    pub fn categorical(name: &str, low_label: &str, high_label: &str) -> Factor {
        Factor {
            name: name.to_string(),
            unit: String::new(),
            kind: FactorKind::Categorical {
                low_label: low_label.to_string(),
                high_label: high_label.to_string(),
            },
            safe_range: None,
            noise_sd: None,
            hard_to_change: false,
        }
    }

    /// Whether the factor is numeric (and so may take a centre setting).
    pub fn is_numeric(&self) -> bool {
        matches!(self.kind, FactorKind::Numeric { .. })
    }

    /// The natural setting for a coded level: −1 → low, +1 → high, 0 → midpoint of a numeric
    /// factor. `None` for 0 on a categorical factor and for any other code.
    pub fn natural(&self, coded: i8) -> Option<Level<'_>> {
        match (&self.kind, coded) {
            (FactorKind::Numeric { low, .. }, -1) => Some(Level::Number(*low)),
            (FactorKind::Numeric { high, .. }, 1) => Some(Level::Number(*high)),
            (FactorKind::Numeric { low, high }, 0) => Some(Level::Number(0.5 * (low + high))),
            (FactorKind::Categorical { low_label, .. }, -1) => Some(Level::Label(low_label)),
            (FactorKind::Categorical { high_label, .. }, 1) => Some(Level::Label(high_label)),
            _ => None,
        }
    }
}

impl Project {
    /// The natural setting of every factor in run `run` (position in [`Project::runs`]), as set
    /// at the bench; `None` for a run past the end, and per factor where the code has no setting
    /// (a centre code on a categorical factor).
    pub fn natural_settings(&self, run: usize) -> Option<Vec<Option<Level<'_>>>> {
        let record = self.runs.get(run)?;
        Some(
            self.factors
                .iter()
                .zip(&record.levels)
                .map(|(f, &c)| f.natural(c))
                .collect(),
        )
    }
}

/// What the engineer chose for the design; the run sheet is generated from it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DesignSettings {
    /// Generators of the fraction, e.g. `"E=ABCD"` or `"F=-ABC"`. Empty: a full factorial when
    /// `base_runs` is `None` (or 2^k), otherwise the fraction of `base_runs` runs found by the
    /// minimum-aberration search.
    #[serde(default)]
    pub generators: Vec<String>,
    /// Runs of one replicate without centre points (a power of two), or `None` for 2^k.
    #[serde(default)]
    pub base_runs: Option<u32>,
    /// Centre points added to each block; only possible when every factor is numeric.
    #[serde(default)]
    pub centre_points_per_block: u32,
    /// Complete copies of the design (1 = no replication).
    pub replicates: u32,
    /// How the runs are split into blocks.
    #[serde(default)]
    pub blocks: BlockChoice,
    /// Whether each replicate runs as its own set of blocks (block numbers continue across
    /// replicates), e.g. one replicate per day.
    #[serde(default)]
    pub replicates_as_blocks: bool,
    /// Whether the run order is randomised (from `seed`) or follows the standard order.
    #[serde(default = "default_true")]
    pub randomize: bool,
    /// Seed of the run-order randomisation, kept so the same sheet can be regenerated.
    pub seed: u64,
    /// A fold-over added as a follow-up: the fraction's runs are block 1 and the folded runs
    /// block 2 (see [`twofold_core::plan::build_fold_over_plan`]). `None` in files written before
    /// follow-ups existed.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fold: Option<twofold_core::foldover::FoldKind>,
    /// Axial runs added as a follow-up (a face-centred central composite design, see
    /// [`super::axial`]): the last block. `None` in files written before axial runs existed.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub axial: Option<super::axial::AxialRuns>,
    /// A follow-up block that is not a regular fraction (half a fold-over, or runs chosen to
    /// separate interactions): block 2 after the fraction's runs. `None` in files written
    /// before it existed.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub added: Option<super::added_block::AddedBlock>,
}

fn default_true() -> bool {
    true
}

impl DesignSettings {
    /// The run size when the settings name a Plackett–Burman screening design (a run size of
    /// [`twofold_core::screening::SCREENING_RUNS`]); `None` for a regular design.
    pub fn screening_runs(&self) -> Option<usize> {
        self.base_runs
            .map(|n| n as usize)
            .filter(|n| twofold_core::screening::SCREENING_RUNS.contains(n))
    }

    /// Whether the sheet already holds a follow-up block after the fraction's runs: a fold-over
    /// ([`Self::fold`]) or another added block ([`Self::added`]). Either one is block 2, laid
    /// out without other blocking, and a second one is not offered.
    pub fn has_follow_up_block(&self) -> bool {
        self.fold.is_some() || self.added.is_some()
    }
}

impl Default for DesignSettings {
    /// A full factorial, one replicate, no blocks, no centre points, randomised from seed 1.
    fn default() -> Self {
        DesignSettings {
            generators: Vec::new(),
            base_runs: None,
            centre_points_per_block: 0,
            replicates: 1,
            blocks: BlockChoice::default(),
            replicates_as_blocks: false,
            randomize: true,
            seed: 1,
            fold: None,
            axial: None,
            added: None,
        }
    }
}

/// How the runs are split into blocks.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum BlockChoice {
    /// This many blocks (a power of two; 1 = unblocked), the block generators chosen by the
    /// program.
    Count(u32),
    /// Block generators given by the engineer, e.g. `["ABC"]` for two blocks.
    Generators(Vec<String>),
}

impl Default for BlockChoice {
    /// Unblocked.
    fn default() -> Self {
        BlockChoice::Count(1)
    }
}

/// A measured quantity and the analysis chosen for it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ResponseDef {
    /// Name ("Gloss at 60°").
    pub name: String,
    /// Unit ("GU"); may be empty.
    #[serde(default)]
    pub unit: String,
    /// Model terms, hierarchy and transform chosen for this response.
    #[serde(default)]
    pub model: ModelSettings,
    /// What the response should do when settings are chosen.
    #[serde(default, skip_serializing_if = "ResponseGoal::is_ignored")]
    pub goal: ResponseGoal,
    /// What the spread transmitted by the noise factors should do.
    #[serde(default, skip_serializing_if = "ResponseGoal::is_ignored")]
    pub spread_goal: ResponseGoal,
}

impl ResponseDef {
    /// A response with no model chosen yet.
    pub fn new(name: &str, unit: &str) -> ResponseDef {
        ResponseDef {
            name: name.to_string(),
            unit: unit.to_string(),
            model: ModelSettings::default(),
            goal: ResponseGoal::default(),
            spread_goal: ResponseGoal::default(),
        }
    }
}

/// The analysis choices for one response.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModelSettings {
    /// Terms in the model, as labels in the trade's order (`"A"`, `"BD"`); empty = none chosen yet.
    #[serde(default)]
    pub terms: Vec<String>,
    /// Whether the fit adds the lower-order parents of every chosen interaction.
    #[serde(default = "default_true")]
    pub hierarchical: bool,
    /// Transform applied to the response before analysis.
    #[serde(default)]
    pub transform: ResponseTransform,
}

impl Default for ModelSettings {
    /// No terms, hierarchical, untransformed.
    fn default() -> Self {
        ModelSettings {
            terms: Vec::new(),
            hierarchical: true,
            transform: ResponseTransform::None,
        }
    }
}

/// Transform of the response before analysis.
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize, Deserialize)]
pub enum ResponseTransform {
    /// The response as measured (written `AsMeasured` in the file).
    #[default]
    #[serde(rename = "AsMeasured")]
    None,
    /// Natural logarithm (values must be positive).
    Ln,
    /// Base-10 logarithm (values must be positive).
    Log10,
    /// Square root (values must not be negative).
    Sqrt,
    /// 1/y (values must not be zero).
    Reciprocal,
    /// y^λ, or ln y for λ = 0 (the Box–Cox family without its scaling).
    Power {
        /// The exponent λ.
        lambda: f64,
    },
}

impl ResponseTransform {
    /// The transforms offered by name, in the order a chooser lists them.
    pub const NAMED: [ResponseTransform; 5] = [
        ResponseTransform::None,
        ResponseTransform::Ln,
        ResponseTransform::Log10,
        ResponseTransform::Sqrt,
        ResponseTransform::Reciprocal,
    ];

    /// The transform in words, as the window and the page write it (`natural log`, `power 0.25`).
    pub fn words(self) -> String {
        match self {
            ResponseTransform::None => "none".to_string(),
            ResponseTransform::Ln => "natural log".to_string(),
            ResponseTransform::Log10 => "log10".to_string(),
            ResponseTransform::Sqrt => "square root".to_string(),
            ResponseTransform::Reciprocal => "1 / y".to_string(),
            ResponseTransform::Power { lambda } => {
                format!("power {}", crate::numbers::fmt_num(lambda, 4))
            }
        }
    }

    /// The analysed response named after the measured one: `Yield`, or `natural log(Yield)`.
    pub fn label(self, name: &str) -> String {
        match self {
            ResponseTransform::None => name.to_string(),
            other => format!("{}({name})", other.words()),
        }
    }
}

/// One row of the run sheet.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RunRecord {
    /// Position in the standard order of the design (1-based).
    pub std_order: u32,
    /// Position in the order the runs are carried out (1-based).
    pub run_order: u32,
    /// Block label (1-based).
    pub block: u32,
    /// Whether this is a centre point.
    pub centre: bool,
    /// Replicate number (1-based).
    pub replicate: u32,
    /// Coded setting of each factor: −1, 0 (centre) or +1.
    pub levels: Vec<i8>,
    /// One cell per response, as typed.
    pub values: Vec<Cell>,
    /// Whether the run is still to do, done, or excluded from the analysis.
    #[serde(default)]
    pub status: RunStatus,
    /// The engineer's note on the run ("nozzle clogged halfway").
    #[serde(default)]
    pub note: String,
    /// When a value was last entered, as ISO-8601 text supplied by the caller.
    #[serde(default)]
    pub entered_at: Option<String>,
    /// Whole plot (1-based) of a split-plot study: the runs during which the hard-to-change
    /// factors stayed set; `None` when the runs were not grouped.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub whole_plot: Option<u32>,
}

/// The state of a run.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub enum RunStatus {
    /// Not carried out yet.
    #[default]
    ToDo,
    /// Carried out.
    Done,
    /// Kept in the sheet but left out of the analysis.
    Excluded {
        /// Why, in the engineer's words.
        reason: String,
    },
}

impl RunStatus {
    /// Whether the run is left out of the analysis.
    pub fn is_excluded(&self) -> bool {
        matches!(self, RunStatus::Excluded { .. })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn coded_levels_to_natural_settings() {
        let t = Factor::numeric("Temperature", "°C", 160.0, 200.0);
        assert_eq!(t.natural(-1), Some(Level::Number(160.0)));
        assert_eq!(t.natural(1), Some(Level::Number(200.0)));
        assert_eq!(t.natural(0), Some(Level::Number(180.0)));
        assert_eq!(t.natural(2), None);
        let s = Factor::categorical("Supplier", "North", "South");
        assert_eq!(s.natural(-1), Some(Level::Label("North")));
        assert_eq!(s.natural(1), Some(Level::Label("South")));
        assert_eq!(s.natural(0), None);
        let mut p = Project::new("t");
        p.factors = vec![t, s];
        p.runs.push(RunRecord {
            std_order: 1,
            run_order: 1,
            block: 1,
            centre: false,
            replicate: 1,
            levels: vec![1, -1],
            values: vec![],
            status: RunStatus::ToDo,
            note: String::new(),
            entered_at: None,
            whole_plot: None,
        });
        assert_eq!(
            p.natural_settings(0),
            Some(vec![
                Some(Level::Number(200.0)),
                Some(Level::Label("North"))
            ])
        );
        assert_eq!(p.natural_settings(1), None);
    }
}
