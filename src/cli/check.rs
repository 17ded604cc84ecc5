//! `eddyzone check SCENARIO`: every case against the limits; exit 1 when any check fails.

use super::emit;
use super::error::{Error, EXIT_LIMIT_FAILED, EXIT_OK};
use clap::Args;
use eddyzone::report::json_out::pretty;
use eddyzone::report::terminal::verdict_text;
use eddyzone::study::{JudgeOptions, Silent, Study};

/// Options of `check`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The scenario, JSON output, one case.
    #[command(flatten)]
    pub input: super::CaseInput,
    /// Treat warnings about the limits (a braking side left unlimited) as errors (exit 2).
    #[arg(long)]
    pub strict: bool,
}

/// Runs `check`.
pub fn execute(a: &CheckArgs) -> Result<i32, Error> {
    let study = Study::new(a.input.load()?)?;
    let v = study.judge(&JudgeOptions::default(), &Silent)?.verdict;
    if a.input.json {
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
