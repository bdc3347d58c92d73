//! Desirability of a response value, and the overall desirability of several responses.
//!
//! # Formulas
//! Derringer & Suich (1980), "Simultaneous optimization of several response variables",
//! *Journal of Quality Technology* 12(4), 214–219 (from memory, checked against the worked
//! example in the tests). For a response value `y` with lower limit `L` and upper limit `U`:
//!
//! ```text
//! maximise   d = 0 for y ≤ L,  ((y − L)/(U − L))^r for L < y < U,  1 for y ≥ U
//! minimise   d = 1 for y ≤ L,  ((U − y)/(U − L))^r for L < y < U,  0 for y ≥ U
//! target T   d = ((y − L)/(T − L))^s for L ≤ y ≤ T,  ((U − y)/(U − T))^t for T ≤ y ≤ U,
//!            0 outside [L, U]
//! ```
//!
//! where `r`, `s`, `t` > 0 are the shape exponents (1 is a straight line; larger asks more of the
//! response near its best end). The overall desirability of responses with importances `w_i` is the
//! weighted geometric mean
//!
//! ```text
//! D = (Π d_i^{w_i})^{1 / Σ w_i}
//! ```
//!
//! which is 0 as soon as one response is outside its limits (Derringer & Suich use equal weights;
//! the importance weights are the common extension, e.g. Myers, Montgomery & Anderson-Cook,
//! *Response Surface Methodology*, the multiple-response chapter; from memory).

/// Why a goal cannot be used.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum GoalError {
    /// A limit, target, shape or importance is not a finite number.
    #[error("the {0} must be a number")]
    NotFinite(&'static str),
    /// The lower limit is not below the upper limit.
    #[error("the lower limit {low} must be below the upper limit {high}")]
    LimitsOrder {
        /// Lower limit as given.
        low: f64,
        /// Upper limit as given.
        high: f64,
    },
    /// The target is not strictly between the limits.
    #[error("the target {target} must lie between the limits {low} and {high}")]
    TargetOutside {
        /// Lower limit.
        low: f64,
        /// Target.
        target: f64,
        /// Upper limit.
        high: f64,
    },
    /// A shape exponent or importance is not positive.
    #[error("the {0} must be greater than 0")]
    NotPositive(&'static str),
}

/// What a response should do, with its limits (Derringer & Suich's one- and two-sided forms).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Aim {
    /// As large as possible: worthless at `low` or below, fully satisfying at `high` or above.
    Maximise {
        /// Lower limit L.
        low: f64,
        /// Upper limit U.
        high: f64,
        /// Shape exponent r.
        shape: f64,
    },
    /// As small as possible: fully satisfying at `low` or below, worthless at `high` or above.
    Minimise {
        /// Lower limit L.
        low: f64,
        /// Upper limit U.
        high: f64,
        /// Shape exponent r.
        shape: f64,
    },
    /// As close to `target` as possible, worthless outside `[low, high]`.
    Target {
        /// Lower limit L.
        low: f64,
        /// Target T.
        target: f64,
        /// Upper limit U.
        high: f64,
        /// Shape exponent s below the target.
        shape_below: f64,
        /// Shape exponent t above the target.
        shape_above: f64,
    },
}

/// A response's aim and its importance in the overall desirability.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Goal {
    /// What the response should do.
    pub aim: Aim,
    /// Importance `w` (weight in the geometric mean), > 0; 1 for all gives Derringer & Suich's D.
    pub importance: f64,
}

fn finite(x: f64, what: &'static str) -> Result<(), GoalError> {
    if x.is_finite() {
        Ok(())
    } else {
        Err(GoalError::NotFinite(what))
    }
}

fn positive(x: f64, what: &'static str) -> Result<(), GoalError> {
    finite(x, what)?;
    if x > 0.0 {
        Ok(())
    } else {
        Err(GoalError::NotPositive(what))
    }
}

impl Aim {
    /// The lower and upper limits.
    pub fn limits(&self) -> (f64, f64) {
        match *self {
            Aim::Maximise { low, high, .. }
            | Aim::Minimise { low, high, .. }
            | Aim::Target { low, high, .. } => (low, high),
        }
    }

    /// Checks limits, target and shapes.
    pub fn validate(&self) -> Result<(), GoalError> {
        let (low, high) = self.limits();
        finite(low, "lower limit")?;
        finite(high, "upper limit")?;
        if low >= high {
            return Err(GoalError::LimitsOrder { low, high });
        }
        match *self {
            Aim::Maximise { shape, .. } | Aim::Minimise { shape, .. } => {
                positive(shape, "shape exponent")
            }
            Aim::Target {
                target,
                shape_below,
                shape_above,
                ..
            } => {
                finite(target, "target")?;
                if !(target > low && target < high) {
                    return Err(GoalError::TargetOutside { low, target, high });
                }
                positive(shape_below, "shape exponent below the target")?;
                positive(shape_above, "shape exponent above the target")
            }
        }
    }

    /// Desirability `d` of the value `y` (see the module documentation), in `[0, 1]`. A value
    /// that is not finite is worthless.
    pub fn desirability(&self, y: f64) -> f64 {
        if !y.is_finite() {
            return 0.0;
        }
        match *self {
            Aim::Maximise { low, high, shape } => {
                if y <= low {
                    0.0
                } else if y >= high {
                    1.0
                } else {
                    ((y - low) / (high - low)).powf(shape)
                }
            }
            Aim::Minimise { low, high, shape } => {
                if y <= low {
                    1.0
                } else if y >= high {
                    0.0
                } else {
                    ((high - y) / (high - low)).powf(shape)
                }
            }
            Aim::Target {
                low,
                target,
                high,
                shape_below,
                shape_above,
            } => {
                if y < low || y > high {
                    0.0
                } else if y <= target {
                    ((y - low) / (target - low)).powf(shape_below)
                } else {
                    ((high - y) / (high - target)).powf(shape_above)
                }
            }
        }
    }

    /// How far `y` lies outside the values with `d > 0`, in units of `high − low` (0 inside).
    /// Lets a search move towards the acceptable region where every `d` is 0 (common practice,
    /// no source).
    pub fn shortfall(&self, y: f64) -> f64 {
        if !y.is_finite() {
            return f64::MAX;
        }
        let (low, high) = self.limits();
        let width = high - low;
        let outside = match *self {
            Aim::Maximise { .. } => (low - y).max(0.0),
            Aim::Minimise { .. } => (y - high).max(0.0),
            Aim::Target { .. } => (low - y).max(0.0) + (y - high).max(0.0),
        };
        // At the limit itself d is 0 for a one-sided goal: count a sliver so the search still
        // moves inside.
        let at_edge = match *self {
            Aim::Maximise { .. } if y <= low => 1e-9,
            Aim::Minimise { .. } if y >= high => 1e-9,
            _ => 0.0,
        };
        outside / width + at_edge
    }

    /// Which limit the value is held by, in words, when it is not fully satisfying: "below the
    /// lower limit", "at the upper limit", ... `None` when `d = 1`.
    pub fn standing(&self, y: f64) -> Option<&'static str> {
        let d = self.desirability(y);
        if d >= 1.0 {
            return None;
        }
        let (low, high) = self.limits();
        Some(match *self {
            Aim::Maximise { .. } if y <= low => "below its lower limit",
            Aim::Maximise { .. } => "short of its upper limit",
            Aim::Minimise { .. } if y >= high => "above its upper limit",
            Aim::Minimise { .. } => "above its lower limit",
            Aim::Target { .. } if y < low => "below its lower limit",
            Aim::Target { .. } if y > high => "above its upper limit",
            Aim::Target { target, .. } if y < target => "below its target",
            Aim::Target { .. } => "above its target",
        })
    }
}

impl Goal {
    /// Checks the aim and the importance.
    pub fn validate(&self) -> Result<(), GoalError> {
        self.aim.validate()?;
        positive(self.importance, "importance")
    }
}

/// Overall desirability `D = (Π d_i^{w_i})^{1/Σ w_i}` of `(d_i, w_i)` pairs; 1 for an empty list
/// (nothing asked, nothing missed) and 0 when any `d_i` is 0.
pub fn overall(parts: &[(f64, f64)]) -> f64 {
    let total: f64 = parts.iter().map(|(_, w)| w).sum();
    if parts.is_empty() || total <= 0.0 {
        return 1.0;
    }
    if parts.iter().any(|(d, _)| *d <= 0.0) {
        return 0.0;
    }
    let log: f64 = parts.iter().map(|(d, w)| w * d.ln()).sum();
    (log / total).exp()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn max(low: f64, high: f64, shape: f64) -> Aim {
        Aim::Maximise { low, high, shape }
    }

    #[test]
    fn one_sided_forms_follow_the_formulas() {
        // Formulas of Derringer & Suich (1980), evaluated by hand.
        let a = max(120.0, 170.0, 1.0);
        assert_eq!(a.desirability(110.0), 0.0);
        assert_eq!(a.desirability(120.0), 0.0);
        assert!((a.desirability(145.0) - 0.5).abs() < 1e-15);
        assert_eq!(a.desirability(171.0), 1.0);
        let a2 = max(0.0, 10.0, 2.0);
        assert!((a2.desirability(5.0) - 0.25).abs() < 1e-15);
        let m = Aim::Minimise {
            low: 2.0,
            high: 6.0,
            shape: 0.5,
        };
        assert_eq!(m.desirability(1.0), 1.0);
        assert!((m.desirability(5.0) - 0.5).abs() < 1e-15);
        assert_eq!(m.desirability(6.0), 0.0);
    }

    #[test]
    fn two_sided_form_peaks_at_the_target() {
        let t = Aim::Target {
            low: 400.0,
            target: 500.0,
            high: 600.0,
            shape_below: 1.0,
            shape_above: 2.0,
        };
        assert_eq!(t.desirability(500.0), 1.0);
        assert!((t.desirability(450.0) - 0.5).abs() < 1e-15);
        assert!((t.desirability(550.0) - 0.25).abs() < 1e-15);
        assert_eq!(t.desirability(399.0), 0.0);
        assert_eq!(t.desirability(601.0), 0.0);
        assert_eq!(t.standing(450.0), Some("below its target"));
        assert_eq!(t.standing(500.0), None);
    }

    #[test]
    fn overall_is_the_weighted_geometric_mean() {
        let d = overall(&[(0.25, 1.0), (1.0, 1.0)]);
        assert!((d - 0.5).abs() < 1e-15);
        // Importance 2 on the first: (0.25² · 1)^(1/3).
        let d = overall(&[(0.25, 2.0), (1.0, 1.0)]);
        assert!((d - 0.0625f64.powf(1.0 / 3.0)).abs() < 1e-15);
        assert_eq!(overall(&[(0.0, 1.0), (1.0, 1.0)]), 0.0);
        assert_eq!(overall(&[]), 1.0);
    }

    #[test]
    fn bad_goals_are_named() {
        assert_eq!(
            max(5.0, 5.0, 1.0).validate(),
            Err(GoalError::LimitsOrder {
                low: 5.0,
                high: 5.0
            })
        );
        let t = Aim::Target {
            low: 1.0,
            target: 3.0,
            high: 2.0,
            shape_below: 1.0,
            shape_above: 1.0,
        };
        assert!(matches!(t.validate(), Err(GoalError::TargetOutside { .. })));
        assert_eq!(
            max(0.0, 1.0, 0.0).validate(),
            Err(GoalError::NotPositive("shape exponent"))
        );
        let g = Goal {
            aim: max(0.0, 1.0, 1.0),
            importance: -1.0,
        };
        assert_eq!(g.validate(), Err(GoalError::NotPositive("importance")));
    }

    #[test]
    fn shortfall_points_towards_the_acceptable_values() {
        let a = max(10.0, 20.0, 1.0);
        assert!(a.shortfall(0.0) > a.shortfall(5.0));
        assert_eq!(a.shortfall(15.0), 0.0);
        assert!(a.shortfall(10.0) > 0.0);
    }
}
