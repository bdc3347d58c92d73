//! Transforms of the response before fitting, and back-transforms of predictions.
//!
//! A transform is applied to the response column, the model is fitted on the transformed scale,
//! and predictions are mapped back with [`Transform::back`]. Intervals are mapped back endpoint by
//! endpoint, which is exact for the monotone transforms offered here (a quantile of a monotone
//! function is the function of the quantile); the back-transformed centre is then the median, not
//! the mean, on the original scale (common practice, no source).

use serde::{Deserialize, Serialize};
use std::fmt;

/// A transform of the response.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize, Default)]
#[non_exhaustive]
pub enum Transform {
    /// The response as measured.
    #[default]
    None,
    /// Natural logarithm `ln y`; needs y > 0.
    Ln,
    /// Base-10 logarithm `log10 y`; needs y > 0.
    Log10,
    /// Square root `√y`; needs y ≥ 0.
    Sqrt,
    /// Reciprocal `1/y`; needs y > 0 (so that the transform is monotone over the data).
    Inverse,
    /// Power `y^λ` for λ ≠ 0; needs y > 0 (so that the transform is defined and monotone for
    /// every λ). For λ = 0 use [`Transform::Ln`], the limit of the Box–Cox family (Box & Cox 1964,
    /// JRSS B 26, eq. 1).
    Power(f64),
}

/// Why a transform cannot be applied.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum TransformError {
    /// Some runs hold values outside the transform's domain.
    #[error("{transform} needs {needs} responses; not so at {}", list_runs(.runs))]
    Domain {
        /// The transform, as written by [`Transform`]'s `Display`.
        transform: String,
        /// What the transform needs, e.g. "positive".
        needs: &'static str,
        /// 1-based run numbers and the offending values.
        runs: Vec<(usize, f64)>,
    },
    /// A power of exactly 0 would turn every value into 1.
    #[error("a power of 0 makes every response 1; use the natural log instead")]
    ZeroPower,
    /// The power is not a finite number.
    #[error("the power {0} is not a finite number")]
    BadPower(f64),
}

fn list_runs(runs: &[(usize, f64)]) -> String {
    // A long list helps nobody; the first few locate the problem.
    const SHOWN: usize = 5;
    let mut parts: Vec<String> = runs
        .iter()
        .take(SHOWN)
        .map(|(r, v)| format!("run {r} ({v})"))
        .collect();
    if runs.len() > SHOWN {
        parts.push(format!("and {} more", runs.len() - SHOWN));
    }
    parts.join(", ")
}

impl fmt::Display for Transform {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Transform::None => f.write_str("no transform"),
            Transform::Ln => f.write_str("ln"),
            Transform::Log10 => f.write_str("log10"),
            Transform::Sqrt => f.write_str("square root"),
            Transform::Inverse => f.write_str("inverse"),
            Transform::Power(l) => write!(f, "power {l}"),
        }
    }
}

impl Transform {
    /// Checks the parameters (a power must be finite and non-zero).
    pub fn validate(&self) -> Result<(), TransformError> {
        match *self {
            Transform::Power(l) if !l.is_finite() => Err(TransformError::BadPower(l)),
            Transform::Power(0.0) => Err(TransformError::ZeroPower),
            _ => Ok(()),
        }
    }

    /// What the transform needs of a value, in words, and whether `y` has it.
    fn domain(&self, y: f64) -> (&'static str, bool) {
        match self {
            Transform::None => ("finite", y.is_finite()),
            Transform::Sqrt => ("non-negative", y >= 0.0),
            Transform::Ln | Transform::Log10 | Transform::Inverse | Transform::Power(_) => {
                ("positive", y > 0.0)
            }
        }
    }

    /// The transformed value, or `None` outside the domain.
    pub fn apply(&self, y: f64) -> Option<f64> {
        if !self.domain(y).1 || self.validate().is_err() {
            return None;
        }
        let v = match *self {
            Transform::None => y,
            Transform::Ln => y.ln(),
            Transform::Log10 => y.log10(),
            Transform::Sqrt => y.sqrt(),
            Transform::Inverse => 1.0 / y,
            Transform::Power(l) => y.powf(l),
        };
        v.is_finite().then_some(v)
    }

    /// Transforms a response column (missing values stay missing). Every value outside the domain
    /// is reported, with its 1-based run number.
    pub fn apply_column(
        &self,
        response: &[Option<f64>],
    ) -> Result<Vec<Option<f64>>, TransformError> {
        self.validate()?;
        let mut bad = Vec::new();
        let mut out = Vec::with_capacity(response.len());
        for (r, v) in response.iter().enumerate() {
            match v {
                None => out.push(None),
                Some(y) => match self.apply(*y) {
                    Some(t) => out.push(Some(t)),
                    None => {
                        bad.push((r + 1, *y));
                        out.push(None);
                    }
                },
            }
        }
        if bad.is_empty() {
            Ok(out)
        } else {
            Err(TransformError::Domain {
                transform: self.to_string(),
                needs: self.domain(f64::NAN).0,
                runs: bad,
            })
        }
    }

    /// Maps a value on the transformed scale back to the original scale, or `None` when no
    /// original value gives it (e.g. a negative square root, or a non-positive value of `1/y`).
    pub fn back(&self, z: f64) -> Option<f64> {
        if !z.is_finite() || self.validate().is_err() {
            return None;
        }
        let y = match *self {
            Transform::None => z,
            Transform::Ln => z.exp(),
            Transform::Log10 => 10f64.powf(z),
            Transform::Sqrt if z >= 0.0 => z * z,
            Transform::Sqrt => return None,
            Transform::Inverse if z > 0.0 => 1.0 / z,
            Transform::Inverse => return None,
            Transform::Power(l) if z > 0.0 => z.powf(1.0 / l),
            Transform::Power(_) => return None,
        };
        y.is_finite().then_some(y)
    }

    /// Maps an interval back, endpoint by endpoint, returning it in increasing order (the inverse
    /// and negative powers reverse the order). `None` when an endpoint has no original value.
    pub fn back_interval(&self, lo: f64, hi: f64) -> Option<(f64, f64)> {
        let a = self.back(lo)?;
        let b = self.back(hi)?;
        Some((a.min(b), a.max(b)))
    }

    /// Whether a larger original value gives a larger transformed value. The inverse and negative
    /// powers reverse the order, which matters when maximising a prediction.
    pub fn is_increasing(&self) -> bool {
        match *self {
            Transform::Inverse => false,
            Transform::Power(l) => l > 0.0,
            _ => true,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Tolerance: the values are one or two floating-point operations from exact, so 1e-12.
    const TOL: f64 = 1e-12;

    #[test]
    fn round_trips_inside_the_domain() {
        let all = [
            Transform::None,
            Transform::Ln,
            Transform::Log10,
            Transform::Sqrt,
            Transform::Inverse,
            Transform::Power(0.5),
            Transform::Power(-1.5),
            Transform::Power(2.0),
        ];
        for t in all {
            for y in [0.25, 1.0, 3.7, 120.0] {
                let z = t.apply(y).unwrap();
                let back = t.back(z).unwrap();
                assert!(
                    (back - y).abs() <= TOL * y.max(1.0),
                    "{t}: {y} -> {z} -> {back}"
                );
            }
        }
    }

    #[test]
    fn known_values() {
        // Elementary identities (common practice, no source).
        assert!((Transform::Log10.apply(1000.0).unwrap() - 3.0).abs() < TOL);
        assert!((Transform::Inverse.apply(4.0).unwrap() - 0.25).abs() < TOL);
        assert!((Transform::Power(3.0).apply(2.0).unwrap() - 8.0).abs() < TOL);
        assert!((Transform::Sqrt.apply(0.0).unwrap()).abs() < TOL);
    }

    #[test]
    fn domain_errors_name_every_run() {
        let col = vec![Some(2.0), Some(-1.0), None, Some(0.0), Some(5.0)];
        let err = Transform::Ln.apply_column(&col).unwrap_err();
        match &err {
            TransformError::Domain { runs, needs, .. } => {
                assert_eq!(runs, &vec![(2, -1.0), (4, 0.0)]);
                assert_eq!(*needs, "positive");
            }
            other => panic!("unexpected {other:?}"),
        }
        assert_eq!(
            err.to_string(),
            "ln needs positive responses; not so at run 2 (-1), run 4 (0)"
        );
        // Square root accepts zero but not negatives.
        let err = Transform::Sqrt.apply_column(&col).unwrap_err();
        assert!(matches!(err, TransformError::Domain { ref runs, .. } if runs == &vec![(2, -1.0)]));
        // Missing values stay missing.
        let ok = Transform::None.apply_column(&col).unwrap();
        assert_eq!(ok[2], None);
    }

    #[test]
    fn bad_powers_are_rejected() {
        assert_eq!(
            Transform::Power(0.0).apply_column(&[Some(1.0)]),
            Err(TransformError::ZeroPower)
        );
        assert!(matches!(
            Transform::Power(f64::NAN).validate(),
            Err(TransformError::BadPower(_))
        ));
    }

    #[test]
    fn back_interval_is_ordered_and_undefined_outside_the_range() {
        let (a, b) = Transform::Inverse.back_interval(0.25, 0.5).unwrap();
        assert!((a - 2.0).abs() < TOL && (b - 4.0).abs() < TOL);
        assert_eq!(Transform::Sqrt.back(-0.1), None);
        assert_eq!(Transform::Inverse.back_interval(-0.1, 0.5), None);
        assert!(!Transform::Power(-0.5).is_increasing());
        assert!(Transform::Ln.is_increasing());
    }
}
