//! The Model pane.

use egui::Ui;

use super::{Command, Pane, View};

/// View state of the Model pane.
#[derive(Debug, Default)]
pub struct ModelPane {}

impl Pane for ModelPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, _out: &mut Vec<Command>) {
        ui.heading("Model");
        super::widgets::not_available(ui, &view.pal, "Not available yet in this build.");
    }
}
