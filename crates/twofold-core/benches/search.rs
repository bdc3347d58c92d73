//! Speed of the minimum-aberration search over a grid of run sizes and factor counts.
//!
//! Each case is run once before it is timed, and its outcome (proven or not, nodes visited,
//! the first entries of the word-length pattern) is printed, so the timings can be read
//! together with what the search achieved. Cases the exact search cannot finish in a few seconds
//! run under a one-second budget and are marked "budget" in their name: their time is the
//! budget, not a search time.
//!
//! Run with `cargo bench -p twofold-core --bench search`.

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::time::Duration;
use twofold_core::search::{SearchBudget, minimum_aberration};

/// Run sizes and factor counts timed; `true` marks a case run under the short budget.
const GRID: &[(usize, &[(usize, bool)])] = &[
    (
        16,
        &[
            (5, false),
            (7, false),
            (9, false),
            (11, false),
            (13, false),
            (15, false),
        ],
    ),
    (
        32,
        &[
            (6, false),
            (8, false),
            (10, false),
            (12, false),
            (14, false),
            (16, false),
            (17, false),
            (18, false),
            (20, false),
        ],
    ),
    (
        64,
        &[
            (7, false),
            (9, false),
            (11, false),
            (13, false),
            (15, false),
            (17, false),
            (20, false),
        ],
    ),
    (
        128,
        &[
            (8, false),
            (10, false),
            (12, false),
            (14, false),
            (15, false),
            (16, false),
            (17, false),
            (18, true),
            (20, true),
        ],
    ),
];

fn search(c: &mut Criterion) {
    let exact = SearchBudget::new(Duration::from_secs(600));
    let short = SearchBudget::new(Duration::from_secs(1));
    for &(runs, cases) in GRID {
        let mut group = c.benchmark_group(format!("minimum_aberration/{runs}_runs"));
        group.sample_size(10);
        group.warm_up_time(Duration::from_millis(300));
        group.measurement_time(Duration::from_secs(2));
        for &(k, budgeted) in cases {
            let budget = if budgeted { short } else { exact };
            match minimum_aberration(k, runs, &budget) {
                Ok(out) => {
                    let shown = out.word_length_pattern.len().min(4);
                    eprintln!(
                        "{runs} runs, {k} factors: proven {}, {} nodes, pattern starts {:?}",
                        out.proven_minimum_aberration,
                        out.nodes_explored,
                        &out.word_length_pattern[..shown]
                    );
                }
                Err(e) => {
                    eprintln!("{runs} runs, {k} factors: {e}");
                    continue;
                }
            }
            let id = if budgeted {
                BenchmarkId::new("budget_1s", k)
            } else {
                BenchmarkId::from_parameter(k)
            };
            group.bench_with_input(id, &k, |b, &k| {
                b.iter(|| minimum_aberration(black_box(k), runs, &budget).ok());
            });
        }
        group.finish();
    }
}

criterion_group!(benches, search);
criterion_main!(benches);
