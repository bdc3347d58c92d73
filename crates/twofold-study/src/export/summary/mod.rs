//! The one-page summary, drawn from a [`SummaryInput`].
//!
//! Layout (portrait): a header across the page (title, date, response, description); two columns
//! (left: factors, design, effect ranking, ANOVA; right: half-normal plot, interaction plots,
//! best settings, the one-factor-at-a-time comparison); then across the page the equation,
//! warnings, cautions and the reproducibility footer. Blocks of variable length are measured by
//! drawing them once into a scratch document, so the columns get exactly the room left over.

mod left;

use super::charts::{self, Ticks};
use super::input::SummaryInput;
use super::page::{Flow, Paper, Rect, sizes};
use super::svg::{ACCENT, ALERT, Anchor, INK, MUTED, Svg, TextStyle};
use crate::numbers;

/// The cautions printed on every summary page.
pub const CAUTIONS: [&str; 4] = [
    "Stay within the safe operating limits of your equipment, materials and process: the settings on this page are statistical estimates, not verified safe conditions.",
    "Confirm with confirmation runs at the chosen settings before changing production.",
    "The model describes only the tested ranges of the factors; do not extrapolate beyond them.",
    "Follow local codes, regulations and licensed practice; this page does not replace engineering judgement or required approvals.",
];

/// Width of the label column of label-value lines.
const LABEL_W: f64 = 300.0;

/// Draws the summary page and returns the SVG document.
pub fn render_svg(input: &SummaryInput, paper: Paper) -> String {
    let (w, h) = paper.size();
    let m = paper.margin();
    let mut svg = Svg::new(w, h, paper.physical());
    let content_w = w - 2.0 * m;

    let header_bottom = header(&mut svg, input, m, m, content_w);

    // Measure the full-width block at the foot of the page, then draw it there. It may take a
    // quarter of the page; beyond that fewer warnings are shown (the rest are counted).
    let measure = |limits: FootLimits| {
        let mut scratch = Svg::new(w, h, paper.physical());
        let mut flow = Flow::new(m, content_w, 0.0, f64::INFINITY);
        foot(&mut scratch, &mut flow, input, limits);
        flow.y
    };
    let budget = 0.25 * (h - 2.0 * m);
    let mut limits = FootLimits {
        equation_lines: 4,
        warnings: input.warnings.len().min(6),
        warning_lines: 3,
    };
    let mut bottom_h = measure(limits);
    while bottom_h > budget {
        if limits.warning_lines > 2 {
            limits.warning_lines = 2;
        } else if limits.equation_lines > 2 {
            limits.equation_lines -= 1;
        } else if limits.warnings > 1 {
            limits.warnings -= 1;
        } else {
            break;
        }
        bottom_h = measure(limits);
    }
    let foot_top = (h - m - bottom_h).max(header_bottom + 400.0);
    let mut flow = Flow::new(m, content_w, foot_top, h - m);
    foot(&mut svg, &mut flow, input, limits);

    let gap = 70.0;
    let col_w = (content_w - gap) / 2.0;
    let cols_top = header_bottom;
    let cols_bottom = foot_top - 30.0;
    left::left_column(&mut svg, input, Flow::new(m, col_w, cols_top, cols_bottom));
    right_column(
        &mut svg,
        input,
        Flow::new(m + col_w + gap, col_w, cols_top, cols_bottom),
    );
    svg.line(
        (m + col_w + gap / 2.0, cols_top + 20.0),
        (m + col_w + gap / 2.0, cols_bottom - 10.0),
        "#dddddd",
        2.0,
        None,
    );

    let title = if input.title.is_empty() {
        "Experiment summary".to_string()
    } else {
        format!("{}: summary", input.title)
    };
    svg.finish(&title)
}

/// Title, date, response line and description; returns the y where the columns start.
fn header(svg: &mut Svg, input: &SummaryInput, x: f64, y: f64, w: f64) -> f64 {
    let date_style = TextStyle::new(sizes::BODY).fill(MUTED).anchor(Anchor::End);
    let date_w = if input.date.is_empty() {
        0.0
    } else {
        date_style.width(&input.date) + 60.0
    };
    let title_style = TextStyle::new(sizes::TITLE).bold();
    let title = if input.title.trim().is_empty() {
        "Untitled experiment"
    } else {
        input.title.trim()
    };
    let baseline = y + sizes::TITLE * 0.95;
    svg.text(
        x,
        baseline,
        &super::page::ellipsize(title, title_style, w - date_w),
        title_style,
    );
    if !input.date.is_empty() {
        svg.text(x + w, baseline, &input.date, date_style);
    }
    let mut flow = Flow::new(x, w, baseline + sizes::TITLE * 0.35, f64::INFINITY);
    let r = &input.response;
    let mut line = if r.name.is_empty() {
        "Response: (unnamed)".to_string()
    } else {
        format!("Response: {}", r.name)
    };
    if !r.unit.is_empty() {
        line.push_str(&format!(" ({})", r.unit));
    }
    line.push_str(&format!(
        "  ·  {} of {} runs analysed",
        r.runs_used, r.runs_total
    ));
    if !r.transform.is_empty() {
        line.push_str(&format!("  ·  analysed as {}", r.transform));
    }
    flow.paragraph(
        svg,
        &line,
        TextStyle::new(sizes::BODY).bold().fill(ACCENT),
        2,
    );
    if !input.description.trim().is_empty() {
        flow.space(sizes::BODY * 0.2);
        flow.paragraph(
            svg,
            input.description.trim(),
            TextStyle::new(sizes::BODY),
            4,
        );
    }
    flow.space(sizes::BODY * 0.3);
    svg.line((x, flow.y), (x + w, flow.y), INK, 3.0, None);
    flow.y + sizes::BODY * 0.4
}

/// `2⁵⁻¹` in superscript digits.
fn fraction_symbol(k: usize, p: usize) -> String {
    fn sup(n: usize) -> String {
        n.to_string()
            .chars()
            .map(|c| match c {
                '0' => '⁰',
                '1' => '¹',
                '2' => '²',
                '3' => '³',
                '4' => '⁴',
                '5' => '⁵',
                '6' => '⁶',
                '7' => '⁷',
                '8' => '⁸',
                _ => '⁹',
            })
            .collect()
    }
    if p == 0 {
        format!("2{}", sup(k))
    } else {
        format!("2{}⁻{}", sup(k), sup(p))
    }
}

/// Roman numeral of a resolution (III, IV, V, ...), plain digits past 12.
pub fn roman(n: u32) -> String {
    const R: [&str; 13] = [
        "", "I", "II", "III", "IV", "V", "VI", "VII", "VIII", "IX", "X", "XI", "XII",
    ];
    R.get(n as usize)
        .map_or_else(|| n.to_string(), |s| s.to_string())
}

fn right_column(svg: &mut Svg, input: &SummaryInput, flow: Flow) {
    // Best settings and the comparison go at the foot of the column; the charts share the rest.
    let tail_h = {
        let mut scratch = Svg::new(10.0, 10.0, ("1in", "1in"));
        let mut probe = Flow::new(flow.x, flow.w, 0.0, f64::INFINITY);
        tail(&mut scratch, &mut probe, input);
        probe.y
    };
    let charts_bottom = (flow.bottom - tail_h).max(flow.y + 600.0);
    let mut top = Flow::new(flow.x, flow.w, flow.y, charts_bottom);
    let mut panels: Vec<_> = input.interactions.iter().take(4).cloned().collect();
    let heading_h = sizes::HEADING * 1.55;
    let note_h = 2.0 * sizes::SMALL * sizes::LEADING;
    let gap = 50.0;
    let panel_w = (top.w - gap) / 2.0;
    let available = top.remaining() - 2.0 * heading_h - 20.0 - note_h;
    // The interaction panels get up to 55 % of the room (never taller than wide); the
    // half-normal plot takes the rest, up to a little taller than wide. On a crowded page
    // fewer panels are drawn rather than panels too small to read.
    let mut dropped_for_room = false;
    let (rows, panel_h, hn_h) = loop {
        let rows = panels.len().div_ceil(2);
        let panel_h = if rows == 0 {
            0.0
        } else {
            ((available * 0.55 - gap * (rows as f64 - 1.0)) / rows as f64).min(panel_w * 1.1)
        };
        let interactions_h = if rows == 0 {
            2.0 * sizes::BODY * sizes::LEADING
        } else {
            rows as f64 * panel_h + (rows as f64 - 1.0) * gap
        };
        let hn_h = (available - interactions_h).min(flow.w * 1.2).max(0.0);
        let cramped = panel_h < 420.0 || hn_h < 600.0;
        if cramped && panels.len() > 2 {
            panels.truncate(2);
        } else if cramped && !panels.is_empty() && (panel_h < 330.0 || hn_h < 450.0) {
            panels.clear();
            dropped_for_room = true;
        } else {
            break (rows, panel_h, hn_h);
        }
    };

    top.heading(svg, "Half-normal plot of effects");
    match top.take(hn_h) {
        Some(area) if !input.half_normal.is_empty() => {
            charts::half_normal(svg, area, &input.half_normal, input.lenth.as_ref())
        }
        Some(area) => charts::empty_box(svg, area, "no effects to plot yet"),
        None => {}
    }
    top.space(20.0);
    top.heading(svg, "Interaction plots");
    if panels.is_empty() {
        let text = if dropped_for_room {
            "The interaction plots do not fit on this page; they are in the app."
        } else {
            "No two-factor interaction to plot."
        };
        top.paragraph(svg, text, TextStyle::new(sizes::BODY).fill(MUTED), 2);
    } else {
        let ticks: Ticks = charts::shared_interaction_ticks(&panels);
        let r = &input.response;
        let y_label = if r.unit.is_empty() {
            r.name.clone()
        } else {
            format!("{} ({})", r.name, r.unit)
        };
        for (i, panel) in panels.iter().enumerate() {
            let col = i % 2;
            let row = i / 2;
            let area = Rect {
                x: top.x + col as f64 * (panel_w + gap),
                y: top.y + row as f64 * (panel_h + gap),
                w: panel_w,
                h: panel_h,
            };
            charts::interaction(svg, area, panel, &ticks, &y_label);
        }
        top.space(rows as f64 * panel_h + (rows as f64 - 1.0) * gap);
        let shown = if input.interactions.len() > panels.len() {
            let count = ["", "one", "two", "three", "four"];
            format!(
                " The {} strongest of {} are shown.",
                count.get(panels.len()).copied().unwrap_or("four"),
                input.interactions.len()
            )
        } else {
            String::new()
        };
        let note = if input.interaction_note.is_empty() {
            format!(
                "Same response axis in every panel; lines that are not parallel show an interaction.{shown}"
            )
        } else {
            format!(
                "{}{shown} Same response axis in every panel.",
                input.interaction_note
            )
        };
        top.paragraph(svg, &note, TextStyle::new(sizes::SMALL).fill(MUTED), 2);
    }
    // The text follows the charts directly; any spare room stays at the foot of the column.
    let mut bottom = Flow::new(
        flow.x,
        flow.w,
        (top.y + 20.0).min(charts_bottom),
        flow.bottom,
    );
    tail(svg, &mut bottom, input);
}

fn tail(svg: &mut Svg, flow: &mut Flow, input: &SummaryInput) {
    let body = TextStyle::new(sizes::BODY);
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
    flow.heading(svg, "Best settings found");
    match &input.best {
        Some(b) => {
            flow.fact(svg, "Goal", &b.goal, LABEL_W, 1);
            let settings: Vec<String> = b
                .settings
                .iter()
                .map(|(f, v)| format!("{f} = {v}"))
                .collect();
            flow.fact(svg, "Settings", &settings.join(";  "), LABEL_W, 3);
            // Prediction and interval share one number of decimals so they read as one scale.
            let predicted = match b.predicted {
                Some(value) => {
                    let widest = b.interval.as_ref().map_or(value.abs(), |(lo, hi, _)| {
                        value.abs().max(lo.abs()).max(hi.abs())
                    });
                    let decimals = numbers::column_decimals(widest, 4);
                    let mut text = numbers::fixed(value, decimals);
                    if let Some((lo, hi, what)) = &b.interval {
                        text.push_str(&format!(
                            "  ({what}: {} to {})",
                            numbers::fixed(*lo, decimals),
                            numbers::fixed(*hi, decimals)
                        ));
                    }
                    text
                }
                None => "no value on the measured scale".to_string(),
            };
            flow.fact(svg, "Predicted", &predicted, LABEL_W, 2);
            flow.paragraph(
                svg,
                "A prediction, not a result: confirm it with runs at these settings.",
                small,
                1,
            );
        }
        None => {
            flow.paragraph(
                svg,
                "No prediction yet: fit a model first.",
                body.fill(MUTED),
                1,
            );
        }
    }
    flow.heading(svg, "Compared with one factor at a time");
    match &input.ofat {
        Some(o) => {
            let text = format!(
                "This design: {} runs. Changing one factor at a time would need about {} runs for the same precision of the main effects, and could not estimate any interaction.",
                o.design_runs, o.ofat_runs
            );
            flow.paragraph(svg, &text, body, 3);
            if !o.explanation.is_empty() {
                flow.paragraph(svg, &o.explanation, small, 2);
            }
        }
        None => {
            flow.paragraph(svg, "Not available for this design.", body.fill(MUTED), 1);
        }
    }
}

/// Equation, warnings, cautions and footer, across the page.
/// How much of the variable text the foot may show.
#[derive(Debug, Clone, Copy)]
struct FootLimits {
    equation_lines: usize,
    warnings: usize,
    warning_lines: usize,
}

fn foot(svg: &mut Svg, flow: &mut Flow, input: &SummaryInput, limits: FootLimits) {
    let body = TextStyle::new(sizes::BODY);
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
    svg.line((flow.x, flow.y), (flow.x + flow.w, flow.y), INK, 3.0, None);
    flow.space(6.0);
    flow.heading(svg, "Model equation in natural units");
    match &input.equation {
        Some(eq) => {
            let all = flow.paragraph(svg, &eq.text, body, limits.equation_lines);
            if !all {
                flow.paragraph(svg, "(the full equation is in the app)", small, 1);
            }
            if !eq.note.is_empty() {
                flow.paragraph(svg, &eq.note, small, 2);
            }
        }
        None => {
            flow.paragraph(svg, "No model fitted yet.", body.fill(MUTED), 1);
        }
    }
    flow.heading(svg, "Warnings");
    if input.warnings.is_empty() {
        flow.paragraph(svg, "None.", body.fill(MUTED), 1);
    }
    let max_warnings = limits.warnings;
    for w in input.warnings.iter().take(max_warnings) {
        bullet(svg, flow, w, body, ALERT, limits.warning_lines);
    }
    if input.warnings.len() > max_warnings {
        let n = input.warnings.len() - max_warnings;
        flow.paragraph(
            svg,
            &format!("{n} more warnings are listed in the app."),
            small,
            1,
        );
    }
    flow.heading(svg, "Before acting on this page");
    for c in CAUTIONS {
        bullet(svg, flow, c, body, INK, 3);
    }
    flow.space(sizes::SMALL * 0.6);
    let f = &input.footer;
    let mut facts = vec![if f.tool.is_empty() {
        "Twofold".to_string()
    } else {
        f.tool.clone()
    }];
    match f.seed {
        Some(seed) => facts.push(format!("run-order seed {seed}")),
        None => facts.push("runs in standard order".to_string()),
    }
    if !f.data_hash.is_empty() {
        facts.push(format!("SHA-256 of project data {}", f.data_hash));
    }
    flow.paragraph(svg, &facts.join("  ·  "), small, 2);
}

fn bullet(
    svg: &mut Svg,
    flow: &mut Flow,
    text: &str,
    style: TextStyle,
    mark: super::svg::Colour,
    max_lines: usize,
) {
    let indent = style.size * 1.1;
    if flow.remaining() < style.size {
        return;
    }
    svg.text(
        flow.x + style.size * 0.2,
        flow.y + style.size,
        "•",
        TextStyle::new(style.size).bold().fill(mark),
    );
    flow.paragraph_at(svg, text, style, max_lines, indent);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fraction_symbols_and_resolutions() {
        assert_eq!(fraction_symbol(5, 1), "2⁵⁻¹");
        assert_eq!(fraction_symbol(11, 0), "2¹¹");
        assert_eq!(roman(4), "IV");
        assert_eq!(roman(20), "20");
    }

    /// A project at the edge of what a page holds: many factors, long names, every effect of a
    /// 32-run design, a long ANOVA, four interactions, many warnings.
    fn crowded() -> SummaryInput {
        use crate::export::input::*;
        let letters = "ABCDEFGHJKLMN";
        let long = "Concentration of the secondary accelerator in the premix";
        SummaryInput {
            title: "A very long project title that goes on and on about the trial it describes in detail".into(),
            date: "2025-03-04".into(),
            description: "Word ".repeat(400),
            response: ResponseFacts { name: "Peel strength after humid ageing".into(), unit: "N/25 mm".into(), transform: "natural log".into(), runs_used: 35, runs_total: 36 },
            factors: letters.chars().map(|l| FactorRow { letter: l, name: format!("{long} {l}"), unit: "g/kg".into(), low: LevelValue::Number(-1.25e-5), high: LevelValue::Label("supplier with a long name".into()) }).collect(),
            design: DesignFacts { factors: 13, generators_count: 8, base_runs: 32, centre_points: 4, replicates: 1, blocks: 2, total_runs: 36, generators: (0..8).map(|i| format!("{} = ABCDE", &letters[5 + i..6 + i])).collect(), block_generators: vec!["ABC".into()], resolution: Some(4), aliases: (0..40).map(|i| format!("T{i} = ABCD = BCDE = CDEF")).collect(), seed: Some(42) },
            effects: (0..31).map(|i| EffectRow { term: format!("AB{i}=CDE=FGH"), effect: 40.0 / (i as f64 + 1.0) * if i % 2 == 0 { 1.0 } else { -1.0 }, in_model: i < 6 }).collect(),
            lenth: Some(LenthFacts { pse: 1.5, me: 3.2, sme: 6.1, alpha: 0.05, df: 10.3 }),
            half_normal: (0..31).map(|i| HalfNormalPoint { term: format!("T{i}"), abs_effect: 40.0 / (i as f64 + 1.0), quantile: 2.5 - i as f64 * 0.08, in_model: i < 6 }).collect(),
            interactions: (0..6).map(|i| InteractionPanel { term: format!("A{i}"), x_factor: long.into(), x_levels: ["low setting with words".into(), "high".into()], trace_factor: long.into(), trace_levels: ["a".into(), "b".into()], means: [[Some(1.0 + i as f64), Some(3.0)], [None, Some(-2.0)]] }).collect(),
            interaction_note: String::new(),
            anova: Some(AnovaTable { rows: (0..40).map(|i| AnovaRow { source: format!("Source {i}"), df: 1, ss: 12345.678, ms: Some(0.00012), f: Some(1e9), p: Some(0.5), emphasis: i == 0 }).collect(), r_squared: Some(0.9), adj_r_squared: Some(0.8), pred_r_squared: None, std_dev: Some(2.0), tests_note: String::new() }),
            equation: Some(Equation { text: format!("y = {}", "+ 1.234567*Concentration of the secondary accelerator ".repeat(30)), note: "note".into() }),
            best: Some(BestSettings { goal: "maximise Peel strength".into(), settings: (0..13).map(|i| (format!("{long} {i}"), "supplier with a long name".into())).collect(), predicted: Some(12.5), interval: Some((10.0, 15.0, "95 % prediction interval".into())) }),
            ofat: Some(OfatFacts { ofat_runs: 224, design_runs: 32, explanation: "x ".repeat(200) }),
            warnings: (0..12).map(|i| format!("Warning {i}: {}", "something needs a look ".repeat(12))).collect(),
            footer: Footer { tool: "Twofold test".into(), seed: Some(42), data_hash: "f".repeat(64) },
        }
    }

    /// Every `x`/`y` attribute of every text element.
    fn text_positions(svg: &str) -> Vec<(f64, f64)> {
        svg.lines()
            .filter(|l| l.starts_with("<text x="))
            .map(|l| {
                let attr = |name: &str| -> f64 {
                    let start = l.find(&format!(" {name}=\"")).unwrap() + name.len() + 3;
                    let end = start + l[start..].find('"').unwrap();
                    l[start..end].parse().unwrap()
                };
                (attr("x"), attr("y"))
            })
            .collect()
    }

    #[test]
    fn a_crowded_page_stays_inside_its_margins_and_says_what_it_left_out() {
        for paper in [Paper::A4, Paper::Letter] {
            let svg = render_svg(&crowded(), paper);
            let (w, h) = paper.size();
            let m = paper.margin();
            for (x, y) in text_positions(&svg) {
                assert!(
                    x >= m - 1.0 && x <= w - m + 1.0,
                    "{paper:?}: text at x = {x}"
                );
                assert!(y >= m && y <= h - m + 1.0, "{paper:?}: text at y = {y}");
            }
            assert!(svg.contains("smaller effects not listed"), "{paper:?}");
            assert!(svg.contains("more rows not shown"), "{paper:?}");
            assert!(
                svg.contains("more warnings are listed in the app"),
                "{paper:?}"
            );
            assert!(svg.contains("strongest of 6"), "{paper:?}");
            assert!(
                svg.contains("confirmation runs"),
                "{paper:?}: the cautions always fit"
            );
        }
    }

    #[test]
    fn empty_input_still_draws_a_page_with_the_cautions() {
        let svg = render_svg(&SummaryInput::default(), Paper::A4);
        assert!(svg.contains("Untitled experiment"));
        assert!(svg.contains("confirmation runs"));
        assert!(svg.contains("No effects yet"));
    }
}
