//! The planner's options, result and outcome types.

use crate::checks::limits::JudgedState;
use crate::checks::Verdict;
use crate::scenario::Scenario;
use crate::study::StudyError;
use serde::Serialize;
use std::fmt;

/// Errors of the planner.
#[derive(Debug, thiserror::Error)]
pub enum PlanError {
    /// The scenario has no `plan:` block.
    #[error("the scenario has no `plan:` block")]
    NoPlan,
    /// The length asked for holds no module.
    #[error("a zone length of {length_m} m holds no module of {module_length_m} m")]
    LengthTooShort {
        /// Asked for, m.
        length_m: f64,
        /// Module length, m.
        module_length_m: f64,
    },
    /// A candidate could not be simulated.
    #[error("simulating a candidate layout failed: {0}")]
    Study(#[from] StudyError),
}

/// What the search optimises.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Default)]
#[serde(tag = "objective", rename_all = "snake_case")]
pub enum Objective {
    /// The shortest zone (the last module's end from the plan's zone start), then the fewest
    /// modules, then the largest worst-case margin.
    #[default]
    Shortest,
    /// The largest worst-case relative margin among layouts ending within `length_m` of the
    /// plan's zone start, then the fewest modules.
    Margin {
        /// m.
        length_m: f64,
    },
}

/// Planner settings.
#[derive(Debug, Clone)]
pub struct PlanOptions {
    /// What to optimise (default: shortest).
    pub objective: Objective,
    /// Beam widths of the successive passes (default 4, 16, 64).
    pub widths: Vec<usize>,
    /// Most candidates simulated (default [`super::default_candidate_cap`]: the widest pass over
    /// every slot and setting plus the local pass).
    pub max_candidates: Option<usize>,
    /// Wall-clock cap on the search, s (default none: results do not depend on the machine).
    pub max_seconds: Option<f64>,
}

impl Default for PlanOptions {
    fn default() -> Self {
        Self {
            objective: Objective::Shortest,
            widths: vec![4, 16, 64],
            max_candidates: None,
            max_seconds: None,
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

/// One module of a reported layout.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ModuleRow {
    /// Its section name in the planned scenario.
    pub name: String,
    /// Slot index from the plan's zone start.
    pub slot: usize,
    /// Index of its clearance setting.
    pub setting: usize,
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
    /// Unit of the margin.
    pub unit: String,
    /// Judged state that binds it (None without a duty block).
    pub state: Option<JudgedState>,
}

/// A failing check of a layout.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Failing {
    /// Case.
    pub case: String,
    /// Check name with axis.
    pub check: String,
    /// Value found.
    pub value: Option<f64>,
    /// Limit.
    pub limit: Option<f64>,
    /// Margin (negative), in `unit`.
    pub margin: Option<f64>,
    /// Unit of value, limit and margin.
    pub unit: String,
    /// Why it could not be evaluated, when it could not.
    pub note: Option<String>,
}

impl fmt::Display for Failing {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match (self.value, self.limit, self.margin) {
            (Some(v), Some(l), Some(m)) => write!(
                f,
                "{}: {} is {v:.3} {u} against the limit {l:.3} {u} (margin {m:.3} {u})",
                self.case,
                self.check,
                u = self.unit
            ),
            _ => write!(
                f,
                "{}: {} fails{}",
                self.case,
                self.check,
                self.note
                    .as_deref()
                    .map(|n| format!(" ({n})"))
                    .unwrap_or_default()
            ),
        }
    }
}

/// A layout as reported, with its full verdict.
#[derive(Debug, Clone)]
pub struct Planned {
    /// The layout.
    pub layout: Layout,
    /// Its modules.
    pub modules: Vec<ModuleRow>,
    /// Modules.
    pub module_count: usize,
    /// First module start to last module end, m.
    pub zone_length_m: f64,
    /// Last module end, m (the objective measures it from the plan's zone start).
    pub zone_end_m: f64,
    /// Smallest margin/|limit| over every limited check (layout-independent ones excepted).
    pub worst_relative_margin: Option<f64>,
    /// Per check, the binding case and margin.
    pub binding: Vec<Binding>,
    /// The candidate scenario of `layout`.
    pub scenario: Scenario,
    /// Its verdict (fresh, from the study layer).
    pub verdict: Verdict,
}

/// The best infeasible layout met.
#[derive(Debug, Clone)]
pub struct NearMiss {
    /// The layout and its verdict.
    pub plan: Planned,
    /// Its failing checks, worst first.
    pub failing: Vec<Failing>,
}

/// Why no layout can pass.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Infeasibility {
    /// A case leaves every layout too fast even with the strongest braking every slot can give
    /// (see [`super::bound`]).
    ExitTooFast {
        /// The case.
        case: String,
        /// Its start speed, m/s.
        start_speed_m_s: f64,
        /// exit_speed_max, m/s.
        limit_m_s: f64,
        /// Slots of the longest zone.
        slots: usize,
    },
    /// A check fails whatever the layout (magnet temperature or grade).
    LayoutIndependent {
        /// The failing check.
        failing: Failing,
    },
    /// Exact passes simulated or soundly excluded every layout.
    Exhausted {
        /// Slots of the longest zone.
        slots: usize,
    },
}

impl fmt::Display for Infeasibility {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Infeasibility::ExitTooFast {
                case,
                start_speed_m_s,
                limit_m_s,
                slots,
            } => write!(
                f,
                "case {case}, entering at {start_speed_m_s:.3} m/s, leaves faster than \
                 exit_speed_max {limit_m_s:.3} m/s in every layout of up to {slots} slots, even \
                 with every slot braking as hard as any clearance setting can at every speed \
                 and fin temperature (comparison bound)"
            ),
            Infeasibility::LayoutIndependent { failing } => {
                write!(f, "{failing}, whatever the layout")
            }
            Infeasibility::Exhausted { slots } => write!(
                f,
                "every layout of up to {slots} slots was simulated or excluded by a check that \
                 already failed in a run it shares"
            ),
        }
    }
}

/// Why the search stopped.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Default)]
#[serde(tag = "stop", rename_all = "snake_case")]
pub enum SearchStop {
    /// Every pass and the local improvement ran to their end.
    #[default]
    Completed,
    /// The cap on candidates was reached.
    CandidateCap {
        /// The cap.
        cap: usize,
    },
    /// The wall-clock cap was reached.
    TimeCap {
        /// The cap, s.
        seconds: f64,
    },
}

/// What one beam pass covered.
#[derive(Debug, Clone, PartialEq, Serialize, Default)]
pub struct PassCoverage {
    /// Beam width.
    pub width: usize,
    /// Slots decided at the deepest level reached.
    pub depth_slots: usize,
    /// Every layout of at most this many slots was simulated or soundly excluded.
    pub exact_through_slots: usize,
    /// Candidates simulated in this pass (memo hits not counted).
    pub simulated: usize,
    /// Partial layouts dropped because a running check already failed (sound).
    pub pruned_dead: usize,
    /// Partial layouts dropped because every completion leaves too fast (sound).
    pub pruned_too_fast: usize,
    /// Partial layouts dropped by the dominance rule (heuristic).
    pub pruned_dominated: usize,
    /// Partial layouts dropped by the beam width (heuristic).
    pub dropped_by_width: usize,
}

/// What the search covered.
#[derive(Debug, Clone, PartialEq, Serialize, Default)]
pub struct Coverage {
    /// Slots of the plan.
    pub slots: usize,
    /// Clearance settings.
    pub settings: usize,
    /// Slots searched (the margin objective's length).
    pub max_slots: usize,
    /// Candidates simulated.
    pub candidates_simulated: usize,
    /// The cap on candidates.
    pub candidate_cap: usize,
    /// No feasible layout has fewer slots (sound bound); None: every length is excluded.
    pub length_lower_bound_slots: Option<usize>,
    /// Every layout of at most this many slots was simulated or soundly excluded.
    pub exact_through_slots: usize,
    /// The reported length is the shortest possible (equals the lower bound, or every shorter
    /// layout was covered).
    pub shortest_proven: bool,
    /// Layouts with every slot up to some length at the tightest setting, tried first.
    pub probes: usize,
    /// The beam passes.
    pub passes: Vec<PassCoverage>,
    /// Steps of the local improvement.
    pub local_steps: usize,
    /// Why the search stopped.
    pub stop: SearchStop,
    /// Wall-clock time, s.
    pub elapsed_s: f64,
}

/// The planner's outcome.
#[derive(Debug, Clone)]
pub enum PlanOutcome {
    /// A layout passed every case (verified afresh).
    Feasible {
        /// The layout.
        plan: Box<Planned>,
        /// What the search covered.
        coverage: Coverage,
    },
    /// No layout can pass, with the argument.
    ProvenInfeasible {
        /// Why.
        reason: Infeasibility,
        /// What the search covered.
        coverage: Coverage,
    },
    /// The search found no feasible layout; that is not a proof that none exists.
    NotFound {
        /// The layout closest to passing (smallest total normalised violation).
        near_miss: Option<Box<NearMiss>>,
        /// What the search covered.
        coverage: Coverage,
    },
}

/// The planner's answer.
#[derive(Debug, Clone)]
pub struct PlanResult {
    /// What was optimised.
    pub objective: Objective,
    /// The outcome.
    pub outcome: PlanOutcome,
}

impl PlanResult {
    /// The feasible layout, if one was found.
    pub fn feasible(&self) -> Option<&Planned> {
        match &self.outcome {
            PlanOutcome::Feasible { plan, .. } => Some(plan),
            _ => None,
        }
    }

    /// What the search covered.
    pub fn coverage(&self) -> &Coverage {
        match &self.outcome {
            PlanOutcome::Feasible { coverage, .. }
            | PlanOutcome::ProvenInfeasible { coverage, .. }
            | PlanOutcome::NotFound { coverage, .. } => coverage,
        }
    }

    /// The outcome's name: `feasible`, `proven_infeasible` or `not_found`.
    pub fn outcome_name(&self) -> &'static str {
        match &self.outcome {
            PlanOutcome::Feasible { .. } => "feasible",
            PlanOutcome::ProvenInfeasible { .. } => "proven_infeasible",
            PlanOutcome::NotFound { .. } => "not_found",
        }
    }
}
