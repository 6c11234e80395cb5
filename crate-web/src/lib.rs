//! Browser layer over `ramulus-core`: one opaque `Simulation` handle that the page creates from
//! parameter JSON, steps, and reads (digest, metrics, SVG, run record). Errors come back as
//! readable strings; nothing here computes.

use ramulus_core::growth::Growth;
use ramulus_core::params::Params;
use ramulus_core::presets::presets;
use ramulus_core::record::{make_record, write_record};
use ramulus_core::run::RunView;
use ramulus_core::svg::Colouring;
use wasm_bindgen::prelude::*;

/// A growing network held in wasm memory.
#[wasm_bindgen]
pub struct Simulation {
    growth: Growth,
}

#[wasm_bindgen]
impl Simulation {
    /// Creates a run from parameter JSON; an invalid parameter gives an error naming it.
    #[wasm_bindgen(constructor)]
    pub fn new(params_json: &str) -> Result<Simulation, JsError> {
        console_error_panic_hook::set_once();
        let params =
            Params::from_json(params_json).map_err(|error| JsError::new(&error.to_string()))?;
        let growth = Growth::new(&params).map_err(|error| JsError::new(&error.to_string()))?;
        Ok(Simulation { growth })
    }

    /// Adds up to `count` cells; returns how many were added.
    pub fn step(&mut self, count: u32) -> u32 {
        self.growth.step(count as u64).added as u32
    }

    /// Whether growth has stopped.
    pub fn finished(&self) -> bool {
        self.growth.stopped().is_some()
    }

    /// Cells grown so far.
    pub fn cells(&self) -> u32 {
        self.growth.cell_count() as u32
    }

    /// Digest of the network so far (16 hex digits).
    pub fn digest(&self) -> String {
        ramulus_core::digest::digest_hex(&self.growth.network())
    }

    /// Metrics of the network so far, as JSON.
    pub fn metrics_json(&self) -> Result<String, JsError> {
        let view = self.view()?;
        serde_json::to_string(&view.metrics).map_err(|error| JsError::new(&error.to_string()))
    }

    /// The network as SVG, coloured by `order`, `flow` or `plain`.
    pub fn svg(&self, colouring: &str) -> Result<String, JsError> {
        let view = self.view()?;
        let params = self.growth.params();
        let colour = match colouring {
            "flow" => Colouring::ByFlow,
            "plain" => Colouring::Plain,
            _ => Colouring::ByOrder,
        };
        Ok(view.svg(params, colour))
    }

    /// The JSON run record.
    pub fn record_json(&self) -> Result<String, JsError> {
        let view = self.view()?;
        let stopped = self
            .growth
            .stopped()
            .map(|reason| reason.name().to_string());
        Ok(write_record(&make_record(
            &view,
            self.growth.params(),
            stopped,
        )))
    }
}

impl Simulation {
    fn view(&self) -> Result<RunView, JsError> {
        RunView::new(self.growth.network(), self.growth.params())
            .map_err(|error| JsError::new(&error.to_string()))
    }
}

/// Every preset as a JSON array of `{name, description, params}`.
#[wasm_bindgen]
pub fn presets_json() -> String {
    serde_json::to_string(&presets()).unwrap_or_else(|_| "[]".to_string())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn presets_json_lists_every_core_preset_with_parameters_that_parse_back() {
        let list: Vec<serde_json::Value> = serde_json::from_str(&presets_json()).unwrap();
        let core = presets();
        assert_eq!(list.len(), core.len());
        for (entry, preset) in list.iter().zip(&core) {
            assert_eq!(entry["name"], preset.name);
            let params = Params::from_json_value(entry["params"].clone()).unwrap();
            assert_eq!(params, preset.params);
        }
    }
}
