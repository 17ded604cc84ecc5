//! Stepping one piece with the Dormand–Prince 5(4) method: the solver settings, the right-hand
//! side handed to the solver (which also watches the events after every accepted step), and the
//! run of one piece up to its first event.

use super::context::Ctx;
use super::events::{first_event, Event, Watch, EVENTS};
use super::pieces::Frozen;
use crate::dynamics::IntegrationCause;
use crate::scenario::Solver;
use ode_solvers::continuous_output_model::ContinuousOutputModel;
use ode_solvers::dop_shared::IntegrationError;
use ode_solvers::{Dopri5, OutputType, SVector, System};
use std::cell::{Cell, RefCell};

/// Settings of the Dormand–Prince 5(4) solver (the names and meaning of ode_solvers'
/// `Dopri5::from_param`, after Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations
/// I, 1993, §II.4 and the DOPRI5 code). Defaults: [`SolverSettings::from_block`].
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

/// An accepted step end: (t, y, y').
pub(super) type StepEnd<const N: usize> = (f64, SVector<f64, N>, SVector<f64, N>);

/// The right-hand side under the frozen laws of one piece. After each accepted step it records
/// the step end and checks the event functions; on a sign change it keeps the step's time span
/// and stops the solver.
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
        let g = self.watch.values(y);
        let hit = match self.prev {
            Some((t0, g0)) => (0..EVENTS.len())
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

/// How one piece ended.
pub(super) struct PieceEnd<const N: usize> {
    /// Where the piece stops: the first event, or the end time, s.
    pub t_stop: f64,
    /// The state there.
    pub y_stop: SVector<f64, N>,
    /// The event that stopped it (None: the end time).
    pub event: Option<Event>,
    /// The accepted step ends from the piece start on.
    pub trace: Vec<StepEnd<N>>,
    /// Accepted steps.
    pub steps: u64,
    /// Right-hand-side evaluations.
    pub rhs_evaluations: u64,
}

/// A solver failure as a typed cause, with the time the solver stopped at.
fn cause_of(error: &IntegrationError, settings: &SolverSettings) -> (f64, IntegrationCause) {
    match *error {
        IntegrationError::MaxNumStepReached { x, .. } => (
            x,
            IntegrationCause::StepLimit {
                steps: settings.max_steps,
            },
        ),
        IntegrationError::StepSizeUnderflow { x } => (x, IntegrationCause::StepSizeUnderflow),
        IntegrationError::StiffnessDetected { x } => (x, IntegrationCause::Stiff),
    }
}

/// Steps from `start` (t, y, y') under `frozen` towards `t_end` until the first event of
/// `watch`, located on the solver's continuous output. Err: the solver's stop time and cause.
pub(super) fn step_piece<const N: usize>(
    ctx: &Ctx,
    frozen: &Frozen,
    watch: &Watch,
    settings: &SolverSettings,
    start: StepEnd<N>,
    t_end: f64,
) -> Result<PieceEnd<N>, (f64, IntegrationCause)> {
    let (t, y, _) = start;
    let triggered = Cell::new(None);
    let trace = RefCell::new(vec![start]);
    let rhs = Rhs {
        ctx,
        frozen,
        watch,
        prev: Some((t, watch.values(&y))),
        triggered: &triggered,
        trace: &trace,
    };
    let mut cont = ContinuousOutputModel::new();
    let (mut steps, mut rhs_evaluations) = (0, 0);
    if t_end - t > 1e-12 {
        let mut solver = Dopri5::from_param(
            rhs,
            t,
            t_end,
            0.0,
            y,
            settings.rtol,
            settings.atol,
            settings.safety_factor,
            settings.beta,
            settings.fac_min,
            settings.fac_max,
            settings.h_max_s,
            settings.h_initial_s,
            settings.max_steps,
            settings.stiffness_test_every,
            OutputType::Continuous,
        );
        let stats = solver
            .integrate_with_continuous_output_model(&mut cont)
            .map_err(|e| cause_of(&e, settings))?;
        steps = u64::from(stats.accepted_steps);
        rhs_evaluations = u64::from(stats.num_eval);
    }
    let (t_stop, event) = match triggered.get() {
        Some((a, b)) => first_event(&cont, watch, a, b),
        None => (t_end, None),
    };
    let y_stop = if t_stop > t {
        cont.evaluate(t_stop).unwrap_or(y)
    } else {
        y
    };
    Ok(PieceEnd {
        t_stop,
        y_stop,
        event,
        trace: trace.into_inner(),
        steps,
        rhs_evaluations,
    })
}
