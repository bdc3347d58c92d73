//! SVG pages to PNG and PDF, and atomic file writing.
//!
//! Pages are parsed once by `usvg` with a font database that holds only the bundled faces, then
//! rasterised by `resvg` (PNG) or converted to vector PDF by `svg2pdf` (text stays text, with a
//! subset of the font embedded). Neither output depends on fonts installed on the machine.

use std::collections::HashMap;
use std::path::Path;

use pdf_writer::{Content, Finish, Name, Pdf, Rect, Ref, TextStr};

use super::ExportError;
use super::fonts;
use super::page::{DPI, Paper};

/// Output formats, chosen by the file extension.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum Format {
    /// Scalable vector graphics, exactly the page as laid out.
    Svg,
    /// A raster image at 300 dpi.
    Png,
    /// Vector PDF with the font embedded.
    Pdf,
}

impl Format {
    /// The format named by the extension of `path` (`.svg`, `.png`, `.pdf`, any case).
    pub fn from_path(path: &Path) -> Result<Format, ExportError> {
        let ext = path
            .extension()
            .and_then(|e| e.to_str())
            .map(str::to_ascii_lowercase);
        match ext.as_deref() {
            Some("svg") => Ok(Format::Svg),
            Some("png") => Ok(Format::Png),
            Some("pdf") => Ok(Format::Pdf),
            _ => Err(ExportError::UnknownFormat {
                path: path.display().to_string(),
            }),
        }
    }

    /// The usual file extension, without the dot.
    pub fn extension(self) -> &'static str {
        match self {
            Format::Svg => "svg",
            Format::Png => "png",
            Format::Pdf => "pdf",
        }
    }
}

fn parse(svg: &str) -> Result<usvg::Tree, ExportError> {
    let options = usvg::Options {
        fontdb: fonts::database(),
        font_family: fonts::FAMILY.to_string(),
        ..usvg::Options::default()
    };
    usvg::Tree::from_str(svg, &options).map_err(|e| ExportError::Render(e.to_string()))
}

/// Rasterises one page at 300 dpi; the image has exactly the paper's pixel size.
pub fn png(svg: &str, paper: Paper) -> Result<Vec<u8>, ExportError> {
    let tree = parse(svg)?;
    let (w, h) = paper.pixels();
    let mut pixmap = tiny_skia::Pixmap::new(w, h)
        .ok_or_else(|| ExportError::Render(format!("cannot allocate a {w} × {h} image")))?;
    pixmap.fill(tiny_skia::Color::WHITE);
    let size = tree.size();
    let transform =
        tiny_skia::Transform::from_scale(w as f32 / size.width(), h as f32 / size.height());
    resvg::render(&tree, transform, &mut pixmap.as_mut());
    let encoded = pixmap
        .encode_png()
        .map_err(|e| ExportError::Render(format!("png encoding failed: {e}")))?;
    Ok(with_resolution(encoded, DPI))
}

/// Converts pages to one PDF document, one page each, every page at its paper size. The document
/// carries `title` and no dates, so the same pages give the same bytes.
pub fn pdf(pages: &[String], title: &str) -> Result<Vec<u8>, ExportError> {
    let mut alloc = Ref::new(1);
    let catalog_id = alloc.bump();
    let tree_id = alloc.bump();
    let info_id = alloc.bump();
    let mut doc = Pdf::new();
    let mut page_ids = Vec::with_capacity(pages.len());
    for svg in pages {
        let page_id = alloc.bump();
        let content_id = alloc.bump();
        let mut content = Content::new();
        let mut names = Vec::new();
        let mut size = None;
        for (i, layer) in font_layers(svg).iter().enumerate() {
            let tree = parse(layer)?;
            let (chunk, root) = svg2pdf::to_chunk(&tree, svg2pdf::ConversionOptions::default())
                .map_err(|e| ExportError::Render(format!("pdf conversion failed: {e}")))?;
            let mut map = HashMap::new();
            let chunk = chunk.renumber(|old| *map.entry(old).or_insert_with(|| alloc.bump()));
            let root = *map
                .get(&root)
                .ok_or_else(|| ExportError::Render("pdf conversion lost the page".to_string()))?;
            // usvg sizes are CSS pixels (96 per inch); PDF pages are in points (72 per inch).
            let (w, h) = (tree.size().width() * 0.75, tree.size().height() * 0.75);
            size.get_or_insert((w, h));
            let name = format!("P{}", i + 1);
            // The chunk's root object is one point square; scale it to the page.
            content
                .save_state()
                .transform([w, 0.0, 0.0, h, 0.0, 0.0])
                .x_object(Name(name.as_bytes()))
                .restore_state();
            names.push((name, root));
            doc.extend(&chunk);
        }
        let (w, h) = size.ok_or_else(|| ExportError::Render("an empty page".to_string()))?;
        let mut page = doc.page(page_id);
        page.media_box(Rect::new(0.0, 0.0, w, h));
        page.parent(tree_id);
        page.contents(content_id);
        {
            let mut resources = page.resources();
            let mut objects = resources.x_objects();
            for (name, root) in &names {
                objects.pair(Name(name.as_bytes()), *root);
            }
        }
        page.finish();
        doc.stream(content_id, &content.finish());
        page_ids.push(page_id);
    }
    doc.catalog(catalog_id).pages(tree_id);
    doc.pages(tree_id)
        .kids(page_ids.iter().copied())
        .count(page_ids.len() as i32);
    doc.document_info(info_id)
        .title(TextStr(title))
        .producer(TextStr(concat!("Twofold ", env!("CARGO_PKG_VERSION"))));
    Ok(doc.finish())
}

/// Splits a page written by [`super::svg::Svg`] into a layer with everything but bold text and a
/// layer with only the bold text (drawn on top, which is where text is anyway).
///
/// Why: `svg2pdf` writes the fonts of one conversion in hash-map order, so a page that uses two
/// faces could come out with its font objects in either order and the same project would not
/// give the same PDF bytes. One face per conversion makes the output deterministic. The split
/// relies on the writer putting every element on a line of its own, which it always does.
pub fn font_layers(svg: &str) -> Vec<String> {
    let is_bold_text = |l: &str| l.starts_with("<text ") && l.contains(" font-weight=\"bold\"");
    if !svg.lines().any(is_bold_text) {
        return vec![svg.to_string()];
    }
    let mut base = String::with_capacity(svg.len());
    let mut bold = String::new();
    for line in svg.lines() {
        let frame = line.starts_with("<?xml") || line.starts_with("<svg ") || line == "</svg>";
        if is_bold_text(line) {
            bold.push_str(line);
            bold.push('\n');
        } else {
            base.push_str(line);
            base.push('\n');
            if frame {
                bold.push_str(line);
                bold.push('\n');
            }
        }
    }
    vec![base, bold]
}

/// Inserts a `pHYs` chunk after the header so viewers and printers know the image is `dpi` dots
/// per inch (PNG stores dots per metre).
fn with_resolution(png: Vec<u8>, dpi: f64) -> Vec<u8> {
    const IHDR_END: usize = 8 + 4 + 4 + 13 + 4;
    if png.len() < IHDR_END || &png[12..16] != b"IHDR" {
        return png;
    }
    let per_metre = (dpi / 0.0254).round() as u32;
    let mut chunk = Vec::with_capacity(21);
    chunk.extend_from_slice(&9u32.to_be_bytes());
    let mut body = Vec::with_capacity(13);
    body.extend_from_slice(b"pHYs");
    body.extend_from_slice(&per_metre.to_be_bytes());
    body.extend_from_slice(&per_metre.to_be_bytes());
    body.push(1); // unit: metre
    chunk.extend_from_slice(&body);
    chunk.extend_from_slice(&crc32(&body).to_be_bytes());
    let mut out = Vec::with_capacity(png.len() + chunk.len());
    out.extend_from_slice(&png[..IHDR_END]);
    out.extend_from_slice(&chunk);
    out.extend_from_slice(&png[IHDR_END..]);
    out
}

/// CRC-32 as PNG defines it (ISO 3309, polynomial 0xEDB88320, reflected).
fn crc32(data: &[u8]) -> u32 {
    let mut crc = 0xFFFF_FFFFu32;
    for &b in data {
        crc ^= u32::from(b);
        for _ in 0..8 {
            let mask = (crc & 1).wrapping_neg();
            crc = (crc >> 1) ^ (0xEDB8_8320 & mask);
        }
    }
    !crc
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn crc_matches_the_png_reference_value() {
        // The CRC of the ASCII text "IEND" with no data is the well-known 0xAE426082 that ends
        // every PNG file.
        assert_eq!(crc32(b"IEND"), 0xAE42_6082);
    }

    #[test]
    fn pdf_bytes_repeat_for_the_same_pages() {
        let input = crate::export::SummaryInput {
            title: "Bold title".into(),
            ..Default::default()
        };
        let svg = crate::export::summary_pages(&input, crate::export::Paper::A4).remove(0);
        let layers = font_layers(&svg);
        assert_eq!(layers.len(), 2);
        assert!(
            layers[1].contains(">Bold title</text>") && !layers[0].contains(">Bold title</text>")
        );
        let first = pdf(std::slice::from_ref(&svg), "t").unwrap();
        // The fonts of a two-face conversion come out in hash order; ten tries would catch it.
        for _ in 0..10 {
            assert!(
                pdf(std::slice::from_ref(&svg), "t").unwrap() == first,
                "PDF bytes differ between runs"
            );
        }
    }

    #[test]
    fn png_has_the_paper_size_and_says_300_dpi() {
        let svg =
            crate::export::summary_pages(&crate::export::SummaryInput::default(), Paper::Letter)
                .remove(0);
        let bytes = png(&svg, Paper::Letter).unwrap();
        let be = |at: usize| {
            u32::from_be_bytes([bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]])
        };
        assert_eq!((be(16), be(20)), (2550, 3300), "IHDR width and height");
        assert_eq!(&bytes[37..41], b"pHYs");
        assert_eq!(
            (be(41), be(45), bytes[49]),
            (11811, 11811, 1),
            "300 dpi in dots per metre"
        );
        assert_eq!(be(50), crc32(&bytes[37..50]));
        let decoded = tiny_skia::Pixmap::decode_png(&bytes).unwrap();
        assert_eq!((decoded.width(), decoded.height()), (2550, 3300));
    }

    #[test]
    fn format_from_extension() {
        assert_eq!(
            Format::from_path(Path::new("a/B.PDF")).ok(),
            Some(Format::Pdf)
        );
        assert_eq!(
            Format::from_path(Path::new("x.svg")).ok(),
            Some(Format::Svg)
        );
        assert!(Format::from_path(Path::new("x.jpeg")).is_err());
        assert!(Format::from_path(Path::new("noext")).is_err());
    }
}
