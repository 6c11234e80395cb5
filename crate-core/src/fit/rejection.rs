//! The quick method: rejection with regression adjustment (Beaumont, Zhang & Balding 2002,
//! Genetics 162). One batch of parameter sets drawn from the prior; the closest `accepted` are
//! kept with Epanechnikov weights 1 - (d/delta)^2, and each fitted key is adjusted by a
//! weighted linear regression on the metric differences: theta* = theta - (s - s_obs)' beta.
//! Bounded keys are adjusted on the logit scale of their prior bounds, so adjusted values stay
//! inside them (a transform Beaumont et al. suggest for bounded parameters).

use rand_chacha::rand_core::RngCore;
use rand_chacha::ChaCha8Rng;

use super::plan::{FitError, FitPlan, Method};
use super::stats::{
    distance, inverse_logit, logit, spreads, weighted_least_squares, weighted_quantile,
};
use super::{prior, FitResult, Generation, Interval, Job, Outcome, Particle};

/// State of a quick fit: the one batch, then its outcomes.
pub struct Rejection {
    coordinates: Vec<Vec<f64>>,
    jobs: Vec<Job>,
    outcomes: Option<Vec<Outcome>>,
}

/// Draws `count` parameter sets from the prior, each with its replicate seeds, in a fixed
/// order of draws.
pub fn prior_batch(plan: &FitPlan, rng: &mut ChaCha8Rng, count: u32) -> (Vec<Vec<f64>>, Vec<Job>) {
    let mut coordinates = Vec::with_capacity(count as usize);
    let mut jobs = Vec::with_capacity(count as usize);
    for _ in 0..count {
        let point = prior::draw(&plan.fitted, rng);
        let seeds = (0..plan.replicates).map(|_| rng.next_u64()).collect();
        jobs.push(Job {
            values: prior::values(&plan.fitted, &point),
            seeds,
        });
        coordinates.push(point);
    }
    (coordinates, jobs)
}

/// Checks that outcomes answer the jobs: one per job, one row per replicate, one value per
/// target.
pub fn check_outcomes(plan: &FitPlan, jobs: &[Job], outcomes: &[Outcome]) -> Result<(), FitError> {
    if outcomes.len() != jobs.len() {
        return Err(FitError::Outcomes(format!(
            "{} outcomes for {} jobs",
            outcomes.len(),
            jobs.len()
        )));
    }
    for (index, outcome) in outcomes.iter().enumerate() {
        let shape_ok = outcome.replicates.len() == plan.replicates as usize
            && outcome
                .replicates
                .iter()
                .all(|row| row.len() == plan.targets.len());
        if !shape_ok {
            return Err(FitError::Outcomes(format!(
                "outcome {index} does not hold {} replicates of {} metrics",
                plan.replicates,
                plan.targets.len()
            )));
        }
    }
    Ok(())
}

impl Rejection {
    /// A quick fit that has handed out nothing yet.
    pub fn new(_plan: &FitPlan) -> Rejection {
        Rejection {
            coordinates: Vec::new(),
            jobs: Vec::new(),
            outcomes: None,
        }
    }

    /// The one batch, the first time; then nothing.
    pub fn next_batch(&mut self, plan: &FitPlan, rng: &mut ChaCha8Rng) -> Option<Vec<Job>> {
        if !self.jobs.is_empty() {
            return None;
        }
        let Method::Quick { simulations, .. } = plan.method else {
            return None;
        };
        let (coordinates, jobs) = prior_batch(plan, rng, simulations);
        self.coordinates = coordinates;
        self.jobs = jobs.clone();
        Some(jobs)
    }

    /// Takes the batch's outcomes.
    pub fn absorb(&mut self, plan: &FitPlan, outcomes: Vec<Outcome>) -> Result<(), FitError> {
        check_outcomes(plan, &self.jobs, &outcomes)?;
        self.outcomes = Some(outcomes);
        Ok(())
    }

    /// Simulations done and expected.
    pub fn progress(&self, plan: &FitPlan) -> (u64, u64) {
        let total = match plan.method {
            Method::Quick { simulations, .. } => simulations.into(),
            Method::Sequential { .. } => 0,
        };
        (if self.outcomes.is_some() { total } else { 0 }, total)
    }

    /// Acceptance, weights, regression adjustment and the summary.
    pub fn result(&self, plan: &FitPlan) -> Result<FitResult, FitError> {
        let Method::Quick { accepted, .. } = plan.method else {
            return Err(FitError::Outcomes("not a quick fit".into()));
        };
        let outcomes = self
            .outcomes
            .as_ref()
            .ok_or_else(|| FitError::Outcomes("the batch has not been run".into()))?;
        let targets = plan.targets.len();
        let means: Vec<Vec<Option<f64>>> = outcomes.iter().map(|o| o.means(targets)).collect();
        let scales = spreads(&means, targets);
        let distances: Vec<f64> = means
            .iter()
            .map(|row| distance(row, &plan.targets, &scales))
            .collect();
        let mut order: Vec<usize> = (0..distances.len())
            .filter(|&index| distances[index].is_finite())
            .collect();
        order.sort_by(|&a, &b| distances[a].total_cmp(&distances[b]).then(a.cmp(&b)));
        if order.is_empty() {
            return Err(FitError::NothingAccepted);
        }
        let kept = (accepted as usize).min(order.len());
        let chosen = &order[..kept];
        let largest = distances[chosen[kept - 1]];
        // delta: the first rejected distance, so every accepted set has a positive weight.
        let delta = match order.get(kept) {
            Some(&next) if distances[next] > largest => distances[next],
            _ if largest > 0.0 => largest * (1.0 + 1e-9),
            _ => 1.0,
        };
        let weights: Vec<f64> = chosen
            .iter()
            .map(|&index| {
                let ratio = distances[index] / delta;
                (1.0 - ratio * ratio).max(f64::MIN_POSITIVE)
            })
            .collect();
        let mut notes = Vec::new();
        // Regressors: an intercept and each metric's standardised difference from the specimen.
        let rows: Vec<Vec<f64>> = chosen
            .iter()
            .map(|&index| {
                let mut row = vec![1.0];
                for ((mean, target), scale) in means[index].iter().zip(&plan.targets).zip(&scales) {
                    row.push((mean.unwrap_or(target.observed) - target.observed) / scale);
                }
                row
            })
            .collect();
        let mut adjusted: Vec<Vec<f64>> = chosen
            .iter()
            .map(|&index| self.coordinates[index].clone())
            .collect();
        if kept > targets + 2 {
            for (key_index, key) in plan.fitted.iter().enumerate() {
                let (low, high) = key.coordinate_bounds();
                let y: Vec<f64> = chosen
                    .iter()
                    .map(|&index| logit(self.coordinates[index][key_index], low, high))
                    .collect();
                match weighted_least_squares(&rows, &y, &weights) {
                    Some(beta) => {
                        for (point, (row, &y)) in adjusted.iter_mut().zip(rows.iter().zip(&y)) {
                            let shift: f64 =
                                row.iter().zip(&beta).skip(1).map(|(x, b)| x * b).sum();
                            point[key_index] = inverse_logit(y - shift, low, high);
                        }
                    }
                    None => notes.push(format!(
                        "`{}`: the matched metrics are collinear among the accepted runs, so \
                         its values are not regression-adjusted",
                        key.key
                    )),
                }
            }
        } else {
            notes.push(format!(
                "only {kept} runs accepted for {targets} metrics: values are not \
                 regression-adjusted (more accepted runs than metrics + 2 are needed)"
            ));
        }
        let total: f64 = weights.iter().sum();
        let particles: Vec<Particle> = chosen
            .iter()
            .zip(&adjusted)
            .zip(&weights)
            .map(|((&index, point), &weight)| Particle {
                values: prior::values(&plan.fitted, point),
                weight: weight / total,
                distance: distances[index],
                seed: self.jobs[index].seeds[0],
            })
            .collect();
        let best_index = chosen[0];
        let best = Particle {
            values: self.jobs[best_index].values.clone(),
            weight: 1.0,
            distance: distances[best_index],
            seed: self.jobs[best_index].seeds[0],
        };
        Ok(FitResult {
            posterior: intervals(plan, &particles),
            particles,
            generations: vec![Generation {
                tolerance: largest,
                simulations: outcomes.len() as u64,
                accepted: kept as u64,
            }],
            simulations: outcomes.len() as u64,
            accepted: kept as u64,
            best,
            scales,
            notes,
        })
    }
}

/// Median and central 90 % interval of each fitted key over weighted particles.
pub fn intervals(plan: &FitPlan, particles: &[Particle]) -> Vec<Interval> {
    let weights: Vec<f64> = particles.iter().map(|p| p.weight).collect();
    plan.fitted
        .iter()
        .enumerate()
        .map(|(key_index, key)| {
            let values: Vec<f64> = particles.iter().map(|p| p.values[key_index]).collect();
            Interval {
                key: key.key.clone(),
                median: weighted_quantile(&values, &weights, 0.5),
                low: weighted_quantile(&values, &weights, 0.05),
                high: weighted_quantile(&values, &weights, 0.95),
            }
        })
        .collect()
}
