//! `tree_preset`: a preset grown as a tree with every cell a vein (no conducting threshold, no
//! loops), as the leaf presets grew before they gained veins apart from tissue and loops; for
//! the checks of tree mechanics (exports of trees, junction relaxation, tree-only readings).

use ramulus_core::params::{Params, Widths};
use ramulus_core::presets::preset;

/// The preset named `name` with its loop pass off and every segment conducting.
pub fn tree_preset(name: &str) -> Option<Params> {
    let mut params = preset(name)?;
    let tree = Widths::default();
    params.widths.vein_area = tree.vein_area;
    params.widths.reconnect = tree.reconnect;
    params.widths.loop_levels = tree.loop_levels;
    params.widths.arches = tree.arches;
    Some(params)
}
