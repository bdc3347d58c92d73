//! Blocks made by confounding, recognised from the runs: the words whose chains the blocks
//! take.
//!
//! A regular fraction is put in `2^b` blocks by choosing `b` independent words and giving each
//! sign pattern of their columns a block; the blocks then take the chains of every product of
//! those words, `2^b − 1` of them (Montgomery, *Design and Analysis of Experiments*, chapter on
//! blocking and confounding in the 2^k design; from memory). In the cells of the basis factors
//! the indicator of such a block is `(1/2^b)·Σ ±χ_κ` over the words `κ` of that group, so its
//! Walsh–Hadamard transform is non-zero exactly on the group. Conversely, when the transforms of
//! the `B` block indicators are together non-zero on exactly `B` keys, the indicators (which are
//! independent) span the same columns as those keys' characters: the blocks are made by
//! confounding those chains, whether or not the chains are listed. Cost `O(B·N·log N)` for `N`
//! cells.

use super::Observations;
use crate::anova::gram::fwht;
use crate::columns::AliasStructure;
use std::collections::{BTreeSet, HashMap};

/// Most blocks looked at (a block per sign pattern of six words).
const MAX_BLOCKS: usize = 64;

/// The keys (non-zero) of the words the blocks are made from, when `rows` of a regular layout
/// lie in blocks made by confounding; `None` otherwise (a cell in two blocks, a number of blocks
/// that is not a power of two, or blocks that cut across the chains).
pub(super) fn block_words(
    obs: &Observations,
    aliasing: &AliasStructure,
    rows: &[usize],
) -> Option<Vec<usize>> {
    if !aliasing.is_regular() {
        return None;
    }
    let cells = 1usize << aliasing.basis().len();
    let block_of = super::layout::block_of_cells(obs, aliasing, rows)?;
    let blocks: BTreeSet<u32> = block_of.iter().flatten().copied().collect();
    let count = blocks.len();
    if !(2..=MAX_BLOCKS).contains(&count) || !count.is_power_of_two() {
        return None;
    }
    let index: HashMap<u32, usize> = blocks.iter().enumerate().map(|(i, &b)| (b, i)).collect();
    let mut support: BTreeSet<usize> = BTreeSet::new();
    let mut indicator = vec![0.0; cells];
    for i in 0..count {
        for (slot, b) in indicator.iter_mut().zip(&block_of) {
            *slot = if b.and_then(|b| index.get(&b).copied()) == Some(i) {
                1.0
            } else {
                0.0
            };
        }
        fwht(&mut indicator);
        // The transform of a 0/1 vector is integral: anything below a half is zero.
        support.extend(
            indicator
                .iter()
                .enumerate()
                .filter(|(_, v)| v.abs() > 0.5)
                .map(|(k, _)| k),
        );
        if support.len() > count {
            return None;
        }
    }
    (support.len() == count && support.contains(&0))
        .then(|| support.into_iter().filter(|&k| k != 0).collect())
}

#[cfg(test)]
mod tests {
    use super::super::{EffectMethod, estimate_effects};
    use crate::data::Observations;
    use crate::term::Term;
    use crate::test_support::full;

    /// A 2^17 lists its chains only up to four-factor interactions (`MAX_CHAINS`); the data are
    /// exact (y = 50 + 3A + AB, so A = 6 and AB = 2, every other effect 0; common practice, no
    /// source: exact data make the estimate independent of the route). Complete, in two blocks
    /// by the unlisted 17-factor word, and with runs missing, the effects come from the cells.
    #[test]
    fn a_table_too_large_to_list_every_chain_keeps_to_the_cells() {
        let k = 17;
        let levels = full(k);
        let n = levels.len();
        let truth = |r: &Vec<f64>| 50.0 + 3.0 * r[0] + r[0] * r[1];
        let t = |s: &str| Term::parse(s, k).unwrap();
        let check = |table: &super::super::EffectTable| {
            for e in &table.effects {
                let expect = if e.term == t("A") {
                    6.0
                } else if e.term == t("AB") {
                    2.0
                } else {
                    0.0
                };
                assert!((e.effect - expect).abs() < 1e-8, "{}: {}", e.term, e.effect);
            }
        };
        let y: Vec<Option<f64>> = levels.iter().map(|r| Some(truth(r))).collect();
        let o = Observations::new(k, levels.clone(), vec![], y.clone(), vec![]).unwrap();
        let complete = estimate_effects(&o).unwrap();
        assert!(!complete.aliasing.is_complete());
        assert_eq!(complete.method, EffectMethod::FastTransform);
        let listed = complete.aliasing.chains().len();
        assert_eq!(complete.effects.len(), listed);
        assert_eq!(complete.left_out, n - 1 - listed);
        check(&complete);

        let blocks: Vec<u32> = levels
            .iter()
            .map(|r| 1 + u32::from(r.iter().product::<f64>() < 0.0))
            .collect();
        let o = Observations::new(k, levels.clone(), blocks, y.clone(), vec![]).unwrap();
        let blocked = estimate_effects(&o).unwrap();
        assert_eq!(blocked.method, EffectMethod::FastTransform);
        assert!(blocked.confounded_with_blocks.is_empty());
        assert_eq!(blocked.left_out, n - 2 - listed);
        check(&blocked);

        let gaps: Vec<Option<f64>> = y
            .iter()
            .enumerate()
            .map(|(i, v)| if i % 97 == 5 { None } else { *v })
            .collect();
        let o = Observations::new(k, levels, vec![], gaps, vec![]).unwrap();
        let reduced = estimate_effects(&o).unwrap();
        assert_eq!(
            reduced.effects.len() + reduced.not_estimable.len(),
            super::super::REDUCED_CHAINS
        );
        assert_eq!(reduced.left_out, n - 1 - super::super::REDUCED_CHAINS);
        check(&reduced);
    }
}
