//! Data for the effect plots: main-effect means, interaction cell means and cube corners.
//!
//! Observed means use the used runs only (value present, not excluded); a run at the centre (or
//! at 0 for a plotted factor) belongs to no − or + cell. Model predictions hold every factor not
//! plotted at its centre (coded 0), which for a balanced design is the average over those factors
//! (common practice, no source).
//!
//! # Intervals
//! Each cell carries two intervals at the requested confidence, both `None` without residual
//! degrees of freedom:
//!
//! * around the observed mean, `ȳ ± t(1 − α/2, n − p) · s/√n_cell`, with `s` the model's residual
//!   standard deviation (the pooled error of the fitted model, rather than the few runs of the
//!   cell);
//! * around the prediction, the model's confidence interval for the mean response
//!   ([`crate::predict::predict`]).

use crate::anova::{ModelFit, t_quantile};
use crate::data::Observations;
use crate::predict::{PredictError, predict};
use crate::term::factor_letter;

/// Why plot data cannot be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum MeansError {
    /// A factor index beyond the design.
    #[error("factor {index} is beyond the design's {factor_count} factors")]
    NoSuchFactor {
        /// 0-based index asked for.
        index: usize,
        /// Factors in the design.
        factor_count: usize,
    },
    /// The same factor twice in a cube.
    #[error("factor {0} appears twice; a cube needs three different factors")]
    Repeated(char),
    /// The fit was made for a different design.
    #[error("the model was fitted to {fit} factors but the table has {table}")]
    Mismatch {
        /// Factors of the fit.
        fit: usize,
        /// Factors of the table.
        table: usize,
    },
    /// The prediction failed (e.g. a confidence level outside 0..1).
    #[error(transparent)]
    Predict(#[from] PredictError),
}

/// Mean response at the low and high setting of one factor.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MainEffectMeans {
    /// 0-based factor index.
    pub factor: usize,
    /// Mean of the used runs at −1; `None` when there are none.
    pub low: Option<f64>,
    /// Mean of the used runs at +1.
    pub high: Option<f64>,
    /// Runs at −1.
    pub n_low: usize,
    /// Runs at +1.
    pub n_high: usize,
}

impl MainEffectMeans {
    /// The effect `ȳ₊ − ȳ₋` from the observed means (equal to twice the coefficient only for a
    /// balanced design).
    pub fn difference(&self) -> Option<f64> {
        Some(self.high? - self.low?)
    }
}

/// One cell of an interaction or cube plot.
#[derive(Debug, Clone, PartialEq)]
pub struct CellMean {
    /// Coded settings of the plotted factors (−1 or +1), in the order the factors were given.
    pub settings: Vec<f64>,
    /// Observed mean of the used runs in the cell; `None` for an empty cell.
    pub observed: Option<f64>,
    /// Used runs in the cell.
    pub n: usize,
    /// `(low, high)` of `ȳ ± t·s/√n`.
    pub observed_interval: Option<(f64, f64)>,
    /// Model prediction, other factors at their centre.
    pub predicted: f64,
    /// The model's confidence interval for the mean at the cell.
    pub predicted_interval: Option<(f64, f64)>,
}

/// The 2×2 cells of the interaction plot of two factors.
#[derive(Debug, Clone, PartialEq)]
pub struct InteractionMeans {
    /// The two factors (0-based), first < second.
    pub factors: (usize, usize),
    /// Cells in standard order: (−,−), (+,−), (−,+), (+,+), first factor changing fastest.
    pub cells: Vec<CellMean>,
}

/// The eight corners of a cube plot.
#[derive(Debug, Clone, PartialEq)]
pub struct CubePlot {
    /// The three factors (0-based), as given.
    pub factors: [usize; 3],
    /// Corners in standard order, first factor changing fastest.
    pub corners: Vec<CellMean>,
}

/// Mean response at − and + of every factor.
pub fn main_effect_means(obs: &Observations) -> Vec<MainEffectMeans> {
    let used = obs.used_runs();
    (0..obs.factor_count())
        .map(|f| {
            let (mut sl, mut nl, mut sh, mut nh) = (0.0, 0usize, 0.0, 0usize);
            for &r in &used {
                let y = obs.response()[r].unwrap_or(0.0);
                match obs.levels()[r][f] {
                    v if v < 0.0 => {
                        sl += y;
                        nl += 1;
                    }
                    v if v > 0.0 => {
                        sh += y;
                        nh += 1;
                    }
                    _ => {}
                }
            }
            MainEffectMeans {
                factor: f,
                low: (nl > 0).then(|| sl / nl as f64),
                high: (nh > 0).then(|| sh / nh as f64),
                n_low: nl,
                n_high: nh,
            }
        })
        .collect()
}

/// Cells over the given factors, in standard order.
fn cells(
    obs: &Observations,
    fit: &ModelFit,
    factors: &[usize],
    confidence: f64,
) -> Result<Vec<CellMean>, MeansError> {
    let k = obs.factor_count();
    if fit.factor_count != k {
        return Err(MeansError::Mismatch {
            fit: fit.factor_count,
            table: k,
        });
    }
    for &f in factors {
        if f >= k {
            return Err(MeansError::NoSuchFactor {
                index: f,
                factor_count: k,
            });
        }
    }
    let tq = t_quantile(0.5 + confidence / 2.0, fit.df_residual);
    // One pass over the runs: each run at ±1 on every factor of the cell goes to its cell
    // (index bit i set when factor i is at +1); runs at the centre on any of them go nowhere.
    let cell_count = 1usize << factors.len();
    let mut sums = vec![0.0; cell_count];
    let mut counts = vec![0usize; cell_count];
    for r in obs.used_runs() {
        let row = &obs.levels()[r];
        let mut cell = 0usize;
        let mut corner = true;
        for (i, &f) in factors.iter().enumerate() {
            let v = row[f];
            if v == 1.0 {
                cell |= 1 << i;
            } else if v != -1.0 {
                corner = false;
                break;
            }
        }
        if corner {
            sums[cell] += obs.response()[r].unwrap_or(0.0);
            counts[cell] += 1;
        }
    }
    let mut out = Vec::with_capacity(cell_count);
    for c in 0..cell_count {
        let settings: Vec<f64> = (0..factors.len())
            .map(|i| if c >> i & 1 == 1 { 1.0 } else { -1.0 })
            .collect();
        let n = counts[c];
        let observed = (n > 0).then(|| sums[c] / n as f64);
        let observed_interval = match (observed, fit.sigma, tq) {
            (Some(m), Some(s), Some(t)) => {
                let h = t * s / (n as f64).sqrt();
                Some((m - h, m + h))
            }
            _ => None,
        };
        let mut point = vec![0.0; k];
        for (&f, &s) in factors.iter().zip(&settings) {
            point[f] = s;
        }
        let p = predict(fit, &point, confidence)?;
        out.push(CellMean {
            settings,
            observed,
            n,
            observed_interval,
            predicted: p.value,
            predicted_interval: p.confidence_interval,
        });
    }
    Ok(out)
}

/// The interaction-plot cells of every pair of factors, pairs in order (A,B), (A,C), ..., (B,C),
/// ..., intervals at `confidence` (e.g. 0.95).
pub fn interaction_means(
    obs: &Observations,
    fit: &ModelFit,
    confidence: f64,
) -> Result<Vec<InteractionMeans>, MeansError> {
    let k = obs.factor_count();
    let mut out = Vec::new();
    for i in 0..k {
        for j in i + 1..k {
            out.push(InteractionMeans {
                factors: (i, j),
                cells: cells(obs, fit, &[i, j], confidence)?,
            });
        }
    }
    Ok(out)
}

/// The cube-plot corners of three different factors, intervals at `confidence`.
pub fn cube_plot(
    obs: &Observations,
    fit: &ModelFit,
    factors: [usize; 3],
    confidence: f64,
) -> Result<CubePlot, MeansError> {
    for a in 0..3 {
        for b in a + 1..3 {
            if factors[a] == factors[b] {
                return Err(MeansError::Repeated(
                    factor_letter(factors[a]).unwrap_or('?'),
                ));
            }
        }
    }
    Ok(CubePlot {
        factors,
        corners: cells(obs, fit, &factors, confidence)?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::anova::{ModelSpec, fit_model};
    use crate::term::Term;
    use crate::test_support::{observations, replicated_full};

    /// Montgomery, Example 6-1 (fill height, 2^3 with two replicates; data verified in
    /// REFERENCES.md), in standard order, replicate I then replicate II.
    fn fill_height() -> Observations {
        let y = [
            -3.0, 0.0, -1.0, 2.0, -1.0, 2.0, 1.0, 6.0, -1.0, 1.0, 0.0, 3.0, 0.0, 1.0, 1.0, 5.0,
        ];
        observations(3, replicated_full(3, y.len()), &y)
    }

    #[test]
    fn main_effect_means_give_the_published_effects() {
        // Effects A 3.00, B 2.25, C 1.75 (Montgomery Example 6-1, verified).
        let m = main_effect_means(&fill_height());
        let expected = [3.0, 2.25, 1.75];
        for (me, e) in m.iter().zip(expected) {
            assert!((me.difference().unwrap() - e).abs() < 0.005);
            assert_eq!((me.n_low, me.n_high), (8, 8));
        }
    }

    #[test]
    fn interaction_cells_match_observed_for_the_full_model() {
        let o = fill_height();
        let all: Vec<Term> = (1u32..8).map(Term::from_bits).collect();
        let fit = fit_model(&o, &ModelSpec::new(all)).unwrap();
        let im = interaction_means(&o, &fit, 0.95).unwrap();
        assert_eq!(im.len(), 3);
        // With every term fitted and a balanced design, the model's cell means equal the observed
        // ones (common practice, no source). AB cell (+,+): runs ab, abc of both replicates:
        // (2 + 6 + 3 + 5)/4 = 4 (by hand from the published data).
        let ab = &im[0];
        assert_eq!(ab.factors, (0, 1));
        for c in &ab.cells {
            assert!((c.observed.unwrap() - c.predicted).abs() < 1e-12);
            assert_eq!(c.n, 4);
        }
        assert!((ab.cells[3].observed.unwrap() - 4.0).abs() < 1e-12);
        // Observed interval half-width t(0.975, 8)·s/√4 with s² = 5/8 (pure error 5.00 on 8 df).
        let (lo, hi) = ab.cells[3].observed_interval.unwrap();
        let t = t_quantile(0.975, 8).unwrap();
        assert!(((hi - lo) / 2.0 - t * (5.0f64 / 8.0).sqrt() / 2.0).abs() < 1e-12);
    }

    #[test]
    fn cube_corners_and_errors() {
        let o = fill_height();
        let fit = fit_model(&o, &ModelSpec::new((0..3).map(Term::main).collect())).unwrap();
        let cube = cube_plot(&o, &fit, [0, 1, 2], 0.95).unwrap();
        assert_eq!(cube.corners.len(), 8);
        // Corner abc: observed (6 + 5)/2 = 5.5 (published data, by hand).
        assert!((cube.corners[7].observed.unwrap() - 5.5).abs() < 1e-12);
        assert_eq!(
            cube_plot(&o, &fit, [0, 1, 1], 0.95).unwrap_err(),
            MeansError::Repeated('B')
        );
        assert!(matches!(
            cube_plot(&o, &fit, [0, 1, 5], 0.95),
            Err(MeansError::NoSuchFactor { index: 5, .. })
        ));
    }
}
