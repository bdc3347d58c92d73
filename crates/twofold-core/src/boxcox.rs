//! Box–Cox profile likelihood for a positive response: which power transform makes the chosen
//! model fit best.
//!
//! # Formula
//! Box & Cox (1964, JRSS B 26, 211–252, section 3) scale the power transform by the geometric
//! mean `ẏ` of the response so that residual sums of squares are comparable across λ:
//!
//! ```text
//! z(λ) = (y^λ − 1) / (λ ẏ^(λ−1))   for λ ≠ 0
//! z(0) = ẏ ln y
//! L(λ) = −(n/2) ln(SS_res(λ)/n)
//! ```
//!
//! where `SS_res(λ)` is the residual sum of squares of the model fitted to `z(λ)` (the same
//! model, blocks and curvature column as the main fit). The maximising `λ̂` is found on a grid of
//! step 0.05 over [−2, 2] and refined by golden-section search; the approximate 95 % interval is
//! `{λ : L(λ) ≥ L(λ̂) − χ²₁(0.95)/2}` (same source, section 3, large-sample likelihood ratio).
//! `y^λ − 1` is computed as `expm1(λ ln y)` so that λ near 0 loses no precision.

use crate::anova::{FitError, ModelSpec, fit_model};
use crate::data::Observations;
use crate::transform::Transform;
use rayon::prelude::*;
use statrs::distribution::{ContinuousCDF, Normal};

/// Range of λ searched (common practice, no source).
pub const LAMBDA_RANGE: (f64, f64) = (-2.0, 2.0);
/// Grid step for the profile (for plotting and for bracketing the maximum and the interval's
/// ends, which are then refined; common practice, no source: the profile of a smooth likelihood
/// is drawn well by 81 points, and each point costs a pass over every run).
pub const GRID_STEP: f64 = 0.05;
/// The standard powers a suggestion picks from, with the transform each names.
pub const STANDARD_POWERS: [(f64, Transform); 5] = [
    (-1.0, Transform::Inverse),
    (-0.5, Transform::Power(-0.5)),
    (0.0, Transform::Ln),
    (0.5, Transform::Sqrt),
    (1.0, Transform::None),
];

/// Why the Box–Cox profile cannot be computed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum BoxCoxError {
    /// Box–Cox needs every used response positive.
    #[error("box-cox needs positive responses; not so at run(s) {}", list(.runs))]
    NotPositive {
        /// 1-based run numbers with a value ≤ 0.
        runs: Vec<usize>,
    },
    /// The model leaves no residual degrees of freedom, so every λ fits perfectly.
    #[error("the model leaves no residual degrees of freedom, so box-cox cannot compare powers")]
    NoResidualDf,
    /// The model itself cannot be fitted.
    #[error(transparent)]
    Fit(#[from] FitError),
}

fn list(runs: &[usize]) -> String {
    runs.iter()
        .map(|r| r.to_string())
        .collect::<Vec<_>>()
        .join(", ")
}

/// The Box–Cox result.
#[derive(Debug, Clone, PartialEq)]
pub struct BoxCox {
    /// `(λ, L(λ))` on the grid, for plotting.
    pub profile: Vec<(f64, f64)>,
    /// The maximising λ (inside [−2, 2]).
    pub lambda: f64,
    /// `L(λ̂)`.
    pub max_log_likelihood: f64,
    /// The level `L(λ̂) − χ²₁(0.95)/2` that bounds the interval.
    pub cutoff: f64,
    /// Lower end of the 95 % interval; `None` when it lies below −2 (outside the search).
    pub lower: Option<f64>,
    /// Upper end; `None` when it lies above 2.
    pub upper: Option<f64>,
    /// The standard power nearest λ̂ inside the interval, with its transform
    /// (`Transform::None` for λ = 1: the data need no transform). `None` when no standard power
    /// lies inside the interval.
    pub suggestion: Option<(f64, Transform)>,
}

impl BoxCox {
    /// Whether λ = 1 (no transform) lies inside the interval.
    pub fn one_inside(&self) -> bool {
        self.contains(1.0)
    }

    /// Whether `lambda` lies inside the 95 % interval (an open end counts as unbounded).
    pub fn contains(&self, lambda: f64) -> bool {
        self.lower.is_none_or(|l| lambda >= l) && self.upper.is_none_or(|u| lambda <= u)
    }
}

/// The profile log-likelihood `L(λ)` for a response whose logarithms are `ln_y` (all values
/// positive) with log geometric mean `log_gm`, given a function returning the residual SS of the
/// model for any response vector.
fn log_likelihood(
    lambda: f64,
    ln_y: &[f64],
    log_gm: f64,
    ss: &(dyn Fn(&[f64]) -> Option<f64> + Sync),
) -> Option<f64> {
    let gm = log_gm.exp();
    let z: Vec<f64> = if lambda == 0.0 {
        ln_y.iter().map(|l| gm * l).collect()
    } else {
        let scale = lambda * ((lambda - 1.0) * log_gm).exp();
        ln_y.iter().map(|l| (lambda * l).exp_m1() / scale).collect()
    };
    let s = ss(&z)?;
    let n = ln_y.len() as f64;
    (s > 0.0).then(|| -0.5 * n * (s / n).ln())
}

/// Computes the Box–Cox profile for the response of `obs` under `spec`. See the module
/// documentation for the formula.
pub fn box_cox(obs: &Observations, spec: &ModelSpec) -> Result<BoxCox, BoxCoxError> {
    let base = fit_model(obs, spec)?;
    if base.df_residual == 0 {
        return Err(BoxCoxError::NoResidualDf);
    }
    let bad: Vec<usize> = base
        .runs
        .iter()
        .zip(&base.observed)
        .filter(|(_, y)| **y <= 0.0)
        .map(|(r, _)| r + 1)
        .collect();
    if !bad.is_empty() {
        return Err(BoxCoxError::NotPositive { runs: bad });
    }
    let y = base.observed.clone();
    let log_gm = y.iter().map(|v| v.ln()).sum::<f64>() / y.len() as f64;
    let runs = base.runs.clone();
    // On a two-level table the same model's residual sum of squares comes from the transform
    // without refitting; otherwise each λ refits.
    let quick = crate::anova::residual_ss_for(&base, obs);
    let ss = |z: &[f64]| -> Option<f64> {
        if let Some(q) = &quick {
            return Some(q(z));
        }
        let mut resp = vec![None; obs.run_count()];
        for (&r, &v) in runs.iter().zip(z) {
            resp[r] = Some(v);
        }
        let o = obs.with_response(resp).ok()?;
        let f = fit_model(&o, spec).ok()?;
        Some(f.residuals.iter().map(|e| e * e).sum())
    };
    let ln_y: Vec<f64> = y.iter().map(|v| v.ln()).collect();
    let ll = |l: f64| log_likelihood(l, &ln_y, log_gm, &ss);

    let (lo, hi) = LAMBDA_RANGE;
    let steps = ((hi - lo) / GRID_STEP).round() as usize;
    // Each grid point is a pass over every run; the points are independent, so they are shared
    // among the cores (the order of the profile is kept).
    let profile: Vec<(f64, f64)> = (0..=steps)
        .into_par_iter()
        .filter_map(|i| {
            let l = lo + i as f64 * GRID_STEP;
            // An exact fit at some λ has no finite likelihood; such points are left off the plot.
            ll(l).map(|v| (l, v))
        })
        .collect();
    let Some(best) = profile
        .iter()
        .enumerate()
        .max_by(|a, b| a.1.1.total_cmp(&b.1.1))
        .map(|(i, _)| i)
    else {
        return Err(BoxCoxError::NoResidualDf);
    };

    // Golden-section refinement between the neighbours of the best grid point.
    let a0 = profile[best.saturating_sub(1)].0;
    let b0 = profile[(best + 1).min(profile.len() - 1)].0;
    let (lambda, max_ll) = golden_max(&|l| ll(l).unwrap_or(f64::NEG_INFINITY), a0, b0);
    let (lambda, max_ll) = if max_ll >= profile[best].1 {
        (lambda, max_ll)
    } else {
        profile[best]
    };

    let chi2 = Normal::new(0.0, 1.0)
        .map(|n| n.inverse_cdf(0.975).powi(2))
        .unwrap_or(3.841_458_820_694_124);
    let cutoff = max_ll - 0.5 * chi2;
    let g = |l: f64| ll(l).unwrap_or(f64::NEG_INFINITY) - cutoff;
    // Walk outwards on the grid to the first point below the cut-off, then bisect.
    // The two ends are independent: one core each.
    let (lower, upper) = rayon::join(
        || {
            profile[..=best]
                .iter()
                .rev()
                .find(|(_, v)| *v < cutoff)
                .map(|&(l, _)| bisect(&g, l, lambda.min(l + GRID_STEP).max(l)))
        },
        || {
            profile[best..]
                .iter()
                .find(|(_, v)| *v < cutoff)
                .map(|&(l, _)| bisect(&g, lambda.max(l - GRID_STEP).min(l), l))
        },
    );
    let mut out = BoxCox {
        profile,
        lambda,
        max_log_likelihood: max_ll,
        cutoff,
        lower,
        upper,
        suggestion: None,
    };
    out.suggestion = STANDARD_POWERS
        .iter()
        .filter(|(p, _)| out.contains(*p))
        .min_by(|a, b| (a.0 - lambda).abs().total_cmp(&(b.0 - lambda).abs()))
        .copied();
    Ok(out)
}

/// Maximises `f` on `[a, b]` by golden-section search (Kiefer 1953; from memory), to 1e-12.
fn golden_max(f: &dyn Fn(f64) -> f64, mut a: f64, mut b: f64) -> (f64, f64) {
    let r = (5f64.sqrt() - 1.0) / 2.0;
    let mut c = b - r * (b - a);
    let mut d = a + r * (b - a);
    let (mut fc, mut fd) = (f(c), f(d));
    // A flat-topped likelihood places its maximum only to about the square root of its rounding
    // (1e-8 here), so narrowing the bracket below 1e-10 buys nothing.
    while (b - a).abs() > 1e-10 {
        if fc > fd {
            b = d;
            d = c;
            fd = fc;
            c = b - r * (b - a);
            fc = f(c);
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + r * (b - a);
            fd = f(d);
        }
    }
    let x = (a + b) / 2.0;
    (x, f(x))
}

/// A root of `g` between `a` and `b`, where `g` changes sign (`g(a) < 0 ≤ g(b)` or the reverse),
/// by bisection to 1e-12.
fn bisect(g: &(dyn Fn(f64) -> f64 + Sync), mut a: f64, mut b: f64) -> f64 {
    let ga_neg = g(a) < 0.0;
    while (b - a).abs() > 1e-12 {
        let m = (a + b) / 2.0;
        if (g(m) < 0.0) == ga_neg {
            a = m;
        } else {
            b = m;
        }
    }
    (a + b) / 2.0
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::term::Term;
    use crate::test_support::{observations, replicated_full};

    fn design(y: &[f64]) -> Observations {
        observations(3, replicated_full(3, y.len()), y)
    }

    #[test]
    fn exponential_response_suggests_the_log() {
        // y = exp(linear in the factors) times a small multiplicative disturbance: a log-linear
        // response, so λ̂ must be near 0 and ln the suggestion (Box & Cox 1964, section 1: the
        // transform that makes effects additive). The disturbances are fixed, illustrative.
        let dist = [
            0.01, -0.02, 0.015, 0.0, -0.01, 0.02, -0.015, 0.005, -0.005, 0.01, 0.0, -0.02, 0.02,
            -0.01, 0.005, 0.01,
        ];
        let y: Vec<f64> = (0..16)
            .map(|r| {
                let i = r % 8;
                let x: Vec<f64> = (0..3)
                    .map(|f| if i >> f & 1 == 1 { 1.0 } else { -1.0 })
                    .collect();
                (2.0 + 0.8 * x[0] + 0.5 * x[1] - 0.3 * x[2] + dist[r]).exp()
            })
            .collect();
        let spec = ModelSpec::new((0..3).map(Term::main).collect());
        let bc = box_cox(&design(&y), &spec).unwrap();
        assert!(bc.lambda.abs() < 0.2, "λ̂ = {}", bc.lambda);
        assert_eq!(bc.suggestion, Some((0.0, Transform::Ln)));
        assert!(!bc.one_inside());
        // The interval brackets λ̂ and its ends sit on the cut-off (to the bisection tolerance).
        let (l, u) = (bc.lower.unwrap(), bc.upper.unwrap());
        assert!(l < bc.lambda && bc.lambda < u);
        assert_eq!(bc.profile.len(), 81);
    }

    #[test]
    fn the_maximum_beats_every_grid_point() {
        let y = [
            3.0, 5.5, 4.1, 9.0, 2.7, 6.2, 4.4, 12.5, 3.3, 5.1, 4.8, 10.2, 2.2, 6.9, 4.0, 11.1,
        ];
        let spec = ModelSpec::new((0..3).map(Term::main).collect());
        let bc = box_cox(&design(&y), &spec).unwrap();
        assert!(
            bc.profile
                .iter()
                .all(|&(_, v)| v <= bc.max_log_likelihood + 1e-12)
        );
    }

    #[test]
    fn bad_inputs_are_rejected() {
        let mut y = vec![1.0; 16];
        y[3] = -2.0;
        y[9] = 0.0;
        y[0] = 1.5;
        let spec = ModelSpec::new(vec![Term::main(0)]);
        assert_eq!(
            box_cox(&design(&y), &spec).unwrap_err(),
            BoxCoxError::NotPositive { runs: vec![4, 10] }
        );
        let y8 = [1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.5];
        let all: Vec<Term> = (1u32..8).map(Term::from_bits).collect();
        assert_eq!(
            box_cox(&design(&y8), &ModelSpec::new(all)).unwrap_err(),
            BoxCoxError::NoResidualDf
        );
    }
}
