//! `FittedLine` and `fit_line`: ordinary least squares of y on x, the fit behind the Horton
//! ratios and the Hack exponent.

/// A straight line `y = slope * x + intercept`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct FittedLine {
    /// Change of y per unit of x.
    pub(crate) slope: f64,
    /// Value of y at x = 0.
    pub(crate) intercept: f64,
}

/// Least-squares line of y on x; `None` with fewer than two points, when every x is the same
/// (no spread), or when a point is not finite.
///
/// Sums are taken about the means, which keeps the fit accurate when x is far from zero. The
/// spread test compares the smallest and largest x exactly, since the mean of equal values can
/// differ from them in the last bit.
pub(crate) fn fit_line(points: &[(f64, f64)]) -> Option<FittedLine> {
    if points.len() < 2
        || points
            .iter()
            .any(|&(x, y)| !x.is_finite() || !y.is_finite())
    {
        return None;
    }
    let smallest_x = points.iter().map(|&(x, _)| x).fold(f64::INFINITY, f64::min);
    let largest_x = points
        .iter()
        .map(|&(x, _)| x)
        .fold(f64::NEG_INFINITY, f64::max);
    if smallest_x == largest_x {
        return None;
    }
    let count = points.len() as f64;
    let mean_x = points.iter().map(|&(x, _)| x).sum::<f64>() / count;
    let mean_y = points.iter().map(|&(_, y)| y).sum::<f64>() / count;
    let mut spread_x = 0.0;
    let mut spread_xy = 0.0;
    for &(x, y) in points {
        spread_x += (x - mean_x) * (x - mean_x);
        spread_xy += (x - mean_x) * (y - mean_y);
    }
    if spread_x <= 0.0 {
        return None;
    }
    let slope = spread_xy / spread_x;
    let line = FittedLine {
        slope,
        intercept: mean_y - slope * mean_x,
    };
    (line.slope.is_finite() && line.intercept.is_finite()).then_some(line)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Points on y = 3x + 1 give slope 3 and intercept 1 (the least-squares line through
    /// collinear points is that line).
    #[test]
    fn exact_line_is_recovered() {
        let points: Vec<(f64, f64)> = [-2.0, 0.0, 1.0, 4.0, 10.0]
            .iter()
            .map(|&x| (x, 3.0 * x + 1.0))
            .collect();
        let line = fit_line(&points).unwrap_or(FittedLine {
            slope: f64::NAN,
            intercept: f64::NAN,
        });
        assert!((line.slope - 3.0).abs() < 1e-12, "{}", line.slope);
        assert!((line.intercept - 1.0).abs() < 1e-12, "{}", line.intercept);
    }

    /// (0,0), (1,1), (2,0), (3,1): mean x 1.5, mean y 0.5, Sxy = 1, Sxx = 5, slope 0.2,
    /// intercept 0.2 (hand computation of the normal equations).
    #[test]
    fn scattered_points_by_hand() {
        let line =
            fit_line(&[(0.0, 0.0), (1.0, 1.0), (2.0, 0.0), (3.0, 1.0)]).unwrap_or(FittedLine {
                slope: f64::NAN,
                intercept: f64::NAN,
            });
        assert!((line.slope - 0.2).abs() < 1e-12, "{}", line.slope);
        assert!((line.intercept - 0.2).abs() < 1e-12, "{}", line.intercept);
    }

    /// One point, or no spread in x, defines no slope.
    #[test]
    fn degenerate_inputs_have_no_line() {
        assert_eq!(fit_line(&[]), None);
        assert_eq!(fit_line(&[(1.0, 2.0)]), None);
        assert_eq!(fit_line(&[(0.1, 2.0), (0.1, 3.0), (0.1, 4.0)]), None);
        assert_eq!(fit_line(&[(0.0, 2.0), (f64::NAN, 3.0)]), None);
    }
}
