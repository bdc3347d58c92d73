//! The menu bar, the status bar, the step rail and the keyboard shortcuts. They only read the
//! window's state and push [`AppAction`]s; [`TwofoldApp::act`] applies them after drawing.

use egui::{Key, KeyboardShortcut, Modifiers, RichText, Ui};

use super::{AfterUnsaved, AppAction, FileAction, TwofoldApp};
use crate::panels::{Command, Step, View};
use crate::theme::{Palette, ThemeChoice};
use twofold_study::export::Paper;
use twofold_study::project::{Edit, Severity};

impl TwofoldApp {
    /// Keyboard shortcuts of the menus (none while a question is shown).
    pub(super) fn shortcuts(&self, ctx: &egui::Context, out: &mut Vec<AppAction>) {
        if self.modal.is_some() {
            return;
        }
        let cmd = Modifiers::COMMAND;
        let shift = Modifiers::COMMAND | Modifiers::SHIFT;
        // Most specific first: Ctrl+Shift+Z would also match Ctrl+Z (extra Shift is ignored).
        // Steps: Ctrl+1 … Ctrl+8, and Ctrl+Page Down / Page Up for the next and previous one.
        let goto = ctx.input_mut(|i| {
            let numbered = [
                Key::Num1,
                Key::Num2,
                Key::Num3,
                Key::Num4,
                Key::Num5,
                Key::Num6,
                Key::Num7,
                Key::Num8,
                Key::Num9,
            ]
            .iter()
            .zip(Step::ALL)
            .find(|(k, _)| i.consume_shortcut(&KeyboardShortcut::new(cmd, **k)))
            .map(|(_, s)| s);
            numbered
                .or_else(|| {
                    i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::PageDown))
                        .then(|| self.step.moved(1))
                })
                .or_else(|| {
                    i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::PageUp))
                        .then(|| self.step.moved(-1))
                })
        });
        if let Some(step) = goto
            && step != self.step
        {
            out.push(AppAction::Command(Command::Goto(step)));
        }
        let export = self.export.is_none()
            && ctx.input_mut(|i| i.consume_shortcut(&KeyboardShortcut::new(cmd, Key::E)));
        if export {
            out.push(AppAction::File(FileAction::ExportSummary));
        }
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
            out.push(AppAction::Redo);
        } else if undo {
            out.push(AppAction::Undo);
        }
        if save_as {
            out.push(AppAction::File(FileAction::SaveAs));
        } else if save {
            out.push(AppAction::Save);
        }
        if open {
            out.push(AppAction::Request(AfterUnsaved::Open));
        }
        if new {
            out.push(AppAction::Request(AfterUnsaved::New));
        }
    }

    /// The menu bar and the project name.
    pub(super) fn top_bar(&self, ui: &mut Ui, pal: &Palette, out: &mut Vec<AppAction>) {
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
                    self.project_menu(ui, out);
                    ui.menu_button("Edit", |ui| {
                        if ui
                            .add_enabled(
                                self.history.can_undo(),
                                egui::Button::new("Undo").shortcut_text("Ctrl+Z"),
                            )
                            .clicked()
                        {
                            out.push(AppAction::Undo);
                        }
                        if ui
                            .add_enabled(
                                self.history.can_redo(),
                                egui::Button::new("Redo").shortcut_text("Ctrl+Shift+Z"),
                            )
                            .clicked()
                        {
                            out.push(AppAction::Redo);
                        }
                    });
                    ui.menu_button("View", |ui| {
                        let label = match self.theme {
                            ThemeChoice::Light => "Dark theme",
                            ThemeChoice::Dark => "Light theme",
                        };
                        if ui.button(label).clicked() {
                            out.push(AppAction::ToggleTheme);
                        }
                    });
                    ui.menu_button("Help", |ui| {
                        if ui.button("Safety caution").clicked() {
                            out.push(AppAction::ShowSafety);
                        }
                        ui.separator();
                        ui.label("Keys: Ctrl+N new, Ctrl+O open, Ctrl+S save,");
                        ui.label("Ctrl+Shift+S save as, Ctrl+Z undo, Ctrl+Shift+Z redo.");
                        ui.label("Run sheet: Enter stores and moves on, Tab to the next response.");
                    });
                    ui.separator();
                    if let Some(name) = crate::panels::widgets::text_field(
                        ui,
                        egui::Id::unique("project_name"),
                        &self.project().name,
                        220.0,
                        "project name",
                    ) {
                        out.push(AppAction::Command(Command::Edit(Edit::SetName(name))));
                    }
                    if self.history.is_dirty() {
                        ui.label(RichText::new("• unsaved").color(pal.warn))
                            .on_hover_text("Changes since the last save (a recovery copy is kept)");
                    }
                });
            });
    }

    /// The Project menu: files, exports and paper.
    fn project_menu(&self, ui: &mut Ui, out: &mut Vec<AppAction>) {
        ui.menu_button("Project", |ui| {
            let before = out.len();
            self.project_menu_items(ui, out);
            // A button pressed with the keyboard (Enter or Space) does not close the menu by
            // itself, unlike a click; the paper and page-format choices keep it open.
            let chose = out[before..]
                .iter()
                .any(|a| !matches!(a, AppAction::SetPaper(_) | AppAction::SetPageFormat(_)));
            if chose {
                ui.close();
            }
        });
    }

    fn project_menu_items(&self, ui: &mut Ui, out: &mut Vec<AppAction>) {
        {
            if ui
                .add(egui::Button::new("New").shortcut_text("Ctrl+N"))
                .clicked()
            {
                out.push(AppAction::Request(AfterUnsaved::New));
            }
            if ui
                .add(egui::Button::new("Open…").shortcut_text("Ctrl+O"))
                .clicked()
            {
                out.push(AppAction::Request(AfterUnsaved::Open));
            }
            ui.menu_button("Open recent", |ui| {
                if self.recent.paths().is_empty() {
                    ui.weak("No recent projects");
                }
                for p in self.recent.paths() {
                    if ui.button(p.display().to_string()).clicked() {
                        out.push(AppAction::Request(AfterUnsaved::OpenPath(p.clone())));
                    }
                }
            });
            ui.separator();
            if ui
                .add(egui::Button::new("Save").shortcut_text("Ctrl+S"))
                .clicked()
            {
                out.push(AppAction::Save);
            }
            if ui
                .add(egui::Button::new("Save as…").shortcut_text("Ctrl+Shift+S"))
                .clicked()
            {
                out.push(AppAction::File(FileAction::SaveAs));
            }
            ui.separator();
            let busy = self.export.is_some();
            if ui
                .add_enabled(
                    !busy,
                    egui::Button::new("Export summary…").shortcut_text("Ctrl+E"),
                )
                .on_hover_text("The summary: a page for each response, then any alias chains and details that did not fit. PDF, PNG (300 dpi, a file per page) or SVG, by the file name")
                .clicked()
            {
                out.push(AppAction::File(FileAction::ExportSummary));
            }
            if ui
                .add_enabled(!busy, egui::Button::new("Printable run sheet…"))
                .on_hover_text("A blank sheet in run order to fill in at the bench")
                .clicked()
            {
                out.push(AppAction::File(FileAction::PrintRunSheet));
            }
            let mut paper = self.paper;
            ui.horizontal(|ui| {
                ui.label("Paper:");
                ui.selectable_value(&mut paper, Paper::A4, "A4");
                ui.selectable_value(&mut paper, Paper::Letter, "Letter");
            });
            if paper != self.paper {
                out.push(AppAction::SetPaper(paper));
            }
            let mut ext = self.page_ext;
            ui.horizontal(|ui| {
                ui.label("Pages as:");
                ui.selectable_value(&mut ext, "pdf", "PDF document")
                    .on_hover_text("The suggested file name ends in .pdf");
                ui.selectable_value(&mut ext, "png", "PNG picture")
                    .on_hover_text("The suggested file name ends in .png (300 dpi)");
            });
            if ext != self.page_ext {
                out.push(AppAction::SetPageFormat(ext));
            }
            ui.separator();
            if ui.button("Export run sheet as CSV…").clicked() {
                out.push(AppAction::File(FileAction::ExportCsv));
            }
            if ui
                .button("Import values from CSV…")
                .on_hover_text("Matched by run number; you see what changes before anything does")
                .clicked()
            {
                out.push(AppAction::File(FileAction::ImportCsv));
            }
        }
    }

    /// Problems, notices, the open dialog and the running export.
    pub(super) fn status_bar(&self, ui: &mut Ui, pal: &Palette, out: &mut Vec<AppAction>) {
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
                            out.push(AppAction::CancelExport);
                        }
                    }
                    ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
                        if ui
                            .link(RichText::new("Safety caution").color(pal.warn))
                            .clicked()
                        {
                            out.push(AppAction::ShowSafety);
                        }
                    });
                });
            });
    }

    /// The steps down the left side, with a hint under each: three to plan and run the
    /// experiment, then the questions asked of its results.
    pub(super) fn step_rail(&self, ui: &mut Ui, pal: &Palette, out: &mut Vec<AppAction>) {
        egui::Panel::left("step_rail")
            .resizable(false)
            .exact_size(236.0)
            .frame(
                egui::Frame::new()
                    .fill(ui.visuals().faint_bg_color)
                    .inner_margin(egui::Margin::symmetric(8, 10)),
            )
            .show(ui, |ui| {
                let p = self.history.project();
                for (i, step) in Step::ALL.iter().enumerate() {
                    match step {
                        Step::Factors => rail_group(ui, pal, "Plan and run"),
                        Step::Effects => rail_group(ui, pal, "Ask the results"),
                        _ => {}
                    }
                    let hint = rail_hint(p, *step);
                    let selected = self.step == *step;
                    let text = RichText::new(format!("{}  {}", i + 1, step.title()))
                        .size(15.0)
                        .color(if selected { pal.accent } else { pal.ink });
                    let resp = ui
                        .with_layout(egui::Layout::top_down_justified(egui::Align::LEFT), |ui| {
                            ui.add(
                                egui::Button::selectable(selected, text)
                                    .min_size(egui::vec2(0.0, 28.0)),
                            )
                        })
                        .inner
                        .on_hover_text(format!("Ctrl+{}", i + 1));
                    if resp.clicked() {
                        out.push(AppAction::Command(Command::Goto(*step)));
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
                ui.add_space(8.0);
                ui.label(
                    RichText::new("Ctrl+Page Down: next step")
                        .small()
                        .color(pal.muted),
                );
            });
    }
}

/// A group heading on the step rail.
fn rail_group(ui: &mut Ui, pal: &Palette, text: &str) {
    ui.add_space(6.0);
    ui.label(RichText::new(text).small().strong().color(pal.muted));
}

/// The line under a step on the rail: how far the project is with it.
fn rail_hint(p: &twofold_study::project::Project, step: Step) -> String {
    match step {
        Step::Factors => match p.factors.len() {
            1 => "1 factor".to_string(),
            n => format!("{n} factors"),
        },
        Step::Design if p.runs.is_empty() => "not chosen".into(),
        Step::Design => format!("{} runs", p.runs.len()),
        Step::Runs if p.runs.is_empty() => "no runs yet".to_string(),
        Step::Runs => {
            let done = p
                .runs
                .iter()
                .filter(|r| r.status == twofold_study::project::RunStatus::Done)
                .count();
            format!("{done} of {} done", p.runs.len())
        }
        _ => String::new(),
    }
}

/// The heading of an analysis step: its question and the response it is asked of.
pub(super) fn step_heading(ui: &mut Ui, step: Step, view: &View<'_>) {
    ui.horizontal_wrapped(|ui| {
        ui.heading(step.title());
        if let Some(r) = view.response.and_then(|r| view.project.responses.get(r)) {
            let unit = if r.unit.is_empty() {
                String::new()
            } else {
                format!(" ({})", r.unit)
            };
            ui.label(
                RichText::new(format!("of {}{unit}", r.name))
                    .size(18.0)
                    .color(view.pal.muted),
            );
        }
    });
}

/// The response chooser above the analysis panes (when there are several).
pub(super) fn response_picker(ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
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
