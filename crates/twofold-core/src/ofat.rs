//! How many one-factor-at-a-time runs match the precision of a two-level design.
//!
//! In an N-run two-level design each main effect is a difference of two means of N/2 runs. To
//! estimate each of k effects with the same variance one factor at a time, every factor needs
//! N/2 runs at its low and N/2 at its high setting; sharing the base point gives (k + 1)·N/2
//! runs, an efficiency of (k + 1)/2 (common practice, no source; e.g. 2 for three factors and 3
//! for five).

/// Runs a one-factor-at-a-time study needs to match an N-run two-level design for k factors:
/// (k + 1)·N/2.
pub fn equivalent_runs(factor_count: usize, design_runs: usize) -> usize {
    (factor_count + 1) * design_runs / 2
}

/// Relative efficiency of the design over one-factor-at-a-time: (k + 1)/2.
pub fn efficiency(factor_count: usize) -> f64 {
    (factor_count as f64 + 1.0) / 2.0
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn efficiency_of_the_trade() {
        // Common practice, no source: 2 for three factors, 3 for five.
        assert_eq!(efficiency(3), 2.0);
        assert_eq!(efficiency(5), 3.0);
        assert_eq!(equivalent_runs(3, 8), 16);
        assert_eq!(equivalent_runs(5, 16), 48);
    }
}
