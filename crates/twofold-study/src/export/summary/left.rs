//! The left column of the summary: factors, design, effect ranking and the ANOVA table.

use crate::export::input::{DesignFacts, EffectRow, LenthFacts, SummaryInput};
use crate::export::page::{Align, Cell, Column, Flow, Rect, row_height, sizes, wrap};
use crate::export::svg::{ACCENT, ALERT, Anchor, INK, MUTED, QUIET, RULE, Svg, TextStyle};
use crate::numbers;

use super::{Item, LABEL_W, More, Part, SIGN_LEGEND, fraction_symbol, roman};

pub(super) fn left_column(svg: &mut Svg, part: Part, mut flow: Flow, more: &mut More) {
    factors(svg, &mut flow, part, more);
    if part.first() {
        design(svg, &mut flow, part.input, more);
    } else {
        flow.paragraph(
            svg,
            "The design and its alias chains are on page 1.",
            TextStyle::new(sizes::SMALL).fill(MUTED),
            2,
        );
    }
    // ANOVA gets the room it needs (up to half of what is left); the effects take the rest.
    let anova_h = {
        let mut scratch = Svg::new(10.0, 10.0, ("1in", "1in"));
        let mut probe = Flow::new(flow.x, flow.w, 0.0, f64::INFINITY);
        anova(&mut scratch, &mut probe, part, &mut more.scratch());
        probe.y
    };
    // The effect ranking keeps room for its ten largest effects and its notes first.
    let shown = part.section.effects.len().min(10) as f64;
    let effects_min = sizes::HEADING * 1.55
        + row_height() * (shown + 1.0)
        + sizes::SMALL * sizes::LEADING * 6.0
        + sizes::BODY * 0.6;
    let anova_h = anova_h.min((flow.remaining() - effects_min).max(0.0));
    let split = flow.bottom - anova_h;
    let mut effects_flow = Flow::new(flow.x, flow.w, flow.y, split);
    effects(svg, &mut effects_flow, part, more);
    let mut anova_flow = Flow::new(flow.x, flow.w, effects_flow.y.max(flow.y), flow.bottom);
    anova(svg, &mut anova_flow, part, more);
}

fn factors(svg: &mut Svg, flow: &mut Flow, part: Part, more: &mut More) {
    let input = part.input;
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
    // At most half of the column; the rest of a long factor list is on the detail pages.
    let mut half = Flow::new(flow.x, flow.w, flow.y, flow.y + flow.remaining() * 0.5);
    let shown = half.table(svg, &columns, &rows, rows.len(), &|n| {
        let place = more.scratch().add(FACTORS, Vec::new());
        format!("{n} more factors: the full table is under {place}.")
    });
    if shown < rows.len() {
        more.add(FACTORS, vec![Item::Table(columns.to_vec(), rows)]);
    }
    flow.y = half.y;
}

/// Heading of the factor table on the pages of more detail.
const FACTORS: &str = "Factors";

fn design(svg: &mut Svg, flow: &mut Flow, input: &SummaryInput, more: &mut More) {
    let d = &input.design;
    flow.heading(svg, "Design");
    let mut kind = if let Some(n) = d.screening_runs {
        format!("{n}-run Plackett–Burman screening design")
    } else if d.generators_count == 0 {
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
    flow.fact(svg, "Design", &kind, LABEL_W, 3);
    let runs = match &d.runs_in_words {
        // The engine's count of every block, as the design step states it.
        Some(words) => words.clone(),
        None => {
            let mut runs = format!("{} runs per replicate", d.base_runs);
            if d.replicates > 1 {
                runs.push_str(&format!(" × {} replicates", d.replicates));
            }
            if d.centre_points > 0 {
                runs.push_str(&format!(" + {} centre points", d.centre_points));
            }
            runs.push_str(&format!(" = {} runs", d.total_runs));
            runs
        }
    };
    flow.fact(svg, "Runs", &runs, LABEL_W, 3);
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
    flow.fact(svg, "Blocks", &blocks, LABEL_W, 4);
    let generators = if d.screening_runs.is_some() {
        "none (the runs come from Plackett & Burman's construction)".to_string()
    } else if d.generators.is_empty() {
        "none (every combination is run)".to_string()
    } else {
        d.generators.join(", ")
    };
    flow.fact(svg, "Generators", &generators, LABEL_W, 6);
    let order = match d.seed {
        Some(seed) => format!("randomised, seed {seed}"),
        None => "standard order".to_string(),
    };
    flow.fact(svg, "Run order", &order, LABEL_W, 2);
    if let Some(t) = &d.detectable {
        flow.fact(svg, "Power", t, LABEL_W, 4);
    }
    if let Some(t) = &d.follow_up {
        flow.fact(svg, "Follow-up", t, LABEL_W, 8);
    }
    if d.irregular {
        flow.fact(
            svg,
            "Aliases",
            "with block 2 the runs are not a regular fraction, so no alias chains apply: what they estimate is under Follow-up",
            LABEL_W,
            3,
        );
        return;
    }
    alias_chains(svg, flow, d, more);
}

/// The alias chains of the main effects and two-factor interactions: here, one chain to a line,
/// when they take no more than [`INLINE_CHAIN_LINES`] lines; otherwise on the detail pages, all
/// of them, and a line here that says where.
fn alias_chains(svg: &mut Svg, flow: &mut Flow, d: &DesignFacts, more: &mut More) {
    let body = TextStyle::new(sizes::BODY);
    let chains: Vec<&String> = d
        .main_effect_chains
        .iter()
        .chain(&d.interaction_chains)
        .collect();
    if d.screening_runs.is_some() {
        flow.fact(
            svg,
            "Aliases",
            "partial: the main effects are orthogonal to each other, and each is partially aliased with the two-factor interactions that do not contain it",
            LABEL_W,
            4,
        );
        return;
    }
    if chains.is_empty() {
        let text = if d.generators_count == 0 {
            "none: main effects and interactions are all estimated clear"
        } else {
            "none: no main effect or two-factor interaction shares its estimate with a term of up to three letters"
        };
        flow.fact(svg, "Aliases", text, LABEL_W, 3);
        return;
    }
    let width = flow.w - LABEL_W;
    let lines: usize = chains.iter().map(|c| wrap(c, body, width).len()).sum();
    let note = tangled_note(d);
    let need = lines as f64 * body.size * sizes::LEADING + sizes::SMALL * sizes::LEADING * 3.0;
    if lines <= INLINE_CHAIN_LINES && need < flow.remaining() * 0.4 {
        let mut first = true;
        for c in chains {
            let label = if first { "Aliases" } else { "" };
            first = false;
            flow.fact(svg, label, c, LABEL_W, usize::MAX);
        }
        if !note.is_empty() {
            flow.paragraph_at(
                svg,
                &note,
                TextStyle::new(sizes::SMALL).fill(MUTED),
                3,
                LABEL_W,
            );
        }
        return;
    }
    let mut items = Vec::new();
    if !d.main_effect_chains.is_empty() {
        items.push(Item::Small(
            "Main effects, each with its aliases of up to three letters:".into(),
        ));
        items.push(Item::Chains(d.main_effect_chains.clone()));
    }
    if !d.interaction_chains.is_empty() {
        items.push(Item::Small(
            "Two-factor interactions, each chain once:".into(),
        ));
        items.push(Item::Chains(d.interaction_chains.clone()));
    }
    if !note.is_empty() {
        items.push(Item::Small(note));
    }
    let place = more.add(ALIAS_CHAINS, items);
    let text = format!(
        "{} chains of main effects and {} of two-factor interactions, each in full under {place}.",
        d.main_effect_chains.len(),
        d.interaction_chains.len()
    );
    flow.fact(svg, "Aliases", &text, LABEL_W, 4);
}

/// Heading of the alias chains on the pages of more detail.
pub(crate) const ALIAS_CHAINS: &str = "Alias chains";

/// Alias chains listed on the design's own page when they take at most this many lines.
const INLINE_CHAIN_LINES: usize = 6;

/// The sentence on chains that hold several two-factor interactions; empty when there are none.
fn tangled_note(d: &DesignFacts) -> String {
    match d.tangled_chains {
        0 => String::new(),
        1 => "One chain holds two or more two-factor interactions: runs of a fold-over are needed to tell them apart.".to_string(),
        n => format!("{n} chains hold two or more two-factor interactions: runs of a fold-over are needed to tell them apart."),
    }
}

fn effects(svg: &mut Svg, flow: &mut Flow, part: Part, more: &mut More) {
    let section = part.section;
    flow.heading(svg, "Effect ranking");
    let body = TextStyle::new(sizes::BODY);
    if section.effects.is_empty() {
        flow.paragraph(
            svg,
            "No effects yet: enter responses for the runs.",
            body.fill(MUTED),
            2,
        );
        return;
    }
    let lenth = section.lenth.as_ref();
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
    let lenth_text = match lenth {
        Some(l) => format!(
            "Lenth's method: PSE = {}, ME = {}, SME = {} (α = {}, t with {} df). Bars beyond the dashed ME line are likely active; beyond SME, active even allowing for testing many effects.",
            numbers::fmt_sig(l.pse, 4),
            numbers::fmt_sig(l.me, 4),
            numbers::fmt_sig(l.sme, 4),
            numbers::level(l.alpha),
            numbers::fmt_num(l.df, 3)
        ),
        None => "Lenth's limits are not available for these effects (too few, or all equal)."
            .to_string(),
    };
    let decimals = effect_decimals(section);
    let width = flow.w;
    let lines = |text: &str| wrap(text, small, width).len();
    let notes = lines(&lenth_text) + lines(SIGN_LEGEND);
    let notes_h =
        |extra: usize| (notes + extra) as f64 * sizes::SMALL * sizes::LEADING + sizes::BODY * 0.3;
    // As many rows as fit above the notes (a label may take two lines); the smaller effects
    // follow as a line of text when that takes at most three lines, else they are listed on the
    // pages of more detail.
    let rest_text = |shown: usize| smaller_effects(&section.effects[shown..], decimals);
    let rest_lines = |shown: usize| {
        if shown == section.effects.len() {
            0
        } else {
            lines(&rest_text(shown)).clamp(2, REST_LINES + 1)
        }
    };
    let layout = EffectLayout::new(flow.w, &section.effects);
    let mut shown = section.effects.len();
    while shown > 0
        && layout.height(&section.effects[..shown]) + notes_h(rest_lines(shown)) > flow.remaining()
    {
        shown -= 1;
    }
    let table_h = layout.height(&section.effects[..shown]);
    if let Some(area) = flow.take(table_h) {
        effect_table(svg, area, &layout, &section.effects[..shown], lenth);
    }
    flow.space(sizes::BODY * 0.3);
    flow.paragraph(svg, SIGN_LEGEND, small, 2);
    if shown < section.effects.len() {
        let text = rest_text(shown);
        if lines(&text) <= REST_LINES {
            flow.paragraph(svg, &text, small, REST_LINES);
        } else {
            let n = section.effects.len() - shown;
            let place = more.add(&part.heading("every effect"), vec![every_effect(section)]);
            flow.paragraph(
                svg,
                &format!(
                    "{n} smaller effects are not in this table; every effect is listed under {place}."
                ),
                small,
                3,
            );
        }
    }
    flow.paragraph(svg, &lenth_text, small, 4);
}

/// Lines of text the smaller effects may take under the effect table.
const REST_LINES: usize = 3;

/// The effects left out of the table as one sentence, each label with its signed value kept
/// together on a line: `Smaller effects: AD +2.50, ABC −2.50.`
fn smaller_effects(rows: &[EffectRow], decimals: usize) -> String {
    let items: Vec<String> = rows
        .iter()
        .map(|r| {
            let value = numbers::fixed(r.effect, decimals);
            let signed = if r.effect >= 0.0 {
                format!("+{value}")
            } else {
                value
            };
            format!("{}\u{a0}{signed}", r.label())
        })
        .collect();
    format!("Smaller effects: {}.", items.join(", "))
}

/// Decimals of the effect column: one rule for the page's table and the table of every effect.
fn effect_decimals(section: &crate::export::input::ResponseSummary) -> usize {
    let biggest = section
        .effects
        .iter()
        .map(|r| r.effect.abs())
        .filter(|v| v.is_finite())
        .fold(0.0, f64::max);
    numbers::column_decimals(biggest, 4)
}

/// All effects of a response as a table for the pages of more detail.
fn every_effect(section: &crate::export::input::ResponseSummary) -> Item {
    let decimals = effect_decimals(section);
    let rows = section
        .effects
        .iter()
        .map(|r| {
            let label = Cell {
                text: r.label_with_sign(),
                bold: r.in_model,
                fill: if r.in_model { ACCENT } else { INK },
            };
            vec![
                label,
                Cell::plain(numbers::fixed(r.effect, decimals)),
                Cell::plain(if r.in_model { "yes" } else { "no" }),
            ]
        })
        .collect();
    Item::Table(
        vec![
            Column::new("Term and its short aliases, sign", 2.0, Align::Left),
            Column::new("Effect", 1.0, Align::Right),
            Column::new("In the model", 1.0, Align::Right),
        ],
        rows,
    )
}

/// Column widths of the effect table and the lines of each label.
struct EffectLayout {
    term_w: f64,
    pad: f64,
}

impl EffectLayout {
    /// The term column takes the widest label it needs, between a fifth and half of the table.
    fn new(width: f64, rows: &[EffectRow]) -> EffectLayout {
        let pad = sizes::BODY * 0.35;
        let style = TextStyle::new(sizes::BODY).bold();
        let widest = rows
            .iter()
            .map(|r| style.width(&r.label_with_sign()))
            .fold(0.0, f64::max);
        EffectLayout {
            term_w: (widest + 2.0 * pad).clamp(width * 0.2, width * 0.5),
            pad,
        }
    }

    /// The label of `row` in lines that fit the term column (breaking only between terms).
    fn lines(&self, row: &EffectRow) -> Vec<String> {
        let style = TextStyle::new(sizes::BODY).bold();
        wrap(&row.label_with_sign(), style, self.term_w - 2.0 * self.pad)
    }

    fn row_h(&self, row: &EffectRow) -> f64 {
        row_height() + (self.lines(row).len().max(1) - 1) as f64 * sizes::BODY * sizes::LEADING
    }

    /// Height of the table with `rows` under its header.
    fn height(&self, rows: &[EffectRow]) -> f64 {
        row_height() + rows.iter().map(|r| self.row_h(r)).sum::<f64>()
    }
}

/// Term with its sign, signed effect, a bar of |effect| ending in the sign's marker, with the
/// Lenth limits, and which limit it passes. Colour says only whether the term is in the model.
fn effect_table(
    svg: &mut Svg,
    area: Rect,
    layout: &EffectLayout,
    rows: &[EffectRow],
    lenth: Option<&LenthFacts>,
) {
    let rh = row_height();
    let size = sizes::BODY;
    let pad = layout.pad;
    let term_w = layout.term_w;
    let effect_w = area.w * 0.17;
    let mark_w = area.w * 0.13;
    let marker = 13.0;
    let bar_x0 = area.x + term_w + effect_w + pad * 2.0;
    let bar_x1 = area.x + area.w - mark_w - pad - 2.0 * marker - 6.0;
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
    let mut top = body_top;
    for (i, row) in rows.iter().enumerate() {
        let h = layout.row_h(row);
        if i % 2 == 1 {
            svg.rect(area.x, top, area.w, h, Some("#f7f7f7"), None);
        }
        let style = if row.in_model {
            TextStyle::new(size).bold().fill(ACCENT)
        } else {
            TextStyle::new(size)
        };
        for (j, line) in layout.lines(row).iter().enumerate() {
            let y = baseline(top) + j as f64 * size * sizes::LEADING;
            svg.text(area.x + pad, y, line, style);
        }
        svg.text(
            area.x + term_w + effect_w - pad,
            baseline(top),
            &numbers::fixed(row.effect, decimals),
            TextStyle::new(size).anchor(Anchor::End),
        );
        if row.effect.is_finite() {
            let x1 = scale(row.effect.abs());
            let (y, bar_h) = (top + rh * 0.22, rh * 0.56);
            if row.in_model {
                svg.rect(bar_x0, y, x1 - bar_x0, bar_h, Some(ACCENT), None);
            } else {
                svg.rect(bar_x0, y, x1 - bar_x0, bar_h, None, Some((QUIET, 2.5)));
            }
            // The sign's marker sits just beyond the bar's outer end.
            let centre = (x1 + marker + 4.0, top + rh * 0.5);
            effect_marker(svg, centre, marker, row.effect >= 0.0, row.in_model);
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
        top += h;
    }
    let body_bottom = top;
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

/// The marker of an effect: ▲ when it raises the response, ▼ when it lowers it; filled in the
/// accent colour when the term is in the model, hollow grey when not.
pub(crate) fn effect_marker(
    svg: &mut Svg,
    centre: (f64, f64),
    half: f64,
    up: bool,
    in_model: bool,
) {
    if in_model {
        svg.triangle(centre, half, up, Some(ACCENT), Some((ACCENT, 2.0)));
    } else {
        svg.triangle(centre, half, up, Some("#ffffff"), Some((QUIET, 3.0)));
    }
}

fn anova(svg: &mut Svg, flow: &mut Flow, part: Part, more: &mut More) {
    flow.heading(svg, "ANOVA of the chosen model");
    let Some(table) = &part.section.anova else {
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
    let heading = part.heading("ANOVA");
    let place = more.scratch().add(&heading, Vec::new());
    let shown = flow.table(svg, &columns, &rows, rows.len(), &|n| {
        format!("{n} more rows: the whole table is under {place}.")
    });
    if shown < rows.len() {
        more.add(&heading, vec![Item::Table(columns.to_vec(), rows.clone())]);
        if shown == 0 {
            flow.paragraph(
                svg,
                &format!("No room for the ANOVA table on this page: it is under {place}."),
                TextStyle::new(sizes::BODY).fill(MUTED),
                3,
            );
        }
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
            4,
        );
    }
}
