//! The fraction of a split-plot study: a minimum-aberration fractional factorial split-plot
//! (FFSP) design.
//!
//! # Structure
//! With `k₁` hard-to-change (whole-plot) factors, `k₂` easy (subplot) factors and N = 2^q runs in
//! W = 2^m₁ whole plots, write every factor's column as a vector over GF(2)^q with the first m₁
//! coordinates spanning the whole-plot space V₁. The whole-plot factors' columns lie in V₁ and span
//! it, so their settings make exactly W whole plots; every subplot factor's column lies outside
//! V₁, so it changes inside every whole plot. Equivalently, no word of the defining relation
//! holds exactly one subplot letter (Huang, Chen & Voelkel 1998, *Technometrics* 40(4), 314–326;
//! Bingham & Sitter 1999, *Technometrics* 41(1), 62–70; from memory). Without loss of generality
//! m₁ whole-plot factors are the unit vectors of V₁ and q − m₁ subplot factors the remaining unit
//! vectors; the rest choose columns: whole-plot ones from V₁, subplot ones from outside it.
//!
//! # Criterion
//! Among those designs the one with the smallest word-length pattern (A₃, A₄, …) is the
//! minimum-aberration FFSP design of Huang, Chen & Voelkel (1998), the criterion Bingham & Sitter
//! (1999) tabulate for each number of whole plots. Fewer whole plots mean fewer resets of the
//! hard-to-change factors but, often, more aberration.
//!
//! # Search
//! Depth-first over the free columns in increasing order (whole-plot columns first), counting the
//! words each new column adds to the defining group incrementally; a partial design whose
//! pattern is already not below the best complete one found is cut (words are only ever added,
//! so it bounds every completion — branch and bound, Land & Doig 1960). No isomorphism pruning:
//! the search is exhaustive and proves its result when it finishes inside the budget; otherwise
//! the best design found is returned unproven. A greedy completion seeds the incumbent.

use std::cmp::Ordering;
use std::time::Instant;

use crate::design::{DesignError, FractionalDesign, Generator, check_run_count};
use crate::search::SearchBudget;
use crate::term::{SignedTerm, Term};

/// Most generated columns the search takes (its word table has 2^p entries).
pub const MAX_GENERATED: usize = 16;

/// Why no split-plot fraction can be made.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum SplitPlotFractionError {
    /// The run size does not suit the number of factors.
    #[error(transparent)]
    Size(#[from] DesignError),
    /// Every factor is hard to change, or none is.
    #[error("a split-plot study needs at least one hard-to-change and one easy-to-change factor")]
    Strata,
    /// The whole-plot count cannot hold these factors in this run size.
    #[error(
        "{whole_plots} whole plots cannot be made with {hard} hard-to-change and {easy} easy factors in {runs} runs (possible: {possible})"
    )]
    WholePlots {
        /// Whole plots asked for.
        whole_plots: usize,
        /// Hard-to-change factors.
        hard: usize,
        /// Easy factors.
        easy: usize,
        /// Runs.
        runs: usize,
        /// The counts that work, in words.
        possible: String,
    },
    /// Too many generators for the search.
    #[error("{0} generated factors are more than the split-plot search takes ({MAX_GENERATED})")]
    TooManyGenerators(usize),
}

/// A split-plot fraction found by [`split_plot_fraction`].
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SplitPlotFraction {
    /// The design, with the factors in their own order.
    pub design: FractionalDesign,
    /// Whole plots per replicate (the resets of the hard-to-change factors).
    pub whole_plots: usize,
    /// `(A3, A4, ..., Ak)`.
    pub word_length_pattern: Vec<usize>,
    /// Whether the search finished (no FFSP design of this size and whole-plot count has less
    /// aberration).
    pub proven_minimum_aberration: bool,
}

/// The whole-plot counts possible for `hard` hard-to-change and `easy` easy factors in `runs`
/// runs (a power of two), fewest first.
pub fn whole_plot_choices(hard: usize, easy: usize, runs: usize) -> Vec<usize> {
    if hard == 0 || easy == 0 || !runs.is_power_of_two() || runs < 4 {
        return Vec::new();
    }
    let q = runs.trailing_zeros() as usize;
    (1..q)
        .filter(|&m1| {
            m1 <= hard && hard < (1usize << m1) && easy + m1 >= q && easy <= runs - (1usize << m1)
        })
        .map(|m1| 1usize << m1)
        .collect()
}

/// The minimum-aberration split-plot fraction of `k` factors in `runs` runs whose factors `htc`
/// (0-based) are hard to change, in `whole_plots` whole plots (default: the most possible, at
/// most 2^|htc|, which keeps the hard-to-change factors' own settings a full factorial when the
/// run size allows).
pub fn split_plot_fraction(
    k: usize,
    htc: &[usize],
    runs: usize,
    whole_plots: Option<usize>,
    budget: &SearchBudget,
) -> Result<SplitPlotFraction, SplitPlotFractionError> {
    check_run_count(k, runs)?;
    let mut hard: Vec<usize> = htc.iter().copied().filter(|&f| f < k).collect();
    hard.sort_unstable();
    hard.dedup();
    let easy: Vec<usize> = (0..k).filter(|f| !hard.contains(f)).collect();
    if hard.is_empty() || easy.is_empty() {
        return Err(SplitPlotFractionError::Strata);
    }
    let choices = whole_plot_choices(hard.len(), easy.len(), runs);
    let w = match whole_plots {
        Some(w) if choices.contains(&w) => w,
        None if !choices.is_empty() => choices.iter().copied().max().unwrap_or(2),
        _ => {
            return Err(SplitPlotFractionError::WholePlots {
                whole_plots: whole_plots.unwrap_or(0),
                hard: hard.len(),
                easy: easy.len(),
                runs,
                possible: if choices.is_empty() {
                    "none".into()
                } else {
                    choices
                        .iter()
                        .map(ToString::to_string)
                        .collect::<Vec<_>>()
                        .join(", ")
                },
            });
        }
    };
    let q = runs.trailing_zeros() as usize;
    let m1 = w.trailing_zeros() as usize;
    let p = k - q;
    if p > MAX_GENERATED {
        return Err(SplitPlotFractionError::TooManyGenerators(p));
    }
    let v1 = 1u32 << m1;
    let wp_free: Vec<u32> = (1..v1).filter(|c| c.count_ones() >= 2).collect();
    let sp_free: Vec<u32> = (v1..1u32 << q)
        .filter(|&c| !(c.is_power_of_two() && c >= v1))
        .collect();
    let mut search = Search {
        k,
        wp_need: hard.len() - m1,
        sp_need: easy.len() - (q - m1),
        wp_free,
        sp_free,
        best: None,
        deadline: Instant::now().checked_add(budget.time),
        nodes: 0,
        out_of_time: false,
    };
    search.seed();
    let mut table = Words::new(k);
    let mut chosen = Vec::new();
    search.dfs(&mut table, &mut chosen, 0);
    let Some((columns, pattern)) = search.best.clone() else {
        // Every feasible whole-plot count has a design (the choices guarantee enough free
        // columns), so this is reported rather than hidden.
        return Err(SplitPlotFractionError::WholePlots {
            whole_plots: w,
            hard: hard.len(),
            easy: easy.len(),
            runs,
            possible: "none found".into(),
        });
    };
    // Columns of the factors: whole-plot factors first the units of V1 then their free columns;
    // subplot factors the remaining units then theirs.
    let mut column = vec![0u32; k];
    let (wp_cols, sp_cols) = columns.split_at(search.wp_need);
    for (i, &f) in hard.iter().enumerate() {
        column[f] = if i < m1 { 1 << i } else { wp_cols[i - m1] };
    }
    for (i, &f) in easy.iter().enumerate() {
        column[f] = if i < q - m1 {
            1 << (m1 + i)
        } else {
            sp_cols[i - (q - m1)]
        };
    }
    let basic_of_unit: Vec<usize> = (0..q)
        .filter_map(|b| (0..k).find(|&f| column[f] == 1 << b))
        .collect();
    let generators = (0..k)
        .filter(|&f| !column[f].is_power_of_two())
        .map(|f| {
            let bits = (0..q)
                .filter(|&b| column[f] >> b & 1 == 1)
                .fold(0u32, |m, b| m | 1 << basic_of_unit[b]);
            Generator {
                factor: f,
                word: SignedTerm::plus(Term::from_bits(bits)),
            }
        })
        .collect();
    let design = FractionalDesign::with_generators(k, generators)?;
    Ok(SplitPlotFraction {
        design,
        whole_plots: w,
        word_length_pattern: pattern.iter().map(|&a| a as usize).collect(),
        proven_minimum_aberration: !search.out_of_time,
    })
}

/// Every subset of the chosen generated columns with its word's basic part and size.
struct Words {
    k: usize,
    /// `(xor of the subset's columns, subset size)`, the empty subset first.
    subsets: Vec<(u32, u32)>,
    /// `A3 ..= Ak`.
    pattern: Vec<u64>,
}

impl Words {
    fn new(k: usize) -> Words {
        Words {
            k,
            subsets: vec![(0, 0)],
            pattern: vec![0; k.saturating_sub(2)],
        }
    }

    /// The words added by column `c`, or `None` when one is shorter than 3 (a repeated column).
    fn additions(&self, c: u32) -> Option<Vec<u64>> {
        let mut add = vec![0u64; self.k.saturating_sub(2)];
        for &(x, s) in &self.subsets {
            let len = ((x ^ c).count_ones() + s + 1) as usize;
            if len < 3 {
                return None;
            }
            add[len - 3] += 1;
        }
        Some(add)
    }

    fn push(&mut self, c: u32, add: &[u64]) {
        let n = self.subsets.len();
        for i in 0..n {
            let (x, s) = self.subsets[i];
            self.subsets.push((x ^ c, s + 1));
        }
        for (a, d) in self.pattern.iter_mut().zip(add) {
            *a += d;
        }
    }

    fn pop(&mut self, add: &[u64]) {
        let n = self.subsets.len() / 2;
        self.subsets.truncate(n);
        for (a, d) in self.pattern.iter_mut().zip(add) {
            *a -= d;
        }
    }
}

struct Search {
    k: usize,
    wp_need: usize,
    sp_need: usize,
    wp_free: Vec<u32>,
    sp_free: Vec<u32>,
    best: Option<(Vec<u32>, Vec<u64>)>,
    deadline: Option<Instant>,
    nodes: u64,
    out_of_time: bool,
}

impl Search {
    /// The candidates of position `depth` (whole-plot columns first).
    fn pool(&self, depth: usize) -> &[u32] {
        if depth < self.wp_need {
            &self.wp_free
        } else {
            &self.sp_free
        }
    }

    /// Whether `pattern` is below the incumbent.
    fn beats(&self, pattern: &[u64]) -> bool {
        self.best
            .as_ref()
            .is_none_or(|(_, b)| pattern.cmp(b) == Ordering::Less)
    }

    /// A greedy design: at each position the candidate adding the fewest short words.
    fn seed(&mut self) {
        let mut table = Words::new(self.k);
        let mut chosen: Vec<u32> = Vec::new();
        for depth in 0..self.wp_need + self.sp_need {
            let mut pick: Option<(u32, Vec<u64>)> = None;
            for &c in self.pool(depth) {
                if chosen.contains(&c) {
                    continue;
                }
                if let Some(add) = table.additions(c)
                    && pick.as_ref().is_none_or(|(_, a)| add < *a)
                {
                    pick = Some((c, add));
                }
            }
            let Some((c, add)) = pick else {
                return;
            };
            table.push(c, &add);
            chosen.push(c);
        }
        self.best = Some((chosen, table.pattern.clone()));
    }

    fn dfs(&mut self, table: &mut Words, chosen: &mut Vec<u32>, from: usize) {
        let depth = chosen.len();
        if depth == self.wp_need + self.sp_need {
            if self.beats(&table.pattern) {
                self.best = Some((chosen.clone(), table.pattern.clone()));
            }
            return;
        }
        self.nodes += 1;
        if self.nodes.is_multiple_of(1024) && self.deadline.is_some_and(|d| Instant::now() >= d) {
            self.out_of_time = true;
        }
        if self.out_of_time {
            return;
        }
        // Positions restart at 0 when the search moves from whole-plot to subplot columns.
        let start = if depth == self.wp_need { 0 } else { from };
        let pool: Vec<u32> = self.pool(depth).to_vec();
        let remaining = if depth < self.wp_need {
            self.wp_need - depth
        } else {
            self.wp_need + self.sp_need - depth
        };
        for i in start..pool.len() {
            if pool.len() - i < remaining {
                break;
            }
            let c = pool[i];
            let Some(add) = table.additions(c) else {
                continue;
            };
            let mut next = table.pattern.clone();
            for (a, d) in next.iter_mut().zip(&add) {
                *a += d;
            }
            if !self.beats(&next) {
                continue;
            }
            table.push(c, &add);
            chosen.push(c);
            self.dfs(table, chosen, i + 1);
            chosen.pop();
            table.pop(&add);
            if self.out_of_time {
                return;
            }
        }
    }
}

#[cfg(test)]
mod tests;
