//! The pages of more detail at the end of a summary: everything a response's page had no room
//! for, in full (the alias chains, every effect, the whole equation, every warning, all
//! interaction plots, a long factor table).
//!
//! Blocks flow down the page under their headings and continue on the next page where they do
//! not fit; a heading never stands alone at the foot of a page, a table repeats its header, an
//! alias chain is never split between pages. Every page keeps the cautions and the footer.

use std::collections::VecDeque;

use crate::export::charts::{self, Ticks};
use crate::export::input::{InteractionPanel, SummaryInput};
use crate::export::page::{Cell, Column, Flow, Paper, sizes, wrap};
use crate::export::svg::{ACCENT, INK, MUTED, Svg, TextStyle};

use super::{Drawn, More};

/// A block of detail under its own heading.
#[derive(Debug, Clone)]
pub struct Block {
    /// Heading, e.g. `Alias chains` or `Gloss: every effect`; the response pages name it.
    pub heading: String,
    /// What the block holds, in order.
    pub items: Vec<Item>,
}

/// One part of a block.
#[derive(Debug, Clone)]
pub enum Item {
    /// A paragraph in the body size.
    Text(String),
    /// A note in the small size.
    Small(String),
    /// Bulleted paragraphs.
    Bullets(Vec<String>),
    /// Alias chains, one to a line, two columns across the page.
    Chains(Vec<String>),
    /// A table (repeated header when it runs on to the next page).
    Table(Vec<Column>, Vec<Vec<Cell>>),
    /// Interaction plots on one response axis, two to a row.
    Panels {
        /// The plots, strongest first.
        panels: Vec<InteractionPanel>,
        /// The response axis title.
        y_label: String,
    },
}

/// A piece of a block as laid out across the page, consumed as it is drawn.
enum Piece {
    Heading(String),
    Lines {
        lines: Vec<String>,
        style: TextStyle,
        bullet: bool,
    },
    Pairs {
        rows: Vec<[Vec<String>; 2]>,
        style: TextStyle,
    },
    Table(Vec<Column>, Vec<Vec<Cell>>),
    Panels {
        panels: Vec<InteractionPanel>,
        y_label: String,
        ticks: Ticks,
    },
}

/// Gap between the two columns of chains and of interaction plots.
const GAP: f64 = 70.0;

/// Lays the blocks out on pages numbered from `first_page`; returns the pages and the page each
/// block's heading landed on.
pub(super) fn detail_pages(
    input: &SummaryInput,
    blocks: &[Block],
    paper: Paper,
    first_page: usize,
) -> (Vec<Drawn>, Vec<(String, usize)>) {
    let (w, _) = paper.size();
    let content_w = w - 2.0 * paper.margin();
    let mut queue = pieces(blocks, content_w);
    let mut pages: Vec<Drawn> = Vec::new();
    let mut placed = Vec::new();
    let mut current: Option<(Svg, Flow, f64, (f64, f64))> = None;
    while let Some(piece) = queue.pop_front() {
        let (svg, flow, top, _) = current.get_or_insert_with(|| new_page(input, paper));
        let fresh = (flow.y - *top).abs() < 0.5;
        let line_h = sizes::BODY * sizes::LEADING;
        let rest = match piece {
            Piece::Heading(h) => {
                // A heading keeps at least three lines of its block with it.
                if !fresh && flow.remaining() < sizes::HEADING * 1.55 + 3.0 * line_h {
                    Some(Piece::Heading(h))
                } else {
                    if !fresh {
                        flow.space(sizes::BODY * 0.6);
                    }
                    flow.heading(svg, &h);
                    placed.push((h, first_page + pages.len()));
                    None
                }
            }
            Piece::Lines {
                lines,
                style,
                bullet,
            } => draw_lines(svg, flow, lines, style, bullet),
            Piece::Pairs { rows, style } => draw_pairs(svg, flow, rows, style),
            Piece::Table(columns, rows) => {
                let shown = flow.table(svg, &columns, &rows, rows.len(), &|n| {
                    format!("{n} more rows on the next page")
                });
                (shown < rows.len()).then(|| Piece::Table(columns, rows[shown..].to_vec()))
            }
            Piece::Panels {
                panels,
                y_label,
                ticks,
            } => draw_panel_rows(svg, flow, panels, y_label, ticks),
        };
        if let Some(rest) = rest {
            let drew_nothing = fresh && (flow.y - *top).abs() < 0.5;
            if drew_nothing {
                // Not even an empty page holds it (cannot happen with the sizes in use); leave
                // it out rather than loop.
                continue;
            }
            queue.push_front(rest);
            if let Some((svg, _, _, number_at)) = current.take() {
                pages.push(Drawn { svg, number_at });
            }
        }
    }
    if let Some((svg, _, _, number_at)) = current.take() {
        pages.push(Drawn { svg, number_at });
    }
    (pages, placed)
}

/// The pieces of every block, wrapped to the page width.
fn pieces(blocks: &[Block], content_w: f64) -> VecDeque<Piece> {
    let body = TextStyle::new(sizes::BODY);
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
    let indent = body.size * 1.1;
    let col_w = (content_w - GAP) / 2.0;
    let mut queue = VecDeque::new();
    for block in blocks {
        queue.push_back(Piece::Heading(block.heading.clone()));
        for item in &block.items {
            match item {
                Item::Text(t) => queue.push_back(Piece::Lines {
                    lines: wrap(t, body, content_w),
                    style: body,
                    bullet: false,
                }),
                Item::Small(t) => queue.push_back(Piece::Lines {
                    lines: wrap(t, small, content_w),
                    style: small,
                    bullet: false,
                }),
                Item::Bullets(list) => {
                    for t in list {
                        queue.push_back(Piece::Lines {
                            lines: wrap(t, body, content_w - indent),
                            style: body,
                            bullet: true,
                        });
                    }
                }
                Item::Chains(chains) => {
                    let rows = chains
                        .chunks(2)
                        .map(|pair| {
                            let cell = |i: usize| {
                                pair.get(i)
                                    .map(|c| wrap(c, body, col_w))
                                    .unwrap_or_default()
                            };
                            [cell(0), cell(1)]
                        })
                        .collect();
                    queue.push_back(Piece::Pairs { rows, style: body });
                }
                Item::Table(columns, rows) => {
                    queue.push_back(Piece::Table(columns.clone(), rows.clone()));
                }
                Item::Panels { panels, y_label } => queue.push_back(Piece::Panels {
                    ticks: charts::shared_interaction_ticks(panels),
                    panels: panels.clone(),
                    y_label: y_label.clone(),
                }),
            }
        }
    }
    queue
}

/// A page of more detail with its header and foot drawn; returns the page, the flow between
/// them, the flow's top and where the page number goes.
fn new_page(input: &SummaryInput, paper: Paper) -> (Svg, Flow, f64, (f64, f64)) {
    let (w, h) = paper.size();
    let m = paper.margin();
    let content_w = w - 2.0 * m;
    let mut svg = Svg::new(w, h, paper.physical());
    let mut scratch_more = More::default();
    let y = super::title_lines(&mut svg, input, m, m, content_w, &mut scratch_more);
    let mut head = Flow::new(m, content_w, y, f64::INFINITY);
    head.paragraph(
        &mut svg,
        "More detail: what the pages before had no room for, in full",
        TextStyle::new(sizes::BODY).bold().fill(ACCENT),
        2,
    );
    head.space(sizes::BODY * 0.3);
    svg.line((m, head.y), (m + content_w, head.y), INK, 3.0, None);
    let top = head.y + sizes::BODY * 0.4;
    // The foot: measured, then drawn at the bottom of the page.
    let foot_h = {
        let mut scratch = Svg::new(w, h, paper.physical());
        let mut probe = Flow::new(m, content_w, 0.0, f64::INFINITY);
        foot(&mut scratch, &mut probe, input);
        probe.y
    };
    let mut bottom = Flow::new(m, content_w, h - m - foot_h, h - m);
    let number_y = foot(&mut svg, &mut bottom, input);
    let flow = Flow::new(m, content_w, top, h - m - foot_h - 30.0);
    (svg, flow, top, (m + content_w, number_y))
}

fn foot(svg: &mut Svg, flow: &mut Flow, input: &SummaryInput) -> f64 {
    svg.line((flow.x, flow.y), (flow.x + flow.w, flow.y), INK, 3.0, None);
    flow.space(6.0);
    super::cautions_and_footer(svg, flow, input)
}

/// Draws as many of `lines` as fit; returns the rest.
fn draw_lines(
    svg: &mut Svg,
    flow: &mut Flow,
    lines: Vec<String>,
    style: TextStyle,
    bullet: bool,
) -> Option<Piece> {
    let advance = style.size * sizes::LEADING;
    let indent = if bullet { style.size * 1.1 } else { 0.0 };
    let fit = ((flow.remaining() + style.size * (sizes::LEADING - 1.0)) / advance)
        .floor()
        .max(0.0) as usize;
    let shown = fit.min(lines.len());
    for (i, line) in lines.iter().take(shown).enumerate() {
        if bullet && i == 0 {
            svg.text(
                flow.x + style.size * 0.2,
                flow.y + style.size,
                "•",
                TextStyle::new(style.size).bold().fill(INK),
            );
        }
        svg.text(flow.x + indent, flow.y + style.size, line, style);
        flow.y += advance;
    }
    (shown < lines.len()).then(|| Piece::Lines {
        lines: lines[shown..].to_vec(),
        style,
        // The bullet marks the first line only; a continued paragraph keeps its indent.
        bullet: bullet && shown == 0,
    })
}

/// Draws rows of two chains while they fit (a chain is never split between pages); returns the
/// rest.
fn draw_pairs(
    svg: &mut Svg,
    flow: &mut Flow,
    rows: Vec<[Vec<String>; 2]>,
    style: TextStyle,
) -> Option<Piece> {
    let advance = style.size * sizes::LEADING;
    let col_w = (flow.w - GAP) / 2.0;
    let mut shown = 0;
    for row in &rows {
        let lines = row[0].len().max(row[1].len()).max(1);
        if lines as f64 * advance > flow.remaining() + 0.01 {
            break;
        }
        for (c, cell) in row.iter().enumerate() {
            let x = flow.x + c as f64 * (col_w + GAP);
            for (j, line) in cell.iter().enumerate() {
                let indent = if j == 0 { 0.0 } else { style.size };
                svg.text(
                    x + indent,
                    flow.y + style.size + j as f64 * advance,
                    line,
                    style,
                );
            }
        }
        flow.y += lines as f64 * advance;
        shown += 1;
    }
    (shown < rows.len()).then(|| Piece::Pairs {
        rows: rows[shown..].to_vec(),
        style,
    })
}

/// Draws rows of two interaction plots while they fit; returns the rest.
fn draw_panel_rows(
    svg: &mut Svg,
    flow: &mut Flow,
    panels: Vec<InteractionPanel>,
    y_label: String,
    ticks: Ticks,
) -> Option<Piece> {
    let panel_w = (flow.w - GAP) / 2.0;
    let panel_h = (panel_w * 0.8).min(1000.0);
    let mut shown = 0;
    while shown < panels.len() && panel_h <= flow.remaining() {
        let row = &panels[shown..(shown + 2).min(panels.len())];
        super::right::draw_panels(svg, flow, row, &ticks, &y_label, panel_w, panel_h, GAP);
        flow.space(panel_h + GAP * 0.6);
        shown += row.len();
    }
    (shown < panels.len()).then(|| Piece::Panels {
        panels: panels[shown..].to_vec(),
        y_label,
        ticks,
    })
}
