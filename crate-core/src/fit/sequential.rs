//! The sequential method: ABC-SMC (Toni et al. 2009, J. R. Soc. Interface 6) with the
//! population Monte Carlo weights of Beaumont et al. (2009, Biometrika 96): particles of one
//! generation are perturbed by a normal kernel whose variance is twice their weighted variance,
//! kept when their distance is within the generation's tolerance, and weighted by
//! prior / sum_j w_j K(theta | theta_j). The kernel is truncated to the prior's bounds, so its
//! normalising mass per previous particle enters the weights.
//!
//! Tolerances adapt: the first generation draws four times the population from the prior and
//! keeps the closest quarter; each later tolerance is the median distance of the previous
//! generation's particles (an adaptive schedule in the manner of Drovandi & Pettitt 2011,
//! Biometrics 67, from memory). A generation that accepts too few runs (fewer than a population
//! after 50 batches) ends the fit with the previous generation, and says so.

use rand_chacha::rand_core::RngCore;
use rand_chacha::ChaCha8Rng;

use super::plan::{FitError, FitPlan, Method};
use super::rejection::{check_outcomes, intervals, prior_batch};
use super::stats::{distance, median_of, spreads, weighted_moments};
use super::{prior, FitResult, Generation, Job, Outcome, Particle};

/// Prior draws of the first generation per particle kept.
const FIRST_OVERSAMPLING: u32 = 4;
/// Batches a generation may take before the fit stops with the previous one.
const MAX_BATCHES: u32 = 50;

#[derive(Clone)]
struct Member {
    coordinates: Vec<f64>,
    weight: f64,
    distance: f64,
    seed: u64,
}

/// State of a sequential fit.
pub struct Sequential {
    /// Generations completed (0 before the first).
    completed: u32,
    population: Vec<Member>,
    scales: Vec<f64>,
    tolerance: f64,
    kernel_sd: Vec<f64>,
    batch: Vec<(Vec<f64>, Job)>,
    accepted_now: Vec<Member>,
    simulations_now: u64,
    batches_now: u32,
    history: Vec<Generation>,
    simulations: u64,
    finished: bool,
    notes: Vec<String>,
}

fn counts(plan: &FitPlan) -> (u32, u32) {
    match plan.method {
        Method::Sequential {
            population,
            generations,
        } => (population, generations),
        Method::Quick { .. } => (0, 0),
    }
}

impl Sequential {
    /// A sequential fit that has handed out nothing yet.
    pub fn new(_plan: &FitPlan) -> Sequential {
        Sequential {
            completed: 0,
            population: Vec::new(),
            scales: Vec::new(),
            tolerance: f64::INFINITY,
            kernel_sd: Vec::new(),
            batch: Vec::new(),
            accepted_now: Vec::new(),
            simulations_now: 0,
            batches_now: 0,
            history: Vec::new(),
            simulations: 0,
            finished: false,
            notes: Vec::new(),
        }
    }

    /// The next batch: prior draws for the first generation, perturbed particles after.
    pub fn next_batch(&mut self, plan: &FitPlan, rng: &mut ChaCha8Rng) -> Option<Vec<Job>> {
        let (population, generations) = counts(plan);
        if self.finished || self.completed > generations {
            return None;
        }
        let batch: Vec<(Vec<f64>, Job)> = if self.completed == 0 {
            let (coordinates, jobs) = prior_batch(plan, rng, population * FIRST_OVERSAMPLING);
            coordinates.into_iter().zip(jobs).collect()
        } else {
            (0..population)
                .map(|_| {
                    let point = self.perturbed(plan, rng);
                    let seeds = (0..plan.replicates).map(|_| rng.next_u64()).collect();
                    let job = Job {
                        values: prior::values(&plan.fitted, &point),
                        seeds,
                    };
                    (point, job)
                })
                .collect()
        };
        let jobs = batch.iter().map(|(_, job)| job.clone()).collect();
        self.batch = batch;
        Some(jobs)
    }

    /// A particle drawn by weight and moved by the kernel, redrawn until inside the prior.
    fn perturbed(&self, plan: &FitPlan, rng: &mut ChaCha8Rng) -> Vec<f64> {
        loop {
            let pick = prior::uniform(rng);
            let mut cumulative = 0.0;
            let mut chosen = &self.population[self.population.len() - 1];
            for member in &self.population {
                cumulative += member.weight;
                if pick < cumulative {
                    chosen = member;
                    break;
                }
            }
            let point: Vec<f64> = chosen
                .coordinates
                .iter()
                .zip(&self.kernel_sd)
                .map(|(&centre, &sd)| centre + sd * prior::normal(rng))
                .collect();
            if prior::inside(&plan.fitted, &point) {
                return point;
            }
        }
    }

    /// The truncated kernel's density at `point` around `centre`, up to a factor common to all.
    fn kernel(&self, plan: &FitPlan, point: &[f64], centre: &[f64]) -> f64 {
        let mut density = 1.0;
        for (((&x, &c), &sd), key) in point
            .iter()
            .zip(centre)
            .zip(&self.kernel_sd)
            .zip(&plan.fitted)
        {
            let z = (x - c) / sd;
            let (low, high) = key.coordinate_bounds();
            let mass = prior::normal_cdf((high - c) / sd) - prior::normal_cdf((low - c) / sd);
            density *= libm::exp(-0.5 * z * z) / (sd * mass.max(f64::MIN_POSITIVE));
        }
        density
    }

    /// Takes a batch's outcomes; closes the generation when it has its population.
    pub fn absorb(
        &mut self,
        plan: &FitPlan,
        _rng: &mut ChaCha8Rng,
        outcomes: Vec<Outcome>,
    ) -> Result<(), FitError> {
        let jobs: Vec<Job> = self.batch.iter().map(|(_, job)| job.clone()).collect();
        check_outcomes(plan, &jobs, &outcomes)?;
        let (population, generations) = counts(plan);
        let targets = plan.targets.len();
        let means: Vec<Vec<Option<f64>>> = outcomes.iter().map(|o| o.means(targets)).collect();
        self.simulations += outcomes.len() as u64;
        self.simulations_now += outcomes.len() as u64;
        self.batches_now += 1;
        let batch = std::mem::take(&mut self.batch);
        if self.completed == 0 {
            self.scales = spreads(&means, targets);
            let mut scored: Vec<(f64, usize)> = means
                .iter()
                .enumerate()
                .map(|(index, row)| (distance(row, &plan.targets, &self.scales), index))
                .filter(|(d, _)| d.is_finite())
                .collect();
            scored.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
            scored.truncate(population as usize);
            if scored.is_empty() {
                return Err(FitError::NothingAccepted);
            }
            let weight = 1.0 / scored.len() as f64;
            self.accepted_now = scored
                .iter()
                .map(|&(d, index)| Member {
                    coordinates: batch[index].0.clone(),
                    weight,
                    distance: d,
                    seed: batch[index].1.seeds[0],
                })
                .collect();
            self.tolerance = scored.last().map_or(f64::INFINITY, |s| s.0);
            self.close_generation(plan);
            return Ok(());
        }
        for ((point, job), row) in batch.iter().zip(&means) {
            if self.accepted_now.len() >= population as usize {
                break;
            }
            let d = distance(row, &plan.targets, &self.scales);
            if d <= self.tolerance {
                let denominator: f64 = self
                    .population
                    .iter()
                    .map(|member| member.weight * self.kernel(plan, point, &member.coordinates))
                    .sum();
                self.accepted_now.push(Member {
                    coordinates: point.clone(),
                    weight: 1.0 / denominator.max(f64::MIN_POSITIVE),
                    distance: d,
                    seed: job.seeds[0],
                });
            }
        }
        if self.accepted_now.len() >= population as usize {
            let total: f64 = self.accepted_now.iter().map(|m| m.weight).sum();
            for member in &mut self.accepted_now {
                member.weight /= total;
            }
            self.close_generation(plan);
        } else if self.batches_now >= MAX_BATCHES {
            self.notes.push(format!(
                "generation {} accepted {} of {} runs within tolerance {:.4}; the fit stops \
                 with generation {}",
                self.completed,
                self.accepted_now.len(),
                self.simulations_now,
                self.tolerance,
                self.completed - 1
            ));
            self.finished = true;
        }
        if self.completed > generations {
            self.finished = true;
        }
        Ok(())
    }

    /// Makes the accepted runs the population, records the generation and sets up the next.
    fn close_generation(&mut self, plan: &FitPlan) {
        self.history.push(Generation {
            tolerance: self.tolerance,
            simulations: self.simulations_now,
            accepted: self.accepted_now.len() as u64,
        });
        self.population = std::mem::take(&mut self.accepted_now);
        self.completed += 1;
        self.simulations_now = 0;
        self.batches_now = 0;
        let mut distances: Vec<f64> = self.population.iter().map(|m| m.distance).collect();
        self.tolerance = median_of(&mut distances);
        let weights: Vec<f64> = self.population.iter().map(|m| m.weight).collect();
        self.kernel_sd = plan
            .fitted
            .iter()
            .enumerate()
            .map(|(index, key)| {
                let values: Vec<f64> = self
                    .population
                    .iter()
                    .map(|m| m.coordinates[index])
                    .collect();
                let (_, variance) = weighted_moments(&values, &weights);
                let (low, high) = key.coordinate_bounds();
                // Never a zero-width kernel, even when every particle sits on one value.
                (2.0 * variance).sqrt().max(1e-6 * (high - low))
            })
            .collect();
    }

    /// Simulations done and an estimate of the total (one population per later generation).
    pub fn progress(&self, plan: &FitPlan) -> (u64, u64) {
        let (population, generations) = counts(plan);
        let expected = u64::from(population) * u64::from(FIRST_OVERSAMPLING + generations);
        (self.simulations, expected.max(self.simulations))
    }

    /// The last complete generation as the posterior.
    pub fn result(&self, plan: &FitPlan) -> Result<FitResult, FitError> {
        if self.population.is_empty() {
            return Err(FitError::NothingAccepted);
        }
        let particles: Vec<Particle> = self
            .population
            .iter()
            .map(|member| Particle {
                values: prior::values(&plan.fitted, &member.coordinates),
                weight: member.weight,
                distance: member.distance,
                seed: member.seed,
            })
            .collect();
        let best = particles
            .iter()
            .min_by(|a, b| a.distance.total_cmp(&b.distance))
            .cloned()
            .map(|mut particle| {
                particle.weight = 1.0;
                particle
            })
            .ok_or(FitError::NothingAccepted)?;
        Ok(FitResult {
            posterior: intervals(plan, &particles),
            accepted: particles.len() as u64,
            particles,
            generations: self.history.clone(),
            simulations: self.simulations,
            best,
            scales: self.scales.clone(),
            notes: self.notes.clone(),
        })
    }
}
