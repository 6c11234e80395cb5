//! What a fit is asked to do (`FitPlan`): the base parameters, the keys to fit with their
//! bounds and scale, the metrics to match with the specimen's values, replicates, seed and
//! method; and every way a plan can be wrong (`FitError`), checked before any work starts.

use serde::{Deserialize, Serialize};

use crate::metrics::Metrics;
use crate::metrics::{Reading, METRIC_TABLE};
use crate::params::table::{parameter, Access, FitScale};
use crate::params::Params;

/// One fitted key: its bounds (in the parameter's own unit) and how the prior spreads over
/// them (evenly in the value, or in its logarithm).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct FittedKey {
    /// The parameter key, as in the parameter table.
    pub key: String,
    /// Lower bound of the prior.
    pub low: f64,
    /// Upper bound of the prior.
    pub high: f64,
    /// Linear or log scale (from the parameter table unless the user chose).
    pub scale: FitScale,
}

impl FittedKey {
    /// The sampler's coordinate of a value: the value itself, or its natural logarithm.
    pub fn to_coordinate(&self, value: f64) -> f64 {
        match self.scale {
            FitScale::Linear => value,
            FitScale::Log => libm::log(value),
        }
    }

    /// The value of a sampler coordinate.
    pub fn to_value(&self, coordinate: f64) -> f64 {
        match self.scale {
            FitScale::Linear => coordinate,
            FitScale::Log => libm::exp(coordinate).clamp(self.low, self.high),
        }
    }

    /// The prior's bounds in sampler coordinates.
    pub fn coordinate_bounds(&self) -> (f64, f64) {
        (self.to_coordinate(self.low), self.to_coordinate(self.high))
    }
}

/// One metric to match: its key in the metric table, its weight (`None`: standardised by its
/// simulated spread alone) and the specimen's value.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Target {
    /// The metric key.
    pub key: String,
    /// Relative weight in the distance (1 when not given).
    pub weight: Option<f64>,
    /// The specimen's value.
    pub observed: f64,
}

/// How the posterior is sampled.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Method {
    /// Rejection with regression adjustment: `simulations` parameter sets from the prior, the
    /// `accepted` closest kept and adjusted.
    Quick {
        /// Parameter sets drawn from the prior.
        simulations: u32,
        /// Parameter sets kept.
        accepted: u32,
    },
    /// ABC-SMC: `population` particles per generation, `generations` generations.
    Sequential {
        /// Particles per generation.
        population: u32,
        /// Generations after the first (prior) one.
        generations: u32,
    },
}

/// Everything a fit needs. Serialisable, so shards and their merge share it exactly.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct FitPlan {
    /// Parameters of every simulation apart from the fitted keys and the seed.
    pub base: Params,
    /// The fitted keys.
    pub fitted: Vec<FittedKey>,
    /// The metrics to match.
    pub targets: Vec<Target>,
    /// Growth seeds per parameter set; their metrics are averaged.
    pub replicates: u32,
    /// Seed of the sampler's own random draws (and of every growth seed).
    pub seed: u64,
    /// The sampling method.
    pub method: Method,
}

/// A plan that cannot run, named precisely.
#[derive(Clone, Debug, PartialEq)]
pub enum FitError {
    /// No such parameter.
    UnknownKey(String),
    /// The parameter exists but is not a number that can be fitted (a name, a mask, a count).
    NotFittable(String),
    /// The same key fitted twice.
    RepeatedKey(String),
    /// Bounds reversed, equal, not finite, or outside the parameter's allowed range.
    Bounds {
        /// The key.
        key: String,
        /// What was asked.
        asked: String,
        /// What is allowed.
        allowed: String,
    },
    /// No such metric.
    UnknownMetric(String),
    /// The metric is not one number (a histogram, the stream table).
    NotScalarMetric(String),
    /// The specimen does not define this metric.
    SpecimenLacks(String),
    /// A weight that is not a positive finite number.
    Weight(String),
    /// Nothing to fit or nothing to match.
    Empty(&'static str),
    /// A count (replicates, simulations, population) out of range.
    Count {
        /// Which count.
        name: &'static str,
        /// The value asked.
        value: u64,
        /// What is allowed.
        allowed: &'static str,
    },
    /// The base parameters do not validate.
    Base(String),
    /// Outcomes given back do not match the jobs handed out.
    Outcomes(String),
    /// No simulation defined the target metrics, so nothing can be accepted.
    NothingAccepted,
}

impl std::fmt::Display for FitError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            FitError::UnknownKey(key) => write!(f, "`{key}` is not a parameter"),
            FitError::NotFittable(key) => write!(
                f,
                "`{key}` cannot be fitted: only real-valued parameters with a fitting scale can"
            ),
            FitError::RepeatedKey(key) => write!(f, "`{key}` is fitted twice"),
            FitError::Bounds {
                key,
                asked,
                allowed,
            } => {
                write!(f, "bounds of `{key}`: {asked}; {allowed}")
            }
            FitError::UnknownMetric(key) => write!(f, "`{key}` is not a metric"),
            FitError::NotScalarMetric(key) => {
                write!(f, "metric `{key}` is not one number and cannot be matched")
            }
            FitError::SpecimenLacks(key) => {
                write!(f, "the specimen has no value for metric `{key}`")
            }
            FitError::Weight(key) => {
                write!(f, "the weight of metric `{key}` must be a positive number")
            }
            FitError::Empty(what) => write!(f, "{what}"),
            FitError::Count {
                name,
                value,
                allowed,
            } => write!(f, "{name} is {value}; allowed: {allowed}"),
            FitError::Base(message) => write!(f, "base parameters: {message}"),
            FitError::Outcomes(message) => write!(f, "outcomes: {message}"),
            FitError::NothingAccepted => write!(
                f,
                "no simulation defined every matched metric, so none could be accepted"
            ),
        }
    }
}

impl std::error::Error for FitError {}

/// Most replicates per parameter set.
pub const MAX_REPLICATES: u32 = 100;
/// Most parameter sets in one batch or population.
pub const MAX_SIMULATIONS: u32 = 10_000_000;

/// Whether `key` can be fitted: a real-valued parameter with a fitting scale in the table.
pub fn fittable(key: &str) -> Result<FitScale, FitError> {
    let spec = parameter(key).ok_or_else(|| FitError::UnknownKey(key.to_string()))?;
    match (spec.access, spec.fit) {
        (Access::Real(..) | Access::OptionalReal(..), Some(scale)) => Ok(scale),
        _ => Err(FitError::NotFittable(key.to_string())),
    }
}

/// The value of a scalar metric, by key: `Ok(None)` when the network leaves it undefined.
pub fn metric_value(metrics: &Metrics, key: &str) -> Result<Option<f64>, FitError> {
    let entry = METRIC_TABLE
        .iter()
        .find(|entry| entry.key == key)
        .ok_or_else(|| FitError::UnknownMetric(key.to_string()))?;
    match (entry.read)(metrics) {
        Reading::Number(value) => Ok(value.filter(|value| value.is_finite())),
        Reading::Count(count) => Ok(Some(count as f64)),
        Reading::OptionalCount(count) => Ok(count.map(|count| count as f64)),
        Reading::Histogram(_) | Reading::Streams(_) => {
            Err(FitError::NotScalarMetric(key.to_string()))
        }
    }
}

impl FitPlan {
    /// Checks everything before any work starts.
    pub fn check(&self) -> Result<(), FitError> {
        if self.fitted.is_empty() {
            return Err(FitError::Empty("no parameter to fit"));
        }
        if self.targets.is_empty() {
            return Err(FitError::Empty("no metric to match"));
        }
        self.base
            .validate()
            .map_err(|error| FitError::Base(error.to_string()))?;
        for (index, fitted) in self.fitted.iter().enumerate() {
            fittable(&fitted.key)?;
            if self.fitted[..index]
                .iter()
                .any(|other| other.key == fitted.key)
            {
                return Err(FitError::RepeatedKey(fitted.key.clone()));
            }
            check_bounds(fitted)?;
        }
        for target in &self.targets {
            metric_value(&Metrics::default(), &target.key)?;
            if !target.observed.is_finite() {
                return Err(FitError::SpecimenLacks(target.key.clone()));
            }
            if let Some(weight) = target.weight {
                if !(weight.is_finite() && weight > 0.0) {
                    return Err(FitError::Weight(target.key.clone()));
                }
            }
        }
        if !(1..=MAX_REPLICATES).contains(&self.replicates) {
            return Err(FitError::Count {
                name: "replicates",
                value: self.replicates.into(),
                allowed: "1 to 100",
            });
        }
        let counts: Vec<(&'static str, u32, u32)> = match self.method {
            Method::Quick {
                simulations,
                accepted,
            } => vec![("simulations", simulations, 10), ("accepted", accepted, 5)],
            Method::Sequential {
                population,
                generations,
            } => vec![
                ("population", population, 5),
                ("generations", generations, 1),
            ],
        };
        for (name, value, least) in counts {
            if value < least || value > MAX_SIMULATIONS {
                return Err(FitError::Count {
                    name,
                    value: value.into(),
                    allowed: match name {
                        "simulations" => "10 to 10,000,000",
                        "accepted" => "5 up to the number of simulations",
                        "population" => "5 to 10,000,000",
                        _ => "1 to 10,000,000",
                    },
                });
            }
        }
        if let Method::Quick {
            simulations,
            accepted,
        } = self.method
        {
            if accepted > simulations {
                return Err(FitError::Count {
                    name: "accepted",
                    value: accepted.into(),
                    allowed: "5 up to the number of simulations",
                });
            }
        }
        Ok(())
    }

    /// The base parameters with the fitted keys set to `values` and the seed to `seed`.
    pub fn params_for(&self, values: &[f64], seed: u64) -> Params {
        let mut params = self.base.clone();
        for (fitted, &value) in self.fitted.iter().zip(values) {
            if let Some(spec) = parameter(&fitted.key) {
                match spec.access {
                    Access::Real(_, get) => *get(&mut params) = value,
                    Access::OptionalReal(_, get) => *get(&mut params) = Some(value),
                    _ => {}
                }
            }
        }
        params.run.seed = seed;
        params
    }
}

/// Bounds must be finite, increasing, inside the parameter's allowed range, and positive on a
/// log scale.
fn check_bounds(fitted: &FittedKey) -> Result<(), FitError> {
    let asked = format!("{} to {}", fitted.low, fitted.high);
    let fail = |allowed: String| FitError::Bounds {
        key: fitted.key.clone(),
        asked: asked.clone(),
        allowed,
    };
    if !(fitted.low.is_finite() && fitted.high.is_finite()) {
        return Err(fail("both bounds must be finite numbers".into()));
    }
    if fitted.low >= fitted.high {
        return Err(fail("the lower bound must be below the upper one".into()));
    }
    if fitted.scale == FitScale::Log && fitted.low <= 0.0 {
        return Err(fail("a log-scale key needs a positive lower bound".into()));
    }
    if let Some(bounds) = parameter(&fitted.key).and_then(|spec| spec.bounds) {
        if !(bounds.contains(fitted.low) && bounds.contains(fitted.high)) {
            let allowed = parameter(&fitted.key)
                .map(|spec| spec.allowed_text())
                .unwrap_or_default();
            return Err(fail(format!(
                "both must lie in the allowed range: {allowed}"
            )));
        }
    }
    Ok(())
}
