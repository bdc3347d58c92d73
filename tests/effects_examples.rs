//! (checks being written)
