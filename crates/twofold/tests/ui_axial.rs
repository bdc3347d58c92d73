//! Axial runs in the window: the "What to run next" step offers them when the centre points
//! show curvature, and "Can the model be trusted?" shows the quadratic model once they are run.

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::TwofoldApp;
use twofold_app::panels::Step;
use twofold_app::panels::next_runs::add_button_name;
use twofold_study::project::{Cell, Edit, Factor, FollowUp, Project, ResponseDef};
use twofold_study::report::{Report, next_runs};

fn harness(app: TwofoldApp) -> Harness<'static, TwofoldApp> {
    Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_ui_state(|ui, app: &mut TwofoldApp| app.ui_in(ui), app)
}

/// y = 50 + 2A − B + 0.5AB − 4A² − 3B² (invented), centre runs wobbling ±0.1 around it.
fn fill(p: &mut Project) {
    let mut centre = 0;
    for r in &mut p.runs {
        if r.values[0].is_typed() {
            continue;
        }
        let (a, b) = (f64::from(r.levels[0]), f64::from(r.levels[1]));
        let mut y = 50.0 + 2.0 * a - b + 0.5 * a * b - 4.0 * a * a - 3.0 * b * b;
        if r.centre {
            y += [0.1, -0.1, 0.0][centre % 3];
            centre += 1;
        }
        r.values[0] = Cell::new(format!("{y}"));
    }
}

/// A 2² factorial with three centre points whose centre lies well above the corners.
fn curved() -> Project {
    let mut p = Project::new("Curved");
    p.factors
        .push(Factor::numeric("Temperature", "°C", 150.0, 170.0));
    p.factors.push(Factor::numeric("Time", "min", 10.0, 20.0));
    p.responses.push(ResponseDef::new("Yield", "%"));
    p.design.centre_points_per_block = 3;
    if let Err(e) = p.apply(Edit::RegenerateRuns) {
        panic!("the factorial plans: {e}");
    }
    fill(&mut p);
    p
}

#[test]
fn curvature_suggests_axial_runs_and_the_button_adds_them_as_block_two() {
    let before = curved();
    let report = Report::for_response(&before, 0, 0);
    let list = next_runs(&before, Some(&report));
    let Some(axial) = list.iter().find(|o| o.follow_up == FollowUp::Axial) else {
        panic!("axial runs are offered: {list:?}");
    };
    assert!(axial.suggested);
    let label = add_button_name(axial);
    let mut h = harness(TwofoldApp::new_for_test(before.clone()));
    h.state_mut().set_step(Step::NextRuns);
    h.run();
    h.get_by_label(&label).click();
    h.run();
    h.run();
    let after = h.state().project().clone();
    assert_eq!(h.state().step(), Step::Runs);
    assert!(after.design.axial.is_some());
    assert_eq!(after.runs.len(), 7 + 4 + 3);
    assert_eq!(after.runs.iter().filter(|r| r.block == 2).count(), 7);
    for r in &before.runs {
        assert!(after.runs.contains(r), "run {:?} kept as it was", r.levels);
    }
}

#[test]
fn the_trust_step_shows_the_quadratic_model_and_its_maximum() {
    let mut p = curved();
    if let Err(e) = p.apply(Edit::AddFollowUp(FollowUp::Axial)) {
        panic!("axial runs add: {e}");
    }
    fill(&mut p);
    let mut h = harness(TwofoldApp::new_for_test(p));
    h.state_mut().set_step(Step::Model);
    for _ in 0..4 {
        h.run();
    }
    assert!(
        h.query_by_label("The quadratic model (central composite design)")
            .is_some()
    );
    assert!(
        h.query_by_label_contains("The stationary point is a maximum")
            .is_some()
    );
    assert!(h.query_by_label("B²").is_some());
}

#[test]
fn the_design_step_shows_the_axial_runs_and_can_leave_them_out() {
    let mut p = curved();
    if let Err(e) = p.apply(Edit::AddFollowUp(FollowUp::Axial)) {
        panic!("axial runs add: {e}");
    }
    let mut h = harness(TwofoldApp::new_for_test(p));
    h.state_mut().set_step(Step::Design);
    h.run();
    assert!(
        h.query_by_label_contains("Follow-up: 4 axial runs and 3 centre runs")
            .is_some()
    );
    // The total counts the axial block (counted by hand: 4 corners, 3 centre points, 2k = 4
    // axial runs and 3 centre runs in the axial block).
    assert!(
        h.query_by_label(
            "14 runs: 4 in the full factorial, 3 centre points, 4 axial runs and 3 centre runs in the axial block"
        )
        .is_some()
    );
    h.get_by_label("Leave out the axial runs").click();
    h.run();
    assert!(
        h.query_by_label_contains("Follow-up: 4 axial runs")
            .is_none()
    );
    assert!(
        h.query_by_label("7 runs: 4 in the full factorial, 3 centre points")
            .is_some()
    );
    // Only the draft changed: the sheet keeps its axial runs until the design is applied.
    assert!(h.state().project().design.axial.is_some());
}
