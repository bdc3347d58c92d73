//! Plotting positions for half-normal and normal probability plots of effects.
//!
//! # Formula
//!
//! With the `m` effects ranked `i = 1 … m` from the smallest to the largest,
//!
//! ```text
//! half-normal:  q_i = Φ⁻¹(0.5 + 0.5·(i − 0.5)/m)    on |effect|
//! normal:       z_i = Φ⁻¹((i − 0.5)/m)              on the signed effect
//! ```
//!
//! where `Φ⁻¹` is the standard normal quantile. The half-normal plot of the absolute contrasts of a
//! two-level experiment is Daniel's (Daniel 1959, "Use of half-normal plots in interpreting
//! factorial two-level experiments", *Technometrics* 1(4), 311–341; the pages from memory). The
//! cumulative probabilities `(i − 0.5)/m` are Hazen's plotting positions, the ones Montgomery
//! uses for the normal probability plot of effects (*Design and Analysis of Experiments*, chapter
//! on the 2^k design; from memory); mapping them onto the upper half of the normal distribution
//! gives the half-normal positions. That Daniel's own grid used exactly these positions is not
//! verified. Check values: for `m = 7` the half-normal positions are 0.0896, 0.2719, 0.4637,
//! 0.6745, 0.9208, 1.2419, 1.8027 (computed with scipy).
//!
//! Ties in |effect| are ranked by term in the order of the trade, so the output is deterministic.

use crate::effects::Effect;
use crate::term::Term;
use statrs::distribution::{ContinuousCDF, Normal};

/// One point of a half-normal plot.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HalfNormalPoint {
    /// The chain representative.
    pub term: Term,
    /// The signed effect.
    pub effect: f64,
    /// `|effect|`.
    pub abs_effect: f64,
    /// Rank `i` (1 = smallest |effect|).
    pub rank: usize,
    /// Half-normal quantile `Φ⁻¹(0.5 + 0.5·(i − 0.5)/m)`.
    pub quantile: f64,
}

/// One point of a normal probability plot.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NormalPoint {
    /// The chain representative.
    pub term: Term,
    /// The signed effect.
    pub effect: f64,
    /// Rank `i` (1 = most negative effect).
    pub rank: usize,
    /// Normal quantile `Φ⁻¹((i − 0.5)/m)`.
    pub quantile: f64,
}

/// The standard normal quantile of `p` in (0, 1); `None` outside.
fn standard_normal_quantile(p: f64) -> Option<f64> {
    if p.is_nan() || p <= 0.0 || p >= 1.0 {
        return None;
    }
    let n = Normal::standard();
    Some(n.inverse_cdf(p))
}

/// Half-normal position of rank `i` (1-based) among `m`; `None` unless `1 ≤ i ≤ m`.
///
/// ```
/// use twofold_core::halfnormal::half_normal_quantile;
/// // m = 7, largest effect: Φ⁻¹(0.5 + 0.5·6.5/7) = 1.8027 (scipy, four decimals).
/// let q = half_normal_quantile(7, 7).unwrap();
/// assert!((q - 1.8027).abs() <= 5e-5);
/// ```
pub fn half_normal_quantile(i: usize, m: usize) -> Option<f64> {
    if i == 0 || i > m {
        return None;
    }
    standard_normal_quantile(0.5 + 0.5 * (i as f64 - 0.5) / m as f64)
}

/// Normal position of rank `i` (1-based) among `m`; `None` unless `1 ≤ i ≤ m`.
pub fn normal_quantile(i: usize, m: usize) -> Option<f64> {
    if i == 0 || i > m {
        return None;
    }
    standard_normal_quantile((i as f64 - 0.5) / m as f64)
}

/// Half-normal plot data: effects sorted by |effect|, smallest first, with their positions.
pub fn half_normal(effects: &[Effect]) -> Vec<HalfNormalPoint> {
    let mut sorted: Vec<&Effect> = effects.iter().filter(|e| e.effect.is_finite()).collect();
    sorted.sort_by(|a, b| {
        a.effect
            .abs()
            .total_cmp(&b.effect.abs())
            .then(a.term.cmp(&b.term))
    });
    let m = sorted.len();
    sorted
        .into_iter()
        .enumerate()
        .filter_map(|(j, e)| {
            Some(HalfNormalPoint {
                term: e.term,
                effect: e.effect,
                abs_effect: e.effect.abs(),
                rank: j + 1,
                quantile: half_normal_quantile(j + 1, m)?,
            })
        })
        .collect()
}

/// Normal probability plot data: effects sorted by signed value, most negative first.
pub fn normal_probability(effects: &[Effect]) -> Vec<NormalPoint> {
    let mut sorted: Vec<&Effect> = effects.iter().filter(|e| e.effect.is_finite()).collect();
    sorted.sort_by(|a, b| a.effect.total_cmp(&b.effect).then(a.term.cmp(&b.term)));
    let m = sorted.len();
    sorted
        .into_iter()
        .enumerate()
        .filter_map(|(j, e)| {
            Some(NormalPoint {
                term: e.term,
                effect: e.effect,
                rank: j + 1,
                quantile: normal_quantile(j + 1, m)?,
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::prec::close_to_places;

    fn effect(label: &str, value: f64) -> Effect {
        Effect {
            term: Term::parse(label, 25).unwrap(),
            aliases: vec![],
            effect: value,
            coefficient: value / 2.0,
            chain: 0,
        }
    }

    #[test]
    fn seven_half_normal_positions_match_reference() {
        // REFERENCES: m = 7 positions (scipy), four decimals.
        let expected = [0.0896, 0.2719, 0.4637, 0.6745, 0.9208, 1.2419, 1.8027];
        for (i, e) in expected.iter().enumerate() {
            let q = half_normal_quantile(i + 1, 7).unwrap();
            assert!(close_to_places(q, *e, 4), "i={}: {q}", i + 1);
        }
        assert_eq!(half_normal_quantile(0, 7), None);
        assert_eq!(half_normal_quantile(8, 7), None);
    }

    #[test]
    fn normal_positions_are_symmetric_and_match_a_printed_table() {
        // Normal positions for m = 15 to two decimals, read from a standard normal table at
        // (i − 0.5)/15 (the column printed in course notes on normal plots of 2^4 effects).
        let expected = [-1.83, -1.28, -0.97, -0.73, -0.52, -0.34, -0.17, 0.0];
        for (i, e) in expected.iter().enumerate() {
            let q = normal_quantile(i + 1, 15).unwrap();
            assert!(close_to_places(q, *e, 2), "i={}: {q}", i + 1);
            let mirror = normal_quantile(15 - i, 15).unwrap();
            assert!((q + mirror).abs() < 1e-12);
        }
    }

    #[test]
    fn points_are_sorted_with_ties_by_trade_order() {
        let effects = vec![
            effect("AB", -3.0),
            effect("A", 10.0),
            effect("B", 3.0),
            effect("C", -0.5),
        ];
        let hn = half_normal(&effects);
        let order: Vec<String> = hn.iter().map(|p| p.term.label()).collect();
        assert_eq!(order, ["C", "B", "AB", "A"]);
        assert_eq!(hn[3].abs_effect, 10.0);
        assert_eq!(hn[3].rank, 4);
        assert!(hn.windows(2).all(|w| w[0].quantile < w[1].quantile));
        let np = normal_probability(&effects);
        let order: Vec<String> = np.iter().map(|p| p.term.label()).collect();
        assert_eq!(order, ["AB", "C", "B", "A"]);
        assert!(half_normal(&[]).is_empty());
    }
}
