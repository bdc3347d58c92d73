//! Columns of effect terms over a table of coded settings.
//!
//! The column of a term is the elementwise product of its factors' coded columns (common practice,
//! no source). Centre points (all settings 0) give 0 in every term column.

use crate::term::Term;

/// Value of `term` in one run: the product of the coded settings of its factors (1 for `I`).
pub fn term_value(row: &[f64], term: Term) -> f64 {
    term.factors()
        .map(|i| row.get(i).copied().unwrap_or(0.0))
        .product()
}

/// Column of `term` over the given runs.
pub fn term_column(levels: &[Vec<f64>], term: Term) -> Vec<f64> {
    levels.iter().map(|row| term_value(row, term)).collect()
}
