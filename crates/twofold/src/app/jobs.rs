//! Work the window hands to background jobs and collects each frame: the analysis of the shown
//! response, and the exports (summary page, run sheet).

use std::path::PathBuf;
use std::sync::{Arc, Mutex};

use twofold_study::export::{BuildOptions, ExportJob};
use twofold_study::jobs::{Control, Job};
use twofold_study::project::Project;
use twofold_study::report::{DecideOptions, Decision, Report, ReportCache, decide};

use super::{Modal, TwofoldApp};

/// Which report a job is making: (revision, response).
type ReportFor = (u64, usize);

/// The analysis of one response, computed once per (revision, response) when an analysis step
/// needs it. In the window it runs on a worker thread, because a large sheet with few values can
/// take long, and the sheet must stay responsive while the engineer types; the last finished
/// result stays on screen, marked as updating, until the new one arrives.
#[derive(Default)]
pub(super) struct AnalysisSlot {
    pub(super) results: Option<Arc<Report>>,
    pending: Option<(ReportFor, Job<Arc<Report>>)>,
    /// The shared analysis cache: going back with undo finds the earlier analysis there. Only the
    /// one worker (or, in tests, the frame) locks it, never the drawing.
    pub(super) cache: Arc<Mutex<ReportCache>>,
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
    pub(super) fn ensure(
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
        if let Some(((revision, response), job)) = &mut self.pending
            && let Some(result) = job.poll()
        {
            // A fault in the mathematics must not leave the pane waiting for ever (or restart
            // the same computation again and again): it becomes the shown reason.
            let results = result.unwrap_or_else(|e| {
                Arc::new(Report::unavailable(
                    project,
                    *revision,
                    *response,
                    &e.to_string(),
                ))
            });
            self.results = Some(results);
            self.pending = None;
        }
        if have(&self.results) {
            return true;
        }
        // One computation at a time (two cores, shared): a stale one finishes first, then the
        // latest data is analysed.
        if self.pending.is_none() {
            let project = project.clone();
            let repaint = ctx.clone();
            let cache = Arc::clone(&self.cache);
            let job = Job::start(
                "analysis",
                move |_: &Control| cached_results(&cache, &project, revision, response),
                move || repaint.request_repaint(),
            );
            self.pending = Some((want, job));
        }
        ctx.request_repaint_after(std::time::Duration::from_millis(200));
        false
    }
}

/// The answer of "Which settings to run?" for every response's goal, computed once per revision
/// while that step shows: every response's report from the shared cache, then the one decision.
/// On a worker thread in the window, in the frame in tests, as for [`AnalysisSlot`].
#[derive(Default)]
pub(super) struct DecisionSlot {
    pub(super) decision: Option<(u64, Arc<Decision>)>,
    pending: Option<(u64, Job<Arc<Decision>>)>,
}

fn decide_all(cache: &Mutex<ReportCache>, project: &Project, revision: u64) -> Arc<Decision> {
    let reports: Vec<Arc<Report>> = (0..project.responses.len())
        .map(|response| cached_results(cache, project, revision, response))
        .collect();
    let refs: Vec<&Report> = reports.iter().map(AsRef::as_ref).collect();
    Arc::new(decide(project, &refs, &DecideOptions::default()))
}

impl DecisionSlot {
    /// Makes sure the decision at `revision` is done or under way; returns whether the shown one
    /// is current.
    pub(super) fn ensure(
        &mut self,
        project: &Project,
        revision: u64,
        cache: &Arc<Mutex<ReportCache>>,
        inline: bool,
        ctx: &egui::Context,
    ) -> bool {
        if self.decision.as_ref().is_some_and(|(r, _)| *r == revision) {
            return true;
        }
        if inline {
            self.decision = Some((revision, decide_all(cache, project, revision)));
            return true;
        }
        if let Some((rev, job)) = &mut self.pending
            && let Some(result) = job.poll()
        {
            if let Ok(d) = result {
                self.decision = Some((*rev, d));
            }
            self.pending = None;
        }
        if self.decision.as_ref().is_some_and(|(r, _)| *r == revision) {
            return true;
        }
        if self.pending.is_none() {
            let project = project.clone();
            let repaint = ctx.clone();
            let cache = Arc::clone(cache);
            let job = Job::start(
                "settings",
                move |_: &Control| decide_all(&cache, &project, revision),
                move || repaint.request_repaint(),
            );
            self.pending = Some((revision, job));
        }
        ctx.request_repaint_after(std::time::Duration::from_millis(200));
        false
    }
}

impl TwofoldApp {
    /// Options of the summary: the goal the prediction pane has chosen is for the shown response
    /// (the others are maximised).
    fn build_options(&self) -> BuildOptions {
        use crate::panels::prediction::Aim;
        use twofold_core::predict::Goal;
        let predict = &self.panes.predict;
        let goal = match (predict.aim, predict.target) {
            (Aim::Minimise, _) => Goal::Minimise,
            (Aim::Target, Some(t)) => Goal::Target(t),
            _ => Goal::Maximise,
        };
        BuildOptions {
            date: None,
            goal,
            goal_response: self.response,
        }
    }

    /// A closure for export threads that wakes the window when progress changes.
    pub(super) fn repaint_hook(&self) -> impl Fn() + Send + 'static {
        let ctx = self.ctx.clone();
        move || {
            if let Some(c) = &ctx {
                c.request_repaint();
            }
        }
    }

    /// Starts writing the summary (a page per response, then any pages of more detail) on a
    /// worker thread: each response's report comes from the shared cache (computed there if
    /// needed), so the window never waits.
    pub(super) fn export_summary(&mut self, path: PathBuf) {
        if self.export.is_some() {
            self.notice = Some("An export is still running; wait for it or cancel it.".into());
            return;
        }
        if self.response.is_none() || self.project().responses.is_empty() {
            self.modal = Some(Modal::Error(
                "There is no response to summarise yet. Add a response and enter values first."
                    .into(),
            ));
            return;
        }
        let project = self.project().clone();
        let revision = self.history.revision();
        let cache = Arc::clone(&self.analysis.cache);
        let options = self.build_options();
        let paper = self.paper;
        // A panic in the analysis is caught by the job and reported as the export's error.
        let input = move || {
            let reports: Vec<Arc<Report>> = (0..project.responses.len())
                .map(|response| cached_results(&cache, &project, revision, response))
                .collect();
            let refs: Vec<&Report> = reports.iter().map(AsRef::as_ref).collect();
            twofold_study::export::summary_input(&project, &refs, &options)
        };
        let job = ExportJob::summary_of(input, path.clone(), paper, self.repaint_hook());
        self.export = Some((format!("summary to {}", path.display()), job));
    }

    /// Starts writing the blank run sheet, in run order, on a worker thread.
    pub(super) fn print_run_sheet(&mut self, path: PathBuf) {
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
    pub(super) fn poll_export(&mut self) {
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
}
