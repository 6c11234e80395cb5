//! One job run: each replicate grows the plan's base parameters with the job's values and
//! seed, and is measured by the same pipeline as every run; a run that cannot start or
//! measure gives no values (it is never accepted), never an error that stops the fit.

use super::plan::{metric_value, FitPlan};
use super::{Job, Outcome};
use crate::growth::Growth;
use crate::run::RunView;

/// Grows and measures every replicate of `job`.
pub fn run_job(plan: &FitPlan, job: &Job) -> Outcome {
    let replicates = job
        .seeds
        .iter()
        .map(|&seed| {
            let params = plan.params_for(&job.values, seed);
            let measured = Growth::new(&params).ok().and_then(|mut growth| {
                growth.run();
                RunView::new(growth.into_network(), &params).ok()
            });
            plan.targets
                .iter()
                .map(|target| {
                    measured
                        .as_ref()
                        .and_then(|view| metric_value(&view.metrics, &target.key).ok().flatten())
                })
                .collect()
        })
        .collect();
    Outcome { replicates }
}
