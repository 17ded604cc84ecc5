//! Integration of one case, piece by piece between force kinks.
//!
//! The brake force has kinks wherever a fin edge meets a section edge, and gravity wherever the
//! vehicle's front or rear crosses a profile point; resistance changes sign when the motion
//! reverses. Within a piece every law is frozen on its current branch (overlaps are linear in the
//! position, gravity is on fixed profile pieces, resistance has a fixed sign), so the right-hand
//! side is smooth and the Dormand–Prince 5(4) method (Dormand & Prince, J. Comp. Appl. Math. 6,
//! 1980; Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I, 1993; ode_solvers'
//! `Dopri5`, chosen over `Dop853` because it provides the continuous output model) keeps its
//! order. After each accepted step the event functions are checked; a sign change is located on
//! the method's continuous output to 1e-9 s and the integration restarts from that state, so no step straddles a kink.
//!
//! State: [x, v, E_brake, E_resistance, E_fin_0, …]: the dissipated energies are integrated with
//! the motion, so the energy residual measures the integration error.

use super::model::{active_pairs, ActivePair, BrakeTables};
use super::track::{resistance_magnitude_n, FrozenGravity, TrackModel};
use super::{DynamicsError, FinHeat, Outcome, RunResult, Sample};
use crate::constants::STANDARD_GRAVITY_M_S2 as G;
use crate::scenario::{Case, Mount, Scenario};
use ode_solvers::continuous_output_model::ContinuousOutputModel;
use ode_solvers::{Dopri5, OutputType, SVector, System};
use std::cell::{Cell, RefCell};

/// Which samples a run keeps.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Sampling {
    /// Only what the summary needs: samples inside the zone.
    ZoneOnly,
    /// Every dt from t = 0, for profiles and plots.
    Full,
}

/// Options of a run; defaults in `Default`.
#[derive(Debug, Clone)]
pub struct RunOptions {
    /// Sample interval, s (default 1 ms).
    pub sample_dt_s: f64,
    /// Which samples to keep (default `ZoneOnly`).
    pub sampling: Sampling,
    /// Vehicle fins heat up during the pass and their conductivity follows (default true).
    pub thermal_feedback: bool,
    /// Per-fin temperatures before the pass, °C (default: the case's fin temperature).
    pub fin_start_temps_c: Option<Vec<f64>>,
    /// Per-fin temperature fields along the track for track fins (cell start, cell length, temps).
    pub track_fin_fields: Option<Vec<Option<TempField>>>,
    /// Tolerances (default: the scenario's solver block).
    pub tolerances: Option<(f64, f64)>,
}

impl Default for RunOptions {
    fn default() -> Self {
        Self {
            sample_dt_s: 1e-3,
            sampling: Sampling::ZoneOnly,
            thermal_feedback: true,
            fin_start_temps_c: None,
            track_fin_fields: None,
            tolerances: None,
        }
    }
}

/// A temperature field along a track fin, in equal cells.
#[derive(Debug, Clone, PartialEq)]
pub struct TempField {
    /// Track position of the first cell's upstream end, m.
    pub start_m: f64,
    /// Cell length, m.
    pub cell_m: f64,
    /// Temperature of each cell, °C.
    pub temps_c: Vec<f64>,
}

/// Everything of a case that does not change during the run.
struct Ctx {
    mass_kg: f64,
    vehicle_len_m: f64,
    pairs: Vec<ActivePair>,
    /// Per fin: heat capacity (vehicle fins with feedback) or None (fixed temperature).
    fin_capacity_j_k: Vec<Option<f64>>,
    fin_start_c: Vec<f64>,
    /// Per fin: temperature field (track fins in a duty cycle).
    fin_fields: Vec<Option<TempField>>,
    resistance: crate::scenario::Resistance,
    air_density: f64,
    n_fins: usize,
}

/// The frozen laws of one piece.
#[derive(Clone)]
struct Frozen {
    /// (pair index, α, β): overlap = α + β·x.
    pairs: Vec<(usize, f64, f64)>,
    gravity: FrozenGravity,
    /// +1 or −1: direction of travel, for the sign of resistance.
    dir: f64,
}

/// Forces at a state under a frozen law.
#[derive(Clone, Copy, Default)]
struct Forces {
    brake_n: f64,
    gravity_n: f64,
    resistance_n: f64,
    cos_theta: f64,
    overlap_m: f64,
}

impl Ctx {
    fn fin_temp<const N: usize>(&self, fin: usize, y: &SVector<f64, N>) -> f64 {
        match self.fin_capacity_j_k[fin] {
            Some(c) => self.fin_start_c[fin] + y[4 + fin] / c,
            None => self.fin_start_c[fin],
        }
    }

    /// Forces and, when `dy` is given, the derivatives.
    fn eval<const N: usize>(
        &self,
        fr: &Frozen,
        y: &SVector<f64, N>,
        dy: Option<&mut SVector<f64, N>>,
    ) -> Forces {
        let (x, v) = (y[0], y[1]);
        let mut brake = 0.0;
        let mut overlap = 0.0;
        let mut fin_power = [0.0f64; 16];
        let mut fin_power_vec: Vec<f64> = Vec::new();
        let use_vec = self.n_fins > fin_power.len();
        if use_vec {
            fin_power_vec = vec![0.0; self.n_fins];
        }
        for &(p, a, b) in &fr.pairs {
            let ov = a + b * x;
            let pair = &self.pairs[p];
            let fin = pair.spec.fin;
            let f = match &self.fin_fields[fin] {
                Some(field) => field_force(pair, field, x, v, a, b),
                None => pair.force_per_m_n(v, self.fin_temp(fin, y)) * ov,
            };
            brake -= f;
            overlap += ov;
            let power = f * v;
            if use_vec {
                fin_power_vec[fin] += power;
            } else {
                fin_power[fin] += power;
            }
        }
        let gravity = fr.gravity.force_n(self.mass_kg, x);
        let cos_theta = fr.gravity.cos_theta(x);
        let resistance = -fr.dir
            * resistance_magnitude_n(
                &self.resistance,
                self.mass_kg,
                cos_theta,
                v,
                self.air_density,
            );
        if let Some(dy) = dy {
            dy[0] = v;
            dy[1] = (brake + gravity + resistance) / self.mass_kg;
            dy[2] = -brake * v;
            dy[3] = -resistance * v;
            for i in 0..self.n_fins {
                dy[4 + i] = if use_vec {
                    fin_power_vec[i]
                } else {
                    fin_power[i]
                };
            }
        }
        Forces {
            brake_n: brake,
            gravity_n: gravity,
            resistance_n: resistance,
            cos_theta,
            overlap_m: overlap,
        }
    }
}

/// Force of a pair whose track fin has a temperature field: the overlap window is split at cell
/// boundaries and each part uses its cell's temperature.
fn field_force(pair: &ActivePair, field: &TempField, x: f64, v: f64, a: f64, b: f64) -> f64 {
    let ov = a + b * x;
    if ov <= 0.0 {
        return 0.0;
    }
    let s = &pair.spec;
    let u = x - s.vehicle_offset_m;
    let lo = (u - s.vehicle_len_m).max(s.track_start_m);
    let hi = lo + ov;
    let n = field.temps_c.len();
    let mut total = 0.0;
    let first = ((lo - field.start_m) / field.cell_m).floor().max(0.0) as usize;
    let mut k = first;
    while k < n {
        let c0 = field.start_m + k as f64 * field.cell_m;
        let c1 = c0 + field.cell_m;
        if c0 >= hi {
            break;
        }
        let part = hi.min(c1) - lo.max(c0);
        if part > 0.0 {
            total += pair.force_per_m_n(v, field.temps_c[k]) * part;
        }
        k += 1;
    }
    total
}

/// Event functions: an event happens when one goes from > 0 to ≤ 0.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Event {
    PieceLow,
    PieceHigh,
    Reversal,
    Stall,
    ClearForward,
    ClearBackward,
}

const EVENTS: [Event; 6] = [
    Event::PieceLow,
    Event::PieceHigh,
    Event::Reversal,
    Event::Stall,
    Event::ClearForward,
    Event::ClearBackward,
];

struct Watch {
    lo: f64,
    hi: f64,
    dir: f64,
    stall_active: bool,
    stall_speed: f64,
    zone_end: f64,
    zone_start: f64,
    vehicle_len: f64,
}

impl Watch {
    fn g<const N: usize>(&self, e: Event, y: &SVector<f64, N>) -> f64 {
        let (x, v) = (y[0], y[1]);
        match e {
            Event::PieceLow => x - self.lo,
            Event::PieceHigh => self.hi - x,
            Event::Reversal => v * self.dir,
            Event::Stall if self.stall_active => v * self.dir - self.stall_speed,
            Event::Stall => 1.0,
            Event::ClearForward => self.zone_end - (x - self.vehicle_len),
            Event::ClearBackward => x - self.zone_start,
        }
    }
}

/// An accepted step end: (t, y, y').
type StepEnd<const N: usize> = (f64, SVector<f64, N>, SVector<f64, N>);

struct Rhs<'a, const N: usize> {
    ctx: &'a Ctx,
    frozen: &'a Frozen,
    watch: &'a Watch,
    prev: Option<(f64, [f64; 6])>,
    triggered: &'a Cell<Option<(f64, f64)>>,
    /// Accepted step ends (t, y, y'), for sampling by cubic Hermite interpolation.
    trace: &'a RefCell<Vec<StepEnd<N>>>,
}

impl<const N: usize> System<f64, SVector<f64, N>> for Rhs<'_, N> {
    fn system(&self, _t: f64, y: &SVector<f64, N>, dy: &mut SVector<f64, N>) {
        self.ctx.eval(self.frozen, y, Some(dy));
    }

    fn solout(&mut self, t: f64, y: &SVector<f64, N>, dy: &SVector<f64, N>) -> bool {
        self.trace.borrow_mut().push((t, *y, *dy));
        let mut g = [0.0; 6];
        for (i, e) in EVENTS.iter().enumerate() {
            g[i] = self.watch.g(*e, y);
        }
        let hit = match self.prev {
            Some((t0, g0)) => (0..6)
                .any(|i| g0[i] > 0.0 && g[i] <= 0.0)
                .then_some((t0, t)),
            None => None,
        };
        self.prev = Some((t, g));
        if let Some(h) = hit {
            self.triggered.set(Some(h));
            return true;
        }
        false
    }
}

/// Sorted, de-duplicated kink positions of the front.
fn kinks(pairs: &[ActivePair], track: &TrackModel) -> Vec<f64> {
    let mut k: Vec<f64> = pairs.iter().flat_map(|p| p.spec.kinks()).collect();
    k.extend(track.kinks());
    k.retain(|x| x.is_finite());
    k.sort_by(f64::total_cmp);
    k.dedup_by(|a, b| (*a - *b).abs() < 1e-12);
    k
}

/// The piece [lo, hi] of the kink list holding x, ties broken by the direction of travel.
fn piece(kinks: &[f64], x: f64, dir: f64) -> (f64, f64) {
    let idx = if dir >= 0.0 {
        kinks.partition_point(|&k| k <= x)
    } else {
        kinks.partition_point(|&k| k < x)
    };
    let lo = if idx == 0 {
        f64::NEG_INFINITY
    } else {
        kinks[idx - 1]
    };
    let hi = if idx == kinks.len() {
        f64::INFINITY
    } else {
        kinks[idx]
    };
    (lo, hi)
}

fn freeze(ctx: &Ctx, track: &TrackModel, lo: f64, hi: f64, x: f64, dir: f64) -> Frozen {
    let mid = match (lo.is_finite(), hi.is_finite()) {
        (true, true) => 0.5 * (lo + hi),
        (true, false) => lo.max(x) + 1.0,
        (false, true) => hi.min(x) - 1.0,
        (false, false) => x,
    };
    let pairs = ctx
        .pairs
        .iter()
        .enumerate()
        .filter_map(|(i, p)| {
            let (a, b) = p.spec.linear_overlap(mid);
            (a != 0.0 || b != 0.0).then_some((i, a, b))
        })
        .collect();
    Frozen {
        pairs,
        gravity: track.frozen(mid, 1.0),
        dir,
    }
}

/// Finds t in [a, b] where g crosses from > 0 to ≤ 0, to `tol` seconds (bisection with a
/// secant guess: the Illinois variant of regula falsi, Dowell & Jarratt, BIT 11, 1971).
fn locate(mut a: f64, mut b: f64, g: impl Fn(f64) -> f64, tol: f64) -> f64 {
    let (mut ga, mut gb) = (g(a), g(b));
    let mut side = 0;
    for _ in 0..200 {
        if b - a <= tol {
            break;
        }
        let mut c = if ga.is_finite() && gb.is_finite() && ga != gb {
            b - gb * (b - a) / (gb - ga)
        } else {
            0.5 * (a + b)
        };
        if !(c > a && c < b) {
            c = 0.5 * (a + b);
        }
        let gc = g(c);
        if gc > 0.0 {
            a = c;
            ga = gc;
            if side == -1 {
                gb *= 0.5;
            }
            side = -1;
        } else {
            b = c;
            gb = gc;
            if side == 1 {
                ga *= 0.5;
            }
            side = 1;
        }
    }
    b
}

/// Runs every case of a scenario with shared force tables.
pub fn simulate(
    scenario: &Scenario,
    tables: &BrakeTables,
    options: &RunOptions,
) -> Result<Vec<RunResult>, DynamicsError> {
    scenario
        .cases
        .iter()
        .map(|c| simulate_case(scenario, tables, c, options))
        .collect()
}

fn static_hold<const N: usize>(ctx: &Ctx, fr: &Frozen, y: &SVector<f64, N>) -> bool {
    let f = ctx.eval(fr, y, None);
    let static_res =
        ctx.resistance.rolling_coeff * ctx.mass_kg * G * f.cos_theta + ctx.resistance.friction_n;
    f.gravity_n.abs() <= static_res
}

/// Most fins a scenario may have (the state holds x, v, two energies and one energy per fin).
pub const MAX_FINS: usize = 60;

/// Runs one case. The state is a fixed-size vector (no allocation on the hot path), sized to the
/// smallest of 8, 16, 32 or 64 entries that holds 4 + the number of fins.
pub fn simulate_case(
    scenario: &Scenario,
    tables: &BrakeTables,
    case: &Case,
    options: &RunOptions,
) -> Result<RunResult, DynamicsError> {
    match 4 + scenario.fins.len() {
        n if n <= 8 => simulate_n::<8>(scenario, tables, case, options),
        n if n <= 16 => simulate_n::<16>(scenario, tables, case, options),
        n if n <= 32 => simulate_n::<32>(scenario, tables, case, options),
        n if n <= 4 + MAX_FINS => simulate_n::<64>(scenario, tables, case, options),
        _ => Err(DynamicsError::Integration {
            case: case.name.clone(),
            t_s: 0.0,
            message: format!(
                "{} fins: at most {MAX_FINS} are supported",
                scenario.fins.len()
            ),
        }),
    }
}

fn simulate_n<const N: usize>(
    scenario: &Scenario,
    tables: &BrakeTables,
    case: &Case,
    options: &RunOptions,
) -> Result<RunResult, DynamicsError> {
    let track = TrackModel::new(
        &scenario.track.gravity,
        scenario.track.air_density_kg_m3,
        scenario.vehicle.length_m,
    );
    let pairs = active_pairs(scenario, tables, case);
    let n_fins = scenario.fins.len();
    let fin_start_c: Vec<f64> = match &options.fin_start_temps_c {
        Some(t) if t.len() == n_fins => t.clone(),
        _ => vec![case.fin_temp_c; n_fins],
    };
    let fin_capacity_j_k = scenario
        .fins
        .iter()
        .map(|f| match f.mount {
            Mount::Vehicle { .. } if options.thermal_feedback => Some(
                f.material.density_kg_m3
                    * f.material.specific_heat_j_kg_k
                    * f.length_m
                    * f.height_m
                    * f.thickness_m,
            ),
            _ => None,
        })
        .collect();
    let fin_fields = match &options.track_fin_fields {
        Some(f) if f.len() == n_fins => f.clone(),
        _ => vec![None; n_fins],
    };
    let ctx = Ctx {
        mass_kg: case.mass_kg,
        vehicle_len_m: scenario.vehicle.length_m,
        pairs,
        fin_capacity_j_k,
        fin_start_c: fin_start_c.clone(),
        fin_fields,
        resistance: case.resistance,
        air_density: scenario.track.air_density_kg_m3,
        n_fins,
    };
    let (rtol, atol) = options
        .tolerances
        .unwrap_or((scenario.solver.rtol, scenario.solver.atol));
    let kinks = kinks(&ctx.pairs, &track);
    let pe = |m: f64, x: f64| m * G * track.mean_elevation_m(x);

    let mut y = SVector::<f64, N>::zeros();
    y[0] = case.start_position_m;
    y[1] = case.start_speed_m_s;
    let mut t = 0.0;
    let initial_energy = 0.5 * case.mass_kg * case.start_speed_m_s.powi(2) + pe(case.mass_kg, y[0]);

    // Direction of travel at the start; a vehicle at rest moves the way gravity pulls it.
    let mut dir = if case.start_speed_m_s > 0.0 {
        1.0
    } else if case.start_speed_m_s < 0.0 {
        -1.0
    } else {
        let f = track.frozen(y[0], 1.0).force_n(case.mass_kg, y[0]);
        if f >= 0.0 {
            1.0
        } else {
            -1.0
        }
    };
    let initial_dir = dir;
    let mut res = RunResult::empty(&case.name, case.mass_kg, initial_energy);
    let mut entered = false;
    let mut next_sample_k: u64 = 0;
    let dt = options.sample_dt_s.max(1e-6);
    let mut creep_deadline: Option<f64> = None;
    let mut scratch = SVector::<f64, N>::zeros();
    let mut onset = Onset::default();
    let mut measured_warned = false;
    let t_limit = scenario.time_limit_s;
    let mut pieces = 0usize;
    // A vehicle already overlapping the brakes at the start is in the zone from t = 0.
    let mut exited = false;

    // Held at rest from the start?
    if case.start_speed_m_s == 0.0 {
        let (lo, hi) = piece(&kinks, y[0], dir);
        let fr = freeze(&ctx, &track, lo, hi, y[0], dir);
        if static_hold(&ctx, &fr, &y) {
            res.outcome = Outcome::Stalled;
            res.stall_position_m = Some(y[0]);
            finish(
                &mut res,
                &ctx,
                &y,
                t,
                initial_energy,
                pe(case.mass_kg, y[0]),
                &fin_start_c,
                scenario,
            );
            return Ok(res);
        }
    }

    loop {
        pieces += 1;
        if pieces > 200_000 {
            return Err(DynamicsError::Integration {
                case: case.name.clone(),
                t_s: t,
                message: "too many pieces (events in a loop)".into(),
            });
        }
        let (lo, hi) = piece(&kinks, y[0], dir);
        let frozen = freeze(&ctx, &track, lo, hi, y[0], dir);
        if !entered && !frozen.pairs.is_empty() {
            entered = true;
            res.entry_speed_m_s = Some(y[1].abs());
            res.entry_time_s = Some(t);
            res.min_speed_m_s = Some(y[1].abs());
        }
        let watch = Watch {
            lo,
            hi,
            dir,
            stall_active: entered && !exited,
            stall_speed: scenario.stall_speed_m_s,
            zone_end: scenario.zone_end_m,
            zone_start: scenario.zone_start_m,
            vehicle_len: ctx.vehicle_len_m,
        };
        let t_end = creep_deadline.unwrap_or(t_limit).min(t_limit);
        let triggered = Cell::new(None);
        let mut g0 = [0.0; 6];
        for (i, e) in EVENTS.iter().enumerate() {
            g0[i] = watch.g(*e, &y);
        }
        let mut dy0 = SVector::<f64, N>::zeros();
        ctx.eval(&frozen, &y, Some(&mut dy0));
        let trace = RefCell::new(vec![(t, y, dy0)]);
        let rhs = Rhs {
            ctx: &ctx,
            frozen: &frozen,
            watch: &watch,
            prev: Some((t, g0)),
            triggered: &triggered,
            trace: &trace,
        };
        let mut cont = ContinuousOutputModel::new();
        let t_piece_start = t;
        if t_end - t > 1e-12 {
            let mut solver = Dopri5::from_param(
                rhs,
                t,
                t_end,
                0.0,
                y,
                rtol,
                atol,
                0.9,
                0.04,
                0.2,
                10.0,
                0.5,
                0.0,
                1_000_000,
                1000,
                OutputType::Continuous,
            );
            let stats = solver
                .integrate_with_continuous_output_model(&mut cont)
                .map_err(|e| DynamicsError::Integration {
                    case: case.name.clone(),
                    t_s: t,
                    message: e.to_string(),
                })?;
            res.steps += u64::from(stats.accepted_steps);
            res.rhs_evaluations += u64::from(stats.num_eval);
        }
        // Where this piece ends, and why.
        let (t_stop, event) = match triggered.get() {
            Some((a, b)) => {
                // The step's start may be the piece start (the first step): check from there too.
                let g_at = |tt: f64, e: Event| {
                    cont.evaluate(tt)
                        .map(|yy| watch.g(e, &yy))
                        .unwrap_or(f64::NAN)
                };
                let mut best: Option<(f64, Event)> = None;
                for e in EVENTS {
                    let (ga, gb) = (g_at(a, e), g_at(b, e));
                    if ga > 0.0 && gb <= 0.0 {
                        let te = locate(
                            a,
                            b,
                            |tt| g_at(tt, e),
                            1e-9_f64.max(4.0 * f64::EPSILON * b.abs()),
                        );
                        if best.is_none_or(|(tb, _)| te < tb) {
                            best = Some((te, e));
                        }
                    }
                }
                match best {
                    Some((te, e)) => (te, Some(e)),
                    None => (b, None),
                }
            }
            None => (t_end, None),
        };
        let y_stop = if t_stop > t_piece_start {
            cont.evaluate(t_stop).unwrap_or(y)
        } else {
            y
        };

        // Samples of this piece.
        let in_zone = entered && !exited;
        let keep = options.sampling == Sampling::Full || in_zone;
        let trace = trace.into_inner();
        let mut step = 0usize;
        let mut ys = y;
        loop {
            let ts = next_sample_k as f64 * dt;
            if ts > t_stop {
                break;
            }
            if ts >= t_piece_start && (keep || in_zone) {
                while step + 1 < trace.len() - 1 && trace[step + 1].0 < ts {
                    step += 1;
                }
                if trace.len() >= 2 {
                    hermite(&trace[step], &trace[step + 1], ts, &mut ys);
                } else {
                    ys.copy_from(&y);
                }
                let mut s = sample(&ctx, &frozen, ts, &ys, false, &mut scratch);
                onset.apply(&mut s);
                record(&mut res, &s, in_zone);
                if keep {
                    res.samples.push(s);
                }
            }
            next_sample_k += 1;
        }
        let mut s_end = sample(&ctx, &frozen, t_stop, &y_stop, true, &mut scratch);
        onset.apply(&mut s_end);
        if in_zone {
            record(&mut res, &s_end, true);
        }
        if keep {
            res.samples.push(s_end);
        }
        if in_zone
            && !measured_warned
            && ctx.pairs.iter().enumerate().any(|(i, p)| {
                frozen.pairs.iter().any(|q| q.0 == i)
                    && !p.covers(y_stop[1], ctx.fin_temp(p.spec.fin, &y_stop))
            })
        {
            measured_warned = true;
            res.warnings.push(format!("the run left the speed range of a measured force curve at {:.3} m/s (held at its last value)", y_stop[1].abs()));
        }
        t = t_stop;
        y = y_stop;
        match event {
            None => {
                // Time limit (or creep deadline).
                if creep_deadline.is_some_and(|d| t >= d - 1e-9) && t < t_limit - 1e-9 {
                    res.outcome = Outcome::Stalled;
                    res.stall_position_m = Some(y[0]);
                    res.warnings
                        .push("creeping below the stall speed for 10 s: counted as a stall".into());
                } else {
                    res.outcome = Outcome::TimeLimit;
                }
                break;
            }
            Some(Event::PieceLow) | Some(Event::PieceHigh) => continue,
            Some(Event::Reversal) => {
                // At rest for an instant: held by resistance, or moving off the other way.
                y[1] = 0.0;
                let mut fr = frozen.clone();
                fr.dir = -dir;
                if static_hold(&ctx, &fr, &y) {
                    res.outcome = Outcome::Stalled;
                    res.stall_position_m = Some(y[0]);
                    break;
                }
                res.reversed = true;
                dir = -dir;
                if !entered
                    && ((dir < 0.0 && y[0] < scenario.zone_start_m)
                        || (dir > 0.0 && y[0] - ctx.vehicle_len_m > scenario.zone_end_m))
                {
                    // Turned back before reaching the brakes.
                    res.outcome = Outcome::RolledBack;
                    break;
                }
                continue;
            }
            Some(Event::Stall) => {
                let fr = frozen.clone();
                if static_hold(&ctx, &fr, &y) {
                    res.outcome = Outcome::Stalled;
                    res.stall_position_m = Some(y[0]);
                    break;
                }
                // Gravity will move it on: keep going, but a creep below the stall speed for 10 s is a stall.
                creep_deadline = Some(t + 10.0);
                continue;
            }
            Some(Event::ClearForward) | Some(Event::ClearBackward) => {
                let forward = event == Some(Event::ClearForward);
                if !entered {
                    // Passed the zone end without ever overlapping (e.g. every section out).
                    res.entry_speed_m_s = Some(y[1].abs());
                    res.entry_time_s = Some(t);
                }
                exited = true;
                res.exit_speed_m_s = Some(y[1]);
                res.outcome = if (forward && initial_dir > 0.0) || (!forward && initial_dir < 0.0) {
                    Outcome::Cleared
                } else {
                    Outcome::RolledBack
                };
                break;
            }
        }
    }
    let _ = exited;
    let pe_end = pe(case.mass_kg, y[0]);
    finish(
        &mut res,
        &ctx,
        &y,
        t,
        initial_energy,
        pe_end,
        &fin_start_c,
        scenario,
    );
    Ok(res)
}

#[allow(clippy::too_many_arguments)]
fn finish<const N: usize>(
    res: &mut RunResult,
    ctx: &Ctx,
    y: &SVector<f64, N>,
    t: f64,
    initial_energy: f64,
    pe_end: f64,
    fin_start_c: &[f64],
    scenario: &Scenario,
) {
    res.end_time_s = t;
    res.braking_energy_j = y[2];
    res.resistance_energy_j = y[3];
    let ke = 0.5 * ctx.mass_kg * y[1] * y[1];
    res.energy_residual_j = ke + pe_end + y[2] + y[3] - initial_energy;
    if let Some(te) = res.entry_time_s {
        res.time_in_zone_s = Some(t - te);
    }
    res.fins = scenario
        .fins
        .iter()
        .enumerate()
        .map(|(i, f)| FinHeat {
            fin: f.name.clone(),
            energy_j: y[4 + i],
            start_temp_c: fin_start_c[i],
            end_temp_c: ctx.fin_temp(i, y),
        })
        .collect();
}

fn record(res: &mut RunResult, s: &Sample, in_zone: bool) {
    if !in_zone {
        return;
    }
    let v = s.v_m_s.abs();
    res.min_speed_m_s = Some(res.min_speed_m_s.map_or(v, |m| m.min(v)));
    let decel = s.decel_g * G;
    if res.peak_decel_m_s2.is_none_or(|p| decel > p) {
        res.peak_decel_m_s2 = Some(decel);
        res.peak_decel_time_s = Some(s.t_s);
        res.peak_decel_position_m = Some(s.s_m);
    }
    if res.peak_onset_g_s.is_none_or(|p| s.onset_g_s > p) {
        res.peak_onset_g_s = Some(s.onset_g_s);
    }
    res.peak_brake_force_n = res.peak_brake_force_n.max(s.brake_force_n.abs());
}

/// Derived quantities at a state (one right-hand-side evaluation into a reused buffer). The onset
/// is filled in by `Onset::apply` from the previous sample.
fn sample<const N: usize>(
    ctx: &Ctx,
    fr: &Frozen,
    t: f64,
    y: &SVector<f64, N>,
    event: bool,
    dy: &mut SVector<f64, N>,
) -> Sample {
    let f = ctx.eval(fr, y, Some(dy));
    let a = dy[1];
    let dir = if y[1] != 0.0 { y[1].signum() } else { fr.dir };
    Sample {
        t_s: t,
        s_m: y[0],
        v_m_s: y[1],
        a_m_s2: a,
        decel_g: -a * dir / G,
        onset_g_s: 0.0,
        brake_force_n: f.brake_n,
        gravity_force_n: f.gravity_n,
        resistance_force_n: f.resistance_n,
        cos_theta: f.cos_theta,
        overlap_m: f.overlap_m,
        event,
    }
}

/// Cubic Hermite interpolation between two accepted step ends (value and derivative at both),
/// third-order accurate like the integrator's own continuous extension; used for the uniform
/// samples, while events are located on the integrator's continuous output.
fn hermite<const N: usize>(a: &StepEnd<N>, b: &StepEnd<N>, t: f64, out: &mut SVector<f64, N>) {
    let h = b.0 - a.0;
    if h <= 0.0 {
        out.copy_from(&b.1);
        return;
    }
    let th = ((t - a.0) / h).clamp(0.0, 1.0);
    let (t2, t3) = (th * th, th * th * th);
    let h00 = 2.0 * t3 - 3.0 * t2 + 1.0;
    let h10 = t3 - 2.0 * t2 + th;
    let h01 = -2.0 * t3 + 3.0 * t2;
    let h11 = t3 - t2;
    for i in 0..out.len() {
        out[i] = h00 * a.1[i] + h10 * h * a.2[i] + h01 * b.1[i] + h11 * h * b.2[i];
    }
}

/// Onset as the backward difference of the deceleration between consecutive samples (1 ms by
/// default): the rate of change averaged over one sample interval.
#[derive(Default)]
struct Onset {
    prev: Option<(f64, f64)>,
}

impl Onset {
    fn apply(&mut self, s: &mut Sample) {
        if let Some((t0, d0)) = self.prev {
            let dt = s.t_s - t0;
            if dt > 1e-7 {
                s.onset_g_s = (s.decel_g - d0) / dt;
            } else {
                // An event sample at (almost) the time of a grid sample: keep the last rate.
                return;
            }
        }
        self.prev = Some((s.t_s, s.decel_g));
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn locate_finds_a_root() {
        let t = locate(0.0, 2.0, |t| 1.0 - t * t, 1e-12);
        assert!((t - 1.0).abs() < 1e-11);
    }

    #[test]
    fn pieces_by_direction() {
        let k = [1.0, 2.0, 3.0];
        assert_eq!(piece(&k, 2.0, 1.0), (2.0, 3.0));
        assert_eq!(piece(&k, 2.0, -1.0), (1.0, 2.0));
        assert_eq!(piece(&k, 0.0, 1.0), (f64::NEG_INFINITY, 1.0));
        assert_eq!(piece(&k, 5.0, 1.0), (3.0, f64::INFINITY));
    }
}
