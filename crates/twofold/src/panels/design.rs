//! The design pane: the run sizes on offer for the current factors, generators typed by hand,
//! centre points, replicates, blocks and seed, and the alias structure of the draft before it is
//! committed.
//!
//! The options come from the core's minimum-aberration search, which may take a second or two for
//! many factors, so in the window it runs on a worker thread and the table says "searching".

mod aliases;
mod axial;
mod partial;
pub mod power;
pub mod required;
pub mod screening;
pub mod split;

use egui::{Grid, RichText, Ui};

use super::widgets::not_available;
use super::{Command, Pane, View};
use twofold_core::alias::{AliasReport, alias_report, roman};
use twofold_core::design::{FractionalDesign, Generator};
use twofold_core::search::{DesignOption, SearchBudget, design_options};
use twofold_study::jobs::{Control, Job};
use twofold_study::project::{BlockChoice, DesignSettings, Project, SheetRuns};

use aliases::alias_preview;
pub use aliases::{AliasRow, alias_rows};

/// Largest run size offered in the table: bigger sheets are not practical at a bench.
pub const MAX_OFFERED_RUNS: usize = 4096;

/// How the design options are computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Compute {
    /// On a worker thread (the window).
    #[default]
    Background,
    /// At once, in the frame that needs them (tests, where determinism beats smoothness).
    Inline,
}

type OptionsResult = Result<Vec<DesignOption>, String>;

/// View state of the design pane.
#[derive(Debug, Default)]
pub struct DesignPane {
    /// Where the options are computed.
    pub compute: Compute,
    /// The settings being prepared, not yet applied.
    draft: Option<DesignSettings>,
    /// The project's design when the draft was started (to notice undo and other changes).
    seen: Option<DesignSettings>,
    /// Generator text being typed.
    generator_text: String,
    /// Block generator text being typed.
    block_text: String,
    /// Options for a factor count, or the search in progress.
    options: Option<(usize, OptionsResult)>,
    pending: Option<(usize, Job<OptionsResult>)>,
    /// Alias report of the draft, cached for one (factor count, generators) key.
    preview: Option<(PreviewKey, Result<AliasReport, String>)>,
    /// Partial aliasing of a screening draft in words, cached for one (factors, runs) key.
    screening_preview: Option<partial::Preview>,
    /// The power column, computed once per (power settings, draft, factors).
    power_cells: power::PowerCells,
    /// Interactions that must stay clear, and the design found for them.
    required: required::Required,
    /// Split-plot fractions for the hard-to-change factors.
    split: split::Split,
    /// A run size was just picked: the button that makes the run sheet takes the keyboard, so
    /// choosing and confirming are two key presses.
    focus_make: bool,
}

type PreviewKey = (usize, Option<u32>, Vec<String>);

/// Accessible label of the button that picks an option of `runs` runs.
pub fn pick_label(runs: usize) -> String {
    format!("use {runs} runs")
}

impl DesignPane {
    fn options_for(&mut self, ui: &Ui, k: usize) -> Option<&OptionsResult> {
        if let Some((pk, job)) = &mut self.pending {
            if *pk == k {
                match job.poll() {
                    // A search that stopped with an internal error says so rather than search
                    // again.
                    Some(result) => {
                        self.options = Some((k, result.unwrap_or_else(|e| Err(e.to_string()))));
                        self.pending = None;
                    }
                    None => {
                        ui.ctx()
                            .request_repaint_after(std::time::Duration::from_millis(100));
                    }
                }
            } else {
                self.pending = None;
            }
        }
        let have = matches!(&self.options, Some((ok, _)) if *ok == k);
        if !have && self.pending.is_none() {
            match self.compute {
                Compute::Inline => self.options = Some((k, search(k))),
                Compute::Background => {
                    let ctx = ui.ctx().clone();
                    let job = Job::start(
                        "design search",
                        move |_: &Control| search(k),
                        move || ctx.request_repaint(),
                    );
                    self.pending = Some((k, job));
                }
            }
        }
        match &self.options {
            Some((ok, r)) if *ok == k => Some(r),
            _ => None,
        }
    }
}

fn search(k: usize) -> OptionsResult {
    design_options(k, &SearchBudget::default())
        .map(|v| {
            v.into_iter()
                .filter(|o| o.runs <= MAX_OFFERED_RUNS)
                .collect()
        })
        .map_err(|e| e.to_string())
}

/// Runs of one replicate of the draft: `base_runs`, or 2^(k − generators), or 2^k.
fn base_runs(draft: &DesignSettings, k: usize) -> Option<usize> {
    SheetRuns::of(draft, k).map(|c| c.base)
}

/// The alias report of the draft, or why there is none.
fn preview_of(key: &PreviewKey) -> Result<AliasReport, String> {
    let (k, runs, gens) = key;
    let design = FractionalDesign::from_text(*k, runs.map(|n| n as usize), &gens.join(", "))
        .map_err(|e| e.to_string())?;
    Ok(alias_report(&design))
}

impl Pane for DesignPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        let project = view.project;
        let pal = view.pal;
        let k = project.factors.len();
        ui.heading("Design");
        if k < 2 {
            not_available(
                ui,
                &pal,
                "A design needs at least two factors. Add them under Factors.",
            );
            return;
        }
        if self.seen.as_ref() != Some(&project.design) {
            self.draft = Some(project.design.clone());
            self.seen = Some(project.design.clone());
            self.generator_text = project.design.generators.join(", ");
            self.block_text = block_text_of(&project.design.blocks);
        }
        let mut draft = self.draft.clone().unwrap_or_else(|| project.design.clone());
        egui::ScrollArea::vertical()
            .auto_shrink([false, false])
            .show(ui, |ui| {
                ui.label(RichText::new(format!("Run sizes for {k} factors").as_str()).strong());
                options_table(self, ui, view, k, &mut draft);
                required::row(self, ui, view, k, &mut draft);
                power::power_row(ui, view, out);
                ui.add_space(6.0);
                generators_row(self, ui, view, k, &mut draft);
                ui.add_space(6.0);
                extras(ui, project, &mut draft, &pal, k, &mut self.block_text);
                ui.add_space(8.0);
                let total = summary(ui, &draft, k, project, &pal);
                fold_row(ui, &mut draft);
                axial::axial_row(ui, &mut draft, k);
                added_row(ui, &mut draft);
                split_row(self, ui, view, &draft, k);
                ui.add_space(4.0);
                let unchanged =
                    draft == project.design && !project.runs.is_empty() && !project.runs_outdated;
                let planable = total.is_some() && !has_design_errors(project, &draft);
                ui.horizontal(|ui| {
                    let label = if project.runs.is_empty() {
                        "Make the run sheet"
                    } else {
                        "Apply and remake the run sheet"
                    };
                    let make = ui.add_enabled(
                        planable && !unchanged,
                        egui::Button::new(RichText::new(label).strong()),
                    );
                    if std::mem::take(&mut self.focus_make) && make.enabled() {
                        make.request_focus();
                    }
                    if make.clicked() {
                        out.push(Command::ChangeDesign(draft.clone()));
                    }
                    if draft != project.design && ui.button("Discard draft").clicked() {
                        draft = project.design.clone();
                        self.generator_text = draft.generators.join(", ");
                        self.block_text = block_text_of(&draft.blocks);
                    }
                    if unchanged {
                        ui.weak("The run sheet follows this design.");
                    }
                });
                ui.add_space(10.0);
                alias_preview(self, ui, view, k, &draft);
            });
        self.draft = Some(draft);
    }
}

fn has_design_errors(project: &Project, draft: &DesignSettings) -> bool {
    let blocked = draft.replicates_as_blocks
        || match &draft.blocks {
            BlockChoice::Count(n) => *n > 1,
            BlockChoice::Generators(g) => g.iter().any(|t| !t.trim().is_empty()),
        };
    (draft.centre_points_per_block > 0 && project.factors.iter().any(|f| !f.is_numeric()))
        || draft.replicates == 0
        || (draft.has_follow_up_block() && blocked)
}

/// With hard-to-change factors: how many whole plots (resets) the plan needs, against a
/// completely random order of the same runs (`twofold_core::splitplot`), and a warning when the
/// draft's fraction holds an easy factor fixed in every whole plot.
fn split_row(
    pane: &mut DesignPane,
    ui: &mut Ui,
    view: &View<'_>,
    draft: &DesignSettings,
    k: usize,
) {
    let project = view.project;
    let htc: Vec<&str> = project
        .factors
        .iter()
        .filter(|f| f.hard_to_change)
        .map(|f| f.name.as_str())
        .collect();
    if htc.is_empty() {
        return;
    }
    let Some(runs) = base_runs(draft, k) else {
        return;
    };
    let Some((settings, fixed)) = split::whole_plots_of_draft(&mut pane.split, project, draft, k)
    else {
        return;
    };
    let reps = draft.replicates.max(1) as usize;
    // The centre points, at the centre of every factor, are one whole plot more.
    let plots = settings * reps + usize::from(draft.centre_points_per_block > 0);
    // A random order resets whenever the hard-to-change setting itself changes.
    let groups: Vec<usize> = (0..runs * reps).map(|i| i % settings.max(1)).collect();
    let random = twofold_core::splitplot::expected_resets_randomised(&groups);
    ui.label(format!(
        "Hard to change: {} — the runs are grouped into {} whole plots, so {} resets instead of about {:.0} in a completely random order. Their effects are judged against the whole-plot error.",
        htc.join(", "),
        plots,
        plots,
        random
    ));
    if !fixed.is_empty() {
        ui.colored_label(
            view.pal.warn,
            format!(
                "This fraction holds {} fixed in every whole plot as well: pick a split-plot fraction above so that only the hard-to-change factors stay fixed.",
                fixed.join(", ")
            ),
        );
    } else if settings == runs {
        ui.colored_label(
            view.pal.warn,
            "Every run has a whole plot of its own: no run shares a setting of the hard-to-change factors. Pick a split-plot fraction above with fewer whole plots.",
        );
    }
}

/// The fold-over added on the "What to run next" step, if any, with a way to leave it out.
fn fold_row(ui: &mut Ui, draft: &mut DesignSettings) {
    let Some(fold) = draft.fold else {
        return;
    };
    ui.horizontal_wrapped(|ui| {
        ui.label(match fold {
            twofold_core::foldover::FoldKind::Full => {
                "Follow-up: the full fold-over runs as block 2 (it doubles the factorial runs; it cannot be combined with other blocking).".to_string()
            }
            twofold_core::foldover::FoldKind::Factor(f) => format!(
                "Follow-up: the fold-over on {} runs as block 2 (it doubles the factorial runs; it cannot be combined with other blocking).",
                twofold_core::term::LETTERS.get(f).copied().unwrap_or('?')
            ),
        });
        if ui.button("Leave out the fold-over").clicked() {
            draft.fold = None;
        }
    });
}

/// The added block (half a fold-over, or runs chosen to separate interactions) added on the
/// "What to run next" step, if any, with a way to leave it out.
fn added_row(ui: &mut Ui, draft: &mut DesignSettings) {
    let Some(block) = &draft.added else {
        return;
    };
    let text = format!(
        "Follow-up: {} runs as block 2 (the combined runs are not a regular fraction; they cannot be combined with other blocking).",
        block.describe()
    );
    ui.horizontal_wrapped(|ui| {
        ui.label(text);
        if ui.button("Leave out the added runs").clicked() {
            draft.added = None;
        }
    });
}

fn options_table(
    pane: &mut DesignPane,
    ui: &mut Ui,
    view: &View<'_>,
    k: usize,
    draft: &mut DesignSettings,
) {
    let pal = view.pal;
    let options = match pane.options_for(ui, k) {
        Some(Ok(o)) => o.clone(),
        Some(Err(e)) => {
            ui.colored_label(pal.error, format!("No options: {e}"));
            return;
        }
        None => {
            ui.horizontal(|ui| {
                // No spinner: it repaints every frame, which on two cores without
                // a GPU takes time from the computation it waits for.
                ui.label("Searching for the best fraction of each size…");
            });
            return;
        }
    };
    let current_runs = base_runs(draft, k);
    let power_heading = power::power_heading(&view.project.power);
    Grid::new("design_options")
        .striped(true)
        .num_columns(8)
        .spacing([14.0, 4.0])
        .show(ui, |ui| {
            for h in [
                "",
                "Runs",
                "Resolution",
                "Word lengths (3, 4, …)",
                "Clear 2FIs",
                "One-at-a-time equivalent",
                "Generators",
            ] {
                ui.label(RichText::new(h).strong().color(pal.muted));
            }
            if let Some(h) = &power_heading {
                ui.label(RichText::new(h).strong().color(pal.muted));
            }
            ui.end_row();
            for o in &options {
                let gens: Vec<String> = o.generators.iter().map(Generator::to_string).collect();
                let selected = current_runs == Some(o.runs) && draft.generators == gens;
                let resp = ui.radio(selected, "");
                let resp = resp.accessible_name(pick_label(o.runs));
                if resp.clicked() {
                    if draft.generators != gens {
                        // A fold-over (or an added block) belongs to the fraction it follows.
                        draft.fold = None;
                        draft.added = None;
                    }
                    draft.generators = gens.clone();
                    draft.base_runs = if o.generators.is_empty() {
                        None
                    } else {
                        u32::try_from(o.runs).ok()
                    };
                    pane.generator_text = gens.join(", ");
                    pane.focus_make = true;
                }
                ui.label(RichText::new(o.runs.to_string()).strong());
                ui.label(match o.resolution {
                    Some(r) => roman(r),
                    None => "full".into(),
                });
                ui.label(if o.word_length_pattern.is_empty() || o.generators.is_empty() {
                    "—".to_string()
                } else {
                    let shown: Vec<String> = o
                        .word_length_pattern
                        .iter()
                        .take(6)
                        .map(ToString::to_string)
                        .collect();
                    let more = if o.word_length_pattern.len() > 6 { ", …" } else { "" };
                    format!("({}{more})", shown.join(", "))
                });
                ui.label(o.clear_two_factor_interactions.to_string());
                ui.label(o.ofat_equivalent_runs.to_string()).on_hover_text(format!(
                    "Measuring one factor at a time would need about {} runs for the same precision of every main effect.",
                    o.ofat_equivalent_runs
                ));
                let g = if gens.is_empty() {
                    "none (full factorial)".to_string()
                } else {
                    gens.join(", ")
                };
                let label = ui.label(g);
                if !o.proven {
                    label.on_hover_text("Best found in the time allowed; not proven minimum aberration.");
                }
                if let Some((text, tip)) =
                    pane.power_cells.cell(&view.project.power, draft, k, o.runs)
                {
                    ui.label(text).on_hover_text(tip);
                }
                ui.end_row();
            }
        });
    let regular_sizes: Vec<usize> = options.iter().map(|o| o.runs).collect();
    screening::table(pane, ui, view, k, draft, &regular_sizes);
    split::table(pane, ui, view, k, draft);
}

fn generators_row(
    pane: &mut DesignPane,
    ui: &mut Ui,
    view: &View<'_>,
    k: usize,
    draft: &mut DesignSettings,
) {
    let pal = view.pal;
    ui.horizontal(|ui| {
        ui.label("Or type generators:");
        let resp = ui
            .add(
                egui::TextEdit::singleline(&mut pane.generator_text)
                    .hint_text("e.g. E=ABCD, F=-BCD")
                    .desired_width(260.0)
                    .min_size(egui::vec2(260.0, 0.0)),
            )
            .accessible_name("generators");
        if resp.changed() {
            // Half-typed text keeps the last good generators; the error shows beside the field.
            if let Ok(gens) = Generator::parse_list(&pane.generator_text, k) {
                let labels: Vec<String> = gens.iter().map(Generator::to_string).collect();
                if draft.generators != labels {
                    draft.fold = None;
                    draft.added = None;
                }
                draft.generators = labels;
                draft.base_runs = if gens.is_empty() {
                    None
                } else {
                    u32::try_from(1usize << (k - gens.len().min(k))).ok()
                };
            }
        }
        if let Err(e) = Generator::parse_list(&pane.generator_text, k) {
            ui.colored_label(pal.error, e.to_string());
        }
    });
}

/// The text of typed block generators (empty when the program chooses them).
fn block_text_of(blocks: &BlockChoice) -> String {
    match blocks {
        BlockChoice::Generators(g) => g.join(", "),
        BlockChoice::Count(_) => String::new(),
    }
}

/// Reads typed block generators such as `ABC, ABD` for `k` factors: each is a product of factor
/// letters; together they make 2^p blocks. Refused: a generator that is the identity, generators
/// that are products of the others (they would not split the runs further), and any product
/// that is a single factor (its main effect would be lost in the block differences). Returns the
/// generators in their standard spelling.
pub fn parse_block_generators(text: &str, k: usize) -> Result<Vec<String>, String> {
    use twofold_core::term::Term;
    let mut terms: Vec<Term> = Vec::new();
    for part in text
        .split([',', ';'])
        .map(str::trim)
        .filter(|t| !t.is_empty())
    {
        let t = Term::parse(part, k).map_err(|e| format!("“{part}”: {e}"))?;
        if t.is_identity() {
            return Err(format!("“{part}” is the identity, which splits nothing"));
        }
        terms.push(t);
    }
    if terms.len() > 4 {
        return Err("at most 4 block generators (16 blocks)".into());
    }
    // Every product of a non-empty subset of the generators is confounded with blocks.
    for subset in 1u32..(1u32 << terms.len()) {
        let bits = terms
            .iter()
            .enumerate()
            .filter(|(i, _)| subset & (1 << i) != 0)
            .fold(0u32, |acc, (_, t)| acc ^ t.bits());
        let product = Term::from_bits(bits);
        if product.is_identity() {
            return Err(
                "one generator is a product of the others, so it adds no blocks".to_string(),
            );
        }
        if product.order() == 1 {
            return Err(format!(
                "{} would be confounded with blocks: its main effect could not be told from the block differences",
                product.label()
            ));
        }
    }
    Ok(terms.iter().map(|t| t.label()).collect())
}

fn extras(
    ui: &mut Ui,
    project: &Project,
    draft: &mut DesignSettings,
    pal: &crate::theme::Palette,
    k: usize,
    block_text: &mut String,
) {
    let all_numeric = project.factors.iter().all(|f| f.is_numeric());
    Grid::new("design_extras")
        .num_columns(2)
        .spacing([12.0, 6.0])
        .show(ui, |ui| {
            ui.label("Centre points per block");
            ui.horizontal(|ui| {
                ui.add_enabled(
                    all_numeric,
                    egui::DragValue::new(&mut draft.centre_points_per_block).range(0..=32),
                )
                .accessible_name("centre points per block");
                if !all_numeric {
                    ui.weak("only when every factor is numeric");
                    draft.centre_points_per_block = 0;
                } else if draft.centre_points_per_block == 0 {
                    ui.weak("none: curvature cannot be checked");
                }
            });
            ui.end_row();
            ui.label("Replicates");
            ui.add(egui::DragValue::new(&mut draft.replicates).range(1..=16))
                .accessible_name("replicates");
            ui.end_row();
            ui.label("Blocks");
            let count = match &draft.blocks {
                BlockChoice::Count(n) => *n,
                BlockChoice::Generators(g) => 1u32 << g.len().min(8),
            };
            egui::ComboBox::from_id_salt("block_count")
                .selected_text(if count <= 1 {
                    "one block".to_string()
                } else {
                    format!("{count} blocks")
                })
                .show_ui(ui, |ui| {
                    for n in [1u32, 2, 4, 8, 16] {
                        let text = if n == 1 {
                            "one block".to_string()
                        } else {
                            format!("{n} blocks")
                        };
                        if ui.selectable_label(count == n, text).clicked() {
                            draft.blocks = BlockChoice::Count(n);
                            block_text.clear();
                        }
                    }
                })
                .response
                .accessible_name("blocks");
            ui.end_row();
            ui.label("Or block on");
            ui.horizontal(|ui| {
                let resp = ui
                    .add(
                        egui::TextEdit::singleline(block_text)
                            .hint_text("e.g. ABC, ABD")
                            .desired_width(160.0)
                            .min_size(egui::vec2(160.0, 0.0)),
                    )
                    .accessible_name("block generators");
                let parsed = parse_block_generators(block_text, k);
                if resp.changed() {
                    // Half-typed text keeps the last good choice; the error shows beside it.
                    match &parsed {
                        Ok(g) if g.is_empty() => draft.blocks = BlockChoice::Count(1),
                        Ok(g) => draft.blocks = BlockChoice::Generators(g.clone()),
                        Err(_) => {}
                    }
                }
                match &parsed {
                    Err(e) => {
                        ui.colored_label(pal.error, e);
                    }
                    Ok(g) if !g.is_empty() => {
                        ui.weak(format!(
                            "{} blocks; these interactions are confounded with blocks",
                            1usize << g.len()
                        ));
                    }
                    Ok(_) => {}
                }
            });
            ui.end_row();
            ui.label("Run order");
            ui.horizontal(|ui| {
                ui.checkbox(&mut draft.randomize, "randomised");
                ui.add_enabled_ui(draft.randomize, |ui| {
                    ui.label("seed");
                    ui.add(egui::DragValue::new(&mut draft.seed))
                        .accessible_name("seed");
                    if ui.button("new seed").clicked() {
                        draft.seed = fresh_seed(draft.seed);
                    }
                });
                if !draft.randomize {
                    ui.colored_label(
                        pal.warn,
                        "standard order: time trends will bias the effects",
                    );
                }
            });
            ui.end_row();
        });
}

/// A new seed from the clock, different from `old`.
fn fresh_seed(old: u64) -> u64 {
    let t = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_nanos() as u64)
        .unwrap_or(0);
    // Keep seeds short enough to read aloud and write on a sheet.
    let s = t % 1_000_000;
    if s == old { s + 1 } else { s }
}

/// The runs of the whole sheet the draft gives, block by block (the engine's count, as the page
/// and `twofold plan` state it), with warnings; the total, or `None` when it cannot be told.
fn summary(
    ui: &mut Ui,
    draft: &DesignSettings,
    k: usize,
    project: &Project,
    pal: &crate::theme::Palette,
) -> Option<usize> {
    let count = SheetRuns::of(draft, k)?;
    let total = count.total();
    ui.label(RichText::new(count.describe()).size(17.0).strong());
    if total > MAX_OFFERED_RUNS {
        ui.colored_label(pal.warn, format!("{total} runs is a very large sheet."));
    }
    if project.typed_value_count() > 0 && draft != &project.design {
        ui.colored_label(
            pal.warn,
            "The run sheet has typed values: you will be asked before it is remade.",
        );
    }
    Some(total)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn alias_list_shows_each_two_factor_chain_once() {
        // Montgomery 2017, table of selected fractions, 2^(8-4)_IV (E=BCD, F=ACD, G=ABC, H=ABD):
        // the 28 two-factor interactions fall into 7 chains of 4 (16 runs, 15 contrasts, 8 of
        // them for the main effects; counted by hand).
        let key: PreviewKey = (
            8,
            Some(16),
            ["E=BCD", "F=ACD", "G=ABC", "H=ABD"]
                .iter()
                .map(|g| g.to_string())
                .collect(),
        );
        let report = preview_of(&key).unwrap();
        let rows = alias_rows(&report);
        let two_factor: Vec<&String> = rows
            .iter()
            .filter_map(|r| match r {
                AliasRow::Chain { text, mixed: true } => Some(text),
                _ => None,
            })
            .collect();
        assert_eq!(two_factor.len(), 7, "{two_factor:?}");
        for chain in &two_factor {
            let members: Vec<&str> = chain.split(" = ").collect();
            assert_eq!(members.len(), 4, "{chain}");
            assert!(members.iter().all(|m| m.len() == 2), "{chain}");
        }
        assert!(two_factor.contains(&&"AB = CG = DH = EF".to_string()));
        // Eight main-effect rows (aliased with three-factor terms only) and the seven chains.
        assert_eq!(rows.len(), 15);
    }

    #[test]
    fn typed_block_generators_are_read_or_refused_with_the_reason() {
        assert_eq!(parse_block_generators("", 4).unwrap(), Vec::<String>::new());
        assert_eq!(
            parse_block_generators("cba, abd", 4).unwrap(),
            ["ABC", "ABD"]
        );
        // ABC × ABD = CD: allowed (a two-factor interaction is given up).
        assert!(parse_block_generators("ABC; ABD", 4).is_ok());
        let dependent = parse_block_generators("AB, CD, ABCD", 4).unwrap_err();
        assert!(dependent.contains("product of the others"), "{dependent}");
        let main = parse_block_generators("ABC, BC", 4).unwrap_err();
        assert!(main.contains("A would be confounded"), "{main}");
        let single = parse_block_generators("D", 4).unwrap_err();
        assert!(single.contains("D would be confounded"), "{single}");
        assert!(
            parse_block_generators("ABE", 4)
                .unwrap_err()
                .contains("ABE")
        );
        assert!(parse_block_generators("AB, AC, AD, BC, BD", 5).is_err());
    }
}
