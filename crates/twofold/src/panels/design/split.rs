//! Hard-to-change factors on the design step: the split-plot fractions of each run size and
//! whole-plot count (`twofold_core::splitplot::fraction`, searched on a worker), and the resets
//! the draft needs against a completely random order.

use egui::{RichText, Ui};

use super::{Compute, DesignPane, base_runs};
use crate::panels::View;
use twofold_core::alias::{resolution_from_pattern, roman};
use twofold_core::design::FractionalDesign;
use twofold_core::search::SearchBudget;
use twofold_core::splitplot::fraction::{split_plot_fraction, whole_plot_choices};
use twofold_core::splitplot::{Stratum, stratum_of, whole_plots_of};
use twofold_study::jobs::{Control, Job};
use twofold_study::project::{DesignSettings, Project};

/// Heading of the table.
pub const SPLIT_HEADER: &str = "Split-plot fractions for the hard-to-change factors";

/// Accessible label of the button that picks `runs` runs in `whole_plots` whole plots.
pub fn split_pick_label(runs: usize, whole_plots: usize) -> String {
    format!("use {runs} runs in {whole_plots} whole plots")
}

/// One split-plot fraction on offer.
#[derive(Debug, Clone)]
pub(super) struct SplitOption {
    runs: usize,
    whole_plots: usize,
    pattern: Vec<usize>,
    generators: Vec<String>,
    proven: bool,
}

type Key = (usize, Vec<usize>);
type Found = Result<Vec<SplitOption>, String>;

/// View state: the options for one (factors, hard-to-change factors) key, or their search.
#[derive(Debug, Default)]
pub(super) struct Split {
    result: Option<(Key, Found)>,
    pending: Option<(Key, Job<Found>)>,
    /// Whole plots of the draft, for one (hard-to-change factors, runs, generators) key.
    draft: Option<(DraftKey, Option<DraftPlots>)>,
}

type DraftKey = (Vec<usize>, Option<usize>, Vec<String>, Vec<String>);
/// Whole plots of one replicate, and the easy factors the fraction holds fixed in them.
type DraftPlots = (usize, Vec<String>);

/// Every fractional run size from the smallest that holds `k` factors to 64 runs, each with
/// every whole-plot count it allows (the search is proven well inside its budget there).
fn search(k: usize, htc: &[usize]) -> Found {
    let mut out = Vec::new();
    let smallest = twofold_core::design::smallest_runs(k);
    let full = 1usize.checked_shl(k as u32).unwrap_or(usize::MAX);
    let mut n = smallest;
    while n < full && n <= 64 {
        for w in whole_plot_choices(htc.len(), k - htc.len(), n) {
            let f = split_plot_fraction(k, htc, n, Some(w), &SearchBudget::default())
                .map_err(|e| e.to_string())?;
            out.push(SplitOption {
                runs: n,
                whole_plots: w,
                generators: f.design.generator_labels(),
                pattern: f.word_length_pattern,
                proven: f.proven_minimum_aberration,
            });
        }
        n *= 2;
    }
    Ok(out)
}

use twofold_study::project::regenerate::hard_to_change_of as hard_to_change;

/// The table of split-plot fractions, when some factor is hard to change.
pub(super) fn table(
    pane: &mut DesignPane,
    ui: &mut Ui,
    view: &View<'_>,
    k: usize,
    draft: &mut DesignSettings,
) {
    let htc = hard_to_change(view.project);
    if htc.is_empty() || htc.len() >= k {
        return;
    }
    let key: Key = (k, htc.clone());
    if let Some((pk, job)) = &mut pane.split.pending {
        if *pk != key {
            pane.split.pending = None;
        } else if let Some(done) = job.poll() {
            pane.split.result = Some((key.clone(), done.unwrap_or_else(|e| Err(e.to_string()))));
            pane.split.pending = None;
        }
    }
    let have = pane.split.result.as_ref().is_some_and(|(rk, _)| *rk == key);
    if !have && pane.split.pending.is_none() {
        match pane.compute {
            Compute::Inline => pane.split.result = Some((key.clone(), search(k, &htc))),
            Compute::Background => {
                let ctx = ui.ctx().clone();
                let h = htc.clone();
                let job = Job::start(
                    "split-plot fractions",
                    move |_: &Control| search(k, &h),
                    move || ctx.request_repaint(),
                );
                pane.split.pending = Some((key.clone(), job));
            }
        }
    }
    ui.add_space(4.0);
    egui::CollapsingHeader::new(SPLIT_HEADER)
        .default_open(true)
        .show(ui, |ui| {
            ui.label(
                RichText::new(
                    "Fractions that keep the hard-to-change factors fixed in each whole plot and change every other factor inside it, least aberration first (Huang, Chen & Voelkel 1998; Bingham & Sitter 1999). Fewer whole plots mean fewer resets, often at the cost of resolution.",
                )
                .color(view.pal.muted),
            );
            let Some((_, found)) = pane.split.result.as_ref().filter(|(rk, _)| *rk == key)
            else {
                ui.weak("Searching for split-plot fractions…");
                return;
            };
            let options = match found {
                Err(why) => {
                    ui.colored_label(view.pal.error, why);
                    return;
                }
                Ok(o) if o.is_empty() => {
                    ui.weak("No fraction up to 64 runs keeps these factors in whole plots; the full factorial does.");
                    return;
                }
                Ok(o) => o.clone(),
            };
            egui::Grid::new("split_options")
                .striped(true)
                .num_columns(6)
                .spacing([14.0, 4.0])
                .show(ui, |ui| {
                    for h in ["", "Runs", "Whole plots", "Resolution", "Word lengths (3, 4, …)", "Generators"] {
                        ui.label(RichText::new(h).strong().color(view.pal.muted));
                    }
                    ui.end_row();
                    for o in &options {
                        let selected = base_runs(draft, k) == Some(o.runs)
                            && draft.generators == o.generators;
                        let resp = ui
                            .radio(selected, "")
                            .accessible_name(split_pick_label(o.runs, o.whole_plots));
                        if resp.clicked() {
                            if draft.generators != o.generators {
                                draft.fold = None;
                            }
                            draft.generators = o.generators.clone();
                            draft.base_runs = u32::try_from(o.runs).ok();
                            pane.generator_text = o.generators.join(", ");
                            pane.focus_make = true;
                        }
                        ui.label(RichText::new(o.runs.to_string()).strong());
                        ui.label(o.whole_plots.to_string());
                        ui.label(
                            resolution_from_pattern(&o.pattern).map_or("—".to_string(), roman),
                        );
                        let shown: Vec<String> =
                            o.pattern.iter().take(6).map(ToString::to_string).collect();
                        ui.label(format!("({})", shown.join(", ")));
                        let g = ui.label(o.generators.join(", "));
                        if !o.proven {
                            g.on_hover_text("Best found in the time allowed; not proven.");
                        }
                        ui.end_row();
                    }
                });
        });
}

/// Whole plots of one replicate of the draft, and the factors that should change inside the
/// whole plots but do not (the draft's fraction does not suit the hard-to-change factors);
/// computed once per draft.
pub(super) fn whole_plots_of_draft(
    split: &mut Split,
    project: &Project,
    draft: &DesignSettings,
    k: usize,
) -> Option<DraftPlots> {
    let htc = hard_to_change(project);
    if htc.is_empty() {
        return None;
    }
    let names: Vec<String> = project.factors.iter().map(|f| f.name.clone()).collect();
    let key: DraftKey = (htc, base_runs(draft, k), draft.generators.clone(), names);
    if let Some((dk, v)) = &split.draft
        && *dk == key
    {
        return v.clone();
    }
    let v = draft_plots(project, &key.0, key.1?, draft, k);
    split.draft = Some((key, v.clone()));
    v
}

fn draft_plots(
    project: &Project,
    htc: &[usize],
    runs: usize,
    draft: &DesignSettings,
    k: usize,
) -> Option<DraftPlots> {
    if runs > 4096 {
        return None;
    }
    let design = if draft.generators.iter().all(|g| g.trim().is_empty()) {
        if runs == 1usize.checked_shl(k as u32).unwrap_or(0) {
            FractionalDesign::full(k).ok()?
        } else {
            // No generators yet: the engine takes the split-plot fraction of this size with as
            // many whole plots as it allows, which by construction holds no easy factor fixed;
            // its count is known without searching (the search stays off the drawing thread).
            let most = whole_plot_choices(htc.len(), k - htc.len(), runs)
                .into_iter()
                .max()?;
            return Some((most, Vec::new()));
        }
    } else {
        FractionalDesign::from_text(k, Some(runs), &draft.generators.join(",")).ok()?
    };
    let rows = design.coded_runs();
    let wp = whole_plots_of(&rows, htc);
    let plots = wp.iter().copied().max().map_or(0, |m| m + 1);
    let fixed: Vec<String> = (0..k)
        .filter(|f| !htc.contains(f))
        .filter(|&f| stratum_of(twofold_core::Term::main(f), &rows, &wp) == Stratum::WholePlot)
        .filter_map(|f| project.factors.get(f).map(|x| x.name.clone()))
        .collect();
    Some((plots, fixed))
}
