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
use super::model::{
    DesignSettings, Factor, FactorKind, MAX_FACTORS, Project, ResponseDef, ResponseTransform,
    RunStatus,
};
use super::regenerate::{PlanError, regenerate_runs};
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
                // Letters after the removed factor shift down by one; terms using it are dropped.
                self.remap_terms(|i| match i.cmp(&index) {
                    std::cmp::Ordering::Less => Some(i),
                    std::cmp::Ordering::Equal => None,
                    std::cmp::Ordering::Greater => Some(i - 1),
                });
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
                model
                    .terms
                    .retain(|t| Term::parse(t, k).map_or(true, |x| x != parsed));
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
        let old_k = MAX_FACTORS;
        let new_k = self.factors.len();
        for resp in &mut self.responses {
            let mut out = Vec::with_capacity(resp.model.terms.len());
            for label in &resp.model.terms {
                let Ok(term) = Term::parse(label, old_k) else {
                    out.push(label.clone());
                    continue;
                };
                let mut bits = 0u32;
                let mut keep = true;
                for i in term.factors() {
                    match map(i) {
                        Some(j) if j < new_k => bits |= 1 << j,
                        _ => keep = false,
                    }
                }
                if keep && bits != 0 {
                    out.push(Term::from_bits(bits).label());
                }
            }
            sort_terms(&mut out, new_k);
            out.dedup();
            resp.model.terms = out;
        }
    }
}

/// Sorts labels in the trade's order (short terms first, then alphabetical); unreadable labels go
/// last in their typed order.
fn sort_terms(labels: &mut [String], factor_count: usize) {
    labels.sort_by_key(|l| match Term::parse(l, factor_count) {
        Ok(t) => (0, Some(t)),
        Err(_) => (1, None),
    });
}
