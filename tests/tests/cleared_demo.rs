//! The demo cleared-leaf image `examples/specimens/cleared-leaf.png`: drawn here from a leaf
//! grown with known parameters (its veins draining at least `DRAWN_FLOW_CELLS` cells, as dark
//! strokes of their widths on a light blade, blurred and lit unevenly), and read back by the
//! cleared-leaf steps. The file must equal what this test draws (a generated file, checked
//! like README's tables; regenerate with `RAMULUS_BLESS=1 cargo test -p ramulus-tests --test
//! cleared_demo`), and reading it must find the drawn veins' length and the blade's area.

use ramulus_core::cleared::decode::decode_image;
use ramulus_core::cleared::{build_cleared_specimen, ClearedOptions};
use ramulus_core::growth::Growth;
use ramulus_core::params::{Params, Root};
use ramulus_core::run::RunView;
use ramulus_core::specimen::SpecimenOptions;
use ramulus_tests::cleared_drawing::{cleared_leaf_from_network, encode_grey_png, photograph};
use ramulus_tests::tree_presets::tree_preset;

/// Pixels per millimetre of the demo image (stated in its pHYs chunk as pixels per metre).
const PIXELS_PER_MM: f64 = 50.0;

/// Veins drawn: segments draining at least this many cells (finer ones are left as tissue,
/// as a stain shows the larger veins best).
const DRAWN_FLOW_CELLS: f64 = 12.0;

fn demo_path() -> std::path::PathBuf {
    std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../examples/specimens/cleared-leaf.png")
}

fn grown() -> (RunView, Params) {
    // The open-growth broad leaf of earlier releases (the demo image was drawn from it): the
    // ovate preset's costs without its outline, petiole rule and outline-sized lattice.
    let mut params = tree_preset("ovate-leaf").expect("preset");
    params.domain.width = 220;
    params.domain.height = 300;
    params.domain.roots = vec![Root {
        x: 110,
        y: 270,
        outflow: [0.0, 1.0],
    }];
    params.domain.outline = None;
    params.domain.front_only = false;
    // No outline: a midrib would run to the lattice edge; the open-growth leaf had none.
    params.domain.midrib = 0.0;
    params.costs.elongation = 3.0;
    params.costs.rear_cost = 3.0;
    params.costs.branch_angle = Some(50.0);
    params.run.threshold = Some(10.0);
    params.run.cells = 3000;
    params.run.seed = 21;
    let mut growth = Growth::new(&params).expect("valid");
    growth.run();
    let view = RunView::new(growth.network(), &params).expect("a forest");
    (view, params)
}

/// The demo image's bytes, the drawn veins' total length (mm) and the blade's area (mm^2,
/// from the pixels drawn as blade or vein before blurring).
fn draw() -> (Vec<u8>, f64, f64) {
    let (view, _) = grown();
    let cell_area = view.network.cell_size * view.network.cell_size;
    let drawn = |index: usize| view.table.flow[index] >= DRAWN_FLOW_CELLS * cell_area;
    let (mut canvas, _) = cleared_leaf_from_network(&view, PIXELS_PER_MM, 20.0, &drawn);
    let length: f64 = (0..view.table.length.len())
        .filter(|&index| drawn(index))
        .map(|index| view.table.length[index])
        .sum();
    // The blade before the blur: every pixel darker than the background's 250.
    let blade_pixels = canvas.pixels.iter().filter(|&&level| level < 250.0).count();
    let blade_area = blade_pixels as f64 / (PIXELS_PER_MM * PIXELS_PER_MM);
    photograph(&mut canvas);
    let bytes = encode_grey_png(
        canvas.width,
        canvas.height,
        &canvas.grey(),
        Some((PIXELS_PER_MM * 1000.0) as u32),
    );
    (bytes, length, blade_area)
}

#[test]
fn the_demo_image_is_current_and_reads_back() {
    let (bytes, drawn_length, blade_area) = draw();
    if std::env::var("RAMULUS_BLESS").as_deref() == Ok("1") {
        std::fs::write(demo_path(), &bytes).expect("write the demo image");
    }
    let shipped = std::fs::read(demo_path()).expect("examples/specimens/cleared-leaf.png");
    assert!(
        shipped == bytes,
        "examples/specimens/cleared-leaf.png differs from what this test draws; regenerate \
         with RAMULUS_BLESS=1 cargo test -p ramulus-tests --test cleared_demo"
    );
    let image = decode_image(&shipped).expect("decodes");
    assert_eq!(image.millimetres_per_pixel, Some(1.0 / PIXELS_PER_MM));
    let read = build_cleared_specimen(
        &image,
        &ClearedOptions::default(),
        &SpecimenOptions::default(),
    )
    .expect("reads");
    let view = RunView::new(read.specimen.network.clone(), &Params::default()).expect("valid");
    let measured = view.metrics.total_length;
    println!(
        "demo: {} x {} pixels, leaf {} pixels, drawn veins {drawn_length:.2} mm, measured \
         {measured:.2} mm, blade {blade_area:.2} mm^2, outline {:.2} mm^2, {} end points, {} branch points, {} loops",
        image.width,
        image.height,
        read.leaf.leaf_pixels,
        read.specimen.network.area,
        read.leaf.end_points,
        read.leaf.branch_points,
        view.metrics.loop_count
    );
    // Lengths: the skeleton runs through the drawn strokes, shortened at junctions and ends
    // by about a stroke's half width, and its pixel chains are simplified within a pixel; 15 %
    // is a loose bound (common practice, no source).
    let relative = (measured - drawn_length).abs() / drawn_length;
    assert!(
        relative < 0.15,
        "measured {measured} mm against {drawn_length} mm drawn"
    );
    // Area: the outline's area (its pixels, holes between the blade's disks filled) against
    // the pixels drawn as blade, which leave those holes out: at least as large, at most 10 %
    // larger.
    let area = read.specimen.network.area;
    assert!(
        area >= blade_area * 0.99 && area <= blade_area * 1.10,
        "outline area {area} mm^2 against {blade_area} mm^2 drawn"
    );
}
