//! The command line's error: every layer's error, and the one place that maps them to exit
//! codes.

use eddyzone::plan::PlanError;
use eddyzone::report::OutputError;
use eddyzone::scenario::validate::ScenarioError;
use eddyzone::scenario::write::WriteError;
use eddyzone::study::StudyError;
use eddyzone::sweep::shard::ShardError;
use eddyzone::sweep::SweepError;

/// Exit code: everything passed.
pub const EXIT_OK: i32 = 0;
/// Exit code: a limit failed in `check`, or no feasible layout in `plan`.
pub const EXIT_LIMIT_FAILED: i32 = 1;
/// Exit code: bad input or usage.
pub const EXIT_BAD_INPUT: i32 = 2;
/// Exit code: a computation that could not complete.
pub const EXIT_COMPUTATION: i32 = 3;
/// Exit code: an output that could not be written.
pub const EXIT_OUTPUT: i32 = 4;

/// Any error eddyzone reports to the user.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// The scenario could not be read or is invalid.
    #[error(transparent)]
    Scenario(#[from] ScenarioError),
    /// A command-line option is invalid (the message names the option).
    #[error("{0}")]
    Usage(String),
    /// A computation could not complete.
    #[error(transparent)]
    Study(#[from] StudyError),
    /// The layout search failed.
    #[error(transparent)]
    Plan(#[from] PlanError),
    /// An output could not be made or written.
    #[error(transparent)]
    Output(#[from] OutputError),
    /// A sweep could not complete.
    #[error(transparent)]
    Sweep(#[from] SweepError),
    /// Shards could not be made or merged.
    #[error(transparent)]
    Shard(#[from] ShardError),
}

impl From<serde_json::Error> for Error {
    fn from(e: serde_json::Error) -> Self {
        Error::Output(OutputError::Json(e))
    }
}

impl From<csv::Error> for Error {
    fn from(e: csv::Error) -> Self {
        Error::Output(OutputError::Csv(e))
    }
}

/// The process exit code of an error.
pub fn exit_code(e: &Error) -> i32 {
    match e {
        Error::Scenario(_)
        | Error::Usage(_)
        | Error::Plan(
            PlanError::NoPlan
            | PlanError::LengthTooShort { .. }
            | PlanError::Study(StudyError::SampleBudget { .. }),
        )
        | Error::Study(StudyError::SampleBudget { .. }) => EXIT_BAD_INPUT,
        Error::Study(_) | Error::Plan(PlanError::Study(_)) => EXIT_COMPUTATION,
        Error::Output(_) => EXIT_OUTPUT,
        Error::Sweep(e) | Error::Shard(ShardError::Sweep(e)) => sweep_code(e),
        // Shard files that do not make one sweep, or a bad K/N.
        Error::Shard(_) => EXIT_BAD_INPUT,
    }
}

/// The exit code of a sweep error.
fn sweep_code(e: &SweepError) -> i32 {
    match e {
        SweepError::NoSweep | SweepError::NoCase(_) | SweepError::Reread(_) => EXIT_BAD_INPUT,
        // A sample that is no valid scenario: the sweep block's draws reach outside the inputs.
        SweepError::Write(WriteError::Reread(_)) => EXIT_BAD_INPUT,
        SweepError::Write(_) => EXIT_OUTPUT,
        SweepError::Study(_) | SweepError::NoSamples => EXIT_COMPUTATION,
    }
}
