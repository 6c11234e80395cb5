//! `Growth`: the incremental grower. `Growth::new` validates parameters (the only place that
//! can fail); `step(n)` adds up to `n` cells and never fails; `network()` returns the forest in
//! physical units.
//!
//! One step is a pipeline: pick a frontier cell by the joining rule, re-check its attachment
//! when attachments can go stale, add its node (splitting a segment if it attaches to one),
//! offer the new node to every cell within the search radius, and refresh flows and transport
//! costs when the network has grown by `refresh`.

mod attach;
mod clearance;
mod cost;
mod frontier;
mod joining;
mod lattice;
mod midrib;
mod offer;
mod planar;
mod refine;
mod refresh;
mod segment_grid;

use rand_chacha::ChaCha8Rng;
use rand_core::{RngCore, SeedableRng};

use crate::network::{segments_from_parents, CellSet, Network, Node, NO_PARENT};
use crate::params::{Joining, ParamError, Params};
use crate::region::{allowed_cells, check_start, zone_cells};
use crate::terrain::SpotSurface;
use clearance::BlockedCells;
use cost::{marginal, Anchor, CostModel};
use frontier::{Attachment, Frontier, Slot, NONE};
use lattice::{Lattice, BLOCKED, FREE, FRONTIER_TAG};
use segment_grid::SegmentGrid;

/// Why growth stopped.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum StopReason {
    /// The cell budget `cells` is reached.
    Budget,
    /// No allowed empty cell is within reach: the mask is full (or the rest is cut off).
    Full,
    /// Open growth: no frontier cell costs less than `threshold`.
    Threshold,
}

impl StopReason {
    /// The reason's short name as used in JSON (`budget`, `full`, `threshold`).
    pub fn name(self) -> &'static str {
        match self {
            StopReason::Budget => "budget",
            StopReason::Full => "full",
            StopReason::Threshold => "threshold",
        }
    }
}

/// What one call of `step` did.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct StepReport {
    /// Cells added by this call.
    pub added: u64,
    /// Set once growth has stopped (it stays stopped).
    pub stopped: Option<StopReason>,
}

/// An incremental grower holding the lattice, the network so far and the frontier.
pub struct Growth {
    /// The parameters as given (`params()`).
    given: Params,
    /// The parameters growth runs on: the given ones on the refined lattice (`refine`).
    refined: Params,
    model: CostModel,
    lattice: Lattice,
    frontier: Frontier,
    /// Random stream for joining (ChaCha8, stream 1 of the seed; stream 0 is the jitter).
    random: ChaCha8Rng,
    /// What an attachment to each node reads, one record per node (positions in cells).
    nodes: Vec<NodeRecord>,
    // The rest of each node, structure of arrays.
    parent: Vec<u32>,
    transport: Vec<f64>,
    flow: Vec<f64>,
    /// Length of each node's segment to its parent as computed when the node was added (0 for
    /// a root), read by the flow refresh while `only_appends` (no split has moved a parent).
    segment_length: Vec<f64>,
    /// `segment_length` times the marginal transport cost of each node's flow, and the flow
    /// it was priced at (NaN until first priced), read by the same refresh: a flow that has not
    /// changed since keeps its product's bits without pricing it again.
    segment_price: Vec<f64>,
    priced_flow: Vec<f64>,
    cell_of: Vec<u32>,
    /// Junctions (nodes off the cell centres) in each cell, as linked lists (segments only).
    junction_head: Vec<u32>,
    junction_next: Vec<u32>,
    axes: Vec<(f64, f64)>,
    cell_count: u64,
    /// The site-wide runoff coefficient: the weight of a cell in no runoff zone.
    cell_weight: f64,
    /// Runoff zone of each cell, 1-based (0: in no zone); empty without zones.
    zone_of: Vec<u16>,
    /// Runoff coefficient of each zone.
    zone_weights: Vec<f64>,
    /// The ground through the spot levels (in cells), when there are levels.
    surface: Option<SpotSurface>,
    /// Ground under each cell's node, NaN until first asked for; empty without levels.
    cell_ground: Vec<f64>,
    /// Ground under each node; empty without levels.
    node_ground: Vec<f64>,
    /// Whether a segment has been split: a junction then drains an older node, so node order
    /// is no longer a parents-first order (`refresh_flows`).
    has_junctions: bool,
    /// Whether a stored attachment must be re-checked when picked (its cost may be out of
    /// date, or it may cross a segment added since it was offered).
    recheck: bool,
    /// Whether a stored attachment's cost may be out of date (segment attachments, branch
    /// angles): the re-check then recomputes it from scratch.
    stale_costs: bool,
    /// Reference cost for weights of weighted joining.
    weight_reference: f64,
    last_refresh_nodes: usize,
    scratch_order: Vec<u32>,
    scratch_children: crate::network::Children,
    /// Candidate attachments of one cell, reused by plane growth.
    scratch_candidates: Vec<(f64, Attachment)>,
    /// The cells within reach of an offered node (`offer`).
    scratch_reached: Vec<offer::Reached>,
    /// The offered node's cost floor at each distinct least length of the spots (`offer`).
    scratch_floor_costs: Vec<f64>,
    /// Every segment by the buckets its bounding box touches (plane growth only).
    segment_grid: Option<SegmentGrid>,
    /// The cells near blocked ones (`keep_clear` only, and only when some cell is blocked).
    blocked_cells: Option<BlockedCells>,
    stopped: Option<StopReason>,
}

/// Weights below this total are rescaled against the current cheapest cost.
const WEIGHT_FLOOR: f64 = 1e-150;
/// Largest exponent `(reference - cost) / T` allowed before rescaling.
const WEIGHT_CEILING_EXPONENT: f64 = 500.0;

impl Growth {
    /// Validates the parameters and plants the roots. Fails with an error naming the parameter.
    pub fn new(given: &Params) -> Result<Growth, ParamError> {
        given.validate()?;
        if given.domain.refine > 1 {
            // Errors name the given cells, not the refined ones.
            check_start(given, &allowed_cells(given))?;
        }
        let mut fine = refine::refined(given);
        let allowed = allowed_cells(&fine);
        refine::move_roots_inside(&mut fine, given, &allowed);
        let params = &fine;
        check_start(params, &allowed)?;
        let lattice = Lattice::new(params, &allowed);
        let mut random = ChaCha8Rng::seed_from_u64(params.run.seed);
        random.set_stream(1);
        let mut growth = Growth {
            given: given.clone(),
            refined: params.clone(),
            model: CostModel::new(params, given.domain.refine),
            lattice,
            frontier: Frontier::new(
                params.run.joining != Joining::Cheapest,
                // `pick` asks for the cheapest slot at every step only under these.
                params.run.joining == Joining::Cheapest || params.run.threshold.is_some(),
            ),
            random,
            nodes: Vec::new(),
            parent: Vec::new(),
            transport: Vec::new(),
            flow: Vec::new(),
            segment_length: Vec::new(),
            segment_price: Vec::new(),
            priced_flow: Vec::new(),
            cell_of: Vec::new(),
            junction_head: Vec::new(),
            junction_next: Vec::new(),
            axes: Vec::new(),
            cell_count: 0,
            cell_weight: params.domain.runoff,
            zone_of: zone_cells(params),
            zone_weights: params.domain.zones.iter().map(|zone| zone.runoff).collect(),
            surface: SpotSurface::new(params.domain.levels.clone()),
            cell_ground: Vec::new(),
            node_ground: Vec::new(),
            has_junctions: false,
            recheck: params.run.attach_to_segments
                || params.costs.branch_angle.is_some()
                || params.run.planar,
            stale_costs: params.run.attach_to_segments || params.costs.branch_angle.is_some(),
            weight_reference: f64::NAN,
            last_refresh_nodes: 0,
            scratch_order: Vec::new(),
            scratch_children: Default::default(),
            scratch_candidates: Vec::new(),
            scratch_reached: Vec::new(),
            scratch_floor_costs: Vec::new(),
            segment_grid: params
                .run
                .planar
                .then(|| SegmentGrid::new(params.domain.width, params.domain.height)),
            blocked_cells: (params.run.keep_clear && allowed.iter().any(|&ok| !ok)).then(|| {
                // A segment offered from a node's cell ends within the search radius of it
                // (a junction's segment, a cell further out at most): one more for rounding.
                let margin = params.run.radius.floor() as usize + 1;
                BlockedCells::new(
                    params.domain.width as usize,
                    params.domain.height as usize,
                    margin,
                    |cell| !allowed[cell],
                )
            }),
            stopped: None,
        };
        if params.run.attach_to_segments {
            growth.junction_head = vec![NONE; growth.lattice.cell_total()];
        }
        if growth.surface.is_some() {
            growth.cell_ground = vec![f64::NAN; growth.lattice.cell_total()];
        }
        // One node per occupied cell (junctions come on top): reserving them at once spares
        // the copies of doubling arrays.
        let allowed_count = allowed.iter().filter(|&&ok| ok).count() as u64;
        growth.reserve_nodes(params.run.cells.min(allowed_count) as usize);
        for (index, root) in params.domain.roots.iter().enumerate() {
            let cell = growth.lattice.cell_index(root.x, root.y);
            match growth.lattice.state[cell] {
                BLOCKED => {
                    return Err(ParamError {
                        key: format!("roots[{index}]"),
                        value: format!("cell ({}, {})", root.x, root.y),
                        allowed: "a cell inside the outline and mask and outside obstacles".into(),
                    })
                }
                state if state < FRONTIER_TAG => {
                    return Err(ParamError {
                        key: format!("roots[{index}]"),
                        value: format!("cell ({}, {})", root.x, root.y),
                        allowed: "a cell not already taken by another root".into(),
                    })
                }
                _ => {}
            }
            growth.axes.push(unit_outflow(root.outflow));
            growth.add_root(cell, index as u32);
        }
        if params.domain.midrib > 0.0 {
            growth.lay_midribs(params.domain.midrib);
        }
        if growth.cell_count >= params.run.cells {
            growth.stopped = Some(StopReason::Budget);
        }
        Ok(growth)
    }

    /// Adds up to `count` cells; stops early when a stop rule fires. Never fails.
    pub fn step(&mut self, count: u64) -> StepReport {
        let mut added = 0;
        while added < count && self.stopped.is_none() {
            match self.pick() {
                Ok((slot, attachment)) => {
                    self.join(slot, attachment);
                    added += 1;
                    if self.cell_count >= self.refined.run.cells {
                        self.stopped = Some(StopReason::Budget);
                    }
                }
                Err(reason) => self.stopped = Some(reason),
            }
        }
        StepReport {
            added,
            stopped: self.stopped,
        }
    }

    /// Grows to the end (a stop rule) and returns why it stopped.
    pub fn run(&mut self) -> StopReason {
        loop {
            if let Some(reason) = self.step(u64::MAX).stopped {
                return reason;
            }
        }
    }

    /// Why growth stopped, once it has.
    pub fn stopped(&self) -> Option<StopReason> {
        self.stopped
    }

    /// The parameters this run was built from.
    pub fn params(&self) -> &Params {
        &self.given
    }

    /// Cells occupied so far (roots included).
    pub fn cell_count(&self) -> u64 {
        self.cell_count
    }

    /// Nodes so far: cells plus junctions on segments.
    pub fn node_count(&self) -> usize {
        self.nodes.len()
    }

    /// Cells currently on the frontier.
    pub fn frontier_len(&self) -> usize {
        self.frontier.len()
    }

    /// The network so far in physical units: node `i` of the grower is node `i` here, and the
    /// segments run from each non-root node to its parent, in node order.
    pub fn network(&self) -> Network {
        self.network_of(self.physical_nodes())
    }

    /// Every node in physical units, as `node` gives them.
    fn physical_nodes(&self) -> Vec<Node> {
        (0..self.nodes.len())
            .map(|index| self.node(index))
            .collect()
    }

    /// The network with these nodes (`physical_nodes`) and the grower's segments and cells.
    fn network_of(&self, nodes: Vec<Node>) -> Network {
        let size = self.refined.domain.cell_size;
        let cell_area = size * size;
        let occupied = self
            .cell_of
            .iter()
            .copied()
            .filter(|&cell| cell != NONE)
            .collect();
        Network {
            nodes,
            segments: segments_from_parents(&self.parent),
            area: self.cell_count as f64 * cell_area,
            units: self.refined.domain.units.clone(),
            cell_size: size,
            cells: CellSet {
                width: self.refined.domain.width,
                height: self.refined.domain.height,
                occupied,
            },
        }
    }

    /// `network()` when growth is over: the lattice, the frontier and the node arrays that
    /// only growth reads are freed first, so that the network's arrays take over their memory
    /// instead of fresh pages, each of which costs the system a page fault to clear (a
    /// 100,000-cell run's network is about 4 MB).
    pub fn into_network(mut self) -> Network {
        self.lattice.release();
        self.frontier = Frontier::new(false, false);
        for array in [
            &mut self.transport,
            &mut self.flow,
            &mut self.segment_length,
            &mut self.segment_price,
            &mut self.priced_flow,
            &mut self.cell_ground,
            &mut self.node_ground,
        ] {
            *array = Vec::new();
        }
        for array in [
            &mut self.junction_head,
            &mut self.junction_next,
            &mut self.scratch_order,
        ] {
            *array = Vec::new();
        }
        self.scratch_children = crate::network::Children::default();
        self.scratch_reached = Vec::new();
        self.segment_grid = None;
        self.blocked_cells = None;
        // The node records go once the network's nodes are read out of them.
        let nodes = self.physical_nodes();
        self.nodes = Vec::new();
        self.network_of(nodes)
    }
}

// Reading the network node by node, without copying it (`network()` copies it whole).
impl Growth {
    /// Node `index` in physical units, as `network()` gives it. Panics when `index` is not
    /// below `node_count()`.
    pub fn node(&self, index: usize) -> Node {
        let size = self.refined.domain.cell_size;
        Node {
            x: self.nodes[index].x * size,
            y: self.nodes[index].y * size,
            weight: match self.cell_of[index] {
                NONE => 0.0,
                cell => self.own_weight(cell as usize) * (size * size),
            },
        }
    }

    /// The node `index` drains into (`NO_PARENT` for a root): the segment from `index` to
    /// it is a segment of `network()`. Panics when `index` is not below `node_count()`.
    pub fn parent_of(&self, index: usize) -> u32 {
        self.parent[index]
    }

    /// Whether every node so far was appended after its parent and has kept its parent: false
    /// once a segment has been split (segment attachment), which gives an older node a new
    /// parent. While true, the network grown so far is the network of any earlier moment plus
    /// the nodes added since, each with the segment to its parent.
    pub fn only_appends(&self) -> bool {
        !self.has_junctions
    }
}

// Internal stages.
impl Growth {
    fn add_root(&mut self, cell: usize, root_index: u32) {
        let (x, y) = self.lattice.position(cell);
        let (axis_x, axis_y) = self.axes[root_index as usize];
        let node = self.push_node(
            x,
            y,
            NO_PARENT,
            axis_x,
            axis_y,
            0.0,
            0.0,
            root_index,
            cell as u32,
        );
        self.flow[node as usize] = self.own_weight(cell);
        self.occupy(cell, node);
    }

    fn reserve_nodes(&mut self, count: usize) {
        self.nodes.reserve_exact(count);
        self.parent.reserve_exact(count);
        self.transport.reserve_exact(count);
        self.flow.reserve_exact(count);
        self.segment_length.reserve_exact(count);
        if self.refined.costs.w_flow > 0.0 {
            self.segment_price.reserve_exact(count);
            self.priced_flow.reserve_exact(count);
        }
        self.cell_of.reserve_exact(count);
        if self.refined.run.attach_to_segments {
            self.junction_next.reserve_exact(count);
        }
    }

    #[allow(clippy::too_many_arguments)]
    fn push_node(
        &mut self,
        x: f64,
        y: f64,
        parent: u32,
        down_x: f64,
        down_y: f64,
        dist: f64,
        transport: f64,
        root: u32,
        cell: u32,
    ) -> u32 {
        let node = self.nodes.len() as u32;
        self.nodes.push(NodeRecord {
            x,
            y,
            down_x,
            down_y,
            dist,
            root,
            children: 0,
        });
        self.parent.push(parent);
        self.transport.push(transport);
        self.flow.push(0.0);
        self.cell_of.push(cell);
        if self.refined.run.attach_to_segments {
            self.junction_next.push(NONE);
        }
        if let Some(surface) = &self.surface {
            // A junction (no cell of its own) reads the ground at its own place.
            let ground = match cell {
                NONE => surface.at(x, y),
                cell => self.cell_ground(cell as usize, x, y),
            };
            self.node_ground.push(ground);
        }
        let length = if parent == NO_PARENT {
            0.0
        } else {
            let downstream = &mut self.nodes[parent as usize];
            downstream.children += 1;
            // The expression of `refresh_flows`, so the same bits.
            let (vx, vy) = (downstream.x - x, downstream.y - y);
            (vx * vx + vy * vy).sqrt()
        };
        self.segment_length.push(length);
        if self.refined.costs.w_flow > 0.0 {
            self.segment_price.push(0.0);
            self.priced_flow.push(f64::NAN);
        }
        node
    }

    /// Marks a cell occupied by `node`, removes it from the frontier, and offers the node to
    /// every cell within reach.
    fn occupy(&mut self, cell: usize, node: u32) {
        let state = self.lattice.state[cell];
        if state != FREE && state & FRONTIER_TAG != 0 && state != BLOCKED {
            self.frontier.remove(state & !FRONTIER_TAG);
        }
        self.lattice.state[cell] = node;
        self.cell_count += 1;
        self.offer(cell, node);
    }

    /// Adds the picked cell's node, splitting a segment when it attaches to one.
    fn join(&mut self, slot_index: u32, attachment: Attachment) {
        let cell = self.frontier.slots[slot_index as usize].cell as usize;
        let target = if attachment.segment_parent == NONE {
            attachment.target
        } else {
            self.split(attachment)
        };
        self.attach_cell(cell, target, Supply::AlongAxis);
    }

    /// Occupies `cell` with a node draining into `target`: its segment's direction, supply
    /// distance and transport cost, the segment index of plane growth, the offer to cells
    /// within reach and the flow refresh; returns the new node.
    fn attach_cell(&mut self, cell: usize, target: u32, supply: Supply) -> u32 {
        let (cx, cy) = self.lattice.position(cell);
        let t = target as usize;
        let to = self.nodes[t];
        let (vx, vy) = (to.x - cx, to.y - cy);
        let length = (vx * vx + vy * vy).sqrt();
        let (down_x, down_y) = if length > 0.0 {
            (vx / length, vy / length)
        } else {
            (to.down_x, to.down_y)
        };
        let root = to.root;
        let dist = match supply {
            Supply::AlongAxis => {
                let (axis_x, axis_y) = self.axes[root as usize];
                to.dist + self.model.supply_length(vx, vy, axis_x, axis_y)
            }
            Supply::Free => to.dist,
        };
        let own = self.own_weight(cell);
        let transport =
            self.transport[t] + length * marginal(own, self.cell_weight, self.refined.costs.alpha);
        let node = self.push_node(
            cx,
            cy,
            target,
            down_x,
            down_y,
            dist,
            transport,
            root,
            cell as u32,
        );
        self.flow[node as usize] = own;
        self.note_segment(node);
        self.occupy(cell, node);
        self.maybe_refresh();
        node
    }

    /// Splits the segment `target -> parent` at `along`, returning the new junction node.
    fn split(&mut self, attachment: Attachment) -> u32 {
        let upstream = attachment.target;
        let anchor = self.segment_anchor(upstream, attachment.along);
        let parent = self.parent[upstream as usize];
        let root = self.nodes[upstream as usize].root;
        let junction = self.push_node(
            anchor.x,
            anchor.y,
            parent,
            anchor.down_x,
            anchor.down_y,
            anchor.dist,
            anchor.transport,
            root,
            NONE,
        );
        self.flow[junction as usize] = self.flow[upstream as usize];
        self.has_junctions = true;
        // The upstream node now drains into the junction; the parent keeps one child.
        self.parent[upstream as usize] = junction;
        self.nodes[parent as usize].children -= 1;
        self.nodes[junction as usize].children += 1;
        let cell = self.lattice.cell_at(anchor.x, anchor.y);
        self.junction_next[junction as usize] = self.junction_head[cell];
        self.junction_head[cell] = junction;
        self.note_segment(junction);
        self.note_segment(upstream);
        self.offer(cell, junction);
        junction
    }
}

/// The unit vector of a root's outflow direction. A direction does not depend on its length:
/// components whose squares would underflow to zero or overflow to infinity are first divided
/// by the larger of the two, so `[1e-200, 0]` gives what `[1, 0]` gives and `[1e200, 1e200]`
/// what `[1, 1]` gives. Every other direction takes the plain formula, as it always has, so
/// version-1 links keep their bits.
fn unit_outflow([dx, dy]: [f64; 2]) -> (f64, f64) {
    let squared = dx * dx + dy * dy;
    if squared.is_finite() && squared >= f64::MIN_POSITIVE {
        let norm = squared.sqrt();
        return (dx / norm, dy / norm);
    }
    let larger = dx.abs().max(dy.abs());
    let (dx, dy) = (dx / larger, dy / larger);
    let norm = (dx * dx + dy * dy).sqrt();
    (dx / norm, dy / norm)
}

/// What an attachment to a node reads of it, kept together so that pricing an attachment to a
/// node anywhere in the network reads one or two cache lines (48 bytes) instead of a line from
/// each of seven arrays. Its transport cost stays in an array of its own, which the flow
/// refresh rewrites in one sequential pass.
#[derive(Clone, Copy)]
struct NodeRecord {
    /// Position, in cells.
    x: f64,
    y: f64,
    /// Unit direction of the node's segment, towards its parent (the root's outflow for a root).
    down_x: f64,
    down_y: f64,
    /// Supply distance: the path from the root that the supply term prices, in cells.
    dist: f64,
    /// The root this node drains to.
    root: u32,
    /// Nodes draining into this one (0: a tip).
    children: u32,
}

/// How a new node's supply distance (the path from the root the supply term prices) grows.
#[derive(Clone, Copy)]
enum Supply {
    /// By the segment's length along the root's axis, as every joined cell's.
    AlongAxis,
    /// Not at all: a laid midrib cell supplies the blade as the petiole does.
    Free,
}
