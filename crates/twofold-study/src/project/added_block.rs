//! A follow-up block that is not a regular fraction: half of a fold-over (a semifold, Mee &
//! Peralta 2000) or runs chosen to separate named two-factor interactions (D-optimal
//! augmentation), recorded in [`DesignSettings::added`] so regenerating gives the same sheet.
//!
//! The fraction's runs stay block 1 and the added runs are block 2, laid out by
//! [`twofold_core::plan::build_added_block_plan`] as a fold-over is. A semifold is recorded by
//! its choice (the runs follow from the fraction); runs chosen to separate interactions are
//! recorded as the coded runs themselves, so a later change of the search cannot change a sheet
//! already run.

use serde::{Deserialize, Serialize};
use twofold_core::augment::{Augmentation, separate_interactions};
use twofold_core::foldover::FoldKind;
use twofold_core::semifold::{SemiFold, semifold_runs};
use twofold_core::term::{MAX_FACTORS, Term};

use super::follow_up::{FollowUp, FollowUpError};
use super::model::{BlockChoice, DesignSettings, Project};
use super::regenerate::{PlanError, fraction_of};

/// The follow-up block of a design, besides a fold-over.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub enum AddedBlock {
    /// Half of a fold-over's runs.
    Semifold(SemiFold),
    /// Runs chosen to separate named two-factor interactions.
    Separate {
        /// The interactions named, as labels (`AB`).
        interactions: Vec<String>,
        /// The added runs, coded −1/+1, one level per factor.
        runs: Vec<Vec<i8>>,
    },
}

impl AddedBlock {
    /// The block's runs for the fraction `fraction`.
    pub fn runs(
        &self,
        fraction: &twofold_core::design::FractionalDesign,
    ) -> Result<Vec<Vec<i8>>, PlanError> {
        match self {
            AddedBlock::Semifold(s) => {
                semifold_runs(fraction, *s).map_err(|e| PlanError::Invalid(e.to_string()))
            }
            AddedBlock::Separate { runs, .. } => Ok(runs.clone()),
        }
    }

    /// What the block is, in words for the window and the page.
    pub fn describe(&self) -> String {
        match self {
            AddedBlock::Semifold(s) => s.describe(),
            AddedBlock::Separate {
                interactions, runs, ..
            } => format!(
                "{} runs chosen to separate the interaction{} {}",
                runs.len(),
                if interactions.len() == 1 { "" } else { "s" },
                interactions.join(", ")
            ),
        }
    }

    /// The block after factor `index` is removed, or `None` when it depended on that factor.
    pub(crate) fn factor_removed(self, index: usize) -> Option<AddedBlock> {
        match self {
            AddedBlock::Semifold(mut s) => {
                let down = super::edit::index_after_removal(index);
                s.keep = down(s.keep)?;
                if let FoldKind::Factor(f) = s.fold {
                    s.fold = FoldKind::Factor(down(f)?);
                }
                Some(AddedBlock::Semifold(s))
            }
            // The chosen runs were best for the old factors only.
            AddedBlock::Separate { .. } => None,
        }
    }

    /// The block after the factors are reordered, `moved` mapping old indices to new ones.
    pub(crate) fn factor_moved(self, moved: impl Fn(usize) -> usize) -> AddedBlock {
        match self {
            AddedBlock::Semifold(mut s) => {
                s.keep = moved(s.keep);
                if let FoldKind::Factor(f) = s.fold {
                    s.fold = FoldKind::Factor(moved(f));
                }
                AddedBlock::Semifold(s)
            }
            AddedBlock::Separate { interactions, runs } => {
                let runs = runs
                    .into_iter()
                    .map(|r| {
                        let mut out = r.clone();
                        for (i, v) in r.into_iter().enumerate() {
                            if let Some(slot) = out.get_mut(moved(i)) {
                                *slot = v;
                            }
                        }
                        out
                    })
                    .collect();
                // Read against the largest factor count, not the runs' length: a block may hold
                // no runs, and its labels must still follow the letters.
                let interactions = interactions
                    .into_iter()
                    .map(|label| {
                        super::edit::remap_label(&label, |i| Some(moved(i)), MAX_FACTORS)
                            .unwrap_or(label)
                    })
                    .collect();
                AddedBlock::Separate { interactions, runs }
            }
        }
    }
}

/// What stops the added block from being laid out (errors of the design settings).
pub(crate) fn added_block_problems(project: &Project, block: &AddedBlock) -> Vec<String> {
    let d = &project.design;
    let k = project.factors.len();
    let mut out = Vec::new();
    if d.fold.is_some() {
        out.push("the sheet holds both a fold-over and added runs; keep one of them".into());
    }
    if d.screening_runs().is_some() {
        out.push("runs are added to a screening design only as its full fold-over".into());
    }
    let blocked = match &d.blocks {
        BlockChoice::Count(n) => *n > 1,
        BlockChoice::Generators(g) => g.iter().any(|t| !t.trim().is_empty()),
    };
    if blocked || d.replicates_as_blocks {
        out.push(
            "added runs are a block of their own; they cannot be combined with other blocking"
                .into(),
        );
    }
    match block {
        AddedBlock::Semifold(s) => {
            let f = match s.fold {
                FoldKind::Factor(f) => f,
                FoldKind::Full => 0,
            };
            if f >= k || s.keep >= k {
                out.push(format!(
                    "the semifold names a factor beyond the project's {k} factors"
                ));
            }
        }
        AddedBlock::Separate { runs, .. } => {
            if runs
                .iter()
                .any(|r| r.len() != k || r.iter().any(|&v| v != 1 && v != -1))
            {
                out.push(format!(
                    "the added runs must each give {k} levels of −1 or +1"
                ));
            }
        }
    }
    out
}

/// The parsed interactions of a request such as `AB, CE` for `k` factors.
pub fn parse_interactions(text: &str, k: usize) -> Result<Vec<Term>, String> {
    let mut out = Vec::new();
    for part in text
        .split([',', ' ', ';'])
        .map(str::trim)
        .filter(|s| !s.is_empty())
    {
        let t = Term::parse(part, k).map_err(|e| e.to_string())?;
        if t.order() != 2 {
            return Err(format!("{part} is not a two-factor interaction"));
        }
        if !out.contains(&t) {
            out.push(t);
        }
    }
    if out.is_empty() {
        return Err("name at least one two-factor interaction to separate, e.g. AB,CE".into());
    }
    Ok(out)
}

/// The added block a semifold or a separation request gives for `project` with design `d`,
/// with the search result for a separation request (so its description needs no second search).
pub(crate) fn block_for(
    project: &Project,
    d: &DesignSettings,
    follow_up: &FollowUp,
) -> Result<(AddedBlock, Option<Augmentation>), FollowUpError> {
    if d.has_follow_up_block() {
        return Err(FollowUpError::AlreadyFolded);
    }
    if d.screening_runs().is_some() {
        return Err(FollowUpError::from(PlanError::Invalid(
            "a screening design is folded over in full; half fold-overs and chosen runs are not offered for it".into(),
        )));
    }
    let k = project.factors.len();
    match follow_up {
        FollowUp::SemiFold(s) => {
            let fraction = fraction_of(k, d, &super::regenerate::hard_to_change_of(project))?;
            semifold_runs(&fraction, *s).map_err(|e| match e {
                twofold_core::semifold::SemiFoldError::RepeatsRuns => FollowUpError::RepeatsRuns,
                other => FollowUpError::from(PlanError::Invalid(other.to_string())),
            })?;
            Ok((AddedBlock::Semifold(*s), None))
        }
        FollowUp::Separate(terms) => {
            if d.replicates > 1 {
                return Err(FollowUpError::from(PlanError::Invalid(
                    "runs to separate interactions are added to an unreplicated design".into(),
                )));
            }
            let rows: Vec<Vec<i8>> = project.runs.iter().map(|r| r.levels.clone()).collect();
            let blocks: Vec<u32> = project.runs.iter().map(|r| r.block).collect();
            let a =
                separate_interactions(&rows, &blocks, k, terms, d.centre_points_per_block as usize)
                    .map_err(|e| FollowUpError::from(PlanError::Invalid(e.to_string())))?;
            let block = AddedBlock::Separate {
                interactions: terms.iter().map(|t| t.label()).collect(),
                runs: a.added_runs.clone(),
            };
            Ok((block, Some(a)))
        }
        _ => Err(FollowUpError::from(PlanError::Invalid(
            "not an added block".into(),
        ))),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Cell, Edit, Factor, History, ResponseDef, RunStatus};
    use crate::report::{Report, separate_option};

    /// Six numeric factors in the resolution IV fraction E = ABC, F = BCD (16 runs), every run
    /// typed from a model with A, B and AB active, one run with a note.
    fn res_iv() -> Project {
        let mut p = Project::new("res iv");
        for name in ["Temp", "Time", "Speed", "Load", "Feed", "Gap"] {
            p.factors.push(Factor::numeric(name, "", 0.0, 1.0));
        }
        p.responses.push(ResponseDef::new("y", ""));
        p.design.base_runs = Some(16);
        p.design.generators = vec!["E=ABC".into(), "F=BCD".into()];
        p.design.seed = 5;
        p.apply(Edit::RegenerateRuns).unwrap();
        for r in &mut p.runs {
            let (a, b) = (f64::from(r.levels[0]), f64::from(r.levels[1]));
            let y = 50.0 + 4.0 * a + 3.0 * b + 2.0 * a * b + 0.1 * f64::from(r.std_order % 3);
            r.values[0] = Cell::new(format!("{y}"));
            r.status = RunStatus::Done;
        }
        p.runs[3].note = "new lot".into();
        p
    }

    fn kept(before: &Project, after: &Project) {
        for r in &before.runs {
            let now = after
                .runs
                .iter()
                .find(|n| n.levels == r.levels && n.block == r.block)
                .unwrap_or_else(|| panic!("run {:?} is gone", r.levels));
            assert_eq!(
                (&now.values, &now.note, now.run_order),
                (&r.values, &r.note, r.run_order)
            );
        }
    }

    #[test]
    fn a_semifold_adds_half_a_fold_over_as_block_two_and_regenerates_the_same() {
        let before = res_iv();
        let mut h = History::new(before.clone());
        let spec = SemiFold::with_default_half(FoldKind::Factor(0));
        h.apply(Edit::AddFollowUp(FollowUp::SemiFold(spec)))
            .unwrap();
        let after = h.project().clone();
        assert_eq!(after.runs.len(), 24);
        let block2: Vec<_> = after.runs.iter().filter(|r| r.block == 2).collect();
        assert_eq!(block2.len(), 8);
        assert!(
            block2
                .iter()
                .all(|r| r.levels[1] == 1 && !r.values[0].is_typed())
        );
        assert_eq!(after.design.added, Some(AddedBlock::Semifold(spec)));
        kept(&before, &after);
        let mut again = after.clone();
        again.apply(Edit::RegenerateRuns).unwrap();
        assert_eq!(again, after);
        // The file records it and reads back; one undo step restores the sheet.
        let text = crate::project::project_to_string(&after).unwrap();
        assert!(text.contains("Semifold"), "{text}");
        assert_eq!(crate::project::project_from_str(&text).unwrap(), after);
        assert!(h.undo());
        assert_eq!(h.project(), &before);
        // Without a block the field is not written, so files keep their old shape.
        let plain = crate::project::project_to_string(&before).unwrap();
        assert!(!plain.contains("added:"), "{plain}");
        // A second follow-up block is refused.
        assert_eq!(
            after.follow_up_design(FollowUp::FoldOver(FoldKind::Full)),
            Err(FollowUpError::AlreadyFolded)
        );
    }

    #[test]
    fn what_to_run_next_offers_semifolds_with_what_they_resolve() {
        // Mee & Peralta 2000 (from memory): half the fold-over on A frees A's interactions.
        let p = res_iv();
        let list = crate::report::next_runs(&p, None);
        let half = list
            .iter()
            .find(|n| n.key() == "semifold_A_B+")
            .unwrap_or_else(|| panic!("no semifold on A"));
        assert_eq!(half.runs_added(), 8);
        assert!(
            half.resolves[1]
                .starts_with("Makes A's two-factor interactions AB, AC, AD, AE, AF estimable"),
            "{:?}",
            half.resolves
        );
        assert!(
            half.resolves[2].starts_with("Estimates the 18 terms"),
            "{:?}",
            half.resolves
        );
    }

    #[test]
    fn the_summary_page_describes_the_added_block_in_words() {
        use crate::export::{BuildOptions, Paper, summary_input, summary_pages};
        let mut p = res_iv();
        let spec = SemiFold::with_default_half(FoldKind::Factor(0));
        p.apply(Edit::AddFollowUp(FollowUp::SemiFold(spec)))
            .unwrap();
        let report = Report::for_response(&p, 1, 0);
        let input = summary_input(&p, &[&report], &BuildOptions::default());
        let Some(text) = &input.design.follow_up else {
            panic!("the page has a follow-up line");
        };
        assert!(
            text.starts_with("block 2 holds the semifold on A"),
            "{text}"
        );
        assert!(text.contains("Makes A's two-factor interactions AB, AC, AD, AE, AF estimable"));
        assert!(input.design.irregular);
        assert!(
            input.design.main_effect_chains.is_empty(),
            "no chains of the fraction"
        );
        let pages = summary_pages(&input, Paper::A4);
        assert!(pages[0].contains("Follow-up"), "the page shows it");
        // Runs added to separate interactions are described with what they make estimable.
        let mut q = res_iv();
        let named = parse_interactions("AE, BC", 6).unwrap();
        q.apply(Edit::AddFollowUp(FollowUp::Separate(named)))
            .unwrap();
        let Some(text) = crate::report::next_runs_added::follow_up_facts(&q) else {
            panic!("a follow-up line");
        };
        assert!(
            text.starts_with(
                "block 2 holds the 3 runs chosen to separate the interactions AE, BC."
            ),
            "{text}"
        );
        assert!(
            text.contains("AE is estimable beside every main effect (variance inflation"),
            "{text}"
        );
    }

    #[test]
    fn the_analysis_runs_on_the_semifolded_sheet() {
        // The combined 24 runs are not a regular fraction: the report still fits A, B and AB
        // by least squares once the new runs are typed from the same model.
        let mut p = res_iv();
        let spec = SemiFold::with_default_half(FoldKind::Factor(0));
        p.apply(Edit::AddFollowUp(FollowUp::SemiFold(spec)))
            .unwrap();
        for r in p.runs.iter_mut().filter(|r| r.block == 2) {
            let (a, b) = (f64::from(r.levels[0]), f64::from(r.levels[1]));
            r.values[0] = Cell::new(format!("{}", 51.0 + 4.0 * a + 3.0 * b + 2.0 * a * b));
        }
        let report = Report::for_response(&p, 1, 0);
        let ab = twofold_core::term::Term::parse("AB", 6).unwrap();
        let table = report.effects.as_ref().unwrap();
        let e = table
            .effects
            .iter()
            .find(|e| e.term == ab)
            .unwrap_or_else(|| panic!("AB is estimated"));
        assert!((e.effect - 4.0).abs() < 0.2, "AB effect {}", e.effect);
    }

    #[test]
    fn runs_to_separate_interactions_are_recorded_and_regenerate_the_same() {
        let before = res_iv();
        let k = 6;
        let named = parse_interactions("AE, BC", k).unwrap();
        let option = separate_option(&before, "AE, BC", None).unwrap();
        assert_eq!(option.key(), "separate");
        assert_eq!(option.runs_added(), 3);
        // The sentences describe the same search result as the preview's runs.
        assert!(
            option.resolves[0].starts_with("Adds 3 runs as block 2"),
            "{:?}",
            option.resolves
        );
        assert!(
            option
                .resolves
                .iter()
                .any(|l| l.starts_with("AE becomes estimable"))
        );
        let mut p = before.clone();
        p.apply(Edit::AddFollowUp(FollowUp::Separate(named)))
            .unwrap();
        assert_eq!(p.runs.iter().filter(|r| r.block == 2).count(), 3);
        kept(&before, &p);
        let Some(AddedBlock::Separate { interactions, runs }) = &p.design.added else {
            panic!("the runs are recorded");
        };
        assert_eq!(interactions, &["AE", "BC"]);
        assert_eq!(runs.len(), 3);
        let mut again = p.clone();
        again.apply(Edit::RegenerateRuns).unwrap();
        assert_eq!(again, p);
        let text = crate::project::project_to_string(&p).unwrap();
        assert_eq!(crate::project::project_from_str(&text).unwrap(), p);
        // With the report, the model's active interaction AB (y has 2·AB) joins the request.
        let report = Report::for_response(&before, 1, 0);
        let with = separate_option(&before, "AE, BC", Some(&report)).unwrap();
        assert_eq!(
            with.title,
            "Runs to separate AE, BC (keeping AB of the model)"
        );
        assert!(
            with.resolves.iter().any(|l| l.starts_with("AB ")),
            "{:?}",
            with.resolves
        );
        // Bad requests say why.
        for (text, want) in [
            ("", "name at least one"),
            ("ABC", "ABC is not a two-factor interaction"),
        ] {
            let e = separate_option(&before, text, None).unwrap_err();
            assert!(e.starts_with(want), "{e}");
        }
    }

    #[test]
    fn a_replicate_after_an_added_block_repeats_each_block_within_it() {
        // Counted by hand: 16 fraction runs in block 1 and 8 semifold runs in block 2, each
        // repeated once within its own block, gives 48 runs in the same 2 blocks.
        let mut p = res_iv();
        let spec = SemiFold::with_default_half(FoldKind::Factor(0));
        p.apply(Edit::AddFollowUp(FollowUp::SemiFold(spec)))
            .unwrap();
        assert!(p.design.has_follow_up_block());
        let preview = p.preview_follow_up(FollowUp::Replicate).unwrap();
        assert_eq!((preview.runs_after, preview.blocks_after), (48, 2));
        assert!(!preview.design.replicates_as_blocks);
        // The option is offered and says where its runs go; the other blocks are not.
        let list = crate::report::next_runs(&p, None);
        let rep = list
            .iter()
            .find(|n| n.follow_up == FollowUp::Replicate)
            .unwrap_or_else(|| panic!("no replicate option"));
        assert!(rep.preview.is_ok(), "{:?}", rep.preview);
        assert!(
            rep.resolves
                .iter()
                .any(|l| l.starts_with("Repeats each block's runs within that block")),
            "{:?}",
            rep.resolves
        );
        for f in [
            FollowUp::FoldOver(FoldKind::Full),
            FollowUp::SemiFold(spec),
            FollowUp::Separate(parse_interactions("AE", 6).unwrap()),
        ] {
            assert_eq!(p.follow_up_design(f), Err(FollowUpError::AlreadyFolded));
        }
        let before = p.clone();
        p.apply(Edit::AddFollowUp(FollowUp::Replicate)).unwrap();
        assert_eq!(p.runs.len(), 48);
        typed_kept(&before, &p);
        // Runs chosen to separate interactions take a replicate the same way.
        let mut q = res_iv();
        q.apply(Edit::AddFollowUp(FollowUp::Separate(
            parse_interactions("AE, BC", 6).unwrap(),
        )))
        .unwrap();
        let before = q.clone();
        q.apply(Edit::AddFollowUp(FollowUp::Replicate)).unwrap();
        assert_eq!(q.runs.len(), 2 * before.runs.len());
        typed_kept(&before, &q);
    }

    /// Every typed run of `before` is in `after` with its values and note, in the same block
    /// (the run order within the block may change: the preview counts those runs).
    fn typed_kept(before: &Project, after: &Project) {
        for r in before
            .runs
            .iter()
            .filter(|r| r.values.iter().any(|c| c.is_typed()))
        {
            assert!(
                after.runs.iter().any(|n| n.levels == r.levels
                    && n.block == r.block
                    && n.values == r.values
                    && n.note == r.note),
                "run {:?} lost its values",
                r.levels
            );
        }
    }

    #[test]
    fn moving_or_removing_a_factor_follows_the_added_block() {
        let mut p = res_iv();
        let spec = SemiFold {
            fold: FoldKind::Factor(2),
            keep: 4,
            level: -1,
        };
        p.apply(Edit::AddFollowUp(FollowUp::SemiFold(spec)))
            .unwrap();
        let mut moved = p.clone();
        moved.apply(Edit::MoveFactor { from: 2, to: 0 }).unwrap();
        assert_eq!(
            moved.design.added,
            Some(AddedBlock::Semifold(SemiFold {
                fold: FoldKind::Factor(0),
                keep: 4,
                level: -1
            }))
        );
        let mut removed = p.clone();
        removed.apply(Edit::RemoveFactor { index: 4 }).unwrap();
        assert_eq!(removed.design.added, None);
        let sep = AddedBlock::Separate {
            interactions: vec!["AC".into()],
            runs: vec![vec![1, -1, -1]],
        };
        // Factor A moves to the end: AC becomes BC... (C is now B) and the levels follow.
        let m = |i: usize| if i == 0 { 2 } else { i - 1 };
        assert_eq!(
            sep.factor_moved(m),
            AddedBlock::Separate {
                interactions: vec!["BC".into()],
                runs: vec![vec![-1, -1, 1]],
            }
        );
        // Without runs the labels follow the letters all the same (the letters were once read
        // against the runs' length, zero here, and kept as they were).
        let empty = AddedBlock::Separate {
            interactions: vec!["AC".into(), "BE".into()],
            runs: Vec::new(),
        };
        let m5 = |i: usize| if i == 0 { 4 } else { i - 1 };
        assert_eq!(
            empty.factor_moved(m5),
            AddedBlock::Separate {
                interactions: vec!["BE".into(), "AD".into()],
                runs: Vec::new(),
            }
        );
    }
}
