//! Specimens: traced networks brought in from outside (`Trace`), read from bytes by
//! `read_trace` (SVG, GeoJSON, CSV edge lists, told apart by content), calibrated and repaired
//! into a `Network` by `build_specimen`, with a `RepairReport` listing every change; their error
//! type is `SpecimenError`.
//!
//! Parsing is left to well-kept parsers: `roxmltree` for XML (it refuses a document type
//! declaration, so no entity is ever expanded, and it fetches nothing), `svgtypes` for path data,
//! point lists, lengths, view boxes and transform lists, the `geojson` crate (RFC 7946) and the
//! `csv` crate. What is ours: which elements and geometries are veins, the transforms, curve
//! flattening (`flatten`), calibration (`calibrate`) and repair (`repair`).
//!
//! Coordinates. A trace holds *file coordinates*: SVG user units of the outermost `svg` element
//! (after every nested transform), GeoJSON positions, CSV numbers. Calibration multiplies them by
//! one factor (output units per file unit); GeoJSON's y grows north, so it is negated, making y
//! grow down the page in every `Network`, as for grown networks.

mod calibrate;
mod csv_trace;
pub(crate) mod flatten;
mod geojson_trace;
mod repair;
pub(crate) mod svg_trace;
mod table;

pub use calibrate::{
    build_specimen, build_specimen_from_trace, Calibration, ScaleRule, Specimen, SpecimenOptions,
};
pub use calibrate::{ring_area, DEFAULT_FLATTEN_TOLERANCE, DEFAULT_SNAP_FRACTION};
pub use flatten::{flatten_arc, flatten_cubic, flatten_quadratic, EndpointArc};
pub use repair::{Repair, RepairReport};
pub use table::{repair_kind, specimen_table_csv, SpecimenRow};

/// Largest specimen file read, in bytes (64 MiB): a traced leaf is a few megabytes at most.
pub const MAX_SPECIMEN_BYTES: usize = 64 * 1024 * 1024;

/// Most points a trace may hold after curves are flattened (4 million, about 100 MB of
/// working memory in the repair).
pub const MAX_TRACE_POINTS: usize = 4_000_000;

/// Largest calibrated coordinate, in output units (a billion: a kilometre-wide site in mm),
/// so that lengths, means and areas stay finite.
pub const MAX_COORDINATE: f64 = 1e9;

/// Most XML nodes an SVG may hold (elements, attributes' text nodes, comments).
pub const MAX_SVG_NODES: u32 = 2_000_000;

/// A point in file or output coordinates.
pub type Point = (f64, f64);

/// Which reader a specimen's bytes go to.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SpecimenFormat {
    /// An SVG drawing (XML whose root element is `svg`).
    Svg,
    /// A GeoJSON object (RFC 7946).
    GeoJson,
    /// A CSV edge list `x1,y1,x2,y2[,width]` with a header line.
    Csv,
    /// A cleared-leaf image (PNG or JPEG), its veins found by `cleared`; never told by
    /// `sniff_format`, which reads text formats only.
    Image,
}

impl SpecimenFormat {
    /// The format's name as people write it.
    pub fn name(self) -> &'static str {
        match self {
            SpecimenFormat::Svg => "SVG",
            SpecimenFormat::GeoJson => "GeoJSON",
            SpecimenFormat::Csv => "CSV",
            SpecimenFormat::Image => "image",
        }
    }
}

/// One traced vein: a polyline in file coordinates and where it came from.
#[derive(Clone, Debug, PartialEq)]
pub struct TracedLine {
    /// The points, in order (curves already flattened).
    pub points: Vec<Point>,
    /// Where in the file it was drawn: `<path id="midrib"> (line 12)`, `feature 3`, `line 7`.
    pub source: String,
    /// Drawn width in file units, when the file states one (a CSV `width` column).
    pub width: Option<f64>,
}

/// A traced network as read from a file, before calibration and repair.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Trace {
    /// The veins.
    pub lines: Vec<TracedLine>,
    /// The leaf outline (a closed ring, first point not repeated), when the file has one.
    pub outline: Option<Vec<Point>>,
    /// Scale bars found in the file (SVG elements labelled `scale-bar`): their two end points,
    /// so that `--scale-bar` can be given from them; they are not veins.
    pub scale_bars: Vec<(Point, Point, String)>,
    /// Roots marked in the file (SVG elements labelled `root`), in file coordinates.
    pub root_marks: Vec<Point>,
    /// Output length units per file unit stated by the file itself (an SVG's physical size),
    /// with the unit's name.
    pub physical_scale: Option<(f64, &'static str)>,
    /// Whether the file's y axis grows upward (GeoJSON), so y is negated on calibration.
    pub y_up: bool,
    /// Things read but not used, said so: ignored elements, holes, scripts.
    pub notes: Vec<String>,
    /// The format it was read from.
    pub format: Option<SpecimenFormat>,
}

/// Why a specimen could not be read or built.
#[derive(Clone, Debug, PartialEq)]
pub enum SpecimenError {
    /// The file is larger than `MAX_SPECIMEN_BYTES`.
    TooLarge {
        /// Its size in bytes.
        bytes: usize,
    },
    /// The content is none of SVG, GeoJSON or CSV.
    UnknownFormat {
        /// The first bytes, shown printable.
        start: String,
    },
    /// The bytes are not UTF-8 text.
    NotText {
        /// Byte offset of the first invalid byte.
        byte: usize,
    },
    /// The SVG is not well-formed XML, or holds a document type declaration.
    Xml {
        /// The XML parser's complaint, with line and column.
        message: String,
    },
    /// An SVG element could not be read.
    Svg {
        /// The element, e.g. `<path id="midrib">`, and its line.
        element: String,
        /// What is wrong.
        problem: String,
    },
    /// A GeoJSON object could not be read or has the wrong type.
    GeoJson {
        /// Where: `feature 3`, `feature 3, line 2 of the MultiLineString`, or the JSON position.
        place: String,
        /// What is wrong.
        problem: String,
    },
    /// A CSV line could not be read.
    Csv {
        /// Line number, counted from 1.
        line: u64,
        /// Byte offset of the line's start.
        byte: u64,
        /// What is wrong.
        problem: String,
    },
    /// The trace holds more than `MAX_TRACE_POINTS` points.
    TooManyPoints {
        /// Where the limit was passed.
        place: String,
    },
    /// The file holds no vein at all.
    NoVeins {
        /// The format read.
        format: &'static str,
        /// What was looked for.
        looked_for: &'static str,
    },
    /// A coordinate, once calibrated, lies farther from the origin than `MAX_COORDINATE`.
    OutOfRange {
        /// Where it was drawn.
        place: String,
        /// The calibrated coordinate.
        value: f64,
    },
    /// A calibration or repair option is not usable.
    Option {
        /// The option, e.g. `scale factor`.
        option: &'static str,
        /// What is wrong.
        problem: String,
    },
}

impl std::fmt::Display for SpecimenError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SpecimenError::TooLarge { bytes } => write!(
                f,
                "the file has {bytes} bytes, more than the {MAX_SPECIMEN_BYTES} bytes a specimen \
                 may have"
            ),
            SpecimenError::UnknownFormat { start } => write!(
                f,
                "not a specimen: expected SVG (starting with `<`), GeoJSON (starting with `{{`) \
                 or a CSV edge list with a header `x1,y1,x2,y2`; the file starts with {start:?}"
            ),
            SpecimenError::NotText { byte } => {
                write!(f, "not UTF-8 text: invalid byte at offset {byte}")
            }
            SpecimenError::Xml { message } => write!(f, "SVG is not readable XML: {message}"),
            SpecimenError::Svg { element, problem } => write!(f, "SVG {element}: {problem}"),
            SpecimenError::GeoJson { place, problem } => write!(f, "GeoJSON {place}: {problem}"),
            SpecimenError::Csv {
                line,
                byte,
                problem,
            } => write!(f, "CSV line {line} (byte {byte}): {problem}"),
            SpecimenError::TooManyPoints { place } => write!(
                f,
                "{place}: the trace holds more than {MAX_TRACE_POINTS} points (after flattening \
                 curves); raise the flattening tolerance or split the file"
            ),
            SpecimenError::NoVeins { format, looked_for } => {
                write!(
                    f,
                    "the {format} file holds no vein: looked for {looked_for}"
                )
            }
            SpecimenError::OutOfRange { place, value } => write!(
                f,
                "{place}: a coordinate is {value:e} once calibrated, beyond the {MAX_COORDINATE:e} \
                 output units a specimen may span"
            ),
            SpecimenError::Option { option, problem } => write!(f, "{option}: {problem}"),
        }
    }
}

impl std::error::Error for SpecimenError {}

/// The first 16 bytes of a file, printable (for messages).
pub fn printable_start(bytes: &[u8]) -> String {
    bytes
        .iter()
        .take(16)
        .map(|&byte| {
            if byte.is_ascii_graphic() || byte == b' ' {
                (byte as char).to_string()
            } else {
                format!("\\x{byte:02x}")
            }
        })
        .collect()
}

/// Tells the format from the content: after a byte-order mark and white space, `<` is SVG,
/// `{` is GeoJSON, and a first line (past `#` comments) naming `x1` is a CSV edge list.
pub fn sniff_format(bytes: &[u8]) -> Result<SpecimenFormat, SpecimenError> {
    let body = bytes.strip_prefix(b"\xef\xbb\xbf").unwrap_or(bytes);
    let start = body
        .iter()
        .position(|byte| !byte.is_ascii_whitespace())
        .unwrap_or(body.len());
    let body = &body[start..];
    match body.first() {
        Some(b'<') => Ok(SpecimenFormat::Svg),
        Some(b'{') => Ok(SpecimenFormat::GeoJson),
        _ => {
            // The first line that is not a `#` comment must name the columns.
            let header = body
                .split(|&byte| byte == b'\n')
                .take(1000)
                .find(|line| !line.starts_with(b"#") && !line.trim_ascii().is_empty())
                .unwrap_or(b"");
            let header = String::from_utf8_lossy(&header[..header.len().min(4096)]).to_lowercase();
            if header.contains("x1") && header.contains(',') {
                Ok(SpecimenFormat::Csv)
            } else {
                Err(SpecimenError::UnknownFormat {
                    start: printable_start(bytes),
                })
            }
        }
    }
}

/// Reads a trace from bytes, telling the format from the content (`sniff_format`).
///
/// `flatten_tolerance` is the largest distance allowed between a curve and the straight pieces
/// that replace it, in output units; `stated_factor` is the output units per file unit when the
/// caller already knows it (a stated scale), so the tolerance can be turned into file units
/// (otherwise the file's physical size, or 1).
pub fn read_trace(
    bytes: &[u8],
    flatten_tolerance: f64,
    stated_factor: Option<f64>,
) -> Result<Trace, SpecimenError> {
    if bytes.len() > MAX_SPECIMEN_BYTES {
        return Err(SpecimenError::TooLarge { bytes: bytes.len() });
    }
    let format = sniff_format(bytes)?;
    let text = std::str::from_utf8(bytes).map_err(|error| SpecimenError::NotText {
        byte: error.valid_up_to(),
    })?;
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut trace = match format {
        SpecimenFormat::Svg => svg_trace::read_svg(text, flatten_tolerance, stated_factor)?,
        SpecimenFormat::GeoJson => geojson_trace::read_geojson(text)?,
        SpecimenFormat::Csv => csv_trace::read_csv(text)?,
        SpecimenFormat::Image => Trace::default(),
    };
    trace.format = Some(format);
    if trace.lines.is_empty() {
        return Err(SpecimenError::NoVeins {
            format: format.name(),
            looked_for: match format {
                SpecimenFormat::Svg => {
                    "path, polyline, polygon, line, rect, circle or ellipse elements outside \
                     groups labelled outline or scale-bar"
                }
                SpecimenFormat::GeoJson => "LineString or MultiLineString geometries",
                SpecimenFormat::Csv => "data lines after the header",
                SpecimenFormat::Image => "PNG or JPEG bytes (read them with `cleared`)",
            },
        });
    }
    Ok(trace)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formats_are_told_by_content() {
        assert_eq!(sniff_format(b"  <svg/>"), Ok(SpecimenFormat::Svg));
        assert_eq!(
            sniff_format(b"\xef\xbb\xbf{\"type\":1}"),
            Ok(SpecimenFormat::GeoJson)
        );
        assert_eq!(sniff_format(b"x1,y1,x2,y2\n"), Ok(SpecimenFormat::Csv));
        assert_eq!(
            sniff_format(b"# demo\n\nx1,y1,x2,y2\n"),
            Ok(SpecimenFormat::Csv)
        );
        assert!(matches!(
            sniff_format(b"P1 2 2"),
            Err(SpecimenError::UnknownFormat { .. })
        ));
    }
}
