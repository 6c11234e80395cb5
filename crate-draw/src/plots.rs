//! The readings plots as data the page only has to draw: the order-ratio (Horton) plot
//! (`horton_plot`) and the branching-angle histogram (`angle_plot`), with every point, fitted
//! line, tick, label and caption worked out here.
//!
//! The Horton lines are the core's least-squares fits: their slope is `-log10 R_B` and
//! `log10 R_L` (the core's ratios), and an ordinary least-squares line passes through the mean
//! of its points (Draper & Smith 1998, "Applied Regression Analysis", section 1.2), so the
//! line is drawn through that mean, without fitting again.

use ramulus_core::metrics::{Metrics, ANGLE_BIN_WIDTH_DEGREES};
use serde::Serialize;

use crate::format::{decade_label, fixed, tick_step};

/// A point `[x, y]` in plot coordinates.
pub type PlotPoint = [f64; 2];

/// A labelled tick on an axis.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Tick {
    /// Position in plot coordinates.
    pub at: f64,
    /// Label; may be empty.
    pub label: String,
    /// Whether the tick has a grid line and a long mark (minor ticks have neither).
    pub major: bool,
}

/// One series of the Horton plot.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct HortonSeries {
    /// `[order, log10 value]` per order.
    pub points: Vec<PlotPoint>,
    /// Ends of the fitted line, `None` when the core reports no ratio.
    pub fit: Option<[PlotPoint; 2]>,
    /// Legend text, for example `count N_w, R_B = 4.12`.
    pub label: String,
}

/// The Horton plot: stream counts and mean stream lengths per Strahler order on one log axis.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct HortonPlot {
    /// Stream counts N_w.
    pub counts: HortonSeries,
    /// Mean stream lengths L_w.
    pub lengths: HortonSeries,
    /// Horizontal range `[low, high]` (orders, half an order beyond the outermost).
    pub x_range: [f64; 2],
    /// Vertical range `[low, high]` (log10).
    pub y_range: [f64; 2],
    /// Order ticks.
    pub x_ticks: Vec<Tick>,
    /// Decade ticks (labelled, with grid lines) and minor ticks at 2 .. 9 (unlabelled).
    pub y_ticks: Vec<Tick>,
    /// Title under the horizontal axis.
    pub x_title: String,
    /// Title beside the vertical axis.
    pub y_title: String,
    /// What to show instead when there is nothing to plot.
    pub empty: Option<String>,
}

/// The branching-angle histogram.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct AnglePlot {
    /// Counts per bin; bin `i` covers `[10 i, 10 (i + 1))` degrees.
    pub bins: Vec<u64>,
    /// Width of a bin, degrees.
    pub bin_width: f64,
    /// Top of the count axis.
    pub y_max: f64,
    /// Count ticks.
    pub y_ticks: Vec<Tick>,
    /// Angle ticks every 30 degrees.
    pub x_ticks: Vec<Tick>,
    /// Mean angle for the marker line, degrees, clamped to 0 .. 180.
    pub mean: Option<f64>,
    /// Caption, for example `mean 42.1°, sd 12.3°, n = 57`.
    pub caption: String,
    /// Title under the horizontal axis.
    pub x_title: String,
    /// Title beside the vertical axis.
    pub y_title: String,
}

/// Both plots and a one-line text summary of them (for screen readers).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ReadingsPlots {
    /// The Horton plot.
    pub horton: HortonPlot,
    /// The angle histogram.
    pub angles: AnglePlot,
    /// Both plots in words.
    pub summary: String,
}

/// The readings plots of `metrics`, lengths in `units`.
pub fn readings_plots(metrics: &Metrics, units: &str) -> ReadingsPlots {
    let horton = horton_plot(metrics, units);
    let angles = angle_plot(metrics);
    let summary = summary(metrics, &horton, units);
    ReadingsPlots {
        horton,
        angles,
        summary,
    }
}

fn ratio_text(ratio: Option<f64>) -> String {
    ratio.map_or("n/a".to_string(), |value| format!("{value:.2}"))
}

fn unit_suffix(units: &str) -> String {
    let units = units.trim();
    if units.is_empty() {
        String::new()
    } else {
        format!(" ({units})")
    }
}

/// The Horton plot of `metrics`.
pub fn horton_plot(metrics: &Metrics, units: &str) -> HortonPlot {
    let mut counts = Vec::new();
    let mut lengths = Vec::new();
    for stream in &metrics.streams {
        let order = f64::from(stream.order);
        if stream.stream_count > 0 {
            counts.push([order, libm::log10(stream.stream_count as f64)]);
        }
        if stream.mean_stream_length > 0.0 && stream.mean_stream_length.is_finite() {
            lengths.push([order, libm::log10(stream.mean_stream_length)]);
        }
    }
    let count_slope = metrics
        .bifurcation_ratio
        .filter(|ratio| *ratio > 0.0)
        .map(|ratio| -libm::log10(ratio));
    let length_slope = metrics
        .length_ratio
        .filter(|ratio| *ratio > 0.0)
        .map(libm::log10);
    let unit_text = unit_suffix(units);
    let counts = HortonSeries {
        fit: line_through_mean(&counts, count_slope),
        points: counts,
        label: format!("count N_w, R_B = {}", ratio_text(metrics.bifurcation_ratio)),
    };
    let lengths = HortonSeries {
        fit: line_through_mean(&lengths, length_slope),
        points: lengths,
        label: format!(
            "mean length L_w{unit_text}, R_L = {}",
            ratio_text(metrics.length_ratio)
        ),
    };
    let all: Vec<PlotPoint> = counts
        .points
        .iter()
        .chain(&lengths.points)
        .copied()
        .collect();
    let x_title = "Strahler order".to_string();
    let y_title = format!("N_w or L_w{unit_text}, log scale");
    if all.is_empty() {
        return HortonPlot {
            counts,
            lengths,
            x_range: [0.0, 1.0],
            y_range: [0.0, 1.0],
            x_ticks: Vec::new(),
            y_ticks: Vec::new(),
            x_title,
            y_title,
            empty: Some("No streams yet".to_string()),
        };
    }
    let low_order = all.iter().map(|p| p[0]).fold(f64::INFINITY, f64::min);
    let high_order = all.iter().map(|p| p[0]).fold(f64::NEG_INFINITY, f64::max);
    let low_decade = libm::floor(all.iter().map(|p| p[1]).fold(f64::INFINITY, f64::min)) as i32;
    let mut high_decade =
        libm::ceil(all.iter().map(|p| p[1]).fold(f64::NEG_INFINITY, f64::max)) as i32;
    if high_decade == low_decade {
        high_decade += 1;
    }
    let decades = high_decade - low_decade;
    let pad = 0.04 * f64::from(decades);
    // Label at most about six decades; minor ticks only when there are few decades.
    let label_every = ((decades + 5) / 6).max(1);
    let mut y_ticks = Vec::new();
    for exponent in low_decade..=high_decade {
        let label = if (exponent - low_decade) % label_every == 0 {
            decade_label(exponent)
        } else {
            String::new()
        };
        y_ticks.push(Tick {
            at: f64::from(exponent),
            label,
            major: true,
        });
        if exponent < high_decade && decades <= 6 {
            for multiple in 2..=9 {
                y_ticks.push(Tick {
                    at: f64::from(exponent) + libm::log10(f64::from(multiple)),
                    label: String::new(),
                    major: false,
                });
            }
        }
    }
    let order_step = ((high_order - low_order + 1.0) / 12.0).ceil().max(1.0) as usize;
    let x_ticks = (low_order as u32..=high_order as u32)
        .step_by(order_step)
        .map(|order| Tick {
            at: f64::from(order),
            label: order.to_string(),
            major: true,
        })
        .collect();
    HortonPlot {
        counts,
        lengths,
        x_range: [low_order - 0.5, high_order + 0.5],
        y_range: [f64::from(low_decade) - pad, f64::from(high_decade) + pad],
        x_ticks,
        y_ticks,
        x_title,
        y_title,
        empty: None,
    }
}

/// The line of `slope` through the mean of `points`, from the lowest to the highest x.
fn line_through_mean(points: &[PlotPoint], slope: Option<f64>) -> Option<[PlotPoint; 2]> {
    let slope = slope.filter(|slope| slope.is_finite())?;
    if points.len() < 2 {
        return None;
    }
    let n = points.len() as f64;
    let mean_x = points.iter().map(|p| p[0]).sum::<f64>() / n;
    let mean_y = points.iter().map(|p| p[1]).sum::<f64>() / n;
    let low = points.iter().map(|p| p[0]).fold(f64::INFINITY, f64::min);
    let high = points
        .iter()
        .map(|p| p[0])
        .fold(f64::NEG_INFINITY, f64::max);
    let at = |x: f64| [x, mean_y + slope * (x - mean_x)];
    Some([at(low), at(high)])
}

/// The angle histogram of `metrics`.
pub fn angle_plot(metrics: &Metrics) -> AnglePlot {
    let bins: Vec<u64> = metrics.branching_angle_histogram.to_vec();
    let count = metrics.branching_angle_count;
    let caption = if count > 0 {
        let mut parts = Vec::new();
        if let Some(mean) = metrics.branching_angle_mean {
            parts.push(format!("mean {}\u{b0}", fixed_one(mean)));
        }
        if let Some(sd) = metrics.branching_angle_sd {
            parts.push(format!("sd {}\u{b0}", fixed_one(sd)));
        }
        parts.push(format!("n = {count}"));
        parts.join(", ")
    } else {
        "No branching angles yet".to_string()
    };
    let highest = bins.iter().copied().max().unwrap_or(0) as f64;
    let step = tick_step(highest, 4);
    let y_max = step.max((highest / step).ceil() * step);
    let mut y_ticks = Vec::new();
    let mut value = 0.0;
    while value <= y_max + 0.5 * step {
        y_ticks.push(Tick {
            at: value,
            label: fixed(value, 0),
            major: true,
        });
        value += step;
    }
    let x_ticks = (0..=180)
        .step_by(30)
        .map(|degrees| Tick {
            at: f64::from(degrees),
            label: degrees.to_string(),
            major: true,
        })
        .collect();
    AnglePlot {
        bins,
        bin_width: ANGLE_BIN_WIDTH_DEGREES,
        y_max,
        y_ticks,
        x_ticks,
        mean: metrics
            .branching_angle_mean
            .filter(|_| count > 0)
            .map(|mean| mean.clamp(0.0, 180.0)),
        caption,
        x_title: "branching angle (degrees)".to_string(),
        y_title: "count".to_string(),
    }
}

/// One decimal, as `{:.1}` writes it.
fn fixed_one(value: f64) -> String {
    format!("{value:.1}")
}

fn summary(metrics: &Metrics, horton: &HortonPlot, units: &str) -> String {
    let mut orders: Vec<u64> = horton
        .counts
        .points
        .iter()
        .chain(&horton.lengths.points)
        .map(|point| point[0] as u64)
        .collect();
    orders.sort_unstable();
    orders.dedup();
    let horton_text = if orders.is_empty() {
        "Horton plot: no streams yet.".to_string()
    } else {
        let plural = if orders.len() == 1 { "" } else { "s" };
        let unit_text = if units.trim().is_empty() {
            String::new()
        } else {
            format!(" (lengths in {})", units.trim())
        };
        let ratio = |value: Option<f64>| {
            value.map_or("not available".to_string(), |value| format!("{value:.2}"))
        };
        format!(
            "Horton plot: {} order{plural}{unit_text}; R_B {}; R_L {}.",
            orders.len(),
            ratio(metrics.bifurcation_ratio),
            ratio(metrics.length_ratio)
        )
    };
    let count = metrics.branching_angle_count;
    let angles_text = if count > 0 {
        let plural = if count == 1 { "" } else { "s" };
        let mut parts = vec![format!("{count} angle{plural}")];
        if let Some(mean) = metrics.branching_angle_mean {
            parts.push(format!("mean {} degrees", fixed_one(mean)));
        }
        if let Some(sd) = metrics.branching_angle_sd {
            parts.push(format!("sd {} degrees", fixed_one(sd)));
        }
        format!("Angle histogram: {}.", parts.join(", "))
    } else {
        "Angle histogram: no branching angles yet.".to_string()
    };
    format!("{horton_text} {angles_text}")
}
