//! Stepping one piece with the Dormand–Prince 5(4) method: the solver settings, and the run of
//! one piece up to its first event (the event functions are checked after every accepted step).

use super::context::Ctx;
use super::dopri::{Dense, State, StepFailure, Stepper};
use super::events::{first_event, Event, Watch, EVENTS};
use super::loads::state_at;
use super::pieces::Frozen;
use crate::dynamics::IntegrationCause;
use crate::scenario::Solver;

/// Settings of the Dormand–Prince 5(4) solver (the names and meaning of ode_solvers'
/// `Dopri5::from_param`, after Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations
/// I, 1993, §II.4 and the DOPRI5 code; see [`super::dopri`]). Defaults: [`SolverSettings::from_block`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SolverSettings {
    /// Relative tolerance of the local error (scenario `solver.rtol`, default 1e-10).
    pub rtol: f64,
    /// Absolute tolerance of the local error, in the units of each state entry (scenario
    /// `solver.atol`, default 1e-10).
    pub atol: f64,
    /// Safety factor on the optimal step from the error estimate (0.9).
    pub safety_factor: f64,
    /// β of the PI step-size controller; α = 0.2 − 0.75·β follows from it (0.04).
    pub beta: f64,
    /// Smallest ratio of a new step to the last one: a step shrinks by at most 1/0.2 = 5× (0.2).
    pub fac_min: f64,
    /// Largest ratio of a new step to the last one: a step grows by at most 10× (10).
    pub fac_max: f64,
    /// Largest step, s (0.5 s: keeps steps short against the 1 ms samples and the events).
    pub h_max_s: f64,
    /// First step, s; 0 lets the solver choose it from the derivatives (0).
    pub h_initial_s: f64,
    /// Most steps in one piece before the solver gives up (1 000 000).
    pub max_steps: u32,
    /// Accepted steps between two stiffness tests (1000).
    pub stiffness_test_every: u32,
}

impl SolverSettings {
    /// The settings with the tolerances of the scenario's solver block.
    pub fn from_block(block: &Solver) -> Self {
        Self {
            rtol: block.rtol,
            atol: block.atol,
            ..Self::default()
        }
    }
}

impl Default for SolverSettings {
    /// The settings with the scenario format's default tolerances (1e-10 each).
    fn default() -> Self {
        Self {
            rtol: 1e-10,
            atol: 1e-10,
            safety_factor: 0.9,
            beta: 0.04,
            fac_min: 0.2,
            fac_max: 10.0,
            h_max_s: 0.5,
            h_initial_s: 0.0,
            max_steps: 1_000_000,
            stiffness_test_every: 1000,
        }
    }
}

/// How one piece ended.
pub(super) struct PieceEnd<const N: usize> {
    /// Where the piece stops: the first event, or the end time, s.
    pub t_stop: f64,
    /// The state there.
    pub y_stop: State<N>,
    /// The acceleration there, m/s².
    pub a_stop: f64,
    /// The event that stopped it (None: the end time).
    pub event: Option<Event>,
    /// The step the controller proposes next (the first step of the next piece), s.
    pub next_h: f64,
    /// Accepted steps.
    pub steps: u64,
    /// Right-hand-side evaluations (the solver's; the caller's evaluation at the start is not
    /// counted here).
    pub rhs_evaluations: u64,
}

impl<const N: usize> PieceEnd<N> {
    /// The piece stops at `t_s` with state `y` and acceleration `a_m_s2`, by `event` (None: the
    /// end time).
    fn stop(&mut self, t_s: f64, event: Option<Event>, y: State<N>, a_m_s2: f64) {
        self.t_stop = t_s;
        self.event = event;
        self.y_stop = y;
        self.a_stop = a_m_s2;
    }
}

/// A stepper failure as a typed cause.
fn cause_of(failure: StepFailure, settings: &SolverSettings) -> IntegrationCause {
    match failure {
        StepFailure::StepLimit => IntegrationCause::StepLimit {
            steps: settings.max_steps,
        },
        StepFailure::Underflow => IntegrationCause::StepSizeUnderflow,
        StepFailure::Stiff => IntegrationCause::Stiff,
    }
}

/// Where a piece starts: time, state, its derivative under the piece's laws, and the first step
/// to try (≤ 0: chosen from the derivatives).
pub(super) struct PieceStart<const N: usize> {
    pub t: f64,
    pub y: State<N>,
    pub f: State<N>,
    pub h: f64,
}

/// Steps from `start` under `frozen` towards `t_end` until the first event of `watch`, located
/// on the step's continuous output. Every accepted step is handed to `on_step` with the time it
/// is used up to (its end, or the event). Err: the solver's stop time and cause.
pub(super) fn step_piece<const N: usize>(
    ctx: &Ctx,
    frozen: &Frozen,
    watch: &Watch,
    settings: &SolverSettings,
    start: PieceStart<N>,
    t_end: f64,
    mut on_step: impl FnMut(&Dense<N>, f64),
) -> Result<PieceEnd<N>, (f64, IntegrationCause)> {
    let mut rhs = |y: &State<N>, dy: &mut State<N>| ctx.eval(frozen, y, dy);
    let mut stepper =
        Stepper::new(settings, start.t, start.y, start.f, start.h).using(4 + ctx.n_fins);
    let mut end = PieceEnd {
        t_stop: t_end,
        y_stop: start.y,
        a_stop: start.f[1],
        event: None,
        next_h: start.h,
        steps: 0,
        rhs_evaluations: 0,
    };
    // The piece's end in the direction of travel: steps are aimed at it, and one that ends
    // within `NEAR_END` of it ends the piece there (see [`land_at_exit`]).
    let (exit_x, exit_event) = if watch.dir > 0.0 {
        (watch.hi, Event::PieceHigh)
    } else {
        (watch.lo, Event::PieceLow)
    };
    let mut landed_h = None;
    if t_end - start.t > 1e-12 {
        if start.h.is_nan() || start.h <= 0.0 {
            stepper.initial_step(&mut rhs);
        }
        let mut g_prev = watch.values(&start.y);
        loop {
            let h_proposed = stepper.h;
            let target = landing_time(&stepper, exit_x, t_end).unwrap_or(t_end);
            let last = stepper
                .step(&mut rhs, target)
                .map_err(|e| (stepper.t, cause_of(e, settings)))?;
            let aimed = last && target < t_end;
            let g = watch.values(&stepper.y);
            if (0..EVENTS.len()).any(|i| g_prev[i] > 0.0 && g[i] <= 0.0) {
                let d = stepper.dense;
                match first_event(&d, watch) {
                    (t_stop, Some(event)) => {
                        let th = ((t_stop - d.t0) / d.h).clamp(0.0, 1.0);
                        on_step(&d, t_stop);
                        let y = if event == exit_event && th >= 1.0 - NEAR_END {
                            landed_h = aimed.then_some(h_proposed);
                            state_at(&d, th, stepper.used())
                        } else {
                            stepper.restep_to(&mut rhs, t_stop)
                        };
                        end.stop(t_stop, Some(event), y, d.rate_at_theta(1, th));
                    }
                    (_, None) => {
                        // The crossing shows only in the step-end values (the continuous output
                        // there differs by rounding): the event is at the step end.
                        on_step(&d, stepper.t);
                        let event = (0..EVENTS.len())
                            .find(|&i| g_prev[i] > 0.0 && g[i] <= 0.0)
                            .map(|i| EVENTS[i]);
                        end.stop(stepper.t, event, stepper.y, stepper.f[1]);
                    }
                }
                break;
            }
            if aimed {
                let d = stepper.dense;
                if let Some(th) = land_at_exit(&d, exit_x, watch, &g, stepper.used()) {
                    let t_stop = d.t0 + th * d.h;
                    on_step(&d, t_stop);
                    let y = state_at(&d, th, stepper.used());
                    end.stop(t_stop, Some(exit_event), y, d.rate_at_theta(1, th));
                    landed_h = Some(h_proposed);
                    break;
                }
            }
            on_step(&stepper.dense, stepper.t);
            g_prev = g;
            if last && !aimed {
                end.stop(stepper.t, None, stepper.y, stepper.f[1]);
                break;
            }
        }
    }
    // The next piece starts where this one's laws stopped holding: with the last step taken,
    // not a grown proposal (a step across the kink said nothing about the new laws); after a
    // step cut short to land on the kink, with the step proposed before the cut.
    end.next_h = landed_h.unwrap_or_else(|| stepper.h.min(stepper.dense.h));
    end.steps = stepper.accepted;
    end.rhs_evaluations = stepper.evaluations;
    Ok(end)
}

/// How close to a step's end (as a share of the step) a piece end may lie for the piece to end
/// there on the step's continuous output, without re-stepping to it. The continuous extension
/// meets the step's end value and end derivative, so its error there grows like the square of
/// the distance from the end: at 1 % of the step it is ~1e-4 of its largest, below the step's
/// own local error.
const NEAR_END: f64 = 0.01;

/// The time at which the next step should end to land on the piece end `exit_x` when the
/// proposed step would reach it (within the 1 % the stepper stretches a step by to meet its end
/// time): the root of x + v·τ + a·τ²/2 = `exit_x` from the stepper's state and derivative. None
/// when the step stays short of it, the motion stops before it, or it is less than 1e-6 of the
/// step ahead.
fn landing_time<const N: usize>(stepper: &Stepper<N>, exit_x: f64, t_end: f64) -> Option<f64> {
    let (x, v, a) = (stepper.y[0], stepper.y[1], stepper.f[1]);
    let dist = exit_x - x;
    if !dist.is_finite() || dist * v <= 0.0 {
        return None;
    }
    let h = stepper.h.min(t_end - stepper.t);
    let disc = v * v + 2.0 * a * dist;
    if disc <= 0.0 {
        return None;
    }
    // τ = 2·dist/(v + sign(v)·√disc): the root of the same sign as the motion, without
    // cancellation.
    let tau = 2.0 * dist / (v + v.signum() * disc.sqrt());
    // A kink a sliver ahead (two kinks a rounding apart) is not aimed at: a step that short
    // could fall below the stepper's resolution of the time; the step crosses it and the event
    // is located and re-stepped to instead.
    (tau >= 1e-6 * h && tau <= 1.01 * h).then_some(stepper.t + tau)
}

/// The θ ∈ (1, 1 + `NEAR_END`] at which the continuous output of the step `d`, which was aimed
/// at the piece end `exit_x` and stopped short of it, reaches it (Newton's method on the
/// interpolant's position, which extends smoothly past the step's end), when no other event
/// function in `watch` crosses zero there from its step-end value `g`. None: step on.
fn land_at_exit<const N: usize>(
    d: &Dense<N>,
    exit_x: f64,
    watch: &Watch,
    g: &[f64; 6],
    used: usize,
) -> Option<f64> {
    let mut th = 1.0;
    for _ in 0..8 {
        let (x, rate) = (d.value_at_theta(0, th), d.rate_at_theta(0, th) * d.h);
        if rate == 0.0 || !rate.is_finite() {
            return None;
        }
        let next = th - (x - exit_x) / rate;
        if !(next.is_finite() && next > 1.0 && next <= 1.0 + NEAR_END) {
            return None;
        }
        let done = (next - th).abs() <= 4.0 * f64::EPSILON;
        th = next;
        if done {
            break;
        }
    }
    let y = state_at(d, th, used);
    let g_end = watch.values(&y);
    let others_hold = (0..EVENTS.len()).all(|i| {
        EVENTS[i] == Event::PieceHigh
            || EVENTS[i] == Event::PieceLow
            || !(g[i] > 0.0 && g_end[i] <= 0.0)
    });
    others_hold.then_some(th)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A stepper at x = 0 moving at `v` with acceleration `a` and the step `h` proposed.
    fn moving(v: f64, a: f64, h: f64) -> Stepper<8> {
        let mut y = [0.0; 8];
        y[1] = v;
        let mut f = [0.0; 8];
        f[0] = v;
        f[1] = a;
        Stepper::new(&SolverSettings::default(), 2.0, y, f, h).using(4)
    }

    #[test]
    fn a_step_is_aimed_at_the_root_of_the_uniformly_accelerated_motion() {
        // 10·τ − τ² = 1: τ = 5 − √24.
        let tau = 5.0 - 24f64.sqrt();
        let t = landing_time(&moving(10.0, -2.0, 0.2), 1.0, 100.0).expect("reaches the kink");
        assert!((t - (2.0 + tau)).abs() < 1e-14, "{t}");
        // Backwards: the same motion mirrored.
        let t = landing_time(&moving(-10.0, 2.0, 0.2), -1.0, 100.0).expect("reaches the kink");
        assert!((t - (2.0 + tau)).abs() < 1e-14, "{t}");
        // Within the 1 % the stepper stretches a step by: aimed.
        assert!(landing_time(&moving(10.0, 0.0, 0.1), 1.005, 100.0).is_some());
        // A step that stays short of it, a kink behind, a motion that stops before it, and an
        // end time before it: not aimed.
        assert!(landing_time(&moving(10.0, -2.0, 0.05), 1.0, 100.0).is_none());
        assert!(landing_time(&moving(10.0, -2.0, 0.2), -1.0, 100.0).is_none());
        assert!(landing_time(&moving(10.0, -200.0, 0.2), 1.0, 100.0).is_none());
        assert!(landing_time(&moving(10.0, -2.0, 0.2), 1.0, 2.05).is_none());
        assert!(landing_time(&moving(10.0, -2.0, 0.2), f64::INFINITY, 100.0).is_none());
        // A sliver ahead (1e-12 m at 10 m/s: 1e-13 s, far below a step of 0.2 s).
        assert!(landing_time(&moving(10.0, -2.0, 0.2), 1e-12, 100.0).is_none());
    }

    /// The continuous output of x = t² on [0, 1] (exact for a quadratic), and a watch whose
    /// piece ends at `hi`.
    fn quadratic_step(hi: f64) -> (Dense<8>, Watch) {
        let mut r = [[0.0; 8]; 5];
        // y(θ) = r0 + θ(r1 + (1−θ)(r2 + θ(r3 + (1−θ)r4))) = θ²: r1 = 1, r2 = −1.
        r[1][0] = 1.0;
        r[2][0] = -1.0;
        let d = Dense { t0: 0.0, h: 1.0, r };
        let watch = Watch {
            lo: f64::NEG_INFINITY,
            hi,
            dir: 1.0,
            stall_active: false,
            stall_speed: 0.0,
            zone_end: 1e9,
            zone_start: -1e9,
            vehicle_len: 1.0,
        };
        (d, watch)
    }

    #[test]
    fn a_step_short_of_its_kink_ends_the_piece_on_the_extended_output() {
        // x = θ² reaches 1.01 at θ = √1.01 (within 1 % of the step's end).
        let (d, watch) = quadratic_step(1.01);
        let y1 = state_at(&d, 1.0, 4);
        let g = watch.values(&y1);
        let th = land_at_exit(&d, 1.01, &watch, &g, 4).expect("lands");
        assert!((th - 1.01f64.sqrt()).abs() < 1e-15, "{th}");
        // 1.03 is reached only at θ ≈ 1.0149: too far past the step to end there.
        let (d, watch) = quadratic_step(1.03);
        assert!(land_at_exit(&d, 1.03, &watch, &g, 4).is_none());
        // Another event that would fire on the way (the rear clears the zone end at x = 1.005):
        // step on instead.
        let (d, mut watch) = quadratic_step(1.01);
        watch.zone_end = 1.005 - watch.vehicle_len;
        let g = watch.values(&y1);
        assert!(g[4] > 0.0);
        assert!(land_at_exit(&d, 1.01, &watch, &g, 4).is_none());
    }
}
