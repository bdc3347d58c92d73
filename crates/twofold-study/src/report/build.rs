//! [`Report::build`]: the one function that analyses a response. It turns the run sheet into the
//! core's table, estimates the effects, applies Lenth's method, finds the default model choice,
//! fits the model (the engineer's terms, or the default choice), and draws from the fit the
//! equations, diagnostics, residuals in run order, the model-based interaction cells and the
//! Box–Cox profile. Added here are the counts, the observed corner means and the warnings in
//! plain words. A step that cannot be done keeps its reason in words.

use twofold_core::anova::{ModelSpec, fit_model};
use twofold_core::boxcox::box_cox;
use twofold_core::data::Observations;
use twofold_core::diagnostics::diagnostics;
use twofold_core::effects::estimate_effects;
use twofold_core::halfnormal::{half_normal, normal_probability};
use twofold_core::lenth::lenth_effects;
use twofold_core::means::{interaction_means, main_effect_means};
use twofold_core::predict::{CURVATURE_ALPHA, DEFAULT_CONFIDENCE};
use twofold_core::term::Term;
use twofold_core::transform::Transform;

use super::choice::{CurvatureTest, ErrorBasis, Selection, default_choice, given_choice};
use super::data::{natural_ranges, plot_ranges, response_data};
use super::{
    BadCell, NO_TERMS_CHOSEN, PairMeans, Report, ReportError, ReportKey, Warning, WarningKind,
};
use crate::project::{ModelSettings, Project};

impl Report {
    /// Builds the report of response `response` of `project` (whose content has revision
    /// `revision`) under `model`: the one analysis every front end renders.
    pub fn build(
        project: &Project,
        revision: u64,
        response: usize,
        model: &ModelSettings,
    ) -> Report {
        if let Some(two_level) = project.two_level_part() {
            let mut out = Report::build(&two_level, revision, response, model);
            out.quadratic = super::quadratic::quadratic_report(project, response, model);
            return out;
        }
        let key = ReportKey {
            revision,
            response,
            model: model.clone(),
        };
        let k = project.factors.len();
        let mut out = Report::empty(key, project);
        let data = match response_data(project, response, model.transform) {
            Ok(d) => d,
            Err(e) => {
                let why = match &e {
                    ReportError::NoSuchResponse(_) => {
                        "there is no response yet: add one on the run sheet".to_string()
                    }
                    ReportError::NoRuns => {
                        "there are no runs yet: choose a design first".to_string()
                    }
                    other => other.to_string(),
                };
                out.set_all_unavailable(&why);
                out.stopped = Some(e);
                return out;
            }
        };
        out.bad_cells = data
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
        out.missing_runs = data
            .missing
            .iter()
            .filter(|i| !data.excluded.contains(i))
            .count();
        out.values_missing = data.missing.len() + data.bad.len();
        out.used_runs = data.used.len();
        out.excluded_runs = data.excluded.len();
        out.transform = data.transform;
        out.chosen_terms = model
            .terms
            .iter()
            .filter_map(|t| Term::parse(t, k).ok())
            .collect();
        let obs = data.analysed.clone();
        let centres: Vec<f64> = data
            .used
            .iter()
            .filter(|&&r| obs.is_centre(r))
            .filter_map(|&r| obs.response().get(r).copied().flatten())
            .collect();
        out.centre_mean =
            (!centres.is_empty()).then(|| centres.iter().sum::<f64>() / centres.len() as f64);
        out.observations = Ok(obs.clone());
        let raw = data.raw.clone();
        out.data = Ok(data);
        if out.used_runs == 0 {
            let why = "no run has a value yet";
            out.set_steps_unavailable(why);
            out.stopped = estimate_effects(&obs).err().map(ReportError::from);
            return out;
        }
        out.main_means = main_effect_means(&obs);
        out.pairs = pair_means(&obs);

        // Effects, Lenth, plot positions.
        let table = match estimate_effects(&obs) {
            Ok(t) => t,
            Err(e) => {
                let e = ReportError::from(e);
                out.set_steps_unavailable(&e.to_string());
                out.stopped = Some(e);
                return out;
            }
        };
        match lenth_effects(&table) {
            Ok((l, flags)) => {
                out.lenth = Ok(l);
                out.lenth_flags = flags;
            }
            Err(e) => out.lenth = Err(e.to_string()),
        }
        out.half_normal = half_normal(&table.effects);
        out.normal = normal_probability(&table.effects);

        // The model: the engineer's terms, or the one default choice.
        let (suggested, pure) = default_choice(&obs, &table, out.lenth.as_ref().ok());
        out.pure_error = pure;
        out.suggested = Ok(suggested.clone());
        let choice = if model.terms.is_empty() {
            Ok(suggested)
        } else {
            given_choice(&model.terms, k, Some(&table), model.hierarchical)
        };
        out.strata = strata_of(project, &table);
        out.effects = Ok(table);
        let choice = match choice {
            Ok(c) => c,
            Err(e) => {
                out.choice = Err(e.to_string());
                out.fit_unavailable(&e.to_string());
                out.stopped = Some(e);
                out.finish();
                return out;
            }
        };
        out.error_basis = match (&out.pure_error, choice.selection) {
            (Some(_), _) => ErrorBasis::PureError,
            (None, Selection::LenthMargin) => ErrorBasis::LenthPse,
            (None, _) => ErrorBasis::Residual,
        };
        let spec = ModelSpec::new(choice.terms.clone()).hierarchical(choice.hierarchical);
        out.choice = Ok(choice);
        let fit = match fit_model(&obs, &spec) {
            Ok(f) => f,
            Err(e) => {
                let e = ReportError::from(e);
                out.fit_unavailable(&e.to_string());
                out.stopped = Some(e);
                out.finish();
                return out;
            }
        };
        out.curvature = CurvatureTest::of(&fit, out.pure_error.as_ref());
        out.equation_coded = Some(fit.equation_coded());
        out.equation_natural = natural_ranges(project)
            .and_then(|r| fit.equation_natural(&r).map_err(ReportError::from))
            .map_err(|e| e.to_string());
        let diag = diagnostics(&fit);
        out.in_run_order = diag
            .in_run_order(&out.run_order)
            .map_err(|e| ReportError::from(e).to_string());
        out.residual_normal_plot = diag.normal_plot();
        out.diagnostics = Some(diag);
        out.interactions = interaction_means(&obs, &fit, DEFAULT_CONFIDENCE)
            .map_err(|e| ReportError::from(e).to_string());
        out.box_cox = box_cox(&raw, &spec).map_err(|e| ReportError::from(e).to_string());
        if let Some(strata) = &mut out.strata {
            strata.anova = split_plot_anova_of(project, &obs, &fit);
        }
        out.fit = Ok(fit);
        out.finish();
        out
    }

    /// [`Report::build`] with the project's own model settings for `response` (the defaults for
    /// an index past the responses).
    pub fn for_response(project: &Project, revision: u64, response: usize) -> Report {
        let model = project
            .responses
            .get(response)
            .map(|r| r.model.clone())
            .unwrap_or_default();
        Report::build(project, revision, response, &model)
    }

    /// A report with nothing computed yet.
    fn empty(key: ReportKey, project: &Project) -> Report {
        Report {
            revision: key.revision,
            response: key.response,
            response_name: project
                .responses
                .get(key.response)
                .map(|r| r.name.clone())
                .unwrap_or_default(),
            factor_count: project.factors.len(),
            runs_outdated: project.runs_outdated,
            total_runs: project.runs.len(),
            used_runs: 0,
            missing_runs: 0,
            values_missing: 0,
            excluded_runs: 0,
            bad_cells: Vec::new(),
            transform: Transform::None,
            data: Err(String::new()),
            observations: Err(String::new()),
            effects: Err(String::new()),
            lenth: Err(String::new()),
            lenth_flags: Vec::new(),
            half_normal: Vec::new(),
            normal: Vec::new(),
            main_means: Vec::new(),
            centre_mean: None,
            pairs: Vec::new(),
            chosen_terms: Vec::new(),
            suggested: Err(String::new()),
            choice: Err(String::new()),
            pure_error: None,
            error_basis: ErrorBasis::Residual,
            fit: Err(String::new()),
            curvature: None,
            diagnostics: None,
            run_order: project.runs.iter().map(|r| r.run_order as usize).collect(),
            in_run_order: Err(String::new()),
            residual_normal_plot: Vec::new(),
            interactions: Err(String::new()),
            box_cox: Err(String::new()),
            equation_coded: None,
            equation_natural: Err(String::new()),
            ranges: plot_ranges(project),
            warnings: Vec::new(),
            stopped: None,
            strata: None,
            quadratic: None,
            key,
        }
    }

    /// A report that says only why there is none (e.g. the computation stopped with an internal
    /// error): every step unavailable with `why`.
    pub fn unavailable(project: &Project, revision: u64, response: usize, why: &str) -> Report {
        let key = ReportKey {
            revision,
            response,
            model: project
                .responses
                .get(response)
                .map(|r| r.model.clone())
                .unwrap_or_default(),
        };
        let mut out = Report::empty(key, project);
        out.set_all_unavailable(why);
        out
    }

    fn set_all_unavailable(&mut self, why: &str) {
        self.data = Err(why.into());
        self.observations = Err(why.into());
        self.set_steps_unavailable(why);
    }

    fn set_steps_unavailable(&mut self, why: &str) {
        self.effects = Err(why.into());
        self.lenth = Err(why.into());
        self.suggested = Err(why.into());
        self.choice = Err(why.into());
        self.fit_unavailable(why);
    }

    fn fit_unavailable(&mut self, why: &str) {
        let why = if why.is_empty() { NO_TERMS_CHOSEN } else { why };
        self.fit = Err(why.into());
        self.equation_natural = Err(why.into());
        self.in_run_order = Err(why.into());
        self.interactions = Err(why.into());
        self.box_cox = Err(why.into());
    }

    /// The last step: the warnings in words.
    fn finish(&mut self) {
        self.collect_warnings();
    }

    /// For a non-regular screening layout whose effects are the main effects alone: how the main
    /// effects of the model are partially aliased with two-factor interactions (the core's alias
    /// matrix of the planned runs).
    fn partial_alias_warning(&self) -> Option<String> {
        let table = self.effects.as_ref().ok()?;
        if table.aliasing.is_regular()
            || table.layout_dependent == 0
            || table.effects.iter().any(|e| e.term.order() != 1)
        {
            return None;
        }
        let obs = self.observations.as_ref().ok()?;
        let rows: Vec<Vec<i8>> = obs
            .levels()
            .iter()
            .filter(|r| r.iter().all(|v| v.abs() == 1.0))
            .map(|r| r.iter().map(|v| *v as i8).collect())
            .collect();
        let list = twofold_core::screening::partial_aliases(&rows)?;
        let fitted: Vec<Term> = self
            .fit
            .as_ref()
            .map(|f| f.terms.clone())
            .unwrap_or_default();
        let parts: Vec<String> = list
            .iter()
            .filter(|p| fitted.contains(&p.term) && !p.aliases.is_empty())
            .map(|p| {
                let largest = p.aliases.iter().map(|(_, c)| c.abs()).fold(0.0, f64::max);
                format!(
                    "{} with {} (coefficients up to ±{})",
                    p.term.label(),
                    p.aliases.len(),
                    crate::numbers::fmt_sig(largest, 2)
                )
            })
            .collect();
        if parts.is_empty() {
            return None;
        }
        Some(format!(
            "This screening design estimates main effects only, and each is partially aliased with two-factor interactions: {}. An active interaction shifts the main effects it is aliased with; a fold-over separates them.",
            parts.join("; ")
        ))
    }

    /// Puts the plain-words warnings together from the results.
    fn collect_warnings(&mut self) {
        let mut warnings = Vec::new();
        if let Some(text) = self.partial_alias_warning() {
            push_warning(&mut warnings, WarningKind::Effects, text);
        }
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
            if table.left_out > 0 {
                let tried = table.effects.len() + table.not_estimable.len();
                push_warning(
                    &mut warnings,
                    WarningKind::Effects,
                    format!(
                        "With {} runs missing, separating all {} effects would take more time and \
                         memory than a desk computer has: only the {tried} lowest (main effects \
                         first) are estimated and shown; the other {} are left in the residual.",
                        self.missing_runs + self.bad_cells.len(),
                        tried + table.left_out + table.confounded_with_blocks.len(),
                        table.left_out,
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
            if let Some(c) = &self.curvature
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

/// The split-plot analysis of variance of the fitted model's terms when the whole plots are
/// replicated (more whole plots than settings of the hard-to-change factors); `None` otherwise.
fn split_plot_anova_of(
    project: &Project,
    obs: &twofold_core::data::Observations,
    fit: &twofold_core::anova::ModelFit,
) -> Option<Result<twofold_core::splitplot::SplitPlotAnova, String>> {
    let runs: Vec<usize> = (0..project.runs.len())
        .filter(|&i| !project.runs[i].centre)
        .collect();
    let rows: Vec<Vec<i8>> = runs
        .iter()
        .map(|&i| project.runs[i].levels.clone())
        .collect();
    let wp: Vec<usize> = runs
        .iter()
        .map(|&i| project.runs[i].whole_plot.unwrap_or(0) as usize)
        .collect();
    // The hard-to-change factors are those the whole plots hold fixed (read from the sheet, so
    // a coded table with a whole_plot column is analysed the same way).
    let htc: Vec<usize> = (0..project.factors.len())
        .filter(|&f| {
            twofold_core::splitplot::stratum_of(Term::main(f), &rows, &wp)
                == twofold_core::splitplot::Stratum::WholePlot
        })
        .collect();
    let mut distinct_wp = wp.clone();
    distinct_wp.sort_unstable();
    distinct_wp.dedup();
    let settings = twofold_core::splitplot::whole_plots_of(&rows, &htc);
    let distinct_settings = settings.iter().copied().max().map_or(0, |m| m + 1);
    // Without replicated whole plots there is no whole-plot error: Lenth's margins per stratum
    // are the analysis then.
    if htc.is_empty() || distinct_wp.len() <= distinct_settings {
        return None;
    }
    let used: std::collections::HashSet<usize> = obs.used_runs().into_iter().collect();
    let y: Vec<f64> = runs
        .iter()
        .map(|&i| {
            if used.contains(&i) {
                obs.response()[i].unwrap_or(f64::NAN)
            } else {
                f64::NAN
            }
        })
        .collect();
    Some(
        twofold_core::splitplot::split_plot_anova(&rows, &y, &wp, &fit.terms)
            .map_err(|e| e.to_string()),
    )
}

/// The strata of a split-plot study: every factorial run of the sheet carries its whole plot.
fn strata_of(
    project: &Project,
    table: &twofold_core::effects::EffectTable,
) -> Option<super::Strata> {
    use twofold_core::splitplot::{Stratum, lenth_by_stratum, stratum_of};
    let factorial: Vec<&crate::project::RunRecord> =
        project.runs.iter().filter(|r| !r.centre).collect();
    if factorial.is_empty() || factorial.iter().any(|r| r.whole_plot.is_none()) {
        return None;
    }
    let rows: Vec<Vec<i8>> = factorial.iter().map(|r| r.levels.clone()).collect();
    let wp: Vec<usize> = factorial
        .iter()
        .map(|r| r.whole_plot.unwrap_or(0) as usize)
        .collect();
    let of_effect: Vec<Stratum> = table
        .effects
        .iter()
        .map(|e| stratum_of(e.term, &rows, &wp))
        .collect();
    let pairs: Vec<(Term, f64)> = table.effects.iter().map(|e| (e.term, e.effect)).collect();
    let lenth = lenth_by_stratum(&pairs, &rows, &wp)
        .into_iter()
        .map(|(s, l)| (s, l.map_err(|e| e.to_string())))
        .collect();
    let mut distinct = wp.clone();
    distinct.sort_unstable();
    distinct.dedup();
    let half_normal = [Stratum::WholePlot, Stratum::Subplot]
        .into_iter()
        .map(|s| {
            let own: Vec<twofold_core::effects::Effect> = table
                .effects
                .iter()
                .zip(&of_effect)
                .filter(|(_, t)| **t == s)
                .map(|(e, _)| e.clone())
                .collect();
            (s, half_normal(&own))
        })
        .collect();
    Some(super::Strata {
        of_effect,
        lenth,
        whole_plots: distinct.len(),
        half_normal,
        anova: None,
    })
}

#[cfg(test)]
mod screening_tests;

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
                whole_plot: None,
            });
        }
        p
    }

    #[test]
    fn effects_come_from_the_numbers_and_bad_text_is_left_out() {
        // y: 6, 12, 4, 10 → A effect = (12+10)/2 − (6+4)/2 = 6, B effect = −2 (by hand).
        let r = Report::for_response(&two_by_two(&["6", "12", "4", "10"]), 0, 0);
        let t = r.effects.as_ref().unwrap();
        assert!((t.effect_of(Term::main(0)).unwrap() - 6.0).abs() < 1e-12);
        assert!((t.effect_of(Term::main(1)).unwrap() + 2.0).abs() < 1e-12);
        let r = Report::for_response(&two_by_two(&["6", "12", "4x", "10"]), 0, 0);
        assert_eq!(r.used_runs, 3);
        assert_eq!(r.bad_cells.len(), 1);
        assert!(r.warnings.iter().any(|w| w.text.contains("run 3")));
    }

    #[test]
    fn pair_means_average_the_corners() {
        let r = Report::for_response(&two_by_two(&["6", "12", "4", "10"]), 0, 0);
        assert_eq!(r.pairs.len(), 1);
        assert_eq!(
            r.pairs[0].means,
            [[Some(6.0), Some(12.0)], [Some(4.0), Some(10.0)]]
        );
    }

    #[test]
    fn without_values_every_step_says_why() {
        let r = Report::for_response(&two_by_two(&["", "", "", ""]), 0, 0);
        assert_eq!(r.effects.as_ref().unwrap_err(), "no run has a value yet");
        assert!(r.fit.is_err());
    }
}

#[cfg(test)]
mod default_choice_tests {
    use super::*;
    use crate::project::demo_project;
    use crate::report::{ErrorBasis, Selection};

    #[test]
    fn demo_without_terms_is_judged_against_its_centre_points() {
        let mut p = demo_project();
        p.responses[0].model.terms.clear();
        let r = Report::for_response(&p, 0, 0);
        // The demo's two centre points give pure error on 1 df.
        let pe = r.pure_error.unwrap();
        assert_eq!(pe.df, 1);
        assert_eq!(r.error_basis, ErrorBasis::PureError);
        let c = r.choice.as_ref().unwrap();
        assert_eq!(c.selection, Selection::PureErrorTests);
        let labels: Vec<String> = c.terms.iter().map(|t| t.label()).collect();
        // The demo's formula has A, B and AB large and C small (−3 against 14, 10, 6).
        assert_eq!(labels, ["A", "B", "AB"]);
        assert_eq!(r.suggested_terms(), c.terms);
        // F on (1, 1) df is the square of Student's t on 1 df (a Cauchy variable), so
        // P(F > f) = (2/π)·atan(1/√f) (from memory); every test against pure error must agree.
        for t in &c.tests {
            let f = t.f.unwrap();
            assert!((f - t.ss / pe.ms).abs() <= 1e-12 * f);
            let closed = 2.0 / std::f64::consts::PI * (1.0 / f.sqrt()).atan();
            assert!((t.p.unwrap() - closed).abs() < 1e-12, "{t:?}");
        }
        // The window fits nothing without the engineer, but names the same terms.
        let why = r.chosen_fit().unwrap_err();
        assert!(why.contains("suggested: A, B, AB"), "{why}");
        assert!(!r.fitted(Term::main(0)));
        assert!(r.fit.is_ok());
    }

    #[test]
    fn demo_effects_show_the_invented_interaction() {
        // The demo's formula: rubs = 60 + 14A + 10B - 3C + 6AB + noise, so the effects are about
        // twice the coefficients: A ≈ 28, B ≈ 20, C ≈ -6, AB ≈ 12 (noise within ±2 per run).
        let p = demo_project();
        let r = Report::build(&p, 1, 0, &ModelSettings::default());
        let e = r.effects.as_ref().unwrap();
        let eff = |l: &str| e.effect_of(Term::parse(l, 4).unwrap()).unwrap();
        assert!((eff("A") - 28.0).abs() < 3.0, "{}", eff("A"));
        assert!((eff("B") - 20.0).abs() < 3.0, "{}", eff("B"));
        assert!((eff("AB") - 12.0).abs() < 3.0, "{}", eff("AB"));
        assert!(eff("D").abs() < 3.0);
        assert_eq!(r.half_normal.len(), e.effects.len());
        assert_eq!(r.normal.len(), e.effects.len());
        assert_eq!(r.lenth_flags.len(), e.effects.len());
    }

    #[test]
    fn chosen_model_is_fitted_with_everything_drawn_from_it() {
        use crate::project::{Edit, History};
        use twofold_core::predict::Goal;
        let mut h = History::new(demo_project());
        h.apply(Edit::SetTerms {
            response: 0,
            terms: vec!["A".into(), "B".into(), "C".into(), "AB".into()],
        })
        .unwrap();
        let project = h.project();
        let r = Report::build(project, h.revision(), 0, &project.responses[0].model);
        assert!(r.terms_given());
        let fit = r.chosen_fit().unwrap();
        assert_eq!(fit.runs.len(), 17, "the missing run is left out");
        let b = fit
            .coefficient(Term::parse("AB", 4).unwrap())
            .unwrap()
            .estimate;
        assert!((b - 6.0).abs() < 1.5, "{b}");
        assert!(r.equation_natural.is_ok());
        assert_eq!(r.diagnostics.as_ref().unwrap().runs.len(), 17);
        assert_eq!(r.in_run_order.as_ref().unwrap().len(), 17);
        assert_eq!(r.interactions.as_ref().unwrap().len(), 6);
        assert!(r.box_cox.is_ok());
        // The terms were given, but the data still carry pure error: the curvature test uses it.
        assert_eq!(r.error_basis, ErrorBasis::PureError);
        let c = r.curvature.unwrap();
        assert_eq!((c.basis, c.df_error), (ErrorBasis::PureError, 1));
        let centre = r.predict(&[0.0; 4], 0.95).unwrap();
        assert!((centre.value - 60.0).abs() < 2.0, "{}", centre.value);
        let best = r.best_settings(Goal::Maximise).unwrap();
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
        let r = Report::build(&p, 1, 0, &model);
        assert!(
            matches!(r.stopped, Some(ReportError::Term(_))),
            "{:?}",
            r.stopped
        );
        assert!(r.fit.is_err());
        assert!(r.chosen_fit().unwrap_err().contains("model term"));
    }

    #[test]
    fn empty_sheet_says_what_to_do() {
        let mut p = demo_project();
        p.runs.clear();
        let r = Report::build(&p, 1, 0, &ModelSettings::default());
        assert_eq!(r.stopped, Some(ReportError::NoRuns));
        assert_eq!(
            r.effects.as_ref().unwrap_err(),
            "there are no runs yet: choose a design first"
        );
    }
}
