//! # twofold (application)
//!
//! The desktop window and the headless commands: two front ends over `twofold_study`, which owns
//! the project, its analysis report, files and pages, over `twofold_core`, the mathematics.
//!
//! `app` is the window's shell; `panels` draw the project and the report and emit commands;
//! `cli` parses command lines and prints the same report.

pub mod app;
pub mod cli;
pub mod panels;
pub mod theme;
