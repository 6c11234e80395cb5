//! Shared helpers for the cross-crate tests (hand-built networks, parameter strategies).

pub mod hand_built;
pub mod param_strategy;
