//! Plane geometry of site rings: closing and self-crossing checks, point-in-ring with the
//! boundary counted in, the nearest edge of a ring, and signed area (shoelace formula).

use crate::region::point_in_polygon;

/// The first pair of edges of a ring (without its closing position) that cross, touch or
/// overlap, with about where they meet. Edge `k` joins positions `k` and `k + 1` (the last
/// edge closes the ring). Neighbouring edges may only share their common end; zero-length
/// edges (a position repeated) are passed over.
pub(crate) fn first_self_contact(ring: &[[f64; 2]]) -> Option<((usize, usize), [f64; 2])> {
    let count = ring.len();
    let edge = |k: usize| (ring[k], ring[(k + 1) % count]);
    for first in 0..count {
        let (a, b) = edge(first);
        if a == b {
            continue;
        }
        for second in first + 1..count {
            let (c, d) = edge(second);
            if c == d {
                continue;
            }
            let neighbours = second == first + 1 || (first == 0 && second == count - 1);
            if neighbours {
                // Sharing one end is what neighbours do; folding back along each other is not.
                let (shared, other_first, other_second) = if second == first + 1 {
                    (b, a, d)
                } else {
                    (a, b, c)
                };
                if orientation(shared, other_first, other_second) == 0.0
                    && dot(sub(other_first, shared), sub(other_second, shared)) > 0.0
                {
                    return Some(((first, second), shared));
                }
                continue;
            }
            if segments_meet(a, b, c, d) {
                return Some(((first, second), meeting_point(a, b, c, d)));
            }
        }
    }
    None
}

/// Whether `point` lies inside the ring or on its boundary (within a billionth of the ring's
/// size, so a point placed on an edge by hand counts as on it).
pub(crate) fn inside_or_on(ring: &[[f64; 2]], point: [f64; 2]) -> bool {
    if ring.len() < 3 {
        return false;
    }
    if point_in_polygon(point[0], point[1], ring) {
        return true;
    }
    let tolerance = 1e-9 * extent(ring).max(f64::MIN_POSITIVE);
    nearest_edge(ring, point).is_some_and(|(_, distance)| distance <= tolerance)
}

/// The edge of the ring nearest to `point` and its distance.
pub(crate) fn nearest_edge(ring: &[[f64; 2]], point: [f64; 2]) -> Option<(usize, f64)> {
    let count = ring.len();
    (0..count)
        .map(|k| {
            (
                k,
                distance_to_segment(point, ring[k], ring[(k + 1) % count]),
            )
        })
        .min_by(|a, b| a.1.total_cmp(&b.1))
}

/// Signed area by the shoelace formula: positive when the ring runs anticlockwise (x east,
/// y north).
pub(crate) fn signed_area(ring: &[[f64; 2]]) -> f64 {
    let count = ring.len();
    (0..count)
        .map(|k| {
            let (a, b) = (ring[k], ring[(k + 1) % count]);
            a[0] * b[1] - b[0] * a[1]
        })
        .sum::<f64>()
        / 2.0
}

/// The larger side of the ring's bounding box.
pub(crate) fn extent(ring: &[[f64; 2]]) -> f64 {
    let (low, high) = bounds(ring);
    (high[0] - low[0]).max(high[1] - low[1])
}

/// The ring's bounding box: lowest and highest x and y.
pub(crate) fn bounds(ring: &[[f64; 2]]) -> ([f64; 2], [f64; 2]) {
    let mut low = [f64::INFINITY; 2];
    let mut high = [f64::NEG_INFINITY; 2];
    for point in ring {
        for axis in 0..2 {
            low[axis] = low[axis].min(point[axis]);
            high[axis] = high[axis].max(point[axis]);
        }
    }
    (low, high)
}

pub(crate) fn distance_to_segment(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    let ab = sub(b, a);
    let squared = dot(ab, ab);
    let t = if squared > 0.0 {
        (dot(sub(p, a), ab) / squared).clamp(0.0, 1.0)
    } else {
        0.0
    };
    let foot = [a[0] + t * ab[0], a[1] + t * ab[1]];
    let d = sub(p, foot);
    (d[0] * d[0] + d[1] * d[1]).sqrt()
}

fn sub(a: [f64; 2], b: [f64; 2]) -> [f64; 2] {
    [a[0] - b[0], a[1] - b[1]]
}

fn dot(a: [f64; 2], b: [f64; 2]) -> f64 {
    a[0] * b[0] + a[1] * b[1]
}

/// Twice the signed area of triangle `a b c`: positive when it turns left.
fn orientation(a: [f64; 2], b: [f64; 2], c: [f64; 2]) -> f64 {
    (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])
}

/// Whether `p`, known to lie on the line through `a` and `b`, lies within their box.
fn within_box(a: [f64; 2], b: [f64; 2], p: [f64; 2]) -> bool {
    p[0] >= a[0].min(b[0])
        && p[0] <= a[0].max(b[0])
        && p[1] >= a[1].min(b[1])
        && p[1] <= a[1].max(b[1])
}

/// Whether closed segments `ab` and `cd` share a point (the classic orientation test, with
/// the collinear and touching cases).
fn segments_meet(a: [f64; 2], b: [f64; 2], c: [f64; 2], d: [f64; 2]) -> bool {
    let o1 = orientation(a, b, c);
    let o2 = orientation(a, b, d);
    let o3 = orientation(c, d, a);
    let o4 = orientation(c, d, b);
    if ((o1 > 0.0 && o2 < 0.0) || (o1 < 0.0 && o2 > 0.0))
        && ((o3 > 0.0 && o4 < 0.0) || (o3 < 0.0 && o4 > 0.0))
    {
        return true;
    }
    (o1 == 0.0 && within_box(a, b, c))
        || (o2 == 0.0 && within_box(a, b, d))
        || (o3 == 0.0 && within_box(c, d, a))
        || (o4 == 0.0 && within_box(c, d, b))
}

/// About where two meeting segments meet: their crossing, or an end lying on the other.
fn meeting_point(a: [f64; 2], b: [f64; 2], c: [f64; 2], d: [f64; 2]) -> [f64; 2] {
    let ab = sub(b, a);
    let cd = sub(d, c);
    let denominator = ab[0] * cd[1] - ab[1] * cd[0];
    if denominator != 0.0 {
        let t = ((c[0] - a[0]) * cd[1] - (c[1] - a[1]) * cd[0]) / denominator;
        return [a[0] + t * ab[0], a[1] + t * ab[1]];
    }
    for p in [c, d] {
        if within_box(a, b, p) {
            return p;
        }
    }
    a
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_square_is_simple_and_a_bow_tie_is_not() {
        let square = [[0.0, 0.0], [4.0, 0.0], [4.0, 4.0], [0.0, 4.0]];
        assert_eq!(first_self_contact(&square), None);
        let bow_tie = [[0.0, 0.0], [4.0, 4.0], [4.0, 0.0], [0.0, 4.0]];
        let ((first, second), near) = first_self_contact(&bow_tie).expect("crossing");
        assert_eq!((first, second), (0, 2));
        assert!((near[0] - 2.0).abs() < 1e-12 && (near[1] - 2.0).abs() < 1e-12);
    }

    #[test]
    fn a_spike_folding_back_is_a_contact() {
        let spike = [[0.0, 0.0], [4.0, 0.0], [2.0, 0.0], [2.0, 3.0]];
        assert!(first_self_contact(&spike).is_some());
    }

    /// Shoelace formula on a 3-4-5 right triangle: area 6, anticlockwise positive.
    #[test]
    fn shoelace_area_of_a_right_triangle() {
        let triangle = [[0.0, 0.0], [3.0, 0.0], [0.0, 4.0]];
        assert_eq!(signed_area(&triangle), 6.0);
        let reversed = [[0.0, 0.0], [0.0, 4.0], [3.0, 0.0]];
        assert_eq!(signed_area(&reversed), -6.0);
    }

    #[test]
    fn boundary_points_count_as_inside() {
        let square = [[0.0, 0.0], [4.0, 0.0], [4.0, 4.0], [0.0, 4.0]];
        assert!(inside_or_on(&square, [4.0, 2.0]));
        assert!(inside_or_on(&square, [2.0, 0.0]));
        assert!(!inside_or_on(&square, [4.1, 2.0]));
    }
}
