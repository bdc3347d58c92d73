//! Behaviour tests of the window, driven through its widgets by label (no renderer needed).

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::TwofoldApp;
use twofold_app::panels::Step;
use twofold_app::project::{Factor, Project, ResponseDef};

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
    make.expect("the button that makes the run sheet").click();
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
    assert_eq!(by_order(1).status, twofold_app::project::RunStatus::Done);
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
        twofold_app::project::RunStatus::ToDo,
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
    let store = twofold_app::project::RecoveryStore::in_dir(dir.path());
    let mut app = TwofoldApp::new_for_test(three_factor_project());
    app.set_recovery_store(store.clone());
    app.apply(twofold_app::panels::Command::Edit(
        twofold_app::project::Edit::SetName("Renamed".into()),
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
