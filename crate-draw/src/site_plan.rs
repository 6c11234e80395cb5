//! The drainage plan (`plan_svg`): a site drawn to a stated map scale on paper, with its outline,
//! the areas kept clear and the surface zones named, the parts no outlet reaches tinted,
//! hatched and labelled with their area, every channel drawn with its flow arrow and
//! labelled with its size and peak flow where the size changes, outlets with their contributing
//! area and peak flow, a scale bar, a north arrow, the design notes and the concept-design
//! caution. Inputs are plain shapes and texts (`PlanInput`); the numbers come from the core.
//!
//! Layout: the SVG is in paper millimetres. The site sits in a frame at the top, north up (the
//! inputs are in the network's coordinates, y growing down the page, i.e. southward); a band
//! below holds the scale bar, the north arrow, the notes and the caution.

use std::collections::HashMap;
use std::fmt::Write;

use crate::format::{escape_attribute, escape_text, fixed, round_length};

/// Smallest text on the plan, in paper millimetres (2.5 mm: common drafting practice, no source).
pub const PLAN_TEXT_MM: f64 = 2.5;

/// Shortest run of equal size (paper mm) that gets its own arrow and label: about the length of
/// a label, so labels do not pile up on short branches.
const LABELLED_RUN_MM: f64 = 30.0;

/// Map scales tried, largest first; the first at which the site fits the paper is used.
const MAP_SCALES: [u32; 12] = [
    50, 100, 200, 250, 500, 1000, 1250, 2000, 2500, 5000, 10_000, 25_000,
];

/// Width and height of the drawing frame on paper, in mm (an A3 sheet, landscape, less a
/// 15 mm border and room for the band under it).
const FRAME_MM: [f64; 2] = [390.0, 220.0];

/// What kind of area a polygon is.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PlanAreaKind {
    /// The site's outline.
    Outline,
    /// An area the layout keeps clear (a building, a tree's root zone, a dry path).
    KeptClear,
    /// A surface zone with its own runoff coefficient.
    Zone,
}

/// One polygon of the site, in the network's coordinates and length unit.
#[derive(Clone, Debug, PartialEq)]
pub struct PlanArea {
    /// Outline, kept clear or zone.
    pub kind: PlanAreaKind,
    /// Corners (the ring is closed by the drawing).
    pub ring: Vec<[f64; 2]>,
    /// Its name on the plan (e.g. "pavilion roof, C 0.90"); empty for none.
    pub label: String,
}

/// One channel segment, from its upstream to its downstream end.
#[derive(Clone, Debug, PartialEq)]
pub struct PlanChannel {
    /// Upstream node index (any numbering shared by the channels).
    pub from_node: usize,
    /// Downstream node index.
    pub to_node: usize,
    /// Upstream end, in the network's coordinates.
    pub from: [f64; 2],
    /// Downstream end.
    pub to: [f64; 2],
    /// The size as written on the plan, e.g. "Ø300"; a run of equal sizes gets one label.
    pub size_label: String,
    /// The peak flow as written on the plan, e.g. "0.042 m³/s".
    pub flow_label: String,
    /// Line width on paper, in mm (the caller scales sizes to something legible).
    pub width_mm: f64,
    /// Drawn in the warning colour, dashed: uphill, too flat, too fast or too slow, no size.
    pub flagged: bool,
}

/// A part of the site no outlet reaches: tinted and hatched, labelled with its area.
#[derive(Clone, Debug, PartialEq)]
pub struct PlanUnreached {
    /// Its rings (outer rings and holes; filled even-odd), in the network's coordinates.
    pub rings: Vec<Vec<[f64; 2]>>,
    /// Its text, e.g. "no outlet reaches: 39 m²".
    pub label: String,
    /// Where the label goes (inside the part).
    pub label_at: [f64; 2],
}

/// One outlet with its label (e.g. "street drain: 0.24 ha, 0.061 m³/s").
#[derive(Clone, Debug, PartialEq)]
pub struct PlanOutlet {
    /// Position, in the network's coordinates.
    pub at: [f64; 2],
    /// Its text.
    pub label: String,
}

/// Everything the plan shows.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct PlanInput {
    /// Document title.
    pub title: String,
    /// Length unit of the coordinates: `m` or `ft`.
    pub units: String,
    /// Outline, kept-clear areas and zones.
    pub areas: Vec<PlanArea>,
    /// Channel segments.
    pub channels: Vec<PlanChannel>,
    /// Outlets.
    pub outlets: Vec<PlanOutlet>,
    /// Parts of the site no outlet reaches.
    pub unreached: Vec<PlanUnreached>,
    /// Lines under the drawing (design storm, sizing rules, flags).
    pub notes: Vec<String>,
    /// The caution, drawn in bold under the notes.
    pub caution: String,
    /// JSON kept verbatim in `<metadata>` (the run's parameters and digest).
    pub metadata_json: String,
}

/// Draws the plan. Never panics: non-finite coordinates are left out.
pub fn plan_svg(input: &PlanInput) -> String {
    let bounds = plan_bounds(input);
    let mm_per_unit = match input.units.as_str() {
        "ft" => 304.8,
        "mm" => 1.0,
        "cm" => 10.0,
        "km" => 1_000_000.0,
        _ => 1000.0,
    };
    let [x0, y0, x1, y1] = bounds;
    let (span_x, span_y) = ((x1 - x0).max(1e-9), (y1 - y0).max(1e-9));
    let denominator = MAP_SCALES
        .iter()
        .copied()
        .find(|&d| {
            let k = mm_per_unit / d as f64;
            span_x * k <= FRAME_MM[0] && span_y * k <= FRAME_MM[1]
        })
        .unwrap_or(*MAP_SCALES.last().unwrap_or(&25_000));
    let k = mm_per_unit / denominator as f64;
    let margin = 12.0;
    let drawing_w = span_x * k;
    let drawing_h = span_y * k;
    let page_w = (drawing_w + 2.0 * margin).max(180.0);
    let to_paper = |p: [f64; 2]| -> [f64; 2] {
        [
            margin + (page_w - 2.0 * margin - drawing_w) / 2.0 + (p[0] - x0) * k,
            margin + (p[1] - y0) * k,
        ]
    };

    let mut body = String::new();
    draw_areas(&mut body, input, &to_paper);
    draw_unreached(&mut body, input, &to_paper);
    draw_channels(&mut body, input, &to_paper);
    draw_outlets(&mut body, input, &to_paper);

    // The band: scale bar and north arrow on one line, then notes, then the caution.
    let text = PLAN_TEXT_MM;
    let line = text * 1.45;
    let mut y = margin + drawing_h + 8.0;
    let bar_units = round_length(50.0 / k);
    let bar_mm = bar_units * k;
    let _ = writeln!(
        body,
        "<g class=\"scale-bar\"><rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"1.2\" fill=\"#1b1b1b\"/><text x=\"{}\" y=\"{}\" font-size=\"{text}\">{} {} (scale 1:{denominator} on paper {} mm wide)</text></g>",
        fixed(margin, 2),
        fixed(y, 2),
        fixed(bar_mm, 2),
        fixed(margin + bar_mm + 3.0, 2),
        fixed(y + 1.2, 2),
        fixed(bar_units, if bar_units < 1.0 { 2 } else { 0 }),
        escape_text(&input.units),
        fixed(page_w, 0),
    );
    let north_x = page_w - margin - 4.0;
    let _ = writeln!(
        body,
        "<g class=\"north\"><path d=\"M {nx} {a} L {l} {b} L {nx} {c} L {r} {b} Z\" fill=\"#1b1b1b\"/><text x=\"{nx}\" y=\"{t}\" font-size=\"{text}\" text-anchor=\"middle\">N</text></g>",
        nx = fixed(north_x, 2),
        a = fixed(y - 6.0, 2),
        b = fixed(y + 2.0, 2),
        c = fixed(y, 2),
        l = fixed(north_x - 3.0, 2),
        r = fixed(north_x + 3.0, 2),
        t = fixed(y + 6.5, 2),
    );
    y += line * 2.2;
    let columns = ((page_w - 2.0 * margin) / (text * 0.5)).floor().max(20.0) as usize;
    for note in &input.notes {
        for part in wrap_words(note, columns) {
            let _ = writeln!(
                body,
                "<text class=\"note\" x=\"{}\" y=\"{}\" font-size=\"{text}\">{}</text>",
                fixed(margin, 2),
                fixed(y, 2),
                escape_text(&part)
            );
            y += line;
        }
    }
    y += line * 0.4;
    for part in wrap_words(&input.caution, columns) {
        let _ = writeln!(
            body,
            "<text class=\"caution\" x=\"{}\" y=\"{}\" font-size=\"{text}\" font-weight=\"bold\">{}</text>",
            fixed(margin, 2),
            fixed(y, 2),
            escape_text(&part)
        );
        y += line;
    }
    let page_h = y + margin - line * 0.5;

    let mut svg = String::new();
    let _ = writeln!(
        svg,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}mm\" height=\"{h}mm\" viewBox=\"0 0 {w} {h}\" font-family=\"sans-serif\">",
        w = fixed(page_w, 2),
        h = fixed(page_h, 2)
    );
    let _ = writeln!(svg, "<title>{}</title>", escape_text(&input.title));
    let _ = writeln!(
        svg,
        "<metadata>{}</metadata>",
        escape_text(&input.metadata_json)
    );
    if !input.unreached.is_empty() {
        let _ = writeln!(
            svg,
            "<defs><pattern id=\"unreached-hatch\" patternUnits=\"userSpaceOnUse\" width=\"{UNREACHED_HATCH_MM}\" height=\"{UNREACHED_HATCH_MM}\" patternTransform=\"rotate(45)\"><line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"{UNREACHED_HATCH_MM}\" stroke=\"{UNREACHED_INK}\" stroke-width=\"0.3\"/></pattern></defs>"
        );
    }
    let _ = writeln!(
        svg,
        "<rect x=\"0\" y=\"0\" width=\"{}\" height=\"{}\" fill=\"#ffffff\"/>",
        fixed(page_w, 2),
        fixed(page_h, 2)
    );
    svg.push_str(&body);
    svg.push_str("</svg>\n");
    svg
}

fn plan_bounds(input: &PlanInput) -> [f64; 4] {
    let mut bounds = [
        f64::INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::NEG_INFINITY,
    ];
    let mut take = |p: [f64; 2]| {
        if p[0].is_finite() && p[1].is_finite() {
            bounds[0] = bounds[0].min(p[0]);
            bounds[1] = bounds[1].min(p[1]);
            bounds[2] = bounds[2].max(p[0]);
            bounds[3] = bounds[3].max(p[1]);
        }
    };
    for area in &input.areas {
        area.ring.iter().copied().for_each(&mut take);
    }
    for channel in &input.channels {
        take(channel.from);
        take(channel.to);
    }
    for outlet in &input.outlets {
        take(outlet.at);
    }
    for part in &input.unreached {
        part.rings.iter().flatten().copied().for_each(&mut take);
    }
    if !bounds[0].is_finite() {
        return [0.0, 0.0, 1.0, 1.0];
    }
    bounds
}

fn draw_areas(svg: &mut String, input: &PlanInput, to_paper: &dyn Fn([f64; 2]) -> [f64; 2]) {
    // Labels go on top of every area, so a zone's name is not hidden under a building.
    let mut labels = String::new();
    // Zones under kept-clear areas under the outline.
    for kind in [
        PlanAreaKind::Zone,
        PlanAreaKind::KeptClear,
        PlanAreaKind::Outline,
    ] {
        for area in input.areas.iter().filter(|area| area.kind == kind) {
            let points: Vec<[f64; 2]> = area
                .ring
                .iter()
                .copied()
                .filter(|p| p[0].is_finite() && p[1].is_finite())
                .map(to_paper)
                .collect();
            if points.len() < 3 {
                continue;
            }
            let list: Vec<String> = points
                .iter()
                .map(|p| format!("{},{}", fixed(p[0], 2), fixed(p[1], 2)))
                .collect();
            let (class, fill, stroke, width) = match kind {
                PlanAreaKind::Outline => ("outline", "none", "#1b1b1b", 0.6),
                PlanAreaKind::KeptClear => ("kept-clear", "#d9d9d9", "#5a5a5a", 0.35),
                PlanAreaKind::Zone => ("zone", "#eaf4ee", "#6aa889", 0.25),
            };
            let _ = writeln!(
                svg,
                "<polygon class=\"{class}\" points=\"{}\" fill=\"{fill}\" stroke=\"{stroke}\" stroke-width=\"{width}\"/>",
                list.join(" ")
            );
            if !area.label.is_empty() {
                let n = points.len() as f64;
                let cx = points.iter().map(|p| p[0]).sum::<f64>() / n;
                let cy = points.iter().map(|p| p[1]).sum::<f64>() / n;
                let _ = writeln!(
                    labels,
                    "<text class=\"{class}-label\" x=\"{}\" y=\"{}\" font-size=\"{PLAN_TEXT_MM}\" text-anchor=\"middle\" fill=\"#333333\">{}</text>",
                    fixed(cx, 2),
                    fixed(cy, 2),
                    escape_text(&area.label)
                );
            }
        }
    }
    svg.push_str(&labels);
}

/// Spacing of the hatching over parts no outlet reaches, paper mm.
const UNREACHED_HATCH_MM: f64 = 1.6;
/// Ink of those parts' outline, hatching and label (a warning orange, apart from the channels'
/// blue and the flagged channels' red).
const UNREACHED_INK: &str = "#b35900";

/// Parts no outlet reaches: a tint, hatching over it and the outline, each part one path
/// filled even-odd (its holes left open); labels on top.
fn draw_unreached(svg: &mut String, input: &PlanInput, to_paper: &dyn Fn([f64; 2]) -> [f64; 2]) {
    for part in &input.unreached {
        let mut path = String::new();
        for ring in &part.rings {
            let points: Vec<[f64; 2]> = ring
                .iter()
                .copied()
                .filter(|p| p[0].is_finite() && p[1].is_finite())
                .map(to_paper)
                .collect();
            if points.len() < 3 {
                continue;
            }
            for (k, p) in points.iter().enumerate() {
                let _ = write!(
                    path,
                    "{}{} {} ",
                    if k == 0 { "M" } else { "L" },
                    fixed(p[0], 2),
                    fixed(p[1], 2)
                );
            }
            path.push_str("Z ");
        }
        if path.is_empty() {
            continue;
        }
        let path = path.trim_end();
        let _ = writeln!(
            svg,
            "<g class=\"unreached\"><path d=\"{path}\" fill=\"#fbe3c8\" fill-rule=\"evenodd\" stroke=\"none\"/><path d=\"{path}\" fill=\"url(#unreached-hatch)\" fill-rule=\"evenodd\" stroke=\"{UNREACHED_INK}\" stroke-width=\"0.35\"/></g>"
        );
    }
    for part in &input.unreached {
        if !(part.label_at[0].is_finite() && part.label_at[1].is_finite()) {
            continue;
        }
        let p = to_paper(part.label_at);
        let _ = writeln!(
            svg,
            "<text class=\"unreached-label\" x=\"{}\" y=\"{}\" font-size=\"{PLAN_TEXT_MM}\" text-anchor=\"middle\" fill=\"{UNREACHED_INK}\" font-weight=\"bold\" stroke=\"#ffffff\" stroke-width=\"0.6\" paint-order=\"stroke\">{}</text>",
            fixed(p[0], 2),
            fixed(p[1], 2),
            escape_text(&part.label)
        );
    }
}

/// Channels, then one arrow and one label per run of equal size between confluences.
fn draw_channels(svg: &mut String, input: &PlanInput, to_paper: &dyn Fn([f64; 2]) -> [f64; 2]) {
    let usable: Vec<&PlanChannel> = input
        .channels
        .iter()
        .filter(|c| c.from.iter().chain(c.to.iter()).all(|v| v.is_finite()))
        .collect();
    for channel in &usable {
        let a = to_paper(channel.from);
        let b = to_paper(channel.to);
        let (colour, dash) = if channel.flagged {
            ("#c0392b", " stroke-dasharray=\"1.2 0.8\"")
        } else {
            ("#0a4d8c", "")
        };
        let _ = writeln!(
            svg,
            "<line class=\"channel\" x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"{colour}\" stroke-width=\"{}\" stroke-linecap=\"round\"{dash}/>",
            fixed(a[0], 2),
            fixed(a[1], 2),
            fixed(b[0], 2),
            fixed(b[1], 2),
            fixed(channel.width_mm.clamp(0.2, 6.0), 2)
        );
    }
    for run in equal_size_runs(&usable) {
        let length: f64 = run
            .iter()
            .map(|c| distance(to_paper(c.from), to_paper(c.to)))
            .sum();
        // A run shorter than a label's length on paper gets no arrow or label of its own.
        if length < LABELLED_RUN_MM {
            continue;
        }
        let middle = run[run.len() / 2];
        let a = to_paper(middle.from);
        let b = to_paper(middle.to);
        let (mx, my) = ((a[0] + b[0]) / 2.0, (a[1] + b[1]) / 2.0);
        let angle = (b[1] - a[1]).atan2(b[0] - a[0]).to_degrees();
        let _ = writeln!(
            svg,
            "<path class=\"flow-arrow\" d=\"M -1.6 -1.1 L 1.2 0 L -1.6 1.1 Z\" fill=\"#0a4d8c\" transform=\"translate({} {}) rotate({})\"/>",
            fixed(mx, 2),
            fixed(my, 2),
            fixed(angle, 1)
        );
        let upright = if angle.abs() > 90.0 {
            angle + 180.0
        } else {
            angle
        };
        let _ = writeln!(
            svg,
            "<text class=\"channel-label\" x=\"0\" y=\"-1.6\" font-size=\"{PLAN_TEXT_MM}\" text-anchor=\"middle\" fill=\"#0a4d8c\" transform=\"translate({} {}) rotate({})\">{} · {}</text>",
            fixed(mx, 2),
            fixed(my, 2),
            fixed(upright, 1),
            escape_text(&middle.size_label),
            escape_text(&middle.flow_label)
        );
    }
}

fn draw_outlets(svg: &mut String, input: &PlanInput, to_paper: &dyn Fn([f64; 2]) -> [f64; 2]) {
    for outlet in &input.outlets {
        if !(outlet.at[0].is_finite() && outlet.at[1].is_finite()) {
            continue;
        }
        let p = to_paper(outlet.at);
        let _ = writeln!(
            svg,
            "<g class=\"outlet\"><circle cx=\"{x}\" cy=\"{y}\" r=\"2.2\" fill=\"#0a4d8c\"/><circle cx=\"{x}\" cy=\"{y}\" r=\"1.2\" fill=\"none\" stroke=\"#ffffff\" stroke-width=\"0.6\"/><text x=\"{tx}\" y=\"{ty}\" font-size=\"{PLAN_TEXT_MM}\" fill=\"#0a4d8c\" font-weight=\"bold\">{}</text></g>",
            escape_attribute(&outlet.label),
            x = fixed(p[0], 2),
            y = fixed(p[1], 2),
            tx = fixed(p[0] + 3.2, 2),
            ty = fixed(p[1] - 2.0, 2),
        );
    }
}

/// Chains of channels between confluences and heads, split where the size label changes: each
/// chain follows a channel downstream while its downstream node has exactly one channel coming
/// in.
fn equal_size_runs<'a>(channels: &[&'a PlanChannel]) -> Vec<Vec<&'a PlanChannel>> {
    let mut inflow: HashMap<usize, usize> = HashMap::new();
    let mut leaving: HashMap<usize, usize> = HashMap::new();
    for (k, channel) in channels.iter().enumerate() {
        *inflow.entry(channel.to_node).or_default() += 1;
        leaving.insert(channel.from_node, k);
    }
    let mut runs = Vec::new();
    let mut used = vec![false; channels.len()];
    for (start, channel) in channels.iter().enumerate() {
        // A run starts at a head, below a confluence, or where the size changes.
        let above_one = inflow.get(&channel.from_node).copied().unwrap_or(0) == 1;
        let continues = above_one
            && channels
                .iter()
                .any(|c| c.to_node == channel.from_node && c.size_label == channel.size_label);
        if continues || used[start] {
            continue;
        }
        let mut run = vec![*channel];
        used[start] = true;
        let mut at = channel.to_node;
        while inflow.get(&at).copied().unwrap_or(0) == 1 {
            let Some(&next) = leaving.get(&at) else { break };
            if used[next] || channels[next].size_label != channel.size_label {
                break;
            }
            used[next] = true;
            run.push(channels[next]);
            at = channels[next].to_node;
        }
        runs.push(run);
    }
    runs
}

fn distance(a: [f64; 2], b: [f64; 2]) -> f64 {
    ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2)).sqrt()
}

fn wrap_words(text: &str, columns: usize) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        if !line.is_empty() && line.chars().count() + 1 + word.chars().count() > columns {
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
    lines
}

#[cfg(test)]
mod tests {
    use super::*;

    fn channel(from_node: usize, to_node: usize, x: f64, size: &str) -> PlanChannel {
        PlanChannel {
            from_node,
            to_node,
            from: [x, 0.0],
            to: [x + 1.0, 0.0],
            size_label: size.into(),
            flow_label: "0.01 m³/s".into(),
            width_mm: 0.5,
            flagged: false,
        }
    }

    #[test]
    fn runs_split_at_size_changes_and_confluences() {
        // 0 -> 1 -> 2 -> 3 (sizes 150, 150, 225) and 4 -> 2 (150): a confluence at node 2.
        let channels = [
            channel(0, 1, 0.0, "Ø150"),
            channel(1, 2, 1.0, "Ø150"),
            channel(2, 3, 2.0, "Ø225"),
            channel(4, 2, 5.0, "Ø150"),
        ];
        let refs: Vec<&PlanChannel> = channels.iter().collect();
        let runs = equal_size_runs(&refs);
        let mut lengths: Vec<usize> = runs.iter().map(Vec::len).collect();
        lengths.sort_unstable();
        assert_eq!(lengths, vec![1, 1, 2], "runs {runs:?}");
    }

    #[test]
    fn a_60_m_site_fits_a3_at_1_to_200_and_prints_the_caution() {
        let input = PlanInput {
            title: "garden".into(),
            units: "m".into(),
            areas: vec![PlanArea {
                kind: PlanAreaKind::Outline,
                ring: vec![[0.0, 0.0], [60.0, 0.0], [60.0, 40.0], [0.0, 40.0]],
                label: String::new(),
            }],
            caution: "Concept design only".into(),
            ..PlanInput::default()
        };
        let svg = plan_svg(&input);
        // 60 m at 1:200 is 300 mm (fits 390 mm); at 1:100 it would be 600 mm (does not).
        assert!(svg.contains("scale 1:200"), "{svg}");
        assert!(svg.contains("Concept design only"));
        assert!(svg.contains(">N</text>"));
    }

    #[test]
    fn feet_are_drawn_at_their_length() {
        // 200 ft = 60.96 m: at 1:200 that is 304.8 mm, within the 390 mm frame.
        let input = PlanInput {
            units: "ft".into(),
            areas: vec![PlanArea {
                kind: PlanAreaKind::Outline,
                ring: vec![[0.0, 0.0], [200.0, 0.0], [200.0, 100.0]],
                label: String::new(),
            }],
            ..PlanInput::default()
        };
        assert!(plan_svg(&input).contains("scale 1:200"));
    }
}
