//! Ranked effect bars with Lenth's margins: the bar of each effect's size, the sign as a marker
//! at its end and in its label, the model's terms filled.

use egui::{Align2, FontId, Rect, Role, Sense, Stroke, Ui, WidgetInfo, pos2, vec2};

use crate::panels::chart::place::{self, fit_parts};
use crate::panels::chart::{self, fmt_num, paint_effect_marker};
use crate::theme::{Palette, sign_label};

/// One bar of the effect ranking.
#[derive(Debug, Clone, PartialEq)]
pub struct EffectBar {
    /// Term label, e.g. `AB`.
    pub label: String,
    /// What the bar also stands for, in parts never cut: the aliases (`= CD`, `= ABE`) or the
    /// factor names of the term (`Temperature`, `Time`).
    pub detail: Vec<String>,
    /// What joins the parts of `detail` (`" "` for aliases, `" × "` for names).
    pub detail_sep: &'static str,
    /// The signed effect.
    pub value: f64,
    /// Whether the term is in the model.
    pub in_model: bool,
}

impl EffectBar {
    /// The label drawn beside the bar: the term and its sign, e.g. `AB −`.
    pub fn signed_label(&self) -> String {
        format!("{} {}", self.label, sign_label(self.value >= 0.0))
    }

    /// The full description, shown on hover: `AB − = CD`.
    pub fn full_text(&self) -> String {
        if self.detail.is_empty() {
            self.signed_label()
        } else {
            format!(
                "{}  {}",
                self.signed_label(),
                self.detail.join(self.detail_sep)
            )
        }
    }
}

/// Ranked effect bars with Lenth's margin of error (ME) and simultaneous margin (SME).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct EffectBars {
    /// Bars, largest absolute effect first.
    pub bars: Vec<EffectBar>,
    /// Lenth's margin of error, when it exists.
    pub me: Option<f64>,
    /// Lenth's simultaneous margin of error, when it exists.
    pub sme: Option<f64>,
}

/// Most bars drawn; smaller effects are summarised in one line (a 4096-run design has 4095).
pub const MAX_BARS: usize = 40;

const ROW_H: f32 = 22.0;
const LABEL_SIZE: f32 = 13.5;
const SMALL: f32 = 12.0;
/// Room right of the longest bar for its marker and value.
const VALUE_ROOM: f32 = 70.0;

impl EffectBars {
    /// The margins that can be drawn, with their names: ME dashed, SME solid.
    fn margins(&self) -> Vec<(&'static str, f64, bool)> {
        [("ME", self.me, true), ("SME", self.sme, false)]
            .into_iter()
            .filter_map(|(n, v, dash)| v.filter(|v| v.is_finite()).map(|v| (n, v, dash)))
            .collect()
    }

    /// Draws the bars; returns the index of a clicked bar. The bars answer the mouse only: the
    /// keyboard reaches the same terms through the pane's term list.
    pub fn show(&self, ui: &mut Ui, pal: &Palette) -> Option<usize> {
        let shown = self.bars.len().min(MAX_BARS);
        if shown == 0 {
            ui.label("No effects to rank yet.");
            return None;
        }
        let width = ui.available_width().max(320.0);
        let label_w = (width * 0.38).clamp(150.0, 300.0);
        let max_abs = self
            .bars
            .iter()
            .take(shown)
            .map(|b| b.value.abs())
            .chain(self.me)
            .chain(self.sme)
            .filter(|v| v.is_finite())
            .fold(0.0f64, f64::max);
        let bar_w = width - label_w - VALUE_ROOM;
        let scale = if max_abs > 0.0 {
            f64::from(bar_w) / max_abs
        } else {
            0.0
        };
        // The names of ME and SME, placed in a strip above the bars (two rows when the lines
        // are too close for one), computed from the left edge of the chart.
        let small = FontId::proportional(SMALL);
        let names: Vec<(String, f32, bool, std::sync::Arc<egui::Galley>)> = self
            .margins()
            .into_iter()
            .filter(|_| scale > 0.0)
            .map(|(name, v, dash)| {
                let text = format!("{name} {}", fmt_num(v, 3));
                let galley = ui
                    .painter()
                    .layout_no_wrap(text.clone(), small.clone(), pal.ink);
                (text, label_w + (v * scale) as f32, dash, galley)
            })
            .collect();
        let strip = |rows: usize| {
            let h = place::strip_height(rows, SMALL + 2.0);
            let bounds = Rect::from_min_max(pos2(0.0, 0.0), pos2(width, h));
            let wishes: Vec<Vec<Rect>> = names
                .iter()
                .map(|(_, x, _, g)| place::on_line(*x, 0.0, vec2(g.size().x, SMALL + 2.0), rows))
                .collect();
            (h, place::place(&wishes, &[], bounds, 2.0))
        };
        let (mut top_pad, mut spots) = strip(1);
        if spots.iter().any(Option::is_none) {
            (top_pad, spots) = strip(2);
        }
        top_pad = top_pad.max(8.0);
        let height = top_pad + ROW_H * shown as f32 + 4.0;
        let (outer, _) = ui.allocate_exact_size(vec2(width, height), Sense::hover());
        let bar_area = Rect::from_min_max(
            pos2(outer.left() + label_w, outer.top() + top_pad),
            pos2(outer.left() + label_w + bar_w, outer.bottom()),
        );
        let x_of = |v: f64| bar_area.left() + (v * scale) as f32;
        let mut clicked = None;
        let base_id = ui.scope_id().with("effect_bars");
        let label_font = FontId::proportional(LABEL_SIZE);
        for (i, bar) in self.bars.iter().take(shown).enumerate() {
            let y0 = bar_area.top() + ROW_H * i as f32;
            let row = Rect::from_min_max(pos2(outer.left(), y0), pos2(outer.right(), y0 + ROW_H));
            // Clicks and hover only: the chart is no stop of the Tab key.
            let resp = ui.interact(row, base_id.with(i), Sense::CLICK);
            let positive = bar.value >= 0.0;
            let name = format!(
                "effect {} {}{}",
                bar.label,
                sign_label(positive),
                if bar.in_model { " in model" } else { "" }
            );
            resp.widget_info(|| WidgetInfo::selected(Role::Button, true, bar.in_model, &name));
            if resp.clicked() {
                clicked = Some(i);
            }
            let resp = resp.on_hover_text(format!(
                "{}: effect {}. Click to {} the model.",
                bar.full_text(),
                fmt_num(bar.value, 4),
                if bar.in_model {
                    "remove it from"
                } else {
                    "add it to"
                }
            ));
            if !ui.is_rect_visible(row) {
                continue;
            }
            let painter = ui.painter();
            if resp.hovered() {
                painter.rect_filled(row, 2.0, pal.grid);
            }
            let ink = if bar.in_model { pal.ink } else { pal.muted };
            // The term and its sign, then as many whole aliases or names as fit the column.
            let head = painter.layout_no_wrap(bar.signed_label(), label_font.clone(), ink);
            let head_w = head.size().x;
            let text_x = outer.left() + 4.0;
            painter.galley(
                pos2(text_x, row.center().y - head.size().y / 2.0),
                head,
                ink,
            );
            if !bar.detail.is_empty() {
                let room = label_w - 4.0 - head_w - 8.0 - 8.0;
                let measure = |s: &str| {
                    painter
                        .layout_no_wrap(s.to_string(), small.clone(), pal.muted)
                        .size()
                        .x
                };
                let first_fits = measure(&bar.detail[0]) <= room;
                if first_fits {
                    let (text, _) = fit_parts(&bar.detail, bar.detail_sep, room, measure);
                    painter.text(
                        pos2(text_x + head_w + 8.0, row.center().y),
                        Align2::LEFT_CENTER,
                        text,
                        small.clone(),
                        pal.muted,
                    );
                } else if room >= measure("…") {
                    painter.text(
                        pos2(text_x + head_w + 8.0, row.center().y),
                        Align2::LEFT_CENTER,
                        "…",
                        small.clone(),
                        pal.muted,
                    );
                }
            }
            let colour = pal.model_colour(bar.in_model);
            let bar_rect = Rect::from_min_max(
                pos2(bar_area.left(), y0 + 5.0),
                pos2(
                    x_of(bar.value.abs()).max(bar_area.left() + 1.0),
                    y0 + ROW_H - 5.0,
                ),
            );
            if bar.in_model {
                painter.rect_filled(bar_rect, 1.0, colour);
            } else {
                painter.rect_stroke(
                    bar_rect,
                    1.0,
                    Stroke::new(1.2, colour),
                    egui::StrokeKind::Inside,
                );
            }
            let tip = pos2(bar_rect.right() + 9.0, row.center().y);
            paint_effect_marker(ui, tip, positive, bar.in_model, 5.0, pal);
            ui.painter().text(
                pos2(tip.x + 9.0, row.center().y),
                Align2::LEFT_CENTER,
                format!("{}{}", sign_label(positive), fmt_num(bar.value.abs(), 3)),
                small.clone(),
                ink,
            );
        }
        for ((text, x, dash, _), spot) in names.iter().zip(&spots) {
            let x = outer.left() + x;
            let a = pos2(x, bar_area.top() - 2.0);
            let b = pos2(x, bar_area.bottom());
            if *dash {
                chart::dashed(ui, a, b, Stroke::new(1.5, pal.ink));
            } else {
                ui.painter().line_segment([a, b], Stroke::new(1.0, pal.ink));
            }
            if let Some(r) = spot {
                ui.painter().text(
                    r.left_top() + outer.left_top().to_vec2(),
                    Align2::LEFT_TOP,
                    text,
                    small.clone(),
                    pal.ink,
                );
            }
        }
        if self.bars.len() > shown {
            ui.weak(format!(
                "{} smaller effects not drawn.",
                self.bars.len() - shown
            ));
        }
        clicked
    }
}
