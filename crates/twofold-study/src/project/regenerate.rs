//! The run sheet from the design: calls the core's planning and carries typed data over.
//!
//! When the sheet is regenerated, a new run takes over the typed values, status, note and entry
//! time of an old run with the same coded settings and replicate number (the *k*-th such old run
//! goes to the *k*-th such new run, in standard order). Whatever finds no partner is counted by
//! [`Project::design_change_would_discard`] before the window asks the engineer, and comes back
//! with undo.

use std::collections::HashMap;

use super::cell::Cell;
use super::model::{BlockChoice, DesignSettings, Project, RunRecord, RunStatus};
use super::validate::{Field, Severity};
use twofold_core::term::Term;

/// Why the run sheet could not be generated.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum PlanError {
    /// The factors or the design settings have errors; the first one is given.
    #[error("{0}")]
    Invalid(String),
    /// The design (factor count, run size, generators) is not a valid two-level design.
    #[error(transparent)]
    Design(#[from] twofold_core::design::DesignError),
    /// The search for a fraction of the chosen size could not run.
    #[error(transparent)]
    Search(#[from] twofold_core::search::SearchError),
    /// A block generator could not be read.
    #[error("block generator: {0}")]
    BlockTerm(#[from] twofold_core::term::TermError),
    /// Replicates, blocks or centre points could not be laid out.
    #[error(transparent)]
    Layout(#[from] twofold_core::plan::PlanError),
    /// The fold-over could not be made.
    #[error(transparent)]
    Fold(#[from] twofold_core::foldover::FoldError),
}

/// The run sheet the project's factors and design settings give, with typed data carried over
/// from the current sheet, and the design settings as used (generators filled in when the
/// fraction was found by the search, so the file records exactly what was run).
pub(crate) fn regenerate_runs(
    project: &Project,
) -> Result<(Vec<RunRecord>, DesignSettings), PlanError> {
    let (mut fresh, used) = plan_runs(project, &project.design)?;
    carry_over(&project.runs, &mut fresh);
    Ok((fresh, used))
}

/// Groups `runs` (standard order) into whole plots when factors are hard to change: the whole
/// plots and the runs inside each in random order from `design.seed`
/// (`twofold_core::splitplot`), whole plots numbered in run order. Refused with blocks or a
/// fold-over (their combination with whole plots is not offered yet).
fn into_whole_plots(
    project: &Project,
    design: &DesignSettings,
    runs: &mut [RunRecord],
) -> Result<(), PlanError> {
    let htc: Vec<usize> = project
        .factors
        .iter()
        .enumerate()
        .filter(|(_, f)| f.hard_to_change)
        .map(|(i, _)| i)
        .collect();
    if htc.is_empty() {
        return Ok(());
    }
    if htc.len() == project.factors.len() {
        return Err(PlanError::Invalid(
            "every factor is marked hard to change: at least one must change from run to run"
                .into(),
        ));
    }
    if runs.iter().any(|r| r.block > 1) {
        return Err(PlanError::Invalid(
            "hard-to-change factors with blocks or a fold-over are not offered yet: plan the whole plots unblocked".into(),
        ));
    }
    let rows: Vec<Vec<i8>> = runs.iter().map(|r| r.levels.clone()).collect();
    let replicate: Vec<u32> = runs.iter().map(|r| r.replicate).collect();
    let layout = twofold_core::splitplot::whole_plot_layout(
        &rows,
        &replicate,
        &htc,
        design.seed,
        design.randomize,
    );
    for (position, &i) in layout.order.iter().enumerate() {
        runs[i].run_order = u32::try_from(position + 1).unwrap_or(u32::MAX);
        runs[i].whole_plot = u32::try_from(layout.whole_plot[i]).ok();
    }
    Ok(())
}

/// Fresh, empty runs for `design` over the project's factors and responses, and the settings as
/// used (see [`regenerate_runs`]). The generators as used are those of the fraction, also when
/// a fold-over is added to it.
///
/// Empty generators with `base_runs` below 2^k call the minimum-aberration search with its
/// default time budget (proven optimal within it up to 64 runs), so this may take up to about two
/// seconds for large designs.
pub(crate) fn plan_runs(
    project: &Project,
    design: &DesignSettings,
) -> Result<(Vec<RunRecord>, DesignSettings), PlanError> {
    use twofold_core::foldover::fold_over;
    use twofold_core::plan::{Blocking, PlanSpec, build_fold_over_plan, build_plan};

    let mut check = project.clone();
    check.design = design.clone();
    if let Some(p) = check.validate().into_iter().find(|p| {
        p.severity == Severity::Error
            && !matches!(
                p.field,
                Field::ResponseName { .. } | Field::ResponseModel { .. }
            )
    }) {
        return Err(PlanError::Invalid(p.message));
    }
    let k = project.factors.len();
    if let Some(n) = design.screening_runs() {
        return screening_sheet(project, design, n);
    }
    let fraction = fraction_of(k, design, &hard_to_change_of(project))?;
    let blocking = match &design.blocks {
        BlockChoice::Count(n) if *n <= 1 => Blocking::None,
        BlockChoice::Count(n) => Blocking::Count(*n as usize),
        BlockChoice::Generators(g) => Blocking::Generators(
            g.iter()
                .filter(|t| !t.trim().is_empty())
                .map(|t| Term::parse(t, k))
                .collect::<Result<_, _>>()?,
        ),
    };
    let mut used = design.clone();
    used.generators = fraction.generator_labels();
    let spec = PlanSpec {
        design: fraction,
        centre_points: design.centre_points_per_block as usize,
        replicates: design.replicates as usize,
        blocking,
        replicates_as_blocks: design.replicates_as_blocks,
        seed: design.seed,
        randomise: design.randomize,
    };
    // With a fold-over the fraction's runs are block 1 and the folded runs block 2, laid out by
    // the same function `twofold plan --fold` uses, so both give the same sheet for one seed.
    let plan = match (design.fold, &design.added) {
        (Some(kind), _) => build_fold_over_plan(&spec, &fold_over(&spec.design, kind)?)?,
        (None, Some(block)) => {
            twofold_core::plan::build_added_block_plan(&spec, &block.runs(&spec.design)?)?
        }
        (None, None) => build_plan(&spec)?,
    };
    let planned = super::axial::with_axial_block(k, design, plan.runs)?;
    let out = records(project, design, planned)?;
    Ok((out, used))
}

/// Empty run records of the planned `runs` for the project's responses, in standard order,
/// grouped into whole plots when factors are hard to change.
fn records(
    project: &Project,
    design: &DesignSettings,
    runs: Vec<twofold_core::plan::PlannedRun>,
) -> Result<Vec<RunRecord>, PlanError> {
    let responses = project.responses.len();
    let mut out: Vec<RunRecord> = runs
        .into_iter()
        .map(|r| RunRecord {
            // The core caps a plan at 2^20 runs, well inside u32.
            std_order: u32::try_from(r.std_order).unwrap_or(u32::MAX),
            run_order: u32::try_from(r.run_order).unwrap_or(u32::MAX),
            block: r.block,
            centre: r.centre,
            replicate: r.replicate,
            levels: r.levels,
            values: vec![Cell::default(); responses],
            status: RunStatus::ToDo,
            note: String::new(),
            entered_at: None,
            whole_plot: None,
        })
        .collect();
    out.sort_by_key(|r| r.std_order);
    into_whole_plots(project, design, &mut out)?;
    Ok(out)
}

/// The fraction `design` names for `k` factors (without its fold-over): from the generators,
/// or the full factorial, or, with only a run size, the fraction found by the minimum-aberration
/// search.
pub(crate) fn fraction_of(
    k: usize,
    design: &DesignSettings,
    hard_to_change: &[usize],
) -> Result<twofold_core::design::FractionalDesign, PlanError> {
    use twofold_core::design::FractionalDesign;
    use twofold_core::search::{SearchBudget, minimum_aberration};
    use twofold_core::splitplot::fraction::split_plot_fraction;
    let runs = design.base_runs.map(|r| r as usize);
    let full = 1usize.checked_shl(k as u32).unwrap_or(usize::MAX);
    Ok(if design.generators.iter().all(|g| g.trim().is_empty()) {
        match runs {
            // Hard-to-change factors: the fraction of least aberration among split-plot
            // fractions (whole plots as many as the run size allows).
            Some(n) if n != full && !hard_to_change.is_empty() => {
                split_plot_fraction(k, hard_to_change, n, None, &SearchBudget::default())
                    .map_err(|e| PlanError::Invalid(e.to_string()))?
                    .design
            }
            Some(n) if n != full => minimum_aberration(k, n, &SearchBudget::default())?.design,
            _ => FractionalDesign::full(k)?,
        }
    } else {
        FractionalDesign::from_text(k, runs, &design.generators.join(","))?
    })
}

/// The hard-to-change factors of `project` (0-based).
pub fn hard_to_change_of(project: &Project) -> Vec<usize> {
    project
        .factors
        .iter()
        .enumerate()
        .filter(|(_, f)| f.hard_to_change)
        .map(|(i, _)| i)
        .collect()
}

/// The sheet of a Plackett–Burman screening design of `n` runs (no generators, one block, no
/// fold-over yet): replicates and centre points as for regular designs.
fn screening_sheet(
    project: &Project,
    design: &DesignSettings,
    n: usize,
) -> Result<(Vec<RunRecord>, DesignSettings), PlanError> {
    let blocked = match &design.blocks {
        BlockChoice::Count(b) => *b > 1,
        BlockChoice::Generators(g) => g.iter().any(|t| !t.trim().is_empty()),
    };
    let fold = match design.fold {
        None => false,
        Some(twofold_core::foldover::FoldKind::Full) => true,
        Some(_) => {
            return Err(PlanError::Invalid(format!(
                "a {n}-run screening design is folded over in full; single-factor folds are not offered for it"
            )));
        }
    };
    if blocked || design.replicates_as_blocks {
        return Err(PlanError::Invalid(format!(
            "a {n}-run screening design is planned in one block (other blocking of screening designs is not offered yet)"
        )));
    }
    if design.generators.iter().any(|g| !g.trim().is_empty()) {
        return Err(PlanError::Invalid(format!(
            "a {n}-run screening design has no generators: clear them or choose a regular fraction"
        )));
    }
    let k = project.factors.len();
    let pb = twofold_core::screening::plackett_burman(n, k)
        .map_err(|e| PlanError::Invalid(e.to_string()))?;
    let runs = twofold_core::screening::screening_runs(
        &pb,
        design.replicates as usize,
        design.centre_points_per_block as usize,
        design.seed,
        design.randomize,
        fold,
    );
    let out = records(project, design, runs)?;
    Ok((out, design.clone()))
}

/// Key matching an old run to a new one.
type MatchKey = (Vec<i8>, u32);

/// The partner in `new` of each run of `old` (same coded settings and replicate, k-th to k-th in
/// standard order), or `None` when it has none.
pub(crate) fn partners(old: &[RunRecord], new: &[RunRecord]) -> Vec<Option<usize>> {
    let mut slots: HashMap<MatchKey, Vec<usize>> = HashMap::new();
    for (i, run) in new.iter().enumerate() {
        slots
            .entry((run.levels.clone(), run.replicate))
            .or_default()
            .push(i);
    }
    // Reverse so that `pop` hands out the partners in standard order.
    for list in slots.values_mut() {
        list.reverse();
    }
    old.iter()
        .map(|run| {
            slots
                .get_mut(&(run.levels.clone(), run.replicate))
                .and_then(Vec::pop)
        })
        .collect()
}

/// Moves typed data from `old` runs into their partners in `new` (see [`partners`]). Returns how
/// many typed cells found no partner.
pub(crate) fn carry_over(old: &[RunRecord], new: &mut [RunRecord]) -> usize {
    let mut lost = 0;
    for (run, partner) in old.iter().zip(partners(old, new)) {
        match partner {
            Some(j) => {
                let target = &mut new[j];
                // Response columns are the same on both sides: they come from the same project.
                for (dst, src) in target.values.iter_mut().zip(&run.values) {
                    dst.clone_from(src);
                }
                target.status = run.status.clone();
                target.note.clone_from(&run.note);
                target.entered_at.clone_from(&run.entered_at);
            }
            None => lost += run.values.iter().filter(|c| c.is_typed()).count(),
        }
    }
    lost
}

impl Project {
    /// How many typed values would be lost if the runs were regenerated with `design` (pass the
    /// current design to ask about regenerating after factor changes). When the design cannot be
    /// planned, nothing would be regenerated, so nothing is at stake: 0.
    pub fn design_change_would_discard(&self, design: &DesignSettings) -> usize {
        match plan_runs(self, design) {
            Ok((mut fresh, _)) => carry_over(&self.runs, &mut fresh),
            Err(_) => 0,
        }
    }

    /// Number of typed values anywhere in the run sheet.
    pub fn typed_value_count(&self) -> usize {
        self.runs
            .iter()
            .flat_map(|r| &r.values)
            .filter(|c| c.is_typed())
            .count()
    }
}
