//! The scale bar of the screen: a round length (1, 2 or 5 times a power of ten, the rule of
//! the SVG's bar too) about a given number of pixels long, with its label.

use serde::Serialize;

use crate::format::{four_digits, round_length};

/// A scale bar ready to draw.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ScaleBar {
    /// Length in the network's units.
    pub length: f64,
    /// Length in pixels.
    pub pixels: f64,
    /// Label, for example `5 mm`.
    pub label: String,
}

/// The bar nearest (on a log scale) to `target_pixels` long at `pixels_per_unit`.
pub fn scale_bar(pixels_per_unit: f64, target_pixels: f64, units: &str) -> ScaleBar {
    let length = if pixels_per_unit > 0.0 && pixels_per_unit.is_finite() {
        round_length(target_pixels / pixels_per_unit)
    } else {
        1.0
    };
    ScaleBar {
        length,
        pixels: length * pixels_per_unit,
        label: format!("{} {units}", four_digits(length)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bars_are_round_and_near_the_target() {
        // 120 px at 30 px/mm is 4 mm; 5 mm is nearer than 2 mm on a log scale.
        let bar = scale_bar(30.0, 120.0, "mm");
        assert_eq!(bar.length, 5.0);
        assert_eq!(bar.pixels, 150.0);
        assert_eq!(bar.label, "5 mm");
        // 120 px at 0.5 px/m is 240 m: 200 m.
        assert_eq!(scale_bar(0.5, 120.0, "m").label, "200 m");
    }
}
