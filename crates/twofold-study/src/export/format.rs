//! Deterministic number formatting for pages and tables.
//!
//! Every number on an exported page goes through these functions, so the same project always
//! gives the same characters (and the same SVG bytes). They use only Rust's own decimal
//! formatting, which does not depend on the locale or the platform.

/// `x` to `sig` significant digits, plain decimal notation for 1e-4 <= |x| < 1e7, scientific
/// (`1.23e-5`) outside. Trailing zeros are kept so a column of effects lines up; `-0` prints as
/// `0`; NaN and infinities print as `n/a`, `inf` or `-inf` so a bad value is visible, never hidden.
pub fn sig(x: f64, sig: usize) -> String {
    let sig = sig.clamp(1, 15);
    if x.is_nan() {
        return "n/a".to_string();
    }
    if x.is_infinite() {
        return if x > 0.0 { "inf" } else { "-inf" }.to_string();
    }
    if x == 0.0 {
        return if sig > 1 {
            format!("{:.*}", sig - 1, 0.0)
        } else {
            "0".to_string()
        };
    }
    let a = x.abs();
    if !(1e-4..1e7).contains(&a) {
        let s = format!("{:.*e}", sig - 1, x);
        return clean_negative_zero(s);
    }
    let mut magnitude = a.log10().floor() as i32;
    // Rounding can carry into a new digit (9.9996 -> 10.000); one more pass fixes the count.
    for _ in 0..2 {
        let decimals = (sig as i32 - 1 - magnitude).max(0) as usize;
        let s = format!("{:.*}", decimals, x);
        let rounded: f64 = s.parse().unwrap_or(x);
        if rounded.abs() >= 10f64.powi(magnitude + 1) && decimals > 0 {
            magnitude += 1;
            continue;
        }
        return clean_negative_zero(s);
    }
    clean_negative_zero(format!("{x}"))
}

/// Like [`sig`] but without trailing zeros after the decimal point (`9.1200` -> `9.12`), for
/// coefficients, where the zeros would claim a precision nobody asked about.
pub fn sig_trim(x: f64, digits: usize) -> String {
    let s = sig(x, digits);
    let (mantissa, exponent) = match s.find('e') {
        Some(i) => (&s[..i], &s[i..]),
        None => (s.as_str(), ""),
    };
    if !mantissa.contains('.') {
        return s;
    }
    let trimmed = mantissa.trim_end_matches('0').trim_end_matches('.');
    format!("{trimmed}{exponent}")
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
        return sig(x, 1);
    }
    clean_negative_zero(format!("{:.*}", decimals, x))
}

/// A natural-unit factor level: the shortest decimal form that round-trips (`150`, `0.25`,
/// `1e-6`), so the page shows what the engineer typed.
pub fn level(x: f64) -> String {
    if !x.is_finite() {
        return sig(x, 1);
    }
    if x == 0.0 {
        return "0".to_string();
    }
    let a = x.abs();
    if (1e-4..1e9).contains(&a) {
        format!("{x}")
    } else {
        format!("{x:e}")
    }
}

/// A p-value: four decimals, or `< 0.0001`.
pub fn p_value(p: f64) -> String {
    if !p.is_finite() {
        return sig(p, 1);
    }
    if p < 0.0001 {
        "< 0.0001".to_string()
    } else {
        fixed(p, 4)
    }
}

/// A fraction as a percentage with one decimal (`0.9512` -> `95.1 %`).
pub fn percent(x: f64) -> String {
    if !x.is_finite() {
        return sig(x, 1);
    }
    format!("{} %", fixed(100.0 * x, 1))
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_digits() {
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
            assert_eq!(sig(*x, *n), *want, "sig({x}, {n})");
        }
    }

    #[test]
    fn trimmed_and_column_formats() {
        assert_eq!(sig_trim(9.12, 5), "9.12");
        assert_eq!(sig_trim(-0.0417, 5), "-0.0417");
        assert_eq!(sig_trim(250.0, 5), "250");
        assert_eq!(sig_trim(1.5e-6, 5), "1.5e-6");
        assert_eq!(column_decimals(21.5, 4), 2);
        assert_eq!(column_decimals(0.0123, 3), 4);
        assert_eq!(column_decimals(1234.0, 3), 0);
        assert_eq!(column_decimals(0.0, 4), 3);
    }

    #[test]
    fn no_negative_zero() {
        assert_eq!(fixed(-0.0004, 3), "0.000");
        assert_eq!(fixed(-0.0, 1), "0.0");
        assert_eq!(fixed(-0.0006, 3), "-0.001");
    }

    #[test]
    fn levels_show_what_was_typed() {
        assert_eq!(level(150.0), "150");
        assert_eq!(level(0.25), "0.25");
        assert_eq!(level(-1.5), "-1.5");
        assert_eq!(level(0.000_001), "1e-6");
        assert_eq!(level(-0.0), "0");
    }

    #[test]
    fn p_values_and_percentages() {
        assert_eq!(p_value(0.00001), "< 0.0001");
        assert_eq!(p_value(0.04567), "0.0457");
        assert_eq!(percent(0.95123), "95.1 %");
    }
}
