//! The run sheet: a large card with the next unfinished run, then every run in a virtualised grid.
//!
//! Typing a number and pressing Enter stores it and moves to the same response of the next
//! unfinished run; Tab moves across the responses of a run. Text that is not a number stays in the
//! cell, marked, with the reason on hover, and is left out of the analysis by the analysis itself.

mod card;
mod grid;

use std::rc::Rc;

use egui::{Id, Key, Modifiers, RichText, Ui};

use super::widgets::{
    focus_all_selected, left_with_enter, mouse_button, plain_number, prefer_first, text_field,
    warning_box,
};
use super::{Command, Pane, Step, View};
use twofold_core::term::LETTERS;
use twofold_study::project::{
    Edit, Factor, FactorKind, Project, ResponseDef, RunRecord, RunStatus,
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
    /// A response just added: its name field takes the keyboard with the placeholder selected.
    focus_response: Option<usize>,
    /// A response named in the last frame: the next-run card's field for it takes the keyboard.
    go_to_card: Option<usize>,
    /// Row order cached for one data revision and one [`SheetOrder`].
    rows: Option<(u64, SheetOrder, Rc<[usize]>)>,
}

/// Accessible name of a response cell: `value run 7 Gloss` (run-order number, response name).
pub fn cell_name(run: &RunRecord, response: &ResponseDef) -> String {
    format!("value run {} {}", run.run_order, response.name)
}

/// Id of the next-run card's entry field for response `response` (other panes ask for the
/// keyboard to go there when they send the engineer to the sheet).
pub fn card_entry_id(response: usize) -> Id {
    Id::unique(("card_entry", response))
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
        let go_to_card = responses_bar(ui, project, &mut self.focus_response, out);
        if project.responses.is_empty() {
            // The response named in this frame exists from the next frame on.
            self.go_to_card = go_to_card;
            egui::Frame::new()
                .fill(pal.card_bg)
                .inner_margin(egui::Margin::same(10))
                .show(ui, |ui| {
                    ui.label(
                        RichText::new(
                            "Name the response above: the quantity you will measure in each run.",
                        )
                        .size(18.0),
                    );
                });
        }
        if !project.responses.is_empty() {
            let rows = self.row_order(view);
            // A response name left with Enter: on to the value of the next run.
            if let Some(r) = self.go_to_card.take().or(go_to_card)
                && let Some(p) = next_unfinished(&project.runs, &rows, None)
            {
                self.focus_card = Some((rows[p], r));
            }
            card::next_run_card(self, ui, view, &rows, out);
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
            .show(ui, |ui| grid::grid(self, ui, view, &rows, out));
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

/// The response names and units, with their remove buttons and "+ Add response". Returns the
/// response whose name field was left with Enter (the next-run card takes over from there).
fn responses_bar(
    ui: &mut Ui,
    project: &Project,
    focus_response: &mut Option<usize>,
    out: &mut Vec<Command>,
) -> Option<usize> {
    let mut entered = None;
    ui.horizontal_wrapped(|ui| {
        ui.label(RichText::new("Responses:").strong());
        for (index, r) in project.responses.iter().enumerate() {
            let id = Id::unique(("response_def", index));
            if *focus_response == Some(index) && focus_all_selected(ui, id.with("name"), &r.name) {
                *focus_response = None;
            }
            if let Some(name) = text_field(ui, id.with("name"), &r.name, 110.0, "name") {
                out.push(Command::Edit(Edit::RenameResponse { index, name }));
            }
            if ui
                .ctx()
                .read_response(id.with("name"))
                .is_some_and(|resp| left_with_enter(ui, &resp))
            {
                entered = Some(index);
            }
            if let Some(unit) = text_field(ui, id.with("unit"), &r.unit, 80.0, "unit") {
                out.push(Command::Edit(Edit::SetResponseUnit { index, unit }));
            }
            if ui
                .add(mouse_button("✕").small())
                .on_hover_text("Remove this response and its column (undo brings it back)")
                .clicked()
            {
                out.push(Command::Edit(Edit::RemoveResponse { index }));
            }
            ui.separator();
        }
        if project.responses.is_empty() {
            // The first response is named right here: type its name, Enter, and the next-run
            // card takes over.
            let id = Id::unique("first_response_name");
            let mut name = ui.data(|d| d.get_temp::<String>(id)).unwrap_or_default();
            let resp = ui
                .add(
                    egui::TextEdit::singleline(&mut name)
                        .id(id)
                        .desired_width(200.0)
                        .hint_text("what you measure, e.g. Yield"),
                )
                .accessible_name("name of the first response");
            prefer_first(ui, id);
            if left_with_enter(ui, &resp) && !name.trim().is_empty() {
                out.push(Command::Edit(Edit::AddResponse(ResponseDef::new(
                    name.trim(),
                    "",
                ))));
                entered = Some(0);
                name.clear();
            }
            ui.data_mut(|d| d.insert_temp(id, name));
        }
        if ui.button("+ Add response").clicked() {
            let n = project.responses.len();
            *focus_response = Some(n);
            out.push(Command::Edit(Edit::AddResponse(ResponseDef::new(
                &format!("Response {}", n + 1),
                "",
            ))));
        }
    });
    entered
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

/// Ends the editing of the response field `key` (run, response) that the keyboard leaves,
/// storing `text` when it differs from `stored`; says whether Enter left it (consumed, so the
/// field that takes the focus next does not see it as well).
fn leave_field(
    ui: &mut Ui,
    pane: &mut RunSheetPane,
    out: &mut Vec<Command>,
    view: &View<'_>,
    (run_idx, r): (usize, usize),
    text: &str,
    stored: &str,
) -> bool {
    let enter = ui.input_mut(|i| i.consume_key(Modifiers::NONE, Key::Enter));
    if text != stored {
        out.push(Command::Group(store_value(
            view.project,
            run_idx,
            r,
            text.to_string(),
            view.now,
        )));
    }
    pane.editing = None;
    enter
}

fn coded_text(c: i8) -> &'static str {
    match c {
        -1 => "\u{2212}1",
        1 => "+1",
        _ => "0",
    }
}
