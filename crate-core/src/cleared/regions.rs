//! Binary regions of an image: 4-connected parts (`four_connected_part`), the largest of them
//! (`largest_component`), its
//! holes filled (`fill_holes`), and its outline as a ring along pixel edges
//! (`outline_ring`), whose shoelace area is exactly its pixel count.

/// Keeps only the largest 4-connected component of `on` (the first found, in row-major
/// order, among equal sizes). Returns the mask and its pixel count (0 when nothing is on).
pub fn largest_component(on: &[bool], width: usize, height: usize) -> (Vec<bool>, usize) {
    let mut seen = vec![false; on.len()];
    let mut best: Vec<usize> = Vec::new();
    for start in 0..on.len() {
        if !on[start] || seen[start] {
            continue;
        }
        let part = four_connected_part(start, on, &mut seen, width, height);
        if part.len() > best.len() {
            best = part;
        }
    }
    let mut mask = vec![false; on.len()];
    for &index in &best {
        mask[index] = true;
    }
    (mask, best.len())
}

/// The 4-connected part of `on` cells holding `start` (which must be on and not yet in
/// `seen`), in breadth-first order from `start`, marking its cells in `seen`.
pub fn four_connected_part(
    start: usize,
    on: &[bool],
    seen: &mut [bool],
    width: usize,
    height: usize,
) -> Vec<usize> {
    let mut members = Vec::new();
    let mut queue = std::collections::VecDeque::from([start]);
    seen[start] = true;
    while let Some(cell) = queue.pop_front() {
        members.push(cell);
        let (column, row) = (cell % width, cell / width);
        let mut visit = |next: usize| {
            if on[next] && !seen[next] {
                seen[next] = true;
                queue.push_back(next);
            }
        };
        if column > 0 {
            visit(cell - 1);
        }
        if column + 1 < width {
            visit(cell + 1);
        }
        if row > 0 {
            visit(cell - width);
        }
        if row + 1 < height {
            visit(cell + width);
        }
    }
    members
}

/// Fills the holes of `on`: every pixel that is off and cannot reach the image's border
/// through off pixels (8-connected, the complement of 4-connected regions) is turned on.
pub fn fill_holes(on: &mut [bool], width: usize, height: usize) {
    let mut outside = vec![false; on.len()];
    let mut stack = Vec::new();
    for y in 0..height {
        for x in 0..width {
            let border = x == 0 || y == 0 || x + 1 == width || y + 1 == height;
            let index = y * width + x;
            if border && !on[index] && !outside[index] {
                outside[index] = true;
                stack.push(index);
            }
        }
    }
    while let Some(index) = stack.pop() {
        let (x, y) = ((index % width) as i64, (index / width) as i64);
        for dy in -1..=1i64 {
            for dx in -1..=1i64 {
                let (nx, ny) = (x + dx, y + dy);
                if nx < 0 || ny < 0 || nx >= width as i64 || ny >= height as i64 {
                    continue;
                }
                let neighbour = ny as usize * width + nx as usize;
                if !on[neighbour] && !outside[neighbour] {
                    outside[neighbour] = true;
                    stack.push(neighbour);
                }
            }
        }
    }
    for (pixel, &is_outside) in on.iter_mut().zip(&outside) {
        *pixel = !is_outside;
    }
}

/// The outline of a 4-connected region without holes as a closed ring of pixel corners (in
/// pixel units, (0, 0) the top-left corner of the image), following the pixel edges between
/// the region and the rest with the region on the walk's right in a y-down image; straight
/// runs become one side. Its shoelace area equals the region's pixel count. Where two region
/// pixels touch only at a corner, the walk keeps to the region (turns toward it). Empty when
/// nothing is on.
pub fn outline_ring(on: &[bool], width: usize, height: usize) -> Vec<(f64, f64)> {
    let is_on = |x: i64, y: i64| -> bool {
        x >= 0
            && y >= 0
            && (x as usize) < width
            && (y as usize) < height
            && on[y as usize * width + x as usize]
    };
    // The first region pixel in row-major order: its top edge is on the outline, walked
    // left to right (region below, on the right of the walk in y-down coordinates).
    let Some(first) = on.iter().position(|&pixel| pixel) else {
        return Vec::new();
    };
    let (start_x, start_y) = ((first % width) as i64, (first / width) as i64);
    // Directions: 0 right, 1 down, 2 left, 3 up.
    const STEP: [(i64, i64); 4] = [(1, 0), (0, 1), (-1, 0), (0, -1)];
    // Pixel on the right and on the left of a step from corner (x, y) in direction d.
    let right_pixel = |x: i64, y: i64, d: usize| match d {
        0 => (x, y),
        1 => (x - 1, y),
        2 => (x - 1, y - 1),
        _ => (x, y - 1),
    };
    let left_pixel = |x: i64, y: i64, d: usize| match d {
        0 => (x, y - 1),
        1 => (x, y),
        2 => (x - 1, y),
        _ => (x - 1, y - 1),
    };
    let mut ring = vec![(start_x as f64, start_y as f64)];
    let (mut x, mut y, mut d) = (start_x, start_y, 0usize);
    let limit = 4 * (width + 1) * (height + 1);
    for _ in 0..limit {
        x += STEP[d].0;
        y += STEP[d].1;
        if (x, y) == (start_x, start_y) && d == 3 {
            break;
        }
        // Turn toward the region first (right), else straight on, else left.
        let right = (d + 1) % 4;
        let (rx, ry) = right_pixel(x, y, right);
        let (lx, ly) = left_pixel(x, y, right);
        let next = if is_on(rx, ry) && !is_on(lx, ly) {
            right
        } else {
            let (sx, sy) = right_pixel(x, y, d);
            let (tx, ty) = left_pixel(x, y, d);
            if is_on(sx, sy) && !is_on(tx, ty) {
                d
            } else {
                (d + 3) % 4
            }
        };
        if next != d {
            ring.push((x as f64, y as f64));
        }
        d = next;
    }
    ring
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::specimen::ring_area;

    fn mask(rows: &[&str]) -> (Vec<bool>, usize, usize) {
        let width = rows[0].len();
        let on = rows
            .iter()
            .flat_map(|row| row.bytes().map(|b| b == b'#'))
            .collect();
        (on, width, rows.len())
    }

    /// The shoelace area of the ring (Braden 1986) is the pixel count, corners touching
    /// diagonally included.
    #[test]
    fn ring_area_is_the_pixel_count() {
        for rows in [
            &["....", ".##.", ".##.", "...."][..],
            &["#..", "##.", "###"][..],
            &[".#.#.", "#####", ".#.#.", "##.##"][..],
            &["##..", "##..", "..##", "..##", "####"][..],
        ] {
            let (on, width, height) = mask(rows);
            let (largest, count) = largest_component(&on, width, height);
            let ring = outline_ring(&largest, width, height);
            assert_eq!(ring_area(&ring), count as f64, "{rows:?}");
        }
    }

    #[test]
    fn holes_are_filled_and_the_largest_part_kept() {
        let (mut on, width, height) = mask(&["#####.", "#...#.", "#####.", "......", ".##..."]);
        fill_holes(&mut on, width, height);
        assert_eq!(on.iter().filter(|&&b| b).count(), 17);
        let (largest, count) = largest_component(&on, width, height);
        assert_eq!(count, 15);
        assert!(!largest[4 * width + 1]);
    }
}
