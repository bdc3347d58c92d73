//! Hard-to-change factors: runs grouped into whole plots, the resets they save, and the stratum of
//! every effect.
//!
//! # Plan
//! A factor that is slow or costly to reset (an oven temperature, a bath) is held fixed for a
//! group of runs, a *whole plot*; the other factors change from run to run inside it (the
//! *subplots*). The whole plots are the distinct settings of the hard-to-change factors; their
//! order is randomised, and so is the order of the runs inside each (Box & Jones 1992,
//! *Journal of Applied Statistics* 19(1); Bisgaard 2000, *Journal of Quality Technology* 32(1),
//! 39–56; from memory). The number of resets of the hard-to-change factors is the number of
//! whole plots; in a completely randomised order of N runs with `m_g` runs at each hard-to-change
//! setting g, two neighbouring runs share a setting with probability
//! `Σ m_g (m_g − 1) / (N (N − 1))`, so the expected number of settings made is
//! `1 + (N − 1)·(1 − Σ m_g (m_g − 1) / (N (N − 1)))` (derived here: each of the N − 1 changes
//! between neighbours is a reset unless both share a setting).
//!
//! # Strata
//! An effect whose column is constant inside every whole plot is a *whole-plot* effect: it is
//! estimated from the whole plots alone and judged against the whole-plot error; every other
//! effect is a *subplot* effect, judged against the (usually much smaller) subplot error. For an
//! unreplicated plan each stratum gets its own half-normal plot and its own Lenth margins
//! (Loeppky & Sitter 2002, *Journal of Quality Technology* 34(3), 229–243; from memory).

use std::collections::BTreeMap;

use crate::lenth::{Lenth, LenthError, lenth};
use crate::term::Term;

mod anova;
pub mod fraction;
pub use anova::{SplitPlotAnova, SplitPlotError, StratumError, TermTest, split_plot_anova};

/// Which error an effect is judged against.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Stratum {
    /// Constant within every whole plot: judged against the variation between whole plots.
    WholePlot,
    /// Changes within whole plots: judged against the variation within them.
    Subplot,
}

impl Stratum {
    /// The JSON key: `whole_plot` or `subplot`.
    pub fn key(self) -> &'static str {
        match self {
            Stratum::WholePlot => "whole_plot",
            Stratum::Subplot => "subplot",
        }
    }
}

/// The whole plot of each run (0-based, numbered in order of first appearance in `rows`): runs
/// with the same settings of the hard-to-change factors `htc` share a whole plot. Centre points
/// (every level 0) have their own whole plot.
pub fn whole_plots_of(rows: &[Vec<i8>], htc: &[usize]) -> Vec<usize> {
    let mut seen: BTreeMap<Vec<i8>, usize> = BTreeMap::new();
    let mut order: Vec<Vec<i8>> = Vec::new();
    rows.iter()
        .map(|r| {
            let key: Vec<i8> = htc
                .iter()
                .map(|&f| r.get(f).copied().unwrap_or(0))
                .collect();
            *seen.entry(key.clone()).or_insert_with(|| {
                order.push(key);
                order.len() - 1
            })
        })
        .collect()
}

/// The expected number of settings of the hard-to-change factors made when the same runs are
/// run in a completely random order (see the module documentation); `whole_plot` gives each
/// run's setting group.
pub fn expected_resets_randomised(whole_plot: &[usize]) -> f64 {
    let n = whole_plot.len();
    if n < 2 {
        return n as f64;
    }
    let mut sizes: BTreeMap<usize, usize> = BTreeMap::new();
    for &w in whole_plot {
        *sizes.entry(w).or_default() += 1;
    }
    let same: f64 = sizes
        .values()
        .map(|&m| (m * (m.saturating_sub(1))) as f64)
        .sum::<f64>()
        / (n * (n - 1)) as f64;
    1.0 + (n - 1) as f64 * (1.0 - same)
}

/// Run order of a split-plot plan: the whole plots in random order, the runs of each in random
/// order, from `seed` (the same shuffle as other plans). Returns the run indices in the order
/// to run them.
pub fn split_plot_order(whole_plot: &[usize], seed: u64, randomise: bool) -> Vec<usize> {
    let count = whole_plot.iter().copied().max().map_or(0, |m| m + 1);
    let plots: Vec<usize> = if randomise {
        crate::plan::shuffled_positions(count, seed)
    } else {
        (0..count).collect()
    };
    let mut out = Vec::with_capacity(whole_plot.len());
    for (i, &p) in plots.iter().enumerate() {
        let members: Vec<usize> = (0..whole_plot.len())
            .filter(|&r| whole_plot[r] == p)
            .collect();
        let inner: Vec<usize> = if randomise {
            crate::plan::shuffled_positions(members.len(), seed.wrapping_add(1 + i as u64))
        } else {
            (0..members.len()).collect()
        };
        out.extend(inner.into_iter().map(|j| members[j]));
    }
    out
}

/// A split-plot layout of a plan's runs.
#[derive(Debug, Clone, PartialEq)]
pub struct WholePlotLayout {
    /// Run indices in the order to run them.
    pub order: Vec<usize>,
    /// Whole plot of each run (by index), 1-based, numbered in the order they are run.
    pub whole_plot: Vec<usize>,
    /// Whole plots: the settings of the hard-to-change factors made.
    pub resets: usize,
    /// Settings made on average when the same runs are completely randomised.
    pub resets_if_randomised: f64,
}

/// Groups runs (coded `rows` with their `replicate`) into whole plots of the hard-to-change
/// factors `htc` — each replicate sets them anew, so its whole plots are its own (replicated
/// whole plots give the whole-plot effects an error of their own) — and orders them (see
/// [`split_plot_order`]).
pub fn whole_plot_layout(
    rows: &[Vec<i8>],
    replicate: &[u32],
    htc: &[usize],
    seed: u64,
    randomise: bool,
) -> WholePlotLayout {
    let k = rows.first().map_or(0, Vec::len);
    let keyed: Vec<Vec<i8>> = rows
        .iter()
        .zip(replicate)
        .map(|(r, &rep)| {
            let mut key = r.clone();
            key.push(i8::try_from(rep).unwrap_or(i8::MAX));
            key
        })
        .collect();
    let mut keys = htc.to_vec();
    keys.push(k);
    let wp = whole_plots_of(&keyed, &keys);
    let order = split_plot_order(&wp, seed, randomise);
    let mut number = vec![0usize; wp.iter().copied().max().map_or(0, |m| m + 1)];
    let mut next = 1;
    for &i in &order {
        if number[wp[i]] == 0 {
            number[wp[i]] = next;
            next += 1;
        }
    }
    WholePlotLayout {
        whole_plot: wp.iter().map(|&w| number[w]).collect(),
        order,
        resets: next - 1,
        // A random order resets whenever the hard-to-change setting itself changes.
        resets_if_randomised: expected_resets_randomised(&whole_plots_of(rows, htc)),
    }
}

/// The stratum of `term` in the plan with coded `rows` grouped by `whole_plot`.
pub fn stratum_of(term: Term, rows: &[Vec<i8>], whole_plot: &[usize]) -> Stratum {
    let mut value: BTreeMap<usize, i8> = BTreeMap::new();
    for (r, row) in rows.iter().enumerate() {
        let v: i8 = term
            .factors()
            .map(|f| row.get(f).copied().unwrap_or(0))
            .product();
        match value.get(&whole_plot[r]) {
            Some(&w) if w != v => return Stratum::Subplot,
            Some(_) => {}
            None => {
                value.insert(whole_plot[r], v);
            }
        }
    }
    Stratum::WholePlot
}

/// Lenth's margins of each stratum from `(term, effect)` pairs, each stratum on its own
/// contrasts; a stratum with too few contrasts (or none) gets the reason.
pub fn lenth_by_stratum(
    effects: &[(Term, f64)],
    rows: &[Vec<i8>],
    whole_plot: &[usize],
) -> BTreeMap<Stratum, Result<Lenth, LenthError>> {
    let mut by: BTreeMap<Stratum, Vec<f64>> = BTreeMap::new();
    by.insert(Stratum::WholePlot, Vec::new());
    by.insert(Stratum::Subplot, Vec::new());
    for &(t, e) in effects {
        by.entry(stratum_of(t, rows, whole_plot))
            .or_default()
            .push(e);
    }
    by.into_iter().map(|(s, c)| (s, lenth(&c))).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn full(k: usize) -> Vec<Vec<i8>> {
        (0..1usize << k)
            .map(|i| {
                (0..k)
                    .map(|f| if i >> f & 1 == 1 { 1 } else { -1 })
                    .collect()
            })
            .collect()
    }

    #[test]
    fn one_hard_to_change_factor_of_a_two_to_the_four() {
        // 2^4 with A hard to change: two whole plots of eight runs (by hand).
        let rows = full(4);
        let wp = whole_plots_of(&rows, &[0]);
        assert_eq!(wp.iter().filter(|&&w| w == 0).count(), 8);
        assert_eq!(wp.iter().copied().max(), Some(1));
        // Randomised completely: 1 + 15·(1 − 2·8·7/(16·15)) = 1 + 15·(8/15) = 9 resets on average
        // (by hand), against 2 whole plots.
        assert!((expected_resets_randomised(&wp) - 9.0).abs() < 1e-12);
        // A is a whole-plot effect; B, AB and the rest are subplot effects.
        let t = |l: &str| Term::parse(l, 4).unwrap_or(Term::IDENTITY);
        assert_eq!(stratum_of(t("A"), &rows, &wp), Stratum::WholePlot);
        assert_eq!(stratum_of(t("B"), &rows, &wp), Stratum::Subplot);
        assert_eq!(stratum_of(t("AB"), &rows, &wp), Stratum::Subplot);
    }

    #[test]
    fn two_hard_to_change_factors_make_their_interaction_whole_plot() {
        let rows = full(4);
        let wp = whole_plots_of(&rows, &[0, 1]);
        assert_eq!(wp.iter().copied().max(), Some(3), "four whole plots");
        let t = |l: &str| Term::parse(l, 4).unwrap_or(Term::IDENTITY);
        assert_eq!(stratum_of(t("AB"), &rows, &wp), Stratum::WholePlot);
        assert_eq!(stratum_of(t("AC"), &rows, &wp), Stratum::Subplot);
    }

    #[test]
    fn the_order_keeps_each_whole_plot_together() {
        let rows = full(4);
        let wp = whole_plots_of(&rows, &[0, 2]);
        let order = split_plot_order(&wp, 11, true);
        assert_eq!(order.len(), 16);
        let mut sorted = order.clone();
        sorted.sort_unstable();
        assert_eq!(sorted, (0..16).collect::<Vec<_>>());
        // The whole plot changes exactly three times along the order (four whole plots).
        let changes = order.windows(2).filter(|w| wp[w[0]] != wp[w[1]]).count();
        assert_eq!(changes, 3);
    }

    #[test]
    fn each_stratum_has_its_own_lenth_margins() {
        let rows = full(4);
        let wp = whole_plots_of(&rows, &[0, 1]);
        // Invented effects: whole-plot A, B, AB (three contrasts, the fewest Lenth's method
        // takes) and seven subplot ones.
        let t = |l: &str| Term::parse(l, 4).unwrap_or(Term::IDENTITY);
        let effects: Vec<(Term, f64)> = [
            ("A", 8.0),
            ("B", 1.0),
            ("AB", 0.5),
            ("C", 3.0),
            ("D", 0.2),
            ("AC", 0.1),
            ("AD", -0.3),
            ("BC", 0.25),
            ("BD", -0.15),
            ("CD", 0.05),
        ]
        .iter()
        .map(|(l, e)| (t(l), *e))
        .collect();
        let by = lenth_by_stratum(&effects, &rows, &wp);
        let sub = by.get(&Stratum::Subplot).and_then(|r| r.as_ref().ok());
        assert_eq!(sub.map(|l| l.m), Some(7));
        let whole = by.get(&Stratum::WholePlot).and_then(|r| r.as_ref().ok());
        assert_eq!(whole.map(|l| l.m), Some(3));
        // The large whole-plot effect does not inflate the subplot margin: the subplot PSE
        // comes from the subplot contrasts alone.
        let pooled = lenth(&effects.iter().map(|(_, e)| *e).collect::<Vec<_>>());
        assert!(pooled.is_ok());
    }
}
