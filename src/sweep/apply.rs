//! A sample's values applied to the scenario: the case varied (mass, start, temperatures, force
//! factor) and the sections' and fins' designs (clearance, remanence, conductivity), giving an
//! ordinary one-case scenario.

use super::sample::{Target, Variable};
use super::SweepError;
use crate::scenario::sweep::{Sweep, SweepInput};
use crate::scenario::{Case, CaseOrigin, ForceSource, Scenario};

/// The case a sweep varies: a case of the scenario by name, or the nominal case.
pub fn base_case<'a>(s: &'a Scenario, sweep: &Sweep) -> Result<&'a Case, SweepError> {
    s.case(&sweep.case)
        .or((s.nominal.name == sweep.case).then_some(&s.nominal))
        .ok_or_else(|| SweepError::NoCase(sweep.case.clone()))
}

/// Sample `index` of the base case: named `sample-<index>`, a listed case, with the case's
/// variables set.
pub fn sample_case(base: &Case, vars: &[Variable], values: &[f64], index: usize) -> Case {
    let mut c = base.clone();
    c.name = format!("sample-{index}");
    c.origin = CaseOrigin::Listed;
    for (v, x) in vars.iter().zip(values) {
        if v.target != Target::Case {
            continue;
        }
        match v.input {
            SweepInput::Mass => c.mass_kg = *x,
            SweepInput::Speed => c.start_speed_m_s = *x,
            SweepInput::Position => c.start_position_m = *x,
            SweepInput::FinTemp => c.fin_temp_c = *x,
            SweepInput::MagnetTemp => c.magnet_temp_c = *x,
            SweepInput::ForceFactor => c.force_factor = *x,
            SweepInput::Clearance
            | SweepInput::FinOffset
            | SweepInput::Remanence
            | SweepInput::FinConductivity => {}
        }
    }
    c
}

/// The scenario of one sample: `base` without its sweep, with `case` as its only case and the
/// design variables set. A fin whose conductivity is sampled gets a material of its own name
/// (`<material>-sampled`, or `<material>-<fin>` for scope `each`), so the written scenario
/// lists it as a custom material.
pub fn sample_scenario(base: &Scenario, vars: &[Variable], values: &[f64], case: Case) -> Scenario {
    let mut s = base.clone();
    s.sweep = None;
    s.cases = vec![case];
    for (v, x) in vars.iter().zip(values) {
        let sections: Vec<usize> = match v.target {
            Target::AllSections => (0..s.sections.len()).collect(),
            Target::Section(k) => vec![k],
            _ => Vec::new(),
        };
        for k in sections {
            if let Some(ForceSource::Model(d)) = s.sections.get_mut(k).map(|sec| &mut sec.force) {
                match v.input {
                    SweepInput::Clearance => d.clearance_m = *x,
                    SweepInput::FinOffset => d.fin_offset_m = *x,
                    SweepInput::Remanence => d.remanence_t = *x,
                    _ => {}
                }
            }
        }
        let fins: Vec<usize> = match v.target {
            Target::AllFins => (0..s.fins.len()).collect(),
            Target::Fin(k) => vec![k],
            _ => Vec::new(),
        };
        for k in fins {
            if let Some(f) = s.fins.get_mut(k) {
                let base_name = base.fins[k].material.name.clone();
                f.material.name = match v.target {
                    Target::Fin(_) => format!("{base_name}-{}", f.name),
                    _ => format!("{base_name}-sampled"),
                };
                f.material.conductivity_s_m = *x;
            }
        }
    }
    s
}
