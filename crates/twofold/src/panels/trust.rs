//! "Can the model be trusted?": the fit (analysis of variance, R², coefficients, equation), the
//! quadratic model of a study with axial runs (`quadratic.rs`) and the residual checks with the
//! Box–Cox profile, one under the other in one scrolling pane.

use egui::{RichText, Ui};

use super::model::ModelPane;
use super::residuals::ResidualsPane;
use super::{Command, Pane, View};

/// The two parts of the step, each keeping its own view state.
#[derive(Debug, Default)]
pub struct TrustPane {
    model: ModelPane,
    residuals: ResidualsPane,
}

impl Pane for TrustPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, out: &mut Vec<Command>) {
        let Self { model, residuals } = self;
        egui::ScrollArea::vertical()
            .auto_shrink([false, false])
            .show(ui, |ui| {
                model.ui(ui, view, out);
                super::quadratic::show(ui, view);
                ui.add_space(10.0);
                ui.separator();
                ui.label(RichText::new("Residual checks").size(18.0).strong());
                residuals.ui(ui, view, out);
            });
    }
}
