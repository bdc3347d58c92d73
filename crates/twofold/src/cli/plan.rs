//! `twofold plan`: a design, its aliasing and its run sheet, without a window.
//!
//! ```text
//! twofold plan --factors 5 --runs 16 [--generators "E=ABCD"] [--centre-points 3]
//!              [--replicates 2] [--blocks 2 | --block-on "ABC,ACD"] [--replicates-as-blocks]
//!              [--seed 42] [--standard-order] [--fold full|A|semifold:A[:B+]]
//!              [--augment axial|"separate:AB,CE"] [--search-seconds 2]
//!              [--json | --csv]
//! ```

use super::args::whole_number;
use super::{EXIT_BAD_INPUT, EXIT_FAILURE};
use serde_json::{Value, json};
use std::io::Write;
use std::time::Duration;
use twofold_core::alias::{AliasReport, alias_report, chain_label, relation_label, roman};
use twofold_core::design::{FractionalDesign, check_run_count};
use twofold_core::foldover::{FoldKind, FoldOver, fold_over};
use twofold_core::ofat;

use super::plan_power::{PlanPower, plan_power};
use super::plan_require;
use twofold_core::plan::{Blocking, Plan, PlanSpec, build_fold_over_plan, build_plan};
use twofold_core::search::{SearchBudget, minimum_aberration};
use twofold_core::splitplot::fraction::split_plot_fraction;
use twofold_core::term::{LETTERS, MAX_FACTORS, Term, factor_index};
use twofold_study::project::{AddedBlock, AxialRuns, BlockChoice, DesignSettings, SheetRuns};

/// The long description shown by `--help`.
pub(crate) const LONG_ABOUT: &str = "\
Choose a two-level design, show what it confounds, and print the run sheet in random order.

Without --runs the design is the full factorial. With --runs and no --generators, the fraction
of least aberration is searched for and the output says whether the search proved it best. The
report lists the generators, the defining relation, the word-length pattern, the aliases up to
three-factor terms and the effects left clear.

Follow-up blocks: --fold full or --fold A adds the fold-over as block 2. --fold semifold:A adds
half of the fold-over on A (Mee & Peralta 2000): the fold-over runs with the first factor other
than A at +, or with the factor and level named, as in semifold:A:C- (semifold:full halves the
full fold-over, A at + by default). --augment \"separate:AB,CE\" adds the fewest runs, chosen from
the full factorial (up to 16 factors), that estimate every main effect and the named
interactions together, D-optimal for that model. Both say which terms the combined runs
estimate, with each one's variance inflation, since those runs are not a regular fraction.";

/// The examples shown by `--help`.
pub(crate) const AFTER_HELP: &str = "\
Examples:
  twofold plan --factors 5 --runs 16 --json
  twofold plan --factors \"Temp,Time,Speed,Load\" --centre-points 3 --replicates 2 --blocks 2 --seed 42
  twofold plan --factors 7 --runs 8 --generators \"D=AB,E=AC,F=BC,G=ABC\" --fold full
  twofold plan --factors \"Temp,Time,Feed\" --centre-points 3 --augment axial --json
  twofold plan --factors 6 --runs 16 --generators \"E=ABC,F=BCD\" --fold semifold:A:B+ --json
  twofold plan --factors 6 --runs 16 --generators \"E=ABC,F=BCD\" --augment \"separate:AE,BC\"";

/// The options of `twofold plan`, as typed.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct PlanArgs {
    /// How many factors (2 to 25), or their names separated by commas ("Temp,Time,Speed")
    #[arg(long, value_name = "K|NAMES")]
    pub factors: Option<String>,
    /// Base runs of the design, a power of two [default: the full factorial]
    #[arg(long, value_name = "N", value_parser = whole_number::<usize>)]
    pub runs: Option<usize>,
    /// The added factors as products of the base factors, e.g. "E=ABCD,F=-ABCE"
    #[arg(long, value_name = "LIST")]
    pub generators: Option<String>,
    /// Centre points added to each block [default: 0]
    #[arg(long = "centre-points", value_name = "N", value_parser = whole_number::<usize>)]
    pub centre_points: Option<usize>,
    /// How many times every run of the design is repeated [default: 1]
    #[arg(long, value_name = "N", value_parser = whole_number::<usize>)]
    pub replicates: Option<usize>,
    /// Split the runs into N blocks (2, 4, 8, ...), confounding interactions chosen for you
    #[arg(long, value_name = "N", value_parser = whole_number::<usize>)]
    pub blocks: Option<usize>,
    /// Split the runs into blocks by the signs of these interaction words, e.g. "ABC,ACD"
    #[arg(long = "block-on", value_name = "WORDS")]
    pub block_on: Option<String>,
    /// Put each replicate in a block of its own
    #[arg(long = "replicates-as-blocks")]
    pub replicates_as_blocks: bool,
    /// Seed of the random run order, to repeat a plan [default: from the clock, printed]
    #[arg(long, value_name = "N", value_parser = whole_number::<u64>)]
    pub seed: Option<u64>,
    /// Keep the runs in standard order instead of randomising them
    #[arg(long = "standard-order")]
    pub standard_order: bool,
    /// Factors that are hard to change, by letter or name, e.g. "Temp,Time": the runs are grouped
    /// into whole plots in which they stay fixed
    #[arg(long = "hard-to-change", value_name = "LIST")]
    pub hard_to_change: Option<String>,
    /// Whole plots per replicate with --hard-to-change and --runs (2, 4, 8, ...): the fraction of
    /// least aberration among split-plot fractions with that many resets [default: the most the
    /// run size allows, at most one per setting of the hard-to-change factors]
    #[arg(long = "whole-plots", value_name = "W", value_parser = whole_number::<usize>)]
    pub whole_plots: Option<usize>,
    /// Add the fold-over: `full` (all signs reversed) or one factor letter (that factor
    /// reversed); `semifold:A` adds half of it, the fold-over runs with the first other factor at
    /// + (`semifold:A:C-` names the factor and level, `semifold:full` halves the full fold-over)
    #[arg(long, value_name = "full|A|semifold:A[:B+]")]
    pub fold: Option<String>,
    /// Add follow-up runs as the last block: `axial` adds 2k axial runs (each factor at its low
    /// and high, the others at the centre: face-centred, alpha = 1) and centre runs, a central
    /// composite design for the quadratic model (the rotatable and orthogonal-blocking alphas
    /// are printed); "separate:AB,CE" adds the fewest runs that estimate every main effect and
    /// the named two-factor interactions together (D-optimal, from the full factorial, up to 16
    /// factors; block 2)
    #[arg(long, value_name = "axial|separate:LIST")]
    pub augment: Option<String>,
    /// Time allowed for the design search, in seconds (more than 0, at most 3600) [default: 2]
    #[arg(long = "search-seconds", value_name = "S")]
    pub search_seconds: Option<String>,
    /// Process standard deviation, in the response's units: adds the design's power
    #[arg(long, value_name = "S", allow_hyphen_values = true)]
    pub sigma: Option<String>,
    /// Level of the two-sided test of an effect (with --sigma) [default: 0.05]
    #[arg(long, value_name = "A", allow_hyphen_values = true)]
    pub alpha: Option<String>,
    /// Probability of finding the effect (with --sigma) [default: 0.8]
    #[arg(long, value_name = "P", allow_hyphen_values = true)]
    pub power: Option<String>,
    /// An effect size to find: adds the replicates it needs (with --sigma)
    #[arg(long, value_name = "D", allow_hyphen_values = true)]
    pub effect: Option<String>,
    /// Two-factor interactions that must be clear of main effects and other two-factor
    /// interactions, e.g. "AB,CE": the design of least aberration that keeps them clear, in the
    /// fewest runs unless --runs is given (with --generators, says whether those keep them clear)
    #[arg(long, value_name = "LIST")]
    pub require: Option<String>,
    /// Model terms the power is figured for, e.g. A,B,C,AB (with --sigma) [default: the main
    /// effects]
    #[arg(long = "model-terms", value_name = "LIST")]
    pub model_terms: Option<String>,
    /// Print the plan as one JSON object
    #[arg(long)]
    pub json: bool,
    /// Print the run sheet as CSV (one row per run)
    #[arg(long)]
    pub csv: bool,
}

/// Bad input to `plan`, in words for the command line.
#[derive(Debug, thiserror::Error)]
#[error("{0}")]
struct PlanInputError(String);

fn invalid(msg: impl Into<String>) -> PlanInputError {
    PlanInputError(msg.into())
}

/// Everything `plan` computed, ready to print.
struct Planned {
    names: Vec<String>,
    design: FractionalDesign,
    report: AliasReport,
    proven: Option<bool>,
    plan: Plan,
    seed: u64,
    fold: Option<FoldOver>,
    follow: Option<super::plan_follow::FollowPlan>,
    split: Option<super::plan_split::SplitPlot>,
    centre_points: usize,
    replicates: usize,
    power: Option<PlanPower>,
    required: Vec<Term>,
    axial: Option<super::plan_axial::Axial>,
    /// The runs of the whole sheet, block by block (the engine's count the window states).
    sheet: Option<SheetRuns>,
}

/// Runs `twofold plan`.
pub fn run(args: &PlanArgs, out: &mut dyn Write, err: &mut dyn Write) -> i32 {
    if super::plan_screening::is_screening(args) {
        if args.augment.is_some()
            || args
                .fold
                .as_deref()
                .is_some_and(super::plan_follow::is_semifold)
        {
            let _ = writeln!(
                err,
                "error: a screening design is followed up by its full fold-over only (--fold full)"
            );
            return EXIT_BAD_INPUT;
        }
        let names = match screening_names(args) {
            Ok(n) => n,
            Err(e) => {
                let _ = writeln!(err, "error: {e}");
                return EXIT_BAD_INPUT;
            }
        };
        let seed = args.seed.unwrap_or_else(clock_seed);
        return super::plan_screening::run(args, names, seed, out, err);
    }
    let planned = match compute(args) {
        Ok(p) => p,
        Err(e) => {
            let _ = writeln!(err, "error: {e}");
            return EXIT_BAD_INPUT;
        }
    };
    let written = if args.json {
        let mut value = to_json(&planned);
        if let Some(s) = &planned.split {
            s.add_to(&mut value);
        }
        serde_json::to_string_pretty(&value)
            .map_err(std::io::Error::other)
            .and_then(|s| writeln!(out, "{s}"))
    } else if args.csv {
        write_csv(&planned, out)
    } else {
        write_text(&planned, out)
    };
    match written {
        Ok(()) => 0,
        Err(e) => {
            let _ = writeln!(err, "error: could not write the plan: {e}");
            EXIT_FAILURE
        }
    }
}

/// The checked factor names of a screening plan.
fn screening_names(a: &PlanArgs) -> Result<Vec<String>, PlanInputError> {
    if a.json && a.csv {
        return Err(invalid("choose one of --json and --csv"));
    }
    let factors = a.factors.as_deref().ok_or_else(|| {
        invalid("--factors is required: a count (5) or names (\"Temp,Time,Speed\")")
    })?;
    factor_names(factors)
}

fn compute(a: &PlanArgs) -> Result<Planned, PlanInputError> {
    if a.json && a.csv {
        return Err(invalid("choose one of --json and --csv"));
    }
    let factors = a.factors.as_deref().ok_or_else(|| {
        invalid("--factors is required: a count (5) or names (\"Temp,Time,Speed\")")
    })?;
    let names = factor_names(factors)?;
    let k = names.len();
    let runs = a.runs;
    if let Some(n) = runs {
        check_run_count(k, n).map_err(|e| invalid(e.to_string()))?;
    }
    let search_seconds: f64 = match a.search_seconds.as_deref() {
        Some(v) => v
            .trim()
            .parse::<f64>()
            .ok()
            .filter(|s| s.is_finite() && *s > 0.0 && *s <= 3600.0)
            .ok_or_else(|| {
                invalid(format!(
                    "--search-seconds: `{v}` is not a number of seconds between 0 and 3600"
                ))
            })?,
        None => 2.0,
    };
    let required = plan_require::parse(a.require.as_deref(), k).map_err(invalid)?;
    let htc = match a.hard_to_change.as_deref() {
        Some(list) => Some(super::plan_split::parse_factors(list, &names).map_err(invalid)?),
        None if a.whole_plots.is_some() => {
            return Err(invalid("--whole-plots goes with --hard-to-change"));
        }
        None => None,
    };
    let mut split_fraction = None;
    let (design, proven) = match a.generators.as_deref() {
        None if !required.is_empty() => {
            plan_require::design(k, &required, runs, search_seconds).map_err(invalid)?
        }
        Some(g) => (
            FractionalDesign::from_text(k, runs, g).map_err(|e| invalid(e.to_string()))?,
            None,
        ),
        None => match runs {
            None => (
                FractionalDesign::full(k).map_err(|e| invalid(e.to_string()))?,
                None,
            ),
            Some(n) if n == 1usize << k => (
                FractionalDesign::full(k).map_err(|e| invalid(e.to_string()))?,
                Some(true),
            ),
            Some(n) => {
                let budget = SearchBudget {
                    time: Duration::from_secs_f64(search_seconds),
                };
                if let Some(htc) = &htc {
                    let f = split_plot_fraction(k, htc, n, a.whole_plots, &budget)
                        .map_err(|e| invalid(format!("--hard-to-change: {e}")))?;
                    let out = (f.design.clone(), Some(f.proven_minimum_aberration));
                    split_fraction = Some(f);
                    out
                } else {
                    let outcome =
                        minimum_aberration(k, n, &budget).map_err(|e| invalid(e.to_string()))?;
                    (outcome.design, Some(outcome.proven_minimum_aberration))
                }
            }
        },
    };
    if a.whole_plots.is_some() && split_fraction.is_none() {
        return Err(invalid(
            "--whole-plots chooses among split-plot fractions: give --runs below the full factorial and no --generators",
        ));
    }
    let centre_points: usize = a.centre_points.unwrap_or(0);
    let replicates: usize = a.replicates.unwrap_or(1);
    if replicates == 0 {
        return Err(invalid("--replicates must be at least 1"));
    }
    let blocking = match (a.blocks, a.block_on.as_deref()) {
        (Some(_), Some(_)) => return Err(invalid("give --blocks or --block-on, not both")),
        (Some(0 | 1), None) => Blocking::None,
        (Some(n), None) => Blocking::Count(n),
        (None, Some(text)) => Blocking::Generators(
            text.split(',')
                .map(|t| Term::parse(t, k).map_err(|e| invalid(format!("--block-on: {e}"))))
                .collect::<Result<Vec<_>, _>>()?,
        ),
        (None, None) => Blocking::None,
    };
    let seed: u64 = match a.seed {
        Some(s) => s,
        None => clock_seed(),
    };
    let mut spec = PlanSpec::new(design.clone(), seed);
    spec.centre_points = centre_points;
    spec.replicates = replicates;
    spec.blocking = blocking;
    spec.replicates_as_blocks = a.replicates_as_blocks;
    spec.randomise = !a.standard_order;
    let follow_request = super::plan_follow::parse(a, k).map_err(invalid)?;
    let fold = match a.fold.as_deref() {
        Some(text) if super::plan_follow::is_semifold(text) => None,
        None => None,
        Some(text) => {
            let kind = parse_fold(text, k)?;
            Some(fold_over(&design, kind).map_err(|e| invalid(e.to_string()))?)
        }
    };
    let mut follow = None;
    let mut plan = match (&fold, &follow_request) {
        (Some(f), _) => build_fold_over_plan(&spec, f).map_err(|e| invalid(e.to_string()))?,
        (None, Some(r)) => {
            let (plan, f) = super::plan_follow::plan(r, &spec).map_err(invalid)?;
            follow = Some(f);
            plan
        }
        (None, None) => build_plan(&spec).map_err(|e| invalid(e.to_string()))?,
    };
    let axial = super::plan_axial::augment(
        a.augment.as_deref(),
        &mut plan,
        centre_points,
        seed,
        !a.standard_order,
    )
    .map_err(invalid)?;
    let split = match htc {
        None => None,
        Some(htc) => {
            if plan.block_count > 1 {
                return Err(invalid(
                    "--hard-to-change: blocks and whole plots together are not offered yet; plan it unblocked",
                ));
            }
            let mut s = super::plan_split::split(&mut plan, &htc, seed, !a.standard_order);
            s.fraction = split_fraction.map(|f| (f.whole_plots, f.proven_minimum_aberration));
            Some(s)
        }
    };
    let report = match &fold {
        None => alias_report(&design),
        Some(f) => f.combined_aliases.clone(),
    };
    let settings = DesignSettings {
        generators: design.generator_labels(),
        base_runs: u32::try_from(design.base_runs()).ok(),
        centre_points_per_block: u32::try_from(centre_points).unwrap_or(u32::MAX),
        replicates: u32::try_from(replicates).unwrap_or(u32::MAX),
        blocks: match &spec.blocking {
            Blocking::None => BlockChoice::Count(1),
            Blocking::Count(n) => BlockChoice::Count(u32::try_from(*n).unwrap_or(u32::MAX)),
            Blocking::Generators(g) => BlockChoice::Generators(labels(g)),
        },
        replicates_as_blocks: a.replicates_as_blocks,
        fold: fold.as_ref().map(|f| f.kind),
        axial: axial.as_ref().map(|x| AxialRuns {
            centre_points: u32::try_from(x.centre_runs).unwrap_or(u32::MAX),
        }),
        added: follow_request.as_ref().and_then(|r| match r {
            super::plan_follow::FollowRequest::Semi(s) => Some(AddedBlock::Semifold(*s)),
            super::plan_follow::FollowRequest::Separate(terms) => {
                follow.as_ref().map(|f| AddedBlock::Separate {
                    interactions: labels(terms),
                    runs: f.added_runs().to_vec(),
                })
            }
        }),
        ..DesignSettings::default()
    };
    // The sheet laid out above is the one counted: the count is stated only when they agree.
    let sheet = SheetRuns::of(&settings, k).filter(|c| c.total() == plan.total_runs());
    let design = plan.design.clone();
    let power = plan_power(a, &plan, k, replicates).map_err(invalid)?;
    Ok(Planned {
        names,
        design,
        report,
        proven,
        plan,
        seed,
        fold,
        follow,
        split,
        centre_points,
        replicates,
        power,
        required,
        axial,
        sheet,
    })
}

/// `5` gives five unnamed factors A..E; `Temp,Time,Speed` gives three named ones.
fn factor_names(text: &str) -> Result<Vec<String>, PlanInputError> {
    let t = text.trim();
    if let Ok(k) = t.parse::<usize>() {
        if !(2..=MAX_FACTORS).contains(&k) {
            return Err(invalid(format!(
                "--factors {k}: a design has 2 to {MAX_FACTORS} factors"
            )));
        }
        return Ok(LETTERS[..k].iter().map(|c| c.to_string()).collect());
    }
    let names: Vec<String> = t.split(',').map(|s| s.trim().to_string()).collect();
    if names.iter().any(String::is_empty) {
        return Err(invalid("--factors: a factor name is empty"));
    }
    if !(2..=MAX_FACTORS).contains(&names.len()) {
        return Err(invalid(format!(
            "--factors: {} names given; a design has 2 to {MAX_FACTORS} factors",
            names.len()
        )));
    }
    for (i, n) in names.iter().enumerate() {
        if names[..i].iter().any(|m| m.eq_ignore_ascii_case(n)) {
            return Err(invalid(format!("--factors: name `{n}` is given twice")));
        }
    }
    Ok(names)
}

fn parse_fold(text: &str, k: usize) -> Result<FoldKind, PlanInputError> {
    let t = text.trim();
    if t.eq_ignore_ascii_case("full") {
        return Ok(FoldKind::Full);
    }
    let mut chars = t.chars();
    if let (Some(c), None) = (chars.next(), chars.next())
        && let Some(i) = factor_index(c)
        && i < k
    {
        return Ok(FoldKind::Factor(i));
    }
    Err(invalid(format!(
        "--fold `{t}`: expected `full` or one factor letter A..{}",
        LETTERS[k - 1]
    )))
}

fn clock_seed() -> u64 {
    std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs())
        .unwrap_or(1)
}

fn labels(terms: &[Term]) -> Vec<String> {
    terms.iter().map(|t| t.label()).collect()
}

fn to_json(p: &Planned) -> Value {
    let k = p.design.factor_count();
    let mut aliases = serde_json::Map::new();
    for (t, a) in &p.report.aliases {
        aliases.insert(
            t.label(),
            Value::from(a.iter().map(ToString::to_string).collect::<Vec<_>>()),
        );
    }
    // Each chain once, leading term first: `aliases` above keeps one row per term for readers
    // that look a term up; `alias_chains` is the list to show.
    let chains: Vec<Value> = p
        .report
        .chains()
        .iter()
        .filter(|(_, a)| !a.is_empty())
        .map(|(t, a)| {
            let mut members = vec![t.label()];
            members.extend(a.iter().map(ToString::to_string));
            Value::from(members)
        })
        .collect();
    let runs = runs_json(&p.plan.runs);
    let fold = p.fold.as_ref().map(|f| {
        json!({
            "kind": match f.kind { FoldKind::Full => "full".to_string(), FoldKind::Factor(i) => LETTERS[i].to_string() },
            "description": f.describe(),
            "broken_words": f.broken_words.iter().map(|w| relation_label(*w)).collect::<Vec<_>>(),
            "repeats_original": f.repeats_original,
        })
    });
    let mut plan = json!({
        "family": "regular",
        "factors": LETTERS[..k].iter().map(|c| c.to_string()).collect::<Vec<_>>(),
        "factor_names": p.names,
        "base_runs": p.design.base_runs(),
        "total_runs": p.plan.total_runs(),
        "centre_points_per_block": p.centre_points,
        "replicates": p.replicates,
        "blocks": p.plan.block_count,
        "generators": p.design.generator_labels(),
        "defining_relation": p.report.defining_relation.iter().map(|w| relation_label(*w)).collect::<Vec<_>>(),
        "resolution": p.report.resolution,
        "word_length_pattern": p.report.word_length_pattern,
        "aliases": aliases,
        "alias_chains": chains,
        "clear_main_effects": labels(&p.report.clear_main_effects),
        "clear_two_factor_interactions": labels(&p.report.clear_two_factor_interactions),
        "proven_minimum_aberration": p.proven,
        "block_generators": labels(&p.plan.scheme.generators),
        "blocks_confounded_with": labels(&p.plan.scheme.confounded),
        "seed": p.seed,
        "ofat_equivalent_runs": ofat::equivalent_runs(k, p.design.base_runs()),
        "fold_over": fold,
        "power": p.power.as_ref().map(PlanPower::json),
        "runs": runs,
    });
    plan_require::add_json(&mut plan, &p.required, &p.report);
    if let Some(axial) = &p.axial {
        axial.add_json(&mut plan);
    }
    if let Some(f) = &p.follow {
        f.add_json(&mut plan);
    }
    plan
}

/// The `runs` array of `plan --json`: each run's orders, block, centre flag, replicate, levels.
pub(crate) fn runs_json(runs: &[twofold_core::plan::PlannedRun]) -> Vec<Value> {
    runs.iter()
        .map(|r| {
            json!({
                "std_order": r.std_order,
                "run_order": r.run_order,
                "block": r.block,
                "centre": r.centre,
                "replicate": r.replicate,
                "levels": r.levels,
            })
        })
        .collect()
}

fn write_csv(p: &Planned, out: &mut dyn Write) -> std::io::Result<()> {
    write_runs_csv(
        &p.names,
        &p.plan.runs,
        p.split.as_ref().map(|s| s.whole_plot.as_slice()),
        out,
    )
}

/// The run sheet as CSV, one row per run in the order given (also for screening designs), with
/// a `whole_plot` column when whole plots are given.
pub(crate) fn write_runs_csv(
    names: &[String],
    runs: &[twofold_core::plan::PlannedRun],
    whole_plot: Option<&[usize]>,
    out: &mut dyn Write,
) -> std::io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    let mut header = vec![
        "run_order".to_string(),
        "std_order".into(),
        "block".into(),
        "centre".into(),
        "replicate".into(),
    ];
    if whole_plot.is_some() {
        header.push("whole_plot".into());
    }
    header.extend(
        names
            .iter()
            .map(|n| twofold_study::interchange::guard(n).into_owned()),
    );
    w.write_record(&header).map_err(std::io::Error::other)?;
    for (n, r) in runs.iter().enumerate() {
        let mut row = vec![
            r.run_order.to_string(),
            r.std_order.to_string(),
            r.block.to_string(),
            if r.centre { "yes" } else { "no" }.to_string(),
            r.replicate.to_string(),
        ];
        if let Some(wp) = whole_plot {
            row.push(wp.get(n).map_or(String::new(), ToString::to_string));
        }
        row.extend(r.levels.iter().map(|v| v.to_string()));
        w.write_record(&row).map_err(std::io::Error::other)?;
    }
    w.flush()
}

fn write_text(p: &Planned, out: &mut dyn Write) -> std::io::Result<()> {
    let k = p.design.factor_count();
    let r = &p.report;
    let kind = match r.resolution {
        None => format!("full factorial 2^{k}"),
        Some(res) => format!(
            "2^({k}-{}) fraction, resolution {}",
            p.design.generators().len(),
            roman(res)
        ),
    };
    // With a fold-over the design described is the combined one: say what it is made of, so
    // its runs are not read as the first block's.
    let base = match &p.fold {
        Some(_) => format!(
            "the {}-run fraction and its fold-over",
            p.design.base_runs() / 2
        ),
        None => format!("{} base runs", p.design.base_runs()),
    };
    match &p.sheet {
        Some(sheet) => writeln!(out, "Design: {kind}, {base}; {}", sheet.describe())?,
        None => writeln!(
            out,
            "Design: {kind}, {base}, {} runs in all",
            p.plan.total_runs()
        )?,
    }
    for (i, n) in p.names.iter().enumerate() {
        if n.as_str() != LETTERS[i].to_string() {
            writeln!(out, "  {} = {n}", LETTERS[i])?;
        }
    }
    if !p.design.is_full() {
        writeln!(
            out,
            "Generators: {}",
            p.design.generator_labels().join(", ")
        )?;
        let words: Vec<String> = r
            .defining_relation
            .iter()
            .map(ToString::to_string)
            .collect();
        writeln!(out, "Defining relation: I = {}", words.join(" = "))?;
        let wlp: Vec<String> = r
            .word_length_pattern
            .iter()
            .map(ToString::to_string)
            .collect();
        writeln!(
            out,
            "Word-length pattern (A3, A4, ...): ({})",
            wlp.join(", ")
        )?;
    }
    match p.proven {
        Some(true) => writeln!(out, "Minimum aberration: proven by the search")?,
        Some(false) => writeln!(
            out,
            "Minimum aberration: not proven (the search ran out of time; best design found)"
        )?,
        None => {}
    }
    if let Some(line) = plan_require::text_line(&p.required, r) {
        writeln!(out, "{line}")?;
    }
    let warned = r.main_effects_aliased_with_interactions();
    if !warned.is_empty() {
        writeln!(
            out,
            "Warning: main effects are aliased with two-factor interactions; an apparent main effect may be an interaction."
        )?;
    }
    writeln!(
        out,
        "Alias chains (up to three-factor terms, each chain once):"
    )?;
    for (t, a) in r.chains() {
        if !a.is_empty() {
            writeln!(out, "  {}", chain_label(t, &a))?;
        }
    }
    writeln!(
        out,
        "Clear main effects: {}",
        labels(&r.clear_main_effects).join(", ")
    )?;
    writeln!(
        out,
        "Clear two-factor interactions: {}",
        labels(&r.clear_two_factor_interactions).join(", ")
    )?;
    if !p.plan.scheme.generators.is_empty() {
        writeln!(
            out,
            "Confounded with blocks: {}",
            labels(&p.plan.scheme.confounded).join(", ")
        )?;
    }
    if let Some(f) = &p.fold {
        writeln!(
            out,
            "Fold-over: {}; block 2 holds the follow-up runs",
            f.describe()
        )?;
    }
    writeln!(
        out,
        "One factor at a time would need {} runs for the same precision.",
        ofat::equivalent_runs(k, p.design.base_runs())
    )?;
    if let Some(axial) = &p.axial {
        writeln!(out, "{}", axial.text())?;
    }
    if let Some(power) = &p.power {
        writeln!(out, "{}", power.text())?;
    }
    if let Some(s) = &p.split {
        writeln!(out, "{}", s.text())?;
    }
    if let Some(f) = &p.follow {
        for line in f.text_lines() {
            writeln!(out, "{line}")?;
        }
    }
    writeln!(out, "Seed: {}", p.seed)?;
    writeln!(out)?;
    write!(out, "{:>4} {:>4} {:>5}", "run", "std", "block")?;
    for letter in &LETTERS[..k] {
        write!(out, " {letter:>3}")?;
    }
    writeln!(out)?;
    for run in &p.plan.runs {
        write!(
            out,
            "{:>4} {:>4} {:>5}",
            run.run_order, run.std_order, run.block
        )?;
        for v in &run.levels {
            let s = match v {
                -1 => "-",
                1 => "+",
                _ => "0",
            };
            write!(out, " {s:>3}")?;
        }
        writeln!(out)?;
    }
    Ok(())
}
