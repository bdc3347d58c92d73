//! Plot widgets that draw plain structs: ranked effect bars, the half-normal plot, main-effect and
//! interaction plots, residual plots.
//!
//! None of them compute statistics: the caller fills the struct from the analysis cache, so a plot
//! costs only painting. Widgets that let the user pick a term return the index of the clicked item.

use egui::{Align2, FontId, Rect, Role, Sense, Stroke, Ui, WidgetInfo, pos2, vec2};

use super::chart::{self, AxesSpec, Marker, fmt_num, padded, paint_marker};
use crate::theme::{Palette, sign_label};

/// One bar of the effect ranking.
#[derive(Debug, Clone, PartialEq)]
pub struct EffectBar {
    /// Term label, e.g. `AB`.
    pub label: String,
    /// Longer description shown beside the label, e.g. `Temp × Time`.
    pub detail: String,
    /// The signed effect.
    pub value: f64,
    /// Whether the term is in the model.
    pub in_model: bool,
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

impl EffectBars {
    /// Draws the bars; returns the index of a clicked bar.
    pub fn show(&self, ui: &mut Ui, pal: &Palette) -> Option<usize> {
        let shown = self.bars.len().min(MAX_BARS);
        if shown == 0 {
            ui.label("No effects to rank yet.");
            return None;
        }
        let row_h = 22.0;
        let label_w = 190.0;
        let width = ui.available_width().max(320.0);
        let top_pad = 18.0;
        let height = top_pad + row_h * shown as f32 + 4.0;
        let (outer, _) = ui.allocate_exact_size(vec2(width, height), Sense::hover());
        let bar_area = Rect::from_min_max(
            pos2(outer.left() + label_w, outer.top() + top_pad),
            pos2(outer.right() - 70.0, outer.bottom()),
        );
        let max_abs = self
            .bars
            .iter()
            .take(shown)
            .map(|b| b.value.abs())
            .chain(self.me)
            .chain(self.sme)
            .fold(0.0f64, f64::max);
        let scale = if max_abs > 0.0 {
            f64::from(bar_area.width()) / max_abs
        } else {
            0.0
        };
        let x_of = |v: f64| bar_area.left() + (v * scale) as f32;
        let small = FontId::proportional(12.0);
        let mut clicked = None;
        let base_id = ui.scope_id().with("effect_bars");
        for (i, bar) in self.bars.iter().take(shown).enumerate() {
            let y0 = bar_area.top() + row_h * i as f32;
            let row = Rect::from_min_max(pos2(outer.left(), y0), pos2(outer.right(), y0 + row_h));
            let resp = ui.interact(row, base_id.with(i), Sense::click());
            let label = format!(
                "effect {} {}{}",
                bar.label,
                sign_label(bar.value >= 0.0),
                if bar.in_model { " in model" } else { "" }
            );
            resp.widget_info(|| WidgetInfo::selected(Role::Button, true, bar.in_model, &label));
            if resp.clicked() {
                clicked = Some(i);
            }
            let resp = resp.on_hover_text(format!(
                "{} {}: effect {}. Click to {} the model.",
                bar.label,
                bar.detail,
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
            let positive = bar.value >= 0.0;
            let color = pal.signed(positive);
            let text = if bar.detail.is_empty() {
                bar.label.clone()
            } else {
                format!("{}  {}", bar.label, bar.detail)
            };
            // Clipped to the label column: a long name must not run under the bars.
            let label_clip =
                Rect::from_min_max(row.left_top(), pos2(bar_area.left() - 6.0, row.bottom()));
            painter.with_clip_rect(label_clip).text(
                pos2(outer.left() + 4.0, row.center().y),
                Align2::LEFT_CENTER,
                truncate(&text, 40),
                FontId::proportional(13.5),
                if bar.in_model { pal.ink } else { pal.muted },
            );
            let bar_rect = Rect::from_min_max(
                pos2(bar_area.left(), y0 + 4.0),
                pos2(
                    x_of(bar.value.abs()).max(bar_area.left() + 1.0),
                    y0 + row_h - 4.0,
                ),
            );
            if bar.in_model {
                painter.rect_filled(bar_rect, 1.0, color);
            } else {
                painter.rect(
                    bar_rect,
                    1.0,
                    color.gamma_multiply(0.18),
                    Stroke::new(1.0, color),
                    egui::StrokeKind::Inside,
                );
            }
            let tip = pos2(bar_rect.right() + 9.0, row.center().y);
            paint_marker(ui, tip, Marker::of_sign(positive), 5.0, color, false);
            ui.painter().text(
                pos2(tip.x + 9.0, row.center().y),
                Align2::LEFT_CENTER,
                format!("{}{}", sign_label(positive), fmt_num(bar.value.abs(), 3)),
                small.clone(),
                pal.ink,
            );
        }
        for (name, value, dash) in [("ME", self.me, true), ("SME", self.sme, false)] {
            if let Some(v) = value
                && v.is_finite()
                && scale > 0.0
            {
                let x = x_of(v);
                let stroke = Stroke::new(1.5, pal.ink);
                let a = pos2(x, bar_area.top() - 2.0);
                let b = pos2(x, bar_area.bottom());
                if dash {
                    chart::dashed(ui, a, b, stroke);
                } else {
                    ui.painter().line_segment([a, b], Stroke::new(1.0, pal.ink));
                }
                ui.painter().text(
                    pos2(x, outer.top() + 1.0),
                    Align2::CENTER_TOP,
                    format!("{name} {}", fmt_num(v, 3)),
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

fn truncate(s: &str, max: usize) -> String {
    if s.chars().count() <= max {
        s.to_string()
    } else {
        let mut t: String = s.chars().take(max.saturating_sub(1)).collect();
        t.push('…');
        t
    }
}

/// One point of the half-normal plot.
#[derive(Debug, Clone, PartialEq)]
pub struct HalfNormalPoint {
    /// Term label.
    pub label: String,
    /// Absolute effect (x).
    pub abs_effect: f64,
    /// Half-normal quantile (y).
    pub quantile: f64,
    /// Sign of the effect.
    pub positive: bool,
    /// Whether the term is in the model.
    pub in_model: bool,
}

/// The half-normal plot of absolute effects; clicking a point toggles its term.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct HalfNormalPlot {
    /// The points.
    pub points: Vec<HalfNormalPoint>,
    /// Lenth's pseudo standard error: the reference line is `|effect| = PSE × quantile`.
    pub pse: Option<f64>,
    /// Lenth's margin of error, drawn as a vertical line.
    pub me: Option<f64>,
}

/// Points with this many largest effects always carry a label, besides the model's terms.
const LABELLED_LARGEST: usize = 8;

impl HalfNormalPlot {
    /// Draws the plot; returns the index of a clicked point.
    pub fn show(&self, ui: &mut Ui, pal: &Palette, height: f32) -> Option<usize> {
        if self.points.is_empty() {
            ui.label("No effects to plot yet.");
            return None;
        }
        let xmax = self
            .points
            .iter()
            .map(|p| p.abs_effect)
            .chain(self.me)
            .fold(0.0f64, f64::max);
        let ymax = self
            .points
            .iter()
            .map(|p| p.quantile)
            .fold(0.0f64, f64::max);
        let spec = AxesSpec {
            x: (0.0, padded(0.0, xmax, 0.08).1),
            y: (0.0, padded(0.0, ymax, 0.08).1),
            x_label: "|effect|",
            y_label: "half-normal quantile",
            x_categories: None,
            x_ticks: true,
        };
        let (frame, _) = chart::axes(ui, chart::fill_width(ui, height), &spec, pal);
        let mut rank: Vec<usize> = (0..self.points.len()).collect();
        rank.sort_by(|&a, &b| {
            self.points[b]
                .abs_effect
                .partial_cmp(&self.points[a].abs_effect)
                .unwrap_or(std::cmp::Ordering::Equal)
        });
        let labelled: Vec<bool> = {
            let mut v = vec![false; self.points.len()];
            for &i in rank.iter().take(LABELLED_LARGEST) {
                v[i] = true;
            }
            v
        };
        if let Some(pse) = self.pse
            && pse > 0.0
        {
            let a = frame.to_screen(0.0, 0.0);
            let qy = spec.y.1.min(spec.x.1 / pse);
            let b = frame.to_screen(pse * qy, qy);
            ui.painter()
                .with_clip_rect(frame.rect)
                .line_segment([a, b], Stroke::new(1.0, pal.muted));
        }
        if let Some(me) = self.me
            && me.is_finite()
        {
            let a = frame.to_screen(me, 0.0);
            let b = frame.to_screen(me, spec.y.1);
            chart::dashed(ui, a, b, Stroke::new(1.2, pal.ink));
            ui.painter().text(
                b + vec2(3.0, 2.0),
                Align2::LEFT_TOP,
                "ME",
                FontId::proportional(12.0),
                pal.ink,
            );
        }
        let base_id = ui.scope_id().with("half_normal");
        let mut clicked = None;
        // Small effects first so the large ones are painted on top.
        for &i in rank.iter().rev() {
            let p = &self.points[i];
            let c = frame.to_screen(p.abs_effect, p.quantile);
            let hit = Rect::from_center_size(c, vec2(16.0, 16.0));
            let resp = ui.interact(hit, base_id.with(i), Sense::click());
            let name = format!("point {}", p.label);
            resp.widget_info(|| WidgetInfo::selected(Role::Button, true, p.in_model, &name));
            if resp.clicked() {
                clicked = Some(i);
            }
            let hovered = resp.hovered();
            resp.on_hover_text(format!(
                "{}: |effect| {} ({}). Click to {} the model.",
                p.label,
                fmt_num(p.abs_effect, 4),
                if p.positive { "positive" } else { "negative" },
                if p.in_model {
                    "remove it from"
                } else {
                    "add it to"
                }
            ));
            let color = pal.signed(p.positive);
            if p.in_model {
                ui.painter()
                    .circle_stroke(c, 9.0, Stroke::new(2.0, pal.in_model));
            }
            paint_marker(
                ui,
                c,
                Marker::of_sign(p.positive),
                if hovered { 6.5 } else { 5.0 },
                color,
                !p.in_model,
            );
            if labelled[i] || p.in_model || hovered {
                ui.painter().text(
                    c + vec2(-10.0, 0.0),
                    Align2::RIGHT_CENTER,
                    format!("{}{}", p.label, sign_label(p.positive)),
                    FontId::proportional(13.0),
                    if p.in_model { pal.ink } else { pal.muted },
                );
            }
        }
        clicked
    }
}

/// A main-effect plot: the mean response at each level of one factor.
#[derive(Debug, Clone, PartialEq)]
pub struct MainEffectPlot {
    /// Factor name (title).
    pub factor: String,
    /// Low-level label.
    pub low: String,
    /// High-level label.
    pub high: String,
    /// Mean at low and high (either may be missing).
    pub means: [Option<f64>; 2],
    /// Mean of the centre points, drawn in the middle when present.
    pub centre: Option<f64>,
    /// Whether the factor's main effect is in the model (highlighted frame).
    pub in_model: bool,
}

impl MainEffectPlot {
    /// Draws the plot in `size`, with y range `y` shared by the plots of one response.
    pub fn show(&self, ui: &mut Ui, pal: &Palette, size: egui::Vec2, y: (f64, f64), y_label: &str) {
        ui.vertical(|ui| {
            ui.set_width(size.x);
            title(ui, &self.factor, self.in_model, pal);
            let cats = [(-1.0, self.low.clone()), (1.0, self.high.clone())];
            let spec = AxesSpec {
                x: (-1.35, 1.35),
                y,
                x_label: "",
                y_label,
                x_categories: Some(&cats),
                x_ticks: false,
            };
            let (frame, _) = chart::axes(ui, size, &spec, pal);
            let color = if self.in_model {
                pal.in_model
            } else {
                pal.accent
            };
            if let [Some(a), Some(b)] = self.means {
                ui.painter().line_segment(
                    [frame.to_screen(-1.0, a), frame.to_screen(1.0, b)],
                    Stroke::new(2.0, color),
                );
            }
            for (x, m) in [(-1.0, self.means[0]), (1.0, self.means[1])] {
                if let Some(m) = m {
                    paint_marker(ui, frame.to_screen(x, m), Marker::Circle, 4.5, color, false);
                }
            }
            if let Some(c) = self.centre {
                paint_marker(
                    ui,
                    frame.to_screen(0.0, c),
                    Marker::Diamond,
                    5.0,
                    pal.warn,
                    false,
                );
            }
        });
    }
}

/// A two-factor interaction plot: mean response of `a` at each level of `b`, two lines.
#[derive(Debug, Clone, PartialEq)]
pub struct InteractionPlot {
    /// Term label, e.g. `AB`.
    pub term: String,
    /// Factor on the x axis.
    pub a: String,
    /// Level labels of `a`.
    pub a_levels: [String; 2],
    /// Factor drawn as two lines.
    pub b: String,
    /// Level labels of `b`.
    pub b_levels: [String; 2],
    /// `means[j][i]`: mean at `a` level `i` and `b` level `j` (low, high).
    pub means: [[Option<f64>; 2]; 2],
    /// Whether the interaction is in the model (highlighted frame and thicker lines).
    pub in_model: bool,
    /// The fitted model's corners with 95 % intervals, drawn beside the observed means
    /// ([`super::model_cells`]); `None` without a fitted model.
    pub predicted: Option<super::model_cells::PredictedCorners>,
}

impl InteractionPlot {
    /// Letter of the factor drawn as two lines (the second letter of the term).
    fn b_letter(&self) -> String {
        self.term
            .chars()
            .nth(1)
            .map(String::from)
            .unwrap_or_default()
    }

    /// Draws the plot in `size` with a y range `y` shared by the plots of one response.
    pub fn show(&self, ui: &mut Ui, pal: &Palette, size: egui::Vec2, y: (f64, f64)) {
        ui.vertical(|ui| {
            ui.set_width(size.x);
            title(
                ui,
                &format!("{}: {} × {}", self.term, self.a, self.b),
                self.in_model,
                pal,
            );
            let cats = [
                (-1.0, self.a_levels[0].clone()),
                (1.0, self.a_levels[1].clone()),
            ];
            let spec = AxesSpec {
                // Room on the right for the line labels (and on both sides for the model's
                // predictions, drawn outside the observed means).
                x: if self.predicted.is_some() {
                    (-1.55, 2.0)
                } else {
                    (-1.45, 1.8)
                },
                y,
                x_label: &self.a,
                y_label: "",
                x_categories: Some(&cats),
                x_ticks: false,
            };
            let (frame, _) = chart::axes(ui, size, &spec, pal);
            let width = if self.in_model { 2.5 } else { 1.5 };
            let letter = self.b_letter();
            let styles = [
                (pal.low_line, Marker::Circle, "\u{2212}", "low"),
                (pal.high_line, Marker::Square, "+", "high"),
            ];
            for (j, (color, marker, sign, _)) in styles.iter().enumerate() {
                let [m0, m1] = self.means[j];
                if let (Some(a), Some(b)) = (m0, m1) {
                    let pa = frame.to_screen(-1.0, a);
                    let pb = frame.to_screen(1.0, b);
                    // Low level dashed, high level solid: told apart without colour.
                    if j == 0 {
                        chart::dashed(ui, pa, pb, Stroke::new(width, *color));
                    } else {
                        ui.painter()
                            .line_segment([pa, pb], Stroke::new(width, *color));
                    }
                }
                for (x, m) in [(-1.0, m0), (1.0, m1)] {
                    if let Some(m) = m {
                        paint_marker(ui, frame.to_screen(x, m), *marker, 4.5, *color, false);
                    }
                }
                if let Some(m) = m1 {
                    // Beyond the model's predictions when they are drawn right of the line end.
                    let label_x = 1.0
                        + self
                            .predicted
                            .map_or(0.0, |_| super::model_cells::RIGHT_REACH);
                    ui.painter().text(
                        frame.to_screen(label_x, m) + vec2(8.0, 0.0),
                        Align2::LEFT_CENTER,
                        format!("{letter}{sign}"),
                        FontId::proportional(13.0),
                        *color,
                    );
                }
            }
            if let Some(corners) = &self.predicted {
                super::model_cells::paint(ui, &frame, corners, [pal.low_line, pal.high_line]);
            }
            for (j, (color, _, sign, word)) in styles.iter().enumerate() {
                ui.label(
                    egui::RichText::new(format!(
                        "{} {letter}{sign} {} {word}: {}",
                        if j == 0 { "- - -" } else { "——" },
                        self.b,
                        self.b_levels[j]
                    ))
                    .color(*color)
                    .size(12.5),
                );
            }
        });
    }
}

fn title(ui: &mut Ui, text: &str, in_model: bool, pal: &Palette) {
    let text = if in_model {
        egui::RichText::new(format!("● {text}"))
            .color(pal.in_model)
            .strong()
    } else {
        egui::RichText::new(text).color(pal.ink)
    };
    ui.add(egui::Label::new(text).truncate());
}

/// Which residual picture to draw.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ResidualKind {
    /// Residuals against normal quantiles, with the reference line.
    Normal,
    /// Residuals against fitted values.
    VsFitted,
    /// Residuals against run order.
    VsOrder,
}

/// A residual plot.
#[derive(Debug, Clone, PartialEq)]
pub struct ResidualPlot {
    /// Which picture.
    pub kind: ResidualKind,
    /// `(x, y)` pairs: (quantile, residual), (fitted, residual) or (run, residual).
    pub points: Vec<(f64, f64)>,
    /// Run numbers of the points, for hover text.
    pub runs: Vec<usize>,
    /// Lines at ±this value mark unusually large residuals (e.g. 3 standard deviations).
    pub limit: Option<f64>,
}

impl ResidualPlot {
    /// Draws the plot in `size` with `egui_plot`, so the engineer can zoom into a cluster of
    /// residuals and read each point's run number on hover (drag to pan, scroll or drag a box to
    /// zoom, double-click to reset).
    pub fn show(&self, ui: &mut Ui, pal: &Palette, size: egui::Vec2) {
        use egui_plot::{
            HLine, HoverPosition, Line, LineStyle, MarkerShape, Plot, PlotPoints, Points,
        };
        let (x_label, y_label, title) = match self.kind {
            ResidualKind::Normal => ("normal quantile", "residual", "Normal plot of residuals"),
            ResidualKind::VsFitted => ("fitted value", "residual", "Residuals against fitted"),
            ResidualKind::VsOrder => ("run order", "residual", "Residuals against run order"),
        };
        ui.vertical(|ui| {
            ui.set_width(size.x);
            ui.label(title);
            if self.points.is_empty() {
                ui.weak("Not available yet: no residuals (the model needs more runs than terms).");
                return;
            }
            let (xlo, xhi) = min_max(self.points.iter().map(|p| p.0));
            let ymag = self
                .points
                .iter()
                .map(|p| p.1.abs())
                .chain(self.limit)
                .fold(0.0_f64, f64::max);
            let far = |y: f64| self.limit.is_some_and(|l| y.abs() > l);
            // Point groups are named so hovering names the group; the run number comes from
            // the index of the nearest point within its group.
            let (usual, unusual): (Vec<usize>, Vec<usize>) =
                (0..self.points.len()).partition(|&i| !far(self.points[i].1));
            let runs_of = |idx: &[usize]| -> Vec<usize> {
                idx.iter()
                    .filter_map(|&i| self.runs.get(i).copied())
                    .collect()
            };
            let usual_runs = runs_of(&usual);
            let unusual_runs = runs_of(&unusual);
            let pts = |idx: &[usize]| -> Vec<[f64; 2]> {
                idx.iter()
                    .map(|&i| [self.points[i].0, self.points[i].1])
                    .collect()
            };
            let (usual_pts, unusual_pts) = (pts(&usual), pts(&unusual));
            let line_pts: Vec<[f64; 2]> = match self.kind {
                ResidualKind::Normal => quartile_line(&self.points)
                    .map(|(slope, icept)| {
                        vec![[xlo, icept + slope * xlo], [xhi, icept + slope * xhi]]
                    })
                    .unwrap_or_default(),
                ResidualKind::VsOrder => {
                    let mut v: Vec<[f64; 2]> = self.points.iter().map(|p| [p.0, p.1]).collect();
                    v.sort_by(|a, b| a[0].partial_cmp(&b[0]).unwrap_or(std::cmp::Ordering::Equal));
                    v
                }
                ResidualKind::VsFitted => Vec::new(),
            };
            let kind = self.kind;
            let limit = self.limit;
            let (accent, warn, muted, grid) = (pal.accent, pal.warn, pal.muted, pal.grid);
            Plot::new(ui.scope_id().with(("residual-plot", title)))
                .width(size.x)
                .height(size.y)
                .x_axis_label(x_label)
                .y_axis_label(y_label)
                .include_y(-ymag * 1.08)
                .include_y(ymag * 1.08)
                .show_background(false)
                .label_formatter(move |hover: &HoverPosition<'_>| match hover {
                    HoverPosition::NearDataPoint {
                        plot_name,
                        position,
                        index,
                    } => {
                        let runs = if *plot_name == "beyond the limit" {
                            &unusual_runs
                        } else if *plot_name == "residuals" {
                            &usual_runs
                        } else {
                            return None;
                        };
                        runs.get(*index)
                            .map(|run| format!("run {run}: residual {}", fmt_num(position.y, 4)))
                    }
                    HoverPosition::Elsewhere { .. } => None,
                })
                .show(ui, |plot| {
                    match kind {
                        ResidualKind::Normal => {
                            if !line_pts.is_empty() {
                                plot.line(
                                    Line::new("reference", PlotPoints::from(line_pts)).color(muted),
                                );
                            }
                        }
                        ResidualKind::VsFitted | ResidualKind::VsOrder => {
                            plot.hline(HLine::new("zero", 0.0).color(muted));
                            if let Some(l) = limit {
                                for v in [l, -l] {
                                    plot.hline(
                                        HLine::new("limit", v)
                                            .color(warn)
                                            .style(LineStyle::dashed_loose()),
                                    );
                                }
                            }
                            if kind == ResidualKind::VsOrder && !line_pts.is_empty() {
                                plot.line(
                                    Line::new("sequence", PlotPoints::from(line_pts)).color(grid),
                                );
                            }
                        }
                    }
                    plot.points(
                        Points::new("residuals", PlotPoints::from(usual_pts))
                            .shape(MarkerShape::Circle)
                            .radius(4.0)
                            .filled(true)
                            .color(accent),
                    );
                    if !unusual_pts.is_empty() {
                        plot.points(
                            Points::new("beyond the limit", PlotPoints::from(unusual_pts))
                                .shape(MarkerShape::Diamond)
                                .radius(5.0)
                                .filled(true)
                                .color(warn),
                        );
                    }
                });
        });
    }
}

fn min_max(it: impl Iterator<Item = f64>) -> (f64, f64) {
    it.filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
            (lo.min(v), hi.max(v))
        })
}

/// Line through the first and third quartile points of a normal plot.
fn quartile_line(points: &[(f64, f64)]) -> Option<(f64, f64)> {
    if points.len() < 4 {
        return None;
    }
    let mut p = points.to_vec();
    p.sort_by(|a, b| a.0.partial_cmp(&b.0).unwrap_or(std::cmp::Ordering::Equal));
    let q1 = p[p.len() / 4];
    let q3 = p[(3 * p.len()) / 4];
    let dx = q3.0 - q1.0;
    if dx.abs() < 1e-12 {
        return None;
    }
    let slope = (q3.1 - q1.1) / dx;
    Some((slope, q1.1 - slope * q1.0))
}

/// A shared y range for a set of means, padded.
pub fn shared_range(values: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = min_max(values);
    if lo > hi {
        return (0.0, 1.0);
    }
    padded(lo, hi, 0.1)
}
