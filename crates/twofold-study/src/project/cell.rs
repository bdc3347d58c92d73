//! One typed response value: the text is kept exactly as entered, its number is derived.
//!
//! Reading rules (documented for the engineer in the worksheet's tooltip):
//! - surrounding spaces are ignored; an empty cell is a missing value;
//! - a plain decimal number, optionally signed (`+`, `-` or the typographic minus `−`) and with an
//!   exponent (`1.2e3`);
//! - a decimal comma is accepted when it is the only separator (`12,5` reads as 12.5), because
//!   many bench instruments and spreadsheets write it that way;
//! - anything else — thousands separators (`1,234.5`, `1.234,5`), units (`12.5 mm`), words,
//!   `inf`/`NaN` — is *bad text*: it stays visible with the reason and is left out of the analysis,
//!   never silently dropped or guessed at.

use serde::{Deserialize, Serialize};

/// The text typed into one response cell.
#[derive(Debug, Clone, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(transparent)]
pub struct Cell {
    /// Exactly what the engineer typed (or pasted).
    pub text: String,
}

/// What a cell's text means.
#[derive(Debug, Clone, PartialEq)]
pub enum CellValue {
    /// Nothing typed (or only spaces): a missing value.
    Empty,
    /// A finite number.
    Number(f64),
    /// Text that is not a number; the reason says why, in words for the engineer.
    Bad {
        /// Why the text was not read as a number.
        reason: String,
    },
}

impl Cell {
    /// A cell holding `text`.
    pub fn new(text: impl Into<String>) -> Cell {
        Cell { text: text.into() }
    }

    /// Whether anything other than spaces was typed (the cell holds data worth keeping).
    pub fn is_typed(&self) -> bool {
        !self.text.trim().is_empty()
    }

    /// The meaning of the text (see the module documentation for the rules).
    pub fn value(&self) -> CellValue {
        parse_cell(&self.text)
    }

    /// The number, if the text reads as one.
    pub fn number(&self) -> Option<f64> {
        match self.value() {
            CellValue::Number(x) => Some(x),
            _ => None,
        }
    }
}

fn parse_cell(raw: &str) -> CellValue {
    let t = raw.trim();
    if t.is_empty() {
        return CellValue::Empty;
    }
    let bad = |reason: &str| CellValue::Bad {
        reason: reason.to_string(),
    };
    // The typographic minus arrives with text pasted from reports and word processors.
    let t = t.replace('\u{2212}', "-");
    let commas = t.matches(',').count();
    let dots = t.matches('.').count();
    if commas > 0 && dots > 0 {
        return bad("both a comma and a point: thousands separators are not read, type 1234.5");
    }
    if commas > 1 || dots > 1 {
        return bad("more than one decimal separator");
    }
    let normal = t.replace(',', ".");
    // Only digits, one separator, sign and exponent: `f64::from_str` would also take "inf",
    // "NaN" and "infinity", which are never a measurement.
    let allowed = |c: char| c.is_ascii_digit() || matches!(c, '.' | '+' | '-' | 'e' | 'E');
    if let Some(c) = normal.chars().find(|&c| !allowed(c)) {
        return if c.is_whitespace() {
            bad("spaces inside the number (a unit or a second value?)")
        } else {
            CellValue::Bad {
                reason: format!("`{c}` is not part of a number"),
            }
        };
    }
    if !normal.chars().any(|c| c.is_ascii_digit()) {
        return bad("no digits");
    }
    match normal.parse::<f64>() {
        Ok(x) if x.is_finite() => CellValue::Number(x),
        Ok(_) => bad("too large to be a measurement"),
        Err(_) => bad("not a number"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parsing_table() {
        let numbers: &[(&str, f64)] = &[
            ("12.5", 12.5),
            ("  12.5 ", 12.5),
            ("12,5", 12.5),
            ("-3", -3.0),
            ("+3", 3.0),
            ("\u{2212}3.25", -3.25),
            ("1e3", 1000.0),
            ("1.5E-2", 0.015),
            (".5", 0.5),
            ("5.", 5.0),
            ("0", 0.0),
        ];
        for (text, want) in numbers {
            assert_eq!(
                Cell::new(*text).value(),
                CellValue::Number(*want),
                "{text:?}"
            );
        }
        assert_eq!(Cell::new("").value(), CellValue::Empty);
        assert_eq!(Cell::new("   ").value(), CellValue::Empty);
        let bad: &[(&str, &str)] = &[
            ("12,5x", "`x` is not part of a number"),
            ("1,234.5", "both a comma and a point"),
            ("1.234,5", "both a comma and a point"),
            ("1.2.3", "more than one decimal separator"),
            ("1,2,3", "more than one decimal separator"),
            ("12.5 mm", "spaces inside the number"),
            ("inf", "`i` is not part of a number"),
            ("NaN", "`N` is not part of a number"),
            ("-", "no digits"),
            ("1e", "not a number"),
            ("1-2", "not a number"),
            ("1e999", "too large"),
        ];
        for (text, reason_start) in bad {
            match Cell::new(*text).value() {
                CellValue::Bad { reason } => {
                    assert!(reason.starts_with(reason_start), "{text:?}: {reason}")
                }
                other => panic!("{text:?} read as {other:?}"),
            }
        }
    }

    #[test]
    fn typed_means_non_blank() {
        assert!(!Cell::new(" ").is_typed());
        assert!(Cell::new("x").is_typed());
        assert_eq!(Cell::new("2,5").number(), Some(2.5));
        assert_eq!(Cell::new("2,5x").number(), None);
    }
}
