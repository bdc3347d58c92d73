//! Factor letters and effect terms.
//!
//! Factors are labelled by the convention of the trade: A, B, C, ... Z, skipping I, because `I`
//! stands for the identity (the grand mean) in a defining relation (common practice, no source).
//! That gives at most 25 factors.
//!
//! A [`Term`] is a product of factor columns, stored as a bit set: bit `i` set means factor `i`
//! takes part. Multiplying two terms is the symmetric difference of their letter sets, because a
//! ±1 column times itself is the column of ones (`A·A = I`).

use serde::{Deserialize, Serialize};
use std::fmt;

/// Largest number of factors a design may have (A..Z without I).
pub const MAX_FACTORS: usize = 25;

/// Factor letters in order: A..Z without I.
pub const LETTERS: [char; MAX_FACTORS] = [
    'A', 'B', 'C', 'D', 'E', 'F', 'G', 'H', 'J', 'K', 'L', 'M', 'N', 'O', 'P', 'Q', 'R', 'S', 'T',
    'U', 'V', 'W', 'X', 'Y', 'Z',
];

/// The letter of factor `index` (0-based), or `None` past the 25th factor.
pub fn factor_letter(index: usize) -> Option<char> {
    LETTERS.get(index).copied()
}

/// The 0-based index of a factor letter (upper or lower case), or `None` for `I` and non-letters.
pub fn factor_index(letter: char) -> Option<usize> {
    let up = letter.to_ascii_uppercase();
    LETTERS.iter().position(|&c| c == up)
}

/// Why a term label could not be read.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum TermError {
    /// The label was empty.
    #[error("empty term label")]
    Empty,
    /// A character is not a factor letter (I is the identity and is never a factor).
    #[error("`{letter}` in `{label}` is not a factor letter (factors are A..Z without I)")]
    NotALetter {
        /// The offending character.
        letter: char,
        /// The whole label as typed.
        label: String,
    },
    /// The letter names a factor beyond the design's factor count.
    #[error("`{letter}` in `{label}` is beyond the last factor `{last}`")]
    UnknownFactor {
        /// The offending letter.
        letter: char,
        /// The whole label as typed.
        label: String,
        /// The last factor letter of the design.
        last: char,
    },
    /// The same letter appears twice (`AAB`), which is almost always a typing slip.
    #[error("letter `{letter}` appears twice in `{label}`")]
    Repeated {
        /// The repeated letter.
        letter: char,
        /// The whole label as typed.
        label: String,
    },
}

/// A product of factor columns (an effect or a word of a defining relation), as a bit set.
///
/// `Term::IDENTITY` (no letters) is the column of ones, written `I`.
#[derive(Copy, Clone, PartialEq, Eq, Hash, Default, Serialize, Deserialize)]
#[serde(transparent)]
pub struct Term(u32);

impl Term {
    /// The identity `I` (no factors).
    pub const IDENTITY: Term = Term(0);

    /// The main effect of factor `index` (0-based).
    ///
    /// # Panics
    /// Panics when `index >= MAX_FACTORS`; callers pass indices of an already validated design.
    pub fn main(index: usize) -> Term {
        assert!(index < MAX_FACTORS, "factor index {index} out of range");
        Term(1 << index)
    }

    /// The term from a raw bit set (bit `i` = factor `i`); bits past the 25th factor are dropped.
    pub fn from_bits(bits: u32) -> Term {
        Term(bits & ((1u32 << MAX_FACTORS) - 1))
    }

    /// The raw bit set.
    pub fn bits(self) -> u32 {
        self.0
    }

    /// Number of letters (1 for a main effect, 2 for a two-factor interaction, ...).
    pub fn order(self) -> usize {
        self.0.count_ones() as usize
    }

    /// Whether this is the identity `I`.
    pub fn is_identity(self) -> bool {
        self.0 == 0
    }

    /// Whether factor `index` takes part in the term.
    pub fn contains(self, index: usize) -> bool {
        index < MAX_FACTORS && self.0 & (1 << index) != 0
    }

    /// Whether every letter of `other` is in `self`.
    pub fn includes(self, other: Term) -> bool {
        self.0 & other.0 == other.0
    }

    /// The 0-based indices of the factors in the term, ascending.
    pub fn factors(self) -> impl Iterator<Item = usize> {
        let bits = self.0;
        (0..MAX_FACTORS).filter(move |i| bits & (1 << i) != 0)
    }

    /// The product of two terms (letters that appear twice cancel).
    #[must_use]
    pub fn times(self, other: Term) -> Term {
        Term(self.0 ^ other.0)
    }

    /// Highest factor index used plus one (0 for the identity).
    pub fn span(self) -> usize {
        (u32::BITS - self.0.leading_zeros()) as usize
    }

    /// Reads a label such as `ABD` (letters in any order, upper or lower case) for a design with
    /// `factor_count` factors. `I` alone reads as the identity.
    pub fn parse(label: &str, factor_count: usize) -> Result<Term, TermError> {
        let trimmed = label.trim();
        if trimmed.is_empty() {
            return Err(TermError::Empty);
        }
        if trimmed == "I" || trimmed == "i" {
            return Ok(Term::IDENTITY);
        }
        let mut bits = 0u32;
        for letter in trimmed.chars() {
            let index = factor_index(letter).ok_or_else(|| TermError::NotALetter {
                letter,
                label: trimmed.to_string(),
            })?;
            if index >= factor_count {
                return Err(TermError::UnknownFactor {
                    letter: letter.to_ascii_uppercase(),
                    label: trimmed.to_string(),
                    last: factor_letter(factor_count.saturating_sub(1)).unwrap_or('A'),
                });
            }
            if bits & (1 << index) != 0 {
                return Err(TermError::Repeated {
                    letter: letter.to_ascii_uppercase(),
                    label: trimmed.to_string(),
                });
            }
            bits |= 1 << index;
        }
        Ok(Term(bits))
    }

    /// The label in alphabetical order (`ABD`), or `I` for the identity.
    pub fn label(self) -> String {
        if self.0 == 0 {
            return "I".to_string();
        }
        self.factors().map(|i| LETTERS[i]).collect()
    }

    /// Sort key of the trade: shorter terms first, then alphabetical (`A < B < AB < AC < BC < ABC`).
    pub fn trade_key(self) -> (usize, Vec<usize>) {
        (self.order(), self.factors().collect())
    }
}

impl Ord for Term {
    /// Order of the trade: by number of letters, then alphabetically — the order of
    /// [`Term::trade_key`], compared without building the keys. Of two different terms with as
    /// many letters, the lists of their letters agree up to the first letter only one of them
    /// has, and that letter comes before the other's letter at the same place, so the term
    /// holding the lowest letter of the two's difference comes first.
    fn cmp(&self, other: &Self) -> std::cmp::Ordering {
        let (a, b) = (self.bits(), other.bits());
        a.count_ones().cmp(&b.count_ones()).then_with(|| {
            if a == b {
                std::cmp::Ordering::Equal
            } else if a >> (a ^ b).trailing_zeros() & 1 == 1 {
                std::cmp::Ordering::Less
            } else {
                std::cmp::Ordering::Greater
            }
        })
    }
}

impl PartialOrd for Term {
    fn partial_cmp(&self, other: &Self) -> Option<std::cmp::Ordering> {
        Some(self.cmp(other))
    }
}

impl std::ops::Mul for Term {
    type Output = Term;
    fn mul(self, rhs: Term) -> Term {
        self.times(rhs)
    }
}

impl fmt::Display for Term {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.label())
    }
}

impl fmt::Debug for Term {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "Term({})", self.label())
    }
}

/// A term with a sign, as in a defining relation `I = -ABCD` or an alias `A = -BCD`.
#[derive(Copy, Clone, PartialEq, Eq, Hash, Debug, Serialize, Deserialize)]
pub struct SignedTerm {
    /// The letters.
    pub term: Term,
    /// `true` when the column is the negative of the product of the letters.
    pub negative: bool,
}

impl SignedTerm {
    /// A positive term.
    pub fn plus(term: Term) -> SignedTerm {
        SignedTerm {
            term,
            negative: false,
        }
    }

    /// The product of two signed terms: signs multiply, letters cancel in pairs.
    #[must_use]
    pub fn times(self, other: SignedTerm) -> SignedTerm {
        SignedTerm {
            term: self.term.times(other.term),
            negative: self.negative != other.negative,
        }
    }

    /// `+1.0` or `-1.0`.
    pub fn sign(self) -> f64 {
        if self.negative { -1.0 } else { 1.0 }
    }
}

impl fmt::Display for SignedTerm {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.negative {
            write!(f, "-{}", self.term)
        } else {
            write!(f, "{}", self.term)
        }
    }
}

/// All main effects and two-factor interactions of `factor_count` factors, in the order of the
/// trade (A, B, ..., AB, AC, ...).
pub fn main_effects_and_two_factor_interactions(factor_count: usize) -> Vec<Term> {
    let k = factor_count.min(MAX_FACTORS);
    let mut out: Vec<Term> = (0..k).map(Term::main).collect();
    for i in 0..k {
        for j in i + 1..k {
            out.push(Term::main(i).times(Term::main(j)));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        /// Two implementations that must agree: the comparison without keys and the order of
        /// the keys (number of letters, then the letters' indices lexicographically).
        #[test]
        fn comparison_follows_the_trade_key(a in 0u32..(1 << 25), b in 0u32..(1 << 25), near in 0u32..(1 << 25)) {
            for (x, y) in [(a, b), (a, a ^ (near & 0b111)), (a, a ^ near)] {
                let (s, t) = (Term::from_bits(x), Term::from_bits(y));
                prop_assert_eq!(s.cmp(&t), s.trade_key().cmp(&t.trade_key()), "{} vs {}", x, y);
            }
        }
    }

    #[test]
    fn letters_skip_i() {
        // Common practice, no source: the ninth factor is J because I is the identity.
        assert_eq!(factor_letter(8), Some('J'));
        assert_eq!(factor_index('J'), Some(8));
        assert_eq!(factor_index('I'), None);
        assert_eq!(factor_letter(25), None);
    }

    #[test]
    fn parse_and_label_round_trip() {
        let t = Term::parse("dba", 5).unwrap();
        assert_eq!(t.label(), "ABD");
        assert_eq!(t.order(), 3);
        assert_eq!(Term::parse("I", 3).unwrap(), Term::IDENTITY);
    }

    #[test]
    fn parse_rejects_bad_labels() {
        let cases: &[(&str, usize, TermError)] = &[
            ("", 3, TermError::Empty),
            (
                "AI",
                5,
                TermError::NotALetter {
                    letter: 'I',
                    label: "AI".into(),
                },
            ),
            (
                "AE",
                4,
                TermError::UnknownFactor {
                    letter: 'E',
                    label: "AE".into(),
                    last: 'D',
                },
            ),
            (
                "ABA",
                4,
                TermError::Repeated {
                    letter: 'A',
                    label: "ABA".into(),
                },
            ),
        ];
        for (label, k, expected) in cases {
            assert_eq!(&Term::parse(label, *k).unwrap_err(), expected, "{label}");
        }
    }

    #[test]
    fn product_cancels_repeated_letters() {
        let abc = Term::parse("ABC", 4).unwrap();
        let bcd = Term::parse("BCD", 4).unwrap();
        assert_eq!((abc * bcd).label(), "AD");
        let neg = SignedTerm {
            term: abc,
            negative: true,
        };
        assert_eq!(neg.times(SignedTerm::plus(bcd)).to_string(), "-AD");
    }

    #[test]
    fn trade_order_is_length_then_alphabetical() {
        let mut v: Vec<Term> = ["BC", "A", "ABC", "AC", "B", "AB"]
            .iter()
            .map(|s| Term::parse(s, 3).unwrap())
            .collect();
        v.sort();
        let labels: Vec<String> = v.iter().map(|t| t.label()).collect();
        assert_eq!(labels, ["A", "B", "AB", "AC", "BC", "ABC"]);
    }
}
