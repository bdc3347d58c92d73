//! Charts drawn into a page: the half-normal plot and interaction plots.
//!
//! Both draw only the numbers they are handed. An effect's sign is its marker's shape (▲ raises
//! the response, ▼ lowers it) and the `+`/`−` after its label; colour says only whether the term
//! is in the model (accent, filled) or not (grey, hollow). The two lines of an interaction plot
//! are told apart by marker shape and line style, never by colour.

use super::input::{HalfNormalPoint, InteractionPanel, LenthFacts};
use super::page::{Rect, sizes};
pub use crate::numbers::Ticks;

use super::svg::{ACCENT, ALERT, Anchor, INK, MUTED, QUIET, RULE, Svg, TextStyle};

/// A linear map from data to page coordinates.
#[derive(Debug, Clone, Copy)]
struct Scale {
    d0: f64,
    d1: f64,
    p0: f64,
    p1: f64,
}

impl Scale {
    fn at(&self, v: f64) -> f64 {
        let span = self.d1 - self.d0;
        if span == 0.0 {
            return (self.p0 + self.p1) / 2.0;
        }
        self.p0 + (v - self.d0) / span * (self.p1 - self.p0)
    }
}

/// Rectangles of labels already placed, so later labels avoid them.
#[derive(Default)]
struct Placed(Vec<Rect>);

impl Placed {
    fn free(&self, r: &Rect) -> bool {
        self.0
            .iter()
            .all(|o| r.x + r.w <= o.x || o.x + o.w <= r.x || r.y + r.h <= o.y || o.y + o.h <= r.y)
    }
}

fn axes_frame(svg: &mut Svg, plot: Rect) {
    svg.rect(plot.x, plot.y, plot.w, plot.h, None, Some((INK, 2.0)));
}

fn x_ticks(svg: &mut Svg, plot: Rect, ticks: &Ticks, sx: Scale) {
    let style = TextStyle::new(sizes::SMALL)
        .fill(MUTED)
        .anchor(Anchor::Middle);
    for v in ticks.values() {
        let x = sx.at(v);
        svg.line(
            (x, plot.y + plot.h),
            (x, plot.y + plot.h + 12.0),
            INK,
            2.0,
            None,
        );
        svg.text(
            x,
            plot.y + plot.h + 12.0 + style.size,
            &ticks.label(v),
            style,
        );
    }
}

fn y_ticks(svg: &mut Svg, plot: Rect, ticks: &Ticks, sy: Scale, grid: bool) {
    let style = TextStyle::new(sizes::SMALL).fill(MUTED).anchor(Anchor::End);
    for v in ticks.values() {
        let y = sy.at(v);
        if grid && y > plot.y + 1.0 && y < plot.y + plot.h - 1.0 {
            svg.line((plot.x, y), (plot.x + plot.w, y), "#e2e2e2", 1.5, None);
        }
        svg.line((plot.x - 12.0, y), (plot.x, y), INK, 2.0, None);
        svg.text(plot.x - 18.0, y + style.size * 0.35, &ticks.label(v), style);
    }
}

/// Length of the longest tick label of an axis (1 for an axis without ticks), for the room left
/// of the plot.
fn widest_label(ticks: &Ticks) -> usize {
    ticks
        .values()
        .iter()
        .map(|v| ticks.label(*v).len())
        .max()
        .unwrap_or(1)
}

/// Room left of and below a plot area for tick labels and axis titles.
fn plot_area(area: Rect, y_label_chars: usize) -> Rect {
    let small = sizes::SMALL;
    let left = small * (1.6 + 0.62 * y_label_chars as f64) + 30.0;
    let bottom = small * 3.0 + 14.0;
    let top = small * 0.6;
    Rect {
        x: area.x + left,
        y: area.y + top,
        w: (area.w - left - small * 0.6).max(10.0),
        h: (area.h - top - bottom).max(10.0),
    }
}

/// Draws the half-normal plot of effects into `area`: |effect| across, half-normal quantile up,
/// each effect a ▲ (positive) or ▼ (negative), filled in the accent colour when its term is in the
/// model and hollow grey when not, the largest effects labelled with their sign (`AB −`); with
/// Lenth's facts, the line |effect| = PSE × quantile and the ME and SME limits.
pub fn half_normal(
    svg: &mut Svg,
    area: Rect,
    points: &[HalfNormalPoint],
    lenth: Option<&LenthFacts>,
) {
    svg.begin_group("half-normal plot of effects");
    let finite: Vec<&HalfNormalPoint> = points
        .iter()
        .filter(|p| p.abs_effect.is_finite() && p.quantile.is_finite())
        .collect();
    let mut x_max = finite.iter().map(|p| p.abs_effect).fold(0.0, f64::max);
    if let Some(l) = lenth {
        for v in [l.me, l.sme] {
            if v.is_finite() {
                x_max = x_max.max(v);
            }
        }
    }
    let y_max = finite.iter().map(|p| p.quantile).fold(0.0, f64::max);
    let xt = Ticks::new(0.0, x_max * 1.04, 5);
    let yt = Ticks::new(0.0, y_max * 1.04, 4);
    let label_chars = widest_label(&yt);
    let plot = plot_area(area, label_chars);
    let sx = Scale {
        d0: xt.lo,
        d1: xt.hi,
        p0: plot.x,
        p1: plot.x + plot.w,
    };
    let sy = Scale {
        d0: yt.lo,
        d1: yt.hi,
        p0: plot.y + plot.h,
        p1: plot.y,
    };
    axes_frame(svg, plot);
    y_ticks(svg, plot, &yt, sy, true);
    x_ticks(svg, plot, &xt, sx);
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
    svg.text(
        plot.x + plot.w / 2.0,
        area.y + area.h - small.size * 0.2,
        "|effect|",
        small.anchor(Anchor::Middle),
    );
    svg.text_vertical(
        area.x + small.size * 0.8,
        plot.y + plot.h / 2.0,
        "half-normal quantile",
        small,
    );

    let mut placed = Placed::default();
    if let Some(l) = lenth {
        // The line the small (inactive) effects should follow if they are noise of spread PSE.
        if l.pse.is_finite() && l.pse > 0.0 {
            let z_end = yt.hi.min(xt.hi / l.pse);
            svg.line(
                (sx.at(0.0), sy.at(0.0)),
                (sx.at(l.pse * z_end), sy.at(z_end)),
                MUTED,
                2.0,
                Some(10.0),
            );
        }
        for (value, name, dash) in [(l.me, "ME", 14.0), (l.sme, "SME", 6.0)] {
            if !(value.is_finite() && value > 0.0 && value <= xt.hi) {
                continue;
            }
            let x = sx.at(value);
            svg.line((x, plot.y), (x, plot.y + plot.h), ALERT, 2.5, Some(dash));
            let style = TextStyle::new(sizes::SMALL)
                .fill(ALERT)
                .anchor(Anchor::Middle);
            let w = style.width(name);
            let mut r = Rect {
                x: x - w / 2.0,
                y: plot.y + 6.0,
                w,
                h: style.size * 1.1,
            };
            if !placed.free(&r) {
                r.y += style.size * 1.2;
            }
            svg.rect(r.x - 4.0, r.y, r.w + 8.0, r.h, Some("#ffffff"), None);
            svg.text(x, r.y + style.size * 0.9, name, style);
            placed.0.push(r);
        }
    }

    // Draw the small effects first so the labelled large ones sit on top.
    let mut order: Vec<&HalfNormalPoint> = finite.clone();
    order.sort_by(|a, b| a.abs_effect.total_cmp(&b.abs_effect));
    let r = 13.0;
    for p in &order {
        let c = (sx.at(p.abs_effect), sy.at(p.quantile));
        placed.0.push(Rect {
            x: c.0 - r,
            y: c.1 - r,
            w: 2.0 * r,
            h: 2.0 * r,
        });
        if p.in_model {
            svg.triangle(c, r, p.positive, Some(ACCENT), Some((ACCENT, 2.0)));
        } else {
            svg.triangle(c, r, p.positive, Some("#ffffff"), Some((QUIET, 3.0)));
        }
    }
    // Labels: the model terms and the largest effects, largest first, where there is room.
    let label_style = TextStyle::new(sizes::SMALL);
    let mut labelled = 0;
    for p in order.iter().rev() {
        if labelled >= 10 && !p.in_model {
            continue;
        }
        let c = (sx.at(p.abs_effect), sy.at(p.quantile));
        let style = if p.in_model {
            label_style.fill(ACCENT).bold()
        } else {
            label_style.fill(INK)
        };
        let label = format!("{} {}", p.term, if p.positive { "+" } else { "\u{2212}" });
        let w = style.width(&label);
        let h = style.size;
        let candidates = [
            Rect {
                x: c.0 + r + 6.0,
                y: c.1 - h / 2.0,
                w,
                h,
            },
            Rect {
                x: c.0 - r - 6.0 - w,
                y: c.1 - h / 2.0,
                w,
                h,
            },
            Rect {
                x: c.0 - w / 2.0,
                y: c.1 - r - 4.0 - h,
                w,
                h,
            },
            Rect {
                x: c.0 - w / 2.0,
                y: c.1 + r + 4.0,
                w,
                h,
            },
        ];
        let inside = |q: &Rect| {
            q.x >= plot.x
                && q.x + q.w <= plot.x + plot.w
                && q.y >= plot.y
                && q.y + q.h <= plot.y + plot.h
        };
        if let Some(spot) = candidates.iter().find(|q| inside(q) && placed.free(q)) {
            svg.text(spot.x, spot.y + h * 0.82, &label, style);
            placed.0.push(*spot);
            labelled += 1;
        }
    }
    svg.end_group();
}

/// Draws one interaction plot into `area` with the shared response axis `y_ticks`, titled
/// `y_label` (the response), and a legend that shows each line with its marker.
pub fn interaction(
    svg: &mut Svg,
    area: Rect,
    panel: &InteractionPanel,
    y_ticks: &Ticks,
    y_label: &str,
) {
    svg.begin_group(&format!("interaction plot {}", panel.term));
    let title = TextStyle::new(sizes::SMALL).bold();
    let title_text = super::page::ellipsize(
        &format!(
            "{}: {} × {}",
            panel.term, panel.x_factor, panel.trace_factor
        ),
        title,
        area.w,
    );
    svg.text(area.x, area.y + title.size, &title_text, title);
    let legend = TextStyle::new(sizes::SMALL).fill(MUTED);
    let legend_h = legend.size * (2.0 * sizes::LEADING + 0.4);
    let body = Rect {
        x: area.x,
        y: area.y + title.size * 1.4,
        w: area.w,
        h: (area.h - title.size * 1.4 - legend_h).max(10.0),
    };
    let label_chars = widest_label(y_ticks);
    let mut plot = plot_area(body, label_chars);
    // No axis title under an interaction plot: the level names say what the x axis is.
    plot.h += sizes::SMALL * 1.2;
    let sy = Scale {
        d0: y_ticks.lo,
        d1: y_ticks.hi,
        p0: plot.y + plot.h,
        p1: plot.y,
    };
    let inset = plot.w * 0.14;
    let xs = [plot.x + inset, plot.x + plot.w - inset];
    axes_frame(svg, plot);
    y_ticks_only(svg, plot, y_ticks, sy);
    let axis_title = TextStyle::new(sizes::SMALL);
    svg.text_vertical(
        area.x + axis_title.size * 0.8,
        plot.y + plot.h / 2.0,
        &super::page::ellipsize(y_label, axis_title, plot.h),
        axis_title,
    );
    let tick_style = TextStyle::new(sizes::SMALL)
        .fill(MUTED)
        .anchor(Anchor::Middle);
    for (i, x) in xs.iter().enumerate() {
        svg.line(
            (*x, plot.y + plot.h),
            (*x, plot.y + plot.h + 12.0),
            INK,
            2.0,
            None,
        );
        let label = super::page::ellipsize(&panel.x_levels[i], tick_style, plot.w / 2.0 - 8.0);
        svg.text(
            *x,
            plot.y + plot.h + 12.0 + tick_style.size,
            &label,
            tick_style,
        );
    }
    for t in 0..2 {
        let pts: Vec<(f64, f64)> = (0..2)
            .filter_map(|x| {
                panel.means[t][x]
                    .filter(|v| v.is_finite())
                    .map(|v| (xs[x], sy.at(v)))
            })
            .collect();
        let (colour, dash) = if t == 1 {
            (INK, None)
        } else {
            (INK, Some(12.0))
        };
        svg.polyline(&pts, colour, 4.0, dash);
        for p in &pts {
            if t == 1 {
                svg.circle(*p, 10.0, Some(INK), None);
            } else {
                svg.square(*p, 9.0, Some("#ffffff"), Some((INK, 3.0)));
            }
        }
    }
    // Legend under the plot, one line per level of the trace factor with the marker of its
    // points; the level is never cut, only the factor name (by whole words: it is in full in
    // the factor table on the same page).
    svg.begin_group(&format!("legend of {}", panel.term));
    for t in 0..2 {
        let ly =
            area.y + area.h - legend.size * 0.3 - (1 - t) as f64 * legend.size * sizes::LEADING;
        let dash = if t == 1 { None } else { Some(12.0) };
        let mid = ly - legend.size * 0.35;
        svg.line((area.x, mid), (area.x + 50.0, mid), INK, 4.0, dash);
        if t == 1 {
            svg.circle((area.x + 25.0, mid), 10.0, Some(INK), None);
        } else {
            svg.square((area.x + 25.0, mid), 9.0, Some("#ffffff"), Some((INK, 3.0)));
        }
        let level = format!(" = {}", panel.trace_levels[t]);
        let name_w = (area.w - 60.0 - legend.width(&level)).max(legend.size);
        let name = super::page::ellipsize(&panel.trace_factor, legend, name_w);
        svg.text(area.x + 60.0, ly, &format!("{name}{level}"), legend);
    }
    svg.end_group();
    svg.end_group();
}

fn y_ticks_only(svg: &mut Svg, plot: Rect, ticks: &Ticks, sy: Scale) {
    y_ticks(svg, plot, ticks, sy, true);
}

/// One response axis for a set of interaction plots, so their slopes compare honestly.
pub fn shared_interaction_ticks(panels: &[InteractionPanel]) -> Ticks {
    let values: Vec<f64> = panels
        .iter()
        .flat_map(|p| p.means.iter().flatten().flatten().copied())
        .filter(|v| v.is_finite())
        .collect();
    let lo = values.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if values.is_empty() {
        return Ticks::new(0.0, 1.0, 4);
    }
    Ticks::new(lo, hi, 4)
}

/// Draws a hairline box with a centred note in it (where a chart has nothing to show).
pub fn empty_box(svg: &mut Svg, area: Rect, note: &str) {
    svg.rect(area.x, area.y, area.w, area.h, None, Some((RULE, 2.0)));
    let style = TextStyle::new(sizes::SMALL)
        .fill(MUTED)
        .anchor(Anchor::Middle);
    let text = super::page::ellipsize(note, style, area.w - 20.0);
    svg.text(area.x + area.w / 2.0, area.y + area.h / 2.0, &text, style);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn half_normal_labels_model_terms() {
        let mut svg = Svg::new(1000.0, 1000.0, ("1in", "1in"));
        let points: Vec<HalfNormalPoint> = ["A", "B", "AB", "C"]
            .iter()
            .enumerate()
            .map(|(i, t)| HalfNormalPoint {
                term: t.to_string(),
                abs_effect: (i + 1) as f64 * 3.0,
                positive: i % 2 == 0,
                quantile: 0.3 + i as f64 * 0.5,
                in_model: *t == "AB",
            })
            .collect();
        let lenth = LenthFacts {
            pse: 1.0,
            me: 4.0,
            sme: 8.0,
            alpha: 0.05,
            df: 1.33,
        };
        half_normal(
            &mut svg,
            Rect {
                x: 0.0,
                y: 0.0,
                w: 900.0,
                h: 700.0,
            },
            &points,
            Some(&lenth),
        );
        let doc = svg.finish("t");
        // AB (third, positive, in the model) is labelled with its sign and drawn as a filled ▲;
        // C (fourth, negative, not in the model) as a hollow ▼.
        assert!(doc.contains(">AB +</text>"), "{doc}");
        assert!(doc.contains(">C \u{2212}</text>"), "{doc}");
        let markers: Vec<&str> = doc.lines().filter(|l| l.starts_with("<polygon")).collect();
        assert_eq!(markers.len(), 4);
        let filled = markers
            .iter()
            .filter(|l| l.contains(&format!("fill=\"{ACCENT}\"")))
            .count();
        assert_eq!(filled, 1, "only AB is in the model: {markers:?}");
        assert!(!doc.contains("<circle"), "no round markers for effects");
        assert!(doc.contains(">SME</text>"));
        assert!(doc.contains(">ME</text>"));
    }
}
