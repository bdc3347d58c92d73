//! The axial runs added on the "What to run next" step, shown in the design draft with a way to
//! leave them out (as the fold-over is).

use egui::Ui;
use twofold_study::project::DesignSettings;

/// The axial block of the draft, if any, in words, and a button that leaves it out.
pub(super) fn axial_row(ui: &mut Ui, draft: &mut DesignSettings, k: usize) {
    let Some(axial) = draft.axial else {
        return;
    };
    ui.horizontal_wrapped(|ui| {
        ui.label(format!(
            "Follow-up: {} axial runs and {} centre runs run as the last block (a face-centred central composite design for the quadratic model).",
            2 * k,
            axial.centre_points
        ));
        if ui.button("Leave out the axial runs").clicked() {
            draft.axial = None;
        }
    });
}
