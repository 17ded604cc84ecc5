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

/// One fin in `heat --json`.
#[derive(Debug, Serialize)]
pub struct HeatFinJson<'a> {
    fin: &'a str,
    mount: &'a str,
    energy_per_pass_j: f64,
    rise_per_pass_k: f64,
    peak_temperature_c: f64,
    mean_temperature_c: f64,
    steady_peak_temperature_c: f64,
    steady_mean_temperature_c: f64,
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
    magnet_rise_mean_k: Option<f64>,
    magnet_rise_bound_k: Option<f64>,
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
                            mean_temperature_c: f.mean_temperature_c,
                            steady_peak_temperature_c: f.steady_peak_temperature_c,
                            steady_mean_temperature_c: f.steady_mean_temperature_c,
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
                    magnet_rise_mean_k: h.magnet_rise.map(|r| r.mean_k),
                    magnet_rise_bound_k: h.magnet_rise.map(|r| r.bound_k),
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
