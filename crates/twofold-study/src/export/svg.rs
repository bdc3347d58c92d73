//! A small SVG writer for printed pages.
//!
//! Only what pages need: rectangles, lines, polylines, circles and single-line text in the
//! bundled font. Coordinates are written with one decimal through one formatter, and attributes
//! in a fixed order, so the same drawing calls always give byte-identical output.

use std::fmt::Write as _;

use super::fonts;

/// A colour as `#rrggbb`.
pub type Colour = &'static str;

/// Ink for body text and axes.
pub const INK: Colour = "#1a1a1a";
/// Secondary text (captions, units, notes).
pub const MUTED: Colour = "#5a5a5a";
/// Hairlines and grid.
pub const RULE: Colour = "#b8b8b8";
/// Light fill behind table headers and boxes.
pub const SHADE: Colour = "#eeeeee";
/// Marks terms in the chosen model.
pub const ACCENT: Colour = "#1d5a85";
/// Marks effects beyond a decision limit and warnings.
pub const ALERT: Colour = "#a8431a";
/// Terms not in the model.
pub const QUIET: Colour = "#8c8c8c";

/// How a text line is anchored at its x coordinate.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Anchor {
    /// x is the left edge.
    Start,
    /// x is the centre.
    Middle,
    /// x is the right edge.
    End,
}

/// Font size, weight, colour and anchor of a text line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TextStyle {
    /// Font size in page units.
    pub size: f64,
    /// Bold weight.
    pub bold: bool,
    /// Fill colour.
    pub fill: Colour,
    /// Horizontal anchor.
    pub anchor: Anchor,
}

impl TextStyle {
    /// Regular ink text of `size`, anchored at its start.
    pub fn new(size: f64) -> TextStyle {
        TextStyle {
            size,
            bold: false,
            fill: INK,
            anchor: Anchor::Start,
        }
    }

    /// The same style in bold.
    #[must_use]
    pub fn bold(mut self) -> TextStyle {
        self.bold = true;
        self
    }

    /// The same style in another colour.
    #[must_use]
    pub fn fill(mut self, fill: Colour) -> TextStyle {
        self.fill = fill;
        self
    }

    /// The same style with another anchor.
    #[must_use]
    pub fn anchor(mut self, anchor: Anchor) -> TextStyle {
        self.anchor = anchor;
        self
    }

    /// Rendered width of `text` in this style.
    pub fn width(&self, text: &str) -> f64 {
        fonts::text_width(text, self.size, self.bold)
    }
}

/// A coordinate or length with one decimal, without a trailing `.0` and never `-0`.
pub fn num(x: f64) -> String {
    if !x.is_finite() {
        // Never reached by the page code (it checks its inputs), but a drawing must still parse.
        return "0".to_string();
    }
    let tenths = (x * 10.0).round();
    if tenths == 0.0 {
        return "0".to_string();
    }
    let s = format!("{:.1}", tenths / 10.0);
    match s.strip_suffix(".0") {
        Some(whole) => whole.to_string(),
        None => s,
    }
}

/// Escapes text for XML character data and attribute values; control characters (which XML
/// forbids and a pasted description may hold) become spaces.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            c if c.is_control() => out.push(' '),
            // Non-characters and the replacement range are not valid XML either.
            '\u{FFFE}' | '\u{FFFF}' => out.push(' '),
            c => out.push(c),
        }
    }
    out
}

/// An SVG document being drawn. Page units are dots at 300 per inch.
#[derive(Debug)]
pub struct Svg {
    body: String,
    width_units: f64,
    height_units: f64,
    physical: (String, String),
}

impl Svg {
    /// A blank page `width_units` × `height_units` in page units, printed at the physical size
    /// given as SVG lengths (e.g. `"210mm"`, `"297mm"`).
    pub fn new(width_units: f64, height_units: f64, physical: (&str, &str)) -> Svg {
        Svg {
            body: String::new(),
            width_units,
            height_units,
            physical: (physical.0.to_string(), physical.1.to_string()),
        }
    }

    /// A filled (and optionally outlined) rectangle.
    pub fn rect(
        &mut self,
        x: f64,
        y: f64,
        w: f64,
        h: f64,
        fill: Option<Colour>,
        stroke: Option<(Colour, f64)>,
    ) {
        let _ = write!(
            self.body,
            "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\"",
            num(x),
            num(y),
            num(w.max(0.0)),
            num(h.max(0.0))
        );
        self.paint(fill, stroke);
        self.body.push_str("/>\n");
    }

    /// A straight line; `dash` is the dash length (gaps equal), `None` for solid.
    pub fn line(
        &mut self,
        (x1, y1): (f64, f64),
        (x2, y2): (f64, f64),
        stroke: Colour,
        width: f64,
        dash: Option<f64>,
    ) {
        let _ = write!(
            self.body,
            "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"{}\" stroke-width=\"{}\"",
            num(x1),
            num(y1),
            num(x2),
            num(y2),
            stroke,
            num(width)
        );
        if let Some(d) = dash {
            let _ = write!(self.body, " stroke-dasharray=\"{} {}\"", num(d), num(d));
        }
        self.body.push_str("/>\n");
    }

    /// An open polyline through `points`.
    pub fn polyline(
        &mut self,
        points: &[(f64, f64)],
        stroke: Colour,
        width: f64,
        dash: Option<f64>,
    ) {
        if points.len() < 2 {
            return;
        }
        let pts: Vec<String> = points
            .iter()
            .map(|(x, y)| format!("{},{}", num(*x), num(*y)))
            .collect();
        let _ = write!(
            self.body,
            "<polyline points=\"{}\" fill=\"none\" stroke=\"{}\" stroke-width=\"{}\" stroke-linejoin=\"round\"",
            pts.join(" "),
            stroke,
            num(width)
        );
        if let Some(d) = dash {
            let _ = write!(self.body, " stroke-dasharray=\"{} {}\"", num(d), num(d));
        }
        self.body.push_str("/>\n");
    }

    /// A circle.
    pub fn circle(
        &mut self,
        (cx, cy): (f64, f64),
        r: f64,
        fill: Option<Colour>,
        stroke: Option<(Colour, f64)>,
    ) {
        let _ = write!(
            self.body,
            "<circle cx=\"{}\" cy=\"{}\" r=\"{}\"",
            num(cx),
            num(cy),
            num(r)
        );
        self.paint(fill, stroke);
        self.body.push_str("/>\n");
    }

    /// A square marker centred on a point (the second marker shape, so two series stay apart
    /// in black-and-white print).
    pub fn square(
        &mut self,
        (cx, cy): (f64, f64),
        half: f64,
        fill: Option<Colour>,
        stroke: Option<(Colour, f64)>,
    ) {
        self.rect(cx - half, cy - half, 2.0 * half, 2.0 * half, fill, stroke);
    }

    /// A triangle marker centred on a point: pointing up (`▲`, a positive effect) or down (`▼`,
    /// a negative one), `half` from the centre to each side.
    pub fn triangle(
        &mut self,
        (cx, cy): (f64, f64),
        half: f64,
        up: bool,
        fill: Option<Colour>,
        stroke: Option<(Colour, f64)>,
    ) {
        // An equilateral triangle whose centroid is the point.
        let h = half * 3f64.sqrt();
        let (apex, base) = if up {
            (cy - h * 2.0 / 3.0, cy + h / 3.0)
        } else {
            (cy + h * 2.0 / 3.0, cy - h / 3.0)
        };
        let _ = write!(
            self.body,
            "<polygon points=\"{},{} {},{} {},{}\"",
            num(cx),
            num(apex),
            num(cx + half),
            num(base),
            num(cx - half),
            num(base)
        );
        self.paint(fill, stroke);
        self.body.push_str("/>\n");
    }

    /// One line of text with its baseline at `y`.
    pub fn text(&mut self, x: f64, y: f64, text: &str, style: TextStyle) {
        if text.is_empty() {
            return;
        }
        let _ = write!(
            self.body,
            "<text x=\"{}\" y=\"{}\" font-size=\"{}\"",
            num(x),
            num(y),
            num(style.size)
        );
        self.end_text(text, style, Some(style.anchor));
    }

    /// Text turned 90° anticlockwise (a vertical axis title), centred on `(x, y)`.
    pub fn text_vertical(&mut self, x: f64, y: f64, text: &str, style: TextStyle) {
        if text.is_empty() {
            return;
        }
        let _ = write!(
            self.body,
            "<text transform=\"translate({} {}) rotate(-90)\" font-size=\"{}\" text-anchor=\"middle\"",
            num(x),
            num(y),
            num(style.size)
        );
        self.end_text(text, style, None);
    }

    /// Ends a `<text>` element whose position and size are written: the weight, the anchor
    /// (`None` where the element has set its own), the colour unless ink, then the text.
    fn end_text(&mut self, text: &str, style: TextStyle, anchor: Option<Anchor>) {
        if style.bold {
            self.body.push_str(" font-weight=\"bold\"");
        }
        match anchor {
            None | Some(Anchor::Start) => {}
            Some(Anchor::Middle) => self.body.push_str(" text-anchor=\"middle\""),
            Some(Anchor::End) => self.body.push_str(" text-anchor=\"end\""),
        }
        if style.fill != INK {
            let _ = write!(self.body, " fill=\"{}\"", style.fill);
        }
        let _ = writeln!(self.body, ">{}</text>", escape(text));
    }

    /// Starts a group with a title (read by screen readers and shown as a tooltip by viewers).
    pub fn begin_group(&mut self, title: &str) {
        let _ = writeln!(self.body, "<g><title>{}</title>", escape(title));
    }

    /// Ends the group opened last.
    pub fn end_group(&mut self) {
        self.body.push_str("</g>\n");
    }

    fn paint(&mut self, fill: Option<Colour>, stroke: Option<(Colour, f64)>) {
        let _ = write!(self.body, " fill=\"{}\"", fill.unwrap_or("none"));
        if let Some((colour, width)) = stroke {
            let _ = write!(
                self.body,
                " stroke=\"{}\" stroke-width=\"{}\"",
                colour,
                num(width)
            );
        }
    }

    /// The finished document. Kerning is switched off for the whole page because the layout
    /// measures text as the plain sum of advance widths.
    pub fn finish(self, title: &str) -> String {
        let mut out = String::with_capacity(self.body.len() + 512);
        let _ = writeln!(out, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>");
        let _ = writeln!(
            out,
            "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"{}\" height=\"{}\" viewBox=\"0 0 {} {}\" font-family=\"{}\" font-kerning=\"none\" fill=\"{}\">",
            self.physical.0,
            self.physical.1,
            num(self.width_units),
            num(self.height_units),
            fonts::FAMILY,
            INK
        );
        let _ = writeln!(out, "<title>{}</title>", escape(title));
        let _ = writeln!(
            out,
            "<rect x=\"0\" y=\"0\" width=\"{}\" height=\"{}\" fill=\"#ffffff\"/>",
            num(self.width_units),
            num(self.height_units)
        );
        out.push_str(&self.body);
        out.push_str("</svg>\n");
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_are_short_and_signless_at_zero() {
        assert_eq!(num(12.0), "12");
        assert_eq!(num(12.25), "12.3");
        assert_eq!(num(-0.04), "0");
        assert_eq!(num(-3.26), "-3.3");
        assert_eq!(num(f64::NAN), "0");
    }

    #[test]
    fn escaping_keeps_xml_valid() {
        assert_eq!(
            escape("a<b & \"c\"\t'd'"),
            "a&lt;b &amp; &quot;c&quot; &apos;d&apos;"
        );
        assert_eq!(escape("x\u{0}y\u{1b}z"), "x y z");
    }

    #[test]
    fn same_calls_same_bytes() {
        let draw = || {
            let mut s = Svg::new(100.0, 50.0, ("1in", "0.5in"));
            s.rect(1.0, 2.0, 3.0, 4.0, Some(SHADE), Some((RULE, 0.5)));
            s.text(5.0, 6.0, "Temp <°C>", TextStyle::new(10.0).bold());
            s.polyline(&[(0.0, 0.0), (1.0, 1.0)], ACCENT, 1.0, Some(2.0));
            s.finish("t")
        };
        let a = draw();
        assert_eq!(a, draw());
        assert!(a.contains("Temp &lt;°C&gt;"));
        assert!(a.contains("font-kerning=\"none\""));
    }
}
