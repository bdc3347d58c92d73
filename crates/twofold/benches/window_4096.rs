//! Frame times of the window on a 4096-run study (a 2^12 full factorial), every step drawn
//! headlessly through the real UI with `egui_kittest`.
//!
//! The study is illustrative test input: its values are invented from a formula with
//! deterministic noise (below), not measured.
//!
//! For each step the bench draws a few frames to settle (the analysis is computed before the
//! first timed frame), then times `FRAMES` frames and prints the median and the slowest tenth of
//! three figures:
//! - `ui`: the window's own code for the frame (`TwofoldApp::ui_in`),
//! - `frame`: the whole egui frame (`ui` plus egui's layout bookkeeping and the accessibility
//!   tree the test harness asks for),
//! - `+tess`: `frame` plus tessellation of the frame's shapes into triangles, as the window's
//!   renderer does before painting.
//!
//! It then times the frames right after a typed value is committed, with the analysis on its
//! worker thread as in the window: the first frame must not wait for the analysis.
//!
//! Run with `cargo bench -p twofold --bench window_4096`.

use std::cell::Cell;
use std::rc::Rc;
use std::time::{Duration, Instant};

use egui::{Event, Modifiers, MouseWheelSource, MouseWheelUnit, TouchPhase, pos2, vec2};
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use twofold_app::app::{AppAction, TwofoldApp};
use twofold_app::panels::{Command, Step};
use twofold_study::project::{Cell as RunCell, Edit, Factor, Project, ResponseDef, RunStatus};

/// Timed frames per step.
const FRAMES: usize = 40;

/// The window's default size.
const SIZE: [f32; 2] = [1360.0, 860.0];

/// A 2^12 full factorial (4096 runs) with one response whose values come from
/// `y = 50 + 6A + 4B − 3C + 2AB + 1.5CD + noise`, the noise a deterministic pattern in
/// [−2, 2] from the standard order. Invented values: illustrative test input only.
fn study_4096() -> Project {
    let mut p = Project::new("Illustrative 2^12 study (invented values)");
    for (i, name) in [
        "Temperature",
        "Time",
        "Pressure",
        "Speed",
        "Dose",
        "Humidity",
        "Ratio",
        "Flow",
        "Catalyst",
        "Stirring",
        "Cooling",
        "Thickness",
    ]
    .iter()
    .enumerate()
    {
        let low = 10.0 * (i as f64 + 1.0);
        p.factors.push(Factor::numeric(name, "u", low, 2.0 * low));
    }
    p.responses
        .push(ResponseDef::new("Yield (illustrative)", "%"));
    p.responses[0].model.terms = ["A", "B", "C", "D", "AB", "CD"].map(String::from).to_vec();
    if let Err(e) = p.apply(Edit::RegenerateRuns) {
        panic!("the 2^12 design: {e}");
    }
    assert_eq!(p.runs.len(), 4096, "a 2^12 full factorial has 4096 runs");
    for run in &mut p.runs {
        let s = i64::from(run.std_order);
        let l = |i: usize| f64::from(run.levels[i]);
        let noise = (((37 * s + 11) % 17) - 8) as f64 / 4.0;
        let y = 50.0 + 6.0 * l(0) + 4.0 * l(1) - 3.0 * l(2)
            + 2.0 * l(0) * l(1)
            + 1.5 * l(2) * l(3)
            + noise;
        run.values = vec![RunCell::new(format!("{y:.2}"))];
        run.status = RunStatus::Done;
    }
    p
}

/// Median and 90th percentile of a sample.
fn summary(mut xs: Vec<Duration>) -> (f64, f64) {
    xs.sort();
    let ms = |d: Duration| d.as_secs_f64() * 1e3;
    let at = |q: f64| ms(xs[((xs.len() - 1) as f64 * q).round() as usize]);
    (at(0.5), at(0.9))
}

struct Bench {
    h: Harness<'static, TwofoldApp>,
    ui_time: Rc<Cell<Duration>>,
}

impl Bench {
    fn new(background: bool) -> Bench {
        let mut app = TwofoldApp::new_for_test(study_4096());
        app.set_background_compute(background);
        let ui_time = Rc::new(Cell::new(Duration::ZERO));
        let t = Rc::clone(&ui_time);
        let h = Harness::builder().with_size(SIZE).build_ui_state(
            move |ui, app: &mut TwofoldApp| {
                let start = Instant::now();
                app.ui_in(ui);
                t.set(start.elapsed());
            },
            app,
        );
        Bench { h, ui_time }
    }

    /// One frame: (ui, frame, frame + tessellation).
    fn frame(&mut self) -> (Duration, Duration, Duration) {
        let start = Instant::now();
        self.h.step();
        let frame = start.elapsed();
        let shapes = self.h.output().shapes.clone();
        let ppp = self.h.output().pixels_per_point;
        let t = Instant::now();
        let prims = self.h.ctx.tessellate(shapes, ppp);
        std::hint::black_box(prims);
        (self.ui_time.get(), frame, frame + t.elapsed())
    }

    fn time(&mut self, name: &str) {
        let (mut u, mut f, mut t) = (Vec::new(), Vec::new(), Vec::new());
        for _ in 0..FRAMES {
            let (a, b, c) = self.frame();
            u.push(a);
            f.push(b);
            t.push(c);
        }
        let (u50, u90) = summary(u);
        let (f50, f90) = summary(f);
        let (t50, t90) = summary(t);
        let nodes = self.h.query_all_by(|_| true).count();
        println!(
            "{name:<34} {nodes:5} nodes  ui {u50:7.2} ms (p90 {u90:7.2})   frame {f50:7.2} ms (p90 {f90:7.2})   +tess {t50:7.2} ms (p90 {t90:7.2})"
        );
    }

    /// Settles a step: the analysis computed, the layout stable.
    fn show(&mut self, step: Step) {
        self.h.state_mut().set_step(step);
        self.h.hover_at(pos2(700.0, 450.0));
        for _ in 0..6 {
            self.h.step();
        }
    }
}

fn scroll(h: &Harness<'static, TwofoldApp>, dy: f32) {
    h.event(Event::MouseWheel {
        unit: MouseWheelUnit::Point,
        delta: vec2(0.0, dy),
        phase: TouchPhase::Move,
        source: MouseWheelSource::Unknown,
        modifiers: Modifiers::NONE,
    });
}

fn main() {
    println!(
        "Frame times at {}x{} points, 4096 runs (2^12), {FRAMES} frames per step:",
        SIZE[0], SIZE[1]
    );

    // Every step, the analysis computed in the frame that first needs it (before timing).
    let mut b = Bench::new(false);
    b.show(Step::Factors);
    b.time("Factors");
    b.show(Step::Design);
    b.time("Design");
    b.show(Step::Runs);
    b.time("Run sheet (top)");
    b.h.hover_at(pos2(700.0, 500.0));
    for _ in 0..40 {
        scroll(&b.h, -1500.0);
        b.h.step();
    }
    for _ in 0..6 {
        b.h.step();
    }
    b.time("Run sheet (scrolled)");
    let start = Instant::now();
    b.show(Step::Effects);
    println!(
        "(the analysis of the study, computed in the first frame of the step here and on a worker in the window: {:.1} s)",
        start.elapsed().as_secs_f64()
    );
    b.time("Which effects are real? (4095)");
    b.show(Step::Model);
    b.time("Can the model be trusted?");
    b.show(Step::Plots);
    b.time("What do the factors do? (model)");
    b.h.get_by_label("every pair").click();
    for _ in 0..6 {
        b.h.step();
    }
    b.time("What do the factors do? (every)");
    b.show(Step::Predict);
    b.time("Which settings to run?");
    b.show(Step::NextRuns);
    b.time("What to run next?");

    // A typed value committed with the analysis on its worker, as in the window: the frame that
    // applies it and the frames after it must not wait for the analysis (on this study the
    // analysis takes far longer than the frames measured here).
    let mut b = Bench::new(true);
    for step in [Step::Runs, Step::Effects] {
        b.h.state_mut().set_step(step);
        for _ in 0..4 {
            b.h.step();
        }
        let mut first = Vec::new();
        let mut after = Vec::new();
        for k in 0..10 {
            let text = format!("{:.2}", 60.0 + k as f64 / 10.0);
            b.h.state_mut()
                .act(AppAction::Command(Command::Edit(Edit::SetCell {
                    run: 2000,
                    response: 0,
                    text,
                    at: None,
                })));
            let (_, f, _) = b.frame();
            first.push(f);
            for _ in 0..3 {
                let (_, f, _) = b.frame();
                after.push(f);
            }
        }
        let waiting =
            b.h.query_by_label_contains("Updating the analysis")
                .is_some()
                || b.h.query_by_label("Computing the analysis…").is_some();
        let (f50, f90) = summary(first);
        let (a50, a90) = summary(after);
        println!(
            "{:<34} first frame {f50:7.2} ms (p90 {f90:7.2})   next frames {a50:7.2} ms (p90 {a90:7.2}){}",
            format!("Value typed, {}", step.title()),
            if waiting {
                "   (analysis still on its worker)"
            } else {
                ""
            }
        );
    }
}
