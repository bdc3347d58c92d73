//! Which terms of a model a set of runs estimates, and how well, by least squares on the runs
//! themselves: for designs that are not regular fractions (a semifold, runs added to separate
//! interactions), where alias chains do not describe the aliasing.
//!
//! # Formulas
//! The model matrix X has a column of ones, one indicator column per block after the first,
//! and a column per term (the product of the coded levels of its factors, 0 at a centre point).
//! A coefficient βⱼ is *estimable* when column j is not a linear combination of the other
//! columns, i.e. when removing it lowers the rank of X (Searle 1971, *Linear Models*, §5.4:
//! λ'β is estimable iff λ' lies in the row space of X; for λ = eⱼ this is the rank condition).
//!
//! With X of full column rank, the variance inflation factor of term j is
//! VIFⱼ = [(XᵀX)⁻¹]ⱼⱼ · Σᵢ (xᵢⱼ − x̄ⱼ)², which is 1/(1 − Rⱼ²) of the regression of column j on
//! the others (Montgomery, Peck & Vining, *Introduction to Linear Regression Analysis*, the
//! multicollinearity chapter; from memory): 1 for a term orthogonal to the rest of the model.
//!
//! The D-efficiency of an n-run design for p parameters is |XᵀX|^(1/p) / n, 1 for an orthogonal
//! two-level design with ±1 columns (Atkinson, Donev & Tobias 2007, *Optimum Experimental
//! Designs, with SAS*, the chapter on criteria of optimality; from memory).

use nalgebra::DMatrix;

use crate::prec::RANK_REL;
use crate::term::Term;

/// The value of `term`'s column at a run with coded `levels`.
pub fn term_value(term: Term, levels: &[i8]) -> f64 {
    term.factors()
        .map(|f| f64::from(levels.get(f).copied().unwrap_or(0)))
        .product()
}

/// The model matrix of `rows` (coded levels) in `blocks` (block number of each row, any
/// numbering) for `terms`: a column of ones, an indicator per block after the lowest, then one
/// column per term.
pub fn model_matrix(rows: &[Vec<i8>], blocks: &[u32], terms: &[Term]) -> DMatrix<f64> {
    let mut distinct: Vec<u32> = blocks.to_vec();
    distinct.sort_unstable();
    distinct.dedup();
    let extra_blocks = distinct.len().saturating_sub(1);
    let p = 1 + extra_blocks + terms.len();
    DMatrix::from_fn(rows.len(), p, |i, j| {
        if j == 0 {
            1.0
        } else if j <= extra_blocks {
            f64::from(u8::from(blocks.get(i) == distinct.get(j)))
        } else {
            term_value(terms[j - 1 - extra_blocks], &rows[i])
        }
    })
}

/// Numerical rank of `x` (singular values above [`RANK_REL`] times the largest).
pub fn rank(x: &DMatrix<f64>) -> usize {
    if x.is_empty() {
        return 0;
    }
    let sv = x.clone().svd(false, false).singular_values;
    let top = sv.iter().copied().fold(0.0, f64::max);
    if top == 0.0 {
        return 0;
    }
    sv.iter().filter(|&&s| s > RANK_REL * top).count()
}

/// How one term is estimated.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TermEstimability {
    /// The term.
    pub term: Term,
    /// Whether its coefficient is estimable (see the module documentation).
    pub estimable: bool,
    /// Its variance inflation factor when the whole model is estimable, else `None`.
    pub variance_inflation: Option<f64>,
}

/// How a set of runs estimates a model.
#[derive(Debug, Clone, PartialEq)]
pub struct Estimability {
    /// Runs.
    pub runs: usize,
    /// Parameters: intercept, block indicators and terms.
    pub parameters: usize,
    /// Rank of the model matrix.
    pub rank: usize,
    /// Each term of the model, in the order given.
    pub terms: Vec<TermEstimability>,
    /// D-efficiency |XᵀX|^(1/p)/n when the model is estimable, else `None`.
    pub d_efficiency: Option<f64>,
}

impl Estimability {
    /// Whether every parameter of the model is estimable.
    pub fn full_rank(&self) -> bool {
        self.rank == self.parameters
    }

    /// The terms that are not estimable.
    pub fn not_estimable(&self) -> Vec<Term> {
        self.terms
            .iter()
            .filter(|t| !t.estimable)
            .map(|t| t.term)
            .collect()
    }

    /// The entry for `term`, if it is in the model.
    pub fn get(&self, term: Term) -> Option<&TermEstimability> {
        self.terms.iter().find(|t| t.term == term)
    }
}

/// How `rows` in `blocks` estimate the model of intercept, blocks and `terms` (see the module
/// documentation for the formulas).
pub fn estimability(rows: &[Vec<i8>], blocks: &[u32], terms: &[Term]) -> Estimability {
    let x = model_matrix(rows, blocks, terms);
    let p = x.ncols();
    let r = rank(&x);
    let offset = p - terms.len();
    let xtx = x.transpose() * &x;
    let inverse = if r == p {
        xtx.clone().try_inverse()
    } else {
        None
    };
    let n = rows.len();
    let out = terms
        .iter()
        .enumerate()
        .map(|(i, &term)| {
            let j = offset + i;
            let estimable = if r == p {
                true
            } else {
                rank(&x.clone().remove_column(j)) < r
            };
            let variance_inflation = inverse.as_ref().map(|inv| {
                let col = x.column(j);
                let mean = col.mean();
                let ss: f64 = col.iter().map(|v| (v - mean).powi(2)).sum();
                inv[(j, j)] * ss
            });
            TermEstimability {
                term,
                estimable,
                variance_inflation,
            }
        })
        .collect();
    let d_efficiency = (r == p && n > 0).then(|| {
        let det = xtx.determinant().max(0.0);
        det.powf(1.0 / p as f64) / n as f64
    });
    Estimability {
        runs: n,
        parameters: p,
        rank: r,
        terms: out,
        d_efficiency,
    }
}

/// log |XᵀX| of the model matrix `x`, or `None` when XᵀX is singular.
pub fn log_det_information(x: &DMatrix<f64>) -> Option<f64> {
    let xtx = x.transpose() * x;
    let chol = xtx.cholesky()?;
    let l = chol.l();
    let mut sum = 0.0;
    for i in 0..l.nrows() {
        let d = l[(i, i)];
        if d <= 0.0 {
            return None;
        }
        sum += 2.0 * d.ln();
    }
    Some(sum)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::FractionalDesign;
    use crate::term::main_effects_and_two_factor_interactions;

    #[test]
    fn an_orthogonal_design_has_inflation_one_and_d_efficiency_one() {
        // A full 2^3 factorial is orthogonal for all its terms: every VIF is 1 and
        // |XᵀX|^(1/p)/n = (8^p)^(1/p)/8 = 1 (definitions in the module documentation).
        let d = FractionalDesign::full(3).unwrap();
        let rows = d.coded_runs();
        let terms = main_effects_and_two_factor_interactions(3);
        let e = estimability(&rows, &vec![1; rows.len()], &terms);
        assert!(e.full_rank());
        for t in &e.terms {
            assert!((t.variance_inflation.unwrap() - 1.0).abs() < 1e-12);
        }
        assert!((e.d_efficiency.unwrap() - 1.0).abs() < 1e-12);
    }

    #[test]
    fn aliased_terms_are_not_estimable_and_the_rest_are() {
        // 2^(3-1) with C = AB: C and AB share a column, so neither is estimable in a model with
        // both, while A and B stay estimable (the alias C = AB, Montgomery's 2^(3-1) example).
        let d = FractionalDesign::from_text(3, Some(4), "C=AB").unwrap();
        let rows = d.coded_runs();
        let terms = ["A", "B", "C", "AB"].map(|t| Term::parse(t, 3).unwrap());
        let e = estimability(&rows, &[1, 1, 1, 1], &terms);
        assert!(!e.full_rank());
        let flags: Vec<bool> = e.terms.iter().map(|t| t.estimable).collect();
        assert_eq!(flags, [true, true, false, false]);
        assert_eq!(e.d_efficiency, None);
    }

    #[test]
    fn a_block_column_takes_a_degree_of_freedom() {
        // Two blocks of a 2^2 confounded with AB: the block indicator equals (1 + AB)/2 up to
        // sign, so AB is no longer estimable beside the blocks (common practice, no source).
        let rows = vec![vec![-1, -1], vec![1, 1], vec![1, -1], vec![-1, 1]];
        let terms = ["A", "B", "AB"].map(|t| Term::parse(t, 2).unwrap());
        let e = estimability(&rows, &[1, 1, 2, 2], &terms);
        assert_eq!((e.parameters, e.rank), (5, 4));
        assert_eq!(e.not_estimable(), vec![terms[2]]);
        let x = model_matrix(&rows, &[1, 1, 1, 1], &terms);
        assert!((log_det_information(&x).unwrap() - 4.0 * 4f64.ln()).abs() < 1e-9);
    }
}
