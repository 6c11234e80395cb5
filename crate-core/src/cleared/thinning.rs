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
                    p4 && p6 && (p2 || p8)
                } else {
                    p2 && p8 && (p4 || p6)
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

/// Removes the pixels Zhang-Suen thinning leaves two deep on diagonals and curves (the
/// staircase corners, and the thicker corners where two diagonal runs meet), so that the
/// skeleton is one pixel thin and a step of a curve does not read as a junction.
///
/// A pixel is removed when it is not an end point (it has two or more neighbours) and it is
/// a *simple point*: its on neighbours form exactly one 8-connected group within the 3 x 3
/// window, and its off 4-neighbours belong to exactly one 4-connected group of off pixels
/// within the window, so removing it changes neither the parts nor the holes of the skeleton
/// (the simple-point condition of digital topology; Kong & Rosenfeld 1989, "Digital
/// topology: introduction and survey", Comput. Vision Graph. Image Process. 48, section 5).
/// Pixels are visited in row order, each decided on the image as it is then, until a pass
/// removes nothing. Returns how many were removed.
pub fn remove_staircase_corners(on: &mut [bool], width: usize, height: usize) -> usize {
    let mut removed = 0;
    loop {
        let mut changed = false;
        for index in 0..on.len() {
            if !on[index] {
                continue;
            }
            let p = neighbours(on, width, height, index % width, index / width);
            if p.iter().filter(|&&v| v).count() >= 2 && is_simple(&p) {
                on[index] = false;
                removed += 1;
                changed = true;
            }
        }
        if !changed {
            return removed;
        }
    }
}

/// Whether a pixel with neighbours `p` (N, NE, E, SE, S, SW, W, NW) is a simple point: one
/// 8-connected group of on neighbours, and one 4-connected group of off pixels holding its
/// off 4-neighbours, both within the 3 x 3 window.
fn is_simple(p: &[bool; 8]) -> bool {
    // On neighbours: around the ring, consecutive pixels are 8-adjacent, and so are the two
    // 4-neighbours on either side of a corner (N and E through NE, ...). Off pixels: only
    // consecutive ring pixels with one a 4-neighbour are 4-adjacent (a corner and the
    // 4-neighbours beside it), and 4-neighbours are never 4-adjacent to each other directly.
    let on_groups = groups(p, true);
    let off_groups = groups(p, false);
    on_groups == 1 && off_groups == 1
}

/// Counts the groups of ring positions equal to `value`: for on pixels 8-adjacency (ring
/// neighbours, plus 4-neighbours two apart), for off pixels 4-adjacency (ring neighbours
/// only), counting only off groups that hold a 4-neighbour.
fn groups(p: &[bool; 8], value: bool) -> usize {
    let mut label = [usize::MAX; 8];
    let mut count = 0;
    for start in 0..8 {
        if p[start] != value || label[start] != usize::MAX {
            continue;
        }
        let mut stack = vec![start];
        label[start] = count;
        let mut holds_four_neighbour = false;
        while let Some(k) = stack.pop() {
            holds_four_neighbour |= k % 2 == 0;
            let mut adjacent = vec![(k + 1) % 8, (k + 7) % 8];
            if value && k % 2 == 0 {
                adjacent.push((k + 2) % 8);
                adjacent.push((k + 6) % 8);
            }
            for next in adjacent {
                if p[next] == value && label[next] == usize::MAX {
                    label[next] = count;
                    stack.push(next);
                }
            }
        }
        if value || holds_four_neighbour {
            count += 1;
        }
    }
    count
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
