//! What the run of a layout says about every longer layout that begins with it.
//!
//! Slots are decided in travel order. With the slots before `j` decided, every layout that
//! begins with them drives the same run as the layout of those slots alone until the vehicle's
//! foremost fin edge first reaches the start of slot `j` (boundary `j`): before that no fin has
//! touched a later slot, gravity and resistance do not depend on the layout, and the case (its
//! start, mass, temperatures; an N−1 case of a module already placed) is the same. So the
//! samples of that window are shared, and every check whose value can only get worse as the run
//! goes on is already bounded there:
//! * the filtered felt peaks on every axis,
//! * the sustained-acceleration envelopes (S(D) over part of the signal is at most S(D) over
//!   all of it),
//! * onset and release (the largest rate over central-difference windows inside the window),
//! * the time in the zone so far,
//! * a reversal, stall or time limit reached inside the window (the completion reaches it too).
//!
//! The felt acceleration is resampled linearly, so grid points up to the last sample before the
//! boundary are shared exactly. A causal filter (or none) keeps them shared. The zero-phase
//! filter (forward–backward, the default) is linear and time-invariant on the signal held at its
//! end values, y(t) = Σ g(t−s)·x(s) with a symmetric kernel g, so a later sample moves the
//! filtered value at a grid point n steps before it by at most |Δx|·Σ_{d≥n}|g(d)|. The tracker
//! uses only grid points at least `lag` steps before the first unshared one, `lag` the smallest
//! with Σ_{d≥lag}|g(d)| ≤ [`LEAK_TAIL`], and widens the dead test by that tail times
//! 2·[`super::bound::Bounds::felt_bound_g`] (|Δx| is at most twice the largest felt
//! acceleration any layout gives); rates differ by at most 2/window times that.
//!
//! A partial layout that already breaks one of these in some case is *dead*: no completion can
//! pass (sound, to integration round-off; a tolerance of 1e-6 of the limit is left besides).
//! Backward entries are not in travel order and are not tracked. The speed at the boundary is exact when
//! the run reached it; past the run's end (the vehicle cleared the layout's last module) it is
//! the exit speed, an approximation used for ranking only.

use crate::checks::envelope::Envelope;
use crate::checks::features::onset_release;
use crate::checks::filter::UniformSignal;
use crate::checks::rider::rider_signals;
use crate::checks::zero_phase::RideFilter;
use crate::dynamics::{Outcome, RunResult};
use crate::scenario::{
    Case, CaseOrigin, FilterPhase, Mount, PlanSpec, RateSignal, Rider, Scenario,
};

/// Relative tolerance of the dead test.
const DEAD_TOLERANCE: f64 = 1e-6;
/// Kernel tail of the zero-phase filter beyond the lag (see the module documentation).
pub const LEAK_TAIL: f64 = 1e-9;

/// A check whose value can only get worse as the run goes on.
#[derive(Debug, Clone)]
enum Running {
    /// A filtered felt peak on `axis`; `negative`: the `min` limit.
    Peak {
        axis: usize,
        negative: bool,
        limit_g: f64,
    },
    /// A sustained-acceleration envelope on `axis`.
    Envelope {
        axis: usize,
        negative: bool,
        envelope: Envelope,
    },
    /// The onset (`release`: false) or release limit.
    Rate { release: bool, limit_g_s: f64 },
    /// The longest time in the zone.
    Duration { limit_s: f64 },
}

/// The state of one case at a boundary.
#[derive(Debug, Clone, PartialEq)]
pub struct CaseState {
    /// Speed at the boundary (0 after a stall), m/s.
    pub speed_m_s: f64,
    /// The speed is exact (the run reached the boundary, or ended in a stall before it).
    pub exact: bool,
    /// Relative margin of every running check so far (margin / |limit|), in the tracker's order.
    pub margins: Vec<f64>,
    /// Some running check already fails.
    pub dead: bool,
    /// Share of the kinetic energy above the target speed still to be removed (0..1).
    pub remaining: f64,
}

/// The state of a partial layout at a boundary.
#[derive(Debug, Clone, PartialEq)]
pub struct BoundaryState {
    /// One per tracked base case (listed and corner cases moving forward), in scenario order.
    pub base: Vec<CaseState>,
    /// The worst of its one-section-out cases (largest speed, smallest margins).
    pub n1: Option<CaseState>,
    /// Some tracked case is dead.
    pub dead: bool,
    /// Largest remaining share over every tracked case.
    pub remaining: f64,
    /// Smallest running margin over every tracked case (+∞ without running checks).
    pub health: f64,
}

impl BoundaryState {
    /// Every tracked case (one-section-out cases included) stopped, reversed or ran out of time
    /// before this boundary: no completion's module at or after it is ever reached, so every
    /// tracked run of a completion is this layout's run. When every case is tracked
    /// ([`Tracker::all_tracked`]) a completion's verdict is this layout's plus one more
    /// one-section-out case per added module, which is this layout itself: it passes only if
    /// this layout does, with more modules and a longer zone.
    pub fn settled(&self) -> bool {
        let done = |c: &CaseState| c.exact && c.speed_m_s == 0.0;
        self.base.iter().all(done) && self.n1.as_ref().is_none_or(done)
    }
}

/// Which checks and cases are tracked, and where the boundaries lie.
#[derive(Debug, Clone)]
pub struct Tracker {
    running: Vec<Running>,
    rider: Rider,
    /// Grid points at the end of a shared window not used for filtered values.
    lag_points: usize,
    /// Largest change later samples can make to a used filtered value, g.
    leak_g: f64,
    allow_stall: bool,
    allow_rollback: bool,
    /// Front position at boundary 0 minus the zone start: the foremost fin edge's offset, m.
    pub lead_m: f64,
    zone_start_m: f64,
    pitch_m: f64,
    target_m_s: f64,
    /// Tracked base cases: (index in the scenario's cases, name, start speed m/s).
    pub base_cases: Vec<(usize, String, f64)>,
    /// Slots a fin can reach behind the foremost fin edge (the "tail" of a partial layout).
    pub tail_slots: usize,
    /// Every case is tracked and there is no duty block: a partial layout whose tracked cases
    /// all settled before a boundary has the verdict of each of its completions (see
    /// [`BoundaryState::settled`]).
    pub all_tracked: bool,
}

/// Whether a case is tracked: it moves forward from upstream in travel order.
pub fn tracked(case: &Case) -> bool {
    !matches!(case.origin, CaseOrigin::Rollback { .. }) && case.start_speed_m_s >= 0.0
}

impl Tracker {
    /// The tracker of a plan.
    pub fn new(base: &Scenario, spec: &PlanSpec, felt_bound_g: f64) -> Self {
        let lim = &base.limits;
        let mut running = Vec::new();
        for axis in 0..3 {
            for (limit, negative) in [(lim.peak[axis].max_g, false), (lim.peak[axis].min_g, true)] {
                if let Some(limit_g) = limit {
                    running.push(Running::Peak {
                        axis,
                        negative,
                        limit_g,
                    });
                }
            }
            let env = &lim.envelope[axis];
            for (pts, negative) in [(&env.positive, false), (&env.negative, true)] {
                if let Some(envelope) = pts.as_ref().and_then(|p| Envelope::new(p.clone()).ok()) {
                    running.push(Running::Envelope {
                        axis,
                        negative,
                        envelope,
                    });
                }
            }
        }
        for (release, limit) in [(false, lim.onset_g_s), (true, lim.release_g_s)] {
            if let Some(limit_g_s) = limit {
                running.push(Running::Rate { release, limit_g_s });
            }
        }
        if let Some(limit_s) = lim.max_duration_s {
            running.push(Running::Duration { limit_s });
        }
        let offsets: Vec<(f64, f64)> = base
            .fins
            .iter()
            .filter_map(|f| match f.mount {
                Mount::Vehicle { offset_m } => Some((offset_m, offset_m + f.length_m)),
                Mount::Track { .. } => None,
            })
            .collect();
        let lead_m = offsets.iter().map(|o| o.0).fold(f64::INFINITY, f64::min);
        let lead_m = if lead_m.is_finite() { lead_m } else { 0.0 };
        let reach = offsets.iter().map(|o| o.1).fold(lead_m, f64::max) - lead_m;
        let tail = ((reach + spec.module_length_m) / spec.slot_pitch_m).ceil();
        let (lag_points, kernel_tail) = filter_lag(&base.rider);
        let leak_g = 2.0 * felt_bound_g * kernel_tail;
        Self {
            running,
            rider: base.rider,
            lag_points,
            leak_g: if leak_g.is_finite() {
                leak_g
            } else {
                f64::INFINITY
            },
            allow_stall: lim.allow_stall,
            allow_rollback: lim.allow_rollback,
            lead_m,
            zone_start_m: spec.zone_start_m,
            pitch_m: spec.slot_pitch_m,
            target_m_s: lim.exit_speed_max_m_s.unwrap_or(0.0),
            base_cases: base
                .cases
                .iter()
                .enumerate()
                .filter(|(_, c)| tracked(c) && !matches!(c.origin, CaseOrigin::SectionOut { .. }))
                .map(|(i, c)| (i, c.name.clone(), c.start_speed_m_s))
                .collect(),
            tail_slots: (tail.max(1.0) as usize).min(64),
            all_tracked: base.duty.is_none() && base.cases.iter().all(tracked),
        }
    }

    /// Front position at boundary `j`, m.
    pub fn boundary_m(&self, j: usize) -> f64 {
        self.zone_start_m + j as f64 * self.pitch_m + self.lead_m
    }

    /// The state at the start, before any module: nothing known but the start speeds.
    pub fn start_state(&self) -> BoundaryState {
        let base: Vec<CaseState> = self
            .base_cases
            .iter()
            .map(|(_, _, v0)| CaseState {
                speed_m_s: *v0,
                exact: false,
                margins: vec![f64::INFINITY; self.running.len()],
                dead: false,
                remaining: self.remaining(*v0, *v0),
            })
            .collect();
        BoundaryState {
            remaining: base.iter().map(|c| c.remaining).fold(0.0, f64::max),
            base,
            n1: None,
            dead: false,
            health: f64::INFINITY,
        }
    }

    fn remaining(&self, v: f64, v0: f64) -> f64 {
        let t2 = self.target_m_s * self.target_m_s;
        let total = v0 * v0 - t2;
        if total <= 0.0 {
            0.0
        } else {
            ((v * v - t2) / total).max(0.0)
        }
    }

    /// States of a candidate's tracked cases at boundaries `first`, `first + 1`, … : one entry
    /// per boundary the runs reach, then one for everything past the runs' ends.
    pub fn states(
        &self,
        cases: &[Case],
        runs: &[RunResult],
        first: usize,
        last: usize,
    ) -> Vec<BoundaryState> {
        let mut per_case: Vec<(&Case, Vec<CaseState>)> = Vec::new();
        let positions: Vec<f64> = (first..=last.max(first))
            .map(|j| self.boundary_m(j))
            .collect();
        for (c, r) in cases.iter().zip(runs) {
            if tracked(c) {
                per_case.push((c, self.case_states(c, r, &positions)));
            }
        }
        // Keep boundaries up to the first one no run reaches (all later ones look the same).
        let reached = |k: usize| {
            per_case
                .iter()
                .any(|(_, s)| s[k].exact && s[k].speed_m_s > 0.0)
        };
        let mut count = positions.len();
        if let Some(k) = (0..positions.len()).find(|&k| !reached(k)) {
            count = k + 1;
        }
        (0..count)
            .map(|k| self.combine(per_case.iter().map(|(c, s)| (*c, &s[k]))))
            .collect()
    }

    fn combine<'a>(
        &self,
        states: impl Iterator<Item = (&'a Case, &'a CaseState)>,
    ) -> BoundaryState {
        let mut base: Vec<Option<CaseState>> = vec![None; self.base_cases.len()];
        let mut n1: Option<CaseState> = None;
        let (mut dead, mut remaining, mut health) = (false, 0.0f64, f64::INFINITY);
        for (case, s) in states {
            dead |= s.dead;
            remaining = remaining.max(s.remaining);
            health = s.margins.iter().fold(health, |h, &m| h.min(m));
            if matches!(case.origin, CaseOrigin::SectionOut { .. }) {
                n1 = Some(match n1 {
                    None => s.clone(),
                    Some(w) => CaseState {
                        speed_m_s: w.speed_m_s.max(s.speed_m_s),
                        exact: w.exact && s.exact,
                        margins: w
                            .margins
                            .iter()
                            .zip(&s.margins)
                            .map(|(a, b)| a.min(*b))
                            .collect(),
                        dead: w.dead || s.dead,
                        remaining: w.remaining.max(s.remaining),
                    },
                });
            } else if let Some(i) = self.base_cases.iter().position(|b| b.1 == case.name) {
                base[i] = Some(s.clone());
            }
        }
        let start = self.start_state();
        BoundaryState {
            base: base
                .into_iter()
                .zip(start.base)
                .map(|(s, d)| s.unwrap_or(d))
                .collect(),
            n1,
            dead,
            remaining,
            health,
        }
    }

    /// States of one case's run at the given front positions (ascending).
    fn case_states(&self, case: &Case, run: &RunResult, positions: &[f64]) -> Vec<CaseState> {
        let samples = &run.samples;
        let signals = rider_signals(run, &self.rider).ok();
        let extremes: Vec<Vec<f64>> = self
            .running
            .iter()
            .map(|r| match (r, &signals) {
                (Running::Peak { axis, negative, .. }, Some(sig)) => {
                    running_extreme(&sig.filtered[*axis].values, *negative)
                }
                _ => Vec::new(),
            })
            .collect();
        let mut out = Vec::with_capacity(positions.len());
        let mut idx = 0usize;
        let mut reversed_before = 0usize;
        for &b in positions {
            while idx < samples.len() && samples[idx].s_m < b {
                if samples[idx].v_m_s < 0.0 {
                    reversed_before += 1;
                }
                idx += 1;
            }
            let reached = idx < samples.len();
            let (speed, t_b, exact) = if reached {
                let s1 = &samples[idx];
                match idx.checked_sub(1).map(|i| &samples[i]) {
                    Some(s0) if s1.s_m > s0.s_m => {
                        let f = ((b - s0.s_m) / (s1.s_m - s0.s_m)).clamp(0.0, 1.0);
                        (
                            s0.v_m_s + f * (s1.v_m_s - s0.v_m_s),
                            s0.t_s + f * (s1.t_s - s0.t_s),
                            true,
                        )
                    }
                    // The first sample is the entry, at the first module's boundary; a sample
                    // beyond the boundary says nothing exact about the speed there.
                    _ => (s1.v_m_s, s1.t_s, s1.s_m <= b + 1e-9),
                }
            } else {
                let settled = run.outcome != Outcome::Cleared;
                let v = if settled {
                    0.0
                } else {
                    run.exit_speed_m_s
                        .or(samples.last().map(|s| s.v_m_s))
                        .unwrap_or(case.start_speed_m_s)
                };
                (v, samples.last().map_or(0.0, |s| s.t_s), settled)
            };
            let window = &samples[..idx];
            let t_last = window.last().map(|s| s.t_s);
            // Settled before the boundary (stalled, reversed out, out of time): the completion
            // never reaches the next slot, so its run is this one, filtered values included.
            let whole = !reached && run.outcome != Outcome::Cleared;
            // Envelopes (the costly check) are evaluated at the first boundary and past the
            // run's end; in between the first value is kept: an upper bound of the margin there,
            // so the dead test stays sound (it only prunes less).
            let first_margins = out.first().map(|c: &CaseState| &c.margins);
            let margins: Vec<f64> = self
                .running
                .iter()
                .zip(&extremes)
                .enumerate()
                .map(|(k, (r, ext))| match (r, first_margins) {
                    (Running::Envelope { .. }, Some(m)) if reached => m[k],
                    _ => self.margin(r, ext, &signals, window, (t_last, whole), t_b, run),
                })
                .collect();
            let mut dead = margins.iter().any(|&m| m < -DEAD_TOLERANCE);
            if reversed_before > 0 && !self.allow_rollback {
                dead = true;
            }
            if !reached {
                dead |= match run.outcome {
                    Outcome::Stalled => !self.allow_stall,
                    Outcome::RolledBack => !self.allow_rollback,
                    Outcome::TimeLimit => true,
                    Outcome::Cleared => false,
                };
            }
            out.push(CaseState {
                speed_m_s: speed,
                exact,
                margins,
                dead,
                remaining: self.remaining(speed.abs(), case.start_speed_m_s),
            });
        }
        out
    }

    /// Relative margin of one running check over the window (samples before the boundary),
    /// widened by what later samples can still change (module documentation).
    #[allow(clippy::too_many_arguments)]
    fn margin(
        &self,
        r: &Running,
        extreme: &[f64],
        signals: &Option<crate::checks::rider::RiderSignals>,
        window: &[crate::dynamics::Sample],
        (t_last, whole): (Option<f64>, bool),
        t_b: f64,
        run: &RunResult,
    ) -> f64 {
        let (lag, leak_g) = if whole {
            (0, 0.0)
        } else {
            (self.lag_points, self.leak_g)
        };
        // Grid points at or before the last shared sample.
        let shared = |sig: &UniformSignal| -> usize {
            match t_last {
                Some(t) if t >= sig.t0_s => {
                    (((t - sig.t0_s) / sig.dt_s + 1e-9).floor() as usize + 1).min(sig.values.len())
                }
                _ => 0,
            }
        };
        let filtered = |sig: &UniformSignal| shared(sig).saturating_sub(lag);
        let rel = |m: f64, limit: f64| m / limit.abs().max(1e-12);
        match r {
            Running::Peak {
                axis,
                negative,
                limit_g,
            } => {
                let Some(sig) = signals else {
                    return f64::INFINITY;
                };
                let n = filtered(&sig.filtered[*axis]);
                if n == 0 {
                    return f64::INFINITY;
                }
                let e = extreme[n - 1];
                let m = if *negative { e - limit_g } else { limit_g - e };
                rel(m + leak_g, *limit_g)
            }
            Running::Envelope {
                axis,
                negative,
                envelope,
            } => {
                let Some(sig) = signals else {
                    return f64::INFINITY;
                };
                let s = &sig.filtered[*axis];
                let n = filtered(s);
                if n < 2 {
                    return f64::INFINITY;
                }
                let values: Vec<f64> = s.values[..n]
                    .iter()
                    .map(|v| if *negative { -v } else { *v })
                    .collect();
                // S(D) moves by at most the largest change of the signal.
                match UniformSignal::new(s.dt_s, s.t0_s, values).and_then(|u| envelope.check(&u)) {
                    Ok(res) => rel(res.worst_margin + leak_g, res.allowed),
                    Err(_) => f64::INFINITY,
                }
            }
            Running::Rate { release, limit_g_s } => {
                let Some(sig) = signals else {
                    return f64::INFINITY;
                };
                let rates = &self.rider.rates;
                let (u, n, leak) = match rates.signal {
                    RateSignal::Raw => (&sig.braking_raw, shared(&sig.braking_raw), 0.0),
                    RateSignal::Filtered => (
                        &sig.braking_filtered,
                        filtered(&sig.braking_filtered),
                        leak_g,
                    ),
                };
                let part = UniformSignal {
                    values: u.values[..n.min(u.values.len())].to_vec(),
                    ..u.clone()
                };
                match onset_release(&part, rates.window_s) {
                    Ok(m) => {
                        let rate = if *release { m.release } else { m.onset };
                        let widen = 2.0 * leak / m.window_s;
                        rel(limit_g_s - rate.per_s + widen, *limit_g_s)
                    }
                    // Shorter than one window: nothing known yet.
                    Err(_) => f64::INFINITY,
                }
            }
            Running::Duration { limit_s } => match run.entry_time_s {
                Some(te) if !window.is_empty() => rel(limit_s - (t_b - te).max(0.0), *limit_s),
                _ => f64::INFINITY,
            },
        }
    }
}

/// The lag (grid points) and kernel tail of the rider's filter (module documentation): (0, 0)
/// without a filter or with a causal one; for the zero-phase filter the smallest lag whose
/// one-sided tail of |g| is at most [`LEAK_TAIL`], found from the filter's impulse response
/// (lag = the whole response and tail = +∞ if the filter cannot be designed).
pub fn filter_lag(rider: &Rider) -> (usize, f64) {
    let Some(f) = rider.filter else {
        return (0, 0.0);
    };
    if f.phase == FilterPhase::Causal {
        return (0, 0.0);
    }
    let Ok(filter) = RideFilter::design(f.phase, f.order, f.corner_hz, f.sample_rate_hz) else {
        return (usize::MAX / 4, f64::INFINITY);
    };
    // The kernel decays within the automatic pad (slowest pole to 1e-12); take four times it.
    let half = match &filter {
        RideFilter::Zero(z) => z.auto_pad_samples().clamp(16, 1 << 20) * 4,
        RideFilter::Causal(_) => 0,
    };
    let mut x = vec![0.0; 2 * half + 1];
    x[half] = 1.0;
    let Ok(g) = filter.filter(&x) else {
        return (usize::MAX / 4, f64::INFINITY);
    };
    // tail[n] = Σ_{d ≥ n} |g(half + d)|.
    let mut tail = 0.0;
    let mut lag = half + 1;
    let mut tail_at_lag = 0.0;
    for d in (0..=half).rev() {
        tail += g[half + d].abs();
        if tail <= LEAK_TAIL {
            lag = d;
            tail_at_lag = tail;
        }
    }
    (lag, tail_at_lag)
}

/// Running minimum (`negative`) or maximum of a signal.
fn running_extreme(values: &[f64], negative: bool) -> Vec<f64> {
    let mut acc = if negative {
        f64::INFINITY
    } else {
        f64::NEG_INFINITY
    };
    values
        .iter()
        .map(|&v| {
            acc = if negative { acc.min(v) } else { acc.max(v) };
            acc
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::rider::rider_signals;
    use crate::dynamics::RunResult;
    use crate::scenario::FilterSettings;

    fn run_of(values: &[f64]) -> RunResult {
        let mut r = RunResult::empty("c", 1000.0, 0.0);
        r.samples = values
            .iter()
            .enumerate()
            .map(|(i, &g)| crate::dynamics::Sample {
                t_s: i as f64 * 1e-3,
                s_m: i as f64 * 1e-2,
                v_m_s: 10.0,
                a_m_s2: 0.0,
                decel_g: 0.0,
                onset_g_s: 0.0,
                brake_force_n: g * 1000.0 * 9.80665,
                gravity_force_n: 0.0,
                resistance_force_n: 0.0,
                cos_theta: 1.0,
                curvature_1_m: 0.0,
                overlap_m: 0.0,
                event: false,
            })
            .collect();
        r
    }

    fn rider(phase: FilterPhase) -> Rider {
        Rider {
            track_axis: crate::scenario::Axis::X,
            filter: Some(FilterSettings {
                corner_hz: 5.0,
                order: 4,
                sample_rate_hz: 1000.0,
                phase,
            }),
            rates: Default::default(),
            passengers: true,
        }
    }

    /// With a causal filter the filtered signal of the first part of a run equals the first
    /// part of the filtered signal of the whole run (lag 0, no leak).
    #[test]
    fn a_causal_filter_shares_the_prefix_exactly() {
        let rider = rider(FilterPhase::Causal);
        assert_eq!(filter_lag(&rider), (0, 0.0));
        let full: Vec<f64> = (0..2000)
            .map(|i| -((i as f64) * 0.01).sin().abs())
            .collect();
        let a = rider_signals(&run_of(&full), &rider).expect("signals");
        let b = rider_signals(&run_of(&full[..700]), &rider).expect("signals");
        for (x, y) in a.filtered[0].values.iter().zip(&b.filtered[0].values) {
            assert_eq!(x, y);
        }
        assert_eq!(b.filtered[0].values.len(), 700);
    }

    /// The zero-phase filter's prefix bound: filtering a run cut after 700 samples and filtering
    /// it continued by a signal that jumps to the other extreme differ, at every grid point at
    /// least `lag` before the cut, by at most 2·max|x|·tail (the bound of the module
    /// documentation, checked against the filter itself); and the lag is a fraction of a second
    /// for the default ride filter (its slowest pole decays over ~1 s to 1e-12).
    #[test]
    fn the_zero_phase_prefix_bound_holds() {
        let rider = rider(FilterPhase::Zero);
        let (lag, tail) = filter_lag(&rider);
        assert!(tail <= LEAK_TAIL && tail > 0.0, "tail {tail}");
        assert!(lag > 50 && lag < 1500, "lag {lag}");
        let cut = 2000;
        let head: Vec<f64> = (0..cut).map(|i| -((i as f64) * 0.01).sin().abs()).collect();
        let mut full = head.clone();
        full.extend((0..3000).map(|i| if i % 400 < 200 { 1.0 } else { -1.0 }));
        let a = rider_signals(&run_of(&full), &rider).expect("signals");
        let b = rider_signals(&run_of(&head), &rider).expect("signals");
        let bound = 2.0 * 1.0 * tail;
        let mut worst = 0.0f64;
        for k in 0..cut - lag {
            worst = worst.max((a.filtered[0].values[k] - b.filtered[0].values[k]).abs());
        }
        assert!(worst <= bound + 1e-15, "{worst} > {bound}");
        // Closer to the cut the difference is real: the lag is needed.
        let near = (a.filtered[0].values[cut - 5] - b.filtered[0].values[cut - 5]).abs();
        assert!(near > 1e3 * bound, "{near}");
    }

    #[test]
    fn running_extremes() {
        assert_eq!(
            running_extreme(&[1.0, -2.0, 0.5, -3.0], true),
            vec![1.0, -2.0, -2.0, -3.0]
        );
        assert_eq!(
            running_extreme(&[1.0, -2.0, 4.0], false),
            vec![1.0, 1.0, 4.0]
        );
    }
}
