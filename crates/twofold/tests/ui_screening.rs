//! A Plackett–Burman screening design chosen in the design step: offered between the regular
//! sizes, its partial aliasing shown, and the run sheet made from it.

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::TwofoldApp;
use twofold_app::panels::Step;
use twofold_app::panels::design::pick_label;
use twofold_app::panels::design::screening::SCREENING_HEADER;
use twofold_study::project::{Factor, Project};

fn seven_factors() -> Project {
    let mut p = Project::new("Screening");
    for i in 0..7 {
        p.factors
            .push(Factor::numeric(&format!("Setting {}", i + 1), "", 1.0, 2.0));
    }
    p
}

#[test]
fn the_twelve_run_screening_design_is_offered_and_makes_the_sheet() {
    let mut h = Harness::builder()
        .with_size([1500.0, 1400.0])
        .build_ui_state(
            |ui, app: &mut TwofoldApp| app.ui_in(ui),
            TwofoldApp::new_for_test(seven_factors()),
        );
    h.state_mut().set_step(Step::Design);
    for _ in 0..3 {
        h.run();
    }
    assert!(
        h.query_by_label(&pick_label(8)).is_some(),
        "the regular 8-run fraction"
    );
    // The screening designs are folded away under their heading until asked for.
    assert!(h.query_by_label(&pick_label(12)).is_none());
    h.get_by_label(SCREENING_HEADER).click();
    h.run();
    h.get_by_label(&pick_label(12)).click();
    h.run();
    assert!(
        h.query_all_by_label_contains("Plackett–Burman screening design of 12 runs")
            .count()
            > 0
    );
    // Every main effect carries ±1/3 of the 15 interactions not containing it (7 factors).
    assert!(
        h.query_all_by_label_contains("partially aliased with 15 two-factor interactions")
            .count()
            == 7
    );
    h.get_by_label("Make the run sheet").click();
    for _ in 0..3 {
        h.run();
    }
    let p = h.state().project().clone();
    assert_eq!(p.design.base_runs, Some(12));
    assert_eq!(p.runs.len(), 12);
    for f in 0..7 {
        assert_eq!(
            p.runs.iter().map(|r| i32::from(r.levels[f])).sum::<i32>(),
            0
        );
    }
}
