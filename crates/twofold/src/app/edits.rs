//! Changes to the project: pane commands, undo steps (keystrokes in one field merge into one),
//! paste, and the questions asked before the project is replaced.

use std::path::PathBuf;

use super::{AfterUnsaved, AnalysisSlot, Derived, FileAction, Modal, Panes, TwofoldApp};
use crate::panels::design::Compute;
use crate::panels::{Command, Step};
use twofold_study::project::{Edit, History, Project};

/// Fields whose consecutive edits (keystrokes in one field) merge into one undo step.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(super) enum CoalesceKey {
    ProjectName,
    Description,
    FactorName(usize),
    FactorUnit(usize),
    FactorLevels(usize),
    SafeRange(usize),
    ResponseName(usize),
    ResponseUnit(usize),
    Note(usize),
    Status(usize),
}

fn coalesce_key(edit: &Edit) -> Option<CoalesceKey> {
    Some(match edit {
        Edit::SetName(_) => CoalesceKey::ProjectName,
        Edit::SetDescription(_) => CoalesceKey::Description,
        Edit::RenameFactor { index, .. } => CoalesceKey::FactorName(*index),
        Edit::SetFactorUnit { index, .. } => CoalesceKey::FactorUnit(*index),
        Edit::SetFactorKind { index, .. } => CoalesceKey::FactorLevels(*index),
        Edit::SetSafeRange { index, .. } => CoalesceKey::SafeRange(*index),
        Edit::RenameResponse { index, .. } => CoalesceKey::ResponseName(*index),
        Edit::SetResponseUnit { index, .. } => CoalesceKey::ResponseUnit(*index),
        Edit::SetNote { run, .. } => CoalesceKey::Note(*run),
        Edit::SetStatus {
            run,
            status: twofold_study::project::RunStatus::Excluded { .. },
        } => CoalesceKey::Status(*run),
        _ => return None,
    })
}

impl TwofoldApp {
    /// Applies one command from a pane, the menus or a test.
    pub fn apply(&mut self, cmd: Command) {
        match cmd {
            Command::Edit(edit) => self.apply_edit(edit),
            Command::Group(edits) => {
                self.apply_group(edits);
            }
            Command::ChangeDesign(design) => {
                let p = self.project();
                let typed = p.typed_value_count();
                if typed > 0 {
                    let lost = p.design_change_would_discard(&design);
                    self.modal = Some(Modal::ConfirmDesign {
                        design,
                        lost,
                        typed,
                    });
                } else {
                    if self.apply_group(vec![Edit::SetDesign(design), Edit::RegenerateRuns]) {
                        // The next thing to do is to run the experiment.
                        self.step = Step::Runs;
                    }
                }
            }
            Command::SelectResponse(r) => {
                if r < self.project().responses.len() {
                    self.response = Some(r);
                }
            }
            Command::Goto(step) => self.step = step,
            Command::Paste {
                response,
                targets,
                text,
            } => self.paste(response, &targets, &text),
        }
        self.refresh();
    }

    fn apply_edit(&mut self, edit: Edit) {
        let key = coalesce_key(&edit);
        let merge = matches!((&key, &self.coalesce), (Some(k), Some((last, rev)))
            if k == last && *rev == self.history.revision());
        if merge {
            // Keystrokes in one field make one undo step: replace the previous keystroke's step.
            self.history.undo();
        }
        // A keystroke in a field is committed when the field is left; anything else at once.
        self.committed |= key.is_none();
        match self.history.apply(edit) {
            Ok(()) => self.coalesce = key.map(|k| (k, self.history.revision())),
            Err(e) => {
                if merge {
                    self.history.redo();
                }
                self.coalesce = None;
                self.modal = Some(Modal::Error(e.to_string()));
            }
        }
    }

    /// Applies `edits` as one undo step, all or none; `false` (with the error shown) when one
    /// of them cannot be applied.
    pub(super) fn apply_group(&mut self, edits: Vec<Edit>) -> bool {
        self.coalesce = None;
        if edits.is_empty() {
            return true;
        }
        let mut next = self.project().clone();
        for edit in edits {
            if let Err(e) = next.apply(edit) {
                // All or nothing: the project is left as it was.
                self.modal = Some(Modal::Error(e.to_string()));
                return false;
            }
        }
        self.history.replace(next);
        self.committed = true;
        true
    }

    /// Pastes clipboard `text` into response `response` from run `targets[0]` down, as one undo
    /// step. Text that is not a number is kept in its cell (marked) and listed in a message.
    fn paste(&mut self, response: usize, targets: &[usize], text: &str) {
        let plan = twofold_study::interchange::plan_paste(self.project(), response, targets, text);
        if plan.cells.is_empty() {
            self.notice = Some("Nothing to paste: the clipboard held no values.".into());
            return;
        }
        let at = (self.clock)();
        if self.apply_group(plan.edits(Some(at))) {
            let summary = plan.summary();
            if plan.bad_cells().is_empty() {
                self.notice = Some(summary);
            } else {
                self.modal = Some(Modal::PasteReport(summary));
            }
        }
    }

    /// Undoes the last step.
    pub fn undo(&mut self) {
        self.coalesce = None;
        self.committed = true;
        self.history.undo();
        self.refresh();
    }

    /// Redoes the last undone step.
    pub fn redo(&mut self) {
        self.coalesce = None;
        self.committed = true;
        self.history.redo();
        self.refresh();
    }

    /// Runs `after` now, or asks first when there are unsaved changes.
    pub(super) fn request(&mut self, after: AfterUnsaved) {
        if self.history.is_dirty() {
            self.modal = Some(Modal::Unsaved(after));
        } else {
            self.proceed(after);
        }
    }

    pub(super) fn proceed(&mut self, after: AfterUnsaved) {
        match after {
            AfterUnsaved::New => self.new_project(),
            AfterUnsaved::Open => self.start_dialog(FileAction::Open),
            AfterUnsaved::OpenPath(p) => {
                self.open_path(&p);
            }
            AfterUnsaved::Quit => self.quit_confirmed = true,
        }
    }

    fn new_project(&mut self) {
        // Not marked unsaved until the first edit: an empty project has nothing to lose, and
        // a recovery copy of it would replace the copy of an earlier unsaved project.
        self.reset_to(History::new(Project::new("Untitled")), None);
        self.step = Step::Factors;
    }

    pub(super) fn reset_to(&mut self, history: History, path: Option<PathBuf>) {
        self.history = history;
        self.path = path;
        // A notice ("Saved …", "Exported …") spoke of the project that is gone.
        self.notice = None;
        self.coalesce = None;
        self.panes = Panes::default();
        if self.inline_compute {
            self.panes.design.compute = Compute::Inline;
        }
        self.derived = Derived::of(self.history.project(), self.history.revision());
        self.analysis = AnalysisSlot::default();
        self.debouncer.settled(self.history.revision());
        self.response = None;
        self.refresh();
        // Another project: its first control takes the keyboard.
        self.focus.step_changed();
    }
}
