//! What each design option can see: the process standard deviation and the test's settings typed
//! once for the project, and a column of the options table with the smallest effect found with
//! the asked power (and the replicates an effect of interest needs). Figures from the engine's
//! `planning` module, as `plan --sigma` and the summary page show them.

use egui::Ui;

use crate::panels::widgets::{number_field, text_field};
use crate::panels::{Command, View};
use twofold_study::numbers::fmt_sig;
use twofold_study::planning::{RunCounts, design_power};
use twofold_study::project::{DesignSettings, Edit, PowerSettings};

/// Accessible name of the field naming the model the power is figured in.
pub const MODEL_FIELD: &str = "model terms of the power figures";

/// Accessible name of the process standard deviation field.
pub const SIGMA_FIELD: &str = "process standard deviation";

/// The row where σ, α, the power and an effect of interest are typed.
pub(super) fn power_row(ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
    let settings = view.project.power.clone();
    let mut next = settings.clone();
    let id = ui.scope_id().with("power_row");
    ui.horizontal_wrapped(|ui| {
        ui.label("Process standard deviation σ");
        let s = number_field(ui, id.with("sigma"), settings.sigma, 70.0, "unknown");
        if let Some(r) = ui.ctx().read_response(id.with("sigma")) {
            let _ = r.accessible_name(SIGMA_FIELD);
        }
        if let Some(v) = s.changed {
            next.sigma = Some(v);
        }
        ui.label("  test level α");
        if let Some(v) =
            number_field(ui, id.with("alpha"), Some(settings.alpha), 50.0, "0.05").changed
        {
            next.alpha = v;
        }
        ui.label("  power");
        if let Some(v) =
            number_field(ui, id.with("power"), Some(settings.power), 50.0, "0.8").changed
        {
            next.power = v;
        }
        ui.label("  effect that matters");
        if let Some(v) =
            number_field(ui, id.with("effect"), settings.effect, 80.0, "optional").changed
        {
            next.effect = Some(v);
        }
        ui.label("  model");
        if let Some(t) = text_field(
            ui,
            id.with("model"),
            &settings.model_terms,
            120.0,
            "main effects",
        ) {
            next.model_terms = t;
        }
        if let Some(r) = ui.ctx().read_response(id.with("model")) {
            let _ = r.accessible_name(MODEL_FIELD);
        }
        if settings.sigma.is_some() && ui.small_button("clear").clicked() {
            next = PowerSettings::default();
        }
    });
    ui.weak(
        "σ in the units of the response you plan for: from repeat measurements, or an earlier study's residual SD (\"Plan with this SD\" on \"Can the model be trusted?\"); the tables above then show the smallest effect each design finds with that power (two-sided t test of one effect in the main-effects model, or in the model named, e.g. A, B, C, AB).",
    );
    let k = view.project.factors.len();
    let unreadable: Vec<&str> = next
        .model_labels()
        .into_iter()
        .filter(|t| twofold_core::term::Term::parse(t, k).is_err())
        .collect();
    if !unreadable.is_empty() {
        ui.colored_label(
            view.pal.error,
            format!(
                "Not terms of these factors (left out of the count): {}",
                unreadable.join(", ")
            ),
        );
    }
    let bad = |p: f64| !(p > 0.0 && p < 1.0);
    if next.sigma.is_some_and(|s| s <= 0.0) || bad(next.alpha) || bad(next.power) {
        ui.colored_label(
            view.pal.error,
            "σ must be above 0, and α and the power between 0 and 1.",
        );
    } else if next != settings {
        out.push(Command::Edit(Edit::SetPower(next)));
    }
}

/// The column's heading, or `None` while σ is unknown.
pub(super) fn power_heading(settings: &PowerSettings) -> Option<String> {
    settings.sigma?;
    Some(format!(
        "Smallest effect seen (power {})",
        fmt_sig(settings.power, 2)
    ))
}

/// The text and hover text of one option's cell.
type CellText = Option<(String, String)>;

/// The power cells of the options, computed once for a (power settings, draft, factors) key:
/// each takes a noncentral-t root search, too slow to repeat every frame.
#[derive(Debug, Default)]
pub(super) struct PowerCells {
    key: Option<(PowerSettings, DesignSettings, usize)>,
    cells: Vec<(usize, CellText)>,
}

impl PowerCells {
    /// The cell of the option of `runs` runs (see [`power_cell`]).
    pub(super) fn cell(
        &mut self,
        settings: &PowerSettings,
        draft: &DesignSettings,
        factors: usize,
        runs: usize,
    ) -> CellText {
        let fresh = self
            .key
            .as_ref()
            .is_some_and(|(s, d, k)| s == settings && d == draft && *k == factors);
        if !fresh {
            self.key = Some((settings.clone(), draft.clone(), factors));
            self.cells.clear();
        }
        if let Some((_, c)) = self.cells.iter().find(|(n, _)| *n == runs) {
            return c.clone();
        }
        let c = power_cell(settings, draft, factors, runs);
        self.cells.push((runs, c.clone()));
        c
    }
}

/// The cell of one option: the smallest effect seen, and the replicates an effect of interest
/// needs.
fn power_cell(
    settings: &PowerSettings,
    draft: &DesignSettings,
    factors: usize,
    runs: usize,
) -> Option<(String, String)> {
    let counts = RunCounts::of(draft, factors, runs);
    let p = match design_power(&counts, settings)? {
        Ok(p) => p,
        Err(e) => return Some(("—".into(), e)),
    };
    let mut text = fmt_sig(p.detectable_effect, 3);
    if let Some(d) = p.effect {
        text.push_str(&match p.replicates_needed {
            Some(1) => format!("; {} found as is", fmt_sig(d, 3)),
            Some(r) => format!("; {} needs {r} replicates", fmt_sig(d, 3)),
            None => format!("; {} needs over 64 replicates", fmt_sig(d, 3)),
        });
    }
    let tip = format!(
        "{} error df; an effect of {} is found with probability {} at α = {}",
        p.error_df,
        fmt_sig(p.detectable_effect, 4),
        fmt_sig(p.power, 3),
        fmt_sig(p.alpha, 3)
    );
    Some((text, tip))
}
