//! A small painter for our plots: a frame with axes, round-numbered ticks and a mapping from data
//! to screen, plus the marker shapes the plots share and (in [`place`]) the placing of labels.
//!
//! We paint our own rather than use a general plotting widget because every point of the
//! half-normal plot must be a clickable, named widget (for the mouse and for tests; the keyboard
//! reaches the same terms through the term list beside it), and because the plots are static
//! pictures of one analysis: no pan or zoom to lose the reader.
//!
//! The look of an effect is the same everywhere in the window: its sign is a marker shape (▲ for
//! a positive effect, ▼ for a negative one) and a `+`/`−` label, never a colour; colour says only
//! whether the term is in the model (the accent colour, filled) or not (muted grey, hollow).

pub mod place;

use egui::{Align2, Color32, FontId, Pos2, Rect, Sense, Shape, Stroke, Ui, Vec2, pos2, vec2};

use crate::theme::Palette;

/// The words that explain the effect markers, shown beside every chart of effects.
pub const EFFECT_LEGEND: &str = "▲ raises the response, ▼ lowers it; filled = in the model";

/// Shapes of plot markers; an effect's sign is told by shape (and a `+`/`−` label), not colour.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Marker {
    /// A filled circle.
    Circle,
    /// A filled square.
    Square,
    /// A triangle pointing up (positive effects).
    Up,
    /// A triangle pointing down (negative effects).
    Down,
    /// A diamond.
    Diamond,
}

impl Marker {
    /// The marker of an effect sign.
    pub fn of_sign(positive: bool) -> Marker {
        if positive { Marker::Up } else { Marker::Down }
    }
}

/// Paints the marker of an effect at `c`: a triangle up (positive) or down (negative), filled in
/// the accent colour when its term is in the model, hollow and muted when it is not.
pub fn paint_effect_marker(
    ui: &Ui,
    c: Pos2,
    positive: bool,
    in_model: bool,
    r: f32,
    pal: &Palette,
) {
    paint_marker(
        ui,
        c,
        Marker::of_sign(positive),
        r,
        pal.model_colour(in_model),
        !in_model,
    );
}

/// Paints `marker` of half-size `r` at `c`; `hollow` draws only the outline.
pub fn paint_marker(ui: &Ui, c: Pos2, marker: Marker, r: f32, color: Color32, hollow: bool) {
    let painter = ui.painter();
    let stroke = Stroke::new(1.5, color);
    let fill = if hollow { Color32::TRANSPARENT } else { color };
    match marker {
        Marker::Circle => {
            if hollow {
                painter.circle_stroke(c, r, stroke);
            } else {
                painter.circle_filled(c, r, color);
            }
        }
        Marker::Square => {
            let rect = Rect::from_center_size(c, Vec2::splat(2.0 * r * 0.85));
            painter.rect(rect, 0.0, fill, stroke, egui::StrokeKind::Middle);
        }
        Marker::Up | Marker::Down | Marker::Diamond => {
            let pts = match marker {
                Marker::Up => vec![
                    pos2(c.x, c.y - r * 1.15),
                    pos2(c.x + r, c.y + r * 0.7),
                    pos2(c.x - r, c.y + r * 0.7),
                ],
                Marker::Down => vec![
                    pos2(c.x, c.y + r * 1.15),
                    pos2(c.x - r, c.y - r * 0.7),
                    pos2(c.x + r, c.y - r * 0.7),
                ],
                _ => vec![
                    pos2(c.x, c.y - r * 1.2),
                    pos2(c.x + r, c.y),
                    pos2(c.x, c.y + r * 1.2),
                    pos2(c.x - r, c.y),
                ],
            };
            painter.add(Shape::convex_polygon(pts, fill, stroke));
        }
    }
}

pub use twofold_study::numbers::{fmt_num, nice_ticks, tick_label};

/// Grid marks of the zoomable plots at the same round steps as the painted charts and the page
/// (about five a side), so every mark carries a label: egui_plot's own spacer keeps to powers
/// of ten and labels only some of them.
pub fn nice_grid(input: egui_plot::GridInput) -> Vec<egui_plot::GridMark> {
    let (lo, hi) = input.bounds;
    let ticks = nice_ticks(lo, hi, 5);
    let step = match ticks.as_slice() {
        [a, b, ..] => b - a,
        _ => (hi - lo).abs().max(f64::MIN_POSITIVE),
    };
    ticks
        .into_iter()
        .map(|value| egui_plot::GridMark {
            value,
            step_size: step,
        })
        .collect()
}

/// Data ranges and the screen rectangle of one plot; maps data to screen.
#[derive(Debug, Clone, Copy)]
pub struct Frame {
    /// The plotting area on screen (inside the axes).
    pub rect: Rect,
    /// Data range along x.
    pub x: (f64, f64),
    /// Data range along y.
    pub y: (f64, f64),
}

impl Frame {
    /// Screen position of a data point.
    pub fn to_screen(&self, x: f64, y: f64) -> Pos2 {
        let fx = ((x - self.x.0) / (self.x.1 - self.x.0)) as f32;
        let fy = ((y - self.y.0) / (self.y.1 - self.y.0)) as f32;
        pos2(
            self.rect.left() + fx * self.rect.width(),
            self.rect.bottom() - fy * self.rect.height(),
        )
    }
}

/// Widens a data range by a margin and away from zero width, so points never sit on the frame.
pub fn padded(lo: f64, hi: f64, frac: f64) -> (f64, f64) {
    let (lo, hi) = if lo.is_finite() && hi.is_finite() {
        (lo.min(hi), lo.max(hi))
    } else {
        (0.0, 1.0)
    };
    let span = hi - lo;
    let pad = if span > 0.0 {
        span * frac
    } else {
        lo.abs().max(1.0) * 0.1
    };
    (lo - pad, hi + pad)
}

/// Options of an axis frame.
pub struct AxesSpec<'a> {
    /// Data range along x.
    pub x: (f64, f64),
    /// Data range along y.
    pub y: (f64, f64),
    /// Label under the x axis.
    pub x_label: &'a str,
    /// Label left of the y axis.
    pub y_label: &'a str,
    /// Tick labels of x at given positions instead of numbers (e.g. level names).
    pub x_categories: Option<&'a [(f64, String)]>,
    /// Whether to draw numeric x ticks (false for a categorical or unlabelled axis).
    pub x_ticks: bool,
}

/// Allocates `size`, paints the background, grid, axes and labels, and returns the mapping and the
/// response of the whole plot.
pub fn axes(
    ui: &mut Ui,
    size: Vec2,
    spec: &AxesSpec<'_>,
    pal: &Palette,
) -> (Frame, egui::Response) {
    let (outer, response) = ui.allocate_exact_size(size, Sense::hover());
    let small = FontId::proportional(12.0);
    let left = 52.0;
    let bottom = if spec.x_label.is_empty() { 24.0 } else { 40.0 };
    let rect = Rect::from_min_max(
        pos2(outer.left() + left, outer.top() + 8.0),
        pos2(outer.right() - 12.0, outer.bottom() - bottom),
    );
    let frame = Frame {
        rect,
        x: spec.x,
        y: spec.y,
    };
    if !ui.is_rect_visible(outer) {
        return (frame, response);
    }
    let painter = ui.painter();
    painter.rect_filled(rect, 2.0, pal.plot_bg);
    let grid = Stroke::new(1.0, pal.grid);
    let yt = nice_ticks(spec.y.0, spec.y.1, 5);
    let ystep = if yt.len() > 1 { yt[1] - yt[0] } else { 1.0 };
    for v in &yt {
        let p = frame.to_screen(spec.x.0, *v);
        painter.hline(rect.x_range(), p.y, grid);
        painter.text(
            pos2(rect.left() - 6.0, p.y),
            Align2::RIGHT_CENTER,
            tick_label(*v, ystep),
            small.clone(),
            pal.muted,
        );
    }
    if let Some(cats) = spec.x_categories {
        for (x, label) in cats {
            let p = frame.to_screen(*x, spec.y.0);
            painter.vline(p.x, rect.y_range(), grid);
            painter.text(
                pos2(p.x, rect.bottom() + 4.0),
                Align2::CENTER_TOP,
                label,
                small.clone(),
                pal.ink,
            );
        }
    } else if spec.x_ticks {
        let xt = nice_ticks(spec.x.0, spec.x.1, 6);
        let xstep = if xt.len() > 1 { xt[1] - xt[0] } else { 1.0 };
        for v in &xt {
            let p = frame.to_screen(*v, spec.y.0);
            painter.vline(p.x, rect.y_range(), grid);
            painter.text(
                pos2(p.x, rect.bottom() + 4.0),
                Align2::CENTER_TOP,
                tick_label(*v, xstep),
                small.clone(),
                pal.muted,
            );
        }
    }
    let axis = Stroke::new(1.0, pal.axis);
    painter.line_segment([rect.left_bottom(), rect.right_bottom()], axis);
    painter.line_segment([rect.left_bottom(), rect.left_top()], axis);
    if !spec.x_label.is_empty() {
        painter.text(
            pos2(rect.center().x, outer.bottom() - 4.0),
            Align2::CENTER_BOTTOM,
            spec.x_label,
            small.clone(),
            pal.muted,
        );
    }
    if !spec.y_label.is_empty() {
        let galley = painter.layout_no_wrap(spec.y_label.to_string(), small, pal.muted);
        let pos = pos2(outer.left() + 2.0, rect.center().y + galley.size().x / 2.0);
        painter.add(
            egui::epaint::TextShape::new(pos, galley, pal.muted)
                .with_angle(-std::f32::consts::FRAC_PI_2),
        );
    }
    (frame, response)
}

/// Paints a dashed line from `a` to `b`.
pub fn dashed(ui: &Ui, a: Pos2, b: Pos2, stroke: Stroke) {
    ui.painter()
        .extend(Shape::dashed_line(&[a, b], stroke, 6.0, 4.0));
}

/// Size of a plot that fills the available width with the given height.
pub fn fill_width(ui: &Ui, height: f32) -> Vec2 {
    vec2(ui.available_width().max(200.0), height)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn frame_maps_corners_to_corners() {
        let f = Frame {
            rect: Rect::from_min_max(pos2(10.0, 20.0), pos2(110.0, 220.0)),
            x: (0.0, 1.0),
            y: (-1.0, 1.0),
        };
        assert_eq!(f.to_screen(0.0, -1.0), pos2(10.0, 220.0));
        assert_eq!(f.to_screen(1.0, 1.0), pos2(110.0, 20.0));
    }
}
