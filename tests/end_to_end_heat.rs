//! End-to-end runs of `eddyzone heat` on every shipped scenario: the JSON parses and carries the
//! documented keys, the profile folder holds the run and fin files, and a bad case name is a usage
//! error (exit code 2).

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::path::PathBuf;
use std::process::Command;

fn bin() -> PathBuf {
    PathBuf::from(env!("CARGO_BIN_EXE_eddyzone"))
}

fn shipped() -> Vec<PathBuf> {
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("scenarios");
    let mut v: Vec<PathBuf> = std::fs::read_dir(root)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "yaml"))
        .collect();
    v.sort();
    assert!(v.len() >= 2);
    v
}

#[test]
fn heat_json_has_the_documented_keys() {
    for sc in shipped() {
        let o = Command::new(bin())
            .args(["heat", sc.to_str().unwrap(), "--json"])
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        let j: serde_json::Value = serde_json::from_slice(&o.stdout).expect("JSON parses");
        assert!(j["version"].is_string() && j["scenario"].is_string());
        let cases = j["cases"].as_array().unwrap();
        assert!(!cases.is_empty());
        for c in cases {
            for k in [
                "case",
                "exit_speed_first_m_s",
                "exit_speed_steady_m_s",
                "peak_decel_first_g",
                "peak_decel_steady_g",
                "steady_peak_fin_temperature_c",
                "cycles",
            ] {
                assert!(c.get(k).is_some(), "{}: key {k}", sc.display());
            }
            let fins = c["fins"].as_array().unwrap();
            assert!(!fins.is_empty());
            for f in fins {
                for k in [
                    "fin",
                    "energy_per_pass_j",
                    "rise_per_pass_k",
                    "peak_temperature_c",
                    "steady_peak_temperature_c",
                    "cycles_to_steady",
                ] {
                    assert!(f.get(k).is_some(), "{}: fin key {k}", sc.display());
                }
                // A fin heated by every pass ends the last pass above the ambient air (first
                // law: it only gains heat during a pass and cools towards ambient between them).
                let ambient = j["duty"]["ambient_c"].as_f64().unwrap_or(f64::NEG_INFINITY);
                let steady = f["steady_peak_temperature_c"].as_f64().unwrap();
                assert!(steady > ambient, "{steady} vs ambient {ambient}");
                assert!(f["rise_per_pass_k"].as_f64().unwrap() > 0.0);
                // The hottest point is never below the fin's mean.
                let mean = f["steady_mean_temperature_c"].as_f64().unwrap();
                assert!(mean <= steady + 1e-9, "{mean} vs {steady}");
            }
        }
    }
}

#[test]
fn heat_profiles_and_table() {
    let tmp = tempfile::tempdir().unwrap();
    let tower = shipped()
        .into_iter()
        .find(|p| p.to_string_lossy().contains("tower"))
        .unwrap();
    let o = Command::new(bin())
        .args([
            "heat",
            tower.to_str().unwrap(),
            "--case",
            "full",
            "--profile",
        ])
        .arg(tmp.path())
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(out.contains("steady peak fin temperature"), "{out}");
    let run = std::fs::read_to_string(tmp.path().join("full.csv")).unwrap();
    assert!(run.lines().next().unwrap().contains("east-fin_temp_c"));
    let fin = std::fs::read_to_string(tmp.path().join("fin_east-fin_full.csv")).unwrap();
    let mut rdr = csv::Reader::from_reader(fin.as_bytes());
    assert_eq!(rdr.headers().unwrap(), vec!["s_m", "rise_k", "temp_c"]);
    assert!(rdr.records().count() > 100);

    let bad = Command::new(bin())
        .args(["heat", tower.to_str().unwrap(), "--case", "nope"])
        .output()
        .unwrap();
    assert_eq!(bad.status.code(), Some(2));
}

/// The tower demo's `duty.lift` (1.5 m/s) through the binary: `heat` prints the lift's line and
/// its JSON the lift (power = drag × speed, Newton's P = F·v; time in the brake ≥ the 25 m fins'
/// length over the speed, the vehicle magnets' own length adding to it); without the lift block
/// the steady peak is lower (its heat enters the duty cycle) and the magnets, exposed for a
/// shorter time, warm less. The judged magnet temperature is the input plus the mean rise.
#[test]
fn tower_lift_pass_through_the_binary() {
    let tower = shipped()
        .into_iter()
        .find(|p| p.to_string_lossy().contains("tower"))
        .unwrap();
    let heat = |path: &std::path::Path, json: bool| {
        let mut c = Command::new(bin());
        c.args(["heat", path.to_str().unwrap(), "--case", "full"]);
        if json {
            c.arg("--json");
        }
        let o = c.output().unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        String::from_utf8(o.stdout).unwrap()
    };
    let text = heat(&tower, false);
    assert!(text.contains("lift pass at 1.50 m/s: peak drag"), "{text}");
    let j: serde_json::Value = serde_json::from_str(&heat(&tower, true)).unwrap();
    let c = &j["cases"][0];
    let lift = &c["lift"];
    let (drag, power) = (
        lift["peak_drag_n"].as_f64().unwrap(),
        lift["peak_power_w"].as_f64().unwrap(),
    );
    assert!(drag > 0.0 && (power - 1.5 * drag).abs() < 1e-9 * power);
    assert!(lift["energy_j"].as_f64().unwrap() > 0.0);
    assert!(lift["time_in_brake_s"].as_f64().unwrap() >= 25.0 / 1.5);
    let rise = c["magnet_rise_mean_k"].as_f64().unwrap();
    let judged = c["judged_magnet_temp_c"].as_f64().unwrap();
    assert!((judged - c["magnet_temp_c"].as_f64().unwrap() - rise).abs() < 1e-9);

    let yaml = std::fs::read_to_string(&tower).unwrap();
    let without = yaml.replace("  lift:\n    speed: 1.5 m/s\n", "");
    assert_ne!(without, yaml, "the demo's lift block");
    let tmp = tempfile::tempdir().unwrap();
    let p = tmp.path().join("tower-without-lift.yaml");
    std::fs::write(&p, without).unwrap();
    // The demo's limits file sits beside it.
    let limits = tower.parent().unwrap().join("limits");
    std::fs::create_dir(tmp.path().join("limits")).unwrap();
    for e in std::fs::read_dir(limits).unwrap() {
        let e = e.unwrap().path();
        std::fs::copy(&e, tmp.path().join("limits").join(e.file_name().unwrap())).unwrap();
    }
    let k: serde_json::Value = serde_json::from_str(&heat(&p, true)).unwrap();
    let d = &k["cases"][0];
    assert!(d["lift"].is_null());
    let peak = |v: &serde_json::Value| v["steady_peak_fin_temperature_c"].as_f64().unwrap();
    assert!(peak(c) > peak(d) + 1.0, "{} vs {}", peak(c), peak(d));
    assert!(rise > d["magnet_rise_mean_k"].as_f64().unwrap());
}
