//! `twofold plan --fold semifold:A[:B+]` and `twofold plan --augment "separate:AB,CE"`: a
//! fraction with a follow-up block that is not a regular fraction, the same block the window's
//! "What to run next" step adds (the engine's sentences, the core's runs).
//!
//! - `semifold:A` keeps half of the fold-over on A: by default the fold-over runs with the first
//!   factor other than A at + (for `semifold:full`, A at +); `semifold:A:C-` keeps those with C
//!   at − instead (Mee & Peralta 2000, *Technometrics* 42(2)).
//! - `separate:AB,CE` adds the fewest runs, chosen from the full factorial, that estimate every
//!   main effect and the named interactions together, D-optimal for that model.

use serde_json::{Value, json};
use twofold_core::augment::separate_interactions;
use twofold_core::estimability::{Estimability, TermEstimability};
use twofold_core::foldover::FoldKind;
use twofold_core::plan::{Plan, PlanSpec, build_added_block_plan, build_plan};
use twofold_core::semifold::{SemiFold, semifold};
use twofold_core::term::{LETTERS, Term, factor_index};
use twofold_study::project::parse_interactions;
use twofold_study::report::next_runs_added::{semifold_words, separate_words};

use super::plan::PlanArgs;

/// A follow-up block asked for on the command line.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum FollowRequest {
    /// Half a fold-over.
    Semi(SemiFold),
    /// Runs to separate these interactions.
    Separate(Vec<Term>),
}

/// The follow-up block planned, for the text and JSON output.
#[derive(Debug, Clone)]
pub(crate) struct FollowPlan {
    kind: &'static str,
    label: String,
    description: String,
    added_runs: Vec<Vec<i8>>,
    estimability: Estimability,
    separated: Vec<(Term, Term)>,
    not_separated: Vec<(Term, Term)>,
    resolves: Vec<String>,
}

/// Whether `--fold` asks for a semifold.
pub(crate) fn is_semifold(text: &str) -> bool {
    text.trim()
        .get(..8)
        .is_some_and(|s| s.eq_ignore_ascii_case("semifold"))
}

fn letter_index(text: &str, k: usize) -> Option<usize> {
    let mut chars = text.chars();
    match (chars.next(), chars.next()) {
        (Some(c), None) => factor_index(c.to_ascii_uppercase()).filter(|&i| i < k),
        _ => None,
    }
}

/// The follow-up block `--fold semifold:...` or `--augment separate:...` asks for, if any.
pub(crate) fn parse(a: &PlanArgs, k: usize) -> Result<Option<FollowRequest>, String> {
    let semi = a.fold.as_deref().filter(|t| is_semifold(t));
    let augment = a.augment.as_deref();
    if a.fold.is_some() && augment.is_some() {
        return Err(
            "give --fold or --augment, not both: the sheet holds one follow-up block".into(),
        );
    }
    if (semi.is_some() || augment.is_some()) && (a.sigma.is_some() || a.hard_to_change.is_some()) {
        return Err(
            "--sigma and --hard-to-change are not offered with a semifold or added runs yet".into(),
        );
    }
    if let Some(text) = semi {
        return parse_semifold(text.trim(), k).map(|s| Some(FollowRequest::Semi(s)));
    }
    let Some(text) = augment else {
        return Ok(None);
    };
    let t = text.trim();
    if t.eq_ignore_ascii_case("axial") {
        // The axial block: `plan_axial`.
        return Ok(None);
    }
    let Some(list) = t
        .get(..9)
        .filter(|p| p.eq_ignore_ascii_case("separate:"))
        .and_then(|_| t.get(9..))
    else {
        return Err(format!(
            "--augment `{t}`: expected `axial`, or `separate:` and two-factor interactions, e.g. separate:AB,CE"
        ));
    };
    parse_interactions(list, k)
        .map(|terms| Some(FollowRequest::Separate(terms)))
        .map_err(|e| format!("--augment: {e}"))
}

fn parse_semifold(text: &str, k: usize) -> Result<SemiFold, String> {
    let bad = || {
        format!(
            "--fold `{text}`: expected semifold:A, semifold:A:B+ or semifold:full[:B-] with factor letters A..{}",
            LETTERS[k - 1]
        )
    };
    let parts: Vec<&str> = text.split(':').map(str::trim).collect();
    let fold = match parts.get(1) {
        Some(p) if p.eq_ignore_ascii_case("full") => FoldKind::Full,
        Some(p) => FoldKind::Factor(letter_index(p, k).ok_or_else(bad)?),
        None => return Err(bad()),
    };
    let mut spec = SemiFold::with_default_half(fold);
    match parts.get(2) {
        None => {}
        Some(half) => {
            let mut chars = half.chars();
            let sign = chars.next_back();
            spec.keep = letter_index(chars.as_str(), k).ok_or_else(bad)?;
            spec.level = match sign {
                Some('+') => 1,
                Some('-' | '−') => -1,
                _ => return Err(bad()),
            };
        }
    }
    if parts.len() > 3 {
        return Err(bad());
    }
    Ok(spec)
}

/// Plans the fraction of `spec` with the follow-up block of `request`.
pub(crate) fn plan(request: &FollowRequest, spec: &PlanSpec) -> Result<(Plan, FollowPlan), String> {
    let design = &spec.design;
    let k = design.factor_count();
    let follow = match request {
        FollowRequest::Semi(s) => {
            let sf = semifold(design, *s).map_err(|e| format!("--fold: {e}"))?;
            FollowPlan {
                kind: "semifold",
                label: s.label(),
                description: s.describe(),
                resolves: semifold_words(design, &sf),
                added_runs: sf.follow_up_runs,
                estimability: sf.estimability,
                separated: sf.separated,
                not_separated: sf.not_separated,
            }
        }
        FollowRequest::Separate(terms) => {
            if spec.replicates > 1 {
                return Err(
                    "--augment: runs to separate interactions are added to an unreplicated design"
                        .into(),
                );
            }
            let base = build_plan(spec).map_err(|e| e.to_string())?;
            let rows: Vec<Vec<i8>> = base.runs.iter().map(|r| r.levels.clone()).collect();
            let blocks: Vec<u32> = base.runs.iter().map(|r| r.block).collect();
            let a = separate_interactions(&rows, &blocks, k, terms, spec.centre_points)
                .map_err(|e| format!("--augment: {e}"))?;
            let names: Vec<String> = terms.iter().map(|t| t.label()).collect();
            FollowPlan {
                kind: "separate",
                label: format!("separate:{}", names.join(",")),
                description: format!(
                    "{} runs chosen to separate {}",
                    a.added_runs.len(),
                    names.join(", ")
                ),
                resolves: separate_words(k, &a),
                added_runs: a.added_runs,
                estimability: a.estimability,
                separated: Vec::new(),
                not_separated: Vec::new(),
            }
        }
    };
    let plan = build_added_block_plan(spec, &follow.added_runs).map_err(|e| e.to_string())?;
    Ok((plan, follow))
}

fn term_json(t: &TermEstimability) -> Value {
    json!({
        "term": t.term.label(),
        "estimable": t.estimable,
        "variance_inflation": t.variance_inflation,
    })
}

fn pairs(list: &[(Term, Term)]) -> Vec<[String; 2]> {
    list.iter().map(|(a, b)| [a.label(), b.label()]).collect()
}

impl FollowPlan {
    /// The runs of the follow-up block, coded.
    pub(crate) fn added_runs(&self) -> &[Vec<i8>] {
        &self.added_runs
    }

    /// Adds `follow_up` to the plan's JSON object: `kind` (`semifold` or `separate`), `label`,
    /// `description`, `runs_added`, `added_runs` (coded, block 2), `estimable` (each model term
    /// with whether the combined runs estimate it and its variance inflation), `d_efficiency`,
    /// `separated` and `not_separated` (main effect and two-factor interaction pairs aliased in
    /// the fraction; full semifolds), `resolves` (sentences).
    pub(crate) fn add_json(&self, plan: &mut Value) {
        let value = json!({
            "kind": self.kind,
            "label": self.label,
            "description": self.description,
            "runs_added": self.added_runs.len(),
            "added_runs": self.added_runs,
            "estimable": self.estimability.terms.iter().map(term_json).collect::<Vec<_>>(),
            "model_estimable": self.estimability.full_rank(),
            "d_efficiency": self.estimability.d_efficiency,
            "separated": pairs(&self.separated),
            "not_separated": pairs(&self.not_separated),
            "resolves": self.resolves,
        });
        if let Some(map) = plan.as_object_mut() {
            map.insert("follow_up".into(), value);
        }
    }

    /// The lines of the text output.
    pub(crate) fn text_lines(&self) -> Vec<String> {
        let mut out = vec![format!(
            "Follow-up: {}; block 2 holds its {} runs (the alias chains above are the fraction's: with block 2 the runs are not a regular fraction)",
            self.description,
            self.added_runs.len()
        )];
        out.extend(self.resolves.iter().map(|s| format!("  {s}")));
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn args(fold: Option<&str>, augment: Option<&str>) -> PlanArgs {
        PlanArgs {
            fold: fold.map(String::from),
            augment: augment.map(String::from),
            ..PlanArgs::default()
        }
    }

    #[test]
    fn semifold_and_separate_requests_are_read_and_bad_ones_refused() {
        let semi = |t: &str| parse(&args(Some(t), None), 6);
        assert_eq!(
            semi("semifold:A"),
            Ok(Some(FollowRequest::Semi(SemiFold {
                fold: FoldKind::Factor(0),
                keep: 1,
                level: 1
            })))
        );
        assert_eq!(
            semi("semifold:c:A-"),
            Ok(Some(FollowRequest::Semi(SemiFold {
                fold: FoldKind::Factor(2),
                keep: 0,
                level: -1
            })))
        );
        assert_eq!(
            semi("Semifold:full"),
            Ok(Some(FollowRequest::Semi(SemiFold {
                fold: FoldKind::Full,
                keep: 0,
                level: 1
            })))
        );
        assert_eq!(semi("full"), Ok(None));
        for bad in ["semifold", "semifold:Z", "semifold:A:B", "semifold:A:B+:C"] {
            assert!(semi(bad).is_err(), "{bad}");
        }
        let sep = parse(&args(None, Some("separate:AB, CE")), 6).unwrap();
        assert_eq!(
            sep,
            Some(FollowRequest::Separate(vec![
                Term::parse("AB", 6).unwrap(),
                Term::parse("CE", 6).unwrap()
            ]))
        );
        assert!(parse(&args(None, Some("AB,CE")), 6).is_err());
        assert!(parse(&args(Some("A"), Some("separate:AB")), 6).is_err());
    }
}
