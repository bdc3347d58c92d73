//! The decision as JSON and as text (the output of `twofold best`).

use serde_json::{Map as JsonMap, Value, json};
use twofold_core::term::factor_letter;

use super::decision::{Decision, Setting};
use crate::numbers::fmt_num;
use crate::project::Project;

fn letter(i: usize) -> String {
    factor_letter(i).map_or_else(|| format!("X{}", i + 1), String::from)
}

/// The decision as one JSON object, or why there is no choice.
///
/// Keys: `best` (best first; each with `settings` {LETTER: coded}, `natural` {LETTER: value, label
/// or null for a noise factor}, `desirability` (D), `responses` {NAME: `predicted`,
/// `interval` [low, high] of one new run at 95 % or null, `desirability` (null without a goal),
/// `transmitted_sd` (null without noise factors), `spread_desirability`, `noise_slopes`
/// {LETTER: slope per coded unit on the analysis scale}}, `binding` [words]), `noise`
/// {LETTER: σ in coded units}, `goals` {NAME: words, NAME.sd: words} and `notes`.
pub fn decision_json(project: &Project, d: &Decision) -> Result<Value, String> {
    let best = d.best.as_ref().map_err(Clone::clone)?;
    let list: Vec<Value> = best
        .iter()
        .map(|c| {
            let mut settings = JsonMap::new();
            let mut natural = JsonMap::new();
            for (i, (x, s)) in c.coded.iter().zip(&c.natural).enumerate() {
                settings.insert(letter(i), json!(x));
                natural.insert(
                    letter(i),
                    match s {
                        Setting::Number(v) => json!(v),
                        Setting::Label(l) => json!(l),
                        Setting::Noise => Value::Null,
                    },
                );
            }
            let mut responses = JsonMap::new();
            for o in &c.responses {
                let name = project
                    .responses
                    .get(o.response)
                    .map_or_else(String::new, |r| r.name.clone());
                let mut slopes = JsonMap::new();
                for ((j, _), s) in d.noise.iter().zip(&o.noise_slopes) {
                    slopes.insert(letter(*j), json!(s));
                }
                responses.insert(
                    name,
                    json!({
                        "predicted": o.predicted,
                        "interval": o.interval.map(|(a, b)| vec![a, b]),
                        "desirability": o.desirability,
                        "transmitted_sd": o.transmitted_sd,
                        "spread_desirability": o.spread_desirability,
                        "noise_slopes": slopes,
                    }),
                );
            }
            json!({
                "settings": settings,
                "natural": natural,
                "desirability": c.overall,
                "responses": responses,
                "binding": c.binding,
            })
        })
        .collect();
    let mut noise = JsonMap::new();
    for (j, sd) in &d.noise {
        noise.insert(letter(*j), json!(sd));
    }
    let mut goals = JsonMap::new();
    for (def, (g, s)) in project.responses.iter().zip(&d.goals) {
        if !g.is_ignored() {
            goals.insert(def.name.clone(), json!(g.words(&def.unit)));
        }
        if !s.is_ignored() {
            goals.insert(format!("{}.sd", def.name), json!(s.words(&def.unit)));
        }
    }
    Ok(json!({
        "best": list,
        "noise": noise,
        "goals": goals,
        "notes": d.notes,
    }))
}

/// The decision as text for the terminal, or why there is no choice.
pub fn decision_text(project: &Project, d: &Decision) -> Result<String, String> {
    let best = d.best.as_ref().map_err(Clone::clone)?;
    let mut out = String::from("Which settings to run\n\nGoals\n");
    for (def, (g, s)) in project.responses.iter().zip(&d.goals) {
        out.push_str(&format!("  {}: {}\n", def.name, g.words(&def.unit)));
        if !s.is_ignored() {
            out.push_str(&format!(
                "  spread of {}: {}\n",
                def.name,
                s.words(&def.unit)
            ));
        }
    }
    if !d.noise.is_empty() {
        let list: Vec<String> = d
            .noise
            .iter()
            .map(|(j, sd)| {
                let name = project.factors.get(*j).map_or("", |f| f.name.as_str());
                format!("{} {name} (σ {} coded)", letter(*j), fmt_num(*sd, 3))
            })
            .collect();
        out.push_str(&format!("Noise factors: {}\n", list.join(", ")));
    }
    for (rank, c) in best.iter().enumerate() {
        out.push_str(&format!(
            "\n{}. overall desirability D = {}\n",
            rank + 1,
            fmt_num(c.overall, 3)
        ));
        for (i, (f, s)) in project.factors.iter().zip(&c.natural).enumerate() {
            out.push_str(&format!(
                "  {} {}: {}\n",
                letter(i),
                f.name,
                s.words(&f.unit)
            ));
        }
        for o in &c.responses {
            let Some(def) = project.responses.get(o.response) else {
                continue;
            };
            let value = o
                .predicted
                .map_or_else(|| "-".to_string(), |v| fmt_num(v, 4));
            let interval = o.interval.map_or_else(String::new, |(a, b)| {
                format!(" (one run: {} to {})", fmt_num(a, 4), fmt_num(b, 4))
            });
            let desir = o
                .desirability
                .map_or_else(String::new, |v| format!(", d = {}", fmt_num(v, 3)));
            let spread = o.transmitted_sd.map_or_else(String::new, |v| {
                format!(", spread from noise {}", fmt_num(v, 3))
            });
            out.push_str(&format!(
                "  {}: {value} {}{interval}{desir}{spread}\n",
                def.name, def.unit
            ));
        }
        for w in &c.binding {
            out.push_str(&format!("  {w}\n"));
        }
    }
    for n in &d.notes {
        out.push_str(&format!("\nNote: {n}\n"));
    }
    Ok(out)
}
