//! How tissue (segments below the conducting threshold `vein_area`) is drawn and read:
//! - the SVG export draws it faint in a group the specimen reader skips, leaves it out, or
//!   draws it like the veins, and says which in its metadata; read back by the specimen reader
//!   (an outside check of the drawing: it knows nothing of tissue), the faint and hidden
//!   drawings give exactly the vein segments, the other every segment;
//! - the readings mark vein and free-ending veinlet density as following the cell size when
//!   every cell is a vein, which geometry predicts: a network through every cell of a square
//!   lattice of spacing h has about one segment of length about h per cell of area h^2, so its
//!   length per area is about 1/h (hand derivation; the jitter lengthens segments a little).

use ramulus_core::growth::Growth;
use ramulus_core::metrics::Measured;
use ramulus_core::run::RunView;
use ramulus_core::specimen::{build_specimen, ScaleRule, SpecimenOptions};
use ramulus_draw::{run_svg_with, Colouring, TissueView};
use ramulus_tests::tree_presets::tree_preset;

fn grown(name: &str, cells: u64, vein_cells: f64) -> (RunView, ramulus_core::params::Params) {
    let mut params = tree_preset(name).expect("preset");
    params.run.cells = cells;
    params.widths.vein_area = vein_cells * params.domain.cell_size * params.domain.cell_size;
    let mut growth = Growth::new(&params).expect("valid");
    growth.run();
    let view = RunView::new(growth.network(), &params).expect("a valid network");
    (view, params)
}

/// Segments the specimen reader finds in an SVG, drawn at the SVG's own scale.
fn read_back_segments(svg: &str) -> usize {
    let options = SpecimenOptions {
        units: Some("mm".to_string()),
        scale: ScaleRule::FromFile,
        snap_tolerance: Some(0.0),
        ..SpecimenOptions::default()
    };
    let specimen = build_specimen(svg.as_bytes(), &options).expect("the export reads back");
    specimen.network.segments.len()
}

#[test]
fn the_svg_draws_tissue_as_chosen_and_says_so() {
    let (view, params) = grown("broad-leaf", 3000, 20.0);
    let tissue = view.conducting.tissue_count();
    let total = view.network.segments.len();
    assert!(
        tissue > 100 && tissue < total,
        "{tissue} of {total} segments are tissue"
    );
    let faint = run_svg_with(&view, &params, Colouring::ByOrder, TissueView::Faint);
    let hidden = run_svg_with(&view, &params, Colouring::ByOrder, TissueView::Hidden);
    let as_veins = run_svg_with(&view, &params, Colouring::ByOrder, TissueView::AsVeins);
    assert!(faint.contains("ramulus:tissue=\"faint\""));
    assert!(hidden.contains("ramulus:tissue=\"hidden\""));
    assert!(as_veins.contains("ramulus:tissue=\"veins\""));
    // The faint group holds one line per tissue segment; the hidden drawing none.
    let group = faint
        .split("<g class=\"tissue background\"")
        .nth(1)
        .and_then(|rest| rest.split("</g>").next())
        .expect("a faint tissue group");
    assert_eq!(group.matches("<line ").count(), tissue);
    assert!(!hidden.contains("class=\"tissue"));
    assert_eq!(faint.matches("class=\"segment\"").count(), total - tissue);
    assert_eq!(as_veins.matches("class=\"segment\"").count(), total);
    // Read back: the reader skips the group labelled background, so faint and hidden
    // drawings give the veins alone (split at the same junctions), the other every segment.
    let veins = read_back_segments(&hidden);
    assert_eq!(read_back_segments(&faint), veins);
    assert!(
        veins <= total - tissue + 2,
        "{veins} vein segments read back"
    );
    assert!(read_back_segments(&as_veins) > veins);
}

#[test]
fn readings_that_follow_the_cell_size_are_marked_when_every_cell_is_a_vein() {
    let (lattice, params) = grown("narrow-leaf", 6000, 0.0);
    assert_eq!(lattice.grown_measured(), Measured::EveryCellConducts);
    let density = lattice.metrics.vein_density.expect("a density");
    let spacing_ratio = density * params.domain.cell_size;
    assert!(
        (0.95..1.25).contains(&spacing_ratio),
        "vein density x cell size = {spacing_ratio}"
    );
    let rows =
        ramulus_draw::texts::readings_rows_noted(&lattice.metrics, "mm", lattice.grown_measured());
    let marked = |label: &str| {
        rows.iter()
            .find(|row| row.0 == label)
            .map(|row| (row.4, row.3.clone()))
            .expect("the row")
    };
    assert!(marked("vein density").0);
    assert!(marked("vein density").1.contains("cell size"));
    assert!(marked("free-ending veinlet density").0);
    assert!(!marked("mean branching angle").0 && !marked("circularity").0);

    // With a threshold of 20 cells, vein density measures veins: well below 1/h.
    let (veins, params) = grown("narrow-leaf", 6000, 20.0);
    assert_eq!(veins.grown_measured(), Measured::AsGiven);
    let spacing_ratio = veins.metrics.vein_density.expect("a density") * params.domain.cell_size;
    assert!(
        spacing_ratio < 0.5,
        "vein density x cell size = {spacing_ratio}"
    );
    let rows =
        ramulus_draw::texts::readings_rows_noted(&veins.metrics, "mm", veins.grown_measured());
    assert!(rows.iter().all(|row| !row.4));
    // A site's note speaks of channels.
    let site_rows = ramulus_draw::texts::readings_rows_noted(
        &lattice.metrics,
        "m",
        Measured::EveryCellConducts,
    );
    let note = &site_rows
        .iter()
        .find(|row| row.0 == "drainage density")
        .expect("the row")
        .3;
    assert!(note.contains("channel") && !note.contains("vein"), "{note}");
}
