//! Look at the start of a file: container (text or zip), encoding trouble,
//! delimiter, header and decimal mark.
//!
//! Rules (DEVELOPERS.md, "Data files"):
//! - zip signature → spreadsheet; the old binary Excel signature, UTF-16
//!   byte-order marks and NUL bytes in the first 8 KiB → not text (error).
//! - delimiter: each of tab `;` `,` `|` splits the sample (RFC 4180
//!   quoting). A candidate is eligible when the most common field count k
//!   is above 1, the first record has k fields and at least half the
//!   records have k; the eligible one with the largest share of k-field
//!   records wins, ties in the order tab, `;`, `,`, `|` (a `;` file with
//!   decimal commas also splits evenly at the commas). None eligible: one
//!   column, read with the candidate that splits the fewest records.
//! - header: the first record is a header when none of its cells is a
//!   number, and either some column holds numbers below it or its cells are
//!   all filled, distinct and do not recur below.
//! - decimal mark: cells that only a comma explains (`1,5`, `0,25`,
//!   `1.234,5`) against cells only a point explains (`1.5`, `1,234.5`);
//!   comma when strictly more, else point.

use super::cells::{decimal_evidence, parse_number};
use super::{DecimalMark, ReadOptions, TableError};

/// Bytes looked at before the first record is stored.
pub(crate) const SAMPLE_BYTES: usize = 64 * 1024;
/// Records looked at for the delimiter, header and decimal mark.
const SAMPLE_RECORDS: usize = 1000;

pub(crate) enum Container {
    Text,
    Zip,
}

const ZIP: &[u8] = b"PK\x03\x04";
const ZIP_EMPTY: &[u8] = b"PK\x05\x06";
const OLE: &[u8] = b"\xD0\xCF\x11\xE0";

pub(crate) fn is_zip(bytes: &[u8]) -> bool {
    bytes.starts_with(ZIP) || bytes.starts_with(ZIP_EMPTY)
}

/// Text or spreadsheet, from the first bytes (and the name's extension for
/// a clearer message).
pub(crate) fn format_of(bytes: &[u8], name: Option<&str>) -> Result<Container, TableError> {
    if bytes.is_empty() {
        return Err(TableError::Empty);
    }
    if is_zip(bytes) {
        return Ok(Container::Zip);
    }
    let lower = name.map(|n| n.to_ascii_lowercase()).unwrap_or_default();
    if lower.ends_with(".xlsx") || lower.ends_with(".ods") || lower.ends_with(".xlsm") {
        return Err(TableError::Spreadsheet(format!(
            "\"{}\" is named as a spreadsheet but is not one (a spreadsheet file is a zip archive): it may be damaged or renamed",
            name.unwrap_or_default()
        )));
    }
    check_text(bytes)?;
    Ok(Container::Text)
}

/// Refuse what is clearly not text in UTF-8 or a single-byte encoding.
pub(crate) fn check_text(bytes: &[u8]) -> Result<(), TableError> {
    if bytes.starts_with(OLE) {
        return Err(TableError::NotText(
            "this is an old binary Excel file (.xls) or another Office document, which is not read here: save it as .xlsx, .ods or CSV (UTF-8)".into(),
        ));
    }
    if bytes.starts_with(b"\xFF\xFE") || bytes.starts_with(b"\xFE\xFF") {
        return Err(TableError::NotText(
            "this text is in UTF-16 (as some programs save \"Unicode text\"): save it as CSV in UTF-8".into(),
        ));
    }
    let head = &bytes[..bytes.len().min(8192)];
    if let Some(at) = head.iter().position(|&b| b == 0) {
        return Err(TableError::NotText(format!(
            "this is not a text file (it contains a NUL byte at byte {}): perhaps a binary file, an image or a spreadsheet saved under a text name",
            at + 1
        )));
    }
    Ok(())
}

/// What the sample says.
#[derive(Debug, Clone)]
pub(crate) struct Sniffed {
    pub delimiter: u8,
    pub header: bool,
    pub decimal: DecimalMark,
    /// Columns of the table: the header's field count, or the most common
    /// field count without a header.
    pub width: usize,
}

/// Candidates in order of preference on ties.
pub(crate) const DELIMITERS: [u8; 4] = [b'\t', b';', b',', b'|'];

/// Split `sample` into records of lossily decoded fields with `delimiter`.
/// When the sample is not the whole file the last (possibly cut) record is
/// dropped.
pub(crate) fn records(sample: &[u8], delimiter: u8, complete: bool) -> Vec<Vec<String>> {
    let mut rdr = csv_core::ReaderBuilder::new().delimiter(delimiter).build();
    let mut out = vec![0u8; sample.len() + 16];
    let mut ends = vec![0usize; 1024];
    let mut input = sample;
    let mut recs = Vec::new();
    let mut ended_by_input = false;
    while recs.len() < SAMPLE_RECORDS {
        let (res, nin, _nout, nend) = rdr.read_record(input, &mut out, &mut ends);
        input = &input[nin..];
        match res {
            csv_core::ReadRecordResult::Record => {
                let mut start = 0;
                let rec: Vec<String> = ends[..nend]
                    .iter()
                    .map(|&e| {
                        let f = String::from_utf8_lossy(&out[start..e]).into_owned();
                        start = e;
                        f
                    })
                    .collect();
                recs.push(rec);
            }
            csv_core::ReadRecordResult::InputEmpty => {
                if !complete {
                    ended_by_input = true;
                    break;
                }
                input = &[];
                // The next call with empty input flushes the last record.
                let (res, _, _, nend) = rdr.read_record(input, &mut out, &mut ends);
                if res == csv_core::ReadRecordResult::Record {
                    let mut start = 0;
                    recs.push(
                        ends[..nend]
                            .iter()
                            .map(|&e| {
                                let f = String::from_utf8_lossy(&out[start..e]).into_owned();
                                start = e;
                                f
                            })
                            .collect(),
                    );
                }
                break;
            }
            csv_core::ReadRecordResult::OutputEndsFull => {
                let l = ends.len();
                ends.resize(l * 2, 0);
            }
            csv_core::ReadRecordResult::OutputFull => {
                let l = out.len();
                out.resize(l * 2, 0);
            }
            csv_core::ReadRecordResult::End => break,
        }
    }
    // A sample cut mid-record: the last complete record may be followed by
    // a partial one that csv_core has not returned yet, so nothing to drop.
    let _ = ended_by_input;
    recs
}

fn mode_count(recs: &[Vec<String>]) -> (usize, f64) {
    if recs.is_empty() {
        return (1, 1.0);
    }
    let mut counts: Vec<(usize, usize)> = Vec::new();
    for r in recs {
        match counts.iter_mut().find(|(k, _)| *k == r.len()) {
            Some((_, c)) => *c += 1,
            None => counts.push((r.len(), 1)),
        }
    }
    let (k, c) = counts.iter().copied().max_by_key(|&(k, c)| (c, k)).unwrap_or((1, 1));
    (k, c as f64 / recs.len() as f64)
}

/// Detect what `opts` leaves open, from the start of a text file.
pub(crate) fn sniff_text(sample: &[u8], complete: bool, opts: &ReadOptions) -> Result<(Sniffed, Vec<Vec<String>>), TableError> {
    let delimiter = match opts.delimiter {
        Some(d) => d,
        None => {
            // (share, delimiter) of the best eligible candidate.
            let mut best: Option<(f64, u8)> = None;
            // No candidate eligible: one column, read with the candidate
            // that splits the fewest records (ties: `,` `;` tab `|`).
            let mut single: Option<(usize, u8)> = None;
            let mut unsplit = [0usize; 4];
            for (i, &d) in DELIMITERS.iter().enumerate() {
                let recs = records(sample, d, complete);
                let (k, share) = mode_count(&recs);
                let eligible = k > 1 && recs.first().is_some_and(|r| r.len() == k) && share >= 0.5;
                if eligible && best.is_none_or(|(s, _)| share > s + 1e-9) {
                    best = Some((share, d));
                }
                unsplit[i] = recs.iter().filter(|r| r.len() == 1).count();
            }
            for i in [2, 1, 0, 3] {
                if single.is_none_or(|(s, _)| unsplit[i] > s) {
                    single = Some((unsplit[i], DELIMITERS[i]));
                }
            }
            best.map(|(_, d)| d).or(single.map(|(_, d)| d)).unwrap_or(b',')
        }
    };
    let recs = records(sample, delimiter, complete);
    if recs.is_empty() {
        return Err(TableError::Empty);
    }
    let header = match opts.header {
        Some(h) => h,
        None => detect_header(&recs, opts),
    };
    let data = if header { &recs[1..] } else { &recs[..] };
    let decimal = match opts.decimal {
        Some(d) => d,
        None => {
            let (mut point, mut comma) = (0usize, 0usize);
            for r in data {
                for cell in r {
                    match decimal_evidence(cell) {
                        Some(DecimalMark::Point) => point += 1,
                        Some(DecimalMark::Comma) => comma += 1,
                        None => {}
                    }
                }
            }
            if comma > point { DecimalMark::Comma } else { DecimalMark::Point }
        }
    };
    let width = if header { recs[0].len() } else { mode_count(&recs).0 };
    Ok((Sniffed { delimiter, header, decimal, width }, recs))
}

fn is_number_any(text: &str) -> bool {
    parse_number(text, DecimalMark::Point).is_some() || parse_number(text, DecimalMark::Comma).is_some()
}

/// The header rule on rows of cell texts (also used for spreadsheets).
pub(crate) fn detect_header(recs: &[Vec<String>], opts: &ReadOptions) -> bool {
    let Some(first) = recs.first() else { return false };
    let missing = |t: &str| opts.missing.iter().any(|m| m.trim().eq_ignore_ascii_case(t.trim()));
    if first.iter().any(|c| !missing(c) && is_number_any(c)) {
        return false;
    }
    let rest = &recs[1..];
    let numbers_below = (0..first.len()).any(|c| {
        let (mut nums, mut texts) = (0, 0);
        for r in rest {
            match r.get(c) {
                Some(t) if missing(t) => {}
                Some(t) if is_number_any(t) => nums += 1,
                Some(_) => texts += 1,
                None => {}
            }
        }
        nums > 0 && nums >= texts
    });
    if numbers_below {
        return true;
    }
    let filled = first.iter().all(|c| !c.trim().is_empty());
    let distinct = first.iter().enumerate().all(|(i, c)| first[..i].iter().all(|d| d.trim() != c.trim()));
    let recurs = first.iter().enumerate().any(|(c, t)| rest.iter().any(|r| r.get(c).is_some_and(|u| u.trim() == t.trim())));
    filled && distinct && !recurs
}
