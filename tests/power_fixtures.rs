//! Power of a design and the smallest detectable effect against scipy's noncentral t
//! (`fixtures/make_power_fixtures.py` wrote `fixtures/scipy_power.json`), and replicates against
//! Cohen's published sample sizes for two means (a replicated one-factor two-level design).

use serde_json::Value;
use twofold_core::power::{PowerSpec, main_effects_error_df, noncentral_t_cdf, replicates_needed};

const POWER: &str = include_str!("fixtures/scipy_power.json");

/// Agreement with scipy: the noncentral t is integrated numerically here and by Boost's series in
/// scipy; both are good to far better than this.
const REL: f64 = 1e-7;

fn num(v: &Value, key: &str) -> f64 {
    match v.get(key).and_then(Value::as_f64) {
        Some(x) => x,
        None => panic!("fixture lacks {key}: {v}"),
    }
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= REL * b.abs().max(1e-3)
}

fn fixture() -> Value {
    match serde_json::from_str(POWER) {
        Ok(v) => v,
        Err(e) => panic!("the fixture reads as JSON: {e}"),
    }
}

#[test]
fn the_noncentral_t_distribution_function_agrees_with_scipy() {
    let f = fixture();
    let Some(cases) = f["nct_cdf"].as_array() else {
        panic!("no nct_cdf cases");
    };
    assert!(cases.len() >= 5);
    for c in cases {
        let ours = noncentral_t_cdf(num(c, "t"), num(c, "df"), num(c, "nc"));
        let theirs = num(c, "cdf");
        assert!(close(ours, theirs), "{c}: ours {ours}");
    }
}

#[test]
fn power_and_detectable_effects_agree_with_scipy() {
    let f = fixture();
    let Some(cases) = f["power"].as_array() else {
        panic!("no power cases");
    };
    for c in cases {
        let spec = PowerSpec {
            sigma: num(c, "sigma"),
            alpha: num(c, "alpha"),
            runs: num(c, "runs") as usize,
            error_df: num(c, "error_df") as usize,
        };
        let power = spec.power(num(c, "effect")).unwrap();
        assert!(close(power, num(c, "power")), "{c}: power {power}");
        for (p, key) in [(0.8, "detectable_80"), (0.9, "detectable_90")] {
            let d = spec.detectable_effect(p).unwrap();
            assert!(close(d, num(c, key)), "{c}: {key} {d}");
        }
    }
}

/// One factor at two levels, replicated `r` times: the two-sample comparison of means, `2r` runs
/// and `2r − 2` error degrees of freedom (the mean and the one effect).
fn one_factor(r: usize) -> PowerSpec {
    PowerSpec {
        sigma: 1.0,
        alpha: 0.05,
        runs: 2 * r,
        error_df: main_effects_error_df(2 * r, 1, 1),
    }
}

#[test]
fn replicates_of_a_one_factor_design_agree_with_cohens_two_sample_table() {
    // A replicated 2^1 design is the two-sample t test of two means, so its replicates for power
    // 0.80 at two-sided α = 0.05 are Cohen's sample sizes per group for the standardised
    // difference d (effect / σ). Source: Cohen, J. (1988), Statistical Power Analysis for the
    // Behavioral Sciences, 2nd ed., chapter 2 (the t test for means), the sample-size table for
    // power 0.80, two-tailed α = 0.05 — read from two reproductions of it that agree on these
    // rows (medicalalgorithms.com, "Use of Cohen's effect size index for two samples with
    // independent means", citing Cohen 1988 pp. 28–39; MRC CBU statistics wiki, FAQ "dunp");
    // the book itself was not at hand. Cohen computed his sizes with an approximation, so they
    // may differ from the exact noncentral-t answer by one run per group.
    let table = [
        (0.2, 393),
        (0.3, 175),
        (0.4, 100),
        (0.5, 64),
        (0.6, 45),
        (0.8, 26),
        (1.0, 17),
    ];
    for (d, cohen) in table {
        let ours = replicates_needed(d, 0.8, 2000, one_factor)
            .unwrap()
            .unwrap_or_else(|| panic!("d = {d}: no count up to 2000"));
        assert!(
            ours.abs_diff(cohen) <= 1,
            "d = {d}: {ours} replicates, Cohen {cohen}"
        );
        // At Cohen's size the power is 0.80 to within the rounding of his approximation.
        let p = one_factor(cohen).power(d).unwrap();
        assert!((p - 0.8).abs() < 0.01, "d = {d}, n = {cohen}: power {p}");
    }
}
