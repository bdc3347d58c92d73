//! Plot widgets that draw plain structs: ranked effect bars, the half-normal plot, main-effect and
//! interaction plots, residual plots.
//!
//! None of them compute statistics: the caller fills the struct from the analysis cache, so a plot
//! costs only painting. Widgets that let the user pick a term return the index of the clicked item.

mod bars;
mod half_normal;

pub use bars::{EffectBar, EffectBars, MAX_BARS};
pub use half_normal::{HalfNormalPlot, HalfNormalPoint};

use egui::{FontId, Rect, Stroke, Ui, vec2};

use super::chart::place::{self, Sides};
use super::chart::{self, AxesSpec, Marker, fmt_num, padded, paint_marker};
use crate::theme::Palette;

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
            let color = pal.model_colour(self.in_model);
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
            // One colour for both lines (the accent when the interaction is in the model, grey
            // when not): the two levels are told apart by line style, marker and name.
            let color = pal.model_colour(self.in_model);
            let letter = self.b_letter();
            let styles = [
                (Marker::Circle, "\u{2212}", "low"),
                (Marker::Square, "+", "high"),
            ];
            for (j, (marker, _, _)) in styles.iter().enumerate() {
                let [m0, m1] = self.means[j];
                if let (Some(a), Some(b)) = (m0, m1) {
                    let pa = frame.to_screen(-1.0, a);
                    let pb = frame.to_screen(1.0, b);
                    if j == 0 {
                        chart::dashed(ui, pa, pb, Stroke::new(width, color));
                    } else {
                        ui.painter()
                            .line_segment([pa, pb], Stroke::new(width, color));
                    }
                }
                for (x, m) in [(-1.0, m0), (1.0, m1)] {
                    if let Some(m) = m {
                        paint_marker(ui, frame.to_screen(x, m), *marker, 4.5, color, false);
                    }
                }
            }
            if let Some(corners) = &self.predicted {
                super::model_cells::paint(ui, &frame, corners, [color, color]);
            }
            self.paint_line_names(ui, &frame, &letter, color);
            for (j, (_, sign, word)) in styles.iter().enumerate() {
                ui.label(
                    egui::RichText::new(format!(
                        "{} {letter}{sign} {} {word}: {}",
                        if j == 0 { "- - -" } else { "——" },
                        self.b,
                        self.b_levels[j]
                    ))
                    .color(pal.ink)
                    .size(12.5),
                );
            }
        });
    }

    /// Names the two lines (`B−`, `B+`) right of their ends, beyond the model's predictions when
    /// they are drawn; names of lines that end close together are moved apart, with a thin line
    /// to the end they name.
    fn paint_line_names(&self, ui: &Ui, frame: &chart::Frame, letter: &str, color: egui::Color32) {
        let label_x = 1.0
            + self
                .predicted
                .map_or(0.0, |_| super::model_cells::RIGHT_REACH);
        let font = FontId::proportional(13.0);
        let ends: Vec<(egui::Pos2, std::sync::Arc<egui::Galley>)> = [("\u{2212}", 0), ("+", 1)]
            .into_iter()
            .filter_map(|(sign, j)| {
                let m = self.means[j][1]?;
                let galley =
                    ui.painter()
                        .layout_no_wrap(format!("{letter}{sign}"), font.clone(), color);
                Some((frame.to_screen(label_x, m), galley))
            })
            .collect();
        let wishes: Vec<Vec<Rect>> = ends
            .iter()
            .map(|(at, g)| place::around(*at, g.size(), 5.0, Sides::Right, 3))
            .collect();
        let bounds = frame.rect.expand2(vec2(10.0, 0.0));
        for ((at, galley), spot) in ends
            .into_iter()
            .zip(place::place(&wishes, &[], bounds, 1.0))
        {
            let Some(r) = spot else {
                continue;
            };
            if place::is_displaced(r, at) {
                ui.painter()
                    .line_segment([at, place::leader_end(r, at)], Stroke::new(0.8, color));
            }
            ui.painter().galley(r.min, galley, color);
        }
    }
}

fn title(ui: &mut Ui, text: &str, in_model: bool, pal: &Palette) {
    let text = if in_model {
        egui::RichText::new(format!("● {text}"))
            .color(pal.model_colour(true))
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

/// A residual plot, built once per data revision ([`ResidualPlot::new`] sorts and splits the
/// points then), so a frame only hands them to the plot.
#[derive(Debug, Clone, PartialEq)]
pub struct ResidualPlot {
    /// Which picture.
    kind: ResidualKind,
    /// Lines at ±this value mark unusually large residuals (e.g. 3 standard deviations).
    limit: Option<f64>,
    /// The points within the limit, and their run numbers (for hover text).
    usual: Vec<egui_plot::PlotPoint>,
    usual_runs: std::sync::Arc<Vec<usize>>,
    /// The points beyond the limit, and their run numbers.
    unusual: Vec<egui_plot::PlotPoint>,
    unusual_runs: std::sync::Arc<Vec<usize>>,
    /// The reference line of the normal plot, or the points in run order joined.
    line: Vec<egui_plot::PlotPoint>,
    /// Largest absolute residual or limit (the y range is ± this).
    ymag: f64,
}

impl ResidualPlot {
    /// The plot of `points`: `(x, y)` pairs, (quantile, residual), (fitted, residual) or (run,
    /// residual); `runs` the run number of each point; lines at ±`limit` mark unusually large
    /// residuals (e.g. 3 standard deviations).
    pub fn new(
        kind: ResidualKind,
        points: Vec<(f64, f64)>,
        runs: Vec<usize>,
        limit: Option<f64>,
    ) -> Self {
        let (xlo, xhi) = min_max(points.iter().map(|p| p.0));
        let ymag = points
            .iter()
            .map(|p| p.1.abs())
            .chain(limit)
            .fold(0.0_f64, f64::max);
        let far = |y: f64| limit.is_some_and(|l| y.abs() > l);
        // Point groups are named so hovering names the group; the run number comes from
        // the index of the nearest point within its group.
        let (usual, unusual): (Vec<usize>, Vec<usize>) =
            (0..points.len()).partition(|&i| !far(points[i].1));
        let runs_of = |idx: &[usize]| -> Vec<usize> {
            idx.iter().filter_map(|&i| runs.get(i).copied()).collect()
        };
        let pts = |idx: &[usize]| -> Vec<[f64; 2]> {
            idx.iter().map(|&i| [points[i].0, points[i].1]).collect()
        };
        let line: Vec<[f64; 2]> = match kind {
            ResidualKind::Normal => quartile_line(&points)
                .map(|(slope, icept)| vec![[xlo, icept + slope * xlo], [xhi, icept + slope * xhi]])
                .unwrap_or_default(),
            ResidualKind::VsOrder => {
                let mut v: Vec<[f64; 2]> = points.iter().map(|p| [p.0, p.1]).collect();
                v.sort_by(|a, b| a[0].partial_cmp(&b[0]).unwrap_or(std::cmp::Ordering::Equal));
                v
            }
            ResidualKind::VsFitted => Vec::new(),
        };
        let plot_points = |v: Vec<[f64; 2]>| -> Vec<egui_plot::PlotPoint> {
            v.into_iter().map(egui_plot::PlotPoint::from).collect()
        };
        ResidualPlot {
            kind,
            limit,
            usual: plot_points(pts(&usual)),
            usual_runs: std::sync::Arc::new(runs_of(&usual)),
            unusual: plot_points(pts(&unusual)),
            unusual_runs: std::sync::Arc::new(runs_of(&unusual)),
            line: plot_points(line),
            ymag,
        }
    }

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
            if self.usual.is_empty() && self.unusual.is_empty() {
                ui.weak("Not available yet: no residuals (the model needs more runs than terms).");
                return;
            }
            let ymag = self.ymag;
            let usual_runs = std::sync::Arc::clone(&self.usual_runs);
            let unusual_runs = std::sync::Arc::clone(&self.unusual_runs);
            // Borrowed, not copied: the points are made once per revision.
            let (usual_pts, unusual_pts, line_pts) =
                (&self.usual[..], &self.unusual[..], &self.line[..]);
            let kind = self.kind;
            let limit = self.limit;
            let (accent, warn, muted, grid) = (pal.accent, pal.warn, pal.muted, pal.grid);
            Plot::new(ui.scope_id().with(("residual-plot", title)))
                .width(size.x)
                .height(size.y)
                .x_axis_label(x_label)
                .y_axis_label(y_label)
                .x_grid_spacer(super::chart::nice_grid)
                .y_grid_spacer(super::chart::nice_grid)
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
