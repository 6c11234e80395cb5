//! Drawn grey images for the cleared-leaf tests and the demo image: a `Canvas` of grey levels
//! with round-capped strokes, discs, box blur and uneven lighting, simple shapes (a disk, an
//! H-tree, a ring, a grid), a cleared leaf drawn from a grown network
//! (`cleared_leaf_from_network`), and PNG and PGM encoders. Everything is deterministic.

use ramulus_core::run::RunView;

/// Grey levels in `f64`, row by row.
#[derive(Clone, Debug)]
pub struct Canvas {
    /// Width in pixels.
    pub width: usize,
    /// Height in pixels.
    pub height: usize,
    /// Grey levels, 0 black to 255 white.
    pub pixels: Vec<f64>,
}

impl Canvas {
    /// A canvas of one grey level.
    pub fn new(width: usize, height: usize, level: f64) -> Canvas {
        Canvas {
            width,
            height,
            pixels: vec![level; width * height],
        }
    }

    /// Sets every pixel whose centre lies within `radius` of the segment from `a` to `b`
    /// (pixel units, (0, 0) the top-left corner) to `level`: a stroke with round caps.
    pub fn stroke(&mut self, a: (f64, f64), b: (f64, f64), radius: f64, level: f64) {
        let x0 = (a.0.min(b.0) - radius).floor().max(0.0) as usize;
        let x1 = ((a.0.max(b.0) + radius).ceil() as usize).min(self.width);
        let y0 = (a.1.min(b.1) - radius).floor().max(0.0) as usize;
        let y1 = ((a.1.max(b.1) + radius).ceil() as usize).min(self.height);
        let (dx, dy) = (b.0 - a.0, b.1 - a.1);
        let length_squared = dx * dx + dy * dy;
        for y in y0..y1 {
            for x in x0..x1 {
                let (px, py) = (x as f64 + 0.5, y as f64 + 0.5);
                let t = if length_squared > 0.0 {
                    (((px - a.0) * dx + (py - a.1) * dy) / length_squared).clamp(0.0, 1.0)
                } else {
                    0.0
                };
                let (cx, cy) = (a.0 + t * dx - px, a.1 + t * dy - py);
                if cx * cx + cy * cy <= radius * radius {
                    self.pixels[y * self.width + x] = level;
                }
            }
        }
    }

    /// A filled disk.
    pub fn disk(&mut self, centre: (f64, f64), radius: f64, level: f64) {
        self.stroke(centre, centre, radius, level);
    }

    /// Three passes of a box blur of side `2 radius + 1`, each along rows then columns
    /// (close to a Gaussian blur; edges repeat the border pixel).
    pub fn blur(&mut self, radius: usize) {
        for _ in 0..3 {
            for horizontal in [true, false] {
                let (lines, length) = if horizontal {
                    (self.height, self.width)
                } else {
                    (self.width, self.height)
                };
                let mut line = vec![0.0; length];
                for l in 0..lines {
                    let index = |i: usize| {
                        if horizontal {
                            l * self.width + i
                        } else {
                            i * self.width + l
                        }
                    };
                    for (i, slot) in line.iter_mut().enumerate() {
                        let mut sum = 0.0;
                        for k in 0..=2 * radius {
                            let j = (i + k).saturating_sub(radius).min(length - 1);
                            sum += self.pixels[index(j)];
                        }
                        *slot = sum / (2 * radius + 1) as f64;
                    }
                    for (i, &value) in line.iter().enumerate() {
                        self.pixels[index(i)] = value;
                    }
                }
            }
        }
    }

    /// Uneven lighting: each level scaled by a factor going linearly from `left` at the left
    /// edge to `right` at the right edge, and from 1 at the top to `bottom` at the bottom.
    pub fn lighting(&mut self, left: f64, right: f64, bottom: f64) {
        for y in 0..self.height {
            let vertical = 1.0 + (bottom - 1.0) * y as f64 / (self.height - 1).max(1) as f64;
            for x in 0..self.width {
                let horizontal = left + (right - left) * x as f64 / (self.width - 1).max(1) as f64;
                self.pixels[y * self.width + x] *= horizontal * vertical;
            }
        }
    }

    /// Grey levels rounded and clamped to 0..=255.
    pub fn grey(&self) -> Vec<u8> {
        self.pixels
            .iter()
            .map(|&v| v.round().clamp(0.0, 255.0) as u8)
            .collect()
    }
}

/// A dark disk of `radius` pixels on white, centred in a `side x side` image.
pub fn disk_image(side: usize, radius: f64) -> Canvas {
    let mut canvas = Canvas::new(side, side, 240.0);
    canvas.disk((side as f64 / 2.0, side as f64 / 2.0), radius, 40.0);
    canvas
}

/// The segments of an H-tree of `depth` levels: a horizontal bar of length `length` centred
/// at `centre`, with a vertical bar of half the length at each end, and so on alternately.
pub fn h_tree_segments(
    centre: (f64, f64),
    length: f64,
    depth: u32,
) -> Vec<((f64, f64), (f64, f64))> {
    let mut segments = Vec::new();
    let mut level = vec![(centre, length, true)];
    for _ in 0..depth {
        let mut next = Vec::new();
        for (c, l, horizontal) in level {
            let (a, b) = if horizontal {
                ((c.0 - l / 2.0, c.1), (c.0 + l / 2.0, c.1))
            } else {
                ((c.0, c.1 - l / 2.0), (c.0, c.1 + l / 2.0))
            };
            segments.push((a, b));
            next.push((a, l / 2f64.sqrt(), !horizontal));
            next.push((b, l / 2f64.sqrt(), !horizontal));
        }
        level = next;
    }
    segments
}

/// Binary shapes (true = on) for skeleton checks, each with its name: an H ("H-tree" of
/// depth 2: 4 end points, 2 branch points, no loop), a ring (1 loop, no end), a grid of
/// thick lines around 2 x 2 cells (4 loops), a deeper H-tree, a thick Y and a ring with a
/// tail.
pub fn skeleton_shapes() -> Vec<(&'static str, usize, usize, Vec<bool>)> {
    let on = |canvas: &Canvas| canvas.pixels.iter().map(|&v| v < 128.0).collect::<Vec<_>>();
    let mut shapes = Vec::new();
    let mut h = Canvas::new(120, 120, 255.0);
    for (a, b) in h_tree_segments((60.0, 60.0), 70.0, 2) {
        h.stroke(a, b, 4.0, 0.0);
    }
    shapes.push(("h-tree-2", 120, 120, on(&h)));
    let mut h = Canvas::new(200, 200, 255.0);
    for (a, b) in h_tree_segments((100.0, 100.0), 110.0, 4) {
        h.stroke(a, b, 3.0, 0.0);
    }
    shapes.push(("h-tree-4", 200, 200, on(&h)));
    let mut ring = Canvas::new(100, 100, 255.0);
    ring.disk((50.0, 50.0), 35.0, 0.0);
    ring.disk((50.0, 50.0), 27.0, 255.0);
    shapes.push(("ring", 100, 100, on(&ring)));
    let mut tail = ring.clone();
    tail.stroke((50.0, 85.0), (50.0, 98.0), 3.5, 0.0);
    shapes.push(("ring-with-tail", 100, 100, on(&tail)));
    let mut grid = Canvas::new(130, 130, 255.0);
    for k in 0..3 {
        let p = 20.0 + 45.0 * k as f64;
        grid.stroke((20.0, p), (110.0, p), 3.0, 0.0);
        grid.stroke((p, 20.0), (p, 110.0), 3.0, 0.0);
    }
    shapes.push(("grid-2x2", 130, 130, on(&grid)));
    let mut y = Canvas::new(120, 120, 255.0);
    y.stroke((60.0, 110.0), (60.0, 60.0), 5.0, 0.0);
    y.stroke((60.0, 60.0), (25.0, 15.0), 4.0, 0.0);
    y.stroke((60.0, 60.0), (95.0, 20.0), 4.0, 0.0);
    shapes.push(("thick-y", 120, 120, on(&y)));
    shapes
}

/// A cleared leaf drawn from a grown network, `pixels_per_unit` pixels per length unit with a
/// margin of `margin` pixels: the blade (a disk of 0.8 cell around every node) as light tissue
/// on a white background, each segment for which `drawn` is true (by segment index) a dark
/// stroke of its drawn width (at least 2 pixels); `photograph` then blurs it and lights it
/// unevenly. Returns the image and the pixel offset of the network's origin.
pub fn cleared_leaf_from_network(
    view: &RunView,
    pixels_per_unit: f64,
    margin: f64,
    drawn: &dyn Fn(usize) -> bool,
) -> (Canvas, (f64, f64)) {
    let network = &view.network;
    let (mut low, mut high) = ((f64::MAX, f64::MAX), (f64::MIN, f64::MIN));
    for node in &network.nodes {
        low = (low.0.min(node.x), low.1.min(node.y));
        high = (high.0.max(node.x), high.1.max(node.y));
    }
    let width = ((high.0 - low.0) * pixels_per_unit + 2.0 * margin).ceil() as usize;
    let height = ((high.1 - low.1) * pixels_per_unit + 2.0 * margin).ceil() as usize;
    let offset = (
        margin - low.0 * pixels_per_unit,
        margin - low.1 * pixels_per_unit,
    );
    let at = |x: f64, y: f64| {
        (
            x * pixels_per_unit + offset.0,
            y * pixels_per_unit + offset.1,
        )
    };
    let mut canvas = Canvas::new(width, height, 250.0);
    let blade_radius = 0.8 * network.cell_size.max(1e-9) * pixels_per_unit;
    for node in &network.nodes {
        canvas.disk(at(node.x, node.y), blade_radius, 175.0);
    }
    for (index, segment) in network.segments.iter().enumerate() {
        if !drawn(index) {
            continue;
        }
        let (a, b) = (
            network.nodes[segment.from as usize],
            network.nodes[segment.to as usize],
        );
        let drawn = (view.table.width[index] * pixels_per_unit).max(2.0);
        canvas.stroke(at(a.x, a.y), at(b.x, b.y), drawn / 2.0, 70.0);
    }
    (canvas, offset)
}

/// What a camera does to a drawn leaf: a slight blur and light falling off to the left and
/// the bottom.
pub fn photograph(canvas: &mut Canvas) {
    canvas.blur(1);
    canvas.lighting(0.86, 1.0, 0.93);
}

/// A PNG (8-bit grey) of the pixels, with a `pHYs` chunk of `pixels_per_metre` when given.
pub fn encode_grey_png(
    width: usize,
    height: usize,
    grey: &[u8],
    pixels_per_metre: Option<u32>,
) -> Vec<u8> {
    let mut bytes = Vec::new();
    {
        let mut encoder = png::Encoder::new(&mut bytes, width as u32, height as u32);
        encoder.set_color(png::ColorType::Grayscale);
        encoder.set_depth(png::BitDepth::Eight);
        encoder.set_compression(png::Compression::Best);
        if let Some(ppm) = pixels_per_metre {
            encoder.set_pixel_dims(Some(png::PixelDimensions {
                xppu: ppm,
                yppu: ppm,
                unit: png::Unit::Meter,
            }));
        }
        let mut writer = encoder.write_header().expect("PNG header");
        writer.write_image_data(grey).expect("PNG data");
    }
    bytes
}

/// A binary PGM (P5, maxval 255; Netpbm's format) of the pixels.
pub fn encode_pgm(width: usize, height: usize, grey: &[u8]) -> Vec<u8> {
    let mut bytes = format!("P5\n{width} {height}\n255\n").into_bytes();
    bytes.extend_from_slice(grey);
    bytes
}
