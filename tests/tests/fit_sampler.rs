//! The fit's samplers against a model whose posterior is known in closed form: the mean mu of
//! normal data with known standard deviation sigma, n observations with sample mean ybar, and a
//! flat prior far wider than the data's information. The posterior is normal with mean ybar
//! and standard deviation sigma / sqrt(n) (Gelman et al., Bayesian Data Analysis, 3rd ed.,
//! section 2.5, the normal prior's limit as its variance grows). The simulator is the model's
//! sufficient statistic: a simulated sample mean mu + (sigma / sqrt n) Z.
//!
//! Names in the plan are real keys and metrics only because the plan checks them; the outcomes
//! come from the model here, not from growth.

use ramulus_core::fit::prior::normal;
use ramulus_core::fit::{Fit, FitPlan, FitResult, FittedKey, Method, Outcome, Target};
use ramulus_core::params::table::FitScale;
use ramulus_core::params::Params;
use rand_chacha::rand_core::SeedableRng;
use rand_chacha::ChaCha8Rng;

const SIGMA: f64 = 0.2;
const N: f64 = 25.0;
const YBAR: f64 = 0.13;
/// z of the 95th percentile of the standard normal (Abramowitz & Stegun 1964, table 26.1).
const Z95: f64 = 1.644_853_6;

fn plan(method: Method, seed: u64) -> FitPlan {
    FitPlan {
        base: Params::default(),
        fitted: vec![FittedKey {
            key: "grade_x".into(),
            low: -1.0,
            high: 1.0,
            scale: FitScale::Linear,
        }],
        targets: vec![Target {
            key: "area".into(),
            weight: None,
            observed: YBAR,
        }],
        replicates: 1,
        seed,
        method,
    }
}

/// Runs a fit to the end with the normal model as simulator.
fn run(plan: FitPlan) -> FitResult {
    let mut fit = Fit::new(plan).expect("a valid plan");
    while let Some(jobs) = fit.next_batch() {
        let outcomes = jobs
            .iter()
            .map(|job| {
                let mut rng = ChaCha8Rng::seed_from_u64(job.seeds[0]);
                let mean = job.values[0] + SIGMA / N.sqrt() * normal(&mut rng);
                Outcome {
                    replicates: vec![vec![Some(mean)]],
                }
            })
            .collect();
        fit.absorb(outcomes).expect("outcomes match the jobs");
    }
    fit.result().expect("a result")
}

fn check(result: &FitResult, tolerance: f64, label: &str) {
    let sd = SIGMA / N.sqrt();
    let interval = &result.posterior[0];
    assert!(
        (interval.median - YBAR).abs() < tolerance,
        "{label}: median {} against {YBAR}",
        interval.median
    );
    assert!(
        (interval.low - (YBAR - Z95 * sd)).abs() < tolerance,
        "{label}: 5 % point {} against {}",
        interval.low,
        YBAR - Z95 * sd
    );
    assert!(
        (interval.high - (YBAR + Z95 * sd)).abs() < tolerance,
        "{label}: 95 % point {} against {}",
        interval.high,
        YBAR + Z95 * sd
    );
}

/// Rejection with regression adjustment recovers the closed-form posterior: the model is
/// linear in mu, so the adjustment is exact up to Monte Carlo error (about 0.004 for the
/// interval ends with 500 accepted; 0.012 allowed).
#[test]
fn the_quick_method_recovers_the_normal_mean_posterior() {
    let result = run(plan(
        Method::Quick {
            simulations: 20_000,
            accepted: 500,
        },
        3,
    ));
    assert_eq!(result.simulations, 20_000);
    assert_eq!(result.accepted, 500);
    check(&result, 0.012, "quick");
}

/// ABC-SMC narrows its tolerance generation by generation, and its last population matches
/// the closed form within 0.015 (the tolerance left adds a little width).
#[test]
fn the_sequential_method_recovers_the_normal_mean_posterior() {
    let result = run(plan(
        Method::Sequential {
            population: 1000,
            generations: 6,
        },
        5,
    ));
    assert_eq!(result.generations.len(), 7, "{:?}", result.generations);
    let tolerances: Vec<f64> = result.generations.iter().map(|g| g.tolerance).collect();
    assert!(
        tolerances.windows(2).all(|pair| pair[1] < pair[0]),
        "tolerances shrink: {tolerances:?}"
    );
    let total: f64 = result.particles.iter().map(|p| p.weight).sum();
    assert!((total - 1.0).abs() < 1e-9, "weights sum to {total}");
    check(&result, 0.015, "sequential");
}

/// The same plan and seed give the same posterior, bit for bit; another seed another one.
#[test]
fn a_fit_is_reproducible_from_its_seed() {
    let quick = Method::Quick {
        simulations: 2_000,
        accepted: 100,
    };
    assert_eq!(run(plan(quick, 9)), run(plan(quick, 9)));
    assert_ne!(
        run(plan(quick, 9)).posterior,
        run(plan(quick, 10)).posterior
    );
}
