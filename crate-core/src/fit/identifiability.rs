//! Identifiability of the model's parameters from the metrics (`identifiability`): for one
//! preset, every parameter a fit may vary is set to three levels one step apart (the others
//! kept), each grown with several seeds; a metric's sensitivity to a parameter is the change of
//! its mean per step, divided by its seed-to-seed spread. From the matrix of these sensitivities
//! (metrics by parameters): how many independent metric directions there are (singular values
//! above 1: a unit step along that combination of parameters moves the metrics by more than one
//! seed spread) and which parameter pairs the metrics confound (cosine of their sensitivity
//! columns above 0.9). Nothing here runs a simulation: `level_params` gives the runs to make,
//! the caller grows and measures them (`metric_values`) in any order, and `identifiability`
//! reads the values.

use serde::Serialize;

use super::plan::metric_value;
use crate::metrics::{Metrics, METRIC_TABLE};
use crate::params::table::{parameters, Access, FitScale};
use crate::params::Params;

/// Levels per parameter: one step below the preset's value, the value, one step above.
pub const LEVELS: usize = 3;

/// Cosine of two parameters' sensitivity columns above which the metrics confound them
/// (common practice, no source: columns nearly parallel mean one combination of the two moves
/// the metrics and the other does not).
pub const CONFOUNDED_COSINE: f64 = 0.9;

/// A singular value of the normalised sensitivity matrix above this counts as an independent
/// direction: one step along it moves the metrics by more than one seed spread (in the
/// Euclidean norm over metrics).
pub const DIRECTION_THRESHOLD: f64 = 1.0;

/// Metrics that grow with the size of the network (totals and counts, areas and lengths of the
/// whole): most parameters move them through size alone, so `Identifiability` also counts the
/// directions the other metrics (densities, angles, ratios, shape) see.
pub const SIZE_METRICS: [&str; 12] = [
    "area",
    "node_count",
    "segment_count",
    "total_length",
    "junction_count",
    "tip_count",
    "branching_angle_count",
    "transport_cost",
    "outline_area",
    "outline_perimeter",
    "areoles",
    "loop_count",
];

/// Sensitivities of this size or more (seed spreads per step) count as seen in the summaries:
/// twice the seed spread, as the fit's own sensitivity table (`sensitivity::NOISE_UNITS`).
pub const SEEN_RATIO: f64 = super::sensitivity::NOISE_UNITS;

/// Widest allowed range that is stepped in quarters of itself, in the parameter's units.
/// Wider ranges (thresholds, areas) step by half the preset's value (1 when it is 0).
const WHOLE_RANGE_UP_TO: f64 = 200.0;

/// One parameter as studied: its key, scale and three values.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct StudiedKey {
    /// The parameter's key.
    pub key: String,
    /// Its fitting scale.
    pub scale: FitScale,
    /// The three values, from low to high, one step apart (on the log scale for `Log`).
    pub levels: [f64; LEVELS],
}

/// The parameters a fit may vary (the parameter table's `fit` scale), each with three levels
/// around the value in `params`, inside its allowed range: a log-scale parameter steps by a
/// factor of 2; a linear one by a quarter of its allowed range when that spans at most 200
/// units, else by half its value (1 when the value is 0); the levels shift inward at a bound. Parameters
/// that are off (`none`) in `params`, or cannot step inside their bounds, are left out.
pub fn studied_keys(params: &Params) -> Vec<StudiedKey> {
    let mut copy = params.clone();
    parameters()
        .iter()
        .filter_map(|spec| {
            let scale = spec.fit?;
            let bounds = spec.bounds?;
            let value = match spec.access {
                Access::Real(_, get) => *get(&mut copy),
                Access::OptionalReal(_, get) => (*get(&mut copy))?,
                _ => return None,
            };
            let levels = match scale {
                FitScale::Log if value > 0.0 => {
                    let mut low = value / 2.0;
                    let mut high = value * 2.0;
                    if !bounds.contains(high) {
                        (low, high) = (value / 4.0, value);
                    } else if !bounds.contains(low) {
                        (low, high) = (value, value * 4.0);
                    }
                    [low, libm::sqrt(low * high), high]
                }
                FitScale::Log => return None,
                FitScale::Linear => {
                    let span = bounds.max - bounds.min;
                    let step = if span <= WHOLE_RANGE_UP_TO {
                        span / 4.0
                    } else if value != 0.0 {
                        value.abs() / 2.0
                    } else {
                        1.0
                    };
                    let mut low = value - step;
                    if !bounds.contains(low) {
                        low = if bounds.min_excluded {
                            bounds.min + step / 2.0
                        } else {
                            bounds.min
                        };
                    }
                    let mut high = low + 2.0 * step;
                    if !bounds.contains(high) {
                        high = bounds.max;
                        low = high - 2.0 * step;
                    }
                    [low, low + step, high]
                }
            };
            levels
                .iter()
                .all(|&level| bounds.contains(level))
                .then(|| StudiedKey {
                    key: spec.key.to_string(),
                    scale,
                    levels,
                })
        })
        .collect()
}

/// `params` with `key` set to `value` and the seed `seed`; `None` when the key is not a real
/// parameter or the result does not validate.
pub fn level_params(params: &Params, key: &str, value: f64, seed: u64) -> Option<Params> {
    let spec = parameters().iter().find(|spec| spec.key == key)?;
    let mut changed = params.clone();
    match spec.access {
        Access::Real(_, get) => *get(&mut changed) = value,
        Access::OptionalReal(_, get) => *get(&mut changed) = Some(value),
        _ => return None,
    }
    changed.run.seed = seed;
    changed.validate().ok()?;
    Some(changed)
}

/// The keys of every scalar metric (those a fit can match), in the metric table's order.
pub fn metric_keys() -> Vec<&'static str> {
    METRIC_TABLE
        .iter()
        .filter(|entry| metric_value(&Metrics::default(), entry.key).is_ok())
        .map(|entry| entry.key)
        .collect()
}

/// The value of every metric of `keys` in `metrics` (`None` where undefined).
pub fn metric_values(metrics: &Metrics, keys: &[&str]) -> Vec<Option<f64>> {
    keys.iter()
        .map(|key| metric_value(metrics, key).ok().flatten())
        .collect()
}

/// Measured values of one preset's design: `runs[k][level][seed][metric]`, for studied key
/// `k` (as `studied_keys`), level 0 to 2 and each seed; a run that could not grow or measure is
/// an empty row.
pub type DesignValues = Vec<[Vec<Vec<Option<f64>>>; LEVELS]>;

/// The study of one preset.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Identifiability {
    /// The studied parameters, as `studied_keys`.
    pub keys: Vec<StudiedKey>,
    /// The metrics, as `metric_keys`.
    pub metrics: Vec<String>,
    /// Seed-to-seed spread of each metric: the pooled sample standard deviation over every
    /// level of every key (`None` when undefined or zero).
    pub spread: Vec<Option<f64>>,
    /// `ratio[k][m]`: change of metric `m`'s mean per step of key `k` (half the difference
    /// between its high and low levels) over the metric's spread; `None` when either is
    /// undefined.
    pub ratio: Vec<Vec<Option<f64>>>,
    /// Singular values of the matrix of ratios (undefined as 0), largest first.
    pub singular_values: Vec<f64>,
    /// How many singular values exceed `DIRECTION_THRESHOLD`.
    pub directions: usize,
    /// Singular values of the matrix without the rows of `SIZE_METRICS`, largest first.
    pub size_free_singular_values: Vec<f64>,
    /// How many of those exceed `DIRECTION_THRESHOLD`: the directions that densities, angles,
    /// ratios and shape see.
    pub size_free_directions: usize,
    /// Pairs of keys whose ratio columns have a cosine above `CONFOUNDED_COSINE` in absolute
    /// value, with the cosine; only keys that move some metric by `SEEN_RATIO` count.
    pub confounded: Vec<(String, String, f64)>,
    /// Pairs confounded as in `confounded`, judged on the metrics outside `SIZE_METRICS` only
    /// (the totals, moved by most parameters through size, make many columns parallel); only
    /// keys that move some of those metrics by `SEEN_RATIO` count.
    pub size_free_confounded: Vec<(String, String, f64)>,
    /// Keys that move no metric by `SEEN_RATIO` spreads per step.
    pub unseen: Vec<String>,
}

/// The study of one preset from its measured values (`values[k]` for `keys[k]`).
pub fn identifiability(
    keys: &[StudiedKey],
    metrics: &[&str],
    values: &DesignValues,
) -> Identifiability {
    let metric_count = metrics.len();
    let spread: Vec<Option<f64>> = (0..metric_count)
        .map(|m| {
            let (mut sum, mut freedom) = (0.0, 0usize);
            for levels in values {
                for runs in levels {
                    let column: Vec<f64> = runs
                        .iter()
                        .filter_map(|row| row.get(m).copied().flatten())
                        .collect();
                    if column.len() < 2 {
                        continue;
                    }
                    let mean = column.iter().sum::<f64>() / column.len() as f64;
                    sum += column.iter().map(|v| (v - mean) * (v - mean)).sum::<f64>();
                    freedom += column.len() - 1;
                }
            }
            let spread = (freedom > 0).then(|| libm::sqrt(sum / freedom as f64));
            spread.filter(|&spread| spread > 0.0)
        })
        .collect();
    let mean = |runs: &[Vec<Option<f64>>], m: usize| {
        let column: Vec<f64> = runs
            .iter()
            .filter_map(|row| row.get(m).copied().flatten())
            .collect();
        (!column.is_empty()).then(|| column.iter().sum::<f64>() / column.len() as f64)
    };
    let ratio: Vec<Vec<Option<f64>>> = values
        .iter()
        .map(|levels| {
            (0..metric_count)
                .map(|m| {
                    let low = mean(&levels[0], m)?;
                    let high = mean(&levels[LEVELS - 1], m)?;
                    let per_step = (high - low) / (LEVELS - 1) as f64;
                    Some(per_step / spread[m]?)
                })
                .collect()
        })
        .collect();
    // Columns are keys, rows metrics.
    let matrix: Vec<Vec<f64>> = ratio
        .iter()
        .map(|column| column.iter().map(|value| value.unwrap_or(0.0)).collect())
        .collect();
    let singular_values = singular_values(&matrix);
    let above = |values: &[f64]| {
        values
            .iter()
            .filter(|&&value| value > DIRECTION_THRESHOLD)
            .count()
    };
    let directions = above(&singular_values);
    let size_free: Vec<Vec<f64>> = matrix
        .iter()
        .map(|column| {
            column
                .iter()
                .zip(metrics)
                .filter(|(_, metric)| !SIZE_METRICS.contains(metric))
                .map(|(value, _)| *value)
                .collect()
        })
        .collect();
    let size_free_singular_values = self::singular_values(&size_free);
    let size_free_directions = above(&size_free_singular_values);
    let seen = seen_columns(&matrix);
    let confounded = confounded_pairs(keys, &matrix);
    let size_free_confounded = confounded_pairs(keys, &size_free);
    let unseen = keys
        .iter()
        .zip(&seen)
        .filter(|(_, &seen)| !seen)
        .map(|(key, _)| key.key.clone())
        .collect();
    Identifiability {
        keys: keys.to_vec(),
        metrics: metrics.iter().map(|key| key.to_string()).collect(),
        spread,
        ratio,
        singular_values,
        directions,
        size_free_singular_values,
        size_free_directions,
        confounded,
        size_free_confounded,
        unseen,
    }
}

/// Whether each column has an entry of at least `SEEN_RATIO` in absolute value.
fn seen_columns(columns: &[Vec<f64>]) -> Vec<bool> {
    columns
        .iter()
        .map(|column| column.iter().any(|value| value.abs() >= SEEN_RATIO))
        .collect()
}

/// Pairs of seen columns whose cosine exceeds `CONFOUNDED_COSINE` in absolute value.
fn confounded_pairs(keys: &[StudiedKey], columns: &[Vec<f64>]) -> Vec<(String, String, f64)> {
    let seen = seen_columns(columns);
    let mut pairs = Vec::new();
    for a in 0..keys.len() {
        for b in a + 1..keys.len() {
            if !(seen[a] && seen[b]) {
                continue;
            }
            let cosine = cosine(&columns[a], &columns[b]);
            if cosine.abs() > CONFOUNDED_COSINE {
                pairs.push((keys[a].key.clone(), keys[b].key.clone(), cosine));
            }
        }
    }
    pairs
}

/// Cosine of the angle between two vectors (0 when either is zero).
pub fn cosine(a: &[f64], b: &[f64]) -> f64 {
    let dot: f64 = a.iter().zip(b).map(|(x, y)| x * y).sum();
    let norm_a = libm::sqrt(a.iter().map(|x| x * x).sum());
    let norm_b = libm::sqrt(b.iter().map(|x| x * x).sum());
    if norm_a > 0.0 && norm_b > 0.0 {
        dot / (norm_a * norm_b)
    } else {
        0.0
    }
}

/// Sweeps of the one-sided Jacobi method before it gives up (it converges in well under 20 for
/// matrices of this size: Golub & Van Loan 2013, Matrix Computations, 4th ed., section 8.6).
const JACOBI_SWEEPS: usize = 60;

/// Singular values, largest first, of the matrix whose columns are `columns` (each of the same
/// length), by the one-sided Jacobi method (Hestenes 1958, J. SIAM 6; Golub & Van Loan 2013,
/// section 8.6.3): plane rotations of column pairs until every pair is orthogonal; the
/// singular values are then the column norms. Exact to rounding for the small matrices here.
pub fn singular_values(columns: &[Vec<f64>]) -> Vec<f64> {
    let mut columns: Vec<Vec<f64>> = columns.to_vec();
    let count = columns.len();
    for _ in 0..JACOBI_SWEEPS {
        let mut rotated = false;
        for p in 0..count {
            for q in p + 1..count {
                let (alpha, beta, gamma) = columns[p]
                    .iter()
                    .zip(&columns[q])
                    .fold((0.0, 0.0, 0.0), |(alpha, beta, gamma), (x, y)| {
                        (alpha + x * x, beta + y * y, gamma + x * y)
                    });
                if gamma == 0.0 || gamma.abs() <= 1e-15 * libm::sqrt(alpha * beta) {
                    continue;
                }
                rotated = true;
                let zeta = (beta - alpha) / (2.0 * gamma);
                let t = zeta.signum() / (zeta.abs() + libm::sqrt(1.0 + zeta * zeta));
                let t = if zeta == 0.0 { 1.0 } else { t };
                let c = 1.0 / libm::sqrt(1.0 + t * t);
                let s = c * t;
                let (left, right) = columns.split_at_mut(q);
                for (x, y) in left[p].iter_mut().zip(right[0].iter_mut()) {
                    let (a, b) = (*x, *y);
                    *x = c * a - s * b;
                    *y = s * a + c * b;
                }
            }
        }
        if !rotated {
            break;
        }
    }
    let mut values: Vec<f64> = columns
        .iter()
        .map(|column| libm::sqrt(column.iter().map(|x| x * x).sum()))
        .collect();
    values.sort_by(|a, b| b.total_cmp(a));
    values
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The matrix [[3, 0], [4, 5]] has A^T A = [[25, 20], [20, 25]], whose eigenvalues 45 and 5
    /// (worked by hand: 25 +- 20) are the squared singular values: sqrt(45) and sqrt(5).
    /// [[1, 2], [2, 4]] has rank 1: singular values 5 and 0 (its one column direction (1, 2)
    /// scaled by (1, 2): norm sqrt(5) * sqrt(5)).
    #[test]
    fn singular_values_of_worked_examples() {
        let values = singular_values(&[vec![3.0, 4.0], vec![0.0, 5.0]]);
        assert!((values[0] - 45f64.sqrt()).abs() < 1e-12, "{values:?}");
        assert!((values[1] - 5f64.sqrt()).abs() < 1e-12, "{values:?}");
        let values = singular_values(&[vec![1.0, 2.0], vec![2.0, 4.0]]);
        assert!((values[0] - 5.0).abs() < 1e-12, "{values:?}");
        assert!(values[1].abs() < 1e-7, "{values:?}");
        // A diagonal matrix's singular values are its diagonal's absolute values, sorted.
        let values = singular_values(&[
            vec![0.0, 0.0, -2.0],
            vec![7.0, 0.0, 0.0],
            vec![0.0, 0.5, 0.0],
        ]);
        assert_eq!(values, vec![7.0, 2.0, 0.5]);
    }

    /// Three keys on two metrics: `a` moves metric 0, `b` metric 1, `c` metric 0 exactly as `a`
    /// does. Two directions; `a` and `c` confounded (cosine 1); `d` moves nothing.
    #[test]
    fn parallel_columns_are_confounded() {
        let key = |name: &str| StudiedKey {
            key: name.to_string(),
            scale: FitScale::Linear,
            levels: [0.0, 1.0, 2.0],
        };
        let keys = [key("a"), key("b"), key("c"), key("d")];
        // Two seeds per level, 1 below and 1 above the level's mean: a pooled sample standard
        // deviation of sqrt(2).
        let runs = |m0: f64, m1: f64| {
            vec![
                vec![Some(m0 - 1.0), Some(m1 - 1.0)],
                vec![Some(m0 + 1.0), Some(m1 + 1.0)],
            ]
        };
        let values: DesignValues = vec![
            [runs(0.0, 0.0), runs(10.0, 0.0), runs(20.0, 0.0)],
            [runs(0.0, 0.0), runs(0.0, 5.0), runs(0.0, 10.0)],
            [runs(0.0, 0.0), runs(10.0, 0.0), runs(20.0, 0.0)],
            [runs(0.0, 0.0), runs(0.0, 0.0), runs(0.0, 0.0)],
        ];
        let study = identifiability(&keys, &["m0", "m1"], &values);
        let spread = 2f64.sqrt();
        assert!((study.spread[0].unwrap() - spread).abs() < 1e-12);
        assert!((study.ratio[0][0].unwrap() - 10.0 / spread).abs() < 1e-12);
        assert!((study.ratio[1][1].unwrap() - 5.0 / spread).abs() < 1e-12);
        assert_eq!(study.directions, 2);
        assert_eq!(study.confounded.len(), 1);
        assert_eq!(
            (&study.confounded[0].0[..], &study.confounded[0].1[..]),
            ("a", "c")
        );
        assert_eq!(study.unseen, vec!["d".to_string()]);
    }

    #[test]
    fn levels_stay_inside_the_bounds() {
        for preset in crate::presets::presets() {
            for studied in studied_keys(&preset.params) {
                let spec = parameters()
                    .iter()
                    .find(|spec| spec.key == studied.key)
                    .unwrap();
                let bounds = spec.bounds.unwrap();
                assert!(studied.levels[0] < studied.levels[2], "{studied:?}");
                for level in studied.levels {
                    assert!(bounds.contains(level), "{}: {studied:?}", preset.name);
                }
            }
        }
    }
}
