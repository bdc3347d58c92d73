//! Edits as values: every change the window can make to a project, applied in one place.
//!
//! Panels never mutate a [`Project`] directly; they emit an [`Edit`] and the [`History`]
//! (see [`super::history`]) applies it, so every change is undoable, autosaved and bumps the data
//! revision that caches key on.
//!
//! Edits keep the structural invariants (one coded setting per factor and one cell per response
//! in every run). They do *not* refuse content the validation would flag (an empty name, a
//! duplicate name, low = high): the engineer may be half-way through typing, and what was typed is
//! never thrown away. [`Project::validate`](super::validate) reports those problems per field.
//!
//! [`History`]: super::history::History

use super::cell::Cell;
use super::follow_up::{FollowUp, FollowUpError};
use super::goals::{PowerSettings, ResponseGoal};
use super::model::{
    DesignSettings, Factor, FactorKind, MAX_FACTORS, Project, ResponseDef, ResponseTransform,
    RunStatus,
};
use super::regenerate::{PlanError, regenerate_runs};
use twofold_core::foldover::FoldKind;
use twofold_core::term::Term;

/// One change to a project. Run indices are positions in [`Project::runs`] (standard order of
/// generation), not run-order numbers.
#[must_use = "an edit does nothing until it is applied"]
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum Edit {
    /// Set the project's title.
    SetName(String),
    /// Set the project's free-text description.
    SetDescription(String),
    /// Append a factor. Existing runs get coded 0 for it and the run sheet is marked outdated.
    AddFactor(Factor),
    /// Remove a factor; its column is dropped from the runs and the run sheet is marked outdated.
    RemoveFactor {
        /// Factor position.
        index: usize,
    },
    /// Rename a factor.
    RenameFactor {
        /// Factor position.
        index: usize,
        /// New name.
        name: String,
    },
    /// Move a factor to another position (so it takes another letter); run columns move with it.
    MoveFactor {
        /// Current position.
        from: usize,
        /// New position.
        to: usize,
    },
    /// Set a factor's unit.
    SetFactorUnit {
        /// Factor position.
        index: usize,
        /// New unit.
        unit: String,
    },
    /// Set a factor's kind together with its levels (numeric low/high or categorical labels).
    /// Changing between numeric and categorical marks the run sheet outdated; a categorical
    /// factor loses its safe range.
    SetFactorKind {
        /// Factor position.
        index: usize,
        /// New kind and levels.
        kind: FactorKind,
    },
    /// Set or clear a factor's safe range.
    SetSafeRange {
        /// Factor position.
        index: usize,
        /// `(lowest, highest)` or `None`.
        range: Option<(f64, f64)>,
    },
    /// Replace the design settings; the run sheet is marked outdated until regenerated.
    SetDesign(DesignSettings),
    /// Generate the run sheet from the factors and design settings. Typed values, status, notes
    /// and entry times of runs that survive (same coded settings and replicate) are kept.
    RegenerateRuns,
    /// Add follow-up runs (a fold-over, centre points, a replicate) to the run sheet, keeping
    /// every typed value, status and note (see [`super::follow_up`]).
    AddFollowUp(FollowUp),
    /// Append a response (every run gets an empty cell for it).
    AddResponse(ResponseDef),
    /// Rename a response.
    RenameResponse {
        /// Response position.
        index: usize,
        /// New name.
        name: String,
    },
    /// Set a response's unit.
    SetResponseUnit {
        /// Response position.
        index: usize,
        /// New unit.
        unit: String,
    },
    /// Remove a response with its column of values (undo brings them back).
    RemoveResponse {
        /// Response position.
        index: usize,
    },
    /// Set the text of one cell, recording when (ISO-8601 text from the caller, if given).
    SetCell {
        /// Run position in [`Project::runs`].
        run: usize,
        /// Response position.
        response: usize,
        /// The text as typed.
        text: String,
        /// When it was typed; replaces the run's `entered_at` when `Some`.
        at: Option<String>,
    },
    /// Set a run's status (to do, done, excluded with a reason).
    SetStatus {
        /// Run position.
        run: usize,
        /// New status.
        status: RunStatus,
    },
    /// Set a run's note.
    SetNote {
        /// Run position.
        run: usize,
        /// New note.
        note: String,
    },
    /// Add a term to a response's model, or remove it when present.
    ToggleTerm {
        /// Response position.
        response: usize,
        /// Term label (`"AB"`, letters in any order and case).
        term: String,
    },
    /// Replace a response's model terms (e.g. with the terms the half-normal plot picks out).
    SetTerms {
        /// Response position.
        response: usize,
        /// Term labels.
        terms: Vec<String>,
    },
    /// Set whether a response's model is kept hierarchical.
    SetHierarchical {
        /// Response position.
        response: usize,
        /// On or off.
        on: bool,
    },
    /// Set a response's transform.
    SetTransform {
        /// Response position.
        response: usize,
        /// New transform.
        transform: ResponseTransform,
    },
    /// Set what a response (or, with `spread`, its transmitted spread) should do when settings
    /// are chosen.
    SetGoal {
        /// Response position.
        response: usize,
        /// The goal of the spread rather than of the mean.
        spread: bool,
        /// New goal.
        goal: ResponseGoal,
    },
    /// Mark a factor as noise with its standard deviation in use (coded units), or as a control
    /// factor with `None`.
    SetNoise {
        /// Factor position.
        index: usize,
        /// σ in coded units, or `None`.
        sd: Option<f64>,
    },
    /// Set what the power of a design rests on.
    SetPower(PowerSettings),
    /// Mark a factor as hard to change (the runs are grouped into whole plots) or not; the run
    /// sheet is marked outdated.
    SetHardToChange {
        /// Factor position.
        index: usize,
        /// Hard to change.
        on: bool,
    },
}

/// Why an edit could not be applied. The project is unchanged when `apply` returns an error.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum EditError {
    /// A factor position past the end of the list.
    #[error("there is no factor number {0}")]
    NoSuchFactor(usize),
    /// A response position past the end of the list.
    #[error("there is no response number {0}")]
    NoSuchResponse(usize),
    /// A run position past the end of the sheet.
    #[error("there is no run number {0}")]
    NoSuchRun(usize),
    /// A 26th factor.
    #[error("a project has at most {MAX_FACTORS} factors")]
    TooManyFactors,
    /// A term label that does not name factors of this project.
    #[error("model term: {0}")]
    BadTerm(#[from] twofold_core::term::TermError),
    /// The run sheet could not be generated from the design.
    #[error("cannot generate the runs: {0}")]
    Plan(#[from] PlanError),
    /// The follow-up runs could not be added.
    #[error("cannot add the follow-up runs: {0}")]
    FollowUp(#[from] FollowUpError),
}

impl Project {
    /// Applies one edit. On error the project is left exactly as it was.
    pub fn apply(&mut self, edit: Edit) -> Result<(), EditError> {
        match edit {
            Edit::SetName(name) => self.name = name,
            Edit::SetDescription(text) => self.description = text,
            Edit::AddFactor(factor) => {
                if self.factors.len() >= MAX_FACTORS {
                    return Err(EditError::TooManyFactors);
                }
                self.factors.push(factor);
                for run in &mut self.runs {
                    run.levels.push(0);
                }
                self.mark_outdated();
                self.drop_terms_beyond_factors();
            }
            Edit::RemoveFactor { index } => {
                self.check_factor(index)?;
                self.factors.remove(index);
                for run in &mut self.runs {
                    if index < run.levels.len() {
                        run.levels.remove(index);
                    }
                }
                self.mark_outdated();
                // A fold on the removed factor goes with it; later factors move down one.
                self.design.fold = match self.design.fold {
                    Some(FoldKind::Factor(f)) if f == index => None,
                    Some(FoldKind::Factor(f)) if f > index => Some(FoldKind::Factor(f - 1)),
                    other => other,
                };
                self.design.added = self
                    .design
                    .added
                    .take()
                    .and_then(|b| b.factor_removed(index));
                // Letters after the removed factor shift down by one; terms using it are dropped.
                self.remap_terms(index_after_removal(index));
            }
            Edit::RenameFactor { index, name } => self.factor_mut(index)?.name = name,
            Edit::MoveFactor { from, to } => {
                self.check_factor(from)?;
                self.check_factor(to)?;
                if from != to {
                    let f = self.factors.remove(from);
                    self.factors.insert(to, f);
                    for run in &mut self.runs {
                        if from < run.levels.len() && to < run.levels.len() {
                            let v = run.levels.remove(from);
                            run.levels.insert(to, v);
                        }
                    }
                    self.mark_outdated();
                    let moved = |i: usize| -> usize {
                        if i == from {
                            to
                        } else if from < to && i > from && i <= to {
                            i - 1
                        } else if to < from && i >= to && i < from {
                            i + 1
                        } else {
                            i
                        }
                    };
                    self.remap_terms(|i| Some(moved(i)));
                    if let Some(FoldKind::Factor(f)) = self.design.fold {
                        self.design.fold = Some(FoldKind::Factor(moved(f)));
                    }
                    self.design.added = self.design.added.take().map(|b| b.factor_moved(moved));
                }
            }
            Edit::SetFactorUnit { index, unit } => self.factor_mut(index)?.unit = unit,
            Edit::SetFactorKind { index, kind } => {
                let factor = self.factor_mut(index)?;
                let switched =
                    std::mem::discriminant(&factor.kind) != std::mem::discriminant(&kind);
                if matches!(kind, FactorKind::Categorical { .. }) {
                    factor.safe_range = None;
                }
                factor.kind = kind;
                if switched {
                    self.mark_outdated();
                }
            }
            Edit::SetSafeRange { index, range } => self.factor_mut(index)?.safe_range = range,
            Edit::SetDesign(design) => {
                if design != self.design {
                    self.design = design;
                    self.mark_outdated();
                }
            }
            Edit::RegenerateRuns => {
                let (runs, used) = regenerate_runs(self)?;
                self.runs = runs;
                self.design = used;
                self.runs_outdated = false;
            }
            Edit::AddFollowUp(follow_up) => self.add_follow_up(follow_up)?,
            Edit::AddResponse(def) => {
                self.responses.push(def);
                for run in &mut self.runs {
                    run.values.push(Cell::default());
                }
            }
            Edit::RenameResponse { index, name } => self.response_mut(index)?.name = name,
            Edit::SetResponseUnit { index, unit } => self.response_mut(index)?.unit = unit,
            Edit::RemoveResponse { index } => {
                self.response_mut(index)?;
                self.responses.remove(index);
                for run in &mut self.runs {
                    if index < run.values.len() {
                        run.values.remove(index);
                    }
                }
            }
            Edit::SetCell {
                run,
                response,
                text,
                at,
            } => {
                self.response_mut(response)?;
                let record = self.runs.get_mut(run).ok_or(EditError::NoSuchRun(run))?;
                let cell = record
                    .values
                    .get_mut(response)
                    .ok_or(EditError::NoSuchResponse(response))?;
                cell.text = text;
                if at.is_some() {
                    record.entered_at = at;
                }
            }
            Edit::SetStatus { run, status } => {
                self.runs
                    .get_mut(run)
                    .ok_or(EditError::NoSuchRun(run))?
                    .status = status;
            }
            Edit::SetNote { run, note } => {
                self.runs
                    .get_mut(run)
                    .ok_or(EditError::NoSuchRun(run))?
                    .note = note;
            }
            Edit::ToggleTerm { response, term } => {
                let k = self.factors.len();
                let parsed = Term::parse(&term, k)?;
                let model = &mut self.response_mut(response)?.model;
                let before = model.terms.len();
                model.terms.retain(|t| Term::parse(t, k) != Ok(parsed));
                if model.terms.len() == before {
                    model.terms.push(parsed.label());
                }
                sort_terms(&mut model.terms, k);
            }
            Edit::SetTerms { response, terms } => {
                let k = self.factors.len();
                let mut parsed: Vec<Term> = terms
                    .iter()
                    .map(|t| Term::parse(t, k))
                    .collect::<Result<_, _>>()?;
                parsed.sort();
                parsed.dedup();
                self.response_mut(response)?.model.terms =
                    parsed.into_iter().map(Term::label).collect();
            }
            Edit::SetHierarchical { response, on } => {
                self.response_mut(response)?.model.hierarchical = on;
            }
            Edit::SetTransform {
                response,
                transform,
            } => self.response_mut(response)?.model.transform = transform,
            Edit::SetGoal {
                response,
                spread,
                goal,
            } => {
                let def = self.response_mut(response)?;
                if spread {
                    def.spread_goal = goal;
                } else {
                    def.goal = goal;
                }
            }
            Edit::SetNoise { index, sd } => self.factor_mut(index)?.noise_sd = sd,
            Edit::SetPower(settings) => self.power = settings,
            Edit::SetHardToChange { index, on } => {
                self.factor_mut(index)?.hard_to_change = on;
                self.mark_outdated();
            }
        }
        Ok(())
    }

    fn check_factor(&self, index: usize) -> Result<(), EditError> {
        if index < self.factors.len() {
            Ok(())
        } else {
            Err(EditError::NoSuchFactor(index))
        }
    }

    fn factor_mut(&mut self, index: usize) -> Result<&mut Factor, EditError> {
        self.factors
            .get_mut(index)
            .ok_or(EditError::NoSuchFactor(index))
    }

    fn response_mut(&mut self, index: usize) -> Result<&mut ResponseDef, EditError> {
        self.responses
            .get_mut(index)
            .ok_or(EditError::NoSuchResponse(index))
    }

    fn mark_outdated(&mut self) {
        if !self.runs.is_empty() {
            self.runs_outdated = true;
        }
    }

    /// Adding a factor changes no letters; nothing to drop, but labels are re-sorted for a
    /// consistent file.
    fn drop_terms_beyond_factors(&mut self) {
        self.remap_terms(Some);
    }

    /// Rewrites every model term after the factor letters changed. `map` takes an old factor
    /// index to its new one, or `None` when the factor is gone (the term is then dropped, since
    /// it no longer names anything). Labels that never parsed are kept as they are.
    fn remap_terms(&mut self, map: impl Fn(usize) -> Option<usize>) {
        let new_k = self.factors.len();
        for resp in &mut self.responses {
            let mut out = Vec::with_capacity(resp.model.terms.len());
            for label in &resp.model.terms {
                out.extend(remap_label(label, &map, new_k));
            }
            sort_terms(&mut out, new_k);
            out.dedup();
            resp.model.terms = out;
        }
    }
}

/// Where factor `i` goes after factor `index` is removed: letters after it shift down by one,
/// and the removed factor itself goes nowhere (`None`).
pub(crate) fn index_after_removal(index: usize) -> impl Fn(usize) -> Option<usize> {
    move |i| match i.cmp(&index) {
        std::cmp::Ordering::Less => Some(i),
        std::cmp::Ordering::Equal => None,
        std::cmp::Ordering::Greater => Some(i - 1),
    }
}

/// A term label after the factor letters changed. `map` takes an old factor index to its new
/// one, or `None` when the factor is gone; the term is then dropped (`None`), as is one whose new
/// letter would be at or beyond `new_k`. The label is read against [`MAX_FACTORS`], so it does
/// not depend on how many factors the old design had; a label that never parsed is kept as it
/// is.
pub(crate) fn remap_label(
    label: &str,
    map: impl Fn(usize) -> Option<usize>,
    new_k: usize,
) -> Option<String> {
    let Ok(term) = Term::parse(label, MAX_FACTORS) else {
        return Some(label.to_owned());
    };
    let mut bits = 0u32;
    for i in term.factors() {
        match map(i) {
            Some(j) if j < new_k => bits |= 1 << j,
            _ => return None,
        }
    }
    (bits != 0).then(|| Term::from_bits(bits).label())
}

/// Sorts labels in the trade's order (short terms first, then alphabetical); unreadable labels go
/// last in their typed order.
fn sort_terms(labels: &mut [String], factor_count: usize) {
    labels.sort_by_key(|l| match Term::parse(l, factor_count) {
        Ok(t) => (0, Some(t)),
        Err(_) => (1, None),
    });
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{BlockChoice, Cell, History, ModelSettings};

    /// Three numeric factors, 2^3 with two centre points, one response with some values typed.
    fn planned() -> Project {
        let mut p = Project::new("Cure trial");
        p.factors
            .push(Factor::numeric("Temperature", "°C", 160.0, 200.0));
        p.factors.push(Factor::numeric("Time", "min", 10.0, 20.0));
        p.factors
            .push(Factor::numeric("Thickness", "µm", 60.0, 90.0));
        p.responses.push(ResponseDef::new("Gloss", "GU"));
        p.design.centre_points_per_block = 2;
        p.apply(Edit::RegenerateRuns).unwrap();
        for (i, run) in p.runs.iter_mut().enumerate() {
            run.values[0] = Cell::new(format!("{}", 80 + i));
        }
        p
    }

    /// Index of each edit kind, so the test below fails to compile when a kind is added and
    /// fails to pass when one is left out.
    fn kind(e: &Edit) -> usize {
        match e {
            Edit::SetName(_) => 0,
            Edit::SetDescription(_) => 1,
            Edit::AddFactor(_) => 2,
            Edit::RemoveFactor { .. } => 3,
            Edit::RenameFactor { .. } => 4,
            Edit::MoveFactor { .. } => 5,
            Edit::SetFactorUnit { .. } => 6,
            Edit::SetFactorKind { .. } => 7,
            Edit::SetSafeRange { .. } => 8,
            Edit::SetDesign(_) => 9,
            Edit::RegenerateRuns => 10,
            Edit::AddResponse(_) => 11,
            Edit::RenameResponse { .. } => 12,
            Edit::SetResponseUnit { .. } => 13,
            Edit::RemoveResponse { .. } => 14,
            Edit::SetCell { .. } => 15,
            Edit::SetStatus { .. } => 16,
            Edit::SetNote { .. } => 17,
            Edit::ToggleTerm { .. } => 18,
            Edit::SetTerms { .. } => 19,
            Edit::SetHierarchical { .. } => 20,
            Edit::SetTransform { .. } => 21,
            Edit::AddFollowUp(_) => 22,
            Edit::SetGoal { .. } => 23,
            Edit::SetNoise { .. } => 24,
            Edit::SetPower(_) => 25,
            Edit::SetHardToChange { .. } => 26,
        }
    }
    const KINDS: usize = 27;

    #[test]
    fn every_edit_kind_changes_and_undoes_and_redoes() {
        let mut more_runs = planned().design;
        more_runs.replicates = 2;
        let mut outdated = planned();
        outdated.design.seed = 99;
        outdated.runs_outdated = true;
        let cases: Vec<(Project, Edit)> = vec![
            (planned(), Edit::SetName("Renamed".into())),
            (planned(), Edit::SetDescription("Lot 42".into())),
            (
                planned(),
                Edit::AddFactor(Factor::numeric("Humidity", "%", 30.0, 60.0)),
            ),
            (planned(), Edit::RemoveFactor { index: 1 }),
            (
                planned(),
                Edit::RenameFactor {
                    index: 0,
                    name: "Oven".into(),
                },
            ),
            (planned(), Edit::MoveFactor { from: 0, to: 2 }),
            (
                planned(),
                Edit::SetFactorUnit {
                    index: 0,
                    unit: "K".into(),
                },
            ),
            (
                planned(),
                Edit::SetFactorKind {
                    index: 2,
                    kind: FactorKind::Categorical {
                        low_label: "thin".into(),
                        high_label: "thick".into(),
                    },
                },
            ),
            (
                planned(),
                Edit::SetSafeRange {
                    index: 0,
                    range: Some((150.0, 210.0)),
                },
            ),
            (planned(), Edit::SetDesign(more_runs)),
            (outdated, Edit::RegenerateRuns),
            (
                planned(),
                Edit::AddFollowUp(crate::project::FollowUp::Replicate),
            ),
            (
                planned(),
                Edit::AddResponse(ResponseDef::new("Hardness", "H")),
            ),
            (
                planned(),
                Edit::RenameResponse {
                    index: 0,
                    name: "Gloss 60°".into(),
                },
            ),
            (
                planned(),
                Edit::SetResponseUnit {
                    index: 0,
                    unit: "gloss units".into(),
                },
            ),
            (planned(), Edit::RemoveResponse { index: 0 }),
            (
                planned(),
                Edit::SetCell {
                    run: 3,
                    response: 0,
                    text: "12,5x".into(),
                    at: Some("2025-03-04T10:22:05Z".into()),
                },
            ),
            (
                planned(),
                Edit::SetStatus {
                    run: 2,
                    status: RunStatus::Excluded {
                        reason: "door open".into(),
                    },
                },
            ),
            (
                planned(),
                Edit::SetNote {
                    run: 0,
                    note: "new lot".into(),
                },
            ),
            (
                planned(),
                Edit::ToggleTerm {
                    response: 0,
                    term: "ba".into(),
                },
            ),
            (
                planned(),
                Edit::SetTerms {
                    response: 0,
                    terms: vec!["C".into(), "A".into()],
                },
            ),
            (
                planned(),
                Edit::SetHierarchical {
                    response: 0,
                    on: false,
                },
            ),
            (
                planned(),
                Edit::SetTransform {
                    response: 0,
                    transform: ResponseTransform::Ln,
                },
            ),
            (
                planned(),
                Edit::SetGoal {
                    response: 0,
                    spread: false,
                    goal: ResponseGoal {
                        aim: crate::project::GoalAim::Maximise {
                            low: 80.0,
                            high: 95.0,
                            shape: 1.0,
                        },
                        importance: 1.0,
                    },
                },
            ),
            (
                planned(),
                Edit::SetNoise {
                    index: 1,
                    sd: Some(0.5),
                },
            ),
            (planned(), Edit::SetHardToChange { index: 0, on: true }),
            (
                planned(),
                Edit::SetPower(PowerSettings {
                    sigma: Some(1.5),
                    ..PowerSettings::default()
                }),
            ),
        ];
        let mut seen = [false; KINDS];
        for (start, edit) in cases {
            seen[kind(&edit)] = true;
            let label = format!("{edit:?}");
            let mut h = History::new(start.clone());
            h.apply(edit).unwrap_or_else(|e| panic!("{label}: {e}"));
            let after = h.project().clone();
            assert_ne!(after, start, "{label} changed nothing");
            assert!(
                after.check_structure().is_ok(),
                "{label} broke the structure"
            );
            assert!(h.undo(), "{label}");
            assert_eq!(h.project(), &start, "{label}: undo");
            assert!(h.redo(), "{label}");
            assert_eq!(h.project(), &after, "{label}: redo");
        }
        assert!(
            seen.iter().all(|&s| s),
            "every edit kind is tested: {seen:?}"
        );
    }

    #[test]
    fn regenerated_sheet_is_the_design() {
        let p = planned();
        assert_eq!(p.runs.len(), 10);
        assert_eq!(p.runs.iter().filter(|r| r.centre).count(), 2);
        assert!(!p.runs_outdated);
        let mut orders: Vec<u32> = p.runs.iter().map(|r| r.run_order).collect();
        orders.sort_unstable();
        assert_eq!(orders, (1..=10).collect::<Vec<_>>());
        assert!(p.runs.windows(2).all(|w| w[0].std_order < w[1].std_order));
        // Every corner of the cube once.
        let mut corners: Vec<Vec<i8>> = p
            .runs
            .iter()
            .filter(|r| !r.centre)
            .map(|r| r.levels.clone())
            .collect();
        corners.sort();
        corners.dedup();
        assert_eq!(corners.len(), 8);
    }

    #[test]
    fn regenerating_keeps_values_of_surviving_runs() {
        let mut p = planned();
        let typed = p.typed_value_count();
        assert_eq!(typed, 10);
        // Another seed: same runs, new order; nothing is lost.
        let mut d = p.design.clone();
        d.seed = 12345;
        assert_eq!(p.design_change_would_discard(&d), 0);
        // One centre point fewer: one typed centre value has no partner.
        let mut fewer = p.design.clone();
        fewer.centre_points_per_block = 1;
        assert_eq!(p.design_change_would_discard(&fewer), 1);
        // Half fraction: 4 corners survive, 4 corners and no centre point lost... centre points
        // stay (2 per block).
        let mut half = p.design.clone();
        half.generators = vec!["C=AB".into()];
        assert_eq!(p.design_change_would_discard(&half), 4);

        let before: Vec<(Vec<i8>, String)> = p
            .runs
            .iter()
            .map(|r| (r.levels.clone(), r.values[0].text.clone()))
            .collect();
        p.runs[0].note = "kept".into();
        let kept_levels = p.runs[0].levels.clone();
        p.apply(Edit::SetDesign(d)).unwrap();
        assert!(p.runs_outdated);
        p.apply(Edit::RegenerateRuns).unwrap();
        assert!(!p.runs_outdated);
        assert_eq!(p.typed_value_count(), typed);
        for (levels, text) in before.iter().filter(|(l, _)| l.iter().any(|&v| v != 0)) {
            let now = p.runs.iter().find(|r| &r.levels == levels).unwrap();
            assert_eq!(&now.values[0].text, text, "{levels:?}");
        }
        assert_eq!(
            p.runs
                .iter()
                .find(|r| r.levels == kept_levels)
                .unwrap()
                .note,
            "kept"
        );
    }

    #[test]
    fn search_fills_generators_when_only_a_run_size_is_given() {
        let mut p = Project::new("screen");
        for name in ["A", "B", "C", "D", "E"] {
            p.factors.push(Factor::numeric(name, "", -1.0, 1.0));
        }
        p.design.base_runs = Some(16);
        p.apply(Edit::RegenerateRuns).unwrap();
        assert_eq!(p.runs.len(), 16);
        assert_eq!(p.design.generators.len(), 1, "{:?}", p.design.generators);
        // Resolution V: the generator's word has all five letters.
        let g = &p.design.generators[0];
        assert_eq!(
            g.chars().filter(|c| c.is_ascii_alphabetic()).count(),
            5,
            "{g}"
        );
    }

    #[test]
    fn plan_errors_are_reported_and_change_nothing() {
        let mut p = planned();
        let before = p.clone();
        p.factors[0].kind = FactorKind::Categorical {
            low_label: "a".into(),
            high_label: "b".into(),
        };
        let err = p.apply(Edit::RegenerateRuns).unwrap_err();
        assert_eq!(
            err.to_string(),
            "cannot generate the runs: centre points need every factor to be numeric"
        );
        let mut p = before.clone();
        p.design.generators = vec!["C=A".into()];
        let err = p.clone().apply(Edit::RegenerateRuns).unwrap_err();
        assert!(
            err.to_string()
                .starts_with("cannot generate the runs: generator"),
            "{err}"
        );
        p.design.generators.clear();
        p.design.blocks = BlockChoice::Generators(vec!["AX".into()]);
        let err = p.clone().apply(Edit::RegenerateRuns).unwrap_err();
        assert!(err.to_string().contains("block generator"), "{err}");
        assert_eq!(p.design_change_would_discard(&p.design.clone()), 0);
    }

    #[test]
    fn factor_changes_keep_runs_consistent_and_move_terms() {
        let mut p = planned();
        p.responses[0].model = ModelSettings {
            terms: vec!["A".into(), "C".into(), "AC".into(), "BC".into()],
            ..ModelSettings::default()
        };
        let mut q = p.clone();
        q.apply(Edit::RemoveFactor { index: 1 }).unwrap();
        assert_eq!(
            q.responses[0].model.terms,
            ["A", "B", "AB"],
            "C became B; BC dropped"
        );
        assert!(q.runs.iter().all(|r| r.levels.len() == 2));
        assert!(q.runs_outdated);
        let mut q = p.clone();
        q.apply(Edit::MoveFactor { from: 0, to: 2 }).unwrap();
        assert_eq!(q.factors[2].name, "Temperature");
        assert_eq!(q.responses[0].model.terms, ["B", "C", "AB", "BC"]);
        for (a, b) in p.runs.iter().zip(&q.runs) {
            assert_eq!(b.levels, vec![a.levels[1], a.levels[2], a.levels[0]]);
        }
        let mut q = p.clone();
        q.apply(Edit::AddFactor(Factor::numeric("D", "", 0.0, 1.0)))
            .unwrap();
        assert!(
            q.runs
                .iter()
                .all(|r| r.levels.len() == 4 && r.levels[3] == 0)
        );
        assert_eq!(
            q.design_change_would_discard(&q.design.clone()),
            8,
            "corners change, centres stay"
        );
    }

    #[test]
    fn term_toggle_normalises_and_rejects_unknown_letters() {
        let mut p = planned();
        p.apply(Edit::ToggleTerm {
            response: 0,
            term: "cb".into(),
        })
        .unwrap();
        p.apply(Edit::ToggleTerm {
            response: 0,
            term: "A".into(),
        })
        .unwrap();
        assert_eq!(p.responses[0].model.terms, ["A", "BC"]);
        p.apply(Edit::ToggleTerm {
            response: 0,
            term: "BC".into(),
        })
        .unwrap();
        assert_eq!(p.responses[0].model.terms, ["A"]);
        let err = p
            .apply(Edit::ToggleTerm {
                response: 0,
                term: "AD".into(),
            })
            .unwrap_err();
        assert!(matches!(err, EditError::BadTerm(_)), "{err}");
        assert_eq!(
            p.apply(Edit::SetHierarchical {
                response: 4,
                on: true
            }),
            Err(EditError::NoSuchResponse(4))
        );
    }

    #[test]
    fn too_many_factors() {
        let mut p = Project::new("big");
        for i in 0..MAX_FACTORS {
            p.apply(Edit::AddFactor(Factor::numeric(
                &format!("F{i}"),
                "",
                0.0,
                1.0,
            )))
            .unwrap();
        }
        assert_eq!(
            p.apply(Edit::AddFactor(Factor::numeric("x", "", 0.0, 1.0))),
            Err(EditError::TooManyFactors)
        );
    }

    #[test]
    fn cell_entry_records_time_and_keeps_bad_text() {
        let mut p = planned();
        p.apply(Edit::SetCell {
            run: 1,
            response: 0,
            text: "12,5x".into(),
            at: Some("t1".into()),
        })
        .unwrap();
        assert_eq!(p.runs[1].values[0].text, "12,5x");
        assert_eq!(p.runs[1].entered_at.as_deref(), Some("t1"));
        p.apply(Edit::SetCell {
            run: 1,
            response: 0,
            text: "".into(),
            at: None,
        })
        .unwrap();
        assert_eq!(p.runs[1].entered_at.as_deref(), Some("t1"));
        assert_eq!(
            p.apply(Edit::SetCell {
                run: 99,
                response: 0,
                text: "1".into(),
                at: None
            }),
            Err(EditError::NoSuchRun(99))
        );
    }
}
