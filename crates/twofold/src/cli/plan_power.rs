//! `twofold plan --sigma S [--alpha A] [--power P] [--effect D]`: what the planned design can
//! see, from `twofold_core::power`.

use serde_json::{Value, json};
use twofold_core::plan::Plan;
use twofold_core::power::{PowerSpec, main_effects_error_df, replicates_needed};

use super::plan::PlanArgs;

/// Most replicates tried when looking for the count that finds `--effect`.
const MAX_REPLICATES: usize = 64;

/// The power figures of a plan.
pub(crate) struct PlanPower {
    sigma: f64,
    alpha: f64,
    power: f64,
    error_df: usize,
    detectable_effect: f64,
    effect: Option<f64>,
    replicates_needed: Option<usize>,
}

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
        if a.alpha.is_some() || a.power.is_some() || a.effect.is_some() {
            return Err(
                "--alpha, --power and --effect need --sigma (the process standard deviation)"
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
    let total = plan.total_runs();
    let two_level = plan.runs.iter().filter(|r| !r.centre).count();
    let centre = total - two_level;
    let blocks = plan.block_count.max(1) as usize;
    let per_replicate = two_level / replicates.max(1);
    let blocks_per_replicate = (blocks / replicates.max(1)).max(1);
    // The design run `r` times: centre points as planned; blocks grow with the replicates when
    // each replicate is a block of its own.
    let spec = |r: usize| {
        let runs = per_replicate * r;
        let blocks = if a.replicates_as_blocks {
            blocks_per_replicate * r
        } else {
            blocks
        };
        PowerSpec {
            sigma,
            alpha,
            runs,
            error_df: main_effects_error_df(runs + centre, factors, blocks),
        }
    };
    let now = PowerSpec {
        sigma,
        alpha,
        runs: two_level,
        error_df: main_effects_error_df(total, factors, blocks),
    };
    let detectable_effect = now.detectable_effect(power).map_err(|e| e.to_string())?;
    let replicates_needed = match effect {
        Some(d) => replicates_needed(d, power, MAX_REPLICATES, spec).map_err(|e| e.to_string())?,
        None => None,
    };
    Ok(Some(PlanPower {
        sigma,
        alpha,
        power,
        error_df: now.error_df,
        detectable_effect,
        effect,
        replicates_needed,
    }))
}

impl PlanPower {
    /// The `power` object of `plan --json`.
    pub(crate) fn json(&self) -> Value {
        json!({
            "sigma": self.sigma,
            "alpha": self.alpha,
            "power": self.power,
            "error_df": self.error_df,
            "detectable_effect": self.detectable_effect,
            "replicates_needed": self.replicates_needed,
        })
    }

    /// Lines of the text output.
    pub(crate) fn text(&self) -> String {
        use twofold_study::numbers::{fmt_sig, plain};
        let mut s = format!(
            "Power (main-effects model, {} error df, two-sided t test at α = {}, σ = {}): \
             the smallest effect found with probability {} is {}.",
            self.error_df,
            plain(self.alpha, 3),
            plain(self.sigma, 4),
            plain(self.power, 3),
            fmt_sig(self.detectable_effect, 4)
        );
        if let Some(d) = self.effect {
            s.push_str(&match self.replicates_needed {
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
