//! What the matched metrics can tell about each fitted key, before the fit: a one-at-a-time
//! design (every key at 10 % and 90 % of its prior range in sampler coordinates, the others at
//! the centre; and the centre itself), each set with at least four replicate seeds. A key's
//! effect on a metric is the change of the replicate mean from its low to its high setting;
//! the seed noise is the pooled standard deviation of replicates over all sets. A key whose
//! effect stays below twice the noise on every matched metric is flagged as not identifiable
//! (two noise units: common practice, no source).
//!
//! Also the posterior predictive check: metrics of runs drawn from the posterior beside the
//! specimen's.

use rand_chacha::rand_core::{RngCore, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::{Deserialize, Serialize};

use super::plan::FitPlan;
use super::stats::weighted_quantile;
use super::{prior, FitResult, Job, Outcome};

/// Least replicates per set in the sensitivity design.
const LEAST_REPLICATES: u32 = 4;
/// Effect in units of seed noise below which a metric does not see a key.
pub const NOISE_UNITS: f64 = 2.0;
/// Stream of the sensitivity design's seeds (apart from the sampler's own).
const DESIGN_STREAM: u64 = 0x5e75_1e55;
/// Stream of the predictive check's draws.
const PREDICTIVE_STREAM: u64 = 0x9e7d_1c7e;

/// One key against one metric.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SensitivityRow {
    /// The fitted key.
    pub key: String,
    /// The matched metric.
    pub metric: String,
    /// Mean metric at the key's high setting minus at its low setting.
    pub effect: f64,
    /// Pooled standard deviation of the metric between replicate seeds.
    pub noise: f64,
    /// |effect| / noise (infinite when the noise is 0 and the effect is not).
    pub ratio: f64,
}

/// The sensitivity table and its verdicts.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Sensitivity {
    /// One row per key and metric.
    pub rows: Vec<SensitivityRow>,
    /// Keys no matched metric moves by at least `NOISE_UNITS` noise.
    pub unidentifiable: Vec<String>,
}

/// The design's jobs: the centre, then each key low and high.
pub fn design_jobs(plan: &FitPlan) -> Vec<Job> {
    let mut rng = ChaCha8Rng::seed_from_u64(plan.seed ^ DESIGN_STREAM);
    let replicates = plan.replicates.max(LEAST_REPLICATES);
    let centre: Vec<f64> = plan
        .fitted
        .iter()
        .map(|key| {
            let (low, high) = key.coordinate_bounds();
            0.5 * (low + high)
        })
        .collect();
    let mut points = vec![centre.clone()];
    for (index, key) in plan.fitted.iter().enumerate() {
        let (low, high) = key.coordinate_bounds();
        for fraction in [0.1, 0.9] {
            let mut point = centre.clone();
            point[index] = low + fraction * (high - low);
            points.push(point);
        }
    }
    points
        .iter()
        .map(|point| Job {
            values: prior::values(&plan.fitted, point),
            seeds: (0..replicates).map(|_| rng.next_u64()).collect(),
        })
        .collect()
}

/// The table from the design's outcomes (in `design_jobs` order).
pub fn sensitivity(plan: &FitPlan, outcomes: &[Outcome]) -> Sensitivity {
    let targets = plan.targets.len();
    // Pooled within-set variance per metric.
    let noise: Vec<f64> = (0..targets)
        .map(|k| {
            let (mut sum, mut freedom) = (0.0, 0usize);
            for outcome in outcomes {
                let values: Vec<f64> = outcome
                    .replicates
                    .iter()
                    .filter_map(|row| row.get(k).copied().flatten())
                    .collect();
                if values.len() < 2 {
                    continue;
                }
                let mean = values.iter().sum::<f64>() / values.len() as f64;
                sum += values.iter().map(|v| (v - mean) * (v - mean)).sum::<f64>();
                freedom += values.len() - 1;
            }
            if freedom == 0 {
                f64::NAN
            } else {
                (sum / freedom as f64).sqrt()
            }
        })
        .collect();
    let mut rows = Vec::new();
    let mut unidentifiable = Vec::new();
    for (index, key) in plan.fitted.iter().enumerate() {
        let (low, high) = (&outcomes[1 + 2 * index], &outcomes[2 + 2 * index]);
        let (low_means, high_means) = (low.means(targets), high.means(targets));
        let mut seen = false;
        for (k, target) in plan.targets.iter().enumerate() {
            let effect = match (low_means[k], high_means[k]) {
                (Some(a), Some(b)) => b - a,
                _ => f64::NAN,
            };
            let ratio = if noise[k] > 0.0 {
                effect.abs() / noise[k]
            } else if effect.abs() > 0.0 {
                f64::INFINITY
            } else {
                0.0
            };
            seen |= ratio >= NOISE_UNITS;
            rows.push(SensitivityRow {
                key: key.key.clone(),
                metric: target.key.clone(),
                effect,
                noise: noise[k],
                ratio,
            });
        }
        if !seen {
            unidentifiable.push(key.key.clone());
        }
    }
    Sensitivity {
        rows,
        unidentifiable,
    }
}

/// One metric of the posterior predictive check.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct PredictiveRow {
    /// The metric.
    pub metric: String,
    /// The specimen's value.
    pub specimen: f64,
    /// Median over runs drawn from the posterior.
    pub median: f64,
    /// 5th percentile of those runs.
    pub low: f64,
    /// 95th percentile.
    pub high: f64,
    /// Whether the specimen lies within [low, high].
    pub inside: bool,
}

/// `count` runs drawn from the posterior by weight, one seed each.
pub fn predictive_jobs(plan: &FitPlan, result: &FitResult, count: u32) -> Vec<Job> {
    let mut rng = ChaCha8Rng::seed_from_u64(plan.seed ^ PREDICTIVE_STREAM);
    (0..count)
        .map(|_| {
            let pick = prior::uniform(&mut rng);
            let mut cumulative = 0.0;
            let mut chosen = result.particles.last();
            for particle in &result.particles {
                cumulative += particle.weight;
                if pick < cumulative {
                    chosen = Some(particle);
                    break;
                }
            }
            Job {
                values: chosen.map(|p| p.values.clone()).unwrap_or_default(),
                seeds: vec![rng.next_u64()],
            }
        })
        .collect()
}

/// The check's rows from the predictive runs' outcomes.
pub fn predictive_rows(plan: &FitPlan, outcomes: &[Outcome]) -> Vec<PredictiveRow> {
    plan.targets
        .iter()
        .enumerate()
        .map(|(k, target)| {
            let values: Vec<f64> = outcomes
                .iter()
                .filter_map(|outcome| outcome.means(plan.targets.len())[k])
                .collect();
            let weights = vec![1.0; values.len()];
            let (median, low, high) = if values.is_empty() {
                (f64::NAN, f64::NAN, f64::NAN)
            } else {
                (
                    weighted_quantile(&values, &weights, 0.5),
                    weighted_quantile(&values, &weights, 0.05),
                    weighted_quantile(&values, &weights, 0.95),
                )
            };
            PredictiveRow {
                metric: target.key.clone(),
                specimen: target.observed,
                median,
                low,
                high,
                inside: low <= target.observed && target.observed <= high,
            }
        })
        .collect()
}
