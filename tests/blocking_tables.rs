//! Published blocking arrangements for 2^k designs.
//!
//! Source: Montgomery, D. C. (2017), *Design and Analysis of Experiments*, 9th ed., Wiley, table
//! of suggested blocking arrangements for the 2^k factorial design,
//! verified. Each row gives the block generators and every effect confounded with blocks.
//!
//! Two checks per row: with the published generators Twofold reports exactly the published
//! confounded effects; and the automatic choice finds a scheme at least as good by its
//! criterion (fewest confounded main effects, then 2FIs, then 3FIs) — it may find a different
//! but equally good one, since many schemes tie.

use twofold_core::blocking::{choose_scheme, scheme_from_generators};
use twofold_core::design::FractionalDesign;
use twofold_core::term::Term;

const ROWS: &[(usize, usize, &str, &str)] = &[
    (3, 2, "ABC", "ABC"),
    (3, 4, "AB,AC", "AB,AC,BC"),
    (4, 2, "ABCD", "ABCD"),
    (4, 4, "ABC,ACD", "ABC,ACD,BD"),
    (5, 4, "ABC,CDE", "ABC,CDE,ABDE"),
    (5, 8, "ABE,BCE,CDE", "ABE,BCE,CDE,AC,ABCD,BD,ADE"),
    (6, 4, "ABCF,CDEF", "ABCF,CDEF,ABDE"),
];

fn terms(k: usize, s: &str) -> Vec<Term> {
    let mut v: Vec<Term> = s.split(',').map(|t| Term::parse(t, k).unwrap()).collect();
    v.sort();
    v
}

#[test]
fn published_block_generators_confound_the_published_effects() {
    for &(k, blocks, gens, confounded) in ROWS {
        let d = FractionalDesign::full(k).unwrap();
        let s = scheme_from_generators(&d, &terms(k, gens)).unwrap();
        assert_eq!(s.block_count(), blocks);
        assert_eq!(
            s.confounded,
            terms(k, confounded),
            "2^{k} in {blocks} blocks"
        );
    }
}

#[test]
fn automatic_blocking_is_at_least_as_good_as_the_published_scheme() {
    for &(k, blocks, gens, _) in ROWS {
        let d = FractionalDesign::full(k).unwrap();
        let published = scheme_from_generators(&d, &terms(k, gens)).unwrap();
        let chosen = choose_scheme(&d, blocks).unwrap();
        assert_eq!(chosen.confounded_by_order[0], 0, "no main effect in blocks");
        assert!(
            chosen.confounded_by_order <= published.confounded_by_order,
            "2^{k} in {blocks} blocks: chose {:?} ({:?}), published {:?}",
            chosen.confounded,
            chosen.confounded_by_order,
            published.confounded_by_order
        );
    }
}
