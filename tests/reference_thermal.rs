//! Reference checks of fin heating against the first law, the lumped-capacitance cooling law and
//! the layer theory's σ·v scaling. Each test names its source and its tolerance.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::dynamics::BrakeTables;
use eddyzone::scenario::{parse_str, Cycles, Duty, LiftSpeed, MagnetExposure, Mount, Scenario};
use eddyzone::thermal::sheet::SheetLoss;
use eddyzone::thermal::{heat_case, pass, run_pass, HeatOptions};
use std::path::Path;

fn shipped(name: &str) -> Scenario {
    let p = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("scenarios")
        .join(name);
    eddyzone::scenario::load(&p).unwrap_or_else(|e| panic!("{e}"))
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs().max(1e-300)
}

/// First law for lumped bodies (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer,
/// 2007, §1.3 and §5.2): with no cooling during the pass, Σ m·c_p·ΔT over the vehicle fins equals
/// the braking energy ∫ |F_brake·v| dt, with ΔT the mean over the fin's height. Tolerance 1e-6
/// relative (integrator tolerance 1e-10).
#[test]
fn vehicle_fins_take_up_the_braking_energy() {
    let mut s = shipped("coaster-brake-run.yaml");
    s.duty = None;
    let tables = BrakeTables::build(&s).unwrap();
    for case in &s.cases {
        let h = heat_case(&s, &tables, case, &HeatOptions::default()).unwrap();
        let braking = h.cycles[0].braking_energy_j;
        assert!(braking > 1e5, "the demo brakes: {braking} J");
        let sum: f64 = s
            .fins
            .iter()
            .zip(&h.fins)
            .map(|(f, r)| {
                assert!(matches!(f.mount, Mount::Vehicle { .. }));
                let m_kg = f.material.density_kg_m3 * f.length_m * f.height_m * f.thickness_m;
                let rise = r.mean_temperature_c - case.fin_temp_c;
                // Mid-height runs hotter than the mean (resolved across the height), at most by
                // the peak-to-mean ratio of the loss density (no conduction at all).
                let peak_rise = r.peak_temperature_c - case.fin_temp_c;
                let loss = SheetLoss::new(0.050, 0.180, 0.150).unwrap();
                let bound = loss.peak_per_m() * 0.180;
                assert!(
                    peak_rise > 1.05 * rise && peak_rise <= rise * bound + 1e-9,
                    "{peak_rise} K vs mean {rise} K"
                );
                m_kg * f.material.specific_heat_j_kg_k * rise
            })
            .sum();
        assert!(
            rel(sum, braking) < 1e-6,
            "{}: Σ m·c·ΔT = {sum} J vs {braking} J",
            case.name
        );
        // Single pass: steady = first, one cycle.
        assert_eq!(h.cycles_to_steady, Some(1));
        assert_eq!(h.cycles.len(), 1);
    }
}

/// First law along a track fin: ∫ ρ·c_p·t·h_a·ΔT(s) ds over the fin equals the braking energy
/// dissipated in it, and the fins together take up the whole braking energy. h_a is the active
/// height min(fin height, pole height) = min(230 mm, 200 mm) of the demo. Tolerance 1e-6
/// relative. Also: the trapezoid quadrature of the cell energies on the samples, before it is
/// scaled to the integrator's energy, agrees with it to 1e-4 (trapezoid error at 5 ms samples).
#[test]
fn track_fin_rise_integrates_to_the_braking_energy() {
    let mut s = shipped("tower-catch-brake.yaml");
    s.duty = None;
    let tables = BrakeTables::build(&s).unwrap();
    let case = &s.cases[0];
    let h = heat_case(&s, &tables, case, &HeatOptions::default()).unwrap();
    let braking = h.cycles[0].braking_energy_j;
    let mut total = 0.0;
    for (fin, prof) in s.fins.iter().zip(&h.track_profiles) {
        assert_eq!(fin.name, prof.fin);
        let m = &fin.material;
        // The rise is that of the hottest point across the height: the heated height is
        // 1/p_max of the thin-sheet loss density (τ = 60 mm, poles 200 mm), below the active
        // height min(230, 200) mm by the peak-to-mean ratio.
        let loss = SheetLoss::new(0.060, fin.height_m, 0.200).unwrap();
        let heated_m = 1.0 / loss.peak_per_m();
        let fin_result = h.fins.iter().find(|f| f.fin == fin.name).unwrap();
        assert!(rel(fin_result.heated_height_m.unwrap(), heated_m) < 1e-12);
        assert!(heated_m < 0.2 && heated_m > 0.2 / 1.2, "{heated_m}");
        let per_m = m.density_kg_m3 * m.specific_heat_j_kg_k * fin.thickness_m * heated_m;
        let cell = pass::DEFAULT_CELL_M;
        let energy: f64 = prof
            .rise_k
            .iter()
            .enumerate()
            .map(|(k, r)| {
                let c0 = k as f64 * cell;
                let len = fin.length_m.min(c0 + cell) - c0;
                per_m * r * len
            })
            .sum();
        assert!(
            rel(energy, fin_result.energy_per_pass_j) < 1e-6,
            "{}: ∫ρcAΔT ds = {energy} J vs {} J",
            fin.name,
            fin_result.energy_per_pass_j
        );
        assert!(fin_result.quadrature_correction < 1e-4);
        total += energy;
    }
    assert!(rel(total, braking) < 1e-6, "{total} J vs {braking} J");
}

/// Periodic pulse heating of a lumped body: a constant rise ΔT per pass, cooling by Newton's law
/// with τ = m·c_p/(h·A) = ρ·c_p·t/(2h) between passes, peaks at T_amb + (T0 − T_amb)·r^(n−1) +
/// ΔT·(1 − rⁿ)/(1 − r), r = e^(−Δt/τ) (geometric series of lumped-capacitance cooling, Incropera
/// & DeWitt, Fundamentals of Heat and Mass Transfer, 2007, eq. 5.6). With the force coupling off
/// every pass deposits the same heat; after 60 cycles rⁿ < 1e-20, so the last mean over the fin's
/// height must equal the closed-form steady value to 1e-9 K (rounding of 60 cooling steps). With `until_steady` the stop
/// rule (change < 0.1 K) leaves the peak within 0.1·r/(1 − r) K of the steady value.
#[test]
fn duty_loop_matches_the_geometric_series() {
    let mut s = shipped("coaster-brake-run.yaml");
    s.cases.truncate(1);
    let (interval_s, h_w, amb) = (240.0, 40.0, 25.0);
    s.duty = Some(Duty {
        interval_s,
        cycles: Cycles::Count(60),
        ambient_c: amb,
        film_coefficient_w_m2_k: h_w,
        lift: None,
        magnets: MagnetExposure::default(),
    });
    let tables = BrakeTables::build(&s).unwrap();
    let case = &s.cases[0];
    let opts = HeatOptions {
        coupling: false,
        ..HeatOptions::default()
    };
    let h = heat_case(&s, &tables, case, &opts).unwrap();
    assert_eq!(h.cycles.len(), 60);
    for (fin, r) in s.fins.iter().zip(&h.fins) {
        let m = &fin.material;
        let tau = m.density_kg_m3 * m.specific_heat_j_kg_k * fin.thickness_m / (2.0 * h_w);
        let ratio = (-interval_s / tau).exp();
        // The mean over the height is the lumped body (uniform film coefficient on both faces).
        let capacity = m.density_kg_m3
            * m.specific_heat_j_kg_k
            * fin.length_m
            * fin.height_m
            * fin.thickness_m;
        let rise = r.energy_per_pass_j / capacity;
        let steady = amb + rise / (1.0 - ratio);
        assert!(
            (r.steady_mean_temperature_c - steady).abs() < 1e-9,
            "{}: {} vs {steady}",
            fin.name,
            r.steady_mean_temperature_c
        );
        // Cycle 3 from the closed form with T0 = case fin temperature.
        let n = 3;
        let t3 = amb
            + (case.fin_temp_c - amb) * ratio.powi(n - 1)
            + rise * (1.0 - ratio.powi(n)) / (1.0 - ratio);
        let i = s.fins.iter().position(|f| f.name == fin.name).unwrap();
        assert!((h.cycles[2].fin_means_c[i] - t3).abs() < 1e-9);
        // The hottest cell stays above the mean by about the single-pass excess.
        assert!(r.steady_peak_temperature_c > r.steady_mean_temperature_c);
    }
    // Until steady: stopped by the 0.1 K rule, within its bound of the steady value.
    s.duty = Some(Duty {
        cycles: Cycles::UntilSteady { max_cycles: 500 },
        ..s.duty.unwrap()
    });
    let h2 = heat_case(&s, &tables, &s.cases[0], &opts).unwrap();
    let n = h2.cycles_to_steady.expect("reaches a steady state");
    assert!(n > 2 && (n as usize) == h2.cycles.len());
    for (r, r60) in h2.fins.iter().zip(&h.fins) {
        let fin = s.fins.iter().find(|f| f.name == r.fin).unwrap();
        let m = &fin.material;
        let tau = m.density_kg_m3 * m.specific_heat_j_kg_k * fin.thickness_m / (2.0 * h_w);
        let ratio = (-interval_s / tau).exp();
        let bound = 0.1 * ratio / (1.0 - ratio) + 1e-9;
        assert!((r.steady_peak_temperature_c - r60.steady_peak_temperature_c).abs() <= bound);
    }
}

/// One coaster-like pair on a level track at a chosen entry speed.
fn level(mass: &str, speed: &str, sections: u32) -> Scenario {
    let text = format!(
        r#"
name: sign of the coupling
vehicle:
  mass: {mass}
  length: 3 m
  fins:
    - {{ name: fin, offset: 0.5 m, length: 1.2 m, height: 180 mm, thickness: 9 mm, material: aluminium-6061-t6 }}
sections:
  - name: B
    start: 10 m
    length: 1.0 m
    repeat: {{ count: {sections}, pitch: 1.2 m }}
    pole_pitch: 50 mm
    magnet_thickness: 12 mm
    magnet_fill: 0.85
    remanence: 1.25 T
    clearance: 6 mm
    pole_height: 150 mm
start: {{ position: 5 m, speed: {speed} }}
"#
    );
    parse_str(&text, "<test>", None).unwrap_or_else(|e| panic!("{e}"))
}

fn exit_speed(s: &Scenario, start_c: f64) -> f64 {
    let tables = BrakeTables::build(s).unwrap();
    let states = pass::uniform_states(s, start_c, pass::DEFAULT_CELL_M);
    let p = run_pass(s, &tables, &s.cases[0], &states, true, 1e-3).unwrap();
    p.run.exit_speed_m_s.expect("clears the zone")
}

/// The sign of the coupling. Layer theory (the drag depends on σ and v only through σ·v, and is
/// ∝ σ·v below the critical speed): a fin at 100 °C has σ lower by 1/(1 + α·80) ≈ 0.78 for
/// 6061, so below the critical speed (this geometry: about 8.4 m/s at 20 °C, higher when hot) it
/// brakes less and the exit speed is higher. Well above the critical speed the drag falls as σ·v
/// grows, so the hot fin brakes more and the exit speed is lower. Strict inequality, no tolerance.
#[test]
fn hot_fin_brakes_less_below_and_more_above_the_critical_speed() {
    let slow = level("10 t", "4 m/s", 2);
    let (cold, hot) = (exit_speed(&slow, 20.0), exit_speed(&slow, 100.0));
    assert!(cold > 0.0 && cold < 4.0);
    assert!(hot > cold, "below critical: hot {hot} vs cold {cold}");
    let fast = level("2 t", "35 m/s", 1);
    let (cold, hot) = (exit_speed(&fast, 20.0), exit_speed(&fast, 100.0));
    assert!(cold > 12.0, "stays above the hot critical speed: {cold}");
    assert!(hot < cold, "above critical: hot {hot} vs cold {cold}");
}

/// A lift pass after every drop (tower demo, `duty.lift.speed: 1 m/s`): its heat enters the duty
/// cycle, so the steady peak is higher than without it; power = drag × speed; the magnets face
/// the fins for the lift's time in the brake too, so their estimated rise grows. The first law
/// of the lift itself (∫ drag dx = heat in the fins) is checked in `thermal::lift`.
#[test]
fn lift_pass_heats_the_fins_and_reports_its_drag() {
    let mut s = shipped("tower-catch-brake.yaml");
    if let Some(d) = s.duty.as_mut() {
        d.lift = None;
    }
    let tables = BrakeTables::build(&s).unwrap();
    let case = &s.cases[0];
    let plain = heat_case(&s, &tables, case, &HeatOptions::default()).unwrap();
    let mut lifted_s = s.clone();
    if let Some(d) = lifted_s.duty.as_mut() {
        d.lift = Some(LiftSpeed::Constant(1.0));
    }
    let lifted = heat_case(&lifted_s, &tables, case, &HeatOptions::default()).unwrap();
    let lift = lifted.lift.expect("a lift pass");
    assert!(lift.energy_j > 0.0 && lift.peak_drag_n > 0.0);
    assert!((lift.peak_power_w - lift.peak_drag_n * 1.0).abs() < 1e-12);
    eprintln!(
        "lift 1 m/s: drag {:.0} N, heat {:.0} J, {:.1} s in the brake, steady peak {:.2} vs {:.2} °C",
        lift.peak_drag_n,
        lift.energy_j,
        lift.time_in_brake_s,
        lifted.steady_peak_fin_temperature_c,
        plain.steady_peak_fin_temperature_c
    );
    assert!(lifted.steady_peak_fin_temperature_c > plain.steady_peak_fin_temperature_c);
    assert!(plain.lift.is_none());
    let (rise, rise_lifted) = (plain.magnet_rise.unwrap(), lifted.magnet_rise.unwrap());
    assert!(rise_lifted.mean_k > rise.mean_k);
    assert!((lifted.judged_magnet_temp_c - case.magnet_temp_c - rise_lifted.mean_k).abs() < 1e-12);
}
