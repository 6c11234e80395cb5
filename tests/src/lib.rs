//! Shared helpers for the cross-crate tests (hand-built networks).

pub mod hand_built;
