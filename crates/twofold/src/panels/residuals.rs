//! The Residuals pane.

use egui::Ui;

use super::{Command, Pane, View};

/// View state of the Residuals pane.
#[derive(Debug, Default)]
pub struct ResidualsPane {}

impl Pane for ResidualsPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, _out: &mut Vec<Command>) {
        ui.heading("Residuals");
        super::widgets::not_available(ui, &view.pal, "Not available yet in this build.");
    }
}
