//! `tern`: the engine on the command line. Reads one JSON design (a file or
//! standard input), prints one JSON answer. Exit codes: 0 answered, 2 the
//! input was refused (the message names the field, its value and the rule),
//! 1 the input could not be read.

use std::io::{Read, Write};
use std::process::ExitCode;

const USAGE: &str = "\
tern: plan and decide hypothesis tests with both error rates under control.

usage:
  tern run [FILE]     read a JSON design from FILE (or standard input when FILE
                      is absent or -) and print the answer as JSON
  tern help           show this text

The input fields and two worked examples are in the README.";

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    match args.first().map(String::as_str) {
        Some("run") => run(args.get(1).map(String::as_str)),
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

fn run(path: Option<&str>) -> ExitCode {
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
    match tern::engine::request::run(&text) {
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
