//! End-to-end runs of the real binary in a temporary folder: every shipped scenario through
//! `curve` and `run`, and each class of bad input giving exit code 2 with the field named.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> PathBuf {
    PathBuf::from(env!("CARGO_BIN_EXE_eddyzone"))
}

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn run(args: &[&str], dir: &Path) -> Output {
    Command::new(bin())
        .args(args)
        .current_dir(dir)
        .output()
        .expect("the binary runs")
}

fn text(o: &Output) -> (String, String) {
    (
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

fn shipped() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(root().join("scenarios"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "yaml"))
        .collect();
    v.sort();
    assert!(v.len() >= 2, "at least two demo scenarios");
    v
}

#[test]
fn curve_csv_and_json_parse_back() {
    let tmp = tempfile::tempdir().unwrap();
    for sc in shipped() {
        let p = sc.to_str().unwrap();
        let o = run(
            &["curve", p, "--format", "csv", "--speeds", "0.5:40:0.5"],
            tmp.path(),
        );
        let (out, err) = text(&o);
        assert!(o.status.success(), "{p}: {err}");
        let mut rdr = csv::Reader::from_reader(out.as_bytes());
        let header: Vec<String> = rdr.headers().unwrap().iter().map(String::from).collect();
        assert_eq!(
            header,
            [
                "section",
                "fin",
                "speed_m_s",
                "force_per_area_pa",
                "force_per_area_fundamental_pa",
                "force_per_m_n",
                "force_full_overlap_n",
                "section_end_length_m",
                "band_low_fraction",
                "band_high_fraction",
                "force_full_overlap_low_n",
                "force_full_overlap_high_n"
            ]
        );
        let rows: Vec<csv::StringRecord> = rdr.records().map(|r| r.unwrap()).collect();
        assert!(rows.len() >= 80, "{p}: {} rows", rows.len());
        for r in &rows {
            let f: f64 = r[5].parse().unwrap();
            assert!(f.is_finite() && f >= 0.0);
            // The model's band brackets the force of the fully overlapped section.
            let full: f64 = r[6].parse().unwrap();
            let (low, high): (f64, f64) = (r[10].parse().unwrap(), r[11].parse().unwrap());
            assert!(low <= full && full <= high, "{p}: {low} {full} {high}");
            let (bl, bh): (f64, f64) = (r[8].parse().unwrap(), r[9].parse().unwrap());
            assert!(
                bl < 0.0 && bh > 0.0 && bl > -0.5 && bh < 0.5,
                "{p}: {bl} {bh}"
            );
        }

        let o = run(&["curve", p, "--format", "json"], tmp.path());
        let (out, err) = text(&o);
        assert!(o.status.success(), "{p}: {err}");
        let j: serde_json::Value = serde_json::from_str(&out).unwrap();
        let arr = j.as_array().unwrap();
        assert!(!arr.is_empty());
        for c in arr {
            for k in [
                "section",
                "fin",
                "critical_speed_m_s",
                "peak_force_per_m_n",
                "edge_factor",
                "gap_field_t",
                "skin_depth_at_critical_m",
                "points",
            ] {
                assert!(c.get(k).is_some(), "{p}: key {k} missing");
            }
            // The curve rises, peaks at the critical speed and falls beyond it (skin effect).
            let vc = c["critical_speed_m_s"].as_f64().unwrap();
            let pts = c["points"].as_array().unwrap();
            let f_at = |i: usize| pts[i]["force_per_m_n"].as_f64().unwrap();
            let v_at = |i: usize| pts[i]["speed_m_s"].as_f64().unwrap();
            let last = pts.len() - 1;
            assert!(
                v_at(last) > 2.0 * vc,
                "{p}: default speed range should pass the peak"
            );
            let peak = c["peak_force_per_m_n"].as_f64().unwrap();
            assert!(
                f_at(0) < peak && f_at(last) < peak,
                "{p}: rise and fall around the peak"
            );
        }
    }
}

#[test]
fn run_table_and_json() {
    let tmp = tempfile::tempdir().unwrap();
    for sc in shipped() {
        let p = sc.to_str().unwrap();
        let o = run(&["run", p, "--json"], tmp.path());
        let (out, err) = text(&o);
        assert!(o.status.success(), "{p}: {err}");
        let j: serde_json::Value = serde_json::from_str(&out).unwrap();
        assert!(j["scenario"].is_string() && j["version"].is_string());
        for c in j["cases"].as_array().unwrap() {
            for k in [
                "case",
                "mass_kg",
                "outcome",
                "entry_speed_m_s",
                "exit_speed_m_s",
                "min_speed_m_s",
                "stall_position_m",
                "peak_decel_m_s2",
                "peak_decel_g",
                "peak_felt_decel_g",
                "peak_decel_time_s",
                "peak_decel_position_m",
                "peak_onset_g_s",
                "time_in_zone_s",
                "braking_energy_j",
                "energy_residual_j",
                "peak_brake_force_n",
                "steps",
                "rhs_evaluations",
            ] {
                assert!(c.get(k).is_some(), "{p}: key {k} missing");
            }
        }
        let o = run(&["run", p], tmp.path());
        assert!(o.status.success());
        assert!(text(&o).0.contains("outcome"));
    }
}

#[test]
fn run_profiles_are_written() {
    let tmp = tempfile::tempdir().unwrap();
    let sc = root().join("scenarios/coaster-brake-run.yaml");
    let o = run(
        &[
            "run",
            sc.to_str().unwrap(),
            "--case",
            "full",
            "--profile",
            "prof",
            "--dt",
            "0.01",
        ],
        tmp.path(),
    );
    assert!(o.status.success(), "{}", text(&o).1);
    let csv_text = std::fs::read_to_string(tmp.path().join("prof/full.csv")).unwrap();
    let first = csv_text.lines().next().unwrap();
    assert_eq!(
        first,
        "t_s,s_m,v_m_s,a_m_s2,decel_g,brake_force_n,gravity_force_n,resistance_force_n,overlap_m,\
         felt_x_raw_g,felt_x_filtered_g,felt_z_raw_g,felt_z_filtered_g"
    );
    assert!(csv_text.lines().count() > 100);
    // No temporary files are left behind.
    let names: Vec<_> = std::fs::read_dir(tmp.path().join("prof"))
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(names.len(), 1, "{names:?}");
}

/// A minimal valid scenario with one line replaced.
fn base() -> String {
    r#"name: base
start: { position: 5 m, speed: 10 m/s }
vehicle:
  mass: 2000 kg
  length: 4 m
  fins:
    - name: fin
      offset: 1 m
      length: 2 m
      height: 200 mm
      thickness: 8 mm
      material: copper-c11000
sections:
  - name: S1
    start: 10 m
    length: 1.5 m
    pole_pitch: 50 mm
    magnet_thickness: 12 mm
    magnet_fill: 0.9
    remanence: 1.2 T
    clearance: 5 mm
    pole_height: 180 mm
"#
    .to_string()
}

fn bad_input(yaml: &str, expect_in_message: &[&str]) {
    let tmp = tempfile::tempdir().unwrap();
    let f = tmp.path().join("bad.yaml");
    std::fs::write(&f, yaml).unwrap();
    for cmd in ["curve", "run"] {
        let o = run(&[cmd, f.to_str().unwrap()], tmp.path());
        let (_, err) = text(&o);
        assert_eq!(
            o.status.code(),
            Some(2),
            "{cmd}: expected exit 2, stderr: {err}"
        );
        assert!(!err.contains("panicked"), "{err}");
        assert!(err.contains("bad.yaml"), "the file is named: {err}");
        for e in expect_in_message {
            assert!(err.contains(e), "expected '{e}' in: {err}");
        }
    }
}

#[test]
fn bad_inputs_exit_2_and_name_the_field() {
    bad_input(
        &base().replace("    clearance: 5 mm", "    clerance: 5 mm"),
        &["sections[0]", "clerance", ":21:"],
    );
    bad_input(
        &base().replace("    clearance: 5 mm\n", ""),
        &["sections[0]", "clearance"],
    );
    bad_input(
        &base().replace("clearance: 5 mm", "clearance: 5 km/h"),
        &["sections[0].clearance", "speed", "length"],
    );
    bad_input(
        &base().replace("clearance: 5 mm", "clearance: .nan"),
        &["sections[0].clearance"],
    );
    bad_input(
        &base().replace("thickness: 8 mm", "thickness: -8 mm"),
        &["vehicle.fins[0].thickness"],
    );
    bad_input(
        &base().replace("mass: 2000 kg", "mass: 0 kg"),
        &["vehicle.mass"],
    );
    bad_input(
        &base().replace("magnet_fill: 0.9", "magnet_fill: 1.2"),
        &["sections[0].magnet_fill"],
    );
    bad_input(
        &base().replace("remanence: 1.2 T", "remanence: 2.0 T"),
        &["sections[0].remanence"],
    );
    bad_input(
        &base().replace("clearance: 5 mm", "clearance: 0 mm"),
        &["sections[0].clearance"],
    );
    bad_input(
        &base().replace("material: copper-c11000", "material: unobtainium"),
        &["vehicle.fins[0].material", "unobtainium"],
    );
    bad_input(&(base() + "  - { name: S1, start: 20 m, length: 1 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9, remanence: 1.2 T, clearance: 5 mm, pole_height: 180 mm }\n"), &["duplicate", "S1"]);
    bad_input(
        &base().replace(
            "    pole_height: 180 mm",
            "    pole_height: 180 mm\n    repeat: { count: 3, pitch: 1.0 m }",
        ),
        &["sections[0].repeat.pitch", "overlap"],
    );
    bad_input("name: [unclosed\n", &["bad.yaml"]);
    bad_input("", &["bad.yaml"]);
    bad_input(
        &base().replace("name: base", "name: base\nunknown_key: 3"),
        &["unknown_key"],
    );
}

#[test]
fn missing_file_and_bad_options() {
    let tmp = tempfile::tempdir().unwrap();
    let o = run(&["run", "no-such-file.yaml"], tmp.path());
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).1.contains("no-such-file.yaml"));
    let sc = root().join("scenarios/coaster-brake-run.yaml");
    let o = run(
        &["curve", sc.to_str().unwrap(), "--speeds", "3:1:1"],
        tmp.path(),
    );
    assert_eq!(o.status.code(), Some(2));
    let o = run(&["run", sc.to_str().unwrap(), "--case", "nope"], tmp.path());
    assert_eq!(o.status.code(), Some(2));
    let o = run(&["frobnicate"], tmp.path());
    assert_eq!(o.status.code(), Some(2));
}

/// Exit codes of the README: 3 for a computation that could not complete (here the integrator's
/// step size underflows under a tolerance it cannot meet), 4 for an output that cannot be
/// written (the profile folder would have to be created inside a file).
#[test]
fn computation_and_output_failures_have_their_own_exit_codes() {
    let tmp = tempfile::tempdir().unwrap();
    let demo = std::fs::read_to_string(root().join("scenarios/coaster-brake-run.yaml")).unwrap();
    let limits = root().join("scenarios/limits/coaster-seated-example.yaml");
    let demo = demo.replace(
        "limits_file: limits/coaster-seated-example.yaml",
        &format!("limits_file: {}", limits.display()),
    );
    let tight = if demo.contains("solver:") {
        demo.lines()
            .map(|l| {
                if l.trim_start().starts_with("solver:") {
                    "solver: { rtol: 1.1e-14, atol: 1.0e-300 }".to_string()
                } else {
                    l.to_string()
                }
            })
            .collect::<Vec<_>>()
            .join("\n")
    } else {
        format!("{demo}\nsolver: {{ rtol: 1.1e-14, atol: 1.0e-300 }}\n")
    };
    let p = tmp.path().join("tight.yaml");
    std::fs::write(&p, tight).unwrap();
    let o = run(&["run", p.to_str().unwrap()], tmp.path());
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(3), "{err}");
    assert!(err.contains("integrator"), "{err}");
    assert!(!err.contains("panicked"), "{err}");

    let file = tmp.path().join("a-file");
    std::fs::write(&file, "x").unwrap();
    let sc = root().join("scenarios/coaster-brake-run.yaml");
    let o = run(
        &[
            "run",
            sc.to_str().unwrap(),
            "--profile",
            file.join("profiles").to_str().unwrap(),
        ],
        tmp.path(),
    );
    let (_, err) = text(&o);
    assert_eq!(o.status.code(), Some(4), "{err}");
    assert!(err.contains("a-file"), "{err}");
}
