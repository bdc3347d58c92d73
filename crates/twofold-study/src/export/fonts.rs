//! The bundled typeface and its metrics.
//!
//! Pages are laid out with the font that renders them, so text is measured here from the font's
//! own advance widths rather than guessed. The font bytes are compiled into the program: an
//! export must look the same on every machine and must never depend on fonts installed there
//! (with an empty font database the renderer silently drops every glyph).
//!
//! The typeface is DejaVu Sans Condensed (regular and bold), licence beside the files in
//! `assets/fonts/`.

use std::sync::{Arc, OnceLock};

use usvg::fontdb;

/// Regular weight, DejaVu Sans Condensed: the one copy in the program, shared by the pages and
/// the window.
pub static REGULAR: &[u8] = include_bytes!("../../../../assets/fonts/DejaVuSansCondensed.ttf");
/// Bold weight, DejaVu Sans Condensed (the one copy, as [`REGULAR`]).
pub static BOLD: &[u8] = include_bytes!("../../../../assets/fonts/DejaVuSansCondensed-Bold.ttf");

/// The family name written into every SVG `font-family` attribute. It is the name the font's
/// own naming table gives, so the renderer's font lookup finds the bundled faces.
pub const FAMILY: &str = "DejaVu Sans";

/// The font database holding only the bundled faces, built once.
pub fn database() -> Arc<fontdb::Database> {
    static DB: OnceLock<Arc<fontdb::Database>> = OnceLock::new();
    DB.get_or_init(|| {
        let mut db = fontdb::Database::new();
        for bytes in [REGULAR, BOLD] {
            db.load_font_source(fontdb::Source::Binary(Arc::new(bytes)));
        }
        // Any generic family an SVG might name resolves to the bundled face as well.
        db.set_sans_serif_family(FAMILY);
        db.set_serif_family(FAMILY);
        db.set_monospace_family(FAMILY);
        Arc::new(db)
    })
    .clone()
}

/// Advance widths of one face, read from its `cmap`, `hhea` and `hmtx` tables.
#[derive(Debug)]
pub struct Metrics {
    units_per_em: f64,
    /// Advance of each glyph id, in font units.
    advances: Vec<u16>,
    /// `cmap` format 4 segments: (start, end, id delta, offset into `glyph_ids` or `None`).
    segments: Vec<Segment>,
    glyph_ids: Vec<u16>,
}

#[derive(Debug, Clone, Copy)]
struct Segment {
    start: u16,
    end: u16,
    delta: u16,
    /// Index into `glyph_ids` of the entry for `start`, when the segment maps through the array.
    array_start: Option<usize>,
}

fn be_u16(data: &[u8], at: usize) -> Option<u16> {
    let b = data.get(at..at + 2)?;
    Some(u16::from_be_bytes([b[0], b[1]]))
}

fn be_u32(data: &[u8], at: usize) -> Option<u32> {
    let b = data.get(at..at + 4)?;
    Some(u32::from_be_bytes([b[0], b[1], b[2], b[3]]))
}

fn table<'a>(data: &'a [u8], tag: &[u8; 4]) -> Option<&'a [u8]> {
    let count = be_u16(data, 4)? as usize;
    for i in 0..count {
        let rec = 12 + 16 * i;
        if data.get(rec..rec + 4)? == tag {
            let offset = be_u32(data, rec + 8)? as usize;
            let length = be_u32(data, rec + 12)? as usize;
            return data.get(offset..offset + length);
        }
    }
    None
}

impl Metrics {
    /// Reads the metrics of a TrueType face; `None` when a table is missing or malformed.
    fn parse(data: &[u8]) -> Option<Metrics> {
        let head = table(data, b"head")?;
        let units_per_em = f64::from(be_u16(head, 18)?);
        let hhea = table(data, b"hhea")?;
        let long_metrics = be_u16(hhea, 34)? as usize;
        let hmtx = table(data, b"hmtx")?;
        let advances = (0..long_metrics)
            .map(|i| be_u16(hmtx, 4 * i))
            .collect::<Option<Vec<u16>>>()?;

        let cmap = table(data, b"cmap")?;
        let subtables = be_u16(cmap, 2)? as usize;
        let mut format4 = None;
        for i in 0..subtables {
            let rec = 4 + 8 * i;
            let platform = be_u16(cmap, rec)?;
            let encoding = be_u16(cmap, rec + 2)?;
            let offset = be_u32(cmap, rec + 4)? as usize;
            let unicode_bmp = (platform == 3 && encoding == 1) || platform == 0;
            if unicode_bmp && be_u16(cmap, offset)? == 4 {
                format4 = Some(offset);
                break;
            }
        }
        let sub = cmap.get(format4?..)?;
        let length = be_u16(sub, 2)? as usize;
        let sub = sub.get(..length)?;
        let seg_count = be_u16(sub, 6)? as usize / 2;
        let ends = 14;
        let starts = ends + 2 * seg_count + 2;
        let deltas = starts + 2 * seg_count;
        let range_offsets = deltas + 2 * seg_count;
        let array = range_offsets + 2 * seg_count;
        let mut segments = Vec::with_capacity(seg_count);
        for s in 0..seg_count {
            let end = be_u16(sub, ends + 2 * s)?;
            let start = be_u16(sub, starts + 2 * s)?;
            let delta = be_u16(sub, deltas + 2 * s)?;
            let range_offset = be_u16(sub, range_offsets + 2 * s)? as usize;
            // The offset is relative to the position of the offset itself (the format's own
            // convention); convert it to an index into the glyph id array.
            let array_start = if range_offset == 0 {
                None
            } else {
                let byte = range_offsets + 2 * s + range_offset;
                Some(byte.checked_sub(array)? / 2)
            };
            segments.push(Segment {
                start,
                end,
                delta,
                array_start,
            });
        }
        let glyph_ids = (array..sub.len())
            .step_by(2)
            .map(|at| be_u16(sub, at))
            .collect::<Option<Vec<u16>>>()?;
        Some(Metrics {
            units_per_em,
            advances,
            segments,
            glyph_ids,
        })
    }

    fn glyph(&self, c: char) -> u16 {
        let Ok(code) = u16::try_from(u32::from(c)) else {
            return 0;
        };
        let i = self.segments.partition_point(|s| s.end < code);
        let Some(seg) = self.segments.get(i) else {
            return 0;
        };
        if code < seg.start {
            return 0;
        }
        match seg.array_start {
            None => code.wrapping_add(seg.delta),
            Some(base) => {
                let id = self
                    .glyph_ids
                    .get(base + usize::from(code - seg.start))
                    .copied()
                    .unwrap_or(0);
                if id == 0 {
                    0
                } else {
                    id.wrapping_add(seg.delta)
                }
            }
        }
    }

    fn advance(&self, c: char) -> f64 {
        let id = usize::from(self.glyph(c));
        // Glyphs past the long metrics share the last advance (the `hmtx` convention).
        let units = self
            .advances
            .get(id)
            .or(self.advances.last())
            .copied()
            .unwrap_or(0);
        f64::from(units) / self.units_per_em
    }

    /// Width of `text` at font size `size`, in the same unit as `size`. Kerning is off in every
    /// page this module writes, so the sum of advances is the rendered width.
    pub fn width(&self, text: &str, size: f64) -> f64 {
        text.chars().map(|c| self.advance(c)).sum::<f64>() * size
    }
}

/// A measure that never fails: the average advance of the face, used only if the bundled font
/// could not be read (which the tests rule out).
const FALLBACK_EM: f64 = 0.55;

/// Width of `text` at `size` in the bundled face of the given weight.
pub fn text_width(text: &str, size: f64, bold: bool) -> f64 {
    static REG: OnceLock<Option<Metrics>> = OnceLock::new();
    static BLD: OnceLock<Option<Metrics>> = OnceLock::new();
    let metrics = if bold {
        BLD.get_or_init(|| Metrics::parse(BOLD))
    } else {
        REG.get_or_init(|| Metrics::parse(REGULAR))
    };
    match metrics {
        Some(m) => m.width(text, size),
        None => text.chars().count() as f64 * size * FALLBACK_EM,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bundled_faces_parse_and_have_glyphs() {
        for (bytes, name) in [(REGULAR, "regular"), (BOLD, "bold")] {
            let m = Metrics::parse(bytes).expect(name);
            for c in ['A', 'z', '0', '=', '±', '°', 'µ', '²', '−', '…', 'α'] {
                assert_ne!(m.glyph(c), 0, "{name} has no glyph for {c}");
            }
        }
    }

    #[test]
    fn widths_are_plausible() {
        // Digits are tabular in this face: every digit has the same advance.
        let w0 = text_width("0", 10.0, false);
        for d in '1'..='9' {
            assert!((text_width(&d.to_string(), 10.0, false) - w0).abs() < 1e-9);
        }
        assert!(w0 > 4.0 && w0 < 7.0, "digit width {w0}");
        assert!(text_width("MMMM", 10.0, false) > text_width("iiii", 10.0, false));
        assert!(text_width("Bold", 10.0, true) > text_width("Bold", 10.0, false));
        assert!((text_width("ab", 20.0, false) - 2.0 * text_width("ab", 10.0, false)).abs() < 1e-9);
    }

    #[test]
    fn database_holds_the_bundled_family() {
        let db = database();
        assert_eq!(db.len(), 2);
        assert!(
            db.faces()
                .all(|f| f.families.iter().any(|(n, _)| n == FAMILY))
        );
    }
}
