//! The band under the SVG drawing: scale bar, the legend's items laid out in rows (see
//! `crate::legend`), caution text and line wrapping.

use super::*;
use crate::legend::{legend_items, LegendFacts, Piece};
use std::fmt::Write;

/// Width of a legend piece, in font sizes (text is estimated at 0.6 font sizes a character).
pub(super) fn piece_width(piece: &Piece) -> f64 {
    match piece {
        Piece::Line(_) => 1.3,
        Piece::Circle => 1.1,
        Piece::Text(label) => 0.3 + 0.6 * label.chars().count() as f64,
    }
}

/// The annotation band under the drawing, already written as SVG.
pub(super) struct Band {
    pub(super) svg: String,
    pub(super) height: f64,
    pub(super) font: f64,
}

impl Band {
    pub(super) fn view_height(&self, frame: &Frame) -> f64 {
        frame.drawing_bottom - frame.y0 + self.height
    }

    pub(super) fn layout(
        drawing: &Drawing,
        frame: &Frame,
        options: &SvgOptions,
        units: &str,
        font: f64,
        scale_note: &str,
    ) -> Band {
        let c = |value: f64| frame.coordinate(value);
        let line_gap = 1.6 * font;
        let left = frame.x0 + 0.5 * font;
        let right = frame.x0 + frame.width - 0.5 * font;
        let char_width = 0.6 * font;
        let mut svg = String::new();
        let mut baseline = frame.drawing_bottom + line_gap;

        // Scale bar.
        let length = round_length(frame.width / 5.0);
        let bar_end = left + length;
        let label = format!("{} {}", significant(length), units);
        let _ = writeln!(
            svg,
            "<path class=\"scale-bar\" d=\"M{} {}V{}H{}V{}\" fill=\"none\" stroke=\"{TEXT}\" \
             stroke-width=\"{}\"/>",
            c(left),
            c(baseline - 0.5 * font),
            c(baseline),
            c(bar_end),
            c(baseline - 0.5 * font),
            significant(0.1 * font),
        );
        let label_x = bar_end + 0.5 * font;
        text_element(
            &mut svg,
            frame,
            "scale-label",
            label_x,
            baseline,
            &label,
            false,
        );
        if !scale_note.is_empty() {
            let note_x = label_x + (label.chars().count() as f64 + 2.0) * char_width;
            text_element(
                &mut svg,
                frame,
                "scale-note",
                note_x,
                baseline,
                scale_note,
                false,
            );
        }

        // Legend.
        let items = legend_items(&LegendFacts {
            colouring: options.colour,
            tissue: (drawing.tissue_count > 0).then_some(options.tissue),
            max_order: drawing.max_order,
            flow_range: drawing.flow_range,
            segment_count: drawing.segments.len(),
            roots_drawn: !drawing.roots.is_empty(),
            units,
        });
        let mut x = left;
        baseline += line_gap;
        for item in &items {
            let item_width: f64 = item.pieces.iter().map(piece_width).sum::<f64>() * font;
            if x > left && x + item_width > right {
                x = left;
                baseline += line_gap;
            }
            let middle = baseline - 0.35 * font;
            for piece in &item.pieces {
                match piece {
                    Piece::Line(colour) => {
                        let _ = writeln!(
                            svg,
                            "<line class=\"legend-swatch\" x1=\"{}\" y1=\"{}\" x2=\"{}\" \
                             y2=\"{}\" stroke=\"{colour}\" stroke-width=\"{}\" \
                             stroke-linecap=\"round\"/>",
                            c(x + 0.3 * font),
                            c(middle),
                            c(x + 1.0 * font),
                            c(middle),
                            significant(0.45 * font),
                        );
                    }
                    Piece::Circle => {
                        let _ = writeln!(
                            svg,
                            "<circle class=\"legend-swatch\" cx=\"{}\" cy=\"{}\" r=\"{}\" \
                             fill=\"{ROOT_FILL}\" stroke=\"{TEXT}\" stroke-width=\"{}\"/>",
                            c(x + 0.5 * font),
                            c(middle),
                            significant(0.3 * font),
                            significant(0.1 * font),
                        );
                    }
                    Piece::Text(label) => {
                        text_element(
                            &mut svg,
                            frame,
                            "legend",
                            x + 0.25 * font,
                            baseline,
                            label,
                            false,
                        );
                    }
                }
                x += piece_width(piece) * font;
            }
            x += 0.9 * font;
        }

        // Caution.
        if let Some(caution) = &options.caution {
            let columns = ((right - left) / (0.62 * font)).max(10.0);
            let columns = if columns.is_finite() {
                columns as usize
            } else {
                80
            };
            for line in wrap(caution, columns) {
                baseline += line_gap;
                text_element(&mut svg, frame, "caution", left, baseline, &line, true);
            }
        }

        let height = baseline + 0.8 * font - frame.drawing_bottom;
        Band { svg, height, font }
    }
}

/// Writes one `<text>` element.
pub(super) fn text_element(
    svg: &mut String,
    frame: &Frame,
    class: &str,
    x: f64,
    baseline: f64,
    text: &str,
    bold: bool,
) {
    let weight = if bold { " font-weight=\"bold\"" } else { "" };
    let _ = writeln!(
        svg,
        "<text class=\"{class}\" x=\"{}\" y=\"{}\"{weight}>{}</text>",
        frame.coordinate(x),
        frame.coordinate(baseline),
        escape_text(text),
    );
}

/// Splits text into lines of at most `columns` characters at spaces (longer words stand alone).
pub(super) fn wrap(text: &str, columns: usize) -> Vec<String> {
    let mut lines = Vec::new();
    for paragraph in text.lines() {
        let mut line = String::new();
        for word in paragraph.split_whitespace() {
            let needed =
                line.chars().count() + usize::from(!line.is_empty()) + word.chars().count();
            if !line.is_empty() && needed > columns {
                lines.push(std::mem::take(&mut line));
            }
            if !line.is_empty() {
                line.push(' ');
            }
            line.push_str(word);
        }
        if !line.is_empty() {
            lines.push(line);
        }
    }
    lines
}
