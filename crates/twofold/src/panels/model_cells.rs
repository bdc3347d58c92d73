//! The fitted model's cells in the interaction plots: at each corner of a pair of factors, the
//! model's predicted mean (every other factor at its centre) with its 95 % confidence interval,
//! drawn as a hollow diamond on an error bar just outside the filled marker of the observed mean
//! (left of the low level, right of the high level), so the bars never sit on the lines.
//!
//! It reads the core's [`InteractionMeans`] directly; nothing here is computed but the layout.

use egui::{Color32, Stroke, Ui};
use twofold_core::means::InteractionMeans;

use super::chart::{Frame, Marker, paint_marker};

/// The model's mean at one corner and its 95 % interval (`None` without residual degrees of
/// freedom).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PredictedCorner {
    /// Predicted mean (analysis scale, like the observed means beside it).
    pub mean: f64,
    /// `(low, high)` of the 95 % confidence interval for the mean.
    pub interval: Option<(f64, f64)>,
}

/// The four corners of one pair, `[j][i]` at level `i` of the first factor and level `j` of the
/// second (0 = low, 1 = high), as the observed means are laid out.
pub type PredictedCorners = [[PredictedCorner; 2]; 2];

/// The words that tell the two kinds of marker apart, shown once above the interaction plots.
pub const LEGEND: &str = "Filled ● ■: observed mean.  Hollow ◇ on a bar: the model's predicted mean with its 95 % interval (other factors at their centre).";

/// How far outside the observed marker the prediction is drawn, in coded units of the x axis.
const OFFSET: f64 = 0.24;
/// The two lines' predictions sit this far either side of [`OFFSET`], so corners at nearly the
/// same height keep their bars apart.
const SPREAD: f64 = 0.06;
/// How far right of the high level (coded +1) the predictions reach: the line labels go beyond.
pub const RIGHT_REACH: f64 = OFFSET + SPREAD + 0.06;

/// The x position (coded) of the prediction at level `i` of the first factor on the line of level
/// `j` of the second.
fn x_of(i: usize, j: usize) -> f64 {
    let out = OFFSET + if j == 0 { -SPREAD } else { SPREAD };
    if i == 0 { -1.0 - out } else { 1.0 + out }
}

/// The model's corners of the pair `(a, b)`, from the core's cells of every pair; `None` when the
/// pair is not among them or its cells are not the four of a 2×2.
pub fn corners_of(cells: &[InteractionMeans], a: usize, b: usize) -> Option<PredictedCorners> {
    let pair = cells.iter().find(|c| c.factors == (a, b))?;
    if pair.cells.len() != 4 {
        return None;
    }
    // The core's standard order: (−,−), (+,−), (−,+), (+,+), first factor changing fastest.
    let at = |i: usize, j: usize| {
        let c = &pair.cells[i + 2 * j];
        PredictedCorner {
            mean: c.predicted,
            interval: c.predicted_interval,
        }
    };
    Some([[at(0, 0), at(1, 0)], [at(0, 1), at(1, 1)]])
}

/// Every value the predicted corners reach (means and interval ends), for a shared y range.
pub fn extent(corners: &PredictedCorners) -> impl Iterator<Item = f64> + '_ {
    corners.iter().flatten().flat_map(|c| {
        let (lo, hi) = c.interval.unwrap_or((c.mean, c.mean));
        [c.mean, lo, hi]
    })
}

/// Paints the corners in `frame`; `colors[j]` is the colour of the line of level `j` of the
/// second factor, so a prediction sits in the colour of the line it belongs to.
pub fn paint(ui: &Ui, frame: &Frame, corners: &PredictedCorners, colors: [Color32; 2]) {
    let painter = ui.painter().with_clip_rect(frame.rect);
    for (j, row) in corners.iter().enumerate() {
        for (i, c) in row.iter().enumerate() {
            let x = x_of(i, j);
            let color = colors[j];
            if let Some((lo, hi)) = c.interval {
                let (top, bottom) = (frame.to_screen(x, hi), frame.to_screen(x, lo));
                let stroke = Stroke::new(1.3, color);
                painter.line_segment([top, bottom], stroke);
                for end in [top, bottom] {
                    painter.line_segment(
                        [end - egui::vec2(4.0, 0.0), end + egui::vec2(4.0, 0.0)],
                        stroke,
                    );
                }
            }
            paint_marker(
                ui,
                frame.to_screen(x, c.mean),
                Marker::Diamond,
                4.5,
                color,
                true,
            );
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use twofold_core::means::CellMean;

    fn cell(settings: [f64; 2], predicted: f64) -> CellMean {
        CellMean {
            settings: settings.to_vec(),
            observed: None,
            n: 0,
            observed_interval: None,
            predicted,
            predicted_interval: Some((predicted - 1.0, predicted + 1.0)),
        }
    }

    #[test]
    fn corners_follow_the_core_standard_order() {
        // Standard order (first factor fastest) against the [j][i] layout of the observed means
        // (common practice, no source).
        let cells = vec![InteractionMeans {
            factors: (0, 2),
            cells: vec![
                cell([-1.0, -1.0], 1.0),
                cell([1.0, -1.0], 2.0),
                cell([-1.0, 1.0], 3.0),
                cell([1.0, 1.0], 4.0),
            ],
        }];
        let c = corners_of(&cells, 0, 2).unwrap();
        assert_eq!(c[0][1].mean, 2.0, "A high, C low");
        assert_eq!(c[1][0].mean, 3.0, "A low, C high");
        assert_eq!(c[1][1].interval, Some((3.0, 5.0)));
        assert!(corners_of(&cells, 0, 1).is_none());
        let ext: Vec<f64> = extent(&c).collect();
        assert_eq!(ext.iter().copied().fold(f64::INFINITY, f64::min), 0.0);
        assert_eq!(ext.iter().copied().fold(f64::NEG_INFINITY, f64::max), 5.0);
    }
}
