//! Text read back from the PDF files the program writes, for the tests of the exports: an
//! independent reader (the `lopdf` crate parses the file) that places every glyph on its page.

use std::path::Path;

/// The text on every page of a PDF, laid out as lines: an independent reader (the `lopdf` crate
/// parses the file) that places every glyph by its text and transformation matrices, following
/// the form objects the pages draw, then writes the glyphs of one baseline left to right with a
/// space where a gap is wider than a fifth of the font size, lines from the top of the page down.
/// It reads the fonts our writer embeds (Type 0, two-byte codes, widths in `/W`).
pub fn pdf_text(pdf: &Path) -> String {
    pdf_page_texts(pdf).concat()
}

/// The text of each page of a PDF, in page order, read as [`pdf_text`] reads it.
pub fn pdf_page_texts(pdf: &Path) -> Vec<String> {
    let doc = lopdf::Document::load(pdf).unwrap();
    let pages = doc.get_pages();
    assert!(!pages.is_empty(), "the PDF has no page");
    let mut texts = Vec::new();
    for id in pages.values() {
        let mut text = String::new();
        let page = doc.get_dictionary(*id).unwrap();
        let resources = resolve_dict(&doc, page.get(b"Resources").unwrap());
        let mut glyphs = Vec::new();
        let content = doc.get_page_content(*id);
        place_glyphs(&doc, &content, resources, IDENTITY, &mut glyphs);
        // Top of the page first (PDF y grows upwards), then left to right.
        glyphs.sort_by(|a, b| b.y.total_cmp(&a.y).then(a.x0.total_cmp(&b.x0)));
        let mut lines: Vec<Vec<&Glyph>> = Vec::new();
        for g in &glyphs {
            match lines.last_mut() {
                Some(line) if (line[0].y - g.y).abs() < 0.3 * g.size => line.push(g),
                _ => lines.push(vec![g]),
            }
        }
        for mut line in lines {
            line.sort_by(|a, b| a.x0.total_cmp(&b.x0));
            let mut previous: Option<&Glyph> = None;
            for g in line {
                if previous.is_some_and(|p| g.x0 - p.x1 > 0.2 * g.size) {
                    text.push(' ');
                }
                text.push_str(&g.text);
                previous = Some(g);
            }
            text.push('\n');
        }
        texts.push(text);
    }
    texts
}

/// One glyph on the page: baseline height, left and right ends, font size (page units).
struct Glyph {
    y: f64,
    x0: f64,
    x1: f64,
    size: f64,
    text: String,
}

type Matrix = [f64; 6];
const IDENTITY: Matrix = [1.0, 0.0, 0.0, 1.0, 0.0, 0.0];

/// `m` then `n`, in PDF's row-vector convention.
fn concat(m: &Matrix, n: &Matrix) -> Matrix {
    [
        m[0] * n[0] + m[1] * n[2],
        m[0] * n[1] + m[1] * n[3],
        m[2] * n[0] + m[3] * n[2],
        m[2] * n[1] + m[3] * n[3],
        m[4] * n[0] + m[5] * n[2] + n[4],
        m[4] * n[1] + m[5] * n[3] + n[5],
    ]
}

fn numbers(operands: &[lopdf::Object]) -> Vec<f64> {
    operands
        .iter()
        .map(|o| o.as_float().map(f64::from).unwrap())
        .collect()
}

fn matrix(operands: &[lopdf::Object]) -> Matrix {
    let v = numbers(operands);
    [v[0], v[1], v[2], v[3], v[4], v[5]]
}

fn resolve_dict<'a>(doc: &'a lopdf::Document, object: &'a lopdf::Object) -> &'a lopdf::Dictionary {
    let (_, object) = doc.dereference(object).unwrap();
    match object {
        lopdf::Object::Stream(stream) => &stream.dict,
        other => other.as_dict().unwrap(),
    }
}

/// The widths (thousandths of the font size) of a Type 0 font's glyphs, by code.
fn glyph_widths(doc: &lopdf::Document, font: &lopdf::Dictionary) -> (f64, Vec<(i64, i64, f64)>) {
    let descendants = doc
        .dereference(font.get(b"DescendantFonts").unwrap())
        .unwrap()
        .1;
    let cid_font = resolve_dict(doc, &descendants.as_array().unwrap()[0]);
    let default = cid_font
        .get(b"DW")
        .ok()
        .and_then(|w| w.as_float().ok())
        .map_or(1000.0, f64::from);
    let mut ranges = Vec::new();
    if let Ok(w) = cid_font.get(b"W") {
        let list = doc.dereference(w).unwrap().1.as_array().unwrap();
        let mut i = 0;
        while i < list.len() {
            let first = list[i].as_i64().unwrap();
            if let Ok(each) = list[i + 1].as_array() {
                for (k, w) in each.iter().enumerate() {
                    let c = first + k as i64;
                    ranges.push((c, c, f64::from(w.as_float().unwrap())));
                }
                i += 2;
            } else {
                let last = list[i + 1].as_i64().unwrap();
                ranges.push((first, last, f64::from(list[i + 2].as_float().unwrap())));
                i += 3;
            }
        }
    }
    (default, ranges)
}

/// Places the glyphs a content stream shows (`Tj`, `TJ`), entering the forms it draws (`Do`).
fn place_glyphs(
    doc: &lopdf::Document,
    content: &[u8],
    resources: &lopdf::Dictionary,
    ctm: Matrix,
    glyphs: &mut Vec<Glyph>,
) {
    use lopdf::Object;
    let operations = lopdf::content::Content::decode(content).unwrap().operations;
    let mut stack = Vec::new();
    let mut ctm = ctm;
    let (mut tm, mut tlm) = (IDENTITY, IDENTITY);
    let mut font = None;
    let mut size = 0.0;
    for op in &operations {
        match op.operator.as_str() {
            "q" => stack.push(ctm),
            "Q" => ctm = stack.pop().unwrap(),
            "cm" => ctm = concat(&matrix(&op.operands), &ctm),
            "BT" => (tm, tlm) = (IDENTITY, IDENTITY),
            "Tm" => (tm, tlm) = (matrix(&op.operands), matrix(&op.operands)),
            "Td" => {
                let v = numbers(&op.operands);
                tlm = concat(&[1.0, 0.0, 0.0, 1.0, v[0], v[1]], &tlm);
                tm = tlm;
            }
            "Tf" => {
                let name = op.operands[0].as_name().unwrap();
                let fonts = resolve_dict(doc, resources.get(b"Font").unwrap());
                let dict = resolve_dict(doc, fonts.get(name).unwrap());
                assert_eq!(dict.get(b"Subtype").unwrap().as_name().unwrap(), b"Type0");
                let encoding = dict.get_font_encoding(doc).unwrap();
                font = Some((encoding, glyph_widths(doc, dict)));
                size = numbers(&op.operands[1..])[0];
            }
            "Tj" | "TJ" => {
                let (encoding, (default, widths)) = font.as_ref().expect("a font is chosen");
                let items: Vec<&Object> = match &op.operands[0] {
                    Object::Array(items) => items.iter().collect(),
                    single => vec![single],
                };
                for item in items {
                    let bytes = match item {
                        Object::String(bytes, _) => bytes,
                        number => {
                            let n = f64::from(number.as_float().unwrap());
                            tm = concat(&[1.0, 0.0, 0.0, 1.0, -n / 1000.0 * size, 0.0], &tm);
                            continue;
                        }
                    };
                    for code in bytes.chunks(2) {
                        let cid = code.iter().fold(0i64, |a, b| a * 256 + i64::from(*b));
                        let w = widths
                            .iter()
                            .find(|(a, b, _)| (*a..=*b).contains(&cid))
                            .map_or(*default, |r| r.2);
                        let advance = w / 1000.0 * size;
                        let start = concat(&tm, &ctm);
                        let end = concat(&[1.0, 0.0, 0.0, 1.0, advance, 0.0], &start);
                        let height = concat(&[1.0, 0.0, 0.0, 1.0, 0.0, size], &start);
                        glyphs.push(Glyph {
                            y: start[5],
                            x0: start[4],
                            x1: end[4],
                            size: (height[5] - start[5]).abs().max((end[4] - start[4]).abs()),
                            text: lopdf::Document::decode_text(encoding, code).unwrap(),
                        });
                        tm = concat(&[1.0, 0.0, 0.0, 1.0, advance, 0.0], &tm);
                    }
                }
            }
            "Do" => {
                let name = op.operands[0].as_name().unwrap();
                let forms = resolve_dict(doc, resources.get(b"XObject").unwrap());
                let Object::Stream(form) = doc.dereference(forms.get(name).unwrap()).unwrap().1
                else {
                    continue;
                };
                if form.dict.get(b"Subtype").unwrap().as_name().unwrap() != b"Form" {
                    continue;
                }
                let inner = form
                    .dict
                    .get(b"Resources")
                    .map_or(resources, |r| resolve_dict(doc, r));
                let form_matrix = form.dict.get(b"Matrix").map_or(IDENTITY, |m| {
                    matrix(doc.dereference(m).unwrap().1.as_array().unwrap())
                });
                let content = form
                    .decompressed_content()
                    .unwrap_or_else(|_| form.content.clone());
                place_glyphs(doc, &content, inner, concat(&form_matrix, &ctm), glyphs);
            }
            _ => {}
        }
    }
}
