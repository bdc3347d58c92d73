//! Lenth's method: a margin of error for the effects of an unreplicated two-level design.
//!
//! # Formula
//!
//! From Lenth (1989), "Quick and easy analysis of unreplicated factorials", *Technometrics*
//! 31(4), 469–473 (verified through Montgomery's Example 6-2, which applies it):
//!
//! ```text
//! s0  = 1.5 · median |c_j|
//! PSE = 1.5 · median { |c_j| : |c_j| < 2.5 · s0 }
//! d   = m / 3
//! ME  = t(0.975; d) · PSE
//! SME = t(γ; d) · PSE,   γ = (1 + 0.95^(1/m)) / 2
//! ```
//!
//! where `c_1 … c_m` are the contrasts (effects, mean at + minus mean at −), `PSE` is the
//! pseudo standard error, `ME` the margin of error for one effect at 95 % and `SME` the
//! simultaneous margin for all `m` at 95 %; `t(p; d)` is the `p` quantile of Student's t with `d`
//! (fractional) degrees of freedom. A median of an even count averages the two middle values.
//!
//! # Limits
//!
//! At least [`MIN_CONTRASTS`] contrasts are required: with `m = 3`, `d = 1`, the smallest whole
//! degree of freedom; below it the method has nothing left to estimate noise from. When more than
//! half the contrasts are exactly zero, `s0 = 0` and the restricted set is empty, or the restricted
//! median is zero: the PSE is then zero and [`LenthError::ZeroPse`] says so instead of flagging
//! every non-zero effect.

use crate::effects::EffectTable;
use crate::term::Term;
use statrs::distribution::{ContinuousCDF, StudentsT};

/// Fewest contrasts Lenth's method is applied to (`d = m/3 = 1`).
pub const MIN_CONTRASTS: usize = 3;

/// Why Lenth's method cannot be applied.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum LenthError {
    /// Too few contrasts.
    #[error(
        "Lenth's method needs at least {MIN_CONTRASTS} effects to judge noise from, but there are {m}"
    )]
    TooFewContrasts {
        /// Contrasts given.
        m: usize,
    },
    /// A contrast is NaN or infinite.
    #[error("effect number {index} is not a finite number")]
    NotFinite {
        /// 1-based position of the contrast.
        index: usize,
    },
    /// The pseudo standard error is zero (most effects are exactly zero).
    #[error(
        "the pseudo standard error is zero (most effects are exactly zero), so Lenth's margins are undefined"
    )]
    ZeroPse,
    /// Student's t could not be formed for the degrees of freedom (not expected for `d ≥ 1`).
    #[error("student's t with {df} degrees of freedom is not available")]
    Distribution {
        /// The degrees of freedom asked for.
        df: f64,
    },
}

/// Lenth's pseudo standard error and margins of error for one set of contrasts.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Lenth {
    /// Number of contrasts `m`.
    pub m: usize,
    /// Initial scale `s0 = 1.5·median|c|`.
    pub s0: f64,
    /// Pseudo standard error.
    pub pse: f64,
    /// Degrees of freedom `d = m/3`.
    pub df: f64,
    /// `t(0.975; d)`.
    pub t_me: f64,
    /// `γ = (1 + 0.95^(1/m))/2`.
    pub gamma: f64,
    /// `t(γ; d)`.
    pub t_sme: f64,
    /// Margin of error `t(0.975; d)·PSE`.
    pub me: f64,
    /// Simultaneous margin of error `t(γ; d)·PSE`.
    pub sme: f64,
}

/// Where a contrast falls against Lenth's margins.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
#[non_exhaustive]
pub enum Significance {
    /// `|c| ≤ ME`.
    WithinMe,
    /// `ME < |c| ≤ SME`.
    BeyondMe,
    /// `|c| > SME` (also beyond ME).
    BeyondSme,
}

impl Lenth {
    /// Where `contrast` falls: strictly beyond a margin counts as beyond it.
    pub fn classify(&self, contrast: f64) -> Significance {
        let a = contrast.abs();
        if a > self.sme {
            Significance::BeyondSme
        } else if a > self.me {
            Significance::BeyondMe
        } else {
            Significance::WithinMe
        }
    }
}

/// Lenth's method on a set of contrasts (see the module documentation for the formulas).
///
/// ```
/// // Montgomery, Example 6-2 (filtration rate): PSE 2.625, ME 6.74778, SME 13.69896.
/// let effects = [
///     21.625, 3.125, 9.875, 14.625, 0.125, -18.125, 16.625, 2.375, -0.375, -1.125, 1.875,
///     4.125, -1.625, -2.625, 1.375,
/// ];
/// let l = twofold_core::lenth::lenth(&effects).unwrap();
/// // Tolerance: half a unit in the last published decimal.
/// assert!((l.pse - 2.625).abs() <= 5e-4);
/// assert!((l.me - 6.74778).abs() <= 5e-6);
/// assert!((l.sme - 13.69896).abs() <= 5e-6);
/// ```
pub fn lenth(contrasts: &[f64]) -> Result<Lenth, LenthError> {
    let m = contrasts.len();
    if m < MIN_CONTRASTS {
        return Err(LenthError::TooFewContrasts { m });
    }
    if let Some(i) = contrasts.iter().position(|c| !c.is_finite()) {
        return Err(LenthError::NotFinite { index: i + 1 });
    }
    let abs: Vec<f64> = contrasts.iter().map(|c| c.abs()).collect();
    let s0 = 1.5 * median(abs.clone()).ok_or(LenthError::ZeroPse)?;
    let restricted: Vec<f64> = abs.into_iter().filter(|&a| a < 2.5 * s0).collect();
    let pse = 1.5 * median(restricted).ok_or(LenthError::ZeroPse)?;
    if pse <= 0.0 {
        return Err(LenthError::ZeroPse);
    }
    let df = m as f64 / 3.0;
    let gamma = (1.0 + 0.95f64.powf(1.0 / m as f64)) / 2.0;
    let t_me = t_quantile(0.975, df).ok_or(LenthError::Distribution { df })?;
    let t_sme = t_quantile(gamma, df).ok_or(LenthError::Distribution { df })?;
    Ok(Lenth {
        m,
        s0,
        pse,
        df,
        t_me,
        gamma,
        t_sme,
        me: t_me * pse,
        sme: t_sme * pse,
    })
}

/// Lenth's verdict for one effect of a table.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LenthFlag {
    /// The chain representative.
    pub term: Term,
    /// Its effect.
    pub effect: f64,
    /// Where it falls against the margins.
    pub significance: Significance,
}

/// Lenth's method on the effects of a table, with a verdict per effect (table order).
pub fn lenth_effects(table: &EffectTable) -> Result<(Lenth, Vec<LenthFlag>), LenthError> {
    let l = lenth(&table.contrasts())?;
    let flags = table
        .effects
        .iter()
        .map(|e| LenthFlag {
            term: e.term,
            effect: e.effect,
            significance: l.classify(e.effect),
        })
        .collect();
    Ok((l, flags))
}

/// Median of finite values (average of the two middle ones for an even count); `None` when empty.
fn median(mut v: Vec<f64>) -> Option<f64> {
    if v.is_empty() {
        return None;
    }
    v.sort_by(f64::total_cmp);
    let n = v.len();
    Some(if n % 2 == 1 {
        v[n / 2]
    } else {
        (v[n / 2 - 1] + v[n / 2]) / 2.0
    })
}

/// The `p` quantile of the standard Student's t with `df > 0` (fractional) degrees of freedom.
fn t_quantile(p: f64, df: f64) -> Option<f64> {
    let t = StudentsT::new(0.0, 1.0, df).ok()?;
    let q = t.inverse_cdf(p);
    q.is_finite().then_some(q)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::prec::close_to_places;

    /// Montgomery, Example 6-2 (filtration rate), the fifteen effects as published.
    const FILTRATION_EFFECTS: [f64; 15] = [
        21.625, 3.125, 9.875, 14.625, 0.125, -18.125, 16.625, 2.375, -0.375, -1.125, 1.875, 4.125,
        -1.625, -2.625, 1.375,
    ];

    #[test]
    fn filtration_example_reproduces_published_margins() {
        // Montgomery, Example 6-2: s0 3.9375, PSE 2.625 (exact to the printed digits),
        // ME 6.74778, SME 13.69896 (to five decimals).
        let l = lenth(&FILTRATION_EFFECTS).unwrap();
        assert_eq!(l.m, 15);
        assert!(close_to_places(l.s0, 3.9375, 4));
        assert!(close_to_places(l.pse, 2.625, 3));
        assert!(close_to_places(l.df, 5.0, 12));
        assert!(close_to_places(l.me, 6.74778, 5));
        assert!(close_to_places(l.sme, 13.69896, 5));
        // Same source: A, AC, AD, D beyond SME; C beyond ME only (effects in trade order).
        let verdicts: Vec<Significance> =
            FILTRATION_EFFECTS.iter().map(|&c| l.classify(c)).collect();
        let beyond_sme: Vec<usize> = (0..15)
            .filter(|&i| verdicts[i] == Significance::BeyondSme)
            .collect();
        let beyond_me: Vec<usize> = (0..15)
            .filter(|&i| verdicts[i] == Significance::BeyondMe)
            .collect();
        assert_eq!(beyond_sme, [0, 3, 5, 6]);
        assert_eq!(beyond_me, [2]);
    }

    #[test]
    fn multipliers_match_published_table() {
        // REFERENCES: Lenth multipliers for m = 7, 15, 31 (scipy; printed tables agree), four
        // decimals; γ to six.
        for (m, t975, gamma, tg) in [
            (7usize, 3.7641, 0.996350, 9.0083),
            (15, 2.5706, 0.998293, 5.2187),
            (31, 2.2184, 0.999173, 4.2180),
        ] {
            // Contrasts 1..=m give a positive PSE; the multipliers depend on m only.
            let c: Vec<f64> = (1..=m).map(|i| i as f64).collect();
            let l = lenth(&c).unwrap();
            assert!(close_to_places(l.t_me, t975, 4), "m={m}: {}", l.t_me);
            assert!(close_to_places(l.gamma, gamma, 6), "m={m}: {}", l.gamma);
            assert!(close_to_places(l.t_sme, tg, 4), "m={m}: {}", l.t_sme);
            assert!((l.me - l.t_me * l.pse).abs() < 1e-12);
        }
    }

    #[test]
    fn odd_count_median_and_restriction() {
        // m = 7: |c| = 1,1,2,2,3,4,40 → s0 = 1.5·2 = 3; restricted |c| < 7.5 drops 40;
        // median of 1,1,2,2,3,4 is 2 → PSE 3 (hand computation from the definition).
        let l = lenth(&[1.0, -1.0, 2.0, -2.0, 3.0, 4.0, -40.0]).unwrap();
        assert!((l.s0 - 3.0).abs() < 1e-12);
        assert!((l.pse - 3.0).abs() < 1e-12);
        assert_eq!(l.classify(-40.0), Significance::BeyondSme);
        assert_eq!(l.classify(4.0), Significance::WithinMe);
    }

    #[test]
    fn undefined_cases_are_typed_errors() {
        let cases: &[(&[f64], LenthError)] = &[
            (&[], LenthError::TooFewContrasts { m: 0 }),
            (&[1.0, 2.0], LenthError::TooFewContrasts { m: 2 }),
            (&[0.0, 0.0, 0.0, 5.0], LenthError::ZeroPse),
            (&[0.0, 0.0, 0.0, 0.0, 0.0], LenthError::ZeroPse),
            (&[1.0, f64::NAN, 2.0], LenthError::NotFinite { index: 2 }),
            (
                &[1.0, 2.0, f64::INFINITY],
                LenthError::NotFinite { index: 3 },
            ),
        ];
        for (c, expected) in cases {
            assert_eq!(&lenth(c).unwrap_err(), expected, "{c:?}");
        }
    }

    #[test]
    fn smallest_allowed_count_works() {
        let l = lenth(&[1.0, 2.0, 3.0]).unwrap();
        assert!((l.df - 1.0).abs() < 1e-12);
        // t(0.975; 1) = tan(0.475·π) = 12.7062 (Cauchy quantile, closed form).
        assert!((l.t_me - (0.475 * std::f64::consts::PI).tan()).abs() < 1e-6);
    }
}
