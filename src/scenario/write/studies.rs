//! Writing the study blocks back out: `duty` (with its lift and magnets), `plan` and `sweep`.

use super::*;

impl Writer<'_> {
    pub(super) fn duty(&self, d: &Duty) -> RawDuty {
        let (cycles, max_cycles) = match d.cycles {
            Cycles::Count(n) => (CyclesText::Count(u64::from(n)), None),
            Cycles::UntilSteady { max_cycles } => (
                CyclesText::Text("until_steady".into()),
                Some(spanned(max_cycles)),
            ),
        };
        RawDuty {
            interval: self.q("duty.interval", Kind::Time, d.interval_s),
            cycles: Some(spanned(cycles)),
            ambient: Some(self.q("duty.ambient", Kind::Temperature, d.ambient_c)),
            film_coefficient: self.q(
                "duty.film_coefficient",
                Kind::HeatTransfer,
                d.film_coefficient_w_m2_k,
            ),
            max_cycles,
            lift: d.lift.as_ref().map(|l| match l {
                LiftSpeed::Constant(v) => RawLift {
                    speed: Some(self.q("duty.lift.speed", Kind::Speed, *v)),
                    profile: None,
                },
                LiftSpeed::Profile(p) => RawLift {
                    speed: None,
                    profile: Some(
                        p.iter()
                            .enumerate()
                            .map(|(i, &pt)| {
                                self.pair(
                                    &format!("duty.lift.profile[{i}]"),
                                    [Kind::Length, Kind::Speed],
                                    pt,
                                )
                            })
                            .collect(),
                    ),
                },
            }),
            magnets: (d.magnets != defaults::MAGNET_EXPOSURE).then(|| {
                let m = &d.magnets;
                RawDutyMagnets {
                    gap_film_coefficient: Some(self.q(
                        "duty.magnets.gap_film_coefficient",
                        Kind::HeatTransfer,
                        m.gap_film_w_m2_k,
                    )),
                    air_film_coefficient: Some(self.q(
                        "duty.magnets.air_film_coefficient",
                        Kind::HeatTransfer,
                        m.air_film_w_m2_k,
                    )),
                    fin_emissivity: Some(self.q(
                        "duty.magnets.fin_emissivity",
                        Kind::Ratio,
                        m.fin_emissivity,
                    )),
                    magnet_emissivity: Some(self.q(
                        "duty.magnets.magnet_emissivity",
                        Kind::Ratio,
                        m.magnet_emissivity,
                    )),
                    add_to_magnet_temperature: Some(m.add_to_magnet_temperature),
                }
            }),
        }
    }

    pub(super) fn plan(&self, p: &PlanSpec) -> RawPlan {
        RawPlan {
            zone_start: self.q("plan.zone_start", Kind::Length, p.zone_start_m),
            max_length: self.q("plan.max_length", Kind::Length, p.max_length_m),
            module: self.section_body(
                &p.module_name,
                p.module_length_m,
                &ForceSource::Model(p.module.clone()),
                p.module_remanence_temp_coeff_per_k,
                p.module_grade,
                "plan.module",
            ),
            clearances: p
                .clearances_m
                .iter()
                .enumerate()
                .map(|(i, &c)| self.q(&format!("plan.clearances[{i}]"), Kind::Length, c))
                .collect(),
            min_spacing: Some(self.q("plan.min_spacing", Kind::Length, p.min_spacing_m)),
            slot_pitch: Some(self.q("plan.slot_pitch", Kind::Length, p.slot_pitch_m)),
        }
    }
}

impl Writer<'_> {
    /// The `sweep:` block, every value explicit.
    pub(super) fn sweep(&self, w: &sweep::Sweep) -> RawSweep {
        use sweep::{Distribution as D, SamplingMethod, Scope, SweepInput as I};
        let mut inputs = RawSweepInputs::default();
        for u in &w.inputs {
            let p = format!("sweep.inputs.{}", u.input.key());
            let k = u.input.kind();
            let q = |key: &str, x: f64| self.q(&format!("{p}.{key}"), k, x);
            let o = |key: &str, x: Option<f64>| x.map(|x| q(key, x));
            let (mean, std, min, mode, max, values) = match &u.distribution {
                D::Normal {
                    mean,
                    std,
                    min,
                    max,
                } => (
                    Some(q("mean", *mean)),
                    Some(q("std", *std)),
                    o("min", *min),
                    None,
                    o("max", *max),
                    None,
                ),
                D::Uniform { min, max } => (
                    None,
                    None,
                    Some(q("min", *min)),
                    None,
                    Some(q("max", *max)),
                    None,
                ),
                D::Triangular { min, mode, max } => (
                    None,
                    None,
                    Some(q("min", *min)),
                    Some(q("mode", *mode)),
                    Some(q("max", *max)),
                    None,
                ),
                D::Discrete { values } => {
                    let v = values
                        .iter()
                        .enumerate()
                        .map(|(i, x)| q(&format!("values[{i}]"), *x))
                        .collect();
                    (None, None, None, None, None, Some(v))
                }
            };
            let raw = RawUncertain {
                distribution: spanned(u.distribution.key().to_string()),
                mean,
                std,
                min,
                mode,
                max,
                values,
                scope: u.input.per_element().then(|| {
                    spanned(match u.scope {
                        Scope::All => "all".to_string(),
                        Scope::Each => "each".to_string(),
                    })
                }),
            };
            let slot = match u.input {
                I::Mass => &mut inputs.mass,
                I::Speed => &mut inputs.speed,
                I::Position => &mut inputs.position,
                I::Clearance => &mut inputs.clearance,
                I::FinOffset => &mut inputs.fin_offset,
                I::Remanence => &mut inputs.remanence,
                I::FinConductivity => &mut inputs.fin_conductivity,
                I::FinTemp => &mut inputs.fin_temp,
                I::MagnetTemp => &mut inputs.magnet_temp,
                I::ForceFactor => &mut inputs.force_factor,
            };
            *slot = Some(raw);
        }
        RawSweep {
            case: Some(spanned(w.case.clone())),
            method: Some(spanned(w.method.key().to_string())),
            samples: (w.method != SamplingMethod::Factorial).then(|| spanned(w.samples as u64)),
            seed: Some(spanned(w.seed)),
            inputs,
        }
    }
}
