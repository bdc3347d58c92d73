//! The run sheet from the design: calls the core's planning and carries typed data over.
//!
//! When the sheet is regenerated, a new run takes over the typed values, status, note and entry
//! time of an old run with the same coded settings and replicate number (the *k*-th such old run
//! goes to the *k*-th such new run, in standard order). Whatever finds no partner is counted by
//! [`Project::design_change_would_discard`] before the window asks the engineer, and comes back
//! with undo.

use std::collections::HashMap;

use super::model::{DesignSettings, Project, RunRecord};

/// Why the run sheet could not be generated.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum PlanError {
    /// The core's planning is not part of this build yet.
    #[error("run generation is not available in this build")]
    Unavailable,
}

/// The run sheet the project's factors and design settings give, with typed data carried over
/// from the current sheet.
pub(crate) fn regenerate_runs(project: &Project) -> Result<Vec<RunRecord>, PlanError> {
    regenerate_with(project, &project.design)
}

fn regenerate_with(
    project: &Project,
    design: &DesignSettings,
) -> Result<Vec<RunRecord>, PlanError> {
    let mut fresh = plan_runs(project, design)?;
    carry_over(&project.runs, &mut fresh);
    Ok(fresh)
}

/// Fresh, empty runs for `design` over the project's factors and responses.
fn plan_runs(_project: &Project, _design: &DesignSettings) -> Result<Vec<RunRecord>, PlanError> {
    Err(PlanError::Unavailable)
}

/// Key matching an old run to a new one.
type MatchKey = (Vec<i8>, u32);

/// Moves typed data from `old` runs into their partners in `new` (same coded settings and
/// replicate, k-th to k-th). Returns how many typed cells found no partner.
pub(crate) fn carry_over(old: &[RunRecord], new: &mut [RunRecord]) -> usize {
    let mut slots: HashMap<MatchKey, Vec<usize>> = HashMap::new();
    for (i, run) in new.iter().enumerate() {
        slots
            .entry((run.levels.clone(), run.replicate))
            .or_default()
            .push(i);
    }
    // Reverse so that `pop` hands out the partners in standard order.
    for list in slots.values_mut() {
        list.reverse();
    }
    let mut lost = 0;
    for run in old {
        let typed = run.values.iter().filter(|c| c.is_typed()).count();
        match slots
            .get_mut(&(run.levels.clone(), run.replicate))
            .and_then(Vec::pop)
        {
            Some(j) => {
                let target = &mut new[j];
                // Response columns are the same on both sides: they come from the same project.
                for (dst, src) in target.values.iter_mut().zip(&run.values) {
                    dst.clone_from(src);
                }
                target.status = run.status.clone();
                target.note.clone_from(&run.note);
                target.entered_at.clone_from(&run.entered_at);
            }
            None => lost += typed,
        }
    }
    lost
}

impl Project {
    /// How many typed values would be lost if the runs were regenerated with `design` (pass the
    /// current design to ask about regenerating after factor changes). When the design cannot be
    /// planned, nothing would be regenerated, so nothing is at stake: 0.
    pub fn design_change_would_discard(&self, design: &DesignSettings) -> usize {
        match plan_runs(self, design) {
            Ok(mut fresh) => carry_over(&self.runs, &mut fresh),
            Err(_) => 0,
        }
    }

    /// Number of typed values anywhere in the run sheet.
    pub fn typed_value_count(&self) -> usize {
        self.runs
            .iter()
            .flat_map(|r| &r.values)
            .filter(|c| c.is_typed())
            .count()
    }
}
