//! The command line: one file per command, each turning options into library calls and output.
//! No command computes: the pipeline lives in `eddyzone::study`, the documents in
//! `eddyzone::report`.

pub mod check;
pub mod completions;
pub mod curve;
pub mod error;
pub mod heat;
pub mod init;
pub mod plan;
pub mod progress;
pub mod report;
pub mod run;
pub mod schema;
pub mod sweep;

use clap::{Parser, Subcommand};
use eddyzone::scenario::{self, Scenario};
use error::Error;
use std::path::Path;

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
    /// Tolerance and uncertainty study of the `sweep:` block (exit 1 when a sample fails).
    Sweep(sweep::SweepArgs),
    /// A commented starter scenario (tower, coaster, rollback, sled) that passes `check`.
    Init(init::InitArgs),
    /// The JSON Schema of the scenario format, for an editor's YAML support.
    Schema(schema::SchemaArgs),
    /// A shell completion script.
    Completions(completions::CompletionsArgs),
    /// The manual page (roff), of eddyzone or of one command.
    Manpage(completions::ManpageArgs),
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
        Command::Sweep(a) => sweep::execute(&a),
        Command::Init(a) => init::execute(&a),
        Command::Schema(a) => schema::execute(&a),
        Command::Completions(a) => completions::completions(&a),
        Command::Manpage(a) => completions::manpage(&a),
    }
}

/// The options every case-by-case command takes: the scenario, JSON output, one case.
#[derive(Debug, clap::Args)]
pub struct CaseInput {
    /// The scenario file.
    pub scenario: std::path::PathBuf,
    /// Print JSON instead of the tables.
    #[arg(long)]
    pub json: bool,
    /// Only this case.
    #[arg(long)]
    pub case: Option<String>,
}

impl CaseInput {
    /// The scenario, with only the `--case` named.
    pub fn load(&self) -> Result<Scenario, Error> {
        load(&self.scenario, self.case.as_deref())
    }
}

/// Reads and validates a scenario file, keeping only the case `--case` names (all without it).
pub fn load(path: &Path, case: Option<&str>) -> Result<Scenario, Error> {
    let mut s = scenario::load(path)?;
    if let Some(name) = case {
        if s.case(name).is_none() {
            let names: Vec<_> = s.cases.iter().map(|c| c.name.as_str()).collect();
            return Err(Error::Usage(format!(
                "--case: no case named '{name}' (cases: {})",
                names.join(", ")
            )));
        }
        s.cases.retain(|c| c.name == name);
    }
    Ok(s)
}

/// Prints to standard output; a closed pipe (`| head`) is not an error.
pub fn emit(text: &str) -> Result<(), Error> {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
        Ok(()) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        Err(source) => Err(Error::Output(eddyzone::report::OutputError::Write {
            path: "<stdout>".into(),
            source,
        })),
    }
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
    eddyzone::units::from_text(eddyzone::units::Kind::Temperature, &with_unit)
        .map(Some)
        .map_err(|e| Error::Usage(format!("{name}: {e}")))
}
