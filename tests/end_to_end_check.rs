//! End-to-end runs of `eddyzone check`: a passing demo (exit 0), a demo that fails only in its
//! light cases (exit 1, with the failing check and case named), and bad limits (exit 2 with the
//! field path).

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::path::PathBuf;
use std::process::{Command, Output};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn check(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_eddyzone"))
        .arg("check")
        .args(args)
        .output()
        .expect("the binary runs")
}

#[test]
fn coaster_demo_passes() {
    let o = check(&[root()
        .join("scenarios/coaster-brake-run.yaml")
        .to_str()
        .unwrap()]);
    let out = String::from_utf8_lossy(&o.stdout);
    assert_eq!(o.status.code(), Some(0), "{out}");
    assert!(out.contains("PASS"));
    assert!(
        out.contains("CAUTION") && out.contains("ASTM F2291") && out.contains("EN 13814"),
        "the caution is printed"
    );
    assert!(out.contains("Worst case of each check"));
}

#[test]
fn tower_demo_fails_only_in_its_light_cases() {
    let p = root().join("scenarios/tower-catch-brake.yaml");
    let o = check(&[p.to_str().unwrap(), "--json"]);
    assert_eq!(o.status.code(), Some(1));
    let j: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(j["pass"], false);
    for k in ["scenario", "version", "cases", "worst"] {
        assert!(j.get(k).is_some(), "{k}");
    }
    let cases = j["cases"].as_array().unwrap();
    let failing: Vec<&str> = cases
        .iter()
        .filter(|c| c["pass"] == false)
        .map(|c| c["case"].as_str().unwrap())
        .collect();
    assert!(!failing.is_empty());
    assert!(
        failing.iter().all(|c| c.starts_with("empty")),
        "only the light gondola fails: {failing:?}"
    );
    // The failing check is named, with its axis, limit and a negative margin.
    let empty = cases.iter().find(|c| c["case"] == "empty").unwrap();
    let bad: Vec<&serde_json::Value> = empty["checks"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|r| r["pass"] == false)
        .collect();
    assert!(
        bad.iter().any(|r| r["check"] == "envelope_positive"
            && r["axis"] == "z"
            && r["margin"].as_f64().unwrap() < 0.0),
        "{bad:?}"
    );
    for r in empty["checks"].as_array().unwrap() {
        for k in ["check", "axis", "value", "limit", "margin", "unit", "pass"] {
            assert!(r.get(k).is_some(), "{k}");
        }
    }
    // The text output names the failing case too.
    let o = check(&[p.to_str().unwrap()]);
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(out.contains("FAIL") && out.contains("empty") && out.contains("envelope_positive"));
}

fn bad_limits(limits: &str, expect: &[&str]) {
    let tmp = tempfile::tempdir().unwrap();
    let base = std::fs::read_to_string(root().join("scenarios/coaster-brake-run.yaml")).unwrap();
    let text = base.replace("limits_file: limits/coaster-seated-example.yaml\n", "") + limits;
    let f = tmp.path().join("limits.yaml");
    std::fs::write(&f, text).unwrap();
    let o = check(&[f.to_str().unwrap()]);
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(2), "{err}");
    assert!(!err.contains("panicked"));
    for e in expect {
        assert!(err.contains(e), "expected '{e}' in {err}");
    }
}

#[test]
fn bad_limits_exit_2_with_the_field_path() {
    bad_limits(
        "limits:\n  envelope:\n    x:\n      negative: [[-1 s, 1 g]]\n",
        &["limits.envelope.x.negative[0][0]", "negative"],
    );
    bad_limits(
        "limits:\n  envelope:\n    x:\n      negative: [[1 s, 1 g], [0.5 s, 1 g]]\n",
        &["limits.envelope.x.negative[1][0]", "sorted"],
    );
    bad_limits(
        "limits:\n  peak:\n    w: { max: 1 g }\n",
        &["limits.peak.w", "unknown field"],
    );
    bad_limits("limits:\n  onset: 5 m/s\n", &["limits.onset", "speed"]);
}
