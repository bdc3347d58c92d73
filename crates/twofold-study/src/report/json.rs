//! A report as one JSON object (the output of `twofold analyze --json`).

use serde_json::{Value, json};
use twofold_core::effects::EffectMethod;
use twofold_core::lenth::Significance;
use twofold_core::term::Term;
use twofold_core::transform::Transform;

use super::Report;

/// The transform's key in JSON (`none`, `ln`, `log10`, `sqrt`, `inverse`, `power:λ`).
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

/// Labels of terms.
pub(super) fn labels(terms: &[Term]) -> Vec<String> {
    terms.iter().map(|t| t.label()).collect()
}

/// The report as one JSON object, or why it cannot be written (no effects or no fit).
///
/// Keys: `response`, `transform`, `factors`, `runs` (`total`, `factorial_used`, `centre_used`,
/// `missing`, `excluded`), `method`, `defining_relation`, `generators`, `effects` (`term`,
/// `aliases`, `effect`, `coefficient`, `lenth`), `not_estimable`, `effects_left_out` (chains not
/// tried, to keep the work bounded), `confounded_with_blocks`,
/// `lenth` (`pse`, `me`, `sme`, `df`, `s0`, `m`, `t_me`, `t_sme`, `gamma`, or null with
/// `lenth_note`), `half_normal` (`term`, `effect`, `abs_effect`, `rank`, `quantile`),
/// `normal_probability`, `error_basis` (`pure_error`, `residual` or `lenth_pse`: which error the
/// tests use), `pure_error` (`ss`, `df`, `ms`, or null), `model` (`terms`, `coefficients` in the
/// order of `terms`, `intercept`, `coefficient_details`, `r2`, `adj_r2`, `pred_r2`, `sigma`,
/// `df_residual`, `selection`, `added_for_hierarchy`, `notes`, `unestimable`, `term_tests`:
/// `term`, `ss`, `f`, `p` against pure error when the default terms were chosen by them),
/// `anova` (`source`, `df`, `ss`, `ms`, `f`, `p`), `curvature` (`ss`, `f`, `p`, `error`,
/// `df_error`, `factorial_minus_centre`, `centre_runs`, or null; `f` and `p` against the error
/// named by `error`), `warnings`, and for a study with axial runs `quadratic` (see
/// [`super::quadratic::quadratic_json`]). Undefined numbers are null.
pub fn report_json(r: &Report) -> Result<Value, String> {
    serde_json::to_value(report_json_stream(r)?).map_err(|e| e.to_string())
}

/// The report as [`report_json`] writes it, but ready to be written out without building the
/// long arrays (`effects`, `half_normal`, `normal_probability`: one entry per alias chain, 65 535
/// for a 2^16) as a value tree first: serialise it straight to the output. The keys come out in
/// the same (sorted) order and with the same values as [`report_json`], which is this one turned
/// into a value.
pub fn report_json_stream(r: &Report) -> Result<ReportJson<'_>, String> {
    let e = r.effects.as_ref().map_err(Clone::clone)?;
    let m = r.fit.as_ref().map_err(Clone::clone)?;
    let choice = r.choice.as_ref().map_err(Clone::clone)?;
    let lenth_value = match r.lenth.as_ref().ok() {
        Some(l) => json!({
            "pse": l.pse, "me": l.me, "sme": l.sme, "df": l.df, "s0": l.s0, "m": l.m,
            "t_me": l.t_me, "t_sme": l.t_sme, "gamma": l.gamma,
        }),
        None => Value::Null,
    };
    let anova_rows: Vec<Value> = r
        .anova_rows()
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
    let mut added = choice.added_for_hierarchy.clone();
    added.extend(m.added_for_hierarchy.iter().copied());
    let excluded = r
        .total_runs
        .saturating_sub(r.used_runs)
        .saturating_sub(r.values_missing);
    let mut obj = json!({
        "response": r.response_name,
        "transform": transform_key(r.transform),
        "factors": r.factor_count,
        "runs": {
            "total": r.total_runs,
            "factorial_used": e.factorial_runs,
            "centre_used": e.centre_runs,
            "missing": r.values_missing,
            "excluded": excluded,
        },
        "method": method_key(e.method),
        "defining_relation": e.aliasing.defining_words().iter().map(ToString::to_string).collect::<Vec<_>>(),
        "generators": e.aliasing.generators().iter().map(|g| g.label()).collect::<Vec<_>>(),
        "not_estimable": labels(&e.not_estimable),
        "effects_left_out": e.left_out,
        "confounded_with_blocks": labels(&e.confounded_with_blocks),
        "lenth": lenth_value,
        "error_basis": r.error_basis.key(),
        "pure_error": r.pure_error.map(|pe| json!({ "ss": pe.ss, "df": pe.df, "ms": pe.ms })),
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
            "selection": choice.selection.key(),
            "added_for_hierarchy": labels(&added),
            "notes": choice.notes,
            "unestimable": m.unestimable.iter().map(|u| u.column.to_string()).collect::<Vec<_>>(),
            "term_tests": choice.tests.iter().map(|t| json!({
                "term": t.term.label(), "ss": t.ss, "f": t.f, "p": t.p,
            })).collect::<Vec<_>>(),
        },
        "anova": anova_rows,
        "curvature": r.curvature.map(|c| json!({
            "ss": c.ss, "f": c.f, "p": c.p, "error": c.basis.key(), "df_error": c.df_error,
            "factorial_minus_centre": c.factorial_minus_centre, "centre_runs": c.centre_runs,
        })),
        "warnings": r.warnings.iter().map(|w| w.text.clone()).collect::<Vec<_>>(),
    });
    if let (Some(q), Some(map)) = (&r.quadratic, obj.as_object_mut()) {
        map.insert("quadratic".into(), super::quadratic::quadratic_json(q));
    }
    if let (Err(e), Some(map)) = (&r.lenth, obj.as_object_mut()) {
        map.insert("lenth_note".into(), Value::String(e.clone()));
    }
    if let Some(strata) = &r.strata {
        add_strata(&mut obj, strata);
    }
    let small = match obj {
        Value::Object(map) => map,
        _ => serde_json::Map::new(),
    };
    Ok(ReportJson { small, report: r })
}

/// A report's JSON object, written entry by entry (see [`report_json_stream`]).
#[derive(Debug)]
pub struct ReportJson<'a> {
    small: serde_json::Map<String, Value>,
    report: &'a Report,
}

impl ReportJson<'_> {
    /// Adds a key beside the report's own (e.g. `follow_up`).
    pub fn insert(&mut self, key: &str, value: Value) {
        self.small.insert(key.into(), value);
    }
}

/// The long arrays written from the report itself.
#[derive(Clone, Copy)]
enum LongKey {
    Effects,
    HalfNormal,
    NormalProbability,
}

impl LongKey {
    /// In the order of their keys.
    const ALL: [LongKey; 3] = [Self::Effects, Self::HalfNormal, Self::NormalProbability];

    fn key(self) -> &'static str {
        match self {
            Self::Effects => "effects",
            Self::HalfNormal => "half_normal",
            Self::NormalProbability => "normal_probability",
        }
    }
}

#[derive(serde::Serialize)]
struct EffectRow {
    aliases: Vec<String>,
    coefficient: f64,
    effect: f64,
    lenth: Option<&'static str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    stratum: Option<&'static str>,
    term: String,
}

#[derive(serde::Serialize)]
struct HalfNormalRow {
    abs_effect: f64,
    effect: f64,
    quantile: f64,
    rank: usize,
    term: String,
}

#[derive(serde::Serialize)]
struct NormalRow {
    effect: f64,
    quantile: f64,
    rank: usize,
    term: String,
}

/// One of the long arrays, its entries made as they are written.
struct Long<'a>(LongKey, &'a Report);

impl serde::Serialize for Long<'_> {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeSeq;
        let r = self.1;
        match self.0 {
            LongKey::Effects => {
                let Ok(table) = r.effects.as_ref() else {
                    return s.serialize_seq(Some(0))?.end();
                };
                let lenth = r.lenth.as_ref().ok();
                let strata = r.strata.as_ref().map(|st| &st.of_effect);
                let mut seq = s.serialize_seq(Some(table.effects.len()))?;
                for (i, e) in table.effects.iter().enumerate() {
                    seq.serialize_element(&EffectRow {
                        aliases: e.aliases.iter().map(ToString::to_string).collect(),
                        coefficient: e.coefficient,
                        effect: e.effect,
                        lenth: lenth.map(|l| significance_key(l.classify(e.effect))),
                        stratum: strata.and_then(|of| of.get(i)).map(|st| st.key()),
                        term: e.term.label(),
                    })?;
                }
                seq.end()
            }
            LongKey::HalfNormal => {
                let mut seq = s.serialize_seq(Some(r.half_normal.len()))?;
                for p in &r.half_normal {
                    seq.serialize_element(&HalfNormalRow {
                        abs_effect: p.abs_effect,
                        effect: p.effect,
                        quantile: p.quantile,
                        rank: p.rank,
                        term: p.term.label(),
                    })?;
                }
                seq.end()
            }
            LongKey::NormalProbability => {
                let mut seq = s.serialize_seq(Some(r.normal.len()))?;
                for p in &r.normal {
                    seq.serialize_element(&NormalRow {
                        effect: p.effect,
                        quantile: p.quantile,
                        rank: p.rank,
                        term: p.term.label(),
                    })?;
                }
                seq.end()
            }
        }
    }
}

impl serde::Serialize for ReportJson<'_> {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeMap;
        // Both key lists are sorted (the map's keys by its order, the long ones as written):
        // merge them so the output is in the order of a value tree's map.
        let mut map = s.serialize_map(Some(self.small.len() + LongKey::ALL.len()))?;
        let mut long = LongKey::ALL.iter().copied().peekable();
        for (k, v) in &self.small {
            while let Some(l) = long.next_if(|l| l.key() < k.as_str()) {
                map.serialize_entry(l.key(), &Long(l, self.report))?;
            }
            map.serialize_entry(k, v)?;
        }
        for l in long {
            map.serialize_entry(l.key(), &Long(l, self.report))?;
        }
        map.end()
    }
}

/// A split-plot study: each effect gains `stratum` (`whole_plot` or `subplot`), and
/// `lenth_by_stratum` gives each stratum's `pse`, `me`, `sme` and `m` (null with a `note` when
/// the stratum has too few contrasts); `whole_plots` counts them.
fn add_strata(obj: &mut Value, strata: &super::Strata) {
    let mut by = serde_json::Map::new();
    for (s, l) in &strata.lenth {
        by.insert(
            s.key().into(),
            match l {
                Ok(l) => json!({ "pse": l.pse, "me": l.me, "sme": l.sme, "m": l.m }),
                Err(e) => json!({ "pse": null, "me": null, "sme": null, "note": e }),
            },
        );
    }
    let anova = match &strata.anova {
        None => Value::Null,
        Some(Err(why)) => json!({ "note": why }),
        Some(Ok(a)) => json!({
            "whole_plot_error": { "ss": a.whole_plot_error.ss, "df": a.whole_plot_error.df, "ms": a.whole_plot_error.ms },
            "subplot_error": { "ss": a.subplot_error.ss, "df": a.subplot_error.df, "ms": a.subplot_error.ms },
            "terms": a.terms.iter().map(|t| json!({
                "term": t.term.label(),
                "stratum": t.stratum.key(),
                "coefficient": t.coefficient,
                "ss": t.ss,
                "f": t.f,
                "p": t.p,
            })).collect::<Vec<_>>(),
        }),
    };
    if let Some(map) = obj.as_object_mut() {
        map.insert("split_plot_anova".into(), anova);
        map.insert("lenth_by_stratum".into(), Value::Object(by));
        map.insert("whole_plots".into(), Value::from(strata.whole_plots));
    }
}

/// The follow-up options as the `follow_up` array of `twofold analyze --json`, suggested first:
/// `kind` (`fold_full`, `fold_A`, ..., `semifold_A_B+` (half the fold-over on A: the runs with B
/// at +), ..., `separate`, `centre_points`, `replicate`, `axial`), `title`, `runs_added`,
/// `resolves` (sentences), `resolution_after` (fold-overs; null otherwise or for a full
/// factorial), `suggested`, `reason` (null unless suggested) and `unavailable` (why it cannot be
/// added, or null).
pub fn follow_up_json(options: &[super::NextRun]) -> Value {
    Value::Array(
        options
            .iter()
            .map(|n| {
                json!({
                    "kind": n.key(),
                    "title": n.title,
                    "runs_added": n.runs_added(),
                    "resolves": n.resolves,
                    "resolution_after": n.resolution_after,
                    "suggested": n.suggested,
                    "reason": n.reason,
                    "unavailable": n.preview.as_ref().err(),
                })
            })
            .collect(),
    )
}
