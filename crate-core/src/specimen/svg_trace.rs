//! `read_svg`: a traced SVG drawing into a `Trace`. Veins are `path`, `polyline`, `polygon`,
//! `line`, `rect`, `circle` and `ellipse` elements, under any nesting of `g` and `svg` elements
//! with their `transform`s; an element labelled `outline` (its `id`, `class` or
//! `inkscape:label`, or an ancestor's) is the leaf outline, one labelled `scale-bar` a scale
//! bar, one labelled `root` marks a root (a circle by its centre), and one labelled
//! `annotation`, `legend`, `background` or `ignore` is skipped. The physical size comes from the root's `width`/`height` (mm, cm, in, pt, pc, px at
//! 96 per inch) and `viewBox`.
//!
//! Safe by construction: `roxmltree` refuses a document type declaration (so no entity is
//! expanded) and fetches nothing; `script`, `style`, `image`, `use`, `foreignObject`, `text`
//! and definitions (`defs`, `symbol`, `clipPath`, `mask`, `pattern`, `marker`) are skipped and
//! named in the trace's notes, and no `href` is ever followed.

use roxmltree::{Document, Node, ParsingOptions};
use svgtypes::{LengthUnit, PathParser, PathSegment, TransformListParser, TransformListToken};

use super::flatten::{flatten_arc, flatten_cubic, flatten_quadratic, Affine, EndpointArc};
use super::{Point, SpecimenError, Trace, TracedLine, MAX_SVG_NODES, MAX_TRACE_POINTS};

/// Millimetres per CSS pixel: 96 pixels per inch (CSS Values and Units Level 3, section 5.2).
const MM_PER_PX: f64 = 25.4 / 96.0;

/// Elements whose content is never drawn as part of the trace.
pub(crate) const SKIPPED: [&str; 14] = [
    "defs",
    "symbol",
    "clipPath",
    "mask",
    "pattern",
    "marker",
    "script",
    "style",
    "image",
    "use",
    "foreignObject",
    "text",
    "metadata",
    "switch",
];

/// What a drawn element stands for.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Role {
    Vein,
    Outline,
    ScaleBar,
    RootMark,
    Skipped,
}

/// Reads an SVG document; `tolerance` is the flattening tolerance in output units and
/// `stated_factor` the output units per user unit when stated (else the file's physical size).
pub(crate) fn read_svg(
    text: &str,
    tolerance: f64,
    stated_factor: Option<f64>,
) -> Result<Trace, SpecimenError> {
    let options = ParsingOptions {
        allow_dtd: false,
        nodes_limit: MAX_SVG_NODES,
        // No entity is resolved: with DTDs refused there is none to resolve anyway.
        ..ParsingOptions::default()
    };
    let document =
        Document::parse_with_options(text, options).map_err(|error| SpecimenError::Xml {
            message: error.to_string(),
        })?;
    let root = document.root_element();
    if root.tag_name().name() != "svg" {
        return Err(SpecimenError::Svg {
            element: describe(&document, root),
            problem: "the root element is not `svg`".to_string(),
        });
    }
    let mut trace = Trace::default();
    let physical = physical_scale(&document, root, &mut trace.notes)?;
    trace.physical_scale = Some((physical, "mm"));
    let factor = stated_factor.unwrap_or(physical);
    if !(tolerance > 0.0 && tolerance.is_finite() && factor > 0.0 && factor.is_finite()) {
        return Err(SpecimenError::Option {
            option: "flattening tolerance",
            problem: format!(
                "must be a positive number of output units (is {tolerance}, with {factor} \
                 output units per SVG user unit)"
            ),
        });
    }
    let mut reader = SvgReader {
        document: &document,
        tolerance: tolerance / factor,
        trace,
        points: 0,
        text,
        line_cursor: (0, 1),
    };
    reader.walk(root, Affine::IDENTITY, Role::Vein)?;
    Ok(reader.trace)
}

/// Millimetres per user unit of the root element. Coordinates themselves stay in user units
/// (what an editor shows, the view box's origin kept), so `--root` and `--scale-bar` points
/// are read off the drawing as they are written.
pub(crate) fn physical_scale(
    document: &Document,
    root: Node,
    notes: &mut Vec<String>,
) -> Result<f64, SpecimenError> {
    let length_mm = |name: &str| -> Result<Option<f64>, SpecimenError> {
        let Some(text) = root.attribute(name) else {
            return Ok(None);
        };
        let length: svgtypes::Length = text.parse().map_err(|error| SpecimenError::Svg {
            element: describe(document, root),
            problem: format!("attribute `{name}` = {text:?} is not a length: {error}"),
        })?;
        let per_unit = match length.unit {
            LengthUnit::Mm => 1.0,
            LengthUnit::Cm => 10.0,
            LengthUnit::In => 25.4,
            LengthUnit::Pt => 25.4 / 72.0,
            LengthUnit::Pc => 25.4 / 6.0,
            LengthUnit::Px | LengthUnit::None => MM_PER_PX,
            LengthUnit::Em | LengthUnit::Ex | LengthUnit::Percent => return Ok(None),
        };
        let value = length.number * per_unit;
        if value.is_finite() && value > 0.0 {
            Ok(Some(value))
        } else {
            Err(SpecimenError::Svg {
                element: describe(document, root),
                problem: format!("attribute `{name}` = {text:?} is not a positive length"),
            })
        }
    };
    let width = length_mm("width")?;
    let height = length_mm("height")?;
    let view_box = match root.attribute("viewBox") {
        Some(text) => {
            let view_box: svgtypes::ViewBox = text.parse().map_err(|error| SpecimenError::Svg {
                element: describe(document, root),
                problem: format!("attribute `viewBox` = {text:?} is not readable: {error}"),
            })?;
            let finite = [view_box.x, view_box.y, view_box.w, view_box.h]
                .iter()
                .all(|value| value.is_finite());
            if !finite || view_box.w <= 0.0 || view_box.h <= 0.0 {
                return Err(SpecimenError::Svg {
                    element: describe(document, root),
                    problem: format!(
                        "attribute `viewBox` = {text:?} needs a positive width and height"
                    ),
                });
            }
            Some(view_box)
        }
        None => None,
    };
    let factor = match (view_box, width, height) {
        (Some(view), Some(width), Some(height)) => {
            // preserveAspectRatio's default (xMidYMid meet) scales uniformly by the smaller
            // ratio (SVG 1.1, section 7.8).
            let (sx, sy) = (width / view.w, height / view.h);
            if (sx - sy).abs() > 1e-6 * sx.max(sy) {
                notes.push(format!(
                    "the width and height give {sx} and {sy} mm per user unit across and down; \
                     the smaller is used, as SVG does by default"
                ));
            }
            sx.min(sy)
        }
        (Some(view), Some(width), None) => width / view.w,
        (Some(view), None, Some(height)) => height / view.h,
        (None, _, _) => {
            if width.is_none() && height.is_none() {
                notes.push(
                    "no physical width or height: one user unit is taken as one pixel at 96 \
                     per inch"
                        .to_string(),
                );
            }
            MM_PER_PX
        }
        (Some(_), None, None) => {
            notes.push(
                "no physical width or height: one user unit is taken as one pixel at 96 per \
                 inch"
                    .to_string(),
            );
            MM_PER_PX
        }
    };
    Ok(factor)
}

/// `<path id="midrib"> (line 12)`: an element as people find it in the file.
pub(crate) fn describe(document: &Document, node: Node) -> String {
    describe_at(node, document.text_pos_at(node.range().start).row)
}

/// `describe` with the line already known.
fn describe_at(node: Node, line: u32) -> String {
    let label = ["id", "inkscape:label"]
        .iter()
        .find_map(|name| attribute_any_namespace(node, name).map(|value| (*name, value)));
    let shown = |value: &str| value.chars().take(40).collect::<String>();
    match label {
        Some((name, value)) => format!(
            "<{} {}={:?}> (line {line})",
            node.tag_name().name(),
            name,
            shown(value)
        ),
        None => format!("<{}> (line {line})", node.tag_name().name()),
    }
}

/// An attribute by its local name whatever its namespace (`inkscape:label` is `label` in the
/// Inkscape namespace).
pub(crate) fn attribute_any_namespace<'a>(node: Node<'a, 'a>, name: &str) -> Option<&'a str> {
    let local = name.rsplit(':').next().unwrap_or(name);
    node.attributes()
        .find(|attribute| {
            attribute.name() == local && (local != "label" || attribute.namespace().is_some())
                || (attribute.name() == name)
        })
        .map(|attribute| attribute.value())
}

/// The role an element's own labels give it, if any: the words of its `id`, `class` and
/// `inkscape:label` (split at anything not a letter or digit) name it `outline`, `scale bar`
/// (or `scalebar`), `root` (its centre or first point marks a root), or `annotation`,
/// `legend`, `background` or `ignore` (skipped).
fn role_of(node: Node) -> Option<Role> {
    let mut text = String::new();
    for name in ["id", "class", "inkscape:label"] {
        if let Some(value) = attribute_any_namespace(node, name) {
            text.push_str(&value.to_lowercase());
            text.push(' ');
        }
    }
    let words: Vec<&str> = text
        .split(|c: char| !c.is_alphanumeric())
        .filter(|word| !word.is_empty())
        .collect();
    let has = |word: &str| words.contains(&word);
    if has("outline") {
        Some(Role::Outline)
    } else if has("scalebar") || words.windows(2).any(|pair| pair == ["scale", "bar"]) {
        Some(Role::ScaleBar)
    } else if has("root") {
        Some(Role::RootMark)
    } else if ["annotation", "legend", "background", "ignore"]
        .iter()
        .any(|word| has(word))
    {
        Some(Role::Skipped)
    } else {
        None
    }
}

/// The shape reading of this module lent to other readers of SVG drawings (the site-plan
/// reader), so that both read transforms, shapes and path data alike.
pub(crate) struct ShapeReader<'a, 'input>(SvgReader<'a, 'input>);

impl<'a, 'input> ShapeReader<'a, 'input> {
    /// A reader of `document` (parsed from `text`) flattening curves to within `tolerance`
    /// root user units.
    pub(crate) fn new(document: &'a Document<'input>, text: &'a str, tolerance: f64) -> Self {
        ShapeReader(SvgReader {
            document,
            tolerance,
            trace: Trace::default(),
            points: 0,
            text,
            line_cursor: (0, 1),
        })
    }

    /// An element's own `transform`.
    pub(crate) fn transform_of(&self, node: Node) -> Result<Affine, SpecimenError> {
        self.0.transform_of(node)
    }

    /// The polylines an element draws (`path`, `polygon`, `polyline`, `rect`, `circle`,
    /// `ellipse`, `line`), curves flattened, in root user units under `transform`.
    pub(crate) fn lines(
        &self,
        node: Node,
        transform: &Affine,
    ) -> Result<Vec<Vec<Point>>, SpecimenError> {
        self.0.shape(node, transform)
    }

    /// A plain-number attribute (0 when absent).
    pub(crate) fn number(&self, node: Node, name: &str) -> Result<f64, SpecimenError> {
        self.0.number(node, name)
    }
}

struct SvgReader<'a, 'input> {
    document: &'a Document<'input>,
    /// Flattening tolerance in root user units.
    tolerance: f64,
    trace: Trace,
    points: usize,
    /// The text, and the last byte offset whose line is known with that line (elements come
    /// in document order, so lines are counted once, not from the start for each element).
    text: &'a str,
    line_cursor: (usize, u32),
}

impl SvgReader<'_, '_> {
    /// The line (from 1) of a byte offset, counting on from the last one asked.
    fn line_of(&mut self, offset: usize) -> u32 {
        let (known, line) = self.line_cursor;
        let (from, base) = if offset >= known {
            (known, line)
        } else {
            (0, 1)
        };
        let end = offset.min(self.text.len());
        let newlines = self.text.as_bytes()[from.min(end)..end]
            .iter()
            .filter(|&&byte| byte == b'\n')
            .count() as u32;
        self.line_cursor = (end, base + newlines);
        base + newlines
    }

    fn error(&self, node: Node, problem: String) -> SpecimenError {
        SpecimenError::Svg {
            element: describe(self.document, node),
            problem,
        }
    }

    fn walk(&mut self, node: Node, transform: Affine, role: Role) -> Result<(), SpecimenError> {
        for child in node.children().filter(|child| child.is_element()) {
            let name = child.tag_name().name();
            if SKIPPED.contains(&name) {
                self.trace.notes.push(format!(
                    "{} skipped: {}",
                    describe(self.document, child),
                    if name == "script" {
                        "scripts are never run"
                    } else if name == "image" || name == "use" {
                        "references are never followed"
                    } else {
                        "not part of a trace"
                    }
                ));
                continue;
            }
            if child.attribute("display") == Some("none") {
                self.trace.notes.push(format!(
                    "{} skipped: display=\"none\"",
                    describe(self.document, child)
                ));
                continue;
            }
            let local = self.transform_of(child)?;
            let transform = transform.then_inner(&local);
            let role = role_of(child).unwrap_or(role);
            if role == Role::Skipped {
                self.trace.notes.push(format!(
                    "{} skipped: labelled as annotation, legend, background or ignore",
                    describe(self.document, child)
                ));
                continue;
            }
            match name {
                "g" | "svg" | "a" => self.walk(child, transform, role)?,
                "path" | "polyline" | "polygon" | "line" | "rect" | "circle" | "ellipse" => {
                    let lines = self.shape(child, &transform)?;
                    self.keep(child, lines, role)?;
                }
                _ => {}
            }
        }
        Ok(())
    }

    /// The product of the transforms of an element and its ancestors.
    fn transform_to_root(&self, node: Node) -> Result<Affine, SpecimenError> {
        let mut result = Affine::IDENTITY;
        for ancestor in node.ancestors().filter(|ancestor| ancestor.is_element()) {
            result = self.transform_of(ancestor)?.then_inner(&result);
        }
        Ok(result)
    }

    fn transform_of(&self, node: Node) -> Result<Affine, SpecimenError> {
        let Some(text) = node.attribute("transform") else {
            return Ok(Affine::IDENTITY);
        };
        let mut result = Affine::IDENTITY;
        for token in TransformListParser::from(text) {
            let token = token.map_err(|error| {
                self.error(
                    node,
                    format!("attribute `transform` = {text:?} is not readable: {error}"),
                )
            })?;
            let degrees = |angle: f64| angle * core::f64::consts::PI / 180.0;
            let step = match token {
                TransformListToken::Matrix { a, b, c, d, e, f } => Affine { a, b, c, d, e, f },
                TransformListToken::Translate { tx, ty } => Affine {
                    e: tx,
                    f: ty,
                    ..Affine::IDENTITY
                },
                TransformListToken::Scale { sx, sy } => Affine {
                    a: sx,
                    d: sy,
                    ..Affine::IDENTITY
                },
                TransformListToken::Rotate { angle } => {
                    let (sin, cos) = (libm::sin(degrees(angle)), libm::cos(degrees(angle)));
                    Affine {
                        a: cos,
                        b: sin,
                        c: -sin,
                        d: cos,
                        e: 0.0,
                        f: 0.0,
                    }
                }
                TransformListToken::SkewX { angle } => Affine {
                    c: libm::tan(degrees(angle)),
                    ..Affine::IDENTITY
                },
                TransformListToken::SkewY { angle } => Affine {
                    b: libm::tan(degrees(angle)),
                    ..Affine::IDENTITY
                },
            };
            result = result.then_inner(&step);
        }
        if !result.is_finite() {
            return Err(self.error(
                node,
                format!("attribute `transform` = {text:?} gives a number that is not finite"),
            ));
        }
        Ok(result)
    }

    fn number(&self, node: Node, name: &str) -> Result<f64, SpecimenError> {
        let Some(text) = node.attribute(name) else {
            return Ok(0.0);
        };
        let length: svgtypes::Length = text.parse().map_err(|error| {
            self.error(
                node,
                format!("attribute `{name}` = {text:?} is not a number: {error}"),
            )
        })?;
        if !matches!(length.unit, LengthUnit::None | LengthUnit::Px) || !length.number.is_finite() {
            return Err(self.error(
                node,
                format!(
                    "attribute `{name}` = {text:?}: only plain numbers (user units) are read \
                     in shapes"
                ),
            ));
        }
        Ok(length.number)
    }

    /// The polylines an element draws, in root user units.
    fn shape(&self, node: Node, transform: &Affine) -> Result<Vec<Vec<Point>>, SpecimenError> {
        let map = |point: Point| transform.apply(point);
        let name = node.tag_name().name();
        let stretch = transform.max_stretch();
        let tolerance = self.tolerance;
        let ellipse = |cx: f64, cy: f64, rx: f64, ry: f64| -> Vec<Point> {
            let mut points = vec![map((cx + rx, cy))];
            for (from, to) in [
                ((cx + rx, cy), (cx - rx, cy)),
                ((cx - rx, cy), (cx + rx, cy)),
            ] {
                let arc = EndpointArc {
                    from,
                    radii: (rx, ry),
                    x_axis_rotation: 0.0,
                    large_arc: false,
                    sweep: true,
                    to,
                };
                flatten_arc(&arc, &map, stretch, tolerance, &mut points);
            }
            points
        };
        let lines = match name {
            "path" => {
                let data = node.attribute("d").unwrap_or("");
                self.path(node, data, transform)?
            }
            "polyline" | "polygon" => {
                let text = node.attribute("points").unwrap_or("");
                let mut points: Vec<Point> = svgtypes::PointsParser::from(text).map(map).collect();
                if points.iter().any(|(x, y)| !x.is_finite() || !y.is_finite()) {
                    return Err(self.error(node, "a point is not a finite number".to_string()));
                }
                if name == "polygon" && points.len() > 2 {
                    points.push(points[0]);
                }
                vec![points]
            }
            "line" => {
                let from = (self.number(node, "x1")?, self.number(node, "y1")?);
                let to = (self.number(node, "x2")?, self.number(node, "y2")?);
                vec![vec![map(from), map(to)]]
            }
            "rect" => {
                let (x, y) = (self.number(node, "x")?, self.number(node, "y")?);
                let (w, h) = (self.number(node, "width")?, self.number(node, "height")?);
                if !(w > 0.0 && h > 0.0) {
                    return Ok(Vec::new());
                }
                let corners = [(x, y), (x + w, y), (x + w, y + h), (x, y + h), (x, y)];
                vec![corners.iter().map(|&point| map(point)).collect()]
            }
            "circle" => {
                let (cx, cy, r) = (
                    self.number(node, "cx")?,
                    self.number(node, "cy")?,
                    self.number(node, "r")?,
                );
                if r <= 0.0 {
                    return Ok(Vec::new());
                }
                vec![ellipse(cx, cy, r, r)]
            }
            "ellipse" => {
                let (cx, cy) = (self.number(node, "cx")?, self.number(node, "cy")?);
                let (rx, ry) = (self.number(node, "rx")?, self.number(node, "ry")?);
                if rx <= 0.0 || ry <= 0.0 {
                    return Ok(Vec::new());
                }
                vec![ellipse(cx, cy, rx, ry)]
            }
            _ => Vec::new(),
        };
        Ok(lines)
    }

    /// Every command of SVG path data (SVG 1.1, section 8.3), absolute and relative: each
    /// subpath becomes one polyline.
    fn path(
        &self,
        node: Node,
        data: &str,
        transform: &Affine,
    ) -> Result<Vec<Vec<Point>>, SpecimenError> {
        let map = |point: Point| transform.apply(point);
        let stretch = transform.max_stretch();
        let tolerance = self.tolerance;
        let mut lines: Vec<Vec<Point>> = Vec::new();
        let mut current: Vec<Point> = Vec::new();
        // Current point, subpath start, and the last control point for S and T (local units).
        let (mut x, mut y) = (0.0f64, 0.0f64);
        let (mut start_x, mut start_y) = (0.0f64, 0.0f64);
        let mut last_cubic: Option<Point> = None;
        let mut last_quadratic: Option<Point> = None;
        for segment in PathParser::from(data) {
            let segment = segment.map_err(|error| {
                self.error(node, format!("path data `d` is not readable: {error}"))
            })?;
            let absolute = |abs: bool, px: f64, py: f64, x: f64, y: f64| {
                if abs {
                    (px, py)
                } else {
                    (x + px, y + py)
                }
            };
            let mut cubic_control = None;
            let mut quadratic_control = None;
            match segment {
                PathSegment::MoveTo { abs, x: px, y: py } => {
                    if current.len() > 1 {
                        lines.push(std::mem::take(&mut current));
                    }
                    current.clear();
                    (x, y) = absolute(abs, px, py, x, y);
                    (start_x, start_y) = (x, y);
                    current.push(map((x, y)));
                }
                PathSegment::LineTo { abs, x: px, y: py } => {
                    (x, y) = absolute(abs, px, py, x, y);
                    current.push(map((x, y)));
                }
                PathSegment::HorizontalLineTo { abs, x: px } => {
                    x = if abs { px } else { x + px };
                    current.push(map((x, y)));
                }
                PathSegment::VerticalLineTo { abs, y: py } => {
                    y = if abs { py } else { y + py };
                    current.push(map((x, y)));
                }
                PathSegment::CurveTo {
                    abs,
                    x1,
                    y1,
                    x2,
                    y2,
                    x: px,
                    y: py,
                } => {
                    let c1 = absolute(abs, x1, y1, x, y);
                    let c2 = absolute(abs, x2, y2, x, y);
                    let end = absolute(abs, px, py, x, y);
                    flatten_cubic(
                        map((x, y)),
                        map(c1),
                        map(c2),
                        map(end),
                        tolerance,
                        &mut current,
                    );
                    cubic_control = Some(c2);
                    (x, y) = end;
                }
                PathSegment::SmoothCurveTo {
                    abs,
                    x2,
                    y2,
                    x: px,
                    y: py,
                } => {
                    // The first control point reflects the previous cubic's second one, or is
                    // the current point (SVG 1.1, section 8.3.6).
                    let c1 = last_cubic.map_or((x, y), |(cx, cy)| (2.0 * x - cx, 2.0 * y - cy));
                    let c2 = absolute(abs, x2, y2, x, y);
                    let end = absolute(abs, px, py, x, y);
                    flatten_cubic(
                        map((x, y)),
                        map(c1),
                        map(c2),
                        map(end),
                        tolerance,
                        &mut current,
                    );
                    cubic_control = Some(c2);
                    (x, y) = end;
                }
                PathSegment::Quadratic {
                    abs,
                    x1,
                    y1,
                    x: px,
                    y: py,
                } => {
                    let c = absolute(abs, x1, y1, x, y);
                    let end = absolute(abs, px, py, x, y);
                    flatten_quadratic(map((x, y)), map(c), map(end), tolerance, &mut current);
                    quadratic_control = Some(c);
                    (x, y) = end;
                }
                PathSegment::SmoothQuadratic { abs, x: px, y: py } => {
                    // Section 8.3.7: the control point reflects the previous one, or is the
                    // current point.
                    let c = last_quadratic.map_or((x, y), |(cx, cy)| (2.0 * x - cx, 2.0 * y - cy));
                    let end = absolute(abs, px, py, x, y);
                    flatten_quadratic(map((x, y)), map(c), map(end), tolerance, &mut current);
                    quadratic_control = Some(c);
                    (x, y) = end;
                }
                PathSegment::EllipticalArc {
                    abs,
                    rx,
                    ry,
                    x_axis_rotation,
                    large_arc,
                    sweep,
                    x: px,
                    y: py,
                } => {
                    let end = absolute(abs, px, py, x, y);
                    let arc = EndpointArc {
                        from: (x, y),
                        radii: (rx, ry),
                        x_axis_rotation,
                        large_arc,
                        sweep,
                        to: end,
                    };
                    flatten_arc(&arc, &map, stretch, tolerance, &mut current);
                    (x, y) = end;
                }
                PathSegment::ClosePath { .. } => {
                    (x, y) = (start_x, start_y);
                    current.push(map((x, y)));
                    if current.len() > 1 {
                        lines.push(std::mem::take(&mut current));
                    }
                    // A command after Z starts at the subpath's start (section 8.3.3).
                    current.push(map((x, y)));
                }
            }
            last_cubic = cubic_control;
            last_quadratic = quadratic_control;
            if !x.is_finite() || !y.is_finite() {
                return Err(self.error(
                    node,
                    "path data `d` holds a number that is not finite".to_string(),
                ));
            }
            if self.points + current.len() > MAX_TRACE_POINTS {
                return Err(SpecimenError::TooManyPoints {
                    place: describe(self.document, node),
                });
            }
        }
        if current.len() > 1 {
            lines.push(current);
        }
        Ok(lines)
    }

    fn keep(
        &mut self,
        node: Node,
        lines: Vec<Vec<Point>>,
        role: Role,
    ) -> Result<(), SpecimenError> {
        let source = describe_at(node, self.line_of(node.range().start));
        for points in &lines {
            if points.iter().any(|(x, y)| !x.is_finite() || !y.is_finite()) {
                return Err(self.error(
                    node,
                    "a coordinate is not a finite number after its transforms".to_string(),
                ));
            }
            self.points += points.len();
        }
        if self.points > MAX_TRACE_POINTS {
            return Err(SpecimenError::TooManyPoints { place: source });
        }
        match role {
            Role::Vein => {
                for points in lines {
                    if points.len() >= 2 {
                        self.trace.lines.push(TracedLine {
                            points,
                            source: source.clone(),
                            width: None,
                        });
                    }
                }
            }
            Role::Outline => {
                let mut rings = lines.into_iter().filter(|points| points.len() >= 3);
                let Some(mut ring) = rings.next() else {
                    return Ok(());
                };
                if self.trace.outline.is_some() || rings.next().is_some() {
                    return Err(self.error(
                        node,
                        "a second leaf outline: label only one closed shape `outline`".to_string(),
                    ));
                }
                if ring.first() == ring.last() {
                    ring.pop();
                }
                self.trace.outline = Some(ring);
            }
            Role::Skipped => {}
            Role::RootMark => {
                // A circle's or ellipse's centre, else the first point.
                let centre = match node.tag_name().name() {
                    "circle" | "ellipse" => {
                        let transform = self.transform_to_root(node)?;
                        Some(transform.apply((self.number(node, "cx")?, self.number(node, "cy")?)))
                    }
                    _ => lines.first().and_then(|points| points.first().copied()),
                };
                if let Some(point) = centre {
                    self.trace.root_marks.push(point);
                }
            }
            Role::ScaleBar => {
                for points in lines {
                    if let (Some(&first), Some(&last)) = (points.first(), points.last()) {
                        self.trace.scale_bars.push((first, last, source.clone()));
                    }
                }
            }
        }
        Ok(())
    }
}
