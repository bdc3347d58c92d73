//! The look of the window: a light and a dark theme of our own, and the colours and marker shapes
//! the plots use.
//!
//! Colours come from the Okabe–Ito palette (Okabe & Ito 2008, "Color Universal Design"), which
//! stays distinguishable for the common forms of colour blindness. The sign of an effect is never a
//! colour: it is a marker shape (triangle up or down) and a `+`/`−` label; colour on an effect
//! says only whether its term is in the model (accent) or not (muted), see [`Palette::model_colour`].
//!
//! The light theme is a warm paper tone with dark ink, meant for a bright lab; the dark theme is a
//! blue-slate for a dim room. Body text is larger than egui's default so that a laptop on a bench
//! stays readable from a step away.

use std::sync::Arc;

use egui::{
    Color32, CornerRadius, FontData, FontDefinitions, FontFamily, FontId, Stroke, TextStyle,
};

// The window's faces are DejaVu Sans Condensed (licence in `assets/fonts/`): a regular weight
// reads better at arm's length than egui's light default, and it has the symbols we draw (warning
// sign, arrows, check marks), so nothing shows as an empty box. The bytes are those the exported
// pages use (`export::fonts`), read where the fonts are installed rather than copied into
// statics of their own, so the program carries one copy of each face.

/// The family of bold text (headings, the next-run card, values at arm's length).
pub fn bold_family() -> FontFamily {
    FontFamily::Name("twofold-bold".into())
}

/// A bold font of `size` points.
pub fn bold(size: f32) -> FontId {
    FontId::new(size, bold_family())
}

/// Installs our faces ahead of egui's defaults (which stay as fallbacks).
pub fn install_fonts(ctx: &egui::Context) {
    let mut fonts = FontDefinitions::default();
    fonts.font_data.insert(
        "twofold-regular".into(),
        Arc::new(FontData::from_static(twofold_study::export::fonts::REGULAR)),
    );
    fonts.font_data.insert(
        "twofold-bold".into(),
        Arc::new(FontData::from_static(twofold_study::export::fonts::BOLD)),
    );
    let fallbacks = fonts
        .families
        .get(&FontFamily::Proportional)
        .cloned()
        .unwrap_or_default();
    let mut proportional = vec!["twofold-regular".to_string()];
    proportional.extend(fallbacks.iter().cloned());
    fonts
        .families
        .insert(FontFamily::Proportional, proportional);
    let mut bold = vec!["twofold-bold".to_string(), "twofold-regular".to_string()];
    bold.extend(fallbacks);
    fonts.families.insert(bold_family(), bold);
    if let Some(mono) = fonts.families.get_mut(&FontFamily::Monospace) {
        mono.push("twofold-regular".into());
    }
    ctx.set_fonts(fonts);
}

/// The Okabe–Ito colours, by their published names.
pub mod okabe_ito {
    use egui::Color32;
    /// Orange.
    pub const ORANGE: Color32 = Color32::from_rgb(0xE6, 0x9F, 0x00);
    /// Sky blue.
    pub const SKY_BLUE: Color32 = Color32::from_rgb(0x56, 0xB4, 0xE9);
    /// Bluish green.
    pub const BLUISH_GREEN: Color32 = Color32::from_rgb(0x00, 0x9E, 0x73);
    /// Yellow.
    pub const YELLOW: Color32 = Color32::from_rgb(0xF0, 0xE4, 0x42);
    /// Blue.
    pub const BLUE: Color32 = Color32::from_rgb(0x00, 0x72, 0xB2);
    /// Vermillion.
    pub const VERMILLION: Color32 = Color32::from_rgb(0xD5, 0x5E, 0x00);
    /// Reddish purple.
    pub const REDDISH_PURPLE: Color32 = Color32::from_rgb(0xCC, 0x79, 0xA7);
}

/// Which of the two themes is shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum ThemeChoice {
    /// Warm paper tone, dark ink.
    #[default]
    Light,
    /// Blue-slate, light ink.
    Dark,
}

impl ThemeChoice {
    /// The other theme.
    #[must_use]
    pub fn toggled(self) -> ThemeChoice {
        match self {
            ThemeChoice::Light => ThemeChoice::Dark,
            ThemeChoice::Dark => ThemeChoice::Light,
        }
    }
}

/// Colours the panes and plots draw with, for one theme.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Palette {
    /// Whether this is the dark theme.
    pub dark: bool,
    /// Main text.
    pub ink: Color32,
    /// Secondary text, axis labels.
    pub muted: Color32,
    /// Plot background.
    pub plot_bg: Color32,
    /// Grid lines.
    pub grid: Color32,
    /// Axis lines.
    pub axis: Color32,
    /// Accent for selection and the current run.
    pub accent: Color32,
    /// Terms in the model (outline and highlight).
    pub in_model: Color32,
    /// Warnings (safe range, aliasing, curvature).
    pub warn: Color32,
    /// Errors (a cell that is not a number).
    pub error: Color32,
    /// Good state (run done).
    pub ok: Color32,
    /// Background of warning boxes.
    pub warn_bg: Color32,
    /// Background of the next-run card.
    pub card_bg: Color32,
}

impl Palette {
    /// The palette of a theme.
    pub fn of(choice: ThemeChoice) -> Palette {
        match choice {
            ThemeChoice::Light => Palette {
                dark: false,
                ink: Color32::from_rgb(0x22, 0x24, 0x2A),
                muted: Color32::from_rgb(0x5E, 0x61, 0x68),
                plot_bg: Color32::from_rgb(0xFF, 0xFE, 0xFB),
                grid: Color32::from_rgb(0xE4, 0xE0, 0xD6),
                axis: Color32::from_rgb(0x6B, 0x6E, 0x75),
                accent: okabe_ito::BLUE,
                in_model: okabe_ito::BLUISH_GREEN,
                warn: Color32::from_rgb(0xA8, 0x4A, 0x00),
                error: Color32::from_rgb(0xB0, 0x1E, 0x1E),
                ok: Color32::from_rgb(0x00, 0x7A, 0x59),
                warn_bg: Color32::from_rgb(0xFD, 0xF0, 0xD5),
                card_bg: Color32::from_rgb(0xE8, 0xF1, 0xF7),
            },
            ThemeChoice::Dark => Palette {
                dark: true,
                ink: Color32::from_rgb(0xE8, 0xEA, 0xEE),
                muted: Color32::from_rgb(0xA4, 0xAB, 0xB6),
                plot_bg: Color32::from_rgb(0x1A, 0x20, 0x29),
                grid: Color32::from_rgb(0x2F, 0x37, 0x43),
                axis: Color32::from_rgb(0x8C, 0x95, 0xA3),
                accent: okabe_ito::SKY_BLUE,
                in_model: okabe_ito::BLUISH_GREEN,
                warn: okabe_ito::ORANGE,
                error: Color32::from_rgb(0xFF, 0x7A, 0x6E),
                ok: okabe_ito::BLUISH_GREEN,
                warn_bg: Color32::from_rgb(0x3B, 0x2E, 0x16),
                card_bg: Color32::from_rgb(0x1F, 0x33, 0x45),
            },
        }
    }

    /// The colour of an effect, a term or its plot: the accent when the term is in the model,
    /// muted grey when it is not. The only colour code of effects (their sign is a shape).
    pub fn model_colour(&self, in_model: bool) -> Color32 {
        if in_model { self.accent } else { self.muted }
    }
}

/// The `+` / `−` label that goes with a sign (a real minus sign, not a hyphen).
pub fn sign_label(positive: bool) -> &'static str {
    if positive { "+" } else { "\u{2212}" }
}

/// The palette of the theme currently applied to `ctx`.
pub fn palette(ctx: &egui::Context) -> Palette {
    if ctx.global_style().visuals.dark_mode {
        Palette::of(ThemeChoice::Dark)
    } else {
        Palette::of(ThemeChoice::Light)
    }
}

/// Applies a theme (visuals and text sizes) to the context.
pub fn apply(ctx: &egui::Context, choice: ThemeChoice) {
    let pal = Palette::of(choice);
    let mut style = (*ctx.global_style()).clone();
    style.visuals = visuals(choice, &pal);
    // Larger than egui's defaults: read from a step away on a bench laptop.
    style.text_styles = [
        (
            TextStyle::Small,
            FontId::new(12.5, FontFamily::Proportional),
        ),
        (TextStyle::Body, FontId::new(15.0, FontFamily::Proportional)),
        (
            TextStyle::Button,
            FontId::new(15.0, FontFamily::Proportional),
        ),
        (
            TextStyle::Heading,
            FontId::new(21.0, FontFamily::Proportional),
        ),
        (
            TextStyle::Monospace,
            FontId::new(14.5, FontFamily::Monospace),
        ),
    ]
    .into();
    style.spacing.item_spacing = egui::vec2(8.0, 6.0);
    style.spacing.button_padding = egui::vec2(8.0, 4.0);
    style.spacing.interact_size.y = 24.0;
    ctx.set_global_style(style);
}

fn visuals(choice: ThemeChoice, pal: &Palette) -> egui::Visuals {
    let mut v = match choice {
        ThemeChoice::Light => egui::Visuals::light(),
        ThemeChoice::Dark => egui::Visuals::dark(),
    };
    let (panel, window, extreme, faint, widget, hover, active, stroke) = match choice {
        ThemeChoice::Light => (
            Color32::from_rgb(0xF5, 0xF2, 0xEA),
            Color32::from_rgb(0xFA, 0xF8, 0xF3),
            Color32::from_rgb(0xFF, 0xFE, 0xFB),
            Color32::from_rgb(0xEE, 0xEA, 0xE0),
            Color32::from_rgb(0xE6, 0xE1, 0xD5),
            Color32::from_rgb(0xDB, 0xE6, 0xEE),
            Color32::from_rgb(0xC4, 0xD7, 0xE6),
            Color32::from_rgb(0xC9, 0xC3, 0xB5),
        ),
        ThemeChoice::Dark => (
            Color32::from_rgb(0x20, 0x26, 0x30),
            Color32::from_rgb(0x24, 0x2B, 0x36),
            Color32::from_rgb(0x15, 0x1A, 0x22),
            Color32::from_rgb(0x27, 0x2E, 0x39),
            Color32::from_rgb(0x31, 0x3A, 0x47),
            Color32::from_rgb(0x3A, 0x4A, 0x5C),
            Color32::from_rgb(0x2B, 0x4F, 0x6B),
            Color32::from_rgb(0x44, 0x4F, 0x5E),
        ),
    };
    v.panel_fill = panel;
    v.window_fill = window;
    v.extreme_bg_color = extreme;
    v.faint_bg_color = faint;
    v.window_stroke = Stroke::new(1.0, stroke);
    v.warn_fg_color = pal.warn;
    v.error_fg_color = pal.error;
    v.hyperlink_color = pal.accent;
    v.selection.bg_fill = pal.accent.gamma_multiply(0.35);
    v.selection.stroke = Stroke::new(1.0, pal.ink);
    v.override_text_color = None;
    v.widgets.noninteractive.bg_fill = panel;
    v.widgets.noninteractive.weak_bg_fill = panel;
    v.widgets.noninteractive.bg_stroke = Stroke::new(1.0, stroke);
    v.widgets.noninteractive.fg_stroke = Stroke::new(1.0, pal.ink);
    v.widgets.inactive.weak_bg_fill = widget;
    v.widgets.inactive.bg_fill = widget;
    v.widgets.inactive.fg_stroke = Stroke::new(1.0, pal.ink);
    // A visible edge on every control: radio buttons and check boxes must be found at a glance.
    v.widgets.inactive.bg_stroke = Stroke::new(1.0, stroke);
    v.widgets.hovered.weak_bg_fill = hover;
    v.widgets.hovered.bg_fill = hover;
    v.widgets.hovered.bg_stroke = Stroke::new(1.0, pal.accent);
    v.widgets.active.weak_bg_fill = active;
    v.widgets.active.bg_fill = active;
    v.widgets.active.bg_stroke = Stroke::new(1.5, pal.accent);
    v.widgets.open.weak_bg_fill = hover;
    for w in [
        &mut v.widgets.noninteractive,
        &mut v.widgets.inactive,
        &mut v.widgets.hovered,
        &mut v.widgets.active,
        &mut v.widgets.open,
    ] {
        // Squarer corners than egui's default: part of our own look.
        w.corner_radius = CornerRadius::same(3);
    }
    v.window_corner_radius = CornerRadius::same(4);
    v.menu_corner_radius = CornerRadius::same(3);
    v.striped = true;
    v
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Relative luminance (WCAG 2.1, section "relative luminance").
    fn luminance(c: Color32) -> f64 {
        let ch = |u: u8| {
            let s = f64::from(u) / 255.0;
            if s <= 0.04045 {
                s / 12.92
            } else {
                ((s + 0.055) / 1.055).powf(2.4)
            }
        };
        0.2126 * ch(c.r()) + 0.7152 * ch(c.g()) + 0.0722 * ch(c.b())
    }

    fn contrast(a: Color32, b: Color32) -> f64 {
        let (la, lb) = (luminance(a), luminance(b));
        (la.max(lb) + 0.05) / (la.min(lb) + 0.05)
    }

    #[test]
    fn text_and_warnings_meet_wcag_contrast_on_both_themes() {
        // WCAG 2.1 AA asks 4.5:1 for body text and 3:1 for large text and graphics.
        for choice in [ThemeChoice::Light, ThemeChoice::Dark] {
            let p = Palette::of(choice);
            assert!(contrast(p.ink, p.plot_bg) >= 7.0, "{choice:?} ink");
            assert!(contrast(p.muted, p.plot_bg) >= 4.5, "{choice:?} muted");
            assert!(contrast(p.warn, p.warn_bg) >= 4.5, "{choice:?} warn");
            assert!(contrast(p.error, p.plot_bg) >= 4.5, "{choice:?} error");
            for in_model in [true, false] {
                assert!(
                    contrast(p.model_colour(in_model), p.plot_bg) >= 3.0,
                    "{choice:?} in the model: {in_model}"
                );
            }
        }
    }

    #[test]
    fn in_and_out_of_the_model_differ_in_colour_and_the_signs_in_label() {
        for choice in [ThemeChoice::Light, ThemeChoice::Dark] {
            let p = Palette::of(choice);
            assert_ne!(p.model_colour(true), p.model_colour(false));
            assert_eq!(p.model_colour(true), p.accent);
        }
        assert_eq!(sign_label(true), "+");
        assert_eq!(sign_label(false), "\u{2212}");
    }
}
