//! The model fit checked against an independent library: coefficients, standard errors, t and p,
//! sums of squares, F and p, curvature, pure error and lack of fit, R², PRESS, leverage, Cook's
//! distance, studentised residuals, prediction intervals and the Box–Cox profile.
//!
//! The reference values are computed by statsmodels (OLS, anova_lm types 1 and 3, OLSInfluence,
//! get_prediction) and scipy (stats.f, stats.boxcox, optimize) in
//! `fixtures/make_statsmodels_fixtures.py`, which builds its design matrix from patsy formulas,
//! independently of this crate; the JSON it wrote is committed beside it. Inputs are generated
//! there with a fixed seed (test inputs, not demonstrations). Tolerance: `prec::LIBRARY_REL`
//! (1e-8, relative to the larger magnitude, see `agree`) unless a check says otherwise.

#![cfg(test)]

use serde::Deserialize;
use twofold_core::Term;
use twofold_core::anova::{Column, ModelFit, ModelSpec, Source, fit_model};
use twofold_core::boxcox::box_cox;
use twofold_core::data::Observations;
use twofold_core::diagnostics::diagnostics;
use twofold_core::prec::LIBRARY_REL;
use twofold_core::predict::predict;

const FITS: &str = include_str!("fixtures/statsmodels_fits.json");
const BOXCOX: &str = include_str!("fixtures/statsmodels_boxcox.json");

#[derive(Deserialize)]
struct File<E> {
    cases: Vec<Case<E>>,
}

#[derive(Deserialize)]
struct Case<E> {
    name: String,
    input: Input,
    expected: E,
}

#[derive(Deserialize)]
struct Input {
    factor_count: usize,
    levels: Vec<Vec<f64>>,
    blocks: Vec<u32>,
    response: Vec<Option<f64>>,
    excluded: Vec<bool>,
    terms: Vec<String>,
    hierarchical: bool,
}

impl Input {
    fn observations(&self) -> Observations {
        Observations::new(
            self.factor_count,
            self.levels.clone(),
            self.blocks.clone(),
            self.response.clone(),
            self.excluded.clone(),
        )
        .unwrap()
    }

    fn spec(&self) -> ModelSpec {
        let terms = self
            .terms
            .iter()
            .map(|t| Term::parse(t, self.factor_count).unwrap())
            .collect();
        ModelSpec::new(terms).hierarchical(self.hierarchical)
    }
}

#[derive(Deserialize)]
struct Row {
    ss: f64,
    f: f64,
    p: f64,
}

#[derive(Deserialize)]
struct CurvatureRow {
    ss: f64,
    f: f64,
    p: f64,
    estimate: f64,
}

#[derive(Deserialize)]
struct PureError {
    ss: f64,
    df: usize,
}

#[derive(Deserialize)]
struct LackOfFit {
    ss: f64,
    df: usize,
    f: f64,
    p: f64,
}

#[derive(Deserialize)]
struct PredictionRef {
    point: Vec<f64>,
    mean: f64,
    mean_se: f64,
    ci: [f64; 2],
    pi: [f64; 2],
}

#[derive(Deserialize)]
struct FitRef {
    terms: Vec<String>,
    runs: Vec<usize>,
    columns: Vec<String>,
    params: Vec<f64>,
    bse: Vec<f64>,
    tvalues: Vec<f64>,
    pvalues: Vec<f64>,
    ssr: f64,
    df_resid: usize,
    centered_tss: f64,
    rsquared: f64,
    rsquared_adj: f64,
    press: f64,
    pred_rsquared: f64,
    ss_blocks: f64,
    ss_model: f64,
    model_f: f64,
    model_p: f64,
    term_rows: std::collections::BTreeMap<String, Row>,
    curvature: Option<CurvatureRow>,
    pure_error: PureError,
    lack_of_fit: Option<LackOfFit>,
    leverage: Vec<f64>,
    cooks_distance: Vec<f64>,
    studentized_internal: Vec<f64>,
    studentized_external: Vec<f64>,
    fitted: Vec<f64>,
    predictions: Vec<PredictionRef>,
}

#[derive(Deserialize)]
struct BoxCoxRef {
    lambda: f64,
    lower: f64,
    upper: f64,
    loglik: Vec<(f64, f64)>,
}

/// Agreement to `LIBRARY_REL` relative to the larger magnitude. Stricter than
/// `prec::close_rel`, whose absolute floor near zero would let p-values of 1e-20 or Cook's
/// distances of 1e-5 pass whatever their value; the floor here (1e-14) only covers quantities
/// that are zero up to rounding.
fn agree(actual: f64, expected: f64) -> bool {
    let diff = (actual - expected).abs();
    diff <= LIBRARY_REL * actual.abs().max(expected.abs()) || diff <= 1e-14
}

#[track_caller]
fn close(actual: f64, expected: f64, what: &str) {
    assert!(
        agree(actual, expected),
        "{what}: statsmodels {expected}, got {actual} (relative tolerance {LIBRARY_REL})"
    );
}

#[track_caller]
fn close_all(actual: &[f64], expected: &[f64], what: &str) {
    assert_eq!(actual.len(), expected.len(), "{what}: lengths");
    for (i, (a, e)) in actual.iter().zip(expected).enumerate() {
        close(*a, *e, &format!("{what}[{i}]"));
    }
}

/// Estimate, standard error, t and p of a fitted column (`None` where the fit does not report one).
fn column_stats(fit: &ModelFit, column: &Column) -> (f64, Option<f64>, Option<f64>, Option<f64>) {
    match column {
        Column::Intercept => {
            let c = fit.intercept;
            (c.estimate, c.std_error, c.t, c.p)
        }
        Column::Block(label) => {
            let b = fit
                .block_effects
                .iter()
                .find(|b| b.label == *label)
                .unwrap();
            (b.effect, None, None, None)
        }
        Column::Term(t) => {
            let c = fit.coefficient(*t).unwrap();
            (c.estimate, c.std_error, c.t, c.p)
        }
        Column::Curvature => {
            let c = fit.curvature.unwrap();
            (-c.factorial_minus_centre, c.std_error, None, None)
        }
        other => panic!("unexpected column {other}"),
    }
}

fn check_fit(case: &Case<FitRef>) {
    let name = &case.name;
    let e = &case.expected;
    let fit = fit_model(&case.input.observations(), &case.input.spec()).unwrap();

    let labels: Vec<String> = fit.terms.iter().map(|t| t.label()).collect();
    assert_eq!(labels, e.terms, "{name}: fitted terms");
    assert_eq!(fit.runs, e.runs, "{name}: used runs");
    let cols: Vec<String> = fit.columns().iter().map(|c| c.to_string()).collect();
    assert_eq!(cols, e.columns, "{name}: columns");
    assert!(fit.unestimable.is_empty(), "{name}: {:?}", fit.unestimable);

    for (i, column) in fit.columns().iter().enumerate() {
        let what = format!("{name}: {column}");
        let (est, se, t, p) = column_stats(&fit, column);
        close(est, e.params[i], &format!("{what} estimate"));
        if let Some(se) = se {
            close(se, e.bse[i], &format!("{what} standard error"));
        }
        if let Some(t) = t {
            close(t, e.tvalues[i], &format!("{what} t"));
        }
        if let Some(p) = p {
            close(p, e.pvalues[i], &format!("{what} p"));
        }
    }

    let res = fit.anova_row(Source::Residual).unwrap();
    assert_eq!(res.df, e.df_resid, "{name}: residual df");
    close(res.ss, e.ssr, &format!("{name}: residual SS"));
    close(
        fit.anova_row(Source::Total).unwrap().ss,
        e.centered_tss,
        &format!("{name}: total SS"),
    );
    close(fit.r2.unwrap(), e.rsquared, &format!("{name}: R²"));
    close(
        fit.adj_r2.unwrap(),
        e.rsquared_adj,
        &format!("{name}: adjusted R²"),
    );
    close(fit.press.unwrap(), e.press, &format!("{name}: PRESS"));
    close(
        fit.pred_r2.unwrap(),
        e.pred_rsquared,
        &format!("{name}: predicted R²"),
    );

    match fit.anova_row(Source::Blocks) {
        Some(b) => close(
            b.ss,
            e.ss_blocks,
            &format!("{name}: blocks SS (sequential)"),
        ),
        None => assert_eq!(e.ss_blocks, 0.0, "{name}: blocks row missing"),
    }
    let model = fit.anova_row(Source::Model).unwrap();
    close(
        model.ss,
        e.ss_model,
        &format!("{name}: model SS (sequential, after blocks)"),
    );
    close(model.f.unwrap(), e.model_f, &format!("{name}: model F"));
    close(model.p.unwrap(), e.model_p, &format!("{name}: model p"));
    for (label, r) in &e.term_rows {
        let t = Term::parse(label, case.input.factor_count).unwrap();
        let row = fit.anova_row(Source::Term(t)).unwrap();
        close(row.ss, r.ss, &format!("{name}: adjusted SS {label}"));
        close(row.f.unwrap(), r.f, &format!("{name}: F {label}"));
        close(row.p.unwrap(), r.p, &format!("{name}: p {label}"));
    }
    match (&e.curvature, fit.curvature) {
        (Some(r), Some(c)) => {
            close(c.ss, r.ss, &format!("{name}: curvature SS"));
            close(c.f.unwrap(), r.f, &format!("{name}: curvature F"));
            close(c.p.unwrap(), r.p, &format!("{name}: curvature p"));
            close(
                -c.factorial_minus_centre,
                r.estimate,
                &format!("{name}: curvature estimate"),
            );
        }
        (None, None) => {}
        (r, c) => panic!("{name}: curvature expected {:?}, got {c:?}", r.is_some()),
    }
    match fit.anova_row(Source::PureError) {
        Some(pe) => {
            assert_eq!(pe.df, e.pure_error.df, "{name}: pure error df");
            close(pe.ss, e.pure_error.ss, &format!("{name}: pure error SS"));
        }
        None => assert_eq!(e.pure_error.df, 0, "{name}: pure error row missing"),
    }
    match (&e.lack_of_fit, fit.anova_row(Source::LackOfFit)) {
        (Some(r), Some(l)) => {
            assert_eq!(l.df, r.df, "{name}: lack-of-fit df");
            close(l.ss, r.ss, &format!("{name}: lack-of-fit SS"));
            close(l.f.unwrap(), r.f, &format!("{name}: lack-of-fit F"));
            close(l.p.unwrap(), r.p, &format!("{name}: lack-of-fit p"));
        }
        (None, None) => {}
        (r, l) => panic!("{name}: lack of fit expected {:?}, got {l:?}", r.is_some()),
    }

    close_all(&fit.fitted, &e.fitted, &format!("{name}: fitted"));
    close_all(&fit.leverage, &e.leverage, &format!("{name}: leverage"));
    let d = diagnostics(&fit);
    let cooks: Vec<f64> = d.runs.iter().map(|r| r.cooks_distance.unwrap()).collect();
    close_all(
        &cooks,
        &e.cooks_distance,
        &format!("{name}: Cook's distance"),
    );
    let si: Vec<f64> = d.runs.iter().map(|r| r.studentized.unwrap()).collect();
    close_all(
        &si,
        &e.studentized_internal,
        &format!("{name}: internally studentised"),
    );
    let se: Vec<f64> = d
        .runs
        .iter()
        .map(|r| r.externally_studentized.unwrap())
        .collect();
    close_all(
        &se,
        &e.studentized_external,
        &format!("{name}: externally studentised"),
    );

    for pr in &e.predictions {
        let what = format!("{name}: prediction at {:?}", pr.point);
        let p = predict(&fit, &pr.point, 0.95).unwrap();
        close(p.value, pr.mean, &format!("{what} mean"));
        close(
            p.std_error.unwrap(),
            pr.mean_se,
            &format!("{what} standard error"),
        );
        let (cl, ch) = p.confidence_interval.unwrap();
        close(cl, pr.ci[0], &format!("{what} confidence low"));
        close(ch, pr.ci[1], &format!("{what} confidence high"));
        let (pl, ph) = p.prediction_interval.unwrap();
        close(pl, pr.pi[0], &format!("{what} prediction low"));
        close(ph, pr.pi[1], &format!("{what} prediction high"));
    }
}

fn fit_case(name: &str) -> Case<FitRef> {
    let file: File<FitRef> = serde_json::from_str(FITS).unwrap();
    file.cases.into_iter().find(|c| c.name == name).unwrap()
}

#[test]
fn missing_and_excluded_runs_give_adjusted_sums_of_squares() {
    let case = fit_case("missing_runs");
    check_fit(&case);
    let fit = fit_model(&case.input.observations(), &case.input.spec()).unwrap();
    // With runs missing the columns are not orthogonal, and the result says so.
    assert_eq!(
        fit.sums_of_squares_kind,
        twofold_core::anova::SumsOfSquaresKind::Adjusted
    );
}

#[test]
fn blocks_and_centre_points_in_every_block() {
    check_fit(&fit_case("blocks_centres"));
}

#[test]
fn blocked_half_fraction_with_centre_points_and_hierarchy() {
    let case = fit_case("half_fraction_blocks_centres");
    check_fit(&case);
    // Hierarchy added the parents of AB and CD (the script lists them itself).
    let fit = fit_model(&case.input.observations(), &case.input.spec()).unwrap();
    let added: Vec<String> = fit.added_for_hierarchy.iter().map(|t| t.label()).collect();
    assert_eq!(added, ["A", "B", "C", "D"]);
}

fn check_box_cox(case: &Case<BoxCoxRef>) {
    let name = &case.name;
    let e = &case.expected;
    let bc = box_cox(&case.input.observations(), &case.input.spec()).unwrap();
    // λ̂ maximises a smooth, flat-topped function, so both optimisers can only place it to about
    // the square root of the likelihood's rounding: 1e-6 absolute.
    assert!(
        (bc.lambda - e.lambda).abs() < 1e-6,
        "{name}: λ̂ reference {}, got {}",
        e.lambda,
        bc.lambda
    );
    close(bc.lower.unwrap(), e.lower, &format!("{name}: interval low"));
    close(
        bc.upper.unwrap(),
        e.upper,
        &format!("{name}: interval high"),
    );
    for &(l, v) in &e.loglik {
        let got = bc
            .profile
            .iter()
            .find(|(g, _)| (g - l).abs() < 1e-9)
            .unwrap_or_else(|| panic!("{name}: λ = {l} not on the grid"));
        close(got.1, v, &format!("{name}: log-likelihood at λ = {l}"));
    }
}

#[test]
fn box_cox_intercept_only_agrees_with_scipy() {
    // scipy.stats.boxcox (maximum and χ² interval) and scipy.stats.boxcox_llf: the same
    // log-likelihood as the geometric-mean-scaled profile (Box & Cox 1964, section 3).
    let file: File<BoxCoxRef> = serde_json::from_str(BOXCOX).unwrap();
    check_box_cox(&file.cases[0]);
}

#[test]
fn box_cox_with_a_model_agrees_with_statsmodels() {
    let file: File<BoxCoxRef> = serde_json::from_str(BOXCOX).unwrap();
    let case = &file.cases[1];
    check_box_cox(case);
    // Near-log-linear data: the suggestion is ln (λ̂ ≈ 0.035, interval −0.18..0.25 per the
    // fixture).
    let bc = box_cox(&case.input.observations(), &case.input.spec()).unwrap();
    assert_eq!(
        bc.suggestion.map(|s| s.1),
        Some(twofold_core::transform::Transform::Ln)
    );
}
