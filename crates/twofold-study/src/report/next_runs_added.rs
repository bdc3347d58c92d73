//! The follow-up options whose runs are not a regular fraction: semifolds (half a fold-over,
//! Mee & Peralta 2000, *Technometrics* 42(2)) and runs chosen to separate named two-factor
//! interactions (D-optimal augmentation). What each resolves is worked out by least squares on
//! the combined runs ([`twofold_core::estimability`]), not from alias chains.

use twofold_core::design::FractionalDesign;
use twofold_core::foldover::FoldKind;
use twofold_core::semifold::{SemiFold, SemiFoldOver, semifold};
use twofold_core::term::{LETTERS, Term};

use super::next_runs::NextRun;
use crate::project::{FollowUp, Project, parse_interactions};

fn letter(f: usize) -> char {
    LETTERS.get(f).copied().unwrap_or('?')
}

fn join(terms: &[Term]) -> String {
    terms
        .iter()
        .map(|t| t.label())
        .collect::<Vec<_>>()
        .join(", ")
}

fn number(v: f64) -> String {
    crate::numbers::fixed(v, 2)
}

/// The short key of a non-regular follow-up (`semifold_A_B+`, `separate`), `None` for others.
pub(crate) fn key(follow_up: &FollowUp) -> Option<String> {
    match follow_up {
        FollowUp::SemiFold(s) => Some(s.label().replace(':', "_")),
        FollowUp::Separate(_) => Some("separate".into()),
        _ => None,
    }
}

/// One semifold option per fold-over that breaks a defining word, each with its default half
/// ([`SemiFold::with_default_half`]).
pub(crate) fn semifold_options(project: &Project, fraction: &FractionalDesign) -> Vec<NextRun> {
    let k = project.factors.len();
    std::iter::once(FoldKind::Full)
        .chain((0..k).map(FoldKind::Factor))
        .filter_map(|kind| semifold_run(project, fraction, SemiFold::with_default_half(kind)).ok())
        .collect()
}

/// The halves a semifold of `fold` can keep in a design of `k` factors: each factor other than
/// the folded one at + then at −, the default half ([`SemiFold::with_default_half`]) first.
pub fn semifold_halves(fold: FoldKind, k: usize) -> Vec<SemiFold> {
    let default = SemiFold::with_default_half(fold);
    let mut out = vec![default];
    for keep in (0..k).filter(|&f| fold != FoldKind::Factor(f)) {
        for level in [1, -1] {
            let s = SemiFold { fold, keep, level };
            if s != default {
                out.push(s);
            }
        }
    }
    out
}

/// The semifold option of `project` that keeps the half `spec` names (the window's choice of
/// half, the same block `twofold plan --fold semifold:A:B+` plans), or why there is none.
pub fn semifold_option(project: &Project, spec: SemiFold) -> Result<NextRun, String> {
    use crate::project::regenerate::{fraction_of, hard_to_change_of};
    if project.design.screening_runs().is_some() {
        return Err("a screening design is followed up by its full fold-over only".into());
    }
    let fraction = fraction_of(
        project.factors.len(),
        &project.design,
        &hard_to_change_of(project),
    )
    .map_err(|e| e.to_string())?;
    semifold_run(project, &fraction, spec)
}

/// The option of the semifold `spec` of `fraction`, with its title, sentences and sheet.
fn semifold_run(
    project: &Project,
    fraction: &FractionalDesign,
    spec: SemiFold,
) -> Result<NextRun, String> {
    let s = semifold(fraction, spec).map_err(|e| e.to_string())?;
    let name = |f: usize| project.factors.get(f).map_or("", |x| x.name.as_str());
    let title = match spec.fold {
        FoldKind::Full => format!(
            "Full semifold (every sign switched, half the runs: {} at {})",
            letter(spec.keep),
            sign(spec.level)
        ),
        FoldKind::Factor(f) => format!(
            "Semifold on {} ({}), half the runs: {} at {}",
            letter(f),
            name(f),
            letter(spec.keep),
            sign(spec.level)
        ),
    };
    let follow_up = FollowUp::SemiFold(spec);
    Ok(NextRun {
        preview: project
            .preview_follow_up(follow_up.clone())
            .map_err(|e| e.to_string()),
        follow_up,
        title,
        resolves: semifold_words(fraction, &s),
        resolution_after: None,
        suggested: false,
        reason: None,
    })
}

/// A half in words for a chooser: `B at +`.
pub fn half_words(spec: &SemiFold) -> String {
    format!("{} at {}", letter(spec.keep), sign(spec.level))
}

fn sign(level: i8) -> char {
    if level > 0 { '+' } else { '−' }
}

/// What a semifold resolves, in sentences.
pub fn semifold_words(fraction: &FractionalDesign, s: &SemiFoldOver) -> Vec<String> {
    let n = fraction.base_runs();
    let mut out = vec![format!(
        "Adds {} runs as block 2 instead of the fold-over's {n}: {} base runs in all, not a regular fraction (Mee & Peralta 2000).",
        s.follow_up_runs.len(),
        s.combined_runs.len()
    )];
    match s.spec.fold {
        FoldKind::Factor(f) => {
            let inter = s.folded_interactions();
            let ok: Vec<Term> = inter
                .iter()
                .filter(|t| t.estimable)
                .map(|t| t.term)
                .collect();
            let not: Vec<Term> = inter
                .iter()
                .filter(|t| !t.estimable)
                .map(|t| t.term)
                .collect();
            let worst = inter
                .iter()
                .filter_map(|t| t.variance_inflation)
                .fold(1.0, f64::max);
            if !ok.is_empty() {
                out.push(format!(
                    "Makes {}'s two-factor interactions {} estimable, as the full fold-over on {} does, though not orthogonally (variance inflation up to {}).",
                    letter(f),
                    join(&ok),
                    letter(f),
                    number(worst)
                ));
            }
            if !not.is_empty() {
                out.push(format!(
                    "Leaves {} not estimable in the model of the full fold-over on {}.",
                    join(&not),
                    letter(f)
                ));
            }
            let e = &s.estimability;
            out.push(if e.full_rank() {
                format!(
                    "Estimates the {} terms the full fold-over on {} estimates (every main effect and one two-factor interaction per chain), D-efficiency {}.",
                    e.terms.len(),
                    letter(f),
                    e.d_efficiency.map_or_else(|| "—".into(), number)
                )
            } else {
                format!(
                    "Estimates {} of the {} parameters of the full fold-over's model.",
                    e.rank, e.parameters
                )
            });
        }
        FoldKind::Full => {
            let total = s.separated.len() + s.not_separated.len();
            out.push(format!(
                "Separates {} of the {total} pairs of a main effect and a two-factor interaction aliased in the fraction.",
                s.separated.len()
            ));
            if !s.not_separated.is_empty() {
                let pairs: Vec<String> = s
                    .not_separated
                    .iter()
                    .map(|(a, b)| format!("{} = {}", a.label(), b.label()))
                    .collect();
                out.push(format!("Still aliased: {}.", pairs.join("; ")));
            }
        }
    }
    out
}

/// The option of runs to separate the interactions typed in `text` (e.g. `AB, CE`), or why
/// there is none. With `report`, the two-factor interactions its model treats as active join
/// the named ones, so the added runs keep them estimable too.
pub fn separate_option(
    project: &Project,
    text: &str,
    report: Option<&super::Report>,
) -> Result<NextRun, String> {
    let k = project.factors.len();
    let named = parse_interactions(text, k)?;
    let kept: Vec<Term> = report
        .map(super::next_runs::active_terms)
        .unwrap_or_default()
        .into_iter()
        .filter(|t| t.order() == 2 && !named.contains(t))
        .collect();
    let mut terms = named.clone();
    terms.extend(kept.iter().copied());
    let follow_up = FollowUp::Separate(terms.clone());
    // One search: the preview's runs and the sentences come from the same result.
    let (preview, resolves) = match project.preview_follow_up_with(follow_up.clone()) {
        Ok((p, a)) => (Ok(p), a.map(|a| separate_words(k, &a)).unwrap_or_default()),
        Err(e) => (Err(e.to_string()), Vec::new()),
    };
    Ok(NextRun {
        follow_up,
        title: if kept.is_empty() {
            format!("Runs to separate {}", join(&named))
        } else {
            format!(
                "Runs to separate {} (keeping {} of the model)",
                join(&named),
                join(&kept)
            )
        },
        resolves,
        resolution_after: None,
        preview,
        suggested: false,
        reason: None,
    })
}

/// What runs chosen to separate interactions resolve, in sentences.
pub fn separate_words(k: usize, a: &twofold_core::augment::Augmentation) -> Vec<String> {
    let mut out = vec![format!(
        "Adds {} runs as block 2, chosen from the {} settings of the full factorial to make |XᵀX| largest for every main effect and {} together (D-optimal augmentation).",
        a.added_runs.len(),
        1u64 << k,
        join(&a.interactions)
    )];
    for &t in &a.interactions {
        let before = a.before.get(t).is_some_and(|x| x.estimable);
        let after = a.estimability.get(t);
        let vif = after
            .and_then(|x| x.variance_inflation)
            .map_or_else(|| "—".into(), number);
        out.push(if before {
            format!(
                "{} was already estimable beside the others; variance inflation after: {vif}.",
                t.label()
            )
        } else {
            format!(
                "{} becomes estimable beside the others (variance inflation {vif}).",
                t.label()
            )
        });
    }
    if let Some(d) = a.estimability.d_efficiency {
        out.push(format!(
            "D-efficiency of all the runs for that model: {}.",
            number(d)
        ));
    }
    out
}

/// The follow-up block of `project` in words for the summary page: what it is and, for a block
/// that is not a regular fraction, what the combined runs estimate; `None` without one.
pub fn follow_up_facts(project: &Project) -> Option<String> {
    use crate::project::AddedBlock;
    use crate::project::regenerate::fraction_of;
    let d = &project.design;
    let k = project.factors.len();
    if let Some(kind) = d.fold {
        let what = match kind {
            FoldKind::Full => "the full fold-over (every sign switched)".to_string(),
            FoldKind::Factor(f) => format!("the fold-over on {} (its signs switched)", letter(f)),
        };
        return Some(format!("block 2 holds {what}."));
    }
    let block = d.added.as_ref()?;
    let mut text = format!("block 2 holds the {}.", block.describe());
    let fraction = fraction_of(
        k,
        d,
        &crate::project::regenerate::hard_to_change_of(project),
    )
    .ok();
    let more = match (block, fraction) {
        (AddedBlock::Semifold(s), Some(fr)) => {
            semifold(&fr, *s).ok().map(|sf| semifold_words(&fr, &sf))
        }
        (AddedBlock::Separate { interactions, .. }, _) => {
            let terms: Vec<Term> = interactions
                .iter()
                .filter_map(|t| Term::parse(t, k).ok())
                .collect();
            let rows: Vec<Vec<i8>> = project.runs.iter().map(|r| r.levels.clone()).collect();
            let blocks: Vec<u32> = project.runs.iter().map(|r| r.block).collect();
            let model = twofold_core::augment::separation_model(k, &terms);
            let e = twofold_core::estimability::estimability(&rows, &blocks, &model);
            let mut lines = Vec::new();
            for t in &terms {
                if let Some(x) = e.get(*t) {
                    lines.push(match x.variance_inflation {
                        Some(v) => format!(
                            "{} is estimable beside every main effect (variance inflation {}).",
                            t.label(),
                            number(v)
                        ),
                        None if x.estimable => format!("{} is estimable.", t.label()),
                        None => format!("{} is not estimable from these runs.", t.label()),
                    });
                }
            }
            Some(lines)
        }
        _ => None,
    };
    for line in more.into_iter().flatten() {
        text.push(' ');
        text.push_str(&line);
    }
    Some(text)
}
