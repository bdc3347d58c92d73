//! Columns of effect terms over a table of coded settings, and the alias chains they form.
//!
//! The column of a term is the elementwise product of its factors' coded columns (common practice,
//! no source). Centre points (all settings 0) give 0 in every term column.
//!
//! # Aliasing read from the columns
//!
//! Two terms are aliased in a set of two-level runs when their columns agree up to sign. Because
//! the product of two ±1 columns is the column of the product term, `P` and `Q` are aliased exactly
//! when the column of `P·Q` is constant; the terms with a constant column form a group (the
//! defining relation, with signs) and the alias chains are its cosets (Box, Hunter & Hunter 2005,
//! ch. 6, from memory). This holds for any set of runs, so a fraction typed in from a paper is
//! analysed from its columns alone, without being told its generators.
//!
//! Columns are packed into bits (bit set = −1), so a product is an XOR. [`AliasStructure`] finds
//! a maximal set of factors whose columns are independent (over GF(2), modulo the constant
//! column) and writes every other factor column as a signed product of them; every term then maps
//! to a key (a subset of those basis factors) and a sign, and terms with equal keys form a chain.

use crate::term::{MAX_FACTORS, SignedTerm, Term};
use std::collections::{HashMap, HashSet};

/// Value of `term` in one run: the product of the coded settings of its factors (1 for `I`).
pub fn term_value(row: &[f64], term: Term) -> f64 {
    term.factors()
        .map(|i| row.get(i).copied().unwrap_or(0.0))
        .product()
}

/// Column of `term` over the given runs.
pub fn term_column(levels: &[Vec<f64>], term: Term) -> Vec<f64> {
    levels.iter().map(|row| term_value(row, term)).collect()
}

/// Whether a run is a two-level (factorial) run: every setting is −1 or +1.
pub fn is_factorial_row(row: &[f64]) -> bool {
    !row.is_empty() && row.iter().all(|&v| v == 1.0 || v == -1.0)
}

/// Designs with at most this many factors have all `2^k − 1` terms enumerated when forming alias
/// chains; larger ones enumerate terms by increasing order until every chain has been met.
pub const ENUMERATE_ALL_MAX_FACTORS: usize = 14;

/// Largest number of alias chains [`AliasStructure`] lists. Only a layout that is not a regular
/// fraction can have more chains than runs; for such a layout with more than this many chains,
/// only the chains met among terms up to the label order (at least 2) are listed.
pub const MAX_CHAINS: usize = 1 << 16;

/// A ±1 column packed into bits: bit `r` is set when the column is −1 in run `r`.
///
/// The product of two columns is the XOR of their bits; the negative of a column flips every bit.
#[derive(Clone, PartialEq, Eq, Hash, Debug)]
pub struct SignColumn {
    words: Vec<u64>,
    len: usize,
}

impl SignColumn {
    /// The column of ones (the identity `I`) over `len` runs.
    pub fn ones(len: usize) -> SignColumn {
        SignColumn {
            words: vec![0; len.div_ceil(64)],
            len,
        }
    }

    /// Packs a column of signs: a negative value becomes −1, anything else +1.
    pub fn from_values<I: IntoIterator<Item = f64>>(values: I) -> SignColumn {
        let mut words = Vec::new();
        let mut len = 0;
        for v in values {
            if len % 64 == 0 {
                words.push(0);
            }
            if v < 0.0
                && let Some(w) = words.last_mut()
            {
                *w |= 1 << (len % 64);
            }
            len += 1;
        }
        SignColumn { words, len }
    }

    /// Column of `term` over factorial runs (each setting ±1).
    pub fn of_term(levels: &[Vec<f64>], term: Term) -> SignColumn {
        SignColumn::from_values(levels.iter().map(|row| term_value(row, term)))
    }

    /// Number of runs.
    pub fn len(&self) -> usize {
        self.len
    }

    /// Whether the column has no runs.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// The value (+1 or −1) in run `r`, or `None` past the end.
    pub fn value(&self, r: usize) -> Option<f64> {
        (r < self.len).then(|| {
            if self.words[r / 64] >> (r % 64) & 1 == 1 {
                -1.0
            } else {
                1.0
            }
        })
    }

    /// The elementwise product with another column of the same length (XOR of the bits).
    ///
    /// # Panics
    /// Panics when the lengths differ; columns of one table always agree.
    #[must_use]
    pub fn times(&self, other: &SignColumn) -> SignColumn {
        assert_eq!(self.len, other.len, "sign columns of different lengths");
        SignColumn {
            words: self
                .words
                .iter()
                .zip(&other.words)
                .map(|(a, b)| a ^ b)
                .collect(),
            len: self.len,
        }
    }

    /// The negated column.
    #[must_use]
    pub fn negated(&self) -> SignColumn {
        let mut words: Vec<u64> = self.words.iter().map(|w| !w).collect();
        self.clear_padding(&mut words);
        SignColumn {
            words,
            len: self.len,
        }
    }

    /// `Some(false)` when every run is +1, `Some(true)` when every run is −1, else `None`.
    pub fn constant_sign(&self) -> Option<bool> {
        if self.words.iter().all(|&w| w == 0) {
            Some(false)
        } else if *self == SignColumn::ones(self.len).negated() {
            Some(true)
        } else {
            None
        }
    }

    /// The column up to sign: the representative whose first run is +1, and whether the column
    /// had to be negated to get it. Two columns agree up to sign exactly when these agree.
    pub fn up_to_sign(&self) -> (SignColumn, bool) {
        if self.words.first().is_some_and(|w| w & 1 == 1) {
            (self.negated(), true)
        } else {
            (self.clone(), false)
        }
    }

    fn clear_padding(&self, words: &mut [u64]) {
        let tail = self.len % 64;
        if tail != 0
            && let Some(w) = words.last_mut()
        {
            *w &= (1u64 << tail) - 1;
        }
    }

    fn xor_assign(&mut self, other: &SignColumn) {
        for (a, b) in self.words.iter_mut().zip(&other.words) {
            *a ^= b;
        }
    }

    fn highest_set_bit(&self) -> Option<usize> {
        self.words
            .iter()
            .enumerate()
            .rev()
            .find(|(_, w)| **w != 0)
            .map(|(i, w)| i * 64 + 63 - w.leading_zeros() as usize)
    }

    fn bit(&self, r: usize) -> bool {
        self.words[r / 64] >> (r % 64) & 1 == 1
    }
}

/// One alias chain: terms whose columns agree up to sign.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct AliasChain {
    /// The lowest term of the chain in the order of the trade ([`Term`]'s `Ord`).
    pub representative: Term,
    /// Other members up to the label order, in trade order, each with its sign relative to the
    /// representative (`-CDE` means the column of `CDE` is the negative of the representative's).
    pub aliases: Vec<SignedTerm>,
    /// Number of terms in the chain, the representative included (members beyond the label
    /// order are counted here but not listed).
    pub size: u64,
}

impl AliasChain {
    /// The chain written out, e.g. `AB = -CDE`; `= ...` ends it when members above the label
    /// order were left out.
    pub fn label(&self) -> String {
        let left_out = (self.aliases.len() as u64) + 1 < self.size;
        chain_label(self.representative, &self.aliases, left_out)
    }
}

/// Key of a term in an [`AliasStructure`]: the subset of basis factors whose product has the same
/// column up to sign, and the sign.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct ChainKey {
    /// Bit `j` set: the `j`-th basis factor takes part.
    pub bits: u32,
    /// Whether the term's column is the negative of that product.
    pub negative: bool,
}

/// A chain written out from its representative and listed aliases, e.g. `AB = -CDE`, ending in
/// `= ...` when `left_out` says members above the label order were not listed.
pub(crate) fn chain_label(representative: Term, aliases: &[SignedTerm], left_out: bool) -> String {
    let mut s = representative.label();
    for a in aliases {
        s.push_str(" = ");
        s.push_str(&a.to_string());
    }
    if left_out {
        s.push_str(" = ...");
    }
    s
}

/// The aliasing of a set of two-level runs, read from its columns.
///
/// Built by [`AliasStructure::from_levels`] from the factorial runs of a layout (rows with a
/// setting other than ±1 are ignored). Chains are listed in the order of their representatives.
#[derive(Debug, Clone, PartialEq)]
pub struct AliasStructure {
    factor_count: usize,
    run_count: usize,
    distinct_runs: usize,
    basis: Vec<usize>,
    factor_keys: Vec<ChainKey>,
    chains: Vec<AliasChain>,
    chain_keys: Vec<u32>,
    index: HashMap<u32, usize>,
    defining: Vec<SignedTerm>,
    complete: bool,
}

impl AliasStructure {
    /// Reads the aliasing of the factorial rows of `levels` (every setting ±1; other rows are
    /// ignored). `factor_count` is the number of factors (columns) of each row. Chain members and
    /// defining-relation words are listed up to `max_label_order` letters; representatives are
    /// always the true lowest member.
    ///
    /// # Panics
    /// Panics when `factor_count` exceeds [`MAX_FACTORS`]; callers pass a checked table.
    pub fn from_levels(
        levels: &[Vec<f64>],
        factor_count: usize,
        max_label_order: usize,
    ) -> AliasStructure {
        assert!(factor_count <= MAX_FACTORS, "too many factors");
        let rows: Vec<&Vec<f64>> = levels
            .iter()
            .filter(|r| r.len() >= factor_count && is_factorial_row(&r[..factor_count]))
            .collect();
        let n = rows.len();
        let columns: Vec<SignColumn> = (0..factor_count)
            .map(|f| SignColumn::from_values(rows.iter().map(|r| r[f])))
            .collect();
        let (basis, factor_keys) = reduce_to_basis(&columns, n);
        let r = basis.len();
        let distinct_runs = rows
            .iter()
            .map(|row| basis_cell(row, &basis))
            .collect::<HashSet<u32>>()
            .len();
        let mut s = AliasStructure {
            factor_count,
            run_count: n,
            distinct_runs,
            basis,
            factor_keys,
            chains: Vec::new(),
            chain_keys: Vec::new(),
            index: HashMap::new(),
            defining: Vec::new(),
            complete: false,
        };
        if n == 0 {
            return s;
        }
        let wanted_chains = (1usize << r) - 1;
        let mut groups: HashMap<u32, Group> = HashMap::new();
        let mut defining: Vec<SignedTerm> = Vec::new();
        let mut add = |term: Term, key: ChainKey, groups: &mut HashMap<u32, Group>| {
            if key.bits == 0 {
                if term.order() <= max_label_order {
                    defining.push(SignedTerm {
                        term,
                        negative: key.negative,
                    });
                }
                return;
            }
            let g = groups.entry(key.bits).or_insert(Group {
                lowest: (term, key.negative),
                members: Vec::new(),
            });
            if term < g.lowest.0 {
                g.lowest = (term, key.negative);
            }
            if term.order() <= max_label_order {
                g.members.push((term, key.negative));
            }
        };
        if factor_count <= ENUMERATE_ALL_MAX_FACTORS {
            // Every term, each key built from the term without its lowest letter.
            let total = 1usize << factor_count;
            let mut keys = vec![
                ChainKey {
                    bits: 0,
                    negative: false
                };
                total
            ];
            for bits in 1..total {
                let low = bits.trailing_zeros() as usize;
                let rest = keys[bits & (bits - 1)];
                let f = s.factor_keys[low];
                keys[bits] = ChainKey {
                    bits: rest.bits ^ f.bits,
                    negative: rest.negative != f.negative,
                };
                add(Term::from_bits(bits as u32), keys[bits], &mut groups);
            }
        } else {
            let capped = wanted_chains > MAX_CHAINS;
            let last_order = if capped {
                max_label_order.max(2).min(factor_count)
            } else {
                factor_count
            };
            for order in 1..=last_order {
                for_each_subset_of_size(factor_count, order, |bits| {
                    let term = Term::from_bits(bits);
                    add(term, s.key_of(term), &mut groups);
                });
                if order >= max_label_order && groups.len() == wanted_chains {
                    break;
                }
            }
        }
        let generators = s.generators();
        if generators.len() <= FULL_RELATION_MAX_GENERATORS {
            // Few words: list the whole defining relation, whatever their length, as the
            // products of the generator words.
            defining = all_products(&generators.iter().map(|g| g.word()).collect::<Vec<_>>());
        }
        defining.sort_by_key(|w| w.term);
        s.defining = defining;
        s.complete = groups.len() == wanted_chains;
        let mut chains: Vec<(u32, AliasChain)> = groups
            .into_iter()
            .map(|(bits, g)| {
                let (rep, rep_negative) = g.lowest;
                let mut aliases: Vec<SignedTerm> = g
                    .members
                    .into_iter()
                    .filter(|(t, _)| *t != rep)
                    .map(|(t, neg)| SignedTerm {
                        term: t,
                        negative: neg != rep_negative,
                    })
                    .collect();
                aliases.sort_by_key(|a| a.term);
                let chain = AliasChain {
                    representative: rep,
                    aliases,
                    size: 1u64 << (factor_count - r),
                };
                (bits, chain)
            })
            .collect();
        chains.sort_by_key(|c| c.1.representative);
        for (i, (bits, chain)) in chains.into_iter().enumerate() {
            s.index.insert(bits, i);
            s.chain_keys.push(bits);
            s.chains.push(chain);
        }
        s
    }

    /// Number of factors.
    pub fn factor_count(&self) -> usize {
        self.factor_count
    }

    /// Number of factorial runs the structure was read from (repeats counted).
    pub fn run_count(&self) -> usize {
        self.run_count
    }

    /// Number of distinct factorial runs.
    pub fn distinct_runs(&self) -> usize {
        self.distinct_runs
    }

    /// Factors (0-based) whose columns are independent; every other factor column is a signed
    /// product of theirs. Chosen greedily in factor order.
    pub fn basis(&self) -> &[usize] {
        &self.basis
    }

    /// Whether the distinct runs form a full factorial or a regular fraction: they take every
    /// combination of the basis factors exactly once, so `distinct_runs = 2^basis`.
    pub fn is_regular(&self) -> bool {
        self.run_count > 0 && self.distinct_runs == 1usize << self.basis.len()
    }

    /// Whether every chain is listed (false only for an irregular layout with more than
    /// [`MAX_CHAINS`] chains).
    pub fn is_complete(&self) -> bool {
        self.complete
    }

    /// The alias chains other than the mean, in the order of their representatives.
    pub fn chains(&self) -> &[AliasChain] {
        &self.chains
    }

    /// Words whose column is constant, i.e. aliased with the mean `I` (the defining relation of
    /// a fraction, with signs), in trade order. Every word is listed when there are at most
    /// [`FULL_RELATION_MAX_GENERATORS`] generators (63 words); otherwise the words up to the
    /// label order. Empty for a full factorial.
    pub fn defining_words(&self) -> &[SignedTerm] {
        &self.defining
    }

    /// Each factor outside the basis written as a signed product of basis factors (`E = ABCD`),
    /// in factor order: the generators of the layout as read from its columns.
    pub fn generators(&self) -> Vec<Generator> {
        self.factor_keys
            .iter()
            .enumerate()
            .filter(|(f, _)| !self.basis.contains(f))
            .map(|(f, key)| {
                let product = self
                    .basis
                    .iter()
                    .enumerate()
                    .filter(|(j, _)| key.bits >> j & 1 == 1)
                    .fold(Term::IDENTITY, |acc, (_, &b)| acc.times(Term::main(b)));
                Generator {
                    factor: f,
                    product: SignedTerm {
                        term: product,
                        negative: key.negative,
                    },
                }
            })
            .collect()
    }

    /// The key of any term: which product of basis factors has its column, and the sign.
    pub fn key_of(&self, term: Term) -> ChainKey {
        let mut key = ChainKey {
            bits: 0,
            negative: false,
        };
        for f in term.factors() {
            if let Some(k) = self.factor_keys.get(f) {
                key.bits ^= k.bits;
                key.negative ^= k.negative;
            }
        }
        key
    }

    /// Key bits of chain `index` (see [`AliasStructure::chains`]).
    pub fn chain_key(&self, index: usize) -> Option<u32> {
        self.chain_keys.get(index).copied()
    }

    /// Index of the chain holding `term` and whether `term`'s column is the negative of the
    /// representative's; `None` when the term is aliased with the mean (or, for an incomplete
    /// structure, its chain is not listed).
    pub fn chain_of(&self, term: Term) -> Option<(usize, bool)> {
        let key = self.key_of(term);
        if key.bits == 0 {
            return None;
        }
        let i = *self.index.get(&key.bits)?;
        let rep_key = self.key_of(self.chains[i].representative);
        Some((i, key.negative != rep_key.negative))
    }

    /// The representative of `term`'s chain with the sign relating them (`AB` in a chain
    /// `AB = -CDE` gives `-AB` for `CDE`); `None` as for [`AliasStructure::chain_of`].
    pub fn representative_of(&self, term: Term) -> Option<SignedTerm> {
        self.chain_of(term).map(|(i, negative)| SignedTerm {
            term: self.chains[i].representative,
            negative,
        })
    }

    /// Whether `term` is aliased with the mean (its column is constant over the runs).
    pub fn is_aliased_with_mean(&self, term: Term) -> bool {
        self.key_of(term).bits == 0
    }

    /// Index of a factorial row among the `2^basis` combinations of the basis factors: bit `j`
    /// set when basis factor `j` is at −1.
    pub fn cell_of(&self, row: &[f64]) -> u32 {
        basis_cell(row, &self.basis)
    }
}

/// A factor column written as a signed product of basis factor columns, e.g. `E = ABCD` or
/// `D = -AB` (a product of no factors, `C = I`, means the factor is constant).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Generator {
    /// The factor (0-based).
    pub factor: usize,
    /// The signed product of basis factors equal to its column.
    pub product: SignedTerm,
}

impl Generator {
    /// The word of the defining relation it gives: `E = ABCD` gives `I = ABCDE`.
    pub fn word(&self) -> SignedTerm {
        SignedTerm {
            term: Term::main(self.factor).times(self.product.term),
            negative: self.product.negative,
        }
    }

    /// The generator written out, e.g. `E = ABCD`.
    pub fn label(&self) -> String {
        format!("{} = {}", Term::main(self.factor), self.product)
    }
}

/// With at most this many generators the whole defining relation (`2^p − 1` words) is listed.
pub const FULL_RELATION_MAX_GENERATORS: usize = 6;

/// Every non-empty product of the given words (signs multiplied).
fn all_products(words: &[SignedTerm]) -> Vec<SignedTerm> {
    (1usize..1 << words.len())
        .map(|mask| {
            words
                .iter()
                .enumerate()
                .filter(|(j, _)| mask >> j & 1 == 1)
                .fold(SignedTerm::plus(Term::IDENTITY), |acc, (_, w)| {
                    acc.times(*w)
                })
        })
        .collect()
}

/// Alias chains of the factorial rows of `levels` (see [`AliasStructure::from_levels`]); the
/// factor count is the length of the first row.
pub fn alias_chains(levels: &[Vec<f64>], max_label_order: usize) -> Vec<AliasChain> {
    let k = levels.first().map_or(0, Vec::len).min(MAX_FACTORS);
    AliasStructure::from_levels(levels, k, max_label_order)
        .chains
        .clone()
}

struct Group {
    lowest: (Term, bool),
    members: Vec<(Term, bool)>,
}

fn basis_cell(row: &[f64], basis: &[usize]) -> u32 {
    basis
        .iter()
        .enumerate()
        .filter(|(_, f)| row.get(**f).is_some_and(|&v| v < 0.0))
        .fold(0u32, |acc, (j, _)| acc | 1 << j)
}

/// A reduced vector of the elimination with the combination that produced it.
struct Pivot {
    column: SignColumn,
    key: ChainKey,
}

/// Gaussian elimination over GF(2): the constant column first, then the factor columns in
/// order. Returns the basis factors and, for every factor, its key over them.
fn reduce_to_basis(columns: &[SignColumn], n: usize) -> (Vec<usize>, Vec<ChainKey>) {
    let mut pivots: HashMap<usize, Pivot> = HashMap::new();
    let minus_one = SignColumn::ones(n).negated();
    if let Some(top) = minus_one.highest_set_bit() {
        pivots.insert(
            top,
            Pivot {
                column: minus_one,
                key: ChainKey {
                    bits: 0,
                    negative: true,
                },
            },
        );
    }
    let mut basis = Vec::new();
    let mut keys = Vec::with_capacity(columns.len());
    for (f, col) in columns.iter().enumerate() {
        let mut v = col.clone();
        let mut combo = ChainKey {
            bits: 0,
            negative: false,
        };
        loop {
            let Some(top) = v.highest_set_bit() else {
                // The column is the product of the combination: a dependent factor.
                keys.push(combo);
                break;
            };
            if let Some(p) = pivots.get(&top) {
                v.xor_assign(&p.column);
                combo.bits ^= p.key.bits;
                combo.negative ^= p.key.negative;
            } else {
                let j = basis.len();
                basis.push(f);
                debug_assert!(v.bit(top));
                pivots.insert(
                    top,
                    Pivot {
                        column: v,
                        key: ChainKey {
                            bits: combo.bits ^ (1 << j),
                            negative: combo.negative,
                        },
                    },
                );
                keys.push(ChainKey {
                    bits: 1 << j,
                    negative: false,
                });
                break;
            }
        }
    }
    (basis, keys)
}

/// Calls `f` with every `size`-subset of `0..n` as a bit set (Gosper's hack).
fn for_each_subset_of_size(n: usize, size: usize, mut f: impl FnMut(u32)) {
    if size == 0 || size > n {
        return;
    }
    let limit = 1u64 << n;
    let mut x: u64 = (1u64 << size) - 1;
    while x < limit {
        f(x as u32);
        let c = x & x.wrapping_neg();
        let r = x + c;
        x = (((r ^ x) >> 2) / c) | r;
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_support::full;

    /// A fraction from base factorial columns and generator words (product of base factors,
    /// sign).
    fn fraction(base: usize, generators: &[(&str, bool)]) -> Vec<Vec<f64>> {
        full(base)
            .into_iter()
            .map(|mut row| {
                let extra: Vec<f64> = generators
                    .iter()
                    .map(|(w, neg)| {
                        let t = Term::parse(w, base).unwrap();
                        let v = term_value(&row, t);
                        if *neg { -v } else { v }
                    })
                    .collect();
                row.extend(extra);
                row
            })
            .collect()
    }

    fn t(s: &str) -> Term {
        Term::parse(s, 25).unwrap()
    }

    #[test]
    fn sign_columns_multiply_by_xor() {
        let a = SignColumn::from_values([1.0, -1.0, 1.0, -1.0]);
        let b = SignColumn::from_values([1.0, 1.0, -1.0, -1.0]);
        let ab = a.times(&b);
        let got: Vec<f64> = (0..4).map(|r| ab.value(r).unwrap()).collect();
        assert_eq!(got, [1.0, -1.0, -1.0, 1.0]);
        assert_eq!(a.times(&a).constant_sign(), Some(false));
        assert_eq!(SignColumn::ones(70).negated().constant_sign(), Some(true));
        assert_eq!(a.negated().up_to_sign().0, a.up_to_sign().0);
        assert!(a.negated().up_to_sign().1 != a.up_to_sign().1);
        assert_eq!(ab.value(4), None);
    }

    #[test]
    fn full_factorial_has_singleton_chains() {
        let s = AliasStructure::from_levels(&full(3), 3, 3);
        assert!(s.is_regular() && s.is_complete());
        let labels: Vec<String> = s.chains().iter().map(AliasChain::label).collect();
        assert_eq!(labels, ["A", "B", "C", "AB", "AC", "BC", "ABC"]);
        assert!(s.defining_words().is_empty());
    }

    #[test]
    fn half_fraction_typed_in_gives_its_defining_relation() {
        // 2^(5-1) with E = ABCD (Montgomery, Example 8-2, defining relation I = ABCDE).
        let rows = fraction(4, &[("ABCD", false)]);
        let s = AliasStructure::from_levels(&rows, 5, 5);
        assert_eq!(s.defining_words().len(), 1);
        assert_eq!(s.defining_words()[0].to_string(), "ABCDE");
        assert_eq!(s.chains().len(), 15);
        let ab = s
            .chains()
            .iter()
            .find(|c| c.representative == t("AB"))
            .unwrap();
        assert_eq!(ab.label(), "AB = CDE");
        let e = s
            .chains()
            .iter()
            .find(|c| c.representative == t("E"))
            .unwrap();
        assert_eq!(e.label(), "E = ABCD");
    }

    #[test]
    fn defining_relations_match_published_word_length_patterns() {
        // Montgomery, table of selected 2^(k-p) designs (REFERENCES): 2^(6-2) with E = ABC,
        // F = BCD has pattern (0, 3, 0, 0); 2^(7-3) with E = ABC, F = BCD, G = ACD has
        // (0, 7, 0, 0, 0). Here the generators are not given: only the columns.
        for (gens, k, pattern) in [
            (vec![("ABC", false), ("BCD", false)], 6, vec![0, 3, 0, 0]),
            (
                vec![("ABC", false), ("BCD", false), ("ACD", false)],
                7,
                vec![0, 7, 0, 0, 0],
            ),
        ] {
            let rows = fraction(4, &gens);
            let s = AliasStructure::from_levels(&rows, k, 3);
            let mut counts = vec![0; k - 2];
            for w in s.defining_words() {
                counts[w.term.order() - 3] += 1;
            }
            assert_eq!(counts, pattern, "k = {k}");
            assert_eq!(s.chains().len(), 15);
        }
    }

    #[test]
    fn negative_generator_gives_negative_aliases() {
        // 2^(3-1) with C = -AB: I = -ABC, A = -BC, B = -AC, C = -AB (common practice, no source).
        let rows = fraction(2, &[("AB", true)]);
        let s = AliasStructure::from_levels(&rows, 3, 3);
        let labels: Vec<String> = s.chains().iter().map(AliasChain::label).collect();
        assert_eq!(labels, ["A = -BC", "B = -AC", "C = -AB"]);
        assert_eq!(s.defining_words()[0].to_string(), "-ABC");
        let gens: Vec<String> = s.generators().iter().map(Generator::label).collect();
        assert_eq!(gens, ["C = -AB"]);
        assert_eq!(s.representative_of(t("BC")).unwrap().to_string(), "-A");
        assert_eq!(s.representative_of(t("ABC")), None);
    }

    #[test]
    fn chains_do_not_depend_on_run_order_or_replicates() {
        let mut rows = fraction(4, &[("ABC", false), ("BCD", false)]);
        let base = AliasStructure::from_levels(&rows, 6, 3);
        rows.reverse();
        let extra = rows[3].clone();
        rows.push(extra);
        rows.push(vec![0.0; 6]);
        let other = AliasStructure::from_levels(&rows, 6, 3);
        assert_eq!(base.chains(), other.chains());
        assert_eq!(other.run_count(), 17);
        assert_eq!(other.distinct_runs(), 16);
    }

    #[test]
    fn algebraic_route_agrees_with_full_enumeration() {
        // 2^(16-11): 16 factors, beyond the full enumeration; compare with hashing the columns
        // of every term up to order 3 directly.
        let gens: Vec<(&str, bool)> = vec![
            ("AB", false),
            ("AC", false),
            ("AD", true),
            ("AE", false),
            ("BC", false),
            ("BD", false),
            ("BE", true),
            ("CD", false),
            ("CE", false),
            ("DE", false),
            ("ABCDE", false),
        ];
        let rows = fraction(5, &gens);
        let s = AliasStructure::from_levels(&rows, 16, 3);
        assert!(s.is_regular() && s.is_complete());
        assert_eq!(s.chains().len(), 31);
        let mut by_column: HashMap<SignColumn, Vec<(Term, bool)>> = HashMap::new();
        for order in 1..=3 {
            for_each_subset_of_size(16, order, |bits| {
                let term = Term::from_bits(bits);
                let (col, neg) = SignColumn::of_term(&rows, term).up_to_sign();
                by_column.entry(col).or_default().push((term, neg));
            });
        }
        for (col, members) in by_column {
            if col.constant_sign().is_some() {
                for (term, _) in &members {
                    assert!(s.is_aliased_with_mean(*term), "{term}");
                }
                continue;
            }
            let (first, first_neg) = members[0];
            let (i, _) = s.chain_of(first).unwrap();
            for (term, neg) in &members {
                let (j, _) = s.chain_of(*term).unwrap();
                assert_eq!(i, j, "{term} and {first}");
                let rel = s.representative_of(*term).unwrap().negative
                    != s.representative_of(first).unwrap().negative;
                assert_eq!(rel, neg != &first_neg, "sign of {term} against {first}");
            }
        }
    }

    #[test]
    fn constant_factor_is_aliased_with_the_mean() {
        let rows: Vec<Vec<f64>> = full(2)
            .into_iter()
            .map(|mut r| {
                r.push(1.0);
                r
            })
            .collect();
        let s = AliasStructure::from_levels(&rows, 3, 3);
        assert_eq!(s.defining_words()[0].to_string(), "C");
        assert_eq!(s.chains().len(), 3);
        let labels: Vec<String> = s.chains().iter().map(AliasChain::label).collect();
        assert_eq!(labels, ["A = AC", "B = BC", "AB = ABC"]);
    }

    #[test]
    fn irregular_layout_is_flagged() {
        // Three runs of a 2^2: no longer a regular fraction.
        let rows = vec![vec![-1.0, -1.0], vec![1.0, -1.0], vec![-1.0, 1.0]];
        let s = AliasStructure::from_levels(&rows, 2, 2);
        assert!(!s.is_regular());
        assert_eq!(s.chains().len(), 3);
    }

    #[test]
    fn no_factorial_rows_gives_no_chains() {
        let s = AliasStructure::from_levels(&[vec![0.0, 0.0]], 2, 2);
        assert!(s.chains().is_empty());
        assert_eq!(s.run_count(), 0);
    }

    #[test]
    fn subsets_of_size_are_all_visited() {
        let mut seen = Vec::new();
        for_each_subset_of_size(5, 2, |b| seen.push(b));
        assert_eq!(seen.len(), 10);
        assert!(seen.iter().all(|b| b.count_ones() == 2 && *b < 32));
    }
}
