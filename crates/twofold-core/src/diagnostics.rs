//! Residual diagnostics of a fitted model: leverage, studentised residuals, Cook's distance,
//! residuals in run order and normal-plot positions.
//!
//! # Formulas
//! With residual `e_i`, leverage `h_i` (diagonal of the hat matrix `X(XᵀX)⁻¹Xᵀ`), residual mean
//! square `s² = SS_res/(n − p)` and `p` fitted parameters:
//!
//! * internally studentised residual `r_i = e_i / (s √(1 − h_i))`;
//! * externally studentised residual `t_i = e_i / (s_(i) √(1 − h_i))`, with the deleted variance
//!   `s_(i)² = ((n − p) s² − e_i²/(1 − h_i)) / (n − p − 1)`, equivalently
//!   `t_i = r_i √((n − p − 1)/(n − p − r_i²))` (Belsley, Kuh & Welsch 1980, *Regression
//!   Diagnostics*, eq. 2.6–2.7; from memory);
//! * Cook's distance `D_i = r_i² h_i / (p (1 − h_i))` (Cook 1977, Technometrics 19, 15–18, eq. 8;
//!   from memory).
//!
//! A run with leverage 1 (its own parameter) has no defined studentised residual or distance;
//! those are `None`, as is everything that needs `s` when the residual has no degrees of freedom.

use crate::anova::ModelFit;
use statrs::distribution::{ContinuousCDF, Normal};

/// Leverage counted as 1 (the run fits itself exactly), relative to 1.
const LEVERAGE_ONE: f64 = 1e-10;

/// Diagnostics of one used run.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RunDiagnostics {
    /// 0-based index of the run in the table.
    pub run: usize,
    /// Observed response.
    pub observed: f64,
    /// Fitted value.
    pub fitted: f64,
    /// Residual `observed − fitted`.
    pub residual: f64,
    /// Leverage `h_ii`.
    pub leverage: f64,
    /// Internally studentised residual.
    pub studentized: Option<f64>,
    /// Externally studentised (deleted) residual.
    pub externally_studentized: Option<f64>,
    /// Cook's distance.
    pub cooks_distance: Option<f64>,
}

/// Diagnostics of every used run, in table order.
#[derive(Debug, Clone, PartialEq)]
pub struct Diagnostics {
    /// One entry per used run, in table order.
    pub runs: Vec<RunDiagnostics>,
    /// Parameters fitted.
    pub parameter_count: usize,
    /// Leverage above which a run is usually called high, `2p/n` (Hoaglin & Welsch 1978, The
    /// American Statistician 32, 17–22; from memory).
    pub high_leverage: f64,
}

/// Why residuals cannot be put in run order.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum RunOrderError {
    /// The run-order column is shorter than the table.
    #[error("the run order has {found} entries but run {run} needs one")]
    TooShort {
        /// Entries given.
        found: usize,
        /// 1-based table run that has none.
        run: usize,
    },
}

/// A residual placed in run order.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RunOrderPoint {
    /// The position in which the run was made (as given by the caller).
    pub position: usize,
    /// The run's diagnostics.
    pub diagnostics: RunDiagnostics,
}

/// A residual with its position on a normal probability plot.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NormalPlotPoint {
    /// 0-based index of the run in the table.
    pub run: usize,
    /// The residual.
    pub residual: f64,
    /// Expected standard normal score of its rank.
    pub normal_score: f64,
}

/// Computes the diagnostics of `fit`. See the module documentation for the formulas.
pub fn diagnostics(fit: &ModelFit) -> Diagnostics {
    let n = fit.runs.len();
    let p = fit.parameter_count;
    let df = fit.df_residual;
    let s2 = fit.ms_residual;
    // Zipped rather than indexed: the fit's columns are public and have one entry per used run.
    let runs = fit
        .runs
        .iter()
        .zip(&fit.observed)
        .zip(&fit.fitted)
        .zip(fit.residuals.iter().zip(&fit.leverage))
        .map(|(((&run, &observed), &fitted), (&e, &h))| {
            let free = h < 1.0 - LEVERAGE_ONE;
            let studentized = match s2 {
                Some(s2) if free && s2 > 0.0 => Some(e / (s2 * (1.0 - h)).sqrt()),
                _ => None,
            };
            let externally_studentized = studentized.and_then(|r| {
                let denom = df as f64 - r * r;
                // n − p − 1 = 0 leaves nothing once the run is deleted; a non-positive
                // denominator means the deleted variance is zero.
                (df > 1 && denom > 0.0).then(|| r * ((df - 1) as f64 / denom).sqrt())
            });
            let cooks_distance = studentized.map(|r| r * r * h / (p as f64 * (1.0 - h)));
            RunDiagnostics {
                run,
                observed,
                fitted,
                residual: e,
                leverage: h,
                studentized,
                externally_studentized,
                cooks_distance,
            }
        })
        .collect();
    Diagnostics {
        runs,
        parameter_count: p,
        high_leverage: if n > 0 {
            2.0 * p as f64 / n as f64
        } else {
            0.0
        },
    }
}

impl Diagnostics {
    /// The runs sorted by the position in which they were made. `run_order[r]` is the position of
    /// table run `r` (0-based table index; any increasing numbering). Runs with equal positions
    /// keep table order.
    pub fn in_run_order(&self, run_order: &[usize]) -> Result<Vec<RunOrderPoint>, RunOrderError> {
        let mut out = Vec::with_capacity(self.runs.len());
        for d in &self.runs {
            let position = *run_order.get(d.run).ok_or(RunOrderError::TooShort {
                found: run_order.len(),
                run: d.run + 1,
            })?;
            out.push(RunOrderPoint {
                position,
                diagnostics: *d,
            });
        }
        out.sort_by_key(|p| p.position);
        Ok(out)
    }

    /// Residuals sorted ascending with Blom's plotting positions `Φ⁻¹((i − 3/8)/(n + 1/4))`
    /// (Blom 1958, *Statistical Estimates and Transformed Beta-Variables*; from memory).
    pub fn normal_plot(&self) -> Vec<NormalPlotPoint> {
        let mut sorted: Vec<&RunDiagnostics> = self.runs.iter().collect();
        sorted.sort_by(|a, b| a.residual.total_cmp(&b.residual));
        let n = sorted.len() as f64;
        let Ok(std) = Normal::new(0.0, 1.0) else {
            return Vec::new();
        };
        sorted
            .iter()
            .enumerate()
            .map(|(i, d)| NormalPlotPoint {
                run: d.run,
                residual: d.residual,
                normal_score: std.inverse_cdf((i as f64 + 1.0 - 0.375) / (n + 0.25)),
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::anova::{ModelSpec, fit_model};
    use crate::data::Observations;
    use crate::term::Term;
    use crate::test_support::{observations, replicated_full};

    fn two_by_two_replicated(y: &[f64]) -> Observations {
        observations(2, replicated_full(2, y.len()), y)
    }

    #[test]
    fn orthogonal_design_has_equal_leverage() {
        // For an orthogonal ±1 design every run has leverage p/n (common practice, no source).
        let o = two_by_two_replicated(&[1.0, 4.0, 2.0, 6.0, 1.5, 3.0, 2.5, 7.0]);
        let fit = fit_model(&o, &ModelSpec::new(vec![Term::main(0), Term::main(1)])).unwrap();
        let d = diagnostics(&fit);
        for r in &d.runs {
            assert!((r.leverage - 3.0 / 8.0).abs() < 1e-12);
        }
        assert!((d.high_leverage - 0.75).abs() < 1e-12);
    }

    #[test]
    fn deleted_residual_matches_refit_without_the_run() {
        // t_i is e_i over the error of the fit made without run i (Belsley, Kuh & Welsch 1980):
        // check the closed form against an actual refit. Tolerance 1e-10 (two fits in double).
        let y = [1.0, 4.0, 2.0, 6.0, 1.5, 3.0, 2.5, 9.0];
        let o = two_by_two_replicated(&y);
        let spec = ModelSpec::new(vec![Term::main(0), Term::main(1)]);
        let fit = fit_model(&o, &spec).unwrap();
        let d = diagnostics(&fit);
        let i = 7;
        let mut resp: Vec<Option<f64>> = y.iter().map(|&v| Some(v)).collect();
        resp[i] = None;
        let without = fit_model(&o.with_response(resp).unwrap(), &spec).unwrap();
        let pred = without.value_at(&o.levels()[i]);
        let s_del = without.sigma.unwrap();
        let h = d.runs[i].leverage;
        // Prediction error of the deleted fit, scaled: (y − ŷ_(i)) √(1 − h) / s_(i) = t_i.
        let t = (y[i] - pred) * (1.0 - h).sqrt() / s_del;
        let got = d.runs[i].externally_studentized.unwrap();
        assert!((t - got).abs() < 1e-10, "{t} vs {got}");
        // Cook's distance from its definition, (b − b_(i))ᵀ XᵀX (b − b_(i)) / (p s²); for an
        // orthogonal ±1 design XᵀX = n·I.
        let b = [
            fit.intercept.estimate,
            fit.coefficients[0].estimate,
            fit.coefficients[1].estimate,
        ];
        let bd = [
            without.intercept.estimate,
            without.coefficients[0].estimate,
            without.coefficients[1].estimate,
        ];
        let dist: f64 = b.iter().zip(&bd).map(|(a, c)| (a - c).powi(2)).sum::<f64>() * 8.0
            / (3.0 * fit.ms_residual.unwrap());
        assert!((dist - d.runs[i].cooks_distance.unwrap()).abs() < 1e-10);
    }

    #[test]
    fn saturated_fit_has_no_studentised_residuals() {
        let o = two_by_two_replicated(&[1.0, 4.0, 2.0, 6.0]);
        let spec = ModelSpec::new(vec![
            Term::main(0),
            Term::main(1),
            Term::main(0).times(Term::main(1)),
        ]);
        let d = diagnostics(&fit_model(&o, &spec).unwrap());
        assert!(
            d.runs
                .iter()
                .all(|r| r.studentized.is_none() && r.cooks_distance.is_none())
        );
    }

    #[test]
    fn run_order_sorts_and_checks_length() {
        let o = two_by_two_replicated(&[1.0, 4.0, 2.0, 6.0, 1.5, 3.0, 2.5, 7.0]);
        let d = diagnostics(&fit_model(&o, &ModelSpec::new(vec![Term::main(0)])).unwrap());
        let order = [5, 3, 8, 1, 2, 7, 6, 4];
        let sorted = d.in_run_order(&order).unwrap();
        let runs: Vec<usize> = sorted.iter().map(|p| p.diagnostics.run).collect();
        assert_eq!(runs, [3, 4, 1, 7, 0, 6, 5, 2]);
        assert_eq!(
            d.in_run_order(&order[..5]).unwrap_err(),
            RunOrderError::TooShort { found: 5, run: 6 }
        );
    }

    #[test]
    fn normal_plot_is_sorted_and_symmetric() {
        let o = two_by_two_replicated(&[1.0, 4.0, 2.0, 6.0, 1.5, 3.0, 2.5, 7.0]);
        let d = diagnostics(&fit_model(&o, &ModelSpec::new(vec![Term::main(0)])).unwrap());
        let np = d.normal_plot();
        assert!(np.windows(2).all(|w| w[0].residual <= w[1].residual));
        // Blom positions are symmetric about zero (common practice, no source).
        assert!((np[0].normal_score + np[7].normal_score).abs() < 1e-12);
    }
}
