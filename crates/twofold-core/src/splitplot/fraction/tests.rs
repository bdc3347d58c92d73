use super::*;
use crate::alias::word_length_pattern;
use crate::splitplot::{Stratum, stratum_of, whole_plots_of};
use crate::test_support::all_subsets;
use std::time::Duration;

fn budget() -> SearchBudget {
    SearchBudget::new(Duration::from_secs(30))
}

/// Whether `design` is a split plot with the factors `hard` in `w` whole plots: its runs have
/// `w` distinct settings of `hard`, and every other factor changes inside the whole plots. Read
/// from the runs themselves, not from the column structure the search uses.
fn is_split_plot(design: &FractionalDesign, hard: &[usize], w: usize) -> bool {
    let rows = design.coded_runs();
    let wp = whole_plots_of(&rows, hard);
    let plots = wp.iter().copied().max().map_or(0, |m| m + 1);
    plots == w
        && (0..design.factor_count())
            .filter(|f| !hard.contains(f))
            .all(|f| stratum_of(Term::main(f), &rows, &wp) == Stratum::Subplot)
}

/// The smallest word-length pattern of every regular fraction of `k` factors in 2^q runs that is
/// a split plot for some set of `k1` hard-to-change factors in `w` whole plots: every choice of
/// generator columns, every choice of the hard-to-change factors, checked on the runs.
fn listed_minimum(k: usize, q: usize, k1: usize, w: usize) -> Option<Vec<usize>> {
    let columns: Vec<u32> = (1u32..1 << q).filter(|m| m.count_ones() >= 2).collect();
    let mut best: Option<Vec<usize>> = None;
    all_subsets(columns.len(), k - q, |idx| {
        let generators = idx
            .iter()
            .enumerate()
            .map(|(j, &i)| Generator {
                factor: q + j,
                word: SignedTerm::plus(Term::from_bits(columns[i])),
            })
            .collect();
        let Ok(design) = FractionalDesign::with_generators(k, generators) else {
            return;
        };
        let a = word_length_pattern(&design);
        if best.as_ref().is_some_and(|b| a >= *b) {
            return;
        }
        let mut any = false;
        all_subsets(k, k1, |hard| any = any || is_split_plot(&design, hard, w));
        if any {
            best = Some(a);
        }
    });
    best
}

#[test]
fn search_agrees_with_listing_every_fraction_and_every_choice_of_hard_factors() {
    // Two routes to the same minimum: the structured search, and every regular fraction with
    // every set of hard-to-change factors checked on its runs (common practice, no source).
    for (k, q) in [
        (4usize, 3usize),
        (5, 3),
        (5, 4),
        (6, 4),
        (7, 4),
        (6, 5),
        (8, 5),
    ] {
        for k1 in 1..k {
            for w in whole_plot_choices(k1, k - k1, 1 << q) {
                let hard: Vec<usize> = (0..k1).collect();
                let found = split_plot_fraction(k, &hard, 1 << q, Some(w), &budget())
                    .unwrap_or_else(|e| panic!("k={k} q={q} k1={k1} w={w}: {e}"));
                let listed = listed_minimum(k, q, k1, w);
                assert_eq!(
                    Some(found.word_length_pattern.clone()),
                    listed,
                    "k={k} runs={} hard={k1} whole plots={w}",
                    1 << q
                );
                assert!(found.proven_minimum_aberration);
                assert!(is_split_plot(&found.design, &hard, w), "structure");
                assert_eq!(
                    word_length_pattern(&found.design),
                    found.word_length_pattern
                );
            }
        }
    }
}

#[test]
fn hard_factors_anywhere_in_the_list_keep_their_whole_plots() {
    // C and E hard to change in a 2^(6−2): four whole plots of four runs.
    let out = split_plot_fraction(6, &[2, 4], 16, None, &budget()).unwrap();
    assert_eq!(out.whole_plots, 4);
    assert!(is_split_plot(&out.design, &[2, 4], 4));
    // The unrestricted minimum-aberration 2^(6−2) has pattern (0, 3): resolution IV; keeping
    // C and E in four whole plots costs nothing here (by the listing test's route).
    assert_eq!(
        out.word_length_pattern,
        listed_minimum(6, 4, 2, 4).unwrap_or_default()
    );
}

#[test]
fn fewer_whole_plots_can_cost_resolution() {
    // 2^(4−1) with A, B, C hard to change. The minimum-aberration fraction I = ABCD has eight
    // distinct settings of A, B, C — a whole plot per run, no split plot at all. With four whole
    // plots the only split plots set C = ±AB: I = ABC, resolution III (worked here by hand:
    // three hard factors in a two-dimensional whole-plot space need a word among them).
    assert_eq!(whole_plot_choices(3, 1, 8), vec![4]);
    let out = split_plot_fraction(4, &[0, 1, 2], 8, None, &budget()).unwrap();
    assert_eq!(out.whole_plots, 4);
    assert_eq!(out.word_length_pattern, vec![1, 0]);
}

#[test]
fn impossible_requests_say_what_is_possible() {
    // One hard factor cannot make four whole plots; every factor hard is no split plot.
    let e = split_plot_fraction(5, &[0], 16, Some(4), &budget());
    match e {
        Err(SplitPlotFractionError::WholePlots { possible, .. }) => assert_eq!(possible, "2"),
        other => panic!("{other:?}"),
    }
    assert_eq!(
        split_plot_fraction(3, &[0, 1, 2], 4, None, &budget()),
        Err(SplitPlotFractionError::Strata)
    );
}

#[test]
fn an_exhausted_budget_is_reported_as_unproven() {
    let out = split_plot_fraction(
        20,
        &[0, 1, 2],
        64,
        Some(8),
        &SearchBudget::new(Duration::from_millis(1)),
    )
    .unwrap();
    assert!(!out.proven_minimum_aberration);
    assert!(is_split_plot(&out.design, &[0, 1, 2], 8));
}
