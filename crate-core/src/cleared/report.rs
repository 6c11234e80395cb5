//! Each step's numbers of reading a cleared-leaf image, as one JSON object (`steps_report`):
//! the `image` block of `ramulus measure --json` and of the page's trace.

use serde_json::{json, Value};

use super::{ClearedLeaf, ClearedOptions, VeinThreshold};

/// The numbers of each step, in pixels and grey levels, and the mean vein width in output
/// units too (`factor`: output units per pixel).
pub fn steps_report(leaf: &ClearedLeaf, options: &ClearedOptions, factor: f64) -> Value {
    json!({
        "width": leaf.width,
        "height": leaf.height,
        "leaf_threshold": leaf.leaf_threshold,
        "leaf_pixels": leaf.leaf_pixels,
        "leaf_holes_filled": leaf.leaf_holes_filled,
        "vein_threshold": match options.vein_threshold {
            VeinThreshold::Global => json!({ "otsu": leaf.vein_threshold }),
            VeinThreshold::Local { window, offset } => json!({
                "local_mean": { "window": window | 1, "offset": offset }
            }),
        },
        "vein_pixels": leaf.vein_pixels,
        "thinning_iterations": leaf.thinning_iterations,
        "skeleton_pixels": leaf.skeleton_pixels,
        "end_points_before_pruning": leaf.end_points_before_pruning,
        "spur_length_pixels": options.spur_length,
        "spurs_pruned": leaf.spurs_pruned,
        "lone_pixels": leaf.lone_pixels,
        "chains": leaf.veins.len(),
        "end_points": leaf.end_points,
        "branch_points": leaf.branch_points,
        "mean_vein_width_pixels": leaf.mean_vein_width,
        "mean_vein_width": leaf.mean_vein_width.map(|w| w * factor),
    })
}
