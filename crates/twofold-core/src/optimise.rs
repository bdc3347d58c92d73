//! Maximising a function over the coded factor box, with some coordinates restricted to −1/+1.
//!
//! # Method
//! A multi-start local search (common practice, no source):
//! 1. **Starts**: the centre, the corners (all of them up to [`ALL_CORNERS_UP_TO`] free
//!    coordinates, a seeded random sample beyond) and seeded random interior points.
//! 2. **Refinement** of the best few distinct starts: cycles of coordinate ascent, where a
//!    two-level coordinate tries its other level and a continuous one is searched on a grid of
//!    a window about the current value and then by golden-section search around the best grid
//!    point; each cycle
//!    ends with a Nelder–Mead simplex search (Nelder & Mead 1965, *Computer Journal* 7(4),
//!    308–313) over the continuous coordinates, clamped to the box, so that ridges not along an
//!    axis are followed. Cycles stop when they gain less than [`IMPROVEMENT`].
//! 3. The local maxima are sorted and the best *distinct* ones kept (settings that differ by more
//!    than a given coded distance in some coordinate).
//!
//! The objective may be flat in places (an overall desirability of 0 where a response is outside
//! its limits): callers give a score that still points towards better regions there.
//! Deterministic: the same problem and seed give the same answer.

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// Free coordinates up to which every corner is a start.
pub const ALL_CORNERS_UP_TO: usize = 8;
/// Smallest gain that keeps the refinement going.
pub const IMPROVEMENT: f64 = 1e-12;

/// What values a coordinate may take.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Coordinate {
    /// Anything in −1..+1 (a numeric factor inside its tested range).
    Continuous,
    /// −1 or +1 only (a factor with two named settings).
    TwoLevel,
    /// Held at this value (a noise factor at its centre, a factor the engineer fixed).
    Fixed(f64),
}

/// How hard to search.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SearchOptions {
    /// Random interior starts besides the centre and the corners.
    pub random_starts: usize,
    /// Largest number of corners used as starts when there are too many for all.
    pub corner_starts: usize,
    /// How many of the best starts are refined.
    pub refined: usize,
    /// How many distinct maxima to return.
    pub keep: usize,
    /// Two results are distinct when some coordinate differs by more than this (coded units).
    pub distinct: f64,
    /// Seed of the random starts.
    pub seed: u64,
}

impl Default for SearchOptions {
    fn default() -> Self {
        SearchOptions {
            random_starts: 64,
            corner_starts: 256,
            refined: 16,
            keep: 3,
            distinct: 0.1,
            seed: 1,
        }
    }
}

/// A local maximum.
#[derive(Debug, Clone, PartialEq)]
pub struct Found {
    /// The coded point.
    pub point: Vec<f64>,
    /// The objective there.
    pub score: f64,
}

/// The best distinct maxima of `f` over the box described by `coords`, best first (see the module
/// documentation). Empty only when `keep` is 0.
pub fn maximise<F: Fn(&[f64]) -> f64>(
    coords: &[Coordinate],
    f: F,
    options: &SearchOptions,
) -> Vec<Found> {
    let score = |x: &[f64]| {
        let v = f(x);
        if v.is_nan() { f64::NEG_INFINITY } else { v }
    };
    let n = coords.len();
    let free: Vec<usize> = (0..n)
        .filter(|&i| !matches!(coords[i], Coordinate::Fixed(_)))
        .collect();
    let base: Vec<f64> = coords
        .iter()
        .map(|c| match c {
            Coordinate::Fixed(v) => *v,
            Coordinate::Continuous => 0.0,
            Coordinate::TwoLevel => -1.0,
        })
        .collect();
    let mut rng = ChaCha8Rng::seed_from_u64(options.seed);
    let mut starts: Vec<Vec<f64>> = vec![base.clone()];
    let corner = |bits: u64| {
        let mut x = base.clone();
        for (b, &i) in free.iter().enumerate() {
            x[i] = if bits >> b & 1 == 1 { 1.0 } else { -1.0 };
        }
        x
    };
    if free.len() <= ALL_CORNERS_UP_TO {
        for bits in 0..(1u64 << free.len()) {
            starts.push(corner(bits));
        }
    } else {
        for _ in 0..options.corner_starts {
            let mut x = base.clone();
            for &i in &free {
                x[i] = if rng.next_u64() >> 63 == 1 { 1.0 } else { -1.0 };
            }
            starts.push(x);
        }
    }
    for _ in 0..options.random_starts {
        let mut x = base.clone();
        for &i in &free {
            x[i] = match coords[i] {
                Coordinate::TwoLevel => {
                    if rng.next_u64() >> 63 == 1 {
                        1.0
                    } else {
                        -1.0
                    }
                }
                // 53 random bits to a uniform number in −1..+1.
                _ => -1.0 + 2.0 * (rng.next_u64() >> 11) as f64 / (1u64 << 53) as f64,
            };
        }
        starts.push(x);
    }
    let mut scored: Vec<Found> = starts
        .into_iter()
        .map(|p| {
            let s = score(&p);
            Found { point: p, score: s }
        })
        .collect();
    sort_best_first(&mut scored);
    let picked = distinct(scored, options.distinct, options.refined.max(1));
    let mut refined: Vec<Found> = picked
        .into_iter()
        .map(|start| refine(coords, &score, start))
        .collect();
    sort_best_first(&mut refined);
    distinct(refined, options.distinct, options.keep)
}

fn sort_best_first(list: &mut [Found]) {
    list.sort_by(|a, b| b.score.total_cmp(&a.score));
}

/// The first `keep` of `sorted` that differ from every earlier kept one by more than `apart`.
fn distinct(sorted: Vec<Found>, apart: f64, keep: usize) -> Vec<Found> {
    let mut out: Vec<Found> = Vec::new();
    for c in sorted {
        if out.len() >= keep {
            break;
        }
        let far = out.iter().all(|o| {
            o.point
                .iter()
                .zip(&c.point)
                .any(|(a, b)| (a - b).abs() > apart)
        });
        if far {
            out.push(c);
        }
    }
    out
}

const GRID: usize = 8;
/// How far either side of the current value a line search looks (coded units).
const LINE_REACH: f64 = 0.25;
const GOLDEN_STEPS: usize = 40;
const MAX_CYCLES: usize = 60;

fn refine(coords: &[Coordinate], f: &impl Fn(&[f64]) -> f64, start: Found) -> Found {
    let mut x = start.point;
    let mut best = start.score;
    let continuous: Vec<usize> = (0..coords.len())
        .filter(|&i| coords[i] == Coordinate::Continuous)
        .collect();
    for _ in 0..MAX_CYCLES {
        let before = best;
        for (i, c) in coords.iter().enumerate() {
            match c {
                Coordinate::Fixed(_) => {}
                Coordinate::TwoLevel => {
                    let old = x[i];
                    x[i] = -old;
                    let s = f(&x);
                    if s > best {
                        best = s;
                    } else {
                        x[i] = old;
                    }
                }
                Coordinate::Continuous => line_search(&mut x, i, f, &mut best),
            }
        }
        if !continuous.is_empty() {
            nelder_mead(&mut x, &continuous, f, &mut best);
        }
        if best - before <= IMPROVEMENT * before.abs().max(1.0) {
            break;
        }
    }
    for v in &mut x {
        *v = v.clamp(-1.0, 1.0);
    }
    Found {
        point: x,
        score: best,
    }
}

/// Better value of coordinate `i` (others fixed) near its current value: a grid over
/// [`LINE_REACH`] either side, then golden-section search in the grid cells next to the best grid
/// point. Local on purpose, so that starts in different basins end on different maxima.
fn line_search(x: &mut [f64], i: usize, f: &impl Fn(&[f64]) -> f64, best: &mut f64) {
    let old = x[i];
    let mut at = old;
    let mut top = *best;
    let probe = |v: f64, x: &mut [f64]| {
        x[i] = v;
        f(x)
    };
    let (from, to) = ((old - LINE_REACH).max(-1.0), (old + LINE_REACH).min(1.0));
    let h = (to - from) / GRID as f64;
    for g in 0..=GRID {
        let v = from + h * g as f64;
        let s = probe(v, x);
        if s > top {
            top = s;
            at = v;
        }
    }
    let (mut a, mut b) = ((at - h).max(-1.0), (at + h).min(1.0));
    let r = 0.5 * (5f64.sqrt() - 1.0);
    let mut c = b - r * (b - a);
    let mut d = a + r * (b - a);
    let mut fc = probe(c, x);
    let mut fd = probe(d, x);
    for _ in 0..GOLDEN_STEPS {
        if fc >= fd {
            b = d;
            d = c;
            fd = fc;
            c = b - r * (b - a);
            fc = probe(c, x);
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + r * (b - a);
            fd = probe(d, x);
        }
    }
    for (v, s) in [(c, fc), (d, fd)] {
        if s > top {
            top = s;
            at = v;
        }
    }
    if top > *best {
        *best = top;
        x[i] = at;
    } else {
        x[i] = old;
    }
}

/// Nelder–Mead over the coordinates `dims` of `x` (reflection 1, expansion 2, contraction ½,
/// shrink ½), every trial point clamped to the box.
fn nelder_mead(x: &mut [f64], dims: &[usize], f: &impl Fn(&[f64]) -> f64, best: &mut f64) {
    let m = dims.len();
    let eval = |p: &[f64], work: &mut Vec<f64>| {
        for (k, &i) in dims.iter().enumerate() {
            work[i] = p[k].clamp(-1.0, 1.0);
        }
        f(work)
    };
    let mut work = x.to_vec();
    let origin: Vec<f64> = dims.iter().map(|&i| x[i]).collect();
    let mut simplex: Vec<(Vec<f64>, f64)> = vec![(origin.clone(), *best)];
    for k in 0..m {
        let mut p = origin.clone();
        p[k] = if p[k] > 0.0 { p[k] - 0.1 } else { p[k] + 0.1 };
        let s = eval(&p, &mut work);
        simplex.push((p, s));
    }
    for _ in 0..(200 * m) {
        simplex.sort_by(|a, b| b.1.total_cmp(&a.1));
        let spread = simplex[0].1 - simplex[m].1;
        let size = simplex
            .iter()
            .flat_map(|(p, _)| p.iter().zip(&simplex[0].0).map(|(a, b)| (a - b).abs()))
            .fold(0.0, f64::max);
        if size < 1e-9 || (spread.abs() < 1e-14 && size < 1e-6) {
            break;
        }
        let centroid: Vec<f64> = (0..m)
            .map(|k| simplex[..m].iter().map(|(p, _)| p[k]).sum::<f64>() / m as f64)
            .collect();
        let worst = simplex[m].clone();
        let along = |t: f64| -> Vec<f64> {
            centroid
                .iter()
                .zip(&worst.0)
                .map(|(c, w)| (c + t * (c - w)).clamp(-1.0, 1.0))
                .collect()
        };
        let r = along(1.0);
        let fr = eval(&r, &mut work);
        if fr > simplex[0].1 {
            let e = along(2.0);
            let fe = eval(&e, &mut work);
            simplex[m] = if fe > fr { (e, fe) } else { (r, fr) };
        } else if fr > simplex[m - 1].1 {
            simplex[m] = (r, fr);
        } else {
            let c = along(-0.5);
            let fc = eval(&c, &mut work);
            if fc > worst.1 {
                simplex[m] = (c, fc);
            } else {
                let top = simplex[0].0.clone();
                for (p, s) in simplex.iter_mut().skip(1) {
                    for (a, t) in p.iter_mut().zip(&top) {
                        *a = t + 0.5 * (*a - t);
                    }
                    *s = eval(p, &mut work);
                }
            }
        }
    }
    simplex.sort_by(|a, b| b.1.total_cmp(&a.1));
    if simplex[0].1 > *best {
        *best = simplex[0].1;
        for (k, &i) in dims.iter().enumerate() {
            x[i] = simplex[0].0[k].clamp(-1.0, 1.0);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_an_interior_maximum_and_a_corner() {
        // Concave bowl with its top at (0.3, −0.4): a made-up case.
        let f = |x: &[f64]| -(x[0] - 0.3).powi(2) - 2.0 * (x[1] + 0.4).powi(2);
        let c = [Coordinate::Continuous; 2];
        let found = maximise(&c, f, &SearchOptions::default());
        assert!((found[0].point[0] - 0.3).abs() < 1e-6, "{found:?}");
        assert!((found[0].point[1] + 0.4).abs() < 1e-6, "{found:?}");
        // A plane rises to a corner.
        let g = |x: &[f64]| x[0] - 2.0 * x[1];
        let found = maximise(&c, g, &SearchOptions::default());
        assert_eq!(found[0].point, vec![1.0, -1.0]);
    }

    #[test]
    fn two_level_and_fixed_coordinates_keep_their_values() {
        let f = |x: &[f64]| -(x[0] - 0.5).powi(2) + 0.3 * x[1] * x[0] - x[2];
        let c = [
            Coordinate::Continuous,
            Coordinate::TwoLevel,
            Coordinate::Fixed(0.25),
        ];
        let found = maximise(&c, f, &SearchOptions::default());
        let best = &found[0];
        assert_eq!(best.point[1], 1.0);
        assert_eq!(best.point[2], 0.25);
        // d/dx0: −2(x0 − 0.5) + 0.3 = 0 → x0 = 0.65.
        assert!((best.point[0] - 0.65).abs() < 1e-6, "{best:?}");
    }

    #[test]
    fn distinct_maxima_are_returned_best_first() {
        // Two peaks: at (−0.6, 0) height 1 and at (0.6, 0) height 0.8.
        let f = |x: &[f64]| {
            let a = (-((x[0] + 0.6).powi(2) + x[1].powi(2)) * 20.0).exp();
            let b = 0.8 * (-((x[0] - 0.6).powi(2) + x[1].powi(2)) * 20.0).exp();
            a + b
        };
        let found = maximise(&[Coordinate::Continuous; 2], f, &SearchOptions::default());
        assert!(found.len() >= 2);
        assert!((found[0].point[0] + 0.6).abs() < 1e-3, "{found:?}");
        assert!((found[1].point[0] - 0.6).abs() < 1e-3, "{found:?}");
        assert!(found[0].score > found[1].score);
    }
}
