//! Speed of the minimum-aberration search over a grid of run sizes and factor counts.
//!
//! First a table: every factor count from q + 1 (the smallest fraction of N = 2^q runs) to 20
//! for 16, 32, 64 and 128 runs, and 256-run cases, each searched once under the default budget
//! ([`SearchBudget::default`]) with its wall-clock time, whether it was proven to be of minimum
//! aberration, the nodes visited and the start of the word-length pattern. The goal it
//! measures: every case of up to 128 runs proven within one second.
//!
//! Then criterion timings of a smaller grid. Each case is run once before it is timed, and cases
//! the exact search cannot finish in a few seconds run under a one-second budget and are marked
//! "budget" in their name: their time is the budget, not a search time.
//!
//! Run with `cargo bench -p twofold-core --bench search` (the table alone:
//! `SEARCH_TABLE_ONLY=1 cargo bench -p twofold-core --bench search`).

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::time::{Duration, Instant};
use twofold_core::search::{SearchBudget, minimum_aberration};

/// Largest factor count in the table.
const TABLE_MAX_FACTORS: usize = 20;

/// Run sizes of the table, each with every factor count from q + 1 to 20.
const TABLE_RUNS: &[usize] = &[16, 32, 64, 128, 256];

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
    (256, &[(12, false), (16, false), (17, false), (20, true)]),
];

/// Prints the table of (N, k, seconds, proven) under the default budget.
fn print_table() {
    let budget = SearchBudget::default();
    eprintln!(
        "minimum aberration under the default budget ({} s), {} threads",
        budget.time.as_secs_f64(),
        std::thread::available_parallelism().map_or(1, |n| n.get())
    );
    eprintln!(
        "{:>5} {:>3} {:>9} {:>7} {:>10}  pattern starts",
        "N", "k", "seconds", "proven", "nodes"
    );
    let mut slow = Vec::new();
    for &runs in TABLE_RUNS {
        let q = runs.trailing_zeros() as usize;
        for k in q + 1..=TABLE_MAX_FACTORS.min(runs - 1) {
            let start = Instant::now();
            let found = minimum_aberration(k, runs, &budget);
            let seconds = start.elapsed().as_secs_f64();
            match found {
                Ok(out) => {
                    let shown = out.word_length_pattern.len().min(4);
                    eprintln!(
                        "{runs:>5} {k:>3} {seconds:>9.3} {:>7} {:>10}  {:?}",
                        out.proven_minimum_aberration,
                        out.nodes_explored,
                        &out.word_length_pattern[..shown]
                    );
                    if runs <= 128 && (!out.proven_minimum_aberration || seconds > 1.0) {
                        slow.push((runs, k));
                    }
                }
                Err(e) => eprintln!("{runs:>5} {k:>3}  {e}"),
            }
        }
    }
    if slow.is_empty() {
        eprintln!("every case of up to 128 runs proven within 1 s");
    } else {
        eprintln!("cases of up to 128 runs not proven within 1 s: {slow:?}");
    }
}

fn search(c: &mut Criterion) {
    print_table();
    if std::env::var_os("SEARCH_TABLE_ONLY").is_some() {
        return;
    }
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
