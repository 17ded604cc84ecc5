//! The state of a run between pieces: where the vehicle is, whether it has entered or left the
//! zone, and what each event means for the outcome; and finishing the result.

use super::context::CaseSetup;
use super::dopri::State;
use super::events::{Event, Watch};
use super::pieces::{piece, piece_bounds, piece_index, Frozen};
use super::sampling::Sampler;
use crate::dynamics::{
    DynamicsError, FinHeat, IntegrationCause, Outcome, Quantity, RunResult, SectionLoad,
};

/// Most pieces one run may take before it counts as events in a loop.
const MAX_PIECES: usize = 200_000;

/// A vehicle creeping below the stall speed for this long counts as stalled, s.
const CREEP_LIMIT_S: f64 = 10.0;

/// Whether the run goes on after a piece.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Flow {
    Continue,
    Stop,
}

/// One piece about to be stepped (its laws are in [`RunState::frozen`]).
pub(super) struct Piece {
    pub watch: Watch,
    /// The piece ends here at the latest (time limit or creep deadline), s.
    pub t_end: f64,
    /// Index of the piece in the run.
    pub index: u32,
}

/// The state of a run between pieces.
pub(super) struct RunState<const N: usize> {
    pub t: f64,
    pub y: State<N>,
    /// Direction of travel, ±1.
    pub dir: f64,
    initial_dir: f64,
    /// The first fin has met an active section (or the zone was passed without one).
    pub entered: bool,
    /// Left the zone.
    exited: bool,
    creep_deadline: Option<f64>,
    measured_warned: bool,
    pieces: usize,
    /// The laws of the current piece (one buffer for the whole run).
    pub frozen: Frozen,
    /// The first step to try in the next piece (0: chosen from the derivatives), s.
    pub h_next: f64,
    /// The index of the current piece among the kinks.
    piece_idx: usize,
    /// The next piece when the last one ended at one of its ends (the neighbour, whatever the
    /// rounding of the position there).
    next_piece: Option<usize>,
    pub res: RunResult,
    pub sampler: Sampler,
}

impl<const N: usize> RunState<N> {
    /// The start of the case: state, direction of travel (a vehicle at rest moves the way
    /// gravity pulls it) and an empty result.
    pub fn start(setup: &CaseSetup<'_>) -> Self {
        let case = setup.case;
        let mut y = [0.0; N];
        y[0] = case.start_position_m;
        y[1] = case.start_speed_m_s;
        let initial_energy =
            0.5 * case.mass_kg * case.start_speed_m_s.powi(2) + setup.potential_energy_j(y[0]);
        let dir = if case.start_speed_m_s > 0.0 {
            1.0
        } else if case.start_speed_m_s < 0.0 {
            -1.0
        } else {
            let f = setup.track.frozen(y[0], 1.0).force_n(case.mass_kg, y[0]);
            if f >= 0.0 {
                1.0
            } else {
                -1.0
            }
        };
        Self {
            t: 0.0,
            y,
            dir,
            initial_dir: dir,
            entered: false,
            exited: false,
            creep_deadline: None,
            measured_warned: false,
            pieces: 0,
            frozen: Frozen::empty(&setup.track),
            h_next: setup.solver.h_initial_s,
            piece_idx: 0,
            next_piece: None,
            res: RunResult {
                sections: if setup.section_loads {
                    setup
                        .scenario
                        .sections
                        .iter()
                        .map(SectionLoad::zero)
                        .collect()
                } else {
                    Vec::new()
                },
                peak_lateral: setup
                    .lateral_reported
                    .then(crate::dynamics::LateralPeak::default),
                ..RunResult::empty(&case.name, case.mass_kg, initial_energy)
            },
            sampler: Sampler::new(setup.sample_dt_s, setup.trajectory),
        }
    }

    /// Whether the vehicle is inside the zone (entered and not yet left).
    pub fn in_zone(&self) -> bool {
        self.entered && !self.exited
    }

    /// A failure of the integration at `t_s`.
    pub fn failure(
        &self,
        setup: &CaseSetup<'_>,
        t_s: f64,
        cause: IntegrationCause,
    ) -> DynamicsError {
        DynamicsError::Integration {
            case: setup.case.name.clone(),
            t_s,
            cause,
        }
    }

    /// Held at rest from the start (no speed, and static resistance beats gravity)? Then the
    /// outcome is a stall where it stands.
    pub fn held_at_start(&mut self, setup: &CaseSetup<'_>) -> bool {
        if setup.case.start_speed_m_s != 0.0 {
            return false;
        }
        let (lo, hi) = piece(&setup.kinks, self.y[0], self.dir);
        self.frozen
            .refreeze(&setup.ctx, &setup.track, lo, hi, self.y[0], self.dir);
        let held = setup.ctx.static_hold(&self.frozen, &self.y);
        if held {
            self.stall_here();
        }
        held
    }

    /// The next piece from the current state: its laws, its events, its end time; notes the
    /// entry into the zone when the first pair starts to overlap.
    pub fn begin_piece(&mut self, setup: &CaseSetup<'_>) -> Result<Piece, DynamicsError> {
        self.pieces += 1;
        if self.pieces > MAX_PIECES {
            let cause = IntegrationCause::TooManyPieces { pieces: MAX_PIECES };
            return Err(self.failure(setup, self.t, cause));
        }
        self.piece_idx = self
            .next_piece
            .take()
            .unwrap_or_else(|| piece_index(&setup.kinks, self.y[0], self.dir));
        let (lo, hi) = piece_bounds(&setup.kinks, self.piece_idx);
        self.frozen
            .refreeze(&setup.ctx, &setup.track, lo, hi, self.y[0], self.dir);
        if !self.entered && !self.frozen.pairs.is_empty() {
            self.entered = true;
            self.res.entry_speed_m_s = Some(self.y[1].abs());
            self.res.entry_time_s = Some(self.t);
            self.res.min_speed_m_s = Some(self.y[1].abs());
        }
        let scenario = setup.scenario;
        let watch = Watch {
            lo,
            hi,
            dir: self.dir,
            stall_active: self.in_zone(),
            stall_speed: scenario.stall_speed_m_s,
            zone_end: scenario.zone_end_m,
            zone_start: scenario.zone_start_m,
            vehicle_len: setup.ctx.vehicle_len_m,
        };
        let t_limit = scenario.time_limit_s;
        let t_end = self.creep_deadline.unwrap_or(t_limit).min(t_limit);
        Ok(Piece {
            watch,
            t_end,
            index: (self.pieces - 1) as u32,
        })
    }

    /// Warns once when the run inside the zone leaves the speed range of a measured curve of an
    /// overlapping pair (the curve is held at its last value there).
    pub fn warn_outside_measured(&mut self, setup: &CaseSetup<'_>) {
        let (ctx, frozen, y) = (&setup.ctx, &self.frozen, &self.y);
        if ctx.measured
            && self.in_zone()
            && !self.measured_warned
            && frozen.pairs.iter().any(|&(i, _, _)| {
                let p = &ctx.pairs[i];
                !p.covers(y[1], ctx.fin_temp(p.spec.fin, y))
            })
        {
            self.measured_warned = true;
            self.res.warnings.push(format!(
                "the run left the speed range of a measured force curve at {:.3} m/s (held at its last value)",
                y[1].abs()
            ));
        }
    }

    /// What the event that ended a piece means: go on with the next piece, or stop with an
    /// outcome.
    pub fn after_event(&mut self, setup: &CaseSetup<'_>, event: Option<Event>) -> Flow {
        match event {
            None => self.at_end_time(setup),
            // The next piece in the direction of travel; past it when the located event left the
            // front beyond a piece shorter than the location tolerance (two kinks 1e-12 m apart).
            Some(Event::PieceLow) => {
                let here = piece_index(&setup.kinks, self.y[0], self.dir);
                self.next_piece = self.piece_idx.checked_sub(1).map(|i| i.min(here));
                Flow::Continue
            }
            Some(Event::PieceHigh) => {
                let here = piece_index(&setup.kinks, self.y[0], self.dir);
                self.next_piece = Some((self.piece_idx + 1).max(here));
                Flow::Continue
            }
            Some(Event::Reversal) => self.at_reversal(setup),
            Some(Event::Stall) => {
                if setup.ctx.static_hold(&self.frozen, &self.y) {
                    self.stall_here();
                    return Flow::Stop;
                }
                // Gravity will move it on: keep going, but a creep below the stall speed for
                // 10 s is a stall.
                self.creep_deadline = Some(self.t + CREEP_LIMIT_S);
                Flow::Continue
            }
            Some(Event::ClearForward) => self.cleared(true),
            Some(Event::ClearBackward) => self.cleared(false),
        }
    }

    /// The time limit, or the end of a creep below the stall speed.
    fn at_end_time(&mut self, setup: &CaseSetup<'_>) -> Flow {
        let t_limit = setup.scenario.time_limit_s;
        if self.creep_deadline.is_some_and(|d| self.t >= d - 1e-9) && self.t < t_limit - 1e-9 {
            self.stall_here();
            self.res
                .warnings
                .push("creeping below the stall speed for 10 s: counted as a stall".into());
        } else {
            self.res.outcome = Outcome::TimeLimit;
        }
        Flow::Stop
    }

    /// At rest for an instant: held by resistance, or moving off the other way.
    fn at_reversal(&mut self, setup: &CaseSetup<'_>) -> Flow {
        self.y[1] = 0.0;
        // Static resistance does not depend on the direction of travel.
        if setup.ctx.static_hold(&self.frozen, &self.y) {
            self.stall_here();
            return Flow::Stop;
        }
        self.res.reversed = true;
        self.dir = -self.dir;
        let scenario = setup.scenario;
        if !self.entered
            && ((self.dir < 0.0 && self.y[0] < scenario.zone_start_m)
                || (self.dir > 0.0 && self.y[0] - setup.ctx.vehicle_len_m > scenario.zone_end_m))
        {
            // Turned back before reaching the brakes.
            self.res.outcome = Outcome::RolledBack;
            return Flow::Stop;
        }
        Flow::Continue
    }

    /// Left the zone over its downstream (`forward`) or upstream end.
    fn cleared(&mut self, forward: bool) -> Flow {
        if !self.entered {
            // Passed the zone end without ever overlapping (e.g. every section out).
            self.res.entry_speed_m_s = Some(self.y[1].abs());
            self.res.entry_time_s = Some(self.t);
        }
        self.exited = true;
        self.res.exit_speed_m_s = Some(self.y[1]);
        self.res.outcome = if forward == (self.initial_dir > 0.0) {
            Outcome::Cleared
        } else {
            Outcome::RolledBack
        };
        Flow::Stop
    }

    fn stall_here(&mut self) {
        self.res.outcome = Outcome::Stalled;
        self.res.stall_position_m = Some(self.y[0]);
    }

    /// The result: end time, energies and their residual, time in the zone, heat per fin.
    pub fn finish(self, setup: &CaseSetup<'_>) -> RunResult {
        let (y, t, ctx) = (&self.y, self.t, &setup.ctx);
        let mut res = self.res;
        res.end_time_s = t;
        res.braking_energy_j = y[2];
        res.resistance_energy_j = y[3];
        let ke = 0.5 * ctx.mass_kg * y[1] * y[1];
        res.energy_residual_j =
            ke + setup.potential_energy_j(y[0]) + y[2] + y[3] - res.initial_energy_j;
        if let Some(te) = res.entry_time_s {
            res.time_in_zone_s = Some(t - te);
        }
        res.fins = setup
            .scenario
            .fins
            .iter()
            .enumerate()
            .map(|(i, f)| FinHeat {
                fin: f.name.clone(),
                energy_j: y[4 + i],
                start_temp_c: ctx.fin_start_c[i],
                end_temp_c: ctx.fin_temp(i, y),
            })
            .collect();
        res
    }
}

/// The first entry of the state (`rates`: of its rate of change) among x, v, the two energies
/// and the fin energies that is not finite, named.
pub(super) fn non_finite<const N: usize>(
    setup: &CaseSetup<'_>,
    values: &State<N>,
    rates: bool,
) -> Option<Quantity> {
    let n = (4 + setup.ctx.n_fins).min(N);
    let i = (0..n).find(|&i| !values[i].is_finite())?;
    let fin_name = || setup.scenario.fins[i - 4].name.clone();
    Some(match (i, rates) {
        (0, false) => Quantity::Position,
        (0, true) | (1, false) => Quantity::Speed,
        (1, true) => Quantity::Acceleration,
        (2, false) => Quantity::BrakingEnergy,
        (2, true) => Quantity::BrakingPower,
        (3, false) => Quantity::ResistanceEnergy,
        (3, true) => Quantity::ResistancePower,
        (_, false) => Quantity::FinEnergy(fin_name()),
        (_, true) => Quantity::FinPower(fin_name()),
    })
}
