//! The desktop window: a thin shell around the project history, the panes and the file dialogs.
//!
//! Each frame: keyboard shortcuts are read, the panes draw the project and return [`Command`]s,
//! and then [`TwofoldApp::apply`] changes the project in one place (undoable). Derived data
//! (validation problems, analysis) is recomputed only when the project's revision changes.
//!
//! [`TwofoldApp::new_for_test`] builds the same state without a window, file dialogs or files on
//! disk, and [`TwofoldApp::ui_in`] draws it into any `Ui`, so tests drive the real window code.

use std::path::{Path, PathBuf};
use std::sync::mpsc::{Receiver, channel};
use std::sync::{Arc, Mutex};

use egui::{Key, KeyboardShortcut, Modifiers, RichText, Ui};

use crate::panels::design::{Compute, DesignPane};
use crate::panels::effects::EffectsPane;
use crate::panels::factors::FactorsPane;
use crate::panels::interactions::PlotsPane;
use crate::panels::model::ModelPane;
use crate::panels::prediction::PredictionPane;
use crate::panels::residuals::ResidualsPane;
use crate::panels::run_sheet::RunSheetPane;
use crate::panels::{Command, Pane, Step, View};
use crate::theme::{self, Palette, ThemeChoice};
use twofold_study::export::{BuildOptions, ExportJob, Paper};
use twofold_study::interchange::ImportPlan;
use twofold_study::project::{
    DesignSettings, Edit, History, Problem, Project, RecentFiles, RecoveryDebouncer, RecoveryOffer,
    RecoveryStore, Severity,
};
use twofold_study::report::Report;
use twofold_study::report::ReportCache;

/// Short caution about working with real processes, reachable from the Help menu and the status
/// bar.
pub const SAFETY_NOTE: &str = "Stay inside the safe operating limits of your equipment and \
materials. The levels you plan here are suggestions for an experiment, not approved settings: \
confirm with the people responsible before changing a production process, and follow local codes, \
site rules and licensed practice. A warning about a safe range is only as good as the range you \
declared.";

/// Which file dialog is open, and what its answer is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileAction {
    /// Pick a project to open.
    Open,
    /// Pick where to save the project.
    SaveAs,
    /// Pick where to write the summary page of the shown response (PNG, SVG or PDF).
    ExportSummary,
    /// Pick where to write the blank run sheet for the bench (PNG, SVG or PDF).
    PrintRunSheet,
    /// Pick where to write the run sheet as CSV.
    ExportCsv,
    /// Pick a CSV file to import response values from.
    ImportCsv,
}

impl FileAction {
    /// Title and button word of the typed-path question.
    fn words(self) -> (&'static str, &'static str) {
        match self {
            FileAction::Open => ("Open a project", "Open"),
            FileAction::SaveAs => ("Save the project", "Save"),
            FileAction::ExportSummary => ("Export the summary page", "Export"),
            FileAction::PrintRunSheet => ("Write the printable run sheet", "Write"),
            FileAction::ExportCsv => ("Export the run sheet as CSV", "Export"),
            FileAction::ImportCsv => ("Import values from a CSV file", "Read"),
        }
    }

    /// Whether the answer names a file to read (rather than one to write).
    fn reads(self) -> bool {
        matches!(self, FileAction::Open | FileAction::ImportCsv)
    }

    /// The extension given to a typed or chosen name that has none.
    fn default_extension(self, paper_ext: &str) -> String {
        match self {
            FileAction::Open | FileAction::SaveAs => "ron".into(),
            FileAction::ExportSummary | FileAction::PrintRunSheet => paper_ext.into(),
            FileAction::ExportCsv | FileAction::ImportCsv => "csv".into(),
        }
    }
}

/// Where file dialogs come from.
pub enum FilePicker {
    /// Native dialogs on a worker thread, so the window keeps drawing.
    Native,
    /// A fixed answer given at once (tests): the path, or `None` for "cancelled".
    Fixed(Option<PathBuf>),
}

/// A native dialog's answer and how long it was open.
type DialogAnswer = (Option<PathBuf>, std::time::Duration);

/// A dialog that answers "cancelled" faster than this was never shown: there is no dialog
/// service on this desktop, so the window asks for a typed path instead.
const NO_DIALOG_WITHIN: std::time::Duration = std::time::Duration::from_millis(400);

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

/// Fields whose consecutive edits (keystrokes in one field) merge into one undo step.
#[derive(Debug, Clone, PartialEq, Eq)]
enum CoalesceKey {
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

/// Everything derived from one revision of the project, computed once per change.
struct Derived {
    revision: u64,
    problems: Vec<Problem>,
}

impl Derived {
    fn of(project: &Project, revision: u64) -> Derived {
        Derived {
            revision,
            problems: project.validate(),
        }
    }
}

/// Where a worker thread hands over a finished report.
type ReportReceiver = Receiver<Arc<Report>>;

/// The analysis of one response, computed once per (revision, response) when an analysis step
/// needs it. In the window it runs on a worker thread, because a large sheet with few values can
/// take long, and the sheet must stay responsive while the engineer types; the last finished
/// result stays on screen, marked as updating, until the new one arrives.
#[derive(Default)]
struct AnalysisSlot {
    results: Option<Arc<Report>>,
    pending: Option<((u64, usize), ReportReceiver)>,
    /// The shared analysis cache: going back with undo finds the earlier analysis there. Only the
    /// one worker (or, in tests, the frame) locks it, never the drawing.
    cache: Arc<Mutex<ReportCache>>,
}

/// The report of `response` at `revision`, from the report cache.
fn cached_results(
    cache: &Mutex<ReportCache>,
    project: &Project,
    revision: u64,
    response: usize,
) -> Arc<Report> {
    // A poisoned lock only means an earlier computation panicked; the entries are still sound.
    let mut cache = cache
        .lock()
        .unwrap_or_else(std::sync::PoisonError::into_inner);
    cache.get(project, revision, response)
}

impl AnalysisSlot {
    /// Makes sure the analysis of `response` at `revision` is done or under way. Returns whether
    /// the shown results are current.
    fn ensure(
        &mut self,
        project: &Project,
        revision: u64,
        response: usize,
        inline: bool,
        ctx: &egui::Context,
    ) -> bool {
        let want = (revision, response);
        let have =
            |r: &Option<Arc<Report>>| r.as_ref().map(|x| (x.revision, x.response)) == Some(want);
        if have(&self.results) {
            return true;
        }
        if inline {
            self.results = Some(cached_results(&self.cache, project, revision, response));
            return true;
        }
        if let Some((_, rx)) = &self.pending {
            match rx.try_recv() {
                Ok(r) => {
                    self.results = Some(r);
                    self.pending = None;
                }
                Err(std::sync::mpsc::TryRecvError::Empty) => {}
                Err(std::sync::mpsc::TryRecvError::Disconnected) => self.pending = None,
            }
        }
        if have(&self.results) {
            return true;
        }
        // One computation at a time (two cores, shared): a stale one finishes first, then the
        // latest data is analysed.
        if self.pending.is_none() {
            let (tx, rx) = channel();
            let project = project.clone();
            let repaint = ctx.clone();
            let cache = Arc::clone(&self.cache);
            std::thread::spawn(move || {
                // A fault in the mathematics must not leave the pane waiting for ever (or
                // restart the same computation again and again): it becomes the shown reason.
                let result = std::panic::catch_unwind(|| {
                    cached_results(&cache, &project, revision, response)
                })
                .unwrap_or_else(|_| {
                    Arc::new(Report::unavailable(
                        &project,
                        revision,
                        response,
                        "the analysis stopped with an internal error (please report it)",
                    ))
                });
                let _ = tx.send(result);
                repaint.request_repaint();
            });
            self.pending = Some((want, rx));
        }
        ctx.request_repaint_after(std::time::Duration::from_millis(200));
        false
    }
}

/// The panes, one per step.
#[derive(Default)]
struct Panes {
    factors: FactorsPane,
    design: DesignPane,
    runs: RunSheetPane,
    effects: EffectsPane,
    model: ModelPane,
    plots: PlotsPane,
    residuals: ResidualsPane,
    predict: PredictionPane,
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
            Step::Residuals => &mut self.residuals,
            Step::Predict => &mut self.predict,
        }
    }
}

/// What a modal's button does to the window once the modal is closed.
type AfterModal = Box<dyn FnOnce(&mut TwofoldApp)>;

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
    coalesce: Option<(CoalesceKey, u64)>,
    modal: Option<Modal>,
    picker: FilePicker,
    pending_dialog: Option<(FileAction, Receiver<DialogAnswer>)>,
    recent: RecentFiles,
    recent_store: Option<PathBuf>,
    recovery: Option<RecoveryStore>,
    debouncer: RecoveryDebouncer,
    notice: Option<String>,
    sent_title: String,
    clock: fn() -> String,
    quit_confirmed: bool,
    /// Compute searches in the frame (tests) rather than on worker threads.
    inline_compute: bool,
    /// Paper of exported pages.
    paper: Paper,
    /// Format of exported pages when the chosen name has no extension.
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
            coalesce: None,
            modal: None,
            picker,
            pending_dialog: None,
            recent: RecentFiles::default(),
            recent_store: None,
            recovery: None,
            debouncer: RecoveryDebouncer::default(),
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

    /// Writes a recovery copy when one falls due at `now` (about a second after an edit); the
    /// window calls this every frame. Returns when the next copy falls due.
    pub fn autosave_tick(&mut self, now: std::time::Instant) -> Option<std::time::Instant> {
        let rev = self.history.revision();
        if !self.history.is_dirty() {
            self.debouncer.settled(rev);
            return None;
        }
        let store = self.recovery.as_ref()?;
        if self.debouncer.poll(rev, now) {
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

    /// Shows another step.
    pub fn set_step(&mut self, step: Step) {
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
    fn apply_group(&mut self, edits: Vec<Edit>) -> bool {
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
        self.history.undo();
        self.refresh();
    }

    /// Redoes the last undone step.
    pub fn redo(&mut self) {
        self.coalesce = None;
        self.history.redo();
        self.refresh();
    }

    /// Recomputes derived data when the revision changed, and keeps the response choice valid.
    fn refresh(&mut self) {
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
        let mut cmds = Vec::new();
        self.shortcuts(&ctx);
        let pal = Palette::of(self.theme);
        self.top_bar(ui, &pal);
        self.status_bar(ui, &pal);
        self.step_rail(ui, &pal);
        let now = (self.clock)();
        egui::CentralPanel::default().show(ui, |ui| {
            let Self {
                history,
                step,
                response,
                panes,
                derived,
                analysis,
                inline_compute,
                ..
            } = self;
            let mut current = false;
            if step.is_analysis()
                && let Some(r) = *response
            {
                current = analysis.ensure(
                    history.project(),
                    history.revision(),
                    r,
                    *inline_compute,
                    &ctx,
                );
            }
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
                pal,
                now: &now,
            };
            if step.is_analysis() {
                response_picker(ui, &view, &mut cmds);
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
                    if view.results.is_none() {
                        return;
                    }
                }
            }
            panes.get(*step).ui(ui, &view, &mut cmds);
        });
        self.modals(&ctx, &pal);
        for cmd in cmds {
            self.apply(cmd);
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

    fn shortcuts(&mut self, ctx: &egui::Context) {
        if self.modal.is_some() {
            return;
        }
        let cmd = Modifiers::COMMAND;
        let shift = Modifiers::COMMAND | Modifiers::SHIFT;
        // Most specific first: Ctrl+Shift+Z would also match Ctrl+Z (extra Shift is ignored).
        let (redo, undo, save_as, save, open, new) = ctx.input_mut(|i| {
            let redo = i.consume_shortcut(&KeyboardShortcut::new(shift, Key::Z))
                || i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::Y));
            let undo = i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::Z));
            let save_as = i.consume_shortcut(&KeyboardShortcut::new(shift, Key::S));
            let save = i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::S));
            let open = i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::O));
            let new = i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::N));
            (redo, undo, save_as, save, open, new)
        });
        if redo {
            self.redo();
        } else if undo {
            self.undo();
        }
        if save_as {
            self.start_dialog(FileAction::SaveAs);
        } else if save {
            self.save();
        }
        if open {
            self.request(AfterUnsaved::Open);
        }
        if new {
            self.request(AfterUnsaved::New);
        }
    }

    /// Runs `after` now, or asks first when there are unsaved changes.
    fn request(&mut self, after: AfterUnsaved) {
        if self.history.is_dirty() {
            self.modal = Some(Modal::Unsaved(after));
        } else {
            self.proceed(after);
        }
    }

    fn proceed(&mut self, after: AfterUnsaved) {
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

    fn reset_to(&mut self, history: History, path: Option<PathBuf>) {
        self.history = history;
        self.path = path;
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
    }

    /// Saves to the current file, or asks where when there is none.
    pub fn save(&mut self) {
        match self.path.clone() {
            Some(p) => {
                self.save_to(&p);
            }
            None => self.start_dialog(FileAction::SaveAs),
        }
    }

    /// Saves the project to `path`; on success it becomes the project's file.
    pub fn save_to(&mut self, path: &Path) -> bool {
        match save_project(self.project(), path) {
            Ok(()) => {
                let was = self.path.clone();
                self.history.mark_saved();
                self.debouncer.settled(self.history.revision());
                if let Some(store) = &self.recovery {
                    // The file now holds everything the copies held. A copy that cannot be
                    // removed is harmless: it is offered only while it differs from the file.
                    let _ = store.discard(Some(path));
                    if was.is_none() {
                        let _ = store.discard(None);
                    }
                }
                self.path = Some(path.to_path_buf());
                self.remember(path);
                self.notice = Some(format!("Saved {}", path.display()));
                true
            }
            Err(e) => {
                self.modal = Some(Modal::Error(format!(
                    "Could not save {}: {e}",
                    path.display()
                )));
                false
            }
        }
    }

    /// Opens the project at `path`, replacing the current one (the caller asked about unsaved
    /// changes first).
    pub fn open_path(&mut self, path: &Path) -> bool {
        match load_project(path) {
            Ok(project) => {
                self.reset_to(History::new(project), Some(path.to_path_buf()));
                self.step = if self.project().runs.is_empty() {
                    Step::Factors
                } else {
                    Step::Runs
                };
                self.remember(path);
                self.offer_recovery();
                true
            }
            Err(e) => {
                self.modal = Some(Modal::Error(format!(
                    "Could not open {}: {e}",
                    path.display()
                )));
                false
            }
        }
    }

    fn remember(&mut self, path: &Path) {
        self.recent.push(path);
        if let Some(store) = &self.recent_store {
            // Losing the recent list is harmless; the project itself is never at stake here.
            let _ = self.recent.save(store);
        }
    }

    fn start_dialog(&mut self, action: FileAction) {
        if self.pending_dialog.is_some() {
            return;
        }
        match &self.picker {
            FilePicker::Fixed(answer) => {
                let answer = answer.clone();
                self.finish_dialog(action, answer);
            }
            FilePicker::Native => {
                let (tx, rx) = channel();
                let suggested = self
                    .suggested_path_for(action)
                    .file_name()
                    .map(|f| f.to_string_lossy().into_owned())
                    .unwrap_or_default();
                let dir = self
                    .path
                    .as_ref()
                    .and_then(|p| p.parent())
                    .map(Path::to_path_buf);
                let started = std::time::Instant::now();
                std::thread::spawn(move || {
                    let mut dialog = match action {
                        FileAction::Open | FileAction::SaveAs => {
                            rfd::FileDialog::new().add_filter("Twofold project", &["ron"])
                        }
                        FileAction::ExportSummary | FileAction::PrintRunSheet => {
                            rfd::FileDialog::new()
                                .add_filter("PDF document", &["pdf"])
                                .add_filter("PNG image, 300 dpi", &["png"])
                                .add_filter("SVG drawing", &["svg"])
                        }
                        FileAction::ExportCsv | FileAction::ImportCsv => {
                            rfd::FileDialog::new().add_filter("CSV table", &["csv"])
                        }
                    };
                    if let Some(d) = dir {
                        dialog = dialog.set_directory(d);
                    }
                    let answer = if action.reads() {
                        dialog.pick_file()
                    } else {
                        dialog.set_file_name(suggested).save_file()
                    };
                    // The window may have closed meanwhile; then nobody needs the answer.
                    let _ = tx.send((answer, started.elapsed()));
                });
                self.pending_dialog = Some((action, rx));
            }
        }
    }

    fn poll_dialog(&mut self) {
        let Some((action, rx)) = &self.pending_dialog else {
            return;
        };
        match rx.try_recv() {
            Ok((None, open_for)) if open_for < NO_DIALOG_WITHIN => {
                let action = *action;
                self.pending_dialog = None;
                self.modal = Some(Modal::TypePath {
                    action,
                    text: self.suggested_path_for(action).display().to_string(),
                });
            }
            Ok((answer, _)) => {
                let action = *action;
                self.pending_dialog = None;
                self.finish_dialog(action, answer);
            }
            Err(std::sync::mpsc::TryRecvError::Empty) => {}
            Err(std::sync::mpsc::TryRecvError::Disconnected) => self.pending_dialog = None,
        }
    }

    /// Where a dialog suggests a file: Save as the current file, exports beside it (named after
    /// the project), else in the home folder.
    fn suggested_path_for(&self, action: FileAction) -> PathBuf {
        let stem = file_stem(&self.project().name);
        let name = match action {
            FileAction::Open | FileAction::SaveAs => format!("{stem}.ron"),
            FileAction::ExportSummary => format!("{stem}-summary.{}", self.page_ext),
            FileAction::PrintRunSheet => format!("{stem}-run-sheet.{}", self.page_ext),
            FileAction::ExportCsv | FileAction::ImportCsv => format!("{stem}-runs.csv"),
        };
        match (&self.path, action) {
            (Some(p), FileAction::Open | FileAction::SaveAs) => p.clone(),
            (Some(p), _) => p.with_file_name(name),
            (None, _) => std::env::var_os("HOME")
                .map(PathBuf::from)
                .unwrap_or_default()
                .join(name),
        }
    }

    fn finish_dialog(&mut self, action: FileAction, answer: Option<PathBuf>) {
        let Some(path) = answer else {
            if !action.reads() {
                self.notice = Some("Nothing was written: no file was chosen.".into());
            }
            return;
        };
        let path = if path.extension().is_none() && action != FileAction::Open {
            path.with_extension(action.default_extension(self.page_ext))
        } else {
            path
        };
        match action {
            FileAction::ExportSummary => self.export_summary(path),
            FileAction::PrintRunSheet => self.print_run_sheet(path),
            FileAction::ExportCsv => self.export_csv(&path),
            FileAction::ImportCsv => self.import_csv(&path),
            FileAction::Open => {
                self.open_path(&path);
            }
            FileAction::SaveAs => {
                self.save_to(&path);
            }
        }
    }

    /// Where the window keeps the shown response's analysis, and which goal the prediction pane
    /// has chosen for the best settings.
    fn build_options(&self) -> BuildOptions {
        use crate::panels::prediction::Aim;
        use twofold_core::predict::Goal;
        let predict = &self.panes.predict;
        let goal = match (predict.aim, predict.target) {
            (Aim::Minimise, _) => Goal::Minimise,
            (Aim::Target, Some(t)) => Goal::Target(t),
            _ => Goal::Maximise,
        };
        BuildOptions { date: None, goal }
    }

    /// A closure for export threads that wakes the window when progress changes.
    fn repaint_hook(&self) -> impl Fn() + Send + 'static {
        let ctx = self.ctx.clone();
        move || {
            if let Some(c) = &ctx {
                c.request_repaint();
            }
        }
    }

    /// Starts writing the summary page of the shown response on a worker thread: the analysis
    /// comes from the shared cache (computed there if needed), so the window never waits.
    fn export_summary(&mut self, path: PathBuf) {
        if self.export.is_some() {
            self.notice = Some("An export is still running; wait for it or cancel it.".into());
            return;
        }
        let Some(response) = self.response else {
            self.modal = Some(Modal::Error(
                "There is no response to summarise yet. Add a response and enter values first."
                    .into(),
            ));
            return;
        };
        let project = self.project().clone();
        let revision = self.history.revision();
        let cache = Arc::clone(&self.analysis.cache);
        let options = self.build_options();
        let paper = self.paper;
        let target = path.clone();
        let work: twofold_study::export::job::Work = Box::new(move |progress, cancelled| {
            progress(twofold_study::export::Stage::LayingOut);
            let results =
                std::panic::catch_unwind(|| cached_results(&cache, &project, revision, response))
                    .map_err(|_| {
                    twofold_study::export::ExportError::Render(
                        "the analysis stopped with an internal error (please report it)".into(),
                    )
                })?;
            let input = twofold_study::export::summary_input(&project, &results, &options);
            let page = twofold_study::export::summary_svg(&input, paper);
            twofold_study::export::write_pages(
                &[page],
                paper,
                &target,
                &twofold_study::export::summary_title(&input),
                progress,
                cancelled,
            )
        });
        let job = ExportJob::spawn(work, self.repaint_hook());
        self.export = Some((format!("summary to {}", path.display()), job));
    }

    /// Starts writing the blank run sheet, in run order, on a worker thread.
    fn print_run_sheet(&mut self, path: PathBuf) {
        if self.export.is_some() {
            self.notice = Some("An export is still running; wait for it or cancel it.".into());
            return;
        }
        if self.project().runs.is_empty() {
            self.modal = Some(Modal::Error(
                "There are no runs to print yet. Choose a design first.".into(),
            ));
            return;
        }
        let now = (self.clock)();
        let date = now.get(..10).map(str::to_string);
        let sheet = twofold_study::export::run_sheet_input(self.project(), date);
        let job = ExportJob::run_sheet(sheet, path.clone(), self.paper, self.repaint_hook());
        self.export = Some((format!("run sheet to {}", path.display()), job));
    }

    /// Collects a finished export: a notice on success, the error in plain words otherwise.
    fn poll_export(&mut self) {
        let Some((what, job)) = &mut self.export else {
            return;
        };
        let Some(result) = job.poll() else {
            return;
        };
        let what = what.clone();
        self.export = None;
        match result {
            Ok(report) => {
                let files = report.paths.len();
                self.notice = Some(if files == 1 {
                    format!("Exported the {what} ({} kB).", report.bytes.div_ceil(1024))
                } else {
                    format!(
                        "Exported the {what} as {files} files, one per page ({} kB).",
                        report.bytes.div_ceil(1024)
                    )
                });
            }
            Err(twofold_study::export::ExportError::Cancelled) => {
                self.notice = Some("Export cancelled; no file was written.".into());
            }
            Err(e) => {
                self.modal = Some(Modal::Error(format!("Could not export the {what}: {e}")));
            }
        }
    }

    fn export_csv(&mut self, path: &Path) {
        if self.project().runs.is_empty() {
            self.modal = Some(Modal::Error(
                "There are no runs to export yet. Choose a design first.".into(),
            ));
            return;
        }
        match twofold_study::interchange::write_run_sheet_csv(self.project(), path) {
            Ok(_) => {
                self.notice = Some(format!(
                    "Exported {} runs to {}",
                    self.project().runs.len(),
                    path.display()
                ));
            }
            Err(e) => {
                self.modal = Some(Modal::Error(format!(
                    "Could not write {}: {e}",
                    path.display()
                )));
            }
        }
    }

    /// Reads a CSV file and shows what importing it would change; nothing changes yet.
    fn import_csv(&mut self, path: &Path) {
        let text = match std::fs::read(path) {
            Ok(bytes) => String::from_utf8_lossy(&bytes).into_owned(),
            Err(e) => {
                self.modal = Some(Modal::Error(format!(
                    "Could not read {}: {e}",
                    path.display()
                )));
                return;
            }
        };
        match twofold_study::interchange::plan_import(self.project(), &text) {
            Ok(plan) => {
                self.modal = Some(Modal::ConfirmImport {
                    file: path.display().to_string(),
                    plan: Box::new(plan),
                });
            }
            Err(e) => {
                self.modal = Some(Modal::Error(format!(
                    "Nothing was imported from {}: {e}",
                    path.display()
                )));
            }
        }
    }

    fn top_bar(&mut self, ui: &mut Ui, pal: &Palette) {
        egui::Panel::top("top_bar")
            .frame(
                egui::Frame::new()
                    .fill(ui.visuals().panel_fill)
                    .inner_margin(egui::Margin::symmetric(10, 6)),
            )
            .show(ui, |ui| {
                egui::MenuBar::new().ui(ui, |ui| {
                    ui.label(
                        RichText::new("◧ Twofold")
                            .strong()
                            .size(18.0)
                            .color(pal.accent),
                    );
                    ui.add_space(8.0);
                    self.project_menu(ui);
                    ui.menu_button("Edit", |ui| {
                        if ui
                            .add_enabled(
                                self.history.can_undo(),
                                egui::Button::new("Undo").shortcut_text("Ctrl+Z"),
                            )
                            .clicked()
                        {
                            self.undo();
                        }
                        if ui
                            .add_enabled(
                                self.history.can_redo(),
                                egui::Button::new("Redo").shortcut_text("Ctrl+Shift+Z"),
                            )
                            .clicked()
                        {
                            self.redo();
                        }
                    });
                    ui.menu_button("View", |ui| {
                        let label = match self.theme {
                            ThemeChoice::Light => "Dark theme",
                            ThemeChoice::Dark => "Light theme",
                        };
                        if ui.button(label).clicked() {
                            self.theme = self.theme.toggled();
                        }
                    });
                    ui.menu_button("Help", |ui| {
                        if ui.button("Safety caution").clicked() {
                            self.modal = Some(Modal::Safety);
                        }
                        ui.separator();
                        ui.label("Keys: Ctrl+N new, Ctrl+O open, Ctrl+S save,");
                        ui.label("Ctrl+Shift+S save as, Ctrl+Z undo, Ctrl+Shift+Z redo.");
                        ui.label("Run sheet: Enter stores and moves on, Tab to the next response.");
                    });
                    ui.separator();
                    let name = self.project().name.clone();
                    if let Some(name) = crate::panels::widgets::text_field(
                        ui,
                        egui::Id::unique("project_name"),
                        &name,
                        220.0,
                        "project name",
                    ) {
                        self.apply(Command::Edit(Edit::SetName(name)));
                    }
                    if self.history.is_dirty() {
                        ui.label(RichText::new("• unsaved").color(pal.warn))
                            .on_hover_text("Changes since the last save (a recovery copy is kept)");
                    }
                });
            });
    }

    fn project_menu(&mut self, ui: &mut Ui) {
        ui.menu_button("Project", |ui| {
            if ui
                .add(egui::Button::new("New").shortcut_text("Ctrl+N"))
                .clicked()
            {
                self.request(AfterUnsaved::New);
            }
            if ui
                .add(egui::Button::new("Open…").shortcut_text("Ctrl+O"))
                .clicked()
            {
                self.request(AfterUnsaved::Open);
            }
            ui.menu_button("Open recent", |ui| {
                if self.recent.paths().is_empty() {
                    ui.weak("No recent projects");
                }
                for p in self.recent.paths().to_vec() {
                    if ui.button(p.display().to_string()).clicked() {
                        self.request(AfterUnsaved::OpenPath(p));
                    }
                }
            });
            ui.separator();
            if ui
                .add(egui::Button::new("Save").shortcut_text("Ctrl+S"))
                .clicked()
            {
                self.save();
            }
            if ui
                .add(egui::Button::new("Save as…").shortcut_text("Ctrl+Shift+S"))
                .clicked()
            {
                self.start_dialog(FileAction::SaveAs);
            }
            ui.separator();
            let busy = self.export.is_some();
            if ui
                .add_enabled(!busy, egui::Button::new("Export summary…"))
                .on_hover_text("The one-page summary of the shown response: PDF, PNG (300 dpi) or SVG, by the file name")
                .clicked()
            {
                self.start_dialog(FileAction::ExportSummary);
            }
            if ui
                .add_enabled(!busy, egui::Button::new("Printable run sheet…"))
                .on_hover_text("A blank sheet in run order to fill in at the bench")
                .clicked()
            {
                self.start_dialog(FileAction::PrintRunSheet);
            }
            ui.horizontal(|ui| {
                ui.label("Paper:");
                ui.selectable_value(&mut self.paper, Paper::A4, "A4");
                ui.selectable_value(&mut self.paper, Paper::Letter, "Letter");
            });
            ui.horizontal(|ui| {
                ui.label("Without extension:");
                ui.selectable_value(&mut self.page_ext, "pdf", "PDF");
                ui.selectable_value(&mut self.page_ext, "png", "PNG");
            });
            ui.separator();
            if ui.button("Export run sheet as CSV…").clicked() {
                self.start_dialog(FileAction::ExportCsv);
            }
            if ui
                .button("Import values from CSV…")
                .on_hover_text("Matched by run number; you see what changes before anything does")
                .clicked()
            {
                self.start_dialog(FileAction::ImportCsv);
            }
        });
    }

    fn status_bar(&mut self, ui: &mut Ui, pal: &Palette) {
        egui::Panel::bottom("status_bar")
            .frame(
                egui::Frame::new()
                    .fill(ui.visuals().faint_bg_color)
                    .inner_margin(egui::Margin::symmetric(10, 4)),
            )
            .show(ui, |ui| {
                ui.horizontal(|ui| {
                    let errors = self
                        .derived
                        .problems
                        .iter()
                        .filter(|p| p.severity == Severity::Error)
                        .count();
                    let warnings = self
                        .derived
                        .problems
                        .iter()
                        .filter(|p| p.severity == Severity::Warning)
                        .count();
                    if errors > 0 {
                        ui.colored_label(pal.error, format!("✖ {errors} to fix"));
                    }
                    if warnings > 0 {
                        ui.colored_label(
                            pal.warn,
                            format!(
                                "⚠ {warnings} warning{}",
                                if warnings == 1 { "" } else { "s" }
                            ),
                        )
                        .on_hover_text(
                            self.derived
                                .problems
                                .iter()
                                .filter(|p| p.severity == Severity::Warning)
                                .map(|p| p.message.clone())
                                .collect::<Vec<_>>()
                                .join("\n"),
                        );
                    }
                    if let Some(n) = &self.notice {
                        ui.weak(n);
                    }
                    if self.pending_dialog.is_some() {
                        ui.weak("A file dialog is open…");
                    }
                    if let Some((what, job)) = &self.export {
                        let stage = job.stage();
                        ui.add(
                            egui::ProgressBar::new(job.progress())
                                .desired_width(140.0)
                                .text(stage.label()),
                        );
                        ui.weak(format!("Exporting the {what}"));
                        if ui.small_button("Cancel export").clicked() {
                            job.cancel();
                        }
                    }
                    ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
                        if ui
                            .link(RichText::new("Safety caution").color(pal.warn))
                            .clicked()
                        {
                            self.modal = Some(Modal::Safety);
                        }
                    });
                });
            });
    }

    fn step_rail(&mut self, ui: &mut Ui, pal: &Palette) {
        egui::Panel::left("step_rail")
            .resizable(false)
            .exact_size(170.0)
            .frame(
                egui::Frame::new()
                    .fill(ui.visuals().faint_bg_color)
                    .inner_margin(egui::Margin::symmetric(8, 10)),
            )
            .show(ui, |ui| {
                let p = self.history.project();
                for (i, step) in Step::ALL.iter().enumerate() {
                    let hint = match step {
                        Step::Factors => match p.factors.len() {
                            1 => "1 factor".to_string(),
                            n => format!("{n} factors"),
                        },
                        Step::Design => {
                            if p.runs.is_empty() {
                                "not chosen".into()
                            } else {
                                format!("{} runs", p.runs.len())
                            }
                        }
                        Step::Runs => {
                            let done = p
                                .runs
                                .iter()
                                .filter(|r| r.status == twofold_study::project::RunStatus::Done)
                                .count();
                            if p.runs.is_empty() {
                                "no runs yet".to_string()
                            } else {
                                format!("{done} of {} done", p.runs.len())
                            }
                        }
                        _ => String::new(),
                    };
                    let selected = self.step == *step;
                    let text = RichText::new(format!("{}  {}", i + 1, step.title()))
                        .size(16.0)
                        .color(if selected { pal.accent } else { pal.ink });
                    let resp = ui.add_sized(
                        [ui.available_width(), 30.0],
                        egui::Button::selectable(selected, text),
                    );
                    if resp.clicked() {
                        self.step = *step;
                    }
                    if !hint.is_empty() {
                        ui.label(
                            RichText::new(format!("     {hint}"))
                                .small()
                                .color(pal.muted),
                        );
                    }
                    ui.add_space(2.0);
                }
            });
    }

    fn modals(&mut self, ctx: &egui::Context, pal: &Palette) {
        let Some(modal) = self.modal.clone() else {
            return;
        };
        let mut close = false;
        let mut then: Option<AfterModal> = None;
        let mut typed = match &modal {
            Modal::TypePath { text, .. } => text.clone(),
            _ => String::new(),
        };
        let response = egui::Modal::new(egui::Id::unique("twofold_modal")).show(ctx, |ui| {
            ui.set_max_width(460.0);
            match &modal {
                Modal::ConfirmDesign {
                    design,
                    lost,
                    typed,
                } => {
                    ui.heading("Change the design?");
                    ui.label(format!(
                        "The run sheet holds {typed} typed values. The new design makes a new run sheet; values move to the runs with the same settings."
                    ));
                    if *lost > 0 {
                        ui.colored_label(
                            pal.warn,
                            format!(
                                "{lost} typed values have no matching run in the new design and will leave the sheet. Undo (Ctrl+Z) brings them back."
                            ),
                        );
                    } else {
                        ui.label("Every typed value has a matching run in the new design.");
                    }
                    ui.horizontal(|ui| {
                        if ui.button("Change the design").clicked() {
                            let design = design.clone();
                            then = Some(Box::new(move |app: &mut TwofoldApp| {
                                if app.apply_group(vec![
                                    Edit::SetDesign(design),
                                    Edit::RegenerateRuns,
                                ]) {
                                    app.step = Step::Runs;
                                }
                                app.refresh();
                            }));
                            close = true;
                        }
                        if ui.button("Keep the current design").clicked() {
                            close = true;
                        }
                    });
                }
                Modal::Unsaved(after) => {
                    ui.heading("Save changes first?");
                    ui.label("The project has changes that are not saved to its file.");
                    ui.horizontal(|ui| {
                        if ui.button("Save").clicked() {
                            let after = after.clone();
                            then = Some(Box::new(move |app: &mut TwofoldApp| {
                                if app.path.is_some() {
                                    app.save();
                                    if !app.history.is_dirty() {
                                        app.proceed(after);
                                    }
                                } else {
                                    app.start_dialog(FileAction::SaveAs);
                                }
                            }));
                            close = true;
                        }
                        if ui.button("Discard changes").clicked() {
                            let after = after.clone();
                            then = Some(Box::new(move |app: &mut TwofoldApp| app.proceed(after)));
                            close = true;
                        }
                        if ui.button("Cancel").clicked() {
                            close = true;
                        }
                    });
                }
                Modal::Error(text) => {
                    ui.heading("Something went wrong");
                    ui.label(text);
                    if ui.button("OK").clicked() {
                        close = true;
                    }
                }
                Modal::Restore(offer) => {
                    ui.heading("Restore unsaved work?");
                    ui.label(format!(
                        "A recovery copy of “{}” from {} holds changes that are not in {}.",
                        offer.project.name,
                        readable_time(&offer.written_at),
                        self.path
                            .as_ref()
                            .map_or("any saved file".to_string(), |p| p.display().to_string())
                    ));
                    ui.horizontal(|ui| {
                        if ui.button("Restore the copy").clicked() {
                            let project = offer.project.clone();
                            then = Some(Box::new(move |app: &mut TwofoldApp| {
                                app.history.replace(project);
                                app.refresh();
                            }));
                            close = true;
                        }
                        if ui.button("Discard the copy").clicked() {
                            then = Some(Box::new(|app: &mut TwofoldApp| {
                                if let Some(store) = &app.recovery
                                    && let Err(e) = store.discard(app.path.as_deref())
                                {
                                    app.modal = Some(Modal::Error(e.to_string()));
                                }
                            }));
                            close = true;
                        }
                    });
                }
                Modal::TypePath { action, .. } => {
                    let (title, verb) = action.words();
                    ui.heading(title);
                    ui.label("No file dialog is available on this desktop. Type the full path of the file:");
                    let resp = ui.add(
                        egui::TextEdit::singleline(&mut typed)
                            .desired_width(420.0)
                            .min_size(egui::vec2(420.0, 0.0)),
                    )
                    .accessible_name("file path");
                    let enter = resp.lost_focus() && ui.input(|i| i.key_pressed(Key::Enter));
                    ui.horizontal(|ui| {
                        if (ui.button(verb).clicked() || enter) && !typed.trim().is_empty() {
                            let action = *action;
                            let path = PathBuf::from(typed.trim());
                            then = Some(Box::new(move |app: &mut TwofoldApp| {
                                app.finish_dialog(action, Some(path));
                            }));
                            close = true;
                        }
                        if ui.button("Cancel").clicked() {
                            let action = *action;
                            then = Some(Box::new(move |app: &mut TwofoldApp| {
                                app.finish_dialog(action, None);
                            }));
                            close = true;
                        }
                    });
                }
                Modal::ConfirmImport { file, plan } => {
                    ui.heading("Import values?");
                    ui.label(format!("From {file}:"));
                    ui.label(plan.summary());
                    egui::ScrollArea::vertical()
                        .max_height(260.0)
                        .id_salt("import_preview")
                        .show(ui, |ui| {
                            if !plan.changes.is_empty() {
                                ui.label(RichText::new("What will change").strong());
                            }
                            for c in &plan.changes {
                                let name = self
                                    .project()
                                    .responses
                                    .get(c.response)
                                    .map_or("?", |r| r.name.as_str());
                                let old = if c.old.trim().is_empty() {
                                    "empty".to_string()
                                } else {
                                    format!("“{}”", c.old)
                                };
                                let line = format!(
                                    "Run {} {name}: {old} → “{}”",
                                    c.run_order, c.new
                                );
                                match &c.not_a_number {
                                    Some(reason) => {
                                        ui.colored_label(
                                            pal.warn,
                                            format!("{line} (not a number: {reason})"),
                                        );
                                    }
                                    None => {
                                        ui.label(line);
                                    }
                                }
                            }
                            if !plan.problems.is_empty() {
                                ui.label(RichText::new("Rows not imported").strong());
                            }
                            for p in &plan.problems {
                                ui.colored_label(
                                    pal.error,
                                    format!(
                                        "Line {} (run “{}”): {}",
                                        p.line, p.run, p.reason
                                    ),
                                );
                            }
                        });
                    ui.horizontal(|ui| {
                        let n = plan.changes.len();
                        if ui
                            .add_enabled(n > 0, egui::Button::new(values_text("Import", n)))
                            .clicked()
                        {
                            let plan = plan.clone();
                            then = Some(Box::new(move |app: &mut TwofoldApp| {
                                let at = (app.clock)();
                                if app.apply_group(plan.edits(Some(at))) {
                                    app.notice = Some(format!(
                                        "{} (Ctrl+Z takes the import back).",
                                        values_text("Imported", plan.changes.len())
                                    ));
                                }
                                app.refresh();
                            }));
                            close = true;
                        }
                        if ui.button("Cancel").clicked() {
                            then = Some(Box::new(|app: &mut TwofoldApp| {
                                app.notice = Some("Nothing was imported.".into());
                            }));
                            close = true;
                        }
                    });
                }
                Modal::PasteReport(text) => {
                    ui.heading("Pasted, with cells to check");
                    ui.label(text);
                    ui.label("The cells are marked in the run sheet; Ctrl+Z takes the paste back.");
                    if ui.button("OK").clicked() {
                        close = true;
                    }
                }
                Modal::Safety => {
                    ui.heading("Safety caution");
                    ui.label(SAFETY_NOTE);
                    if ui.button("Close").clicked() {
                        close = true;
                    }
                }
            }
        });
        // Questions need an answer; messages close by clicking beside them.
        if response.should_close()
            && matches!(
                modal,
                Modal::Error(_) | Modal::Safety | Modal::PasteReport(_)
            )
        {
            close = true;
        }
        if close {
            self.modal = None;
        } else if let Some(Modal::TypePath { text, .. }) = &mut self.modal {
            *text = typed;
        }
        if let Some(f) = then {
            f(self);
        }
    }
}

fn response_picker(ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
    let p = view.project;
    if p.responses.len() < 2 {
        return;
    }
    ui.horizontal(|ui| {
        ui.label("Response:");
        for (i, r) in p.responses.iter().enumerate() {
            if ui
                .selectable_label(view.response == Some(i), &r.name)
                .clicked()
            {
                out.push(Command::SelectResponse(i));
            }
        }
    });
    ui.separator();
}

/// `Import 1 value`, `Import 3 values`.
fn values_text(verb: &str, n: usize) -> String {
    if n == 1 {
        format!("{verb} 1 value")
    } else {
        format!("{verb} {n} values")
    }
}

/// A file name from a project name: letters and digits kept, every other run of characters
/// becomes one `-` (`Gloss trial / May` → `Gloss-trial-May`).
fn file_stem(name: &str) -> String {
    let mut out = String::new();
    for c in name.trim().chars() {
        if c.is_alphanumeric() || c == '_' {
            out.push(c);
        } else if !out.is_empty() && !out.ends_with('-') {
            out.push('-');
        }
    }
    let out = out.trim_end_matches('-').to_string();
    if out.is_empty() {
        "project".into()
    } else {
        out
    }
}

fn save_project(project: &Project, path: &Path) -> Result<(), String> {
    twofold_study::project::save_project(path, project).map_err(|e| e.to_string())
}

fn load_project(path: &Path) -> Result<Project, String> {
    twofold_study::project::load_project(path).map_err(|e| e.to_string())
}

/// `2025-03-04T10:22:05Z` → `2025-03-04 10:22 UTC`; other text is shown as it is.
fn readable_time(iso: &str) -> String {
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
        if self.pending_dialog.is_some() {
            // Keep polling the dialog thread while it is open.
            ctx.request_repaint_after(std::time::Duration::from_millis(100));
        }
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
    fn file_names_come_from_project_names() {
        assert_eq!(file_stem("Gloss trial / May"), "Gloss-trial-May");
        assert_eq!(
            file_stem("Powder-coating cure (demo)"),
            "Powder-coating-cure-demo"
        );
        assert_eq!(file_stem("  "), "project");
    }
}
