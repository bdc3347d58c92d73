//! Page layout: paper sizes, a column that fills from the top, wrapped paragraphs and tables.
//!
//! Everything is measured with the bundled font before it is drawn, so nothing runs past a
//! margin. When content does not fit, the layout says so on the page ("3 more rows not shown")
//! rather than dropping it silently.

use super::svg::{Anchor, Colour, MUTED, RULE, SHADE, Svg, TextStyle};

/// Page units per inch (the PNG export renders one unit to one pixel).
pub const DPI: f64 = 300.0;

/// Page units per typographic point.
pub const PT: f64 = DPI / 72.0;

/// Paper size of an exported page.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[non_exhaustive]
pub enum Paper {
    /// ISO A4 portrait, 210 × 297 mm (2480 × 3508 pixels at 300 dpi).
    #[default]
    A4,
    /// US Letter portrait, 8.5 × 11 in (2550 × 3300 pixels at 300 dpi).
    Letter,
}

impl Paper {
    /// Width and height in page units (pixels at 300 dpi).
    pub fn size(self) -> (f64, f64) {
        match self {
            Paper::A4 => (2480.0, 3508.0),
            Paper::Letter => (2550.0, 3300.0),
        }
    }

    /// Width and height in whole pixels at 300 dpi.
    pub fn pixels(self) -> (u32, u32) {
        match self {
            Paper::A4 => (2480, 3508),
            Paper::Letter => (2550, 3300),
        }
    }

    /// Physical width and height as SVG lengths.
    pub fn physical(self) -> (&'static str, &'static str) {
        match self {
            Paper::A4 => ("210mm", "297mm"),
            Paper::Letter => ("8.5in", "11in"),
        }
    }

    /// Reads `a4` or `letter` (any case).
    pub fn parse(text: &str) -> Option<Paper> {
        match text.trim().to_ascii_lowercase().as_str() {
            "a4" => Some(Paper::A4),
            "letter" => Some(Paper::Letter),
            _ => None,
        }
    }

    /// The name used in messages and options.
    pub fn name(self) -> &'static str {
        match self {
            Paper::A4 => "A4",
            Paper::Letter => "Letter",
        }
    }

    /// Margin on every side, in page units (12 mm, inside every office printer's unprintable
    /// border).
    pub fn margin(self) -> f64 {
        12.0 / 25.4 * DPI
    }
}

/// Text sizes of a page, in page units.
pub mod sizes {
    use super::PT;
    /// Page title.
    pub const TITLE: f64 = 15.0 * PT;
    /// Section headings.
    pub const HEADING: f64 = 9.0 * PT;
    /// Body text and table cells.
    pub const BODY: f64 = 7.6 * PT;
    /// Notes, captions, axis labels.
    pub const SMALL: f64 = 6.4 * PT;
    /// Line advance as a multiple of the font size.
    pub const LEADING: f64 = 1.28;
}

/// Characters after which a word wider than a whole line may be broken: the joints of alias
/// chains (`AB=CE`), products (`A*B`), lists and compound words, so each piece stays a whole term
/// or word.
const JOINTS: [char; 8] = ['=', '*', '/', '-', ',', ';', '·', '_'];

/// Splits `text` into lines no wider than `width` in `style`.
///
/// The rule: lines break at spaces (not at a no-break space), never inside a word. A word wider than a whole line (which
/// only a long alias chain, product or compound word is in practice) starts a line of its own and
/// breaks after its joints (`=`, `*`, `/`, `-`, `,`, `;`, `·`, `_`), each piece whole. Only a
/// piece with no joint that is itself wider than the line is split by characters, with a hyphen
/// at the break. Explicit line breaks in `text` are kept.
pub fn wrap(text: &str, style: TextStyle, width: f64) -> Vec<String> {
    let fits = |s: &str| style.width(s) <= width;
    let mut lines = Vec::new();
    for paragraph in text.split('\n') {
        let mut line = String::new();
        for word in words(paragraph) {
            let candidate = if line.is_empty() {
                word.to_string()
            } else {
                format!("{line} {word}")
            };
            if fits(&candidate) {
                line = candidate;
                continue;
            }
            if !line.is_empty() {
                lines.push(std::mem::take(&mut line));
            }
            if fits(word) {
                line = word.to_string();
                continue;
            }
            for piece in split_after_joints(word) {
                let candidate = format!("{line}{piece}");
                if fits(&candidate) {
                    line = candidate;
                    continue;
                }
                if !line.is_empty() {
                    lines.push(std::mem::take(&mut line));
                }
                if fits(piece) {
                    line = piece.to_string();
                } else {
                    line = hyphenate(piece, style, width, &mut lines);
                }
            }
        }
        lines.push(line);
    }
    // Blank lines from trailing newlines carry nothing on a page.
    while lines.last().is_some_and(|l| l.is_empty()) && lines.len() > 1 {
        lines.pop();
    }
    lines
}

/// The words of `text`: split at spaces, except a no-break space (U+00A0), which holds its
/// neighbours together as one word.
fn words(text: &str) -> impl Iterator<Item = &str> {
    text.split(|c: char| c.is_whitespace() && c != '\u{a0}')
        .filter(|w| !w.is_empty())
}

/// `AB=CE=DF` as `AB=`, `CE=`, `DF`: the pieces of a word after each joint.
fn split_after_joints(word: &str) -> Vec<&str> {
    let mut pieces = Vec::new();
    let mut start = 0;
    for (i, c) in word.char_indices() {
        if JOINTS.contains(&c) {
            let end = i + c.len_utf8();
            pieces.push(&word[start..end]);
            start = end;
        }
    }
    if start < word.len() {
        pieces.push(&word[start..]);
    }
    pieces
}

/// The last resort for a piece wider than a whole line: full lines of its characters, each
/// ending in a hyphen, pushed to `lines`; returns the rest.
fn hyphenate(piece: &str, style: TextStyle, width: f64, lines: &mut Vec<String>) -> String {
    let mut part = String::new();
    for c in piece.chars() {
        part.push(c);
        if style.width(&format!("{part}-")) > width && part.chars().count() > 1 {
            part.pop();
            lines.push(format!("{part}-"));
            part = c.to_string();
        }
    }
    part
}

/// Shortens `text` to fit `width` by leaving out whole words from its end and adding an
/// ellipsis (`Concentration of the…`); a word is never cut. The caller prints the full text
/// elsewhere on the page. When not even the first word fits, the ellipsis alone is returned.
pub fn ellipsize(text: &str, style: TextStyle, width: f64) -> String {
    if style.width(text) <= width {
        return text.to_string();
    }
    let words: Vec<&str> = words(text).collect();
    for n in (1..words.len()).rev() {
        let candidate = format!(
            "{}…",
            words[..n].join(" ").trim_end_matches([',', ';', ':'])
        );
        if style.width(&candidate) <= width {
            return candidate;
        }
    }
    "…".to_string()
}

/// `line` with ` …` after it, leaving out whole words from its end until it fits `width`: the
/// last line shown of a text that goes on elsewhere.
pub fn with_ellipsis(line: &str, style: TextStyle, width: f64) -> String {
    let words: Vec<&str> = words(line).collect();
    for n in (0..=words.len()).rev() {
        let candidate = if n == 0 {
            "…".to_string()
        } else {
            format!("{} …", words[..n].join(" "))
        };
        if style.width(&candidate) <= width || n == 0 {
            return candidate;
        }
    }
    "…".to_string()
}

/// A rectangle on the page.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rect {
    /// Left edge.
    pub x: f64,
    /// Top edge.
    pub y: f64,
    /// Width.
    pub w: f64,
    /// Height.
    pub h: f64,
}

/// A column filled from the top down.
#[derive(Debug, Clone)]
pub struct Flow {
    /// Left edge.
    pub x: f64,
    /// Width.
    pub w: f64,
    /// Top of the next item.
    pub y: f64,
    /// Nothing is drawn below this line.
    pub bottom: f64,
}

/// Horizontal alignment of a table column.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// Text from the left edge.
    Left,
    /// Numbers to the right edge, so decimal places line up.
    Right,
}

/// One column of a table.
#[derive(Debug, Clone)]
pub struct Column {
    /// Header text.
    pub header: String,
    /// Share of the table width (the shares are normalised).
    pub share: f64,
    /// Alignment of header and cells.
    pub align: Align,
}

impl Column {
    /// A column with a header, a share of the width and an alignment.
    pub fn new(header: &str, share: f64, align: Align) -> Column {
        Column {
            header: header.to_string(),
            share,
            align,
        }
    }
}

/// One table cell.
#[derive(Debug, Clone, PartialEq)]
pub struct Cell {
    /// Text (wrapped at word boundaries if wider than the column).
    pub text: String,
    /// Bold weight.
    pub bold: bool,
    /// Colour.
    pub fill: Colour,
}

impl Cell {
    /// Plain ink text.
    pub fn plain(text: impl Into<String>) -> Cell {
        Cell {
            text: text.into(),
            bold: false,
            fill: super::svg::INK,
        }
    }

    /// Bold text in a colour.
    pub fn strong(text: impl Into<String>, fill: Colour) -> Cell {
        Cell {
            text: text.into(),
            bold: true,
            fill,
        }
    }

    /// Regular text in a colour.
    pub fn coloured(text: impl Into<String>, fill: Colour) -> Cell {
        Cell {
            text: text.into(),
            bold: false,
            fill,
        }
    }
}

/// Row height of a table in the body size.
pub fn row_height() -> f64 {
    sizes::BODY * 1.45
}

impl Flow {
    /// A column at `x` of width `w` from `top` to `bottom`.
    pub fn new(x: f64, w: f64, top: f64, bottom: f64) -> Flow {
        Flow {
            x,
            w,
            y: top,
            bottom,
        }
    }

    /// Height left in the column.
    pub fn remaining(&self) -> f64 {
        (self.bottom - self.y).max(0.0)
    }

    /// Moves down by `h`.
    pub fn space(&mut self, h: f64) {
        self.y += h;
    }

    /// Reserves a block of height `h` and returns it, or `None` (reserving nothing) if it does
    /// not fit.
    pub fn take(&mut self, h: f64) -> Option<Rect> {
        if h > self.remaining() + 0.01 {
            return None;
        }
        let r = Rect {
            x: self.x,
            y: self.y,
            w: self.w,
            h,
        };
        self.y += h;
        Some(r)
    }

    /// A section heading with a rule under it.
    pub fn heading(&mut self, svg: &mut Svg, text: &str) {
        let size = sizes::HEADING;
        let h = size * 1.55;
        if self.remaining() < h {
            return;
        }
        self.y += size * 0.3;
        let baseline = self.y + size;
        svg.text(self.x, baseline, text, TextStyle::new(size).bold());
        let rule_y = baseline + size * 0.22;
        svg.line((self.x, rule_y), (self.x + self.w, rule_y), RULE, 2.0, None);
        self.y += h - size * 0.3;
    }

    /// A wrapped paragraph of at most `max_lines` lines; returns whether everything was shown.
    /// Lines that do not fit end in an ellipsis.
    pub fn paragraph(
        &mut self,
        svg: &mut Svg,
        text: &str,
        style: TextStyle,
        max_lines: usize,
    ) -> bool {
        self.paragraph_at(svg, text, style, max_lines, 0.0)
    }

    /// Like [`Flow::paragraph`], the text indented by `indent`.
    pub fn paragraph_at(
        &mut self,
        svg: &mut Svg,
        text: &str,
        style: TextStyle,
        max_lines: usize,
        indent: f64,
    ) -> bool {
        let width = self.w - indent;
        let lines = wrap(text, style, width);
        let advance = style.size * sizes::LEADING;
        let fit_by_height = ((self.remaining() + style.size * (sizes::LEADING - 1.0)) / advance)
            .floor()
            .max(0.0) as usize;
        let shown = lines.len().min(max_lines).min(fit_by_height);
        for (i, line) in lines.iter().take(shown).enumerate() {
            let text = if i + 1 == shown && shown < lines.len() {
                with_ellipsis(line, style, width)
            } else {
                line.clone()
            };
            let x = match style.anchor {
                Anchor::Start => self.x + indent,
                Anchor::Middle => self.x + indent + width / 2.0,
                Anchor::End => self.x + self.w,
            };
            svg.text(x, self.y + style.size, &text, style);
            self.y += advance;
        }
        shown == lines.len()
    }

    /// Label and value on one line (label in bold), the value wrapped under itself.
    pub fn fact(
        &mut self,
        svg: &mut Svg,
        label: &str,
        value: &str,
        label_width: f64,
        max_lines: usize,
    ) -> bool {
        let style = TextStyle::new(sizes::BODY);
        if self.remaining() < style.size {
            return false;
        }
        svg.text(self.x, self.y + style.size, label, style.bold());
        self.paragraph_at(svg, value, style, max_lines, label_width)
    }

    /// A table of at most as many rows as fit (and at most `max_rows`); returns the number of
    /// rows drawn. Every other row is shaded for reading across. A cell wider than its column
    /// wraps at word boundaries and its row grows. When rows are left out, the line under the
    /// table is `more(n)` for the `n` rows not shown.
    pub fn table(
        &mut self,
        svg: &mut Svg,
        columns: &[Column],
        rows: &[Vec<Cell>],
        max_rows: usize,
        more: &dyn Fn(usize) -> String,
    ) -> usize {
        let rh = row_height();
        let size = sizes::BODY;
        if self.remaining() < 2.0 * rh || columns.is_empty() {
            return 0;
        }
        let edges = self.column_edges(columns);
        let pad = size * 0.35;
        let advance = size * sizes::LEADING;
        let baseline = |top: f64| top + rh * 0.5 + size * 0.36;
        let layout = |cells: &[Cell], bold_all: bool| -> (Vec<Vec<String>>, f64) {
            let wrapped: Vec<Vec<String>> = columns
                .iter()
                .zip(cells)
                .enumerate()
                .map(|(i, (_, cell))| {
                    let mut style = TextStyle::new(size);
                    style.bold = cell.bold || bold_all;
                    wrap(&cell.text, style, edges[i + 1] - edges[i] - 2.0 * pad)
                })
                .collect();
            let lines = wrapped.iter().map(Vec::len).max().unwrap_or(1).max(1);
            (wrapped, rh + (lines - 1) as f64 * advance)
        };
        let draw_row =
            |svg: &mut Svg, top: f64, cells: &[Cell], wrapped: &[Vec<String>], bold_all: bool| {
                for (i, ((c, cell), lines)) in columns.iter().zip(cells).zip(wrapped).enumerate() {
                    let mut style = TextStyle::new(size).fill(cell.fill);
                    style.bold = cell.bold || bold_all;
                    let (x, style) = cell_x(c.align, edges[i], edges[i + 1], pad, style);
                    for (j, line) in lines.iter().enumerate() {
                        svg.text(x, baseline(top) + j as f64 * advance, line, style);
                    }
                }
            };
        // Header row.
        let header: Vec<Cell> = columns
            .iter()
            .map(|c| Cell::plain(c.header.clone()))
            .collect();
        let (head_lines, head_h) = layout(&header, true);
        svg.rect(self.x, self.y, self.w, head_h, Some(SHADE), None);
        draw_row(svg, self.y, &header, &head_lines, true);
        self.y += head_h;
        let note_h = sizes::SMALL * sizes::LEADING;
        let laid: Vec<(Vec<Vec<String>>, f64)> = rows
            .iter()
            .take(max_rows)
            .map(|r| layout(r, false))
            .collect();
        // As many rows as fit; a cut table keeps room for the line that says so.
        let mut shown = 0;
        let mut used = 0.0;
        for (i, (_, h)) in laid.iter().enumerate() {
            let last = i + 1 == rows.len();
            let need = used + h + if last { 0.0 } else { note_h };
            if need > self.remaining() + 0.01 {
                break;
            }
            used += h;
            shown += 1;
        }
        if shown < rows.len() && self.remaining() - used < note_h {
            shown = shown.saturating_sub(1);
        }
        for (r, (row, (lines, h))) in rows.iter().zip(&laid).take(shown).enumerate() {
            if r % 2 == 1 {
                svg.rect(self.x, self.y, self.w, *h, Some("#f7f7f7"), None);
            }
            draw_row(svg, self.y, row, lines, false);
            self.y += h;
        }
        svg.line((self.x, self.y), (self.x + self.w, self.y), RULE, 2.0, None);
        if shown < rows.len() {
            let style = TextStyle::new(sizes::SMALL).fill(MUTED);
            for line in wrap(&more(rows.len() - shown), style, self.w) {
                svg.text(self.x, self.y + style.size * 1.1, &line, style);
                self.y += note_h;
            }
        }
        self.y += size * 0.3;
        shown
    }

    /// The x of every column edge of a table across this column, from the columns' shares.
    pub fn column_edges(&self, columns: &[Column]) -> Vec<f64> {
        let total: f64 = columns
            .iter()
            .map(|c| c.share)
            .sum::<f64>()
            .max(f64::MIN_POSITIVE);
        let mut edges = Vec::with_capacity(columns.len() + 1);
        let mut acc = self.x;
        edges.push(acc);
        for c in columns {
            acc += self.w * c.share / total;
            edges.push(acc);
        }
        edges
    }
}

fn cell_x(align: Align, left: f64, right: f64, pad: f64, style: TextStyle) -> (f64, TextStyle) {
    match align {
        Align::Left => (left + pad, style.anchor(Anchor::Start)),
        Align::Right => (right - pad, style.anchor(Anchor::End)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn paper_sizes_at_300_dpi() {
        assert_eq!(Paper::A4.pixels(), (2480, 3508));
        assert_eq!(Paper::Letter.pixels(), (2550, 3300));
        assert_eq!(Paper::parse(" Letter "), Some(Paper::Letter));
        assert_eq!(Paper::parse("a5"), None);
    }

    #[test]
    fn wrapped_lines_fit_and_keep_every_word() {
        let style = TextStyle::new(sizes::BODY);
        let text = "The furnace was recalibrated on Monday; lot 4411 of the resin was used throughout \
                    and the humidity stayed below forty percent.";
        let width = 600.0;
        let lines = wrap(text, style, width);
        assert!(lines.len() > 2);
        for l in &lines {
            assert!(style.width(l) <= width, "{l}");
        }
        assert_eq!(
            lines.join(" "),
            text.split_whitespace().collect::<Vec<_>>().join(" ")
        );
    }

    /// Every word of `text` (split at spaces) is whole on some line of `lines`.
    fn words_whole(text: &str, lines: &[String]) -> bool {
        text.split_whitespace()
            .all(|w| lines.iter().any(|l| l.split_whitespace().any(|x| x == w)))
    }

    #[test]
    fn lines_break_between_words_never_inside_one() {
        // Common practice, no source: a label wraps at its spaces; each line stays inside the
        // width and every word comes out whole, in order.
        let style = TextStyle::new(sizes::BODY);
        let text = "Concentration of the secondary accelerator in the premix";
        for width in [250.0, 400.0, 700.0, 5000.0] {
            let lines = wrap(text, style, width);
            assert!(lines.iter().all(|l| style.width(l) <= width), "{lines:?}");
            assert!(words_whole(text, &lines), "{width}: {lines:?}");
            assert_eq!(lines.join(" "), text);
        }
    }

    #[test]
    fn an_alias_chain_wider_than_a_line_breaks_after_its_equals_signs() {
        let style = TextStyle::new(sizes::BODY);
        let chain = "A=BCE=BDF=BGH=CDG=CFH=DEH=EFG";
        let width = style.width("A=BCE=BDF=") + 1.0;
        let lines = wrap(chain, style, width);
        assert!(lines.len() >= 3, "{lines:?}");
        assert!(lines.iter().all(|l| style.width(l) <= width), "{lines:?}");
        // Each line holds whole terms: it ends at a joint, or is the chain's end.
        for l in &lines[..lines.len() - 1] {
            assert!(l.ends_with('='), "{l}");
        }
        assert_eq!(lines.concat(), chain);
        // With spaces (as the core writes chains) the spaces are the breaks.
        let spaced = "A = BCE = BDF = BGH = CDG = CFH = DEH = EFG";
        let lines = wrap(spaced, style, width);
        assert!(words_whole(spaced, &lines), "{lines:?}");
    }

    #[test]
    fn a_no_break_space_keeps_a_label_with_its_value() {
        let style = TextStyle::new(sizes::BODY);
        let text = "Smaller effects: AD\u{a0}+2.50, ABC\u{a0}−2.50, AC\u{a0}−2.25, ABD\u{a0}+2.25.";
        for width in [200.0, 300.0, 450.0] {
            let lines = wrap(text, style, width);
            for pair in ["AD\u{a0}+2.50,", "ABC\u{a0}−2.50,", "ABD\u{a0}+2.25."] {
                assert!(
                    lines.iter().any(|l| l.contains(pair)),
                    "{width}: {pair} split in {lines:?}"
                );
            }
        }
    }

    #[test]
    fn only_a_piece_wider_than_the_whole_line_is_split_with_a_hyphen() {
        let style = TextStyle::new(sizes::BODY);
        let lines = wrap(&"x".repeat(200), style, 300.0);
        assert!(lines.len() > 1);
        assert!(lines.iter().all(|l| style.width(l) <= 300.0));
        assert!(lines[..lines.len() - 1].iter().all(|l| l.ends_with('-')));
        assert_eq!(lines.concat().replace('-', "").len(), 200);
        // A short word before it stays whole on its own line.
        let lines = wrap(&format!("Gloss {}", "x".repeat(200)), style, 300.0);
        assert_eq!(lines[0], "Gloss");
    }

    #[test]
    fn shortening_leaves_out_whole_words() {
        let style = TextStyle::new(sizes::BODY);
        let text = "A very long factor name indeed";
        let s = ellipsize(text, style, 300.0);
        assert!(s.ends_with('…'));
        assert!(style.width(&s) <= 300.0);
        let kept = s.trim_end_matches('…');
        assert!(text.starts_with(kept), "{s}");
        assert!(
            kept.split_whitespace()
                .all(|w| text.split_whitespace().any(|x| x == w)),
            "{s}"
        );
        assert_eq!(ellipsize("short", style, 500.0), "short");
        assert_eq!(ellipsize("Unbreakable", style, 20.0), "…");
        let last = with_ellipsis("the equation goes on", style, 250.0);
        assert!(
            last.ends_with(" …") && style.width(&last) <= 250.0,
            "{last}"
        );
        let kept = last.trim_end_matches(" …");
        assert!("the equation goes on".starts_with(kept), "{last}");
    }

    #[test]
    fn table_reports_rows_it_could_not_show() {
        let mut svg = Svg::new(1000.0, 1000.0, ("1in", "1in"));
        let rh = row_height();
        let mut flow = Flow::new(0.0, 800.0, 0.0, rh * 6.5);
        let cols = [
            Column::new("Term", 1.0, Align::Left),
            Column::new("Effect", 1.0, Align::Right),
        ];
        let rows: Vec<Vec<Cell>> = (0..20)
            .map(|i| vec![Cell::plain(format!("T{i}")), Cell::plain(format!("{i}.0"))])
            .collect();
        let shown = flow.table(&mut svg, &cols, &rows, 100, &|n| {
            format!("{n} more rows not shown")
        });
        assert_eq!(shown, 4, "five rows fit, one gives way to the note");
        let doc = svg.finish("t");
        assert!(doc.contains("16 more rows not shown"));
        assert!(flow.y <= flow.bottom + 1e-9);
    }
}
