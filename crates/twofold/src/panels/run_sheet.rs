//! The run sheet: a large card with the next unfinished run, then every run in a virtualised grid.
//!
//! Typing a number and pressing Enter stores it and moves to the same response of the next
//! unfinished run; Tab moves across the responses of a run. Text that is not a number stays in the
//! cell, marked, with the reason on hover, and is left out of the analysis by the analysis itself.

use std::rc::Rc;

use egui::{Id, Key, Modifiers, RichText, TextEdit, Ui};
use egui_extras::{Column, TableBuilder};

use super::widgets::{NumberEdit, plain_number, text_field, warning_box};
use super::{Command, Pane, Step, View};
use crate::theme::Palette;
use twofold_core::term::LETTERS;
use twofold_study::project::{
    CellValue, Edit, Factor, FactorKind, Project, ResponseDef, RunRecord, RunStatus,
};

/// Which order the grid lists the runs in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SheetOrder {
    /// The order the runs are carried out.
    #[default]
    Run,
    /// The standard (generation) order.
    Standard,
}

/// View state of the run sheet.
#[derive(Debug, Default)]
pub struct RunSheetPane {
    /// Order of the rows.
    pub order: SheetOrder,
    /// Show coded settings (−1/0/+1) instead of natural units.
    pub coded: bool,
    /// Cell whose text is being typed: `(run position, response)` and the text so far.
    editing: Option<((usize, usize), String)>,
    /// Grid cell that should take the keyboard focus when next drawn.
    focus_next: Option<(usize, usize)>,
    /// Entry field of the next-run card that should take the focus: `(run, response)`.
    focus_card: Option<(usize, usize)>,
    /// Row order cached for one data revision and one [`SheetOrder`].
    rows: Option<(u64, SheetOrder, Rc<[usize]>)>,
}

/// Accessible name of a response cell: `value run 7 Gloss` (run-order number, response name).
pub fn cell_name(run: &RunRecord, response: &ResponseDef) -> String {
    format!("value run {} {}", run.run_order, response.name)
}

/// Accessible name of the next-run card's entry field for a response.
pub fn card_field_name(response: &ResponseDef) -> String {
    format!("next run {}", response.name)
}

impl RunSheetPane {
    /// The stored text of response `key.1` in `run`, and the text to show: the text being typed
    /// when that cell is under edit, otherwise the stored text.
    fn cell_texts(&self, run: &RunRecord, key: (usize, usize)) -> (String, String) {
        let stored = run
            .values
            .get(key.1)
            .map(|c| c.text.clone())
            .unwrap_or_default();
        let shown = match &self.editing {
            Some((k, t)) if *k == key => t.clone(),
            _ => stored.clone(),
        };
        (stored, shown)
    }

    fn row_order(&mut self, view: &View<'_>) -> Rc<[usize]> {
        let fresh = match &self.rows {
            Some((rev, ord, _)) => *rev != view.revision || *ord != self.order,
            None => true,
        };
        if fresh {
            let mut idx: Vec<usize> = (0..view.project.runs.len()).collect();
            let runs = &view.project.runs;
            match self.order {
                SheetOrder::Run => idx.sort_by_key(|&i| runs[i].run_order),
                SheetOrder::Standard => idx.sort_by_key(|&i| runs[i].std_order),
            }
            self.rows = Some((view.revision, self.order, idx.into()));
        }
        // A shared handle: drawing borrows the pane mutably while it reads the order.
        self.rows
            .as_ref()
            .map_or_else(|| Rc::from(Vec::new()), |r| Rc::clone(&r.2))
    }
}

impl Pane for RunSheetPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        let project = view.project;
        let pal = view.pal;
        ui.heading("Run sheet");
        if project.runs.is_empty() {
            ui.label("There are no runs yet.");
            if ui.button("Choose a design →").clicked() {
                out.push(Command::Goto(Step::Design));
            }
            return;
        }
        if project.runs_outdated {
            warning_box(
                ui,
                &pal,
                "Factors or design settings changed after these runs were made. The sheet still shows the old runs; apply the design again to update it (typed values are kept where the runs match).",
            );
        }
        responses_bar(ui, project, out);
        if project.responses.is_empty() {
            egui::Frame::new()
                .fill(pal.card_bg)
                .inner_margin(egui::Margin::same(10))
                .show(ui, |ui| {
                    ui.label(
                        RichText::new("Add a response: the quantity you will measure in each run.")
                            .size(18.0),
                    );
                });
        }
        if !project.responses.is_empty() {
            let rows = self.row_order(view);
            next_run_card(self, ui, view, &rows, out);
        }
        ui.add_space(6.0);
        ui.horizontal(|ui| {
            ui.label("List in");
            ui.selectable_value(&mut self.order, SheetOrder::Run, "run order");
            ui.selectable_value(&mut self.order, SheetOrder::Standard, "standard order");
            ui.separator();
            ui.label("Settings");
            ui.selectable_value(&mut self.coded, false, "natural units");
            ui.selectable_value(&mut self.coded, true, "coded −1/+1");
            ui.separator();
            if ui
                .button("Copy table")
                .on_hover_text("The sheet as listed, tab-separated, to paste into a spreadsheet. To paste a column of values, click the first cell and press Ctrl+V.")
                .clicked()
            {
                let rows = self.row_order(view);
                ui.ctx()
                    .copy_text(copy_table(project, &rows, self.coded));
            }
        });
        let rows = self.row_order(view);
        // Many factors make the sheet wider than the window: scroll sideways, never squeeze.
        egui::ScrollArea::horizontal()
            .id_salt("run_sheet_sideways")
            .show(ui, |ui| grid(self, ui, view, &rows, out));
    }
}

/// The sheet as tab-separated text: a header row, then one row per run in `rows` order with
/// the settings (natural or coded), the responses, the status and the note.
pub fn copy_table(project: &Project, rows: &[usize], coded: bool) -> String {
    let mut grid = Vec::with_capacity(rows.len() + 1);
    let mut header = vec!["Run".to_string(), "Std".to_string()];
    for (i, f) in project.factors.iter().enumerate() {
        header.push(twofold_study::interchange::csv::factor_header(
            LETTERS.get(i).copied().unwrap_or('?'),
            f,
        ));
    }
    for r in &project.responses {
        header.push(twofold_study::interchange::csv::response_header(r));
    }
    header.push("Status".into());
    header.push("Note".into());
    grid.push(header);
    for &i in rows {
        let Some(run) = project.runs.get(i) else {
            continue;
        };
        let mut row = vec![run.run_order.to_string(), run.std_order.to_string()];
        for (k, f) in project.factors.iter().enumerate() {
            let c = run.levels.get(k).copied().unwrap_or(0);
            // Plain ASCII signs: spreadsheets read `−1` (the typographic minus) as text.
            row.push(if coded {
                match c {
                    -1 => "-1".to_string(),
                    1 => "1".to_string(),
                    _ => "0".to_string(),
                }
            } else {
                natural_setting(f, c)
            });
        }
        for k in 0..project.responses.len() {
            row.push(
                run.values
                    .get(k)
                    .map(|c| c.text.clone())
                    .unwrap_or_default(),
            );
        }
        row.push(
            match &run.status {
                RunStatus::ToDo => "to do",
                RunStatus::Done => "done",
                RunStatus::Excluded { .. } => "excluded",
            }
            .to_string(),
        );
        row.push(run.note.clone());
        grid.push(row);
    }
    twofold_study::interchange::copy_grid(&grid)
}

fn responses_bar(ui: &mut Ui, project: &Project, out: &mut Vec<Command>) {
    ui.horizontal_wrapped(|ui| {
        ui.label(RichText::new("Responses:").strong());
        for (index, r) in project.responses.iter().enumerate() {
            let id = Id::unique(("response_def", index));
            if let Some(name) = text_field(ui, id.with("name"), &r.name, 110.0, "name") {
                out.push(Command::Edit(Edit::RenameResponse { index, name }));
            }
            if let Some(unit) = text_field(ui, id.with("unit"), &r.unit, 45.0, "unit") {
                out.push(Command::Edit(Edit::SetResponseUnit { index, unit }));
            }
            if ui
                .small_button("✕")
                .on_hover_text("Remove this response and its column (undo brings it back)")
                .clicked()
            {
                out.push(Command::Edit(Edit::RemoveResponse { index }));
            }
            ui.separator();
        }
        if ui.button("+ Add response").clicked() {
            let n = project.responses.len() + 1;
            out.push(Command::Edit(Edit::AddResponse(ResponseDef::new(
                &format!("Response {n}"),
                "",
            ))));
        }
    });
}

/// Whether a run still waits to be carried out.
pub fn is_unfinished(run: &RunRecord) -> bool {
    run.status == RunStatus::ToDo
}

/// The position (in `rows`) of the first unfinished run after `after` (or from the start),
/// wrapping around; `None` when every run is finished.
pub fn next_unfinished(runs: &[RunRecord], rows: &[usize], after: Option<usize>) -> Option<usize> {
    let start = after.map_or(0, |a| a + 1);
    (start..rows.len())
        .chain(0..start.min(rows.len()))
        .find(|&p| runs.get(rows[p]).is_some_and(is_unfinished))
}

/// The edits that store `text` in a cell: the value, and `Done` when that completes the run.
pub fn store_value(
    project: &Project,
    run: usize,
    response: usize,
    text: String,
    at: &str,
) -> Vec<Edit> {
    let Some(record) = project.runs.get(run) else {
        return Vec::new();
    };
    if record.values.get(response).is_some_and(|c| c.text == text) {
        return Vec::new();
    }
    // Only numbers complete a run: a slip keeps the run open, so the card stays on it and
    // shows why the text was not read.
    let is_number = |t: &str| twofold_study::project::Cell::new(t).number().is_some();
    let complete = record.values.iter().enumerate().all(|(i, c)| {
        if i == response {
            is_number(&text)
        } else {
            c.number().is_some()
        }
    });
    let mut edits = vec![Edit::SetCell {
        run,
        response,
        text,
        at: Some(at.to_string()),
    }];
    if complete && record.status == RunStatus::ToDo {
        edits.push(Edit::SetStatus {
            run,
            status: RunStatus::Done,
        });
    }
    edits
}

/// The natural setting of a factor in a run, as text with the unit.
pub fn natural_setting(f: &Factor, coded: i8) -> String {
    match (&f.kind, coded) {
        (FactorKind::Numeric { low, high }, c) => {
            let v = match c {
                -1 => *low,
                1 => *high,
                _ => 0.5 * (low + high),
            };
            if f.unit.is_empty() {
                plain_number(v)
            } else {
                format!("{} {}", plain_number(v), f.unit)
            }
        }
        (FactorKind::Categorical { low_label, .. }, -1) => low_label.clone(),
        (FactorKind::Categorical { high_label, .. }, 1) => high_label.clone(),
        _ => "—".into(),
    }
}

/// Whether the natural setting of `coded` lies outside the factor's declared safe range.
pub fn outside_safe_range(f: &Factor, coded: i8) -> bool {
    let (FactorKind::Numeric { low, high }, Some((lo, hi))) = (&f.kind, f.safe_range) else {
        return false;
    };
    let v = match coded {
        -1 => *low,
        1 => *high,
        _ => 0.5 * (low + high),
    };
    v < lo || v > hi
}

fn coded_text(c: i8) -> &'static str {
    match c {
        -1 => "\u{2212}1",
        1 => "+1",
        _ => "0",
    }
}

fn next_run_card(
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
                    let id = Id::unique(("card_entry", r));
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
                        // Consumed: the field that takes the focus next must not see this Enter as well.
                        let enter = ui.input_mut(|i| i.consume_key(Modifiers::NONE, Key::Enter));
                        if text != stored {
                            out.push(Command::Group(store_value(
                                project,
                                run_idx,
                                r,
                                text.clone(),
                                view.now,
                            )));
                        }
                        pane.editing = None;
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

fn grid(
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
        .column(Column::initial(190.0).at_least(110.0))
        .column(Column::initial(160.0).at_least(60.0).clip(true))
        .column(Column::remainder().at_least(90.0))
        .min_scrolled_height(200.0);
    if let Some(p) = scroll_to {
        table = table.scroll_to_row(p, Some(egui::Align::Center));
    }
    table
        .header(26.0, |mut header| {
            for h in ["Run", "Std", "Blk"] {
                header.col(|ui| {
                    ui.strong(h);
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
                    ui.label(run.block.to_string());
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
        // Consumed: the field that takes the focus next must not see this Enter as well.
        let enter = ui.input_mut(|i| i.consume_key(Modifiers::NONE, Key::Enter));
        if text != stored {
            out.push(Command::Group(store_value(
                project,
                run_idx,
                r,
                text.clone(),
                view.now,
            )));
        }
        pane.editing = None;
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
