//! Parameter recovery, the usual coverage test of approximate Bayesian computation (Prangle et
//! al. 2014, "Diagnostic tools for approximate Bayesian computation using the coverage
//! property", Aust. N. Z. J. Stat. 56, from memory): specimens are grown with true values drawn
//! from the prior, each is fitted, and the 90 % interval must cover the true value in at least
//! 80 % of 20 cases per fitted key (ABC's tolerance makes intervals wider, never narrower, when
//! the sampler is right; a wrong adjustment or weighting shows as under-coverage). The table is
//! printed with `--nocapture`.

use ramulus_core::fit::simulate::run_job;
use ramulus_core::fit::{Fit, FitPlan, FittedKey, Job, Method, Outcome, Target};
use ramulus_core::params::table::FitScale;
use ramulus_core::params::{Params, Root};

/// Small leaves (700 cells on a 40 x 50 lattice), so 20 fits stay quick.
fn base() -> Params {
    let mut params = Params::default();
    params.domain.width = 40;
    params.domain.height = 50;
    params.domain.roots = vec![Root {
        x: 20,
        y: 47,
        outflow: [0.0, 1.0],
    }];
    params.run.cells = 700;
    params.run.threshold = None;
    params
}

fn fitted() -> Vec<FittedKey> {
    vec![
        FittedKey {
            key: "w_turn".into(),
            low: 0.2,
            high: 3.0,
            scale: FitScale::Linear,
        },
        FittedKey {
            key: "branch_angle".into(),
            low: 20.0,
            high: 90.0,
            scale: FitScale::Linear,
        },
    ]
}

const METRICS: [&str; 3] = ["branching_angle_mean", "branching_angle_sd", "tortuosity"];

/// Runs jobs on two threads, outcomes in job order.
fn run_all(plan: &FitPlan, jobs: &[Job]) -> Vec<Outcome> {
    let half = jobs.len().div_ceil(2);
    std::thread::scope(|scope| {
        let parts: Vec<_> = jobs
            .chunks(half.max(1))
            .map(|part| {
                scope.spawn(move || {
                    part.iter()
                        .map(|job| run_job(plan, job))
                        .collect::<Vec<_>>()
                })
            })
            .collect();
        parts
            .into_iter()
            .flat_map(|handle| handle.join().expect("a worker thread"))
            .collect()
    })
}

#[test]
fn ninety_percent_intervals_cover_true_values_in_at_least_80_percent_of_cases() {
    let cases = 20;
    let keys = fitted();
    let mut covered = vec![0; keys.len()];
    let mut rows = Vec::new();
    for case in 0..cases {
        // True values spread over the prior by a fixed low-discrepancy sequence (golden ratio
        // steps), the specimen grown with its own seed.
        let golden = 0.618_033_988_749_895;
        let fractions = [
            (0.5 + case as f64 * golden).fract(),
            (0.25 + case as f64 * golden * golden).fract(),
        ];
        let truth: Vec<f64> = keys
            .iter()
            .zip(fractions)
            .map(|(key, f)| key.low + f * (key.high - key.low))
            .collect();
        let probe = FitPlan {
            base: base(),
            fitted: keys.clone(),
            targets: METRICS
                .iter()
                .map(|key| Target {
                    key: key.to_string(),
                    weight: None,
                    observed: 0.0,
                })
                .collect(),
            replicates: 1,
            seed: 1000 + case,
            method: Method::Quick {
                simulations: 400,
                accepted: 40,
            },
        };
        let specimen = run_job(
            &probe,
            &Job {
                values: truth.clone(),
                seeds: vec![77 + case],
            },
        );
        let observed = specimen.means(METRICS.len());
        let mut plan = probe.clone();
        for (target, value) in plan.targets.iter_mut().zip(&observed) {
            target.observed = value.expect("the specimen defines every metric");
        }
        let mut fit = Fit::new(plan.clone()).expect("a valid plan");
        while let Some(jobs) = fit.next_batch() {
            let outcomes = run_all(&plan, &jobs);
            fit.absorb(outcomes).expect("outcomes match");
        }
        let result = fit.result().expect("a result");
        for (index, interval) in result.posterior.iter().enumerate() {
            let inside = interval.low <= truth[index] && truth[index] <= interval.high;
            covered[index] += usize::from(inside);
            rows.push(format!(
                "case {case:>2} {:<13} true {:>8.3}  90 % [{:>8.3}, {:>8.3}]  {}",
                interval.key,
                truth[index],
                interval.low,
                interval.high,
                if inside { "covered" } else { "missed" }
            ));
        }
    }
    println!("{}", rows.join("\n"));
    for (key, count) in keys.iter().zip(&covered) {
        println!("{}: covered in {count} of {cases} cases", key.key);
        assert!(
            *count as f64 >= 0.8 * cases as f64,
            "{}: the 90 % interval covered the true value in only {count} of {cases} cases",
            key.key
        );
    }
}
