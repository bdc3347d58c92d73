//! `twofold plan ... --hard-to-change "Temp,Time"`: the runs grouped into whole plots in which
//! those factors stay fixed (`twofold_core::splitplot`), the resets saved, and the stratum of
//! every main effect and two-factor interaction.

use serde_json::{Value, json};
use twofold_core::plan::Plan;
use twofold_core::splitplot::{Stratum, stratum_of, whole_plot_layout};
use twofold_core::term::{LETTERS, factor_index};

/// The split-plot layout of a plan.
pub(crate) struct SplitPlot {
    /// The hard-to-change factors (0-based).
    pub factors: Vec<usize>,
    /// Whole plot (1-based) of each run of `Plan::runs`, in the plan's (new) run order.
    pub whole_plot: Vec<usize>,
    /// Whole plots: the resets of the hard-to-change factors.
    pub resets: usize,
    /// Expected resets when the same runs are completely randomised.
    pub resets_randomised: f64,
    /// Main effects and two-factor interactions of each stratum.
    pub whole_plot_terms: Vec<String>,
    /// The others.
    pub subplot_terms: Vec<String>,
    /// When the fraction was chosen for the split-plot structure: its whole plots per replicate
    /// and whether the search proved it of minimum aberration among such fractions.
    pub fraction: Option<(usize, bool)>,
}

/// How the fraction of a split-plot plan is chosen, in words (JSON and text).
pub(crate) const SPLIT_PLOT_CRITERION: &str = "least aberration among fractions that keep the hard-to-change factors fixed in each whole plot and change every other factor inside it (Huang, Chen & Voelkel 1998; Bingham & Sitter 1999)";

/// The factors named in `list` (letters or names).
pub(crate) fn parse_factors(list: &str, names: &[String]) -> Result<Vec<usize>, String> {
    let mut out = Vec::new();
    for part in list.split(',').map(str::trim) {
        let mut chars = part.chars();
        let by_letter = match (chars.next(), chars.next()) {
            (Some(c), None) => factor_index(c.to_ascii_uppercase()).filter(|&i| i < names.len()),
            _ => None,
        };
        let i = by_letter
            .or_else(|| names.iter().position(|n| n.eq_ignore_ascii_case(part)))
            .ok_or_else(|| {
                format!("--hard-to-change: unknown factor `{part}` (give letters or names)")
            })?;
        if !out.contains(&i) {
            out.push(i);
        }
    }
    if out.len() >= names.len() {
        return Err("--hard-to-change: at least one factor must be easy to change".into());
    }
    out.sort_unstable();
    Ok(out)
}

/// Reorders `plan` into whole plots (randomised whole plots, runs randomised inside each) and
/// says what the strata are.
pub(crate) fn split(plan: &mut Plan, htc: &[usize], seed: u64, randomise: bool) -> SplitPlot {
    let k = plan.design.factor_count();
    let mut runs = plan.runs.clone();
    runs.sort_by_key(|r| r.std_order);
    let rows: Vec<Vec<i8>> = runs.iter().map(|r| r.levels.clone()).collect();
    let replicate: Vec<u32> = runs.iter().map(|r| r.replicate).collect();
    let layout = whole_plot_layout(&rows, &replicate, htc, seed, randomise);
    let wp: Vec<usize> = layout.whole_plot.clone();
    let mut reordered = Vec::with_capacity(runs.len());
    let mut whole_plot = Vec::with_capacity(runs.len());
    for (position, &i) in layout.order.iter().enumerate() {
        let mut r = runs[i].clone();
        r.run_order = position + 1;
        reordered.push(r);
        whole_plot.push(wp[i]);
    }
    plan.runs = reordered;
    let mut whole_plot_terms = Vec::new();
    let mut subplot_terms = Vec::new();
    for t in twofold_core::term::main_effects_and_two_factor_interactions(k) {
        let list = match stratum_of(t, &rows, &wp) {
            Stratum::WholePlot => &mut whole_plot_terms,
            Stratum::Subplot => &mut subplot_terms,
        };
        list.push(t.label());
    }
    SplitPlot {
        factors: htc.to_vec(),
        whole_plot,
        resets: layout.resets,
        resets_randomised: layout.resets_if_randomised,
        whole_plot_terms,
        subplot_terms,
        fraction: None,
    }
}

impl SplitPlot {
    /// The keys added to `plan --json`; each run gains `whole_plot`.
    pub(crate) fn add_to(&self, value: &mut Value) {
        if let Some(runs) = value.get_mut("runs").and_then(Value::as_array_mut) {
            for (r, w) in runs.iter_mut().zip(&self.whole_plot) {
                if let Some(o) = r.as_object_mut() {
                    o.insert("whole_plot".into(), json!(w));
                }
            }
        }
        if let Some(o) = value.as_object_mut() {
            o.insert(
                "hard_to_change".into(),
                json!(
                    self.factors
                        .iter()
                        .map(|&f| LETTERS[f].to_string())
                        .collect::<Vec<_>>()
                ),
            );
            o.insert(
                "strata".into(),
                json!({ "whole_plot": self.whole_plot_terms, "subplot": self.subplot_terms }),
            );
            o.insert("resets".into(), json!(self.resets));
            o.insert("resets_if_randomised".into(), json!(self.resets_randomised));
            if let Some((w, proven)) = self.fraction {
                o.insert(
                    "split_plot_fraction".into(),
                    json!({ "whole_plots_per_replicate": w, "criterion": SPLIT_PLOT_CRITERION, "proven": proven }),
                );
            }
        }
    }

    /// Lines of the text output.
    pub(crate) fn text(&self) -> String {
        let letters: Vec<String> = self
            .factors
            .iter()
            .map(|&f| LETTERS[f].to_string())
            .collect();
        let few = if self.whole_plot_terms.len() + 1 >= self.resets {
            "\nOnly as many whole plots as the whole-plot effects need: without replicated whole plots those effects cannot be judged against an error of their own."
        } else {
            ""
        };
        let chosen = match self.fraction {
            Some((w, proven)) => format!(
                "\nFraction: {SPLIT_PLOT_CRITERION}, with {w} whole plots per replicate{}.",
                if proven {
                    ""
                } else {
                    " (best found in the time allowed, not proven)"
                }
            ),
            None => String::new(),
        };
        format!(
            "Hard to change: {} — {} whole plots, so {} resets instead of about {:.1} in a completely random order.\nWhole-plot effects (judged against the whole-plot error): {}\nSubplot effects: {}{few}{chosen}",
            letters.join(", "),
            self.resets,
            self.resets,
            self.resets_randomised,
            self.whole_plot_terms.join(", "),
            self.subplot_terms.join(", ")
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn factors_by_letter_or_name() {
        let names: Vec<String> = ["Temp", "Time", "Speed"].map(String::from).to_vec();
        assert_eq!(parse_factors("Temp,c", &names), Ok(vec![0, 2]));
        assert!(parse_factors("A,B,C", &names).is_err());
        assert!(parse_factors("Z", &names).is_err());
    }
}
