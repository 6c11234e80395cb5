//! `Simulation`: the page's one opaque handle on a run, grown from a link or restored from a run
//! record, with typed-array views of its screen geometry (`ramulus_draw::screen`). Nothing here
//! computes or draws: it translates calls into `ramulus-core` and `ramulus-draw`.

use ramulus_core::growth::Growth;
use ramulus_core::link::{decode_link, encode_link};
use ramulus_core::metrics::metrics_csv;
use ramulus_core::network::Network;
use ramulus_core::params::Domain;
use ramulus_core::params::Params;
use ramulus_core::reconnection::next_part_size;
use ramulus_core::record::{make_record, read_record, write_record};
use ramulus_core::reshaping::Reshaping;
use ramulus_core::run::{
    as_measured, conducting_pass, topology_pass, width_rule, widths_pass, Conducted, Reshaped,
    RunView, SITE_CAUTION,
};
use ramulus_draw::legend::legend_items;
use ramulus_draw::marks::network_marks;
use ramulus_draw::palette::Colouring;
use ramulus_draw::plots::readings_plots;
use ramulus_draw::raster::RasterView;
use ramulus_draw::run_svg_with;
use ramulus_draw::scale_bar::scale_bar;
use ramulus_draw::screen::ScreenGeometry;
use ramulus_draw::screen_growth::GrowingScreen;
use ramulus_draw::texts::{
    progress_text, segment_reading, stop_text, tissue_reading, SAVED_NETWORK_TEXT,
};
use ramulus_draw::tissue::TissueView;
use wasm_bindgen::prelude::*;
use wasm_bindgen::Clamped;
use web_sys::{CanvasRenderingContext2d, ImageData};

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
    geometry: ScreenGeometry,
    /// The forest behind `geometry`, to refill only what growth changed.
    growing: GrowingScreen,
    recorded_digest: Option<String>,
    /// Everything derived from the network as it stands (metrics, SVG, record share it);
    /// dropped whenever the network changes.
    view_cache: Option<RunView>,
    /// Benchmark switch: refill the geometry in full every time (see `set_full_refill`).
    full_refill: bool,
    /// Test hook: once the run holds this many cells, `step` fails as a failed allocation
    /// does (see `debug_trap_at_cells`).
    trap_at_cells: Option<u64>,
    /// The passes after growth, a slice at a time (`reshape_step`); the page's switch
    /// `set_stepwise_passes` and what they have done so far.
    passes: crate::passes::StepwisePasses,
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
            geometry: ScreenGeometry::default(),
            growing: GrowingScreen::default(),
            recorded_digest: None,
            view_cache: None,
            trap_at_cells: None,
            full_refill: false,
            passes: Default::default(),
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
            geometry: ScreenGeometry::default(),
            growing: GrowingScreen::default(),
            recorded_digest: Some(record.digest),
            view_cache: None,
            trap_at_cells: None,
            full_refill: false,
            passes: Default::default(),
        })
    }

    /// Starts the run again from its first cell.
    pub fn reset(&mut self) -> Result<(), JsError> {
        self.view_cache = None;
        self.passes.forget();
        if let Source::Growing(growth) = &mut self.source {
            **growth =
                Growth::new(&self.params).map_err(|error| JsError::new(&error.to_string()))?;
            // The forest drawn was the old grower's (the growing refill reads the grower).
            self.growing.clear();
        }
        Ok(())
    }

    /// Adds up to `count` cells; returns how many were added.
    pub fn step(&mut self, count: u32) -> u32 {
        let was_finished = self.finished();
        let added = match &mut self.source {
            Source::Growing(growth) => growth.step(count as u64).added as u32,
            Source::Fixed(_) => 0,
        };
        // Stopping changes the view too when junctions are relaxed once growth stops.
        if added > 0 || self.finished() != was_finished {
            self.view_cache = None;
        }
        if self
            .trap_at_cells
            .is_some_and(|cells| self.cells() >= cells as f64)
        {
            // What running out of memory does: the allocation error handler aborts, which
            // traps the instance (`RuntimeError: unreachable` in the browser).
            std::alloc::handle_alloc_error(std::alloc::Layout::new::<[u8; 1 << 30]>());
        }
        added
    }

    /// Benchmark switch: with `on`, `update_geometry` runs the core's passes in full every
    /// time instead of refilling only what growth changed (the page benchmark compares both).
    pub fn set_full_refill(&mut self, on: bool) {
        self.full_refill = on;
        self.growing.clear();
        self.geometry = ScreenGeometry::default();
    }

    /// With `on`, the passes after growth (channel energy sweeps, junction relaxation, loops)
    /// wait for `reshape_step` once growth stops: the page runs them a slice at a time and
    /// shows progress in between; the refill shows the network as grown until they end.
    /// Without it (the default), the first reading of a finished run runs them in one go.
    pub fn set_stepwise_passes(&mut self, on: bool) {
        self.passes.stepwise = on;
    }

    /// Whether the passes after growth are still to run (stepwise passes only).
    pub fn passes_pending(&self) -> bool {
        self.passes_waiting()
    }

    /// Runs a bounded slice of the passes after growth: the first call sets them up; the next
    /// run parts of sweeps (`passes::ITEMS_PER_PART` nodes or junctions each, at least one
    /// part) until `budget_ms` milliseconds have passed or the sweeps are over; with loops
    /// (`reconnect`), the call after the last sweep runs the conducting pass and sets the loop
    /// pass up, and the next ones close loops in parts (parts of work whose size follows the
    /// clock, `reconnection::next_part_size`, at least one part) until `budget_ms` have passed or the loops are closed; the call
    /// after that runs the rest of the pipeline (widths, readings) and caches the run view, so
    /// refills and readings never run the passes again. Returns the progress as JSON
    /// (`passes::StepwisePasses::progress_json`); the result equals the passes run in one go,
    /// digest for digest.
    pub fn reshape_step(&mut self, budget_ms: f64) -> Result<String, JsError> {
        if self.passes_waiting() {
            let start = js_sys::Date::now();
            let sweeping = self
                .passes
                .reshaping
                .as_ref()
                .is_some_and(|reshaping| !reshaping.done());
            if !self.passes.started {
                // Only runs with sweeps need the set-up (a run closing loops alone goes
                // straight to setting the loop pass up).
                self.passes.started = true;
                if self.reshapes() {
                    let reshaping = Reshaping::new(self.network(), &self.params)
                        .map_err(|error| JsError::new(&error.to_string()))?;
                    self.passes.reshaping = Some(reshaping);
                }
                self.passes.setup_ms = js_sys::Date::now() - start;
            } else if let Some(reshaping) = self.passes.reshaping.as_mut().filter(|_| sweeping) {
                loop {
                    let part_start = js_sys::Date::now();
                    let progress = reshaping
                        .advance(crate::passes::ITEMS_PER_PART)
                        .map_err(|error| JsError::new(&error.to_string()))?;
                    let ended = js_sys::Date::now();
                    self.passes.sweep_ms += ended - part_start;
                    if progress.swept && progress.sweep > 0 {
                        self.passes.log.push(crate::passes::SweepFigure {
                            pass: progress.pass.name(),
                            sum: progress.now,
                            moved: progress.moved,
                            ms: self.passes.sweep_ms,
                        });
                        self.passes.sweep_ms = 0.0;
                    }
                    if reshaping.done() || ended - start >= budget_ms {
                        break;
                    }
                }
            } else if self.params.widths.reconnect.is_some() && self.passes.loops.is_none() {
                let (reshaped, params) = match self.passes.take() {
                    Some(reshaping) => reshaping.into_reshaped(),
                    None => {
                        let network = self.network();
                        topology_pass(&network).map(|forest| {
                            let reshaped = Reshaped {
                                network,
                                forest,
                                energy: None,
                                relaxation: None,
                            };
                            (reshaped, self.params.clone())
                        })
                    }
                }
                .map_err(|error| JsError::new(&error.to_string()))?;
                self.params = params;
                self.passes.loops = Some(Conducted::new(reshaped, &self.params));
                self.passes.loop_part = crate::passes::FIRST_LOOP_PART;
                self.passes.loop_figures.setup_ms = js_sys::Date::now() - start;
            } else if let Some(conducted) = self
                .passes
                .loops
                .as_mut()
                .filter(|loops| !loops.loops_done())
            {
                let mut pieces = self.passes.loop_part;
                loop {
                    let part_start = js_sys::Date::now();
                    conducted.advance(pieces);
                    let ended = js_sys::Date::now();
                    pieces = next_part_size(pieces, ended - part_start, budget_ms);
                    if conducted.loops_done() || ended - start >= budget_ms {
                        break;
                    }
                }
                self.passes.loop_part = pieces;
                let figures = &mut self.passes.loop_figures;
                let ms = js_sys::Date::now() - start;
                figures.slices += 1;
                figures.ms += ms;
                figures.longest_slice_ms = figures.longest_slice_ms.max(ms);
            } else {
                self.view()?;
                self.passes.finish_ms = js_sys::Date::now() - start;
            }
        }
        Ok(self.passes_progress())
    }

    /// The loops the loop pass has closed so far from the `first` on (0 for all), as
    /// `x0, y0, x1, y1` per new segment in the network's frame, so the page draws loops as
    /// they form; empty when no loop pass is running.
    pub fn loop_lines(&self, first: u32) -> js_sys::Float32Array {
        let Some(conducted) = self.passes.loops.as_ref() else {
            return js_sys::Float32Array::new_with_length(0);
        };
        let nodes = &conducted.reshaped().network.nodes;
        let links = conducted.loop_links();
        let mut lines = Vec::with_capacity(4 * links.len().saturating_sub(first as usize));
        for link in links.iter().skip(first as usize) {
            if let (Some(a), Some(b)) = (nodes.get(link.from as usize), nodes.get(link.to as usize))
            {
                lines.extend_from_slice(&[a.x as f32, a.y as f32, b.x as f32, b.y as f32]);
            }
        }
        js_sys::Float32Array::from(lines.as_slice())
    }

    /// Stops the sweeps: a sweep stopped midway is taken back, and the network stays as the
    /// last whole sweep left it (the pass's sweep count in the run's link and record becomes
    /// the whole sweeps run; later sweeping passes do not run); the next `reshape_step` runs
    /// the rest of the pipeline. Loops are not stopped: a loop pass stopped halfway closes
    /// loops no link asks for, so the page's digest would differ from the command line's for
    /// the same link; once the loops have started (progress stage `loops`, `stoppable`
    /// false) they run to the end. Returns the progress as `reshape_step` does.
    pub fn reshape_stop(&mut self) -> Result<String, JsError> {
        if let Some(reshaping) = self.passes.reshaping.as_mut() {
            if !reshaping.done() {
                let progress = reshaping.progress();
                if progress.part > 0 {
                    self.passes.taken_back = Some(progress.sweep + 1);
                }
                reshaping
                    .stop()
                    .map_err(|error| JsError::new(&error.to_string()))?;
                self.passes.stopped = true;
            }
        }
        Ok(self.passes_progress())
    }

    /// The progress of the passes after growth as JSON (as `reshape_step` returns it).
    pub fn reshape_progress(&self) -> String {
        self.passes_progress()
    }

    /// Test hook for the page's recovery from a dead instance: once the run holds `cells`
    /// cells, the next `step` traps the wasm instance the way exhausted memory does.
    pub fn debug_trap_at_cells(&mut self, cells: f64) {
        self.trap_at_cells = Some(cells as u64);
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

    /// The cell budget in grown cells: `cells` times `refine` squared (a refined lattice
    /// keeps the budget's area, so it grows that many of its smaller cells).
    pub fn budget(&self) -> f64 {
        match &self.source {
            Source::Growing(_) => {
                let refine = f64::from(self.params.domain.refine.max(1));
                self.params.run.cells as f64 * refine * refine
            }
            Source::Fixed(network) => network.nodes.len() as f64,
        }
    }

    /// Digest of the network so far (16 hex digits).
    pub fn digest(&mut self) -> Result<String, JsError> {
        // A finished run's network is the one the whole pipeline gives (junctions relaxed,
        // drainage re-pointed, loops closed after growth), as the command line digests it;
        // while it grows, and for a network read from a record, it is the network as it is.
        let after_growth = self.reshapes() || self.params.widths.reconnect.is_some();
        if after_growth && self.finished() && matches!(self.source, Source::Growing(_)) {
            return Ok(self.view()?.digest.clone());
        }
        Ok(ramulus_core::digest::digest_hex(&self.network()))
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

    /// Metrics as labelled rows `[[label, value, unit, about, says_little], ...]` (four
    /// significant digits; `about` a short explanation for people, possibly empty;
    /// `says_little` true for a reading that follows the cell size because every cell is a
    /// vein, its `about` then saying so).
    pub fn metrics_rows_json(&mut self) -> Result<String, JsError> {
        let units = self.params.domain.units.clone();
        let view = self.view()?;
        let rows =
            ramulus_draw::texts::readings_rows_noted(&view.metrics, &units, view.grown_measured());
        serde_json::to_string(&rows).map_err(|error| JsError::new(&error.to_string()))
    }

    /// Metrics as CSV at full precision.
    pub fn metrics_csv(&mut self) -> Result<String, JsError> {
        let units = self.params.domain.units.clone();
        let caution = self.params.is_site().then_some(SITE_CAUTION);
        Ok(metrics_csv(&self.view()?.metrics, &units, caution))
    }

    /// The network as SVG, coloured by `order`, `flow` or `plain`, tissue `faint`, `hidden`
    /// or drawn like the `veins`.
    pub fn svg(&mut self, colouring: &str, tissue: &str) -> Result<String, JsError> {
        let colour = colouring_named(colouring)?;
        let tissue = tissue_named(tissue)?;
        self.view()?;
        let view = self
            .view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))?;
        Ok(run_svg_with(view, &self.params, colour, tissue))
    }

    /// A finished site's channels sized for the design form (JSON texts as typed): the page's
    /// tables as JSON `{columns, rows, outlets, flags_text, caution}`, or `{error}` naming the
    /// field or value at fault.
    /// `site_text`: the site file the run came from (its outlet names), or empty.
    pub fn drainage_json(&mut self, form_json: &str, site_text: &str) -> Result<String, JsError> {
        self.view()?;
        let view = self
            .view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))?;
        Ok(crate::site::drainage_tables_json(
            view,
            &self.params,
            form_json,
            site_text,
        ))
    }

    /// The channel schedule as CSV (caution first), for the design form.
    pub fn drainage_csv(&mut self, form_json: &str) -> Result<String, JsError> {
        self.view()?;
        let view = self
            .view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))?;
        crate::site::drainage_csv(view, &self.params, form_json).map_err(|e| JsError::new(&e))
    }

    /// The channels with their flows and sizes as GeoJSON, for the design form.
    pub fn drainage_geojson(&mut self, form_json: &str) -> Result<String, JsError> {
        self.view()?;
        let view = self
            .view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))?;
        crate::site::drainage_geojson(view, &self.params, form_json).map_err(|e| JsError::new(&e))
    }

    /// The drainage plan (SVG to a stated map scale), for the design form; `site_text` is the
    /// site file the run came from (its names label the plan), or empty.
    pub fn drainage_plan_svg(
        &mut self,
        form_json: &str,
        site_text: &str,
    ) -> Result<String, JsError> {
        self.view()?;
        let view = self
            .view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))?;
        crate::site::drainage_plan_svg(view, &self.params, form_json, site_text)
            .map_err(|e| JsError::new(&e))
    }

    /// The parts of a finished site no outlet reaches (`site::unreached_json`): rings,
    /// labels and a sentence in the units of `system` (`si` or `us`); `site_text` is the site
    /// file the run came from, or empty.
    pub fn unreached_json(&mut self, site_text: &str, system: &str) -> Result<String, JsError> {
        self.view()?;
        let view = self
            .view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))?;
        Ok(crate::site::unreached_json(
            view,
            &self.params,
            site_text,
            system,
        ))
    }

    /// The site's areas kept clear, to draw under the layout (`site::obstacles_json`):
    /// rings in the network's frame and names from `site_text` (the run's site file, or
    /// empty).
    pub fn obstacles_json(&self, site_text: &str) -> String {
        crate::site::obstacles_json(&self.params, site_text)
    }

    /// Natural flow on the site's bare ground: `x0, y0, x1, y1, class` per cell that passes
    /// its water on, in the network's frame (empty on flat ground or off a site).
    pub fn ground_flow_lines(&self) -> js_sys::Float32Array {
        let (lines, _) = crate::site::ground_flow_overlay(&self.params);
        js_sys::Float32Array::from(lines.as_slice())
    }

    /// The sentence under the natural-flow toggle.
    pub fn ground_flow_text(&self) -> String {
        crate::site::ground_flow_overlay(&self.params).1
    }

    /// The progress line: `1,234 of 5,000 cells`, with why growth stopped once it has.
    pub fn progress_text(&self) -> String {
        let stopped = match &self.source {
            Source::Growing(growth) => growth.stopped().map(stop_text),
            Source::Fixed(_) => Some(SAVED_NETWORK_TEXT),
        };
        progress_text(self.cells() as u64, self.budget() as u64, stopped)
    }

    // ---- page-ux: framing the view and marking the roots ----
    /// The network's extent and roots as JSON `{bounds: [x0, y0, x1, y1] | null, roots:
    /// [[x, y], ...]}` in physical units (`ramulus_draw::marks`): the page fits its view to
    /// the bounds and draws a marker on each root.
    pub fn marks_json(&self) -> String {
        serde_json::to_string(&network_marks(&self.network())).unwrap_or_default()
    }
    // ---- end page-ux ----

    /// The colour key of the canvas under `colouring` and `tissue`, as JSON `[{pieces:
    /// [{line: "#rrggbb"} | "circle" | {text}]}]` (the SVG's legend, for what the canvas draws).
    pub fn legend_json(&self, colouring: &str, tissue: &str) -> Result<String, JsError> {
        let facts = self.geometry.legend_facts(
            colouring_named(colouring)?,
            tissue_named(tissue)?,
            &self.params.domain.units,
        );
        serde_json::to_string(&legend_items(&facts))
            .map_err(|error| JsError::new(&error.to_string()))
    }

    /// The screen's scale bar about `target_pixels` long at `pixels_per_unit`, as JSON
    /// `{length, pixels, label}`.
    pub fn scale_bar_json(&self, pixels_per_unit: f64, target_pixels: f64) -> String {
        serde_json::to_string(&scale_bar(
            pixels_per_unit,
            target_pixels,
            &self.params.domain.units,
        ))
        .unwrap_or_else(|_| "{}".to_string())
    }

    /// The readings of geometry entry `index` (order, flow, width, length with units, one per
    /// line; for tissue, what it is, flow and length), or an empty string when there is no
    /// such entry.
    pub fn segment_reading(&self, index: u32) -> String {
        let geometry = &self.geometry;
        let index = index as usize;
        if index >= geometry.len() {
            return String::new();
        }
        if !geometry.conducts.get(index).copied().unwrap_or(true) {
            return tissue_reading(
                f64::from(geometry.flows[index]),
                f64::from(geometry.lengths[index]),
                &self.params.domain.units,
            );
        }
        segment_reading(
            geometry.orders[index],
            f64::from(geometry.flows[index]),
            f64::from(geometry.widths[index]),
            f64::from(geometry.lengths[index]),
            &self.params.domain.units,
        )
    }

    /// The geometry entry whose segment passes nearest to (`x`, `y`) in physical units within
    /// `reach`, or -1; hidden tissue (`tissue` = `hidden`) is never found.
    pub fn segment_at(&self, x: f64, y: f64, reach: f64, tissue: &str) -> i32 {
        let tissue = TissueView::from_name(tissue).unwrap_or_default();
        self.geometry
            .segment_at(x, y, reach, tissue)
            .map_or(-1, |index| index as i32)
    }

    /// How many geometry entries are tissue (do not conduct): the page offers its tissue
    /// control only when there are some.
    pub fn tissue_count(&self) -> u32 {
        self.geometry.tissue_count as u32
    }

    /// The Horton plot and angle histogram as data to draw (`ramulus_draw::plots`), JSON.
    pub fn plots_json(&mut self) -> Result<String, JsError> {
        let units = self.params.domain.units.clone();
        let plots = readings_plots(&self.view()?.metrics, &units);
        serde_json::to_string(&plots).map_err(|error| JsError::new(&error.to_string()))
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

    /// Refills the geometry buffers from the network so far; returns the entry count, one per
    /// segment (0 when the network is not valid, which a grown network always is). While the
    /// network only grows by appended nodes, only the new segments and those downstream of
    /// them are refilled (`GrowingScreen`, equal to a full refill bit for bit); otherwise the
    /// core's topology, junction, conducting-network and widths passes refill everything.
    pub fn update_geometry(&mut self) -> u32 {
        self.update_geometry_part(f64::INFINITY)
    }

    /// `update_geometry`, but a growing refill takes the nodes grown since the last refill
    /// oldest first and stops once `most_nodes` nodes need their values again (the new ones
    /// and those downstream; at least one new node is taken): the page bounds one frame's
    /// refill while a run grows fast, and the geometry shows the run's first nodes until a
    /// later refill takes the rest (`geometry_behind`).
    pub fn update_geometry_part(&mut self, most_nodes: f64) -> u32 {
        let most = if most_nodes >= 1.0 {
            most_nodes.min(usize::MAX as f64) as usize
        } else {
            1
        };
        let rule = width_rule(&self.params);
        // The growing refill follows the passes with every segment conducting and every node
        // on its cell; with a conducting threshold a segment's state changes as flows grow, and
        // once a run with junction relaxation has finished its junctions move: refill in full.
        // Junctions are relaxed once growth has stopped, not while it grows (a relaxation
        // per frame would cost more than the growth).
        // A finished run that relaxes junctions or closes loops is shown as the whole pipeline
        // gives it (the run view: moved junctions, loops after growth), as it is measured.
        // With stepwise passes (the page), the network is shown as grown until `reshape_step`
        // has run them; the refill never runs them itself.
        let whole_pipeline = self.finished() && self.after_growth();
        let waiting = whole_pipeline && self.passes_waiting();
        if whole_pipeline && !waiting {
            self.growing.clear();
            let filled = self.view().is_ok();
            match self.view_cache.as_ref().filter(|_| filled) {
                Some(view) => self.geometry.fill(&view.network, &view.table),
                None => self.geometry = ScreenGeometry::default(),
            }
            return self.geometry.len() as u32;
        }
        if !self.full_refill
            && self.params.widths.vein_area == 0.0
            && (!self.relaxes_now() || waiting)
        {
            if self.growing_refill(most) {
                return self.geometry.len() as u32;
            }
            // Not the last network grown further: start the forest afresh, or refill in full.
            self.growing.clear();
            self.geometry = ScreenGeometry::default();
            if self.growing_refill(most) {
                return self.geometry.len() as u32;
            }
        }
        self.growing.clear();
        // A finished run that reshapes was filled from its run view above; here the network is
        // shown as it stands (growing, or waiting for its stepwise passes).
        let network = self.network();
        match topology_pass(&network) {
            Ok(mut forest) => {
                let conducting = conducting_pass(&network, &mut forest, &self.params);
                let table = widths_pass(&network, forest.as_ref(), &conducting, rule);
                self.geometry.fill(&network, &table);
            }
            Err(_) => self.geometry = ScreenGeometry::default(),
        }
        self.geometry.len() as u32
    }

    /// Nodes the last growing refill recomputed (the new ones and those downstream), the
    /// measure of its work.
    pub fn refill_work(&self) -> u32 {
        self.growing.last_dirty().min(u32::MAX as usize) as u32
    }

    /// Whether the geometry shows fewer nodes than the run holds (a bounded growing refill
    /// left some for the next).
    pub fn geometry_behind(&self) -> bool {
        match &self.source {
            Source::Growing(growth) => {
                self.growing.node_count() > 0 && self.growing.node_count() < growth.node_count()
            }
            Source::Fixed(_) => false,
        }
    }

    /// `x0, y0, x1, y1` per entry (4 floats each), a view into wasm memory. Like every view
    /// below, it is valid only until the next call into wasm: take it afresh each time.
    pub fn ends(&self) -> js_sys::Float32Array {
        // SAFETY: the view is handed straight to JavaScript, which reads it before any other
        // wasm call could grow memory or refill the buffer (see www/session.js).
        unsafe { js_sys::Float32Array::view(&self.geometry.ends) }
    }

    /// Width per entry, a view into wasm memory (see `ends`).
    pub fn widths(&self) -> js_sys::Float32Array {
        // SAFETY: as for `ends`.
        unsafe { js_sys::Float32Array::view(&self.geometry.widths) }
    }

    /// Strahler order per entry, a view into wasm memory (see `ends`).
    pub fn orders(&self) -> js_sys::Uint32Array {
        // SAFETY: as for `ends`.
        unsafe { js_sys::Uint32Array::view(&self.geometry.orders) }
    }

    /// Palette index of every entry under `colouring`, a view into wasm memory (see `ends`).
    pub fn colour_indices(&mut self, colouring: &str) -> Result<js_sys::Uint8Array, JsError> {
        let colours = self.geometry.colour_indices(colouring_named(colouring)?);
        // SAFETY: as for `ends`.
        Ok(unsafe { js_sys::Uint8Array::view(colours) })
    }

    /// Paints the thin segments (on-screen width at most `max_px`; tissue as `tissue` says:
    /// `faint`, `hidden` or like the `veins`) over the `background`
    /// colour (0xRRGGBB) into the whole of `context`'s canvas, `width` x `height` pixels, with
    /// `putImageData`; pixel = coordinate * `scale` + offset. Wider segments are left for the
    /// page to stroke on top. The same as `start_thin_lines`, `draw_thin_lines` over every
    /// entry and `put_thin_lines`.
    #[allow(clippy::too_many_arguments)]
    pub fn paint_thin_lines(
        &mut self,
        context: &CanvasRenderingContext2d,
        width: u32,
        height: u32,
        scale: f64,
        offset_x: f64,
        offset_y: f64,
        colouring: &str,
        tissue: &str,
        min_px: f64,
        max_px: f64,
        background: u32,
    ) -> Result<(), JsError> {
        self.start_thin_lines(
            width, height, scale, offset_x, offset_y, colouring, tissue, min_px, max_px, background,
        )?;
        self.geometry.continue_raster(usize::MAX);
        self.put_thin_lines(context)
    }

    /// Starts painting the thin segments a slice at a time (arguments as `paint_thin_lines`):
    /// fills the pixel buffer with the background; `draw_thin_lines` draws the segments and
    /// `put_thin_lines` shows the result. Drops any painting in progress; so does a refill.
    #[allow(clippy::too_many_arguments)]
    pub fn start_thin_lines(
        &mut self,
        width: u32,
        height: u32,
        scale: f64,
        offset_x: f64,
        offset_y: f64,
        colouring: &str,
        tissue: &str,
        min_px: f64,
        max_px: f64,
        background: u32,
    ) -> Result<(), JsError> {
        let colouring = colouring_named(colouring)?;
        let tissue = tissue_named(tissue)?;
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
            .begin_raster(view, colouring, tissue, min_px, max_px, rgb);
        Ok(())
    }

    /// Draws up to `count` more segments of the painting begun by `start_thin_lines`; returns
    /// how many are left, 0 when it is finished, or -1 when no painting is in progress (never
    /// started, or dropped by a refill or another painting).
    pub fn draw_thin_lines(&mut self, count: u32) -> i32 {
        if !self.geometry.raster_in_progress() {
            return -1;
        }
        self.geometry
            .continue_raster(count as usize)
            .min(i32::MAX as usize) as i32
    }

    /// Puts the pixel buffer as last drawn onto the whole of `context`'s canvas with
    /// `putImageData` (the image reads wasm memory in place; the canvas copies it).
    pub fn put_thin_lines(&self, context: &CanvasRenderingContext2d) -> Result<(), JsError> {
        let view = self
            .geometry
            .raster_view()
            .ok_or_else(|| JsError::new("no thin lines painted yet"))?;
        let image = ImageData::new_with_u8_clamped_array_and_sh(
            Clamped(&self.geometry.pixels),
            view.width,
            view.height,
        )
        .map_err(|_| JsError::new("the canvas refused an image of this size"))?;
        context
            .put_image_data(&image, 0.0, 0.0)
            .map_err(|_| JsError::new("the canvas refused the drawing"))
    }
}

impl Simulation {
    /// `GrowingScreen` brought up to the network so far: a grower's new nodes are read from it
    /// directly, without copying the whole network each refill. Whether it could.
    /// The growing refill, recomputing at most `most` nodes (`update_geometry_part`).
    fn growing_refill(&mut self, most: usize) -> bool {
        let rule = width_rule(&self.params);
        match &self.source {
            Source::Growing(growth) => {
                self.growing
                    .update_from_growth_upto(growth, rule, &mut self.geometry, most)
            }
            Source::Fixed(network) => self.growing.update(network, rule, &mut self.geometry),
        }
    }

    fn network(&self) -> Network {
        match &self.source {
            Source::Growing(growth) => growth.network(),
            Source::Fixed(network) => network.clone(),
        }
    }

    /// Whether the run has passes that change a finished network (junction relaxation,
    /// channel energy optimisation); they run once growth has stopped.
    fn reshapes(&self) -> bool {
        self.params.run.relax_junctions > 0 || self.params.run.energy_sweeps > 0
    }

    fn passes_progress(&self) -> String {
        let loops = self.params.widths.reconnect.is_some();
        let view = self
            .view_cache
            .as_ref()
            .filter(|_| self.finished() && !self.passes_waiting());
        self.passes
            .progress_json(view, loops, self.params.is_site())
    }

    /// Whether a finished run is shown through the whole pipeline (reshaping passes, or loops
    /// closed after growth) rather than as grown.
    fn after_growth(&self) -> bool {
        self.reshapes() || self.params.widths.reconnect.is_some()
    }

    /// Whether the page runs the passes after growth itself (`set_stepwise_passes`) and they
    /// have not ended yet: the run is finished and its view not built.
    fn passes_waiting(&self) -> bool {
        self.passes.stepwise
            && self.finished()
            && self.after_growth()
            && matches!(self.source, Source::Growing(_))
            && self.view_cache.is_none()
    }

    /// Whether the pipeline relaxes junctions and lowers channel energy now: with either on,
    /// once growth has stopped (while it grows, the network is shown and measured as grown).
    fn relaxes_now(&self) -> bool {
        self.reshapes() && self.finished()
    }

    /// The derived view of the network as it stands, computed once per change of the network.
    fn view(&mut self) -> Result<&RunView, JsError> {
        if let Some(conducted) = self
            .passes
            .loops
            .take()
            .filter(|_| self.view_cache.is_none())
        {
            // The loop pass in progress (stepwise passes): what is left of it runs now.
            self.view_cache = Some(conducted.finish(&self.params));
        }
        if self.view_cache.is_none() {
            // A network read from a record is measured as it is, never reshaped again.
            let fixed = matches!(self.source, Source::Fixed(_));
            let view = if fixed || (self.reshapes() && !self.relaxes_now()) {
                RunView::new(self.network(), &as_measured(&self.params))
            } else if self.reshapes() {
                // Through the stepwise passes, so a view asked for while they run ends them (the
                // sweeps left run now) rather than starting them again.
                let reshaping = match self.passes.take() {
                    Some(reshaping) => reshaping,
                    None => Reshaping::new(self.network(), &self.params)
                        .map_err(|error| JsError::new(&error.to_string()))?,
                };
                let (view, params) = reshaping
                    .finish()
                    .map_err(|error| JsError::new(&error.to_string()))?;
                self.params = params;
                Ok(view)
            } else {
                RunView::new(self.network(), &self.params)
            }
            .map_err(|error| JsError::new(&error.to_string()))?;
            self.view_cache = Some(view);
        }
        self.view_cache
            .as_ref()
            .ok_or_else(|| JsError::new("derived view missing"))
    }
}

/// The colouring named `order`, `flow` or `plain`, or an error naming the word at fault.
fn colouring_named(name: &str) -> Result<Colouring, JsError> {
    Colouring::from_name(name)
        .ok_or_else(|| JsError::new(&format!("colouring {name:?}: use order, flow or plain")))
}

/// The tissue view named `faint`, `hidden` or `veins`, or an error naming the word at fault.
fn tissue_named(name: &str) -> Result<TissueView, JsError> {
    TissueView::from_name(name)
        .ok_or_else(|| JsError::new(&format!("tissue {name:?}: use faint, hidden or veins")))
}
