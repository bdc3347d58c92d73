//! Exports on a worker thread, with progress the window can show.
//!
//! Rendering a 300 dpi page takes a noticeable fraction of a second (longer in a debug build), so
//! the window starts an [`ExportJob`], keeps drawing, shows [`ExportJob::progress`] and collects
//! the result with [`ExportJob::poll`]. The job is handed owned data, so the project can change
//! in the window while the export runs without affecting the file being written.

use std::path::PathBuf;

use crate::jobs::{Control, Job, JobError};

use super::{ExportError, ExportReport, Paper, SummaryInput};

/// Where an export has got to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
#[non_exhaustive]
pub enum Stage {
    /// Not started yet.
    Queued,
    /// Laying out the page.
    LayingOut,
    /// Rendering PNG or PDF.
    Rendering,
    /// Writing the file.
    Writing,
    /// Done (successfully or not: see [`ExportJob::poll`]).
    Finished,
}

impl Stage {
    fn from_u8(v: u8) -> Stage {
        match v {
            0 => Stage::Queued,
            1 => Stage::LayingOut,
            2 => Stage::Rendering,
            3 => Stage::Writing,
            _ => Stage::Finished,
        }
    }

    fn to_u8(self) -> u8 {
        match self {
            Stage::Queued => 0,
            Stage::LayingOut => 1,
            Stage::Rendering => 2,
            Stage::Writing => 3,
            Stage::Finished => 4,
        }
    }

    /// Rough share of the work done when this stage begins, for a progress bar. Rendering is
    /// most of the time, so it spans most of the bar.
    pub fn fraction(self) -> f32 {
        match self {
            Stage::Queued => 0.0,
            Stage::LayingOut => 0.05,
            Stage::Rendering => 0.15,
            Stage::Writing => 0.9,
            Stage::Finished => 1.0,
        }
    }

    /// What the window can print next to the bar.
    pub fn label(self) -> &'static str {
        match self {
            Stage::Queued => "waiting",
            Stage::LayingOut => "laying out the page",
            Stage::Rendering => "rendering",
            Stage::Writing => "writing the file",
            Stage::Finished => "finished",
        }
    }
}

/// The work of a job: it reports stages and checks the cancel flag between them.
pub type Work =
    Box<dyn FnOnce(&dyn Fn(Stage), &dyn Fn() -> bool) -> Result<ExportReport, ExportError> + Send>;

/// An export running on its own thread (a [`Job`] whose steps are [`Stage`]s).
#[derive(Debug)]
pub struct ExportJob {
    job: Job<Result<ExportReport, ExportError>>,
}

impl ExportJob {
    /// Starts `work` on a new thread. `notify` is called after every stage change (the window
    /// passes a closure that requests a repaint, so progress shows without polling in a loop).
    /// A panic in the work becomes [`ExportError::Render`] with the reason in words.
    pub fn spawn(work: Work, notify: impl Fn() + Send + 'static) -> ExportJob {
        let job = Job::start(
            "export",
            move |control: &Control| {
                let report = |s: Stage| control.report(u32::from(s.to_u8()));
                let cancelled = || control.cancelled();
                let result = work(&report, &cancelled);
                control.report(u32::from(Stage::Finished.to_u8()));
                result
            },
            notify,
        );
        ExportJob { job }
    }

    /// Starts exporting the summary of `input` (every page) to `path`.
    pub fn summary(
        input: SummaryInput,
        path: PathBuf,
        paper: Paper,
        notify: impl Fn() + Send + 'static,
    ) -> ExportJob {
        ExportJob::summary_of(move || input, path, paper, notify)
    }

    /// Starts exporting the summary whose input `make_input` gathers on the job's thread (the
    /// window computes the reports there, so it never waits for them): one PDF with all pages,
    /// or one PNG or SVG file per page.
    pub fn summary_of(
        make_input: impl FnOnce() -> SummaryInput + Send + 'static,
        path: PathBuf,
        paper: Paper,
        notify: impl Fn() + Send + 'static,
    ) -> ExportJob {
        ExportJob::pages(
            move || {
                let input = make_input();
                (
                    super::summary_pages(&input, paper),
                    super::summary_title(&input),
                )
            },
            path,
            paper,
            notify,
        )
    }

    /// Starts exporting a blank run sheet.
    pub fn run_sheet(
        sheet: super::run_sheet::RunSheet,
        path: PathBuf,
        paper: Paper,
        notify: impl Fn() + Send + 'static,
    ) -> ExportJob {
        ExportJob::pages(
            move || {
                (
                    super::run_sheet::render_pages(&sheet, paper),
                    super::run_sheet::document_title(&sheet),
                )
            },
            path,
            paper,
            notify,
        )
    }

    /// Starts laying out pages with `lay_out` (the pages as SVG and the document title) on a
    /// new thread, then writing them to `path`.
    fn pages(
        lay_out: impl FnOnce() -> (Vec<String>, String) + Send + 'static,
        path: PathBuf,
        paper: Paper,
        notify: impl Fn() + Send + 'static,
    ) -> ExportJob {
        let work: Work = Box::new(move |progress, cancelled| {
            progress(Stage::LayingOut);
            let (pages, title) = lay_out();
            super::write_pages(&pages, paper, &path, &title, progress, cancelled)
        });
        ExportJob::spawn(work, notify)
    }

    /// The current stage.
    pub fn stage(&self) -> Stage {
        Stage::from_u8(u8::try_from(self.job.step()).unwrap_or(u8::MAX))
    }

    /// Progress from 0 to 1 for a bar.
    pub fn progress(&self) -> f32 {
        self.stage().fraction()
    }

    /// Asks the job to stop; it stops before writing if it has not started writing yet.
    pub fn cancel(&self) {
        self.job.cancel();
    }

    /// The result once the job has finished (returned once; later calls give `None`).
    pub fn poll(&mut self) -> Option<Result<ExportReport, ExportError>> {
        self.job.poll().map(flatten)
    }

    /// Waits for the result (for the command line and tests; the window uses [`ExportJob::poll`]).
    pub fn wait(self) -> Result<ExportReport, ExportError> {
        flatten(self.job.wait())
    }
}

/// A job failure (a panic, no thread) reported as an export error in words.
fn flatten(
    r: Result<Result<ExportReport, ExportError>, JobError>,
) -> Result<ExportReport, ExportError> {
    r.unwrap_or_else(|e| Err(ExportError::Render(e.to_string())))
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::sync::Arc;
    use std::sync::atomic::{AtomicUsize, Ordering};
    use std::sync::mpsc;

    #[test]
    fn job_reports_stages_and_delivers_once() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("s.svg");
        let calls = Arc::new(AtomicUsize::new(0));
        let c = Arc::clone(&calls);
        let mut job = ExportJob::summary(
            SummaryInput::default(),
            path.clone(),
            Paper::A4,
            move || {
                c.fetch_add(1, Ordering::Relaxed);
            },
        );
        let result = loop {
            if let Some(r) = job.poll() {
                break r;
            }
            std::thread::sleep(std::time::Duration::from_millis(5));
        };
        let report = result.unwrap();
        assert_eq!(report.paths, vec![path.clone()]);
        assert!(path.exists());
        assert!(job.poll().is_none());
        assert_eq!(job.stage(), Stage::Finished);
        assert!(calls.load(Ordering::Relaxed) >= 4);
    }

    #[test]
    fn cancelled_job_writes_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("s.pdf");
        let (gate_tx, gate_rx) = mpsc::channel::<()>();
        let target = path.clone();
        let work: Work = Box::new(move |progress, cancelled| {
            // Hold until the test has cancelled, so the order is certain.
            let _ = gate_rx.recv();
            progress(Stage::LayingOut);
            let pages = super::super::summary_pages(&SummaryInput::default(), Paper::A4);
            super::super::write_pages(&pages, Paper::A4, &target, "t", progress, cancelled)
        });
        let job = ExportJob::spawn(work, || {});
        job.cancel();
        gate_tx.send(()).unwrap();
        let err = job.wait().unwrap_err();
        assert!(matches!(err, ExportError::Cancelled));
        assert!(!path.exists());
    }

    #[test]
    fn a_panic_in_an_export_is_an_error_in_words() {
        let work: Work = Box::new(|_progress, _cancelled| panic!("no glyph for the unit"));
        let err = ExportJob::spawn(work, || {}).wait().unwrap_err();
        let text = err.to_string();
        assert!(text.contains("internal error"), "{text}");
        assert!(text.contains("no glyph for the unit"), "{text}");
    }
}
