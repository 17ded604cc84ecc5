//! Failures of a run carry a typed cause, and the solver settings default to the scenario's
//! solver block.

use super::*;
use crate::dynamics::Quantity;
use crate::physics::PhysicsError;
use crate::scenario::{parse_str, Arrangement, ForceSource, MeasuredForce};

use crate::scenario::shipped;

/// A small brake run: one fin repeated `fins` times on the vehicle, three sections.
fn scenario(fins: usize) -> Scenario {
    let text = format!(
        r#"name: errors
start: {{ position: 5 m, speed: 12 m/s }}
vehicle:
  mass: 2000 kg
  length: 200 m
  fins:
    - {{ name: fin, offset: 1 m, length: 1 m, height: 200 mm, thickness: 8 mm,
        material: aluminium-6061-t6, repeat: {{ count: {fins}, pitch: 1.5 m }} }}
sections:
  - {{ name: S, start: 10 m, length: 1.5 m, pole_pitch: 50 mm, magnet_thickness: 12 mm,
      magnet_fill: 0.9, remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm,
      repeat: {{ count: 3, pitch: 2 m }} }}
track: {{ grade: 0 % }}
time_limit: 20 s
"#
    );
    parse_str(&text, "<errors>", None).expect("valid scenario")
}

#[test]
fn too_many_fins_is_a_typed_cause() {
    let s = scenario(MAX_FINS + 1);
    let tables = BrakeTables::build(&s).expect("tables");
    let err = simulate_case(&s, &tables, &s.cases[0], &RunOptions::default())
        .expect_err("more fins than the state holds");
    assert!(matches!(
        err,
        DynamicsError::Integration {
            cause: IntegrationCause::TooManyFins { fins: 61, max: 60 },
            ..
        }
    ));
    // The most fins the state holds still run.
    let s = scenario(MAX_FINS);
    let tables = BrakeTables::build(&s).expect("tables");
    assert!(simulate_case(&s, &tables, &s.cases[0], &RunOptions::default()).is_ok());
}

#[test]
fn a_non_finite_rate_names_the_quantity() {
    let mut s = scenario(1);
    s.cases[0].mass_kg = f64::NAN;
    let tables = BrakeTables::build(&s).expect("tables");
    let err = simulate_case(&s, &tables, &s.cases[0], &RunOptions::default())
        .expect_err("a NaN mass cannot run");
    let DynamicsError::Integration { case, t_s, cause } = &err else {
        panic!("an integration error, got {err}")
    };
    assert_eq!((case, *t_s), (&s.cases[0].name, 0.0));
    assert_eq!(cause, &IntegrationCause::NonFinite(Quantity::Acceleration));
    assert!(err.to_string().contains("acceleration"), "{err}");
}

#[test]
fn physics_errors_keep_their_source() {
    let mut s = scenario(1);
    s.sections[1].force = ForceSource::Measured(MeasuredForce {
        points: vec![(1.0, -5.0)],
        fin_temp_c: 20.0,
        magnet_temp_c: 20.0,
    });
    let err = BrakeTables::build(&s).expect_err("a negative measured force");
    let DynamicsError::Physics { fin, section, .. } = &err else {
        panic!("a physics error, got {err}")
    };
    assert_eq!((fin.as_str(), section.as_str()), ("fin", "S-2"));
    let source = std::error::Error::source(&err).expect("the physics error as source");
    assert!(matches!(
        source.downcast_ref::<PhysicsError>(),
        Some(PhysicsError::Negative { .. })
    ));
}

#[test]
fn inconsistent_mounting_is_its_own_error() {
    let mut s = scenario(1);
    s.arrangement = Arrangement::MagnetsOnVehicle;
    assert!(matches!(
        BrakeTables::build(&s),
        Err(DynamicsError::Mounting { .. })
    ));
}

/// No solver settings in the options means the scenario's block: the same run, bit for bit;
/// other tolerances change the step count.
#[test]
fn solver_settings_default_to_the_block() {
    let s = scenario(2);
    let tables = BrakeTables::build(&s).expect("tables");
    let run = |solver| {
        let options = RunOptions {
            solver,
            ..RunOptions::default()
        };
        simulate_case(&s, &tables, &s.cases[0], &options).expect("runs")
    };
    let by_default = run(None);
    let from_block = run(Some(SolverSettings::from_block(&s.solver)));
    assert_eq!(by_default.steps, from_block.steps);
    assert_eq!(by_default.rhs_evaluations, from_block.rhs_evaluations);
    assert_eq!(by_default.exit_speed_m_s, from_block.exit_speed_m_s);
    let loose = run(Some(SolverSettings {
        rtol: 1e-6,
        atol: 1e-6,
        ..SolverSettings::from_block(&s.solver)
    }));
    assert!(loose.steps < by_default.steps);
}

/// A pin on the work of one run, so that a silent slow-down fails: the small benchmark case
/// (benches/data/small-coaster.yaml) takes 292 right-hand-side evaluations and 40 steps with
/// the default settings. More is a regression; fewer (a better step control) should update the
/// pin — the 5 % band below it keeps the pin honest. Its energy residual stays below 1e-6 of the
/// braking energy (the accuracy the pin must not be bought with).
#[test]
fn right_hand_side_count_of_the_small_case_is_pinned() {
    const RHS: usize = 292;
    let s = shipped("benches/data/small-coaster.yaml");
    let tables = BrakeTables::build(&s).expect("tables");
    let r = simulate_case(&s, &tables, &s.cases[0], &RunOptions::default()).expect("runs");
    let rhs = r.rhs_evaluations as usize;
    assert!(
        rhs <= RHS && rhs * 100 >= RHS * 95,
        "{rhs} right-hand-side evaluations (pinned {RHS}), {} steps",
        r.steps
    );
    assert!(r.energy_residual_j.abs() <= 1e-6 * r.braking_energy_j);
}

/// Pieces end on the continuous output where a step's end comes within 1 % of the kink (steps
/// are aimed at the kinks), not on a re-step to each located kink. Checked by self-convergence
/// (the run against the same integration at rtol = atol = 1e-13, Hairer, Nørsett & Wanner 1993,
/// §II.4 on tolerance proportionality): on the coaster demo (9 cases; 5 fins past 7 sections,
/// 140 kinks) every case's exit speed, time in the zone and braking energy stay within 1e-10 of
/// the tight solve and the peak deceleration within 1e-9 (measured with aimed steps: 2.3e-11,
/// 2.7e-11, 1.9e-11, 3.2e-12; with a re-step at every kink: 2.1e-11, 2.6e-11, 2.9e-11,
/// 6.3e-10), and the energy residual below 1e-10 of the braking energy (measured ≤ 1.7e-11;
/// re-stepped ≤ 2.4e-11).
#[test]
fn runs_ending_pieces_near_step_ends_match_a_tight_solve() {
    let s = shipped("scenarios/coaster-brake-run.yaml");
    let tables = BrakeTables::build(&s).expect("tables");
    let tight = RunOptions {
        solver: Some(SolverSettings {
            rtol: 1e-13,
            atol: 1e-13,
            ..SolverSettings::from_block(&s.solver)
        }),
        ..RunOptions::default()
    };
    let rel = |a: Option<f64>, b: Option<f64>| {
        let (a, b) = (a.expect("a value"), b.expect("a value"));
        (a - b).abs() / b.abs()
    };
    for case in &s.cases {
        let r = simulate_case(&s, &tables, case, &RunOptions::default()).expect("runs");
        let t = simulate_case(&s, &tables, case, &tight).expect("runs");
        let name = &case.name;
        assert!(
            rel(r.exit_speed_m_s, t.exit_speed_m_s) <= 1e-10,
            "{name}: exit speed"
        );
        assert!(
            rel(r.time_in_zone_s, t.time_in_zone_s) <= 1e-10,
            "{name}: time in zone"
        );
        let energy = rel(Some(r.braking_energy_j), Some(t.braking_energy_j));
        assert!(energy <= 1e-10, "{name}: braking energy {energy:e}");
        let peak = rel(r.peak_decel_m_s2, t.peak_decel_m_s2);
        assert!(peak <= 1e-9, "{name}: peak deceleration {peak:e}");
        assert!(
            r.energy_residual_j.abs() <= 1e-10 * r.braking_energy_j,
            "{name}: energy residual {} J",
            r.energy_residual_j
        );
        assert!(r.rhs_evaluations < t.rhs_evaluations);
    }
}

/// Two kinks a hair apart (the second section starts 1.5e-12 m after the first ends: above the
/// 1e-12 m at which kinks merge) give a piece far shorter than a step, here 3e-13 s long at
/// t ≈ 200 s, below the stepper's resolution of the time there (a step h with 0.1·h ≤ ε·t
/// underflows). It is not aimed at: the run completes and matches the run with the sections
/// touching, to 1e-9 (the gap changes the brake's work by ~1e-12 of itself).
#[test]
fn kinks_a_hair_apart_are_crossed_not_aimed_at() {
    let text = |second_start: &str| {
        format!(
            r#"name: hair
start: {{ position: -2400 m, speed: 12 m/s }}
vehicle:
  mass: 2000 kg
  length: 3 m
  fins:
    - {{ name: fin, offset: 1 m, length: 1 m, height: 200 mm, thickness: 8 mm,
        material: aluminium-6061-t6 }}
sections:
  - {{ name: A, start: 10 m, length: 1.5 m, pole_pitch: 50 mm, magnet_thickness: 12 mm,
      magnet_fill: 0.9, remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm }}
  - {{ name: B, start: {second_start}, length: 1.5 m, pole_pitch: 50 mm, magnet_thickness: 12 mm,
      magnet_fill: 0.9, remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm }}
track: {{ grade: 0 % }}
time_limit: 400 s
"#
        )
    };
    let run = |second_start: &str| {
        let s = parse_str(&text(second_start), "<hair>", None).expect("valid scenario");
        let tables = BrakeTables::build(&s).expect("tables");
        simulate_case(&s, &tables, &s.cases[0], &RunOptions::default()).expect("runs")
    };
    let apart = run("11.5000000000015 m");
    let touching = run("11.5 m");
    let (a, b) = (
        apart.exit_speed_m_s.expect("exits"),
        touching.exit_speed_m_s.expect("exits"),
    );
    assert!((a - b).abs() <= 1e-9 * b.abs(), "{a} vs {b}");
    assert!(apart.energy_residual_j.abs() <= 1e-10 * apart.braking_energy_j);
}

/// The table range: no sample of any case of the shipped demos is faster than the energy bound
/// (energy conservation with dissipative brakes and resistance), and the free fall of the tower
/// demo comes within 30 % of it.
#[test]
fn reachable_speed_bounds_every_demo_run() {
    for name in ["coaster-brake-run", "tower-catch-brake", "coaster-plan"] {
        let s = shipped(&format!("scenarios/{name}.yaml"));
        let bound = crate::dynamics::model::reachable_speed_m_s(&s);
        let tables = BrakeTables::build(&s).expect("tables");
        let options = RunOptions {
            sampling: crate::dynamics::Sampling::Full,
            ..RunOptions::default()
        };
        let mut fastest: f64 = 0.0;
        for case in &s.cases {
            let r = simulate_case(&s, &tables, case, &options).expect("runs");
            fastest = r
                .samples
                .iter()
                .map(|x| x.v_m_s.abs())
                .fold(fastest, f64::max);
        }
        assert!(fastest <= bound, "{name}: {fastest} > {bound}");
        if name == "tower-catch-brake" {
            assert!(fastest >= bound / 1.4, "{name}: {fastest} ≪ {bound}");
        }
    }
}

/// Mirror fins (the tower demo's east and west fins with their magnet units): found for the
/// nominal cases, not when one unit of one side is out. A run that evaluates each mirrored
/// force once equals the run with the mirror broken — the west pairs given a copy of the same
/// table under another pointer, so every pair is evaluated — to 1e-12 relative (the sum over
/// pairs is taken in another order).
#[test]
fn mirror_fins_run_as_every_pair_evaluated() {
    use crate::dynamics::model::{active_pairs, mirror_fins, PairLaw};
    let s = shipped("scenarios/tower-catch-brake.yaml");
    let tables = BrakeTables::build(&s).expect("tables");
    let full = &s.cases[0];
    assert_eq!(
        mirror_fins(&active_pairs(&s, &tables, full), 2),
        vec![None, Some(0)]
    );
    let one_out = s
        .cases
        .iter()
        .find(|c| !c.disabled.is_empty())
        .expect("an N-1 case");
    assert_eq!(
        mirror_fins(&active_pairs(&s, &tables, one_out), 2),
        vec![None, None]
    );
    let mut broken = tables.clone();
    for p in broken.pairs.iter_mut().filter(|p| p.fin == 1) {
        if let PairLaw::Table { table, .. } = &mut p.law {
            *table = std::sync::Arc::new((**table).clone());
        }
    }
    assert_eq!(
        mirror_fins(&active_pairs(&s, &broken, full), 2),
        vec![None, None]
    );
    let options = RunOptions::default();
    let a = simulate_case(&s, &tables, full, &options).expect("runs");
    let b = simulate_case(&s, &broken, full, &options).expect("runs");
    let close = |x: f64, y: f64| (x - y).abs() <= 1e-12 * x.abs().max(y.abs()).max(1.0);
    let (ea, eb) = (
        a.exit_speed_m_s.expect("exits"),
        b.exit_speed_m_s.expect("exits"),
    );
    assert!(close(ea, eb), "{ea} vs {eb}");
    assert!(close(a.braking_energy_j, b.braking_energy_j));
    for (fa, fb) in a.fins.iter().zip(&b.fins) {
        assert!(
            close(fa.energy_j, fb.energy_j),
            "{} vs {}",
            fa.energy_j,
            fb.energy_j
        );
    }
    assert_eq!(a.fins[0].energy_j, a.fins[1].energy_j);
}

/// Two fins 1.5 m long over sections of two designs (A, A, B, A with 0.3 m gaps, so a fin
/// often spans two sections: A with A, A with B): the grouped right-hand side
/// ([`Ctx::law_group`], one force per metre for consecutive pairs of a fin and a law) against
/// the per-pair sum written out here, each pair's force per metre times its overlap.
fn two_design_run() -> Scenario {
    let a = "pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9, remanence: 1.2 T, \
             pole_height: 180 mm";
    let text = format!(
        r#"name: groups
start: {{ position: 8 m, speed: 16 m/s }}
vehicle:
  mass: 3000 kg
  length: 6 m
  fins:
    - {{ name: fin, offset: 0.5 m, length: 1.5 m, height: 200 mm, thickness: 8 mm,
        material: aluminium-6061-t6, repeat: {{ count: 2, pitch: 2.5 m }} }}
sections:
  - {{ name: A, start: 10 m, length: 1 m, clearance: 5 mm, {a},
      repeat: {{ count: 2, pitch: 1.3 m }} }}
  - {{ name: B, start: 12.6 m, length: 1 m, clearance: 7 mm, {a} }}
  - {{ name: C, start: 13.9 m, length: 1 m, clearance: 5 mm, {a} }}
track: {{ grade: 0 % }}
time_limit: 20 s
"#
    );
    parse_str(&text, "<groups>", None).expect("valid scenario")
}

/// The fins start at 20 °C and 70 °C and heat up (thermal feedback).
fn two_temperatures() -> RunOptions {
    RunOptions {
        fin_start_temps_c: Some(vec![20.0, 70.0]),
        ..RunOptions::default()
    }
}

/// Reference: the right-hand side's brake terms as the sum over the piece's pairs, each
/// evaluated on its own (force per metre at the fin's temperature times the overlap). At front
/// positions every 2 cm over the zone, with fin energies that differ (and so temperatures that
/// differ from the fins' starts), the grouped evaluation agrees to 1e-13 relative; some pieces
/// reuse a force (A with A under one fin) and some cannot (A with B under one fin).
#[test]
fn grouped_right_hand_side_is_the_per_pair_sum() {
    use super::context::CaseSetup;
    use super::pieces::{piece, Frozen};
    let s = two_design_run();
    let tables = BrakeTables::build(&s).expect("tables");
    let options = two_temperatures();
    let setup = CaseSetup::new(&s, &tables, &s.cases[0], &options);
    let ctx = &setup.ctx;
    let mut fr = Frozen::empty(&setup.track);
    let (mut reused, mut other_design) = (0, 0);
    for k in 0..700 {
        let x = 10.0 + 0.02 * f64::from(k) + 1e-4;
        let (lo, hi) = piece(&setup.kinks, x, 1.0);
        fr.refreeze(ctx, &setup.track, lo, hi, x, 1.0);
        let mut y = [0.0; 8];
        (y[0], y[1], y[4], y[5]) = (x, 13.0 - 0.01 * f64::from(k), 3e3 * f64::from(k), 5e2);
        let mut dy = [0.0; 8];
        ctx.eval(&fr, &y, &mut dy);
        let (mut brake, mut heat) = (0.0, [0.0; 2]);
        for &(p, a, b) in &fr.pairs {
            let pair = &ctx.pairs[p];
            let f = pair.force_per_m_n(y[1], ctx.fin_temp(pair.spec.fin, &y)) * (a + b * x);
            brake += f;
            heat[pair.spec.fin] += f * y[1];
        }
        let close = |u: f64, w: f64| (u - w).abs() <= 1e-13 * u.abs().max(w.abs());
        assert!(
            close(dy[2], brake * y[1]),
            "x = {x}: {} vs {}",
            dy[2],
            brake * y[1]
        );
        assert!(close(dy[4], heat[0]) && close(dy[5], heat[1]), "x = {x}");
        for (w, &reuse) in fr.pairs.windows(2).zip(fr.reuse.iter().skip(1)) {
            let (p, q) = (&ctx.pairs[w[0].0], &ctx.pairs[w[1].0]);
            if reuse {
                reused += 1;
            } else if p.spec.fin == q.spec.fin {
                other_design += 1;
            }
        }
    }
    assert!(reused > 0 && other_design > 0, "{reused} {other_design}");
    // The two fins are at different temperatures: no force is shared between them.
    assert!(ctx.fin_temp(0, &[0.0; 8]) != ctx.fin_temp(1, &[0.0; 8]));
}

/// The whole run with grouping equals the run with every pair evaluated on its own (each pair
/// given its own copy of the table under another pointer, so no two pairs share a law): exit
/// speed, energies, fin heat and every sample to 1e-13 relative.
#[test]
fn grouped_run_equals_the_run_of_every_pair() {
    use crate::dynamics::model::PairLaw;
    let s = two_design_run();
    let tables = BrakeTables::build(&s).expect("tables");
    let mut apart = tables.clone();
    for p in &mut apart.pairs {
        if let PairLaw::Table { table, .. } = &mut p.law {
            *table = std::sync::Arc::new((**table).clone());
        }
    }
    let options = two_temperatures();
    let a = simulate_case(&s, &tables, &s.cases[0], &options).expect("runs");
    let b = simulate_case(&s, &apart, &s.cases[0], &options).expect("runs");
    let close = |x: f64, y: f64| (x - y).abs() <= 1e-13 * x.abs().max(y.abs());
    assert!(a.braking_energy_j > 1e4, "{}", a.braking_energy_j);
    assert_eq!(a.outcome, crate::dynamics::Outcome::Cleared);
    assert_eq!(a.samples.len(), b.samples.len());
    assert_eq!(a.rhs_evaluations, b.rhs_evaluations);
    assert!(close(
        a.exit_speed_m_s.expect("exits"),
        b.exit_speed_m_s.expect("exits")
    ));
    assert!(close(a.braking_energy_j, b.braking_energy_j));
    for (fa, fb) in a.fins.iter().zip(&b.fins) {
        assert!(
            close(fa.energy_j, fb.energy_j),
            "{} vs {}",
            fa.energy_j,
            fb.energy_j
        );
    }
    for (sa, sb) in a.samples.iter().zip(&b.samples) {
        assert!(close(sa.v_m_s, sb.v_m_s) && close(sa.brake_force_n + 1.0, sb.brake_force_n + 1.0));
    }
}
