//! Shared helpers for the cross-crate tests (hand-built networks, parameter strategies, the
//! fuzzing harness of the readers, the plane-graph check, Euler's count of faces).

pub mod cleared_drawing;
pub mod euler;
pub mod fuzz;
pub mod hand_built;
pub mod param_strategy;
pub mod plane_check;
pub mod tree_presets;
pub mod wide_veins;
