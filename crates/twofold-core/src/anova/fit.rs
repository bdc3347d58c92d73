//! The least-squares fit itself: model columns, rank checks, QR solution and the ANOVA table
//! (see the parent module for the method and its sources).

use crate::columns::term_value;
use crate::data::Observations;
use crate::prec::RANK_REL;
use crate::term::Term;
use nalgebra::{DMatrix, DVector};
use std::collections::BTreeSet;

use super::*;

/// Pure error of runs given as `((block, settings), response)`: the squared deviations of the
/// responses from their group means, groups being runs with identical settings in the same block,
/// and its degrees of freedom (Montgomery, *Design and Analysis of Experiments*, pure error of
/// replicated runs and centre points).
pub(crate) fn pure_error_of<'a>(
    runs: impl Iterator<Item = ((u32, &'a [f64]), f64)>,
) -> (f64, usize) {
    // Settings at −1, 0 or +1 pack into two bits a factor (25 factors fit in 64 bits); any other
    // value (an axial run at ±α, say) keeps the whole row, exactly, as its key.
    #[derive(PartialEq, Eq, Hash)]
    enum Key {
        Packed(u32, u64),
        Row(u32, Vec<u64>),
    }
    let key_of = |block: u32, row: &[f64]| -> Key {
        let mut packed = 0u64;
        let mut ok = row.len() <= 32;
        for (f, &v) in row.iter().enumerate() {
            let code = if v == -1.0 {
                1u64
            } else if v == 0.0 {
                2
            } else if v == 1.0 {
                3
            } else {
                ok = false;
                0
            };
            if ok {
                packed |= code << (2 * f);
            }
        }
        if ok {
            Key::Packed(block, packed)
        } else {
            // `+ 0.0` makes −0 and 0 one key.
            Key::Row(block, row.iter().map(|&v| (v + 0.0).to_bits()).collect())
        }
    };
    let mut index: std::collections::HashMap<Key, usize> = std::collections::HashMap::new();
    let mut groups: Vec<(usize, f64)> = Vec::new();
    let mut member: Vec<(usize, f64)> = Vec::new();
    for ((block, row), y) in runs {
        let next = groups.len();
        let g = *index.entry(key_of(block, row)).or_insert(next);
        if g == next {
            groups.push((0, 0.0));
        }
        groups[g].0 += 1;
        groups[g].1 += y;
        member.push((g, y));
    }
    // Two passes (means, then squared deviations) to keep the precision of the textbook formula.
    let ss = member
        .iter()
        .filter(|(g, _)| groups[*g].0 > 1)
        .map(|&(g, y)| (y - groups[g].1 / groups[g].0 as f64).powi(2))
        .sum();
    let df = groups.iter().map(|g| g.0 - 1).sum();
    (ss, df)
}

/// Pure error of the used runs of `obs` (see [`fit_model`]'s table): `(SS, df)`; df 0 when no
/// two runs share their settings and block.
pub fn pure_error(obs: &Observations) -> (f64, usize) {
    let levels = obs.levels();
    pure_error_of(obs.used_runs().into_iter().map(|r| {
        (
            (obs.blocks()[r], levels[r].as_slice()),
            obs.response()[r].unwrap_or(0.0),
        )
    }))
}

/// The block labels present, ascending.
fn labels_of(block_of: &[u32]) -> Vec<u32> {
    let s: BTreeSet<u32> = block_of.iter().copied().collect();
    s.into_iter().collect()
}

/// The transform view of the runs `runs` of `obs` (blocks `block_of`, labels `labels`), or `None`
/// when they are not a two-level table (see [`gram::Transform::new`]).
fn transform_of(
    obs: &Observations,
    runs: &[usize],
    block_of: &[u32],
    labels: &[u32],
) -> Option<gram::Transform> {
    let levels = obs.levels();
    let index: Vec<usize> = block_of
        .iter()
        .map(|b| labels.iter().position(|l| l == b).unwrap_or(0))
        .collect();
    let rows: Vec<&[f64]> = runs
        .iter()
        .map(|&r| levels.get(r).map_or(&[][..], Vec::as_slice))
        .collect();
    gram::Transform::new(obs.factor_count(), &rows, index, labels.len())
}

/// The residual sum of squares of `fit`'s model on the same runs for another response `z` (one
/// value per run of `fit.runs`), without fitting again: `Σ(z − z̄)² − gᵀ(XᵀX)⁻¹g` with
/// `g = Xᵀ(z − z̄)` by the transform (the model holds the intercept, so centring changes nothing
/// but the rounding). `None` when `obs` is not a two-level table (every run at ±1 or the centre).
pub fn residual_ss_for<'a>(
    fit: &'a ModelFit,
    obs: &Observations,
) -> Option<impl Fn(&[f64]) -> f64 + 'a> {
    let block_of: Vec<u32> = fit.runs.iter().map(|&r| obs.blocks()[r]).collect();
    let labels = labels_of(&block_of);
    let t = transform_of(obs, &fit.runs, &block_of, &labels)?;
    let inv = &fit.xtx_inv;
    // Orthogonal columns (the usual case) make (XᵀX)⁻¹ diagonal: the quadratic form is then a
    // sum over p terms, not p², at every call.
    let diagonal = (0..inv.ncols()).all(|j| (0..inv.nrows()).all(|i| i == j || inv[(i, j)] == 0.0));
    Some(move |z: &[f64]| {
        let mean = z.iter().sum::<f64>() / z.len().max(1) as f64;
        let zc: Vec<f64> = z.iter().map(|v| v - mean).collect();
        let g = t.xty(&fit.columns, &labels, &zc);
        let p = g.len();
        let mut quad = 0.0;
        if diagonal {
            for i in 0..p {
                quad += g[i] * inv[(i, i)] * g[i];
            }
        } else {
            for i in 0..p {
                for j in 0..p {
                    quad += g[i] * inv[(i, j)] * g[j];
                }
            }
        }
        (zc.iter().map(|v| v * v).sum::<f64>() - quad).max(0.0)
    })
}

/// The values of column `c` on the used runs.
fn column_values(
    c: Column,
    runs: &[usize],
    levels: &[Vec<f64>],
    block_of: &[u32],
    labels: &[u32],
    centre: &[bool],
) -> Vec<f64> {
    let last = labels.last().copied();
    match c {
        Column::Intercept => vec![1.0; runs.len()],
        Column::Block(lab) => block_of
            .iter()
            .map(|&b| {
                if b == lab {
                    1.0
                } else if Some(b) == last {
                    -1.0
                } else {
                    0.0
                }
            })
            .collect(),
        Column::Term(t) => runs.iter().map(|&r| term_value(&levels[r], t)).collect(),
        Column::Curvature => centre.iter().map(|&c| if c { 1.0 } else { 0.0 }).collect(),
    }
}

/// The dense route: the columns built, a rank check by Gram–Schmidt in order, and the kept
/// columns solved by Householder QR (see the parent module).
pub(super) fn dense_solve(
    kinds: &[Column],
    runs: &[usize],
    levels: &[Vec<f64>],
    block_of: &[u32],
    labels: &[u32],
    centre: &[bool],
    y: &[f64],
) -> gram::Solved {
    let n = runs.len();
    let candidates: Vec<Vec<f64>> = kinds
        .iter()
        .map(|&c| column_values(c, runs, levels, block_of, labels, centre))
        .collect();
    // Rank check in order: keep a column only if it is not (numerically) a combination of the
    // columns kept before it.
    let mut basis: Vec<Vec<f64>> = Vec::new();
    let mut kept: Vec<usize> = Vec::new();
    let mut dropped_at: Vec<usize> = Vec::new();
    for (ci, col) in candidates.iter().enumerate() {
        let norm0 = col.iter().map(|v| v * v).sum::<f64>().sqrt();
        let mut v = col.clone();
        // Two passes of Gram–Schmidt ("twice is enough", Giraud et al. 2005; from memory).
        for _ in 0..2 {
            for q in &basis {
                let d: f64 = q.iter().zip(&v).map(|(a, b)| a * b).sum();
                for (vi, qi) in v.iter_mut().zip(q) {
                    *vi -= d * qi;
                }
            }
        }
        let norm = v.iter().map(|x| x * x).sum::<f64>().sqrt();
        if norm0 == 0.0 || norm <= RANK_REL * norm0 {
            dropped_at.push(ci);
        } else {
            v.iter_mut().for_each(|x| *x /= norm);
            basis.push(v);
            kept.push(ci);
        }
    }
    let p = kept.len();
    let xk = DMatrix::from_fn(n, p, |i, j| candidates[kept[j]][i]);
    let dropped = dropped_at
        .iter()
        .map(|&ci| {
            let before: Vec<usize> = kept.iter().copied().filter(|&j| j < ci).collect();
            let xb = DMatrix::from_fn(n, before.len(), |i, j| candidates[before[j]][i]);
            let v = DVector::from_column_slice(&candidates[ci]);
            let coefs = least_squares(&xb, &v).unwrap_or_else(|| DVector::zeros(before.len()));
            (ci, before.into_iter().zip(coefs.iter().copied()).collect())
        })
        .collect();
    let yv = DVector::from_column_slice(y);
    let qr = xk.clone().qr();
    let q = qr.q();
    let r = qr.r();
    let qty = q.transpose() * &yv;
    let b = r
        .solve_upper_triangular(&qty)
        .unwrap_or_else(|| DVector::zeros(p));
    let fitted_v = &xk * &b;
    let leverage: Vec<f64> = (0..n)
        .map(|i| (0..p).map(|j| q[(i, j)] * q[(i, j)]).sum())
        .collect();
    gram::Solved {
        kept,
        dropped,
        r,
        qty,
        fitted: fitted_v.iter().copied().collect(),
        leverage,
    }
}

/// Least-squares coefficients of `v` on the columns of `x` (full column rank), by QR.
fn least_squares(x: &DMatrix<f64>, v: &DVector<f64>) -> Option<DVector<f64>> {
    if x.ncols() == 0 {
        return Some(DVector::zeros(0));
    }
    let qr = x.clone().qr();
    let qtv = qr.q().transpose() * v;
    qr.r().solve_upper_triangular(&qtv)
}

/// Fits `spec` to the used runs of `obs`. See the module documentation for the model, the order
/// of the columns and the ANOVA table.
///
/// # Example
/// Montgomery, Example 6-1 (fill height, 2^3 with two replicates; verified): SS(A) = 36.00 and
/// the pure error is 5.00 on 8 df.
/// ```
/// use twofold_core::Term;
/// use twofold_core::anova::{ModelSpec, Source, fit_model};
/// use twofold_core::data::Observations;
///
/// let y = [-3., 0., -1., 2., -1., 2., 1., 6., -1., 1., 0., 3., 0., 1., 1., 5.];
/// let levels = (0..16usize)
///     .map(|r| (0..3).map(|f| if (r % 8) >> f & 1 == 1 { 1.0 } else { -1.0 }).collect())
///     .collect();
/// let obs = Observations::new(3, levels, vec![], y.iter().map(|&v| Some(v)).collect(), vec![])?;
/// let spec = ModelSpec::new(vec![Term::main(0), Term::main(1), Term::main(2)]);
/// let fit = fit_model(&obs, &spec)?;
/// let ss_a = fit.anova_row(Source::Term(Term::main(0))).map_or(f64::NAN, |r| r.ss);
/// // Tolerance 1e-9: sums of squares of small integers, exact up to rounding.
/// assert!((ss_a - 36.0).abs() < 1e-9);
/// let pure = fit.anova_row(Source::PureError).map_or((0, f64::NAN), |r| (r.df, r.ss));
/// assert_eq!(pure.0, 8);
/// assert!((pure.1 - 5.0).abs() < 1e-9);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn fit_model(obs: &Observations, spec: &ModelSpec) -> Result<ModelFit, FitError> {
    let k = obs.factor_count();
    let mut chosen: BTreeSet<Term> = BTreeSet::new();
    for &t in &spec.terms {
        if t.span() > k {
            return Err(FitError::TermBeyondFactors {
                term: t.label(),
                factor_count: k,
            });
        }
        if !t.is_identity() {
            chosen.insert(t);
        }
    }
    let mut added_for_hierarchy = Vec::new();
    let terms: Vec<Term> = if spec.hierarchical {
        let closed = hierarchical_closure(&chosen.iter().copied().collect::<Vec<_>>());
        added_for_hierarchy = closed
            .iter()
            .copied()
            .filter(|t| !chosen.contains(t))
            .collect();
        closed
    } else {
        chosen.into_iter().collect()
    };

    let runs = obs.used_runs();
    let n = runs.len();
    if n == 0 {
        return Err(FitError::NoUsableRuns);
    }
    let levels = obs.levels();
    let y: Vec<f64> = runs
        .iter()
        .map(|&r| obs.response()[r].unwrap_or(0.0))
        .collect();
    let block_of: Vec<u32> = runs.iter().map(|&r| obs.blocks()[r]).collect();
    let labels = labels_of(&block_of);
    let centre: Vec<bool> = runs.iter().map(|&r| obs.is_centre(r)).collect();
    let centre_runs = centre.iter().filter(|&&c| c).count();
    let with_curvature = spec.curvature && centre_runs > 0 && centre_runs < n;

    let parameters = 1 + (labels.len() - 1) + terms.len() + usize::from(with_curvature);
    if parameters > MAX_PARAMETERS {
        return Err(FitError::TooManyParameters {
            parameters,
            max: MAX_PARAMETERS,
        });
    }
    if n < parameters {
        return Err(FitError::TooFewRuns {
            runs: n,
            parameters,
        });
    }

    // Candidate columns in fitting order.
    let mut kinds: Vec<Column> = Vec::with_capacity(parameters);
    kinds.push(Column::Intercept);
    if let Some((_, rest)) = labels.split_last() {
        kinds.extend(rest.iter().map(|&lab| Column::Block(lab)));
    }
    kinds.extend(terms.iter().map(|&t| Column::Term(t)));
    if with_curvature {
        kinds.push(Column::Curvature);
    }

    // A two-level table (every used run at ±1 or at the centre) is solved from its cross
    // products by the transform, without building the columns; anything else densely.
    let transform = transform_of(obs, &runs, &block_of, &labels);
    let solved = match &transform {
        Some(t) => t.solve(&kinds, &labels, &y),
        None => dense_solve(&kinds, &runs, levels, &block_of, &labels, &centre, &y),
    };
    let gram::Solved {
        kept,
        dropped,
        r,
        qty,
        ..
    } = solved;
    let p = kept.len();
    let unestimable: Vec<Unestimable> = dropped
        .iter()
        .map(|(ci, coefs)| Unestimable {
            column: kinds[*ci],
            aliased_with: coefs
                .iter()
                .filter(|(_, c)| c.abs() > 1e-9)
                .map(|&(j, c)| (kinds[j], c))
                .collect(),
        })
        .collect();
    // The rank check above guarantees a non-singular R; fall back to zeros only to avoid a panic.
    let b = r
        .solve_upper_triangular(&qty)
        .unwrap_or_else(|| DVector::zeros(p));
    // Orthogonal columns (the usual two-level case) make R diagonal: its inverse is read off.
    let diagonal = (0..p).all(|j| (0..j).all(|i| r[(i, j)] == 0.0));
    let xtx_inv = if diagonal {
        DMatrix::from_fn(p, p, |i, j| {
            if i == j {
                1.0 / (r[(i, i)] * r[(i, i)])
            } else {
                0.0
            }
        })
    } else {
        let r_inv = r
            .solve_upper_triangular(&DMatrix::identity(p, p))
            .unwrap_or_else(|| DMatrix::zeros(p, p));
        &r_inv * r_inv.transpose()
    };
    let columns: Vec<Column> = kept.iter().map(|&c| kinds[c]).collect();
    let (fitted, leverage) = match &transform {
        Some(t) => t.fitted(&columns, &labels, b.as_slice(), &xtx_inv),
        None => (solved.fitted, solved.leverage),
    };
    let residuals: Vec<f64> = y.iter().zip(&fitted).map(|(a, f)| a - f).collect();

    let mean = y.iter().sum::<f64>() / n as f64;
    let ss_total: f64 = y.iter().map(|v| (v - mean).powi(2)).sum();
    let ss_res: f64 = residuals.iter().map(|e| e * e).sum();
    let df_res = n - p;
    let sum_sq_y: f64 = y.iter().map(|v| v * v).sum();
    // An exact fit (residuals at rounding level) leaves no error estimate worth dividing by.
    let exact_fit = ss_res <= 1e-24 * sum_sq_y.max(f64::MIN_POSITIVE);
    let ms_res = (df_res > 0 && !exact_fit).then(|| ss_res / df_res as f64);
    let constant = ss_total <= 1e-24 * sum_sq_y.max(f64::MIN_POSITIVE);

    let kind_of = |j: usize| columns[j];
    let mut ss_blocks = 0.0;
    let mut ss_model = 0.0;
    for j in 0..p {
        match kind_of(j) {
            Column::Block(_) => ss_blocks += qty[j] * qty[j],
            Column::Term(_) => ss_model += qty[j] * qty[j],
            _ => {}
        }
    }

    let coefficient = |j: usize, term: Term| {
        let se = ms_res.map(|m| (m * xtx_inv[(j, j)]).sqrt());
        let t = se.filter(|s| *s > 0.0).map(|s| b[j] / s);
        Coefficient {
            term,
            estimate: b[j],
            std_error: se,
            t,
            p: t.and_then(|t| t_two_sided_p(t, df_res)),
        }
    };
    let f_and_p = |ms: f64, df: usize| -> (Option<f64>, Option<f64>) {
        match ms_res {
            Some(m) if m > 0.0 && df > 0 => {
                let f = ms / m;
                (Some(f), f_upper_p(f, df, df_res))
            }
            _ => (None, None),
        }
    };

    let mut intercept = coefficient(0, Term::IDENTITY);
    let mut coefficients = Vec::new();
    let mut fitted_terms = Vec::new();
    let mut block_coefs: Vec<(u32, f64)> = Vec::new();
    let mut term_rows = Vec::new();
    let mut curvature = None;
    for j in 0..p {
        match kind_of(j) {
            Column::Intercept => intercept = coefficient(j, Term::IDENTITY),
            Column::Block(lab) => block_coefs.push((lab, b[j])),
            Column::Term(t) => {
                fitted_terms.push(t);
                coefficients.push(coefficient(j, t));
                let ss = b[j] * b[j] / xtx_inv[(j, j)];
                let (f, pv) = f_and_p(ss, 1);
                term_rows.push(AnovaRow {
                    source: Source::Term(t),
                    df: 1,
                    ss,
                    ms: Some(ss),
                    f,
                    p: pv,
                });
            }
            Column::Curvature => {
                let c = coefficient(j, Term::IDENTITY);
                let ss = b[j] * b[j] / xtx_inv[(j, j)];
                let (f, pv) = f_and_p(ss, 1);
                curvature = Some(Curvature {
                    centre_runs,
                    factorial_runs: n - centre_runs,
                    factorial_minus_centre: -c.estimate,
                    std_error: c.std_error,
                    ss,
                    f,
                    p: pv,
                });
            }
        }
    }
    let mut block_effects: Vec<BlockEffect> = block_coefs
        .iter()
        .map(|&(label, effect)| BlockEffect { label, effect })
        .collect();
    if let Some(&last) = labels.last()
        && labels.len() > 1
    {
        block_effects.push(BlockEffect {
            label: last,
            effect: -block_coefs.iter().map(|(_, e)| e).sum::<f64>(),
        });
    }

    // Pure error: runs with identical settings in the same block.
    let (ss_pe, df_pe) = pure_error_of(
        runs.iter()
            .map(|&r| (obs.blocks()[r], levels[r].as_slice()))
            .zip(y.iter().copied()),
    );

    // The table.
    let row = |source: Source, df: usize, ss: f64| {
        let ms = (df > 0).then(|| ss / df as f64);
        let (f, pv) = match ms {
            Some(ms) => f_and_p(ms, df),
            None => (None, None),
        };
        AnovaRow {
            source,
            df,
            ss,
            ms,
            f,
            p: pv,
        }
    };
    let mut anova = Vec::new();
    if labels.len() > 1 {
        anova.push(row(Source::Blocks, labels.len() - 1, ss_blocks));
    }
    if !fitted_terms.is_empty() {
        anova.push(row(Source::Model, fitted_terms.len(), ss_model));
        anova.extend(term_rows);
    }
    if let Some(c) = &curvature {
        anova.push(AnovaRow {
            source: Source::Curvature,
            df: 1,
            ss: c.ss,
            ms: Some(c.ss),
            f: c.f,
            p: c.p,
        });
    }
    anova.push(AnovaRow {
        source: Source::Residual,
        df: df_res,
        ss: ss_res,
        ms: ms_res,
        f: None,
        p: None,
    });
    if df_pe > 0 && df_res > df_pe {
        let df_lof = df_res - df_pe;
        let ss_lof = (ss_res - ss_pe).max(0.0);
        let ms_lof = ss_lof / df_lof as f64;
        let ms_pe = ss_pe / df_pe as f64;
        let f = (ms_pe > 1e-24 * sum_sq_y).then(|| ms_lof / ms_pe);
        anova.push(AnovaRow {
            source: Source::LackOfFit,
            df: df_lof,
            ss: ss_lof,
            ms: Some(ms_lof),
            f,
            p: f.and_then(|f| f_upper_p(f, df_lof, df_pe)),
        });
    }
    if df_pe > 0 {
        anova.push(AnovaRow {
            source: Source::PureError,
            df: df_pe,
            ss: ss_pe,
            ms: Some(ss_pe / df_pe as f64),
            f: None,
            p: None,
        });
    }
    anova.push(AnovaRow {
        source: Source::Total,
        df: n - 1,
        ss: ss_total,
        ms: None,
        f: None,
        p: None,
    });

    // Orthogonality of term and curvature columns once intercept and blocks are fitted: the
    // columns residualised on the first `m` columns are Σ_{i≥m} R_ij q_i, so their inner products
    // are those of the trailing rows of R.
    let m = 1 + block_coefs.len();
    let norms: Vec<f64> = (0..p)
        .map(|j| (m..p).map(|i| r[(i, j)].powi(2)).sum::<f64>().sqrt())
        .collect();
    let orthogonal = diagonal
        || (m..p).all(|j| {
            (j + 1..p).all(|l| {
                let dot: f64 = (m..=j.min(l)).map(|i| r[(i, j)] * r[(i, l)]).sum();
                dot.abs() <= 1e-10 * norms[j] * norms[l]
            })
        });

    let press = if leverage.iter().all(|&h| h < 1.0 - 1e-10) {
        Some(
            residuals
                .iter()
                .zip(&leverage)
                .map(|(e, h)| (e / (1.0 - h)).powi(2))
                .sum::<f64>(),
        )
    } else {
        None
    };
    let r2 = (!constant).then(|| 1.0 - ss_res / ss_total);
    let adj_r2 = if !constant && df_res > 0 {
        Some(1.0 - (ss_res / df_res as f64) / (ss_total / (n - 1) as f64))
    } else {
        None
    };
    let pred_r2 = if constant {
        None
    } else {
        press.map(|pr| 1.0 - pr / ss_total)
    };

    Ok(ModelFit {
        factor_count: k,
        added_for_hierarchy,
        terms: fitted_terms,
        unestimable,
        intercept,
        coefficients,
        block_effects,
        curvature,
        anova,
        sums_of_squares_kind: if orthogonal {
            SumsOfSquaresKind::Orthogonal
        } else {
            SumsOfSquaresKind::Adjusted
        },
        r2,
        adj_r2,
        pred_r2,
        press,
        sigma: ms_res.map(f64::sqrt),
        ms_residual: ms_res,
        df_residual: df_res,
        parameter_count: p,
        runs,
        observed: y,
        fitted,
        residuals,
        leverage,
        columns,
        estimates: b.iter().copied().collect(),
        xtx_inv,
    })
}
