//! Greedy choice of independent columns in a given order, and the square system they then form,
//! by one blocked LU factorisation with partial pivoting.
//!
//! The missing-value completion of [`super::effects_by_completion`] needs, among the columns of
//! the chains (restricted to the `d` missing cells) taken in a fixed order, the first `d` that are
//! linearly independent, and then the `d × d` system those columns form. Gaussian elimination
//! with row pivoting, processing the columns in that order and skipping a column whose part below
//! the rows already pivoted vanishes, does both at once: the skipped columns are exactly those in
//! the span of the columns before them (the column echelon form), and the factors of the kept
//! columns solve the system (Golub & Van Loan, *Matrix Computations*, 4th ed., §3.2 and §5.4 on
//! LU with partial pivoting and rank decisions; from memory).
//!
//! The elimination is *left-looking* and blocked: candidate columns come in panels; each panel is
//! first brought up to date with all columns kept so far (a triangular solve against each earlier
//! block of kept columns and one matrix product for the rows below, which go through nalgebra's
//! matrix product and so through a cache-blocked kernel), then eliminated column by column within
//! itself. That is the same arithmetic as the column-by-column greedy, in an order that keeps the
//! `O(d³)` work inside matrix products. Only panels that are needed are formed, so the cost is
//! about `(2/3)·d³ + (columns tried)·d·panel` operations.
//!
//! A column counts as dependent when the part of it below the pivoted rows has a norm of at most
//! [`RANK_REL`] of the column's own norm (the columns here are ±1 characters of a Hadamard matrix,
//! so an independent one stands well clear of that).

use crate::prec::RANK_REL;
use nalgebra::{DMatrix, DVector};

/// Candidate columns formed and brought up to date at a time.
const PANEL: usize = 64;

/// The kept columns' factors: `P·G = L·U` for the `d × d` matrix `G` of the kept columns in the
/// order kept, with `L` unit lower triangular below the diagonal of `factors` and `U` on and above
/// it, and `P` the row permutation (`position i` holds original row `perm[i]`).
#[derive(Debug)]
pub(crate) struct GreedyLu {
    factors: DMatrix<f64>,
    perm: Vec<usize>,
    /// Indices (into the candidate order) of the kept columns.
    kept: Vec<usize>,
}

impl GreedyLu {
    /// Goes through `count` candidate columns of length `d` in order (`fill(j, out)` writes column
    /// `j` into `out`, rows in their original order) and keeps each one independent of those kept
    /// before it, stopping once `d` are kept.
    pub(crate) fn select(d: usize, count: usize, mut fill: impl FnMut(usize, &mut [f64])) -> Self {
        let mut factors = DMatrix::<f64>::zeros(d, d);
        let mut perm: Vec<usize> = (0..d).collect();
        let mut kept = Vec::new();
        // Blocks of kept columns (start, end) as factorised panel by panel.
        let mut blocks: Vec<(usize, usize)> = Vec::new();
        let mut raw = vec![0.0; d];
        let mut next = 0;
        while kept.len() < d && next < count {
            let width = PANEL.min(count - next);
            let rank = kept.len();
            let mut panel = DMatrix::<f64>::zeros(d, width);
            let mut norms = vec![0.0; width];
            for c in 0..width {
                fill(next + c, &mut raw);
                norms[c] = raw.iter().map(|v| v * v).sum::<f64>().sqrt();
                for (i, &row) in perm.iter().enumerate() {
                    panel[(i, c)] = raw[row];
                }
            }
            // Bring the panel up to date with every column kept so far: the rows already pivoted
            // by a triangular solve, block by block, then the rows below in one product.
            for &(s, e) in &blocks {
                let (mut top, mut below) = panel.rows_range_pair_mut(s..e, e..rank);
                let lower = factors.view((s, s), (e - s, e - s));
                lower.solve_lower_triangular_with_diag_mut(&mut top, 1.0);
                if e < rank {
                    below.gemm(-1.0, &factors.view((e, s), (rank - e, e - s)), &top, 1.0);
                }
            }
            if rank > 0 && rank < d {
                let (top, mut below) = panel.rows_range_pair_mut(0..rank, rank..d);
                below.gemm(-1.0, &factors.view((rank, 0), (d - rank, rank)), &top, 1.0);
            }
            // Eliminate within the panel, column by column.
            let start = rank;
            for c in 0..width {
                let now = kept.len();
                {
                    // Column slices (both matrices are stored by column), so the updates run
                    // over contiguous memory.
                    let pcol = &mut panel.as_mut_slice()[c * d..(c + 1) * d];
                    let f = factors.as_slice();
                    for r in start..now {
                        let v = pcol[r];
                        if v != 0.0 {
                            let lcol = &f[r * d + r + 1..(r + 1) * d];
                            for (p, l) in pcol[r + 1..].iter_mut().zip(lcol) {
                                *p -= l * v;
                            }
                        }
                    }
                }
                let mut pivot_row = now;
                let mut largest = 0.0f64;
                let mut residual = 0.0f64;
                for i in now..d {
                    let v = panel[(i, c)];
                    residual += v * v;
                    if v.abs() > largest {
                        largest = v.abs();
                        pivot_row = i;
                    }
                }
                if norms[c] == 0.0 || residual.sqrt() <= RANK_REL * norms[c] {
                    continue;
                }
                if pivot_row != now {
                    perm.swap(now, pivot_row);
                    // Columns from `now` on are still zero: only the kept ones need the swap.
                    for j in 0..now {
                        factors.swap((now, j), (pivot_row, j));
                    }
                    panel.swap_rows(now, pivot_row);
                }
                let pivot = panel[(now, c)];
                for i in 0..=now {
                    factors[(i, now)] = panel[(i, c)];
                }
                for i in now + 1..d {
                    factors[(i, now)] = panel[(i, c)] / pivot;
                }
                kept.push(next + c);
                if kept.len() == d {
                    break;
                }
            }
            if kept.len() > start {
                blocks.push((start, kept.len()));
            }
            next += width;
        }
        Self {
            factors,
            perm,
            kept,
        }
    }

    /// Indices of the kept columns, in the candidate order.
    pub(crate) fn kept(&self) -> &[usize] {
        &self.kept
    }

    /// Solves `Gᵀ·z = rhs` for the square matrix `G` of the kept columns (row `j` of `Gᵀ` is kept
    /// column `j`); `None` unless `d` columns were kept.
    pub(crate) fn solve_transposed(&self, rhs: &[f64]) -> Option<Vec<f64>> {
        let d = self.perm.len();
        if self.kept.len() != d || rhs.len() != d {
            return None;
        }
        // Gᵀ = Uᵀ·Lᵀ·P: solve Uᵀ·w = rhs (forward), then Lᵀ·v = w (backward), then z = Pᵀ·v.
        let f = &self.factors;
        let mut w = DVector::from_column_slice(rhs);
        for i in 0..d {
            let mut s = w[i];
            for j in 0..i {
                s -= f[(j, i)] * w[j];
            }
            w[i] = s / f[(i, i)];
        }
        for i in (0..d).rev() {
            let mut s = w[i];
            for j in i + 1..d {
                s -= f[(j, i)] * w[j];
            }
            w[i] = s;
        }
        let mut z = vec![0.0; d];
        for (i, &row) in self.perm.iter().enumerate() {
            z[row] = w[i];
        }
        Some(z)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Rank of the first `upto` columns by a dense SVD (an independent route).
    fn rank_of(cols: &[Vec<f64>], d: usize) -> usize {
        if cols.is_empty() {
            return 0;
        }
        let m = DMatrix::from_fn(d, cols.len(), |i, j| cols[j][i]);
        m.svd(false, false)
            .singular_values
            .iter()
            .filter(|&&s| s > 1e-9 * d as f64)
            .count()
    }

    proptest! {
        /// The kept columns are those that raise the rank of the columns before them (checked by
        /// SVD), and the system they form is solved (checked by multiplying back), for ±1 columns
        /// with repeats and dependencies, over several panels.
        #[test]
        fn keeps_the_greedy_basis_and_solves_its_system(
            d in 1usize..=70,
            seeds in proptest::collection::vec(any::<u64>(), 1..=160),
            rhs_seed in proptest::collection::vec(-10.0f64..10.0, 70),
        ) {
            // Columns: random ±1 vectors, some repeated or sums of earlier ones' signs products,
            // so dependent columns occur.
            let mut cols: Vec<Vec<f64>> = Vec::new();
            for (j, s) in seeds.iter().enumerate() {
                let col: Vec<f64> = if j >= 2 && s % 5 == 0 {
                    cols[(*s as usize / 5) % j].clone()
                } else if j >= 2 && s % 7 == 0 {
                    let a = &cols[(*s as usize / 7) % j];
                    let b = &cols[(*s as usize / 11) % j];
                    a.iter().zip(b).map(|(x, y)| x - y).collect()
                } else {
                    (0..d).map(|i| if (s >> (i % 64)) & 1 == 1 { 1.0 } else { -1.0 }).collect()
                };
                cols.push(col);
            }
            let lu = GreedyLu::select(d, cols.len(), |j, out| out.copy_from_slice(&cols[j]));
            // Greedy by rank: column j is kept exactly when it raises the rank.
            let mut expect = Vec::new();
            let mut chosen: Vec<Vec<f64>> = Vec::new();
            for (j, col) in cols.iter().enumerate() {
                if chosen.len() == d {
                    break;
                }
                let mut with = chosen.clone();
                with.push(col.clone());
                if rank_of(&with, d) > chosen.len() {
                    chosen = with;
                    expect.push(j);
                }
            }
            prop_assert_eq!(lu.kept(), expect.as_slice());
            let rhs = &rhs_seed[..d];
            match lu.solve_transposed(rhs) {
                Some(z) => {
                    prop_assert_eq!(chosen.len(), d);
                    for (j, col) in chosen.iter().enumerate() {
                        let got: f64 = col.iter().zip(&z).map(|(a, b)| a * b).sum();
                        prop_assert!((got - rhs[j]).abs() <= 1e-7 * (1.0 + rhs[j].abs()), "row {j}: {got} vs {}", rhs[j]);
                    }
                }
                None => prop_assert!(chosen.len() < d),
            }
        }
    }
}
