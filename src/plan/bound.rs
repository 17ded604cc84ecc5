//! A sound lower bound on the speed of the vehicle in every layout: the basis of "proven
//! infeasible", of the lower bound on the zone length and of pruning partial layouts that are
//! too fast to be stopped in time.
//!
//! # The argument
//! Moving forward, the speed as a function of the front position x obeys
//! d(v²/2)/dx = (G(x) − B(x, v, T) − R(x, v))/m, with gravity G and resistance R the same for
//! every layout, and the brake force B = Σ over fins of overlap(x) · f(v, T) summed over the
//! modules under the fin. For every layout, every fin temperature T between the case's start
//! temperature and T0 + E/C (E: the vehicle's kinetic energy plus its largest possible drop in
//! potential energy, all put into that fin; C: its heat capacity) and every clearance setting,
//! B ≤ B̄(x, v) = 1.02 · Σ over fins of overlap with *every* slot filled (up to the last slot of
//! the layout) · max over settings and temperatures of f(v, T). The force per metre of each
//! setting is taken from the same tables the integrator uses; the maximum over temperatures is
//! taken on a grid of temperatures and speeds and the 2 % inflation covers what lies between
//! grid points and the error of the RK4 integration of the bound (steps ≤ 10 cm, aligned with
//! every kink of the overlaps and of the track). Nothing here assumes that braking grows as the
//! clearance shrinks: the maximum over settings is taken at every speed.
//!
//! The scalar equation d(v²/2)/dx = (G − B̄ − R)/m has a Lipschitz right-hand side while
//! v > 0, so by the comparison theorem for scalar ODEs (e.g. Hartman, *Ordinary Differential
//! Equations*, 1964, ch. III) a real run that starts at or above a bound trajectory stays at or
//! above it. The trajectory v*ₖ through (Xₖ, v_lim) — Xₖ the front position at which the rear
//! clears the end of slot k, v_lim = max(exit_speed_max, stall speed) — is integrated backwards;
//! a vehicle above it at any point upstream leaves a layout whose last module is in slot k
//! faster than exit_speed_max (it can neither stall nor reverse on the way, being faster than
//! the stall speed throughout). Where v*ₖ dips below the stall speed or leaves the speed range
//! of the tables, nothing is concluded upstream of that point.
//!
//! With one-section-out cases of a base case, the case without the layout's last module always
//! exists; its bound fills the slots before k only.

use super::{candidate_scenario, Layout};
use crate::constants::STANDARD_GRAVITY_M_S2 as G;
use crate::dynamics::model::{active_pairs, speed_bound_m_s, ActivePair};
use crate::dynamics::track::{resistance_magnitude_n, TrackModel};
use crate::dynamics::Overlap;
use crate::scenario::{Case, CaseOrigin, Mount, PlanSpec, Scenario};
use crate::study::{Study, StudyError, TableCache};
use rayon::prelude::*;

/// Inflation of the strongest braking (covers grid and integration errors).
const INFLATION: f64 = 1.02;
/// Largest RK4 step, m.
const STEP_M: f64 = 0.1;
/// Temperatures on the grid of the maximum over fin temperatures.
const TEMPERATURES: usize = 33;
/// Speed cells of the tabulated strongest force.
const SPEED_CELLS: usize = 1500;

/// The bound of one case: thresholds per last slot k and boundary j.
#[derive(Debug, Clone)]
pub struct CaseBound {
    /// Index of the case in the scenario's cases.
    pub case_index: usize,
    /// Case name.
    pub case: String,
    /// Speed at the start, m/s.
    pub start_speed_m_s: f64,
    /// exit_speed_max, m/s.
    pub limit_m_s: f64,
    /// `[k]`: v*ₖ at the case start (+∞ where nothing follows), m/s.
    pub start_m_s: Vec<f64>,
    /// `[k][j]` for j ≤ k: v*ₖ at boundary j, m/s.
    pub at_boundary_m_s: Vec<Vec<f64>>,
    /// The same for the case without the layout's last module (when the case is a base of
    /// one-section-out cases).
    pub without_last: Option<(Vec<f64>, Vec<Vec<f64>>)>,
}

/// Bounds of every case they apply to.
#[derive(Debug, Clone, Default)]
pub struct Bounds {
    /// One per forward case with an exit_speed_max limit that starts upstream of the first slot.
    pub cases: Vec<CaseBound>,
    /// Slots.
    pub slots: usize,
    /// An upper bound on the magnitude of the felt acceleration on every rider axis, in every
    /// forward case of every layout, g (+∞ when not known): twice the strongest braking of every
    /// fin (its length times the strongest force per metre) plus the resistance at the speed
    /// bound, over m·g, and at least the largest track-normal value (1 + v²·π/(L·g), L the
    /// vehicle length).
    pub felt_bound_g: f64,
}

impl CaseBound {
    /// Whether every layout whose last module is in slot `k` fails this case (exit too fast).
    pub fn proves_slot(&self, k: usize) -> bool {
        let v0 = self.start_speed_m_s;
        self.start_m_s.get(k).is_some_and(|&t| v0 > t)
            || self
                .without_last
                .as_ref()
                .is_some_and(|w| w.0.get(k).is_some_and(|&t| v0 > t))
    }

    /// Whether a vehicle of this case at `speed_m_s` on boundary `j` leaves too fast every
    /// layout whose last module is in slot `k ≥ j` (with a margin of 1e-6 for the speed read
    /// between samples).
    pub fn too_fast_at(&self, j: usize, k: usize, speed_m_s: f64) -> bool {
        let above = |m: &Vec<Vec<f64>>| {
            m.get(k)
                .and_then(|row| row.get(j))
                .is_some_and(|&t| speed_m_s > t * (1.0 + 1e-6) + 1e-6)
        };
        above(&self.at_boundary_m_s) || self.without_last.as_ref().is_some_and(|w| above(&w.1))
    }
}

impl Bounds {
    /// Slots k for which some case proves every layout ending there infeasible.
    pub fn proven_slot(&self, k: usize) -> Option<&CaseBound> {
        self.cases.iter().find(|c| c.proves_slot(k))
    }

    /// The smallest number of slots a feasible layout can have (None: none can).
    pub fn length_lower_bound(&self) -> Option<usize> {
        (0..self.slots)
            .find(|&k| self.proven_slot(k).is_none())
            .map(|k| k + 1)
    }

    /// Whether a partial layout whose exact state at boundary `j` has, per case index, the
    /// speeds in `speeds` (None: not known exactly) leaves every completion too fast: for every
    /// last slot k ≥ j some case is above its bound.
    pub fn prefix_too_fast(&self, j: usize, speeds: &dyn Fn(usize) -> Option<f64>) -> bool {
        if j >= self.slots || self.cases.is_empty() {
            return false;
        }
        (j..self.slots).all(|k| {
            self.cases
                .iter()
                .any(|c| speeds(c.case_index).is_some_and(|v| c.too_fast_at(j, k, v)))
        })
    }
}

/// What the right-hand side of the bound needs for one case.
struct Rhs<'a> {
    track: &'a TrackModel,
    case: &'a Case,
    air_density: f64,
    /// Per braking fin.
    fins: Vec<FinBound>,
    dv: f64,
    spec: &'a PlanSpec,
}

impl Rhs<'_> {
    fn strongest(&self, table: &[f64], v: f64) -> f64 {
        let x = (v / self.dv).max(0.0);
        let i = (x.floor() as usize).min(table.len().saturating_sub(2));
        table[i].max(table[i + 1])
    }

    /// d(v²/2)/dx with slots 0..filled filled.
    fn accel(&self, x: f64, w: f64, filled: usize) -> f64 {
        let v = (2.0 * w.max(0.0)).sqrt();
        let p = self.spec;
        let mut brake = 0.0;
        for fin in &self.fins {
            let (o, l) = (fin.offset_m, fin.length_m);
            let reached = ((x - o - p.zone_start_m) / p.slot_pitch_m).floor() + 1.0;
            let lo = ((x - o - l - p.module_length_m - p.zone_start_m) / p.slot_pitch_m).floor();
            let (lo, hi) = (
                lo.max(0.0) as usize,
                (reached.max(0.0) as usize).min(filled),
            );
            let mut overlap = 0.0;
            for s in lo..hi {
                overlap += Overlap {
                    vehicle_offset_m: o,
                    vehicle_len_m: l,
                    track_start_m: p.zone_start_m + s as f64 * p.slot_pitch_m,
                    track_len_m: p.module_length_m,
                }
                .length_m(x);
            }
            if overlap > 0.0 {
                let energy = (fin.energy_per_slot_j * hi as f64).min(fin.energy_total_j);
                let rise = if fin.capacity_j_k > 0.0 {
                    energy / fin.capacity_j_k
                } else {
                    f64::INFINITY
                };
                let n = if fin.step_k > 0.0 {
                    (rise / fin.step_k).ceil()
                } else {
                    0.0
                };
                let n = if n.is_finite() {
                    (n as usize).min(fin.tables.len() - 1)
                } else {
                    fin.tables.len() - 1
                };
                brake += overlap * self.strongest(&fin.tables[n], v);
            }
        }
        let fr = self.track.frozen(x, 1.0);
        let m = self.case.mass_kg;
        let res = resistance_magnitude_n(
            &self.case.resistance,
            m,
            fr.cos_theta(x),
            v,
            self.air_density,
        );
        (fr.force_n(m, x) - INFLATION * brake - res) / m
    }
}

/// Builds the bounds of a plan (empty when the plan has no exit_speed_max limit or its fins are
/// not on the vehicle).
pub fn bounds(base: &Scenario, spec: &PlanSpec, cache: &TableCache) -> Result<Bounds, StudyError> {
    let slots = super::slot_count(spec);
    let empty = Bounds {
        cases: vec![],
        slots,
        felt_bound_g: f64::INFINITY,
    };
    let limit = base.limits.exit_speed_max_m_s;
    if base
        .fins
        .iter()
        .any(|f| !matches!(f.mount, Mount::Vehicle { .. }))
    {
        return Ok(empty);
    }
    let levels = spec.clearances_m.len();
    let one_each: Layout = (0..levels).map(Some).collect();
    let mut helper = candidate_scenario(base, spec, &one_each);
    let study = Study::with_cache(helper.clone(), cache)?;
    let last_end =
        spec.zone_start_m + (slots as f64 - 1.0) * spec.slot_pitch_m + spec.module_length_m;
    helper.zone_end_m = last_end;
    let v_cap = speed_bound_m_s(&helper);
    let track = TrackModel::new(
        &base.track.gravity,
        base.track.air_density_kg_m3,
        base.vehicle.length_m,
    );
    let lead = base
        .fins
        .iter()
        .filter_map(|f| match f.mount {
            Mount::Vehicle { offset_m } => Some(offset_m),
            Mount::Track { .. } => None,
        })
        .fold(f64::INFINITY, f64::min);
    if !lead.is_finite() {
        return Ok(empty);
    }
    let boundary = |j: usize| spec.zone_start_m + j as f64 * spec.slot_pitch_m + lead;
    let exit = |k: usize| {
        spec.zone_start_m
            + k as f64 * spec.slot_pitch_m
            + spec.module_length_m
            + base.vehicle.length_m
    };
    let n1_bases = super::section_out_bases(base);
    let mut out = Vec::new();
    // Track-normal felt acceleration: cos θ plus v²κ/g, with |κ| at most π over the vehicle's
    // length (the mean curvature is the change of the inclination over the vehicle).
    let mut felt_bound_g =
        1.0 + v_cap * v_cap * std::f64::consts::PI / (base.vehicle.length_m.max(1e-9) * G);
    for (ci, case) in base.cases.iter().enumerate() {
        let listed = matches!(case.origin, CaseOrigin::Listed | CaseOrigin::Corner { .. });
        if !listed || case.start_speed_m_s < 0.0 {
            continue;
        }
        let clean = Case {
            disabled: vec![],
            ..case.clone()
        };
        let pairs = active_pairs(&helper, study.tables(), &clean);
        let rhs = Rhs {
            track: &track,
            case,
            air_density: base.track.air_density_kg_m3,
            fins: strongest_forces(base, spec, &pairs, case, &track, exit(slots - 1), v_cap),
            dv: v_cap / SPEED_CELLS as f64,
            spec,
        };
        let brake_n: f64 = rhs
            .fins
            .iter()
            .map(|f| {
                let top = f
                    .tables
                    .last()
                    .map_or(0.0, |r| r.iter().cloned().fold(0.0, f64::max));
                INFLATION * top * f.length_m
            })
            .sum();
        let res_n = resistance_magnitude_n(
            &case.resistance,
            case.mass_kg,
            1.0,
            v_cap,
            base.track.air_density_kg_m3,
        );
        let felt = 2.0 * (brake_n + res_n) / (case.mass_kg * G);
        felt_bound_g = felt_bound_g.max(if felt.is_finite() {
            felt
        } else {
            f64::INFINITY
        });
        let Some(limit) = limit else { continue };
        if !(case.start_speed_m_s > 0.0 && case.start_position_m <= boundary(0)) {
            continue;
        }
        let v_lim = limit.max(base.stall_speed_m_s);
        let mut stations: Vec<f64> = (0..=slots).map(boundary).collect();
        stations.push(case.start_position_m);
        for f in &rhs.fins {
            let (o, l) = (&f.offset_m, &f.length_m);
            for s in 0..slots {
                let s0 = spec.zone_start_m + s as f64 * spec.slot_pitch_m;
                let s1 = s0 + spec.module_length_m;
                stations.extend([s0 + o, s1 + o, s0 + o + l, s1 + o + l]);
            }
        }
        stations.extend(track.kinks());
        stations.extend((0..slots).map(exit));
        stations.retain(|x| x.is_finite() && *x >= case.start_position_m);
        stations.sort_by(f64::total_cmp);
        stations.dedup();
        let family = |without_last: bool| -> Vec<(f64, Vec<f64>)> {
            (0..slots)
                .into_par_iter()
                .map(|k| {
                    let filled = if without_last { k } else { k + 1 };
                    curve(
                        &rhs,
                        &stations,
                        exit(k),
                        v_lim,
                        v_cap,
                        filled,
                        base.stall_speed_m_s,
                        case.start_position_m,
                        &(0..=k).map(boundary).collect::<Vec<_>>(),
                    )
                })
                .collect()
        };
        let split =
            |f: Vec<(f64, Vec<f64>)>| -> (Vec<f64>, Vec<Vec<f64>>) { f.into_iter().unzip() };
        let (start_m_s, at_boundary_m_s) = split(family(false));
        let without_last = n1_bases.contains(&case.name).then(|| split(family(true)));
        out.push(CaseBound {
            case_index: ci,
            case: case.name.clone(),
            start_speed_m_s: case.start_speed_m_s,
            limit_m_s: limit,
            start_m_s,
            at_boundary_m_s,
            without_last,
        });
    }
    Ok(Bounds {
        cases: out,
        slots,
        felt_bound_g,
    })
}

/// The strongest braking of one fin.
struct FinBound {
    offset_m: f64,
    length_m: f64,
    /// J/K.
    capacity_j_k: f64,
    /// Largest force per metre × module length × fin length, J: the most one module can put in.
    energy_per_slot_j: f64,
    /// Kinetic energy plus the largest drop in potential energy, J.
    energy_total_j: f64,
    /// Temperature step of the grid, K.
    step_k: f64,
    /// `[n][cell]`: the strongest force per metre over settings and fin temperatures from T0 to
    /// T0 + n·step, on the speed grid.
    tables: Vec<Vec<f64>>,
}

/// The strongest braking of every braking fin (see the module documentation).
fn strongest_forces(
    base: &Scenario,
    spec: &PlanSpec,
    pairs: &[ActivePair],
    case: &Case,
    track: &TrackModel,
    x_end: f64,
    v_cap: f64,
) -> Vec<FinBound> {
    let m = case.mass_kg;
    let mut z: Vec<f64> = track
        .kinks()
        .into_iter()
        .filter(|x| *x >= case.start_position_m - base.vehicle.length_m && *x <= x_end)
        .collect();
    z.extend([case.start_position_m - base.vehicle.length_m, x_end]);
    let elev: Vec<f64> = z.iter().map(|&x| track.elevation_m(x)).collect();
    let drop = elev.iter().cloned().fold(f64::NEG_INFINITY, f64::max)
        - elev.iter().cloned().fold(f64::INFINITY, f64::min);
    let energy_total_j = 0.5 * m * case.start_speed_m_s.powi(2) + m * G * drop.max(0.0);
    let dv = v_cap / SPEED_CELLS as f64;
    let mut out: Vec<FinBound> = Vec::new();
    let mut seen: Vec<(usize, usize)> = Vec::new();
    for (i, fin) in base.fins.iter().enumerate() {
        let Mount::Vehicle { offset_m } = fin.mount else {
            continue;
        };
        let mine: Vec<&ActivePair> = pairs.iter().filter(|p| p.spec.fin == i).collect();
        if mine.is_empty() {
            continue;
        }
        // Copies of one fin (same material and cross-section) share their tables.
        let same = seen.iter().find(|(j, _)| {
            let f = &base.fins[*j];
            f.material == fin.material
                && f.length_m == fin.length_m
                && f.height_m == fin.height_m
                && f.thickness_m == fin.thickness_m
                && f.lane == fin.lane
        });
        if let Some(&(_, k)) = same {
            let copy = FinBound {
                offset_m,
                length_m: fin.length_m,
                capacity_j_k: out[k].capacity_j_k,
                energy_per_slot_j: out[k].energy_per_slot_j,
                energy_total_j,
                step_k: out[k].step_k,
                tables: out[k].tables.clone(),
            };
            seen.push((i, out.len()));
            out.push(copy);
            continue;
        }
        let capacity_j_k = fin.material.density_kg_m3
            * fin.material.specific_heat_j_kg_k
            * fin.length_m
            * fin.height_m
            * fin.thickness_m;
        let t0 = case.fin_temp_c;
        let range = if capacity_j_k > 0.0 {
            energy_total_j / capacity_j_k
        } else {
            0.0
        };
        let step_k = range / (TEMPERATURES - 1) as f64;
        let mut tables: Vec<Vec<f64>> = Vec::with_capacity(TEMPERATURES);
        for n in 0..TEMPERATURES {
            let t = t0 + step_k * n as f64;
            let row: Vec<f64> = (0..=SPEED_CELLS)
                .map(|c| {
                    let v = c as f64 * dv;
                    let here = mine
                        .iter()
                        .map(|p| p.force_per_m_n(v, t))
                        .fold(0.0, f64::max);
                    match tables.last() {
                        Some(prev) => here.max(prev[c]),
                        None => here,
                    }
                })
                .collect();
            tables.push(row);
        }
        let peak = tables
            .last()
            .map_or(0.0, |r| r.iter().cloned().fold(0.0, f64::max));
        seen.push((i, out.len()));
        out.push(FinBound {
            offset_m,
            length_m: fin.length_m,
            capacity_j_k,
            energy_per_slot_j: INFLATION * peak * spec.module_length_m * fin.length_m,
            energy_total_j,
            step_k,
            tables,
        });
    }
    out
}

/// Integrates v*ₖ backwards from (x_exit, v_lim) with `filled` slots filled; returns its value
/// at the case start and at each of `at` (ascending), +∞ where nothing can be concluded.
#[allow(clippy::too_many_arguments)]
fn curve(
    rhs: &Rhs<'_>,
    stations: &[f64],
    x_exit: f64,
    v_lim: f64,
    v_cap: f64,
    filled: usize,
    v_stall: f64,
    x_start: f64,
    at: &[f64],
) -> (f64, Vec<f64>) {
    let mut values = vec![f64::INFINITY; at.len()];
    let mut x = x_exit;
    let mut w = 0.5 * v_lim * v_lim;
    let w_min = 0.5 * v_stall * v_stall;
    let w_cap = 0.5 * v_cap * v_cap;
    let mut next = at.iter().rposition(|&b| b <= x_exit);
    let upstream = stations.iter().rev().filter(|&&s| s < x_exit);
    let record = |x: f64, w: f64, next: &mut Option<usize>, values: &mut Vec<f64>| {
        while let Some(i) = *next {
            if (at[i] - x).abs() <= 1e-9 {
                values[i] = (2.0 * w).sqrt();
            }
            if at[i] >= x - 1e-9 {
                *next = i.checked_sub(1);
            } else {
                break;
            }
        }
    };
    record(x, w, &mut next, &mut values);
    for &a in upstream {
        let n = ((x - a) / STEP_M).ceil().max(1.0);
        let h = (x - a) / n;
        for _ in 0..n as usize {
            let k1 = rhs.accel(x, w, filled);
            let k2 = rhs.accel(x - 0.5 * h, w - 0.5 * h * k1, filled);
            let k3 = rhs.accel(x - 0.5 * h, w - 0.5 * h * k2, filled);
            let k4 = rhs.accel(x - h, w - h * k3, filled);
            w -= h / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4);
            x -= h;
            if !(w.is_finite() && w > w_min && w < w_cap) {
                return (f64::INFINITY, values);
            }
        }
        x = a;
        record(x, w, &mut next, &mut values);
        if x <= x_start {
            break;
        }
    }
    ((2.0 * w).sqrt(), values)
}
