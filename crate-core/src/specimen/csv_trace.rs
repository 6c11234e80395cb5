//! `read_csv`: a CSV edge list into a `Trace`. The header names the columns `x1`, `y1`, `x2`,
//! `y2` and optionally `width` (any order, any case, other columns ignored); every data line is
//! one straight vein piece from (x1, y1) to (x2, y2), y growing down as in images. Every
//! message names the line and the byte where it starts.

use super::{SpecimenError, Trace, TracedLine, MAX_TRACE_POINTS};

/// The columns an edge list must have.
const REQUIRED: [&str; 4] = ["x1", "y1", "x2", "y2"];

/// Reads a CSV edge list with a header line.
pub(crate) fn read_csv(text: &str) -> Result<Trace, SpecimenError> {
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(true)
        .trim(csv::Trim::All)
        .flexible(false)
        .comment(Some(b'#'))
        .from_reader(text.as_bytes());
    let located = |error: &csv::Error| {
        error
            .position()
            .map_or((1, 0), |position| (position.line(), position.byte()))
    };
    let header = reader
        .headers()
        .map_err(|error| {
            let (line, byte) = located(&error);
            SpecimenError::Csv {
                line,
                byte,
                problem: format!("the header is not readable: {error}"),
            }
        })?
        .clone();
    let column = |name: &str| {
        header
            .iter()
            .position(|field| field.eq_ignore_ascii_case(name))
    };
    let mut columns = [0usize; 4];
    for (slot, name) in columns.iter_mut().zip(REQUIRED) {
        *slot = column(name).ok_or_else(|| SpecimenError::Csv {
            line: 1,
            byte: 0,
            problem: format!(
                "the header has no column `{name}`: an edge list needs x1,y1,x2,y2 (and may \
                 have width); the header is {:?}",
                header.iter().collect::<Vec<_>>().join(",")
            ),
        })?;
    }
    let width_column = column("width");
    let mut trace = Trace::default();
    for record in reader.records() {
        let record = record.map_err(|error| {
            let (line, byte) = located(&error);
            SpecimenError::Csv {
                line,
                byte,
                problem: match error.kind() {
                    csv::ErrorKind::UnequalLengths {
                        expected_len, len, ..
                    } => format!("{len} fields where the header has {expected_len}"),
                    _ => error.to_string(),
                },
            }
        })?;
        let (line, byte) = record
            .position()
            .map_or((0, 0), |position| (position.line(), position.byte()));
        let number = |index: usize, name: &str| -> Result<f64, SpecimenError> {
            let field = record.get(index).unwrap_or("");
            match field.parse::<f64>() {
                Ok(value) if value.is_finite() => Ok(value),
                _ => Err(SpecimenError::Csv {
                    line,
                    byte,
                    problem: format!("column `{name}` holds {field:?}, not a finite number"),
                }),
            }
        };
        let values = [
            number(columns[0], "x1")?,
            number(columns[1], "y1")?,
            number(columns[2], "x2")?,
            number(columns[3], "y2")?,
        ];
        let width = match width_column {
            Some(index) if !record.get(index).unwrap_or("").is_empty() => {
                let width = number(index, "width")?;
                if width < 0.0 {
                    return Err(SpecimenError::Csv {
                        line,
                        byte,
                        problem: format!("column `width` holds {width}, a negative width"),
                    });
                }
                Some(width)
            }
            _ => None,
        };
        if 2 * (trace.lines.len() + 1) > MAX_TRACE_POINTS {
            return Err(SpecimenError::TooManyPoints {
                place: format!("CSV line {line}"),
            });
        }
        trace.lines.push(TracedLine {
            points: vec![(values[0], values[1]), (values[2], values[3])],
            source: format!("line {line}"),
            width,
        });
    }
    Ok(trace)
}
