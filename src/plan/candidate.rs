//! The scenario of a candidate layout: the plan's modules as sections, the cases carried over
//! (see the documentation of [`crate::plan`]).

use super::{modules_of, Layout};
use crate::scenario::{
    cases, Case, CaseOrigin, ForceSource, MagnetDesign, Mount, PlanSpec, Scenario, Section,
};

/// The name of the `i`-th (0-based) planned module: the plan module's name and its number from
/// 1 along the track ("arrester-1", "arrester-2", …), so the planner's tables, the N−1 case names
/// and `plan --write` all use the name the user gave the module.
pub fn module_section_name(p: &PlanSpec, i: usize) -> String {
    format!("{}-{}", p.module_name, i + 1)
}

/// The scenario of a candidate layout (see the module documentation).
pub fn candidate_scenario(base: &Scenario, p: &PlanSpec, layout: &Layout) -> Scenario {
    let mods = modules_of(p, layout);
    let sections: Vec<Section> = mods
        .iter()
        .enumerate()
        .map(|(i, m)| Section {
            name: module_section_name(p, i),
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
