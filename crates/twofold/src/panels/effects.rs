//! The effects pane: ranked effect bars with Lenth's margins and the half-normal plot, where
//! clicking a bar or a point adds or removes that term from the model; a term list does the same
//! by keyboard. The charts take no keyboard focus, so Tab goes from the pane's buttons to the
//! term list without stopping on every bar and point.

use egui::{RichText, Ui};

use super::chart::EFFECT_LEGEND;
use super::plots::{EffectBar, EffectBars, HalfNormalPlot, HalfNormalPoint};
use super::widgets::{not_available, warning_box};
use super::{Command, Pane, View};
use twofold_core::lenth::Significance;
use twofold_core::term::Term;
use twofold_study::project::{Edit, Project};
use twofold_study::report::{Report, WarningKind};

/// View state of the effects pane: the plot data built once per data revision.
#[derive(Debug, Default)]
pub struct EffectsPane {
    built: Option<Built>,
}

#[derive(Debug)]
struct Built {
    key: (u64, usize),
    bars: EffectBars,
    /// Term of each bar.
    bar_terms: Vec<Term>,
    half: HalfNormalPlot,
    /// Term of each half-normal point.
    half_terms: Vec<Term>,
    /// A split-plot study: one half-normal plot per stratum (title, plot, term of each point),
    /// each with its own stratum's Lenth margins.
    strata_half: Vec<(String, HalfNormalPlot, Vec<Term>)>,
    /// The terms beyond Lenth's ME (what "Choose the effects beyond ME" sets), when there are
    /// margins, and the list as one line for its hover text.
    beyond: Option<(Vec<String>, String)>,
    /// The term list, ranked: each term, its text (stars, "for hierarchy") and accessible name.
    term_list: Vec<TermEntry>,
}

/// One entry of the term list, its text made once per data revision.
#[derive(Debug)]
struct TermEntry {
    term: Term,
    text: String,
    name: String,
}

/// Above this many terms the term list draws only the rows in view (a 4096-run design has 4095
/// terms; drawing every checkbox each frame made the pane slow).
const TERM_LIST_ALL_DRAWN: usize = 127;

/// Half-normal plot data of `points` with the margins `lenth`.
fn half_plot(
    res: &Report,
    points: &[twofold_core::halfnormal::HalfNormalPoint],
    lenth: Option<&twofold_core::lenth::Lenth>,
) -> (HalfNormalPlot, Vec<Term>) {
    let plot = HalfNormalPlot::new(
        points
            .iter()
            .map(|p| HalfNormalPoint {
                label: p.term.label(),
                abs_effect: p.abs_effect,
                quantile: p.quantile,
                positive: p.effect >= 0.0,
                in_model: res.fitted(p.term),
            })
            .collect(),
        lenth.map(|l| l.pse),
        lenth.map(|l| l.me),
    );
    (plot, points.iter().map(|p| p.term).collect())
}

/// Title of a stratum's half-normal plot.
pub fn stratum_plot_title(stratum: twofold_core::splitplot::Stratum) -> &'static str {
    match stratum {
        twofold_core::splitplot::Stratum::WholePlot => "Half-normal plot: whole-plot effects",
        twofold_core::splitplot::Stratum::Subplot => "Half-normal plot: subplot effects",
    }
}

/// Accessible name of a term's entry in the term list.
pub fn term_checkbox_label(term: &str) -> String {
    format!("term {term}")
}

/// A term with its factor names: `AB` → `Temperature × Time`.
pub fn term_names(project: &Project, term: Term) -> String {
    factor_names(project, term).join(" × ")
}

/// The names of a term's factors: `AB` → `[Temperature, Time]`.
fn factor_names(project: &Project, term: Term) -> Vec<String> {
    term.factors()
        .map(|i| {
            project
                .factors
                .get(i)
                .map_or("?", |f| f.name.as_str())
                .to_string()
        })
        .collect()
}

fn build(view: &View<'_>, res: &Report) -> Option<Built> {
    let table = res.effects.as_ref().ok()?;
    let mut order: Vec<usize> = (0..table.effects.len()).collect();
    order.sort_by(|&a, &b| {
        table.effects[b]
            .effect
            .abs()
            .partial_cmp(&table.effects[a].effect.abs())
            .unwrap_or(std::cmp::Ordering::Equal)
    });
    let (me, sme) = match &res.lenth {
        Ok(l) => (Some(l.me), Some(l.sme)),
        Err(_) => (None, None),
    };
    let bars: Vec<EffectBar> = order
        .iter()
        .map(|&i| {
            let e = &table.effects[i];
            let aliases: Vec<String> = e
                .aliases
                .iter()
                .filter(|a| a.term.order() <= 3)
                .map(|a| format!("= {a}"))
                .collect();
            let (detail, detail_sep) = if aliases.is_empty() {
                (factor_names(view.project, e.term), " × ")
            } else {
                (aliases, " ")
            };
            EffectBar {
                label: e.term.label(),
                detail,
                detail_sep,
                value: e.effect,
                in_model: res.fitted(e.term),
            }
        })
        .collect();
    let bar_terms = order.iter().map(|&i| table.effects[i].term).collect();
    let (half, half_terms) = half_plot(res, &res.half_normal, res.lenth.as_ref().ok());
    let strata_half = res
        .strata
        .as_ref()
        .map(|st| {
            st.half_normal
                .iter()
                .filter(|(_, pts)| !pts.is_empty())
                .map(|(s, pts)| {
                    let lenth = st
                        .lenth
                        .iter()
                        .find(|(x, _)| x == s)
                        .and_then(|(_, l)| l.as_ref().ok());
                    let (plot, terms) = half_plot(res, pts, lenth);
                    (stratum_plot_title(*s).to_string(), plot, terms)
                })
                .collect()
        })
        .unwrap_or_default();
    let beyond = res.lenth.as_ref().ok().map(|l| {
        // The same rule as the default choice (beyond the SME when the ME's list is too long).
        let (terms, note) = twofold_study::report::lenth_selection(table, l);
        let beyond: Vec<String> = terms.iter().map(|t| t.label()).collect();
        let mut hover = format!("Sets the model to: {}", beyond.join(", "));
        if let Some(note) = note {
            hover.push_str(&format!(" ({note})"));
        }
        (beyond, hover)
    });
    let term_list = order
        .iter()
        .map(|&i| {
            let t = table.effects[i].term;
            let label = t.label();
            let mut text = label.clone();
            if !res.in_model(t) && res.fitted(t) {
                text.push_str(" (for hierarchy)");
            }
            if let Ok(l) = &res.lenth {
                match l.classify(table.effects[i].effect) {
                    Significance::BeyondSme => text.push_str(" **"),
                    Significance::BeyondMe => text.push_str(" *"),
                    _ => {}
                }
            }
            TermEntry {
                term: t,
                text,
                name: term_checkbox_label(&label),
            }
        })
        .collect();
    Some(Built {
        key: (res.revision, res.response),
        bars: EffectBars { bars, me, sme },
        bar_terms,
        half,
        half_terms,
        strata_half,
        beyond,
        term_list,
    })
}

/// Said beside a split-plot study's effects: the bars and the half-normal plot pool both strata.
pub const POOLED_NOTE: &str = "The ME and SME lines of the bars pool both strata: judge whole-plot and subplot effects by their own margins above and by the half-normal plot of each stratum.";

impl Pane for EffectsPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        let Self { built } = self;
        let pal = view.pal;
        let Some(res) = view.results else {
            view.results_or_explain(ui);
            return;
        };
        ui.label(
            RichText::new(format!(
                "{} of {} runs have a value{}.",
                res.used_runs,
                res.total_runs,
                if res.excluded_runs > 0 {
                    format!(", {} excluded", res.excluded_runs)
                } else {
                    String::new()
                }
            ))
            .color(pal.muted),
        );
        let table = match &res.effects {
            Ok(t) => t,
            Err(why) => {
                not_available(ui, &pal, &format!("Not available yet: {why}."));
                return;
            }
        };
        if built.as_ref().map(|b| b.key) != Some((res.revision, res.response)) {
            *built = build(view, res);
        }
        let Some(built) = built.as_ref() else {
            return;
        };
        for w in res.warnings_of(&[WarningKind::Data, WarningKind::Effects]) {
            warning_box(ui, &pal, w);
        }
        if let Err(why) = &res.lenth {
            ui.colored_label(pal.muted, format!("No margins of error: {why}."));
        }
        if let Some(strata) = &res.strata {
            for line in strata.sentences(table) {
                ui.label(RichText::new(line).color(pal.ink));
            }
            warning_box(ui, &pal, POOLED_NOTE);
        }
        let toggle = |term: Term, out: &mut Vec<Command>| {
            out.push(Command::Edit(Edit::ToggleTerm {
                response: res.response,
                term: term.label(),
            }));
        };
        egui::ScrollArea::vertical()
            .auto_shrink([false, false])
            .show(ui, |ui| {
                ui.columns(2, |cols| {
                    cols[0].label(RichText::new("Ranked effects").strong());
                    cols[0].weak(format!(
                        "{EFFECT_LEGEND}. Dashed line ME, solid SME (Lenth)."
                    ));
                    if let Some(i) = built.bars.show(&mut cols[0], &pal)
                        && let Some(&t) = built.bar_terms.get(i)
                    {
                        toggle(t, out);
                    }
                    if built.strata_half.is_empty() {
                        cols[1].label(RichText::new("Half-normal plot").strong());
                        cols[1].weak(format!(
                            "{EFFECT_LEGEND}. Click a point or a bar to add or remove its term."
                        ));
                        if let Some(i) = built.half.show(&mut cols[1], &pal, 360.0)
                            && let Some(&t) = built.half_terms.get(i)
                        {
                            toggle(t, out);
                        }
                    } else {
                        cols[1].weak(format!(
                            "{EFFECT_LEGEND}. Each stratum on its own plot, with its own Lenth line. Click a point or a bar to add or remove its term."
                        ));
                        for (title, plot, terms) in &built.strata_half {
                            cols[1].label(RichText::new(title.as_str()).strong());
                            let clicked = cols[1]
                                .push_id(title.as_str(), |ui| plot.show(ui, &pal, 220.0))
                                .inner;
                            if let Some(i) = clicked
                                && let Some(&t) = terms.get(i)
                            {
                                toggle(t, out);
                            }
                        }
                    }
                });
                ui.add_space(8.0);
                ui.horizontal(|ui| {
                    ui.label(RichText::new("Terms in the model").strong());
                    if let Some((beyond, hover)) = &built.beyond {
                        let choose = ui
                            .button("Choose the effects beyond ME")
                            .on_hover_text(hover.as_str());
                        // Opening the step puts the keyboard on the usual first decision.
                        super::widgets::prefer_first(ui, choose.id);
                        if choose.clicked() {
                            out.push(Command::Edit(Edit::SetTerms {
                                response: res.response,
                                terms: beyond.clone(),
                            }));
                        }
                    }
                    if ui.button("Clear the model").clicked() {
                        out.push(Command::Edit(Edit::SetTerms {
                            response: res.response,
                            terms: Vec::new(),
                        }));
                    }
                });
                term_list(ui, &built.term_list, res, out);
                ui.weak("* beyond ME, ** beyond SME.");
                if res.missing_runs > 0 || !table.not_estimable.is_empty() {
                    ui.add_space(6.0);
                    let can: Vec<String> = table
                        .effects
                        .iter()
                        .filter(|e| e.term.order() <= 2)
                        .map(|e| e.term.label())
                        .collect();
                    ui.label(RichText::new("While runs are missing").strong());
                    ui.label(format!(
                        "Can be estimated already: {}.",
                        if can.is_empty() {
                            "none".to_string()
                        } else {
                            can.join(", ")
                        }
                    ));
                    if !table.not_estimable.is_empty() {
                        let not: Vec<String> = table
                            .not_estimable
                            .iter()
                            .filter(|t| t.order() <= 2)
                            .map(|t| t.label())
                            .collect();
                        if !not.is_empty() {
                            ui.colored_label(
                                pal.warn,
                                format!("Not yet (need more runs): {}.", not.join(", ")),
                            );
                        }
                    }
                }
            });
    }
}

/// The term list: a checkbox per term, ranked. A long list (more than
/// [`TERM_LIST_ALL_DRAWN`] terms) sits in its own scrolled box that draws only the rows in view.
fn term_list(ui: &mut Ui, entries: &[TermEntry], res: &Report, out: &mut Vec<Command>) {
    let mut checkbox = |ui: &mut Ui, e: &TermEntry| {
        let mut on = res.in_model(e.term);
        if ui
            .checkbox(&mut on, e.text.as_str())
            .accessible_name(e.name.as_str())
            .changed()
        {
            out.push(Command::Edit(Edit::ToggleTerm {
                response: res.response,
                term: e.term.label(),
            }));
        }
    };
    if entries.len() <= TERM_LIST_ALL_DRAWN {
        ui.horizontal_wrapped(|ui| {
            for e in entries {
                checkbox(ui, e);
            }
        });
        return;
    }
    let col_w = 130.0;
    let per_row = ((ui.available_width() / col_w).floor() as usize).max(1);
    let rows = entries.len().div_ceil(per_row);
    let row_h = ui.spacing().interact_size.y.max(20.0);
    egui::ScrollArea::vertical()
        .id_salt("term_list")
        .max_height(8.0 * row_h)
        .auto_shrink([false, true])
        .show_rows(ui, row_h, rows, |ui, range| {
            for row in range {
                ui.horizontal(|ui| {
                    for e in entries.iter().skip(row * per_row).take(per_row) {
                        ui.scope(|ui| {
                            ui.set_width(col_w - ui.spacing().item_spacing.x);
                            checkbox(ui, e);
                        });
                    }
                });
            }
        });
}
