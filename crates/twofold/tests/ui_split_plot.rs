//! Hard-to-change factors marked on the factors step: the run sheet grouped into whole plots,
//! and the effects step judging each stratum on its own.

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::TwofoldApp;
use twofold_app::panels::Step;
use twofold_study::project::{Cell, Edit, Factor, Project, ResponseDef, RunStatus};
use twofold_study::report::Report;

fn four_factors() -> Project {
    let mut p = Project::new("Oven study");
    for name in ["Oven", "Time", "Speed", "Load"] {
        p.factors.push(Factor::numeric(name, "", 1.0, 2.0));
    }
    p.responses.push(ResponseDef::new("Y", ""));
    p.design.seed = 5;
    if let Err(e) = p.apply(Edit::RegenerateRuns) {
        panic!("{e}");
    }
    p
}

fn settle(h: &mut Harness<'static, TwofoldApp>) {
    for _ in 0..3 {
        h.run();
    }
}

#[test]
fn a_hard_to_change_factor_groups_the_sheet_and_splits_the_effects() {
    let mut h = Harness::builder()
        .with_size([1600.0, 1200.0])
        .build_ui_state(
            |ui, app: &mut TwofoldApp| app.ui_in(ui),
            TwofoldApp::new_for_test(four_factors()),
        );
    h.state_mut().set_step(Step::Factors);
    settle(&mut h);
    h.get_by_label("hard to change factor A").click();
    settle(&mut h);
    h.get_by_label("hard to change factor B").click();
    settle(&mut h);
    assert!(
        h.state().project().runs_outdated,
        "the sheet must be made again"
    );
    h.state_mut().set_step(Step::Design);
    settle(&mut h);
    h.get_by_label("Apply and remake the run sheet").click();
    settle(&mut h);
    let mut p = h.state().project().clone();
    assert!(!p.runs_outdated);
    // Four whole plots of four runs, A and B fixed inside each, run one after another.
    let mut by_order: Vec<_> = p.runs.iter().collect();
    by_order.sort_by_key(|r| r.run_order);
    let wp: Vec<u32> = by_order.iter().map(|r| r.whole_plot.unwrap_or(0)).collect();
    assert_eq!(wp.windows(2).filter(|w| w[0] != w[1]).count(), 3, "{wp:?}");
    for w in 1..=4 {
        let ab: Vec<(i8, i8)> = p
            .runs
            .iter()
            .filter(|r| r.whole_plot == Some(w))
            .map(|r| (r.levels[0], r.levels[1]))
            .collect();
        assert_eq!(ab.len(), 4);
        assert!(ab.iter().all(|x| *x == ab[0]));
    }
    // Values from an invented formula; the effects step names the strata.
    for r in &mut p.runs {
        let l = |f: usize| f64::from(r.levels[f]);
        let y = 20.0
            + 3.0 * l(0)
            + 1.0 * l(1)
            + 2.0 * l(2)
            + 0.5 * l(2) * l(3)
            + 0.1 * f64::from(r.whole_plot.unwrap_or(0));
        r.values[0] = Cell::new(format!("{y}"));
        r.status = RunStatus::Done;
    }
    let mut h = Harness::builder()
        .with_size([1600.0, 1200.0])
        .build_ui_state(
            |ui, app: &mut TwofoldApp| app.ui_in(ui),
            TwofoldApp::new_for_test(p),
        );
    h.state_mut().set_step(Step::Effects);
    settle(&mut h);
    assert!(
        h.query_all_by_label_contains("Split-plot study with 4 whole plots")
            .count()
            > 0
    );
    assert!(
        h.query_all_by_label_contains("Whole-plot effects: A, B, AB")
            .count()
            > 0
    );
    // The pooled margins of the bars are named as such.
    assert!(h.query_all_by_label_contains("pool both strata").count() > 0);
    // One half-normal plot per stratum, each point a term of that stratum only.
    for title in [
        "Half-normal plot: whole-plot effects",
        "Half-normal plot: subplot effects",
    ] {
        assert!(h.query_all_by_label_contains(title).count() > 0, "{title}");
    }
    let p = h.state().project();
    let report = Report::build(p, 0, 0, &p.responses[0].model);
    let strata = report.strata.as_ref().expect("split-plot strata");
    let counts: Vec<usize> = strata.half_normal.iter().map(|(_, p)| p.len()).collect();
    // 16 runs, 15 effects: A, B, AB are whole-plot effects, the other 12 subplot effects.
    assert_eq!(counts, vec![3, 12]);
    // The page draws the same two plots from the same report.
    let input = twofold_study::export::summary_input(p, &[&report], &Default::default());
    let page = &input.responses[0].strata_half_normal;
    assert_eq!(page.len(), 2);
    assert_eq!(page[0].0, "Whole-plot effects");
    assert_eq!(page[0].1.len(), 3);
    assert_eq!(page[1].1.len(), 12);
    let svg = twofold_study::export::summary_pages(&input, twofold_study::export::Paper::A4);
    assert!(svg[0].contains("one per stratum"), "page heading");
    assert!(svg[0].contains("Subplot effects"));
}

#[test]
fn a_split_plot_fraction_is_offered_and_keeps_the_hard_factors_in_whole_plots() {
    // Three hard-to-change factors of four in a half fraction. The regular 8-run option
    // (D = ABC) holds Load fixed in every whole plot as well; the split-plot table offers 8 runs in four
    // whole plots (C = ±AB, resolution III: worked by hand, see the core's fraction tests).
    let mut p = four_factors();
    for f in &mut p.factors[..3] {
        f.hard_to_change = true;
    }
    let mut h = Harness::builder()
        .with_size([1600.0, 3000.0])
        .build_ui_state(
            |ui, app: &mut TwofoldApp| app.ui_in(ui),
            TwofoldApp::new_for_test(p),
        );
    h.state_mut().set_step(Step::Design);
    settle(&mut h);
    h.get_by_label("use 8 runs").click();
    settle(&mut h);
    assert!(
        h.query_all_by_label_contains("holds Load fixed in every whole plot")
            .count()
            > 0,
        "the regular half fraction (D = ABC) is no split plot for A, B, C"
    );
    h.get_by_label("use 8 runs in 4 whole plots").click();
    settle(&mut h);
    assert_eq!(
        h.query_all_by_label_contains("fixed in every whole plot")
            .count(),
        0
    );
    assert!(
        h.query_all_by_label_contains("grouped into 4 whole plots")
            .count()
            > 0
    );
    h.get_by_label("Apply and remake the run sheet").click();
    settle(&mut h);
    let p = h.state().project();
    assert_eq!(p.runs.len(), 8);
    for w in 1..=4 {
        let plot: Vec<_> = p.runs.iter().filter(|r| r.whole_plot == Some(w)).collect();
        assert_eq!(plot.len(), 2, "whole plot {w}");
        assert_ne!(plot[0].levels[3], plot[1].levels[3], "Load changes inside");
        assert_eq!(plot[0].levels[..3], plot[1].levels[..3]);
    }
}
