//! The spreadsheet formula-injection guard.
//!
//! A spreadsheet that opens a CSV file (or receives pasted text) runs a cell that starts with
//! `=`, `+`, `-` or `@` as a formula, and a leading tab or carriage return can hide such a
//! start. Following the OWASP guidance on CSV injection, every text cell we write that starts
//! with one of those characters gets a single quote in front, which spreadsheets show as text
//! and do not evaluate. The full-width forms `＝ ＋ － ＠` are treated the same, because some
//! spreadsheets fold them to the ASCII characters.
//!
//! # Numbers stay numbers
//! A cell that is a plain decimal literal (`-1.5`, `+3`, `2.5e-3`) cannot hold a formula, so it
//! is written unchanged and the spreadsheet reads it as the number it is. Anything else that
//! starts with a trigger (`-1.5 mm`, `=SUM(A1)`, `-`, `+cmd|...`) is text and is guarded.
//!
//! # Reading back
//! [`unguard`] undoes [`guard`] exactly: the pair is a bijection on all strings, so a file we
//! wrote reads back to what was in the project. A cell that itself starts with quotes followed
//! by a trigger (`'=x`) gets one more quote, so the quote the engineer typed survives.

use std::borrow::Cow;

/// Characters that make a spreadsheet treat a cell as a formula (or hide such a start).
const TRIGGERS: [char; 10] = ['=', '+', '-', '@', '\t', '\r', '＝', '＋', '－', '＠'];

/// Whether `text` is a plain decimal number literal: optional sign, digits with at most one
/// point, optional exponent. Such a cell is written as a number, unguarded.
pub fn is_plain_number(text: &str) -> bool {
    let b = text.as_bytes();
    let mut i = 0;
    if matches!(b.first(), Some(b'+' | b'-')) {
        i += 1;
    }
    let mut digits = 0;
    let mut points = 0;
    while let Some(&c) = b.get(i) {
        match c {
            b'0'..=b'9' => digits += 1,
            b'.' => points += 1,
            _ => break,
        }
        i += 1;
    }
    if digits == 0 || points > 1 {
        return false;
    }
    if matches!(b.get(i), Some(b'e' | b'E')) {
        i += 1;
        if matches!(b.get(i), Some(b'+' | b'-')) {
            i += 1;
        }
        let start = i;
        while matches!(b.get(i), Some(b'0'..=b'9')) {
            i += 1;
        }
        if i == start {
            return false;
        }
    }
    i == b.len()
}

/// Whether [`guard`] would change `text`: it starts with a trigger (and is not a plain number),
/// or with one or more quotes followed by a trigger.
fn needs_guard(text: &str) -> bool {
    let rest = text.trim_start_matches('\'');
    let starts_with_trigger = rest.chars().next().is_some_and(|c| TRIGGERS.contains(&c));
    if !starts_with_trigger {
        return false;
    }
    // A bare number is safe; a quoted one (`'-1`) is text the engineer typed with its quote.
    !(rest.len() == text.len() && is_plain_number(text))
}

/// The cell as written to a spreadsheet: unchanged if harmless, else with a leading `'`.
pub fn guard(text: &str) -> Cow<'_, str> {
    if needs_guard(text) {
        Cow::Owned(format!("'{text}"))
    } else {
        Cow::Borrowed(text)
    }
}

/// Undoes [`guard`]: strips the one quote that [`guard`] adds, and nothing else.
pub fn unguard(text: &str) -> Cow<'_, str> {
    match text.strip_prefix('\'') {
        Some(rest) if needs_guard(rest) => Cow::Borrowed(rest),
        _ => Cow::Borrowed(text),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formulas_and_hidden_starts_are_neutralised() {
        for dangerous in [
            "=SUM(A1:A9)",
            "+cmd|' /C calc'!A0",
            "-2+3",
            "@SUM(1)",
            "\t=1+1",
            "\r=1+1",
            "-",
            "-1.5 mm",
            "＝1+1",
        ] {
            let g = guard(dangerous);
            assert!(g.starts_with('\''), "{dangerous:?} -> {g:?}");
            assert_eq!(unguard(&g), dangerous);
        }
    }

    #[test]
    fn numbers_stay_numbers() {
        for n in ["-1.5", "+3", "0", "12.50", "-0.25e-3", ".5", "5.", "1E6"] {
            assert!(is_plain_number(n), "{n}");
            assert_eq!(guard(n), n);
        }
        for not in ["1.2.3", "e5", "-", "+", "1e", "1,5", "--1", "1 000", ""] {
            assert!(!is_plain_number(not), "{not}");
        }
    }

    #[test]
    fn harmless_text_is_untouched() {
        for t in [
            "Temperature",
            "12,5",
            "run 3: nozzle clogged",
            "",
            "a=b",
            "'quoted'",
        ] {
            assert_eq!(guard(t), t);
            assert_eq!(unguard(t), t);
        }
    }

    #[test]
    fn guard_and_unguard_are_inverse_even_with_typed_quotes() {
        for t in ["'=x", "''=x", "'-1", "'", "''", "'abc", "=x", "-1", "'+"] {
            let g = guard(t);
            assert_eq!(unguard(&g), t, "{t:?} -> {g:?}");
        }
        assert_eq!(guard("'=x"), "''=x");
        assert_eq!(guard("'-1"), "''-1");
    }
}
