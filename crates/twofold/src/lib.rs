//! # twofold (application)
//!
//! The desktop tool and its headless subcommands. All file and window I/O lives here; the
//! mathematics lives in `twofold_core`.
//!
//! Layering: `project` is plain data plus the edits that change it (undoable, autosaved);
//! `analysis` caches the core's results for the current data; `panels` draw the project and emit
//! edits; `export` and `interchange` turn the project into pages and spreadsheets; `cli` runs the
//! same computations without a window.

pub mod analysis;
pub mod app;
pub mod cli;
pub mod export;
pub mod interchange;
pub mod panels;
pub mod project;
pub mod theme;
