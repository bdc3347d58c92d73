//! File dialogs and what their answers do: open, save, CSV export and import, and the typed-path
//! question shown when the desktop has no dialog service.

use std::path::{Path, PathBuf};

use twofold_study::jobs::{Control, Job};
use twofold_study::project::{History, Project};

use super::{Modal, Step, TwofoldApp};

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
    pub(super) fn words(self) -> (&'static str, &'static str) {
        match self {
            FileAction::Open => ("Open a project", "Open"),
            FileAction::SaveAs => ("Save the project", "Save"),
            FileAction::ExportSummary => ("Export the summary", "Export"),
            FileAction::PrintRunSheet => ("Write the printable run sheet", "Write"),
            FileAction::ExportCsv => ("Export the run sheet as CSV", "Export"),
            FileAction::ImportCsv => ("Import values from a CSV file", "Read"),
        }
    }

    /// Whether the answer names a file to read (rather than one to write).
    pub(super) fn reads(self) -> bool {
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
pub(super) type DialogAnswer = (Option<PathBuf>, std::time::Duration);

/// A dialog that answers "cancelled" faster than this was never shown: there is no dialog
/// service on this desktop, so the window asks for a typed path instead.
const NO_DIALOG_WITHIN: std::time::Duration = std::time::Duration::from_millis(400);

impl TwofoldApp {
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

    pub(super) fn remember(&mut self, path: &Path) {
        self.recent.push(path);
        if let Some(store) = &self.recent_store {
            // Losing the recent list is harmless; the project itself is never at stake here.
            let _ = self.recent.save(store);
        }
    }

    /// Shows the file dialog for `action` (on a worker thread, so the window keeps drawing), or
    /// takes the test picker's answer at once.
    pub(super) fn start_dialog(&mut self, action: FileAction) {
        if self.pending_dialog.is_some() {
            return;
        }
        match &self.picker {
            FilePicker::Fixed(answer) => {
                let answer = answer.clone();
                self.finish_dialog(action, answer);
            }
            FilePicker::Native => {
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
                let page_ext = self.page_ext;
                let job = Job::start(
                    "file dialog",
                    move |_: &Control| native_dialog(action, dir, suggested, page_ext),
                    self.repaint_hook(),
                );
                self.pending_dialog = Some((action, job));
            }
        }
    }

    /// Collects a dialog's answer: the action, the typed-path question when no dialog could be
    /// shown, or the dialog's failure in words.
    pub(super) fn poll_dialog(&mut self) {
        let Some((action, job)) = &mut self.pending_dialog else {
            return;
        };
        let action = *action;
        let Some(result) = job.poll() else {
            return;
        };
        self.pending_dialog = None;
        match result {
            Ok((None, open_for)) if open_for < NO_DIALOG_WITHIN => {
                self.modal = Some(Modal::TypePath {
                    action,
                    text: self.suggested_path_for(action).display().to_string(),
                });
            }
            Ok((answer, _)) => self.finish_dialog(action, answer),
            Err(e) => {
                // The desktop's dialog failed: the path can still be typed.
                self.notice = Some(format!("No file dialog: {e}"));
                self.modal = Some(Modal::TypePath {
                    action,
                    text: self.suggested_path_for(action).display().to_string(),
                });
            }
        }
    }
    /// The file name a dialog for `action` suggests, with its extension (`Gloss-summary.pdf`).
    pub fn suggested_file_name(&self, action: FileAction) -> String {
        self.suggested_path_for(action)
            .file_name()
            .map(|f| f.to_string_lossy().into_owned())
            .unwrap_or_default()
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

    pub(super) fn finish_dialog(&mut self, action: FileAction, answer: Option<PathBuf>) {
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

    /// Writes the run sheet as CSV to `path`.
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
}

/// Shows the native dialog for `action` and waits for it (on a worker thread).
/// The chosen page format (`page_ext`) is the first filter, matching the suggested name.
fn native_dialog(
    action: FileAction,
    dir: Option<PathBuf>,
    suggested: String,
    page_ext: &str,
) -> DialogAnswer {
    let started = std::time::Instant::now();
    let mut dialog = match action {
        FileAction::Open | FileAction::SaveAs => {
            rfd::FileDialog::new().add_filter("Twofold project", &["ron"])
        }
        FileAction::ExportSummary | FileAction::PrintRunSheet => {
            let pdf = ("PDF document", "pdf");
            let png = ("PNG picture, 300 dpi", "png");
            let (first, second) = if page_ext == "png" {
                (png, pdf)
            } else {
                (pdf, png)
            };
            rfd::FileDialog::new()
                .add_filter(first.0, &[first.1])
                .add_filter(second.0, &[second.1])
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
    (answer, started.elapsed())
}

/// A file name from a project name: letters and digits kept, every other run of characters
/// becomes one `-` (`Gloss trial / May` → `Gloss-trial-May`).
pub(super) fn file_stem(name: &str) -> String {
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

pub(super) fn save_project(project: &Project, path: &Path) -> Result<(), String> {
    twofold_study::project::save_project(path, project).map_err(|e| e.to_string())
}

pub(super) fn load_project(path: &Path) -> Result<Project, String> {
    twofold_study::project::load_project(path).map_err(|e| e.to_string())
}
