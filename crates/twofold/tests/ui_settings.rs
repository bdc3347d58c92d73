//! "Which settings to run?" with every response's goal, noise factors on the factors step, and
//! the power column of the design step, driven through their widgets by label.

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::TwofoldApp;
use twofold_app::panels::Step;
use twofold_app::panels::goals::{goal_chooser_name, goal_field_name};
use twofold_study::numbers::fmt_sig;
use twofold_study::planning::{RunCounts, design_power};
use twofold_study::project::{GoalAim, PowerSettings, Project, demo_project};
use twofold_study::report::{DecideOptions, Report, decide};

fn harness(app: TwofoldApp) -> Harness<'static, TwofoldApp> {
    Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_ui_state(|ui, app: &mut TwofoldApp| app.ui_in(ui), app)
}

/// The engine's decision of a project, as the command computes it.
fn overall_of(p: &Project) -> f64 {
    let reports: Vec<Report> = (0..p.responses.len())
        .map(|i| Report::build(p, 0, i, &p.responses[i].model))
        .collect();
    let refs: Vec<&Report> = reports.iter().collect();
    let d = decide(p, &refs, &DecideOptions::default());
    match d.best {
        Ok(b) => b[0].overall,
        Err(e) => panic!("{e}"),
    }
}

fn settle(h: &mut Harness<'static, TwofoldApp>) {
    for _ in 0..4 {
        h.run();
    }
}

#[test]
fn the_best_settings_follow_the_typed_goal_and_undo_restores_them() {
    let demo = demo_project();
    let mut h = harness(TwofoldApp::new_for_test(demo.clone()));
    h.state_mut().set_step(Step::Predict);
    settle(&mut h);
    assert!(h.query_by_label("Best settings for every goal").is_some());
    let d0 = overall_of(&demo);
    // The table shows the engine's overall desirability, written to three significant places.
    let shown = twofold_study::numbers::fmt_num(d0, 3);
    assert!(h.query_by_label(&shown).is_some(), "D {shown} on screen");
    assert!(
        h.query_by_label(&goal_chooser_name("Gloss 60°", false))
            .is_some()
    );
    // Ask less of gloss: fully met at 86 instead of 90.
    let field = goal_field_name("high", "Gloss 60°");
    h.get_by_label(&field).click();
    h.run();
    h.get_by_label(&field).type_text("86");
    settle(&mut h);
    let p = h.state().project().clone();
    assert_eq!(
        p.responses[1].goal.aim,
        GoalAim::Maximise {
            low: 80.0,
            high: 86.0,
            shape: 1.0
        },
        "typing into a selected field replaces it"
    );
    let d1 = overall_of(&p);
    assert!(d1 > d0, "an easier goal is met better: {d1} vs {d0}");
    let shown = twofold_study::numbers::fmt_num(d1, 3);
    assert!(h.query_by_label(&shown).is_some(), "D {shown} on screen");
    h.state_mut().undo();
    settle(&mut h);
    assert_eq!(
        h.state().project().responses[1].goal,
        demo.responses[1].goal
    );
}

#[test]
fn a_noise_factor_marked_on_the_factors_step_brings_spread_goals() {
    let mut h = harness(TwofoldApp::new_for_test(demo_project()));
    h.state_mut().set_step(Step::Factors);
    settle(&mut h);
    h.get_by_label("noise factor D").click();
    settle(&mut h);
    assert_eq!(h.state().project().factors[3].noise_sd, Some(1.0));
    h.state_mut().set_step(Step::Predict);
    settle(&mut h);
    assert!(
        h.query_by_label(&goal_chooser_name("Gloss 60°", true))
            .is_some(),
        "a spread goal is offered once a noise factor exists"
    );
    // The air speed is no longer set: the table says so.
    assert!(h.query_all_by_label("not set (noise)").count() > 0);
}

#[test]
fn the_design_options_show_the_smallest_effect_for_the_typed_sigma() {
    let demo = demo_project();
    let mut h = harness(TwofoldApp::new_for_test(demo.clone()));
    h.state_mut().set_step(Step::Design);
    settle(&mut h);
    assert!(
        h.query_by_label("Smallest effect seen (power 0.80)")
            .is_none()
    );
    h.get_by_label("process standard deviation").click();
    h.run();
    h.get_by_label("process standard deviation")
        .type_text("2.5");
    settle(&mut h);
    assert_eq!(h.state().project().power.sigma, Some(2.5));
    assert!(
        h.query_by_label("Smallest effect seen (power 0.80)")
            .is_some()
    );
    // The 16-run full factorial with the demo's two centre points, as the engine counts it.
    let settings = PowerSettings {
        sigma: Some(2.5),
        ..PowerSettings::default()
    };
    let counts = RunCounts::of(&demo.design, 4, 16);
    let p = match design_power(&counts, &settings) {
        Some(Ok(p)) => p,
        other => panic!("{other:?}"),
    };
    assert_eq!(p.error_df, 13, "18 runs − 1 − 4 factors");
    let cell = fmt_sig(p.detectable_effect, 3);
    assert!(h.query_by_label(&cell).is_some(), "{cell} in the table");
}

#[test]
fn a_named_model_counts_its_terms_in_the_error_df() {
    let demo = demo_project();
    let mut h = harness(TwofoldApp::new_for_test(demo.clone()));
    h.state_mut().set_step(Step::Design);
    settle(&mut h);
    h.get_by_label("process standard deviation").click();
    h.run();
    h.get_by_label("process standard deviation")
        .type_text("2.5");
    settle(&mut h);
    let field = twofold_app::panels::design::power::MODEL_FIELD;
    h.get_by_label(field).click();
    h.run();
    h.get_by_label(field).type_text("A, B, C, D, AB, AC, ");
    settle(&mut h);
    // What was typed stays as typed, trailing separator included.
    assert_eq!(
        h.state().project().power.model_terms,
        "A, B, C, D, AB, AC, "
    );
    // 18 runs − 1 − 6 terms = 11 error df, as the engine counts it.
    let settings = h.state().project().power.clone();
    let counts = RunCounts::of(&demo.design, 4, 16);
    let p = match design_power(&counts, &settings) {
        Some(Ok(p)) => p,
        other => panic!("{other:?}"),
    };
    assert_eq!(p.error_df, 11);
    let cell = fmt_sig(p.detectable_effect, 3);
    assert!(h.query_by_label(&cell).is_some(), "{cell} in the table");
}
