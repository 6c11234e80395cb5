//! The colour key, one for every drawing: `legend_items` lists what the colours, strokes and
//! markers of a drawing mean, as `LegendItem`s of pieces (stroke, root marker, text). The SVG
//! band lays them out under the drawing; the page shows the same items beside its canvas.

use serde::Serialize;

use crate::format::significant_digits;
use crate::palette::{flow_colour, order_colour, Colouring, ORDER_COLOURS, PLAIN};
use crate::tissue::{tissue_hidden_text, tissue_key_text, TissueView, TISSUE_FAINT};

/// A legend entry: pieces laid side by side and never split across lines.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct LegendItem {
    /// The pieces, left to right.
    pub pieces: Vec<Piece>,
}

/// Part of a legend entry.
#[derive(Clone, Debug, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Piece {
    /// A short stroke in a colour (`#rrggbb`).
    Line(String),
    /// A root marker.
    Circle,
    /// A label.
    Text(String),
}

impl LegendItem {
    /// An entry of text only.
    pub fn text(label: impl Into<String>) -> LegendItem {
        LegendItem {
            pieces: vec![Piece::Text(label.into())],
        }
    }
}

/// What a legend needs to know of the drawing.
#[derive(Clone, Debug, PartialEq)]
pub struct LegendFacts<'a> {
    /// The colouring shown.
    pub colouring: Colouring,
    /// How tissue (segments below the conducting threshold) is drawn; `None` when every
    /// segment conducts.
    pub tissue: Option<TissueView>,
    /// Highest Strahler order of a drawn segment (0 without segments).
    pub max_order: u32,
    /// Smallest and largest positive flow of a drawn segment, in units².
    pub flow_range: Option<(f64, f64)>,
    /// Number of drawn segments.
    pub segment_count: usize,
    /// Whether root markers are drawn (and so need an entry).
    pub roots_drawn: bool,
    /// Length unit.
    pub units: &'a str,
}

/// Legend entries for a colouring, plus the root marker when roots are drawn.
///
/// By order: a title, then one stroke per order present (the last colour marked `+` when
/// higher orders share it). By flow: a title with the unit, then the smallest flow, five steps
/// of the ramp and the largest flow (three significant digits). Plain: one stroke.
pub fn legend_items(facts: &LegendFacts) -> Vec<LegendItem> {
    let mut items = Vec::new();
    match facts.colouring {
        Colouring::ByOrder if facts.max_order > 0 => {
            items.push(LegendItem::text("Strahler order"));
            let shown = facts.max_order.min(ORDER_COLOURS.len() as u32);
            for order in 1..=shown {
                let plus = if order == shown && facts.max_order > shown {
                    "+"
                } else {
                    ""
                };
                items.push(LegendItem {
                    pieces: vec![
                        Piece::Line(order_colour(order).to_string()),
                        Piece::Text(format!("{order}{plus}")),
                    ],
                });
            }
        }
        Colouring::ByFlow => {
            if let Some((low, high)) = facts.flow_range {
                items.push(LegendItem::text(format!("flow ({}\u{b2})", facts.units)));
                let mut pieces = vec![Piece::Text(significant_digits(low, 3))];
                if high > low {
                    pieces.extend((0..5).map(|step| Piece::Line(flow_colour(step as f64 / 4.0))));
                    pieces.push(Piece::Text(significant_digits(high, 3)));
                } else {
                    pieces.push(Piece::Line(flow_colour(1.0)));
                }
                items.push(LegendItem { pieces });
            }
        }
        Colouring::Plain if facts.segment_count > 0 => {
            // Leaf words for leaves, drainage words for sites.
            let what = if ramulus_core::params::is_site_unit(facts.units) {
                "channel (width to scale)"
            } else {
                "vein (width to scale)"
            };
            items.push(LegendItem {
                pieces: vec![
                    Piece::Line(PLAIN.to_string()),
                    Piece::Text(what.to_string()),
                ],
            });
        }
        Colouring::ByOrder | Colouring::Plain => {}
    }
    let site = ramulus_core::params::is_site_unit(facts.units);
    match facts.tissue {
        Some(TissueView::Faint) => items.push(LegendItem {
            pieces: vec![
                Piece::Line(TISSUE_FAINT.to_string()),
                Piece::Text(tissue_key_text(site).to_string()),
            ],
        }),
        Some(TissueView::Hidden) => items.push(LegendItem::text(tissue_hidden_text(site))),
        Some(TissueView::AsVeins) | None => {}
    }
    if facts.roots_drawn {
        items.push(LegendItem {
            pieces: vec![
                Piece::Circle,
                Piece::Text(root_word(facts.units).to_string()),
            ],
        });
    }
    items
}

/// What the root marker stands for, in the words of the network's kind: a leaf's veins
/// leave through the petiole, a site's drains through its outlet.
pub fn root_word(units: &str) -> &'static str {
    if ramulus_core::params::is_site_unit(units) {
        "outlet (root)"
    } else {
        "petiole (root)"
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn facts(colouring: Colouring, max_order: u32) -> LegendFacts<'static> {
        LegendFacts {
            colouring,
            tissue: None,
            max_order,
            flow_range: Some((0.0225, 12.5)),
            segment_count: 5,
            roots_drawn: false,
            units: "mm",
        }
    }

    #[test]
    fn orders_past_the_palette_share_the_last_colour() {
        let items = legend_items(&facts(Colouring::ByOrder, 9));
        // Title plus the seven Okabe-Ito colours kept (Okabe & Ito 2008, yellow left out).
        assert_eq!(items.len(), 8);
        assert_eq!(items[7].pieces[1], Piece::Text("7+".to_string()));
        assert_eq!(items[1].pieces[0], Piece::Line("#56b4e9".to_string()));
    }

    #[test]
    fn flow_key_names_its_unit_and_ends() {
        let items = legend_items(&facts(Colouring::ByFlow, 3));
        assert_eq!(items[0], LegendItem::text("flow (mm\u{b2})"));
        assert_eq!(
            items[1].pieces.first(),
            Some(&Piece::Text("0.0225".to_string()))
        );
        assert_eq!(
            items[1].pieces.last(),
            Some(&Piece::Text("12.5".to_string()))
        );
        assert_eq!(items[1].pieces.len(), 7);
    }

    #[test]
    fn roots_get_an_entry_only_when_drawn() {
        let mut with_roots = facts(Colouring::Plain, 1);
        assert_eq!(legend_items(&with_roots).len(), 1);
        with_roots.roots_drawn = true;
        assert_eq!(legend_items(&with_roots)[1].pieces[0], Piece::Circle,);
        // Leaf words for leaves (millimetres), drainage words for sites (metres).
        assert_eq!(
            legend_items(&with_roots)[0].pieces[1],
            Piece::Text("vein (width to scale)".to_string())
        );
        assert_eq!(
            legend_items(&with_roots)[1].pieces[1],
            Piece::Text("petiole (root)".to_string())
        );
        with_roots.units = "m";
        assert_eq!(
            legend_items(&with_roots)[0].pieces[1],
            Piece::Text("channel (width to scale)".to_string())
        );
        assert_eq!(
            legend_items(&with_roots)[1].pieces[1],
            Piece::Text("outlet (root)".to_string())
        );
    }

    /// Faint tissue gets a key entry in its colour, hidden tissue a sentence, and a site's
    /// key says hillslope, never vein.
    #[test]
    fn tissue_gets_an_entry_in_the_kinds_words() {
        let mut shown = facts(Colouring::Plain, 1);
        shown.tissue = Some(TissueView::Faint);
        let items = legend_items(&shown);
        assert_eq!(items[1].pieces[0], Piece::Line(TISSUE_FAINT.to_string()));
        shown.tissue = Some(TissueView::AsVeins);
        assert_eq!(legend_items(&shown).len(), 1);
        shown.tissue = Some(TissueView::Hidden);
        shown.units = "m";
        let text = format!("{:?}", legend_items(&shown));
        assert!(
            text.contains("hillslope") && !text.contains("vein"),
            "{text}"
        );
    }
}
