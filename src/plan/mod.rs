//! The layout planner: the shortest zone of catalogue modules, each at one of its clearance
//! settings, that passes every case of a scenario.
//!
//! # Method
//! A candidate layout places modules on a grid of slots: slot `i` starts at
//! `zone_start + i·slot_pitch`; every slot is empty or holds one module at one clearance
//! setting. A candidate is turned into a [`Scenario`] by replacing `sections` with modules
//! `P1`, `P2`, … (mount on the track, module length, the module's magnet design at the slot's
//! clearance, its grade and remanence coefficient). Listed and corner cases are kept (their
//! `disabled` lists referred to the old sections and are dropped); when the original scenario
//! had one-section-out cases, they are rebuilt over the candidate's modules with
//! [`crate::scenario::cases::each_section_out`] from the same base cases; a default-position
//! backwards entry is moved to just past the candidate's zone end.
//!
//! Search, by zone length (last used slot `k`, ascending), then by module count:
//! * while every assignment of the first `k` slots (empty or any clearance, last slot used) is
//!   at most [`PlanOptions::exhaustive_limit`] candidates, all are simulated and the first
//!   feasible one in the order (fewest modules, then slot order) is taken;
//! * otherwise modules fill consecutive slots. All-tightest is simulated first; braking grows
//!   as clearance shrinks (the field decays as exp(−π·gap/pole pitch): Furlani, *Permanent
//!   Magnet and Electromechanical Devices*, 2001), so if all-tightest is still too fast at the
//!   exit (exit_speed_max failing) no clearance assignment of `k` modules can pass and `k + 1` is
//!   tried. Otherwise a coordinate (hill-climbing) search loosens one module at a time by one
//!   setting, keeping the grading monotone (clearance non-increasing along the zone, wider at
//!   the entry, which softens onset and peak), and moves to the neighbour with the best
//!   normalised total limit violation until one passes or none improves.
//!
//! Every layout reported feasible is the result of a full simulation of every case, judged by
//! [`crate::checks::verdict`]. Candidates of one step are simulated in parallel (rayon).

use crate::checks::Verdict;
use crate::scenario::{
    cases, Case, CaseOrigin, ForceSource, MagnetDesign, Mount, PlanSpec, Scenario, Section,
};
use crate::study::{JudgeOptions, Progress, Silent, Study, StudyError, TableCache};
use rayon::prelude::*;
use serde::Serialize;

/// Errors of the planner.
#[derive(Debug, thiserror::Error)]
pub enum PlanError {
    /// The scenario has no `plan:` block.
    #[error("the scenario has no `plan:` block")]
    NoPlan,
    /// A candidate could not be simulated.
    #[error("simulating a candidate layout failed: {0}")]
    Study(#[from] StudyError),
}

/// Planner settings.
#[derive(Debug, Clone, Copy)]
pub struct PlanOptions {
    /// Largest number of assignments of one zone length that is searched exhaustively.
    pub exhaustive_limit: usize,
}

impl Default for PlanOptions {
    fn default() -> Self {
        Self {
            exhaustive_limit: 32,
        }
    }
}

/// A layout: for each slot from the zone start, `None` (empty) or an index into
/// `PlanSpec::clearances_m`.
pub type Layout = Vec<Option<usize>>;

/// One placed module.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PlacedModule {
    /// Track position of the module's upstream end, m.
    pub start_m: f64,
    /// Magnet face to fin face, each side, m.
    pub clearance_m: f64,
}

/// The worst margin of one check and the case that binds it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Binding {
    /// Check name (with axis).
    pub check: String,
    /// Case that binds it.
    pub case: String,
    /// Margin in the check's unit (None for pass/fail checks).
    pub margin: Option<f64>,
}

/// The planner's answer.
#[derive(Debug, Clone)]
pub struct PlanResult {
    /// A layout passed every case.
    pub feasible: bool,
    /// The layout (feasible: the chosen one; infeasible: the last one tried at the longest length).
    pub layout: Layout,
    /// Its modules.
    pub modules: Vec<PlacedModule>,
    /// First module start to last module end, m.
    pub zone_length_m: f64,
    /// Per check, the binding case and margin.
    pub binding: Vec<Binding>,
    /// The candidate scenario of `layout`.
    pub scenario: Scenario,
    /// Its verdict.
    pub verdict: Verdict,
    /// Infeasible: which constraint binds and by how much.
    pub reason: Option<String>,
    /// Candidates simulated.
    pub candidates_simulated: usize,
}

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

/// The scenario of a candidate layout (see the module documentation).
pub fn candidate_scenario(base: &Scenario, p: &PlanSpec, layout: &Layout) -> Scenario {
    let mods = modules_of(p, layout);
    let sections: Vec<Section> = mods
        .iter()
        .enumerate()
        .map(|(i, m)| Section {
            name: format!("P{}", i + 1),
            mount: Mount::Track { start_m: m.start_m },
            length_m: p.module_length_m,
            force: ForceSource::Model(MagnetDesign {
                clearance_m: m.clearance_m,
                ..p.module.clone()
            }),
            remanence_temp_coeff_per_k: p.module_remanence_temp_coeff_per_k,
            grade: p.module_grade,
            lane: crate::scenario::defaults::LANE.into(),
        })
        .collect();
    let zone_start_m = mods.first().map_or(p.zone_start_m, |m| m.start_m);
    let zone_end_m = mods
        .last()
        .map_or(p.zone_start_m, |m| m.start_m + p.module_length_m);
    let mut kept: Vec<Case> = Vec::new();
    for c in &base.cases {
        match &c.origin {
            CaseOrigin::SectionOut { .. } => {}
            CaseOrigin::Listed | CaseOrigin::Corner { .. } => {
                let mut c = c.clone();
                c.disabled.clear();
                kept.push(c);
            }
            CaseOrigin::Rollback {
                default_position, ..
            } => {
                let mut c = c.clone();
                c.disabled.clear();
                if *default_position {
                    c.start_position_m =
                        cases::default_rollback_position(zone_end_m, base.vehicle.length_m);
                }
                kept.push(c);
            }
        }
    }
    let bases = section_out_bases(base);
    let targets: Vec<Case> = kept
        .iter()
        .filter(|c| bases.contains(&c.name))
        .cloned()
        .collect();
    let generated = cases::each_section_out(&targets, &sections);
    // Generated N−1 cases follow the listed/corner ones, before a backwards entry.
    let (mut out, rollback): (Vec<Case>, Vec<Case>) = kept
        .into_iter()
        .partition(|c| !matches!(c.origin, CaseOrigin::Rollback { .. }));
    out.extend(generated);
    out.extend(rollback);
    Scenario {
        sections,
        cases: out,
        zone_start_m,
        zone_end_m,
        ..base.clone()
    }
}

/// Names of the base cases of the scenario's one-section-out cases, in order of first use.
pub fn section_out_bases(s: &Scenario) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for c in &s.cases {
        if let CaseOrigin::SectionOut { base, .. } = &c.origin {
            if !out.contains(base) {
                out.push(base.clone());
            }
        }
    }
    out
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

/// Whether some case leaves the zone too fast.
pub fn too_fast(v: &Verdict) -> bool {
    v.cases
        .iter()
        .flat_map(|c| &c.checks)
        .any(|r| !r.pass && r.check == "exit_speed_max")
}

/// Failing checks of a verdict, worst first, as text.
pub fn failures(v: &Verdict) -> Vec<String> {
    let mut rows: Vec<(f64, String)> = Vec::new();
    for c in &v.cases {
        for r in c.checks.iter().filter(|r| !r.pass) {
            let name = match &r.axis {
                Some(a) => format!("{}.{a}", r.check),
                None => r.check.clone(),
            };
            let text = match (r.value, r.limit, r.margin) {
                (Some(val), Some(lim), Some(m)) => format!(
                    "{}: {name} is {val:.3} {u} against the limit {lim:.3} {u} (short by {:.3} {u})",
                    c.case,
                    -m,
                    u = r.unit
                ),
                _ => format!("{}: {name} fails", c.case),
            };
            let key = match (r.margin, r.limit) {
                (Some(m), Some(l)) => m / l.abs().max(1e-9),
                _ => -1.0,
            };
            rows.push((key, text));
        }
    }
    rows.sort_by(|a, b| a.0.total_cmp(&b.0));
    rows.into_iter().map(|r| r.1).collect()
}

fn bindings(v: &Verdict) -> Vec<Binding> {
    v.worst
        .iter()
        .map(|w| Binding {
            check: w.check.clone(),
            case: w.case.clone(),
            margin: w.margin,
        })
        .collect()
}

struct Search<'a> {
    base: &'a Scenario,
    spec: &'a PlanSpec,
    simulated: usize,
    cache: TableCache,
}

impl Search<'_> {
    fn eval_all(&mut self, layouts: &[Layout]) -> Result<Vec<(Scenario, Verdict)>, PlanError> {
        self.simulated += layouts.len();
        let cache = &self.cache;
        layouts
            .par_iter()
            .map(|l| {
                let s = candidate_scenario(self.base, self.spec, l);
                evaluate_cached(&s, cache).map(|v| (s, v))
            })
            .collect()
    }
}

fn finish(
    spec: &PlanSpec,
    layout: Layout,
    s: Scenario,
    v: Verdict,
    reason: Option<String>,
    simulated: usize,
) -> PlanResult {
    PlanResult {
        feasible: v.pass && reason.is_none(),
        modules: modules_of(spec, &layout),
        zone_length_m: zone_length_m(spec, &layout),
        binding: bindings(&v),
        layout,
        scenario: s,
        verdict: v,
        reason,
        candidates_simulated: simulated,
    }
}

/// Every assignment of `k` slots with the last one used, fewest modules first, then in slot
/// order (empty before tighter before looser).
pub fn all_assignments(k: usize, levels: usize) -> Vec<Layout> {
    let mut out: Vec<Layout> = vec![vec![]];
    for i in 0..k {
        let choices: Vec<Option<usize>> = if i + 1 == k {
            (0..levels).map(Some).collect()
        } else {
            std::iter::once(None).chain((0..levels).map(Some)).collect()
        };
        out = out
            .into_iter()
            .flat_map(|l| {
                choices.iter().map(move |c| {
                    let mut l = l.clone();
                    l.push(*c);
                    l
                })
            })
            .collect();
    }
    out.sort_by_key(|l| l.iter().filter(|c| c.is_some()).count());
    out
}

/// Runs the layout search on a scenario with a `plan:` block, reporting one step per zone
/// length tried.
pub fn plan(
    base: &Scenario,
    options: &PlanOptions,
    progress: &dyn Progress,
) -> Result<PlanResult, PlanError> {
    let spec = base.plan.as_ref().ok_or(PlanError::NoPlan)?;
    let levels = spec.clearances_m.len().max(1);
    let slots = slot_count(spec);
    let mut search = Search {
        base,
        spec,
        simulated: 0,
        cache: TableCache::default(),
    };
    progress.stage(
        "searching layouts by zone length (slots)",
        Some(slots as u64),
    );
    let mut last: Option<(Layout, Scenario, Verdict, bool)> = None;
    for k in 1..=slots {
        if k > 1 {
            progress.advance(1);
        }
        progress.status(&format!(
            "zone length {k}/{slots} slots, {} candidates simulated",
            search.simulated
        ));
        let count = (levels as f64 + 1.0).powi(k as i32 - 1) * levels as f64;
        if count <= options.exhaustive_limit as f64 {
            let layouts = all_assignments(k, levels);
            let results = search.eval_all(&layouts)?;
            let mut tightest = None;
            for (l, (s, v)) in layouts.into_iter().zip(results) {
                if v.pass {
                    return Ok(finish(spec, l, s, v, None, search.simulated));
                }
                if l.iter().all(|c| *c == Some(0)) {
                    tightest = Some((l, s, v));
                }
            }
            if let Some((l, s, v)) = tightest {
                last = Some((l, s, v, true));
            }
            continue;
        }
        // Consecutive, graded: all-tightest first.
        let mut cur: Vec<usize> = vec![0; k];
        let to_layout = |c: &[usize]| -> Layout { c.iter().map(|&x| Some(x)).collect() };
        let mut r = search.eval_all(&[to_layout(&cur)])?;
        let Some((s, v)) = r.pop() else { continue };
        if v.pass {
            return Ok(finish(spec, to_layout(&cur), s, v, None, search.simulated));
        }
        let fast = too_fast(&v);
        let mut score = violation(&v);
        last = Some((to_layout(&cur), s, v, true));
        if fast {
            continue;
        }
        loop {
            let neigh: Vec<Vec<usize>> = (0..k)
                .filter(|&i| cur[i] + 1 < levels && (i == 0 || cur[i - 1] > cur[i]))
                .map(|i| {
                    let mut n = cur.clone();
                    n[i] += 1;
                    n
                })
                .collect();
            if neigh.is_empty() {
                break;
            }
            let layouts: Vec<Layout> = neigh.iter().map(|n| to_layout(n)).collect();
            let results = search.eval_all(&layouts)?;
            let mut best: Option<(usize, f64)> = None;
            for (j, (_, v)) in results.iter().enumerate() {
                if v.pass {
                    let (s, v) = results[j].clone();
                    return Ok(finish(
                        spec,
                        layouts[j].clone(),
                        s,
                        v,
                        None,
                        search.simulated,
                    ));
                }
                let sc = violation(v);
                if best.is_none_or(|b| sc > b.1) {
                    best = Some((j, sc));
                }
            }
            match best {
                Some((j, sc)) if sc > score => {
                    score = sc;
                    cur = neigh[j].clone();
                }
                _ => break,
            }
        }
    }
    let (l, s, v, tightest) = match last {
        Some(x) => x,
        None => {
            let l: Layout = vec![Some(0); slots];
            let s = candidate_scenario(base, spec, &l);
            let v = evaluate_cached(&s, &search.cache)?;
            (l, s, v, true)
        }
    };
    let n = l.iter().filter(|c| c.is_some()).count();
    let fails = failures(&v);
    let head = fails
        .first()
        .cloned()
        .unwrap_or_else(|| "no candidate passed".into());
    let reason = format!(
        "no layout within {:.3} m passes: {head}{}",
        spec.max_length_m,
        if tightest {
            format!(" with every module at its tightest clearance ({n} modules, the longest zone)")
        } else {
            String::new()
        }
    );
    let simulated = search.simulated;
    Ok(finish(spec, l, s, v, Some(reason), simulated))
}
