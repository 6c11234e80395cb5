//! `unreached_parts`: the parts of a grown site that no outlet reaches (allowed cells the
//! layout never grew into, cut off by obstacles or the outline), each with its cells, area and
//! boundary rings along the cell edges, so that they are drawn and listed rather than dropped.
//!
//! Parts are 4-connected: water passes from a cell to the four that share an edge with it, never
//! through a corner. Rings are traced edge by edge around the part's cells with the part on the
//! left (Gonzalez & Woods, Digital Image Processing, 3rd ed., section 11.1.1, boundary
//! following, here along cell edges rather than through cell centres). Where two cells outside
//! the part meet only at a corner (a hole touching the ground outside there; in a 4-connected
//! part the two are never joined otherwise), the walk turns right, round the outside cell, so
//! the outer ring and the hole stay two simple rings touching at that corner, as a polygon's
//! rings may (OGC Simple Features 1.2.1, 6.1.11.1). In the lattice frame taken with y up (as
//! the shoelace formula reads it), an
//! outer ring runs counter-clockwise (positive area) and a hole clockwise (negative), so the
//! sum of the signed areas is the part's cell count times the cell's area.

use std::collections::HashMap;

use crate::cleared::regions::four_connected_part;

use crate::network::Network;
use crate::params::Params;
use crate::region::allowed_cells;

/// A part of a grown site that no outlet reaches.
#[derive(Clone, Debug, PartialEq)]
pub struct UnreachedPart {
    /// How many cells (of the given lattice).
    pub cells: usize,
    /// Their area, in the run's length unit squared.
    pub area: f64,
    /// The part's outline as polygons, each an outer ring and its holes; corners in the
    /// network's frame (physical units from the lattice's top-left corner, y down the page),
    /// each ring listed once round without repeating its first corner.
    pub polygons: Vec<UnreachedPolygon>,
    /// Where its label goes: the centre of the part's cell nearest the mean of its cells'
    /// centres (inside the part), in the network's frame.
    pub label_at: [f64; 2],
    /// The centre of the part's bounding box, in the network's frame.
    pub centre: [f64; 2],
}

/// One polygon of an unreached part.
#[derive(Clone, Debug, PartialEq)]
pub struct UnreachedPolygon {
    /// The outer ring: positive shoelace area in the network's frame taken with y up.
    pub outer: Vec<[f64; 2]>,
    /// Holes (obstacles or reached ground inside the part): negative shoelace areas.
    pub holes: Vec<Vec<[f64; 2]>>,
}

/// The parts of `params`' allowed region that `network` (grown from `params`) leaves
/// unreached: allowed cells with no node, grouped into 4-connected parts, largest first (ties:
/// the part holding the lower cell index first). A refined run counts a given cell reached when
/// any of its finer cells is. Empty when every allowed cell is reached, or when the network's
/// cells do not belong to this lattice.
pub fn unreached_parts(params: &Params, network: &Network) -> Vec<UnreachedPart> {
    let width = params.domain.width as usize;
    let height = params.domain.height as usize;
    let cells = &network.cells;
    let factor = (cells.width as usize).checked_div(width).unwrap_or(0);
    if factor == 0
        || cells.width as usize != width * factor
        || cells.height as usize != height * factor
    {
        return Vec::new();
    }
    let allowed = allowed_cells(params);
    if allowed.len() != width * height {
        return Vec::new();
    }
    let mut reached = vec![false; width * height];
    for &fine in &cells.occupied {
        let (column, row) = (
            fine as usize % cells.width as usize,
            fine as usize / cells.width as usize,
        );
        if let Some(flag) = reached.get_mut((row / factor) * width + column / factor) {
            *flag = true;
        }
    }
    let open: Vec<bool> = allowed
        .iter()
        .zip(&reached)
        .map(|(&ok, &reached)| ok && !reached)
        .collect();
    let size = params.domain.cell_size;
    let mut seen = vec![false; width * height];
    let mut parts = Vec::new();
    for start in 0..width * height {
        if !open[start] || seen[start] {
            continue;
        }
        let members = four_connected_part(start, &open, &mut seen, width, height);
        parts.push(describe(&members, width, size));
    }
    // A stable sort: equal parts keep the order of their first cells.
    parts.sort_by_key(|part| std::cmp::Reverse(part.cells));
    parts
}

fn describe(members: &[usize], width: usize, size: f64) -> UnreachedPart {
    let count = members.len();
    let (mut low, mut high) = ([usize::MAX; 2], [0usize; 2]);
    let (mut sum_x, mut sum_y) = (0.0, 0.0);
    for &cell in members {
        let (column, row) = (cell % width, cell / width);
        low = [low[0].min(column), low[1].min(row)];
        high = [high[0].max(column), high[1].max(row)];
        sum_x += column as f64 + 0.5;
        sum_y += row as f64 + 0.5;
    }
    let mean = [sum_x / count as f64, sum_y / count as f64];
    let nearest = members
        .iter()
        .copied()
        .min_by(|&a, &b| {
            let distance = |cell: usize| {
                let dx = (cell % width) as f64 + 0.5 - mean[0];
                let dy = (cell / width) as f64 + 0.5 - mean[1];
                dx * dx + dy * dy
            };
            distance(a).total_cmp(&distance(b))
        })
        .unwrap_or(0);
    let rings = trace_rings(members, width);
    let polygons = group_rings(rings)
        .into_iter()
        .map(|(outer, holes)| {
            let scale = |ring: Vec<[i64; 2]>| -> Vec<[f64; 2]> {
                ring.into_iter()
                    .map(|[x, y]| [x as f64 * size, y as f64 * size])
                    .collect()
            };
            UnreachedPolygon {
                outer: scale(outer),
                holes: holes.into_iter().map(scale).collect(),
            }
        })
        .collect();
    UnreachedPart {
        cells: count,
        area: count as f64 * size * size,
        polygons,
        label_at: [
            ((nearest % width) as f64 + 0.5) * size,
            ((nearest / width) as f64 + 0.5) * size,
        ],
        centre: [
            (low[0] + high[0] + 1) as f64 / 2.0 * size,
            (low[1] + high[1] + 1) as f64 / 2.0 * size,
        ],
    }
}

/// The boundary rings of a set of cells, in lattice corners (see the module comment).
fn trace_rings(members: &[usize], width: usize) -> Vec<Vec<[i64; 2]>> {
    let inside: std::collections::HashSet<(i64, i64)> = members
        .iter()
        .map(|&cell| ((cell % width) as i64, (cell / width) as i64))
        .collect();
    // Directed edges with the cell on their left (y taken up): per start corner, its edges'
    // directions.
    let mut outgoing: HashMap<(i64, i64), Vec<(i64, i64)>> = HashMap::new();
    let mut edges = 0usize;
    // In the part's own order, so the rings come out the same on every run.
    for &cell in members {
        let (x, y) = ((cell % width) as i64, (cell / width) as i64);
        // (neighbour, start corner, direction) for the sides below, right, above and left.
        let sides = [
            ((x, y - 1), (x, y), (1, 0)),
            ((x + 1, y), (x + 1, y), (0, 1)),
            ((x, y + 1), (x + 1, y + 1), (-1, 0)),
            ((x - 1, y), (x, y + 1), (0, -1)),
        ];
        for (neighbour, start, direction) in sides {
            if !inside.contains(&neighbour) {
                outgoing.entry(start).or_default().push(direction);
                edges += 1;
            }
        }
    }
    // Rings start at the lowest corner left, so they come out in a fixed order. The first
    // edge of a ring stays listed until the walk comes back to it: at a pinched corner the
    // turn then closes the ring through it rather than running on into another ring.
    let mut starts: Vec<(i64, i64)> = outgoing.keys().copied().collect();
    starts.sort_unstable_by_key(|&(x, y)| (y, x));
    let mut rings = Vec::new();
    let mut used = 0usize;
    for first in starts {
        while let Some(&direction) = outgoing.get(&first).and_then(|list| list.last()) {
            let mut ring = Vec::new();
            let (mut at, mut heading) = (first, direction);
            let mut steps = 0usize;
            loop {
                at = (at.0 + heading.0, at.1 + heading.1);
                steps += 1;
                let Some(choices) = outgoing.get_mut(&at) else {
                    break;
                };
                // Right, straight, left (y up): the right turn keeps pinched rings apart.
                let left = (-heading.1, heading.0);
                let right = (heading.1, -heading.0);
                let Some(index) = [right, heading, left]
                    .iter()
                    .find_map(|turn| choices.iter().position(|choice| choice == turn))
                else {
                    break;
                };
                let next = choices[index];
                if next != heading {
                    ring.push([at.0, at.1]);
                }
                let closing = at == first && next == direction;
                if !closing {
                    choices.swap_remove(index);
                    used += 1;
                }
                heading = next;
                if closing || steps > edges {
                    break;
                }
            }
            // The first edge, kept listed until now.
            if let Some(list) = outgoing.get_mut(&first) {
                if let Some(index) = list.iter().position(|&choice| choice == direction) {
                    list.swap_remove(index);
                    used += 1;
                }
            }
            rings.push(ring);
        }
    }
    debug_assert_eq!(used, edges, "every boundary edge lies on one ring");
    rings
}

/// Twice the signed area of a ring by the shoelace formula (y taken up).
fn twice_area(ring: &[[i64; 2]]) -> i64 {
    let n = ring.len();
    (0..n)
        .map(|i| {
            let (a, b) = (ring[i], ring[(i + 1) % n]);
            a[0] * b[1] - b[0] * a[1]
        })
        .sum()
}

/// Outer rings (positive area) each with the holes (negative area) inside it: a hole goes to
/// the smallest outer ring holding the centre of a cell of the part beside its first edge.
#[allow(clippy::type_complexity)]
fn group_rings(rings: Vec<Vec<[i64; 2]>>) -> Vec<(Vec<[i64; 2]>, Vec<Vec<[i64; 2]>>)> {
    let (outers, holes): (Vec<_>, Vec<_>) =
        rings.into_iter().partition(|ring| twice_area(ring) > 0);
    let mut grouped: Vec<(Vec<[i64; 2]>, Vec<Vec<[i64; 2]>>)> = outers
        .into_iter()
        .map(|outer| (outer, Vec::new()))
        .collect();
    for hole in holes {
        // A hole runs with the part on its left: the cell left of its first edge is the part's.
        let (a, b) = (hole[0], hole[1 % hole.len()]);
        let direction = [(b[0] - a[0]).signum(), (b[1] - a[1]).signum()];
        // Twice the centre of the cell left of the edge's first unit step (y up).
        let probe = [
            2 * a[0] + direction[0] - direction[1],
            2 * a[1] + direction[1] + direction[0],
        ];
        let holder = grouped
            .iter()
            .enumerate()
            .filter(|(_, (outer, _))| holds(outer, probe))
            .min_by_key(|(_, (outer, _))| twice_area(outer))
            .map(|(index, _)| index);
        match holder {
            Some(index) => grouped[index].1.push(hole),
            // Cannot happen for cells of one part; kept as its own ring rather than lost.
            None => grouped.push((hole.into_iter().rev().collect(), Vec::new())),
        }
    }
    grouped
}

/// Whether the point `probe / 2` lies inside `ring` (even-odd crossings; the probe is a cell
/// centre, never on an edge).
fn holds(ring: &[[i64; 2]], probe: [i64; 2]) -> bool {
    let n = ring.len();
    let mut inside = false;
    for i in 0..n {
        let (a, b) = (ring[i], ring[(i + 1) % n]);
        let (ay, by) = (2 * a[1], 2 * b[1]);
        if (ay > probe[1]) != (by > probe[1]) {
            // x of the edge at the probe's height, compared without division.
            let (ax, bx) = (2 * a[0], 2 * b[0]);
            let cross = (bx - ax) * (probe[1] - ay) - (probe[0] - ax) * (by - ay);
            if (cross > 0) == (by > ay) {
                inside = !inside;
            }
        }
    }
    inside
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The cells of a drawing (`#` in the set), row 0 first, and the drawing's width.
    fn cells(rows: &[&str]) -> (Vec<usize>, usize) {
        let width = rows[0].len();
        let members = rows
            .iter()
            .enumerate()
            .flat_map(|(row, text)| {
                text.bytes()
                    .enumerate()
                    .filter(|&(_, byte)| byte == b'#')
                    .map(move |(column, _)| row * width + column)
            })
            .collect();
        (members, width)
    }

    fn areas(rings: &[Vec<[i64; 2]>]) -> Vec<i64> {
        let mut areas: Vec<i64> = rings.iter().map(|ring| twice_area(ring)).collect();
        areas.sort_unstable();
        areas
    }

    // Shapes drawn by hand; areas by the shoelace formula over their corners, counted on the
    // drawing (twice the area, in cells).
    #[test]
    fn a_cell_and_an_l_have_one_ring_of_their_corners() {
        let (members, width) = cells(&["#"]);
        let rings = trace_rings(&members, width);
        assert_eq!(rings.len(), 1);
        assert_eq!(rings[0].len(), 4);
        assert_eq!(twice_area(&rings[0]), 2);
        let (members, width) = cells(&["#.", "##"]);
        let rings = trace_rings(&members, width);
        assert_eq!(rings.len(), 1);
        // The L's six corners: (0,0) (1,0) (1,1) (2,1) (2,2) (0,2), area 3.
        let mut corners = rings[0].clone();
        corners.sort_unstable();
        assert_eq!(
            corners,
            vec![[0, 0], [0, 2], [1, 0], [1, 1], [2, 1], [2, 2]]
        );
        assert_eq!(twice_area(&rings[0]), 6);
    }

    #[test]
    fn a_ring_of_cells_has_an_outer_ring_and_a_hole() {
        let (members, width) = cells(&["###", "#.#", "###"]);
        let rings = trace_rings(&members, width);
        assert_eq!(areas(&rings), vec![-2, 18]);
        let polygons = group_rings(rings);
        assert_eq!(polygons.len(), 1);
        assert_eq!(polygons[0].1.len(), 1);
    }

    // The hole (1, 1) meets the outside (2, 2) at the corner (2, 2): the walk turns right
    // there, so the outer ring (3 x 3 less a corner cell: 8) and the hole (1) stay apart.
    #[test]
    fn a_hole_pinched_against_the_outside_stays_a_ring_of_its_own() {
        let (members, width) = cells(&["###", "#.#", "##."]);
        let rings = trace_rings(&members, width);
        assert_eq!(areas(&rings), vec![-2, 16]);
        let outer = rings
            .iter()
            .find(|ring| twice_area(ring) > 0)
            .expect("an outer ring");
        let mut corners = outer.clone();
        corners.sort_unstable();
        assert_eq!(
            corners,
            vec![[0, 0], [0, 3], [2, 2], [2, 3], [3, 0], [3, 2]]
        );
        for ring in &rings {
            let mut sorted = ring.clone();
            sorted.sort_unstable();
            sorted.dedup();
            assert_eq!(sorted.len(), ring.len(), "a corner repeated in {ring:?}");
        }
        let polygons = group_rings(rings);
        assert_eq!(polygons.len(), 1);
        assert_eq!(polygons[0].1.len(), 1);
    }
}
