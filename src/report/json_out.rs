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
    pub cases: Vec<RunCaseJson<'a>>,
}

/// One case of `run --json`: the run as it serializes itself, and the peak felt deceleration
/// beside the net one (`peak_decel_g`).
#[derive(Debug, Clone, Serialize)]
pub struct RunCaseJson<'a> {
    /// The run.
    #[serde(flatten)]
    pub run: &'a RunResult,
    /// [`RunResult::peak_felt_decel_g`].
    pub peak_felt_decel_g: Option<f64>,
}

impl<'a> RunJson<'a> {
    /// From the results of a scenario.
    pub fn new(scenario: &'a str, results: &'a [RunResult]) -> Self {
        Self {
            scenario,
            version: VERSION,
            cases: results
                .iter()
                .map(|run| RunCaseJson {
                    run,
                    peak_felt_decel_g: run.peak_felt_decel_g(),
                })
                .collect(),
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
    judged_magnet_temp_c: f64,
    lift: Option<crate::thermal::lift::LiftPass>,
    cycles: &'a [crate::thermal::CycleRow],
    warnings: &'a [String],
}

/// The `heat --json` document.
#[derive(Debug, Serialize)]
pub struct HeatJson<'a> {
    version: &'a str,
    scenario: &'a str,
    duty: Option<&'a crate::scenario::Duty>,
    note: Option<&'a str>,
    cases: Vec<HeatCaseJson<'a>>,
}

impl<'a> HeatJson<'a> {
    /// The document of the heat of a scenario's cases.
    pub fn new(s: &'a crate::scenario::Scenario, heats: &'a [crate::thermal::CaseHeat]) -> Self {
        HeatJson {
            version: VERSION,
            scenario: &s.name,
            duty: s.duty.as_ref(),
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
                    judged_magnet_temp_c: h.judged_magnet_temp_c,
                    lift: h.lift,
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
    /// `feasible`, `proven_infeasible` or `not_found`.
    pub outcome: &'static str,
    /// What was optimised.
    pub objective: &'a crate::plan::Objective,
    /// A layout passed every case.
    pub feasible: bool,
    /// The feasible layout (None otherwise).
    pub plan: Option<PlannedJson<'a>>,
    /// Proven infeasible: why.
    pub reason: Option<&'a crate::plan::Infeasibility>,
    /// The reason in words.
    pub reason_text: Option<String>,
    /// Not found: the closest layout.
    pub near_miss: Option<PlannedJson<'a>>,
    /// Not found: its failing checks, worst first.
    pub near_miss_failing: Option<&'a [crate::plan::Failing]>,
    /// What the search covered.
    pub coverage: &'a crate::plan::Coverage,
}

/// A reported layout in `plan --json`.
#[derive(Debug, Serialize)]
pub struct PlannedJson<'a> {
    /// First module start to last module end, m.
    pub zone_length_m: f64,
    /// Last module end, m.
    pub zone_end_m: f64,
    /// Smallest margin/|limit| over every limited check.
    pub worst_relative_margin: Option<f64>,
    /// Modules.
    pub modules: &'a [crate::plan::ModuleRow],
    /// Binding case and margin (with unit) of each check.
    pub binding: &'a [crate::plan::Binding],
}

impl<'a> PlannedJson<'a> {
    fn new(p: &'a crate::plan::Planned) -> Self {
        PlannedJson {
            zone_length_m: p.zone_length_m,
            zone_end_m: p.zone_end_m,
            worst_relative_margin: p.worst_relative_margin,
            modules: &p.modules,
            binding: &p.binding,
        }
    }
}

impl<'a> PlanJson<'a> {
    /// The document of a plan result.
    pub fn new(r: &'a crate::plan::PlanResult) -> Self {
        use crate::plan::PlanOutcome;
        let (plan, reason, near) = match &r.outcome {
            PlanOutcome::Feasible { plan, .. } => (Some(PlannedJson::new(plan)), None, None),
            PlanOutcome::ProvenInfeasible { reason, .. } => (None, Some(reason), None),
            PlanOutcome::NotFound { near_miss, .. } => (None, None, near_miss.as_deref()),
        };
        PlanJson {
            outcome: r.outcome_name(),
            objective: &r.objective,
            feasible: plan.is_some(),
            plan,
            reason,
            reason_text: reason.map(|x| x.to_string()),
            near_miss: near.map(|n| PlannedJson::new(&n.plan)),
            near_miss_failing: near.map(|n| n.failing.as_slice()),
            coverage: r.coverage(),
        }
    }
}

/// Pretty JSON with a final newline, as every `--json` prints it.
pub fn pretty<T: Serialize + ?Sized>(value: &T) -> serde_json::Result<String> {
    serde_json::to_string_pretty(value).map(|s| s + "\n")
}
