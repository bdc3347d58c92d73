//! Running a two-level design in 2^q blocks by confounding chosen interactions with blocks.
//!
//! q independent *block generators* (effect columns) split the runs into 2^q blocks by the signs
//! they take; every product of the generators (2^q − 1 effects, with their alias chains in a
//! fraction) is then confounded with blocks (Box, Hunter & Hunter 2005, §5.15; Montgomery 2017,
//! §7.4–7.6). A scheme should confound no main effect and as few two-factor interactions as
//! possible; the automatic choice minimises, in this order, the number of confounded main
//! effects (which must be zero), two-factor and three-factor interactions — the criterion of
//! Sun, Wu & Chen 1997 (*Technometrics* 39, 298–307) restricted to effects of up to three
//! letters.

use crate::design::FractionalDesign;
use crate::term::{LETTERS, Term};
use serde::{Deserialize, Serialize};

/// Why a blocking scheme cannot be used.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum BlockingError {
    /// The block count is not a power of two.
    #[error("{0} blocks: a two-level design splits into 2, 4, 8, ... blocks")]
    NotPowerOfTwo(usize),
    /// More blocks than runs allow (each block needs at least two runs).
    #[error("{blocks} blocks is too many for {runs} runs (each block needs at least two runs)")]
    TooMany {
        /// Blocks asked for.
        blocks: usize,
        /// Base runs.
        runs: usize,
    },
    /// The given block generators are not independent.
    #[error("block generators {0} are not independent (one is a product of the others)")]
    Dependent(String),
    /// The scheme confounds a main effect with blocks.
    #[error("blocking on {generators} confounds main effect {main} with blocks")]
    ConfoundsMainEffect {
        /// The generators as typed.
        generators: String,
        /// The main effect lost.
        main: char,
    },
    /// No scheme keeps every main effect free of blocks.
    #[error("no way to run {runs} runs in {blocks} blocks without confounding a main effect")]
    Impossible {
        /// Blocks asked for.
        blocks: usize,
        /// Base runs.
        runs: usize,
    },
    /// A block generator is the mean (identity) in this fraction.
    #[error("block generator `{0}` is the identity in this fraction")]
    Identity(String),
}

/// A chosen way to split a design into blocks.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct BlockScheme {
    /// The q block generators, as terms in factor letters.
    pub generators: Vec<Term>,
    /// Every effect confounded with blocks (all 2^q − 1 products of the generators), each named
    /// by the shortest term of its alias chain, in the order of the trade.
    pub confounded: Vec<Term>,
    /// Number of confounded main effects, 2FIs and 3FIs (counting every member of the chains).
    pub confounded_by_order: [usize; 3],
}

impl BlockScheme {
    /// Number of blocks, 2^q.
    pub fn block_count(&self) -> usize {
        1 << self.generators.len()
    }

    /// Block (1-based) of a run with the given coded levels: block generator j contributes bit
    /// j when its column is +1 in that run.
    pub fn block_of(&self, levels: &[i8]) -> u32 {
        let mut b = 0u32;
        for (j, g) in self.generators.iter().enumerate() {
            let v: i32 = g.factors().map(|f| i32::from(levels[f])).product();
            if v > 0 {
                b |= 1 << j;
            }
        }
        b + 1
    }
}

/// Low-order terms (up to three letters) of a design grouped by the alias-chain key
/// (`FractionalDesign::reduce`), for counting and naming what blocks confound.
struct ChainIndex {
    /// (key bits, term) for every term of one to three letters.
    entries: Vec<(u32, Term)>,
}

impl ChainIndex {
    fn new(design: &FractionalDesign) -> ChainIndex {
        let k = design.factor_count();
        let mut entries = Vec::new();
        for i in 0..k {
            entries.push(Term::main(i));
            for j in i + 1..k {
                entries.push(Term::main(i).times(Term::main(j)));
                for l in j + 1..k {
                    entries.push(Term::main(i).times(Term::main(j)).times(Term::main(l)));
                }
            }
        }
        let entries = entries
            .into_iter()
            .map(|t| (design.reduce(t).term.bits(), t))
            .collect();
        ChainIndex { entries }
    }

    fn counts(&self, key: u32, counts: &mut [usize; 3]) {
        for (kb, t) in &self.entries {
            if *kb == key {
                counts[t.order() - 1] += 1;
            }
        }
    }

    fn name(&self, key: u32, design: &FractionalDesign) -> Term {
        self.entries
            .iter()
            .filter(|(kb, _)| *kb == key)
            .map(|(_, t)| *t)
            .min()
            .unwrap_or_else(|| basic_to_term(key, design))
    }
}

/// A key (product of basic factors, as bits) read back as a term.
fn basic_to_term(key: u32, _design: &FractionalDesign) -> Term {
    Term::from_bits(key)
}

/// Evaluates block generators given as terms: their group, its names and counts.
pub fn scheme_from_generators(
    design: &FractionalDesign,
    generators: &[Term],
) -> Result<BlockScheme, BlockingError> {
    let index = ChainIndex::new(design);
    evaluate(design, &index, generators)
}

fn evaluate(
    design: &FractionalDesign,
    index: &ChainIndex,
    generators: &[Term],
) -> Result<BlockScheme, BlockingError> {
    let text = || {
        generators
            .iter()
            .map(|t| t.label())
            .collect::<Vec<_>>()
            .join(", ")
    };
    let q = generators.len();
    if q == 0 {
        return Ok(BlockScheme {
            generators: Vec::new(),
            confounded: Vec::new(),
            confounded_by_order: [0; 3],
        });
    }
    let keys: Vec<u32> = generators
        .iter()
        .map(|&g| design.reduce(g).term.bits())
        .collect();
    for (g, &key) in generators.iter().zip(&keys) {
        if key == 0 {
            return Err(BlockingError::Identity(g.label()));
        }
    }
    let mut counts = [0usize; 3];
    let mut confounded = Vec::with_capacity((1 << q) - 1);
    for subset in 1u32..(1 << q) {
        let key = (0..q)
            .filter(|j| subset & (1 << j) != 0)
            .fold(0u32, |acc, j| acc ^ keys[j]);
        if key == 0 {
            return Err(BlockingError::Dependent(text()));
        }
        let before = counts[0];
        index.counts(key, &mut counts);
        let name = index.name(key, design);
        if counts[0] > before {
            return Err(BlockingError::ConfoundsMainEffect {
                generators: text(),
                main: LETTERS[name.factors().next().unwrap_or(0)],
            });
        }
        confounded.push(name);
    }
    confounded.sort();
    Ok(BlockScheme {
        generators: generators.to_vec(),
        confounded,
        confounded_by_order: counts,
    })
}

/// Largest number of candidate schemes the automatic choice evaluates before settling for the
/// best one seen (only reached for very large designs with many blocks).
pub const MAX_SCHEMES: usize = 400_000;

/// Chooses `blocks` = 2^q blocks automatically: the scheme that confounds no main effect and the
/// fewest two-factor, then three-factor interactions. Ties go to the scheme whose generators come
/// first in the order of the trade, taken from the highest-order columns down.
pub fn choose_scheme(
    design: &FractionalDesign,
    blocks: usize,
) -> Result<BlockScheme, BlockingError> {
    if blocks <= 1 {
        return scheme_from_generators(design, &[]);
    }
    if !blocks.is_power_of_two() {
        return Err(BlockingError::NotPowerOfTwo(blocks));
    }
    let runs = design.base_runs();
    if blocks * 2 > runs {
        return Err(BlockingError::TooMany { blocks, runs });
    }
    let q = blocks.trailing_zeros() as usize;
    let index = ChainIndex::new(design);
    // Candidate columns: one per alias chain (each non-zero product of basic factors), named by
    // its shortest member; higher-order columns first so the search meets good schemes early.
    let basic = design.basic_factors();
    let mut candidates: Vec<Term> = (1u32..(1 << basic.len()))
        .map(|mask| {
            let key = basic
                .iter()
                .enumerate()
                .filter(|(j, _)| mask & (1 << j) != 0)
                .fold(0u32, |acc, (_, &b)| acc | (1 << b));
            index.name(key, design)
        })
        .filter(|t| t.order() >= 2)
        .collect();
    candidates.sort_by(|a, b| b.cmp(a));
    let mut best: Option<BlockScheme> = None;
    let mut seen = 0usize;
    let mut chosen: Vec<usize> = Vec::with_capacity(q);
    search(
        design,
        &index,
        &candidates,
        q,
        0,
        &mut chosen,
        &mut best,
        &mut seen,
    );
    best.ok_or(BlockingError::Impossible { blocks, runs })
}

#[expect(
    clippy::too_many_arguments,
    reason = "a private recursive helper; bundling its state would only rename the arguments"
)]
fn search(
    design: &FractionalDesign,
    index: &ChainIndex,
    candidates: &[Term],
    q: usize,
    start: usize,
    chosen: &mut Vec<usize>,
    best: &mut Option<BlockScheme>,
    seen: &mut usize,
) {
    if *seen >= MAX_SCHEMES {
        return;
    }
    if chosen.len() == q {
        *seen += 1;
        let gens: Vec<Term> = chosen.iter().map(|&i| candidates[i]).collect();
        if let Ok(scheme) = evaluate(design, index, &gens) {
            let better = match best {
                None => true,
                Some(b) => scheme.confounded_by_order < b.confounded_by_order,
            };
            if better {
                *best = Some(scheme);
            }
        }
        return;
    }
    for i in start..candidates.len() {
        chosen.push(i);
        search(design, index, candidates, q, i + 1, chosen, best, seen);
        chosen.pop();
        if best
            .as_ref()
            .is_some_and(|b| b.confounded_by_order == [0, 0, 0])
        {
            return;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn terms(k: usize, s: &str) -> Vec<Term> {
        s.split(',').map(|t| Term::parse(t, k).unwrap()).collect()
    }

    #[test]
    fn given_generators_report_their_products() {
        // Montgomery 2017, table of suggested blocking arrangements: 2^4 in 4 blocks with
        // ABC, ACD confounds ABC, ACD and BD.
        let d = FractionalDesign::full(4).unwrap();
        let s = scheme_from_generators(&d, &terms(4, "ABC,ACD")).unwrap();
        let names: Vec<String> = s.confounded.iter().map(|t| t.label()).collect();
        assert_eq!(names, ["BD", "ABC", "ACD"]);
        assert_eq!(s.confounded_by_order, [0, 1, 2]);
    }

    #[test]
    fn blocks_split_the_runs_evenly() {
        let d = FractionalDesign::full(4).unwrap();
        let s = choose_scheme(&d, 4).unwrap();
        let mut sizes = [0usize; 4];
        for row in d.coded_runs() {
            sizes[(s.block_of(&row) - 1) as usize] += 1;
        }
        assert_eq!(sizes, [4, 4, 4, 4]);
    }

    #[test]
    fn bad_schemes_are_rejected() {
        let d = FractionalDesign::full(3).unwrap();
        assert!(matches!(
            scheme_from_generators(&d, &terms(3, "AB,ABC")),
            Err(BlockingError::ConfoundsMainEffect { main: 'C', .. })
        ));
        assert!(matches!(
            scheme_from_generators(&d, &terms(3, "AB,AC,BC")),
            Err(BlockingError::Dependent(_))
        ));
        assert!(matches!(
            choose_scheme(&d, 3),
            Err(BlockingError::NotPowerOfTwo(3))
        ));
        assert!(matches!(
            choose_scheme(&d, 8),
            Err(BlockingError::TooMany { .. })
        ));
    }

    #[test]
    fn fraction_blocks_name_the_shortest_alias() {
        // 2^(5-1) with I = ABCDE: its 15 chains are five `main effect = 4FI` chains and ten
        // `2FI = 3FI` chains (this follows from the relation), so two blocks must confound one
        // 2FI and its 3FI alias, named by the 2FI.
        let d = FractionalDesign::from_text(5, None, "E=ABCD").unwrap();
        let s = choose_scheme(&d, 2).unwrap();
        assert_eq!(s.confounded_by_order, [0, 1, 1]);
        assert_eq!(s.confounded[0].order(), 2);
    }
}
