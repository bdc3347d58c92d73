//! The partial aliasing of a screening draft: each main effect's share of the two-factor
//! interactions in words, and the whole alias matrix as a map of cells (main effects down,
//! interactions across; the colour says the sign, the strength its size), from the core's
//! `screening::partial_aliases`, computed once per (factors, runs).

use egui::{Color32, RichText, Sense, Stroke, Ui, pos2, vec2};

use super::DesignPane;
use crate::panels::View;
use twofold_core::screening::{PartialAliases, partial_aliases, plackett_burman};
use twofold_core::term::Term;
use twofold_study::numbers::fmt_sig;

/// The cached preview of one (factors, runs) draft.
#[derive(Debug)]
pub(super) struct Preview {
    key: (usize, usize),
    lines: Vec<String>,
    matrix: Result<Vec<PartialAliases>, String>,
}

fn build(k: usize, n: usize) -> Preview {
    let matrix = plackett_burman(n, k)
        .map_err(|e| e.to_string())
        .and_then(|d| {
            partial_aliases(&d.rows).ok_or_else(|| "the main effects are not estimable".to_string())
        });
    let lines = match &matrix {
        Err(e) => vec![e.clone()],
        Ok(list) => list
            .iter()
            .map(|p| {
                let mut sizes: Vec<String> =
                    p.aliases.iter().map(|(_, c)| fmt_sig(c.abs(), 2)).collect();
                sizes.sort();
                sizes.dedup();
                let shown: Vec<String> = p.aliases.iter().take(6).map(|(t, _)| t.label()).collect();
                format!(
                    "{}: partially aliased with {} two-factor interactions ({}{}), coefficients ±{}",
                    p.term.label(),
                    p.aliases.len(),
                    shown.join(", "),
                    if p.aliases.len() > 6 { ", …" } else { "" },
                    sizes.join(" or ±")
                )
            })
            .collect(),
    };
    Preview {
        key: (k, n),
        lines,
        matrix,
    }
}

/// Draws the preview of the `n`-run screening design for `k` factors.
pub(super) fn show(pane: &mut DesignPane, ui: &mut Ui, view: &View<'_>, k: usize, n: usize) {
    if pane.screening_preview.as_ref().map(|p| p.key) != Some((k, n)) {
        pane.screening_preview = Some(build(k, n));
    }
    let Some(preview) = &pane.screening_preview else {
        return;
    };
    ui.label(
        RichText::new("Alias structure of this design")
            .strong()
            .size(17.0),
    );
    ui.label(format!(
        "Plackett–Burman screening design of {n} runs: every main effect is estimated clear of the other main effects, and shares part of its estimate with two-factor interactions. Analyse main effects only; a fold-over separates them from the interactions."
    ));
    for l in &preview.lines {
        ui.label(l);
    }
    if let Ok(list) = &preview.matrix {
        heat_map(ui, view, k, list);
    }
}

/// The alias matrix as cells: a row per main effect, a column per two-factor interaction.
fn heat_map(ui: &mut Ui, view: &View<'_>, k: usize, list: &[PartialAliases]) {
    let pal = view.pal;
    let pairs: Vec<Term> = (0..k)
        .flat_map(|a| (a + 1..k).map(move |b| Term::main(a).times(Term::main(b))))
        .collect();
    if pairs.is_empty() || list.is_empty() {
        return;
    }
    ui.add_space(6.0);
    ui.label(
        RichText::new("Alias matrix: main effects (down) against two-factor interactions (across)")
            .strong(),
    );
    let label_w = 28.0;
    let cell = ((ui.available_width() - label_w - 8.0) / pairs.len() as f32).clamp(4.0, 22.0);
    // Column labels when they fit over their cells; otherwise pointing at a cell names it.
    let head = if cell >= 16.0 { 16.0 } else { 0.0 };
    let size = vec2(
        label_w + cell * pairs.len() as f32,
        head + cell * list.len() as f32 + 4.0,
    );
    let (full, response) = ui.allocate_exact_size(size, Sense::hover());
    let painter = ui.painter_at(full);
    if head > 0.0 {
        for (col, t) in pairs.iter().enumerate() {
            painter.text(
                pos2(
                    full.left() + label_w + (col as f32 + 0.5) * cell,
                    full.top() + head / 2.0,
                ),
                egui::Align2::CENTER_CENTER,
                t.label(),
                egui::FontId::proportional(9.5),
                pal.muted,
            );
        }
    }
    let rect = egui::Rect::from_min_max(pos2(full.left(), full.top() + head), full.max);
    let mix = |to: Color32, t: f32| {
        let bg = pal.plot_bg;
        let m = |a: u8, b: u8| (f32::from(a) + t * (f32::from(b) - f32::from(a))).round() as u8;
        Color32::from_rgb(m(bg.r(), to.r()), m(bg.g(), to.g()), m(bg.b(), to.b()))
    };
    let largest = list
        .iter()
        .flat_map(|p| p.aliases.iter().map(|(_, c)| c.abs()))
        .fold(0.0f64, f64::max)
        .max(1e-12);
    let font = egui::FontId::proportional(cell.clamp(9.0, 12.0));
    for (row, p) in list.iter().enumerate() {
        let y = rect.top() + row as f32 * cell;
        painter.text(
            pos2(rect.left() + label_w - 4.0, y + cell / 2.0),
            egui::Align2::RIGHT_CENTER,
            p.term.label(),
            font.clone(),
            pal.ink,
        );
        for (col, t) in pairs.iter().enumerate() {
            let c = p
                .aliases
                .iter()
                .find(|(u, _)| u == t)
                .map_or(0.0, |(_, c)| *c);
            let strength = (c.abs() / largest) as f32;
            let fill = if c > 0.0 {
                mix(pal.accent, strength)
            } else if c < 0.0 {
                mix(pal.warn, strength)
            } else {
                pal.plot_bg
            };
            let r = egui::Rect::from_min_size(
                pos2(rect.left() + label_w + col as f32 * cell, y),
                vec2(cell, cell),
            );
            painter.rect_filled(r.shrink(0.5), 0.0, fill);
        }
    }
    painter.rect_stroke(
        egui::Rect::from_min_size(
            pos2(rect.left() + label_w, rect.top()),
            vec2(cell * pairs.len() as f32, cell * list.len() as f32),
        ),
        0.0,
        Stroke::new(1.0, pal.axis),
        egui::StrokeKind::Outside,
    );
    if let Some(pos) = response.hover_pos() {
        let col = ((pos.x - rect.left() - label_w) / cell).floor();
        let row = ((pos.y - rect.top()) / cell).floor();
        if col >= 0.0 && row >= 0.0 {
            let (col, row) = (col as usize, row as usize);
            if let (Some(t), Some(p)) = (pairs.get(col), list.get(row)) {
                let c = p
                    .aliases
                    .iter()
                    .find(|(u, _)| u == t)
                    .map_or(0.0, |(_, c)| *c);
                response.on_hover_text_at_pointer(format!(
                    "{} carries {} × {}",
                    p.term.label(),
                    if c == 0.0 {
                        "0".to_string()
                    } else {
                        format!("{c:+.3}")
                    },
                    t.label()
                ));
            }
        }
    }
    ui.weak("Blue: the interaction adds to the main effect's estimate; orange: it subtracts; empty: no partial alias. Point at a cell for its coefficient.");
}
