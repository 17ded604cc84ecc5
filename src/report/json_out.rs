//! JSON documents: the shapes every command's `--json` prints.

use crate::curve::PairCurve;
use crate::dynamics::RunResult;
use crate::report::VERSION;
use serde::Serialize;

/// One case of `run --json`.
#[derive(Debug, Clone, Serialize)]
pub struct RunCaseJson {
    /// Case name.
    pub case: String,
    /// kg.
    pub mass_kg: f64,
    /// cleared, stalled, rolled_back, time_limit.
    pub outcome: &'static str,
    /// m/s.
    pub entry_speed_m_s: Option<f64>,
    /// Signed, m/s.
    pub exit_speed_m_s: Option<f64>,
    /// m/s.
    pub min_speed_m_s: Option<f64>,
    /// m.
    pub stall_position_m: Option<f64>,
    /// m/s².
    pub peak_decel_m_s2: Option<f64>,
    /// g.
    pub peak_decel_g: Option<f64>,
    /// s.
    pub peak_decel_time_s: Option<f64>,
    /// m.
    pub peak_decel_position_m: Option<f64>,
    /// g/s.
    pub peak_onset_g_s: Option<f64>,
    /// s.
    pub time_in_zone_s: Option<f64>,
    /// J.
    pub braking_energy_j: f64,
    /// J.
    pub energy_residual_j: f64,
    /// N.
    pub peak_brake_force_n: f64,
    /// Accepted steps.
    pub steps: u64,
    /// Right-hand-side evaluations.
    pub rhs_evaluations: u64,
    /// Whether the motion reversed.
    pub reversed: bool,
    /// Warnings.
    pub warnings: Vec<String>,
}

impl From<&RunResult> for RunCaseJson {
    fn from(r: &RunResult) -> Self {
        Self {
            case: r.case.clone(),
            mass_kg: r.mass_kg,
            outcome: r.outcome.name(),
            entry_speed_m_s: r.entry_speed_m_s,
            exit_speed_m_s: r.exit_speed_m_s,
            min_speed_m_s: r.min_speed_m_s,
            stall_position_m: r.stall_position_m,
            peak_decel_m_s2: r.peak_decel_m_s2,
            peak_decel_g: r.peak_decel_g(),
            peak_decel_time_s: r.peak_decel_time_s,
            peak_decel_position_m: r.peak_decel_position_m,
            peak_onset_g_s: r.peak_onset_g_s,
            time_in_zone_s: r.time_in_zone_s,
            braking_energy_j: r.braking_energy_j,
            energy_residual_j: r.energy_residual_j,
            peak_brake_force_n: r.peak_brake_force_n,
            steps: r.steps,
            rhs_evaluations: r.rhs_evaluations,
            reversed: r.reversed,
            warnings: r.warnings.clone(),
        }
    }
}

/// `run --json`.
#[derive(Debug, Clone, Serialize)]
pub struct RunJson {
    /// Scenario name.
    pub scenario: String,
    /// Tool version.
    pub version: &'static str,
    /// One entry per case.
    pub cases: Vec<RunCaseJson>,
}

impl RunJson {
    /// From the results of a scenario.
    pub fn new(scenario: &str, results: &[RunResult]) -> Self {
        Self {
            scenario: scenario.to_string(),
            version: VERSION,
            cases: results.iter().map(RunCaseJson::from).collect(),
        }
    }
}

/// `curve --format json`: the array of pair curves.
pub fn curves_json(curves: &[PairCurve]) -> serde_json::Result<String> {
    serde_json::to_string_pretty(curves)
}
