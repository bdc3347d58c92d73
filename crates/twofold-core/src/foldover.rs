//! Fold-over of a regular fraction: the follow-up runs that break chosen aliases.
//!
//! A *full* fold-over repeats the fraction with every sign switched; a *single-factor* fold-over
//! switches the signs of one factor only. In the combined 2N runs a defining word survives when
//! the fold leaves its sign unchanged — words of even length for a full fold-over, words without
//! the folded factor for a single-factor fold-over — and every other word drops out (Box &
//! Hunter 1961, *Technometrics* 3, 449–458; Montgomery 2017, §8.6). A full fold-over of a
//! resolution III design therefore frees every main effect from two-factor interactions; a
//! single-factor fold-over frees that factor's main effect and all its two-factor interactions.
//! The two halves differ by a block effect when they are run at different times.

use crate::alias::{AliasReport, alias_report, defining_group};
use crate::design::{DesignError, FractionalDesign};
use crate::term::{LETTERS, SignedTerm};
use serde::{Deserialize, Serialize};

/// Which signs the follow-up fraction switches.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum FoldKind {
    /// Every factor's sign switched.
    Full,
    /// Only this factor's sign switched (0-based index).
    Factor(usize),
}

impl FoldKind {
    /// Whether the fold switches the sign of defining word `w`.
    fn flips(self, w: SignedTerm) -> bool {
        match self {
            FoldKind::Full => w.term.order() % 2 == 1,
            FoldKind::Factor(f) => w.term.contains(f),
        }
    }

    /// Switches the signs of one run's levels.
    pub fn apply(self, levels: &[i8]) -> Vec<i8> {
        levels
            .iter()
            .enumerate()
            .map(|(i, &v)| match self {
                FoldKind::Full => -v,
                FoldKind::Factor(f) if f == i => -v,
                FoldKind::Factor(_) => v,
            })
            .collect()
    }
}

/// Why a fold-over cannot be made.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum FoldError {
    /// A full factorial has nothing to fold.
    #[error("a full factorial has no aliases to break; there is nothing to fold over")]
    FullFactorial,
    /// The folded factor is not in the design.
    #[error("factor {0} is not in the design")]
    UnknownFactor(usize),
    /// The combined design could not be formed.
    #[error(transparent)]
    Design(#[from] DesignError),
}

/// The follow-up fraction and the combined design.
#[derive(Debug, Clone, PartialEq)]
pub struct FoldOver {
    /// The fold applied.
    pub kind: FoldKind,
    /// Follow-up runs, coded, in the standard order of the original fraction.
    pub follow_up_runs: Vec<Vec<i8>>,
    /// Defining words that drop out (the aliases the follow-up breaks).
    pub broken_words: Vec<SignedTerm>,
    /// The combined 2N-run design (the same fraction repeated when no word drops out).
    pub combined: FractionalDesign,
    /// Aliasing of the combined design.
    pub combined_aliases: AliasReport,
    /// Whether the follow-up merely repeats the original runs (every word keeps its sign).
    pub repeats_original: bool,
}

impl FoldOver {
    /// A plain-words description, e.g. "full fold-over: switch every sign".
    pub fn describe(&self) -> String {
        match self.kind {
            FoldKind::Full => "full fold-over (every sign switched)".to_string(),
            FoldKind::Factor(f) => format!(
                "single-factor fold-over on {} (its signs switched)",
                LETTERS.get(f).copied().unwrap_or('?')
            ),
        }
    }
}

/// Folds `design` over.
pub fn fold_over(design: &FractionalDesign, kind: FoldKind) -> Result<FoldOver, FoldError> {
    if design.is_full() {
        return Err(FoldError::FullFactorial);
    }
    if let FoldKind::Factor(f) = kind
        && f >= design.factor_count()
    {
        return Err(FoldError::UnknownFactor(f));
    }
    let group = defining_group(design);
    let (kept, broken): (Vec<SignedTerm>, Vec<SignedTerm>) = group
        .into_iter()
        .filter(|w| !w.term.is_identity())
        .partition(|&w| !kind.flips(w));
    let repeats_original = broken.is_empty();
    let combined = if repeats_original {
        design.clone()
    } else {
        FractionalDesign::from_defining_words(design.factor_count(), &kept)?
    };
    let mut broken_words = broken;
    broken_words.sort_by_key(|w| w.term);
    let follow_up_runs = design.coded_runs().iter().map(|r| kind.apply(r)).collect();
    Ok(FoldOver {
        kind,
        follow_up_runs,
        broken_words,
        combined_aliases: alias_report(&combined),
        combined,
        repeats_original,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::alias::defining_relation;

    fn labels(w: &[SignedTerm]) -> Vec<String> {
        w.iter().map(ToString::to_string).collect()
    }

    /// The combined runs, as a set, are the original runs plus the follow-up.
    fn assert_combined_is_both(d: &FractionalDesign, f: &FoldOver) {
        let mut both: Vec<Vec<i8>> = d.coded_runs();
        both.extend(f.follow_up_runs.clone());
        both.sort();
        let mut comb = f.combined.coded_runs();
        comb.sort();
        assert_eq!(both, comb);
    }

    #[test]
    fn full_fold_of_a_resolution_iii_design_gives_resolution_iv() {
        // 2^(7-4) with D=AB, E=AC, F=BC, G=ABC folded over fully: the combined 16 runs have the
        // seven even-length words left, resolution IV (Montgomery 2017, Example 8-7 reasoning;
        // the words follow from the relation).
        let d = FractionalDesign::from_text(7, Some(8), "D=AB, E=AC, F=BC, G=ABC").unwrap();
        let f = fold_over(&d, FoldKind::Full).unwrap();
        assert_eq!(f.combined.base_runs(), 16);
        assert_eq!(f.combined_aliases.resolution, Some(4));
        assert_eq!(f.combined_aliases.word_length_pattern, vec![0, 7, 0, 0, 0]);
        assert_eq!(f.broken_words.len(), 8);
        assert_combined_is_both(&d, &f);
    }

    #[test]
    fn single_factor_fold_frees_that_factor() {
        let d = FractionalDesign::from_text(5, Some(8), "D=AB, E=AC").unwrap();
        let f = fold_over(&d, FoldKind::Factor(0)).unwrap();
        let words = defining_relation(&f.combined);
        assert!(
            words.iter().all(|w| !w.term.contains(0)),
            "{:?}",
            labels(&words)
        );
        assert!(
            f.combined_aliases
                .clear_main_effects
                .iter()
                .any(|t| t.label() == "A")
        );
        assert_combined_is_both(&d, &f);
    }

    #[test]
    fn full_fold_of_resolution_iv_repeats_the_runs() {
        let d = FractionalDesign::from_text(6, Some(16), "E=ABC, F=BCD").unwrap();
        let f = fold_over(&d, FoldKind::Full).unwrap();
        assert!(f.repeats_original);
        assert!(fold_over(&FractionalDesign::full(3).unwrap(), FoldKind::Full).is_err());
    }
}
