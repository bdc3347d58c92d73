//! Axial runs added to a two-level design: the follow-up that makes it a face-centred central
//! composite design, so the quadratic model can be fitted (see [`twofold_core::composite`] for
//! the design and why α = 1).
//!
//! The choice is recorded in [`DesignSettings::axial`]; regeneration lays the design out as
//! before and adds the axial block after it ([`twofold_core::composite::add_axial_block`]): the
//! 2k axial runs and its centre runs as the last block, standard and run order after every run
//! already there. Those runs come last in standard order, so a study with axial runs splits into
//! its two-level part (every run before them, analysed as before) and the whole sheet (the
//! quadratic model).

use serde::{Deserialize, Serialize};
use twofold_core::plan::PlannedRun;

use super::model::{DesignSettings, Project};
use super::regenerate::PlanError;

/// The axial block of a design.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct AxialRuns {
    /// Centre runs in the axial block.
    pub centre_points: u32,
}

/// Centre runs of the axial block when the design has none per block. Common practice, no
/// source for the exact number: two to three centre runs suffice for a face-centred design
/// (Myers, Montgomery & Anderson-Cook, *Response Surface Methodology*, on the face-centred cube;
/// from memory), and two in the axial block also estimate its block effect.
pub const AXIAL_CENTRE_POINTS_MIN: u32 = 2;

impl AxialRuns {
    /// The axial block for `design`: as many centre runs as each of its blocks has, at least
    /// [`AXIAL_CENTRE_POINTS_MIN`].
    pub fn for_design(design: &DesignSettings) -> AxialRuns {
        AxialRuns {
            centre_points: axial_centre_points(design.centre_points_per_block),
        }
    }
}

/// Centre runs of the axial block of a design with `centre_points_per_block`: as many, at least
/// [`AXIAL_CENTRE_POINTS_MIN`] (the one rule of the window, the file and `twofold plan`).
pub fn axial_centre_points(centre_points_per_block: u32) -> u32 {
    centre_points_per_block.max(AXIAL_CENTRE_POINTS_MIN)
}

/// What stops the axial runs of `project`'s design from being laid out.
pub(crate) fn axial_problems(project: &Project) -> Vec<String> {
    let mut out = Vec::new();
    if project.design.axial.is_none() {
        return out;
    }
    if project.factors.len() < 2 {
        out.push("axial runs need at least two factors".into());
    }
    if project.factors.iter().any(|f| !f.is_numeric()) {
        out.push(
            "axial runs need every factor numeric: a categorical factor has no middle level".into(),
        );
    }
    if project.design.screening_runs().is_some() {
        out.push(
            "axial runs build on a regular two-level design, not on a screening design".into(),
        );
    }
    if project.factors.iter().any(|f| f.hard_to_change) {
        out.push("axial runs with hard-to-change factors are not offered yet".into());
    }
    out
}

/// `runs` with the axial block of `design` added, or unchanged without one.
pub(crate) fn with_axial_block(
    k: usize,
    design: &DesignSettings,
    runs: Vec<PlannedRun>,
) -> Result<Vec<PlannedRun>, PlanError> {
    match design.axial {
        None => Ok(runs),
        Some(a) => twofold_core::composite::add_axial_block(
            runs,
            k,
            a.centre_points as usize,
            design.seed,
            design.randomize,
        )
        .map_err(|e| PlanError::Invalid(e.to_string())),
    }
}

/// Whether the sheet `design` gives `project` can fit the quadratic model (every run with a
/// value), by the rank of the model on the laid-out runs.
pub(crate) fn check_estimable(
    project: &Project,
    design: &DesignSettings,
) -> Result<(), super::FollowUpError> {
    let (runs, _) = super::regenerate::plan_runs(project, design)?;
    twofold_core::composite::quadratic_estimable(
        runs.iter().map(|r| (r.levels.as_slice(), r.block)),
    )
    .map_err(|e| super::FollowUpError::QuadraticNotEstimable(e.to_string()))
}

impl Project {
    /// The block number of the axial runs, when the design has them and the sheet is laid out.
    pub fn axial_block(&self) -> Option<u32> {
        self.design.axial?;
        self.runs.iter().map(|r| r.block).max()
    }

    /// The two-level part of a study with axial runs: the project without its axial block (and
    /// without the axial setting), the runs in the same order; `None` without axial runs.
    pub fn two_level_part(&self) -> Option<Project> {
        let block = self.axial_block()?;
        let mut p = self.clone();
        p.runs.retain(|r| r.block != block);
        p.design.axial = None;
        Some(p)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Cell, Edit, Factor, FollowUp, FollowUpError, History, ResponseDef};

    /// A 2³ factorial with two centre points, every run typed.
    fn factorial() -> Project {
        let mut p = Project::new("ccd");
        for (name, lo, hi) in [
            ("Temp", 150.0, 170.0),
            ("Time", 10.0, 20.0),
            ("Feed", 1.0, 2.0),
        ] {
            p.factors.push(Factor::numeric(name, "", lo, hi));
        }
        p.responses.push(ResponseDef::new("y", ""));
        p.design.centre_points_per_block = 2;
        p.design.seed = 5;
        p.apply(Edit::RegenerateRuns).unwrap();
        for (i, r) in p.runs.iter_mut().enumerate() {
            r.values[0] = Cell::new(format!("{}.25", 40 + i));
        }
        p
    }

    #[test]
    fn axial_runs_are_a_new_block_and_keep_every_typed_value() {
        let before = factorial();
        let mut h = History::new(before.clone());
        h.apply(Edit::AddFollowUp(FollowUp::Axial)).unwrap();
        let after = h.project().clone();
        // 8 corners + 2 centres, then 2·3 axial runs + 2 centres.
        assert_eq!(after.runs.len(), 10 + 6 + 2);
        assert_eq!(after.axial_block(), Some(2));
        let added: Vec<_> = after.runs.iter().filter(|r| r.block == 2).collect();
        assert_eq!(added.len(), 8);
        assert_eq!(
            added
                .iter()
                .filter(|r| twofold_core::composite::is_axial(&r.levels))
                .count(),
            6
        );
        assert!(added.iter().all(|r| !r.values[0].is_typed()));
        for r in &before.runs {
            let now = after
                .runs
                .iter()
                .find(|n| n.std_order == r.std_order)
                .unwrap();
            assert_eq!(
                (&now.levels, now.block, now.run_order, &now.values),
                (&r.levels, r.block, r.run_order, &r.values)
            );
        }
        // The axial block runs after every run already there.
        assert!(added.iter().all(|r| r.run_order > 10));
        // Regenerating gives the same sheet; the file records the choice and reads back.
        let mut again = after.clone();
        again.apply(Edit::RegenerateRuns).unwrap();
        assert_eq!(again, after);
        let text = crate::project::project_to_string(&after).unwrap();
        assert!(text.contains("axial: Some"), "{text}");
        assert_eq!(crate::project::project_from_str(&text).unwrap(), after);
        let plain = crate::project::project_to_string(&before).unwrap();
        assert!(!plain.contains("axial"), "{plain}");
        // The two-level part is the sheet as it was.
        assert_eq!(after.two_level_part().unwrap().runs, before.runs);
        // Undo brings the two-level sheet back; a second axial block is refused.
        assert_eq!(
            after.follow_up_design(FollowUp::Axial),
            Err(FollowUpError::AlreadyAxial)
        );
        assert!(h.undo());
        assert_eq!(h.project(), &before);
    }

    #[test]
    fn axial_runs_are_refused_where_the_quadratic_model_cannot_follow() {
        // A resolution IV half fraction aliases two-factor interactions in pairs.
        let mut p = Project::new("half");
        for name in ["A", "B", "C", "D"] {
            p.factors.push(Factor::numeric(name, "", 0.0, 1.0));
        }
        p.design.base_runs = Some(8);
        p.design.generators = vec!["D=ABC".into()];
        p.apply(Edit::RegenerateRuns).unwrap();
        assert!(matches!(
            p.follow_up_design(FollowUp::Axial),
            Err(FollowUpError::QuadraticNotEstimable(_))
        ));
        // A categorical factor has no middle level.
        let mut q = factorial();
        q.design.centre_points_per_block = 0;
        q.factors[2] = Factor::categorical("Feed", "a", "b");
        q.apply(Edit::RegenerateRuns).unwrap();
        let err = q.follow_up_design(FollowUp::Axial).unwrap_err();
        assert!(err.to_string().contains("categorical"), "{err}");
    }
}
