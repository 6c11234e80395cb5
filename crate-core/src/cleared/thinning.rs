//! Thinning of a binary image to a one-pixel skeleton (`zhang_suen_thin`), and the removal of
//! the staircase corners it leaves on diagonals (`remove_staircase_corners`).

/// Neighbour offsets P2 ... P9 of Zhang & Suen, clockwise from north: N, NE, E, SE, S, SW, W,
/// NW, as (dx, dy) with y down.
const AROUND: [(i64, i64); 8] = [
    (0, -1),
    (1, -1),
    (1, 0),
    (1, 1),
    (0, 1),
    (-1, 1),
    (-1, 0),
    (-1, -1),
];

/// The eight neighbours P2 ... P9 of pixel (x, y), off outside the image.
fn neighbours(on: &[bool], width: usize, height: usize, x: usize, y: usize) -> [bool; 8] {
    let mut values = [false; 8];
    for (slot, &(dx, dy)) in values.iter_mut().zip(&AROUND) {
        let (nx, ny) = (x as i64 + dx, y as i64 + dy);
        *slot = nx >= 0
            && ny >= 0
            && (nx as usize) < width
            && (ny as usize) < height
            && on[ny as usize * width + nx as usize];
    }
    values
}

/// Thins `on` in place by the parallel algorithm of Zhang & Suen (1984, "A fast parallel
/// algorithm for thinning digital patterns", Commun. ACM 27(3), 236-239). Each iteration has
/// two sub-iterations; a pixel is deleted when it has 2 to 6 neighbours (B), exactly one
/// off-to-on transition in the sequence P2, P3, ..., P9, P2 (A), and P2 P4 P6 = 0 and
/// P4 P6 P8 = 0 in the first sub-iteration, P2 P4 P8 = 0 and P2 P6 P8 = 0 in the second.
/// Deletions of a sub-iteration are decided on the image as it was before it. Returns the
/// number of iterations.
pub fn zhang_suen_thin(on: &mut [bool], width: usize, height: usize) -> usize {
    let mut candidates: Vec<usize> = (0..on.len()).filter(|&i| on[i]).collect();
    let mut delete = Vec::new();
    let mut iterations = 0;
    loop {
        iterations += 1;
        let mut changed = false;
        for step in 0..2 {
            delete.clear();
            for &index in &candidates {
                if !on[index] {
                    continue;
                }
                let p = neighbours(on, width, height, index % width, index / width);
                let b = p.iter().filter(|&&v| v).count();
                if !(2..=6).contains(&b) {
                    continue;
                }
                let a = (0..8).filter(|&k| !p[k] && p[(k + 1) % 8]).count();
                if a != 1 {
                    continue;
                }
                let [p2, _p3, p4, _p5, p6, _p7, p8, _p9] = p;
                let keep = if step == 0 {
                    (p2 && p4 && p6) || (p4 && p6 && p8)
                } else {
                    (p2 && p4 && p8) || (p2 && p6 && p8)
                };
                if !keep {
                    delete.push(index);
                }
            }
            for &index in &delete {
                on[index] = false;
            }
            changed |= !delete.is_empty();
        }
        candidates.retain(|&index| on[index]);
        if !changed {
            return iterations;
        }
    }
}

/// Removes the corner pixels of staircases: a pixel whose only two neighbours are two
/// perpendicular 4-neighbours (north and east, say) joins nothing that is not already joined
/// diagonally, so deleting it keeps the skeleton 8-connected and makes each diagonal run one
/// pixel wide (common practice, no source: Zhang-Suen leaves such corners, and they would read
/// as junctions). Returns how many were removed.
pub fn remove_staircase_corners(on: &mut [bool], width: usize, height: usize) -> usize {
    let mut removed = 0;
    for index in 0..on.len() {
        if !on[index] {
            continue;
        }
        let p = neighbours(on, width, height, index % width, index / width);
        if p.iter().filter(|&&v| v).count() != 2 {
            continue;
        }
        let [n, _, e, _, s, _, w, _] = p;
        if (n || s) && (e || w) {
            on[index] = false;
            removed += 1;
        }
    }
    removed
}

/// Number of on pixels among the eight neighbours of each pixel (0 for off pixels).
pub fn neighbour_counts(on: &[bool], width: usize, height: usize) -> Vec<u8> {
    (0..on.len())
        .map(|index| {
            if on[index] {
                neighbours(on, width, height, index % width, index / width)
                    .iter()
                    .filter(|&&v| v)
                    .count() as u8
            } else {
                0
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A filled 5 x 11 bar thins to a horizontal line: no pixel with more than two
    /// neighbours, two end points.
    #[test]
    fn a_bar_thins_to_a_line() {
        let (width, height) = (15, 9);
        let mut on = vec![false; width * height];
        for y in 2..7 {
            for x in 2..13 {
                on[y * width + x] = true;
            }
        }
        zhang_suen_thin(&mut on, width, height);
        remove_staircase_corners(&mut on, width, height);
        let counts = neighbour_counts(&on, width, height);
        assert!(on.iter().filter(|&&b| b).count() >= 5);
        assert!(counts.iter().all(|&c| c <= 2));
        assert_eq!(counts.iter().filter(|&&c| c == 1).count(), 2);
    }
}
