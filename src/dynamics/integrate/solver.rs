//! Stepping one piece with the Dormand–Prince 5(4) method: the solver settings, and the run of
//! one piece up to its first event (the event functions are checked after every accepted step).

use super::context::Ctx;
use super::dopri::{Dense, State, StepFailure, Stepper};
use super::events::{first_event, Event, Watch, EVENTS};
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
    if t_end - start.t > 1e-12 {
        if start.h.is_nan() || start.h <= 0.0 {
            stepper.initial_step(&mut rhs);
        }
        let mut g_prev = watch.values(&start.y);
        loop {
            let last = stepper
                .step(&mut rhs, t_end)
                .map_err(|e| (stepper.t, cause_of(e, settings)))?;
            let g = watch.values(&stepper.y);
            if (0..EVENTS.len()).any(|i| g_prev[i] > 0.0 && g[i] <= 0.0) {
                let d = stepper.dense;
                match first_event(&d, watch) {
                    (t_stop, Some(event)) => {
                        let th = ((t_stop - d.t0) / d.h).clamp(0.0, 1.0);
                        on_step(&d, t_stop);
                        end.t_stop = t_stop;
                        end.event = Some(event);
                        end.y_stop = stepper.restep_to(&mut rhs, t_stop);
                        end.a_stop = d.rate_at_theta(1, th);
                    }
                    (_, None) => {
                        // The crossing shows only in the step-end values (the continuous output
                        // there differs by rounding): the event is at the step end.
                        on_step(&d, stepper.t);
                        end.t_stop = stepper.t;
                        end.event = (0..EVENTS.len())
                            .find(|&i| g_prev[i] > 0.0 && g[i] <= 0.0)
                            .map(|i| EVENTS[i]);
                        end.y_stop = stepper.y;
                        end.a_stop = stepper.f[1];
                    }
                }
                break;
            }
            on_step(&stepper.dense, stepper.t);
            g_prev = g;
            if last {
                end.t_stop = stepper.t;
                end.y_stop = stepper.y;
                end.a_stop = stepper.f[1];
                break;
            }
        }
    }
    // The next piece starts where this one's laws stopped holding: with the last step taken,
    // not a grown proposal (a step across the kink said nothing about the new laws).
    end.next_h = stepper.h.min(stepper.dense.h);
    end.steps = stepper.accepted;
    end.rhs_evaluations = stepper.evaluations;
    Ok(end)
}
