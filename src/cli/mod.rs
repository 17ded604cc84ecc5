//! The command line: one file per command, each turning options into library calls and output.

/// Appends a formatted line to an output buffer.
macro_rules! outln {
    ($buf:expr, $($arg:tt)*) => {{ use std::fmt::Write as _; let _ = writeln!($buf, $($arg)*); }};
}
/// Appends formatted text to an output buffer.
macro_rules! outp {
    ($buf:expr, $($arg:tt)*) => {{ use std::fmt::Write as _; let _ = write!($buf, $($arg)*); }};
}

pub mod check;
pub mod curve;
pub mod heat;
pub mod plan;
pub mod report;
pub mod run;

use crate::error::Error;
use crate::scenario::{self, Scenario};
use clap::{Parser, Subcommand};
use std::path::{Path, PathBuf};

/// Concept-stage design of permanent-magnet eddy-current braking zones on linear tracks.
#[derive(Debug, Parser)]
#[command(name = "eddyzone", version, about, long_about = None)]
pub struct Cli {
    /// The command.
    #[command(subcommand)]
    pub command: Command,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Force–speed curve of each section and fin.
    Curve(curve::CurveArgs),
    /// The vehicle's run through the zone for every case.
    Run(run::RunArgs),
    /// Every case against the limits (exit 1 when a limit fails).
    Check(check::CheckArgs),
    /// The HTML report with figures, profiles and summary.json.
    Report(report::ReportArgs),
    /// The shortest module layout that passes every case (exit 1 when none does).
    Plan(plan::PlanArgs),
    /// Fin heating over a pass and over the duty cycle.
    Heat(heat::HeatArgs),
}

/// Runs a parsed command line; returns the exit code.
pub fn dispatch(cli: Cli) -> Result<i32, Error> {
    match cli.command {
        Command::Curve(a) => curve::execute(&a),
        Command::Run(a) => run::execute(&a),
        Command::Check(a) => check::execute(&a),
        Command::Report(a) => report::execute(&a),
        Command::Plan(a) => plan::execute(&a),
        Command::Heat(a) => heat::execute(&a),
    }
}

/// Reads and validates a scenario file.
pub fn load(path: &Path) -> Result<Scenario, Error> {
    Ok(scenario::load(path)?)
}

/// Selects one case by name, or all.
pub fn select_cases(s: &mut Scenario, case: &Option<String>) -> Result<(), Error> {
    if let Some(name) = case {
        if s.case(name).is_none() {
            let names: Vec<_> = s.cases.iter().map(|c| c.name.as_str()).collect();
            return Err(Error::Usage(format!(
                "--case: no case named '{name}' (cases: {})",
                names.join(", ")
            )));
        }
        s.cases.retain(|c| &c.name == name);
    }
    Ok(())
}

/// Prints to standard output; a closed pipe (`| head`) is not an error.
pub fn emit(text: &str) -> Result<(), Error> {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
        Ok(()) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        Err(e) => Err(Error::Output {
            path: "<stdout>".into(),
            message: e.to_string(),
        }),
    }
}

/// Writes a file atomically, mapping the error.
pub fn write_file(path: &Path, bytes: &[u8]) -> Result<(), Error> {
    crate::report::write_atomic(path, bytes).map_err(|e| Error::Output {
        path: path.display().to_string(),
        message: e.to_string(),
    })
}

/// Creates a folder (and parents).
pub fn make_dir(dir: &PathBuf) -> Result<(), Error> {
    std::fs::create_dir_all(dir).map_err(|e| Error::Output {
        path: dir.display().to_string(),
        message: e.to_string(),
    })
}

/// Parses a temperature option ("45", "45 °C", "318 K"); a plain number is °C on the command line.
pub fn temperature_option(name: &str, text: &Option<String>) -> Result<Option<f64>, Error> {
    let Some(t) = text else { return Ok(None) };
    let t = t.trim();
    let with_unit = if t.parse::<f64>().is_ok() {
        format!("{t} °C")
    } else {
        t.to_string()
    };
    crate::units::from_text(crate::units::Kind::Temperature, &with_unit)
        .map(Some)
        .map_err(|e| Error::Usage(format!("{name}: {e}")))
}
