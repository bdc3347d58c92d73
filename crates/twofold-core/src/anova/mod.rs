//! Least-squares fit of a chosen model, with its analysis of variance.
//!
//! # The model
//!
//! For one response, the fit regresses the used runs (value present, not excluded) on, in this
//! order:
//!
//! 1. the intercept;
//! 2. one column per block but the last, sum-coded (+1 in the block, −1 in the last block, 0
//!    elsewhere), so that the intercept is the average over blocks and predictions are for an
//!    average block;
//! 3. the chosen terms, in the order of the trade (main effects, then two-factor interactions,
//!    ...), each the product of its factors' coded columns;
//! 4. when the runs include centre points and other points, a centre-point indicator (1 at a
//!    centre point, 0 elsewhere), which carries the single-degree-of-freedom curvature contrast.
//!
//! Columns are checked in that order for linear dependence on the columns before them (modified
//! Gram–Schmidt with re-orthogonalisation, tolerance [`crate::prec::RANK_REL`]); a dependent
//! column is left out and reported in [`ModelFit::unestimable`] with the combination of earlier
//! columns it equals, instead of being given a meaningless estimate. The kept columns are then
//! solved by Householder QR (nalgebra).
//!
//! # The analysis of variance
//!
//! With the columns in the order above, the squared entries of `Qᵀy` are the sequential sums of
//! squares (Montgomery, *Design and Analysis of Experiments*, regression chapter, extra sum of
//! squares method; from memory). The table holds:
//!
//! * **Blocks**: sequential, after the intercept and before the terms, as the block indicators are
//!   fitted first;
//! * **Model**: all terms together, after blocks (sequential);
//! * **each term**: its adjusted (partial, "Type III") sum of squares, `b_j² / [(XᵀX)⁻¹]_jj`, the
//!   increase in residual sum of squares when that column alone is dropped (Searle, *Linear
//!   Models*, 1971; from memory). When the term columns are orthogonal once blocks are fitted the
//!   adjusted and sequential sums coincide and add up to the Model row;
//!   [`ModelFit::sums_of_squares_kind`] says which case holds;
//! * **Curvature**: the adjusted sum of squares of the centre-point indicator, which for a
//!   balanced unblocked design equals `n_F·n_C·(ȳ_F − ȳ_C)²/(n_F + n_C)` (Montgomery, section on
//!   adding centre points to the 2^k design, eq. for SS_curvature; verified via Example 6-6);
//! * **Residual**, split into **Lack of fit** and **Pure error** when runs are repeated;
//! * **Total**, corrected for the mean.
//!
//! Pure error comes from groups of used runs with identical coded settings *in the same block*:
//! runs in different blocks differ by a fitted block effect, so their difference is not pure
//! replication error. Every model column is constant within such a group, so pure error always
//! lies inside the residual and lack of fit = residual − pure error is never negative.
//!
//! All F ratios for model sources use the residual mean square; the lack-of-fit F uses the pure
//! error mean square (Montgomery, lack-of-fit test in the regression chapter; from memory).

mod distributions;
mod equation;
pub(crate) mod fit;
pub(crate) mod gram;

/// Most parameters one fit takes: its `(XᵀX)⁻¹` holds the square of this many numbers (4096²
/// doubles are 128 MiB), so memory stays bounded whatever model is asked for.
pub const MAX_PARAMETERS: usize = 4096;

pub use distributions::f_upper_p;
pub(crate) use distributions::{t_quantile, t_two_sided_p};
pub use equation::{Equation, EquationTerm, Units, format_number};
pub use fit::{fit_model, pure_error, residual_ss_for};

use crate::columns::term_value;
use crate::term::{Term, factor_letter};
use nalgebra::{DMatrix, DVector};
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::fmt;

/// Which terms to fit, for one response.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(default)]
pub struct ModelSpec {
    /// The chosen terms (any order; the identity and repeats are ignored).
    pub terms: Vec<Term>,
    /// Add every lower-order term contained in a chosen term (for `ABC`: A, B, C, AB, AC, BC), so
    /// that the model is hierarchical.
    pub hierarchical: bool,
    /// Fit a centre-point curvature column when the runs include centre points (default `true`).
    /// With `false` the curvature stays in the residual, as part of the lack of fit.
    pub curvature: bool,
}

impl Default for ModelSpec {
    fn default() -> Self {
        ModelSpec {
            terms: Vec::new(),
            hierarchical: false,
            curvature: true,
        }
    }
}

impl ModelSpec {
    /// A model of the given terms, not closed under hierarchy, with curvature fitted when centre
    /// points are present.
    pub fn new(terms: Vec<Term>) -> ModelSpec {
        ModelSpec {
            terms,
            ..ModelSpec::default()
        }
    }

    /// The same model with hierarchy switched on or off.
    #[must_use]
    pub fn hierarchical(mut self, on: bool) -> ModelSpec {
        self.hierarchical = on;
        self
    }

    /// The same model with the centre-point curvature column switched on or off.
    #[must_use]
    pub fn with_curvature(mut self, on: bool) -> ModelSpec {
        self.curvature = on;
        self
    }
}

/// Every non-empty term contained in one of `terms` (the terms themselves included), in the order
/// of the trade. For `ABC` this adds A, B, C, AB, AC and BC.
pub fn hierarchical_closure(terms: &[Term]) -> Vec<Term> {
    let mut seen: std::collections::HashSet<u32> = std::collections::HashSet::new();
    // Highest order first: a term already in the set brought all its parents with it.
    let mut sorted: Vec<u32> = terms.iter().map(|t| t.bits()).collect();
    sorted.sort_unstable_by_key(|b| std::cmp::Reverse(b.count_ones()));
    for bits in sorted {
        if seen.contains(&bits) {
            continue;
        }
        // Walk the non-empty sub-bitsets of `bits` (standard submask enumeration).
        let mut s = bits;
        while s != 0 {
            seen.insert(s);
            s = (s - 1) & bits;
        }
    }
    let mut out: Vec<Term> = seen.into_iter().map(Term::from_bits).collect();
    out.sort_unstable();
    out
}

/// Why a model cannot be fitted.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum FitError {
    /// No run has a response value that is not excluded.
    #[error("no run has a response value (all missing or excluded)")]
    NoUsableRuns,
    /// Fewer used runs than parameters to estimate.
    #[error("the model has {parameters} parameters but only {runs} runs have a usable response")]
    TooFewRuns {
        /// Used runs.
        runs: usize,
        /// Intercept, block, term and curvature parameters requested.
        parameters: usize,
    },
    /// More parameters than one fit holds (its tables grow with their square).
    #[error(
        "the model has {parameters} parameters, more than one fit takes ({max}); choose fewer terms"
    )]
    TooManyParameters {
        /// Intercept, block, term and curvature parameters requested.
        parameters: usize,
        /// The most one fit takes ([`MAX_PARAMETERS`]).
        max: usize,
    },
    /// A term names a factor the design does not have.
    #[error("term `{term}` uses a factor beyond the design's {factor_count} factors")]
    TermBeyondFactors {
        /// The term label.
        term: String,
        /// Factors in the design.
        factor_count: usize,
    },
}

/// Why a set of factor ranges (low, high in natural units) cannot be used.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum RangeError {
    /// Wrong number of ranges or settings.
    #[error("{found} factor {what} given, the design has {expected} factors")]
    Count {
        /// What was counted ("ranges" or "settings").
        what: &'static str,
        /// How many were given.
        found: usize,
        /// Factors in the design.
        expected: usize,
    },
    /// Low and high are equal, so coded units are undefined.
    #[error("factor {factor}: low and high are both {value}; they must differ")]
    Degenerate {
        /// Factor letter.
        factor: char,
        /// The common value.
        value: f64,
    },
    /// A low, high or setting is not a finite number.
    #[error("factor {factor}: {value} is not a finite number")]
    NotFinite {
        /// Factor letter.
        factor: char,
        /// The value found.
        value: f64,
    },
}

/// Checks `ranges` for `factor_count` factors and returns (midpoint, half-range) per factor.
pub(crate) fn centre_and_half_range(
    ranges: &[(f64, f64)],
    factor_count: usize,
) -> Result<Vec<(f64, f64)>, RangeError> {
    if ranges.len() != factor_count {
        return Err(RangeError::Count {
            what: "ranges",
            found: ranges.len(),
            expected: factor_count,
        });
    }
    ranges
        .iter()
        .enumerate()
        .map(|(i, &(lo, hi))| {
            let factor = factor_letter(i).unwrap_or('?');
            for v in [lo, hi] {
                if !v.is_finite() {
                    return Err(RangeError::NotFinite { factor, value: v });
                }
            }
            if lo == hi {
                return Err(RangeError::Degenerate { factor, value: lo });
            }
            Ok(((lo + hi) / 2.0, (hi - lo) / 2.0))
        })
        .collect()
}

/// One column of the fitted regression.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[non_exhaustive]
pub enum Column {
    /// The column of ones.
    Intercept,
    /// The sum-coded indicator of a block (by label); the last block has none of its own.
    Block(u32),
    /// An effect term.
    Term(Term),
    /// The centre-point indicator.
    Curvature,
}

impl fmt::Display for Column {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Column::Intercept => f.write_str("intercept"),
            Column::Block(b) => write!(f, "block {b}"),
            Column::Term(t) => write!(f, "{t}"),
            Column::Curvature => f.write_str("curvature"),
        }
    }
}

/// A column left out of the fit because it is a combination of columns fitted before it.
#[derive(Debug, Clone, PartialEq)]
pub struct Unestimable {
    /// The column left out.
    pub column: Column,
    /// The earlier columns it equals, with their multipliers (e.g. `[(AB, 1.0)]` when `D = AB`
    /// on the used runs). Empty when the column is zero on every used run.
    pub aliased_with: Vec<(Column, f64)>,
}

/// A coefficient in coded units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Coefficient {
    /// The term (`Term::IDENTITY` for the intercept).
    pub term: Term,
    /// Least-squares estimate (half the effect for a ±1 column).
    pub estimate: f64,
    /// Standard error; `None` without residual degrees of freedom.
    pub std_error: Option<f64>,
    /// `estimate / std_error`.
    pub t: Option<f64>,
    /// Two-sided p-value of `t` on the residual degrees of freedom.
    pub p: Option<f64>,
}

/// Estimated effect of one block, relative to the average block (sum coding: the effects add up
/// to zero).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BlockEffect {
    /// The block label.
    pub label: u32,
    /// Block mean minus the average over blocks, adjusted for the terms.
    pub effect: f64,
}

/// The centre-point curvature test.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Curvature {
    /// Used runs at the centre.
    pub centre_runs: usize,
    /// Used runs elsewhere.
    pub factorial_runs: usize,
    /// Fitted value at the centre from the factorial model minus the centre-point level, adjusted
    /// for blocks and terms; equals `ȳ_F − ȳ_C` for a balanced unblocked design.
    pub factorial_minus_centre: f64,
    /// Standard error of that difference; `None` without residual degrees of freedom.
    pub std_error: Option<f64>,
    /// Sum of squares on one degree of freedom.
    pub ss: f64,
    /// F against the residual mean square.
    pub f: Option<f64>,
    /// Upper-tail p-value of `f`.
    pub p: Option<f64>,
}

/// A source of variation in the ANOVA table.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[non_exhaustive]
pub enum Source {
    /// Blocks, fitted first.
    Blocks,
    /// All terms together, after blocks.
    Model,
    /// One term, adjusted for everything else in the model (a part of Model).
    Term(Term),
    /// The centre-point contrast, adjusted for blocks and terms.
    Curvature,
    /// What the model leaves.
    Residual,
    /// The part of the residual that repeated runs do not explain (a part of Residual).
    LackOfFit,
    /// Variation among runs with identical settings in the same block (a part of Residual).
    PureError,
    /// Total, corrected for the mean.
    Total,
}

impl fmt::Display for Source {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Source::Blocks => f.write_str("Blocks"),
            Source::Model => f.write_str("Model"),
            Source::Term(t) => write!(f, "{t}"),
            Source::Curvature => f.write_str("Curvature"),
            Source::Residual => f.write_str("Residual"),
            Source::LackOfFit => f.write_str("Lack of fit"),
            Source::PureError => f.write_str("Pure error"),
            Source::Total => f.write_str("Total"),
        }
    }
}

/// One row of the ANOVA table.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AnovaRow {
    /// The source.
    pub source: Source,
    /// Degrees of freedom.
    pub df: usize,
    /// Sum of squares.
    pub ss: f64,
    /// Mean square `ss / df`; `None` for zero df and for the Total row.
    pub ms: Option<f64>,
    /// F ratio; `None` where the denominator has no degrees of freedom or is zero.
    pub f: Option<f64>,
    /// Upper-tail p-value of `f`.
    pub p: Option<f64>,
}

/// How the term rows of the ANOVA table relate to the Model row.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[non_exhaustive]
pub enum SumsOfSquaresKind {
    /// The term columns (and curvature) are orthogonal once blocks are fitted: each term's
    /// adjusted sum of squares is also its sequential one, and they add up to the Model row.
    Orthogonal,
    /// The columns are not orthogonal (e.g. runs missing): term rows are adjusted (partial,
    /// "Type III") sums of squares and need not add up to the Model row.
    Adjusted,
}

/// The result of fitting one model to one response.
#[derive(Debug, Clone, PartialEq)]
pub struct ModelFit {
    /// Factors in the design.
    pub factor_count: usize,
    /// Terms added to keep the model hierarchical (empty unless asked for).
    pub added_for_hierarchy: Vec<Term>,
    /// Terms fitted, in the order of the trade.
    pub terms: Vec<Term>,
    /// Columns left out as combinations of earlier ones.
    pub unestimable: Vec<Unestimable>,
    /// The intercept: the fitted value at the centre of the box for an average block, without
    /// the curvature column.
    pub intercept: Coefficient,
    /// One coefficient per fitted term, in coded units, same order as `terms`.
    pub coefficients: Vec<Coefficient>,
    /// Block effects (empty for one block).
    pub block_effects: Vec<BlockEffect>,
    /// The curvature test, when curvature was fitted and estimable.
    pub curvature: Option<Curvature>,
    /// The ANOVA table: Blocks, Model, terms, Curvature, Residual, Lack of fit, Pure error, Total
    /// (rows that do not apply are left out).
    pub anova: Vec<AnovaRow>,
    /// Whether the term rows are also sequential sums of squares.
    pub sums_of_squares_kind: SumsOfSquaresKind,
    /// `1 − SS_res/SS_total` (blocks and curvature count as fitted); `None` when the response is
    /// constant.
    pub r2: Option<f64>,
    /// `1 − (SS_res/df_res)/(SS_total/(n − 1))`; `None` without residual df.
    pub adj_r2: Option<f64>,
    /// `1 − PRESS/SS_total`; `None` when PRESS is undefined.
    pub pred_r2: Option<f64>,
    /// Prediction error sum of squares `Σ (e_i/(1 − h_ii))²` (Allen 1974, Technometrics 16,
    /// 125–127; from memory); `None` when a run has leverage 1.
    pub press: Option<f64>,
    /// Residual standard deviation `√MS_res`; `None` without residual df.
    pub sigma: Option<f64>,
    /// Residual mean square; `None` without residual df.
    pub ms_residual: Option<f64>,
    /// Residual degrees of freedom `n − p`.
    pub df_residual: usize,
    /// Parameters fitted `p` (intercept, blocks, terms, curvature).
    pub parameter_count: usize,
    /// 0-based table indices of the runs used, in table order.
    pub runs: Vec<usize>,
    /// Observed response of each used run.
    pub observed: Vec<f64>,
    /// Fitted value of each used run (blocks and curvature included).
    pub fitted: Vec<f64>,
    /// Residual `observed − fitted` of each used run.
    pub residuals: Vec<f64>,
    /// Leverage `h_ii` (diagonal of the hat matrix) of each used run.
    pub leverage: Vec<f64>,
    columns: Vec<Column>,
    estimates: Vec<f64>,
    xtx_inv: DMatrix<f64>,
}

impl ModelFit {
    /// The fitted columns, in fitting order (intercept, blocks, terms, curvature).
    pub fn columns(&self) -> &[Column] {
        &self.columns
    }

    /// The ANOVA row of `source`, if the table has one.
    pub fn anova_row(&self, source: Source) -> Option<&AnovaRow> {
        self.anova.iter().find(|r| r.source == source)
    }

    /// The coefficient of `term`, if it was fitted.
    pub fn coefficient(&self, term: Term) -> Option<&Coefficient> {
        self.coefficients.iter().find(|c| c.term == term)
    }

    /// The regression row of a coded point for an average block, without the curvature column.
    fn point_row(&self, coded: &[f64]) -> DVector<f64> {
        DVector::from_iterator(
            self.columns.len(),
            self.columns.iter().map(|c| match c {
                Column::Intercept => 1.0,
                Column::Term(t) => term_value(coded, *t),
                Column::Block(_) | Column::Curvature => 0.0,
            }),
        )
    }

    /// Fitted value at a coded point (one setting per factor) for an average block, from the
    /// equation in coded units.
    pub fn value_at(&self, coded: &[f64]) -> f64 {
        let x0 = self.point_row(coded);
        x0.iter().zip(&self.estimates).map(|(a, b)| a * b).sum()
    }

    /// `x₀ᵀ(XᵀX)⁻¹x₀` at a coded point: the variance of the fitted value in units of σ².
    pub(crate) fn variance_factor(&self, coded: &[f64]) -> f64 {
        let x0 = self.point_row(coded);
        (x0.transpose() * &self.xtx_inv * &x0)[(0, 0)]
    }

    /// The equation in coded units.
    pub fn equation_coded(&self) -> Equation {
        let terms: Vec<EquationTerm> = self
            .coefficients
            .iter()
            .map(|c| EquationTerm {
                term: c.term,
                coefficient: c.estimate,
            })
            .collect();
        let mut eq = Equation {
            units: Units::Coded,
            intercept: self.intercept.estimate,
            terms,
            text: String::new(),
        };
        eq.text = eq.format_with_names(&[]);
        eq
    }

    /// The equation in natural units, given each factor's (low, high).
    ///
    /// # Formula
    /// With coded `x_i = (X_i − m_i)/h_i = a_i X_i + c_i` (`m_i` the midpoint, `h_i` the
    /// half-range, `a_i = 1/h_i`, `c_i = −m_i/h_i`), a coded term `β_T Π_{i∈T} x_i` expands into
    /// `Σ_{S⊆T} β_T Π_{i∈S} a_i Π_{i∈T∖S} c_i · Π_{i∈S} X_i`; the natural coefficient of the
    /// product `Π_{i∈S} X_i` is the sum of these over every model term `T ⊇ S` (binomial
    /// expansion, common practice, no source).
    pub fn equation_natural(&self, ranges: &[(f64, f64)]) -> Result<Equation, RangeError> {
        let mh = centre_and_half_range(ranges, self.factor_count)?;
        let mut acc: BTreeMap<Term, f64> = BTreeMap::new();
        let mut intercept = self.intercept.estimate;
        for c in &self.coefficients {
            let bits = c.term.bits();
            // All sub-bitsets S of T, the empty set included.
            let mut s = bits;
            loop {
                let sub = Term::from_bits(s);
                let mut v = c.estimate;
                for i in c.term.factors() {
                    let (mid, half) = mh[i];
                    v *= if sub.contains(i) {
                        1.0 / half
                    } else {
                        -mid / half
                    };
                }
                if s == 0 {
                    intercept += v;
                } else {
                    *acc.entry(sub).or_insert(0.0) += v;
                }
                if s == 0 {
                    break;
                }
                s = (s - 1) & bits;
            }
        }
        let mut eq = Equation {
            units: Units::Natural,
            intercept,
            terms: acc
                .into_iter()
                .map(|(term, coefficient)| EquationTerm { term, coefficient })
                .collect(),
            text: String::new(),
        };
        eq.text = eq.format_with_names(&[]);
        Ok(eq)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::data::Observations;
    use crate::prec::close_rel;
    use crate::test_support::{full as full_factorial, observations as obs};
    use proptest::prelude::*;

    fn t(label: &str, k: usize) -> Term {
        Term::parse(label, k).unwrap()
    }

    #[test]
    fn closure_contains_every_parent() {
        let c = hierarchical_closure(&[t("ABC", 3), t("BD", 4)]);
        let labels: Vec<String> = c.iter().map(|t| t.label()).collect();
        assert_eq!(labels, ["A", "B", "C", "D", "AB", "AC", "BC", "BD", "ABC"]);
    }

    #[test]
    fn hierarchical_fit_reports_added_terms() {
        let y = [1.0, 3.0, 2.0, 7.0, 1.5, 3.5, 2.5, 8.0];
        let fit = fit_model(
            &obs(3, full_factorial(3), &y),
            &ModelSpec::new(vec![t("AB", 3)]).hierarchical(true),
        )
        .unwrap();
        assert_eq!(fit.added_for_hierarchy, vec![t("A", 3), t("B", 3)]);
        assert_eq!(fit.terms, vec![t("A", 3), t("B", 3), t("AB", 3)]);
    }

    #[test]
    fn aliased_term_is_reported_not_estimated() {
        // Half fraction D = ABC of a 2^4 (common practice, no source): D and ABC share a column.
        let levels: Vec<Vec<f64>> = full_factorial(3)
            .into_iter()
            .map(|mut r| {
                r.push(r[0] * r[1] * r[2]);
                r
            })
            .collect();
        let y = [3.0, 5.0, 4.0, 9.0, 2.0, 6.0, 5.0, 11.0];
        let fit = fit_model(
            &obs(4, levels, &y),
            &ModelSpec::new(vec![t("A", 4), t("D", 4), t("ABC", 4)]),
        )
        .unwrap();
        assert_eq!(fit.terms, vec![t("A", 4), t("D", 4)]);
        assert_eq!(fit.unestimable.len(), 1);
        let u = &fit.unestimable[0];
        assert_eq!(u.column, Column::Term(t("ABC", 4)));
        assert_eq!(u.aliased_with.len(), 1);
        assert_eq!(u.aliased_with[0].0, Column::Term(t("D", 4)));
        assert!((u.aliased_with[0].1 - 1.0).abs() < 1e-12);
    }

    #[test]
    fn bad_inputs_give_typed_errors() {
        let o = obs(2, full_factorial(2), &[1.0, 2.0, 3.0, 4.0]);
        assert_eq!(
            fit_model(&o, &ModelSpec::new(vec![Term::main(2)])).unwrap_err(),
            FitError::TermBeyondFactors {
                term: "C".into(),
                factor_count: 2,
            }
        );
        // Repeats and the identity are ignored: 4 parameters on 4 runs is a saturated, valid fit.
        let spec = ModelSpec::new(vec![t("AB", 2), Term::IDENTITY, t("AB", 2)]).hierarchical(true);
        assert_eq!(fit_model(&o, &spec).unwrap().parameter_count, 4);

        let few = Observations::new(
            2,
            full_factorial(2),
            vec![],
            vec![Some(1.0), None, Some(2.0), None],
            vec![],
        )
        .unwrap();
        assert_eq!(
            fit_model(&few, &ModelSpec::new(vec![t("A", 2), t("B", 2)])).unwrap_err(),
            FitError::TooFewRuns {
                runs: 2,
                parameters: 3
            }
        );
        let none = Observations::new(
            1,
            vec![vec![-1.0], vec![1.0]],
            vec![],
            vec![None, None],
            vec![],
        )
        .unwrap();
        assert_eq!(
            fit_model(&none, &ModelSpec::default()).unwrap_err(),
            FitError::NoUsableRuns
        );
    }

    #[test]
    fn saturated_fit_has_no_error_statistics() {
        let o = obs(2, full_factorial(2), &[1.0, 2.0, 3.0, 5.0]);
        let fit = fit_model(&o, &ModelSpec::new(vec![t("A", 2), t("B", 2), t("AB", 2)])).unwrap();
        assert_eq!(fit.df_residual, 0);
        assert_eq!(fit.sigma, None);
        assert_eq!(fit.adj_r2, None);
        assert_eq!(fit.pred_r2, None);
        assert!(
            fit.coefficients
                .iter()
                .all(|c| c.std_error.is_none() && c.p.is_none())
        );
        assert!(fit.anova.iter().all(|r| r.f.is_none()));
        // By hand: AB coefficient = (y1 − y2 − y3 + y4)/4 = (1 − 2 − 3 + 5)/4 (common practice).
        let ab = fit.coefficient(t("AB", 2)).unwrap().estimate;
        assert!((ab - 0.25).abs() < 1e-12);
    }

    #[test]
    fn constant_response_has_no_r2() {
        let o = obs(2, full_factorial(2), &[4.0; 4]);
        let fit = fit_model(&o, &ModelSpec::new(vec![t("A", 2)])).unwrap();
        assert_eq!(fit.r2, None);
        assert_eq!(fit.sigma, None);
    }

    #[test]
    fn natural_equation_expands_products() {
        // y = 1 + 2x1 + 3x2 + 4x1x2 with X1 in [10, 30] (x1 = (X1 − 20)/10), X2 in [0, 4]
        // (x2 = (X2 − 2)/2). By hand: 4x1x2 = 4(X1−20)(X2−2)/20 = 0.2 X1X2 − 0.4 X1 − 4 X2 + 8;
        // 2x1 = 0.2 X1 − 4; 3x2 = 1.5 X2 − 3. Sum: 2 − 0.2 X1 − 2.5 X2 + 0.2 X1X2.
        let levels = full_factorial(2);
        let y: Vec<f64> = levels
            .iter()
            .map(|r| 1.0 + 2.0 * r[0] + 3.0 * r[1] + 4.0 * r[0] * r[1])
            .collect();
        let fit = fit_model(
            &obs(2, levels, &y),
            &ModelSpec::new(vec![t("AB", 2)]).hierarchical(true),
        )
        .unwrap();
        let eq = fit.equation_natural(&[(10.0, 30.0), (0.0, 4.0)]).unwrap();
        let tol = 1e-12;
        assert!((eq.intercept - 2.0).abs() < tol);
        let coef = |l: &str| {
            eq.terms
                .iter()
                .find(|e| e.term == t(l, 2))
                .unwrap()
                .coefficient
        };
        assert!((coef("A") + 0.2).abs() < tol);
        assert!((coef("B") + 2.5).abs() < tol);
        assert!((coef("AB") - 0.2).abs() < tol);
        assert_eq!(eq.text, "y = 2 - 0.2*A - 2.5*B + 0.2*A*B");
        assert_eq!(
            eq.format_with_names(&["Temp", "Time"]),
            "y = 2 - 0.2*Temp - 2.5*Time + 0.2*Temp*Time"
        );
        assert!(matches!(
            fit.equation_natural(&[(1.0, 1.0), (0.0, 1.0)]),
            Err(RangeError::Degenerate { factor: 'A', .. })
        ));
        assert!(matches!(
            fit.equation_natural(&[(1.0, 2.0)]),
            Err(RangeError::Count { .. })
        ));
    }

    #[test]
    fn p_values_and_quantiles_known_values() {
        // Tables of the t and F distributions (common printed values; scipy agrees): t(0.975, 10)
        // = 2.228139 (6 places), F upper 5 % point for (1, 8) = 5.317655 (6 places).
        assert!((t_quantile(0.975, 10).unwrap() - 2.228139).abs() < 5e-7);
        assert!((f_upper_p(5.317655, 1, 8).unwrap() - 0.05).abs() < 1e-7);
        assert!((t_two_sided_p(2.228139, 10).unwrap() - 0.05).abs() < 1e-7);
        assert_eq!(t_quantile(0.5, 0), None);
        assert_eq!(f_upper_p(1.0, 0, 3), None);
    }

    #[test]
    fn format_number_trims() {
        assert_eq!(format_number(27.5), "27.5");
        assert_eq!(format_number(4.166666666), "4.16667");
        assert_eq!(format_number(-0.000012345), "-1.23450e-5");
        assert_eq!(format_number(0.0), "0");
    }

    proptest! {
        #[test]
        fn residuals_are_orthogonal_to_model_columns(
            y in proptest::collection::vec(-100.0f64..100.0, 16),
            drop in 0usize..16,
            sel in 1u32..(1 << 15),
        ) {
            // A 2^4 with one run missing and a random set of terms: least squares leaves residuals
            // orthogonal to every fitted column (normal equations, common practice, no source).
            let mut resp: Vec<Option<f64>> = y.iter().map(|&v| Some(v)).collect();
            resp[drop] = None;
            let o = Observations::new(4, full_factorial(4), vec![], resp, vec![]).unwrap();
            // Any set of up to 13 of the 15 effect terms, so that 15 runs leave residual df.
            let terms: Vec<Term> = (1u32..16).filter(|b| sel >> (b - 1) & 1 == 1)
                .take(13).map(Term::from_bits).collect();
            let fit = fit_model(&o, &ModelSpec::new(terms)).unwrap();
            let scale: f64 = y.iter().map(|v| v.abs()).sum::<f64>().max(1.0);
            for &term in fit.terms.iter().chain(std::iter::once(&Term::IDENTITY)) {
                let dot: f64 = fit.runs.iter().zip(&fit.residuals)
                    .map(|(&r, e)| term_value(&o.levels()[r], term) * e).sum();
                prop_assert!(dot.abs() < 1e-9 * scale, "{term}: {dot}");
            }
            // Decomposition: Model + Residual = Total.
            let model = fit.anova_row(Source::Model).map_or(0.0, |r| r.ss);
            let res = fit.anova_row(Source::Residual).unwrap().ss;
            let tot = fit.anova_row(Source::Total).unwrap().ss;
            prop_assert!(close_rel(model + res, tot, 1e-9));
        }

        #[test]
        fn closure_is_closed_and_contains_parents(bits in proptest::collection::vec(1u32..(1 << 6), 1..4)) {
            let terms: Vec<Term> = bits.iter().map(|&b| Term::from_bits(b)).collect();
            let c = hierarchical_closure(&terms);
            for &x in &c {
                let mut s = x.bits();
                while s != 0 {
                    prop_assert!(c.contains(&Term::from_bits(s)));
                    s = (s - 1) & x.bits();
                }
            }
            for tm in &terms {
                prop_assert!(c.contains(tm));
            }
        }

        #[test]
        fn natural_equation_agrees_with_coded(
            coefs in proptest::collection::vec(-10.0f64..10.0, 8),
            lo in proptest::collection::vec(-50.0f64..50.0, 3),
            width in proptest::collection::vec(0.5f64..20.0, 3),
            u in proptest::collection::vec(-1.0f64..1.0, 3),
        ) {
            // The natural equation at X must equal the coded equation at x = (X − mid)/half.
            let levels = full_factorial(3);
            let terms: Vec<Term> = (1u32..8).map(Term::from_bits).collect();
            let y: Vec<f64> = levels.iter().map(|r| coefs[0] + terms.iter().zip(&coefs[1..])
                .map(|(t, c)| c * term_value(r, *t)).sum::<f64>()).collect();
            let fit = fit_model(&obs(3, levels, &y), &ModelSpec::new(terms)).unwrap();
            let ranges: Vec<(f64, f64)> = lo.iter().zip(&width).map(|(&l, &w)| (l, l + w)).collect();
            let nat = fit.equation_natural(&ranges).unwrap();
            let coded = fit.equation_coded();
            let xn: Vec<f64> = ranges.iter().zip(&u).map(|(&(l, h), &ui)| (l + h) / 2.0 + ui * (h - l) / 2.0).collect();
            let a = nat.evaluate(&xn);
            let b = coded.evaluate(&u);
            prop_assert!(close_rel(a, b, 1e-8), "{a} vs {b}");
            prop_assert!(close_rel(b, fit.value_at(&u), 1e-12));
        }
    }
}
