//! `ramulus bench --refill`: the page's geometry refill while a run is animated, natively. The
//! 210,000-cell run of the page benchmark grows in slices of about as many cells as the page
//! grows between two redraws; after each slice the refill is timed step by step (the growing
//! screen brought up to the grower's new nodes, the colours), and so are a copy of the whole
//! network (which the refill made before it read the grower directly) and the thin-line
//! raster of a page-sized canvas. Prints median, 95th percentile and maximum of the refills
//! past 100,000 cells. The wasm build is slower than native by a steady factor (see
//! `tests/wasm/bench-wasm.mjs`), so these figures rank changes for the page.

use std::time::Instant;

use ramulus_core::growth::Growth;
use ramulus_core::link::decode_link;
use ramulus_core::run::width_rule;
use ramulus_draw::palette::Colouring;
use ramulus_draw::raster::RasterView;
use ramulus_draw::screen::ScreenGeometry;
use ramulus_draw::screen_growth::GrowingScreen;

use crate::options::CliError;

/// The page benchmark's big run (`tests/e2e/bench-page.mjs`): 500 x 420 cells filled cheapest
/// first with jitter, 210,000 cells.
const BIG: &str = "v=1&width=500&height=420&cell_size=0.1&roots=250,410,0,1&cells=210000\
                   &joining=cheapest&radius=1.5&jitter=0.3&w_turn=0&w_flow=0&w_path=0&seed=3";

/// Cells grown between two refills: the page's steady pace (20,000 cells a second) over a
/// redraw every 50 ms or so.
const SLICE: u64 = 1_000;

/// The page benchmark's canvas, in device pixels.
const CANVAS: (u32, u32) = (709, 678);

/// Runs the refill benchmark and prints its figures.
pub fn run(quick: bool) -> Result<(), CliError> {
    let mut params = decode_link(BIG).params;
    if quick {
        params.run.cells = 60_000;
    }
    let rule = width_rule(&params);
    let mut growth = Growth::new(&params).map_err(|error| CliError::Failed(error.to_string()))?;
    let mut growing = GrowingScreen::default();
    let mut geometry = ScreenGeometry::default();
    let view = fitted_view(&params);
    let late = params.run.cells / 2;
    let names = [
        "copy of the network (Growth::network; the refill no longer makes it)",
        "growing screen brought up to the grower (update_from_growth)",
        "colours (colour_indices)",
        "whole refill",
        "thin-line raster of the canvas (begin_raster + continue_raster)",
    ];
    let mut times: Vec<Vec<f64>> = vec![Vec::new(); names.len()];
    while growth.stopped().is_none() {
        growth.step(SLICE);
        // What the refill used to begin with, timed on its own for comparison.
        let copy_start = Instant::now();
        let network = growth.network();
        let copied = copy_start.elapsed().as_secs_f64();
        drop(network);
        let start = Instant::now();
        if !growing.update_from_growth(&growth, rule, &mut geometry) {
            return Err(CliError::Failed(
                "the growing screen refused a grown network".into(),
            ));
        }
        let updated = start.elapsed().as_secs_f64();
        geometry.colour_indices(Colouring::ByOrder);
        let coloured = start.elapsed().as_secs_f64();
        geometry.begin_raster(
            view,
            Colouring::ByOrder,
            ramulus_draw::tissue::TissueView::Faint,
            0.75,
            1.6,
            [255, 253, 248],
        );
        geometry.continue_raster(usize::MAX);
        let drawn = start.elapsed().as_secs_f64();
        if growth.cell_count() < late {
            continue;
        }
        let marks = [
            copied,
            updated,
            coloured - updated,
            coloured,
            drawn - coloured,
        ];
        for (list, mark) in times.iter_mut().zip(marks) {
            list.push(mark * 1e3);
        }
    }
    say!(
        "page refill, natively: {} cells grown {SLICE} at a time, refills past {late} cells \
         (n {}), on a {} x {} canvas:",
        growth.cell_count(),
        times[0].len(),
        CANVAS.0,
        CANVAS.1
    );
    for (name, list) in names.iter().zip(&mut times) {
        list.sort_by(f64::total_cmp);
        let rank = |fraction: f64| {
            let index = ((fraction * list.len() as f64).ceil() as usize).saturating_sub(1);
            list.get(index.min(list.len().saturating_sub(1)))
                .copied()
                .unwrap_or(0.0)
        };
        say!(
            "  {name:<66} median {:>6.2}  p95 {:>6.2}  max {:>6.2} ms",
            rank(0.5),
            rank(0.95),
            list.last().copied().unwrap_or(0.0)
        );
    }
    Ok(())
}

/// The view the page fits to the whole lattice on the benchmark's canvas (6% margins).
fn fitted_view(params: &ramulus_core::params::Params) -> RasterView {
    let width = params.domain.width as f64 * params.domain.cell_size;
    let height = params.domain.height as f64 * params.domain.cell_size;
    let (canvas_width, canvas_height) = (f64::from(CANVAS.0), f64::from(CANVAS.1));
    let scale = (canvas_width * 0.88 / width).min(canvas_height * 0.88 / height);
    RasterView {
        width: CANVAS.0,
        height: CANVAS.1,
        scale,
        offset_x: (canvas_width - width * scale) / 2.0,
        offset_y: (canvas_height - height * scale) / 2.0,
    }
}
