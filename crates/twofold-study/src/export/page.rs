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

/// Splits `text` into lines no wider than `width` in `style`, breaking at spaces (and inside a
/// word only when the word alone is too wide). Explicit line breaks in `text` are kept.
pub fn wrap(text: &str, style: TextStyle, width: f64) -> Vec<String> {
    let mut lines = Vec::new();
    for paragraph in text.split('\n') {
        let mut line = String::new();
        for word in paragraph.split_whitespace() {
            let candidate = if line.is_empty() {
                word.to_string()
            } else {
                format!("{line} {word}")
            };
            if style.width(&candidate) <= width {
                line = candidate;
                continue;
            }
            if !line.is_empty() {
                lines.push(std::mem::take(&mut line));
            }
            // A word wider than the line is broken by characters.
            let mut piece = String::new();
            for c in word.chars() {
                piece.push(c);
                if style.width(&piece) > width && piece.chars().count() > 1 {
                    piece.pop();
                    lines.push(std::mem::take(&mut piece));
                    piece.push(c);
                }
            }
            line = piece;
        }
        lines.push(line);
    }
    // Blank lines from trailing newlines carry nothing on a page.
    while lines.last().is_some_and(|l| l.is_empty()) && lines.len() > 1 {
        lines.pop();
    }
    lines
}

/// Shortens `text` with a trailing ellipsis until it fits `width`.
pub fn ellipsize(text: &str, style: TextStyle, width: f64) -> String {
    if style.width(text) <= width {
        return text.to_string();
    }
    let mut chars: Vec<char> = text.chars().collect();
    while !chars.is_empty() {
        chars.pop();
        let candidate: String = chars.iter().collect::<String>().trim_end().to_string() + "…";
        if style.width(&candidate) <= width {
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
    /// Text (shortened with an ellipsis if wider than the column).
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
                ellipsize(&format!("{line} …"), style, width)
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
    /// rows drawn. Every other row is shaded for reading across.
    pub fn table(
        &mut self,
        svg: &mut Svg,
        columns: &[Column],
        rows: &[Vec<Cell>],
        max_rows: usize,
    ) -> usize {
        let rh = row_height();
        let size = sizes::BODY;
        if self.remaining() < 2.0 * rh || columns.is_empty() {
            return 0;
        }
        let total: f64 = columns
            .iter()
            .map(|c| c.share)
            .sum::<f64>()
            .max(f64::MIN_POSITIVE);
        let pad = size * 0.35;
        let mut edges = Vec::with_capacity(columns.len() + 1);
        let mut acc = self.x;
        edges.push(acc);
        for c in columns {
            acc += self.w * c.share / total;
            edges.push(acc);
        }
        let baseline = |top: f64| top + rh * 0.5 + size * 0.36;
        // Header row.
        svg.rect(self.x, self.y, self.w, rh, Some(SHADE), None);
        for (i, c) in columns.iter().enumerate() {
            let style = TextStyle::new(size).bold();
            let width = edges[i + 1] - edges[i] - 2.0 * pad;
            let text = ellipsize(&c.header, style, width);
            let (x, style) = cell_x(c.align, edges[i], edges[i + 1], pad, style);
            svg.text(x, baseline(self.y), &text, style);
        }
        self.y += rh;
        let fit = (self.remaining() / rh).floor() as usize;
        let mut shown = rows.len().min(max_rows).min(fit);
        let note_h = sizes::SMALL * sizes::LEADING;
        // A cut table must keep room for the line that says so.
        if shown < rows.len() && self.remaining() - shown as f64 * rh < note_h {
            shown = shown.saturating_sub(1);
        }
        for (r, row) in rows.iter().take(shown).enumerate() {
            if r % 2 == 1 {
                svg.rect(self.x, self.y, self.w, rh, Some("#f7f7f7"), None);
            }
            for (i, (c, cell)) in columns.iter().zip(row).enumerate() {
                let mut style = TextStyle::new(size).fill(cell.fill);
                style.bold = cell.bold;
                let width = edges[i + 1] - edges[i] - 2.0 * pad;
                let text = ellipsize(&cell.text, style, width);
                let (x, style) = cell_x(c.align, edges[i], edges[i + 1], pad, style);
                svg.text(x, baseline(self.y), &text, style);
            }
            self.y += rh;
        }
        svg.line((self.x, self.y), (self.x + self.w, self.y), RULE, 2.0, None);
        if shown < rows.len() {
            let note = format!("{} more rows not shown", rows.len() - shown);
            let style = TextStyle::new(sizes::SMALL).fill(MUTED);
            svg.text(self.x, self.y + style.size * 1.1, &note, style);
            self.y += note_h;
        }
        self.y += size * 0.3;
        shown
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

    #[test]
    fn long_words_are_broken_not_overflowing() {
        let style = TextStyle::new(sizes::BODY);
        let lines = wrap(&"x".repeat(200), style, 300.0);
        assert!(lines.len() > 1);
        assert!(lines.iter().all(|l| style.width(l) <= 300.0));
        assert_eq!(lines.concat().len(), 200);
    }

    #[test]
    fn ellipsis_fits() {
        let style = TextStyle::new(sizes::BODY);
        let s = ellipsize("A very long factor name indeed", style, 200.0);
        assert!(s.ends_with('…'));
        assert!(style.width(&s) <= 200.0);
        assert_eq!(ellipsize("short", style, 500.0), "short");
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
        let shown = flow.table(&mut svg, &cols, &rows, 100);
        assert_eq!(shown, 4, "five rows fit, one gives way to the note");
        let doc = svg.finish("t");
        assert!(doc.contains("16 more rows not shown"));
        assert!(flow.y <= flow.bottom + 1e-9);
    }
}
