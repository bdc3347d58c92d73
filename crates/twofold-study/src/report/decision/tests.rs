use super::*;
use crate::project::{GoalAim, demo_project};
use crate::report::Report;

fn reports(p: &Project) -> Vec<Report> {
    (0..p.responses.len())
        .map(|i| Report::build(p, 1, i, &p.responses[i].model))
        .collect()
}

fn decided(p: &Project) -> Decision {
    let built = reports(p);
    let refs: Vec<&Report> = built.iter().collect();
    decide(p, &refs, &DecideOptions::default())
}

fn coefficient(r: &Report, label: &str) -> f64 {
    let fit = match &r.fit {
        Ok(f) => f,
        Err(e) => panic!("{e}"),
    };
    fit.coefficients
        .iter()
        .find(|c| c.term.label() == label)
        .map_or(0.0, |c| c.estimate)
}

#[test]
fn demo_goals_pull_apart_and_the_choice_says_what_binds() {
    // The illustrative demo: solvent rubs want temperature and time high, gloss wants them low,
    // thickness and air speed raise gloss only.
    let p = demo_project();
    let d = decided(&p);
    let best = match &d.best {
        Ok(b) => b,
        Err(e) => panic!("{e}"),
    };
    let first = &best[0];
    assert!(first.overall > 0.0 && first.overall < 1.0, "{first:?}");
    // Thickness (C) and air speed (D) only raise gloss: both at their high level.
    assert_eq!(first.natural[2], Setting::Number(90.0));
    assert_eq!(first.natural[3], Setting::Number(2.0));
    // The choice's numbers are the fitted models' predictions at its point.
    let built = reports(&p);
    for (o, r) in first.responses.iter().zip(&built) {
        let fit = r.fit.as_ref().map_err(Clone::clone);
        let y = fit.map(|f| f.value_at(&first.coded)).unwrap_or(f64::NAN);
        assert!((o.predicted.unwrap_or(f64::NAN) - y).abs() < 1e-9);
        let (lo, hi) = o.interval.unwrap_or((f64::NAN, f64::NAN));
        assert!(lo < y && y < hi);
    }
    assert!(
        first
            .binding
            .iter()
            .any(|w| w.starts_with("the goal that binds")),
        "{:?}",
        first.binding
    );
    assert!(d.notes.iter().all(|n| !n.contains("safe range")));
    // The map holds every cell; cells meeting every limit have D > 0.
    let m = d.map(0, 1, 11).unwrap_or_else(|| panic!("a map"));
    assert_eq!(m.cells.len(), 121);
    assert!(m.cells.iter().any(|c| c.failing.is_empty()));
}

#[test]
fn a_noise_factor_transmits_its_slope() {
    // Air speed (D) as noise with σ 1 (coded): gloss has no interaction with it, so its slope is
    // the D coefficient everywhere and σ_tr = |b_D|; solvent rubs do not depend on D, σ_tr = 0.
    let mut p = demo_project();
    p.factors[3].noise_sd = Some(1.0);
    let built = reports(&p);
    let b_d = coefficient(&built[1], "D");
    let d = decided(&p);
    let best = d.best.unwrap_or_default();
    let first = &best[0];
    assert_eq!(first.natural[3], Setting::Noise);
    assert_eq!(first.coded[3], 0.0);
    let gloss = &first.responses[1];
    assert!((gloss.transmitted_sd.unwrap_or(f64::NAN) - b_d.abs()).abs() < 1e-9);
    assert!((gloss.noise_slopes[0] - b_d).abs() < 1e-9);
    assert_eq!(first.responses[0].transmitted_sd, Some(0.0));
}

#[test]
fn without_goals_the_step_says_what_to_do() {
    let mut p = demo_project();
    for r in &mut p.responses {
        r.goal = ResponseGoal::default();
    }
    let d = decided(&p);
    assert!(!d.any_goal());
    assert!(d.best.unwrap_err().contains("no response has a goal"));
}

#[test]
fn a_bad_goal_is_named() {
    let mut p = demo_project();
    p.responses[1].goal.aim = GoalAim::Maximise {
        low: 90.0,
        high: 80.0,
        shape: 1.0,
    };
    let d = decided(&p);
    let why = d.best.unwrap_err();
    assert!(
        why.contains("Gloss 60°") && why.contains("lower limit"),
        "{why}"
    );
}
