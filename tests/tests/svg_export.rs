//! SVG export tests: the output of `render_svg` on hand-built networks, read back with the
//! `roxmltree` XML parser and checked against the SVG 1.1 and XML 1.0 specifications, the
//! Okabe & Ito (2008) palette and the stated layout rules.

use ramulus_core::network::{segments_from_parents, CellSet, Network, Node, NO_PARENT};
use ramulus_core::run::{conducting_network, topology_pass, widths_pass};
use ramulus_core::segments::{SegmentTable, WidthRule};
use ramulus_draw::{render_svg, Colouring, SvgOptions, METADATA_NAMESPACE};

/// The SVG namespace (SVG 1.1, section 5.1.2).
const SVG_NAMESPACE: &str = "http://www.w3.org/2000/svg";

/// The eight colours of Okabe & Ito (2008), "Color Universal Design", as hex.
const OKABE_ITO: [&str; 8] = [
    "#000000", "#e69f00", "#56b4e9", "#009e73", "#f0e442", "#0072b2", "#d55e00", "#cc79a7",
];

fn node(x: f64, y: f64, parent: u32, weight: f64) -> (Node, u32) {
    (Node { x, y, weight }, parent)
}

/// A network with one segment from each non-root node to its parent, in node order.
fn network(nodes: Vec<(Node, u32)>, units: &str) -> Network {
    let parents: Vec<u32> = nodes.iter().map(|&(_, parent)| parent).collect();
    Network {
        nodes: nodes.into_iter().map(|(node, _)| node).collect(),
        segments: segments_from_parents(&parents),
        area: 1.0,
        units: units.to_string(),
        cell_size: 0.15,
        cells: CellSet::default(),
    }
}

/// A small leaf in mm: a petiole root, a midrib node, two branches and two veinlets.
/// Strahler orders: nodes 4 and 5 are 1, node 2 (two order-1 tributaries) 2, node 3 is 1,
/// node 1 (orders 2 and 1 meeting) 2.
fn leaf() -> Network {
    let w = 0.0225;
    network(
        vec![
            node(5.0, 9.0, NO_PARENT, 0.0),
            node(5.0, 6.0, 0, w),
            node(3.0, 3.0, 1, w),
            node(7.0, 3.0, 1, w),
            node(2.0, 1.0, 2, w),
            node(4.0, 1.0, 2, w),
        ],
        "mm",
    )
}

fn table(network: &Network) -> SegmentTable {
    let forest = topology_pass(network).expect("a valid network");
    widths_pass(
        network,
        forest.as_ref(),
        &conducting_network(
            network,
            forest.as_ref(),
            &ramulus_core::params::Params::default(),
        ),
        WidthRule::single(3.0, 0.05, 0.0225),
    )
}

/// The index of the segment that starts at node `node`.
fn segment_from(network: &Network, node: usize) -> usize {
    network
        .segments
        .iter()
        .position(|segment| segment.from as usize == node)
        .expect("a segment starts at the node")
}

fn options(colour: Colouring) -> SvgOptions {
    SvgOptions {
        colour,
        title: "Test leaf".to_string(),
        metadata_json: "{\"seed\":1}".to_string(),
        digest: "0123456789abcdef".to_string(),
        caution: None,
        margin: 0.2,
        tissue: ramulus_draw::TissueView::Faint,
    }
}

/// Renders and parses; a parse failure (not well-formed XML) fails the test.
fn render(network: &Network, table: &SegmentTable, options: &SvgOptions) -> String {
    render_svg(network, table, options)
}

fn parse(svg: &str) -> roxmltree::Document<'_> {
    match roxmltree::Document::parse(svg) {
        Ok(document) => document,
        Err(error) => panic!("not well-formed XML ({error}):\n{svg}"),
    }
}

fn with_class<'a, 'input>(
    document: &'a roxmltree::Document<'input>,
    class: &'a str,
) -> impl Iterator<Item = roxmltree::Node<'a, 'input>> + 'a {
    document
        .descendants()
        .filter(move |node| node.attribute("class") == Some(class))
}

fn number(node: &roxmltree::Node, name: &str) -> f64 {
    node.attribute(name)
        .unwrap_or_else(|| panic!("missing {name}"))
        .parse()
        .unwrap_or_else(|_| panic!("{name} is not a number"))
}

fn view_box(document: &roxmltree::Document) -> [f64; 4] {
    let root = document.root_element();
    let values: Vec<f64> = root
        .attribute("viewBox")
        .expect("a viewBox")
        .split_whitespace()
        .map(|value| value.parse().expect("a number"))
        .collect();
    assert_eq!(values.len(), 4);
    [values[0], values[1], values[2], values[3]]
}

/// A length attribute in millimetres, as SVG 1.1 (section 7.10) writes it: "12.5mm".
fn millimetres(document: &roxmltree::Document, name: &str) -> f64 {
    let value = document.root_element().attribute(name).expect("attribute");
    let number = value
        .strip_suffix("mm")
        .unwrap_or_else(|| panic!("{name}={value} is not in mm"));
    number.parse().expect("a number")
}

fn close(a: f64, b: f64, relative: f64) -> bool {
    (a - b).abs() <= relative * a.abs().max(b.abs()).max(1e-12)
}

#[test]
fn well_formed_with_one_line_per_segment() {
    // XML 1.0 well-formedness, as roxmltree checks it; one element per segment.
    let leaf = leaf();
    let table = table(&leaf);
    for colour in [Colouring::ByOrder, Colouring::ByFlow, Colouring::Plain] {
        let svg = render(&leaf, &table, &options(colour));
        let document = parse(&svg);
        let root = document.root_element();
        assert_eq!(root.tag_name().name(), "svg");
        assert_eq!(root.tag_name().namespace(), Some(SVG_NAMESPACE));
        let segments: Vec<_> = with_class(&document, "segment").collect();
        assert_eq!(segments.len(), leaf.segment_count(), "{colour:?}");
        assert!(segments.iter().all(|line| line.tag_name().name() == "line"));
        assert!(segments
            .iter()
            .all(|line| line.attribute("stroke-linecap") == Some("round")));
        // Roots are circles (one root here).
        assert_eq!(
            with_class(&document, "root")
                .filter(|n| n.has_tag_name("circle"))
                .count(),
            1
        );
    }
}

#[test]
fn view_box_covers_every_node_and_stroke() {
    // SVG 1.1 section 7.7: the viewBox is min-x, min-y, width, height in user units.
    let leaf = leaf();
    let table = table(&leaf);
    let document_text = render(&leaf, &table, &options(Colouring::ByOrder));
    let document = parse(&document_text);
    let [x0, y0, width, height] = view_box(&document);
    let widest = table.width.iter().cloned().fold(0.0, f64::max);
    for node in &leaf.nodes {
        assert!(
            node.x - widest / 2.0 >= x0 && node.x + widest / 2.0 <= x0 + width,
            "x {}",
            node.x
        );
        assert!(
            node.y - widest / 2.0 >= y0 && node.y + widest / 2.0 <= y0 + height,
            "y {}",
            node.y
        );
    }
    // The 0.2 mm margin is kept on every side.
    assert!(x0 <= 2.0 - 0.2 && y0 <= 1.0 - 0.2);
    assert!(x0 + width >= 7.0 + 0.2 && y0 + height >= 9.0 + 0.2);
}

#[test]
fn stroke_widths_equal_the_table() {
    let leaf = leaf();
    let table = table(&leaf);
    let svg = render(&leaf, &table, &options(Colouring::ByOrder));
    let document = parse(&svg);
    let mut seen = vec![false; leaf.nodes.len()];
    let mut previous_width = 0.0;
    for line in with_class(&document, "segment") {
        let (x1, y1) = (number(&line, "x1"), number(&line, "y1"));
        let child = leaf
            .nodes
            .iter()
            .position(|node| close(node.x, x1, 1e-9) && close(node.y, y1, 1e-9))
            .expect("x1, y1 is a node");
        let segment = leaf
            .segments
            .iter()
            .position(|segment| segment.from as usize == child)
            .expect("a segment starts at x1, y1");
        let parent = &leaf.nodes[leaf.segments[segment].to as usize];
        assert!(close(number(&line, "x2"), parent.x, 1e-9));
        assert!(close(number(&line, "y2"), parent.y, 1e-9));
        let width = number(&line, "stroke-width");
        assert!(
            close(width, table.width[segment], 1e-5),
            "{width} vs {}",
            table.width[segment]
        );
        // Thicker segments come later in the document, so they are painted on top
        // (SVG 1.1 section 3.3: later elements paint over earlier ones).
        assert!(width >= previous_width);
        previous_width = width;
        seen[child] = true;
    }
    assert_eq!(
        seen.iter().filter(|&&drawn| drawn).count(),
        leaf.segment_count()
    );
}

#[test]
fn order_colours_come_from_the_okabe_ito_palette() {
    let leaf = leaf();
    let table = table(&leaf);
    let svg = render(&leaf, &table, &options(Colouring::ByOrder));
    let document = parse(&svg);
    let mut colour_of_order = std::collections::BTreeMap::new();
    for line in with_class(&document, "segment") {
        let stroke = line
            .attribute("stroke")
            .expect("a stroke")
            .to_ascii_lowercase();
        assert!(
            OKABE_ITO.contains(&stroke.as_str()),
            "{stroke} is not an Okabe-Ito colour"
        );
        let (x1, y1) = (number(&line, "x1"), number(&line, "y1"));
        let child = leaf
            .nodes
            .iter()
            .position(|n| close(n.x, x1, 1e-9) && close(n.y, y1, 1e-9));
        let order = table.order[segment_from(&leaf, child.expect("a node"))];
        let previous = colour_of_order.insert(order, stroke.clone());
        assert!(
            previous.is_none() || previous == Some(stroke),
            "order {order} has two colours"
        );
    }
    assert_eq!(colour_of_order.len(), 2, "orders 1 and 2 are present");
    assert_ne!(colour_of_order[&1], colour_of_order[&2]);
    let legend: Vec<String> = with_class(&document, "legend")
        .filter_map(|n| n.text().map(str::to_string))
        .collect();
    assert!(
        legend.iter().any(|text| text == "Strahler order"),
        "{legend:?}"
    );
}

/// Relative luminance of `#rrggbb` (WCAG 2.1, definition "relative luminance").
fn relative_luminance(colour: &str) -> f64 {
    let channel = |offset: usize| {
        let value =
            u8::from_str_radix(&colour[offset..offset + 2], 16).expect("hex") as f64 / 255.0;
        if value <= 0.04045 {
            value / 12.92
        } else {
            ((value + 0.055) / 1.055).powf(2.4)
        }
    };
    0.2126 * channel(1) + 0.7152 * channel(3) + 0.0722 * channel(5)
}

#[test]
fn flow_colours_darken_with_flow_and_plain_is_uniform() {
    let leaf = leaf();
    let table = table(&leaf);
    let svg = render(&leaf, &table, &options(Colouring::ByFlow));
    let document = parse(&svg);
    let mut by_flow: Vec<(f64, f64)> = with_class(&document, "segment")
        .map(|line| {
            let (x1, y1) = (number(&line, "x1"), number(&line, "y1"));
            let child = leaf
                .nodes
                .iter()
                .position(|n| close(n.x, x1, 1e-9) && close(n.y, y1, 1e-9));
            let luminance = relative_luminance(line.attribute("stroke").expect("stroke"));
            (
                table.flow[segment_from(&leaf, child.expect("a node"))],
                luminance,
            )
        })
        .collect();
    by_flow.sort_by(|a, b| a.0.total_cmp(&b.0));
    for pair in by_flow.windows(2) {
        if pair[1].0 > pair[0].0 {
            assert!(pair[1].1 < pair[0].1, "more flow must be darker: {pair:?}");
        }
    }

    let svg = render(&leaf, &table, &options(Colouring::Plain));
    let document = parse(&svg);
    let strokes: std::collections::BTreeSet<_> = with_class(&document, "segment")
        .map(|line| line.attribute("stroke"))
        .collect();
    assert_eq!(strokes.len(), 1);
}

#[test]
fn leaf_units_give_true_size() {
    // SVG 1.1 section 7.10: width="Nmm" with a viewBox in mm means one user unit is 1 mm.
    let leaf = leaf();
    let table = table(&leaf);
    let document_text = render(&leaf, &table, &options(Colouring::ByOrder));
    let document = parse(&document_text);
    let [_, _, width, height] = view_box(&document);
    assert!(close(millimetres(&document, "width"), width, 1e-5));
    assert!(close(millimetres(&document, "height"), height, 1e-5));
    assert!(
        texts(&document).contains(&"true size"),
        "{:?}",
        texts(&document)
    );

    let mut in_cm = leaf.clone();
    in_cm.units = "cm".to_string();
    let document_text = render(&in_cm, &table, &options(Colouring::ByOrder));
    let document = parse(&document_text);
    let [_, _, width, _] = view_box(&document);
    assert!(close(millimetres(&document, "width"), 10.0 * width, 1e-5));
}

/// Text printed at true size stays readable: every text element's font size, in millimetres of
/// paper (SVG 1.1 section 7.10: width="Nmm" over a viewBox width gives mm per user unit), is at
/// least 2.5 mm, about 7 pt (a lettering height for print, common practice, no source), even
/// for the 10 mm leaf here; and the drawing itself stays at true size.
#[test]
fn text_printed_at_true_size_is_at_least_two_and_a_half_millimetres() {
    let leaf = leaf();
    let table = table(&leaf);
    for units in ["mm", "um"] {
        let mut leaf = leaf.clone();
        leaf.units = units.to_string();
        let document_text = render(&leaf, &table, &options(Colouring::ByOrder));
        let document = parse(&document_text);
        let [_, _, width, _] = view_box(&document);
        let paper_per_unit = millimetres(&document, "width") / width;
        let expected_paper_per_unit = if units == "mm" { 1.0 } else { 0.001 };
        assert!(
            close(paper_per_unit, expected_paper_per_unit, 1e-5),
            "{units}: true size"
        );
        let group = document
            .descendants()
            .find(|node| node.attribute("class") == Some("annotation"))
            .expect("an annotation group");
        let font_mm = number(&group, "font-size") * paper_per_unit;
        assert!(font_mm >= 2.5 - 1e-9, "{units}: text {font_mm} mm high");
        for text in document
            .descendants()
            .filter(|node| node.has_tag_name("text"))
        {
            assert!(
                text.attribute("font-size").is_none(),
                "{units}: a text with its own size: {:?}",
                text.text()
            );
        }
    }
}

/// The stated map scales.
const MAP_SCALES: [f64; 7] = [100.0, 200.0, 500.0, 1000.0, 2000.0, 5000.0, 10000.0];

fn site(units: &str, scale: f64) -> Network {
    network(
        vec![
            node(0.0, 80.0 * scale, NO_PARENT, 0.0),
            node(40.0 * scale, 60.0 * scale, 0, 25.0),
            node(150.0 * scale, 50.0 * scale, 1, 25.0),
            node(60.0 * scale, 0.0, 1, 25.0),
        ],
        units,
    )
}

fn texts<'a>(document: &'a roxmltree::Document) -> Vec<&'a str> {
    document
        .descendants()
        .filter(|node| node.has_tag_name("text"))
        .filter_map(|n| n.text())
        .collect()
}

#[test]
fn sites_get_a_stated_map_scale() {
    for (units, mm_per_unit) in [("m", 1000.0), ("ft", 304.8)] {
        let site = site(units, 1.0);
        let table = table(&site);
        let svg = render(
            &site,
            &table,
            &SvgOptions {
                margin: 2.0,
                ..options(Colouring::Plain)
            },
        );
        let document = parse(&svg);
        let [_, _, width, height] = view_box(&document);
        let width_mm = millimetres(&document, "width");
        let height_mm = millimetres(&document, "height");
        let denominator = mm_per_unit * width / width_mm;
        let stated = MAP_SCALES
            .iter()
            .find(|&&scale| close(scale, denominator, 1e-4))
            .unwrap_or_else(|| panic!("1:{denominator} is not a stated scale"));
        assert!(close(height_mm, height * mm_per_unit / stated, 1e-4));
        // Fits within 1 m of paper.
        assert!(
            width_mm <= 1000.0 && height_mm <= 1000.0,
            "{width_mm} x {height_mm} mm"
        );
        // 150 m across needs 1:200 (1:100 would be 1.5 m of paper); 150 ft (45.7 m) fits 1:100.
        let expected = if units == "m" { 200.0 } else { 100.0 };
        assert_eq!(*stated, expected, "{units}");
        let note = format!("scale 1:{expected}");
        assert!(
            texts(&document).contains(&note.as_str()),
            "{:?}",
            texts(&document)
        );
    }
    // A 15 km catchment does not fit 1 m at 1:10000; the scale still divides evenly.
    let large = site("m", 100.0);
    let table = table(&large);
    let svg = render(&large, &table, &options(Colouring::Plain));
    let document = parse(&svg);
    let [_, _, width, _] = view_box(&document);
    let denominator = 1000.0 * width / millimetres(&document, "width");
    assert!(
        denominator > 10000.0 && millimetres(&document, "width") <= 1000.0,
        "{denominator}"
    );
}

#[test]
fn scale_bar_is_round_and_about_a_fifth() {
    let site = site("m", 1.0);
    let table = table(&site);
    let svg = render(&site, &table, &options(Colouring::ByOrder));
    let document = parse(&svg);
    let label = with_class(&document, "scale-label")
        .next()
        .and_then(|n| n.text())
        .expect("label");
    let length: f64 = label
        .strip_suffix(" m")
        .expect("labelled with units")
        .parse()
        .expect("number");
    let mantissa = length / 10f64.powf(length.log10().floor());
    assert!(
        [1.0, 2.0, 5.0].iter().any(|&m| close(m, mantissa, 1e-9)),
        "{length}"
    );
    // The drawing is about 150 m wide: a fifth is 30 m; the nearest round length is 20 or 50.
    assert!((15.0..=60.0).contains(&length), "{length}");
    assert_eq!(with_class(&document, "scale-bar").count(), 1);
}

#[test]
fn title_and_caution_are_escaped_text() {
    // XML 1.0 section 2.4: '<' and '&' must be escaped in character data.
    let title = "Leaf <script>alert('x')</script> & \"friends\"";
    let caution = "Sketch only <b>not</b> a design: size pipes & inlets with local rainfall data.";
    let site = site("m", 1.0);
    let table = table(&site);
    let options = SvgOptions {
        title: title.to_string(),
        caution: Some(caution.to_string()),
        ..options(Colouring::ByOrder)
    };
    let svg = render(&site, &table, &options);
    assert!(!svg.contains("<script") && !svg.contains("<b>"));
    let document = parse(&svg);
    assert!(document
        .descendants()
        .all(|node| !node.has_tag_name("script") && !node.has_tag_name("b")));
    let title_node = document
        .descendants()
        .find(|n| n.has_tag_name("title"))
        .expect("title");
    assert_eq!(title_node.text(), Some(title));
    // The caution is visible text, inside the viewBox, with every word kept.
    let [_, y0, _, height] = view_box(&document);
    let lines: Vec<_> = with_class(&document, "caution").collect();
    assert!(!lines.is_empty());
    for line in &lines {
        assert!(line.has_tag_name("text"));
        let y = number(line, "y");
        assert!(y > y0 && y < y0 + height);
    }
    let words: Vec<&str> = lines
        .iter()
        .filter_map(|n| n.text())
        .flat_map(str::split_whitespace)
        .collect();
    assert_eq!(words, caution.split_whitespace().collect::<Vec<_>>());
}

#[test]
fn metadata_round_trips_the_json_text() {
    let json = serde_json::to_string_pretty(&serde_json::json!({
        "params": { "units": "mm", "alpha": 0.5, "note": "a<b & c>d 'single' \"double\" \u{e9}" },
        "seed": 42,
        "digest": "00ff00ff00ff00ff",
    }))
    .expect("json");
    let leaf = leaf();
    let table = table(&leaf);
    let options = SvgOptions {
        metadata_json: json.clone(),
        digest: "00ff00ff00ff00ff".to_string(),
        ..options(Colouring::ByFlow)
    };
    let svg = render(&leaf, &table, &options);
    let document = parse(&svg);
    let metadata = document
        .descendants()
        .find(|n| n.has_tag_name("metadata"))
        .expect("metadata");
    let run = metadata
        .descendants()
        .find(|n| {
            n.tag_name().namespace() == Some(METADATA_NAMESPACE) && n.tag_name().name() == "run"
        })
        .expect("the run element");
    assert_eq!(
        run.text(),
        Some(json.as_str()),
        "the JSON text comes back byte for byte"
    );
    assert_eq!(
        run.attribute((METADATA_NAMESPACE, "digest")),
        Some("00ff00ff00ff00ff")
    );
    let value: serde_json::Value = serde_json::from_str(run.text().unwrap_or("")).expect("json");
    assert_eq!(value["seed"], 42);
}

#[test]
fn empty_zero_width_and_broken_networks_do_not_panic() {
    let empty = network(Vec::new(), "mm");
    let empty_table = SegmentTable {
        flow: vec![],
        width: vec![],
        order: vec![],
        length: vec![],
        conducts: vec![],
    };
    for colour in [Colouring::ByOrder, Colouring::ByFlow, Colouring::Plain] {
        let svg = render(&empty, &empty_table, &options(colour));
        let document = parse(&svg);
        assert_eq!(with_class(&document, "segment").count(), 0);
        let [_, _, width, height] = view_box(&document);
        assert!(width > 0.0 && height > 0.0 && width.is_finite() && height.is_finite());
    }

    let leaf = leaf();
    let mut zero = table(&leaf);
    zero.width.iter_mut().for_each(|width| *width = 0.0);
    zero.flow.iter_mut().for_each(|flow| *flow = 0.0);
    let svg = render(&leaf, &zero, &options(Colouring::ByFlow));
    let document = parse(&svg);
    assert_eq!(
        with_class(&document, "segment").count(),
        leaf.segment_count()
    );
    assert!(with_class(&document, "segment").all(|line| number(&line, "stroke-width") == 0.0));

    // One node: a lone root.
    let single = network(vec![node(3.0, 4.0, NO_PARENT, 1.0)], "mm");
    let single_table = table(&single);
    let document_text = render(&single, &single_table, &options(Colouring::ByOrder));
    let document = parse(&document_text);
    let [x0, y0, width, height] = view_box(&document);
    assert!(x0 < 3.0 && 3.0 < x0 + width && y0 < 4.0 && 4.0 < y0 + height);

    // Not a forest, not finite, a short table, an unknown unit, a negative margin: drawn as far
    // as possible, never a panic, still well-formed.
    let broken = network(
        vec![
            node(0.0, 0.0, NO_PARENT, 1.0),
            node(1.0, 1.0, 7, 1.0),
            node(f64::NAN, 1.0, 0, 1.0),
            node(2.0, f64::INFINITY, 0, 1.0),
            node(1e300, -1e300, 0, 1.0),
            node(2.0, 2.0, 0, 1.0),
        ],
        "furlong",
    );
    let short = SegmentTable {
        flow: vec![1.0, f64::NAN],
        width: vec![f64::INFINITY, -1.0],
        order: vec![0],
        length: vec![],
        conducts: vec![],
    };
    let svg = render(
        &broken,
        &short,
        &SvgOptions {
            margin: -5.0,
            ..options(Colouring::ByFlow)
        },
    );
    let document = parse(&svg);
    assert_eq!(
        with_class(&document, "segment").count(),
        2,
        "the two drawable segments"
    );
    let width = document.root_element().attribute("width").expect("width");
    assert!(
        width.parse::<f64>().is_ok(),
        "unknown units give a plain size, not {width}"
    );
}

/// The metadata namespace is a tag URI (Kindberg & Hawke 2005, RFC 4151, section 2.1):
/// `tag:` authorityName `,` date `:` specific, with a DNS-style authority and a date of the
/// form YYYY, YYYY-MM or YYYY-MM-DD; it is not a `urn:`, which would need a registered
/// namespace identifier (RFC 8141).
#[test]
fn metadata_namespace_is_a_tag_uri() {
    let rest = METADATA_NAMESPACE
        .strip_prefix("tag:")
        .expect("starts with tag:");
    let (entity, specific) = rest.split_once(':').expect("a specific part");
    let (authority, date) = entity.split_once(',').expect("authority and date");
    assert!(
        authority.contains('.')
            && authority
                .chars()
                .all(|c| c.is_ascii_alphanumeric() || c == '.' || c == '-')
    );
    let parts: Vec<&str> = date.split('-').collect();
    assert!(
        parts[0].len() == 4
            && parts
                .iter()
                .all(|part| part.chars().all(|c| c.is_ascii_digit()))
    );
    assert!(parts.len() <= 3 && parts[1..].iter().all(|part| part.len() == 2));
    assert!(!specific.is_empty() && !specific.contains(' '));
}
