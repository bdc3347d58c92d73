//! The desktop window: a thin shell around the project history, the panes and the file dialogs.
//!
//! Each frame: finished background work is collected, then the shortcuts, menus and panes are
//! drawn from the state as it is and push [`AppAction`]s (the panes' changes to the project as
//! [`Command`]s); after drawing, [`TwofoldApp::act`] applies them in one place, the project's
//! changes through [`TwofoldApp::apply`] (undoable). The question shown, if any, is drawn last
//! and its answer applied the same way. Derived data (validation problems, analysis) is
//! recomputed only when the project's revision changes.
//!
//! The parts: this file is the shell (state, frame, apply); `menus` draws the bars and reads the
//! shortcuts; `modals` the questions and their answers; `dialogs` the file dialogs and what their
//! answers do; `edits` the project changes and undo steps; `jobs` the analysis and exports on
//! background threads.
//!
//! [`TwofoldApp::new_for_test`] builds the same state without a window, file dialogs or files on
//! disk, and [`TwofoldApp::ui_in`] draws it into any `Ui`, so tests drive the real window code.

use std::path::{Path, PathBuf};

use egui::Ui;

mod dialogs;
mod edits;
mod focus;
mod jobs;
mod menus;
mod modals;

pub use dialogs::{FileAction, FilePicker};
pub use modals::ModalAnswer;

use dialogs::{DialogAnswer, load_project};
use edits::CoalesceKey;
use jobs::{AnalysisSlot, DecisionSlot};

use crate::panels::design::{Compute, DesignPane};
use crate::panels::effects::EffectsPane;
use crate::panels::factors::FactorsPane;
use crate::panels::interactions::PlotsPane;
use crate::panels::next_runs::NextRunsPane;
use crate::panels::prediction::PredictionPane;
use crate::panels::run_sheet::RunSheetPane;
use crate::panels::trust::TrustPane;
use crate::panels::{Command, Pane, Step, View};
use crate::theme::{self, Palette, ThemeChoice};
use twofold_study::export::{ExportJob, Paper};
use twofold_study::interchange::ImportPlan;
use twofold_study::jobs::Job;
use twofold_study::project::{
    DesignSettings, History, Problem, Project, RecentFiles, RecoveryDebouncer, RecoveryOffer,
    RecoveryStore,
};

/// Short caution about working with real processes, reachable from the Help menu and the status
/// bar.
pub const SAFETY_NOTE: &str = "Stay inside the safe operating limits of your equipment and \
materials. The levels you plan here are suggestions for an experiment, not approved settings: \
confirm with the people responsible before changing a production process, and follow local codes, \
site rules and licensed practice. A warning about a safe range is only as good as the range you \
declared.";

/// What to do once the engineer has decided about unsaved changes.
#[derive(Debug, Clone, PartialEq)]
pub enum AfterUnsaved {
    /// Start a new project.
    New,
    /// Show the open dialog.
    Open,
    /// Open this file.
    OpenPath(PathBuf),
    /// Close the window.
    Quit,
}

/// What the engineer asked for in a frame, pushed while drawing and applied by
/// [`TwofoldApp::act`] afterwards, in the order asked.
#[must_use = "an action does nothing until the window applies it"]
#[derive(Debug, Clone, PartialEq)]
pub enum AppAction {
    /// A change from a pane, the step rail or the project name field.
    Command(Command),
    /// Undo the last step.
    Undo,
    /// Redo the last undone step.
    Redo,
    /// New, open or quit, asking about unsaved changes first.
    Request(AfterUnsaved),
    /// Save to the project's file (or ask where).
    Save,
    /// Start a file action: its dialog, then the action.
    File(FileAction),
    /// Switch between the light and the dark theme.
    ToggleTheme,
    /// Show the safety caution.
    ShowSafety,
    /// Paper of exported pages.
    SetPaper(Paper),
    /// Format of exported pages (`pdf` or `png`): the extension of the suggested file name, the
    /// first choice of the save dialog, and the extension of a typed name that has none.
    SetPageFormat(&'static str),
    /// Ask the running export to stop.
    CancelExport,
    /// An answer to the question or message shown.
    Answer(ModalAnswer),
}

/// A question or message shown over the window.
#[derive(Debug, Clone, PartialEq)]
pub enum Modal {
    /// Changing the design after values were typed.
    ConfirmDesign {
        /// The new design settings.
        design: DesignSettings,
        /// Typed values that would find no run in the new sheet.
        lost: usize,
        /// Typed values in the sheet now.
        typed: usize,
    },
    /// Unsaved changes before another action.
    Unsaved(AfterUnsaved),
    /// An error in plain words.
    Error(String),
    /// The safety caution.
    Safety,
    /// A recovery copy newer than the project was found.
    Restore(Box<RecoveryOffer>),
    /// What a CSV import would change; nothing is written until the engineer confirms.
    ConfirmImport {
        /// The file read.
        file: String,
        /// The planned changes and the rows that did not match.
        plan: Box<ImportPlan>,
    },
    /// A paste put text that is not a number into cells: they are kept, marked, and listed here.
    PasteReport(String),
    /// No file dialog could be shown (no desktop portal or dialog program): type the path.
    TypePath {
        /// What the path is for.
        action: FileAction,
        /// The path typed so far.
        text: String,
    },
}

/// Everything derived from one revision of the project, computed once per change.
pub(super) struct Derived {
    revision: u64,
    problems: Vec<Problem>,
}

impl Derived {
    pub(super) fn of(project: &Project, revision: u64) -> Derived {
        Derived {
            revision,
            problems: project.validate(),
        }
    }
}

/// The panes, one per step.
#[derive(Default)]
pub(super) struct Panes {
    factors: FactorsPane,
    design: DesignPane,
    runs: RunSheetPane,
    effects: EffectsPane,
    model: TrustPane,
    plots: PlotsPane,
    predict: PredictionPane,
    next_runs: NextRunsPane,
}

impl Panes {
    fn get(&mut self, step: Step) -> &mut dyn Pane {
        match step {
            Step::Factors => &mut self.factors,
            Step::Design => &mut self.design,
            Step::Runs => &mut self.runs,
            Step::Effects => &mut self.effects,
            Step::Model => &mut self.model,
            Step::Plots => &mut self.plots,
            Step::Predict => &mut self.predict,
            Step::NextRuns => &mut self.next_runs,
        }
    }
}

/// The state of the window.
pub struct TwofoldApp {
    history: History,
    path: Option<PathBuf>,
    step: Step,
    response: Option<usize>,
    theme: ThemeChoice,
    applied_theme: Option<ThemeChoice>,
    panes: Panes,
    derived: Derived,
    analysis: AnalysisSlot,
    decision: DecisionSlot,
    coalesce: Option<(CoalesceKey, u64)>,
    modal: Option<Modal>,
    /// Where the keyboard goes after a step change or a click.
    focus: focus::FocusKeeper,
    picker: FilePicker,
    pending_dialog: Option<(FileAction, Job<DialogAnswer>)>,
    recent: RecentFiles,
    recent_store: Option<PathBuf>,
    recovery: Option<RecoveryStore>,
    debouncer: RecoveryDebouncer,
    /// A value was committed since the last recovery copy (Enter, Tab, a field left, or an
    /// applied change that is not a keystroke in a field): copy it in this frame.
    committed: bool,
    /// The widget that had the keyboard at the end of the last frame: when it changes, the field
    /// that had it was left, which commits what was typed there.
    focus_seen: Option<egui::Id>,
    notice: Option<String>,
    sent_title: String,
    clock: fn() -> String,
    quit_confirmed: bool,
    /// Compute searches in the frame (tests) rather than on worker threads.
    inline_compute: bool,
    /// Paper of exported pages.
    paper: Paper,
    /// Format of exported pages (see [`AppAction::SetPageFormat`]).
    page_ext: &'static str,
    /// The export running on a worker thread, and what it writes (for the status bar).
    export: Option<(String, ExportJob)>,
    /// The window's context, for worker threads to wake it (none until the first frame).
    ctx: Option<egui::Context>,
}

impl TwofoldApp {
    fn with(history: History, path: Option<PathBuf>, picker: FilePicker) -> TwofoldApp {
        let derived = Derived::of(history.project(), history.revision());
        let response = (!history.project().responses.is_empty()).then_some(0);
        let step = if history.project().runs.is_empty() {
            Step::Factors
        } else {
            Step::Runs
        };
        TwofoldApp {
            history,
            path,
            step,
            response,
            theme: ThemeChoice::Light,
            applied_theme: None,
            panes: Panes::default(),
            derived,
            analysis: AnalysisSlot::default(),
            decision: DecisionSlot::default(),
            coalesce: None,
            modal: None,
            focus: focus::FocusKeeper::default(),
            picker,
            pending_dialog: None,
            recent: RecentFiles::default(),
            recent_store: None,
            recovery: None,
            debouncer: RecoveryDebouncer::default(),
            committed: false,
            focus_seen: None,
            notice: None,
            sent_title: String::new(),
            clock: now_iso,
            quit_confirmed: false,
            inline_compute: false,
            paper: Paper::A4,
            page_ext: "pdf",
            export: None,
            ctx: None,
        }
    }

    /// The window's state over `project`, as if just opened, with no file, no dialogs (every file
    /// dialog answers "cancelled" until [`Self::set_file_picker`] says otherwise) and a fixed clock.
    pub fn new_for_test(project: Project) -> TwofoldApp {
        let mut app = TwofoldApp::with(History::new(project), None, FilePicker::Fixed(None));
        app.clock = || "2025-01-01T09:00:00Z".to_string();
        app.inline_compute = true;
        app.panes.design.compute = Compute::Inline;
        app
    }

    /// Keeps recovery copies in `store` (the window uses the per-user store; tests a temporary
    /// folder). Without a store no copies are written.
    pub fn set_recovery_store(&mut self, store: RecoveryStore) {
        self.recovery = Some(store);
    }

    /// Offers to restore a recovery copy of the current project (or of the unsaved project) when
    /// one newer than its file exists.
    pub fn offer_recovery(&mut self) {
        let Some(store) = &self.recovery else {
            return;
        };
        match store.find(self.path.as_deref()) {
            Ok(Some(offer)) => self.modal = Some(Modal::Restore(Box::new(offer))),
            Ok(None) => {}
            Err(e) => {
                self.modal = Some(Modal::Error(format!(
                    "A recovery copy exists but cannot be read; it is left in place.\n{e}"
                )));
            }
        }
    }

    /// Writes a recovery copy when one is needed at `now`: at once after a committed value
    /// (Enter or Tab in a field, a field left, any applied change that is not a keystroke in a
    /// field), otherwise about a second after the first keystroke not yet copied. The window
    /// calls this at the end of every frame, so a committed value is on disk before the frame
    /// ends. Returns when the next copy falls due.
    pub fn autosave_tick(&mut self, now: std::time::Instant) -> Option<std::time::Instant> {
        let rev = self.history.revision();
        let committed = std::mem::take(&mut self.committed);
        if !self.history.is_dirty() {
            self.debouncer.settled(rev);
            return None;
        }
        let store = self.recovery.as_ref()?;
        let due = if committed {
            self.debouncer.needs_copy(rev)
        } else {
            self.debouncer.poll(rev, now)
        };
        if due {
            let at = (self.clock)();
            match store.write(self.path.as_deref(), self.history.project(), rev, &at) {
                Ok(_) => self.debouncer.written(rev),
                Err(e) => {
                    self.debouncer.failed(now);
                    self.notice = Some(format!("The recovery copy could not be written: {e}"));
                }
            }
        }
        self.debouncer.deadline()
    }

    /// Computes searches and analyses on worker threads (`true`, as the window does) or in the
    /// frame that needs them (`false`, the default of [`Self::new_for_test`]).
    pub fn set_background_compute(&mut self, on: bool) {
        self.inline_compute = !on;
        self.panes.design.compute = if on {
            Compute::Background
        } else {
            Compute::Inline
        };
    }

    /// Replaces the source of file-dialog answers (tests use [`FilePicker::Fixed`]).
    pub fn set_file_picker(&mut self, picker: FilePicker) {
        self.picker = picker;
    }

    /// Whether an export is still running on its worker thread.
    pub fn export_running(&self) -> bool {
        self.export.is_some()
    }

    /// The message in the status bar, if any.
    pub fn notice(&self) -> Option<&str> {
        self.notice.as_deref()
    }

    /// Paper of exported pages.
    pub fn set_paper(&mut self, paper: Paper) {
        self.paper = paper;
    }

    /// Starts a file action as the menu does: the dialog (or the test picker), then the action.
    pub fn start_file_action(&mut self, action: FileAction) {
        self.start_dialog(action);
    }

    /// Applies one action of the menus, the shortcuts, the panes or a question, as the window
    /// does after drawing a frame: the one place where they change the window's state.
    pub fn act(&mut self, action: AppAction) {
        let step = self.step;
        self.act_inner(action);
        if self.step != step {
            self.focus.step_changed();
        }
    }

    fn act_inner(&mut self, action: AppAction) {
        match action {
            AppAction::Command(cmd) => self.apply(cmd),
            AppAction::Undo => self.undo(),
            AppAction::Redo => self.redo(),
            AppAction::Request(after) => self.request(after),
            AppAction::Save => self.save(),
            AppAction::File(file) => self.start_dialog(file),
            AppAction::ToggleTheme => self.theme = self.theme.toggled(),
            AppAction::ShowSafety => self.modal = Some(Modal::Safety),
            AppAction::SetPaper(paper) => self.paper = paper,
            AppAction::SetPageFormat(ext) => self.page_ext = ext,
            AppAction::CancelExport => {
                if let Some((_, job)) = &self.export {
                    job.cancel();
                }
            }
            AppAction::Answer(answer) => self.answer(answer),
        }
    }

    /// The current project.
    pub fn project(&self) -> &Project {
        self.history.project()
    }

    /// The project history (undo, redo, dirty flag).
    pub fn history(&self) -> &History {
        &self.history
    }

    /// The file the project was opened from or saved to.
    pub fn path(&self) -> Option<&Path> {
        self.path.as_deref()
    }

    /// The step shown.
    pub fn step(&self) -> Step {
        self.step
    }

    /// Shows another step; its first control takes the keyboard.
    pub fn set_step(&mut self, step: Step) {
        if self.step != step {
            self.focus.step_changed();
        }
        self.step = step;
    }

    /// The question or message shown over the window, if any.
    pub fn modal(&self) -> Option<&Modal> {
        self.modal.as_ref()
    }

    /// The response shown in the analysis panes.
    pub fn response(&self) -> Option<usize> {
        self.response
    }

    /// The window title: project name, file name and the unsaved marker.
    pub fn title(&self) -> String {
        let p = self.project();
        let name = if p.name.trim().is_empty() {
            "Untitled"
        } else {
            p.name.trim()
        };
        let file = self
            .path
            .as_ref()
            .and_then(|p| p.file_name())
            .map(|f| format!(" ({})", f.to_string_lossy()))
            .unwrap_or_default();
        let dirty = if self.history.is_dirty() { "• " } else { "" };
        format!("{dirty}{name}{file} — Twofold")
    }

    /// Recomputes derived data when the revision changed, and keeps the response choice valid.
    pub(super) fn refresh(&mut self) {
        let rev = self.history.revision();
        if self.derived.revision != rev {
            self.derived = Derived::of(self.history.project(), rev);
        }
        let n = self.project().responses.len();
        self.response = match self.response {
            _ if n == 0 => None,
            Some(r) if r < n => Some(r),
            _ => Some(0),
        };
    }

    /// Draws the whole window into `ui` and applies what the engineer did.
    ///
    /// Drawing only reads the window's state: the menus, shortcuts, panes and questions push
    /// [`AppAction`]s, applied by [`Self::act`] once the frame is drawn.
    pub fn ui_in(&mut self, ui: &mut Ui) {
        let ctx = ui.ctx().clone();
        if self.applied_theme.is_none() {
            theme::install_fonts(&ctx);
        }
        if self.applied_theme != Some(self.theme) {
            theme::apply(&ctx, self.theme);
            self.applied_theme = Some(self.theme);
        }
        if self.ctx.is_none() {
            self.ctx = Some(ctx.clone());
        }
        self.poll_dialog();
        self.poll_export();
        let current = match self.response {
            Some(r) if self.step.is_analysis() => self.analysis.ensure(
                self.history.project(),
                self.history.revision(),
                r,
                self.inline_compute,
                &ctx,
            ),
            _ => false,
        };
        if self.step == Step::Predict {
            self.decision.ensure(
                self.history.project(),
                self.history.revision(),
                &self.analysis.cache,
                self.inline_compute,
                &ctx,
            );
        }
        let mut actions = Vec::new();
        self.shortcuts(&ctx, &mut actions);
        let pal = Palette::of(self.theme);
        self.top_bar(ui, &pal, &mut actions);
        self.status_bar(ui, &pal, &mut actions);
        self.step_rail(ui, &pal, &mut actions);
        let now = (self.clock)();
        let mut cmds = Vec::new();
        let content = egui::CentralPanel::default().show(ui, |ui| {
            let Self {
                history,
                step,
                response,
                panes,
                derived,
                analysis,
                decision,
                ..
            } = self;
            let view = View {
                project: history.project(),
                revision: history.revision(),
                problems: &derived.problems,
                response: *response,
                results: analysis
                    .results
                    .as_deref()
                    .filter(|res| Some(res.response) == *response),
                results_current: current,
                decision: decision
                    .decision
                    .as_ref()
                    .map(|(rev, d)| (*rev, d.as_ref())),
                pal,
                now: &now,
            };
            if step.is_analysis() {
                menus::step_heading(ui, *step, &view);
                menus::response_picker(ui, &view, &mut cmds);
                if response.is_some() && !current {
                    ui.horizontal(|ui| {
                        // No spinner: it repaints every frame, which on two cores without
                        // a GPU takes time from the computation it waits for.
                        ui.label(if view.results.is_some() {
                            "Updating the analysis for the latest values…"
                        } else {
                            "Computing the analysis…"
                        });
                    });
                    // No analysis yet: nothing to draw or focus until it comes.
                    view.results?;
                }
            }
            // The panes keep their own view state (drafts, scroll, searches); the project
            // changes only through the commands they return.
            panes.get(*step).ui(ui, &view, &mut cmds);
            Some(ui.layer_id())
        });
        if let Some(layer) = content.inner
            && self.modal.is_none()
        {
            self.focus.after_content(&ctx, layer, content.response.rect);
        }
        actions.extend(cmds.into_iter().map(AppAction::Command));
        for action in actions.drain(..) {
            self.act(action);
        }
        // The question is drawn after the frame's actions, so one they raise shows at once; its
        // answer is applied after it is drawn, like every other action.
        self.modals(&ctx, &pal, &mut actions);
        for action in actions {
            self.act(action);
        }
        // Leaving a field (Tab, Enter, a click elsewhere) commits what was typed in it.
        let focused = ctx.memory(|m| m.focused());
        if focused != self.focus_seen {
            self.focus_seen = focused;
            self.committed = true;
        }
        let now = std::time::Instant::now();
        if let Some(due) = self.autosave_tick(now) {
            ctx.request_repaint_after(due.saturating_duration_since(now));
        }
        let title = self.title();
        if title != self.sent_title {
            ctx.send_viewport_cmd(egui::ViewportCommand::Title(title.clone()));
            self.sent_title = title;
        }
    }
}

/// `Import 1 value`, `Import 3 values`.
pub(super) fn values_text(verb: &str, n: usize) -> String {
    if n == 1 {
        format!("{verb} 1 value")
    } else {
        format!("{verb} {n} values")
    }
}

/// `2025-03-04T10:22:05Z` → `2025-03-04 10:22 UTC`; other text is shown as it is.
pub(super) fn readable_time(iso: &str) -> String {
    match (iso.get(0..10), iso.get(11..16), iso.ends_with('Z')) {
        (Some(d), Some(t), true) => format!("{d} {t} UTC"),
        _ => iso.to_string(),
    }
}

/// The current time in UTC as ISO-8601 text (`2025-03-04T10:22:05Z`).
pub fn now_iso() -> String {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs())
        .unwrap_or(0);
    iso_from_unix(secs)
}

/// ISO-8601 text of a Unix time, from the days-to-civil algorithm of H. Hinnant,
/// "chrono-Compatible Low-Level Date Algorithms" (2013).
pub fn iso_from_unix(secs: u64) -> String {
    let days = (secs / 86_400) as i64;
    let rem = secs % 86_400;
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = if m <= 2 { y + 1 } else { y };
    format!(
        "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}Z",
        rem / 3600,
        (rem % 3600) / 60,
        rem % 60
    )
}

impl eframe::App for TwofoldApp {
    fn ui(&mut self, ui: &mut Ui, _frame: &mut eframe::Frame) {
        let ctx = ui.ctx().clone();
        if ctx.input(|i| i.viewport().close_requested())
            && !self.quit_confirmed
            && self.history.is_dirty()
        {
            ctx.send_viewport_cmd(egui::ViewportCommand::CancelClose);
            self.modal = Some(Modal::Unsaved(AfterUnsaved::Quit));
        }
        self.ui_in(ui);
        if self.quit_confirmed {
            ctx.send_viewport_cmd(egui::ViewportCommand::Close);
        }
        // An open file dialog needs no polling: its job wakes the window when it answers.
    }
}

/// Opens the window on `path`, or on the embedded demo project; returns the process exit code.
pub fn run_window(path: Option<PathBuf>) -> i32 {
    let mut app = match &path {
        Some(p) => match load_project(p) {
            Ok(project) => {
                TwofoldApp::with(History::new(project), Some(p.clone()), FilePicker::Native)
            }
            Err(e) => {
                eprintln!("error: cannot open {}: {e}", p.display());
                return 1;
            }
        },
        None => TwofoldApp::with(
            History::new(twofold_study::project::demo_project()),
            None,
            FilePicker::Native,
        ),
    };
    app.recovery = RecoveryStore::for_user();
    app.offer_recovery();
    app.recent_store = RecentFiles::default_file();
    if let Some(store) = &app.recent_store {
        // An unreadable list of recent files only costs the engineer a few clicks.
        app.recent = RecentFiles::load(store).unwrap_or_default();
    }
    let options = eframe::NativeOptions {
        viewport: egui::ViewportBuilder::default()
            .with_title(app.title())
            .with_inner_size([1360.0, 860.0])
            .with_min_inner_size([900.0, 600.0]),
        renderer: eframe::Renderer::Glow,
        ..Default::default()
    };
    match eframe::run_native("Twofold", options, Box::new(|_cc| Ok(Box::new(app)))) {
        Ok(()) => 0,
        Err(e) => {
            eprintln!("error: the window could not start: {e}");
            1
        }
    }
}

#[cfg(test)]
mod tests {
    use super::dialogs::file_stem;
    use super::*;

    #[test]
    fn unix_times_print_as_iso_dates() {
        // Known instants: the epoch, and 2000-03-01 (after a century leap day).
        assert_eq!(iso_from_unix(0), "1970-01-01T00:00:00Z");
        assert_eq!(iso_from_unix(951_868_800), "2000-03-01T00:00:00Z");
        assert_eq!(iso_from_unix(1_709_210_096), "2024-02-29T12:34:56Z");
        assert_eq!(
            readable_time("2024-02-29T12:34:56Z"),
            "2024-02-29 12:34 UTC"
        );
        assert_eq!(readable_time("yesterday"), "yesterday");
    }

    #[test]
    fn answers_apply_only_to_the_question_they_answer() {
        // Common practice, no source: an answer meant for another question changes nothing.
        let mut app = TwofoldApp::new_for_test(Project::new("Saved"));
        let mut copy = Project::new("Recovered");
        copy.description = "typed before the crash".into();
        app.modal = Some(Modal::Restore(Box::new(RecoveryOffer {
            path: PathBuf::from("copy.ron"),
            project: copy.clone(),
            written_at: "2025-01-01T08:59:00Z".into(),
            modified: None,
        })));
        app.act(AppAction::Answer(ModalAnswer::DiscardChanges));
        assert!(matches!(app.modal(), Some(Modal::Restore(_))));
        assert_eq!(app.project().name, "Saved");
        // Restoring takes the copy out of the closed question: one undoable step.
        app.act(AppAction::Answer(ModalAnswer::RestoreCopy));
        assert!(app.modal().is_none());
        assert_eq!(app.project(), &copy);
        app.undo();
        assert_eq!(app.project().name, "Saved");
    }

    #[test]
    fn menu_actions_change_nothing_until_applied() {
        let mut app = TwofoldApp::new_for_test(Project::new("Paper"));
        app.act(AppAction::SetPaper(Paper::Letter));
        assert_eq!(app.paper, Paper::Letter);
        app.act(AppAction::ShowSafety);
        assert_eq!(app.modal(), Some(&Modal::Safety));
        app.act(AppAction::Answer(ModalAnswer::Close));
        assert!(app.modal().is_none());
    }

    #[test]
    fn file_names_come_from_project_names() {
        assert_eq!(file_stem("Gloss trial / May"), "Gloss-trial-May");
        assert_eq!(
            file_stem("Powder-coating cure (demo)"),
            "Powder-coating-cure-demo"
        );
        assert_eq!(file_stem("  "), "project");
    }
}
