//! Coincident events are all honoured: a track profile point placed exactly where another event
//! happens (the clearing position, a fin edge meeting a section edge, the rear on the zone end,
//! the reversal) gives the same run as the same profile shifted by 1e-6 m.
//!
//! The reference is the run itself with the coincidence removed: a profile moved by 1 µm changes
//! the geometry by less than 1e-6 of a metre, so exit speed, outcome and time in the zone agree to
//! well under 1e-4 (continuity of the solution in the data: Hairer, Nørsett & Wanner, Solving
//! ODEs I, 1993, §I.10). A lost clearing event instead runs on to the time limit.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::dynamics::{RunOptions, RunResult, Sampling};
use eddyzone::scenario::parse_str;
use eddyzone::study::Study;
use proptest::prelude::*;

/// Vehicle 4 m, fin 1 m behind the front and 2 m long; sections [8, 11] and [12, 15] m, so the
/// zone ends at 15 m and the rear clears it with the front at 19 m.
fn scenario(points: &[(f64, f64)], speed_m_s: f64, clearance_mm: f64) -> String {
    let profile: String = points
        .iter()
        .map(|(s, z)| format!("    - [{s:.12} m, {z:.12} m]\n"))
        .collect();
    format!(
        "version: 1
name: coincident
vehicle:
  mass: 2000 kg
  length: 4 m
  fins:
    - {{ name: fin, offset: 1 m, length: 2 m, height: 200 mm, thickness: 8 mm, material: aluminium-6061-t6 }}
sections:
  - {{ name: S, start: 8 m, length: 3 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: {clearance_mm} mm, pole_height: 180 mm, repeat: {{ count: 2, pitch: 4 m }} }}
track:
  profile:
{profile}start: {{ position: 5 m, speed: {speed_m_s} m/s }}
time_limit: 60 s
rider: {{ track_axis: x }}
"
    )
}

/// Points every `step` m on an arc of radius `r` (negative: a crest) around `centre`, one of
/// them exactly at `at`.
fn arc(at: f64, step: f64, r: f64, centre: f64) -> Vec<(f64, f64)> {
    (-120..=120)
        .map(|k| {
            let s = at + k as f64 * step;
            let z = if r < 0.0 {
                -r * ((s - centre) / -r).cos() + r
            } else {
                r - r * ((s - centre) / r).cos()
            };
            (s, z)
        })
        .collect()
}

fn run(text: &str) -> RunResult {
    let s = parse_str(text, "<coincident>", None).unwrap_or_else(|e| panic!("{e}"));
    let study = Study::new(s).unwrap();
    let options = RunOptions {
        sampling: Sampling::Full,
        ..RunOptions::default()
    };
    study.run(&options).unwrap().remove(0)
}

fn same(a: &RunResult, b: &RunResult, what: &str) {
    assert_eq!(a.outcome, b.outcome, "{what}");
    let close = |x: Option<f64>, y: Option<f64>, name: &str| match (x, y) {
        (Some(x), Some(y)) => assert!((x - y).abs() < 1e-4, "{what}: {name} {x} vs {y}"),
        (None, None) => {}
        _ => panic!("{what}: {name} {x:?} vs {y:?}"),
    };
    close(a.exit_speed_m_s, b.exit_speed_m_s, "exit speed");
    close(a.time_in_zone_s, b.time_in_zone_s, "time in zone");
    close(a.min_speed_m_s, b.min_speed_m_s, "lowest speed");
    assert!(
        (a.end_time_s - b.end_time_s).abs() < 1e-3,
        "{what}: end time"
    );
}

/// Front positions at which other events happen: 19 (clearing), 15 + 4 (rear on the zone end is
/// the same moment; a point at 15 m puts the rear on it), fin edges meeting section edges.
const TARGETS: [f64; 10] = [
    19.0,
    15.0,
    9.0,
    12.0,
    11.0,
    14.0,
    13.0,
    16.0,
    15.0 + 1e-12,
    18.0,
];

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]

    #[test]
    fn a_profile_point_on_any_event_changes_nothing(
        which in 0usize..TARGETS.len(),
        step in prop::sample::select(vec![0.25, 0.5, 1.0]),
        radius in prop::sample::select(vec![-50.0, -200.0, 80.0]),
    ) {
        let x = TARGETS[which];
        let on = run(&scenario(&arc(x, step, radius, 10.0), 25.0, 12.0));
        let off = run(&scenario(&arc(x + 1e-6, step, radius, 10.0), 25.0, 12.0));
        same(&on, &off, &format!("point at {x} m, step {step}, R {radius}"));
    }
}

/// The shape of the original report: a 50 m crest as points every 0.5 m, a point on the
/// clearing position. It must clear, as the shifted profile does.
#[test]
fn the_recorded_crest_clears() {
    let on = run(&scenario(&arc(19.0, 0.5, -50.0, 10.0), 25.0, 12.0));
    let off = run(&scenario(&arc(19.25, 0.5, -50.0, 10.0), 25.0, 12.0));
    assert_eq!(on.outcome.name(), "cleared", "{:?}", on.outcome);
    assert_eq!(off.outcome.name(), "cleared");
}

/// A point exactly where the vehicle reverses on a rise (found from a first run) changes
/// nothing either.
#[test]
fn a_profile_point_at_the_reversal_changes_nothing() {
    let rise = |at: f64| scenario(&arc(at, 0.25, 10.0, 5.0), 12.0, 12.0);
    let first = run(&rise(0.0));
    assert!(
        first.reversed,
        "the vehicle must roll back: {:?}",
        first.outcome
    );
    let top = first
        .samples
        .iter()
        .map(|s| s.s_m)
        .fold(f64::NEG_INFINITY, f64::max);
    for x in [top, top - 4.0] {
        let on = run(&rise(x));
        let off = run(&rise(x + 1e-6));
        same(&on, &off, &format!("point at {x} m on the rise"));
    }
}
