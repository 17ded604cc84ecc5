//! `eddyzone check SCENARIO`: every case against the limits; exit 1 when any check fails.

use super::error::{Error, EXIT_LIMIT_FAILED, EXIT_OK};
use super::{emit, load};
use clap::Args;
use eddyzone::report::json_out::pretty;
use eddyzone::report::terminal::verdict_text;
use eddyzone::study::{JudgeOptions, Silent, Study};
use std::path::PathBuf;

/// Options of `check`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The scenario file.
    pub scenario: PathBuf,
    /// Print JSON instead of the tables.
    #[arg(long)]
    pub json: bool,
    /// Check only this case.
    #[arg(long)]
    pub case: Option<String>,
    /// Treat warnings about the limits (a braking side left unlimited) as errors (exit 2).
    #[arg(long)]
    pub strict: bool,
}

/// Runs `check`.
pub fn execute(a: &CheckArgs) -> Result<i32, Error> {
    let study = Study::new(load(&a.scenario, a.case.as_deref())?)?;
    let v = study.judge(&JudgeOptions::default(), &Silent)?.verdict;
    if a.json {
        emit(&pretty(&v)?)?;
    } else {
        emit(&verdict_text(&v, &study.scenario().rider))?;
    }
    if a.strict && !v.warnings.is_empty() {
        return Err(Error::Usage(format!(
            "--strict: {} warning(s) about the limits: {}",
            v.warnings.len(),
            v.warnings.join("; ")
        )));
    }
    Ok(if v.pass { EXIT_OK } else { EXIT_LIMIT_FAILED })
}
