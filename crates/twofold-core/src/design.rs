//! Two-level full and regular fractional factorial designs.
//!
//! A 2^(k−p) fraction has `q = k − p` *basic* factors that run through a full 2^q factorial in
//! standard (Yates) order, first basic factor changing fastest, and `p` *generated* factors whose
//! columns are products of basic columns, as set by generators such as `E = ABCD` (Box, Hunter &
//! Hunter 2005, *Statistics for Experimenters*, 2nd ed., ch. 6; Montgomery 2017, *Design and
//! Analysis of Experiments*, 9th ed., §8.2). Levels are coded −1 (low) and +1 (high).
//!
//! A generator's right-hand side may name other generated factors (`F = ABE`); the design solves
//! every generated factor down to basic factors. Generators are rejected when they alias two main
//! effects (a defining word of fewer than three letters) or when one is a product of others.

use crate::term::{LETTERS, MAX_FACTORS, SignedTerm, Term, factor_index};
use serde::{Deserialize, Serialize};
use std::fmt;

/// Why a design cannot be built.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum DesignError {
    /// Fewer than 2 or more than 25 factors.
    #[error("{0} factors: a design needs 2 to 25 factors (A..Z without I)")]
    FactorCount(usize),
    /// A generator could not be read.
    #[error("generator `{text}`: {reason}")]
    BadGenerator {
        /// The generator as typed.
        text: String,
        /// What is wrong, in plain words.
        reason: String,
    },
    /// Two generators set the same factor.
    #[error("factor `{0}` is set by two generators")]
    DuplicateGenerated(char),
    /// A generator's defining word has fewer than three letters: two main effects would be aliased.
    #[error(
        "generator `{generator}` aliases two main effects (defining word `{word}` has fewer than three letters)"
    )]
    ShortWord {
        /// The generator.
        generator: String,
        /// The offending defining word.
        word: String,
    },
    /// A generator is a product of the other generators.
    #[error("generator `{0}` is a product of the other generators (they are not independent)")]
    Dependent(String),
    /// The number of runs is not a power of two.
    #[error(
        "{0} runs is not a power of two (a two-level fraction has 4, 8, 16, 32, ... runs; screening designs have 12, 20, 24, 28, 36, 40, 44 or 48)"
    )]
    RunsNotPowerOfTwo(usize),
    /// More runs than the full factorial.
    #[error("{runs} runs is more than the full factorial of {factors} factors ({full} runs)")]
    RunsAboveFull {
        /// Runs asked for.
        runs: usize,
        /// Factor count.
        factors: usize,
        /// Runs of the full factorial.
        full: u64,
    },
    /// Too few runs to estimate every main effect and the mean.
    #[error(
        "{runs} runs is too few for {factors} factors: at least {needed} runs are needed to estimate every main effect"
    )]
    RunsTooFew {
        /// Runs asked for.
        runs: usize,
        /// Factor count.
        factors: usize,
        /// Smallest power of two ≥ factors + 1.
        needed: usize,
    },
    /// The run size and the generators disagree.
    #[error("{generators} generators for {factors} factors give {implied} runs, not {runs}")]
    RunsMismatch {
        /// Runs asked for.
        runs: usize,
        /// Factor count.
        factors: usize,
        /// Generator count.
        generators: usize,
        /// Runs implied by the generators.
        implied: usize,
    },
}

/// A generator `factor = ±word`: the column of `factor` is the signed product of the word's
/// columns.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub struct Generator {
    /// 0-based index of the generated factor.
    pub factor: usize,
    /// The signed product that sets it (does not contain `factor`).
    pub word: SignedTerm,
}

impl Generator {
    /// Reads `E=ABCD`, `E = -ABCD` or `e=abcd` for a design with `factor_count` factors.
    pub fn parse(text: &str, factor_count: usize) -> Result<Generator, DesignError> {
        let bad = |reason: &str| DesignError::BadGenerator {
            text: text.trim().to_string(),
            reason: reason.to_string(),
        };
        let (lhs, rhs) = text
            .split_once('=')
            .ok_or_else(|| bad("expected the form `E=ABCD`"))?;
        let lhs = lhs.trim();
        let mut lhs_chars = lhs.chars();
        let (Some(letter), None) = (lhs_chars.next(), lhs_chars.next()) else {
            return Err(bad("the left side must be a single factor letter"));
        };
        let factor = factor_index(letter)
            .ok_or_else(|| bad("the left side is not a factor letter (A..Z without I)"))?;
        if factor >= factor_count {
            return Err(bad(&format!(
                "factor `{}` is beyond the last factor `{}`",
                letter.to_ascii_uppercase(),
                LETTERS[factor_count.clamp(1, MAX_FACTORS) - 1]
            )));
        }
        let rhs = rhs.trim();
        let (negative, letters) = match rhs.strip_prefix('-') {
            Some(rest) => (true, rest.trim()),
            None => (false, rhs.strip_prefix('+').unwrap_or(rhs).trim()),
        };
        let term = Term::parse(letters, factor_count).map_err(|e| bad(&e.to_string()))?;
        if term.is_identity() {
            return Err(bad("the right side names no factors"));
        }
        if term.contains(factor) {
            return Err(bad("a factor cannot appear on both sides"));
        }
        Ok(Generator {
            factor,
            word: SignedTerm { term, negative },
        })
    }

    /// Reads a comma- or semicolon-separated list such as `E=ABCD, F=ABCE`. Empty text gives no
    /// generators.
    pub fn parse_list(text: &str, factor_count: usize) -> Result<Vec<Generator>, DesignError> {
        text.split([',', ';'])
            .map(str::trim)
            .filter(|s| !s.is_empty())
            .map(|s| Generator::parse(s, factor_count))
            .collect()
    }

    /// The defining word `I = ±factor·word` that this generator adds.
    pub fn defining_word(&self) -> SignedTerm {
        SignedTerm {
            term: self.word.term.times(Term::main(self.factor)),
            negative: self.word.negative,
        }
    }
}

impl fmt::Display for Generator {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}={}", LETTERS[self.factor], self.word)
    }
}

/// A full or regular fractional two-level factorial design, always valid once built.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct FractionalDesign {
    factor_count: usize,
    /// Generators as given (or as chosen by a search).
    generators: Vec<Generator>,
    /// Basic factors, ascending: these run through the full 2^q factorial.
    basic: Vec<usize>,
    /// For every factor, its column as a signed product of basic factors.
    solved: Vec<SignedTerm>,
}

impl FractionalDesign {
    /// The full 2^k factorial.
    pub fn full(factor_count: usize) -> Result<FractionalDesign, DesignError> {
        FractionalDesign::with_generators(factor_count, Vec::new())
    }

    /// The 2^(k−p) fraction set by `generators` (p = number of generators).
    pub fn with_generators(
        factor_count: usize,
        generators: Vec<Generator>,
    ) -> Result<FractionalDesign, DesignError> {
        if !(2..=MAX_FACTORS).contains(&factor_count) {
            return Err(DesignError::FactorCount(factor_count));
        }
        let mut generated = vec![false; factor_count];
        for g in &generators {
            if g.factor >= factor_count || g.word.term.span() > factor_count {
                return Err(DesignError::BadGenerator {
                    text: g.to_string(),
                    reason: "it names a factor beyond the design's factors".into(),
                });
            }
            if generated[g.factor] {
                return Err(DesignError::DuplicateGenerated(LETTERS[g.factor]));
            }
            generated[g.factor] = true;
        }
        let basic: Vec<usize> = (0..factor_count).filter(|&i| !generated[i]).collect();
        if basic.is_empty() {
            return Err(DesignError::BadGenerator {
                text: generators
                    .iter()
                    .map(ToString::to_string)
                    .collect::<Vec<_>>()
                    .join(", "),
                reason: "every factor is generated; at least one must be basic".into(),
            });
        }
        let basic_mask = basic.iter().fold(0u32, |m, &i| m | (1 << i));

        // Gaussian elimination over GF(2) on the defining words, pivoting on generated factors,
        // so that each generated factor ends up in exactly one word together with basic factors
        // only. A pivot that cannot be found means the words are dependent (or the generated
        // factors cannot be solved), which the user sees as a dependent generator.
        let mut rows: Vec<(SignedTerm, usize)> = generators
            .iter()
            .enumerate()
            .map(|(i, g)| (g.defining_word(), i))
            .collect();
        for g in &generators {
            let w = g.defining_word();
            if w.term.order() < 3 {
                return Err(DesignError::ShortWord {
                    generator: g.to_string(),
                    word: w.term.label(),
                });
            }
        }
        let mut solved_rows: Vec<Option<SignedTerm>> = vec![None; factor_count];
        let mut used = vec![false; rows.len()];
        for g in &generators {
            let f = g.factor;
            let pivot = (0..rows.len()).find(|&r| !used[r] && rows[r].0.term.contains(f));
            let Some(p) = pivot else {
                return Err(DesignError::Dependent(
                    generators
                        .iter()
                        .map(ToString::to_string)
                        .find(|s| s.starts_with(LETTERS[f]))
                        .unwrap_or_default(),
                ));
            };
            used[p] = true;
            let pivot_word = rows[p].0;
            for (r, row) in rows.iter_mut().enumerate() {
                if r != p && row.0.term.contains(f) {
                    row.0 = row.0.times(pivot_word);
                }
            }
            solved_rows[f] = Some(pivot_word);
        }
        // Each pivot word now holds its generated factor plus basic factors only, provided the
        // elimination cleared every other generated factor from it. A word left with no
        // generated factor at all, or a basic-only product, signals dependence.
        let mut solved = Vec::with_capacity(factor_count);
        for f in 0..factor_count {
            if !generated[f] {
                solved.push(SignedTerm::plus(Term::main(f)));
                continue;
            }
            let Some(word) = solved_rows[f] else {
                return Err(DesignError::Dependent(LETTERS[f].to_string()));
            };
            let rest = word.term.times(Term::main(f));
            if rest.bits() & !basic_mask != 0 || rest.is_identity() {
                let text = generators
                    .iter()
                    .find(|g| g.factor == f)
                    .map(ToString::to_string)
                    .unwrap_or_default();
                return Err(DesignError::Dependent(text));
            }
            solved.push(SignedTerm {
                term: rest,
                negative: word.negative,
            });
        }
        let design = FractionalDesign {
            factor_count,
            generators,
            basic,
            solved,
        };
        // A product of generators may still alias two main effects (E=ABC, F=ABC gives I=EF).
        // (The shortest such word in trade order, found without sorting the whole group.)
        if let Some(short) = crate::alias::defining_group(&design)
            .into_iter()
            .filter(|w| !w.term.is_identity() && w.term.order() < 3)
            .min_by(|a, b| a.term.cmp(&b.term))
        {
            let culprit = design
                .generators
                .iter()
                .rev()
                .find(|g| short.term.contains(g.factor))
                .map(ToString::to_string)
                .unwrap_or_default();
            return Err(DesignError::ShortWord {
                generator: culprit,
                word: short.term.label(),
            });
        }
        Ok(design)
    }

    /// Builds the design for `runs` runs (or the full factorial when `runs` is `None`) from
    /// generator text, checking that run size and generators agree.
    pub fn from_text(
        factor_count: usize,
        runs: Option<usize>,
        generators: &str,
    ) -> Result<FractionalDesign, DesignError> {
        if !(2..=MAX_FACTORS).contains(&factor_count) {
            return Err(DesignError::FactorCount(factor_count));
        }
        let gens = Generator::parse_list(generators, factor_count)?;
        if let Some(runs) = runs {
            check_run_count(factor_count, runs)?;
            let implied = 1usize << (factor_count - gens.len().min(factor_count));
            if implied != runs {
                return Err(DesignError::RunsMismatch {
                    runs,
                    factors: factor_count,
                    generators: gens.len(),
                    implied,
                });
            }
        }
        FractionalDesign::with_generators(factor_count, gens)
    }

    /// Builds the fraction whose defining relation is spanned by `words` (any spanning set, e.g.
    /// a whole defining group; `I` and repeated words are ignored). Generated factors are taken
    /// from the last letters, as in published tables.
    ///
    /// # Method
    /// Gaussian elimination over GF(2) (words as bit sets, signs carried along as products),
    /// pivoting on the highest letter of each word, then back-substitution so every pivot letter
    /// appears in exactly one word: `I = ±f·W` reads as the generator `f = ±W`.
    pub fn from_defining_words(
        factor_count: usize,
        words: &[SignedTerm],
    ) -> Result<FractionalDesign, DesignError> {
        let mut basis: Vec<(usize, SignedTerm)> = Vec::new();
        for &w in words {
            let mut w = w;
            for &(pivot, b) in &basis {
                if w.term.contains(pivot) {
                    w = w.times(b);
                }
            }
            if w.term.is_identity() {
                if w.negative {
                    return Err(DesignError::Dependent(
                        "the words contradict each other (I = -I)".into(),
                    ));
                }
                continue;
            }
            let pivot = w.term.span() - 1;
            for entry in &mut basis {
                if entry.1.term.contains(pivot) {
                    entry.1 = entry.1.times(w);
                }
            }
            basis.push((pivot, w));
        }
        basis.sort_by_key(|(pivot, _)| *pivot);
        let generators = basis
            .iter()
            .map(|&(pivot, w)| Generator {
                factor: pivot,
                word: SignedTerm {
                    term: w.term.times(Term::main(pivot)),
                    negative: w.negative,
                },
            })
            .collect();
        FractionalDesign::with_generators(factor_count, generators)
    }

    /// Number of factors k.
    pub fn factor_count(&self) -> usize {
        self.factor_count
    }

    /// Generators (empty for a full factorial).
    pub fn generators(&self) -> &[Generator] {
        &self.generators
    }

    /// Whether this is the full factorial.
    pub fn is_full(&self) -> bool {
        self.generators.is_empty()
    }

    /// Basic factors (0-based, ascending).
    pub fn basic_factors(&self) -> &[usize] {
        &self.basic
    }

    /// Base runs 2^(k−p), before centre points and replicates. Saturates at `usize::MAX` never:
    /// k ≤ 25 keeps it below 2^25.
    pub fn base_runs(&self) -> usize {
        1usize << self.basic.len()
    }

    /// Each factor's column as a signed product of basic factors.
    pub fn solved_columns(&self) -> &[SignedTerm] {
        &self.solved
    }

    /// The column of `term` as a signed product of basic factors: the key of its alias chain.
    pub fn reduce(&self, term: Term) -> SignedTerm {
        term.factors()
            .fold(SignedTerm::plus(Term::IDENTITY), |acc, f| {
                acc.times(self.solved[f])
            })
    }

    /// Coded level (−1 or +1) of factor `factor` in standard-order run `run` (0-based).
    ///
    /// Standard (Yates) order: basic factor `j` (in ascending order) is at +1 when bit `j` of the
    /// run index is set, so the first basic factor changes fastest (Box, Hunter & Hunter 2005,
    /// §5.5).
    pub fn level(&self, run: usize, factor: usize) -> i8 {
        let s = self.solved[factor];
        let mut sign = if s.negative { -1i8 } else { 1 };
        for (j, &b) in self.basic.iter().enumerate() {
            if s.term.contains(b) && run & (1 << j) == 0 {
                sign = -sign;
            }
        }
        sign
    }

    /// All base runs in standard order, coded −1/+1, one row per run.
    pub fn coded_runs(&self) -> Vec<Vec<i8>> {
        (0..self.base_runs())
            .map(|r| (0..self.factor_count).map(|f| self.level(r, f)).collect())
            .collect()
    }

    /// All base runs in standard order as the analysis takes them: coded −1.0/+1.0 rows.
    pub fn coded_rows(&self) -> Vec<Vec<f64>> {
        (0..self.base_runs())
            .map(|r| {
                (0..self.factor_count)
                    .map(|f| f64::from(self.level(r, f)))
                    .collect()
            })
            .collect()
    }

    /// Generators written as text, e.g. `["E=ABCD"]`.
    pub fn generator_labels(&self) -> Vec<String> {
        self.generators.iter().map(ToString::to_string).collect()
    }
}

/// Checks a run count for `factor_count` factors: a power of two, at most 2^k, at least the
/// smallest power of two that exceeds k (every main effect and the mean need their own column).
pub fn check_run_count(factor_count: usize, runs: usize) -> Result<(), DesignError> {
    if !runs.is_power_of_two() {
        return Err(DesignError::RunsNotPowerOfTwo(runs));
    }
    let full = 1u64 << factor_count.min(63);
    if runs as u64 > full {
        return Err(DesignError::RunsAboveFull {
            runs,
            factors: factor_count,
            full,
        });
    }
    let needed = smallest_runs(factor_count);
    if runs < needed {
        return Err(DesignError::RunsTooFew {
            runs,
            factors: factor_count,
            needed,
        });
    }
    Ok(())
}

/// The smallest run size of a two-level design for `factor_count` factors: the smallest power of
/// two N with N ≥ k + 1 (a saturated resolution III design; common practice, no source).
pub fn smallest_runs(factor_count: usize) -> usize {
    (factor_count + 1).next_power_of_two()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn gens(k: usize, s: &str) -> Vec<Generator> {
        Generator::parse_list(s, k).unwrap()
    }

    #[test]
    fn full_factorial_is_in_yates_order() {
        // Standard order of a 2^3 (Box, Hunter & Hunter 2005, Table 5.2): A changes fastest.
        let d = FractionalDesign::full(3).unwrap();
        let runs = d.coded_runs();
        let expected: Vec<Vec<i8>> = vec![
            vec![-1, -1, -1],
            vec![1, -1, -1],
            vec![-1, 1, -1],
            vec![1, 1, -1],
            vec![-1, -1, 1],
            vec![1, -1, 1],
            vec![-1, 1, 1],
            vec![1, 1, 1],
        ];
        assert_eq!(runs, expected);
    }

    #[test]
    fn generated_column_is_signed_product() {
        let d = FractionalDesign::with_generators(4, gens(4, "D=-ABC")).unwrap();
        for row in d.coded_runs() {
            assert_eq!(row[3], -row[0] * row[1] * row[2]);
        }
        assert_eq!(d.base_runs(), 8);
    }

    #[test]
    fn generator_may_name_another_generated_factor() {
        // F = ABE with E = ACD gives F = B·C·D.
        let d = FractionalDesign::with_generators(6, gens(6, "E=ACD, F=ABE")).unwrap();
        assert_eq!(d.solved_columns()[5].term.label(), "BCD");
        for row in d.coded_runs() {
            assert_eq!(row[5], row[0] * row[1] * row[4]);
        }
    }

    #[test]
    fn bad_generators_are_rejected_with_reasons() {
        let cases: &[(usize, &str, &str)] = &[
            (5, "E=ABJ", "beyond the last factor"),
            (5, "E=ABI", "not a factor letter"),
            (5, "EABCD", "expected the form"),
            (5, "E=AE", "both sides"),
            (5, "E=A", "aliases two main effects"),
            (6, "E=ABC, F=ABC", "aliases two main effects"),
            (6, "E=ABC, E=ABD", "set by two generators"),
            (6, "E=ABC, F=ABCE", "product of the other generators"),
        ];
        for (k, text, needle) in cases {
            let err = Generator::parse_list(text, *k)
                .and_then(|g| FractionalDesign::with_generators(*k, g))
                .unwrap_err()
                .to_string();
            assert!(err.contains(needle), "{text}: {err}");
        }
    }

    #[test]
    fn dependent_generators_are_rejected() {
        // F = ABD and D = ABF give the same defining word ABDF twice: the second adds nothing.
        let err = FractionalDesign::from_text(7, None, "E=ABC, F=ABD, D=ABF").unwrap_err();
        assert!(matches!(err, DesignError::Dependent(_)), "{err}");
        // G = EF is not dependent: it solves to G = CD (E = ABC, F = ABD), a valid fraction.
        let d = FractionalDesign::from_text(7, Some(16), "E=ABC, F=ABD, G=EF").unwrap();
        assert_eq!(d.solved_columns()[6].term.label(), "CD");
    }

    #[test]
    fn run_counts_are_checked() {
        assert!(matches!(
            check_run_count(5, 12),
            Err(DesignError::RunsNotPowerOfTwo(12))
        ));
        assert!(matches!(
            check_run_count(3, 16),
            Err(DesignError::RunsAboveFull { .. })
        ));
        assert!(matches!(
            check_run_count(7, 4),
            Err(DesignError::RunsTooFew { needed: 8, .. })
        ));
        assert!(check_run_count(7, 8).is_ok());
        assert!(matches!(
            FractionalDesign::from_text(5, Some(8), "E=ABCD"),
            Err(DesignError::RunsMismatch { implied: 16, .. })
        ));
    }
}
