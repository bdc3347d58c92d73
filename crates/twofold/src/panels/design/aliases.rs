//! The alias structure of the draft design, shown under the options: the defining relation and
//! each chain of main effects and two-factor interactions once.

use egui::{Grid, RichText, Ui};

use super::{DesignPane, PreviewKey, preview_of};
use crate::panels::View;
use crate::panels::widgets::warning_box;
use twofold_core::alias::{AliasReport, chain_label, roman};
use twofold_study::project::{DesignSettings, Project};

pub(super) fn alias_preview(
    pane: &mut DesignPane,
    ui: &mut Ui,
    view: &View<'_>,
    k: usize,
    draft: &DesignSettings,
) {
    let pal = view.pal;
    if let Some(n) = draft.screening_runs()
        && super::screening::is_screening(draft, n)
    {
        super::partial::show(pane, ui, view, k, n);
        return;
    }
    let key: PreviewKey = (k, draft.base_runs, draft.generators.clone());
    if pane.preview.as_ref().map(|p| &p.0) != Some(&key) {
        let report = preview_of(&key);
        pane.preview = Some((key, report));
    }
    let Some((_, report)) = &pane.preview else {
        return;
    };
    ui.label(
        RichText::new("Alias structure of this design")
            .strong()
            .size(17.0),
    );
    let report = match report {
        Ok(r) => r,
        Err(e) => {
            ui.colored_label(pal.error, e);
            return;
        }
    };
    if report.defining_relation.is_empty() {
        ui.label("Full factorial: every effect is estimated on its own, nothing is aliased.");
        return;
    }
    let res = report
        .resolution
        .map(|r| format!("resolution {}", roman(r)))
        .unwrap_or_default();
    let words: Vec<String> = report
        .defining_relation
        .iter()
        .take(12)
        .map(ToString::to_string)
        .collect();
    let more = if report.defining_relation.len() > 12 {
        format!(" … ({} words)", report.defining_relation.len())
    } else {
        String::new()
    };
    ui.label(format!(
        "Defining relation: I = {}{more}   ({res})",
        words.join(" = ")
    ));
    let warned = report.main_effects_aliased_with_interactions();
    if !warned.is_empty() {
        let names: Vec<String> = warned
            .iter()
            .take(8)
            .map(|(t, a)| {
                let list: Vec<String> = a.iter().take(3).map(ToString::to_string).collect();
                format!("{} with {}", factor_name(view.project, *t), list.join(", "))
            })
            .collect();
        warning_box(
            ui,
            &pal,
            &format!(
                "Main effects are mixed up with two-factor interactions: {}. If one of those interactions is real, the main effect you see is not the factor's own effect. Use this design only to screen, or pick more runs.",
                names.join("; ")
            ),
        );
    }
    let clear = &report.clear_two_factor_interactions;
    ui.label(format!(
        "Clear main effects: {} of {k}.  Clear two-factor interactions: {} of {}.",
        report.clear_main_effects.len(),
        clear.len(),
        k * (k - 1) / 2
    ));
    egui::CollapsingHeader::new("Aliases of main effects and two-factor interactions")
        .default_open(k <= 7)
        .show(ui, |ui| {
            Grid::new("alias_grid").striped(true).show(ui, |ui| {
                for row in alias_rows(report).into_iter().take(400) {
                    match row {
                        AliasRow::Clear(term) => {
                            ui.horizontal(|ui| {
                                ui.label(RichText::new(term).strong());
                                ui.weak("clear (only longer terms)");
                            });
                        }
                        AliasRow::Chain { text, mixed } => {
                            if mixed {
                                ui.colored_label(pal.warn, text);
                            } else {
                                ui.label(text);
                            }
                        }
                    }
                    ui.end_row();
                }
            });
        });
}

/// One row of the design pane's alias list.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum AliasRow {
    /// A term aliased with no term of up to three letters.
    Clear(String),
    /// A chain, written once, e.g. `AB = CG = DH = EF`; `mixed` when two of its members are
    /// main effects or two-factor interactions (shown as a warning).
    Chain {
        /// The chain on one line.
        text: String,
        /// Two main effects or two-factor interactions share the chain.
        mixed: bool,
    },
}

/// The rows of the alias list: each chain of main effects and two-factor interactions once, in
/// the order of the report.
pub fn alias_rows(report: &AliasReport) -> Vec<AliasRow> {
    report
        .chains()
        .into_iter()
        .map(|(term, aliases)| {
            if aliases.is_empty() {
                AliasRow::Clear(term.label())
            } else {
                AliasRow::Chain {
                    text: chain_label(term, &aliases),
                    mixed: term.order() <= 2 && aliases.iter().any(|a| a.term.order() <= 2),
                }
            }
        })
        .collect()
}

fn factor_name(project: &Project, term: twofold_core::term::Term) -> String {
    let i = term.factors().next().unwrap_or(0);
    match project.factors.get(i) {
        Some(f) => format!("{} ({})", term.label(), f.name),
        None => term.label(),
    }
}
