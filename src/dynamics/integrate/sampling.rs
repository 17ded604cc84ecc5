//! Sampling from the integrator's continuous output: the uniform samples of every accepted step
//! and the event sample at the end of a piece, the onset, the running extremes of the result,
//! and the dense output kept for callers.
//!
//! A sample needs no right-hand-side evaluation: position, speed and acceleration come from the
//! step's continuous extension (the quartic of Dormand & Prince and its slope, which meets the
//! step's end derivatives), and the forces follow from them under the piece's frozen laws:
//! gravity, the normal direction and resistance are cheap closed forms, and the brake force is
//! what is left of m·a. The peak deceleration and the lowest speed are the extremes of the
//! continuous output over each step (roots of its derivative), so they do not depend on the
//! sample interval.

use super::context::Ctx;
use super::dopri::{Dense, State};
use super::pieces::Frozen;
use crate::constants::STANDARD_GRAVITY_M_S2 as G;
use crate::dynamics::track::resistance_magnitude_n;
use crate::dynamics::trajectory::{poly_extrema, poly_slope, poly_value, PathStep};
use crate::dynamics::{RunResult, Sample};

/// The sample clock of a run and its onset memory.
pub(super) struct Sampler {
    /// Index of the next uniform sample (at `next_k`·dt).
    next_k: u64,
    dt_s: f64,
    onset: Onset,
    /// Keep the dense output in the result.
    keep_trajectory: bool,
}

/// Where a sample is taken: time, position, speed and acceleration.
#[derive(Clone, Copy)]
pub(super) struct Motion {
    pub t_s: f64,
    pub x_m: f64,
    pub v_m_s: f64,
    pub a_m_s2: f64,
}

/// What a step of a piece means for the samples: the piece's laws, whether the vehicle is in the
/// zone (extremes are taken there), whether samples are kept, and the piece's index.
pub(super) struct StepContext<'a> {
    pub ctx: &'a Ctx,
    pub frozen: &'a Frozen,
    pub in_zone: bool,
    pub keep: bool,
    pub piece: u32,
}

impl Sampler {
    /// A clock from t = 0 with interval `dt_s`.
    pub fn new(dt_s: f64, keep_trajectory: bool) -> Self {
        Self {
            next_k: 0,
            dt_s,
            onset: Onset::default(),
            keep_trajectory,
        }
    }

    /// The uniform samples of one accepted step up to `t_hi` (its end, or the event that stops
    /// the piece), and the extremes of its continuous output there.
    pub fn step<const N: usize>(
        &mut self,
        sc: &StepContext<'_>,
        dense: &Dense<N>,
        t_hi: f64,
        res: &mut RunResult,
    ) {
        // A piece that ends just past the step (a step aimed at a kink that stopped short of
        // it) is sampled on the continuous output extended to there.
        let th_hi = if t_hi > dense.t1() {
            (t_hi - dense.t0) / dense.h
        } else {
            ((t_hi - dense.t0) / dense.h).clamp(0.0, 1.0)
        };
        let (position, speed) = (dense.poly(0), dense.poly(1));
        loop {
            let ts = self.next_k as f64 * self.dt_s;
            if ts > t_hi {
                break;
            }
            if sc.keep {
                let th = ((ts - dense.t0) / dense.h).clamp(0.0, th_hi);
                let m = Motion {
                    t_s: ts,
                    x_m: poly_value(&position, th),
                    v_m_s: poly_value(&speed, th),
                    a_m_s2: poly_slope(&speed, th) / dense.h,
                };
                let mut s = derived(sc.ctx, sc.frozen, m, false);
                self.onset.apply(&mut s);
                record(res, &s, sc.in_zone);
                if sc.in_zone && sc.ctx.lateral {
                    let y = super::loads::state_at(dense, th, 4 + sc.ctx.n_fins);
                    lateral(sc, &y, res);
                }
                res.samples.push(s);
            }
            self.next_k += 1;
        }
        if sc.in_zone {
            extremes(sc.frozen.dir, dense, &position, &speed, th_hi, res);
        }
        super::loads::add_step(sc.ctx, sc.frozen, dense, th_hi, res);
        if self.keep_trajectory {
            res.trajectory.push(PathStep {
                t0_s: dense.t0,
                h_s: dense.h,
                theta_end: th_hi,
                position_m: position,
                speed_m_s: speed,
                piece: sc.piece,
            });
        }
    }

    /// The sample at the end of a piece (an event, or the end time) with the state `y` there.
    /// It always feeds the onset and, inside the zone, the brake and lateral force peaks; it is
    /// kept when `sc.keep`.
    pub fn event<const N: usize>(
        &mut self,
        sc: &StepContext<'_>,
        m: Motion,
        y: &State<N>,
        res: &mut RunResult,
    ) {
        let mut s = derived(sc.ctx, sc.frozen, m, true);
        self.onset.apply(&mut s);
        record(res, &s, sc.in_zone);
        if sc.in_zone && sc.ctx.lateral {
            lateral(sc, y, res);
        }
        if sc.keep {
            res.samples.push(s);
        }
    }
}

/// The lowest speed and the peak deceleration of a step's continuous output on θ ∈ [0, θ_hi]
/// (the direction of travel `dir` is fixed within a piece).
fn extremes<const N: usize>(
    dir: f64,
    dense: &Dense<N>,
    position: &[f64; 5],
    speed: &[f64; 5],
    th_hi: f64,
    res: &mut RunResult,
) {
    // |v| = dir·v inside a piece (a reversal ends the piece).
    let along = speed.map(|c| dir * c);
    let ((_, v_min), _) = poly_extrema(&along, 0.0, th_hi);
    let v_min = v_min.abs();
    res.min_speed_m_s = Some(res.min_speed_m_s.map_or(v_min, |m| m.min(v_min)));
    // Deceleration −dir·a = −dir·v′(θ)/h.
    let decel = [
        -dir * speed[1],
        -dir * 2.0 * speed[2],
        -dir * 3.0 * speed[3],
        -dir * 4.0 * speed[4],
        0.0,
    ];
    let (_, (th, d)) = poly_extrema(&decel, 0.0, th_hi);
    let d = d / dense.h;
    if res.peak_decel_m_s2.is_none_or(|p| d > p) {
        res.peak_decel_m_s2 = Some(d);
        res.peak_decel_time_s = Some(dense.t0 + th * dense.h);
        res.peak_decel_position_m = Some(poly_value(position, th));
    }
}

/// Updates the result's onset and brake force peaks with a sample inside the zone.
fn record(res: &mut RunResult, s: &Sample, in_zone: bool) {
    if !in_zone {
        return;
    }
    if res.peak_onset_g_s.is_none_or(|p| s.onset_g_s > p) {
        res.peak_onset_g_s = Some(s.onset_g_s);
    }
    res.peak_brake_force_n = res.peak_brake_force_n.max(s.brake_force_n.abs());
}

/// Updates the result's lateral force peak with the state `y` of a sample inside the zone: the
/// sum over the piece's pairs of the lateral force with their frozen overlaps.
fn lateral<const N: usize>(sc: &StepContext<'_>, y: &State<N>, res: &mut RunResult) {
    let Some(peak) = res.peak_lateral.as_mut() else {
        return;
    };
    let x = y[0];
    let f: f64 = sc
        .frozen
        .pairs
        .iter()
        .map(|&(p, a, b)| sc.ctx.pair_lateral(p, a + b * x, y))
        .sum();
    if f.abs() > peak.force_n.abs() {
        *peak = crate::dynamics::LateralPeak {
            force_n: f,
            position_m: Some(x),
            speed_m_s: Some(y[1]),
        };
    }
}

/// The sample at a point of the motion under the frozen laws (no right-hand-side evaluation:
/// the brake force is m·a less gravity and resistance). The onset is filled in by
/// `Onset::apply` from the previous sample.
fn derived(ctx: &Ctx, fr: &Frozen, m: Motion, event: bool) -> Sample {
    let (x, v, a) = (m.x_m, m.v_m_s, m.a_m_s2);
    let (gravity, cos_theta) = fr.gravity.force_and_cos(ctx.mass_kg, x);
    let resistance = -fr.dir
        * resistance_magnitude_n(&ctx.resistance, ctx.mass_kg, cos_theta, v, ctx.air_density);
    let overlap = fr.overlap_sum.0 + fr.overlap_sum.1 * x;
    let dir = if v != 0.0 { v.signum() } else { fr.dir };
    Sample {
        t_s: m.t_s,
        s_m: x,
        v_m_s: v,
        a_m_s2: a,
        decel_g: -a * dir / G,
        onset_g_s: 0.0,
        brake_force_n: ctx.mass_kg * a - gravity - resistance,
        gravity_force_n: gravity,
        resistance_force_n: resistance,
        cos_theta,
        curvature_1_m: fr.curvature_1_m,
        overlap_m: overlap,
        event,
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
