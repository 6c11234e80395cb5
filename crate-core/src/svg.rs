//! SVG export: `render_svg` draws a `Network` with its `SegmentTable` widths at true scale,
//! coloured by Strahler order, by flow or plainly (`Colouring`), with a scale bar, a legend and
//! the run's metadata, as set by `SvgOptions`.
//!
//! Layout: the viewBox is in the network's physical units (y down, as in `Network`). The
//! drawing sits at the top; a band below it holds the scale bar, the map scale or "true size",
//! the legend and the optional caution. Segments are `<line class="segment">` elements drawn
//! thinnest first, so that major veins or trunks lie on top; roots are circles.

use std::fmt::Write;

use serde::{Deserialize, Serialize};

use crate::network::Network;
use crate::segments::SegmentTable;

/// How segments are coloured.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Colouring {
    /// By Strahler order, with colours from the colour-blind-safe palette of Okabe & Ito (2008).
    ByOrder,
    /// By the logarithm of flow, on a ramp whose lightness falls steadily from low to high flow.
    ByFlow,
    /// Every segment dark grey.
    Plain,
}

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
        }
    }
}

/// Namespace of the element inside `<metadata>` that holds the run's JSON.
pub const METADATA_NAMESPACE: &str = "urn:ramulus:run:1";

/// Renders the network as a standalone SVG document.
///
/// Segment `i` (node `i` to its parent) is drawn with stroke width `table.width[i]`; segments
/// whose parent is out of range or whose ends are not finite are left out, as are table
/// entries that are missing (width 0, order 1, flow 0 are used instead). Never panics.
pub fn render_svg(network: &Network, table: &SegmentTable, options: &SvgOptions) -> String {
    let drawing = Drawing::collect(network, table);
    let frame = Frame::new(&drawing, network, options);
    let units = network.units.as_str();
    let paper = PaperUnit::of(units);
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
struct Segment {
    child: usize,
    parent: usize,
    width: f64,
    flow: f64,
    order: u32,
}

/// The drawable parts of a network and their extent.
struct Drawing {
    nodes: Vec<(f64, f64)>,
    segments: Vec<Segment>,
    roots: Vec<(usize, f64)>,
    /// `[min x, min y, max x, max y]` of finite nodes, or `None` when there are none.
    bounds: Option<[f64; 4]>,
    widest: f64,
    max_order: u32,
    /// Smallest and largest positive flow over segments.
    flow_range: Option<(f64, f64)>,
}

impl Drawing {
    fn collect(network: &Network, table: &SegmentTable) -> Drawing {
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
        let mut roots = Vec::new();
        for (index, node) in network.nodes.iter().enumerate() {
            if !finite(index) {
                continue;
            }
            if node.is_root() {
                roots.push((index, width_of(index)));
                continue;
            }
            let parent = node.parent as usize;
            if !finite(parent) {
                continue;
            }
            let flow = table.flow.get(index).copied().unwrap_or(0.0);
            segments.push(Segment {
                child: index,
                parent,
                width: width_of(index),
                flow: if flow.is_finite() { flow } else { 0.0 },
                order: table.order.get(index).copied().unwrap_or(1).max(1),
            });
        }
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
        let mut flow_range: Option<(f64, f64)> = None;
        for segment in &segments {
            if segment.flow > 0.0 {
                flow_range = Some(match flow_range {
                    None => (segment.flow, segment.flow),
                    Some((low, high)) => (low.min(segment.flow), high.max(segment.flow)),
                });
            }
        }
        Drawing {
            nodes,
            segments,
            roots,
            bounds,
            widest,
            max_order,
            flow_range,
        }
    }
}

/// The drawing area in physical units.
struct Frame {
    /// Left edge of the view.
    x0: f64,
    /// Top edge of the view.
    y0: f64,
    /// Width of the view.
    width: f64,
    /// Bottom of the drawing area (the band starts here).
    drawing_bottom: f64,
    /// Radius of root circles.
    root_radius: f64,
    /// Decimals for coordinates (about 6 significant digits of the view size).
    decimals: usize,
}

impl Frame {
    fn new(drawing: &Drawing, network: &Network, options: &SvgOptions) -> Frame {
        let [bx0, by0, bx1, by1] = drawing.bounds.unwrap_or([0.0; 4]);
        let network_width = finite_or_zero(bx1 - bx0);
        let network_height = finite_or_zero(by1 - by0);
        let mut base = network_width.max(network_height);
        if base <= 0.0 {
            let cell = network.cell_size;
            base = if cell.is_finite() && cell > 0.0 {
                10.0 * cell
            } else {
                1.0
            };
            base = base.max(4.0 * drawing.widest);
        }
        let margin = if options.margin.is_finite() && options.margin > 0.0 {
            options.margin
        } else {
            0.0
        };
        let root_radius = drawing
            .roots
            .iter()
            .map(|&(_, width)| 0.75 * width)
            .fold(0.012 * base, f64::max);
        let pad = margin + (0.5 * drawing.widest).max(1.2 * root_radius);
        let (mut x0, y0) = (bx0 - pad, by0 - pad);
        let mut width = network_width + 2.0 * pad;
        let height = network_height + 2.0 * pad;
        // Leave room for the legend under a narrow drawing.
        let least = 0.6 * base;
        if width < least {
            x0 -= 0.5 * (least - width);
            width = least;
        }
        let extent = width.max(height);
        let decimals = if extent.is_finite() && extent > 0.0 {
            (5.0 - libm::floor(libm::log10(extent))).clamp(0.0, 15.0) as usize
        } else {
            6
        };
        Frame {
            x0: finite_or_zero(x0),
            y0: finite_or_zero(y0),
            width: finite_or_zero(width),
            drawing_bottom: finite_or_zero(y0 + height),
            root_radius,
            decimals,
        }
    }

    fn coordinate(&self, value: f64) -> String {
        fixed(value, self.decimals)
    }
}

/// Font size in physical units: about 2.5 mm on paper, kept between 2 % and 4.5 % of the width.
fn font_size(frame: &Frame, paper_mm_per_unit: Option<f64>) -> f64 {
    let low = 0.02 * frame.width;
    let high = 0.045 * frame.width;
    let font = match paper_mm_per_unit {
        Some(scale) if scale > 0.0 && scale.is_finite() => 2.5 / scale,
        _ => 0.035 * frame.width,
    };
    let font = font.clamp(low.min(high), high.max(low));
    if font.is_finite() && font > 0.0 {
        font
    } else {
        1.0
    }
}

/// How a length unit maps to paper.
enum PaperUnit {
    /// Drawn at true size: millimetres of paper per unit.
    TrueSize { mm_per_unit: f64 },
    /// Drawn at a map scale: true millimetres per unit, divided by the scale denominator.
    Map { mm_per_unit: f64 },
    /// A unit the exporter does not know: sized for a screen.
    Unknown,
}

impl PaperUnit {
    fn of(units: &str) -> PaperUnit {
        match units {
            "um" | "\u{b5}m" | "\u{3bc}m" => PaperUnit::TrueSize { mm_per_unit: 0.001 },
            "mm" => PaperUnit::TrueSize { mm_per_unit: 1.0 },
            "cm" => PaperUnit::TrueSize { mm_per_unit: 10.0 },
            "m" => PaperUnit::Map {
                mm_per_unit: 1000.0,
            },
            "ft" => PaperUnit::Map { mm_per_unit: 304.8 },
            _ => PaperUnit::Unknown,
        }
    }
}

/// Map scale denominators, smallest first: the stated series, then 1, 2, 5 x 10^k beyond it for
/// areas too large to fit 1 m of paper at 1:10000.
fn map_scale_candidates() -> Vec<u64> {
    let mut candidates = vec![100, 200, 500, 1000, 2000, 5000, 10_000];
    let mut decade = 10_000u64;
    while decade < 1_000_000_000 {
        candidates.extend([2 * decade, 5 * decade, 10 * decade]);
        decade *= 10;
    }
    candidates
}

/// Size of the whole document.
struct Page {
    width_mm: f64,
    height_mm: f64,
    /// `width` and `height` attribute values.
    width_attribute: String,
    height_attribute: String,
}

impl Page {
    fn paper(frame: &Frame, band: &Band, mm_per_unit: f64) -> Page {
        let width_mm = frame.width * mm_per_unit;
        let height_mm = band.view_height(frame) * mm_per_unit;
        Page {
            width_mm,
            height_mm,
            width_attribute: format!("{}mm", significant(width_mm)),
            height_attribute: format!("{}mm", significant(height_mm)),
        }
    }

    fn screen(frame: &Frame, band: &Band) -> Page {
        let height = band.view_height(frame);
        let longest = frame.width.max(height);
        let pixels = if longest > 0.0 && longest.is_finite() {
            800.0 / longest
        } else {
            1.0
        };
        Page {
            width_mm: 0.0,
            height_mm: 0.0,
            width_attribute: significant(frame.width * pixels),
            height_attribute: significant(height * pixels),
        }
    }
}

/// A legend entry: pieces laid side by side and never split across lines.
struct LegendItem {
    pieces: Vec<Piece>,
}

/// Part of a legend entry.
enum Piece {
    /// A short stroke in a colour.
    Line(String),
    /// A root marker.
    Circle,
    /// A label.
    Text(String),
}

impl LegendItem {
    fn text(label: impl Into<String>) -> LegendItem {
        LegendItem {
            pieces: vec![Piece::Text(label.into())],
        }
    }
}

/// Width of a legend piece, in font sizes (text is estimated at 0.6 font sizes a character).
fn piece_width(piece: &Piece) -> f64 {
    match piece {
        Piece::Line(_) => 1.3,
        Piece::Circle => 1.1,
        Piece::Text(label) => 0.3 + 0.6 * label.chars().count() as f64,
    }
}

/// The annotation band under the drawing, already written as SVG.
struct Band {
    svg: String,
    height: f64,
    font: f64,
}

impl Band {
    fn view_height(&self, frame: &Frame) -> f64 {
        frame.drawing_bottom - frame.y0 + self.height
    }

    fn layout(
        drawing: &Drawing,
        frame: &Frame,
        options: &SvgOptions,
        units: &str,
        font: f64,
        scale_note: &str,
    ) -> Band {
        let c = |value: f64| frame.coordinate(value);
        let line_gap = 1.6 * font;
        let left = frame.x0 + 0.5 * font;
        let right = frame.x0 + frame.width - 0.5 * font;
        let char_width = 0.6 * font;
        let mut svg = String::new();
        let mut baseline = frame.drawing_bottom + line_gap;

        // Scale bar.
        let length = round_length(frame.width / 5.0);
        let bar_end = left + length;
        let label = format!("{} {}", significant(length), units);
        let _ = writeln!(
            svg,
            "<path class=\"scale-bar\" d=\"M{} {}V{}H{}V{}\" fill=\"none\" stroke=\"{TEXT}\" \
             stroke-width=\"{}\"/>",
            c(left),
            c(baseline - 0.5 * font),
            c(baseline),
            c(bar_end),
            c(baseline - 0.5 * font),
            significant(0.1 * font),
        );
        let label_x = bar_end + 0.5 * font;
        text_element(
            &mut svg,
            frame,
            "scale-label",
            label_x,
            baseline,
            &label,
            false,
        );
        if !scale_note.is_empty() {
            let note_x = label_x + (label.chars().count() as f64 + 2.0) * char_width;
            text_element(
                &mut svg,
                frame,
                "scale-note",
                note_x,
                baseline,
                scale_note,
                false,
            );
        }

        // Legend.
        let items = legend_items(drawing, options.colour, units);
        let mut x = left;
        baseline += line_gap;
        for item in &items {
            let item_width: f64 = item.pieces.iter().map(piece_width).sum::<f64>() * font;
            if x > left && x + item_width > right {
                x = left;
                baseline += line_gap;
            }
            let middle = baseline - 0.35 * font;
            for piece in &item.pieces {
                match piece {
                    Piece::Line(colour) => {
                        let _ = writeln!(
                            svg,
                            "<line class=\"legend-swatch\" x1=\"{}\" y1=\"{}\" x2=\"{}\" \
                             y2=\"{}\" stroke=\"{colour}\" stroke-width=\"{}\" \
                             stroke-linecap=\"round\"/>",
                            c(x + 0.3 * font),
                            c(middle),
                            c(x + 1.0 * font),
                            c(middle),
                            significant(0.45 * font),
                        );
                    }
                    Piece::Circle => {
                        let _ = writeln!(
                            svg,
                            "<circle class=\"legend-swatch\" cx=\"{}\" cy=\"{}\" r=\"{}\" \
                             fill=\"{ROOT_FILL}\" stroke=\"{TEXT}\" stroke-width=\"{}\"/>",
                            c(x + 0.5 * font),
                            c(middle),
                            significant(0.3 * font),
                            significant(0.1 * font),
                        );
                    }
                    Piece::Text(label) => {
                        text_element(
                            &mut svg,
                            frame,
                            "legend",
                            x + 0.25 * font,
                            baseline,
                            label,
                            false,
                        );
                    }
                }
                x += piece_width(piece) * font;
            }
            x += 0.9 * font;
        }

        // Caution.
        if let Some(caution) = &options.caution {
            let columns = ((right - left) / (0.62 * font)).max(10.0);
            let columns = if columns.is_finite() {
                columns as usize
            } else {
                80
            };
            for line in wrap(caution, columns) {
                baseline += line_gap;
                text_element(&mut svg, frame, "caution", left, baseline, &line, true);
            }
        }

        let height = baseline + 0.8 * font - frame.drawing_bottom;
        Band { svg, height, font }
    }
}

/// Legend entries for a colouring, plus the root marker.
fn legend_items(drawing: &Drawing, colouring: Colouring, units: &str) -> Vec<LegendItem> {
    let mut items = Vec::new();
    match colouring {
        Colouring::ByOrder if drawing.max_order > 0 => {
            items.push(LegendItem::text("Strahler order"));
            let shown = drawing.max_order.min(ORDER_COLOURS.len() as u32);
            for order in 1..=shown {
                let plus = if order == shown && drawing.max_order > shown {
                    "+"
                } else {
                    ""
                };
                items.push(LegendItem {
                    pieces: vec![
                        Piece::Line(order_colour(order).to_string()),
                        Piece::Text(format!("{order}{plus}")),
                    ],
                });
            }
        }
        Colouring::ByFlow => {
            if let Some((low, high)) = drawing.flow_range {
                items.push(LegendItem::text(format!("flow ({units}\u{b2})")));
                let mut pieces = vec![Piece::Text(significant_digits(low, 3))];
                if high > low {
                    pieces.extend((0..5).map(|step| Piece::Line(flow_colour(step as f64 / 4.0))));
                    pieces.push(Piece::Text(significant_digits(high, 3)));
                } else {
                    pieces.push(Piece::Line(flow_colour(1.0)));
                }
                items.push(LegendItem { pieces });
            }
        }
        Colouring::Plain if !drawing.segments.is_empty() => {
            items.push(LegendItem {
                pieces: vec![
                    Piece::Line(PLAIN.to_string()),
                    Piece::Text("segment (width to scale)".to_string()),
                ],
            });
        }
        Colouring::ByOrder | Colouring::Plain => {}
    }
    if !drawing.roots.is_empty() {
        items.push(LegendItem {
            pieces: vec![Piece::Circle, Piece::Text("root".to_string())],
        });
    }
    items
}

/// Writes one `<text>` element.
fn text_element(
    svg: &mut String,
    frame: &Frame,
    class: &str,
    x: f64,
    baseline: f64,
    text: &str,
    bold: bool,
) {
    let weight = if bold { " font-weight=\"bold\"" } else { "" };
    let _ = writeln!(
        svg,
        "<text class=\"{class}\" x=\"{}\" y=\"{}\"{weight}>{}</text>",
        frame.coordinate(x),
        frame.coordinate(baseline),
        escape_text(text),
    );
}

/// Splits text into lines of at most `columns` characters at spaces (longer words stand alone).
fn wrap(text: &str, columns: usize) -> Vec<String> {
    let mut lines = Vec::new();
    for paragraph in text.lines() {
        let mut line = String::new();
        for word in paragraph.split_whitespace() {
            let needed =
                line.chars().count() + usize::from(!line.is_empty()) + word.chars().count();
            if !line.is_empty() && needed > columns {
                lines.push(std::mem::take(&mut line));
            }
            if !line.is_empty() {
                line.push(' ');
            }
            line.push_str(word);
        }
        if !line.is_empty() {
            lines.push(line);
        }
    }
    lines
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
    let _ = writeln!(
        svg,
        "<desc>Branching network: {} segments, {} roots; lengths in {}; segment stroke widths \
         are true to scale.</desc>",
        drawing.segments.len(),
        drawing.roots.len(),
        escape_text(&network.units),
    );
    let _ = writeln!(
        svg,
        "<metadata><ramulus:run xmlns:ramulus=\"{METADATA_NAMESPACE}\" ramulus:digest=\"{}\">{}\
         </ramulus:run></metadata>",
        escape_attribute(&options.digest),
        escape_text(&options.metadata_json),
    );
    let _ = writeln!(svg, "<rect class=\"background\" x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"#ffffff\"/>",
        c(frame.x0),
        c(frame.y0),
        c(frame.width),
        c(band.view_height(frame)),
    );

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

/// Text and outline colour.
const TEXT: &str = "#222222";

/// Fill of root markers.
const ROOT_FILL: &str = "#ffffff";

/// Colour of `Colouring::Plain`.
const PLAIN: &str = "#404040";

/// Strahler orders 1, 2, ... in colours of Okabe & Ito (2008), "Color Universal Design";
/// yellow is left out as it is too faint on white. Orders past the end use the last colour.
const ORDER_COLOURS: [&str; 7] = [
    "#56b4e9", // sky blue
    "#009e73", // bluish green
    "#e69f00", // orange
    "#0072b2", // blue
    "#d55e00", // vermilion
    "#cc79a7", // reddish purple
    "#000000", // black
];

fn order_colour(order: u32) -> &'static str {
    let index = (order.max(1) - 1) as usize;
    ORDER_COLOURS[index.min(ORDER_COLOURS.len() - 1)]
}

/// The flow ramp at `t` in [0, 1] (0 = least flow): a path through the OKLab colour space
/// (Ottosson 2020) whose lightness falls linearly from 0.87 to 0.30 while the hue turns from
/// yellow-green through teal to blue, so light thin veinlets recede and dark trunks stand out.
fn flow_colour(t: f64) -> String {
    let t = if t.is_finite() {
        t.clamp(0.0, 1.0)
    } else {
        0.0
    };
    let lightness = 0.87 - 0.57 * t;
    let hue = (110.0 + 165.0 * t).to_radians();
    let mut chroma = 0.09 + 0.05 * libm::sin(std::f64::consts::PI * t);
    let mut rgb = oklab_to_linear_srgb(lightness, chroma * libm::cos(hue), chroma * libm::sin(hue));
    // Pull chroma in until the colour lies inside the sRGB gamut.
    for _ in 0..40 {
        if rgb.iter().all(|&channel| (0.0..=1.0).contains(&channel)) {
            break;
        }
        chroma *= 0.9;
        rgb = oklab_to_linear_srgb(lightness, chroma * libm::cos(hue), chroma * libm::sin(hue));
    }
    let [red, green, blue] = rgb.map(|channel| {
        let channel = channel.clamp(0.0, 1.0);
        let encoded = if channel <= 0.003_130_8 {
            12.92 * channel
        } else {
            1.055 * libm::pow(channel, 1.0 / 2.4) - 0.055
        };
        libm::round(encoded.clamp(0.0, 1.0) * 255.0) as u8
    });
    format!("#{red:02x}{green:02x}{blue:02x}")
}

/// OKLab to linear sRGB (Ottosson 2020, "A perceptual color space for image processing").
fn oklab_to_linear_srgb(lightness: f64, a: f64, b: f64) -> [f64; 3] {
    let l = lightness + 0.396_337_777_4 * a + 0.215_803_757_3 * b;
    let m = lightness - 0.105_561_345_8 * a - 0.063_854_172_8 * b;
    let s = lightness - 0.089_484_177_5 * a - 1.291_485_548_0 * b;
    let (l, m, s) = (l * l * l, m * m * m, s * s * s);
    [
        4.076_741_662_1 * l - 3.307_711_591_3 * m + 0.230_969_929_2 * s,
        -1.268_438_004_6 * l + 2.609_757_401_1 * m - 0.341_319_396_5 * s,
        -0.004_196_086_3 * l - 0.703_418_614_7 * m + 1.707_614_701_0 * s,
    ]
}

/// The round length (1, 2 or 5 times a power of ten) nearest to `target` on a log scale.
fn round_length(target: f64) -> f64 {
    if !target.is_finite() || target <= 0.0 {
        return 1.0;
    }
    let decade = libm::pow(10.0, libm::floor(libm::log10(target)));
    let mut best = decade;
    for factor in [1.0, 2.0, 5.0, 10.0] {
        let candidate = factor * decade;
        if libm::fabs(libm::log(candidate / target)) < libm::fabs(libm::log(best / target)) {
            best = candidate;
        }
    }
    if best.is_finite() && best > 0.0 {
        best
    } else {
        1.0
    }
}

fn finite_or_zero(value: f64) -> f64 {
    if value.is_finite() {
        value
    } else {
        0.0
    }
}

/// A number with 6 significant digits, without exponent or trailing zeros; non-finite gives 0.
fn significant(value: f64) -> String {
    significant_digits(value, 6)
}

/// A number with `digits` significant digits (whole numbers keep all theirs), without exponent
/// or trailing zeros; non-finite gives 0.
fn significant_digits(value: f64, digits: u32) -> String {
    if !value.is_finite() || value == 0.0 {
        return "0".to_string();
    }
    let magnitude = libm::floor(libm::log10(libm::fabs(value)));
    let decimals = (f64::from(digits) - 1.0 - magnitude).clamp(0.0, 20.0) as usize;
    fixed(value, decimals)
}

/// A number with a fixed number of decimals, trailing zeros removed; non-finite gives 0.
fn fixed(value: f64, decimals: usize) -> String {
    if !value.is_finite() {
        return "0".to_string();
    }
    let mut text = format!("{value:.decimals$}");
    if text.contains('.') {
        while text.ends_with('0') {
            text.pop();
        }
        if text.ends_with('.') {
            text.pop();
        }
    }
    if text == "-0" {
        text = "0".to_string();
    }
    text
}

/// Escapes text content: the five XML special characters, carriage returns (which XML would
/// otherwise fold into line feeds), and characters XML 1.0 forbids (replaced by U+FFFD).
fn escape_text(text: &str) -> String {
    escape(text, false)
}

/// Escapes an attribute value: as `escape_text`, and also tabs and line feeds, which XML
/// would otherwise turn into spaces.
fn escape_attribute(text: &str) -> String {
    escape(text, true)
}

fn escape(text: &str, attribute: bool) -> String {
    let mut escaped = String::with_capacity(text.len());
    for character in text.chars() {
        match character {
            '&' => escaped.push_str("&amp;"),
            '<' => escaped.push_str("&lt;"),
            '>' => escaped.push_str("&gt;"),
            '"' => escaped.push_str("&quot;"),
            '\'' => escaped.push_str("&apos;"),
            '\r' => escaped.push_str("&#13;"),
            '\n' if attribute => escaped.push_str("&#10;"),
            '\t' if attribute => escaped.push_str("&#9;"),
            '\n' | '\t' => escaped.push(character),
            '\u{0}'..='\u{1f}' | '\u{fffe}' | '\u{ffff}' => escaped.push('\u{fffd}'),
            _ => escaped.push(character),
        }
    }
    escaped
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_are_compact() {
        assert_eq!(significant(0.0), "0");
        assert_eq!(significant(1.0), "1");
        assert_eq!(significant(0.123_456_789), "0.123457");
        assert_eq!(significant(-2.5e-7), "-0.00000025");
        assert_eq!(significant(f64::NAN), "0");
        assert_eq!(fixed(-0.000_01, 3), "0");
        assert_eq!(significant_digits(26_959.2, 3), "26959");
        assert_eq!(significant_digits(1.4175, 3), "1.42");
    }

    #[test]
    fn round_lengths() {
        assert_eq!(round_length(0.9), 1.0);
        assert_eq!(round_length(3.5), 5.0);
        assert_eq!(round_length(2.9), 2.0);
        assert_eq!(round_length(170.0), 200.0);
        assert_eq!(round_length(0.0), 1.0);
    }

    #[test]
    fn escapes_all_five() {
        assert_eq!(escape_text("a<b>&\"c'"), "a&lt;b&gt;&amp;&quot;c&apos;");
        assert_eq!(escape_attribute("x\ny"), "x&#10;y");
        assert_eq!(escape_text("\u{7}"), "\u{fffd}");
    }

    /// Relative luminance (WCAG 2 definition) of a `#rrggbb` colour.
    fn relative_luminance(colour: &str) -> f64 {
        let channel = |offset: usize| {
            let value = u8::from_str_radix(&colour[offset..offset + 2], 16).unwrap() as f64 / 255.0;
            if value <= 0.04045 {
                value / 12.92
            } else {
                ((value + 0.055) / 1.055).powf(2.4)
            }
        };
        0.2126 * channel(1) + 0.7152 * channel(3) + 0.0722 * channel(5)
    }

    #[test]
    fn flow_ramp_darkens_steadily() {
        let mut previous = f64::INFINITY;
        for step in 0..=20 {
            let colour = flow_colour(step as f64 / 20.0);
            let luminance = relative_luminance(&colour);
            assert!(luminance < previous, "step {step}: {colour} is not darker");
            previous = luminance;
        }
    }

    #[test]
    fn wrapping_keeps_words() {
        assert_eq!(
            wrap("one two three four", 9),
            vec!["one two", "three", "four"]
        );
        assert_eq!(wrap("", 9), Vec::<String>::new());
    }
}
