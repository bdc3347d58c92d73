//! The grid of every run: one row per run, a field per response, the status and the time.

use egui::{Id, Key, Modifiers, RichText, TextEdit, Ui};
use egui_extras::{Column, TableBuilder};

use crate::panels::widgets::{NumberEdit, text_field};
use crate::panels::{Command, View};
use crate::theme::Palette;
use twofold_core::term::LETTERS;
use twofold_study::project::{CellValue, Edit, ResponseDef, RunRecord, RunStatus};

use super::*;

pub(super) fn grid(
    pane: &mut RunSheetPane,
    ui: &mut Ui,
    view: &View<'_>,
    rows: &[usize],
    out: &mut Vec<Command>,
) {
    let project = view.project;
    let pal = view.pal;
    let nf = project.factors.len();
    let nr = project.responses.len();
    let scroll_to = pane
        .focus_next
        .and_then(|(run, _)| rows.iter().position(|&i| i == run));
    let mut table = TableBuilder::new(ui)
        .id_salt("run_sheet_table")
        .striped(true)
        .resizable(true)
        .cell_layout(egui::Layout::left_to_right(egui::Align::Center))
        .column(Column::exact(44.0))
        .column(Column::exact(44.0))
        .column(Column::exact(40.0))
        .columns(Column::auto().at_least(60.0).clip(true), nf)
        .columns(Column::initial(110.0).at_least(80.0).clip(true), nr)
        // Status: the choice box, and the reason beside it once a run is excluded.
        .column(Column::initial(130.0).at_least(110.0))
        .column(Column::initial(160.0).at_least(60.0).clip(true))
        // Sized to its text rather than to what is left: at the default window size what is
        // left is nothing, and the column was cut at the window's edge.
        .column(Column::auto().at_least(90.0))
        .min_scrolled_height(200.0);
    if let Some(p) = scroll_to {
        table = table.scroll_to_row(p, Some(egui::Align::Center));
    }
    // A split-plot sheet is unblocked: the third column gives the whole plot instead.
    let whole_plots = project.runs.iter().any(|r| r.whole_plot.is_some());
    table
        .header(26.0, |mut header| {
            for h in ["Run", "Std", if whole_plots { "Plot" } else { "Blk" }] {
                header.col(|ui| {
                    let r = ui.strong(h);
                    if h == "Plot" {
                        r.on_hover_text(
                            "Whole plot: the hard-to-change factors stay set for all its runs",
                        );
                    }
                });
            }
            for (i, f) in project.factors.iter().enumerate() {
                header.col(|ui| {
                    ui.strong(format!(
                        "{} {}",
                        LETTERS.get(i).copied().unwrap_or('?'),
                        f.name
                    ))
                    .on_hover_text(&f.name);
                });
            }
            for r in &project.responses {
                header.col(|ui| {
                    let t = if r.unit.is_empty() {
                        r.name.clone()
                    } else {
                        format!("{} ({})", r.name, r.unit)
                    };
                    ui.label(RichText::new(t).strong().color(pal.accent));
                });
            }
            for h in ["Status", "Note", "Entered"] {
                header.col(|ui| {
                    ui.strong(h);
                });
            }
        })
        .body(|body| {
            body.rows(28.0, rows.len(), |mut row| {
                let pos = row.index();
                let run_idx = rows[pos];
                let Some(run) = project.runs.get(run_idx) else {
                    return;
                };
                row.col(|ui| {
                    ui.strong(run.run_order.to_string());
                });
                row.col(|ui| {
                    ui.label(run.std_order.to_string());
                });
                row.col(|ui| {
                    ui.label(match run.whole_plot {
                        Some(w) => w.to_string(),
                        None => run.block.to_string(),
                    });
                });
                for (i, f) in project.factors.iter().enumerate() {
                    row.col(|ui| {
                        let c = run.levels.get(i).copied().unwrap_or(0);
                        let text = if pane.coded {
                            coded_text(c).to_string()
                        } else {
                            natural_setting(f, c)
                        };
                        if outside_safe_range(f, c) {
                            ui.label(RichText::new(format!("⚠ {text}")).color(pal.warn))
                                .on_hover_text("Outside the factor's declared safe range");
                        } else {
                            ui.label(text);
                        }
                    });
                }
                for (r, def) in project.responses.iter().enumerate() {
                    row.col(|ui| {
                        response_cell(pane, ui, view, rows, pos, run_idx, r, def, out);
                    });
                }
                row.col(|ui| status_cell(ui, run_idx, run, &pal, out));
                row.col(|ui| {
                    let id = Id::unique(("note", run_idx));
                    if let Some(note) = text_field(ui, id, &run.note, ui.available_width(), "note")
                    {
                        out.push(Command::Edit(Edit::SetNote { run: run_idx, note }));
                    }
                });
                row.col(|ui| {
                    if let Some(at) = &run.entered_at {
                        ui.weak(short_time(at)).on_hover_text(at);
                    }
                });
            });
        });
}

#[allow(clippy::too_many_arguments)]
fn response_cell(
    pane: &mut RunSheetPane,
    ui: &mut Ui,
    view: &View<'_>,
    rows: &[usize],
    pos: usize,
    run_idx: usize,
    r: usize,
    def: &ResponseDef,
    out: &mut Vec<Command>,
) {
    let project = view.project;
    let pal = view.pal;
    let Some(run) = project.runs.get(run_idx) else {
        return;
    };
    let id = Id::unique(("cell", run_idx, r));
    let key = (run_idx, r);
    let (stored, mut text) = pane.cell_texts(run, key);
    if pane.focus_next == Some(key) {
        ui.memory_mut(|m| m.request_focus(id));
        pane.focus_next = None;
    }
    let focused = ui.memory(|m| m.has_focus(id));
    // Consumed, so the cell that takes the focus next does not see the same key press.
    let (tab, shift_tab) = if focused {
        ui.input_mut(|i| {
            let shift_tab = i.consume_key(Modifiers::SHIFT, Key::Tab);
            let tab = !shift_tab && i.consume_key(Modifiers::NONE, Key::Tab);
            (tab, shift_tab)
        })
    } else {
        (false, false)
    };
    // Several lines (or cells) pasted into a cell fill the column from this run down, as the
    // sheet lists the runs; the window plans the paste and reports cells that are not numbers.
    let pasted = if focused {
        ui.input_mut(|i| {
            let mut grid = None;
            i.events.retain(|e| match e {
                egui::Event::Paste(t) if t.contains(['\n', '\t']) => {
                    grid = Some(t.clone());
                    false
                }
                _ => true,
            });
            grid
        })
    } else {
        None
    };
    let just_pasted = pasted.is_some();
    if let Some(clip) = pasted {
        out.push(Command::Paste {
            response: r,
            targets: rows.get(pos..).map(<[usize]>::to_vec).unwrap_or_default(),
            text: clip,
        });
        // What was typed in the cell gives way to the pasted column; the cell lets go of the
        // keyboard so that it does not store its old text over the pasted value.
        pane.editing = None;
        text = stored.clone();
        ui.memory_mut(|m| m.surrender_focus(id));
    }
    if tab || shift_tab {
        // We move across responses ourselves; egui's own Tab order would go to the status box.
        ui.memory_mut(|m| m.move_focus(egui::FocusDirection::None));
    }
    let bad = match twofold_study::project::Cell::new(&text).value() {
        CellValue::Bad { reason } => Some(reason),
        _ => None,
    };
    let width = ui.available_width() - if bad.is_some() { 20.0 } else { 0.0 };
    let mut edit = TextEdit::singleline(&mut text)
        .id(id)
        .desired_width(width.max(40.0));
    if bad.is_some() {
        edit = edit.text_color(pal.error);
    }
    let resp = ui.add_number(edit).accessible_name(cell_name(run, def));
    if let Some(reason) = &bad {
        ui.label(RichText::new("⚠").color(pal.error))
            .on_hover_text(format!("Not a number, left out of the analysis: {reason}"));
    }
    if resp.has_focus() && !just_pasted {
        pane.editing = Some((key, text.clone()));
    }
    let leaving = !just_pasted && (resp.lost_focus() || tab || shift_tab);
    if leaving {
        let enter = leave_field(ui, pane, out, view, key, &text, &stored);
        let nr = project.responses.len();
        if tab {
            pane.focus_next = Some(if r + 1 < nr {
                (run_idx, r + 1)
            } else {
                let p = (pos + 1).min(rows.len().saturating_sub(1));
                (rows[p], 0)
            });
            ui.memory_mut(|m| m.surrender_focus(id));
        } else if shift_tab {
            pane.focus_next = Some(if r > 0 {
                (run_idx, r - 1)
            } else {
                let p = pos.saturating_sub(1);
                (rows[p], nr.saturating_sub(1))
            });
            ui.memory_mut(|m| m.surrender_focus(id));
        } else if enter
            // The run just typed may still be unfinished (other responses empty): move on.
            && let Some(p) =
                next_unfinished(&project.runs, rows, Some(pos)).filter(|&p| p != pos)
        {
            pane.focus_next = Some((rows[p], r));
        }
    }
}

fn status_cell(
    ui: &mut Ui,
    run_idx: usize,
    run: &RunRecord,
    pal: &Palette,
    out: &mut Vec<Command>,
) {
    let (label, color) = match &run.status {
        RunStatus::ToDo => ("to do", pal.muted),
        RunStatus::Done => ("✔ done", pal.ok),
        RunStatus::Excluded { .. } => ("✖ excluded", pal.warn),
    };
    egui::ComboBox::from_id_salt(("status", run_idx))
        .selected_text(RichText::new(label).color(color))
        .width(96.0)
        .show_ui(ui, |ui| {
            let choices = [
                ("to do", RunStatus::ToDo),
                ("done", RunStatus::Done),
                (
                    "excluded",
                    RunStatus::Excluded {
                        reason: match &run.status {
                            RunStatus::Excluded { reason } => reason.clone(),
                            _ => String::new(),
                        },
                    },
                ),
            ];
            for (name, status) in choices {
                let current =
                    std::mem::discriminant(&status) == std::mem::discriminant(&run.status);
                if ui.selectable_label(current, name).clicked() && !current {
                    out.push(Command::Edit(Edit::SetStatus {
                        run: run_idx,
                        status,
                    }));
                }
            }
        })
        .response
        .accessible_name(format!("status of run {}", run.run_order));
    if let RunStatus::Excluded { reason } = &run.status {
        let id = Id::unique(("exclude_reason", run_idx));
        if let Some(reason) = text_field(ui, id, reason, ui.available_width(), "reason") {
            out.push(Command::Edit(Edit::SetStatus {
                run: run_idx,
                status: RunStatus::Excluded { reason },
            }));
        }
    }
}

/// `2025-03-04T10:22:05Z` → `03-04 10:22`, the part an engineer checks at the bench.
fn short_time(iso: &str) -> String {
    match (iso.get(5..10), iso.get(11..16)) {
        (Some(d), Some(t)) => format!("{d} {t}"),
        _ => iso.to_string(),
    }
}
