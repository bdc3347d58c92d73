//! Effects of the lowest chains only, when the runs at hand leave too many cells empty to separate
//! every chain in bounded time and memory.
//!
//! Separating every chain of a regular layout with `M` empty cells costs a system of `|M|`
//! unknowns (see `effects_by_completion`): `|M|²` numbers and `|M|³` operations, beyond any
//! machine for a 2^16 with half its runs missing. Then the first [`REDUCED_CHAINS`] chains in the
//! order of the trade (main effects, then two-factor interactions, …) are estimated by least
//! squares with the intercept and the chains confounded with blocks, the others are left out and
//! counted (they join the residual), and the engine says so.
//!
//! # Method
//! For a regular layout every column is a character `χ_κ` of the cells, so the cross products are
//! read off two Walsh–Hadamard transforms: `Σ_runs χ_a·χ_b = T[n](a ⊕ b)` and
//! `Σ_runs χ_a·y = T[s](a)`, with `n` the runs per cell and `s` the response sums per cell (the
//! same identity as the fit's transform route, `anova::gram`). The normal equations of the chosen
//! columns are then factorised by Cholesky column by column in order; a column whose squared
//! distance from those before it is at most [`GRAM_RANK_REL`] of its squared length is judged
//! dependent (not estimable) and skipped, as the dense route's Gram–Schmidt does. Cost
//! `O(N·log N + P³)` for `N` cells and `P` chains, memory `O(N + P²)`.

use super::{Effect, chain_effect};
use crate::anova::gram::{GreedyCholesky, fwht};
use crate::columns::AliasStructure;
use crate::term::Term;

/// Most empty cells for which every chain is separated by the completion (`|M|²` numbers of
/// 8 bytes: 32 MiB, and about `(2/3)·|M|³` operations, a second or so here).
pub const MAX_COMPLETION_CELLS: usize = 2048;

/// Chains estimated, lowest first, when there are more empty cells than that.
pub const REDUCED_CHAINS: usize = 512;

/// What the reduced estimate gives: the effects, the chains among those tried that the runs
/// cannot separate, and how many candidate chains were left out untried.
pub(super) struct Reduced {
    pub effects: Vec<Effect>,
    pub not_estimable: Vec<Term>,
    pub left_out: usize,
}

/// Least squares for the intercept, the chains with keys `fixed` (confounded with blocks, never
/// reported) and the first [`REDUCED_CHAINS`] of `candidates`, from the runs per cell `counts`
/// and the response sums per cell `sums`. `None` when the intercept or a fixed chain cannot be
/// estimated (a whole block missing).
pub(super) fn lowest_chains(
    aliasing: &AliasStructure,
    counts: &[f64],
    sums: &[f64],
    candidates: &[usize],
    fixed: &[usize],
) -> Option<Reduced> {
    let tried = &candidates[..candidates.len().min(REDUCED_CHAINS)];
    let mut t_counts = counts.to_vec();
    fwht(&mut t_counts);
    let mut t_sums = sums.to_vec();
    fwht(&mut t_sums);
    let mut keys: Vec<usize> = Vec::with_capacity(1 + fixed.len() + tried.len());
    keys.push(0);
    keys.extend_from_slice(fixed);
    for &i in tried {
        keys.push(aliasing.chain_key(i)? as usize);
    }
    let always = 1 + fixed.len();
    // Keys lie below the number of cells, and so does the symmetric difference of two.
    let cross = |i: usize, j: usize| t_counts.get(keys[i] ^ keys[j]).copied().unwrap_or(0.0);
    let chol = GreedyCholesky::new(keys.len(), cross);
    if chol.kept.len() < always || chol.kept[always - 1] != always - 1 {
        return None;
    }
    let not_estimable = chol
        .dropped
        .iter()
        .map(|&(j, _)| aliasing.chains()[tried[j - always]].representative)
        .collect();
    // Solve L·Lᵀ·β = Xᵀy.
    let xty: Vec<f64> = chol
        .kept
        .iter()
        .map(|&j| t_sums.get(keys[j]).copied())
        .collect::<Option<_>>()?;
    let beta = chol.backward(&chol.forward(&xty));
    let kept = chol.kept;
    let effects = kept
        .iter()
        .zip(&beta)
        .filter(|(j, _)| **j >= always)
        .map(|(&j, &b)| chain_effect(aliasing, tried[j - always], b))
        .collect();
    Some(Reduced {
        effects,
        not_estimable,
        left_out: candidates.len() - tried.len(),
    })
}

#[cfg(test)]
mod tests {
    use super::super::{
        EffectOptions, cell_means, effects_by_least_squares, estimate_effects,
        estimate_effects_with,
    };
    use super::*;
    use crate::columns::term_value;
    use crate::data::Observations;
    use crate::test_support::full;
    use proptest::prelude::*;

    proptest! {
        /// Two implementations that must agree: the normal equations read off the transforms and
        /// the dense QR route on the same chains, with runs missing at random and blocks made by
        /// confounding (or none), to 1e-9 relative; the same chains must be judged not estimable.
        #[test]
        fn normal_equations_and_dense_least_squares_agree(
            base in 2usize..=6,
            word in 0u32..64,
            seed in proptest::collection::vec(-100.0f64..100.0, 64),
            drop in proptest::collection::vec(proptest::bool::weighted(0.3), 64),
        ) {
            let levels = full(base);
            let word = word & ((1 << base) - 1);
            let blocks: Vec<u32> = if word == 0 {
                vec![]
            } else {
                levels.iter().map(|r| 1 + u32::from(term_value(r, Term::from_bits(word)) < 0.0)).collect()
            };
            let n = levels.len();
            let y: Vec<Option<f64>> = (0..n).map(|i| (!drop[i]).then_some(seed[i])).collect();
            let o = Observations::new(base, levels, blocks, y, vec![]).unwrap();
            let dense = estimate_effects_with(&o, &EffectOptions { force_least_squares: true, ..Default::default() });
            prop_assume!(dense.is_ok());
            let dense = dense.unwrap();
            let aliasing = &dense.aliasing;
            let used: Vec<usize> = o.used_runs();
            let cells = cell_means(&o, aliasing, &used).unwrap();
            let candidates: Vec<usize> = (0..aliasing.chains().len())
                .filter(|&i| !dense.confounded_with_blocks.contains(&aliasing.chains()[i].representative))
                .collect();
            let fixed: Vec<usize> = dense.confounded_with_blocks.iter().map(|&t| aliasing.key_of(t).bits as usize).collect();
            let Some(r) = lowest_chains(aliasing, &cells.counts, &cells.sums, &candidates, &fixed) else {
                // A whole block is missing: the dense route then has no block column to lose.
                prop_assume!(false);
                unreachable!();
            };
            let ys: Vec<f64> = used.iter().map(|&i| o.response()[i].unwrap_or(0.0)).collect();
            let (effects, lost) = effects_by_least_squares(&o, aliasing, &used, &ys, &candidates).unwrap();
            prop_assert_eq!(r.left_out, 0);
            prop_assert_eq!(&r.not_estimable, &lost);
            prop_assert_eq!(r.effects.len(), effects.len());
            let scale = effects.iter().map(|e| e.effect.abs()).fold(1.0, f64::max);
            for (a, b) in r.effects.iter().zip(&effects) {
                prop_assert_eq!(a.term, b.term);
                prop_assert!((a.effect - b.effect).abs() <= 1e-9 * scale, "{}: {} vs {}", a.term, a.effect, b.effect);
            }
        }
    }

    #[test]
    fn a_table_with_too_many_empty_cells_estimates_its_lowest_chains() {
        // A 2^12 with 2 400 of its 4 096 runs missing and y = 50 + 3A + 2B + AB exactly (no
        // noise): least squares on any columns holding the true ones recovers them exactly, so
        // A = 6, B = 4, AB = 2 and every other chain tried is 0 (common practice, no source:
        // exact data make the estimate independent of the route).
        let levels = full(12);
        let mut state: u64 = 9;
        let y: Vec<Option<f64>> = levels
            .iter()
            .enumerate()
            .map(|(i, r)| {
                state = state
                    .wrapping_mul(6_364_136_223_846_793_005)
                    .wrapping_add(1);
                let gone = i < 4000 && (state >> 33) % 5 < 3;
                (!gone).then(|| 50.0 + 3.0 * r[0] + 2.0 * r[1] + r[0] * r[1])
            })
            .collect();
        let missing = y.iter().filter(|v| v.is_none()).count();
        assert!(missing > MAX_COMPLETION_CELLS, "{missing}");
        let o = Observations::new(12, levels, vec![], y, vec![]).unwrap();
        let table = estimate_effects(&o).unwrap();
        assert_eq!(table.left_out, 4095 - REDUCED_CHAINS);
        assert_eq!(
            table.effects.len() + table.not_estimable.len(),
            REDUCED_CHAINS
        );
        let t = |s: &str| Term::parse(s, 12).unwrap();
        for e in &table.effects {
            let expect = if e.term == t("A") {
                6.0
            } else if e.term == t("B") {
                4.0
            } else if e.term == t("AB") {
                2.0
            } else {
                0.0
            };
            assert!((e.effect - expect).abs() < 1e-8, "{}: {}", e.term, e.effect);
        }
    }
}
