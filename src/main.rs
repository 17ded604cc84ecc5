//! The `eddyzone` command: parse the command line, call the library, map errors to exit codes.

use clap::Parser;

fn main() {
    let cli = eddyzone::cli::Cli::parse();
    match eddyzone::cli::dispatch(cli) {
        Ok(code) => std::process::exit(code),
        Err(e) => {
            eprintln!(
                "eddyzone: error: {}",
                e.to_string().replace('\n', "\neddyzone: error: ")
            );
            std::process::exit(e.exit_code());
        }
    }
}
