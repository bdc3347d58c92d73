//! Shared helpers for acceptance tests.
