//! `FieldSpec` and `fields`: a description of every `Params` field (group, label, unit, kind,
//! bounds, default, one-line help) from which the page builds its parameter form.
//!
//! The bounds here are the ones `Params::validate` enforces; a test in `tests/` checks every
//! numeric field at and just beyond each bound against `validate`, so the two cannot drift apart.

use serde::Serialize;

use crate::params::{MAX_RADIUS, UNITS};

/// What sort of value a field holds, which decides the form control.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum FieldKind {
    /// A whole number.
    Integer,
    /// A real number.
    Number,
    /// A real number or `none` (off).
    OptionalNumber,
    /// `true` or `false`.
    Flag,
    /// One of `choices`.
    Choice,
    /// Roots as `x,y,dx,dy` groups separated by `;`.
    Roots,
    /// One polygon as `x,y` points separated by `;`, or `none`.
    Polygon,
    /// Several polygons separated by `~`, or empty.
    Polygons,
    /// A run-length coded image mask, set by importing an image.
    Mask,
}

/// One parameter as the page shows it.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct FieldSpec {
    /// The parameter key (JSON key and link key).
    pub key: &'static str,
    /// Which panel group it belongs to.
    pub group: &'static str,
    /// Short human label.
    pub label: &'static str,
    /// Unit shown beside the control; `length` means the run's own length unit.
    pub unit: &'static str,
    /// Kind of value.
    pub kind: FieldKind,
    /// Smallest allowed value (numeric kinds).
    pub min: Option<f64>,
    /// Whether `min` itself is excluded.
    pub min_excluded: bool,
    /// Largest allowed value (numeric kinds).
    pub max: Option<f64>,
    /// Allowed words (choice kinds).
    pub choices: Vec<&'static str>,
    /// One line of help.
    pub help: &'static str,
}

/// Every field of `Params`, in the order the page shows them.
pub fn fields() -> Vec<FieldSpec> {
    use FieldKind::*;
    vec![
        number("seed", "Run", "Seed", "", Integer, 0.0, false, u64::MAX as f64, "Seed of the random generator; the same seed and parameters give the same network."),
        number("cells", "Run", "Cell budget", "cells", Integer, 1.0, false, 25_000_000.0, "Growth stops after this many cells, roots included."),
        choice("joining", "Run", "Joining rule", &["cheapest", "weighted", "uniform"], "cheapest: always the cheapest frontier cell; weighted: drawn with weight exp(-(C - Cmin)/T); uniform: any frontier cell alike."),
        number("temperature", "Run", "Temperature T", "cost", Number, 0.0, true, f64::MAX, "Spread of weighted joining: larger is more random."),
        number("threshold", "Run", "Stop threshold", "cost", OptionalNumber, -1.0e12, false, 1.0e12, "Open growth: stop when no frontier cell costs less than this; none turns it off."),
        number("radius", "Run", "Reach", "cells", Number, 1.0, false, MAX_RADIUS, "How far a new cell may reach to attach."),
        flag("attach_to_segments", "Run", "Attach to vein sides", "Whether a new cell may join the middle of a segment, splitting it."),
        number("refresh", "Run", "Flow refresh", "fraction", Number, 0.001, false, 1.0, "Flows are recomputed each time the network grows by this fraction."),
        number("w_len", "Costs", "Length weight", "", Number, 0.0, false, 1.0e6, "Weight of segment length."),
        number("w_turn", "Costs", "Angle weight", "", Number, 0.0, false, 1.0e6, "Weight of the junction-angle penalty."),
        number("branch_angle", "Costs", "Preferred angle", "degrees", OptionalNumber, 0.0, false, 150.0, "Branching angle the angle penalty favours; none favours straight continuation."),
        number("w_flow", "Costs", "Transport weight", "", Number, 0.0, false, 1.0e6, "Weight of branched transport, flow^alpha times length."),
        number("alpha", "Costs", "Transport exponent alpha", "", Number, 0.0, false, 1.0, "Below 1, shared trunks are cheaper than parallel veins."),
        number("w_path", "Costs", "Supply-distance weight", "", Number, 0.0, false, 1.0e6, "Weight of the distance along the network back to the root."),
        number("elongation", "Costs", "Elongation", "", Number, 1.0, false, 10.0, "Supply lengths along the root's axis count 1/elongation."),
        number("rear_cost", "Costs", "Rear cost", "", Number, 1.0, false, 10.0, "Supply distance behind the root counts this many times."),
        number("w_grade", "Terrain", "Uphill weight", "", Number, 0.0, false, 1.0e6, "Weight of running uphill (sites)."),
        number("grade_x", "Terrain", "Slope east", "m/m", Number, -1.0, false, 1.0, "Terrain rise per unit run to the right."),
        number("grade_y", "Terrain", "Slope south", "m/m", Number, -1.0, false, 1.0, "Terrain rise per unit run down the page."),
        number("runoff", "Terrain", "Runoff coefficient", "", Number, 0.0, true, 1.0, "Share of rain on a cell that runs off (sites); 1 for leaves."),
        number("gamma", "Widths", "Width exponent gamma", "", Number, 1.0, false, 10.0, "Width grows as flow^(1/gamma); 3 is Murray's law."),
        number("tip_width", "Widths", "Tip width", "cells", Number, 0.0, true, 1.0, "Width of a one-cell veinlet, as a fraction of a cell."),
        number("width", "Lattice", "Width", "cells", Integer, 1.0, false, 20_000.0, "Lattice columns; width times height is at most 25,000,000."),
        number("height", "Lattice", "Height", "cells", Integer, 1.0, false, 20_000.0, "Lattice rows, counted from the top."),
        number("cell_size", "Lattice", "Cell size", "length", Number, 0.0, true, f64::MAX, "Side of one cell in the length unit."),
        choice("units", "Lattice", "Length unit", &UNITS, "mm or um for leaves; m or ft for sites (sites carry the drainage caution)."),
        number("jitter", "Lattice", "Jitter", "cells", Number, 0.0, false, 0.49, "Random offset of each node from its cell centre."),
        shape("roots", "Roots", Roots, "One root per group x,y,dx,dy: the cell and the direction its flow leaves."),
        shape("outline", "Allowed outline", Polygon, "Polygon x,y;x,y;... in cells; none allows the whole lattice."),
        shape("obstacles", "Obstacles", Polygons, "Polygons in cells, separated by ~; their cells stay empty."),
        shape("mask", "Image mask", Mask, "Allowed cells from an imported image; none allows every cell."),
    ]
}

#[allow(clippy::too_many_arguments)]
fn number(
    key: &'static str,
    group: &'static str,
    label: &'static str,
    unit: &'static str,
    kind: FieldKind,
    min: f64,
    min_excluded: bool,
    max: f64,
    help: &'static str,
) -> FieldSpec {
    FieldSpec {
        key,
        group,
        label,
        unit,
        kind,
        min: Some(min),
        min_excluded,
        max: Some(max),
        choices: Vec::new(),
        help,
    }
}

fn choice(
    key: &'static str,
    group: &'static str,
    label: &'static str,
    choices: &[&'static str],
    help: &'static str,
) -> FieldSpec {
    FieldSpec {
        key,
        group,
        label,
        unit: "",
        kind: FieldKind::Choice,
        min: None,
        min_excluded: false,
        max: None,
        choices: choices.to_vec(),
        help,
    }
}

fn flag(
    key: &'static str,
    group: &'static str,
    label: &'static str,
    help: &'static str,
) -> FieldSpec {
    FieldSpec {
        kind: FieldKind::Flag,
        ..choice(key, group, label, &["false", "true"], help)
    }
}

fn shape(key: &'static str, label: &'static str, kind: FieldKind, help: &'static str) -> FieldSpec {
    FieldSpec {
        kind,
        ..choice(key, "Shape", label, &[], help)
    }
}
