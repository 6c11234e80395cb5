//! Ramulus drawing: everything people see of a run. The SVG export (`svg`), the anti-aliased
//! raster of thin lines and the page's per-segment buffers (`raster`, `screen`, refilled
//! where growth changed them by `screen_growth`), colours
//! (`palette`), number formats (`format`), the colour key shared by SVG and page (`legend`), the extent and roots the page frames and
//! marks (`marks`),
//! the descriptions of the readings plots (`plots`), the scale bar (`scale_bar`), the drainage
//! plan (`site_plan`), what the page lays over a site (`site_overlay`) and the
//! sentences the page and the command line show (`texts`).
//!
//! The core computes; this crate only turns its values into pictures and words. Its inputs are
//! narrow: node positions and parents (`Network`), the per-segment widths, orders and flows
//! (`SegmentTable`), metrics, and options.
#![deny(missing_docs)]

pub mod draw_order;
pub mod format;
pub mod legend;
pub mod marks;
pub mod palette;
pub mod plots;
pub mod posterior_svg;
pub mod raster;
pub mod scale_bar;
pub mod screen;
pub mod screen_growth;
pub mod site_overlay;
pub mod site_plan;
pub mod site_texts;
pub mod svg;
pub mod texts;
pub mod tissue;

pub use svg::{render_svg, run_svg, run_svg_with, Colouring, SvgOptions, METADATA_NAMESPACE};
pub use tissue::TissueView;
