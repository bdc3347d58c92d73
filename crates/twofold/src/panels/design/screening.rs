//! Plackett–Burman screening designs in the options table: the run sizes that are multiples of
//! four but not powers of two, between the smallest regular fractions, for up to N − 1 factors.

use egui::{RichText, Ui};

use super::{DesignPane, pick_label, power};
use crate::panels::View;
use twofold_core::ofat;
use twofold_core::screening::SCREENING_RUNS;
use twofold_study::project::DesignSettings;

/// The screening sizes offered for `k` factors: those that hold them and are smaller than the
/// largest regular option (a bigger screening design than the regular ones gains nothing).
pub(super) fn sizes(k: usize, regular: &[usize]) -> Vec<usize> {
    let largest = regular.iter().copied().max().unwrap_or(0);
    SCREENING_RUNS
        .iter()
        .copied()
        .filter(|&n| n > k && n < largest && k <= twofold_core::term::MAX_FACTORS)
        .collect()
}

/// The screening designs for `k` factors, in a table of their own under the regular fractions
/// (they are not fractions: main effects only, partially aliased with interactions).
pub(super) fn table(
    pane: &mut DesignPane,
    ui: &mut Ui,
    view: &View<'_>,
    k: usize,
    draft: &mut DesignSettings,
    regular: &[usize],
) {
    let offered = sizes(k, regular);
    if offered.is_empty() {
        return;
    }
    ui.add_space(4.0);
    let chosen = offered.iter().any(|&n| is_screening(draft, n));
    egui::CollapsingHeader::new(SCREENING_HEADER)
        .default_open(chosen)
        .show(ui, |ui| {
            ui.label(
                RichText::new(
                    "Run sizes between the powers of two: main effects only, each partially aliased with two-factor interactions.",
                )
                .color(view.pal.muted),
            );
            egui::Grid::new("screening_options")
                .striped(true)
                .num_columns(8)
                .spacing([14.0, 4.0])
                .show(ui, |ui| {
                    for h in [
                        "",
                        "Runs",
                        "Resolution",
                        "Aliasing",
                        "Clear 2FIs",
                        "One-at-a-time equivalent",
                        "Construction",
                    ] {
                        ui.label(RichText::new(h).strong().color(view.pal.muted));
                    }
                    if let Some(h) = power::power_heading(&view.project.power) {
                        ui.label(RichText::new(h).strong().color(view.pal.muted));
                    }
                    ui.end_row();
                    for n in offered {
                        row(pane, ui, view, k, draft, n);
                    }
                });
        });
}

/// The heading that opens the screening designs.
pub const SCREENING_HEADER: &str = "Screening designs (Plackett–Burman)";

/// Whether the draft is the screening design of `n` runs.
pub(super) fn is_screening(draft: &DesignSettings, n: usize) -> bool {
    draft.base_runs == u32::try_from(n).ok() && draft.generators.iter().all(|g| g.trim().is_empty())
}

/// One row of the options table for the `n`-run screening design.
fn row(
    pane: &mut DesignPane,
    ui: &mut Ui,
    view: &View<'_>,
    k: usize,
    draft: &mut DesignSettings,
    n: usize,
) {
    let selected = is_screening(draft, n);
    let resp = ui.radio(selected, "").accessible_name(pick_label(n));
    if resp.clicked() {
        draft.generators.clear();
        draft.base_runs = u32::try_from(n).ok();
        draft.fold = None;
        draft.added = None;
        pane.generator_text.clear();
        pane.focus_make = true;
    }
    ui.label(RichText::new(n.to_string()).strong());
    ui.label("—").on_hover_text(
        "Not a regular fraction: main effects are orthogonal, and each is partially aliased with two-factor interactions",
    );
    ui.label("partial aliasing");
    ui.label("0");
    let equivalent = ofat::equivalent_runs(k, n);
    ui.label(equivalent.to_string()).on_hover_text(format!(
        "Measuring one factor at a time would need about {equivalent} runs for the same precision of every main effect."
    ));
    ui.label("Plackett–Burman (screening)");
    if let Some((text, tip)) = pane.power_cells.cell(&view.project.power, draft, k, n) {
        ui.label(text).on_hover_text(tip);
    }
    ui.end_row();
}
