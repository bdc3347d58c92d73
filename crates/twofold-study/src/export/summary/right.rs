//! The right column of a response's page: half-normal plot, interaction plots, best settings
//! and (on the first page) the one-factor-at-a-time comparison.

use crate::export::charts::{self, Ticks};
use crate::export::input::InteractionPanel;
use crate::export::page::{Flow, Rect, sizes, wrap};
use crate::export::svg::{MUTED, Svg, TextStyle};
use crate::numbers;

use super::{Item, LABEL_W, More, Part, SIGN_LEGEND};

/// Interaction plots drawn on a response's page at most.
const MAX_PANELS: usize = 4;

pub(super) fn right_column(svg: &mut Svg, part: Part, flow: Flow, more: &mut More) {
    let section = part.section;
    // Best settings and the comparison go at the foot of the column; the charts share the rest.
    // When the best settings would leave the charts too little room they go to the pages of
    // more detail, whole.
    let tail_h = |best_here: bool| {
        let mut scratch = Svg::new(10.0, 10.0, ("1in", "1in"));
        let mut probe = Flow::new(flow.x, flow.w, 0.0, f64::INFINITY);
        tail(
            &mut scratch,
            &mut probe,
            part,
            best_here,
            &mut more.scratch(),
        );
        probe.y
    };
    let min_charts = 1400.0_f64.min(flow.remaining() * 0.5);
    let best_here = tail_h(true) <= flow.remaining() - min_charts;
    let tail_h = tail_h(best_here);
    let charts_bottom = (flow.bottom - tail_h).max(flow.y + 600.0);
    let mut top = Flow::new(flow.x, flow.w, flow.y, charts_bottom);
    let mut panels: Vec<_> = section
        .interactions
        .iter()
        .take(MAX_PANELS)
        .cloned()
        .collect();
    let heading_h = sizes::HEADING * 1.55;
    let note_h = 3.0 * sizes::SMALL * sizes::LEADING;
    let legend_h = wrap(SIGN_LEGEND, TextStyle::new(sizes::SMALL), flow.w).len() as f64
        * sizes::SMALL
        * sizes::LEADING;
    let gap = 50.0;
    let panel_w = (top.w - gap) / 2.0;
    let available = top.remaining() - 2.0 * heading_h - 20.0 - note_h - legend_h;
    // The interaction panels get up to 55 % of the room (never taller than wide); the
    // half-normal plot takes the rest, up to a little taller than wide. On a crowded page
    // fewer panels are drawn here rather than panels too small to read; all of them are then
    // drawn on the pages of more detail.
    let (rows, panel_h, hn_h) = loop {
        let rows = panels.len().div_ceil(2);
        let panel_h = if rows == 0 {
            0.0
        } else {
            ((available * 0.55 - gap * (rows as f64 - 1.0)) / rows as f64).min(panel_w * 1.1)
        };
        let interactions_h = if rows == 0 {
            3.0 * sizes::BODY * sizes::LEADING
        } else {
            rows as f64 * panel_h + (rows as f64 - 1.0) * gap
        };
        let hn_h = (available - interactions_h).min(flow.w * 1.2).max(0.0);
        let cramped = panel_h < 420.0 || hn_h < 600.0;
        if cramped && panels.len() > 2 {
            panels.truncate(2);
        } else if cramped && !panels.is_empty() && (panel_h < 330.0 || hn_h < 450.0) {
            panels.clear();
        } else {
            break (rows, panel_h, hn_h);
        }
    };

    if section.strata_half_normal.is_empty() {
        top.heading(svg, "Half-normal plot of effects");
        match top.take(hn_h) {
            Some(area) if !section.half_normal.is_empty() => {
                charts::half_normal(svg, area, &section.half_normal, section.lenth.as_ref())
            }
            Some(area) => charts::empty_box(svg, area, "no effects to plot yet"),
            None => {}
        }
    } else {
        // A split-plot study: one plot per stratum, each with its own Lenth lines (Loeppky &
        // Sitter 2002), sharing the height of the one plot.
        top.heading(svg, "Half-normal plots of effects, one per stratum");
        let n = section.strata_half_normal.len() as f64;
        let caption = sizes::SMALL * sizes::LEADING;
        for (title, points, lenth) in &section.strata_half_normal {
            top.paragraph(svg, title, TextStyle::new(sizes::SMALL).fill(MUTED), 1);
            if let Some(area) = top.take((hn_h / n - caption).max(0.0)) {
                charts::half_normal(svg, area, points, lenth.as_ref());
            }
        }
    }
    top.paragraph(
        svg,
        SIGN_LEGEND,
        TextStyle::new(sizes::SMALL).fill(MUTED),
        2,
    );
    top.space(20.0);
    top.heading(svg, "Interaction plots");
    let y_label = y_label(part);
    let all = &section.interactions;
    let elsewhere = if panels.len() < all.len() {
        let place = more.add(
            &part.heading("interaction plots"),
            vec![Item::Panels {
                panels: all.clone(),
                y_label: y_label.clone(),
            }],
        );
        format!(" All {} are drawn under {place}.", all.len())
    } else {
        String::new()
    };
    if panels.is_empty() {
        let text = if all.is_empty() {
            "No two-factor interaction to plot.".to_string()
        } else {
            format!("No room for the interaction plots on this page.{elsewhere}")
        };
        top.paragraph(svg, &text, TextStyle::new(sizes::BODY).fill(MUTED), 3);
    } else {
        let ticks: Ticks = charts::shared_interaction_ticks(&panels);
        draw_panels(svg, &top, &panels, &ticks, &y_label, panel_w, panel_h, gap);
        top.space(rows as f64 * panel_h + (rows as f64 - 1.0) * gap);
        let shown = if all.len() > panels.len() {
            let count = ["", "one", "two", "three", "four"];
            format!(
                " The {} strongest of {} are shown.{elsewhere}",
                count.get(panels.len()).copied().unwrap_or("four"),
                all.len()
            )
        } else {
            String::new()
        };
        let note = if section.interaction_note.is_empty() {
            format!(
                "Same response axis in every panel; lines that are not parallel show an interaction.{shown}"
            )
        } else {
            format!(
                "{}{shown} Same response axis in every panel.",
                section.interaction_note
            )
        };
        top.paragraph(svg, &note, TextStyle::new(sizes::SMALL).fill(MUTED), 3);
    }
    // The text follows the charts directly; any spare room stays at the foot of the column.
    let mut bottom = Flow::new(
        flow.x,
        flow.w,
        (top.y + 20.0).min(charts_bottom),
        flow.bottom,
    );
    tail(svg, &mut bottom, part, best_here, more);
}

/// The response axis title of the interaction plots: the name with its unit.
fn y_label(part: Part) -> String {
    let r = &part.section.response;
    if r.unit.is_empty() {
        r.name.clone()
    } else {
        format!("{} ({})", r.name, r.unit)
    }
}

/// Interaction plots two to a row from the top of `flow`, `panel_w` × `panel_h` each.
#[expect(
    clippy::too_many_arguments,
    reason = "a grid is its cells, their size and spacing"
)]
pub(super) fn draw_panels(
    svg: &mut Svg,
    flow: &Flow,
    panels: &[InteractionPanel],
    ticks: &Ticks,
    y_label: &str,
    panel_w: f64,
    panel_h: f64,
    gap: f64,
) {
    for (i, panel) in panels.iter().enumerate() {
        let col = i % 2;
        let row = i / 2;
        let area = Rect {
            x: flow.x + col as f64 * (panel_w + gap),
            y: flow.y + row as f64 * (panel_h + gap),
            w: panel_w,
            h: panel_h,
        };
        charts::interaction(svg, area, panel, ticks, y_label);
    }
}

/// Best settings (here, or a line saying where) and, on the first page, the comparison with
/// one factor at a time.
fn tail(svg: &mut Svg, flow: &mut Flow, part: Part, best_here: bool, more: &mut More) {
    let body = TextStyle::new(sizes::BODY);
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
    flow.heading(svg, "Best settings found");
    match &part.section.best {
        Some(b) if best_here => {
            flow.fact(svg, "Goal", &b.goal, LABEL_W, usize::MAX);
            for (i, line) in best_lines(b).iter().enumerate() {
                let label = if i == 0 { "Settings" } else { "" };
                flow.fact(svg, label, line, LABEL_W, usize::MAX);
            }
            flow.fact(svg, "Predicted", &predicted(b), LABEL_W, usize::MAX);
            flow.paragraph(
                svg,
                "A prediction, not a result: confirm it with runs at these settings.",
                small,
                2,
            );
        }
        Some(b) => {
            let mut items = vec![Item::Text(format!("Goal: {}", b.goal))];
            items.extend(best_lines(b).into_iter().map(Item::Text));
            items.push(Item::Text(format!("Predicted: {}", predicted(b))));
            items.push(Item::Small(
                "A prediction, not a result: confirm it with runs at these settings.".into(),
            ));
            let place = more.add(&part.heading("best settings"), items);
            flow.paragraph(
                svg,
                &format!("The best settings ({}) are listed under {place}.", b.goal),
                body,
                4,
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
    if !part.first() {
        return;
    }
    if let Some(d) = &part.input.decision {
        let place = more.add("Settings for every goal", decision_items(d));
        flow.paragraph(
            svg,
            &format!(
                "Every goal, every response's prediction and interval at the chosen settings{}: under {place}.",
                if d.noise.is_empty() { "" } else { ", and the spread the noise factors pass on" }
            ),
            body,
            3,
        );
    }
    flow.heading(svg, "Compared with one factor at a time");
    match &part.input.ofat {
        Some(o) => {
            let text = format!(
                "This design: {} runs. Changing one factor at a time would need about {} runs for the same precision of the main effects, and could not estimate any interaction.",
                o.design_runs, o.ofat_runs
            );
            flow.paragraph(svg, &text, body, 4);
            if !o.explanation.is_empty() {
                flow.paragraph(svg, &o.explanation, small, 4);
            }
        }
        None => {
            flow.paragraph(svg, "Not available for this design.", body.fill(MUTED), 1);
        }
    }
}

/// The block of the decision on the pages of more detail.
fn decision_items(d: &crate::export::input::DecisionFacts) -> Vec<Item> {
    let mut items = vec![Item::Text("Goals:".into())];
    items.push(Item::Bullets(
        d.goals
            .iter()
            .map(|(name, goal)| format!("{name}: {goal}"))
            .collect(),
    ));
    if !d.noise.is_empty() {
        items.push(Item::Text(format!(
            "Noise factors (not controlled in use, held at their centre for the means): {}.",
            d.noise.join(", ")
        )));
    }
    if d.settings.is_empty() {
        items.extend(d.binding.iter().cloned().map(Item::Text));
        return items;
    }
    items.push(Item::Text(format!(
        "Chosen settings (overall desirability {}):",
        numbers::fmt_sig(d.overall, 3)
    )));
    items.push(Item::Bullets(
        d.settings
            .iter()
            .map(|(f, v)| format!("{f} = {v}"))
            .collect(),
    ));
    items.push(Item::Text("Every response there:".into()));
    items.push(Item::Bullets(
        d.responses
            .iter()
            .map(|r| {
                let b = crate::export::input::BestSettings {
                    predicted: r.predicted,
                    interval: r
                        .interval
                        .map(|(a, b)| (a, b, "95 % prediction interval".to_string())),
                    ..Default::default()
                };
                let mut s = format!("{}: {} {}", r.name, predicted(&b), r.unit);
                if let Some(x) = r.desirability {
                    s.push_str(&format!("; desirability {}", numbers::fmt_sig(x, 2)));
                }
                if let Some(sd) = r.transmitted_sd {
                    s.push_str(&format!(
                        "; spread from the noise factors {} {}",
                        numbers::fmt_sig(sd, 3),
                        r.unit
                    ));
                }
                s
            })
            .collect(),
    ));
    items.push(Item::Bullets(d.binding.clone()));
    items.push(Item::Small(
        "A suggestion from the fitted models, not an approved setting: stay inside safe operating limits, confirm with runs before changing production, and follow local codes and licensed practice.".into(),
    ));
    items
}

/// One line per factor: `Cure temperature = 200 °C`.
fn best_lines(b: &crate::export::input::BestSettings) -> Vec<String> {
    b.settings
        .iter()
        .map(|(f, v)| format!("{f} = {v}"))
        .collect()
}

/// The prediction and its interval, on one number of decimals so they read as one scale.
fn predicted(b: &crate::export::input::BestSettings) -> String {
    match b.predicted {
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
    }
}
