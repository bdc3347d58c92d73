//! Numeric tolerances used across the crate and its tests, in one place.
//!
//! Values published to a given rounding are compared with an absolute tolerance of half a unit in
//! the last printed place; values from an independent library are compared relatively.

/// Relative tolerance for comparisons with values computed by an independent library in double
/// precision (e.g. statsmodels fixtures).
pub const LIBRARY_REL: f64 = 1e-8;

/// Tolerance below which a pivot or singular value counts as zero when judging rank, relative to
/// the largest one.
pub const RANK_REL: f64 = 1e-9;

/// The same judgement made on cross products (the transform route of the fit): a column is
/// dependent when its squared distance from the columns before it is below this fraction of its
/// squared length (the square of a distance ratio of 1e-5; common practice, no source: cross
/// products of ±1 columns are integers, and a genuine distance is at least of the order of one run
/// in the whole table).
pub const GRAM_RANK_REL: f64 = 1e-10;

/// Whether `a` and `b` agree to relative tolerance `rel` (with an absolute floor of `rel` near 0).
pub fn close_rel(a: f64, b: f64, rel: f64) -> bool {
    let scale = a.abs().max(b.abs()).max(1.0);
    (a - b).abs() <= rel * scale
}

/// Whether `a` and `b` agree to half a unit in the `places`-th decimal (published rounding).
pub fn close_to_places(a: f64, b: f64, places: i32) -> bool {
    (a - b).abs() <= 0.5 * 10f64.powi(-places) + 1e-12
}
