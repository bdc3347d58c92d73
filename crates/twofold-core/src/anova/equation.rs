//! The fitted model written as an equation, in coded or natural units.

use crate::columns::term_value;
use crate::term::{Term, factor_letter};
use serde::{Deserialize, Serialize};

/// Units of an equation.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum Units {
    /// Coded −1..+1.
    Coded,
    /// The factors' own units, from each factor's low and high.
    Natural,
}

/// One product term of an equation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EquationTerm {
    /// The factors multiplied (in coded or natural units, per [`Equation::units`]).
    pub term: Term,
    /// Its coefficient.
    pub coefficient: f64,
}

/// The fitted equation, for an average block and without the curvature column (which only says
/// the centre is off the surface, not where).
#[derive(Debug, Clone, PartialEq)]
pub struct Equation {
    /// Coded or natural units.
    pub units: Units,
    /// Constant.
    pub intercept: f64,
    /// Product terms, in the order of the trade.
    pub terms: Vec<EquationTerm>,
    /// The equation written out with factor letters, e.g. `y = 27.5 + 4.16667*A - 2.5*B`.
    pub text: String,
}

impl Equation {
    /// The equation's value at `x` (one value per factor, in the equation's units; missing
    /// entries count as 0).
    pub fn evaluate(&self, x: &[f64]) -> f64 {
        self.intercept
            + self
                .terms
                .iter()
                .map(|t| t.coefficient * term_value(x, t.term))
                .sum::<f64>()
    }

    /// The equation written out with the given factor names in place of letters (a letter is
    /// used where no name is given).
    pub fn format_with_names(&self, names: &[&str]) -> String {
        let name = |i: usize| -> String {
            names
                .get(i)
                .map(|s| s.to_string())
                .unwrap_or_else(|| factor_letter(i).unwrap_or('?').to_string())
        };
        let mut s = format!("y = {}", format_number(self.intercept));
        for t in &self.terms {
            let sign = if t.coefficient < 0.0 { '-' } else { '+' };
            let vars: Vec<String> = t.term.factors().map(name).collect();
            s.push_str(&format!(
                " {sign} {}*{}",
                format_number(t.coefficient.abs()),
                vars.join("*")
            ));
        }
        s
    }
}

/// Six significant figures, trailing zeros trimmed; scientific notation for very large or small
/// magnitudes (display only).
pub fn format_number(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return if x == 0.0 { "0".into() } else { x.to_string() };
    }
    let mag = x.abs().log10().floor() as i32;
    if !(-4..=9).contains(&mag) {
        return format!("{x:.5e}");
    }
    let decimals = (5 - mag).max(0) as usize;
    let s = format!("{x:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}
