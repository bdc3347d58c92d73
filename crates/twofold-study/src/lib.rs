//! # twofold-study
//!
//! A two-level factorial study without a window: everything the desktop app and the headless
//! commands share. The mathematics lives in `twofold_core`; this crate owns files, the project and
//! its history, and the one analysis of a response that every front end renders. It cannot see
//! egui, eframe, rfd or winit, so the compiler keeps the layering.
//!
//! - `project`: plain data plus the edits that change it (undoable), validation, persistence,
//!   recovery and recent files.
//! - `report`: the one analysis report of a response (built by `Report::build`, cached per data
//!   revision), rendered by the window, the summary page and `twofold analyze` (text and JSON).
//! - `export`: the one-page summary and the printable run sheet (SVG, PNG, PDF).
//! - `interchange`: CSV, clipboard text and the spreadsheet formula guard.
//! - `files`: the one atomic file writer.
//! - `jobs`: work on a background thread with progress, cancel and panics caught.
//! - `numbers`: one rule for writing numbers and choosing axis ticks.
//! - `planning`: power and the smallest detectable effect of a design before the first run.

pub mod export;
pub mod files;
pub mod interchange;
pub mod jobs;
pub mod numbers;
pub mod planning;
pub mod project;
pub mod report;
