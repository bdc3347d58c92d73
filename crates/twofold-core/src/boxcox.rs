//! (module being written)
