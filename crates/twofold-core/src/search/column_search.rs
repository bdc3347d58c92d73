//! The column-side engine: depth-first branch and bound over the interaction columns of the 2^q
//! factorial, with incremental word counts and isomorphism pruning (see the parent module).

use super::*;
use rayon::prelude::*;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering as AtomicOrdering};
use std::sync::{Arc, Mutex, PoisonError};
/// Adds `b` to `a` entry by entry.
pub(super) fn add_into(a: &mut [u64], b: &[u32]) {
    for (x, &y) in a.iter_mut().zip(b) {
        *x += u64::from(y);
    }
}

/// Lexicographic comparison of `base + extra` with `other`, without building the sum.
pub(super) fn cmp_sum(base: &[u64], extra: &[u32], other: &[u64]) -> Ordering {
    for ((&b, &e), &o) in base.iter().zip(extra).zip(other) {
        match (b + u64::from(e)).cmp(&o) {
            Ordering::Equal => {}
            unequal => return unequal,
        }
    }
    Ordering::Equal
}

/// Relabellings of the basic factors used by the isomorphism test, acting on column ranks.
pub(super) enum Relabellings {
    /// Every permutation but the identity, as a table `images[rank·count + π]` (all images of
    /// one column side by side, which the test reads in one sweep).
    Table { count: usize, images: Vec<u32> },
    /// The transpositions of two basic factors, applied on the fly.
    Swaps { pairs: Vec<(u32, u32)> },
}

/// All permutations of `0..n` in a fixed order (recursive swaps), the identity first.
pub(super) fn permutations(n: usize) -> Vec<Vec<usize>> {
    pub(super) fn rec(i: usize, cur: &mut Vec<usize>, out: &mut Vec<Vec<usize>>) {
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
pub(super) enum PairBound {
    /// No completion can beat the incumbent.
    Cut,
    /// The candidates that may still take part in a better completion (in search order).
    Keep(Vec<u32>),
    /// No incumbent yet, or too many candidates to try.
    Unknown,
}

/// Which relabellings of the basic factors the isomorphism test uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum RelabellingSet {
    /// All q! permutations (q ≤ 7), else the transpositions.
    Default,
    /// The same, whatever the number of generators: for searches that test every partial
    /// design, not only those with many columns still to come.
    Every,
    /// Only the transpositions of two basic factors.
    #[cfg(test)]
    Swaps,
    /// None: no isomorphism pruning at all.
    #[cfg(test)]
    Nothing,
}

/// Entries per column value in [`ColumnSearch::counts`]: word lengths 0..=k, padded to a fixed
/// length (k ≤ 25) so the updates of a row compile to vector code. Entries past the number of
/// columns chosen stay zero.
const ROW: usize = 32;

/// Depth-first branch and bound over the interaction columns of the 2^q factorial.
pub(super) struct ColumnSearch {
    q: usize,
    k: usize,
    p: usize,
    /// Candidate columns in search order (rank = q + index): most letters first, then by value.
    columns: Vec<u32>,
    /// Rank of every column value (basic factors 0..q).
    rank_of: Vec<u32>,
    relabellings: Arc<Relabellings>,
    /// `counts[x·ROW + j]` = number of j-subsets of the chosen columns (basic ones included)
    /// whose product is x.
    pub(super) counts: Vec<u32>,
    /// Best design so far: its pattern and its generated columns.
    best: Option<(Vec<u64>, Vec<u32>)>,
    nodes: u64,
    deadline: Option<Instant>,
    timed_out: bool,
    /// Copies of `counts` by depth (see [`Self::save_counts`]).
    saved: Vec<Vec<u32>>,
    /// When searching one subtree of a parallel search: the incumbent shared by all subtrees.
    shared: Option<Arc<Shared>>,
    /// Number of the subtree searched (1, 2, ... in search order; 0 for the whole tree).
    task: usize,
    /// Version of the shared incumbent last read.
    seen: u64,
    /// While the top of the tree is cut into subtrees: the depth at which they start, and the
    /// subtrees found so far.
    split: Option<(usize, Vec<Subtree>)>,
}

/// A subtree of the search: the columns chosen above it, the candidates left, and the state of
/// the isomorphism test.
#[derive(Debug, Clone)]
pub(super) struct Subtree {
    chosen: Vec<u32>,
    candidates: Vec<u32>,
    taus: Vec<u32>,
}

/// The best design found by any subtree of a parallel search, with the number of the subtree
/// that found it (0 for the greedy seed).
#[derive(Debug, Clone)]
struct Incumbent {
    pattern: Vec<u64>,
    columns: Vec<u32>,
    task: usize,
}

/// What the subtrees of a parallel search share.
///
/// # Determinism
/// The serial search keeps the first design, in search order, with the smallest pattern (or the
/// greedy seed when that is already smallest), because it only ever replaces its incumbent by a
/// strictly better design. The subtrees keep that rule by ordering incumbents by (pattern,
/// subtree number): a subtree cuts a branch that only ties with an incumbent found by an
/// earlier subtree (or the seed), but keeps branches that tie with one found by a later subtree,
/// which its own equal design would displace. So whenever the search finishes it returns the
/// same generators as the serial search, whichever thread finishes first. (Only the node
/// count, which depends on when each subtree saw the incumbent, varies between runs.)
#[derive(Debug)]
struct Shared {
    best: Mutex<Option<Incumbent>>,
    /// Bumped at every change of `best`, so a subtree reads it only when it changed.
    version: AtomicU64,
    timed_out: AtomicBool,
}

impl ColumnSearch {
    pub(super) fn new(k: usize, q: usize, deadline: Option<Instant>) -> ColumnSearch {
        ColumnSearch::with_relabellings(k, q, deadline, RelabellingSet::Default)
    }

    pub(super) fn with_relabellings(
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
        // The test only runs where at least `ISOMORPHISM_TEST_MIN_LEFT` columns are still to be
        // chosen (see `dfs`), so with fewer generators no table is needed.
        let p = k - q;
        let every = set == RelabellingSet::Every;
        let relabellings = if q <= ALL_RELABELLINGS_MAX_BASIC
            && (every || set == RelabellingSet::Default && p >= ISOMORPHISM_TEST_MIN_LEFT)
        {
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
            let basic = if p >= ISOMORPHISM_TEST_MIN_LEFT || every {
                q as u32
            } else {
                0
            };
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
        let mut search = ColumnSearch {
            q,
            k,
            p,
            columns,
            rank_of,
            relabellings: Arc::new(relabellings),
            counts: vec![0; size * ROW],
            best: None,
            nodes: 0,
            deadline,
            timed_out: false,
            saved: Vec::new(),
            shared: None,
            task: 0,
            seen: 0,
            split: None,
        };
        search.counts[0] = 1; // the empty set multiplies to I
        for i in 0..q {
            search.add(1 << i);
        }
        search
    }

    /// The column (bit set over the basic factors) of rank `rank` (basic factors first).
    pub(super) fn column_of(&self, rank: u32) -> u32 {
        let rank = rank as usize;
        if rank < self.q {
            1 << rank
        } else {
            self.columns[rank - self.q]
        }
    }

    /// Ranks of the interaction columns, in search order.
    pub(super) fn candidate_ranks(&self) -> Vec<u32> {
        (0..self.columns.len())
            .map(|i| (self.q + i) as u32)
            .collect()
    }

    pub(super) fn relabelling_count(&self) -> usize {
        match &*self.relabellings {
            Relabellings::Table { count, .. } => *count,
            Relabellings::Swaps { pairs } => pairs.len(),
        }
    }

    /// Rank of the image of the column of rank `rank` under relabelling `pi`.
    pub(super) fn image(&self, pi: usize, rank: u32) -> u32 {
        match &*self.relabellings {
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
    pub(super) fn add(&mut self, z: u32) {
        self.for_each_pair(z, |rx, ry| {
            // Copies of the old rows, so the loop has no dependence between its steps and,
            // rows being of a fixed length, the compiler vectorises it.
            let mut old_x = [0u32; ROW];
            let mut old_y = [0u32; ROW];
            old_x.copy_from_slice(rx);
            old_y.copy_from_slice(ry);
            for j in 1..ROW {
                rx[j] += old_y[j - 1];
                ry[j] += old_x[j - 1];
            }
        });
    }

    /// Keeps a copy of the counts before a column is added at depth `depth`, where that is
    /// cheaper than undoing the addition (small factorials: a copy of 2^q rows is one memcpy,
    /// while [`Self::remove`] runs a dependent chain along every row). Returns whether it did.
    fn save_counts(&mut self, depth: usize) -> bool {
        if self.q > SNAPSHOT_MAX_BASIC {
            return false;
        }
        if self.saved.len() <= depth {
            self.saved.resize_with(depth + 1, Vec::new);
        }
        let slot = &mut self.saved[depth];
        slot.clear();
        slot.extend_from_slice(&self.counts);
        true
    }

    /// Undoes the addition of `column` at depth `depth`: from the copy when
    /// [`Self::save_counts`] made one, else by [`Self::remove`].
    fn restore_counts(&mut self, depth: usize, saved: bool, column: u32) {
        if saved {
            self.counts.copy_from_slice(&self.saved[depth]);
        } else {
            self.remove(column);
        }
    }

    /// Undoes [`Self::add`]: `n_j(x) −= n_{j−1}(x·z)` in increasing j.
    pub(super) fn remove(&mut self, z: u32) {
        self.for_each_pair(z, |rx, ry| {
            for j in 1..rx.len() {
                rx[j] -= ry[j - 1];
                ry[j] -= rx[j - 1];
            }
        });
    }

    /// Calls `f` once for every pair of column values {x, x·z} (x < x·z) with their rows of
    /// counts, so [`Self::add`] and [`Self::remove`] can update both rows of a pair together.
    fn for_each_pair(&mut self, z: u32, mut f: impl FnMut(&mut [u32], &mut [u32])) {
        let z = z as usize;
        for x in 0..self.counts.len() / ROW {
            let y = x ^ z;
            if y < x {
                continue;
            }
            let (lo, hi) = self.counts.split_at_mut(y * ROW);
            f(&mut lo[x * ROW..x * ROW + ROW], &mut hi[..ROW]);
        }
    }

    /// Current word-length pattern `(A3, ..., Ak)`.
    pub(super) fn pattern(&self) -> Vec<u64> {
        self.counts[3..=self.k]
            .iter()
            .map(|&a| u64::from(a))
            .collect()
    }

    /// Words of lengths 3..=k that adding the column of rank `rank` would create.
    pub(super) fn additions(&self, rank: u32) -> &[u32] {
        let x = self.columns[rank as usize - self.q] as usize;
        &self.counts[x * ROW + 2..x * ROW + self.k]
    }

    pub(super) fn beats_best(&self, pattern: &[u64]) -> bool {
        self.best
            .as_ref()
            .is_none_or(|(b, _)| pattern.cmp(b) == Ordering::Less)
    }

    /// Greedy designs: from each possible first column (one per number of letters, which is all
    /// a first column can differ in up to relabelling; the six longest when there are many basic
    /// factors), add the column that creates the lexicographically fewest words. The best of them
    /// seeds the search.
    pub(super) fn seed(&mut self) {
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

    /// Runs the search: greedy seeds, then the branch and bound, its subtrees below
    /// [`PARALLEL_SPLIT_DEPTH`] columns searched in parallel when there are enough generators.
    pub(super) fn run(self) -> RawOutcome {
        self.run_split(PARALLEL_SPLIT_DEPTH)
    }

    /// [`Self::run`] with the tree cut into parallel subtrees at depth `split_depth` at most
    /// (0: the whole search on this thread).
    pub(super) fn run_split(mut self, split_depth: usize) -> RawOutcome {
        self.seed();
        let candidates: Vec<u32> = (0..self.columns.len())
            .map(|i| (self.q + i) as u32)
            .collect();
        let taus = vec![u32::MAX; self.relabelling_count()];
        let mut chosen = Vec::with_capacity(self.p);
        // Each subtree needs a few columns of its own to be worth a task.
        let depth = split_depth.min(self.p.saturating_sub(PARALLEL_MIN_LEFT));
        if depth == 0 {
            self.dfs(&mut chosen, &candidates, &taus);
            let (pattern, mut columns) = self.best.take().unwrap_or_default();
            columns.sort_by_key(|&c| self.rank_of[c as usize]);
            return RawOutcome {
                columns,
                pattern,
                proven: !self.timed_out,
                nodes: self.nodes,
            };
        }
        self.split = Some((depth, Vec::new()));
        self.dfs(&mut chosen, &candidates, &taus);
        let subtrees = self.split.take().map(|(_, t)| t).unwrap_or_default();
        let shared = Arc::new(Shared {
            best: Mutex::new(self.best.take().map(|(pattern, columns)| Incumbent {
                pattern,
                columns,
                task: 0,
            })),
            version: AtomicU64::new(1),
            timed_out: AtomicBool::new(self.timed_out),
        });
        let top_nodes = self.nodes;
        let base = &self;
        let nodes: u64 = subtrees
            .par_iter()
            .with_max_len(1)
            .enumerate()
            .map(|(i, subtree)| base.search_subtree(i + 1, subtree, &shared))
            .sum();
        let incumbent = shared
            .best
            .lock()
            .unwrap_or_else(PoisonError::into_inner)
            .take();
        let (pattern, mut columns) = incumbent
            .map(|b| (b.pattern, b.columns))
            .unwrap_or_default();
        columns.sort_by_key(|&c| self.rank_of[c as usize]);
        RawOutcome {
            columns,
            pattern,
            proven: !shared.timed_out.load(AtomicOrdering::Relaxed),
            nodes: top_nodes + nodes,
        }
    }

    /// Searches one subtree of a parallel search on a copy of the search state (the basic
    /// factors only) and returns its node count.
    fn search_subtree(&self, task: usize, subtree: &Subtree, shared: &Arc<Shared>) -> u64 {
        if shared.timed_out.load(AtomicOrdering::Relaxed) {
            return 0;
        }
        let mut worker = ColumnSearch {
            q: self.q,
            k: self.k,
            p: self.p,
            columns: self.columns.clone(),
            rank_of: self.rank_of.clone(),
            relabellings: Arc::clone(&self.relabellings),
            counts: self.counts.clone(),
            best: None,
            nodes: 0,
            deadline: self.deadline,
            timed_out: false,
            saved: Vec::new(),
            shared: Some(Arc::clone(shared)),
            task,
            seen: 0,
            split: None,
        };
        for &c in &subtree.chosen {
            worker.add(worker.columns[c as usize - worker.q]);
        }
        let mut chosen = subtree.chosen.clone();
        worker.dfs(&mut chosen, &subtree.candidates, &subtree.taus);
        if worker.timed_out {
            shared.timed_out.store(true, AtomicOrdering::Relaxed);
        }
        worker.nodes
    }

    /// Reads the shared incumbent of a parallel search when it changed. An incumbent from an
    /// earlier subtree (or the seed) cuts ties; one from a later subtree does not, so it is
    /// raised by one word in its last entry: for patterns of integers, `a < b + e_last` exactly
    /// when `a ≤ b` (see [`Shared`]).
    fn sync(&mut self) {
        let Some(shared) = &self.shared else { return };
        if shared.timed_out.load(AtomicOrdering::Relaxed) {
            self.timed_out = true;
        }
        let version = shared.version.load(AtomicOrdering::Acquire);
        if version == self.seen {
            return;
        }
        let guard = shared.best.lock().unwrap_or_else(PoisonError::into_inner);
        self.seen = version;
        if let Some(b) = guard.as_ref() {
            let mut pattern = b.pattern.clone();
            if b.task > self.task
                && let Some(last) = pattern.last_mut()
            {
                *last += 1;
            }
            self.best = Some((pattern, b.columns.clone()));
        }
    }

    /// Records a design better than the incumbent; in a parallel search, also offers it to the
    /// other subtrees.
    fn found(&mut self, pattern: Vec<u64>, columns: Vec<u32>) {
        if let Some(shared) = &self.shared {
            let mut guard = shared.best.lock().unwrap_or_else(PoisonError::into_inner);
            let better = guard
                .as_ref()
                .is_none_or(|b| (pattern.as_slice(), self.task) < (b.pattern.as_slice(), b.task));
            if better {
                *guard = Some(Incumbent {
                    pattern: pattern.clone(),
                    columns: columns.clone(),
                    task: self.task,
                });
                shared.version.fetch_add(1, AtomicOrdering::Release);
            }
        }
        self.best = Some((pattern, columns));
    }

    /// Full comparison of the image of `chosen` under `pi` with `chosen` (both as sorted rank
    /// lists): `None` when the image is smaller, else the rank of `chosen` at the first
    /// difference (`u32::MAX` when equal).
    pub(super) fn compare_image(&self, pi: usize, chosen: &[u32]) -> Option<u32> {
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
    pub(super) fn is_smallest_image(
        &self,
        chosen: &[u32],
        taus: &[u32],
        out: &mut Vec<u32>,
    ) -> bool {
        /// Marks a relabelling whose image ties with the parent's threshold.
        const TIE: u32 = u32::MAX - 1;
        let Some(&c) = chosen.last() else { return true };
        out.clear();
        match &*self.relabellings {
            Relabellings::Table { count, images } => {
                // The parent's threshold is below c whenever it is set, so min(τ, c) is the
                // threshold in both cases. One pass in blocks: each block's verdicts are
                // computed without branches (so the compiler vectorises them) and the test stops
                // at the first block with a smaller image.
                const BLOCK: usize = 64;
                let row = &images[c as usize * count..(c as usize + 1) * count];
                out.reserve(taus.len());
                let mut any_tie = false;
                let mut block = [0u32; BLOCK];
                for (images, taus) in row.chunks(BLOCK).zip(taus.chunks(BLOCK)) {
                    let mut below = false;
                    let mut tie = false;
                    for ((o, &image), &tau) in block.iter_mut().zip(images).zip(taus) {
                        let threshold = tau.min(c);
                        below |= image < threshold;
                        let verdict = if image > threshold {
                            threshold
                        } else if tau == u32::MAX {
                            u32::MAX
                        } else {
                            TIE
                        };
                        tie |= verdict == TIE;
                        *o = verdict;
                    }
                    if below {
                        return false;
                    }
                    any_tie |= tie;
                    out.extend_from_slice(&block[..images.len()]);
                }
                if any_tie {
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

    pub(super) fn out_of_time(&mut self) -> bool {
        if !self.timed_out
            && self.nodes % 256 == 1
            && self.deadline.is_some_and(|d| Instant::now() >= d)
        {
            self.timed_out = true;
            if let Some(shared) = &self.shared {
                shared.timed_out.store(true, AtomicOrdering::Relaxed);
            }
        }
        self.timed_out
    }

    /// Two columns to go: tries every pair exactly instead of branching. After adding c, the
    /// words that y adds are `n_j(y) + n_{j−1}(y·c)`, so each pair costs a few reads, with an
    /// early exit once the sum is decided against the incumbent.
    pub(super) fn best_pair(&mut self, chosen: &[u32], pattern: &[u64], next: &[u32]) {
        let w = ROW;
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
                    self.found(sum, columns);
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
    pub(super) fn pair_bound(&self, pattern: &[u64], next: &[u32], r: usize) -> PairBound {
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
        let w = ROW;
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

    /// A lower bound on the number of words of length four of every completion with `r` more
    /// columns and no word of length three, from counting pairs of columns by their product.
    ///
    /// # Formula
    /// Two distinct pairs of columns with the same product x are disjoint and make a word of
    /// length four, and each such word splits into pairs in three ways, so
    /// `3·A4 = Σ_x C(m_x, 2)`, where m_x is the number of pairs of columns whose product is x
    /// (the count of aliased pairs of two-factor interactions, as in Cheng, Steinberg & Sun
    /// 1999, *Journal of the Royal Statistical Society B* 61, 85–93; cited from memory, not
    /// checked against a copy: the identity is proved in the two lines above). In a design without words of length three no pair multiplies
    /// to a column of the design, so the `C(k, 2)` pairs fall on the other `2^q − 1 − k`
    /// products. The current m_x are `n_2(x)`; the `C(k, 2) − C(k', 2)` pairs still to come
    /// (k' columns now) are poured, one at a time, onto the lowest m_x (water filling, which
    /// minimises a sum of convex terms under a fixed total), leaving out the design's columns
    /// and `r` products with `m_x = 0` for the columns still to come. Returns `None` when fewer
    /// than `r` products are free for them.
    pub(super) fn pair_count_bound(&self, r: usize) -> Option<u64> {
        let w = ROW;
        let size = 1usize << self.q;
        let mut hist: Vec<u64> = vec![0; 8];
        for x in 1..size {
            let m = self.counts[x * w + 2] as usize;
            // Columns of the design have m = 0 and n_1 = 1; they take no pairs.
            if self.counts[x * w + 1] != 0 {
                continue;
            }
            if m >= hist.len() {
                hist.resize(m + 1, 0);
            }
            hist[m] += 1;
        }
        let r64 = r as u64;
        if hist[0] < r64 {
            return None;
        }
        hist[0] -= r64;
        let now = (self.k - r) as u64;
        let total = self.k as u64;
        let mut pour = total * (total - 1) / 2 - now * (now - 1) / 2;
        // Raise the lowest level while the pairs last.
        let mut level = 0;
        let mut low = 0u64; // products at the current lowest level (and all below, raised)
        while pour > 0 {
            low += hist.get(level).copied().unwrap_or(0);
            if level < hist.len() {
                hist[level] = 0;
            }
            if low == 0 {
                if level >= hist.len() {
                    return None;
                }
                level += 1;
                continue;
            }
            if pour >= low {
                pour -= low;
                level += 1;
            } else {
                // `pour` of them go one level up, the rest stay.
                if level + 1 >= hist.len() {
                    hist.resize(level + 2, 0);
                }
                hist[level + 1] += pour;
                hist[level] += low - pour;
                low = 0;
                pour = 0;
            }
        }
        if low > 0 {
            if level >= hist.len() {
                hist.resize(level + 1, 0);
            }
            hist[level] += low;
        }
        let sum: u64 = hist
            .iter()
            .enumerate()
            .map(|(m, &h)| h * (m as u64) * (m as u64).saturating_sub(1) / 2)
            .sum();
        Some(sum.div_ceil(3))
    }

    /// Whether the child that adds the column of rank `c` to a partial design with pattern
    /// `pattern`, with the candidates `rest` and `left` columns still to come, is cut by its
    /// first bound (see [`Self::dfs`]), worked out without adding the column: after adding c a
    /// column y adds `n_j(y) + n_{j−1}(y·c)` words of length j + 1. Saves the addition, the copy
    /// of the counts and the sort of a child that would be cut at once.
    fn child_is_cut(&self, pattern: &[u64], c: u32, rest: &[u32], left: usize) -> bool {
        let Some((best, _)) = &self.best else {
            return false;
        };
        if rest.len() < left {
            return true;
        }
        let len = pattern.len();
        let mut bound = pattern.to_vec();
        add_into(&mut bound, self.additions(c));
        if bound.as_slice() >= best.as_slice() {
            return true;
        }
        let xc = self.columns[c as usize - self.q] as usize;
        let mut adds: Vec<[u32; ROW]> = rest
            .iter()
            .map(|&y| {
                let xy = self.columns[y as usize - self.q] as usize;
                let ry = &self.counts[xy * ROW..xy * ROW + ROW];
                let rs = &self.counts[(xy ^ xc) * ROW..(xy ^ xc) * ROW + ROW];
                let mut a = [0u32; ROW];
                for t in 0..len {
                    a[t] = ry[t + 2] + rs[t + 1];
                }
                a
            })
            .collect();
        adds.select_nth_unstable_by(left - 1, |a, b| a[..len].cmp(&b[..len]));
        for a in &adds[..left] {
            add_into(&mut bound, &a[..len]);
        }
        bound.as_slice() >= best.as_slice()
    }

    pub(super) fn dfs(&mut self, chosen: &mut Vec<u32>, candidates: &[u32], taus: &[u32]) {
        if let Some((depth, subtrees)) = &mut self.split
            && chosen.len() == *depth
        {
            subtrees.push(Subtree {
                chosen: chosen.clone(),
                candidates: candidates.to_vec(),
                taus: taus.to_vec(),
            });
            return;
        }
        self.nodes += 1;
        self.sync();
        if self.out_of_time() {
            return;
        }
        let r = self.p - chosen.len();
        if r == 0 || candidates.len() < r {
            return;
        }
        let pattern = self.pattern();
        // The r candidates adding the fewest words, lexicographically, the r-th last. Only their
        // sum matters for the bound; with one column to go the first of the smallest in search
        // order is taken, which keeps the result deterministic.
        let mut order: Vec<u32> = candidates.to_vec();
        if r == 1 {
            let first = order.iter().enumerate().fold(0, |m, (i, &c)| {
                if self.additions(c) < self.additions(order[m]) {
                    i
                } else {
                    m
                }
            });
            order.swap(0, first);
        } else {
            order.select_nth_unstable_by(r - 1, |&a, &b| self.additions(a).cmp(self.additions(b)));
        }
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
        if let Some((best, _)) = &self.best
            && self.q <= PAIR_COUNT_MAX_BASIC
            && best.len() > 1
            && best[0] == 0
            && pattern[0] == 0
        {
            match self.pair_count_bound(r) {
                None => return,
                Some(a4) if a4 > best[1] => return,
                Some(_) => {}
            }
        }
        if r == 1 {
            // One column to go: the bound is exact, and the best column is the first in order.
            add_into(&mut bound, last);
            let mut columns: Vec<u32> = chosen
                .iter()
                .map(|&c| self.columns[c as usize - self.q])
                .collect();
            columns.push(self.columns[order[0] as usize - self.q]);
            self.found(bound, columns);
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
            if self.child_is_cut(&pattern, c, &next[i + 1..], r - 1) {
                continue;
            }
            chosen.push(c);
            // A child with two columns to go is settled by `best_pair` at about the cost of the
            // isomorphism test, so the test is skipped there (skipping it is always safe).
            if r < ISOMORPHISM_TEST_MIN_LEFT
                || self.is_smallest_image(chosen, taus, &mut child_taus)
            {
                let column = self.columns[c as usize - self.q];
                let saved = self.save_counts(chosen.len());
                self.add(column);
                self.dfs(chosen, &next[i + 1..], &child_taus);
                self.restore_counts(chosen.len(), saved, column);
            }
            chosen.pop();
            if self.timed_out {
                return;
            }
        }
    }
}
