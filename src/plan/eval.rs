//! Simulating candidate layouts through the study layer, with a memo, a work budget and the
//! progress hooks.
//!
//! Every candidate is judged by [`Study::judge`] (every case, N−1 cases over its modules). With
//! a duty block the candidate is first judged at the first dispatch only (the scenario without
//! its duty block); since the full verdict takes the worse of the first dispatch and the steady
//! state, a candidate failing there fails the full verdict too, and only candidates passing it
//! are judged again with the duty cycle.

use super::state::{BoundaryState, Tracker};
use super::{candidate_scenario, violation, Failing, Layout, PlanError, SearchStop};
use crate::checks::{CheckRow, Verdict};
use crate::scenario::{CaseOrigin, PlanSpec, Scenario};
use crate::study::{JudgeOptions, Progress, Silent, Study, TableCache};
use rayon::prelude::*;
use std::collections::HashMap;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Arc, Mutex};
use std::time::Instant;

/// Checks whose value does not depend on the layout (excluded from the worst margin).
pub const LAYOUT_INDEPENDENT: [&str; 2] = ["magnet_temperature", "magnet_grade"];

/// What the search keeps of one simulated layout.
#[derive(Debug, Clone)]
pub struct Eval {
    /// The layout, without trailing empty slots.
    pub layout: Layout,
    /// The full verdict passed.
    pub pass: bool,
    /// It fails only checks that more braking downstream can fix (exit_speed_max, and any check
    /// of a backward entry).
    pub promising: bool,
    /// Normalised total violation ([`violation`]; 0 when it passes).
    pub violation: f64,
    /// Smallest relative margin (margin / |limit|) over every limited check of every case,
    /// layout-independent checks excepted; None without such checks.
    pub worst_margin: Option<f64>,
    /// A failing check that does not depend on the layout.
    pub independent: Option<Failing>,
    /// Modules.
    pub modules: usize,
    /// Index of the last used slot.
    pub last_slot: usize,
    /// States at boundaries `last_slot + 1`, `last_slot + 2`, …; the last one holds for every
    /// later boundary (speeds there are the exit speed, not exact).
    pub states: Vec<BoundaryState>,
}

impl Eval {
    /// The state at boundary `j` (> last slot).
    pub fn state_at(&self, j: usize) -> Option<BoundaryState> {
        let i = j.checked_sub(self.last_slot + 1)?;
        match self.states.get(i) {
            Some(s) => Some(s.clone()),
            None => self.states.last().map(|s| {
                let mut s = s.clone();
                for c in s.base.iter_mut().chain(s.n1.iter_mut()) {
                    c.exact &= c.speed_m_s == 0.0;
                }
                s
            }),
        }
    }
}

/// Relative margin of a row (margin / |limit|; the margin itself for a zero limit).
pub fn relative_margin(r: &CheckRow) -> Option<f64> {
    match (r.margin, r.limit) {
        (Some(m), Some(l)) if l != 0.0 => Some(m / l.abs()),
        (Some(m), _) => Some(m),
        _ => None,
    }
}

/// Smallest relative margin of a verdict, layout-independent checks excepted.
pub fn worst_margin(v: &Verdict) -> Option<f64> {
    v.cases
        .iter()
        .flat_map(|c| &c.checks)
        .filter(|r| !LAYOUT_INDEPENDENT.contains(&r.check.as_str()))
        .filter_map(relative_margin)
        .reduce(f64::min)
}

/// Failing rows of a verdict, worst (most negative relative margin) first.
pub fn failing_rows(v: &Verdict) -> Vec<Failing> {
    let mut out: Vec<(f64, Failing)> = v
        .cases
        .iter()
        .flat_map(|c| {
            c.checks.iter().filter(|r| !r.pass).map(|r| {
                (
                    relative_margin(r).unwrap_or(-1.0),
                    Failing {
                        case: c.case.clone(),
                        check: r.key(),
                        value: r.value,
                        limit: r.limit,
                        margin: r.margin,
                        unit: r.unit.clone(),
                        note: r.not_evaluated.clone(),
                    },
                )
            })
        })
        .collect();
    out.sort_by(|a, b| a.0.total_cmp(&b.0));
    out.into_iter().map(|x| x.1).collect()
}

/// Layout without trailing empty slots.
pub fn trimmed(l: &[Option<usize>]) -> Layout {
    let n = l.iter().rposition(|c| c.is_some()).map_or(0, |i| i + 1);
    l[..n].to_vec()
}

/// Simulates candidates, remembers them, and keeps to the budget.
pub struct Evaluator<'a> {
    base: &'a Scenario,
    spec: &'a PlanSpec,
    cache: &'a TableCache,
    /// The tracker of running checks.
    pub tracker: Tracker,
    slots: usize,
    memo: Mutex<HashMap<Layout, Arc<Eval>>>,
    /// Best near-miss per last slot (largest violation, i.e. closest to 0).
    near: Mutex<Vec<Option<Arc<Eval>>>>,
    /// First layout-independent failure seen.
    independent: Mutex<Option<Failing>>,
    simulated: AtomicUsize,
    cap: usize,
    deadline: Option<(Instant, f64)>,
    stop: Mutex<Option<SearchStop>>,
    progress: &'a dyn Progress,
}

impl<'a> Evaluator<'a> {
    /// An evaluator of the plan's candidates.
    pub fn new(
        base: &'a Scenario,
        spec: &'a PlanSpec,
        cache: &'a TableCache,
        cap: usize,
        max_seconds: Option<f64>,
        felt_bound_g: f64,
        progress: &'a dyn Progress,
    ) -> Self {
        let slots = super::slot_count(spec);
        Self {
            base,
            spec,
            cache,
            tracker: Tracker::new(base, spec, felt_bound_g),
            slots,
            memo: Mutex::new(HashMap::new()),
            near: Mutex::new(vec![None; slots]),
            independent: Mutex::new(None),
            simulated: AtomicUsize::new(0),
            cap,
            deadline: max_seconds.map(|s| (Instant::now(), s)),
            stop: Mutex::new(None),
            progress,
        }
    }

    /// Shows a status line on the progress hooks.
    pub fn progress_status(&self, text: &str) {
        self.progress.status(text);
    }

    /// Candidates simulated so far.
    pub fn simulated(&self) -> usize {
        self.simulated.load(Ordering::Relaxed)
    }

    /// Why the work stopped early, if it did.
    pub fn stopped(&self) -> Option<SearchStop> {
        self.stop.lock().ok().and_then(|s| *s)
    }

    fn halt(&self, why: SearchStop) {
        if let Ok(mut s) = self.stop.lock() {
            s.get_or_insert(why);
        }
    }

    /// The best near-miss of a given last slot, or overall (`None`).
    pub fn near_miss(&self, last_slot: Option<usize>) -> Option<Arc<Eval>> {
        let near = self.near.lock().ok()?;
        match last_slot {
            Some(k) => near.get(k).cloned().flatten(),
            None => near
                .iter()
                .flatten()
                .max_by(|a, b| a.violation.total_cmp(&b.violation))
                .cloned(),
        }
    }

    /// A failing check that no layout can change, if one was seen.
    pub fn layout_independent_failure(&self) -> Option<Failing> {
        self.independent.lock().ok().and_then(|f| f.clone())
    }

    /// Evaluates layouts (trailing empties ignored); `None` for those the budget left out.
    pub fn evaluate(&self, layouts: &[Layout]) -> Result<Vec<Option<Arc<Eval>>>, PlanError> {
        let keys: Vec<Layout> = layouts.iter().map(|l| trimmed(l)).collect();
        let mut todo: Vec<Layout> = Vec::new();
        {
            let memo = self.memo.lock().unwrap_or_else(|e| e.into_inner());
            for k in &keys {
                if !k.is_empty() && !memo.contains_key(k) && !todo.contains(k) {
                    todo.push(k.clone());
                }
            }
        }
        if let Some((t0, s)) = self.deadline {
            if t0.elapsed().as_secs_f64() > s && !todo.is_empty() {
                self.halt(SearchStop::TimeCap { seconds: s });
                todo.clear();
            }
        }
        let done = self.simulated();
        let room = self.cap.saturating_sub(done);
        if todo.len() > room {
            self.halt(SearchStop::CandidateCap { cap: self.cap });
            todo.truncate(room);
        }
        self.simulated.fetch_add(todo.len(), Ordering::Relaxed);
        let fresh: Vec<Arc<Eval>> = todo
            .par_iter()
            .map(|l| {
                let e = self.compute(l).map(Arc::new);
                self.progress.advance(1);
                e
            })
            .collect::<Result<_, _>>()?;
        let mut memo = self.memo.lock().unwrap_or_else(|e| e.into_inner());
        for e in fresh {
            self.note(&e);
            memo.insert(e.layout.clone(), e);
        }
        Ok(keys.iter().map(|k| memo.get(k).cloned()).collect())
    }

    fn note(&self, e: &Arc<Eval>) {
        if let Ok(mut near) = self.near.lock() {
            if let Some(slot) = near.get_mut(e.last_slot) {
                if slot.as_ref().is_none_or(|b| e.violation > b.violation) && !e.pass {
                    *slot = Some(e.clone());
                }
            }
        }
        if let Some(f) = &e.independent {
            if let Ok(mut i) = self.independent.lock() {
                i.get_or_insert_with(|| f.clone());
            }
        }
    }

    /// The full verdict of a layout and its scenario (the final verification of a result).
    pub fn verify(&self, layout: &Layout) -> Result<(Scenario, Verdict), PlanError> {
        let s = candidate_scenario(self.base, self.spec, layout);
        let study = Study::with_cache(s, self.cache)?;
        let v = study.judge(&JudgeOptions::default(), &Silent)?.verdict;
        Ok((study.into_scenario(), v))
    }

    fn compute(&self, layout: &Layout) -> Result<Eval, PlanError> {
        let cand = candidate_scenario(self.base, self.spec, layout);
        let has_duty = cand.duty.is_some();
        let first = Scenario {
            duty: None,
            ..cand.clone()
        };
        let study = Study::with_cache(first, self.cache)?;
        let judged = study.judge(&JudgeOptions::default(), &Silent)?;
        let last_slot = layout.len().saturating_sub(1);
        let reach = ((self.spec.module_length_m + self.base.vehicle.length_m)
            / self.spec.slot_pitch_m)
            .ceil() as usize
            + 1;
        let states = self.tracker.states(
            &study.scenario().cases,
            &judged.runs,
            last_slot + 1,
            (last_slot + 1 + reach).min(self.slots),
        );
        let verdict = if judged.verdict.pass && has_duty {
            Study::with_cache(cand.clone(), self.cache)?
                .judge(&JudgeOptions::default(), &Silent)?
                .verdict
        } else {
            judged.verdict
        };
        let backward: Vec<&str> = cand
            .cases
            .iter()
            .filter(|c| matches!(c.origin, CaseOrigin::Rollback { .. }) || c.start_speed_m_s < 0.0)
            .map(|c| c.name.as_str())
            .collect();
        let promising = verdict.cases.iter().all(|c| {
            backward.contains(&c.case.as_str())
                || c.checks
                    .iter()
                    .all(|r| r.pass || r.check == "exit_speed_max")
        });
        let independent = failing_rows(&verdict)
            .iter()
            .find(|f| LAYOUT_INDEPENDENT.contains(&f.check.as_str()))
            .cloned();
        Ok(Eval {
            pass: verdict.pass,
            promising,
            violation: violation(&verdict),
            worst_margin: worst_margin(&verdict),
            independent,
            modules: layout.iter().filter(|c| c.is_some()).count(),
            last_slot,
            states,
            layout: layout.clone(),
        })
    }
}
