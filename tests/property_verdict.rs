//! Property: a check never passes by omission. For random limit sets and random cases (fast,
//! slow enough to stall, backwards, hot or cold fins, with and without a duty block), every
//! limit given yields a row in the verdict of every case (common practice for acceptance
//! checks: each stated criterion is evaluated or reported as not evaluated).

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::scenario::parse_str;
use eddyzone::study::{JudgeOptions, Silent, Study};
use proptest::prelude::*;

const HEAD: &str = r#"name: rows
vehicle:
  mass: 2000 kg
  length: 4 m
  fins:
    - { name: fin, offset: 1 m, length: 2 m, height: 200 mm, thickness: 8 mm, material: aluminium-6061-t6 }
sections:
  - { name: S, start: 10 m, length: 1.5 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm, repeat: { count: 3, pitch: 2 m } }
track: { profile: [[0 m, 0 m], [12 m, -0.5 m], [40 m, -0.5 m]] }
resistance: { rolling: 0.01, drag_area: 1 m^2, friction: 100 N }
start: { position: 5 m, speed: 12 m/s }
time_limit: 60 s
"#;

/// One optional limit: its YAML under `limits:` and the row keys it must produce.
#[derive(Debug, Clone)]
struct LimitPick {
    yaml: String,
    keys: Vec<String>,
}

fn limit_picks() -> impl Strategy<Value = Vec<LimitPick>> {
    let peak = (
        prop::sample::select(vec!["x", "z"]),
        prop::option::of(0.5f64..6.0),
        prop::option::of(-6.0f64..-0.1),
    )
        .prop_map(|(axis, max, min)| {
            let mut parts = vec![];
            let mut keys = vec![];
            if let Some(m) = max {
                parts.push(format!("max: {m:.3} g"));
                keys.push(format!("peak_max.{axis}"));
            }
            if let Some(m) = min {
                parts.push(format!("min: {m:.3} g"));
                keys.push(format!("peak_min.{axis}"));
            }
            if parts.is_empty() {
                return LimitPick {
                    yaml: String::new(),
                    keys,
                };
            }
            LimitPick {
                yaml: format!("  peak: {{ {axis}: {{ {} }} }}\n", parts.join(", ")),
                keys,
            }
        });
    let envelope = (
        prop::sample::select(vec!["positive", "negative"]),
        0.5f64..4.0,
    )
        .prop_map(|(side, g)| LimitPick {
            yaml: format!(
                "  envelope: {{ x: {{ {side}: [[0 s, {g:.3} g], [1 s, {:.3} g]] }} }}\n",
                g * 0.7
            ),
            keys: vec![format!("envelope_{side}.x")],
        });
    let scalar = prop::sample::subsequence(
        vec![
            ("  onset: 15 g/s\n", "onset"),
            ("  exit_speed: { min: 2 m/s }\n", "exit_speed_min"),
            ("  exit_speed: { max: 6 m/s }\n", "exit_speed_max"),
            ("  max_duration: 3 s\n", "duration"),
            ("  max_fin_temperature: 80 °C\n", "fin_temperature"),
            ("  max_magnet_temperature: 60 °C\n", "magnet_temperature"),
        ],
        0..=4,
    )
    .prop_map(|v| {
        // exit_speed min and max share one key in YAML: merge them.
        let mut yaml = String::new();
        let mut keys = vec![];
        let mut exit = vec![];
        for (y, k) in v {
            if k.starts_with("exit_speed") {
                exit.push(if k.ends_with("min") {
                    "min: 2 m/s"
                } else {
                    "max: 6 m/s"
                });
            } else {
                yaml.push_str(y);
            }
            keys.push(k.to_string());
        }
        if !exit.is_empty() {
            yaml.push_str(&format!("  exit_speed: {{ {} }}\n", exit.join(", ")));
        }
        LimitPick { yaml, keys }
    });
    (peak, prop::option::of(envelope), scalar).prop_map(|(p, e, s)| {
        let mut v = vec![p, s];
        v.extend(e);
        v
    })
}

fn case_picks() -> impl Strategy<Value = Vec<(f64, f64, f64, bool)>> {
    // (start speed m/s, mass kg, fin temperature °C, start past the zone): fast, slow (stalls),
    // backwards, and starting past the zone (never meets a magnet).
    prop::collection::vec(
        (
            -14.0f64..20.0,
            800.0f64..3000.0,
            0.0f64..90.0,
            prop::bool::weighted(0.2),
        ),
        1..3,
    )
    .prop_map(|mut v| {
        // Every draw also has a case that never meets a magnet and one that enters backwards.
        v.push((2.0, 1500.0, 20.0, true));
        v.push((-9.0, 1500.0, 20.0, false));
        v
    })
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]
    #[test]
    fn every_limit_given_yields_a_row_in_every_case(
        limits in limit_picks(),
        cases in case_picks(),
        duty in any::<bool>(),
        allow in any::<(bool, bool)>(),
    ) {
        let mut text = HEAD.to_string();
        text.push_str("limits:\n");
        for l in &limits {
            text.push_str(&l.yaml);
        }
        text.push_str(&format!("  allow_stall: {}\n  allow_rollback: {}\n", allow.0, allow.1));
        text.push_str("cases:\n");
        for (i, (v, m, t, past)) in cases.iter().enumerate() {
            // A backwards case starts downstream of the zone.
            let pos = if *past { 36.0 } else if *v < 0.0 { 25.0 } else { 5.0 };
            let v = if *past { v.abs() } else { *v };
            text.push_str(&format!(
                "  - {{ name: c{i}, mass: {m:.1} kg, fin_temp: {t:.1} °C, start: {{ position: {pos} m, speed: {v:.3} m/s }} }}\n"
            ));
        }
        if duty {
            text.push_str("duty: { interval: 120 s, cycles: 3, ambient: 20 °C, film_coefficient: 20 W/(m^2*K) }\n");
        }
        let s = parse_str(&text, "<prop>", None).map_err(|e| TestCaseError::fail(format!("{e}\n{text}")))?;
        let study = Study::new(s).map_err(|e| TestCaseError::fail(e.to_string()))?;
        let j = study.judge(&JudgeOptions::default(), &Silent);
        // A computation that cannot complete is an error, not a verdict; nothing to check then.
        let Ok(j) = j else { return Ok(()) };
        let expected: Vec<&String> = limits.iter().flat_map(|l| &l.keys).collect();
        for cv in &j.verdict.cases {
            let keys: Vec<String> = cv.checks.iter().map(|r| r.key()).collect();
            for k in &expected {
                prop_assert!(keys.contains(k), "case {}: no row for {k} (rows {keys:?})\n{text}", cv.case);
            }
            for r in &cv.checks {
                // A row without a value passes only with its reason, as an allowed outcome.
                if r.value.is_none() && r.limit.is_some() {
                    prop_assert!(r.not_evaluated.is_some() || !r.pass, "{r:?}");
                }
                prop_assert_eq!(r.state.is_some(), duty, "{:?}", r);
            }
        }
    }
}
