//! Which terms the model holds, and which error the tests use.
//!
//! # Terms the engineer chose
//! Each label is parsed; a term aliased with the mean cannot be fitted and is refused; a term
//! that is an alias of another chain's representative is fitted as that representative (with a
//! note). With the model set hierarchical the fit adds the missing parents.
//!
//! # The default choice (no terms chosen)
//! One rule for the window's suggestion, the summary page and `twofold analyze`:
//!
//! - **The data carry pure error** (runs with identical settings in the same block: replicated
//!   factorial runs, or two or more centre points): every estimable effect is fitted together with
//!   the curvature column, and each term's adjusted sum of squares is tested against the pure-error
//!   mean square, `F = SS_term / MS_PE` on (1, df_PE) degrees of freedom; the terms with
//!   `p < 0.05` are chosen and closed under hierarchy. This is the analysis of Montgomery,
//!   *Design and Analysis of Experiments*, Example 6-6 (8th ed.; a 2^2 with five centre points),
//!   where effects and curvature are judged against the error the centre points estimate.
//! - **No pure error** (an unreplicated design): the effects beyond Lenth's margin of error,
//!   closed under hierarchy (Lenth 1989, Technometrics 31, 469–473); when Lenth's method is
//!   undefined (fewer than three effects), the main effects.
//!
//! The curvature test of the report uses the pure-error mean square whenever the data carry pure
//! error, the residual otherwise ([`CurvatureTest`]).

use std::collections::BTreeSet;

use twofold_core::anova::{
    ModelFit, ModelSpec, Source, f_upper_p, fit_model, hierarchical_closure, pure_error,
};
use twofold_core::data::Observations;
use twofold_core::effects::EffectMethod;
use twofold_core::effects::EffectTable;
use twofold_core::lenth::{Lenth, Significance};
use twofold_core::term::Term;

use super::ReportError;

/// Most effects the default choice fits at once to test them against pure error when the table is
/// not complete and balanced (the fit costs the cube of this; common practice, no source).
pub const FULL_FIT_MAX_TERMS: usize = 512;

/// Most terms the default choice puts in a model (after closing it under hierarchy) before it
/// turns from Lenth's ME to the simultaneous SME: with thousands of effects, about 5 % of the
/// inactive ones pass the ME by chance (common practice, no source for the number).
pub const DEFAULT_MAX_TERMS: usize = 256;

/// Significance level of the pure-error tests that choose the default terms (Montgomery's 5 %).
pub const TERM_ALPHA: f64 = 0.05;

/// How the model terms were chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum Selection {
    /// Chosen by the engineer (in the project or with `--terms`).
    Given,
    /// Terms significant against pure error at [`TERM_ALPHA`], closed under hierarchy.
    PureErrorTests,
    /// The effects beyond Lenth's margin of error, closed under hierarchy (no pure error).
    LenthMargin,
    /// Lenth's method was undefined and there is no pure error, so the main effects were fitted.
    MainEffects,
}

impl Selection {
    /// The key written in JSON.
    pub fn key(self) -> &'static str {
        match self {
            Selection::Given => "given",
            Selection::PureErrorTests => "pure_error_tests_hierarchical",
            Selection::LenthMargin => "beyond_lenth_me_hierarchical",
            Selection::MainEffects => "main_effects_lenth_undefined",
        }
    }

    /// In words, for the text report, the page and the window.
    pub fn words(self) -> &'static str {
        match self {
            Selection::Given => "as given",
            Selection::PureErrorTests => {
                "terms significant against pure error at the 5 % level, kept hierarchical"
            }
            Selection::LenthMargin => "effects beyond Lenth's ME, kept hierarchical",
            Selection::MainEffects => "main effects, because Lenth's method is undefined",
        }
    }
}

/// Which error the tests of a report use.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum ErrorBasis {
    /// The pure-error mean square of replicated runs or centre points.
    PureError,
    /// The residual mean square of the fitted model (no pure error in the data).
    Residual,
    /// Lenth's pseudo standard error of the effects (unreplicated design, default terms).
    LenthPse,
}

impl ErrorBasis {
    /// The key written in JSON (`"error_basis"`).
    pub fn key(self) -> &'static str {
        match self {
            ErrorBasis::PureError => "pure_error",
            ErrorBasis::Residual => "residual",
            ErrorBasis::LenthPse => "lenth_pse",
        }
    }

    /// One line in words, shown in every front end.
    pub fn sentence(self) -> &'static str {
        match self {
            ErrorBasis::PureError => {
                "The data carry pure error (replicated runs or centre points): the default terms and the curvature test are judged against it; the other F tests of the table use the model's residual."
            }
            ErrorBasis::Residual => {
                "Tests use the residual of the fitted model (the data carry no pure error)."
            }
            ErrorBasis::LenthPse => {
                "Tests use Lenth's pseudo standard error of the effects (unreplicated design, no pure error)."
            }
        }
    }
}

/// The pure error of the data: runs with identical settings in the same block.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PureError {
    /// Sum of squares.
    pub ss: f64,
    /// Degrees of freedom.
    pub df: usize,
    /// Mean square `ss / df`.
    pub ms: f64,
}

impl PureError {
    /// The pure error of a sum of squares and its degrees of freedom; `None` without any.
    pub fn from_ss_df(ss: f64, df: usize) -> Option<PureError> {
        (df > 0).then(|| PureError {
            ss,
            df,
            ms: ss / df as f64,
        })
    }

    /// F and its upper-tail p of a one-degree-of-freedom sum of squares against this error;
    /// `None`s when the pure error is zero.
    pub fn test(&self, ss: f64) -> (Option<f64>, Option<f64>) {
        if self.ms.is_nan() || self.ms <= 0.0 {
            return (None, None);
        }
        let f = ss / self.ms;
        (Some(f), f_upper_p(f, 1, self.df))
    }
}

/// One term tested against pure error when the default terms are chosen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TermTest {
    /// The term (an alias-chain representative).
    pub term: Term,
    /// Its adjusted sum of squares with every estimable effect and curvature fitted.
    pub ss: f64,
    /// `ss / MS_PE`.
    pub f: Option<f64>,
    /// Upper-tail p of `f` on (1, df_PE).
    pub p: Option<f64>,
}

/// The centre-point curvature test of the fitted model, against the report's error.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CurvatureTest {
    /// Used runs at the centre.
    pub centre_runs: usize,
    /// Fitted corner average at the centre minus the centre-point level.
    pub factorial_minus_centre: f64,
    /// Sum of squares on one degree of freedom.
    pub ss: f64,
    /// F against the error named by `basis`.
    pub f: Option<f64>,
    /// Upper-tail p of `f`.
    pub p: Option<f64>,
    /// Degrees of freedom of that error.
    pub df_error: usize,
    /// Pure error when the data carry it, the residual otherwise.
    pub basis: ErrorBasis,
}

impl CurvatureTest {
    /// The fit's curvature, tested against `pure` when there is pure error.
    pub fn of(fit: &ModelFit, pure: Option<&PureError>) -> Option<CurvatureTest> {
        let c = fit.curvature?;
        let (f, p, df_error, basis) = match pure {
            Some(pe) => {
                let (f, p) = pe.test(c.ss);
                (f, p, pe.df, ErrorBasis::PureError)
            }
            None => (c.f, c.p, fit.df_residual, ErrorBasis::Residual),
        };
        Some(CurvatureTest {
            centre_runs: c.centre_runs,
            factorial_minus_centre: c.factorial_minus_centre,
            ss: c.ss,
            f,
            p,
            df_error,
            basis,
        })
    }
}

/// The terms handed to the fit and how they were found.
#[derive(Debug, Clone, PartialEq)]
pub struct ModelChoice {
    /// Terms to fit (chain representatives), in the order of the trade.
    pub terms: Vec<Term>,
    /// How they were chosen.
    pub selection: Selection,
    /// Whether the fit adds missing parents (engineer's terms with a hierarchical model).
    pub hierarchical: bool,
    /// Terms added to keep a default choice hierarchical (for the engineer's terms the fit's own
    /// list, [`ModelFit::added_for_hierarchy`], says it).
    pub added_for_hierarchy: Vec<Term>,
    /// Notes on the terms in words (e.g. a term fitted as its alias).
    pub notes: Vec<String>,
    /// The pure-error tests behind a [`Selection::PureErrorTests`] choice, in effect order.
    pub tests: Vec<TermTest>,
}

/// The engineer's terms, mapped to their chain representatives (see the module documentation).
pub fn given_choice(
    labels: &[String],
    factor_count: usize,
    effects: Option<&EffectTable>,
    hierarchical: bool,
) -> Result<ModelChoice, ReportError> {
    let mut chosen = BTreeSet::new();
    let mut notes = Vec::new();
    for label in labels {
        let t = Term::parse(label, factor_count)?;
        if t.is_identity() {
            continue;
        }
        let Some(table) = effects else {
            chosen.insert(t);
            continue;
        };
        if table.aliasing.is_aliased_with_mean(t) {
            return Err(ReportError::TermAliasedWithMean { term: t.label() });
        }
        match table.aliasing.representative_of(t) {
            Some(rep) if rep.term != t => {
                notes.push(format!("{t} is fitted as its alias {rep}"));
                chosen.insert(rep.term);
            }
            _ => {
                chosen.insert(t);
            }
        }
    }
    Ok(ModelChoice {
        terms: chosen.into_iter().collect(),
        selection: Selection::Given,
        hierarchical,
        added_for_hierarchy: Vec::new(),
        notes,
        tests: Vec::new(),
    })
}

/// The effects Lenth's margins choose: those beyond the ME, or, when those kept hierarchical would
/// make more than [`DEFAULT_MAX_TERMS`] terms, those beyond the SME (which allows for testing so
/// many), with a note saying so. The one rule for the default choice and the effects step's
/// button.
pub fn lenth_selection(effects: &EffectTable, lenth: &Lenth) -> (Vec<Term>, Option<String>) {
    let beyond = |sme_only: bool| -> Vec<Term> {
        effects
            .effects
            .iter()
            .filter(|e| match lenth.classify(e.effect) {
                Significance::WithinMe => false,
                Significance::BeyondMe => !sme_only,
                _ => true,
            })
            .map(|e| e.term)
            .collect()
    };
    let me = beyond(false);
    if hierarchical_closure(&me).len() > DEFAULT_MAX_TERMS {
        let note = format!(
            "of {} effects, {} lie beyond Lenth's ME, more than a model can hold once kept hierarchical (at most {DEFAULT_MAX_TERMS} terms): the effects beyond the SME, which allows for testing so many, are taken instead",
            effects.effects.len(),
            me.len()
        );
        (beyond(true), Some(note))
    } else {
        (me, None)
    }
}

/// The default choice (see the module documentation), with the pure error of the data when it
/// carries any.
pub fn default_choice(
    obs: &Observations,
    effects: &EffectTable,
    lenth: Option<&Lenth>,
) -> (ModelChoice, Option<PureError>) {
    // Pure error comes from the runs alone; only with it are the effects tested, and then by
    // their adjusted sums of squares with every estimable effect fitted: on a complete balanced
    // table (effects by the fast transform) the columns are orthogonal and each is the runs
    // times the squared coefficient; otherwise the full model is fitted, when it is small enough.
    let pure = {
        let (ss, df) = pure_error(obs);
        PureError::from_ss_df(ss, df)
    };
    let mut notes = Vec::new();
    let mut tests = Vec::new();
    let term_ss: Option<Vec<(Term, f64)>> = match &pure {
        Some(pe) if pe.ms > 0.0 => {
            if effects.method == EffectMethod::FastTransform {
                let n = effects.factorial_runs as f64;
                Some(
                    effects
                        .effects
                        .iter()
                        .map(|e| (e.term, n * (e.effect / 2.0).powi(2)))
                        .collect(),
                )
            } else if effects.effects.len() <= FULL_FIT_MAX_TERMS {
                let all: Vec<Term> = effects.effects.iter().map(|e| e.term).collect();
                fit_model(obs, &ModelSpec::new(all).hierarchical(false))
                    .ok()
                    .map(|fit| {
                        effects
                            .effects
                            .iter()
                            .filter_map(|e| {
                                fit.anova_row(Source::Term(e.term)).map(|r| (e.term, r.ss))
                            })
                            .collect()
                    })
            } else {
                notes.push(format!(
                    "{} effects are too many to test against pure error in one fit (at most {FULL_FIT_MAX_TERMS}), so Lenth's margins choose the terms",
                    effects.effects.len()
                ));
                None
            }
        }
        _ => None,
    };
    let (flagged, selection): (Vec<Term>, Selection) = match (&term_ss, &pure) {
        (Some(ss_list), Some(pe)) => {
            for &(term, ss) in ss_list {
                let (f, p) = pe.test(ss);
                tests.push(TermTest { term, ss, f, p });
            }
            let chosen = tests
                .iter()
                .filter(|t| t.p.is_some_and(|p| p < TERM_ALPHA))
                .map(|t| t.term)
                .collect();
            (chosen, Selection::PureErrorTests)
        }
        _ => {
            if pure.is_some_and(|pe| pe.ms <= 0.0) {
                notes.push(
                    "the replicated runs agree exactly (pure error zero), so Lenth's margins choose the terms"
                        .to_string(),
                );
            }
            match lenth {
                Some(l) => {
                    let (terms, note) = lenth_selection(effects, l);
                    notes.extend(note);
                    (terms, Selection::LenthMargin)
                }
                None => (
                    effects
                        .effects
                        .iter()
                        .filter(|e| e.term.order() == 1)
                        .map(|e| e.term)
                        .collect(),
                    Selection::MainEffects,
                ),
            }
        }
    };
    let flagged_set: BTreeSet<Term> = flagged.iter().copied().collect();
    let mut chosen = BTreeSet::new();
    let mut added = Vec::new();
    for t in hierarchical_closure(&flagged) {
        // A lower-order term may be aliased: fit its chain's representative once.
        if effects.aliasing.is_aliased_with_mean(t) {
            continue;
        }
        let rep = effects.aliasing.representative_of(t).map_or(t, |r| r.term);
        if chosen.insert(rep) && !flagged_set.contains(&rep) {
            added.push(rep);
        }
    }
    (
        ModelChoice {
            terms: chosen.into_iter().collect(),
            selection,
            hierarchical: false,
            added_for_hierarchy: added,
            notes,
            tests,
        },
        pure,
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use twofold_core::effects::estimate_effects;

    #[test]
    fn complete_tables_test_each_effect_by_its_own_sum_of_squares() {
        // Montgomery, Example 6-1 (fill height, 2^3 with two replicates; the data of fit_model's
        // own example): SS(A) = 36.00 against pure error 5.00 on 8 df. The tests come from the
        // effects (fast transform) and must equal the full fit's adjusted sums of squares.
        let y = [
            -3., 0., -1., 2., -1., 2., 1., 6., -1., 1., 0., 3., 0., 1., 1., 5.,
        ];
        let levels = (0..16usize)
            .map(|r| {
                (0..3)
                    .map(|f| if (r % 8) >> f & 1 == 1 { 1.0 } else { -1.0 })
                    .collect()
            })
            .collect();
        let obs = Observations::new(
            3,
            levels,
            vec![],
            y.iter().map(|&v| Some(v)).collect(),
            vec![],
        )
        .unwrap();
        let effects = estimate_effects(&obs).unwrap();
        assert_eq!(effects.method, EffectMethod::FastTransform);
        let (choice, pure) = default_choice(&obs, &effects, None);
        let pure = pure.unwrap();
        assert_eq!(pure.df, 8);
        assert!((pure.ss - 5.0).abs() < 1e-9);
        let all: Vec<Term> = effects.effects.iter().map(|e| e.term).collect();
        let full = fit_model(&obs, &ModelSpec::new(all).hierarchical(false)).unwrap();
        assert_eq!(choice.tests.len(), 7);
        for t in &choice.tests {
            let row = full.anova_row(Source::Term(t.term)).unwrap();
            assert!((t.ss - row.ss).abs() < 1e-9, "{}", t.term.label());
        }
        let a = choice
            .tests
            .iter()
            .find(|t| t.term == Term::main(0))
            .unwrap();
        assert!((a.ss - 36.0).abs() < 1e-9);
        assert_eq!(choice.selection, Selection::PureErrorTests);
    }

    #[test]
    fn thousands_of_effects_choose_by_the_sme_and_a_fit_refuses_too_many_terms() {
        // An unreplicated 2^12 of noise (a fixed-seed generator: a test input): about 5 % of
        // 4095 null effects pass Lenth's ME by chance, and kept hierarchical they would fill the
        // model; the choice turns to the SME and says so. Common practice, no source.
        let mut state: u64 = 7;
        let mut uniform = move || {
            // A 64-bit linear congruential generator (Knuth's MMIX constants).
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            (state >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
        };
        let k = 12;
        let levels: Vec<Vec<f64>> = (0..1usize << k)
            .map(|r| {
                (0..k)
                    .map(|f| if r >> f & 1 == 1 { 1.0 } else { -1.0 })
                    .collect()
            })
            .collect();
        let y: Vec<Option<f64>> = levels
            .iter()
            .map(|row| Some(50.0 + 4.0 * row[0] + uniform()))
            .collect();
        let obs = Observations::new(k, levels, vec![], y, vec![]).unwrap();
        let effects = estimate_effects(&obs).unwrap();
        let lenth = twofold_core::lenth::lenth(&effects.contrasts()).unwrap();
        let (choice, _) = default_choice(&obs, &effects, Some(&lenth));
        assert!(
            choice.notes.iter().any(|n| n.contains("beyond the SME")),
            "{:?}",
            choice.notes
        );
        assert!(choice.terms.contains(&Term::main(0)));
        assert!(choice.terms.len() <= DEFAULT_MAX_TERMS);
        // Every effect of a 2^13 at once: more parameters than one fit takes; refused before
        // any work.
        let k = 13;
        let levels: Vec<Vec<f64>> = (0..1usize << k)
            .map(|r| {
                (0..k)
                    .map(|f| if r >> f & 1 == 1 { 1.0 } else { -1.0 })
                    .collect()
            })
            .collect();
        let y = vec![Some(1.0); 1 << k];
        let big = Observations::new(k, levels, vec![], y, vec![]).unwrap();
        let all: Vec<Term> = (1u32..1 << k).map(Term::from_bits).collect();
        assert!(matches!(
            fit_model(&big, &ModelSpec::new(all)),
            Err(twofold_core::anova::FitError::TooManyParameters {
                parameters: 8192,
                ..
            })
        ));
    }
}
