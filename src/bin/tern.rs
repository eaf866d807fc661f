//! `tern`: the engine on the command line. Reads one JSON design (a file or
//! standard input), optionally a data file to decide from, prints one JSON
//! answer. Exit codes: 0 answered, 2 the input was refused (the message
//! names the field, its value and the rule, or the file's row and column),
//! 1 an input could not be read.

use std::io::{Read, Write};
use std::process::ExitCode;

const USAGE: &str = "\
tern: plan and decide hypothesis tests with both error rates under control.

usage:
  tern run [FILE] [--data DATAFILE]
                      read a JSON design from FILE (or standard input when FILE
                      is absent or -) and print the answer as JSON; with
                      --data, decide from DATAFILE (CSV, TSV, .xlsx, .ods): the
                      design names its columns with the data-file role fields
                      (value, first, second, group, level1, level2, outcome,
                      success) and may set exclude_rows, delimiter, decimal,
                      header, missing and sheet
  tern simulate [FILE] [--data DATAFILE]
                      the simulation check of the design in FILE (or standard
                      input): its \"simulation\" block names the population
                      shape, its parameters, the replicates and the seed; the
                      check runs at the design's n (or the smallest conclusive
                      n) with its dropout and prints the realised error rates
                      of both rules as JSON; the \"resample\" shape draws from
                      DATAFILE's values (the same seed gives the same numbers)
  tern report FILE [--data DATAFILE] [--format html|md|json] [--out PATH]
                      write the report of the design in FILE (or standard
                      input for -): a self-contained HTML file (the default;
                      print it to PDF from a browser), CommonMark, or JSON;
                      to PATH, or to standard output; with --data, decided
                      from DATAFILE as tern run does, with its histogram and
                      quantile plot (the report holds its summaries only);
                      a \"simulation\" block adds the check by simulation,
                      run as tern simulate runs it
  tern help           show this text

The input fields and two worked examples are in the README.";

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    match args.first().map(String::as_str) {
        Some(command @ ("run" | "simulate")) => match run_args(&args[1..]) {
            Ok((design, data)) => run(design, data, command == "simulate"),
            Err(message) => {
                eprintln!("tern: {message}\n\n{USAGE}");
                ExitCode::from(2)
            }
        },
        Some("report") => match report_args(&args[1..]) {
            Ok(a) => report(a),
            Err(message) => {
                eprintln!("tern: {message}\n\n{USAGE}");
                ExitCode::from(2)
            }
        },
        Some("help" | "--help" | "-h") => {
            println!("{USAGE}");
            ExitCode::SUCCESS
        }
        Some(other) => {
            eprintln!("tern: unknown command \"{other}\"\n\n{USAGE}");
            ExitCode::from(2)
        }
        None => {
            eprintln!("{USAGE}");
            ExitCode::from(2)
        }
    }
}

/// `run`'s arguments: the design file (or none: standard input) and the
/// data file after `--data`.
fn run_args(args: &[String]) -> Result<(Option<&str>, Option<&str>), String> {
    let (mut design, mut data) = (None, None);
    let mut it = args.iter();
    while let Some(a) = it.next() {
        match a.as_str() {
            "--data" => match it.next() {
                Some(f) if data.is_none() => data = Some(f.as_str()),
                Some(_) => return Err("--data is given twice".into()),
                None => return Err("--data needs a file name".into()),
            },
            f if design.is_none() && (f == "-" || !f.starts_with("--")) => design = Some(f),
            other => return Err(format!("unexpected argument \"{other}\"")),
        }
    }
    Ok((design, data))
}

/// The text of FILE, or of standard input for none or `-`.
fn read_input(path: Option<&str>) -> Result<String, String> {
    match path {
        None | Some("-") => {
            let mut s = String::new();
            std::io::stdin().read_to_string(&mut s).map(|_| s).map_err(|e| format!("cannot read standard input: {e}"))
        }
        Some(p) => std::fs::read_to_string(p).map_err(|e| format!("cannot read {p}: {e}")),
    }
}

/// `run`, or `simulate` when `check` is set.
fn run(path: Option<&str>, data: Option<&str>, check: bool) -> ExitCode {
    let text = match read_input(path) {
        Ok(s) => s,
        Err(e) => {
            eprintln!("tern: {e}");
            return ExitCode::from(1);
        }
    };
    let answer = match data {
        None if check => tern::engine::request::run_simulation(&text),
        None => tern::engine::request::run(&text),
        Some(file) => match std::fs::read(file) {
            Ok(bytes) => {
                let name = std::path::Path::new(file).file_name().map_or(file.to_string(), |n| n.to_string_lossy().into_owned());
                if check {
                    tern::engine::data_file::simulate_from_file(&text, &bytes, &name)
                } else {
                    tern::engine::data_file::run_from_file(&text, &bytes, &name)
                }
            }
            Err(e) => {
                eprintln!("tern: cannot read {file}: {e}");
                return ExitCode::from(1);
            }
        },
    };
    match answer {
        Ok(json) => {
            // A closed pipe (`tern run | head`) is not an error worth a panic.
            let mut out = std::io::stdout().lock();
            match writeln!(out, "{json}") {
                Ok(()) => ExitCode::SUCCESS,
                Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => ExitCode::SUCCESS,
                Err(e) => {
                    eprintln!("tern: cannot write the answer: {e}");
                    ExitCode::from(1)
                }
            }
        }
        Err(e) => {
            eprintln!("tern: {e}");
            ExitCode::from(2)
        }
    }
}

/// The formats `tern report` writes.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Format {
    Html,
    Markdown,
    Json,
}

/// `report`'s arguments.
struct ReportArgs<'a> {
    design: Option<&'a str>,
    data: Option<&'a str>,
    format: Format,
    out: Option<&'a str>,
}

fn report_args(args: &[String]) -> Result<ReportArgs<'_>, String> {
    let mut a = ReportArgs { design: None, data: None, format: Format::Html, out: None };
    let (mut format_seen, mut it) = (false, args.iter());
    while let Some(arg) = it.next() {
        match arg.as_str() {
            "--format" => {
                let f = it.next().ok_or("--format needs html, md or json")?;
                if format_seen {
                    return Err("--format is given twice".into());
                }
                format_seen = true;
                a.format = match f.as_str() {
                    "html" => Format::Html,
                    "md" | "markdown" => Format::Markdown,
                    "json" => Format::Json,
                    other => return Err(format!("--format is \"{other}\", but must be html, md or json")),
                };
            }
            "--data" => match it.next() {
                Some(f) if a.data.is_none() => a.data = Some(f.as_str()),
                Some(_) => return Err("--data is given twice".into()),
                None => return Err("--data needs a file name".into()),
            },
            "--out" => match it.next() {
                Some(p) if a.out.is_none() => a.out = Some(p.as_str()),
                Some(_) => return Err("--out is given twice".into()),
                None => return Err("--out needs a file name".into()),
            },
            f if a.design.is_none() && (f == "-" || !f.starts_with("--")) => a.design = Some(f),
            other => return Err(format!("unexpected argument \"{other}\"")),
        }
    }
    Ok(a)
}

/// Today's date (UTC) as YYYY-MM-DD, from the system clock: the civil
/// date of a day count since 1970-01-01 (the proleptic Gregorian
/// calendar; H. Hinnant, "chrono-Compatible Low-Level Date Algorithms",
/// days_from_civil's inverse).
fn today() -> String {
    let secs = std::time::SystemTime::now().duration_since(std::time::UNIX_EPOCH).map_or(0, |d| d.as_secs());
    let z = (secs / 86_400) as i64 + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1_460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    format!("{y:04}-{m:02}-{d:02}")
}

fn report(a: ReportArgs<'_>) -> ExitCode {
    let text = match read_input(a.design) {
        Ok(s) => s,
        Err(e) => {
            eprintln!("tern: {e}");
            return ExitCode::from(1);
        }
    };
    let file = match a.data {
        None => None,
        Some(file) => match std::fs::read(file) {
            Ok(bytes) => Some((bytes, std::path::Path::new(file).file_name().map_or(file.to_string(), |n| n.to_string_lossy().into_owned()))),
            Err(e) => {
                eprintln!("tern: cannot read {file}: {e}");
                return ExitCode::from(1);
            }
        },
    };
    // The simulation check the design's `simulation` block asks for, as
    // `tern simulate` runs it (with the data file, for `resample`).
    let simulation = match tern::report::simulation_of(&text, file.as_ref().map(|(b, n)| (b.as_slice(), n.as_str()))) {
        Ok(s) => s,
        Err(e) => {
            eprintln!("tern: {e}");
            return ExitCode::from(2);
        }
    };
    // With a data file: the request with the file's summary figures as
    // its data, and the file's charts and notes.
    let (text, part) = match &file {
        None => (text, None),
        Some((bytes, name)) => match tern::report::data_part_from_file(&text, bytes, name) {
            Ok(x) => x,
            Err(e) => {
                eprintln!("tern: {e}");
                return ExitCode::from(2);
            }
        },
    };
    let prepared = match tern::report::prepare(&text, tern::report::Stamp::today(today()), part.as_ref(), simulation.as_ref()) {
        Ok(p) => p,
        Err(e) => {
            eprintln!("tern: {e}");
            return ExitCode::from(2);
        }
    };
    let doc = match a.format {
        Format::Html => prepared.html(),
        Format::Markdown => prepared.markdown(),
        Format::Json => prepared.json(),
    };
    let written = match a.out {
        Some(path) => std::fs::write(path, doc.as_bytes()).map_err(|e| format!("cannot write {path}: {e}")),
        None => {
            let mut out = std::io::stdout().lock();
            match out.write_all(doc.as_bytes()) {
                Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => Err(format!("cannot write the report: {e}")),
                _ => Ok(()),
            }
        }
    };
    match written {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("tern: {e}");
            ExitCode::from(1)
        }
    }
}
