//! The printable blank run sheet: the runs in the order they are carried out, each factor's
//! setting in natural units, and empty boxes to write the responses in at the bench.
//!
//! Factor columns are headed by letter (a legend at the top gives names, units and levels) so a
//! sheet with many factors still fits the width; rows are tall enough to write in by hand. Long
//! designs continue on further pages with the header repeated.

use serde::{Deserialize, Serialize};

use super::page::{Flow, Paper, ellipsize, sizes};
use super::svg::{ACCENT, Anchor, INK, MUTED, RULE, SHADE, Svg, TextStyle};

/// One factor as the sheet names it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SheetFactor {
    /// Letter (A, B, ... without I).
    pub letter: char,
    /// Name.
    pub name: String,
    /// Unit; may be empty.
    pub unit: String,
    /// Low and high settings as printed.
    pub levels: [String; 2],
}

/// One response to be measured.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SheetResponse {
    /// Name.
    pub name: String,
    /// Unit; may be empty.
    pub unit: String,
}

/// One run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SheetRow {
    /// Position in the order the runs are carried out (1-based).
    pub run_order: u32,
    /// Position in the standard order (1-based).
    pub std_order: u32,
    /// Block label.
    pub block: u32,
    /// Whether this is a centre point.
    pub centre: bool,
    /// Setting of each factor in natural units, as printed.
    pub settings: Vec<String>,
}

/// Everything on a run sheet.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct RunSheet {
    /// Project title.
    pub title: String,
    /// Date printed in the header (from the caller, never the clock); may be empty.
    pub date: String,
    /// Factors in letter order.
    pub factors: Vec<SheetFactor>,
    /// Responses, one box each per run.
    pub responses: Vec<SheetResponse>,
    /// Runs; printed sorted by run order.
    pub rows: Vec<SheetRow>,
    /// Seed of the run order; `None` for standard order.
    pub seed: Option<u64>,
    /// Program and version for the footer.
    pub tool: String,
    /// SHA-256 of the project data, lowercase hex; may be empty.
    pub data_hash: String,
}

/// The document title of a run sheet.
pub fn document_title(sheet: &RunSheet) -> String {
    if sheet.title.trim().is_empty() {
        "Run sheet".to_string()
    } else {
        format!("{}: run sheet", sheet.title.trim())
    }
}

/// Height of a row: 7.5 mm, room to write a number by hand.
const ROW_H: f64 = 7.5 / 25.4 * super::page::DPI;

/// Height of the header row: room for a response name and unit on two lines.
const HEAD_H: f64 = ROW_H * 1.5;

struct Layout {
    size: f64,
    /// (header, width, is a response box).
    columns: Vec<(String, f64, ColumnKind)>,
    blocks: bool,
}

#[derive(Clone, Copy, PartialEq)]
enum ColumnKind {
    Run,
    Std,
    Block,
    Factor(usize),
    Response,
    Notes,
}

fn layout(sheet: &RunSheet, width: f64) -> Layout {
    let blocks = {
        let mut b: Vec<u32> = sheet.rows.iter().map(|r| r.block).collect();
        b.sort_unstable();
        b.dedup();
        b.len() > 1
    };
    // Shrink the type until the fixed columns leave room for a notes box.
    let mut size = sizes::BODY;
    loop {
        let head = TextStyle::new(size).bold();
        let cell = TextStyle::new(size);
        let pad = size * 1.0;
        let mut columns = vec![
            (
                "Run".to_string(),
                head.width("Run").max(cell.width("000")) + pad,
                ColumnKind::Run,
            ),
            (
                "Std".to_string(),
                head.width("Std").max(cell.width("000")) + pad,
                ColumnKind::Std,
            ),
        ];
        if blocks {
            columns.push((
                "Block".to_string(),
                head.width("Block") + pad,
                ColumnKind::Block,
            ));
        }
        for (i, f) in sheet.factors.iter().enumerate() {
            let header = f.letter.to_string();
            let widest = sheet
                .rows
                .iter()
                .filter_map(|r| r.settings.get(i))
                .map(|s| cell.width(s))
                .fold(head.width(&header), f64::max);
            columns.push((header, widest.min(size * 9.0) + pad, ColumnKind::Factor(i)));
        }
        for r in &sheet.responses {
            let header = if r.unit.is_empty() {
                r.name.clone()
            } else {
                format!("{} ({})", r.name, r.unit)
            };
            // Wide enough for the header on two lines and for a handwritten number.
            let widest_word = header
                .split_whitespace()
                .map(|w| head.width(w))
                .fold(0.0, f64::max);
            let w = widest_word
                .max(head.width(&header) * 0.55)
                .clamp(size * 7.0, size * 12.0)
                + pad;
            columns.push((header, w, ColumnKind::Response));
        }
        let used: f64 = columns.iter().map(|c| c.1).sum();
        let notes = width - used;
        if notes >= size * 8.0 || size <= 5.0 * super::page::PT {
            columns.push((
                "Notes".to_string(),
                notes.max(size * 4.0),
                ColumnKind::Notes,
            ));
            // If even the smallest type overflows, scale every column to fit the width.
            let total: f64 = columns.iter().map(|c| c.1).sum();
            if total > width {
                for c in &mut columns {
                    c.1 *= width / total;
                }
            }
            return Layout {
                size,
                columns,
                blocks,
            };
        }
        size *= 0.92;
    }
}

/// Draws the sheet as one SVG per page.
pub fn render_pages(sheet: &RunSheet, paper: Paper) -> Vec<String> {
    let (w, h) = paper.size();
    let m = paper.margin();
    let content_w = w - 2.0 * m;
    let layout = layout(sheet, content_w);
    let mut rows = sheet.rows.clone();
    rows.sort_by_key(|r| (r.run_order, r.std_order));

    // Header height depends on the legend; measure it once.
    let header_h = {
        let mut scratch = Svg::new(w, h, paper.physical());
        header(&mut scratch, sheet, m, m, content_w, 1, 1) - m
    };
    let footer_h = sizes::SMALL * sizes::LEADING * 3.0;
    let table_top = m + header_h;
    let per_page = (((h - m - footer_h - table_top - HEAD_H) / ROW_H).floor() as usize).max(1);
    let pages = rows.len().div_ceil(per_page).max(1);
    let mut out = Vec::with_capacity(pages);
    for p in 0..pages {
        let mut svg = Svg::new(w, h, paper.physical());
        let top = header(&mut svg, sheet, m, m, content_w, p + 1, pages);
        let chunk: &[SheetRow] = rows
            .get(p * per_page..((p + 1) * per_page).min(rows.len()))
            .unwrap_or(&[]);
        table(&mut svg, &layout, chunk, m, top);
        footer(&mut svg, sheet, m, h - m - footer_h, content_w);
        out.push(svg.finish(&document_title(sheet)));
    }
    out
}

fn header(
    svg: &mut Svg,
    sheet: &RunSheet,
    x: f64,
    y: f64,
    w: f64,
    page: usize,
    pages: usize,
) -> f64 {
    let title_style = TextStyle::new(sizes::TITLE * 0.85).bold();
    let right = TextStyle::new(sizes::BODY).fill(MUTED).anchor(Anchor::End);
    let page_text = format!("run sheet, page {page} of {pages}");
    let baseline = y + title_style.size;
    let title = if sheet.title.trim().is_empty() {
        "Untitled experiment"
    } else {
        sheet.title.trim()
    };
    svg.text(
        x,
        baseline,
        &ellipsize(title, title_style, w - right.width(&page_text) - 60.0),
        title_style,
    );
    svg.text(x + w, baseline, &page_text, right);
    let mut flow = Flow::new(x, w, baseline + title_style.size * 0.4, f64::INFINITY);
    let body = TextStyle::new(sizes::BODY);
    // Lines to fill in by hand.
    let line_y = flow.y + body.size * 1.6;
    let fields = [("Date", 0.0), ("Operator", 0.34), ("Equipment", 0.67)];
    for (label, at) in fields {
        let lx = x + w * at;
        svg.text(lx, line_y, &format!("{label}:"), body.bold());
        let start = lx + body.bold().width(label) + body.size * 0.8;
        let end = lx + w * 0.31;
        svg.line((start, line_y + 4.0), (end, line_y + 4.0), INK, 2.0, None);
    }
    if !sheet.date.is_empty() {
        let start = x + body.bold().width("Date") + body.size * 1.1;
        svg.text(start, line_y - 4.0, &sheet.date, body.fill(MUTED));
    }
    flow.y = line_y + body.size * 1.0;
    let small = TextStyle::new(sizes::SMALL);
    for f in &sheet.factors {
        let unit = if f.unit.is_empty() {
            String::new()
        } else {
            format!(" ({})", f.unit)
        };
        let text = format!(
            "{}{}: low {}, high {}",
            f.name, unit, f.levels[0], f.levels[1]
        );
        svg.text(
            flow.x,
            flow.y + small.size,
            &f.letter.to_string(),
            small.bold().fill(ACCENT),
        );
        flow.paragraph_at(svg, &text, small, 1, small.size * 1.4);
    }
    let order = match sheet.seed {
        Some(seed) => {
            format!("Runs in randomised order (seed {seed}): carry them out top to bottom.")
        }
        None => "Runs in standard order: carry them out top to bottom.".to_string(),
    };
    flow.paragraph(svg, &order, small.fill(MUTED), 1);
    flow.y + sizes::BODY * 0.5
}

fn table(svg: &mut Svg, layout: &Layout, rows: &[SheetRow], x: f64, top: f64) {
    let size = layout.size;
    let head = TextStyle::new(size).bold();
    let cell = TextStyle::new(size);
    let total_w: f64 = layout.columns.iter().map(|c| c.1).sum();
    svg.rect(x, top, total_w, HEAD_H, Some(SHADE), Some((INK, 2.0)));
    let mut cx = x;
    for (header, width, kind) in &layout.columns {
        // Up to two lines, the second shortened if the name is longer still.
        let mut lines = super::page::wrap(header, head, width - size * 0.6);
        if lines.len() > 2 {
            let rest = lines[1..].join(" ");
            lines.truncate(1);
            lines.push(ellipsize(&rest, head, width - size * 0.6));
        }
        let leading = size * 1.15;
        let first = top + HEAD_H / 2.0 - (lines.len() as f64 - 1.0) * leading / 2.0 + size * 0.36;
        for (i, line) in lines.iter().enumerate() {
            let baseline = first + i as f64 * leading;
            match kind {
                ColumnKind::Notes | ColumnKind::Response => {
                    svg.text(cx + size * 0.3, baseline, line, head)
                }
                _ => svg.text(
                    cx + width / 2.0,
                    baseline,
                    line,
                    head.anchor(Anchor::Middle),
                ),
            }
        }
        cx += width;
    }
    let mut previous_block = None;
    for (i, row) in rows.iter().enumerate() {
        let y = top + HEAD_H + ROW_H * i as f64;
        if i % 2 == 1 {
            svg.rect(x, y, total_w, ROW_H, Some("#f4f4f4"), None);
        }
        let baseline = y + ROW_H * 0.5 + size * 0.36;
        let mut cx = x;
        for (_, width, kind) in &layout.columns {
            let centre = cx + width / 2.0;
            match kind {
                ColumnKind::Run => svg.text(
                    centre,
                    baseline,
                    &row.run_order.to_string(),
                    cell.bold().anchor(Anchor::Middle),
                ),
                ColumnKind::Std => svg.text(
                    centre,
                    baseline,
                    &row.std_order.to_string(),
                    cell.fill(MUTED).anchor(Anchor::Middle),
                ),
                ColumnKind::Block => svg.text(
                    centre,
                    baseline,
                    &row.block.to_string(),
                    cell.anchor(Anchor::Middle),
                ),
                ColumnKind::Factor(f) => {
                    let text = row.settings.get(*f).map(String::as_str).unwrap_or("");
                    svg.text(
                        centre,
                        baseline,
                        &ellipsize(text, cell, width - size * 0.4),
                        cell.anchor(Anchor::Middle),
                    );
                }
                ColumnKind::Response => {
                    // The writing box, inset so neighbouring boxes stay apart.
                    let inset = size * 0.25;
                    svg.rect(
                        cx + inset,
                        y + inset,
                        width - 2.0 * inset,
                        ROW_H - 2.0 * inset,
                        Some("#ffffff"),
                        Some((INK, 2.0)),
                    );
                }
                ColumnKind::Notes => {
                    if row.centre {
                        svg.text(
                            cx + size * 0.3,
                            baseline,
                            "centre point",
                            TextStyle::new(sizes::SMALL).fill(MUTED),
                        );
                    }
                }
            }
            cx += width;
        }
        svg.line((x, y + ROW_H), (x + total_w, y + ROW_H), RULE, 1.5, None);
        if layout.blocks && previous_block.is_some_and(|b| b != row.block) {
            svg.line((x, y), (x + total_w, y), INK, 5.0, None);
        }
        previous_block = Some(row.block);
    }
    let bottom = top + HEAD_H + ROW_H * rows.len() as f64;
    // Vertical rules between columns.
    let mut cx = x;
    for (_, width, _) in &layout.columns {
        svg.line((cx, top), (cx, bottom), RULE, 1.5, None);
        cx += width;
    }
    svg.line((cx, top), (cx, bottom), RULE, 1.5, None);
    svg.rect(x, top, total_w, bottom - top, None, Some((INK, 2.5)));
}

fn footer(svg: &mut Svg, sheet: &RunSheet, x: f64, y: f64, w: f64) {
    let mut flow = Flow::new(x, w, y, f64::INFINITY);
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
    flow.paragraph(
        svg,
        "Write each value in its box as read; note anything unusual (a disturbance, a changed lot, a skipped run) under Notes. Stay within the safe operating limits of the process.",
        small,
        2,
    );
    let mut facts = vec![if sheet.tool.is_empty() {
        "Twofold".to_string()
    } else {
        sheet.tool.clone()
    }];
    if !sheet.data_hash.is_empty() {
        facts.push(format!("SHA-256 of project data {}", sheet.data_hash));
    }
    flow.paragraph(svg, &facts.join("  ·  "), small, 1);
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sheet(runs: u32, factors: usize) -> RunSheet {
        let letters = ['A', 'B', 'C', 'D', 'E', 'F', 'G', 'H', 'J', 'K', 'L', 'M'];
        RunSheet {
            title: "Bench trial".into(),
            date: "2024-05-02".into(),
            factors: (0..factors)
                .map(|i| SheetFactor {
                    letter: letters[i],
                    name: format!("Factor {i}"),
                    unit: "°C".into(),
                    levels: ["10".into(), "20".into()],
                })
                .collect(),
            responses: vec![
                SheetResponse {
                    name: "Yield".into(),
                    unit: "%".into(),
                },
                SheetResponse {
                    name: "Haze".into(),
                    unit: String::new(),
                },
            ],
            rows: (1..=runs)
                .map(|r| SheetRow {
                    run_order: runs + 1 - r,
                    std_order: r,
                    block: 1 + u32::from(r > runs / 2),
                    centre: r == runs,
                    settings: (0..factors)
                        .map(|f| {
                            if (r >> f) & 1 == 1 {
                                "20".into()
                            } else {
                                "10".into()
                            }
                        })
                        .collect(),
                })
                .collect(),
            seed: Some(7),
            tool: "Twofold test".into(),
            data_hash: "ab".repeat(32),
        }
    }

    #[test]
    fn rows_come_in_run_order() {
        let pages = render_pages(&sheet(8, 3), Paper::A4);
        assert_eq!(pages.len(), 1);
        let svg = &pages[0];
        let first = svg.find(">1</text>").unwrap();
        let eighth = svg.find(">8</text>").unwrap();
        assert!(first < eighth);
        assert!(svg.contains("Yield (%)"));
        assert!(svg.contains("centre point"));
        assert!(svg.contains("page 1 of 1"));
    }

    #[test]
    fn long_designs_continue_on_more_pages_without_losing_runs() {
        let s = sheet(70, 6);
        let pages = render_pages(&s, Paper::Letter);
        assert!(pages.len() >= 3, "{} pages", pages.len());
        let boxes: usize = pages
            .iter()
            .map(|p| p.matches("fill=\"#ffffff\" stroke=").count())
            .sum();
        assert_eq!(boxes, 70 * 2, "one box per run and response");
        assert!(pages[pages.len() - 1].contains(&format!(
            "page {} of {}",
            pages.len(),
            pages.len()
        )));
    }

    #[test]
    fn many_factors_still_fit_the_width() {
        let s = sheet(16, 12);
        let layout = layout(&s, 2200.0);
        let total: f64 = layout.columns.iter().map(|c| c.1).sum();
        assert!(total <= 2200.0 + 1e-6);
    }
}
