//! The `eddyzone` command: parse the command line, call the library, map errors to exit codes.

mod cli;

use clap::Parser;
use cli::error::{exit_code, Error};

fn main() {
    let args = cli::Cli::parse();
    match cli::dispatch(args) {
        Ok(code) => std::process::exit(code),
        Err(e) => {
            eprintln!("{}", message(&e));
            std::process::exit(exit_code(&e));
        }
    }
}

/// The error and its chain of causes, each line prefixed.
fn message(e: &Error) -> String {
    let mut text = e.to_string();
    let mut source = std::error::Error::source(e);
    while let Some(s) = source {
        let line = s.to_string();
        // Transparent wrappers repeat their cause's text; show each cause once.
        if !text.contains(&line) {
            text.push_str(": ");
            text.push_str(&line);
        }
        source = s.source();
    }
    format!(
        "eddyzone: error: {}",
        text.replace('\n', "\neddyzone: error: ")
    )
}
