//! Which chains the complete layout (every planned run, blocks included) can estimate, which
//! the blocks take, and which depend on lower ones.

use super::{DENSE_MAX_ENTRIES, EffectsError, Orthonormal};
use crate::anova::gram::fwht;
use crate::columns::{AliasStructure, term_value};
use crate::data::Observations;
use crate::term::Term;
use std::collections::BTreeSet;

/// The block of each cell of the basis factors over `rows` of a regular layout (`None` for a
/// cell no row is in); `None` when a cell lies in two blocks.
pub(super) fn block_of_cells(
    obs: &Observations,
    aliasing: &AliasStructure,
    rows: &[usize],
) -> Option<Vec<Option<u32>>> {
    let cells = 1usize << aliasing.basis().len();
    let mut block_of: Vec<Option<u32>> = vec![None; cells];
    for &r in rows {
        let c = aliasing.cell_of(&obs.levels()[r]) as usize;
        let b = obs.blocks()[r];
        let slot = block_of.get_mut(c)?;
        match *slot {
            Some(x) if x != b => return None,
            _ => *slot = Some(b),
        }
    }
    Some(block_of)
}

pub(super) struct LayoutClasses {
    /// Chain indices that the complete layout can estimate.
    pub candidates: Vec<usize>,
    /// Chains confounded with blocks.
    pub confounded: Vec<Term>,
    /// Chains whose columns depend on lower ones in the complete layout.
    pub dependent: usize,
}

/// Which chains the complete layout (every planned run, blocks included) can estimate.
pub(super) fn classify_layout(
    obs: &Observations,
    aliasing: &AliasStructure,
    rows: &[usize],
    block_words: Option<&[usize]>,
) -> Result<LayoutClasses, EffectsError> {
    let chains = aliasing.chains();
    let distinct_blocks: BTreeSet<u32> = rows.iter().map(|&r| obs.blocks()[r]).collect();
    if aliasing.is_regular() && distinct_blocks.len() <= 1 {
        // The 2^r characters of a regular layout are linearly independent: all estimable.
        return Ok(LayoutClasses {
            candidates: (0..chains.len()).collect(),
            confounded: Vec::new(),
            dependent: 0,
        });
    }
    if let Some(words) = block_words {
        // Blocks made by confounding: their words' chains go to the blocks, the rest are
        // orthogonal to them and estimable.
        let mut out = LayoutClasses {
            candidates: Vec::new(),
            confounded: Vec::new(),
            dependent: 0,
        };
        for (i, chain) in chains.iter().enumerate() {
            let key = aliasing.chain_key(i).map(|k| k as usize);
            if key.is_some_and(|k| words.binary_search(&k).is_ok()) {
                out.confounded.push(chain.representative);
            } else {
                out.candidates.push(i);
            }
        }
        return Ok(out);
    }
    if let Some(found) = classify_by_block_contrasts(obs, aliasing, rows, &distinct_blocks) {
        return Ok(found);
    }
    if !aliasing.is_regular() && main_effects_orthogonal(obs, rows, &distinct_blocks) {
        // A non-regular screening layout (Plackett & Burman 1946): the main effects are
        // estimated by their own contrasts and every interaction is partially aliased with
        // them, so only the main effects are listed and the remaining degrees of freedom go to
        // the error (the usual analysis of such designs; Montgomery, *Design and Analysis of
        // Experiments*, section on Plackett-Burman designs; from memory).
        let candidates: Vec<usize> = chains
            .iter()
            .enumerate()
            .filter(|(_, c)| c.representative.order() == 1)
            .map(|(i, _)| i)
            .collect();
        return Ok(LayoutClasses {
            dependent: chains.len() - candidates.len(),
            candidates,
            confounded: Vec::new(),
        });
    }
    // Column by column: the basis kept can grow to one vector per distinct run.
    let could_keep = chains.len().min(aliasing.distinct_runs()) + distinct_blocks.len();
    if rows.len().saturating_mul(could_keep) > DENSE_MAX_ENTRIES {
        return Err(EffectsError::TooLarge {
            runs: rows.len(),
            chains: chains.len(),
        });
    }
    Ok(classify_by_columns(obs, aliasing, rows))
}

/// Whether every main-effect column of the layout is balanced within every block and
/// orthogonal to every other.
fn main_effects_orthogonal(obs: &Observations, rows: &[usize], blocks: &BTreeSet<u32>) -> bool {
    let levels = obs.levels();
    let k = obs.factor_count();
    let col = |f: usize| rows.iter().map(move |&r| levels[r][f]);
    let balanced = |f: usize| {
        blocks.iter().all(|b| {
            rows.iter()
                .filter(|&&r| obs.blocks()[r] == *b)
                .map(|&r| levels[r][f])
                .sum::<f64>()
                .abs()
                < 1e-9
        })
    };
    (0..k).all(|a| {
        balanced(a)
            && (a + 1..k).all(|b| col(a).zip(col(b)).map(|(x, y)| x * y).sum::<f64>().abs() < 1e-9)
    })
}

/// The greedy rank check of [`classify_layout`] for a blocked regular layout in which every cell
/// lies in a single block, without columns over the runs.
///
/// Repeated rows do not change which columns depend on which, so the runs can be replaced by the
/// `2^r` cells, where the intercept and the chains are the orthogonal characters `χ_κ` and the
/// block indicators `b_j` are functions of the cell. A combination `Σ a_κ·χ_κ` of chains lies in
/// the span `W` of the intercept and the blocks exactly when `a_κ = ⟨w, χ_κ⟩/2^r` for some `w` in
/// `W`, so the relations among the chains modulo `W` are spanned by the vectors
/// `d_κ = (⟨b_j, χ_κ⟩)_{j ≥ 2}`, i.e. the Walsh–Hadamard transforms of the block indicators. The
/// chains that greedy selection in trade order cannot add are then the greedy choice in reverse
/// order among the `d_κ` (matroid duality, as in `effects_by_completion`). Cost
/// `O(B·2^r·r + 2^r·B²)` for `B` blocks instead of `O(n·2^{2r})`.
///
/// Returns `None` (the caller then checks the columns) when the layout is not regular, a cell
/// appears in two blocks, or the rank found falls short of `B − 1`.
pub(super) fn classify_by_block_contrasts(
    obs: &Observations,
    aliasing: &AliasStructure,
    rows: &[usize],
    distinct_blocks: &BTreeSet<u32>,
) -> Option<LayoutClasses> {
    if !aliasing.is_regular() || !aliasing.is_complete() {
        return None;
    }
    let block_of = block_of_cells(obs, aliasing, rows)?;
    let transforms: Vec<Vec<f64>> = distinct_blocks
        .iter()
        .skip(1)
        .map(|&b| {
            let mut v: Vec<f64> = block_of
                .iter()
                .map(|x| if *x == Some(b) { 1.0 } else { 0.0 })
                .collect();
            fwht(&mut v);
            v
        })
        .collect();
    let chains = aliasing.chains();
    let mut dual = Orthonormal::default();
    let mut dropped = vec![false; chains.len()];
    for i in (0..chains.len()).rev() {
        if dual.rank() == transforms.len() {
            break;
        }
        let kappa = aliasing.chain_key(i)? as usize;
        let col: Vec<f64> = transforms
            .iter()
            .map(|t| t.get(kappa).copied())
            .collect::<Option<_>>()?;
        if dual.try_add(&col) {
            dropped[i] = true;
        }
    }
    if dual.rank() < transforms.len() {
        return None;
    }
    let mut out = LayoutClasses {
        candidates: Vec::new(),
        confounded: Vec::new(),
        dependent: 0,
    };
    for (i, chain) in chains.iter().enumerate() {
        if dropped[i] {
            out.confounded.push(chain.representative);
        } else {
            out.candidates.push(i);
        }
    }
    Some(out)
}

/// [`classify_layout`] by Gram–Schmidt on the columns over every layout run.
pub(super) fn classify_by_columns(
    obs: &Observations,
    aliasing: &AliasStructure,
    rows: &[usize],
) -> LayoutClasses {
    let chains = aliasing.chains();
    let blocks: Vec<u32> = rows.iter().map(|&r| obs.blocks()[r]).collect();
    let distinct_blocks: BTreeSet<u32> = blocks.iter().copied().collect();
    let levels = obs.levels();
    let mut base = Orthonormal::default();
    base.try_add(&vec![1.0; rows.len()]);
    for b in distinct_blocks.iter().skip(1) {
        base.try_add(&indicator(&blocks, *b));
    }
    let mut full = base.clone();
    let max_rank = aliasing.distinct_runs().max(distinct_blocks.len());
    let mut out = LayoutClasses {
        candidates: Vec::new(),
        confounded: Vec::new(),
        dependent: 0,
    };
    for (i, chain) in chains.iter().enumerate() {
        let col: Vec<f64> = rows
            .iter()
            .map(|&r| term_value(&levels[r], chain.representative))
            .collect();
        if distinct_blocks.len() > 1 && base.is_dependent(&col) {
            out.confounded.push(chain.representative);
        } else if full.rank() < max_rank && full.try_add(&col) {
            out.candidates.push(i);
        } else if aliasing.is_regular() {
            // Independent of the blocks alone but not of the blocks and lower chains together:
            // lost through the blocking.
            out.confounded.push(chain.representative);
        } else {
            out.dependent += 1;
        }
    }
    out
}

pub(super) fn indicator(blocks: &[u32], b: u32) -> Vec<f64> {
    blocks
        .iter()
        .map(|&x| if x == b { 1.0 } else { 0.0 })
        .collect()
}
