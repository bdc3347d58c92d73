//! What to run next: the follow-up runs a project can add, with what each resolves, and which
//! one the shown response's [`Report`] points to.
//!
//! # The options
//! - **Full fold-over** (every sign switched): the defining words of odd length drop out, so a
//!   resolution III fraction becomes resolution IV and every main effect is freed from
//!   two-factor interactions; two-factor interactions stay aliased with each other.
//! - **Fold-over on one factor** (its signs switched): the words holding that factor drop out,
//!   so its main effect and all its two-factor interactions are freed.
//! - **Semifold** on one factor or in full (half of the fold-over's runs, Mee & Peralta 2000;
//!   see [`super::next_runs_added`]).
//! - **Centre points** (when there are none): a curvature check and pure error.
//! - **A replicate**: pure error on one degree of freedom per distinct run.
//! - **Axial runs** (a regular design of numeric factors): a face-centred central composite
//!   design in which every pure quadratic term is estimable; suggested when the report's
//!   curvature test is significant (`quadratic.rs`).
//!
//! The fold-over rules are those of Montgomery, *Design and Analysis of Experiments*, the
//! fold-over sections of the chapter on two-level fractional factorials, and of Box, Hunter &
//! Hunter 2005, *Statistics for Experimenters*, §6.7 (Box & Hunter 1961, *Technometrics* 3); the
//! combined design, its resolution and its aliases come from [`twofold_core::foldover`], the new
//! sheet from the project's own planning ([`Project::preview_follow_up`]).
//!
//! # The suggestion
//! An effect the report treats as active (in the fitted model; for the default choice without the
//! terms added only for hierarchy) is *ambiguous* when its alias chain in the current design holds
//! another main effect or two-factor interaction: the runs cannot say which member is at work.
//! Each fold-over is scored by the number of (active effect, alias) pairs that the combined
//! design separates; the fold-overs with the highest score above zero are suggested, several when
//! they tie (common practice, no source for the scoring: it follows the advice above to fold on
//! the factor whose effect is in doubt, or fully when several main effects are in doubt).

use std::fmt::Write as _;

use twofold_core::alias::{AliasReport, alias_report, roman};
use twofold_core::foldover::{FoldKind, FoldOver, fold_over};
use twofold_core::term::{LETTERS, Term};

use super::Report;
use super::choice::Selection;
use crate::project::regenerate::fraction_of;
use crate::project::{CENTRE_POINTS_ADDED, FollowUp, FollowUpPreview, Project};

/// One follow-up and its consequences.
#[derive(Debug, Clone, PartialEq)]
pub struct NextRun {
    /// What the follow-up is (the edit that applies it is [`crate::project::Edit::AddFollowUp`]).
    pub follow_up: FollowUp,
    /// Its name in words, e.g. "Fold over on A (Temperature)".
    pub title: String,
    /// What it resolves, one plain sentence a line.
    pub resolves: Vec<String>,
    /// Resolution of the design after it (fold-overs only; `None` for a full factorial).
    pub resolution_after: Option<u32>,
    /// The new sheet, or why the follow-up cannot be added.
    pub preview: Result<FollowUpPreview, String>,
    /// Whether the report points to it.
    pub suggested: bool,
    /// Why it is suggested, in plain words.
    pub reason: Option<String>,
}

impl NextRun {
    /// Runs it adds (0 when it cannot be added).
    pub fn runs_added(&self) -> usize {
        self.preview.as_ref().map_or(0, FollowUpPreview::runs_added)
    }

    /// A short key: `fold_full`, `fold_A`, `semifold_A_B+`, `separate`, `centre_points`,
    /// `replicate`, `axial`.
    pub fn key(&self) -> String {
        match self.follow_up {
            FollowUp::FoldOver(FoldKind::Full) => "fold_full".into(),
            FollowUp::FoldOver(FoldKind::Factor(f)) => format!("fold_{}", letter(f)),
            FollowUp::CentrePoints => "centre_points".into(),
            FollowUp::Replicate => "replicate".into(),
            FollowUp::Axial => "axial".into(),
            ref other => super::next_runs_added::key(other).unwrap_or_default(),
        }
    }
}

fn letter(f: usize) -> char {
    LETTERS.get(f).copied().unwrap_or('?')
}

/// The design the sheet follows now (with its fold-over when it has one), or `None` when it
/// cannot be made.
fn current_design(
    project: &Project,
) -> Option<(twofold_core::design::FractionalDesign, AliasReport)> {
    let fraction = fraction_of(
        project.factors.len(),
        &project.design,
        &crate::project::regenerate::hard_to_change_of(project),
    )
    .ok()?;
    let design = match project.design.fold {
        None => fraction.clone(),
        Some(kind) => fold_over(&fraction, kind).ok()?.combined,
    };
    let aliases = alias_report(&design);
    Some((fraction, aliases))
}

/// The members of `term`'s chain of at most two letters in `aliases`, `term` first.
fn low_members(aliases: &AliasReport, term: Term) -> Vec<Term> {
    let mut out = vec![term];
    if let Some((_, a)) = aliases.aliases.iter().find(|(t, _)| *t == term) {
        out.extend(a.iter().map(|s| s.term).filter(|t| t.order() <= 2));
    }
    out
}

/// Whether `a` and `b` are aliased in `aliases`.
fn aliased(aliases: &AliasReport, a: Term, b: Term) -> bool {
    aliases
        .aliases
        .iter()
        .find(|(t, _)| *t == a)
        .is_some_and(|(_, list)| list.iter().any(|s| s.term == b))
}

/// `members` grouped by aliasing in `aliases`, each group in the given order.
fn groups(aliases: &AliasReport, members: &[Term]) -> Vec<Vec<Term>> {
    let mut out: Vec<Vec<Term>> = Vec::new();
    for &m in members {
        match out.iter_mut().find(|g| aliased(aliases, g[0], m)) {
            Some(g) => g.push(m),
            None => out.push(vec![m]),
        }
    }
    out
}

fn join(terms: &[Term], sep: &str) -> String {
    terms
        .iter()
        .map(|t| t.label())
        .collect::<Vec<_>>()
        .join(sep)
}

/// The chains of at least two main effects or two-factor interactions in `aliases`.
fn ambiguous_chains(aliases: &AliasReport) -> Vec<Vec<Term>> {
    aliases
        .chains()
        .into_iter()
        .map(|(t, _)| low_members(aliases, t))
        .filter(|m| m.len() > 1)
        .collect()
}

/// Effects the report treats as active (see the module documentation).
pub(crate) fn active_terms(report: &Report) -> Vec<Term> {
    let Ok(choice) = &report.choice else {
        return Vec::new();
    };
    choice
        .terms
        .iter()
        .copied()
        .filter(|t| choice.selection == Selection::Given || !choice.added_for_hierarchy.contains(t))
        .filter(|t| t.order() <= 2)
        .collect()
}

/// What a fold-over resolves, in sentences.
fn fold_words(now: &AliasReport, fold: &FoldOver) -> Vec<String> {
    let after = &fold.combined_aliases;
    let mut out = Vec::new();
    let res = |r: Option<u32>| r.map_or_else(|| "full factorial".to_string(), roman);
    out.push(if now.resolution == after.resolution {
        format!(
            "Resolution stays {} ({} base runs in all).",
            res(now.resolution),
            fold.combined.base_runs()
        )
    } else {
        format!(
            "Resolution {} becomes {} ({} base runs in all).",
            res(now.resolution),
            res(after.resolution),
            fold.combined.base_runs()
        )
    });
    let freed_main = gained(&after.clear_main_effects, &now.clear_main_effects);
    if !freed_main.is_empty() {
        out.push(format!(
            "Frees main effect{} {} from two-factor interactions.",
            if freed_main.len() == 1 { "" } else { "s" },
            join(&freed_main, ", ")
        ));
    }
    let freed_2fi = gained(
        &after.clear_two_factor_interactions,
        &now.clear_two_factor_interactions,
    );
    if !freed_2fi.is_empty() {
        out.push(format!(
            "Frees two-factor interaction{} {}.",
            if freed_2fi.len() == 1 { "" } else { "s" },
            join(&freed_2fi, ", ")
        ));
    }
    let broken: Vec<String> = ambiguous_chains(now)
        .into_iter()
        .filter_map(|chain| {
            let g = groups(after, &chain);
            (g.len() > 1).then(|| {
                let parts: Vec<String> = g.iter().map(|x| join(x, " = ")).collect();
                format!("{} into {}", join(&chain, " = "), parts.join(" | "))
            })
        })
        .collect();
    if broken.is_empty() {
        out.push("Breaks no chain of main effects and two-factor interactions.".into());
    } else {
        out.push(format!("Breaks {}.", broken.join("; ")));
    }
    out
}

/// How many (active effect, alias) pairs of the ambiguous active chains the combined design
/// separates, and a clause per active effect that says which.
fn separation(now: &AliasReport, after: &AliasReport, active: &[Term]) -> (usize, Vec<String>) {
    let mut score = 0;
    let mut words = Vec::new();
    for &t in active {
        let chain = low_members(now, t);
        let others = &chain[1..];
        let freed: Vec<Term> = others
            .iter()
            .copied()
            .filter(|&o| !aliased(after, t, o))
            .collect();
        if freed.is_empty() {
            continue;
        }
        score += freed.len();
        let kind = if t.order() == 1 {
            "main effect"
        } else {
            "interaction"
        };
        let stay: Vec<Term> = others
            .iter()
            .copied()
            .filter(|o| !freed.contains(o))
            .collect();
        words.push(format!(
            "the active {kind} {} cannot be told from {} with these runs; this follow-up separates it from {}{}",
            t.label(),
            join(others, ", "),
            join(&freed, ", "),
            if stay.is_empty() {
                String::new()
            } else {
                format!(" (not from {})", join(&stay, ", "))
            }
        ));
    }
    (score, words)
}

/// Pure error before and after, in a sentence; a repeat in another block is not pure error.
fn pure_error_words(x: &FollowUpPreview) -> String {
    let (a, b) = (x.pure_error_df_before, x.pure_error_df_after);
    let df = |n: usize| format!("{n} degree{} of freedom", if n == 1 { "" } else { "s" });
    if b > a {
        format!("Pure error on {} (now {}).", df(b), a)
    } else {
        format!(
            "Pure error stays on {}: the repeated runs fall in different blocks, so they estimate the error through the model's residual (with the block effect taken out), not as pure error.",
            df(b)
        )
    }
}

/// The follow-up options of `project`, the suggested first (see the module documentation).
/// `report` is the analysis of the shown response, when there is one. Empty without a run sheet.
pub fn next_runs(project: &Project, report: Option<&Report>) -> Vec<NextRun> {
    if project.runs.is_empty() {
        return Vec::new();
    }
    let current = current_design(project);
    let active = report.map(active_terms).unwrap_or_default();
    let mut out = Vec::new();
    let preview = |f: FollowUp| project.preview_follow_up(f).map_err(|e| e.to_string());
    if let Some((fraction, now)) = &current
        && !fraction.is_full()
        && !project.design.has_follow_up_block()
    {
        let k = project.factors.len();
        let kinds = std::iter::once(FoldKind::Full).chain((0..k).map(FoldKind::Factor));
        for kind in kinds {
            let Ok(fold) = fold_over(fraction, kind) else {
                continue;
            };
            if fold.repeats_original && kind != FoldKind::Full {
                // Folding on a factor that is in no defining word only repeats the runs.
                continue;
            }
            let title = match kind {
                FoldKind::Full => "Full fold-over (every sign switched)".to_string(),
                FoldKind::Factor(f) => format!(
                    "Fold over on {} ({})",
                    letter(f),
                    project.factors.get(f).map_or("", |x| x.name.as_str())
                ),
            };
            let (score, words) = separation(now, &fold.combined_aliases, &active);
            out.push((
                score,
                words,
                NextRun {
                    follow_up: FollowUp::FoldOver(kind),
                    title,
                    resolves: if fold.repeats_original {
                        vec![
                            "Every defining word keeps its sign: the runs would only be repeated."
                                .into(),
                        ]
                    } else {
                        fold_words(now, &fold)
                    },
                    resolution_after: fold.combined_aliases.resolution,
                    preview: preview(FollowUp::FoldOver(kind)),
                    suggested: false,
                    reason: None,
                },
            ));
        }
        if project.design.screening_runs().is_none() {
            let halves = super::next_runs_added::semifold_options(project, fraction);
            out.extend(halves.into_iter().map(|n| (0, Vec::new(), n)));
        }
    }
    if let Some(n) = project.design.screening_runs()
        && !project.design.has_follow_up_block()
    {
        // The mirror image of a screening design cancels every partial alias of a main effect
        // with a two-factor interaction (see `twofold_core::screening::screening_runs`).
        let active_mains: Vec<String> = active
            .iter()
            .filter(|t| t.order() == 1)
            .map(|t| t.label())
            .collect();
        let (score, words) = if active_mains.is_empty() {
            (0, Vec::new())
        } else {
            (
                active_mains.len(),
                vec![format!(
                    "the active main effects {} are each partially aliased with two-factor interactions",
                    active_mains.join(", ")
                )],
            )
        };
        out.push((
            score,
            words,
            NextRun {
                follow_up: FollowUp::FoldOver(FoldKind::Full),
                title: "Full fold-over (every sign switched)".to_string(),
                resolves: vec![
                    format!(
                        "Runs the {n} mirror-image runs as block 2: every main effect becomes clear of every two-factor interaction, so an active interaction no longer shifts them."
                    ),
                ],
                resolution_after: None,
                preview: preview(FollowUp::FoldOver(FoldKind::Full)),
                suggested: false,
                reason: None,
            },
        ));
    }
    if project.design.centre_points_per_block == 0 {
        let p = preview(FollowUp::CentrePoints);
        let mut resolves = vec![
            "Checks for curvature: whether the response at the centre differs from the corners' average.".to_string(),
        ];
        if let Ok(x) = &p {
            resolves.push(pure_error_words(x));
        }
        out.push((
            0,
            Vec::new(),
            NextRun {
                follow_up: FollowUp::CentrePoints,
                title: format!("Add {CENTRE_POINTS_ADDED} centre points per block"),
                resolves,
                resolution_after: None,
                preview: p,
                suggested: false,
                reason: None,
            },
        ));
    }
    out.extend(super::quadratic::axial_option(project, report));
    let p = preview(FollowUp::Replicate);
    let mut resolves = Vec::new();
    if let Ok(x) = &p {
        resolves.push(format!(
            "Repeats the design once more: {} runs, so every effect rests on more runs.",
            x.runs_added()
        ));
        if x.design.replicates_as_blocks && !project.design.replicates_as_blocks {
            resolves.push(format!(
                "Runs as a block of its own (block {} and after), so a shift between sessions does not bias the effects; the runs in the sheet keep their order.",
                project.runs.iter().map(|r| r.block).max().unwrap_or(1) + 1
            ));
        }
        if project.design.has_follow_up_block() {
            resolves.push(
                "Repeats each block's runs within that block: the follow-up block already in the sheet is laid out without other blocking, so the replicate cannot be a block of its own.".into(),
            );
        }
        resolves.push(pure_error_words(x));
    }
    out.push((
        0,
        Vec::new(),
        NextRun {
            follow_up: FollowUp::Replicate,
            title: "Add a replicate".into(),
            resolves,
            resolution_after: None,
            preview: p,
            suggested: false,
            reason: None,
        },
    ));
    let best = out
        .iter()
        .filter(|(_, _, n)| n.preview.is_ok())
        .map(|(s, _, _)| *s)
        .max()
        .unwrap_or(0);
    let mut list: Vec<NextRun> = out
        .into_iter()
        .map(|(score, words, mut n)| {
            if best > 0 && score == best && n.preview.is_ok() {
                n.suggested = true;
                let mut reason = String::new();
                for (i, w) in words.iter().enumerate() {
                    let _ = write!(reason, "{}{}", if i == 0 { "" } else { "; " }, w);
                }
                if let Some(first) = reason.get(..1) {
                    let upper = first.to_uppercase();
                    reason.replace_range(..1, &upper);
                }
                reason.push('.');
                n.reason = Some(reason);
            }
            n
        })
        .collect();
    // Suggested first, otherwise in the order above (stable).
    list.sort_by_key(|n| !n.suggested);
    list
}

/// The terms of `after` that are not in `now` (effects a follow-up makes clear).
fn gained(after: &[Term], now: &[Term]) -> Vec<Term> {
    after.iter().copied().filter(|t| !now.contains(t)).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Cell, Edit, Factor, ResponseDef};

    /// The 2^(7-4) resolution III fraction D=AB, E=AC, F=BC, G=ABC, its eight runs typed from
    /// `y(levels, std_order)`.
    fn seven_factors(y: impl Fn(&[i8], u32) -> f64) -> Project {
        let mut p = Project::new("screen");
        for name in ["Temp", "Time", "Speed", "Load", "Feed", "Gap", "Flow"] {
            p.factors.push(Factor::numeric(name, "", 0.0, 1.0));
        }
        p.responses.push(ResponseDef::new("y", ""));
        p.design.base_runs = Some(8);
        p.design.generators = ["D=AB", "E=AC", "F=BC", "G=ABC"].map(String::from).to_vec();
        p.design.seed = 3;
        p.apply(Edit::RegenerateRuns).unwrap();
        for r in &mut p.runs {
            r.values[0] = Cell::new(format!("{}", y(&r.levels, r.std_order)));
        }
        p
    }

    fn find<'a>(list: &'a [NextRun], key: &str) -> &'a NextRun {
        list.iter()
            .find(|n| n.key() == key)
            .unwrap_or_else(|| panic!("no option {key}"))
    }

    #[test]
    fn full_fold_over_of_the_resolution_iii_fraction_gives_resolution_iv() {
        // Montgomery, Design and Analysis of Experiments, the fold-over of the 2^(7-4)_III
        // design: the combined sixteen runs are resolution IV with every main effect clear.
        let p = seven_factors(|_, _| 1.0);
        let list = next_runs(&p, None);
        let full = find(&list, "fold_full");
        assert_eq!(full.resolution_after, Some(4));
        assert_eq!(full.runs_added(), 8);
        assert_eq!(
            full.resolves[0],
            "Resolution III becomes IV (16 base runs in all)."
        );
        assert_eq!(
            full.resolves[1],
            "Frees main effects A, B, C, D, E, F, G from two-factor interactions."
        );
        // The chain of A (A = BD = CE = FG) is broken into A and the interactions, which stay
        // aliased with each other (the four-letter words survive).
        assert!(
            full.resolves
                .iter()
                .any(|l| l.contains("A = BD = CE = FG into A | BD = CE = FG")),
            "{:?}",
            full.resolves
        );
        assert!(
            list.iter().all(|n| !n.suggested),
            "no report, no suggestion"
        );
    }

    #[test]
    fn a_single_factor_fold_frees_that_factor_and_its_interactions() {
        // Montgomery, same section (and Box, Hunter & Hunter 2005, §6.7): switching the signs
        // of one factor frees its main effect and all its two-factor interactions.
        let p = seven_factors(|_, _| 1.0);
        let list = next_runs(&p, None);
        let on_a = find(&list, "fold_A");
        assert_eq!(on_a.title, "Fold over on A (Temp)");
        assert_eq!(on_a.runs_added(), 8);
        assert!(
            on_a.resolves
                .contains(&"Frees main effect A from two-factor interactions.".to_string())
        );
        assert!(
            on_a.resolves
                .contains(&"Frees two-factor interactions AB, AC, AD, AE, AF, AG.".to_string()),
            "{:?}",
            on_a.resolves
        );
        // Every factor is in a defining word, so there is a fold per factor, the same eight
        // folds halved (semifolds), then centre points and a replicate.
        assert_eq!(list.len(), 1 + 7 + 8 + 2);
        assert_eq!(find(&list, "semifold_A_B+").runs_added(), 4);
        assert_eq!(find(&list, "centre_points").runs_added(), 4);
        assert_eq!(find(&list, "replicate").runs_added(), 8);
    }

    #[test]
    fn any_half_of_a_semifold_can_be_chosen_and_adds_those_runs() {
        use twofold_core::semifold::SemiFold;
        let p = seven_factors(|_, _| 1.0);
        let fold = FoldKind::Factor(0);
        let halves = super::super::semifold_halves(fold, 7);
        // Six other factors, each at + or −; the default (B at +) first.
        assert_eq!(halves.len(), 12);
        assert_eq!(halves[0], SemiFold::with_default_half(fold));
        assert!(halves.iter().all(|h| h.keep != 0));
        let spec = SemiFold {
            fold,
            keep: 2,
            level: -1,
        };
        let option = super::super::semifold_option(&p, spec).unwrap();
        assert_eq!(option.title, "Semifold on A (Temp), half the runs: C at −");
        assert_eq!(option.key(), "semifold_A_C-");
        assert_eq!(option.runs_added(), 4);
        // The sheet after it holds, as block 2, the fold-over runs on A with C at −: the
        // fraction's runs with A switched, kept where C is −1 (Mee & Peralta 2000's rule).
        let Ok(preview) = &option.preview else {
            panic!("the half can be added")
        };
        let mut after = p.clone();
        after.design = preview.design.clone();
        after.apply(Edit::RegenerateRuns).unwrap();
        let mut added: Vec<Vec<i8>> = after
            .runs
            .iter()
            .filter(|r| r.block == 2)
            .map(|r| r.levels.clone())
            .collect();
        let mut expected: Vec<Vec<i8>> = p
            .runs
            .iter()
            .map(|r| {
                let mut l = r.levels.clone();
                l[0] = -l[0];
                l
            })
            .filter(|l| l[2] == -1)
            .collect();
        added.sort();
        expected.sort();
        assert_eq!(added, expected);
        // The folded factor cannot pick the half.
        let bad = SemiFold {
            fold,
            keep: 0,
            level: 1,
        };
        assert!(super::super::semifold_option(&p, bad).is_err());
    }

    #[test]
    fn an_active_main_effect_in_doubt_suggests_the_folds_that_free_it() {
        // y = 20 + 6A plus a small wobble: A stands out on Lenth's margin, but A = BD = CE = FG.
        let wobble = [0.3, -0.2, 0.1, -0.4, 0.2, 0.0, -0.1, 0.25];
        let p = seven_factors(|l, s| 20.0 + 6.0 * f64::from(l[0]) + wobble[s as usize - 1]);
        let report = Report::for_response(&p, 0, 0);
        let list = next_runs(&p, Some(&report));
        let suggested: Vec<String> = list
            .iter()
            .filter(|n| n.suggested)
            .map(NextRun::key)
            .collect();
        assert_eq!(suggested, ["fold_full", "fold_A"]);
        assert!(list[0].suggested && list[1].suggested, "suggested first");
        let why = list[0].reason.as_deref().unwrap();
        assert_eq!(
            why,
            "The active main effect A cannot be told from BD, CE, FG with these runs; this follow-up separates it from BD, CE, FG."
        );
        // Folding on B frees A from BD only: a weaker option, not suggested.
        assert!(!find(&list, "fold_B").suggested);
    }

    #[test]
    fn clear_active_effects_suggest_nothing() {
        // A resolution V half fraction: main effects clear, nothing to separate.
        let mut p = Project::new("res v");
        for name in ["A", "B", "C", "D", "E"] {
            p.factors.push(Factor::numeric(name, "", 0.0, 1.0));
        }
        p.responses.push(ResponseDef::new("y", ""));
        p.design.base_runs = Some(16);
        p.design.generators = vec!["E=ABCD".into()];
        p.apply(Edit::RegenerateRuns).unwrap();
        for (i, r) in p.runs.iter_mut().enumerate() {
            let y = 50.0 + 8.0 * f64::from(r.levels[1]) + (i % 3) as f64 * 0.1;
            r.values[0] = Cell::new(format!("{y}"));
        }
        let report = Report::for_response(&p, 0, 0);
        let list = next_runs(&p, Some(&report));
        assert!(list.iter().all(|n| !n.suggested));
        // The full fold of a resolution V fraction breaks its one (odd) word: a full factorial.
        assert_eq!(find(&list, "fold_full").resolution_after, None);
    }
}
