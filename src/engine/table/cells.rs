//! Cell text to number: decimal point or comma, thousands separators,
//! missing-value tokens.
//!
//! Rules (DEVELOPERS.md, "Data files"): a number is an optional sign (`+`,
//! `-` or the minus sign U+2212), digits with at most one decimal mark, an
//! optional exponent (`e`/`E`, sign, digits); the integer part may be
//! grouped in threes by one thousands separator (the other mark, a space,
//! a no-break space U+00A0 or U+202F, or an apostrophe), the first group 1–3
//! digits not starting with 0. `inf`, `NaN` and hexadecimal are not numbers;
//! a value must be finite.

use super::DecimalMark;

/// What a cell holds once read.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CellValue {
    /// Matches a missing-value token.
    Missing,
    Number(f64),
    /// Anything else: a level of a factor, or a bad cell in a numeric column.
    Text,
}

/// Parse `text` (surrounding white space ignored) as a number written with
/// `decimal`. `None` when it is not one.
pub fn parse_number(text: &str, decimal: DecimalMark) -> Option<f64> {
    let s = text.trim();
    let (negative, body) = if let Some(r) = s.strip_prefix('-') {
        (true, r)
    } else if let Some(r) = s.strip_prefix('+') {
        (false, r)
    } else if let Some(r) = s.strip_prefix('\u{2212}') {
        (true, r)
    } else {
        (false, s)
    };
    let first = *body.as_bytes().first()?;
    if !(first.is_ascii_digit() || first == b'.' || first == b',') {
        return None;
    }
    let plain = body.bytes().all(|b| b.is_ascii_digit() || matches!(b, b'e' | b'E' | b'+' | b'-'));
    let value = if plain || (decimal == DecimalMark::Point && body.bytes().all(|b| b.is_ascii_digit() || matches!(b, b'.' | b'e' | b'E' | b'+' | b'-'))) {
        // Fast path: Rust's own float syntax (correctly rounded).
        body.parse::<f64>().ok()?
    } else {
        normalise(body, decimal)?.parse::<f64>().ok()?
    };
    let value = if negative { -value } else { value };
    value.is_finite().then_some(value)
}

/// Rewrite a number with separators into Rust's float syntax, checking the
/// grouping; `None` when the text is not a number under these rules.
fn normalise(body: &str, decimal: DecimalMark) -> Option<String> {
    let mark = match decimal {
        DecimalMark::Point => '.',
        DecimalMark::Comma => ',',
    };
    let (mantissa, exponent) = match body.find(['e', 'E']) {
        Some(i) => (&body[..i], Some(&body[i + 1..])),
        None => (body, None),
    };
    let (int_part, frac_part) = match mantissa.find(mark) {
        Some(i) => (&mantissa[..i], Some(&mantissa[i + mark.len_utf8()..])),
        None => (mantissa, None),
    };
    let mut out = String::with_capacity(body.len());
    // Integer part: plain digits, or groups of three after a first group of
    // one to three, all separated by the same separator.
    let separator = int_part.chars().find(|c| !c.is_ascii_digit());
    match separator {
        None => out.push_str(int_part),
        Some(sep) => {
            let allowed = match decimal {
                DecimalMark::Point => matches!(sep, ',' | ' ' | '\u{a0}' | '\u{202f}' | '\''),
                DecimalMark::Comma => matches!(sep, '.' | ' ' | '\u{a0}' | '\u{202f}' | '\''),
            };
            if !allowed {
                return None;
            }
            for (i, group) in int_part.split(sep).enumerate() {
                let ok_digits = group.bytes().all(|b| b.is_ascii_digit());
                let ok_len = if i == 0 { (1..=3).contains(&group.len()) && !group.starts_with('0') } else { group.len() == 3 };
                if !(ok_digits && ok_len) {
                    return None;
                }
                out.push_str(group);
            }
        }
    }
    if let Some(f) = frac_part {
        if !f.bytes().all(|b| b.is_ascii_digit()) || (f.is_empty() && int_part.is_empty()) {
            return None;
        }
        out.push('.');
        out.push_str(f);
    } else if int_part.is_empty() {
        return None;
    }
    if let Some(e) = exponent {
        let digits = e.strip_prefix(['+', '-']).unwrap_or(e);
        if digits.is_empty() || !digits.bytes().all(|b| b.is_ascii_digit()) {
            return None;
        }
        out.push('e');
        out.push_str(e);
    }
    Some(out)
}

/// Which decimal mark a cell's text can only be read with: `None` when
/// both or neither read it (`12`, `1,234`, `abc`).
pub(crate) fn decimal_evidence(text: &str) -> Option<DecimalMark> {
    let point = parse_number(text, DecimalMark::Point).is_some();
    let comma = parse_number(text, DecimalMark::Comma).is_some();
    match (point, comma) {
        (true, false) => Some(DecimalMark::Point),
        (false, true) => Some(DecimalMark::Comma),
        _ => None,
    }
}

/// Reads cell texts with one decimal mark and one list of missing tokens.
#[derive(Debug, Clone)]
pub(crate) struct CellReader {
    pub decimal: DecimalMark,
    missing: Vec<String>,
    /// Some token is itself a number (e.g. `-99`): check tokens first.
    numeric_token: bool,
}

impl CellReader {
    pub fn new(decimal: DecimalMark, missing: &[String]) -> Self {
        let missing: Vec<String> = missing.iter().map(|t| t.trim().to_string()).collect();
        let numeric_token = missing.iter().any(|t| parse_number(t, decimal).is_some());
        CellReader { decimal, missing, numeric_token }
    }

    pub fn is_missing(&self, text: &str) -> bool {
        let t = text.trim();
        self.missing.iter().any(|m| m.eq_ignore_ascii_case(t))
    }

    pub fn read(&self, text: &str) -> CellValue {
        if self.numeric_token && self.is_missing(text) {
            return CellValue::Missing;
        }
        if let Some(v) = parse_number(text, self.decimal) {
            return CellValue::Number(v);
        }
        if !self.numeric_token && self.is_missing(text) {
            return CellValue::Missing;
        }
        CellValue::Text
    }
}

/// Decode Windows-1252 (WHATWG Encoding Standard, index-windows-1252):
/// bytes 0x80–0x9F map to the table below, every other byte to the code
/// point of the same value. Written out instead of linking `encoding_rs`,
/// whose decoder dispatch pulls every legacy encoding's tables (about
/// 180 KB) into the page's WebAssembly.
pub(crate) fn windows_1252(bytes: &[u8]) -> String {
    const HIGH: [char; 32] = [
        '\u{20AC}', '\u{81}', '\u{201A}', '\u{192}', '\u{201E}', '\u{2026}', '\u{2020}', '\u{2021}', '\u{2C6}', '\u{2030}',
        '\u{160}', '\u{2039}', '\u{152}', '\u{8D}', '\u{17D}', '\u{8F}', '\u{90}', '\u{2018}', '\u{2019}', '\u{201C}',
        '\u{201D}', '\u{2022}', '\u{2013}', '\u{2014}', '\u{2DC}', '\u{2122}', '\u{161}', '\u{203A}', '\u{153}', '\u{9D}',
        '\u{17E}', '\u{178}',
    ];
    bytes.iter().map(|&b| if (0x80..0xA0).contains(&b) { HIGH[(b - 0x80) as usize] } else { b as char }).collect()
}

#[cfg(test)]
mod tests {
    /// Every byte against encoding_rs (Mozilla's implementation of the
    /// WHATWG standard).
    #[test]
    fn windows_1252_matches_encoding_rs() {
        let all: Vec<u8> = (0..=255).collect();
        let (want, _, _) = encoding_rs::WINDOWS_1252.decode(&all);
        assert_eq!(super::windows_1252(&all), want);
    }
}
