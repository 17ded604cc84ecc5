//! `eddyzone sweep` end to end, and the sweep's statistics against independent computations:
//! the worst sample written as a scenario that `check` reproduces exactly, the same seed giving
//! the same bytes, quantiles of a monotone output equal to single runs at the input's quantiles,
//! and the failure-probability interval covering a known probability in at least 95 % of
//! repeated seeded sweeps.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::scenario::{parse_str, Scenario};
use eddyzone::study::{JudgeOptions, Silent, Study};
use eddyzone::sweep::run_sweep;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn eddyzone(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_eddyzone"))
        .args(args)
        .output()
        .expect("the binary runs")
}

/// The sweep demo's zone with `block` as its sweep block.
fn demo_with(block: &str) -> String {
    let text = std::fs::read_to_string(root().join("scenarios/coaster-sweep.yaml")).unwrap();
    let (zone, _) = text.split_once("\nsweep:").unwrap();
    let limits = root().join("scenarios/limits/coaster-seated-example.yaml");
    let zone = zone.replace(
        "limits_file: limits/coaster-seated-example.yaml",
        &format!("limits_file: {}", limits.display()),
    );
    format!("{zone}\n{block}")
}

fn scenario_with(block: &str) -> Scenario {
    parse_str(&demo_with(block), "<test>", None).unwrap()
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

const SMALL: &str = "sweep:
  case: full
  method: latin_hypercube
  samples: 40
  seed: 5
  inputs:
    mass: { distribution: uniform, min: 6.8 t, max: 7.8 t }
    speed: { distribution: normal, mean: 77 km/h, std: 2 km/h, min: 70 km/h, max: 84 km/h }
    clearance: { distribution: discrete, values: [5.5 mm, 6.5 mm] }
    fin_conductivity: { distribution: discrete, values: [24 MS/m, 26 MS/m], scope: each }
    magnet_temp: { distribution: triangular, min: 5 °C, mode: 25 °C, max: 45 °C }
    force_factor: { distribution: normal, mean: 1.0, std: 0.05, min: 0.85, max: 1.15 }
";

#[test]
fn check_reproduces_the_worst_sample_exactly() {
    let dir = tempfile::tempdir().unwrap();
    let s = write(dir.path(), "s.yaml", &demo_with(SMALL));
    let worst = dir.path().join("worst.yaml");
    let csv = dir.path().join("samples.csv");
    let o = eddyzone(&[
        "sweep",
        s.to_str().unwrap(),
        "--json",
        "--write-worst",
        worst.to_str().unwrap(),
        "--csv",
        csv.to_str().unwrap(),
    ]);
    assert!(
        o.status.code() == Some(0) || o.status.code() == Some(1),
        "{o:?}"
    );
    let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let w = j["worst"].as_u64().unwrap() as usize;
    // `check` on the written file gives the verdict the sweep reports for its worst sample.
    let c = eddyzone(&["check", worst.to_str().unwrap(), "--json"]);
    let cj: serde_json::Value = serde_json::from_slice(&c.stdout).unwrap();
    assert_eq!(cj, j["worst_verdict"]);
    assert_eq!(
        c.status.code(),
        Some(if cj["pass"] == true { 0 } else { 1 })
    );
    // The file holds the sample's inputs bit for bit (the CSV writes shortest round-trip
    // numbers).
    let text = std::fs::read_to_string(&csv).unwrap();
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let row: Vec<&str> = lines.nth(w).unwrap().split(',').collect();
    let col = |name: &str| -> f64 {
        row[header.iter().position(|h| *h == name).unwrap()]
            .parse()
            .unwrap()
    };
    let back = eddyzone::scenario::load(&worst).unwrap();
    let case = &back.cases[0];
    assert_eq!(back.cases.len(), 1);
    assert!(back.sweep.is_none());
    assert_eq!(case.mass_kg, col("mass_kg"));
    assert_eq!(case.start_speed_m_s, col("start_speed_m_s"));
    assert_eq!(case.magnet_temp_c, col("magnet_temp_c"));
    assert_eq!(case.force_factor, col("force_factor"));
    for sec in &back.sections {
        assert_eq!(sec.design().unwrap().clearance_m, col("clearance_m"));
    }
    for f in &back.fins {
        let name = format!("fin_conductivity_s_m[{}]", f.name);
        assert_eq!(f.material.conductivity_s_m, col(&name));
    }
    // The sweep's own row agrees with the re-judged file to the table interpolation (its tables
    // reach the speed of all samples): 1e-6 relative (project tolerance).
    let sweep_exit = col("exit_speed_m_s");
    let rows = cj["cases"][0]["checks"].as_array().unwrap();
    let exit = rows
        .iter()
        .find(|r| r["check"] == "exit_speed_min")
        .unwrap();
    let check_exit = exit["value"].as_f64().unwrap();
    assert!(
        ((sweep_exit - check_exit) / check_exit).abs() < 1e-6,
        "{sweep_exit} vs {check_exit}"
    );
}

#[test]
fn same_seed_same_bytes() {
    let dir = tempfile::tempdir().unwrap();
    let s = write(dir.path(), "s.yaml", &demo_with(SMALL));
    let run = |csv: &Path| {
        let o = eddyzone(&[
            "sweep",
            s.to_str().unwrap(),
            "--json",
            "--csv",
            csv.to_str().unwrap(),
        ]);
        (o.stdout, std::fs::read(csv).unwrap())
    };
    let (a_json, a_csv) = run(&dir.path().join("a.csv"));
    let (b_json, b_csv) = run(&dir.path().join("b.csv"));
    assert_eq!(a_json, b_json);
    assert_eq!(a_csv, b_csv);
    // Another seed draws other samples.
    let other = write(
        dir.path(),
        "t.yaml",
        &demo_with(&SMALL.replace("seed: 5", "seed: 6")),
    );
    let o = eddyzone(&["sweep", other.to_str().unwrap(), "--json"]);
    assert_ne!(o.stdout, a_json);
}

#[test]
fn a_bad_sweep_block_names_file_line_and_field() {
    let dir = tempfile::tempdir().unwrap();
    let bad = SMALL.replace("distribution: uniform", "distribution: gaussian");
    let s = write(dir.path(), "bad.yaml", &demo_with(&bad));
    let o = eddyzone(&["sweep", s.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("bad.yaml:"), "{err}");
    assert!(err.contains("sweep.inputs.mass.distribution"), "{err}");
    assert!(err.contains("'gaussian' is not a distribution"), "{err}");
    // An unbounded normal whose tail reaches a negative mass is refused before any work.
    let neg = SMALL.replace(
        "mass: { distribution: uniform, min: 6.8 t, max: 7.8 t }",
        "mass: { distribution: normal, mean: 1 t, std: 0.2 t }",
    );
    let s = write(dir.path(), "neg.yaml", &demo_with(&neg));
    let o = eddyzone(&["sweep", s.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("sweep.inputs.mass") && err.contains("min and max"),
        "{err}"
    );
    // A start position whose draws reach the magnets (the zone starts at 20 m) is refused.
    let pos = SMALL.replace(
        "    mass: {",
        "    position: { distribution: uniform, min: 14 m, max: 25 m }\n    mass: {",
    );
    let s = write(dir.path(), "pos.yaml", &demo_with(&pos));
    let o = eddyzone(&["sweep", s.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("sweep.inputs.position") && err.contains("over section"),
        "{err}"
    );
    // Unbounded work is refused up front.
    let big = SMALL.replace("samples: 40", "samples: 5000000");
    let s = write(dir.path(), "big.yaml", &demo_with(&big));
    let o = eddyzone(&["sweep", s.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("sweep.samples"));
}

/// Exit speed rises with entry speed, so its quantiles over a sweep of the entry speed alone are
/// the exit speeds of single runs at the entry speed's quantiles (exact for a monotone map), to
/// the sampling error of a 400-point Latin hypercube: the input quantile is within 1/400 of its
/// range (0.025 km/h), so 0.02 m/s of exit speed.
#[test]
fn monotone_output_quantiles_are_single_runs_at_input_quantiles() {
    let s = scenario_with(
        "sweep:
  case: full
  method: latin_hypercube
  samples: 400
  seed: 3
  inputs:
    speed: { distribution: uniform, min: 70 km/h, max: 80 km/h }
",
    );
    let r = run_sweep(&s, &JudgeOptions::default(), &Silent).unwrap();
    let exit = r
        .summaries
        .iter()
        .find(|c| c.check.key == "exit_speed_min")
        .unwrap();
    let spread = exit.spread.as_ref().unwrap();
    let base = s.case("full").unwrap().clone();
    for (p, q) in [(0.05, spread.p5), (0.5, spread.p50), (0.95, spread.p95)] {
        let mut single = s.clone();
        single.sweep = None;
        let mut c = base.clone();
        c.start_speed_m_s = (70.0 + 10.0 * p) / 3.6;
        single.cases = vec![c];
        let run = Study::new(single)
            .unwrap()
            .run(&Default::default())
            .unwrap();
        let v = run[0].exit_speed_m_s.unwrap();
        assert!(
            (v - q).abs() < 0.02,
            "P{}: single run {v} vs sweep {q}",
            p * 100.0
        );
    }
    // The ranking puts the one input first, with ρ = 1 (monotone).
    assert_eq!(exit.sensitivity[0].variable, "start_speed_m_s");
    assert!((exit.sensitivity[0].spearman - 1.0).abs() < 1e-12);
}

/// The magnet grade check fails exactly when the magnet temperature is above the grade's 120 °C
/// (N40H): with the temperature uniform on [100, 130] °C the true failure probability is 1/3.
/// Over 200 seeded Monte Carlo sweeps of 30 samples the 95 % Clopper–Pearson interval must cover
/// 1/3 in at least 95 % of them (it is exact: coverage ≥ 95 % for every n and p; Clopper &
/// Pearson 1934).
#[test]
fn failure_interval_covers_a_known_probability() {
    let mut covered = 0;
    let mut wilson_covered = 0;
    let reps = 200;
    for seed in 0..reps {
        let s = scenario_with(&format!(
            "sweep:
  case: full
  method: monte_carlo
  samples: 30
  seed: {seed}
  inputs:
    magnet_temp: {{ distribution: uniform, min: 100 °C, max: 130 °C }}
"
        ));
        let r = run_sweep(&s, &JudgeOptions::default(), &Silent).unwrap();
        let g = r
            .summaries
            .iter()
            .find(|c| c.check.key == "magnet_grade")
            .unwrap();
        let p = 1.0 / 3.0;
        if g.failure.low <= p && p <= g.failure.high {
            covered += 1;
        }
        if g.failure.wilson_low <= p && p <= g.failure.wilson_high {
            wilson_covered += 1;
        }
    }
    assert!(covered * 100 >= 95 * reps, "covered {covered}/{reps}");
    // Wilson's interval is shorter and covers about as often as stated (reported, not bound).
    assert!(
        wilson_covered * 100 >= 90 * reps,
        "Wilson covered {wilson_covered}/{reps}"
    );
}

/// The writer writes the sweep block back faithfully (its read-back check), every distribution
/// and scope included.
#[test]
fn the_sweep_block_writes_back() {
    let s = scenario_with(SMALL);
    let yaml = eddyzone::scenario::write::to_yaml(&s).unwrap();
    assert!(
        yaml.contains("sweep:") && yaml.contains("scope: each"),
        "{yaml}"
    );
    let demo = eddyzone::scenario::load(&root().join("scenarios/coaster-sweep.yaml")).unwrap();
    eddyzone::scenario::write::to_yaml(&demo).unwrap();
}

/// The force factor multiplies every section force: since the layer force goes as Br²
/// (Faraday–Lenz: induced current ∝ B, force ∝ current × B), a case with factor 0.81 runs as the
/// same case with every remanence × 0.9. Tolerance 1e-6 relative on the exit speed (the two use
/// different force tables: interpolation error only).
#[test]
fn force_factor_is_a_remanence_squared() {
    let s = scenario_with(SMALL);
    let mut a = s.clone();
    a.sweep = None;
    a.cases.retain(|c| c.name == "full");
    let mut b = a.clone();
    a.cases[0].force_factor = 0.81;
    for sec in &mut b.sections {
        if let eddyzone::scenario::ForceSource::Model(d) = &mut sec.force {
            d.remanence_t *= 0.9;
        }
    }
    let run = |s: Scenario| Study::new(s).unwrap().run(&Default::default()).unwrap();
    let (ra, rb) = (run(a.clone()), run(b));
    let (va, vb) = (ra[0].exit_speed_m_s.unwrap(), rb[0].exit_speed_m_s.unwrap());
    assert!(((va - vb) / vb).abs() < 1e-6, "{va} vs {vb}");
    // And it does act: the weaker brake lets the train out faster than factor 1.
    let mut one = a;
    one.cases[0].force_factor = 1.0;
    let v1 = run(one)[0].exit_speed_m_s.unwrap();
    assert!(va > v1 + 0.1, "{va} vs {v1}");
}
