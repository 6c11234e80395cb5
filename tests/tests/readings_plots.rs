//! The readings plots laid out by `ramulus-draw` on a complete binary tree, whose Horton plot is
//! known by hand: a tree of depth 4 has N_w = 8, 4, 2, 1 streams of orders 1 to 4, so
//! log10 N_w falls on a straight line of slope -log10 2 (Horton 1945, law of stream numbers;
//! R_B = 2 for complete binary trees, Strahler 1957), and with every level half as long as the
//! one below it, L_w = 1, 2, 4, 8 mm rises with slope log10 2 (Horton 1945, law of stream
//! lengths). Points on an exact line are their own least-squares fit.

use ramulus_core::metrics::measure;
use ramulus_draw::plots::readings_plots;
use ramulus_tests::hand_built::symmetric_binary_tree;

fn close(actual: f64, expected: f64) -> bool {
    (actual - expected).abs() < 1e-9
}

#[test]
fn horton_plot_of_a_complete_binary_tree() {
    let metrics = measure(&symmetric_binary_tree(4, 8.0, 30.0), 0.5).unwrap();
    let plots = readings_plots(&metrics, "mm");
    let horton = &plots.horton;
    let log2 = 2f64.log10();
    let counts: Vec<[f64; 2]> = horton.counts.points.clone();
    assert_eq!(counts.len(), 4);
    for (index, [order, log_count]) in counts.iter().enumerate() {
        assert_eq!(*order, (index + 1) as f64);
        assert!(close(*log_count, (3 - index) as f64 * log2), "{counts:?}");
    }
    let [[x0, y0], [x1, y1]] = horton.counts.fit.expect("a count line");
    assert!(close(x0, 1.0) && close(y0, 3.0 * log2) && close(x1, 4.0) && close(y1, 0.0));
    let [[_, low], [_, high]] = horton.lengths.fit.expect("a length line");
    assert!(close(low, 0.0) && close(high, 3.0 * log2), "{low} {high}");
    assert_eq!(horton.counts.label, "count N_w, R_B = 2.00");
    assert_eq!(horton.lengths.label, "mean length L_w (mm), R_L = 2.00");
    // Values span 1 to 8: the decades 1 and 10 are labelled, with minor ticks at 2 .. 9.
    let labelled: Vec<&str> = horton
        .y_ticks
        .iter()
        .filter(|tick| !tick.label.is_empty())
        .map(|tick| tick.label.as_str())
        .collect();
    assert_eq!(labelled, ["1", "10"]);
    assert_eq!(horton.y_ticks.len(), 2 + 8);
    assert_eq!(horton.y_ticks.iter().filter(|tick| tick.major).count(), 2);
    assert_eq!(horton.x_range, [0.5, 4.5]);
    assert!(plots
        .summary
        .starts_with("Horton plot: 4 orders (lengths in mm); R_B 2.00; R_L 2.00."));
}

#[test]
fn angle_histogram_holds_the_core_counts() {
    let metrics = measure(&symmetric_binary_tree(4, 8.0, 30.0), 0.5).unwrap();
    let angles = readings_plots(&metrics, "mm").angles;
    assert_eq!(
        angles.bins.iter().sum::<u64>(),
        metrics.branching_angle_count
    );
    assert!(metrics.branching_angle_count > 0);
    assert_eq!(angles.mean, metrics.branching_angle_mean);
    assert!(angles
        .caption
        .ends_with(&format!("n = {}", metrics.branching_angle_count)));
    // The count axis reaches past the fullest bin on a 1-2-5 step.
    let fullest = *angles.bins.iter().max().unwrap() as f64;
    assert!(angles.y_max >= fullest);
    assert_eq!(angles.x_ticks.last().unwrap().label, "180");
}
