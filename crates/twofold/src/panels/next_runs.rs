//! What to run next: the follow-up runs the project can add (fold-overs and semifolds, centre
//! points, a replicate, and runs chosen to separate the interactions typed in the field at the
//! top), each with the runs it adds and what it resolves, the one the analysis points to
//! first with its reason. Each semifold has a chooser of the half it keeps (the fold-over runs
//! with one other factor at + or −); the engine offers the default half, and a choice swaps in
//! the engine's option for the chosen one, so its text, run count and edit follow. A button per option pushes the edit that adds the runs (one undo
//! step) and goes to the run sheet, where the entry field of the next run takes the keyboard.
//!
//! The options come from the engine ([`twofold_study::report::next_runs`]), built once per data
//! revision and analysis; the pane only lays them out.

use egui::{RichText, Ui};

use super::run_sheet::card_entry_id;
use super::widgets::{not_available, tag, text_field};
use super::{Command, Pane, Step, View};
use twofold_core::foldover::FoldKind;
use twofold_core::semifold::SemiFold;
use twofold_core::term::LETTERS;
use twofold_study::project::{Edit, FollowUp};
use twofold_study::report::{
    NextRun, half_words, next_runs, semifold_halves, semifold_option, separate_option,
};

/// What the options were built from: project revision, shown response, revision of its report.
type BuiltFor = (u64, Option<usize>, Option<u64>);

/// Accessible name of the field of interactions to separate.
pub const SEPARATE_FIELD: &str = "interactions to separate";

/// What the option of runs to separate interactions was built from: project revision, revision
/// of the shown response's report, text.
type SeparateFor = (u64, Option<u64>, String);

/// View state of the pane: the options built once per data revision and analysis, the half
/// chosen for each semifold (the engine offers the default half; a choice here replaces that
/// option by the engine's option for the chosen half), and the option of runs to separate the
/// interactions typed (built once per revision and text).
#[derive(Debug, Default)]
pub struct NextRunsPane {
    built: Option<(BuiltFor, Vec<NextRun>)>,
    halves: Vec<SemiFold>,
    separate_text: String,
    separate: Option<(SeparateFor, Result<NextRun, String>)>,
}

/// Accessible name of the chooser of the half a semifold keeps, e.g. `half kept: semifold on A`.
pub fn half_chooser_name(fold: FoldKind) -> String {
    match fold {
        FoldKind::Full => "half kept: full semifold".into(),
        FoldKind::Factor(f) => format!(
            "half kept: semifold on {}",
            LETTERS.get(f).copied().unwrap_or('?')
        ),
    }
}

/// Replaces each semifold option of `options` whose fold has a chosen half in `halves` by the
/// engine's option for that half; a choice the project no longer allows is forgotten.
fn apply_halves(
    project: &twofold_study::project::Project,
    options: &mut [NextRun],
    halves: &mut Vec<SemiFold>,
) {
    halves.retain(|&chosen| {
        let Some(slot) = options
            .iter_mut()
            .find(|o| matches!(o.follow_up, FollowUp::SemiFold(s) if s.fold == chosen.fold))
        else {
            return false;
        };
        if slot.follow_up == FollowUp::SemiFold(chosen) {
            return true;
        }
        match semifold_option(project, chosen) {
            Ok(mut option) => {
                option.suggested = slot.suggested;
                option.reason = slot.reason.take();
                *slot = option;
                true
            }
            Err(_) => false,
        }
    });
}

/// Name of the button that adds an option's runs, e.g. `Add 8 runs: Full fold-over`.
pub fn add_button_name(option: &NextRun) -> String {
    format!("Add {} runs: {}", option.runs_added(), option.title)
}

impl Pane for NextRunsPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        let Self {
            built,
            halves,
            separate_text,
            separate,
        } = self;
        let pal = view.pal;
        let project = view.project;
        if project.runs.is_empty() {
            not_available(
                ui,
                &pal,
                "There are no runs yet: choose a design and run it first.",
            );
            return;
        }
        let key: BuiltFor = (
            view.revision,
            view.response,
            view.results.map(|r| r.revision),
        );
        if built.as_ref().is_none_or(|(k, _)| *k != key) {
            let mut options = next_runs(project, view.results);
            apply_halves(project, &mut options, halves);
            *built = Some((key, options));
        }
        let Some((_, options)) = built.as_mut() else {
            return;
        };
        match project.design.fold {
            Some(FoldKind::Full) => {
                ui.label("Block 2 of the sheet holds the full fold-over of the fraction.");
            }
            Some(FoldKind::Factor(f)) => {
                ui.label(format!(
                    "Block 2 of the sheet holds the fold-over on {}.",
                    LETTERS.get(f).copied().unwrap_or('?')
                ));
            }
            None => {}
        }
        if let Some(block) = &project.design.added {
            ui.label(format!("Block 2 of the sheet holds {}.", block.describe()));
        }
        match view.results {
            Some(res) if options.iter().any(|o| o.suggested) => {
                ui.label(
                    RichText::new(format!(
                        "From the analysis of {}: the suggested follow-up comes first.",
                        view.response_name(res)
                    ))
                    .color(pal.muted),
                );
            }
            Some(res) => {
                ui.label(
                    RichText::new(format!(
                        "The analysis of {} leaves no active effect in doubt, so nothing is suggested; each option says what it would add.",
                        view.response_name(res)
                    ))
                    .color(pal.muted),
                );
            }
            None => {
                ui.label(
                    RichText::new(
                        "With values typed for a response, the analysis suggests which follow-up separates the effects in doubt.",
                    )
                    .color(pal.muted),
                );
            }
        }
        ui.add_space(6.0);
        egui::ScrollArea::vertical()
            .auto_shrink([false, false])
            .show(ui, |ui| {
                separate_row(ui, view, separate_text, separate, out);
                ui.add_space(6.0);
                let mut chosen = None;
                for option in options.iter() {
                    if let Some(half) = option_card(ui, view, option, out) {
                        chosen = Some(half);
                    }
                    ui.add_space(6.0);
                }
                if let Some(half) = chosen {
                    halves.retain(|h| h.fold != half.fold);
                    halves.push(half);
                    apply_halves(project, options, halves);
                }
            });
    }
}

/// One option: title, runs added, the reason when suggested, what it resolves, the chooser of
/// the half kept for a semifold, and its button. Returns the half newly chosen, if any.
fn option_card(
    ui: &mut Ui,
    view: &View<'_>,
    option: &NextRun,
    out: &mut Vec<Command>,
) -> Option<SemiFold> {
    let pal = view.pal;
    let frame = egui::Frame::new()
        .fill(if option.suggested {
            pal.card_bg
        } else {
            ui.visuals().panel_fill
        })
        .stroke(egui::Stroke::new(
            1.0,
            if option.suggested {
                pal.accent
            } else {
                pal.grid
            },
        ))
        .corner_radius(3.0)
        .inner_margin(egui::Margin::symmetric(10, 8));
    let mut chosen = None;
    frame.show(ui, |ui| {
        ui.set_width(ui.available_width());
        ui.horizontal_wrapped(|ui| {
            ui.label(RichText::new(&option.title).strong().size(16.0));
            if option.suggested {
                tag(ui, "suggested", pal.accent);
            }
        });
        if let Some(reason) = &option.reason {
            ui.label(RichText::new(reason).color(pal.ink));
        }
        for line in &option.resolves {
            ui.label(format!("• {line}"));
        }
        if let FollowUp::SemiFold(now) = option.follow_up {
            chosen = half_chooser(ui, view, now);
        }
        match &option.preview {
            Ok(p) => {
                if p.reordered > 0 {
                    ui.label(
                        RichText::new(format!(
                            "The run order is drawn again: {} run(s) in the sheet get a new run number or block.",
                            p.reordered
                        ))
                        .color(pal.warn),
                    );
                }
                let button = egui::Button::new(add_button_name(option));
                if ui.add(button).clicked() {
                    out.push(Command::Edit(Edit::AddFollowUp(option.follow_up.clone())));
                    out.push(Command::Goto(Step::Runs));
                    // The button is gone on the run sheet: the next run's first entry field
                    // takes the keyboard (a request made now holds until that field is drawn).
                    if !view.project.responses.is_empty() {
                        ui.memory_mut(|m| m.request_focus(card_entry_id(0)));
                    }
                }
            }
            Err(why) => {
                ui.label(RichText::new(format!("Cannot be added: {why}")).color(pal.muted));
            }
        }
    });
    chosen
}

/// The chooser of the half a semifold keeps: which factor and at which level. Returns the half
/// picked when it differs from `now`.
fn half_chooser(ui: &mut Ui, view: &View<'_>, now: SemiFold) -> Option<SemiFold> {
    let k = view.project.factors.len();
    let mut picked = now;
    ui.horizontal(|ui| {
        ui.label("Keep the fold-over runs with");
        egui::ComboBox::from_id_salt(("semifold_half", half_chooser_name(now.fold)))
            .selected_text(half_words(&now))
            .show_ui(ui, |ui| {
                for half in semifold_halves(now.fold, k) {
                    let name = view
                        .project
                        .factors
                        .get(half.keep)
                        .map_or("", |f| f.name.as_str());
                    ui.selectable_value(
                        &mut picked,
                        half,
                        format!("{} ({name})", half_words(&half)),
                    );
                }
            })
            .response
            .accessible_name(half_chooser_name(now.fold));
    });
    (picked != now).then_some(picked)
}

/// The field of interactions to separate and, once something is typed, the option of runs
/// chosen to separate them (D-optimal augmentation, built by the engine).
fn separate_row(
    ui: &mut Ui,
    view: &View<'_>,
    text: &mut String,
    built: &mut Option<(SeparateFor, Result<NextRun, String>)>,
    out: &mut Vec<Command>,
) {
    let id = ui.scope_id().with("separate_interactions");
    ui.horizontal(|ui| {
        ui.label("Interactions to separate");
        if let Some(t) = text_field(ui, id, text, 160.0, "e.g. AB, CE") {
            *text = t;
        }
        if let Some(r) = ui.ctx().read_response(id) {
            let _ = r.accessible_name(SEPARATE_FIELD);
        }
    });
    let typed = text.trim().to_string();
    if typed.is_empty() {
        ui.label(
            RichText::new(
                "Name two-factor interactions, e.g. AB, CE, to see the fewest added runs that estimate them beside every main effect.",
            )
            .color(view.pal.muted),
        );
        return;
    }
    let key: SeparateFor = (
        view.revision,
        view.results.map(|r| r.revision),
        typed.clone(),
    );
    if built.as_ref().is_none_or(|(k, _)| *k != key) {
        *built = Some((key, separate_option(view.project, &typed, view.results)));
    }
    match built.as_ref().map(|(_, r)| r) {
        Some(Ok(option)) => {
            // Runs to separate interactions have no half to choose.
            let _ = option_card(ui, view, option, out);
        }
        Some(Err(why)) => {
            ui.label(RichText::new(why).color(view.pal.warn));
        }
        None => {}
    }
}
