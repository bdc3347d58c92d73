//! Data interchange with spreadsheets: the run sheet as CSV and back, importing response values
//! with a preview, and clipboard text for copy and paste.
//!
//! Every function here is pure (text in, text or a plan out) except the atomic file writer, so
//! the window and the command line share them and tests exercise them without a window. Imports
//! and pastes return a plan; the project changes only when the caller applies the plan's edits
//! after the engineer confirmed the preview.

pub mod clipboard;
pub mod coded;
pub mod csv;
pub mod guard;

pub use clipboard::{PastePlan, copy_grid, parse_grid, plan_paste};
pub use csv::{
    CsvError, ImportPlan, plan_import, read_run_sheet, run_sheet_csv, write_run_sheet_csv,
};
pub use guard::{guard, is_plain_number, unguard};
