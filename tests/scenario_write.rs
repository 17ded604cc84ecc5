//! Writing a scenario (`scenario::write`) and reading it back (`scenario::parse_str`) gives the
//! same model (`==`, the file path aside): every shipped scenario, every candidate layout the
//! planner builds, and randomly drawn scenarios that use every block, every way of generating
//! cases and many units of each kind. The reference is the reader: the writer must be its inverse
//! on the model, to the last bit of every number.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::plan::{candidate_scenario, section_out_bases, Layout};
use eddyzone::scenario::raw::QuantityText;
use eddyzone::scenario::write::{self, Spelling};
use eddyzone::scenario::{self, parse_str, CaseOrigin, Scenario};
use eddyzone::units::{self, Kind};
use proptest::prelude::*;
use std::path::{Path, PathBuf};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn shipped() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(root().join("scenarios"))
        .expect("scenarios folder")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "yaml"))
        .collect();
    v.sort();
    assert!(v.len() >= 3, "the shipped demos");
    v
}

/// Written and read back (no `limits_file` can be found: the text must stand alone).
fn reread(s: &Scenario) -> (String, Scenario) {
    let text = write::to_yaml(s).unwrap_or_else(|e| panic!("{}: {e}", s.name));
    let mut back = parse_str(&text, "<written>", None)
        .unwrap_or_else(|e| panic!("{}: written text does not read: {e}\n{text}", s.name));
    back.path = s.path.clone();
    (text, back)
}

#[test]
fn every_shipped_scenario_reads_back_the_same() {
    for p in shipped() {
        let s = scenario::load(&p).expect("demo loads");
        let (text, back) = reread(&s);
        assert_eq!(back, s, "{}", p.display());
        assert_eq!(write::first_difference(&s, &back), None);
        // Self-contained: limits inline.
        assert!(!text.contains("limits_file"), "{}", p.display());
        assert!(text.contains("limits:"));
        // Generated cases are written as the block that makes them, not listed.
        let generated = s
            .cases
            .iter()
            .filter(|c| c.origin != CaseOrigin::Listed)
            .count();
        assert!(generated > 0, "{}: the demos generate cases", p.display());
        let n1 = s
            .cases
            .iter()
            .any(|c| matches!(c.origin, CaseOrigin::SectionOut { .. }));
        assert_eq!(text.contains("each_section_out_of:"), n1, "{}", p.display());
        assert!(!text.contains("/without-"), "{}", p.display());
        // Written twice, the same text.
        assert_eq!(write::to_yaml(&back).expect("writes"), text);
    }
}

/// A scenario with every block: custom material, a repeated model section and a measured one,
/// listed cases with overrides, corners, N−1 over a listed and a corner case, a default-position
/// backwards entry, limits with peaks, an envelope and temperatures, a duty cycle and a plan.
const RICH: &str = r#"version: 1
name: rich
description: |
  Every block.
materials:
  clad: { conductivity: 52 %IACS, temp_coeff: 0.39 %/K, density: 2.7 g/cm^3, specific_heat: 0.9 kJ/(kg*K), source: invented }
vehicle:
  mass: 2.4 t
  length: 6 m
  fins:
    - { name: fin, offset: 0.5 m, length: 1.2 m, height: 180 mm, thickness: 9 mm, material: clad, repeat: { count: 3, pitch: 1.7 m } }
sections:
  - { name: B, start: 20 m, length: 1 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 85 %, remanence: 1250 mT,
      remanence_temp_coeff: -0.11 %/K, clearance: 6 mm, fin_offset: -1.5 mm, pole_height: 150 mm, grade: N42SH, repeat: { count: 4, pitch: 1.6 m } }
  - name: M
    start: 30 m
    length: 1 m
    force_curve: { fin_temp: 293.15 K, magnet_temp: 30 degC, points: [[0 m/s, 0 N/m], [3 m/s, 1.5 kN/m], [40 km/h, 2.5 kN/m]] }
track: { profile: [[0 m, 0 m], [15 m, -0.15 m], [60 m, -0.6 m]], air_density: 1.18 kg/m^3 }
resistance: { rolling: 0.004, drag_area: 2.5 m^2, friction: 0.15 kN }
start: { position: 14 m, speed: 65 km/h }
temperatures: { fin: 21 °C, magnet: 298.15 K }
cases:
  - { name: full }
  - { name: light, mass: 1.9 t, start: { speed: 40 mph }, disabled: [B], resistance: { friction: 90 N } }
generate:
  corners: { mass: [1.8 t, 2.6 t], magnet_temp: [5 °C, 45 °C] }
  each_section_out_of: [full, empty/hot-magnet]
  rollback: { speed: 7 km/h }
rider: { track_axis: x, filter: { corner_hz: 6.5, order: 3, sample_rate_hz: 1200, phase: causal }, rates: { window: 20 ms, signal: raw } }
limits:
  source: invented
  peak: { x: { min: -1.7 g, max: 0.9 g }, z: { max: 2.1 g } }
  envelope: { x: { negative: [[0 s, 1.7 g], [0.7 s, 1.7 g], [0.7 s, 13 m/s^2], [9 s, 1.3 g]] } }
  onset: 17 g/s
  release: 12 g/s
  combined:
    - { x: { positive: 2 g, negative: 1.5 g }, z: { positive: 3 g, negative: 0.4 g } }
  exit_speed: { min: 3 m/s, max: 9 m/s }
  max_duration: 0.2 min
  allow_rollback: true
  max_fin_temperature: 140 °C
  max_magnet_temperature: 393.15 K
stall_speed: 0.04 m/s
time_limit: 2 min
solver: { rtol: 2.5e-10 }
duty: { interval: 3 min, cycles: 12, ambient: 24 °C, film_coefficient: 35 W/(m^2*K) }
plan:
  zone_start: 18 m
  max_length: 16 m
  module: { name: mod, length: 1 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.85, remanence: 1.25 T, clearance: 5 mm, pole_height: 150 mm, grade: N40H }
  clearances: [12 mm, 5 mm, 8 mm, 5 mm]
  min_spacing: 0.4 m
  slot_pitch: 1.5 m
"#;

fn rich() -> Scenario {
    parse_str(RICH, "rich.yaml", None).expect("the rich scenario is valid")
}

#[test]
fn the_rich_scenario_reads_back_the_same_and_keeps_its_origins() {
    let s = rich();
    let (text, back) = reread(&s);
    assert_eq!(back, s);
    // 2 listed, 4 corners, N−1 of `full` and of one corner (5 sections each; `light` has B off
    // but is not a base), one backwards entry.
    assert_eq!(s.cases.len(), 2 + 4 + 5 + 5 + 1);
    assert!(text.contains("each_section_out_of: [full, empty/hot-magnet]"));
    assert!(text.contains("rollback:"));
    // The default start of the backwards entry is left to the reader, which recomputes it.
    let raw = write::to_raw(&s);
    let rollback = raw.generate.and_then(|g| g.rollback).expect("rollback");
    assert!(rollback.position.is_none());
    let corner = s.case("full/cold-magnet").expect("corner");
    let CaseOrigin::Corner { factors } = &corner.origin else {
        panic!("corner origin")
    };
    assert_eq!(factors.len(), 2);
    assert_eq!(corner.mass_kg, factors[0].high);
    assert_eq!(corner.magnet_temp_c, factors[1].low);
    assert_eq!(
        s.case("empty/hot-magnet/without-B-2").map(|c| &c.origin),
        Some(&CaseOrigin::SectionOut {
            base: "empty/hot-magnet".into(),
            section: "B-2".into()
        })
    );
}

#[test]
fn plan_rebuilds_generated_cases_from_their_origin_data() {
    let s = rich();
    let p = s.plan.clone().expect("plan block");
    assert_eq!(section_out_bases(&s), ["full", "empty/hot-magnet"]);
    let layout: Layout = vec![Some(0), None, Some(1), Some(2)];
    let c = candidate_scenario(&s, &p, &layout);
    assert_eq!(c.sections.len(), 3);
    // N−1 over the modules, from the same bases.
    let n1: Vec<_> = c
        .cases
        .iter()
        .filter_map(|x| match &x.origin {
            CaseOrigin::SectionOut { base, section } => Some((base.as_str(), section.as_str())),
            _ => None,
        })
        .collect();
    assert_eq!(
        n1,
        [
            ("full", "mod-1"),
            ("full", "mod-2"),
            ("full", "mod-3"),
            ("empty/hot-magnet", "mod-1"),
            ("empty/hot-magnet", "mod-2"),
            ("empty/hot-magnet", "mod-3")
        ]
    );
    // The default backwards entry follows the new zone end (18 m + 3 slots of 1.5 m + 1 m),
    // plus the vehicle length and 1 cm.
    let r = c.case("rollback").expect("rollback kept");
    assert_eq!(c.zone_end_m, 18.0 + 3.0 * 1.5 + 1.0);
    assert_eq!(r.start_position_m, c.zone_end_m + 6.0 + 0.01);

    // A backwards entry at a given position stays there, even where the default would be.
    let given = RICH.replace(
        "rollback: { speed: 7 km/h }",
        &format!(
            "rollback: {{ speed: 7 km/h, position: {} m }}",
            31.0 + 6.0 + 0.01
        ),
    );
    let s = parse_str(&given, "given.yaml", None).expect("valid");
    // Zone end: the end of section M (30 m + 1 m); the given position is the default one.
    assert_eq!(s.zone_end_m, 31.0);
    assert_eq!(
        s.case("rollback").map(|r| r.start_position_m),
        Some(31.0 + 6.0 + 0.01)
    );
    let c = candidate_scenario(&s, &p, &layout);
    let r = c.case("rollback").expect("rollback kept");
    assert_eq!(r.start_position_m, 31.0 + 6.0 + 0.01);
    assert_eq!(reread(&c).1, c);
}

#[test]
fn names_and_text_that_look_like_other_yaml_survive() {
    let text = r#"name: "- [not] a list: #1"
description: "  leading spaces,\ttab, 'quotes' and \"double\" ones\n\nand two lines  \n"
start: { position: 5 m, speed: 10 m/s }
vehicle:
  mass: 2000 kg
  length: 4 m
  fins:
    - { name: "yes", offset: 1 m, length: 2 m, height: 200 mm, thickness: 8 mm, material: copper-c11000, lane: "~" }
sections:
  - { name: "1.5", start: 10 m, length: 1 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm, lane: "~" }
  - { name: "null", start: 12 m, length: 1 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm, lane: "~" }
cases:
  - { name: "on", disabled: ["null"] }
  - { name: "0x1F" }
generate: { each_section_out_of: ["0x1F"] }
limits: { source: "key: value # not a comment" }
"#;
    let s = parse_str(text, "odd.yaml", None).expect("valid");
    assert_eq!(s.sections[1].name, "null");
    let (_, back) = reread(&s);
    assert_eq!(back, s);
}

/// Proposes every length in millimetres (the writer must take it only where exact).
struct Millimetres;

impl Spelling for Millimetres {
    fn spell(&self, _path: &str, kind: Kind, si: f64) -> Option<String> {
        (kind == Kind::Length).then(|| format!("{} mm", si * 1e3))
    }
}

/// Proposes the same wrong text for every quantity.
struct Wrong;

impl Spelling for Wrong {
    fn spell(&self, _path: &str, kind: Kind, _si: f64) -> Option<String> {
        (kind == Kind::Length).then(|| "0.123 m".to_string())
    }
}

#[test]
fn a_proposed_spelling_is_taken_only_where_it_reads_back_exactly() {
    let s = rich();
    let text = write::to_yaml_with(&s, &Millimetres).expect("writes");
    assert!(text.contains(" mm"), "some lengths are exact in mm");
    let mut back = parse_str(&text, "mm.yaml", None).expect("reads");
    back.path = None;
    assert_eq!(back, s);
    // Every quantity written in mm reads back to exactly the model's value.
    let raw = write::to_raw_with(&s, &Millimetres);
    for f in raw.vehicle.fins.iter().flatten() {
        if let QuantityText::Text(t) = &f.thickness.value {
            let x = units::from_text(Kind::Length, t).expect("a length");
            assert_eq!(x, s.fins[0].thickness_m, "{t}");
        }
    }
    let text = write::to_yaml_with(&s, &Wrong).expect("wrong proposals are refused");
    assert!(!text.contains("0.123 m"));
}

fn coaster_plan() -> Scenario {
    scenario::load(Path::new(&root().join("scenarios/coaster-plan.yaml"))).expect("demo")
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

    /// Every candidate layout of the plan demo (30 slots, 4 clearances) and of the rich
    /// scenario (corners, two N−1 bases, a backwards entry) reads back the same.
    #[test]
    fn planned_candidates_read_back_the_same(
        slots in prop::collection::vec(prop::option::of(0usize..4), 1..=30),
        rich_base in any::<bool>(),
    ) {
        prop_assume!(slots.iter().any(|c| c.is_some()));
        let s = if rich_base { rich() } else { coaster_plan() };
        let p = s.plan.clone().expect("plan block");
        let n = eddyzone::plan::slot_count(&p);
        let layout: Layout = slots
            .into_iter()
            .take(n)
            .map(|c| c.map(|k| k % p.clearances_m.len()))
            .collect();
        prop_assume!(layout.iter().any(|c| c.is_some()));
        let c = candidate_scenario(&s, &p, &layout);
        let (_, back) = reread(&c);
        prop_assert_eq!(back, c);
    }

    /// Randomly drawn scenarios (both arrangements, every gravity form, optional blocks, several
    /// units per quantity, generated cases of every kind) read back the same.
    #[test]
    fn random_scenarios_read_back_the_same(
        u in prop::collection::vec(0.0f64..1.0, 96),
        k in prop::collection::vec(0usize..1024, 64),
    ) {
        let text = Draw { u, k, i: 0, j: 0 }.scenario();
        let s = parse_str(&text, "drawn.yaml", None)
            .unwrap_or_else(|e| panic!("drawn scenario is invalid: {e}\n{text}"));
        let (_, back) = reread(&s);
        prop_assert_eq!(back, s);
    }
}

/// Draws the numbers and choices of a random scenario.
struct Draw {
    u: Vec<f64>,
    k: Vec<usize>,
    i: usize,
    j: usize,
}

impl Draw {
    /// A uniform number in [lo, hi).
    fn x(&mut self, lo: f64, hi: f64) -> f64 {
        let u = self.u[self.i % self.u.len()];
        self.i += 1;
        lo + u * (hi - lo)
    }

    /// One of `n` choices.
    fn pick(&mut self, n: usize) -> usize {
        let k = self.k[self.j % self.k.len()];
        self.j += 1;
        k % n
    }

    fn yes(&mut self) -> bool {
        self.pick(2) == 1
    }

    /// `si` written in one of `units` (spelling, scale to SI).
    fn unit(&mut self, si: f64, units: &[(&str, f64)]) -> String {
        let (name, scale) = units[self.pick(units.len())];
        format!("{} {name}", si / scale)
    }

    fn length(&mut self, lo: f64, hi: f64) -> String {
        let x = self.x(lo, hi);
        self.unit(x, &[("m", 1.0), ("cm", 1e-2), ("mm", 1e-3)])
    }

    fn speed(&mut self, lo: f64, hi: f64) -> String {
        let x = self.x(lo, hi);
        self.unit(x, &[("m/s", 1.0), ("km/h", 1.0 / 3.6), ("mph", 0.44704)])
    }

    fn mass(&mut self, lo: f64, hi: f64) -> String {
        let x = self.x(lo, hi);
        self.unit(x, &[("kg", 1.0), ("t", 1e3)])
    }

    fn temperature(&mut self, lo: f64, hi: f64) -> String {
        let c = self.x(lo, hi);
        if self.yes() {
            format!("{} K", c + 273.15)
        } else {
            format!("{c} °C")
        }
    }

    /// An acceleration limit drawn in g.
    fn accel(&mut self, lo: f64, hi: f64) -> String {
        let g = self.x(lo, hi);
        self.unit(g * 9.80665, &[("g", 9.80665), ("m/s^2", 1.0)])
    }

    fn magnets(&mut self) -> String {
        let grades = ["N42", "N40H", "SH", "N38UH", "EH", "M", "N"];
        let grade = grades[self.pick(grades.len())];
        format!(
            "pole_pitch: {}, magnet_thickness: {}, magnet_fill: {}, remanence: {}, \
             remanence_temp_coeff: {} %/K, clearance: {}, pole_height: {}, grade: {grade}",
            self.length(0.03, 0.08),
            self.length(0.008, 0.02),
            {
                let f = self.x(0.5, 1.0);
                if self.yes() {
                    format!("{} %", f * 100.0)
                } else {
                    f.to_string()
                }
            },
            {
                let b = self.x(1.0, 1.45);
                self.unit(b, &[("T", 1.0), ("mT", 1e-3)])
            },
            self.x(-0.15, -0.05),
            self.length(0.003, 0.012),
            self.length(0.1, 0.25),
        )
    }

    fn scenario(&mut self) -> String {
        let fins_on_vehicle = self.pick(3) != 0;
        let mut t = String::from("version: 1\nname: drawn\n");
        t += &format!(
            "materials:\n  clad: {{ conductivity: {}, temp_coeff: {} ppm/K, density: {} g/cm^3, specific_heat: {} J/(kg*K) }}\n",
            {
                let c = self.x(2e7, 6e7);
                self.unit(c, &[("S/m", 1.0), ("MS/m", 1e6), ("%IACS", 58e4)])
            },
            self.x(1000.0, 5000.0),
            self.x(2.0, 9.0),
            self.x(380.0, 950.0),
        );
        let vlen = self.x(10.0, 12.0);
        t += &format!(
            "vehicle:\n  mass: {}\n  length: {vlen} m\n",
            self.mass(1000.0, 9000.0)
        );
        let material = if self.yes() {
            "clad"
        } else {
            "aluminium-6063-t6"
        };
        if fins_on_vehicle {
            let flen = self.x(0.5, 1.5);
            t += &format!(
                "  fins:\n    - {{ name: car, offset: {}, length: {flen} m, height: {}, thickness: {}, material: {material}, repeat: {{ count: {}, pitch: {} m }} }}\n",
                self.length(0.1, 0.5),
                self.length(0.1, 0.25),
                self.length(0.005, 0.012),
                1 + self.pick(4),
                flen + self.x(0.1, 0.5),
            );
            let slen = self.x(0.5, 1.5);
            t += &format!(
                "sections:\n  - {{ name: B, start: {}, length: {slen} m, repeat: {{ count: {}, pitch: {} m }}, {} }}\n",
                self.length(20.0, 25.0),
                1 + self.pick(5),
                slen + self.x(0.1, 1.0),
                self.magnets(),
            );
            let v1 = self.x(1.0, 5.0);
            t += &format!(
                "  - {{ name: M, start: 40 m, length: 1 m, force_curve: {{ fin_temp: {}, points: [[0 m/s, 0 N/m], [{v1} m/s, {} N/m], [{}, {} kN/m]] }} }}\n",
                self.temperature(0.0, 60.0),
                self.x(100.0, 2000.0),
                {
                    let v2 = v1 + self.x(1.0, 20.0);
                    self.unit(v2, &[("m/s", 1.0), ("km/h", 1.0 / 3.6)])
                },
                self.x(0.1, 3.0),
            );
        } else {
            let mlen = self.x(0.4, 0.8);
            let magnets = self.magnets();
            t += &format!(
                "  magnets:\n    - {{ name: E, lane: east, offset: {}, length: {mlen} m, repeat: {{ count: {}, pitch: {} m }}, {magnets} }}\n    - {{ name: W, lane: west, offset: 0.2 m, length: {mlen} m, {magnets} }}\n",
                self.length(0.1, 0.5),
                1 + self.pick(4),
                mlen + self.x(0.05, 0.5),
            );
        }
        t += "track:\n";
        match self.pick(4) {
            0 => {
                let x1 = self.x(10.0, 30.0);
                let z1 = x1 * self.x(-0.5, 0.5);
                let x2 = x1 + self.x(20.0, 60.0);
                let z2 = z1 + (x2 - x1) * self.x(-0.5, 0.5);
                t += &format!("  profile: [[0 m, 0 m], [{x1} m, {z1} m], [{x2} m, {z2} m]]\n");
            }
            1 => t += &format!("  grade: {} %\n", self.x(-50.0, 50.0)),
            2 => t += &format!("  angle: {} deg\n", self.x(-90.0, 90.0)),
            _ => {}
        }
        if self.yes() {
            t += &format!("  air_density: {} kg/m^3\n", self.x(0.9, 1.3));
        }
        if !fins_on_vehicle {
            t += &format!(
                "  fins:\n    - {{ name: east-fin, lane: east, start: {}, length: {}, height: 230 mm, thickness: 10 mm, material: {material} }}\n    - {{ name: west-fin, lane: west, start: 34 m, length: 24 m, height: 230 mm, thickness: 10 mm, material: aluminium-5083-o }}\n",
                self.length(30.0, 40.0),
                self.length(5.0, 30.0),
            );
        }
        if self.yes() {
            t += &format!(
                "resistance: {{ rolling: {}, drag_area: {} m^2, friction: {} }}\n",
                self.x(0.0, 0.02),
                self.x(0.0, 5.0),
                {
                    let f = self.x(0.0, 300.0);
                    self.unit(f, &[("N", 1.0), ("kN", 1e3)])
                }
            );
        }
        t += &format!(
            "start: {{ position: {}, speed: {} }}\n",
            self.length(0.0, 15.0),
            self.speed(5.0, 30.0)
        );
        if self.yes() {
            t += &format!(
                "temperatures: {{ fin: {}, magnet: {} }}\n",
                self.temperature(0.0, 60.0),
                self.temperature(0.0, 60.0)
            );
        }
        let listed = self.yes();
        if listed {
            let disabled = if fins_on_vehicle { "B" } else { "E" };
            t += &format!(
                "cases:\n  - {{ name: loaded }}\n  - {{ name: light, mass: {}, fin_temp: {}, start: {{ speed: {} }}, disabled: [{disabled}], resistance: {{ friction: {} N }} }}\n",
                self.mass(800.0, 5000.0),
                self.temperature(0.0, 80.0),
                self.speed(3.0, 20.0),
                self.x(0.0, 200.0),
            );
        }
        let mut generate = Vec::new();
        match self.pick(3) {
            0 => generate.push("each_section_out: true".to_string()),
            1 => generate.push(format!(
                "each_section_out_of: [{}]",
                if listed { "light, loaded" } else { "nominal" }
            )),
            _ => {}
        }
        let mut corners = Vec::new();
        if self.yes() {
            let lo = self.x(800.0, 3000.0);
            corners.push(format!("mass: [{lo} kg, {} kg]", lo + self.x(0.0, 3000.0)));
        }
        if self.yes() {
            corners.push(format!(
                "fin_temp: [{}, {}]",
                self.temperature(-10.0, 10.0),
                self.temperature(40.0, 80.0)
            ));
        }
        if self.yes() {
            corners.push(format!(
                "magnet_temp: [{}, {}]",
                self.temperature(-10.0, 10.0),
                self.temperature(40.0, 80.0)
            ));
        }
        if self.yes() {
            corners.push(format!(
                "speed: [{}, {}]",
                self.speed(3.0, 10.0),
                self.speed(12.0, 30.0)
            ));
        }
        if !corners.is_empty() {
            generate.push(format!("corners: {{ {} }}", corners.join(", ")));
        }
        if self.yes() {
            let mut r = vec![format!("speed: {}", self.speed(0.5, 5.0))];
            if self.yes() {
                r.push(format!("mass: {}", self.mass(800.0, 5000.0)));
            }
            if self.yes() {
                r.push(format!("position: {}", self.length(50.0, 80.0)));
            }
            generate.push(format!("rollback: {{ {} }}", r.join(", ")));
        }
        if !generate.is_empty() {
            t += &format!("generate: {{ {} }}\n", generate.join(", "));
        }
        match self.pick(3) {
            0 => {}
            1 => t += "rider: { track_axis: z, filter: { enabled: false } }\n",
            _ => {
                t += &format!(
                    "rider: {{ track_axis: x, filter: {{ corner_hz: {}, order: {}, sample_rate_hz: {}, phase: causal }} }}\n",
                    self.x(1.0, 20.0),
                    1 + self.pick(8),
                    self.x(500.0, 2000.0)
                )
            }
        }
        let d1 = self.x(0.1, 2.0);
        let exit_min = self.x(0.0, 5.0);
        t += &format!(
            "limits:\n  peak: {{ x: {{ min: -{}, max: {} }}, z: {{ max: {} }} }}\n  envelope: {{ x: {{ negative: [[0 s, {a}], [{d1} s, {a}], [{d1} s, {b}], [{} s, {b}]] }}, z: {{ positive: [[0 s, {}]] }} }}\n  onset: {} g/s\n  exit_speed: {{ min: {exit_min} m/s, max: {} m/s }}\n  max_duration: {} s\n  allow_stall: {}\n  max_fin_temperature: {}\n",
            self.accel(0.5, 3.0),
            self.accel(0.5, 2.0),
            self.accel(1.0, 4.0),
            d1 + self.x(1.0, 10.0),
            self.accel(0.5, 4.0),
            self.x(5.0, 50.0),
            exit_min + self.x(0.0, 15.0),
            self.x(5.0, 30.0),
            self.yes(),
            self.temperature(100.0, 200.0),
            a = self.accel(1.0, 2.5),
            b = self.accel(0.5, 1.0),
        );
        if self.yes() {
            t += &format!("zone_end: {}\n", self.length(45.0, 60.0));
        }
        if self.yes() {
            t += &format!(
                "stall_speed: {}\ntime_limit: {} s\nsolver: {{ rtol: {}, atol: {} }}\n",
                self.speed(0.01, 0.1),
                self.x(10.0, 600.0),
                self.x(1e-12, 1e-6),
                self.x(1e-12, 1e-6)
            );
        }
        if self.yes() {
            let cycles = if self.yes() {
                format!("cycles: {}", 1 + self.pick(100))
            } else {
                format!("cycles: until_steady, max_cycles: {}", 1 + self.pick(500))
            };
            t += &format!(
                "duty: {{ interval: {} s, {cycles}, ambient: {}, film_coefficient: {} W/(m^2*K) }}\n",
                self.x(60.0, 600.0),
                self.temperature(0.0, 40.0),
                self.x(0.0, 80.0),
            );
        }
        if fins_on_vehicle && self.yes() {
            let ml = self.x(0.5, 1.5);
            let ms = self.x(0.0, 1.0);
            let clearances: Vec<String> = (0..1 + self.pick(4))
                .map(|_| self.length(0.003, 0.02))
                .collect();
            t += &format!(
                "plan:\n  zone_start: {}\n  max_length: {} m\n  module: {{ name: mod, length: {ml} m, {} }}\n  clearances: [{}]\n  min_spacing: {ms} m\n",
                self.length(15.0, 20.0),
                ml + self.x(5.0, 30.0),
                self.magnets(),
                clearances.join(", "),
            );
            if self.yes() {
                t += &format!("  slot_pitch: {} m\n", ml + ms + self.x(0.0, 0.5));
            }
        }
        t
    }
}

/// `plan --write`'s text (`scenario::as_written::planned_yaml`): the modules named after the
/// plan's module, the grade as written, every quantity in the unit the user wrote it in (limits
/// in g), no float noise, and it reads back to the planned layout.
#[test]
fn a_planned_scenario_is_written_as_the_user_wrote_it() {
    use eddyzone::scenario::as_written::planned_yaml;
    use eddyzone::scenario::Mount;
    let text = std::fs::read_to_string(root().join("scenarios/coaster-plan.yaml")).unwrap();
    let s = coaster_plan();
    let p = s.plan.clone().unwrap();
    // Slots 7, 14 and 19 at 5, 8 and 20 mm: the module starts are sums of the 1.6 m pitch.
    let mut layout: Layout = vec![None; eddyzone::plan::slot_count(&p)];
    layout[7] = Some(0);
    layout[14] = Some(1);
    layout[19] = Some(3);
    let c = candidate_scenario(&s, &p, &layout);
    let starts = [20.0 + 7.0 * 1.6, 20.0 + 14.0 * 1.6, 20.0 + 19.0 * 1.6];
    // IEEE 754 double arithmetic: 20 + 7·1.6 is 31.200000000000003, not 31.2, …
    assert_ne!(starts, [31.2, 42.4, 50.4]);
    assert_eq!(c.sections[0].mount, Mount::Track { start_m: starts[0] });
    let yaml = planned_yaml(&c, Some(&text)).unwrap();
    for (name, start, clearance) in [
        ("module-1", "31.2 m", "5 mm"),
        ("module-2", "42.4 m", "8 mm"),
        ("module-3", "50.4 m", "20 mm"),
    ] {
        let at = yaml
            .find(&format!("name: {name}\n"))
            .unwrap_or_else(|| panic!("{name}\n{yaml}"));
        let entry = &yaml[at..];
        let entry = &entry[..entry[1..].find("- name:").map_or(entry.len(), |e| e + 1)];
        assert!(entry.contains(&format!("start: {start}\n")), "{entry}");
        assert!(
            entry.contains(&format!("clearance: {clearance}\n")),
            "{entry}"
        );
        assert!(entry.contains("grade: N40H\n"), "{entry}");
        assert!(entry.contains("pole_pitch: 50 mm\n"), "{entry}");
    }
    assert!(!yaml.contains("name: P1"), "{yaml}");
    assert!(!yaml.contains("grade: H\n"), "{yaml}");
    for unit_as_written in [
        "mass: 7.4 t",
        "speed: 75 km/h",
        "length: 11 m",
        "max_length: 48 m",
    ] {
        assert!(yaml.contains(unit_as_written), "{unit_as_written}\n{yaml}");
    }
    // Float noise would show as a run of zeros or nines before a last digit.
    for noise in ["00000000", "99999999"] {
        assert!(!yaml.contains(noise), "{noise}\n{yaml}");
    }
    // Limits in g (the limit file's accelerations), none in m/s².
    assert!(!yaml.contains("m/s^2"), "{yaml}");
    assert!(
        yaml.contains(" g\n") || yaml.contains(" g }") || yaml.contains(" g,"),
        "{yaml}"
    );
    // It reads back: the same layout, positions rounded (by less than 1e-11 m).
    let back = parse_str(&yaml, "planned.yaml", None).unwrap();
    let names: Vec<&str> = back.sections.iter().map(|x| x.name.as_str()).collect();
    assert_eq!(names, ["module-1", "module-2", "module-3"]);
    for (x, s0) in back.sections.iter().zip(starts) {
        let Mount::Track { start_m } = x.mount else {
            panic!("on the track")
        };
        assert!((start_m - s0).abs() < 1e-11, "{start_m} vs {s0}");
        assert_eq!(x.grade.map(|g| g.name()), Some("N40H".to_string()));
    }
    assert_eq!(back.cases.len(), c.cases.len());
    assert!(back.case("full/without-module-2").is_some());
}
