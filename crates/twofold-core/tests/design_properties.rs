//! Properties every generated design must have, over random generator sets (proptest).
//!
//! These are facts of the construction (common practice, no source): a regular two-level
//! fraction has balanced, pairwise orthogonal main-effect columns; the product of the columns of
//! any defining word is the constant column of its sign; run order is a permutation of standard
//! order; the resolution is the length of the shortest word.

use proptest::prelude::*;
use twofold_core::alias::{defining_relation, resolution};
use twofold_core::columns::term_value;
use twofold_core::design::{FractionalDesign, Generator};
use twofold_core::plan::{Blocking, PlanSpec, build_plan};
use twofold_core::term::{SignedTerm, Term};

/// A random valid fraction: q basic factors, p generated ones with random words of ≥ 2 basic
/// letters and random signs; invalid draws (short products) are filtered out.
fn fraction() -> impl Strategy<Value = FractionalDesign> {
    (2usize..=6, 0usize..=4)
        .prop_flat_map(|(q, p)| {
            let words = proptest::collection::vec((1u32..(1 << q), any::<bool>()), p);
            (Just(q), Just(p), words)
        })
        .prop_filter_map("generators must give a valid fraction", |(q, p, words)| {
            let k = q + p;
            let gens: Vec<Generator> = words
                .iter()
                .enumerate()
                .map(|(i, &(bits, negative))| Generator {
                    factor: q + i,
                    word: SignedTerm {
                        term: Term::from_bits(bits),
                        negative,
                    },
                })
                .collect();
            FractionalDesign::with_generators(k, gens).ok()
        })
}

proptest! {
    #[test]
    fn factor_columns_are_balanced(d in fraction()) {
        let runs = d.coded_runs();
        for f in 0..d.factor_count() {
            let sum: i32 = runs.iter().map(|r| i32::from(r[f])).sum();
            prop_assert_eq!(sum, 0);
        }
    }

    #[test]
    fn main_effect_columns_are_orthogonal(d in fraction()) {
        let runs = d.coded_runs();
        for a in 0..d.factor_count() {
            for b in a + 1..d.factor_count() {
                let dot: i32 = runs.iter().map(|r| i32::from(r[a]) * i32::from(r[b])).sum();
                prop_assert_eq!(dot, 0, "factors {} and {}", a, b);
            }
        }
    }

    #[test]
    fn products_obey_the_defining_relation(d in fraction()) {
        let runs = d.coded_runs();
        for w in defining_relation(&d) {
            for r in &runs {
                let row: Vec<f64> = r.iter().map(|&v| f64::from(v)).collect();
                prop_assert_eq!(term_value(&row, w.term), w.sign(), "word {}", w);
            }
        }
    }

    #[test]
    fn resolution_is_the_shortest_word(d in fraction()) {
        let shortest = defining_relation(&d).iter().map(|w| w.term.order() as u32).min();
        prop_assert_eq!(resolution(&d), shortest);
    }

    #[test]
    fn run_order_is_a_permutation_of_standard_order(
        d in fraction(), seed in any::<u64>(), centres in 0usize..3, reps in 1usize..3
    ) {
        let mut spec = PlanSpec::new(d, seed);
        spec.centre_points = centres;
        spec.replicates = reps;
        if spec.design.base_runs() >= 8 {
            spec.blocking = Blocking::Count(2);
        }
        let Ok(plan) = build_plan(&spec) else {
            // Blocking can be impossible for some small fractions; that is reported, not a bug.
            return Ok(());
        };
        let mut std: Vec<usize> = plan.runs.iter().map(|r| r.std_order).collect();
        std.sort_unstable();
        prop_assert_eq!(std, (1..=plan.total_runs()).collect::<Vec<_>>());
        let order: Vec<usize> = plan.runs.iter().map(|r| r.run_order).collect();
        prop_assert_eq!(order, (1..=plan.total_runs()).collect::<Vec<_>>());
    }
}
