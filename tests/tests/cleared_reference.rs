//! Cleared-leaf images (`ramulus_core::cleared`) on drawn images whose answers are known by
//! hand: a disk's area against pi r^2, the outline ring's shoelace area against the pixel
//! count, an H-tree's skeleton graph (4 end points, 2 branch points, the bar lengths), a ring
//! of veins closing one areole of the ring's area, a grid closing four, widths from the
//! distance transform, the local threshold under uneven light, and sizes refused before
//! anything is allocated.

use ramulus_core::cleared::decode::decode_image;
use ramulus_core::cleared::{
    analyse_cleared_leaf, build_cleared_specimen, ClearedError, ClearedOptions, GreyImage,
    VeinThreshold,
};
use ramulus_core::metrics::measure;
use ramulus_core::specimen::{ring_area, ScaleRule, SpecimenOptions};
use ramulus_tests::cleared_drawing::{disk_image, encode_grey_png, h_tree_segments, Canvas};

const PI: f64 = core::f64::consts::PI;

fn image(canvas: &Canvas) -> GreyImage {
    GreyImage::new(canvas.width as u32, canvas.height as u32, canvas.grey()).expect("size")
}

/// A light rectangular blade (tissue 180) on white (250), for veins to be drawn on.
fn blade(width: usize, height: usize, margin: f64) -> Canvas {
    let mut canvas = Canvas::new(width, height, 250.0);
    for y in 0..height {
        for x in 0..width {
            let (px, py) = (x as f64 + 0.5, y as f64 + 0.5);
            if px > margin
                && py > margin
                && px < width as f64 - margin
                && py < height as f64 - margin
            {
                canvas.pixels[y * width + x] = 180.0;
            }
        }
    }
    canvas
}

fn scaled(millimetres_per_pixel: f64) -> SpecimenOptions {
    SpecimenOptions {
        units: Some("mm".into()),
        scale: ScaleRule::Factor(millimetres_per_pixel),
        snap_tolerance: Some(0.0),
        ..SpecimenOptions::default()
    }
}

/// A dark disk of radius r pixels: a pixel whose centre is within r is counted, so every pixel
/// inside the circle of radius r - sqrt(2)/2 is counted and none outside r + sqrt(2)/2, and
/// the count lies between pi (r -+ sqrt(2)/2)^2 (the Gauss circle problem's elementary bound).
/// The outline ring's shoelace area (Braden 1986) equals the pixel count exactly.
#[test]
fn a_disk_has_the_area_of_a_circle() {
    for radius in [25.0, 40.0] {
        let disk = disk_image(100, radius);
        let leaf = analyse_cleared_leaf(&image(&disk), &ClearedOptions::default());
        // No veins inside a flat disk: the vein threshold has one level to split.
        let leaf = match leaf {
            Ok(leaf) => leaf,
            Err(ClearedError::NoVeins { .. }) => {
                let mut dotted = disk.clone();
                dotted.stroke((50.0, 45.0), (50.0, 55.0), 2.0, 0.0);
                analyse_cleared_leaf(&image(&dotted), &ClearedOptions::default()).expect("reads")
            }
            Err(error) => panic!("{error}"),
        };
        let half_diagonal = 0.5f64.sqrt();
        let (low, high) = (
            PI * (radius - half_diagonal) * (radius - half_diagonal),
            PI * (radius + half_diagonal) * (radius + half_diagonal),
        );
        let count = leaf.leaf_pixels as f64;
        assert!(
            count > low && count < high,
            "radius {radius}: {count} pixels"
        );
        // And close to pi r^2 itself: within 1 % at these radii.
        assert!((count - PI * radius * radius).abs() / (PI * radius * radius) < 0.015);
        assert_eq!(ring_area(&leaf.outline), leaf.leaf_pixels as f64);
    }
}

/// An H drawn as dark strokes of radius 4 on a blade, through pixel centres: a bar of 70
/// pixels with bars of 70 / sqrt 2 = 49.5 pixels at its ends (an H-tree of depth 2). Its skeleton graph has 4 end
/// points and 2 branch points (an H drawn by hand), 5 chains, no loop. Total length: the
/// skeleton of a round-capped stroke reaches to within about one radius of each cap, so the
/// measured length lies within the 4 caps' radii of the bars' length. Width of the crossbar
/// (the chain between the branch points): 9 pixels (a centre pixel and 4 on each side), from
/// the distance transform (2 d - 1).
#[test]
fn an_h_tree_skeleton_has_four_ends_and_two_branches() {
    // Background around the blade, as in a photograph: Otsu's first threshold splits the
    // bright background from blade and veins.
    let mut canvas = blade(200, 200, 38.0);
    let segments = h_tree_segments((100.5, 100.5), 70.0, 2);
    let drawn: f64 = segments
        .iter()
        .map(|(a, b)| ((a.0 - b.0).powi(2) + (a.1 - b.1).powi(2)).sqrt())
        .sum();
    assert!((drawn - (70.0 + 2.0 * 70.0 / 2f64.sqrt())).abs() < 1e-9);
    for (a, b) in &segments {
        canvas.stroke(*a, *b, 4.0, 40.0);
    }
    let read = build_cleared_specimen(&image(&canvas), &ClearedOptions::default(), &scaled(0.1))
        .expect("reads");
    let leaf = &read.leaf;
    assert_eq!(leaf.end_points, 4, "end points");
    assert_eq!(leaf.branch_points, 2, "branch points");
    assert_eq!(leaf.veins.len(), 5, "chains");
    let metrics = measure(&read.specimen.network, 0.5).expect("valid");
    assert_eq!(metrics.loop_count, 0);
    assert_eq!(metrics.tip_count + metrics.root_count, 4);
    let length_pixels = metrics.total_length / 0.1;
    assert!(
        length_pixels > drawn - 4.0 * 4.0 && length_pixels < drawn + 4.0 * 4.0,
        "skeleton length {length_pixels} pixels against {drawn} drawn"
    );
    let crossbar = leaf
        .veins
        .iter()
        .max_by(|a, b| a.length.total_cmp(&b.length))
        .expect("chains");
    assert!(
        (crossbar.width - 9.0).abs() < 0.5,
        "crossbar width {} pixels",
        crossbar.width
    );
    // The blade: 124 x 124 pixels (margins of 38), 0.01 mm^2 each.
    assert_eq!(leaf.leaf_pixels, 124 * 124);
    assert!((read.specimen.network.area - 124.0 * 124.0 * 0.01).abs() < 1e-9);
}

/// A ring of vein (radii 27 to 35 pixels, drawn as a dark annulus) with a petiole: one loop,
/// one areole, whose area is that of the skeleton's circle, of radius about the ring's middle
/// (31 pixels): pi 31^2 within 5 %. A 2 x 2 grid of veins closes 4 areoles of 45 x 45 pixels
/// each (the cell between the lines' centres), within 5 %.
#[test]
fn rings_and_grids_of_veins_close_areoles_of_their_area() {
    let mut ring = blade(110, 110, 4.0);
    ring.disk((55.0, 55.0), 35.0, 40.0);
    ring.disk((55.0, 55.0), 27.0, 180.0);
    ring.stroke((55.0, 88.0), (55.0, 104.0), 3.0, 40.0);
    let read = build_cleared_specimen(&image(&ring), &ClearedOptions::default(), &scaled(1.0))
        .expect("reads");
    let metrics = measure(&read.specimen.network, 0.5).expect("valid");
    assert_eq!(metrics.loop_count, 1);
    assert_eq!(metrics.areoles, Some(1));
    let area = metrics.mean_areole_area.expect("one areole");
    let expected = PI * 31.0 * 31.0;
    assert!(
        (area - expected).abs() / expected < 0.05,
        "areole {area} px^2"
    );

    let mut grid = blade(140, 140, 4.0);
    for k in 0..3 {
        let p = 25.0 + 45.0 * k as f64;
        grid.stroke((25.0, p), (115.0, p), 3.0, 40.0);
        grid.stroke((p, 25.0), (p, 115.0), 3.0, 40.0);
    }
    let read = build_cleared_specimen(&image(&grid), &ClearedOptions::default(), &scaled(1.0))
        .expect("reads");
    let metrics = measure(&read.specimen.network, 0.5).expect("valid");
    assert_eq!(metrics.areoles, Some(4));
    let area = metrics.mean_areole_area.expect("areoles");
    assert!(
        (area - 2025.0).abs() / 2025.0 < 0.05,
        "mean areole {area} px^2"
    );
}

/// Uneven staining (the blade's grey levels falling to 60 % on the right) with faint veins
/// (grey 140 on tissue 180): the dark tissue on the right is as dark as the veins on the
/// left, so the global vein threshold cannot find the H; the local one (a 31-pixel mean of the leaf's pixels minus 12
/// grey levels) finds it: 4 end points, 2 branch points.
#[test]
fn the_local_threshold_copes_with_uneven_light() {
    let mut canvas = blade(200, 200, 38.0);
    for (a, b) in h_tree_segments((100.5, 100.5), 70.0, 2) {
        canvas.stroke(a, b, 3.0, 140.0);
    }
    // Stain fading across the blade (to 60 % on the right); the background stays white.
    canvas.lighting(1.0, 0.6, 1.0);
    let white = blade(200, 200, 38.0);
    for (pixel, &plain) in canvas.pixels.iter_mut().zip(&white.pixels) {
        if plain == 250.0 {
            *pixel = 250.0;
        }
    }
    let global = analyse_cleared_leaf(&image(&canvas), &ClearedOptions::default()).expect("reads");
    let options = ClearedOptions {
        vein_threshold: VeinThreshold::Local {
            window: 31,
            offset: 12.0,
        },
        ..ClearedOptions::default()
    };
    let leaf = analyse_cleared_leaf(&image(&canvas), &options).expect("reads");
    assert_eq!((leaf.end_points, leaf.branch_points), (4, 2));
    assert_eq!(leaf.vein_threshold, None);
    // The strokes cover about 7 x 175 pixels (1,200); the local mask stays near that, while the
    // global one floods the dark tissue on the right.
    assert!(
        leaf.vein_pixels < 2500,
        "local: {} vein pixels",
        leaf.vein_pixels
    );
    assert!(
        global.vein_pixels > 2 * leaf.vein_pixels,
        "global: {} vein pixels, local {}",
        global.vein_pixels,
        leaf.vein_pixels
    );
}

/// Sizes are refused from the header, before any buffer of that size exists: a PNG whose
/// header says 100,000 x 100,000 pixels, zero-sized images and buffers that do not match.
#[test]
fn huge_and_empty_images_are_refused_by_their_header() {
    let small = encode_grey_png(4, 4, &[200; 16], None);
    // Rewrite IHDR's width and height (bytes 16..24) and its CRC (bytes 29..33).
    let mut huge = small.clone();
    huge[16..20].copy_from_slice(&100_000u32.to_be_bytes());
    huge[20..24].copy_from_slice(&100_000u32.to_be_bytes());
    let crc = crc32(&huge[12..29]);
    huge[29..33].copy_from_slice(&crc.to_be_bytes());
    let message = decode_image(&huge).expect_err("refused").to_string();
    assert!(message.contains("100000 x 100000"), "{message}");
    assert!(
        matches!(decode_image(&huge), Err(ClearedError::TooLarge { .. })),
        "{message}"
    );
    assert!(matches!(
        GreyImage::new(0, 5, Vec::new()),
        Err(ClearedError::EmptyImage { .. })
    ));
    assert!(matches!(
        GreyImage::new(3, 3, vec![0; 8]),
        Err(ClearedError::PixelCount { .. })
    ));
    assert!(matches!(
        decode_image(b"GIF89a"),
        Err(ClearedError::NotAnImage { .. })
    ));
    assert_eq!(decode_image(&small).expect("decodes").pixels, vec![200; 16]);
}

/// CRC-32 of the PNG specification (ISO 3309 polynomial, W3C 2003, annex D), bit by bit.
fn crc32(bytes: &[u8]) -> u32 {
    let mut crc = 0xffff_ffffu32;
    for &byte in bytes {
        crc ^= u32::from(byte);
        for _ in 0..8 {
            crc = if crc & 1 == 1 {
                (crc >> 1) ^ 0xedb8_8320
            } else {
                crc >> 1
            };
        }
    }
    !crc
}
