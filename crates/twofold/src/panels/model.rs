//! The model pane: the ANOVA table, coefficients, R², adjusted and predicted R², and the fitted
//! equation in coded and natural units; the hierarchy and transform choices.

use egui::{Grid, RichText, Ui};

use super::chart::fmt_num;
use super::widgets::{not_available, warning_box};
use super::{Command, Pane, View};
use twofold_core::anova::Source;
use twofold_study::project::{Edit, ResponseTransform};
use twofold_study::report::WarningKind;

/// View state of the model pane (none: everything shown is in the analysis cache).
#[derive(Debug, Default)]
pub struct ModelPane {}

fn opt(v: Option<f64>, sig: usize) -> String {
    v.map_or("—".to_string(), |x| fmt_num(x, sig))
}

fn p_text(p: Option<f64>) -> String {
    p.map_or("—".to_string(), twofold_study::numbers::p_value)
}

impl Pane for ModelPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        let Self {} = self;
        let pal = view.pal;
        let Some(res) = view.results_or_explain(ui) else {
            return;
        };
        let Some(def) = view.project.responses.get(res.response) else {
            return;
        };
        ui.label(RichText::new("The fit").size(18.0).strong());
        ui.horizontal(|ui| {
            let mut h = def.model.hierarchical;
            if ui
                .checkbox(&mut h, "keep the model hierarchical")
                .on_hover_text("Adds A and B whenever AB is in the model.")
                .changed()
            {
                out.push(Command::Edit(Edit::SetHierarchical {
                    response: res.response,
                    on: h,
                }));
            }
            ui.separator();
            ui.label("Transform:");
            egui::ComboBox::from_id_salt("transform")
                .selected_text(def.model.transform.words())
                .show_ui(ui, |ui| {
                    for t in ResponseTransform::NAMED {
                        if ui
                            .selectable_label(def.model.transform == t, t.words())
                            .clicked()
                        {
                            out.push(Command::Edit(Edit::SetTransform {
                                response: res.response,
                                transform: t,
                            }));
                        }
                    }
                })
                .response
                .accessible_name("transform");
        });
        let terms: Vec<String> = res.chosen_terms.iter().map(|t| t.label()).collect();
        ui.label(format!(
            "Terms chosen: {}",
            if terms.is_empty() {
                "none".to_string()
            } else {
                terms.join(", ")
            }
        ));
        let fit = match res.chosen_fit() {
            Ok(f) => f,
            Err(why) => {
                not_available(ui, &pal, &format!("No model yet: {why}."));
                return;
            }
        };
        if !fit.added_for_hierarchy.is_empty() {
            let added: Vec<String> = fit.added_for_hierarchy.iter().map(|t| t.label()).collect();
            ui.weak(format!(
                "Added to keep the model hierarchical: {}.",
                added.join(", ")
            ));
        }
        ui.weak(res.error_basis.sentence());
        for w in res.warnings_of(&[WarningKind::Data, WarningKind::Model]) {
            warning_box(ui, &pal, w);
        }
        ui.horizontal_wrapped(|ui| {
            for (name, v) in [
                ("R²", fit.r2),
                ("adjusted R²", fit.adj_r2),
                ("predicted R²", fit.pred_r2),
                ("residual SD", fit.sigma),
            ] {
                ui.label(RichText::new(format!("{name} {}", opt(v, 4))).size(18.0));
                ui.add_space(16.0);
            }
            // The residual SD is the process σ a follow-up study is planned with.
            if let Some(s) = fit.sigma.filter(|s| *s > 0.0)
                && view.project.power.sigma != Some(s)
                && ui
                    .button("Plan with this SD")
                    .on_hover_text(
                        "Use this residual standard deviation as the process σ of the design step's power column",
                    )
                    .clicked()
            {
                out.push(Command::Edit(twofold_study::project::Edit::SetPower(
                    twofold_study::project::PowerSettings {
                        sigma: Some(s),
                        ..view.project.power.clone()
                    },
                )));
            }
        });
        if fit.df_residual == 0 {
            ui.colored_label(
                pal.warn,
                "No residual degrees of freedom: the model uses every run, so there are no standard errors, F tests or p-values. Remove terms or add runs.",
            );
        }
        ui.add_space(6.0);
        ui.label(RichText::new("Analysis of variance").strong());
        let pure_curvature = res
            .curvature
            .is_some_and(|c| c.basis == twofold_study::report::ErrorBasis::PureError);
        Grid::new("anova")
            .striped(true)
            .num_columns(6)
            .spacing([18.0, 3.0])
            .show(ui, |ui| {
                for h in ["Source", "df", "Sum of squares", "Mean square", "F", "p"] {
                    ui.label(RichText::new(h).color(pal.muted).strong());
                }
                ui.end_row();
                for row in &res.anova_rows() {
                    let name = match row.source {
                        Source::Term(t) => format!("   {}", t.label()),
                        Source::Curvature if pure_curvature => {
                            "Curvature (vs pure error)".to_string()
                        }
                        other => other.to_string(),
                    };
                    ui.label(name);
                    ui.label(row.df.to_string());
                    ui.label(fmt_num(row.ss, 5));
                    ui.label(opt(row.ms, 5));
                    ui.label(opt(row.f, 4));
                    let significant = row.p.is_some_and(|p| p < 0.05);
                    let p = RichText::new(p_text(row.p));
                    ui.label(if significant {
                        p.color(pal.accent).strong()
                    } else {
                        p
                    });
                    ui.end_row();
                }
            });
        ui.add_space(6.0);
        ui.label(RichText::new("Coefficients (coded units)").strong());
        Grid::new("coefficients")
            .striped(true)
            .num_columns(6)
            .spacing([18.0, 3.0])
            .show(ui, |ui| {
                for h in ["Term", "Factors", "Coefficient", "Std. error", "t", "p"] {
                    ui.label(RichText::new(h).color(pal.muted).strong());
                }
                ui.end_row();
                let rows = std::iter::once(&fit.intercept).chain(&fit.coefficients);
                for c in rows {
                    ui.label(if c.term.is_identity() {
                        "intercept".to_string()
                    } else {
                        c.term.label()
                    });
                    ui.label(if c.term.is_identity() {
                        String::new()
                    } else {
                        super::effects::term_names(view.project, c.term)
                    });
                    ui.label(fmt_num(c.estimate, 5));
                    ui.label(opt(c.std_error, 4));
                    ui.label(opt(c.t, 4));
                    ui.label(p_text(c.p));
                    ui.end_row();
                }
            });
        ui.add_space(6.0);
        ui.label(RichText::new("Equation").strong());
        let names: Vec<&str> = view
            .project
            .factors
            .iter()
            .map(|f| f.name.as_str())
            .collect();
        let y = def.model.transform.label(&def.name);
        if let Some(eq) = &res.equation_coded {
            ui.label("In coded units (−1 low, +1 high):");
            ui.monospace(eq.text.replacen('y', &y, 1));
        }
        match &res.equation_natural {
            Ok(eq) => {
                ui.label("In natural units:");
                let text = eq.format_with_names(&names).replacen('y', &y, 1);
                ui.monospace(text);
                if view.project.factors.iter().any(|f| !f.is_numeric()) {
                    ui.weak("Factors with two labels enter as −1 (first label) and +1 (second).");
                }
            }
            Err(why) => {
                ui.weak(format!("No equation in natural units: {why}."));
            }
        }
    }
}
