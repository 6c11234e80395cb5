//! `ramulus bench --fit`: how long a fit takes and how it scales: a 3-key quick fit with 4
//! metrics and 4 seeds per set against a 20,000-cell broad-leaf specimen (the sensitivity
//! design, the fit and the predictive check), on one core and on every core; then the fit's
//! batch split into 1, 2 and 4 shards, timing each shard alone (on a cluster they run at once,
//! so the slowest shard is the wall time). Prints figures; never fails on slowness.

use std::time::Instant;

use ramulus_core::fit::plan::metric_value;
use ramulus_core::fit::sensitivity::{design_jobs, predictive_jobs};
use ramulus_core::fit::simulate::run_job;
use ramulus_core::fit::{Fit, FitPlan, FittedKey, Job, Method, Outcome, Target};
use ramulus_core::growth::Growth;
use ramulus_core::params::table::FitScale;
use ramulus_core::run::RunView;
use rayon::prelude::*;

use crate::options::CliError;

const METRICS: [&str; 4] = [
    "transport_cost",
    "branching_angle_mean",
    "tortuosity",
    "bifurcation_ratio",
];

fn plan(cells: u64, simulations: u32) -> Result<FitPlan, CliError> {
    let mut base = ramulus_core::presets::preset("ovate-leaf")
        .ok_or_else(|| CliError::Failed("preset ovate-leaf is missing".into()))?;
    base.run.cells = cells;
    let mut specimen = base.clone();
    specimen.costs.alpha = 0.6;
    specimen.run.seed = 3;
    let mut growth = Growth::new(&specimen).map_err(|e| CliError::Failed(e.to_string()))?;
    growth.run();
    let view = RunView::new(growth.into_network(), &specimen)
        .map_err(|e| CliError::Failed(e.to_string()))?;
    let targets = METRICS
        .iter()
        .map(|key| {
            let observed = metric_value(&view.metrics, key)
                .ok()
                .flatten()
                .ok_or_else(|| CliError::Failed(format!("the specimen lacks {key}")))?;
            Ok(Target {
                key: key.to_string(),
                weight: None,
                observed,
            })
        })
        .collect::<Result<Vec<_>, CliError>>()?;
    let key = |key: &str, low: f64, high: f64| FittedKey {
        key: key.into(),
        low,
        high,
        scale: FitScale::Linear,
    };
    Ok(FitPlan {
        base,
        fitted: vec![
            key("alpha", 0.3, 0.9),
            key("w_turn", 0.5, 3.0),
            key("branch_angle", 20.0, 80.0),
        ],
        targets,
        replicates: 4,
        seed: 1,
        method: Method::Quick {
            simulations,
            accepted: simulations / 10,
        },
    })
}

fn run_on(pool: &rayon::ThreadPool, plan: &FitPlan, jobs: &[Job]) -> Vec<Outcome> {
    pool.install(|| jobs.par_iter().map(|job| run_job(plan, job)).collect())
}

/// A whole fit (design, batch, predictive check) on `threads` threads: seconds and runs.
fn whole_fit(plan: &FitPlan, threads: usize) -> Result<(f64, usize), CliError> {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .map_err(|e| CliError::Failed(e.to_string()))?;
    let start = Instant::now();
    let design = design_jobs(plan);
    let mut runs: usize = design.iter().map(|job| job.seeds.len()).sum();
    run_on(&pool, plan, &design);
    let mut fit = Fit::new(plan.clone()).map_err(|e| CliError::Failed(e.to_string()))?;
    while let Some(jobs) = fit.next_batch() {
        runs += jobs.iter().map(|job| job.seeds.len()).sum::<usize>();
        let outcomes = run_on(&pool, plan, &jobs);
        fit.absorb(outcomes)
            .map_err(|e| CliError::Failed(e.to_string()))?;
    }
    let result = fit.result().map_err(|e| CliError::Failed(e.to_string()))?;
    let predictive = predictive_jobs(plan, &result, 20);
    runs += predictive.len();
    run_on(&pool, plan, &predictive);
    Ok((start.elapsed().as_secs_f64(), runs))
}

/// Prints the figures.
pub fn run(quick: bool) -> Result<(), CliError> {
    let (cells, simulations) = if quick { (2_000, 60) } else { (20_000, 300) };
    let plan = plan(cells, simulations)?;
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    say!(
        "fit of 3 keys, 4 metrics, 4 seeds per set, {simulations} sets (quick method) against a \
         {cells}-cell broad-leaf specimen; with the sensitivity design and 20 predictive runs"
    );
    let mut single = 0.0;
    for threads in [1, cores] {
        let (seconds, runs) = whole_fit(&plan, threads)?;
        if threads == 1 {
            single = seconds;
        }
        say!(
            "  {threads} thread(s): {seconds:.1} s, {runs} growth runs, {:.1} runs/s, speed-up {:.2}",
            runs as f64 / seconds,
            single / seconds
        );
        if cores == 1 {
            break;
        }
    }
    let mut fit = Fit::new(plan.clone()).map_err(|e| CliError::Failed(e.to_string()))?;
    let jobs = fit.next_batch().unwrap_or_default();
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .map_err(|e| CliError::Failed(e.to_string()))?;
    let mut whole = 0.0;
    for shards in [1usize, 2, 4] {
        let mut slowest: f64 = 0.0;
        for shard in 0..shards {
            let mine: Vec<Job> = jobs
                .iter()
                .enumerate()
                .filter(|(index, _)| index % shards == shard)
                .map(|(_, job)| job.clone())
                .collect();
            let start = Instant::now();
            run_on(&pool, &plan, &mine);
            slowest = slowest.max(start.elapsed().as_secs_f64());
        }
        if shards == 1 {
            whole = slowest;
        }
        say!(
            "  {shards} shard(s) of one core each: slowest shard {slowest:.1} s, speed-up {:.2} \
             (shards run one after another here; on a cluster at once)",
            whole / slowest
        );
    }
    Ok(())
}
