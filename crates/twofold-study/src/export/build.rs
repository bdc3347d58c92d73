//! From the project and the reports of its responses to a [`SummaryInput`].
//!
//! This module gathers what the summary says about the project as a whole (factors, design,
//! every alias chain of the main effects and two-factor interactions, the run counts) and asks
//! [`super::section`] for one section per response, each filled from that response's
//! [`Report`] (the same value the analysis panes draw and `twofold analyze` writes).

use std::path::Path;

use sha2::{Digest, Sha256};
use twofold_core::alias::{alias_report, chain_label};
use twofold_core::design::FractionalDesign;
use twofold_core::ofat;
use twofold_core::predict::Goal;
use twofold_core::term::LETTERS;

use super::input::{DesignFacts, FactorRow, Footer, LevelValue, OfatFacts, SummaryInput};
use super::section::response_summary;
use super::{ExportError, ExportReport, Paper};
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
    /// The response `goal` is for (the others are maximised); `None`: every response.
    pub goal_response: Option<usize>,
}

impl Default for BuildOptions {
    /// No date given, maximise every response.
    fn default() -> Self {
        BuildOptions {
            date: None,
            goal: Goal::Maximise,
            goal_response: None,
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

/// Fills the summary of `project` with one section per report in `reports` (in the order
/// given: one response, or every response). Each section's numbers come from its report only.
pub fn summary_input(
    project: &Project,
    reports: &[&Report],
    options: &BuildOptions,
) -> SummaryInput {
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

    let mut warnings = Vec::new();
    let design = design_facts(project, &mut warnings);

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

    if project.runs_outdated {
        warnings.push("The run sheet no longer matches the factors or design settings: regenerate it before carrying out more runs.".to_string());
    }
    for p in project.validate() {
        let text = capitalised(&p.message);
        if p.severity == Severity::Warning && !warnings.contains(&text) {
            warnings.push(text);
        }
    }

    let mut responses = Vec::with_capacity(reports.len());
    for report in reports {
        let goal = match options.goal_response {
            Some(r) if r != report.response => Goal::Maximise,
            _ => options.goal,
        };
        let mut section = response_summary(project, report, goal);
        // A warning about the whole project is printed once, on the first page.
        section.warnings.retain(|w| {
            !warnings
                .iter()
                .any(|p| p.trim_end_matches('.') == w.trim_end_matches('.'))
        });
        responses.push(section);
    }
    let decision = super::decision_facts::decision_facts(project, reports, &mut responses);
    let mut design = design;
    design.detectable = super::decision_facts::detectable_words(project);

    SummaryInput {
        title: project.name.clone(),
        date,
        description: project.description.clone(),
        factors,
        design,
        ofat,
        responses,
        warnings,
        decision,
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

fn design_facts(project: &Project, warnings: &mut Vec<String>) -> DesignFacts {
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
        main_effect_chains: Vec::new(),
        interaction_chains: Vec::new(),
        tangled_chains: 0,
        seed: d.randomize.then_some(d.seed),
        detectable: None,
        screening_runs: d.screening_runs(),
        follow_up: crate::report::next_runs_added::follow_up_facts(project),
        irregular: d.added.is_some(),
        runs_in_words: crate::project::SheetRuns::of(d, k)
            .filter(|c| c.total() == project.runs.len() && !project.runs_outdated)
            .map(|c| c.describe()),
    };
    if let Some(n) = facts.screening_runs {
        warnings.push(format!(
            "This {n}-run screening design estimates main effects only; each is partially aliased with two-factor interactions, so a real interaction shifts the main effects seen (a fold-over separates them)."
        ));
        return facts;
    }
    if k == 0 || generators.is_empty() || facts.irregular {
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
    // Every chain of the main effects and two-factor interactions, each once, as the core
    // writes it.
    for (term, aliases) in report.chains() {
        if aliases.is_empty() {
            continue;
        }
        let label = chain_label(term, &aliases);
        match term.order() {
            1 => facts.main_effect_chains.push(label),
            _ => facts.interaction_chains.push(label),
        }
    }
    facts.tangled_chains = report.two_factor_chains().len();
    let mixed = report.main_effects_aliased_with_interactions();
    if !mixed.is_empty() {
        let names: Vec<String> = mixed.iter().map(|(t, _)| t.label()).collect();
        warnings.push(format!(
            "Main effects {} are aliased with two-factor interactions (see the alias chains). If one of those interactions is real, the main effect seen is not the factor's own effect.",
            names.join(", ")
        ));
    }
    facts
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

/// Lays out the summary of the responses of `reports` and writes it to `path` in the format of
/// its extension: one PDF with every page, or one PNG or SVG file per page (for a worker thread
/// use [`super::ExportJob::summary_of`] with [`summary_input`]).
pub fn export_summary(
    project: &Project,
    reports: &[&Report],
    path: &Path,
    paper: Paper,
    options: &BuildOptions,
) -> Result<ExportReport, ExportError> {
    let input = summary_input(project, reports, options);
    super::write_summary(&input, path, paper)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Edit, demo_project};
    use twofold_core::term::Term;

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
        let input = summary_input(&p, &[&r], &BuildOptions::default());
        let sec = &input.responses[0];
        let table = r.effects.as_ref().unwrap();
        // Every effect of the window's table appears once, largest first.
        assert_eq!(sec.effects.len(), table.effects.len());
        assert!(
            sec.effects
                .windows(2)
                .all(|w| w[0].effect.abs() >= w[1].effect.abs())
        );
        let a = table.effect_of(Term::main(0)).unwrap();
        assert!(
            sec.effects
                .iter()
                .any(|e| e.term == "A" && e.effect == a && e.in_model)
        );
        let lenth = r.lenth.as_ref().unwrap();
        assert_eq!(sec.lenth.unwrap().me, lenth.me);
        let fit = r.fit.as_ref().unwrap();
        let anova = sec.anova.as_ref().unwrap();
        assert_eq!(anova.rows.len(), fit.anova.len());
        assert_eq!(anova.r_squared, fit.r2);
        assert_eq!(sec.interactions.len(), 1, "only AB is in the model");
        assert_eq!(sec.interactions[0].term, "AB");
        assert_eq!(sec.response.runs_used, r.used_runs);
        assert!(
            sec.equation
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
        let best = sec.best.as_ref().unwrap();
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
        let input = summary_input(&p, &[&r], &BuildOptions::default());
        let sec = &input.responses[0];
        // With no terms chosen the page shows the default choice (tested against the demo's
        // pure error from its two centre points: A, B and AB) and says so.
        let anova = sec.anova.as_ref().unwrap();
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
            sec.interactions[0].term, "AB",
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
        let iq = summary_input(&q, &[&rq], &BuildOptions::default());
        // Of the six pairs, the four strongest are plotted.
        assert_eq!(iq.responses[0].interactions.len(), 4);
        assert!(
            iq.responses[0]
                .interaction_note
                .contains("No interaction is in the model; the 4 strongest of the 6 pairs")
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
            &[&r],
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
            &[&Report::for_response(&q, 0, 0)],
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
            page1(&summary_input(&p, &[&r], &BuildOptions::default()))
        };
        assert_eq!(make(), make());
    }

    /// The first page of a summary, as SVG.
    fn page1(input: &SummaryInput) -> String {
        super::super::summary_pages(input, Paper::A4).remove(0)
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
        let svg = page1(&summary_input(&p, &[&r], &BuildOptions::default()));
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
        let mut input = summary_input(&p, &[&r], &BuildOptions::default());
        let svg = page1(&input);
        assert!(!svg.contains(" %,"), "no R² as a percentage");
        let anova = input.responses[0].anova.as_mut().unwrap();
        let r2 = anova.r_squared.unwrap();
        assert!(
            svg.contains(&format!("R² = {}", crate::numbers::fraction_of_one(r2))),
            "the window's R² to four digits"
        );
        anova.r_squared = Some(1.0);
        anova.adj_r_squared = Some(0.99996);
        let svg = page1(&input);
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
        let mut input = summary_input(&p, &[&r], &BuildOptions::default());
        assert_eq!(
            input.design.centre_points, 2,
            "the demo has two centre points"
        );
        let line = "not checked: no centre points";
        assert!(!page1(&input).contains(line));
        input.design.centre_points = 0;
        let svg = page1(&input);
        assert_eq!(svg.matches(line).count(), 1);
        assert!(svg.contains(">Curvature<"));
    }

    #[test]
    fn every_response_gets_a_section_from_its_own_report() {
        let p = demo_with_model();
        let r0 = Report::for_response(&p, 0, 0);
        let r1 = Report::for_response(&p, 0, 1);
        let input = summary_input(&p, &[&r0, &r1], &BuildOptions::default());
        assert_eq!(input.responses.len(), 2);
        assert_eq!(input.responses[0].response.name, "Solvent rubs");
        assert_eq!(input.responses[1].response.name, "Gloss 60°");
        let a1 = r1
            .effects
            .as_ref()
            .unwrap()
            .effect_of(Term::main(0))
            .unwrap();
        assert!(
            input.responses[1]
                .effects
                .iter()
                .any(|e| e.term == "A" && e.effect.to_bits() == a1.to_bits())
        );
        assert_eq!(
            input.responses[1].anova.as_ref().unwrap().r_squared,
            r1.fit.as_ref().unwrap().r2
        );
        // The goal chosen for one response leaves the others maximised.
        let options = BuildOptions {
            goal: Goal::Minimise,
            goal_response: Some(1),
            ..BuildOptions::default()
        };
        // The demo's goals choose one setting for both responses: every page shows it.
        let input = summary_input(&p, &[&r0, &r1], &options);
        let best = |i: usize| input.responses[i].best.clone().unwrap();
        assert!(best(0).goal.starts_with("every response's goal at once"));
        assert_eq!(best(0).settings, best(1).settings);
        let decision = input.decision.clone().unwrap();
        assert_eq!(decision.settings, best(0).settings);
        assert_eq!(decision.responses[1].predicted, best(1).predicted);
        // Without goals, the goal chosen for one response leaves the others maximised.
        let mut q = p.clone();
        for r in &mut q.responses {
            r.goal = crate::project::ResponseGoal::default();
        }
        let input = summary_input(&q, &[&r0, &r1], &options);
        assert!(input.decision.is_none());
        let goal = |i: usize| input.responses[i].best.as_ref().unwrap().goal.clone();
        assert_eq!(goal(0), "maximise Solvent rubs");
        assert_eq!(goal(1), "minimise Gloss 60°");
        // A summary of one response has no decision of all of them (it lacks the others).
        let input = summary_input(&p, &[&r1], &options);
        assert!(input.decision.is_none());
    }

    #[test]
    fn alias_chains_are_every_chain_once_as_the_core_writes_them() {
        // Montgomery, Design and Analysis of Experiments, 8th ed., section 8.2: the 2^(4-1)
        // with I = ABCD has A = BCD, B = ACD, C = ABD, D = ABC, AB = CD, AC = BD, AD = BC.
        let mut p = demo_project();
        p.apply(Edit::SetDesign(crate::project::DesignSettings {
            generators: vec!["D=ABC".into()],
            base_runs: Some(8),
            ..p.design.clone()
        }))
        .unwrap();
        p.apply(Edit::RegenerateRuns).unwrap();
        let r = Report::for_response(&p, 0, 0);
        let input = summary_input(&p, &[&r], &BuildOptions::default());
        let d = &input.design;
        assert_eq!(d.resolution, Some(4));
        assert_eq!(
            d.main_effect_chains,
            ["A = BCD", "B = ACD", "C = ABD", "D = ABC"]
        );
        assert_eq!(d.interaction_chains, ["AB = CD", "AC = BD", "AD = BC"]);
        assert_eq!(d.tangled_chains, 3);
    }

    #[test]
    fn the_page_counts_the_fold_over_block_in_the_runs() {
        let mut p = demo_project();
        p.apply(Edit::SetDesign(crate::project::DesignSettings {
            generators: vec!["D=ABC".into()],
            base_runs: Some(8),
            centre_points_per_block: 0,
            ..p.design.clone()
        }))
        .unwrap();
        p.apply(Edit::RegenerateRuns).unwrap();
        let words = |p: &Project| {
            let r = Report::for_response(p, 0, 0);
            summary_input(p, &[&r], &BuildOptions::default())
                .design
                .runs_in_words
        };
        assert_eq!(words(&p).as_deref(), Some("8 runs in the fraction"));
        // The fold-over on A (a full fold-over would only repeat the runs of I = ABCD).
        p.apply(Edit::AddFollowUp(crate::project::FollowUp::FoldOver(
            twofold_core::foldover::FoldKind::Factor(0),
        )))
        .unwrap();
        // Counted by hand: the eight runs of the half fraction and the eight of its fold-over.
        assert_eq!(
            words(&p).as_deref(),
            Some("16 runs: 8 in the fraction, 8 in the fold-over block")
        );
    }
}
