//! The analysis of variance of a split-plot study whose whole plots are replicated: each effect
//! tested against the error of its own stratum.
//!
//! # Formulas
//! For a balanced study (every whole plot holds the same number `n` of runs, the factor columns
//! ±1 and orthogonal, every run with a value), with `N` runs in `W` whole plots, the sum of
//! squares of a term with coefficient `b` is `N·b²`. The **whole-plot error** is the variation of
//! the whole-plot means about the whole-plot terms of the model:
//!
//! ```text
//! SS_wp = n · Σ_w (ȳ_w − ŷ_w)²,   df = W − 1 − p_wp
//! ```
//!
//! with `ŷ_w` the whole-plot means fitted by the model's whole-plot terms. The **subplot error** is
//! what is left inside the whole plots after the subplot terms:
//!
//! ```text
//! SS_sp = Σ_runs (y − ȳ_w)² − Σ_subplot terms N·b²,   df = N − W − p_sp
//! ```
//!
//! Each whole-plot term is tested by `F = N·b² / MS_wp`, each subplot term by `N·b² / MS_sp`
//! (Bisgaard 2000, *Journal of Quality Technology* 32(1), 39–56; Box & Jones 1992; the split-plot
//! analysis of variance of Montgomery, *Design and Analysis of Experiments*, chapter on split-plot
//! designs; all from memory). The whole-plot error estimates `n·σ²_wp + σ²`, the subplot error
//! `σ²`: judging a whole-plot effect against the subplot error, as a completely randomised
//! analysis does, finds too many whole-plot effects.

use std::collections::BTreeMap;

use super::{Stratum, stratum_of};
use crate::anova::f_upper_p;
use crate::term::Term;

/// Why the split-plot analysis of variance cannot be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum SplitPlotError {
    /// Whole plots of different sizes, or a missing value.
    #[error(
        "the split-plot analysis needs every whole plot complete and of one size (a run without a value makes it unbalanced)"
    )]
    Unbalanced,
    /// The columns of the model are not orthogonal.
    #[error("the split-plot analysis needs orthogonal ±1 columns for the model's terms")]
    NotOrthogonal,
    /// No degrees of freedom for a stratum's error.
    #[error("no {0} error is left: replicate the whole plots, or take terms out of the model")]
    NoErrorDf(&'static str),
}

/// One stratum's error.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StratumError {
    /// Sum of squares.
    pub ss: f64,
    /// Degrees of freedom.
    pub df: usize,
    /// Mean square.
    pub ms: f64,
}

/// One term's test.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TermTest {
    /// The term.
    pub term: Term,
    /// Its stratum.
    pub stratum: Stratum,
    /// Coefficient (half the effect).
    pub coefficient: f64,
    /// Sum of squares `N·b²` (one degree of freedom).
    pub ss: f64,
    /// F against its stratum's error.
    pub f: f64,
    /// Upper-tail p of `f`.
    pub p: Option<f64>,
}

/// The split-plot analysis of variance.
#[derive(Debug, Clone, PartialEq)]
pub struct SplitPlotAnova {
    /// Whole-plot error.
    pub whole_plot_error: StratumError,
    /// Subplot error.
    pub subplot_error: StratumError,
    /// One test per model term, in the order given.
    pub terms: Vec<TermTest>,
}

/// The analysis of `y` (one value per row of coded `rows`, whole plots `whole_plot`) for the
/// model `terms` (see the module documentation).
pub fn split_plot_anova(
    rows: &[Vec<i8>],
    y: &[f64],
    whole_plot: &[usize],
    terms: &[Term],
) -> Result<SplitPlotAnova, SplitPlotError> {
    let n_runs = rows.len();
    if n_runs == 0 || y.len() != n_runs || whole_plot.len() != n_runs {
        return Err(SplitPlotError::Unbalanced);
    }
    let mut members: BTreeMap<usize, Vec<usize>> = BTreeMap::new();
    for (r, &w) in whole_plot.iter().enumerate() {
        members.entry(w).or_default().push(r);
    }
    let size = members.values().next().map_or(0, Vec::len);
    if members.values().any(|m| m.len() != size) || y.iter().any(|v| !v.is_finite()) {
        return Err(SplitPlotError::Unbalanced);
    }
    let col = |t: Term| -> Vec<f64> {
        rows.iter()
            .map(|r| {
                f64::from(
                    t.factors()
                        .map(|f| r.get(f).copied().unwrap_or(0))
                        .product::<i8>(),
                )
            })
            .collect()
    };
    let n = n_runs as f64;
    let columns: Vec<Vec<f64>> = terms.iter().map(|&t| col(t)).collect();
    for (i, c) in columns.iter().enumerate() {
        if c.iter().sum::<f64>().abs() > 1e-9 || c.iter().any(|v| v.abs() != 1.0) {
            return Err(SplitPlotError::NotOrthogonal);
        }
        for d in &columns[i + 1..] {
            if c.iter().zip(d).map(|(a, b)| a * b).sum::<f64>().abs() > 1e-9 {
                return Err(SplitPlotError::NotOrthogonal);
            }
        }
    }
    let strata: Vec<Stratum> = terms
        .iter()
        .map(|&t| stratum_of(t, rows, whole_plot))
        .collect();
    let b: Vec<f64> = columns
        .iter()
        .map(|c| c.iter().zip(y).map(|(a, v)| a * v).sum::<f64>() / n)
        .collect();
    let grand = y.iter().sum::<f64>() / n;
    let mean_of: BTreeMap<usize, f64> = members
        .iter()
        .map(|(w, m)| (*w, m.iter().map(|&r| y[r]).sum::<f64>() / m.len() as f64))
        .collect();
    // Whole-plot means about the whole-plot terms of the model.
    let mut ss_wp = 0.0;
    for (w, m) in &members {
        let r = m[0];
        let fitted = grand
            + terms
                .iter()
                .enumerate()
                .filter(|(i, _)| strata[*i] == Stratum::WholePlot)
                .map(|(i, _)| b[i] * columns[i][r])
                .sum::<f64>();
        ss_wp += size as f64 * (mean_of[w] - fitted).powi(2);
    }
    let p_wp = strata.iter().filter(|s| **s == Stratum::WholePlot).count();
    let p_sp = terms.len() - p_wp;
    let df_wp = members.len().checked_sub(1 + p_wp).filter(|d| *d > 0);
    let within: f64 = y
        .iter()
        .zip(whole_plot)
        .map(|(v, w)| (v - mean_of[w]).powi(2))
        .sum();
    let ss_sp_terms: f64 = (0..terms.len())
        .filter(|&i| strata[i] == Stratum::Subplot)
        .map(|i| n * b[i] * b[i])
        .sum();
    let df_sp = n_runs.checked_sub(members.len() + p_sp).filter(|d| *d > 0);
    let df_wp = df_wp.ok_or(SplitPlotError::NoErrorDf("whole-plot"))?;
    let df_sp = df_sp.ok_or(SplitPlotError::NoErrorDf("subplot"))?;
    let ss_sp = (within - ss_sp_terms).max(0.0);
    let wp = StratumError {
        ss: ss_wp,
        df: df_wp,
        ms: ss_wp / df_wp as f64,
    };
    let sp = StratumError {
        ss: ss_sp,
        df: df_sp,
        ms: ss_sp / df_sp as f64,
    };
    let tests = terms
        .iter()
        .enumerate()
        .map(|(i, &term)| {
            let ss = n * b[i] * b[i];
            let err = if strata[i] == Stratum::WholePlot {
                wp
            } else {
                sp
            };
            let f = if err.ms > 0.0 {
                ss / err.ms
            } else {
                f64::INFINITY
            };
            TermTest {
                term,
                stratum: strata[i],
                coefficient: b[i],
                ss,
                f,
                p: f_upper_p(f, 1, err.df),
            }
        })
        .collect();
    Ok(SplitPlotAnova {
        whole_plot_error: wp,
        subplot_error: sp,
        terms: tests,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_replicated_two_by_two_split_plot_by_hand() {
        // Invented: A hard to change (whole plots), B easy; 2 replicates of each A setting, so
        // 4 whole plots of 2 runs. Whole plot means and runs (A, B, y):
        //   wp1: A−  (B−, 10) (B+, 14)   mean 12
        //   wp2: A+  (B−, 20) (B+, 26)   mean 23
        //   wp3: A−  (B−, 12) (B+, 15)   mean 13.5
        //   wp4: A+  (B−, 19) (B+, 24)   mean 21.5
        // By hand: N = 8, grand mean 17.5; b_A = (23 + 21.5 − 12 − 13.5)/4 = 4.75.
        // Whole-plot fitted means 12.75 (A−) and 22.25 (A+):
        // SS_wp = 2·(0.75² + 0.75² + 0.75² + 0.75²) = 4.5 on 4 − 1 − 1 = 2 df, MS 2.25.
        let rows: Vec<Vec<i8>> = vec![
            vec![-1, -1],
            vec![-1, 1],
            vec![1, -1],
            vec![1, 1],
            vec![-1, -1],
            vec![-1, 1],
            vec![1, -1],
            vec![1, 1],
        ];
        let y = [10.0, 14.0, 20.0, 26.0, 12.0, 15.0, 19.0, 24.0];
        let wp = [0, 0, 1, 1, 2, 2, 3, 3];
        let t = |l: &str| Term::parse(l, 2).unwrap_or(Term::IDENTITY);
        let a = match split_plot_anova(&rows, &y, &wp, &[t("A"), t("B")]) {
            Ok(a) => a,
            Err(e) => panic!("{e}"),
        };
        assert!((a.terms[0].coefficient - 4.75).abs() < 1e-12);
        assert_eq!(a.terms[0].stratum, Stratum::WholePlot);
        assert_eq!(a.terms[1].stratum, Stratum::Subplot);
        assert_eq!(a.whole_plot_error.df, 2);
        assert!((a.whole_plot_error.ss - 4.5).abs() < 1e-12);
        // b_B: B+ minus B− runs: (14 − 10 + 26 − 20 + 15 − 12 + 24 − 19)/8 = 18/8 = 2.25.
        assert!((a.terms[1].coefficient - 2.25).abs() < 1e-12);
        // Subplot error: each plot of two runs contributes d²/2 about its mean, d its B
        // difference: (16 + 36 + 9 + 25)/2 = 43; minus SS_B = 8·2.25² = 40.5 leaves 2.5 on
        // 8 − 4 − 1 = 3 df.
        assert_eq!(a.subplot_error.df, 3);
        assert!(
            (a.subplot_error.ss - 2.5).abs() < 1e-12,
            "{}",
            a.subplot_error.ss
        );
        // F for A: 8·4.75² / 2.25 = 180.5 / 2.25 = 80.22...; for B: 40.5 / (2.5/3) = 48.6.
        assert!((a.terms[0].f - 180.5 / 2.25).abs() < 1e-9);
        assert!((a.terms[1].f - 48.6).abs() < 1e-9);
    }

    #[test]
    fn unbalanced_or_unreplicated_studies_are_refused() {
        let rows: Vec<Vec<i8>> = vec![vec![-1, -1], vec![-1, 1], vec![1, -1], vec![1, 1]];
        let y = [1.0, 2.0, 3.0, 4.0];
        let t = |l: &str| Term::parse(l, 2).unwrap_or(Term::IDENTITY);
        // Two whole plots (A) and the model A: no whole-plot error left.
        assert_eq!(
            split_plot_anova(&rows, &y, &[0, 0, 1, 1], &[t("A"), t("B")]),
            Err(SplitPlotError::NoErrorDf("whole-plot"))
        );
        assert_eq!(
            split_plot_anova(&rows, &y, &[0, 0, 0, 1], &[t("A")]),
            Err(SplitPlotError::Unbalanced)
        );
    }
}
