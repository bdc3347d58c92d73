//! Power of a two-level design to see an effect, and the smallest effect it sees.
//!
//! One effect of a two-level factorial is the difference of two means of N/2 runs each, so its
//! standard error is `2σ/√N` with N the two-level runs (centre points carry no effect). Its test
//! is a two-sided t test at level α on the error degrees of freedom of the model; under an effect
//! of size Δ the statistic follows the noncentral t distribution with noncentrality
//! `δ = Δ / (2σ/√N) = Δ√N / (2σ)`, so the power is `P(|T'_ν(δ)| > t_{1−α/2, ν})`
//! (Montgomery, *Design and Analysis of Experiments*, the sample-size discussion of the 2^k
//! chapter; the noncentral t from Johnson, Kotz & Balakrishnan, *Continuous Univariate
//! Distributions* vol. 2, ch. 31 — both from memory).
//!
//! The noncentral t distribution function is computed as the mixture
//! `P(T' ≤ t) = ∫₀^∞ Φ(t·s − δ) f_S(s) ds`, where `S = √(V/ν)` with `V ~ χ²_ν`, so that
//! `f_S(s) = 2 (ν/2)^{ν/2} s^{ν−1} e^{−ν s²/2} / Γ(ν/2)`, by composite Simpson's rule over the
//! range that holds the density. Checked against scipy's `stats.nct` in the acceptance tests.

use statrs::distribution::{ContinuousCDF, Normal};
use statrs::function::gamma::ln_gamma;

use crate::anova::t_quantile;

/// Intervals of Simpson's rule for the noncentral t integral (even).
const SIMPSON_STEPS: usize = 4000;

/// Why power cannot be computed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PowerError {
    /// No error degrees of freedom are left for the test.
    #[error("no degrees of freedom are left to test an effect: add runs or drop terms")]
    NoErrorDf,
    /// The process standard deviation is not a positive number.
    #[error("the process standard deviation must be a positive number")]
    BadSigma,
    /// α or the power is not strictly between 0 and 1.
    #[error("{0} must lie strictly between 0 and 1")]
    BadProbability(&'static str),
    /// No two-level runs.
    #[error("the design has no two-level runs")]
    NoRuns,
}

/// What the power of a design rests on.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PowerSpec {
    /// Process standard deviation σ, in the response's units.
    pub sigma: f64,
    /// Level of the two-sided test.
    pub alpha: f64,
    /// Two-level runs N (all replicates, no centre points).
    pub runs: usize,
    /// Error degrees of freedom of the test.
    pub error_df: usize,
}

impl PowerSpec {
    /// Checks the numbers.
    pub fn validate(&self) -> Result<(), PowerError> {
        if !(self.sigma.is_finite() && self.sigma > 0.0) {
            return Err(PowerError::BadSigma);
        }
        if !(self.alpha > 0.0 && self.alpha < 1.0) {
            return Err(PowerError::BadProbability("α"));
        }
        if self.runs == 0 {
            return Err(PowerError::NoRuns);
        }
        if self.error_df == 0 {
            return Err(PowerError::NoErrorDf);
        }
        Ok(())
    }

    /// Standard error of one effect, `2σ/√N`.
    pub fn effect_se(&self) -> f64 {
        2.0 * self.sigma / (self.runs as f64).sqrt()
    }

    /// Probability that the test finds an effect of size `effect` (either sign).
    pub fn power(&self, effect: f64) -> Result<f64, PowerError> {
        self.validate()?;
        let crit =
            t_quantile(1.0 - self.alpha / 2.0, self.error_df).ok_or(PowerError::NoErrorDf)?;
        let delta = effect.abs() / self.effect_se();
        Ok(two_sided_power(crit, self.error_df as f64, delta))
    }

    /// The smallest effect found with probability `power`.
    pub fn detectable_effect(&self, power: f64) -> Result<f64, PowerError> {
        self.validate()?;
        if !(power > 0.0 && power < 1.0) {
            return Err(PowerError::BadProbability("the power"));
        }
        let crit =
            t_quantile(1.0 - self.alpha / 2.0, self.error_df).ok_or(PowerError::NoErrorDf)?;
        let nu = self.error_df as f64;
        // Power rises with δ: bracket, then bisect.
        let (mut lo, mut hi) = (0.0, 1.0);
        while two_sided_power(crit, nu, hi) < power {
            lo = hi;
            hi *= 2.0;
            if hi > 1e6 {
                return Err(PowerError::NoErrorDf);
            }
        }
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if two_sided_power(crit, nu, mid) < power {
                lo = mid;
            } else {
                hi = mid;
            }
            if hi - lo <= 1e-12 * hi {
                break;
            }
        }
        Ok(hi * self.effect_se())
    }
}

/// Error degrees of freedom of the main-effects model of a design: `total runs − 1 − factors −
/// (blocks − 1)` (one for the mean, one per main effect, one per block beyond the first), zero
/// when nothing is left.
pub fn main_effects_error_df(total_runs: usize, factors: usize, blocks: usize) -> usize {
    total_runs.saturating_sub(1 + factors + blocks.saturating_sub(1))
}

/// Replicates of a design needed to find `effect` with probability `power`: the smallest count
/// `r ≥ 1` for which `spec(r)` (the design run `r` times) reaches it, up to `max` replicates.
/// `None` when even `max` replicates do not.
pub fn replicates_needed(
    effect: f64,
    power: f64,
    max: usize,
    spec: impl Fn(usize) -> PowerSpec,
) -> Result<Option<usize>, PowerError> {
    if !(power > 0.0 && power < 1.0) {
        return Err(PowerError::BadProbability("the power"));
    }
    for r in 1..=max {
        let s = spec(r);
        match s.power(effect) {
            Ok(p) if p >= power => return Ok(Some(r)),
            Ok(_) | Err(PowerError::NoErrorDf) => {}
            Err(e) => return Err(e),
        }
    }
    Ok(None)
}

/// `P(|T'| > crit)` for the noncentral t with `nu` degrees of freedom and noncentrality `delta`.
fn two_sided_power(crit: f64, nu: f64, delta: f64) -> f64 {
    let upper = 1.0 - noncentral_t_cdf(crit, nu, delta);
    let lower = noncentral_t_cdf(-crit, nu, delta);
    (upper + lower).clamp(0.0, 1.0)
}

/// `P(T' ≤ t)` for the noncentral t with `nu > 0` degrees of freedom and noncentrality `delta`
/// (see the module's documentation for the integral).
pub fn noncentral_t_cdf(t: f64, nu: f64, delta: f64) -> f64 {
    let Ok(normal) = Normal::new(0.0, 1.0) else {
        return f64::NAN;
    };
    // S = √(V/ν) has mean ≈ 1 and standard deviation ≈ 1/√(2ν); its density is negligible beyond
    // 14 of those on either side (its tail falls like e^{−νs²/2}).
    let sd = (1.0 / (2.0 * nu)).sqrt();
    let lo = (1.0 - 14.0 * sd).max(0.0);
    let hi = 1.0 + 14.0 * sd;
    let half = nu / 2.0;
    let log_norm = std::f64::consts::LN_2 + half * half.ln() - ln_gamma(half);
    let density = |s: f64| {
        if s <= 0.0 {
            // s^{ν−1} at 0: 1 for ν = 1, 0 above.
            return if nu == 1.0 { log_norm.exp() } else { 0.0 };
        }
        (log_norm + (nu - 1.0) * s.ln() - nu * s * s / 2.0).exp()
    };
    let f = |s: f64| normal.cdf(t * s - delta) * density(s);
    let n = SIMPSON_STEPS;
    let h = (hi - lo) / n as f64;
    let mut sum = f(lo) + f(hi);
    for i in 1..n {
        let x = lo + i as f64 * h;
        sum += if i % 2 == 1 { 4.0 * f(x) } else { 2.0 * f(x) };
    }
    (sum * h / 3.0).clamp(0.0, 1.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn with_no_effect_the_power_is_the_level() {
        // The test rejects a true null hypothesis with probability α (definition of the level).
        let s = PowerSpec {
            sigma: 1.0,
            alpha: 0.05,
            runs: 16,
            error_df: 11,
        };
        let p = s.power(0.0).unwrap();
        assert!((p - 0.05).abs() < 1e-7, "{p}");
    }

    #[test]
    fn the_central_case_is_students_t() {
        // δ = 0 reduces the noncentral t to Student's t: P(T ≤ 2.0) with 5 df = 0.949030 (t tables,
        // from memory; also statrs).
        let p = noncentral_t_cdf(2.0, 5.0, 0.0);
        assert!((p - 0.949_030).abs() < 1e-5, "{p}");
    }

    #[test]
    fn the_detectable_effect_has_the_asked_power_and_shrinks_with_runs() {
        let s = |runs| PowerSpec {
            sigma: 2.0,
            alpha: 0.05,
            runs,
            error_df: runs - 5,
        };
        let d16 = s(16).detectable_effect(0.8).unwrap();
        assert!((s(16).power(d16).unwrap() - 0.8).abs() < 1e-8);
        let d32 = s(32).detectable_effect(0.8).unwrap();
        assert!(d32 < d16);
        // Replicates: the 16-run design run twice finds what 32 runs find.
        let r = replicates_needed(d32, 0.8, 10, |r| s(16 * r)).unwrap();
        assert_eq!(r, Some(2));
    }

    #[test]
    fn bad_numbers_are_refused_in_words() {
        let s = PowerSpec {
            sigma: 0.0,
            alpha: 0.05,
            runs: 8,
            error_df: 3,
        };
        assert_eq!(s.power(1.0), Err(PowerError::BadSigma));
        let s = PowerSpec {
            sigma: 1.0,
            error_df: 0,
            ..s
        };
        assert_eq!(s.power(1.0), Err(PowerError::NoErrorDf));
    }
}
