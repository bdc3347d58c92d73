//! What the analysis panes show for one response, computed from the project once per change of
//! the data and then only read while drawing.
//!
//! The computing is done by the analysis cache ([`crate::analysis`]); this is the panes' digest
//! of one of its entries: the counts of used, missing and excluded runs, the cells that are not
//! numbers, the observed corner means the interaction plots draw, and the warnings in plain
//! words. Every step that cannot be done yet keeps the reason, in words, so a pane can say "not
//! available yet, because ..." instead of showing a number that is not there.

use twofold_core::anova::{Equation, ModelFit};
use twofold_core::boxcox::BoxCox;
use twofold_core::data::Observations;
use twofold_core::diagnostics::Diagnostics;
use twofold_core::effects::EffectTable;
use twofold_core::halfnormal::HalfNormalPoint;
use twofold_core::lenth::Lenth;
use twofold_core::means::{InteractionMeans, MainEffectMeans};
use twofold_core::predict::CURVATURE_ALPHA;
use twofold_core::term::Term;
use twofold_core::transform::Transform;

use crate::analysis::{Analysis, AnalysisError};
use crate::project::{FactorKind, Project, ResponseTransform};

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

/// Everything the analysis panes read for one response.
#[derive(Debug, Clone)]
pub struct ResponseResults {
    /// Revision of the project data analysed.
    pub revision: u64,
    /// Response position.
    pub response: usize,
    /// Runs in the sheet.
    pub total_runs: usize,
    /// Runs with a number and not excluded.
    pub used_runs: usize,
    /// Runs still without a value (and not excluded).
    pub missing_runs: usize,
    /// Runs excluded by the engineer.
    pub excluded_runs: usize,
    /// Cells with text that is not a number.
    pub bad_cells: Vec<BadCell>,
    /// The transform applied before analysis.
    pub transform: Transform,
    /// The checked table of the used data (transformed), or why there is none.
    pub observations: Result<Observations, String>,
    /// Effects of every estimable chain, or why there are none.
    pub effects: Result<EffectTable, String>,
    /// Lenth's margins, or why they cannot be computed.
    pub lenth: Result<Lenth, String>,
    /// Half-normal positions of the effects.
    pub half_normal: Vec<HalfNormalPoint>,
    /// The terms the engineer chose, as parsed.
    pub chosen_terms: Vec<Term>,
    /// The fitted model, or why there is none.
    pub fit: Result<ModelFit, String>,
    /// Residual diagnostics of the fit.
    pub diagnostics: Option<Diagnostics>,
    /// Run-order number of each table run (for residuals against run order).
    pub run_order: Vec<usize>,
    /// Mean at − and + of every factor.
    pub main_means: Vec<MainEffectMeans>,
    /// Mean of the used centre points.
    pub centre_mean: Option<f64>,
    /// Observed means of every pair of factors.
    pub pairs: Vec<PairMeans>,
    /// The equation in coded units.
    pub equation_coded: Option<Equation>,
    /// The equation in natural units, or why there is none.
    pub equation_natural: Result<Equation, String>,
    /// Each factor's (low, high) in natural units; categorical factors as (−1, +1).
    pub ranges: Vec<(f64, f64)>,
    /// Warnings in plain words.
    pub warnings: Vec<Warning>,
    /// The Box–Cox profile of the measured response under the fitted model, or why there is none.
    pub box_cox: Result<BoxCox, String>,
    /// The fitted model's cells of every pair of factors (predicted means with 95 % intervals,
    /// analysis scale), or why there are none.
    pub model_cells: Result<Vec<InteractionMeans>, String>,
}

/// The core's transform for the project's choice (the analysis cache's mapping).
pub fn core_transform(t: ResponseTransform) -> Transform {
    crate::analysis::core_transform(t)
}

/// Each factor's (low, high) for natural-unit equations and predictions.
pub fn natural_ranges(project: &Project) -> Vec<(f64, f64)> {
    project
        .factors
        .iter()
        .map(|f| match f.kind {
            FactorKind::Numeric { low, high } => (low, high),
            // Two labels have no scale: their "natural" unit is the coding itself.
            FactorKind::Categorical { .. } => (-1.0, 1.0),
        })
        .collect()
}

impl ResponseResults {
    /// Analyses response `response` of `project` (revision 0: for callers without a history,
    /// such as exports).
    pub fn compute(project: &Project, response: usize) -> ResponseResults {
        ResponseResults::compute_at(project, 0, response)
    }

    /// Analyses response `response` of `project`, whose content has revision `revision` (the
    /// window's caches compare it).
    pub fn compute_at(project: &Project, revision: u64, response: usize) -> ResponseResults {
        let model = project
            .responses
            .get(response)
            .map(|r| r.model.clone())
            .unwrap_or_default();
        let analysis = Analysis::compute(project, revision, response, &model);
        ResponseResults::from_analysis(project, &analysis)
    }

    /// The panes' digest of one entry of the analysis cache ([`crate::analysis`]), which does the
    /// computing; added here are the observed corner means, the counts and the warnings in words.
    pub fn from_analysis(project: &Project, analysis: &Analysis) -> ResponseResults {
        let revision = analysis.key.revision;
        let response = analysis.key.response;
        let k = project.factors.len();
        let text = |e: &AnalysisError| e.to_string();
        let data = match &analysis.data {
            Ok(d) => d,
            Err(e) => {
                let why = match e {
                    AnalysisError::NoSuchResponse(_) => {
                        "there is no response yet: add one on the run sheet".to_string()
                    }
                    AnalysisError::NoRuns => {
                        "there are no runs yet: choose a design first".to_string()
                    }
                    other => other.to_string(),
                };
                return ResponseResults::unavailable(revision, response, &why);
            }
        };
        let bad_cells: Vec<BadCell> = data
            .bad
            .iter()
            .filter_map(|(i, reason)| {
                let run = project.runs.get(*i)?;
                Some(BadCell {
                    run_order: run.run_order,
                    text: run
                        .values
                        .get(response)
                        .map(|c| c.text.clone())
                        .unwrap_or_default(),
                    reason: reason.clone(),
                })
            })
            .collect();
        let missing_runs = data
            .missing
            .iter()
            .filter(|i| !data.excluded.contains(i))
            .count();
        let chosen_terms: Vec<Term> = analysis
            .key
            .model
            .terms
            .iter()
            .filter_map(|t| Term::parse(t, k).ok())
            .collect();
        let obs = &data.analysed;
        let centres: Vec<f64> = data
            .used
            .iter()
            .filter(|&&r| obs.is_centre(r))
            .filter_map(|&r| obs.response().get(r).copied().flatten())
            .collect();
        let mut out = ResponseResults {
            revision,
            response,
            total_runs: project.runs.len(),
            used_runs: data.used.len(),
            missing_runs,
            excluded_runs: data.excluded.len(),
            bad_cells,
            transform: data.transform,
            observations: Ok(obs.clone()),
            effects: Err(String::new()),
            lenth: Err(String::new()),
            half_normal: Vec::new(),
            chosen_terms,
            fit: Err(String::new()),
            diagnostics: None,
            run_order: project.runs.iter().map(|r| r.run_order as usize).collect(),
            main_means: if data.used.is_empty() {
                Vec::new()
            } else {
                analysis.main_effect_means.clone()
            },
            centre_mean: (!centres.is_empty())
                .then(|| centres.iter().sum::<f64>() / centres.len() as f64),
            pairs: if data.used.is_empty() {
                Vec::new()
            } else {
                pair_means(obs)
            },
            equation_coded: None,
            equation_natural: Err(String::new()),
            ranges: natural_ranges(project),
            warnings: Vec::new(),
            box_cox: Err(String::new()),
            model_cells: Err(String::new()),
        };
        if data.used.is_empty() {
            let why = "no run has a value yet";
            out.effects = Err(why.into());
            out.lenth = Err(why.into());
            out.fit = Err(why.into());
            out.equation_natural = Err(why.into());
            out.box_cox = Err(why.into());
            out.model_cells = Err(why.into());
            return out;
        }
        match &analysis.effects {
            Ok(e) => {
                out.effects = Ok(e.table.clone());
                out.lenth = e.lenth.as_ref().map(|(l, _)| *l).map_err(text);
                out.half_normal = e.half_normal.clone();
            }
            Err(e) => {
                out.effects = Err(e.to_string());
                out.lenth = Err(e.to_string());
            }
        }
        match &analysis.model {
            Ok(m) => {
                out.fit = Ok(m.fit.clone());
                out.diagnostics = Some(m.diagnostics.clone());
                out.equation_coded = Some(m.equation_coded.clone());
                out.equation_natural = m.equation_natural.clone().map_err(|e| text(&e));
                out.box_cox = m.box_cox.clone().map_err(|e| text(&e));
                out.model_cells = m.interactions.clone().map_err(|e| text(&e));
            }
            Err(AnalysisError::NoModel) => {
                let why = "no terms chosen yet: click the largest effects in the effect bars or the half-normal plot";
                out.fit = Err(why.into());
                out.equation_natural = Err(why.into());
                out.box_cox = Err(why.into());
                out.model_cells = Err(why.into());
            }
            Err(e) => {
                out.fit = Err(e.to_string());
                out.equation_natural = Err(e.to_string());
                out.box_cox = Err(e.to_string());
                out.model_cells = Err(e.to_string());
            }
        }
        out.collect_warnings();
        out
    }

    /// Puts the plain-words warnings together from the results.
    fn collect_warnings(&mut self) {
        let mut warnings = Vec::new();
        if let Ok(table) = &self.effects {
            if !table.not_estimable.is_empty() {
                let list: Vec<String> = table
                    .not_estimable
                    .iter()
                    .take(12)
                    .map(|t| t.label())
                    .collect();
                let more = table.not_estimable.len().saturating_sub(12);
                push_warning(
                    &mut warnings,
                    WarningKind::Effects,
                    format!(
                        "{} no usable value yet, so these effects cannot be estimated: {}{}.",
                        match self.missing_runs + self.bad_cells.len() {
                            1 => "1 run has".to_string(),
                            n => format!("{n} runs have"),
                        },
                        list.join(", "),
                        if more > 0 {
                            format!(" and {more} more")
                        } else {
                            String::new()
                        }
                    ),
                );
            }
            for term in &self.chosen_terms {
                if let Some(rep) = table.aliasing.representative_of(*term)
                    && let Some(e) = table.get(rep.term)
                {
                    let mates: Vec<String> = std::iter::once(rep)
                        .filter(|r| r.term != *term)
                        .map(|r| r.to_string())
                        .chain(
                            e.aliases
                                .iter()
                                .filter(|a| a.term != *term && a.term.order() <= 2)
                                .map(ToString::to_string),
                        )
                        .collect();
                    if !mates.is_empty() {
                        push_warning(
                            &mut warnings,
                            WarningKind::Model,
                            format!(
                                "{} is aliased with {}: the estimate is their sum, the data cannot tell them apart.",
                                term.label(),
                                mates.join(", ")
                            ),
                        );
                    }
                }
            }
        }
        if let Ok(fit) = &self.fit {
            if let Some(c) = &fit.curvature
                && let Some(p) = c.p
                && p < CURVATURE_ALPHA
            {
                push_warning(
                    &mut warnings,
                    WarningKind::Model,
                    format!(
                        "Curvature: the centre points differ from the corners' average by {} (p = {}). The response bends inside the box, so predictions between the corners are not reliable and the best setting may lie inside.",
                        crate::numbers::fmt_num(-c.factorial_minus_centre, 3),
                        crate::numbers::fmt_num(p, 2)
                    ),
                );
            }
            for u in &fit.unestimable {
                let with: Vec<String> = u.aliased_with.iter().map(|(c, _)| c.to_string()).collect();
                push_warning(
                    &mut warnings,
                    WarningKind::Model,
                    if with.is_empty() {
                        format!(
                            "{} cannot be estimated from the runs at hand and was left out of the fit.",
                            u.column
                        )
                    } else {
                        format!(
                            "{} cannot be told apart from {} with the runs at hand and was left out of the fit.",
                            u.column,
                            with.join(", ")
                        )
                    },
                );
            }
        }
        if !self.bad_cells.is_empty() {
            let list: Vec<String> = self
                .bad_cells
                .iter()
                .take(6)
                .map(|b| format!("run {} (“{}”: {})", b.run_order, b.text, b.reason))
                .collect();
            push_warning(
                &mut warnings,
                WarningKind::Data,
                format!(
                    "Text that is not a number is left out of the analysis: {}.",
                    list.join("; ")
                ),
            );
        }
        self.warnings = warnings;
    }

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

    /// Results that say only why there are none (e.g. the computation stopped with an internal
    /// error): every step unavailable with `why`.
    pub fn unavailable(revision: u64, response: usize, why: &str) -> ResponseResults {
        let mut out = ResponseResults {
            revision,
            response,
            total_runs: 0,
            used_runs: 0,
            missing_runs: 0,
            excluded_runs: 0,
            bad_cells: Vec::new(),
            transform: Transform::None,
            observations: Err(String::new()),
            effects: Err(String::new()),
            lenth: Err(String::new()),
            half_normal: Vec::new(),
            chosen_terms: Vec::new(),
            fit: Err(String::new()),
            diagnostics: None,
            run_order: Vec::new(),
            main_means: Vec::new(),
            centre_mean: None,
            pairs: Vec::new(),
            equation_coded: None,
            equation_natural: Err(String::new()),
            ranges: Vec::new(),
            warnings: Vec::new(),
            box_cox: Err(String::new()),
            model_cells: Err(String::new()),
        };
        out.set_all_unavailable(why);
        out
    }

    fn set_all_unavailable(&mut self, why: &str) {
        self.observations = Err(why.into());
        self.effects = Err(why.into());
        self.lenth = Err(why.into());
        self.fit = Err(why.into());
        self.equation_natural = Err(why.into());
        self.box_cox = Err(why.into());
        self.model_cells = Err(why.into());
    }

    /// Whether `term` is in the chosen model.
    pub fn in_model(&self, term: Term) -> bool {
        self.chosen_terms.contains(&term)
    }

    /// Whether `term` is fitted (chosen, or added to keep the model hierarchical).
    pub fn fitted(&self, term: Term) -> bool {
        self.fit.as_ref().is_ok_and(|f| f.terms.contains(&term))
    }
}

fn push_warning(list: &mut Vec<Warning>, kind: WarningKind, text: String) {
    list.push(Warning { kind, text });
}

/// Observed means at the four corners of every pair of factors (centre points left out).
fn pair_means(obs: &Observations) -> Vec<PairMeans> {
    let k = obs.factor_count();
    let used = obs.used_runs();
    let mut out = Vec::with_capacity(k * k.saturating_sub(1) / 2);
    for a in 0..k {
        for b in a + 1..k {
            let mut sum = [[0.0f64; 2]; 2];
            let mut n = [[0usize; 2]; 2];
            for &r in &used {
                let row = &obs.levels()[r];
                let (la, lb) = (row[a], row[b]);
                if la == 0.0 || lb == 0.0 {
                    continue;
                }
                let (i, j) = (usize::from(la > 0.0), usize::from(lb > 0.0));
                sum[j][i] += obs.response()[r].unwrap_or(0.0);
                n[j][i] += 1;
            }
            let mean = |j: usize, i: usize| (n[j][i] > 0).then(|| sum[j][i] / n[j][i] as f64);
            out.push(PairMeans {
                factors: (a, b),
                means: [[mean(0, 0), mean(0, 1)], [mean(1, 0), mean(1, 1)]],
            });
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Cell, Factor, ResponseDef, RunRecord, RunStatus};

    /// A 2^2 with y = 10 + 3A (+ −1 for B), values in standard order.
    fn two_by_two(values: &[&str]) -> Project {
        let mut p = Project::new("t");
        p.factors = vec![
            Factor::numeric("A", "", 0.0, 1.0),
            Factor::numeric("B", "", 0.0, 1.0),
        ];
        p.responses = vec![ResponseDef::new("y", "")];
        let levels = [[-1, -1], [1, -1], [-1, 1], [1, 1]];
        for (i, l) in levels.iter().enumerate() {
            p.runs.push(RunRecord {
                std_order: i as u32 + 1,
                run_order: i as u32 + 1,
                block: 1,
                centre: false,
                replicate: 1,
                levels: l.to_vec(),
                values: vec![Cell::new(values[i])],
                status: RunStatus::Done,
                note: String::new(),
                entered_at: None,
            });
        }
        p
    }

    #[test]
    fn effects_come_from_the_numbers_and_bad_text_is_left_out() {
        // y: 6, 12, 4, 10 → A effect = (12+10)/2 − (6+4)/2 = 6, B effect = −2 (by hand).
        let r = ResponseResults::compute(&two_by_two(&["6", "12", "4", "10"]), 0);
        let t = r.effects.as_ref().unwrap();
        assert!((t.effect_of(Term::main(0)).unwrap() - 6.0).abs() < 1e-12);
        assert!((t.effect_of(Term::main(1)).unwrap() + 2.0).abs() < 1e-12);
        let r = ResponseResults::compute(&two_by_two(&["6", "12", "4x", "10"]), 0);
        assert_eq!(r.used_runs, 3);
        assert_eq!(r.bad_cells.len(), 1);
        assert!(r.warnings.iter().any(|w| w.text.contains("run 3")));
    }

    #[test]
    fn pair_means_average_the_corners() {
        let r = ResponseResults::compute(&two_by_two(&["6", "12", "4", "10"]), 0);
        assert_eq!(r.pairs.len(), 1);
        assert_eq!(
            r.pairs[0].means,
            [[Some(6.0), Some(12.0)], [Some(4.0), Some(10.0)]]
        );
    }

    #[test]
    fn the_box_cox_profile_and_the_model_cells_are_carried_only_with_a_model() {
        let p = crate::project::demo_project();
        let model = p.responses[0].model.clone();
        let a = Analysis::compute(&p, 3, 0, &model);
        let r = ResponseResults::from_analysis(&p, &a);
        let m = a.model.as_ref().unwrap();
        assert_eq!(r.box_cox.as_ref().ok(), m.box_cox.as_ref().ok());
        assert_eq!(r.model_cells.as_ref().ok(), m.interactions.as_ref().ok());
        // Four factors: six pairs of four cells each.
        assert_eq!(r.model_cells.as_ref().unwrap().len(), 6);
        let mut q = p.clone();
        q.responses[0].model.terms.clear();
        let r = ResponseResults::compute(&q, 0);
        assert!(r.box_cox.unwrap_err().contains("no terms chosen"));
        assert!(r.model_cells.is_err());
    }

    #[test]
    fn without_values_every_step_says_why() {
        let r = ResponseResults::compute(&two_by_two(&["", "", "", ""]), 0);
        assert_eq!(r.effects.as_ref().unwrap_err(), "no run has a value yet");
        assert!(r.fit.is_err());
    }
}
