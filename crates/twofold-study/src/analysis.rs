//! The analysis cache: the core's results for one response of the current project, computed once
//! per change of the data and shared by every pane that shows them.
//!
//! # From the project to the core
//! [`response_data`] turns the run sheet into [`Observations`]: one row per run in the sheet's
//! order, coded settings as numbers, the run's block, the cell read as a number ([`CellValue`]:
//! empty or bad text become missing values, and bad text is listed with its reason so the window
//! can say why a run is left out), and excluded runs marked excluded. The response transform is
//! applied before anything is estimated, so effects, model and diagnostics are all on the
//! analysis scale; Box–Cox works on the raw values.
//!
//! # What is computed
//! For every response: effects per alias chain, Lenth's margins, half-normal and normal plot
//! positions, main-effect means. When model terms are chosen: the fit with its ANOVA, the
//! equations in coded and natural units, residual diagnostics (in run order and on a normal
//! plot), interaction cells of every pair of factors, and the Box–Cox profile. Predictions and
//! best settings are cheap and computed on request from the stored fit.
//!
//! # Keys
//! An entry is keyed on the project's revision (see [`crate::project::History`]), the response
//! index and the model settings, so an edit, an undo or another model choice gives a fresh
//! entry while going back to an earlier state reuses the old one. A few entries are kept, most
//! recent first.

use std::sync::Arc;

use twofold_core::anova::{Equation, FitError, ModelFit, ModelSpec, RangeError, fit_model};
use twofold_core::boxcox::{BoxCox, BoxCoxError, box_cox};
use twofold_core::data::{DataError, Observations};
use twofold_core::diagnostics::{
    Diagnostics, NormalPlotPoint, RunOrderError, RunOrderPoint, diagnostics,
};
use twofold_core::effects::{EffectTable, EffectsError, estimate_effects};
use twofold_core::halfnormal::{HalfNormalPoint, NormalPoint, half_normal, normal_probability};
use twofold_core::lenth::{Lenth, LenthError, LenthFlag, Significance, lenth_effects};
use twofold_core::means::{
    InteractionMeans, MainEffectMeans, MeansError, interaction_means, main_effect_means,
};
use twofold_core::predict::{
    DEFAULT_CONFIDENCE, Goal, Optimum, PredictError, Prediction, best_settings, predict,
};
use twofold_core::term::{Term, TermError};
use twofold_core::transform::{Transform, TransformError};

use crate::project::{CellValue, FactorKind, ModelSettings, Project, ResponseTransform};

/// Entries kept by [`AnalysisCache`] (a few responses and a few undo steps back).
pub const CACHE_ENTRIES: usize = 8;

/// Why (part of) an analysis could not be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum AnalysisError {
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
    /// No model terms are chosen yet.
    #[error("no model terms are chosen yet")]
    NoModel,
}

/// The response of one project turned into the core's table.
#[derive(Debug, Clone, PartialEq)]
pub struct ResponseData {
    /// The table as measured (row `i` is `project.runs[i]`).
    pub raw: Observations,
    /// The table after the response transform (what effects and model use).
    pub analysed: Observations,
    /// The core's transform.
    pub transform: Transform,
    /// Runs (0-based positions in the sheet) whose cell is empty.
    pub missing: Vec<usize>,
    /// Runs whose cell holds text that is not a number, with the reason.
    pub bad: Vec<(usize, String)>,
    /// Runs excluded by the engineer.
    pub excluded: Vec<usize>,
    /// Runs that enter the analysis (a number, not excluded).
    pub used: Vec<usize>,
}

/// The core transform for the project's choice. A power of 0 is the logarithm (the limit of the
/// Box–Cox family).
pub fn core_transform(t: ResponseTransform) -> Transform {
    match t {
        ResponseTransform::None => Transform::None,
        ResponseTransform::Ln => Transform::Ln,
        ResponseTransform::Log10 => Transform::Log10,
        ResponseTransform::Sqrt => Transform::Sqrt,
        ResponseTransform::Reciprocal => Transform::Inverse,
        ResponseTransform::Power { lambda: 0.0 } => Transform::Ln,
        ResponseTransform::Power { lambda } => Transform::Power(lambda),
    }
}

/// Builds the core's table for response `response` (see the module documentation).
pub fn response_data(
    project: &Project,
    response: usize,
    transform: ResponseTransform,
) -> Result<ResponseData, AnalysisError> {
    if response >= project.responses.len() {
        return Err(AnalysisError::NoSuchResponse(response));
    }
    if project.runs.is_empty() {
        return Err(AnalysisError::NoRuns);
    }
    let n = project.runs.len();
    let mut levels = Vec::with_capacity(n);
    let mut blocks = Vec::with_capacity(n);
    let mut values = Vec::with_capacity(n);
    let mut excluded_flags = Vec::with_capacity(n);
    let (mut missing, mut bad, mut excluded, mut used) = (vec![], vec![], vec![], vec![]);
    for (i, run) in project.runs.iter().enumerate() {
        levels.push(run.levels.iter().map(|&v| f64::from(v)).collect());
        blocks.push(run.block);
        let is_excluded = run.status.is_excluded();
        excluded_flags.push(is_excluded);
        if is_excluded {
            excluded.push(i);
        }
        let value = match run.values.get(response).map(|c| c.value()) {
            Some(CellValue::Number(x)) => Some(x),
            Some(CellValue::Bad { reason }) => {
                bad.push((i, reason));
                None
            }
            Some(CellValue::Empty) | None => {
                missing.push(i);
                None
            }
        };
        if value.is_some() && !is_excluded {
            used.push(i);
        }
        values.push(value);
    }
    let raw = Observations::new(
        project.factors.len(),
        levels,
        blocks,
        values,
        excluded_flags,
    )?;
    let transform = core_transform(transform);
    let analysed = raw.with_response(transform.apply_column(raw.response())?)?;
    Ok(ResponseData {
        raw,
        analysed,
        transform,
        missing,
        bad,
        excluded,
        used,
    })
}

/// Effects and everything drawn from them.
#[derive(Debug, Clone, PartialEq)]
pub struct EffectsResults {
    /// One estimate per alias chain.
    pub table: EffectTable,
    /// Lenth's margins and a verdict per effect (needs at least three effects).
    pub lenth: Result<(Lenth, Vec<LenthFlag>), AnalysisError>,
    /// Half-normal plot positions, smallest |effect| first.
    pub half_normal: Vec<HalfNormalPoint>,
    /// Normal plot positions, most negative first.
    pub normal: Vec<NormalPoint>,
}

/// The fitted model and everything drawn from it.
#[derive(Debug, Clone, PartialEq)]
pub struct ModelResults {
    /// The model as fitted (terms parsed from the labels).
    pub spec: ModelSpec,
    /// Fit, coefficients and ANOVA.
    pub fit: ModelFit,
    /// The equation in coded units.
    pub equation_coded: Equation,
    /// The equation in the factors' units (every factor numeric).
    pub equation_natural: Result<Equation, AnalysisError>,
    /// Residuals, leverage, studentised residuals, Cook's distance.
    pub diagnostics: Diagnostics,
    /// Residuals in the order the runs were made.
    pub in_run_order: Result<Vec<RunOrderPoint>, AnalysisError>,
    /// Residuals on a normal probability plot.
    pub residual_normal_plot: Vec<NormalPlotPoint>,
    /// Observed and predicted cells for every pair of factors (95 % intervals).
    pub interactions: Result<Vec<InteractionMeans>, AnalysisError>,
    /// The Box–Cox profile of the raw response under this model.
    pub box_cox: Result<BoxCox, AnalysisError>,
}

/// What an [`AnalysisCache`] entry is for.
#[derive(Debug, Clone, PartialEq)]
pub struct AnalysisKey {
    /// Project revision.
    pub revision: u64,
    /// Response index.
    pub response: usize,
    /// Model settings used.
    pub model: ModelSettings,
}

/// The results for one response at one revision.
#[derive(Debug, Clone, PartialEq)]
pub struct Analysis {
    /// What this was computed for.
    pub key: AnalysisKey,
    /// The table handed to the core (an error here stops everything else).
    pub data: Result<ResponseData, AnalysisError>,
    /// Effects, Lenth, plot positions.
    pub effects: Result<EffectsResults, AnalysisError>,
    /// Mean response at − and + of every factor (on the analysis scale).
    pub main_effect_means: Vec<MainEffectMeans>,
    /// The model, when terms are chosen ([`AnalysisError::NoModel`] otherwise).
    pub model: Result<ModelResults, AnalysisError>,
    /// Whether the run sheet is out of date with the factors or design (the window warns).
    pub runs_outdated: bool,
}

impl Analysis {
    /// Computes everything for `response` of `project` under `model`.
    pub fn compute(
        project: &Project,
        revision: u64,
        response: usize,
        model: &ModelSettings,
    ) -> Analysis {
        let key = AnalysisKey {
            revision,
            response,
            model: model.clone(),
        };
        let data = response_data(project, response, model.transform);
        let (effects, means, fitted) = match &data {
            Err(e) => (Err(e.clone()), Vec::new(), Err(e.clone())),
            Ok(d) => (
                effects_of(&d.analysed),
                main_effect_means(&d.analysed),
                model_of(project, d, model),
            ),
        };
        Analysis {
            key,
            data,
            effects,
            main_effect_means: means,
            model: fitted,
            runs_outdated: project.runs_outdated,
        }
    }

    /// Terms whose effect lies beyond Lenth's margin of error, in the order of the trade: a
    /// starting point for the model, never applied without the engineer.
    pub fn suggested_terms(&self) -> Vec<Term> {
        let Ok(e) = &self.effects else {
            return Vec::new();
        };
        let Ok((_, flags)) = &e.lenth else {
            return Vec::new();
        };
        let mut t: Vec<Term> = flags
            .iter()
            .filter(|f| f.significance >= Significance::BeyondMe)
            .map(|f| f.term)
            .collect();
        t.sort();
        t
    }

    /// Prediction at a coded point with intervals at `confidence` (on the analysis scale; use
    /// [`Prediction::back_transformed`] with [`ResponseData::transform`] for the measured scale).
    pub fn predict(&self, coded: &[f64], confidence: f64) -> Result<Prediction, AnalysisError> {
        let m = self.model.as_ref().map_err(Clone::clone)?;
        Ok(predict(&m.fit, coded, confidence)?)
    }

    /// Best factor settings for `goal` (on the measured scale) at 95 % confidence.
    pub fn best_settings(&self, goal: Goal) -> Result<Optimum, AnalysisError> {
        let m = self.model.as_ref().map_err(Clone::clone)?;
        let d = self.data.as_ref().map_err(Clone::clone)?;
        Ok(best_settings(
            &m.fit,
            goal,
            &d.transform,
            DEFAULT_CONFIDENCE,
        )?)
    }
}

fn effects_of(obs: &Observations) -> Result<EffectsResults, AnalysisError> {
    let table = estimate_effects(obs)?;
    let lenth = lenth_effects(&table).map_err(AnalysisError::from);
    let half_normal = half_normal(&table.effects);
    let normal = normal_probability(&table.effects);
    Ok(EffectsResults {
        table,
        lenth,
        half_normal,
        normal,
    })
}

fn model_of(
    project: &Project,
    data: &ResponseData,
    model: &ModelSettings,
) -> Result<ModelResults, AnalysisError> {
    let k = project.factors.len();
    let terms: Vec<Term> = model
        .terms
        .iter()
        .map(|l| Term::parse(l, k))
        .collect::<Result<_, _>>()?;
    if terms.is_empty() {
        return Err(AnalysisError::NoModel);
    }
    let spec = ModelSpec::new(terms).hierarchical(model.hierarchical);
    let fit = fit_model(&data.analysed, &spec)?;
    let equation_coded = fit.equation_coded();
    let equation_natural =
        natural_ranges(project).and_then(|r| fit.equation_natural(&r).map_err(AnalysisError::from));
    let diag = diagnostics(&fit);
    let run_order: Vec<usize> = project.runs.iter().map(|r| r.run_order as usize).collect();
    let in_run_order = diag.in_run_order(&run_order).map_err(AnalysisError::from);
    let residual_normal_plot = diag.normal_plot();
    let interactions =
        interaction_means(&data.analysed, &fit, DEFAULT_CONFIDENCE).map_err(AnalysisError::from);
    let box_cox = box_cox(&data.raw, &spec).map_err(AnalysisError::from);
    Ok(ModelResults {
        spec,
        fit,
        equation_coded,
        equation_natural,
        diagnostics: diag,
        in_run_order,
        residual_normal_plot,
        interactions,
        box_cox,
    })
}

/// Each factor's (low, high) in its unit; an error names the first categorical factor.
pub fn natural_ranges(project: &Project) -> Result<Vec<(f64, f64)>, AnalysisError> {
    project
        .factors
        .iter()
        .map(|f| match f.kind {
            FactorKind::Numeric { low, high } => Ok((low, high)),
            FactorKind::Categorical { .. } => Err(AnalysisError::Categorical(f.name.clone())),
        })
        .collect()
}

/// The last few analyses, most recent first.
#[derive(Debug, Default)]
pub struct AnalysisCache {
    entries: Vec<Arc<Analysis>>,
    computed: u64,
}

impl AnalysisCache {
    /// An empty cache.
    pub fn new() -> AnalysisCache {
        AnalysisCache::default()
    }

    /// The analysis of `response` at `revision` with the project's own model settings for it,
    /// computed now if not cached. An index past the responses gives an analysis whose every
    /// part is [`AnalysisError::NoSuchResponse`].
    pub fn get(&mut self, project: &Project, revision: u64, response: usize) -> Arc<Analysis> {
        let model = project
            .responses
            .get(response)
            .map(|r| r.model.clone())
            .unwrap_or_default();
        self.get_with(project, revision, response, &model)
    }

    /// Like [`Self::get`] with other model settings (e.g. trying a model before choosing it).
    pub fn get_with(
        &mut self,
        project: &Project,
        revision: u64,
        response: usize,
        model: &ModelSettings,
    ) -> Arc<Analysis> {
        let hit = self.entries.iter().position(|a| {
            a.key.revision == revision && a.key.response == response && &a.key.model == model
        });
        let entry = match hit {
            Some(i) => self.entries.remove(i),
            None => {
                self.computed += 1;
                Arc::new(Analysis::compute(project, revision, response, model))
            }
        };
        self.entries.insert(0, Arc::clone(&entry));
        self.entries.truncate(CACHE_ENTRIES);
        entry
    }

    /// How many analyses were computed (not served from the cache) so far.
    pub fn computed(&self) -> u64 {
        self.computed
    }

    /// Forgets everything (e.g. another project was opened).
    pub fn clear(&mut self) {
        self.entries.clear();
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Edit, History, RunStatus, demo_project};

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() < 1e-9
    }

    #[test]
    fn conversion_reads_cells_status_and_blocks() {
        let mut p = demo_project();
        p.runs[0].values[0].text = "12,5x".into();
        p.runs[1].values[0].text = "12,5".into();
        p.runs[2].status = RunStatus::Excluded {
            reason: "oven door open".into(),
        };
        let d = response_data(&p, 0, ResponseTransform::None).unwrap();
        assert_eq!(d.raw.run_count(), 18);
        assert_eq!(d.raw.response()[0], None);
        assert_eq!(d.raw.response()[1], Some(12.5));
        assert_eq!(d.bad, vec![(0, "`x` is not part of a number".to_string())]);
        let missing_run = p.runs.iter().position(|r| r.std_order == 11).unwrap();
        assert_eq!(d.missing, vec![missing_run]);
        assert_eq!(d.excluded, vec![2]);
        assert!(d.raw.excluded()[2]);
        assert_eq!(d.used.len(), 18 - 3);
        assert_eq!(d.raw.used_runs(), d.used);
        assert!(d.raw.is_centre(16) && d.raw.is_centre(17));
        assert_eq!(
            response_data(&p, 5, ResponseTransform::None),
            Err(AnalysisError::NoSuchResponse(5))
        );
    }

    #[test]
    fn transform_applies_before_analysis() {
        let p = demo_project();
        let d = response_data(&p, 1, ResponseTransform::Ln).unwrap();
        let r0 = d.raw.response()[0].unwrap();
        assert!(close(d.analysed.response()[0].unwrap(), r0.ln()));
        assert_eq!(
            core_transform(ResponseTransform::Power { lambda: 0.0 }),
            Transform::Ln
        );
        let mut q = p.clone();
        q.runs[0].values[1].text = "-1".into();
        let err = response_data(&q, 1, ResponseTransform::Sqrt).unwrap_err();
        assert!(err.to_string().contains("non-negative"), "{err}");
    }

    #[test]
    fn demo_effects_show_the_invented_interaction() {
        // The demo's formula: rubs = 60 + 14A + 10B - 3C + 6AB + noise, so the effects are about
        // twice the coefficients: A ≈ 28, B ≈ 20, C ≈ -6, AB ≈ 12 (noise within ±2 per run).
        let p = demo_project();
        // With no terms chosen (the demo ships with a model; start from none here).
        let none = ModelSettings::default();
        let a = Analysis::compute(&p, 1, 0, &none);
        let e = a.effects.as_ref().unwrap();
        let eff = |l: &str| e.table.effect_of(Term::parse(l, 4).unwrap()).unwrap();
        assert!((eff("A") - 28.0).abs() < 3.0, "{}", eff("A"));
        assert!((eff("B") - 20.0).abs() < 3.0, "{}", eff("B"));
        assert!((eff("AB") - 12.0).abs() < 3.0, "{}", eff("AB"));
        assert!(eff("D").abs() < 3.0);
        let suggested: Vec<String> = a.suggested_terms().iter().map(|t| t.label()).collect();
        assert!(suggested.contains(&"AB".to_string()), "{suggested:?}");
        assert!(!suggested.contains(&"D".to_string()), "{suggested:?}");
        assert_eq!(a.model, Err(AnalysisError::NoModel));
        assert_eq!(e.half_normal.len(), e.table.effects.len());
    }

    #[test]
    fn chosen_model_is_fitted_with_everything_drawn_from_it() {
        let p = demo_project();
        let mut h = History::new(p);
        h.apply(Edit::SetTerms {
            response: 0,
            terms: vec!["A".into(), "B".into(), "C".into(), "AB".into()],
        })
        .unwrap();
        let project = h.project();
        let a = Analysis::compute(project, h.revision(), 0, &project.responses[0].model);
        let m = a.model.as_ref().unwrap();
        assert_eq!(m.fit.runs.len(), 17, "the missing run is left out");
        let b = m
            .fit
            .coefficient(Term::parse("AB", 4).unwrap())
            .unwrap()
            .estimate;
        assert!((b - 6.0).abs() < 1.5, "{b}");
        assert!(m.equation_natural.is_ok());
        assert_eq!(m.diagnostics.runs.len(), 17);
        assert_eq!(m.in_run_order.as_ref().unwrap().len(), 17);
        assert_eq!(m.interactions.as_ref().unwrap().len(), 6);
        assert!(m.box_cox.is_ok());
        let centre = a.predict(&[0.0; 4], 0.95).unwrap();
        assert!((centre.value - 60.0).abs() < 2.0, "{}", centre.value);
        let best = a.best_settings(Goal::Maximise).unwrap();
        assert_eq!(best.settings[0], Some(1.0));
        assert_eq!(best.settings[1], Some(1.0));
    }

    #[test]
    fn bad_model_term_is_reported() {
        let p = demo_project();
        let model = ModelSettings {
            terms: vec!["AZ".into()],
            ..ModelSettings::default()
        };
        let a = Analysis::compute(&p, 1, 0, &model);
        assert!(
            matches!(a.model, Err(AnalysisError::Term(_))),
            "{:?}",
            a.model
        );
    }

    #[test]
    fn cache_computes_once_per_key() {
        let mut h = History::new(demo_project());
        let mut cache = AnalysisCache::new();
        let first = cache.get(h.project(), h.revision(), 0);
        let again = cache.get(h.project(), h.revision(), 0);
        assert!(Arc::ptr_eq(&first, &again));
        assert_eq!(cache.computed(), 1);
        h.apply(Edit::SetCell {
            run: 0,
            response: 0,
            text: "99".into(),
            at: None,
        })
        .unwrap();
        let edited = cache.get(h.project(), h.revision(), 0);
        assert_eq!(cache.computed(), 2);
        assert_eq!(edited.data.as_ref().unwrap().raw.response()[0], Some(99.0));
        assert!(h.undo());
        let back = cache.get(h.project(), h.revision(), 0);
        assert!(Arc::ptr_eq(&first, &back), "undo reuses the earlier result");
        assert_eq!(cache.computed(), 2);
        let other = cache.get(h.project(), h.revision(), 1);
        assert_eq!(other.key.response, 1);
        let tried = ModelSettings {
            terms: vec!["A".into()],
            ..ModelSettings::default()
        };
        cache.get_with(h.project(), h.revision(), 0, &tried);
        assert_eq!(cache.computed(), 4);
        for r in 0..20 {
            cache.get(h.project(), 1000 + r, 0);
        }
        assert_eq!(cache.entries.len(), CACHE_ENTRIES);
    }

    #[test]
    fn empty_sheet_says_what_to_do() {
        let mut p = demo_project();
        p.runs.clear();
        let a = Analysis::compute(&p, 1, 0, &ModelSettings::default());
        assert_eq!(a.data, Err(AnalysisError::NoRuns));
        assert_eq!(a.effects, Err(AnalysisError::NoRuns));
        assert_eq!(
            a.data.unwrap_err().to_string(),
            "the run sheet is empty: generate the runs from the design first"
        );
    }
}
