//! Fin heating: over one pass (`pass`) and over a day of dispatches (`duty`).
//!
//! All braking energy ends up as heat in the fins. A hot fin conducts worse (σ(T) = σ20/(1 +
//! α·(T − 20 °C))), so it brakes less below the critical speed, where f ∝ σ·v, and somewhat more
//! above it, where the drag falls with σ·v. Pass after pass the fins cool by Newton's law between
//! dispatches and each pass runs with the temperatures they have then, until the peak changes by
//! less than 0.1 K per cycle.

mod cells;
pub mod duty;
pub mod height;
pub mod lift;
pub mod magnet;
pub mod pass;
pub mod sheet;

pub use duty::{cool_c, steady_peak_c, time_constant_s, STEADY_TOLERANCE_K};
pub use pass::{run_pass, FinState, PassHeat, DEFAULT_CELL_M};

use crate::constants::STANDARD_GRAVITY_M_S2 as G;
use crate::dynamics::{BrakeTables, DynamicsError, RunOptions, RunResult};
use crate::scenario::{Case, Cycles, Mount, Scenario};
use serde::Serialize;

/// Errors of the thermal layer.
#[derive(Debug, Clone, thiserror::Error)]
pub enum ThermalError {
    /// A pass could not be run.
    #[error(transparent)]
    Dynamics(#[from] DynamicsError),
    /// Bad input for the heat calculation.
    #[error("{0}")]
    Input(String),
}

/// Options of a heat calculation; defaults in `Default`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HeatOptions {
    /// Cell length along track fins, m (default 5 cm).
    pub cell_m: f64,
    /// Sample interval of each pass, s (default 5 ms: the trapezoid correction of the cell
    /// energies stays near 1e-6 on the demos, and the passes of a duty cycle stay quick; peak
    /// deceleration is read from these samples and from the events).
    pub sample_dt_s: f64,
    /// The fin temperatures set the conductivity (default true). Off, every pass runs at the
    /// case's fin temperature and only the bookkeeping heats and cools (for checks of the loop).
    pub coupling: bool,
}

impl Default for HeatOptions {
    fn default() -> Self {
        Self {
            cell_m: DEFAULT_CELL_M,
            sample_dt_s: 5e-3,
            coupling: true,
        }
    }
}

/// One dispatch of a duty cycle.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CycleRow {
    /// 1-based.
    pub cycle: u32,
    /// Signed exit speed, m/s (None: no exit, e.g. a stall).
    pub exit_speed_m_s: Option<f64>,
    /// Peak deceleration in the zone, g.
    pub peak_decel_g: Option<f64>,
    /// Braking energy of the pass, J.
    pub braking_energy_j: f64,
    /// Highest fin temperature right after the pass, over all fins, °C.
    pub peak_fin_temperature_c: f64,
    /// Highest temperature during the pass per fin (scenario order; vehicle fins: the hottest
    /// cell across the height), °C.
    pub fin_peaks_c: Vec<f64>,
    /// Mean (lumped) temperature right after the pass per fin, °C.
    pub fin_means_c: Vec<f64>,
}

/// Heat result of one fin.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FinHeatResult {
    /// Fin name.
    pub fin: String,
    /// "vehicle" or "track".
    pub mount: &'static str,
    /// Energy dissipated in the fin in the first pass, J.
    pub energy_per_pass_j: f64,
    /// Largest rise of the first pass, K.
    pub rise_per_pass_k: f64,
    /// Highest temperature of the first pass, °C (vehicle fins: the hottest cell across the
    /// height, which the verdict judges).
    pub peak_temperature_c: f64,
    /// Mean (lumped) temperature after the first pass, °C.
    pub mean_temperature_c: f64,
    /// Energy of the last pass, J.
    pub energy_last_pass_j: f64,
    /// Largest rise of the last pass, K.
    pub rise_last_pass_k: f64,
    /// Highest temperature of the last pass, °C.
    pub steady_peak_temperature_c: f64,
    /// Mean (lumped) temperature after the last pass, °C.
    pub steady_mean_temperature_c: f64,
    /// Highest temperature before the last dispatch (the steady pre-dispatch state with a duty
    /// block; the case's fin temperature without one), °C.
    pub steady_start_temperature_c: f64,
    /// First cycle whose peak differs from the previous one by less than 0.1 K (1 for a single
    /// pass; None if never reached).
    pub cycles_to_steady: Option<u32>,
    /// Cooling time constant ρ·c_p·t/(2h), s (None without a duty block or with h = 0).
    pub time_constant_s: Option<f64>,
    /// Heated height of a track fin: the height whose uniform rise equals the peak rise of the
    /// thin-sheet loss distribution (active height / peak-to-mean ratio), m (None for vehicle fins).
    pub heated_height_m: Option<f64>,
    /// Largest relative correction of the cell quadrature over all passes (track fins).
    pub quadrature_correction: f64,
}

/// Temperature along a track fin after the last pass.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TrackProfile {
    /// Fin name.
    pub fin: String,
    /// (cell centre s m, temperature °C).
    pub temps: Vec<(f64, f64)>,
    /// Rise of each cell in the last pass, K (same order).
    pub rise_k: Vec<f64>,
}

impl TrackProfile {
    /// Temperature of the cell holding track position `s_m`, °C (None outside the fin).
    pub fn temp_at(&self, s_m: f64) -> Option<f64> {
        let n = self.temps.len();
        if n == 0 {
            return None;
        }
        // Cell centres are ascending; the cell holding s is the one with the nearest centre.
        let half = if n > 1 {
            0.5 * (self.temps[1].0 - self.temps[0].0)
        } else {
            f64::INFINITY
        };
        if s_m < self.temps[0].0 - half || s_m > self.temps[n - 1].0 + half {
            return None;
        }
        let k = self.temps.partition_point(|c| c.0 < s_m);
        let best = match k {
            0 => 0,
            k if k >= n => n - 1,
            k if (self.temps[k].0 - s_m) < (s_m - self.temps[k - 1].0) => k,
            k => k - 1,
        };
        Some(self.temps[best].1)
    }
}

/// Heat result of one case.
#[derive(Debug, Clone, Serialize)]
pub struct CaseHeat {
    /// Case name.
    pub case: String,
    /// Whether a duty block drove the cycles (false: a single pass).
    pub duty: bool,
    /// Per fin.
    pub fins: Vec<FinHeatResult>,
    /// Highest fin temperature after the last pass, over all fins, °C.
    pub steady_peak_fin_temperature_c: f64,
    /// Highest fin temperature after the first pass, °C.
    pub first_peak_fin_temperature_c: f64,
    /// First cycle at which the peak over all fins changed by less than 0.1 K (None: not reached).
    pub cycles_to_steady: Option<u32>,
    /// Every cycle.
    pub cycles: Vec<CycleRow>,
    /// Exit speed of the first pass, m/s.
    pub exit_speed_first_m_s: Option<f64>,
    /// Exit speed of the last pass, m/s.
    pub exit_speed_steady_m_s: Option<f64>,
    /// Peak deceleration of the first pass, g.
    pub peak_decel_first_g: Option<f64>,
    /// Peak deceleration of the last pass, g.
    pub peak_decel_steady_g: Option<f64>,
    /// Track fins: temperature along the track after the last pass.
    pub track_profiles: Vec<TrackProfile>,
    /// Magnet temperature of the case, °C (an input).
    pub magnet_temp_c: f64,
    /// Magnet temperature the checks judge at the duty's steady state: the input plus the
    /// estimated mean rise when `duty.magnets.add_to_magnet_temperature` (the default), °C.
    pub judged_magnet_temp_c: f64,
    /// Estimated warming of the magnets by the hot fins across the gap over the duty (None
    /// without a duty block).
    pub magnet_rise: Option<magnet::MagnetRise>,
    /// The last lift pass (None without `duty.lift`).
    pub lift: Option<lift::LiftPass>,
    /// Warnings (magnets above their grade limit, no steady state within the cap, ...).
    pub warnings: Vec<String>,
    /// The last pass (full samples, for profiles).
    #[serde(skip)]
    pub last_run: Option<RunResult>,
    /// The fin states the last pass started from: the duty cycle's steady pre-dispatch state
    /// (the case's uniform fin temperature without a duty block).
    #[serde(skip)]
    pub steady_start: Vec<FinState>,
}

impl CaseHeat {
    /// The fin with the highest steady peak temperature (None without fins).
    pub fn hottest_fin(&self) -> Option<&FinHeatResult> {
        self.fins.iter().max_by(|a, b| {
            a.steady_peak_temperature_c
                .total_cmp(&b.steady_peak_temperature_c)
        })
    }
}

fn mount_name(m: Mount) -> &'static str {
    match m {
        Mount::Vehicle { .. } => "vehicle",
        Mount::Track { .. } => "track",
    }
}

fn max_of(v: &[f64]) -> f64 {
    v.iter().copied().fold(f64::NEG_INFINITY, f64::max)
}

/// The heat of one case over one pass (no duty block) or over the duty cycle.
pub fn heat_case(
    scenario: &Scenario,
    tables: &BrakeTables,
    case: &Case,
    options: &HeatOptions,
) -> Result<CaseHeat, ThermalError> {
    if !(options.cell_m.is_finite() && options.cell_m >= 1e-3) {
        return Err(ThermalError::Input(format!(
            "cell length {} m: must be at least 1 mm",
            options.cell_m
        )));
    }
    if !(options.sample_dt_s.is_finite()
        && options.sample_dt_s >= 1e-5
        && options.sample_dt_s <= 0.1)
    {
        return Err(ThermalError::Input(format!(
            "sample interval {} s: must be 1e-5 to 0.1 s",
            options.sample_dt_s
        )));
    }
    let duty = scenario.duty.as_ref();
    let (max_cycles, stop_at_steady) = match duty.map(|d| d.cycles) {
        None => (1, false),
        Some(Cycles::Count(n)) => (n.max(1), false),
        Some(Cycles::UntilSteady { max_cycles }) => (max_cycles.max(1), true),
    };
    let taus: Vec<Option<f64>> = scenario
        .fins
        .iter()
        .map(|f| duty.map(|d| time_constant_s(f, d.film_coefficient_w_m2_k)))
        .collect();
    let n_fins = scenario.fins.len();
    let caps = pass::fin_capacities(scenario, tables)?;
    let mut states = pass::uniform_states(scenario, case.fin_temp_c, options.cell_m);
    let mut last_start = states.clone();
    let mut cycles: Vec<CycleRow> = Vec::new();
    let mut first: Option<Vec<pass::FinPass>> = None;
    let mut last: Option<PassHeat> = None;
    let mut fin_steady: Vec<Option<u32>> = vec![None; n_fins];
    let mut case_steady: Option<u32> = None;
    let mut corrections = vec![0.0f64; n_fins];
    let mut uncoupled_cache: Option<PassHeat> = None;
    let mut warnings = Vec::new();
    let mut lift_pass: Option<lift::LiftPass> = None;

    for cycle in 1..=max_cycles {
        let heat = match (&uncoupled_cache, options.coupling) {
            // Without coupling every pass is the same run; only the bookkeeping differs.
            (Some(c), false) => rebook(c, &states, &caps),
            _ => {
                let h = pass::run_pass_with(
                    scenario,
                    tables,
                    case,
                    &states,
                    options.coupling,
                    options.sample_dt_s,
                    &caps,
                )?;
                if !options.coupling {
                    uncoupled_cache = Some(h.clone());
                }
                h
            }
        };
        let fin_peaks: Vec<f64> = heat.fins.iter().map(|f| f.peak_c).collect();
        let fin_means: Vec<f64> = heat.fins.iter().map(|f| f.end.mean_c()).collect();
        for (c, f) in corrections.iter_mut().zip(&heat.fins) {
            *c = c.max(f.quadrature_correction);
        }
        let row = CycleRow {
            cycle,
            exit_speed_m_s: heat.run.exit_speed_m_s,
            peak_decel_g: heat.run.peak_decel_m_s2.map(|a| a / G),
            braking_energy_j: heat.run.braking_energy_j,
            peak_fin_temperature_c: max_of(&fin_peaks),
            fin_peaks_c: fin_peaks.clone(),
            fin_means_c: fin_means,
        };
        if let Some(prev) = cycles.last() {
            for i in 0..n_fins {
                if fin_steady[i].is_none()
                    && (fin_peaks[i] - prev.fin_peaks_c[i]).abs() < STEADY_TOLERANCE_K
                {
                    fin_steady[i] = Some(cycle);
                }
            }
            if case_steady.is_none()
                && (row.peak_fin_temperature_c - prev.peak_fin_temperature_c).abs()
                    < STEADY_TOLERANCE_K
            {
                case_steady = Some(cycle);
            }
        }
        cycles.push(row);
        if first.is_none() {
            first = Some(heat.fins.clone());
        }
        last_start = std::mem::replace(
            &mut states,
            heat.fins.iter().map(|f| f.end.clone()).collect(),
        );
        last = Some(heat);
        if let Some(speed) = duty.and_then(|d| d.lift.as_ref()) {
            lift_pass = Some(lift::apply_lift(
                scenario,
                tables,
                case,
                &mut states,
                speed,
                &caps,
            )?);
        }
        if stop_at_steady && case_steady.is_some() {
            break;
        }
        if let Some(d) = duty {
            if cycle < max_cycles {
                for (s, tau) in states.iter_mut().zip(&taus) {
                    duty::cool_state(s, d.ambient_c, d.interval_s, tau.unwrap_or(f64::INFINITY));
                }
            }
        }
    }
    let (Some(first), Some(last)) = (first, last) else {
        return Err(ThermalError::Input("no pass was run".into()));
    };
    if duty.is_none() {
        case_steady = Some(1);
        fin_steady = vec![Some(1); n_fins];
    } else if stop_at_steady && case_steady.is_none() {
        warnings.push(format!(
            "no steady state within {max_cycles} cycles (peak still changing by 0.1 K or more per cycle)"
        ));
    }
    let fins: Vec<FinHeatResult> = scenario
        .fins
        .iter()
        .enumerate()
        .map(|(i, f)| FinHeatResult {
            fin: f.name.clone(),
            mount: mount_name(f.mount),
            energy_per_pass_j: first[i].energy_j,
            rise_per_pass_k: max_of(&first[i].rise_k),
            peak_temperature_c: first[i].peak_c,
            mean_temperature_c: first[i].end.mean_c(),
            energy_last_pass_j: last.fins[i].energy_j,
            rise_last_pass_k: max_of(&last.fins[i].rise_k),
            steady_peak_temperature_c: last.fins[i].peak_c,
            steady_mean_temperature_c: last.fins[i].end.mean_c(),
            steady_start_temperature_c: last_start[i].peak_c(),
            cycles_to_steady: fin_steady[i],
            time_constant_s: taus[i].filter(|t| t.is_finite()),
            heated_height_m: matches!(f.mount, Mount::Track { .. })
                .then_some(caps[i].heated_height_m),
            quadrature_correction: corrections[i],
        })
        .collect();
    let track_profiles = scenario
        .fins
        .iter()
        .zip(&last.fins)
        .filter_map(|(f, p)| match &p.end {
            FinState::Field(field) => Some(TrackProfile {
                fin: f.name.clone(),
                temps: field
                    .temps_c
                    .iter()
                    .enumerate()
                    .map(|(k, t)| {
                        let c0 = k as f64 * field.cell_m;
                        let c1 = f.length_m.min(c0 + field.cell_m);
                        (field.start_m + 0.5 * (c0 + c1), *t)
                    })
                    .collect(),
                rise_k: p.rise_k.clone(),
            }),
            FinState::Height(_) => None,
        })
        .collect();
    let last_row = &cycles[cycles.len() - 1];
    let magnet_rise = match (duty, last.run.time_in_zone_s) {
        (Some(d), Some(exposed_s)) => d.magnets.rise(
            last_row.peak_fin_temperature_c,
            d.ambient_c,
            exposed_s + lift_pass.map_or(0.0, |l| l.time_in_brake_s),
            d.interval_s,
        ),
        _ => None,
    };
    let magnet_c = case.magnet_temp_c
        + match (duty, magnet_rise) {
            (Some(d), Some(r)) if d.magnets.add_to_magnet_temperature => r.mean_k,
            _ => 0.0,
        };
    for sec in &scenario.sections {
        if let Some(g) = sec.grade {
            if magnet_c > g.max_temperature_c() {
                warnings.push(format!(
                    "magnets of '{}' at {:.0} °C exceed the grade's working limit of {:.0} °C",
                    sec.name,
                    magnet_c,
                    g.max_temperature_c()
                ));
            }
        }
    }
    for (f, r) in scenario.fins.iter().zip(&fins) {
        let what = format!("fin '{}'", f.name);
        warnings.extend(
            f.material
                .temperature_warning(&what, r.steady_peak_temperature_c),
        );
    }
    warnings.extend(last.run.warnings.iter().cloned());
    let first_row = &cycles[0];
    Ok(CaseHeat {
        case: case.name.clone(),
        duty: duty.is_some(),
        steady_peak_fin_temperature_c: last_row.peak_fin_temperature_c,
        first_peak_fin_temperature_c: first_row.peak_fin_temperature_c,
        cycles_to_steady: case_steady,
        exit_speed_first_m_s: first_row.exit_speed_m_s,
        exit_speed_steady_m_s: last_row.exit_speed_m_s,
        peak_decel_first_g: first_row.peak_decel_g,
        peak_decel_steady_g: last_row.peak_decel_g,
        fins,
        track_profiles,
        magnet_temp_c: case.magnet_temp_c,
        judged_magnet_temp_c: magnet_c,
        magnet_rise,
        lift: lift_pass,
        warnings,
        last_run: Some(last.run),
        steady_start: last_start,
        cycles,
    })
}

/// The same pass with its heat laid onto new start states (no coupling: the run is unchanged).
fn rebook(c: &PassHeat, states: &[FinState], caps: &[pass::FinCapacity]) -> PassHeat {
    let fins = c
        .fins
        .iter()
        .zip(states)
        .zip(caps)
        .map(|((f, s), cap)| match s {
            FinState::Height(p) => pass::height_pass(&c.run, p, f.energy_j, cap),
            FinState::Field(field) => {
                let mut e = field.clone();
                e.temps_c
                    .iter_mut()
                    .zip(&f.rise_k)
                    .for_each(|(t, r)| *t += r);
                let peak_c = e.temps_c.iter().copied().fold(f64::NEG_INFINITY, f64::max);
                pass::FinPass {
                    end: FinState::Field(e),
                    peak_c,
                    ..f.clone()
                }
            }
        })
        .collect();
    PassHeat {
        run: c.run.clone(),
        fins,
    }
}

/// Run options that start a case from the given fin states: each vehicle fin at its lumped
/// temperature, each track fin with its temperature field (cells), on top of `base`.
pub fn start_from_states(states: &[FinState], case: &Case, base: RunOptions) -> RunOptions {
    RunOptions {
        fin_start_temps_c: Some(
            states
                .iter()
                .map(|s| match s {
                    FinState::Height(p) => p.mean_c(),
                    FinState::Field(_) => case.fin_temp_c,
                })
                .collect(),
        ),
        track_fin_fields: Some(
            states
                .iter()
                .map(|s| match s {
                    FinState::Height(_) => None,
                    FinState::Field(f) => Some(f.clone()),
                })
                .collect(),
        ),
        ..base
    }
}
