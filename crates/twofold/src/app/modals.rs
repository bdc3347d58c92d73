//! Questions and messages over the window: drawn from the window's state without changing it,
//! answered with a [`ModalAnswer`] that [`TwofoldApp::answer`] applies after drawing. The answer
//! takes what it needs (the recovered project, the import plan, the new design) out of the closed
//! question, so nothing large is copied while the question is shown.

use std::path::PathBuf;

use egui::{Key, RichText};

use super::{AppAction, FileAction, Modal, SAFETY_NOTE, TwofoldApp, readable_time, values_text};
use crate::panels::Step;
use crate::theme::Palette;
use twofold_study::project::Edit;

/// The engineer's answer to the question or message shown.
#[must_use = "an answer does nothing until the window applies it"]
#[derive(Debug, Clone, PartialEq)]
pub enum ModalAnswer {
    /// OK, Cancel, Close, or a click beside a message: the question closes, nothing else.
    Close,
    /// Change the design as confirmed.
    ChangeDesign,
    /// Save the unsaved changes, then do what was asked.
    SaveFirst,
    /// Drop the unsaved changes and do what was asked.
    DiscardChanges,
    /// Replace the project with the recovery copy (one undoable step).
    RestoreCopy,
    /// Delete the recovery copy.
    DiscardCopy,
    /// The typed path changed (the question stays open).
    EditPath(String),
    /// Use the typed path for the file action.
    UsePath(PathBuf),
    /// No path: the file action is cancelled.
    CancelPath,
    /// Import the previewed values (one undoable step).
    Import,
    /// Import nothing.
    CancelImport,
}

impl TwofoldApp {
    /// Draws the question or message shown over the window; the engineer's answer is pushed as
    /// an [`AppAction::Answer`] and applied by [`TwofoldApp::answer`] after drawing.
    pub(super) fn modals(&self, ctx: &egui::Context, pal: &Palette, out: &mut Vec<AppAction>) {
        let Some(modal) = &self.modal else {
            return;
        };
        let mut answer = |a: ModalAnswer| out.push(AppAction::Answer(a));
        let response = egui::Modal::new(egui::Id::unique("twofold_modal")).show(ctx, |ui| {
            ui.set_max_width(460.0);
            match modal {
                Modal::ConfirmDesign { lost, typed, .. } => {
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
                            answer(ModalAnswer::ChangeDesign);
                        }
                        if ui.button("Keep the current design").clicked() {
                            answer(ModalAnswer::Close);
                        }
                    });
                }
                Modal::Unsaved(_) => {
                    ui.heading("Save changes first?");
                    ui.label(unsaved_question(self.path.as_deref()));
                    ui.horizontal(|ui| {
                        if ui.button("Save").clicked() {
                            answer(ModalAnswer::SaveFirst);
                        }
                        if ui.button("Discard changes").clicked() {
                            answer(ModalAnswer::DiscardChanges);
                        }
                        if ui.button("Cancel").clicked() {
                            answer(ModalAnswer::Close);
                        }
                    });
                }
                Modal::Error(text) => {
                    ui.heading("Something went wrong");
                    ui.label(text);
                    if ui.button("OK").clicked() {
                        answer(ModalAnswer::Close);
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
                            answer(ModalAnswer::RestoreCopy);
                        }
                        if ui.button("Discard the copy").clicked() {
                            answer(ModalAnswer::DiscardCopy);
                        }
                    });
                }
                Modal::TypePath { action, text } => {
                    let (title, verb) = action.words();
                    let mut typed = text.clone();
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
                            answer(ModalAnswer::UsePath(PathBuf::from(typed.trim())));
                        }
                        if ui.button("Cancel").clicked() {
                            answer(ModalAnswer::CancelPath);
                        }
                    });
                    if typed != *text {
                        answer(ModalAnswer::EditPath(typed));
                    }
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
                            answer(ModalAnswer::Import);
                        }
                        if ui.button("Cancel").clicked() {
                            answer(ModalAnswer::CancelImport);
                        }
                    });
                }
                Modal::PasteReport(text) => {
                    ui.heading("Pasted, with cells to check");
                    ui.label(text);
                    ui.label("The cells are marked in the run sheet; Ctrl+Z takes the paste back.");
                    if ui.button("OK").clicked() {
                        answer(ModalAnswer::Close);
                    }
                }
                Modal::Safety => {
                    ui.heading("Safety caution");
                    ui.label(SAFETY_NOTE);
                    if ui.button("Close").clicked() {
                        answer(ModalAnswer::Close);
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
            answer(ModalAnswer::Close);
        }
    }

    /// Applies the answer to the question shown; an answer that does not fit the question shown
    /// (it changed meanwhile) leaves the question open and changes nothing.
    pub fn answer(&mut self, answer: ModalAnswer) {
        let Some(modal) = self.modal.take() else {
            return;
        };
        match (answer, modal) {
            (ModalAnswer::Close, _) => {}
            (ModalAnswer::EditPath(text), Modal::TypePath { action, .. }) => {
                self.modal = Some(Modal::TypePath { action, text });
            }
            (ModalAnswer::ChangeDesign, Modal::ConfirmDesign { design, .. }) => {
                if self.apply_group(vec![Edit::SetDesign(design), Edit::RegenerateRuns]) {
                    self.step = Step::Runs;
                }
                self.refresh();
            }
            (ModalAnswer::SaveFirst, Modal::Unsaved(after)) => {
                if self.path.is_some() {
                    self.save();
                    if !self.history.is_dirty() {
                        self.proceed(after);
                    }
                } else {
                    self.start_dialog(FileAction::SaveAs);
                }
            }
            (ModalAnswer::DiscardChanges, Modal::Unsaved(after)) => self.proceed(after),
            (ModalAnswer::RestoreCopy, Modal::Restore(offer)) => {
                self.history.replace(offer.project);
                self.refresh();
            }
            (ModalAnswer::DiscardCopy, Modal::Restore(_)) => {
                if let Some(store) = &self.recovery
                    && let Err(e) = store.discard(self.path.as_deref())
                {
                    self.modal = Some(Modal::Error(e.to_string()));
                }
            }
            (ModalAnswer::UsePath(path), Modal::TypePath { action, .. }) => {
                self.finish_dialog(action, Some(path));
            }
            (ModalAnswer::CancelPath, Modal::TypePath { action, .. }) => {
                self.finish_dialog(action, None);
            }
            (ModalAnswer::Import, Modal::ConfirmImport { plan, .. }) => {
                let at = (self.clock)();
                if self.apply_group(plan.edits(Some(at))) {
                    self.notice = Some(format!(
                        "{} (Ctrl+Z takes the import back).",
                        values_text("Imported", plan.changes.len())
                    ));
                }
                self.refresh();
            }
            (ModalAnswer::CancelImport, Modal::ConfirmImport { .. }) => {
                self.notice = Some("Nothing was imported.".into());
            }
            (_, modal) => self.modal = Some(modal),
        }
    }
}

/// The words of the "Save changes first?" question: a project that was never saved has no file
/// to speak of, so Save there asks where to put it.
pub fn unsaved_question(path: Option<&std::path::Path>) -> String {
    match path.and_then(|p| p.file_name()) {
        Some(name) => format!(
            "The project has changes that are not saved in {}.",
            name.to_string_lossy()
        ),
        None => "This project has never been saved. Save asks where to keep it; Discard changes loses it.".to_string(),
    }
}
