//! The quadratic fit of a face-centred central composite design in two blocks against
//! statsmodels and numpy (`tests/fixtures/make_quadratic_fixture.py`, the script that wrote
//! `statsmodels_quadratic.json`).

use twofold_core::composite::{SurfaceKind, fit_quadratic};
use twofold_core::prec::{LIBRARY_REL, close_rel};

const FIXTURE: &str = include_str!("../../../tests/fixtures/statsmodels_quadratic.json");

fn numbers(v: &serde_json::Value) -> Vec<f64> {
    let Some(list) = v.as_array() else {
        panic!("not an array: {v}");
    };
    list.iter()
        .map(|x| x.as_f64().unwrap_or_else(|| panic!("not a number: {x}")))
        .collect()
}

#[test]
fn the_quadratic_fit_agrees_with_statsmodels() {
    let f: serde_json::Value = serde_json::from_str(FIXTURE).unwrap();
    let rows: Vec<Vec<f64>> = f["rows"].as_array().unwrap().iter().map(numbers).collect();
    let blocks: Vec<u32> = numbers(&f["blocks"]).iter().map(|&b| b as u32).collect();
    let y = numbers(&f["y"]);
    let fit = fit_quadratic(&rows, &blocks, &y).unwrap();
    let close = |a: f64, b: f64, what: &str| {
        assert!(
            close_rel(a, b, LIBRARY_REL),
            "{what}: ours {a}, statsmodels {b}"
        );
    };
    let expected = f["coefficients"].as_array().unwrap();
    assert_eq!(fit.coefficients.len(), expected.len());
    for e in expected {
        let label = e["term"].as_str().unwrap();
        let ours = fit
            .coefficients
            .iter()
            .find(|c| c.term.label() == label)
            .unwrap_or_else(|| panic!("no term {label}"));
        close(ours.coefficient, e["coefficient"].as_f64().unwrap(), label);
        close(ours.se.unwrap(), e["se"].as_f64().unwrap(), label);
        close(ours.t.unwrap(), e["t"].as_f64().unwrap(), label);
        close(ours.p.unwrap(), e["p"].as_f64().unwrap(), label);
    }
    close(fit.residual_ss, f["residual_ss"].as_f64().unwrap(), "SSE");
    assert_eq!(fit.residual_df as u64, f["residual_df"].as_u64().unwrap());
    close(fit.r_squared, f["r_squared"].as_f64().unwrap(), "R²");
    close(
        fit.adj_r_squared.unwrap(),
        f["adj_r_squared"].as_f64().unwrap(),
        "adjusted R²",
    );
    let lof = fit.lack_of_fit.as_ref().unwrap();
    close(
        lof.pure_error_ss,
        f["pure_error_ss"].as_f64().unwrap(),
        "SS pe",
    );
    assert_eq!(
        lof.pure_error_df as u64,
        f["pure_error_df"].as_u64().unwrap()
    );
    assert_eq!(lof.df as u64, f["lack_of_fit_df"].as_u64().unwrap());
    close(lof.ss, f["lack_of_fit_ss"].as_f64().unwrap(), "SS lof");
    close(lof.f, f["lack_of_fit_f"].as_f64().unwrap(), "F lof");
    close(
        lof.p.unwrap(),
        f["lack_of_fit_p"].as_f64().unwrap(),
        "p lof",
    );
    let s = fit.stationary.as_ref().unwrap();
    for (a, b) in s.x.iter().zip(numbers(&f["stationary"])) {
        close(*a, b, "x_s");
    }
    close(
        s.predicted,
        f["stationary_predicted"].as_f64().unwrap(),
        "ŷ_s",
    );
    for (a, b) in fit
        .canonical
        .eigenvalues
        .iter()
        .zip(numbers(&f["eigenvalues"]))
    {
        close(*a, b, "eigenvalue");
    }
    for (ours, theirs) in fit
        .canonical
        .eigenvectors
        .iter()
        .zip(f["eigenvectors"].as_array().unwrap())
    {
        for (a, b) in ours.iter().zip(numbers(theirs)) {
            close(*a, b, "eigenvector");
        }
    }
    // Every eigenvalue in the fixture is negative: a maximum.
    assert_eq!(fit.canonical.kind, SurfaceKind::Maximum);
}
