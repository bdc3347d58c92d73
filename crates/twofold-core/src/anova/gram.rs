//! The normal equations of a two-level table by the Walsh–Hadamard transform: every cross product
//! the least-squares fit needs, without building the model columns.
//!
//! # Method
//! On a two-level run `x` (every factor at ±1) the column of a term `t` is the character
//! `χ_t(x) = Π_{f∈t} x_f`, and `χ_t·χ_s = χ_{t⊕s}` (⊕: symmetric difference of the factor sets).
//! So every entry of `XᵀX` between term columns is a column sum `S(t⊕s) = Σ_runs χ_{t⊕s}`, and
//! every entry of `Xᵀy` a sum `Σ_runs y·χ_t`. With the runs counted (and their responses added)
//! in a table over the 2^k corners, all 2^k such sums are the fast Walsh–Hadamard transform of
//! that table (Yates 1937; the character identity is elementary, stated here) — `k·2^k`
//! operations, instead of `n·p²` for `n` runs and `p` columns. Per block, the same tables give
//! the cross products with the block columns; centre points (every factor at 0) meet only the
//! intercept, the blocks and the curvature column.
//!
//! The fitted values and the leverages are characters too: `ŷ(x) = Σ_t b_t χ_t(x)` is one
//! transform of the coefficients placed on the corners, and `h(x) = xᵀ(XᵀX)⁻¹x` is one transform
//! of `W(u) = Σ_{t⊕s=u} [(XᵀX)⁻¹]_{ts}` plus one per block for the block and intercept columns.
//!
//! The columns are taken in the fit's order and each is kept only when its squared distance from
//! the span of the columns kept before it exceeds [`GRAM_RANK_REL`] of its squared length (the
//! pivot of an incremental Cholesky factorisation `XᵀX = LLᵀ`); `R = Lᵀ` and `Qᵀy = L⁻¹Xᵀy`
//! stand in for the QR factors of the dense route, so everything after them is shared. On
//! ±1 tables the cross products are integers, so the factorisation loses nothing that matters
//! (a property test compares both routes).

use nalgebra::{DMatrix, DVector};

use super::Column;
use crate::prec::GRAM_RANK_REL;

/// Most factors the transform route takes (its tables hold 2^k numbers per block).
pub const TRANSFORM_MAX_FACTORS: usize = 20;
/// Most numbers the transform route's tables may hold in all (blocks × 2^k), to bound memory.
const TRANSFORM_MAX_CELLS: usize = 1 << 24;

/// What the fit needs from the columns, by either route.
pub(super) struct Solved {
    /// Candidates kept, in order.
    pub kept: Vec<usize>,
    /// Candidates left out, with the coefficients of the kept columns before them that make
    /// them up.
    pub dropped: Vec<(usize, Vec<(usize, f64)>)>,
    /// `R` (upper triangular, `p × p`).
    pub r: DMatrix<f64>,
    /// `Qᵀy`.
    pub qty: DVector<f64>,
    /// Fitted value of each used run, given the coefficients (filled by [`Transform::fitted`]).
    pub fitted: Vec<f64>,
    /// Leverage of each used run.
    pub leverage: Vec<f64>,
}

/// In-place fast Walsh–Hadamard transform: `v[κ] ← Σ_x v[x]·(−1)^{|x ∧ κ|}`.
pub(crate) fn fwht(v: &mut [f64]) {
    let n = v.len();
    let mut h = 1;
    while h < n {
        for i in (0..n).step_by(2 * h) {
            for j in i..i + h {
                let (a, b) = (v[j], v[j + h]);
                v[j] = a + b;
                v[j + h] = a - b;
            }
        }
        h *= 2;
    }
}

/// An incremental Cholesky factorisation `G = LLᵀ` of the Gram matrix of the columns kept, taking
/// the columns in order and keeping each one whose squared distance from the span of those kept
/// before it (the pivot) exceeds [`GRAM_RANK_REL`] of its squared length.
pub(crate) struct GreedyCholesky {
    /// Indices of the kept columns, in order.
    pub kept: Vec<usize>,
    /// Row `i` of `L` (its first `i + 1` entries).
    pub rows: Vec<Vec<f64>>,
    /// Each column left out, with the coefficients of the kept columns before it that make it up.
    pub dropped: Vec<(usize, Vec<(usize, f64)>)>,
}

impl GreedyCholesky {
    /// Factorises the `p` columns whose cross products `entry(i, j)` gives.
    pub fn new(p: usize, entry: impl Fn(usize, usize) -> f64) -> Self {
        let mut out = GreedyCholesky {
            kept: Vec::new(),
            rows: Vec::new(),
            dropped: Vec::new(),
        };
        for c in 0..p {
            let g: Vec<f64> = out.kept.iter().map(|&j| entry(j, c)).collect();
            let gcc = entry(c, c);
            let l = out.forward(&g);
            let d = gcc - l.iter().map(|v| v * v).sum::<f64>();
            if gcc <= 0.0 || d <= GRAM_RANK_REL * gcc {
                // Coefficients on the kept columns: L⁻ᵀ l.
                let coef = out.backward(&l);
                out.dropped
                    .push((c, out.kept.iter().copied().zip(coef).collect()));
            } else {
                let mut row = l;
                row.push(d.sqrt());
                out.rows.push(row);
                out.kept.push(c);
            }
        }
        out
    }

    /// `L⁻¹g` (forward substitution; leading zeros of `g`, the usual case for a column
    /// orthogonal to those before it, cost nothing).
    pub fn forward(&self, g: &[f64]) -> Vec<f64> {
        let n = self.kept.len();
        let mut l = vec![0.0; n];
        let first = g.iter().position(|&v| v != 0.0).unwrap_or(n);
        for i in first..n {
            let s: f64 = (first..i).map(|m| self.rows[i][m] * l[m]).sum();
            l[i] = (g[i] - s) / self.rows[i][i];
        }
        l
    }

    /// `L⁻ᵀv` (back substitution).
    pub fn backward(&self, v: &[f64]) -> Vec<f64> {
        let n = self.kept.len();
        let mut x = vec![0.0; n];
        for i in (0..n).rev() {
            let s: f64 = (i + 1..n).map(|m| self.rows[m][i] * x[m]).sum();
            x[i] = (v[i] - s) / self.rows[i][i];
        }
        x
    }
}

/// The used runs of a two-level table in the form the transform route reads.
pub(super) struct Transform {
    k: usize,
    /// Corner of each used run (bit f set where factor f is at −1); `None` at a centre point.
    corner: Vec<Option<usize>>,
    /// Block index (0-based among the labels) of each used run.
    block: Vec<usize>,
    blocks: usize,
}

impl Transform {
    /// The transform view of the used runs (`rows` their settings), or `None` when a run is
    /// neither a two-level run nor a centre point, or the table would be too large.
    pub fn new(k: usize, rows: &[&[f64]], block: Vec<usize>, blocks: usize) -> Option<Transform> {
        if k > TRANSFORM_MAX_FACTORS || blocks.max(1).saturating_mul(1 << k) > TRANSFORM_MAX_CELLS {
            return None;
        }
        let mut corner = Vec::with_capacity(rows.len());
        for row in rows {
            if row.len() != k {
                return None;
            }
            if row.iter().all(|&v| v == 0.0) {
                corner.push(None);
                continue;
            }
            let mut c = 0usize;
            for (f, &v) in row.iter().enumerate() {
                if v == -1.0 {
                    c |= 1 << f;
                } else if v != 1.0 {
                    return None;
                }
            }
            corner.push(Some(c));
        }
        Some(Transform {
            k,
            corner,
            block,
            blocks: blocks.max(1),
        })
    }

    /// Per block, the transform of the run counts over the corners, and per block the
    /// (factorial runs, centre runs).
    fn tables(&self) -> (Vec<Vec<f64>>, Vec<(f64, f64)>) {
        let size = 1usize << self.k;
        let mut counts = vec![vec![0.0; size]; self.blocks];
        let mut centre = vec![(0.0, 0.0); self.blocks];
        for (i, c) in self.corner.iter().enumerate() {
            let b = self.block[i];
            match c {
                Some(c) => {
                    counts[b][*c] += 1.0;
                    centre[b].0 += 1.0;
                }
                None => centre[b].1 += 1.0,
            }
        }
        for v in &mut counts {
            fwht(v);
        }
        (counts, centre)
    }

    /// Value of a non-term column in block `b` at a two-level run (`centre` false) or a centre
    /// point (`centre` true); `None` for a term column.
    fn nuisance(&self, c: Column, labels: &[u32], b: usize, centre: bool) -> Option<f64> {
        let last = labels.len().saturating_sub(1);
        Some(match c {
            Column::Intercept => 1.0,
            Column::Block(lab) => {
                let j = labels.iter().position(|&l| l == lab)?;
                if b == j {
                    1.0
                } else if b == last {
                    -1.0
                } else {
                    0.0
                }
            }
            Column::Curvature => {
                if centre {
                    1.0
                } else {
                    0.0
                }
            }
            Column::Term(_) => return None,
        })
    }

    /// Solves the normal equations of `candidates` (in the fit's order) by the transform (see the
    /// module documentation); the fitted values are filled in by [`Transform::fitted`].
    pub fn solve(&self, candidates: &[Column], labels: &[u32], y: &[f64]) -> Solved {
        let (counts, centre) = self.tables();
        let nb = self.blocks;
        let pc = candidates.len();
        // Cross products of the candidates.
        let entry = |a: Column, c: Column| -> f64 {
            match (a, c) {
                (Column::Term(t), Column::Term(s)) => {
                    let u = (t.bits() ^ s.bits()) as usize;
                    (0..nb).map(|b| counts[b][u]).sum()
                }
                (Column::Term(t), other) | (other, Column::Term(t)) => (0..nb)
                    .map(|b| {
                        self.nuisance(other, labels, b, false).unwrap_or(0.0)
                            * counts[b][t.bits() as usize]
                    })
                    .sum(),
                (a, c) => (0..nb)
                    .map(|b| {
                        let f = self.nuisance(a, labels, b, false).unwrap_or(0.0)
                            * self.nuisance(c, labels, b, false).unwrap_or(0.0);
                        let z = self.nuisance(a, labels, b, true).unwrap_or(0.0)
                            * self.nuisance(c, labels, b, true).unwrap_or(0.0);
                        f * centre[b].0 + z * centre[b].1
                    })
                    .sum(),
            }
        };
        let chol = GreedyCholesky::new(pc, |i, j| entry(candidates[i], candidates[j]));
        let p = chol.kept.len();
        let r = DMatrix::from_fn(p, p, |i, j| if i <= j { chol.rows[j][i] } else { 0.0 });
        // Qᵀy = L⁻¹ Xᵀy.
        let kept_columns: Vec<Column> = chol.kept.iter().map(|&j| candidates[j]).collect();
        let qty = chol.forward(&self.xty(&kept_columns, labels, y));
        let GreedyCholesky { kept, dropped, .. } = chol;
        Solved {
            kept,
            dropped,
            r,
            qty: DVector::from_vec(qty),
            fitted: Vec::new(),
            leverage: Vec::new(),
        }
    }

    /// `Xᵀz` of the `columns` for another response `z` (one value per used run): the response
    /// sums per block transformed, `k·2^k` operations per block.
    pub fn xty(&self, columns: &[Column], labels: &[u32], z: &[f64]) -> Vec<f64> {
        let size = 1usize << self.k;
        let mut sums = vec![vec![0.0; size]; self.blocks];
        let mut centre = vec![0.0; self.blocks];
        for (i, c) in self.corner.iter().enumerate() {
            match c {
                Some(c) => sums[self.block[i]][*c] += z[i],
                None => centre[self.block[i]] += z[i],
            }
        }
        for v in &mut sums {
            fwht(v);
        }
        columns
            .iter()
            .map(|&c| match c {
                Column::Term(t) => sums.iter().map(|v| v[t.bits() as usize]).sum(),
                other => (0..self.blocks)
                    .map(|b| {
                        self.nuisance(other, labels, b, false).unwrap_or(0.0) * sums[b][0]
                            + self.nuisance(other, labels, b, true).unwrap_or(0.0) * centre[b]
                    })
                    .sum(),
            })
            .collect()
    }

    /// Fitted values and leverages of the used runs for the kept `columns` with coefficients
    /// `b` and `(XᵀX)⁻¹` `xtx_inv`.
    pub fn fitted(
        &self,
        columns: &[Column],
        labels: &[u32],
        b: &[f64],
        xtx_inv: &DMatrix<f64>,
    ) -> (Vec<f64>, Vec<f64>) {
        let size = 1usize << self.k;
        let p = columns.len();
        let terms: Vec<(usize, usize)> = columns
            .iter()
            .enumerate()
            .filter_map(|(j, c)| match c {
                Column::Term(t) => Some((j, t.bits() as usize)),
                _ => None,
            })
            .collect();
        let others: Vec<usize> = (0..p)
            .filter(|&j| !matches!(columns[j], Column::Term(_)))
            .collect();
        // Term part of the fitted values and of the leverages, on every corner.
        let mut fit = vec![0.0; size];
        for &(j, u) in &terms {
            fit[u] += b[j];
        }
        fwht(&mut fit);
        let mut w = vec![0.0; size];
        for &(j, u) in &terms {
            for &(l, v) in &terms {
                w[u ^ v] += xtx_inv[(j, l)];
            }
        }
        fwht(&mut w);
        // Per block: the cross part between terms and the other columns, and the constants.
        let mut cross = Vec::with_capacity(self.blocks);
        let mut constant = Vec::with_capacity(self.blocks);
        for blk in 0..self.blocks {
            let u_f: Vec<f64> = others
                .iter()
                .map(|&m| self.nuisance(columns[m], labels, blk, false).unwrap_or(0.0))
                .collect();
            let u_c: Vec<f64> = others
                .iter()
                .map(|&m| self.nuisance(columns[m], labels, blk, true).unwrap_or(0.0))
                .collect();
            let mut v = vec![0.0; size];
            for &(j, u) in &terms {
                v[u] += others
                    .iter()
                    .zip(&u_f)
                    .map(|(&m, um)| xtx_inv[(j, m)] * um)
                    .sum::<f64>();
            }
            fwht(&mut v);
            cross.push(v);
            let quad = |u: &[f64]| -> f64 {
                let mut s = 0.0;
                for (a, &m) in others.iter().enumerate() {
                    for (c, &n) in others.iter().enumerate() {
                        s += u[a] * xtx_inv[(m, n)] * u[c];
                    }
                }
                s
            };
            let lin = |u: &[f64]| -> f64 { others.iter().zip(u).map(|(&m, um)| b[m] * um).sum() };
            constant.push((quad(&u_f), quad(&u_c), lin(&u_f), lin(&u_c)));
        }
        let mut fitted = Vec::with_capacity(self.corner.len());
        let mut leverage = Vec::with_capacity(self.corner.len());
        for (i, c) in self.corner.iter().enumerate() {
            let blk = self.block[i];
            let (qf, qc, lf, lc) = constant[blk];
            match c {
                Some(x) => {
                    fitted.push(fit[*x] + lf);
                    leverage.push(w[*x] + 2.0 * cross[blk][*x] + qf);
                }
                None => {
                    fitted.push(lc);
                    leverage.push(qc);
                }
            }
        }
        (fitted, leverage)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::term::Term;
    use proptest::prelude::*;

    /// A two-level table: a 2^4 (or its half) with some runs left out, centre points and blocks.
    fn table(
        half: bool,
        drop: &[usize],
        centres: usize,
        blocks: u32,
    ) -> (Vec<Vec<f64>>, Vec<u32>, Vec<f64>) {
        let mut rows = Vec::new();
        let mut block = Vec::new();
        for r in 0..16usize {
            let row: Vec<f64> = (0..4)
                .map(|f| if r >> f & 1 == 1 { 1.0 } else { -1.0 })
                .collect();
            if half && row.iter().product::<f64>() < 0.0 {
                continue;
            }
            if drop.contains(&r) {
                continue;
            }
            // Blocks by the sign of ABC (two) or of ABC and BCD (four).
            let abc = row[0] * row[1] * row[2];
            let bcd = row[1] * row[2] * row[3];
            let b = match blocks {
                2 => u32::from(abc > 0.0) + 1,
                4 => u32::from(abc > 0.0) * 2 + u32::from(bcd > 0.0) + 1,
                _ => 1,
            };
            rows.push(row);
            block.push(b);
        }
        for c in 0..centres {
            rows.push(vec![0.0; 4]);
            block.push(1 + (c as u32 % blocks.max(1)));
        }
        let y = (0..rows.len())
            .map(|i| ((i * 37 + 11) % 17) as f64 * 0.7 + rows[i][0] * 3.0)
            .collect();
        (rows, block, y)
    }

    proptest! {
        #[test]
        fn transform_and_dense_routes_agree(
            half in any::<bool>(),
            drop in proptest::collection::vec(0usize..16, 0..4),
            centres in 0usize..4,
            blocks in prop_oneof![Just(1u32), Just(2), Just(4)],
            terms in proptest::collection::btree_set(1u32..16, 1..10),
        ) {
            // Common practice, no source: two routes to the same least-squares quantities.
            let (rows, block_of, y) = table(half, &drop, centres, blocks);
            let mut labels: Vec<u32> = block_of.clone();
            labels.sort_unstable();
            labels.dedup();
            let runs: Vec<usize> = (0..rows.len()).collect();
            let centre: Vec<bool> = rows.iter().map(|r| r.iter().all(|&v| v == 0.0)).collect();
            let mut kinds = vec![Column::Intercept];
            if let Some((_, rest)) = labels.split_last() {
                kinds.extend(rest.iter().map(|&l| Column::Block(l)));
            }
            kinds.extend(terms.iter().map(|&t| Column::Term(Term::from_bits(t))));
            if centres > 0 {
                kinds.push(Column::Curvature);
            }
            let dense = super::super::fit::dense_solve(
                &kinds, &runs, &rows, &block_of, &labels, &centre, &y,
            );
            let index: Vec<usize> = block_of
                .iter()
                .map(|b| labels.iter().position(|l| l == b).unwrap_or(0))
                .collect();
            let refs: Vec<&[f64]> = rows.iter().map(Vec::as_slice).collect();
            let t = Transform::new(4, &refs, index, labels.len()).unwrap();
            let fast = t.solve(&kinds, &labels, &y);
            prop_assert_eq!(&fast.kept, &dense.kept);
            let dropped = |s: &Solved| s.dropped.iter().map(|d| d.0).collect::<Vec<_>>();
            prop_assert_eq!(dropped(&fast), dropped(&dense));
            for (a, b) in fast.dropped.iter().zip(&dense.dropped) {
                for ((ja, ca), (jb, cb)) in a.1.iter().zip(&b.1) {
                    prop_assert_eq!(ja, jb);
                    prop_assert!((ca - cb).abs() < 1e-8, "{} {}", ca, cb);
                }
            }
            // Sequential sums of squares (Qᵀy squared) and the fitted values.
            for (a, b) in fast.qty.iter().zip(dense.qty.iter()) {
                prop_assert!((a * a - b * b).abs() < 1e-8 * (1.0 + b * b), "{} {}", a, b);
            }
            let p = fast.kept.len();
            let r_inv = fast
                .r
                .clone()
                .solve_upper_triangular(&DMatrix::identity(p, p))
                .unwrap();
            let xtx_inv = &r_inv * r_inv.transpose();
            let b = fast.r.solve_upper_triangular(&fast.qty).unwrap();
            let columns: Vec<Column> = fast.kept.iter().map(|&c| kinds[c]).collect();
            let (fitted, leverage) = t.fitted(&columns, &labels, b.as_slice(), &xtx_inv);
            for (a, b) in fitted.iter().zip(&dense.fitted) {
                prop_assert!((a - b).abs() < 1e-8 * (1.0 + b.abs()), "{} {}", a, b);
            }
            for (a, b) in leverage.iter().zip(&dense.leverage) {
                prop_assert!((a - b).abs() < 1e-8, "{} {}", a, b);
            }
        }
    }
}
