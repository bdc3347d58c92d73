//! Where in two chosen factors every goal is met: a map of cells, the other factors at the best
//! settings. Cells that meet every limit are shaded by the overall desirability; cells that miss
//! a limit are left pale and say which on hover. Computed once per (revision, factors).

use egui::{Color32, ComboBox, RichText, Sense, Stroke, Ui, pos2, vec2};

use super::View;
use super::chart::fmt_num;
use twofold_core::decision::{Limit, Map};
use twofold_study::project::{FactorKind, Project};
use twofold_study::report::Decision;
use twofold_study::report::decision::MAP_STEPS;

/// View state of the map.
#[derive(Debug, Default)]
pub struct LimitsMap {
    /// Factor across and factor up (`None`: the first two controls).
    pub factors: Option<(usize, usize)>,
    cached: Option<(u64, (usize, usize), Option<Map>)>,
}

fn level_text(project: &Project, i: usize, coded: f64) -> String {
    match project.factors.get(i).map(|f| (&f.kind, f.unit.as_str())) {
        Some((FactorKind::Numeric { low, high }, unit)) => {
            let v = 0.5 * (low + high) + coded * 0.5 * (high - low);
            format!("{} {unit}", fmt_num(v, 4))
        }
        Some((
            FactorKind::Categorical {
                low_label,
                high_label,
            },
            _,
        )) => {
            if coded < 0.0 {
                low_label.clone()
            } else {
                high_label.clone()
            }
        }
        None => String::new(),
    }
}

fn limit_words(project: &Project, l: Limit) -> String {
    let name = |i: usize| project.responses.get(i).map_or("", |r| r.name.as_str());
    match l {
        Limit::Mean(i) => format!("“{}” outside its limits", name(i)),
        Limit::Spread(i) => format!("spread of “{}” too large", name(i)),
    }
}

impl LimitsMap {
    /// Draws the factor choosers and the map.
    pub fn ui(&mut self, ui: &mut Ui, view: &View<'_>, revision: u64, d: &Decision) {
        let project = view.project;
        let controls: Vec<usize> = (0..project.factors.len())
            .filter(|&i| project.factors[i].noise_sd.is_none())
            .collect();
        if controls.len() < 2 || d.best.as_ref().map_or(true, |b| b.is_empty()) {
            return;
        }
        let (mut a, mut b) = self.factors.unwrap_or((controls[0], controls[1]));
        ui.add_space(8.0);
        ui.label(RichText::new("Where every goal is met").strong());
        ui.horizontal(|ui| {
            let name = |i: usize| project.factors.get(i).map_or("", |f| f.name.as_str());
            ui.label("across");
            ComboBox::from_id_salt("map_across")
                .selected_text(name(a))
                .show_ui(ui, |ui| {
                    for &i in &controls {
                        ui.selectable_value(&mut a, i, name(i));
                    }
                })
                .response
                .accessible_name("factor across the map");
            ui.label("up");
            ComboBox::from_id_salt("map_up")
                .selected_text(name(b))
                .show_ui(ui, |ui| {
                    for &i in &controls {
                        ui.selectable_value(&mut b, i, name(i));
                    }
                })
                .response
                .accessible_name("factor up the map");
            ui.weak("other factors at the best settings");
        });
        if a == b {
            ui.weak("Choose two different factors.");
            return;
        }
        self.factors = Some((a, b));
        let fresh = matches!(&self.cached, Some((r, f, _)) if *r == revision && *f == (a, b));
        if !fresh {
            self.cached = Some((revision, (a, b), d.map(a, b, MAP_STEPS)));
        }
        let Some((_, _, Some(map))) = &self.cached else {
            return;
        };
        let best = d.best.as_ref().ok().and_then(|v| v.first());
        draw(ui, view, map, best.map(|c| (c.coded[a], c.coded[b])));
    }
}

fn draw(ui: &mut Ui, view: &View<'_>, map: &Map, best: Option<(f64, f64)>) {
    let pal = view.pal;
    let project = view.project;
    let (a, b) = map.factors;
    let side = 300.0;
    let margin = 70.0;
    let (rect, response) =
        ui.allocate_exact_size(vec2(side + margin + 20.0, side + 40.0), Sense::hover());
    let plot = egui::Rect::from_min_size(rect.min + vec2(margin, 4.0), vec2(side, side));
    let painter = ui.painter_at(rect);
    let n = map.steps;
    let cell = side / n as f32;
    // Opaque colours between the page and the accent, so neighbouring cells do not overlap
    // into darker seams.
    let shade = |d: f64| {
        let t = (0.25 + 0.75 * d.clamp(0.0, 1.0)) as f32;
        let mix = |a: u8, b: u8| (f32::from(a) + t * (f32::from(b) - f32::from(a))).round() as u8;
        let (bg, fg) = (pal.plot_bg, pal.accent);
        Color32::from_rgb(
            mix(bg.r(), fg.r()),
            mix(bg.g(), fg.g()),
            mix(bg.b(), fg.b()),
        )
    };
    for row in 0..n {
        for col in 0..n {
            let c = &map.cells[row * n + col];
            let min = pos2(
                plot.left() + col as f32 * cell,
                plot.bottom() - (row + 1) as f32 * cell,
            );
            let r = egui::Rect::from_min_size(min, vec2(cell + 0.5, cell + 0.5));
            let fill = if c.failing.is_empty() {
                shade(c.overall)
            } else {
                pal.card_bg
            };
            painter.rect_filled(r, 0.0, fill);
        }
    }
    painter.rect_stroke(
        plot,
        0.0,
        Stroke::new(1.0, pal.axis),
        egui::StrokeKind::Outside,
    );
    let font = egui::FontId::proportional(12.0);
    let text = |pos, anchor, s: String| {
        painter.text(pos, anchor, s, font.clone(), pal.ink);
    };
    let name = |i: usize| {
        project
            .factors
            .get(i)
            .map_or("", |f| f.name.as_str())
            .to_string()
    };
    text(
        pos2(plot.left(), plot.bottom() + 4.0),
        egui::Align2::LEFT_TOP,
        level_text(project, a, -1.0),
    );
    text(
        pos2(plot.right(), plot.bottom() + 4.0),
        egui::Align2::RIGHT_TOP,
        level_text(project, a, 1.0),
    );
    text(
        pos2(plot.center().x, plot.bottom() + 20.0),
        egui::Align2::CENTER_TOP,
        name(a),
    );
    text(
        pos2(plot.left() - 4.0, plot.bottom()),
        egui::Align2::RIGHT_BOTTOM,
        level_text(project, b, -1.0),
    );
    text(
        pos2(plot.left() - 4.0, plot.top()),
        egui::Align2::RIGHT_TOP,
        level_text(project, b, 1.0),
    );
    text(
        pos2(plot.left() - 4.0, plot.center().y),
        egui::Align2::RIGHT_CENTER,
        name(b),
    );
    if let Some((x, y)) = best {
        let p = pos2(
            plot.left() + ((x as f32 + 1.0) / 2.0) * side,
            plot.bottom() - ((y as f32 + 1.0) / 2.0) * side,
        );
        painter.circle_stroke(p, 6.0, Stroke::new(2.0, pal.ink));
    }
    if let Some(pos) = response.hover_pos()
        && plot.contains(pos)
    {
        let col = (((pos.x - plot.left()) / cell) as usize).min(n - 1);
        let row = (((plot.bottom() - pos.y) / cell) as usize).min(n - 1);
        let c = &map.cells[row * n + col];
        let x = -1.0 + 2.0 * col as f64 / (n - 1) as f64;
        let y = -1.0 + 2.0 * row as f64 / (n - 1) as f64;
        let mut tip = format!(
            "{}: {}\n{}: {}\nD = {}",
            name(a),
            level_text(project, a, x),
            name(b),
            level_text(project, b, y),
            fmt_num(c.overall, 3)
        );
        for l in &c.failing {
            tip.push('\n');
            tip.push_str(&limit_words(project, *l));
        }
        response.on_hover_text_at_pointer(tip);
    }
    ui.weak("Shaded: every goal met, darker where D is higher; pale: some limit missed (point at a cell to see which). The ring marks the best settings.");
}
