//! Colours of every drawing (SVG, screen, PNG): `Colouring`, the Okabe-Ito order colours
//! (Okabe & Ito 2008), the flow ramp, and `colour_scheme` / `palette_rgb` for the page.

use serde::{Deserialize, Serialize};

/// How segments are coloured.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Colouring {
    /// By Strahler order, with colours from the colour-blind-safe palette of Okabe & Ito (2008).
    ByOrder,
    /// By the logarithm of flow, on a ramp whose lightness falls steadily from low to high flow.
    ByFlow,
    /// Every segment dark grey.
    Plain,
}

impl Colouring {
    /// The colouring named `order`, `flow` or `plain` (the page's and the command line's words).
    pub fn from_name(name: &str) -> Option<Colouring> {
        match name {
            "order" => Some(Colouring::ByOrder),
            "flow" => Some(Colouring::ByFlow),
            "plain" => Some(Colouring::Plain),
            _ => None,
        }
    }
}

/// Text and outline colour.
pub const TEXT: &str = "#222222";

/// Fill of root markers.
pub const ROOT_FILL: &str = "#ffffff";

/// Colour of `Colouring::Plain`.
pub const PLAIN: &str = "#404040";

/// Strahler orders 1, 2, ... in colours of Okabe & Ito (2008), "Color Universal Design";
/// yellow is left out as it is too faint on white. Orders past the end use the last colour.
pub const ORDER_COLOURS: [&str; 7] = [
    "#56b4e9", // sky blue
    "#009e73", // bluish green
    "#e69f00", // orange
    "#0072b2", // blue
    "#d55e00", // vermilion
    "#cc79a7", // reddish purple
    "#000000", // black
];

/// The colour of Strahler order `order` (orders below 1 count as 1).
pub fn order_colour(order: u32) -> &'static str {
    let index = (order.max(1) - 1) as usize;
    ORDER_COLOURS[index.min(ORDER_COLOURS.len() - 1)]
}

/// The flow ramp at `t` in [0, 1] (0 = least flow): a path through the OKLab colour space
/// (Ottosson 2020) whose lightness falls linearly from 0.87 to 0.30 while the hue turns from
/// yellow-green through teal to blue, so light thin veinlets recede and dark trunks stand out.
pub fn flow_colour(t: f64) -> String {
    let t = if t.is_finite() {
        t.clamp(0.0, 1.0)
    } else {
        0.0
    };
    let lightness = 0.87 - 0.57 * t;
    let hue = (110.0 + 165.0 * t).to_radians();
    let mut chroma = 0.09 + 0.05 * libm::sin(std::f64::consts::PI * t);
    let mut rgb = oklab_to_linear_srgb(lightness, chroma * libm::cos(hue), chroma * libm::sin(hue));
    // Pull chroma in until the colour lies inside the sRGB gamut.
    for _ in 0..40 {
        if rgb.iter().all(|&channel| (0.0..=1.0).contains(&channel)) {
            break;
        }
        chroma *= 0.9;
        rgb = oklab_to_linear_srgb(lightness, chroma * libm::cos(hue), chroma * libm::sin(hue));
    }
    let [red, green, blue] = rgb.map(|channel| {
        let channel = channel.clamp(0.0, 1.0);
        let encoded = if channel <= 0.003_130_8 {
            12.92 * channel
        } else {
            1.055 * libm::pow(channel, 1.0 / 2.4) - 0.055
        };
        libm::round(encoded.clamp(0.0, 1.0) * 255.0) as u8
    });
    format!("#{red:02x}{green:02x}{blue:02x}")
}

/// OKLab to linear sRGB (Ottosson 2020, "A perceptual color space for image processing").
pub fn oklab_to_linear_srgb(lightness: f64, a: f64, b: f64) -> [f64; 3] {
    let l = lightness + 0.396_337_777_4 * a + 0.215_803_757_3 * b;
    let m = lightness - 0.105_561_345_8 * a - 0.063_854_172_8 * b;
    let s = lightness - 0.089_484_177_5 * a - 1.291_485_548_0 * b;
    let (l, m, s) = (l * l * l, m * m * m, s * s * s);
    [
        4.076_741_662_1 * l - 3.307_711_591_3 * m + 0.230_969_929_2 * s,
        -1.268_438_004_6 * l + 2.609_757_401_1 * m - 0.341_319_396_5 * s,
        -0.004_196_086_3 * l - 0.703_418_614_7 * m + 1.707_614_701_0 * s,
    ]
}

/// Number of steps of the flow ramp handed to the page.
pub const FLOW_RAMP_STEPS: usize = 32;

/// The colours the page draws with, the same as the SVG's, so screen and export agree.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct ColourScheme {
    /// Strahler orders 1, 2, ...; orders past the end use the last colour.
    pub order: Vec<&'static str>,
    /// The flow ramp sampled at `FLOW_RAMP_STEPS` evenly spaced points from least to most flow
    /// (position from the logarithm of flow between the smallest and largest positive flow).
    pub flow: Vec<String>,
    /// Colour of plain drawing.
    pub plain: &'static str,
    /// Fill and ring of a root marker (as the SVG export draws it).
    pub root_fill: &'static str,
    /// Ring of a root marker.
    pub root_ring: &'static str,
}

/// The page's colours.
pub fn colour_scheme() -> ColourScheme {
    ColourScheme {
        order: ORDER_COLOURS.to_vec(),
        flow: (0..FLOW_RAMP_STEPS)
            .map(|step| flow_colour(step as f64 / (FLOW_RAMP_STEPS - 1) as f64))
            .collect(),
        plain: PLAIN,
        root_fill: ROOT_FILL,
        root_ring: TEXT,
    }
}

/// The palette of a colouring as RGB: the order colours, the flow ramp's `FLOW_RAMP_STEPS`
/// steps, or the one plain colour. Palette indices of `screen::ScreenGeometry` point into it.
pub fn palette_rgb(colouring: Colouring) -> Vec<[u8; 3]> {
    let scheme = colour_scheme();
    let hex: Vec<String> = match colouring {
        Colouring::ByOrder => scheme
            .order
            .iter()
            .map(|colour| colour.to_string())
            .collect(),
        Colouring::ByFlow => scheme.flow,
        Colouring::Plain => vec![scheme.plain.to_string()],
    };
    hex.iter().map(|text| parse_hex(text)).collect()
}

/// `#rrggbb` as three bytes (black when malformed).
pub fn parse_hex(text: &str) -> [u8; 3] {
    let value = u32::from_str_radix(text.trim_start_matches('#'), 16).unwrap_or(0);
    [(value >> 16) as u8, (value >> 8) as u8, value as u8]
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Relative luminance (WCAG 2.0, "relative luminance" definition) of a `#rrggbb` colour.
    fn relative_luminance(colour: &str) -> f64 {
        let channel = |offset: usize| {
            let value = u8::from_str_radix(&colour[offset..offset + 2], 16).unwrap() as f64 / 255.0;
            if value <= 0.04045 {
                value / 12.92
            } else {
                ((value + 0.055) / 1.055).powf(2.4)
            }
        };
        0.2126 * channel(1) + 0.7152 * channel(3) + 0.0722 * channel(5)
    }

    #[test]
    fn flow_ramp_darkens_steadily() {
        let mut previous = f64::INFINITY;
        for step in 0..=20 {
            let colour = flow_colour(step as f64 / 20.0);
            let luminance = relative_luminance(&colour);
            assert!(luminance < previous, "step {step}: {colour} is not darker");
            previous = luminance;
        }
    }

    /// Okabe & Ito (2008): sky blue is (86, 180, 233), vermilion (213, 94, 0).
    #[test]
    fn palettes_come_as_bytes() {
        let order = palette_rgb(Colouring::ByOrder);
        assert_eq!(order[0], [86, 180, 233]);
        assert_eq!(order[4], [213, 94, 0]);
        assert_eq!(palette_rgb(Colouring::ByFlow).len(), FLOW_RAMP_STEPS);
        assert_eq!(palette_rgb(Colouring::Plain), vec![[0x40, 0x40, 0x40]]);
        assert_eq!(Colouring::from_name("flow"), Some(Colouring::ByFlow));
        assert_eq!(Colouring::from_name("Flow"), None);
    }
}
