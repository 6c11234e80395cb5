//! The reshaping passes a sweep at a time (`reshaping::Reshaping`, as the page runs them):
//! run to the end they give the network `RunView::new` gives in one go, digest for digest;
//! stopped after `k` sweeps they give the network of a run that asked for `k` sweeps; and, as in
//! the optimal-channel-network search of Rinaldo et al. (1992, Water Resour. Res. 28(9)), which
//! accepts only changes that lower the energy, `E = sum Q^0.5 L` (computed here by hand from
//! the parents) never rises from one sweep to the next.

use ramulus_core::growth::Growth;
use ramulus_core::network::Network;
use ramulus_core::params::Params;
use ramulus_core::presets::preset;
use ramulus_core::reshaping::{ReshapePass, Reshaping};
use ramulus_core::run::RunView;

fn grown(name: &str, cells: u64, energy_sweeps: u32, relax: u32) -> (Params, Network) {
    let mut params = preset(name).expect("a preset");
    params.run.cells = params.run.cells.min(cells);
    params.run.energy_sweeps = energy_sweeps;
    params.run.relax_junctions = relax;
    let mut growth = Growth::new(&params).expect("valid parameters");
    growth.run();
    (params, growth.network())
}

/// The same network (digest), channel energy report and junction report as the pass in one go.
fn assert_same_outcome(stepped: &RunView, whole: &RunView, label: &str) {
    assert_eq!(stepped.digest, whole.digest, "{label}: digest");
    assert_eq!(stepped.energy, whole.energy, "{label}: energy report");
    assert_eq!(
        stepped.relaxation, whole.relaxation,
        "{label}: junction report"
    );
}

/// `E` from first principles: each node's drained flow by walking it down to its outlet,
/// then `sum sqrt(Q) L` (Rinaldo et al. 1992).
fn energy_by_hand(network: &Network) -> f64 {
    let mut parent = vec![None; network.nodes.len()];
    for segment in &network.segments {
        parent[segment.from as usize] = Some(segment.to as usize);
    }
    let mut flow = vec![0.0; network.nodes.len()];
    for (start, node) in network.nodes.iter().enumerate() {
        let mut at = Some(start);
        while let Some(i) = at {
            flow[i] += node.weight;
            at = parent[i];
        }
    }
    network
        .segments
        .iter()
        .map(|s| flow[s.from as usize].sqrt() * network.segment_length(s.from, s.to))
        .sum()
}

#[test]
fn sweep_by_sweep_equals_the_pass_in_one_go() {
    for (name, energy, relax) in [
        ("drainage-site", 4, 0),
        ("drainage-site", 3, 2),
        ("ovate-leaf", 0, 3),
        ("garden-site", 2, 0),
    ] {
        let (params, network) = grown(name, 3_000, energy, relax);
        let whole = RunView::new(network.clone(), &params).expect("a valid network");
        let mut reshaping = Reshaping::new(network, &params).expect("a valid network");
        let mut calls = 0;
        while !reshaping.done() {
            reshaping.sweep().expect("a forest");
            calls += 1;
        }
        assert!(
            calls >= 1,
            "{name}: at least one sweep ran (energy {energy}, junctions {relax})"
        );
        let (stepped, kept) = reshaping.finish().expect("a view");
        assert_same_outcome(&stepped, &whole, &format!("{name} {energy} {relax}"));
        assert_eq!(
            kept, params,
            "{name}: parameters unchanged when run to the end"
        );
    }
}

#[test]
fn a_stop_keeps_the_whole_sweeps_run() {
    let (params, network) = grown("drainage-site", 4_000, 6, 3);
    let mut reshaping = Reshaping::new(network.clone(), &params).expect("a valid network");
    let mut previous = energy_by_hand(&network);
    for k in 1..=2u32 {
        let progress = reshaping.sweep().expect("a forest");
        assert_eq!(progress.pass, ReshapePass::Energy);
        assert_eq!(progress.sweep, k);
        assert!(progress.now <= progress.before, "sweep {k}: E rose");
        assert!(
            progress.now <= previous * (1.0 + 1e-12),
            "sweep {k}: E rose"
        );
        previous = progress.now;
    }
    let stopped = reshaping.stop().expect("a forest");
    assert!(stopped.done);
    let (view, kept) = reshaping.finish().expect("a view");
    assert_eq!(kept.run.energy_sweeps, 2, "two whole sweeps kept");
    assert_eq!(kept.run.relax_junctions, 0, "later passes do not run");
    let mut asked = params.clone();
    asked.run.energy_sweeps = 2;
    asked.run.relax_junctions = 0;
    let again = RunView::new(network, &asked).expect("a valid network");
    assert_eq!(
        view.digest, again.digest,
        "a stop after 2 sweeps is a run of 2 sweeps"
    );
    let after = energy_by_hand(&view.network);
    assert!(
        (after - previous).abs() <= 1e-9 * previous,
        "shown E {previous} is the network's {after}"
    );
}

#[test]
fn a_stop_before_any_sweep_changes_nothing() {
    let (params, network) = grown("drainage-site", 2_000, 5, 0);
    let mut reshaping = Reshaping::new(network.clone(), &params).expect("a valid network");
    reshaping.stop().expect("nothing to end");
    let (view, kept) = reshaping.finish().expect("a view");
    assert_eq!(kept.run.energy_sweeps, 0);
    assert!(view.energy.is_none());
    let grown_digest = ramulus_core::digest::digest_hex(&network);
    assert_eq!(view.digest, grown_digest, "the network as grown");
}

/// Sweeps split into parts of any size take the nodes and junctions in the same order and
/// state as whole sweeps: the network is the one the passes give in one go, digest for digest.
#[test]
fn sweeps_in_parts_equal_the_pass_in_one_go() {
    for (name, energy, relax) in [("drainage-site", 3, 2), ("ovate-leaf", 0, 3)] {
        let (params, network) = grown(name, 3_000, energy, relax);
        let whole = RunView::new(network.clone(), &params).expect("a valid network");
        for items in [1, 7, 256, 1_000] {
            let mut reshaping = Reshaping::new(network.clone(), &params).expect("a network");
            let mut calls = 0u32;
            let mut parts_seen = false;
            while !reshaping.done() {
                let progress = reshaping.advance(items).expect("a forest");
                parts_seen |= progress.part > 0 && progress.part < progress.part_of;
                calls += 1;
            }
            let (stepped, _) = reshaping.finish().expect("a view");
            assert_same_outcome(&stepped, &whole, &format!("{name}, parts of {items}"));
            if items < 256 {
                assert!(parts_seen, "{name}: parts of {items} stop inside sweeps");
                assert!(calls > energy + relax, "{name}: more calls than sweeps");
            }
        }
    }
}

/// A stop inside sweep `k + 1` takes that sweep back: the network and its link are those of a
/// run asking for `k` sweeps, and `E` (by hand, Rinaldo et al. 1992) is the one after sweep `k`.
#[test]
fn a_stop_midway_takes_the_sweep_back() {
    let (params, network) = grown("drainage-site", 4_000, 6, 3);
    for k in [0u32, 1, 2] {
        let mut reshaping = Reshaping::new(network.clone(), &params).expect("a valid network");
        for _ in 0..k {
            reshaping.sweep().expect("a forest");
        }
        let progress = reshaping.advance(500).expect("a forest");
        assert_eq!(progress.pass, ReshapePass::Energy);
        assert_eq!(progress.sweep, k, "still in sweep {}", k + 1);
        assert_eq!(progress.part, 500, "500 nodes taken of sweep {}", k + 1);
        assert!(!progress.swept);
        reshaping.stop().expect("a forest");
        let (view, kept) = reshaping.finish().expect("a view");
        assert_eq!(kept.run.energy_sweeps, k, "{k} whole sweeps kept");
        assert_eq!(kept.run.relax_junctions, 0, "later passes do not run");
        let mut asked = params.clone();
        asked.run.energy_sweeps = k;
        asked.run.relax_junctions = 0;
        let again = RunView::new(network.clone(), &asked).expect("a valid network");
        assert_eq!(view.digest, again.digest, "stopped in sweep {}", k + 1);
        if let Some(energy) = &view.energy {
            let by_hand = energy_by_hand(&view.network);
            assert!(
                (energy.energy_after - by_hand).abs() <= 1e-9 * by_hand,
                "reported E {} is the network's {by_hand}",
                energy.energy_after
            );
            assert_eq!(energy.sweeps.len() as u32, k);
        } else {
            assert_eq!(k, 0, "no energy report only when no sweep was kept");
        }
    }
}

/// The same for junction relaxation: a stop inside a sweep puts every junction it moved back
/// where the last whole sweep left it.
#[test]
fn a_stop_midway_puts_the_junctions_back() {
    let (params, network) = grown("ovate-leaf", 3_000, 0, 4);
    for k in [0u32, 1] {
        let mut reshaping = Reshaping::new(network.clone(), &params).expect("a valid network");
        for _ in 0..k {
            reshaping.sweep().expect("a forest");
        }
        let progress = reshaping.advance(40).expect("a forest");
        assert_eq!(progress.pass, ReshapePass::Junctions);
        assert_eq!((progress.sweep, progress.part), (k, 40));
        reshaping.stop().expect("a forest");
        let (view, kept) = reshaping.finish().expect("a view");
        assert_eq!(kept.run.relax_junctions, k);
        let mut asked = params.clone();
        asked.run.relax_junctions = k;
        let again = RunView::new(network.clone(), &asked).expect("a valid network");
        assert_eq!(view.digest, again.digest, "stopped in sweep {}", k + 1);
    }
}
