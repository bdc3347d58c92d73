//! The report of a Plackett–Burman screening study: main effects alone, by their own contrasts,
//! with the partial aliasing named.

use crate::project::{Cell, Edit, Factor, Project, ResponseDef, RunStatus};
use crate::report::{Report, WarningKind};
use twofold_core::term::Term;

/// Seven factors in the 12-run design; y = 50 + 5A − 3C + 2AC + a small wobble (invented).
fn screening_study() -> Project {
    let mut p = Project::new("Screening");
    for i in 0..7 {
        p.factors
            .push(Factor::numeric(&format!("S{}", i + 1), "", 1.0, 2.0));
    }
    p.responses.push(ResponseDef::new("Y", ""));
    p.design.base_runs = Some(12);
    p.design.seed = 3;
    if let Err(e) = p.apply(Edit::RegenerateRuns) {
        panic!("{e}");
    }
    let wobble = [
        0.3, -0.2, 0.1, -0.4, 0.2, 0.0, -0.1, 0.25, 0.15, -0.3, 0.05, 0.1,
    ];
    for (i, r) in p.runs.iter_mut().enumerate() {
        let a = f64::from(r.levels[0]);
        let c = f64::from(r.levels[2]);
        let y = 50.0 + 5.0 * a - 3.0 * c + 2.0 * a * c + wobble[i];
        r.values[0] = Cell::new(format!("{y}"));
        r.status = RunStatus::Done;
    }
    p
}

#[test]
fn main_effects_are_their_own_contrasts_and_the_partial_aliasing_is_named() {
    let p = screening_study();
    assert_eq!(p.runs.len(), 12);
    let r = Report::for_response(&p, 0, 0);
    let table = match &r.effects {
        Ok(t) => t,
        Err(e) => panic!("{e}"),
    };
    assert_eq!(table.effects.len(), 7, "main effects only");
    // Each effect is the mean at + minus the mean at − (orthogonal columns), checked by hand
    // from the runs.
    for f in 0..7 {
        let (mut hi, mut lo) = (Vec::new(), Vec::new());
        for run in &p.runs {
            let y = run.values[0].number().unwrap_or(f64::NAN);
            if run.levels[f] > 0 {
                hi.push(y)
            } else {
                lo.push(y)
            }
        }
        let contrast = hi.iter().sum::<f64>() / 6.0 - lo.iter().sum::<f64>() / 6.0;
        let e = table.get(Term::main(f)).map_or(f64::NAN, |e| e.effect);
        assert!((e - contrast).abs() < 1e-9, "factor {f}: {e} vs {contrast}");
    }
    assert!(
        r.warnings_of(&[WarningKind::Effects])
            .any(|w| w.contains("partially aliased with two-factor interactions")),
        "{:?}",
        r.warnings
    );
    // The summary names the design for what it is.
    let input = crate::export::summary_input(&p, &[&r], &crate::export::BuildOptions::default());
    assert_eq!(input.design.screening_runs, Some(12));
}

#[test]
fn the_fold_over_is_offered_and_clears_the_main_effects() {
    let p = screening_study();
    let r = Report::for_response(&p, 0, 0);
    let options = crate::report::next_runs(&p, Some(&r));
    let fold = options
        .iter()
        .find(|o| o.key() == "fold_full")
        .unwrap_or_else(|| panic!("a full fold-over is offered: {options:?}"));
    assert_eq!(fold.runs_added(), 12);
    let mut q = p.clone();
    if let Err(e) = q.apply(Edit::AddFollowUp(fold.follow_up.clone())) {
        panic!("{e}");
    }
    assert_eq!(q.runs.len(), 24);
    assert_eq!(q.runs.iter().filter(|r| r.block == 2).count(), 12);
    // Every typed value is kept with its run.
    for old in &p.runs {
        let kept = q
            .runs
            .iter()
            .find(|n| n.levels == old.levels && n.block == 1)
            .unwrap_or_else(|| panic!("run {} kept", old.std_order));
        assert_eq!(kept.values, old.values);
        assert_eq!(
            kept.run_order, old.run_order,
            "the first block keeps its order"
        );
    }
    // Fill the mirror runs from the same formula: main effects only, none partially aliased now.
    for r in q.runs.iter_mut().filter(|r| r.block == 2) {
        let a = f64::from(r.levels[0]);
        let c = f64::from(r.levels[2]);
        r.values[0] = Cell::new(format!("{}", 50.0 + 5.0 * a - 3.0 * c + 2.0 * a * c));
        r.status = RunStatus::Done;
    }
    let r = Report::for_response(&q, 0, 0);
    let table = r.effects.as_ref().unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(table.effects.len(), 7);
    assert!(
        !r.warnings
            .iter()
            .any(|w| w.text.contains("partially aliased")),
        "{:?}",
        r.warnings
    );
}
