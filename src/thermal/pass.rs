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
//! the power into cell k of a pair at front position x is v·f(v, T_k)·|overlap ∩ cell k|. With
//! v·dt = dx the energy of cell k is ∫ |f(v(x), T_k)|·|overlap ∩ cell k|(x) |dx| along the path.
//! Between two samples (every `sample_dt_s` plus every event) f is taken as linear in x, and the
//! overlap with the cell — piecewise linear in x, with breaks where a window edge meets a cell or
//! fin edge — is integrated exactly piece by piece, so the cells share the energy without the
//! aliasing a time quadrature shows when the magnets move more than a cell per sample. The sum
//! differs from the fin energy the integrator carries only by the curvature of f between samples
//! (reported as `quadrature_correction`, typically 1e-5 or less); the cell energies are then
//! scaled by the fin's integrated energy over their sum so that they add up to it exactly. The rise of a cell is
//! ΔT_k = E_k/(ρ·c_p·t·h_a·len_k), with only the active height h_a heated (conservative: the
//! heat has no time to spread across the fin during a pass).

use super::ThermalError;
use crate::dynamics::integrate::TempField;
use crate::dynamics::model::{active_pairs, ActivePair, PairLaw};
use crate::dynamics::{simulate_case, BrakeTables, RunOptions, RunResult, Sampling};
use crate::scenario::{Case, Fin, Mount, Scenario};

/// Default cell length along track fins, m (5 cm: a tenth of a typical magnet unit, finer than
/// the temperature gradients a pass leaves).
pub const DEFAULT_CELL_M: f64 = crate::scenario::defaults::HEAT_CELL_M;

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

/// ∫ f(x)·overlap(x) |dx| over the front's move from `xa` to `xb` for cell [c0, c1], with f
/// linear from `fa` to `fb` and the overlap integrated exactly between its breaks (the product of
/// two linear functions is integrated exactly by Simpson's rule).
fn interval_cell_energy(
    pair: &ActivePair,
    c0: f64,
    c1: f64,
    xa: f64,
    xb: f64,
    fa: f64,
    fb: f64,
) -> f64 {
    let (lo, hi) = if xa <= xb { (xa, xb) } else { (xb, xa) };
    if hi - lo <= 0.0 {
        return 0.0;
    }
    let overlap = &pair.spec.overlap;
    // Front positions where a window edge meets a cell or element edge.
    let (cell, element) = (overlap.kinks_at(c0, c1), overlap.kinks());
    let mut breaks: [f64; 10] = [
        lo, hi, cell[0], cell[1], element[0], element[1], cell[2], cell[3], element[2], element[3],
    ];
    for b in breaks.iter_mut().skip(2) {
        *b = b.clamp(lo, hi);
    }
    breaks.sort_by(f64::total_cmp);
    let f_at = |x: f64| fa + (fb - fa) * (x - xa) / (xb - xa);
    let mut total = 0.0;
    for w in breaks.windows(2) {
        let (p, q) = (w[0], w[1]);
        if q - p <= 0.0 {
            continue;
        }
        let m = 0.5 * (p + q);
        let g = |x: f64| f_at(x) * overlap.length_within_m(x, c0, c1);
        total += (q - p) * (g(p) + 4.0 * g(m) + g(q)) / 6.0;
    }
    total
}

/// Energy per cell of a track fin over the run, unscaled: for every move between samples and
/// every pair of the fin, the cells its overlap window sweeps get [`interval_cell_energy`] with
/// the force per metre at their temperature in `law_field`.
fn cell_energies(run: &RunResult, mine: &[&ActivePair], law_field: &TempField) -> Vec<f64> {
    let mut energy = vec![0.0; law_field.temps_c.len()];
    for w in run.samples.windows(2) {
        let (a, b) = (&w[0], &w[1]);
        if (b.s_m - a.s_m).abs() <= 0.0 {
            continue;
        }
        for pair in mine {
            // Cells the window touches during the move.
            let Some((lo, hi)) = pair.spec.overlap.swept(a.s_m.min(b.s_m), a.s_m.max(b.s_m)) else {
                continue;
            };
            for (k, c0, c1) in law_field.cells_touching(lo, hi) {
                let t_k = law_field.temps_c[k];
                let fa = pair.force_per_m_n(a.v_m_s, t_k).abs();
                let fb = pair.force_per_m_n(b.v_m_s, t_k).abs();
                energy[k] += interval_cell_energy(pair, c0, c1, a.s_m, b.s_m, fa, fb);
            }
        }
    }
    energy
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
                let energy = cell_energies(&run, &mine, &law_field);
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

    /// Splitting the overlap at cell boundaries is a partition: with a constant force per metre f
    /// the cell energies of a move add up to f·∫ overlap dx (additivity of the overlap length),
    /// here against a 200 000-point midpoint quadrature of the pair's overlap. Tolerance 1e-9
    /// relative. A linear force is integrated exactly per cell: checked against the same
    /// quadrature of f(x)·overlap(x).
    #[test]
    fn cell_energies_partition_the_pair_energy() {
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
        for (xa, xb, fa, fb) in [
            (34.3, 34.47, 100.0, 100.0),
            (40.0, 40.3, 50.0, 80.0),
            (57.9, 58.6, 30.0, 10.0),
            (45.2, 45.0, 20.0, 20.0),
        ] {
            let mut cells = 0.0;
            for pair in &mine {
                for k in 0..field.temps_c.len() {
                    let c0 = field.start_m + k as f64 * field.cell_m;
                    cells += interval_cell_energy(pair, c0, c0 + field.cell_m, xa, xb, fa, fb);
                }
            }
            let n = 200_000;
            let h = (xb - xa) / n as f64;
            let direct: f64 = (0..n)
                .map(|i| {
                    let x = xa + (i as f64 + 0.5) * h;
                    let f = fa + (fb - fa) * (x - xa) / (xb - xa);
                    mine.iter()
                        .map(|q| f * q.spec.overlap.length_m(x))
                        .sum::<f64>()
                        * h.abs()
                })
                .sum();
            assert!(
                (cells - direct).abs() <= 1e-9 * direct.abs().max(1.0),
                "{xa}..{xb}: {cells} vs {direct}"
            );
        }
    }
}
