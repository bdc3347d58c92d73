//! The card with the next unfinished run: its settings in large type and a field per response.

use egui::{RichText, TextEdit, Ui};

use crate::panels::widgets::NumberEdit;
use crate::panels::{Command, View};
use twofold_core::term::LETTERS;
use twofold_study::project::{CellValue, RunStatus};

use super::*;

pub(super) fn next_run_card(
    pane: &mut RunSheetPane,
    ui: &mut Ui,
    view: &View<'_>,
    rows: &[usize],
    out: &mut Vec<Command>,
) {
    let project = view.project;
    let pal = view.pal;
    let total = project.runs.len();
    let done = project
        .runs
        .iter()
        .filter(|r| r.status == RunStatus::Done)
        .count();
    let excluded = project
        .runs
        .iter()
        .filter(|r| r.status.is_excluded())
        .count();
    egui::Frame::new()
        .fill(pal.card_bg)
        .stroke(egui::Stroke::new(1.5, pal.accent))
        .corner_radius(4.0)
        .inner_margin(egui::Margin::same(12))
        .show(ui, |ui| {
            ui.set_width(ui.available_width());
            let progress = format!(
                "{done} of {total} done{}",
                if excluded > 0 {
                    format!(", {excluded} excluded")
                } else {
                    String::new()
                }
            );
            let Some(pos) = next_unfinished(&project.runs, rows, None) else {
                ui.label(
                    RichText::new("Every run is finished.")
                        .size(24.0)
                        .family(crate::theme::bold_family())
                        .strong(),
                );
                ui.label(RichText::new(progress).size(18.0));
                return;
            };
            let run_idx = rows[pos];
            let run = &project.runs[run_idx];
            ui.horizontal(|ui| {
                ui.label(
                    RichText::new(format!("Next: run {}", run.run_order))
                        .size(30.0)
                        .family(crate::theme::bold_family())
                        .strong()
                        .color(pal.ink),
                );
                ui.label(
                    RichText::new(format!(
                        "standard order {}, block {}{}",
                        run.std_order,
                        run.block,
                        if run.centre { ", centre point" } else { "" }
                    ))
                    .size(16.0)
                    .color(pal.muted),
                );
                ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
                    ui.label(RichText::new(&progress).size(20.0).strong());
                });
            });
            let frac = if total > 0 {
                done as f32 / total as f32
            } else {
                0.0
            };
            ui.add(egui::ProgressBar::new(frac).desired_height(8.0));
            ui.add_space(4.0);
            // Many factors go side by side, so the card never pushes the sheet off the screen.
            let k = project.factors.len();
            let per_column = 5;
            let columns = k.div_ceil(per_column).clamp(1, 5);
            let rows_per_column = k.div_ceil(columns);
            egui::Grid::new("next_run_settings")
                .num_columns(2 * columns)
                .spacing([18.0, 4.0])
                .show(ui, |ui| {
                    for row in 0..rows_per_column {
                        for col in 0..columns {
                            let i = col * rows_per_column + row;
                            let Some(f) = project.factors.get(i) else {
                                ui.label("");
                                ui.label("");
                                continue;
                            };
                            let c = run.levels.get(i).copied().unwrap_or(0);
                            ui.label(
                                RichText::new(format!(
                                    "{}  {}",
                                    LETTERS.get(i).copied().unwrap_or('?'),
                                    f.name
                                ))
                                .size(19.0)
                                .color(pal.muted),
                            );
                            ui.horizontal(|ui| {
                                ui.label(
                                    RichText::new(natural_setting(f, c))
                                        .size(26.0)
                                        .family(crate::theme::bold_family())
                                        .strong()
                                        .color(pal.ink),
                                );
                                if outside_safe_range(f, c) {
                                    ui.label(
                                        RichText::new("⚠ outside the safe range")
                                            .size(18.0)
                                            .color(pal.warn),
                                    );
                                }
                                ui.add_space(16.0);
                            });
                        }
                        ui.end_row();
                    }
                });
            ui.add_space(4.0);
            ui.horizontal_wrapped(|ui| {
                for (r, def) in project.responses.iter().enumerate() {
                    let id = super::card_entry_id(r);
                    if r == 0 {
                        // Opening the run sheet puts the keyboard here, ready for a value.
                        super::super::widgets::prefer_first(ui, id);
                    }
                    ui.label(RichText::new(format!("{} =", def.name)).size(20.0));
                    let key = (run_idx, r);
                    let (stored, mut text) = pane.cell_texts(run, key);
                    if pane.focus_card == Some(key) {
                        ui.memory_mut(|m| m.request_focus(id));
                        pane.focus_card = None;
                    }
                    let resp = ui
                        .add_number(
                            TextEdit::singleline(&mut text)
                                .id(id)
                                .font(egui::FontId::proportional(22.0))
                                .desired_width(140.0)
                                .min_size(egui::vec2(140.0, 0.0))
                                .hint_text("type, Enter"),
                        )
                        .accessible_name(card_field_name(def));
                    if !def.unit.is_empty() {
                        ui.label(RichText::new(&def.unit).size(18.0).color(pal.muted));
                    }
                    if resp.has_focus() {
                        pane.editing = Some((key, text.clone()));
                    }
                    if resp.lost_focus() {
                        let enter = leave_field(ui, pane, out, view, key, &text, &stored);
                        if enter && twofold_study::project::Cell::new(&text).number().is_some() {
                            // Next empty response of this run, else the card moves on by itself
                            // and the first field of the next run takes the focus.
                            let next_r = (r + 1..project.responses.len())
                                .find(|&j| run.values.get(j).is_some_and(|c| !c.is_typed()));
                            let target = match next_r {
                                Some(j) => (run_idx, j),
                                None => {
                                    let after = next_unfinished(&project.runs, rows, Some(pos));
                                    (after.map_or(run_idx, |p| rows[p]), 0)
                                }
                            };
                            pane.focus_card = Some(target);
                        }
                    }
                    if let CellValue::Bad { reason } =
                        twofold_study::project::Cell::new(&text).value()
                    {
                        ui.label(
                            RichText::new(format!("⚠ not a number: {reason}")).color(pal.error),
                        );
                    }
                }
            });
        });
}
