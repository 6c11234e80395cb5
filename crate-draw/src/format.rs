//! Number formatting and XML escaping for the SVG drawing.

/// The round length (1, 2 or 5 times a power of ten) nearest to `target` on a log scale.
pub(super) fn round_length(target: f64) -> f64 {
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

pub(super) fn finite_or_zero(value: f64) -> f64 {
    if value.is_finite() {
        value
    } else {
        0.0
    }
}

/// A number with 6 significant digits, without exponent or trailing zeros; non-finite gives 0.
pub(super) fn significant(value: f64) -> String {
    significant_digits(value, 6)
}

/// A number with `digits` significant digits (whole numbers keep all theirs), without exponent
/// or trailing zeros; non-finite gives 0.
pub(super) fn significant_digits(value: f64, digits: u32) -> String {
    if !value.is_finite() || value == 0.0 {
        return "0".to_string();
    }
    let magnitude = libm::floor(libm::log10(libm::fabs(value)));
    let decimals = (f64::from(digits) - 1.0 - magnitude).clamp(0.0, 20.0) as usize;
    fixed(value, decimals)
}

/// A number with a fixed number of decimals, trailing zeros removed; non-finite gives 0.
pub(super) fn fixed(value: f64, decimals: usize) -> String {
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
pub(super) fn escape_text(text: &str) -> String {
    escape(text, false)
}

/// Escapes an attribute value: as `escape_text`, and also tabs and line feeds, which XML
/// would otherwise turn into spaces.
pub(super) fn escape_attribute(text: &str) -> String {
    escape(text, true)
}

pub(super) fn escape(text: &str, attribute: bool) -> String {
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
