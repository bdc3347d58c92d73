//! Behaviour tests of the charts and grids of the window: how the keyboard moves through the
//! effects pane, driven through its widgets by label (no renderer needed).

use egui_kittest::Harness;
use egui_kittest::kittest::{NodeT, Queryable};
use twofold_app::app::TwofoldApp;
use twofold_app::panels::Step;
use twofold_study::project::{Edit, Project, demo_project};

/// The window at its default size.
fn harness(app: TwofoldApp) -> Harness<'static, TwofoldApp> {
    Harness::builder()
        .with_size([1360.0, 860.0])
        .build_ui_state(|ui, app: &mut TwofoldApp| app.ui_in(ui), app)
}

/// The demo (a 2^4 design: 15 effects, so 15 bars and 15 points) with only its first response,
/// so nothing but the pane is drawn in the middle of the window.
fn demo_with_one_response() -> Project {
    let mut p = demo_project();
    if let Err(e) = p.apply(Edit::RemoveResponse { index: 1 }) {
        panic!("the demo has a second response: {e}");
    }
    p
}

/// One stop of the Tab key: the focused widget's name, and whether it lies inside the pane.
#[derive(Debug)]
struct Stop {
    label: String,
    in_pane: bool,
}

/// Presses Tab from a window where nothing has the keyboard until the widget named `last` has
/// it, and lists every stop on the way. A stop is in the pane when the step's area (the parent
/// of the row that holds its `heading`) is among its ancestors.
fn tab_until(h: &mut Harness<'static, TwofoldApp>, heading: &str, last: &str) -> Vec<Stop> {
    let Some(pane) = h
        .get_by_label(heading)
        .accesskit_node()
        .parent()
        .and_then(|row| row.parent())
    else {
        panic!("the heading {heading:?} sits in no pane");
    };
    let pane = pane.id();
    let mut stops = Vec::new();
    for _ in 0..300 {
        h.key_press(egui::Key::Tab);
        h.run();
        let Some(focused) = h.query_by(|n| n.is_focused()) else {
            continue;
        };
        let node = focused.accesskit_node();
        let label = node.label().unwrap_or_default();
        let mut in_pane = false;
        let mut up = node.parent();
        while let Some(p) = up {
            if p.id() == pane {
                in_pane = true;
                break;
            }
            up = p.parent();
        }
        let done = label == last;
        stops.push(Stop { label, in_pane });
        if done {
            return stops;
        }
    }
    panic!("Tab never reached {last:?}; stops: {stops:?}");
}

#[test]
fn tab_crosses_the_effects_pane_to_its_buttons_without_stopping_on_the_charts() {
    let mut h = harness(TwofoldApp::new_for_test(demo_with_one_response()));
    h.state_mut().set_step(Step::Effects);
    h.run();
    // The bars and points are drawn and answer the mouse.
    assert!(h.query_by_label_contains("effect A +").is_some());
    assert!(h.query_by_label("point C").is_some());
    let stops = tab_until(&mut h, "Which effects are real?", "Clear the model");
    let Some(first) = stops.iter().position(|s| s.in_pane) else {
        panic!("no stop inside the pane: {stops:?}");
    };
    let presses = stops.len() - 1 - first;
    let in_pane: Vec<&str> = stops[first..].iter().map(|s| s.label.as_str()).collect();
    // Before, every bar and every point was a stop (30 here) before the buttons.
    assert!(
        presses <= 8,
        "{presses} presses of Tab from the pane's first control ({:?}) to its last button: \
         {in_pane:?}",
        stops[first].label
    );
    for label in &in_pane {
        assert!(
            !label.starts_with("effect ") && !label.starts_with("point "),
            "a chart element takes the keyboard: {in_pane:?}"
        );
        assert!(
            !label.contains('×') && !label.contains('✕'),
            "a remove button is a Tab stop: {in_pane:?}"
        );
    }
}

#[test]
fn the_term_list_after_the_buttons_toggles_a_term_by_keyboard() {
    let mut h = harness(TwofoldApp::new_for_test(demo_with_one_response()));
    h.state_mut().set_step(Step::Effects);
    h.run();
    let terms =
        |h: &Harness<'static, TwofoldApp>| h.state().project().responses[0].model.terms.clone();
    assert_eq!(terms(&h), ["A", "B", "AB"]);
    // What a click on C's bar or point does, the keyboard does in the term list.
    tab_until(&mut h, "Which effects are real?", "term C");
    h.key_press(egui::Key::Space);
    h.run();
    assert_eq!(terms(&h), ["A", "B", "C", "AB"]);
    h.key_press(egui::Key::Space);
    h.run();
    assert_eq!(
        terms(&h),
        ["A", "B", "AB"],
        "a second press takes it out again"
    );
}
