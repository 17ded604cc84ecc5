//! JSON documents: the shapes every command's `--json` prints.

use crate::curve::PairCurve;
use crate::dynamics::RunResult;
use crate::report::VERSION;
use serde::Serialize;

/// `run --json`: each case as [`RunResult`] serializes itself.
#[derive(Debug, Clone, Serialize)]
pub struct RunJson<'a> {
    /// Scenario name.
    pub scenario: &'a str,
    /// Tool version.
    pub version: &'static str,
    /// One entry per case.
    pub cases: &'a [RunResult],
}

impl<'a> RunJson<'a> {
    /// From the results of a scenario.
    pub fn new(scenario: &'a str, results: &'a [RunResult]) -> Self {
        Self {
            scenario,
            version: VERSION,
            cases: results,
        }
    }
}

/// `curve --format json`: the array of pair curves.
pub fn curves_json(curves: &[PairCurve]) -> serde_json::Result<String> {
    serde_json::to_string_pretty(curves)
}
