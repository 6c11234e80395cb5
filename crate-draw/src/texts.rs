//! The sentences people read about a run, shared by the page and the command line: why growth
//! stopped (`stop_text`), the progress line (`progress_text`) and a segment's readings
//! (`segment_reading`). Numbers go through `crate::format`.

use ramulus_core::growth::StopReason;

use crate::format::{four_digits, grouped, significant_digits};

/// Why growth stopped, in words.
pub fn stop_text(reason: StopReason) -> &'static str {
    match reason {
        StopReason::Budget => "cell budget reached",
        StopReason::Full => "no allowed cell left within reach",
        StopReason::Threshold => "no frontier cell costs less than the stop threshold",
    }
}

/// The stop text of a network read from a run record without parameters: it does not grow.
pub const SAVED_NETWORK_TEXT: &str = "network as saved in the record";

/// `1,234 of 5,000 cells` while growing; once growth has stopped, `complete` and why (a run
/// that stops before its budget is finished too, which a bar short of its end would hide).
pub fn progress_text(cells: u64, budget: u64, stopped: Option<&str>) -> String {
    let mut text = format!("{} of {} cells", grouped(cells), grouped(budget));
    if let Some(why) = stopped {
        text.push_str(if cells < budget {
            ", complete before the budget: "
        } else {
            ", complete: "
        });
        text.push_str(why);
    }
    text
}

/// What an export saved, for the page to confirm it: `Saved ramulus-1f2e.svg (drawing at true
/// size, 48.2 kB).` Sizes in kB and MB are decimal (1 kB = 1000 bytes, SI prefixes as the
/// SI Brochure, 9th edition, 2019, table 7, defines them).
pub fn saved_text(file_name: &str, what: &str, bytes: u64) -> String {
    let size = if bytes < 1000 {
        format!("{bytes} bytes")
    } else if bytes < 1_000_000 {
        format!("{} kB", significant_digits(bytes as f64 / 1e3, 3))
    } else {
        format!("{} MB", significant_digits(bytes as f64 / 1e6, 3))
    };
    format!("Saved {file_name} ({what}, {size}).")
}

/// The readings of one segment, one per line: Strahler order, flow, width and length with
/// their units (four significant digits).
pub fn segment_reading(order: u32, flow: f64, width: f64, length: f64, units: &str) -> String {
    format!(
        "Strahler order {order}\nflow {} {units}\u{b2}\nwidth {} {units}\nlength {} {units}",
        four_digits(flow),
        four_digits(width),
        four_digits(length),
    )
}

/// The readings of one segment below the conducting threshold (tissue in a leaf, hillslope
/// on a site, told by `units`): what it is, its flow and length, one per line.
pub fn tissue_reading(flow: f64, length: f64, units: &str) -> String {
    let site = ramulus_core::params::is_site_unit(units);
    format!(
        "{}\nflow {} {units}\u{b2}\nlength {} {units}",
        crate::tissue::tissue_key_text(site),
        four_digits(flow),
        four_digits(length),
    )
}

/// The readings of a run as (label, value, unit) rows, in the metric table's order, numbers with
/// up to four significant digits (`format::four_digits`): the page's readings table and the
/// command line's table.
pub fn readings_rows(
    metrics: &ramulus_core::metrics::Metrics,
    units: &str,
) -> Vec<(String, String, String)> {
    ramulus_core::metrics::metric_rows(metrics, units, crate::format::four_digits)
}

/// The rows of `readings_rows` with a short explanation as a fourth field (the page shows it
/// beside each reading).
pub fn readings_rows_explained(
    metrics: &ramulus_core::metrics::Metrics,
    units: &str,
) -> Vec<(String, String, String, String)> {
    ramulus_core::metrics::metric_rows_explained(metrics, units, crate::format::four_digits)
}

/// The rows of `readings_rows_explained` with a fifth field: whether the reading says little
/// about the model for a network measured as `measured` says (its explanation then says why).
pub fn readings_rows_noted(
    metrics: &ramulus_core::metrics::Metrics,
    units: &str,
    measured: ramulus_core::metrics::Measured,
) -> Vec<(String, String, String, String, bool)> {
    ramulus_core::metrics::metric_rows_noted(metrics, units, crate::format::four_digits, measured)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn progress_names_the_stop() {
        assert_eq!(progress_text(1234, 5000, None), "1,234 of 5,000 cells");
        assert_eq!(
            progress_text(5000, 5000, Some(stop_text(StopReason::Budget))),
            "5,000 of 5,000 cells, complete: cell budget reached"
        );
        assert_eq!(
            progress_text(1234, 5000, Some(stop_text(StopReason::Threshold))),
            "1,234 of 5,000 cells, complete before the budget: no frontier cell costs less than \
             the stop threshold"
        );
    }

    /// Decimal prefixes: 48,213 bytes are 48.2 kB, 2,500,000 bytes 2.5 MB.
    #[test]
    fn saved_files_are_named_with_their_size() {
        assert_eq!(
            saved_text("a.svg", "drawing", 48_213),
            "Saved a.svg (drawing, 48.2 kB)."
        );
        assert_eq!(
            saved_text("a.csv", "readings", 999),
            "Saved a.csv (readings, 999 bytes)."
        );
        assert_eq!(
            saved_text("a.json", "run record", 2_500_000),
            "Saved a.json (run record, 2.5 MB)."
        );
    }

    #[test]
    fn readings_carry_units() {
        let text = segment_reading(3, 0.5, 0.012_345, 1.5, "mm");
        assert_eq!(
            text,
            "Strahler order 3\nflow 0.5 mm\u{b2}\nwidth 0.01235 mm\nlength 1.5 mm"
        );
    }
}
