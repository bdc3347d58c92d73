//! The project model: plain data the window reads, edits it applies, and the files it lives in.
//!
//! - [`model`]: the data ([`Project`], [`Factor`], [`DesignSettings`], [`RunRecord`], ...).
//! - [`cell`]: a typed response value, kept as text, read on demand ([`Cell`], [`CellValue`]).
//! - [`demo`]: the embedded demo project ([`demo_project`]).
//! - [`validate`]: per-field errors and warnings ([`Problem`]).
//! - [`edit`]: every change as a value ([`Edit`]) applied by [`Project::apply`].
//! - [`history`]: undo/redo, dirty flag and the data revision caches key on ([`History`]).
//! - [`io`], [`migrate`]: the project file, read with migration and written atomically.
//! - [`recovery`]: recovery copies a second after each edit, offered on start.
//! - [`recent`], [`places`]: the recent-files list and the per-user folders.
//! - [`regenerate`]: the run sheet from the design, keeping typed values that survive.
//! - [`goals`]: goals of the responses, noise factors' spread, power settings.
//! - [`follow_up`]: follow-up runs (fold-over, centre points, a replicate) added as one edit.
//! - [`axial`]: axial runs, the follow-up that makes a central composite design.
//! - [`sheet_runs`]: the runs of the whole sheet counted block by block ([`SheetRuns`]).

pub mod added_block;
pub mod axial;
pub mod cell;
pub mod demo;
pub mod edit;
pub mod follow_up;
pub mod goals;
pub mod history;
pub mod io;
pub mod migrate;
pub mod model;
pub mod places;
pub mod recent;
pub mod recovery;
pub mod regenerate;
pub mod sheet_runs;
pub mod validate;

pub use added_block::{AddedBlock, parse_interactions};
pub use axial::{AXIAL_CENTRE_POINTS_MIN, AxialRuns, axial_centre_points};
pub use cell::{Cell, CellValue};
pub use demo::demo_project;
pub use edit::{Edit, EditError};
pub use follow_up::{CENTRE_POINTS_ADDED, FollowUp, FollowUpError, FollowUpPreview, pure_error_df};
pub use goals::{GoalAim, PowerSettings, ResponseGoal};
pub use history::History;
pub use io::{FileError, load_project, project_from_str, project_to_string, save_project};
pub use model::{
    BlockChoice, DesignSettings, FORMAT_VERSION, Factor, FactorKind, Level, MAX_FACTORS,
    MIN_FACTORS, ModelSettings, Project, ResponseDef, ResponseTransform, RunRecord, RunStatus,
};
pub use recent::RecentFiles;
pub use recovery::{RecoveryDebouncer, RecoveryOffer, RecoveryStore};
pub use regenerate::PlanError;
pub use sheet_runs::{BaseKind, FollowUpBlock, SheetRuns};
pub use validate::{FactorField, Field, Problem, Severity, levels_far_apart};

impl Project {
    /// An empty project with the given name: no factors, default design, no runs.
    pub fn new(name: &str) -> Project {
        Project {
            format_version: FORMAT_VERSION,
            name: name.to_string(),
            description: String::new(),
            factors: Vec::new(),
            design: DesignSettings::default(),
            responses: Vec::new(),
            runs: Vec::new(),
            runs_outdated: false,
            power: PowerSettings::default(),
        }
    }
}
