//! The data of one response, as the analysis sees it.
//!
//! A caller (the app or the command line) hands over coded factor settings, block labels and one
//! value per run. Missing values are `None`; excluded runs stay in the table but out of the fit.
//! [`Observations::new`] checks the table once, so every analysis step can trust it.

use crate::term::MAX_FACTORS;

/// Why a table of observations cannot be analysed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum DataError {
    /// No runs at all.
    #[error("the table has no runs")]
    NoRuns,
    /// Factor count outside 1..=25.
    #[error("{0} factors: a design has 1 to 25 factors")]
    FactorCount(usize),
    /// A run has the wrong number of factor settings.
    #[error("run {run}: {found} factor settings, expected {expected}")]
    RowLength {
        /// 1-based run number in the table.
        run: usize,
        /// Settings found.
        found: usize,
        /// Settings expected.
        expected: usize,
    },
    /// A coded setting is not −1, 0 or +1.
    #[error("run {run}, factor {factor}: coded setting {value} is not -1, 0 or +1")]
    BadLevel {
        /// 1-based run number.
        run: usize,
        /// Factor letter.
        factor: char,
        /// The value found.
        value: f64,
    },
    /// A response value is infinite or NaN (a missing value must be `None`).
    #[error("run {run}: response value {value} is not a finite number")]
    NotFinite {
        /// 1-based run number.
        run: usize,
        /// The value found.
        value: f64,
    },
    /// Column lengths disagree.
    #[error("{what} has {found} entries but the table has {runs} runs")]
    Length {
        /// Which column.
        what: &'static str,
        /// Entries found.
        found: usize,
        /// Runs in the table.
        runs: usize,
    },
}

/// Coded settings and one response, checked.
///
/// Invariants (established by [`Observations::new`]): every row has `factor_count` settings, each
/// −1, 0 or +1; `blocks`, `response` and `excluded` have one entry per run; every present response
/// is finite.
#[derive(Debug, Clone, PartialEq)]
pub struct Observations {
    factor_count: usize,
    /// Shared: copies of a table (another response, a transform) point at the same settings.
    levels: std::sync::Arc<[Vec<f64>]>,
    blocks: Vec<u32>,
    response: Vec<Option<f64>>,
    excluded: Vec<bool>,
}

impl Observations {
    /// Checks and builds the table. `blocks` may be empty for an unblocked design (all runs in
    /// block 1); `excluded` may be empty (no run excluded).
    pub fn new(
        factor_count: usize,
        levels: Vec<Vec<f64>>,
        blocks: Vec<u32>,
        response: Vec<Option<f64>>,
        excluded: Vec<bool>,
    ) -> Result<Observations, DataError> {
        if factor_count == 0 || factor_count > MAX_FACTORS {
            return Err(DataError::FactorCount(factor_count));
        }
        let runs = levels.len();
        if runs == 0 {
            return Err(DataError::NoRuns);
        }
        for (r, row) in levels.iter().enumerate() {
            if row.len() != factor_count {
                return Err(DataError::RowLength {
                    run: r + 1,
                    found: row.len(),
                    expected: factor_count,
                });
            }
            for (f, &v) in row.iter().enumerate() {
                if v != -1.0 && v != 0.0 && v != 1.0 {
                    return Err(DataError::BadLevel {
                        run: r + 1,
                        factor: crate::term::LETTERS[f],
                        value: v,
                    });
                }
            }
        }
        let blocks = if blocks.is_empty() {
            vec![1; runs]
        } else {
            blocks
        };
        let excluded = if excluded.is_empty() {
            vec![false; runs]
        } else {
            excluded
        };
        for (what, found) in [
            ("the block column", blocks.len()),
            ("the response column", response.len()),
            ("the exclusion column", excluded.len()),
        ] {
            if found != runs {
                return Err(DataError::Length { what, found, runs });
            }
        }
        check_finite(&response)?;
        Ok(Observations {
            factor_count,
            levels: levels.into(),
            blocks,
            response,
            excluded,
        })
    }

    /// Number of factors.
    pub fn factor_count(&self) -> usize {
        self.factor_count
    }

    /// Number of runs in the table, used or not.
    pub fn run_count(&self) -> usize {
        self.levels.len()
    }

    /// Coded settings, one row per run.
    pub fn levels(&self) -> &[Vec<f64>] {
        &self.levels
    }

    /// Block label of each run.
    pub fn blocks(&self) -> &[u32] {
        &self.blocks
    }

    /// Response of each run (`None` = missing).
    pub fn response(&self) -> &[Option<f64>] {
        &self.response
    }

    /// Whether each run is excluded from the fit.
    pub fn excluded(&self) -> &[bool] {
        &self.excluded
    }

    /// Whether run `r` is a centre point (every setting 0).
    pub fn is_centre(&self, r: usize) -> bool {
        self.levels
            .get(r)
            .is_some_and(|row| row.iter().all(|&v| v == 0.0))
    }

    /// Indices of the runs that enter the fit: a value present and not excluded.
    pub fn used_runs(&self) -> Vec<usize> {
        (0..self.run_count())
            .filter(|&r| self.response[r].is_some() && !self.excluded[r])
            .collect()
    }

    /// Number of distinct block labels among the used runs.
    pub fn block_count(&self) -> usize {
        let mut b: Vec<u32> = self.used_runs().iter().map(|&r| self.blocks[r]).collect();
        b.sort_unstable();
        b.dedup();
        b.len()
    }

    /// The same table with another response column (same length), e.g. after a transform.
    pub fn with_response(&self, response: Vec<Option<f64>>) -> Result<Observations, DataError> {
        let runs = self.run_count();
        if response.len() != runs {
            return Err(DataError::Length {
                what: "the response column",
                found: response.len(),
                runs,
            });
        }
        check_finite(&response)?;
        Ok(Observations {
            factor_count: self.factor_count,
            levels: std::sync::Arc::clone(&self.levels),
            blocks: self.blocks.clone(),
            response,
            excluded: self.excluded.clone(),
        })
    }
}

/// Every present response finite.
fn check_finite(response: &[Option<f64>]) -> Result<(), DataError> {
    for (r, v) in response.iter().enumerate() {
        if let Some(x) = v
            && !x.is_finite()
        {
            return Err(DataError::NotFinite {
                run: r + 1,
                value: *x,
            });
        }
    }
    Ok(())
}
