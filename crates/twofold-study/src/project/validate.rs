//! Per-field problems of a project: errors that stop planning or analysis, and warnings the
//! engineer should see but may override.

use super::model::{BlockChoice, FactorKind, MAX_FACTORS, MIN_FACTORS, Project};
use twofold_core::foldover::FoldKind;

/// How serious a problem is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Severity {
    /// Worth a look; nothing is blocked (e.g. a level outside the safe range).
    Warning,
    /// Planning or analysis cannot go on until it is fixed.
    Error,
}

/// Which part of a factor a problem is about.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum FactorField {
    /// The name.
    Name,
    /// The unit.
    Unit,
    /// The levels (numeric values or labels).
    Levels,
    /// The safe range.
    SafeRange,
}

/// Where a problem is, so the window can show it beside the field.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum Field {
    /// The project's name.
    ProjectName,
    /// The list of factors as a whole (e.g. how many there are).
    Factors,
    /// One field of one factor.
    Factor {
        /// Factor position.
        index: usize,
        /// Which field.
        part: FactorField,
    },
    /// The design settings.
    Design,
    /// The name of one response.
    ResponseName {
        /// Response position.
        index: usize,
    },
    /// The model terms of one response.
    ResponseModel {
        /// Response position.
        index: usize,
    },
}

/// Two non-zero levels of a factor whose sizes differ by more than this factor are flagged as a
/// likely slip of the keyboard (see [`levels_far_apart`]).
pub const FAR_APART_RATIO: f64 = 10.0;

/// Whether the two levels of a numeric factor look like a typing slip: both non-zero and one more
/// than [`FAR_APART_RATIO`] times the other in size.
///
/// The rule (common practice, no source): a two-level experiment varies a setting within one
/// order of magnitude, while a digit added to an old number, or one left out, multiplies or
/// divides it by ten or more ("200" typed after "1" reads 1200). A zero level gives no scale to
/// compare with, so it is never flagged; ten times exactly (1 to 10 bar) is not flagged either.
/// It is a warning only: a factor deliberately varied over decades (a catalyst at 0.01 and 1 %)
/// may keep it.
pub fn levels_far_apart(low: f64, high: f64) -> bool {
    let (a, b) = (low.abs(), high.abs());
    if !(a.is_finite() && b.is_finite()) || a == 0.0 || b == 0.0 {
        return false;
    }
    a.max(b) > FAR_APART_RATIO * a.min(b)
}

/// One problem found by [`Project::validate`].
#[derive(Debug, Clone, PartialEq)]
pub struct Problem {
    /// Error or warning.
    pub severity: Severity,
    /// Where.
    pub field: Field,
    /// What is wrong, in words for the engineer.
    pub message: String,
}

impl Project {
    /// All problems of the project, errors and warnings, in field order.
    pub fn validate(&self) -> Vec<Problem> {
        let mut out = Vec::new();
        let mut push = |severity, field, message: String| {
            out.push(Problem {
                severity,
                field,
                message,
            })
        };
        let n = self.factors.len();
        if !(MIN_FACTORS..=MAX_FACTORS).contains(&n) {
            push(
                Severity::Error,
                Field::Factors,
                format!(
                    "{n} factor{}: a design needs {MIN_FACTORS} to {MAX_FACTORS}",
                    if n == 1 { "" } else { "s" }
                ),
            );
        }
        for (index, f) in self.factors.iter().enumerate() {
            let at = |part| Field::Factor { index, part };
            let earlier = self.factors[..index].iter().map(|g| g.name.as_str());
            if let Some(problem) = name_problem(&f.name, earlier, "factor") {
                push(Severity::Error, at(FactorField::Name), problem);
            }
            match &f.kind {
                FactorKind::Numeric { low, high } => {
                    if !low.is_finite() || !high.is_finite() {
                        push(
                            Severity::Error,
                            at(FactorField::Levels),
                            "levels must be finite numbers".into(),
                        );
                    } else if low == high {
                        push(
                            Severity::Error,
                            at(FactorField::Levels),
                            "low and high levels are equal: the factor would not vary".into(),
                        );
                    }
                    if levels_far_apart(*low, *high) {
                        push(
                            Severity::Warning,
                            at(FactorField::Levels),
                            format!(
                                "low level {low} and high level {high} {unit}are more than ten times apart: check for a typing slip",
                                unit = unit_space(&f.unit)
                            ),
                        );
                    }
                    if let Some((lo, hi)) = f.safe_range {
                        if !lo.is_finite() || !hi.is_finite() || lo > hi {
                            push(
                                Severity::Error,
                                at(FactorField::SafeRange),
                                "the safe range needs a lowest value not above the highest".into(),
                            );
                        } else {
                            for (which, v) in [("low", low), ("high", high)] {
                                if *v < lo || *v > hi {
                                    push(
                                        Severity::Warning,
                                        at(FactorField::Levels),
                                        format!(
                                            "{which} level {v} {unit}is outside the safe range {lo} to {hi}",
                                            unit = unit_space(&f.unit)
                                        ),
                                    );
                                }
                            }
                        }
                    }
                }
                FactorKind::Categorical {
                    low_label,
                    high_label,
                } => {
                    if low_label.trim().is_empty() || high_label.trim().is_empty() {
                        push(
                            Severity::Error,
                            at(FactorField::Levels),
                            "both settings need a name".into(),
                        );
                    } else if low_label.trim() == high_label.trim() {
                        push(
                            Severity::Error,
                            at(FactorField::Levels),
                            "both settings have the same name: the factor would not vary".into(),
                        );
                    }
                    if f.safe_range.is_some() {
                        push(
                            Severity::Error,
                            at(FactorField::SafeRange),
                            "a categorical factor has no safe range".into(),
                        );
                    }
                }
            }
        }
        if self.design.centre_points_per_block > 0 && self.factors.iter().any(|f| !f.is_numeric()) {
            push(
                Severity::Error,
                Field::Design,
                "centre points need every factor to be numeric".into(),
            );
        }
        if let Some(fold) = self.design.fold {
            for message in fold_problems(self, fold) {
                push(Severity::Error, Field::Design, message);
            }
        }
        for message in super::axial::axial_problems(self) {
            push(Severity::Error, Field::Design, message);
        }
        if let Some(block) = &self.design.added {
            for message in super::added_block::added_block_problems(self, block) {
                push(Severity::Error, Field::Design, message);
            }
        }
        if self.design.replicates == 0 {
            push(
                Severity::Error,
                Field::Design,
                "at least one replicate is needed".into(),
            );
        }
        for (index, r) in self.responses.iter().enumerate() {
            let earlier = self.responses[..index].iter().map(|g| g.name.as_str());
            if let Some(problem) = name_problem(&r.name, earlier, "response") {
                push(Severity::Error, Field::ResponseName { index }, problem);
            }
            for label in &r.model.terms {
                if let Err(e) = twofold_core::term::Term::parse(label, n) {
                    push(
                        Severity::Error,
                        Field::ResponseModel { index },
                        format!("model term: {e}"),
                    );
                }
            }
        }
        out
    }
}

/// What stops a fold-over from being laid out: a full factorial has no aliases to break
/// (checked when the design names no fraction), the two halves are blocks of their own so other
/// blocking cannot be added, and a single-factor fold needs the factor.
fn fold_problems(project: &Project, fold: FoldKind) -> Vec<String> {
    let d = &project.design;
    let k = project.factors.len();
    let mut out = Vec::new();
    let no_generators = d.generators.iter().all(|g| g.trim().is_empty());
    let full = k < usize::BITS as usize
        && d.base_runs.is_none_or(|n| n as usize == 1usize << k)
        && no_generators;
    if full {
        out.push("a full factorial has no aliases to break; there is nothing to fold over".into());
    }
    let blocked = match &d.blocks {
        BlockChoice::Count(n) => *n > 1,
        BlockChoice::Generators(g) => g.iter().any(|t| !t.trim().is_empty()),
    };
    if blocked || d.replicates_as_blocks {
        out.push(
            "a fold-over runs as its own block; it cannot be combined with other blocking".into(),
        );
    }
    if let FoldKind::Factor(f) = fold
        && f >= k
    {
        out.push(format!(
            "the fold-over switches factor {} and the project has {k} factors",
            f + 1
        ));
    }
    out
}

fn unit_space(unit: &str) -> String {
    if unit.is_empty() {
        String::new()
    } else {
        format!("{unit} ")
    }
}

/// What is wrong with the name of a `what` ("factor", "response"): empty once trimmed, or the
/// same as one of the `earlier` names apart from case and surrounding spaces.
fn name_problem<'a>(
    name: &str,
    mut earlier: impl Iterator<Item = &'a str>,
    what: &str,
) -> Option<String> {
    let name = name.trim();
    if name.is_empty() {
        Some(format!("the {what} needs a name"))
    } else if earlier.any(|g| g.trim().eq_ignore_ascii_case(name)) {
        Some(format!("another {what} is already called “{name}”"))
    } else {
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Factor, ResponseDef};

    fn two() -> Project {
        let mut p = Project::new("t");
        p.factors
            .push(Factor::numeric("Temperature", "°C", 160.0, 200.0));
        p.factors
            .push(Factor::categorical("Supplier", "North", "South"));
        p
    }

    #[test]
    fn clean_project_has_no_problems() {
        assert_eq!(two().validate(), vec![]);
    }

    #[test]
    fn level_outside_safe_range_is_a_warning_per_level() {
        let mut p = two();
        p.factors[0].safe_range = Some((150.0, 190.0));
        let problems = p.validate();
        assert_eq!(problems.len(), 1, "{problems:?}");
        assert_eq!(problems[0].severity, Severity::Warning);
        assert_eq!(
            problems[0].field,
            Field::Factor {
                index: 0,
                part: FactorField::Levels
            }
        );
        assert_eq!(
            problems[0].message,
            "high level 200 °C is outside the safe range 150 to 190"
        );
        p.factors[0].safe_range = Some((170.0, 180.0));
        let w: Vec<_> = p
            .validate()
            .into_iter()
            .filter(|q| q.severity == Severity::Warning)
            .collect();
        assert_eq!(w.len(), 2);
        assert!(w[0].message.starts_with("low level 160"));
        p.factors[0].safe_range = Some((160.0, 200.0));
        assert_eq!(p.validate(), vec![], "the ends of the range are inside it");
        p.factors[0].safe_range = Some((200.0, 160.0));
        assert_eq!(p.validate()[0].severity, Severity::Error);
    }

    #[test]
    fn errors_per_field() {
        let mut p = two();
        p.factors
            .push(Factor::numeric(" temperature ", "", 1.0, 1.0));
        p.factors.push(Factor::categorical("", "x", "x"));
        p.factors[1].safe_range = Some((0.0, 1.0));
        p.design.centre_points_per_block = 2;
        p.design.replicates = 0;
        p.responses.push(ResponseDef::new("", ""));
        p.responses.push(ResponseDef::new("Gloss", ""));
        p.responses.push(ResponseDef::new("gloss", ""));
        p.responses[1].model.terms = vec!["AZ".into()];
        let got: Vec<(Severity, Field)> = p
            .validate()
            .into_iter()
            .map(|q| (q.severity, q.field))
            .collect();
        let f = |index, part| Field::Factor { index, part };
        let e = Severity::Error;
        assert_eq!(
            got,
            vec![
                (e, f(1, FactorField::SafeRange)),
                (e, f(2, FactorField::Name)),
                (e, f(2, FactorField::Levels)),
                (e, f(3, FactorField::Name)),
                (e, f(3, FactorField::Levels)),
                (e, Field::Design),
                (e, Field::Design),
                (e, Field::ResponseName { index: 0 }),
                (e, Field::ResponseModel { index: 1 }),
                (e, Field::ResponseName { index: 2 }),
            ]
        );
    }

    #[test]
    fn levels_more_than_ten_times_apart_are_flagged() {
        // The rule is common practice, no source; the cases are chosen by hand.
        for (low, high, flagged) in [
            (100.0, 1200.0, true),  // "200" typed after the old "1"
            (1200.0, 100.0, true),  // either order
            (160.0, 200.0, false),  // an ordinary pair
            (1.0, 10.0, false),     // exactly ten times: not flagged
            (1.0, 10.5, true),      // just beyond
            (0.0, 1200.0, false),   // a zero level gives no scale
            (-5.0, 5.0, false),     // symmetric about zero
            (-2.0, 30.0, true),     // sizes compared, whatever the sign
            (0.1, 2.0, true),       // decades apart: flagged, may be kept
            (f64::NAN, 1.0, false), // left to the error for non-finite levels
        ] {
            assert_eq!(levels_far_apart(low, high), flagged, "{low} {high}");
        }
        let mut p = two();
        p.factors[0].kind = FactorKind::Numeric {
            low: 160.0,
            high: 2000.0,
        };
        assert_eq!(
            p.validate(),
            vec![Problem {
                severity: Severity::Warning,
                field: Field::Factor {
                    index: 0,
                    part: FactorField::Levels
                },
                message: "low level 160 and high level 2000 °C are more than ten times apart: check for a typing slip".into(),
            }]
        );
    }

    #[test]
    fn factor_count_limits() {
        let mut p = Project::new("t");
        p.factors.push(Factor::numeric("A", "", 0.0, 1.0));
        assert_eq!(p.validate()[0].field, Field::Factors);
        assert_eq!(p.validate()[0].message, "1 factor: a design needs 2 to 25");
    }
}
