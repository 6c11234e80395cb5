//! `Simulation`: the page's one opaque handle on a run, grown from a link or restored from a run
//! record, with typed-array views of its geometry (see `geometry`). Nothing here computes: it
//! translates calls into `ramulus-core`.

use ramulus_core::growth::Growth;
use ramulus_core::link::{decode_link, encode_link};
use ramulus_core::metrics::{metrics_csv, metrics_table};
use ramulus_core::network::Network;
use ramulus_core::params::Domain;
use ramulus_core::params::Params;
use ramulus_core::record::{make_record, read_record, write_record};
use ramulus_core::run::{width_rule, RunView, SITE_CAUTION};
use ramulus_core::svg::Colouring;
use wasm_bindgen::prelude::*;

use ramulus_core::raster::RasterView;

use crate::geometry::Geometry;

/// Where the network comes from.
enum Source {
    /// Grown here, step by step.
    Growing(Box<Growth>),
    /// Read from a run record that carries no parameters; nothing to grow.
    Fixed(Network),
}

/// A run held in wasm memory.
#[wasm_bindgen]
pub struct Simulation {
    params: Params,
    source: Source,
    geometry: Geometry,
    recorded_digest: Option<String>,
    /// Everything derived from the network as it stands (metrics, SVG, record share it);
    /// dropped whenever the network changes.
    view_cache: Option<RunView>,
}

#[wasm_bindgen]
impl Simulation {
    /// Starts a run from a link (URL, `#fragment` or bare fragment). Damaged fields take their
    /// defaults (read the problems with `read_link` first); fails only if the lattice cannot
    /// be built, with a message naming the parameter.
    #[wasm_bindgen(constructor)]
    pub fn new(link: &str) -> Result<Simulation, JsError> {
        console_error_panic_hook::set_once();
        let params = decode_link(link).params;
        let growth = Growth::new(&params).map_err(|error| JsError::new(&error.to_string()))?;
        Ok(Simulation {
            params,
            source: Source::Growing(Box::new(growth)),
            geometry: Geometry::default(),
            recorded_digest: None,
            view_cache: None,
        })
    }

    /// Restores a run from a run record's JSON: one with parameters is grown again from them
    /// (compare `digest` with `recorded_digest` once finished); one without is shown as saved.
    pub fn from_record(text: &str) -> Result<Simulation, JsError> {
        console_error_panic_hook::set_once();
        let (record, network) =
            read_record(text).map_err(|error| JsError::new(&error.to_string()))?;
        let (params, source) = match record.params {
            Some(params) => {
                let growth = Growth::new(&params)
                    .map_err(|error| JsError::new(&format!("record parameters: {error}")))?;
                (params, Source::Growing(Box::new(growth)))
            }
            None => {
                let params = Params {
                    domain: Domain {
                        units: network.units.clone(),
                        cell_size: if network.cell_size > 0.0 {
                            network.cell_size
                        } else {
                            1.0
                        },
                        ..Domain::default()
                    },
                    ..Params::default()
                };
                (params, Source::Fixed(network))
            }
        };
        Ok(Simulation {
            params,
            source,
            geometry: Geometry::default(),
            recorded_digest: Some(record.digest),
            view_cache: None,
        })
    }

    /// Starts the run again from its first cell.
    pub fn reset(&mut self) -> Result<(), JsError> {
        self.view_cache = None;
        if let Source::Growing(growth) = &mut self.source {
            **growth =
                Growth::new(&self.params).map_err(|error| JsError::new(&error.to_string()))?;
        }
        Ok(())
    }

    /// Adds up to `count` cells; returns how many were added.
    pub fn step(&mut self, count: u32) -> u32 {
        let added = match &mut self.source {
            Source::Growing(growth) => growth.step(count as u64).added as u32,
            Source::Fixed(_) => 0,
        };
        if added > 0 {
            self.view_cache = None;
        }
        added
    }

    /// Whether growth has stopped.
    pub fn finished(&self) -> bool {
        match &self.source {
            Source::Growing(growth) => growth.stopped().is_some(),
            Source::Fixed(_) => true,
        }
    }

    /// Why growth stopped (`budget`, `full`, `threshold`, `saved` for a fixed network), or an
    /// empty string while it grows.
    pub fn stop_reason(&self) -> String {
        match &self.source {
            Source::Growing(growth) => growth
                .stopped()
                .map(|reason| reason.name().to_string())
                .unwrap_or_default(),
            Source::Fixed(_) => "saved".to_string(),
        }
    }

    /// Cells grown so far (nodes of a fixed network).
    pub fn cells(&self) -> f64 {
        match &self.source {
            Source::Growing(growth) => growth.cell_count() as f64,
            Source::Fixed(network) => network.nodes.len() as f64,
        }
    }

    /// The cell budget.
    pub fn budget(&self) -> f64 {
        match &self.source {
            Source::Growing(_) => self.params.run.cells as f64,
            Source::Fixed(network) => network.nodes.len() as f64,
        }
    }

    /// Digest of the network so far (16 hex digits).
    pub fn digest(&self) -> String {
        ramulus_core::digest::digest_hex(&self.network())
    }

    /// The digest saved in the record this run was restored from, if any.
    pub fn recorded_digest(&self) -> Option<String> {
        self.recorded_digest.clone()
    }

    /// The run's link fragment (without `#`); empty for a fixed network.
    pub fn link(&self) -> String {
        match &self.source {
            Source::Growing(_) => encode_link(&self.params),
            Source::Fixed(_) => String::new(),
        }
    }

    /// The run's parameters as JSON (the seed as a JSON number: read it from `link` where a
    /// seed above 2^53 must stay exact in JavaScript).
    pub fn params_json(&self) -> String {
        serde_json::to_string(&self.params).unwrap_or_default()
    }

    /// Physical extent and units as JSON: `{width, height, units, cell_size, site}`.
    pub fn frame_json(&self) -> String {
        let (width, height) = match &self.source {
            Source::Growing(_) => (
                self.params.domain.width as f64 * self.params.domain.cell_size,
                self.params.domain.height as f64 * self.params.domain.cell_size,
            ),
            Source::Fixed(network) => {
                network.nodes.iter().fold((0.0f64, 0.0f64), |(w, h), node| {
                    (w.max(node.x), h.max(node.y))
                })
            }
        };
        serde_json::json!({
            "width": width,
            "height": height,
            "units": self.params.domain.units,
            "cell_size": self.params.domain.cell_size,
            "site": self.params.is_site(),
        })
        .to_string()
    }

    /// Metrics of the network so far, as JSON.
    pub fn metrics_json(&mut self) -> Result<String, JsError> {
        let view = self.view()?;
        serde_json::to_string(&view.metrics).map_err(|error| JsError::new(&error.to_string()))
    }

    /// Metrics as labelled rows `[[label, value, unit], ...]` (four significant digits).
    pub fn metrics_rows_json(&mut self) -> Result<String, JsError> {
        let units = self.params.domain.units.clone();
        let rows = metrics_table(&self.view()?.metrics, &units);
        serde_json::to_string(&rows).map_err(|error| JsError::new(&error.to_string()))
    }

    /// Metrics as CSV at full precision.
    pub fn metrics_csv(&mut self) -> Result<String, JsError> {
        let units = self.params.domain.units.clone();
        let caution = self.params.is_site().then_some(SITE_CAUTION);
        Ok(metrics_csv(&self.view()?.metrics, &units, caution))
    }

    /// The network as SVG, coloured by `order`, `flow` or `plain`.
    pub fn svg(&mut self, colouring: &str) -> Result<String, JsError> {
        let colour = match colouring {
            "order" => Colouring::ByOrder,
            "flow" => Colouring::ByFlow,
            "plain" => Colouring::Plain,
            other => {
                return Err(JsError::new(&format!(
                    "colouring {other:?}: use order, flow or plain"
                )))
            }
        };
        self.view()?;
        let view = self
            .view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))?;
        Ok(view.svg(&self.params, colour))
    }

    /// The JSON run record.
    pub fn record_json(&mut self) -> Result<String, JsError> {
        let stopped = Some(self.stop_reason()).filter(|reason| !reason.is_empty());
        self.view()?;
        let view = self
            .view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))?;
        Ok(write_record(&make_record(view, &self.params, stopped)))
    }

    /// Refills the geometry buffers from the network so far; returns the entry count.
    pub fn update_geometry(&mut self) -> u32 {
        let network = self.network();
        self.geometry.fill(&network, width_rule(&self.params));
        self.geometry.len() as u32
    }

    /// `x0, y0, x1, y1` per entry (4 floats each).
    pub fn ends_ptr(&self) -> *const f32 {
        self.geometry.ends.as_ptr()
    }

    /// Width per entry.
    pub fn widths_ptr(&self) -> *const f32 {
        self.geometry.widths.as_ptr()
    }

    /// Strahler order per entry.
    pub fn orders_ptr(&self) -> *const u32 {
        self.geometry.orders.as_ptr()
    }

    /// Flow per entry.
    pub fn flows_ptr(&self) -> *const f32 {
        self.geometry.flows.as_ptr()
    }

    /// Length per entry.
    pub fn lengths_ptr(&self) -> *const f32 {
        self.geometry.lengths.as_ptr()
    }

    /// Palette index of every entry under `colouring` (`order`, `flow`, `plain`), one byte each.
    pub fn colours_ptr(&mut self, colouring: &str) -> *const u8 {
        self.geometry.colour_indices(colouring).as_ptr()
    }

    /// Draws the thin segments (on-screen width at most `max_px`) into a `width` x `height`
    /// RGBA buffer over the `background` colour (0xRRGGBB) and returns its address; pixel =
    /// coordinate * `scale` + offset. Wider segments are left for the page to stroke on top.
    #[allow(clippy::too_many_arguments)]
    pub fn raster(
        &mut self,
        width: u32,
        height: u32,
        scale: f64,
        offset_x: f64,
        offset_y: f64,
        colouring: &str,
        min_px: f64,
        max_px: f64,
        background: u32,
    ) -> *const u8 {
        let view = RasterView {
            width,
            height,
            scale,
            offset_x,
            offset_y,
        };
        let rgb = [
            (background >> 16) as u8,
            (background >> 8) as u8,
            background as u8,
        ];
        self.geometry
            .raster(view, colouring, min_px, max_px, rgb)
            .as_ptr()
    }

    /// Smallest positive flow in the geometry (0 when none).
    pub fn flow_low(&self) -> f64 {
        self.geometry.flow_range.0
    }

    /// Largest flow in the geometry (0 when none).
    pub fn flow_high(&self) -> f64 {
        self.geometry.flow_range.1
    }

    /// Highest Strahler order in the geometry.
    pub fn max_order(&self) -> u32 {
        self.geometry.max_order
    }
}

impl Simulation {
    fn network(&self) -> Network {
        match &self.source {
            Source::Growing(growth) => growth.network(),
            Source::Fixed(network) => network.clone(),
        }
    }

    /// The derived view of the network as it stands, computed once per change of the network.
    fn view(&mut self) -> Result<&RunView, JsError> {
        if self.view_cache.is_none() {
            let view = RunView::new(self.network(), &self.params)
                .map_err(|error| JsError::new(&error.to_string()))?;
            self.view_cache = Some(view);
        }
        self.view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))
    }
}
