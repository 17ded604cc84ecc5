//! Validation: where duplicate names are reported, the rules of the three point lists (one
//! parser), and that a minimal scenario gets the documented defaults.

use super::*;

/// A scenario with one fin and sections given by `sections` (YAML list items, indented by 2).
fn with_sections(sections: &str) -> String {
    format!(
        "name: t
start: {{ position: 5 m, speed: 10 m/s }}
vehicle:
  mass: 2000 kg
  length: 4 m
  fins:
    - {{ name: fin, offset: 1 m, length: 2 m, height: 200 mm, thickness: 8 mm, material: copper-c11000 }}
sections:
{sections}"
    )
}

const MAGNETS: &str = "pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9, \
                       remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm";

fn issues(text: &str) -> Vec<Issue> {
    match parse_str(text, "t.yaml", None) {
        Err(ScenarioError::Invalid { issues, .. }) => issues,
        Err(e) => panic!("not a validation error: {e}"),
        Ok(_) => panic!("accepted:\n{text}"),
    }
}

/// 1-based line and column (in characters) of the first occurrence of `needle` in `text`.
fn line_col(text: &str, needle: &str) -> (u64, u64) {
    let at = text.find(needle).expect("needle in text");
    let line = text[..at].matches('\n').count() as u64 + 1;
    let start = text[..at].rfind('\n').map_or(0, |i| i + 1);
    (line, text[start..at].chars().count() as u64 + 1)
}

#[test]
fn duplicate_of_a_repeat_copy_is_reported_at_the_entry_that_repeats_it() {
    // `B` repeated makes B-1, B-2, B-3; the explicit `B-3` after it is the duplicate.
    let text = with_sections(&format!(
        "  - {{ name: B, start: 10 m, length: 1 m, repeat: {{ count: 3, pitch: 2 m }}, {MAGNETS} }}
  - {{ name: B-3, start: 30 m, length: 1 m, {MAGNETS} }}
"
    ));
    let i = issues(&text);
    assert_eq!(i.len(), 1, "{i:?}");
    assert_eq!(i[0].path, "sections[1].name");
    assert_eq!(i[0].message, "duplicate name 'B-3'");
    // The value of the second entry's `name:` key, where `B-3` is written.
    assert_eq!(i[0].location, Some(line_col(&text, "B-3, start")));
}

#[test]
fn duplicate_made_by_a_later_repeat_is_reported_at_that_repeat() {
    let text = with_sections(&format!(
        "  - {{ name: B-2, start: 30 m, length: 1 m, {MAGNETS} }}
  - {{ name: B, start: 10 m, length: 1 m, repeat: {{ count: 3, pitch: 2 m }}, {MAGNETS} }}
"
    ));
    let i = issues(&text);
    assert_eq!(i[0].path, "sections[1].name");
    assert_eq!(i[0].message, "duplicate name 'B-2'");
    assert_eq!(i[0].location, Some(line_col(&text, "B, start")));
}

#[test]
fn names_sharing_a_prefix_are_told_apart() {
    // `BC` twice after `B`: the duplicate is the third entry, not the first whose name is a
    // prefix of `BC`.
    let text = with_sections(&format!(
        "  - {{ name: B, start: 10 m, length: 1 m, {MAGNETS} }}
  - {{ name: BC, start: 20 m, length: 1 m, {MAGNETS} }}
  - {{ name: BC, start: 30 m, length: 1 m, {MAGNETS} }}
"
    ));
    let i = issues(&text);
    assert_eq!(i[0].path, "sections[2].name");
    assert_eq!(i[0].location, Some(line_col(&text, "BC, start: 30 m")));
}

#[test]
fn duplicate_fin_names_are_reported_at_the_second_fin() {
    let text = with_sections(&format!(
        "  - {{ name: S, start: 10 m, length: 1 m, {MAGNETS} }}
"
    ))
    .replace(
        "material: copper-c11000 }",
        "material: copper-c11000 }\n    - { name: fin, offset: 3 m, length: 0.5 m, height: 200 mm, thickness: 8 mm, material: copper-c11000 }",
    );
    let i = issues(&text);
    assert_eq!(i[0].path, "vehicle.fins[1].name");
    assert_eq!(i[0].location, Some(line_col(&text, "fin, offset: 3 m")));
}

fn one_section() -> String {
    with_sections(&format!(
        "  - {{ name: S, start: 10 m, length: 1 m, {MAGNETS} }}
"
    ))
}

#[test]
fn profile_rules() {
    let base = one_section();
    let t = format!("{base}track: {{ profile: [[0 m, 0 m], [12 m, 1 m], [11 m, 1 m]] }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "track.profile[2][0]");
    assert_eq!(i[0].message, "positions must increase strictly");
    assert_eq!(i[0].location, Some(line_col(&t, "11 m")));

    let t = format!("{base}track: {{ profile: [[0 m, 0 m], [1 m, 2 m]] }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "track.profile[1][1]");
    assert_eq!(
        i[0].message,
        "|dz/ds| = 2.000 > 1: elevation cannot change faster than the distance along the track"
    );
    assert_eq!(i[0].location, Some(line_col(&t, "2 m]")));

    let t = format!("{base}track: {{ profile: [[0 m, 0 m]] }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "track.profile");
    assert_eq!(i[0].message, "at least two points are needed");
    // Found across the list: located where the list is written.
    assert_eq!(i[0].location, Some(line_col(&t, "[[0 m, 0 m]]")));

    let t = format!("{base}track: {{ profile: [[0 m, 0 m], [5 m]] }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "track.profile[1]");
    assert_eq!(i[0].message, "each point is [position, elevation]");
    assert_eq!(i[0].location, Some(line_col(&t, "5 m]")));
}

#[test]
fn envelope_rules() {
    let base = one_section();
    let t = format!(
        "{base}limits: {{ envelope: {{ x: {{ negative: [[1 s, 2 g], [0.5 s, 1 g]] }} }} }}\n"
    );
    let i = issues(&t);
    assert_eq!(i[0].path, "limits.envelope.x.negative[1][0]");
    assert_eq!(
        i[0].message,
        "durations must not decrease (the envelope must be sorted)"
    );
    assert_eq!(i[0].location, Some(line_col(&t, "0.5 s")));

    let t = format!("{base}limits: {{ envelope: {{ z: {{ positive: [[1 s, -2 g]] }} }} }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "limits.envelope.z.positive[0][1]");
    assert!(
        i[0].message
            .starts_with("allowed level must not be negative (got -19.6133"),
        "{}",
        i[0].message
    );

    let t = format!("{base}limits: {{ envelope: {{ x: {{ negative: [] }} }} }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "limits.envelope.x.negative");
    assert_eq!(i[0].message, "at least one point is needed");
    assert_eq!(i[0].location, Some(line_col(&t, "[] }")));

    // Equal durations make a step and are accepted; levels are kept in g.
    let t = format!("{base}limits: {{ envelope: {{ x: {{ negative: [[0 s, 2 g], [1 s, 2 g], [1 s, 1 g]] }} }} }}\n");
    let s = parse_str(&t, "t.yaml", None).expect("a step is valid");
    assert_eq!(
        s.limits.envelope[0].negative,
        Some(vec![(0.0, 2.0), (1.0, 2.0), (1.0, 1.0)])
    );
}

#[test]
fn measured_curve_rules() {
    let curve = |points: &str| {
        with_sections(&format!(
            "  - {{ name: S, start: 10 m, length: 1 m, force_curve: {{ fin_temp: 20 °C, points: {points} }} }}\n"
        ))
    };
    let t = curve("[[0 m/s, 0 N/m], [5 m/s, 10 N/m], [5 m/s, 20 N/m]]");
    let i = issues(&t);
    assert_eq!(i[0].path, "sections[0].force_curve.points[2][0]");
    assert_eq!(i[0].message, "speeds must increase strictly");
    assert_eq!(i[0].location, Some(line_col(&t, "5 m/s, 20")));

    // Too few points are reported at the curve's fin temperature.
    let t = curve("[[0 m/s, 0 N/m]]");
    let i = issues(&t);
    assert_eq!(i[0].path, "sections[0].force_curve.points");
    assert_eq!(i[0].message, "at least two points are needed");
    assert_eq!(i[0].location, Some(line_col(&t, "20 °C")));

    let t = curve("[[0 m/s, 0 N/m], [5 m/s, -1 N/m]]");
    let i = issues(&t);
    assert_eq!(i[0].path, "sections[0].force_curve.points[1][1]");
    assert!(i[0].message.starts_with("force must not be negative"));

    let t = curve("[[0 m/s, 0 N/m], [5 m/s, 10 N/m]]");
    let s = parse_str(&t, "t.yaml", None).expect("valid curve");
    let ForceSource::Measured(m) = &s.sections[0].force else {
        panic!("measured")
    };
    assert_eq!(m.points, vec![(0.0, 0.0), (5.0, 10.0)]);
    assert_eq!(m.magnet_temp_c, defaults::TEMPERATURE_C);
}

#[test]
fn a_minimal_scenario_gets_the_documented_defaults() {
    let s = parse_str(&one_section(), "t.yaml", None).expect("valid");
    assert_eq!(s.stall_speed_m_s, defaults::STALL_SPEED_M_S);
    assert_eq!(s.time_limit_s, defaults::TIME_LIMIT_S);
    assert_eq!(s.solver, Solver::default());
    assert_eq!(s.solver.rtol, defaults::SOLVER_RTOL);
    assert_eq!(s.track.air_density_kg_m3, defaults::AIR_DENSITY_KG_M3);
    assert_eq!(
        s.track.gravity,
        Gravity::Grade {
            slope: defaults::SLOPE
        }
    );
    assert_eq!(s.rider.track_axis, Axis::X);
    let f = s.rider.filter.expect("filtered by default");
    assert_eq!(
        (f.order, f.corner_hz, f.sample_rate_hz),
        (
            defaults::FILTER_ORDER,
            defaults::FILTER_CORNER_HZ,
            defaults::FILTER_SAMPLE_RATE_HZ
        )
    );
    // The filter module's defaults are the scenario's.
    assert_eq!(crate::checks::filter::DEFAULT_ORDER, defaults::FILTER_ORDER);
    assert_eq!(
        crate::checks::filter::DEFAULT_CORNER_HZ,
        defaults::FILTER_CORNER_HZ
    );
    let sec = &s.sections[0];
    assert_eq!(sec.lane, defaults::LANE);
    assert_eq!(s.fins[0].lane, defaults::LANE);
    assert_eq!(
        sec.remanence_temp_coeff_per_k,
        defaults::REMANENCE_TEMP_COEFF_PER_K
    );
    assert_eq!(s.nominal.fin_temp_c, defaults::TEMPERATURE_C);
    assert_eq!(s.nominal.magnet_temp_c, defaults::TEMPERATURE_C);
    assert_eq!(s.nominal.resistance, Resistance::default());
    assert_eq!(s.cases, vec![s.nominal.clone()]);
    // A steep track is ridden along the spine.
    let steep = format!("{}track: {{ angle: -80 deg }}\n", one_section());
    let s = parse_str(&steep, "t.yaml", None).expect("valid");
    assert_eq!(s.rider.track_axis, Axis::Z);
}

#[test]
fn a_default_backwards_entry_starts_just_past_the_zone_and_says_so() {
    let t = format!(
        "{}generate: {{ rollback: {{ speed: 2 m/s }} }}\n",
        one_section()
    );
    let s = parse_str(&t, "t.yaml", None).expect("valid");
    let r = s.case("rollback").expect("generated");
    assert_eq!(
        r.origin,
        CaseOrigin::Rollback {
            speed_m_s: 2.0,
            default_position: true
        }
    );
    // Zone end 11 m (the section's end) + vehicle length 4 m + the clearance.
    assert_eq!(
        r.start_position_m,
        11.0 + 4.0 + defaults::ROLLBACK_CLEARANCE_M
    );
    let t = format!(
        "{}generate: {{ rollback: {{ speed: 2 m/s, position: 20 m }} }}\n",
        one_section()
    );
    let s = parse_str(&t, "t.yaml", None).expect("valid");
    let r = s.case("rollback").expect("generated");
    assert_eq!(
        r.origin,
        CaseOrigin::Rollback {
            speed_m_s: 2.0,
            default_position: false
        }
    );
    assert_eq!(r.start_position_m, 20.0);
}

#[test]
fn grades_keep_their_written_name() {
    use crate::scenario::{GradeClass, MagnetGrade};
    // Sintered NdFeB grade names: N + energy product in MGOe + class letters (common practice).
    for (text, name, class, limit_c) in [
        ("N40H", "N40H", GradeClass::H, 120.0),
        ("n42sh", "N42SH", GradeClass::SH, 150.0),
        ("N35", "N35", GradeClass::N, 80.0),
        ("SH", "SH", GradeClass::SH, 150.0),
        ("N", "N", GradeClass::N, 80.0),
        ("38UH", "N38UH", GradeClass::UH, 180.0),
    ] {
        let g = MagnetGrade::parse(text).unwrap_or_else(|| panic!("{text}"));
        assert_eq!(g.class, class, "{text}");
        assert_eq!(g.name(), name, "{text}");
        assert_eq!(g.max_temperature_c(), limit_c, "{text}");
        assert_eq!(MagnetGrade::parse(&g.name()), Some(g), "{text} reads back");
    }
    for bad in ["", "N40X", "H40", "N99999999H"] {
        assert_eq!(MagnetGrade::parse(bad), None, "{bad}");
    }
}

/// `duty.lift` and `duty.magnets`: one of `speed` and `profile`, positive speeds, increasing
/// positions, emissivities in (0, 1], each error at its line:column and path; a valid block
/// gives the documented defaults for what it leaves out.
#[test]
fn duty_lift_and_magnet_rules() {
    let base = format!(
        "{}duty: {{ interval: 60 s, film_coefficient: 20 W/(m^2*K), ",
        one_section()
    );
    let t = format!("{base}lift: {{ speed: -1 m/s }} }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "duty.lift.speed");
    assert_eq!(i[0].location, Some(line_col(&t, "-1 m/s")));

    let t = format!("{base}lift: {{ speed: 1 m/s, profile: [[0 m, 1 m/s]] }} }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "duty.lift");
    assert!(i[0].message.contains("not both"), "{}", i[0].message);

    let t = format!("{base}lift: {{ profile: [[3 m, 1 m/s], [2 m, 2 m/s]] }} }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "duty.lift.profile[1][0]");
    assert_eq!(i[0].location, Some(line_col(&t, "2 m, 2 m/s")));

    let t = format!("{base}lift: {{ profile: [[3 m, 0 m/s]] }} }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "duty.lift.profile[0][1]");

    let t = format!("{base}lift: {{}} }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "duty.lift");
    assert!(i[0].message.contains("speed"), "{}", i[0].message);

    let t = format!("{base}magnets: {{ fin_emissivity: 1.5 }} }}\n");
    let i = issues(&t);
    assert_eq!(i[0].path, "duty.magnets.fin_emissivity");
    assert_eq!(i[0].location, Some(line_col(&t, "1.5")));

    let t = format!(
        "{base}lift: {{ profile: [[0 m, 0.5 m/s], [20 m, 2 m/s]] }}, \
         magnets: {{ magnet_emissivity: 0.6, add_to_magnet_temperature: false }} }}\n"
    );
    let s = parse_str(&t, "t.yaml", None).unwrap();
    let d = s.duty.unwrap();
    assert_eq!(
        d.lift,
        Some(crate::scenario::LiftSpeed::Profile(vec![
            (0.0, 0.5),
            (20.0, 2.0)
        ]))
    );
    assert_eq!(d.magnets.magnet_emissivity, 0.6);
    assert!(!d.magnets.add_to_magnet_temperature);
    assert_eq!(
        d.magnets.fin_emissivity,
        defaults::MAGNET_EXPOSURE.fin_emissivity
    );
    assert_eq!(d.magnets.gap_film_w_m2_k, 25.0);
}

#[test]
fn fin_offset_defaults_to_centred_and_stays_inside_the_clearance() {
    // Default 0 (defaults::FIN_OFFSET_M); a value of either sign below the clearance is kept.
    let s = parse_str(
        &with_sections(&format!(
            "  - {{ name: A, start: 10 m, length: 1 m, {MAGNETS} }}\n  - {{ name: B, start: 12 m, length: 1 m, {MAGNETS}, fin_offset: -4.5 mm }}\n"
        )),
        "t.yaml",
        None,
    )
    .unwrap();
    let e: Vec<f64> = s
        .sections
        .iter()
        .map(|k| k.design().unwrap().fin_offset_m)
        .collect();
    assert_eq!(e[0], 0.0);
    assert!((e[1] + 0.0045).abs() < 1e-15);
    // At the clearance (5 mm): refused at the value, naming the field.
    let text = with_sections(&format!(
        "  - {{ name: A, start: 10 m, length: 1 m, {MAGNETS}, fin_offset: 5 mm }}\n"
    ));
    let i = issues(&text);
    assert_eq!(i.len(), 1);
    assert_eq!(i[0].path, "sections[0].fin_offset");
    assert_eq!(i[0].location, Some(line_col(&text, "5 mm }")));
    // A plan module's offset must stay below every clearance setting (the smallest, 4 mm).
    let text = format!(
        "{}plan:\n  zone_start: 10 m\n  max_length: 20 m\n  module: {{ name: m, length: 1 m, {MAGNETS}, fin_offset: 4 mm }}\n  clearances: [4 mm, 8 mm]\n",
        with_sections(&format!("  - {{ name: A, start: 10 m, length: 1 m, {MAGNETS} }}\n"))
    );
    let i = issues(&text);
    assert_eq!(i.len(), 1, "{i:?}");
    assert_eq!(i[0].path, "plan.module.fin_offset");
    assert_eq!(i[0].location, Some(line_col(&text, "4 mm }")));
}
