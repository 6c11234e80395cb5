//! The exact Euclidean distance transform (`squared_distance_to_background`) of a binary
//! image, by the lower envelope of parabolas, one row and one column at a time (Felzenszwalb &
//! Huttenlocher 2012, "Distance transforms of sampled functions", Theory of Computing 8,
//! algorithm 1).

/// A large value standing for "no background pixel yet" (beyond any squared distance in an
/// image the size limits allow).
const FAR: f64 = 1e20;

/// For every pixel, the squared Euclidean distance in pixels from its centre to the centre of
/// the nearest pixel where `inside` is false (0 on such pixels). An image with no such pixel
/// gives `FAR` (1e20) everywhere.
pub fn squared_distance_to_background(inside: &[bool], width: usize, height: usize) -> Vec<f64> {
    let mut grid: Vec<f64> = inside
        .iter()
        .map(|&is_inside| if is_inside { FAR } else { 0.0 })
        .collect();
    let longest = width.max(height);
    let mut line = vec![0.0; longest];
    let mut out = vec![0.0; longest];
    let mut scratch = Scratch::new(longest);
    for x in 0..width {
        for y in 0..height {
            line[y] = grid[y * width + x];
        }
        transform_line(&line[..height], &mut out[..height], &mut scratch);
        for y in 0..height {
            grid[y * width + x] = out[y];
        }
    }
    for y in 0..height {
        let row = &mut grid[y * width..(y + 1) * width];
        line[..width].copy_from_slice(row);
        transform_line(&line[..width], &mut out[..width], &mut scratch);
        row.copy_from_slice(&out[..width]);
    }
    grid
}

struct Scratch {
    /// Positions of the parabolas of the lower envelope.
    vertex: Vec<usize>,
    /// Boundaries between them.
    boundary: Vec<f64>,
}

impl Scratch {
    fn new(length: usize) -> Scratch {
        Scratch {
            vertex: vec![0; length],
            boundary: vec![0.0; length + 1],
        }
    }
}

/// One-dimensional squared distance transform of the sampled function `f`: `out[q]` is the
/// minimum over `p` of `(q - p)^2 + f[p]` (Felzenszwalb & Huttenlocher 2012, algorithm 1).
fn transform_line(f: &[f64], out: &mut [f64], scratch: &mut Scratch) {
    let n = f.len();
    if n == 0 {
        return;
    }
    let (v, z) = (&mut scratch.vertex, &mut scratch.boundary);
    let mut k = 0usize;
    v[0] = 0;
    z[0] = f64::NEG_INFINITY;
    z[1] = f64::INFINITY;
    for q in 1..n {
        loop {
            let p = v[k];
            let s = ((f[q] + (q * q) as f64) - (f[p] + (p * p) as f64)) / (2.0 * (q - p) as f64);
            if s <= z[k] && k > 0 {
                k -= 1;
                continue;
            }
            if s <= z[k] {
                // k == 0 and the new parabola is lower everywhere: replace it.
                v[0] = q;
                z[1] = f64::INFINITY;
                break;
            }
            k += 1;
            v[k] = q;
            z[k] = s;
            z[k + 1] = f64::INFINITY;
            break;
        }
    }
    k = 0;
    for (q, slot) in out.iter_mut().enumerate() {
        while z[k + 1] < q as f64 {
            k += 1;
        }
        let p = v[k];
        let d = q as f64 - p as f64;
        *slot = d * d + f[p];
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Against the definition, by brute force over every background pixel, on a pattern with
    /// holes.
    #[test]
    fn matches_brute_force() {
        let (width, height) = (13, 9);
        let inside: Vec<bool> = (0..width * height)
            .map(|i| (i * 7 + i / 5) % 11 != 0)
            .collect();
        let fast = squared_distance_to_background(&inside, width, height);
        for y in 0..height {
            for x in 0..width {
                let mut best = FAR;
                for by in 0..height {
                    for bx in 0..width {
                        if !inside[by * width + bx] {
                            let (dx, dy) = (x as f64 - bx as f64, y as f64 - by as f64);
                            best = best.min(dx * dx + dy * dy);
                        }
                    }
                }
                assert_eq!(fast[y * width + x], best, "pixel ({x}, {y})");
            }
        }
    }
}
