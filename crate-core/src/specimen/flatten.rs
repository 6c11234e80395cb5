//! Curve flattening for traced SVG paths: `Affine` (an SVG transform matrix), and
//! `flatten_quadratic`, `flatten_cubic` and `flatten_arc`, which replace a curve by straight
//! pieces no farther than a tolerance from it.
//!
//! Piece counts come from the chord bound for a curve `f(t)` with a bounded second derivative:
//! over a parameter interval of length `h`, the chord lies within `h^2 / 8 * max |f''|` of the
//! curve (Filip, Magedson & Markot 1986, "Surface algorithms using bounds on derivatives",
//! Computer Aided Geometric Design 3, lemma 3.1). For a Bezier curve of degree `d`,
//! `|f''| <= d (d - 1) M` with `M` the largest second difference of its control points; for an
//! elliptical arc in its angle parameter, `|f''| <= max(rx, ry)`. Sines and cosines come from
//! `libm`, so native and wasm builds flatten to the same bits.

use super::Point;

/// Most pieces one curve is cut into, whatever the tolerance (so a tiny tolerance cannot make a
/// file of a few bytes take gigabytes).
pub(crate) const MAX_PIECES_PER_CURVE: usize = 100_000;

/// An affine map `(x, y) -> (a x + c y + e, b x + d y + f)`, SVG's `matrix(a b c d e f)`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Affine {
    pub(crate) a: f64,
    pub(crate) b: f64,
    pub(crate) c: f64,
    pub(crate) d: f64,
    pub(crate) e: f64,
    pub(crate) f: f64,
}

impl Affine {
    /// The identity map.
    pub(crate) const IDENTITY: Affine = Affine {
        a: 1.0,
        b: 0.0,
        c: 0.0,
        d: 1.0,
        e: 0.0,
        f: 0.0,
    };

    /// `self` after `inner`: first `inner`, then `self` (an outer group's transform times an
    /// inner one, as SVG nests them).
    pub(crate) fn then_inner(&self, inner: &Affine) -> Affine {
        Affine {
            a: self.a * inner.a + self.c * inner.b,
            b: self.b * inner.a + self.d * inner.b,
            c: self.a * inner.c + self.c * inner.d,
            d: self.b * inner.c + self.d * inner.d,
            e: self.a * inner.e + self.c * inner.f + self.e,
            f: self.b * inner.e + self.d * inner.f + self.f,
        }
    }

    /// Maps a point.
    pub(crate) fn apply(&self, (x, y): Point) -> Point {
        (
            self.a * x + self.c * y + self.e,
            self.b * x + self.d * y + self.f,
        )
    }

    /// The largest factor by which the map stretches a length (its largest singular value).
    pub(crate) fn max_stretch(&self) -> f64 {
        let sum = self.a * self.a + self.b * self.b + self.c * self.c + self.d * self.d;
        let det = self.a * self.d - self.b * self.c;
        let root = (sum * sum - 4.0 * det * det).max(0.0).sqrt();
        ((sum + root) / 2.0).sqrt()
    }

    /// Whether every entry is a finite number.
    pub(crate) fn is_finite(&self) -> bool {
        [self.a, self.b, self.c, self.d, self.e, self.f]
            .iter()
            .all(|value| value.is_finite())
    }
}

/// Pieces needed for a curve whose second derivative is at most `bound` over a parameter
/// interval of length `span`, to stay within `tolerance`: `span * sqrt(bound / (8 tolerance))`
/// (the chord bound above), at least 1 and at most `MAX_PIECES_PER_CURVE`.
fn piece_count(bound: f64, span: f64, tolerance: f64) -> usize {
    let pieces = span * (bound / (8.0 * tolerance)).sqrt();
    if pieces.is_finite() && pieces >= 1.0 {
        (pieces.ceil() as usize).min(MAX_PIECES_PER_CURVE)
    } else if pieces.is_finite() {
        1
    } else {
        MAX_PIECES_PER_CURVE
    }
}

fn second_difference(p0: Point, p1: Point, p2: Point) -> f64 {
    let x = p0.0 - 2.0 * p1.0 + p2.0;
    let y = p0.1 - 2.0 * p1.1 + p2.1;
    (x * x + y * y).sqrt()
}

/// Appends the points of a quadratic Bezier curve from `p0` (not appended) through control
/// point `p1` to `p2`, each piece within `tolerance` of the curve.
pub fn flatten_quadratic(p0: Point, p1: Point, p2: Point, tolerance: f64, out: &mut Vec<Point>) {
    // f'' = 2 (p0 - 2 p1 + p2) for a quadratic.
    let pieces = piece_count(2.0 * second_difference(p0, p1, p2), 1.0, tolerance);
    for step in 1..=pieces {
        let t = step as f64 / pieces as f64;
        let u = 1.0 - t;
        out.push((
            u * u * p0.0 + 2.0 * u * t * p1.0 + t * t * p2.0,
            u * u * p0.1 + 2.0 * u * t * p1.1 + t * t * p2.1,
        ));
    }
}

/// Appends the points of a cubic Bezier curve from `p0` (not appended) through control points
/// `p1`, `p2` to `p3`, each piece within `tolerance` of the curve.
pub fn flatten_cubic(
    p0: Point,
    p1: Point,
    p2: Point,
    p3: Point,
    tolerance: f64,
    out: &mut Vec<Point>,
) {
    // |f''| <= 6 max(|p0 - 2 p1 + p2|, |p1 - 2 p2 + p3|) for a cubic.
    let bound = 6.0 * second_difference(p0, p1, p2).max(second_difference(p1, p2, p3));
    let pieces = piece_count(bound, 1.0, tolerance);
    for step in 1..=pieces {
        let t = step as f64 / pieces as f64;
        let u = 1.0 - t;
        let (b0, b1, b2, b3) = (u * u * u, 3.0 * u * u * t, 3.0 * u * t * t, t * t * t);
        out.push((
            b0 * p0.0 + b1 * p1.0 + b2 * p2.0 + b3 * p3.0,
            b0 * p0.1 + b1 * p1.1 + b2 * p2.1 + b3 * p3.1,
        ));
    }
}

/// An SVG elliptical arc in endpoint form, in the coordinates of the element that draws it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EndpointArc {
    /// Start point (the current point).
    pub from: Point,
    /// Radii `rx`, `ry` (signs are dropped, as SVG says).
    pub radii: (f64, f64),
    /// Rotation of the ellipse's x axis, in degrees.
    pub x_axis_rotation: f64,
    /// The large-arc flag.
    pub large_arc: bool,
    /// The sweep flag (true: angles increase, clockwise on screen).
    pub sweep: bool,
    /// End point.
    pub to: Point,
}

/// Appends the points of an elliptical arc (not its start), mapped by `transform`, each piece
/// within `tolerance` (in the transformed coordinates) of the mapped arc.
///
/// The centre form comes from the SVG 1.1 specification, appendix F.6.5 (conversion from
/// endpoint to center parameterization) with the out-of-range radii of F.6.6 scaled up; a
/// zero radius makes a straight line (F.6.2).
pub fn flatten_arc(
    arc: &EndpointArc,
    transform_map: &dyn Fn(Point) -> Point,
    stretch: f64,
    tolerance: f64,
    out: &mut Vec<Point>,
) {
    let (x1, y1) = arc.from;
    let (x2, y2) = arc.to;
    let (mut rx, mut ry) = (arc.radii.0.abs(), arc.radii.1.abs());
    if (x1 == x2 && y1 == y2) || rx == 0.0 || ry == 0.0 {
        // F.6.2: an arc between equal points is omitted; a zero radius makes a line.
        if x1 != x2 || y1 != y2 {
            out.push(transform_map(arc.to));
        }
        return;
    }
    let phi = arc.x_axis_rotation * core::f64::consts::PI / 180.0;
    let (sin_phi, cos_phi) = (libm::sin(phi), libm::cos(phi));
    // F.6.5.1
    let dx = (x1 - x2) / 2.0;
    let dy = (y1 - y2) / 2.0;
    let x1p = cos_phi * dx + sin_phi * dy;
    let y1p = -sin_phi * dx + cos_phi * dy;
    // F.6.6.2-3: scale radii up when no ellipse of these radii reaches both ends.
    let lambda = (x1p * x1p) / (rx * rx) + (y1p * y1p) / (ry * ry);
    if lambda > 1.0 {
        let root = lambda.sqrt();
        rx *= root;
        ry *= root;
    }
    // F.6.5.2
    let numerator = rx * rx * ry * ry - rx * rx * y1p * y1p - ry * ry * x1p * x1p;
    let denominator = rx * rx * y1p * y1p + ry * ry * x1p * x1p;
    let mut coefficient = (numerator / denominator).max(0.0).sqrt();
    if arc.large_arc == arc.sweep {
        coefficient = -coefficient;
    }
    let cxp = coefficient * rx * y1p / ry;
    let cyp = -coefficient * ry * x1p / rx;
    // F.6.5.3
    let cx = cos_phi * cxp - sin_phi * cyp + (x1 + x2) / 2.0;
    let cy = sin_phi * cxp + cos_phi * cyp + (y1 + y2) / 2.0;
    // F.6.5.5-6
    let start = libm::atan2((y1p - cyp) / ry, (x1p - cxp) / rx);
    let end = libm::atan2((-y1p - cyp) / ry, (-x1p - cxp) / rx);
    let mut sweep_angle = end - start;
    let full = 2.0 * core::f64::consts::PI;
    if arc.sweep && sweep_angle < 0.0 {
        sweep_angle += full;
    } else if !arc.sweep && sweep_angle > 0.0 {
        sweep_angle -= full;
    }
    // |f''(theta)| <= max(rx, ry) in the element's coordinates, times the map's stretch.
    let pieces = piece_count(rx.max(ry) * stretch, sweep_angle.abs(), tolerance);
    for step in 1..pieces {
        let theta = start + sweep_angle * (step as f64 / pieces as f64);
        let (sin_t, cos_t) = (libm::sin(theta), libm::cos(theta));
        let x = cx + rx * cos_phi * cos_t - ry * sin_phi * sin_t;
        let y = cy + rx * sin_phi * cos_t + ry * cos_phi * sin_t;
        out.push(transform_map((x, y)));
    }
    // The end point exactly as written, so a following command starts where this one ends.
    out.push(transform_map(arc.to));
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A quarter circle of radius 10 as an arc: every point lies on the circle (x^2 + y^2 =
    /// r^2), the end is exact and the pieces keep within the tolerance of the arc.
    #[test]
    fn an_arc_lies_on_its_circle() {
        let mut out = Vec::new();
        let arc = EndpointArc {
            from: (10.0, 0.0),
            radii: (10.0, 10.0),
            x_axis_rotation: 0.0,
            large_arc: false,
            sweep: true,
            to: (0.0, 10.0),
        };
        flatten_arc(&arc, &|point| point, 1.0, 0.01, &mut out);
        assert_eq!(out.last(), Some(&(0.0, 10.0)));
        for &(x, y) in &out {
            assert!(((x * x + y * y).sqrt() - 10.0).abs() < 1e-9);
            assert!(
                x >= -1e-9 && y >= -1e-9,
                "sweep flag set: through the first quadrant"
            );
        }
        // Sagitta of one piece: r (1 - cos(dtheta / 2)) <= tolerance.
        let pieces = out.len() as f64;
        let half = core::f64::consts::FRAC_PI_2 / pieces / 2.0;
        assert!(10.0 * (1.0 - libm::cos(half)) <= 0.01);
    }

    #[test]
    fn transforms_compose_outer_after_inner() {
        let translate = Affine {
            e: 5.0,
            ..Affine::IDENTITY
        };
        let scale = Affine {
            a: 2.0,
            d: 2.0,
            ..Affine::IDENTITY
        };
        // `translate(5) scale(2)` on (1, 1): scale first, then translate: (7, 2).
        assert_eq!(translate.then_inner(&scale).apply((1.0, 1.0)), (7.0, 2.0));
        assert!((scale.max_stretch() - 2.0).abs() < 1e-12);
    }
}
