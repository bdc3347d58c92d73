//! The goals of every response and the settings that meet them best: the top of "Which settings
//! to run?". Reads the one decision of the engine (`twofold_study::report::decide`) from the
//! [`View`]; every goal typed here is an [`Edit::SetGoal`].

use egui::{ComboBox, Grid, RichText, Ui};

use super::chart::fmt_num;
use super::widgets::{number_field, warning_box};
use super::{Command, View};
use twofold_study::project::{Edit, GoalAim, Project};
use twofold_study::report::{Choice, Decision};

/// The kinds of goal a chooser offers, with their words.
const KINDS: [(&str, Kind); 4] = [
    ("ignored", Kind::Ignore),
    ("as large as possible", Kind::Max),
    ("as small as possible", Kind::Min),
    ("near a target", Kind::Target),
];

#[derive(Debug, Clone, Copy, PartialEq)]
enum Kind {
    Ignore,
    Max,
    Min,
    Target,
}

fn kind_of(aim: &GoalAim) -> Kind {
    match aim {
        GoalAim::Ignore => Kind::Ignore,
        GoalAim::Maximise { .. } => Kind::Max,
        GoalAim::Minimise { .. } => Kind::Min,
        GoalAim::Target { .. } => Kind::Target,
    }
}

/// Accessible name of a goal chooser.
pub fn goal_chooser_name(response: &str, spread: bool) -> String {
    if spread {
        format!("goal of the spread of {response}")
    } else {
        format!("goal of {response}")
    }
}

/// Accessible name of a goal's number field: `lower limit of Gloss`, `target of spread of Gloss`.
pub fn goal_field_name(part: &str, label: &str) -> String {
    let what = match part {
        "low" => "lower limit",
        "high" => "upper limit",
        other => other,
    };
    format!("{what} of {label}")
}

/// Smallest and largest value typed for a response (limits offered when a goal is first chosen).
fn observed_range(project: &Project, response: usize) -> (f64, f64) {
    let values: Vec<f64> = project
        .runs
        .iter()
        .filter_map(|r| r.values.get(response).and_then(|c| c.number()))
        .collect();
    let lo = values.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if lo.is_finite() && hi > lo {
        (lo, hi)
    } else {
        (0.0, 1.0)
    }
}

/// The aim of `kind` with limits taken from the old aim where it had them, else from `range`.
fn new_aim(kind: Kind, old: &GoalAim, range: (f64, f64)) -> GoalAim {
    let (low, high) = match *old {
        GoalAim::Maximise { low, high, .. }
        | GoalAim::Minimise { low, high, .. }
        | GoalAim::Target { low, high, .. } => (low, high),
        GoalAim::Ignore => range,
    };
    match kind {
        Kind::Ignore => GoalAim::Ignore,
        Kind::Max => GoalAim::Maximise {
            low,
            high,
            shape: 1.0,
        },
        Kind::Min => GoalAim::Minimise {
            low,
            high,
            shape: 1.0,
        },
        Kind::Target => GoalAim::Target {
            low,
            target: 0.5 * (low + high),
            high,
            shape_below: 1.0,
            shape_above: 1.0,
        },
    }
}

/// One row of the goals grid; pushes an edit when something changed.
fn goal_row(ui: &mut Ui, view: &View<'_>, response: usize, spread: bool, out: &mut Vec<Command>) {
    let Some(def) = view.project.responses.get(response) else {
        return;
    };
    let goal = if spread { def.spread_goal } else { def.goal };
    let label = if spread {
        format!("spread of {}", def.name)
    } else {
        def.name.clone()
    };
    ui.label(&label);
    let mut kind = kind_of(&goal.aim);
    let before = kind;
    let offered: &[(&str, Kind)] = if spread {
        &[KINDS[0], KINDS[2]]
    } else {
        &KINDS
    };
    let words = offered
        .iter()
        .find(|(_, k)| *k == kind)
        .map_or("ignored", |(w, _)| w);
    ComboBox::from_id_salt(("goal_kind", response, spread))
        .selected_text(words)
        .width(170.0)
        .show_ui(ui, |ui| {
            for (w, k) in offered {
                ui.selectable_value(&mut kind, *k, *w);
            }
        })
        .response
        .accessible_name(goal_chooser_name(&def.name, spread));
    let mut next = goal;
    if kind != before {
        let range = if spread {
            let (lo, hi) = observed_range(view.project, response);
            (0.0, 0.25 * (hi - lo))
        } else {
            observed_range(view.project, response)
        };
        next.aim = new_aim(kind, &goal.aim, range);
    }
    let id = egui::Id::unique(("goal", response, spread));
    let field = |ui: &mut Ui, salt: &str, value: f64, hint: &str| -> Option<f64> {
        let r = number_field(ui, id.with(salt), Some(value), 70.0, hint);
        if let Some(resp) = ui.ctx().read_response(id.with(salt)) {
            let _ = resp.accessible_name(goal_field_name(salt, &label));
        }
        if let Some(e) = &r.error {
            ui.colored_label(view.pal.error, e);
        }
        r.changed
    };
    match &mut next.aim {
        GoalAim::Ignore => {
            ui.label("");
            ui.label("");
            ui.label("");
            ui.label("");
        }
        GoalAim::Maximise { low, high, .. } | GoalAim::Minimise { low, high, .. } => {
            if let Some(v) = field(ui, "low", *low, "lower") {
                *low = v;
            }
            ui.label("");
            if let Some(v) = field(ui, "high", *high, "upper") {
                *high = v;
            }
        }
        GoalAim::Target {
            low, target, high, ..
        } => {
            if let Some(v) = field(ui, "low", *low, "lower") {
                *low = v;
            }
            if let Some(v) = field(ui, "target", *target, "target") {
                *target = v;
            }
            if let Some(v) = field(ui, "high", *high, "upper") {
                *high = v;
            }
        }
    }
    if !matches!(next.aim, GoalAim::Ignore) {
        if let Some(v) = field(ui, "importance", next.importance, "1") {
            next.importance = v;
        }
        match next.to_core().map(|g| g.validate()) {
            Some(Err(e)) => {
                ui.colored_label(view.pal.error, e.to_string());
            }
            _ => {
                ui.label("");
            }
        }
    }
    ui.end_row();
    if next != goal {
        out.push(Command::Edit(Edit::SetGoal {
            response,
            spread,
            goal: next,
        }));
    }
}

/// The goals grid of every response (and of their spread when noise factors exist).
pub fn goals_grid(ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
    let noise = view.project.factors.iter().any(|f| f.noise_sd.is_some());
    ui.label(RichText::new("Goals").strong());
    Grid::new("goals_grid")
        .num_columns(7)
        .spacing([10.0, 6.0])
        .show(ui, |ui| {
            for h in [
                "Response",
                "Goal",
                "Lower limit",
                "Target",
                "Upper limit",
                "Importance",
            ] {
                ui.label(RichText::new(h).weak());
            }
            ui.end_row();
            for r in 0..view.project.responses.len() {
                goal_row(ui, view, r, false, out);
                if noise {
                    goal_row(ui, view, r, true, out);
                }
            }
        });
    ui.weak(
        "Maximise: worthless at the lower limit, fully met at the upper. Minimise: fully met at the lower, worthless at the upper. Each goal's desirability (0 to 1) is combined into one overall D (Derringer & Suich).",
    );
}

/// The best settings found, best first; returns the coded point of a row whose "Try" was clicked.
pub fn best_table(ui: &mut Ui, view: &View<'_>, d: &Decision) -> Option<Vec<f64>> {
    let pal = view.pal;
    let project = view.project;
    let best = match &d.best {
        Ok(b) => b,
        Err(why) => {
            ui.label(RichText::new(format!("No settings to show: {why}.")).color(pal.muted));
            return None;
        }
    };
    let mut tried = None;
    ui.label(RichText::new("Best settings for every goal").strong());
    egui::ScrollArea::horizontal()
        .id_salt("best_scroll")
        .show(ui, |ui| {
            Grid::new("best_grid")
                .num_columns(3 + project.factors.len() + project.responses.len())
                .striped(true)
                .spacing([12.0, 4.0])
                .show(ui, |ui| {
                    ui.label("");
                    ui.label("");
                    ui.label(RichText::new("D").weak())
                        .on_hover_text("overall desirability, 0 to 1");
                    for f in &project.factors {
                        ui.label(RichText::new(&f.name).weak());
                    }
                    for r in &project.responses {
                        ui.label(RichText::new(&r.name).weak());
                    }
                    ui.end_row();
                    for (rank, c) in best.iter().enumerate() {
                        ui.label(format!("{}", rank + 1));
                        if ui
                            .button("Try")
                            .on_hover_text("put these settings in the controls below")
                            .clicked()
                        {
                            tried = Some(c.coded.clone());
                        }
                        ui.label(RichText::new(fmt_num(c.overall, 3)).strong());
                        for (f, s) in project.factors.iter().zip(&c.natural) {
                            ui.label(s.words(&f.unit));
                        }
                        for o in &c.responses {
                            ui.label(outcome_words(project, o));
                        }
                        ui.end_row();
                    }
                });
        });
    if let Some(first) = best.first() {
        binding_lines(ui, view, first);
    }
    for n in &d.notes {
        warning_box(ui, &pal, n);
    }
    ui.weak(
        "A suggestion from the models, not an approved setting: stay inside safe operating limits and confirm with runs before changing production.",
    );
    tried
}

fn outcome_words(project: &Project, o: &twofold_study::report::ResponseOutcome) -> String {
    let unit = project
        .responses
        .get(o.response)
        .map_or("", |r| r.unit.as_str());
    let mut s = match o.predicted {
        Some(v) => format!("{} {unit}", fmt_num(v, 4)),
        None => "—".to_string(),
    };
    if let Some((a, b)) = o.interval {
        s.push_str(&format!(" ({}–{})", fmt_num(a, 4), fmt_num(b, 4)));
    }
    if let Some(d) = o.desirability {
        s.push_str(&format!("  d {}", fmt_num(d, 2)));
    }
    if let Some(sd) = o.transmitted_sd {
        s.push_str(&format!("  ± {} from noise", fmt_num(sd, 3)));
    }
    s
}

fn binding_lines(ui: &mut Ui, view: &View<'_>, c: &Choice) {
    for w in &c.binding {
        ui.label(RichText::new(w).color(view.pal.ink));
    }
}
