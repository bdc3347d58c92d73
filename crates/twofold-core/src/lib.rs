//! # twofold-core
//!
//! The mathematics of two-level factorial experiments: design generation, aliasing,
//! minimum-aberration search, blocking, run order, fold-over, effect estimation, half-normal
//! ranking, Lenth's method, model fitting with ANOVA, diagnostics and prediction.
//!
//! This crate does no I/O and knows nothing of windows or files: callers hand it numbers and get
//! numbers back. Every formula names its published source in the documentation of the item that
//! computes it.

pub mod term;
pub mod prec;

// Planning.
pub mod design;
pub mod alias;
pub mod search;
pub mod blocking;
pub mod plan;
pub mod foldover;
pub mod ofat;

// Analysis.
pub mod data;
pub mod columns;
pub mod effects;
pub mod lenth;
pub mod halfnormal;
pub mod transform;
pub mod anova;
pub mod diagnostics;
pub mod boxcox;
pub mod means;
pub mod predict;

pub use term::{SignedTerm, Term};
