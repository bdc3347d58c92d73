//! Speed of "which settings to run" (`twofold best`): four responses, eight numeric factors.
//!
//! The project is invented here (illustrative data made by formulas, nothing measured): eight
//! numeric factors A..H in the 32-run fraction the program picks for 2^(8−3), one run each, and
//! four responses whose values follow main effects, a few two-factor interactions and a
//! deterministic wobble (see [`values`]). Each response has a goal (see [`goals`]) and its model
//! terms set, as an engineer would after reading the effects.
//!
//! Timed, for the plain project and for a variant where G and H are noise factors (σ = 1 coded)
//! and the spread of "Yield" is to be small:
//! - `command path`: the four reports built ([`Report::build`]) and [`decide`], what
//!   `twofold best` does between reading the file and printing;
//! - `decide`: [`decide`] alone on reports built beforehand;
//! - `grid 5^k`: the reference beside it, a brute-force grid of the same objective at 5 levels
//!   (−1, −0.5, 0, 0.5, 1) of every control factor, through the core's
//!   [`Problem::evaluate`] (390 625 points for 8 controls, 15 625 for 6).
//!
//! The target is the stated budget: `best` with 4 responses and 8 numeric factors well under a
//! second. Before timing, each case prints the models, the best overall desirability found by
//! the search and by the grid, so the timings can be read with what they found.
//!
//! The bench also writes both projects as files (to the system's temporary folder, names
//! printed) so the whole process can be timed: `hyperfine 'target/release/twofold best FILE'`.
//!
//! Run with `cargo bench -p twofold-study --bench decision`.

use std::hint::black_box;
use std::time::Duration;

use criterion::{Criterion, criterion_group, criterion_main};
use twofold_core::decision::{Problem, ResponseSpec};
use twofold_core::optimise::Coordinate;
use twofold_core::robust::Surface;
use twofold_study::project::{
    Cell, DesignSettings, Edit, Factor, GoalAim, Project, ResponseDef, ResponseGoal, RunStatus,
    save_project,
};
use twofold_study::report::{DecideOptions, Report, decide};

/// Factors of the invented project.
const FACTORS: usize = 8;
/// Runs of its fraction (2^(8−3)).
const RUNS: u32 = 32;
/// Levels per control factor of the reference grid.
const GRID_LEVELS: usize = 5;

/// The four responses at coded setting `x` (A..H) of the run in standard order `s`.
///
/// - Yield = 70 + 6A + 4B − 3C + 2D + 1.5E − F + 0.5G + 0.8H + 2.5AB − 1.5CE + 1.2AH + e1
/// - Cost = 40 + 3A + 2B + 1.5C − 2D + E + 0.5F − 0.7G + 0.4H + 1.2AE + e2
/// - Hardness = 50 + 2A − 3B + 2.5C + D − 1.5E + 0.6F + 0.9G − 0.5H − 1.8BE + 0.7DH + e3
/// - Haze = 12 − A + 0.5B + 0.8C + 1.5D − 0.4E + 2F − 1.2G + 0.3H + 0.9EG + e4
///
/// with the wobbles e1 = ((37s + 11) mod 17 − 8)/4, e2 = ((53s + 5) mod 13 − 6)/6,
/// e3 = ((29s + 3) mod 11 − 5)/5, e4 = ((41s + 7) mod 19 − 9)/12. The program's 2^(8−3)
/// fraction has F = ABCD, G = ABCE, H = ABDE (printed before timing), so AB, AE, AH and BE are
/// clear of other two-factor interactions, and CE (= FH), DH (= CG) and EG (= DF) are aliased
/// only with interactions no model holds: every fit reports no unestimable term.
fn values(x: &[f64], s: i64) -> [f64; 4] {
    let [a, b, c, d, e, f, g, h] = [x[0], x[1], x[2], x[3], x[4], x[5], x[6], x[7]];
    let wob = |p: i64, q: i64, m: i64, k: i64, div: f64| ((p * s + q) % m - k) as f64 / div;
    [
        70.0 + 6.0 * a + 4.0 * b - 3.0 * c + 2.0 * d + 1.5 * e - f
            + 0.5 * g
            + 0.8 * h
            + 2.5 * a * b
            - 1.5 * c * e
            + 1.2 * a * h
            + wob(37, 11, 17, 8, 4.0),
        40.0 + 3.0 * a + 2.0 * b + 1.5 * c - 2.0 * d + e + 0.5 * f - 0.7 * g
            + 0.4 * h
            + 1.2 * a * e
            + wob(53, 5, 13, 6, 6.0),
        50.0 + 2.0 * a - 3.0 * b + 2.5 * c + d - 1.5 * e + 0.6 * f + 0.9 * g
            - 0.5 * h
            - 1.8 * b * e
            + 0.7 * d * h
            + wob(29, 3, 11, 5, 5.0),
        12.0 - a + 0.5 * b + 0.8 * c + 1.5 * d - 0.4 * e + 2.0 * f - 1.2 * g
            + 0.3 * h
            + 0.9 * e * g
            + wob(41, 7, 19, 9, 12.0),
    ]
}

/// Each response's goal: Yield as large as possible, Cost as small as possible, Hardness near
/// 50, Haze as small as possible (importance 2).
fn goals() -> [ResponseGoal; 4] {
    let g = |aim, importance| ResponseGoal { aim, importance };
    [
        g(
            GoalAim::Maximise {
                low: 65.0,
                high: 85.0,
                shape: 1.0,
            },
            1.0,
        ),
        g(
            GoalAim::Minimise {
                low: 32.0,
                high: 45.0,
                shape: 1.0,
            },
            1.0,
        ),
        g(
            GoalAim::Target {
                low: 46.0,
                target: 50.0,
                high: 54.0,
                shape_below: 1.0,
                shape_above: 1.0,
            },
            1.0,
        ),
        g(
            GoalAim::Minimise {
                low: 8.0,
                high: 14.0,
                shape: 1.0,
            },
            2.0,
        ),
    ]
}

/// The invented project; with `noise`, G and H are noise factors (σ 1 coded) and the spread of
/// Yield should be at most 1.5.
fn project(noise: bool) -> Project {
    let mut p = Project::new(if noise {
        "Speed benchmark: 8 factors, 4 responses, 2 noise factors"
    } else {
        "Speed benchmark: 8 factors, 4 responses"
    });
    p.description = "ILLUSTRATIVE DATA, invented for a speed benchmark of choosing settings: \
        nothing here was measured. The values follow the formulas in \
        crates/twofold-study/benches/decision.rs."
        .to_string();
    let names: [&str; FACTORS] = [
        "Temperature",
        "Time",
        "Pressure",
        "Feed rate",
        "Catalyst",
        "Stirring",
        "Humidity",
        "Ambient",
    ];
    for (j, name) in names.iter().enumerate() {
        let low = 10.0 * (j + 1) as f64;
        p.factors.push(Factor::numeric(name, "", low, 2.0 * low));
    }
    for (name, unit) in [
        ("Yield", "%"),
        ("Cost", "€"),
        ("Hardness", "HV"),
        ("Haze", "%"),
    ] {
        p.responses.push(ResponseDef::new(name, unit));
    }
    let terms: [&[&str]; 4] = [
        &["A", "B", "C", "D", "E", "F", "G", "H", "AB", "CE", "AH"],
        &["A", "B", "C", "D", "E", "F", "G", "H", "AE"],
        &["A", "B", "C", "D", "E", "F", "G", "H", "BE", "DH"],
        &["A", "B", "C", "D", "E", "F", "G", "H", "EG"],
    ];
    for ((r, t), g) in p.responses.iter_mut().zip(terms).zip(goals()) {
        r.model.terms = t.iter().map(|s| s.to_string()).collect();
        r.goal = g;
    }
    p.design = DesignSettings {
        base_runs: Some(RUNS),
        seed: 20_261_205,
        ..DesignSettings::default()
    };
    p.apply(Edit::RegenerateRuns)
        .unwrap_or_else(|e| panic!("the fraction: {e}"));
    for run in &mut p.runs {
        let x: Vec<f64> = run.levels.iter().map(|&l| f64::from(l)).collect();
        let y = values(&x, i64::from(run.std_order));
        run.values = y.iter().map(|v| Cell::new(format!("{v:.2}"))).collect();
        run.status = RunStatus::Done;
    }
    if noise {
        p.factors[6].noise_sd = Some(1.0);
        p.factors[7].noise_sd = Some(1.0);
        p.responses[0].spread_goal = ResponseGoal {
            aim: GoalAim::Minimise {
                low: 0.5,
                high: 1.5,
                shape: 1.0,
            },
            importance: 1.0,
        };
    }
    p
}

/// Every response's report, as `twofold best` builds them.
fn reports(p: &Project) -> Vec<Report> {
    (0..p.responses.len())
        .map(|i| Report::build(p, 0, i, &p.responses[i].model))
        .collect()
}

/// The command's path from a loaded project to its decision; returns the best D.
fn command_path(p: &Project) -> f64 {
    let built = reports(p);
    let refs: Vec<&Report> = built.iter().collect();
    best_overall(&decide(p, &refs, &DecideOptions::default()))
}

fn best_overall(d: &twofold_study::report::Decision) -> f64 {
    d.best
        .as_ref()
        .ok()
        .and_then(|b| b.first())
        .map_or(f64::NAN, |c| c.overall)
}

/// The core's problem of the same decision, built as `decide` builds it.
fn core_problem(p: &Project, built: &[Report]) -> Problem {
    let noise: Vec<(usize, f64)> = p
        .factors
        .iter()
        .enumerate()
        .filter_map(|(i, f)| f.noise_sd.map(|sd| (i, sd)))
        .collect();
    let responses = p
        .responses
        .iter()
        .zip(built)
        .map(|(def, r)| {
            let fit = r
                .fit
                .as_ref()
                .unwrap_or_else(|e| panic!("“{}” has no model: {e}", def.name));
            ResponseSpec {
                name: def.name.clone(),
                surface: Surface::from_fit(fit),
                transform: r.transform,
                goal: def.goal.to_core(),
                spread_goal: if noise.is_empty() {
                    None
                } else {
                    def.spread_goal.to_core()
                },
            }
        })
        .collect();
    let coords = p
        .factors
        .iter()
        .map(|f| match f.noise_sd {
            Some(_) => Coordinate::Fixed(0.0),
            None => Coordinate::Continuous,
        })
        .collect();
    Problem {
        responses,
        coords,
        noise,
    }
}

/// The best overall desirability and its point on a grid of [`GRID_LEVELS`] levels of every
/// continuous coordinate (fixed ones at their value).
fn grid(problem: &Problem) -> (f64, Vec<f64>) {
    let levels: Vec<f64> = (0..GRID_LEVELS)
        .map(|i| -1.0 + 2.0 * i as f64 / (GRID_LEVELS - 1) as f64)
        .collect();
    let free: Vec<usize> = (0..problem.coords.len())
        .filter(|&j| problem.coords[j] == Coordinate::Continuous)
        .collect();
    let mut x: Vec<f64> = problem
        .coords
        .iter()
        .map(|c| match c {
            Coordinate::Fixed(v) => *v,
            _ => levels[0],
        })
        .collect();
    let mut index = vec![0usize; free.len()];
    let mut best = (f64::NEG_INFINITY, x.clone());
    loop {
        for (&j, &i) in free.iter().zip(&index) {
            x[j] = levels[i];
        }
        let d = problem.evaluate(&x).overall;
        if d > best.0 {
            best = (d, x.clone());
        }
        // Odometer over the free coordinates.
        let mut k = 0;
        while k < index.len() {
            index[k] += 1;
            if index[k] < GRID_LEVELS {
                break;
            }
            index[k] = 0;
            k += 1;
        }
        if k == index.len() {
            return best;
        }
    }
}

fn describe(label: &str, p: &Project, built: &[Report]) {
    println!("{label}: {} runs", p.runs.len());
    println!("  design generators: {:?}", p.design.generators);
    for r in built {
        match &r.fit {
            Ok(f) => println!(
                "  {}: {} terms, R² {:.4}, σ {:.3}, unestimable {:?}",
                r.response_name,
                f.coefficients.len(),
                f.r2.unwrap_or(f64::NAN),
                f.sigma.unwrap_or(f64::NAN),
                f.unestimable.len()
            ),
            Err(e) => println!("  {}: no model: {e}", r.response_name),
        }
    }
}

fn decision(c: &mut Criterion) {
    for noise in [false, true] {
        let label = if noise {
            "4_responses_8_factors_2_noise"
        } else {
            "4_responses_8_factors"
        };
        let p = project(noise);
        let built = reports(&p);
        let refs: Vec<&Report> = built.iter().collect();
        describe(label, &p, &built);
        let d = decide(&p, &refs, &DecideOptions::default());
        match &d.best {
            Ok(best) => {
                for (i, choice) in best.iter().enumerate() {
                    let coded: Vec<String> =
                        choice.coded.iter().map(|v| format!("{v:+.3}")).collect();
                    println!(
                        "  search #{}: D = {:.4} at [{}]",
                        i + 1,
                        choice.overall,
                        coded.join(", ")
                    );
                }
            }
            Err(why) => println!("  search: no settings: {why}"),
        }
        let problem = core_problem(&p, &built);
        let (grid_d, grid_x) = grid(&problem);
        let coded: Vec<String> = grid_x.iter().map(|v| format!("{v:+.1}")).collect();
        let free = problem
            .coords
            .iter()
            .filter(|c| **c == Coordinate::Continuous)
            .count();
        println!(
            "  grid {GRID_LEVELS}^{free} = {} points: best D = {grid_d:.4} at [{}]",
            GRID_LEVELS.pow(free as u32),
            coded.join(", ")
        );
        let file = std::env::temp_dir().join(format!("twofold-bench-{label}.ron"));
        match save_project(&file, &p) {
            Ok(()) => println!(
                "  project written to {} (time the whole process: hyperfine 'target/release/twofold best {}')",
                file.display(),
                file.display()
            ),
            Err(e) => println!("  project not written: {e}"),
        }

        let mut group = c.benchmark_group(format!("decision/{label}"));
        group.sample_size(10);
        group.warm_up_time(Duration::from_millis(500));
        group.measurement_time(Duration::from_secs(3));
        group.bench_function("command path (4 reports + decide)", |b| {
            b.iter(|| command_path(black_box(&p)));
        });
        group.bench_function("decide", |b| {
            b.iter(|| best_overall(&decide(black_box(&p), &refs, &DecideOptions::default())));
        });
        group.bench_function(format!("grid {GRID_LEVELS}^{free}"), |b| {
            b.iter(|| grid(black_box(&problem)).0);
        });
        group.finish();
    }
}

criterion_group!(benches, decision);
criterion_main!(benches);
