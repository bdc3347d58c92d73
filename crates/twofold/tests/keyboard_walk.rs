//! The bench loop, walked by keyboard alone and by mouse, counting what it takes.
//!
//! A new project with 8 factors, the 16-run fraction, a response, 16 values typed as the runs
//! finish, the effects beyond the main effects put in the model, the interaction plots, the
//! summary exported as PNG and the project saved. Every key press that is not part of a typed
//! name or number is counted (Tab, Enter, shortcuts, the Enter or click that confirms a file
//! dialog), and every click. Goals: at most 60 keys by keyboard alone (here with both levels of
//! every factor typed as well), at most 40 clicks and keys with the mouse.

use egui::{Event, Key, Modifiers};
use egui_kittest::Harness;
use egui_kittest::kittest::{NodeT, Queryable};
use twofold_app::app::{FilePicker, TwofoldApp};
use twofold_app::panels::Step;
use twofold_study::project::{FactorKind, Project};

/// The goal of the loop by keyboard alone.
const KEY_BUDGET: usize = 60;

/// The goal of the loop with the mouse (clicks and the keys that are not data).
const MOUSE_BUDGET: usize = 40;

/// The window, and the keys sent to it that count.
struct Walk {
    h: Harness<'static, TwofoldApp>,
    keys: usize,
    log: Vec<String>,
}

impl Walk {
    fn new(app: TwofoldApp) -> Walk {
        let mut h = Harness::builder()
            .with_size([1360.0, 860.0])
            .build_ui_state(|ui, app: &mut TwofoldApp| app.ui_in(ui), app);
        h.run();
        Walk {
            h,
            keys: 0,
            log: Vec::new(),
        }
    }

    /// Lets the window settle: the frames a key press needs (focus moves take one frame). An
    /// export or a file dialog on a worker thread keeps asking for frames until it ends, so a
    /// frame budget running out is not a failure here; the walk waits for those explicitly.
    fn settle(&mut self) {
        for _ in 0..3 {
            let _ = self.h.try_run();
        }
    }

    /// What has the keyboard now (for the log that failures print).
    fn focus(&self) -> String {
        self.h
            .query_by(|n| n.is_focused())
            .map_or("nothing".to_string(), |n| {
                let n = n.accesskit_node();
                format!("{:?} '{}'", n.role(), n.label().unwrap_or_default())
            })
    }

    /// One counted key.
    fn key(&mut self, key: Key) {
        self.keys += 1;
        self.h.key_press(key);
        self.settle();
        let at = self.focus();
        self.log.push(format!("{key:?}→{at}"));
    }

    /// One counted click on the control labelled `label`.
    fn click(&mut self, label: &str) {
        self.keys += 1;
        self.log.push(format!("click '{label}'"));
        // Work on other threads (a file dialog's answer) may take a few frames under load.
        let start = std::time::Instant::now();
        while self.h.query_by_label(label).is_none() {
            assert!(
                start.elapsed().as_secs() < 30,
                "no control labelled '{label}'; the walk so far: {}",
                self.log.join(" ")
            );
            std::thread::sleep(std::time::Duration::from_millis(10));
            self.h.step();
        }
        self.h.get_by_label(label).click();
        self.settle();
    }

    /// Two counted clicks: the Project menu, then `item`.
    fn menu(&mut self, item: &str) {
        self.keys += 2;
        self.log.push(format!("menu '{item}'"));
        self.h.get_by_label("Project").click();
        self.h.step();
        self.h.step();
        // A menu item's label ends with its shortcut ("New Ctrl+N").
        self.h
            .get_by(|n| {
                n.role() == egui::accesskit::Role::Button
                    && n.label().is_some_and(|l| {
                        l.strip_prefix(item)
                            .is_some_and(|rest| rest.is_empty() || rest.starts_with(" Ctrl+"))
                    })
            })
            .click();
        self.settle();
    }

    /// One counted shortcut.
    fn chord(&mut self, key: Key) {
        self.keys += 1;
        self.h.key_press_modifiers(Modifiers::COMMAND, key);
        self.settle();
        let at = self.focus();
        self.log.push(format!("Ctrl+{key:?}→{at}"));
    }

    /// Typed data (a name or a number): not counted.
    fn data(&mut self, text: &str) {
        self.h.event(Event::Text(text.to_string()));
        self.settle();
    }

    fn project(&self) -> &Project {
        self.h.state().project()
    }

    /// Steps the window until `done` holds (a file dialog answers on another thread).
    fn wait_until(&mut self, what: &str, done: impl Fn(&Self) -> bool) {
        let start = std::time::Instant::now();
        while !done(self) {
            assert!(start.elapsed().as_secs() < 120, "{what} never happened");
            std::thread::sleep(std::time::Duration::from_millis(10));
            self.h.step();
        }
        self.settle();
    }

    fn wait_for_export(&mut self) {
        let start = std::time::Instant::now();
        while self.h.state().export_running() {
            assert!(start.elapsed().as_secs() < 120, "the export never finished");
            std::thread::sleep(std::time::Duration::from_millis(20));
            self.h.step();
        }
        self.settle();
    }
}

/// Name, low, high and unit of the eight factors (an invented trial).
const FACTORS: [(&str, &str, &str, &str); 8] = [
    ("Temperature", "160", "200", "°C"),
    ("Time", "10", "20", "min"),
    ("Pressure", "1", "2", "bar"),
    ("Speed", "300", "600", "rpm"),
    ("Dose", "0.5", "1.5", "g/L"),
    ("Humidity", "30", "60", "%"),
    ("Thickness", "40", "80", "µm"),
    ("Gap", "2", "4", "mm"),
];

/// The value measured in run `order` (counted from 1) of the sheet: invented, illustrative
/// only. Temperature raises it, time lowers it, the two interact, plus a little noise.
fn measured(p: &Project, order: u32) -> String {
    let Some(run) = p.runs.iter().find(|r| r.run_order == order) else {
        panic!("no run {order}");
    };
    let (a, b) = (f64::from(run.levels[0]), f64::from(run.levels[1]));
    let noise = f64::from((order * 7) % 5) * 0.3 - 0.6;
    format!("{:.1}", 70.0 + 6.0 * a - 4.0 * b + 3.0 * a * b + noise)
}

/// Types the 16 values in run order, each followed by a counted Enter.
fn type_values(w: &mut Walk) -> Vec<String> {
    let mut typed = Vec::new();
    for order in 1..=16 {
        let v = measured(w.project(), order);
        w.data(&v);
        w.key(Key::Enter);
        typed.push(v);
    }
    typed
}

/// The values of the first response in run order.
fn values_in_run_order(p: &Project) -> Vec<String> {
    let mut typed: Vec<(u32, String)> = p
        .runs
        .iter()
        .map(|r| (r.run_order, r.values[0].text.clone()))
        .collect();
    typed.sort();
    typed.into_iter().map(|(_, t)| t).collect()
}

/// Pages written for `path`: the file itself, or `stem-1.png`, `stem-2.png`, … when the summary
/// takes more than one page.
fn written_pages(path: &std::path::Path) -> usize {
    if path.exists() {
        return 1;
    }
    let stem = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    (1..)
        .take_while(|i| path.with_file_name(format!("{stem}-{i}.png")).exists())
        .count()
}

#[test]
fn the_bench_loop_by_keyboard_alone_takes_at_most_sixty_keys() {
    let dir = tempfile::tempdir().unwrap();
    let summary = dir.path().join("summary.png");
    let saved = dir.path().join("trial.ron");
    // The window opens on some project, as it does on the demo.
    let mut w = Walk::new(TwofoldApp::new_for_test(
        twofold_study::project::demo_project(),
    ));

    // A new project: the keyboard lands on "+ Add factor".
    w.chord(Key::N);
    assert_eq!(w.h.state().step(), Step::Factors);
    w.key(Key::Enter);
    assert_eq!(
        w.project().factors.len(),
        1,
        "Enter on + Add factor adds one"
    );
    // Per factor: name, Tab, low, Tab, high, Tab, unit, Enter (the next factor's name takes
    // the keyboard); after the last one the shortcut to the design goes on.
    for (i, (name, low, high, unit)) in FACTORS.iter().enumerate() {
        w.data(name);
        w.key(Key::Tab);
        w.data(low);
        w.key(Key::Tab);
        w.data(high);
        w.key(Key::Tab);
        w.data(unit);
        if i + 1 < FACTORS.len() {
            w.key(Key::Enter);
        }
    }
    let p = w.project();
    assert_eq!(p.factors.len(), 8, "{}", w.log.join(" "));
    for (f, (name, low, high, unit)) in p.factors.iter().zip(FACTORS) {
        assert_eq!(f.name, name);
        assert_eq!(f.unit, unit);
        let FactorKind::Numeric { low: lo, high: hi } = f.kind else {
            panic!("{name} stays numeric");
        };
        assert_eq!(
            (lo, hi),
            (low.parse().unwrap(), high.parse().unwrap()),
            "{name}"
        );
    }

    // Design: the first option is the 16-run fraction; picking it moves the keyboard to the
    // button that makes the run sheet.
    w.chord(Key::Num2);
    assert_eq!(w.h.state().step(), Step::Design);
    w.key(Key::Enter);
    w.key(Key::Enter);
    assert_eq!(w.project().runs.len(), 16, "the 16-run fraction");
    assert_eq!(w.h.state().step(), Step::Runs);

    // A response: the field for its name has the keyboard; Enter goes on to the next run.
    w.data("Yield");
    w.key(Key::Enter);
    assert_eq!(w.project().responses.len(), 1);
    assert_eq!(w.project().responses[0].name, "Yield");
    let typed = type_values(&mut w);
    assert_eq!(
        values_in_run_order(w.project()),
        typed,
        "every value in its run, in run order"
    );

    // Which effects are real: the button that puts the effects beyond ME in the model.
    w.chord(Key::Num4);
    assert_eq!(w.h.state().step(), Step::Effects);
    w.key(Key::Enter);
    let terms = &w.project().responses[0].model.terms;
    assert!(
        terms.iter().any(|t| t == "A") && terms.iter().any(|t| t.len() == 2),
        "the model holds temperature and an interaction: {terms:?}"
    );

    // What the factors do: the interaction plots are drawn.
    w.chord(Key::Num6);
    assert_eq!(w.h.state().step(), Step::Plots);
    assert!(w.h.query_by_label_contains("Interaction").is_some());

    // The summary as PNG: the shortcut, then Enter in the file dialog.
    w.h.state_mut()
        .set_file_picker(FilePicker::Fixed(Some(summary.clone())));
    w.chord(Key::E);
    w.keys += 1; // Enter in the file dialog
    w.wait_until("the export", |w| {
        w.h.state().export_running() || written_pages(&summary) > 0
    });
    w.wait_for_export();
    assert!(written_pages(&summary) > 0, "the summary PNG was written");

    // Save: the shortcut, then Enter in the file dialog.
    w.h.state_mut()
        .set_file_picker(FilePicker::Fixed(Some(saved.clone())));
    w.chord(Key::S);
    w.keys += 1; // Enter in the file dialog
    w.wait_until("the save", |_| saved.exists());
    assert!(saved.exists(), "the project was saved");
    assert!(!w.h.state().history().is_dirty());

    println!("keys: {} ({})", w.keys, w.log.join(" "));
    assert!(
        w.keys <= KEY_BUDGET,
        "the loop took {} keys, more than {KEY_BUDGET}: {}",
        w.keys,
        w.log.join(" ")
    );
}

#[test]
fn the_bench_loop_with_the_mouse_takes_at_most_forty_clicks_and_keys() {
    let dir = tempfile::tempdir().unwrap();
    let summary = dir.path().join("summary.png");
    let saved = dir.path().join("trial.ron");
    let mut w = Walk::new(TwofoldApp::new_for_test(
        twofold_study::project::demo_project(),
    ));

    w.menu("New");
    // Each factor: "+ Add factor" (its name field takes the keyboard), then the name. Levels and
    // units stay at their defaults here; typing them costs a click in each field.
    for (name, _, _, _) in FACTORS {
        w.click("+ Add factor");
        w.data(name);
    }
    assert_eq!(
        w.project()
            .factors
            .iter()
            .map(|f| f.name.as_str())
            .collect::<Vec<_>>(),
        FACTORS.map(|f| f.0)
    );
    w.click("2  Design");
    w.click(&twofold_app::panels::design::pick_label(16));
    w.click("Make the run sheet");
    assert_eq!(w.project().runs.len(), 16);
    w.click("name of the first response");
    w.data("Yield");
    w.key(Key::Enter);
    let typed = type_values(&mut w);
    assert_eq!(values_in_run_order(w.project()), typed);
    w.click("4  Which effects are real?");
    w.click("Choose the effects beyond ME");
    assert!(!w.project().responses[0].model.terms.is_empty());
    w.click("6  What do the factors do?");
    assert!(w.h.query_by_label_contains("Interaction").is_some());
    w.h.state_mut()
        .set_file_picker(FilePicker::Fixed(Some(summary.clone())));
    w.menu("Export summary…");
    w.keys += 1; // the click on Save in the file dialog
    w.wait_until("the export", |w| {
        w.h.state().export_running() || written_pages(&summary) > 0
    });
    w.wait_for_export();
    assert!(written_pages(&summary) > 0);
    w.h.state_mut()
        .set_file_picker(FilePicker::Fixed(Some(saved.clone())));
    w.menu("Save");
    w.keys += 1; // the click on Save in the file dialog
    w.wait_until("the save", |_| saved.exists());
    assert!(saved.exists());

    println!("clicks and keys: {} ({})", w.keys, w.log.join(" "));
    assert!(
        w.keys <= MOUSE_BUDGET,
        "the loop took {} clicks and keys, more than {MOUSE_BUDGET}: {}",
        w.keys,
        w.log.join(" ")
    );
}

#[test]
fn page_keys_walk_the_steps_in_order_and_stop_at_the_ends() {
    let mut w = Walk::new(TwofoldApp::new_for_test(Project::new("Steps")));
    w.h.state_mut().set_step(Step::Factors);
    w.settle();
    let mut seen = vec![w.h.state().step()];
    for _ in 0..Step::ALL.len() {
        w.chord(Key::PageDown);
        seen.push(w.h.state().step());
    }
    // One more than there are steps: the last stays.
    let mut expected = Step::ALL.to_vec();
    expected.push(*Step::ALL.last().unwrap());
    assert_eq!(seen, expected);
    w.chord(Key::PageUp);
    assert_eq!(w.h.state().step(), Step::ALL[Step::ALL.len() - 2]);
    w.chord(Key::Num1);
    assert_eq!(w.h.state().step(), Step::Factors);
    w.chord(Key::PageUp);
    assert_eq!(w.h.state().step(), Step::Factors, "the first stays");
}

#[test]
fn the_keyboard_follows_a_step_whose_content_arrives_from_another_thread() {
    // With the analysis on a worker thread the step first shows "Computing…", then its
    // controls: the keyboard ends on the step's first decision, not on what was drawn first.
    let mut app = TwofoldApp::new_for_test(twofold_study::project::demo_project());
    app.set_background_compute(true);
    let mut w = Walk::new(app);
    w.chord(Key::Num4);
    w.wait_until("the analysis", |w| {
        w.h.query_by_label("Choose the effects beyond ME").is_some()
    });
    w.settle();
    assert!(
        w.h.get_by_label("Choose the effects beyond ME")
            .is_focused(),
        "focus is on {}",
        w.focus()
    );
}

#[test]
fn a_name_field_that_takes_the_keyboard_is_replaced_by_what_is_typed() {
    // Common practice, no source: like a number field, a name field selects its text when it
    // takes the keyboard, so typing replaces the old name rather than joining it.
    let mut p = Project::new("Names");
    p.factors = vec![
        twofold_study::project::Factor::numeric("Temperature", "°C", 160.0, 200.0),
        twofold_study::project::Factor::numeric("Time", "min", 10.0, 20.0),
    ];
    let mut w = Walk::new(TwofoldApp::new_for_test(p));
    w.chord(Key::Num2);
    w.chord(Key::Num1);
    assert!(
        w.h.get_by_label("name of factor A").is_focused(),
        "the step opens on the first name: {}",
        w.focus()
    );
    w.data("Oven temperature");
    w.key(Key::Tab);
    w.key(Key::Tab);
    w.key(Key::Tab);
    w.data("K");
    w.key(Key::Tab);
    let f = &w.project().factors;
    assert_eq!(f[0].name, "Oven temperature");
    assert_eq!(f[0].unit, "K", "the unit reached by Tab was replaced too");
}
