//! Sampling: the uniform samples of a piece (cubic Hermite between accepted step ends, one
//! right-hand-side evaluation each), the event sample at its end, the onset, and the running
//! peaks of the result.

use super::context::Ctx;
use super::pieces::Frozen;
use super::solver::StepEnd;
use crate::constants::STANDARD_GRAVITY_M_S2 as G;
use crate::dynamics::{RunResult, Sample};
use crate::numeric::HermiteWeights;
use ode_solvers::SVector;

/// The sample clock and the scratch space of a run.
pub(super) struct Sampler<const N: usize> {
    /// Index of the next uniform sample (at `next_k`·dt).
    next_k: u64,
    dt_s: f64,
    scratch: SVector<f64, N>,
    onset: Onset,
}

/// One piece as the sampler sees it.
pub(super) struct PieceSpan<'a, const N: usize> {
    pub frozen: &'a Frozen,
    /// Accepted step ends from the piece start on.
    pub trace: &'a [StepEnd<N>],
    pub t_start: f64,
    /// State at the piece start.
    pub y_start: &'a SVector<f64, N>,
    pub t_stop: f64,
    pub y_stop: &'a SVector<f64, N>,
}

impl<const N: usize> Sampler<N> {
    /// A clock from t = 0 with interval `dt_s`.
    pub fn new(dt_s: f64) -> Self {
        Self {
            next_k: 0,
            dt_s,
            scratch: SVector::zeros(),
            onset: Onset::default(),
        }
    }

    /// The uniform samples of a piece up to its stop and the event sample there. Samples feed
    /// the result's peaks when `in_zone`; they are kept in the result when `keep`.
    pub fn sample_piece(
        &mut self,
        ctx: &Ctx,
        span: &PieceSpan<'_, N>,
        in_zone: bool,
        keep: bool,
        res: &mut RunResult,
    ) {
        let trace = span.trace;
        let mut step = 0usize;
        let mut ys = *span.y_start;
        loop {
            let ts = self.next_k as f64 * self.dt_s;
            if ts > span.t_stop {
                break;
            }
            if ts >= span.t_start && keep {
                while step + 1 < trace.len() - 1 && trace[step + 1].0 < ts {
                    step += 1;
                }
                if trace.len() >= 2 {
                    interpolate(&trace[step], &trace[step + 1], ts, &mut ys);
                } else {
                    ys.copy_from(span.y_start);
                }
                let mut s = sample(ctx, span.frozen, ts, &ys, false, &mut self.scratch);
                self.onset.apply(&mut s);
                record(res, &s, in_zone);
                res.samples.push(s);
            }
            self.next_k += 1;
        }
        let mut s_end = sample(
            ctx,
            span.frozen,
            span.t_stop,
            span.y_stop,
            true,
            &mut self.scratch,
        );
        self.onset.apply(&mut s_end);
        record(res, &s_end, in_zone);
        if keep {
            res.samples.push(s_end);
        }
    }
}

/// Updates the result's lowest speed and peaks with a sample inside the zone.
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
        curvature_1_m: fr.gravity.mean_curvature_1_m(),
        overlap_m: f.overlap_m,
        event,
    }
}

/// The state at `t` by cubic Hermite interpolation between two accepted step ends (value and
/// derivative at both), third-order accurate like the integrator's own continuous extension;
/// used for the uniform samples, while events are located on the integrator's continuous output.
fn interpolate<const N: usize>(a: &StepEnd<N>, b: &StepEnd<N>, t: f64, out: &mut SVector<f64, N>) {
    let h = b.0 - a.0;
    if h <= 0.0 {
        out.copy_from(&b.1);
        return;
    }
    let w = HermiteWeights::at(((t - a.0) / h).clamp(0.0, 1.0));
    for i in 0..out.len() {
        out[i] = w.blend(h, a.1[i], a.2[i], b.1[i], b.2[i]);
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
