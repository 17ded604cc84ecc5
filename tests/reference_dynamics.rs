//! Reference checks of the run through the zone against published kinematics and closed forms.
//! Each test names its source and its tolerance.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::constants::STANDARD_GRAVITY_M_S2 as G;
use eddyzone::dynamics::model::active_pairs;
use eddyzone::dynamics::track::{resistance_magnitude_n, TrackModel};
use eddyzone::dynamics::{simulate_case, BrakeTables, Outcome, RunOptions, SolverSettings};
use eddyzone::scenario::{parse_str, Scenario};
use std::path::Path;

fn scenario(text: &str) -> Scenario {
    parse_str(text, "<test>", None).unwrap_or_else(|e| panic!("{e}"))
}

fn no_feedback() -> RunOptions {
    RunOptions {
        thermal_feedback: false,
        ..RunOptions::default()
    }
}

/// One thin 5083 fin on a heavy vehicle, one section at a wide clearance on a level track.
fn level_one_pair(v0: &str, extra: &str) -> String {
    format!(
        r#"
name: level one pair
vehicle:
  mass: 50 t
  length: 4 m
  fins:
    - {{ name: fin, offset: 1 m, length: 2 m, height: 200 mm, thickness: 2 mm, material: aluminium-5083-o }}
sections:
  - {{ name: S, start: 10 m, length: 1.5 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: 20 mm, pole_height: 180 mm }}
start: {{ position: 5 m, speed: {v0} }}
{extra}
"#
    )
}

#[test]
fn free_fall_entry_speed() {
    // Kinematics of free fall without resistance: v = sqrt(2·g·h). Tolerance 1e-9 relative.
    let s = scenario(
        r#"
name: drop
vehicle:
  mass: 5000 kg
  length: 3 m
  magnets:
    - { name: M, offset: 0.5 m, length: 1 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
        remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm }
track:
  angle: -90 deg
  fins:
    - { name: F, start: 30 m, length: 10 m, height: 200 mm, thickness: 10 mm, material: aluminium-6061-t6 }
start: { position: 0 m, speed: 0 m/s }
"#,
    );
    let t = BrakeTables::build(&s).unwrap();
    let r = simulate_case(&s, &t, &s.cases[0], &no_feedback()).unwrap();
    // First contact when the unit's leading edge (front − 0.5 m) reaches the fin at 30 m.
    let h = 30.5;
    let expect = (2.0 * G * h).sqrt();
    let got = r.entry_speed_m_s.unwrap();
    assert!(
        ((got - expect) / expect).abs() < 1e-9,
        "entry {got} vs {expect}"
    );
}

#[test]
fn linear_regime_exit_speed() {
    // m·dv/ds = −c·overlap(s), ∫overlap ds = L_fin·L_section, so v_exit = v0 − c·L_fin·L_sec/m when
    // f(v) = c·v (the linear, low-speed limit of eddy-current drag; e.g. Wouterse, "Critical
    // velocity in eddy current brakes", 1991). The tolerance is the model's own non-linearity at v0,
    // computed here: f(v0)/(c·v0) − 1.
    let s = scenario(&level_one_pair(
        "0.05 m/s",
        "zone_end: 12 m\nstall_speed: 0.001 m/s\ntime_limit: 3000 s",
    ));
    let t = BrakeTables::build(&s).unwrap();
    let r = simulate_case(&s, &t, &s.cases[0], &no_feedback()).unwrap();
    assert_eq!(r.outcome, Outcome::Cleared);
    let pairs = active_pairs(&s, &t, &s.cases[0]);
    let h = 1e-6;
    let c = pairs[0].force_per_m_n(h, 20.0) / h;
    let v0 = 0.05;
    let nonlin = (pairs[0].force_per_m_n(v0, 20.0) / (c * v0) - 1.0).abs();
    let dv = c * 2.0 * 1.5 / 50_000.0;
    assert!(dv < v0, "braking would stop the vehicle: dv = {dv}");
    let expect = v0 - dv;
    let got = r.exit_speed_m_s.unwrap();
    let tol = (nonlin * dv).max(1e-9 * v0);
    assert!(
        (got - expect).abs() <= tol,
        "exit {got} vs {expect}, tolerance {tol} (non-linearity {nonlin:.2e})"
    );
    assert!(
        nonlin < 1e-3,
        "the test speed is not in the linear regime: {nonlin}"
    );
}

#[test]
fn aerodynamic_drag_alone() {
    // m·v·dv/ds = −½·ρ·Cd·A·v² gives v(s) = v0·exp(−ρ·Cd·A·s/(2m)) (closed form). Tolerance 1e-8.
    let text = r#"
name: drag only
vehicle:
  mass: 1500 kg
  length: 4 m
  fins:
    - { name: fin, offset: 1 m, length: 2 m, height: 200 mm, thickness: 8 mm, material: copper-c11000 }
sections:
  - { name: S, start: 100 m, length: 1.5 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm }
resistance: { drag_area: 2.0 m^2 }
track: { air_density: 1.2 kg/m^3 }
start: { position: 0 m, speed: 30 m/s }
zone_end: 200 m
cases:
  - { name: out-of-service, disabled: [S] }   # the section is out: drag alone
"#;
    let s = scenario(text);
    let t = BrakeTables::build(&s).unwrap();
    let r = simulate_case(&s, &t, &s.cases[0], &no_feedback()).unwrap();
    assert_eq!(r.outcome, Outcome::Cleared);
    let dist = 200.0 + 4.0; // rear past 200 m
    let expect = 30.0 * (-1.2f64 * 2.0 * dist / (2.0 * 1500.0)).exp();
    let got = r.exit_speed_m_s.unwrap();
    assert!(((got - expect) / expect).abs() < 1e-8, "{got} vs {expect}");
}

fn shipped() -> Vec<Scenario> {
    let mut out = vec![];
    for e in std::fs::read_dir(Path::new(env!("CARGO_MANIFEST_DIR")).join("scenarios")).unwrap() {
        let p = e.unwrap().path();
        if p.extension().is_some_and(|x| x == "yaml") {
            out.push(eddyzone::scenario::load(&p).unwrap_or_else(|e| panic!("{e}")));
        }
    }
    assert!(out.len() >= 2);
    out
}

#[test]
fn energy_residual_on_every_shipped_scenario() {
    // First law: kinetic + potential + dissipated stays equal to the initial energy. Tolerance:
    // 1e-6 of the energy turned over (braking energy plus the kinetic energy at entry). And the
    // energies of the sections sum to the dissipated braking energy.
    for s in shipped() {
        let t = BrakeTables::build(&s).unwrap();
        for c in &s.cases {
            let with_loads = RunOptions {
                section_loads: true,
                ..RunOptions::default()
            };
            let r = simulate_case(&s, &t, c, &with_loads).unwrap();
            // The sections' energies (quadrature of the continuous output) sum to the braking
            // energy of the balance: tolerance 1e-7 of the braking energy.
            let sections: f64 = r.sections.iter().map(|x| x.energy_j).sum();
            assert!(
                (sections - r.braking_energy_j).abs() <= 1e-7 * r.braking_energy_j,
                "{} / {}: sections {sections} J vs braking {} J",
                s.name,
                c.name,
                r.braking_energy_j
            );
            let scale = r.braking_energy_j
                + 0.5 * r.mass_kg * r.entry_speed_m_s.unwrap_or(0.0).powi(2)
                + r.initial_energy_j.abs();
            assert!(
                r.energy_residual_j.abs() < 1e-6 * scale,
                "{} / {}: residual {} J of {scale} J",
                s.name,
                c.name,
                r.energy_residual_j
            );
        }
    }
}

#[test]
fn tolerance_convergence() {
    // Self-convergence: tightening rtol and atol tenfold changes the exit speed by < 1e-7 relative.
    for s in shipped() {
        let t = BrakeTables::build(&s).unwrap();
        for c in &s.cases {
            let a = simulate_case(
                &s,
                &t,
                c,
                &RunOptions {
                    solver: Some(SolverSettings {
                        rtol: 1e-9,
                        atol: 1e-9,
                        ..SolverSettings::default()
                    }),
                    ..RunOptions::default()
                },
            )
            .unwrap();
            let b = simulate_case(
                &s,
                &t,
                c,
                &RunOptions {
                    solver: Some(SolverSettings {
                        rtol: 1e-10,
                        atol: 1e-10,
                        ..SolverSettings::default()
                    }),
                    ..RunOptions::default()
                },
            )
            .unwrap();
            if let (Some(va), Some(vb)) = (a.exit_speed_m_s, b.exit_speed_m_s) {
                assert!(
                    ((va - vb) / vb).abs() < 1e-7,
                    "{} / {}: {va} vs {vb}",
                    s.name,
                    c.name
                );
            }
        }
    }
}

/// A fixed-step classical RK4 (Kutta 1901) with a tiny step, written independently of the library's
/// integrator: the force laws are read from the library, the stepping and the exit are not.
fn rk4_exit_speed(s: &Scenario, t: &BrakeTables, case: usize, h: f64) -> f64 {
    let c = &s.cases[case];
    let pairs = active_pairs(s, t, c);
    let track = TrackModel::new(
        &s.track.gravity,
        s.track.air_density_kg_m3,
        s.vehicle.length_m,
    );
    let m = c.mass_kg;
    let len = s.vehicle.length_m;
    let accel = |x: f64, v: f64| -> f64 {
        let brake: f64 = pairs
            .iter()
            .map(|p| -p.force_per_m_n(v, c.fin_temp_c) * p.spec.overlap.length_m(x))
            .sum();
        // Gravity from the mean elevation under the vehicle by a central difference of the potential.
        let dz = 1e-6;
        let grav =
            -m * G * (track.mean_elevation_m(x + dz) - track.mean_elevation_m(x - dz)) / (2.0 * dz);
        let slope = (track.elevation_m(x) - track.elevation_m(x - len)) / len;
        let cos = (1.0 - slope * slope).sqrt();
        let res = -v.signum()
            * resistance_magnitude_n(&c.resistance, m, cos, v, s.track.air_density_kg_m3);
        (brake + grav + res) / m
    };
    let (mut x, mut v) = (c.start_position_m, c.start_speed_m_s);
    for _ in 0..50_000_000 {
        let (k1x, k1v) = (v, accel(x, v));
        let (k2x, k2v) = (
            v + 0.5 * h * k1v,
            accel(x + 0.5 * h * k1x, v + 0.5 * h * k1v),
        );
        let (k3x, k3v) = (
            v + 0.5 * h * k2v,
            accel(x + 0.5 * h * k2x, v + 0.5 * h * k2v),
        );
        let (k4x, k4v) = (v + h * k3v, accel(x + h * k3x, v + h * k3v));
        let xn = x + h / 6.0 * (k1x + 2.0 * k2x + 2.0 * k3x + k4x);
        let vn = v + h / 6.0 * (k1v + 2.0 * k2v + 2.0 * k3v + k4v);
        if xn - len > s.zone_end_m {
            // Linear interpolation to the crossing (error O(h²·a), far below the tolerance).
            let f = (s.zone_end_m + len - x) / (xn - x);
            return v + f * (vn - v);
        }
        x = xn;
        v = vn;
    }
    panic!("RK4 did not leave the zone");
}

#[test]
fn full_case_against_independent_rk4() {
    // The coaster demo's full case, without thermal feedback, against fixed-step RK4 with
    // h = 20 µs. Tolerance 1e-6 relative on the exit speed.
    let s = eddyzone::scenario::load(
        &Path::new(env!("CARGO_MANIFEST_DIR")).join("scenarios/coaster-brake-run.yaml"),
    )
    .unwrap();
    let t = BrakeTables::build(&s).unwrap();
    let r = simulate_case(&s, &t, &s.cases[0], &no_feedback()).unwrap();
    assert_eq!(r.outcome, Outcome::Cleared);
    let ours = r.exit_speed_m_s.unwrap();
    let theirs = rk4_exit_speed(&s, &t, 0, 2e-5);
    assert!(
        ((ours - theirs) / theirs).abs() < 1e-6,
        "{ours} vs RK4 {theirs}"
    );
}

#[test]
fn rollback_on_an_upgrade() {
    // A vehicle entering an uphill brake too slowly reverses (kinematics: it cannot climb
    // v0²/(2·g·sinθ) metres); the outcome says so and it leaves backwards.
    let text = r#"
name: upgrade
vehicle:
  mass: 3000 kg
  length: 4 m
  fins:
    - { name: fin, offset: 1 m, length: 2 m, height: 200 mm, thickness: 8 mm, material: aluminium-6061-t6 }
sections:
  - { name: S, start: 10 m, length: 3 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: 8 mm, pole_height: 180 mm }
track: { grade: 20 % }
start: { position: 9 m, speed: 3 m/s }
"#;
    let s = scenario(text);
    let t = BrakeTables::build(&s).unwrap();
    let r = simulate_case(&s, &t, &s.cases[0], &RunOptions::default()).unwrap();
    assert!(r.reversed, "{r:?}");
    assert_eq!(r.outcome, Outcome::RolledBack);
    assert!(r.exit_speed_m_s.unwrap() < 0.0);
}

#[test]
fn section_loads_against_momentum_and_the_energy_balance() {
    // Newton's second law on a level track without resistance: the only force along the track
    // is the brakes', so the sections' impulses sum to the momentum change m·(v_exit − v0). The
    // first law: the sections' energies sum to the braking energy of the run's energy balance
    // (the integrator carries it in its state) and to the kinetic energy lost, ½m(v0² − v_exit²).
    // The sections' integrals are 5-point Gauss–Legendre quadrature of the continuous output,
    // independent of the integrator's state; tolerance 1e-8 of the quantity turned over (the
    // solver's tolerances are 1e-10; measured 2e-10 for the impulse, 3e-11 for the energy).
    let text = r#"
name: two sections, level, no resistance
vehicle:
  mass: 600 kg
  length: 4 m
  fins:
    - { name: fin, offset: 1 m, length: 2 m, height: 200 mm, thickness: 8 mm, material: copper-c11000 }
sections:
  - { name: A, start: 10 m, length: 1.5 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: 6 mm, pole_height: 180 mm }
  - { name: B, start: 13 m, length: 2 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.2 T, clearance: 9 mm, pole_height: 180 mm }
start: { position: 5 m, speed: 25 m/s }
resistance: { rolling: 0, drag_area: 0 m^2 }
"#;
    let s = scenario(text);
    let t = BrakeTables::build(&s).unwrap();
    let options = RunOptions {
        section_loads: true,
        ..RunOptions::default()
    };
    let r = simulate_case(&s, &t, &s.cases[0], &options).unwrap();
    assert_eq!(r.outcome, Outcome::Cleared);
    let (m, v0, v1) = (r.mass_kg, 25.0, r.exit_speed_m_s.unwrap());
    assert!(
        v1 < 0.9 * v0 && v1 > 0.0,
        "exit {v1} m/s: the brakes must work"
    );
    assert_eq!(r.sections.len(), 2);
    let impulse: f64 = r.sections.iter().map(|x| x.impulse_n_s).sum();
    let dp = m * (v1 - v0);
    let energy: f64 = r.sections.iter().map(|x| x.energy_j).sum();
    assert!(
        (impulse - dp).abs() < 1e-8 * dp.abs(),
        "impulse {impulse} N·s vs momentum change {dp} N·s"
    );
    let dke = 0.5 * m * (v0 * v0 - v1 * v1);
    assert!(
        (energy - r.braking_energy_j).abs() < 1e-8 * r.braking_energy_j,
        "sections {energy} J vs braking energy {} J",
        r.braking_energy_j
    );
    assert!(
        (energy - dke).abs() < 1e-8 * dke,
        "sections {energy} J vs kinetic energy lost {dke} J"
    );
    // Each section took a share; no peak exceeds the run's peak brake force (sampled) by more
    // than the sampling can miss (1 %).
    let (a, b) = (&r.sections[0], &r.sections[1]);
    assert!(a.energy_j > 0.0 && b.energy_j > 0.0 && a.impulse_n_s < 0.0 && b.impulse_n_s < 0.0);
    for x in &r.sections {
        assert!(x.peak_force_n <= 1.01 * r.peak_brake_force_n, "{x:?}");
        let at = x.peak_force_position_m.unwrap();
        let start = if x.section == "A" { 10.0 } else { 13.0 };
        // The fin (1 m to 3 m behind the front) overlaps the section at the peak.
        assert!(
            at - 3.0 < start + 2.0 && at - 1.0 > start,
            "{} peak at {at} m",
            x.section
        );
    }
    // Without the option the run carries no loads (and prints none).
    let plain = simulate_case(&s, &t, &s.cases[0], &RunOptions::default()).unwrap();
    assert!(plain.sections.is_empty());
}
