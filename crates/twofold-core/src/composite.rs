//! Central composite designs: axial (star) runs added to a two-level design, and the quadratic
//! model they make estimable, with its stationary point and canonical analysis.
//!
//! A two-level design with centre points can show curvature but cannot say which factor causes
//! it: every pure quadratic term is aliased with the others. Adding 2k axial runs, each factor at
//! −α and +α with the others at the centre, plus centre runs, turns it into a central composite
//! design (Box & Wilson 1951, *JRSS B* 13, 1–45; Montgomery, *Design and Analysis of Experiments*,
//! chapter on response surface methods; Myers, Montgomery & Anderson-Cook, *Response Surface
//! Methodology*, chapter on designs for second-order models). Run later, the axial runs are a
//! block of their own.
//!
//! # Which α
//! The run sheet holds coded levels −1, 0, +1, and the engineer's low and high are the declared
//! safe range. The axial runs are therefore placed **face-centred, α = 1**: every run stays inside
//! the tested box, each factor has exactly three levels, and nothing is run outside the range the
//! engineer declared safe. The price is that the design is neither rotatable nor orthogonally
//! blocked; the least-squares fit with a block term handles the block effect either way.
//! [`AxialAlphas`] gives the two classical alternatives for the plan output:
//! - rotatable: α = F^(1/4), F the factorial runs (Box & Hunter 1957, *Ann. Math. Statist.* 28,
//!   195–241);
//! - orthogonal blocking (factorial block, then axial block): α = √(F (2k + n_a) / (2 (F + n_f))),
//!   n_f and n_a the centre runs of the factorial and axial blocks (Box & Hunter 1957; Montgomery,
//!   blocking in response surface designs; from memory).
//!
//! # The quadratic model
//! ŷ = b₀ + Σ block effects + Σ bᵢxᵢ + Σ_{i<j} bᵢⱼxᵢxⱼ + Σ bᵢᵢxᵢ², fitted by least squares on
//! every run used. Blocks enter as sum-to-zero columns, so b₀ is the mean response at the centre
//! averaged over blocks. In matrix form ŷ = b₀ + xᵀb + xᵀBx with B symmetric, Bᵢᵢ = bᵢᵢ and
//! Bᵢⱼ = bᵢⱼ/2. The stationary point is x_s = −½B⁻¹b with ŷ_s = b₀ + ½x_sᵀb, and the canonical
//! form ŷ = ŷ_s + Σ λᵢwᵢ² with λ the eigenvalues of B tells its kind: all negative a maximum,
//! all positive a minimum, mixed signs a saddle, one near zero a ridge (Montgomery, canonical
//! analysis in the response surface chapter; Myers, Montgomery & Anderson-Cook, ch. 6).

use nalgebra::{DMatrix, DVector, SymmetricEigen};

use crate::anova::{f_upper_p, t_two_sided_p};
use crate::plan::{PlannedRun, shuffled_positions};
use crate::term::LETTERS;

/// The α of the axial runs a run sheet holds: face-centred (see the module documentation).
pub const FACE_CENTRED_ALPHA: f64 = 1.0;

/// An eigenvalue whose size is below this share of the largest one counts as zero, making the
/// surface a ridge. Common practice, no source for the exact share.
pub const RIDGE_SHARE: f64 = 0.05;

/// Why axial runs cannot be laid out or the quadratic model cannot be fitted.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum CompositeError {
    /// Fewer than two factors.
    #[error("axial runs need at least two factors (found {0})")]
    TooFewFactors(usize),
    /// Row, block and response lengths disagree.
    #[error("{rows} rows, {blocks} block labels and {values} values: one of each per run")]
    Lengths {
        /// Rows of settings.
        rows: usize,
        /// Block labels.
        blocks: usize,
        /// Response values.
        values: usize,
    },
    /// The runs do not estimate every term.
    #[error(
        "the quadratic model cannot be fitted: the {runs} runs do not estimate its {terms} terms (each factor needs three levels and the design enough distinct runs)"
    )]
    NotEstimable {
        /// Runs used.
        runs: usize,
        /// Terms in the model, blocks included.
        terms: usize,
    },
}

/// The classical choices of α for the axial runs of a design.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AxialAlphas {
    /// Face-centred, α = 1: what the run sheet holds.
    pub face_centred: f64,
    /// Rotatable, α = F^(1/4).
    pub rotatable: f64,
    /// Orthogonal blocking between the factorial and the axial block.
    pub orthogonal_blocking: f64,
}

/// The α choices for `k` factors, `factorial_runs` factorial (not centre) runs, and
/// `factorial_centres` and `axial_centres` centre runs in the factorial and axial blocks
/// (formulas in the module documentation).
pub fn axial_alphas(
    k: usize,
    factorial_runs: usize,
    factorial_centres: usize,
    axial_centres: usize,
) -> AxialAlphas {
    let f = factorial_runs as f64;
    let orthogonal = (f * (2 * k + axial_centres) as f64
        / (2.0 * (factorial_runs + factorial_centres) as f64))
        .sqrt();
    AxialAlphas {
        face_centred: FACE_CENTRED_ALPHA,
        rotatable: f.powf(0.25),
        orthogonal_blocking: orthogonal,
    }
}

/// The 2k face-centred axial runs of `k` factors in standard order (factor A at −1, A at +1, B at
/// −1, ...), then `centre_runs` centre runs.
pub fn axial_levels(k: usize, centre_runs: usize) -> Result<Vec<Vec<i8>>, CompositeError> {
    if k < 2 {
        return Err(CompositeError::TooFewFactors(k));
    }
    let mut rows = Vec::with_capacity(2 * k + centre_runs);
    for f in 0..k {
        for sign in [-1, 1] {
            let mut row = vec![0i8; k];
            row[f] = sign;
            rows.push(row);
        }
    }
    rows.extend(std::iter::repeat_n(vec![0i8; k], centre_runs));
    Ok(rows)
}

/// Whether coded settings are an axial run: exactly one factor off the centre (with two or more
/// factors).
pub fn is_axial(levels: &[i8]) -> bool {
    levels.len() >= 2 && levels.iter().filter(|&&v| v != 0).count() == 1
}

/// Adds the axial block to the runs of a plan (any order): 2k axial runs and `centre_runs` centre
/// runs as block (last block + 1), replicate 1, standard order continuing after the last run and
/// run order after the last run, shuffled within the block from `seed` when `randomise` (a seed
/// of its own, derived from `seed`, so the block's order does not repeat the first block's).
/// The runs already there are unchanged. Returns the runs sorted by run order.
pub fn add_axial_block(
    mut runs: Vec<PlannedRun>,
    k: usize,
    centre_runs: usize,
    seed: u64,
    randomise: bool,
) -> Result<Vec<PlannedRun>, CompositeError> {
    let rows = axial_levels(k, centre_runs)?;
    let block = runs.iter().map(|r| r.block).max().unwrap_or(0) + 1;
    let std0 = runs.iter().map(|r| r.std_order).max().unwrap_or(0);
    let run0 = runs.iter().map(|r| r.run_order).max().unwrap_or(0);
    let order: Vec<usize> = if randomise {
        // An odd constant (the 64-bit golden ratio) keeps the derived seed distinct from `seed`.
        shuffled_positions(rows.len(), seed ^ 0x9E37_79B9_7F4A_7C15)
    } else {
        (0..rows.len()).collect()
    };
    let mut added: Vec<PlannedRun> = rows
        .into_iter()
        .enumerate()
        .map(|(i, levels)| PlannedRun {
            std_order: std0 + i + 1,
            run_order: 0,
            block,
            centre: levels.iter().all(|&v| v == 0),
            replicate: 1,
            levels,
        })
        .collect();
    for (position, &i) in order.iter().enumerate() {
        added[i].run_order = run0 + position + 1;
    }
    runs.extend(added);
    runs.sort_by_key(|r| r.run_order);
    Ok(runs)
}

/// A term of the quadratic model.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum QuadTerm {
    /// The intercept b₀.
    Intercept,
    /// The effect of a block (sum-to-zero coding against the first block), by block label.
    Block(u32),
    /// The linear term of a factor (0-based).
    Linear(usize),
    /// The two-factor interaction of two factors (i < j).
    Interaction(usize, usize),
    /// The pure quadratic term of a factor.
    Square(usize),
}

impl QuadTerm {
    /// The term's label: `1`, `block 2`, `A`, `AB`, `A²`.
    pub fn label(self) -> String {
        let l = |i: usize| LETTERS.get(i).copied().unwrap_or('?');
        match self {
            QuadTerm::Intercept => "1".into(),
            QuadTerm::Block(b) => format!("block {b}"),
            QuadTerm::Linear(i) => l(i).to_string(),
            QuadTerm::Interaction(i, j) => format!("{}{}", l(i), l(j)),
            QuadTerm::Square(i) => format!("{}²", l(i)),
        }
    }

    fn value(self, x: &[f64], block: u32, first_block: u32) -> f64 {
        match self {
            QuadTerm::Intercept => 1.0,
            QuadTerm::Block(b) if block == b => 1.0,
            QuadTerm::Block(_) if block == first_block => -1.0,
            QuadTerm::Block(_) => 0.0,
            QuadTerm::Linear(i) => x[i],
            QuadTerm::Interaction(i, j) => x[i] * x[j],
            QuadTerm::Square(i) => x[i] * x[i],
        }
    }
}

/// One estimated coefficient with its test.
#[derive(Debug, Clone, PartialEq)]
pub struct QuadCoefficient {
    /// The term.
    pub term: QuadTerm,
    /// Its coefficient.
    pub coefficient: f64,
    /// Standard error; `None` without residual degrees of freedom.
    pub se: Option<f64>,
    /// t ratio.
    pub t: Option<f64>,
    /// Two-sided p-value on the residual degrees of freedom.
    pub p: Option<f64>,
}

/// Lack of fit against pure error (Montgomery, lack-of-fit test in the regression chapter).
#[derive(Debug, Clone, PartialEq)]
pub struct LackOfFit {
    /// Lack-of-fit sum of squares (residual − pure error).
    pub ss: f64,
    /// Its degrees of freedom.
    pub df: usize,
    /// Pure-error sum of squares: runs with the same settings in the same block.
    pub pure_error_ss: f64,
    /// Its degrees of freedom.
    pub pure_error_df: usize,
    /// F = (SS_lof/df_lof) / (SS_pe/df_pe).
    pub f: f64,
    /// Upper-tail p-value of F.
    pub p: Option<f64>,
}

/// What kind of surface the canonical analysis finds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SurfaceKind {
    /// Every eigenvalue negative: a maximum.
    Maximum,
    /// Every eigenvalue positive: a minimum.
    Minimum,
    /// Eigenvalues of both signs: a saddle (minimax).
    Saddle,
    /// An eigenvalue near zero (below [`RIDGE_SHARE`] of the largest): a ridge.
    Ridge,
}

impl SurfaceKind {
    /// The kind in words.
    pub fn words(self) -> &'static str {
        match self {
            SurfaceKind::Maximum => "maximum",
            SurfaceKind::Minimum => "minimum",
            SurfaceKind::Saddle => "saddle point",
            SurfaceKind::Ridge => "ridge",
        }
    }
}

/// Eigenvalues and eigenvectors of B.
#[derive(Debug, Clone, PartialEq)]
pub struct Canonical {
    /// Eigenvalues, largest first.
    pub eigenvalues: Vec<f64>,
    /// The eigenvector of each eigenvalue (unit length, largest component positive).
    pub eigenvectors: Vec<Vec<f64>>,
    /// The kind of surface.
    pub kind: SurfaceKind,
}

/// The stationary point x_s = −½B⁻¹b.
#[derive(Debug, Clone, PartialEq)]
pub struct Stationary {
    /// Coded settings.
    pub x: Vec<f64>,
    /// Predicted response there, ŷ_s = b₀ + ½x_sᵀb.
    pub predicted: f64,
    /// Whether every coordinate lies within [−1, +1], the tested box.
    pub inside_box: bool,
}

/// The fitted quadratic model.
#[derive(Debug, Clone, PartialEq)]
pub struct QuadraticFit {
    /// Factors.
    pub factor_count: usize,
    /// Runs used.
    pub runs: usize,
    /// Coefficients: intercept, blocks, linear, interactions, squares.
    pub coefficients: Vec<QuadCoefficient>,
    /// Residual sum of squares.
    pub residual_ss: f64,
    /// Residual degrees of freedom.
    pub residual_df: usize,
    /// √(residual mean square); `None` without residual degrees of freedom.
    pub sigma: Option<f64>,
    /// R² of the model, blocks counted in the model.
    pub r_squared: f64,
    /// R² adjusted for the terms; `None` without residual degrees of freedom.
    pub adj_r_squared: Option<f64>,
    /// Lack of fit, when both it and pure error have degrees of freedom.
    pub lack_of_fit: Option<LackOfFit>,
    /// The canonical analysis of B.
    pub canonical: Canonical,
    /// The stationary point; `None` when B is singular (a ridge without one point).
    pub stationary: Option<Stationary>,
}

impl QuadraticFit {
    /// The coefficient of `term`, if it is in the model.
    pub fn coefficient(&self, term: QuadTerm) -> Option<f64> {
        self.coefficients
            .iter()
            .find(|c| c.term == term)
            .map(|c| c.coefficient)
    }

    /// The linear coefficients b and the symmetric matrix B.
    pub fn b_and_matrix(&self) -> (Vec<f64>, Vec<Vec<f64>>) {
        let k = self.factor_count;
        let c = |t| self.coefficient(t).unwrap_or(0.0);
        let b = (0..k).map(|i| c(QuadTerm::Linear(i))).collect();
        let m = (0..k)
            .map(|i| {
                (0..k)
                    .map(|j| match i.cmp(&j) {
                        std::cmp::Ordering::Equal => c(QuadTerm::Square(i)),
                        std::cmp::Ordering::Less => c(QuadTerm::Interaction(i, j)) / 2.0,
                        std::cmp::Ordering::Greater => c(QuadTerm::Interaction(j, i)) / 2.0,
                    })
                    .collect()
            })
            .collect();
        (b, m)
    }

    /// The model's prediction at coded settings `x` (blocks averaged out).
    pub fn predict(&self, x: &[f64]) -> f64 {
        self.coefficients
            .iter()
            .filter(|c| !matches!(c.term, QuadTerm::Block(_)))
            .map(|c| c.coefficient * c.term.value(x, 0, u32::MAX))
            .sum()
    }
}

/// The terms of the quadratic model of `k` factors over the given block labels (sorted, distinct).
pub fn quadratic_terms(k: usize, blocks: &[u32]) -> Vec<QuadTerm> {
    let mut terms = vec![QuadTerm::Intercept];
    terms.extend(blocks.iter().skip(1).map(|&b| QuadTerm::Block(b)));
    terms.extend((0..k).map(QuadTerm::Linear));
    for i in 0..k {
        for j in i + 1..k {
            terms.push(QuadTerm::Interaction(i, j));
        }
    }
    terms.extend((0..k).map(QuadTerm::Square));
    terms
}

/// The quadratic model's matrix on coded settings `rows` and their `blocks`, checked for rank:
/// `(k, terms, X, (XᵀX)⁻¹)`, or why the model cannot be fitted whatever the responses.
#[allow(clippy::type_complexity)]
fn model_matrix(
    rows: &[Vec<f64>],
    blocks: &[u32],
) -> Result<(usize, Vec<QuadTerm>, DMatrix<f64>, DMatrix<f64>), CompositeError> {
    let n = rows.len();
    let k = rows.first().map_or(0, Vec::len);
    if k < 2 {
        return Err(CompositeError::TooFewFactors(k));
    }
    let mut labels: Vec<u32> = blocks.to_vec();
    labels.sort_unstable();
    labels.dedup();
    let terms = quadratic_terms(k, &labels);
    let p = terms.len();
    let not_estimable = CompositeError::NotEstimable { runs: n, terms: p };
    if n < p || rows.iter().any(|r| r.len() != k) {
        return Err(not_estimable);
    }
    let first = labels[0];
    let x = DMatrix::from_fn(n, p, |r, c| terms[c].value(&rows[r], blocks[r], first));
    let xtx = x.transpose() * &x;
    // Rank check on the scaled cross-product: a pivot below RANK_REL of the largest is zero.
    let sv = xtx.clone().singular_values();
    let largest = sv.max();
    if largest.is_nan() || largest <= 0.0 || sv.min() <= crate::prec::RANK_REL * largest {
        return Err(not_estimable);
    }
    let inv = xtx.try_inverse().ok_or(not_estimable)?;
    Ok((k, terms, x, inv))
}

/// Whether the quadratic model (with a shift per block) can be fitted to runs given as (coded
/// settings, block), whatever values they get.
pub fn quadratic_estimable<'a>(
    runs: impl IntoIterator<Item = (&'a [i8], u32)>,
) -> Result<(), CompositeError> {
    let (rows, blocks): (Vec<Vec<f64>>, Vec<u32>) = runs
        .into_iter()
        .map(|(levels, block)| (levels.iter().map(|&v| f64::from(v)).collect(), block))
        .unzip();
    model_matrix(&rows, &blocks).map(|_| ())
}

/// Fits the quadratic model to coded settings `rows`, their `blocks` and responses `y` (the runs
/// to use only; see the module documentation for the model and the canonical analysis).
pub fn fit_quadratic(
    rows: &[Vec<f64>],
    blocks: &[u32],
    y: &[f64],
) -> Result<QuadraticFit, CompositeError> {
    let n = rows.len();
    if blocks.len() != n || y.len() != n {
        return Err(CompositeError::Lengths {
            rows: n,
            blocks: blocks.len(),
            values: y.len(),
        });
    }
    let (k, terms, x, inv) = model_matrix(rows, blocks)?;
    let p = terms.len();
    let yv = DVector::from_column_slice(y);
    let beta = &inv * (x.transpose() * &yv);
    let fitted = &x * &beta;
    let residual_ss: f64 = (&yv - &fitted).iter().map(|e| e * e).sum();
    let residual_df = n - p;
    let mse = (residual_df > 0).then(|| residual_ss / residual_df as f64);
    let mean = y.iter().sum::<f64>() / n as f64;
    let total_ss: f64 = y.iter().map(|v| (v - mean) * (v - mean)).sum();
    let r_squared = if total_ss > 0.0 {
        1.0 - residual_ss / total_ss
    } else {
        1.0
    };
    let adj_r_squared = mse
        .filter(|_| total_ss > 0.0 && n > 1)
        .map(|m| 1.0 - m / (total_ss / (n - 1) as f64));
    let coefficients = terms
        .iter()
        .enumerate()
        .map(|(j, &term)| {
            let se = mse.map(|m| (m * inv[(j, j)]).sqrt());
            let t = se.filter(|s| *s > 0.0).map(|s| beta[j] / s);
            QuadCoefficient {
                term,
                coefficient: beta[j],
                se,
                t,
                p: t.and_then(|t| t_two_sided_p(t, residual_df)),
            }
        })
        .collect();
    let mut fit = QuadraticFit {
        factor_count: k,
        runs: n,
        coefficients,
        residual_ss,
        residual_df,
        sigma: mse.map(f64::sqrt),
        r_squared,
        adj_r_squared,
        lack_of_fit: lack_of_fit(rows, blocks, y, residual_ss, residual_df),
        canonical: Canonical {
            eigenvalues: vec![],
            eigenvectors: vec![],
            kind: SurfaceKind::Ridge,
        },
        stationary: None,
    };
    let (b, m) = fit.b_and_matrix();
    let bm = DMatrix::from_fn(k, k, |i, j| m[i][j]);
    fit.canonical = canonical(&bm);
    fit.stationary = bm.clone().try_inverse().and_then(|binv| {
        let bv = DVector::from_vec(b.clone());
        let xs = -0.5 * (binv * &bv);
        let xs: Vec<f64> = xs.iter().copied().collect();
        if xs.iter().any(|v| !v.is_finite()) {
            return None;
        }
        let b0 = fit.coefficient(QuadTerm::Intercept).unwrap_or(0.0);
        let predicted = b0 + 0.5 * xs.iter().zip(&b).map(|(x, b)| x * b).sum::<f64>();
        Some(Stationary {
            inside_box: xs.iter().all(|v| v.abs() <= 1.0 + 1e-12),
            x: xs,
            predicted,
        })
    });
    Ok(fit)
}

/// Pure error from runs with the same settings in the same block, and lack of fit as the rest of
/// the residual; `None` unless both have degrees of freedom.
fn lack_of_fit(
    rows: &[Vec<f64>],
    blocks: &[u32],
    y: &[f64],
    residual_ss: f64,
    residual_df: usize,
) -> Option<LackOfFit> {
    let (pe_ss, pe_df) = crate::anova::fit::pure_error_of(
        rows.iter()
            .zip(blocks)
            .map(|(r, &b)| (b, r.as_slice()))
            .zip(y.iter().copied()),
    );
    let df = residual_df.checked_sub(pe_df)?;
    if df == 0 || pe_df == 0 || pe_ss <= 0.0 {
        return None;
    }
    let ss = (residual_ss - pe_ss).max(0.0);
    let f = (ss / df as f64) / (pe_ss / pe_df as f64);
    Some(LackOfFit {
        ss,
        df,
        pure_error_ss: pe_ss,
        pure_error_df: pe_df,
        f,
        p: f_upper_p(f, df, pe_df),
    })
}

/// Eigenvalues (largest first) and eigenvectors of the symmetric matrix B and the surface kind.
fn canonical(b: &DMatrix<f64>) -> Canonical {
    let eig = SymmetricEigen::new(b.clone());
    let mut pairs: Vec<(f64, Vec<f64>)> = (0..b.nrows())
        .map(|i| {
            let mut v: Vec<f64> = eig.eigenvectors.column(i).iter().copied().collect();
            let big = v
                .iter()
                .copied()
                .fold(0.0f64, |a, x| if x.abs() > a.abs() + 1e-12 { x } else { a });
            if big < 0.0 {
                v.iter_mut().for_each(|x| *x = -*x);
            }
            (eig.eigenvalues[i], v)
        })
        .collect();
    pairs.sort_by(|a, b| b.0.total_cmp(&a.0));
    let largest = pairs.iter().map(|p| p.0.abs()).fold(0.0, f64::max);
    let kind = if largest == 0.0 || pairs.iter().any(|p| p.0.abs() < RIDGE_SHARE * largest) {
        SurfaceKind::Ridge
    } else if pairs.iter().all(|p| p.0 < 0.0) {
        SurfaceKind::Maximum
    } else if pairs.iter().all(|p| p.0 > 0.0) {
        SurfaceKind::Minimum
    } else {
        SurfaceKind::Saddle
    };
    Canonical {
        eigenvalues: pairs.iter().map(|p| p.0).collect(),
        eigenvectors: pairs.into_iter().map(|p| p.1).collect(),
        kind,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::prec::close_to_places;

    #[test]
    fn axial_runs_are_two_per_factor_at_the_faces_then_centres() {
        let rows = axial_levels(3, 2).unwrap();
        assert_eq!(rows.len(), 2 * 3 + 2);
        assert_eq!(rows[0], vec![-1, 0, 0]);
        assert_eq!(rows[1], vec![1, 0, 0]);
        assert_eq!(rows[5], vec![0, 0, 1]);
        assert!(rows[..6].iter().all(|r| is_axial(r)));
        assert!(rows[6..].iter().all(|r| r.iter().all(|&v| v == 0)));
        assert!(!is_axial(&[1, 1, 0]) && !is_axial(&[0, 0, 0]) && !is_axial(&[1]));
        assert_eq!(axial_levels(1, 2), Err(CompositeError::TooFewFactors(1)));
    }

    #[test]
    fn the_axial_block_follows_the_runs_already_planned() {
        let base: Vec<PlannedRun> = (0..4)
            .map(|i| PlannedRun {
                std_order: i + 1,
                run_order: 4 - i,
                block: 1,
                centre: false,
                replicate: 1,
                levels: vec![if i % 2 == 0 { -1 } else { 1 }, if i < 2 { -1 } else { 1 }],
            })
            .collect();
        let runs = add_axial_block(base.clone(), 2, 3, 7, true).unwrap();
        assert_eq!(runs.len(), 4 + 4 + 3);
        for b in &base {
            assert!(runs.contains(b), "{b:?} kept");
        }
        let added: Vec<&PlannedRun> = runs.iter().filter(|r| r.block == 2).collect();
        assert_eq!(added.len(), 7);
        let mut std: Vec<usize> = added.iter().map(|r| r.std_order).collect();
        std.sort_unstable();
        assert_eq!(std, (5..=11).collect::<Vec<_>>());
        let orders: Vec<usize> = runs.iter().map(|r| r.run_order).collect();
        assert_eq!(orders, (1..=11).collect::<Vec<_>>());
        assert_eq!(added.iter().filter(|r| r.centre).count(), 3);
        // Not randomised: the block runs in standard order.
        let plain = add_axial_block(base, 2, 3, 7, false).unwrap();
        assert!(
            plain
                .iter()
                .filter(|r| r.block == 2)
                .all(|r| r.run_order == r.std_order)
        );
    }

    #[test]
    fn alphas_match_the_textbook_two_factor_composite() {
        // Montgomery's two-factor central composite design in two blocks of seven runs (4
        // factorial + 3 centre, 4 axial + 3 centre) is both rotatable and orthogonally blocked at
        // α = √2 (Montgomery, blocking in response surface designs; from memory).
        let a = axial_alphas(2, 4, 3, 3);
        assert!(close_to_places(a.rotatable, 2f64.sqrt(), 12));
        assert!(close_to_places(a.orthogonal_blocking, 2f64.sqrt(), 12));
        assert_eq!(a.face_centred, 1.0);
        // 2^3 with 16 factorial runs: rotatable α = 2 (Box & Hunter 1957; from memory).
        assert!(close_to_places(
            axial_alphas(4, 16, 0, 0).rotatable,
            2.0,
            12
        ));
    }

    /// Montgomery, *Design and Analysis of Experiments*, Example 11.2 (chemical process yield:
    /// x₁ time, x₂ temperature, a rotatable central composite design with five centre points);
    /// data and results from memory.
    fn montgomery_yield() -> (Vec<Vec<f64>>, Vec<f64>) {
        let a = 1.414;
        let rows = vec![
            vec![-1.0, -1.0],
            vec![-1.0, 1.0],
            vec![1.0, -1.0],
            vec![1.0, 1.0],
            vec![0.0, 0.0],
            vec![0.0, 0.0],
            vec![0.0, 0.0],
            vec![0.0, 0.0],
            vec![0.0, 0.0],
            vec![a, 0.0],
            vec![-a, 0.0],
            vec![0.0, a],
            vec![0.0, -a],
        ];
        let y = vec![
            76.5, 77.0, 78.0, 79.5, 79.9, 80.3, 80.0, 79.7, 79.8, 78.4, 75.6, 78.5, 77.0,
        ];
        (rows, y)
    }

    #[test]
    fn the_yield_example_has_its_published_model_and_maximum() {
        let (rows, y) = montgomery_yield();
        let fit = fit_quadratic(&rows, &vec![1; rows.len()], &y).unwrap();
        // ŷ = 79.94 + 0.995x₁ + 0.515x₂ − 1.376x₁² − 1.001x₂² + 0.250x₁x₂.
        let c = |t| fit.coefficient(t).unwrap();
        assert!(close_to_places(c(QuadTerm::Intercept), 79.94, 2));
        assert!(close_to_places(c(QuadTerm::Linear(0)), 0.995, 3));
        assert!(close_to_places(c(QuadTerm::Linear(1)), 0.515, 3));
        assert!(close_to_places(c(QuadTerm::Square(0)), -1.376, 3));
        assert!(close_to_places(c(QuadTerm::Square(1)), -1.001, 3));
        assert!(close_to_places(c(QuadTerm::Interaction(0, 1)), 0.250, 3));
        // Stationary point x₁ = 0.389, x₂ = 0.306, ŷ_s = 80.21; λ = −0.9634 and −1.4141
        // (published to these places).
        let s = fit.stationary.as_ref().unwrap();
        assert!(close_to_places(s.x[0], 0.389, 3), "{:?}", s.x);
        assert!(close_to_places(s.x[1], 0.306, 3), "{:?}", s.x);
        assert!(close_to_places(s.predicted, 80.21, 2));
        assert!(s.inside_box);
        let l = &fit.canonical.eigenvalues;
        assert!(close_to_places(l[0], -0.9634, 3), "{l:?}");
        assert!(close_to_places(l[1], -1.4141, 3), "{l:?}");
        assert_eq!(fit.canonical.kind, SurfaceKind::Maximum);
        // Five centre points give four degrees of freedom of pure error, lack of fit 3.
        let lof = fit.lack_of_fit.as_ref().unwrap();
        assert_eq!((lof.df, lof.pure_error_df), (3, 4));
        // Pure error SS of the centre points: Σ(y − 79.94)² = 0.212 (computed by hand).
        assert!(close_to_places(lof.pure_error_ss, 0.212, 3));
        // The prediction at x_s is ŷ_s.
        assert!(close_to_places(fit.predict(&s.x), s.predicted, 9));
    }

    #[test]
    fn the_canonical_analysis_names_each_kind() {
        // Surfaces built from exact coefficients on a 3² grid (no noise): y = f(x).
        let grid: Vec<Vec<f64>> = (-1..=1)
            .flat_map(|a| (-1..=1).map(move |b| vec![f64::from(a), f64::from(b)]))
            .collect();
        let kind = |f: &dyn Fn(f64, f64) -> f64| {
            let y: Vec<f64> = grid.iter().map(|r| f(r[0], r[1])).collect();
            fit_quadratic(&grid, &[1; 9], &y).unwrap()
        };
        // Montgomery's yield surface above, rounded: a maximum.
        assert_eq!(
            kind(&|a, b| 80.0 - a * a - 2.0 * b * b).canonical.kind,
            SurfaceKind::Maximum
        );
        let min = kind(&|a, b| 5.0 + a * a + b * b + 0.5 * a * b);
        assert_eq!(min.canonical.kind, SurfaceKind::Minimum);
        // Eigenvalues of [[1, 0.25], [0.25, 1]]: 1.25 and 0.75 (by hand).
        assert!(close_to_places(min.canonical.eigenvalues[0], 1.25, 9));
        assert!(close_to_places(min.canonical.eigenvalues[1], 0.75, 9));
        let saddle = kind(&|a, b| a * a - b * b + a);
        assert_eq!(saddle.canonical.kind, SurfaceKind::Saddle);
        // x_s = −½B⁻¹b = (−0.5, 0): by hand.
        let s = saddle.stationary.unwrap();
        assert!(close_to_places(s.x[0], -0.5, 9) && close_to_places(s.x[1], 0.0, 9));
        // B singular: a ridge without a stationary point.
        let ridge = kind(&|a, b| 3.0 - a * a + b);
        assert_eq!(ridge.canonical.kind, SurfaceKind::Ridge);
        assert_eq!(ridge.stationary, None);
    }

    #[test]
    fn a_two_level_design_cannot_fit_the_quadratic_model() {
        let rows: Vec<Vec<f64>> = vec![
            vec![-1.0, -1.0],
            vec![1.0, -1.0],
            vec![-1.0, 1.0],
            vec![1.0, 1.0],
            vec![0.0, 0.0],
            vec![0.0, 0.0],
            vec![0.0, 0.0],
        ];
        let y = [1.0, 2.0, 3.0, 4.0, 2.0, 2.5, 3.0];
        assert_eq!(
            fit_quadratic(&rows, &[1; 7], &y),
            Err(CompositeError::NotEstimable { runs: 7, terms: 6 })
        );
        assert!(matches!(
            fit_quadratic(&rows, &[1; 6], &y),
            Err(CompositeError::Lengths { .. })
        ));
    }
}
