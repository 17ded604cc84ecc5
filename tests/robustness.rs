//! No panics on any input: random text and randomly mutated scenarios go through validation and,
//! when valid, through a run and a verdict. Errors are fine; panics are not.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::dynamics::{simulate_case, BrakeTables, RunOptions};
use eddyzone::scenario::parse_str;
use proptest::prelude::*;

mod common;

const BASE: &str = r#"name: robust
start: { position: 5 m, speed: 12 m/s }
vehicle:
  mass: 2000 kg
  length: 4 m
  fins:
    - { name: fin, offset: 1 m, length: 2 m, height: 200 mm, thickness: 8 mm, material: aluminium-6061-t6 }
sections:
  - { name: S, start: 10 m, length: 1.5 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm, repeat: { count: 3, pitch: 2 m } }
track: { profile: [[0 m, 0 m], [12 m, -0.5 m], [40 m, 1 m]] }
resistance: { rolling: 0.01, drag_area: 1 m^2, friction: 100 N }
time_limit: 20 s
limits: { exit_speed: { min: 1 m/s, max: 8 m/s }, peak: { x: { min: -2 g } } }
generate: { each_section_out: true, rollback: { speed: 2 m/s } }
"#;

/// The numbers of the base scenario, in order of appearance.
fn numbers() -> Vec<(usize, usize)> {
    common::numbers(BASE)
}

fn try_everything(text: &str) {
    if let Ok(s) = parse_str(text, "<prop>", None) {
        if let Ok(t) = BrakeTables::build(&s) {
            let runs: Vec<_> = s
                .cases
                .iter()
                .filter_map(|c| simulate_case(&s, &t, c, &RunOptions::default()).ok())
                .collect();
            if runs.len() == s.cases.len() {
                let _ = eddyzone::checks::verdict(&s, &runs, &[]);
            }
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    #[test]
    fn random_text_never_panics(text in "\\PC{0,200}") {
        let _ = parse_str(&text, "<prop>", None);
    }

    #[test]
    fn mutated_numbers_never_panic(which in 0usize..200, value in prop_oneof![
        Just("0".to_string()), Just("-1".to_string()), Just("1e300".to_string()), Just("1e-300".to_string()),
        Just(".nan".to_string()), Just(".inf".to_string()), (0.0f64..100.0).prop_map(|x| format!("{x}")),
    ]) {
        let nums = numbers();
        let (a, b) = nums[which % nums.len()];
        let text = format!("{}{}{}", &BASE[..a], value, &BASE[b..]);
        try_everything(&text);
    }

    #[test]
    fn deleted_lines_never_panic(line in 0usize..20) {
        let lines: Vec<&str> = BASE.lines().collect();
        let text: String = lines.iter().enumerate().filter(|(i, _)| *i != line % lines.len()).map(|(_, l)| format!("{l}\n")).collect();
        try_everything(&text);
    }
}

#[test]
fn the_base_scenario_is_valid() {
    let s = parse_str(BASE, "<base>", None).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(s.sections.len(), 3);
    // Listed nominal + 3 N−1 + rollback.
    assert_eq!(s.cases.len(), 5);
    try_everything(BASE);
}
