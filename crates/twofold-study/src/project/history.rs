//! Undo and redo, the dirty flag and the data revision.
//!
//! Snapshot based: before each edit the whole project is kept. A project is small (tens of runs,
//! a few responses), so a bounded stack of copies costs little and cannot drift from the data the
//! way hand-written inverse edits can.
//!
//! The *revision* names the content of the project: every applied edit gets a fresh number that
//! no other state in this process has had (numbers come from one process-wide counter, so they
//! never repeat even across projects), and undo/redo return the number the restored state had.
//! Caches compare it for equality only; after an undo a cached result for the earlier state is
//! valid again.

use std::collections::VecDeque;
use std::sync::atomic::{AtomicU64, Ordering};

use super::edit::{Edit, EditError};
use super::model::Project;

/// How many steps undo goes back by default.
pub const DEFAULT_UNDO_LIMIT: usize = 200;

/// Most run records kept over all undo steps together: a huge sheet (the core plans up to 2^20
/// runs) keeps fewer steps rather than exhausting memory. Always at least one step is kept.
pub const UNDO_RUN_BUDGET: usize = 2_000_000;

static NEXT_REVISION: AtomicU64 = AtomicU64::new(1);

fn fresh_revision() -> u64 {
    NEXT_REVISION.fetch_add(1, Ordering::Relaxed)
}

/// A project with its undo and redo stacks.
#[derive(Debug, Clone)]
pub struct History {
    project: Project,
    revision: u64,
    undo: VecDeque<(Project, u64)>,
    redo: Vec<(Project, u64)>,
    saved_revision: Option<u64>,
    limit: usize,
}

impl History {
    /// Starts the history of a project as loaded from (or saved to) its file: not dirty.
    pub fn new(project: Project) -> History {
        let revision = fresh_revision();
        History {
            project,
            revision,
            undo: VecDeque::new(),
            redo: Vec::new(),
            saved_revision: Some(revision),
            limit: DEFAULT_UNDO_LIMIT,
        }
    }

    /// Starts the history of a project that has never been saved (e.g. recovered or new): dirty.
    pub fn new_unsaved(project: Project) -> History {
        let mut h = History::new(project);
        h.saved_revision = None;
        h
    }

    /// Sets how many steps undo keeps (at least 1); the oldest are forgotten first.
    pub fn set_limit(&mut self, limit: usize) {
        self.limit = limit.max(1);
        while self.undo.len() > self.limit {
            self.undo.pop_front();
        }
    }

    /// The current project.
    pub fn project(&self) -> &Project {
        &self.project
    }

    /// The revision of the current content (see the module documentation).
    pub fn revision(&self) -> u64 {
        self.revision
    }

    /// Applies an edit and makes it undoable. On error nothing changes (and no undo step is
    /// recorded). An edit that leaves the project as it was records no step either.
    pub fn apply(&mut self, edit: Edit) -> Result<(), EditError> {
        let mut next = self.project.clone();
        next.apply(edit)?;
        if next == self.project {
            return Ok(());
        }
        let before = std::mem::replace(&mut self.project, next);
        self.push_undo(before, self.revision);
        self.redo.clear();
        self.revision = fresh_revision();
        Ok(())
    }

    /// Applies several edits as one undoable step (e.g. new design settings and the regenerated
    /// sheet). All or nothing: when one fails, nothing changes and its error is returned.
    pub fn apply_all(&mut self, edits: Vec<Edit>) -> Result<(), EditError> {
        let mut next = self.project.clone();
        for edit in edits {
            next.apply(edit)?;
        }
        self.replace(next);
        Ok(())
    }

    /// Whether there is a step to undo.
    pub fn can_undo(&self) -> bool {
        !self.undo.is_empty()
    }

    /// Whether there is a step to redo.
    pub fn can_redo(&self) -> bool {
        !self.redo.is_empty()
    }

    /// Goes back one step; `false` when there is nothing to undo.
    pub fn undo(&mut self) -> bool {
        let Some((project, revision)) = self.undo.pop_back() else {
            return false;
        };
        let current = std::mem::replace(&mut self.project, project);
        self.redo.push((current, self.revision));
        self.revision = revision;
        true
    }

    /// Goes forward one undone step; `false` when there is nothing to redo.
    pub fn redo(&mut self) -> bool {
        let Some((project, revision)) = self.redo.pop() else {
            return false;
        };
        let current = std::mem::replace(&mut self.project, project);
        self.push_undo(current, self.revision);
        self.revision = revision;
        true
    }

    /// Whether the current content differs from what was last saved (or was never saved).
    pub fn is_dirty(&self) -> bool {
        self.saved_revision != Some(self.revision)
    }

    /// Records that the current content is what the project file holds now.
    pub fn mark_saved(&mut self) {
        self.saved_revision = Some(self.revision);
    }

    /// Replaces the project with another one (opened or recovered) as an undoable step, e.g.
    /// "restore the recovery copy": the revision changes and the project counts as unsaved.
    pub fn replace(&mut self, project: Project) {
        if project == self.project {
            return;
        }
        let before = std::mem::replace(&mut self.project, project);
        self.push_undo(before, self.revision);
        self.redo.clear();
        self.revision = fresh_revision();
    }

    /// Keeps a state for undo, forgetting the oldest beyond the step limit or the run budget.
    fn push_undo(&mut self, project: Project, revision: u64) {
        self.undo.push_back((project, revision));
        while self.undo.len() > self.limit
            || (self.undo.len() > 1
                && self.undo.iter().map(|(p, _)| p.runs.len()).sum::<usize>() > UNDO_RUN_BUDGET)
        {
            self.undo.pop_front();
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::Factor;

    fn base() -> Project {
        let mut p = Project::new("t");
        p.factors.push(Factor::numeric("A", "", 0.0, 1.0));
        p.factors.push(Factor::numeric("B", "", 0.0, 1.0));
        p
    }

    #[test]
    fn dirty_flag_follows_saved_state_through_undo_and_redo() {
        let mut h = History::new(base());
        let r0 = h.revision();
        assert!(!h.is_dirty());
        h.apply(Edit::SetName("one".into())).unwrap();
        let r1 = h.revision();
        assert_ne!(r0, r1);
        assert!(h.is_dirty());
        assert!(h.undo());
        assert_eq!(h.revision(), r0, "undo restores the earlier revision");
        assert!(!h.is_dirty(), "back at the saved content");
        assert!(h.redo());
        assert_eq!(h.revision(), r1);
        h.mark_saved();
        assert!(!h.is_dirty());
        assert!(h.undo());
        assert!(h.is_dirty());
        assert!(!h.can_undo());
        assert!(!h.undo());
        h.apply(Edit::SetName("two".into())).unwrap();
        assert!(!h.can_redo(), "a new edit clears redo");
        assert!(!h.redo());
        let r2 = h.revision();
        assert!(r2 != r0 && r2 != r1, "revisions never repeat");
    }

    #[test]
    fn failed_or_empty_edits_record_no_step() {
        let mut h = History::new(base());
        let r = h.revision();
        assert!(h.apply(Edit::RemoveFactor { index: 9 }).is_err());
        h.apply(Edit::SetName("t".into())).unwrap();
        assert_eq!(h.revision(), r);
        assert!(!h.can_undo());
        let err = h.apply_all(vec![
            Edit::SetName("x".into()),
            Edit::SetNote {
                run: 3,
                note: "n".into(),
            },
        ]);
        assert_eq!(err, Err(EditError::NoSuchRun(3)));
        assert_eq!(h.project().name, "t", "all or nothing");
        h.apply_all(vec![
            Edit::SetName("x".into()),
            Edit::SetDescription("d".into()),
        ])
        .unwrap();
        assert!(h.undo());
        assert_eq!(h.project(), &base(), "a group is one step");
    }

    #[test]
    fn undo_is_bounded() {
        let mut h = History::new(base());
        h.set_limit(3);
        for i in 0..10 {
            h.apply(Edit::SetName(format!("n{i}"))).unwrap();
        }
        let mut steps = 0;
        while h.undo() {
            steps += 1;
        }
        assert_eq!(steps, 3);
        assert_eq!(h.project().name, "n6");
    }

    #[test]
    fn revisions_are_unique_across_histories() {
        let a = History::new(base());
        let b = History::new(base());
        assert_ne!(a.revision(), b.revision());
        assert!(History::new_unsaved(base()).is_dirty());
    }
}
