//! Noise factors: the slope of a fitted response along each noise factor and the spread it
//! transmits.
//!
//! # Method
//! The combined-array, response-model approach to robust parameter design (Myers, Montgomery &
//! Anderson-Cook, *Response Surface Methodology*, the chapter on robust parameter design; Box &
//! Jones 1992, *Journal of Applied Statistics* 19(1); both from memory). The fitted model holds
//! control factors `x` and noise factors `z`, all in coded units. In use the noise factors vary
//! about their centre with standard deviations `σ_z` (coded units) and are uncorrelated, so to
//! first order
//!
//! ```text
//! mean       E_z[y(x, z)] = y(x, 0)
//! slope      ∂y/∂z_j (x) = γ_j + Σ_i δ_ij x_i  (+ higher interactions of z_j with controls)
//! spread     σ_tr(x) = √( Σ_j (σ_zj · ∂y/∂z_j (x))² )
//! ```
//!
//! with γ_j the noise main effect and δ_ij the control-by-noise interaction coefficients. The
//! residual variance σ² adds to the variance in use but does not depend on `x`, so only σ_tr is
//! reported. A control factor that interacts with a noise factor can set that slope to 0: that
//! setting is robust. Interactions among noise factors have zero slope at `z = 0` and are left
//! out, as the first-order formula does.

use crate::anova::ModelFit;
use crate::term::Term;

/// A fitted model as a polynomial in coded units: intercept plus coefficient × product of the
/// term's factors (blocks at their average, the curvature column at 0, as for predictions).
#[derive(Debug, Clone, PartialEq)]
pub struct Surface {
    /// Factors in the design.
    pub factor_count: usize,
    /// The intercept.
    pub intercept: f64,
    /// Each term with its coefficient (coded units, half the effect).
    pub terms: Vec<(Term, f64)>,
}

impl Surface {
    /// The fitted polynomial of `fit`.
    pub fn from_fit(fit: &ModelFit) -> Surface {
        Surface {
            factor_count: fit.factor_count,
            intercept: fit.intercept.estimate,
            terms: fit
                .coefficients
                .iter()
                .map(|c| (c.term, c.estimate))
                .collect(),
        }
    }

    /// Value at the coded point `x` (one setting per factor; missing settings count as 0).
    pub fn value(&self, x: &[f64]) -> f64 {
        self.intercept
            + self
                .terms
                .iter()
                .map(|(t, b)| b * t.factors().map(|f| setting(x, f)).product::<f64>())
                .sum::<f64>()
    }

    /// Slope `∂y/∂x_j` at the coded point `x`.
    pub fn slope(&self, x: &[f64], j: usize) -> f64 {
        self.terms
            .iter()
            .filter(|(t, _)| t.contains(j))
            .map(|(t, b)| {
                b * t
                    .factors()
                    .filter(|&f| f != j)
                    .map(|f| setting(x, f))
                    .product::<f64>()
            })
            .sum::<f64>()
            // No negative zero in the output.
            + 0.0
    }

    /// The spread transmitted by the noise factors, `√(Σ_j (σ_zj · ∂y/∂z_j)²)` at `x` (see the
    /// module documentation); `noise` lists (factor, σ_z in coded units). `x` should hold the
    /// noise factors at 0.
    pub fn transmitted_sd(&self, x: &[f64], noise: &[(usize, f64)]) -> f64 {
        noise
            .iter()
            .map(|&(j, sd)| (sd * self.slope(x, j)).powi(2))
            .sum::<f64>()
            .sqrt()
    }
}

fn setting(x: &[f64], f: usize) -> f64 {
    x.get(f).copied().unwrap_or(0.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn t(label: &str) -> Term {
        Term::parse(label, 3).unwrap()
    }

    #[test]
    fn hand_derived_flat_setting() {
        // y = 50 + 4A + 3C + 6AC, with A a control and C a noise factor (σ_C = 1 coded).
        // ∂y/∂C = 3 + 6A, zero at A = −0.5: the robust setting; at A = +1 the slope is 9
        // and σ_tr = 9; at A = −1 it is |−3| = 3. Derived by hand.
        let s = Surface {
            factor_count: 3,
            intercept: 50.0,
            terms: vec![(t("A"), 4.0), (t("C"), 3.0), (t("AC"), 6.0)],
        };
        let noise = [(2usize, 1.0)];
        assert!(s.transmitted_sd(&[-0.5, 0.0, 0.0], &noise).abs() < 1e-15);
        assert!((s.transmitted_sd(&[1.0, 0.0, 0.0], &noise) - 9.0).abs() < 1e-12);
        assert!((s.transmitted_sd(&[-1.0, 0.0, 0.0], &noise) - 3.0).abs() < 1e-12);
        // σ_C = 0.5 halves it.
        assert!((s.transmitted_sd(&[1.0, 0.0, 0.0], &[(2, 0.5)]) - 4.5).abs() < 1e-12);
        // The mean holds the noise at its centre: 50 + 4A.
        assert!((s.value(&[-0.5, 0.0, 0.0]) - 48.0).abs() < 1e-12);
    }

    #[test]
    fn two_noise_factors_add_in_quadrature() {
        // y = 10 + 2B + 1C + AB − 2AC; noise B (σ 1) and C (σ 2). At A = 1:
        // ∂y/∂B = 2 + 1 = 3, ∂y/∂C = 1 − 2 = −1, σ_tr = √(3² + (2·1)²) = √13. By hand.
        let s = Surface {
            factor_count: 3,
            intercept: 10.0,
            terms: vec![
                (t("B"), 2.0),
                (t("C"), 1.0),
                (t("AB"), 1.0),
                (t("AC"), -2.0),
            ],
        };
        let sd = s.transmitted_sd(&[1.0, 0.0, 0.0], &[(1, 1.0), (2, 2.0)]);
        assert!((sd - 13f64.sqrt()).abs() < 1e-12);
    }
}
