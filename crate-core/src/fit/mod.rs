//! Fitting growth parameters to a specimen by approximate Bayesian computation: which parameter
//! values make simulated networks measure like the specimen, and how sure that is.
//!
//! The sampler is a state machine that never runs a simulation itself: `Fit::next_batch` hands
//! out jobs (parameter values and replicate seeds), the caller runs them in any order and on
//! any number of cores or machines (`simulate::run_job` grows and measures one), and
//! `Fit::absorb` takes the outcomes back in job order. Every random draw of the sampler comes
//! from one ChaCha8 generator seeded by the plan, in a fixed order, so the same plan gives the
//! same posterior on every machine, however the jobs were spread.
//!
//! Two methods: `Method::Quick`, rejection with regression adjustment (Beaumont, Zhang &
//! Balding 2002, Genetics 162), one batch that can be split into shards; `Method::Sequential`,
//! ABC-SMC (Toni et al. 2009, J. R. Soc. Interface 6) with the population Monte Carlo weights
//! and kernel of Beaumont et al. (2009, Biometrika 96) and adaptive tolerances.

pub mod identifiability;
pub mod plan;
pub mod prior;
pub mod rejection;
pub mod sensitivity;
pub mod sequential;
pub mod simulate;
pub mod stats;

pub use plan::{FitError, FitPlan, FittedKey, Method, Target};
pub use sensitivity::{PredictiveRow, Sensitivity, SensitivityRow};

use rand_chacha::rand_core::SeedableRng;
use rand_chacha::ChaCha8Rng;
use serde::{Deserialize, Serialize};

/// One simulation request: a parameter set (values in the parameters' own units, in the plan's
/// order of fitted keys) and one seed per replicate.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Job {
    /// Values of the fitted keys.
    pub values: Vec<f64>,
    /// One growth seed per replicate.
    pub seeds: Vec<u64>,
}

/// What one job measured: per replicate, the value of each target metric (`None` where the run
/// failed or the metric is undefined for it).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Outcome {
    /// `replicates[r][k]`: target metric `k` of replicate `r`.
    pub replicates: Vec<Vec<Option<f64>>>,
}

impl Outcome {
    /// The mean of each target metric over the replicates that define it; `None` when no
    /// replicate does.
    pub fn means(&self, targets: usize) -> Vec<Option<f64>> {
        (0..targets)
            .map(|k| {
                let values: Vec<f64> = self
                    .replicates
                    .iter()
                    .filter_map(|row| row.get(k).copied().flatten())
                    .collect();
                (!values.is_empty()).then(|| values.iter().sum::<f64>() / values.len() as f64)
            })
            .collect()
    }
}

/// The posterior of one fitted key.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Interval {
    /// The fitted key.
    pub key: String,
    /// Posterior median.
    pub median: f64,
    /// Lower end of the central 90 % credible interval (5th percentile).
    pub low: f64,
    /// Upper end (95th percentile).
    pub high: f64,
}

/// One generation of the sequential method (or the single round of the quick one).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Generation {
    /// Distance below which a simulation was accepted.
    pub tolerance: f64,
    /// Simulations run in this generation.
    pub simulations: u64,
    /// Simulations accepted.
    pub accepted: u64,
}

/// A posterior sample: transformed-free parameter values with a weight.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Particle {
    /// Values of the fitted keys.
    pub values: Vec<f64>,
    /// Normalised weight.
    pub weight: f64,
    /// Distance of its simulation to the specimen.
    pub distance: f64,
    /// Seed of its first replicate (for the best run's link).
    pub seed: u64,
}

/// Everything a finished fit says.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct FitResult {
    /// Posterior median and 90 % interval per fitted key, in the plan's order.
    pub posterior: Vec<Interval>,
    /// The weighted posterior sample (after regression adjustment in the quick method).
    pub particles: Vec<Particle>,
    /// Tolerance and acceptance per generation.
    pub generations: Vec<Generation>,
    /// Simulations run in all (parameter sets, not counting replicates).
    pub simulations: u64,
    /// Accepted parameter sets of the last generation.
    pub accepted: u64,
    /// Parameter values and seed of the accepted simulation closest to the specimen.
    pub best: Particle,
    /// Spread used to standardise each target metric (median absolute deviation of the first
    /// round's simulations, scaled to a normal standard deviation).
    pub scales: Vec<f64>,
    /// Notes for the user (a fallback taken, a generation cut short).
    pub notes: Vec<String>,
}

/// A running fit.
pub struct Fit {
    plan: FitPlan,
    rng: ChaCha8Rng,
    state: State,
}

enum State {
    Quick(rejection::Rejection),
    Sequential(sequential::Sequential),
}

impl Fit {
    /// Starts a fit after checking the plan (keys, bounds, targets, counts).
    pub fn new(plan: FitPlan) -> Result<Fit, FitError> {
        plan.check()?;
        let rng = ChaCha8Rng::seed_from_u64(plan.seed);
        let state = match plan.method {
            Method::Quick { .. } => State::Quick(rejection::Rejection::new(&plan)),
            Method::Sequential { .. } => State::Sequential(sequential::Sequential::new(&plan)),
        };
        Ok(Fit { plan, rng, state })
    }

    /// The plan.
    pub fn plan(&self) -> &FitPlan {
        &self.plan
    }

    /// The next batch of jobs, or `None` when the fit is finished.
    pub fn next_batch(&mut self) -> Option<Vec<Job>> {
        match &mut self.state {
            State::Quick(state) => state.next_batch(&self.plan, &mut self.rng),
            State::Sequential(state) => state.next_batch(&self.plan, &mut self.rng),
        }
    }

    /// Takes the outcomes of the last batch, one per job, in job order.
    pub fn absorb(&mut self, outcomes: Vec<Outcome>) -> Result<(), FitError> {
        match &mut self.state {
            State::Quick(state) => state.absorb(&self.plan, outcomes),
            State::Sequential(state) => state.absorb(&self.plan, &mut self.rng, outcomes),
        }
    }

    /// Simulations run so far and the number expected in all (an estimate for the sequential
    /// method, whose generations stop when enough are accepted).
    pub fn progress(&self) -> (u64, u64) {
        match &self.state {
            State::Quick(state) => state.progress(&self.plan),
            State::Sequential(state) => state.progress(&self.plan),
        }
    }

    /// The result, once `next_batch` has returned `None`.
    pub fn result(&self) -> Result<FitResult, FitError> {
        match &self.state {
            State::Quick(state) => state.result(&self.plan),
            State::Sequential(state) => state.result(&self.plan),
        }
    }
}
