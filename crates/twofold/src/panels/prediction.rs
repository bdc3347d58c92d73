//! The Prediction pane.

use egui::Ui;

use super::{Command, Pane, View};

/// View state of the Prediction pane.
#[derive(Debug, Default)]
pub struct PredictionPane {}

impl Pane for PredictionPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, _out: &mut Vec<Command>) {
        ui.heading("Prediction");
        super::widgets::not_available(ui, &view.pal, "Not available yet in this build.");
    }
}
