//! The code-side engine: for many basic factors and few generators, the basic factors' generator
//! vectors are chosen instead of columns (see the parent module).

use super::*;
/// Search on the code side for many basic factors and few generators: each basic factor is a
/// vector of p bits (bit i set when generator i contains it), chosen in increasing order with
/// repeats. A word is a non-empty set u of generators; its length is |u| plus the number of
/// basic factors whose vector has odd overlap with u.
pub(super) struct CodeSearch {
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
    pub(super) fn new(k: usize, q: usize, deadline: Option<Instant>) -> CodeSearch {
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

    pub(super) fn apply(&mut self, v: u32, delta: i32) {
        for (u, len) in self.lengths.iter_mut().enumerate().skip(1) {
            if (u as u32 & v).count_ones() % 2 == 1 {
                *len = len.wrapping_add_signed(delta);
            }
        }
    }

    pub(super) fn pattern(&self) -> Vec<u64> {
        let mut a = vec![0u64; self.k - 2];
        for &len in &self.lengths[1..] {
            if len >= 3 {
                a[len as usize - 3] += 1;
            }
        }
        a
    }

    pub(super) fn valid(&self) -> bool {
        self.lengths[1..].iter().all(|&l| l >= 3)
    }

    /// Generated columns of the design: generator i's word is the set of basic factors whose
    /// vector has bit i.
    pub(super) fn columns(&self, vectors: &[u32]) -> Vec<u32> {
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
    pub(super) fn seed(&mut self) {
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

    pub(super) fn run(mut self) -> RawOutcome {
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

    pub(super) fn dfs(&mut self, vectors: &mut Vec<u32>, from: u32) {
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
