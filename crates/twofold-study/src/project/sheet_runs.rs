//! The runs of a whole sheet counted from the design settings, block by block: the fraction (or
//! full factorial, or screening design) with its replicates, the centre points, the follow-up
//! block 2 (a fold-over, half of one, or runs added to separate interactions) and the axial
//! block. The one count the design step, the summary page and `twofold plan` state, so a draft
//! not yet laid out shows the same total its sheet will have.
//!
//! The count follows the layout of [`super::regenerate::plan_runs`]: each set of base runs (the
//! fraction, then the follow-up block) is replicated and gets the centre points of its blocks
//! ([`twofold_core::plan::build_fold_over_plan`]); a screening design's mirror image is one
//! block of its own, not replicated and without centre points
//! ([`twofold_core::screening::screening_runs`]); the axial block holds 2k axial runs and its own
//! centre runs ([`super::axial`]). A semifold keeps the half of the fold-over runs with one factor
//! at one level: every factor column of a regular fraction is balanced, and so is its fold, so
//! that half is N/2 runs. The tests check the count against the laid-out sheet.

use super::added_block::AddedBlock;
use super::model::{BlockChoice, DesignSettings};

/// What the base runs are, for the words.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BaseKind {
    /// Every combination of the factors' levels.
    FullFactorial,
    /// A regular fraction.
    Fraction,
    /// A Plackett–Burman screening design.
    Screening,
}

/// What the follow-up block 2 is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FollowUpBlock {
    /// A fold-over (full or on one factor).
    FoldOver,
    /// Half of a fold-over's runs.
    Semifold,
    /// Runs chosen to separate named interactions.
    Separate,
}

/// The runs of a whole sheet, part by part (see the module documentation).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SheetRuns {
    /// What the base runs are.
    pub kind: BaseKind,
    /// Runs of one replicate of the base design (centre points not counted).
    pub base: usize,
    /// Complete copies of the base design.
    pub replicates: usize,
    /// Centre points in every block but the axial one.
    pub centre: usize,
    /// The follow-up block 2 and its two-level runs (every replicate), if any.
    pub follow_up: Option<(FollowUpBlock, usize)>,
    /// Axial runs (2k) and the axial block's centre runs, if the design has them.
    pub axial: Option<(usize, usize)>,
}

impl SheetRuns {
    /// The runs the sheet of `design` for `factors` factors holds; `None` when the run size
    /// cannot be told (more generators than factors, or a size beyond counting).
    pub fn of(design: &DesignSettings, factors: usize) -> Option<SheetRuns> {
        let replicates = design.replicates.max(1) as usize;
        let centre_per_block = design.centre_points_per_block as usize;
        let axial = design
            .axial
            .map(|a| (2 * factors, a.centre_points as usize));
        if let Some(n) = design.screening_runs() {
            // One block; the mirror image follows as a block of its own.
            let fold = design
                .fold
                .is_some()
                .then_some((FollowUpBlock::FoldOver, n));
            return Some(SheetRuns {
                kind: BaseKind::Screening,
                base: n,
                replicates,
                centre: centre_per_block,
                follow_up: fold,
                axial,
            });
        }
        let base = match design.base_runs {
            Some(n) => n as usize,
            None => {
                let p = design
                    .generators
                    .iter()
                    .filter(|g| !g.trim().is_empty())
                    .count();
                let d = factors.checked_sub(p)?;
                1usize.checked_shl(u32::try_from(d).ok()?)?
            }
        };
        let full = u32::try_from(factors)
            .ok()
            .and_then(|k| 1usize.checked_shl(k))
            == Some(base);
        let follow_up = match (design.fold, &design.added) {
            (Some(_), _) => Some((FollowUpBlock::FoldOver, base * replicates)),
            (None, Some(AddedBlock::Semifold(_))) => {
                Some((FollowUpBlock::Semifold, base / 2 * replicates))
            }
            (None, Some(AddedBlock::Separate { runs, .. })) => {
                Some((FollowUpBlock::Separate, runs.len() * replicates))
            }
            (None, None) => None,
        };
        // A follow-up block is laid out unblocked otherwise (other blocking is refused with it).
        let blocks = if follow_up.is_some() {
            2
        } else {
            let per_replicate = match &design.blocks {
                BlockChoice::Count(n) => (*n).max(1) as usize,
                BlockChoice::Generators(g) => {
                    1usize << g.iter().filter(|t| !t.trim().is_empty()).count().min(16)
                }
            };
            if design.replicates_as_blocks {
                per_replicate * replicates
            } else {
                per_replicate
            }
        };
        Some(SheetRuns {
            kind: if full {
                BaseKind::FullFactorial
            } else {
                BaseKind::Fraction
            },
            base,
            replicates,
            centre: centre_per_block * blocks,
            follow_up,
            axial,
        })
    }

    /// Every run of the sheet.
    pub fn total(&self) -> usize {
        self.base * self.replicates
            + self.centre
            + self.follow_up.map_or(0, |(_, n)| n)
            + self.axial.map_or(0, |(a, c)| a + c)
    }

    /// The count in words, e.g. "24 runs: 16 in the fraction, 8 in the fold-over block", or
    /// "32 runs in the fraction (16 × 2 replicates)" when the base design is all there is.
    pub fn describe(&self) -> String {
        let total = self.total();
        let base_name = match self.kind {
            BaseKind::FullFactorial => "the full factorial",
            BaseKind::Fraction => "the fraction",
            BaseKind::Screening => "the screening design",
        };
        let plural =
            |n: usize, one: &str, many: &str| format!("{n} {}", if n == 1 { one } else { many });
        let copies = if self.replicates > 1 {
            format!(" ({} × {} replicates)", self.base, self.replicates)
        } else {
            String::new()
        };
        if total == self.base * self.replicates {
            return format!("{} in {base_name}{copies}", plural(total, "run", "runs"));
        }
        let mut parts = vec![format!(
            "{} in {base_name}{copies}",
            self.base * self.replicates
        )];
        if let Some((kind, n)) = self.follow_up {
            parts.push(match kind {
                FollowUpBlock::FoldOver => format!("{n} in the fold-over block"),
                FollowUpBlock::Semifold => format!("{n} in the half fold-over block"),
                FollowUpBlock::Separate => {
                    format!("{n} in the block added to separate interactions")
                }
            });
        }
        if self.centre > 0 {
            parts.push(plural(self.centre, "centre point", "centre points"));
        }
        if let Some((a, c)) = self.axial {
            parts.push(format!(
                "{a} axial runs and {} in the axial block",
                plural(c, "centre run", "centre runs")
            ));
        }
        format!("{total} runs: {}", parts.join(", "))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{AxialRuns, Edit, Factor, FollowUp, Project};
    use twofold_core::foldover::FoldKind;
    use twofold_core::semifold::SemiFold;

    /// A project of `k` numeric factors with `design`, its sheet laid out.
    fn laid_out(k: usize, design: DesignSettings) -> Project {
        let mut p = Project::new("count");
        for i in 0..k {
            p.factors
                .push(Factor::numeric(&format!("X{i}"), "", 0.0, 1.0));
        }
        p.design = design;
        if let Err(e) = p.apply(Edit::RegenerateRuns) {
            panic!("{:?} plans: {e}", p.design);
        }
        p
    }

    fn regular(runs: u32, generators: &[&str]) -> DesignSettings {
        DesignSettings {
            base_runs: Some(runs),
            generators: generators.iter().map(|g| g.to_string()).collect(),
            seed: 5,
            ..DesignSettings::default()
        }
    }

    /// The count agrees with the laid-out sheet, part by part (two implementations of one
    /// layout: the arithmetic here and the planning that makes the runs).
    fn check(k: usize, design: DesignSettings) -> SheetRuns {
        let p = laid_out(k, design);
        let Some(count) = SheetRuns::of(&p.design, k) else {
            panic!("{:?} is counted", p.design);
        };
        assert_eq!(count.total(), p.runs.len(), "{:?}", p.design);
        let axial_block = p.axial_block();
        let in_axial = |b: u32| p.design.axial.is_some() && Some(b) == axial_block;
        let centre = p
            .runs
            .iter()
            .filter(|r| r.centre && !in_axial(r.block))
            .count();
        assert_eq!(count.centre, centre, "{:?}", p.design);
        let follow = p
            .runs
            .iter()
            .filter(|r| !r.centre && r.block == 2 && !in_axial(r.block))
            .count();
        if p.design.has_follow_up_block() {
            assert_eq!(count.follow_up.map(|(_, n)| n), Some(follow));
        }
        count
    }

    #[test]
    fn the_count_agrees_with_the_laid_out_sheet() {
        // Counted by hand for each row and checked against the sheet the planning lays out.
        let plain = check(5, regular(16, &["E=ABCD"]));
        assert_eq!(plain.describe(), "16 runs in the fraction");
        let mut d = regular(16, &["E=ABCD"]);
        d.replicates = 2;
        d.centre_points_per_block = 3;
        d.blocks = BlockChoice::Count(2);
        let blocked = check(5, d);
        assert_eq!(
            blocked.describe(),
            "38 runs: 32 in the fraction (16 × 2 replicates), 6 centre points"
        );
        let mut d = regular(8, &["D=AB", "E=AC", "F=BC", "G=ABC"]);
        d.fold = Some(FoldKind::Full);
        assert_eq!(
            check(7, d).describe(),
            "16 runs: 8 in the fraction, 8 in the fold-over block"
        );
        let mut d = regular(16, &["E=ABC", "F=BCD"]);
        d.fold = Some(FoldKind::Factor(0));
        d.centre_points_per_block = 2;
        assert_eq!(
            check(6, d).describe(),
            "36 runs: 16 in the fraction, 16 in the fold-over block, 4 centre points"
        );
        let mut d = regular(16, &["E=ABC", "F=BCD"]);
        d.added = Some(AddedBlock::Semifold(SemiFold {
            fold: FoldKind::Factor(0),
            keep: 2,
            level: -1,
        }));
        assert_eq!(
            check(6, d).describe(),
            "24 runs: 16 in the fraction, 8 in the half fold-over block"
        );
        let mut d = DesignSettings {
            centre_points_per_block: 3,
            seed: 4,
            ..DesignSettings::default()
        };
        d.axial = Some(AxialRuns { centre_points: 3 });
        // 8 corners and 3 centre points, then 6 axial runs and 3 centre runs (the sheet of
        // `twofold plan --augment axial` for three factors).
        assert_eq!(
            check(3, d).describe(),
            "20 runs: 8 in the full factorial, 3 centre points, 6 axial runs and 3 centre runs in the axial block"
        );
        let mut d = DesignSettings {
            base_runs: Some(12),
            replicates: 2,
            centre_points_per_block: 2,
            seed: 9,
            ..DesignSettings::default()
        };
        d.fold = Some(FoldKind::Full);
        // The mirror image: 12 runs once, without centre points.
        assert_eq!(
            check(6, d).describe(),
            "38 runs: 24 in the screening design (12 × 2 replicates), 12 in the fold-over block, 2 centre points"
        );
    }

    #[test]
    fn runs_added_to_separate_interactions_are_counted_as_block_two() {
        let mut p = laid_out(5, regular(8, &["D=AB", "E=AC"]));
        let terms = crate::project::parse_interactions("BD", 5).unwrap();
        p.apply(Edit::AddFollowUp(FollowUp::Separate(terms)))
            .unwrap();
        let count = SheetRuns::of(&p.design, 5).unwrap();
        assert_eq!(count.total(), p.runs.len());
        let added = p.runs.iter().filter(|r| r.block == 2).count();
        assert_eq!(count.follow_up, Some((FollowUpBlock::Separate, added)));
        assert!(
            count.describe().ends_with(&format!(
                "{added} in the block added to separate interactions"
            )),
            "{}",
            count.describe()
        );
    }
}
