//! Published fractional designs: given the published generators, Twofold's defining relation,
//! resolution and word-length pattern must match the published ones.
//!
//! Sources:
//! - [M] Montgomery, D. C. (2017), *Design and Analysis of Experiments*, 9th ed., Wiley, table of
//!   selected 2^(k−p) fractional factorial designs and the
//!   surrounding text of §8.4. Rows marked "verified" were read in a copy; word-length patterns
//!   follow from the printed generators.
//! - [BHH] Box, G. E. P., Hunter, J. S. & Hunter, W. G. (2005), *Statistics for Experimenters*,
//!   2nd ed., Wiley, ch. 6, table of two-level fractional designs. Marked "from memory" where no
//!   copy was at hand.

use twofold_core::alias::{alias_report, defining_relation};
use twofold_core::design::FractionalDesign;

struct Row {
    k: usize,
    runs: usize,
    generators: &'static str,
    resolution: u32,
    /// `None` where the source prints only the resolution.
    wlp: Option<&'static [usize]>,
    source: &'static str,
}

const ROWS: &[Row] = &[
    Row {
        k: 5,
        runs: 8,
        generators: "D=AB, E=AC",
        resolution: 3,
        wlp: Some(&[2, 1, 0]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 6,
        runs: 16,
        generators: "E=ABC, F=BCD",
        resolution: 4,
        wlp: Some(&[0, 3, 0, 0]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 6,
        runs: 8,
        generators: "D=AB, E=AC, F=BC",
        resolution: 3,
        wlp: Some(&[4, 3, 0, 0]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 7,
        runs: 32,
        generators: "F=ABCD, G=ABDE",
        resolution: 4,
        wlp: Some(&[0, 1, 2, 0, 0]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 7,
        runs: 16,
        generators: "E=ABC, F=BCD, G=ACD",
        resolution: 4,
        wlp: Some(&[0, 7, 0, 0, 0]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 7,
        runs: 8,
        generators: "D=AB, E=AC, F=BC, G=ABC",
        resolution: 3,
        wlp: Some(&[7, 7, 0, 0, 1]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 8,
        runs: 64,
        generators: "G=ABCD, H=ABEF",
        resolution: 5,
        wlp: Some(&[0, 0, 2, 1, 0, 0]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 8,
        runs: 16,
        generators: "E=BCD, F=ACD, G=ABC, H=ABD",
        resolution: 4,
        wlp: Some(&[0, 14, 0, 0, 0, 1]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 9,
        runs: 128,
        generators: "H=ACDFG, J=BCEFG",
        resolution: 6,
        wlp: Some(&[0, 0, 0, 3, 0, 0, 0]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 10,
        runs: 32,
        generators: "F=ABCD, G=ABCE, H=ABDE, J=ACDE, K=BCDE",
        resolution: 4,
        wlp: Some(&[0, 10, 16, 0, 0, 5, 0, 0]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 11,
        runs: 32,
        generators: "F=ABC, G=BCD, H=CDE, J=ACD, K=ADE, L=BDE",
        resolution: 4,
        wlp: Some(&[0, 25, 0, 27, 0, 10, 0, 1, 0]),
        source: "[M] table of selected designs, verified",
    },
    Row {
        k: 7,
        runs: 32,
        generators: "F=ABC, G=BCD",
        resolution: 4,
        wlp: Some(&[0, 3, 0, 0, 0]),
        source: "[M] §8.4, three 2^(7-2) designs compared, verified",
    },
    Row {
        k: 7,
        runs: 32,
        generators: "F=ABC, G=ADE",
        resolution: 4,
        wlp: Some(&[0, 2, 0, 1, 0]),
        source: "[M] §8.4, three 2^(7-2) designs compared, verified",
    },
    Row {
        k: 6,
        runs: 16,
        generators: "E=ABC, F=ABCD",
        resolution: 3,
        wlp: Some(&[1, 1, 1, 0]),
        source: "[M] §8.4 counter-example (I=ABCE=ABCDF=DEF), verified",
    },
    Row {
        k: 3,
        runs: 4,
        generators: "C=AB",
        resolution: 3,
        wlp: Some(&[1]),
        source: "[M] table of selected designs, from memory",
    },
    Row {
        k: 4,
        runs: 8,
        generators: "D=ABC",
        resolution: 4,
        wlp: Some(&[0, 1]),
        source: "[M] table of selected designs and [BHH] ch. 6, from memory",
    },
    Row {
        k: 5,
        runs: 16,
        generators: "E=ABCD",
        resolution: 5,
        wlp: Some(&[0, 0, 1]),
        source: "[M] table of selected designs and Example 8-2, from memory",
    },
    Row {
        k: 6,
        runs: 32,
        generators: "F=ABCDE",
        resolution: 6,
        wlp: None,
        source: "[M] table of selected designs, from memory",
    },
    Row {
        k: 7,
        runs: 64,
        generators: "G=ABCDEF",
        resolution: 7,
        wlp: None,
        source: "[M] table of selected designs, from memory",
    },
    Row {
        k: 8,
        runs: 32,
        generators: "F=ABC, G=ABD, H=BCDE",
        resolution: 4,
        wlp: None,
        source: "[M] table of selected designs, from memory",
    },
    Row {
        k: 9,
        runs: 16,
        generators: "E=ABC, F=BCD, G=ACD, H=ABD, J=ABCD",
        resolution: 3,
        wlp: None,
        source: "[M] table of selected designs, from memory",
    },
];

#[test]
fn published_generators_give_the_published_resolution_and_pattern() {
    for row in ROWS {
        let d = FractionalDesign::from_text(row.k, Some(row.runs), row.generators)
            .unwrap_or_else(|e| panic!("{} ({}): {e}", row.generators, row.source));
        let r = alias_report(&d);
        assert_eq!(
            r.resolution,
            Some(row.resolution),
            "{} ({})",
            row.generators,
            row.source
        );
        if let Some(wlp) = row.wlp {
            assert_eq!(
                r.word_length_pattern, wlp,
                "{} ({})",
                row.generators, row.source
            );
        }
        assert_eq!(d.base_runs(), row.runs);
        assert_eq!(
            r.defining_relation.len(),
            (1 << d.generators().len()) - 1,
            "a 2^(k-p) design has 2^p - 1 defining words"
        );
    }
}

#[test]
fn counter_example_relation_is_as_printed() {
    // [M] §8.4, verified: E=ABC, F=ABCD gives I = ABCE = ABCDF = DEF.
    let d = FractionalDesign::from_text(6, Some(16), "E=ABC, F=ABCD").unwrap();
    let words: Vec<String> = defining_relation(&d)
        .iter()
        .map(|w| w.to_string())
        .collect();
    assert_eq!(words, ["DEF", "ABCE", "ABCDF"]);
}

#[test]
fn half_fraction_aliases_main_effects_with_four_factor_interactions() {
    // [M] Example 8-2, verified: with I = ABCDE, A = BCDE, AB = CDE; every 2FI is clear.
    let d = FractionalDesign::from_text(5, Some(16), "E=ABCD").unwrap();
    let r = alias_report(&d);
    let ab = r
        .aliases
        .iter()
        .find(|(t, _)| t.label() == "AB")
        .map(|(_, a)| a.iter().map(|x| x.to_string()).collect::<Vec<_>>())
        .unwrap();
    assert_eq!(ab, ["CDE"]);
    assert_eq!(r.clear_two_factor_interactions.len(), 10);
    assert_eq!(r.clear_main_effects.len(), 5);
}

#[test]
fn resolution_iv_sixteen_run_design_has_aliased_interaction_pairs() {
    // [M] §8.4, verified (the 2^(6-2) with E=ABC, F=BCD): AB = CE, AD = EF, and the chain
    // AE = BC = DF; main effects are aliased with three-factor interactions only.
    let d = FractionalDesign::from_text(6, Some(16), "E=ABC, F=BCD").unwrap();
    let r = alias_report(&d);
    let chain = |label: &str| {
        r.aliases
            .iter()
            .find(|(t, _)| t.label() == label)
            .map(|(_, a)| {
                a.iter()
                    .filter(|x| x.term.order() == 2)
                    .map(|x| x.to_string())
                    .collect::<Vec<_>>()
            })
            .unwrap()
    };
    assert_eq!(chain("AB"), ["CE"]);
    assert_eq!(chain("AD"), ["EF"]);
    assert_eq!(chain("AE"), ["BC", "DF"]);
    assert!(r.main_effects_aliased_with_interactions().is_empty());
}
