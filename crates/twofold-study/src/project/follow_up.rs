//! Follow-up runs added to a run sheet that is already (partly) run: a fold-over, centre points,
//! or one more replicate, each one edit ([`super::Edit::AddFollowUp`]) that keeps every typed
//! value, status and note.
//!
//! Each follow-up is a change of the design settings followed by regeneration, so the file
//! records it and regenerating gives the same sheet again:
//!
//! - **Fold-over**: [`DesignSettings::fold`]; the fraction's runs stay block 1 and the folded runs
//!   are block 2, laid out by [`twofold_core::plan::build_fold_over_plan`] exactly as
//!   `twofold plan --fold` lays them out. Block 1 is shuffled first from the same seed, so the
//!   runs in the sheet keep their run order. Runs made at another time are a block of their own
//!   (Montgomery, *Design and Analysis of Experiments*, fold-over section of the chapter on
//!   two-level fractions; Box, Hunter & Hunter 2005, §6.7).
//! - **Centre points**: [`DesignSettings::centre_points_per_block`] from none to
//!   [`CENTRE_POINTS_ADDED`] per block, for a curvature check and pure error.
//! - **A replicate**: [`DesignSettings::replicates`] plus one. A first replicate added to a design
//!   without a fold-over runs as its own block ([`DesignSettings::replicates_as_blocks`]), so the
//!   runs in the sheet keep their block and run order and a day-to-day shift does not enter the
//!   pure error.
//!
//! Anything that would lose a typed value is refused: the engineer changes the design on the
//! design step for that, where the window asks first.

use super::model::{DesignSettings, Project};
use super::regenerate::{PlanError, carry_over, fraction_of, partners, plan_runs};
use twofold_core::augment::Augmentation;
use twofold_core::foldover::{FoldKind, fold_over};

/// Centre points a follow-up adds to each block. Common practice, no source for the exact
/// number: three to five centre points give a curvature check and a few degrees of freedom of
/// pure error for little cost; four is used here.
pub const CENTRE_POINTS_ADDED: u32 = 4;

/// A follow-up the engineer can add to the run sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum FollowUp {
    /// A fold-over of the fraction, as a second block.
    FoldOver(FoldKind),
    /// Half of a fold-over's runs, as a second block (see [`super::added_block`]).
    SemiFold(twofold_core::semifold::SemiFold),
    /// Runs chosen to separate these two-factor interactions, as a second block (see
    /// [`super::added_block`]).
    Separate(Vec<twofold_core::term::Term>),
    /// [`CENTRE_POINTS_ADDED`] centre points in every block (the design has none).
    CentrePoints,
    /// One more complete replicate.
    Replicate,
    /// Axial runs and centre runs as a new block: a face-centred central composite design
    /// ([`super::axial`]).
    Axial,
}

/// Why a follow-up cannot be added.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum FollowUpError {
    /// No run sheet yet.
    #[error("there is no run sheet yet: generate the runs from the design first")]
    NoRuns,
    /// The sheet does not follow from the factors and design any more.
    #[error(
        "the run sheet is out of date with the factors or the design: regenerate it on the design step first"
    )]
    Outdated,
    /// A fold-over (or another follow-up block) is already in the sheet.
    #[error(
        "the run sheet already holds a fold-over or added runs in block 2; a second one is not offered"
    )]
    AlreadyFolded,
    /// The fold switches the sign of no defining word.
    #[error("this fold switches no defining word, so its runs would only repeat the fraction")]
    RepeatsRuns,
    /// The design already has centre points.
    #[error("the design already has centre points")]
    HasCentrePoints,
    /// The design already has axial runs (the last block: nothing is added after them).
    #[error("the run sheet already holds axial runs, the last block")]
    AlreadyAxial,
    /// Even with axial runs the quadratic model could not be fitted.
    #[error(
        "even with axial runs the quadratic model could not be fitted ({0}): the fraction aliases two-factor interactions; fold it over or run the full factorial first"
    )]
    QuadraticNotEstimable(String),
    /// Typed values would find no run in the new sheet (not expected: the runs in the sheet are
    /// part of every follow-up).
    #[error("{0} typed value(s) would find no run in the new sheet")]
    WouldLose(usize),
    /// The new sheet cannot be laid out.
    #[error(transparent)]
    Plan(#[from] PlanError),
}

/// What adding a follow-up does to the sheet.
#[derive(Debug, Clone, PartialEq)]
pub struct FollowUpPreview {
    /// The design settings after the follow-up.
    pub design: DesignSettings,
    /// Runs in the sheet now.
    pub runs_before: usize,
    /// Runs after the follow-up.
    pub runs_after: usize,
    /// Runs in the sheet whose run-order number or block changes.
    pub reordered: usize,
    /// Degrees of freedom of pure error in the sheet now (see [`pure_error_df`]).
    pub pure_error_df_before: usize,
    /// Degrees of freedom of pure error after the follow-up.
    pub pure_error_df_after: usize,
    /// Blocks after the follow-up.
    pub blocks_after: u32,
}

/// Degrees of freedom of pure error of a sheet: runs with the same coded settings in the same
/// block, one less than their number per group (the report's definition: Montgomery, *Design and
/// Analysis of Experiments*, pure error of replicated runs and centre points).
pub fn pure_error_df(runs: &[super::model::RunRecord]) -> usize {
    let mut keys: Vec<(&[i8], u32)> = runs
        .iter()
        .map(|r| (r.levels.as_slice(), r.block))
        .collect();
    keys.sort();
    keys.windows(2).filter(|w| w[0] == w[1]).count()
}

impl FollowUpPreview {
    /// Runs the follow-up adds.
    pub fn runs_added(&self) -> usize {
        self.runs_after.saturating_sub(self.runs_before)
    }
}

impl Project {
    /// The design settings after `follow_up`, or why it cannot be added.
    pub fn follow_up_design(&self, follow_up: FollowUp) -> Result<DesignSettings, FollowUpError> {
        self.follow_up_design_with(follow_up).map(|(d, _)| d)
    }

    /// [`Self::follow_up_design`], with the search result of runs chosen to separate
    /// interactions (`None` for every other follow-up), so a caller that describes them does
    /// not search again.
    pub(crate) fn follow_up_design_with(
        &self,
        follow_up: FollowUp,
    ) -> Result<(DesignSettings, Option<Augmentation>), FollowUpError> {
        if self.runs.is_empty() {
            return Err(FollowUpError::NoRuns);
        }
        if self.runs_outdated {
            return Err(FollowUpError::Outdated);
        }
        let mut d = self.design.clone();
        // The axial block is the last one: anything added after it would renumber its runs.
        if d.axial.is_some() {
            return Err(FollowUpError::AlreadyAxial);
        }
        let screening = d.screening_runs().is_some();
        if d.has_follow_up_block()
            && matches!(
                follow_up,
                FollowUp::FoldOver(_) | FollowUp::SemiFold(_) | FollowUp::Separate(_)
            )
        {
            return Err(FollowUpError::AlreadyFolded);
        }
        let mut augmentation = None;
        match follow_up {
            FollowUp::SemiFold(_) | FollowUp::Separate(_) => {
                let (block, found) = super::added_block::block_for(self, &d, &follow_up)?;
                d.added = Some(block);
                augmentation = found;
            }
            FollowUp::FoldOver(kind) if screening => {
                if kind != twofold_core::foldover::FoldKind::Full {
                    return Err(FollowUpError::from(PlanError::Invalid(
                        "a screening design is folded over in full; single-factor folds are not offered for it".into(),
                    )));
                }
                d.fold = Some(kind);
            }
            FollowUp::FoldOver(kind) => {
                let fraction = fraction_of(
                    self.factors.len(),
                    &d,
                    &super::regenerate::hard_to_change_of(self),
                )?;
                let fold = fold_over(&fraction, kind).map_err(PlanError::from)?;
                if fold.repeats_original {
                    return Err(FollowUpError::RepeatsRuns);
                }
                d.fold = Some(kind);
            }
            FollowUp::CentrePoints => {
                if d.centre_points_per_block > 0 {
                    return Err(FollowUpError::HasCentrePoints);
                }
                d.centre_points_per_block = CENTRE_POINTS_ADDED;
            }
            FollowUp::Replicate => {
                // Screening designs are planned in one block (their blocking is not offered yet).
                // After a follow-up block the sheet holds two blocks already, laid out without
                // other blocking: the replicate repeats each block's runs within that block
                // (`twofold_core::plan::build_added_block_plan` refuses replicates as blocks).
                if d.replicates == 1 && !d.has_follow_up_block() && !screening {
                    d.replicates_as_blocks = true;
                }
                d.replicates = d.replicates.saturating_add(1);
            }
            FollowUp::Axial => {
                d.axial = Some(super::axial::AxialRuns::for_design(&d));
                super::axial::check_estimable(self, &d)?;
            }
        }
        Ok((d, augmentation))
    }

    /// What `follow_up` would do to the sheet, computed by laying the new sheet out; an error
    /// says why it cannot be added.
    pub fn preview_follow_up(&self, follow_up: FollowUp) -> Result<FollowUpPreview, FollowUpError> {
        self.preview_follow_up_with(follow_up).map(|(p, _)| p)
    }

    /// [`Self::preview_follow_up`], with the search result of runs chosen to separate
    /// interactions (see [`Self::follow_up_design_with`]).
    pub(crate) fn preview_follow_up_with(
        &self,
        follow_up: FollowUp,
    ) -> Result<(FollowUpPreview, Option<Augmentation>), FollowUpError> {
        let (design, augmentation) = self.follow_up_design_with(follow_up)?;
        let (fresh, _) = plan_runs(self, &design)?;
        let pairs = partners(&self.runs, &fresh);
        let lost: usize = self
            .runs
            .iter()
            .zip(&pairs)
            .filter(|(_, p)| p.is_none())
            .map(|(r, _)| r.values.iter().filter(|c| c.is_typed()).count())
            .sum();
        if lost > 0 {
            return Err(FollowUpError::WouldLose(lost));
        }
        let reordered = self
            .runs
            .iter()
            .zip(&pairs)
            .filter(|(r, p)| {
                p.and_then(|j| fresh.get(j))
                    .is_none_or(|n| n.run_order != r.run_order || n.block != r.block)
            })
            .count();
        let preview = FollowUpPreview {
            design,
            runs_before: self.runs.len(),
            runs_after: fresh.len(),
            reordered,
            pure_error_df_before: pure_error_df(&self.runs),
            pure_error_df_after: pure_error_df(&fresh),
            blocks_after: fresh.iter().map(|r| r.block).max().unwrap_or(1),
        };
        Ok((preview, augmentation))
    }

    /// Adds `follow_up` (see the module documentation); the project is unchanged on error.
    pub(crate) fn add_follow_up(&mut self, follow_up: FollowUp) -> Result<(), FollowUpError> {
        let design = self.follow_up_design(follow_up)?;
        let (mut fresh, used) = plan_runs(self, &design)?;
        let lost = carry_over(&self.runs, &mut fresh);
        if lost > 0 {
            return Err(FollowUpError::WouldLose(lost));
        }
        self.runs = fresh;
        self.design = used;
        self.runs_outdated = false;
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Cell, Edit, Factor, History, ResponseDef, RunStatus};

    /// Five numeric factors in the 2^(5-2) fraction D=AB, E=AC, every run typed, one excluded
    /// and one with a note.
    fn screened() -> Project {
        let mut p = Project::new("screen");
        for name in ["Temp", "Time", "Speed", "Load", "Feed"] {
            p.factors.push(Factor::numeric(name, "", 0.0, 1.0));
        }
        p.responses.push(ResponseDef::new("y", ""));
        p.design.base_runs = Some(8);
        p.design.generators = vec!["D=AB".into(), "E=AC".into()];
        p.design.seed = 11;
        p.apply(Edit::RegenerateRuns).unwrap();
        for (i, r) in p.runs.iter_mut().enumerate() {
            r.values[0] = Cell::new(format!("{}.5", 10 + i));
            r.status = RunStatus::Done;
        }
        p.runs[2].status = RunStatus::Excluded {
            reason: "spill".into(),
        };
        p.runs[5].note = "new lot".into();
        p
    }

    fn kept(before: &Project, after: &Project) {
        for r in &before.runs {
            let now = after
                .runs
                .iter()
                .find(|n| n.levels == r.levels && n.replicate == r.replicate && n.block == r.block)
                .unwrap_or_else(|| panic!("run {:?} is gone", r.levels));
            assert_eq!(now.values, r.values);
            assert_eq!(now.status, r.status);
            assert_eq!(now.note, r.note);
            assert_eq!(now.run_order, r.run_order, "run order kept");
        }
    }

    #[test]
    fn a_fold_over_adds_a_second_block_and_keeps_the_sheet() {
        let before = screened();
        let mut h = History::new(before.clone());
        h.apply(Edit::AddFollowUp(FollowUp::FoldOver(FoldKind::Full)))
            .unwrap();
        let after = h.project().clone();
        assert_eq!(after.runs.len(), 16);
        assert_eq!(after.runs.iter().filter(|r| r.block == 2).count(), 8);
        assert_eq!(after.design.fold, Some(FoldKind::Full));
        assert_eq!(after.design.generators, before.design.generators);
        kept(&before, &after);
        // New runs are to do, with empty cells.
        assert!(
            after
                .runs
                .iter()
                .filter(|r| r.block == 2)
                .all(|r| r.status == RunStatus::ToDo && !r.values[0].is_typed())
        );
        // One undo step brings the eight-run sheet back exactly.
        assert!(h.undo());
        assert_eq!(h.project(), &before);
        // Regenerating the folded design gives the same sheet again.
        let mut again = after.clone();
        again.apply(Edit::RegenerateRuns).unwrap();
        assert_eq!(again, after);
    }

    #[test]
    fn centre_points_and_a_replicate_keep_typed_values() {
        let before = screened();
        let mut p = before.clone();
        let preview = p.preview_follow_up(FollowUp::CentrePoints).unwrap();
        assert_eq!(preview.runs_added(), CENTRE_POINTS_ADDED as usize);
        p.apply(Edit::AddFollowUp(FollowUp::CentrePoints)).unwrap();
        assert_eq!(p.runs.iter().filter(|r| r.centre).count(), 4);
        assert_eq!(p.typed_value_count(), before.typed_value_count());
        assert_eq!(
            p.apply(Edit::AddFollowUp(FollowUp::CentrePoints)),
            Err(crate::project::EditError::FollowUp(
                FollowUpError::HasCentrePoints
            ))
        );
        // A replicate of the unblocked sheet runs as block 2; the sheet keeps its order.
        let mut q = before.clone();
        let preview = q.preview_follow_up(FollowUp::Replicate).unwrap();
        assert_eq!((preview.runs_added(), preview.reordered), (8, 0));
        q.apply(Edit::AddFollowUp(FollowUp::Replicate)).unwrap();
        assert_eq!(q.design.replicates, 2);
        kept(&before, &q);
        assert!(q.runs.iter().all(|r| (r.replicate == 2) == (r.block == 2)));
    }

    #[test]
    fn follow_ups_that_cannot_be_added_say_why() {
        let mut p = screened();
        p.runs_outdated = true;
        assert_eq!(
            p.follow_up_design(FollowUp::Replicate),
            Err(FollowUpError::Outdated)
        );
        let mut p = screened();
        p.apply(Edit::AddFollowUp(FollowUp::FoldOver(FoldKind::Factor(0))))
            .unwrap();
        assert_eq!(
            p.follow_up_design(FollowUp::FoldOver(FoldKind::Full)),
            Err(FollowUpError::AlreadyFolded)
        );
        // A resolution IV fraction has only even words: folded fully it repeats its runs
        // (Montgomery's fold-over section: the full fold-over is for resolution III designs).
        let mut r = Project::new("res iv");
        for name in ["A", "B", "C", "D", "E", "F"] {
            r.factors.push(Factor::numeric(name, "", 0.0, 1.0));
        }
        r.design.base_runs = Some(16);
        r.design.generators = vec!["E=ABC".into(), "F=BCD".into()];
        r.apply(Edit::RegenerateRuns).unwrap();
        assert_eq!(
            r.follow_up_design(FollowUp::FoldOver(FoldKind::Full)),
            Err(FollowUpError::RepeatsRuns)
        );
        assert!(
            Project::new("empty")
                .follow_up_design(FollowUp::Replicate)
                .is_err()
        );
    }

    #[test]
    fn a_folded_project_reads_back_and_files_without_a_fold_still_load() {
        use crate::project::{project_from_str, project_to_string};
        let mut p = screened();
        p.apply(Edit::AddFollowUp(FollowUp::FoldOver(FoldKind::Factor(2))))
            .unwrap();
        let text = project_to_string(&p).unwrap();
        assert!(text.contains("Factor(2)"), "{text}");
        assert_eq!(project_from_str(&text).unwrap(), p);
        // Without a fold the field is not written, as in files from before follow-ups.
        let plain = project_to_string(&screened()).unwrap();
        assert!(!plain.contains("fold:"), "{plain}");
        assert_eq!(project_from_str(&plain).unwrap().design.fold, None);
    }

    #[test]
    fn validation_and_factor_edits_understand_the_fold() {
        use crate::project::{BlockChoice, Field, Severity};
        let mut p = screened();
        p.apply(Edit::AddFollowUp(FollowUp::FoldOver(FoldKind::Factor(3))))
            .unwrap();
        assert!(p.validate().iter().all(|q| q.severity != Severity::Error));
        let mut blocked = p.clone();
        blocked.design.blocks = BlockChoice::Count(2);
        let errors: Vec<String> = blocked
            .validate()
            .into_iter()
            .filter(|q| q.severity == Severity::Error && q.field == Field::Design)
            .map(|q| q.message)
            .collect();
        assert_eq!(
            errors,
            ["a fold-over runs as its own block; it cannot be combined with other blocking"]
        );
        // Moving the folded factor moves the fold; removing it removes the fold.
        let mut moved = p.clone();
        moved.apply(Edit::MoveFactor { from: 3, to: 0 }).unwrap();
        assert_eq!(moved.design.fold, Some(FoldKind::Factor(0)));
        let mut removed = p.clone();
        removed.apply(Edit::RemoveFactor { index: 3 }).unwrap();
        assert_eq!(removed.design.fold, None);
        let mut full = Project::new("full");
        full.factors = p.factors.clone();
        full.design.fold = Some(FoldKind::Full);
        assert!(
            full.validate()
                .iter()
                .any(|q| q.message.starts_with("a full factorial has no aliases"))
        );
    }
}
