//! The factor plots pane: a main-effect plot per factor and a two-line interaction plot per pair
//! of factors (every pair, or only those in the model), the model's terms highlighted.

use egui::{RichText, Ui, vec2};

use super::model_cells;
use super::plots::{InteractionPlot, MainEffectPlot, shared_range};
use super::run_sheet::natural_setting;
use super::widgets::{not_available, tiles};
use super::{Command, Pane, View};
use twofold_core::means::InteractionMeans;
use twofold_core::term::{LETTERS, Term};
use twofold_study::project::Project;
use twofold_study::report::Report;

/// Which pairs get an interaction plot.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum PairChoice {
    /// Pairs whose interaction is in the model (every pair for up to five factors when the model
    /// has none).
    #[default]
    InModel,
    /// Every pair.
    All,
    /// Pairs of a control factor and a noise factor, the noise factor drawn as the two lines:
    /// where the lines come together, the response does not follow the noise.
    ControlByNoise,
}

/// View state of the factor plots pane: plot data built once per data revision.
#[derive(Debug, Default)]
pub struct PlotsPane {
    /// Which pairs to draw.
    pub pairs: PairChoice,
    built: Option<Built>,
}

/// The pair drawn with the noise factor as the two lines when `a` is the noise factor of a
/// control-by-noise pair (x axis: the control factor).
fn noise_as_lines(
    mut plot: InteractionPlot,
    a_is_noise: bool,
    letters: (char, char),
) -> InteractionPlot {
    if !a_is_noise {
        return plot;
    }
    std::mem::swap(&mut plot.a, &mut plot.b);
    std::mem::swap(&mut plot.a_levels, &mut plot.b_levels);
    let m = plot.means;
    plot.means = [[m[0][0], m[1][0]], [m[0][1], m[1][1]]];
    if let Some(p) = plot.predicted {
        plot.predicted = Some([[p[0][0], p[1][0]], [p[0][1], p[1][1]]]);
    }
    plot.term = format!("{}{}", letters.1, letters.0);
    plot
}

/// Whether exactly one of the pair is a noise factor, and whether it is the first.
fn control_by_noise(project: &Project, a: usize, b: usize) -> Option<bool> {
    let noise = |i: usize| project.factors.get(i).is_some_and(|f| f.noise_sd.is_some());
    match (noise(a), noise(b)) {
        (true, false) => Some(true),
        (false, true) => Some(false),
        _ => None,
    }
}

#[derive(Debug)]
struct Built {
    key: (u64, usize),
    mains: Vec<MainEffectPlot>,
    interactions: Vec<InteractionPlot>,
    /// Control-by-noise pairs, the noise factor as the lines.
    noise_pairs: Vec<InteractionPlot>,
    y: (f64, f64),
}

/// Most interaction plots drawn at once (25 factors have 300 pairs).
pub const MAX_INTERACTION_PLOTS: usize = 60;

fn level_labels(project: &Project, f: usize) -> [String; 2] {
    match project.factors.get(f) {
        Some(x) => [natural_setting(x, -1), natural_setting(x, 1)],
        None => ["−".into(), "+".into()],
    }
}

/// The chosen model's cells of every pair, when a model is chosen and fitted: the one place this
/// pane reads them from the report.
fn model_cells_of(res: &Report) -> Option<&[InteractionMeans]> {
    res.chosen_fit().ok()?;
    res.interactions.as_deref().ok()
}

fn build(view: &View<'_>, res: &Report) -> Built {
    let p = view.project;
    let mains: Vec<MainEffectPlot> = res
        .main_means
        .iter()
        .map(|m| {
            let [low, high] = level_labels(p, m.factor);
            MainEffectPlot {
                factor: format!(
                    "{} {}",
                    LETTERS.get(m.factor).copied().unwrap_or('?'),
                    p.factors.get(m.factor).map_or("", |f| f.name.as_str())
                ),
                low,
                high,
                means: [m.low, m.high],
                centre: res.centre_mean,
                in_model: res.fitted(Term::main(m.factor)),
            }
        })
        .collect();
    let cells = model_cells_of(res);
    let interactions: Vec<InteractionPlot> = res
        .pairs
        .iter()
        .map(|pm| {
            let (a, b) = pm.factors;
            let term = Term::main(a).times(Term::main(b));
            InteractionPlot {
                term: term.label(),
                a: p.factors.get(a).map_or(String::new(), |f| f.name.clone()),
                a_levels: level_labels(p, a),
                b: p.factors.get(b).map_or(String::new(), |f| f.name.clone()),
                b_levels: level_labels(p, b),
                means: pm.means,
                in_model: res.fitted(term),
                predicted: cells.and_then(|c| model_cells::corners_of(c, a, b)),
            }
        })
        .collect();
    let noise_pairs: Vec<InteractionPlot> = res
        .pairs
        .iter()
        .zip(&interactions)
        .filter_map(|(pm, plot)| {
            let (a, b) = pm.factors;
            let first = control_by_noise(p, a, b)?;
            let letters = (
                LETTERS.get(a).copied().unwrap_or('?'),
                LETTERS.get(b).copied().unwrap_or('?'),
            );
            Some(noise_as_lines(plot.clone(), first, letters))
        })
        .collect();
    let y = shared_range(
        mains
            .iter()
            .flat_map(|m| m.means.iter().flatten().copied().chain(m.centre))
            .chain(
                interactions
                    .iter()
                    .flat_map(|i| i.means.iter().flatten().flatten().copied()),
            )
            .chain(
                interactions
                    .iter()
                    .filter_map(|i| i.predicted.as_ref())
                    .flat_map(model_cells::extent),
            ),
    );
    Built {
        key: (res.revision, res.response),
        mains,
        interactions,
        noise_pairs,
        y,
    }
}

impl Pane for PlotsPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, _out: &mut Vec<Command>) {
        let Self { pairs, built } = self;
        let pal = view.pal;
        let Some(res) = view.results else {
            view.results_or_explain(ui);
            return;
        };
        if res.used_runs == 0 {
            not_available(ui, &pal, "Not available yet: no run has a value.");
            return;
        }
        if built.as_ref().map(|b| b.key) != Some((res.revision, res.response)) {
            *built = Some(build(view, res));
        }
        let Some(built) = built.as_ref() else {
            return;
        };
        let y_label = view
            .project
            .responses
            .get(res.response)
            .map_or(String::new(), |r| r.name.clone());
        egui::ScrollArea::vertical()
            .auto_shrink([false, false])
            .show(ui, |ui| {
                ui.label(RichText::new("Main effects").strong());
                ui.label(
                    RichText::new("● title and lines in colour: the term is in the model; grey: it is not")
                        .color(pal.model_colour(true)),
                );
                if res.centre_mean.is_some() {
                    ui.weak("◆ mean of the centre points");
                }
                let size = vec2(230.0, 170.0);
                tiles(ui, built.mains.len(), size.x, |ui, i| {
                    built.mains[i].show(ui, &pal, size, built.y, &y_label);
                });
                ui.add_space(10.0);
                ui.horizontal(|ui| {
                    ui.label(RichText::new("Interactions").strong());
                    ui.selectable_value(pairs, PairChoice::InModel, "in the model");
                    ui.selectable_value(pairs, PairChoice::All, "every pair");
                    if !built.noise_pairs.is_empty() {
                        ui.selectable_value(pairs, PairChoice::ControlByNoise, "control × noise");
                    }
                });
                if built.noise_pairs.is_empty() && *pairs == PairChoice::ControlByNoise {
                    *pairs = PairChoice::InModel;
                }
                let any_in_model = built.interactions.iter().any(|i| i.in_model);
                let few = view.project.factors.len() <= 5;
                let source = if *pairs == PairChoice::ControlByNoise {
                    &built.noise_pairs
                } else {
                    &built.interactions
                };
                let shown: Vec<&InteractionPlot> = source
                    .iter()
                    .filter(|i| match *pairs {
                        PairChoice::All | PairChoice::ControlByNoise => true,
                        PairChoice::InModel => i.in_model || (!any_in_model && few),
                    })
                    .take(MAX_INTERACTION_PLOTS)
                    .collect();
                if shown.is_empty() {
                    ui.weak("No two-factor interaction is in the model. Choose “every pair” to see them all.");
                }
                if !any_in_model && few && *pairs == PairChoice::InModel {
                    ui.weak("No interaction is in the model yet: showing every pair.");
                }
                if *pairs == PairChoice::ControlByNoise {
                    ui.weak("The noise factor is drawn as the two lines. Where the lines come close, the response hardly follows the noise: a setting there is robust.");
                } else {
                    ui.weak("Parallel lines: no interaction. Crossing or diverging lines: the effect of one factor depends on the other.");
                }
                if shown.iter().any(|i| i.predicted.is_some()) {
                    ui.label(RichText::new(model_cells::LEGEND).size(13.0));
                }
                let isize = vec2(290.0, 190.0);
                tiles(ui, shown.len(), isize.x, |ui, i| {
                    shown[i].show(ui, &pal, isize, built.y);
                });
                if built.interactions.len() > MAX_INTERACTION_PLOTS && *pairs == PairChoice::All {
                    ui.weak(format!(
                        "The first {MAX_INTERACTION_PLOTS} of {} pairs are drawn.",
                        built.interactions.len()
                    ));
                }
            });
    }
}
