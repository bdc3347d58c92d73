use super::*;
use crate::desirability::Aim;
use crate::term::Term;

fn surface(intercept: f64, terms: &[(&str, f64)], k: usize) -> Surface {
    Surface {
        factor_count: k,
        intercept,
        terms: terms
            .iter()
            .map(|(l, b)| match Term::parse(l, k) {
                Ok(t) => (t, *b),
                Err(e) => panic!("{l}: {e}"),
            })
            .collect(),
    }
}

fn goal(aim: Aim, importance: f64) -> Option<Goal> {
    Some(Goal { aim, importance })
}

/// An invented problem: three numeric controls, one two-label control, two responses pulling
/// apart (the first wants A high, the second is hurt by it), a target on the second.
fn pulling_apart() -> Problem {
    let y1 = surface(
        70.0,
        &[("A", 8.0), ("B", 3.0), ("C", -2.0), ("D", 1.5), ("AB", 2.0)],
        4,
    );
    let y2 = surface(
        40.0,
        &[
            ("A", -5.0),
            ("B", 2.0),
            ("C", 4.0),
            ("AC", 3.0),
            ("BD", -1.0),
        ],
        4,
    );
    Problem {
        responses: vec![
            ResponseSpec {
                name: "Cure".into(),
                surface: y1,
                transform: Transform::None,
                goal: goal(
                    Aim::Maximise {
                        low: 60.0,
                        high: 85.0,
                        shape: 1.0,
                    },
                    1.0,
                ),
                spread_goal: None,
            },
            ResponseSpec {
                name: "Gloss".into(),
                surface: y2,
                transform: Transform::None,
                goal: goal(
                    Aim::Target {
                        low: 35.0,
                        target: 42.0,
                        high: 50.0,
                        shape_below: 1.0,
                        shape_above: 2.0,
                    },
                    2.0,
                ),
                spread_goal: None,
            },
        ],
        coords: vec![
            Coordinate::Continuous,
            Coordinate::Continuous,
            Coordinate::Continuous,
            Coordinate::TwoLevel,
        ],
        noise: vec![],
    }
}

/// The largest overall desirability on a grid of `n` steps per continuous factor, both levels of
/// a two-level one.
fn brute_force(p: &Problem, n: usize) -> (f64, Vec<f64>) {
    let mut best = (f64::NEG_INFINITY, Vec::new());
    let k = p.coords.len();
    let axis: Vec<Vec<f64>> = p
        .coords
        .iter()
        .map(|c| match c {
            Coordinate::Continuous => (0..n)
                .map(|i| -1.0 + 2.0 * i as f64 / (n - 1) as f64)
                .collect(),
            Coordinate::TwoLevel => vec![-1.0, 1.0],
            Coordinate::Fixed(v) => vec![*v],
        })
        .collect();
    let mut idx = vec![0usize; k];
    loop {
        let x: Vec<f64> = idx.iter().zip(&axis).map(|(&i, a)| a[i]).collect();
        let d = p.evaluate(&x).overall;
        if d > best.0 {
            best = (d, x);
        }
        let mut f = 0;
        loop {
            if f == k {
                return best;
            }
            idx[f] += 1;
            if idx[f] < axis[f].len() {
                break;
            }
            idx[f] = 0;
            f += 1;
        }
    }
}

#[test]
fn search_and_brute_force_grid_agree() {
    // Two methods that must agree: the search may only beat the grid, and by no more than the
    // grid's resolution allows.
    let p = pulling_apart();
    let found = match p.solve(&SearchOptions::default()) {
        Ok(f) => f,
        Err(e) => panic!("{e}"),
    };
    let (grid_best, grid_point) = brute_force(&p, 81);
    let ours = found[0].overall;
    assert!(ours >= grid_best - 1e-9, "search {ours} < grid {grid_best}");
    assert!(
        ours - grid_best < 0.01,
        "search {ours} far above grid {grid_best}"
    );
    for (a, b) in found[0].point.iter().zip(&grid_point) {
        assert!(
            (a - b).abs() < 0.06,
            "{:?} vs grid {grid_point:?}",
            found[0].point
        );
    }
    // Best first, each with its own numbers.
    for w in found.windows(2) {
        assert!(w[0].overall >= w[1].overall);
    }
    assert_eq!(found[0].responses.len(), 2);
    assert!(found[0].responses[0].desirability.is_some());
}

#[test]
fn spread_goal_moves_the_choice_to_the_flat_setting() {
    // y = 50 + 4A + 3C + 6AC, C noise (σ 1): σ_tr = |3 + 6A|, zero at A = −0.5 (by hand).
    // Maximising the mean alone goes to A = +1; adding "spread as small as possible" with a
    // limit of 2 forces |3 + 6A| < 2, i.e. A in (−5/6, −1/6).
    let s = surface(50.0, &[("A", 4.0), ("C", 3.0), ("AC", 6.0)], 3);
    let mut p = Problem {
        responses: vec![ResponseSpec {
            name: "Bond".into(),
            surface: s,
            transform: Transform::None,
            goal: goal(
                Aim::Maximise {
                    low: 40.0,
                    high: 60.0,
                    shape: 1.0,
                },
                1.0,
            ),
            spread_goal: None,
        }],
        coords: vec![
            Coordinate::Continuous,
            Coordinate::Continuous,
            Coordinate::Fixed(0.0),
        ],
        noise: vec![(2, 1.0)],
    };
    let plain = p.solve(&SearchOptions::default()).unwrap_or_default();
    assert_eq!(plain[0].point[0], 1.0);
    assert!((plain[0].responses[0].transmitted_sd.unwrap_or(0.0) - 9.0).abs() < 1e-9);
    p.responses[0].spread_goal = goal(
        Aim::Minimise {
            low: 0.0,
            high: 2.0,
            shape: 1.0,
        },
        1.0,
    );
    let robust = p.solve(&SearchOptions::default()).unwrap_or_default();
    let a = robust[0].point[0];
    assert!(a > -5.0 / 6.0 && a < -1.0 / 6.0, "A = {a}");
    // D = sqrt(((50 + 4A − 40)/20) · (1 − |3 + 6A|/2)); its maximum by calculus: for A > −0.5,
    // f(A) = (10 + 4A)(1 − (3 + 6A)/2)/20 = (10 + 4A)(−1 − 6A)/40 ... negative, so A < −0.5:
    // f(A) = (10 + 4A)(1 + (3 + 6A)/2)/20 = (10 + 4A)(5 + 6A)/40, increasing up to A = −0.5,
    // so the best is A = −0.5 with D = sqrt(8·2/40) = sqrt(0.4).
    assert!((a + 0.5).abs() < 1e-5, "A = {a}");
    assert!((robust[0].overall - 0.4f64.sqrt()).abs() < 1e-6);
}

#[test]
fn map_marks_cells_that_miss_a_limit() {
    let p = pulling_apart();
    let base = [0.0, 0.0, 0.0, 1.0];
    let m = match p.map(&base, 0, 2, 11) {
        Ok(m) => m,
        Err(e) => panic!("{e}"),
    };
    assert_eq!(m.cells.len(), 121);
    // At A = −1, C = −1 the cure is 70 − 8 + 2 + 1.5 = 65.5 (inside) and the gloss is
    // 40 + 5 − 4 + 3 − 1 = 43 (inside); at A = −1, C = +1 gloss = 40 + 5 + 4 − 3 − 1 = 45 inside.
    // At A = +1, C = +1: gloss 40 − 5 + 4 + 3 − 1 = 41 inside, cure 70 + 8 − 2 + 1.5 = 77.5.
    // At A = −1, B = 0, C = 0: cure 70 − 8 + 1.5 = 63.5; gloss 45 − 1 = 44.
    for cell in &m.cells {
        assert!(cell.overall >= 0.0);
        assert_eq!(cell.failing.is_empty(), cell.overall > 0.0);
    }
    assert!(p.map(&[0.0], 0, 1, 5).is_err());
}

#[test]
fn bad_goals_are_refused_before_searching() {
    let mut p = pulling_apart();
    p.responses[1].goal = goal(
        Aim::Target {
            low: 35.0,
            target: 55.0,
            high: 50.0,
            shape_below: 1.0,
            shape_above: 1.0,
        },
        1.0,
    );
    let e = p.solve(&SearchOptions::default()).unwrap_err();
    assert!(e.to_string().contains("Gloss"), "{e}");
    let mut none = pulling_apart();
    for r in &mut none.responses {
        r.goal = None;
    }
    assert_eq!(
        none.solve(&SearchOptions::default()).unwrap_err(),
        DecisionError::NoGoal
    );
}
