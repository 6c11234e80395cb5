//! The loop pass a slice at a time (`reconnection::LoopClosing`, as the page runs it): advanced
//! in slices of 1 (one free end, offer or set-up each), 7 and 1000 units of work it closes the
//! very loops `close_loops` closes in one go, bit for bit, on grown looped leaves with one pass
//! per level, with `nest_loops` and with `arches`; the pipeline split at the loop pass (`run::Conducted`) gives the digest of
//! `RunView::new`; and the loops the progress counts are the independent cycles of the network
//! with the new segments, counted by Euler's formula for graphs (cyclomatic number
//! E - V + C; Bondy & Murty 2008, Graph Theory, section 4.3) with petgraph's union-find for C.

use ramulus_core::growth::Growth;
use ramulus_core::network::Network;
use ramulus_core::params::Params;
use ramulus_core::presets::preset;
use ramulus_core::reconnection::{close_loops, GrownVeins, LoopClosing, LoopProgress};
use ramulus_core::run::{conducting_pass, loop_rule, topology_pass, Conducted, Reshaped, RunView};
use ramulus_tests::euler::independent_cycles;

/// The ovate-leaf preset, `seed`, at most `cells` cells, loops as given, grown.
fn grown(seed: u64, cells: u64, nest: bool, arches: bool) -> (Params, Network) {
    let mut params = preset("ovate-leaf").expect("the ovate-leaf preset");
    params.run.seed = seed;
    params.run.cells = params.run.cells.min(cells);
    params.widths.nest_loops = nest;
    params.widths.arches = arches;
    let mut growth = Growth::new(&params).expect("valid parameters");
    growth.run();
    (params, growth.network())
}

const CASES: [(u64, bool, bool); 4] = [
    (1, false, false),
    (2, false, true),
    (3, true, false),
    (4, true, true),
];

#[test]
fn the_loop_pass_in_slices_closes_the_loops_of_the_pass_in_one_go() {
    for (seed, nest, arches) in CASES {
        let (params, network) = grown(seed, 6_000, nest, arches);
        let mut forest = topology_pass(&network).expect("valid");
        let conducting = conducting_pass(&network, &mut forest, &params);
        let forest = forest.expect("a forest");
        let rule = loop_rule(&params).expect("the preset closes loops");
        let veins = GrownVeins {
            network: &network,
            topology: &forest.topology,
            conducts: &conducting.conducts,
        };
        let whole = close_loops(&network, &forest.topology, &conducting.conducts, &rule);
        let label = format!("seed {seed}, nest_loops {nest}, arches {arches}");
        assert!(!whole.links.is_empty(), "{label}: some loop closes");
        for slice in [1, 7, 1000] {
            let mut closing = LoopClosing::new(veins, &rule);
            let mut calls = 0;
            let mut last = closing.progress();
            let mut seen_levels = std::collections::BTreeSet::new();
            while !closing.done() {
                let progress: LoopProgress = closing.advance(veins, slice);
                calls += 1;
                assert_eq!(progress.levels, rule.levels + 1, "{label}: levels");
                assert!(progress.level < progress.levels, "{label}: {progress:?}");
                assert!(progress.ends_done <= progress.ends, "{label}: {progress:?}");
                assert!(progress.loops >= last.loops, "{label}: loops never undone");
                assert!(progress.work > last.work, "{label}: every call works");
                if progress.level == last.level && !progress.done {
                    assert!(
                        progress.ends_done >= last.ends_done,
                        "{label}: ends settled never go back ({last:?} -> {progress:?})"
                    );
                }
                seen_levels.insert(progress.level);
                last = progress;
            }
            assert!(last.done, "{label}: done");
            assert_eq!(last.loops, whole.links.len(), "{label}: loops counted");
            if slice == 1 {
                assert_eq!(
                    seen_levels.len() as u32,
                    rule.levels + 1,
                    "{label}: every level shown"
                );
            }
            if slice < 1000 {
                assert!(calls > 10, "{label}, slices of {slice}: {calls} calls");
            }
            let stepped = closing.finish(veins);
            assert_eq!(stepped, whole, "{label}, slices of {slice}");
            let bits = |flows: &[f64]| flows.iter().map(|f| f.to_bits()).collect::<Vec<_>>();
            assert_eq!(bits(&stepped.wall_flow), bits(&whole.wall_flow), "{label}");
            assert_eq!(bits(&stepped.link_flow), bits(&whole.link_flow), "{label}");
        }
        // Each new segment closes one independent cycle of the tree (Euler).
        let mut looped = network.clone();
        let tree_cycles = independent_cycles(&looped);
        looped.segments.extend_from_slice(&whole.links);
        assert_eq!(tree_cycles, 0, "{label}: the grown network is a forest");
        assert_eq!(
            independent_cycles(&looped),
            whole.links.len() as u64,
            "{label}: one independent cycle per loop closed"
        );
    }
}

#[test]
fn the_pipeline_split_at_the_loop_pass_gives_the_digest_of_the_whole() {
    for (seed, nest, arches) in CASES {
        let (params, network) = grown(seed, 6_000, nest, arches);
        let whole = RunView::new(network.clone(), &params).expect("a valid network");
        let forest = topology_pass(&network).expect("valid");
        let mut conducted = Conducted::new(
            Reshaped {
                network,
                forest,
                energy: None,
                relaxation: None,
            },
            &params,
        );
        let mut calls = 0;
        while !conducted.loops_done() {
            conducted.advance(13).expect("a loop pass");
            calls += 1;
        }
        assert!(calls > 1, "seed {seed}: the pass took {calls} calls");
        let stepped = conducted.finish(&params);
        assert_eq!(stepped.digest, whole.digest, "seed {seed}: digest");
        assert_eq!(
            stepped.loops.as_ref().map(|loops| &loops.reconnection),
            whole.loops.as_ref().map(|loops| &loops.reconnection),
            "seed {seed}: loops"
        );
    }
}
