//! Prediction from a fitted model, with intervals, and the best settings inside the factor box.
//!
//! # Intervals
//! At a point with regression row `x₀` (intercept, the terms' products; blocks at their average,
//! the curvature column at 0), the fitted value is `ŷ₀ = x₀ᵀb` and
//!
//! ```text
//! confidence interval  ŷ₀ ± t(1 − α/2, n − p) · s · √(x₀ᵀ(XᵀX)⁻¹x₀)
//! prediction interval  ŷ₀ ± t(1 − α/2, n − p) · s · √(1 + x₀ᵀ(XᵀX)⁻¹x₀)
//! ```
//!
//! (Montgomery, Peck & Vining, *Introduction to Linear Regression Analysis*, sections 3.4–3.5;
//! from memory). Both are `None` when the residual has no degrees of freedom.
//!
//! # Best settings
//! A model of main effects and interactions is linear in each factor when the others are held
//! fixed, so its maximum and minimum over the box lie at corners (common practice, no source).
//! [`best_settings`] therefore enumerates every corner of the factors that appear in the model,
//! exactly, in Gray-code order (one factor changes per step, so each step updates only the terms
//! containing that factor). For a target value, consecutive Gray-code corners are neighbours on
//! the cube, so when the target lies between the lowest and highest corner the walk crosses it on
//! some edge, where the model is linear in the one changing factor and the crossing point is
//! solved exactly. The curvature column is not part of the prediction: when the centre points
//! show significant curvature the corners are still valid predictions but the model cannot
//! locate an interior optimum, and the result says so.

use crate::anova::{ModelFit, RangeError, centre_and_half_range, t_quantile};
use crate::term::factor_letter;
use crate::transform::{Transform, TransformError};

/// Default confidence level of intervals.
pub const DEFAULT_CONFIDENCE: f64 = 0.95;
/// Significance level below which centre-point curvature is flagged (common practice, no source).
pub const CURVATURE_ALPHA: f64 = 0.05;
/// Largest number of model factors whose corners are enumerated (all 25 factor letters).
pub const MAX_ENUMERATED_FACTORS: usize = crate::term::MAX_FACTORS;

/// Why a prediction cannot be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum PredictError {
    /// Wrong settings or factor ranges.
    #[error(transparent)]
    Range(#[from] RangeError),
    /// The confidence level is not strictly between 0 and 1.
    #[error("confidence level {0} must be between 0 and 1 (e.g. 0.95)")]
    Confidence(f64),
    /// The target lies outside the domain of the response transform.
    #[error("the target {target} cannot be used with the {transform} transform of the response")]
    Target {
        /// The target as given.
        target: f64,
        /// The transform, as written by its `Display`.
        transform: String,
    },
    /// The transform itself is invalid.
    #[error(transparent)]
    Transform(#[from] TransformError),
}

/// A predicted response with its intervals, on the model's scale.
#[derive(Debug, Clone, PartialEq)]
pub struct Prediction {
    /// The coded point.
    pub point: Vec<f64>,
    /// Predicted mean response for an average block.
    pub value: f64,
    /// Standard error of the predicted mean.
    pub std_error: Option<f64>,
    /// Confidence level of the intervals.
    pub confidence: f64,
    /// Confidence interval for the mean response.
    pub confidence_interval: Option<(f64, f64)>,
    /// Prediction interval for one new run.
    pub prediction_interval: Option<(f64, f64)>,
    /// Whether some setting lies outside −1..+1 (extrapolation).
    pub extrapolated: bool,
    /// Whether the centre points show curvature at p < 0.05, so that the model may be wrong
    /// inside the box.
    pub curvature_warning: bool,
}

/// A prediction mapped back to the original scale of a transformed response.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BackTransformed {
    /// The predicted value (the median on the original scale for a non-linear transform).
    pub value: Option<f64>,
    /// Confidence interval, endpoint by endpoint.
    pub confidence_interval: Option<(f64, f64)>,
    /// Prediction interval, endpoint by endpoint.
    pub prediction_interval: Option<(f64, f64)>,
}

impl Prediction {
    /// The prediction on the original scale of a response fitted after `transform`. Any value
    /// without an original counterpart (e.g. a negative predicted square root) is `None`.
    pub fn back_transformed(&self, transform: &Transform) -> BackTransformed {
        BackTransformed {
            value: transform.back(self.value),
            confidence_interval: self
                .confidence_interval
                .and_then(|(a, b)| transform.back_interval(a, b)),
            prediction_interval: self
                .prediction_interval
                .and_then(|(a, b)| transform.back_interval(a, b)),
        }
    }
}

/// Whether the fit's curvature test is significant at [`CURVATURE_ALPHA`].
pub fn curvature_significant(fit: &ModelFit) -> bool {
    fit.curvature
        .and_then(|c| c.p)
        .is_some_and(|p| p < CURVATURE_ALPHA)
}

/// Coded settings `x = (X − mid)/half-range` from natural ones.
pub fn to_coded(natural: &[f64], ranges: &[(f64, f64)]) -> Result<Vec<f64>, RangeError> {
    let mh = centre_and_half_range(ranges, ranges.len())?;
    check_point(natural, ranges.len())?;
    Ok(natural
        .iter()
        .zip(&mh)
        .map(|(x, (m, h))| (x - m) / h)
        .collect())
}

/// Natural settings `X = mid + x·half-range` from coded ones.
pub fn to_natural(coded: &[f64], ranges: &[(f64, f64)]) -> Result<Vec<f64>, RangeError> {
    let mh = centre_and_half_range(ranges, ranges.len())?;
    check_point(coded, ranges.len())?;
    Ok(coded.iter().zip(&mh).map(|(x, (m, h))| m + x * h).collect())
}

fn check_point(x: &[f64], factor_count: usize) -> Result<(), RangeError> {
    if x.len() != factor_count {
        return Err(RangeError::Count {
            what: "settings",
            found: x.len(),
            expected: factor_count,
        });
    }
    for (i, &v) in x.iter().enumerate() {
        if !v.is_finite() {
            return Err(RangeError::NotFinite {
                factor: factor_letter(i).unwrap_or('?'),
                value: v,
            });
        }
    }
    Ok(())
}

/// Predicted response at a coded point (one setting per factor) with intervals at `confidence`
/// (e.g. [`DEFAULT_CONFIDENCE`]). See the module documentation for the formulas.
pub fn predict(fit: &ModelFit, coded: &[f64], confidence: f64) -> Result<Prediction, PredictError> {
    if !(confidence > 0.0 && confidence < 1.0) {
        return Err(PredictError::Confidence(confidence));
    }
    check_point(coded, fit.factor_count)?;
    let value = fit.value_at(coded);
    let v = fit.variance_factor(coded).max(0.0);
    let std_error = fit.sigma.map(|s| s * v.sqrt());
    let tq = t_quantile(0.5 + confidence / 2.0, fit.df_residual);
    let (ci, pi) = match (fit.sigma, tq) {
        (Some(s), Some(t)) => {
            let hc = t * s * v.sqrt();
            let hp = t * s * (1.0 + v).sqrt();
            (
                Some((value - hc, value + hc)),
                Some((value - hp, value + hp)),
            )
        }
        _ => (None, None),
    };
    Ok(Prediction {
        point: coded.to_vec(),
        value,
        std_error,
        confidence,
        confidence_interval: ci,
        prediction_interval: pi,
        extrapolated: coded.iter().any(|x| x.abs() > 1.0 + 1e-12),
        curvature_warning: curvature_significant(fit),
    })
}

/// Predicted response at a point in natural units, given each factor's (low, high).
pub fn predict_natural(
    fit: &ModelFit,
    natural: &[f64],
    ranges: &[(f64, f64)],
    confidence: f64,
) -> Result<Prediction, PredictError> {
    if ranges.len() != fit.factor_count {
        return Err(RangeError::Count {
            what: "ranges",
            found: ranges.len(),
            expected: fit.factor_count,
        }
        .into());
    }
    let coded = to_coded(natural, ranges)?;
    predict(fit, &coded, confidence)
}

/// What the best settings should achieve, on the original scale of the response.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Goal {
    /// As large as possible.
    Maximise,
    /// As small as possible.
    Minimise,
    /// As close as possible to this value.
    Target(f64),
}

/// The best settings found in the factor box.
#[derive(Debug, Clone, PartialEq)]
pub struct Optimum {
    /// The goal, as asked.
    pub goal: Goal,
    /// Coded setting per factor; `None` for a factor not in the model (it does not matter).
    pub settings: Vec<Option<f64>>,
    /// Factors that appear in the model (0-based), ascending.
    pub model_factors: Vec<usize>,
    /// Factors not in the model: their setting does not change the prediction.
    pub unused_factors: Vec<usize>,
    /// The prediction there, on the model's scale (unused factors at their centre, which does
    /// not change the value).
    pub prediction: Prediction,
    /// The predicted value on the original scale (back-transformed); `None` when it has no
    /// original counterpart.
    pub value: Option<f64>,
    /// How many corners give the same best value (more than 1: a tie, any of them will do).
    pub equally_good: usize,
    /// For a target: whether some setting in the box reaches it exactly according to the model.
    pub target_reached: Option<bool>,
    /// The centre points show significant curvature (p < 0.05): the model cannot locate an
    /// interior optimum, and the true best may lie inside the box.
    pub curvature_warning: bool,
}

/// Best settings of the factors in the model for `goal`, with the response fitted after
/// `transform` (use `Transform::None` for an untransformed response); intervals at `confidence`.
/// See the module documentation for the method.
pub fn best_settings(
    fit: &ModelFit,
    goal: Goal,
    transform: &Transform,
    confidence: f64,
) -> Result<Optimum, PredictError> {
    if !(confidence > 0.0 && confidence < 1.0) {
        return Err(PredictError::Confidence(confidence));
    }
    let k = fit.factor_count;
    let mut used_bits = 0u32;
    for t in &fit.terms {
        used_bits |= t.bits();
    }
    let model_factors: Vec<usize> = (0..k).filter(|&i| used_bits >> i & 1 == 1).collect();
    let unused_factors: Vec<usize> = (0..k).filter(|&i| used_bits >> i & 1 == 0).collect();
    let m = model_factors.len().min(MAX_ENUMERATED_FACTORS);

    // Objective on the model scale: larger is better.
    let (sense, target) = match goal {
        Goal::Maximise => (if transform.is_increasing() { 1.0 } else { -1.0 }, None),
        Goal::Minimise => (if transform.is_increasing() { -1.0 } else { 1.0 }, None),
        Goal::Target(y) => {
            transform.validate()?;
            let z = transform.apply(y).ok_or_else(|| PredictError::Target {
                target: y,
                transform: transform.to_string(),
            })?;
            (0.0, Some(z))
        }
    };
    let score = |v: f64| match target {
        Some(z) => -(v - z).abs(),
        None => sense * v,
    };

    // Terms re-indexed to the model factors; every corner starts at all −1.
    let position = |f: usize| model_factors.iter().position(|&g| g == f).unwrap_or(0);
    let terms: Vec<(u32, f64)> = fit
        .coefficients
        .iter()
        .map(|c| {
            let bits = c.term.factors().fold(0u32, |acc, f| acc | 1 << position(f));
            (bits, c.estimate)
        })
        .collect();
    let mut by_factor: Vec<Vec<usize>> = vec![Vec::new(); m];
    for (ti, (bits, _)) in terms.iter().enumerate() {
        for (f, list) in by_factor.iter_mut().enumerate() {
            if bits >> f & 1 == 1 {
                list.push(ti);
            }
        }
    }
    let mut sign: Vec<f64> = terms
        .iter()
        .map(|(bits, _)| {
            if bits.count_ones() % 2 == 1 {
                -1.0
            } else {
                1.0
            }
        })
        .collect();
    let b0 = fit.intercept.estimate;
    let mut value = b0
        + terms
            .iter()
            .zip(&sign)
            .map(|((_, b), s)| b * s)
            .sum::<f64>();
    let scale = b0.abs() + terms.iter().map(|(_, b)| b.abs()).sum::<f64>();
    let tie = 1e-9 * scale.max(f64::MIN_POSITIVE);

    let mut mask = 0u32; // bit f set: model factor f at +1
    let mut best_mask = 0u32;
    let mut best = score(value);
    let mut equally_good = 1usize;
    let mut crossing: Option<(u32, usize, f64, f64)> = None;
    let corners: u64 = 1u64 << m;
    for i in 1..corners {
        let f = i.trailing_zeros() as usize;
        let prev = value;
        for &ti in &by_factor[f] {
            value -= 2.0 * terms[ti].1 * sign[ti];
            sign[ti] = -sign[ti];
        }
        let prev_mask = mask;
        mask ^= 1 << f;
        if let Some(z) = target
            && crossing.is_none()
            && (prev - z) * (value - z) <= 0.0
        {
            crossing = Some((prev_mask, f, prev, value));
        }
        let s = score(value);
        if s > best + tie {
            best = s;
            best_mask = mask;
            equally_good = 1;
        } else if (s - best).abs() <= tie {
            equally_good += 1;
        }
    }

    let corner = |msk: u32| -> Vec<Option<f64>> {
        (0..k)
            .map(|f| {
                model_factors
                    .iter()
                    .position(|&g| g == f)
                    .map(|p| if msk >> p & 1 == 1 { 1.0 } else { -1.0 })
            })
            .collect()
    };
    let mut settings = corner(best_mask);
    let mut target_reached = None;
    if let Some(z) = target {
        let at_corner = (fit.value_at(&filled(&settings)) - z).abs() <= tie;
        if at_corner {
            target_reached = Some(true);
        } else if let Some((pm, f, v0, v1)) = crossing {
            // Along the edge the model is linear in factor f: solve v(x_f) = z exactly.
            let mut s = corner(pm);
            let x0 = if pm >> f & 1 == 1 { 1.0 } else { -1.0 };
            let x = x0 + (z - v0) * (-2.0 * x0) / (v1 - v0);
            s[model_factors[f]] = Some(x.clamp(-1.0, 1.0));
            settings = s;
            equally_good = 1;
            target_reached = Some(true);
        } else {
            target_reached = Some(false);
        }
    }
    let prediction = predict(fit, &filled(&settings), confidence)?;
    Ok(Optimum {
        goal,
        value: transform.back(prediction.value),
        settings,
        model_factors,
        unused_factors,
        equally_good,
        target_reached,
        curvature_warning: prediction.curvature_warning,
        prediction,
    })
}

/// Settings with factors that do not matter put at the centre.
fn filled(settings: &[Option<f64>]) -> Vec<f64> {
    settings.iter().map(|s| s.unwrap_or(0.0)).collect()
}

impl Optimum {
    /// The settings in natural units (`None` where the factor does not matter).
    pub fn natural_settings(&self, ranges: &[(f64, f64)]) -> Result<Vec<Option<f64>>, RangeError> {
        let mh = centre_and_half_range(ranges, self.settings.len())?;
        Ok(self
            .settings
            .iter()
            .zip(&mh)
            .map(|(s, (m, h))| s.map(|x| m + x * h))
            .collect())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::anova::{ModelSpec, fit_model};
    use crate::data::Observations;
    use crate::term::Term;
    use crate::test_support::full;

    fn fit_of(k: usize, y: &[f64], terms: &[&str]) -> ModelFit {
        let o = Observations::new(
            k,
            full(k),
            vec![],
            y.iter().map(|&v| Some(v)).collect(),
            vec![],
        )
        .unwrap();
        let terms = terms.iter().map(|l| Term::parse(l, k).unwrap()).collect();
        fit_model(&o, &ModelSpec::new(terms)).unwrap()
    }

    #[test]
    fn corner_enumeration_agrees_with_brute_force() {
        // Two implementations that must agree: the Gray-code walk and evaluating every corner.
        let y = [
            45.0, 71.0, 48.0, 65.0, 68.0, 60.0, 80.0, 65.0, 43.0, 100.0, 45.0, 104.0, 75.0, 86.0,
            70.0, 96.0,
        ];
        let fit = fit_of(4, &y, &["A", "C", "D", "AC", "AD"]);
        for goal in [Goal::Maximise, Goal::Minimise] {
            let opt = best_settings(&fit, goal, &Transform::None, 0.95).unwrap();
            let values = full(3)
                .into_iter()
                .map(|c| fit.value_at(&[c[0], 0.0, c[1], c[2]]));
            let best = match goal {
                Goal::Maximise => values.fold(f64::NEG_INFINITY, f64::max),
                _ => values.fold(f64::INFINITY, f64::min),
            };
            assert!((opt.prediction.value - best).abs() < 1e-9, "{goal:?}");
            assert_eq!(opt.unused_factors, vec![1]);
            assert_eq!(opt.settings[1], None);
            assert_eq!(opt.equally_good, 1);
        }
        // Filtration (Montgomery Example 6-2, reduced model): the rate is highest at A+, C−, D+
        // (effects A 21.625, AC −18.125, AD 16.625; verified in REFERENCES.md).
        let max = best_settings(&fit, Goal::Maximise, &Transform::None, 0.95).unwrap();
        assert_eq!(max.settings, vec![Some(1.0), None, Some(-1.0), Some(1.0)]);
    }

    #[test]
    fn a_target_inside_the_range_is_reached_on_an_edge() {
        let y = [10.0, 20.0, 14.0, 30.0];
        let fit = fit_of(2, &y, &["A", "B", "AB"]);
        let opt = best_settings(&fit, Goal::Target(17.0), &Transform::None, 0.95).unwrap();
        assert_eq!(opt.target_reached, Some(true));
        assert!((opt.prediction.value - 17.0).abs() < 1e-9);
        assert!(
            opt.settings
                .iter()
                .all(|s| s.is_some_and(|x| x.abs() <= 1.0))
        );
        let out = best_settings(&fit, Goal::Target(40.0), &Transform::None, 0.95).unwrap();
        assert_eq!(out.target_reached, Some(false));
        assert!((out.prediction.value - 30.0).abs() < 1e-9);
    }

    #[test]
    fn a_decreasing_transform_flips_the_goal() {
        // The values below are 1/y: the largest y is where the fitted 1/y is smallest, at A+ B+,
        // where the model A + B gives 0.2625 − 0.0875 − 0.1125 = 0.0625, i.e. y = 16 (by hand).
        let inv_y = [0.5, 0.25, 0.2, 0.1];
        let fit = fit_of(2, &inv_y, &["A", "B"]);
        let opt = best_settings(&fit, Goal::Maximise, &Transform::Inverse, 0.95).unwrap();
        assert_eq!(opt.settings, vec![Some(1.0), Some(1.0)]);
        assert!((opt.value.unwrap() - 16.0).abs() < 1e-9);
    }

    #[test]
    fn ties_are_counted() {
        let y = [1.0, 3.0, 1.0, 3.0];
        let fit = fit_of(2, &y, &["A", "B"]);
        let opt = best_settings(&fit, Goal::Maximise, &Transform::None, 0.95).unwrap();
        assert_eq!(opt.equally_good, 2);
    }

    #[test]
    fn intervals_widen_from_confidence_to_prediction() {
        let y = [10.0, 20.0, 14.0, 30.0, 11.0, 19.0, 15.0, 29.0];
        let fit = fit_of(3, &y, &["A", "B"]);
        let p = predict(&fit, &[1.0, 1.0, 0.0], 0.95).unwrap();
        let (cl, ch) = p.confidence_interval.unwrap();
        let (pl, ph) = p.prediction_interval.unwrap();
        assert!(pl < cl && cl < p.value && p.value < ch && ch < ph);
        // Half-width by hand: t(0.975, 5)·s·√(x₀ᵀ(XᵀX)⁻¹x₀) with x₀ᵀ(XᵀX)⁻¹x₀ = 3/8 for an
        // orthogonal 8-run design and a corner (common practice, no source).
        let t = t_quantile(0.975, 5).unwrap();
        let half = t * fit.sigma.unwrap() * (3.0f64 / 8.0).sqrt();
        assert!((ch - p.value - half).abs() < 1e-12);
        assert!(!p.extrapolated);
        assert!(predict(&fit, &[1.5, 0.0, 0.0], 0.95).unwrap().extrapolated);
    }

    #[test]
    fn bad_inputs_give_typed_errors() {
        let fit = fit_of(2, &[1.0, 2.0, 3.0, 5.0], &["A", "B"]);
        assert_eq!(
            predict(&fit, &[0.0, 0.0], 1.0).unwrap_err(),
            PredictError::Confidence(1.0)
        );
        assert!(matches!(
            predict(&fit, &[0.0], 0.95),
            Err(PredictError::Range(RangeError::Count { .. }))
        ));
        assert!(matches!(
            predict(&fit, &[f64::NAN, 0.0], 0.95),
            Err(PredictError::Range(RangeError::NotFinite {
                factor: 'A',
                ..
            }))
        ));
        assert!(matches!(
            best_settings(&fit, Goal::Target(-1.0), &Transform::Ln, 0.95),
            Err(PredictError::Target { .. })
        ));
    }

    #[test]
    fn natural_units_round_trip() {
        let ranges = [(150.0, 200.0), (1.0, 3.0)];
        let c = to_coded(&[175.0, 3.0], &ranges).unwrap();
        assert_eq!(c, vec![0.0, 1.0]);
        assert_eq!(to_natural(&c, &ranges).unwrap(), vec![175.0, 3.0]);
        let fit = fit_of(2, &[1.0, 2.0, 3.0, 5.0], &["A", "B"]);
        let a = predict_natural(&fit, &[175.0, 3.0], &ranges, 0.95).unwrap();
        let b = predict(&fit, &[0.0, 1.0], 0.95).unwrap();
        assert_eq!(a.value, b.value);
    }
}
