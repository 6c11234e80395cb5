//! `read_spot_levels_csv`: spot levels as `x,y,z` lines (x east, y north, z the ground's
//! elevation, all in the site's unit), an optional `x,y,z` header first; errors name the line.

use super::{SiteError, SpotLevel};

/// Reads spot levels from CSV text: one `x,y,z` line each, blank lines skipped, an optional
/// header line `x,y,z` first. Check them against a site with `Site::set_levels`.
pub fn read_spot_levels_csv(bytes: &[u8]) -> Result<Vec<SpotLevel>, SiteError> {
    let text = std::str::from_utf8(bytes).map_err(|error| {
        let line = bytes[..error.valid_up_to()]
            .iter()
            .filter(|&&byte| byte == b'\n')
            .count()
            + 1;
        SiteError::Csv {
            line,
            problem: format!("not UTF-8 text (byte {})", error.valid_up_to()),
        }
    })?;
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut levels = Vec::new();
    let mut seen_content = false;
    for (index, line) in text.lines().enumerate() {
        let number = index + 1;
        let line = line.trim();
        if line.is_empty() {
            continue;
        }
        let fields: Vec<&str> = line.split(',').map(str::trim).collect();
        let is_first = !seen_content;
        seen_content = true;
        if is_first
            && fields
                .iter()
                .map(|field| field.to_ascii_lowercase())
                .eq(["x", "y", "z"])
        {
            continue;
        }
        let [x, y, z] = fields[..] else {
            return Err(SiteError::Csv {
                line: number,
                problem: format!(
                    "{} field(s); a spot level is x,y,z (x east, y north, z the ground's elevation)",
                    fields.len()
                ),
            });
        };
        let read = |name: &str, text: &str| -> Result<f64, SiteError> {
            match text.parse::<f64>() {
                Ok(value) if value.is_finite() => Ok(value),
                _ => Err(SiteError::Csv {
                    line: number,
                    problem: format!("{name} = {text:?} is not a finite number"),
                }),
            }
        };
        levels.push(SpotLevel {
            place: format!("spot-level file, line {number}"),
            x: read("x", x)?,
            y: read("y", y)?,
            z: read("z", z)?,
        });
    }
    Ok(levels)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_levels_with_and_without_a_header() {
        let levels = read_spot_levels_csv(b"x,y,z\n1,2,100.5\n\n3.5, 4, 99\n").expect("levels");
        assert_eq!(levels.len(), 2);
        assert_eq!((levels[1].x, levels[1].y, levels[1].z), (3.5, 4.0, 99.0));
        assert_eq!(levels[1].place, "spot-level file, line 4");
        assert_eq!(read_spot_levels_csv(b"1,2,3").expect("levels").len(), 1);
    }

    #[test]
    fn a_bad_line_is_named() {
        let error = read_spot_levels_csv(b"x,y,z\n1,2,3\n1,2\n").unwrap_err();
        assert!(matches!(error, SiteError::Csv { line: 3, .. }), "{error}");
        let error = read_spot_levels_csv(b"1,2,high\n").unwrap_err();
        assert!(error.to_string().contains("line 1"), "{error}");
        assert!(error.to_string().contains("\"high\""), "{error}");
    }
}
