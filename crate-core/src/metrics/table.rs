//! `metrics_table`: the values of a `Metrics` as (label, value, unit) rows of text, for the
//! command line and the browser to print.

use super::Metrics;

/// Text shown for a value the network leaves undefined.
const UNDEFINED_TEXT: &str = "n/a";

/// Unit text of dimensionless values and counts.
const NO_UNIT: &str = "-";

/// Rows of (label, value text, unit text) describing `metrics`, in a fixed order.
///
/// `units` is the network's length unit (`mm`, `m`, ...); an empty string is shown as `unit`.
/// Labels are plain English ("vein density"); values have four significant digits (scientific
/// notation outside 0.001 to 1,000,000), counts are whole numbers, and undefined values read
/// `n/a`. Per-order rows follow the maximum Strahler order, lowest order first.
pub fn metrics_table(metrics: &Metrics, units: &str) -> Vec<(String, String, String)> {
    rows(metrics, units, format_number)
}

/// The rows of `metrics_table` as CSV (RFC 4180: comma separated, CRLF line ends, fields with
/// a comma, quote or line break quoted), header `metric,value,unit`, with every value at full
/// precision (shortest text that reads back to the same `f64`) instead of four digits. A
/// `caution` (drainage sites) becomes a last row `caution,<text>,-`.
pub fn metrics_csv(metrics: &Metrics, units: &str, caution: Option<&str>) -> String {
    let mut csv = String::from("metric,value,unit\r\n");
    let mut all = rows(metrics, units, format_precise);
    if let Some(text) = caution {
        all.push(("caution".into(), text.into(), NO_UNIT.into()));
    }
    for (label, value, unit) in all {
        let line = [label, value, unit]
            .map(|field| csv_field(&field))
            .join(",");
        csv.push_str(&line);
        csv.push_str("\r\n");
    }
    csv
}

fn csv_field(text: &str) -> String {
    if text.contains([',', '"', '\r', '\n']) {
        format!("\"{}\"", text.replace('"', "\"\""))
    } else {
        text.to_string()
    }
}

/// Shortest round-trip text, or `n/a` when not finite.
fn format_precise(value: f64) -> String {
    if value.is_finite() {
        format!("{value}")
    } else {
        UNDEFINED_TEXT.to_string()
    }
}

fn rows(
    metrics: &Metrics,
    units: &str,
    format_number: fn(f64) -> String,
) -> Vec<(String, String, String)> {
    let format_optional =
        |value: Option<f64>| value.map_or_else(|| UNDEFINED_TEXT.to_string(), format_number);
    let unit = if units.is_empty() { "unit" } else { units };
    let area_unit = format!("{unit}^2");
    let per_area_unit = format!("1/{unit}^2");
    let mut rows: Vec<(String, String, String)> = Vec::new();
    let mut push = |label: &str, value: String, unit: &str| {
        rows.push((label.to_string(), value, unit.to_string()));
    };

    push("area", format_number(metrics.area), &area_unit);
    push("nodes", metrics.node_count.to_string(), NO_UNIT);
    push("roots", metrics.root_count.to_string(), NO_UNIT);
    push("segments", metrics.segment_count.to_string(), NO_UNIT);
    push(
        "total vein length",
        format_number(metrics.total_length),
        unit,
    );
    push(
        "vein density",
        format_optional(metrics.vein_density),
        &format!("{unit}/{unit}^2"),
    );
    push("junctions", metrics.junction_count.to_string(), NO_UNIT);
    push(
        "junction density",
        format_optional(metrics.junction_density),
        &per_area_unit,
    );
    push(
        "free-ending veinlets",
        metrics.tip_count.to_string(),
        NO_UNIT,
    );
    push(
        "free-ending veinlet density",
        format_optional(metrics.tip_density),
        &per_area_unit,
    );
    push(
        "branching angles measured",
        metrics.branching_angle_count.to_string(),
        NO_UNIT,
    );
    push(
        "mean branching angle",
        format_optional(metrics.branching_angle_mean),
        "degrees",
    );
    push(
        "branching angle standard deviation",
        format_optional(metrics.branching_angle_sd),
        "degrees",
    );
    let histogram: Vec<String> = metrics
        .branching_angle_histogram
        .iter()
        .map(|count| count.to_string())
        .collect();
    push(
        "branching angles per 10-degree bin, 0 to 180",
        histogram.join(" "),
        NO_UNIT,
    );
    push(
        "highest Strahler order",
        metrics.max_strahler_order.to_string(),
        NO_UNIT,
    );
    for stream in &metrics.streams {
        push(
            &format!("streams of order {}", stream.order),
            stream.stream_count.to_string(),
            NO_UNIT,
        );
        push(
            &format!("mean stream length of order {}", stream.order),
            format_number(stream.mean_stream_length),
            unit,
        );
    }
    push(
        "bifurcation ratio",
        format_optional(metrics.bifurcation_ratio),
        NO_UNIT,
    );
    push(
        "length ratio",
        format_optional(metrics.length_ratio),
        NO_UNIT,
    );
    push(
        "Hack exponent",
        format_optional(metrics.hack_exponent),
        NO_UNIT,
    );
    push("tortuosity", format_optional(metrics.tortuosity), NO_UNIT);
    let cost_exponent = 2.0 * metrics.transport_alpha + 1.0;
    push(
        &format!("transport cost (alpha {})", metrics.transport_alpha),
        format_optional(metrics.transport_cost),
        &format!("{unit}^{cost_exponent}"),
    );
    push(
        "outline area",
        format_optional(metrics.outline_area),
        &area_unit,
    );
    push(
        "outline perimeter",
        format_optional(metrics.outline_perimeter),
        unit,
    );
    push("circularity", format_optional(metrics.circularity), NO_UNIT);
    push(
        "aspect ratio",
        format_optional(metrics.aspect_ratio),
        NO_UNIT,
    );
    rows
}

/// Four significant digits: fixed notation from 0.001 up to 1,000,000, scientific outside.
fn format_number(value: f64) -> String {
    if !value.is_finite() {
        return UNDEFINED_TEXT.to_string();
    }
    if value == 0.0 {
        return "0".to_string();
    }
    let magnitude = libm::fabs(value);
    if (1e-3..1e6).contains(&magnitude) {
        let digits_before_point = libm::floor(libm::log10(magnitude)) as i32 + 1;
        let decimals = (4 - digits_before_point).max(0) as usize;
        format!("{value:.decimals$}")
    } else {
        format!("{value:.3e}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Four significant digits in fixed or scientific notation (the rule in the doc comment).
    #[test]
    fn number_text() {
        assert_eq!(format_number(8.123456), "8.123");
        assert_eq!(format_number(123.456), "123.5");
        assert_eq!(format_number(0.0123456), "0.01235");
        assert_eq!(format_number(12345.6), "12346");
        assert_eq!(format_number(0.0), "0");
        assert_eq!(format_number(2.5e7), "2.500e7");
        assert_eq!(format_precise(f64::NAN), "n/a");
    }
}
