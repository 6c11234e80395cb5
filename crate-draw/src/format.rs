//! Number formats of every drawing and text (`significant`, `four_digits`, `grouped`,
//! `decade_label`), 1-2-5 rounding (`round_length`, `tick_step`) and XML escaping for the SVG.
//! The page formats no number itself: it shows these strings.

/// The round length (1, 2 or 5 times a power of ten) nearest to `target` on a log scale.
pub fn round_length(target: f64) -> f64 {
    if !target.is_finite() || target <= 0.0 {
        return 1.0;
    }
    let decade = libm::pow(10.0, libm::floor(libm::log10(target)));
    let mut best = decade;
    for factor in [1.0, 2.0, 5.0, 10.0] {
        let candidate = factor * decade;
        if libm::fabs(libm::log(candidate / target)) < libm::fabs(libm::log(best / target)) {
            best = candidate;
        }
    }
    if best.is_finite() && best > 0.0 {
        best
    } else {
        1.0
    }
}

/// `value`, or 0 when it is not finite.
pub fn finite_or_zero(value: f64) -> f64 {
    if value.is_finite() {
        value
    } else {
        0.0
    }
}

/// A number with 6 significant digits, without exponent or trailing zeros; non-finite gives 0.
pub fn significant(value: f64) -> String {
    significant_digits(value, 6)
}

/// A number with `digits` significant digits (whole numbers keep all theirs), without exponent
/// or trailing zeros; non-finite gives 0.
pub fn significant_digits(value: f64, digits: u32) -> String {
    if !value.is_finite() || value == 0.0 {
        return "0".to_string();
    }
    let magnitude = libm::floor(libm::log10(libm::fabs(value)));
    let decimals = (f64::from(digits) - 1.0 - magnitude).clamp(0.0, 20.0) as usize;
    fixed(value, decimals)
}

/// A number with a fixed number of decimals, trailing zeros removed; non-finite gives 0.
pub fn fixed(value: f64, decimals: usize) -> String {
    if !value.is_finite() {
        return "0".to_string();
    }
    let mut text = format!("{value:.decimals$}");
    if text.contains('.') {
        while text.ends_with('0') {
            text.pop();
        }
        if text.ends_with('.') {
            text.pop();
        }
    }
    if text == "-0" {
        text = "0".to_string();
    }
    text
}

/// Escapes text content: the five XML special characters, carriage returns (which XML would
/// otherwise fold into line feeds), and characters XML 1.0 forbids (replaced by U+FFFD).
pub fn escape_text(text: &str) -> String {
    escape(text, false)
}

/// Escapes an attribute value: as `escape_text`, and also tabs and line feeds, which XML
/// would otherwise turn into spaces.
pub fn escape_attribute(text: &str) -> String {
    escape(text, true)
}

/// Escapes text (`attribute` false) or an attribute value (`attribute` true); see
/// `escape_text` and `escape_attribute`.
pub fn escape(text: &str, attribute: bool) -> String {
    let mut escaped = String::with_capacity(text.len());
    for character in text.chars() {
        match character {
            '&' => escaped.push_str("&amp;"),
            '<' => escaped.push_str("&lt;"),
            '>' => escaped.push_str("&gt;"),
            '"' => escaped.push_str("&quot;"),
            '\'' => escaped.push_str("&apos;"),
            '\r' => escaped.push_str("&#13;"),
            '\n' if attribute => escaped.push_str("&#10;"),
            '\t' if attribute => escaped.push_str("&#9;"),
            '\n' | '\t' => escaped.push(character),
            '\u{0}'..='\u{1f}' | '\u{fffe}' | '\u{ffff}' => escaped.push('\u{fffd}'),
            _ => escaped.push(character),
        }
    }
    escaped
}

/// Up to four significant digits without trailing zeros; outside 0.001 .. 100000 in exponent
/// form with three significant digits (`1.23e5`, `4.5e-4`). Non-finite values give "n/a".
/// Used for the probe's readings and the screen's scale bar.
pub fn four_digits(value: f64) -> String {
    if !value.is_finite() {
        return "n/a".to_string();
    }
    if value == 0.0 {
        return "0".to_string();
    }
    let magnitude = libm::fabs(value);
    if !(1e-3..1e5).contains(&magnitude) {
        let text = format!("{value:.2e}");
        // `1.20e5` -> `1.2e5`: trailing zeros of the mantissa go too.
        let (mantissa, exponent) = text.split_once('e').unwrap_or((&text, "0"));
        let mut mantissa = mantissa.to_string();
        if mantissa.contains('.') {
            while mantissa.ends_with('0') {
                mantissa.pop();
            }
            if mantissa.ends_with('.') {
                mantissa.pop();
            }
        }
        return format!("{mantissa}e{exponent}");
    }
    significant_digits_all(value, 4)
}

/// `digits` significant digits, also for whole numbers (12345 -> 12350 with 4), trailing zeros
/// after the point removed.
fn significant_digits_all(value: f64, digits: u32) -> String {
    let magnitude = libm::floor(libm::log10(libm::fabs(value)));
    let places = f64::from(digits) - 1.0 - magnitude;
    if places >= 0.0 {
        return fixed(value, places.min(20.0) as usize);
    }
    let unit = libm::pow(10.0, -places);
    fixed(libm::round(value / unit) * unit, 0)
}

/// A whole number with a comma between groups of three digits (`12,345`), as English text
/// writes counts.
// `is_multiple_of` needs Rust 1.87; the workspace's rust-version is 1.80.
#[allow(clippy::manual_is_multiple_of)]
pub fn grouped(value: u64) -> String {
    let digits = value.to_string();
    let mut text = String::with_capacity(digits.len() + digits.len() / 3);
    for (index, digit) in digits.chars().enumerate() {
        if index > 0 && (digits.len() - index) % 3 == 0 {
            text.push(',');
        }
        text.push(digit);
    }
    text
}

/// The label of the power of ten `10^exponent` on a log axis: plain digits from 0.001 to
/// 10000 (`0.01`, `1`, `1000`), superscript form beyond (`10⁵`, `10⁻⁴`).
pub fn decade_label(exponent: i32) -> String {
    match exponent {
        0..=4 => 10u64.pow(exponent as u32).to_string(),
        -3..=-1 => format!("0.{}1", "0".repeat((-exponent - 1) as usize)),
        _ => {
            let superscript: String = exponent
                .to_string()
                .chars()
                .map(|character| match character {
                    '-' => '\u{207b}',
                    '0' => '\u{2070}',
                    '1' => '\u{b9}',
                    '2' => '\u{b2}',
                    '3' => '\u{b3}',
                    digit => {
                        char::from_u32(0x2070 + digit.to_digit(10).unwrap_or(0)).unwrap_or(digit)
                    }
                })
                .collect();
            format!("10{superscript}")
        }
    }
}

/// An axis step of 1, 2 or 5 times a power of ten (at least 1, for counts) giving at most about
/// `intervals` intervals from 0 to `max`: the smallest such step at least `max / intervals`.
pub fn tick_step(max: f64, intervals: u32) -> f64 {
    if max.is_nan() || max <= 0.0 || !max.is_finite() || intervals == 0 {
        return 1.0;
    }
    let raw = max / f64::from(intervals);
    let decade = libm::pow(10.0, libm::floor(libm::log10(raw)));
    let step = [1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|factor| factor * decade)
        .find(|&step| step >= raw)
        .unwrap_or(10.0 * decade);
    step.max(1.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_are_compact() {
        assert_eq!(significant(0.0), "0");
        assert_eq!(significant(1.0), "1");
        assert_eq!(significant(0.123_456_789), "0.123457");
        assert_eq!(significant(-2.5e-7), "-0.00000025");
        assert_eq!(significant(f64::NAN), "0");
        assert_eq!(fixed(-0.000_01, 3), "0");
        assert_eq!(significant_digits(26_959.2, 3), "26959");
        assert_eq!(significant_digits(1.4175, 3), "1.42");
    }

    #[test]
    fn four_digits_rounds_and_switches_to_exponents() {
        assert_eq!(four_digits(0.0), "0");
        assert_eq!(four_digits(1.0), "1");
        assert_eq!(four_digits(0.123_456), "0.1235");
        assert_eq!(four_digits(12_345.0), "12350");
        assert_eq!(four_digits(2.5), "2.5");
        assert_eq!(four_digits(123_456.0), "1.23e5");
        assert_eq!(four_digits(120_000.0), "1.2e5");
        assert_eq!(four_digits(0.000_45), "4.5e-4");
        assert_eq!(four_digits(f64::INFINITY), "n/a");
    }

    #[test]
    fn counts_are_grouped_by_thousands() {
        assert_eq!(grouped(0), "0");
        assert_eq!(grouped(999), "999");
        assert_eq!(grouped(1000), "1,000");
        assert_eq!(grouped(1_234_567), "1,234,567");
    }

    #[test]
    fn decades_are_labelled() {
        assert_eq!(decade_label(0), "1");
        assert_eq!(decade_label(3), "1000");
        assert_eq!(decade_label(-2), "0.01");
        assert_eq!(decade_label(5), "10\u{2075}");
        assert_eq!(decade_label(-4), "10\u{207b}\u{2074}");
    }

    #[test]
    fn tick_steps_are_one_two_five() {
        assert_eq!(tick_step(17.0, 4), 5.0);
        assert_eq!(tick_step(3.0, 4), 1.0);
        assert_eq!(tick_step(900.0, 4), 500.0);
        assert_eq!(tick_step(0.0, 4), 1.0);
    }

    #[test]
    fn round_lengths() {
        assert_eq!(round_length(0.9), 1.0);
        assert_eq!(round_length(3.5), 5.0);
        assert_eq!(round_length(2.9), 2.0);
        assert_eq!(round_length(170.0), 200.0);
        assert_eq!(round_length(0.0), 1.0);
    }

    #[test]
    fn escapes_all_five() {
        assert_eq!(escape_text("a<b>&\"c'"), "a&lt;b&gt;&amp;&quot;c&apos;");
        assert_eq!(escape_attribute("x\ny"), "x&#10;y");
        assert_eq!(escape_text("\u{7}"), "\u{fffd}");
    }
}
