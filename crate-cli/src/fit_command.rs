//! `ramulus fit` and `ramulus merge`: fit growth parameters to a specimen (a run record) by
//! approximate Bayesian computation on every core, or as shards of a batch scheduler's job
//! array whose files `merge` turns into exactly what the unsharded fit prints.

use std::io::IsTerminal as _;
use std::time::Instant;

use clap::Args;
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use serde_json::json;

use ramulus_core::fit::plan::{fittable, metric_value};
use ramulus_core::fit::sensitivity::{
    design_jobs, predictive_jobs, predictive_rows, sensitivity, PredictiveRow, NOISE_UNITS,
};
use ramulus_core::fit::simulate::run_job;
use ramulus_core::fit::{
    Fit, FitPlan, FitResult, FittedKey, Job, Method, Outcome, Sensitivity, Target,
};
use ramulus_core::link::encode_link;
use ramulus_core::record::read_record;

use crate::commands::{link_parameters, parameter_file, read_text};
use crate::options::{assemble_params, CliError, DEFAULT_PAGE};
use crate::output::OutputPlan;

/// Options of `ramulus fit`.
#[derive(Args)]
#[command(after_help = FIT_NOTES)]
pub struct FitOptions {
    /// The specimen to match: a run record (ramulus grow --record),
    /// a traced specimen (SVG, GeoJSON, CSV edge list) or a
    /// cleared-leaf image (PNG, JPEG; default image steps)
    #[arg(long, value_name = "FILE", required = true, verbatim_doc_comment)]
    pub specimen: String,
    /// How a traced specimen is calibrated and repaired (as for measure;
    /// its length unit defaults to the growth parameters' `units`)
    #[command(flatten)]
    pub tracing: crate::options::SpecimenArgs,
    /// Start from this named parameter set (default: ovate-leaf)
    #[arg(long, value_name = "NAME")]
    pub preset: Option<String>,
    /// Start from the defaults plus the keys of this JSON file
    #[arg(long = "params", value_name = "FILE.json")]
    pub params_file: Option<String>,
    /// Start from a run link (not with --preset or --params)
    #[arg(long, value_name = "LINK", conflicts_with_all = ["preset", "params_file"])]
    pub link: Option<std::ffi::OsString>,
    /// Override one fixed parameter; repeat for more keys
    #[arg(long = "set", value_name = "KEY=VALUE")]
    pub sets: Vec<String>,
    /// Fit KEY between LOW and HIGH (its scale, linear or log,
    /// comes from the parameter table); repeat for more keys
    #[arg(
        long = "fit",
        value_name = "KEY=LOW:HIGH",
        required = true,
        verbatim_doc_comment
    )]
    pub fitted: Vec<String>,
    /// Match this metric of the specimen, with an optional
    /// relative weight (default 1); repeat for more metrics
    #[arg(
        long = "match",
        value_name = "METRIC[=WEIGHT]",
        required = true,
        verbatim_doc_comment
    )]
    pub matched: Vec<String>,
    /// Growth seeds per parameter set; their metrics are averaged
    #[arg(long, value_name = "N", default_value_t = 2)]
    pub replicates: u32,
    /// `sequential` (ABC-SMC, the default) or `quick`
    /// (rejection with regression adjustment; needed for --shard)
    #[arg(long, value_name = "METHOD", default_value = "sequential",
          value_parser = ["sequential", "quick"], verbatim_doc_comment)]
    pub method: String,
    /// Sequential: particles per generation
    #[arg(long, value_name = "N", default_value_t = 200)]
    pub population: u32,
    /// Sequential: generations after the first
    #[arg(long, value_name = "N", default_value_t = 3)]
    pub generations: u32,
    /// Quick: parameter sets drawn from the prior
    #[arg(long, value_name = "N", default_value_t = 2000)]
    pub simulations: u32,
    /// Quick: parameter sets kept (the closest)
    #[arg(long, value_name = "N", default_value_t = 100)]
    pub accept: u32,
    /// Runs drawn from the posterior for the predictive check
    #[arg(long, value_name = "N", default_value_t = 20)]
    pub predictive: u32,
    /// Worker threads (default: every core)
    #[arg(long, value_name = "N")]
    pub jobs: Option<usize>,
    /// Seed of the fit: the same seed gives the same posterior
    #[arg(long, value_name = "S", default_value_t = 1)]
    pub seed: u64,
    /// Run only shard I of N of a quick fit (I from 1 to N)
    /// and write its simulations to --out for `ramulus merge`
    #[arg(long, value_name = "I/N", requires = "out", verbatim_doc_comment)]
    pub shard: Option<String>,
    /// The shard's file (with --shard)
    #[arg(long, value_name = "FILE.json", requires = "shard")]
    pub out: Option<String>,
    /// Address of the page the best run's link opens
    #[arg(long, value_name = "URL", default_value = DEFAULT_PAGE)]
    pub page: String,
    /// Write the pairwise posterior plots and the convergence
    /// plot to this SVG file (not with --shard: merge draws them)
    #[arg(
        long,
        value_name = "OUT.svg",
        conflicts_with = "shard",
        verbatim_doc_comment
    )]
    pub plots: Option<String>,
    /// Print exactly one JSON object on stdout instead of tables
    #[arg(long)]
    pub json: bool,
}

/// Options of `ramulus merge`.
#[derive(Args)]
pub struct MergeOptions {
    /// Shard files written by `ramulus fit --shard I/N --out FILE`
    #[arg(value_name = "SHARD.json", required = true)]
    pub shards: Vec<String>,
    /// Worker threads for the checks merge runs itself (default: every core)
    #[arg(long, value_name = "N")]
    pub jobs: Option<usize>,
    /// Address of the page the best run's link opens
    #[arg(long, value_name = "URL", default_value = DEFAULT_PAGE)]
    pub page: String,
    /// Write the pairwise posterior plots and the convergence
    /// plot to this SVG file
    #[arg(long, value_name = "OUT.svg", verbatim_doc_comment)]
    pub plots: Option<String>,
    /// Print exactly one JSON object on stdout instead of tables
    #[arg(long)]
    pub json: bool,
}

const FIT_NOTES: &str = "\
Before the fit, a sensitivity design (each fitted key at 10 % and 90 % of its range, 4 seeds
each) says which keys the matched metrics can identify; a key no metric moves by twice its
seed noise is named in a warning. The fit then samples the posterior; the result gives each
key's median and 90 % credible interval, a posterior predictive check (metrics of runs drawn
from the posterior beside the specimen's) and a link to the best run.

With --json stdout holds one object: posterior (key -> median, low, high), best_link,
accepted, simulations, generations (tolerance, simulations, accepted), sensitivity (rows of
key, metric, effect, noise, ratio; unidentifiable keys), predictive (metric, specimen,
median, low, high, inside), notes.

On a cluster: run `ramulus fit ... --method quick --shard I/N --out shard-I.json` for I = 1..N
(a job array; see examples/fit-array.sbatch), then `ramulus merge shard-*.json`.";

/// A shard file: the plan, which shard, and its simulations' outcomes by job index.
#[derive(Serialize, Deserialize)]
struct ShardFile {
    format: String,
    version: u32,
    plan: FitPlan,
    specimen: String,
    shard: u32,
    shards: u32,
    predictive: u32,
    outcomes: Vec<(usize, Outcome)>,
}

/// How the result is printed.
struct Output<'a> {
    page: &'a str,
    predictive: u32,
    json: bool,
}

const SHARD_FORMAT: &str = "ramulus-fit-shard";

/// `ramulus fit`.
pub fn fit(options: FitOptions) -> Result<(), CliError> {
    let mut outputs = OutputPlan::default();
    outputs.input("--specimen", &options.specimen);
    if let Some(path) = &options.params_file {
        outputs.input("--params", path);
    }
    if let Some(path) = &options.out {
        outputs.output("--out", path)?;
    }
    if let Some(path) = &options.plots {
        outputs.output("--plots", path)?;
    }
    let plan = build_plan(&options)?;
    let shard = options.shard.as_deref().map(parse_shard).transpose()?;
    if shard.is_some() && !matches!(plan.method, Method::Quick { .. }) {
        return Err(CliError::Usage(
            "--shard needs --method quick: the sequential method's generations depend on each \
             other, so only the quick method splits into independent shards"
                .into(),
        ));
    }
    let mut fit = Fit::new(plan.clone()).map_err(|error| CliError::Usage(error.to_string()))?;
    let pool = pool(options.jobs)?;
    if let (Some((index, count)), Some(out)) = (shard, &options.out) {
        let jobs = fit.next_batch().unwrap_or_default();
        let mine: Vec<(usize, &Job)> = jobs
            .iter()
            .enumerate()
            .filter(|(job_index, _)| job_index % count as usize == (index - 1) as usize)
            .collect();
        let mut progress = Progress::new(options.json, mine.len() as u64);
        let outcomes = run_jobs(&pool, &plan, &mine, &mut progress);
        progress.finish();
        let file = ShardFile {
            format: SHARD_FORMAT.into(),
            version: 1,
            plan,
            specimen: options.specimen.clone(),
            shard: index,
            shards: count,
            predictive: options.predictive,
            outcomes: mine.iter().map(|(i, _)| *i).zip(outcomes).collect(),
        };
        let text = serde_json::to_string(&file)
            .map_err(|error| CliError::Failed(format!("{out}: {error}")))?;
        outputs.stage(out, &text)?;
        outputs.commit()?;
        say!(
            "shard {index} of {count}: {} simulations written to {out}",
            file.outcomes.len()
        );
        return Ok(());
    }
    let checks = sensitivity_first(&pool, &plan);
    let mut total_progress = Progress::new(options.json, fit.progress().1);
    while let Some(jobs) = fit.next_batch() {
        total_progress.total = fit
            .progress()
            .1
            .max(total_progress.done + jobs.len() as u64);
        let indexed: Vec<(usize, &Job)> = jobs.iter().enumerate().collect();
        let outcomes = run_jobs(&pool, &plan, &indexed, &mut total_progress);
        fit.absorb(outcomes)
            .map_err(|error| CliError::Failed(error.to_string()))?;
    }
    total_progress.finish();
    let result = fit
        .result()
        .map_err(|error| CliError::Failed(error.to_string()))?;
    let output = Output {
        page: &options.page,
        predictive: options.predictive,
        json: options.json,
    };
    write_plots(outputs, options.plots.as_deref(), &plan, &result)?;
    report(&pool, &plan, &result, &checks, &output)
}

/// Writes the posterior plots, whole or not at all, before anything is printed.
fn write_plots(
    mut outputs: OutputPlan,
    path: Option<&str>,
    plan: &FitPlan,
    result: &FitResult,
) -> Result<(), CliError> {
    if let Some(path) = path {
        let svg = ramulus_draw::posterior_svg::posterior_svg(plan, result);
        outputs.stage(path, &svg)?;
    }
    outputs.commit()
}

/// `ramulus merge`.
pub fn merge(options: MergeOptions) -> Result<(), CliError> {
    let mut outputs = OutputPlan::default();
    for path in &options.shards {
        outputs.input("shard", path);
    }
    if let Some(path) = &options.plots {
        outputs.output("--plots", path)?;
    }
    let mut files = Vec::new();
    for path in &options.shards {
        let text = read_text(path)?;
        let file: ShardFile = serde_json::from_str(&text).map_err(|error| {
            CliError::Failed(format!(
                "{path}: not a shard file of `ramulus fit`: {error}"
            ))
        })?;
        if file.format != SHARD_FORMAT || file.version != 1 {
            return Err(CliError::Failed(format!(
                "{path}: not a version-1 shard file of `ramulus fit`"
            )));
        }
        files.push((path.clone(), file));
    }
    let (first_path, first) = &files[0];
    for (path, file) in &files[1..] {
        if file.plan != first.plan
            || file.shards != first.shards
            || file.predictive != first.predictive
        {
            return Err(CliError::Failed(format!(
                "{path} and {first_path} are shards of different fits"
            )));
        }
    }
    let count = first.shards;
    let mut seen = vec![None; count as usize];
    for (path, file) in &files {
        if file.shard == 0 || file.shard > count {
            return Err(CliError::Failed(format!(
                "{path}: shard {} of {count} is out of range",
                file.shard
            )));
        }
        if let Some(other) = &seen[(file.shard - 1) as usize] {
            return Err(CliError::Failed(format!(
                "{path} and {other} are both shard {} of {count}",
                file.shard
            )));
        }
        seen[(file.shard - 1) as usize] = Some(path.clone());
    }
    let missing: Vec<String> = seen
        .iter()
        .enumerate()
        .filter(|(_, path)| path.is_none())
        .map(|(index, _)| (index + 1).to_string())
        .collect();
    if !missing.is_empty() {
        return Err(CliError::Failed(format!(
            "shards {} of {count} are missing",
            missing.join(", ")
        )));
    }
    let plan = first.plan.clone();
    let first_predictive = first.predictive;
    let mut fit = Fit::new(plan.clone()).map_err(|error| CliError::Failed(error.to_string()))?;
    let jobs = fit.next_batch().unwrap_or_default();
    let mut outcomes: Vec<Option<Outcome>> = vec![None; jobs.len()];
    for (path, file) in files {
        for (index, outcome) in file.outcomes {
            let slot = outcomes.get_mut(index).ok_or_else(|| {
                CliError::Failed(format!("{path}: simulation {index} is not part of the fit"))
            })?;
            *slot = Some(outcome);
        }
    }
    let outcomes: Vec<Outcome> = outcomes
        .into_iter()
        .enumerate()
        .map(|(index, outcome)| {
            outcome
                .ok_or_else(|| CliError::Failed(format!("simulation {index} is in no shard file")))
        })
        .collect::<Result<_, _>>()?;
    fit.absorb(outcomes)
        .map_err(|error| CliError::Failed(error.to_string()))?;
    let result = fit
        .result()
        .map_err(|error| CliError::Failed(error.to_string()))?;
    let pool = pool(options.jobs)?;
    let checks = sensitivity_first(&pool, &plan);
    let output = Output {
        page: &options.page,
        predictive: first_predictive,
        json: options.json,
    };
    write_plots(outputs, options.plots.as_deref(), &plan, &result)?;
    report(&pool, &plan, &result, &checks, &output)
}

/// The plan from the options and the specimen, checked.
fn build_plan(options: &FitOptions) -> Result<FitPlan, CliError> {
    let file = parameter_file(options.params_file.as_deref())?;
    let link_params = link_parameters(options.link.as_deref())?;
    let base = assemble_params(
        link_params,
        options.preset.as_deref(),
        file,
        &options.sets,
        None,
    )?;
    let mut fitted = Vec::new();
    for text in &options.fitted {
        let (key, range) = text.split_once('=').ok_or_else(|| {
            CliError::Usage(format!(
                "`--fit {text}`: use KEY=LOW:HIGH, e.g. alpha=0.3:0.8"
            ))
        })?;
        let (low, high) = range.split_once(':').ok_or_else(|| {
            CliError::Usage(format!(
                "`--fit {text}`: use KEY=LOW:HIGH, e.g. alpha=0.3:0.8"
            ))
        })?;
        let number = |part: &str| {
            part.trim()
                .parse::<f64>()
                .map_err(|_| CliError::Usage(format!("`--fit {text}`: `{part}` is not a number")))
        };
        let key = key.trim();
        let scale = fittable(key).map_err(|error| CliError::Usage(format!("--fit: {error}")))?;
        fitted.push(FittedKey {
            key: key.to_string(),
            low: number(low)?,
            high: number(high)?,
            scale,
        });
    }
    let specimen = measure_specimen(&options.specimen, &options.tracing, &base)?;
    let mut targets = Vec::new();
    for text in &options.matched {
        let (key, weight) = match text.split_once('=') {
            Some((key, weight)) => {
                let weight = weight.trim().parse::<f64>().map_err(|_| {
                    CliError::Usage(format!("`--match {text}`: `{weight}` is not a number"))
                })?;
                (key.trim(), Some(weight))
            }
            None => (text.trim(), None),
        };
        let observed = metric_value(&specimen, key)
            .map_err(|error| CliError::Usage(format!("--match: {error}")))?
            .ok_or_else(|| {
                CliError::Failed(format!(
                    "{}: the specimen has no value for metric `{key}`",
                    options.specimen
                ))
            })?;
        targets.push(Target {
            key: key.to_string(),
            weight,
            observed,
        });
    }
    let method = match options.method.as_str() {
        "quick" => Method::Quick {
            simulations: options.simulations,
            accepted: options.accept,
        },
        _ => Method::Sequential {
            population: options.population,
            generations: options.generations,
        },
    };
    let plan = FitPlan {
        base,
        fitted,
        targets,
        replicates: options.replicates,
        seed: options.seed,
        method,
    };
    plan.check()
        .map_err(|error| CliError::Usage(error.to_string()))?;
    Ok(plan)
}

/// The specimen's metrics: a run record, measured as `ramulus measure` measures it.
fn measure_specimen(
    path: &str,
    tracing: &crate::options::SpecimenArgs,
    base: &ramulus_core::params::Params,
) -> Result<ramulus_core::metrics::Metrics, CliError> {
    let bytes = std::fs::read(path)
        .map_err(|error| CliError::Failed(format!("{path}: cannot read: {error}")))?;
    let units = &base.domain.units;
    if crate::specimens::is_record(&bytes) {
        let text = read_text(path)?;
        let (record, network) =
            read_record(&text).map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
        if &network.units != units {
            return Err(CliError::Failed(format!(
                "{path}: the specimen is measured in {} but the growth parameters in {units}; \
                 set --set units={} (and a cell_size in that unit)",
                network.units, network.units
            )));
        }
        if let Some(metrics) = crate::record_readings::regrown_metrics(&record, &network) {
            return Ok(metrics);
        }
        let alpha = record.params.as_ref().map_or(0.5, |p| p.costs.alpha);
        return ramulus_core::metrics::measure(&network, alpha)
            .map_err(|error| CliError::Failed(format!("{path}: {error}")));
    }
    let mut tracing = tracing.clone();
    let units_given = tracing.units.is_some();
    tracing.units.get_or_insert_with(|| units.clone());
    let options = crate::specimens::specimen_options(&tracing)?;
    // A cleared-leaf image is read with the default image steps (as `measure` without image
    // options); a traced file as `measure` reads it.
    let specimen = if ramulus_core::cleared::decode::is_image(&bytes) {
        let image = ramulus_core::cleared::decode::decode_image(&bytes)
            .map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
        ramulus_core::cleared::build_cleared_specimen(
            &image,
            &ramulus_core::cleared::ClearedOptions::default(),
            &options,
        )
        .map_err(|error| CliError::Failed(format!("{path}: {error}")))?
        .specimen
    } else {
        ramulus_core::specimen::build_specimen(&bytes, &options)
            .map_err(|error| CliError::Failed(format!("{path}: {error}")))?
    };
    if &specimen.calibration.units != units {
        return Err(CliError::Failed(format!(
            "{path}: the specimen is measured in {} but the growth parameters in {units}{}",
            specimen.calibration.units,
            if units_given {
                "; give --units in the parameters' unit"
            } else {
                ""
            }
        )));
    }
    eprintln!(
        "{path}: traced specimen read with {} repairs (`ramulus measure {path}` lists them); \
         transport cost measured with the base alpha {}",
        specimen.report.repairs.len(),
        base.costs.alpha
    );
    let view =
        ramulus_core::run::RunView::new(specimen.network, &ramulus_core::run::as_measured(base))
            .map_err(|error| CliError::Failed(format!("{path}: {error}")))?;
    Ok(view.metrics)
}

/// `I/N` with 1 <= I <= N.
fn parse_shard(text: &str) -> Result<(u32, u32), CliError> {
    let bad = || {
        CliError::Usage(format!(
            "`--shard {text}`: use I/N with 1 <= I <= N, e.g. 3/8"
        ))
    };
    let (index, count) = text.split_once('/').ok_or_else(bad)?;
    let index: u32 = index.trim().parse().map_err(|_| bad())?;
    let count: u32 = count.trim().parse().map_err(|_| bad())?;
    if index == 0 || count == 0 || index > count {
        return Err(bad());
    }
    Ok((index, count))
}

fn pool(jobs: Option<usize>) -> Result<rayon::ThreadPool, CliError> {
    let threads = match jobs {
        Some(0) => return Err(CliError::Usage("--jobs must be at least 1".into())),
        Some(count) => count,
        None => std::thread::available_parallelism().map_or(1, |count| count.get()),
    };
    rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .map_err(|error| CliError::Failed(format!("cannot start {threads} threads: {error}")))
}

/// Runs jobs on the pool in chunks (so the progress line moves), outcomes in job order.
fn run_jobs(
    pool: &rayon::ThreadPool,
    plan: &FitPlan,
    jobs: &[(usize, &Job)],
    progress: &mut Progress,
) -> Vec<Outcome> {
    let chunk = (pool.current_num_threads() * 4).max(1);
    let mut outcomes = Vec::with_capacity(jobs.len());
    for part in jobs.chunks(chunk) {
        let done: Vec<Outcome> =
            pool.install(|| part.par_iter().map(|(_, job)| run_job(plan, job)).collect());
        outcomes.extend(done);
        progress.advance(part.len() as u64);
    }
    outcomes
}

/// The sensitivity design, run and reported (a warning per key no metric sees) before the fit.
fn sensitivity_first(pool: &rayon::ThreadPool, plan: &FitPlan) -> Sensitivity {
    let jobs = design_jobs(plan);
    let indexed: Vec<(usize, &Job)> = jobs.iter().enumerate().collect();
    let mut progress = Progress::new(true, 0);
    let outcomes = run_jobs(pool, plan, &indexed, &mut progress);
    let table = sensitivity(plan, &outcomes);
    for key in &table.unidentifiable {
        eprintln!(
            "warning: no matched metric moves `{key}` by {NOISE_UNITS} times its seed noise \
             across the fitted range; its interval will mostly echo the bounds given"
        );
    }
    table
}

/// Progress on a terminal: simulations done of the expected total and time left, on stderr.
struct Progress {
    shown: bool,
    done: u64,
    total: u64,
    started: Instant,
}

impl Progress {
    fn new(quiet: bool, total: u64) -> Progress {
        Progress {
            shown: !quiet && std::io::stderr().is_terminal(),
            done: 0,
            total,
            started: Instant::now(),
        }
    }

    fn advance(&mut self, count: u64) {
        self.done += count;
        if !self.shown || self.done == 0 {
            return;
        }
        let elapsed = self.started.elapsed().as_secs_f64();
        let left = elapsed / self.done as f64 * self.total.saturating_sub(self.done) as f64;
        let width = 30usize;
        let filled = (width as u64 * self.done / self.total.max(1)).min(width as u64) as usize;
        eprint!(
            "\r[{}{}] {} of about {} simulations, {:.0} s left   ",
            "#".repeat(filled),
            ".".repeat(width - filled),
            self.done,
            self.total.max(self.done),
            left
        );
    }

    fn finish(&self) {
        if self.shown {
            eprintln!();
        }
    }
}

/// The predictive check, the best run's link, and the printout.
fn report(
    pool: &rayon::ThreadPool,
    plan: &FitPlan,
    result: &FitResult,
    checks: &Sensitivity,
    output: &Output<'_>,
) -> Result<(), CliError> {
    let (page, as_json) = (output.page, output.json);
    let jobs = predictive_jobs(plan, result, output.predictive);
    let indexed: Vec<(usize, &Job)> = jobs.iter().enumerate().collect();
    let mut progress = Progress::new(true, 0);
    let outcomes = run_jobs(pool, plan, &indexed, &mut progress);
    let predictive = predictive_rows(plan, &outcomes);
    let best_params = plan.params_for(&result.best.values, result.best.seed);
    let best_link = format!("{page}#{}", encode_link(&best_params));
    if as_json {
        let posterior: serde_json::Map<String, serde_json::Value> = result
            .posterior
            .iter()
            .map(|interval| {
                (
                    interval.key.clone(),
                    json!({"median": interval.median, "low": interval.low, "high": interval.high}),
                )
            })
            .collect();
        let output = json!({
            "posterior": posterior,
            "best_link": best_link,
            "best_distance": result.best.distance,
            "accepted": result.accepted,
            "simulations": result.simulations,
            "replicates": plan.replicates,
            "generations": result.generations,
            "sensitivity": checks,
            "predictive": predictive,
            "notes": result.notes,
        });
        say!("{output}");
        return Ok(());
    }
    say!(
        "fit: {} parameter sets simulated ({} seeds each), {} accepted",
        result.simulations,
        plan.replicates,
        result.accepted
    );
    say!("\nposterior (median and 90 % credible interval):");
    for (interval, key) in result.posterior.iter().zip(&plan.fitted) {
        say!(
            "  {:<14} {:>12.5}   [{:.5}, {:.5}]   (fitted between {} and {}, {} scale)",
            interval.key,
            interval.median,
            interval.low,
            interval.high,
            key.low,
            key.high,
            match key.scale {
                ramulus_core::params::table::FitScale::Linear => "linear",
                ramulus_core::params::table::FitScale::Log => "log",
            }
        );
    }
    say!(
        "\nsensitivity (metric change from 10 % to 90 % of each key's range, in seed-noise units):"
    );
    for row in &checks.rows {
        say!(
            "  {:<14} {:<24} {:>8.2}{}",
            row.key,
            row.metric,
            row.ratio,
            if row.ratio >= NOISE_UNITS {
                ""
            } else {
                "   (below 2: not seen)"
            }
        );
    }
    say!(
        "\nposterior predictive check ({} runs drawn from the posterior):",
        outcomes.len()
    );
    print_predictive(&predictive, plan);
    if result.generations.len() > 1 {
        say!("\ngenerations (tolerance, simulations, accepted):");
        for (index, generation) in result.generations.iter().enumerate() {
            say!(
                "  {index}: {:.4}  {}  {}",
                generation.tolerance,
                generation.simulations,
                generation.accepted
            );
        }
    }
    for note in &result.notes {
        say!("\nnote: {note}");
    }
    say!("\nbest run: {best_link}");
    Ok(())
}

fn print_predictive(rows: &[PredictiveRow], plan: &FitPlan) {
    for row in rows {
        let unit = ramulus_core::metrics::METRIC_TABLE
            .iter()
            .find(|entry| entry.key == row.metric)
            .map(|entry| {
                entry
                    .unit
                    .text(&plan.base.domain.units, plan.base.costs.alpha)
            })
            .unwrap_or_default();
        say!(
            "  {:<24} specimen {:>12.5}   runs {:.5} [{:.5}, {:.5}] {unit}   {}",
            row.metric,
            row.specimen,
            row.median,
            row.low,
            row.high,
            if row.inside {
                "inside"
            } else {
                "OUTSIDE the runs' 5-95 % range"
            }
        );
    }
}
