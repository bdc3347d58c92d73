//! The summary, drawn from a [`SummaryInput`]: one page per response, then pages of more detail.
//!
//! Layout of a response's page (portrait): a header across the page (title, date, the response,
//! on the first page the description); two columns (left: factors, on the first page the design
//! with its alias chains, effect ranking, ANOVA; right: half-normal plot, interaction plots, best
//! settings, on the first page the one-factor-at-a-time comparison); then across the page the
//! equation, warnings, the cautions and the reproducibility footer with the page number. Blocks
//! of variable length are measured by drawing them once into a scratch document, so the columns
//! get exactly the room left over.
//!
//! Nothing is dropped for want of room: what does not fit on a response's page (a long list of
//! alias chains, the smaller effects, a long equation, further warnings) is listed in full on
//! the pages of more detail at the end ([`more`]), and the page says where. Text wraps at word
//! boundaries ([`crate::export::page::wrap`]); where a label must be shortened, whole words are
//! left out and the full text is elsewhere on the same page.

mod left;
mod more;
mod right;

use super::input::{ResponseSummary, SummaryInput};
use super::page::{Flow, Paper, sizes, with_ellipsis, wrap};
use super::svg::{ACCENT, ALERT, Anchor, INK, MUTED, Svg, TextStyle};
pub use more::{Block, Item};

/// The cautions printed on every page of a summary.
pub const CAUTIONS: [&str; 4] = [
    "Stay within the safe operating limits of your equipment, materials and process: the settings on this page are statistical estimates, not verified safe conditions.",
    "Confirm with confirmation runs at the chosen settings before changing production.",
    "The model describes only the tested ranges of the factors; do not extrapolate beyond them.",
    "Follow local codes, regulations and licensed practice; this page does not replace engineering judgement or required approvals.",
];

/// The words that explain the effect markers, on every chart of effects (window and page).
pub const SIGN_LEGEND: &str = "▲ raises the response, ▼ lowers it; filled = in the model";

/// Width of the label column of label-value lines.
const LABEL_W: f64 = 300.0;

/// Lines of the description on the first page; a longer one is given whole on the pages of more
/// detail.
const DESCRIPTION_LINES: usize = 8;

/// Room kept at the right of the footer line for the page number.
const PAGE_NUMBER_W: f64 = 300.0;

/// What does not fit on the response pages, gathered for the pages of more detail, and where
/// the previous layout put each block, so a page can name the page to turn to.
#[derive(Debug, Default)]
pub(crate) struct More {
    blocks: Vec<Block>,
    found: Vec<(String, usize)>,
    default_page: usize,
}

impl More {
    fn new(found: Vec<(String, usize)>, default_page: usize) -> More {
        More {
            blocks: Vec::new(),
            found,
            default_page,
        }
    }

    /// A collector for a measuring pass: the same page references, blocks thrown away.
    fn scratch(&self) -> More {
        More::new(self.found.clone(), self.default_page)
    }

    /// Adds a block of detail under `heading` (once) and returns where the reader finds it,
    /// e.g. `“Gloss: every effect” on page 4`.
    fn add(&mut self, heading: &str, items: Vec<Item>) -> String {
        let page = self
            .found
            .iter()
            .find(|(h, _)| h == heading)
            .map_or(self.default_page, |(_, p)| *p);
        if !self.blocks.iter().any(|b| b.heading == heading) {
            self.blocks.push(Block {
                heading: heading.to_string(),
                items,
            });
        }
        format!("“{heading}” on page {page}")
    }
}

/// A page drawn but not yet numbered: the page number goes at `number_at` once the count is
/// known.
struct Drawn {
    svg: Svg,
    number_at: (f64, f64),
}

/// The pages of a response and what it shares with the page: which response it is (`index` of
/// `count`) and whether this is the first page (which carries the project's facts).
#[derive(Clone, Copy)]
pub(crate) struct Part<'a> {
    pub input: &'a SummaryInput,
    pub section: &'a ResponseSummary,
    pub index: usize,
    pub count: usize,
}

impl Part<'_> {
    fn first(&self) -> bool {
        self.index == 0
    }

    /// The heading of a block of detail about this response (`Gloss: every effect`).
    fn heading(&self, what: &str) -> String {
        let name = self.section.response.name.trim();
        if name.is_empty() {
            what.to_string()
        } else {
            format!("{name}: {what}")
        }
    }
}

/// Lays out the summary and returns its pages as SVG documents, in order.
pub fn render_pages(input: &SummaryInput, paper: Paper) -> Vec<String> {
    let empty = ResponseSummary::default();
    let sections: Vec<&ResponseSummary> = if input.responses.is_empty() {
        vec![&empty]
    } else {
        input.responses.iter().collect()
    };
    let count = sections.len();
    // The response pages, then the pages of more detail; laid out again when there are such
    // pages, so that the references name the pages the first layout found for each block.
    let lay_out = |found: &[(String, usize)]| {
        let mut more = More::new(found.to_vec(), count + 1);
        let mut drawn: Vec<Drawn> = sections
            .iter()
            .enumerate()
            .map(|(index, &section)| {
                let part = Part {
                    input,
                    section,
                    index,
                    count,
                };
                response_page(part, paper, &mut more)
            })
            .collect();
        let (detail, placed) = more::detail_pages(input, &more.blocks, paper, count + 1);
        drawn.extend(detail);
        (drawn, placed)
    };
    let (mut pages, placed) = lay_out(&[]);
    if !placed.is_empty() {
        pages = lay_out(&placed).0;
    }
    let total = pages.len();
    let title = document_title(input);
    pages
        .into_iter()
        .enumerate()
        .map(|(i, mut page)| {
            let style = TextStyle::new(sizes::SMALL).fill(MUTED).anchor(Anchor::End);
            let (x, y) = page.number_at;
            page.svg
                .text(x, y, &format!("page {} of {total}", i + 1), style);
            page.svg.finish(&title)
        })
        .collect()
}

/// The title of the document.
fn document_title(input: &SummaryInput) -> String {
    if input.title.trim().is_empty() {
        "Experiment summary".to_string()
    } else {
        format!("{}: summary", input.title.trim())
    }
}

/// Draws the page of one response.
fn response_page(part: Part, paper: Paper, more: &mut More) -> Drawn {
    let (w, h) = paper.size();
    let m = paper.margin();
    let mut svg = Svg::new(w, h, paper.physical());
    let content_w = w - 2.0 * m;

    let header_bottom = header(&mut svg, part, m, m, content_w, more);

    // Measure the full-width block at the foot of the page, then draw it there. It may take a
    // quarter of the page; beyond that fewer warnings and equation lines are shown here, and
    // all of them on the pages of more detail.
    let measure = |limits: FootLimits| {
        let mut scratch = Svg::new(w, h, paper.physical());
        let mut flow = Flow::new(m, content_w, 0.0, f64::INFINITY);
        foot(&mut scratch, &mut flow, part, limits, &mut more.scratch());
        flow.y
    };
    let budget = 0.25 * (h - 2.0 * m);
    let mut limits = FootLimits {
        equation_lines: 4,
        warnings: warnings_of(part).len().min(6),
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
    let number_y = foot(&mut svg, &mut flow, part, limits, more);

    let gap = 70.0;
    let col_w = (content_w - gap) / 2.0;
    let cols_top = header_bottom;
    let cols_bottom = foot_top - 30.0;
    left::left_column(
        &mut svg,
        part,
        Flow::new(m, col_w, cols_top, cols_bottom),
        more,
    );
    right::right_column(
        &mut svg,
        part,
        Flow::new(m + col_w + gap, col_w, cols_top, cols_bottom),
        more,
    );
    svg.line(
        (m + col_w + gap / 2.0, cols_top + 20.0),
        (m + col_w + gap / 2.0, cols_bottom - 10.0),
        "#dddddd",
        2.0,
        None,
    );
    Drawn {
        svg,
        number_at: (m + content_w, number_y),
    }
}

/// Draws the title (on up to two lines, the date beside its first; a longer title is given in
/// full on the pages of more detail) and returns where the line under it starts.
fn title_lines(
    svg: &mut Svg,
    input: &SummaryInput,
    x: f64,
    y: f64,
    w: f64,
    more: &mut More,
) -> f64 {
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
    let mut lines = wrap(title, title_style, w - date_w);
    if lines.len() > 2 {
        more.add("Title", vec![Item::Text(title.to_string())]);
        lines.truncate(2);
        lines[1] = with_ellipsis(&lines[1], title_style, w - date_w);
    }
    let mut baseline = y + sizes::TITLE * 0.95;
    if !input.date.is_empty() {
        svg.text(x + w, baseline, &input.date, date_style);
    }
    for (i, line) in lines.iter().enumerate() {
        if i > 0 {
            baseline += sizes::TITLE * sizes::LEADING;
        }
        svg.text(x, baseline, line, title_style);
    }
    baseline + sizes::TITLE * 0.35
}

/// Title, date, response line and (first page) description; returns the y where the columns
/// start.
fn header(svg: &mut Svg, part: Part, x: f64, y: f64, w: f64, more: &mut More) -> f64 {
    let input = part.input;
    let top = title_lines(svg, input, x, y, w, more);
    let mut flow = Flow::new(x, w, top, f64::INFINITY);
    let r = &part.section.response;
    let name = if r.name.is_empty() {
        "(unnamed)".to_string()
    } else {
        r.name.clone()
    };
    let mut line = if part.count > 1 {
        format!("Response {} of {}: {name}", part.index + 1, part.count)
    } else if input.responses.is_empty() {
        "No response defined yet".to_string()
    } else {
        format!("Response: {name}")
    };
    if !r.unit.is_empty() {
        line.push_str(&format!(" ({})", r.unit));
    }
    if !input.responses.is_empty() {
        line.push_str(&format!(
            "  ·  {} of {} runs analysed",
            r.runs_used, r.runs_total
        ));
    }
    if !r.transform.is_empty() {
        line.push_str(&format!("  ·  analysed as {}", r.transform));
    }
    flow.paragraph(
        svg,
        &line,
        TextStyle::new(sizes::BODY).bold().fill(ACCENT),
        4,
    );
    let description = input.description.trim();
    if part.first() && !description.is_empty() {
        flow.space(sizes::BODY * 0.2);
        let body = TextStyle::new(sizes::BODY);
        if !flow.paragraph(svg, description, body, DESCRIPTION_LINES) {
            let place = more.add("Description", vec![Item::Text(description.to_string())]);
            flow.paragraph(
                svg,
                &format!("The full description is under {place}."),
                TextStyle::new(sizes::SMALL).fill(MUTED),
                2,
            );
        }
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

/// How much of the variable text the foot may show.
#[derive(Debug, Clone, Copy)]
struct FootLimits {
    equation_lines: usize,
    warnings: usize,
    warning_lines: usize,
}

/// The warnings of a page: the project's on the first page, then the response's own.
fn warnings_of<'a>(part: Part<'a>) -> Vec<&'a str> {
    let project = part
        .input
        .warnings
        .iter()
        .filter(|_| part.first())
        .map(String::as_str);
    project
        .chain(part.section.warnings.iter().map(String::as_str))
        .collect()
}

/// Equation, warnings, cautions and footer, across the page; returns the baseline of the
/// footer line, where the page number goes.
fn foot(svg: &mut Svg, flow: &mut Flow, part: Part, limits: FootLimits, more: &mut More) -> f64 {
    let body = TextStyle::new(sizes::BODY);
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
    svg.line((flow.x, flow.y), (flow.x + flow.w, flow.y), INK, 3.0, None);
    flow.space(6.0);
    let coded = part.section.equation.as_ref().is_some_and(|e| e.coded);
    flow.heading(
        svg,
        if coded {
            "Model equation in coded units"
        } else {
            "Model equation in natural units"
        },
    );
    match &part.section.equation {
        Some(eq) => {
            let all = flow.paragraph(svg, &eq.text, body, limits.equation_lines);
            if !all {
                let place = more.add(
                    &part.heading("model equation"),
                    vec![Item::Text(eq.text.clone())],
                );
                flow.paragraph(
                    svg,
                    &format!("The full equation is under {place}."),
                    small,
                    1,
                );
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
    let warnings = warnings_of(part);
    if warnings.is_empty() {
        flow.paragraph(svg, "None.", body.fill(MUTED), 1);
    }
    let mut all_shown = warnings.len() <= limits.warnings;
    for w in warnings.iter().take(limits.warnings) {
        all_shown &= bullet(svg, flow, w, body, ALERT, limits.warning_lines);
    }
    if !all_shown {
        let list = warnings.iter().map(|w| w.to_string()).collect();
        let place = more.add(&part.heading("warnings"), vec![Item::Bullets(list)]);
        let text = if warnings.len() > limits.warnings {
            let n = warnings.len() - limits.warnings;
            format!("{n} more warnings: every warning is under {place}.")
        } else {
            format!("Every warning in full is under {place}.")
        };
        flow.paragraph(svg, &text, small, 2);
    }
    cautions_and_footer(svg, flow, part.input)
}

/// The cautions, then the reproducibility facts; returns the baseline of the facts' first line.
fn cautions_and_footer(svg: &mut Svg, flow: &mut Flow, input: &SummaryInput) -> f64 {
    let body = TextStyle::new(sizes::BODY);
    let small = TextStyle::new(sizes::SMALL).fill(MUTED);
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
    let baseline = flow.y + small.size;
    let mut facts_flow = Flow::new(flow.x, flow.w - PAGE_NUMBER_W, flow.y, flow.bottom);
    facts_flow.paragraph(svg, &facts.join("  ·  "), small, 3);
    flow.y = facts_flow.y;
    baseline
}

/// A bulleted paragraph; returns whether all of it was shown.
fn bullet(
    svg: &mut Svg,
    flow: &mut Flow,
    text: &str,
    style: TextStyle,
    mark: super::svg::Colour,
    max_lines: usize,
) -> bool {
    let indent = style.size * 1.1;
    if flow.remaining() < style.size {
        return false;
    }
    svg.text(
        flow.x + style.size * 0.2,
        flow.y + style.size,
        "•",
        TextStyle::new(style.size).bold().fill(mark),
    );
    flow.paragraph_at(svg, text, style, max_lines, indent)
}

#[cfg(test)]
mod tests;
