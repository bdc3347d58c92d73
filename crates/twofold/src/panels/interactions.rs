//! The Factor plots pane.

use egui::Ui;

use super::{Command, Pane, View};

/// View state of the Factor plots pane.
#[derive(Debug, Default)]
pub struct PlotsPane {}

impl Pane for PlotsPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, _out: &mut Vec<Command>) {
        ui.heading("Factor plots");
        super::widgets::not_available(ui, &view.pal, "Not available yet in this build.");
    }
}
