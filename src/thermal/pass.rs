//! Heat of one pass: the energy each fin takes up, and for fins along the track where along the
//! fin it is deposited.
//!
//! For vehicle fins the dynamics integrates each fin's dissipated energy E with the motion
//! (state index 4 + fin) and its mean temperature T = T0 + E/(m·c_p) feeds back into σ(T)
//! during the pass, with m the whole fin (first law for a body of
//! uniform temperature, Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 2007, §5.2).
//!
//! Track fins are split into cells of `cell_m` (default 5 cm) from the fin's upstream end. A
//! magnet unit over the fin dissipates a power density that is uniform over its overlap with the
//! fin (the drag force per metre of overlap does not depend on where in the overlap it acts), so
//! the power into cell k of a pair at front position x is v·f(v, T_k)·|overlap ∩ cell k|. With
//! v·dt = dx the energy of cell k is ∫ |f(v(x), T_k)|·|overlap ∩ cell k|(x) |dx| along the path,
//! integrated on the integrator's dense output between the breaks of the overlap (see
//! [`super::cells`]), so the cells share the energy without the aliasing a time quadrature shows
//! when the magnets move more than a cell per sample. The sum differs from the fin energy the
//! integrator carries only by the quadrature error (reported as `quadrature_correction`,
//! typically 1e-9 or less); the cell energies are then scaled by the fin's integrated energy
//! over their sum so that they add up to it exactly. The rise of a cell is
//! ΔT_k = E_k/(ρ·c_p·t·h_e·len_k) at the hottest point across the height: h_e = 1/p_max with p
//! the thin-sheet loss density across the height ([`super::sheet`], normalised over the fin), so
//! the rise is that of mid-height (conservative: the heat has no time to spread across the fin
//! during a pass).
//!
//! Vehicle fins are resolved across their height ([`super::height`]): the same loss density
//! deposits the fin's energy in cells across the height, in time as the braking power, and the
//! cells conduct into each other during and after the pass. The force law reads their mean; the
//! hottest cell is the fin's peak.

use super::cells::PathNodes;
use super::height::{diffusivity_m2_s, height_weights, HeightProfile, Modes, HEIGHT_CELLS};
use super::sheet::SheetLoss;
use super::ThermalError;
use crate::dynamics::integrate::TempField;
use crate::dynamics::model::{active_pairs, mirror_fins, ActivePair, PairLaw};
use crate::dynamics::{simulate_case, BrakeTables, RunOptions, RunResult, Sampling};
use crate::scenario::{Case, Fin, Mount, Scenario};

/// Default cell length along track fins, m (5 cm: a tenth of a typical magnet unit, finer than
/// the temperature gradients a pass leaves).
pub const DEFAULT_CELL_M: f64 = crate::scenario::defaults::HEAT_CELL_M;

/// The thermal state of a fin between passes.
#[derive(Debug, Clone, PartialEq)]
pub enum FinState {
    /// A vehicle fin: its temperatures across the height (the force law reads their mean).
    Height(HeightProfile),
    /// A track fin: a temperature per cell.
    Field(TempField),
}

impl FinState {
    /// Highest temperature of the fin, °C.
    pub fn peak_c(&self) -> f64 {
        match self {
            FinState::Height(p) => p.peak_c(),
            FinState::Field(f) => f.temps_c.iter().copied().fold(f64::NEG_INFINITY, f64::max),
        }
    }

    /// Mean temperature of the fin (the lumped value; for track fins the mean of the cells), °C.
    pub fn mean_c(&self) -> f64 {
        match self {
            FinState::Height(p) => p.mean_c(),
            FinState::Field(f) => f.temps_c.iter().sum::<f64>() / f.temps_c.len().max(1) as f64,
        }
    }
}

/// Heat capacity data of a fin.
#[derive(Debug, Clone, PartialEq)]
pub struct FinCapacity {
    /// Lumped heat capacity of the whole fin, J/K (vehicle fins).
    pub whole_j_k: f64,
    /// Heat capacity per metre of the heated strip ρ·c_p·t·h_a, J/(m·K) (track fins).
    pub per_m_j_m_k: f64,
    /// Heated height: the height whose uniform rise equals the peak rise of the loss
    /// distribution (the fin height for measured curves), m.
    pub heated_height_m: f64,
    /// The loss distribution across the height (None: even over the fin height).
    pub sheet: Option<SheetLoss>,
    /// Shares of a pass's heat across the [`HEIGHT_CELLS`] cells of a vehicle fin's height
    /// ([`height_weights`] of the loss distribution), computed once; empty for track fins.
    pub height_weights: Vec<f64>,
}

/// Heat capacities of a fin: whole fin and heated strip. The loss across the height is the
/// thin-sheet distribution of [`super::sheet`] for pairs of the layer model (the pair with the
/// highest peak density counts, conservative); pairs with measured curves carry no pole height,
/// so they spread it evenly over the full fin height. The heated height of a track fin is
/// 1/(peak density): the strip whose uniform rise equals the hottest point's rise.
pub fn fin_capacity(
    fin: &Fin,
    fin_index: usize,
    tables: &BrakeTables,
) -> Result<FinCapacity, ThermalError> {
    let m = &fin.material;
    let rho_c = m.density_kg_m3 * m.specific_heat_j_kg_k;
    let mut sheet: Option<SheetLoss> = None;
    let mut peak_per_m = 1.0 / fin.height_m;
    for p in tables.pairs.iter().filter(|p| p.fin == fin_index) {
        if let PairLaw::Table { model, .. } = &p.law {
            let g = model.geometry();
            if let Some(loss) = SheetLoss::new(g.pole_pitch_m, fin.height_m, g.pole_height_m) {
                let peak = remembered(&KNOWN_PEAKS, loss, |l| l.peak_per_m());
                if sheet.is_none() || peak > peak_per_m {
                    peak_per_m = peak;
                    sheet = Some(loss);
                }
            }
        }
    }
    let heated_height_m = 1.0 / peak_per_m;
    let whole_j_k = rho_c * fin.length_m * fin.height_m * fin.thickness_m;
    let per_m_j_m_k = rho_c * fin.thickness_m * heated_height_m;
    if !(whole_j_k.is_finite() && whole_j_k > 0.0 && per_m_j_m_k.is_finite() && per_m_j_m_k > 0.0) {
        return Err(ThermalError::Input(format!(
            "fin '{}': its heat capacity is not positive (density, specific heat and size must be > 0)",
            fin.name
        )));
    }
    let height_weights = match fin.mount {
        Mount::Vehicle { .. } => usual_weights(fin.height_m, sheet.as_ref()),
        Mount::Track { .. } => Vec::new(),
    };
    Ok(FinCapacity {
        whole_j_k,
        per_m_j_m_k,
        heated_height_m,
        sheet,
        height_weights,
    })
}

/// The fin capacities of every fin of the scenario, in order.
pub fn fin_capacities(
    scenario: &Scenario,
    tables: &BrakeTables,
) -> Result<Vec<FinCapacity>, ThermalError> {
    scenario
        .fins
        .iter()
        .enumerate()
        .map(|(i, f)| fin_capacity(f, i, tables))
        .collect()
}

/// Values remembered for the process, by key: every heat study of a plan or a sweep asks for the
/// same few fin designs again.
type Remembered<K, V> = std::sync::Mutex<Vec<(K, V)>>;

/// The peak loss densities of the sheet distributions met so far (1/m).
static KNOWN_PEAKS: Remembered<SheetLoss, f64> = std::sync::Mutex::new(Vec::new());

/// The height weights met so far, by fin height and loss distribution.
static KNOWN_WEIGHTS: Remembered<(f64, Option<SheetLoss>), Vec<f64>> =
    std::sync::Mutex::new(Vec::new());

/// `compute(key)`, remembered in `store` (a bounded memory: a scenario has a handful of fin
/// designs; past 64 keys values are computed again).
fn remembered<K: PartialEq + Clone, V: Clone>(
    store: &Remembered<K, V>,
    key: K,
    compute: impl FnOnce(&K) -> V,
) -> V {
    if let Ok(known) = store.lock() {
        if let Some((_, v)) = known.iter().find(|(k, _)| *k == key) {
            return v.clone();
        }
    }
    let value = compute(&key);
    if let Ok(mut known) = store.lock() {
        if known.len() < 64 {
            known.push((key, value.clone()));
        }
    }
    value
}

/// [`sheet_weights`] for a profile of `height_m` in [`HEIGHT_CELLS`] cells, remembered for the
/// process.
fn usual_weights(height_m: f64, sheet: Option<&SheetLoss>) -> Vec<f64> {
    remembered(&KNOWN_WEIGHTS, (height_m, sheet.copied()), |(h, sheet)| {
        let profile = HeightProfile::uniform(*h, 0.0, HEIGHT_CELLS, 0.0);
        sheet_weights(&profile, sheet.as_ref())
    })
}

/// Shares of a deposit across the cells of `profile` for the loss distribution `sheet` (even
/// over the height without one).
fn sheet_weights(profile: &HeightProfile, sheet: Option<&SheetLoss>) -> Vec<f64> {
    match sheet {
        Some(sheet) => height_weights(profile, &sheet.from_edge()),
        None => height_weights(profile, &|_| 1.0),
    }
}

/// Shares of a pass's heat across the cells of `profile`, a vehicle fin of capacity `cap`: the
/// capacity's weights when they are for as many cells (a profile of the fin's height), else
/// computed for this profile.
pub fn deposit_weights(profile: &HeightProfile, cap: &FinCapacity) -> Vec<f64> {
    if cap.height_weights.len() == profile.temps_c.len() {
        cap.height_weights.clone()
    } else {
        sheet_weights(profile, cap.sheet.as_ref())
    }
}

/// A uniform starting state for every fin of the scenario.
pub fn uniform_states(scenario: &Scenario, temp_c: f64, cell_m: f64) -> Vec<FinState> {
    scenario
        .fins
        .iter()
        .map(|f| match f.mount {
            Mount::Vehicle { .. } => FinState::Height(HeightProfile::uniform(
                f.height_m,
                diffusivity_m2_s(&f.material),
                HEIGHT_CELLS,
                temp_c,
            )),
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
    /// Rise of each cell (track fins) or of the hottest cell over the pass (vehicle fins), K.
    pub rise_k: Vec<f64>,
    /// Hottest temperature during the pass, °C (for track fins the end state's peak).
    pub peak_c: f64,
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
    let caps = fin_capacities(scenario, tables)?;
    run_pass_with(scenario, tables, case, states, coupling, sample_dt_s, &caps)
}

/// [`run_pass`] with the fins' capacities computed beforehand ([`fin_capacities`]: they do not
/// change from pass to pass).
pub fn run_pass_with(
    scenario: &Scenario,
    tables: &BrakeTables,
    case: &Case,
    states: &[FinState],
    coupling: bool,
    sample_dt_s: f64,
    caps: &[FinCapacity],
) -> Result<PassHeat, ThermalError> {
    let n = scenario.fins.len();
    if states.len() != n || caps.len() != n {
        return Err(ThermalError::Input(format!(
            "{} fin states and {} capacities for {} fins",
            states.len(),
            caps.len(),
            n
        )));
    }
    let options = pass_options(case, states, coupling, sample_dt_s);
    let run = simulate_case(scenario, tables, case, &options)?;
    let pairs = active_pairs(scenario, tables, case);
    let mirror = mirror_fins(&pairs, n);
    let mut fins: Vec<FinPass> = Vec::with_capacity(n);
    // The quadrature nodes' speeds, shared by the pairs of every track fin of the pass (made
    // for the first track fin).
    let mut nodes: Option<PathNodes<'_>> = None;
    // The unit deposits of the vehicle fins that start uniform, shared by the fins of one
    // height, material and loss distribution (the pass's braking power sets their timing).
    let mut units: Vec<UnitDeposit> = Vec::new();
    for (i, state) in states.iter().enumerate() {
        let energy_j = run.fins.get(i).map_or(0.0, |h| h.energy_j);
        // A mirror fin in the same state, with the same capacity and the same energy, heats
        // exactly as its original (the same cell energies, the same rises).
        let same = mirror[i].and_then(|m| fins.get(m).map(|done| (m, done)));
        if let Some((m, done)) = same {
            if states[m] == *state
                && caps[m] == caps[i]
                && scenario.fins[m].length_m == scenario.fins[i].length_m
                && done.energy_j == energy_j
            {
                fins.push(done.clone());
                continue;
            }
        }
        fins.push(match state {
            FinState::Height(p0) => height_pass_shared(&run, p0, energy_j, &caps[i], &mut units),
            FinState::Field(field) => {
                let mine: Vec<&ActivePair> = pairs.iter().filter(|p| p.spec.fin == i).collect();
                let track = TrackFin {
                    length_m: scenario.fins[i].length_m,
                    capacity: &caps[i],
                };
                field_pass(
                    nodes.get_or_insert_with(|| PathNodes::new(&run.trajectory)),
                    &mine,
                    field,
                    energy_j,
                    track,
                    (!coupling).then_some(case.fin_temp_c),
                )
            }
        });
    }
    Ok(PassHeat { run, fins })
}

/// The run options of a pass: full samples at `sample_dt_s` and the dense output; with
/// `coupling` the fins start from their states (lumped temperatures, track fields).
fn pass_options(case: &Case, states: &[FinState], coupling: bool, sample_dt_s: f64) -> RunOptions {
    let base = RunOptions {
        sample_dt_s,
        sampling: Sampling::Full,
        thermal_feedback: coupling,
        trajectory: true,
        ..RunOptions::default()
    };
    if coupling {
        super::start_from_states(states, case, base)
    } else {
        base
    }
}

/// The deposit of a unit mean rise (1 K) into a fin at 0 °C throughout, over the pieces of one
/// pass: its hottest cell over the pass and its cells at the end, K. The conduction across the
/// height is linear and keeps a uniform profile uniform (no face cooling during a pass), so a fin
/// starting uniform at T₀ with a mean rise c ≥ 0 has T₀ + c·u at every cell and every time, and
/// its hottest cell is T₀ + c·max u: the fins of a vehicle that share a height, a material and a
/// loss distribution take one deposit per pass instead of one each.
#[derive(Debug, Clone)]
struct UnitDeposit {
    height_m: f64,
    diffusivity_m2_s: f64,
    weights: Vec<f64>,
    /// None: the pass has no braking power to time the deposit by.
    response: Option<(f64, Vec<f64>)>,
}

impl UnitDeposit {
    fn new(run: &RunResult, start: &HeightProfile, weights: Vec<f64>) -> Self {
        let zero = HeightProfile::uniform(
            start.height_m,
            start.diffusivity_m2_s,
            start.temps_c.len(),
            0.0,
        );
        let response = (!weights.is_empty())
            .then(|| deposit_shares(run))
            .flatten()
            .map(|shares| {
                let modes = Modes::of(zero.temps_c.len());
                let n = zero.temps_c.len() as f64;
                let rise: Vec<f64> = weights.iter().map(|w| w * n).collect();
                let mut p = zero.clone();
                let peak = modes.deposit_pieces(&mut p, &rise, &shares).max(0.0);
                (peak, p.temps_c)
            });
        Self {
            height_m: start.height_m,
            diffusivity_m2_s: start.diffusivity_m2_s,
            weights,
            response,
        }
    }

    fn fits(&self, start: &HeightProfile, weights: &[f64]) -> bool {
        self.height_m == start.height_m
            && self.diffusivity_m2_s == start.diffusivity_m2_s
            && self.weights == weights
    }
}

/// The uniform temperature of a profile, None when its cells differ.
fn uniform_temp_c(p: &HeightProfile) -> Option<f64> {
    let t0 = *p.temps_c.first()?;
    p.temps_c.iter().all(|t| *t == t0).then_some(t0)
}

/// [`height_pass`], by a unit deposit of `units` (made there when missing) for a fin starting
/// uniform with a mean rise that is finite and not negative: the same temperatures to rounding.
fn height_pass_shared(
    run: &RunResult,
    start: &HeightProfile,
    energy_j: f64,
    cap: &FinCapacity,
    units: &mut Vec<UnitDeposit>,
) -> FinPass {
    let mean_rise_k = energy_j / cap.whole_j_k;
    let t0 = match uniform_temp_c(start) {
        Some(t0) if t0.is_finite() && mean_rise_k.is_finite() && mean_rise_k >= 0.0 => t0,
        _ => return height_pass(run, start, energy_j, cap),
    };
    let weights = deposit_weights(start, cap);
    let at = match units.iter().position(|u| u.fits(start, &weights)) {
        Some(at) => at,
        None => {
            units.push(UnitDeposit::new(run, start, weights));
            units.len() - 1
        }
    };
    let Some((unit_peak, unit_end)) = &units[at].response else {
        return height_pass(run, start, energy_j, cap);
    };
    let mut end = start.clone();
    for (t, u) in end.temps_c.iter_mut().zip(unit_end) {
        *t = t0 + mean_rise_k * u;
    }
    let peak = t0 + mean_rise_k * unit_peak;
    FinPass {
        energy_j,
        rise_k: vec![peak - t0],
        peak_c: peak,
        end: FinState::Height(end),
        quadrature_correction: 0.0,
    }
}

/// The pieces (Δt, share of the pass's heat) of a vehicle-fin deposit: the braking power |F·v|
/// at the samples, a trapezoid per interval, normalised to sum to 1; None when the pass has no
/// finite positive braking energy at its samples.
fn deposit_shares(run: &RunResult) -> Option<Vec<(f64, f64)>> {
    let powers: Vec<(f64, f64)> = run
        .samples
        .iter()
        .map(|s| (s.t_s, (s.brake_force_n * s.v_m_s).abs()))
        .collect();
    let pieces: Vec<(f64, f64)> = powers
        .windows(2)
        .map(|w| (w[1].0 - w[0].0, 0.5 * (w[0].1 + w[1].1) * (w[1].0 - w[0].0)))
        .collect();
    let total: f64 = pieces.iter().map(|x| x.1).sum();
    (total > 0.0 && total.is_finite())
        .then(|| pieces.iter().map(|&(dt, e)| (dt, e / total)).collect())
}

/// A vehicle fin: the fin energy deposited across the height by the loss distribution of `cap`
/// (the thin-sheet solution, centred on the band the magnets cover), in time as the vehicle's braking power |F·v| at the samples (trapezoid per
/// interval, scaled to the fin's integrated energy), with conduction across the height during
/// the pass. The peak is the hottest cell at any sample.
pub fn height_pass(
    run: &RunResult,
    start: &HeightProfile,
    energy_j: f64,
    cap: &FinCapacity,
) -> FinPass {
    let modes = Modes::of(start.temps_c.len());
    let mut p = start.clone();
    let weights = deposit_weights(&p, cap);
    // E/(m·c_p) spread with weight w_j over 1/N of the mass raises cell j by N·w_j·E/(m·c_p).
    let n = p.temps_c.len() as f64;
    let mut peak = p.peak_c();
    let mean_rise_k = energy_j / cap.whole_j_k;
    if let Some(shares) = deposit_shares(run) {
        let rise: Vec<f64> = weights.iter().map(|w| w * n * mean_rise_k).collect();
        peak = peak.max(modes.deposit_pieces(&mut p, &rise, &shares));
    } else if energy_j > 0.0 {
        for (t, w) in p.temps_c.iter_mut().zip(&weights) {
            *t += w * n * mean_rise_k;
        }
        peak = peak.max(p.peak_c());
    }
    FinPass {
        energy_j,
        rise_k: vec![peak - start.peak_c()],
        peak_c: peak,
        end: FinState::Height(p),
        quadrature_correction: 0.0,
    }
}

/// What the rises of a track fin need besides its field: its length and heat capacity.
#[derive(Clone, Copy)]
struct TrackFin<'a> {
    length_m: f64,
    capacity: &'a FinCapacity,
}

/// A track fin: the cell energies over the run's path, scaled to the fin energy the integrator
/// carries, and the rise of each cell. The force law reads the field's temperatures, or
/// `uncoupled_c` everywhere when given.
fn field_pass(
    nodes: &mut PathNodes<'_>,
    mine: &[&ActivePair],
    field: &TempField,
    energy_j: f64,
    fin: TrackFin<'_>,
    uncoupled_c: Option<f64>,
) -> FinPass {
    let law_field = match uncoupled_c {
        Some(t) => TempField {
            temps_c: vec![t; field.temps_c.len()],
            ..field.clone()
        },
        None => field.clone(),
    };
    let energy = nodes.cell_energies(mine, &law_field);
    let sum: f64 = energy.iter().sum();
    let (scale, correction) = if sum > 0.0 {
        (energy_j / sum, (energy_j / sum - 1.0).abs())
    } else {
        (0.0, 0.0)
    };
    let rise_k: Vec<f64> = energy
        .iter()
        .enumerate()
        .map(|(k, e)| {
            let c0 = k as f64 * field.cell_m;
            let len = (fin.length_m.min(c0 + field.cell_m) - c0).max(1e-12);
            e * scale / (fin.capacity.per_m_j_m_k * len)
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
    let peak_c = end
        .temps_c
        .iter()
        .copied()
        .fold(f64::NEG_INFINITY, f64::max);
    FinPass {
        energy_j,
        peak_c,
        end: FinState::Field(end),
        rise_k,
        quadrature_correction: correction,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The first pass of the coaster plan demo's first case from uniform fins: the fins'
    /// capacities, their start states and the pass.
    fn first_pass() -> (Vec<FinCapacity>, Vec<FinState>, PassHeat) {
        let s = crate::scenario::shipped("scenarios/coaster-plan.yaml");
        let tables = BrakeTables::build(&s).expect("tables");
        let caps = fin_capacities(&s, &tables).expect("capacities");
        let case = &s.cases[0];
        let states = uniform_states(&s, case.fin_temp_c, DEFAULT_CELL_M);
        let heat = run_pass_with(&s, &tables, case, &states, true, 5e-3, &caps).expect("pass");
        (caps, states, heat)
    }

    /// The shared unit deposit against each fin's own deposit ([`height_pass`]): on the five
    /// car fins of the coaster plan demo (one height, material and loss distribution, five
    /// energies), every cell at the end and the hottest cell over the pass agree to 1e-12 K
    /// (rounding of the scaled sums; the rises are tens of kelvin), with one unit deposit made.
    /// The shortcut rests on superposition for the linear heat equation with insulated faces
    /// (Carslaw & Jaeger, Conduction of Heat in Solids, 1959; from memory).
    #[test]
    fn shared_unit_deposit_is_each_fins_own_deposit() {
        let (caps, states, heat) = first_pass();
        let mut units = Vec::new();
        let mut energies = Vec::new();
        for ((fin, state), cap) in heat.fins.iter().zip(&states).zip(&caps) {
            let FinState::Height(p0) = state else {
                panic!("vehicle fins")
            };
            let own = height_pass(&heat.run, p0, fin.energy_j, cap);
            let shared = height_pass_shared(&heat.run, p0, fin.energy_j, cap, &mut units);
            assert!(
                own.peak_c > p0.peak_c() + 1.0,
                "the fin heats: {}",
                own.peak_c
            );
            assert!(
                (own.peak_c - shared.peak_c).abs() < 1e-12,
                "{own:?} vs {shared:?}"
            );
            assert!((own.rise_k[0] - shared.rise_k[0]).abs() < 1e-12);
            let (FinState::Height(a), FinState::Height(b)) = (&own.end, &shared.end) else {
                panic!("height profiles")
            };
            for (x, y) in a.temps_c.iter().zip(&b.temps_c) {
                assert!((x - y).abs() < 1e-12, "{x} vs {y}");
            }
            // The pass itself took the shared path: the same values.
            assert!((fin.peak_c - shared.peak_c).abs() < 1e-12);
            energies.push(fin.energy_j);
        }
        assert_eq!(units.len(), 1, "one unit deposit for the five alike fins");
        assert!(
            energies.windows(2).any(|w| w[0] != w[1]),
            "the fins take different energies: {energies:?}"
        );
    }

    /// A fin that does not start uniform (a later pass of a duty cycle) keeps its own deposit,
    /// to the last bit, and makes no unit deposit.
    #[test]
    fn uneven_start_keeps_its_own_deposit() {
        let (caps, states, heat) = first_pass();
        let FinState::Height(mut p0) = states[0].clone() else {
            panic!("vehicle fin")
        };
        p0.temps_c[10] += 5.0;
        let mut units = Vec::new();
        let own = height_pass(&heat.run, &p0, heat.fins[0].energy_j, &caps[0]);
        let shared =
            height_pass_shared(&heat.run, &p0, heat.fins[0].energy_j, &caps[0], &mut units);
        assert_eq!(own, shared);
        assert!(units.is_empty());
        assert_eq!(uniform_temp_c(&p0), None);
    }
}
