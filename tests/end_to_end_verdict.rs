//! End-to-end checks of the verdict a reviewer signs off on: braking sides, judged states,
//! rollback signs, checks that cannot be evaluated. The real binary on variants of the shipped
//! coaster demo written into a temporary folder.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use serde_json::Value;
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

fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// The coaster demo with its limits file given by absolute path, after `edit`.
fn coaster(edit: impl Fn(String) -> String) -> String {
    let demo = std::fs::read_to_string(root().join("scenarios/coaster-brake-run.yaml")).unwrap();
    let limits = root().join("scenarios/limits/coaster-seated-example.yaml");
    let demo = demo.replace(
        "limits_file: limits/coaster-seated-example.yaml",
        &format!("limits_file: {}", limits.display()),
    );
    let out = edit(demo.clone());
    assert_ne!(out, demo, "the edit changed nothing");
    out
}

fn write(dir: &Path, name: &str, text: &str) -> String {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p.to_str().unwrap().to_string()
}

fn json(o: &Output) -> Value {
    serde_json::from_str(&stdout(o)).unwrap_or_else(|e| panic!("{e}: {}", stdout(o)))
}

/// Rows of one case of a `check --json` verdict.
fn rows<'a>(v: &'a Value, case: &str) -> &'a Vec<Value> {
    v["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["case"] == case)
        .unwrap_or_else(|| panic!("no case {case}"))["checks"]
        .as_array()
        .unwrap()
}

fn key(r: &Value) -> String {
    match r["axis"].as_str() {
        Some(a) => format!("{}.{a}", r["check"].as_str().unwrap()),
        None => r["check"].as_str().unwrap().to_string(),
    }
}

/// Issue seen: a sled limited only on `peak.x.max` stopped at 11 g and "passed". Braking while
/// moving forward is negative felt x (ASTM F2291 sign convention, from memory); a limit set
/// without the braking side gets a warning naming the field, and `--strict` exits 2.
#[test]
fn an_unlimited_braking_side_is_named_and_strict_refuses_it() {
    let tmp = tempfile::tempdir().unwrap();
    let text = coaster(|s| {
        let s = s.replace(
            "limits_file: ",
            "limits:\n  peak:\n    x: { max: 8 g }\n# limits_file: ",
        );
        s.replace(
            "  each_section_out_of: [full]  # N-1 of the loaded train\n",
            "",
        )
        .replace("generate:\n", "")
    });
    let p = write(tmp.path(), "sled.yaml", &text);
    let o = run(&["check", &p], tmp.path());
    let out = stdout(&o);
    assert_eq!(o.status.code(), Some(0), "{out}{}", stderr(&o));
    assert!(
        out.contains("warning: limits.peak.x.min is not set: braking while moving forward")
            || out.contains("warning: limits.peak.x.min is not set: braking moving forward"),
        "{out}"
    );
    assert!(out.contains("−x (eyes front)"), "{out}");
    let o = run(&["check", &p, "--strict"], tmp.path());
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("limits.peak.x.min"), "{}", stderr(&o));
    // With the braking side limited there is nothing to warn about and --strict passes.
    let limited = text.replace("x: { max: 8 g }", "x: { max: 8 g, min: -8 g }");
    let p = write(tmp.path(), "sled-limited.yaml", &limited);
    let o = run(&["check", &p, "--strict"], tmp.path());
    assert_eq!(o.status.code(), Some(0), "{}", stdout(&o));
    assert!(!stdout(&o).contains("warning:"), "{}", stdout(&o));
}

/// With a duty block each case is judged at the first dispatch and at the steady state of the
/// duty cycle. The steady rows must equal those of a hand-built case that starts at the steady
/// pre-dispatch fin temperature (one fin, so one temperature) without a duty block, to 1e-6.
#[test]
fn steady_state_rows_equal_a_hand_built_case_at_the_steady_fin_temperature() {
    let tmp = tempfile::tempdir().unwrap();
    let one_fin = |s: String| {
        s.replace("      repeat: { count: 5, pitch: 2.2 m }\n", "")
            .replace("  - name: full\n", "")
            .replace(
                "generate:\n  each_section_out_of: [full]  # N-1 of the loaded train\n",
                "",
            )
    };
    let duty = coaster(one_fin);
    let p = write(tmp.path(), "duty.yaml", &duty);
    let heat = run(&["heat", &p, "--json"], tmp.path());
    assert!(heat.status.success(), "{}", stderr(&heat));
    let h = json(&heat);
    let t_steady = h["cases"][0]["fins"][0]["steady_start_temperature_c"]
        .as_f64()
        .unwrap();
    assert!(t_steady > 30.0, "the duty cycle heats the fin: {t_steady}");
    let hand = coaster(|s| {
        let s = one_fin(s);
        let i = s.find("duty:").unwrap();
        s[..i].replace("  fin: 20 °C", &format!("  fin: {t_steady:?} °C"))
    });
    let q = write(tmp.path(), "hand.yaml", &hand);
    let a = json(&run(&["check", &p, "--json"], tmp.path()));
    let b = json(&run(&["check", &q, "--json"], tmp.path()));
    let mut compared = 0;
    for r in rows(&a, "empty") {
        if r["state"] != "steady" {
            continue;
        }
        let other = rows(&b, "empty")
            .iter()
            .find(|x| key(x) == key(r))
            .unwrap_or_else(|| panic!("hand-built case lacks {}", key(r)));
        assert!(other["state"].is_null(), "one state without a duty block");
        // The steady state judges the magnets at the input plus their estimated warming by the
        // fins across the gap (`duty.magnets`, on by default), which `heat` reports; the
        // hand-built case judges its input.
        if r["check"]
            .as_str()
            .is_some_and(|c| c.starts_with("magnet_"))
        {
            let judged = h["cases"]
                .as_array()
                .unwrap()
                .iter()
                .find(|c| c["case"] == "empty")
                .unwrap()["judged_magnet_temp_c"]
                .as_f64()
                .unwrap();
            let v = r["value"].as_f64().unwrap();
            assert!((v - judged).abs() < 1e-9, "{}: {v} vs {judged}", key(r));
            assert!(
                judged > other["value"].as_f64().unwrap(),
                "the magnets warm"
            );
            continue;
        }
        if let (Some(m), Some(n)) = (r["margin"].as_f64(), other["margin"].as_f64()) {
            assert!((m - n).abs() < 1e-6, "{}: {m} vs {n}", key(r));
            compared += 1;
        }
    }
    assert!(compared >= 4, "compared {compared} steady rows");
    // The first dispatch is judged too: at least one row is bound by it, and the steady state
    // (hotter fins) binds the exit speed, as `heat` shows it dropping.
    let states: Vec<&str> = rows(&a, "empty")
        .iter()
        .filter_map(|r| r["state"].as_str())
        .collect();
    assert!(
        states.contains(&"first") && states.contains(&"steady"),
        "{states:?}"
    );
    let exit = rows(&a, "empty")
        .iter()
        .find(|r| r["check"] == "exit_speed_min")
        .unwrap();
    assert_eq!(exit["state"], "steady");
}

/// Rolling back through the brake the rider (facing +s) is pressed into the seat back: +x. A
/// tight eyes-back limit must catch the rollback case, and the exit speed has one sign in `run`
/// and `check` (negative: leaving upstream).
#[test]
fn rollback_braking_is_judged_on_the_eyes_back_side_with_a_signed_exit_speed() {
    let tmp = tempfile::tempdir().unwrap();
    let text = coaster(|s| {
        s.replace(
            "  each_section_out_of: [full]  # N-1 of the loaded train\n",
            "  rollback: { speed: 25 m/s }\n",
        )
        .replace(
            "limits_file: ",
            "limits:\n  peak:\n    x: { max: 0.5 g }\nlimits_file: ",
        )
    });
    let p = write(tmp.path(), "rollback.yaml", &text);
    let o = run(&["check", &p, "--json", "--case", "rollback"], tmp.path());
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let v = json(&o);
    let r = rows(&v, "rollback");
    let max_x = r.iter().find(|r| key(r) == "peak_max.x").unwrap();
    assert_eq!(max_x["pass"], false, "{max_x}");
    assert!(max_x["value"].as_f64().unwrap() > 0.5, "{max_x}");
    let min_x = r.iter().find(|r| key(r) == "peak_min.x").unwrap();
    assert_eq!(min_x["pass"], true, "{min_x}");
    let exit = r.iter().find(|r| key(r) == "exit_speed_max").unwrap();
    let run_json = json(&run(
        &["run", &p, "--json", "--case", "rollback"],
        tmp.path(),
    ));
    let run_exit = run_json["cases"][0]["exit_speed_m_s"].as_f64().unwrap();
    assert!(run_exit < 0.0, "left upstream: {run_exit}");
    // `check` judges the first dispatch and the steady state; a row of the first state is the
    // run `run` shows, with the same sign.
    let v_exit = exit["value"].as_f64().unwrap();
    assert!(v_exit < 0.0, "check keeps the sign: {exit}");
    assert!(exit["limit"].as_f64().unwrap() < 0.0, "{exit}");
    if exit["state"] == "first" {
        assert!((v_exit - run_exit).abs() < 1e-9, "{v_exit} vs {run_exit}");
    }
}

/// A check that cannot be evaluated is a failing row with its reason, never a missing one: a
/// train too slow to leave the zone has no exit speed.
#[test]
fn a_check_without_a_value_fails_with_its_reason() {
    let tmp = tempfile::tempdir().unwrap();
    let text = coaster(|s| {
        s.replace(
            "  - name: empty\n    mass: 5.6 t\n",
            "  - name: empty\n    mass: 5.6 t\n  - name: slow\n    start: { position: 15 m, speed: 1 m/s }\n",
        )
    });
    let p = write(tmp.path(), "slow.yaml", &text);
    let o = run(&["check", &p, "--json", "--case", "slow"], tmp.path());
    assert_eq!(o.status.code(), Some(1));
    let v = json(&o);
    let r = rows(&v, "slow");
    let min = r.iter().find(|r| key(r) == "exit_speed_min").unwrap();
    assert_eq!(min["pass"], false);
    assert!(min["value"].is_null());
    assert!(
        min["not_evaluated"].as_str().unwrap().contains("stalled"),
        "{min}"
    );
    let text_out = stdout(&run(&["check", &p, "--case", "slow"], tmp.path()));
    assert!(text_out.contains("not evaluated: stalled"), "{text_out}");
    assert!(
        text_out.contains("FAIL: 1 case(s) failed: slow"),
        "{text_out}"
    );
    assert!(text_out.contains("  slow: stall"), "{text_out}");
}

/// Input errors that would otherwise hollow out the verdict, each exit 2 with its field named:
/// an acceleration limit without a unit (g or m/s²? the README says g, the model works in SI),
/// a zone end upstream of every magnet, a start with the vehicle already over magnets.
#[test]
fn inputs_that_would_hollow_out_the_verdict_are_refused() {
    let tmp = tempfile::tempdir().unwrap();
    let cases = [
        (
            "bare.yaml",
            coaster(|s| {
                s.replace(
                    "limits_file: ",
                    "limits:\n  peak:\n    x: { min: -8 }\nlimits_file: ",
                )
            }),
            vec!["limits.peak.x.min", "'-8 g'", "'-8 m/s^2'"],
        ),
        (
            "zone-end.yaml",
            coaster(|s| s.replace("limits_file: ", "zone_end: 10 m\nlimits_file: ")),
            vec!["zone_end", "not downstream"],
        ),
        (
            "inside.yaml",
            coaster(|s| s.replace("  position: 15 m\n", "  position: 25 m\n")),
            vec!["start.position", "already over section", "in_zone: true"],
        ),
    ];
    for (name, text, words) in cases {
        let p = write(tmp.path(), name, &text);
        let o = run(&["check", &p], tmp.path());
        let err = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{name}: {err}");
        assert!(
            err.contains(&format!("{name}:")),
            "{name}: file named: {err}"
        );
        for w in words {
            assert!(err.contains(w), "{name}: no '{w}' in {err}");
        }
    }
    // A vehicle held in the zone on purpose says so, and runs.
    let held = coaster(|s| s.replace("  position: 15 m\n", "  position: 25 m\n  in_zone: true\n"));
    let p = write(tmp.path(), "held.yaml", &held);
    let o = run(&["run", &p], tmp.path());
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

/// The report's verdict names the failing cases and their checks, with the state and the
/// duration at which an envelope binds (the tower demo fails its empty cases on the envelope).
#[test]
fn the_report_verdict_names_failing_cases_and_checks() {
    let tmp = tempfile::tempdir().unwrap();
    let sc = root().join("scenarios/tower-catch-brake.yaml");
    let out = tmp.path().join("report");
    let o = run(
        &[
            "report",
            sc.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ],
        tmp.path(),
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    let i = html
        .find("<ul id=\"failures\">")
        .expect("a list of failures");
    let list = &html[i..i + html[i..].find("</ul>").unwrap()];
    assert!(
        list.contains("<b>empty</b>: envelope_positive.z (margin"),
        "{list}"
    );
    assert!(html.contains("<th>binds at (s)</th>"));
    assert!(html.contains("<td>steady</td>"), "states shown");
    assert!(html.contains("braking while descending is +z"));
}

/// An arrester is judged on where it stops: the front position at rest against
/// `limits.stop_position`, the same number as `run`'s `stall_position_m`; a vehicle that leaves
/// the zone without stopping fails the row with its reason (never a missing row).
#[test]
fn arrester_stop_position_is_judged_and_a_vehicle_that_does_not_stop_fails() {
    let tmp = tempfile::tempdir().unwrap();
    let arrester = |speed: &str, limits: &str| {
        format!(
            "version: 1
name: arrester
vehicle:
  mass: 900 kg
  length: 4 m
  fins:
    - {{ name: fin, offset: 0.5 m, length: 3 m, height: 200 mm, thickness: 10 mm, material: copper-c11000 }}
sections:
  - {{ name: S, start: 8 m, length: 2 m, pole_pitch: 50 mm, magnet_thickness: 12 mm, magnet_fill: 0.9,
      remanence: 1.25 T, clearance: 4 mm, pole_height: 180 mm, repeat: {{ count: 4, pitch: 2 m }} }}
track: {{ grade: 0 % }}
resistance: {{ rolling: 0.01, friction: 200 N }}
start: {{ position: 5 m, speed: {speed} }}
time_limit: 60 s
rider: {{ track_axis: x }}
limits: {{ allow_stall: true, stop_position: {{ {limits} }} }}
"
        )
    };
    let p = write(tmp.path(), "a.yaml", &arrester("20 m/s", "max: 40 m"));
    let stop = json(&run(&["run", &p, "--json"], tmp.path()))["cases"][0]["stall_position_m"]
        .as_f64()
        .unwrap();
    let o = run(&["check", &p, "--json"], tmp.path());
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let r = rows(&json(&o), "nominal")
        .iter()
        .find(|r| r["check"] == "stop_position_max")
        .unwrap()
        .clone();
    assert_eq!(r["value"].as_f64().unwrap(), stop);
    assert!((r["margin"].as_f64().unwrap() - (40.0 - stop)).abs() < 1e-12);
    // Stopping short of a minimum, or beyond a tighter maximum, fails.
    for limits in ["max: 10 m", "min: 14 m"] {
        let p = write(tmp.path(), "b.yaml", &arrester("20 m/s", limits));
        let o = run(&["check", &p, "--json"], tmp.path());
        assert_eq!(o.status.code(), Some(1), "{limits}: {}", stdout(&o));
    }
    // Too fast to stop in 8 m of magnets: the row is there, failing, with its reason.
    let p = write(tmp.path(), "c.yaml", &arrester("80 m/s", "max: 40 m"));
    let o = run(&["check", &p, "--json"], tmp.path());
    assert_eq!(o.status.code(), Some(1), "{}", stdout(&o));
    let v = json(&o);
    let r = rows(&v, "nominal")
        .iter()
        .find(|r| r["check"] == "stop_position_max")
        .unwrap()
        .clone();
    assert_eq!(r["pass"], false);
    assert!(
        r["not_evaluated"]
            .as_str()
            .unwrap()
            .contains("without stopping"),
        "{r}"
    );
}
