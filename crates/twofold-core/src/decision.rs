//! Settings that satisfy several responses at once, with noise factors held in check.
//!
//! Each response brings its fitted [`Surface`] (on the analysis scale), its transform, an
//! optional [`Goal`] on its mean and an optional goal on the spread the noise factors transmit
//! ([`crate::robust`]). At a coded point the mean of every response is predicted with the noise
//! factors at their centre and mapped back to the measured scale; its spread is
//! `σ_tr` mapped back to the measured scale to first order (`|dy/dz| · σ_tr` at the predicted
//! value, the delta method; common practice, no source). Each goal gives a desirability and the
//! overall desirability `D` is their weighted geometric mean ([`crate::desirability`],
//! Derringer & Suich 1980). [`Problem::solve`] maximises `D` over the box with
//! [`crate::optimise::maximise`]; where `D` is 0 the score is minus the total shortfall, so the
//! search still climbs towards settings that meet every limit.

use crate::desirability::{Goal, GoalError, overall};
use crate::optimise::{Coordinate, Found, SearchOptions, maximise};
use crate::robust::Surface;
use crate::transform::Transform;

/// Step of the numerical derivative of a back-transform, relative to the value.
const BACK_STEP: f64 = 1e-6;

/// One response of the decision.
#[derive(Debug, Clone, PartialEq)]
pub struct ResponseSpec {
    /// Name, for messages.
    pub name: String,
    /// The fitted model on the analysis scale.
    pub surface: Surface,
    /// The transform applied before fitting.
    pub transform: Transform,
    /// Goal on the predicted mean (measured scale); `None`: not asked, it does not count in D.
    pub goal: Option<Goal>,
    /// Goal on the transmitted spread (measured scale); `None`: not asked.
    pub spread_goal: Option<Goal>,
}

/// Why a decision cannot be searched for.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum DecisionError {
    /// A goal is unusable.
    #[error("goal of “{name}”: {source}")]
    Goal {
        /// Response name (with ".sd" for a spread goal).
        name: String,
        /// What is wrong.
        source: GoalError,
    },
    /// No response has a goal.
    #[error("no response has a goal: give at least one (maximise, minimise or a target)")]
    NoGoal,
    /// The settings list does not match the factors.
    #[error("{found} factor settings given for {expected} factors")]
    Count {
        /// Length given.
        found: usize,
        /// Factors.
        expected: usize,
    },
    /// A noise factor's standard deviation is not a positive number.
    #[error("the standard deviation of noise factor {0} must be a positive number")]
    NoiseSd(usize),
}

/// The whole question.
#[derive(Debug, Clone, PartialEq)]
pub struct Problem {
    /// The responses.
    pub responses: Vec<ResponseSpec>,
    /// What each factor may do (noise factors are [`Coordinate::Fixed`] at 0).
    pub coords: Vec<Coordinate>,
    /// Noise factors with their standard deviation in use, coded units.
    pub noise: Vec<(usize, f64)>,
}

/// One response at one point.
#[derive(Debug, Clone, PartialEq)]
pub struct ResponseAt {
    /// Predicted mean on the analysis scale (noise at centre).
    pub model_value: f64,
    /// Predicted mean on the measured scale; `None` when the back-transform has no value.
    pub predicted: Option<f64>,
    /// Transmitted spread on the measured scale; `None` without noise factors or when the
    /// back-transform has no value.
    pub transmitted_sd: Option<f64>,
    /// Slope of the analysis-scale response along each noise factor, in `Problem::noise` order.
    pub noise_slopes: Vec<f64>,
    /// Desirability of the mean (`None` without a goal).
    pub desirability: Option<f64>,
    /// Desirability of the spread (`None` without a spread goal).
    pub spread_desirability: Option<f64>,
}

/// Every response at one point, with the overall desirability.
#[derive(Debug, Clone, PartialEq)]
pub struct Evaluation {
    /// Coded point.
    pub point: Vec<f64>,
    /// One entry per response.
    pub responses: Vec<ResponseAt>,
    /// Overall desirability D.
    pub overall: f64,
    /// Total shortfall outside the limits, in limit widths (0 when every goal is met).
    pub shortfall: f64,
}

impl Evaluation {
    /// The search score: D, or minus the shortfall where D is 0.
    pub fn score(&self) -> f64 {
        if self.overall > 0.0 {
            self.overall
        } else {
            -self.shortfall
        }
    }
}

impl Problem {
    /// Checks goals and noise standard deviations.
    pub fn validate(&self) -> Result<(), DecisionError> {
        let mut any = false;
        for r in &self.responses {
            if let Some(g) = &r.goal {
                any = true;
                g.validate().map_err(|source| DecisionError::Goal {
                    name: r.name.clone(),
                    source,
                })?;
            }
            if let Some(g) = &r.spread_goal {
                any = true;
                g.validate().map_err(|source| DecisionError::Goal {
                    name: format!("{}.sd", r.name),
                    source,
                })?;
            }
        }
        if !any {
            return Err(DecisionError::NoGoal);
        }
        for &(j, sd) in &self.noise {
            if !(sd.is_finite() && sd > 0.0) {
                return Err(DecisionError::NoiseSd(j));
            }
        }
        Ok(())
    }

    /// Every response and the overall desirability at the coded point `x` (noise factors should
    /// be 0 in `x`).
    pub fn evaluate(&self, x: &[f64]) -> Evaluation {
        let mut parts: Vec<(f64, f64)> = Vec::new();
        let mut shortfall = 0.0;
        let responses = self
            .responses
            .iter()
            .map(|r| {
                let model_value = r.surface.value(x);
                let predicted = r.transform.back(model_value);
                let noise_slopes: Vec<f64> = self
                    .noise
                    .iter()
                    .map(|&(j, _)| r.surface.slope(x, j))
                    .collect();
                let transmitted_sd = if self.noise.is_empty() {
                    None
                } else {
                    let model_sd = r.surface.transmitted_sd(x, &self.noise);
                    back_slope(&r.transform, model_value).map(|g| g.abs() * model_sd)
                };
                let mut judge = |goal: &Option<Goal>, value: Option<f64>| {
                    goal.map(|g| {
                        let y = value.unwrap_or(f64::NAN);
                        let d = g.aim.desirability(y);
                        parts.push((d, g.importance));
                        shortfall += g.aim.shortfall(y).min(1e6) * g.importance;
                        d
                    })
                };
                let desirability = judge(&r.goal, predicted);
                let spread_desirability = judge(&r.spread_goal, transmitted_sd);
                ResponseAt {
                    model_value,
                    predicted,
                    transmitted_sd,
                    noise_slopes,
                    desirability,
                    spread_desirability,
                }
            })
            .collect();
        Evaluation {
            point: x.to_vec(),
            responses,
            overall: overall(&parts),
            shortfall,
        }
    }

    /// The best distinct settings, best first (see the module documentation).
    pub fn solve(&self, options: &SearchOptions) -> Result<Vec<Evaluation>, DecisionError> {
        self.validate()?;
        let found: Vec<Found> = maximise(&self.coords, |x| self.evaluate(x).score(), options);
        Ok(found.iter().map(|f| self.evaluate(&f.point)).collect())
    }

    /// A map over factors `a` (columns) and `b` (rows), each from −1 to +1 in `n` steps, the other
    /// factors at `base`.
    pub fn map(&self, base: &[f64], a: usize, b: usize, n: usize) -> Result<Map, DecisionError> {
        if base.len() != self.coords.len() {
            return Err(DecisionError::Count {
                found: base.len(),
                expected: self.coords.len(),
            });
        }
        let n = n.max(2);
        let mut cells = Vec::with_capacity(n * n);
        let mut x = base.to_vec();
        for row in 0..n {
            for col in 0..n {
                x[a] = -1.0 + 2.0 * col as f64 / (n - 1) as f64;
                x[b] = -1.0 + 2.0 * row as f64 / (n - 1) as f64;
                let e = self.evaluate(&x);
                let mut failing = Vec::new();
                for (i, r) in e.responses.iter().enumerate() {
                    if r.desirability == Some(0.0) {
                        failing.push(Limit::Mean(i));
                    }
                    if r.spread_desirability == Some(0.0) {
                        failing.push(Limit::Spread(i));
                    }
                }
                cells.push(MapCell {
                    overall: e.overall,
                    failing,
                });
            }
        }
        Ok(Map {
            factors: (a, b),
            steps: n,
            cells,
        })
    }
}

/// `dy/dz` of the back-transform at `z`, by a central difference; `None` where it has no value.
fn back_slope(t: &Transform, z: f64) -> Option<f64> {
    if *t == Transform::None {
        return Some(1.0);
    }
    let h = BACK_STEP * z.abs().max(1e-3);
    let up = t.back(z + h)?;
    let down = t.back(z - h)?;
    Some((up - down) / (2.0 * h))
}

/// Which limit a cell misses.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Limit {
    /// The mean of response `i` is outside its limits.
    Mean(usize),
    /// The spread of response `i` is outside its limits.
    Spread(usize),
}

/// One cell of a [`Map`].
#[derive(Debug, Clone, PartialEq)]
pub struct MapCell {
    /// Overall desirability there.
    pub overall: f64,
    /// The limits missed there (empty: every goal met).
    pub failing: Vec<Limit>,
}

/// Where in two factors every response meets its limits.
#[derive(Debug, Clone, PartialEq)]
pub struct Map {
    /// (column factor, row factor).
    pub factors: (usize, usize),
    /// Steps along each factor.
    pub steps: usize,
    /// `cells[row * steps + col]`, row 0 at the low level of the row factor.
    pub cells: Vec<MapCell>,
}

#[cfg(test)]
mod tests;
