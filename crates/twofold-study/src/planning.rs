//! What a planned design can see before the first run: power and the smallest detectable effect
//! for the design options of the window, the `plan` command and the summary page, from
//! `twofold_core::power` (two-sided t test of one effect in the main-effects model).

use twofold_core::power::{PowerSpec, main_effects_error_df, replicates_needed};

use crate::project::{BlockChoice, DesignSettings, PowerSettings, Project};

/// Most replicates tried when looking for the count that finds the effect asked for.
pub const MAX_REPLICATES: usize = 64;

/// The runs of a design as far as power is concerned.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct RunCounts {
    /// Two-level runs of one replicate (centre points not counted).
    pub per_replicate: usize,
    /// Complete copies.
    pub replicates: usize,
    /// Centre points in all.
    pub centre: usize,
    /// Blocks of one replicate (1 = unblocked).
    pub blocks_per_replicate: usize,
    /// Whether each replicate is a set of blocks of its own.
    pub replicates_as_blocks: bool,
    /// Terms of the model the test is made in (the main effects: the number of factors).
    pub terms: usize,
}

impl RunCounts {
    /// The counts of `design` for `factors` factors with `per_replicate` two-level runs in one
    /// replicate (a fold-over doubles them), for the main-effects model.
    pub fn of(design: &DesignSettings, factors: usize, per_replicate: usize) -> RunCounts {
        let blocks = match &design.blocks {
            BlockChoice::Count(n) => (*n).max(1) as usize,
            BlockChoice::Generators(g) => {
                1usize << g.iter().filter(|t| !t.trim().is_empty()).count().min(16)
            }
        };
        let per_replicate = if design.fold.is_some() {
            2 * per_replicate
        } else {
            per_replicate
        };
        let blocks = if design.fold.is_some() { 2 } else { blocks };
        let replicates = design.replicates.max(1) as usize;
        let set_count = if design.replicates_as_blocks {
            blocks * replicates
        } else {
            blocks
        };
        RunCounts {
            per_replicate,
            replicates,
            centre: design.centre_points_per_block as usize * set_count,
            blocks_per_replicate: blocks,
            replicates_as_blocks: design.replicates_as_blocks,
            terms: factors,
        }
    }

    fn spec(&self, sigma: f64, alpha: f64, replicates: usize) -> PowerSpec {
        let runs = self.per_replicate * replicates;
        let blocks = if self.replicates_as_blocks {
            self.blocks_per_replicate * replicates
        } else {
            self.blocks_per_replicate
        };
        PowerSpec {
            sigma,
            alpha,
            runs,
            error_df: main_effects_error_df(runs + self.centre, self.terms, blocks),
        }
    }
}

/// The power figures of one design.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DesignPower {
    /// Process standard deviation used.
    pub sigma: f64,
    /// Level of the test.
    pub alpha: f64,
    /// Power asked.
    pub power: f64,
    /// Error degrees of freedom of the main-effects model.
    pub error_df: usize,
    /// Smallest effect found with probability `power`.
    pub detectable_effect: f64,
    /// The effect size asked about, if any.
    pub effect: Option<f64>,
    /// Replicates of the design needed to find `effect` with probability `power` (`None`: more
    /// than [`MAX_REPLICATES`], or no effect asked).
    pub replicates_needed: Option<usize>,
}

/// Power figures of a design with `counts`, given the engineer's settings; `None` without a
/// process standard deviation, an error in words when the numbers cannot be used.
pub fn design_power(
    counts: &RunCounts,
    settings: &PowerSettings,
) -> Option<Result<DesignPower, String>> {
    let sigma = settings.sigma?;
    let (alpha, power) = (settings.alpha, settings.power);
    // A named model: its distinct terms (labels that do not read as terms are not counted; the
    // field that takes them says so).
    let mut counts = *counts;
    if !settings.model_labels().is_empty() {
        let mut terms: Vec<twofold_core::term::Term> = settings
            .model_labels()
            .into_iter()
            .filter_map(|t| twofold_core::term::Term::parse(t, counts.terms.max(1)).ok())
            .collect();
        terms.sort();
        terms.dedup();
        counts.terms = terms.len();
    }
    let counts = &counts;
    let now = counts.spec(sigma, alpha, counts.replicates);
    let compute = || -> Result<DesignPower, String> {
        let detectable_effect = now.detectable_effect(power).map_err(|e| e.to_string())?;
        let replicates_needed = match settings.effect {
            Some(d) => {
                replicates_needed(d, power, MAX_REPLICATES, |r| counts.spec(sigma, alpha, r))
                    .map_err(|e| e.to_string())?
            }
            None => None,
        };
        Ok(DesignPower {
            sigma,
            alpha,
            power,
            error_df: now.error_df,
            detectable_effect,
            effect: settings.effect,
            replicates_needed,
        })
    };
    Some(compute())
}

/// Power figures of the project's run sheet as planned (two-level runs counted on the sheet).
pub fn project_power(project: &Project) -> Option<Result<DesignPower, String>> {
    project.power.sigma?;
    let two_level = project.runs.iter().filter(|r| !r.centre).count();
    let replicates = project.design.replicates.max(1) as usize;
    let mut design = project.design.clone();
    // The sheet already holds the fold-over's runs.
    design.fold = None;
    let mut counts = RunCounts::of(&design, project.factors.len(), two_level / replicates);
    counts.centre = project.runs.iter().filter(|r| r.centre).count();
    if project.design.fold.is_some() {
        counts.blocks_per_replicate = 2;
    }
    design_power(&counts, &project.power)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn counts_follow_the_design_settings() {
        let d = DesignSettings {
            replicates: 2,
            centre_points_per_block: 3,
            blocks: BlockChoice::Count(2),
            ..DesignSettings::default()
        };
        let c = RunCounts::of(&d, 4, 16);
        assert_eq!(c.per_replicate, 16);
        assert_eq!(c.centre, 6);
        assert_eq!(c.blocks_per_replicate, 2);
        // Error df of the main-effects model: 32 + 6 − 1 − 4 − (2 − 1) = 32 (counted by hand).
        let spec = c.spec(1.0, 0.05, 2);
        assert_eq!(spec.error_df, 32);
        assert_eq!(spec.runs, 32);
    }

    #[test]
    fn no_sigma_no_figures_and_more_replicates_see_smaller_effects() {
        let d = DesignSettings::default();
        let c = RunCounts::of(&d, 3, 8);
        assert!(design_power(&c, &PowerSettings::default()).is_none());
        let s = PowerSettings {
            sigma: Some(1.0),
            effect: Some(1.5),
            ..PowerSettings::default()
        };
        let one = match design_power(&c, &s) {
            Some(Ok(p)) => p,
            other => panic!("{other:?}"),
        };
        let d2 = DesignSettings {
            replicates: 2,
            ..DesignSettings::default()
        };
        let two = match design_power(&RunCounts::of(&d2, 3, 8), &s) {
            Some(Ok(p)) => p,
            other => panic!("{other:?}"),
        };
        assert!(two.detectable_effect < one.detectable_effect);
        // Twice the runs need at most as many copies of the doubled design as of the single one.
        assert!(two.replicates_needed <= one.replicates_needed);
        assert!(one.replicates_needed.is_some());
    }
}
