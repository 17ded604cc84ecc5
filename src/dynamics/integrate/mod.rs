//! Integration of one case, piece by piece between force kinks.
//!
//! The brake force has kinks wherever a fin edge meets a section edge, and gravity wherever the
//! vehicle's front or rear crosses a profile point; resistance changes sign when the motion
//! reverses. Within a piece every law is frozen on its current branch (overlaps are linear in the
//! position, gravity is on fixed profile pieces, resistance has a fixed sign), so the right-hand
//! side is smooth and the Dormand–Prince 5(4) method (Dormand & Prince, J. Comp. Appl. Math. 6,
//! 1980; Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I, 1993; ode_solvers'
//! `Dopri5`, chosen over `Dop853` because it provides the continuous output model) keeps its
//! order. A step that would carry the front past the piece's end is aimed at it (the root of the
//! uniformly accelerated motion from the step's start). After each accepted step the event
//! functions are checked; a sign change is located on the method's continuous output to 1e-9 s.
//! A piece end within 1 % of the step's end (before it, or just past it on the output extended)
//! ends the piece there on the continuous output, whose error near the step's end is ~1e-4 of
//! its largest (it meets the end value and slope); any other event is re-stepped to, so the
//! state there is as accurate as a step end. The integration restarts from that state, so no
//! step straddles a kink.
//!
//! State: [x, v, E_brake, E_resistance, E_fin_0, …]: the dissipated energies are integrated with
//! the motion, so the energy residual measures the integration error.
//!
//! The steps, one module each: `context` (case setup: pairs, fin temperatures and capacities,
//! the right-hand side), `pieces` (the piece between kinks and its frozen laws), `solver`
//! (named solver settings and stepping one piece), `events` (event functions and their
//! location), `sampling` (uniform and event samples, onset, peaks), `run` (what each event
//! means for the outcome, and finishing the result).

mod context;
mod dopri;
mod events;
mod loads;
mod options;
mod pieces;
mod run;
mod sampling;
mod solver;

pub use options::{RunOptions, Sampling, TempField};
pub use solver::SolverSettings;

use super::model::BrakeTables;
use super::{DynamicsError, IntegrationCause, RunResult};
use crate::scenario::{Case, Scenario};
use context::CaseSetup;
use run::{non_finite, Flow, RunState};
use sampling::{Motion, StepContext};
use solver::PieceStart;

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
            cause: IntegrationCause::TooManyFins {
                fins: scenario.fins.len(),
                max: MAX_FINS,
            },
        }),
    }
}

/// The run of one case with a state of N entries: piece after piece until an event ends it.
/// Each piece costs one right-hand-side evaluation at its start (its laws differ from the last
/// piece's) and continues with the step the controller proposed at the end of the last one.
fn simulate_n<const N: usize>(
    scenario: &Scenario,
    tables: &BrakeTables,
    case: &Case,
    options: &RunOptions,
) -> Result<RunResult, DynamicsError> {
    let setup = CaseSetup::new(scenario, tables, case, options);
    let mut run = RunState::<N>::start(&setup);
    if run.held_at_start(&setup) {
        return Ok(run.finish(&setup));
    }
    loop {
        let piece = run.begin_piece(&setup)?;
        let mut f = [0.0f64; N];
        setup.ctx.eval(&run.frozen, &run.y, &mut f);
        run.res.rhs_evaluations += 1;
        let bad = non_finite(&setup, &run.y, false).or_else(|| non_finite(&setup, &f, true));
        if let Some(quantity) = bad {
            return Err(run.failure(&setup, run.t, IntegrationCause::NonFinite(quantity)));
        }
        let in_zone = run.in_zone();
        let sc = StepContext {
            ctx: &setup.ctx,
            frozen: &run.frozen,
            in_zone,
            keep: setup.sampling == Sampling::Full || in_zone,
            piece: piece.index,
        };
        let start = PieceStart {
            t: run.t,
            y: run.y,
            f,
            h: run.h_next,
        };
        let (sampler, res) = (&mut run.sampler, &mut run.res);
        let end = solver::step_piece(
            &setup.ctx,
            &run.frozen,
            &piece.watch,
            &setup.solver,
            start,
            piece.t_end,
            |dense, t_hi| sampler.step(&sc, dense, t_hi, res),
        )
        .map_err(|(t_s, cause)| run.failure(&setup, t_s, cause))?;
        if let Some(quantity) = non_finite(&setup, &end.y_stop, false) {
            return Err(run.failure(&setup, end.t_stop, IntegrationCause::NonFinite(quantity)));
        }
        let stop = Motion {
            t_s: end.t_stop,
            x_m: end.y_stop[0],
            v_m_s: end.y_stop[1],
            a_m_s2: end.a_stop,
        };
        run.sampler.event(&sc, stop, &end.y_stop, &mut run.res);
        run.res.steps += end.steps;
        run.res.rhs_evaluations += end.rhs_evaluations;
        run.h_next = end.next_h;
        run.t = end.t_stop;
        run.y = end.y_stop;
        run.warn_outside_measured(&setup);
        if run.after_event(&setup, end.event) == Flow::Stop {
            break;
        }
    }
    Ok(run.finish(&setup))
}

#[cfg(test)]
mod tests;
