//! Heat of one pass: the energy each fin takes up, and for fins along the track where along the
//! fin it is deposited.
//!
//! Vehicle fins are lumped: the dynamics integrates each fin's dissipated energy E with the
//! motion (state index 4 + fin) and its temperature T = T0 + E/(m·c_p) feeds back into σ(T)
//! during the pass; the rise is ΔT = E/(m·c_p) with m the whole fin (first law for a body of
//! uniform temperature, Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 2007, §5.2).
//!
//! Track fins are split into cells of `cell_m` (default 5 cm) from the fin's upstream end. A
//! magnet unit over the fin dissipates a power density that is uniform over its overlap with the
//! fin (the drag force per metre of overlap does not depend on where in the overlap it acts), so
//! the power into cell k of a pair at front position x is v·f(v, T_k)·|overlap ∩ cell k|. The
//! cell energies are that power integrated over time with the trapezoid rule on the run's
//! samples (every `sample_dt_s` plus every event, including each force kink). The quadrature
//! differs from the fin energy the integrator carries by the trapezoid error (reported as
//! `quadrature_correction`, typically 1e-4 or less); the cell energies are then scaled by the
//! fin's integrated energy over their sum so that they add up to it exactly. The rise of a cell is
//! ΔT_k = E_k/(ρ·c_p·t·h_a·len_k), with only the active height h_a heated (conservative: the
//! heat has no time to spread across the fin during a pass).

use super::ThermalError;
use crate::dynamics::integrate::TempField;
use crate::dynamics::model::{active_pairs, ActivePair, PairLaw};
use crate::dynamics::{simulate_case, BrakeTables, RunOptions, RunResult, Sampling};
use crate::scenario::{Case, Fin, Mount, Scenario};

/// Default cell length along track fins, m (5 cm: a tenth of a typical magnet unit, finer than
/// the temperature gradients a pass leaves).
pub const DEFAULT_CELL_M: f64 = 0.05;

/// The thermal state of a fin between passes.
#[derive(Debug, Clone, PartialEq)]
pub enum FinState {
    /// A vehicle fin: one lumped temperature, °C.
    Lumped(f64),
    /// A track fin: a temperature per cell.
    Field(TempField),
}

impl FinState {
    /// Highest temperature of the fin, °C.
    pub fn peak_c(&self) -> f64 {
        match self {
            FinState::Lumped(t) => *t,
            FinState::Field(f) => f.temps_c.iter().copied().fold(f64::NEG_INFINITY, f64::max),
        }
    }
}

/// Heat capacity data of a fin.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FinCapacity {
    /// Lumped heat capacity of the whole fin, J/K (vehicle fins).
    pub whole_j_k: f64,
    /// Heat capacity per metre of the heated strip ρ·c_p·t·h_a, J/(m·K) (track fins).
    pub per_m_j_m_k: f64,
    /// Heated height (active height; the fin height for measured curves), m.
    pub heated_height_m: f64,
}

/// Heat capacities of a fin: whole fin and heated strip. For the strip, the smallest active
/// height of the fin's pairs is used (conservative); pairs with measured curves carry no pole
/// height, so they count the full fin height.
pub fn fin_capacity(
    fin: &Fin,
    fin_index: usize,
    tables: &BrakeTables,
) -> Result<FinCapacity, ThermalError> {
    let m = &fin.material;
    let rho_c = m.density_kg_m3 * m.specific_heat_j_kg_k;
    let heated_height_m = tables
        .pairs
        .iter()
        .filter(|p| p.fin == fin_index)
        .map(|p| match &p.law {
            PairLaw::Table {
                active_height_m, ..
            } => *active_height_m,
            PairLaw::Measured { .. } => fin.height_m,
        })
        .fold(fin.height_m, f64::min);
    let whole_j_k = rho_c * fin.length_m * fin.height_m * fin.thickness_m;
    let per_m_j_m_k = rho_c * fin.thickness_m * heated_height_m;
    if !(whole_j_k.is_finite() && whole_j_k > 0.0 && per_m_j_m_k.is_finite() && per_m_j_m_k > 0.0) {
        return Err(ThermalError::Input(format!(
            "fin '{}': its heat capacity is not positive (density, specific heat and size must be > 0)",
            fin.name
        )));
    }
    Ok(FinCapacity {
        whole_j_k,
        per_m_j_m_k,
        heated_height_m,
    })
}

/// A uniform starting state for every fin of the scenario.
pub fn uniform_states(scenario: &Scenario, temp_c: f64, cell_m: f64) -> Vec<FinState> {
    scenario
        .fins
        .iter()
        .map(|f| match f.mount {
            Mount::Vehicle { .. } => FinState::Lumped(temp_c),
            Mount::Track { start_m } => {
                let n = ((f.length_m / cell_m).ceil() as usize).max(1);
                FinState::Field(TempField {
                    start_m,
                    cell_m,
                    temps_c: vec![temp_c; n],
                })
            }
        })
        .collect()
}

/// What one pass did to one fin.
#[derive(Debug, Clone, PartialEq)]
pub struct FinPass {
    /// Energy dissipated in the fin, J (from the integrator).
    pub energy_j: f64,
    /// State after the pass.
    pub end: FinState,
    /// Rise of each cell (track fins) or the single rise (vehicle fins), K.
    pub rise_k: Vec<f64>,
    /// Relative size of the trapezoid-rule correction of the cell energies (0 for vehicle fins).
    pub quadrature_correction: f64,
}

/// One pass with its heat.
#[derive(Debug, Clone)]
pub struct PassHeat {
    /// The run (with full sampling).
    pub run: RunResult,
    /// Per fin, in scenario order.
    pub fins: Vec<FinPass>,
}

/// Overlap window [lo, hi] of a pair's track element for the vehicle front at x, m.
fn window(pair: &ActivePair, x: f64) -> Option<(f64, f64)> {
    let s = &pair.spec;
    let u = x - s.vehicle_offset_m;
    let hi = u.min(s.track_start_m + s.track_len_m);
    let lo = (u - s.vehicle_len_m).max(s.track_start_m);
    (hi > lo).then_some((lo, hi))
}

/// Adds each cell's power at (x, v) to `power_w` for the pairs on one track fin.
fn cell_power(pairs: &[&ActivePair], field: &TempField, x: f64, v: f64, power_w: &mut [f64]) {
    let n = field.temps_c.len();
    for pair in pairs {
        let Some((lo, hi)) = window(pair, x) else {
            continue;
        };
        let first = ((lo - field.start_m) / field.cell_m).floor().max(0.0) as usize;
        for (k, p) in power_w.iter_mut().enumerate().take(n).skip(first) {
            let c0 = field.start_m + k as f64 * field.cell_m;
            if c0 >= hi {
                break;
            }
            let part = hi.min(c0 + field.cell_m) - lo.max(c0);
            if part > 0.0 {
                *p += v * pair.force_per_m_n(v, field.temps_c[k]) * part;
            }
        }
    }
}

/// Runs one pass of a case from the given fin states. With `coupling` the states set the fins'
/// conductivity (and vehicle fins follow their own heating during the pass); without it every
/// pass runs at the case's fin temperature and only the heat bookkeeping uses the states.
pub fn run_pass(
    scenario: &Scenario,
    tables: &BrakeTables,
    case: &Case,
    states: &[FinState],
    coupling: bool,
    sample_dt_s: f64,
) -> Result<PassHeat, ThermalError> {
    let n = scenario.fins.len();
    if states.len() != n {
        return Err(ThermalError::Input(format!(
            "{} fin states for {} fins",
            states.len(),
            n
        )));
    }
    let caps: Vec<FinCapacity> = scenario
        .fins
        .iter()
        .enumerate()
        .map(|(i, f)| fin_capacity(f, i, tables))
        .collect::<Result<_, _>>()?;
    let mut options = RunOptions {
        sample_dt_s,
        sampling: Sampling::Full,
        thermal_feedback: coupling,
        ..RunOptions::default()
    };
    if coupling {
        options.fin_start_temps_c = Some(
            states
                .iter()
                .map(|s| match s {
                    FinState::Lumped(t) => *t,
                    FinState::Field(_) => case.fin_temp_c,
                })
                .collect(),
        );
        options.track_fin_fields = Some(
            states
                .iter()
                .map(|s| match s {
                    FinState::Lumped(_) => None,
                    FinState::Field(f) => Some(f.clone()),
                })
                .collect(),
        );
    }
    let run = simulate_case(scenario, tables, case, &options)?;
    let pairs = active_pairs(scenario, tables, case);
    let mut fins = Vec::with_capacity(n);
    for (i, state) in states.iter().enumerate() {
        let energy_j = run.fins.get(i).map_or(0.0, |h| h.energy_j);
        match state {
            FinState::Lumped(t0) => {
                let rise = energy_j / caps[i].whole_j_k;
                fins.push(FinPass {
                    energy_j,
                    end: FinState::Lumped(t0 + rise),
                    rise_k: vec![rise],
                    quadrature_correction: 0.0,
                });
            }
            FinState::Field(field) => {
                // The force law's temperatures: the field when coupled, else the case's.
                let law_field = if coupling {
                    field.clone()
                } else {
                    TempField {
                        temps_c: vec![case.fin_temp_c; field.temps_c.len()],
                        ..field.clone()
                    }
                };
                let mine: Vec<&ActivePair> = pairs.iter().filter(|p| p.spec.fin == i).collect();
                let cells = field.temps_c.len();
                let mut energy = vec![0.0; cells];
                let mut p_prev = vec![0.0; cells];
                let mut p_now = vec![0.0; cells];
                let mut t_prev: Option<f64> = None;
                for s in &run.samples {
                    p_now.iter_mut().for_each(|p| *p = 0.0);
                    cell_power(&mine, &law_field, s.s_m, s.v_m_s, &mut p_now);
                    if let Some(tp) = t_prev {
                        let h = s.t_s - tp;
                        if h > 0.0 {
                            for k in 0..cells {
                                energy[k] += 0.5 * h * (p_prev[k] + p_now[k]);
                            }
                        }
                    }
                    std::mem::swap(&mut p_prev, &mut p_now);
                    t_prev = Some(s.t_s);
                }
                let sum: f64 = energy.iter().sum();
                let (scale, correction) = if sum > 0.0 {
                    (energy_j / sum, (energy_j / sum - 1.0).abs())
                } else {
                    (0.0, 0.0)
                };
                let fin = &scenario.fins[i];
                let rise_k: Vec<f64> = energy
                    .iter()
                    .enumerate()
                    .map(|(k, e)| {
                        let c0 = k as f64 * field.cell_m;
                        let len = (fin.length_m.min(c0 + field.cell_m) - c0).max(1e-12);
                        e * scale / (caps[i].per_m_j_m_k * len)
                    })
                    .collect();
                let end = TempField {
                    temps_c: field
                        .temps_c
                        .iter()
                        .zip(&rise_k)
                        .map(|(t, r)| t + r)
                        .collect(),
                    ..field.clone()
                };
                fins.push(FinPass {
                    energy_j,
                    end: FinState::Field(end),
                    rise_k,
                    quadrature_correction: correction,
                });
            }
        }
    }
    Ok(PassHeat { run, fins })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Splitting the overlap at cell boundaries is a partition: at a uniform temperature the cell
    /// powers add up to v·f(v)·overlap (additivity of the overlap length). Tolerance 1e-12 relative.
    #[test]
    fn cell_powers_partition_the_pair_power() {
        let s = crate::scenario::load(std::path::Path::new(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/scenarios/tower-catch-brake.yaml"
        )))
        .unwrap();
        let tables = BrakeTables::build(&s).unwrap();
        let pairs = active_pairs(&s, &tables, &s.cases[0]);
        let mine: Vec<&ActivePair> = pairs.iter().filter(|p| p.spec.fin == 0).collect();
        let FinState::Field(field) = uniform_states(&s, 20.0, DEFAULT_CELL_M).remove(0) else {
            panic!("track fin")
        };
        for x in [34.3, 35.123, 40.0, 57.9, 60.5] {
            let v = 7.5;
            let mut p = vec![0.0; field.temps_c.len()];
            cell_power(&mine, &field, x, v, &mut p);
            let direct: f64 = mine
                .iter()
                .map(|q| v * q.force_per_m_n(v, 20.0) * q.spec.overlap_m(x))
                .sum();
            let sum: f64 = p.iter().sum();
            assert!(
                (sum - direct).abs() <= 1e-12 * direct.abs().max(1.0),
                "x = {x}: {sum} vs {direct}"
            );
        }
    }
}
