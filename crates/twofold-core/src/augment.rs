//! Runs added to separate named two-factor interactions: D-optimal augmentation.
//!
//! The runs already made stay; a new block of n runs is chosen from the 2^k points of the full
//! factorial to maximise |XᵀX| of the combined runs for the model of the intercept, a block
//! indicator per block, every main effect and the named interactions (Atkinson, Donev & Tobias
//! 2007, *Optimum Experimental Designs, with SAS*, the chapter on design augmentation, where the
//! existing runs enter the information matrix and only the new ones are chosen; from memory).
//! n is the smallest number, from one more than the named interactions up to
//! [`MAX_ADDED_RUNS`], for which the combined runs estimate the whole model.
//!
//! # Algorithm
//! A greedy start adds, one at a time, the candidate x with the largest xᵀ(M + εI)⁻¹x, where M
//! is the information matrix of the runs so far (the sequential construction of Wynn 1970; the
//! small ridge ε makes it work from a singular start, common practice). Then Fedorov's exchange
//! (Fedorov 1972, *Theory of Optimal Experiments*; Atkinson, Donev & Tobias 2007, the chapter on
//! algorithms for exact designs): swapping added run xᵢ for candidate xⱼ multiplies |M| by
//!
//! Δ(xᵢ, xⱼ) = (1 + d(xⱼ))(1 − d(xᵢ)) + d(xᵢ, xⱼ)²,  d(x, y) = xᵀM⁻¹y, d(x) = d(x, x),
//!
//! and the best swap is made while it multiplies |M| by more than 1 + [`IMPROVEMENT`]. Every
//! step is deterministic (ties go to the lowest candidate in standard order), so the same
//! request gives the same runs.

use nalgebra::{DMatrix, DVector};

use crate::estimability::{Estimability, estimability, model_matrix, term_value};
use crate::term::Term;

/// Most factors whose full factorial serves as the candidate set (2^16 = 65,536 points, visited
/// one at a time, never stored).
pub const MAX_AUGMENT_FACTORS: usize = 16;

/// Most runs added.
pub const MAX_ADDED_RUNS: usize = 32;

/// Most exchange passes (common practice, no source for the number).
pub const MAX_EXCHANGES: usize = 100;

/// Smallest relative gain of |M| for which an exchange is made (common practice, no source).
pub const IMPROVEMENT: f64 = 1e-9;

/// Ridge added to a singular information matrix during the greedy start (common practice, no
/// source for the value).
const RIDGE: f64 = 1e-6;

/// Why runs cannot be added.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum AugmentError {
    /// Too many factors for the candidate set.
    #[error(
        "{0} factors: runs to separate interactions are chosen from the full factorial, offered up to {MAX_AUGMENT_FACTORS} factors"
    )]
    TooManyFactors(usize),
    /// No interaction named.
    #[error("name at least one two-factor interaction to separate, e.g. AB,CE")]
    NothingNamed,
    /// A named term is not a two-factor interaction.
    #[error("{0} is not a two-factor interaction")]
    NotAnInteraction(String),
    /// No number of runs up to the cap estimates the model.
    #[error(
        "no {MAX_ADDED_RUNS} added runs or fewer estimate every main effect and the named interactions"
    )]
    NotReached,
}

/// The runs chosen and what the combined runs estimate.
#[derive(Debug, Clone, PartialEq)]
pub struct Augmentation {
    /// The named interactions.
    pub interactions: Vec<Term>,
    /// The model: every main effect, then the named interactions.
    pub model: Vec<Term>,
    /// The added runs, coded, in the order chosen.
    pub added_runs: Vec<Vec<i8>>,
    /// How the combined runs (existing blocks and the new one) estimate the model.
    pub estimability: Estimability,
    /// How the existing runs alone estimate it.
    pub before: Estimability,
    /// log |XᵀX| of the combined runs for the model.
    pub log_det: f64,
}

/// The model of every main effect of `k` factors and `interactions`.
pub fn separation_model(k: usize, interactions: &[Term]) -> Vec<Term> {
    let mut model: Vec<Term> = (0..k).map(Term::main).collect();
    for &t in interactions {
        if !model.contains(&t) {
            model.push(t);
        }
    }
    model
}

/// The candidate point `index` of the 2^k full factorial in standard order: factor i at + when
/// bit i of `index` is set.
pub fn candidate(index: usize, k: usize) -> Vec<i8> {
    (0..k)
        .map(|i| if index >> i & 1 == 1 { 1 } else { -1 })
        .collect()
}

/// The row of the model (intercept, block indicators, terms) of a run in the new block, which is
/// the last of `blocks_before + 1` blocks.
fn new_block_row(levels: &[i8], blocks_before: usize, model: &[Term]) -> DVector<f64> {
    let p = 1 + blocks_before + model.len();
    DVector::from_fn(p, |j, _| {
        if j == 0 || j == blocks_before {
            1.0
        } else if j < blocks_before {
            0.0
        } else {
            term_value(model[j - 1 - blocks_before], levels)
        }
    })
}

/// Chooses the runs that separate `interactions` (see the module documentation), given the
/// `existing` coded runs in `blocks` and `centre_points` centre points that the new block will
/// also hold.
pub fn separate_interactions(
    existing: &[Vec<i8>],
    blocks: &[u32],
    k: usize,
    interactions: &[Term],
    centre_points: usize,
) -> Result<Augmentation, AugmentError> {
    if k > MAX_AUGMENT_FACTORS {
        return Err(AugmentError::TooManyFactors(k));
    }
    if interactions.is_empty() {
        return Err(AugmentError::NothingNamed);
    }
    if let Some(t) = interactions
        .iter()
        .find(|t| t.order() != 2 || t.factors().any(|f| f >= k))
    {
        return Err(AugmentError::NotAnInteraction(t.label()));
    }
    let model = separation_model(k, interactions);
    let before = estimability(existing, blocks, &model);
    let new_block = blocks.iter().copied().max().unwrap_or(0) + 1;
    let mut distinct: Vec<u32> = blocks.to_vec();
    distinct.sort_unstable();
    distinct.dedup();
    let blocks_before = distinct.len();
    let start = 1 + interactions.len();
    for n in start..=MAX_ADDED_RUNS {
        let added = choose(existing, blocks, k, &model, blocks_before, n, centre_points);
        let (rows, bl) = combined(existing, blocks, &added, new_block, centre_points);
        let est = estimability(&rows, &bl, &model);
        if est.full_rank() {
            let x = model_matrix(&rows, &bl, &model);
            let log_det = crate::estimability::log_det_information(&x).unwrap_or(f64::NEG_INFINITY);
            return Ok(Augmentation {
                interactions: interactions.to_vec(),
                model,
                added_runs: added,
                estimability: est,
                before,
                log_det,
            });
        }
    }
    Err(AugmentError::NotReached)
}

/// The existing runs followed by the added ones and the new block's centre points.
pub fn combined(
    existing: &[Vec<i8>],
    blocks: &[u32],
    added: &[Vec<i8>],
    new_block: u32,
    centre_points: usize,
) -> (Vec<Vec<i8>>, Vec<u32>) {
    let k = existing
        .first()
        .or(added.first())
        .map_or(0, std::vec::Vec::len);
    let mut rows = existing.to_vec();
    rows.extend(added.iter().cloned());
    rows.extend(std::iter::repeat_n(vec![0; k], centre_points));
    let mut bl = blocks.to_vec();
    bl.resize(rows.len(), new_block);
    (rows, bl)
}

/// The n added runs: greedy start, then exchange.
fn choose(
    existing: &[Vec<i8>],
    blocks: &[u32],
    k: usize,
    model: &[Term],
    blocks_before: usize,
    n: usize,
    centre_points: usize,
) -> Vec<Vec<i8>> {
    let p = 1 + blocks_before + model.len();
    // Information of the existing runs, in the column layout of the combined model (the new
    // block's indicator is 0 on them), plus the new block's centre points.
    let mut distinct: Vec<u32> = blocks.to_vec();
    distinct.sort_unstable();
    distinct.dedup();
    let mut m = DMatrix::<f64>::zeros(p, p);
    for (levels, b) in existing.iter().zip(blocks) {
        let row = DVector::from_fn(p, |j, _| {
            if j == 0 {
                1.0
            } else if j < blocks_before {
                f64::from(u8::from(distinct.get(j) == Some(b)))
            } else if j == blocks_before {
                0.0
            } else {
                term_value(model[j - 1 - blocks_before], levels)
            }
        });
        m += &row * row.transpose();
    }
    let centre = new_block_row(&vec![0; k], blocks_before, model);
    for _ in 0..centre_points {
        m += &centre * centre.transpose();
    }
    let ridge = DMatrix::<f64>::identity(p, p) * RIDGE;
    let candidates = 1usize << k;
    let row = |c: usize| new_block_row(&candidate(c, k), blocks_before, model);
    // Greedy start.
    let mut chosen: Vec<usize> = Vec::with_capacity(n);
    for _ in 0..n {
        let Some(inv) = (&m + &ridge).try_inverse() else {
            break;
        };
        let mut best = (f64::NEG_INFINITY, 0);
        for c in 0..candidates {
            let x = row(c);
            let d = (x.transpose() * &inv * &x)[(0, 0)];
            if d > best.0 + 1e-12 {
                best = (d, c);
            }
        }
        let x = row(best.1);
        m += &x * x.transpose();
        chosen.push(best.1);
    }
    // Exchange: each swap raises |M| by a factor above 1 + IMPROVEMENT, so it ends; the bound
    // keeps the time of 2^16 candidates in reach when gains are tiny (common practice).
    for _ in 0..MAX_EXCHANGES {
        let Some(inv) = (&m + &ridge).try_inverse() else {
            break;
        };
        let rows_in: Vec<DVector<f64>> = chosen.iter().map(|&c| row(c)).collect();
        let d_in: Vec<f64> = rows_in
            .iter()
            .map(|x| (x.transpose() * &inv * x)[(0, 0)])
            .collect();
        let mut best = (1.0 + IMPROVEMENT, None);
        for c in 0..candidates {
            let xj = row(c);
            let v = &inv * &xj;
            let dj = xj.dot(&v);
            for (i, xi) in rows_in.iter().enumerate() {
                let dij = xi.dot(&v);
                let delta = (1.0 + dj) * (1.0 - d_in[i]) + dij * dij;
                if delta > best.0 {
                    best = (delta, Some((i, c)));
                }
            }
        }
        let Some((i, c)) = best.1 else {
            break;
        };
        let out = &rows_in[i];
        m -= out * out.transpose();
        let x = row(c);
        m += &x * x.transpose();
        chosen[i] = c;
    }
    chosen.into_iter().map(|c| candidate(c, k)).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::FractionalDesign;
    use crate::estimability::log_det_information;

    fn t(label: &str, k: usize) -> Term {
        Term::parse(label, k).unwrap()
    }

    #[test]
    fn the_chosen_pair_is_as_good_as_every_pair_of_the_full_factorial() {
        // 2^(4−1) with D = ABC (resolution IV: AB = CD, AC = BD, AD = BC). Separating AB from CD
        // needs both in the model: 1 + 1 + 4 + 2 = 8 parameters. Brute force over every pair of
        // the 16 candidates (with repeats) gives the largest |XᵀX|; the chosen runs must reach
        // it (common practice: exhaustive search as the check of an exchange algorithm).
        let k = 4;
        let d = FractionalDesign::from_text(k, Some(8), "D=ABC").unwrap();
        let rows = d.coded_runs();
        let blocks = vec![1; rows.len()];
        let named = [t("AB", k), t("CD", k)];
        let a = separate_interactions(&rows, &blocks, k, &named, 0).unwrap();
        assert!(a.estimability.full_rank());
        assert!(!a.before.full_rank());
        let model = separation_model(k, &named);
        let n = a.added_runs.len();
        assert_eq!(n, 3, "two named interactions and a block need three runs");
        let mut best = f64::NEG_INFINITY;
        let mut count = 0;
        for i in 0..16 {
            for j in i..16 {
                for l in j..16 {
                    let added = [candidate(i, k), candidate(j, k), candidate(l, k)];
                    let (r, b) = combined(&rows, &blocks, &added, 2, 0);
                    if let Some(v) = log_det_information(&model_matrix(&r, &b, &model)) {
                        best = best.max(v);
                        count += 1;
                    }
                }
            }
        }
        assert!(count > 0);
        assert!(a.log_det >= best - 1e-9, "{} < {best}", a.log_det);
    }

    #[test]
    fn one_named_interaction_takes_the_best_pair_of_runs() {
        // 2^(4−1) with D = ABC and AB named: one interaction and the block need two runs.
        // Every pair of the 16 candidates is tried; none gives a larger |XᵀX| than the chosen
        // pair (exhaustive search as the check of an exchange algorithm, common practice).
        let k = 4;
        let rows = FractionalDesign::from_text(k, Some(8), "D=ABC")
            .unwrap()
            .coded_runs();
        let blocks = vec![1; rows.len()];
        let named = [t("AB", k)];
        let a = separate_interactions(&rows, &blocks, k, &named, 0).unwrap();
        assert_eq!(a.added_runs.len(), 2);
        let model = separation_model(k, &named);
        let mut best = f64::NEG_INFINITY;
        for i in 0..16 {
            for j in i..16 {
                let (r, b) = combined(&rows, &blocks, &[candidate(i, k), candidate(j, k)], 2, 0);
                if let Some(v) = log_det_information(&model_matrix(&r, &b, &model)) {
                    best = best.max(v);
                }
            }
        }
        assert!(a.log_det >= best - 1e-9, "{} < {best}", a.log_det);
    }

    #[test]
    fn aliased_interactions_of_a_resolution_iv_fraction_become_estimable() {
        // 2^(6−2)_IV with E = ABC, F = BCD: AE = BC (from E = ABC). Naming both makes the
        // fraction alone rank deficient; the added block (with two centre points) separates
        // them, each with a variance inflation of at least 1.
        let k = 6;
        let d = FractionalDesign::from_text(k, Some(16), "E=ABC, F=BCD").unwrap();
        let rows = d.coded_runs();
        let named = [t("AE", k), t("BC", k)];
        let a = separate_interactions(&rows, &[1; 16], k, &named, 2).unwrap();
        assert!(!a.before.full_rank());
        assert_eq!(a.added_runs.len(), 3);
        for n in named {
            let e = a.estimability.get(n).unwrap();
            assert!(e.estimable && e.variance_inflation.unwrap() >= 1.0 - 1e-12);
        }
        // Deterministic: the same request gives the same runs.
        let again = separate_interactions(&rows, &[1; 16], k, &named, 2).unwrap();
        assert_eq!(again.added_runs, a.added_runs);
    }

    #[test]
    fn bad_requests_say_why() {
        let rows = FractionalDesign::full(3).unwrap().coded_runs();
        let b = vec![1; rows.len()];
        assert_eq!(
            separate_interactions(&rows, &b, 3, &[], 0),
            Err(AugmentError::NothingNamed)
        );
        assert_eq!(
            separate_interactions(&rows, &b, 3, &[t("ABC", 3)], 0),
            Err(AugmentError::NotAnInteraction("ABC".into()))
        );
        assert_eq!(
            separate_interactions(&[], &[], 17, &[Term::main(0).times(Term::main(1))], 0),
            Err(AugmentError::TooManyFactors(17))
        );
    }
}
