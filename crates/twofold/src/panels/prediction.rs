//! The prediction pane: a control per factor in natural units giving the predicted response with
//! its confidence and prediction intervals, and the best settings to maximise, minimise or reach
//! a target.

use egui::{Grid, RichText, Ui};

use super::chart::fmt_num;
use super::run_sheet::natural_setting;
use super::widgets::{not_available, number_field, warning_box};
use super::{Command, Pane, View};
use twofold_core::predict::{DEFAULT_CONFIDENCE, Goal, Optimum, Prediction};
use twofold_core::term::LETTERS;
use twofold_study::project::{FactorKind, Project};

/// What the best-settings search aims for.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub enum Aim {
    /// As large as possible.
    #[default]
    Maximise,
    /// As small as possible.
    Minimise,
    /// As close as possible to the target.
    Target,
}

/// A prediction with the data revision, response and coded point it was made for.
type CachedPrediction = (u64, usize, Vec<f64>, Result<Prediction, String>);

/// View state of the prediction pane.
#[derive(Debug, Default)]
pub struct PredictionPane {
    /// Coded setting of each factor (kept coded so a change of levels keeps the position).
    coded: Vec<f64>,
    /// The goal of the best-settings search.
    pub aim: Aim,
    /// The target value for [`Aim::Target`].
    pub target: Option<f64>,
    /// Prediction at `coded`, cached for one revision and one point.
    prediction: Option<CachedPrediction>,
    /// Result of the last best-settings search and the data it was made for.
    optimum: Option<(u64, usize, Result<Optimum, String>)>,
    /// The map of where every goal is met.
    map: super::limits_map::LimitsMap,
}

/// Accessible name of the control of factor `index`.
pub fn control_name(index: usize) -> String {
    format!(
        "setting of factor {}",
        LETTERS.get(index).copied().unwrap_or('?')
    )
}

fn to_natural(project: &Project, i: usize, coded: f64) -> f64 {
    match project.factors.get(i).map(|f| &f.kind) {
        Some(FactorKind::Numeric { low, high }) => 0.5 * (low + high) + coded * 0.5 * (high - low),
        _ => coded,
    }
}

fn to_coded(project: &Project, i: usize, natural: f64) -> f64 {
    match project.factors.get(i).map(|f| &f.kind) {
        Some(FactorKind::Numeric { low, high }) if high != low => {
            (natural - 0.5 * (low + high)) / (0.5 * (high - low))
        }
        _ => natural,
    }
}

impl Pane for PredictionPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        egui::ScrollArea::vertical()
            .id_salt("predict_scroll")
            .auto_shrink([false, false])
            .show(ui, |ui| self.contents(ui, view, out));
    }
}

impl PredictionPane {
    fn contents(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        let pal = view.pal;
        let project = view.project;
        let k = project.factors.len();
        self.coded.resize(k, 0.0);
        super::goals::goals_grid(ui, view, out);
        ui.add_space(8.0);
        match view.decision {
            Some((revision, d)) => {
                if revision != view.revision {
                    ui.weak("Updating the best settings for the latest values…");
                }
                if let Some(point) = super::goals::best_table(ui, view, d) {
                    self.coded = point;
                }
                self.map.ui(ui, view, revision, d);
            }
            None => {
                ui.weak("Finding the best settings…");
            }
        }
        ui.add_space(12.0);
        ui.separator();
        let Some(res) = view.results_or_explain(ui) else {
            return;
        };
        let fit = match res.chosen_fit() {
            Ok(f) => f,
            Err(why) => {
                not_available(ui, &pal, &format!("Not available yet: {why}."));
                return;
            }
        };
        let def = project.responses.get(res.response);
        let unit = def.map_or("", |d| d.unit.as_str());
        let name = def.map_or("", |d| d.name.as_str());
        ui.label(RichText::new(format!("Try settings: {name} predicted")).strong());
        ui.spacing_mut().slider_width = 280.0;
        Grid::new("predict_controls")
            .num_columns(3)
            .spacing([12.0, 6.0])
            .show(ui, |ui| {
                for (i, f) in project.factors.iter().enumerate() {
                    ui.label(format!(
                        "{}  {}",
                        LETTERS.get(i).copied().unwrap_or('?'),
                        f.name
                    ));
                    match &f.kind {
                        FactorKind::Numeric { low, high } => {
                            let mut v = to_natural(project, i, self.coded[i]);
                            let (lo, hi) = (low.min(*high), low.max(*high));
                            let resp = ui.add(
                                egui::Slider::new(&mut v, lo..=hi)
                                    .clamping(egui::SliderClamping::Never)
                                    .suffix(if f.unit.is_empty() {
                                        String::new()
                                    } else {
                                        format!(" {}", f.unit)
                                    }),
                            );
                            let resp = resp.accessible_name(control_name(i));
                            if resp.changed() {
                                self.coded[i] = to_coded(project, i, v);
                            }
                        }
                        FactorKind::Categorical { .. } => {
                            ui.horizontal(|ui| {
                                let low = natural_setting(f, -1);
                                let high = natural_setting(f, 1);
                                if ui.selectable_label(self.coded[i] < 0.0, low).clicked() {
                                    self.coded[i] = -1.0;
                                }
                                if ui.selectable_label(self.coded[i] > 0.0, high).clicked() {
                                    self.coded[i] = 1.0;
                                }
                            });
                        }
                    }
                    let used = fit.terms.iter().any(|t| t.contains(i));
                    if !used {
                        ui.weak("not in the model: does not change the prediction");
                    } else if self.coded[i].abs() > 1.0 + 1e-9 {
                        ui.colored_label(pal.warn, "outside the tested levels");
                    } else if let Some((slo, shi)) = f.safe_range {
                        let v = to_natural(project, i, self.coded[i]);
                        if v < slo || v > shi {
                            ui.colored_label(pal.warn, "outside the safe range");
                        } else {
                            ui.label("");
                        }
                    } else {
                        ui.label("");
                    }
                    ui.end_row();
                }
            });
        if ui.button("Back to the centre").clicked() {
            self.coded.iter_mut().for_each(|c| *c = 0.0);
        }
        let stale = !matches!(&self.prediction,
            Some((rev, r, point, _)) if *rev == res.revision && *r == res.response && *point == self.coded);
        if stale {
            let p = res.predict(&self.coded, DEFAULT_CONFIDENCE);
            self.prediction = Some((res.revision, res.response, self.coded.clone(), p));
        }
        ui.add_space(8.0);
        if let Some((_, _, _, p)) = &self.prediction {
            match p {
                Ok(p) => {
                    prediction_card(ui, view, p, res, name, unit);
                    noise_lines(ui, view, fit, &self.coded, unit);
                }
                Err(e) => {
                    ui.colored_label(pal.error, e);
                }
            }
        }
        ui.add_space(12.0);
        ui.label(RichText::new(format!("Best for {name} alone")).strong());
        ui.horizontal(|ui| {
            ui.selectable_value(&mut self.aim, Aim::Maximise, "maximise");
            ui.selectable_value(&mut self.aim, Aim::Minimise, "minimise");
            ui.selectable_value(&mut self.aim, Aim::Target, "reach a target");
            if self.aim == Aim::Target {
                let t = number_field(
                    ui,
                    egui::Id::unique("predict_target"),
                    self.target,
                    90.0,
                    "target",
                );
                if let Some(v) = t.changed {
                    self.target = Some(v);
                }
                if let Some(e) = t.error {
                    ui.colored_label(pal.error, e);
                }
            }
            let goal = match self.aim {
                Aim::Maximise => Some(Goal::Maximise),
                Aim::Minimise => Some(Goal::Minimise),
                Aim::Target => self.target.map(Goal::Target),
            };
            if ui
                .add_enabled(goal.is_some(), egui::Button::new("Find"))
                .clicked()
                && let Some(goal) = goal
            {
                let r = res.best_settings(goal);
                self.optimum = Some((res.revision, res.response, r));
            }
        });
        let mut use_settings = None;
        if let Some((rev, r, result)) = &self.optimum {
            if *rev != res.revision || *r != res.response {
                ui.weak("The data or the model changed since: press Find again.");
            } else {
                match result {
                    Ok(o) => use_settings = optimum_card(ui, view, o, name, unit),
                    Err(e) => {
                        ui.colored_label(pal.error, e);
                    }
                }
            }
        }
        if let Some(s) = use_settings {
            self.coded = s;
        }
    }
}

/// For each noise factor, the slope of the response at the chosen control settings (noise at its
/// centre) and the spread all noise factors transmit there (`twofold_core::robust`).
fn noise_lines(
    ui: &mut Ui,
    view: &View<'_>,
    fit: &twofold_core::anova::ModelFit,
    coded: &[f64],
    unit: &str,
) {
    let noise: Vec<(usize, f64)> = view
        .project
        .factors
        .iter()
        .enumerate()
        .filter_map(|(i, f)| f.noise_sd.map(|sd| (i, sd)))
        .collect();
    if noise.is_empty() {
        return;
    }
    let surface = twofold_core::robust::Surface::from_fit(fit);
    let mut x = coded.to_vec();
    for (j, _) in &noise {
        if let Some(v) = x.get_mut(*j) {
            *v = 0.0;
        }
    }
    for (j, _) in &noise {
        let name = view.project.factors.get(*j).map_or("", |f| f.name.as_str());
        ui.label(format!(
            "Slope along the noise factor {name}: {} per coded unit (analysis scale)",
            fmt_num(surface.slope(&x, *j), 4)
        ));
    }
    ui.label(
        RichText::new(format!(
            "Spread the noise factors pass on here: {} {unit} (analysis scale; noise at its centre for the mean)",
            fmt_num(surface.transmitted_sd(&x, &noise), 4)
        ))
        .strong(),
    );
}

fn interval(i: Option<(f64, f64)>) -> String {
    i.map_or(
        "not available (no residual degrees of freedom)".into(),
        |(a, b)| format!("{} to {}", fmt_num(a, 4), fmt_num(b, 4)),
    )
}

fn prediction_card(
    ui: &mut Ui,
    view: &View<'_>,
    p: &Prediction,
    res: &twofold_study::report::Report,
    name: &str,
    unit: &str,
) {
    let pal = view.pal;
    let back = p.back_transformed(&res.transform);
    egui::Frame::new()
        .fill(pal.card_bg)
        .corner_radius(4.0)
        .inner_margin(egui::Margin::same(10))
        .show(ui, |ui| {
            ui.label(
                RichText::new(format!(
                    "{name} ≈ {} {unit}",
                    back.value.map_or("—".to_string(), |v| fmt_num(v, 4))
                ))
                .size(26.0).family(crate::theme::bold_family())
                .strong(),
            );
            ui.label(format!(
                "{:.0}% confidence interval for the mean: {}",
                p.confidence * 100.0,
                interval(back.confidence_interval)
            ));
            ui.label(format!(
                "{:.0}% prediction interval for one new run: {}",
                p.confidence * 100.0,
                interval(back.prediction_interval)
            ));
            if p.extrapolated {
                warning_box(ui, &pal, "Some settings lie outside the tested levels: the model is extrapolating and may be far off.");
            }
            if p.curvature_warning {
                warning_box(ui, &pal, "The centre points show curvature: predictions between the corners may be off.");
            }
        });
}

/// Shows the best settings; returns them (coded, factors that do not matter at the centre) when
/// the engineer asks to try them in the controls.
fn optimum_card(
    ui: &mut Ui,
    view: &View<'_>,
    o: &Optimum,
    name: &str,
    unit: &str,
) -> Option<Vec<f64>> {
    let pal = view.pal;
    let project = view.project;
    let mut chosen = None;
    egui::Frame::new()
        .stroke(egui::Stroke::new(1.0, pal.accent))
        .corner_radius(4.0)
        .inner_margin(egui::Margin::same(10))
        .show(ui, |ui| {
            Grid::new("optimum").num_columns(2).spacing([16.0, 4.0]).show(ui, |ui| {
                for (i, s) in o.settings.iter().enumerate() {
                    let Some(f) = project.factors.get(i) else {
                        continue;
                    };
                    ui.label(&f.name);
                    match s {
                        Some(c) => {
                            let text = match &f.kind {
                                FactorKind::Numeric { .. } => {
                                    let v = to_natural(project, i, *c);
                                    format!("{} {}", fmt_num(v, 5), f.unit)
                                }
                                FactorKind::Categorical { .. } => {
                                    natural_setting(f, if *c < 0.0 { -1 } else { 1 })
                                }
                            };
                            ui.label(RichText::new(text).strong());
                        }
                        None => {
                            ui.weak("does not matter");
                        }
                    }
                    ui.end_row();
                }
            });
            ui.label(
                RichText::new(format!(
                    "{name} ≈ {} {unit}",
                    o.value.map_or("—".to_string(), |v| fmt_num(v, 4))
                ))
                .size(20.0),
            );
            if o.equally_good > 1 {
                ui.weak(format!("{} settings are equally good; this is one of them.", o.equally_good));
            }
            if o.target_reached == Some(false) {
                ui.colored_label(pal.warn, "The target cannot be reached inside the tested levels; this is the closest.");
            }
            if o.curvature_warning {
                warning_box(ui, &pal, "The centre points show curvature: the true best setting may lie inside the box, which this model cannot see.");
            }
            for (i, s) in o.settings.iter().enumerate() {
                if let (Some(c), Some(f)) = (s, project.factors.get(i))
                    && let Some((lo, hi)) = f.safe_range
                {
                    let v = to_natural(project, i, *c);
                    if v < lo || v > hi {
                        warning_box(ui, &pal, &format!("{} at {} is outside its safe range {} to {}.", f.name, fmt_num(v, 5), fmt_num(lo, 5), fmt_num(hi, 5)));
                    }
                }
            }
            ui.weak("A suggestion from the model, not an approved setting: confirm it with a run before using it.");
            if ui.button("Try these settings above").clicked() {
                chosen = Some(o.settings.iter().map(|s| s.unwrap_or(0.0)).collect());
            }
        });
    chosen
}
