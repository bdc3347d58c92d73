//! One response's section of the summary, from that response's [`Report`].
//!
//! The numbers come from the report, the same value the analysis panes draw and
//! `twofold analyze` writes, so the page and the window cannot disagree: this module only
//! selects, orders and labels. With no terms chosen the page shows the report's default model
//! choice and says how it was made and which error the tests use. The best settings are
//! computed by the core's `best_settings` exactly as the prediction pane does. A study with
//! axial runs adds the report's quadratic-model lines after the warnings
//! ([`crate::report::QuadraticReport::page_lines`]), as a split-plot study adds its strata.

use twofold_core::anova::Source;
use twofold_core::predict::Goal;
use twofold_core::term::Term;

use super::build::{setting_text, transform_name};
use super::input::{
    AnovaRow, AnovaTable, BestSettings, EffectRow, Equation, HalfNormalPoint, InteractionPanel,
    LenthFacts, ResponseFacts, ResponseSummary,
};
use crate::numbers;
use crate::project::{FactorKind, Project, ResponseTransform};
use crate::report::Report;

/// The section of response `results.response` of `project`, with best settings for `goal`.
pub fn response_summary(project: &Project, results: &Report, goal: Goal) -> ResponseSummary {
    let response = project.responses.get(results.response);
    let transform = response.map_or(ResponseTransform::None, |r| r.model.transform);
    let name = response.map_or("y", |r| r.name.as_str());
    let mut warnings = Vec::new();

    let (effects, half_normal) = effects_of(results);
    let strata_half_normal = strata_half_normal(results, &half_normal);
    let lenth = results.lenth.as_ref().ok().map(|l| LenthFacts {
        pse: l.pse,
        me: l.me,
        sme: l.sme,
        alpha: 0.05,
        df: l.df,
    });
    let (interactions, interaction_note) = interaction_panels(project, results);

    let fit = results.fit.as_ref().ok();
    let anova = fit.map(|fit| AnovaTable {
        rows: results
            .anova_rows()
            .iter()
            .map(|r| AnovaRow {
                source: r.source.to_string(),
                df: u32::try_from(r.df).unwrap_or(u32::MAX),
                ss: r.ss,
                ms: r.ms,
                f: r.f,
                p: r.p,
                emphasis: matches!(r.source, Source::Model | Source::Residual | Source::Total),
            })
            .collect(),
        r_squared: fit.r2,
        adj_r_squared: fit.adj_r2,
        pred_r_squared: fit.pred_r2,
        std_dev: fit.sigma,
        tests_note: tests_note(results),
    });
    if let Some(fit) = fit
        && !fit.added_for_hierarchy.is_empty()
    {
        let added: Vec<String> = fit.added_for_hierarchy.iter().map(|t| t.label()).collect();
        warnings.push(format!(
            "Added to keep the model hierarchical: {}.",
            added.join(", ")
        ));
    }

    // The equation in natural units; where there is none (a factor with two labels), the one in
    // coded units, saying why.
    let names: Vec<&str> = project.factors.iter().map(|f| f.name.as_str()).collect();
    let written = |eq: &twofold_core::anova::Equation| {
        eq.format_with_names(&names)
            .replacen('y', &transform.label(name), 1)
    };
    let equation = match (&results.equation_natural, &results.equation_coded) {
        (Ok(eq), _) => Some(Equation {
            text: written(eq),
            note: String::new(),
            coded: false,
        }),
        (Err(why), Some(eq)) if fit.is_some() => Some(Equation {
            text: written(eq),
            note: format!(
                "Each factor enters coded, from −1 (low; the first label) to +1 (high; the second): {why}."
            ),
            coded: true,
        }),
        _ => None,
    };

    let best = fit.and_then(|_| best_settings(project, results, goal, name, &mut warnings));

    // The report's own warnings first, then those found here, in the order the window shows.
    let mut all: Vec<String> = results.warnings.iter().map(|w| w.text.clone()).collect();
    if let (Some(strata), Ok(table)) = (&results.strata, &results.effects) {
        all.extend(strata.sentences(table));
        all.push(
            "The effect ranking's Lenth marks pool both strata: judge whole-plot and subplot effects by their own margins above and by each stratum's half-normal plot.".to_string(),
        );
    }
    if let Some(q) = &results.quadratic {
        all.extend(q.page_lines());
    }
    for w in warnings {
        if !all.contains(&w) {
            all.push(w);
        }
    }
    ResponseSummary {
        response: ResponseFacts {
            name: name.to_string(),
            unit: response.map(|r| r.unit.clone()).unwrap_or_default(),
            transform: transform_name(transform),
            runs_used: results.used_runs,
            runs_total: results.total_runs,
        },
        effects,
        lenth,
        half_normal,
        strata_half_normal,
        interactions,
        interaction_note,
        anova,
        equation,
        best,
        warnings: all,
    }
}

/// Effects largest first, each with its short aliases, and the half-normal points; a term counts
/// as in the model when any member of its chain is.
fn effects_of(results: &Report) -> (Vec<EffectRow>, Vec<HalfNormalPoint>) {
    let mut effects = Vec::new();
    let mut half = Vec::new();
    let Ok(table) = &results.effects else {
        return (effects, half);
    };
    let in_model = |term: Term| {
        results.in_model(term) || results.fit.as_ref().is_ok_and(|f| f.terms.contains(&term))
    };
    for e in &table.effects {
        let chain_in_model = std::iter::once(e.term)
            .chain(e.aliases.iter().map(|a| a.term))
            .any(in_model);
        effects.push(EffectRow {
            term: e.term.label(),
            aliases: e
                .aliases
                .iter()
                .filter(|a| a.term.order() <= 2)
                .map(ToString::to_string)
                .collect(),
            effect: e.effect,
            in_model: chain_in_model,
        });
    }
    effects.sort_by(|a, b| b.effect.abs().total_cmp(&a.effect.abs()));
    for p in &results.half_normal {
        let chain = table.get(p.term);
        let model = chain.is_some_and(|e| {
            std::iter::once(e.term)
                .chain(e.aliases.iter().map(|a| a.term))
                .any(in_model)
        });
        half.push(HalfNormalPoint {
            term: p.term.label(),
            abs_effect: p.abs_effect,
            positive: chain.is_none_or(|e| e.effect >= 0.0),
            quantile: p.quantile,
            in_model: model,
        });
    }
    (effects, half)
}

/// The half-normal plot of each stratum of a split-plot study: the report's own points of that
/// stratum (their positions from its effects alone) with the page's marking of model terms
/// taken from the pooled points, and the stratum's Lenth facts.
fn strata_half_normal(
    results: &Report,
    pooled: &[HalfNormalPoint],
) -> Vec<(String, Vec<HalfNormalPoint>, Option<LenthFacts>)> {
    use twofold_core::splitplot::Stratum;
    let Some(strata) = &results.strata else {
        return Vec::new();
    };
    strata
        .half_normal
        .iter()
        .filter(|(_, pts)| !pts.is_empty())
        .map(|(s, pts)| {
            let title = match s {
                Stratum::WholePlot => "Whole-plot effects",
                Stratum::Subplot => "Subplot effects",
            };
            let points = pts
                .iter()
                .map(|p| {
                    let label = p.term.label();
                    let in_model = pooled.iter().any(|q| q.term == label && q.in_model);
                    HalfNormalPoint {
                        term: label,
                        abs_effect: p.abs_effect,
                        positive: p.effect >= 0.0,
                        quantile: p.quantile,
                        in_model,
                    }
                })
                .collect();
            let lenth = strata
                .lenth
                .iter()
                .find(|(x, _)| x == s)
                .and_then(|(_, l)| l.as_ref().ok())
                .map(|l| LenthFacts {
                    pse: l.pse,
                    me: l.me,
                    sme: l.sme,
                    alpha: 0.05,
                    df: l.df,
                });
            (title.to_string(), points, lenth)
        })
        .collect()
}

/// The best settings for `goal`, with the warnings they raise.
fn best_settings(
    project: &Project,
    results: &Report,
    goal: Goal,
    name: &str,
    warnings: &mut Vec<String>,
) -> Option<BestSettings> {
    let o = results.best_settings(goal).ok()?;
    let settings = o
        .settings
        .iter()
        .enumerate()
        .filter_map(|(i, s)| {
            let f = project.factors.get(i)?;
            let text = match (s, &f.kind) {
                (None, _) => "does not matter".to_string(),
                (Some(c), FactorKind::Numeric { low, high }) => {
                    let v = 0.5 * (low + high) + c * 0.5 * (high - low);
                    if let Some((lo, hi)) = f.safe_range
                        && (v < lo || v > hi)
                    {
                        warnings.push(format!(
                            "{} at {} is outside its safe range {} to {}.",
                            f.name,
                            numbers::fmt_num(v, 5),
                            numbers::fmt_num(lo, 5),
                            numbers::fmt_num(hi, 5)
                        ));
                    }
                    if f.unit.is_empty() {
                        numbers::fmt_num(v, 5)
                    } else {
                        format!("{} {}", numbers::fmt_num(v, 5), f.unit)
                    }
                }
                (Some(c), FactorKind::Categorical { .. }) => {
                    setting_text(f, if *c < 0.0 { -1 } else { 1 })
                }
            };
            Some((f.name.clone(), text))
        })
        .collect();
    if o.equally_good > 1 {
        warnings.push(format!(
            "{} settings are equally good for the best setting of {name}; the page shows one of them.",
            o.equally_good
        ));
    }
    if o.target_reached == Some(false) {
        warnings.push(format!(
            "The target for {name} cannot be reached inside the tested levels; the best settings are the closest."
        ));
    }
    if o.curvature_warning {
        warnings.push("The centre points show curvature: the true best setting may lie inside the box, which this model cannot see.".to_string());
    }
    let back = o.prediction.back_transformed(&results.transform);
    let goal = match goal {
        Goal::Maximise => format!("maximise {name}"),
        Goal::Minimise => format!("minimise {name}"),
        Goal::Target(t) => format!("{name} as close as possible to {}", numbers::fmt_num(t, 6)),
    };
    Some(BestSettings {
        goal,
        settings,
        predicted: o.value,
        interval: back.prediction_interval.map(|(a, b)| {
            (
                a,
                b,
                format!(
                    "{} % prediction interval for one run",
                    numbers::fmt_num(100.0 * o.prediction.confidence, 3)
                ),
            )
        }),
    })
}

/// One sentence under the ANOVA: how the terms were chosen and which error the tests use.
fn tests_note(results: &Report) -> String {
    let how = match &results.choice {
        Ok(c) if !results.terms_given() => {
            let list: Vec<String> = c.terms.iter().map(|t| t.label()).collect();
            format!(
                "No terms chosen in the project: the model shown is {} ({}). ",
                if list.is_empty() {
                    "the mean only".to_string()
                } else {
                    list.join(" + ")
                },
                c.selection.words()
            )
        }
        _ => String::new(),
    };
    format!("{how}{}", results.error_basis.sentence())
}

/// Pairs plotted when no interaction is in the model: the strongest, as a hint of where to look.
const STRONGEST_PAIRS: usize = 4;

/// The interactions to plot: those in the fitted model, else the strongest pairs; strongest
/// first.
fn interaction_panels(project: &Project, results: &Report) -> (Vec<InteractionPanel>, String) {
    let strength = |t: Term| {
        results
            .effects
            .as_ref()
            .ok()
            .and_then(|table| table.effect_of(t))
            .map_or(0.0, f64::abs)
    };
    let in_model: Vec<Term> = results
        .fit
        .as_ref()
        .map(|f| f.terms.iter().copied().filter(|t| t.order() == 2).collect())
        .unwrap_or_default();
    let from_model = !in_model.is_empty();
    let mut panels: Vec<(f64, InteractionPanel)> = results
        .pairs
        .iter()
        .filter_map(|pm| {
            let (a, b) = pm.factors;
            let term = Term::main(a).times(Term::main(b));
            if from_model && !in_model.contains(&term) {
                return None;
            }
            let fa = project.factors.get(a)?;
            let fb = project.factors.get(b)?;
            Some((
                strength(term),
                InteractionPanel {
                    term: term.label(),
                    x_factor: fa.name.clone(),
                    x_levels: [setting_text(fa, -1), setting_text(fa, 1)],
                    trace_factor: fb.name.clone(),
                    trace_levels: [setting_text(fb, -1), setting_text(fb, 1)],
                    means: pm.means,
                },
            ))
        })
        .collect();
    // Strongest first; ties keep the order of the trade.
    panels.sort_by(|x, y| y.0.total_cmp(&x.0));
    let note = if from_model {
        "Two-factor interactions in the model, observed cell means.".to_string()
    } else if panels.is_empty() {
        String::new()
    } else {
        let pairs = panels.len();
        panels.truncate(STRONGEST_PAIRS);
        if pairs > panels.len() {
            format!(
                "No interaction is in the model; the {} strongest of the {pairs} pairs, observed cell means.",
                panels.len()
            )
        } else {
            "No interaction is in the model; every pair, observed cell means.".to_string()
        }
    };
    (panels.into_iter().map(|(_, p)| p).collect(), note)
}
