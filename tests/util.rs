//! Shared helpers for the acceptance tests.

/// Asserts `actual` is within `tol` of `expected`, printing both and the source on failure.
#[track_caller]
pub fn assert_close(actual: f64, expected: f64, tol: f64, what: &str) {
    assert!(
        (actual - expected).abs() <= tol,
        "{what}: expected {expected}, got {actual} (tolerance {tol})"
    );
}
