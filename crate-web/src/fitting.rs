//! The page's fit: `FitSession`, the coordinator's handle over the core's `Fit` state machine
//! (sensitivity design, then the fit's batches, then the posterior predictive check; outcomes
//! put back in any order, absorbed in job order), `FitWorker`, what each Web Worker holds to
//! run jobs, and free functions for the fit panel (fittable keys with default ranges, matchable
//! metrics, the best run's and the specimen's SVG for download, and `FitPicture`, the same
//! networks drawn to RGBA pixels in a worker with the main canvas's thin-line raster, so the
//! page's thread only puts finished pixels on a canvas). Nothing here samples,
//! measures or draws: the core and `crate-draw` do, exactly as for `ramulus fit`, so the same
//! plan gives the same JSON.

use ramulus_core::fit::plan::{fittable, metric_value};
use ramulus_core::fit::sensitivity::{
    design_jobs, predictive_jobs, predictive_rows, sensitivity, PredictiveRow, NOISE_UNITS,
};
use ramulus_core::fit::simulate::run_job;
use ramulus_core::fit::{
    Fit, FitPlan, FitResult, FittedKey, Job, Method, Outcome, Sensitivity, Target,
};
use ramulus_core::link::{decode_link, encode_link};
use ramulus_core::metrics::{MetricEntry, MetricUnit, Metrics, METRIC_TABLE};
use ramulus_core::network::Network;
use ramulus_core::params::table::{parameter, parameters, Access, FitScale};
use ramulus_core::params::Params;
use ramulus_core::record::read_record;
use ramulus_core::run::{as_measured, RunView};
use ramulus_core::specimen::{build_specimen, SpecimenOptions};
use ramulus_draw::format::{four_digits, grouped};
use ramulus_draw::palette::Colouring;
use ramulus_draw::raster::RasterView;
use ramulus_draw::scale_bar::scale_bar;
use ramulus_draw::screen::ScreenGeometry;
use serde::{Deserialize, Serialize};
use serde_json::json;
use wasm_bindgen::prelude::*;

/// Version of the fit link's JSON (the `fit` query value).
const FIT_LINK_VERSION: u32 = 1;

/// The defaults of `ramulus fit` (crate-cli's options), so an untouched panel asks what the
/// command line asks.
const DEFAULTS: Defaults = Defaults {
    replicates: 2,
    population: 200,
    generations: 3,
    simulations: 2000,
    accept: 100,
    predictive: 20,
    seed: 1,
};

struct Defaults {
    replicates: u32,
    population: u32,
    generations: u32,
    simulations: u32,
    accept: u32,
    predictive: u32,
    seed: u64,
}

/// What the panel offers: `{keys: [{key, label, unit, scale, low_text, high_text, allowed}], metrics:
/// [{key, label, unit}], defaults: {...}}`. A key's default range is the whole allowed range
/// when that spans at most 200 of its units, else the value in `link` plus or minus its own
/// size (at least 1), or a third to three times it on a log scale, clipped to the allowed range
/// (a starting point to edit: common practice, no source).
#[wasm_bindgen]
pub fn fit_choices_json(link: &str) -> String {
    let params = decode_link(link).params;
    let keys: Vec<serde_json::Value> = parameters()
        .iter()
        .filter_map(|spec| {
            let scale = fittable(spec.key).ok()?;
            let (low, high) = default_range(&params, spec.key, scale)?;
            Some(json!({
                "key": spec.key,
                "label": spec.label,
                "unit": spec.unit,
                "scale": scale,
                "low_text": four_digits(low),
                "high_text": four_digits(high),
                "allowed": spec.allowed_text(),
            }))
        })
        .collect();
    let units = params.domain.units.clone();
    let metrics: Vec<serde_json::Value> = METRIC_TABLE
        .iter()
        .filter(|entry| metric_value(&Metrics::default(), entry.key).is_ok())
        .map(|entry| {
            json!({
                "key": entry.key,
                "label": entry.label,
                "unit": unit_text(entry, &units, params.costs.alpha),
            })
        })
        .collect();
    json!({
        "keys": keys,
        "metrics": metrics,
        "defaults": {
            "replicates": DEFAULTS.replicates,
            "population": DEFAULTS.population,
            "generations": DEFAULTS.generations,
            "simulations": DEFAULTS.simulations,
            "accept": DEFAULTS.accept,
            "predictive": DEFAULTS.predictive,
            "seed": DEFAULTS.seed.to_string(),
        },
    })
    .to_string()
}

/// Widest allowed range that the default range takes whole, in the key's units.
const WHOLE_RANGE_UP_TO: f64 = 200.0;

fn default_range(params: &Params, key: &str, scale: FitScale) -> Option<(f64, f64)> {
    let spec = parameter(key)?;
    let bounds = spec.bounds?;
    let mut copy = params.clone();
    let value = match spec.access {
        Access::Real(_, get) => Some(*get(&mut copy)),
        Access::OptionalReal(_, get) => *get(&mut copy),
        _ => None,
    };
    let clip = |low: f64, high: f64| {
        let low = if bounds.contains(low) {
            low
        } else {
            bounds.min
        };
        let high = if bounds.contains(high) {
            high
        } else {
            bounds.max
        };
        (low, high)
    };
    let (low, high) = match (scale, value) {
        (FitScale::Log, Some(value)) if value > 0.0 => clip(value / 3.0, value * 3.0),
        _ if bounds.max - bounds.min <= WHOLE_RANGE_UP_TO && !bounds.min_excluded => {
            (bounds.min, bounds.max)
        }
        (_, Some(value)) => {
            let size = value.abs().max(1.0);
            clip(value - size, value + size)
        }
        (_, None) => clip(bounds.min.max(0.0), bounds.min.max(0.0) + 1.0),
    };
    (low < high && bounds.contains(low) && bounds.contains(high)).then_some((low, high))
}

/// What the panel sends: texts as typed, parsed here as the command line parses its options.
#[derive(Deserialize)]
struct Request {
    link: String,
    fitted: Vec<FittedText>,
    matched: Vec<MatchedText>,
    replicates: String,
    method: String,
    population: String,
    generations: String,
    simulations: String,
    accept: String,
    predictive: String,
    seed: String,
}

#[derive(Deserialize)]
struct FittedText {
    key: String,
    low: String,
    high: String,
}

#[derive(Deserialize)]
struct MatchedText {
    key: String,
    weight: String,
}

/// The fit link's JSON: the plan with its base as a run link, and the predictive count.
#[derive(Serialize, Deserialize)]
struct FitLink {
    version: u32,
    base: String,
    fitted: Vec<FittedKey>,
    targets: Vec<Target>,
    replicates: u32,
    seed: u64,
    method: Method,
    predictive: u32,
}

/// Where a session is: running the sensitivity design, the fit, the predictive check, or done.
#[derive(Clone, Copy, PartialEq)]
enum Phase {
    Design,
    Fitting,
    Predictive,
    Done,
}

/// The coordinator's handle over one fit: hands out batches of jobs, takes outcomes back in
/// any order, absorbs them in job order, and gives the same report as `ramulus fit --json`.
#[wasm_bindgen]
pub struct FitSession {
    plan: FitPlan,
    fit: Fit,
    predictive: u32,
    phase: Phase,
    batch: Vec<Job>,
    outcomes: Vec<Option<Outcome>>,
    absorbed: u64,
    checks: Option<Sensitivity>,
    result: Option<FitResult>,
    predictive_rows: Vec<PredictiveRow>,
}

fn text_number<T: std::str::FromStr>(name: &str, text: &str) -> Result<T, JsError> {
    text.trim()
        .parse::<T>()
        .map_err(|_| JsError::new(&format!("{name}: `{text}` is not a number")))
}

fn fit_error(error: impl std::fmt::Display) -> JsError {
    JsError::new(&error.to_string())
}

#[wasm_bindgen]
impl FitSession {
    /// A fit of the request (JSON, see `Request`) against a specimen's metrics (JSON of the
    /// core's `Metrics`, from `fit_specimen_metrics` or the page's run). Every check runs here,
    /// before any work: an error names the key, bound, metric or count at fault in the core's
    /// words, or the metric the specimen lacks.
    #[wasm_bindgen(constructor)]
    pub fn new(request: &str, specimen_metrics: &str, name: &str) -> Result<FitSession, JsError> {
        console_error_panic_hook::set_once();
        let metrics: Metrics = serde_json::from_str(specimen_metrics)
            .map_err(|error| JsError::new(&format!("{name}: metrics unreadable: {error}")))?;
        let (plan, predictive) = plan_from_request(request, Some((&metrics, name)))?;
        FitSession::start(plan, predictive)
    }

    /// The fit a fit link describes (see `fit_link`); it has the specimen's metric values but
    /// not its network.
    pub fn from_fit_link(text: &str) -> Result<FitSession, JsError> {
        console_error_panic_hook::set_once();
        let link: FitLink = serde_json::from_str(text)
            .map_err(|error| JsError::new(&format!("not a fit link: {error}")))?;
        if link.version != FIT_LINK_VERSION {
            return Err(JsError::new(&format!(
                "fit link version {} is not one this page reads (it reads {FIT_LINK_VERSION})",
                link.version
            )));
        }
        let plan = FitPlan {
            base: decode_link(&link.base).params,
            fitted: link.fitted,
            targets: link.targets,
            replicates: link.replicates,
            seed: link.seed,
            method: link.method,
        };
        FitSession::start(plan, link.predictive)
    }

    /// The fit link's JSON: the whole plan (base parameters as a run link, fitted bounds,
    /// the specimen's target values, replicates, seed, method) and the predictive count.
    /// Opening it runs the same fit again, which gives the same result bit for bit.
    pub fn fit_link(&self) -> String {
        let link = FitLink {
            version: FIT_LINK_VERSION,
            base: encode_link(&self.plan.base),
            fitted: self.plan.fitted.clone(),
            targets: self.plan.targets.clone(),
            replicates: self.plan.replicates,
            seed: self.plan.seed,
            method: self.plan.method,
            predictive: self.predictive,
        };
        serde_json::to_string(&link).unwrap_or_default()
    }

    /// The plan as JSON, for the workers (`FitWorker::new`).
    pub fn plan_json(&self) -> String {
        serde_json::to_string(&self.plan).unwrap_or_default()
    }

    /// The request texts that fill the panel with this plan (`{fitted, matched, replicates,
    /// method, ...}`), for a fit link opened.
    pub fn request_json(&self) -> String {
        let (method, first, second) = match self.plan.method {
            Method::Quick {
                simulations,
                accepted,
            } => ("quick", simulations, accepted),
            Method::Sequential {
                population,
                generations,
            } => ("sequential", population, generations),
        };
        json!({
            "link": encode_link(&self.plan.base),
            "fitted": self.plan.fitted.iter().map(|key| json!({
                "key": key.key, "low": key.low.to_string(), "high": key.high.to_string(),
            })).collect::<Vec<_>>(),
            "matched": self.plan.targets.iter().map(|target| json!({
                "key": target.key,
                "weight": target.weight.map(|weight| weight.to_string()).unwrap_or_default(),
                "observed": target.observed,
            })).collect::<Vec<_>>(),
            "replicates": self.plan.replicates.to_string(),
            "method": method,
            "population": if method == "sequential" { first.to_string() } else { DEFAULTS.population.to_string() },
            "generations": if method == "sequential" { second.to_string() } else { DEFAULTS.generations.to_string() },
            "simulations": if method == "quick" { first.to_string() } else { DEFAULTS.simulations.to_string() },
            "accept": if method == "quick" { second.to_string() } else { DEFAULTS.accept.to_string() },
            "predictive": self.predictive.to_string(),
            "seed": self.plan.seed.to_string(),
        })
        .to_string()
    }

    /// `design`, `fit`, `predictive` or `done`.
    pub fn phase(&self) -> String {
        match self.phase {
            Phase::Design => "design",
            Phase::Fitting => "fit",
            Phase::Predictive => "predictive",
            Phase::Done => "done",
        }
        .to_string()
    }

    /// Jobs in the current batch (0 once done).
    pub fn batch_size(&self) -> u32 {
        self.batch.len() as u32
    }

    /// Jobs `start..end` of the current batch as JSON, for a worker.
    pub fn jobs_json(&self, start: u32, end: u32) -> String {
        let end = (end as usize).min(self.batch.len());
        let start = (start as usize).min(end);
        serde_json::to_string(&self.batch[start..end]).unwrap_or_default()
    }

    /// Outcomes of jobs `start..` (JSON from `FitWorker::run`), in any order of calls.
    pub fn put_outcomes(&mut self, start: u32, outcomes: &str) -> Result<(), JsError> {
        let outcomes: Vec<Outcome> = serde_json::from_str(outcomes).map_err(fit_error)?;
        for (offset, outcome) in outcomes.into_iter().enumerate() {
            let slot = self
                .outcomes
                .get_mut(start as usize + offset)
                .ok_or_else(|| JsError::new("an outcome beyond the batch"))?;
            *slot = Some(outcome);
        }
        Ok(())
    }

    /// Absorbs the batch, every outcome in job order, and moves to the next batch or phase.
    pub fn absorb(&mut self) -> Result<(), JsError> {
        let outcomes: Vec<Outcome> = std::mem::take(&mut self.outcomes)
            .into_iter()
            .enumerate()
            .map(|(index, outcome)| {
                outcome.ok_or_else(|| JsError::new(&format!("job {index} has no outcome")))
            })
            .collect::<Result<_, _>>()?;
        self.absorbed += outcomes.len() as u64;
        match self.phase {
            Phase::Design => {
                self.checks = Some(sensitivity(&self.plan, &outcomes));
                self.phase = Phase::Fitting;
                self.batch = self.fit.next_batch().unwrap_or_default();
            }
            Phase::Fitting => {
                self.fit.absorb(outcomes).map_err(fit_error)?;
                self.batch = self.fit.next_batch().unwrap_or_default();
            }
            Phase::Predictive => {
                self.predictive_rows = predictive_rows(&self.plan, &outcomes);
                self.phase = Phase::Done;
                self.batch = Vec::new();
            }
            Phase::Done => {}
        }
        if self.phase == Phase::Fitting && self.batch.is_empty() {
            let result = self.fit.result().map_err(fit_error)?;
            self.batch = predictive_jobs(&self.plan, &result, self.predictive);
            self.result = Some(result);
            self.phase = Phase::Predictive;
        }
        self.outcomes = vec![None; self.batch.len()];
        Ok(())
    }

    /// Jobs absorbed so far and the number expected in all (the sequential method's count is
    /// an estimate until its last generation), as `[done, total]`.
    pub fn progress(&self) -> Vec<f64> {
        let design = design_jobs(&self.plan).len() as u64;
        let (fit_done, fit_total) = self.fit.progress();
        let total = design + fit_total.max(fit_done) + u64::from(self.predictive);
        vec![self.absorbed as f64, total.max(self.absorbed) as f64]
    }

    /// The sensitivity table (`{rows, unidentifiable}`), once the design has run; else `null`.
    pub fn sensitivity_json(&self) -> String {
        serde_json::to_string(&self.checks).unwrap_or_default()
    }

    /// The sensitivity table for the page, numbers as text: `{rows: [{key, metric, effect,
    /// noise, ratio, seen}], warnings: [text]}`, or `null` before the design has run.
    pub fn sensitivity_table_json(&self) -> String {
        let Some(checks) = &self.checks else {
            return "null".into();
        };
        let rows: Vec<serde_json::Value> = checks
            .rows
            .iter()
            .map(|row| {
                json!({
                    "key": row.key, "metric": row.metric,
                    "effect": four_digits(row.effect), "noise": four_digits(row.noise),
                    "ratio": if row.ratio.is_finite() { four_digits(row.ratio) } else { "no noise".into() },
                    "seen": row.ratio >= NOISE_UNITS,
                })
            })
            .collect();
        let warnings: Vec<String> = checks
            .unidentifiable
            .iter()
            .map(|key| {
                format!(
                    "No chosen metric moves `{key}` by {NOISE_UNITS} times its seed noise \
                     across the fitted range: its interval will mostly echo the bounds given. \
                     Match a metric that moves it, or fix it instead of fitting it."
                )
            })
            .collect();
        json!({"rows": rows, "warnings": warnings}).to_string()
    }

    /// Exactly what `ramulus fit --json --page PAGE` prints for this plan, once done.
    pub fn report_json(&self, page: &str) -> Result<String, JsError> {
        let (result, checks) = self.finished()?;
        let posterior: serde_json::Map<String, serde_json::Value> = result
            .posterior
            .iter()
            .map(|interval| {
                (
                    interval.key.clone(),
                    json!({"median": interval.median, "low": interval.low, "high": interval.high}),
                )
            })
            .collect();
        Ok(json!({
            "posterior": posterior,
            "best_link": self.best_link(page),
            "best_distance": result.best.distance,
            "accepted": result.accepted,
            "simulations": result.simulations,
            "replicates": self.plan.replicates,
            "generations": result.generations,
            "sensitivity": checks,
            "predictive": self.predictive_rows,
            "notes": result.notes,
        })
        .to_string())
    }

    /// The page's tables, numbers as text: `{posterior: [{key, label, unit, median, low, high,
    /// range, scale}], predictive: [{metric, label, unit, specimen, median, low, high,
    /// inside}], summary}`.
    pub fn tables_json(&self) -> Result<String, JsError> {
        let (result, _) = self.finished()?;
        let units = &self.plan.base.domain.units;
        let posterior: Vec<serde_json::Value> = result
            .posterior
            .iter()
            .zip(&self.plan.fitted)
            .map(|(interval, key)| {
                json!({
                    "key": interval.key,
                    "label": parameter(&interval.key).map(|spec| spec.label).unwrap_or_default(),
                    "unit": parameter(&interval.key).map(|spec| spec.unit).unwrap_or_default(),
                    "median": four_digits(interval.median), "low": four_digits(interval.low),
                    "high": four_digits(interval.high),
                    "range": format!("{} to {}", four_digits(key.low), four_digits(key.high)),
                    "scale": key.scale,
                })
            })
            .collect();
        let predictive: Vec<serde_json::Value> = self
            .predictive_rows
            .iter()
            .map(|row| {
                let entry = METRIC_TABLE.iter().find(|entry| entry.key == row.metric);
                json!({
                    "metric": row.metric,
                    "label": entry.map(|entry| entry.label).unwrap_or_default(),
                    "unit": entry.map(|entry| unit_text(entry, units, self.plan.base.costs.alpha)).unwrap_or_default(),
                    "specimen": four_digits(row.specimen), "median": four_digits(row.median),
                    "low": four_digits(row.low), "high": four_digits(row.high),
                    "inside": row.inside,
                })
            })
            .collect();
        let summary = format!(
            "{} parameter sets simulated ({} seeds each), {} accepted; best distance {}.",
            grouped(result.simulations),
            self.plan.replicates,
            grouped(result.accepted),
            four_digits(result.best.distance)
        );
        Ok(json!({
            "posterior": posterior,
            "predictive": predictive,
            "summary": summary,
            "notes": result.notes,
        })
        .to_string())
    }

    /// The weighted posterior sample as CSV: one row per particle, the fitted keys' values,
    /// then weight, distance and the seed of its first replicate.
    pub fn posterior_csv(&self) -> Result<String, JsError> {
        let (result, _) = self.finished()?;
        let mut text = String::new();
        for key in &self.plan.fitted {
            text.push_str(&key.key);
            text.push(',');
        }
        text.push_str("weight,distance,seed\n");
        for particle in &result.particles {
            for value in &particle.values {
                text.push_str(&value.to_string());
                text.push(',');
            }
            text.push_str(&format!(
                "{},{},{}\n",
                particle.weight, particle.distance, particle.seed
            ));
        }
        Ok(text)
    }

    /// The pairwise posterior plots and the convergence panel (`ramulus fit --plots`).
    pub fn posterior_svg(&self) -> Result<String, JsError> {
        let (result, _) = self.finished()?;
        Ok(ramulus_draw::posterior_svg::posterior_svg(
            &self.plan, result,
        ))
    }

    /// The best run's link fragment (without `#`).
    pub fn best_fragment(&self) -> String {
        self.result
            .as_ref()
            .map(|result| encode_link(&self.plan.params_for(&result.best.values, result.best.seed)))
            .unwrap_or_default()
    }
}

/// Checks a request (JSON, see `Request`) as far as it can be without the specimen: keys,
/// bounds, metric names, weights, counts, seed. Throws the core's message; nothing runs.
#[wasm_bindgen]
pub fn fit_check_request(request: &str) -> Result<(), JsError> {
    console_error_panic_hook::set_once();
    plan_from_request(request, None).map(|_| ())
}

/// The plan a request asks for, checked: with the specimen's metrics, the targets take their
/// values; without, each target stands at 1 so everything else can be checked.
fn plan_from_request(
    request: &str,
    specimen: Option<(&Metrics, &str)>,
) -> Result<(FitPlan, u32), JsError> {
    let request: Request = serde_json::from_str(request).map_err(fit_error)?;
    let base = decode_link(&request.link).params;
    let mut fitted = Vec::new();
    for text in &request.fitted {
        let key = text.key.trim();
        let scale = fittable(key).map_err(fit_error)?;
        fitted.push(FittedKey {
            key: key.to_string(),
            low: text_number(&format!("lower bound of `{key}`"), &text.low)?,
            high: text_number(&format!("upper bound of `{key}`"), &text.high)?,
            scale,
        });
    }
    let mut targets = Vec::new();
    for text in &request.matched {
        let key = text.key.trim();
        let weight = match text.weight.trim() {
            "" => None,
            weight => Some(text_number(&format!("weight of `{key}`"), weight)?),
        };
        let observed =
            match specimen {
                Some((metrics, name)) => metric_value(metrics, key)
                    .map_err(fit_error)?
                    .ok_or_else(|| {
                        JsError::new(&format!(
                            "{name}: the specimen has no value for metric `{key}`"
                        ))
                    })?,
                None => {
                    metric_value(&Metrics::default(), key).map_err(fit_error)?;
                    1.0
                }
            };
        targets.push(Target {
            key: key.to_string(),
            weight,
            observed,
        });
    }
    let method = match request.method.as_str() {
        "quick" => Method::Quick {
            simulations: text_number("simulations", &request.simulations)?,
            accepted: text_number("accepted", &request.accept)?,
        },
        "sequential" => Method::Sequential {
            population: text_number("population", &request.population)?,
            generations: text_number("generations", &request.generations)?,
        },
        other => return Err(JsError::new(&format!("`{other}` is not a method"))),
    };
    let plan = FitPlan {
        base,
        fitted,
        targets,
        replicates: text_number("replicates", &request.replicates)?,
        seed: text_number("seed", &request.seed)?,
        method,
    };
    plan.check().map_err(fit_error)?;
    let predictive = text_number("predictive runs", &request.predictive)?;
    Ok((plan, predictive))
}

impl FitSession {
    fn start(plan: FitPlan, predictive: u32) -> Result<FitSession, JsError> {
        let fit = Fit::new(plan.clone()).map_err(fit_error)?;
        let batch = design_jobs(&plan);
        Ok(FitSession {
            outcomes: vec![None; batch.len()],
            plan,
            fit,
            predictive,
            phase: Phase::Design,
            batch,
            absorbed: 0,
            checks: None,
            result: None,
            predictive_rows: Vec::new(),
        })
    }

    fn finished(&self) -> Result<(&FitResult, &Sensitivity), JsError> {
        match (&self.result, &self.checks, self.phase) {
            (Some(result), Some(checks), Phase::Done) => Ok((result, checks)),
            _ => Err(JsError::new("the fit has not finished")),
        }
    }

    fn best_link(&self, page: &str) -> String {
        format!("{page}#{}", self.best_fragment())
    }
}

/// What one Web Worker holds: the plan, to run jobs against.
#[wasm_bindgen]
pub struct FitWorker {
    plan: FitPlan,
}

#[wasm_bindgen]
impl FitWorker {
    /// A worker for the plan (`FitSession::plan_json`).
    #[wasm_bindgen(constructor)]
    pub fn new(plan: &str) -> Result<FitWorker, JsError> {
        console_error_panic_hook::set_once();
        let plan: FitPlan = serde_json::from_str(plan).map_err(fit_error)?;
        Ok(FitWorker { plan })
    }

    /// Grows and measures every replicate of each job (JSON from `FitSession::jobs_json`);
    /// the outcomes as JSON, in the jobs' order.
    pub fn run(&self, jobs: &str) -> Result<String, JsError> {
        let jobs: Vec<Job> = serde_json::from_str(jobs).map_err(fit_error)?;
        let outcomes: Vec<Outcome> = jobs.iter().map(|job| run_job(&self.plan, job)).collect();
        serde_json::to_string(&outcomes).map_err(fit_error)
    }
}

/// The progress line: `Fit: 120 of about 2,000 parameter sets, 1 min 5 s left (2 workers)`.
#[wasm_bindgen]
pub fn fit_progress_text(
    phase: &str,
    done: f64,
    total: f64,
    seconds_left: f64,
    workers: u32,
) -> String {
    let stage = match phase {
        "design" => "Sensitivity check",
        "fit" => "Fit",
        "predictive" => "Predictive check",
        _ => "Done",
    };
    let left = if seconds_left.is_finite() && seconds_left >= 0.0 && done > 0.0 {
        let seconds = (seconds_left + 0.5) as u64;
        if seconds >= 60 {
            format!(", {} min {} s left", seconds / 60, seconds % 60)
        } else {
            format!(", {seconds} s left")
        }
    } else {
        String::new()
    };
    format!(
        "{stage}: {} of about {} parameter sets{left} ({workers} worker{})",
        grouped(done.max(0.0) as u64),
        grouped(total.max(0.0) as u64),
        if workers == 1 { "" } else { "s" }
    )
}

/// The SVG of the run a link grows, grown to its end (the best run, drawn in a worker).
#[wasm_bindgen]
pub fn fit_run_svg(link: &str, colouring: &str) -> Result<String, JsError> {
    console_error_panic_hook::set_once();
    let params = decode_link(link).params;
    let mut growth = ramulus_core::growth::Growth::new(&params).map_err(fit_error)?;
    growth.run();
    let view = RunView::new(growth.into_network(), &params).map_err(fit_error)?;
    Ok(ramulus_draw::run_svg(
        &view,
        &params,
        colouring_named(colouring)?,
    ))
}

/// A metric's unit for a table cell: empty for counts and ratios.
fn unit_text(entry: &MetricEntry, units: &str, alpha: f64) -> String {
    let text = entry.unit.text(units, alpha);
    if matches!(entry.unit, MetricUnit::Count | MetricUnit::Dimensionless) {
        String::new()
    } else {
        text
    }
}

/// A specimen file's metrics as JSON (for `FitSession::new`): a run record measured as
/// `ramulus fit` measures it (its own `alpha`), or a traced specimen through the core's
/// importer with default calibration in the length unit of `link`. Run in a worker.
#[wasm_bindgen]
pub fn fit_specimen_metrics(specimen: &[u8], name: &str, link: &str) -> Result<String, JsError> {
    console_error_panic_hook::set_once();
    let base = decode_link(link).params;
    let (metrics, _) = measure_specimen(specimen, name, &base)?;
    serde_json::to_string(&metrics).map_err(fit_error)
}

/// The specimen drawn as a run is, read as `fit_specimen_metrics` reads it (in a worker).
#[wasm_bindgen]
pub fn fit_specimen_svg(
    specimen: &[u8],
    name: &str,
    link: &str,
    colouring: &str,
) -> Result<String, JsError> {
    console_error_panic_hook::set_once();
    let base = decode_link(link).params;
    let (_, (network, params)) = measure_specimen(specimen, name, &base)?;
    let view = RunView::new(network, &params).map_err(fit_error)?;
    Ok(ramulus_draw::run_svg(
        &view,
        &params,
        colouring_named(colouring)?,
    ))
}

/// A network grown from a link or read from a specimen file, kept in a worker to be drawn to
/// pixels: `extent` first (so the panel can give both pictures one scale), then `pixels`.
#[wasm_bindgen]
pub struct FitPicture {
    geometry: ScreenGeometry,
    extent: [f64; 4],
    units: String,
}

#[wasm_bindgen]
impl FitPicture {
    /// The run a link grows, grown to its end.
    pub fn from_link(link: &str) -> Result<FitPicture, JsError> {
        console_error_panic_hook::set_once();
        let params = decode_link(link).params;
        let mut growth = ramulus_core::growth::Growth::new(&params).map_err(fit_error)?;
        growth.run();
        let view = RunView::new(growth.into_network(), &params).map_err(fit_error)?;
        Ok(FitPicture::of_view(&view))
    }

    /// A specimen file read as `fit_specimen_metrics` reads it.
    pub fn from_specimen(specimen: &[u8], name: &str, link: &str) -> Result<FitPicture, JsError> {
        console_error_panic_hook::set_once();
        let base = decode_link(link).params;
        let (_, (network, params)) = measure_specimen(specimen, name, &base)?;
        let view = RunView::new(network, &params).map_err(fit_error)?;
        Ok(FitPicture::of_view(&view))
    }

    /// The bounding box of the network's segment ends, `[min_x, min_y, max_x, max_y]` in its
    /// length unit (all zero for a network without segments).
    pub fn extent(&self) -> Vec<f64> {
        self.extent.to_vec()
    }

    /// The network's length unit.
    pub fn units(&self) -> String {
        self.units.clone()
    }

    /// Every segment drawn as a thin anti-aliased line (the main canvas's raster, at least
    /// half a pixel wide in strength) into `width` x `height` RGBA pixels over a white
    /// background, with `pixel = coordinate * scale + offset` (`scale` in pixels per unit).
    pub fn pixels(
        &mut self,
        width: u32,
        height: u32,
        scale: f64,
        offset_x: f64,
        offset_y: f64,
        colouring: &str,
    ) -> Result<Vec<u8>, JsError> {
        let colouring = colouring_named(colouring)?;
        if !(scale.is_finite() && scale > 0.0) || width == 0 || height == 0 {
            return Err(JsError::new(&format!(
                "a picture of {width} x {height} px at {scale} px per unit cannot be drawn"
            )));
        }
        let view = RasterView {
            width,
            height,
            scale,
            offset_x,
            offset_y,
        };
        Ok(self
            .geometry
            .raster(
                view,
                colouring,
                ramulus_draw::TissueView::Faint,
                PICTURE_MIN_PX,
                f64::INFINITY,
                [255, 255, 255],
            )
            .to_vec())
    }
}

/// Thinnest line strength of a picture, in pixels: thinner veins stay visible at half
/// strength (common practice, no source).
const PICTURE_MIN_PX: f64 = 0.5;

impl FitPicture {
    fn of_view(view: &RunView) -> FitPicture {
        let mut geometry = ScreenGeometry::default();
        geometry.fill(&view.network, &view.table);
        let mut extent = [
            f64::INFINITY,
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::NEG_INFINITY,
        ];
        let nodes = &view.network.nodes;
        for segment in &view.network.segments {
            for end in [segment.from, segment.to] {
                if let Some(node) = nodes.get(end as usize) {
                    extent[0] = extent[0].min(node.x);
                    extent[1] = extent[1].min(node.y);
                    extent[2] = extent[2].max(node.x);
                    extent[3] = extent[3].max(node.y);
                }
            }
        }
        if !extent.iter().all(|value| value.is_finite()) {
            extent = [0.0; 4];
        }
        FitPicture {
            geometry,
            extent,
            units: view.network.units.clone(),
        }
    }
}

/// The scale bar shared by both pictures: `{length, pixels, label}`, a round length about
/// `target_pixels` long at `pixels_per_unit`.
#[wasm_bindgen]
pub fn fit_scale_bar_json(pixels_per_unit: f64, target_pixels: f64, units: &str) -> String {
    serde_json::to_string(&scale_bar(pixels_per_unit, target_pixels, units)).unwrap_or_default()
}

fn colouring_named(name: &str) -> Result<Colouring, JsError> {
    Colouring::from_name(name).ok_or_else(|| JsError::new(&format!("no colouring `{name}`")))
}

/// The specimen's metrics and its network with the parameters to draw it by: a run record
/// measured as `ramulus fit` measures it (its own `alpha`), or a traced specimen through the
/// core's importer, calibrated in the base parameters' unit.
fn measure_specimen(
    bytes: &[u8],
    name: &str,
    base: &Params,
) -> Result<(Metrics, (Network, Params)), JsError> {
    let units = &base.domain.units;
    let failed = |error: &dyn std::fmt::Display| JsError::new(&format!("{name}: {error}"));
    if is_record(bytes) {
        let text = std::str::from_utf8(bytes)
            .map_err(|error| failed(&format!("not UTF-8 text ({error})")))?;
        let (record, network) = read_record(text).map_err(|error| failed(&error))?;
        if &network.units != units {
            return Err(failed(&format!(
                "the specimen is measured in {} but the growth parameters in {units}; set the \
                 length unit to {} (and a cell size in that unit)",
                network.units, network.units
            )));
        }
        let alpha = record.params.as_ref().map_or(0.5, |p| p.costs.alpha);
        let metrics =
            ramulus_core::metrics::measure(&network, alpha).map_err(|error| failed(&error))?;
        let params = as_measured(&record.params.unwrap_or_else(|| base.clone()));
        return Ok((metrics, (network, params)));
    }
    let options = SpecimenOptions {
        units: Some(units.clone()),
        ..SpecimenOptions::default()
    };
    let specimen = build_specimen(bytes, &options).map_err(|error| failed(&error))?;
    let base = as_measured(base);
    let view = RunView::new(specimen.network.clone(), &base).map_err(|error| failed(&error))?;
    Ok((view.metrics, (specimen.network, base)))
}

/// A run record (JSON object naming `ramulus-run`, or no GeoJSON `type`), as `ramulus fit`
/// tells them from traced files.
fn is_record(bytes: &[u8]) -> bool {
    let start = bytes.iter().position(|b| !b.is_ascii_whitespace());
    let has = |needle: &[u8]| bytes.windows(needle.len()).any(|window| window == needle);
    start.is_some_and(|index| bytes[index] == b'{')
        && (has(b"\"ramulus-run\"") || !has(b"\"type\""))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every fittable key gets a default range its own plan check accepts.
    #[test]
    fn default_ranges_pass_the_plans_bound_check() {
        let link = encode_link(&ramulus_core::presets::presets()[0].params);
        let choices: serde_json::Value = serde_json::from_str(&fit_choices_json(&link)).unwrap();
        let keys = choices["keys"].as_array().unwrap();
        assert!(keys.len() >= 10, "{choices}");
        for key in keys {
            let name = key["key"].as_str().unwrap();
            let mut plan = FitPlan {
                base: decode_link(&link).params,
                fitted: vec![FittedKey {
                    key: name.into(),
                    low: key["low_text"].as_str().unwrap().parse().unwrap(),
                    high: key["high_text"].as_str().unwrap().parse().unwrap(),
                    scale: fittable(name).unwrap(),
                }],
                targets: vec![Target {
                    key: "area".into(),
                    weight: None,
                    observed: 1.0,
                }],
                replicates: 1,
                seed: 1,
                method: Method::Quick {
                    simulations: 10,
                    accepted: 5,
                },
            };
            assert_eq!(plan.check(), Ok(()), "{name}");
            plan.fitted[0].low = plan.fitted[0].high;
            assert!(plan.check().is_err(), "{name}: equal bounds refused");
        }
    }

    /// A picture's drawn pixels lie within its extent mapped to pixels, give or take the one
    /// pixel an anti-aliased line reaches beside its end (Wu 1991, SIGGRAPH '91), and reach
    /// every side of it; the rest stays background.
    #[test]
    fn a_picture_draws_inside_its_extent_and_reaches_every_side() {
        let mut params = ramulus_core::presets::presets()[0].params.clone();
        params.run.cells = 400;
        let mut picture = FitPicture::from_link(&encode_link(&params)).unwrap();
        let [min_x, min_y, max_x, max_y] = picture.extent;
        assert!(max_x > min_x && max_y > min_y, "{:?}", picture.extent);
        let (width, height, scale) = (200u32, 150u32, 3.0);
        let (offset_x, offset_y) = (
            100.0 - scale * (min_x + max_x) / 2.0,
            75.0 - scale * (min_y + max_y) / 2.0,
        );
        let pixels = picture
            .pixels(width, height, scale, offset_x, offset_y, "order")
            .unwrap();
        assert_eq!(pixels.len(), (width * height * 4) as usize);
        let mut box_ = [
            f64::INFINITY,
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::NEG_INFINITY,
        ];
        for (index, pixel) in pixels.chunks(4).enumerate() {
            if pixel[..3] != [255, 255, 255] {
                let (x, y) = ((index as u32 % width) as f64, (index as u32 / width) as f64);
                box_ = [
                    box_[0].min(x),
                    box_[1].min(y),
                    box_[2].max(x),
                    box_[3].max(y),
                ];
            }
        }
        let expected = [
            min_x * scale + offset_x,
            min_y * scale + offset_y,
            max_x * scale + offset_x,
            max_y * scale + offset_y,
        ];
        for side in 0..4 {
            assert!(
                (box_[side] - expected[side]).abs() <= 2.0,
                "side {side}: drawn {box_:?}, extent {expected:?}"
            );
        }
    }
}
