//! From the project and the window's analysis results to a [`SummaryInput`].
//!
//! The numbers come from the response's [`Report`], the same value the analysis panes draw and
//! `twofold analyze` writes, so the page and the window cannot disagree: this module only
//! selects, orders and labels. With no terms chosen the page shows the report's default model
//! choice and says how it was made and which error the tests use. The best
//! settings are computed by the core's `best_settings` exactly as the prediction pane does.

use std::path::Path;

use sha2::{Digest, Sha256};
use twofold_core::alias::alias_report;
use twofold_core::anova::Source;
use twofold_core::design::FractionalDesign;
use twofold_core::ofat;
use twofold_core::predict::Goal;
use twofold_core::term::{LETTERS, Term};

use super::input::{
    AnovaRow, AnovaTable, BestSettings, DesignFacts, EffectRow, Equation, FactorRow, Footer,
    HalfNormalPoint, InteractionPanel, LenthFacts, LevelValue, OfatFacts, ResponseFacts,
    SummaryInput,
};
use super::{ExportError, ExportReport, Paper};
use crate::numbers;
use crate::project::{BlockChoice, Factor, FactorKind, Project, ResponseTransform, Severity};
use crate::report::Report;

/// Choices for a summary that are not stored in the project.
#[derive(Debug, Clone, PartialEq)]
pub struct BuildOptions {
    /// Date for the header. `None`: the date of the latest value entered in the run sheet, if
    /// any was recorded (so the page never depends on the clock).
    pub date: Option<String>,
    /// What the best settings should achieve.
    pub goal: Goal,
}

impl Default for BuildOptions {
    /// No date given, maximise the response.
    fn default() -> Self {
        BuildOptions {
            date: None,
            goal: Goal::Maximise,
        }
    }
}

/// The program name and version printed in footers.
pub fn tool_version() -> String {
    format!("Twofold {}", env!("CARGO_PKG_VERSION"))
}

/// SHA-256 of the project as the program writes it (lowercase hex): the same data gives the same
/// hash whatever the layout of the file it was read from.
pub fn project_hash(project: &Project) -> String {
    let text = crate::project::project_to_string(project)
        .unwrap_or_else(|e| format!("unserialisable project: {e}"));
    let digest = Sha256::digest(text.as_bytes());
    digest.iter().map(|b| format!("{b:02x}")).collect()
}

/// The name a transform has in the window; empty for none (the page then says nothing).
pub fn transform_name(t: ResponseTransform) -> String {
    match t {
        ResponseTransform::None => String::new(),
        other => other.words(),
    }
}

fn level_value(f: &Factor, coded: i8) -> LevelValue {
    match (&f.kind, coded) {
        (FactorKind::Numeric { low, .. }, -1) => LevelValue::Number(*low),
        (FactorKind::Numeric { high, .. }, 1) => LevelValue::Number(*high),
        (FactorKind::Numeric { low, high }, _) => LevelValue::Number(0.5 * (low + high)),
        (FactorKind::Categorical { low_label, .. }, -1) => LevelValue::Label(low_label.clone()),
        (FactorKind::Categorical { high_label, .. }, _) => LevelValue::Label(high_label.clone()),
    }
}

/// A factor's setting as printed: the value with its unit, or the label.
pub fn setting_text(f: &Factor, coded: i8) -> String {
    let v = level_value(f, coded);
    match v {
        LevelValue::Number(_) if !f.unit.is_empty() => format!("{} {}", v.text(), f.unit),
        _ => v.text(),
    }
}

fn letter(i: usize) -> char {
    LETTERS.get(i).copied().unwrap_or('?')
}

fn latest_entry_date(project: &Project) -> Option<String> {
    project
        .runs
        .iter()
        .filter_map(|r| r.entered_at.as_deref())
        .map(|t| t.get(..10).unwrap_or(t).to_string())
        .max()
}

/// Fills the summary of response `results.response` of `project` from the window's results.
pub fn summary_input(project: &Project, results: &Report, options: &BuildOptions) -> SummaryInput {
    let response = project.responses.get(results.response);
    let transform = response.map_or(ResponseTransform::None, |r| r.model.transform);
    let mut warnings = Vec::new();

    let date = match &options.date {
        Some(d) => d.clone(),
        None => latest_entry_date(project)
            .map(|d| format!("values entered up to {d}"))
            .unwrap_or_default(),
    };

    let factors: Vec<FactorRow> = project
        .factors
        .iter()
        .enumerate()
        .map(|(i, f)| FactorRow {
            letter: letter(i),
            name: f.name.clone(),
            unit: f.unit.clone(),
            low: level_value(f, -1),
            high: level_value(f, 1),
        })
        .collect();

    let design = design_facts(project, results, &mut warnings);

    // Effects, largest first, each labelled with its short aliases as the window lists chains.
    let mut effects = Vec::new();
    let mut half = Vec::new();
    if let Ok(table) = &results.effects {
        let in_model = |term: Term| {
            results.in_model(term) || results.fit.as_ref().is_ok_and(|f| f.terms.contains(&term))
        };
        for e in &table.effects {
            let chain_in_model = std::iter::once(e.term)
                .chain(e.aliases.iter().map(|a| a.term))
                .any(in_model);
            let mut label = e.term.label();
            for a in e.aliases.iter().filter(|a| a.term.order() <= 3) {
                label.push('=');
                label.push_str(&a.to_string());
            }
            effects.push(EffectRow {
                term: label,
                effect: e.effect,
                in_model: chain_in_model,
            });
        }
        effects.sort_by(|a, b| b.effect.abs().total_cmp(&a.effect.abs()));
        for p in &results.half_normal {
            let chain = table.get(p.term);
            let model = chain.is_some_and(|e| {
                std::iter::once(e.term)
                    .chain(e.aliases.iter().map(|a| a.term))
                    .any(in_model)
            });
            half.push(HalfNormalPoint {
                term: p.term.label(),
                abs_effect: p.abs_effect,
                quantile: p.quantile,
                in_model: model,
            });
        }
    }
    let lenth = results.lenth.as_ref().ok().map(|l| LenthFacts {
        pse: l.pse,
        me: l.me,
        sme: l.sme,
        alpha: 0.05,
        df: l.df,
    });

    let (interactions, interaction_note) = interaction_panels(project, results);

    let fit = results.fit.as_ref().ok();
    let anova = fit.map(|fit| AnovaTable {
        rows: results
            .anova_rows()
            .iter()
            .map(|r| AnovaRow {
                source: r.source.to_string(),
                df: u32::try_from(r.df).unwrap_or(u32::MAX),
                ss: r.ss,
                ms: r.ms,
                f: r.f,
                p: r.p,
                emphasis: matches!(r.source, Source::Model | Source::Residual | Source::Total),
            })
            .collect(),
        r_squared: fit.r2,
        adj_r_squared: fit.adj_r2,
        pred_r_squared: fit.pred_r2,
        std_dev: fit.sigma,
        tests_note: tests_note(results),
    });
    if let Some(fit) = fit
        && !fit.added_for_hierarchy.is_empty()
    {
        let added: Vec<String> = fit.added_for_hierarchy.iter().map(|t| t.label()).collect();
        warnings.push(format!(
            "Added to keep the model hierarchical: {}.",
            added.join(", ")
        ));
    }

    let name = response.map_or("y", |r| r.name.as_str());
    let equation = results.equation_natural.as_ref().ok().map(|eq| {
        let names: Vec<&str> = project.factors.iter().map(|f| f.name.as_str()).collect();
        Equation {
            text: eq
                .format_with_names(&names)
                .replacen('y', &transform.label(name), 1),
            note: if project.factors.iter().any(|f| !f.is_numeric()) {
                "Factors with two labels enter as -1 (first label) and +1 (second).".to_string()
            } else {
                String::new()
            },
        }
    });

    let best = fit.and_then(|_| {
        let o = results.best_settings(options.goal).ok()?;
        let settings = o
            .settings
            .iter()
            .enumerate()
            .filter_map(|(i, s)| {
                let f = project.factors.get(i)?;
                let text = match (s, &f.kind) {
                    (None, _) => "does not matter".to_string(),
                    (Some(c), FactorKind::Numeric { low, high }) => {
                        let v = 0.5 * (low + high) + c * 0.5 * (high - low);
                        if let Some((lo, hi)) = f.safe_range
                            && (v < lo || v > hi)
                        {
                            warnings.push(format!(
                                "{} at {} is outside its safe range {} to {}.",
                                f.name,
                                numbers::fmt_num(v, 5),
                                numbers::fmt_num(lo, 5),
                                numbers::fmt_num(hi, 5)
                            ));
                        }
                        if f.unit.is_empty() {
                            numbers::fmt_num(v, 5)
                        } else {
                            format!("{} {}", numbers::fmt_num(v, 5), f.unit)
                        }
                    }
                    (Some(c), FactorKind::Categorical { .. }) => setting_text(f, if *c < 0.0 { -1 } else { 1 }),
                };
                Some((f.name.clone(), text))
            })
            .collect();
        if o.equally_good > 1 {
            warnings.push(format!("{} settings are equally good for the best setting; the page shows one of them.", o.equally_good));
        }
        if o.target_reached == Some(false) {
            warnings.push("The target cannot be reached inside the tested levels; the best settings are the closest.".to_string());
        }
        if o.curvature_warning {
            warnings.push("The centre points show curvature: the true best setting may lie inside the box, which this model cannot see.".to_string());
        }
        let back = o.prediction.back_transformed(&results.transform);
        let goal = match options.goal {
            Goal::Maximise => format!("maximise {name}"),
            Goal::Minimise => format!("minimise {name}"),
            Goal::Target(t) => format!("{name} as close as possible to {}", numbers::fmt_num(t, 6)),
        };
        Some(BestSettings {
            goal,
            settings,
            predicted: o.value,
            interval: back.prediction_interval.map(|(a, b)| {
                (a, b, format!("{} % prediction interval for one run", numbers::fmt_num(100.0 * o.prediction.confidence, 3)))
            }),
        })
    });

    let k = project.factors.len();
    let ofat = (design.base_runs > 0 && k > 0).then(|| {
        let runs = design.base_runs * design.replicates.max(1);
        OfatFacts {
            ofat_runs: ofat::equivalent_runs(k, runs),
            design_runs: runs,
            explanation: format!(
                "Counted as (k + 1) × N / 2 with k = {k} factors and N = {runs} factorial runs: each factor needs N / 2 runs at each level, sharing one base point. Centre points are not counted."
            ),
        }
    });

    // The window's own warnings first, then the project's checks, in the order shown there.
    let mut all_warnings: Vec<String> = results.warnings.iter().map(|w| w.text.clone()).collect();
    all_warnings.extend(warnings);
    if project.runs_outdated {
        all_warnings.push("The run sheet no longer matches the factors or design settings: regenerate it before carrying out more runs.".to_string());
    }
    for p in project.validate() {
        if p.severity == Severity::Warning && !all_warnings.contains(&p.message) {
            all_warnings.push(capitalised(&p.message));
        }
    }

    SummaryInput {
        title: project.name.clone(),
        date,
        description: project.description.clone(),
        response: ResponseFacts {
            name: name.to_string(),
            unit: response.map(|r| r.unit.clone()).unwrap_or_default(),
            transform: transform_name(transform),
            runs_used: results.used_runs,
            runs_total: results.total_runs,
        },
        factors,
        design,
        effects,
        lenth,
        half_normal: half,
        interactions,
        interaction_note,
        anova,
        equation,
        best,
        ofat,
        warnings: all_warnings,
        footer: Footer {
            tool: tool_version(),
            seed: project.design.randomize.then_some(project.design.seed),
            data_hash: project_hash(project),
        },
    }
}

fn capitalised(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(first) => {
            first.to_uppercase().chain(c).collect::<String>()
                + if s.ends_with('.') { "" } else { "." }
        }
        None => String::new(),
    }
}

fn design_facts(project: &Project, results: &Report, warnings: &mut Vec<String>) -> DesignFacts {
    let d = &project.design;
    let k = project.factors.len();
    let generators: Vec<String> = d
        .generators
        .iter()
        .filter(|g| !g.trim().is_empty())
        .cloned()
        .collect();
    let mut blocks: Vec<u32> = project.runs.iter().map(|r| r.block).collect();
    blocks.sort_unstable();
    blocks.dedup();
    let centre_points = project.runs.iter().filter(|r| r.centre).count();
    let replicates = d.replicates.max(1) as usize;
    let factorial_runs = project.runs.len() - centre_points;
    let base_runs = factorial_runs / replicates;
    let mut facts = DesignFacts {
        factors: k,
        generators_count: generators.len(),
        base_runs,
        centre_points,
        replicates,
        blocks: blocks.len().max(1),
        total_runs: project.runs.len(),
        generators: generators.iter().map(|g| g.replace('=', " = ")).collect(),
        block_generators: match &d.blocks {
            BlockChoice::Generators(g) => {
                g.iter().filter(|t| !t.trim().is_empty()).cloned().collect()
            }
            BlockChoice::Count(_) => Vec::new(),
        },
        resolution: None,
        aliases: Vec::new(),
        seed: d.randomize.then_some(d.seed),
    };
    if k == 0 || generators.is_empty() {
        return facts;
    }
    let Ok(design) = FractionalDesign::from_text(
        k,
        Some(base_runs).filter(|&n| n > 0),
        &generators.join(", "),
    ) else {
        return facts;
    };
    let report = alias_report(&design);
    facts.resolution = report.resolution;
    // The terms that matter: those in the model when there is one, else the main effects.
    let mut wanted: Vec<Term> = results.chosen_terms.clone();
    if let Ok(fit) = &results.fit {
        for t in &fit.terms {
            if !wanted.contains(t) {
                wanted.push(*t);
            }
        }
    }
    if wanted.is_empty() {
        wanted = (0..k).map(Term::main).collect();
    }
    wanted.sort();
    for (term, aliases) in &report.aliases {
        if !wanted.contains(term) || aliases.is_empty() {
            continue;
        }
        let list: Vec<String> = aliases.iter().map(ToString::to_string).collect();
        facts
            .aliases
            .push(format!("{} = {}", term.label(), list.join(" = ")));
    }
    let mixed = report.main_effects_aliased_with_interactions();
    if !mixed.is_empty() {
        let names: Vec<String> = mixed
            .iter()
            .take(8)
            .map(|(t, a)| {
                let list: Vec<String> = a.iter().take(3).map(ToString::to_string).collect();
                format!("{} with {}", t.label(), list.join(", "))
            })
            .collect();
        warnings.push(format!(
            "Main effects are mixed up with two-factor interactions: {}. If one of those interactions is real, the main effect seen is not the factor's own effect.",
            names.join("; ")
        ));
    }
    facts
}

/// One sentence under the ANOVA: how the terms were chosen and which error the tests use.
fn tests_note(results: &Report) -> String {
    let how = match &results.choice {
        Ok(c) if !results.terms_given() => {
            let list: Vec<String> = c.terms.iter().map(|t| t.label()).collect();
            format!(
                "No terms chosen in the project: the model shown is {} ({}). ",
                if list.is_empty() {
                    "the mean only".to_string()
                } else {
                    list.join(" + ")
                },
                c.selection.words()
            )
        }
        _ => String::new(),
    };
    format!("{how}{}", results.error_basis.sentence())
}

/// The interactions to plot: those in the fitted model, else every pair; strongest first.
fn interaction_panels(project: &Project, results: &Report) -> (Vec<InteractionPanel>, String) {
    let strength = |t: Term| {
        results
            .effects
            .as_ref()
            .ok()
            .and_then(|table| table.effect_of(t))
            .map_or(0.0, f64::abs)
    };
    let in_model: Vec<Term> = results
        .fit
        .as_ref()
        .map(|f| f.terms.iter().copied().filter(|t| t.order() == 2).collect())
        .unwrap_or_default();
    let from_model = !in_model.is_empty();
    let mut panels: Vec<(f64, InteractionPanel)> = results
        .pairs
        .iter()
        .filter_map(|pm| {
            let (a, b) = pm.factors;
            let term = Term::main(a).times(Term::main(b));
            if from_model && !in_model.contains(&term) {
                return None;
            }
            let fa = project.factors.get(a)?;
            let fb = project.factors.get(b)?;
            Some((
                strength(term),
                InteractionPanel {
                    term: term.label(),
                    x_factor: fa.name.clone(),
                    x_levels: [setting_text(fa, -1), setting_text(fa, 1)],
                    trace_factor: fb.name.clone(),
                    trace_levels: [setting_text(fb, -1), setting_text(fb, 1)],
                    means: pm.means,
                },
            ))
        })
        .collect();
    // Strongest first; ties keep the order of the trade.
    panels.sort_by(|x, y| y.0.total_cmp(&x.0));
    let note = if from_model {
        "Two-factor interactions in the model, observed cell means.".to_string()
    } else if panels.is_empty() {
        String::new()
    } else {
        "No interaction is in the model; the strongest are shown, observed cell means.".to_string()
    };
    (panels.into_iter().map(|(_, p)| p).collect(), note)
}

/// The printable blank run sheet of `project`: every run in run order with its settings in
/// natural units and a box per response. `date` is printed as given (never the clock).
pub fn run_sheet_input(project: &Project, date: Option<String>) -> super::run_sheet::RunSheet {
    use super::run_sheet::{RunSheet, SheetFactor, SheetResponse, SheetRow};
    RunSheet {
        title: project.name.clone(),
        date: date.unwrap_or_default(),
        factors: project
            .factors
            .iter()
            .enumerate()
            .map(|(i, f)| SheetFactor {
                letter: letter(i),
                name: f.name.clone(),
                unit: f.unit.clone(),
                levels: [level_value(f, -1).text(), level_value(f, 1).text()],
            })
            .collect(),
        responses: project
            .responses
            .iter()
            .map(|r| SheetResponse {
                name: r.name.clone(),
                unit: r.unit.clone(),
            })
            .collect(),
        rows: project
            .runs
            .iter()
            .map(|r| SheetRow {
                run_order: r.run_order,
                std_order: r.std_order,
                block: r.block,
                centre: r.centre,
                settings: project
                    .factors
                    .iter()
                    .enumerate()
                    .map(|(i, f)| level_value(f, r.levels.get(i).copied().unwrap_or(0)).text())
                    .collect(),
            })
            .collect(),
        seed: project.design.randomize.then_some(project.design.seed),
        tool: tool_version(),
        data_hash: project_hash(project),
    }
}

/// Lays out the summary of response `results.response` and writes it to `path` in the format of
/// its extension (the window calls this after the engineer confirmed the file in the save
/// dialog; for a worker thread use [`super::ExportJob::summary`] with [`summary_input`]).
pub fn export_summary(
    project: &Project,
    results: &Report,
    path: &Path,
    paper: Paper,
    options: &BuildOptions,
) -> Result<ExportReport, ExportError> {
    let input = summary_input(project, results, options);
    super::write_summary(&input, path, paper)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Edit, demo_project};

    fn demo_with_model() -> Project {
        let mut p = demo_project();
        p.apply(Edit::SetTerms {
            response: 0,
            terms: vec!["A".into(), "B".into(), "C".into(), "AB".into()],
        })
        .unwrap();
        p
    }

    #[test]
    fn numbers_are_the_windows_numbers() {
        let p = demo_with_model();
        let r = Report::for_response(&p, 0, 0);
        let input = summary_input(&p, &r, &BuildOptions::default());
        let table = r.effects.as_ref().unwrap();
        // Every effect of the window's table appears once, largest first.
        assert_eq!(input.effects.len(), table.effects.len());
        assert!(
            input
                .effects
                .windows(2)
                .all(|w| w[0].effect.abs() >= w[1].effect.abs())
        );
        let a = table.effect_of(Term::main(0)).unwrap();
        assert!(
            input
                .effects
                .iter()
                .any(|e| e.term == "A" && e.effect == a && e.in_model)
        );
        let lenth = r.lenth.as_ref().unwrap();
        assert_eq!(input.lenth.unwrap().me, lenth.me);
        let fit = r.fit.as_ref().unwrap();
        let anova = input.anova.as_ref().unwrap();
        assert_eq!(anova.rows.len(), fit.anova.len());
        assert_eq!(anova.r_squared, fit.r2);
        assert_eq!(input.interactions.len(), 1, "only AB is in the model");
        assert_eq!(input.interactions[0].term, "AB");
        assert_eq!(input.response.runs_used, r.used_runs);
        assert!(
            input
                .equation
                .as_ref()
                .unwrap()
                .text
                .starts_with("Solvent rubs = ")
        );
        assert_eq!(
            input.ofat.as_ref().unwrap().ofat_runs,
            40,
            "(4 + 1) × 16 / 2"
        );
        assert_eq!(input.footer.data_hash.len(), 64);
        let best = input.best.as_ref().unwrap();
        assert_eq!(best.settings.len(), 4);
        assert_eq!(
            best.settings[3].1, "does not matter",
            "D is not in the model"
        );
    }

    #[test]
    fn without_a_model_the_strongest_interactions_are_plotted() {
        let mut p = demo_project();
        p.responses[0].model.terms.clear();
        let r = Report::for_response(&p, 0, 0);
        let input = summary_input(&p, &r, &BuildOptions::default());
        // With no terms chosen the page shows the default choice (tested against the demo's
        // pure error from its two centre points: A, B and AB) and says so.
        let anova = input.anova.as_ref().unwrap();
        assert!(
            anova.tests_note.starts_with("No terms chosen"),
            "{}",
            anova.tests_note
        );
        assert!(
            anova.tests_note.contains("A + B + AB"),
            "{}",
            anova.tests_note
        );
        assert!(
            anova.tests_note.contains("pure error"),
            "{}",
            anova.tests_note
        );
        assert_eq!(
            input.interactions[0].term, "AB",
            "the demo's one real interaction"
        );
        // Without any interaction in the data's default model, every pair is offered.
        let mut q = p.clone();
        for run in &mut q.runs {
            let y = f64::from(run.levels[0]);
            run.values[0].text = format!("{}", 50.0 + 10.0 * y);
        }
        q.runs[16].values[0].text = "50.5".into();
        let rq = Report::for_response(&q, 0, 0);
        let iq = summary_input(&q, &rq, &BuildOptions::default());
        assert_eq!(iq.interactions.len(), 6);
        assert!(
            iq.interaction_note
                .contains("No interaction is in the model")
        );
    }

    #[test]
    fn the_hash_follows_the_data_only() {
        let p = demo_project();
        let mut q = p.clone();
        assert_eq!(project_hash(&p), project_hash(&q));
        q.runs[0].values[0].text.push('1');
        assert_ne!(project_hash(&p), project_hash(&q));
    }

    #[test]
    fn the_date_never_comes_from_the_clock() {
        let p = demo_project();
        let r = Report::for_response(&p, 0, 0);
        let given = summary_input(
            &p,
            &r,
            &BuildOptions {
                date: Some("2025-03-04".into()),
                ..BuildOptions::default()
            },
        );
        assert_eq!(given.date, "2025-03-04");
        let mut q = p.clone();
        for run in &mut q.runs {
            run.entered_at = None;
        }
        q.runs[2].entered_at = Some("2025-03-07T10:15:00".into());
        q.runs[5].entered_at = Some("2025-03-09T08:00:00".into());
        let derived = summary_input(
            &q,
            &Report::for_response(&q, 0, 0),
            &BuildOptions::default(),
        );
        assert_eq!(derived.date, "values entered up to 2025-03-09");
    }

    #[test]
    fn run_sheet_lists_every_run_with_natural_settings() {
        let p = demo_project();
        let sheet = run_sheet_input(&p, None);
        assert_eq!(sheet.rows.len(), p.runs.len());
        let centre = sheet.rows.iter().find(|r| r.centre).unwrap();
        assert_eq!(centre.settings[0], "190", "midpoint of 180 and 200");
        assert_eq!(sheet.responses.len(), 2);
        assert_eq!(sheet.seed, Some(p.design.seed));
    }

    #[test]
    fn same_project_same_svg_bytes() {
        let p = demo_with_model();
        let make = || {
            let r = Report::for_response(&p, 0, 0);
            super::super::summary_svg(&summary_input(&p, &r, &BuildOptions::default()), Paper::A4)
        };
        assert_eq!(make(), make());
    }

    /// The text of the SVG group that starts with `<title>{title}</title>`, up to its end.
    fn group<'a>(svg: &'a str, title: &str) -> &'a str {
        let start = svg
            .find(&format!("<g><title>{title}</title>"))
            .unwrap_or_else(|| panic!("no group {title}"));
        let end = svg[start..].find("</g>").unwrap() + start;
        &svg[start..end]
    }

    #[test]
    fn interaction_panels_name_the_response_axis_and_show_the_markers_in_the_legend() {
        // Common practice, no source: an axis carries its quantity; a legend shows the symbol
        // drawn in the plot. The demo's model holds AB, so its page has the AB panel.
        let p = demo_with_model();
        let r = Report::for_response(&p, 0, 0);
        let svg =
            super::super::summary_svg(&summary_input(&p, &r, &BuildOptions::default()), Paper::A4);
        let name = &p.responses[0].name;
        let unit = &p.responses[0].unit;
        let panel = &svg[svg.find("<g><title>interaction plot AB</title>").unwrap()..];
        let vertical = "rotate(-90)";
        let axis = &panel[panel.find(vertical).expect("a vertical axis title")..];
        let text = &axis[axis.find('>').unwrap() + 1..axis.find("</text>").unwrap()];
        assert_eq!(text, format!("{name} ({unit})"));
        let legend = group(&svg, "legend of AB");
        assert_eq!(legend.matches("<circle").count(), 1, "{legend}");
        assert_eq!(legend.matches("<rect").count(), 1, "{legend}");
        assert_eq!(legend.matches("<text").count(), 2, "{legend}");
    }

    #[test]
    fn a_perfect_fit_reads_one_and_no_fit_prints_as_a_rounded_percentage() {
        let p = demo_with_model();
        let r = Report::for_response(&p, 0, 0);
        let mut input = summary_input(&p, &r, &BuildOptions::default());
        let svg = super::super::summary_svg(&input, Paper::A4);
        assert!(!svg.contains(" %,"), "no R² as a percentage");
        let anova = input.anova.as_mut().unwrap();
        let r2 = anova.r_squared.unwrap();
        assert!(
            svg.contains(&format!("R² = {}", crate::numbers::fraction_of_one(r2))),
            "the window's R² to four digits"
        );
        anova.r_squared = Some(1.0);
        anova.adj_r_squared = Some(0.99996);
        let svg = super::super::summary_svg(&input, Paper::A4);
        assert!(svg.contains("R² = 1,"), "perfect fit");
        assert!(
            svg.contains("adjusted R² = &gt; 0.9999"),
            "not rounded up to 1"
        );
        assert!(!svg.contains("100.0"));
    }

    #[test]
    fn without_centre_points_the_page_says_curvature_was_not_checked() {
        let p = demo_with_model();
        let r = Report::for_response(&p, 0, 0);
        let mut input = summary_input(&p, &r, &BuildOptions::default());
        assert_eq!(
            input.design.centre_points, 2,
            "the demo has two centre points"
        );
        let line = "not checked: no centre points";
        assert!(!super::super::summary_svg(&input, Paper::A4).contains(line));
        input.design.centre_points = 0;
        let svg = super::super::summary_svg(&input, Paper::A4);
        assert_eq!(svg.matches(line).count(), 1);
        assert!(svg.contains(">Curvature<"));
    }
}
