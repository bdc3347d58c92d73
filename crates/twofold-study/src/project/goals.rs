//! What the engineer wants of the responses when settings are chosen, which factors are noise,
//! and what the power of a design rests on: plain data kept in the project file.
//!
//! The mathematics lives in `twofold_core::desirability` (Derringer & Suich 1980),
//! `twofold_core::robust` (transmitted spread) and `twofold_core::power`.

use serde::{Deserialize, Serialize};
use twofold_core::desirability::{Aim, Goal};

/// Default importance of a goal.
pub const DEFAULT_IMPORTANCE: f64 = 1.0;
/// Default level of the test in power figures.
pub const DEFAULT_ALPHA: f64 = 0.05;
/// Default power asked of a design.
pub const DEFAULT_POWER: f64 = 0.8;

/// What a response (or its spread) should do when settings are chosen.
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize, Deserialize)]
pub enum GoalAim {
    /// Not part of the choice.
    #[default]
    Ignore,
    /// As large as possible: worthless at `low`, fully satisfying at `high`.
    Maximise {
        /// Lower limit.
        low: f64,
        /// Upper limit.
        high: f64,
        /// Shape exponent.
        #[serde(default = "one")]
        shape: f64,
    },
    /// As small as possible: fully satisfying at `low`, worthless at `high`.
    Minimise {
        /// Lower limit.
        low: f64,
        /// Upper limit.
        high: f64,
        /// Shape exponent.
        #[serde(default = "one")]
        shape: f64,
    },
    /// As close to `target` as possible, worthless outside the limits.
    Target {
        /// Lower limit.
        low: f64,
        /// Target.
        target: f64,
        /// Upper limit.
        high: f64,
        /// Shape exponent below the target.
        #[serde(default = "one")]
        shape_below: f64,
        /// Shape exponent above the target.
        #[serde(default = "one")]
        shape_above: f64,
    },
}

fn one() -> f64 {
    1.0
}

/// A goal with its importance.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ResponseGoal {
    /// What the value should do.
    pub aim: GoalAim,
    /// Weight in the overall desirability (> 0).
    #[serde(default = "one")]
    pub importance: f64,
}

impl Default for ResponseGoal {
    /// Ignored, importance 1.
    fn default() -> Self {
        ResponseGoal {
            aim: GoalAim::Ignore,
            importance: DEFAULT_IMPORTANCE,
        }
    }
}

impl ResponseGoal {
    /// Whether the goal takes no part in the choice (not written to the file).
    pub fn is_ignored(&self) -> bool {
        self.aim == GoalAim::Ignore
    }

    /// The core's goal; `None` when ignored.
    pub fn to_core(&self) -> Option<Goal> {
        let aim = match self.aim {
            GoalAim::Ignore => return None,
            GoalAim::Maximise { low, high, shape } => Aim::Maximise { low, high, shape },
            GoalAim::Minimise { low, high, shape } => Aim::Minimise { low, high, shape },
            GoalAim::Target {
                low,
                target,
                high,
                shape_below,
                shape_above,
            } => Aim::Target {
                low,
                target,
                high,
                shape_below,
                shape_above,
            },
        };
        Some(Goal {
            aim,
            importance: self.importance,
        })
    }

    /// The goal in words, as the window and the page write it: "as large as possible, 60 to 85",
    /// "70 (65 to 75)", "ignored".
    pub fn words(&self, unit: &str) -> String {
        let n = |x: f64| crate::numbers::fmt_num(x, 4);
        let u = if unit.is_empty() {
            String::new()
        } else {
            format!(" {unit}")
        };
        let base = match self.aim {
            GoalAim::Ignore => return "ignored".to_string(),
            GoalAim::Maximise { low, high, shape } => format!(
                "as large as possible: worthless at {}, fully met at {}{u}{}",
                n(low),
                n(high),
                shape_words(shape)
            ),
            GoalAim::Minimise { low, high, shape } => format!(
                "as small as possible: fully met at {}, worthless at {}{u}{}",
                n(low),
                n(high),
                shape_words(shape)
            ),
            GoalAim::Target {
                low, target, high, ..
            } => format!(
                "target {}{u}, acceptable from {} to {}",
                n(target),
                n(low),
                n(high)
            ),
        };
        if (self.importance - DEFAULT_IMPORTANCE).abs() > 0.0 {
            format!("{base}; importance {}", n(self.importance))
        } else {
            base
        }
    }
}

fn shape_words(shape: f64) -> String {
    if (shape - 1.0).abs() > 0.0 {
        format!(" (shape {})", crate::numbers::fmt_num(shape, 3))
    } else {
        String::new()
    }
}

/// What the power of a design rests on, typed in the design step.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PowerSettings {
    /// Process standard deviation σ in the units of the response planned for; `None`: not known
    /// yet.
    #[serde(default)]
    pub sigma: Option<f64>,
    /// Level of the two-sided test.
    #[serde(default = "default_alpha")]
    pub alpha: f64,
    /// Power asked for the smallest detectable effect.
    #[serde(default = "default_power")]
    pub power: f64,
    /// An effect size the engineer cares about (replicates needed for it); `None`: not given.
    #[serde(default)]
    pub effect: Option<f64>,
    /// The model the test is made in, as typed: term labels separated by commas or spaces
    /// (`A, B, AB`); empty: the main effects.
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub model_terms: String,
}

fn default_alpha() -> f64 {
    DEFAULT_ALPHA
}

fn default_power() -> f64 {
    DEFAULT_POWER
}

impl Default for PowerSettings {
    /// σ unknown, α = 0.05, power 0.8, no effect size.
    fn default() -> Self {
        PowerSettings {
            sigma: None,
            alpha: DEFAULT_ALPHA,
            power: DEFAULT_POWER,
            effect: None,
            model_terms: String::new(),
        }
    }
}

impl PowerSettings {
    /// The labels of the named model, as typed (empty: the main effects).
    pub fn model_labels(&self) -> Vec<&str> {
        self.model_terms
            .split([',', ' ', ';'])
            .map(str::trim)
            .filter(|s| !s.is_empty())
            .collect()
    }

    /// Whether nothing was typed (not written to the file).
    pub fn is_default(&self) -> bool {
        *self == PowerSettings::default()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn goals_map_to_the_core_and_read_in_words() {
        let g = ResponseGoal {
            aim: GoalAim::Target {
                low: 65.0,
                target: 70.0,
                high: 75.0,
                shape_below: 1.0,
                shape_above: 1.0,
            },
            importance: 2.0,
        };
        assert_eq!(
            g.words("GU"),
            "target 70 GU, acceptable from 65 to 75; importance 2"
        );
        let Some(core) = g.to_core() else {
            panic!("a target is a goal")
        };
        assert_eq!(core.importance, 2.0);
        assert!((core.aim.desirability(67.5) - 0.5).abs() < 1e-15);
        assert!(ResponseGoal::default().to_core().is_none());
        assert_eq!(ResponseGoal::default().words(""), "ignored");
    }
}
