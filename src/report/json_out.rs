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

/// One fin in `heat --json`.
#[derive(Debug, Serialize)]
pub struct HeatFinJson<'a> {
    fin: &'a str,
    mount: &'a str,
    energy_per_pass_j: f64,
    rise_per_pass_k: f64,
    peak_temperature_c: f64,
    steady_peak_temperature_c: f64,
    steady_start_temperature_c: f64,
    cycles_to_steady: Option<u32>,
    time_constant_s: Option<f64>,
}

/// One case in `heat --json`.
#[derive(Debug, Serialize)]
pub struct HeatCaseJson<'a> {
    case: &'a str,
    fins: Vec<HeatFinJson<'a>>,
    steady_peak_fin_temperature_c: f64,
    cycles_to_steady: Option<u32>,
    cycles_run: usize,
    exit_speed_first_m_s: Option<f64>,
    exit_speed_steady_m_s: Option<f64>,
    peak_decel_first_g: Option<f64>,
    peak_decel_steady_g: Option<f64>,
    magnet_temp_c: f64,
    cycles: &'a [crate::thermal::CycleRow],
    warnings: &'a [String],
}

/// The `heat --json` document.
#[derive(Debug, Serialize)]
pub struct HeatJson<'a> {
    version: &'a str,
    scenario: &'a str,
    duty: Option<crate::scenario::Duty>,
    note: Option<&'a str>,
    cases: Vec<HeatCaseJson<'a>>,
}

impl<'a> HeatJson<'a> {
    /// The document of the heat of a scenario's cases.
    pub fn new(s: &'a crate::scenario::Scenario, heats: &'a [crate::thermal::CaseHeat]) -> Self {
        HeatJson {
            version: VERSION,
            scenario: &s.name,
            duty: s.duty,
            note: s
                .duty
                .is_none()
                .then_some(super::terminal::SINGLE_PASS_NOTE),
            cases: heats
                .iter()
                .map(|h| HeatCaseJson {
                    case: &h.case,
                    fins: h
                        .fins
                        .iter()
                        .map(|f| HeatFinJson {
                            fin: &f.fin,
                            mount: f.mount,
                            energy_per_pass_j: f.energy_per_pass_j,
                            rise_per_pass_k: f.rise_per_pass_k,
                            peak_temperature_c: f.peak_temperature_c,
                            steady_peak_temperature_c: f.steady_peak_temperature_c,
                            steady_start_temperature_c: f.steady_start_temperature_c,
                            cycles_to_steady: f.cycles_to_steady,
                            time_constant_s: f.time_constant_s,
                        })
                        .collect(),
                    steady_peak_fin_temperature_c: h.steady_peak_fin_temperature_c,
                    cycles_to_steady: h.cycles_to_steady,
                    cycles_run: h.cycles.len(),
                    exit_speed_first_m_s: h.exit_speed_first_m_s,
                    exit_speed_steady_m_s: h.exit_speed_steady_m_s,
                    peak_decel_first_g: h.peak_decel_first_g,
                    peak_decel_steady_g: h.peak_decel_steady_g,
                    magnet_temp_c: h.magnet_temp_c,
                    cycles: &h.cycles,
                    warnings: &h.warnings,
                })
                .collect(),
        }
    }
}

/// The `plan --json` document.
#[derive(Debug, Serialize)]
pub struct PlanJson<'a> {
    /// A layout passed every case.
    pub feasible: bool,
    /// m.
    pub zone_length_m: f64,
    /// Modules.
    pub modules: &'a [crate::plan::PlacedModule],
    /// Binding case and margin of each check.
    pub binding: &'a [crate::plan::Binding],
    /// Infeasible: which constraint binds.
    pub reason: Option<&'a str>,
    /// Candidates simulated.
    pub candidates_simulated: usize,
}

impl<'a> PlanJson<'a> {
    /// The document of a plan result.
    pub fn new(r: &'a crate::plan::PlanResult) -> Self {
        PlanJson {
            feasible: r.feasible,
            zone_length_m: r.zone_length_m,
            modules: &r.modules,
            binding: &r.binding,
            reason: r.reason.as_deref(),
            candidates_simulated: r.candidates_simulated,
        }
    }
}

/// Pretty JSON with a final newline, as every `--json` prints it.
pub fn pretty<T: Serialize + ?Sized>(value: &T) -> serde_json::Result<String> {
    serde_json::to_string_pretty(value).map(|s| s + "\n")
}
