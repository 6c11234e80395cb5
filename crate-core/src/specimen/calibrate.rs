//! Calibration of a trace (`ScaleRule`, `Calibration`) and `build_specimen`, the whole way from
//! bytes to a measured-ready `Specimen`: read, scale, repair, orient, weigh.

use super::repair::{orient, repair_lines, RepairReport};
use super::{read_trace, Point, SpecimenError, SpecimenFormat, Trace, MAX_COORDINATE};
use crate::network::{Network, Node, Segment};

/// How file coordinates become lengths.
#[derive(Clone, Debug, PartialEq)]
pub enum ScaleRule {
    /// From the file: an SVG's physical width and height (px at 96 per inch when absent);
    /// GeoJSON and CSV coordinates are taken to be in the stated `units` already.
    FromFile,
    /// A stated factor: output units per file unit.
    Factor(f64),
    /// Two points of the file (a scale bar's ends, in file coordinates) a known distance
    /// apart, in output units.
    TwoPoints {
        /// One point.
        from: Point,
        /// The other.
        to: Point,
        /// Their distance, in output units.
        distance: f64,
    },
}

/// Everything a caller states about a specimen.
#[derive(Clone, Debug, PartialEq)]
pub struct SpecimenOptions {
    /// The output length unit (`mm`, `cm`, `m`, `in`, ...). For SVG read `FromFile` it must be
    /// one of mm, cm, m, in, um (default mm); GeoJSON and CSV need it always.
    pub units: Option<String>,
    /// How file coordinates become lengths.
    pub scale: ScaleRule,
    /// The root (petiole base) in file coordinates; without one, the roots marked in the file
    /// (SVG elements labelled `root`), else each part's line end nearest the drawing's bottom
    /// edge.
    pub root: Option<Point>,
    /// Snap tolerance in output units; `None`: 0.2 % of the drawing's larger extent.
    pub snap_tolerance: Option<f64>,
    /// Flattening tolerance for curves, in output units.
    pub flatten_tolerance: f64,
}

/// Default flattening tolerance, in output units (10 micrometres for a leaf in mm).
pub const DEFAULT_FLATTEN_TOLERANCE: f64 = 0.01;

/// Default snap tolerance as a fraction of the drawing's larger extent (common practice, no
/// source: a gap of 0.2 % of a leaf's length is below what a tracing hand controls).
pub const DEFAULT_SNAP_FRACTION: f64 = 0.002;

impl Default for SpecimenOptions {
    fn default() -> Self {
        SpecimenOptions {
            units: None,
            scale: ScaleRule::FromFile,
            root: None,
            snap_tolerance: None,
            flatten_tolerance: DEFAULT_FLATTEN_TOLERANCE,
        }
    }
}

/// The scale a specimen was measured at.
#[derive(Clone, Debug, PartialEq)]
pub struct Calibration {
    /// Output units per file unit.
    pub factor: f64,
    /// The output unit.
    pub units: String,
    /// How the factor was found, in words.
    pub rule: String,
}

/// A specimen ready to measure: its network (in output units, y down), the repairs made, the
/// calibration and the notes of the reader.
#[derive(Clone, Debug, PartialEq)]
pub struct Specimen {
    /// The network. Node weights share the leaf's area among the veins by length (see
    /// `build_specimen`).
    pub network: Network,
    /// Every repair, and the roots.
    pub report: RepairReport,
    /// The scale.
    pub calibration: Calibration,
    /// The format read.
    pub format: SpecimenFormat,
    /// Things read but not used, and how missing information was filled in.
    pub notes: Vec<String>,
    /// Scale bars found in the file, in file coordinates, with their element.
    pub scale_bars: Vec<(Point, Point, String)>,
    /// The leaf outline in output units, when the file has one.
    pub outline: Option<Vec<Point>>,
}

/// Millimetres in one of the physical units an SVG size converts to.
fn millimetres_per(unit: &str) -> Option<f64> {
    match unit {
        "mm" => Some(1.0),
        "cm" => Some(10.0),
        "m" => Some(1000.0),
        "in" => Some(25.4),
        "um" | "µm" => Some(0.001),
        _ => None,
    }
}

fn positive(option: &'static str, value: f64) -> Result<f64, SpecimenError> {
    if value > 0.0 && value.is_finite() {
        Ok(value)
    } else {
        Err(SpecimenError::Option {
            option,
            problem: format!("must be a positive finite number, is {value}"),
        })
    }
}

/// Area enclosed by a ring, by the shoelace formula (Gauss's area formula; any surveying
/// text, e.g. Braden 1986, "The Surveyor's Area Formula", College Math. J. 17(4)).
pub fn ring_area(ring: &[Point]) -> f64 {
    let mut twice = 0.0;
    for (index, &(x1, y1)) in ring.iter().enumerate() {
        let (x2, y2) = ring[(index + 1) % ring.len()];
        twice += x1 * y2 - x2 * y1;
    }
    (twice / 2.0).abs()
}

/// Reads, calibrates and repairs a specimen.
///
/// Node weights: the leaf's area (the outline's, or 1 per unit of vein length without one) is
/// shared among the nodes in proportion to half the length of their segments, so a forest's
/// flows are the area drained along the veins upstream and its root carries the whole leaf,
/// as in a grown network.
pub fn build_specimen(bytes: &[u8], options: &SpecimenOptions) -> Result<Specimen, SpecimenError> {
    let flatten = positive("flattening tolerance", options.flatten_tolerance)?;
    let stated = stated_factor(options)?;
    let non_svg_factor = stated.or(Some(1.0));
    let peek = super::sniff_format(bytes)?;
    let mut trace = read_trace(
        bytes,
        flatten,
        if peek == SpecimenFormat::Svg {
            stated
        } else {
            non_svg_factor
        },
    )?;
    trace.format = trace.format.or(Some(peek));
    build_specimen_from_trace(trace, options)
}

/// The output units per file unit that `options` state (a factor, or two points a known
/// distance apart), `None` when the scale is to come from the file.
fn stated_factor(options: &SpecimenOptions) -> Result<Option<f64>, SpecimenError> {
    Ok(match &options.scale {
        ScaleRule::FromFile => None,
        ScaleRule::Factor(factor) => Some(positive("scale factor", *factor)?),
        ScaleRule::TwoPoints {
            from,
            to,
            distance: known,
        } => {
            let known = positive("scale bar length", *known)?;
            let apart = distance(*from, *to);
            if !(apart > 0.0 && apart.is_finite()) {
                return Err(SpecimenError::Option {
                    option: "scale bar",
                    problem: format!(
                        "its two points ({}, {}) and ({}, {}) must differ",
                        from.0, from.1, to.0, to.1
                    ),
                });
            }
            Some(known / apart)
        }
    })
}

/// Calibrates and repairs a trace already read (from a file by `read_trace`, or from an
/// image by `cleared::analyse_cleared_leaf`): the second half of `build_specimen`, with the
/// same rules. `trace.format` names the reader (SVG when unset).
pub fn build_specimen_from_trace(
    trace: Trace,
    options: &SpecimenOptions,
) -> Result<Specimen, SpecimenError> {
    positive("flattening tolerance", options.flatten_tolerance)?;
    let stated = stated_factor(options)?;
    let peek = SpecimenFormat::Svg;
    let format = trace.format.unwrap_or(peek);
    let calibration = calibrate(&trace, format, options, stated)?;
    let Trace {
        lines,
        outline,
        scale_bars,
        y_up,
        mut notes,
        root_marks,
        ..
    } = trace;
    let factor = calibration.factor;
    let y_sign = if y_up { -1.0 } else { 1.0 };
    let convert = |(x, y): Point| (x * factor, y * y_sign * factor);
    let lines: Vec<(Vec<Point>, String)> = lines
        .into_iter()
        .map(|line| (line.points.into_iter().map(convert).collect(), line.source))
        .collect();
    let outline: Option<Vec<Point>> = outline.map(|ring| ring.into_iter().map(convert).collect());
    let too_far = |points: &[Point]| {
        points
            .iter()
            .flat_map(|&(x, y)| [x, y])
            .find(|value| value.is_nan() || value.abs() > MAX_COORDINATE)
    };
    for (points, source) in &lines {
        if let Some(value) = too_far(points) {
            return Err(SpecimenError::OutOfRange {
                place: source.clone(),
                value,
            });
        }
    }
    if let Some(value) = outline.as_deref().and_then(too_far) {
        return Err(SpecimenError::OutOfRange {
            place: "the leaf outline".to_string(),
            value,
        });
    }
    let snap = match options.snap_tolerance {
        Some(value) if value >= 0.0 && value.is_finite() => value,
        Some(value) => {
            return Err(SpecimenError::Option {
                option: "snap tolerance",
                problem: format!("must be zero or a positive finite number, is {value}"),
            })
        }
        None => {
            let (mut low, mut high) = ((f64::MAX, f64::MAX), (f64::MIN, f64::MIN));
            for (points, _) in &lines {
                for &(x, y) in points {
                    low = (low.0.min(x), low.1.min(y));
                    high = (high.0.max(x), high.1.max(y));
                }
            }
            let extent = (high.0 - low.0).max(high.1 - low.1).max(0.0);
            let snap = extent * DEFAULT_SNAP_FRACTION;
            notes.push(format!(
                "snap tolerance {snap:.4} {} (0.2 % of the drawing's larger extent; state one \
                 with --snap)",
                calibration.units
            ));
            snap
        }
    };
    let mut report = RepairReport {
        snap_tolerance: snap,
        repairs: Vec::new(),
    };
    let graph = repair_lines(&lines, snap, &mut report);
    if graph.edges.is_empty() {
        return Err(SpecimenError::NoVeins {
            format: format.name(),
            looked_for: "a piece of positive length (every piece had zero length after snapping)",
        });
    }
    let given_roots: Vec<Point> = match options.root {
        Some(point) => vec![convert(point)],
        None => {
            if !root_marks.is_empty() {
                notes.push(format!(
                    "{} root{} marked in the file (elements labelled root) used",
                    root_marks.len(),
                    if root_marks.len() == 1 { "" } else { "s" }
                ));
            }
            root_marks.into_iter().map(convert).collect()
        }
    };
    let oriented = orient(&graph, &given_roots, &mut report);
    let total_length: f64 = graph
        .edges
        .iter()
        .map(|&(u, v)| distance(graph.nodes[u as usize], graph.nodes[v as usize]))
        .sum();
    let area = match &outline {
        Some(ring) => ring_area(ring),
        None => {
            notes.push(
                "no leaf outline: densities are not given (label a closed shape `outline` in \
                 SVG, or add a GeoJSON Polygon)"
                    .to_string(),
            );
            0.0
        }
    };
    let area_per_length = if area > 0.0 && total_length > 0.0 {
        area / total_length
    } else {
        1.0
    };
    let mut weights = vec![0.0; graph.nodes.len()];
    for segment in &oriented.segments {
        let length = distance(
            graph.nodes[segment.from as usize],
            graph.nodes[segment.to as usize],
        );
        weights[segment.from as usize] += length / 2.0 * area_per_length;
        weights[segment.to as usize] += length / 2.0 * area_per_length;
    }
    let network = Network {
        nodes: graph
            .nodes
            .iter()
            .zip(&weights)
            .map(|(&(x, y), &weight)| Node { x, y, weight })
            .collect(),
        segments: oriented
            .segments
            .iter()
            .map(|segment| Segment {
                from: segment.from,
                to: segment.to,
            })
            .collect(),
        area,
        units: calibration.units.clone(),
        cell_size: 0.0,
        cells: Default::default(),
    };
    Ok(Specimen {
        network,
        report,
        calibration,
        format,
        notes,
        scale_bars,
        outline,
    })
}

fn distance(a: Point, b: Point) -> f64 {
    ((a.0 - b.0) * (a.0 - b.0) + (a.1 - b.1) * (a.1 - b.1)).sqrt()
}

/// The factor and unit for a trace.
fn calibrate(
    trace: &Trace,
    format: SpecimenFormat,
    options: &SpecimenOptions,
    stated: Option<f64>,
) -> Result<Calibration, SpecimenError> {
    let units = options.units.clone();
    match (stated, format) {
        (Some(factor), _) => {
            let units = match units {
                Some(units) => units,
                None if matches!(format, SpecimenFormat::Svg | SpecimenFormat::Image) => {
                    "mm".to_string()
                }
                None => {
                    return Err(SpecimenError::Option {
                        option: "units",
                        problem: format!(
                            "a {} file's coordinates carry no unit: state the output unit \
                             with --units",
                            format.name()
                        ),
                    })
                }
            };
            let rule = match &options.scale {
                ScaleRule::TwoPoints { distance, .. } => format!(
                    "{factor} {units} per file unit, from two points {distance} {units} apart"
                ),
                _ => format!("{factor} {units} per file unit, as stated"),
            };
            Ok(Calibration {
                factor,
                units,
                rule,
            })
        }
        (None, SpecimenFormat::Image) if trace.physical_scale.is_none() => {
            Err(SpecimenError::Option {
                option: "scale",
                problem: "the image states no resolution: give --scale (output units per \
                          pixel) or --scale-bar X1,Y1,X2,Y2,LENGTH in pixels"
                    .to_string(),
            })
        }
        (None, SpecimenFormat::Svg | SpecimenFormat::Image) => {
            let units = units.unwrap_or_else(|| "mm".to_string());
            let per = millimetres_per(&units).ok_or_else(|| SpecimenError::Option {
                option: "units",
                problem: format!(
                    "{units:?} is not a physical unit an SVG size converts to (mm, cm, m, in, \
                     um); give --scale with it"
                ),
            })?;
            let physical = trace.physical_scale.map_or(25.4 / 96.0, |(mm, _)| mm);
            let factor = physical / per;
            Ok(Calibration {
                factor,
                units: units.clone(),
                rule: if format == SpecimenFormat::Image {
                    format!("{factor} {units} per pixel, from the image's stated resolution")
                } else {
                    format!(
                        "{factor} {units} per user unit, from the SVG's width, height and viewBox"
                    )
                },
            })
        }
        (None, _) => match units {
            Some(units) => Ok(Calibration {
                factor: 1.0,
                units: units.clone(),
                rule: format!("coordinates taken as {units}, as stated"),
            }),
            None => Err(SpecimenError::Option {
                option: "units",
                problem: format!(
                    "a {} file's coordinates carry no unit: state it with --units",
                    format.name()
                ),
            }),
        },
    }
}
