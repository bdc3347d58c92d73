//! Behaviour tests of exporting, importing and pasting from the window, driven through its
//! widgets by label.

use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::{FilePicker, Modal, TwofoldApp};
use twofold_app::panels::Step;
use twofold_study::project::{Factor, Project, ResponseDef, demo_project};

fn harness(app: TwofoldApp) -> Harness<'static, TwofoldApp> {
    Harness::builder()
        .with_size([1500.0, 1000.0])
        .build_ui_state(|ui, app: &mut TwofoldApp| app.ui_in(ui), app)
}

/// Opens the Project menu and clicks `item`.
fn menu(h: &mut Harness<'static, TwofoldApp>, item: &str) {
    h.get_by_label("Project").click();
    h.step();
    h.step();
    h.get_by_label_contains(item).click();
    h.step();
}

/// Steps the window until the export worker has delivered its result.
fn wait_for_export(h: &mut Harness<'static, TwofoldApp>) {
    let start = std::time::Instant::now();
    while h.state().export_running() {
        assert!(start.elapsed().as_secs() < 120, "the export never finished");
        std::thread::sleep(std::time::Duration::from_millis(20));
        h.step();
    }
    h.step();
}

#[test]
fn export_summary_writes_the_page_through_the_file_picker_without_blocking() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("summary.pdf");
    let mut app = TwofoldApp::new_for_test(demo_project());
    app.set_file_picker(FilePicker::Fixed(Some(file.clone())));
    let mut h = harness(app);
    h.step();
    menu(&mut h, "Export summary…");
    assert!(
        h.state().export_running() || file.exists(),
        "the export started"
    );
    wait_for_export(&mut h);
    let bytes = std::fs::read(&file).unwrap();
    assert!(bytes.starts_with(b"%PDF"), "a PDF document was written");
    // The demo has two responses: the summary gives each its page.
    let raw = String::from_utf8_lossy(&bytes);
    let pages = raw.matches("/Type /Page").count() - raw.matches("/Type /Pages").count();
    assert!(pages >= 2, "a page per response, {pages} pages");
    assert!(
        bytes.len() > 10_000,
        "the page has content: {} bytes",
        bytes.len()
    );
    assert!(h.state().modal().is_none(), "{:?}", h.state().modal());
    assert!(h.state().notice().unwrap().contains("Exported the summary"));
}

#[test]
fn export_to_an_unknown_extension_says_so_in_plain_words_and_writes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("summary.docx");
    let mut app = TwofoldApp::new_for_test(demo_project());
    app.set_file_picker(FilePicker::Fixed(Some(file.clone())));
    let mut h = harness(app);
    h.step();
    menu(&mut h, "Export summary…");
    wait_for_export(&mut h);
    match h.state().modal() {
        Some(Modal::Error(text)) => assert!(text.contains(".png, .svg or .pdf"), "{text}"),
        other => panic!("expected an error, got {other:?}"),
    }
    assert!(!file.exists());
}

#[test]
fn printable_run_sheet_is_written_from_the_window() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("sheet.svg");
    let mut app = TwofoldApp::new_for_test(demo_project());
    app.set_file_picker(FilePicker::Fixed(Some(file.clone())));
    let mut h = harness(app);
    h.step();
    menu(&mut h, "Printable run sheet…");
    wait_for_export(&mut h);
    let written: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
    assert!(!written.is_empty(), "a sheet was written");
    let first = std::fs::read_to_string(written[0].as_ref().unwrap().path()).unwrap();
    assert!(first.contains("<svg"));
}

#[test]
fn csv_export_then_import_changes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("runs.csv");
    let mut app = TwofoldApp::new_for_test(demo_project());
    app.set_file_picker(FilePicker::Fixed(Some(file.clone())));
    let mut h = harness(app);
    h.step();
    menu(&mut h, "Export run sheet as CSV…");
    let text = std::fs::read_to_string(&file).unwrap();
    assert!(text.lines().count() > h.state().project().runs.len());
    menu(&mut h, "Import values from CSV…");
    h.step();
    match h.state().modal() {
        Some(Modal::ConfirmImport { plan, .. }) => {
            assert!(plan.changes.is_empty(), "{:?}", plan.changes);
            assert!(plan.problems.is_empty(), "{:?}", plan.problems);
        }
        other => panic!("expected the import preview, got {other:?}"),
    }
}

#[test]
fn import_preview_lists_unmatched_rows_and_changes_nothing_until_confirmed_then_undo_restores() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("values.csv");
    let project = demo_project();
    let name = project.responses[0].name.clone();
    let before = project.clone();
    let run1 = project.runs.iter().position(|r| r.run_order == 1).unwrap();
    std::fs::write(&file, format!("Run,{name}\n1,12.25\n999,3\nseven,4\n")).unwrap();
    let mut app = TwofoldApp::new_for_test(project);
    app.set_file_picker(FilePicker::Fixed(Some(file.clone())));
    let mut h = harness(app);
    h.step();
    menu(&mut h, "Import values from CSV…");
    h.step();
    assert!(matches!(
        h.state().modal(),
        Some(Modal::ConfirmImport { .. })
    ));
    // The preview says what changes and which rows did not match.
    assert!(
        h.query_by_label_contains("Line 3").is_some(),
        "run 999 is reported"
    );
    assert!(
        h.query_by_label_contains("Line 4").is_some(),
        "`seven` is reported"
    );
    assert!(h.query_by_label_contains("→ “12.25”").is_some());
    assert_eq!(
        h.state().project(),
        &before,
        "nothing changes before the confirmation"
    );
    h.get_by_label("Import 1 value").click();
    h.step();
    assert!(h.state().modal().is_none());
    assert_eq!(h.state().project().runs[run1].values[0].text, "12.25");
    h.state_mut().undo();
    h.step();
    assert_eq!(
        h.state().project().runs,
        before.runs,
        "one undo takes the import back"
    );
}

#[test]
fn cancelling_the_import_preview_changes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("values.csv");
    let project = demo_project();
    let name = project.responses[0].name.clone();
    let before = project.clone();
    std::fs::write(&file, format!("Run,{name}\n1,12.25\n")).unwrap();
    let mut app = TwofoldApp::new_for_test(project);
    app.set_file_picker(FilePicker::Fixed(Some(file)));
    let mut h = harness(app);
    h.step();
    menu(&mut h, "Import values from CSV…");
    h.step();
    h.get_by_label("Cancel").click();
    h.step();
    assert!(h.state().modal().is_none());
    assert_eq!(h.state().project(), &before);
    assert!(!h.state().history().can_undo());
}

fn empty_sheet() -> Harness<'static, TwofoldApp> {
    let mut p = Project::new("Coating trial");
    p.factors = vec![
        Factor::numeric("Temperature", "°C", 160.0, 200.0),
        Factor::numeric("Time", "min", 10.0, 20.0),
        Factor::numeric("Pressure", "bar", 1.0, 2.0),
    ];
    p.responses = vec![ResponseDef::new("Gloss", "GU")];
    let mut h = harness(TwofoldApp::new_for_test(p));
    h.state_mut().set_step(Step::Design);
    h.run();
    h.get_by_label(&twofold_app::panels::design::pick_label(8))
        .click();
    h.run();
    h.get_by_label("Make the run sheet").click();
    h.run();
    h.state_mut().set_step(Step::Runs);
    h.run();
    h
}

fn value(h: &Harness<'static, TwofoldApp>, order: u32) -> String {
    let p = h.state().project();
    p.runs
        .iter()
        .find(|r| r.run_order == order)
        .map(|r| r.values[0].text.clone())
        .unwrap_or_default()
}

#[test]
fn pasting_a_column_with_one_bad_cell_reports_it_and_keeps_it_visible() {
    let mut h = empty_sheet();
    h.get_by_label("value run 2 Gloss").focus();
    h.run();
    h.event(egui::Event::Paste("61.5\r\n12,5 mm\r\n63\r\n".into()));
    h.run();
    assert_eq!(value(&h, 1), "", "the paste starts at the focused run");
    assert_eq!(value(&h, 2), "61.5");
    assert_eq!(value(&h, 3), "12,5 mm", "the bad cell is kept, not dropped");
    assert_eq!(value(&h, 4), "63");
    match h.state().modal() {
        Some(Modal::PasteReport(text)) => {
            assert!(text.contains("run 3"), "{text}");
            assert!(text.contains("1 are not numbers"), "{text}");
        }
        other => panic!("expected the paste report, got {other:?}"),
    }
    h.get_by_label("OK").click();
    h.run();
    // Still visible in its cell, marked.
    let cell = h.get_by_label("value run 3 Gloss");
    assert_eq!(cell.value().as_deref(), Some("12,5 mm"));
    // One undo takes the whole paste back.
    h.state_mut().undo();
    h.run();
    assert_eq!(value(&h, 2), "");
    assert_eq!(value(&h, 3), "");
}

#[test]
fn copy_table_puts_the_sheet_on_the_clipboard_as_tab_separated_text() {
    let mut h = empty_sheet();
    h.get_by_label("Copy table").click();
    h.step();
    let copied: Vec<String> = h
        .output()
        .platform_output
        .commands
        .iter()
        .filter_map(|c| match c {
            egui::OutputCommand::CopyText(t) => Some(t.clone()),
            _ => None,
        })
        .collect();
    assert_eq!(copied.len(), 1, "one copy");
    let grid = twofold_study::interchange::parse_grid(&copied[0]);
    assert_eq!(grid.len(), 9, "a header and eight runs");
    assert_eq!(grid[0][0], "Run");
    assert_eq!(grid[1][0], "1", "in run order");
    assert!(grid[0].iter().any(|c| c.starts_with("Gloss")));
}

#[test]
fn typed_block_generators_split_the_run_sheet_into_blocks() {
    let mut p = Project::new("Coating trial");
    p.factors = vec![
        Factor::numeric("Temperature", "°C", 160.0, 200.0),
        Factor::numeric("Time", "min", 10.0, 20.0),
        Factor::numeric("Pressure", "bar", 1.0, 2.0),
    ];
    p.responses = vec![ResponseDef::new("Gloss", "GU")];
    let mut h = harness(TwofoldApp::new_for_test(p));
    h.state_mut().set_step(Step::Design);
    h.run();
    h.get_by_label(&twofold_app::panels::design::pick_label(8))
        .click();
    h.run();
    h.get_by_label("block generators").focus();
    h.run();
    h.get_by_label("block generators").type_text("AB");
    h.run();
    assert!(
        h.query_by_label_contains("B would be confounded").is_none(),
        "AB alone is allowed"
    );
    assert!(h.query_by_label_contains("2 blocks;").is_some());
    h.get_by_label("Make the run sheet").click();
    h.run();
    let p = h.state().project();
    assert_eq!(p.runs.len(), 8);
    // AB is confounded with blocks: its sign decides the block of every run.
    for r in &p.runs {
        let ab = r.levels[0] * r.levels[1];
        let same_sign = p
            .runs
            .iter()
            .filter(|o| o.levels[0] * o.levels[1] == ab)
            .all(|o| o.block == r.block);
        assert!(same_sign, "runs with the same AB sign share a block");
    }
    let blocks: std::collections::BTreeSet<u32> = p.runs.iter().map(|r| r.block).collect();
    assert_eq!(blocks.len(), 2);
}

#[test]
fn a_block_generator_that_would_lose_a_main_effect_is_refused_in_words() {
    let mut p = Project::new("Coating trial");
    p.factors = vec![
        Factor::numeric("Temperature", "°C", 160.0, 200.0),
        Factor::numeric("Time", "min", 10.0, 20.0),
        Factor::numeric("Pressure", "bar", 1.0, 2.0),
    ];
    let mut h = harness(TwofoldApp::new_for_test(p));
    h.state_mut().set_step(Step::Design);
    h.run();
    h.get_by_label("block generators").focus();
    h.run();
    h.get_by_label("block generators").type_text("ABC, BC");
    h.run();
    assert!(h.query_by_label_contains("A would be confounded").is_some());
}
