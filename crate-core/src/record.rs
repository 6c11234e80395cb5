//! The JSON run record (`RunRecord`, format `ramulus-run` version 2): parameters, seed, nodes,
//! segments (their ends, flow, width and order), metrics and digest; `write_record` and
//! `read_record`, which also reads version 1 (nodes with a parent index each), and
//! `write_record_to`, which streams the same bytes from a run's view into any `std::io::Write`
//! without building the record in memory.
//!
//! Every part of a record reads a missing field as absent (its default), never as an error,
//! so records written before a field existed keep loading.

use serde::ser::{SerializeSeq, SerializeStruct};
use serde::{Deserialize, Serialize, Serializer};

use crate::metrics::Metrics;
use crate::network::{segments_from_parents, CellSet, Network, Node, Segment, NO_PARENT};
use crate::params::Params;
use crate::run::{RunView, SITE_CAUTION};

/// The `format` field of every run record.
pub const RECORD_FORMAT: &str = "ramulus-run";
/// The newest record version this build writes and reads.
pub const RECORD_VERSION: u32 = 2;

/// A run record as stored in JSON (version 2).
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct RunRecord {
    /// Always `ramulus-run`.
    pub format: String,
    /// Record version, 2 (a version-1 record is converted on reading).
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
    /// Nodes as `[x, y, weight]`.
    pub nodes: Vec<(f64, f64, f64)>,
    /// One entry per segment: its ends make the network; flow, width, order and length are
    /// informative (recomputed on reading).
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
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
#[serde(default)]
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
    /// A version-1 node's parent is not -1 or a valid index.
    Parent {
        /// The node.
        node: usize,
        /// The parent it names.
        parent: i64,
    },
    /// A segment names a missing node, or a number is not finite; in a version-1 record, the
    /// nodes do not form a forest.
    Topology(String),
}

impl std::fmt::Display for RecordError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            RecordError::Json(message) => write!(f, "not a readable run record: {message}"),
            RecordError::Format(format) => {
                let shown: String = format.chars().take(40).collect();
                let more = if shown.len() < format.len() {
                    "..."
                } else {
                    ""
                };
                write!(
                    f,
                    "field `format` is {shown:?}{more}, expected {RECORD_FORMAT:?}"
                )
            }
            RecordError::Version(0) => write!(
                f,
                "record version 0 does not exist; versions start at 1 (this build reads 1 to \
                 {RECORD_VERSION})"
            ),
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
            RecordError::Topology(message) => write!(f, "nodes and segments: {message}"),
        }
    }
}

impl std::error::Error for RecordError {}

/// A version-1 record: nodes carry their parent (-1 for a root); the rest as in version 2.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(default)]
struct RunRecordVersion1 {
    format: String,
    version: u32,
    digest: String,
    stopped: Option<String>,
    params: Option<Params>,
    units: String,
    cell_size: f64,
    area: f64,
    nodes: Vec<(f64, f64, i64, f64)>,
    segments: Vec<SegmentEntry>,
    cells: CellSet,
    metrics: Option<Metrics>,
    caution: Option<String>,
}

/// The fields every version shares, read first to choose the reader.
#[derive(Deserialize)]
struct RecordHeader {
    #[serde(default)]
    format: String,
    #[serde(default)]
    version: u32,
}

/// Builds the record of a run.
pub fn make_record(view: &RunView, params: &Params, stopped: Option<String>) -> RunRecord {
    let network = &view.network;
    let nodes = network
        .nodes
        .iter()
        .map(|node| (node.x, node.y, node.weight))
        .collect();
    let segments = (0..network.segments.len())
        .map(|index| segment_entry(view, index))
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

/// Writes the record of a run, the very bytes of `write_record(&make_record(view, params,
/// stopped))`, into `writer` as it goes: nodes and segments are read from the view one at a
/// time, so no copy of them (nor the text) is held in memory. Give it a buffered writer.
pub fn write_record_to<W: std::io::Write>(
    writer: W,
    view: &RunView,
    params: &Params,
    stopped: Option<&str>,
) -> std::io::Result<()> {
    let record = StreamedRecord {
        view,
        params,
        stopped,
    };
    serde_json::to_writer_pretty(writer, &record).map_err(std::io::Error::from)
}

/// A run record borrowed from a run's view: serialises exactly as the `RunRecord` that
/// `make_record` builds (same fields, same order, same shapes).
struct StreamedRecord<'a> {
    view: &'a RunView,
    params: &'a Params,
    stopped: Option<&'a str>,
}

impl Serialize for StreamedRecord<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let network = &self.view.network;
        let caution = self.params.is_site().then_some(SITE_CAUTION);
        let mut record = serializer.serialize_struct("RunRecord", 13)?;
        record.serialize_field("format", RECORD_FORMAT)?;
        record.serialize_field("version", &RECORD_VERSION)?;
        record.serialize_field("digest", &self.view.digest)?;
        record.serialize_field("stopped", &self.stopped)?;
        record.serialize_field("params", &Some(self.params))?;
        record.serialize_field("units", &network.units)?;
        record.serialize_field("cell_size", &network.cell_size)?;
        record.serialize_field("area", &network.area)?;
        record.serialize_field("nodes", &StreamedNodes(&network.nodes))?;
        record.serialize_field("segments", &StreamedSegments(self.view))?;
        record.serialize_field("cells", &network.cells)?;
        record.serialize_field("metrics", &Some(&self.view.metrics))?;
        if caution.is_some() {
            record.serialize_field("caution", &caution)?;
        } else {
            record.skip_field("caution")?;
        }
        record.end()
    }
}

/// Nodes as `[x, y, weight]` triples, as `RunRecord::nodes` holds them.
struct StreamedNodes<'a>(&'a [Node]);

impl Serialize for StreamedNodes<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut nodes = serializer.serialize_seq(Some(self.0.len()))?;
        for node in self.0 {
            nodes.serialize_element(&(node.x, node.y, node.weight))?;
        }
        nodes.end()
    }
}

/// Segments with their table row, as `make_record` fills `RunRecord::segments`.
struct StreamedSegments<'a>(&'a RunView);

impl Serialize for StreamedSegments<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let segments = &self.0.network.segments;
        let mut list = serializer.serialize_seq(Some(segments.len()))?;
        for index in 0..segments.len() {
            list.serialize_element(&segment_entry(self.0, index))?;
        }
        list.end()
    }
}

/// The record entry of segment `index` of a view.
fn segment_entry(view: &RunView, index: usize) -> SegmentEntry {
    let segment = view.network.segments[index];
    let table = &view.table;
    SegmentEntry {
        from: segment.from,
        to: segment.to,
        flow: table.flow.get(index).copied().unwrap_or(0.0),
        width: table.width.get(index).copied().unwrap_or(0.0),
        order: table.order.get(index).copied().unwrap_or(0),
        length: table.length.get(index).copied().unwrap_or(0.0),
    }
}

fn json_error(error: serde_json::Error) -> RecordError {
    RecordError::Json(format!(
        "line {} column {}: {error}",
        error.line(),
        error.column()
    ))
}

/// Reads a record of version 1 or 2 and rebuilds its network (digest and metrics are for the
/// caller to recompute from it). A version-1 record comes back converted to version 2; its
/// nodes must form a forest. A version-2 record may hold loops.
pub fn read_record(text: &str) -> Result<(RunRecord, Network), RecordError> {
    // A UTF-8 byte-order mark (some editors write one) is not part of the JSON.
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let header: RecordHeader = serde_json::from_str(text).map_err(json_error)?;
    if header.format != RECORD_FORMAT {
        return Err(RecordError::Format(header.format));
    }
    let record = match header.version {
        1 => from_version_1(serde_json::from_str(text).map_err(json_error)?)?,
        2 => serde_json::from_str::<RunRecord>(text).map_err(json_error)?,
        other => return Err(RecordError::Version(other)),
    };
    let network = Network {
        nodes: record
            .nodes
            .iter()
            .map(|&(x, y, weight)| Node { x, y, weight })
            .collect(),
        segments: record
            .segments
            .iter()
            .map(|entry| Segment {
                from: entry.from,
                to: entry.to,
            })
            .collect(),
        area: record.area,
        units: record.units.clone(),
        cell_size: record.cell_size,
        cells: record.cells.clone(),
    };
    network
        .check()
        .map_err(|error| RecordError::Topology(error.to_string()))?;
    if header.version == 1 {
        network
            .topology()
            .map_err(|error| RecordError::Topology(error.to_string()))?;
    }
    Ok((record, network))
}

/// Converts a version-1 record: parents become segments (node order, as a grown network
/// lists them), keeping the informative values of the stored segment with the same ends.
fn from_version_1(old: RunRecordVersion1) -> Result<RunRecord, RecordError> {
    let count = old.nodes.len() as i64;
    let mut parents = Vec::with_capacity(old.nodes.len());
    for (index, &(_, _, parent, _)) in old.nodes.iter().enumerate() {
        parents.push(match parent {
            -1 => NO_PARENT,
            value if (0..count).contains(&value) => value as u32,
            value => {
                return Err(RecordError::Parent {
                    node: index,
                    parent: value,
                })
            }
        });
    }
    let stored: std::collections::HashMap<(u32, u32), &SegmentEntry> = old
        .segments
        .iter()
        .map(|entry| ((entry.from, entry.to), entry))
        .collect();
    let segments = segments_from_parents(&parents)
        .into_iter()
        .map(|segment| match stored.get(&(segment.from, segment.to)) {
            Some(&entry) => entry.clone(),
            None => SegmentEntry {
                from: segment.from,
                to: segment.to,
                ..SegmentEntry::default()
            },
        })
        .collect();
    Ok(RunRecord {
        format: old.format,
        version: RECORD_VERSION,
        digest: old.digest,
        stopped: old.stopped,
        params: old.params,
        units: old.units,
        cell_size: old.cell_size,
        area: old.area,
        nodes: old
            .nodes
            .iter()
            .map(|&(x, y, _, weight)| (x, y, weight))
            .collect(),
        segments,
        cells: old.cells,
        metrics: old.metrics,
        caution: old.caution,
    })
}
