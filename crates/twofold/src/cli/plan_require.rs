//! `twofold plan --require "AB,CE"`: the design of least aberration that keeps the named
//! two-factor interactions clear, from `twofold_core::search::required`.

use serde_json::Value;
use std::time::Duration;
use twofold_core::alias::AliasReport;
use twofold_core::design::FractionalDesign;
use twofold_core::search::{SearchBudget, design_keeping_clear, parse_required};
use twofold_core::term::Term;

/// The interactions of `--require` for k factors (empty without the option).
pub(crate) fn parse(text: Option<&str>, k: usize) -> Result<Vec<Term>, String> {
    match text {
        None => Ok(Vec::new()),
        Some(t) => parse_required(t, k).map_err(|e| format!("--require: {e}")),
    }
}

/// The design the search chooses for `required`, and whether every search finished (the design
/// is then of least aberration among those keeping them clear, and no smaller run size tried
/// has one).
pub(crate) fn design(
    k: usize,
    required: &[Term],
    runs: Option<usize>,
    seconds: f64,
) -> Result<(FractionalDesign, Option<bool>), String> {
    let budget = SearchBudget::new(Duration::from_secs_f64(seconds));
    let outcome = design_keeping_clear(k, required, runs, &budget).map_err(|e| e.to_string())?;
    let finished = outcome.finished();
    Ok((outcome.design, Some(finished)))
}

/// Whether every required interaction is clear in the aliasing the plan reports.
fn all_clear(required: &[Term], report: &AliasReport) -> bool {
    required
        .iter()
        .all(|t| report.clear_two_factor_interactions.contains(t))
}

/// Adds `required` and `required_clear` to the plan's JSON when `--require` was given.
pub(crate) fn add_json(plan: &mut Value, required: &[Term], report: &AliasReport) {
    if required.is_empty() {
        return;
    }
    if let Value::Object(map) = plan {
        let labels: Vec<String> = required.iter().map(|t| t.label()).collect();
        map.insert("required".into(), Value::from(labels));
        map.insert(
            "required_clear".into(),
            Value::from(all_clear(required, report)),
        );
    }
}

/// The line of the text report about `--require`, when it was given.
pub(crate) fn text_line(required: &[Term], report: &AliasReport) -> Option<String> {
    if required.is_empty() {
        return None;
    }
    let labels: Vec<String> = required.iter().map(|t| t.label()).collect();
    let verdict = if all_clear(required, report) {
        "each clear of main effects and other two-factor interactions"
    } else {
        "NOT all clear in this design"
    };
    Some(format!(
        "Required interactions: {} ({verdict})",
        labels.join(", ")
    ))
}
