//! The Box–Cox section of the residuals pane: the profile log-likelihood of the power λ, its
//! 95 % interval, the best λ and the λ of the transform in use, and one sentence saying whether
//! the response wants a transform, with a button that applies the one it points to.
//!
//! It draws the core's [`BoxCox`] directly; the only thing it reads from the project is the
//! transform in use. The button pushes an [`Edit::SetTransform`] command: nothing changes while
//! drawing.

use egui::{RichText, Ui};
use twofold_core::boxcox::BoxCox;
use twofold_study::project::{Edit, ResponseTransform};

use super::Command;
use super::chart::fmt_num;
use crate::theme::Palette;

/// The Box–Cox λ a project transform stands for. The base-10 logarithm is the natural one times a
/// constant, so it stands for λ = 0 like the natural one.
pub fn lambda_of(t: ResponseTransform) -> f64 {
    match t {
        ResponseTransform::None => 1.0,
        ResponseTransform::Ln | ResponseTransform::Log10 => 0.0,
        ResponseTransform::Sqrt => 0.5,
        ResponseTransform::Reciprocal => -1.0,
        ResponseTransform::Power { lambda } => lambda,
    }
}

/// The common powers: λ, the name in words, the project transform that applies it.
const COMMON: [(f64, &str, ResponseTransform); 5] = [
    (1.0, "no transform", ResponseTransform::None),
    (0.5, "square root", ResponseTransform::Sqrt),
    (0.0, "natural log", ResponseTransform::Ln),
    (
        -0.5,
        "inverse square root",
        ResponseTransform::Power { lambda: -0.5 },
    ),
    (-1.0, "inverse (1 / y)", ResponseTransform::Reciprocal),
];

/// The project transform that applies the power `lambda` (the common powers by their own names).
pub fn transform_for(lambda: f64) -> ResponseTransform {
    COMMON
        .iter()
        .find(|c| c.0 == lambda)
        .map_or(ResponseTransform::Power { lambda }, |c| c.2)
}

/// The name of the power `lambda` in words, as the transform choice in the model pane reads.
pub fn power_name(lambda: f64) -> String {
    COMMON.iter().find(|c| c.0 == lambda).map_or_else(
        || format!("power {}", fmt_num(lambda, 3)),
        |c| c.1.to_string(),
    )
}

/// What the profile says about the response, in one sentence, and the power it points to (when
/// one of the common powers lies inside the interval).
#[derive(Debug, Clone, PartialEq)]
pub struct Verdict {
    /// The sentence.
    pub text: String,
    /// The power to apply: 1 when the interval holds 1, otherwise the common power nearest the
    /// best λ inside the interval; `None` when no common power lies inside.
    pub target: Option<f64>,
}

/// The interval for λ in words; an open end says it lies beyond the range searched.
fn interval_text(bc: &BoxCox) -> String {
    let lo = bc.lower.map_or("below −2".to_string(), |l| fmt_num(l, 2));
    let hi = bc.upper.map_or("above 2".to_string(), |u| fmt_num(u, 2));
    format!("{lo} to {hi}")
}

/// Reads the profile: λ = 1 inside the 95 % interval means the response needs no transform;
/// otherwise the common power the core suggests (Box & Cox 1964, section 3: the interval is the
/// likelihood-ratio one).
pub fn verdict(bc: &BoxCox) -> Verdict {
    let head = format!(
        "Best λ {}, 95 % interval {}",
        fmt_num(bc.lambda, 2),
        interval_text(bc)
    );
    if bc.one_inside() {
        return Verdict {
            text: format!("{head}: it holds 1, so the response needs no transform."),
            target: Some(1.0),
        };
    }
    match bc.suggestion {
        Some((p, _)) => Verdict {
            text: format!(
                "{head}: it leaves out 1, so the {} (λ = {}) suits the data better than the values as measured.",
                power_name(p),
                fmt_num(p, 2)
            ),
            target: Some(p),
        },
        None => Verdict {
            text: format!(
                "{head}: it leaves out 1 and every common power; consider the power {} itself or look for an odd run.",
                fmt_num(bc.lambda, 2)
            ),
            target: None,
        },
    }
}

/// The label of the button that applies the power `lambda`.
pub fn apply_label(lambda: f64) -> String {
    if lambda == 1.0 {
        "Analyse the values as measured".into()
    } else {
        format!("Use the {}", power_name(lambda))
    }
}

/// Draws the Box–Cox section for `response`, whose transform in use is `current`. A click on the
/// button pushes the edit that applies the suggested transform.
pub fn show(
    ui: &mut Ui,
    pal: &Palette,
    bc: &BoxCox,
    current: ResponseTransform,
    response: usize,
    size: egui::Vec2,
    out: &mut Vec<Command>,
) {
    let v = verdict(bc);
    let now = lambda_of(current);
    ui.vertical(|ui| {
        ui.set_width(size.x);
        ui.label("Box–Cox: which power of the response fits the model best");
        ui.label(RichText::new(&v.text).strong());
        ui.horizontal_wrapped(|ui| {
            let in_use = format!("In use now: {} (λ = {}).", power_name(now), fmt_num(now, 2));
            match v.target {
                Some(t) if t != now => {
                    if ui.button(apply_label(t)).clicked() {
                        out.push(Command::Edit(Edit::SetTransform {
                            response,
                            transform: transform_for(t),
                        }));
                    }
                    ui.weak(in_use);
                }
                Some(_) => {
                    ui.weak(format!("In use now: {}, as suggested.", power_name(now)));
                }
                None => {
                    ui.weak(in_use);
                }
            }
        });
        profile_plot(ui, pal, bc, now, size);
        ui.weak(KEY);
    });
}

/// The key under the profile: every mark told by its shape or line style, not by colour alone.
const KEY: &str = "◆ best λ · dotted line: λ in use · shaded band: 95 % interval (log-likelihood above the dashed cut-off). Computed on the values as measured, so it stays put when a transform is applied.";

/// The profile log-likelihood against λ, with the interval shaded, the cut-off dashed, the best λ
/// and the λ in use marked (the two by different line styles and names, not by colour alone).
fn profile_plot(ui: &mut Ui, pal: &Palette, bc: &BoxCox, now: f64, size: egui::Vec2) {
    use egui_plot::{HLine, Line, LineStyle, MarkerShape, Plot, PlotPoints, Points, Span, VLine};
    let (lo, hi) = twofold_core::boxcox::LAMBDA_RANGE;
    let band = (bc.lower.unwrap_or(lo), bc.upper.unwrap_or(hi));
    // The whole curve is drawn (a sharp peak is what strong evidence looks like), with room
    // above the maximum for the band's name.
    let profile: Vec<[f64; 2]> = bc.profile.iter().map(|&(l, ll)| [l, ll]).collect();
    let lowest = profile.iter().map(|p| p[1]).fold(bc.cutoff, f64::min);
    let y_high = bc.max_log_likelihood + 0.15 * (bc.max_log_likelihood - lowest).max(1.0);
    let (ink, accent, in_model, muted) = (pal.ink, pal.accent, pal.in_model, pal.muted);
    let best = [bc.lambda, bc.max_log_likelihood];
    let cutoff = bc.cutoff;
    Plot::new(ui.scope_id().with("box-cox-profile"))
        .width(size.x)
        .height(size.y)
        .x_axis_label("λ (power of the response)")
        .y_axis_label("log-likelihood")
        .x_grid_spacer(super::chart::nice_grid)
        .y_grid_spacer(super::chart::nice_grid)
        .include_x(lo)
        .include_x(hi)
        .include_x(now)
        .include_y(lowest)
        .include_y(y_high)
        .show_background(false)
        .label_formatter(|hover: &egui_plot::HoverPosition<'_>| match hover {
            egui_plot::HoverPosition::NearDataPoint { position, .. }
            | egui_plot::HoverPosition::Elsewhere { position } => Some(format!(
                "λ {}: log-likelihood {}",
                fmt_num(position.x, 3),
                fmt_num(position.y, 4)
            )),
        })
        .show(ui, |plot| {
            plot.span(
                Span::new("95 % interval", band.0..=band.1)
                    .label_align(egui::Align2::LEFT_TOP)
                    .fill(accent.gamma_multiply(0.12))
                    .border_color(accent.gamma_multiply(0.5)),
            );
            plot.hline(
                HLine::new("95 % cut-off", cutoff)
                    .color(muted)
                    .style(LineStyle::dashed_loose()),
            );
            plot.line(
                Line::new("log-likelihood", PlotPoints::from(profile))
                    .color(ink)
                    .width(1.8),
            );
            plot.vline(
                VLine::new("λ in use", now)
                    .color(in_model)
                    .width(2.0)
                    .style(LineStyle::dotted_dense()),
            );
            plot.points(
                Points::new("best λ", PlotPoints::from(vec![best]))
                    .shape(MarkerShape::Diamond)
                    .radius(6.0)
                    .filled(true)
                    .color(accent),
            );
        });
}

#[cfg(test)]
mod tests {
    use super::*;
    use twofold_core::transform::Transform;

    fn profile(lower: Option<f64>, upper: Option<f64>, lambda: f64) -> BoxCox {
        let mut bc = BoxCox {
            profile: vec![(lambda, 0.0)],
            lambda,
            max_log_likelihood: 0.0,
            cutoff: -1.92,
            lower,
            upper,
            suggestion: None,
        };
        // The core's rule (common power nearest the best λ inside the interval).
        bc.suggestion = twofold_core::boxcox::STANDARD_POWERS
            .iter()
            .filter(|(p, _)| bc.contains(*p))
            .min_by(|a, b| (a.0 - lambda).abs().total_cmp(&(b.0 - lambda).abs()))
            .copied();
        bc
    }

    #[test]
    fn an_interval_holding_one_needs_no_transform() {
        // Common practice, no source: λ = 1 inside the interval means no transform.
        let v = verdict(&profile(Some(0.4), Some(1.6), 0.9));
        assert_eq!(v.target, Some(1.0));
        assert!(v.text.contains("needs no transform"), "{}", v.text);
    }

    #[test]
    fn an_interval_round_zero_points_to_the_log_and_the_button_sets_it() {
        let bc = profile(Some(-0.3), Some(0.35), 0.05);
        assert_eq!(bc.suggestion, Some((0.0, Transform::Ln)));
        let v = verdict(&bc);
        assert_eq!(v.target, Some(0.0));
        assert!(v.text.contains("natural log"), "{}", v.text);
        assert_eq!(transform_for(0.0), ResponseTransform::Ln);
        assert_eq!(transform_for(-1.0), ResponseTransform::Reciprocal);
        assert_eq!(
            transform_for(-0.5),
            ResponseTransform::Power { lambda: -0.5 }
        );
        assert_eq!(apply_label(0.0), "Use the natural log");
    }

    #[test]
    fn no_common_power_inside_says_so_and_offers_nothing() {
        let v = verdict(&profile(Some(1.7), None, 1.9));
        assert_eq!(v.target, None);
        assert!(v.text.contains("above 2"), "{}", v.text);
    }

    #[test]
    fn every_transform_maps_back_to_its_power() {
        for t in [
            ResponseTransform::None,
            ResponseTransform::Ln,
            ResponseTransform::Sqrt,
            ResponseTransform::Reciprocal,
            ResponseTransform::Power { lambda: -0.5 },
        ] {
            assert_eq!(transform_for(lambda_of(t)), t);
        }
        assert_eq!(lambda_of(ResponseTransform::Log10), 0.0);
    }
}
