//! End-to-end checks of how ride accelerations are measured: raw peaks over every sample (events
//! included), filtered onset and release, combined-axis limits. The real binary on variants of
//! the shipped coaster demo.

// A test may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn run(args: &[&str], dir: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_eddyzone"))
        .args(args)
        .current_dir(dir)
        .output()
        .expect("the binary runs")
}

fn json(o: &Output) -> Value {
    let text = String::from_utf8_lossy(&o.stdout);
    serde_json::from_str(&text)
        .unwrap_or_else(|e| panic!("{e}: {text}{}", String::from_utf8_lossy(&o.stderr)))
}

/// The coaster demo with inline limits instead of its limits file, on a level track without
/// resistance (so the felt and the net deceleration are the same quantity), no duty block.
fn level_coaster(limits: &str, rider: &str) -> String {
    let demo = std::fs::read_to_string(root().join("scenarios/coaster-brake-run.yaml")).unwrap();
    let cut = demo.find("# Invented duty").unwrap();
    let mut s = demo[..cut].to_string();
    let i = s.find("track:\n").unwrap();
    let j = s.find("start:\n").unwrap();
    s.replace_range(i..j, "track: { grade: 0 % }\n");
    s = s.replace(
        "limits_file: limits/coaster-seated-example.yaml\n",
        &format!("limits:\n{limits}"),
    );
    s.replace("rider:\n  track_axis: x\n", rider)
}

fn rows(v: &Value, case: &str) -> Vec<Value> {
    v["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["case"] == case)
        .unwrap()["checks"]
        .as_array()
        .unwrap()
        .clone()
}

fn row(rows: &[Value], check: &str, axis: Option<&str>) -> Value {
    rows.iter()
        .find(|r| r["check"] == check && r["axis"].as_str() == axis)
        .unwrap_or_else(|| panic!("no {check} {axis:?} in {rows:?}"))
        .clone()
}

/// `run` reads its peak from every sample, events included; `check`'s raw peak must be the same
/// number (on a level track without resistance the felt deceleration is the net deceleration:
/// Newton's second law, the specific force of the brake alone).
#[test]
fn run_and_check_report_the_same_raw_peak() {
    let tmp = tempfile::tempdir().unwrap();
    let text = level_coaster(
        "  peak: { x: { min: -3 g } }\n",
        "rider:\n  track_axis: x\n",
    );
    let p = tmp.path().join("level.yaml");
    std::fs::write(&p, text).unwrap();
    let p = p.to_str().unwrap();
    let r = json(&run(&["run", p, "--json"], tmp.path()));
    let c = json(&run(&["check", p, "--json"], tmp.path()));
    for case in r["cases"].as_array().unwrap() {
        let name = case["case"].as_str().unwrap();
        let net = case["peak_decel_g"].as_f64().unwrap();
        let raw = row(&rows(&c, name), "peak_min", Some("x"))["raw_value"]
            .as_f64()
            .unwrap();
        assert!(
            (raw + net).abs() < 1e-9,
            "{name}: check raw {raw} vs run {net}"
        );
    }
}

/// Onset and release are judged on the filtered felt deceleration by default; the raw signal
/// (option `rider.rates.signal: raw`) has the sharper edges of the section entries and exits,
/// so its rates are higher. Both rows are there for both limits.
#[test]
fn onset_and_release_filtered_by_default_raw_on_request() {
    let tmp = tempfile::tempdir().unwrap();
    let limits = "  onset: 50 g/s\n  release: 50 g/s\n";
    let filtered = level_coaster(limits, "rider:\n  track_axis: x\n");
    let raw = level_coaster(
        limits,
        "rider:\n  track_axis: x\n  rates: { window: 10 ms, signal: raw }\n",
    );
    let mut values = vec![];
    for (name, text) in [("f.yaml", filtered), ("r.yaml", raw)] {
        let p = tmp.path().join(name);
        std::fs::write(&p, text).unwrap();
        let c = json(&run(&["check", p.to_str().unwrap(), "--json"], tmp.path()));
        let r = rows(&c, "full");
        let onset = row(&r, "onset", None)["value"].as_f64().unwrap();
        let release = row(&r, "release", None)["value"].as_f64().unwrap();
        assert!(onset > 0.0 && release > 0.0, "{onset} {release}");
        values.push((onset, release));
    }
    assert!(values[1].0 > 1.5 * values[0].0, "raw onset {values:?}");
    assert!(values[1].1 > 1.5 * values[0].1, "raw release {values:?}");
}

/// A combined x–z limit is the quarter-ellipse (x/sₓ)² + (z/s_z)² ≤ 1 with the semi-axis of the
/// side each value is on. On a level track z is the constant 1 g of gravity, so the combined
/// value is √((x_min/sₓ⁻)² + (1/s_z⁺)²), from the filtered peak of x (closed form; 1e-6).
#[test]
fn combined_axis_limit_is_the_quarter_ellipse() {
    let tmp = tempfile::tempdir().unwrap();
    let limits = "  peak: { x: { min: -3 g } }\n  combined:\n    - { x: { positive: 2 g, negative: 1.5 g }, z: { positive: 2 g, negative: 0.5 g } }\n";
    let p = tmp.path().join("c.yaml");
    std::fs::write(&p, level_coaster(limits, "rider:\n  track_axis: x\n")).unwrap();
    let c = json(&run(&["check", p.to_str().unwrap(), "--json"], tmp.path()));
    let r = rows(&c, "empty");
    let x = row(&r, "peak_min", Some("x"))["value"].as_f64().unwrap();
    let comb = row(&r, "combined", Some("x+z"));
    let expect = ((x / 1.5).powi(2) + (1.0f64 / 2.0).powi(2)).sqrt();
    let got = comb["value"].as_f64().unwrap();
    assert!((got - expect).abs() < 1e-6, "{got} vs {expect}");
    assert_eq!(comb["pass"], got <= 1.0);
    // Only one axis named is an input error naming the field.
    let bad = limits.replace(", z: { positive: 2 g, negative: 0.5 g }", "");
    std::fs::write(&p, level_coaster(&bad, "rider:\n  track_axis: x\n")).unwrap();
    let o = run(&["check", p.to_str().unwrap()], tmp.path());
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("limits.combined[0]"));
}

/// Over a crest the seat-normal felt acceleration is cos θ − v²/(g·R) (textbook circular motion,
/// a = v²/R): the coaster's brake run on a crest of radius 200 m given as points every 0.5 m.
/// The lowest raw value lies between the bounds the entry and exit speeds give.
#[test]
fn a_crest_lightens_the_rider_by_v_squared_over_r() {
    let tmp = tempfile::tempdir().unwrap();
    let r = 200.0_f64;
    let points: String = (-40..=200)
        .map(|k| {
            let s = k as f64 * 0.5;
            let z = r * ((s - 30.0) / r).cos() - r;
            format!("    - [{s} m, {z:.9} m]\n")
        })
        .collect();
    let text = level_coaster(
        "  peak:\n    z: { min: 0.2 g, max: 2 g }\n",
        "rider:\n  track_axis: x\n",
    )
    .replace(
        "track: { grade: 0 % }\n",
        &format!("track:\n  profile:\n{points}"),
    );
    let p = tmp.path().join("crest.yaml");
    std::fs::write(&p, text).unwrap();
    let p = p.to_str().unwrap();
    let o = run(&["check", p, "--json", "--case", "full"], tmp.path());
    let v = json(&o);
    let z = row(&rows(&v, "full"), "peak_min", Some("z"));
    let raw = z["raw_value"].as_f64().unwrap();
    let runs = json(&run(&["run", p, "--json", "--case", "full"], tmp.path()));
    let entry = runs["cases"][0]["entry_speed_m_s"].as_f64().unwrap();
    let exit = runs["cases"][0]["exit_speed_m_s"].as_f64().unwrap();
    let g = 9.80665;
    // The steepest part under the train: the zone spans about 15–42 m, the train 11 m.
    let cos_min = (30.0_f64 / r).cos();
    let hi = 1.0 - exit * exit / (g * r);
    let lo = cos_min - entry * entry / (g * r);
    assert!(raw <= hi + 1e-3 && raw >= lo - 1e-3, "{lo} ≤ {raw} ≤ {hi}");
    assert!(
        hi < 0.95,
        "the test needs a noticeable centripetal term: {hi}"
    );
}

/// On the vertical tower the felt deceleration is the net one plus 1 g (gravity pulls the
/// gondola down while the brake holds it: Newton's second law with the weight on the other
/// side), and `run` shows both.
#[test]
fn run_shows_net_and_felt_deceleration_one_g_apart_on_the_tower() {
    let tmp = tempfile::tempdir().unwrap();
    let demo = root().join("scenarios/tower-catch-brake.yaml");
    let o = run(&["run", demo.to_str().unwrap(), "--json"], tmp.path());
    let r = json(&o);
    for case in r["cases"].as_array().unwrap() {
        let net = case["peak_decel_g"].as_f64().unwrap();
        let felt = case["peak_felt_decel_g"].as_f64().unwrap();
        assert!(
            (felt - net - 1.0).abs() < 1e-3,
            "{}: {felt} vs {net}",
            case["case"]
        );
    }
    let text = run(&["run", demo.to_str().unwrap()], tmp.path());
    let head = String::from_utf8_lossy(&text.stdout);
    assert!(
        head.contains("net_decel_g") && head.contains("felt_decel_g"),
        "{head}"
    );
}
