//! Generated load and failure cases: one section out (N−1), the corners of a factorial, and a
//! backwards entry. Names are stable and say what the case is (`full/hot-fin/cold-magnet`,
//! `nominal/without-B2`, `rollback`).

use super::{Case, CaseOrigin, Section};

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
            n.origin = CaseOrigin::SectionOut;
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
    type Apply = fn(&mut Case, f64);
    let dims: Vec<((f64, f64), [&str; 2], Apply)> = [
        mass_kg.map(|r| {
            (
                r,
                ["empty", "full"],
                (|c: &mut Case, x| c.mass_kg = x) as Apply,
            )
        }),
        fin_temp_c.map(|r| {
            (
                r,
                ["cold-fin", "hot-fin"],
                (|c: &mut Case, x| c.fin_temp_c = x) as Apply,
            )
        }),
        magnet_temp_c.map(|r| {
            (
                r,
                ["cold-magnet", "hot-magnet"],
                (|c: &mut Case, x| c.magnet_temp_c = x) as Apply,
            )
        }),
        start_speed_m_s.map(|r| {
            (
                r,
                ["slow", "fast"],
                (|c: &mut Case, x| c.start_speed_m_s = x) as Apply,
            )
        }),
    ]
    .into_iter()
    .flatten()
    .collect();
    if dims.is_empty() {
        return vec![];
    }
    let mut out = Vec::new();
    for mask in 0..(1usize << dims.len()) {
        let mut c = nominal.clone();
        c.origin = CaseOrigin::Corner;
        let mut parts = Vec::new();
        for (d, ((lo, hi), names, apply)) in dims.iter().enumerate() {
            let high = mask >> (dims.len() - 1 - d) & 1 == 1;
            apply(&mut c, if high { *hi } else { *lo });
            parts.push(names[usize::from(high)]);
        }
        c.name = parts.join("/");
        out.push(c);
    }
    out
}

/// A vehicle entering the zone backwards from its downstream end at `speed_m_s` (magnitude).
pub fn rollback(nominal: &Case, speed_m_s: f64, mass_kg: f64, front_position_m: f64) -> Case {
    let mut c = nominal.clone();
    c.name = "rollback".into();
    c.origin = CaseOrigin::Rollback;
    c.mass_kg = mass_kg;
    c.start_position_m = front_position_m;
    c.start_speed_m_s = -speed_m_s.abs();
    c
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
        assert_eq!(c.origin, CaseOrigin::Rollback);
    }
}
