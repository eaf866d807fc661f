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
  tern help           show this text

The input fields and two worked examples are in the README.";

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    match args.first().map(String::as_str) {
        Some("run") => match run_args(&args[1..]) {
            Ok((design, data)) => run(design, data),
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

fn run(path: Option<&str>, data: Option<&str>) -> ExitCode {
    let text = match path {
        None | Some("-") => {
            let mut s = String::new();
            match std::io::stdin().read_to_string(&mut s) {
                Ok(_) => s,
                Err(e) => {
                    eprintln!("tern: cannot read standard input: {e}");
                    return ExitCode::from(1);
                }
            }
        }
        Some(p) => match std::fs::read_to_string(p) {
            Ok(s) => s,
            Err(e) => {
                eprintln!("tern: cannot read {p}: {e}");
                return ExitCode::from(1);
            }
        },
    };
    let answer = match data {
        None => tern::engine::request::run(&text),
        Some(file) => match std::fs::read(file) {
            Ok(bytes) => {
                let name = std::path::Path::new(file).file_name().map_or(file.to_string(), |n| n.to_string_lossy().into_owned());
                tern::engine::data_file::run_from_file(&text, &bytes, &name)
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
