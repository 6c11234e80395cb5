//! `node_area_runoff`: the drained area and runoff coefficient each node of a grown network
//! adds itself (the hydraulics' `node_area` and `node_runoff`).

use crate::network::Network;
use crate::params::Params;
use crate::region::zone_cells;

/// Per node of a network, in node order: the area it drains itself and that area's runoff
/// coefficient. A node's weight in a grown network is `runoff[i] * area[i]`.
#[derive(Clone, Debug, PartialEq)]
pub struct NodeRunoff {
    /// Area each node drains itself, in the run's length unit squared: one cell's area for a
    /// cell's node, 0 for a junction off the cell centres.
    pub area: Vec<f64>,
    /// Runoff coefficient of that area: the coefficient of the runoff zone holding the cell's
    /// centre (the last listed), or the run's `runoff` outside every zone; 0 for a junction.
    pub runoff: Vec<f64>,
}

/// The drained area and runoff coefficient of every node of `network`, grown from `params`
/// (validated). A node is a cell's node when its weight is positive; its cell is the one its
/// position lies in (a node's jitter keeps it inside its cell).
pub fn node_area_runoff(network: &Network, params: &Params) -> NodeRunoff {
    let size = params.domain.cell_size;
    let cell_area = size * size;
    let (width, height) = (params.domain.width as usize, params.domain.height as usize);
    let zone_of = zone_cells(params);
    let mut area = Vec::with_capacity(network.nodes.len());
    let mut runoff = Vec::with_capacity(network.nodes.len());
    for node in &network.nodes {
        if node.weight <= 0.0 || width == 0 || height == 0 {
            area.push(0.0);
            runoff.push(0.0);
            continue;
        }
        let column = ((node.x / size).floor().max(0.0) as usize).min(width - 1);
        let row = ((node.y / size).floor().max(0.0) as usize).min(height - 1);
        let coefficient = match zone_of.get(row * width + column) {
            Some(&zone) if zone > 0 => params.domain.zones[zone as usize - 1].runoff,
            _ => params.domain.runoff,
        };
        area.push(cell_area);
        runoff.push(coefficient);
    }
    NodeRunoff { area, runoff }
}
