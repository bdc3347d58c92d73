//! Interactions that must stay clear: the engineer names two-factor interactions, and the
//! smallest least-aberration design that keeps them clear of main effects and other two-factor
//! interactions is found (`twofold_core::search::required`, after Wu & Chen 1992) and offered.

use egui::{RichText, Ui};

use super::{Compute, DesignPane};
use crate::panels::View;
use crate::panels::widgets::text_field;
use twofold_core::search::SearchBudget;
use twofold_core::search::required::{RequiredOutcome, design_keeping_clear, parse_required};
use twofold_study::jobs::{Control, Job};
use twofold_study::project::DesignSettings;

/// Accessible name of the field.
pub const REQUIRED_FIELD: &str = "interactions that must stay clear";
/// Label of the button that takes the design found.
pub const USE_REQUIRED: &str = "Use this design";

type Found = Result<RequiredOutcome, String>;

/// View state: what is typed, and the search for it.
#[derive(Debug, Default)]
pub(super) struct Required {
    text: String,
    result: Option<((usize, String), Found)>,
    pending: Option<((usize, String), Job<Found>)>,
}

fn search(k: usize, text: &str) -> Found {
    let terms = parse_required(text, k).map_err(|e| e.to_string())?;
    design_keeping_clear(k, &terms, None, &SearchBudget::default()).map_err(|e| e.to_string())
}

/// The row: the field, the design found (or why none) and the button that takes it.
pub(super) fn row(
    pane: &mut DesignPane,
    ui: &mut Ui,
    view: &View<'_>,
    k: usize,
    draft: &mut DesignSettings,
) {
    let id = ui.scope_id().with("required_clear");
    ui.horizontal(|ui| {
        ui.label("Interactions that must stay clear");
        if let Some(t) = text_field(ui, id, &pane.required.text, 160.0, "e.g. AB, CE") {
            pane.required.text = t;
        }
        if let Some(r) = ui.ctx().read_response(id) {
            let _ = r.accessible_name(REQUIRED_FIELD);
        }
    });
    let text = pane.required.text.trim().to_string();
    if text.is_empty() {
        return;
    }
    let key = (k, text.clone());
    if let Some((pk, job)) = &mut pane.required.pending {
        if *pk != key {
            pane.required.pending = None;
        } else if let Some(done) = job.poll() {
            pane.required.result = Some((key.clone(), done.unwrap_or_else(|e| Err(e.to_string()))));
            pane.required.pending = None;
        }
    }
    let have = pane
        .required
        .result
        .as_ref()
        .is_some_and(|(rk, _)| *rk == key);
    if !have && pane.required.pending.is_none() {
        match pane.compute {
            Compute::Inline => pane.required.result = Some((key.clone(), search(k, &text))),
            Compute::Background => {
                let ctx = ui.ctx().clone();
                let t = text.clone();
                let job = Job::start(
                    "required interactions",
                    move |_: &Control| search(k, &t),
                    move || ctx.request_repaint(),
                );
                pane.required.pending = Some((key.clone(), job));
            }
        }
    }
    let Some((_, found)) = pane.required.result.as_ref().filter(|(rk, _)| *rk == key) else {
        ui.weak("Searching for a design that keeps them clear…");
        return;
    };
    match found {
        Err(why) => {
            ui.colored_label(view.pal.error, why);
        }
        Ok(o) => {
            let gens = o.design.generator_labels();
            let words: Vec<String> = o
                .word_length_pattern
                .iter()
                .take(6)
                .map(ToString::to_string)
                .collect();
            let mut take = false;
            ui.horizontal_wrapped(|ui| {
                ui.label(
                    RichText::new(format!(
                        "{} runs keep {} clear: {} (word lengths {}){}",
                        o.runs(),
                        o.required
                            .iter()
                            .map(|t| t.label())
                            .collect::<Vec<_>>()
                            .join(", "),
                        if gens.is_empty() {
                            "the full factorial".to_string()
                        } else {
                            gens.join(", ")
                        },
                        words.join(", "),
                        if o.proven_minimum_aberration {
                            ", least aberration proven"
                        } else {
                            ", best found in the time allowed"
                        }
                    ))
                    .strong(),
                );
                let chosen = draft.generators == gens
                    && draft.base_runs.map(|n| n as usize)
                        == Some(o.runs()).filter(|_| !gens.is_empty());
                take = ui
                    .add_enabled(!chosen, egui::Button::new(USE_REQUIRED))
                    .clicked();
            });
            if take {
                draft.generators = gens.clone();
                draft.base_runs = if gens.is_empty() {
                    None
                } else {
                    u32::try_from(o.runs()).ok()
                };
                draft.fold = None;
                draft.added = None;
                pane.generator_text = gens.join(", ");
                pane.focus_make = true;
            }
        }
    }
}
