//! Automatic choice of a design: the minimum-aberration 2^(k−p) fraction for k factors in N runs.
//!
//! # Minimum aberration
//! Of two fractions of the same size, the one with the lexicographically smaller word-length
//! pattern `(A3, A4, ..., Ak)` has less aberration: it first has fewer words of length 3, or as
//! many of those and fewer of length 4, and so on. A minimum-aberration design is one with the
//! smallest pattern of all (Fries & Hunter 1980, *Technometrics* 22, 601–608). It has the highest
//! resolution possible and, among those, the fewest shortest words.
//!
//! # How the search works
//! A 2^(k−p) fraction in N = 2^q runs takes the first q letters as basic factors (the full 2^q
//! factorial) and sets each of the last p factors to a product of at least two basic factors, so a
//! design is a choice of p distinct interaction columns of the 2^q factorial. Written as bit sets
//! over the basic factors, a set of factors is a defining word exactly when their columns multiply
//! to the identity (XOR to zero): `A_i` is the number of i-subsets of the k columns whose product
//! is `I` (Box & Hunter 1961, *Technometrics* 3, 311–351, on defining relations). The search is a
//! depth-first branch and bound over the columns in a fixed order, after Chen, Sun & Wu (1993,
//! *International Statistical Review* 61, 131–145), who built their catalogue by adding columns one
//! at a time and discarding isomorphic designs:
//!
//! * **Counting words incrementally.** For every column value x of the 2^q factorial the search
//!   keeps `n_j(x)`, the number of j-subsets of the columns chosen so far whose product is x.
//!   Adding a column z changes them by `n_j(x) += n_{j−1}(x·z)` (take z or leave it), so `A_i =
//!   n_i(I)` and the words of length i that a candidate column y would add number `n_{i−1}(y)`.
//!   This recurrence is the elementary subset-sum count over GF(2) (stated here, not taken from a
//!   source).
//! * **Bounds.** Words are only ever added, so the pattern of a partial design plus the `r` smallest
//!   (lexicographically) per-column additions of the candidates still allowed is a lower bound on
//!   every completion with r more columns. A branch whose bound is not below the best design
//!   found so far is cut, and so is every candidate column whose own addition already reaches it
//!   (branch and bound, Land & Doig 1960, *Econometrica* 28, 497–520). With one or two columns to
//!   go the best completion is found exactly (after adding c, a column y adds
//!   `n_j(y) + n_{j−1}(y·c)` words of length j + 1). The incumbent is seeded by greedy
//!   constructions that add, at each step, the column adding the fewest short words.
//! * **Isomorphism pruning.** Relabelling the basic factors maps designs to isomorphic designs
//!   with the same pattern. The search keeps a partial design only if its column set, as a sorted
//!   list in the search order, is the smallest among its images under the relabellings used
//!   (orderly generation, Read 1978, *Annals of Discrete Mathematics* 2, 107–120): with up to 7
//!   basic factors (N ≤ 128) all q! relabellings, above that the transpositions of two basic
//!   factors. Any set of relabellings is safe: the smallest member of every isomorphism class
//!   survives the test at every step, so the optimum is never lost.
//! * **Many runs, few generators.** Beyond 2^16 runs, and from 256 runs on for up to three
//!   generators, the search works on the other side of the duality: the defining contrast subgroup is a binary linear code of length k and dimension p
//!   whose weight distribution is the word-length pattern (MacWilliams & Sloane 1977, *The Theory
//!   of Error-Correcting Codes*, ch. 1). In systematic form each basic factor is a vector of p bits
//!   saying which generators contain it; the search chooses those q vectors (repeats allowed) in
//!   increasing order and cuts a branch once some word can no longer reach the resolution of the
//!   incumbent, or once more words than the incumbent has at that length are bound to stay there
//!   (a word that no later vector can lengthen is final). This engine has no isomorphism pruning
//!   and finishes quickly only for few generators (p ≤ 3); beyond that it is budget-limited.
//!
//! Searches run under a time budget. When the exact search finishes, the outcome is proven to be
//! of minimum aberration; when the budget runs out first, the best design found is returned with
//! `proven_minimum_aberration: false`. The search is deterministic: the same inputs give the same
//! generators whenever it finishes within its budget.

use crate::design::{DesignError, FractionalDesign, Generator, check_run_count, smallest_runs};
use crate::ofat;
use crate::term::{MAX_FACTORS, SignedTerm, Term};
use serde::{Deserialize, Serialize};
use std::cmp::Ordering;
use std::collections::HashMap;
use std::time::{Duration, Instant};

/// How long a search may run before it returns the best design found so far.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SearchBudget {
    /// Wall-clock time allowed for the search (for [`design_options`], for the whole list).
    pub time: Duration,
}

impl SearchBudget {
    /// A budget of `time`.
    pub fn new(time: Duration) -> SearchBudget {
        SearchBudget { time }
    }
}

impl Default for SearchBudget {
    /// Two seconds: enough to prove every design of up to 64 runs.
    fn default() -> SearchBudget {
        SearchBudget {
            time: Duration::from_secs(2),
        }
    }
}

/// Why a search cannot start.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum SearchError {
    /// k or N is outside what a two-level fraction allows (the same checks and messages as
    /// building a design: [`crate::design::check_run_count`]).
    #[error(transparent)]
    Size(DesignError),
    /// The design found could not be built (an internal inconsistency, reported rather than hidden).
    #[error("the design found could not be built: {0}")]
    Design(#[from] DesignError),
}

/// The result of a minimum-aberration search.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SearchOutcome {
    /// The design: the first q letters basic, the last p generated, each generator a positive
    /// product of basic factors.
    pub design: FractionalDesign,
    /// `(A3, A4, ..., Ak)` of the design (index 0 counts words of length 3).
    pub word_length_pattern: Vec<usize>,
    /// `true` when the search finished, so no design of this size has less aberration; `false`
    /// when the budget ran out and the design is only the best one found.
    pub proven_minimum_aberration: bool,
    /// Number of partial designs the search visited (a measure of its work).
    pub nodes_explored: u64,
}

/// One run size on offer for k factors, with the minimum-aberration design of that size.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct DesignOption {
    /// Runs N of the fraction (without replicates or centre points).
    pub runs: usize,
    /// Resolution (length of the shortest defining word); `None` for the full factorial.
    pub resolution: Option<u32>,
    /// `(A3, A4, ..., Ak)`.
    pub word_length_pattern: Vec<usize>,
    /// Number of two-factor interactions aliased with no main effect and no other two-factor
    /// interaction (Wu & Chen 1992, *Technometrics* 34, 162–175).
    pub clear_two_factor_interactions: usize,
    /// The generators (empty for the full factorial).
    pub generators: Vec<Generator>,
    /// Whether the design is proven to be of minimum aberration (see [`SearchOutcome`]).
    pub proven: bool,
    /// Runs a one-factor-at-a-time study would need for the same precision of every main
    /// effect, (k + 1)·N/2 (see [`crate::ofat`]).
    pub ofat_equivalent_runs: usize,
}

/// Checks k and N for a search: 2 ≤ k ≤ 25, N a power of two with k + 1 ≤ N ≤ 2^k.
pub fn check_search_size(factor_count: usize, runs: usize) -> Result<(), SearchError> {
    if !(2..=MAX_FACTORS).contains(&factor_count) {
        return Err(SearchError::Size(DesignError::FactorCount(factor_count)));
    }
    check_run_count(factor_count, runs).map_err(SearchError::Size)
}

/// Finds a minimum-aberration 2^(k−p) design for `factor_count` factors in `runs` runs.
///
/// The first `q = log2(runs)` letters are the basic factors; the last `p` are generated, each a
/// positive product of basic factors, listed in the search order (longest words first). See the
/// module documentation for the method and its sources.
///
/// # Errors
/// [`SearchError`] when k is outside 2..=25 or `runs` is not a power of two between k + 1 and 2^k.
pub fn minimum_aberration(
    factor_count: usize,
    runs: usize,
    budget: &SearchBudget,
) -> Result<SearchOutcome, SearchError> {
    let deadline = Instant::now().checked_add(budget.time);
    minimum_aberration_until(factor_count, runs, deadline)
}

fn minimum_aberration_until(
    factor_count: usize,
    runs: usize,
    deadline: Option<Instant>,
) -> Result<SearchOutcome, SearchError> {
    check_search_size(factor_count, runs)?;
    let raw = search_columns(factor_count, runs.trailing_zeros() as usize, deadline);
    let design = design_from_columns(factor_count, &raw.columns)?;
    Ok(SearchOutcome {
        design,
        word_length_pattern: raw.pattern.iter().map(|&a| a as usize).collect(),
        proven_minimum_aberration: raw.proven,
        nodes_explored: raw.nodes,
    })
}

/// Every run size for `factor_count` factors, from the smallest fraction with a column for each
/// main effect (the smallest power of two N ≥ k + 1) up to the full factorial, each with its
/// minimum-aberration design.
///
/// The budget covers the whole list: each run size may use an equal share of the time still left,
/// so quick searches leave more time to the hard ones.
///
/// # Errors
/// [`SearchError::Size`] when k is outside 2..=25.
pub fn design_options(
    factor_count: usize,
    budget: &SearchBudget,
) -> Result<Vec<DesignOption>, SearchError> {
    if !(2..=MAX_FACTORS).contains(&factor_count) {
        return Err(SearchError::Size(DesignError::FactorCount(factor_count)));
    }
    let start = Instant::now();
    let end = start.checked_add(budget.time);
    let first_q = smallest_runs(factor_count).trailing_zeros() as usize;
    let sizes: Vec<usize> = (first_q..=factor_count).collect();
    let mut out = Vec::with_capacity(sizes.len());
    for (i, &q) in sizes.iter().enumerate() {
        let deadline = end.map(|end| {
            let now = Instant::now();
            let left = end.saturating_duration_since(now);
            let share = left / u32::try_from(sizes.len() - i).unwrap_or(u32::MAX);
            now + share
        });
        let runs = 1usize << q;
        let found = minimum_aberration_until(factor_count, runs, deadline)?;
        let columns: Vec<u32> = found
            .design
            .generators()
            .iter()
            .map(|g| g.word.term.bits())
            .collect();
        out.push(DesignOption {
            runs,
            resolution: resolution_of(&found.word_length_pattern),
            clear_two_factor_interactions: clear_two_factor_interaction_count(q, &columns),
            generators: found.design.generators().to_vec(),
            word_length_pattern: found.word_length_pattern,
            proven: found.proven_minimum_aberration,
            ofat_equivalent_runs: ofat::equivalent_runs(factor_count, runs),
        });
    }
    Ok(out)
}

/// Resolution from a word-length pattern `(A3, A4, ...)`: the length of the shortest word, `None`
/// when there is no word (the full factorial).
fn resolution_of(pattern: &[usize]) -> Option<u32> {
    pattern
        .iter()
        .position(|&a| a > 0)
        .and_then(|i| u32::try_from(i + 3).ok())
}

/// Word-length pattern of the design whose generated columns are `columns`, by listing the whole
/// defining group: the word of a set S of generators has the generated letters of S and the basic
/// letters of the product of their columns. Used for small p and to check the engines.
fn pattern_of_columns(k: usize, columns: &[u32]) -> Vec<u64> {
    let mut a = vec![0u64; k.saturating_sub(2)];
    for subset in 1u32..1 << columns.len() {
        let basic = columns
            .iter()
            .enumerate()
            .filter(|(j, _)| subset >> j & 1 == 1)
            .fold(0u32, |acc, (_, &c)| acc ^ c);
        let len = (basic.count_ones() + subset.count_ones()) as usize;
        a[len - 3] += 1;
    }
    a
}

/// Number of clear two-factor interactions of the design whose generated columns are `columns`
/// (bit sets over the q basic factors): the interaction of factors a and b is clear when the
/// product of their columns is no factor's column and no other pair's product (Wu & Chen 1992).
fn clear_two_factor_interaction_count(q: usize, columns: &[u32]) -> usize {
    let points: Vec<u32> = (0..q)
        .map(|i| 1u32 << i)
        .chain(columns.iter().copied())
        .collect();
    let mut sums: HashMap<u32, u32> = HashMap::new();
    for (i, &a) in points.iter().enumerate() {
        for &b in &points[i + 1..] {
            *sums.entry(a ^ b).or_insert(0) += 1;
        }
    }
    let mut clear = 0;
    for (i, &a) in points.iter().enumerate() {
        for &b in &points[i + 1..] {
            let s = a ^ b;
            if sums.get(&s) == Some(&1) && !points.contains(&s) {
                clear += 1;
            }
        }
    }
    clear
}

/// The design whose generated factors (the last `columns.len()` letters) have `columns` as their
/// words over the basic factors.
fn design_from_columns(
    factor_count: usize,
    columns: &[u32],
) -> Result<FractionalDesign, DesignError> {
    let q = factor_count - columns.len();
    let generators = columns
        .iter()
        .enumerate()
        .map(|(j, &c)| Generator {
            factor: q + j,
            word: SignedTerm::plus(Term::from_bits(c)),
        })
        .collect();
    FractionalDesign::with_generators(factor_count, generators)
}

/// What a search engine hands back: the generated columns (bit sets over the basic factors), the
/// word-length pattern, whether the search finished, and its node count.
#[derive(Debug, Clone)]
struct RawOutcome {
    columns: Vec<u32>,
    pattern: Vec<u64>,
    proven: bool,
    nodes: u64,
}

/// Largest number of basic factors for which the search works on the columns of the basic
/// factorial (its tables have 2^q entries per word length).
const PRIMAL_MAX_BASIC: usize = 16;

/// Longest candidate list for which [`ColumnSearch::pair_bound`] is worth its quadratic cost.
const PAIR_BOUND_MAX_CANDIDATES: usize = 1024;

/// Largest q for which the isomorphism test uses every relabelling of the basic factors (q! of
/// them: 5040 at q = 7).
const ALL_RELABELLINGS_MAX_BASIC: usize = 7;

/// Chooses the engine for k factors with q basic factors.
fn search_columns(k: usize, q: usize, deadline: Option<Instant>) -> RawOutcome {
    let p = k - q;
    if p == 0 {
        return RawOutcome {
            columns: Vec::new(),
            pattern: vec![0; k.saturating_sub(2)],
            proven: true,
            nodes: 0,
        };
    }
    // The code side is exact and quick for up to three generators; the column side keeps the
    // tidier generators of the small designs.
    if q <= PRIMAL_MAX_BASIC && (q <= ALL_RELABELLINGS_MAX_BASIC || p > 3) {
        ColumnSearch::new(k, q, deadline).run()
    } else {
        CodeSearch::new(k, q, deadline).run()
    }
}

/// Adds `b` to `a` entry by entry.
fn add_into(a: &mut [u64], b: &[u32]) {
    for (x, &y) in a.iter_mut().zip(b) {
        *x += u64::from(y);
    }
}

/// Lexicographic comparison of `base + extra` with `other`, without building the sum.
fn cmp_sum(base: &[u64], extra: &[u32], other: &[u64]) -> Ordering {
    for ((&b, &e), &o) in base.iter().zip(extra).zip(other) {
        match (b + u64::from(e)).cmp(&o) {
            Ordering::Equal => {}
            unequal => return unequal,
        }
    }
    Ordering::Equal
}

/// Relabellings of the basic factors used by the isomorphism test, acting on column ranks.
enum Relabellings {
    /// Every permutation but the identity, as a table `images[rank·count + π]` (all images of
    /// one column side by side, which the test reads in one sweep).
    Table { count: usize, images: Vec<u32> },
    /// The transpositions of two basic factors, applied on the fly.
    Swaps { pairs: Vec<(u32, u32)> },
}

/// All permutations of `0..n` in a fixed order (recursive swaps), the identity first.
fn permutations(n: usize) -> Vec<Vec<usize>> {
    fn rec(i: usize, cur: &mut Vec<usize>, out: &mut Vec<Vec<usize>>) {
        if i == cur.len() {
            out.push(cur.clone());
            return;
        }
        for j in i..cur.len() {
            cur.swap(i, j);
            rec(i + 1, cur, out);
            cur.swap(i, j);
        }
    }
    let mut out = Vec::new();
    let mut cur: Vec<usize> = (0..n).collect();
    rec(0, &mut cur, &mut out);
    out
}

/// Outcome of [`ColumnSearch::pair_bound`].
enum PairBound {
    /// No completion can beat the incumbent.
    Cut,
    /// The candidates that may still take part in a better completion (in search order).
    Keep(Vec<u32>),
    /// No incumbent yet, or too many candidates to try.
    Unknown,
}

/// Which relabellings of the basic factors the isomorphism test uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum RelabellingSet {
    /// All q! permutations (q ≤ 7), else the transpositions.
    Default,
    /// Only the transpositions of two basic factors.
    #[cfg(test)]
    Swaps,
    /// None: no isomorphism pruning at all.
    #[cfg(test)]
    Nothing,
}

/// Depth-first branch and bound over the interaction columns of the 2^q factorial.
struct ColumnSearch {
    q: usize,
    k: usize,
    p: usize,
    /// Entries per column value in `counts`: word lengths 0..=k.
    width: usize,
    /// Candidate columns in search order (rank = q + index): most letters first, then by value.
    columns: Vec<u32>,
    /// Rank of every column value (basic factors 0..q).
    rank_of: Vec<u32>,
    relabellings: Relabellings,
    /// `counts[x·width + j]` = number of j-subsets of the chosen columns (basic ones included)
    /// whose product is x.
    counts: Vec<u32>,
    /// Best design so far: its pattern and its generated columns.
    best: Option<(Vec<u64>, Vec<u32>)>,
    nodes: u64,
    deadline: Option<Instant>,
    timed_out: bool,
}

impl ColumnSearch {
    fn new(k: usize, q: usize, deadline: Option<Instant>) -> ColumnSearch {
        ColumnSearch::with_relabellings(k, q, deadline, RelabellingSet::Default)
    }

    fn with_relabellings(
        k: usize,
        q: usize,
        deadline: Option<Instant>,
        set: RelabellingSet,
    ) -> ColumnSearch {
        let size = 1usize << q;
        let mut columns: Vec<u32> = (1..size as u32).filter(|m| m.count_ones() >= 2).collect();
        columns.sort_by_key(|&m| (std::cmp::Reverse(m.count_ones()), m));
        let mut rank_of = vec![0u32; size];
        for i in 0..q {
            rank_of[1 << i] = i as u32;
        }
        for (i, &c) in columns.iter().enumerate() {
            rank_of[c as usize] = (q + i) as u32;
        }
        // The test only runs where three or more columns are still to come (see `dfs`), so
        // with p ≤ 3 no table is needed.
        let p = k - q;
        let relabellings =
            if q <= ALL_RELABELLINGS_MAX_BASIC && set == RelabellingSet::Default && p >= 4 {
                let perms = permutations(q);
                let ranks = q + columns.len();
                let count = perms.len() - 1;
                let mut images = vec![0u32; count * ranks];
                let mut by_mask = vec![0u32; size];
                // perms[0] is the identity: it never gives a smaller image.
                for (pi, perm) in perms[1..].iter().enumerate() {
                    for m in 1..size {
                        let low = m.trailing_zeros() as usize;
                        by_mask[m] = by_mask[m & (m - 1)] | 1 << perm[low];
                    }
                    for rank in 0..ranks {
                        let mask = if rank < q {
                            1usize << rank
                        } else {
                            columns[rank - q] as usize
                        };
                        images[rank * count + pi] = rank_of[by_mask[mask] as usize];
                    }
                }
                Relabellings::Table { count, images }
            } else {
                let mut pairs = Vec::new();
                let basic = if p >= 4 { q as u32 } else { 0 };
                #[cfg(test)]
                let basic = if set == RelabellingSet::Nothing {
                    0
                } else {
                    basic
                };
                for i in 0..basic {
                    for j in i + 1..basic {
                        pairs.push((i, j));
                    }
                }
                Relabellings::Swaps { pairs }
            };
        let width = k + 1;
        let mut search = ColumnSearch {
            q,
            k,
            p,
            width,
            columns,
            rank_of,
            relabellings,
            counts: vec![0; size * width],
            best: None,
            nodes: 0,
            deadline,
            timed_out: false,
        };
        search.counts[0] = 1; // the empty set multiplies to I
        for i in 0..q {
            search.add(1 << i);
        }
        search
    }

    fn relabelling_count(&self) -> usize {
        match &self.relabellings {
            Relabellings::Table { count, .. } => *count,
            Relabellings::Swaps { pairs } => pairs.len(),
        }
    }

    /// Rank of the image of the column of rank `rank` under relabelling `pi`.
    fn image(&self, pi: usize, rank: u32) -> u32 {
        match &self.relabellings {
            Relabellings::Table { count, images } => images[rank as usize * count + pi],
            Relabellings::Swaps { pairs } => {
                let (i, j) = pairs[pi];
                let mask = self.columns[rank as usize - self.q];
                let swapped = if (mask >> i ^ mask >> j) & 1 == 1 {
                    mask ^ (1 << i | 1 << j)
                } else {
                    mask
                };
                self.rank_of[swapped as usize]
            }
        }
    }

    /// Adds column `z` to the subset counts: `n_j(x) += n_{j−1}(x·z)`, x and x·z in pairs so
    /// the old values are read before they change.
    fn add(&mut self, z: u32) {
        let w = self.width;
        let z = z as usize;
        for x in 0..self.counts.len() / w {
            let y = x ^ z;
            if y < x {
                continue;
            }
            let (lo, hi) = self.counts.split_at_mut(y * w);
            let rx = &mut lo[x * w..x * w + w];
            let ry = &mut hi[..w];
            for j in (1..w).rev() {
                let a = rx[j] + ry[j - 1];
                let b = ry[j] + rx[j - 1];
                rx[j] = a;
                ry[j] = b;
            }
        }
    }

    /// Undoes [`Self::add`]: `n_j(x) −= n_{j−1}(x·z)` in increasing j.
    fn remove(&mut self, z: u32) {
        let w = self.width;
        let z = z as usize;
        for x in 0..self.counts.len() / w {
            let y = x ^ z;
            if y < x {
                continue;
            }
            let (lo, hi) = self.counts.split_at_mut(y * w);
            let rx = &mut lo[x * w..x * w + w];
            let ry = &mut hi[..w];
            for j in 1..w {
                rx[j] -= ry[j - 1];
                ry[j] -= rx[j - 1];
            }
        }
    }

    /// Current word-length pattern `(A3, ..., Ak)`.
    fn pattern(&self) -> Vec<u64> {
        self.counts[3..self.width]
            .iter()
            .map(|&a| u64::from(a))
            .collect()
    }

    /// Words of lengths 3..=k that adding the column of rank `rank` would create.
    fn additions(&self, rank: u32) -> &[u32] {
        let x = self.columns[rank as usize - self.q] as usize;
        &self.counts[x * self.width + 2..x * self.width + self.k]
    }

    fn beats_best(&self, pattern: &[u64]) -> bool {
        self.best
            .as_ref()
            .is_none_or(|(b, _)| pattern.cmp(b) == Ordering::Less)
    }

    /// Greedy designs: from each possible first column (one per number of letters, which is all
    /// a first column can differ in up to relabelling; the six longest when there are many basic
    /// factors), add the column that creates the lexicographically fewest words. The best of them
    /// seeds the search.
    fn seed(&mut self) {
        let lowest = if self.q <= 10 { 2 } else { self.q - 5 };
        for letters in (lowest..=self.q).rev() {
            let first = (1u32 << letters) - 1;
            let mut chosen = vec![first];
            self.add(first);
            while chosen.len() < self.p {
                let mut pick: Option<usize> = None;
                for (i, &c) in self.columns.iter().enumerate() {
                    if chosen.contains(&c) {
                        continue;
                    }
                    let better = match pick {
                        None => true,
                        Some(j) => {
                            self.additions((self.q + i) as u32)
                                < self.additions((self.q + j) as u32)
                        }
                    };
                    if better {
                        pick = Some(i);
                    }
                }
                let Some(i) = pick else { break };
                let c = self.columns[i];
                chosen.push(c);
                self.add(c);
            }
            let pattern = self.pattern();
            if chosen.len() == self.p && self.beats_best(&pattern) {
                self.best = Some((pattern, chosen.clone()));
            }
            for &c in chosen.iter().rev() {
                self.remove(c);
            }
        }
    }

    fn run(mut self) -> RawOutcome {
        self.seed();
        let candidates: Vec<u32> = (0..self.columns.len())
            .map(|i| (self.q + i) as u32)
            .collect();
        let taus = vec![u32::MAX; self.relabelling_count()];
        let mut chosen = Vec::with_capacity(self.p);
        self.dfs(&mut chosen, &candidates, &taus);
        let (pattern, mut columns) = self.best.take().unwrap_or_default();
        columns.sort_by_key(|&c| self.rank_of[c as usize]);
        RawOutcome {
            columns,
            pattern,
            proven: !self.timed_out,
            nodes: self.nodes,
        }
    }

    /// Full comparison of the image of `chosen` under `pi` with `chosen` (both as sorted rank
    /// lists): `None` when the image is smaller, else the rank of `chosen` at the first
    /// difference (`u32::MAX` when equal).
    fn compare_image(&self, pi: usize, chosen: &[u32]) -> Option<u32> {
        let mut image: Vec<u32> = chosen.iter().map(|&r| self.image(pi, r)).collect();
        image.sort_unstable();
        for (&a, &b) in image.iter().zip(chosen) {
            match a.cmp(&b) {
                Ordering::Less => return None,
                Ordering::Greater => return Some(b),
                Ordering::Equal => {}
            }
        }
        Some(u32::MAX)
    }

    /// Orderly test for `chosen` (sorted, its last entry just added) given the parent's state
    /// `taus`: for each relabelling, the rank of the parent's set at the first place its image
    /// differs (`u32::MAX` when the image is the set itself). The image of the new set is smaller
    /// exactly when the new column's image falls below that threshold (or below the new column
    /// itself when the parent was fixed); ties fall back to a full comparison. Writes the child's
    /// state to `out` and returns whether the new set is the smallest of its images.
    fn is_smallest_image(&self, chosen: &[u32], taus: &[u32], out: &mut Vec<u32>) -> bool {
        /// Marks a relabelling whose image ties with the parent's threshold.
        const TIE: u32 = u32::MAX - 1;
        let Some(&c) = chosen.last() else { return true };
        out.clear();
        match &self.relabellings {
            Relabellings::Table { count, images } => {
                // The parent's threshold is below c whenever it is set, so min(τ, c) is the
                // threshold in both cases.
                let row = &images[c as usize * count..(c as usize + 1) * count];
                let below = row
                    .iter()
                    .zip(taus)
                    .fold(false, |acc, (&image, &tau)| acc | (image < tau.min(c)));
                if below {
                    return false;
                }
                out.resize(taus.len(), 0);
                for ((o, &image), &tau) in out.iter_mut().zip(row).zip(taus) {
                    let threshold = tau.min(c);
                    *o = if image > threshold {
                        threshold
                    } else if tau == u32::MAX {
                        u32::MAX
                    } else {
                        TIE
                    };
                }
                if out.contains(&TIE) {
                    for (pi, slot) in out.iter_mut().enumerate() {
                        if *slot == TIE {
                            match self.compare_image(pi, chosen) {
                                None => return false,
                                Some(t) => *slot = t,
                            }
                        }
                    }
                }
            }
            Relabellings::Swaps { .. } => {
                for (pi, &tau) in taus.iter().enumerate() {
                    let image = self.image(pi, c);
                    let threshold = tau.min(c);
                    match image.cmp(&threshold) {
                        Ordering::Less => return false,
                        Ordering::Greater => out.push(threshold),
                        Ordering::Equal if tau == u32::MAX => out.push(u32::MAX),
                        Ordering::Equal => match self.compare_image(pi, chosen) {
                            None => return false,
                            Some(t) => out.push(t),
                        },
                    }
                }
            }
        }
        true
    }

    fn out_of_time(&mut self) -> bool {
        if !self.timed_out
            && self.nodes % 256 == 1
            && self.deadline.is_some_and(|d| Instant::now() >= d)
        {
            self.timed_out = true;
        }
        self.timed_out
    }

    /// Two columns to go: tries every pair exactly instead of branching. After adding c, the
    /// words that y adds are `n_j(y) + n_{j−1}(y·c)`, so each pair costs a few reads, with an
    /// early exit once the sum is decided against the incumbent.
    fn best_pair(&mut self, chosen: &[u32], pattern: &[u64], next: &[u32]) {
        let w = self.width;
        let len = pattern.len();
        let mut base = vec![0u64; len];
        for (i, &c) in next.iter().enumerate() {
            // Many basic factors give long candidate lists: watch the clock here too.
            if i % 64 == 63 && self.deadline.is_some_and(|d| Instant::now() >= d) {
                self.timed_out = true;
                return;
            }
            base.copy_from_slice(pattern);
            add_into(&mut base, self.additions(c));
            let xc = self.columns[c as usize - self.q] as usize;
            for &y in &next[i + 1..] {
                let xy = self.columns[y as usize - self.q] as usize;
                let ry = &self.counts[xy * w..xy * w + w];
                let rs = &self.counts[(xy ^ xc) * w..(xy ^ xc) * w + w];
                let total = |t: usize| base[t] + u64::from(ry[t + 2]) + u64::from(rs[t + 1]);
                let better = match &self.best {
                    None => true,
                    Some((best, _)) => {
                        (0..len).map(|t| total(t).cmp(&best[t])).find(|o| o.is_ne())
                            == Some(Ordering::Less)
                    }
                };
                if better {
                    let sum: Vec<u64> = (0..len).map(total).collect();
                    let mut columns: Vec<u32> = chosen
                        .iter()
                        .map(|&r| self.columns[r as usize - self.q])
                        .collect();
                    columns.push(xc as u32);
                    columns.push(xy as u32);
                    self.best = Some((sum, columns));
                }
            }
        }
    }

    /// A sharper bound on the first word length at which the incumbent has words (length
    /// d + 3, no shorter words allowed): besides each column's own additions, every pair of new
    /// columns y, y' adds `n_{d+1}(y·y')` words of that length. Each column is charged its own
    /// additions plus half the sum of its r − 1 cheapest pairings (pairs that would create a
    /// shorter word cannot occur in a better design and are left out), and the r smallest charges
    /// bound the completion. Columns whose charge alone pushes the bound past the incumbent are
    /// dropped. Charges are kept doubled to stay in integers.
    fn pair_bound(&self, pattern: &[u64], next: &[u32], r: usize) -> PairBound {
        let Some((best, _)) = &self.best else {
            return PairBound::Unknown;
        };
        if next.len() > PAIR_BOUND_MAX_CANDIDATES {
            return PairBound::Unknown;
        }
        let Some(d) = best.iter().position(|&a| a > 0) else {
            return PairBound::Unknown;
        };
        if pattern[..d].iter().any(|&a| a > 0) {
            return PairBound::Cut;
        }
        let w = self.width;
        let masks: Vec<usize> = next
            .iter()
            .map(|&c| self.columns[c as usize - self.q] as usize)
            .collect();
        // (charge, candidate); a candidate with too few allowed partners has no charge.
        let mut charges: Vec<(u64, u32)> = Vec::with_capacity(masks.len());
        let mut pairings: Vec<u64> = Vec::with_capacity(masks.len());
        for (i, &y) in masks.iter().enumerate() {
            pairings.clear();
            for (j, &z) in masks.iter().enumerate() {
                let row = &self.counts[(y ^ z) * w..(y ^ z) * w + w];
                if i != j && row[1..=d].iter().all(|&n| n == 0) {
                    pairings.push(u64::from(row[d + 1]));
                }
            }
            if pairings.len() < r - 1 {
                continue;
            }
            if pairings.len() > r - 1 {
                pairings.select_nth_unstable(r - 2);
            }
            let own = u64::from(self.counts[y * w + d + 2]);
            charges.push((2 * own + pairings[..r - 1].iter().sum::<u64>(), next[i]));
        }
        if charges.len() < r {
            return PairBound::Cut;
        }
        charges.sort_unstable();
        let limit = 2 * best[d];
        let base = 2 * pattern[d];
        let smallest: u64 = charges[..r - 1].iter().map(|c| c.0).sum();
        if base + smallest + charges[r - 1].0 > limit {
            return PairBound::Cut;
        }
        let mut kept: Vec<u32> = charges
            .iter()
            .enumerate()
            .filter(|(i, c)| *i < r || base + smallest + c.0 <= limit)
            .map(|(_, c)| c.1)
            .collect();
        kept.sort_unstable();
        PairBound::Keep(kept)
    }

    fn dfs(&mut self, chosen: &mut Vec<u32>, candidates: &[u32], taus: &[u32]) {
        self.nodes += 1;
        if self.out_of_time() {
            return;
        }
        let r = self.p - chosen.len();
        if r == 0 || candidates.len() < r {
            return;
        }
        let pattern = self.pattern();
        // Candidates sorted by the words they would add, lexicographically (stable: ties keep
        // the search order, which keeps the result deterministic).
        let mut order: Vec<u32> = candidates.to_vec();
        order.sort_by(|&a, &b| self.additions(a).cmp(self.additions(b)));
        let mut bound = pattern.clone();
        for &c in &order[..r - 1] {
            add_into(&mut bound, self.additions(c));
        }
        let last = self.additions(order[r - 1]);
        if let Some((best, _)) = &self.best
            && cmp_sum(&bound, last, best) != Ordering::Less
        {
            return;
        }
        if r == 1 {
            // One column to go: the bound is exact, and the best column is the first in order.
            add_into(&mut bound, last);
            let mut columns: Vec<u32> = chosen
                .iter()
                .map(|&c| self.columns[c as usize - self.q])
                .collect();
            columns.push(self.columns[order[0] as usize - self.q]);
            self.best = Some((bound, columns));
            return;
        }
        // A candidate outside the r smallest can at best complete the design together with the
        // r − 1 smallest; drop those for which even that reaches the incumbent. (For the r
        // smallest the same test never drops: their sum is the bound, already below.)
        let next: Vec<u32> = match &self.best {
            Some((best, _)) => candidates
                .iter()
                .copied()
                .filter(|&c| cmp_sum(&bound, self.additions(c), best) == Ordering::Less)
                .collect(),
            None => candidates.to_vec(),
        };
        if r == 2 {
            self.best_pair(chosen, &pattern, &next);
            return;
        }
        // The pair bound costs the square of the candidate count: skip it for long lists.
        let next = match self.pair_bound(&pattern, &next, r) {
            PairBound::Cut => return,
            PairBound::Keep(kept) => kept,
            PairBound::Unknown => next,
        };
        if next.len() < r {
            return;
        }
        let mut child_taus = Vec::with_capacity(taus.len());
        for (i, &c) in next.iter().enumerate() {
            if next.len() - i < r {
                break;
            }
            chosen.push(c);
            // A child with two columns to go is settled by `best_pair` at about the cost of the
            // isomorphism test, so the test is skipped there (skipping it is always safe).
            if r == 3 || self.is_smallest_image(chosen, taus, &mut child_taus) {
                let column = self.columns[c as usize - self.q];
                self.add(column);
                self.dfs(chosen, &next[i + 1..], &child_taus);
                self.remove(column);
            }
            chosen.pop();
            if self.timed_out {
                return;
            }
        }
    }
}

/// Search on the code side for many basic factors and few generators: each basic factor is a
/// vector of p bits (bit i set when generator i contains it), chosen in increasing order with
/// repeats. A word is a non-empty set u of generators; its length is |u| plus the number of
/// basic factors whose vector has odd overlap with u.
struct CodeSearch {
    q: usize,
    k: usize,
    p: usize,
    /// Current length of every word u (index u, 1 ≤ u < 2^p).
    lengths: Vec<u32>,
    /// For each word u, the largest vector v with odd overlap (the last that still lengthens u).
    last_hit: Vec<u32>,
    best: Option<(Vec<u64>, Vec<u32>)>,
    nodes: u64,
    deadline: Option<Instant>,
    timed_out: bool,
}

impl CodeSearch {
    fn new(k: usize, q: usize, deadline: Option<Instant>) -> CodeSearch {
        let p = k - q;
        let words = 1u32 << p;
        let lengths = (0..words).map(u32::count_ones).collect();
        let last_hit = (0..words)
            .map(|u| {
                (0..words)
                    .rev()
                    .find(|&v| (u & v).count_ones() % 2 == 1)
                    .unwrap_or(0)
            })
            .collect();
        CodeSearch {
            q,
            k,
            p,
            lengths,
            last_hit,
            best: None,
            nodes: 0,
            deadline,
            timed_out: false,
        }
    }

    fn apply(&mut self, v: u32, delta: i32) {
        for (u, len) in self.lengths.iter_mut().enumerate().skip(1) {
            if (u as u32 & v).count_ones() % 2 == 1 {
                *len = len.wrapping_add_signed(delta);
            }
        }
    }

    fn pattern(&self) -> Vec<u64> {
        let mut a = vec![0u64; self.k - 2];
        for &len in &self.lengths[1..] {
            if len >= 3 {
                a[len as usize - 3] += 1;
            }
        }
        a
    }

    fn valid(&self) -> bool {
        self.lengths[1..].iter().all(|&l| l >= 3)
    }

    /// Generated columns of the design: generator i's word is the set of basic factors whose
    /// vector has bit i.
    fn columns(&self, vectors: &[u32]) -> Vec<u32> {
        (0..self.p)
            .map(|i| {
                vectors
                    .iter()
                    .enumerate()
                    .filter(|(_, v)| *v >> i & 1 == 1)
                    .fold(0u32, |acc, (j, _)| acc | 1 << j)
            })
            .collect()
    }

    /// Greedy seed: each basic factor takes the vector that lengthens the shortest words most
    /// (the sorted word lengths largest lexicographically).
    fn seed(&mut self) {
        let mut vectors = Vec::with_capacity(self.q);
        for _ in 0..self.q {
            let mut pick: Option<(Vec<u32>, u32)> = None;
            for v in 0..1u32 << self.p {
                self.apply(v, 1);
                let mut sorted = self.lengths[1..].to_vec();
                sorted.sort_unstable();
                self.apply(v, -1);
                if pick.as_ref().is_none_or(|(s, _)| sorted > *s) {
                    pick = Some((sorted, v));
                }
            }
            let v = pick.map_or(0, |(_, v)| v);
            vectors.push(v);
            self.apply(v, 1);
        }
        vectors.sort_unstable();
        if self.valid() {
            self.best = Some((self.pattern(), vectors.clone()));
        }
        for &v in &vectors {
            self.apply(v, -1);
        }
    }

    fn run(mut self) -> RawOutcome {
        self.seed();
        let mut vectors = Vec::with_capacity(self.q);
        self.dfs(&mut vectors, 0);
        let (columns, pattern) = match self.best.take() {
            Some((pattern, vectors)) => (self.columns(&vectors), pattern),
            None => {
                // Nothing valid found in time (the greedy seed failed): fall back to the p
                // longest interaction columns, always a valid fraction.
                let all = (1u32 << self.q) - 1;
                let columns: Vec<u32> = std::iter::once(all)
                    .chain((0..self.q).map(|i| all ^ 1 << i))
                    .take(self.p)
                    .collect();
                let pattern = pattern_of_columns(self.k, &columns);
                (columns, pattern)
            }
        };
        RawOutcome {
            columns,
            pattern,
            proven: !self.timed_out,
            nodes: self.nodes,
        }
    }

    fn dfs(&mut self, vectors: &mut Vec<u32>, from: u32) {
        self.nodes += 1;
        if !self.timed_out
            && self.nodes % 256 == 1
            && self.deadline.is_some_and(|d| Instant::now() >= d)
        {
            self.timed_out = true;
        }
        if self.timed_out {
            return;
        }
        let left = (self.q - vectors.len()) as u32;
        if left == 0 {
            if self.valid() {
                let pattern = self.pattern();
                if self.best.as_ref().is_none_or(|(b, _)| pattern < *b) {
                    self.best = Some((pattern, vectors.clone()));
                }
            }
            return;
        }
        // Longest each word can still become: words no later vector touches are final.
        let (target, allowed) = match &self.best {
            Some((b, _)) => {
                let first = b.iter().position(|&a| a > 0).unwrap_or(b.len());
                (first as u32 + 3, b.get(first).copied().unwrap_or(u64::MAX))
            }
            None => (3, u64::MAX),
        };
        let mut at_target = 0u64;
        for u in 1..self.lengths.len() {
            let cap = self.lengths[u] + if self.last_hit[u] >= from { left } else { 0 };
            if cap < target {
                return;
            }
            if cap == target {
                at_target += 1;
            }
        }
        if at_target > allowed {
            return;
        }
        for v in from..1u32 << self.p {
            vectors.push(v);
            self.apply(v, 1);
            self.dfs(vectors, v);
            self.apply(v, -1);
            vectors.pop();
            if self.timed_out {
                return;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::alias::{alias_report, word_length_pattern};

    fn budget(secs: u64) -> SearchBudget {
        SearchBudget::new(Duration::from_secs(secs))
    }

    /// Every p-subset of the interaction columns of the 2^q factorial, in lexicographic order.
    fn all_subsets(m: usize, p: usize, mut visit: impl FnMut(&[usize])) {
        let mut idx: Vec<usize> = (0..p).collect();
        loop {
            visit(&idx);
            let Some(i) = (0..p).rev().find(|&i| idx[i] < m - p + i) else {
                return;
            };
            idx[i] += 1;
            for j in i + 1..p {
                idx[j] = idx[j - 1] + 1;
            }
        }
    }

    /// The smallest word-length pattern over every fraction, by listing them all.
    fn exhaustive_minimum(k: usize, q: usize) -> Vec<u64> {
        let columns: Vec<u32> = (1u32..1 << q).filter(|m| m.count_ones() >= 2).collect();
        let mut best: Option<Vec<u64>> = None;
        all_subsets(columns.len(), k - q, |idx| {
            let chosen: Vec<u32> = idx.iter().map(|&i| columns[i]).collect();
            let a = pattern_of_columns(k, &chosen);
            if best.as_ref().is_none_or(|b| a < *b) {
                best = Some(a);
            }
        });
        best.unwrap()
    }

    #[test]
    fn search_agrees_with_listing_every_fraction() {
        // Two independent ways to the same minimum: the pruned search, and listing every choice
        // of generator columns with its pattern from the whole defining group.
        for (q, ks) in [
            (3usize, 4..=7usize),
            (4, 5..=15),
            (5, 6..=10),
            (6, 7..=9),
            (7, 8..=9),
        ] {
            for k in ks {
                let out = minimum_aberration(k, 1 << q, &budget(60)).unwrap();
                let expected: Vec<usize> = exhaustive_minimum(k, q)
                    .into_iter()
                    .map(|a| a as usize)
                    .collect();
                assert_eq!(out.word_length_pattern, expected, "k={k}, runs={}", 1 << q);
                assert!(out.proven_minimum_aberration, "k={k}, runs={}", 1 << q);
            }
        }
    }

    #[test]
    fn reported_pattern_is_the_pattern_of_the_design() {
        for (k, runs) in [(7, 8), (9, 16), (11, 32), (14, 64), (12, 128), (17, 32)] {
            let out = minimum_aberration(k, runs, &budget(60)).unwrap();
            assert_eq!(
                out.word_length_pattern,
                word_length_pattern(&out.design),
                "k={k}, runs={runs}"
            );
            assert_eq!(out.design.base_runs(), runs);
            assert_eq!(out.design.factor_count(), k);
        }
    }

    proptest::proptest! {
        #[test]
        fn incremental_word_counts_match_the_defining_group(
            q in 3usize..=7,
            picks in proptest::collection::vec(0usize..10_000, 1..9),
        ) {
            // Any distinct interaction columns: the subset counts after adding them give the
            // pattern of the whole defining group, and removing them restores the start.
            let candidates: Vec<u32> = (1u32..1 << q).filter(|m| m.count_ones() >= 2).collect();
            let mut columns: Vec<u32> = Vec::new();
            for pick in picks {
                let c = candidates[pick % candidates.len()];
                if !columns.contains(&c) {
                    columns.push(c);
                }
            }
            let k = q + columns.len();
            let mut search = ColumnSearch::new(k, q, None);
            for &c in &columns {
                search.add(c);
            }
            proptest::prop_assert_eq!(search.pattern(), pattern_of_columns(k, &columns));
            for &c in columns.iter().rev() {
                search.remove(c);
            }
            let fresh = ColumnSearch::new(k, q, None);
            proptest::prop_assert_eq!(&search.counts, &fresh.counts);
        }
    }

    #[test]
    fn isomorphism_pruning_loses_nothing() {
        // The same search with all relabellings, with transpositions only, and with no
        // isomorphism pruning at all must reach the same minimum.
        for (k, q) in [
            (11, 5),
            (14, 5),
            (17, 5),
            (18, 5),
            (10, 6),
            (13, 6),
            (16, 6),
            (12, 7),
        ] {
            let run = |set| ColumnSearch::with_relabellings(k, q, None, set).run();
            let all = run(RelabellingSet::Default);
            let swaps = run(RelabellingSet::Swaps);
            let none = run(RelabellingSet::Nothing);
            assert!(all.proven && swaps.proven && none.proven);
            assert_eq!(all.pattern, none.pattern, "k={k}, q={q}");
            assert_eq!(swaps.pattern, none.pattern, "k={k}, q={q}");
        }
    }

    #[test]
    fn column_and_code_searches_agree() {
        // Both engines are exact; where both can run they must find the same minimum pattern.
        for (k, q) in [(8, 6), (10, 7), (12, 9), (13, 10), (11, 8)] {
            let columns = ColumnSearch::new(k, q, None).run();
            let code = CodeSearch::new(k, q, None).run();
            assert!(columns.proven && code.proven, "k={k}, q={q}");
            assert_eq!(columns.pattern, code.pattern, "k={k}, q={q}");
            assert_eq!(code.pattern, pattern_of_columns(k, &code.columns));
            assert_eq!(columns.pattern, pattern_of_columns(k, &columns.columns));
        }
    }

    #[test]
    fn generators_are_positive_products_of_basic_factors() {
        let out = minimum_aberration(7, 32, &budget(10)).unwrap();
        let labels = out.design.generator_labels();
        assert_eq!(labels.len(), 2);
        for (g, letter) in out.design.generators().iter().zip(['F', 'G']) {
            assert!(!g.word.negative);
            assert!(g.word.term.span() <= 5, "{g}");
            assert_eq!(crate::term::LETTERS[g.factor], letter);
        }
    }

    #[test]
    fn same_inputs_give_the_same_generators() {
        for (k, runs) in [(10, 32), (13, 64), (18, 32)] {
            let a = minimum_aberration(k, runs, &budget(60)).unwrap();
            let b = minimum_aberration(k, runs, &budget(60)).unwrap();
            assert_eq!(a.design.generators(), b.design.generators());
            assert_eq!(a.nodes_explored, b.nodes_explored);
        }
    }

    #[test]
    fn small_searches_are_proven() {
        for (k, runs) in [
            (5, 8),
            (6, 16),
            (9, 32),
            (12, 64),
            (2, 4),
            (4, 16),
            (20, 1 << 19),
        ] {
            let out = minimum_aberration(k, runs, &budget(60)).unwrap();
            assert!(out.proven_minimum_aberration, "k={k}, runs={runs}");
        }
    }

    #[test]
    fn an_exhausted_budget_is_reported_as_unproven() {
        // 20 factors in 128 runs needs far more than 256 nodes; with no time at all the search
        // stops at its first clock check and returns the greedy design, flagged as unproven.
        let out = minimum_aberration(20, 128, &SearchBudget::new(Duration::ZERO)).unwrap();
        assert!(!out.proven_minimum_aberration);
        assert_eq!(out.word_length_pattern, word_length_pattern(&out.design));
        assert_eq!(
            out.word_length_pattern[0], 0,
            "greedy still finds resolution IV"
        );
        // The same on the code side (2^24 runs for 25 factors leaves a search over 5-bit vectors).
        let out = minimum_aberration(25, 1 << 20, &SearchBudget::new(Duration::ZERO)).unwrap();
        assert!(!out.proven_minimum_aberration);
        assert_eq!(out.word_length_pattern, word_length_pattern(&out.design));
    }

    #[test]
    fn bad_sizes_are_rejected() {
        let size = SearchError::Size;
        let cases: &[(usize, usize, SearchError)] = &[
            (1, 2, size(DesignError::FactorCount(1))),
            (26, 32, size(DesignError::FactorCount(26))),
            (5, 12, size(DesignError::RunsNotPowerOfTwo(12))),
            (5, 0, size(DesignError::RunsNotPowerOfTwo(0))),
            (
                3,
                16,
                size(DesignError::RunsAboveFull {
                    runs: 16,
                    factors: 3,
                    full: 8,
                }),
            ),
            (
                8,
                8,
                size(DesignError::RunsTooFew {
                    runs: 8,
                    factors: 8,
                    needed: 16,
                }),
            ),
        ];
        for (k, runs, expected) in cases {
            let err = minimum_aberration(*k, *runs, &budget(1)).unwrap_err();
            assert_eq!(&err, expected, "k={k}, runs={runs}");
        }
        assert_eq!(
            size(DesignError::RunsTooFew {
                runs: 8,
                factors: 8,
                needed: 16
            })
            .to_string(),
            "8 runs is too few for 8 factors: at least 16 runs are needed to estimate every main effect"
        );
        assert!(matches!(
            design_options(0, &budget(1)),
            Err(SearchError::Size(DesignError::FactorCount(0)))
        ));
    }

    #[test]
    fn options_run_from_the_smallest_fraction_to_the_full_factorial() {
        let options = design_options(7, &budget(30)).unwrap();
        let runs: Vec<usize> = options.iter().map(|o| o.runs).collect();
        assert_eq!(runs, [8, 16, 32, 64, 128]);
        let full = options.last().unwrap();
        assert_eq!(full.resolution, None);
        assert!(full.generators.is_empty());
        assert_eq!(full.clear_two_factor_interactions, 21);
        for o in &options {
            assert!(o.proven, "{} runs", o.runs);
            assert_eq!(o.ofat_equivalent_runs, 4 * o.runs);
            let design = FractionalDesign::with_generators(7, o.generators.clone()).unwrap();
            let report = alias_report(&design);
            assert_eq!(o.word_length_pattern, report.word_length_pattern);
            assert_eq!(o.resolution, report.resolution);
            assert_eq!(
                o.clear_two_factor_interactions,
                report.clear_two_factor_interactions.len(),
                "{} runs",
                o.runs
            );
        }
    }

    #[test]
    fn clear_interaction_counts_agree_with_the_alias_report() {
        // Counting from column products and from the alias chains of the defining relation.
        for (k, runs) in [(6, 16), (8, 32), (9, 64), (10, 128), (12, 64), (9, 16)] {
            let out = minimum_aberration(k, runs, &budget(60)).unwrap();
            let q = runs.trailing_zeros() as usize;
            let columns: Vec<u32> = out
                .design
                .generators()
                .iter()
                .map(|g| g.word.term.bits())
                .collect();
            assert_eq!(
                clear_two_factor_interaction_count(q, &columns),
                alias_report(&out.design)
                    .clear_two_factor_interactions
                    .len(),
                "k={k}, runs={runs}"
            );
        }
    }
}
