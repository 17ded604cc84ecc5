//! The layout planner: a zone of catalogue modules, each at one of its clearance settings, that
//! passes every case of a scenario — the shortest one, or the one with the largest worst-case
//! margin at a given length.
//!
//! # Layouts and candidates
//! Slot `i` starts at `zone_start + i·slot_pitch`; every slot is empty or holds one module at one
//! clearance setting. A candidate becomes a [`Scenario`] by [`candidate_scenario`]: its modules
//! replace `sections` (mount on the track, module length, the module's magnet design at the
//! slot's clearance, its grade and remanence coefficient); listed and corner cases are kept
//! (their `disabled` lists referred to the old sections and are dropped); one-section-out cases
//! are rebuilt over the candidate's modules from the same base cases; a default-position
//! backwards entry is moved to just past the candidate's zone end. Every candidate is judged by
//! the full verdict through the study layer (first dispatch and, with a duty block, the duty
//! cycle's steady state), and every reported layout is judged once more from scratch.
//!
//! # Objectives
//! * [`Objective::Shortest`] (default): the smallest zone end (slots used from the plan's zone
//!   start), then the fewest modules, then the largest worst-case margin.
//! * [`Objective::Margin`]: among layouts that end within the given length of the zone start,
//!   the largest worst-case margin — the smallest margin/|limit| over every limited check of
//!   every case (the layout-independent magnet temperature and grade checks excepted) — then the
//!   fewest modules.
//!
//! # Method
//! 1. *Bound* ([`bound`], exact up to a stated numerical tolerance): a comparison ODE with the
//!    strongest braking any slot can give at every speed and fin temperature gives, per case
//!    with an exit_speed_max limit, the speed above which a vehicle leaves every layout ending in
//!    slot k too fast. It proves "infeasible" when every k is excluded, gives a lower bound on
//!    the number of slots, and prunes partial layouts that are too fast to be stopped in time.
//! 2. *Beam passes* ([`beam`]) over slots in travel order with widths 4, 16, 64 (options): a
//!    partial layout is simulated as a complete layout; the run is shared exactly with every
//!    layout that begins with it up to the next slot ([`state`]), so a running check already
//!    failing there (peak, envelope, onset, duration, stall, reversal) prunes it soundly. While
//!    a pass keeps every surviving partial layout it is exact (branch and bound); beyond its
//!    width it keeps the best by a heuristic dominance rule and ranking. With the shortest
//!    objective each pass stops at the first length with a feasible layout and the next, wider
//!    pass looks only for shorter ones.
//! 3. *Local improvement* ([`local`]): a climb over single-slot changes for a shorter layout
//!    (from the best near-misses) and then for fewer modules and more margin.
//!
//! Work is capped ([`PlanOptions::max_candidates`], default 64 × settings × slots + the local
//! pass; optionally a wall-clock cap); the outcome says when a cap was hit.
//!
//! # Outcomes
//! [`PlanOutcome::Feasible`], [`PlanOutcome::ProvenInfeasible`] (the bound excludes every
//! length, a failing check does not depend on the layout, or exact passes covered every layout)
//! or [`PlanOutcome::NotFound`] (the search found nothing; the best near-miss with its failing
//! checks and what the search covered).

mod beam;
pub mod bound;
mod candidate;
mod eval;
mod local;
pub mod state;
mod types;

pub use candidate::{candidate_scenario, module_section_name, section_out_bases};
pub use eval::{relative_margin, worst_margin};
pub use types::*;

use crate::checks::Verdict;
use crate::scenario::{PlanSpec, Scenario};
use crate::study::{JudgeOptions, Progress, Silent, Study, TableCache};
use eval::{trimmed, Eval, Evaluator};
use std::sync::Arc;
use std::time::Instant;

/// Number of slots of the plan.
pub fn slot_count(p: &PlanSpec) -> usize {
    let n = ((p.max_length_m - p.module_length_m) / p.slot_pitch_m + 1e-9).floor();
    if n.is_finite() && n >= 0.0 {
        (n as usize).saturating_add(1).min(10_000)
    } else {
        1
    }
}

/// Modules of a layout.
pub fn modules_of(p: &PlanSpec, layout: &Layout) -> Vec<PlacedModule> {
    layout
        .iter()
        .enumerate()
        .filter_map(|(i, c)| {
            c.and_then(|c| p.clearances_m.get(c))
                .map(|&cl| PlacedModule {
                    start_m: p.zone_start_m + i as f64 * p.slot_pitch_m,
                    clearance_m: cl,
                })
        })
        .collect()
}

/// Zone length of a layout (first module start to last module end), m; 0 when empty.
pub fn zone_length_m(p: &PlanSpec, layout: &Layout) -> f64 {
    let m = modules_of(p, layout);
    match (m.first(), m.last()) {
        (Some(a), Some(b)) => b.start_m + p.module_length_m - a.start_m,
        _ => 0.0,
    }
}

/// Simulates every case of a scenario and judges it, as `check` does.
pub fn evaluate(s: &Scenario) -> Result<Verdict, PlanError> {
    evaluate_cached(s, &TableCache::default())
}

/// [`evaluate`] with force tables shared through `cache`.
pub fn evaluate_cached(s: &Scenario, cache: &TableCache) -> Result<Verdict, PlanError> {
    let study = Study::with_cache(s.clone(), cache)?;
    Ok(study.judge(&JudgeOptions::default(), &Silent)?.verdict)
}

/// Normalised total violation of a verdict (0 when it passes; more negative is worse).
pub fn violation(v: &Verdict) -> f64 {
    v.cases
        .iter()
        .flat_map(|c| &c.checks)
        .filter(|r| !r.pass)
        .map(|r| match (r.margin, r.limit) {
            (Some(m), Some(l)) => m / l.abs().max(1e-9),
            _ => -1.0,
        })
        .sum()
}

/// Slots within `length_m` of the zone start.
fn slots_within(p: &PlanSpec, length_m: f64) -> Result<usize, PlanError> {
    let n = ((length_m - p.module_length_m) / p.slot_pitch_m + 1e-9).floor();
    if !(n.is_finite() && n >= 0.0) {
        return Err(PlanError::LengthTooShort {
            length_m,
            module_length_m: p.module_length_m,
        });
    }
    Ok(((n as usize).saturating_add(1)).min(slot_count(p)))
}

/// The default cap on candidates: the widest pass over every slot plus the local pass.
pub fn default_candidate_cap(slots: usize, settings: usize, widest: usize) -> usize {
    (widest * settings * slots).saturating_add(8 * settings * slots)
}

/// A layout as reported: its modules, margins and verdict.
fn planned(spec: &PlanSpec, layout: &Layout, scenario: Scenario, verdict: Verdict) -> Planned {
    let modules = layout
        .iter()
        .enumerate()
        .filter_map(|(slot, c)| c.map(|c| (slot, c)))
        .zip(modules_of(spec, layout))
        .zip(&scenario.sections)
        .map(|(((slot, setting), m), s)| ModuleRow {
            name: s.name.clone(),
            slot,
            setting,
            start_m: m.start_m,
            clearance_m: m.clearance_m,
        })
        .collect::<Vec<_>>();
    let binding = verdict
        .worst
        .iter()
        .map(|w| Binding {
            check: w.check.clone(),
            case: w.case.clone(),
            margin: w.margin,
            unit: verdict
                .cases
                .iter()
                .flat_map(|c| &c.checks)
                .find(|r| r.key() == w.check)
                .map_or_else(String::new, |r| r.unit.clone()),
            state: w.state,
        })
        .collect();
    let last = layout.iter().rposition(|c| c.is_some()).unwrap_or(0);
    Planned {
        layout: layout.clone(),
        module_count: modules.len(),
        zone_length_m: zone_length_m(spec, layout),
        zone_end_m: spec.zone_start_m + last as f64 * spec.slot_pitch_m + spec.module_length_m,
        worst_relative_margin: worst_margin(&verdict),
        modules,
        binding,
        scenario,
        verdict,
    }
}

/// Runs the layout search on a scenario with a `plan:` block (see the module documentation).
pub fn plan(
    base: &Scenario,
    options: &PlanOptions,
    progress: &dyn Progress,
) -> Result<PlanResult, PlanError> {
    let started = Instant::now();
    let spec = base.plan.as_ref().ok_or(PlanError::NoPlan)?;
    let objective = options.objective;
    let levels = spec.clearances_m.len().max(1);
    let slots = slot_count(spec);
    let max_slots = match objective {
        Objective::Shortest => slots,
        Objective::Margin { length_m } => slots_within(spec, length_m)?,
    };
    let widths: Vec<usize> = if options.widths.is_empty() {
        PlanOptions::default().widths
    } else {
        options.widths.clone()
    };
    let widest = widths.iter().copied().max().unwrap_or(1);
    let cap = options
        .max_candidates
        .unwrap_or_else(|| default_candidate_cap(max_slots, levels, widest));
    let cache = TableCache::default();
    progress.stage("bounding the exit speed", None);
    let bounds = bound::bounds(base, spec, &cache)?;
    let lower = bounds.length_lower_bound();
    let mut cov = Coverage {
        slots,
        settings: levels,
        max_slots,
        candidate_cap: cap,
        length_lower_bound_slots: lower,
        ..Coverage::default()
    };
    if lower.is_none_or(|l| l > max_slots) {
        let last = max_slots.saturating_sub(1);
        if let Some(cb) = bounds.proven_slot(last) {
            let reason = Infeasibility::ExitTooFast {
                case: cb.case.clone(),
                start_speed_m_s: cb.start_speed_m_s,
                limit_m_s: cb.limit_m_s,
                slots: max_slots,
            };
            cov.elapsed_s = started.elapsed().as_secs_f64();
            return Ok(PlanResult {
                objective,
                outcome: PlanOutcome::ProvenInfeasible {
                    reason,
                    coverage: cov,
                },
            });
        }
    }
    progress.stage("searching layouts (candidates simulated)", Some(cap as u64));
    let ev = Evaluator::new(
        base,
        spec,
        &cache,
        cap,
        options.max_seconds,
        bounds.felt_bound_g,
        progress,
    );
    let shortest = objective == Objective::Shortest;
    let mut best: Option<Arc<Eval>> = None;
    let consider = |best: &mut Option<Arc<Eval>>, e: &Arc<Eval>| {
        if e.pass
            && e.last_slot < max_slots
            && best.as_ref().is_none_or(|b| local::better(e, b, objective))
        {
            *best = Some(e.clone());
        }
    };
    let proven_shortest = |best: &Option<Arc<Eval>>, cov: &Coverage| {
        best.as_ref().is_some_and(|b| {
            lower == Some(b.last_slot + 1) || cov.exact_through_slots >= b.last_slot
        })
    };
    // Probe: every slot at the tightest setting, from the lower bound on, while that fails
    // only by leaving too fast.
    for k in lower.unwrap_or(1).max(1)..=max_slots {
        let Some(Some(e)) = ev.evaluate(&[vec![Some(0); k]])?.pop() else {
            break;
        };
        cov.probes += 1;
        consider(&mut best, &e);
        if e.pass || !e.promising {
            break;
        }
    }
    for &w in &widths {
        if shortest && proven_shortest(&best, &cov) {
            break;
        }
        // With the shortest objective a pass looks for layouts no longer than the best one
        // (its own length again, for fewer modules there).
        let depth = match (shortest, &best) {
            (true, Some(b)) => b.last_slot + 1,
            _ => max_slots,
        };
        let out = beam::pass(&ev, &bounds, objective, levels, w, depth, shortest)?;
        for e in &out.found {
            consider(&mut best, e);
        }
        cov.exact_through_slots = cov
            .exact_through_slots
            .max(out.coverage.exact_through_slots.min(depth));
        let whole = out.coverage.exact_through_slots >= depth;
        cov.passes.push(out.coverage);
        if let Some(failing) = ev.layout_independent_failure() {
            cov.candidates_simulated = ev.simulated();
            cov.stop = ev.stopped().unwrap_or_default();
            cov.elapsed_s = started.elapsed().as_secs_f64();
            return Ok(PlanResult {
                objective,
                outcome: PlanOutcome::ProvenInfeasible {
                    reason: Infeasibility::LayoutIndependent { failing },
                    coverage: cov,
                },
            });
        }
        if whole || ev.stopped().is_some() {
            break;
        }
    }
    // Local improvement: shorter (from near-misses), then the objective's order.
    if let Some(b) = best.clone() {
        if shortest {
            let mut target = b.last_slot;
            while target > 0
                && !proven_shortest(&best, &cov)
                && lower.is_none_or(|l| target >= l)
                && ev.stopped().is_none()
            {
                let mut seeds: Vec<Layout> = Vec::new();
                if let Some(n) = ev.near_miss(Some(target - 1)) {
                    seeds.push(n.layout.clone());
                }
                if let Some(cur) = &best {
                    let t = trimmed(&cur.layout[..target.min(cur.layout.len())]);
                    if !t.is_empty() && !seeds.contains(&t) {
                        seeds.push(t);
                    }
                }
                let mut shorter = None;
                for s in ev.evaluate(&seeds)?.into_iter().flatten() {
                    if s.pass {
                        shorter = Some(s);
                        break;
                    }
                    let (found, steps) = local::repair(&ev, s, levels, target)?;
                    cov.local_steps += steps;
                    if found.is_some() {
                        shorter = found;
                        break;
                    }
                }
                match shorter {
                    Some(s) => {
                        consider(&mut best, &s);
                        target = s.last_slot;
                    }
                    None => break,
                }
            }
        }
        if let Some(cur) = best.clone() {
            let (improved, steps) = local::improve(&ev, cur, objective, levels, max_slots)?;
            cov.local_steps += steps;
            consider(&mut best, &improved);
        }
    }
    cov.shortest_proven = shortest && proven_shortest(&best, &cov);
    cov.candidates_simulated = ev.simulated();
    cov.stop = ev.stopped().unwrap_or_default();
    progress.stage("verifying the result", None);
    let outcome = match best {
        Some(b) => {
            let (s, v) = ev.verify(&b.layout)?;
            let p = planned(spec, &b.layout, s, v);
            cov.elapsed_s = started.elapsed().as_secs_f64();
            if p.verdict.pass {
                PlanOutcome::Feasible {
                    plan: Box::new(p),
                    coverage: cov,
                }
            } else {
                // The search's verdict and the fresh one disagree: report it, never a pass.
                let failing = eval::failing_rows(&p.verdict);
                PlanOutcome::NotFound {
                    near_miss: Some(Box::new(NearMiss { plan: p, failing })),
                    coverage: cov,
                }
            }
        }
        None if cov.exact_through_slots >= max_slots => {
            cov.elapsed_s = started.elapsed().as_secs_f64();
            PlanOutcome::ProvenInfeasible {
                reason: Infeasibility::Exhausted { slots: max_slots },
                coverage: cov,
            }
        }
        None => {
            let near_miss = match ev.near_miss(None) {
                Some(n) => {
                    let (s, v) = ev.verify(&n.layout)?;
                    let failing = eval::failing_rows(&v);
                    Some(Box::new(NearMiss {
                        plan: planned(spec, &n.layout, s, v),
                        failing,
                    }))
                }
                None => None,
            };
            cov.elapsed_s = started.elapsed().as_secs_f64();
            PlanOutcome::NotFound {
                near_miss,
                coverage: cov,
            }
        }
    };
    Ok(PlanResult { objective, outcome })
}
