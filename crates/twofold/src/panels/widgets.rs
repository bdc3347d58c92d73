//! Small widgets shared by the panes: text and number fields that report changes as values, and
//! the boxes that carry warnings in plain words.

use egui::text::CCursorRange;
use egui::{Color32, Id, RichText, TextEdit, Ui};

use crate::theme::Palette;
use twofold_study::project::{Cell, CellValue};

/// A one-line text field over `current`; returns the new text when the engineer changed it.
///
/// The field edits a copy; the caller turns a change into an edit, so the project is only changed
/// in one place.
pub fn text_field(ui: &mut Ui, id: Id, current: &str, width: f32, hint: &str) -> Option<String> {
    let mut text = current.to_string();
    // Like a number field, a name selects its whole text when it takes the keyboard: typing
    // replaces it, and nothing typed joins the old text unseen.
    let resp = number_edit(
        ui,
        TextEdit::singleline(&mut text)
            .id(id)
            .desired_width(width)
            // Inside a grid the available width starts small; a minimum keeps names readable.
            .min_size(egui::vec2(width, 0.0))
            .hint_text(hint),
    );
    (resp.changed() && text != current).then_some(text)
}

/// Where the window keeps the control a pane prefers to take the keyboard when its step opens.
const PREFERRED_FIRST: &str = "twofold.preferred_first_control";

/// Names `id` as the control that takes the keyboard when this step is opened, in place of the
/// first control in drawing order (the run sheet's entry field rather than its view toggles).
pub fn prefer_first(ui: &Ui, id: Id) {
    ui.ctx()
        .data_mut(|d| d.insert_temp(Id::unique(PREFERRED_FIRST), id));
}

/// The control named by [`prefer_first`] in this frame, if any (and forgets it).
pub fn take_preferred_first(ctx: &egui::Context) -> Option<Id> {
    ctx.data_mut(|d| {
        let id = d.get_temp::<Id>(Id::unique(PREFERRED_FIRST));
        d.remove::<Id>(Id::unique(PREFERRED_FIRST));
        id
    })
}

/// Gives the text field `id` the keyboard with all of `text` selected, so typing replaces it
/// (a name just added, still holding its placeholder). Returns `false`, asking nothing, while
/// `ui` is only measured and not shown (the first frame of a new grid): a field there is
/// disabled, and egui takes the keyboard back from it. Call again in the next frame.
pub fn focus_all_selected(ui: &mut Ui, id: Id, text: &str) -> bool {
    if ui.is_sizing_pass() || !ui.is_visible() {
        return false;
    }
    let mut state = TextEdit::load_state(ui.ctx(), id).unwrap_or_default();
    state
        .cursor
        .set_char_range(Some(CCursorRange::select_all_str(text)));
    state.store(ui.ctx(), id);
    ui.memory_mut(|m| m.request_focus(id));
    true
}

/// Key under a field's id that asks [`number_edit`] to select the field's text when drawn.
const SELECT_ALL: &str = "select all when drawn";

/// Gives the control `id` the keyboard from outside its pane (the window's focus keeper, after
/// the field was drawn in this frame) and, when it is a one-line field, selects its text the next
/// time it is drawn: a focus given this late does not show as "gained" in the next frame.
pub fn give_keyboard(ctx: &egui::Context, id: Id) {
    ctx.memory_mut(|m| m.request_focus(id));
    ctx.data_mut(|d| d.insert_temp(id.with(SELECT_ALL), true));
}

/// A small button for the mouse only: Tab passes it by. For actions the keyboard reaches another
/// way (removing and moving rows, undo), so a row of fields is not interrupted by three stops.
pub fn mouse_button(text: &str) -> egui::Button<'_> {
    egui::Button::new(text).sense(egui::Sense::CLICK)
}

/// Whether `response` (a one-line field) was left with Enter in this frame.
pub fn left_with_enter(ui: &Ui, response: &egui::Response) -> bool {
    response.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter))
}

/// Shows a one-line field and selects its whole content whenever it takes the keyboard (Tab, a
/// click, or a focus request), so what is typed replaces the old content instead of joining it:
/// "200" typed over "1" must not read as 1200.
///
/// Every one-line field of the window goes through here (names and units by [`text_field`];
/// factor levels and safe range, run sheet values, prediction target as numbers); the design's
/// counts are egui drag values, which select their text on focus by themselves.
pub fn number_edit(ui: &mut Ui, edit: TextEdit<'_>) -> egui::Response {
    let mut output = edit.show(ui);
    let response = output.response.response;
    let asked = ui.data_mut(|d| d.remove_temp::<bool>(response.id.with(SELECT_ALL)));
    if response.gained_focus() || (asked == Some(true) && response.has_focus()) {
        let all = CCursorRange::select_all_str(output.galley.text());
        output.state.cursor.set_char_range(Some(all));
        output.state.store(ui.ctx(), response.id);
    }
    response
}

/// [`number_edit`] as a method of `Ui`, so that a call site reads like `ui.add(edit)`.
pub trait NumberEdit {
    /// Shows `edit`, a field holding a number, with its content selected when it takes the
    /// keyboard (see [`number_edit`]).
    fn add_number(&mut self, edit: TextEdit<'_>) -> egui::Response;
}

impl NumberEdit for Ui {
    fn add_number(&mut self, edit: TextEdit<'_>) -> egui::Response {
        number_edit(self, edit)
    }
}

/// The result of drawing a [`number_field`].
pub struct NumberInput {
    /// The new value, when the text reads as a number different from the current one.
    pub changed: Option<f64>,
    /// Why the text is not a number, when it is not.
    pub error: Option<String>,
    /// The field's response.
    pub response: egui::Response,
}

/// A number field over `value`. While the engineer types, and as long as the text is not a
/// number, the typed text is kept (and marked) rather than replaced by the stored value, so a slip
/// is visible and nothing typed is silently thrown away.
pub fn number_field(
    ui: &mut Ui,
    id: Id,
    value: Option<f64>,
    width: f32,
    hint: &str,
) -> NumberInput {
    let buf_id = id.with("typed");
    let stored = value.map(plain_number).unwrap_or_default();
    let mut text: String = ui
        .data(|d| d.get_temp::<String>(buf_id))
        .unwrap_or_else(|| stored.clone());
    let parsed = |t: &str| Cell::new(t).value();
    let before_error = matches!(parsed(&text), CellValue::Bad { .. });
    let mut edit = TextEdit::singleline(&mut text)
        .id(id)
        .desired_width(width)
        .min_size(egui::vec2(width, 0.0))
        .hint_text(hint);
    if before_error {
        edit = edit.text_color(ui.visuals().error_fg_color);
    }
    let response = ui.add_number(edit);
    let (changed, error) = match parsed(&text) {
        CellValue::Number(x) => ((value != Some(x) && response.changed()).then_some(x), None),
        CellValue::Empty => (None, None),
        CellValue::Bad { reason } => (None, Some(reason)),
    };
    let keep = response.has_focus() || error.is_some();
    ui.data_mut(|d| {
        if keep {
            d.insert_temp(buf_id, text);
        } else {
            d.remove::<String>(buf_id);
        }
    });
    let response = match &error {
        Some(reason) => response.on_hover_text(format!("Not a number: {reason}")),
        None => response,
    };
    NumberInput {
        changed,
        error,
        response,
    }
}

/// A number as the engineer would type it back (shortest form that reads back the same).
pub fn plain_number(v: f64) -> String {
    if v == v.trunc() && v.abs() < 1e15 {
        format!("{}", v as i64)
    } else {
        format!("{v}")
    }
}

/// Lays out `count` tiles of width `tile_width` in rows that fit the available width (fixed-size
/// plots do not wrap by themselves).
pub fn tiles(ui: &mut Ui, count: usize, tile_width: f32, mut tile: impl FnMut(&mut Ui, usize)) {
    let gap = ui.spacing().item_spacing.x + 8.0;
    let per_row = (((ui.available_width() + gap) / (tile_width + gap)).floor() as usize).max(1);
    let mut start = 0;
    while start < count {
        let end = (start + per_row).min(count);
        ui.horizontal_top(|ui| {
            for i in start..end {
                tile(ui, i);
                ui.add_space(8.0);
            }
        });
        ui.add_space(6.0);
        start = end;
    }
}

/// A highlighted box with a warning in plain words.
pub fn warning_box(ui: &mut Ui, pal: &Palette, text: &str) {
    egui::Frame::new()
        .fill(pal.warn_bg)
        .stroke(egui::Stroke::new(1.0, pal.warn))
        .corner_radius(3.0)
        .inner_margin(egui::Margin::symmetric(8, 5))
        .show(ui, |ui| {
            ui.label(RichText::new(format!("⚠ {text}")).color(pal.warn));
        });
}

/// A quiet box for a state that is not available yet, with the reason.
pub fn not_available(ui: &mut Ui, pal: &Palette, text: &str) {
    egui::Frame::new()
        .stroke(egui::Stroke::new(1.0, pal.grid))
        .corner_radius(3.0)
        .inner_margin(egui::Margin::symmetric(10, 8))
        .show(ui, |ui| {
            ui.label(RichText::new(text).color(pal.muted));
        });
}

/// A small coloured tag, e.g. a status.
pub fn tag(ui: &mut Ui, text: &str, color: Color32) -> egui::Response {
    ui.label(RichText::new(text).color(color).strong())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plain_numbers_read_back_the_same() {
        for v in [180.0, -3.0, 0.1, 2.5, 1e-7, 12345.678] {
            assert_eq!(plain_number(v).parse::<f64>().ok(), Some(v), "{v}");
        }
        assert_eq!(plain_number(180.0), "180");
    }
}
