//! The decision and the power figures as the summary prints them: filled from the engine's one
//! decision ([`crate::report::decide`]) and power figures ([`crate::planning`]), never computed
//! here.

use super::input::{BestSettings, DecisionFacts, DecisionResponse, ResponseSummary};
use crate::numbers::fmt_sig;
use crate::planning::project_power;
use crate::project::Project;
use crate::report::{DecideOptions, Report, decide};

/// The power of the project's design in words, when a process standard deviation was given.
pub(super) fn detectable_words(project: &Project) -> Option<String> {
    Some(match project_power(project)? {
        Ok(p) => {
            let mut s = format!(
                "an effect of {} is found with probability {} (σ = {}, two-sided test at α = {}, {} error df, {})",
                fmt_sig(p.detectable_effect, 3),
                fmt_sig(p.power, 2),
                fmt_sig(p.sigma, 4),
                fmt_sig(p.alpha, 3),
                p.error_df,
                if project.power.model_labels().is_empty() {
                    "main-effects model".to_string()
                } else {
                    format!("model {}", project.power.model_labels().join(", "))
                }
            );
            if let (Some(d), Some(r)) = (p.effect, p.replicates_needed) {
                s.push_str(&format!(
                    "; an effect of {} needs {r} replicate{}",
                    fmt_sig(d, 3),
                    if r == 1 { "" } else { "s" }
                ));
            }
            s
        }
        Err(e) => format!("not available: {e}"),
    })
}

/// The decision for every goal, when the project has goals and a choice was found; also puts
/// the shared settings into each response's "best settings" so every page shows the one choice.
pub(super) fn decision_facts(
    project: &Project,
    reports: &[&Report],
    sections: &mut [ResponseSummary],
) -> Option<DecisionFacts> {
    // A summary of some of the responses cannot weigh the goals of the others.
    if reports.len() < project.responses.len() {
        return None;
    }
    let d = decide(project, reports, &DecideOptions { keep: 1 });
    if !d.any_goal() {
        return None;
    }
    let mut goals = Vec::new();
    for (def, (g, s)) in project.responses.iter().zip(&d.goals) {
        goals.push((def.name.clone(), g.words(&def.unit)));
        if !s.is_ignored() {
            goals.push((format!("spread of {}", def.name), s.words(&def.unit)));
        }
    }
    let noise: Vec<String> = d
        .noise
        .iter()
        .filter_map(|(j, sd)| {
            project
                .factors
                .get(*j)
                .map(|f| format!("{} (σ {} coded)", f.name, fmt_sig(*sd, 3)))
        })
        .collect();
    let best = match &d.best {
        Ok(list) => list.first()?,
        Err(why) => {
            return Some(DecisionFacts {
                goals,
                noise,
                binding: vec![format!("No settings chosen: {why}.")],
                ..DecisionFacts::default()
            });
        }
    };
    let settings: Vec<(String, String)> = project
        .factors
        .iter()
        .zip(&best.natural)
        .map(|(f, s)| (f.name.clone(), s.words(&f.unit)))
        .collect();
    let responses: Vec<DecisionResponse> = best
        .responses
        .iter()
        .filter_map(|o| {
            let def = project.responses.get(o.response)?;
            Some(DecisionResponse {
                name: def.name.clone(),
                unit: def.unit.clone(),
                predicted: o.predicted,
                interval: o.interval,
                desirability: o.desirability,
                transmitted_sd: o.transmitted_sd,
            })
        })
        .collect();
    for section in sections.iter_mut() {
        let Some(r) = responses.iter().find(|r| r.name == section.response.name) else {
            continue;
        };
        section.best = Some(BestSettings {
            goal: format!(
                "every response's goal at once (overall desirability {})",
                fmt_sig(best.overall, 3)
            ),
            settings: settings.clone(),
            predicted: r.predicted,
            interval: r
                .interval
                .map(|(a, b)| (a, b, "95 % prediction interval".to_string())),
        });
    }
    let mut binding = best.binding.clone();
    binding.extend(d.notes.iter().cloned());
    Some(DecisionFacts {
        goals,
        noise,
        settings,
        overall: best.overall,
        responses,
        binding,
    })
}
