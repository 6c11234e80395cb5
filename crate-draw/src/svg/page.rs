//! Page geometry of the SVG drawing: the drawing frame, paper units, map scales and font size.

use super::*;

/// The drawing area in physical units.
pub(super) struct Frame {
    /// Left edge of the view.
    pub(super) x0: f64,
    /// Top edge of the view.
    pub(super) y0: f64,
    /// Width of the view.
    pub(super) width: f64,
    /// Bottom of the drawing area (the band starts here).
    pub(super) drawing_bottom: f64,
    /// Radius of root circles.
    pub(super) root_radius: f64,
    /// Decimals for coordinates (about 6 significant digits of the view size).
    pub(super) decimals: usize,
}

impl Frame {
    /// `least_width`: the narrowest view in physical units (the band's text must fit; 0 for
    /// none).
    pub(super) fn new(
        drawing: &Drawing,
        network: &Network,
        options: &SvgOptions,
        least_width: f64,
    ) -> Frame {
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
        let least = (0.6 * base).max(finite_or_zero(least_width));
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

    pub(super) fn coordinate(&self, value: f64) -> String {
        fixed(value, self.decimals)
    }
}

/// Narrowest paper, in millimetres, of a drawing printed at true size: the band's text is 2.5 mm
/// high (`PRINT_FONT_MM`), which the width rule of `font_size` (at most 4.5 % of the width)
/// allows from 2.5 / 0.045 = 55.6 mm on; a small leaf (18 mm wide) is centred on it.
pub(super) const PRINT_LEAST_WIDTH_MM: f64 = 60.0;

/// Height of the band's text on paper: 2.5 mm, about 7 pt, readable when printed (common
/// practice, no source).
pub(super) const PRINT_FONT_MM: f64 = 2.5;

/// Font size in physical units: about 2.5 mm on paper, kept between 2 % and 4.5 % of the width.
pub(super) fn font_size(frame: &Frame, paper_mm_per_unit: Option<f64>) -> f64 {
    let low = 0.02 * frame.width;
    let high = 0.045 * frame.width;
    let font = match paper_mm_per_unit {
        Some(scale) if scale > 0.0 && scale.is_finite() => PRINT_FONT_MM / scale,
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
pub(super) enum PaperUnit {
    /// Drawn at true size: millimetres of paper per unit.
    TrueSize { mm_per_unit: f64 },
    /// Drawn at a map scale: true millimetres per unit, divided by the scale denominator.
    Map { mm_per_unit: f64 },
    /// A unit the exporter does not know: sized for a screen.
    Unknown,
}

impl PaperUnit {
    pub(super) fn of(units: &str) -> PaperUnit {
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
pub(super) fn map_scale_candidates() -> Vec<u64> {
    let mut candidates = vec![100, 200, 500, 1000, 2000, 5000, 10_000];
    let mut decade = 10_000u64;
    while decade < 1_000_000_000 {
        candidates.extend([2 * decade, 5 * decade, 10 * decade]);
        decade *= 10;
    }
    candidates
}

/// Size of the whole document.
pub(super) struct Page {
    pub(super) width_mm: f64,
    pub(super) height_mm: f64,
    /// `width` and `height` attribute values.
    pub(super) width_attribute: String,
    pub(super) height_attribute: String,
}

impl Page {
    pub(super) fn paper(frame: &Frame, band: &Band, mm_per_unit: f64) -> Page {
        let width_mm = frame.width * mm_per_unit;
        let height_mm = band.view_height(frame) * mm_per_unit;
        Page {
            width_mm,
            height_mm,
            width_attribute: format!("{}mm", significant(width_mm)),
            height_attribute: format!("{}mm", significant(height_mm)),
        }
    }

    pub(super) fn screen(frame: &Frame, band: &Band) -> Page {
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
