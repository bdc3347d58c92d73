//! Placing text labels beside what they name so that no two labels overlap, and shortening a
//! label at whole words so that it fits its column.
//!
//! Pure geometry: the caller measures the text and says where each label may go; nothing here
//! paints, so the rules are tested without a window.

use egui::{Pos2, Rect, Vec2, pos2};

/// Places labels in order of priority (the first wish first).
///
/// Each wish lists the rectangles its label may take, best first. A label takes the first of its
/// candidates that lies inside `bounds` and keeps `gap` clear of every label placed before it;
/// a candidate that also keeps clear of every `obstacle` (markers, other labels already painted)
/// is preferred over one that does not. A label without any free candidate is left out (`None`):
/// its text stays reachable on hover. So no two placed labels ever overlap.
pub fn place(
    wishes: &[Vec<Rect>],
    obstacles: &[Rect],
    bounds: Rect,
    gap: f32,
) -> Vec<Option<Rect>> {
    let mut placed: Vec<Rect> = Vec::with_capacity(wishes.len());
    let mut out = Vec::with_capacity(wishes.len());
    for candidates in wishes {
        let free = |r: &Rect| {
            bounds.contains_rect(*r) && placed.iter().all(|p| !p.expand(gap).intersects(*r))
        };
        // Only the obstacles within reach of this label's candidates can be in its way (a
        // chart of thousands of points has most of them far away).
        let reach = candidates.iter().fold(Rect::NOTHING, |a, r| a.union(*r));
        let near: Vec<&Rect> = obstacles.iter().filter(|o| o.intersects(reach)).collect();
        let clear = |r: &Rect| near.iter().all(|o| !o.intersects(*r));
        let chosen = candidates
            .iter()
            .find(|r| free(r) && clear(r))
            .or_else(|| candidates.iter().find(|r| free(r)))
            .copied();
        if let Some(r) = chosen {
            placed.push(r);
        }
        out.push(chosen);
    }
    out
}

/// Which sides of a marker a label may take.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Sides {
    /// Right first, then left, then above and below.
    All,
    /// Only to the right (line ends, whose left is the line itself).
    Right,
}

/// Candidate rectangles of `size` beside a marker at `at` that reaches `r` from its centre, best
/// first: level with the marker (right, then left, then above and below), then right and left
/// moved up and down by half a label height at a time, up to `steps` heights away.
pub fn around(at: Pos2, size: Vec2, r: f32, sides: Sides, steps: usize) -> Vec<Rect> {
    let pad = r + 3.0;
    let right = |dy: f32| Rect::from_min_size(pos2(at.x + pad, at.y - size.y / 2.0 + dy), size);
    let left =
        |dy: f32| Rect::from_min_size(pos2(at.x - pad - size.x, at.y - size.y / 2.0 + dy), size);
    let mut v = vec![right(0.0)];
    if sides == Sides::All {
        v.push(left(0.0));
        v.push(Rect::from_min_size(
            pos2(at.x - size.x / 2.0, at.y - pad - size.y),
            size,
        ));
        v.push(Rect::from_min_size(
            pos2(at.x - size.x / 2.0, at.y + pad),
            size,
        ));
    }
    for k in 1..=2 * steps {
        let dy = size.y * 0.5 * k as f32;
        for d in [-dy, dy] {
            v.push(right(d));
            if sides == Sides::All {
                v.push(left(d));
            }
        }
    }
    v
}

/// Space between two rows of line names, more than the gap [`place`] is asked to keep.
pub const ROW_GAP: f32 = 4.0;

/// Height of a strip with `rows` rows of line names of height `h`.
pub fn strip_height(rows: usize, h: f32) -> f32 {
    rows as f32 * (h + ROW_GAP)
}

/// Candidate rectangles of `size` for the name of a vertical line at `x` in a strip of `rows`
/// rows from `top` (see [`strip_height`]): centred on the line, then just left of it, then just
/// right of it, on each row from the top down.
pub fn on_line(x: f32, top: f32, size: Vec2, rows: usize) -> Vec<Rect> {
    let mut v = Vec::with_capacity(3 * rows);
    for row in 0..rows {
        let y = top + row as f32 * (size.y + ROW_GAP);
        v.push(Rect::from_min_size(pos2(x - size.x / 2.0, y), size));
        v.push(Rect::from_min_size(pos2(x - 3.0 - size.x, y), size));
        v.push(Rect::from_min_size(pos2(x + 3.0, y), size));
    }
    v
}

/// Whether a placed label sits away from its marker at `at` (so a thin leader line should join
/// them): true when the marker's height is outside the label's.
pub fn is_displaced(label: Rect, at: Pos2) -> bool {
    !label.y_range().contains(at.y)
}

/// The end of a leader line from a marker at `at` to its label: the nearest point of the
/// label's edge.
pub fn leader_end(label: Rect, at: Pos2) -> Pos2 {
    pos2(
        at.x.clamp(label.left(), label.right()),
        at.y.clamp(label.top(), label.bottom()),
    )
}

/// The longest beginning of `parts` joined by `sep` whose width (by `measure`) fits `max_width`,
/// cut only between whole parts and then marked with `…`; the first part is always kept whole.
/// Returns the text and whether anything was left out.
///
/// So a list of aliases or of factor names is never cut in the middle of a word; the caller
/// shows the full text on hover.
pub fn fit_parts(
    parts: &[String],
    sep: &str,
    max_width: f32,
    measure: impl Fn(&str) -> f32,
) -> (String, bool) {
    let Some((first, rest)) = parts.split_first() else {
        return (String::new(), false);
    };
    let full = parts.join(sep);
    if measure(&full) <= max_width {
        return (full, false);
    }
    let mut text = first.clone();
    for part in rest {
        let longer = format!("{text}{sep}{part}");
        if measure(&format!("{longer}{sep}…")) > max_width {
            break;
        }
        text = longer;
    }
    text.push_str(sep.trim_end());
    text.push_str(" …");
    (text, true)
}

#[cfg(test)]
mod tests {
    use super::*;
    use egui::vec2;

    fn overlaps(placed: &[Option<Rect>]) -> Vec<(usize, usize)> {
        let rects: Vec<(usize, Rect)> = placed
            .iter()
            .enumerate()
            .filter_map(|(i, r)| r.map(|r| (i, r)))
            .collect();
        let mut bad = Vec::new();
        for (a, (i, ra)) in rects.iter().enumerate() {
            for (j, rb) in rects.iter().skip(a + 1) {
                if ra.intersects(*rb) {
                    bad.push((*i, *j));
                }
            }
        }
        bad
    }

    /// A deterministic scatter: `n` points crowded near the origin as small effects are on a
    /// half-normal plot, and a few far out.
    fn crowded(n: usize) -> Vec<Pos2> {
        (0..n)
            .map(|i| {
                let t = i as f32;
                if i % 5 == 4 {
                    pos2(300.0 + 20.0 * t, 40.0 + 3.0 * t)
                } else {
                    pos2(60.0 + (t * 7.3) % 25.0, 250.0 - 6.0 * t)
                }
            })
            .collect()
    }

    #[test]
    fn placed_labels_never_overlap_even_when_the_points_pile_up() {
        let bounds = Rect::from_min_max(pos2(0.0, 0.0), pos2(500.0, 300.0));
        let size = vec2(34.0, 15.0);
        for n in [2, 8, 15, 31, 63] {
            let points = crowded(n);
            let wishes: Vec<Vec<Rect>> = points
                .iter()
                .map(|&p| around(p, size, 5.0, Sides::All, 3))
                .collect();
            let obstacles: Vec<Rect> = points
                .iter()
                .map(|&p| Rect::from_center_size(p, vec2(10.0, 10.0)))
                .collect();
            let placed = place(&wishes, &obstacles, bounds, 2.0);
            assert_eq!(overlaps(&placed), [], "{n} points");
            for r in placed.iter().flatten() {
                assert!(
                    bounds.contains_rect(*r),
                    "{n} points: {r:?} leaves the plot"
                );
            }
            assert!(placed[0].is_some(), "the first label always finds a place");
        }
    }

    #[test]
    fn labels_keep_the_gap_between_them() {
        let bounds = Rect::from_min_max(pos2(0.0, 0.0), pos2(400.0, 400.0));
        let size = vec2(30.0, 14.0);
        // Ten points on one spot: every label must find its own place, or none.
        let wishes: Vec<Vec<Rect>> = (0..10)
            .map(|_| around(pos2(200.0, 200.0), size, 5.0, Sides::All, 4))
            .collect();
        let placed = place(&wishes, &[], bounds, 3.0);
        let rects: Vec<Rect> = placed.iter().flatten().copied().collect();
        assert!(rects.len() >= 8, "room for most of them: {}", rects.len());
        for (a, ra) in rects.iter().enumerate() {
            for rb in rects.iter().skip(a + 1) {
                assert!(
                    !ra.expand(3.0).intersects(*rb),
                    "{ra:?} and {rb:?} closer than the gap"
                );
            }
        }
    }

    #[test]
    fn a_label_keeps_clear_of_markers_when_it_can() {
        let bounds = Rect::from_min_max(pos2(0.0, 0.0), pos2(400.0, 400.0));
        let size = vec2(30.0, 14.0);
        let at = pos2(200.0, 200.0);
        // A marker just right of the point: the label goes to the left instead.
        let marker = Rect::from_center_size(pos2(220.0, 200.0), vec2(10.0, 10.0));
        let placed = place(
            &[around(at, size, 5.0, Sides::All, 1)],
            &[marker],
            bounds,
            2.0,
        );
        let r = placed[0].unwrap();
        assert!(r.right() < at.x, "{r:?}");
        assert!(!is_displaced(r, at));
        // Markers on every candidate: the label still goes somewhere (labels only must not
        // overlap each other).
        let everywhere = [bounds];
        let placed = place(
            &[around(at, size, 5.0, Sides::All, 1)],
            &everywhere,
            bounds,
            2.0,
        );
        assert!(placed[0].is_some());
    }

    #[test]
    fn the_names_of_two_close_lines_are_both_shown_apart() {
        // ME and SME lines 6 px apart: each name takes its own place in a two-row strip.
        let size = vec2(60.0, 14.0);
        let strip = Rect::from_min_max(pos2(0.0, 0.0), pos2(600.0, strip_height(2, size.y)));
        for (me, sme) in [
            (300.0, 306.0),
            (300.0, 340.0),
            (300.0, 420.0),
            (595.0, 599.0),
        ] {
            let placed = place(
                &[on_line(sme, 0.0, size, 2), on_line(me, 0.0, size, 2)],
                &[],
                strip,
                2.0,
            );
            assert!(placed.iter().all(Option::is_some), "{me} {sme}: {placed:?}");
            assert_eq!(overlaps(&placed), [], "{me} {sme}");
        }
    }

    #[test]
    fn a_leader_line_ends_on_the_labels_edge() {
        let label = Rect::from_min_max(pos2(10.0, 10.0), pos2(40.0, 24.0));
        assert!(is_displaced(label, pos2(5.0, 40.0)));
        assert_eq!(leader_end(label, pos2(5.0, 40.0)), pos2(10.0, 24.0));
        assert!(!is_displaced(label, pos2(5.0, 17.0)));
    }

    #[test]
    fn a_long_list_is_cut_between_whole_parts() {
        // Seven pixels a character stand in for the font.
        let measure = |s: &str| 7.0 * s.chars().count() as f32;
        let parts: Vec<String> = ["AB", "= CD", "= EFG", "= ACEF"].map(String::from).to_vec();
        let (all, cut) = fit_parts(&parts, " ", 1000.0, measure);
        assert_eq!((all.as_str(), cut), ("AB = CD = EFG = ACEF", false));
        let (short, cut) = fit_parts(&parts, " ", 7.0 * 14.0, measure);
        assert!(cut);
        assert_eq!(short, "AB = CD …");
        assert!(measure(&short) <= 7.0 * 14.0);
        // Every shortened text is a beginning of whole parts, never a cut word.
        for width in (10..200).step_by(7) {
            let (t, cut) = fit_parts(&parts, " ", width as f32, measure);
            let kept = t.trim_end_matches(" …");
            assert!(
                (0..=parts.len()).any(|k| parts[..k.max(1)].join(" ") == kept),
                "{width}: {t}"
            );
            assert_eq!(cut, kept != parts.join(" "), "{width}: {t}");
        }
        // Names joined by ×: the separator is not left dangling before the ellipsis.
        let names: Vec<String> = ["Cure temperature", "Cure time"].map(String::from).to_vec();
        let (t, _) = fit_parts(&names, " × ", 7.0 * 20.0, measure);
        assert_eq!(t, "Cure temperature × …");
    }
}
