//! The local improvement pass: best-improvement hill climbing over single-slot changes (one
//! slot set to empty or to another setting), every neighbour simulated.
//!
//! * [`improve`] climbs from a feasible layout on the objective's order (shortest: shorter, then
//!   fewer modules, then a larger worst-case margin; margin: a larger worst-case margin, then
//!   fewer modules), keeping within `max_slots`.
//! * [`repair`] climbs from an infeasible layout on the total violation, within `max_slots`,
//!   until a neighbour passes (used to look for a layout shorter than the best one found).

use super::eval::{trimmed, Eval, Evaluator};
use super::{Layout, Objective, PlanError};
use std::cmp::Ordering;
use std::sync::Arc;

/// Steps of one repair climb.
const REPAIR_STEPS: usize = 4;

/// Whether `a` is better than `b` for the objective (both feasible).
pub fn better(a: &Eval, b: &Eval, objective: Objective) -> bool {
    order(a, b, objective) == Ordering::Less
}

/// The objective's order of feasible layouts (smaller is better).
pub fn order(a: &Eval, b: &Eval, objective: Objective) -> Ordering {
    let m = |e: &Eval| e.worst_margin.unwrap_or(f64::NEG_INFINITY);
    match objective {
        Objective::Shortest => a
            .last_slot
            .cmp(&b.last_slot)
            .then(a.modules.cmp(&b.modules))
            .then(m(b).total_cmp(&m(a))),
        Objective::Margin { .. } => m(b)
            .total_cmp(&m(a))
            .then(a.modules.cmp(&b.modules))
            .then(a.last_slot.cmp(&b.last_slot)),
    }
}

/// Every layout that differs from `l` in one slot of `0..max_slots` (not the empty layout).
fn neighbours(l: &Layout, max_slots: usize, levels: usize) -> Vec<Layout> {
    let mut base = l.clone();
    base.resize(max_slots.max(base.len()), None);
    let mut out = Vec::new();
    for s in 0..max_slots {
        for v in std::iter::once(None).chain((0..levels).map(Some)) {
            if base[s] == v {
                continue;
            }
            let mut n = base.clone();
            n[s] = v;
            let n = trimmed(&n);
            if !n.is_empty() && !out.contains(&n) {
                out.push(n);
            }
        }
    }
    out
}

/// Climbs from a feasible layout; returns the best one met and the number of steps taken.
pub fn improve(
    ev: &Evaluator<'_>,
    start: Arc<Eval>,
    objective: Objective,
    levels: usize,
    max_slots: usize,
) -> Result<(Arc<Eval>, usize), PlanError> {
    let mut cur = start;
    let mut steps = 0;
    loop {
        let limit = match objective {
            Objective::Shortest => cur.last_slot + 1,
            Objective::Margin { .. } => max_slots,
        };
        ev.progress_status(&format!("local improvement: step {}", steps + 1));
        let n = neighbours(&cur.layout, limit, levels);
        let evals = ev.evaluate(&n)?;
        let best = evals
            .iter()
            .flatten()
            .filter(|e| e.pass && e.last_slot < max_slots)
            .min_by(|a, b| order(a, b, objective))
            .cloned();
        match best {
            Some(b) if better(&b, &cur, objective) => {
                cur = b;
                steps += 1;
            }
            _ => break,
        }
        if ev.stopped().is_some() {
            break;
        }
    }
    Ok((cur, steps))
}

/// Climbs on the violation from `seed` within `max_slots` slots until a layout passes; returns
/// it, if found, and the steps taken.
pub fn repair(
    ev: &Evaluator<'_>,
    seed: Arc<Eval>,
    levels: usize,
    max_slots: usize,
) -> Result<(Option<Arc<Eval>>, usize), PlanError> {
    let mut cur = seed;
    for step in 0..REPAIR_STEPS {
        ev.progress_status(&format!(
            "looking for a layout of {max_slots} slots: step {}",
            step + 1
        ));
        let evals = ev.evaluate(&neighbours(&cur.layout, max_slots, levels))?;
        let ok: Vec<&Arc<Eval>> = evals.iter().flatten().filter(|e| e.pass).collect();
        if let Some(best) = ok.iter().min_by(|a, b| order(a, b, Objective::Shortest)) {
            return Ok((Some((*best).clone()), step + 1));
        }
        match evals
            .iter()
            .flatten()
            .max_by(|a, b| a.violation.total_cmp(&b.violation))
        {
            Some(b) if b.violation > cur.violation => cur = b.clone(),
            _ => return Ok((None, step + 1)),
        }
        if ev.stopped().is_some() {
            break;
        }
    }
    Ok((None, REPAIR_STEPS))
}
