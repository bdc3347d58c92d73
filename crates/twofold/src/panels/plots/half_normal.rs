//! The half-normal plot of absolute effects: clicking a point adds or removes its term; the
//! points that matter carry labels placed so that none overlap.

use egui::{Align2, FontId, Rect, Role, Sense, Stroke, Ui, WidgetInfo, vec2};

use crate::panels::chart::place::{self, Sides};
use crate::panels::chart::{self, AxesSpec, fmt_num, padded, paint_effect_marker};
use crate::theme::{Palette, sign_label};

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
///
/// Built once per data revision ([`HalfNormalPlot::new`] ranks the points then), so a frame
/// only paints.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct HalfNormalPlot {
    /// The points.
    points: Vec<HalfNormalPoint>,
    /// Lenth's pseudo standard error: the reference line is `|effect| = PSE × quantile`.
    pse: Option<f64>,
    /// Lenth's margin of error, drawn as a vertical line.
    me: Option<f64>,
    /// Indices of the points, largest absolute effect first.
    rank: Vec<usize>,
    /// The points that carry a label, in the order they claim a place.
    labelled: Vec<usize>,
}

/// Besides the model's terms, this many of the largest effects carry a label; the small effects
/// near zero are named on hover only.
const LABELLED_LARGEST: usize = 5;

/// Besides the model's terms, this many of the largest effects answer the mouse (hover names
/// them, a click toggles the term). The crowd of small effects near zero is only painted: its
/// points overlap, and the term list reaches each of them.
const POINTS_ANSWERING: usize = 255;

const MARKER_R: f32 = 5.0;
const LABEL_SIZE: f32 = 13.0;

impl HalfNormalPlot {
    /// The plot of `points` with Lenth's PSE (reference line) and ME (vertical line).
    pub fn new(points: Vec<HalfNormalPoint>, pse: Option<f64>, me: Option<f64>) -> Self {
        let mut rank: Vec<usize> = (0..points.len()).collect();
        rank.sort_by(|&a, &b| {
            points[b]
                .abs_effect
                .partial_cmp(&points[a].abs_effect)
                .unwrap_or(std::cmp::Ordering::Equal)
        });
        let in_model = rank.iter().copied().filter(|&i| points[i].in_model);
        let largest = rank
            .iter()
            .copied()
            .take(LABELLED_LARGEST)
            .filter(|&i| !points[i].in_model);
        let labelled = in_model.chain(largest).collect();
        HalfNormalPlot {
            points,
            pse,
            me,
            rank,
            labelled,
        }
    }

    /// The points.
    pub fn points(&self) -> &[HalfNormalPoint] {
        &self.points
    }

    /// The points that get a label, in the order they claim a place: the model's terms, then
    /// the largest other effects (each group largest first).
    pub fn labelled(&self) -> &[usize] {
        &self.labelled
    }

    /// Draws the plot; returns the index of a clicked point. The points answer the mouse only:
    /// the keyboard reaches the same terms through the pane's term list.
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
            .filter(|v| v.is_finite())
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
        let small = FontId::proportional(12.0);
        let mut obstacles: Vec<Rect> = self
            .points
            .iter()
            .map(|p| {
                Rect::from_center_size(
                    frame.to_screen(p.abs_effect, p.quantile),
                    vec2(2.0 * MARKER_R + 2.0, 2.0 * MARKER_R + 2.0),
                )
            })
            .collect();
        if let Some(me) = self.me
            && me.is_finite()
        {
            let a = frame.to_screen(me, 0.0);
            let b = frame.to_screen(me, spec.y.1);
            chart::dashed(ui, a, b, Stroke::new(1.2, pal.ink));
            let me_rect =
                ui.painter()
                    .text(b + vec2(3.0, 2.0), Align2::LEFT_TOP, "ME", small, pal.ink);
            obstacles.push(me_rect);
        }
        let base_id = ui.scope_id().with("half_normal");
        let mut clicked = None;
        // A painted marker's pixel and look: a point that would paint the same marker on the same
        // pixel as one already painted adds nothing to the picture (thousands of small effects
        // crowd near zero).
        let mut painted = std::collections::HashSet::new();
        // Small effects first so the large ones are painted on top.
        for (k, &i) in self.rank.iter().enumerate().rev() {
            let p = &self.points[i];
            let c = frame.to_screen(p.abs_effect, p.quantile);
            if k >= POINTS_ANSWERING && !p.in_model {
                let pixel = (c.x.round() as i32, c.y.round() as i32, p.positive);
                if painted.insert(pixel) {
                    paint_effect_marker(ui, c, p.positive, false, MARKER_R, pal);
                }
                continue;
            }
            let hit = Rect::from_center_size(c, vec2(16.0, 16.0));
            // Clicks and hover only: the chart is no stop of the Tab key.
            let resp = ui.interact(hit, base_id.with(i), Sense::CLICK);
            resp.widget_info(|| {
                WidgetInfo::selected(Role::Button, true, p.in_model, format!("point {}", p.label))
            });
            if resp.clicked() {
                clicked = Some(i);
            }
            let hovered = resp.hovered();
            resp.on_hover_ui(|ui| {
                ui.label(format!(
                    "{} {}: |effect| {}. Click to {} the model.",
                    p.label,
                    sign_label(p.positive),
                    fmt_num(p.abs_effect, 4),
                    if p.in_model {
                        "remove it from"
                    } else {
                        "add it to"
                    }
                ));
            });
            let r = if hovered { MARKER_R + 1.5 } else { MARKER_R };
            paint_effect_marker(ui, c, p.positive, p.in_model, r, pal);
        }
        // Labels of the points that matter, each where it overlaps no other label.
        let font = FontId::proportional(LABEL_SIZE);
        let order = &self.labelled;
        let galleys: Vec<_> = order
            .iter()
            .map(|&i| {
                let p = &self.points[i];
                ui.painter().layout_no_wrap(
                    format!("{} {}", p.label, sign_label(p.positive)),
                    font.clone(),
                    pal.model_colour(p.in_model),
                )
            })
            .collect();
        let wishes: Vec<Vec<Rect>> = order
            .iter()
            .zip(&galleys)
            .map(|(&i, g)| {
                let p = &self.points[i];
                let at = frame.to_screen(p.abs_effect, p.quantile);
                place::around(at, g.size(), MARKER_R, Sides::All, 3)
            })
            .collect();
        let spots = place::place(&wishes, &obstacles, frame.rect, 2.0);
        for ((&i, galley), spot) in order.iter().zip(galleys).zip(spots) {
            let Some(r) = spot else {
                continue;
            };
            let p = &self.points[i];
            let at = frame.to_screen(p.abs_effect, p.quantile);
            let colour = if p.in_model { pal.ink } else { pal.muted };
            if place::is_displaced(r, at) {
                ui.painter()
                    .line_segment([at, place::leader_end(r, at)], Stroke::new(0.8, pal.muted));
            }
            ui.painter().galley(r.min, galley, colour);
        }
        clicked
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn point(label: &str, abs_effect: f64, in_model: bool) -> HalfNormalPoint {
        HalfNormalPoint {
            label: label.into(),
            abs_effect,
            quantile: abs_effect,
            positive: true,
            in_model,
        }
    }

    #[test]
    fn the_model_and_the_largest_effects_are_labelled_and_the_crowd_near_zero_is_not() {
        let mut points: Vec<HalfNormalPoint> = (0..12)
            .map(|i| point(&format!("T{i}"), 0.01 * f64::from(i), false))
            .collect();
        points.push(point("A", 10.0, true));
        points.push(point("B", 6.0, false));
        // A small effect chosen into the model still carries its label.
        points[0].in_model = true;
        let plot = HalfNormalPlot::new(points, None, None);
        let names: Vec<&str> = plot
            .labelled()
            .iter()
            .map(|&i| plot.points[i].label.as_str())
            .collect();
        assert_eq!(names[..2], ["A", "T0"], "the model first, largest first");
        assert_eq!(names[2], "B");
        assert_eq!(names.len(), 2 + (LABELLED_LARGEST - 1));
        assert!(!names.contains(&"T1"), "{names:?}");
    }
}
