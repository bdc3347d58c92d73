//! `twofold plan --sigma S [--alpha A] [--power P] [--effect D]`: what the planned design can
//! see, from `twofold_core::power`.

use serde_json::{Value, json};
use twofold_core::plan::Plan;
use twofold_study::planning::{DesignPower, MAX_REPLICATES, RunCounts, design_power};
use twofold_study::project::PowerSettings;

use super::plan::PlanArgs;

/// The power figures of a plan (the engine's, shared with the window and the summary page).
pub(crate) struct PlanPower(DesignPower, Option<usize>);

/// A number typed for an option, checked to lie in `(lo, hi)` (open).
fn number(name: &str, text: &str, lo: f64, hi: f64) -> Result<f64, String> {
    match text.trim().parse::<f64>() {
        Ok(x) if x.is_finite() && x > lo && x < hi => Ok(x),
        _ if hi.is_infinite() => Err(format!("{name} must be a number above {lo}, not {text:?}")),
        _ => Err(format!(
            "{name} must be a number between {lo} and {hi}, not {text:?}"
        )),
    }
}

/// The power of `plan` when `--sigma` was given; an error in words for bad numbers or for
/// `--alpha`, `--power` or `--effect` without `--sigma`.
pub(crate) fn plan_power(
    a: &PlanArgs,
    plan: &Plan,
    factors: usize,
    replicates: usize,
) -> Result<Option<PlanPower>, String> {
    let Some(sigma) = a.sigma.as_deref() else {
        if a.alpha.is_some() || a.power.is_some() || a.effect.is_some() || a.model_terms.is_some() {
            return Err(
                "--alpha, --power, --effect and --model-terms need --sigma (the process standard deviation)"
                    .into(),
            );
        }
        return Ok(None);
    };
    let sigma = number("--sigma", sigma, 0.0, f64::INFINITY)?;
    let alpha = a
        .alpha
        .as_deref()
        .map_or(Ok(0.05), |t| number("--alpha", t, 0.0, 1.0))?;
    let power = a
        .power
        .as_deref()
        .map_or(Ok(0.8), |t| number("--power", t, 0.0, 1.0))?;
    let effect = a
        .effect
        .as_deref()
        .map(|t| number("--effect", t, 0.0, f64::INFINITY))
        .transpose()?;
    let two_level = plan.runs.iter().filter(|r| !r.centre).count();
    let replicates = replicates.max(1);
    let blocks = (plan.block_count.max(1) as usize
        / if a.replicates_as_blocks {
            replicates
        } else {
            1
        })
    .max(1);
    let counts = RunCounts {
        per_replicate: two_level / replicates,
        replicates,
        centre: plan.total_runs() - two_level,
        blocks_per_replicate: blocks,
        replicates_as_blocks: a.replicates_as_blocks,
        terms: model_term_count(a.model_terms.as_deref(), factors)?,
    };
    let settings = PowerSettings {
        sigma: Some(sigma),
        alpha,
        power,
        effect,
        model_terms: String::new(),
    };
    match design_power(&counts, &settings) {
        Some(Ok(p)) => Ok(Some(PlanPower(
            p,
            a.model_terms.is_some().then_some(counts.terms),
        ))),
        Some(Err(e)) => Err(e),
        None => Ok(None),
    }
}

/// How many terms the named model has (each checked against the factors), or the main effects.
fn model_term_count(list: Option<&str>, factors: usize) -> Result<usize, String> {
    let Some(list) = list else {
        return Ok(factors);
    };
    let mut terms = Vec::new();
    for label in list.split(',').map(str::trim) {
        let t = twofold_core::term::Term::parse(label, factors)
            .map_err(|e| format!("--model-terms: {e}"))?;
        if !terms.contains(&t) {
            terms.push(t);
        }
    }
    Ok(terms.len())
}

/// The `power` object of `plan --json` (also for screening designs).
pub(crate) fn power_json(p: &DesignPower) -> Value {
    json!({
        "sigma": p.sigma,
        "alpha": p.alpha,
        "power": p.power,
        "error_df": p.error_df,
        "detectable_effect": p.detectable_effect,
        "replicates_needed": p.replicates_needed,
    })
}

impl PlanPower {
    /// The `power` object of `plan --json`.
    pub(crate) fn json(&self) -> Value {
        power_json(&self.0)
    }

    /// Lines of the text output.
    pub(crate) fn text(&self) -> String {
        use twofold_study::numbers::{fmt_sig, plain};
        let p = &self.0;
        let mut s = format!(
            "Power ({}, {} error df, two-sided t test at α = {}, σ = {}): \
             the smallest effect found with probability {} is {}.",
            match self.1 {
                Some(n) => format!("model of {n} terms"),
                None => "main-effects model".to_string(),
            },
            p.error_df,
            plain(p.alpha, 3),
            plain(p.sigma, 4),
            plain(p.power, 3),
            fmt_sig(p.detectable_effect, 4)
        );
        if let Some(d) = p.effect {
            s.push_str(&match p.replicates_needed {
                Some(r) => format!(
                    "\nAn effect of {} is found with that probability with {r} replicate{} of this design.",
                    fmt_sig(d, 4),
                    if r == 1 { "" } else { "s" }
                ),
                None => format!(
                    "\nAn effect of {} is not found with that probability even with {MAX_REPLICATES} replicates.",
                    fmt_sig(d, 4)
                ),
            });
        }
        s
    }
}
