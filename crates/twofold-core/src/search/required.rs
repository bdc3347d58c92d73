//! Designs that keep named two-factor interactions clear.
//!
//! The engineer names two-factor interactions that must be estimable: each must be *clear*,
//! aliased with no main effect and no other two-factor interaction. Of the regular 2^(k−p)
//! fractions that keep every one of them clear, the search returns one of minimum aberration
//! (word-length pattern compared lexicographically, as in [`super::minimum_aberration`]), and
//! without a run size the smallest run size at which one exists.
//!
//! # Method
//! Wu & Chen (1992, "A graph-aided method for planning two-level experiments when certain
//! interactions are important", *Technometrics* 34, 162–175) draw the requirement as a graph
//! (factors as vertices, required interactions as edges) and each candidate design as the graph
//! of its clear two-factor interactions. A design can keep the requirement clear exactly when
//! the requirement graph is isomorphic to a subgraph of the design's clear graph: the
//! isomorphism says which factor goes to which column. They match the requirement against the
//! graphs of catalogued designs; here the designs are generated instead:
//!
//! * **Points.** A design in N = 2^q runs is a set of k distinct non-zero columns of the 2^q
//!   factorial (bit sets over q basic factors); every set of full rank can be written with the
//!   q basic factors as the first q columns, so the search adds p = k − q interaction columns
//!   to them. The interaction of columns a and b has the column a·b (XOR); it is clear when
//!   a·b is no column of the design and no other pair's product (Wu & Chen 1992).
//! * **Clear graph and embedding.** For each complete design the clear graph is built and the
//!   requirement graph embedded in it by backtracking (factors in letter order, each tried on
//!   every column that is clear-adjacent to the columns of its required partners already
//!   placed). Factors outside the requirement take the columns left over.
//! * **Search.** The minimum-aberration design is tried first: when its clear graph holds the
//!   requirement it is the answer (no design has less aberration). Otherwise a depth-first
//!   search over the interaction columns, in the same order and with the same word counts as
//!   the unconstrained search, keeps the best design whose clear graph holds the requirement,
//!   and cuts a branch once its words (which only grow as columns are added) plus the fewest
//!   words each remaining column could add reach the best such design found.
//! * **Isomorphism.** Whether a requirement can be embedded does not change when the basic
//!   factors are relabelled (the clear graph of the relabelled design is isomorphic), so the
//!   same orderly generation as the unconstrained search (Read 1978) is safe here: only the
//!   smallest image of each partial design under the relabellings of the basic factors is
//!   expanded. The relabelling of *factors* (which factor takes which column) is not reduced:
//!   the embedding tries every assignment that can work.
//! * **A counting bound.** Every clear interaction has a contrast of its own, not used by a main
//!   effect or another interaction, so k main effects and r required interactions need
//!   k + r ≤ N − 1 (stated here, not taken from a source); smaller run sizes are ruled out
//!   without a search.
//!
//! The search runs under a [`SearchBudget`]. When it finishes, the design is proven to be of
//! minimum aberration among those keeping the requirement clear, and a run size with no such
//! design is proven to have none; when the budget runs out first, the best design found is
//! returned and marked as not proven.

use super::column_search::{ColumnSearch, RelabellingSet};
use super::*;
use crate::alias::aliases_of;
use crate::term::TermError;

/// Largest run size tried when no run size is given.
pub const LARGEST_RUNS_TRIED: usize = 128;

/// Why no design keeping the required interactions clear can be returned.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum RequiredError {
    /// k or N is outside what a two-level fraction allows.
    #[error(transparent)]
    Search(#[from] SearchError),
    /// No interaction was named.
    #[error("no required interaction given (name them as `AB,CE`)")]
    Empty,
    /// A required interaction could not be read.
    #[error("required interaction `{label}`: {reason}")]
    BadTerm {
        /// The label as typed.
        label: String,
        /// Why it could not be read.
        reason: TermError,
    },
    /// A required term is not a two-factor interaction.
    #[error("required interaction `{label}` is not a two-factor interaction (it has {order} {})",
        if *.order == 1 { "letter" } else { "letters" })]
    NotTwoFactor {
        /// The term, in alphabetical order.
        label: String,
        /// Its number of letters.
        order: usize,
    },
    /// The search finished and no design of this run size keeps them clear.
    #[error("no {runs}-run design keeps {required} clear of other two-factor interactions{}",
        match .larger { Some(n) => format!("; {n} runs do"), None => String::new() })]
    NoDesign {
        /// The run size asked for.
        runs: usize,
        /// The required interactions, comma-separated.
        required: String,
        /// The next run size at which a design was found (every size in between ruled out).
        larger: Option<usize>,
    },
    /// The time ran out before a design was found or ruled out at this run size.
    #[error(
        "no {runs}-run design keeping {required} clear of other two-factor interactions was found before the search ran out of time"
    )]
    Undecided {
        /// The run size asked for.
        runs: usize,
        /// The required interactions, comma-separated.
        required: String,
    },
    /// No run size up to the largest tried has a design that keeps them clear.
    #[error(
        "no design of up to {max_runs} runs keeps {required} clear of other two-factor interactions{}",
        if *.finished { "" } else { " (the search did not finish at every size)" })]
    NoneUpTo {
        /// The largest run size tried.
        max_runs: usize,
        /// The required interactions, comma-separated.
        required: String,
        /// Whether every size was searched to the end.
        finished: bool,
    },
}

/// A design that keeps the required interactions clear.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct RequiredOutcome {
    /// The design. Its basic factors are the first factors (in letter order) whose columns are
    /// independent; the others are generated, each a positive product of basic factors.
    pub design: FractionalDesign,
    /// `(A3, A4, ..., Ak)` of the design.
    pub word_length_pattern: Vec<usize>,
    /// The required interactions, in the order of the trade.
    pub required: Vec<Term>,
    /// `true` when the search finished at this run size: no design of this size with less
    /// aberration keeps the required interactions clear.
    pub proven_minimum_aberration: bool,
    /// Smaller run sizes that were searched to the end (or ruled out by counting) without a
    /// design keeping them clear.
    pub smaller_runs_ruled_out: Vec<usize>,
    /// Smaller run sizes where the time ran out before a design was found or ruled out.
    pub smaller_runs_undecided: Vec<usize>,
    /// Number of partial designs the searches visited.
    pub nodes_explored: u64,
}

impl RequiredOutcome {
    /// Base runs of the design.
    pub fn runs(&self) -> usize {
        self.design.base_runs()
    }

    /// Whether every search finished: the design is of minimum aberration among those keeping
    /// the requirement clear, and no smaller run size tried has such a design.
    pub fn finished(&self) -> bool {
        self.proven_minimum_aberration && self.smaller_runs_undecided.is_empty()
    }
}

/// Reads a list of required interactions such as `AB, CE` (commas, semicolons or spaces between
/// them) for a design of `factor_count` factors: each must be two distinct factor letters.
/// Repeats are dropped; the list comes back in the order of the trade.
///
/// # Errors
/// [`RequiredError::BadTerm`] for a label that names no factor of the design,
/// [`RequiredError::NotTwoFactor`] for a term of one or three or more letters,
/// [`RequiredError::Empty`] for an empty list.
pub fn parse_required(text: &str, factor_count: usize) -> Result<Vec<Term>, RequiredError> {
    let mut terms = Vec::new();
    for label in text
        .split([',', ';', ' ', '\t'])
        .map(str::trim)
        .filter(|s| !s.is_empty())
    {
        let term = Term::parse(label, factor_count).map_err(|reason| RequiredError::BadTerm {
            label: label.to_string(),
            reason,
        })?;
        terms.push(term);
    }
    check_required(&terms, factor_count)
}

/// Checks that every term is a two-factor interaction of the first `factor_count` factors;
/// returns them without repeats, in the order of the trade.
///
/// # Errors
/// As [`parse_required`].
pub fn check_required(terms: &[Term], factor_count: usize) -> Result<Vec<Term>, RequiredError> {
    let mut out: Vec<Term> = Vec::with_capacity(terms.len());
    for &t in terms {
        if t.order() != 2 {
            return Err(RequiredError::NotTwoFactor {
                label: t.label(),
                order: t.order(),
            });
        }
        if t.span() > factor_count {
            let last = crate::term::factor_letter(factor_count.saturating_sub(1)).unwrap_or('A');
            let letter = t
                .factors()
                .find(|&f| f >= factor_count)
                .and_then(crate::term::factor_letter)
                .unwrap_or('?');
            return Err(RequiredError::BadTerm {
                label: t.label(),
                reason: TermError::UnknownFactor {
                    letter,
                    label: t.label(),
                    last,
                },
            });
        }
        if !out.contains(&t) {
            out.push(t);
        }
    }
    if out.is_empty() {
        return Err(RequiredError::Empty);
    }
    out.sort();
    Ok(out)
}

/// Whether every required interaction is clear in `design`: its aliases of up to two letters
/// (from the defining relation, [`crate::alias::aliases_of`]) are none. This is the check of the
/// definition, independent of the clear graphs the search uses.
pub fn keeps_clear(design: &FractionalDesign, required: &[Term]) -> bool {
    required
        .iter()
        .all(|&t| aliases_of(design, t, 2).is_empty())
}

/// Finds a design of minimum aberration among the regular 2^(k−p) fractions that keep every
/// `required` two-factor interaction clear (see the module documentation for the method).
///
/// With `runs`, the search is at that size; without, run sizes from the smallest fraction
/// (N ≥ k + 1) up to the full factorial or [`LARGEST_RUNS_TRIED`] runs, whichever is smaller,
/// are tried in turn and the first that has such a design is returned. The budget covers the
/// whole call: each run size may use an equal share of the time still left.
///
/// # Errors
/// [`RequiredError::Search`] for a bad k or N; the errors of [`check_required`];
/// [`RequiredError::NoDesign`] when the given run size has no such design (naming the next run
/// size that has one, when the time allows finding it), [`RequiredError::Undecided`] when the
/// time ran out first, [`RequiredError::NoneUpTo`] when no size tried has one.
pub fn design_keeping_clear(
    factor_count: usize,
    required: &[Term],
    runs: Option<usize>,
    budget: &SearchBudget,
) -> Result<RequiredOutcome, RequiredError> {
    if !(2..=MAX_FACTORS).contains(&factor_count) {
        return Err(SearchError::Size(DesignError::FactorCount(factor_count)).into());
    }
    let required = check_required(required, factor_count)?;
    if let Some(n) = runs {
        check_search_size(factor_count, n)?;
    }
    let end = Instant::now().checked_add(budget.time);
    let first = smallest_runs(factor_count);
    let full = 1usize
        .checked_shl(factor_count as u32)
        .unwrap_or(usize::MAX);
    let largest = runs.map_or(LARGEST_RUNS_TRIED.min(full), |n| {
        // For the hint after a failure at N: the next sizes, up to the largest tried.
        LARGEST_RUNS_TRIED.max(n).min(full)
    });
    let start = runs.unwrap_or(first);
    let sizes: Vec<usize> = std::iter::successors(Some(start), |&n| n.checked_mul(2))
        .take_while(|&n| n <= largest)
        .collect();
    let list = required
        .iter()
        .map(|t| t.label())
        .collect::<Vec<_>>()
        .join(", ");
    let mut ruled_out = Vec::new();
    let mut undecided = Vec::new();
    let mut nodes = 0u64;
    for (i, &n) in sizes.iter().enumerate() {
        // A run size asked for may use the whole budget; the sizes above it (for the hint
        // after a failure) and the sizes tried in turn share what is left.
        let deadline = if runs == Some(n) {
            end
        } else {
            share_of(end, sizes.len() - i)
        };
        let q = n.trailing_zeros() as usize;
        let found = search_size(factor_count, q, &required, deadline);
        nodes += found.nodes;
        match found.best {
            Some(points) => {
                if let Some(asked) = runs
                    && asked != n
                {
                    // A run size was given and has none: report it, naming this size only when
                    // every size in between was ruled out.
                    return Err(RequiredError::NoDesign {
                        runs: asked,
                        required: list,
                        larger: undecided.is_empty().then_some(n),
                    });
                }
                let design = design_from_points(factor_count, q, &points, &required)?;
                return Ok(RequiredOutcome {
                    word_length_pattern: crate::alias::word_length_pattern(&design),
                    design,
                    required,
                    proven_minimum_aberration: found.finished,
                    smaller_runs_ruled_out: ruled_out,
                    smaller_runs_undecided: undecided,
                    nodes_explored: nodes,
                });
            }
            None if found.finished => ruled_out.push(n),
            None => {
                if runs == Some(n) {
                    return Err(RequiredError::Undecided {
                        runs: n,
                        required: list,
                    });
                }
                undecided.push(n);
            }
        }
    }
    match runs {
        Some(n) if ruled_out.first() == Some(&n) => Err(RequiredError::NoDesign {
            runs: n,
            required: list,
            larger: None,
        }),
        Some(n) => Err(RequiredError::Undecided {
            runs: n,
            required: list,
        }),
        None => Err(RequiredError::NoneUpTo {
            max_runs: largest,
            required: list,
            finished: undecided.is_empty(),
        }),
    }
}

/// An equal share of the time left until `end` for the next of `left` searches.
fn share_of(end: Option<Instant>, left: usize) -> Option<Instant> {
    end.map(|end| {
        let now = Instant::now();
        let rest = end.saturating_duration_since(now);
        now + rest / u32::try_from(left.max(1)).unwrap_or(u32::MAX)
    })
}

/// What the search at one run size found.
struct SizeResult {
    /// The columns of the best design (basic factors first), when one keeps the requirement.
    best: Option<Vec<u32>>,
    /// Whether the search at this size finished.
    finished: bool,
    nodes: u64,
}

/// The requirement as a graph: for each factor, the bit set of its required partners.
fn requirement_graph(k: usize, required: &[Term]) -> Vec<u32> {
    let mut adj = vec![0u32; k];
    for t in required {
        let mut f = t.factors();
        if let (Some(a), Some(b)) = (f.next(), f.next()) {
            adj[a] |= 1 << b;
            adj[b] |= 1 << a;
        }
    }
    adj
}

/// Clear graphs of designs given as columns, with a reusable table of pair products.
struct ClearGraphs {
    /// For each column value of the 2^q factorial: pairs whose product it is (saturating),
    /// plus two when it is a column of the design (so it never reads as one). Empty beyond
    /// [`PRIMAL_MAX_BASIC`] basic factors, where a map is used instead.
    hits: Vec<u8>,
}

impl ClearGraphs {
    fn new(q: usize) -> ClearGraphs {
        let size = if q <= PRIMAL_MAX_BASIC { 1 << q } else { 0 };
        ClearGraphs {
            hits: vec![0; size],
        }
    }

    /// For each column (by index in `points`), the bit set of columns it has a clear
    /// interaction with: a·b is no column and no other pair's product (Wu & Chen 1992).
    fn adjacency(&mut self, points: &[u32]) -> Vec<u32> {
        if self.hits.is_empty() {
            let mut map: HashMap<u32, u8> = HashMap::new();
            count_hits(points, |x| {
                let h = map.entry(x).or_insert(0);
                *h = h.saturating_add(1);
            });
            return clear_pairs(points, |x| map.get(&x).copied().unwrap_or(0));
        }
        let hits = &mut self.hits;
        count_hits(points, |x| {
            let h = &mut hits[x as usize];
            *h = h.saturating_add(1);
        });
        let adj = clear_pairs(points, |x| self.hits[x as usize]);
        for (i, &a) in points.iter().enumerate() {
            self.hits[a as usize] = 0;
            for &b in &points[i + 1..] {
                self.hits[(a ^ b) as usize] = 0;
            }
        }
        adj
    }
}

/// Calls `hit` once for the product of every pair of `points` and twice for every point.
fn count_hits(points: &[u32], mut hit: impl FnMut(u32)) {
    for (i, &a) in points.iter().enumerate() {
        for &b in &points[i + 1..] {
            hit(a ^ b);
        }
    }
    for &a in points {
        hit(a);
        hit(a);
    }
}

/// The clear graph from the counts of [`count_hits`]: a pair is clear when its product was hit
/// exactly once (by itself).
fn clear_pairs(points: &[u32], hits: impl Fn(u32) -> u8) -> Vec<u32> {
    let mut adj = vec![0u32; points.len()];
    for (i, &a) in points.iter().enumerate() {
        for (j, &b) in points.iter().enumerate().skip(i + 1) {
            if hits(a ^ b) == 1 {
                adj[i] |= 1 << j;
                adj[j] |= 1 << i;
            }
        }
    }
    adj
}

/// Embeds the requirement graph `req` (per factor, its required partners) in the clear graph
/// `clear` (per column index, its clear partners): returns the column index of every factor,
/// or `None` when the requirement graph is no subgraph of the clear graph. Factors with
/// requirements are placed in letter order by backtracking, each on the first column (in the
/// order of `clear`) that keeps all its placed partners clear; the others fill the columns left.
fn embed(req: &[u32], clear: &[u32]) -> Option<Vec<usize>> {
    let needed = req.iter().map(|m| m.count_ones()).sum::<u32>() / 2;
    let have = clear.iter().map(|m| m.count_ones()).sum::<u32>() / 2;
    if have < needed {
        return None;
    }
    let order: Vec<usize> = (0..req.len()).filter(|&f| req[f] != 0).collect();
    let mut at = vec![usize::MAX; req.len()];
    if !place(req, clear, &order, 0, &mut at, 0) {
        return None;
    }
    let mut used: u32 = at
        .iter()
        .filter(|&&c| c != usize::MAX)
        .fold(0, |m, &c| m | 1 << c);
    for slot in at.iter_mut().filter(|c| **c == usize::MAX) {
        let c = (0..clear.len()).find(|&c| used & 1 << c == 0)?;
        *slot = c;
        used |= 1 << c;
    }
    Some(at)
}

fn place(
    req: &[u32],
    clear: &[u32],
    order: &[usize],
    i: usize,
    at: &mut [usize],
    used: u32,
) -> bool {
    let Some(&f) = order.get(i) else {
        return true;
    };
    let degree = req[f].count_ones();
    for c in 0..clear.len() {
        if used & 1 << c != 0 || clear[c].count_ones() < degree {
            continue;
        }
        let fits = order[..i]
            .iter()
            .all(|&g| req[f] & 1 << g == 0 || clear[c] & 1 << at[g] != 0);
        if fits {
            at[f] = c;
            if place(req, clear, order, i + 1, at, used | 1 << c) {
                return true;
            }
            at[f] = usize::MAX;
        }
    }
    false
}

/// The search at one run size N = 2^q.
fn search_size(k: usize, q: usize, required: &[Term], deadline: Option<Instant>) -> SizeResult {
    search_size_with(k, q, required, deadline, RelabellingSet::Every, true)
}

/// [`search_size`] with a choice of relabellings for the orderly test and of whether the
/// minimum-aberration design is tried first (tests turn both off to check that nothing is lost).
fn search_size_with(
    k: usize,
    q: usize,
    required: &[Term],
    deadline: Option<Instant>,
    relabellings: RelabellingSet,
    try_minimum_aberration_first: bool,
) -> SizeResult {
    let units: Vec<u32> = (0..q).map(|i| 1u32 << i).collect();
    let req = requirement_graph(k, required);
    let mut graphs = ClearGraphs::new(q);
    if k == q {
        // The full factorial: every interaction is clear.
        return SizeResult {
            best: Some(units),
            finished: true,
            nodes: 0,
        };
    }
    if k + required.len() >= 1 << q {
        return SizeResult {
            best: None,
            finished: true,
            nodes: 0,
        };
    }
    if !try_minimum_aberration_first {
        return constrained_search(k, q, req, graphs, deadline, relabellings, None, 0);
    }
    // The minimum-aberration design first, with half the time of this size.
    let half = deadline.map(|d| {
        let now = Instant::now();
        now + d.saturating_duration_since(now) / 2
    });
    let raw = search_columns(k, q, half);
    let nodes = raw.nodes;
    let mut points: Vec<u32> = units;
    points.extend(&raw.columns);
    let mut seed = None;
    if embed(&req, &graphs.adjacency(&points)).is_some() {
        if raw.proven {
            return SizeResult {
                best: Some(points),
                finished: true,
                nodes,
            };
        }
        seed = Some((raw.pattern, raw.columns));
    }
    if q > PRIMAL_MAX_BASIC {
        // Too many runs for the column tables: only the unconstrained design was tried.
        return SizeResult {
            best: seed.map(|_| points),
            finished: false,
            nodes,
        };
    }
    constrained_search(k, q, req, graphs, deadline, relabellings, seed, nodes)
}

/// Runs [`Constrained`] from `seed` (the pattern and columns of a design known to keep the
/// requirement), adding its nodes to `nodes`.
#[expect(
    clippy::too_many_arguments,
    reason = "one private call site and one for tests"
)]
fn constrained_search(
    k: usize,
    q: usize,
    req: Vec<u32>,
    graphs: ClearGraphs,
    deadline: Option<Instant>,
    relabellings: RelabellingSet,
    seed: Option<(Vec<u64>, Vec<u32>)>,
    nodes: u64,
) -> SizeResult {
    let units: Vec<u32> = (0..q).map(|i| 1u32 << i).collect();
    let mut search = Constrained {
        cs: ColumnSearch::with_relabellings(k, q, deadline, relabellings),
        p: k - q,
        req,
        graphs,
        units,
        best: seed,
        nodes: 0,
        deadline,
        timed_out: false,
    };
    let candidates = search.cs.candidate_ranks();
    let taus = vec![u32::MAX; search.cs.relabelling_count()];
    search.dfs(&mut Vec::with_capacity(k - q), &candidates, &taus);
    SizeResult {
        best: search.best.map(|(_, columns)| {
            let mut points = search.units.clone();
            points.extend(columns);
            points
        }),
        finished: !search.timed_out,
        nodes: nodes + search.nodes,
    }
}

/// Depth-first search for the design of least aberration whose clear graph holds the
/// requirement (see the module documentation).
struct Constrained {
    cs: ColumnSearch,
    /// Number of interaction columns to add.
    p: usize,
    req: Vec<u32>,
    graphs: ClearGraphs,
    units: Vec<u32>,
    /// Best design so far that keeps the requirement: its pattern and generated columns.
    best: Option<(Vec<u64>, Vec<u32>)>,
    nodes: u64,
    deadline: Option<Instant>,
    timed_out: bool,
}

impl Constrained {
    fn out_of_time(&mut self) -> bool {
        if !self.timed_out
            && self.nodes % 256 == 1
            && self.deadline.is_some_and(|d| Instant::now() >= d)
        {
            self.timed_out = true;
        }
        self.timed_out
    }

    /// Whether the design of the basic columns plus the columns of `chosen` (ranks) can keep
    /// the requirement clear.
    fn holds_requirement(&mut self, chosen: &[u32]) -> bool {
        let mut points = self.units.clone();
        points.extend(chosen.iter().map(|&r| self.cs.column_of(r)));
        let clear = self.graphs.adjacency(&points);
        embed(&self.req, &clear).is_some()
    }

    fn dfs(&mut self, chosen: &mut Vec<u32>, candidates: &[u32], taus: &[u32]) {
        self.nodes += 1;
        if self.out_of_time() {
            return;
        }
        let r = self.p - chosen.len();
        let pattern = self.cs.pattern();
        if r == 0 {
            let better = self.best.as_ref().is_none_or(|(b, _)| pattern < *b);
            if better && self.holds_requirement(chosen) {
                let columns = chosen.iter().map(|&c| self.cs.column_of(c)).collect();
                self.best = Some((pattern, columns));
            }
            return;
        }
        if candidates.len() < r {
            return;
        }
        // Lower bound: the words so far plus the r smallest additions (words only grow).
        let next: Vec<u32> = match &self.best {
            Some((best, _)) => {
                let mut order: Vec<u32> = candidates.to_vec();
                order.sort_by(|&a, &b| self.cs.additions(a).cmp(self.cs.additions(b)));
                let mut bound = pattern.clone();
                for &c in &order[..r - 1] {
                    column_search::add_into(&mut bound, self.cs.additions(c));
                }
                if column_search::cmp_sum(&bound, self.cs.additions(order[r - 1]), best)
                    != Ordering::Less
                {
                    return;
                }
                candidates
                    .iter()
                    .copied()
                    .filter(|&c| {
                        column_search::cmp_sum(&bound, self.cs.additions(c), best) == Ordering::Less
                    })
                    .collect()
            }
            None => candidates.to_vec(),
        };
        let mut child_taus = Vec::with_capacity(taus.len());
        for (i, &c) in next.iter().enumerate() {
            if next.len() - i < r {
                break;
            }
            chosen.push(c);
            if self.cs.is_smallest_image(chosen, taus, &mut child_taus) {
                let column = self.cs.column_of(c);
                self.cs.add(column);
                self.dfs(chosen, &next[i + 1..], &child_taus);
                self.cs.remove(column);
            }
            chosen.pop();
            if self.timed_out {
                return;
            }
        }
    }
}

/// The design with the factors on `points` (columns over q basic factors) as the requirement's
/// embedding places them; basic factors are the first factors, in letter order, whose columns
/// are independent, and every other factor is generated as the product of basic factors that
/// gives its column.
fn design_from_points(
    k: usize,
    q: usize,
    points: &[u32],
    required: &[Term],
) -> Result<FractionalDesign, RequiredError> {
    let req = requirement_graph(k, required);
    let clear = ClearGraphs::new(q).adjacency(points);
    let at = embed(&req, &clear).ok_or_else(|| {
        SearchError::Design(DesignError::BadGenerator {
            text: String::new(),
            reason: "the design found no longer keeps the requirement".into(),
        })
    })?;
    // Gaussian elimination over GF(2): each row is (pivot bit, column, factors whose product
    // gives that column); rows stay reduced against the pivots before them.
    let mut rows: Vec<(u32, u32, u32)> = Vec::with_capacity(q);
    let mut generators = Vec::new();
    for (f, &c) in at.iter().enumerate() {
        let mut v = points[c];
        let mut combo = 0u32;
        for &(pivot, col, factors) in &rows {
            if v & pivot != 0 {
                v ^= col;
                combo ^= factors;
            }
        }
        if v == 0 {
            generators.push(Generator {
                factor: f,
                word: SignedTerm::plus(Term::from_bits(combo)),
            });
        } else {
            rows.push((1 << v.trailing_zeros(), v, combo | 1 << f));
        }
    }
    FractionalDesign::with_generators(k, generators)
        .map_err(|e| RequiredError::Search(SearchError::Design(e)))
}

#[cfg(test)]
mod tests;
