//! The Effects pane.

use egui::Ui;

use super::{Command, Pane, View};

/// View state of the Effects pane.
#[derive(Debug, Default)]
pub struct EffectsPane {}

impl Pane for EffectsPane {
    fn ui(&mut self, ui: &mut Ui, view: &View<'_>, _out: &mut Vec<Command>) {
        ui.heading("Effects");
        super::widgets::not_available(ui, &view.pal, "Not available yet in this build.");
    }
}
