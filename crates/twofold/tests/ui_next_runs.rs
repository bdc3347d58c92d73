//! The "What to run next" step, driven through its widgets by label (no renderer needed).

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::TwofoldApp;
use twofold_app::panels::Step;
use twofold_app::panels::next_runs::add_button_name;
use twofold_core::foldover::FoldKind;
use twofold_study::project::{Cell, Edit, Factor, FollowUp, Project, ResponseDef, RunStatus};
use twofold_study::report::next_runs;

fn harness(app: TwofoldApp) -> Harness<'static, TwofoldApp> {
    Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_ui_state(|ui, app: &mut TwofoldApp| app.ui_in(ui), app)
}

/// Five factors in the eight-run fraction D=AB, E=AC, every run typed, one excluded with a
/// reason and one with a note.
fn screened() -> Project {
    let mut p = Project::new("Screening");
    for (name, unit) in [
        ("Temperature", "°C"),
        ("Time", "min"),
        ("Speed", "rpm"),
        ("Load", "kg"),
        ("Feed", "mm"),
    ] {
        p.factors.push(Factor::numeric(name, unit, 10.0, 20.0));
    }
    p.responses.push(ResponseDef::new("Yield", "%"));
    p.design.base_runs = Some(8);
    p.design.generators = vec!["D=AB".into(), "E=AC".into()];
    p.design.seed = 42;
    if let Err(e) = p.apply(Edit::RegenerateRuns) {
        panic!("the fraction plans: {e}");
    }
    // A large effect of A with a small wobble, so Lenth's margin finds A alone.
    let wobble = [0.3, -0.2, 0.1, -0.4, 0.2, 0.0, -0.1, 0.25];
    for r in &mut p.runs {
        let a = f64::from(r.levels[0]);
        let y = 60.0 + 7.0 * a + wobble[r.std_order as usize - 1];
        r.values[0] = Cell::new(format!("{y}"));
        r.status = RunStatus::Done;
    }
    p.runs[3].status = RunStatus::Excluded {
        reason: "burner out".into(),
    };
    p.runs[6].note = "second lot".into();
    p
}

/// The label of the full fold-over's button, as the engine names the option.
fn full_fold_button(p: &Project) -> String {
    let list = next_runs(p, None);
    let Some(full) = list
        .iter()
        .find(|o| o.follow_up == FollowUp::FoldOver(FoldKind::Full))
    else {
        panic!("a full fold-over is offered for a resolution III fraction");
    };
    add_button_name(full)
}

fn assert_sheet_kept(before: &Project, after: &Project) {
    for r in &before.runs {
        let Some(now) = after
            .runs
            .iter()
            .find(|n| n.levels == r.levels && n.block == 1)
        else {
            panic!("run {:?} left block 1", r.levels);
        };
        assert_eq!(now.values, r.values);
        assert_eq!(now.status, r.status);
        assert_eq!(now.note, r.note);
        assert_eq!(now.run_order, r.run_order);
    }
}

#[test]
fn the_full_fold_over_button_adds_block_two_and_undo_takes_it_back() {
    let before = screened();
    let label = full_fold_button(&before);
    let mut h = harness(TwofoldApp::new_for_test(before.clone()));
    h.state_mut().set_step(Step::NextRuns);
    h.run();
    assert!(h.query_by_label("What to run next?").is_some());
    // The analysis of Yield finds A active, and A = BD = CE here: a fold is suggested.
    assert!(h.query_all_by_label("suggested").count() > 0);
    h.get_by_label(&label).click();
    h.run();
    h.run();
    let app = h.state();
    assert_eq!(app.step(), Step::Runs, "the run sheet shows next");
    let after = app.project().clone();
    assert_eq!(after.runs.len(), 16, "eight follow-up runs");
    assert_eq!(after.runs.iter().filter(|r| r.block == 2).count(), 8);
    assert_eq!(after.design.fold, Some(FoldKind::Full));
    assert_sheet_kept(&before, &after);
    // The keyboard is in the next run's entry field, not lost with the button.
    assert!(h.get_by_label("next run Yield").is_focused());
    h.state_mut().undo();
    h.run();
    assert_eq!(h.state().project(), &before, "one undo step");
}

#[test]
fn the_buttons_are_reached_with_tab_and_pressed_with_enter() {
    let before = screened();
    let label = full_fold_button(&before);
    let mut h = harness(TwofoldApp::new_for_test(before.clone()));
    h.state_mut().set_step(Step::NextRuns);
    h.run();
    let mut reached = false;
    for _ in 0..80 {
        h.key_press(egui::Key::Tab);
        h.run();
        if h.get_by_label(&label).is_focused() {
            reached = true;
            break;
        }
    }
    assert!(reached, "Tab reaches the button");
    h.key_press(egui::Key::Enter);
    h.run();
    h.run();
    assert_eq!(h.state().project().runs.len(), 16);
    assert_eq!(h.state().step(), Step::Runs);
    assert!(h.get_by_label("next run Yield").is_focused());
}

fn tall_harness(app: TwofoldApp) -> Harness<'static, TwofoldApp> {
    Harness::builder()
        .with_size([1500.0, 4000.0])
        .build_ui_state(|ui, app: &mut TwofoldApp| app.ui_in(ui), app)
}

#[test]
fn the_semifold_button_adds_half_the_fold_over_as_block_two() {
    use twofold_core::semifold::SemiFold;
    use twofold_study::project::AddedBlock;
    let before = screened();
    let list = next_runs(&before, None);
    let spec = SemiFold::with_default_half(FoldKind::Factor(0));
    let Some(half) = list
        .iter()
        .find(|o| o.follow_up == FollowUp::SemiFold(spec))
    else {
        panic!("a semifold on A is offered");
    };
    let label = add_button_name(half);
    let mut h = tall_harness(TwofoldApp::new_for_test(before.clone()));
    h.state_mut().set_step(Step::NextRuns);
    h.run();
    h.get_by_label(&label).click();
    h.run();
    h.run();
    let after = h.state().project().clone();
    assert_eq!(h.state().step(), Step::Runs);
    assert_eq!(after.runs.iter().filter(|r| r.block == 2).count(), 4);
    assert_eq!(after.design.added, Some(AddedBlock::Semifold(spec)));
    assert_sheet_kept(&before, &after);
}

#[test]
fn typing_interactions_offers_runs_that_separate_them() {
    use twofold_app::panels::next_runs::SEPARATE_FIELD;
    use twofold_study::project::AddedBlock;
    use twofold_study::report::separate_option;
    let before = screened();
    // A = BD here (D = AB): naming BD asks for runs that tell it from A.
    // The pane passes the shown report: its model's interactions are kept estimable too.
    let report = twofold_study::report::Report::for_response(&before, 0, 0);
    let option = match separate_option(&before, "BD", Some(&report)) {
        Ok(o) => o,
        Err(e) => panic!("BD can be separated: {e}"),
    };
    assert_eq!(option.runs_added(), 2);
    let label = add_button_name(&option);
    let mut h = tall_harness(TwofoldApp::new_for_test(before.clone()));
    h.state_mut().set_step(Step::NextRuns);
    h.run();
    assert!(
        h.query_by_label(&label).is_none(),
        "nothing typed, no option"
    );
    h.get_by_label(SEPARATE_FIELD).click();
    h.run();
    h.get_by_label(SEPARATE_FIELD).type_text("BD");
    h.run();
    h.run();
    h.get_by_label(&label).click();
    h.run();
    h.run();
    let after = h.state().project().clone();
    assert_eq!(after.runs.iter().filter(|r| r.block == 2).count(), 2);
    assert!(matches!(
        after.design.added,
        Some(AddedBlock::Separate { ref interactions, .. }) if interactions == &["BD"]
    ));
    assert_sheet_kept(&before, &after);
    h.state_mut().undo();
    h.run();
    assert_eq!(h.state().project(), &before, "one undo step");
}

/// `twofold plan` called in-process: the JSON it prints.
fn plan_json(args: &[&str]) -> serde_json::Value {
    let args: Vec<String> = args.iter().map(|s| s.to_string()).collect();
    let mut out = Vec::new();
    let mut err = Vec::new();
    let code = twofold_app::cli::run(&args, &mut out, &mut err);
    assert_eq!(code, 0, "{}", String::from_utf8_lossy(&err));
    match serde_json::from_str(&String::from_utf8_lossy(&out)) {
        Ok(v) => v,
        Err(e) => panic!("plan prints JSON: {e}"),
    }
}

#[test]
fn the_half_chosen_for_a_semifold_adds_the_runs_plan_gives_for_it() {
    use twofold_app::panels::next_runs::half_chooser_name;
    use twofold_core::semifold::SemiFold;
    use twofold_study::project::AddedBlock;
    use twofold_study::report::semifold_option;
    let before = screened();
    let chosen = SemiFold {
        fold: FoldKind::Factor(0),
        keep: 2,
        level: -1,
    };
    let Ok(option) = semifold_option(&before, chosen) else {
        panic!("the half with C at − can be added");
    };
    let default_label = {
        let list = next_runs(&before, None);
        let spec = SemiFold::with_default_half(FoldKind::Factor(0));
        let Some(half) = list
            .iter()
            .find(|o| o.follow_up == FollowUp::SemiFold(spec))
        else {
            panic!("a semifold on A is offered");
        };
        add_button_name(half)
    };
    let label = add_button_name(&option);
    assert_ne!(label, default_label);
    let mut h = tall_harness(TwofoldApp::new_for_test(before.clone()));
    h.state_mut().set_step(Step::NextRuns);
    h.run();
    assert!(h.query_by_label(&default_label).is_some());
    assert!(h.query_by_label(&label).is_none(), "the default half first");
    h.get_by_label(&half_chooser_name(FoldKind::Factor(0)))
        .click();
    h.run();
    h.get_by_label("C at − (Speed)").click();
    h.run();
    h.run();
    // The option now names the chosen half; its text and run count follow.
    assert!(h.query_by_label(&default_label).is_none());
    assert!(
        h.query_by_label("Semifold on A (Temperature), half the runs: C at −")
            .is_some()
    );
    h.get_by_label(&label).click();
    h.run();
    h.run();
    let after = h.state().project().clone();
    assert_eq!(h.state().step(), Step::Runs);
    assert_eq!(after.design.added, Some(AddedBlock::Semifold(chosen)));
    assert_sheet_kept(&before, &after);
    // The same design planned by the command with the same half and seed.
    let plan = plan_json(&[
        "plan",
        "--factors",
        "5",
        "--runs",
        "8",
        "--generators",
        "D=AB,E=AC",
        "--fold",
        "semifold:A:C-",
        "--seed",
        "42",
        "--json",
    ]);
    let mut from_plan: Vec<(u64, u64, Vec<i64>)> = plan["runs"]
        .as_array()
        .into_iter()
        .flatten()
        .map(|r| {
            (
                r["block"].as_u64().unwrap_or(0),
                r["run_order"].as_u64().unwrap_or(0),
                r["levels"]
                    .as_array()
                    .into_iter()
                    .flatten()
                    .filter_map(serde_json::Value::as_i64)
                    .collect(),
            )
        })
        .collect();
    let mut from_window: Vec<(u64, u64, Vec<i64>)> = after
        .runs
        .iter()
        .map(|r| {
            (
                u64::from(r.block),
                u64::from(r.run_order),
                r.levels.iter().map(|&v| i64::from(v)).collect(),
            )
        })
        .collect();
    from_plan.sort();
    from_window.sort();
    assert_eq!(from_window.iter().filter(|r| r.0 == 2).count(), 4);
    assert!(
        from_window
            .iter()
            .filter(|r| r.0 == 2)
            .all(|r| r.2[2] == -1)
    );
    assert_eq!(
        from_window, from_plan,
        "block, run order and settings of every run"
    );
    // One undo step takes the half away again.
    h.state_mut().undo();
    h.run();
    assert_eq!(h.state().project(), &before, "one undo step");
}

#[test]
fn the_design_step_counts_the_follow_up_block_in_the_run_total() {
    use twofold_core::semifold::SemiFold;
    for (follow_up, total) in [
        // Counted by hand: the eight runs of the fraction and the eight of its fold-over.
        (
            FollowUp::FoldOver(FoldKind::Full),
            "16 runs: 8 in the fraction, 8 in the fold-over block",
        ),
        // Half the fold-over on A: the four fold-over runs with B at +.
        (
            FollowUp::SemiFold(SemiFold::with_default_half(FoldKind::Factor(0))),
            "12 runs: 8 in the fraction, 4 in the half fold-over block",
        ),
    ] {
        let mut p = screened();
        let mut plain = harness(TwofoldApp::new_for_test(p.clone()));
        plain.state_mut().set_step(Step::Design);
        plain.run();
        assert!(plain.query_by_label("8 runs in the fraction").is_some());
        if let Err(e) = p.apply(Edit::AddFollowUp(follow_up.clone())) {
            panic!("{follow_up:?} adds: {e}");
        }
        let mut h = harness(TwofoldApp::new_for_test(p));
        h.state_mut().set_step(Step::Design);
        h.run();
        assert!(
            h.query_by_label(total).is_some(),
            "{total} on the design step"
        );
    }
}
