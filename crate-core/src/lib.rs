//! Ramulus core: grows branching transport networks on a lattice (`growth`), measures them
//! (`metrics`), and reads and writes them as data (`import`, `record`). No I/O, clock, threads
//! or platform code lives here: callers pass bytes and parameters in and get values back. It
//! knows nothing of drawing: pictures, colours and the texts people read live in `ramulus-draw`.
#![deny(missing_docs)]

pub mod channel_energy;
pub mod cleared;
pub mod digest;
pub mod drainage;
pub mod fast_libm;
pub mod fit;
pub mod growth;
pub mod import;
pub mod junctions;
pub mod limits;
pub mod link;
pub mod mask;
pub mod metrics;
pub mod network;
pub mod network_export;
pub mod params;
pub mod presets;
pub mod reconnection;
pub mod record;
pub mod region;
pub mod reshaping;
pub mod run;
pub mod schema;
pub mod segments;
pub mod site;
pub mod site_plan_svg;
pub mod site_sizing;
pub mod specimen;
pub mod terrain;
pub mod utf8_text;
pub mod veins;

pub use growth::{Growth, StepReport, StopReason};
pub use network::{Children, Network, NetworkKind, Node, Segment, Topology, NO_PARENT};
pub use params::{
    CostWeights, Domain, Joining, ParamError, Params, Root, RunControl, Widths, Zone,
};
