//! The `analyze` subcommand: effects, Lenth's method, half-normal positions, a model fit and its
//! ANOVA for one response of a coded table.
//!
//! ```text
//! twofold analyze --csv FILE [--response NAME] [--terms A,C,AC] [--transform T] [--json]
//! twofold analyze PROJECT.ron [--response NAME] [--terms A,C,AC] [--transform T] [--json]
//! ```
//!
//! The CSV file is a coded table: a header row, one column per factor named by its letter in
//! order (`A`, `B`, `C`, ...; cells −1, 0 or +1, all 0 = centre point), an optional `block`
//! column, then one or more response columns; an empty response cell is a missing value. The
//! factor columns are the leading run of headers `A`, `B`, ... in sequence; the first other
//! header ends them.
//!
//! The work is split so that other front ends can reuse it: [`read_coded_csv`] validates a file
//! into a [`CodedTable`], [`analyse`] turns checked [`Observations`] into an [`Analysis`] of core
//! results, and [`analysis_json`] / [`analysis_text`] render one.

mod args;

use std::collections::BTreeSet;
use std::fmt::Write as _;
use std::io::Write;

use serde_json::{Value, json};
use twofold_core::anova::{
    self, FitError, ModelFit, ModelSpec, SumsOfSquaresKind, fit_model, format_number,
};
use twofold_core::data::{DataError, Observations};
use twofold_core::effects::{EffectMethod, EffectTable, EffectsError, estimate_effects};
use twofold_core::halfnormal::{HalfNormalPoint, NormalPoint, half_normal, normal_probability};
use twofold_core::lenth::{Lenth, LenthError, Significance, lenth};
use twofold_core::term::Term;
use twofold_core::transform::{Transform, TransformError};

use super::{EXIT_BAD_INPUT, EXIT_FAILURE};

pub(crate) use args::{AFTER_HELP, LONG_ABOUT};
pub use args::{AnalyzeArgs, AnalyzeCommand, Input, parse_transform};
pub use twofold_study::interchange::coded::{
    CodedTable, ResponseColumn, TableError, read_coded_csv,
};
/// How the model terms were chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum ModelSelection {
    /// Given by the caller.
    Given,
    /// The effects beyond Lenth's margin of error, closed under hierarchy.
    LenthMargin,
    /// Lenth's method was undefined, so the main effects were fitted.
    MainEffects,
}

impl ModelSelection {
    fn key(self) -> &'static str {
        match self {
            ModelSelection::Given => "given",
            ModelSelection::LenthMargin => "beyond_lenth_me_hierarchical",
            ModelSelection::MainEffects => "main_effects_lenth_undefined",
        }
    }
}

/// Why an analysis cannot be done.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum AnalysisError {
    /// The response transform does not apply to some values.
    #[error(transparent)]
    Transform(#[from] TransformError),
    /// The table has no usable effects.
    #[error(transparent)]
    Effects(#[from] EffectsError),
    /// A model term is aliased with the mean in this design.
    #[error(
        "term `{term}` is aliased with the mean in this design (its column is constant), so it cannot be a model term"
    )]
    TermAliasedWithMean {
        /// The term.
        term: String,
    },
    /// The model cannot be fitted.
    #[error(transparent)]
    Fit(#[from] FitError),
    /// The transformed response fails the table checks (not expected).
    #[error(transparent)]
    Data(#[from] DataError),
}

/// The core results of one analysis, ready to render.
#[derive(Debug, Clone, PartialEq)]
pub struct Analysis {
    /// Response name.
    pub response: String,
    /// Transform applied before the analysis.
    pub transform: Transform,
    /// Number of factors.
    pub factor_count: usize,
    /// Runs in the table.
    pub run_count: usize,
    /// Runs without a value.
    pub missing: usize,
    /// Runs excluded.
    pub excluded: usize,
    /// Effects, one per estimable alias chain.
    pub effects: EffectTable,
    /// Lenth's method on the effects, or why it is undefined.
    pub lenth: Result<Lenth, LenthError>,
    /// Half-normal plot data.
    pub half_normal: Vec<HalfNormalPoint>,
    /// Normal probability plot data.
    pub normal: Vec<NormalPoint>,
    /// How the model terms were chosen.
    pub selection: ModelSelection,
    /// Terms added to keep the chosen model hierarchical.
    pub added_for_hierarchy: Vec<Term>,
    /// Notes on the terms (e.g. a term fitted as its chain representative).
    pub term_notes: Vec<String>,
    /// The model fit with its ANOVA.
    pub model: ModelFit,
}

/// Analyses one response: transform, effects, Lenth, half-normal positions, then the model given
/// by `terms` (each mapped to its alias-chain representative) or, when `terms` is `None`, the
/// effects beyond Lenth's ME closed under hierarchy (the main effects when Lenth is undefined).
pub fn analyse(
    obs: &Observations,
    response: &str,
    transform: Transform,
    terms: Option<&[Term]>,
) -> Result<Analysis, AnalysisError> {
    let transformed = transform.apply_column(obs.response())?;
    let obs = obs.with_response(transformed)?;
    let effects = estimate_effects(&obs)?;
    let lenth_result = lenth(&effects.contrasts());
    let hn = half_normal(&effects.effects);
    let normal = normal_probability(&effects.effects);
    let aliasing = &effects.aliasing;

    let mut term_notes = Vec::new();
    let mut chosen: BTreeSet<Term> = BTreeSet::new();
    let selection;
    let mut added = Vec::new();
    match terms {
        Some(given) => {
            selection = ModelSelection::Given;
            for &t in given {
                if t.is_identity() {
                    continue;
                }
                if aliasing.is_aliased_with_mean(t) {
                    return Err(AnalysisError::TermAliasedWithMean { term: t.label() });
                }
                match aliasing.representative_of(t) {
                    Some(rep) if rep.term != t => {
                        term_notes.push(format!("{t} is fitted as its alias {rep}"));
                        chosen.insert(rep.term);
                    }
                    _ => {
                        chosen.insert(t);
                    }
                }
            }
        }
        None => {
            let flagged: Vec<Term> = match &lenth_result {
                Ok(l) => {
                    selection = ModelSelection::LenthMargin;
                    effects
                        .effects
                        .iter()
                        .filter(|e| l.classify(e.effect) != Significance::WithinMe)
                        .map(|e| e.term)
                        .collect()
                }
                Err(_) => {
                    selection = ModelSelection::MainEffects;
                    effects
                        .effects
                        .iter()
                        .filter(|e| e.term.order() == 1)
                        .map(|e| e.term)
                        .collect()
                }
            };
            let flagged_set: BTreeSet<Term> = flagged.iter().copied().collect();
            for t in anova::hierarchical_closure(&flagged) {
                // A lower-order term may be aliased: fit its chain's representative once.
                if aliasing.is_aliased_with_mean(t) {
                    continue;
                }
                let rep = aliasing.representative_of(t).map_or(t, |r| r.term);
                if chosen.insert(rep) && !flagged_set.contains(&rep) {
                    added.push(rep);
                }
            }
        }
    }
    let spec = ModelSpec::new(chosen.into_iter().collect()).hierarchical(false);
    let model = fit_model(&obs, &spec)?;
    let used = obs.used_runs().len();
    let missing = obs.response().iter().filter(|v| v.is_none()).count();
    let excluded = obs.run_count() - used - missing;
    Ok(Analysis {
        response: response.to_string(),
        transform,
        factor_count: obs.factor_count(),
        run_count: obs.run_count(),
        missing,
        excluded,
        effects,
        lenth: lenth_result,
        half_normal: hn,
        normal,
        selection,
        added_for_hierarchy: added,
        term_notes,
        model,
    })
}

fn transform_key(t: Transform) -> String {
    match t {
        Transform::None => "none".into(),
        Transform::Ln => "ln".into(),
        Transform::Log10 => "log10".into(),
        Transform::Sqrt => "sqrt".into(),
        Transform::Inverse => "inverse".into(),
        Transform::Power(l) => format!("power:{l}"),
        // Transforms added later are written as they display.
        other => other.to_string(),
    }
}

fn method_key(m: EffectMethod) -> &'static str {
    match m {
        EffectMethod::FastTransform => "fast_transform",
        EffectMethod::LeastSquares => "least_squares",
        _ => "other",
    }
}

fn significance_key(s: Significance) -> &'static str {
    match s {
        Significance::WithinMe => "within_me",
        Significance::BeyondMe => "beyond_me",
        Significance::BeyondSme => "beyond_sme",
        _ => "other",
    }
}

fn labels(terms: &[Term]) -> Vec<String> {
    terms.iter().map(|t| t.label()).collect()
}

/// The analysis as one JSON object. Keys: `response`, `transform`, `factors`, `runs`, `method`,
/// `defining_relation`, `generators`, `effects` (`term`, `aliases`, `effect`, `coefficient`, `lenth`),
/// `not_estimable`, `confounded_with_blocks`, `lenth` (`pse`, `me`, `sme`, `df`, `s0`, `m`,
/// `t_me`, `t_sme`, `gamma`, or null with `lenth_note`), `half_normal` (`term`, `effect`,
/// `abs_effect`, `rank`, `quantile`), `normal_probability`, `model` (`terms`, `coefficients`
/// in the order of `terms`, `intercept`, `coefficient_details`, `r2`, `adj_r2`, `pred_r2`,
/// `sigma`, `df_residual`, `selection`, `added_for_hierarchy`, `notes`, `unestimable`), `anova`
/// (`source`, `df`, `ss`, `ms`, `f`, `p`) and `curvature` (`ss`, `f`, `p`, or null). Undefined
/// numbers are null.
pub fn analysis_json(a: &Analysis) -> Value {
    let lenth_ok = a.lenth.as_ref().ok();
    let effects: Vec<Value> = a
        .effects
        .effects
        .iter()
        .map(|e| {
            json!({
                "term": e.term.label(),
                "aliases": e.aliases.iter().map(ToString::to_string).collect::<Vec<_>>(),
                "effect": e.effect,
                "coefficient": e.coefficient,
                "lenth": lenth_ok.map(|l| significance_key(l.classify(e.effect))),
            })
        })
        .collect();
    let lenth_value = match &a.lenth {
        Ok(l) => json!({
            "pse": l.pse, "me": l.me, "sme": l.sme, "df": l.df, "s0": l.s0, "m": l.m,
            "t_me": l.t_me, "t_sme": l.t_sme, "gamma": l.gamma,
        }),
        Err(_) => Value::Null,
    };
    let m = &a.model;
    let anova_rows: Vec<Value> = m
        .anova
        .iter()
        .map(|r| {
            json!({
                "source": r.source.to_string(), "df": r.df, "ss": r.ss, "ms": r.ms, "f": r.f,
                "p": r.p,
            })
        })
        .collect();
    let details: Vec<Value> = std::iter::once(&m.intercept)
        .chain(&m.coefficients)
        .map(|c| {
            json!({
                "term": c.term.label(), "estimate": c.estimate, "std_error": c.std_error,
                "t": c.t, "p": c.p,
            })
        })
        .collect();
    let mut obj = json!({
        "response": a.response,
        "transform": transform_key(a.transform),
        "factors": a.factor_count,
        "runs": {
            "total": a.run_count,
            "factorial_used": a.effects.factorial_runs,
            "centre_used": a.effects.centre_runs,
            "missing": a.missing,
            "excluded": a.excluded,
        },
        "method": method_key(a.effects.method),
        "defining_relation": a.effects.aliasing.defining_words().iter().map(ToString::to_string).collect::<Vec<_>>(),
        "generators": a.effects.aliasing.generators().iter().map(|g| g.label()).collect::<Vec<_>>(),
        "effects": effects,
        "not_estimable": labels(&a.effects.not_estimable),
        "confounded_with_blocks": labels(&a.effects.confounded_with_blocks),
        "lenth": lenth_value,
        "half_normal": a.half_normal.iter().map(|p| json!({
            "term": p.term.label(), "effect": p.effect, "abs_effect": p.abs_effect,
            "rank": p.rank, "quantile": p.quantile,
        })).collect::<Vec<_>>(),
        "normal_probability": a.normal.iter().map(|p| json!({
            "term": p.term.label(), "effect": p.effect, "rank": p.rank, "quantile": p.quantile,
        })).collect::<Vec<_>>(),
        "model": {
            "terms": labels(&m.terms),
            "coefficients": m.coefficients.iter().map(|c| c.estimate).collect::<Vec<_>>(),
            "intercept": m.intercept.estimate,
            "coefficient_details": details,
            "r2": m.r2,
            "adj_r2": m.adj_r2,
            "pred_r2": m.pred_r2,
            "sigma": m.sigma,
            "df_residual": m.df_residual,
            "selection": a.selection.key(),
            "added_for_hierarchy": labels(&a.added_for_hierarchy),
            "notes": a.term_notes,
            "unestimable": m.unestimable.iter().map(|u| u.column.to_string()).collect::<Vec<_>>(),
        },
        "anova": anova_rows,
        "curvature": m.curvature.map(|c| json!({ "ss": c.ss, "f": c.f, "p": c.p })),
    });
    if let (Err(e), Some(map)) = (&a.lenth, obj.as_object_mut()) {
        map.insert("lenth_note".into(), Value::String(e.to_string()));
    }
    obj
}

fn num(x: f64) -> String {
    format_number(x)
}

fn opt(x: Option<f64>) -> String {
    x.map_or_else(|| "-".to_string(), format_number)
}

/// The analysis as a readable text report.
pub fn analysis_text(a: &Analysis) -> String {
    let mut s = String::new();
    let e = &a.effects;
    let _ = writeln!(
        s,
        "Response {} ({}); {} factors, {} runs: {} two-level and {} centre runs used, {} missing, {} excluded",
        a.response,
        a.transform,
        a.factor_count,
        a.run_count,
        e.factorial_runs,
        e.centre_runs,
        a.missing,
        a.excluded
    );
    let words = e.aliasing.defining_words();
    if !words.is_empty() {
        let w: Vec<String> = words.iter().map(ToString::to_string).collect();
        let g: Vec<String> = e.aliasing.generators().iter().map(|g| g.label()).collect();
        let _ = writeln!(
            s,
            "Read from the columns: {}; defining relation I = {}",
            g.join(", "),
            w.join(" = ")
        );
    }
    let method = match e.method {
        EffectMethod::FastTransform => "Yates' algorithm",
        _ => "least squares",
    };
    let _ = writeln!(s, "\nEffects ({method})");
    let _ = writeln!(
        s,
        "  {:<8} {:>12} {:>12}  {:<11} aliases",
        "term", "effect", "coefficient", "Lenth"
    );
    for eff in &e.effects {
        let verdict = match &a.lenth {
            Ok(l) => match l.classify(eff.effect) {
                Significance::BeyondSme => "beyond SME",
                Significance::BeyondMe => "beyond ME",
                _ => "",
            },
            Err(_) => "",
        };
        let aliases: Vec<String> = eff.aliases.iter().map(ToString::to_string).collect();
        let _ = writeln!(
            s,
            "  {:<8} {:>12} {:>12}  {:<11} {}",
            eff.term.label(),
            num(eff.effect),
            num(eff.coefficient),
            verdict,
            aliases.join(" = ")
        );
    }
    if !e.not_estimable.is_empty() {
        let _ = writeln!(
            s,
            "Not estimable from the runs at hand: {}",
            labels(&e.not_estimable).join(", ")
        );
    }
    if !e.confounded_with_blocks.is_empty() {
        let _ = writeln!(
            s,
            "Confounded with blocks: {}",
            labels(&e.confounded_with_blocks).join(", ")
        );
    }
    if e.layout_dependent > 0 {
        let _ = writeln!(
            s,
            "The plan is not a regular fraction: {} further chains are partially aliased and not shown",
            e.layout_dependent
        );
    }
    match &a.lenth {
        Ok(l) => {
            let _ = writeln!(
                s,
                "\nLenth: PSE {} (s0 {}, m {}, d {}), ME {}, SME {}",
                num(l.pse),
                num(l.s0),
                l.m,
                num(l.df),
                num(l.me),
                num(l.sme)
            );
        }
        Err(err) => {
            let _ = writeln!(s, "\nLenth: {err}");
        }
    }
    let _ = writeln!(s, "\nHalf-normal plot positions (smallest |effect| first)");
    for p in &a.half_normal {
        let _ = writeln!(
            s,
            "  {:<8} |effect| {:>12}  quantile {}",
            p.term.label(),
            num(p.abs_effect),
            num(p.quantile)
        );
    }
    let m = &a.model;
    let how = match a.selection {
        ModelSelection::Given => "as given",
        ModelSelection::LenthMargin => "effects beyond Lenth's ME, kept hierarchical",
        _ => "main effects, because Lenth's method is undefined",
    };
    let model_terms = if m.terms.is_empty() {
        "mean only".to_string()
    } else {
        labels(&m.terms).join(" + ")
    };
    let _ = writeln!(s, "\nModel: {model_terms} ({how})");
    for note in &a.term_notes {
        let _ = writeln!(s, "  note: {note}");
    }
    if !a.added_for_hierarchy.is_empty() {
        let _ = writeln!(
            s,
            "  added for hierarchy: {}",
            labels(&a.added_for_hierarchy).join(", ")
        );
    }
    for u in &m.unestimable {
        let _ = writeln!(s, "  not estimable in the fit: {}", u.column);
    }
    let _ = writeln!(
        s,
        "  {:<10} {:>12} {:>12} {:>10} {:>10}",
        "term", "coefficient", "std error", "t", "p"
    );
    for c in std::iter::once(&m.intercept).chain(&m.coefficients) {
        let _ = writeln!(
            s,
            "  {:<10} {:>12} {:>12} {:>10} {:>10}",
            if c.term.is_identity() {
                "intercept".to_string()
            } else {
                c.term.label()
            },
            num(c.estimate),
            opt(c.std_error),
            opt(c.t),
            opt(c.p)
        );
    }
    let kind = match m.sums_of_squares_kind {
        SumsOfSquaresKind::Orthogonal => "orthogonal",
        _ => "adjusted",
    };
    let _ = writeln!(s, "\nAnalysis of variance ({kind} sums of squares)");
    let _ = writeln!(
        s,
        "  {:<12} {:>4} {:>12} {:>12} {:>10} {:>10}",
        "source", "df", "SS", "MS", "F", "p"
    );
    for r in &m.anova {
        let _ = writeln!(
            s,
            "  {:<12} {:>4} {:>12} {:>12} {:>10} {:>10}",
            r.source.to_string(),
            r.df,
            num(r.ss),
            opt(r.ms),
            opt(r.f),
            opt(r.p)
        );
    }
    let _ = writeln!(
        s,
        "R² {}, adjusted R² {}, predicted R² {}, sigma {}",
        opt(m.r2),
        opt(m.adj_r2),
        opt(m.pred_r2),
        opt(m.sigma)
    );
    if let Some(c) = &m.curvature {
        let _ = writeln!(
            s,
            "Curvature: SS {}, F {}, p {} ({} centre runs)",
            num(c.ss),
            opt(c.f),
            opt(c.p),
            c.centre_runs
        );
    }
    s
}

/// Turns an analysis error into a one-line message, naming rows through the table.
fn analysis_message(err: &AnalysisError, table: &CodedTable, response: &str) -> String {
    match err {
        AnalysisError::Transform(TransformError::Domain {
            transform,
            needs,
            runs,
        }) => match runs.first() {
            Some((run, value)) => {
                let more = if runs.len() > 1 {
                    format!(" (and {} more)", runs.len() - 1)
                } else {
                    String::new()
                };
                format!(
                    "{}, column `{response}`: {transform} needs {needs} responses, found {value}{more}",
                    table.locate(*run)
                )
            }
            None => err.to_string(),
        },
        AnalysisError::Effects(EffectsError::PartialCentre { run }) => format!(
            "{}: some factors are at 0 and others at -1 or +1; only full centre points (every factor at 0) can be analysed",
            table.locate(*run)
        ),
        AnalysisError::Effects(EffectsError::TooFewRuns { used }) => format!(
            "column `{response}`: only {used} two-level run(s) have a value; at least 2 are needed"
        ),
        AnalysisError::Fit(FitError::TooFewRuns { runs, parameters }) => format!(
            "column `{response}`: the model needs {parameters} parameters but only {runs} runs have a value; choose fewer terms"
        ),
        other => other.to_string(),
    }
}

/// Runs `twofold analyze` with its checked options.
pub fn run(a: AnalyzeArgs, out: &mut dyn Write, err: &mut dyn Write) -> i32 {
    let analysis = match &a.input {
        Input::Csv(path) => analyse_csv(path, &a),
        Input::Project(path) => analyse_project(path, &a),
    };
    let analysis = match analysis {
        Ok(x) => x,
        Err(message) => return bad_input(err, &message),
    };
    let text = if a.json {
        match serde_json::to_string_pretty(&analysis_json(&analysis)) {
            Ok(s) => s + "\n",
            Err(e) => {
                let _ = writeln!(err, "error: could not write the results as JSON: {e}");
                return EXIT_FAILURE;
            }
        }
    } else {
        analysis_text(&analysis)
    };
    match out.write_all(text.as_bytes()) {
        Ok(()) => 0,
        Err(_) => EXIT_FAILURE,
    }
}

/// Reads and analyses a coded table; errors are one-line messages.
fn analyse_csv(path: &std::path::Path, a: &AnalyzeArgs) -> Result<Analysis, String> {
    let bytes = match std::fs::read(path) {
        Ok(b) => b,
        Err(e) => {
            return Err(format!("cannot read `{}`: {e}", path.display()));
        }
    };
    let table = match read_coded_csv(&bytes) {
        Ok(t) => t,
        Err(e) => return Err(format!("{}: {e}", path.display())),
    };
    let index = match &a.response {
        None => 0,
        Some(name) => match table.responses.iter().position(|r| &r.name == name) {
            Some(i) => i,
            None => {
                let names: Vec<&str> = table.responses.iter().map(|r| r.name.as_str()).collect();
                return Err(format!(
                    "unknown response `{name}` (the file has: {})",
                    names.join(", ")
                ));
            }
        },
    };
    let response = table.responses[index].name.clone();
    let terms = match &a.terms {
        None => None,
        Some(list) => {
            let mut v = Vec::new();
            for label in list {
                match Term::parse(label, table.factor_count) {
                    Ok(t) => v.push(t),
                    Err(e) => return Err(format!("--terms: {e}")),
                }
            }
            Some(v)
        }
    };
    let obs = match table.observations(index) {
        Ok(o) => o,
        Err(e) => return Err(format!("column `{response}`: {e}")),
    };
    analyse(
        &obs,
        &response,
        a.transform.unwrap_or_default(),
        terms.as_deref(),
    )
    .map_err(|e| analysis_message(&e, &table, &response))
}

/// Reads a project file and analyses one response of its run sheet the way the window does:
/// the same table (bad and empty cells missing, excluded runs out of the fit), by default the
/// response's chosen transform and model terms (Lenth's choice when none are chosen yet).
fn analyse_project(path: &std::path::Path, a: &AnalyzeArgs) -> Result<Analysis, String> {
    let project = twofold_study::project::load_project(path).map_err(|e| e.to_string())?;
    let index = match &a.response {
        None if project.responses.is_empty() => {
            return Err(format!("project `{}` has no responses", path.display()));
        }
        None => 0,
        Some(name) => project
            .responses
            .iter()
            .position(|r| &r.name == name)
            .ok_or_else(|| {
                let names: Vec<&str> = project.responses.iter().map(|r| r.name.as_str()).collect();
                format!(
                    "unknown response `{name}` (the project has: {})",
                    names.join(", ")
                )
            })?,
    };
    let def = &project.responses[index];
    let k = project.factors.len();
    let data = twofold_study::analysis::response_data(
        &project,
        index,
        twofold_study::project::ResponseTransform::None,
    )
    .map_err(|e| format!("response `{}`: {e}", def.name))?;
    let transform = a
        .transform
        .unwrap_or_else(|| twofold_study::analysis::core_transform(def.model.transform));
    let labels: Option<&[String]> = match &a.terms {
        Some(list) => Some(list),
        None if def.model.terms.is_empty() => None,
        None => Some(&def.model.terms),
    };
    let terms = match labels {
        None => None,
        Some(list) => {
            let mut v = Vec::with_capacity(list.len());
            for label in list {
                v.push(Term::parse(label, k).map_err(|e| format!("model term: {e}"))?);
            }
            if a.terms.is_none() && def.model.hierarchical {
                v = anova::hierarchical_closure(&v);
            }
            Some(v)
        }
    };
    analyse(&data.raw, &def.name, transform, terms.as_deref()).map_err(|e| e.to_string())
}

fn bad_input(err: &mut dyn Write, message: &str) -> i32 {
    // One line, whatever the message holds.
    let line = message.replace(['\n', '\r'], " ");
    let _ = writeln!(err, "error: {line}");
    EXIT_BAD_INPUT
}
