//! The residuals pane: normal plot of the residuals, residuals against fitted values and against
//! run order, and the Box–Cox profile of the response ([`super::boxcox`]).

use egui::{Ui, vec2};

use super::plots::{ResidualKind, ResidualPlot};
use super::widgets::{not_available, tiles};
use super::{Command, Pane, View};
use twofold_core::boxcox::BoxCox;
use twofold_study::report::Report;

/// View state of the residuals pane: the three plots built once per data revision.
#[derive(Debug, Default)]
pub struct ResidualsPane {
    built: Option<((u64, usize), [ResidualPlot; 3])>,
}

/// Studentised residuals beyond this many standard deviations are marked (common practice).
const LIMIT_SD: f64 = 3.0;

/// The Box–Cox profile of the chosen model, or why there is none: the one place this pane reads
/// it from the report.
fn box_cox_of(res: &Report) -> Result<&BoxCox, String> {
    res.chosen_fit()?;
    res.box_cox.as_ref().map_err(Clone::clone)
}

fn build(res: &Report) -> Option<[ResidualPlot; 3]> {
    let d = res.diagnostics.as_ref()?;
    let fit = res.chosen_fit().ok()?;
    let limit = fit.sigma.map(|s| LIMIT_SD * s);
    let run_no = |table_run: usize| {
        res.run_order
            .get(table_run)
            .copied()
            .unwrap_or(table_run + 1)
    };
    let normal = d.normal_plot();
    Some([
        ResidualPlot::new(
            ResidualKind::Normal,
            normal
                .iter()
                .map(|p| (p.normal_score, p.residual))
                .collect(),
            normal.iter().map(|p| run_no(p.run)).collect(),
            None,
        ),
        ResidualPlot::new(
            ResidualKind::VsFitted,
            d.runs.iter().map(|r| (r.fitted, r.residual)).collect(),
            d.runs.iter().map(|r| run_no(r.run)).collect(),
            limit,
        ),
        ResidualPlot::new(
            ResidualKind::VsOrder,
            d.runs
                .iter()
                .map(|r| (run_no(r.run) as f64, r.residual))
                .collect(),
            d.runs.iter().map(|r| run_no(r.run)).collect(),
            limit,
        ),
    ])
}

impl Pane for ResidualsPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        let Self { built } = self;
        let pal = view.pal;
        let Some(res) = view.results else {
            return;
        };
        if let Err(why) = res.chosen_fit() {
            not_available(ui, &pal, &format!("Not available yet: {why}."));
            return;
        }
        let key = (res.revision, res.response);
        if built.as_ref().map(|b| b.0) != Some(key) {
            *built = build(res).map(|p| (key, p));
        }
        let Some((_, plots)) = &built else {
            not_available(ui, &pal, "Not available yet: the fit has no residuals.");
            return;
        };
        if res.chosen_fit().is_ok_and(|f| f.df_residual == 0) {
            not_available(
                ui,
                &pal,
                "The model uses every run, so every residual is zero: nothing to judge yet.",
            );
            return;
        }
        ui.weak("Look for a straight line in the normal plot, no funnel against fitted values, no trend against run order. ◆ marks residuals beyond 3 residual standard deviations.");
        let w = ((ui.available_width() - 40.0) / 2.0).clamp(300.0, 560.0);
        // The Box–Cox profile takes the tile after the three residual plots.
        let current = view
            .project
            .responses
            .get(res.response)
            .map(|r| r.model.transform)
            .unwrap_or_default();
        tiles(ui, plots.len() + 1, w, |ui, i| match plots.get(i) {
            Some(p) => p.show(ui, &pal, vec2(w, 260.0)),
            None => match box_cox_of(res) {
                Ok(bc) => {
                    super::boxcox::show(ui, &pal, bc, current, res.response, vec2(w, 220.0), out)
                }
                Err(why) => {
                    ui.vertical(|ui| {
                        ui.set_width(w);
                        not_available(ui, &pal, &format!("Box–Cox profile not available: {why}."));
                    });
                }
            },
        });
    }
}
