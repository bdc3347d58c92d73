//! The panes of the window, one per file, each behind the tiny [`Pane`] trait.
//!
//! A pane reads the project (and cached analysis results) through a [`View`] and returns what the
//! engineer asked for as [`Command`] values; the window applies them after drawing, in one place,
//! so every change is undoable and autosaved. A pane owns only its own view state (text being
//! typed, scroll targets, toggles).

pub mod boxcox;
pub mod chart;
pub mod design;
pub mod effects;
pub mod factors;
pub mod goals;
pub mod interactions;
pub mod limits_map;
pub mod model;
pub mod model_cells;
pub mod next_runs;
pub mod plots;
pub mod prediction;
pub mod quadratic;
pub mod residuals;
pub mod run_sheet;
pub mod trust;
pub mod widgets;

use crate::theme::Palette;
use twofold_study::project::{DesignSettings, Edit, Problem, Project};

/// The steps of the window: three to plan and run the experiment, then one per question the
/// engineer asks of the results, in the order they are usually asked.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Step {
    /// Factors and their levels.
    Factors,
    /// Choosing the design.
    Design,
    /// The run sheet.
    Runs,
    /// Which effects are real: ranked effects, Lenth's margins, the half-normal plot, the terms of
    /// the model.
    Effects,
    /// Whether the model can be trusted: ANOVA, fit statistics, equation, residual checks and the
    /// Box–Cox profile.
    Model,
    /// What the factors do: main-effect and interaction plots.
    Plots,
    /// Which settings to run: predicted response and best settings.
    Predict,
    /// Follow-up runs: fold-overs, centre points, a replicate, axial runs.
    NextRuns,
}

impl Step {
    /// All steps in order.
    pub const ALL: [Step; 8] = [
        Step::Factors,
        Step::Design,
        Step::Runs,
        Step::Effects,
        Step::Model,
        Step::Plots,
        Step::Predict,
        Step::NextRuns,
    ];

    /// The name shown on the step rail and as the pane's heading.
    pub fn title(self) -> &'static str {
        match self {
            Step::Factors => "Factors",
            Step::Design => "Design",
            Step::Runs => "Run sheet",
            Step::Effects => "Which effects are real?",
            Step::Model => "Can the model be trusted?",
            Step::Plots => "What do the factors do?",
            Step::Predict => "Which settings to run?",
            Step::NextRuns => "What to run next?",
        }
    }

    /// Whether the step is about one response (so the response picker applies).
    pub fn is_analysis(self) -> bool {
        matches!(
            self,
            Step::Effects | Step::Model | Step::Plots | Step::Predict | Step::NextRuns
        )
    }

    /// The step `delta` places on, staying at the first or last.
    pub fn moved(self, delta: isize) -> Step {
        let at = Step::ALL.iter().position(|s| *s == self).unwrap_or(0);
        let to = at.saturating_add_signed(delta).min(Step::ALL.len() - 1);
        Step::ALL[to]
    }
}

/// What a pane asks the window to do; applied after all panes are drawn.
#[must_use = "a command does nothing until the window applies it"]
#[derive(Debug, Clone, PartialEq)]
pub enum Command {
    /// Apply one edit as one undo step.
    Edit(Edit),
    /// Apply several edits as one undo step (all or none).
    Group(Vec<Edit>),
    /// Replace the design settings and regenerate the run sheet; the window asks first when typed
    /// values would be lost or moved.
    ChangeDesign(DesignSettings),
    /// Show another response in the analysis panes.
    SelectResponse(usize),
    /// Go to another step.
    Goto(Step),
    /// Paste clipboard text into a response column, one line per run, from `targets[0]` down
    /// (positions in the project's runs, in the order the sheet shows them); one undo step.
    Paste {
        /// The response column.
        response: usize,
        /// Runs from the focused one down, as listed.
        targets: Vec<usize>,
        /// The clipboard text (tab-separated, one row a line).
        text: String,
    },
}

/// What a pane may read while drawing: the project and everything derived from it, computed once
/// per change of the data.
pub struct View<'a> {
    /// The project as it is now.
    pub project: &'a Project,
    /// Revision of the project's content (changes with every edit, undo and redo).
    pub revision: u64,
    /// Problems of the project (validated once per change).
    pub problems: &'a [Problem],
    /// The response shown in the analysis panes, if there is one.
    pub response: Option<usize>,
    /// Analysis of that response (computed once per change, only while an analysis step shows);
    /// possibly of an earlier revision while the new one is computed.
    pub results: Option<&'a twofold_study::report::Report>,
    /// Whether `results` are of the current revision.
    pub results_current: bool,
    /// The best settings for every response's goal with the revision they are of (computed once
    /// per change, only while "Which settings to run?" shows).
    pub decision: Option<(u64, &'a twofold_study::report::Decision)>,
    /// Colours of the current theme.
    pub pal: Palette,
    /// The current time as ISO-8601 text, recorded with entered values.
    pub now: &'a str,
}

impl<'a> View<'a> {
    /// The analysis of the shown response, or, when there is none, a note in the pane saying what
    /// to do first.
    pub fn results_or_explain(
        &self,
        ui: &mut egui::Ui,
    ) -> Option<&'a twofold_study::report::Report> {
        if self.results.is_none() {
            widgets::not_available(
                ui,
                &self.pal,
                "Not available yet: add a response on the run sheet.",
            );
        }
        self.results
    }

    /// Name of the response an analysis is of ("" when it no longer exists).
    pub fn response_name(&self, res: &twofold_study::report::Report) -> &'a str {
        self.project
            .responses
            .get(res.response)
            .map_or("", |r| r.name.as_str())
    }
}

/// A pane of the window.
pub trait Pane {
    /// Draws the pane and pushes what the engineer asked for onto `out`.
    fn ui(&mut self, ui: &mut egui::Ui, view: &View<'_>, out: &mut Vec<Command>);
}
