//! The hostile and awkward data-file corpus (tests/data_files/, written by
//! tests/data_files/make_corpus.py): every file gives the expected table or
//! a located, readable message, never a panic.

use tern::engine::table::{
    ColumnKind, DecimalMark, Format, Mapping, ReadOptions, Table, TableBuilder, TableError, group_values, read_table,
};

fn bytes(name: &str) -> Vec<u8> {
    let path = format!("{}/tests/data_files/{name}", env!("CARGO_MANIFEST_DIR"));
    std::fs::read(&path).unwrap_or_else(|e| panic!("{path}: {e}"))
}

fn read(name: &str) -> Result<Table, TableError> {
    read_table(&bytes(name), Some(name), &ReadOptions::default())
}

/// What a file must give.
enum Expect {
    /// An error whose message contains this text.
    Error(&'static str),
    Table(Shape),
}

struct Shape {
    format: Format,
    header: bool,
    decimal: DecimalMark,
    rows: usize,
    /// Column kinds in order: N numeric, C categorical, E empty.
    kinds: &'static str,
    /// Total problems and the (row, column) of the first one shown.
    problems: usize,
    first_problem: Option<(usize, &'static str)>,
    /// File rows of the first data rows.
    first_rows: &'static [usize],
    /// The numbers of one column, in order (missing and bad cells left out).
    values: Option<(usize, &'static [f64])>,
}

const COMMA: Format = Format::Delimited { delimiter: ',' };
const SEMI: Format = Format::Delimited { delimiter: ';' };

const fn shape(format: Format, rows: usize, kinds: &'static str) -> Shape {
    Shape {
        format,
        header: true,
        decimal: DecimalMark::Point,
        rows,
        kinds,
        problems: 0,
        first_problem: None,
        first_rows: &[],
        values: None,
    }
}

/// The table of cases: file, expectation, and why the case exists.
fn cases() -> Vec<(&'static str, Expect)> {
    use Expect::*;
    let mut cases = vec![
        ("empty.csv", Error("the file is empty")),
        ("whitespace_only.csv", Error("the file is empty")),
        ("header_only.csv", Error("header row but no data rows")),
        ("binary_renamed.csv", Error("not a text file (it contains a NUL byte at byte 9)")),
        ("utf16.csv", Error("UTF-16")),
        ("legacy.xls", Error("old binary Excel file (.xls)")),
        ("not_really.xlsx", Error("named as a spreadsheet but is not one")),
        ("truncated.xlsx", Error("could not be read as an Excel workbook (.xlsx)")),
        ("one_row.csv", Table(Shape { first_rows: &[2], values: Some((0, &[71.5])), ..shape(COMMA, 1, "NC") })),
        ("one_value.csv", Table(Shape { header: false, first_rows: &[1], values: Some((0, &[42.0])), ..shape(COMMA, 1, "N") })),
        ("bom.csv", Table(Shape { values: Some((0, &[3.0, 5.0, 4.0])), ..shape(COMMA, 3, "N") })),
        ("crlf.csv", Table(Shape { first_rows: &[2, 3, 5], values: Some((1, &[128.0, 131.0, 125.0])), ..shape(COMMA, 3, "NN") })),
        ("cr_only.csv", Table(Shape { first_rows: &[2, 3, 4], ..shape(COMMA, 3, "NN") })),
        ("no_trailing_newline.csv", Table(Shape { first_rows: &[2, 3, 4], values: Some((0, &[12.0, 15.0, 11.0])), ..shape(COMMA, 3, "N") })),
        ("blank_lines.csv", Table(Shape { first_rows: &[3, 6, 7], ..shape(COMMA, 3, "N") })),
        (
            "semicolon_decimal_comma.csv",
            Table(Shape { decimal: DecimalMark::Comma, values: Some((0, &[71.5, 68.25, 80.0])), ..shape(SEMI, 3, "NC") }),
        ),
        (
            "single_column_decimal_comma.csv",
            Table(Shape { decimal: DecimalMark::Comma, values: Some((0, &[71.5, 68.25, 80.0])), ..shape(SEMI, 3, "N") }),
        ),
        ("pasted_column.txt", Table(Shape { header: false, values: Some((0, &[12.5, 14.0, 11.25])), ..shape(COMMA, 3, "N") })),
        ("tab.tsv", Table(Shape { values: Some((1, &[12.5, 14.0, 9.75])), ..shape(Format::Delimited { delimiter: '\t' }, 3, "CN") })),
        ("pipe.txt", Table(Shape { values: Some((1, &[12.5, 14.0, 9.75])), ..shape(Format::Delimited { delimiter: '|' }, 3, "CN") })),
        // RFC 4180: line breaks inside quotes; rows keep the line where the record starts.
        ("quoted_newlines.csv", Table(Shape { first_rows: &[2, 4, 5, 8], values: Some((2, &[12.0, 15.0, 11.0, 9.0])), ..shape(COMMA, 4, "NCN") })),
        ("quoted_delimiters.csv", Table(Shape { values: Some((2, &[7.0, 8.0])), ..shape(COMMA, 2, "CCN") })),
        ("thousands_point_decimal.csv", Table(Shape { values: Some((0, &[1234.5, 12000.0, 950.25, 1000000.75])), ..shape(COMMA, 4, "N") })),
        (
            "thousands_comma_decimal.csv",
            Table(Shape { decimal: DecimalMark::Comma, values: Some((0, &[1234.5, 12000.0, 950.25, 1000000.75])), ..shape(SEMI, 4, "NC") }),
        ),
        ("thousands_space.csv", Table(Shape { decimal: DecimalMark::Comma, values: Some((0, &[1234.5, 12000.0, 950.25])), ..shape(SEMI, 3, "N") })),
        // Blank lines are skipped (RFC 4180 has no empty records), so the empty cell of a one-column file is not a row.
        ("na_variants.csv", Table(Shape { values: Some((0, &[1.5, 2.5])), ..shape(COMMA, 9, "N") })),
        ("unicode_headers.csv", Table(Shape { values: Some((1, &[65.5, 80.25])), ..shape(COMMA, 2, "NNNC") })),
        ("html_in_cells.csv", Table(Shape { values: Some((2, &[3.0, 4.0])), ..shape(COMMA, 2, "CCN") })),
        ("latin1.csv", Table(Shape { decimal: DecimalMark::Comma, values: Some((1, &[1.5, 2.5])), ..shape(SEMI, 2, "NN") })),
        ("ragged_short.csv", Table(Shape { problems: 1, first_problem: Some((3, "c")), values: Some((2, &[3.0, 8.0])), ..shape(COMMA, 3, "NNN") })),
        ("ragged_long.csv", Table(Shape { problems: 1, first_problem: Some((3, "after column 2")), ..shape(COMMA, 3, "NN") })),
        ("trailing_delimiter.csv", Table(shape(COMMA, 2, "NNE"))),
        ("unmatched_quote.csv", Table(Shape { problems: 3, first_problem: Some((3, "a")), values: Some((0, &[1.0])), ..shape(COMMA, 2, "NN") })),
        ("mixed_delimiters.csv", Table(Shape { problems: 2, first_problem: Some((3, "a")), values: Some((0, &[1.0, 5.0, 7.0])), ..shape(COMMA, 4, "NN") })),
        ("one_group.csv", Table(shape(COMMA, 3, "NC"))),
        ("sd_zero.csv", Table(shape(COMMA, 7, "NC"))),
        ("two_groups.csv", Table(Shape { decimal: DecimalMark::Comma, ..shape(SEMI, 8, "CN") })),
        ("no_header_numbers.csv", Table(Shape { header: false, first_rows: &[1, 2, 3], values: Some((0, &[1.0, 3.0, 5.0])), ..shape(COMMA, 3, "NN") })),
        ("all_text_no_header.csv", Table(Shape { header: false, ..shape(COMMA, 3, "CC") })),
        ("all_text_header.csv", Table(shape(COMMA, 3, "CC"))),
        ("scientific.csv", Table(Shape { values: Some((0, &[1e-3, 250.0, -31.0])), ..shape(COMMA, 3, "N") })),
        ("signs.csv", Table(Shape { values: Some((0, &[-1.5, 2.0, -3.0])), ..shape(COMMA, 3, "N") })),
        ("spaces_around.csv", Table(Shape { values: Some((1, &[2.0, 4.0])), ..shape(COMMA, 2, "NN") })),
        ("quoted_numbers.csv", Table(Shape { values: Some((1, &[2.0, 4.25])), ..shape(COMMA, 2, "NN") })),
        ("long_field.csv", Table(Shape { values: Some((1, &[1.0, 2.0])), ..shape(COMMA, 2, "CN") })),
        ("empty_column.csv", Table(shape(COMMA, 3, "NE"))),
        ("duplicate_headers.csv", Table(Shape { values: Some((1, &[2.0, 4.0])), ..shape(COMMA, 2, "NN") })),
        // A header of years reads as data: numbers are never taken as a header (override in a test below).
        ("numeric_header.csv", Table(Shape { header: false, values: Some((0, &[2019.0, 1.0, 3.0])), ..shape(COMMA, 3, "NN") })),
        ("infinite_values.csv", Table(Shape { problems: 2, first_problem: Some((3, "x")), values: Some((0, &[1.0, 2.0, 3.0])), ..shape(COMMA, 5, "N") })),
        ("bad_cells.csv", Table(Shape { problems: 2, first_problem: Some((3, "weight_kg")), values: Some((1, &[71.5, 68.0, 77.0])), ..shape(COMMA, 5, "NN") })),
        ("binary_outcome.csv", Table(shape(COMMA, 7, "CC"))),
        ("paired.csv", Table(shape(COMMA, 6, "NNN"))),
        ("custom_missing.csv", Table(Shape { values: Some((0, &[4.0, -99.0, 6.0, -99.0, 5.0])), ..shape(COMMA, 5, "N") })),
        // Spreadsheets: numbers as stored; "16,5" typed as text is the only text number, so the mark is a comma.
        (
            "valid.xlsx",
            Table(Shape {
                decimal: DecimalMark::Comma,
                first_rows: &[2, 3, 4, 5, 6],
                values: Some((1, &[12.5, 14.0, 15.25, 16.5])),
                ..shape(Format::Xlsx, 5, "CNC")
            }),
        ),
        (
            "valid.ods",
            Table(Shape {
                decimal: DecimalMark::Comma,
                first_rows: &[2, 3, 4, 5, 6],
                values: Some((1, &[12.5, 14.0, 15.25, 16.5])),
                ..shape(Format::Ods, 5, "CNC")
            }),
        ),
        // Data from C3; the formula cell has no stored result, so row 6 is empty and skipped.
        ("offset.xlsx", Table(Shape { first_rows: &[4, 5, 7], values: Some((0, &[3.0, 4.5, 6.0])), ..shape(Format::Xlsx, 3, "N") })),
    ];
    // A build without spreadsheets refuses every zip archive with one message.
    if !cfg!(feature = "spreadsheets") {
        for (name, expect) in &mut cases {
            if ["valid.xlsx", "valid.ods", "offset.xlsx", "truncated.xlsx"].contains(name) {
                *expect = Error("this edition reads text only");
            }
        }
    }
    cases
}

fn kind_letter(k: ColumnKind) -> char {
    match k {
        ColumnKind::Numeric => 'N',
        ColumnKind::Categorical => 'C',
        ColumnKind::Empty => 'E',
    }
}

#[test]
fn corpus_gives_the_expected_table_or_message() {
    let cases = cases();
    let mut failures = Vec::new();
    for (name, expect) in &cases {
        let got = read(name);
        let problem = match (expect, &got) {
            (Expect::Error(text), Err(e)) if e.to_string().contains(text) => None,
            (Expect::Error(text), _) => Some(format!("expected an error with {text:?}, got {got:?}")),
            (Expect::Table(_), Err(e)) => Some(format!("expected a table, got the error {e}")),
            (Expect::Table(s), Ok(t)) => check_shape(s, t),
        };
        if let Some(p) = problem {
            failures.push(format!("{name}: {p}"));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
    // Every committed file is in the table (plus the generated case below).
    let dir = format!("{}/tests/data_files", env!("CARGO_MANIFEST_DIR"));
    let mut files: Vec<String> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().into_string().unwrap())
        .filter(|n| n != "make_corpus.py" && n != "VERSIONS.txt")
        .collect();
    files.sort();
    let listed: Vec<&str> = cases.iter().map(|(n, _)| *n).collect();
    for f in &files {
        assert!(listed.contains(&f.as_str()), "{f} is in tests/data_files but not in the table");
    }
    assert!(cases.len() >= 40, "the corpus has {} files", cases.len());
}

fn check_shape(s: &Shape, t: &Table) -> Option<String> {
    let kinds: String = t.columns.iter().map(|c| kind_letter(c.kind)).collect();
    let mut wrong = Vec::new();
    if t.format != s.format {
        wrong.push(format!("format {:?}", t.format));
    }
    if t.header != s.header {
        wrong.push(format!("header {}", t.header));
    }
    if t.decimal != s.decimal {
        wrong.push(format!("decimal {:?}", t.decimal));
    }
    if t.n_rows != s.rows {
        wrong.push(format!("rows {}", t.n_rows));
    }
    if kinds != s.kinds {
        wrong.push(format!("kinds {kinds}"));
    }
    if t.problems.total != s.problems {
        wrong.push(format!("problems {} {:?}", t.problems.total, t.problems.shown));
    }
    if let Some((row, col)) = s.first_problem {
        match t.problems.shown.first() {
            Some(p) if p.row == row && p.column == col && !p.message.is_empty() => {}
            other => wrong.push(format!("first problem {other:?}")),
        }
    }
    if !s.first_rows.is_empty() && t.preview_rows[..s.first_rows.len().min(t.preview_rows.len())] != *s.first_rows {
        wrong.push(format!("rows {:?}", t.preview_rows));
    }
    if let Some((col, want)) = s.values {
        match group_values(t, &Mapping::OneColumn { column: col }, &[]) {
            Ok(v) if v[0] == want => {}
            other => wrong.push(format!("values of column {col}: {other:?}")),
        }
    }
    (!wrong.is_empty()).then(|| wrong.join("; "))
}

#[test]
fn every_text_file_reads_the_same_in_chunks() {
    for (name, _) in cases() {
        let b = bytes(name);
        // The builder has no file name: compare with a nameless read.
        let whole = read_table(&b, None, &ReadOptions::default());
        for size in [1, 3, 64, 4096] {
            let mut builder = TableBuilder::new(ReadOptions::default());
            let mut pushed = Ok(());
            for chunk in b.chunks(size) {
                pushed = pushed.and_then(|_| builder.push(chunk));
            }
            let chunked = pushed.and_then(|_| builder.finish());
            match (&whole, &chunked) {
                // Debug text, because NaN (a missing cell) is not equal to itself.
                (Ok(a), Ok(c)) => assert_eq!(format!("{a:?}"), format!("{c:?}"), "{name} in chunks of {size}"),
                (Err(a), Err(c)) => assert_eq!(a.to_string(), c.to_string(), "{name} in chunks of {size}"),
                _ => panic!("{name} in chunks of {size}: {whole:?} vs {chunked:?}"),
            }
        }
    }
}

#[test]
fn html_and_script_are_kept_verbatim() {
    let t = read("html_in_cells.csv").unwrap();
    assert_eq!(t.columns[0].name, "<img src=x onerror=alert(1)>");
    assert_eq!(t.columns[1].name, "<script>alert(\"x\")</script>");
    assert_eq!(t.preview[0][1], "<a href=\"javascript:alert(1)\">x</a>");
    assert_eq!(t.preview[1][0], "&amp; &lt;");
    let json = serde_json::to_string(&t).unwrap();
    assert!(json.contains("<img src=x onerror=alert(1)>"));
}

#[test]
fn latin1_is_read_with_a_notice() {
    let t = read("latin1.csv").unwrap();
    assert_eq!(t.columns[0].name, "Größe");
    assert_eq!(t.columns[1].name, "Maß");
    assert!(t.notices[0].contains("Windows-1252"), "{:?}", t.notices);
}

#[test]
fn bom_is_not_part_of_the_header() {
    assert_eq!(read("bom.csv").unwrap().columns[0].name, "score");
}

#[test]
fn options_override_detection() {
    let custom = ReadOptions { missing: vec!["-99".into(), "".into()], ..ReadOptions::default() };
    let t = read_table(&bytes("custom_missing.csv"), None, &custom).unwrap();
    assert_eq!(t.columns[0].missing, 2);
    assert_eq!(group_values(&t, &Mapping::OneColumn { column: 0 }, &[]).unwrap()[0], [4.0, 6.0, 5.0]);

    let header = ReadOptions { header: Some(true), ..ReadOptions::default() };
    let t = read_table(&bytes("numeric_header.csv"), None, &header).unwrap();
    assert_eq!((t.columns[0].name.as_str(), t.n_rows), ("2019", 2));

    // "71,5" read with a decimal point is not a number: the column is text.
    let point = ReadOptions { decimal: Some(DecimalMark::Point), ..ReadOptions::default() };
    let t = read_table(&bytes("semicolon_decimal_comma.csv"), None, &point).unwrap();
    assert_eq!(t.columns[0].kind, ColumnKind::Categorical);
    let e = group_values(&t, &Mapping::OneColumn { column: 0 }, &[]).unwrap_err().to_string();
    assert!(e.contains("\"Gewicht\"") && e.contains("\"71,5\""), "{e}");

    let tab = ReadOptions { delimiter: Some(b';'), ..ReadOptions::default() };
    let t = read_table(&bytes("two_groups.csv"), None, &tab).unwrap();
    assert_eq!(t.columns.len(), 2);
    assert!(matches!(
        read_table(b"a\n1\n", None, &ReadOptions { delimiter: Some(0xE9), ..ReadOptions::default() }),
        Err(TableError::BadDelimiter(_))
    ));
    assert!(matches!(
        read_table(b"a\n1\n", None, &ReadOptions { delimiter: Some(b'"'), ..ReadOptions::default() }),
        Err(TableError::BadDelimiter('"'))
    ));
}

#[cfg(feature = "spreadsheets")]
#[test]
fn spreadsheets_list_and_pick_sheets() {
    for name in ["valid.xlsx", "valid.ods"] {
        let t = read(name).unwrap();
        assert_eq!(t.sheets, ["Waiting times", "Dose"], "{name}");
        assert_eq!(t.sheet.as_deref(), Some("Waiting times"));
        assert_eq!(t.preview[2][2], "<b>x</b>");
        let dose = ReadOptions { sheet: Some("Dose".into()), ..ReadOptions::default() };
        let t = read_table(&bytes(name), Some(name), &dose).unwrap();
        assert_eq!(t.sheet.as_deref(), Some("Dose"));
        assert_eq!(group_values(&t, &Mapping::OneColumn { column: 1 }, &[]).unwrap()[0], [0.5, 0.9, 1.4], "{name}");
        let nope = ReadOptions { sheet: Some("Nope".into()), ..ReadOptions::default() };
        let e = read_table(&bytes(name), Some(name), &nope).unwrap_err().to_string();
        assert!(e.contains("no sheet named \"Nope\"") && e.contains("\"Dose\""), "{e}");
    }
}

#[test]
fn one_non_number_in_100000_rows_is_found() {
    let mut text = String::from("id,reading\n");
    for i in 0..100_000 {
        if i == 73_210 {
            text.push_str("73210,12.3x\n");
        } else {
            text.push_str(&format!("{i},{}.{}\n", i % 97, i % 10));
        }
    }
    let t = read_table(text.as_bytes(), Some("big.csv"), &ReadOptions::default()).unwrap();
    assert_eq!(t.n_rows, 100_000);
    assert_eq!(t.columns[1].kind, ColumnKind::Numeric);
    assert_eq!(t.columns[1].bad, 1);
    assert_eq!(t.problems.total, 1);
    let p = &t.problems.shown[0];
    // Line 1 is the header, so data row i is on line i + 2.
    assert_eq!((p.row, p.column.as_str(), p.value.as_str()), (73_212, "reading", "12.3x"));
    assert_eq!(t.problems.rows, [73_212]);
    let values = group_values(&t, &Mapping::OneColumn { column: 1 }, &t.problems.rows).unwrap();
    assert_eq!(values[0].len(), 99_999);
    // The same in chunks that cut records, with and without a size hint.
    for hint in [None, Some(text.len() as u64)] {
        let mut b = TableBuilder::new(ReadOptions::default());
        if let Some(h) = hint {
            b.size_hint(h);
        }
        for chunk in text.as_bytes().chunks(70_001) {
            b.push(chunk).unwrap();
        }
        assert_eq!(b.bytes_read(), text.len() as u64);
        assert_eq!(format!("{:?}", b.finish().unwrap()), format!("{t:?}"));
    }
}

#[test]
fn a_first_record_longer_than_the_sample_is_read() {
    let text = format!("\"{}\",1\n\"short\",2\n", "x".repeat(100_000));
    let whole = read_table(text.as_bytes(), None, &ReadOptions::default()).unwrap();
    assert_eq!((whole.n_rows, whole.header), (2, false));
    let mut b = TableBuilder::new(ReadOptions::default());
    for chunk in text.as_bytes().chunks(4096) {
        b.push(chunk).unwrap();
    }
    assert_eq!(format!("{:?}", b.finish().unwrap()), format!("{whole:?}"));
}

#[test]
fn many_problems_are_counted_and_the_first_are_shown() {
    let mut text = String::from("x\n");
    for i in 0..500 {
        text.push_str(if i % 2 == 0 { "1\n" } else { "oops\n" });
    }
    // Fewer bad cells than numbers... exactly half: still a numeric column.
    let t = read_table(text.as_bytes(), None, &ReadOptions::default()).unwrap();
    assert_eq!(t.columns[0].kind, ColumnKind::Numeric);
    assert_eq!(t.problems.total, 250);
    assert_eq!(t.problems.shown.len(), tern::engine::table::PROBLEMS_SHOWN);
    assert_eq!(t.problems.rows.len(), 250);
    assert_eq!(t.problems.shown[0].row, 3);
}

#[test]
fn arbitrary_bytes_never_panic() {
    // A deterministic sweep of awkward byte soups (the property suite has more).
    let pieces: [&[u8]; 12] = [b"\"", b",", b";", b"\n", b"\r", b"\t", b"1,5", b"NA", b"\xff\xfe", b"\xc3", b"PK\x03\x04", b"x"];
    let mut state = 12345u64;
    for _ in 0..3000 {
        let mut b = Vec::new();
        for _ in 0..(state % 40) {
            state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
            b.extend_from_slice(pieces[(state >> 33) as usize % pieces.len()]);
        }
        let _ = read_table(&b, None, &ReadOptions::default());
        let _ = read_table(&b, Some("x.xlsx"), &ReadOptions::default());
    }
}

#[test]
fn number_syntax() {
    use tern::engine::table::parse_number;
    use DecimalMark::{Comma, Point};
    // (text, mark, expected): the rules of DEVELOPERS.md, "Data files".
    let cases: &[(&str, DecimalMark, Option<f64>)] = &[
        ("1.5", Point, Some(1.5)),
        ("1,5", Comma, Some(1.5)),
        ("1,5", Point, None),
        ("1,234.5", Point, Some(1234.5)),
        ("1.234,5", Comma, Some(1234.5)),
        ("1 234,5", Comma, Some(1234.5)),
        ("1\u{a0}234.5", Point, Some(1234.5)),
        ("1'234'567", Point, Some(1234567.0)),
        ("12,34", Point, None),
        ("0,123", Point, None),
        ("1,2345", Point, None),
        ("1,234,56", Point, None),
        ("1.234.567", Comma, Some(1234567.0)),
        (" -3.25 ", Point, Some(-3.25)),
        ("\u{2212}3", Point, Some(-3.0)),
        ("+.5", Point, Some(0.5)),
        ("5.", Point, Some(5.0)),
        ("1e3", Point, Some(1000.0)),
        ("1,5e-3", Comma, Some(0.0015)),
        ("1e", Point, None),
        ("1e400", Point, None),
        ("inf", Point, None),
        ("NaN", Point, None),
        ("0x1F", Point, None),
        ("", Point, None),
        ("-", Point, None),
        (".", Point, None),
        ("12.3x", Point, None),
        ("1.2.3", Point, None),
    ];
    for &(text, mark, want) in cases {
        assert_eq!(parse_number(text, mark), want, "{text:?} with {mark:?}");
    }
}

mod never_panics {
    use proptest::prelude::*;
    use tern::engine::table::{Mapping, ReadOptions, TableBuilder, read_table, summarise};

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(400))]
        #[test]
        fn any_bytes_read_or_fail_cleanly(b in proptest::collection::vec(prop_oneof![
            Just(b'"'), Just(b','), Just(b';'), Just(b'\n'), Just(b'\r'), Just(b'1'), Just(b'.'), Just(b'a'), any::<u8>()
        ], 0..300), split in 1usize..50) {
            let whole = read_table(&b, None, &ReadOptions::default());
            if let Ok(t) = &whole {
                for c in 0..t.columns.len() {
                    let _ = summarise(t, &Mapping::OneColumn { column: c }, &t.problems.rows);
                    let _ = summarise(t, &Mapping::Paired { first: c, second: 0 }, &[]);
                }
            }
            // Read in chunks (as the page reads a file), the result is the
            // whole read's: the same columns, kinds, values and problems
            // (compared as printed: a missing cell is NaN), or the same
            // message.
            let mut builder = TableBuilder::new(ReadOptions::default());
            let mut pushed = Ok(());
            for chunk in b.chunks(split) {
                pushed = pushed.and_then(|_| builder.push(chunk));
            }
            let chunked = pushed.and_then(|_| builder.finish());
            match (&whole, &chunked) {
                (Ok(a), Ok(c)) => prop_assert_eq!(format!("{a:?}"), format!("{c:?}"), "in chunks of {}", split),
                (Err(a), Err(c)) => prop_assert_eq!(a.to_string(), c.to_string(), "in chunks of {}", split),
                _ => prop_assert!(false, "in chunks of {}: whole {:?}, chunked {:?}", split, whole, chunked),
            }
            let mut zipped = b"PK\x03\x04".to_vec();
            zipped.extend_from_slice(&b);
            let _ = read_table(&zipped, Some("x.xlsx"), &ReadOptions::default());
        }
    }
}

/// The page reads spreadsheets in a second WebAssembly module and receives
/// the grid as JSON (`tern_sheets::read_sheet_json`); through that path
/// every spreadsheet of the corpus gives the same table or message as
/// reading it in-process.
#[cfg(feature = "spreadsheets")]
#[test]
fn a_sheet_sent_as_json_reads_as_the_file_does() {
    use tern::engine::table::{read_grid, sheet_error, SheetError, SheetGrid};
    for name in ["valid.xlsx", "valid.ods", "offset.xlsx", "truncated.xlsx"] {
        for sheet in [None, Some("Dose"), Some("Nope")] {
            let opts = ReadOptions { sheet: sheet.map(Into::into), ..ReadOptions::default() };
            let direct = read_table(&bytes(name), Some(name), &opts);
            let json = serde_json::to_string(&tern_sheets::read_sheet(&bytes(name), sheet)).unwrap();
            let back: Result<SheetGrid, SheetError> = serde_json::from_str(&json).unwrap();
            let via_json = back.map_err(sheet_error).and_then(|g| read_grid(&g, &opts));
            // Compared as printed: missing cells are NaN, which equals nothing.
            assert_eq!(format!("{direct:?}"), format!("{via_json:?}"), "{name}, sheet {sheet:?}");
        }
    }
}
