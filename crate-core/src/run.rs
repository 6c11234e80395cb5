//! The pipeline after growth (`RunView::new`): named passes, each computed once per change of
//! the network and shared by the readings, the CSV, the run record, the page and the SVG (drawn in
//! `ramulus-draw`).
//!
//! 1. **topology**: `Network::check`, then the forest view (`Topology`) and Strahler orders
//!    when the network is a forest (`topology_pass`);
//!    **junctions** (`junction_pass`, only with `relax_junctions` > 0 on a forest): each
//!    junction moves off the lattice toward the flow-weighted Fermat point of its neighbours
//!    (`junctions::relax_junctions`), lowering `sum q^alpha L` and keeping the network plane;
//!    the forest view's lengths follow (flows, parents and orders do not change). Every later
//!    pass, the exports and the digest see the moved nodes; `Growth` stays on its lattice. It
//!    runs here, not in growth, so every caller of `RunView::new` (command line, page, fitting)
//!    gets the same network from the same parameters;
//!    **channel energy** (`energy_pass`, only with `energy_sweeps` > 0 on a forest, before the
//!    junctions): nodes drain to another node within the reach whenever that lowers
//!    `sum Q^0.5 L` (`channel_energy::lower_energy`, optimal channel networks), the network
//!    staying a plane forest with the same nodes and roots; the forest view and orders are
//!    derived again;
//! 2. **conducting network**: which segments carry flow (`conducting_network`): those draining
//!    at least `vein_area` (every segment when it is 0); with a threshold, the vein network
//!    (`veins::vein_network`) is what the metrics measure and its Strahler orders are the
//!    table's (tissue segments have order 0 and width 0);
//! 3. **loops** (`loop_pass`, only with `reconnect` set): free-ending veins close nested loops
//!    (`reconnection::close_loops`); the new segments are appended after the grown tree's, so
//!    the network becomes looped while the forest view stays the grown tree's (the conducting
//!    pass and the flows are the tree's); the metrics measure the vein network plus the new
//!    segments;
//! 4. **widths**: the per-segment table of flows, widths, orders and lengths (`SegmentTable`);
//!    with loops, a new segment carries the flow of the tip that made it and a loop wall is at
//!    least as wide as that flow gives;
//! 5. **sizing**: room for sizing pipes or channels from flows (`Sizing`, empty for now, so
//!    nothing is sized yet);
//! 6. **metrics**: every entry of the metric table (`measure_with`); with loops, the looped
//!    vein network's metrics plus the forest-only readings (branching angles, Strahler orders,
//!    Hack exponent, tortuosity, transport cost) of the grown vein tree before its loops closed
//!    (`metrics::with_tree_readings`, kind `looped_on_tree`);
//! 7. **digest**: the hash of the exact geometry and topology (new segments included).

use crate::channel_energy::{apply_parents, lower_energy, ChannelEnergy};
use crate::digest::digest_hex;
use crate::junctions::{relax_junctions, Relaxation};
use crate::metrics::{measure_weighted, measure_with, with_tree_readings, Measured, Metrics};
use crate::network::{Network, Segment, Topology, TopologyError, NO_PARENT};
use crate::params::Params;
use crate::reconnection::{
    close_loops, GrownVeins, LoopClosing, LoopProgress, LoopRule, Reconnection,
};
use crate::segments::{strahler_orders, SegmentTable, WidthRule};
use crate::site::node_area_runoff;
use crate::veins::{conducting_segments, conducting_segments_by_area, vein_network};

/// The forest view and Strahler orders of a forest, the output of the topology pass.
#[derive(Clone, Debug)]
pub struct ForestView {
    /// Parents, children, order and flows.
    pub topology: Topology,
    /// Strahler order of each node's downstream segment (see `segments::strahler_orders`).
    pub orders: Vec<u32>,
}

/// Which segments conduct, the output of the conducting-network pass: one entry per segment.
#[derive(Clone, Debug, Default)]
pub struct ConductingNetwork {
    /// Whether segment `k` conducts.
    pub conducts: Vec<bool>,
    /// The vein network when some segment of a forest is tissue; `None` when every segment
    /// conducts (the whole network is the vein network).
    pub veins: Option<VeinView>,
}

/// The vein network (conducting segments only) with its forest view.
#[derive(Clone, Debug)]
pub struct VeinView {
    /// The conducting segments and their nodes (`veins::vein_network`).
    pub network: Network,
    /// Its forest view and Strahler orders.
    pub forest: ForestView,
    /// Each whole-network node's index in `network`, `NO_PARENT` for tissue nodes.
    pub index: Vec<u32>,
}

impl ConductingNetwork {
    /// How many segments are tissue (do not conduct).
    pub fn tissue_count(&self) -> usize {
        self.conducts.iter().filter(|&&conducts| !conducts).count()
    }
}

/// The loops closed after growth, the output of the loop pass.
#[derive(Clone, Debug)]
pub struct LoopView {
    /// The new segments and loop walls, in the whole network's node indices; the new segments
    /// are the whole network's last `reconnection.links.len()` segments.
    pub reconnection: Reconnection,
    /// The measured network: the vein network (or the whole network when every segment
    /// conducts) plus the new segments.
    pub network: Network,
    /// The width of each segment of `network` (the widths pass's), thinnest removed first by
    /// the nesting metric.
    pub widths: Vec<f64>,
}

/// The output of the sizing pass. Room for sizing from flows (pipe or channel sizes of a site,
/// later); it holds nothing yet and no pass fills it.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Sizing {}

/// A network after the passes that reshape it (topology, channel energy, junctions), as
/// `RunView::after_reshaping` takes it.
#[derive(Clone, Debug)]
pub struct Reshaped {
    /// The reshaped network.
    pub network: Network,
    /// Its forest view, `None` when it has loops.
    pub forest: Option<ForestView>,
    /// What the channel energy pass did, `None` when it did not run.
    pub energy: Option<ChannelEnergy>,
    /// What the junction pass did, `None` when it did not run.
    pub relaxation: Option<Relaxation>,
}

/// A network together with every pass's output.
#[derive(Clone, Debug)]
pub struct RunView {
    /// The network in physical units.
    pub network: Network,
    /// Topology pass: the forest view, `None` when the network has loops.
    pub forest: Option<ForestView>,
    /// Channel energy pass: energy before and after and moves per sweep, `None` when it did
    /// not run.
    pub energy: Option<ChannelEnergy>,
    /// Junction pass: what the relaxation did, `None` when it did not run.
    pub relaxation: Option<Relaxation>,
    /// Conducting-network pass (of the grown tree; the new segments of the loop pass conduct).
    pub conducting: ConductingNetwork,
    /// Loop pass: the loops closed after growth; `None` when `reconnect` is off or the network
    /// did not come as a forest.
    pub loops: Option<LoopView>,
    /// Widths pass: flow, width, order and length per segment.
    pub table: SegmentTable,
    /// Sizing pass (room, empty).
    pub sizing: Sizing,
    /// Metrics pass: every metric that applies.
    pub metrics: Metrics,
    /// Digest of the exact geometry and topology, 16 hex digits.
    pub digest: String,
}

/// Topology pass: checks the network and derives the forest view when it is a forest.
pub fn topology_pass(network: &Network) -> Result<Option<ForestView>, TopologyError> {
    // `Network::topology` runs `Network::check` first, so its check errors are the invalid
    // networks and its other errors the valid networks that are not forests.
    match network.topology() {
        Ok(topology) => {
            let orders = strahler_orders(network, &topology);
            Ok(Some(ForestView { topology, orders }))
        }
        Err(TopologyError::TwoDownstream { .. } | TopologyError::Cycle { .. }) => Ok(None),
        Err(error) => Err(error),
    }
}

/// Junction pass: with `relax_junctions` > 0 and a forest, moves the junctions of `network`
/// (`junctions::relax_junctions` with `alpha`) and brings the forest view's segment lengths up
/// to the moved nodes; `None`, touching nothing, otherwise. Specimens and records are measured
/// as they are: their callers pass parameters with `relax_junctions` 0.
pub fn junction_pass(
    network: &mut Network,
    forest: Option<&mut ForestView>,
    params: &Params,
) -> Option<Relaxation> {
    let sweeps = params.run.relax_junctions;
    let view = forest.filter(|_| sweeps > 0)?;
    let relaxation = relax_junctions(network, &view.topology, params.costs.alpha, sweeps);
    for (node, length) in view.topology.length.iter_mut().enumerate() {
        let parent = view.topology.parent[node];
        if parent != NO_PARENT {
            *length = network.segment_length(node as u32, parent);
        }
    }
    Some(relaxation)
}

/// Channel energy pass: with `energy_sweeps` > 0 and a forest, re-points where nodes of
/// `network` drain to lower `sum Q^0.5 L` (`channel_energy::lower_energy`, candidates within
/// `radius` cells) and derives the forest view and orders of the result again; `None`, touching
/// nothing, otherwise. Specimens and records are measured as they are (`as_measured` turns it
/// off).
pub fn energy_pass(
    network: &mut Network,
    forest: &mut Option<ForestView>,
    params: &Params,
) -> Result<Option<ChannelEnergy>, TopologyError> {
    let sweeps = params.run.energy_sweeps;
    let Some(view) = forest.as_ref().filter(|_| sweeps > 0) else {
        return Ok(None);
    };
    let reach = params.run.energy_reach.unwrap_or(params.run.radius) * network.cell_size;
    let (parent, report) = lower_energy(network, &view.topology, reach, sweeps);
    if report.moves() > 0 {
        apply_parents(network, &parent);
        *forest = topology_pass(network)?;
    }
    Ok(Some(report))
}

/// The parameters with which a network that is already final (a traced specimen, a run record
/// read back) is measured: `params` without junction relaxation or channel energy
/// optimisation, so it is measured as it is.
pub fn as_measured(params: &Params) -> Params {
    let mut params = params.clone();
    params.run.relax_junctions = 0;
    params.run.energy_sweeps = 0;
    params
}

/// Conducting-network pass: a segment of a forest conducts when it drains at least
/// `vein_area` (`veins::conducting_segments`); the vein network is built when some segment does
/// not. Every segment of a network with loops conducts (its flows are unknown).
pub fn conducting_network(
    network: &Network,
    forest: Option<&ForestView>,
    params: &Params,
) -> ConductingNetwork {
    let topology = forest.map(|view| &view.topology);
    let conducts = if params.domain.zones.is_empty() {
        conducting_segments(
            network,
            topology,
            params.widths.vein_area,
            params.domain.runoff,
        )
    } else {
        // Runoff varies by zone: the threshold is on the plain area drained.
        let own = node_area_runoff(network, params);
        conducting_segments_by_area(network, topology, params.widths.vein_area, &own.area)
    };
    let veins = match topology {
        Some(topology) if conducts.iter().any(|&conducts| !conducts) => {
            let (veins, index) = vein_network(network, topology, &conducts);
            // The vein network of a forest is a forest (conducting segments hold the roots).
            topology_pass(&veins).ok().flatten().map(|forest| VeinView {
                network: veins,
                forest,
                index,
            })
        }
        _ => None,
    };
    ConductingNetwork { conducts, veins }
}

/// The conducting-network pass as the pipeline runs it: `conducting_network`, then the forest
/// view's Strahler orders replaced by those counted on the vein network (0 for tissue) when some
/// segment is tissue.
pub fn conducting_pass(
    network: &Network,
    forest: &mut Option<ForestView>,
    params: &Params,
) -> ConductingNetwork {
    let conducting = conducting_network(network, forest.as_ref(), params);
    if let Some(view) = forest.as_mut() {
        if conducting.veins.is_some() {
            view.orders = conducting_orders(view, &conducting);
        }
    }
    conducting
}

/// The Strahler order of each node's downstream segment counted on the vein network, 0 for
/// tissue; the whole network's orders when every segment conducts.
fn conducting_orders(forest: &ForestView, conducting: &ConductingNetwork) -> Vec<u32> {
    let Some(veins) = &conducting.veins else {
        return forest.orders.clone();
    };
    (0..forest.orders.len())
        .map(|node| {
            let segment = forest.topology.segment_of[node];
            // A root has no downstream segment; it is always in the vein network.
            let conducts = segment == NO_PARENT
                || conducting
                    .conducts
                    .get(segment as usize)
                    .copied()
                    .unwrap_or(true);
            match veins.index[node] {
                vein_node if conducts && vein_node != NO_PARENT => {
                    veins.forest.orders[vein_node as usize]
                }
                _ => 0,
            }
        })
        .collect()
}

/// The loop rule of a run (levels from `loop_levels`, the finest at `vein_area` or one cell's
/// area when every segment conducts); `None` when `reconnect` is off.
pub fn loop_rule(params: &Params) -> Option<LoopRule> {
    let ratio = params.widths.reconnect?;
    let cell_size = params.domain.cell_size;
    Some(LoopRule {
        ratio,
        levels: params.widths.loop_levels,
        finest_area: params.widths.vein_area.max(cell_size * cell_size),
        runoff: params.domain.runoff,
        cell_size,
        nest: params.widths.nest_loops,
        arches: params.widths.arches,
    })
}

/// Loop pass: closes nested loops on a grown forest when `reconnect` is set
/// (`reconnection::close_loops` with `loop_rule`); `None` otherwise.
pub fn loop_pass(
    network: &Network,
    forest: Option<&ForestView>,
    conducting: &ConductingNetwork,
    params: &Params,
) -> Option<Reconnection> {
    let rule = loop_rule(params)?;
    let forest = forest?;
    Some(close_loops(
        network,
        &forest.topology,
        &conducting.conducts,
        &rule,
    ))
}

/// A reshaped network after the conducting pass, with its loop pass set up to run a piece at
/// a time: the first part of the pipeline after reshaping (`Conducted::new`). A caller (the
/// page) steps the loop pass with `advance` and ends the pipeline with `finish`, which runs
/// what is left of the loops, then widths, metrics and digest (`RunView::after_loops`).
/// `RunView::after_reshaping` is `new` then `finish`, so any split gives the same view.
pub struct Conducted {
    reshaped: Reshaped,
    conducting: ConductingNetwork,
    /// The loop pass in progress; `None` when it does not run (`reconnect` off, no forest).
    closing: Option<LoopClosing>,
}

impl Conducted {
    /// Runs the conducting pass on `reshaped` and sets the loop pass up (grids and searches;
    /// no loop is closed yet).
    pub fn new(reshaped: Reshaped, params: &Params) -> Conducted {
        let mut reshaped = reshaped;
        let conducting = conducting_pass(&reshaped.network, &mut reshaped.forest, params);
        let closing = match (loop_rule(params), reshaped.forest.as_ref()) {
            (Some(rule), Some(view)) => Some(LoopClosing::new(
                GrownVeins {
                    network: &reshaped.network,
                    topology: &view.topology,
                    conducts: &conducting.conducts,
                },
                &rule,
            )),
            _ => None,
        };
        Conducted {
            reshaped,
            conducting,
            closing,
        }
    }

    /// The grown forest the loop pass works on, with the pass.
    fn closing_parts(&mut self) -> Option<(GrownVeins<'_>, &mut LoopClosing)> {
        let view = self.reshaped.forest.as_ref()?;
        let closing = self.closing.as_mut()?;
        Some((
            GrownVeins {
                network: &self.reshaped.network,
                topology: &view.topology,
                conducts: &self.conducting.conducts,
            },
            closing,
        ))
    }

    /// Runs up to `steps` pieces of the loop pass (`LoopClosing::advance`: a free end
    /// examined, an offer checked, a level or round set up); `None` when there is no loop pass.
    pub fn advance(&mut self, steps: usize) -> Option<LoopProgress> {
        let (veins, closing) = self.closing_parts()?;
        Some(closing.advance(veins, steps))
    }

    /// Where the loop pass stands; `None` when there is none.
    pub fn loop_progress(&self) -> Option<LoopProgress> {
        self.closing.as_ref().map(LoopClosing::progress)
    }

    /// The new segments the loop pass has closed so far, in order (empty when there is none).
    pub fn loop_links(&self) -> &[Segment] {
        self.closing.as_ref().map_or(&[], LoopClosing::links)
    }

    /// The reshaped network and what the reshaping passes did.
    pub fn reshaped(&self) -> &Reshaped {
        &self.reshaped
    }

    /// Whether the loop pass has ended (or does not run).
    pub fn loops_done(&self) -> bool {
        self.closing.as_ref().is_none_or(LoopClosing::done)
    }

    /// Runs what is left of the loop pass, then widths, metrics and digest.
    pub fn finish(mut self, params: &Params) -> RunView {
        let reconnection = match (self.closing.take(), self.reshaped.forest.as_ref()) {
            (Some(closing), Some(view)) => Some(closing.finish(GrownVeins {
                network: &self.reshaped.network,
                topology: &view.topology,
                conducts: &self.conducting.conducts,
            })),
            _ => None,
        };
        RunView::after_loops(self.reshaped, self.conducting, reconnection, params)
    }
}

/// The widths of a loop pass in the table: each new segment (the last rows) carries the flow of
/// the tip that made it; a conducting loop wall is at least as wide as its wall flow gives.
fn loop_widths(
    table: &mut SegmentTable,
    network: &Network,
    reconnection: &Reconnection,
    rule: WidthRule,
) {
    let grown = network.segments.len() - reconnection.links.len();
    for (index, segment) in network.segments.iter().enumerate().take(grown) {
        let wall = reconnection
            .wall_flow
            .get(segment.from as usize)
            .copied()
            .unwrap_or(0.0);
        if wall > 0.0 && table.conducts[index] {
            table.width[index] = table.width[index].max(rule.width(wall));
        }
    }
    for (offset, &flow) in reconnection.link_flow.iter().enumerate() {
        let index = grown + offset;
        table.flow[index] = flow;
        table.width[index] = rule.width(flow);
    }
}

/// The measured network of a loop pass and its widths: the vein network plus the new segments.
fn looped_veins(
    network: &Network,
    conducting: &ConductingNetwork,
    table: &SegmentTable,
    reconnection: &Reconnection,
) -> (Network, Vec<f64>) {
    let Some(veins) = &conducting.veins else {
        return (network.clone(), table.width.clone());
    };
    let grown = network.segments.len() - reconnection.links.len();
    let mut looped = veins.network.clone();
    let mut widths: Vec<f64> = (0..grown)
        .filter(|&index| table.conducts[index])
        .map(|index| table.width[index])
        .collect();
    for (offset, link) in reconnection.links.iter().enumerate() {
        looped.segments.push(Segment {
            from: veins.index[link.from as usize],
            to: veins.index[link.to as usize],
        });
        widths.push(table.width[grown + offset]);
    }
    (looped, widths)
}

/// Widths pass: the per-segment table.
pub fn widths_pass(
    network: &Network,
    forest: Option<&ForestView>,
    conducting: &ConductingNetwork,
    rule: WidthRule,
) -> SegmentTable {
    let forest = forest.map(|view| (&view.topology, view.orders.as_slice()));
    SegmentTable::compute(network, forest, &conducting.conducts, rule)
}

impl RunView {
    /// How the readings of this view read when its network was grown on the lattice: every
    /// segment conducting (no tissue, as with `vein_area` 0) means the network runs through
    /// every cell, and the readings marked `follows_lattice` measure the cell size.
    pub fn grown_measured(&self) -> Measured {
        if self.conducting.tissue_count() == 0 {
            Measured::EveryCellConducts
        } else {
            Measured::AsGiven
        }
    }

    /// Runs every pass on a network with the parameters that set widths, `alpha` and junction
    /// relaxation; fails
    /// only when the network is not valid (`Network::check`).
    pub fn new(network: Network, params: &Params) -> Result<RunView, TopologyError> {
        if params.widths.reconnect.is_some() {
            if let Some(view) = RunView::with_loops_again(&network, params)? {
                return Ok(view);
            }
        }
        RunView::from_passes(network, params)
    }

    /// A network that a loop pass made (a run record read back): the grown tree is the longest
    /// run of leading segments whose upstream ends all differ (every new segment starts at a
    /// node that already has its tree segment); the passes are run on it again and kept when
    /// they give back the very segments read. `None` when the network is not such a one.
    fn with_loops_again(
        network: &Network,
        params: &Params,
    ) -> Result<Option<RunView>, TopologyError> {
        network.check()?;
        let mut seen = vec![false; network.nodes.len()];
        let grown = network
            .segments
            .iter()
            .position(|segment| std::mem::replace(&mut seen[segment.from as usize], true))
            .unwrap_or(network.segments.len());
        if grown == network.segments.len() {
            return Ok(None);
        }
        let mut tree = network.clone();
        tree.segments.truncate(grown);
        if tree.topology().is_err() {
            return Ok(None);
        }
        let view = RunView::from_passes(tree, params)?;
        Ok((view.network.segments == network.segments).then_some(view))
    }

    /// Every pass in order.
    fn from_passes(mut network: Network, params: &Params) -> Result<RunView, TopologyError> {
        let mut forest = topology_pass(&network)?;
        let energy = energy_pass(&mut network, &mut forest, params)?;
        let relaxation = junction_pass(&mut network, forest.as_mut(), params);
        Ok(RunView::after_reshaping(
            Reshaped {
                network,
                forest,
                energy,
                relaxation,
            },
            params,
        ))
    }

    /// The passes after the reshaping ones (channel energy, junctions), on their result: from
    /// the conducting network on. `RunView::new` on a grown tree is `after_reshaping` of what
    /// `reshaping::Reshaping` gives when run to the end. It is `Conducted::new` (conducting
    /// pass, loop pass set up), then `Conducted::finish` (the loop pass run, then
    /// `after_loops`).
    pub fn after_reshaping(reshaped: Reshaped, params: &Params) -> RunView {
        Conducted::new(reshaped, params).finish(params)
    }

    /// The passes after the loop pass (widths, sizing, metrics, digest) on the reshaped network,
    /// its conducting pass and the loops it closed (`None` when no loop pass ran).
    pub fn after_loops(
        reshaped: Reshaped,
        conducting: ConductingNetwork,
        reconnection: Option<Reconnection>,
        params: &Params,
    ) -> RunView {
        let Reshaped {
            mut network,
            forest,
            energy,
            relaxation,
        } = reshaped;
        let mut conducting = conducting;
        // A pass that closed no loop leaves the tree as it was.
        let reconnection = reconnection.filter(|reconnection| !reconnection.links.is_empty());
        if let Some(reconnection) = &reconnection {
            network.segments.extend_from_slice(&reconnection.links);
            conducting
                .conducts
                .extend(reconnection.links.iter().map(|_| true));
        }
        let rule = width_rule(params);
        let mut table = widths_pass(&network, forest.as_ref(), &conducting, rule);
        let sizing = Sizing::default();
        let loops = reconnection.map(|reconnection| {
            loop_widths(&mut table, &network, &reconnection, rule);
            let (looped, widths) = looped_veins(&network, &conducting, &table, &reconnection);
            LoopView {
                reconnection,
                network: looped,
                widths,
            }
        });
        let metrics = match (&loops, &conducting.veins) {
            (Some(loops), veins) => {
                let looped = measure_weighted(
                    &loops.network,
                    None,
                    params.costs.alpha,
                    Some(&loops.widths),
                );
                // The forest-only readings come from the grown vein tree, before the loops:
                // they read node positions and the forest view only, never the segment list,
                // so the whole network (tree plus new segments) serves without a copy.
                let tree = match (veins, &forest) {
                    (Some(veins), _) => Some((&veins.network, &veins.forest)),
                    (None, Some(view)) => Some((&network, view)),
                    (None, None) => None,
                };
                match tree {
                    Some((nodes, view)) => with_tree_readings(
                        looped,
                        nodes,
                        (&view.topology, view.orders.as_slice()),
                        params.costs.alpha,
                    ),
                    None => looped,
                }
            }
            (None, Some(veins)) => measure_with(
                &veins.network,
                Some((&veins.forest.topology, veins.forest.orders.as_slice())),
                params.costs.alpha,
            ),
            (None, None) => measure_with(
                &network,
                forest
                    .as_ref()
                    .map(|view| (&view.topology, view.orders.as_slice())),
                params.costs.alpha,
            ),
        };
        let digest = digest_hex(&network);
        RunView {
            network,
            forest,
            energy,
            relaxation,
            conducting,
            loops,
            table,
            sizing,
            metrics,
            digest,
        }
    }

    /// The forest view's topology, when the network is a forest.
    pub fn topology(&self) -> Option<&Topology> {
        self.forest.as_ref().map(|view| &view.topology)
    }
}

/// Widths: a segment carrying one cell's weight is `tip_width * cell_size` wide, and width
/// grows as flow^(1/gamma).
/// With `gamma_major` set, the exponent changes with Strahler order (`WidthRule::exponent`).
pub fn width_rule(params: &Params) -> WidthRule {
    WidthRule {
        gamma: params.widths.gamma,
        gamma_major: params.widths.gamma_major.unwrap_or(params.widths.gamma),
        major_order: params.widths.major_order.max(2),
        base_width: params.widths.tip_width * params.domain.cell_size,
        reference_flow: params.domain.runoff * params.domain.cell_size * params.domain.cell_size,
    }
}

/// Caution carried by every drainage output (SVG, record, command line, page).
pub const SITE_CAUTION: &str = "Concept layouts only: flows and sizes are rough estimates for \
early design and are not a drainage design. The design rainfall must come from local rainfall \
records. A licensed engineer must check the design against local stormwater codes before \
anything is built.";
