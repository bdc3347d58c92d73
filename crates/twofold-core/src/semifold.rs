//! Semifolding: half of a fold-over's runs as the follow-up.
//!
//! A fold-over doubles the runs of a fraction. Mee & Peralta (2000, "Semifolding 2^(k−p)
//! designs", *Technometrics* 42(2), 122–134) keep only the half of the fold-over runs in which
//! one other factor is at one level, N/2 runs instead of N. For a resolution IV fraction
//! semifolded on a factor, the 1.5N combined runs estimate that factor's two-factor interactions
//! as the full single-factor fold-over does, though no longer orthogonally (their main claim, as
//! remembered; the paper itself was not at hand). The combined runs are not a regular fraction,
//! so alias chains do not describe them: what they estimate is worked out by least squares on
//! the runs themselves ([`crate::estimability`]), with the follow-up as a block of its own.
//!
//! The model checked for a fold on factor f is the one the full fold-over on f estimates: the
//! intercept, the block, every main effect, every two-factor interaction of f (clear in the full
//! fold-over) and one two-factor interaction of each remaining chain. For a full semifold it is every main effect with, one at a
//! time, each two-factor interaction aliased with a main effect in the fraction: a pair is
//! *separated* when both are estimable in that model. The factor that picks the kept half is
//! constant in block 2, so the block absorbs its contrast there and its own pairs stay aliased.

use crate::alias::{alias_report, aliases_of};
use crate::design::FractionalDesign;
use crate::estimability::{Estimability, estimability};
use crate::foldover::{FoldError, FoldKind, fold_over};
use crate::term::{LETTERS, Term, main_effects_and_two_factor_interactions};
use serde::{Deserialize, Serialize};

/// Which fold-over runs a semifold keeps.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct SemiFold {
    /// The fold whose runs are halved.
    pub fold: FoldKind,
    /// The factor (0-based) whose level picks the half kept.
    pub keep: usize,
    /// Its level in the kept half of the fold-over runs, −1 or +1.
    pub level: i8,
}

impl SemiFold {
    /// The documented default half: the fold-over runs with the first factor other than the
    /// folded one at +1 (for a full fold, factor A at +1).
    pub fn with_default_half(fold: FoldKind) -> SemiFold {
        let keep = match fold {
            FoldKind::Factor(0) => 1,
            _ => 0,
        };
        SemiFold {
            fold,
            keep,
            level: 1,
        }
    }

    /// A plain-words description, e.g. "semifold on A (the fold-over runs with B at +)".
    pub fn describe(&self) -> String {
        let l = |i: usize| LETTERS.get(i).copied().unwrap_or('?');
        let half = format!(
            "the fold-over runs with {} at {}",
            l(self.keep),
            if self.level > 0 { "+" } else { "−" }
        );
        match self.fold {
            FoldKind::Full => format!("full semifold (every sign switched, {half})"),
            FoldKind::Factor(f) => format!("semifold on {} (its signs switched, {half})", l(f)),
        }
    }

    /// The short label used by `twofold plan --fold`: `semifold:A:B+`, `semifold:full:A-`.
    pub fn label(&self) -> String {
        let l = |i: usize| LETTERS.get(i).copied().unwrap_or('?');
        let fold = match self.fold {
            FoldKind::Full => "full".to_string(),
            FoldKind::Factor(f) => l(f).to_string(),
        };
        format!(
            "semifold:{fold}:{}{}",
            l(self.keep),
            if self.level > 0 { '+' } else { '-' }
        )
    }
}

/// Why a semifold cannot be made.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum SemiFoldError {
    /// The fold-over itself cannot be made.
    #[error(transparent)]
    Fold(#[from] FoldError),
    /// The factor choosing the half is not in the design.
    #[error("factor {0} is not in the design")]
    UnknownFactor(usize),
    /// The half is chosen by the folded factor itself.
    #[error("the kept half is chosen by a factor other than the folded one")]
    KeepIsFolded,
    /// The level is not −1 or +1.
    #[error("the kept half is the runs at level −1 or +1, not {0}")]
    BadLevel(i8),
    /// The fold switches no defining word.
    #[error("this fold switches no defining word, so its runs would only repeat the fraction")]
    RepeatsRuns,
}

/// The follow-up half and what the combined runs estimate.
#[derive(Debug, Clone, PartialEq)]
pub struct SemiFoldOver {
    /// The semifold made.
    pub spec: SemiFold,
    /// Follow-up runs, coded, in the standard order of the original fraction.
    pub follow_up_runs: Vec<Vec<i8>>,
    /// The combined runs: the fraction (block 1) then the follow-up (block 2).
    pub combined_runs: Vec<Vec<i8>>,
    /// Block of each combined run (1 or 2).
    pub combined_blocks: Vec<u32>,
    /// How the combined runs estimate the model checked (see the module documentation and
    /// [`full_fold_model`]); for a full semifold, the main effects alone with the block.
    pub estimability: Estimability,
    /// Main effect and two-factor interaction pairs aliased in the fraction that the combined
    /// runs separate (both estimable in a model of all main effects and that interaction).
    pub separated: Vec<(Term, Term)>,
    /// Such pairs the combined runs still cannot separate.
    pub not_separated: Vec<(Term, Term)>,
}

impl SemiFoldOver {
    /// The folded factor's two-factor interactions with whether each is estimable and its
    /// variance inflation (empty for a full semifold).
    pub fn folded_interactions(&self) -> Vec<crate::estimability::TermEstimability> {
        let FoldKind::Factor(f) = self.spec.fold else {
            return Vec::new();
        };
        self.estimability
            .terms
            .iter()
            .filter(|t| t.term.order() == 2 && t.term.contains(f))
            .copied()
            .collect()
    }
}

/// The model the combined runs of a full fold-over estimate: every main effect, and one
/// two-factor interaction of each chain of two-factor interactions that holds no main effect
/// (the first in standard order).
pub fn full_fold_model(combined: &FractionalDesign) -> Vec<Term> {
    let k = combined.factor_count();
    let mut model: Vec<Term> = (0..k).map(Term::main).collect();
    for t in main_effects_and_two_factor_interactions(k) {
        if t.order() != 2 {
            continue;
        }
        let aliases = aliases_of(combined, t, 2);
        if aliases
            .iter()
            .any(|a| a.term.order() == 1 || model.contains(&a.term))
        {
            continue;
        }
        model.push(t);
    }
    model
}

/// The follow-up runs of the semifold `spec` of `design` alone: the same checks as [`semifold`]
/// and the same runs, without the estimability and alias analysis (for laying out a sheet).
pub fn semifold_runs(
    design: &FractionalDesign,
    spec: SemiFold,
) -> Result<Vec<Vec<i8>>, SemiFoldError> {
    checked_half(design, spec).map(|(_, runs)| runs)
}

/// The fold-over of `spec` and the half of its runs the semifold keeps, after the checks.
fn checked_half(
    design: &FractionalDesign,
    spec: SemiFold,
) -> Result<(crate::foldover::FoldOver, Vec<Vec<i8>>), SemiFoldError> {
    let k = design.factor_count();
    let fold = fold_over(design, spec.fold)?;
    if spec.keep >= k {
        return Err(SemiFoldError::UnknownFactor(spec.keep));
    }
    if spec.fold == FoldKind::Factor(spec.keep) {
        return Err(SemiFoldError::KeepIsFolded);
    }
    if spec.level != 1 && spec.level != -1 {
        return Err(SemiFoldError::BadLevel(spec.level));
    }
    if fold.repeats_original {
        return Err(SemiFoldError::RepeatsRuns);
    }
    let runs = fold
        .follow_up_runs
        .iter()
        .filter(|r| r[spec.keep] == spec.level)
        .cloned()
        .collect();
    Ok((fold, runs))
}

/// Semifolds `design` as `spec` says (see the module documentation).
pub fn semifold(design: &FractionalDesign, spec: SemiFold) -> Result<SemiFoldOver, SemiFoldError> {
    let k = design.factor_count();
    let (fold, follow_up_runs) = checked_half(design, spec)?;
    let mut combined_runs = design.coded_runs();
    let mut combined_blocks = vec![1; combined_runs.len()];
    combined_runs.extend(follow_up_runs.iter().cloned());
    combined_blocks.resize(combined_runs.len(), 2);
    let mains: Vec<Term> = (0..k).map(Term::main).collect();
    let model = match spec.fold {
        FoldKind::Factor(_) => full_fold_model(&fold.combined),
        FoldKind::Full => mains.clone(),
    };
    let est = estimability(&combined_runs, &combined_blocks, &model);
    // Main effects aliased with two-factor interactions in the fraction: separated or not.
    let report = alias_report(design);
    let mut separated = Vec::new();
    let mut not_separated = Vec::new();
    for (t, aliases) in &report.aliases {
        if t.order() != 1 {
            continue;
        }
        for a in aliases.iter().filter(|a| a.term.order() == 2) {
            let mut m = mains.clone();
            m.push(a.term);
            let e = estimability(&combined_runs, &combined_blocks, &m);
            let both = e.get(*t).is_some_and(|x| x.estimable)
                && e.get(a.term).is_some_and(|x| x.estimable);
            if both {
                separated.push((*t, a.term));
            } else {
                not_separated.push((*t, a.term));
            }
        }
    }
    Ok(SemiFoldOver {
        spec,
        follow_up_runs,
        combined_runs,
        combined_blocks,
        estimability: est,
        separated,
        not_separated,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::alias::defining_group;

    /// 2^(6−2) with E = ABC, F = BCD: resolution IV, sixteen runs (Montgomery's 2^(6−2)_IV
    /// example generators).
    fn res_iv() -> FractionalDesign {
        FractionalDesign::from_text(6, Some(16), "E=ABC, F=BCD").unwrap()
    }

    #[test]
    fn a_semifold_adds_half_the_fold_over_runs() {
        let d = res_iv();
        let s = semifold(&d, SemiFold::with_default_half(FoldKind::Factor(0))).unwrap();
        assert_eq!(s.spec.keep, 1);
        assert_eq!(s.follow_up_runs.len(), 8);
        assert_eq!(s.combined_runs.len(), 24);
        // Each kept run is an original run with A switched, and has B at +.
        let original = d.coded_runs();
        for r in &s.follow_up_runs {
            assert_eq!(r[1], 1);
            let mut back = r.clone();
            back[0] = -back[0];
            assert!(original.contains(&back));
            assert!(!original.contains(r), "a folded run is new");
        }
    }

    #[test]
    fn the_runs_alone_agree_with_the_full_semifold() {
        // Two routes to the same runs: `semifold_runs` must give exactly the runs and the
        // refusals of `semifold`, for every fold, kept factor and level (bad ones included).
        let d = res_iv();
        let folds = std::iter::once(FoldKind::Full).chain((0..7).map(FoldKind::Factor));
        for fold in folds {
            for keep in 0..7 {
                for level in [-1, 1, 0] {
                    let spec = SemiFold { fold, keep, level };
                    let full = semifold(&d, spec).map(|s| s.follow_up_runs);
                    assert_eq!(semifold_runs(&d, spec), full, "{spec:?}");
                }
            }
        }
    }

    #[test]
    fn semifolding_a_resolution_iv_design_on_a_factor_frees_its_interactions() {
        // Mee & Peralta 2000 (from memory): semifolding a resolution IV 2^(k−p) on a factor makes
        // all its two-factor interactions estimable, as the full single-factor fold-over does,
        // at half the runs, though not orthogonally. Checked here for every factor of five
        // resolution IV fractions of 16 and 32 runs (the resolution asserted) and every choice
        // of the half, against the full fold-over.
        for (k, n, gens) in [
            (6, 16, "E=ABC, F=BCD"),
            (7, 16, "E=ABC, F=BCD, G=ACD"),
            (8, 16, "E=BCD, F=ACD, G=ABC, H=ABD"),
            (9, 32, "F=BCDE, G=ACDE, H=ABDE, J=ABCE"),
            (10, 32, "F=ABCD, G=ABCE, H=ABDE, J=ACDE, K=BCDE"),
        ] {
            let d = FractionalDesign::from_text(k, Some(n), gens).unwrap();
            assert_eq!(alias_report(&d).resolution, Some(4), "{gens}");
            for f in 0..k {
                let full = fold_over(&d, FoldKind::Factor(f)).unwrap();
                if full.repeats_original {
                    continue;
                }
                // In the full fold-over, every interaction of f is clear (words with f drop out).
                let clear = &full.combined_aliases.clear_two_factor_interactions;
                assert_eq!(
                    clear.iter().filter(|t| t.contains(f)).count(),
                    k - 1,
                    "{gens} fold on {f}"
                );
                for keep in (0..k).filter(|&j| j != f) {
                    for level in [-1, 1] {
                        let spec = SemiFold {
                            fold: FoldKind::Factor(f),
                            keep,
                            level,
                        };
                        let s = semifold(&d, spec).unwrap();
                        assert!(s.estimability.full_rank(), "{gens} {}", spec.label());
                        let inter = s.folded_interactions();
                        assert_eq!(inter.len(), k - 1);
                        // Estimable, but not all orthogonal: some variance inflation above 1.
                        assert!(inter.iter().all(|t| t.variance_inflation.is_some()));
                        let worst = inter
                            .iter()
                            .filter_map(|t| t.variance_inflation)
                            .fold(0.0, f64::max);
                        assert!(worst > 1.0 + 1e-9, "{gens} {}", spec.label());
                    }
                }
            }
        }
    }

    #[test]
    fn the_same_model_is_not_estimable_from_the_fraction_alone() {
        // The check above is not vacuous: in the fraction AE = BC (E = ABC), and the model of
        // the full fold-over on A holds both, so the fraction alone is rank deficient.
        let d = res_iv();
        let fold = fold_over(&d, FoldKind::Factor(0)).unwrap();
        let model = full_fold_model(&fold.combined);
        let ae = Term::parse("AE", 6).unwrap();
        let bc = Term::parse("BC", 6).unwrap();
        assert!(model.contains(&ae) && model.contains(&bc));
        let rows = d.coded_runs();
        let e = estimability(&rows, &vec![1; rows.len()], &model);
        assert!(!e.full_rank());
        assert!(!e.get(ae).unwrap().estimable);
        // In the full fold-over (word BCDF left) the 2FIs are A's five, BE, CE, DE, EF clear and
        // one each of BC = DF, BD = CF, BF = CD: twelve.
        assert_eq!(model.len(), 6 + 12);
        assert_eq!(defining_group(&d).len(), 4);
    }

    #[test]
    fn a_full_semifold_of_a_resolution_iii_design_separates_main_effects_from_interactions() {
        // 2^(7−4)_III, D = AB, E = AC, F = BC, G = ABC: every main effect is aliased with three
        // two-factor interactions. Its full fold-over frees them all (Montgomery's fold-over
        // example); half of it is checked pair by pair on the runs.
        let d = FractionalDesign::from_text(7, Some(8), "D=AB, E=AC, F=BC, G=ABC").unwrap();
        let s = semifold(&d, SemiFold::with_default_half(FoldKind::Full)).unwrap();
        assert_eq!(s.follow_up_runs.len(), 4);
        assert!(s.estimability.full_rank());
        assert_eq!(s.separated.len() + s.not_separated.len(), 21);
        // The factor picking the half (A, at + by default) is constant in block 2, so only
        // its own three pairs stay aliased; the other 18 are separated.
        assert_eq!(s.separated.len(), 18);
        assert!(s.not_separated.iter().all(|(m, _)| m.label() == "A"));
    }

    #[test]
    fn bad_semifolds_say_why() {
        let d = res_iv();
        let cases = [
            (
                SemiFold {
                    fold: FoldKind::Factor(0),
                    keep: 0,
                    level: 1,
                },
                SemiFoldError::KeepIsFolded,
            ),
            (
                SemiFold {
                    fold: FoldKind::Factor(0),
                    keep: 9,
                    level: 1,
                },
                SemiFoldError::UnknownFactor(9),
            ),
            (
                SemiFold {
                    fold: FoldKind::Factor(0),
                    keep: 1,
                    level: 0,
                },
                SemiFoldError::BadLevel(0),
            ),
            (
                SemiFold::with_default_half(FoldKind::Full),
                SemiFoldError::RepeatsRuns,
            ),
        ];
        for (spec, want) in cases {
            assert_eq!(semifold(&d, spec), Err(want), "{}", spec.label());
        }
    }
}
