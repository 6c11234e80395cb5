//! The statistics of the sampler: distances between metric vectors, the spread that
//! standardises each metric, weighted quantiles, and weighted least squares for the regression
//! adjustment.

use super::plan::Target;

/// The spread of each metric over simulated values (one row per simulation, `None` where a
/// metric is undefined): the median absolute deviation times 1.4826, which equals the
/// standard deviation for normal data (Hampel 1974, J. Am. Stat. Assoc. 69); where that is 0,
/// the standard deviation; where that is 0 too (a metric no simulation moved), 1.
pub fn spreads(rows: &[Vec<Option<f64>>], metrics: usize) -> Vec<f64> {
    (0..metrics)
        .map(|k| {
            let mut values: Vec<f64> = rows.iter().filter_map(|row| row[k]).collect();
            if values.len() < 2 {
                return 1.0;
            }
            let median = median_of(&mut values);
            let mut deviations: Vec<f64> = values.iter().map(|v| (v - median).abs()).collect();
            let mad = 1.4826 * median_of(&mut deviations);
            if mad > 0.0 && mad.is_finite() {
                return mad;
            }
            let mean = values.iter().sum::<f64>() / values.len() as f64;
            let variance = values.iter().map(|v| (v - mean) * (v - mean)).sum::<f64>()
                / (values.len() - 1) as f64;
            let sd = variance.sqrt();
            if sd > 0.0 && sd.is_finite() {
                sd
            } else {
                1.0
            }
        })
        .collect()
}

/// The median of `values` (sorted in place); the mean of the two middle ones for an even
/// count.
pub fn median_of(values: &mut [f64]) -> f64 {
    values.sort_by(f64::total_cmp);
    let n = values.len();
    if n == 0 {
        return f64::NAN;
    }
    if n % 2 == 1 {
        values[n / 2]
    } else {
        0.5 * (values[n / 2 - 1] + values[n / 2])
    }
}

/// The weighted Euclidean distance between simulated means and the specimen, each metric
/// divided by its spread: sqrt(sum_k w_k ((s_k - o_k) / scale_k)^2). Infinite when a metric is
/// undefined.
pub fn distance(means: &[Option<f64>], targets: &[Target], scales: &[f64]) -> f64 {
    let mut sum = 0.0;
    for ((mean, target), scale) in means.iter().zip(targets).zip(scales) {
        let Some(mean) = mean else {
            return f64::INFINITY;
        };
        let z = (mean - target.observed) / scale;
        sum += target.weight.unwrap_or(1.0) * z * z;
    }
    sum.sqrt()
}

/// The `p`-quantile (0 to 1) of weighted values: the smallest value whose cumulative normalised
/// weight reaches `p` (the inverse of the weighted empirical distribution function).
pub fn weighted_quantile(values: &[f64], weights: &[f64], p: f64) -> f64 {
    let mut order: Vec<usize> = (0..values.len()).collect();
    order.sort_by(|&a, &b| values[a].total_cmp(&values[b]).then(a.cmp(&b)));
    let total: f64 = weights.iter().sum();
    let mut cumulative = 0.0;
    for &index in &order {
        cumulative += weights[index] / total;
        if cumulative >= p - 1e-12 {
            return values[index];
        }
    }
    order.last().map_or(f64::NAN, |&index| values[index])
}

/// Weighted mean and variance (weights normalised to sum 1; the variance is the weighted
/// second central moment).
pub fn weighted_moments(values: &[f64], weights: &[f64]) -> (f64, f64) {
    let total: f64 = weights.iter().sum();
    let mean = values.iter().zip(weights).map(|(v, w)| v * w).sum::<f64>() / total;
    let variance = values
        .iter()
        .zip(weights)
        .map(|(v, w)| w * (v - mean) * (v - mean))
        .sum::<f64>()
        / total;
    (mean, variance)
}

/// Weighted least squares: the coefficients `b` minimising sum_i w_i (y_i - x_i . b)^2, by
/// solving the normal equations (X'WX) b = X'Wy with Gaussian elimination and partial
/// pivoting. `None` when X'WX is singular (collinear columns).
pub fn weighted_least_squares(rows: &[Vec<f64>], y: &[f64], weights: &[f64]) -> Option<Vec<f64>> {
    let columns = rows.first()?.len();
    let mut matrix = vec![vec![0.0; columns + 1]; columns];
    for ((row, &target), &weight) in rows.iter().zip(y).zip(weights) {
        for i in 0..columns {
            for j in 0..columns {
                matrix[i][j] += weight * row[i] * row[j];
            }
            matrix[i][columns] += weight * row[i] * target;
        }
    }
    let scale = (0..columns)
        .map(|i| matrix[i][i].abs())
        .fold(0.0_f64, f64::max);
    for pivot in 0..columns {
        let best = (pivot..columns)
            .max_by(|&a, &b| matrix[a][pivot].abs().total_cmp(&matrix[b][pivot].abs()))?;
        if matrix[best][pivot].abs() <= 1e-12 * scale.max(f64::MIN_POSITIVE) {
            return None;
        }
        matrix.swap(pivot, best);
        let (upper, lower) = matrix.split_at_mut(pivot + 1);
        let pivot_row = &upper[pivot];
        for row in lower.iter_mut() {
            let factor = row[pivot] / pivot_row[pivot];
            for (value, &above) in row[pivot..].iter_mut().zip(&pivot_row[pivot..]) {
                *value -= factor * above;
            }
        }
    }
    let mut solution = vec![0.0; columns];
    for row in (0..columns).rev() {
        let known: f64 = (row + 1..columns)
            .map(|column| matrix[row][column] * solution[column])
            .sum();
        solution[row] = (matrix[row][columns] - known) / matrix[row][row];
    }
    solution.iter().all(|b| b.is_finite()).then_some(solution)
}

/// The logit of `x` within `(low, high)`: ln((x - low) / (high - x)); a bounded parameter is
/// adjusted on this scale so that the adjusted values stay inside the prior's bounds.
pub fn logit(x: f64, low: f64, high: f64) -> f64 {
    let span = high - low;
    // Values on the bounds are moved in by a millionth of the span, so the logit is finite.
    let x = x.clamp(low + 1e-6 * span, high - 1e-6 * span);
    libm::log((x - low) / (high - x))
}

/// The inverse of `logit`.
pub fn inverse_logit(y: f64, low: f64, high: f64) -> f64 {
    low + (high - low) / (1.0 + libm::exp(-y))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A worked example: y = 1 + 2 x on x = 0..4 is recovered exactly; with weights, the
    /// weighted mean of y is the intercept of a constant-only fit.
    #[test]
    fn least_squares_recovers_a_line_and_a_weighted_mean() {
        let rows: Vec<Vec<f64>> = (0..5).map(|x| vec![1.0, x as f64]).collect();
        let y: Vec<f64> = (0..5).map(|x| 1.0 + 2.0 * x as f64).collect();
        let b = weighted_least_squares(&rows, &y, &[1.0; 5]).expect("solvable");
        assert!(
            (b[0] - 1.0).abs() < 1e-12 && (b[1] - 2.0).abs() < 1e-12,
            "{b:?}"
        );
        let constant: Vec<Vec<f64>> = vec![vec![1.0]; 3];
        let b = weighted_least_squares(&constant, &[1.0, 2.0, 4.0], &[1.0, 1.0, 2.0])
            .expect("solvable");
        assert!((b[0] - 11.0 / 4.0).abs() < 1e-12, "{b:?}");
        let collinear: Vec<Vec<f64>> = (0..4).map(|x| vec![x as f64, 2.0 * x as f64]).collect();
        assert_eq!(
            weighted_least_squares(&collinear, &[0.0; 4], &[1.0; 4]),
            None
        );
    }

    /// Quantiles of equal weights are the order statistics; the median absolute deviation of
    /// 1..=9 is 2, so the spread is 2.9652.
    #[test]
    fn quantiles_and_spreads_of_small_samples() {
        let values = [5.0, 1.0, 3.0, 2.0, 4.0];
        assert_eq!(weighted_quantile(&values, &[1.0; 5], 0.5), 3.0);
        assert_eq!(weighted_quantile(&values, &[1.0; 5], 0.05), 1.0);
        assert_eq!(weighted_quantile(&values, &[1.0; 5], 0.95), 5.0);
        assert_eq!(
            weighted_quantile(&values, &[0.0, 0.0, 0.0, 0.0, 1.0], 0.5),
            4.0
        );
        let rows: Vec<Vec<Option<f64>>> = (1..=9).map(|v| vec![Some(v as f64)]).collect();
        assert!((spreads(&rows, 1)[0] - 2.9652).abs() < 1e-12);
        let x = 0.3;
        assert!((inverse_logit(logit(x, 0.0, 2.0), 0.0, 2.0) - x).abs() < 1e-12);
    }
}
