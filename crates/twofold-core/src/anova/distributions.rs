//! The t and F distributions behind the p-values and intervals of the fit.

use statrs::distribution::{Continuous, ContinuousCDF, StudentsT};
use statrs::function::beta::checked_beta_reg;

/// Two-sided p-value of Student's t with `df` degrees of freedom:
/// `p = I_{ν/(ν+t²)}(ν/2, 1/2)` (Abramowitz & Stegun 1964, 26.7.1 with 26.5.27; from memory).
/// Computed from the incomplete beta function directly so that small p-values keep their relative
/// precision.
pub(crate) fn t_two_sided_p(t: f64, df: usize) -> Option<f64> {
    if df == 0 || !t.is_finite() {
        return None;
    }
    let v = df as f64;
    checked_beta_reg(v / 2.0, 0.5, v / (v + t * t)).ok()
}

/// Upper-tail p-value of F with (`d1`, `d2`) degrees of freedom:
/// `P(F > f) = I_{d2/(d2 + d1 f)}(d2/2, d1/2)` (Abramowitz & Stegun 1964, 26.6.2; from memory).
/// `None` for zero degrees of freedom or an F that is not a finite non-negative number. Public so
/// that a test against another error mean square (e.g. pure error, Montgomery's Example 6-6)
/// uses the same distribution as the ANOVA table.
pub fn f_upper_p(f: f64, d1: usize, d2: usize) -> Option<f64> {
    if d1 == 0 || d2 == 0 || !f.is_finite() || f < 0.0 {
        return None;
    }
    let (a, b) = (d1 as f64, d2 as f64);
    checked_beta_reg(b / 2.0, a / 2.0, b / (b + a * f)).ok()
}

/// The `p` quantile of Student's t with `df` degrees of freedom, `None` for `df = 0` or `p`
/// outside (0, 1). The statrs inverse is polished by Newton steps on the cdf, because the
/// intervals are compared with an independent library to 1e-8.
pub(crate) fn t_quantile(p: f64, df: usize) -> Option<f64> {
    if df == 0 || !(p > 0.0 && p < 1.0) {
        return None;
    }
    let dist = StudentsT::new(0.0, 1.0, df as f64).ok()?;
    let mut x = dist.inverse_cdf(p);
    for _ in 0..4 {
        let d = dist.pdf(x);
        if d.is_nan() || d <= 0.0 || !x.is_finite() {
            break;
        }
        let step = (dist.cdf(x) - p) / d;
        x -= step;
        if step.abs() <= 1e-15 * x.abs().max(1.0) {
            break;
        }
    }
    x.is_finite().then_some(x)
}
