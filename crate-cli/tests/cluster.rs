//! The fit as a Slurm job array: `examples/fit-array.sbatch` submitted to a one-node cluster
//! (started by `tests/cluster/start-slurm.sh`, which `./x test` runs), three shards merged,
//! must print exactly what the unsharded fit with the same seed prints.
//!
//! Without `sbatch` on the PATH the test can only say so; `./x test` sets
//! RAMULUS_REQUIRE_CLUSTER=1, which turns a missing cluster into a failure.

use std::path::{Path, PathBuf};
use std::process::Command;

fn ramulus(arguments: &[&str], folder: &Path) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_ramulus"))
        .args(arguments)
        .current_dir(folder)
        .output()
        .expect("the ramulus binary runs")
}

fn cluster_answers() -> bool {
    Command::new("sinfo")
        .arg("-h")
        .output()
        .map(|output| output.status.success())
        .unwrap_or(false)
}

const FIT: [&str; 22] = [
    "--specimen",
    "specimen.json",
    "--preset",
    "broad-leaf",
    "--set",
    "cells=500",
    "--fit",
    "alpha=0.3:0.9",
    "--fit",
    "w_turn=0.5:3",
    "--match",
    "transport_cost",
    "--match",
    "tortuosity",
    "--replicates",
    "1",
    "--method",
    "quick",
    "--simulations",
    "45",
    "--accept",
    "10",
];

#[test]
fn a_slurm_job_array_fit_equals_the_unsharded_fit() {
    if !cluster_answers() {
        assert!(
            std::env::var("RAMULUS_REQUIRE_CLUSTER").as_deref() != Ok("1"),
            "no Slurm cluster answers (tests/cluster/start-slurm.sh starts one)"
        );
        eprintln!("no Slurm cluster here: the job-array test did not run");
        return;
    }
    let folder: PathBuf =
        std::env::temp_dir().join(format!("ramulus-slurm-{}", std::process::id()));
    std::fs::create_dir_all(&folder).expect("writable temp dir");
    let grown = ramulus(
        &[
            "grow",
            "--preset",
            "broad-leaf",
            "--set",
            "cells=500",
            "--set",
            "alpha=0.7",
            "--record",
            "specimen.json",
        ],
        &folder,
    );
    assert!(
        grown.status.success(),
        "{}",
        String::from_utf8_lossy(&grown.stderr)
    );
    let whole = ramulus(
        &[&["fit"][..], &FIT[..], &["--seed", "4", "--json"][..]].concat(),
        &folder,
    );
    assert!(
        whole.status.success(),
        "{}",
        String::from_utf8_lossy(&whole.stderr)
    );
    let script = Path::new(env!("CARGO_MANIFEST_DIR")).join("../examples/fit-array.sbatch");
    let submitted = Command::new("sbatch")
        .args(["--wait", "--array=1-3", "--chdir"])
        .arg(&folder)
        .arg(&script)
        .args(FIT)
        .args(["--seed", "4"])
        .env("RAMULUS", env!("CARGO_BIN_EXE_ramulus"))
        .output()
        .expect("sbatch runs");
    assert!(
        submitted.status.success(),
        "sbatch: {}{}",
        String::from_utf8_lossy(&submitted.stdout),
        String::from_utf8_lossy(&submitted.stderr)
    );
    let merged = ramulus(
        &[
            "merge",
            "shard-1.json",
            "shard-2.json",
            "shard-3.json",
            "--json",
        ],
        &folder,
    );
    assert!(
        merged.status.success(),
        "{}",
        String::from_utf8_lossy(&merged.stderr)
    );
    assert_eq!(
        String::from_utf8_lossy(&merged.stdout),
        String::from_utf8_lossy(&whole.stdout),
        "the job array's merged fit differs from the unsharded one"
    );
    let _ = std::fs::remove_dir_all(&folder);
}
