//! The top-level error: wraps each layer's error and maps it to an exit code.

use crate::scenario::validate::ScenarioError;

/// Exit code: everything passed.
pub const EXIT_OK: i32 = 0;
/// Exit code: a limit failed in `check` (or no feasible layout in `plan`).
pub const EXIT_LIMIT_FAILED: i32 = 1;
/// Exit code: bad input or usage.
pub const EXIT_BAD_INPUT: i32 = 2;

/// Any error eddyzone reports to the user.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// The scenario could not be read or is invalid.
    #[error(transparent)]
    Scenario(#[from] ScenarioError),
    /// A command-line option is invalid.
    #[error("{0}")]
    Usage(String),
    /// Writing output failed.
    #[error("{path}: {message}")]
    Output {
        /// The file or folder.
        path: String,
        /// What went wrong.
        message: String,
    },
    /// A computation could not be carried out for this input.
    #[error("{0}")]
    Compute(String),
}

impl Error {
    /// The process exit code for this error.
    pub fn exit_code(&self) -> i32 {
        match self {
            Error::Scenario(_) | Error::Usage(_) | Error::Compute(_) => EXIT_BAD_INPUT,
            Error::Output { .. } => EXIT_BAD_INPUT,
        }
    }
}
