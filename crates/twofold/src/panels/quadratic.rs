//! The quadratic model of a study with axial runs, a block of "Can the model be trusted?": its
//! coefficients, lack of fit, stationary point and canonical analysis, all read from the report's
//! [`twofold_study::report::QuadraticReport`].

use egui::{Grid, RichText, Ui};

use super::View;
use super::chart::fmt_num;
use super::widgets::not_available;

fn opt(v: Option<f64>, sig: usize) -> String {
    v.map_or("—".to_string(), |x| fmt_num(x, sig))
}

/// Draws the block when the shown report has a quadratic part; nothing otherwise.
pub fn show(ui: &mut Ui, view: &View<'_>) {
    let Some(q) = view.results.and_then(|r| r.quadratic.as_ref()) else {
        return;
    };
    let pal = view.pal;
    ui.add_space(10.0);
    ui.separator();
    ui.label(
        RichText::new("The quadratic model (central composite design)")
            .size(18.0)
            .strong(),
    );
    ui.weak(format!(
        "Every run: {} used, axial runs in block {}.",
        q.runs_used, q.axial_block
    ));
    let fit = match &q.fit {
        Ok(f) => f,
        Err(why) => {
            not_available(ui, &pal, &format!("No quadratic model yet: {why}."));
            return;
        }
    };
    ui.horizontal_wrapped(|ui| {
        for (name, v) in [
            ("R²", Some(fit.r_squared)),
            ("adjusted R²", fit.adj_r_squared),
            ("residual SD", fit.sigma),
        ] {
            ui.label(RichText::new(format!("{name} {}", opt(v, 4))).size(16.0));
            ui.add_space(16.0);
        }
    });
    if let Some(l) = &fit.lack_of_fit {
        ui.label(format!(
            "Lack of fit: F = {} on {} and {} df, p = {}.",
            fmt_num(l.f, 4),
            l.df,
            l.pure_error_df,
            l.p.map_or("—".to_string(), twofold_study::numbers::p_value)
        ));
    }
    Grid::new("quadratic_coefficients")
        .striped(true)
        .num_columns(5)
        .spacing([18.0, 3.0])
        .show(ui, |ui| {
            for h in ["Term", "Coefficient", "Std. error", "t", "p"] {
                ui.label(RichText::new(h).color(pal.muted).strong());
            }
            ui.end_row();
            for c in &fit.coefficients {
                ui.label(c.term.label());
                ui.label(fmt_num(c.coefficient, 5));
                ui.label(opt(c.se, 4));
                ui.label(opt(c.t, 4));
                ui.label(c.p.map_or("—".to_string(), twofold_study::numbers::p_value));
                ui.end_row();
            }
        });
    ui.add_space(6.0);
    ui.label(RichText::new("Stationary point and canonical analysis").strong());
    for n in &q.notes {
        ui.label(n);
    }
}
