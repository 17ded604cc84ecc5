//! The plan block: the layout search's zone, module catalogue entry and clearance settings.

use super::{loc, Validator};
use crate::scenario::raw::RawPlan;
use crate::scenario::{defaults, Arrangement, ForceSource, PlanSpec};
use crate::units::Kind;

impl Validator {
    pub(super) fn plan(&mut self, p: &RawPlan, arrangement: Arrangement) -> Option<PlanSpec> {
        let near = loc(&p.zone_start.referenced);
        if arrangement != Arrangement::FinsOnVehicle {
            self.push(near, "plan", "the layout search places magnet modules along the track; it needs fins on the vehicle");
            return None;
        }
        let zone_start = self.q(&p.zone_start, Kind::Length, "plan.zone_start");
        let max_length = self.positive(&p.max_length, Kind::Length, "plan.max_length");
        let module_length = self.positive(&p.module.length, Kind::Length, "plan.module.length");
        self.check_name(&p.module.name, "plan.module.name");
        let body = self.section_body(&p.module, "plan.module", near);
        let mut clearances = Vec::new();
        for (i, q) in p.clearances.iter().enumerate() {
            if let Some(c) = self.positive(q, Kind::Length, &format!("plan.clearances[{i}]")) {
                clearances.push(c);
            }
        }
        if p.clearances.is_empty() {
            self.push(
                near,
                "plan.clearances",
                "at least one clearance setting is needed",
            );
        }
        clearances.sort_by(f64::total_cmp);
        clearances.dedup();
        let min_spacing = match &p.min_spacing {
            Some(q) => self.non_negative(q, Kind::Length, "plan.min_spacing"),
            None => Some(defaults::PLAN_MIN_SPACING_M),
        };
        let (Some(ml), Some(ms)) = (module_length, min_spacing) else {
            return None;
        };
        let slot_pitch = match &p.slot_pitch {
            Some(q) => self.q_where(
                q,
                Kind::Length,
                "plan.slot_pitch",
                |x| x >= ml + ms - 1e-12,
                "must be at least the module length plus the minimum spacing",
            ),
            None => Some(ml + ms),
        };
        let (force, beta, grade) = body?;
        let ForceSource::Model(module) = force else {
            self.push(near, "plan.module.force_curve", "the layout search varies clearance, so the module needs a magnet design, not a measured curve");
            return None;
        };
        let (zs, maxl, sp) = (zone_start?, max_length?, slot_pitch?);
        if ml > maxl {
            self.push(near, "plan.max_length", "shorter than one module");
            return None;
        }
        if clearances.is_empty() {
            return None;
        }
        if let (Some(q), Some(&c)) = (&p.module.fin_offset, clearances.first()) {
            if module.fin_offset_m.abs() >= c {
                self.at(
                    &q.referenced,
                    "plan.module.fin_offset",
                    format!(
                        "must be smaller in size than every clearance setting (the smallest is {} mm)",
                        c * 1e3
                    ),
                );
                return None;
            }
        }
        Some(PlanSpec {
            zone_start_m: zs,
            max_length_m: maxl,
            module_name: p.module.name.value.clone(),
            module_length_m: ml,
            module,
            module_remanence_temp_coeff_per_k: beta,
            module_grade: grade,
            clearances_m: clearances,
            min_spacing_m: ms,
            slot_pitch_m: sp,
        })
    }
}
