//! SVG export: `run_svg` draws a run with its metadata; `render_svg` draws a `Network` with its `SegmentTable` widths at true scale,
//! coloured by Strahler order, by flow or plainly (`Colouring`), with a scale bar, a legend and
//! the run's metadata, as set by `SvgOptions`.
//!
//! Layout: the viewBox is in the network's physical units (y down, as in `Network`). The
//! drawing sits at the top; a band below it holds the scale bar, the map scale or "true size",
//! the legend and the optional caution. Segments are `<line class="segment">` elements drawn
//! thinnest first, so that major veins or trunks lie on top; roots are circles. Segments below
//! the conducting threshold (tissue) are drawn as `SvgOptions::tissue` says: faint, in a
//! `<g class="tissue background">` under the veins (the specimen reader skips a group labelled
//! background), left out, or like the thinnest veins; the choice is kept in the metadata
//! (`ramulus:tissue`).

use std::fmt::Write;

use ramulus_core::network::Network;
use ramulus_core::params::Params;
use ramulus_core::run::{RunView, SITE_CAUTION};
use ramulus_core::segments::SegmentTable;

mod legend;
mod page;

pub use crate::palette::Colouring;
pub use crate::tissue::TissueView;
use crate::tissue::{FAINT_SVG_OPACITY, FAINT_SVG_WIDTH_FRACTION, TISSUE_FAINT};

use crate::format::*;
use crate::palette::*;
use legend::*;
use page::*;

/// What `render_svg` draws besides the network.
#[derive(Clone, Debug, PartialEq)]
pub struct SvgOptions {
    /// Segment colouring. Default `ByOrder`.
    pub colour: Colouring,
    /// Document title (the `<title>` element). Default "Ramulus network".
    pub title: String,
    /// The run's parameters, seed and digest as JSON text, kept verbatim (XML-escaped) in
    /// `<metadata>`. Default `{}`.
    pub metadata_json: String,
    /// The network digest (see `digest::digest_hex`), also kept in `<metadata>`. Default empty.
    pub digest: String,
    /// A caution drawn as visible text under the drawing (used for drainage sites). Default none.
    pub caution: Option<String>,
    /// Blank border around the network, in the network's length units; negative or non-finite
    /// values count as 0. Half the widest stroke is always added. Default 0.
    pub margin: f64,
    /// How segments that do not conduct are drawn. Default `Faint`.
    pub tissue: TissueView,
}

impl Default for SvgOptions {
    fn default() -> Self {
        SvgOptions {
            colour: Colouring::ByOrder,
            title: "Ramulus network".to_string(),
            metadata_json: "{}".to_string(),
            digest: String::new(),
            caution: None,
            margin: 0.0,
            tissue: TissueView::Faint,
        }
    }
}

/// Namespace of the element inside `<metadata>` that holds the run's JSON: a `tag:` URI
/// (Kindberg & Hawke 2005, RFC 4151: `tag:` authority `,` date `:` specific), which needs no
/// registration, unlike a `urn:` namespace. The authority is the project's name under the
/// reserved `.invalid` domain (RFC 2606) until the project has a domain of its own; the
/// trailing `/1` is the version of the metadata's layout.
pub const METADATA_NAMESPACE: &str = "tag:ramulus.invalid,2026:run-metadata/1";

/// Draws a run as SVG: its parameters, seed and digest in the metadata, the concept-layout
/// caution for drainage sites, a two-cell margin, tissue faint (`run_svg_with` to choose).
pub fn run_svg(view: &RunView, params: &Params, colour: Colouring) -> String {
    run_svg_with(view, params, colour, TissueView::Faint)
}

/// `run_svg` with the tissue drawn as `tissue` says.
pub fn run_svg_with(
    view: &RunView,
    params: &Params,
    colour: Colouring,
    tissue: TissueView,
) -> String {
    let metadata =
        serde_json::json!({ "params": params, "seed": params.run.seed, "digest": view.digest });
    let options = SvgOptions {
        colour,
        title: format!(
            "Ramulus network, seed {}, digest {}",
            params.run.seed, view.digest
        ),
        metadata_json: metadata.to_string(),
        digest: view.digest.clone(),
        caution: params.is_site().then(|| SITE_CAUTION.to_string()),
        margin: params.domain.cell_size * 2.0,
        tissue,
    };
    render_svg(&view.network, &view.table, &options)
}

/// Renders the network as a standalone SVG document.
///
/// Segment `k` (`network.segments[k]`) is drawn with stroke width `table.width[k]`; segments
/// with an end out of range or not finite are left out, and missing table entries read as
/// width 0, order 1, flow 0. Never panics.
pub fn render_svg(network: &Network, table: &SegmentTable, options: &SvgOptions) -> String {
    let drawing = Drawing::collect(network, table, options.tissue);
    let units = network.units.as_str();
    let paper = PaperUnit::of(units);
    let least_width = match paper {
        PaperUnit::TrueSize { mm_per_unit } => PRINT_LEAST_WIDTH_MM / mm_per_unit,
        PaperUnit::Map { .. } | PaperUnit::Unknown => 0.0,
    };
    let frame = Frame::new(&drawing, network, options, least_width);
    let denominators = map_scale_candidates();
    let (band, page) = match paper {
        PaperUnit::TrueSize { mm_per_unit } => {
            let font = font_size(&frame, Some(mm_per_unit));
            let band = Band::layout(&drawing, &frame, options, units, font, "true size");
            let page = Page::paper(&frame, &band, mm_per_unit);
            (band, page)
        }
        PaperUnit::Map { mm_per_unit } => {
            let mut chosen = None;
            for &denominator in &denominators {
                let paper_mm = mm_per_unit / denominator as f64;
                let font = font_size(&frame, Some(paper_mm));
                let note = format!("scale 1:{denominator}");
                let band = Band::layout(&drawing, &frame, options, units, font, &note);
                let page = Page::paper(&frame, &band, paper_mm);
                let fits = page.width_mm <= 1000.0 && page.height_mm <= 1000.0;
                chosen = Some((band, page));
                if fits {
                    break;
                }
            }
            match chosen {
                Some(chosen) => chosen,
                None => {
                    let font = font_size(&frame, None);
                    let band = Band::layout(&drawing, &frame, options, units, font, "");
                    let page = Page::screen(&frame, &band);
                    (band, page)
                }
            }
        }
        PaperUnit::Unknown => {
            let font = font_size(&frame, None);
            let band = Band::layout(&drawing, &frame, options, units, font, "");
            let page = Page::screen(&frame, &band);
            (band, page)
        }
    };
    write_document(&drawing, &frame, &band, &page, network, options)
}

/// One drawable segment.
#[derive(Clone, Copy)]
struct Segment {
    child: usize,
    parent: usize,
    width: f64,
    flow: f64,
    order: u32,
}

/// The drawable parts of a network and their extent.
pub(crate) struct Drawing {
    nodes: Vec<(f64, f64)>,
    segments: Vec<Segment>,
    /// Tissue drawn faint (under the veins), with the stroke width they all share.
    faint: Vec<Segment>,
    faint_width: f64,
    /// Segments that do not conduct, drawn or not.
    tissue_count: usize,
    roots: Vec<(usize, f64)>,
    /// `[min x, min y, max x, max y]` of finite nodes, or `None` when there are none.
    bounds: Option<[f64; 4]>,
    widest: f64,
    max_order: u32,
    /// Smallest and largest positive flow over the conducting segments.
    pub(crate) flow_range: Option<(f64, f64)>,
}

impl Drawing {
    pub(crate) fn collect(network: &Network, table: &SegmentTable, tissue: TissueView) -> Drawing {
        let nodes: Vec<(f64, f64)> = network.nodes.iter().map(|node| (node.x, node.y)).collect();
        let finite = |index: usize| {
            nodes
                .get(index)
                .is_some_and(|&(x, y)| x.is_finite() && y.is_finite())
        };
        let width_of = |index: usize| {
            let width = table.width.get(index).copied().unwrap_or(0.0);
            if width.is_finite() && width > 0.0 {
                width
            } else {
                0.0
            }
        };
        let mut segments = Vec::new();
        let mut faint = Vec::new();
        let mut tissue_count = 0;
        let mut flow_range: Option<(f64, f64)> = None;
        // The thinnest vein's width: faint tissue is drawn thinner, tissue drawn like the
        // veins as wide (the cell size stands in when no vein has a width).
        let thinnest = (0..network.segments.len())
            .filter(|&index| table.conducts.get(index).copied().unwrap_or(true))
            .map(width_of)
            .filter(|&width| width > 0.0)
            .fold(f64::INFINITY, f64::min);
        let thinnest = if thinnest.is_finite() {
            thinnest
        } else {
            network.cell_size.max(0.0) * 0.1
        };
        // Nodes without a downstream segment are roots, drawn as wide as their widest inflow.
        let mut has_downstream = vec![false; nodes.len()];
        let mut inflow_width = vec![0.0f64; nodes.len()];
        for (index, segment) in network.segments.iter().enumerate() {
            let (child, parent) = (segment.from as usize, segment.to as usize);
            if let Some(flag) = has_downstream.get_mut(child) {
                *flag = true;
            }
            if let Some(width) = inflow_width.get_mut(parent) {
                *width = width.max(width_of(index));
            }
            if !finite(child) || !finite(parent) {
                continue;
            }
            let flow = table.flow.get(index).copied().unwrap_or(0.0);
            let conducts = table.conducts.get(index).copied().unwrap_or(true);
            let segment = Segment {
                child,
                parent,
                width: if conducts { width_of(index) } else { thinnest },
                flow: if flow.is_finite() { flow } else { 0.0 },
                order: table.order.get(index).copied().unwrap_or(1).max(1),
            };
            if conducts {
                // The flow ramp spans the veins' flows (tissue drawn like veins takes its low
                // end): the page's screen geometry keeps the same rule.
                if segment.flow > 0.0 {
                    flow_range = Some(match flow_range {
                        None => (segment.flow, segment.flow),
                        Some((low, high)) => (low.min(segment.flow), high.max(segment.flow)),
                    });
                }
                segments.push(segment);
                continue;
            }
            tissue_count += 1;
            match tissue {
                TissueView::Faint => faint.push(segment),
                TissueView::Hidden => {}
                TissueView::AsVeins => segments.push(segment),
            }
        }
        let roots: Vec<(usize, f64)> = (0..nodes.len())
            .filter(|&index| finite(index) && !has_downstream[index])
            .map(|index| (index, inflow_width[index]))
            .collect();
        // Thin and low-flow segments first, so thick ones are drawn on top.
        segments.sort_by(|a, b| {
            a.width
                .total_cmp(&b.width)
                .then(a.flow.total_cmp(&b.flow))
                .then(a.child.cmp(&b.child))
        });
        let mut bounds: Option<[f64; 4]> = None;
        for (index, &(x, y)) in nodes.iter().enumerate() {
            if !finite(index) {
                continue;
            }
            bounds = Some(match bounds {
                None => [x, y, x, y],
                Some([x0, y0, x1, y1]) => [x0.min(x), y0.min(y), x1.max(x), y1.max(y)],
            });
        }
        let widest = segments
            .iter()
            .map(|segment| segment.width)
            .chain(roots.iter().map(|&(_, width)| width))
            .fold(0.0, f64::max);
        let max_order = segments
            .iter()
            .map(|segment| segment.order)
            .max()
            .unwrap_or(0);
        Drawing {
            nodes,
            segments,
            faint,
            faint_width: FAINT_SVG_WIDTH_FRACTION * thinnest,
            tissue_count,
            roots,
            bounds,
            widest,
            max_order,
            flow_range,
        }
    }
}

/// Writes the whole document.
fn write_document(
    drawing: &Drawing,
    frame: &Frame,
    band: &Band,
    page: &Page,
    network: &Network,
    options: &SvgOptions,
) -> String {
    let c = |value: f64| frame.coordinate(value);
    let mut svg = String::with_capacity(1024 + 160 * drawing.segments.len() + band.svg.len());
    svg.push_str("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
    let _ = writeln!(
        svg,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"{}\" height=\"{}\" \
         viewBox=\"{} {} {} {}\">",
        page.width_attribute,
        page.height_attribute,
        c(frame.x0),
        c(frame.y0),
        c(frame.width),
        c(band.view_height(frame)),
    );
    let _ = writeln!(svg, "<title>{}</title>", escape_text(&options.title));
    let site = ramulus_core::params::is_site_unit(&network.units);
    let tissue_note = match (drawing.tissue_count, options.tissue) {
        (0, _) => String::new(),
        (count, view) => format!(
            "; {count} {} segment{} {}",
            if site { "hillslope" } else { "tissue" },
            plural(count),
            match view {
                TissueView::Faint => "drawn faint, under the rest",
                TissueView::Hidden => "not drawn",
                TissueView::AsVeins if site => "drawn like the thinnest channels",
                TissueView::AsVeins => "drawn like the thinnest veins",
            }
        ),
    };
    let _ = writeln!(
        svg,
        "<desc>Branching network: {} segment{}, {} root{}; lengths in {}; segment stroke widths \
         are true to scale{tissue_note}.</desc>",
        drawing.segments.len(),
        plural(drawing.segments.len()),
        drawing.roots.len(),
        plural(drawing.roots.len()),
        escape_text(&network.units),
    );
    let _ = writeln!(
        svg,
        "<metadata><ramulus:run xmlns:ramulus=\"{METADATA_NAMESPACE}\" ramulus:digest=\"{}\" \
         ramulus:tissue=\"{}\">{}</ramulus:run></metadata>",
        escape_attribute(&options.digest),
        options.tissue.name(),
        escape_text(&options.metadata_json),
    );
    let _ = writeln!(svg, "<rect class=\"background\" x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"#ffffff\"/>",
        c(frame.x0),
        c(frame.y0),
        c(frame.width),
        c(band.view_height(frame)),
    );

    // Faint tissue, under everything else.
    if !drawing.faint.is_empty() {
        let _ = writeln!(
            svg,
            "<g class=\"tissue background\" fill=\"none\" stroke=\"{TISSUE_FAINT}\" \
             stroke-opacity=\"{FAINT_SVG_OPACITY}\" stroke-width=\"{}\" \
             stroke-linecap=\"round\">",
            significant(drawing.faint_width),
        );
        for segment in &drawing.faint {
            let end = |index: usize| drawing.nodes.get(index).copied().unwrap_or((0.0, 0.0));
            let ((x1, y1), (x2, y2)) = (end(segment.child), end(segment.parent));
            let _ = writeln!(
                svg,
                "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\"/>",
                c(x1),
                c(y1),
                c(x2),
                c(y2),
            );
        }
        svg.push_str("</g>\n");
    }

    // Segments.
    svg.push_str("<g class=\"network\" fill=\"none\">\n");
    let flow_colour_of = |flow: f64| match drawing.flow_range {
        Some((low, high)) if flow > 0.0 && high > low => {
            let t = (libm::log(flow) - libm::log(low)) / (libm::log(high) - libm::log(low));
            flow_colour(if t.is_finite() { t } else { 0.0 })
        }
        Some(_) if flow > 0.0 => flow_colour(1.0),
        _ => flow_colour(0.0),
    };
    for segment in &drawing.segments {
        let (x1, y1) = drawing
            .nodes
            .get(segment.child)
            .copied()
            .unwrap_or((0.0, 0.0));
        let (x2, y2) = drawing
            .nodes
            .get(segment.parent)
            .copied()
            .unwrap_or((0.0, 0.0));
        let colour = match options.colour {
            Colouring::ByOrder => order_colour(segment.order).to_string(),
            Colouring::ByFlow => flow_colour_of(segment.flow),
            Colouring::Plain => PLAIN.to_string(),
        };
        let _ = writeln!(
            svg,
            "<line class=\"segment\" x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"{colour}\" \
             stroke-width=\"{}\" stroke-linecap=\"round\"/>",
            c(x1),
            c(y1),
            c(x2),
            c(y2),
            significant(segment.width),
        );
    }
    for &(index, _) in &drawing.roots {
        let (x, y) = drawing.nodes.get(index).copied().unwrap_or((0.0, 0.0));
        let _ = writeln!(
            svg,
            "<circle class=\"root\" cx=\"{}\" cy=\"{}\" r=\"{}\" fill=\"{ROOT_FILL}\" \
             stroke=\"{TEXT}\" stroke-width=\"{}\"/>",
            c(x),
            c(y),
            significant(frame.root_radius),
            significant(0.35 * frame.root_radius),
        );
    }
    svg.push_str("</g>\n");

    // Annotation band.
    let _ = writeln!(
        svg,
        "<g class=\"annotation\" font-family=\"sans-serif\" font-size=\"{}\" fill=\"{TEXT}\">",
        significant(band.font),
    );
    svg.push_str(&band.svg);
    svg.push_str("</g>\n</svg>\n");
    svg
}

/// The plural ending of a count's noun.
fn plural(count: usize) -> &'static str {
    if count == 1 {
        ""
    } else {
        "s"
    }
}

#[cfg(test)]
mod tests {
    use super::legend::wrap;

    #[test]
    fn wrapping_keeps_words() {
        assert_eq!(
            wrap("one two three four", 9),
            vec!["one two", "three", "four"]
        );
        assert_eq!(wrap("", 9), Vec::<String>::new());
    }
}
