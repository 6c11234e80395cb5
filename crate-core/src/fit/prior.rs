//! Random draws of the sampler: uniform numbers, the prior (uniform over each fitted key's
//! bounds, in the value or in its logarithm), normal numbers and the normal distribution
//! function. Only the plan's ChaCha8 generator and `libm` are used, so every platform draws
//! the same numbers.

use rand_chacha::rand_core::RngCore;
use rand_chacha::ChaCha8Rng;

use super::plan::FittedKey;

/// A uniform number in [0, 1): the top 53 bits of one 64-bit draw.
pub fn uniform(rng: &mut ChaCha8Rng) -> f64 {
    (rng.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
}

/// A standard normal number by the Box-Muller transform (Box & Muller 1958, Ann. Math. Stat.
/// 29), using the cosine branch only.
pub fn normal(rng: &mut ChaCha8Rng) -> f64 {
    let u1 = 1.0 - uniform(rng); // in (0, 1]
    let u2 = uniform(rng);
    libm::sqrt(-2.0 * libm::log(u1)) * libm::cos(2.0 * core::f64::consts::PI * u2)
}

/// The standard normal distribution function, Phi(x) = (1 + erf(x / sqrt 2)) / 2.
pub fn normal_cdf(x: f64) -> f64 {
    0.5 * (1.0 + libm::erf(x / core::f64::consts::SQRT_2))
}

/// A draw from the prior, in sampler coordinates (uniform between the coordinate bounds).
pub fn draw(fitted: &[FittedKey], rng: &mut ChaCha8Rng) -> Vec<f64> {
    fitted
        .iter()
        .map(|key| {
            let (low, high) = key.coordinate_bounds();
            low + (high - low) * uniform(rng)
        })
        .collect()
}

/// Whether a point in sampler coordinates lies inside the prior's support.
pub fn inside(fitted: &[FittedKey], coordinates: &[f64]) -> bool {
    fitted.iter().zip(coordinates).all(|(key, &coordinate)| {
        let (low, high) = key.coordinate_bounds();
        (low..=high).contains(&coordinate)
    })
}

/// Values (in the parameters' units) of a point in sampler coordinates.
pub fn values(fitted: &[FittedKey], coordinates: &[f64]) -> Vec<f64> {
    fitted
        .iter()
        .zip(coordinates)
        .map(|(key, &coordinate)| key.to_value(coordinate))
        .collect()
}

/// Sampler coordinates of values.
pub fn coordinates(fitted: &[FittedKey], values: &[f64]) -> Vec<f64> {
    fitted
        .iter()
        .zip(values)
        .map(|(key, &value)| key.to_coordinate(value))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand_chacha::rand_core::SeedableRng;

    /// The uniform draws have mean 1/2 and variance 1/12 (the uniform distribution's moments);
    /// the normal draws mean 0 and variance 1, within 4 standard errors over 200,000 draws.
    #[test]
    fn draws_have_the_moments_of_their_distributions() {
        let mut rng = ChaCha8Rng::seed_from_u64(5);
        let n = 200_000;
        let uniforms: Vec<f64> = (0..n).map(|_| uniform(&mut rng)).collect();
        let mean = uniforms.iter().sum::<f64>() / n as f64;
        let variance = uniforms.iter().map(|u| (u - mean).powi(2)).sum::<f64>() / n as f64;
        assert!(
            (mean - 0.5).abs() < 4.0 * (1.0 / 12.0f64 / n as f64).sqrt(),
            "{mean}"
        );
        assert!((variance - 1.0 / 12.0).abs() < 1e-3, "{variance}");
        let normals: Vec<f64> = (0..n).map(|_| normal(&mut rng)).collect();
        let mean = normals.iter().sum::<f64>() / n as f64;
        let variance = normals.iter().map(|z| (z - mean).powi(2)).sum::<f64>() / n as f64;
        assert!(mean.abs() < 4.0 / (n as f64).sqrt(), "{mean}");
        assert!((variance - 1.0).abs() < 0.02, "{variance}");
    }

    /// Phi(0) = 0.5, Phi(1.6449) = 0.95, Phi(-1.96) = 0.025 (standard normal table, e.g.
    /// Abramowitz & Stegun 1964, table 26.1).
    #[test]
    fn the_normal_distribution_function_matches_the_table() {
        assert!((normal_cdf(0.0) - 0.5).abs() < 1e-15);
        assert!((normal_cdf(1.644_853_6) - 0.95).abs() < 1e-7);
        assert!((normal_cdf(-1.959_964) - 0.025).abs() < 1e-7);
    }
}
