//! # twofold-core
//!
//! The mathematics of two-level factorial experiments: design generation, aliasing,
//! minimum-aberration search, blocking, run order, fold-over, effect estimation, half-normal
//! ranking, Lenth's method, model fitting with ANOVA, diagnostics, prediction, power, and the
//! choice of settings for several responses and noise factors (desirability, transmitted spread).
//!
//! This crate does no I/O and knows nothing of windows or files: callers hand it numbers and get
//! numbers back. Every formula names its published source in the documentation of the item that
//! computes it.

pub mod prec;
pub mod term;

// Planning.
pub mod alias;
pub mod augment;
pub mod blocking;
pub mod composite;
pub mod design;
pub mod foldover;
pub mod ofat;
pub mod plan;
pub mod power;
pub mod screening;
pub mod search;
pub mod semifold;
pub mod splitplot;

// Analysis.
pub mod anova;
pub mod boxcox;
pub mod columns;
pub mod data;
pub mod diagnostics;
pub mod effects;
pub mod estimability;
pub mod halfnormal;
pub mod lenth;
pub mod means;
pub mod predict;
pub mod transform;

// Deciding.
pub mod decision;
pub mod desirability;
pub mod optimise;
pub mod robust;

pub use term::{SignedTerm, Term};

#[cfg(test)]
pub(crate) mod test_support;
