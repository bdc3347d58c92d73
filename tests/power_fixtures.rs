//! Power of a design and the smallest detectable effect against scipy's noncentral t
//! (`fixtures/make_power_fixtures.py` wrote `fixtures/scipy_power.json`).

use serde_json::Value;
use twofold_core::power::{PowerSpec, noncentral_t_cdf};

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
