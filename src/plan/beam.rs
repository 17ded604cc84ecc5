//! One beam pass over the slots in travel order.
//!
//! A node is a partial layout: slots `0..depth` decided. Its children decide slot `depth`
//! (empty, or a module at each setting); a child with a module is a complete layout and is
//! simulated ([`Evaluator`]); an empty child shares its parent's run. Each child's state at the
//! next boundary comes from that run ([`super::state`]). Then, per depth:
//! 1. *Sound pruning.* Dead children (a running check already fails in the shared part of the
//!    run) and children that every completion leaves too fast ([`Bounds::prefix_too_fast`]) are
//!    dropped: no completion of them can pass.
//! 2. If at most `width` children are left, all are kept and the pass is still exact: every
//!    layout up to this length has been simulated or soundly excluded.
//! 3. Otherwise (heuristic from here on): *dominance* — among children with the same modules in
//!    the last `tail_slots` slots (so the same magnets under the fins from here on), one is
//!    dropped when another is, in every tracked case, no faster, with every running margin no
//!    smaller, has no more modules, and is no less promising. Forces are not monotone in speed
//!    or fin temperature, so this is a heuristic rule, not a proof; then *ranking* — feasible
//!    first, then promising ones (their complete verdict fails only exit_speed_max: they need
//!    more braking) by the largest share of kinetic energy still to remove over all cases, then
//!    fewer modules, then larger running margin; then the rest by their total violation; the
//!    beam takes them in that order, at most a quarter of the width per tail at first, so that
//!    different endings survive.

use super::bound::Bounds;
use super::eval::{Eval, Evaluator};
use super::state::BoundaryState;
use super::{Layout, Objective, PassCoverage, PlanError};
use std::cmp::Ordering;
use std::sync::Arc;

/// A partial layout.
#[derive(Debug, Clone)]
struct Node {
    /// Slots `0..depth`.
    layout: Layout,
    /// The run of its modules (None: no module yet).
    eval: Option<Arc<Eval>>,
    /// State at boundary `depth`.
    state: BoundaryState,
    modules: usize,
}

impl Node {
    fn tail(&self, slots: usize) -> &[Option<usize>] {
        &self.layout[self.layout.len().saturating_sub(slots)..]
    }

    fn promising(&self) -> bool {
        self.eval.as_ref().is_none_or(|e| e.promising)
    }

    fn feasible(&self) -> bool {
        self.eval.as_ref().is_some_and(|e| e.pass)
    }
}

/// What one pass found and covered.
#[derive(Debug)]
pub struct PassOutcome {
    /// What it covered.
    pub coverage: PassCoverage,
    /// Feasible layouts it met.
    pub found: Vec<Arc<Eval>>,
}

/// Runs one pass of width `width` deciding slots `0..max_depth`; with `stop_at_first` it ends
/// after the first depth at which a feasible layout appears.
pub fn pass(
    ev: &Evaluator<'_>,
    bounds: &Bounds,
    objective: Objective,
    levels: usize,
    width: usize,
    max_depth: usize,
    stop_at_first: bool,
) -> Result<PassOutcome, PlanError> {
    let width = width.max(1);
    let tracker = &ev.tracker;
    let mut cov = PassCoverage {
        width,
        ..PassCoverage::default()
    };
    let before = ev.simulated();
    let mut found: Vec<Arc<Eval>> = Vec::new();
    let mut beam = vec![Node {
        layout: vec![],
        eval: None,
        state: tracker.start_state(),
        modules: 0,
    }];
    let mut exact = true;
    for d in 0..max_depth {
        ev.progress_status(&format!(
            "beam {width}: slot {}/{max_depth}, {} kept, {} simulated",
            d + 1,
            beam.len(),
            ev.simulated()
        ));
        // A node whose every case settled before this slot has no completion better than itself
        // (BoundaryState::settled): it ends here (sound).
        if tracker.all_tracked {
            let before = beam.len();
            beam.retain(|n| !(n.eval.is_some() && n.state.settled()));
            cov.pruned_dead += before - beam.len();
            if beam.is_empty() {
                if exact {
                    cov.exact_through_slots = max_depth;
                }
                break;
            }
        }
        let mut layouts: Vec<Layout> = Vec::with_capacity(beam.len() * levels);
        for n in &beam {
            for c in 0..levels {
                let mut l = n.layout.clone();
                l.push(Some(c));
                layouts.push(l);
            }
        }
        let evals = ev.evaluate(&layouts)?;
        let complete = evals.iter().all(Option::is_some);
        let mut kids: Vec<Node> = Vec::with_capacity(beam.len() * (levels + 1));
        for (i, n) in beam.iter().enumerate() {
            let mut l = n.layout.clone();
            l.push(None);
            let state = match &n.eval {
                Some(e) => e.state_at(d + 1),
                None => Some(tracker.start_state()),
            };
            if let Some(state) = state {
                kids.push(Node {
                    layout: l,
                    eval: n.eval.clone(),
                    state,
                    modules: n.modules,
                });
            }
            for (c, e) in evals[i * levels..(i + 1) * levels].iter().enumerate() {
                let Some(e) = e else { continue };
                let Some(state) = e.state_at(d + 1) else {
                    continue;
                };
                let mut l = n.layout.clone();
                l.push(Some(c));
                if e.pass {
                    found.push(e.clone());
                }
                kids.push(Node {
                    layout: l,
                    eval: Some(e.clone()),
                    state,
                    modules: n.modules + 1,
                });
            }
        }
        cov.depth_slots = d + 1;
        if exact && complete {
            cov.exact_through_slots = d + 1;
        }
        if !complete || (stop_at_first && !found.is_empty()) {
            break;
        }
        let before_prune = kids.len();
        kids.retain(|k| !k.state.dead);
        cov.pruned_dead += before_prune - kids.len();
        let before_bound = kids.len();
        kids.retain(|k| {
            !bounds.prefix_too_fast(d + 1, &|case_index| {
                tracker
                    .base_cases
                    .iter()
                    .position(|b| b.0 == case_index)
                    .and_then(|i| k.state.base.get(i))
                    .filter(|s| s.exact)
                    .map(|s| s.speed_m_s)
            })
        });
        cov.pruned_too_fast += before_bound - kids.len();
        if kids.is_empty() {
            if exact {
                cov.exact_through_slots = max_depth;
            }
            break;
        }
        if kids.len() > width {
            exact = false;
            let n = kids.len();
            kids = undominated(kids, tracker.tail_slots);
            cov.pruned_dominated += n - kids.len();
            kids.sort_by(|a, b| rank(a, b, objective));
            let n = kids.len();
            kids = diverse(kids, width, tracker.tail_slots);
            cov.dropped_by_width += n - kids.len();
        }
        beam = kids;
    }
    cov.simulated = ev.simulated() - before;
    Ok(PassOutcome {
        coverage: cov,
        found,
    })
}

/// Whether `a` dominates `b` (same tail assumed).
fn dominates(a: &Node, b: &Node) -> bool {
    let case = |x: &super::state::CaseState, y: &super::state::CaseState| {
        x.speed_m_s <= y.speed_m_s + 1e-9
            && x.margins.len() == y.margins.len()
            && x.margins
                .iter()
                .zip(&y.margins)
                .all(|(p, q)| *p >= *q - 1e-12)
    };
    a.modules <= b.modules
        && (a.promising() || !b.promising())
        && (a.feasible() || !b.feasible())
        && a.state.base.len() == b.state.base.len()
        && a.state
            .base
            .iter()
            .zip(&b.state.base)
            .all(|(x, y)| case(x, y))
        && match (&a.state.n1, &b.state.n1) {
            (Some(x), Some(y)) => case(x, y),
            (None, _) => true,
            (Some(_), None) => false,
        }
}

/// The children no other child with the same tail dominates (of equals, the first).
fn undominated(kids: Vec<Node>, tail: usize) -> Vec<Node> {
    let keep: Vec<bool> = kids
        .iter()
        .enumerate()
        .map(|(i, b)| {
            !kids.iter().enumerate().any(|(j, a)| {
                j != i
                    && a.tail(tail) == b.tail(tail)
                    && dominates(a, b)
                    && (!dominates(b, a) || j < i)
            })
        })
        .collect();
    kids.into_iter()
        .zip(keep)
        .filter_map(|(k, keep)| keep.then_some(k))
        .collect()
}

/// The ranking of the module documentation (smaller first).
fn rank(a: &Node, b: &Node, objective: Objective) -> Ordering {
    let class = |n: &Node| -> u8 {
        if n.feasible() {
            0
        } else if n.promising() {
            1
        } else {
            2
        }
    };
    let margin = |n: &Node| {
        n.eval
            .as_ref()
            .and_then(|e| e.worst_margin)
            .unwrap_or(f64::NEG_INFINITY)
    };
    let violation = |n: &Node| n.eval.as_ref().map_or(f64::NEG_INFINITY, |e| e.violation);
    class(a).cmp(&class(b)).then_with(|| match class(a) {
        0 if matches!(objective, Objective::Margin { .. }) => margin(b).total_cmp(&margin(a)),
        2 => violation(b)
            .total_cmp(&violation(a))
            .then(a.state.remaining.total_cmp(&b.state.remaining)),
        _ => a
            .state
            .remaining
            .total_cmp(&b.state.remaining)
            .then(a.modules.cmp(&b.modules))
            .then(b.state.health.total_cmp(&a.state.health)),
    })
}

/// The first `width` of the ranked children, at most a quarter of the width per tail in a first
/// sweep, then the best of the rest.
fn diverse(kids: Vec<Node>, width: usize, tail: usize) -> Vec<Node> {
    let per_tail = (width / 4).max(1);
    let mut taken = vec![false; kids.len()];
    let mut count = 0usize;
    let mut tails: Vec<(&[Option<usize>], usize)> = Vec::new();
    for (i, k) in kids.iter().enumerate() {
        if count == width {
            break;
        }
        let t = k.tail(tail);
        match tails.iter_mut().find(|x| x.0 == t) {
            Some(x) if x.1 >= per_tail => continue,
            Some(x) => x.1 += 1,
            None => tails.push((t, 1)),
        }
        taken[i] = true;
        count += 1;
    }
    for t in taken.iter_mut() {
        if count == width {
            break;
        }
        if !*t {
            *t = true;
            count += 1;
        }
    }
    kids.into_iter()
        .zip(taken)
        .filter_map(|(k, t)| t.then_some(k))
        .collect()
}
