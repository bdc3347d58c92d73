//! The left column of the summary: factors, design, effect ranking and the ANOVA table.

use crate::export::input::{EffectRow, LenthFacts, SummaryInput};
use crate::export::page::{Align, Cell, Column, Flow, Rect, row_height, sizes};
use crate::export::svg::{ACCENT, ALERT, Anchor, INK, MUTED, QUIET, RULE, Svg, TextStyle};
use crate::numbers;

use super::{LABEL_W, fraction_symbol, roman};

pub(super) fn left_column(svg: &mut Svg, input: &SummaryInput, mut flow: Flow) {
    factors(svg, &mut flow, input);
    design(svg, &mut flow, input);
    // ANOVA gets the room it needs (up to half of what is left); the effects take the rest.
    let anova_h = {
        let mut scratch = Svg::new(10.0, 10.0, ("1in", "1in"));
        let mut probe = Flow::new(flow.x, flow.w, 0.0, f64::INFINITY);
        anova(&mut scratch, &mut probe, input);
        probe.y
    };
    // The effect ranking keeps room for its ten largest effects and its notes first.
    let shown = input.effects.len().min(10) as f64;
    let effects_min = sizes::HEADING * 1.55
        + row_height() * (shown + 1.0)
        + sizes::SMALL * sizes::LEADING * 5.0
        + sizes::BODY * 0.6;
    let anova_h = anova_h.min((flow.remaining() - effects_min).max(0.0));
    let split = flow.bottom - anova_h;
    let mut effects_flow = Flow::new(flow.x, flow.w, flow.y, split);
    effects(svg, &mut effects_flow, input);
    let mut anova_flow = Flow::new(flow.x, flow.w, effects_flow.y.max(flow.y), flow.bottom);
    anova(svg, &mut anova_flow, input);
}

fn factors(svg: &mut Svg, flow: &mut Flow, input: &SummaryInput) {
    flow.heading(svg, "Factors");
    if input.factors.is_empty() {
        flow.paragraph(
            svg,
            "No factors defined.",
            TextStyle::new(sizes::BODY).fill(MUTED),
            1,
        );
        return;
    }
    let columns = [
        Column::new("", 0.25, Align::Left),
        Column::new("Name", 2.2, Align::Left),
        Column::new("Unit", 0.45, Align::Left),
        Column::new("Low (−1)", 0.75, Align::Right),
        Column::new("High (+1)", 0.75, Align::Right),
    ];
    let rows: Vec<Vec<Cell>> = input
        .factors
        .iter()
        .map(|f| {
            vec![
                Cell::strong(f.letter.to_string(), ACCENT),
                Cell::plain(f.name.clone()),
                Cell::coloured(f.unit.clone(), MUTED),
                Cell::plain(f.low.text()),
                Cell::plain(f.high.text()),
            ]
        })
        .collect();
    flow.table(svg, &columns, &rows, 10);
}

fn design(svg: &mut Svg, flow: &mut Flow, input: &SummaryInput) {
    let d = &input.design;
    flow.heading(svg, "Design");
    let mut kind = if d.generators_count == 0 {
        format!("{} full factorial", fraction_symbol(d.factors, 0))
    } else {
        format!(
            "{} fractional factorial",
            fraction_symbol(d.factors, d.generators_count)
        )
    };
    if let Some(r) = d.resolution {
        kind.push_str(&format!(", resolution {}", roman(r)));
    }
    flow.fact(svg, "Design", &kind, LABEL_W, 2);
    let mut runs = format!("{} runs per replicate", d.base_runs);
    if d.replicates > 1 {
        runs.push_str(&format!(" × {} replicates", d.replicates));
    }
    if d.centre_points > 0 {
        runs.push_str(&format!(" + {} centre points", d.centre_points));
    }
    runs.push_str(&format!(" = {} runs", d.total_runs));
    flow.fact(svg, "Runs", &runs, LABEL_W, 2);
    if d.centre_points == 0 {
        flow.fact(
            svg,
            "Curvature",
            "not checked: no centre points",
            LABEL_W,
            2,
        );
    }
    let mut blocks = if d.blocks <= 1 {
        "none (one block)".to_string()
    } else {
        format!("{} blocks", d.blocks)
    };
    if !d.block_generators.is_empty() {
        blocks.push_str(&format!(
            ", block generators {}",
            d.block_generators.join(", ")
        ));
    }
    flow.fact(svg, "Blocks", &blocks, LABEL_W, 2);
    let generators = if d.generators.is_empty() {
        "none (every combination is run)".to_string()
    } else {
        d.generators.join(", ")
    };
    flow.fact(svg, "Generators", &generators, LABEL_W, 2);
    let order = match d.seed {
        Some(seed) => format!("randomised, seed {seed}"),
        None => "standard order".to_string(),
    };
    flow.fact(svg, "Run order", &order, LABEL_W, 1);
    let aliases = if d.aliases.is_empty() {
        if d.generators_count == 0 {
            "none: main effects and interactions are all estimated clear".to_string()
        } else {
            "none among the terms shown".to_string()
        }
    } else {
        d.aliases.join(";  ")
    };
    let all = flow.fact(svg, "Aliases", &aliases, LABEL_W, 3);
    if !all {
        flow.paragraph_at(
            svg,
            "(the full alias list is in the app)",
            TextStyle::new(sizes::SMALL).fill(MUTED),
            1,
            LABEL_W,
        );
    }
}

fn effects(svg: &mut Svg, flow: &mut Flow, input: &SummaryInput) {
    flow.heading(svg, "Effect ranking");
    let body = TextStyle::new(sizes::BODY);
    if input.effects.is_empty() {
        flow.paragraph(
            svg,
            "No effects yet: enter responses for the runs.",
            body.fill(MUTED),
            2,
        );
        return;
    }
    let lenth = input.lenth.as_ref();
    let rh = row_height();
    let note_lines = 3.0;
    let note_h = sizes::SMALL * sizes::LEADING * note_lines + sizes::BODY * sizes::LEADING;
    let fit = ((flow.remaining() - note_h) / rh).floor() as isize - 1;
    let fit = fit.max(0) as usize;
    let shown = input.effects.len().min(fit);
    let table_h = rh * (shown as f64 + 1.0);
    let Some(area) = flow.take(table_h) else {
        return;
    };
    effect_table(svg, area, &input.effects[..shown], lenth);
    flow.space(sizes::BODY * 0.3);
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
    if shown < input.effects.len() {
        let n = input.effects.len() - shown;
        flow.paragraph(
            svg,
            &format!("{n} smaller effects not listed; all of them appear in the half-normal plot."),
            small,
            2,
        );
    }
    match lenth {
        Some(l) => {
            let text = format!(
                "Lenth's method: PSE = {}, ME = {}, SME = {} (α = {}, t with {} df). Bars beyond the dashed ME line are likely active; beyond SME, active even allowing for testing many effects. Bold blue terms are in the chosen model.",
                numbers::fmt_sig(l.pse, 4),
                numbers::fmt_sig(l.me, 4),
                numbers::fmt_sig(l.sme, 4),
                numbers::level(l.alpha),
                numbers::fmt_num(l.df, 3)
            );
            flow.paragraph(svg, &text, small, 3);
        }
        None => {
            flow.paragraph(svg, "Lenth's limits are not available for these effects (too few, or all equal). Bold blue terms are in the chosen model.", small, 2);
        }
    }
}

/// Term, signed effect, a bar of |effect| with the Lenth limits, and which limit it passes.
fn effect_table(svg: &mut Svg, area: Rect, rows: &[EffectRow], lenth: Option<&LenthFacts>) {
    let rh = row_height();
    let size = sizes::BODY;
    let pad = size * 0.35;
    let term_w = area.w * 0.25;
    let effect_w = area.w * 0.2;
    let mark_w = area.w * 0.14;
    let bar_x0 = area.x + term_w + effect_w + pad * 2.0;
    let bar_x1 = area.x + area.w - mark_w - pad;
    let baseline = |top: f64| top + rh * 0.5 + size * 0.36;
    svg.rect(
        area.x,
        area.y,
        area.w,
        rh,
        Some(crate::export::svg::SHADE),
        None,
    );
    let head = TextStyle::new(size).bold();
    svg.text(area.x + pad, baseline(area.y), "Term", head);
    svg.text(
        area.x + term_w + effect_w - pad,
        baseline(area.y),
        "Effect",
        head.anchor(Anchor::End),
    );
    svg.text(bar_x0, baseline(area.y), "|effect|", head);
    svg.text(
        area.x + area.w - pad,
        baseline(area.y),
        "Lenth",
        head.anchor(Anchor::End),
    );

    let mut max = rows
        .iter()
        .map(|r| r.effect.abs())
        .filter(|v| v.is_finite())
        .fold(0.0, f64::max);
    if let Some(l) = lenth {
        for v in [l.me, l.sme] {
            if v.is_finite() {
                max = max.max(v);
            }
        }
    }
    let biggest = rows
        .iter()
        .map(|r| r.effect.abs())
        .filter(|v| v.is_finite())
        .fold(0.0, f64::max);
    let decimals = numbers::column_decimals(biggest, 4);
    let scale = |v: f64| {
        if max > 0.0 {
            bar_x0 + (bar_x1 - bar_x0) * (v / max).clamp(0.0, 1.0)
        } else {
            bar_x0
        }
    };
    let body_top = area.y + rh;
    for (i, row) in rows.iter().enumerate() {
        let top = body_top + i as f64 * rh;
        if i % 2 == 1 {
            svg.rect(area.x, top, area.w, rh, Some("#f7f7f7"), None);
        }
        let style = if row.in_model {
            TextStyle::new(size).bold().fill(ACCENT)
        } else {
            TextStyle::new(size)
        };
        let term = crate::export::page::ellipsize(&row.term, style, term_w - 2.0 * pad);
        svg.text(area.x + pad, baseline(top), &term, style);
        svg.text(
            area.x + term_w + effect_w - pad,
            baseline(top),
            &numbers::fixed(row.effect, decimals),
            TextStyle::new(size).anchor(Anchor::End),
        );
        if row.effect.is_finite() {
            let colour = if row.in_model { ACCENT } else { QUIET };
            let x1 = scale(row.effect.abs());
            svg.rect(
                bar_x0,
                top + rh * 0.22,
                x1 - bar_x0,
                rh * 0.56,
                Some(colour),
                None,
            );
        }
        if let Some(l) = lenth {
            let a = row.effect.abs();
            let mark = if l.sme.is_finite() && a > l.sme {
                "> SME"
            } else if l.me.is_finite() && a > l.me {
                "> ME"
            } else {
                ""
            };
            svg.text(
                area.x + area.w - pad,
                baseline(top),
                mark,
                TextStyle::new(size).bold().fill(ALERT).anchor(Anchor::End),
            );
        }
    }
    let body_bottom = body_top + rows.len() as f64 * rh;
    svg.line((bar_x0, body_top), (bar_x0, body_bottom), INK, 2.0, None);
    if let Some(l) = lenth {
        for (v, dash) in [(l.me, 14.0), (l.sme, 6.0)] {
            if v.is_finite() && v > 0.0 && max > 0.0 {
                let x = scale(v);
                svg.line((x, body_top), (x, body_bottom), ALERT, 2.5, Some(dash));
            }
        }
    }
    svg.line(
        (area.x, body_bottom),
        (area.x + area.w, body_bottom),
        RULE,
        2.0,
        None,
    );
}

fn anova(svg: &mut Svg, flow: &mut Flow, input: &SummaryInput) {
    flow.heading(svg, "ANOVA of the chosen model");
    let Some(table) = &input.anova else {
        flow.paragraph(
            svg,
            "No model fitted yet: choose the model terms from the effect ranking.",
            TextStyle::new(sizes::BODY).fill(MUTED),
            2,
        );
        return;
    };
    let columns = [
        Column::new("Source", 1.55, Align::Left),
        Column::new("df", 0.45, Align::Right),
        Column::new("SS", 1.05, Align::Right),
        Column::new("MS", 1.05, Align::Right),
        Column::new("F", 0.8, Align::Right),
        Column::new("p", 0.95, Align::Right),
    ];
    let opt = |v: Option<f64>, f: fn(f64) -> String| v.map(f).unwrap_or_default();
    let rows: Vec<Vec<Cell>> = table
        .rows
        .iter()
        .map(|r| {
            let mut cells = vec![
                Cell::plain(r.source.clone()),
                Cell::plain(r.df.to_string()),
                Cell::plain(numbers::fmt_sig(r.ss, 4)),
                Cell::plain(opt(r.ms, |v| numbers::fmt_sig(v, 4))),
                Cell::plain(opt(r.f, |v| numbers::fmt_sig(v, 3))),
                Cell::plain(opt(r.p, numbers::p_value)),
            ];
            if r.emphasis {
                for c in &mut cells {
                    c.bold = true;
                }
            }
            if r.p.is_some_and(|p| p < 0.05) {
                cells[5].fill = ALERT;
                cells[5].bold = true;
            }
            cells
        })
        .collect();
    if flow.table(svg, &columns, &rows, 30) == 0 && !rows.is_empty() {
        flow.paragraph(
            svg,
            "The ANOVA table does not fit on this page; it is in the app.",
            TextStyle::new(sizes::BODY).fill(MUTED),
            2,
        );
    }
    let mut fit = Vec::new();
    if let Some(v) = table.r_squared {
        fit.push(format!("R² = {}", numbers::fraction_of_one(v)));
    }
    if let Some(v) = table.adj_r_squared {
        fit.push(format!("adjusted R² = {}", numbers::fraction_of_one(v)));
    }
    if let Some(v) = table.pred_r_squared {
        fit.push(format!("predicted R² = {}", numbers::fraction_of_one(v)));
    }
    if let Some(v) = table.std_dev {
        fit.push(format!("s = {}", numbers::fmt_sig(v, 4)));
    }
    if !fit.is_empty() {
        flow.paragraph(svg, &fit.join(",  "), TextStyle::new(sizes::BODY), 2);
    }
    if !table.tests_note.is_empty() {
        flow.paragraph(
            svg,
            &table.tests_note,
            TextStyle::new(sizes::SMALL).fill(MUTED),
            3,
        );
    }
}
