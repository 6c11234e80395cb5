//! `specimen_table_csv`: several measured specimens as one CSV table, one row per specimen
//! (a table a biologist opens in a spreadsheet or R), its columns read from the metric table.

use super::{Repair, Specimen};
use crate::metrics::{Metrics, Reading, METRIC_TABLE};

/// One measured specimen or record: its file name, format, units, scale, repairs and metrics.
pub struct SpecimenRow<'a> {
    /// The file as named by the caller.
    pub file: &'a str,
    /// The format read (`SVG`, `GeoJSON`, `CSV`, `record`).
    pub format: &'a str,
    /// The specimen, `None` for a run record.
    pub specimen: Option<&'a Specimen>,
    /// The length unit.
    pub units: &'a str,
    /// Its metrics.
    pub metrics: &'a Metrics,
}

/// The repair columns, after `file,format,units,scale_factor,snap_tolerance`.
const REPAIR_COLUMNS: [&str; 6] = [
    "merged_ends",
    "joined_to_line",
    "crossings_split",
    "zero_length_dropped",
    "duplicates_dropped",
    "disconnected_parts",
];

/// RFC 4180 CSV (comma separated, CRLF line ends, fields with a comma, quote or line break
/// quoted): a header, then one row per entry. Metric columns are the scalar entries of
/// `METRIC_TABLE` by key (the histogram and per-order streams are left out: one value per
/// cell); an undefined value is an empty cell; numbers are at full precision (shortest text
/// that reads back to the same `f64`). A run record has empty repair and scale cells.
pub fn specimen_table_csv(rows: &[SpecimenRow]) -> String {
    let scalar = |entry: &&crate::metrics::MetricEntry| {
        !matches!(
            (entry.read)(&Metrics::default()),
            Reading::Histogram(_) | Reading::Streams(_)
        )
    };
    let mut header: Vec<String> = ["file", "format", "units", "scale_factor", "snap_tolerance"]
        .iter()
        .chain(REPAIR_COLUMNS.iter())
        .map(|name| name.to_string())
        .collect();
    header.extend(
        METRIC_TABLE
            .iter()
            .filter(scalar)
            .map(|entry| entry.key.to_string()),
    );
    let mut csv = header.join(",");
    csv.push_str("\r\n");
    for row in rows {
        let mut fields: Vec<String> = vec![
            row.file.to_string(),
            row.format.to_string(),
            row.units.to_string(),
        ];
        match row.specimen {
            Some(specimen) => {
                let counts = specimen.report.counts();
                fields.push(precise(Some(specimen.calibration.factor)));
                fields.push(precise(Some(specimen.report.snap_tolerance)));
                fields.extend(counts.iter().map(|count| count.to_string()));
            }
            None => fields.extend(std::iter::repeat_n(String::new(), 2 + REPAIR_COLUMNS.len())),
        }
        for entry in METRIC_TABLE.iter().filter(scalar) {
            fields.push(match (entry.read)(row.metrics) {
                Reading::Number(value) => precise(value),
                Reading::Count(count) => count.to_string(),
                Reading::OptionalCount(count) => count.map_or(String::new(), |c| c.to_string()),
                Reading::Histogram(_) | Reading::Streams(_) => String::new(),
            });
        }
        let line: Vec<String> = fields.iter().map(|field| csv_field(field)).collect();
        csv.push_str(&line.join(","));
        csv.push_str("\r\n");
    }
    csv
}

fn precise(value: Option<f64>) -> String {
    match value {
        Some(value) if value.is_finite() => format!("{value}"),
        _ => String::new(),
    }
}

fn csv_field(text: &str) -> String {
    if text.contains([',', '"', '\r', '\n']) {
        format!("\"{}\"", text.replace('"', "\"\""))
    } else {
        text.to_string()
    }
}

/// The kind of a repair as a short key (`merged_ends`, `joined_to_line`, ...), as in JSON.
pub fn repair_kind(repair: &Repair) -> &'static str {
    match repair {
        Repair::MergedEnds { .. } => "merged_ends",
        Repair::JoinedToLine { .. } => "joined_to_line",
        Repair::SplitCrossing { .. } => "split_crossing",
        Repair::DroppedZeroLength { .. } => "dropped_zero_length",
        Repair::DroppedDuplicate { .. } => "dropped_duplicate",
        Repair::DisconnectedPart { .. } => "disconnected_part",
        Repair::Root { .. } => "root",
    }
}
