//! Generated load and failure cases: one section out (N−1), the corners of a factorial, and a
//! backwards entry. Names are stable and say what the case is (`full/hot-fin/cold-magnet`,
//! `nominal/without-B2`, `rollback`); where a case comes from is also kept as data in its
//! [`CaseOrigin`], which the writer and the planner use.

use super::{defaults, Case, CaseOrigin, CornerFactor, CornerLevel, Section};

/// One case per section and base case, with that section out of service (N−1). Sections that
/// are already out in the base case are skipped.
pub fn each_section_out(base: &[Case], sections: &[Section]) -> Vec<Case> {
    let mut out = Vec::new();
    for c in base {
        for (i, s) in sections.iter().enumerate() {
            if c.disabled.contains(&i) {
                continue;
            }
            let mut n = c.clone();
            n.name = format!("{}/without-{}", c.name, s.name);
            n.origin = CaseOrigin::SectionOut {
                base: c.name.clone(),
                section: s.name.clone(),
            };
            n.disabled.push(i);
            n.disabled.sort_unstable();
            out.push(n);
        }
    }
    out
}

/// The full factorial of the given `(low, high)` ranges, applied to the nominal case.
/// Mass: empty/full; fin temperature: cold-fin/hot-fin; magnet temperature:
/// cold-magnet/hot-magnet; start speed: slow/fast. Ranges not given are left at nominal.
pub fn corners(
    nominal: &Case,
    mass_kg: Option<(f64, f64)>,
    fin_temp_c: Option<(f64, f64)>,
    magnet_temp_c: Option<(f64, f64)>,
    start_speed_m_s: Option<(f64, f64)>,
) -> Vec<Case> {
    let dims: Vec<(CornerFactor, (f64, f64))> = CornerFactor::ALL
        .into_iter()
        .zip([mass_kg, fin_temp_c, magnet_temp_c, start_speed_m_s])
        .filter_map(|(f, r)| r.map(|r| (f, r)))
        .collect();
    if dims.is_empty() {
        return vec![];
    }
    let mut out = Vec::new();
    for mask in 0..(1usize << dims.len()) {
        let mut c = nominal.clone();
        let factors: Vec<CornerLevel> = dims
            .iter()
            .enumerate()
            .map(|(d, &(factor, (low, high)))| CornerLevel {
                factor,
                low,
                high,
                at_high: mask >> (dims.len() - 1 - d) & 1 == 1,
            })
            .collect();
        for f in &factors {
            f.factor.apply(&mut c, f.value());
        }
        c.name = factors
            .iter()
            .map(|f| f.factor.tags()[usize::from(f.at_high)])
            .collect::<Vec<_>>()
            .join("/");
        c.origin = CaseOrigin::Corner { factors };
        out.push(c);
    }
    out
}

/// A vehicle entering the zone backwards from its downstream end at `speed_m_s` (magnitude),
/// its front starting at `front_position_m` (given in the scenario).
pub fn rollback(nominal: &Case, speed_m_s: f64, mass_kg: f64, front_position_m: f64) -> Case {
    let mut c = nominal.clone();
    c.name = "rollback".into();
    c.origin = CaseOrigin::Rollback {
        speed_m_s,
        default_position: false,
    };
    c.mass_kg = mass_kg;
    c.start_position_m = front_position_m;
    c.start_speed_m_s = -speed_m_s.abs();
    c
}

/// [`rollback`] from the default start: the rear just downstream of the zone end.
pub fn default_rollback(
    nominal: &Case,
    speed_m_s: f64,
    mass_kg: f64,
    zone_end_m: f64,
    vehicle_length_m: f64,
) -> Case {
    let mut c = rollback(
        nominal,
        speed_m_s,
        mass_kg,
        default_rollback_position(zone_end_m, vehicle_length_m),
    );
    c.origin = CaseOrigin::Rollback {
        speed_m_s,
        default_position: true,
    };
    c
}

/// Front position of a default backwards entry: zone end + vehicle length +
/// [`defaults::ROLLBACK_CLEARANCE_M`].
pub fn default_rollback_position(zone_end_m: f64, vehicle_length_m: f64) -> f64 {
    zone_end_m + vehicle_length_m + defaults::ROLLBACK_CLEARANCE_M
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scenario::{ForceSource, MeasuredForce, Mount, Resistance};

    fn nominal() -> Case {
        Case {
            name: "nominal".into(),
            origin: CaseOrigin::Listed,
            mass_kg: 1000.0,
            start_position_m: 0.0,
            start_speed_m_s: 10.0,
            start_in_zone: false,
            fin_temp_c: 20.0,
            magnet_temp_c: 20.0,
            disabled: vec![],
            resistance: Resistance::default(),
        }
    }

    fn section(name: &str) -> Section {
        Section {
            name: name.into(),
            mount: Mount::Track { start_m: 0.0 },
            length_m: 1.0,
            force: ForceSource::Measured(MeasuredForce {
                points: vec![(0.0, 0.0), (1.0, 1.0)],
                fin_temp_c: 20.0,
                magnet_temp_c: 20.0,
            }),
            remanence_temp_coeff_per_k: 0.0,
            grade: None,
            lane: "main".into(),
        }
    }

    #[test]
    fn n_minus_one_one_case_per_section_with_stable_names() {
        let secs = [section("B1"), section("B2"), section("B3")];
        let out = each_section_out(&[nominal()], &secs);
        assert_eq!(out.len(), 3);
        let names: Vec<_> = out.iter().map(|c| c.name.as_str()).collect();
        assert_eq!(
            names,
            [
                "nominal/without-B1",
                "nominal/without-B2",
                "nominal/without-B3"
            ]
        );
        assert_eq!(out[1].disabled, vec![1]);
        // Stable: the same input gives the same names again.
        assert_eq!(
            each_section_out(&[nominal()], &secs)
                .iter()
                .map(|c| c.name.clone())
                .collect::<Vec<_>>(),
            names
        );
    }

    #[test]
    fn corners_full_factorial_named() {
        let out = corners(
            &nominal(),
            Some((800.0, 1200.0)),
            Some((10.0, 80.0)),
            Some((0.0, 50.0)),
            None,
        );
        assert_eq!(out.len(), 8);
        assert_eq!(out[0].name, "empty/cold-fin/cold-magnet");
        assert_eq!(out[7].name, "full/hot-fin/hot-magnet");
        let hot = out
            .iter()
            .find(|c| c.name == "full/hot-fin/cold-magnet")
            .unwrap();
        assert_eq!(
            (hot.mass_kg, hot.fin_temp_c, hot.magnet_temp_c),
            (1200.0, 80.0, 0.0)
        );
    }

    #[test]
    fn rollback_runs_backwards() {
        let c = rollback(&nominal(), 3.0, 900.0, 50.0);
        assert_eq!(c.start_speed_m_s, -3.0);
        assert!(matches!(c.origin, CaseOrigin::Rollback { .. }));
    }

    #[test]
    fn generated_cases_carry_their_origin() {
        let secs = [section("B1"), section("B2")];
        let out = each_section_out(&[nominal()], &secs);
        assert_eq!(
            out[1].origin,
            CaseOrigin::SectionOut {
                base: "nominal".into(),
                section: "B2".into()
            }
        );
        let out = corners(
            &nominal(),
            Some((800.0, 1200.0)),
            None,
            None,
            Some((5.0, 15.0)),
        );
        let names: Vec<_> = out.iter().map(|c| c.name.as_str()).collect();
        assert_eq!(
            names,
            ["empty/slow", "empty/fast", "full/slow", "full/fast"]
        );
        for c in &out {
            let CaseOrigin::Corner { factors } = &c.origin else {
                panic!("{}: not a corner", c.name)
            };
            let kinds: Vec<_> = factors.iter().map(|f| f.factor).collect();
            assert_eq!(kinds, [CornerFactor::Mass, CornerFactor::Speed]);
            // The factors made the case: its values and its name.
            assert_eq!(c.mass_kg, factors[0].value());
            assert_eq!(c.start_speed_m_s, factors[1].value());
            assert_eq!((factors[0].low, factors[0].high), (800.0, 1200.0));
            let tags: Vec<_> = factors
                .iter()
                .map(|f| f.factor.tags()[usize::from(f.at_high)])
                .collect();
            assert_eq!(tags.join("/"), c.name);
        }
        let r = default_rollback(&nominal(), 2.0, 900.0, 30.0, 4.0);
        assert_eq!(
            r.start_position_m,
            30.0 + 4.0 + defaults::ROLLBACK_CLEARANCE_M
        );
        assert_eq!(
            r.origin,
            CaseOrigin::Rollback {
                speed_m_s: 2.0,
                default_position: true
            }
        );
    }
}
