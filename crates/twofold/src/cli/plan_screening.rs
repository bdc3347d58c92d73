//! `twofold plan --runs N` with N of 12, 20, 24, 28, 36, 40, 44 or 48: a Plackett–Burman
//! screening design from `twofold_core::screening`, its partial aliasing of main effects with
//! two-factor interactions, and the randomised run sheet.
//!
//! Replicates and centre points are planned as for regular designs (one block). Blocks,
//! generators and fold-overs of screening designs are not offered by this command yet and are
//! refused with a message.

use std::io::Write;

use serde_json::{Map, Value, json};
use twofold_core::plan::PlannedRun;
use twofold_core::screening::{
    PartialAliases, SCREENING_RUNS, partial_aliases, plackett_burman, screening_runs,
};
use twofold_core::term::LETTERS;
use twofold_study::numbers::fmt_sig;
use twofold_study::planning::{RunCounts, design_power};
use twofold_study::project::PowerSettings;

use super::plan::PlanArgs;
use super::{EXIT_BAD_INPUT, EXIT_FAILURE};

/// Whether `plan` is asked for a screening design (a run size that is not a power of two).
pub(crate) fn is_screening(a: &PlanArgs) -> bool {
    a.runs.is_some_and(|n| SCREENING_RUNS.contains(&n))
}

struct Screening {
    names: Vec<String>,
    runs: usize,
    columns: Vec<usize>,
    b3: f64,
    aliases: Vec<PartialAliases>,
    sheet: Vec<PlannedRun>,
    seed: u64,
    replicates: usize,
    centre_points: usize,
    fold: bool,
    power: Option<Result<twofold_study::planning::DesignPower, String>>,
}

fn compute(a: &PlanArgs, names: Vec<String>, seed: u64) -> Result<Screening, String> {
    let n = a.runs.unwrap_or(0);
    if a.generators.is_some() {
        return Err(format!(
            "--generators: a {n}-run screening design has no generators (its runs come from Plackett & Burman's construction)"
        ));
    }
    if a.blocks.is_some_and(|b| b > 1) || a.block_on.is_some() || a.replicates_as_blocks {
        return Err(format!(
            "blocks of a {n}-run screening design are not offered yet: plan it unblocked"
        ));
    }
    let fold = match a.fold.as_deref().map(str::trim) {
        None => false,
        Some(f) if f.eq_ignore_ascii_case("full") => true,
        Some(_) => {
            return Err(format!(
                "--fold: a {n}-run screening design is folded over in full (--fold full); single-factor folds are not offered for it"
            ));
        }
    };
    let k = names.len();
    let design = plackett_burman(n, k).map_err(|e| e.to_string())?;
    let aliases = partial_aliases(&design.rows)
        .ok_or_else(|| "the main effects of this design are not estimable".to_string())?;
    let replicates = a.replicates.unwrap_or(1);
    if replicates == 0 {
        return Err("--replicates must be at least 1".into());
    }
    let centre_points = a.centre_points.unwrap_or(0);
    let sheet = screening_runs(
        &design,
        replicates,
        centre_points,
        seed,
        !a.standard_order,
        fold,
    );
    let aliases = if fold {
        let rows: Vec<Vec<i8>> = sheet
            .iter()
            .filter(|r| !r.centre)
            .map(|r| r.levels.clone())
            .collect();
        partial_aliases(&rows).unwrap_or(aliases)
    } else {
        aliases
    };
    let power = match a.sigma.as_deref() {
        None if a.alpha.is_some() || a.power.is_some() || a.effect.is_some() => {
            return Err(
                "--alpha, --power and --effect need --sigma (the process standard deviation)"
                    .into(),
            );
        }
        None => None,
        Some(text) => {
            let sigma = text
                .trim()
                .parse::<f64>()
                .ok()
                .filter(|s| s.is_finite() && *s > 0.0)
                .ok_or_else(|| format!("--sigma must be a number above 0, not {text:?}"))?;
            let counts = RunCounts {
                per_replicate: if fold { 2 * n } else { n },
                replicates,
                centre: centre_points,
                blocks_per_replicate: if fold { 2 } else { 1 },
                replicates_as_blocks: false,
                terms: k,
            };
            let settings = PowerSettings {
                sigma: Some(sigma),
                alpha: probability(a.alpha.as_deref(), "--alpha", 0.05)?,
                power: probability(a.power.as_deref(), "--power", 0.8)?,
                effect: match a.effect.as_deref() {
                    None => None,
                    Some(t) => Some(
                        t.trim()
                            .parse::<f64>()
                            .ok()
                            .filter(|d| d.is_finite() && *d > 0.0)
                            .ok_or_else(|| {
                                format!("--effect must be a number above 0, not {t:?}")
                            })?,
                    ),
                },
                model_terms: String::new(),
            };
            design_power(&counts, &settings)
        }
    };
    Ok(Screening {
        names,
        runs: n,
        columns: design.columns,
        b3: design.b3,
        aliases,
        sheet,
        seed,
        replicates,
        centre_points,
        fold,
        power,
    })
}

fn probability(text: Option<&str>, name: &str, default: f64) -> Result<f64, String> {
    match text {
        None => Ok(default),
        Some(t) => t
            .trim()
            .parse::<f64>()
            .ok()
            .filter(|p| *p > 0.0 && *p < 1.0)
            .ok_or_else(|| format!("{name} must be a number between 0 and 1, not {t:?}")),
    }
}

fn aliases_json(list: &[PartialAliases]) -> Value {
    let mut map = Map::new();
    for p in list {
        let entries: Vec<Value> = p
            .aliases
            .iter()
            .map(|(t, c)| json!({ "term": t.label(), "coefficient": c }))
            .collect();
        map.insert(p.term.label(), Value::from(entries));
    }
    Value::Object(map)
}

fn to_json(s: &Screening) -> Value {
    let k = s.names.len();
    let runs = super::plan::runs_json(&s.sheet);
    json!({
        "family": "plackett_burman",
        "factors": LETTERS[..k].iter().map(|c| c.to_string()).collect::<Vec<_>>(),
        "factor_names": s.names,
        "base_runs": s.runs,
        "total_runs": s.sheet.len(),
        "centre_points_per_block": s.centre_points,
        "replicates": s.replicates,
        "blocks": if s.fold { 2 } else { 1 },
        "fold_over": if s.fold { json!({ "kind": "full" }) } else { Value::Null },
        "generators": Vec::<String>::new(),
        "resolution": Value::Null,
        "columns_used": s.columns.iter().map(|c| c + 1).collect::<Vec<_>>(),
        "sum_of_squared_j3": s.b3,
        "partial_aliases": aliases_json(&s.aliases),
        "seed": s.seed,
        "power": s.power.as_ref().and_then(|p| p.as_ref().ok()).map(super::plan_power::power_json),
        "runs": runs,
    })
}

fn write_text(s: &Screening, out: &mut dyn Write) -> std::io::Result<()> {
    let k = s.names.len();
    writeln!(
        out,
        "Design: Plackett–Burman screening design, {} runs, {k} factors (columns {} of {})",
        s.runs,
        s.columns
            .iter()
            .map(|c| (c + 1).to_string())
            .collect::<Vec<_>>()
            .join(", "),
        s.runs - 1
    )?;
    writeln!(
        out,
        "Main effects are orthogonal to each other; each is partially aliased with two-factor interactions:"
    )?;
    for p in &s.aliases {
        if p.aliases.is_empty() {
            writeln!(out, "  {}: none", p.term.label())?;
            continue;
        }
        let mut sizes: Vec<String> = p.aliases.iter().map(|(_, c)| fmt_sig(c.abs(), 3)).collect();
        sizes.sort();
        sizes.dedup();
        writeln!(
            out,
            "  {}: {} interactions, coefficients ±{}",
            p.term.label(),
            p.aliases.len(),
            sizes.join(" or ±")
        )?;
    }
    if let Some(p) = &s.power {
        match p {
            Ok(p) => writeln!(
                out,
                "Power (main-effects model, {} error df, α = {}, σ = {}): the smallest effect found with probability {} is {}.",
                p.error_df,
                fmt_sig(p.alpha, 3),
                fmt_sig(p.sigma, 4),
                fmt_sig(p.power, 3),
                fmt_sig(p.detectable_effect, 4)
            )?,
            Err(e) => writeln!(out, "Power: not available: {e}")?,
        }
    }
    writeln!(out, "Seed: {}", s.seed)?;
    writeln!(out)?;
    write!(out, " run  std")?;
    for l in &LETTERS[..k] {
        write!(out, "{l:>4}")?;
    }
    writeln!(out)?;
    for r in &s.sheet {
        write!(out, "{:>4} {:>4}", r.run_order, r.std_order)?;
        for v in &r.levels {
            let c = match v {
                1 => "+",
                -1 => "-",
                _ => "0",
            };
            write!(out, "{c:>4}")?;
        }
        writeln!(out)?;
    }
    Ok(())
}

fn write_csv(s: &Screening, out: &mut dyn Write) -> std::io::Result<()> {
    super::plan::write_runs_csv(&s.names, &s.sheet, None, out)
}

/// Runs the screening branch of `plan` with the checked factor names and seed.
pub(crate) fn run(
    a: &PlanArgs,
    names: Vec<String>,
    seed: u64,
    out: &mut dyn Write,
    err: &mut dyn Write,
) -> i32 {
    let s = match compute(a, names, seed) {
        Ok(s) => s,
        Err(message) => {
            let _ = writeln!(err, "error: {message}");
            return EXIT_BAD_INPUT;
        }
    };
    let written = if a.json {
        serde_json::to_string_pretty(&to_json(&s))
            .map_err(std::io::Error::other)
            .and_then(|text| writeln!(out, "{text}"))
    } else if a.csv {
        write_csv(&s, out)
    } else {
        write_text(&s, out)
    };
    match written {
        Ok(()) => 0,
        Err(e) => {
            let _ = writeln!(err, "error: could not write the plan: {e}");
            EXIT_FAILURE
        }
    }
}
