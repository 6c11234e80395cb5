//! How the segments below the conducting threshold are drawn (`TissueView`): faint, hidden or
//! like the veins, in the words of the network's kind (tissue in a leaf, hillslope on a site),
//! with the faint colour and strength every drawing (canvas, PNG, SVG) uses. A view setting
//! only: it never changes the network, its measurements or its run link.

use serde::Serialize;

/// How segments that do not conduct (drain less than `vein_area`) are drawn.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum TissueView {
    /// Light and thin, under the veins: the conducting network stands out.
    #[default]
    Faint,
    /// Not drawn at all: the conducting network alone.
    Hidden,
    /// Drawn like the veins (every segment at least the thinnest line), as before the
    /// threshold existed.
    AsVeins,
}

impl TissueView {
    /// Every view, in the order the page offers them.
    pub const ALL: [TissueView; 3] = [TissueView::Faint, TissueView::Hidden, TissueView::AsVeins];

    /// The view named `faint`, `hidden` or `veins` (the page's, the SVG's and the command
    /// line's word), or `None`.
    pub fn from_name(name: &str) -> Option<TissueView> {
        TissueView::ALL.into_iter().find(|view| view.name() == name)
    }

    /// The view's word: `faint`, `hidden` or `veins`.
    pub fn name(self) -> &'static str {
        match self {
            TissueView::Faint => "faint",
            TissueView::Hidden => "hidden",
            TissueView::AsVeins => "veins",
        }
    }

    /// What the choice reads as on the page, in leaf or drainage words.
    pub fn choice_text(self, site: bool) -> &'static str {
        match (self, site) {
            (TissueView::Faint, _) => "faint",
            (TissueView::Hidden, _) => "hidden",
            (TissueView::AsVeins, false) => "drawn like veins",
            (TissueView::AsVeins, true) => "drawn like channels",
        }
    }
}

/// The label of the page's tissue control: what the finer segments are, in the words of the
/// network's kind (`site`: a drainage site, whose words never say "vein").
pub fn tissue_control_label(site: bool) -> &'static str {
    if site {
        "Hillslope (below the channel threshold)"
    } else {
        "Tissue (below the vein threshold)"
    }
}

/// What the faint lines stand for in a colour key.
pub fn tissue_key_text(site: bool) -> &'static str {
    if site {
        "hillslope: drains less than the channel threshold"
    } else {
        "tissue: drains less than the vein threshold"
    }
}

/// What a colour key says when the finer segments are hidden.
pub fn tissue_hidden_text(site: bool) -> &'static str {
    if site {
        "hillslope (below the channel threshold) not drawn"
    } else {
        "tissue (below the vein threshold) not drawn"
    }
}

/// The page's tissue control as JSON-ready data: `{label, choices: [{value, text}]}`.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct TissueControl {
    /// The control's label.
    pub label: &'static str,
    /// The choices, each with its word (`value`) and what it reads as (`text`).
    pub choices: Vec<TissueChoice>,
}

/// One choice of `TissueControl`.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct TissueChoice {
    /// `TissueView::name`.
    pub value: &'static str,
    /// `TissueView::choice_text`.
    pub text: &'static str,
}

/// The page's tissue control in the words of the network's kind.
pub fn tissue_control(site: bool) -> TissueControl {
    TissueControl {
        label: tissue_control_label(site),
        choices: TissueView::ALL
            .into_iter()
            .map(|view| TissueChoice {
                value: view.name(),
                text: view.choice_text(site),
            })
            .collect(),
    }
}

/// Colour of faint tissue: a light warm grey, lighter than every order colour and every step
/// of the flow ramp once drawn at `FAINT_STRENGTH` over the page's background (common
/// practice, no source: fine structure in grey recedes behind coloured lines).
pub const TISSUE_FAINT: &str = "#b8b2a4";

/// The faint colour as bytes (`TISSUE_FAINT`).
pub const TISSUE_FAINT_RGB: [u8; 3] = [0xb8, 0xb2, 0xa4];

/// Opacity of faint tissue lines in the raster, of 256 (a half-strength line reads as a line
/// of half a pixel: thinner than the thinnest vein).
pub const FAINT_STRENGTH: u32 = 128;

/// Stroke width of faint tissue in the SVG, as a fraction of the thinnest vein drawn (or of
/// the cell size when no vein has a width): thinner than any vein.
pub const FAINT_SVG_WIDTH_FRACTION: f64 = 0.5;

/// Stroke opacity of faint tissue in the SVG (as `FAINT_STRENGTH` of 256 in the raster).
pub const FAINT_SVG_OPACITY: f64 = 0.5;

#[cfg(test)]
mod tests {
    use super::*;
    use crate::palette::{flow_colour, parse_hex, ORDER_COLOURS};

    /// Relative luminance (WCAG 2.0 definition) of sRGB bytes.
    fn luminance([r, g, b]: [u8; 3]) -> f64 {
        let channel = |value: u8| {
            let value = value as f64 / 255.0;
            if value <= 0.04045 {
                value / 12.92
            } else {
                ((value + 0.055) / 1.055).powf(2.4)
            }
        };
        0.2126 * channel(r) + 0.7152 * channel(g) + 0.0722 * channel(b)
    }

    /// Faint tissue at half strength over the page's background (#fffdf8) is lighter than
    /// every vein colour drawn at full strength (WCAG 2.0 relative luminance).
    #[test]
    fn faint_tissue_is_lighter_than_every_vein_colour() {
        assert_eq!(parse_hex(TISSUE_FAINT), TISSUE_FAINT_RGB);
        let background = [0xff, 0xfd, 0xf8];
        let t = FAINT_STRENGTH as f64 / 256.0;
        let blended: [u8; 3] = std::array::from_fn(|k| {
            (TISSUE_FAINT_RGB[k] as f64 * t + background[k] as f64 * (1.0 - t)).round() as u8
        });
        let faint = luminance(blended);
        let veins = ORDER_COLOURS
            .iter()
            .map(|colour| parse_hex(colour))
            .chain((0..=10).map(|step| parse_hex(&flow_colour(step as f64 / 10.0))));
        for colour in veins {
            assert!(
                faint > luminance(colour),
                "{colour:?} is lighter than faint tissue"
            );
        }
    }

    #[test]
    fn words_follow_the_kind_and_names_read_back() {
        for view in TissueView::ALL {
            assert_eq!(TissueView::from_name(view.name()), Some(view));
        }
        assert_eq!(TissueView::from_name("Faint"), None);
        // What a site's page shows (the label and the choices' texts) never says vein.
        let control = tissue_control(true);
        let site: String = std::iter::once(control.label)
            .chain(control.choices.iter().map(|choice| choice.text))
            .collect::<Vec<_>>()
            .join(" ");
        assert!(!site.to_lowercase().contains("vein"), "{site}");
        assert!(site.contains("Hillslope"));
        assert!(tissue_control(false).label.contains("vein"));
        assert!(!tissue_key_text(true).contains("vein"));
        assert!(!tissue_hidden_text(true).contains("vein"));
    }
}
