//! `ScreenGeometry`: per-segment buffers (end points, widths, orders, flows, lengths, colour
//! index) that the page reads through typed-array views into wasm memory, refilled in place
//! from a network and its segment table; `ScreenGeometry::raster` draws the thin segments into
//! a pixel buffer, at once or a slice at a time (`begin_raster`, `continue_raster`: the same
//! pixels, spread over animation frames), and `legend_facts` describes what is drawn for the
//! colour key.

use ramulus_core::network::Network;
use ramulus_core::segments::SegmentTable;

pub use crate::draw_order::DrawLine;
use crate::draw_order::{DrawCursor, DrawOrder};
use crate::legend::LegendFacts;
use crate::palette::{palette_rgb, Colouring, FLOW_RAMP_STEPS};
use crate::raster::{draw_lines, fill, Line, RasterView};
use crate::tissue::{TissueView, FAINT_STRENGTH, TISSUE_FAINT_RGB};

/// Flat buffers, one entry per drawable segment: entry `k` runs from the upstream to the
/// downstream end of `Network::segments[k]` (all segments of a valid network are drawable).
#[derive(Default)]
pub struct ScreenGeometry {
    /// `x0, y0, x1, y1` per segment, physical units (y down).
    pub ends: Vec<f32>,
    /// Drawn width, physical units.
    pub widths: Vec<f32>,
    /// Strahler order (1 for a tip segment).
    pub orders: Vec<u32>,
    /// Flow, squared units.
    pub flows: Vec<f32>,
    /// Length, units.
    pub lengths: Vec<f32>,
    /// Whether the segment conducts (drains at least `vein_area`); tissue otherwise.
    pub conducts: Vec<bool>,
    /// Number of entries that do not conduct (tissue).
    pub tissue_count: usize,
    /// Smallest and largest positive flow of the conducting entries (0, 0 when none).
    pub flow_range: (f64, f64),
    /// Highest order present.
    pub max_order: u32,
    /// Number of entries (segments).
    pub segment_count: usize,
    /// Palette index of each segment under `colouring`.
    pub colours: Vec<u8>,
    /// The colouring `colours` was computed for (`None` when stale).
    pub colouring: Option<Colouring>,
    /// RGB of each palette index under `colouring`.
    pub palette: Vec<[u8; 3]>,
    /// RGBA pixels of the last raster.
    pub pixels: Vec<u8>,
    /// What `raster` reads of every entry, in an order where neighbours lie close together
    /// (one sequential read per line instead of three scattered ones), kept up to date as
    /// entries are appended (`DrawOrder`).
    pub draw_lines: DrawOrder,
    /// The raster being drawn a slice at a time (`begin_raster`), if any.
    raster_job: Option<RasterJob>,
    /// The view `pixels` were last begun with.
    pixels_view: Option<RasterView>,
}

/// A raster begun by `ScreenGeometry::begin_raster`: what it draws with and how far it got.
#[derive(Clone, Copy, Debug)]
struct RasterJob {
    view: RasterView,
    colouring: Colouring,
    tissue: TissueView,
    min_px: f64,
    max_px: f64,
    /// Where the next line to draw is in `draw_lines`.
    next: DrawCursor,
    /// Lines drawn so far.
    drawn: usize,
}

impl ScreenGeometry {
    /// Refills every buffer from `network` and its segment table (row `k` describes
    /// `network.segments[k]`), reusing their allocations. Rows the table lacks count as width
    /// 0, order 1, flow 0, length 0; segments naming a missing node are left out.
    pub fn fill(&mut self, network: &Network, table: &SegmentTable) {
        self.clear();
        let at = |values: &[f64], index: usize| values.get(index).copied().unwrap_or(0.0);
        let count = network.segments.len();
        self.ends.reserve(4 * count);
        self.widths.reserve(count);
        self.orders.reserve(count);
        self.flows.reserve(count);
        self.lengths.reserve(count);
        self.conducts.reserve(count);
        let mut low = f64::INFINITY;
        let mut high = 0.0f64;
        for (index, segment) in network.segments.iter().enumerate() {
            let (Some(from), Some(to)) = (
                network.nodes.get(segment.from as usize),
                network.nodes.get(segment.to as usize),
            ) else {
                continue;
            };
            self.ends
                .extend_from_slice(&[from.x as f32, from.y as f32, to.x as f32, to.y as f32]);
            let order = table.order.get(index).copied().unwrap_or(1);
            self.widths.push(at(&table.width, index) as f32);
            self.orders.push(order);
            let flow = at(&table.flow, index);
            self.flows.push(flow as f32);
            self.lengths.push(at(&table.length, index) as f32);
            let conducts = table.conducts.get(index).copied().unwrap_or(true);
            // Tissue has no width, so the page never strokes it as a wide line.
            debug_assert!(conducts || at(&table.width, index) == 0.0);
            self.conducts.push(conducts);
            self.tissue_count += usize::from(!conducts);
            // The flow ramp spans the veins' flows (the SVG export's rule): tissue drains less
            // than any vein, and is drawn faint, hidden, or at the ramp's low end.
            // Comparisons, not `f64::min` and `f64::max` (library calls on wasm32).
            if conducts && flow > 0.0 && flow < low {
                low = flow;
            }
            if conducts && flow > high {
                high = flow;
            }
            self.max_order = self.max_order.max(order);
            self.segment_count += 1;
        }
        self.flow_range = if high > 0.0 { (low, high) } else { (0.0, 0.0) };
        self.raster_job = None;
        self.draw_lines.rebuild(&self.ends, &self.widths);
    }

    /// Appends an entry with its ends and length; its values come with `set_values`. It
    /// conducts: the growing refill (`screen_growth`) serves runs where every segment does.
    pub(crate) fn push_entry(&mut self, ends: [f32; 4], length: f64) {
        self.ends.extend_from_slice(&ends);
        self.conducts.push(true);
        self.widths.push(0.0);
        self.orders.push(1);
        self.flows.push(0.0);
        self.lengths.push(length as f32);
    }

    /// Sets an entry's flow, width and order (in the raster's copy too, once it is there).
    pub(crate) fn set_values(&mut self, index: usize, flow: f64, width: f64, order: u32) {
        self.flows[index] = flow as f32;
        self.widths[index] = width as f32;
        self.orders[index] = order;
        self.draw_lines.set_width(index, width as f32);
    }

    /// Ends a round of `push_entry` and `set_values`: the flow range and highest order over
    /// every entry, and the raster's copy of the new entries; colours are computed again when
    /// next asked for.
    pub(crate) fn finish_entries(&mut self, flow_range: (f64, f64), max_order: u32) {
        self.flow_range = flow_range;
        self.max_order = max_order;
        self.segment_count = self.widths.len();
        self.colouring = None;
        self.raster_job = None;
        self.draw_lines.extend(&self.ends, &self.widths);
    }

    /// Empties every buffer, keeping their allocations.
    pub(crate) fn clear_entries(&mut self) {
        self.clear();
    }

    /// Palette index of every segment: order `k` takes colour `min(k, 7) - 1`; flow takes
    /// the ramp step of its logarithm between the smallest and largest positive flow (the
    /// SVG export's rule); plain takes 0.
    pub fn colour_indices(&mut self, colouring: Colouring) -> &[u8] {
        if self.colouring != Some(colouring) || self.colours.len() != self.len() {
            self.palette = palette_rgb(colouring);
            let order_colours = self.palette.len() as u32;
            let (low, high) = self.flow_range;
            let steps = FLOW_RAMP_STEPS as f64 - 1.0;
            let span = libm::log(high) - libm::log(low);
            self.colours.clear();
            for index in 0..self.len() {
                let colour = match colouring {
                    Colouring::ByOrder => self.orders[index].clamp(1, order_colours) - 1,
                    Colouring::ByFlow => {
                        let flow = self.flows[index] as f64;
                        if flow <= 0.0 {
                            0
                        } else if high <= low || span.is_nan() || span <= 0.0 {
                            steps as u32
                        } else {
                            let t = (libm::log(flow) - libm::log(low)) / span;
                            libm::round(t.clamp(0.0, 1.0) * steps) as u32
                        }
                    }
                    Colouring::Plain => 0,
                };
                self.colours.push(colour as u8);
            }
            self.colouring = Some(colouring);
        }
        &self.colours
    }

    /// Draws every segment whose width on screen, `max(width * scale, min_px)`, is at most
    /// `max_px` into the pixel buffer over a `background` fill, at opacity `min(1, px)`;
    /// tissue (segments that do not conduct) as `tissue` says: in `TISSUE_FAINT_RGB` at
    /// `FAINT_STRENGTH`, not at all, or like the veins. `begin_raster` then `continue_raster`
    /// over every entry.
    pub fn raster(
        &mut self,
        view: RasterView,
        colouring: Colouring,
        tissue: TissueView,
        min_px: f64,
        max_px: f64,
        background: [u8; 3],
    ) -> &[u8] {
        self.begin_raster(view, colouring, tissue, min_px, max_px, background);
        self.continue_raster(usize::MAX);
        &self.pixels
    }

    /// Starts a raster drawn a slice at a time (the page spreads one over several animation
    /// frames): sizes the pixel buffer, fills it with `background` and computes the colours;
    /// `continue_raster` then draws the entries. Any raster in progress is dropped. The
    /// finished buffer equals `raster`'s with the same arguments, byte for byte: the same
    /// lines are blended in the same order (blending is not commutative, so the order counts).
    pub fn begin_raster(
        &mut self,
        view: RasterView,
        colouring: Colouring,
        tissue: TissueView,
        min_px: f64,
        max_px: f64,
        background: [u8; 3],
    ) {
        let size = view.width as usize * view.height as usize * 4;
        self.pixels.resize(size, 0);
        fill(&mut self.pixels, background);
        self.colour_indices(colouring);
        self.pixels_view = Some(view);
        self.raster_job = Some(RasterJob {
            view,
            colouring,
            tissue,
            min_px,
            max_px,
            next: DrawCursor::default(),
            drawn: 0,
        });
    }

    /// Draws up to `count` more entries of the raster begun by `begin_raster`; returns how
    /// many are left (0 once it is finished, or when no raster is in progress: see
    /// `raster_in_progress`). A refill of the geometry drops the raster in progress.
    pub fn continue_raster(&mut self, count: usize) -> usize {
        let Some(job) = self.raster_job else {
            return 0;
        };
        let RasterJob {
            view,
            colouring,
            tissue,
            min_px,
            max_px,
            next,
            drawn,
        } = job;
        // The colours the raster began with (another colouring may have been asked for since).
        self.colour_indices(colouring);
        let ScreenGeometry {
            colours,
            palette,
            pixels,
            draw_lines: entries,
            conducts,
            ..
        } = self;
        let (end, visited) = entries.advance(next, count);
        let drawn = drawn + visited;
        let left = entries.len().saturating_sub(drawn);
        let job = (left > 0).then_some(RasterJob {
            next: end,
            drawn,
            ..job
        });
        entries.runs_between(next, end, |run| {
            let lines = run.iter().filter_map(|entry| {
                // Comparisons, not `max` and `min`: those are library calls on wasm32.
                let scaled = entry.width as f64 * view.scale;
                let px = if scaled > min_px { scaled } else { min_px };
                if px > max_px {
                    return None;
                }
                if !conducts.get(entry.index as usize).copied().unwrap_or(true) {
                    match tissue {
                        TissueView::Hidden => return None,
                        TissueView::Faint => {
                            return Some(Line {
                                ends: entry.ends,
                                rgb: TISSUE_FAINT_RGB,
                                strength: FAINT_STRENGTH,
                            })
                        }
                        TissueView::AsVeins => {}
                    }
                }
                let rgb = colours
                    .get(entry.index as usize)
                    .and_then(|&colour| palette.get(colour as usize))
                    .copied()
                    .unwrap_or([0, 0, 0]);
                Some(Line {
                    ends: entry.ends,
                    rgb,
                    strength: if px < 1.0 { (px * 256.0) as u32 } else { 256 },
                })
            });
            draw_lines(pixels, &view, lines);
        });
        self.raster_job = job;
        left
    }

    /// The view of the last raster begun (the size of `pixels`), `None` before the first.
    pub fn raster_view(&self) -> Option<RasterView> {
        self.pixels_view
    }

    /// Whether a raster begun by `begin_raster` still has entries to draw.
    pub fn raster_in_progress(&self) -> bool {
        self.raster_job.is_some()
    }

    /// What the canvas shows, for its colour key (the page marks every root, see `marks`).
    pub fn legend_facts<'a>(
        &self,
        colouring: Colouring,
        tissue: TissueView,
        units: &'a str,
    ) -> LegendFacts<'a> {
        let (low, high) = self.flow_range;
        LegendFacts {
            colouring,
            tissue: (self.tissue_count > 0).then_some(tissue),
            max_order: self.max_order,
            flow_range: (high > 0.0).then_some((low, high)),
            segment_count: self.segment_count,
            roots_drawn: true,
            units,
        }
    }

    /// The entry whose segment passes nearest to (`x`, `y`) (physical units) within `reach`,
    /// or `None`; zero-length segments are never found, nor tissue under `TissueView::Hidden`
    /// (what is not drawn cannot be pointed at).
    pub fn segment_at(&self, x: f64, y: f64, reach: f64, tissue: TissueView) -> Option<usize> {
        let mut best = None;
        let mut best_distance = reach * reach;
        for (index, ends) in self.ends.chunks_exact(4).enumerate() {
            if tissue == TissueView::Hidden && !self.conducts.get(index).copied().unwrap_or(true) {
                continue;
            }
            let [x0, y0, x1, y1] = [ends[0], ends[1], ends[2], ends[3]].map(f64::from);
            let (dx, dy) = (x1 - x0, y1 - y0);
            let squared = dx * dx + dy * dy;
            if squared == 0.0 {
                continue;
            }
            let t = (((x - x0) * dx + (y - y0) * dy) / squared).clamp(0.0, 1.0);
            let (ex, ey) = (x0 + t * dx - x, y0 + t * dy - y);
            let distance = ex * ex + ey * ey;
            if distance < best_distance {
                best_distance = distance;
                best = Some(index);
            }
        }
        best
    }

    /// Whether there are no entries.
    pub fn is_empty(&self) -> bool {
        self.widths.is_empty()
    }

    /// Number of entries (segments).
    pub fn len(&self) -> usize {
        self.widths.len()
    }

    fn clear(&mut self) {
        self.ends.clear();
        self.widths.clear();
        self.orders.clear();
        self.flows.clear();
        self.lengths.clear();
        self.conducts.clear();
        self.tissue_count = 0;
        self.flow_range = (0.0, 0.0);
        self.max_order = 0;
        self.segment_count = 0;
        self.colouring = None;
        self.draw_lines.clear();
        self.raster_job = None;
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use ramulus_core::network::{segments_from_parents, CellSet, Node, NO_PARENT};
    use ramulus_core::run::{conducting_network, topology_pass, widths_pass};
    use ramulus_core::segments::WidthRule;

    /// A root and a chain of two segments whose flows are 1 and 2 (each node adds weight 1):
    /// the log-flow rule puts the smaller at ramp step 0 and the larger at the last step.
    #[test]
    fn flow_colours_span_the_ramp_and_orders_clamp() {
        let node = |x: f64| Node {
            x,
            y: 0.0,
            weight: 1.0,
        };
        let network = Network {
            nodes: vec![node(0.0), node(1.0), node(2.0)],
            segments: segments_from_parents(&[NO_PARENT, 0, 1]),
            area: 1.0,
            units: "mm".to_string(),
            cell_size: 1.0,
            cells: CellSet::default(),
        };
        let rule = WidthRule::single(2.0, 0.1, 1.0);
        let forest = topology_pass(&network).unwrap();
        let table = widths_pass(
            &network,
            forest.as_ref(),
            &conducting_network(
                &network,
                forest.as_ref(),
                &ramulus_core::params::Params::default(),
            ),
            rule,
        );
        let mut screen = ScreenGeometry::default();
        screen.fill(&network, &table);
        assert_eq!(screen.len(), 2);
        assert_eq!(screen.segment_count, 2);
        // The raster's copy holds each entry once, with its own ends and width.
        let mut copied: Vec<_> = screen.draw_lines.lines().map(|line| line.index).collect();
        copied.sort_unstable();
        assert_eq!(copied, [0, 1]);
        for line in screen.draw_lines.lines() {
            let at = line.index as usize;
            assert_eq!(line.ends[..], screen.ends[4 * at..4 * at + 4]);
            assert_eq!(line.width, screen.widths[at]);
        }
        assert_eq!(
            screen.colour_indices(Colouring::ByFlow),
            [(FLOW_RAMP_STEPS - 1) as u8, 0]
        );
        assert_eq!(screen.colour_indices(Colouring::ByOrder), [0, 0]);
        // (1.5, 0.2) is 0.2 from entry 1 (node 2 to node 1, x 1..2) and 0.5 from entry 0's end.
        assert_eq!(
            screen.segment_at(1.5, 0.2, 0.3, TissueView::Hidden),
            Some(1)
        );
        assert_eq!(
            screen.segment_at(0.5, 0.2, 0.3, TissueView::Hidden),
            Some(0)
        );
        assert_eq!(screen.segment_at(1.5, 0.4, 0.3, TissueView::Hidden), None);
        let facts = screen.legend_facts(Colouring::ByFlow, TissueView::Faint, "mm");
        assert_eq!(facts.flow_range, Some((1.0, 2.0)));
        assert!(facts.roots_drawn);
    }

    /// The flow ramp spans the veins' flows: a root with a chain of two segments and a lone
    /// tip beside it, conducting from 1.5, has one vein (flow 2) and two tips of tissue (flow
    /// 1); the page's key reads the vein's flow alone, as the SVG export's does.
    #[test]
    fn the_flow_key_spans_the_veins_alone() {
        let node = |x: f64| Node {
            x,
            y: 0.0,
            weight: 1.0,
        };
        let network = Network {
            nodes: vec![node(0.0), node(1.0), node(2.0), node(1.0)],
            segments: segments_from_parents(&[NO_PARENT, 0, 1, 0]),
            area: 1.0,
            units: "mm".to_string(),
            cell_size: 1.0,
            cells: CellSet::default(),
        };
        let mut params = ramulus_core::params::Params::default();
        params.widths.vein_area = 1.5;
        let forest = topology_pass(&network).unwrap();
        let conducting = conducting_network(&network, forest.as_ref(), &params);
        let table = widths_pass(
            &network,
            forest.as_ref(),
            &conducting,
            WidthRule::single(2.0, 0.1, 1.0),
        );
        assert_eq!(table.conducts, [true, false, false]);
        let mut screen = ScreenGeometry::default();
        screen.fill(&network, &table);
        let facts = screen.legend_facts(Colouring::ByFlow, TissueView::Faint, "mm");
        assert_eq!(facts.flow_range, Some((2.0, 2.0)));
        let drawing = crate::svg::Drawing::collect(&network, &table, TissueView::AsVeins);
        assert_eq!(drawing.flow_range, facts.flow_range);
    }

    /// A raster drawn a slice at a time, in slices of any size, ends with the very pixels of
    /// one drawn at once, under every colouring. Both blend the same lines in the same order,
    /// and Wu blending (`raster.rs`) is exact integer arithmetic, so equality is byte for
    /// byte, with no tolerance. At about two pixels a cell the lines meet at every junction,
    /// where a different blending order would show.
    #[test]
    fn a_raster_drawn_in_slices_equals_one_drawn_at_once() {
        use ramulus_core::growth::Growth;
        use ramulus_core::link::decode_link;
        use ramulus_core::run::width_rule;

        let params = decode_link(
            "v=1&width=60&height=50&roots=30,48,0,1&cells=2500&joining=weighted\
             &temperature=0.5&w_turn=1&w_flow=0.5&alpha=0.5&w_path=0.05&seed=5",
        )
        .params;
        let mut growth = Growth::new(&params).unwrap();
        growth.run();
        let network = growth.network();
        let forest = topology_pass(&network).unwrap();
        let table = widths_pass(
            &network,
            forest.as_ref(),
            &conducting_network(&network, forest.as_ref(), &params),
            width_rule(&params),
        );
        let mut screen = ScreenGeometry::default();
        screen.fill(&network, &table);
        // The whole lattice in 120 x 100 pixels: about two pixels a cell.
        let view = RasterView {
            width: 130,
            height: 110,
            scale: 2.0 / params.domain.cell_size,
            offset_x: 3.0,
            offset_y: 4.0,
        };
        let background = [255, 253, 248];
        for colouring in [Colouring::ByOrder, Colouring::ByFlow, Colouring::Plain] {
            let whole = screen
                .raster(view, colouring, TissueView::Faint, 0.75, 1.6, background)
                .to_vec();
            let inked = whole
                .chunks(4)
                .filter(|pixel| pixel[..3] != background)
                .count();
            assert!(inked > 4000, "{colouring:?}: {inked} pixels inked");
            for slice in [1usize, 7, 1000, 2498, 2499, 100_000] {
                screen.begin_raster(view, colouring, TissueView::Faint, 0.75, 1.6, background);
                let mut left = screen.draw_lines.len();
                let mut rounds = 0;
                while screen.raster_in_progress() {
                    let now = screen.continue_raster(slice);
                    assert_eq!(now, left - slice.min(left), "entries left");
                    left = now;
                    rounds += 1;
                }
                assert_eq!(rounds, screen.draw_lines.len().div_ceil(slice));
                assert!(
                    screen.pixels == whole,
                    "{colouring:?}: slices of {slice} differ from one raster"
                );
            }
        }
        // A refill drops the raster in progress; continuing then draws nothing.
        screen.begin_raster(
            view,
            Colouring::ByOrder,
            TissueView::Faint,
            0.75,
            1.6,
            background,
        );
        screen.continue_raster(10);
        screen.fill(&network, &table);
        assert!(!screen.raster_in_progress());
        assert_eq!(screen.continue_raster(10), 0);
    }

    /// Tissue as chosen: hidden leaves the background wherever only tissue was drawn and adds
    /// no ink; faint draws it lighter (WCAG 2.0 relative luminance) than the veins.
    #[test]
    fn tissue_is_drawn_faint_hidden_or_like_veins() {
        use ramulus_core::growth::Growth;
        use ramulus_core::link::decode_link;
        use ramulus_core::run::width_rule;

        let mut params = decode_link(
            "v=1&width=60&height=50&roots=30,48,0,1&cells=2500&joining=weighted\
             &temperature=0.5&w_turn=1&w_flow=0.5&alpha=0.5&w_path=0.05&seed=5",
        )
        .params;
        params.widths.vein_area = 10.0 * params.domain.cell_size * params.domain.cell_size;
        let mut growth = Growth::new(&params).unwrap();
        growth.run();
        let network = growth.network();
        let mut forest = topology_pass(&network).unwrap();
        let conducting = ramulus_core::run::conducting_pass(&network, &mut forest, &params);
        let table = widths_pass(&network, forest.as_ref(), &conducting, width_rule(&params));
        let mut screen = ScreenGeometry::default();
        screen.fill(&network, &table);
        assert!(screen.tissue_count > 100 && screen.tissue_count < screen.len());
        let view = RasterView {
            width: 130,
            height: 110,
            scale: 2.0 / params.domain.cell_size,
            offset_x: 3.0,
            offset_y: 4.0,
        };
        let background = [255, 253, 248];
        let mut draw = |tissue| {
            screen
                .raster(view, Colouring::ByOrder, tissue, 0.75, 1.6, background)
                .to_vec()
        };
        let (veins, hidden, faint) = (
            draw(TissueView::AsVeins),
            draw(TissueView::Hidden),
            draw(TissueView::Faint),
        );
        let luminance = |pixel: &[u8]| {
            let channel = |value: u8| {
                let value = value as f64 / 255.0;
                if value <= 0.04045 {
                    value / 12.92
                } else {
                    ((value + 0.055) / 1.055).powf(2.4)
                }
            };
            0.2126 * channel(pixel[0]) + 0.7152 * channel(pixel[1]) + 0.0722 * channel(pixel[2])
        };
        let (mut tissue_only, mut vein, mut faint_tissue, mut faint_vein) = (0, 0, 0.0, 0.0);
        for ((a, h), f) in veins.chunks(4).zip(hidden.chunks(4)).zip(faint.chunks(4)) {
            let (inked, inked_hidden) = (a[..3] != background, h[..3] != background);
            assert!(inked || !inked_hidden, "hiding tissue added ink");
            if inked && !inked_hidden {
                tissue_only += 1;
                faint_tissue += luminance(f);
            } else if inked_hidden {
                vein += 1;
                faint_vein += luminance(f);
            }
        }
        assert!(
            tissue_only > 500 && vein > 500,
            "{tissue_only} and {vein} pixels"
        );
        assert!(faint_tissue / tissue_only as f64 > faint_vein / vein as f64 + 0.1);
        // Hidden tissue cannot be pointed at; a tissue entry's midpoint finds it otherwise.
        let entry = (0..screen.len())
            .find(|&index| !screen.conducts[index])
            .unwrap();
        let ends = &screen.ends[4 * entry..4 * entry + 4];
        let (x, y) = (
            (ends[0] + ends[2]) as f64 / 2.0,
            (ends[1] + ends[3]) as f64 / 2.0,
        );
        assert_eq!(
            screen.segment_at(x, y, 1e-6, TissueView::Faint),
            Some(entry)
        );
        assert_ne!(
            screen.segment_at(x, y, 1e-6, TissueView::Hidden),
            Some(entry)
        );
    }
}
