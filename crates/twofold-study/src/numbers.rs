//! Numbers for people: one rule for writing a number and one for choosing axis ticks, shared by
//! the window, the summary page and the commands so all three print a value the same way.

/// Round tick values covering `[lo, hi]`, about `target` of them (1, 2, 2.5 or 5 times a power
/// of ten apart; a common plotting heuristic, no source).
pub fn nice_ticks(lo: f64, hi: f64, target: usize) -> Vec<f64> {
    if !(lo.is_finite() && hi.is_finite()) || hi <= lo || target == 0 {
        return Vec::new();
    }
    let raw = (hi - lo) / target as f64;
    let mag = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 2.5, 5.0, 10.0]
        .iter()
        .map(|m| m * mag)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * mag);
    let first = (lo / step).ceil() as i64;
    let last = (hi / step).floor() as i64;
    (first..=last).map(|i| i as f64 * step).collect()
}

/// A tick label with as few decimals as the step needs.
pub fn tick_label(v: f64, step: f64) -> String {
    // As many decimals as the step needs to be written exactly (2.5 needs one, 0.25 two).
    let decimals = (0..7)
        .find(|&d| {
            let scaled = step * 10f64.powi(d);
            (scaled - scaled.round()).abs() < 1e-6 * scaled.abs().max(1.0)
        })
        .unwrap_or(6) as usize;
    let s = format!("{v:.decimals$}");
    if s.starts_with('-') && s.trim_start_matches(['-', '0', '.']).is_empty() {
        // "-0.0" reads as a bug to a reader.
        s.trim_start_matches('-').to_string()
    } else {
        s.replacen('-', "\u{2212}", 1)
    }
}

/// A number for display: up to `sig` significant digits, no exponent for everyday magnitudes.
pub fn fmt_num(v: f64, sig: usize) -> String {
    if !v.is_finite() {
        return "—".into();
    }
    if v == 0.0 {
        return "0".into();
    }
    let mag = v.abs().log10().floor() as i32;
    if !(-4..=7).contains(&mag) {
        return format!("{v:.*e}", sig.saturating_sub(1));
    }
    let decimals = (sig as i32 - 1 - mag).max(0) as usize;
    let s = format!("{v:.decimals$}");
    let s = if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    };
    s.replacen('-', "\u{2212}", 1)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ticks_are_round_and_inside_the_range() {
        assert_eq!(
            nice_ticks(0.0, 10.0, 5),
            vec![0.0, 2.0, 4.0, 6.0, 8.0, 10.0]
        );
        let t = nice_ticks(-0.37, 1.21, 5);
        assert!(t.iter().all(|v| (-0.37..=1.21).contains(v)));
        // Range 1.58 over 5 ticks is 0.316 a step, rounded up to 0.5.
        assert_eq!(t, vec![0.0, 0.5, 1.0]);
        assert!(nice_ticks(1.0, 1.0, 5).is_empty());
        assert!(nice_ticks(f64::NAN, 1.0, 5).is_empty());
    }

    #[test]
    fn numbers_print_without_noise() {
        assert_eq!(fmt_num(12.3456, 4), "12.35");
        assert_eq!(fmt_num(-0.5, 3), "\u{2212}0.5");
        assert_eq!(fmt_num(2000.0, 3), "2000");
        assert_eq!(fmt_num(0.0, 3), "0");
        assert_eq!(fmt_num(f64::NAN, 3), "—");
        assert_eq!(tick_label(-0.0, 0.5), "0.0");
        assert_eq!(tick_label(-2.0, 1.0), "\u{2212}2");
        assert_eq!(tick_label(2.5, 2.5), "2.5");
        assert_eq!(tick_label(0.75, 0.25), "0.75");
        assert_eq!(tick_label(20.0, 5.0), "20");
    }
}
