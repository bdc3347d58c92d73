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
//! * **Counting pairs.** Once the incumbent has no word of length three, the words of length four
//!   of any better completion are bounded from below by counting the pairs of columns by their
//!   product: `3·A4 = Σ_x C(m_x, 2)`, and the pairs still to come are spread as evenly as
//!   possible over the free products (see `ColumnSearch::pair_count_bound`).
//! * **Isomorphism pruning.** Relabelling the basic factors maps designs to isomorphic designs
//!   with the same pattern. The search keeps a partial design only if its column set, as a sorted
//!   list in the search order, is the smallest among its images under the relabellings used
//!   (orderly generation, Read 1978, *Annals of Discrete Mathematics* 2, 107–120): with up to 7
//!   basic factors (N ≤ 128) all q! relabellings, above that the transpositions of two basic
//!   factors. Any set of relabellings is safe: the smallest member of every isomorphism class
//!   survives the test at every step, so the optimum is never lost. The test is skipped where
//!   fewer than five columns are still to come, where it costs more than the small subtrees it
//!   would cut.
//! * **Every core.** Below depth three the tree is cut into subtrees searched in parallel
//!   (rayon's work stealing) with one shared incumbent. Ties are broken by search order, not by
//!   which thread finds a design first, so a finished search returns the same generators as the
//!   same search on one thread (see `column_search::Shared`).
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
//! generators whenever it finishes within its budget (the node count, in a parallel search, may
//! vary from run to run).
//!
//! # Speed
//! Measured on a shared two-core machine under heavy load from other jobs (load average 7–8; an
//! idle machine was not measured): under the default budget every design of 16, 32 and 64
//! runs with up to 20 factors is proven in under 0.03 s, of 128 runs with up to 16 factors in
//! under 0.6 s, with 17 factors in about 1.5 s; 18 to 20 factors need 3, 9 and 21 s to be
//! proven. At 256 runs up to 17 factors are proven in under half a second, and 18 to 20 factors
//! in 20 s, 1 min and 2 min. `cargo bench -p twofold-core --bench search` prints the table.

use crate::design::{DesignError, FractionalDesign, Generator, check_run_count, smallest_runs};
use crate::ofat;
use crate::term::{MAX_FACTORS, SignedTerm, Term};
use serde::{Deserialize, Serialize};
use std::cmp::Ordering;
use std::collections::HashMap;
use std::time::{Duration, Instant};

mod code_search;
mod column_search;
pub mod required;

use code_search::CodeSearch;
use column_search::ColumnSearch;
pub use required::{RequiredError, RequiredOutcome, design_keeping_clear, parse_required};

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
    /// Two seconds: enough to prove every design of up to 64 runs, and of 128 runs up to 17
    /// factors (measured on a busy two-core machine; see the search benchmark).
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

/// Largest q for which [`ColumnSearch::pair_count_bound`] is worth a sweep over all 2^q
/// products at every node.
const PAIR_COUNT_MAX_BASIC: usize = 10;

/// Largest q for which the column search undoes a column by copying the counts back (2^q rows)
/// rather than by subtracting.
const SNAPSHOT_MAX_BASIC: usize = 10;

/// The isomorphism test runs on a partial design only when at least this many columns are
/// still to come (counting the one just added). Closer to the leaves the subtrees are small and
/// their bounds cut them about as fast as the test over all q! relabellings would (measured at
/// 128 runs, 17 and 18 factors: testing from four columns left on was a fifth slower, from six a
/// tenth). Skipping the test is always safe.
const ISOMORPHISM_TEST_MIN_LEFT: usize = 5;

/// Depth (columns chosen) at which the column search cuts its tree into subtrees searched in
/// parallel.
const PARALLEL_SPLIT_DEPTH: usize = 3;

/// Columns a subtree must still have to choose for the search to be split at all.
const PARALLEL_MIN_LEFT: usize = 4;

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

#[cfg(test)]
mod tests {
    use super::column_search::RelabellingSet;
    use super::*;
    use crate::alias::{alias_report, word_length_pattern};

    fn budget(secs: u64) -> SearchBudget {
        SearchBudget::new(Duration::from_secs(secs))
    }

    use crate::test_support::all_subsets;

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
    fn parallel_search_returns_the_design_of_the_serial_search() {
        // The subtrees searched in parallel break ties by search order, so the generators are
        // those of the same search on one thread, split at any depth (see `Shared`).
        for (k, q) in [(11, 5), (17, 5), (13, 6), (16, 6), (12, 7), (15, 7)] {
            let serial = ColumnSearch::new(k, q, None).run_split(0);
            for depth in 1..=3 {
                let parallel = ColumnSearch::new(k, q, None).run_split(depth);
                assert!(serial.proven && parallel.proven, "k={k}, q={q}");
                assert_eq!(
                    parallel.pattern, serial.pattern,
                    "k={k}, q={q}, depth {depth}"
                );
                assert_eq!(
                    parallel.columns, serial.columns,
                    "k={k}, q={q}, depth {depth}"
                );
            }
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
            // The node count is not compared: in a parallel search it depends on when each
            // subtree saw the best design of the others.
            assert_eq!(a.word_length_pattern, b.word_length_pattern);
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

    /// The cases of the goal "every design of up to 128 runs and 20 factors proven within the
    /// default budget", as the search benchmark lists them: k from q + 1 to min(20, N − 1).
    fn goal_cases(runs: usize) -> impl Iterator<Item = (usize, usize)> {
        let q = runs.trailing_zeros() as usize;
        (q + 1..=20.min(runs - 1)).map(move |k| (k, runs))
    }

    #[test]
    fn every_benchmark_case_up_to_64_runs_and_128_runs_up_to_16_factors_is_proven() {
        // Under the default budget (the benchmark times them; this only checks the proof).
        let cases = [16, 32, 64]
            .into_iter()
            .flat_map(goal_cases)
            .chain(goal_cases(128).filter(|&(k, _)| k <= 16));
        for (k, runs) in cases {
            let out = minimum_aberration(k, runs, &SearchBudget::default()).unwrap();
            assert!(out.proven_minimum_aberration, "k={k}, runs={runs}");
        }
    }

    #[test]
    #[ignore = "the goal is not reached yet: 128 runs with 17 factors take about a second, 18 to \
                20 more than the default budget (see the search benchmark)"]
    fn every_benchmark_case_of_128_runs_is_proven() {
        for (k, runs) in goal_cases(128) {
            let out = minimum_aberration(k, runs, &SearchBudget::default()).unwrap();
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
