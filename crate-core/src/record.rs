//! The JSON run record (`RunRecord`, format `ramulus-run` version 1): parameters, seed, nodes,
//! segments with flow, width and order, metrics and digest; `write_record` and `read_record`.

use serde::{Deserialize, Serialize};

use crate::metrics::Metrics;
use crate::network::{CellSet, Network, Node, NO_PARENT};
use crate::params::Params;
use crate::run::{RunView, SITE_CAUTION};

/// The `format` field of every run record.
pub const RECORD_FORMAT: &str = "ramulus-run";
/// The newest record version this build writes and reads.
pub const RECORD_VERSION: u32 = 1;

/// A run record as stored in JSON.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RunRecord {
    /// Always `ramulus-run`.
    pub format: String,
    /// Record version, 1.
    pub version: u32,
    /// Digest of the nodes (16 hex digits).
    pub digest: String,
    /// Why growth stopped (`budget`, `full`, `threshold`), when known.
    #[serde(default)]
    pub stopped: Option<String>,
    /// The parameters, seed included; absent for networks that were not grown here.
    #[serde(default)]
    pub params: Option<Params>,
    /// Length unit of every coordinate.
    pub units: String,
    /// Lattice cell size in `units` (0 when not grown on a lattice).
    #[serde(default)]
    pub cell_size: f64,
    /// Area drained, in squared units.
    pub area: f64,
    /// Nodes as `[x, y, parent, weight]`; parent is -1 for a root.
    pub nodes: Vec<(f64, f64, i64, f64)>,
    /// One entry per segment (informative; recomputed from `nodes` on reading).
    #[serde(default)]
    pub segments: Vec<SegmentEntry>,
    /// Occupied lattice cells, for the outline metrics.
    #[serde(default)]
    pub cells: CellSet,
    /// Metrics at the time of writing (informative; recomputed on reading).
    #[serde(default)]
    pub metrics: Option<Metrics>,
    /// Caution for drainage sites.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub caution: Option<String>,
}

/// One segment of a record.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SegmentEntry {
    /// Upstream node.
    pub from: u32,
    /// Downstream node.
    pub to: u32,
    /// Flow, squared units.
    pub flow: f64,
    /// Drawn width, units.
    pub width: f64,
    /// Strahler order.
    pub order: u32,
    /// Length, units.
    pub length: f64,
}

/// Why a record could not be read.
#[derive(Clone, Debug, PartialEq)]
pub enum RecordError {
    /// The text is not JSON of the record's shape; the message names line and column.
    Json(String),
    /// The `format` field is not `ramulus-run`.
    Format(String),
    /// The version is newer than this build reads.
    Version(u32),
    /// A node's parent is not -1 or a valid index.
    Parent {
        /// The node.
        node: usize,
        /// The parent it names.
        parent: i64,
    },
    /// The nodes do not form a forest, or hold a non-finite number.
    Topology(String),
}

impl std::fmt::Display for RecordError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            RecordError::Json(message) => write!(f, "not a readable run record: {message}"),
            RecordError::Format(format) => {
                write!(
                    f,
                    "field `format` is {format:?}, expected {RECORD_FORMAT:?}"
                )
            }
            RecordError::Version(version) => write!(
                f,
                "record version {version} is newer than this build reads (up to {RECORD_VERSION})"
            ),
            RecordError::Parent { node, parent } => {
                write!(
                    f,
                    "nodes[{node}] names parent {parent}, which is not -1 or a node index"
                )
            }
            RecordError::Topology(message) => write!(f, "nodes do not form a forest: {message}"),
        }
    }
}

impl std::error::Error for RecordError {}

/// Builds the record of a run.
pub fn make_record(view: &RunView, params: &Params, stopped: Option<String>) -> RunRecord {
    let network = &view.network;
    let nodes = network
        .nodes
        .iter()
        .map(|node| {
            let parent = if node.is_root() {
                -1
            } else {
                node.parent as i64
            };
            (node.x, node.y, parent, node.weight)
        })
        .collect();
    let segments = network
        .nodes
        .iter()
        .enumerate()
        .filter(|(_, node)| !node.is_root())
        .map(|(index, node)| SegmentEntry {
            from: index as u32,
            to: node.parent,
            flow: view.table.flow[index],
            width: view.table.width[index],
            order: view.table.order[index],
            length: view.table.length[index],
        })
        .collect();
    RunRecord {
        format: RECORD_FORMAT.to_string(),
        version: RECORD_VERSION,
        digest: view.digest.clone(),
        stopped,
        params: Some(params.clone()),
        units: network.units.clone(),
        cell_size: network.cell_size,
        area: network.area,
        nodes,
        segments,
        cells: network.cells.clone(),
        metrics: Some(view.metrics.clone()),
        caution: params.is_site().then(|| SITE_CAUTION.to_string()),
    }
}

/// Writes a record as pretty JSON.
pub fn write_record(record: &RunRecord) -> String {
    serde_json::to_string_pretty(record)
        .unwrap_or_else(|error| format!("{{\"error\": \"{error}\"}}"))
}

/// Reads a record and rebuilds its network (digest and metrics are for the caller to
/// recompute from it).
pub fn read_record(text: &str) -> Result<(RunRecord, Network), RecordError> {
    let record: RunRecord = serde_json::from_str(text).map_err(|error| {
        RecordError::Json(format!(
            "line {} column {}: {error}",
            error.line(),
            error.column()
        ))
    })?;
    if record.format != RECORD_FORMAT {
        return Err(RecordError::Format(record.format));
    }
    if record.version > RECORD_VERSION || record.version == 0 {
        return Err(RecordError::Version(record.version));
    }
    let count = record.nodes.len() as i64;
    let mut nodes = Vec::with_capacity(record.nodes.len());
    for (index, &(x, y, parent, weight)) in record.nodes.iter().enumerate() {
        let parent = match parent {
            -1 => NO_PARENT,
            value if (0..count).contains(&value) => value as u32,
            value => {
                return Err(RecordError::Parent {
                    node: index,
                    parent: value,
                })
            }
        };
        nodes.push(Node {
            x,
            y,
            parent,
            weight,
        });
    }
    let network = Network {
        nodes,
        area: record.area,
        units: record.units.clone(),
        cell_size: record.cell_size,
        cells: record.cells.clone(),
    };
    network
        .topology()
        .map_err(|error| RecordError::Topology(error.to_string()))?;
    Ok((record, network))
}
