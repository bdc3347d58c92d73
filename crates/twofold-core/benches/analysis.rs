//! Speed of `estimate_effects` on large layouts with complete, nearly empty and partly missing
//! responses, unblocked and blocked.
//!
//! Each case is run once before it is timed and its route and chain counts are printed, so the
//! timings can be read together with what was estimated.
//!
//! Run with `cargo bench -p twofold-core --bench analysis`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::time::Duration;
use twofold_core::data::{DataError, Observations};
use twofold_core::effects::estimate_effects;

/// Rows of a 2^k full factorial in standard order (first factor fastest).
fn full(k: usize) -> Vec<Vec<f64>> {
    (0..1usize << k)
        .map(|i| {
            (0..k)
                .map(|f| if i >> f & 1 == 1 { 1.0 } else { -1.0 })
                .collect()
        })
        .collect()
}

/// A deterministic, irregular response for run `i`.
fn value(i: usize) -> f64 {
    ((i * 7919 + 13) % 1009) as f64 * 0.1 - 50.0
}

/// Whether run `i` keeps its value when about `percent` % of the runs are missing (a fixed
/// multiplicative hash, so the missing runs are scattered).
fn kept(i: usize, percent: usize) -> bool {
    (i.wrapping_mul(2_654_435_761) >> 7) % 100 >= percent
}

fn cases() -> Vec<(&'static str, Result<Observations, DataError>)> {
    let complete = {
        let y = (0..4096).map(|i| Some(value(i))).collect();
        Observations::new(12, full(12), vec![], y, vec![])
    };
    let five_values = {
        let y = (0..4096)
            .map(|i| [3, 100, 777, 2048, 4000].contains(&i).then(|| value(i)))
            .collect();
        Observations::new(12, full(12), vec![], y, vec![])
    };
    let tenth_missing = {
        let y = (0..4096).map(|i| kept(i, 10).then(|| value(i))).collect();
        Observations::new(12, full(12), vec![], y, vec![])
    };
    let blocked = {
        // Four blocks by ABCD and EFGH, about 10 % of the runs missing.
        let levels = full(8);
        let blocks = levels
            .iter()
            .map(|r| {
                let abcd = r[0] * r[1] * r[2] * r[3] > 0.0;
                let efgh = r[4] * r[5] * r[6] * r[7] > 0.0;
                1 + u32::from(abcd) + 2 * u32::from(efgh)
            })
            .collect();
        let y = (0..256).map(|i| kept(i, 10).then(|| value(i))).collect();
        Observations::new(8, levels, blocks, y, vec![])
    };
    vec![
        ("2^12 complete", complete),
        ("2^12 with 5 values", five_values),
        ("2^12 with 10% missing", tenth_missing),
        ("2^8 in 4 blocks with 10% missing", blocked),
    ]
}

fn bench_effects(c: &mut Criterion) {
    let mut group = c.benchmark_group("estimate_effects");
    group.sample_size(10);
    group.measurement_time(Duration::from_secs(5));
    for (name, obs) in cases() {
        let obs = match obs {
            Ok(obs) => obs,
            Err(e) => {
                eprintln!("{name}: not timed, the table was refused: {e}");
                continue;
            }
        };
        let table = match estimate_effects(&obs) {
            Ok(table) => table,
            Err(e) => {
                eprintln!("{name}: not timed, no effects: {e}");
                continue;
            }
        };
        println!(
            "{name}: {:?}, {} runs used, {} effects, {} not estimable, {} confounded with blocks",
            table.method,
            table.factorial_runs,
            table.effects.len(),
            table.not_estimable.len(),
            table.confounded_with_blocks.len()
        );
        group.bench_function(name, |b| b.iter(|| estimate_effects(black_box(&obs))));
    }
    group.finish();
}

criterion_group!(benches, bench_effects);
criterion_main!(benches);
