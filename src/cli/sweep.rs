//! `eddyzone sweep SCENARIO`: the scenario's `sweep:` block — every sample judged, the spread of
//! each check, its failure probability and sensitivities; exit 1 when any sample fails a limit.

use super::error::{Error, EXIT_LIMIT_FAILED, EXIT_OK};
use super::progress::Bar;
use super::{emit, load};
use clap::Args;
use eddyzone::report::sweep_out::{samples_csv, sweep_json, sweep_text};
use eddyzone::report::write_file;
use eddyzone::study::{JudgeOptions, Progress, Silent};
use eddyzone::sweep::run_sweep;
use std::path::PathBuf;

/// Options of `sweep`.
#[derive(Debug, Args)]
pub struct SweepArgs {
    /// The scenario file (with a `sweep:` block).
    pub scenario: PathBuf,
    /// Print the whole result (every sample included) as JSON instead of the summary.
    #[arg(long)]
    pub json: bool,
    /// Write every sample's inputs and outputs as CSV to this file.
    #[arg(long)]
    pub csv: Option<PathBuf>,
    /// Write the whole result as JSON to this file.
    #[arg(long)]
    pub json_file: Option<PathBuf>,
    /// Write the worst sample as a complete scenario to this file (`check` reproduces it).
    #[arg(long)]
    pub write_worst: Option<PathBuf>,
}

/// Runs `sweep`.
pub fn execute(a: &SweepArgs) -> Result<i32, Error> {
    let s = load(&a.scenario, None)?;
    if s.sweep.is_none() {
        return Err(Error::Usage(format!(
            "{}: no `sweep:` block to sample",
            a.scenario.display()
        )));
    }
    let bar = Bar::new();
    let progress: &dyn Progress = if a.json { &Silent } else { &bar };
    let r = run_sweep(&s, &JudgeOptions::default(), progress);
    bar.finish();
    let r = r?;
    if let Some(path) = &a.write_worst {
        write_file(path, r.worst_yaml.as_bytes())?;
    }
    if let Some(path) = &a.csv {
        write_file(path, &samples_csv(&r)?)?;
    }
    if let Some(path) = &a.json_file {
        write_file(path, sweep_json(&r)?.as_bytes())?;
    }
    if a.json {
        emit(&sweep_json(&r)?)?;
    } else {
        emit(&sweep_text(&r))?;
    }
    Ok(if r.any_failure.count == 0 {
        EXIT_OK
    } else {
        EXIT_LIMIT_FAILED
    })
}
