//! Damaged links are repaired until the run can start: parameters that each validate may still
//! place a root inside an obstacle or outside the outline, or leave no cell to grow in. The
//! rule (stated here): the link reader resets the region, then the roots, names every field it
//! reset, and never hands back parameters that `Growth::new` refuses.

use ramulus_core::growth::Growth;
use ramulus_core::link::decode_link;

/// Reads `link`, checks the run starts, and returns the keys of the fields reported.
fn repaired_keys(link: &str) -> Vec<String> {
    let read = decode_link(link);
    if let Err(error) = Growth::new(&read.params) {
        panic!("{link}: the repaired run cannot start: {error}");
    }
    read.problems
        .into_iter()
        .map(|problem| problem.key)
        .collect()
}

#[test]
fn a_root_inside_an_obstacle_drops_the_obstacles() {
    let keys = repaired_keys("#v=1&cells=100&roots=60,60,0,1&obstacles=50,50;70,50;70,70;50,70");
    assert_eq!(keys, ["obstacles"]);
}

#[test]
fn a_root_outside_the_outline_drops_the_outline() {
    let keys = repaired_keys("v=1&cells=100&roots=5,5,0,1&outline=40,40;80,40;80,80;40,80");
    assert_eq!(keys, ["outline"]);
}

#[test]
fn an_outline_holding_no_cell_centre_is_dropped() {
    // A triangle between cell centres: no centre (i + 0.5, j + 0.5) lies inside it.
    let keys =
        repaired_keys("v=1&cells=100&roots=60,100,0,1&outline=10.6,10.6;10.9,10.6;10.6,10.9");
    assert!(keys.contains(&"outline".to_string()), "{keys:?}");
}

#[test]
fn two_roots_on_one_cell_fall_back_to_the_default_root() {
    let keys = repaired_keys("v=1&cells=100&roots=30,30,0,1;30,30,1,0");
    assert_eq!(keys, ["roots"]);
}

#[test]
fn a_link_that_can_start_is_left_alone() {
    let keys = repaired_keys("v=1&cells=100&roots=60,100,0,1&obstacles=10,10;20,10;20,20");
    assert!(keys.is_empty(), "{keys:?}");
}
