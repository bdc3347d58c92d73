//! Numbers for people: one rule for writing a number and one for choosing axis ticks, shared by
//! the window, the summary page and the commands so all three print a value the same way.
//!
//! The rule: a value is written to a number of significant digits, in plain decimal notation for
//! everyday magnitudes (1e-4 <= |x| < 1e7) and as `1.23e-5` outside them; rounding that carries
//! into a new digit (9.9996 -> 10.00) keeps the digit count; a zero that rounding produced has no
//! sign. For display the minus is the typographic minus `−` (U+2212), which lines up with `+` and
//! reads in every font the window and the page bundle; [`plain`] and [`level_plain`] write an ASCII
//! `-` for text a program reads back (CSV cells). Only Rust's own decimal formatting is used, so
//! the output does not depend on the locale or the platform.

/// The typographic minus used on screen and on the page.
pub const MINUS: char = '\u{2212}';

/// `x` (finite) to `sig` significant digits with an ASCII minus; trailing zeros kept unless `trim`.
fn digits(x: f64, sig: usize, trim: bool) -> String {
    let sig = sig.clamp(1, 15);
    if x == 0.0 {
        return if sig > 1 && !trim {
            format!("{:.*}", sig - 1, 0.0)
        } else {
            "0".to_string()
        };
    }
    let a = x.abs();
    let s = if !(1e-4..1e7).contains(&a) {
        format!("{:.*e}", sig - 1, x)
    } else {
        plain_decimal(x, sig)
    };
    let s = clean_negative_zero(s);
    if trim { trim_zeros(&s) } else { s }
}

/// Plain decimal notation of `x` to `sig` significant digits.
fn plain_decimal(x: f64, sig: usize) -> String {
    let mut magnitude = x.abs().log10().floor() as i32;
    // Rounding can carry into a new digit (9.9996 -> 10.000); one more pass fixes the count.
    for _ in 0..2 {
        let decimals = (sig as i32 - 1 - magnitude).max(0) as usize;
        let s = format!("{:.*}", decimals, x);
        let rounded: f64 = s.parse().unwrap_or(x);
        if rounded.abs() >= 10f64.powi(magnitude + 1) && decimals > 0 {
            magnitude += 1;
            continue;
        }
        return s;
    }
    format!("{x}")
}

/// Drops trailing zeros after the decimal point (`9.1200` -> `9.12`, `1.50e-6` -> `1.5e-6`).
fn trim_zeros(s: &str) -> String {
    let (mantissa, exponent) = match s.find('e') {
        Some(i) => (&s[..i], &s[i..]),
        None => (s, ""),
    };
    if !mantissa.contains('.') {
        return s.to_string();
    }
    let trimmed = mantissa.trim_end_matches('0').trim_end_matches('.');
    format!("{trimmed}{exponent}")
}

/// Strips the sign of a zero that rounding produced (`-0.000` -> `0.000`).
fn clean_negative_zero(s: String) -> String {
    if let Some(rest) = s.strip_prefix('-')
        && rest
            .chars()
            .take_while(|c| *c != 'e')
            .all(|c| c == '0' || c == '.')
    {
        return rest.to_string();
    }
    s
}

/// The leading ASCII minus of `s` as the typographic minus.
fn display_minus(s: String) -> String {
    match s.strip_prefix('-') {
        Some(rest) => format!("{MINUS}{rest}"),
        None => s,
    }
}

/// NaN and infinities in words, so a bad value is visible, never hidden.
fn not_finite(x: f64, ascii: bool) -> String {
    match (x.is_nan(), x > 0.0, ascii) {
        (true, _, _) => "n/a".to_string(),
        (false, true, _) => "inf".to_string(),
        (false, false, true) => "-inf".to_string(),
        (false, false, false) => format!("{MINUS}inf"),
    }
}

/// A number for display: up to `sig` significant digits without trailing zeros (`12.35`, `0.5`,
/// `2000`, `−1.5e-6`), for values read one at a time (coefficients, settings, predictions).
pub fn fmt_num(v: f64, sig: usize) -> String {
    if !v.is_finite() {
        return not_finite(v, false);
    }
    display_minus(digits(v, sig, true))
}

/// A number for a column: exactly `sig` significant digits, trailing zeros kept so a column of
/// effects lines up (`−2.50`, `10.00`, `0.00`).
pub fn fmt_sig(v: f64, sig: usize) -> String {
    if !v.is_finite() {
        return not_finite(v, false);
    }
    display_minus(digits(v, sig, false))
}

/// A number for text a program reads back: like [`fmt_num`] but with an ASCII `-`.
pub fn plain(v: f64, sig: usize) -> String {
    if !v.is_finite() {
        return not_finite(v, true);
    }
    digits(v, sig, true)
}

/// Decimals that show `max_abs` (the largest magnitude in a column) to `digits` significant
/// digits; a whole column printed with them lines up on the decimal point.
pub fn column_decimals(max_abs: f64, digits: usize) -> usize {
    if !max_abs.is_finite() || max_abs <= 0.0 {
        return digits.saturating_sub(1);
    }
    let magnitude = max_abs.log10().floor() as i32;
    (digits as i32 - 1 - magnitude).clamp(0, 8) as usize
}

/// `x` with exactly `decimals` places (`-0.00` prints as `0.00`).
pub fn fixed(x: f64, decimals: usize) -> String {
    if !x.is_finite() {
        return not_finite(x, false);
    }
    display_minus(clean_negative_zero(format!("{:.*}", decimals, x)))
}

/// The shortest decimal form of a natural-unit factor level that reads back as the same number
/// (`150`, `0.25`, `1e-6`), ASCII minus: what the engineer typed, for CSV cells.
pub fn level_plain(x: f64) -> String {
    if !x.is_finite() {
        return not_finite(x, true);
    }
    if x == 0.0 {
        return "0".to_string();
    }
    if (1e-4..1e9).contains(&x.abs()) {
        format!("{x}")
    } else {
        format!("{x:e}")
    }
}

/// A natural-unit factor level for display: [`level_plain`] with the typographic minus.
pub fn level(x: f64) -> String {
    if !x.is_finite() {
        return not_finite(x, false);
    }
    display_minus(level_plain(x))
}

/// A p-value: four decimals, or `< 0.0001`.
pub fn p_value(p: f64) -> String {
    if !p.is_finite() {
        return not_finite(p, false);
    }
    if p < 0.0001 {
        "< 0.0001".to_string()
    } else {
        fixed(p, 4)
    }
}

/// A share of explained variation such as R² (at most 1): four significant digits, `1` only for
/// a fit that is perfect to rounding error (`|1 − x| < 1e-12`), and `> 0.9999` for a value that
/// would round to 1 without being 1 (`0.9512` -> `0.9512`, `0.99996` -> `> 0.9999`).
pub fn fraction_of_one(x: f64) -> String {
    if !x.is_finite() {
        return not_finite(x, false);
    }
    if (1.0 - x).abs() < 1e-12 {
        return "1".to_string();
    }
    let text = fmt_num(x, 4);
    if x < 1.0 && text == "1" {
        "> 0.9999".to_string()
    } else {
        text
    }
}

/// Distance between axis ticks for about `target` intervals over a span of `span`: 1, 2, 2.5 or
/// 5 times a power of ten (a common plotting heuristic, no source).
pub fn tick_step(span: f64, target: usize) -> f64 {
    let raw = span / target.max(1) as f64;
    let power = 10f64.powf(raw.log10().floor());
    [1.0, 2.0, 2.5, 5.0, 10.0]
        .iter()
        .map(|m| m * power)
        .find(|s| *s >= raw * (1.0 - 1e-9))
        .unwrap_or(10.0 * power)
}

/// Round tick values inside `[lo, hi]`, about `target` intervals apart (the window's axes, whose
/// ranges are padded around the data first). The same values as [`Ticks::new`] over that range,
/// less the ticks it adds outside.
pub fn nice_ticks(lo: f64, hi: f64, target: usize) -> Vec<f64> {
    if !(lo.is_finite() && hi.is_finite()) || hi <= lo || target == 0 {
        return Vec::new();
    }
    let step = tick_step(hi - lo, target);
    let first = (lo / step - 1e-9).ceil() as i64;
    let last = (hi / step + 1e-9).floor() as i64;
    (first..=last).map(|i| i as f64 * step).collect()
}

/// A tick label with as few decimals as the step needs (`2.5` one, `0.25` two, `20` none), and
/// never `−0`.
pub fn tick_label(v: f64, step: f64) -> String {
    fixed(v, tick_decimals(step))
}

/// Decimals that write every multiple of `step` exactly.
fn tick_decimals(step: f64) -> usize {
    (0..7)
        .find(|&d| {
            let scaled = step * 10f64.powi(d);
            (scaled - scaled.round()).abs() < 1e-6 * scaled.abs().max(1.0)
        })
        .unwrap_or(6) as usize
}

/// An axis that covers the data: round ends at or beyond it and round ticks between (the page's
/// charts, whose frame is the outermost ticks).
#[derive(Debug, Clone, PartialEq)]
pub struct Ticks {
    /// Axis start (a multiple of `step` at or below the data).
    pub lo: f64,
    /// Axis end (a multiple of `step` at or above the data).
    pub hi: f64,
    /// Distance between ticks (see [`tick_step`]).
    pub step: f64,
}

impl Ticks {
    /// About `target` intervals over the data range `lo..=hi` (any order; a zero-width range is
    /// widened so the axis still has a scale, a non-finite one becomes 0 to 1).
    pub fn new(lo: f64, hi: f64, target: usize) -> Ticks {
        let (mut lo, mut hi) = if lo <= hi { (lo, hi) } else { (hi, lo) };
        if !lo.is_finite() || !hi.is_finite() {
            lo = 0.0;
            hi = 1.0;
        }
        if hi - lo < 1e-12 * lo.abs().max(hi.abs()).max(1e-300) || hi == lo {
            let pad = if lo == 0.0 { 1.0 } else { 0.1 * lo.abs() };
            lo -= pad;
            hi += pad;
        }
        let step = tick_step(hi - lo, target);
        Ticks {
            lo: (lo / step + 1e-9).floor() * step,
            hi: (hi / step - 1e-9).ceil() * step,
            step,
        }
    }

    /// The tick values from `lo` to `hi`.
    pub fn values(&self) -> Vec<f64> {
        let n = ((self.hi - self.lo) / self.step).round().max(0.0) as usize;
        let first = (self.lo / self.step).round() as i64;
        // Multiples of the step, so each value is computed as the window computes it.
        (0..=n as i64)
            .map(|i| (first + i) as f64 * self.step)
            .collect()
    }

    /// A tick value as printed (see [`tick_label`]).
    pub fn label(&self, v: f64) -> String {
        tick_label(v, self.step)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// `s` with the typographic minus written as `-`, to keep the tables below readable.
    fn ascii(s: String) -> String {
        s.replace(MINUS, "-")
    }

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
    fn page_ticks_are_round_and_cover_the_data() {
        let t = Ticks::new(0.0, 13.7, 5);
        assert_eq!(t.step, 5.0);
        assert_eq!(t.values(), vec![0.0, 5.0, 10.0, 15.0]);
        let t = Ticks::new(41.3, 47.9, 4);
        assert_eq!(t.step, 2.0);
        assert!(t.lo <= 41.3 && t.hi >= 47.9);
        assert_eq!(t.label(t.lo), "40");
        let t = Ticks::new(0.012, 0.047, 4);
        assert_eq!(t.step, 0.01);
        assert_eq!(t.label(0.03), "0.03");
        let flat = Ticks::new(5.0, 5.0, 4);
        assert!(flat.lo < 5.0 && flat.hi > 5.0);
        let zero = Ticks::new(0.0, 0.0, 4);
        assert!(zero.hi > zero.lo);
    }

    #[test]
    fn window_and_page_axes_agree_over_the_same_range() {
        // Independent of either implementation: the page axis holds every window tick (same
        // values, same labels) and adds at most one tick beyond each end of the range.
        let ranges = [
            (0.0, 13.7, 5),
            (41.3, 47.9, 4),
            (0.012, 0.047, 4),
            (-0.37, 1.21, 5),
            (-35.2, -3.9, 6),
            (1234.0, 98765.0, 5),
            (-2.0, 2.0, 4),
        ];
        for (lo, hi, n) in ranges {
            let window = nice_ticks(lo, hi, n);
            let page = Ticks::new(lo, hi, n);
            let inside: Vec<f64> = page
                .values()
                .into_iter()
                .filter(|v| (lo..=hi).contains(v))
                .collect();
            assert_eq!(inside, window, "range {lo}..{hi}");
            assert!(page.values().len() <= window.len() + 2, "range {lo}..{hi}");
            let step = window[1] - window[0];
            for v in &window {
                assert_eq!(tick_label(*v, step), page.label(*v), "label of {v}");
            }
        }
    }

    #[test]
    fn display_numbers_print_without_noise() {
        assert_eq!(fmt_num(12.3456, 4), "12.35");
        assert_eq!(fmt_num(-0.5, 3), "\u{2212}0.5");
        assert_eq!(fmt_num(2000.0, 3), "2000");
        assert_eq!(fmt_num(0.0, 3), "0");
        assert_eq!(fmt_num(9.9996, 4), "10");
        assert_eq!(fmt_num(1.5e-6, 5), "1.5e-6");
        assert_eq!(fmt_num(-0.0417, 5), "\u{2212}0.0417");
        assert_eq!(fmt_num(f64::NAN, 3), "n/a");
        assert_eq!(fmt_num(f64::NEG_INFINITY, 3), "\u{2212}inf");
        assert_eq!(tick_label(-0.0, 0.5), "0.0");
        assert_eq!(tick_label(-2.0, 1.0), "\u{2212}2");
        assert_eq!(tick_label(2.5, 2.5), "2.5");
        assert_eq!(tick_label(0.75, 0.25), "0.75");
        assert_eq!(tick_label(20.0, 5.0), "20");
    }

    #[test]
    fn column_numbers_keep_their_digits() {
        let cases: &[(f64, usize, &str)] = &[
            (1234.5678, 4, "1235"),
            (12.345678, 4, "12.35"),
            (0.012345, 3, "0.0123"),
            (-2.5, 3, "-2.50"),
            (9.9996, 4, "10.00"),
            (99.996, 4, "100.0"),
            (0.0, 3, "0.00"),
            (-0.00001, 2, "-1.0e-5"),
            (12345678.0, 3, "1.23e7"),
            (-0.000_000_1, 1, "-1e-7"),
            (f64::NAN, 3, "n/a"),
            (f64::NEG_INFINITY, 3, "-inf"),
            (123456.0, 2, "123456"),
        ];
        for (x, n, want) in cases {
            assert_eq!(ascii(fmt_sig(*x, *n)), *want, "fmt_sig({x}, {n})");
        }
        assert_eq!(column_decimals(21.5, 4), 2);
        assert_eq!(column_decimals(0.0123, 3), 4);
        assert_eq!(column_decimals(1234.0, 3), 0);
        assert_eq!(column_decimals(0.0, 4), 3);
    }

    #[test]
    fn plain_numbers_use_an_ascii_minus() {
        assert_eq!(plain(-0.5, 3), "-0.5");
        assert_eq!(plain(-0.00001, 2), "-1e-5");
        assert_eq!(plain(f64::NEG_INFINITY, 2), "-inf");
        assert_eq!(ascii(fmt_num(-3.25, 4)), plain(-3.25, 4));
    }

    #[test]
    fn no_negative_zero() {
        assert_eq!(fixed(-0.0004, 3), "0.000");
        assert_eq!(fixed(-0.0, 1), "0.0");
        assert_eq!(fixed(-0.0006, 3), "\u{2212}0.001");
        assert_eq!(fmt_sig(-0.00004, 1), "\u{2212}4e-5");
    }

    #[test]
    fn levels_show_what_was_typed() {
        assert_eq!(level_plain(150.0), "150");
        assert_eq!(level_plain(0.25), "0.25");
        assert_eq!(level_plain(-1.5), "-1.5");
        assert_eq!(level(-1.5), "\u{2212}1.5");
        assert_eq!(level_plain(0.000_001), "1e-6");
        assert_eq!(level_plain(-0.0), "0");
    }

    #[test]
    fn p_values() {
        assert_eq!(p_value(0.00001), "< 0.0001");
        assert_eq!(p_value(0.04567), "0.0457");
    }

    #[test]
    fn a_share_of_one_is_never_rounded_up_to_a_perfect_fit() {
        // Common practice, no source: R² shown to four significant digits, 1 only when it is 1.
        assert_eq!(fraction_of_one(1.0), "1");
        assert_eq!(
            fraction_of_one(1.0 - 1e-15),
            "1",
            "rounding error of a perfect fit"
        );
        assert_eq!(fraction_of_one(0.99996), "> 0.9999");
        assert_eq!(fraction_of_one(0.9999), "0.9999");
        assert_eq!(fraction_of_one(0.95123), "0.9512");
        assert_eq!(fraction_of_one(-0.25), "\u{2212}0.25");
    }
}
