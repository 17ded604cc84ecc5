//! Progress of long computations, reported to whoever drives the library.
//!
//! The library calls these hooks from worker threads; the command line implements them with a
//! progress bar on standard error, tests and embedders with [`Silent`].

/// Receives the progress of a study, a plan or a sweep. Every method has a do-nothing default.
pub trait Progress: Sync {
    /// A new stage begins: what it does, and how many steps it has when that is known.
    fn stage(&self, _what: &str, _total: Option<u64>) {}
    /// `steps` more steps of the current stage are done.
    fn advance(&self, _steps: u64) {}
    /// A short status line within the current stage (e.g. "zone length 12/30 slots").
    fn status(&self, _text: &str) {}
}

/// Reports nothing.
#[derive(Debug, Clone, Copy, Default)]
pub struct Silent;

impl Progress for Silent {}
