//! `GrowingScreen`: keeps a `ScreenGeometry` in step with a growing forest by touching only
//! what changed since the last refill: the segments of new nodes are appended, and the flows,
//! Strahler orders and widths of the nodes downstream of them (the only ones a new node can
//! change) are recomputed. Every value is computed as the core's pipeline computes it (flows
//! summed over children in the same order, `strahler_orders`' rule, `WidthRule::width`,
//! `Network::segment_length`), so the buffers equal a full `ScreenGeometry::fill` bit for bit.
//!
//! It applies while the network only grows by appended nodes whose parent comes before them
//! and old nodes keep their parents, as the growth engine grows networks without attaching to
//! segments, and while widths follow flow alone (not `WidthRule::by_order`); otherwise
//! `update` says so and the caller refills in full.

use ramulus_core::growth::Growth;
use ramulus_core::network::{Network, Node, NO_PARENT};
use ramulus_core::segments::WidthRule;

use crate::screen::ScreenGeometry;

/// Marks "no node" in the child lists.
const NONE: u32 = u32::MAX;

/// The forest as last drawn, per node (see the module comment).
#[derive(Default)]
pub struct GrowingScreen {
    /// Downstream neighbour, `NO_PARENT` for a root.
    parent: Vec<u32>,
    /// Newest child (children are kept newest first, so in decreasing index order).
    first_child: Vec<u32>,
    /// The next older sibling.
    next_sibling: Vec<u32>,
    /// Flow through the node's downstream segment (the node's weight plus its children's).
    flow: Vec<f64>,
    /// The node's own weight (read once, when the node is appended).
    weight: Vec<f64>,
    /// Smallest positive flow over the entries, and how many entries carry exactly it
    /// (flows only rise as a forest grows, so the smallest is looked for again over every
    /// entry only when the last entry at it has risen).
    low: f64,
    at_low: usize,
    /// Largest flow and highest order over the entries (both only rise as a forest grows).
    high: f64,
    max_order: u32,
    /// Nodes the last update recomputed.
    last_dirty: usize,
    /// Strahler order of the node's downstream segment.
    order: Vec<u32>,
    /// Geometry entry of the node's downstream segment, `NONE` for a root.
    entry_of: Vec<u32>,
    /// The node whose downstream segment each geometry entry draws.
    node_of_entry: Vec<u32>,
    /// Nodes whose values must be recomputed, and which are marked.
    dirty: Vec<u32>,
    marked: Vec<bool>,
    /// The width rule the geometry was drawn with.
    rule: Option<WidthRule>,
}

impl GrowingScreen {
    /// Forgets the forest (the next `update` builds the geometry from scratch).
    pub fn clear(&mut self) {
        self.parent.clear();
        self.first_child.clear();
        self.next_sibling.clear();
        self.flow.clear();
        self.weight.clear();
        self.last_dirty = 0;
        self.order.clear();
        self.entry_of.clear();
        self.node_of_entry.clear();
        self.rule = None;
    }

    /// Nodes of the forest as last drawn.
    pub fn node_count(&self) -> usize {
        self.parent.len()
    }

    /// Brings `geometry` (as left by the previous `update` on this forest, or empty) up to
    /// `network` with widths by `rule`. Returns false, touching nothing, when the network is
    /// not the previous one plus appended nodes (see the module comment): refill in full then,
    /// and `clear` this.
    pub fn update(
        &mut self,
        network: &Network,
        rule: WidthRule,
        geometry: &mut ScreenGeometry,
    ) -> bool {
        if !self.grows_from_last(network, rule, geometry) {
            return false;
        }
        let old_entries = geometry.len();
        let new_segments = network.segments[old_entries..]
            .iter()
            .map(|segment| (segment.from as usize, segment.to));
        self.apply(
            network.nodes.len(),
            new_segments,
            |index| network.nodes[index],
            rule,
            geometry,
            usize::MAX,
        );
        true
    }

    /// `update` reading the nodes added since the last update straight from the grower,
    /// without the copy of the whole network `Growth::network` makes: the geometry comes out
    /// the same, bit for bit, as `update(&growth.network(), ...)` gives. The caller keeps
    /// `growth` the grower of the last update (`clear` this when it starts a new run). Returns
    /// false, touching nothing, when the grower no longer only appends nodes (a segment was
    /// split) or the forest cannot be brought up to it: refill in full then, and `clear` this.
    pub fn update_from_growth(
        &mut self,
        growth: &Growth,
        rule: WidthRule,
        geometry: &mut ScreenGeometry,
    ) -> bool {
        self.update_from_growth_upto(growth, rule, geometry, usize::MAX)
    }

    /// `update_from_growth` taking the nodes added since the last update oldest first, and no
    /// more once `most_dirty` nodes need their values again (the new ones and everything
    /// downstream of them; at least one new node is taken), so that one refill's work stays
    /// bounded while a run grows fast: the geometry is then that of the forest of the
    /// grower's first nodes, which every grower that only appends has grown through, and the
    /// next update takes more. A forest drawn from scratch takes every node.
    pub fn update_from_growth_upto(
        &mut self,
        growth: &Growth,
        rule: WidthRule,
        geometry: &mut ScreenGeometry,
        most_dirty: usize,
    ) -> bool {
        let old_nodes = self.parent.len();
        let nodes = growth.node_count();
        let most_dirty = if old_nodes == 0 {
            usize::MAX
        } else {
            most_dirty
        };
        let fits = !rule.by_order()
            && growth.only_appends()
            && nodes >= old_nodes
            && geometry.len() == self.node_of_entry.len()
            && (old_nodes == 0 || self.rule == Some(rule))
            // The last node drawn still drains where it did (a cheap check that this is the
            // grower last drawn).
            && (old_nodes == 0 || growth.parent_of(old_nodes - 1) == self.parent[old_nodes - 1]);
        if !fits {
            return false;
        }
        // Segments of `Growth::network`: one per non-root node, in node order; without split
        // segments each new node drains into an older one.
        let new_segments = (old_nodes..nodes)
            .map(|node| (node, growth.parent_of(node)))
            .filter(|&(_, parent)| parent != NO_PARENT);
        self.apply(
            nodes,
            new_segments,
            |index| growth.node(index),
            rule,
            geometry,
            most_dirty,
        );
        true
    }

    /// Appends the new segments `(from, to)` (in the network's order, each `from` a new node
    /// after its parent `to`) and recomputes every node downstream of a new one, reading nodes
    /// from `node`.
    #[allow(clippy::too_many_arguments)]
    fn apply(
        &mut self,
        nodes: usize,
        new_segments: impl Iterator<Item = (usize, u32)>,
        node_at: impl Fn(usize) -> Node,
        rule: WidthRule,
        geometry: &mut ScreenGeometry,
        most_dirty: usize,
    ) {
        let old_nodes = self.parent.len();
        if nodes == old_nodes && old_nodes > 0 {
            // Nothing grew: the geometry stands as it is.
            return;
        }
        if old_nodes == 0 {
            geometry.clear_entries();
            (self.low, self.at_low, self.high, self.max_order) = (f64::INFINITY, 0, 0.0, 0);
        }
        self.parent.resize(nodes, NO_PARENT);
        self.first_child.resize(nodes, NONE);
        self.next_sibling.resize(nodes, NONE);
        self.flow.resize(nodes, 0.0);
        self.weight.resize(nodes, 0.0);
        self.order.resize(nodes, 1);
        self.entry_of.resize(nodes, NONE);
        self.marked.resize(nodes, false);
        self.rule = Some(rule);
        for (index, weight) in self.weight[old_nodes..nodes].iter_mut().enumerate() {
            *weight = node_at(old_nodes + index).weight;
        }
        // New segments, in the network's order (one per new non-root node, in node order),
        // each followed by marking its node and everything downstream of it, whose values are
        // needed again; with `most_dirty` met, the nodes after the last one taken wait for the
        // next update.
        self.dirty.clear();
        let mut end = nodes;
        let mut marked_to = old_nodes;
        for (from, to) in new_segments {
            if self.dirty.len() >= most_dirty && marked_to > old_nodes {
                end = from;
                break;
            }
            let entry = geometry.len() as u32;
            self.parent[from] = to;
            self.entry_of[from] = entry;
            self.node_of_entry.push(from as u32);
            self.next_sibling[from] = self.first_child[to as usize];
            self.first_child[to as usize] = from as u32;
            let (a, b) = (node_at(from), node_at(to as usize));
            geometry.push_entry(
                [a.x as f32, a.y as f32, b.x as f32, b.y as f32],
                // `Network::segment_length`.
                ramulus_core::fast_libm::hypot(a.x - b.x, a.y - b.y),
            );
            // New roots before `from` have no segment; they are marked as they come.
            for node in marked_to..=from {
                self.mark_downstream(node as u32);
            }
            marked_to = from + 1;
        }
        for node in marked_to..end {
            self.mark_downstream(node as u32);
        }
        if end < nodes {
            self.parent.truncate(end);
            self.first_child.truncate(end);
            self.next_sibling.truncate(end);
            self.flow.truncate(end);
            self.weight.truncate(end);
            self.order.truncate(end);
            self.entry_of.truncate(end);
            self.marked.truncate(end);
        }
        self.last_dirty = self.dirty.len();
        // Children have higher indices than their parents, so decreasing index order settles
        // every child before its parent. Each node sums its children newest first, the order
        // in which `Network::topology` adds them (reverse breadth-first order).
        self.dirty.sort_unstable_by(|a, b| b.cmp(a));
        let mut width_of = WidthCache::new(rule);
        for index in 0..self.dirty.len() {
            let node = self.dirty[index] as usize;
            self.marked[node] = false;
            let mut flow = self.weight[node];
            // What the children pass on: highest order and how many have it (the count stops
            // at 2), as in `segments::strahler_orders`.
            let (mut highest, mut count) = (0u32, 0u32);
            let mut child = self.first_child[node];
            while child != NONE {
                flow += self.flow[child as usize];
                let own = self.order[child as usize];
                if own > highest {
                    (highest, count) = (own, 1);
                } else if own == highest {
                    count = 2;
                }
                child = self.next_sibling[child as usize];
            }
            let order = match (highest, count) {
                (0, _) => 1,
                (highest, 1) => highest,
                (highest, _) => highest + 1,
            };
            let entry = self.entry_of[node];
            if entry != NONE {
                // The range over the entries: this entry leaves its old flow (new entries
                // start at 0, never counted) and takes the new one.
                let old = self.flow[node];
                if old > 0.0 && old == self.low {
                    self.at_low -= 1;
                }
                if flow > 0.0 && flow < self.low {
                    (self.low, self.at_low) = (flow, 1);
                } else if flow > 0.0 && flow == self.low {
                    self.at_low += 1;
                }
                if flow > self.high {
                    self.high = flow;
                }
                self.max_order = self.max_order.max(order);
                geometry.set_values(entry as usize, flow, width_of.width(flow), order);
            }
            self.flow[node] = flow;
            self.order[node] = order;
        }
        if self.at_low == 0 {
            self.find_low();
        }
        // As `ScreenGeometry::fill` finds them over every entry.
        let flow_range = if self.high > 0.0 {
            (self.low, self.high)
        } else {
            (0.0, 0.0)
        };
        geometry.finish_entries(flow_range, self.max_order);
    }

    /// The smallest positive flow over every entry and how many entries carry it.
    fn find_low(&mut self) {
        (self.low, self.at_low) = (f64::INFINITY, 0);
        for &node in &self.node_of_entry {
            let flow = self.flow[node as usize];
            if flow > 0.0 && flow < self.low {
                (self.low, self.at_low) = (flow, 1);
            } else if flow > 0.0 && flow == self.low {
                self.at_low += 1;
            }
        }
    }

    /// Marks `node` and every unmarked node downstream of it as needing its values again.
    fn mark_downstream(&mut self, node: u32) {
        let mut at = node;
        while at != NO_PARENT && !self.marked[at as usize] {
            self.marked[at as usize] = true;
            self.dirty.push(at);
            at = self.parent[at as usize];
        }
    }

    /// Nodes whose values the last update recomputed (the new ones and those downstream).
    pub fn last_dirty(&self) -> usize {
        self.last_dirty
    }

    /// Whether `network` is the forest last drawn plus appended nodes, each after its parent.
    fn grows_from_last(
        &self,
        network: &Network,
        rule: WidthRule,
        geometry: &ScreenGeometry,
    ) -> bool {
        // Widths by order follow the whole forest, not each segment's flow: refill in full.
        if rule.by_order() {
            return false;
        }
        let old_nodes = self.parent.len();
        if network.nodes.len() < old_nodes || geometry.len() != self.node_of_entry.len() {
            return false;
        }
        if old_nodes > 0 && self.rule != Some(rule) {
            return false;
        }
        let old_entries = geometry.len();
        if network.segments.len() < old_entries {
            return false;
        }
        let (old, new) = network.segments.split_at(old_entries);
        let old_ok = old.iter().enumerate().all(|(entry, segment)| {
            let from = segment.from as usize;
            from < old_nodes
                && self.parent[from] == segment.to
                && self.entry_of[from] == entry as u32
        });
        let mut previous = None;
        let new_ok = new.iter().all(|segment| {
            let (from, to) = (segment.from as usize, segment.to as usize);
            let ordered = previous.is_none_or(|last| from > last);
            previous = Some(from);
            ordered && from >= old_nodes && from < network.nodes.len() && to < from
        });
        old_ok && new_ok
    }
}

/// `WidthRule::width` remembering the last flow's width: runs of equal flows (the tips) take
/// one `pow`.
struct WidthCache {
    rule: WidthRule,
    last: Option<(u64, f64)>,
}

impl WidthCache {
    fn new(rule: WidthRule) -> WidthCache {
        WidthCache { rule, last: None }
    }

    fn width(&mut self, flow: f64) -> f64 {
        let bits = flow.to_bits();
        match self.last {
            Some((key, width)) if key == bits => width,
            _ => {
                let width = self.rule.width(flow);
                self.last = Some((bits, width));
                width
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::palette::Colouring;
    use crate::raster::RasterView;
    use crate::tissue::TissueView;
    use ramulus_core::growth::Growth;
    use ramulus_core::link::decode_link;
    use ramulus_core::run::{conducting_network, topology_pass, width_rule, widths_pass};

    /// The geometry as the core's pipeline gives it from scratch (topology, conducting
    /// network and widths passes, then `ScreenGeometry::fill`).
    /// Every buffer a refill fills, and the draw order, equal to the full pipeline's.
    fn assert_same_geometry(geometry: &ScreenGeometry, expected: &ScreenGeometry, what: &str) {
        assert_eq!(geometry.ends, expected.ends, "{what}");
        assert_eq!(geometry.widths, expected.widths, "{what}");
        assert_eq!(geometry.orders, expected.orders, "{what}");
        assert_eq!(geometry.flows, expected.flows, "{what}");
        assert_eq!(geometry.lengths, expected.lengths, "{what}");
        assert_eq!(geometry.flow_range, expected.flow_range, "{what}");
        assert_eq!(geometry.max_order, expected.max_order, "{what}");
        assert_eq!(geometry.segment_count, expected.segment_count, "{what}");
        assert!(
            geometry.draw_lines.lines().eq(expected.draw_lines.lines()),
            "{what}: draw order"
        );
    }

    fn full(network: &Network, rule: WidthRule) -> ScreenGeometry {
        let forest = topology_pass(network).unwrap();
        let table = widths_pass(
            network,
            forest.as_ref(),
            &conducting_network(
                network,
                forest.as_ref(),
                &ramulus_core::params::Params::default(),
            ),
            rule,
        );
        let mut geometry = ScreenGeometry::default();
        geometry.fill(network, &table);
        geometry
    }

    fn pixels(geometry: &mut ScreenGeometry, colouring: Colouring) -> Vec<u8> {
        let view = RasterView {
            width: 160,
            height: 140,
            scale: 6.0,
            offset_x: 4.0,
            offset_y: 2.0,
        };
        geometry
            .raster(
                view,
                colouring,
                TissueView::Faint,
                0.75,
                1.6,
                [255, 253, 248],
            )
            .to_vec()
    }

    /// Grown step by step, refilled only where it changed, the geometry equals the core's
    /// full pipeline after every step: every buffer bit for bit, and the picture pixel for
    /// pixel under every colouring.
    #[test]
    fn incremental_refills_equal_the_full_pipeline_pixel_for_pixel() {
        for link in [
            "v=1&width=40&height=36&roots=20,34,0,1&cells=1200&joining=cheapest&w_turn=0\
             &w_flow=0&w_path=0&seed=4",
            "v=1&width=30&height=30&roots=3,3,0,1;26,26,0,-1&cells=700&joining=weighted\
             &temperature=0.5&w_turn=1&w_flow=0.5&alpha=0.5&w_path=0.05&seed=9&gamma=2.5",
        ] {
            let params = decode_link(link).params;
            let rule = width_rule(&params);
            let mut growth = Growth::new(&params).unwrap();
            let mut growing = GrowingScreen::default();
            let mut geometry = ScreenGeometry::default();
            for (steps, slice) in [1u64, 1, 3, 10, 40, 7, 150, 300, 2000]
                .into_iter()
                .enumerate()
            {
                growth.step(slice);
                let network = growth.network();
                assert!(growing.update(&network, rule, &mut geometry), "{link}");
                let mut expected = full(&network, rule);
                assert_same_geometry(&geometry, &expected, link);
                for colouring in [Colouring::ByOrder, Colouring::ByFlow, Colouring::Plain] {
                    assert_eq!(
                        geometry.colour_indices(colouring),
                        expected.colour_indices(colouring)
                    );
                    assert!(
                        pixels(&mut geometry, colouring) == pixels(&mut expected, colouring),
                        "{link}: pictures differ after step {steps}"
                    );
                }
            }
            assert!(geometry.len() > 500, "{link}: {} entries", geometry.len());
        }
    }

    /// A network that is not the last one plus appended nodes (a run started over, a
    /// segment split by a junction) is refused, so the caller refills in full.
    #[test]
    fn a_network_that_did_not_just_grow_is_refused() {
        let params =
            decode_link("v=1&width=30&height=30&roots=15,28,0,1&cells=400&joining=cheapest&seed=2")
                .params;
        let rule = width_rule(&params);
        let mut growth = Growth::new(&params).unwrap();
        growth.step(300);
        let mut growing = GrowingScreen::default();
        let mut geometry = ScreenGeometry::default();
        assert!(growing.update(&growth.network(), rule, &mut geometry));
        let mut smaller = Growth::new(&params).unwrap();
        smaller.step(100);
        assert!(!growing.update(&smaller.network(), rule, &mut geometry));
        let mut rewired = growth.network();
        let last = rewired.segments.len() - 1;
        rewired.segments[last].to = rewired.segments[last - 1].from;
        rewired.segments.swap(last, last - 1);
        assert!(!growing.update(&rewired, rule, &mut geometry));
        let mut other_rule = rule;
        other_rule.gamma = 2.0;
        other_rule.gamma_major = 2.0;
        assert!(!growing.update(&growth.network(), other_rule, &mut geometry));
        // The geometry was left as the first update made it.
        assert_eq!(geometry.len(), 300);
    }

    /// Refilled straight from the grower (`update_from_growth`, no copy of the network), the
    /// geometry equals the core's full pipeline on `Growth::network` after every slice, every
    /// buffer bit for bit, for cheapest-first and weighted runs alike.
    #[test]
    fn refills_from_the_grower_equal_the_full_pipeline() {
        for link in [
            "v=1&width=40&height=36&roots=20,34,0,1&cells=1200&joining=cheapest&w_turn=0\
             &w_flow=0&w_path=0&seed=4",
            "v=1&width=30&height=30&roots=3,3,0,1;26,26,0,-1&cells=700&joining=weighted\
             &temperature=0.5&w_turn=1&w_flow=0.5&alpha=0.5&w_path=0.05&seed=9&gamma=2.5\
             &jitter=0.3",
        ] {
            let params = decode_link(link).params;
            let rule = width_rule(&params);
            let mut growth = Growth::new(&params).unwrap();
            let mut growing = GrowingScreen::default();
            let mut geometry = ScreenGeometry::default();
            for slice in [0u64, 1, 1, 3, 10, 0, 40, 7, 150, 300, 2000] {
                growth.step(slice);
                assert!(
                    growing.update_from_growth(&growth, rule, &mut geometry),
                    "{link}"
                );
                let network = growth.network();
                let expected = full(&network, rule);
                assert_same_geometry(&geometry, &expected, link);
            }
            assert!(geometry.len() > 500, "{link}: {} entries", geometry.len());
        }
    }

    /// Refills that recompute at most 60 nodes each lag behind the grower but always show
    /// the forest of its first nodes as the whole pipeline draws it, and catch up once growth
    /// stops.
    #[test]
    fn bounded_refills_show_the_grower_s_first_nodes() {
        let link = "v=1&width=30&height=30&roots=3,3,0,1;26,26,0,-1&cells=700&joining=weighted\
                    &temperature=0.5&w_turn=1&w_flow=0.5&alpha=0.5&w_path=0.05&seed=9&gamma=2.5\
                    &jitter=0.3";
        let params = decode_link(link).params;
        let rule = width_rule(&params);
        let mut growth = Growth::new(&params).unwrap();
        let mut growing = GrowingScreen::default();
        let mut geometry = ScreenGeometry::default();
        let mut lagged = false;
        let mut refills = 0;
        loop {
            growth.step(25);
            assert!(growing.update_from_growth_upto(&growth, rule, &mut geometry, 60));
            assert!(growing.last_dirty() < 60 + 40, "a bounded refill");
            refills += 1;
            let shown = growing.node_count();
            lagged |= shown < growth.node_count();
            // The forest of the grower's first `shown` nodes: a grower that only appends
            // grew through it.
            let mut prefix = growth.network();
            prefix.nodes.truncate(shown);
            prefix
                .segments
                .retain(|segment| (segment.from as usize) < shown);
            let expected = full(&prefix, rule);
            assert_same_geometry(&geometry, &expected, &format!("refill {refills}"));
            if growth.stopped().is_some() && shown == growth.node_count() {
                break;
            }
            assert!(refills < 1_000, "the refills catch up");
        }
        assert!(
            lagged,
            "60 nodes recomputed a refill fall behind 25 cells a step"
        );
        assert_eq!(geometry.len(), growth.network().segments.len());
    }

    /// A grower that has split a segment (segment attachment gives an older node a new
    /// parent), or a new run with fewer nodes, is refused, touching nothing.
    #[test]
    fn a_grower_that_rewired_or_started_over_is_refused() {
        let params =
            decode_link("v=1&width=30&height=30&roots=15,28,0,1&cells=400&joining=cheapest&seed=2")
                .params;
        let rule = width_rule(&params);
        let mut growth = Growth::new(&params).unwrap();
        growth.step(300);
        let mut growing = GrowingScreen::default();
        let mut geometry = ScreenGeometry::default();
        assert!(growing.update_from_growth(&growth, rule, &mut geometry));
        let mut smaller = Growth::new(&params).unwrap();
        smaller.step(100);
        assert!(!growing.update_from_growth(&smaller, rule, &mut geometry));
        assert_eq!(geometry.len(), 300);
        let mut joined = params.clone();
        joined.run.attach_to_segments = true;
        let mut splitting = Growth::new(&joined).unwrap();
        while splitting.only_appends() && splitting.stopped().is_none() {
            splitting.step(1);
        }
        assert!(!splitting.only_appends(), "no segment was split");
        let mut fresh = GrowingScreen::default();
        let mut other = ScreenGeometry::default();
        assert!(!fresh.update_from_growth(&splitting, rule, &mut other));
        assert_eq!(other.len(), 0);
    }
}
