//! Raster drawing: `draw_lines` blends anti-aliased line segments into an RGBA pixel buffer
//! (`RasterView` maps physical units to pixels), and `fill` clears it. The page draws the
//! thin segments of a network this way, many times faster than one canvas call per segment.
//!
//! Lines follow Xiaolin Wu's algorithm (Wu 1991, "An efficient antialiasing technique",
//! SIGGRAPH '91): each step along the major axis shares the line's opacity between the two
//! pixels nearest to it, in proportion to their distance, so every step lays down exactly the
//! line's opacity. Blending is integer, in 1/256 steps.

/// How physical coordinates map to pixels: `pixel = coordinate * scale + offset`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RasterView {
    /// Image width in pixels.
    pub width: u32,
    /// Image height in pixels.
    pub height: u32,
    /// Pixels per length unit.
    pub scale: f64,
    /// Pixel x of the coordinate origin.
    pub offset_x: f64,
    /// Pixel y of the coordinate origin.
    pub offset_y: f64,
}

/// One line to draw: end points in physical units, colour and opacity (0 ..= 256).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Line {
    /// `[x0, y0, x1, y1]` in physical units.
    pub ends: [f32; 4],
    /// Colour.
    pub rgb: [u8; 3],
    /// Opacity in 1/256 steps; 256 is opaque.
    pub strength: u32,
}

/// Sets every pixel of an RGBA buffer to an opaque colour.
pub fn fill(pixels: &mut [u8], rgb: [u8; 3]) {
    // One pixel by hand, then doubling copies: memcpy speed rather than a loop per pixel.
    let length = pixels.len() - pixels.len() % 4;
    if length == 0 {
        return;
    }
    pixels[..4].copy_from_slice(&[rgb[0], rgb[1], rgb[2], 255]);
    let mut done = 4;
    while done < length {
        let chunk = done.min(length - done);
        pixels.copy_within(..chunk, done);
        done += chunk;
    }
}

/// Blends each line into `pixels` (RGBA, row-major, `view.width * view.height * 4` bytes), in
/// the order given. Parts outside the image are clipped; a buffer of the wrong size draws
/// nothing. Give lines in an order where neighbours lie close together (see
/// `spatial_order`): drawing scattered lines spends most of its time waiting on memory.
pub fn draw_lines(pixels: &mut [u8], view: &RasterView, lines: impl Iterator<Item = Line>) {
    let (width, height) = (view.width as i64, view.height as i64);
    if pixels.len() as i64 != width * height * 4 {
        return;
    }
    for line in lines {
        let [x0, y0, x1, y1] = line.ends.map(f64::from);
        let (x0, y0) = (
            x0 * view.scale + view.offset_x,
            y0 * view.scale + view.offset_y,
        );
        let (x1, y1) = (
            x1 * view.scale + view.offset_x,
            y1 * view.scale + view.offset_y,
        );
        let outside = (x0 < -2.0 && x1 < -2.0)
            || (y0 < -2.0 && y1 < -2.0)
            || (x0 > width as f64 + 2.0 && x1 > width as f64 + 2.0)
            || (y0 > height as f64 + 2.0 && y1 > height as f64 + 2.0);
        if outside || !(x0 + y0 + x1 + y1).is_finite() {
            continue;
        }
        wu_line(
            pixels,
            width,
            height,
            [x0, y0, x1, y1],
            line.rgb,
            line.strength.min(256),
        );
    }
}

/// Indices of `points` (`[x, y]` pairs) sorted by the cell of a `grid` x `grid` grid over
/// their bounding box, row by row (a counting sort, linear time): an order in which
/// consecutive points lie close together. Non-finite points come last.
pub fn spatial_order(points: impl Iterator<Item = [f64; 2]> + Clone, grid: usize) -> Vec<u32> {
    let grid = grid.max(1);
    let (mut low_x, mut low_y, mut high_x, mut high_y) = (f64::MAX, f64::MAX, f64::MIN, f64::MIN);
    // Comparisons, not `f64::min` and `f64::max`: those are library calls on wasm32, and the
    // values here are finite.
    for [x, y] in points
        .clone()
        .filter(|[x, y]| x.is_finite() && y.is_finite())
    {
        if x < low_x {
            low_x = x;
        }
        if y < low_y {
            low_y = y;
        }
        if x > high_x {
            high_x = x;
        }
        if y > high_y {
            high_y = y;
        }
    }
    let at_least_tiny = |span: f64| {
        if span > f64::MIN_POSITIVE {
            span
        } else {
            f64::MIN_POSITIVE
        }
    };
    let span_x = at_least_tiny(high_x - low_x);
    let span_y = at_least_tiny(high_y - low_y);
    let cell_of = |[x, y]: [f64; 2]| -> usize {
        if !(x.is_finite() && y.is_finite()) {
            return grid * grid;
        }
        let column = (((x - low_x) / span_x * grid as f64) as usize).min(grid - 1);
        let row = (((y - low_y) / span_y * grid as f64) as usize).min(grid - 1);
        row * grid + column
    };
    // Each point's cell once, counted as it is found; then the counting sort's placing pass.
    let mut starts = vec![0u32; grid * grid + 2];
    let cells: Vec<u32> = points
        .map(|point| {
            let cell = cell_of(point);
            starts[cell + 1] += 1;
            cell as u32
        })
        .collect();
    for index in 1..starts.len() {
        starts[index] += starts[index - 1];
    }
    let mut order = vec![0u32; cells.len()];
    for (index, &cell) in cells.iter().enumerate() {
        let slot = &mut starts[cell as usize];
        order[*slot as usize] = index as u32;
        *slot += 1;
    }
    order
}

fn wu_line(
    pixels: &mut [u8],
    width: i64,
    height: i64,
    ends: [f64; 4],
    rgb: [u8; 3],
    strength: u32,
) {
    let [x0, y0, x1, y1] = ends;
    let steep = (y1 - y0).abs() > (x1 - x0).abs();
    let (mut a0, mut b0, mut a1, mut b1) = if steep {
        (y0, x0, y1, x1)
    } else {
        (x0, y0, x1, y1)
    };
    if a0 > a1 {
        std::mem::swap(&mut a0, &mut a1);
        std::mem::swap(&mut b0, &mut b1);
    }
    let run = a1 - a0;
    let gradient = if run == 0.0 { 0.0 } else { (b1 - b0) / run };
    // Very long lines (a zoomed-in trunk) are clipped to the image along the major axis.
    let (major_limit, minor_limit) = if steep {
        (height, width)
    } else {
        (width, height)
    };
    // Comparisons rather than `round`, `max` and `min`, which compile to library calls on
    // wasm32 (their NaN rules differ from the instructions); the ends are finite here.
    let start = (a0 + 0.5).floor();
    let start = if start < -1.0 { -1.0 } else { start };
    let end = (a1 + 0.5).floor();
    let end = if end > major_limit as f64 {
        major_limit as f64
    } else {
        end
    };
    if start > end {
        return;
    }
    // Steps between neighbours along the major and the minor axis, in bytes.
    let (major_step, minor_step) = if steep {
        (4 * width, 4)
    } else {
        (4, 4 * width)
    };
    let strength = strength as i32;
    let mut minor = b0 + gradient * (start - a0) - 0.5;
    for major in start as i64..=end as i64 {
        let row = minor.floor();
        let far = ((minor - row) * strength as f64) as i32;
        let near = strength - far;
        let row = row as i64;
        minor += gradient;
        if major < 0 || major >= major_limit {
            continue;
        }
        let base = major * major_step + row * minor_step;
        if row >= 0 && row < minor_limit {
            blend(pixels, base as usize, rgb, near);
        }
        if row + 1 >= 0 && row + 1 < minor_limit && far > 0 {
            blend(pixels, (base + minor_step) as usize, rgb, far);
        }
    }
}

/// Moves the pixel at byte `at` towards `rgb` by `coverage` / 256 (0 ..= 256): each
/// channel becomes `old + floor((target - old) * coverage / 256)`.
///
/// Red and blue are blended together in one 32-bit word, green in another:
/// `floor((old * (256 - coverage) + target * coverage) / 256)` is the same value, since
/// `old * 256` divides evenly, and no sum exceeds 255 * 256, so no channel carries into the
/// next. Alpha is left as it was.
#[inline]
fn blend(pixels: &mut [u8], at: usize, rgb: [u8; 3], coverage: i32) {
    if let Some(bytes) = pixels.get_mut(at..at + 4) {
        let mut word = [0u8; 4];
        word.copy_from_slice(bytes);
        let old = u32::from_le_bytes(word);
        let target = u32::from_le_bytes([rgb[0], rgb[1], rgb[2], 0]);
        let keep = (256 - coverage) as u32;
        let take = coverage as u32;
        let red_blue = ((old & 0x00ff_00ff) * keep + (target & 0x00ff_00ff) * take) >> 8;
        let green = (old & 0x0000_ff00) * keep + (target & 0x0000_ff00) * take;
        let new = (red_blue & 0x00ff_00ff) | ((green >> 8) & 0x0000_ff00) | (old & 0xff00_0000);
        bytes.copy_from_slice(&new.to_le_bytes());
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn view(width: u32, height: u32) -> RasterView {
        RasterView {
            width,
            height,
            scale: 1.0,
            offset_x: 0.0,
            offset_y: 0.0,
        }
    }

    /// A horizontal line through pixel centres (y = 2.5) covers its own row fully and leaves
    /// the neighbouring rows untouched (Wu 1991: distance 0 takes the whole opacity).
    #[test]
    fn a_line_through_pixel_centres_fills_one_row() {
        let mut pixels = vec![255u8; 8 * 5 * 4];
        let line = Line {
            ends: [1.0, 2.5, 6.0, 2.5],
            rgb: [0, 0, 0],
            strength: 256,
        };
        draw_lines(&mut pixels, &view(8, 5), std::iter::once(line));
        for y in 0..5 {
            for x in 0..8 {
                let value = pixels[4 * (y * 8 + x)];
                let inked = y == 2 && (1..=6).contains(&x);
                assert_eq!(value, if inked { 0 } else { 255 }, "pixel ({x}, {y})");
            }
        }
    }

    /// Halfway between two rows, each row gets half the opacity: white 255 blended halfway to
    /// black is 127.5, which integer blending rounds down.
    #[test]
    fn a_line_between_rows_shares_its_opacity() {
        let mut pixels = vec![255u8; 6 * 4 * 4];
        let line = Line {
            ends: [0.0, 2.0, 5.0, 2.0],
            rgb: [0, 0, 0],
            strength: 256,
        };
        draw_lines(&mut pixels, &view(6, 4), std::iter::once(line));
        assert_eq!(pixels[4 * (6 + 2)], 127);
        assert_eq!(pixels[4 * (2 * 6 + 2)], 127);
    }

    /// Blending moves every channel by `floor((target - old) * coverage / 256)` (the rule in
    /// 1/256 steps stated at the top of this file), leaves alpha alone, and lets no channel
    /// spill into its neighbour: every old and target value against coverages from 0 to 256.
    #[test]
    fn blending_follows_the_channel_rule() {
        for coverage in [0, 1, 2, 7, 64, 127, 128, 129, 200, 255, 256] {
            for old in 0..=255i32 {
                for target in (0..=255i32).step_by(3) {
                    let mut pixel = [old as u8, (255 - old) as u8, old as u8, 77];
                    let rgb = [target as u8, target as u8, (255 - target) as u8];
                    blend(&mut pixel, 0, rgb, coverage);
                    let expected = |from: i32, to: i32| {
                        (from + ((to - from) * coverage).div_euclid(256)) as u8
                    };
                    assert_eq!(
                        pixel,
                        [
                            expected(old, target),
                            expected(255 - old, target),
                            expected(old, 255 - target),
                            77
                        ],
                        "old {old}, target {target}, coverage {coverage}"
                    );
                }
            }
        }
    }

    /// The spatial order is a permutation that visits the grid's cells row by row.
    #[test]
    fn spatial_order_is_a_permutation_by_grid_cell() {
        let points = [
            [9.0, 9.0],
            [0.0, 0.0],
            [9.0, 0.0],
            [0.0, 9.0],
            [f64::NAN, 1.0],
            [4.0, 4.0],
        ];
        let order = spatial_order(points.iter().copied(), 2);
        assert_eq!(order, vec![1, 5, 2, 3, 0, 4]);
    }

    /// Filling sets every pixel, however many there are.
    #[test]
    fn fill_sets_every_pixel() {
        for pixels in [1usize, 2, 3, 7, 64, 1000] {
            let mut buffer = vec![0u8; 4 * pixels];
            fill(&mut buffer, [1, 2, 3]);
            assert!(
                buffer.chunks(4).all(|pixel| pixel == [1, 2, 3, 255]),
                "{pixels} pixels"
            );
        }
    }

    /// Lines far outside, or with non-finite ends, draw nothing and do not panic.
    #[test]
    fn outside_and_broken_lines_draw_nothing() {
        let mut pixels = vec![9u8; 4 * 4 * 4];
        let lines = [
            [-100.0, -100.0, -50.0, -60.0],
            [f32::NAN, 0.0, 1.0, 1.0],
            [0.0, 0.0, f32::INFINITY, 1.0],
        ]
        .map(|ends| Line {
            ends,
            rgb: [0, 0, 0],
            strength: 256,
        });
        draw_lines(&mut pixels, &view(4, 4), lines.into_iter());
        assert!(pixels.iter().all(|&value| value == 9));
    }
}
