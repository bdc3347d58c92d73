//! Interactions that must stay clear, typed on the design step: the design found keeps them
//! clear and becomes the run sheet.

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::TwofoldApp;
use twofold_app::panels::Step;
use twofold_app::panels::design::required::{REQUIRED_FIELD, USE_REQUIRED};
use twofold_core::design::FractionalDesign;
use twofold_core::search::required::parse_required;
use twofold_study::project::{Factor, Project};

fn six_factors() -> Project {
    let mut p = Project::new("Six");
    for i in 0..6 {
        p.factors
            .push(Factor::numeric(&format!("F{}", i + 1), "", 1.0, 2.0));
    }
    p
}

#[test]
fn the_design_found_for_named_interactions_keeps_them_clear() {
    let mut h = Harness::builder()
        .with_size([1500.0, 1400.0])
        .build_ui_state(
            |ui, app: &mut TwofoldApp| app.ui_in(ui),
            TwofoldApp::new_for_test(six_factors()),
        );
    h.state_mut().set_step(Step::Design);
    for _ in 0..3 {
        h.run();
    }
    h.get_by_label(REQUIRED_FIELD).click();
    h.run();
    h.get_by_label(REQUIRED_FIELD).type_text("AB, CE");
    for _ in 0..3 {
        h.run();
    }
    assert!(
        h.query_all_by_label_contains("16 runs keep AB, CE clear")
            .count()
            > 0,
        "the smallest size that keeps them clear"
    );
    h.get_by_label(USE_REQUIRED).click();
    h.run();
    h.get_by_label("Make the run sheet").click();
    for _ in 0..3 {
        h.run();
    }
    let p = h.state().project().clone();
    assert_eq!(p.runs.len(), 16);
    assert_eq!(p.design.base_runs, Some(16));
    // Checked independently of the search: the alias structure of the generators in the file.
    let design = FractionalDesign::from_text(6, Some(16), &p.design.generators.join(","))
        .unwrap_or_else(|e| panic!("{e}"));
    for t in parse_required("AB, CE", 6).unwrap_or_default() {
        let low = twofold_core::alias::aliases_of(&design, t, 2);
        assert!(
            low.is_empty(),
            "{t:?} aliased with {low:?} in {:?}",
            p.design.generators
        );
    }
}
