//! Published worked examples: effects, alias chains read from typed-in columns, Lenth's method,
//! half-normal positions, and effects when runs are missing or blocked.
//!
//! Tolerances: a published value printed to `d` decimals is matched to half a unit in the `d`-th
//! place (`twofold_core::prec::close_to_places`); two computations by this program that must
//! agree are compared to `twofold_core::prec::LIBRARY_REL` relative or tighter.

use crate::util::assert_close;
use twofold_core::columns::{AliasStructure, term_value};
use twofold_core::data::Observations;
use twofold_core::effects::{
    EffectMethod, EffectOptions, EffectTable, estimate_effects, estimate_effects_with,
    yates_effects,
};
use twofold_core::halfnormal::half_normal;
use twofold_core::lenth::{Significance, lenth_effects};
use twofold_core::prec::{LIBRARY_REL, close_rel};
use twofold_core::term::Term;

/// Half a unit in the third decimal, for values printed to three decimals.
const PRINTED_3: f64 = 0.0005;
/// Half a unit in the second decimal.
const PRINTED_2: f64 = 0.005;

fn t(label: &str) -> Term {
    Term::parse(label, 25).expect("valid term label")
}

/// Coded rows of a 2^k full factorial in standard (Yates) order, first factor fastest. Written out
/// here rather than taken from the design engine so the published examples do not lean on the code
/// they check.
fn full(k: usize) -> Vec<Vec<f64>> {
    (0..1usize << k)
        .map(|i| {
            (0..k)
                .map(|f| if i >> f & 1 == 1 { 1.0 } else { -1.0 })
                .collect()
        })
        .collect()
}

fn observations(levels: Vec<Vec<f64>>, y: &[Option<f64>], blocks: Vec<u32>) -> Observations {
    let k = levels[0].len();
    Observations::new(k, levels, blocks, y.to_vec(), vec![]).expect("valid table")
}

fn complete(y: &[f64]) -> Vec<Option<f64>> {
    y.iter().copied().map(Some).collect()
}

fn effect(table: &EffectTable, label: &str) -> f64 {
    table
        .get(t(label))
        .unwrap_or_else(|| panic!("no effect for {label}"))
        .effect
}

/// Montgomery, *Design and Analysis of Experiments*, Example 6-2 (filtration rate, unreplicated
/// 2^4), responses in standard order.
const FILTRATION: [f64; 16] = [
    45.0, 71.0, 48.0, 65.0, 68.0, 60.0, 80.0, 65.0, 43.0, 100.0, 45.0, 104.0, 75.0, 86.0, 70.0,
    96.0,
];

/// Same source, the fifteen published effects.
const FILTRATION_EFFECTS: [(&str, f64); 15] = [
    ("A", 21.625),
    ("B", 3.125),
    ("C", 9.875),
    ("D", 14.625),
    ("AB", 0.125),
    ("AC", -18.125),
    ("AD", 16.625),
    ("BC", 2.375),
    ("BD", -0.375),
    ("CD", -1.125),
    ("ABC", 1.875),
    ("ABD", 4.125),
    ("ACD", -1.625),
    ("BCD", -2.625),
    ("ABCD", 1.375),
];

#[test]
fn filtration_rate_effects_match_montgomery_example_6_2() {
    let table =
        estimate_effects(&observations(full(4), &complete(&FILTRATION), vec![])).expect("effects");
    assert_eq!(table.method, EffectMethod::FastTransform);
    assert_eq!(table.effects.len(), 15);
    for (label, value) in FILTRATION_EFFECTS {
        assert_close(effect(&table, label), value, PRINTED_3, label);
    }
    // Same source: total SS 5730.9375, the sum of N·effect²/4 over the fifteen effects.
    let ss: f64 = table
        .effects
        .iter()
        .map(|e| 16.0 * e.effect * e.effect / 4.0)
        .sum();
    assert_close(ss, 5730.9375, 0.00005, "total SS");
}

#[test]
fn filtration_rate_lenth_margins_match_montgomery_example_6_2() {
    let table =
        estimate_effects(&observations(full(4), &complete(&FILTRATION), vec![])).expect("effects");
    let (l, flags) = lenth_effects(&table).expect("lenth");
    // Montgomery, Example 6-2: m = 15, s0 = 3.9375, PSE = 2.625, ME 6.74778, SME 13.69896
    // (exact values in REFERENCES, five decimals).
    assert_eq!(l.m, 15);
    assert_close(l.s0, 3.9375, 0.00005, "s0");
    assert_close(l.pse, 2.625, PRINTED_3, "PSE");
    assert_close(l.df, 5.0, 1e-12, "d");
    assert_close(l.me, 6.74778, 0.000005, "ME");
    assert_close(l.sme, 13.69896, 0.000005, "SME");
    let beyond = |s: Significance| -> Vec<String> {
        let mut v: Vec<String> = flags
            .iter()
            .filter(|f| f.significance == s)
            .map(|f| f.term.label())
            .collect();
        v.sort();
        v
    };
    // Same source: A, AC, AD and D beyond SME; C beyond ME only.
    assert_eq!(beyond(Significance::BeyondSme), ["A", "AC", "AD", "D"]);
    assert_eq!(beyond(Significance::BeyondMe), ["C"]);
}

#[test]
fn filtration_rate_half_normal_positions() {
    let table =
        estimate_effects(&observations(full(4), &complete(&FILTRATION), vec![])).expect("effects");
    let points = half_normal(&table.effects);
    // Positions Φ⁻¹(0.5 + 0.5·(i − 0.5)/15) computed with scipy:
    //   [norm.ppf(0.5 + 0.5*(i - 0.5)/15) for i in range(1, 16)]
    // smallest |effect| AB (0.125) first, largest A (21.625) last.
    let expected = [
        0.041789, 0.125661, 0.210428, 0.296738, 0.38532, 0.47704, 0.572968, 0.67449, 0.7835,
        0.902735, 1.036433, 1.191816, 1.382994, 1.644854, 2.128045,
    ];
    for (p, q) in points.iter().zip(expected) {
        assert_close(p.quantile, q, 0.0000005, &p.term.label());
    }
    assert_eq!(points[0].term, t("AB"));
    assert_eq!(points[14].term, t("A"));
    let order: Vec<String> = points
        .iter()
        .rev()
        .take(5)
        .map(|p| p.term.label())
        .collect();
    assert_eq!(order, ["A", "AC", "AD", "D", "C"]);
}

/// Montgomery, Example 8-2 (integrated-circuit yield, 2^(5-1) with E = ABCD), typed in as a bare
/// coded table: the generator is not given, only the E column.
fn ic_yield_levels() -> Vec<Vec<f64>> {
    full(4)
        .into_iter()
        .map(|mut row| {
            let e = term_value(&row, t("ABCD"));
            row.push(e);
            row
        })
        .collect()
}

const IC_YIELD: [f64; 16] = [
    8.0, 9.0, 34.0, 52.0, 16.0, 22.0, 45.0, 60.0, 6.0, 10.0, 30.0, 50.0, 15.0, 21.0, 44.0, 63.0,
];

#[test]
fn ic_yield_alias_chains_are_read_from_the_typed_in_columns() {
    let aliasing = AliasStructure::from_levels(&ic_yield_levels(), 5, 5);
    // Montgomery, Example 8-2: defining relation I = ABCDE, so each main effect is aliased with
    // a four-factor interaction and each two-factor interaction with a three-factor one.
    let words: Vec<String> = aliasing
        .defining_words()
        .iter()
        .map(ToString::to_string)
        .collect();
    assert_eq!(words, ["ABCDE"]);
    assert!(aliasing.is_regular());
    let labels: Vec<String> = aliasing.chains().iter().map(|c| c.label()).collect();
    assert_eq!(labels.len(), 15);
    for expected in ["A = BCDE", "E = ABCD", "AB = CDE", "DE = ABC"] {
        assert!(
            labels.contains(&expected.to_string()),
            "{expected} in {labels:?}"
        );
    }
}

#[test]
fn ic_yield_effects_match_montgomery_example_8_2() {
    let table = estimate_effects(&observations(
        ic_yield_levels(),
        &complete(&IC_YIELD),
        vec![],
    ))
    .expect("effects");
    assert_eq!(table.method, EffectMethod::FastTransform);
    assert_eq!(table.effects.len(), 15);
    // Same source: A 11.125, B 33.875, C 10.875, AB 6.875.
    for (label, value) in [("A", 11.125), ("B", 33.875), ("C", 10.875), ("AB", 6.875)] {
        assert_close(effect(&table, label), value, PRINTED_3, label);
    }
    // Same source: SS A 495.0625, B 4590.0625, C 473.0625, AB 189.0625, each N·effect²/4.
    for (label, ss) in [
        ("A", 495.0625),
        ("B", 4590.0625),
        ("C", 473.0625),
        ("AB", 189.0625),
    ] {
        let e = effect(&table, label);
        assert_close(16.0 * e * e / 4.0, ss, 0.00005, label);
    }
    // An alias member carries the chain's estimate: CDE is aliased with AB (I = +ABCDE).
    assert_eq!(table.effect_of(t("CDE")), Some(effect(&table, "AB")));
    let ab = table.get(t("AB")).expect("AB");
    assert_eq!(ab.label(), "AB = CDE");
}

#[test]
fn fill_height_replicated_effects_match_montgomery_example_6_1() {
    // Montgomery, Example 6-1 (fill height deviation, 2^3, two replicates).
    let rep1 = [-3.0, 0.0, -1.0, 2.0, -1.0, 2.0, 1.0, 6.0];
    let rep2 = [-1.0, 1.0, 0.0, 3.0, 0.0, 1.0, 1.0, 5.0];
    let mut levels = full(3);
    levels.extend(full(3));
    let y: Vec<f64> = rep1.iter().chain(&rep2).copied().collect();
    let o = observations(levels, &complete(&y), vec![]);
    let table = estimate_effects(&o).expect("effects");
    assert_eq!(table.method, EffectMethod::FastTransform);
    // Same source: A 3.00, B 2.25, C 1.75, AB 0.75, AC 0.25, BC 0.50, ABC 0.50.
    for (label, value) in [
        ("A", 3.00),
        ("B", 2.25),
        ("C", 1.75),
        ("AB", 0.75),
        ("AC", 0.25),
        ("BC", 0.50),
        ("ABC", 0.50),
    ] {
        assert_close(effect(&table, label), value, PRINTED_2, label);
    }
    // Two routes that must agree on complete data.
    let ls = estimate_effects_with(
        &o,
        &EffectOptions {
            force_least_squares: true,
            ..EffectOptions::default()
        },
    )
    .expect("least squares");
    assert_eq!(ls.method, EffectMethod::LeastSquares);
    for (a, b) in table.effects.iter().zip(&ls.effects) {
        assert!(close_rel(a.effect, b.effect, LIBRARY_REL), "{}", a.term);
    }
}

#[test]
fn pilot_plant_effects_match_box_hunter_hunter() {
    // Box, Hunter & Hunter, *Statistics for Experimenters* (2nd ed. 2005), pilot plant 2^3
    // (temperature T = A, concentration C = B, catalyst K = C). Data and effects from memory:
    // y = 60, 72, 54, 68, 52, 83, 45, 80; T 23.0, C −5.0, K 1.5, TC 1.5, TK 10.0, CK 0.0,
    // TCK 0.5.
    let y = [60.0, 72.0, 54.0, 68.0, 52.0, 83.0, 45.0, 80.0];
    let table = estimate_effects(&observations(full(3), &complete(&y), vec![])).expect("effects");
    for (label, value) in [
        ("A", 23.0),
        ("B", -5.0),
        ("C", 1.5),
        ("AB", 1.5),
        ("AC", 10.0),
        ("BC", 0.0),
        ("ABC", 0.5),
    ] {
        assert_close(effect(&table, label), value, 0.05, label);
    }
    // Yates' algorithm on the plain response vector gives the same numbers.
    let yates = yates_effects(&y).expect("power of two");
    for e in &table.effects {
        assert!(
            close_rel(yates[&e.term], e.effect, LIBRARY_REL),
            "{}",
            e.term
        );
    }
}

#[test]
fn centre_points_leave_the_effects_of_montgomery_example_6_6_alone() {
    // Montgomery, Example 6-6: corners 39.3, 40.9, 40.0, 41.5 and five centre points. Effects
    // from the corners by hand (same source prints A 1.55, B 0.65, AB −0.05; from memory).
    let mut levels = full(2);
    let mut y = complete(&[39.3, 40.9, 40.0, 41.5]);
    for c in [40.3, 40.5, 40.7, 40.2, 40.6] {
        levels.push(vec![0.0, 0.0]);
        y.push(Some(c));
    }
    let table = estimate_effects(&observations(levels, &y, vec![])).expect("effects");
    assert_eq!(table.centre_runs, 5);
    assert_eq!(table.factorial_runs, 4);
    assert_eq!(table.method, EffectMethod::FastTransform);
    assert_close(effect(&table, "A"), 1.55, PRINTED_2, "A");
    assert_close(effect(&table, "B"), 0.65, PRINTED_2, "B");
    assert_close(effect(&table, "AB"), -0.05, PRINTED_2, "AB");
}

#[test]
fn one_missing_run_of_an_unreplicated_design_loses_the_highest_interaction() {
    // Run 6 (a, c at +1) of Montgomery's Example 6-2 lost. With fifteen runs and sixteen
    // parameters, the chain last in trade order (ABCD) is reported, not estimated, and the other
    // effects are those of the complete design with the missing value set so that the ABCD
    // contrast is zero (the classical missing-value estimate for unreplicated two-level designs,
    // Draper & Stoneman 1964, Biometrics 20; from memory) — an independent route.
    let mut y = complete(&FILTRATION);
    y[5] = None;
    let table = estimate_effects(&observations(full(4), &y, vec![])).expect("effects");
    assert_eq!(table.method, EffectMethod::LeastSquares);
    assert_eq!(table.not_estimable, vec![t("ABCD")]);
    assert_eq!(table.effects.len(), 14);

    let levels = full(4);
    let sign6 = term_value(&levels[5], t("ABCD"));
    let others: f64 = (0..16)
        .filter(|&r| r != 5)
        .map(|r| term_value(&levels[r], t("ABCD")) * FILTRATION[r])
        .sum();
    let mut filled = FILTRATION;
    filled[5] = -others / sign6;
    let yates = yates_effects(&filled).expect("power of two");
    assert!(yates[&t("ABCD")].abs() < 1e-9);
    for e in &table.effects {
        assert!(
            close_rel(yates[&e.term], e.effect, LIBRARY_REL),
            "{}",
            e.term
        );
    }
}

#[test]
fn missing_run_of_a_replicated_design_gives_cell_mean_effects() {
    // Montgomery, Example 6-1 with the second replicate of run 4 (ab) missing. With every cell
    // still present the full model fits the cell means exactly, so least squares must equal
    // Yates' algorithm on the (unequally replicated) cell means: an independent route.
    let rep1 = [-3.0, 0.0, -1.0, 2.0, -1.0, 2.0, 1.0, 6.0];
    let rep2 = [-1.0, 1.0, 0.0, 3.0, 0.0, 1.0, 1.0, 5.0];
    let mut levels = full(3);
    levels.extend(full(3));
    let mut y: Vec<Option<f64>> = rep1.iter().chain(&rep2).copied().map(Some).collect();
    y[8 + 3] = None;
    let table = estimate_effects(&observations(levels, &y, vec![])).expect("effects");
    assert_eq!(table.method, EffectMethod::LeastSquares);
    assert!(table.not_estimable.is_empty());
    let means: Vec<f64> = (0..8)
        .map(|i| {
            if i == 3 {
                rep1[3]
            } else {
                (rep1[i] + rep2[i]) / 2.0
            }
        })
        .collect();
    let yates = yates_effects(&means).expect("power of two");
    for e in &table.effects {
        assert!(
            close_rel(yates[&e.term], e.effect, LIBRARY_REL),
            "{}",
            e.term
        );
    }
}

#[test]
fn losing_half_of_a_full_factorial_reports_the_aliased_chains() {
    // The four runs of a 2^3 with ABC = −1 missing leave the half fraction I = ABC, in which
    // A = BC, B = AC, C = AB (Montgomery, chapter 8, the one-half fraction of the 2^3; common
    // knowledge of the trade): the interactions are no longer estimable.
    let levels = full(3);
    let y: Vec<Option<f64>> = levels
        .iter()
        .enumerate()
        .map(|(i, r)| (term_value(r, t("ABC")) > 0.0).then_some(10.0 + i as f64))
        .collect();
    let table = estimate_effects(&observations(levels, &y, vec![])).expect("effects");
    let kept: Vec<String> = table.effects.iter().map(|e| e.term.label()).collect();
    assert_eq!(kept, ["A", "B", "C"]);
    assert_eq!(
        table.not_estimable,
        vec![t("AB"), t("AC"), t("BC"), t("ABC")]
    );
}

#[test]
fn blocked_filtration_rate_confounds_abcd_only() {
    // Montgomery, Example 7-2 (from memory): the Example 6-2 runs in two blocks with ABCD
    // confounded, one block's results lowered by 20. Every effect but ABCD is unchanged; ABCD is
    // confounded with blocks and not estimated.
    let levels = full(4);
    let blocks: Vec<u32> = levels
        .iter()
        .map(|r| if term_value(r, t("ABCD")) > 0.0 { 2 } else { 1 })
        .collect();
    let y: Vec<Option<f64>> = FILTRATION
        .iter()
        .zip(&blocks)
        .map(|(v, b)| Some(if *b == 1 { v - 20.0 } else { *v }))
        .collect();
    let table = estimate_effects(&observations(levels, &y, blocks)).expect("effects");
    // Complete and blocked by confounding: the blocks span the ABCD column, so the other
    // effects come from the transform of the runs.
    assert_eq!(table.method, EffectMethod::FastTransform);
    assert_eq!(table.confounded_with_blocks, vec![t("ABCD")]);
    assert_eq!(table.effects.len(), 14);
    for (label, value) in FILTRATION_EFFECTS.iter().take(14) {
        assert_close(effect(&table, label), *value, PRINTED_3, label);
    }
}
