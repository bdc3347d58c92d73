//! The factors pane: add, remove, rename and reorder factors; unit; numeric levels or two labels;
//! an optional safe operating range, with a warning whenever a level leaves it.

use egui::{Grid, RichText, Ui};

use super::widgets::{
    focus_all_selected, left_with_enter, mouse_button, number_field, plain_number, text_field,
    warning_box,
};
use super::{Command, Pane, View};
use crate::theme::Palette;
use twofold_core::term::LETTERS;
use twofold_study::project::{
    Edit, Factor, FactorField, FactorKind, Field, MAX_FACTORS, MIN_FACTORS, Severity,
    levels_far_apart,
};

/// View state of the factors pane.
#[derive(Debug, Default)]
pub struct FactorsPane {
    /// A factor just added: its name field takes the keyboard with the placeholder selected,
    /// so typing replaces it.
    focus_name: Option<usize>,
}

impl Pane for FactorsPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        let Self { focus_name } = self;
        let project = view.project;
        let pal = view.pal;
        ui.heading("Factors");
        ui.label(
            RichText::new(format!(
                "The settings you will vary: {MIN_FACTORS} to {MAX_FACTORS} factors, each at a low and a high level.",
            ))
            .color(pal.muted),
        );
        for p in view.problems.iter().filter(|p| p.field == Field::Factors) {
            ui.colored_label(pal.error, &p.message);
        }
        let typed = project.typed_value_count();
        if typed > 0 {
            ui.label(
                RichText::new(format!(
                    "The run sheet holds {typed} measured values. Changing a level here relabels runs that were carried out at the old setting."
                ))
                .color(pal.warn),
            );
        }
        if project.runs_outdated {
            warning_box(
                ui,
                &pal,
                "The factors changed after the run sheet was made: open Design and apply it again to update the runs.",
            );
        }
        ui.add_space(6.0);
        egui::ScrollArea::vertical()
            .auto_shrink([false, true])
            .show(ui, |ui| {
                factor_grid(ui, view, focus_name, out);
                ui.add_space(8.0);
                let next = project.factors.len();
                ui.add_enabled_ui(next < MAX_FACTORS, |ui| {
                    if ui
                        .button("+ Add factor")
                        .on_hover_text(
                            "Adds a numeric factor at the end of the list. Enter in the last \
                             factor's High or Unit field does the same.",
                        )
                        .clicked()
                    {
                        add_factor(next, focus_name, out);
                    }
                });
            });
    }
}

/// Appends factor number `next` (counted from 0) and gives its name field the keyboard.
fn add_factor(next: usize, focus_name: &mut Option<usize>, out: &mut Vec<Command>) {
    let letter = LETTERS.get(next).copied().unwrap_or('?');
    *focus_name = Some(next);
    out.push(Command::Edit(Edit::AddFactor(Factor::numeric(
        &format!("Factor {letter}"),
        "",
        0.0,
        1.0,
    ))));
}

fn factor_grid(
    ui: &mut Ui,
    view: &View<'_>,
    focus_name: &mut Option<usize>,
    out: &mut Vec<Command>,
) {
    let project = view.project;
    let pal = view.pal;
    let n = project.factors.len();
    if n == 0 {
        ui.label("No factors yet. Add the first one below.");
        return;
    }
    Grid::new("factor_grid")
        .num_columns(11)
        .spacing([10.0, 6.0])
        .striped(true)
        .show(ui, |ui| {
            // Name, Low, High first: the fields typed for every factor, in Tab order.
            for h in [
                "",
                "Name",
                "Low (−1)",
                "High (+1)",
                "Unit",
                "Kind",
                "Safe range",
                "Noise in use",
                "Hard to change",
                "",
                "",
            ] {
                ui.label(RichText::new(h).color(pal.muted).strong());
            }
            ui.end_row();
            for (index, f) in project.factors.iter().enumerate() {
                let id = ui.scope_id().with(("factor", index));
                let letter = LETTERS.get(index).copied().unwrap_or('?');
                ui.label(RichText::new(letter.to_string()).strong().size(17.0));
                if *focus_name == Some(index) && focus_all_selected(ui, id.with("name"), &f.name) {
                    *focus_name = None;
                }
                if let Some(name) = text_field(ui, id.with("name"), &f.name, 170.0, "name") {
                    out.push(Command::Edit(Edit::RenameFactor { index, name }));
                }
                if let Some(r) = ui.ctx().read_response(id.with("name")) {
                    let _ = r.accessible_name(format!("name of factor {letter}"));
                }
                let mut entered = levels(ui, id, index, f, &pal, out);
                let unit_enabled = f.is_numeric();
                ui.add_enabled_ui(unit_enabled, |ui| {
                    let unit_id = id.with("unit");
                    if let Some(unit) = text_field(ui, unit_id, &f.unit, 60.0, "unit") {
                        out.push(Command::Edit(Edit::SetFactorUnit { index, unit }));
                    }
                    if let Some(r) = ui.ctx().read_response(unit_id) {
                        let _ = r.accessible_name(format!("unit of factor {letter}"));
                    }
                    entered |= ui
                        .ctx()
                        .read_response(unit_id)
                        .is_some_and(|r| left_with_enter(ui, &r));
                });
                // Enter in the last row's High or Unit field goes on to the next factor.
                if entered && index + 1 == n && n < MAX_FACTORS {
                    add_factor(n, focus_name, out);
                }
                kind_picker(ui, id, index, f, out);
                safe_range(ui, id, index, f, out);
                noise(ui, id, index, f, out);
                let mut htc = f.hard_to_change;
                if ui
                    .checkbox(&mut htc, "")
                    .accessible_name(format!(
                        "hard to change factor {}",
                        LETTERS.get(index).copied().unwrap_or('?')
                    ))
                    .on_hover_text(
                        "Slow or costly to reset: the run sheet groups the runs into whole plots in which it stays set, and the analysis judges its effects against the whole-plot error",
                    )
                    .changed()
                {
                    out.push(Command::Edit(Edit::SetHardToChange { index, on: htc }));
                }
                ui.horizontal(|ui| {
                    if ui
                        .add_enabled(index > 0, mouse_button("↑"))
                        .on_hover_text("Move up (takes the previous letter)")
                        .clicked()
                    {
                        out.push(Command::Edit(Edit::MoveFactor {
                            from: index,
                            to: index - 1,
                        }));
                    }
                    if ui
                        .add_enabled(index + 1 < n, mouse_button("↓"))
                        .on_hover_text("Move down (takes the next letter)")
                        .clicked()
                    {
                        out.push(Command::Edit(Edit::MoveFactor {
                            from: index,
                            to: index + 1,
                        }));
                    }
                    if ui
                        .add(mouse_button("✕"))
                        .on_hover_text(format!("Remove factor {letter} (undo brings it back)"))
                        .clicked()
                    {
                        out.push(Command::Edit(Edit::RemoveFactor { index }));
                    }
                });
                problems_cell(ui, view, index);
                ui.end_row();
            }
        });
}

fn kind_picker(ui: &mut Ui, id: egui::Id, index: usize, f: &Factor, out: &mut Vec<Command>) {
    let numeric = f.is_numeric();
    let letter = LETTERS.get(index).copied().unwrap_or('?');
    egui::ComboBox::from_id_salt(id.with("kind"))
        .selected_text(if numeric { "numeric" } else { "two labels" })
        .width(100.0)
        .show_ui(ui, |ui| {
            if ui.selectable_label(numeric, "numeric").clicked() && !numeric {
                let kind = match &f.kind {
                    FactorKind::Categorical {
                        low_label,
                        high_label,
                    } => {
                        let lo = low_label.trim().parse::<f64>().ok();
                        let hi = high_label.trim().parse::<f64>().ok();
                        match (lo, hi) {
                            (Some(low), Some(high)) => FactorKind::Numeric { low, high },
                            _ => FactorKind::Numeric {
                                low: 0.0,
                                high: 1.0,
                            },
                        }
                    }
                    other => other.clone(),
                };
                out.push(Command::Edit(Edit::SetFactorKind { index, kind }));
            }
            if ui.selectable_label(!numeric, "two labels").clicked() && numeric {
                let kind = match &f.kind {
                    FactorKind::Numeric { low, high } => FactorKind::Categorical {
                        low_label: plain_number(*low),
                        high_label: plain_number(*high),
                    },
                    other => other.clone(),
                };
                out.push(Command::Edit(Edit::SetFactorKind { index, kind }));
            }
        })
        .response
        .accessible_name(format!("kind of factor {letter}"));
}

/// Draws the two level fields; returns whether the High field was left with Enter.
fn levels(
    ui: &mut Ui,
    id: egui::Id,
    index: usize,
    f: &Factor,
    pal: &Palette,
    out: &mut Vec<Command>,
) -> bool {
    match &f.kind {
        FactorKind::Numeric { low, high } => {
            let letter = LETTERS.get(index).copied().unwrap_or('?');
            // A level to check is outlined where it is typed; the row's last cell says why.
            let far = levels_far_apart(*low, *high);
            let outside = |v: f64| f.safe_range.is_some_and(|(a, b)| v < a || v > b);
            let lo = number_field(ui, id.with("low"), Some(*low), 80.0, "low");
            let lo_rect = lo.response.rect;
            let _ = lo
                .response
                .accessible_name(format!("low level of factor {letter}"));
            let hi = number_field(ui, id.with("high"), Some(*high), 80.0, "high");
            let hi_rect = hi.response.rect;
            let entered = left_with_enter(ui, &hi.response);
            let _ = hi
                .response
                .accessible_name(format!("high level of factor {letter}"));
            for (rect, v) in [(lo_rect, *low), (hi_rect, *high)] {
                if far || outside(v) {
                    ui.painter().rect_stroke(
                        rect.expand(2.0),
                        3.0,
                        egui::Stroke::new(1.5, pal.warn),
                        egui::StrokeKind::Outside,
                    );
                }
            }
            if lo.changed.is_some() || hi.changed.is_some() {
                out.push(Command::Edit(Edit::SetFactorKind {
                    index,
                    kind: FactorKind::Numeric {
                        low: lo.changed.unwrap_or(*low),
                        high: hi.changed.unwrap_or(*high),
                    },
                }));
            }
            entered
        }
        FactorKind::Categorical {
            low_label,
            high_label,
        } => {
            let lo = text_field(ui, id.with("low_label"), low_label, 80.0, "setting");
            let hi_id = id.with("high_label");
            let hi = text_field(ui, hi_id, high_label, 80.0, "setting");
            let entered = ui
                .ctx()
                .read_response(hi_id)
                .is_some_and(|r| left_with_enter(ui, &r));
            if lo.is_some() || hi.is_some() {
                out.push(Command::Edit(Edit::SetFactorKind {
                    index,
                    kind: FactorKind::Categorical {
                        low_label: lo.unwrap_or_else(|| low_label.clone()),
                        high_label: hi.unwrap_or_else(|| high_label.clone()),
                    },
                }));
            }
            entered
        }
    }
}

fn safe_range(ui: &mut Ui, id: egui::Id, index: usize, f: &Factor, out: &mut Vec<Command>) {
    ui.horizontal(|ui| {
        let FactorKind::Numeric { low, high } = f.kind else {
            ui.weak("—");
            return;
        };
        let mut on = f.safe_range.is_some();
        if ui
            .checkbox(&mut on, "")
            .accessible_name(format!(
                "safe range of factor {}",
                LETTERS.get(index).copied().unwrap_or('?')
            ))
            .on_hover_text("Declare the range the process is known to tolerate")
            .changed()
        {
            let range = on.then(|| (low.min(high), low.max(high)));
            out.push(Command::Edit(Edit::SetSafeRange { index, range }));
        }
        if let Some((lo, hi)) = f.safe_range {
            let a = number_field(ui, id.with("safe_lo"), Some(lo), 60.0, "lowest");
            ui.label("to");
            let b = number_field(ui, id.with("safe_hi"), Some(hi), 60.0, "highest");
            if a.changed.is_some() || b.changed.is_some() {
                out.push(Command::Edit(Edit::SetSafeRange {
                    index,
                    range: Some((a.changed.unwrap_or(lo), b.changed.unwrap_or(hi))),
                }));
            }
        } else {
            ui.weak("none declared");
        }
    });
}

/// Whether the factor is a noise factor (varied in the study, not controlled in use) and its
/// standard deviation in use, in coded units.
fn noise(ui: &mut Ui, id: egui::Id, index: usize, f: &Factor, out: &mut Vec<Command>) {
    ui.horizontal(|ui| {
        let mut on = f.noise_sd.is_some();
        if ui
            .checkbox(&mut on, "")
            .accessible_name(format!(
                "noise factor {}",
                LETTERS.get(index).copied().unwrap_or('?')
            ))
            .on_hover_text(
                "A noise factor is varied in the study but not controlled in use (humidity, raw-material lot): the best settings are chosen so the responses vary little with it",
            )
            .changed()
        {
            out.push(Command::Edit(Edit::SetNoise {
                index,
                sd: on.then_some(1.0),
            }));
        }
        match f.noise_sd {
            Some(sd) => {
                ui.label("σ");
                let r = number_field(ui, id.with("noise_sd"), Some(sd), 44.0, "1");
                match r.changed {
                    Some(v) if v > 0.0 => out.push(Command::Edit(Edit::SetNoise {
                        index,
                        sd: Some(v),
                    })),
                    Some(_) => {
                        ui.colored_label(ui.visuals().error_fg_color, "must be above 0");
                    }
                    None => {}
                }
                if let Some(e) = r.error {
                    ui.colored_label(ui.visuals().error_fg_color, e);
                }
                ui.weak("coded").on_hover_text(
                    "Its standard deviation in use, in coded units: 1 = half the distance from low to high",
                );
            }
            None => {
                ui.weak("control");
            }
        }
    });
}

fn problems_cell(ui: &mut Ui, view: &View<'_>, index: usize) {
    let pal = view.pal;
    ui.vertical(|ui| {
        for p in view.problems {
            let Field::Factor { index: i, part } = p.field else {
                continue;
            };
            if i != index {
                continue;
            }
            match p.severity {
                Severity::Error => {
                    ui.colored_label(pal.error, format!("✖ {}", p.message));
                }
                Severity::Warning => {
                    let prefix = if part == FactorField::Levels || part == FactorField::SafeRange {
                        "⚠ Outside safe range:"
                    } else {
                        "⚠"
                    };
                    let text = if p.message.contains("safe range") {
                        format!("{prefix} {}", p.message)
                    } else {
                        format!("⚠ {}", p.message)
                    };
                    ui.label(RichText::new(text).color(pal.warn).strong());
                }
            }
        }
    });
}
