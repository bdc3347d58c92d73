//! Behaviour tests of the window, driven through its widgets by label (no renderer needed).

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::TwofoldApp;
use twofold_app::panels::Step;
use twofold_study::project::{Factor, Project, ResponseDef};

fn harness(app: TwofoldApp) -> Harness<'static, TwofoldApp> {
    Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_ui_state(|ui, app: &mut TwofoldApp| app.ui_in(ui), app)
}

/// Three numeric factors and one response, no runs yet.
fn three_factor_project() -> Project {
    let mut p = Project::new("Coating trial");
    p.factors = vec![
        Factor::numeric("Temperature", "°C", 160.0, 200.0),
        Factor::numeric("Time", "min", 10.0, 20.0),
        Factor::numeric("Pressure", "bar", 1.0, 2.0),
    ];
    p.responses = vec![ResponseDef::new("Gloss", "GU")];
    p
}

#[test]
fn adding_factors_gives_them_the_next_letters_and_undo_takes_one_back() {
    let mut h = harness(TwofoldApp::new_for_test(Project::new("Empty")));
    h.run();
    for _ in 0..3 {
        h.get_by_label("+ Add factor").click();
        h.run();
    }
    let names: Vec<String> = h
        .state()
        .project()
        .factors
        .iter()
        .map(|f| f.name.clone())
        .collect();
    assert_eq!(names, ["Factor A", "Factor B", "Factor C"]);
    h.state_mut().undo();
    h.run();
    assert_eq!(h.state().project().factors.len(), 2);
}

#[test]
fn a_level_outside_the_safe_range_shows_a_warning_beside_the_factor() {
    let mut p = three_factor_project();
    p.factors[0].safe_range = Some((150.0, 190.0));
    let mut h = harness(TwofoldApp::new_for_test(p));
    h.state_mut().set_step(Step::Factors);
    h.run();
    assert!(
        h.query_by_label_contains("Outside safe range").is_some(),
        "the high level 200 °C is above the safe range 150 to 190"
    );
}

#[test]
fn the_window_title_carries_the_project_name_and_the_unsaved_marker() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    h.run();
    assert_eq!(h.state().title(), "Coating trial — Twofold");
    h.state_mut().set_step(Step::Factors);
    h.run();
    h.get_by_label("+ Add factor").click();
    h.run();
    assert!(h.state().title().starts_with("• Coating trial"));
}

/// Drives the design pane: picks the option of `runs` runs and makes the run sheet.
fn choose_design(h: &mut Harness<'static, TwofoldApp>, runs: usize) {
    h.state_mut().set_step(Step::Design);
    h.run();
    h.get_by_label(&twofold_app::panels::design::pick_label(runs))
        .click();
    h.run();
    let make = h
        .query_by_label("Make the run sheet")
        .or_else(|| h.query_by_label("Apply and remake the run sheet"));
    let Some(make) = make else {
        panic!("no button makes the run sheet");
    };
    make.click();
    h.run();
}

/// Types `text` into the next-run card's field for `response` and presses Enter.
fn type_next(h: &mut Harness<'static, TwofoldApp>, response: &str, text: &str) {
    let label = format!("next run {response}");
    h.get_by_label(&label).focus();
    h.run();
    h.get_by_label(&label).type_text(text);
    h.run();
    h.key_press(egui::Key::Enter);
    h.run();
}

#[test]
fn choosing_a_design_makes_a_run_sheet_of_that_size() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    choose_design(&mut h, 8);
    let p = h.state().project();
    assert_eq!(p.runs.len(), 8);
    assert!(!p.runs_outdated);
    // One undo step takes the whole design choice back.
    h.state_mut().undo();
    assert!(h.state().project().runs.is_empty());
}

#[test]
fn typing_values_in_the_next_run_card_fills_runs_in_run_order() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    choose_design(&mut h, 8);
    h.state_mut().set_step(Step::Runs);
    h.run();
    type_next(&mut h, "Gloss", "71.5");
    type_next(&mut h, "Gloss", "64");
    let p = h.state().project();
    let by_order = |n: u32| p.runs.iter().find(|r| r.run_order == n).unwrap();
    assert_eq!(by_order(1).values[0].text, "71.5");
    assert_eq!(by_order(2).values[0].text, "64");
    assert_eq!(by_order(1).status, twofold_study::project::RunStatus::Done);
    assert_eq!(
        by_order(1).entered_at.as_deref(),
        Some("2025-01-01T09:00:00Z")
    );
    assert!(h.query_all_by_label_contains("2 of 8 done").count() > 0);
}

#[test]
fn text_that_is_not_a_number_stays_in_the_cell_marked_with_the_reason() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    choose_design(&mut h, 8);
    h.state_mut().set_step(Step::Runs);
    h.run();
    type_next(&mut h, "Gloss", "12,5x");
    let p = h.state().project();
    let first = p.runs.iter().find(|r| r.run_order == 1).unwrap();
    assert_eq!(
        first.values[0].text, "12,5x",
        "what was typed is kept as typed"
    );
    assert_eq!(first.values[0].number(), None);
    assert_eq!(
        first.status,
        twofold_study::project::RunStatus::ToDo,
        "a slip keeps the run open"
    );
    // The card stays on the run and says why the text was not read.
    assert!(
        h.query_by_label_contains("`x` is not part of a number")
            .is_some()
    );
    assert!(h.query_by_label_contains("Next: run 1").is_some());
}

#[test]
fn saving_with_ctrl_s_writes_a_file_that_reopens_to_the_same_project() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("coating.ron");
    let mut app = TwofoldApp::new_for_test(three_factor_project());
    app.set_file_picker(twofold_app::app::FilePicker::Fixed(Some(file.clone())));
    let mut h = harness(app);
    choose_design(&mut h, 8);
    h.state_mut().set_step(Step::Runs);
    h.run();
    type_next(&mut h, "Gloss", "70.25");
    assert!(h.state().history().is_dirty());
    // No file yet: Ctrl+S asks where (the fixed picker answers at once).
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::S);
    h.run();
    assert!(!h.state().history().is_dirty(), "saved");
    assert_eq!(h.state().path(), Some(file.as_path()));
    assert!(!h.state().title().starts_with('•'));
    let saved = h.state().project().clone();
    let mut reopened = TwofoldApp::new_for_test(Project::new("other"));
    assert!(reopened.open_path(&file));
    assert_eq!(reopened.project(), &saved);
}

#[test]
fn an_edit_leaves_a_recovery_copy_about_a_second_later() {
    use std::time::{Duration, Instant};
    let dir = tempfile::tempdir().unwrap();
    let store = twofold_study::project::RecoveryStore::in_dir(dir.path());
    let mut app = TwofoldApp::new_for_test(three_factor_project());
    app.set_recovery_store(store.clone());
    app.apply(twofold_app::panels::Command::Edit(
        twofold_study::project::Edit::SetName("Renamed".into()),
    ));
    let t0 = Instant::now();
    app.autosave_tick(t0);
    assert!(store.find(None).unwrap().is_none(), "not at once");
    app.autosave_tick(t0 + Duration::from_millis(1100));
    let offer = store.find(None).unwrap().expect("a copy after a second");
    assert_eq!(offer.project.name, "Renamed");
    // On the next start the window offers the copy.
    let mut next = TwofoldApp::new_for_test(three_factor_project());
    next.set_recovery_store(store);
    next.offer_recovery();
    assert!(matches!(
        next.modal(),
        Some(twofold_app::app::Modal::Restore(_))
    ));
}

/// y = 50 + 5·A − 2·B + 1·A·B in coded units, for the run with these coded levels.
fn formula(levels: &[i8]) -> f64 {
    let (a, b) = (f64::from(levels[0]), f64::from(levels[1]));
    50.0 + 5.0 * a - 2.0 * b + a * b
}

/// Types the formula's value for every run except `skip` (run-order numbers), in run order.
fn fill_runs(h: &mut Harness<'static, TwofoldApp>, skip: &[u32]) {
    h.state_mut().set_step(Step::Runs);
    h.run();
    let mut runs: Vec<(u32, Vec<i8>)> = h
        .state()
        .project()
        .runs
        .iter()
        .map(|r| (r.run_order, r.levels.clone()))
        .collect();
    runs.sort();
    for (order, levels) in runs {
        if skip.contains(&order) {
            // Leave it for later: mark it done without a value so the card moves on.
            let Some(idx) = h
                .state()
                .project()
                .runs
                .iter()
                .position(|r| r.run_order == order)
            else {
                panic!("no run {order}");
            };
            h.state_mut().apply(twofold_app::panels::Command::Edit(
                twofold_study::project::Edit::SetStatus {
                    run: idx,
                    status: twofold_study::project::RunStatus::Done,
                },
            ));
            h.run();
            continue;
        }
        type_next(h, "Gloss", &formula(&levels).to_string());
    }
}

fn bar_top(h: &Harness<'static, TwofoldApp>, prefix: &str) -> f32 {
    h.get_by_label_contains(prefix).rect().top()
}

#[test]
fn entering_the_last_value_updates_the_effect_ranking() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    choose_design(&mut h, 8);
    fill_runs(&mut h, &[8]);
    h.state_mut().set_step(Step::Effects);
    h.run();
    // With one run missing, the three-factor interaction cannot be estimated yet.
    assert!(h.query_by_label_contains("cannot be estimated").is_some());
    assert!(
        h.query_by_label("effect ABC +").is_none() && h.query_by_label("effect ABC −").is_none()
    );
    // Type the last value on the run sheet's grid.
    let last = h
        .state()
        .project()
        .runs
        .iter()
        .find(|r| r.run_order == 8)
        .unwrap()
        .clone();
    h.state_mut().set_step(Step::Runs);
    h.run();
    let cell = "value run 8 Gloss";
    h.get_by_label(cell).focus();
    h.run();
    h.get_by_label(cell)
        .type_text(&formula(&last.levels).to_string());
    h.key_press(egui::Key::Enter);
    h.run();
    h.state_mut().set_step(Step::Effects);
    h.run();
    // Effects from the formula: A = 10, B = −4, AB = 2; the bars are ranked by size.
    assert!(bar_top(&h, "effect A +") < bar_top(&h, "effect B −"));
    assert!(bar_top(&h, "effect B −") < bar_top(&h, "effect AB +"));
    assert!(h.query_by_label_contains("cannot be estimated").is_none());
}

#[test]
fn clicking_a_half_normal_point_or_a_term_box_toggles_the_term_and_undo_restores() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    choose_design(&mut h, 8);
    fill_runs(&mut h, &[]);
    h.state_mut().set_step(Step::Effects);
    h.run();
    let terms =
        |h: &Harness<'static, TwofoldApp>| h.state().project().responses[0].model.terms.clone();
    h.get_by_label("point A").click();
    h.run();
    assert_eq!(terms(&h), ["A"]);
    h.get_by_label("term B").click();
    h.run();
    assert_eq!(terms(&h), ["A", "B"]);
    // The model pane shows the fit of the chosen terms.
    h.state_mut().set_step(Step::Model);
    h.run();
    assert!(h.query_by_label_contains("Terms chosen: A, B").is_some());
    h.state_mut().undo();
    h.run();
    assert_eq!(terms(&h), ["A"]);
    h.state_mut().set_step(Step::Effects);
    h.run();
    h.get_by_label("point A").click();
    h.run();
    assert!(terms(&h).is_empty(), "a second click removes the term");
}

#[test]
fn changing_the_design_after_values_were_typed_asks_first() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    choose_design(&mut h, 8);
    fill_runs(&mut h, &[]);
    let before = h.state().project().clone();
    choose_design(&mut h, 4);
    assert!(matches!(
        h.state().modal(),
        Some(twofold_app::app::Modal::ConfirmDesign { .. })
    ));
    h.get_by_label("Keep the current design").click();
    h.run();
    assert_eq!(h.state().project(), &before, "nothing changed");
    choose_design(&mut h, 4);
    h.get_by_label("Change the design").click();
    h.run();
    assert_eq!(h.state().project().runs.len(), 4);
    h.state_mut().undo();
    h.run();
    assert_eq!(
        h.state().project(),
        &before,
        "undo brings every typed value back"
    );
}

#[test]
fn every_step_of_the_demo_project_draws_with_real_glyphs_and_named_widgets() {
    // The harness fails on a glyph the fonts cannot draw and on an unnamed widget. Tall, so the
    // whole of "Which settings to run?" (goals, best settings, map, what-if) is on screen.
    let mut h = Harness::builder()
        .with_size([1500.0, 2400.0])
        .build_ui_state(
            |ui, app: &mut TwofoldApp| app.ui_in(ui),
            TwofoldApp::new_for_test(twofold_study::project::demo_project()),
        );
    for step in Step::ALL {
        h.state_mut().set_step(step);
        h.run();
    }
    h.state_mut().set_step(Step::Effects);
    h.run();
    // The demo ships with the model A + B + AB; clicking C's point adds C to it.
    h.get_by_label("point C").click();
    h.run();
    assert_eq!(
        h.state().project().responses[0].model.terms,
        ["A", "B", "C", "AB"]
    );
    // With a model chosen, every analysis pane draws its full content.
    for step in [Step::Model, Step::Plots, Step::Predict] {
        h.state_mut().set_step(step);
        h.run();
    }
    h.get_by_label("Find").click();
    h.run();
    assert!(h.query_by_label("Try these settings above").is_some());
    h.state_mut().set_step(Step::Model);
    h.run();
    assert!(h.query_by_label("Analysis of variance").is_some());
}

#[test]
fn after_enter_the_card_keeps_the_keyboard_for_the_next_run() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    choose_design(&mut h, 8);
    h.state_mut().set_step(Step::Runs);
    h.run();
    type_next(&mut h, "Gloss", "71.5");
    // No click: the field of the next run already has the keyboard.
    h.get_by_label("next run Gloss").type_text("64");
    h.run();
    h.key_press(egui::Key::Enter);
    h.run();
    let p = h.state().project();
    let second = p.runs.iter().find(|r| r.run_order == 2).unwrap();
    assert_eq!(second.values[0].text, "64");
}

#[test]
fn in_the_grid_tab_moves_across_responses_and_enter_to_the_next_unfinished_run() {
    let mut p = three_factor_project();
    p.responses.push(ResponseDef::new("Haze", "%"));
    let mut h = harness(TwofoldApp::new_for_test(p));
    choose_design(&mut h, 8);
    h.state_mut().set_step(Step::Runs);
    h.run();
    h.get_by_label("value run 1 Gloss").focus();
    h.run();
    h.get_by_label("value run 1 Gloss").type_text("80");
    h.run();
    h.key_press(egui::Key::Tab);
    h.run();
    // The keyboard is now in the Haze cell of the same run.
    h.get_by_label("value run 1 Haze").type_text("2.5");
    h.run();
    h.key_press(egui::Key::Enter);
    h.run();
    h.get_by_label("value run 2 Haze").type_text("3.1");
    h.run();
    h.key_press(egui::Key::Enter);
    h.run();
    let p = h.state().project();
    let run = |n: u32| p.runs.iter().find(|r| r.run_order == n).unwrap();
    assert_eq!(run(1).values[0].text, "80");
    assert_eq!(run(1).values[1].text, "2.5");
    assert_eq!(run(1).status, twofold_study::project::RunStatus::Done);
    assert_eq!(run(2).values[1].text, "3.1");
    assert_eq!(
        run(2).status,
        twofold_study::project::RunStatus::ToDo,
        "Gloss still missing"
    );
}

#[test]
fn the_analysis_runs_beside_the_window_and_appears_when_ready() {
    let mut app = TwofoldApp::new_for_test(twofold_study::project::demo_project());
    app.set_background_compute(true);
    let mut h = harness(app);
    h.state_mut().set_step(Step::Effects);
    h.step();
    // The first frame does not wait for the computation.
    assert!(h.query_by_label("Computing the analysis…").is_some());
    let start = std::time::Instant::now();
    while h.query_by_label_contains("effect A ").is_none() {
        assert!(start.elapsed().as_secs() < 60, "the analysis never arrived");
        std::thread::sleep(std::time::Duration::from_millis(20));
        h.step();
    }
    assert!(h.query_by_label("Computing the analysis…").is_none());
}

#[test]
fn a_new_factor_takes_the_keyboard_so_typing_names_it_in_one_undo_step() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    h.state_mut().set_step(Step::Factors);
    h.run();
    h.get_by_label("+ Add factor").click();
    h.run();
    // One key at a time, as a person types.
    for c in "Pressure".chars() {
        h.get_by_label("+ Add factor").type_text(&c.to_string());
        h.run();
    }
    assert_eq!(h.state().project().factors[3].name, "Pressure");
    // The keystrokes make one step: one undo restores the placeholder name.
    h.state_mut().undo();
    h.run();
    assert_eq!(h.state().project().factors[3].name, "Factor D");
}

#[test]
fn the_residuals_step_of_the_demo_shows_the_box_cox_profile_and_its_verdict() {
    let mut h = harness(TwofoldApp::new_for_test(
        twofold_study::project::demo_project(),
    ));
    h.state_mut().set_step(Step::Model);
    h.run();
    assert!(
        h.query_by_label_contains("Box–Cox: which power").is_some(),
        "the section is drawn"
    );
    // The verdict names the interval and says what it means (Box & Cox 1964, section 3).
    assert!(
        h.query_by_label_contains("Best λ").is_some(),
        "a verdict line"
    );
    assert!(
        h.query_by_label_contains("needs no transform").is_some()
            || h.query_by_label_contains("suits the data better").is_some()
            || h.query_by_label_contains("every common power").is_some(),
        "the verdict says what the interval means"
    );
}

/// A 2^3 in two replicates whose response is exp(2.3 + 1.2A + 0.8B − 0.5C) times a small fixed
/// disturbance: values from about 1 to 120, effects multiplicative, so the log is the transform
/// that makes them additive (Box & Cox 1964, section 1). Model A + B + C.
fn multiplicative_project() -> Project {
    use twofold_study::project::{Cell, RunRecord, RunStatus};
    let mut p = three_factor_project();
    let dist = [
        0.01, -0.02, 0.015, 0.0, -0.01, 0.02, -0.015, 0.005, -0.005, 0.01, 0.0, -0.02, 0.02, -0.01,
        0.005, 0.01,
    ];
    for (r, d) in dist.iter().enumerate() {
        let levels: Vec<i8> = (0..3)
            .map(|f| if (r % 8) >> f & 1 == 1 { 1 } else { -1 })
            .collect();
        let x: Vec<f64> = levels.iter().map(|&l| f64::from(l)).collect();
        let y = (2.3 + 1.2 * x[0] + 0.8 * x[1] - 0.5 * x[2] + d).exp();
        p.runs.push(RunRecord {
            std_order: r as u32 + 1,
            run_order: r as u32 + 1,
            block: 1,
            centre: false,
            replicate: r as u32 / 8 + 1,
            levels,
            values: vec![Cell::new(format!("{y:.4}"))],
            status: RunStatus::Done,
            note: String::new(),
            entered_at: None,
            whole_plot: None,
        });
    }
    p.responses[0].model.terms = vec!["A".into(), "B".into(), "C".into()];
    p
}

#[test]
fn the_box_cox_button_applies_the_log_and_undo_takes_it_back() {
    use twofold_study::project::ResponseTransform;
    let mut h = harness(TwofoldApp::new_for_test(multiplicative_project()));
    h.state_mut().set_step(Step::Model);
    h.run();
    let transform =
        |h: &Harness<'static, TwofoldApp>| h.state().project().responses[0].model.transform;
    assert_eq!(transform(&h), ResponseTransform::None);
    assert!(
        h.query_by_label_contains("leaves out 1, so the natural log")
            .is_some(),
        "the verdict points to the log"
    );
    // The profile sits under the fit in "Can the model be trusted?": scroll down to it.
    h.get_by_label("Use the natural log").scroll_to_me();
    h.run();
    h.get_by_label("Use the natural log").click();
    h.run();
    assert_eq!(transform(&h), ResponseTransform::Ln);
    // Applied: the button gives way to a note, and the profile (on the measured values) stays.
    assert!(h.query_by_label("Use the natural log").is_none());
    assert!(
        h.query_by_label_contains("In use now: natural log, as suggested")
            .is_some()
    );
    h.state_mut().undo();
    h.run();
    assert_eq!(transform(&h), ResponseTransform::None);
    assert!(h.query_by_label("Use the natural log").is_some());
}

#[test]
fn the_interaction_plots_show_the_predicted_cells_legend_only_with_a_model() {
    let legend = "Hollow ◇ on a bar";
    let mut h = harness(TwofoldApp::new_for_test(
        twofold_study::project::demo_project(),
    ));
    h.state_mut().set_step(Step::Plots);
    h.run();
    // The demo ships with the model A + B + AB.
    assert!(h.query_by_label_contains(legend).is_some());
    let mut p = twofold_study::project::demo_project();
    p.responses[0].model.terms.clear();
    let mut h = harness(TwofoldApp::new_for_test(p));
    h.state_mut().set_step(Step::Plots);
    h.run();
    assert!(h.query_by_label_contains("Interactions").is_some());
    assert!(h.query_by_label_contains(legend).is_none());
}

/// Three factors and two responses with a full 2^3 run sheet already made (not an unsaved change).
fn sheet_with_two_responses() -> Project {
    let mut p = three_factor_project();
    p.responses.push(ResponseDef::new("Haze", "%"));
    if let Err(e) = p.apply(twofold_study::project::Edit::RegenerateRuns) {
        panic!("the run sheet of a full 2^3 design: {e}");
    }
    p
}

/// The run with run-order number `n`.
fn run_no(p: &Project, n: u32) -> &twofold_study::project::RunRecord {
    let Some(run) = p.runs.iter().find(|r| r.run_order == n) else {
        panic!("no run {n}");
    };
    run
}

#[test]
fn typing_into_a_level_field_reached_by_tab_or_a_click_replaces_its_content() {
    // Common practice, no source: a number field that takes the keyboard has its content
    // selected, so typed digits replace the old number instead of joining it ("1" + "200"
    // would read as 1200).
    let mut p = three_factor_project();
    p.factors[0] = Factor::numeric("Temperature", "°C", 1.0, 300.0);
    let mut h = harness(TwofoldApp::new_for_test(p));
    h.state_mut().set_step(Step::Factors);
    h.run();
    // By keyboard: from the name before it, Tab goes to the low level.
    h.get_by_label("name of factor A").focus();
    h.run();
    h.key_press(egui::Key::Tab);
    h.run();
    assert!(h.get_by_label("low level of factor A").is_focused());
    for c in "200".chars() {
        h.get_by_label("low level of factor A")
            .type_text(&c.to_string());
        h.run();
    }
    let levels = |h: &Harness<'static, TwofoldApp>| match h.state().project().factors[0].kind {
        twofold_study::project::FactorKind::Numeric { low, high } => (low, high),
        _ => panic!("the factor stays numeric"),
    };
    assert_eq!(levels(&h), (200.0, 300.0));
    // By mouse: a click in the high level selects it as well.
    h.get_by_label("high level of factor A").click();
    h.run();
    h.get_by_label("high level of factor A").type_text("250");
    h.run();
    h.key_press(egui::Key::Enter);
    h.run();
    assert_eq!(levels(&h), (200.0, 250.0));
}

#[test]
fn typing_into_a_run_sheet_cell_reached_by_tab_replaces_its_value() {
    let mut p = sheet_with_two_responses();
    let first = p.runs.iter().position(|r| r.run_order == 1).unwrap();
    p.apply(twofold_study::project::Edit::SetCell {
        run: first,
        response: 1,
        text: "3.0".into(),
        at: None,
    })
    .unwrap();
    let mut h = harness(TwofoldApp::new_for_test(p));
    h.state_mut().set_step(Step::Runs);
    h.run();
    h.get_by_label("value run 1 Gloss").focus();
    h.run();
    h.get_by_label("value run 1 Gloss").type_text("80");
    h.run();
    h.key_press(egui::Key::Tab);
    h.run();
    // The Haze cell of the same run has the keyboard, its "3.0" selected.
    h.get_by_label("value run 1 Haze").type_text("2.5");
    h.run();
    h.key_press(egui::Key::Enter);
    h.run();
    let p = h.state().project();
    assert_eq!(run_no(p, 1).values[0].text, "80");
    assert_eq!(run_no(p, 1).values[1].text, "2.5", "not 3.02.5");
}

#[test]
fn a_value_committed_with_enter_is_in_the_recovery_copy_within_the_same_frame() {
    // The contract behind "a committed value survives a crash": no timer, no later frame.
    let dir = tempfile::tempdir().unwrap();
    let store = twofold_study::project::RecoveryStore::in_dir(dir.path());
    let mut app = TwofoldApp::new_for_test(sheet_with_two_responses());
    app.set_recovery_store(store.clone());
    let mut h = harness(app);
    h.state_mut().set_step(Step::Runs);
    h.run();
    h.get_by_label("value run 1 Gloss").focus();
    h.run();
    h.get_by_label("value run 1 Gloss").type_text("87.5");
    h.run();
    assert!(
        store.find(None).unwrap().is_none(),
        "nothing is committed while the value is being typed"
    );
    // Exactly one frame: the Enter key going down.
    h.event(egui::Event::Key {
        key: egui::Key::Enter,
        physical_key: None,
        pressed: true,
        repeat: false,
        modifiers: egui::Modifiers::NONE,
    });
    h.step();
    assert_eq!(run_no(h.state().project(), 1).values[0].text, "87.5");
    let copy = store
        .find(None)
        .unwrap()
        .expect("the recovery copy is written in the frame of the commit");
    assert_eq!(run_no(&copy.project, 1).values[0].text, "87.5");
    assert_eq!(&copy.project, h.state().project());
}

#[test]
fn a_level_typed_far_from_the_other_level_is_flagged_beside_the_field() {
    // The rule (common practice, no source): two non-zero levels more than ten times apart in
    // size are flagged as a likely slip of the keyboard.
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    h.state_mut().set_step(Step::Factors);
    h.run();
    assert!(h.query_by_label_contains("ten times").is_none());
    h.get_by_label("high level of factor A").click();
    h.run();
    // One key at a time, as a person types: the warning follows the text as it is typed.
    for c in "2000".chars() {
        h.get_by_label("high level of factor A")
            .type_text(&c.to_string());
        h.run();
    }
    let warning = h.get_by_label_contains("ten times");
    let field = h.get_by_label("high level of factor A");
    let (w, f) = (warning.rect(), field.rect());
    assert!(
        w.min.y < f.max.y && f.min.y < w.max.y && w.min.x > f.max.x,
        "the warning {w:?} sits on the row of the field {f:?}, to its right"
    );
    // The typed value is kept as typed, only flagged.
    assert!(matches!(
        h.state().project().factors[0].kind,
        twofold_study::project::FactorKind::Numeric { high: 2000.0, .. }
    ));
}

#[test]
fn new_clears_the_saved_notice_of_the_previous_project() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("coating.ron");
    let mut app = TwofoldApp::new_for_test(three_factor_project());
    app.set_file_picker(twofold_app::app::FilePicker::Fixed(Some(file.clone())));
    let mut h = harness(app);
    h.run();
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::S);
    h.run();
    let notice = h.state().notice().unwrap_or_default().to_string();
    assert!(notice.starts_with("Saved"), "{notice}");
    assert!(h.query_by_label_contains("Saved").is_some());
    // Saved, so New asks nothing.
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::N);
    h.run();
    assert_eq!(h.state().project().name, "Untitled");
    assert_eq!(h.state().notice(), None);
    assert!(h.query_by_label_contains("Saved").is_none());
}

#[test]
fn save_changes_first_speaks_of_no_file_for_a_project_never_saved() {
    let mut h = harness(TwofoldApp::new_for_test(three_factor_project()));
    h.run();
    h.state_mut().act(twofold_app::app::AppAction::Command(
        twofold_app::panels::Command::Edit(twofold_study::project::Edit::SetName(
            "Coating trial 2".into(),
        )),
    ));
    h.run();
    assert!(h.state().history().is_dirty());
    assert!(h.state().path().is_none());
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::N);
    h.run();
    assert!(h.query_by_label("Save changes first?").is_some());
    assert!(h.query_by_label_contains("its file").is_none());
    assert!(h.query_by_label_contains("never been saved").is_some());
    h.get_by_label("Cancel").click();
    h.run();

    // Once saved to a file, the question names that file.
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("coating.ron");
    assert!(h.state_mut().save_to(&file));
    h.state_mut().act(twofold_app::app::AppAction::Command(
        twofold_app::panels::Command::Edit(twofold_study::project::Edit::SetName(
            "Coating trial 3".into(),
        )),
    ));
    h.run();
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::N);
    h.run();
    assert!(
        h.query_by_label_contains("not saved in coating.ron")
            .is_some()
    );
    assert!(h.query_by_label_contains("never been saved").is_none());
}

#[test]
fn the_suggested_page_name_carries_the_chosen_format_as_its_extension() {
    use twofold_app::app::{AppAction, FileAction};
    let mut app = TwofoldApp::new_for_test(three_factor_project());
    assert_eq!(
        app.suggested_file_name(FileAction::ExportSummary),
        "Coating-trial-summary.pdf"
    );
    app.act(AppAction::SetPageFormat("png"));
    assert_eq!(
        app.suggested_file_name(FileAction::ExportSummary),
        "Coating-trial-summary.png"
    );
    assert_eq!(
        app.suggested_file_name(FileAction::PrintRunSheet),
        "Coating-trial-run-sheet.png"
    );
    // The menu offers the formats in words, not as a rule for names without an extension.
    let mut h = harness(app);
    h.run();
    h.get_by_label("Project").click();
    h.run();
    assert!(h.query_by_label_contains("Without extension").is_none());
    assert!(h.query_by_label("PNG picture").is_some());
    assert!(h.query_by_label("PDF document").is_some());
}

#[test]
fn an_export_chosen_with_the_keyboard_closes_the_project_menu() {
    let mut app = TwofoldApp::new_for_test(three_factor_project());
    // The fixed picker answers "cancelled" at once: nothing is written.
    app.set_file_picker(twofold_app::app::FilePicker::Fixed(None));
    let mut h = harness(app);
    h.run();
    h.get_by_label("Project").click();
    h.run();
    h.get_by_label("Export summary… Ctrl+E").focus();
    h.run();
    h.key_press(egui::Key::Enter);
    h.run();
    h.run();
    assert_eq!(
        h.state().notice(),
        Some("Nothing was written: no file was chosen.")
    );
    assert!(
        h.query_by_label("Printable run sheet…").is_none(),
        "the menu closed"
    );
}
