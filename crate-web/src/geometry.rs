//! `Geometry`: per-segment buffers (end points, widths, orders, flows, lengths, colour index)
//! that the page reads through typed-array views into wasm memory, refilled in place from a
//! network, and `Geometry::raster`, which draws the thin segments into a pixel buffer.

use ramulus_core::network::Network;
use ramulus_core::raster::{draw_lines, fill, spatial_order, Line, RasterView};
use ramulus_core::run::{conducting_network, topology_pass, widths_pass};
use ramulus_core::segments::WidthRule;
use ramulus_core::svg::{colour_scheme, FLOW_RAMP_STEPS};

/// Flat buffers, one entry per segment: entry `k` is `Network::segments[k]`, from its upstream
/// to its downstream end.
#[derive(Default)]
pub struct Geometry {
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
    /// Smallest and largest positive flow (0, 0 when none).
    pub flow_range: (f64, f64),
    /// Highest order present.
    pub max_order: u32,
    /// Palette index of each segment under `colouring`.
    pub colours: Vec<u8>,
    /// The colouring `colours` was computed for (empty when stale).
    pub colouring: String,
    /// RGB of each palette index under `colouring`.
    pub palette: Vec<[u8; 3]>,
    /// RGBA pixels of the last raster.
    pub pixels: Vec<u8>,
    /// Entries in an order where neighbours lie close together, for `raster`.
    pub draw_order: Vec<u32>,
}

/// Cells per side of the grid that orders segments for drawing.
const DRAW_ORDER_GRID: usize = 128;

/// Page colourings: `order`, `flow` or `plain`.
fn palette(colouring: &str) -> Vec<[u8; 3]> {
    let scheme = colour_scheme();
    let hex: Vec<String> = match colouring {
        "order" => scheme
            .order
            .iter()
            .map(|colour| colour.to_string())
            .collect(),
        "flow" => scheme.flow,
        _ => vec![scheme.plain.to_string()],
    };
    hex.iter().map(|text| parse_hex(text)).collect()
}

fn parse_hex(text: &str) -> [u8; 3] {
    let value = u32::from_str_radix(text.trim_start_matches('#'), 16).unwrap_or(0);
    [(value >> 16) as u8, (value >> 8) as u8, value as u8]
}

impl Geometry {
    /// Refills every buffer from `network`, reusing their allocations, through the core's
    /// topology, conducting-network and widths passes. Returns false (and empties the buffers)
    /// when the network is not valid, which a grown network always is.
    pub fn fill(&mut self, network: &Network, rule: WidthRule) -> bool {
        self.clear();
        let Ok(forest) = topology_pass(network) else {
            return false;
        };
        let conducting = conducting_network(network);
        let table = widths_pass(network, forest.as_ref(), &conducting, rule);
        let mut low = f64::INFINITY;
        let mut high = 0.0f64;
        for (index, segment) in network.segments.iter().enumerate() {
            let (from, to) = (
                &network.nodes[segment.from as usize],
                &network.nodes[segment.to as usize],
            );
            self.ends
                .extend_from_slice(&[from.x as f32, from.y as f32, to.x as f32, to.y as f32]);
            self.widths.push(table.width[index] as f32);
            self.orders.push(table.order[index]);
            let flow = table.flow[index];
            self.flows.push(flow as f32);
            self.lengths.push(table.length[index] as f32);
            if flow > 0.0 {
                low = low.min(flow);
                high = high.max(flow);
            }
            self.max_order = self.max_order.max(table.order[index]);
        }
        self.flow_range = if high > 0.0 { (low, high) } else { (0.0, 0.0) };
        let ends = &self.ends;
        let midpoints = (0..ends.len() / 4).map(|index| {
            let at = 4 * index;
            [
                (ends[at] as f64 + ends[at + 2] as f64) * 0.5,
                (ends[at + 1] as f64 + ends[at + 3] as f64) * 0.5,
            ]
        });
        self.draw_order = spatial_order(midpoints, DRAW_ORDER_GRID);
        true
    }

    /// Palette index of every segment: order `k` takes colour `min(k, 7) - 1`; flow takes
    /// the ramp step of its logarithm between the smallest and largest positive flow (the
    /// SVG export's rule); plain takes 0.
    pub fn colour_indices(&mut self, colouring: &str) -> &[u8] {
        if self.colouring != colouring || self.colours.len() != self.len() {
            self.palette = palette(colouring);
            let order_colours = self.palette.len() as u32;
            let (low, high) = self.flow_range;
            let steps = FLOW_RAMP_STEPS as f64 - 1.0;
            let span = libm::log(high) - libm::log(low);
            self.colours.clear();
            for index in 0..self.len() {
                let colour = match colouring {
                    "order" => self.orders[index].clamp(1, order_colours) - 1,
                    "flow" => {
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
                    _ => 0,
                };
                self.colours.push(colour as u8);
            }
            self.colouring = colouring.to_string();
        }
        &self.colours
    }

    /// Draws every segment whose width on screen, `max(width * scale, min_px)`, is at most
    /// `max_px` into the pixel buffer over a `background` fill, at opacity `min(1, px)`.
    pub fn raster(
        &mut self,
        view: RasterView,
        colouring: &str,
        min_px: f64,
        max_px: f64,
        background: [u8; 3],
    ) -> &[u8] {
        let size = view.width as usize * view.height as usize * 4;
        self.pixels.resize(size, 0);
        fill(&mut self.pixels, background);
        self.colour_indices(colouring);
        let Geometry {
            ends,
            widths,
            colours,
            palette,
            pixels,
            draw_order,
            ..
        } = self;
        let lines = draw_order.iter().filter_map(|&index| {
            let index = index as usize;
            // Comparisons, not `max` and `min`: those are library calls on wasm32.
            let scaled = widths[index] as f64 * view.scale;
            let px = if scaled > min_px { scaled } else { min_px };
            if px > max_px {
                return None;
            }
            let ends: [f32; 4] = ends.get(4 * index..4 * index + 4)?.try_into().ok()?;
            let rgb = palette
                .get(colours[index] as usize)
                .copied()
                .unwrap_or([0, 0, 0]);
            Some(Line {
                ends,
                rgb,
                strength: if px < 1.0 { (px * 256.0) as u32 } else { 256 },
            })
        });
        draw_lines(pixels, &view, lines);
        &self.pixels
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
        self.flow_range = (0.0, 0.0);
        self.max_order = 0;
        self.colouring.clear();
        self.draw_order.clear();
    }
}
