//! The headless `export` command and the interchange formats, called in-process on the demo
//! project: page sizes, text that must be on the page (read back from the PDF with the `lopdf`
//! crate), byte-identical SVG, the CSV round trip, the formula-injection guard and
//! an import that reports what it cannot match and changes nothing.
//!
//! Source of the expected facts: the demo project's own documentation (four factors, a 2^4 with
//! two centre points, 18 runs, a real temperature × time interaction) and the paper sizes of
//! ISO 216 (A4, 210 × 297 mm) and ANSI letter (8.5 × 11 in) at 300 dots per inch.

use std::path::{Path, PathBuf};

use crate::pdf_read::pdf_text;
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
    assert!(
        out.starts_with("wrote ") || out.contains("one file per page:\nwrote "),
        "{out}"
    );
    out
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
    export_ok(&[&project, "--out", &dir.s("a4.png"), "--response", "1"]);
    let (w, h, ink) = png_facts(&dir.path("a4.png"));
    assert_eq!((w, h), (2480, 3508));
    // A full page of text, tables and charts inks a few percent of the pixels; a page that lost
    // its text (empty font database) or its drawing would be far below that.
    assert!(ink > 0.03 && ink < 0.5, "ink coverage {ink}");
    // Both responses: a page each, one file per page.
    let out = export_ok(&[&project, "--out", &dir.s("letter.png"), "--paper", "letter"]);
    assert!(out.contains("letter-2.png"), "{out}");
    let (w, h, ink) = png_facts(&dir.path("letter-2.png"));
    assert_eq!((w, h), (2550, 3300));
    assert!(ink > 0.03, "ink coverage {ink}");
}

#[test]
fn summary_svg_names_the_factors_and_terms_and_is_byte_identical() {
    let dir = Scratch::new("svg");
    let project = write_project(&dir, &demo_with_model());
    let one_response = ["--response", "Solvent rubs", "--date", "2025-03-04"];
    export_ok(
        &[
            &[project.as_str(), "--out", &dir.s("one.svg")][..],
            &one_response,
        ]
        .concat(),
    );
    export_ok(
        &[
            &[project.as_str(), "--out", &dir.s("two.svg")][..],
            &one_response,
        ]
        .concat(),
    );
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
    // --response keeps the summary to one response.
    let one = ["--response", "1", "--date", "2025-03-04"];
    export_ok(&[&[project.as_str(), "--out", &dir.s("s.pdf")][..], &one].concat());
    let bytes = std::fs::read(dir.path("s.pdf")).unwrap();
    assert!(bytes.starts_with(b"%PDF-"));
    let raw = String::from_utf8_lossy(&bytes);
    assert!(raw.contains("/FontFile2"), "the font is embedded");
    let pages = raw.matches("/Type /Page").count() - raw.matches("/Type /Pages").count();
    assert_eq!(pages, 1, "one page");
    let text = pdf_text(&dir.path("s.pdf"));
    assert!(text.contains("Response: Solvent rubs"), "{text}");
    assert!(
        !text.contains("Response 2 of 2"),
        "only the response asked for"
    );
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
    export_ok(&[&[project.as_str(), "--out", &dir.s("again.pdf")][..], &one].concat());
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

/// An invented two-response project on eight factors in sixteen runs, the 2^(8-4) fraction of
/// resolution IV with generators E = BCD, F = ACD, G = ABC, H = ABD (a standard choice; every
/// main effect shares its estimate with seven three-factor interactions and the two-factor
/// interactions come in chains of four). The factor names are long on purpose. ILLUSTRATIVE
/// DATA: the values come from the formulas below, nothing was measured.
fn eight_factor_project() -> Project {
    use twofold_study::project::{Cell, DesignSettings, Factor, ResponseDef, RunStatus};
    let mut p = Project::new("Laminating adhesive screening, eight factors (illustrative)");
    p.description = "ILLUSTRATIVE DATA, invented for a test: nothing here was measured.".into();
    let numeric = [
        ("Accelerator concentration in the premix", "phr", 0.5, 1.5),
        ("Cure temperature", "°C", 140.0, 160.0),
        ("Relative humidity during conditioning", "%", 30.0, 70.0),
        ("Primer coat weight", "g/m²", 5.0, 10.0),
    ];
    for (name, unit, low, high) in numeric {
        p.factors.push(Factor::numeric(name, unit, low, high));
    }
    p.factors.push(Factor::categorical(
        "Surface treatment",
        "solvent wipe",
        "corona discharge",
    ));
    p.factors.push(Factor::numeric(
        "Laminating press dwell time",
        "s",
        10.0,
        30.0,
    ));
    p.factors.push(Factor::categorical(
        "Substrate supplier",
        "Northern Mills",
        "Eastbrook Polymers",
    ));
    p.factors
        .push(Factor::numeric("Adhesive lot age", "days", 1.0, 28.0));
    p.responses.push(ResponseDef::new(
        "Peel strength after humid ageing",
        "N/25 mm",
    ));
    p.responses.push(ResponseDef::new("Haze", "%"));
    p.responses[0].model.terms = ["A", "B", "C", "AB"].map(String::from).to_vec();
    p.design = DesignSettings {
        generators: ["E=BCD", "F=ACD", "G=ABC", "H=ABD"]
            .map(String::from)
            .to_vec(),
        base_runs: Some(16),
        seed: 2024,
        ..DesignSettings::default()
    };
    p.apply(Edit::RegenerateRuns).unwrap();
    for run in &mut p.runs {
        let s = i64::from(run.std_order);
        let l: Vec<f64> = run.levels.iter().map(|v| f64::from(*v)).collect();
        let e = (((37 * s + 11) % 17) - 8) as f64 / 8.0;
        let peel = 40.0 + 6.0 * l[0] + 4.0 * l[1] - 3.0 * l[2] + 2.5 * l[0] * l[1] + e;
        let haze = 12.0 - 2.0 * l[3] + 1.5 * l[4] + e / 2.0;
        run.values = vec![
            Cell::new(format!("{peel:.1}")),
            Cell::new(format!("{haze:.2}")),
        ];
        run.status = RunStatus::Done;
    }
    p
}

/// The words of `text` as the page prints them: split at spaces, outer punctuation removed.
fn tokens(text: &str) -> Vec<&str> {
    text.split_whitespace()
        .map(|t| t.trim_matches(|c: char| "(),;:.“”'".contains(c)))
        .filter(|t| !t.is_empty())
        .collect()
}

#[test]
fn summary_of_two_responses_has_every_section_every_alias_chain_and_no_split_word() {
    use twofold_core::alias::{alias_report, chain_label};
    use twofold_core::design::FractionalDesign;
    use twofold_study::export::{BuildOptions, Paper, summary_input, summary_pages};
    use twofold_study::report::Report;

    let dir = Scratch::new("two-responses");
    let p = eight_factor_project();
    let project = write_project(&dir, &p);
    let out = export_ok(&[&project, "--out", &dir.s("s.pdf"), "--date", "2025-03-04"]);
    assert!(
        out.contains("summary of Peel strength after humid ageing, Haze"),
        "{out}"
    );
    let pages = crate::pdf_read::pdf_page_texts(&dir.path("s.pdf"));
    let text = pages.concat();

    // The page count is the layout's: a page per response, then the pages of more detail.
    let reports: Vec<Report> = (0..2).map(|i| Report::for_response(&p, 0, i)).collect();
    let refs: Vec<&Report> = reports.iter().collect();
    let options = BuildOptions {
        date: Some("2025-03-04".into()),
        ..BuildOptions::default()
    };
    for r in &reports {
        assert!(
            r.fit.is_ok(),
            "{}: {:?}",
            r.response_name,
            r.fit.as_ref().err()
        );
    }
    let input = summary_input(&p, &refs, &options);
    let layout = summary_pages(&input, Paper::A4);
    assert_eq!(pages.len(), layout.len(), "{text}");
    assert!(
        pages.len() >= 3,
        "two response pages and the alias chains: {text}"
    );
    for (i, page) in pages.iter().enumerate() {
        assert!(
            page.contains(&format!("page {} of {}", i + 1, pages.len())),
            "page {}:\n{page}",
            i + 1
        );
        assert!(
            page.contains("safe operating limits"),
            "page {}: the caution",
            i + 1
        );
        assert!(!page.contains("in the app"), "page {}:\n{page}", i + 1);
    }

    // Each response on its own page with every section.
    for (i, name) in ["Peel strength after humid ageing", "Haze"]
        .iter()
        .enumerate()
    {
        let page = &pages[i];
        assert!(
            page.contains(&format!("Response {} of 2: {name}", i + 1)),
            "{page}"
        );
        for section in [
            "Effect ranking",
            "Half-normal plot of effects",
            "ANOVA of the chosen model",
            "Best settings found",
            // Two factors have labels, not numbers: the equation is in coded units.
            "Model equation in coded units",
            "R² =",
        ] {
            assert!(
                page.contains(section),
                "{name}: `{section}` missing:\n{page}"
            );
        }
        assert!(
            page.contains(&format!("{name} = ")),
            "{name}: its equation:\n{page}"
        );
    }

    // Every alias chain of the main effects and two-factor interactions, whole, from the core.
    let design = FractionalDesign::from_text(8, Some(16), "E=BCD, F=ACD, G=ABC, H=ABD").unwrap();
    let report = alias_report(&design);
    let chains: Vec<String> = report
        .chains()
        .iter()
        .filter(|(_, a)| !a.is_empty())
        .map(|(t, a)| chain_label(*t, a))
        .collect();
    assert_eq!(
        chains.len(),
        15,
        "8 main-effect chains and 7 two-factor chains"
    );
    for chain in &chains {
        assert_eq!(
            text.matches(chain.as_str()).count(),
            1,
            "chain `{chain}` whole and once:\n{text}"
        );
    }

    // No word is split: every word of the factor names, levels, responses and effect labels is
    // printed whole somewhere, no printed word is the cut-off start of one of them (with or
    // without a hyphen), and text shortened with an ellipsis was shortened by whole words.
    let mut vocabulary: Vec<String> = Vec::new();
    for f in &input.factors {
        for t in [f.name.clone(), f.low.text(), f.high.text()] {
            vocabulary.extend(t.split_whitespace().map(String::from));
        }
    }
    for section in &input.responses {
        vocabulary.extend(section.response.name.split_whitespace().map(String::from));
        for e in &section.effects {
            vocabulary.push(e.label());
        }
    }
    let printed = tokens(&text);
    for word in &vocabulary {
        assert!(
            printed.contains(&word.as_str()),
            "`{word}` never printed whole:\n{text}"
        );
    }
    for token in &printed {
        let stem = token.trim_end_matches('…').trim_end_matches('-');
        if stem.chars().count() < 3 || vocabulary.iter().any(|w| w == stem) {
            continue;
        }
        // A word cut at a line's end leaves its first part as a printed word.
        for word in vocabulary.iter().filter(|w| w.chars().count() > 3) {
            assert!(
                !word.starts_with(stem),
                "`{token}` is the start of `{word}`:\n{text}"
            );
        }
    }
    // Effect labels and their signs are whole on one line.
    for section in &input.responses {
        for e in section.effects.iter().take(8) {
            assert!(
                text.contains(&e.label_with_sign()),
                "effect `{}`:\n{text}",
                e.label_with_sign()
            );
        }
    }

    // The same document as PNG: one file per page.
    let out = export_ok(&[&project, "--out", &dir.s("s.png"), "--date", "2025-03-04"]);
    for i in 1..=layout.len() {
        let file = dir.path(&format!("s-{i}.png"));
        assert!(file.exists(), "{out}");
        let (w, h, _) = png_facts(&file);
        assert_eq!((w, h), (2480, 3508));
    }
    if let Some(keep) = std::env::var_os("TWOFOLD_KEEP_PAGES") {
        // For looking at the pages by eye: copies them to the folder named.
        for i in 1..=layout.len() {
            let name = format!("s-{i}.png");
            std::fs::copy(dir.path(&name), Path::new(&keep).join(name)).unwrap();
        }
    }
}
