//! The quadratic-model part of the report of a study with axial runs (a face-centred central
//! composite design, see [`crate::project::axial`] and [`twofold_core::composite`]).
//!
//! The rest of the report (effects, Lenth's margins, the two-level model and its curvature test)
//! comes from the two-level part of the sheet, the factorial and centre runs before the axial
//! block, exactly as before the axial runs were added. This part fits the quadratic model to
//! every used run, blocks included, on the analysis scale (after the response transform), and
//! reports its coefficients, lack of fit, stationary point and canonical analysis, with notes in
//! words. It also holds the follow-up option that adds the axial runs.

use serde_json::{Value, json};
use twofold_core::composite::{QuadraticFit, SurfaceKind, fit_quadratic};

use super::Report;
use super::choice::TERM_ALPHA;
use super::data::{plot_ranges, response_data};
use super::next_runs::NextRun;
use crate::project::{FollowUp, ModelSettings, Project};

/// The quadratic model of a study with axial runs.
#[derive(Debug, Clone, PartialEq)]
pub struct QuadraticReport {
    /// The block of the axial runs.
    pub axial_block: u32,
    /// Runs used in the fit (a number, not excluded), axial block included.
    pub runs_used: usize,
    /// Runs of the axial block still without a value (not excluded).
    pub axial_waiting: usize,
    /// The fit, or why there is none.
    pub fit: Result<QuadraticFit, String>,
    /// The stationary point in natural units (each factor's centre plus x times half its range).
    pub stationary_natural: Option<Vec<f64>>,
    /// What the fit says, in plain sentences.
    pub notes: Vec<String>,
}

fn letter(i: usize) -> char {
    twofold_core::term::factor_letter(i).unwrap_or('?')
}

fn num(x: f64) -> String {
    crate::numbers::fmt_num(x, 4)
}

/// The quadratic part of the report of `response` (see the module documentation); `None`
/// without axial runs.
pub(super) fn quadratic_report(
    project: &Project,
    response: usize,
    model: &ModelSettings,
) -> Option<QuadraticReport> {
    let axial_block = project.axial_block()?;
    let axial_waiting = project
        .runs
        .iter()
        .enumerate()
        .filter(|(_, r)| r.block == axial_block && !r.status.is_excluded())
        .filter(|(_, r)| r.values.get(response).is_none_or(|c| !c.is_typed()))
        .count();
    let mut out = QuadraticReport {
        axial_block,
        runs_used: 0,
        axial_waiting,
        fit: Err(String::new()),
        stationary_natural: None,
        notes: vec![format!(
            "Face-centred central composite design: the axial runs (block {axial_block}) put each factor at its low and high with the others at the centre (α = 1), inside the tested ranges. The two-level effects use the runs before them; the quadratic model uses every run."
        )],
    };
    let data = match response_data(project, response, model.transform) {
        Ok(d) => d,
        Err(e) => {
            out.fit = Err(e.to_string());
            return Some(out);
        }
    };
    let obs = &data.analysed;
    let rows: Vec<Vec<f64>> = data.used.iter().map(|&i| obs.levels()[i].clone()).collect();
    let blocks: Vec<u32> = data.used.iter().map(|&i| obs.blocks()[i]).collect();
    let y: Vec<f64> = data
        .used
        .iter()
        .filter_map(|&i| obs.response()[i])
        .collect();
    out.runs_used = rows.len();
    out.fit = fit_quadratic(&rows, &blocks, &y).map_err(|e| {
        if axial_waiting > 0 {
            format!("{e}; {axial_waiting} axial-block run(s) still have no value")
        } else {
            e.to_string()
        }
    });
    if let Ok(fit) = &out.fit {
        let ranges = plot_ranges(project);
        out.stationary_natural = fit
            .stationary
            .as_ref()
            .and_then(|s| twofold_core::predict::to_natural(&s.x, &ranges).ok());
        let names: Vec<String> = project.factors.iter().map(|f| f.name.clone()).collect();
        out.notes
            .extend(fit_notes(fit, out.stationary_natural.as_deref(), &names));
    }
    Some(out)
}

impl QuadraticReport {
    /// The few lines the summary page prints in the response's section: the fitted equation in
    /// coded units (blocks averaged out), the stationary point and its kind, lack of fit; or why
    /// there is no fit.
    pub fn page_lines(&self) -> Vec<String> {
        let fit = match &self.fit {
            Ok(f) => f,
            Err(why) => {
                return vec![format!(
                    "Quadratic model (axial runs in block {}): not fitted yet, {why}.",
                    self.axial_block
                )];
            }
        };
        let mut eq = String::new();
        for c in fit
            .coefficients
            .iter()
            .filter(|c| !matches!(c.term, twofold_core::composite::QuadTerm::Block(_)))
        {
            let v = num(c.coefficient.abs());
            match c.term {
                twofold_core::composite::QuadTerm::Intercept => eq.push_str(&num(c.coefficient)),
                t => {
                    let sign = if c.coefficient < 0.0 { '−' } else { '+' };
                    eq.push_str(&format!(" {sign} {v} {}", t.label()));
                }
            }
        }
        let mut out = vec![format!(
            "Quadratic model from all {} runs (axial runs in block {}, coded units, blocks averaged): y = {eq}.",
            self.runs_used, self.axial_block
        )];
        // The notes after the first (which describes the design) say what the fit finds.
        out.extend(self.notes.iter().skip(1).cloned());
        out
    }
}

/// The fit's sentences: the kind of surface, where its stationary point lies, lack of fit.
fn fit_notes(fit: &QuadraticFit, natural: Option<&[f64]>, names: &[String]) -> Vec<String> {
    let mut out = Vec::new();
    let kind = fit.canonical.kind;
    let eig = fit
        .canonical
        .eigenvalues
        .iter()
        .map(|&l| num(l))
        .collect::<Vec<_>>()
        .join(", ");
    match &fit.stationary {
        Some(s) => {
            let at: Vec<String> = s
                .x
                .iter()
                .enumerate()
                .map(|(i, x)| {
                    let name = names.get(i).map_or("", String::as_str);
                    match natural.and_then(|n| n.get(i)) {
                        Some(v) => format!("{name} {} (coded {})", num(*v), num(*x)),
                        None => format!("{name} coded {}", num(*x)),
                    }
                })
                .collect();
            out.push(format!(
                "The stationary point is a {} (eigenvalues {eig}) at {}, predicted response {}.",
                kind.words(),
                at.join(", "),
                num(s.predicted)
            ));
            out.push(if s.inside_box {
                "It lies inside the tested ranges.".to_string()
            } else {
                "It lies outside the tested ranges (a coded setting beyond ±1): the model does not vouch for it there; the best settings inside the ranges lie on their edge, and runs beyond them would explore further.".to_string()
            });
        }
        None => out.push(format!(
            "The quadratic terms form a ridge without a single stationary point (eigenvalues {eig})."
        )),
    }
    match kind {
        SurfaceKind::Saddle => out.push(
            "At a saddle the response rises in some directions and falls in others: the best settings lie on the edge of the ranges.".into(),
        ),
        SurfaceKind::Ridge => out.push(
            "On a ridge the response changes little along the direction of the near-zero eigenvalue, so many settings give nearly the same response.".into(),
        ),
        _ => {}
    }
    if let Some(l) = &fit.lack_of_fit
        && l.p.is_some_and(|p| p < TERM_ALPHA)
    {
        out.push(format!(
            "Lack of fit is significant (F = {}, p = {}): the quadratic model misses part of the response's shape.",
            num(l.f),
            l.p.map_or_else(|| "—".into(), |p| crate::numbers::fmt_sig(p, 3))
        ));
    }
    out
}

/// The `quadratic` object of `twofold analyze --json`: `axial_block`, `alpha` (1,
/// face-centred), `runs_used`, `axial_waiting`, `coefficients` (`term`, `coefficient`, `se`,
/// `t`, `p`), `residual_ss`, `residual_df`, `sigma`, `r2`, `adj_r2`, `lack_of_fit` (`ss`, `df`,
/// `pure_error_ss`, `pure_error_df`, `f`, `p`, or null), `stationary` (`coded`, `natural`,
/// `predicted`, `inside_box`, or null), `canonical` (`kind`, `eigenvalues`, `eigenvectors`),
/// `notes`, and `error` (why there is no fit, or null).
pub fn quadratic_json(q: &QuadraticReport) -> Value {
    let fit = q.fit.as_ref().ok();
    json!({
        "axial_block": q.axial_block,
        "alpha": twofold_core::composite::FACE_CENTRED_ALPHA,
        "runs_used": q.runs_used,
        "axial_waiting": q.axial_waiting,
        "coefficients": fit.map(|f| f.coefficients.iter().map(|c| json!({
            "term": c.term.label(), "coefficient": c.coefficient, "se": c.se, "t": c.t, "p": c.p,
        })).collect::<Vec<_>>()),
        "residual_ss": fit.map(|f| f.residual_ss),
        "residual_df": fit.map(|f| f.residual_df),
        "sigma": fit.and_then(|f| f.sigma),
        "r2": fit.map(|f| f.r_squared),
        "adj_r2": fit.and_then(|f| f.adj_r_squared),
        "lack_of_fit": fit.and_then(|f| f.lack_of_fit.as_ref()).map(|l| json!({
            "ss": l.ss, "df": l.df, "pure_error_ss": l.pure_error_ss,
            "pure_error_df": l.pure_error_df, "f": l.f, "p": l.p,
        })),
        "stationary": fit.and_then(|f| f.stationary.as_ref()).map(|s| json!({
            "coded": s.x, "natural": q.stationary_natural, "predicted": s.predicted,
            "inside_box": s.inside_box,
        })),
        "canonical": fit.map(|f| json!({
            "kind": f.canonical.kind.words(),
            "eigenvalues": f.canonical.eigenvalues,
            "eigenvectors": f.canonical.eigenvectors,
        })),
        "notes": q.notes,
        "error": q.fit.as_ref().err(),
    })
}

/// The quadratic part as a section of the text report.
pub fn quadratic_text(q: &QuadraticReport) -> String {
    use std::fmt::Write as _;
    let plain = |x: f64| crate::numbers::plain(x, 6);
    let opt = |x: Option<f64>| x.map_or_else(|| "-".to_string(), plain);
    let mut s = String::new();
    let _ = writeln!(
        s,
        "\nQuadratic model (every run: {} used, axial block {})",
        q.runs_used, q.axial_block
    );
    match &q.fit {
        Err(why) => {
            let _ = writeln!(s, "Not fitted: {why}");
        }
        Ok(f) => {
            let _ = writeln!(
                s,
                "{:<10} {:>12} {:>12} {:>10} {:>10}",
                "term", "coef", "SE", "t", "p"
            );
            for c in &f.coefficients {
                let _ = writeln!(
                    s,
                    "{:<10} {:>12} {:>12} {:>10} {:>10}",
                    c.term.label(),
                    plain(c.coefficient),
                    opt(c.se),
                    opt(c.t),
                    opt(c.p)
                );
            }
            let _ = writeln!(
                s,
                "Residual SS {} on {} df, sigma {}, R² {}, adjusted R² {}",
                plain(f.residual_ss),
                f.residual_df,
                opt(f.sigma),
                plain(f.r_squared),
                opt(f.adj_r_squared)
            );
            if let Some(l) = &f.lack_of_fit {
                let _ = writeln!(
                    s,
                    "Lack of fit: SS {} on {} df, pure error SS {} on {} df, F {}, p {}",
                    plain(l.ss),
                    l.df,
                    plain(l.pure_error_ss),
                    l.pure_error_df,
                    plain(l.f),
                    opt(l.p)
                );
            }
            for (l, v) in f
                .canonical
                .eigenvalues
                .iter()
                .zip(&f.canonical.eigenvectors)
            {
                let dir: Vec<String> = v
                    .iter()
                    .enumerate()
                    .map(|(i, x)| format!("{}{}", plain(*x), letter(i)))
                    .collect();
                let _ = writeln!(s, "Eigenvalue {} along ({})", plain(*l), dir.join(", "));
            }
        }
    }
    for n in &q.notes {
        let _ = writeln!(s, "{n}");
    }
    s
}

/// The follow-up option that adds axial runs, with its score for the suggestion (1 when the
/// report's curvature test is significant at [`TERM_ALPHA`], else 0) and the reason; `None` when
/// the design has them or cannot take them (a screening design, categorical or hard-to-change
/// factors, fewer than two factors), and when they cannot be added (e.g. a fraction that aliases
/// two-factor interactions) unless the curvature test calls for them, so the reason shows.
pub(super) fn axial_option(
    project: &Project,
    report: Option<&Report>,
) -> Option<(usize, Vec<String>, NextRun)> {
    if project.design.axial.is_some()
        || project.design.screening_runs().is_some()
        || project.factors.len() < 2
        || project
            .factors
            .iter()
            .any(|f| !f.is_numeric() || f.hard_to_change)
    {
        return None;
    }
    let k = project.factors.len();
    let preview = project
        .preview_follow_up(FollowUp::Axial)
        .map_err(|e| e.to_string());
    let centres = crate::project::AxialRuns::for_design(&project.design).centre_points;
    let squares: Vec<String> = (0..k).map(|i| format!("{}²", letter(i))).collect();
    let resolves = vec![
        format!(
            "Adds {} axial runs (each factor at its low and at its high with the others at the centre) and {centres} centre runs as block {}: a face-centred central composite design, every run inside the tested ranges.",
            2 * k,
            project.runs.iter().map(|r| r.block).max().unwrap_or(1) + 1
        ),
        format!(
            "Each pure quadratic term ({}) becomes estimable, so the quadratic model says which factors bend the response, where its stationary point lies and whether it is a maximum, a minimum or a saddle.",
            squares.join(", ")
        ),
    ];
    let curved = report
        .and_then(|r| r.curvature)
        .and_then(|c| c.p)
        .filter(|p| *p < TERM_ALPHA);
    if preview.is_err() && curved.is_none() {
        // Not addable and not called for: the list stays short.
        return None;
    }
    let (score, words) = match curved {
        Some(p) => (
            1,
            vec![format!(
                "the curvature test is significant (p = {}): the centre differs from the corners' average, and axial runs say which factor bends the response",
                crate::numbers::fmt_sig(p, 3)
            )],
        ),
        None => (0, Vec::new()),
    };
    Some((
        score,
        words,
        NextRun {
            follow_up: FollowUp::Axial,
            title: "Add axial runs (central composite design)".into(),
            resolves,
            resolution_after: None,
            preview,
            suggested: false,
            reason: None,
        },
    ))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Cell, Edit, Factor, ResponseDef};
    use twofold_core::composite::QuadTerm;
    use twofold_core::prec::close_to_places;

    /// y = 50 + 2A − B + 0.5AB − 4A² − 3B² (invented), the centre runs of each block at
    /// 50.1, 49.9 and 50.0 so that their mean is the surface's value.
    fn surface(levels: &[i8]) -> f64 {
        let (a, b) = (f64::from(levels[0]), f64::from(levels[1]));
        50.0 + 2.0 * a - b + 0.5 * a * b - 4.0 * a * a - 3.0 * b * b
    }

    fn fill(p: &mut Project) {
        let mut centre = 0;
        for r in &mut p.runs {
            if r.values[0].is_typed() {
                continue;
            }
            let mut y = surface(&r.levels);
            if r.centre {
                y += [0.1, -0.1, 0.0][centre % 3];
                centre += 1;
            }
            r.values[0] = Cell::new(format!("{y}"));
        }
    }

    fn curved_factorial() -> Project {
        let mut p = Project::new("curved");
        p.factors.push(Factor::numeric("Temp", "°C", 150.0, 170.0));
        p.factors.push(Factor::numeric("Time", "min", 10.0, 20.0));
        p.responses.push(ResponseDef::new("y", ""));
        p.design.centre_points_per_block = 3;
        p.apply(Edit::RegenerateRuns).unwrap();
        fill(&mut p);
        p
    }

    #[test]
    fn significant_curvature_suggests_axial_runs_that_resolve_the_squares() {
        let p = curved_factorial();
        let report = Report::for_response(&p, 0, 0);
        assert!(report.curvature.unwrap().p.unwrap() < TERM_ALPHA);
        assert_eq!(report.quadratic, None);
        let list = super::super::next_runs(&p, Some(&report));
        assert_eq!(list[0].key(), "axial", "{list:?}");
        assert!(list[0].suggested);
        assert!(list[0].reason.as_ref().unwrap().contains("curvature"));
        assert_eq!(list[0].runs_added(), 4 + 3);
        assert!(
            list[0].resolves[1].contains("(A², B²)"),
            "{:?}",
            list[0].resolves
        );
    }

    #[test]
    fn the_report_of_a_composite_study_adds_the_quadratic_model() {
        let before = curved_factorial();
        let two_level = Report::for_response(&before, 0, 0);
        let mut p = before.clone();
        p.apply(Edit::AddFollowUp(FollowUp::Axial)).unwrap();
        // Before the axial runs are typed the quadratic model waits for them.
        let waiting = Report::for_response(&p, 0, 0);
        let q = waiting.quadratic.as_ref().unwrap();
        assert_eq!(q.axial_waiting, 4 + 3);
        assert!(q.fit.is_err());
        fill(&mut p);
        let r = Report::for_response(&p, 0, 0);
        // The two-level part is the report of the sheet before the axial runs.
        assert_eq!(r.effects, two_level.effects);
        assert_eq!(r.curvature, two_level.curvature);
        let q = r.quadratic.as_ref().unwrap();
        assert_eq!((q.axial_block, q.runs_used, q.axial_waiting), (2, 14, 0));
        let fit = q.fit.as_ref().unwrap();
        // The centre runs average to the surface in each block, so the fit is the surface.
        for (term, value) in [
            (QuadTerm::Intercept, 50.0),
            (QuadTerm::Block(2), 0.0),
            (QuadTerm::Linear(0), 2.0),
            (QuadTerm::Linear(1), -1.0),
            (QuadTerm::Interaction(0, 1), 0.5),
            (QuadTerm::Square(0), -4.0),
            (QuadTerm::Square(1), -3.0),
        ] {
            let got = fit.coefficient(term).unwrap();
            assert!(close_to_places(got, value, 9), "{term:?}: {got}");
        }
        // x_s = −½B⁻¹b with B = [[−4, 0.25], [0.25, −3]], b = (2, −1): by hand
        // (2.875, −1.75)/11.9375; in natural units 160 + 10x and 15 + 5x.
        let s = fit.stationary.as_ref().unwrap();
        assert!(close_to_places(s.x[0], 2.875 / 11.9375, 9));
        assert!(close_to_places(s.x[1], -1.75 / 11.9375, 9));
        assert!(s.inside_box);
        let nat = q.stationary_natural.as_ref().unwrap();
        assert!(close_to_places(nat[0], 160.0 + 10.0 * s.x[0], 9));
        assert!(close_to_places(nat[1], 15.0 + 5.0 * s.x[1], 9));
        assert_eq!(fit.canonical.kind, SurfaceKind::Maximum);
        assert!(
            q.notes
                .iter()
                .any(|n| n.starts_with("The stationary point is a maximum"))
        );
        // Rendered by the command.
        let json = super::super::json::report_json(&r).unwrap();
        assert_eq!(json["quadratic"]["canonical"]["kind"], "maximum");
        assert_eq!(
            json["quadratic"]["coefficients"].as_array().unwrap().len(),
            7
        );
        let text = super::super::text::report_text(&r).unwrap();
        assert!(
            text.contains("Quadratic model (every run: 14 used, axial block 2)"),
            "{text}"
        );
        assert!(text.contains("Eigenvalue"), "{text}");
        // The page: the equation and the maximum among the response's lines, drawn on a page.
        let input =
            crate::export::summary_input(&p, &[&r], &crate::export::BuildOptions::default());
        let lines = &input.responses[0].warnings;
        assert!(
            lines.iter().any(|l| l.starts_with(
                "Quadratic model from all 14 runs (axial runs in block 2, coded units, blocks averaged): y = 50 + 2 A − 1 B + 0.5 AB − 4 A² − 3 B²"
            )),
            "{lines:?}"
        );
        assert!(
            lines
                .iter()
                .any(|l| l.starts_with("The stationary point is a maximum"))
        );
        let pages =
            crate::export::summary::render_pages(&input, crate::export::Paper::default()).join("");
        assert!(
            pages.contains("Quadratic model from all 14 runs"),
            "not on the page"
        );
        // A study without axial runs has no `quadratic` key.
        let plain = super::super::json::report_json(&two_level).unwrap();
        assert!(plain.get("quadratic").is_none());
    }
}
