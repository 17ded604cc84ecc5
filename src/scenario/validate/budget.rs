//! The work budget of a scenario: cases, fin–magnet pairs, heat cells, duty passes and kept
//! samples, refused before any work starts.

use super::{loc, Validator};
use crate::scenario::raw::RawScenario;
use crate::scenario::{defaults, Case, Cycles, Duty, Fin, Mount, Section};

impl Validator {
    /// Refuses, before any work starts, a scenario that asks for more than the stated budgets of
    /// [`crate::scenario::bounds`], naming the field that drives the work and the numbers.
    pub(super) fn work_budget(
        &mut self,
        raw: &RawScenario,
        cases: &[Case],
        fins: &[Fin],
        sections: &[Section],
        duty: Option<&Duty>,
    ) {
        use crate::scenario::bounds::{MAX_CASES, MAX_CASE_PAIRS, MAX_HEAT_CELLS, MAX_PASSES};
        let cases_near = raw
            .cases
            .as_ref()
            .and_then(|c| c.first())
            .and_then(|c| loc(&c.name.referenced));
        if cases.len() > MAX_CASES {
            self.push(
                cases_near,
                "generate",
                format!(
                    "{} cases (listed and generated): above the {MAX_CASES}-case budget; generate \
                     fewer (e.g. N−1 of fewer cases, fewer corner factors)",
                    cases.len()
                ),
            );
            return;
        }
        let pairs = |c: &Case| {
            fins.iter()
                .map(|f| {
                    sections
                        .iter()
                        .enumerate()
                        .filter(|(k, s)| s.lane == f.lane && !c.disabled.contains(k))
                        .count()
                })
                .sum::<usize>()
        };
        let case_pairs: usize = cases.iter().map(pairs).sum();
        if case_pairs > MAX_CASE_PAIRS {
            self.push(
                cases_near,
                "sections",
                format!(
                    "{} fins × {} sections over {} cases is {case_pairs} fin–magnet pairs to \
                     integrate: above the {MAX_CASE_PAIRS}-pair budget; use fewer copies or cases",
                    fins.len(),
                    sections.len(),
                    cases.len()
                ),
            );
        }
        let cells: f64 = fins
            .iter()
            .filter(|f| matches!(f.mount, Mount::Track { .. }))
            .map(|f| (f.length_m / defaults::HEAT_CELL_M).ceil())
            .sum();
        if cells > MAX_HEAT_CELLS as f64 {
            self.push(
                None,
                "track.fins",
                format!(
                    "{cells} heat cells of {} cm along the track fins: above the \
                     {MAX_HEAT_CELLS}-cell budget; shorten the fins",
                    defaults::HEAT_CELL_M * 100.0
                ),
            );
        }
        if let Some(d) = duty {
            let per_case = match d.cycles {
                Cycles::Count(n) => n,
                Cycles::UntilSteady { max_cycles } => max_cycles,
            } as usize;
            let passes = per_case.saturating_mul(cases.len());
            if passes > MAX_PASSES {
                let near = raw.duty.as_ref().and_then(|d| {
                    d.cycles
                        .as_ref()
                        .map(|c| &c.referenced)
                        .or(d.max_cycles.as_ref().map(|m| &m.referenced))
                        .and_then(loc)
                });
                self.push(
                    near,
                    "duty.cycles",
                    format!(
                        "up to {per_case} dispatches × {} cases is {passes} passes: above the \
                         {MAX_PASSES}-pass budget; lower the cycles (or max_cycles)",
                        cases.len()
                    ),
                );
            }
        }
    }
}
