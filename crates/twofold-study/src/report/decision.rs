//! Which settings to run: every response's goal at once, noise factors held in check.
//!
//! Built from the project's goals and the reports of all its responses (one fitted model each,
//! the same fits the other steps show), by [`decide`]; rendered by the window's "Which settings
//! to run?" step, the summary page and `twofold best`. The mathematics is the core's
//! `decision` module (Derringer & Suich desirability, transmitted spread after the
//! combined-array, response-model approach of Myers, Montgomery & Anderson-Cook).

use twofold_core::decision::{DecisionError, Evaluation, Map, Problem, ResponseSpec};
use twofold_core::optimise::{Coordinate, SearchOptions};
use twofold_core::predict::DEFAULT_CONFIDENCE;
use twofold_core::robust::Surface;
use twofold_core::term::factor_letter;

use super::Report;
use crate::numbers::fmt_num;
use crate::project::{FactorKind, Project, ResponseGoal};

/// How many distinct settings are reported.
pub const SETTINGS_KEPT: usize = 3;
/// Steps along each factor of the map of limits.
pub const MAP_STEPS: usize = 41;

/// A factor setting in natural units, as the engineer sets it.
#[derive(Debug, Clone, PartialEq)]
pub enum Setting {
    /// A numeric value.
    Number(f64),
    /// One of the two named settings.
    Label(String),
    /// A noise factor: not set in use; the mean is for its centre.
    Noise,
}

impl Setting {
    /// The setting in words with its unit.
    pub fn words(&self, unit: &str) -> String {
        match self {
            Setting::Number(v) if unit.is_empty() => fmt_num(*v, 4),
            Setting::Number(v) => format!("{} {unit}", fmt_num(*v, 4)),
            Setting::Label(l) => l.clone(),
            Setting::Noise => "not set (noise)".to_string(),
        }
    }
}

/// One response at the chosen settings.
#[derive(Debug, Clone, PartialEq)]
pub struct ResponseOutcome {
    /// Response position.
    pub response: usize,
    /// Predicted mean on the measured scale (noise factors at their centre).
    pub predicted: Option<f64>,
    /// Prediction interval of one new run (95 %), measured scale.
    pub interval: Option<(f64, f64)>,
    /// Desirability of the mean (`None`: no goal).
    pub desirability: Option<f64>,
    /// Spread transmitted by the noise factors, measured scale (`None`: no noise factors).
    pub transmitted_sd: Option<f64>,
    /// Desirability of the spread (`None`: no spread goal).
    pub spread_desirability: Option<f64>,
    /// Slope of the response (analysis scale, per coded unit) along each noise factor, in
    /// [`Decision::noise`] order.
    pub noise_slopes: Vec<f64>,
    /// Where the mean stands against its goal when not fully met ("below its target").
    pub standing: Option<&'static str>,
}

/// One choice of settings.
#[derive(Debug, Clone, PartialEq)]
pub struct Choice {
    /// Coded setting per factor (noise factors 0).
    pub coded: Vec<f64>,
    /// Natural setting per factor.
    pub natural: Vec<Setting>,
    /// Overall desirability D.
    pub overall: f64,
    /// Every response, in project order.
    pub responses: Vec<ResponseOutcome>,
    /// What holds D down, in words (the lowest desirability, factors at the edge of the box).
    pub binding: Vec<String>,
}

/// The answer of "Which settings to run?".
#[derive(Debug, Clone, PartialEq)]
pub struct Decision {
    /// Each response's goal and spread goal, in project order.
    pub goals: Vec<(ResponseGoal, ResponseGoal)>,
    /// Noise factors with their standard deviation in use (coded units).
    pub noise: Vec<(usize, f64)>,
    /// The best settings, best first, or why there are none.
    pub best: Result<Vec<Choice>, String>,
    /// Notes in words (responses left out, curvature, safe ranges).
    pub notes: Vec<String>,
    problem: Option<Problem>,
}

impl Decision {
    /// Whether any response has a goal.
    pub fn any_goal(&self) -> bool {
        self.goals
            .iter()
            .any(|(g, s)| !g.is_ignored() || !s.is_ignored())
    }

    /// The map of limits over factors `a` (columns) and `b` (rows), the others at the best
    /// settings; `None` without a best choice or for a bad factor.
    pub fn map(&self, a: usize, b: usize, steps: usize) -> Option<Map> {
        let problem = self.problem.as_ref()?;
        let best = self.best.as_ref().ok()?.first()?;
        if a == b {
            return None;
        }
        problem.map(&best.coded, a, b, steps).ok()
    }
}

/// Options of [`decide`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DecideOptions {
    /// How many distinct settings to keep.
    pub keep: usize,
}

impl Default for DecideOptions {
    fn default() -> Self {
        DecideOptions {
            keep: SETTINGS_KEPT,
        }
    }
}

/// The best settings for every goal of the project, from `reports` (one per response, in
/// project order).
pub fn decide(project: &Project, reports: &[&Report], options: &DecideOptions) -> Decision {
    let goals: Vec<(ResponseGoal, ResponseGoal)> = project
        .responses
        .iter()
        .map(|r| (r.goal, r.spread_goal))
        .collect();
    let noise: Vec<(usize, f64)> = project
        .factors
        .iter()
        .enumerate()
        .filter_map(|(i, f)| f.noise_sd.map(|sd| (i, sd)))
        .collect();
    let mut notes = Vec::new();
    let mut decision = Decision {
        goals,
        noise: noise.clone(),
        best: Err(String::new()),
        notes: Vec::new(),
        problem: None,
    };
    if !decision.any_goal() {
        decision.best = Err(
            "no response has a goal yet: say for each response whether it should be large, small or near a target, and its limits"
                .to_string(),
        );
        return decision;
    }
    let mut specs = Vec::new();
    for (i, def) in project.responses.iter().enumerate() {
        let report = reports.iter().find(|r| r.response == i);
        let fit = report.map(|r| r.fit.as_ref());
        let asked = !def.goal.is_ignored() || !def.spread_goal.is_ignored();
        let (surface, transform) = match (report, fit) {
            (Some(r), Some(Ok(f))) => (Surface::from_fit(f), r.transform),
            (_, why) => {
                let why = match why {
                    Some(Err(w)) => w.clone(),
                    _ => "not analysed".to_string(),
                };
                if asked {
                    decision.best = Err(format!("“{}” has a goal but no model: {why}", def.name));
                    return decision;
                }
                notes.push(format!(
                    "“{}” is not shown: it has no model ({why})",
                    def.name
                ));
                (
                    Surface {
                        factor_count: project.factors.len(),
                        intercept: f64::NAN,
                        terms: Vec::new(),
                    },
                    twofold_core::transform::Transform::None,
                )
            }
        };
        if report.is_some_and(|r| {
            r.curvature
                .as_ref()
                .and_then(|c| c.p)
                .is_some_and(|p| p < twofold_core::predict::CURVATURE_ALPHA)
        }) {
            notes.push(format!(
                "“{}”: the centre points show curvature, so the best settings may lie inside the box where this model cannot see (add axial runs to fit it)",
                def.name
            ));
        }
        specs.push(ResponseSpec {
            name: def.name.clone(),
            surface,
            transform,
            goal: def.goal.to_core(),
            spread_goal: if noise.is_empty() {
                None
            } else {
                def.spread_goal.to_core()
            },
        });
    }
    let coords: Vec<Coordinate> = project
        .factors
        .iter()
        .map(|f| match (&f.kind, f.noise_sd) {
            (_, Some(_)) => Coordinate::Fixed(0.0),
            (FactorKind::Numeric { .. }, None) => Coordinate::Continuous,
            (FactorKind::Categorical { .. }, None) => Coordinate::TwoLevel,
        })
        .collect();
    let problem = Problem {
        responses: specs,
        coords,
        noise,
    };
    let search = SearchOptions {
        keep: options.keep,
        ..SearchOptions::default()
    };
    decision.best = match problem.solve(&search) {
        Ok(found) => Ok(found
            .iter()
            .map(|e| choice(project, reports, &problem, e))
            .collect()),
        Err(DecisionError::Goal { name, source }) => Err(format!("goal of “{name}”: {source}")),
        Err(e) => Err(e.to_string()),
    };
    if let Ok(best) = &decision.best
        && let Some(first) = best.first()
    {
        notes.extend(safe_range_notes(project, first));
    }
    decision.notes = notes;
    decision.problem = Some(problem);
    decision
}

fn choice(project: &Project, reports: &[&Report], problem: &Problem, e: &Evaluation) -> Choice {
    let natural: Vec<Setting> = project
        .factors
        .iter()
        .zip(&e.point)
        .map(|(f, &x)| match (&f.kind, f.noise_sd) {
            (_, Some(_)) => Setting::Noise,
            (FactorKind::Numeric { low, high }, None) => {
                Setting::Number(0.5 * (low + high) + x * 0.5 * (high - low))
            }
            (
                FactorKind::Categorical {
                    low_label,
                    high_label,
                },
                None,
            ) => Setting::Label(if x > 0.0 { high_label } else { low_label }.clone()),
        })
        .collect();
    let responses: Vec<ResponseOutcome> = e
        .responses
        .iter()
        .enumerate()
        .map(|(i, at)| {
            let report = reports.iter().find(|r| r.response == i);
            let interval = report.and_then(|r| {
                r.predict(&e.point, DEFAULT_CONFIDENCE)
                    .ok()
                    .and_then(|p| p.back_transformed(&r.transform).prediction_interval)
            });
            let standing = problem.responses[i]
                .goal
                .and_then(|g| at.predicted.and_then(|y| g.aim.standing(y)));
            ResponseOutcome {
                response: i,
                predicted: at.predicted,
                interval,
                desirability: at.desirability,
                transmitted_sd: at.transmitted_sd,
                spread_desirability: at.spread_desirability,
                noise_slopes: at.noise_slopes.clone(),
                standing,
            }
        })
        .collect();
    let binding = binding_words(project, problem, e, &responses);
    Choice {
        coded: e.point.clone(),
        natural,
        overall: e.overall,
        responses,
        binding,
    }
}

/// What holds the overall desirability down: the goal with the lowest desirability, and
/// controls at an edge of the tested range (better settings may lie beyond it).
fn binding_words(
    project: &Project,
    problem: &Problem,
    e: &Evaluation,
    outcomes: &[ResponseOutcome],
) -> Vec<String> {
    let mut words = Vec::new();
    let mut lowest: Option<(f64, String)> = None;
    for (o, def) in outcomes.iter().zip(&project.responses) {
        let parts = [
            (o.desirability, def.name.clone(), o.standing),
            (
                o.spread_desirability,
                format!("the spread of “{}”", def.name),
                None,
            ),
        ];
        for (d, name, standing) in parts {
            let Some(d) = d else { continue };
            if d < 1.0 && lowest.as_ref().is_none_or(|(l, _)| d < *l) {
                let what = match standing {
                    Some(s) => format!("“{name}” ({s}, d = {})", fmt_num(d, 2)),
                    None => format!("{name} (d = {})", fmt_num(d, 2)),
                };
                lowest = Some((d, what));
            }
        }
    }
    match lowest {
        Some((d, what)) if d <= 0.0 => words.push(format!(
            "no setting in the tested ranges meets every limit; furthest off: {what}"
        )),
        Some((_, what)) => words.push(format!("the goal that binds: {what}")),
        None if problem.responses.iter().any(|r| r.goal.is_some()) => {
            words.push("every goal is fully met".to_string());
        }
        None => {}
    }
    for (i, (c, &x)) in problem.coords.iter().zip(&e.point).enumerate() {
        if *c == Coordinate::Continuous && x.abs() > 1.0 - 1e-6 {
            let name = project.factors.get(i).map_or("", |f| f.name.as_str());
            let letter = factor_letter(i).unwrap_or('?');
            words.push(format!(
                "{letter} “{name}” sits at the {} end of its tested range: better settings may lie beyond it",
                if x > 0.0 { "high" } else { "low" }
            ));
        }
    }
    words
}

fn safe_range_notes(project: &Project, best: &Choice) -> Vec<String> {
    project
        .factors
        .iter()
        .zip(&best.natural)
        .filter_map(|(f, s)| match (s, f.safe_range) {
            (Setting::Number(v), Some((lo, hi))) if *v < lo || *v > hi => Some(format!(
                "“{}” at {} is outside its declared safe range {} to {}: do not run it without checking",
                f.name,
                s.words(&f.unit),
                fmt_num(lo, 4),
                fmt_num(hi, 4)
            )),
            _ => None,
        })
        .collect()
}

#[cfg(test)]
mod tests;
