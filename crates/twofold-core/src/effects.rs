//! Effects of a two-level design: one estimate per alias chain.
//!
//! # Definitions
//!
//! The effect of a term is the mean response where its column is +1 minus the mean where it is
//! −1; its regression coefficient (on the ±1 coding) is half the effect (Montgomery, *Design and
//! Analysis of Experiments*, chapter on the 2^k design, "effect" and "regression coefficient";
//! from memory). A fraction estimates one effect per alias chain; it is reported under the chain's
//! representative (the lowest term in the order of the trade) with the other members listed.
//!
//! Aliasing comes from the layout, not from the data: [`estimate_effects`] reads the alias chains
//! from the factorial runs of the whole table, missing and excluded runs included
//! ([`AliasStructure`]). Centre points (every factor at 0) never enter the effects; they carry the
//! curvature check of the model fit.
//!
//! # Two routes
//!
//! * **Fast transform** ([`EffectMethod::FastTransform`]): when the layout is a full factorial or a
//!   regular fraction, the design is unblocked, and the runs with a value cover every distinct run
//!   of the layout equally often, the effects are the fast Walsh–Hadamard transform of the cell
//!   means over the independent (basis) factors, scaled by `2/2^r`. This is Yates' algorithm
//!   (Yates 1937, *The Design and Analysis of Factorial Experiments*, Imperial Bureau of Soil
//!   Science; from memory), `N log N` operations.
//! * **Least squares** ([`EffectMethod::LeastSquares`]): otherwise (missing or excluded runs,
//!   unequal replication, blocks). For a regular, unblocked layout the least-squares solution is
//!   found from the cell means by the transform, with missing cells completed so that the chains
//!   that cannot be estimated have zero contrast (see `effects_by_completion`); a property test
//!   checks it against the dense route. Otherwise the used factorial runs are regressed on an
//!   intercept, one
//!   indicator per block but the first, and one column per alias chain, in the order of the
//!   representatives. A chain whose column depends on the columns before it (modified
//!   Gram–Schmidt with re-orthogonalisation, tolerance [`RANK_REL`]) is reported in
//!   [`EffectTable::not_estimable`] instead of being given a number; the kept columns are solved
//!   by Householder QR (nalgebra) and each effect is twice its coefficient. Cost `O(n·p²)` for `n`
//!   runs and `p` chains.
//!
//! On complete data the two routes agree (a property test checks this to 1e-9 relative).

use crate::columns::{AliasStructure, is_factorial_row, term_value};
use crate::data::Observations;
use crate::prec::RANK_REL;
use crate::term::{SignedTerm, Term};
use nalgebra::{DMatrix, DVector};
use std::collections::{BTreeSet, HashMap, HashSet};

mod block_words;
mod greedy_lu;
mod layout;
mod reduced;

pub use reduced::{MAX_COMPLETION_CELLS, REDUCED_CHAINS};

/// Most numbers (8 bytes each) the dense route may hold in its columns: when the runs times the
/// chains it could keep exceed this, only the lowest chains that fit are tried (128 MiB; common
/// practice, no source: a bound well inside the memory of a bench laptop).
pub const DENSE_MAX_ENTRIES: usize = 1 << 24;

/// Default highest order of the chain members listed beside each effect.
pub const DEFAULT_LABEL_ORDER: usize = 4;

/// How the effects were computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum EffectMethod {
    /// Yates' algorithm (fast Walsh–Hadamard transform) on complete, balanced, unblocked data.
    FastTransform,
    /// Least squares on the runs with a value (missing or excluded runs, unequal replication or
    /// blocks), solved through the cell means for a regular unblocked layout and by QR otherwise.
    LeastSquares,
}

/// Options of [`estimate_effects_with`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct EffectOptions {
    /// Highest order of the chain members listed beside each effect (representatives are always
    /// the true lowest member).
    pub max_label_order: usize,
    /// Use the dense least-squares route (QR) even where a transform route applies (for
    /// cross-checks).
    pub force_least_squares: bool,
}

impl Default for EffectOptions {
    fn default() -> Self {
        EffectOptions {
            max_label_order: DEFAULT_LABEL_ORDER,
            force_least_squares: false,
        }
    }
}

/// Why effects cannot be estimated.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum EffectsError {
    /// A run has some factors at 0 and others at ±1 (neither a factorial run nor a centre point).
    #[error(
        "run {run} has some factors at the centre (0) and others at -1 or +1: only full centre points (every factor at 0) can be analysed"
    )]
    PartialCentre {
        /// 1-based run number.
        run: usize,
    },
    /// No run has every factor at ±1.
    #[error("no run has every factor at -1 or +1, so no effect can be estimated")]
    NoFactorialRuns,
    /// Fewer than two factorial runs have a value and are not excluded.
    #[error(
        "only {used} two-level run(s) have a value and are not excluded: at least 2 are needed to estimate an effect"
    )]
    TooFewRuns {
        /// Factorial runs that enter the estimate.
        used: usize,
    },
    /// The least-squares solve failed on columns judged independent (should not happen).
    #[error("the least-squares solve for the effects failed")]
    Solve,
    /// A layout that is neither a regular fraction in blocks made by confounding nor small
    /// enough to sort its chains one column at a time in bounded memory.
    #[error(
        "{runs} runs with {chains} effects to sort is too large a table for blocks or a layout that is not a regular fraction: analyse it without its block column, or in parts"
    )]
    TooLarge {
        /// Runs of the layout.
        runs: usize,
        /// Chains listed.
        chains: usize,
    },
}

/// The estimate for one alias chain.
#[derive(Debug, Clone, PartialEq)]
pub struct Effect {
    /// The chain's representative (lowest member in the order of the trade).
    pub term: Term,
    /// The other members up to the label order, with signs relative to `term`.
    pub aliases: Vec<SignedTerm>,
    /// Mean at + minus mean at − (twice the coefficient).
    pub effect: f64,
    /// Regression coefficient on the ±1 coding (half the effect).
    pub coefficient: f64,
    /// Index of the chain in [`EffectTable::aliasing`]`.chains()`.
    pub chain: usize,
}

impl Effect {
    /// The chain written out, e.g. `AB = -CDE`.
    pub fn label(&self) -> String {
        crate::columns::chain_label(self.term, &self.aliases, false)
    }
}

/// Effects of every estimable chain, and what could not be estimated.
#[derive(Debug, Clone, PartialEq)]
pub struct EffectTable {
    /// Estimable chains, in the order of their representatives.
    pub effects: Vec<Effect>,
    /// Chains of the layout that the runs at hand cannot separate (missing or excluded runs),
    /// in the order of their representatives.
    pub not_estimable: Vec<Term>,
    /// Chains confounded with blocks in the layout.
    pub confounded_with_blocks: Vec<Term>,
    /// For a layout that is not a regular fraction (e.g. runs left out of the plan), the number
    /// of chains whose columns depend on lower ones even in the complete layout (partial
    /// aliasing); they are not listed. Always 0 for a full factorial or regular fraction.
    pub layout_dependent: usize,
    /// How the effects were computed.
    pub method: EffectMethod,
    /// The aliasing of the layout, read from its columns.
    pub aliasing: AliasStructure,
    /// Factorial runs that entered the estimate.
    pub factorial_runs: usize,
    /// Centre points with a value (not used for effects).
    pub centre_runs: usize,
    /// Chains of the layout left out, the highest in the order of the trade, because the runs
    /// at hand leave too many cells empty (or are too many) to separate every chain in bounded
    /// time and memory ([`MAX_COMPLETION_CELLS`], [`DENSE_MAX_ENTRIES`]); 0 normally. They are
    /// not listed.
    pub left_out: usize,
}

impl EffectTable {
    /// The effect whose representative is `term`.
    pub fn get(&self, term: Term) -> Option<&Effect> {
        self.effects.iter().find(|e| e.term == term)
    }

    /// The estimate of any member of a chain, with its sign: for `CDE` in `AB = -CDE` this is
    /// minus the effect of `AB`. `None` when the chain is not estimable or the term is aliased
    /// with the mean.
    pub fn effect_of(&self, term: Term) -> Option<f64> {
        let rep = self.aliasing.representative_of(term)?;
        let e = self.get(rep.term)?;
        Some(rep.sign() * e.effect)
    }

    /// The contrasts (effects) in table order, e.g. for Lenth's method.
    pub fn contrasts(&self) -> Vec<f64> {
        self.effects.iter().map(|e| e.effect).collect()
    }
}

/// Estimates the effects with the default options.
///
/// ```
/// use twofold_core::{data::Observations, effects::estimate_effects, Term};
/// // Box, Hunter & Hunter (2005) pilot-plant 2^3, standard order (values from memory):
/// // temperature effect 23.0, temperature × catalyst 10.0.
/// let levels: Vec<Vec<f64>> = (0..8)
///     .map(|i| (0..3).map(|f| if i >> f & 1 == 1 { 1.0 } else { -1.0 }).collect())
///     .collect();
/// let y = [60.0, 72.0, 54.0, 68.0, 52.0, 83.0, 45.0, 80.0].map(Some).to_vec();
/// let obs = Observations::new(3, levels, vec![], y, vec![]).unwrap();
/// let table = estimate_effects(&obs).unwrap();
/// let a = table.get(Term::parse("A", 3).unwrap()).unwrap();
/// // Tolerance: exact arithmetic on these data, so 1e-12.
/// assert!((a.effect - 23.0).abs() < 1e-12);
/// assert!((table.effect_of(Term::parse("AC", 3).unwrap()).unwrap() - 10.0).abs() < 1e-12);
/// ```
pub fn estimate_effects(obs: &Observations) -> Result<EffectTable, EffectsError> {
    estimate_effects_with(obs, &EffectOptions::default())
}

/// Estimates one effect per alias chain of the layout (see the module documentation).
pub fn estimate_effects_with(
    obs: &Observations,
    options: &EffectOptions,
) -> Result<EffectTable, EffectsError> {
    let k = obs.factor_count();
    let levels = obs.levels();
    let mut layout_rows = Vec::new();
    for (r, row) in levels.iter().enumerate() {
        if is_factorial_row(row) {
            layout_rows.push(r);
        } else if !obs.is_centre(r) {
            return Err(EffectsError::PartialCentre { run: r + 1 });
        }
    }
    if layout_rows.is_empty() {
        return Err(EffectsError::NoFactorialRuns);
    }
    let aliasing = AliasStructure::from_levels(levels, k, options.max_label_order);
    let used_all = obs.used_runs();
    let used: Vec<usize> = used_all
        .iter()
        .copied()
        .filter(|&r| is_factorial_row(&levels[r]))
        .collect();
    let centre_runs = used_all.len() - used.len();
    if used.len() < 2 {
        return Err(EffectsError::TooFewRuns { used: used.len() });
    }

    let layout_blocks: BTreeSet<u32> = layout_rows.iter().map(|&r| obs.blocks()[r]).collect();
    let words = if layout_blocks.len() > 1 {
        block_words::block_words(obs, &aliasing, &layout_rows)
    } else {
        None
    };
    let layout = layout::classify_layout(obs, &aliasing, &layout_rows, words.as_deref())?;
    let y: Vec<f64> = used
        .iter()
        .map(|&r| obs.response()[r].unwrap_or(0.0))
        .collect();

    let mut table = EffectTable {
        effects: Vec::new(),
        not_estimable: Vec::new(),
        confounded_with_blocks: layout.confounded,
        layout_dependent: layout.dependent,
        method: EffectMethod::LeastSquares,
        aliasing,
        factorial_runs: used.len(),
        centre_runs,
        left_out: 0,
    };
    // Blocks made by confounding span the columns of their words, so the cells serve.
    let blocks_ok = layout_blocks.len() <= 1 || words.is_some();
    let cells = if options.force_least_squares || !blocks_ok {
        None
    } else {
        cell_means(obs, &table.aliasing, &used)
    };
    let fixed_keys: Vec<usize> = words.unwrap_or_default();
    let fixed = fixed_keys.len();
    // A layout of more than `MAX_CHAINS` chains lists only its lower ones; the rest are left
    // out whatever the route.
    let listed_all = table.aliasing.is_complete();
    // Chains beyond the listed ones (none when every chain is listed).
    let unlisted = cells.as_ref().map_or(0, |c| {
        c.means
            .len()
            .saturating_sub(1 + fixed + layout.candidates.len())
    });
    let by_cells = match &cells {
        Some(c)
            if c.balanced
                && (!listed_all || layout.candidates.len() + fixed + 1 == c.means.len()) =>
        {
            table.left_out = unlisted;
            table.method = EffectMethod::FastTransform;
            let means: Vec<f64> = c.means.iter().map(|m| m.unwrap_or(0.0)).collect();
            Some((
                effects_by_transform(&table.aliasing, &means, &layout.candidates),
                Vec::new(),
            ))
        }
        Some(c)
            if !listed_all
                || c.means.iter().filter(|m| m.is_none()).count() > MAX_COMPLETION_CELLS =>
        {
            reduced::lowest_chains(
                &table.aliasing,
                &c.counts,
                &c.sums,
                &layout.candidates,
                &fixed_keys,
            )
            .map(|r| {
                table.left_out = r.left_out + unlisted;
                (r.effects, r.not_estimable)
            })
        }
        Some(c) => effects_by_completion(
            &table.aliasing,
            &c.means,
            &layout.candidates,
            fixed,
            used.len(),
        ),
        None => None,
    };
    let (effects, lost) = match by_cells {
        Some(found) => found,
        None => {
            // Columns the dense route could keep: at most one per distinct run.
            let n = used.len();
            let room = (DENSE_MAX_ENTRIES / n.max(1)).max(1);
            let could_keep = layout.candidates.len().min(n);
            let tried = if could_keep > room {
                &layout.candidates[..room.min(REDUCED_CHAINS).min(layout.candidates.len())]
            } else {
                &layout.candidates[..]
            };
            table.left_out = layout.candidates.len() - tried.len();
            effects_by_least_squares(obs, &table.aliasing, &used, &y, tried)?
        }
    };
    table.effects = effects;
    table.not_estimable = lost;
    Ok(table)
}

/// Means of the used runs in each cell of the basis factors.
struct CellMeans {
    /// One entry per cell (`None` = no used run there).
    means: Vec<Option<f64>>,
    /// Response sums of the used runs in each cell.
    sums: Vec<f64>,
    /// Used runs in each cell.
    counts: Vec<f64>,
    /// Every cell present, equally often.
    balanced: bool,
}

/// Cell means when the layout is a regular fraction; `None` otherwise. Blocks are the caller's
/// to check (`block_words`).
fn cell_means(obs: &Observations, aliasing: &AliasStructure, used: &[usize]) -> Option<CellMeans> {
    if !aliasing.is_regular() {
        return None;
    }
    let cells = 1usize << aliasing.basis().len();
    let mut sums = vec![0.0; cells];
    let mut counts = vec![0usize; cells];
    for &r in used {
        let c = aliasing.cell_of(&obs.levels()[r]) as usize;
        sums[c] += obs.response()[r]?;
        counts[c] += 1;
    }
    let balanced = counts.iter().all(|&c| c == counts[0] && c > 0);
    let means = sums
        .iter()
        .zip(&counts)
        .map(|(s, &c)| (c > 0).then(|| s / c as f64))
        .collect();
    let counts = counts.into_iter().map(|c| c as f64).collect();
    Some(CellMeans {
        means,
        sums,
        counts,
        balanced,
    })
}

/// `χ_κ(x) = (−1)^{|κ ∧ x|}`: the column of the chain with key `κ` in cell `x`, up to the
/// representative's sign.
fn character(kappa: usize, x: usize) -> f64 {
    if (kappa & x).count_ones().is_multiple_of(2) {
        1.0
    } else {
        -1.0
    }
}

/// Least squares for a regular layout from its cell means, without a dense solve.
///
/// The intercept and all `2^r − 1` chains form the Hadamard matrix `H` of the cells, so the fit is
/// saturated in the cells present: fitted values are the cell means whatever the replication.
/// With cells `M` missing, the chains left out are those that greedy selection in trade order
/// cannot add; by matroid duality they are the greedy choice in *reverse* order among the columns
/// of `H` restricted to the rows `M`, which span the null space (Oxley, *Matroid Theory*, 1992,
/// duality of representable matroids and the greedy algorithm; from memory). Setting the missing
/// cell values so that those chains' contrasts vanish (the classical missing-value estimate,
/// Draper & Stoneman 1964, Biometrics 20; from memory) and transforming the completed means gives
/// exactly the least-squares estimates of the rest. The system has one unknown per missing cell,
/// whatever the number of chains (the idea of Healy & Westmacott 1956, *Applied Statistics* 5,
/// of estimating the missing values and analysing the completed table; here solved directly
/// rather than iterated). Choice and system come from one blocked LU factorisation
/// ([`greedy_lu`]), cost `O(2^r·r + |M|³)`.
///
/// Blocks whose runs are the cells on which some chains (`fixed`, those confounded with blocks)
/// take given signs span the same columns as those chains, so a blocked layout is the same
/// saturated fit with the `fixed` chains never left out and not reported: the caller checks that
/// the blocks are of that kind (`block_words`).
///
/// Returns `None` (the caller then uses the dense route) when the candidates and the fixed chains
/// are not every chain, or the missing cells leave a fixed chain inestimable.
fn effects_by_completion(
    aliasing: &AliasStructure,
    means: &[Option<f64>],
    candidates: &[usize],
    fixed: usize,
    used_runs: usize,
) -> Option<(Vec<Effect>, Vec<Term>)> {
    if candidates.len() + fixed + 1 != means.len() {
        return None;
    }
    let missing: Vec<usize> = (0..means.len()).filter(|&c| means[c].is_none()).collect();
    if missing.len() > used_runs {
        // The completion costs about |M|³, the dense route on the used runs about n³: with
        // most cells empty the dense route is the cheaper one.
        return None;
    }
    let mut z: Vec<f64> = means.iter().map(|m| m.unwrap_or(0.0)).collect();
    let mut dropped: Vec<usize> = Vec::new();
    if !missing.is_empty() {
        let d = missing.len();
        let order: Vec<usize> = candidates
            .iter()
            .rev()
            .map(|&i| aliasing.chain_key(i).map(|k| k as usize))
            .collect::<Option<_>>()?;
        let lu = greedy_lu::GreedyLu::select(d, order.len(), |j, out| {
            for (slot, &m) in out.iter_mut().zip(&missing) {
                *slot = character(order[j], m);
            }
        });
        if lu.kept().len() < d {
            return None;
        }
        let mut g = z.clone();
        fwht(&mut g);
        let rhs: Vec<f64> = lu.kept().iter().map(|&j| -g[order[j]]).collect();
        let fill = lu.solve_transposed(&rhs)?;
        for (&m, v) in missing.iter().zip(fill) {
            z[m] = v;
        }
        dropped = lu
            .kept()
            .iter()
            .map(|&j| candidates[candidates.len() - 1 - j])
            .collect();
    }
    let kept: Vec<usize> = if dropped.is_empty() {
        candidates.to_vec()
    } else {
        let gone: HashSet<usize> = dropped.iter().copied().collect();
        candidates
            .iter()
            .copied()
            .filter(|i| !gone.contains(i))
            .collect()
    };
    let mut lost: Vec<usize> = dropped;
    lost.sort_unstable();
    let lost = lost
        .into_iter()
        .map(|i| aliasing.chains()[i].representative)
        .collect();
    Some((effects_by_transform(aliasing, &z, &kept), lost))
}

use crate::anova::gram::fwht;

fn effects_by_transform(
    aliasing: &AliasStructure,
    cells: &[f64],
    candidates: &[usize],
) -> Vec<Effect> {
    // Cell index bit j is set when basis factor j is at −1, so (−1)^{|x ∧ κ|} is the product of
    // the basis levels in κ: the transform is the contrast of the chain with key κ.
    let mut v = cells.to_vec();
    fwht(&mut v);
    let scale = 2.0 / cells.len() as f64;
    candidates
        .iter()
        .filter_map(|&i| {
            let bits = aliasing.chain_key(i)? as usize;
            Some(chain_effect(aliasing, i, v.get(bits)? * scale / 2.0))
        })
        .collect()
}

/// The effect of chain `i` from the coefficient of its character `χ_κ` (the representative's
/// column is `±χ_κ`, its sign read from the key).
fn chain_effect(aliasing: &AliasStructure, i: usize, character_coefficient: f64) -> Effect {
    let chain = &aliasing.chains()[i];
    let sign = if aliasing.key_of(chain.representative).negative {
        -1.0
    } else {
        1.0
    };
    let coefficient = sign * character_coefficient;
    Effect {
        term: chain.representative,
        aliases: chain.aliases.clone(),
        effect: 2.0 * coefficient,
        coefficient,
        chain: i,
    }
}

fn effects_by_least_squares(
    obs: &Observations,
    aliasing: &AliasStructure,
    used: &[usize],
    y: &[f64],
    candidates: &[usize],
) -> Result<(Vec<Effect>, Vec<Term>), EffectsError> {
    let levels = obs.levels();
    let n = used.len();
    let blocks: Vec<u32> = used.iter().map(|&r| obs.blocks()[r]).collect();
    let distinct: BTreeSet<u32> = blocks.iter().copied().collect();
    let mut columns: Vec<Vec<f64>> = vec![vec![1.0; n]];
    for b in distinct.iter().skip(1) {
        columns.push(layout::indicator(&blocks, *b));
    }
    let mut basis = Orthonormal::default();
    for c in &columns {
        basis.try_add(c);
    }
    let fixed = columns.len();
    // Equal rows (same settings, same block) give equal rows of the model matrix, so its rank is
    // at most the number of distinct ones: once reached, every later chain depends on the kept
    // ones and needs no column.
    let max_rank = distinct_rows(levels, &blocks, used);
    let mut kept = Vec::new();
    let mut lost = Vec::new();
    for &i in candidates {
        let rep = aliasing.chains()[i].representative;
        if basis.rank() >= max_rank {
            lost.push(rep);
            continue;
        }
        let col: Vec<f64> = used.iter().map(|&r| term_value(&levels[r], rep)).collect();
        if basis.try_add(&col) {
            columns.push(col);
            kept.push(i);
        } else {
            lost.push(rep);
        }
    }
    let p = columns.len();
    let x = DMatrix::from_fn(n, p, |r, c| columns[c][r]);
    let yv = DVector::from_column_slice(y);
    let qr = x.qr();
    let qty = qr.q().transpose() * yv;
    let beta = qr
        .r()
        .solve_upper_triangular(&qty)
        .ok_or(EffectsError::Solve)?;
    let effects = kept
        .iter()
        .enumerate()
        .map(|(j, &i)| {
            let chain = &aliasing.chains()[i];
            let coefficient = beta[fixed + j];
            Effect {
                term: chain.representative,
                aliases: chain.aliases.clone(),
                effect: 2.0 * coefficient,
                coefficient,
                chain: i,
            }
        })
        .collect();
    Ok((effects, lost))
}

/// Number of distinct (settings, block) pairs among the rows `used` (`blocks` follows `used`).
fn distinct_rows(levels: &[Vec<f64>], blocks: &[u32], used: &[usize]) -> usize {
    used.iter()
        .zip(blocks)
        .map(|(&r, &b)| {
            let signs = levels[r]
                .iter()
                .enumerate()
                .filter(|(_, v)| **v < 0.0)
                .fold(0u64, |acc, (f, _)| acc | 1 << f);
            (signs, b)
        })
        .collect::<HashSet<(u64, u32)>>()
        .len()
}

/// An orthonormal basis grown one column at a time (modified Gram–Schmidt, applied twice so the
/// residual of a dependent column is at rounding level; Björck 1996, *Numerical Methods for Least
/// Squares Problems*, §2.4, from memory). The inner products and updates go through nalgebra's
/// vector kernels, which matters for designs of several hundred runs.
#[derive(Debug, Clone, Default)]
struct Orthonormal {
    q: Vec<DVector<f64>>,
}

impl Orthonormal {
    fn rank(&self) -> usize {
        self.q.len()
    }

    /// The part of `c` orthogonal to the basis, its norm, and the norm of `c`.
    fn residual(&self, c: &[f64]) -> (DVector<f64>, f64, f64) {
        let mut v = DVector::from_column_slice(c);
        let norm0 = v.norm();
        for _ in 0..2 {
            for q in &self.q {
                let d = q.dot(&v);
                v.axpy(-d, q, 1.0);
            }
        }
        let nv = v.norm();
        (v, nv, norm0)
    }

    /// Whether `c` lies in the span (residual at most [`RANK_REL`] of its norm).
    fn is_dependent(&self, c: &[f64]) -> bool {
        let (_, nv, n0) = self.residual(c);
        nv <= RANK_REL * n0
    }

    /// Adds `c` when it is independent of the basis; returns whether it was added.
    fn try_add(&mut self, c: &[f64]) -> bool {
        let (v, nv, n0) = self.residual(c);
        if n0 == 0.0 || nv <= RANK_REL * n0 {
            return false;
        }
        self.q.push(v / nv);
        true
    }
}

/// Effects of every term of an unreplicated `2^k` full factorial from its responses in standard
/// (Yates) order, first factor changing fastest; `None` unless the length is a power of two
/// (at least 2). A plain form of the fast route for callers without an [`Observations`].
///
/// # Formula
/// `effect(T) = (2/N)·Σ_x y_x·Π_{f∈T} x_f`, computed by Yates' algorithm in `N log N`.
pub fn yates_effects(y_standard_order: &[f64]) -> Option<HashMap<Term, f64>> {
    let n = y_standard_order.len();
    if n < 2 || !n.is_power_of_two() {
        return None;
    }
    // In standard order run index bit f is set when factor f is at +1; the transform wants bit
    // set = −1, so reverse the runs (index ↦ N−1−index flips every bit).
    let mut v: Vec<f64> = y_standard_order.iter().rev().copied().collect();
    fwht(&mut v);
    let scale = 2.0 / n as f64;
    Some(
        (1..n)
            .map(|bits| (Term::from_bits(bits as u32), v[bits] * scale))
            .collect(),
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::prec::close_rel;
    use crate::test_support::full;
    use proptest::prelude::*;

    fn t(s: &str) -> Term {
        Term::parse(s, 25).unwrap()
    }

    /// Filtration rate (Montgomery, Example 6-2; published effects in REFERENCES).
    const FILTRATION: [f64; 16] = [
        45.0, 71.0, 48.0, 65.0, 68.0, 60.0, 80.0, 65.0, 43.0, 100.0, 45.0, 104.0, 75.0, 86.0, 70.0,
        96.0,
    ];

    fn obs(levels: Vec<Vec<f64>>, y: Vec<Option<f64>>) -> Observations {
        let k = levels[0].len();
        Observations::new(k, levels, vec![], y, vec![]).unwrap()
    }

    #[test]
    fn filtration_effects_by_transform() {
        let o = obs(full(4), FILTRATION.iter().map(|&v| Some(v)).collect());
        let table = estimate_effects(&o).unwrap();
        assert_eq!(table.method, EffectMethod::FastTransform);
        assert_eq!(table.effects.len(), 15);
        // Published to three decimals: tolerance half a unit in the last place.
        for (label, value) in [
            ("A", 21.625),
            ("AC", -18.125),
            ("AD", 16.625),
            ("ABCD", 1.375),
        ] {
            let e = table.get(t(label)).unwrap();
            assert!(crate::prec::close_to_places(e.effect, value, 3), "{label}");
            assert!((e.coefficient - value / 2.0).abs() < 1e-12);
        }
        let yates = yates_effects(&FILTRATION).unwrap();
        for e in &table.effects {
            assert!(close_rel(yates[&e.term], e.effect, 1e-12), "{}", e.term);
        }
    }

    #[test]
    fn missing_run_in_saturated_design_loses_the_highest_chain() {
        let mut y: Vec<Option<f64>> = FILTRATION.iter().map(|&v| Some(v)).collect();
        y[5] = None;
        let table = estimate_effects(&obs(full(4), y)).unwrap();
        assert_eq!(table.method, EffectMethod::LeastSquares);
        assert_eq!(table.not_estimable, vec![t("ABCD")]);
        assert_eq!(table.effects.len(), 14);
    }

    #[test]
    fn centre_points_do_not_change_effects() {
        let mut levels = full(2);
        levels.push(vec![0.0, 0.0]);
        levels.push(vec![0.0, 0.0]);
        // Montgomery, Example 6-6 corners and two of its centres: A effect (40.9+41.5−39.3−40.0)/2.
        let y = vec![
            Some(39.3),
            Some(40.9),
            Some(40.0),
            Some(41.5),
            Some(40.3),
            Some(40.5),
        ];
        let table = estimate_effects(&obs(levels, y)).unwrap();
        assert_eq!(table.centre_runs, 2);
        assert_eq!(table.factorial_runs, 4);
        assert!(close_rel(table.get(t("A")).unwrap().effect, 1.55, 1e-12));
    }

    #[test]
    fn blocks_confound_their_chain() {
        // 2^3 in two blocks by ABC (Montgomery, blocking table: k = 3, 2 blocks, ABC).
        let levels = full(3);
        let blocks: Vec<u32> = levels
            .iter()
            .map(|r| if r[0] * r[1] * r[2] > 0.0 { 2 } else { 1 })
            .collect();
        let y: Vec<f64> = (0..8).map(|i| (i * i) as f64 + 0.5 * i as f64).collect();
        // A block shift of +10 must not move the other effects.
        let shifted: Vec<Option<f64>> = y
            .iter()
            .zip(&blocks)
            .map(|(v, b)| Some(v + if *b == 2 { 10.0 } else { 0.0 }))
            .collect();
        let o = Observations::new(3, levels.clone(), blocks, shifted, vec![]).unwrap();
        let table = estimate_effects(&o).unwrap();
        assert_eq!(table.confounded_with_blocks, vec![t("ABC")]);
        assert_eq!(table.effects.len(), 6);
        // Complete, balanced, and blocked by confounding: the transform serves.
        assert_eq!(table.method, EffectMethod::FastTransform);
        let unblocked = estimate_effects(&obs(levels, y.into_iter().map(Some).collect())).unwrap();
        assert_eq!(unblocked.effects.len(), 7);
        for e in &table.effects {
            assert!(close_rel(
                e.effect,
                unblocked.get(e.term).unwrap().effect,
                1e-9
            ));
        }
    }

    #[test]
    fn bad_tables_are_refused() {
        let o = obs(
            vec![vec![1.0, 0.0], vec![-1.0, -1.0]],
            vec![Some(1.0), Some(2.0)],
        );
        assert_eq!(
            estimate_effects(&o).unwrap_err(),
            EffectsError::PartialCentre { run: 1 }
        );
        let o = obs(vec![vec![0.0, 0.0]], vec![Some(1.0)]);
        assert_eq!(
            estimate_effects(&o).unwrap_err(),
            EffectsError::NoFactorialRuns
        );
        let o = obs(full(2), vec![Some(1.0), None, None, None]);
        assert_eq!(
            estimate_effects(&o).unwrap_err(),
            EffectsError::TooFewRuns { used: 1 }
        );
    }

    #[test]
    fn alias_member_effect_carries_its_sign() {
        // 2^(3-1), C = −AB: the effect of AB is minus that of C.
        let levels: Vec<Vec<f64>> = full(2)
            .into_iter()
            .map(|mut r| {
                let c = -r[0] * r[1];
                r.push(c);
                r
            })
            .collect();
        let table = estimate_effects(&obs(
            levels,
            vec![Some(1.0), Some(4.0), Some(2.0), Some(9.0)],
        ))
        .unwrap();
        let c = table.get(t("C")).unwrap().effect;
        assert_eq!(table.effect_of(t("AB")), Some(-c));
        assert_eq!(table.effect_of(t("ABC")), None);
    }

    #[test]
    fn layout_that_is_not_a_regular_fraction_counts_its_partial_aliasing() {
        // Seven of the eight runs of a 2^3 typed in as the plan: six chains plus the mean use the
        // seven runs; ABC depends on them.
        let levels: Vec<Vec<f64>> = full(3).into_iter().skip(1).collect();
        let y: Vec<Option<f64>> = (0..7)
            .map(|i| Some(3.0 + i as f64 * (i % 3) as f64))
            .collect();
        let table = estimate_effects(&obs(levels, y)).unwrap();
        assert!(!table.aliasing.is_regular());
        assert_eq!(table.layout_dependent, 1);
        assert!(table.not_estimable.is_empty());
        assert_eq!(table.effects.len(), 6);
        assert!(table.get(t("ABC")).is_none());
    }

    #[test]
    fn sixteen_factor_fraction_agrees_between_routes() {
        // 2^(16-11) in 32 runs: beyond the full enumeration of terms.
        let gens: Vec<(u32, bool)> = [3, 5, 9, 17, 6, 10, 18, 12, 20, 24, 31]
            .iter()
            .enumerate()
            .map(|(i, &m)| (m, i % 4 == 1))
            .collect();
        let levels = fraction_rows(5, &gens);
        let y: Vec<Option<f64>> = (0..32)
            .map(|i| Some(((i * 37) % 11) as f64 - 0.25 * i as f64))
            .collect();
        let o = obs(levels, y);
        let fast = estimate_effects(&o).unwrap();
        assert_eq!(fast.method, EffectMethod::FastTransform);
        assert_eq!(fast.effects.len(), 31);
        let ls = estimate_effects_with(
            &o,
            &EffectOptions {
                force_least_squares: true,
                ..Default::default()
            },
        )
        .unwrap();
        for (a, b) in fast.effects.iter().zip(&ls.effects) {
            assert_eq!(a.term, b.term);
            assert!(close_rel(a.effect, b.effect, 1e-9), "{}", a.term);
        }
    }

    #[test]
    fn nearly_empty_large_layout_keeps_only_what_its_runs_can_separate() {
        // A 2^6 with values in runs 1, 2 and 3 only (standard order): (−,−,…), (+,−,…), (−,+,…).
        // Three runs fit the mean and two chains, so 2 of the 63 chains are estimable. In trade
        // order A is independent of the intercept, and B of both (A + B = (−2, 0, 0) is not
        // constant), so A and B are kept. From m − a − b = y1, m + a − b = y2, m − a + b = y3:
        // effect A = 2a = y2 − y1 and effect B = 2b = y3 − y1.
        let mut y = vec![None; 64];
        y[0] = Some(10.0);
        y[1] = Some(13.5);
        y[2] = Some(7.25);
        let o = obs(full(6), y);
        let table = estimate_effects(&o).unwrap();
        assert_eq!(table.method, EffectMethod::LeastSquares);
        assert_eq!(table.factorial_runs, 3);
        let kept: Vec<Term> = table.effects.iter().map(|e| e.term).collect();
        assert_eq!(kept, vec![t("A"), t("B")]);
        assert_eq!(table.not_estimable.len(), 61);
        assert!(!table.not_estimable.contains(&t("A")));
        assert!(!table.not_estimable.contains(&t("B")));
        assert!(close_rel(table.get(t("A")).unwrap().effect, 3.5, 1e-12));
        assert!(close_rel(table.get(t("B")).unwrap().effect, -2.75, 1e-12));
        // Second route: completing the 61 empty cells, which the default route now skips.
        let used = o.used_runs();
        let cells = cell_means(&o, &table.aliasing, &used).unwrap();
        let all: Vec<usize> = (0..63).collect();
        let (effects, lost) =
            effects_by_completion(&table.aliasing, &cells.means, &all, 0, usize::MAX).unwrap();
        assert_eq!(lost, table.not_estimable);
        assert_eq!(effects.len(), 2);
        for (a, b) in effects.iter().zip(&table.effects) {
            assert_eq!(a.term, b.term);
            assert!(close_rel(a.effect, b.effect, 1e-9), "{}", a.term);
        }
    }

    #[test]
    fn block_contrasts_classify_like_the_columns() {
        let layouts: Vec<(Vec<Vec<f64>>, Vec<u32>)> = {
            // 2^5 in four blocks by ABC and CDE (confounds ABC, CDE and ABDE).
            let l5 = full(5);
            let b5 = l5
                .iter()
                .map(|r| {
                    1 + u32::from(r[0] * r[1] * r[2] > 0.0)
                        + 2 * u32::from(r[2] * r[3] * r[4] > 0.0)
                })
                .collect();
            // 2^4 with an arbitrary partition into three blocks (not a regular blocking).
            let l4 = full(4);
            let b4 = (0..16u32).map(|i| 1 + (i * 7 + i / 5) % 3).collect();
            // 2^3 replicated, each replicate of a cell in the same block as the cell.
            let mut l3 = full(3);
            l3.extend(full(3));
            let b3 = (0..16u32).map(|i| 1 + u32::from((i % 8) > 4)).collect();
            vec![(l5, b5), (l4, b4), (l3, b3)]
        };
        for (levels, blocks) in layouts {
            let k = levels[0].len();
            let n = levels.len();
            let y = (0..n).map(|i| Some(i as f64)).collect();
            let o = Observations::new(k, levels, blocks, y, vec![]).unwrap();
            let aliasing = AliasStructure::from_levels(o.levels(), k, 4);
            let rows: Vec<usize> = (0..n).collect();
            let distinct: BTreeSet<u32> = o.blocks().iter().copied().collect();
            let fast =
                layout::classify_by_block_contrasts(&o, &aliasing, &rows, &distinct).unwrap();
            let slow = layout::classify_by_columns(&o, &aliasing, &rows);
            assert_eq!(fast.candidates, slow.candidates, "k = {k}");
            assert_eq!(fast.confounded, slow.confounded, "k = {k}");
            assert_eq!(fast.dependent, slow.dependent, "k = {k}");
            assert_eq!(fast.confounded.len(), distinct.len() - 1, "k = {k}");
        }
        // A cell in two blocks is left to the columns.
        let mut levels = full(2);
        levels.push(levels[0].clone());
        let o =
            Observations::new(2, levels, vec![1, 1, 2, 2, 2], vec![Some(1.0); 5], vec![]).unwrap();
        let aliasing = AliasStructure::from_levels(o.levels(), 2, 4);
        let distinct: BTreeSet<u32> = [1, 2].into_iter().collect();
        assert!(
            layout::classify_by_block_contrasts(&o, &aliasing, &[0, 1, 2, 3, 4], &distinct)
                .is_none()
        );
    }

    /// A regular fraction: base full factorial plus generated columns (nonzero base masks, signs).
    fn fraction_rows(base: usize, gens: &[(u32, bool)]) -> Vec<Vec<f64>> {
        full(base)
            .into_iter()
            .map(|mut row| {
                let extra: Vec<f64> = gens
                    .iter()
                    .map(|&(mask, neg)| {
                        let v = term_value(&row, Term::from_bits(mask));
                        if neg { -v } else { v }
                    })
                    .collect();
                row.extend(extra);
                row
            })
            .collect()
    }

    /// `reps` replicates of the fraction of `base` factors with generator words `gens` (a base
    /// column mask, the sign), masks cut to the base factors and empty words dropped.
    fn replicated_fraction(base: usize, gens: Vec<(u32, bool)>, reps: usize) -> Vec<Vec<f64>> {
        let gens: Vec<(u32, bool)> = gens
            .into_iter()
            .map(|(m, s)| (m & ((1 << base) - 1), s))
            .filter(|(m, _)| *m != 0)
            .collect();
        let rows = fraction_rows(base, &gens);
        let n = rows.len() * reps;
        rows.into_iter().cycle().take(n).collect()
    }

    proptest! {
        /// Two implementations that must agree: Yates' transform and least squares, on complete
        /// (possibly replicated, possibly fractional) data, to 1e-9 relative.
        #[test]
        fn transform_and_least_squares_agree(
            base in 2usize..=5,
            gens in proptest::collection::vec((1u32..32, any::<bool>()), 0..3),
            reps in 1usize..=2,
            seed in proptest::collection::vec(-100.0f64..100.0, 64),
            shuffle in any::<u64>(),
        ) {
            let levels = replicated_fraction(base, gens, reps);
            // A fixed permutation so run order does not matter.
            let n = levels.len();
            // n is a power of two, so any odd step visits every run once.
            let step = (shuffle as usize % n) | 1;
            let permuted: Vec<Vec<f64>> = (0..n).map(|i| levels[(i * step) % n].clone()).collect();
            let y: Vec<Option<f64>> = (0..n).map(|i| Some(seed[i % 64] + i as f64 * 0.01)).collect();
            let o = obs(permuted, y);
            let fast = estimate_effects(&o).unwrap();
            prop_assert_eq!(fast.method, EffectMethod::FastTransform);
            let ls = estimate_effects_with(&o, &EffectOptions { force_least_squares: true, ..Default::default() }).unwrap();
            prop_assert_eq!(ls.method, EffectMethod::LeastSquares);
            prop_assert!(ls.not_estimable.is_empty());
            prop_assert_eq!(fast.effects.len(), ls.effects.len());
            let scale = fast.effects.iter().map(|e| e.effect.abs()).fold(1.0, f64::max);
            for (a, b) in fast.effects.iter().zip(&ls.effects) {
                prop_assert_eq!(a.term, b.term);
                prop_assert!((a.effect - b.effect).abs() <= 1e-9 * scale, "{}: {} vs {}", a.term, a.effect, b.effect);
            }
        }
    }

    proptest! {
        /// Two implementations that must agree: least squares through completed cell means and
        /// the dense QR route, with runs missing at random (whole cells included), to 1e-9
        /// relative; the same chains must be reported as not estimable.
        #[test]
        fn completion_and_dense_least_squares_agree(
            base in 2usize..=5,
            gens in proptest::collection::vec((1u32..32, any::<bool>()), 0..3),
            reps in 1usize..=2,
            seed in proptest::collection::vec(-100.0f64..100.0, 64),
            drop in proptest::collection::vec(proptest::bool::weighted(0.25), 64),
        ) {
            let levels = replicated_fraction(base, gens, reps);
            let n = levels.len();
            let y: Vec<Option<f64>> = (0..n)
                .map(|i| (!drop[i % 64] || i >= 64).then(|| seed[i % 64] + i as f64 * 0.01))
                .collect();
            prop_assume!(y.iter().filter(|v| v.is_some()).count() >= 2);
            let o = obs(levels, y);
            let fast = estimate_effects(&o).unwrap();
            let dense = estimate_effects_with(&o, &EffectOptions { force_least_squares: true, ..Default::default() }).unwrap();
            prop_assert_eq!(&fast.not_estimable, &dense.not_estimable);
            prop_assert_eq!(fast.effects.len(), dense.effects.len());
            let scale = dense.effects.iter().map(|e| e.effect.abs()).fold(1.0, f64::max);
            for (a, b) in fast.effects.iter().zip(&dense.effects) {
                prop_assert_eq!(a.term, b.term);
                prop_assert!((a.effect - b.effect).abs() <= 1e-9 * scale, "{}: {} vs {}", a.term, a.effect, b.effect);
            }
        }
    }

    proptest! {
        /// Two implementations that must agree: the completion with blocks made by confounding
        /// (one or two block words, their product confounded too) and the dense QR route with one
        /// indicator per block, with runs missing at random, to 1e-9 relative; the same chains
        /// must be confounded and the same reported as not estimable.
        #[test]
        fn blocked_completion_and_dense_least_squares_agree(
            base in 3usize..=6,
            words in proptest::collection::vec(1u32..64, 1..=2),
            reps in 1usize..=2,
            seed in proptest::collection::vec(-100.0f64..100.0, 64),
            drop in proptest::collection::vec(proptest::bool::weighted(0.2), 128),
        ) {
            let levels = replicated_fraction(base, vec![], reps);
            let words: Vec<u32> = words.into_iter().map(|w| w & ((1 << base) - 1)).collect();
            prop_assume!(words.iter().all(|&w| w != 0));
            prop_assume!(words.len() < 2 || (words[0] != words[1]));
            let blocks: Vec<u32> = levels
                .iter()
                .map(|row| {
                    words.iter().enumerate().fold(1u32, |acc, (i, &w)| {
                        acc + u32::from(term_value(row, Term::from_bits(w)) < 0.0) * (1 << i)
                    })
                })
                .collect();
            let n = levels.len();
            let y: Vec<Option<f64>> = (0..n)
                .map(|i| (!drop[i % 128]).then(|| seed[i % 64] + (i * i % 17) as f64 + 3.0 * f64::from(blocks[i])))
                .collect();
            prop_assume!(y.iter().filter(|v| v.is_some()).count() >= 2);
            let o = Observations::new(base, levels, blocks, y, vec![]).unwrap();
            let fast = estimate_effects(&o).unwrap();
            let dense = estimate_effects_with(&o, &EffectOptions { force_least_squares: true, ..Default::default() }).unwrap();
            prop_assert_eq!(&fast.confounded_with_blocks, &dense.confounded_with_blocks);
            prop_assert_eq!(&fast.not_estimable, &dense.not_estimable);
            prop_assert_eq!(fast.effects.len(), dense.effects.len());
            let scale = dense.effects.iter().map(|e| e.effect.abs()).fold(1.0, f64::max);
            for (a, b) in fast.effects.iter().zip(&dense.effects) {
                prop_assert_eq!(a.term, b.term);
                prop_assert!((a.effect - b.effect).abs() <= 1e-9 * scale, "{}: {} vs {}", a.term, a.effect, b.effect);
            }
        }
    }

    #[test]
    fn blocks_made_by_confounding_take_the_completion() {
        // 2^4 in four blocks by AB and CD (so ABCD is confounded too), one run missing. The
        // blocks follow the confounded chains, so the cell route applies.
        let levels = full(4);
        let blocks: Vec<u32> = levels
            .iter()
            .map(|r| 1 + u32::from(r[0] * r[1] < 0.0) + 2 * u32::from(r[2] * r[3] < 0.0))
            .collect();
        let mut y: Vec<Option<f64>> = (0..16).map(|i| Some((i * 7 % 11) as f64)).collect();
        y[3] = None;
        let o = Observations::new(4, levels, blocks.clone(), y, vec![]).unwrap();
        let table = estimate_effects(&o).unwrap();
        assert_eq!(
            table.confounded_with_blocks,
            vec![t("AB"), t("CD"), t("ABCD")]
        );
        let rows: Vec<usize> = (0..16).collect();
        let key = |label: &str| table.aliasing.key_of(t(label)).bits as usize;
        let mut expect = vec![key("AB"), key("CD"), key("ABCD")];
        expect.sort_unstable();
        assert_eq!(
            block_words::block_words(&o, &table.aliasing, &rows),
            Some(expect)
        );
        // Blocks that cut across the cells of a chain are not made by confounding.
        let mut odd = blocks;
        odd.swap(0, 1);
        let o2 = Observations::new(4, full(4), odd, vec![Some(1.0); 16], vec![]).unwrap();
        assert_eq!(block_words::block_words(&o2, &table.aliasing, &rows), None);
        // Three blocks cannot be.
        let three: Vec<u32> = (0..16).map(|i| 1 + (i % 3) as u32).collect();
        let o3 = Observations::new(4, full(4), three, vec![Some(1.0); 16], vec![]).unwrap();
        assert_eq!(block_words::block_words(&o3, &table.aliasing, &rows), None);
    }
}
