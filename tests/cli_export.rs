//! The headless `export` command and the interchange formats, called in-process on the demo
//! project: page sizes, text that must be on the page (read back from the PDF with the `lopdf`
//! crate), byte-identical SVG, the CSV round trip, the formula-injection guard and
//! an import that reports what it cannot match and changes nothing.
//!
//! Source of the expected facts: the demo project's own documentation (four factors, a 2^4 with
//! two centre points, 18 runs, a real temperature × time interaction) and the paper sizes of
//! ISO 216 (A4, 210 × 297 mm) and ANSI letter (8.5 × 11 in) at 300 dots per inch.

use std::path::{Path, PathBuf};

use twofold_study::interchange;
use twofold_study::project::{Edit, Project, demo_project, save_project};

fn run(args: &[&str]) -> (i32, String, String) {
    let args: Vec<String> = args.iter().map(|s| s.to_string()).collect();
    let mut out = Vec::new();
    let mut err = Vec::new();
    let code = twofold_app::cli::run(&args, &mut out, &mut err);
    (
        code,
        String::from_utf8_lossy(&out).into_owned(),
        String::from_utf8_lossy(&err).into_owned(),
    )
}

/// A fresh folder for one test, removed when dropped.
struct Scratch(PathBuf);

impl Scratch {
    fn new(name: &str) -> Scratch {
        let dir =
            std::env::temp_dir().join(format!("twofold-export-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        Scratch(dir)
    }

    fn path(&self, file: &str) -> PathBuf {
        self.0.join(file)
    }

    fn s(&self, file: &str) -> String {
        self.path(file).display().to_string()
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

/// The demo with a model chosen for the first response (A, B, C and the AB interaction).
fn demo_with_model() -> Project {
    let mut p = demo_project();
    p.apply(Edit::SetTerms {
        response: 0,
        terms: vec!["A".into(), "B".into(), "C".into(), "AB".into()],
    })
    .unwrap();
    p
}

fn write_project(dir: &Scratch, p: &Project) -> String {
    let path = dir.path("project.ron");
    save_project(&path, p).unwrap();
    path.display().to_string()
}

fn export_ok(args: &[&str]) -> String {
    let mut full = vec!["export"];
    full.extend_from_slice(args);
    let (code, out, err) = run(&full);
    assert_eq!(code, 0, "stderr: {err}");
    assert!(out.starts_with("wrote "), "{out}");
    out
}

/// The text on every page of a PDF, laid out as lines: an independent reader (the `lopdf` crate
/// parses the file) that places every glyph by its text and transformation matrices, following
/// the form objects the pages draw, then writes the glyphs of one baseline left to right with a
/// space where a gap is wider than a fifth of the font size, lines from the top of the page down.
/// It reads the fonts our writer embeds (Type 0, two-byte codes, widths in `/W`).
fn pdf_text(pdf: &Path) -> String {
    let doc = lopdf::Document::load(pdf).unwrap();
    let pages = doc.get_pages();
    assert!(!pages.is_empty(), "the PDF has no page");
    let mut text = String::new();
    for id in pages.values() {
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
    }
    text
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

/// Width, height and the share of pixels that are not white.
fn png_facts(path: &Path) -> (u32, u32, f64) {
    let bytes = std::fs::read(path).unwrap();
    let pixmap = tiny_skia::Pixmap::decode_png(&bytes).unwrap();
    let inked = pixmap
        .pixels()
        .iter()
        .filter(|p| p.red() < 200 || p.green() < 200 || p.blue() < 200)
        .count();
    (
        pixmap.width(),
        pixmap.height(),
        inked as f64 / pixmap.pixels().len() as f64,
    )
}

#[test]
fn summary_png_is_a4_or_letter_at_300_dpi_and_not_blank() {
    let dir = Scratch::new("png");
    let project = write_project(&dir, &demo_with_model());
    export_ok(&[&project, "--out", &dir.s("a4.png")]);
    let (w, h, ink) = png_facts(&dir.path("a4.png"));
    assert_eq!((w, h), (2480, 3508));
    // A full page of text, tables and charts inks a few percent of the pixels; a page that lost
    // its text (empty font database) or its drawing would be far below that.
    assert!(ink > 0.03 && ink < 0.5, "ink coverage {ink}");
    export_ok(&[&project, "--out", &dir.s("letter.png"), "--paper", "letter"]);
    let (w, h, ink) = png_facts(&dir.path("letter.png"));
    assert_eq!((w, h), (2550, 3300));
    assert!(ink > 0.03, "ink coverage {ink}");
}

#[test]
fn summary_svg_names_the_factors_and_terms_and_is_byte_identical() {
    let dir = Scratch::new("svg");
    let project = write_project(&dir, &demo_with_model());
    export_ok(&[&project, "--out", &dir.s("one.svg"), "--date", "2025-03-04"]);
    export_ok(&[&project, "--out", &dir.s("two.svg"), "--date", "2025-03-04"]);
    let one = std::fs::read(dir.path("one.svg")).unwrap();
    let two = std::fs::read(dir.path("two.svg")).unwrap();
    assert_eq!(one, two, "same project, same options: byte-identical SVG");
    let svg = String::from_utf8(one).unwrap();
    for name in [
        "Cure temperature",
        "Cure time",
        "Film thickness",
        "Oven air speed",
    ] {
        assert!(svg.contains(name), "factor {name} missing");
    }
    for term in [">A<", ">B<", ">AB<", ">SME<", ">ME<"] {
        assert!(svg.contains(term), "label {term} missing");
    }
    assert!(svg.contains("2025-03-04"));
    assert!(svg.contains("width=\"210mm\" height=\"297mm\""));
}

#[test]
fn summary_pdf_is_vector_with_the_text_on_the_page() {
    let dir = Scratch::new("pdf");
    let p = demo_with_model();
    let project = write_project(&dir, &p);
    export_ok(&[&project, "--out", &dir.s("s.pdf"), "--date", "2025-03-04"]);
    let bytes = std::fs::read(dir.path("s.pdf")).unwrap();
    assert!(bytes.starts_with(b"%PDF-"));
    let raw = String::from_utf8_lossy(&bytes);
    assert!(raw.contains("/FontFile2"), "the font is embedded");
    let pages = raw.matches("/Type /Page").count() - raw.matches("/Type /Pages").count();
    assert_eq!(pages, 1, "one page");
    let text = pdf_text(&dir.path("s.pdf"));
    let hash = twofold_study::export::build::project_hash(&p);
    for needle in [
        "Powder-coating cure (demo)",
        "2025-03-04",
        "Cure temperature",
        "Effect ranking",
        "Half-normal plot of effects",
        "ANOVA of the chosen model",
        "Model equation in natural units",
        "Best settings found",
        "one factor at a time",
        "confirmation runs",
        "safe operating limits",
        "licensed practice",
        "PSE",
        hash.as_str(),
    ] {
        assert!(
            text.contains(needle),
            "`{needle}` not found in the PDF text:\n{text}"
        );
    }
    // The same project gives the same PDF bytes too (no dates or random ids inside).
    export_ok(&[
        &project,
        "--out",
        &dir.s("again.pdf"),
        "--date",
        "2025-03-04",
    ]);
    assert_eq!(std::fs::read(dir.path("again.pdf")).unwrap(), bytes);
}

#[test]
fn blank_run_sheet_png_and_pdf() {
    let dir = Scratch::new("sheet");
    let p = demo_project();
    let project = write_project(&dir, &p);
    export_ok(&[&project, "--out", &dir.s("sheet.png"), "--run-sheet"]);
    let (w, h, ink) = png_facts(&dir.path("sheet.png"));
    assert_eq!((w, h), (2480, 3508));
    assert!(ink > 0.01, "ink coverage {ink}");
    export_ok(&[&project, "--out", &dir.s("sheet.pdf"), "--run-sheet"]);
    let text = pdf_text(&dir.path("sheet.pdf"));
    for needle in [
        // Response headers wrap onto two lines in their column.
        "Solvent rubs",
        "(double rubs)",
        "Gloss 60°",
        "Cure temperature",
        "page 1 of 1",
        "centre point",
    ] {
        assert!(
            text.contains(needle),
            "`{needle}` not on the run sheet:\n{text}"
        );
    }
    // Every run number of the project appears, in run order.
    let positions: Vec<usize> = (1..=p.runs.len())
        .map(|n| {
            text.lines()
                .position(|l| l.split_whitespace().next() == Some(&n.to_string()))
                .unwrap_or_else(|| panic!("run {n} missing:\n{text}"))
        })
        .collect();
    assert!(positions.windows(2).all(|w| w[0] < w[1]), "{positions:?}");
}

#[test]
fn csv_round_trip_is_lossless_and_cells_are_guarded() {
    let dir = Scratch::new("csv");
    let mut p = demo_project();
    p.responses[1].name = "=HYPERLINK(\"http://x\")".into();
    p.runs[0].note = "+1+1, then \"quoted\"\nsecond line".into();
    p.runs[1].values[0].text = "-12.5".into();
    p.runs[2].values[1].text = "@risk".into();
    let project = write_project(&dir, &p);
    export_ok(&[&project, "--out", &dir.s("runs.csv")]);
    let text = std::fs::read_to_string(dir.path("runs.csv")).unwrap();
    assert!(text.starts_with('\u{feff}'), "UTF-8 mark for spreadsheets");
    assert!(
        text.contains("'=HYPERLINK"),
        "formula in a header is neutralised"
    );
    for cell in csv_cells(&text) {
        let risky = cell.starts_with(['=', '+', '-', '@', '\t', '\r']);
        assert!(
            !risky || interchange::is_plain_number(&cell),
            "unguarded cell {cell:?}"
        );
    }
    assert!(
        text.contains("\"'+1+1, then"),
        "formula in a note is neutralised"
    );
    assert!(text.contains("'@risk"));
    assert!(text.contains(",-12.5,"), "a negative number stays a number");
    let back = interchange::read_run_sheet(&p, &text).unwrap();
    let mut expected = p.runs.clone();
    expected.sort_by_key(|r| r.run_order);
    assert_eq!(back, expected, "every run field reads back as written");
}

/// Every cell of a CSV text (RFC 4180 quoting), for checking what a spreadsheet would see.
fn csv_cells(text: &str) -> Vec<String> {
    let mut cells = Vec::new();
    let mut cell = String::new();
    let mut quoted = false;
    let mut chars = text.trim_start_matches('\u{feff}').chars().peekable();
    while let Some(c) = chars.next() {
        match (quoted, c) {
            (true, '"') if chars.peek() == Some(&'"') => {
                chars.next();
                cell.push('"');
            }
            (true, '"') => quoted = false,
            (true, c) => cell.push(c),
            (false, '"') if cell.is_empty() => quoted = true,
            (false, ',') | (false, '\n') => cells.push(std::mem::take(&mut cell)),
            (false, '\r') => {}
            (false, c) => cell.push(c),
        }
    }
    cells
}

#[test]
fn import_reports_unmatched_and_malformed_rows_and_changes_nothing() {
    let p = demo_project();
    let before = p.clone();
    let text = "\
run,Solvent rubs (double rubs),Gloss 60°,operator
1,61,80.4,AK
two,55,80,AK
,55,80,AK
40,55,80,AK
3,55
1,99,99,AK
5,twelve,,AK
";
    let plan = interchange::plan_import(&p, text).unwrap();
    assert_eq!(p, before, "a plan changes nothing");
    let lines: Vec<u64> = plan.problems.iter().map(|r| r.line).collect();
    assert_eq!(lines, vec![3, 4, 5, 6, 7], "{:?}", plan.problems);
    assert!(plan.problems[2].reason.contains("no run 40"));
    assert!(plan.problems[4].reason.contains("appears again"));
    assert_eq!(plan.ignored_columns, vec!["operator".to_string()]);
    let bad: Vec<_> = plan
        .changes
        .iter()
        .filter(|c| c.not_a_number.is_some())
        .collect();
    assert_eq!(bad.len(), 1, "`twelve` is reported");
    assert!(plan.summary().contains("5 rows were not imported"));
    // Applying the plan's edits changes exactly the planned cells.
    let mut q = p.clone();
    for e in plan.edits(None) {
        q.apply(e).unwrap();
    }
    let run5 = q.runs.iter().find(|r| r.run_order == 5).unwrap();
    assert_eq!(run5.values[0].text, "twelve");
    let run40_exists = q.runs.iter().any(|r| r.run_order == 40);
    assert!(!run40_exists);
}

#[test]
fn existing_files_are_never_replaced_without_asking() {
    let dir = Scratch::new("overwrite");
    let project = write_project(&dir, &demo_project());
    let target = dir.path("keep.pdf");
    std::fs::write(&target, b"engineer's own file").unwrap();
    let (code, _, err) = run(&["export", &project, "--out", &dir.s("keep.pdf")]);
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("exists already") && err.contains("--overwrite"),
        "{err}"
    );
    assert_eq!(err.lines().count(), 1);
    assert_eq!(std::fs::read(&target).unwrap(), b"engineer's own file");
    export_ok(&[&project, "--out", &dir.s("keep.pdf"), "--overwrite"]);
    assert!(std::fs::read(&target).unwrap().starts_with(b"%PDF-"));
}

#[test]
fn bad_input_exits_2_and_failures_exit_1_with_one_line() {
    let dir = Scratch::new("errors");
    let project = write_project(&dir, &demo_project());
    let cases: &[(&[&str], i32, &str)] = &[
        (&["export"], 2, "no project file"),
        (&["export", &project], 2, "--out"),
        (
            &["export", &project, "--out", "x.jpg"],
            2,
            ".png, .svg, .pdf or .csv",
        ),
        (
            &["export", "missing.ron", "--out", "x.pdf"],
            2,
            "missing.ron",
        ),
        (
            &["export", &project, "--out", "x.pdf", "--response", "Haze"],
            2,
            "no response “Haze”",
        ),
        (
            &["export", &project, "--out", "x.pdf", "--paper", "a3"],
            2,
            "a4 or letter",
        ),
    ];
    for (argv, code, needle) in cases {
        let (c, _, err) = run(argv);
        assert_eq!(c, *code, "{argv:?}: {err}");
        assert!(err.contains(needle), "{argv:?}: {err}");
        assert_eq!(err.lines().count(), 1, "{argv:?}: {err}");
    }
    let missing_dir = dir.path("no-such-folder").join("s.svg");
    let (c, _, err) = run(&[
        "export",
        &project,
        "--out",
        &missing_dir.display().to_string(),
    ]);
    assert_eq!(c, 1, "{err}");
    assert!(err.contains("could not write"), "{err}");
    let (c, out, _) = run(&["export", "--help"]);
    assert_eq!(c, 0);
    assert!(out.contains("--run-sheet"));
}
