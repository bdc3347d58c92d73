use super::*;
use crate::alias::{alias_report, resolution, word_length_pattern};
use crate::search::column_search::permutations;

fn budget(secs: u64) -> SearchBudget {
    SearchBudget::new(Duration::from_secs(secs))
}

fn terms(text: &str, k: usize) -> Vec<Term> {
    parse_required(text, k).unwrap()
}

fn find(k: usize, text: &str, runs: Option<usize>) -> Result<RequiredOutcome, RequiredError> {
    design_keeping_clear(k, &terms(text, k), runs, &budget(60))
}

/// The smallest word-length pattern over every labelled 2^(k−p) fraction in 2^q runs that
/// keeps `required` clear, by listing them all: every choice of generated columns, and every
/// assignment of the k factor letters to the k columns, each built as a design whose
/// requirement is checked by its alias chains.
fn brute_force(k: usize, q: usize, requirements: &[Vec<Term>]) -> Vec<Option<Vec<usize>>> {
    let interactions: Vec<u32> = (1u32..1 << q).filter(|m| m.count_ones() >= 2).collect();
    let p = k - q;
    let mut best: Vec<Option<Vec<usize>>> = vec![None; requirements.len()];
    let perms = permutations(k);
    let mut idx: Vec<usize> = (0..p).collect();
    loop {
        let columns: Vec<u32> = idx.iter().map(|&i| interactions[i]).collect();
        for perm in &perms {
            // Column i (basic ones first) goes to factor perm[i].
            let letters = |bits: u32| {
                (0..q)
                    .filter(|j| bits >> j & 1 == 1)
                    .fold(0u32, |m, j| m | 1 << perm[j])
            };
            let generators: Vec<Generator> = columns
                .iter()
                .enumerate()
                .map(|(j, &c)| Generator {
                    factor: perm[q + j],
                    word: SignedTerm::plus(Term::from_bits(letters(c))),
                })
                .collect();
            let design = FractionalDesign::with_generators(k, generators).unwrap();
            let wlp = word_length_pattern(&design);
            for (r, required) in requirements.iter().enumerate() {
                if best[r].as_ref().is_none_or(|b| wlp < *b) && keeps_clear(&design, required) {
                    best[r] = Some(wlp.clone());
                }
            }
        }
        let Some(i) = (0..p).rev().find(|&i| idx[i] < interactions.len() - p + i) else {
            break;
        };
        idx[i] += 1;
        for j in i + 1..p {
            idx[j] = idx[j - 1] + 1;
        }
    }
    best
}

#[test]
fn search_agrees_with_listing_every_labelled_fraction() {
    // Two independent ways to the same answer: the search (clear graphs, embedding, orderly
    // generation) and listing every generator choice under every assignment of letters, checked
    // by alias chains. 6 factors in 16 runs: 55 column pairs × 720 assignments; 5 factors in 8
    // runs: 6 column pairs × 120 assignments.
    for (k, q, lists) in [
        (
            6usize,
            4usize,
            &[
                "AB",
                "AB,CD",
                "AB,AC",
                "AB,BC,CD",
                "AB,CD,EF",
                "AB,AC,AD",
                "AB,AC,BC",
                "AB,AC,AD,AE,AF",
                "AB,BC,CD,DE,EF",
                "AB,AC,AD,AE,AF,BC",
                "EF",
            ][..],
        ),
        (5, 3, &["AB", "AB,CD", "AB,AC"][..]),
        (4, 3, &["AB", "AB,AC", "AB,AC,AD", "AB,CD", "AB,BC,CD"][..]),
    ] {
        let requirements: Vec<Vec<Term>> = lists.iter().map(|t| terms(t, k)).collect();
        let expected = brute_force(k, q, &requirements);
        let mut found_some = false;
        let mut found_none = false;
        for (text, expected) in lists.iter().zip(expected) {
            match find(k, text, Some(1 << q)) {
                Ok(out) => {
                    assert_eq!(
                        Some(out.word_length_pattern.clone()),
                        expected,
                        "k={k} {text}"
                    );
                    assert!(out.proven_minimum_aberration, "k={k} {text}");
                    assert!(keeps_clear(&out.design, &out.required));
                    found_some = true;
                }
                Err(RequiredError::NoDesign { .. }) => {
                    assert_eq!(expected, None, "k={k} {text}");
                    found_none = true;
                }
                Err(e) => panic!("k={k} {text}: {e}"),
            }
        }
        if k == 6 {
            // The list must exercise both outcomes, or the comparison proves little.
            assert!(found_some && found_none);
        }
    }
}

#[test]
fn a_resolution_v_design_keeps_every_interaction_clear() {
    // Montgomery 2017, Example 8-2: the 2^(5-1) with E = ABCD has resolution V, so every
    // two-factor interaction is aliased only with three-factor ones. Any requirement on five
    // factors is met in 16 runs by that design. 8 runs are too few for any: 5 factors fill 5
    // of the 7 contrasts and, as counted in the test below, no pair is then alone on its own.
    let all = "AB,AC,AD,AE,BC,BD,BE,CD,CE,DE";
    for text in ["AB", "CE", "AB,CD", all] {
        let out = find(5, text, None).unwrap();
        assert_eq!(out.runs(), 16, "{text}");
        assert_eq!(out.word_length_pattern, vec![0, 0, 1], "{text}");
        assert_eq!(resolution(&out.design), Some(5));
        assert_eq!(out.smaller_runs_ruled_out, vec![8]);
        assert!(out.finished());
    }
}

#[test]
fn the_largest_fractions_with_a_clear_interaction() {
    // Counting, derived here (not from a source): for a contrast s outside the design, the
    // other columns of the 2^q factorial fall in N/2 − 1 pairs {x, x·s}. The interaction of
    // a pair is clear exactly when that pair is the only one of them wholly in the design, so
    // a design with a clear interaction takes one whole pair and at most one column from each
    // other pair: k ≤ N/2. Conversely one whole pair and one column of every other pair (s
    // left out) is such a design. So 8 factors in 16 runs can keep AB clear, 9 cannot.
    let eight = find(8, "AB", Some(16)).unwrap();
    assert!(keeps_clear(&eight.design, &eight.required));
    assert_eq!(eight.design.base_runs(), 16);
    let nine = find(9, "AB", Some(16)).unwrap_err();
    assert_eq!(
        nine.to_string(),
        "no 16-run design keeps AB clear of other two-factor interactions; 32 runs do"
    );
    // From memory (Chen & Hedayat 1998, *Journal of Statistical Planning and Inference* 75,
    // 147–158; also Wu & Hamada, *Experiments*, ch. 5): a resolution IV fraction in N runs has a
    // clear two-factor interaction only when k ≤ N/4 + 1. So the best 16-run design for six
    // factors with a clear AB has resolution III, while in 32 runs nine factors keep resolution
    // IV and ten do not.
    let six = find(6, "AB", Some(16)).unwrap();
    assert_eq!(resolution(&six.design), Some(3));
    let five = find(5, "AB", Some(16)).unwrap();
    assert_eq!(resolution(&five.design), Some(5));
    let nine = find(9, "AB", Some(32)).unwrap();
    assert_eq!(resolution(&nine.design), Some(4));
    let ten = find(10, "AB", Some(32)).unwrap();
    assert_eq!(resolution(&ten.design), Some(3));
    assert!(ten.proven_minimum_aberration);
}

#[test]
fn sixteen_factors_fit_thirty_two_runs_and_seventeen_do_not() {
    // The same counting bound k ≤ N/2 at N = 32, the case the search has most to rule out.
    let sixteen = find(16, "AB", Some(32)).unwrap();
    assert!(keeps_clear(&sixteen.design, &sixteen.required));
    let seventeen = find(17, "AB", None).unwrap();
    assert_eq!(seventeen.runs(), 64);
    assert_eq!(seventeen.smaller_runs_ruled_out, vec![32]);
    assert!(seventeen.smaller_runs_undecided.is_empty());
}

#[test]
fn the_minimum_aberration_design_is_kept_when_it_serves() {
    // Nothing can beat the unconstrained optimum: when it keeps the requirement clear it is the
    // answer, and otherwise the answer has more aberration.
    for (k, runs, text) in [
        (6, 32, "AB,CD,EF"),
        (7, 32, "AB"),
        (7, 16, "AB"),
        (8, 32, "AB,AC"),
        (6, 16, "AB"),
    ] {
        let free = minimum_aberration(k, runs, &budget(60)).unwrap();
        let out = find(k, text, Some(runs)).unwrap();
        assert!(out.word_length_pattern >= free.word_length_pattern, "k={k}");
        if keeps_clear(&free.design, &out.required) {
            assert_eq!(out.word_length_pattern, free.word_length_pattern, "k={k}");
        }
    }
}

#[test]
fn without_a_run_size_the_smallest_that_serves_is_chosen() {
    // 7 factors in 8 runs: every contrast carries a main effect, none is left for AB (the
    // counting bound k + 1 ≤ N − 1), so 16 runs are the least; the design there is the best
    // 16-run one with AB clear.
    let out = find(7, "AB", None).unwrap();
    assert_eq!(out.runs(), 16);
    assert_eq!(out.smaller_runs_ruled_out, vec![8]);
    let at_16 = find(7, "AB", Some(16)).unwrap();
    assert_eq!(out.word_length_pattern, at_16.word_length_pattern);
    // The full factorial is the last resort for few factors: 3 factors in 4 runs leave no
    // contrast for AB.
    let three = find(3, "AB,BC", None).unwrap();
    assert_eq!(three.runs(), 8);
    assert!(three.design.is_full());
}

#[test]
fn basic_factors_come_first_and_generators_are_products_of_them() {
    let out = find(8, "AB,CE", Some(32)).unwrap();
    assert_eq!(out.design.basic_factors(), &[0, 1, 2, 3, 4]);
    for g in out.design.generators() {
        assert!(g.word.term.order() >= 2 && g.word.term.span() <= 5, "{g}");
        assert!(!g.word.negative);
    }
    let report = alias_report(&out.design);
    for t in &out.required {
        assert!(report.clear_two_factor_interactions.contains(t), "{t}");
    }
}

#[test]
fn bad_requirements_are_rejected_with_their_reason() {
    let cases: &[(&str, usize, &str)] = &[
        (
            "AB,AQ",
            5,
            "required interaction `AQ`: `Q` in `AQ` is beyond the last factor `E`",
        ),
        (
            "ABC",
            5,
            "required interaction `ABC` is not a two-factor interaction (it has 3 letters)",
        ),
        (
            "A",
            5,
            "required interaction `A` is not a two-factor interaction (it has 1 letter)",
        ),
        (
            "A1",
            5,
            "required interaction `A1`: `1` in `A1` is not a factor letter (factors are A..Z without I)",
        ),
        (
            "AA",
            5,
            "required interaction `AA`: letter `A` appears twice in `AA`",
        ),
        (
            " , ",
            5,
            "no required interaction given (name them as `AB,CE`)",
        ),
    ];
    for (text, k, message) in cases {
        let err = parse_required(text, *k).unwrap_err();
        assert_eq!(err.to_string(), *message, "{text}");
    }
    assert_eq!(
        parse_required("ce; ab AB", 5).unwrap(),
        vec![terms("AB", 5)[0], terms("CE", 5)[0]]
    );
    assert!(matches!(
        design_keeping_clear(5, &terms("AB", 5), Some(12), &budget(1)),
        Err(RequiredError::Search(SearchError::Size(
            DesignError::RunsNotPowerOfTwo(12)
        )))
    ));
    // A term built in code past the factors is caught too.
    assert!(matches!(
        design_keeping_clear(4, &[Term::from_bits(0b10001)], None, &budget(1)),
        Err(RequiredError::BadTerm { .. })
    ));
}

#[test]
fn an_exhausted_budget_is_reported() {
    // With no time at all the 64-run search for 20 factors cannot finish: either no design is
    // found (undecided) or the one found is not proven.
    match find_with(20, "AB,CD", Some(64), Duration::ZERO) {
        Ok(out) => {
            assert!(!out.proven_minimum_aberration);
            assert!(keeps_clear(&out.design, &out.required));
        }
        Err(e) => assert!(
            matches!(e, RequiredError::Undecided { runs: 64, .. }),
            "{e}"
        ),
    }
}

fn find_with(
    k: usize,
    text: &str,
    runs: Option<usize>,
    time: Duration,
) -> Result<RequiredOutcome, RequiredError> {
    design_keeping_clear(k, &terms(text, k), runs, &SearchBudget::new(time))
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(40))]
    #[test]
    fn every_design_returned_keeps_its_requirement_clear(
        k in 4usize..=9,
        pairs in proptest::collection::vec((0usize..9, 0usize..9), 1..5),
    ) {
        let required: Vec<Term> = pairs
            .iter()
            .map(|&(a, b)| (a % k, b % k))
            .filter(|(a, b)| a != b)
            .map(|(a, b)| Term::main(a).times(Term::main(b)))
            .collect();
        proptest::prop_assume!(!required.is_empty());
        let out = design_keeping_clear(k, &required, None, &budget(20)).unwrap();
        // Checked from the defining relation, not from the search's clear graphs.
        proptest::prop_assert!(keeps_clear(&out.design, &required));
        let report = alias_report(&out.design);
        for t in &required {
            proptest::prop_assert!(report.clear_two_factor_interactions.contains(t));
        }
        proptest::prop_assert_eq!(&out.word_length_pattern, &report.word_length_pattern);
        proptest::prop_assert_eq!(out.design.factor_count(), k);
        // Every smaller size was ruled out, so the size is the least.
        let mut sizes = out.smaller_runs_ruled_out.clone();
        sizes.push(out.runs());
        let first = smallest_runs(k);
        let expected: Vec<usize> = (0..sizes.len()).map(|i| first << i).collect();
        proptest::prop_assert_eq!(sizes, expected);
        proptest::prop_assert!(out.finished());
    }
}

#[test]
fn isomorphism_pruning_loses_nothing_under_a_requirement() {
    // The same constrained search with every relabelling of the basic factors and with none,
    // and without the minimum-aberration design tried first, must reach the same answer
    // (including "none") in 32 runs, where the pruning does most.
    let mut some = 0;
    let mut none = 0;
    for (k, text) in [
        (8, "AB,CD"),
        (10, "AB,CD"),
        (10, "AB,AC,AD"),
        (11, "AB,AC,AD,AE"),
        (12, "AB,CD,EF,GH"),
        (12, "AB,AC,AD,AE"),
        (9, "AB,BC,CD,DE,EA"),
    ] {
        let required = terms(text, k);
        let run = |set, first| search_size_with(k, 5, &required, None, set, first);
        let every = run(RelabellingSet::Every, true);
        let plain = run(RelabellingSet::Nothing, false);
        assert!(every.finished && plain.finished);
        let pattern = |r: &SizeResult| {
            r.best
                .as_ref()
                .map(|points| pattern_of_columns(k, &points[5..]))
        };
        assert_eq!(pattern(&every), pattern(&plain), "k={k} {text}");
        if every.best.is_some() {
            some += 1;
        } else {
            none += 1;
        }
    }
    assert!(some > 0 && none > 0, "both outcomes are exercised");
}
