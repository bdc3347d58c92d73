//! Semifolds and runs added to separate interactions against numpy
//! (`fixtures/make_followup_fixtures.py` wrote `fixtures/numpy_followup.json`): the model of the
//! full fold-over, rank, variance inflation and D-efficiency of the combined runs, and the
//! largest |XᵀX| over every choice of the added runs (brute force).

use serde_json::Value;
use twofold_core::augment::separate_interactions;
use twofold_core::design::FractionalDesign;
use twofold_core::foldover::FoldKind;
use twofold_core::prec::{LIBRARY_REL, close_rel};
use twofold_core::semifold::{SemiFold, semifold};
use twofold_core::term::Term;

const FIXTURE: &str = include_str!("fixtures/numpy_followup.json");

fn fixture() -> Value {
    match serde_json::from_str(FIXTURE) {
        Ok(v) => v,
        Err(e) => panic!("the fixture reads as JSON: {e}"),
    }
}

fn design() -> FractionalDesign {
    match FractionalDesign::from_text(6, Some(16), "E=ABC, F=BCD") {
        Ok(d) => d,
        Err(e) => panic!("the fraction is valid: {e}"),
    }
}

fn int(v: &Value, key: &str) -> i64 {
    match v[key].as_i64() {
        Some(x) => x,
        None => panic!("fixture lacks {key}: {v}"),
    }
}

#[test]
fn semifolds_estimate_the_full_fold_over_model_as_numpy_computes() {
    let f = fixture();
    let Some(cases) = f["semifold"].as_array() else {
        panic!("no semifold cases");
    };
    assert_eq!(cases.len(), 4);
    for c in cases {
        let spec = SemiFold {
            fold: FoldKind::Factor(int(c, "fold") as usize),
            keep: int(c, "keep") as usize,
            level: int(c, "level") as i8,
        };
        let s = match semifold(&design(), spec) {
            Ok(s) => s,
            Err(e) => panic!("{}: {e}", spec.label()),
        };
        let e = &s.estimability;
        let labels: Vec<String> = e.terms.iter().map(|t| t.term.label()).collect();
        let want: Vec<String> = c["model"]
            .as_array()
            .into_iter()
            .flatten()
            .filter_map(|v| v.as_str().map(String::from))
            .collect();
        assert_eq!(labels, want, "{}", spec.label());
        assert_eq!(e.rank as i64, int(c, "rank"));
        assert_eq!(e.parameters as i64, int(c, "parameters"));
        let vif: Vec<f64> = c["vif"]
            .as_array()
            .into_iter()
            .flatten()
            .filter_map(Value::as_f64)
            .collect();
        assert_eq!(vif.len(), e.terms.len());
        for (t, v) in e.terms.iter().zip(&vif) {
            let ours = t.variance_inflation.unwrap_or(f64::NAN);
            assert!(
                close_rel(ours, *v, LIBRARY_REL),
                "{} {}: {ours} vs numpy {v}",
                spec.label(),
                t.term.label()
            );
        }
        let d = c["d_efficiency"].as_f64().unwrap_or(f64::NAN);
        let ours = e.d_efficiency.unwrap_or(f64::NAN);
        assert!(close_rel(ours, d, LIBRARY_REL), "{ours} vs numpy {d}");
    }
}

#[test]
fn the_runs_added_to_separate_ae_and_bc_reach_the_brute_force_best() {
    let f = fixture();
    let c = &f["separate"];
    let best = c["best_log_det"].as_f64().unwrap_or(f64::NAN);
    let named: Vec<Term> = ["AE", "BC"]
        .iter()
        .filter_map(|t| Term::parse(t, 6).ok())
        .collect();
    let rows = design().coded_runs();
    let a = match separate_interactions(&rows, &[1; 16], 6, &named, 0) {
        Ok(a) => a,
        Err(e) => panic!("{e}"),
    };
    assert_eq!(a.added_runs.len() as i64, int(c, "added"));
    // Not below the best of the 45,760 choices, and (a check of the check) not above it.
    assert!(
        (a.log_det - best).abs() <= 1e-9 * best.abs(),
        "ours {} vs numpy's best {best}",
        a.log_det
    );
}
