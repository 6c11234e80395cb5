//! Nesting of loops (`nesting_number`): the hierarchical loop decomposition of a plane network
//! with segment widths, and the spread of areole areas in decades (`area_decades`).
//!
//! The decomposition (Katifori & Magnasco 2012, PLoS ONE 7, e37994): start from the areoles
//! (bounded faces); remove segments from the thinnest up (ties by segment index); a removed
//! segment with a different loop on each side merges the two into one, which becomes their
//! parent in a binary tree whose leaves are the areoles. A segment with the same loop on both
//! sides (a free-ending vein, or two areoles already merged) and a segment on the network's
//! outer boundary merge nothing.
//!
//! Each merge of loops holding `r` and `s` areoles has the topological asymmetry
//! `|r - s| / (r + s - 2)` (van Pelt et al. 1992, Bull. Math. Biol. 54; the measure Katifori &
//! Magnasco apply to their trees), left out when `r + s = 2`. The nesting number reported here
//! is one minus the mean asymmetry over those merges: 1 when every loop splits into two equal
//! halves (loops nested evenly inside loops), 0 when every merge adds one areole to a growing
//! loop (a ladder, no nesting). Katifori & Magnasco's own summary averages the asymmetry of the
//! subtrees of each size; the plain mean over merges is this project's choice (from memory of
//! the paper, whose text could not be checked).

use super::areoles::trace_faces_with_sides;

/// One merge of two loops: the two merged (leaf ids below the areole count, merge ids after),
/// and how many areoles the new loop holds.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Merge {
    /// The two loops merged.
    pub(crate) parts: (u32, u32),
    /// Areoles inside the merged loop.
    pub(crate) areoles: u32,
}

/// The hierarchical loop decomposition of a plane drawing (`edges` between `points`, one
/// weight per edge, the thinnest removed first): the areole count and the merges in order
/// (merge `i` has id `areole count + i`). Areoles are numbered in the order their faces are
/// traced (`trace_faces`).
pub(crate) fn loop_hierarchy(
    points: &[(f64, f64)],
    edges: &[(u32, u32)],
    weights: &[f64],
) -> (u32, Vec<Merge>) {
    let (faces, sides) = trace_faces_with_sides(points, edges);
    let mut leaf_of = vec![u32::MAX; faces.len()];
    let mut leaves = 0u32;
    for (face, traced) in faces.iter().enumerate() {
        if traced.signed_area > 0.0 {
            leaf_of[face] = leaves;
            leaves += 1;
        }
    }
    let mut order: Vec<usize> = (0..edges.len()).collect();
    let weight = |edge: usize| weights.get(edge).copied().unwrap_or(0.0);
    order.sort_by(|&a, &b| weight(a).total_cmp(&weight(b)).then(a.cmp(&b)));
    // Union-find over areoles; each set's current tree node and areole count.
    let mut parent: Vec<u32> = (0..leaves).collect();
    let mut node: Vec<u32> = (0..leaves).collect();
    let mut size = vec![1u32; leaves as usize];
    fn find(parent: &mut [u32], mut item: u32) -> u32 {
        while parent[item as usize] != item {
            let up = parent[parent[item as usize] as usize];
            parent[item as usize] = up;
            item = up;
        }
        item
    }
    let mut merges = Vec::new();
    for edge in order {
        let (left, right) = sides[edge];
        let (Some(&a), Some(&b)) = (leaf_of.get(left as usize), leaf_of.get(right as usize)) else {
            continue;
        };
        if a == u32::MAX || b == u32::MAX {
            continue;
        }
        let (ra, rb) = (find(&mut parent, a), find(&mut parent, b));
        if ra == rb {
            continue;
        }
        let areoles = size[ra as usize] + size[rb as usize];
        merges.push(Merge {
            parts: (node[ra as usize], node[rb as usize]),
            areoles,
        });
        parent[rb as usize] = ra;
        size[ra as usize] = areoles;
        node[ra as usize] = leaves + merges.len() as u32 - 1;
    }
    (leaves, merges)
}

/// One minus the mean topological asymmetry of the merges holding more than two areoles;
/// `None` when there is none.
pub(crate) fn nesting_number(leaves: u32, merges: &[Merge]) -> Option<f64> {
    let held = |id: u32| -> u32 {
        if id < leaves {
            1
        } else {
            merges
                .get((id - leaves) as usize)
                .map_or(1, |merge| merge.areoles)
        }
    };
    let mut total = 0.0;
    let mut counted = 0usize;
    for merge in merges {
        let (r, s) = (held(merge.parts.0), held(merge.parts.1));
        if r + s > 2 {
            total += f64::from(r.abs_diff(s)) / f64::from(r + s - 2);
            counted += 1;
        }
    }
    (counted > 0).then(|| 1.0 - total / counted as f64)
}

/// Decades spanned by the areole areas: `log10(largest / smallest)`; `None` without areoles.
pub(crate) fn area_decades(areas: &[f64]) -> Option<f64> {
    let largest = areas.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let smallest = areas.iter().copied().fold(f64::INFINITY, f64::min);
    (smallest > 0.0 && largest.is_finite()).then(|| libm::log10(largest / smallest))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A 4 x 2 grid of unit squares: nodes at (x, y) for x 0..=4, y 0..=2 (index 3 x + y).
    /// Widths: the middle vertical x = 2 is 3, the horizontal y = 1 is 2, the verticals x = 1
    /// and x = 3 are 1, the outer boundary 5. Worked by hand: the thin verticals merge the
    /// squares left and right of them in pairs (4 merges of 1 + 1), the horizontal merges the
    /// pairs above and below it (2 merges of 2 + 2), the middle vertical the two halves (4 + 4):
    /// every merge beyond the first level is even, so the nesting number is 1.
    #[test]
    fn evenly_halved_rectangle_nests_fully() {
        let (points, edges, weights) = grid(|x0, y0, x1, y1| {
            if x0 == x1 {
                match x0 {
                    0 | 4 => 5.0,
                    2 => 3.0,
                    _ => 1.0,
                }
            } else if y0 == 1 && y1 == 1 {
                2.0
            } else {
                5.0
            }
        });
        let (leaves, merges) = loop_hierarchy(&points, &edges, &weights);
        assert_eq!(leaves, 8);
        assert_eq!(merges.len(), 7);
        let sizes: Vec<u32> = merges.iter().map(|merge| merge.areoles).collect();
        assert_eq!(sizes, vec![2, 2, 2, 2, 4, 4, 8]);
        // The last merge joins the two 4-areole halves (ids 8 + 4 and 8 + 5).
        let (a, b) = merges[6].parts;
        assert_eq!((a.min(b), a.max(b)), (12, 13));
        assert_eq!(nesting_number(leaves, &merges), Some(1.0));
    }

    /// The same grid's bottom row alone as a ladder: 4 squares whose dividers widen left to
    /// right (1, 2, 3): merges of 1 + 1, then 2 + 1 (asymmetry 1), then 3 + 1 (asymmetry 1):
    /// nesting number 0.
    #[test]
    fn a_ladder_does_not_nest() {
        let points: Vec<(f64, f64)> = (0..=4)
            .flat_map(|x| (0..=1).map(move |y| (f64::from(x), f64::from(y))))
            .collect();
        let index = |x: u32, y: u32| x * 2 + y;
        let mut edges = Vec::new();
        let mut weights = Vec::new();
        for x in 0..=4u32 {
            edges.push((index(x, 0), index(x, 1)));
            weights.push(if x == 0 || x == 4 { 9.0 } else { f64::from(x) });
        }
        for x in 0..4u32 {
            for y in 0..=1u32 {
                edges.push((index(x, y), index(x + 1, y)));
                weights.push(9.0);
            }
        }
        let (leaves, merges) = loop_hierarchy(&points, &edges, &weights);
        assert_eq!(leaves, 4);
        let sizes: Vec<u32> = merges.iter().map(|merge| merge.areoles).collect();
        assert_eq!(sizes, vec![2, 3, 4]);
        assert_eq!(nesting_number(leaves, &merges), Some(0.0));
    }

    #[test]
    fn decades_of_areas() {
        assert_eq!(area_decades(&[0.5, 5.0, 50.0]), Some(2.0));
        assert_eq!(area_decades(&[]), None);
    }

    type Drawing = (Vec<(f64, f64)>, Vec<(u32, u32)>, Vec<f64>);

    fn grid(width: impl Fn(u32, u32, u32, u32) -> f64) -> Drawing {
        let points: Vec<(f64, f64)> = (0..=4)
            .flat_map(|x| (0..=2).map(move |y| (f64::from(x), f64::from(y))))
            .collect();
        let index = |x: u32, y: u32| x * 3 + y;
        let mut edges = Vec::new();
        let mut weights = Vec::new();
        for x in 0..=4u32 {
            for y in 0..=2u32 {
                if x < 4 {
                    edges.push((index(x, y), index(x + 1, y)));
                    weights.push(width(x, y, x + 1, y));
                }
                if y < 2 {
                    edges.push((index(x, y), index(x, y + 1)));
                    weights.push(width(x, y, x, y + 1));
                }
            }
        }
        (points, edges, weights)
    }
}
