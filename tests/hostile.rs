//! Hostile and absurd input through the real binary: every input that once panicked, aborted,
//! ran without bound or exited 0 with nonsense is refused with exit 2 and a message that names
//! the file, line:column and field, well within a time bound; output folders are whole or absent.
//!
//! The time bound here is 3 s per refused input (generous for a loaded 2-core machine; the
//! project's target is 100 ms, measured by hand: README "Hostile input"). The inputs are the
//! ones recorded when the project was fuzzed (10 000 mutated scenarios, targeted hostile values).

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::time::{Duration, Instant};

const BOUND: Duration = Duration::from_secs(3);

fn bin() -> PathBuf {
    PathBuf::from(env!("CARGO_BIN_EXE_eddyzone"))
}

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// A shipped demo with its limits file given by absolute path, after `edit` (which must change it).
fn demo(file: &str, edit: impl Fn(&str) -> String) -> String {
    let text = std::fs::read_to_string(root().join("scenarios").join(file)).unwrap();
    let limits = root().join("scenarios/limits");
    let text = text.replace(
        "limits_file: limits",
        &format!("limits_file: {}", limits.display()),
    );
    let out = edit(&text);
    assert_ne!(out, text, "the edit changed nothing");
    out
}

fn coaster(edit: impl Fn(&str) -> String) -> String {
    demo("coaster-brake-run.yaml", edit)
}

fn tower(edit: impl Fn(&str) -> String) -> String {
    demo("tower-catch-brake.yaml", edit)
}

/// Runs the binary in `dir`, returning its output and how long it took.
fn run(args: &[&str], dir: &Path) -> (Output, Duration) {
    let t = Instant::now();
    let o = Command::new(bin())
        .args(args)
        .current_dir(dir)
        .output()
        .expect("the binary runs");
    (o, t.elapsed())
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// `command` on `text` is refused: exit 2, quickly, one message naming `field` at a line:column
/// of the file, and nothing on stdout.
fn refused(command: &[&str], text: &str, field: &str) -> String {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("hostile.yaml");
    std::fs::write(&file, text).unwrap();
    let mut args = vec![command[0], file.to_str().unwrap()];
    args.extend_from_slice(&command[1..]);
    let (o, took) = run(&args, tmp.path());
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{command:?} {field}: {err}");
    assert!(took < BOUND, "{command:?} {field}: took {took:?}");
    let line = err
        .lines()
        .find(|l| l.contains(field))
        .unwrap_or_else(|| panic!("no message names {field}: {err}"));
    let at = line
        .split("hostile.yaml:")
        .nth(1)
        .unwrap_or_else(|| panic!("no file:line:col in {line}"));
    let mut parts = at.split(':');
    let (l, c) = (parts.next().unwrap(), parts.next().unwrap());
    assert!(
        l.parse::<u32>().is_ok() && c.parse::<u32>().is_ok(),
        "no line:column in {line}"
    );
    assert!(
        o.stdout.is_empty(),
        "{}",
        String::from_utf8_lossy(&o.stdout)
    );
    err
}

// Recorded: panic "capacity overflow" (exit 101), then aborts after gigabytes, for long track fins.
#[test]
fn track_fins_longer_than_any_track_are_refused() {
    for len in ["1e18 m", "1e15 m", "1e6 m"] {
        let t = tower(|s| s.replacen("length: 25 m", &format!("length: {len}"), 1));
        for cmd in ["heat", "check"] {
            let e = refused(&[cmd], &t, "track.fins[0].length");
            assert!(e.contains("100 km"), "{e}");
        }
    }
}

// Recorded: a section repeated 10 000 times aborted after 85 s.
#[test]
fn a_section_repeated_ten_thousand_times_is_refused() {
    let t = coaster(|s| s.replace("count: 7, pitch: 1.6 m", "count: 10000, pitch: 1.6 m"));
    let e = refused(&["run"], &t, "sections[0].repeat.count");
    assert!(e.contains("1000"), "{e}");
}

// Recorded: `heat` with 100 000 cycles, or max_cycles 1e5 without cooling, ran without bound.
#[test]
fn duty_cycles_without_bound_are_refused() {
    let t = coaster(|s| s.replace("cycles: until_steady\n  max_cycles: 200", "cycles: 100000"));
    refused(&["heat"], &t, "duty.cycles");
    let t = coaster(|s| s.replace("max_cycles: 200", "max_cycles: 100000"));
    refused(&["heat"], &t, "duty.max_cycles");
    let t = coaster(|s| {
        s.replace(
            "  film_coefficient: 40 W/(m^2*K)\n",
            "  film_coefficient: 0 W/(m^2*K)\n",
        )
    });
    refused(&["heat"], &t, "duty");
}

// Recorded: a 1 nm pitch and length ran without bound; a 1 µm pitch named no field.
#[test]
fn pitches_and_lengths_finer_than_a_magnet_are_refused() {
    let t = coaster(|s| s.replace("pole_pitch: 50 mm", "pole_pitch: 0.000000001 m"));
    refused(&["run"], &t, "sections[0].pole_pitch");
    let t = coaster(|s| s.replace("pole_pitch: 50 mm", "pole_pitch: 0.001 mm"));
    refused(&["run"], &t, "sections[0].pole_pitch");
    let t = coaster(|s| s.replacen("length: 1.0 m", "length: 0.000000001 m", 1));
    refused(&["run"], &t, "sections[0].length");
}

// Recorded: `report` with an 11 km vehicle or a start at 1e308 m ran without bound; a vehicle or
// start at 1e300 m exited 0 with `residual_j NaN`.
#[test]
fn vehicles_and_starts_beyond_any_track_are_refused() {
    for (from, to, field) in [
        ("length: 11.0 m", "length: 11 km", "vehicle.length"),
        ("length: 11.0 m", "length: 1e300 m", "vehicle.length"),
        ("position: 15 m", "position: 1e308 m", "start.position"),
        ("position: 15 m", "position: 1e300 m", "start.position"),
    ] {
        let t = coaster(|s| s.replace(from, to));
        refused(&["report", "--out", "rep"], &t, field);
        refused(&["run"], &t, field);
    }
}

// Recorded: 1e6 m/s "cleared" at 3.3e7 g; 1e30 kg gave a residual of 1.8e17 J; both exit 0.
#[test]
fn speeds_and_masses_no_brake_meets_are_refused() {
    let t = coaster(|s| s.replace("speed: 75 km/h", "speed: 1e6 m/s"));
    refused(&["run"], &t, "start.speed");
    let t = coaster(|s| s.replace("mass: 7.4 t", "mass: 1e30 kg"));
    refused(&["check"], &t, "vehicle.mass");
    for bad in [".nan", ".inf", "-.inf"] {
        let t = coaster(|s| s.replace("mass: 7.4 t", &format!("mass: {bad}")));
        refused(&["run"], &t, "vehicle.mass");
    }
}

// Recorded: a repeat pitch of 1e308 m printed an empty message.
#[test]
fn a_huge_repeat_pitch_has_a_message() {
    let t = coaster(|s| s.replace("pitch: 1.6 m", "pitch: 1e308 m"));
    let e = refused(&["run"], &t, "sections[0].repeat.pitch");
    assert!(e.contains("not plausible"), "{e}");
}

// Recorded: `run --profile DIR --dt 1e-5` on the tower demo aborted after gigabytes.
#[test]
fn a_sample_interval_beyond_the_budget_is_refused_before_the_runs() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("tower.yaml");
    std::fs::write(
        &file,
        tower(|s| s.replace("name: Halvard", "name: Fine Halvard")),
    )
    .unwrap();
    let f = file.to_str().unwrap();
    let (o, took) = run(&["run", f, "--profile", "prof", "--dt", "1e-5"], tmp.path());
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{e}");
    assert!(e.contains("--dt") && e.contains("budget"), "{e}");
    assert!(took < BOUND, "took {took:?}");
    assert!(!tmp.path().join("prof").exists(), "nothing written");
    // The interval it suggests is accepted.
    let suggest = e
        .split("at least ")
        .nth(1)
        .and_then(|r| r.split(' ').next())
        .unwrap_or_else(|| panic!("no suggestion: {e}"));
    let dt: f64 = suggest.parse().unwrap();
    let dt = format!("{}", dt * 1.01);
    let (o, _) = run(&["run", f, "--profile", "prof", "--dt", &dt], tmp.path());
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(tmp.path().join("prof").is_dir());
}

// Recorded: reading /dev/zero grew to gigabytes; a FIFO blocked forever.
#[test]
fn only_regular_files_of_bounded_size_are_read() {
    let tmp = tempfile::tempdir().unwrap();
    let (o, took) = run(&["run", "/dev/zero"], tmp.path());
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(took < BOUND && stderr(&o).contains("/dev/zero"));
    let fifo = tmp.path().join("pipe.yaml");
    let made = Command::new("mkfifo").arg(&fifo).status();
    if matches!(made, Ok(s) if s.success()) {
        let (o, took) = run(&["check", fifo.to_str().unwrap()], tmp.path());
        assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
        assert!(took < BOUND);
    }
    let big = tmp.path().join("big.yaml");
    std::fs::write(&big, "#".repeat(11 * 1024 * 1024)).unwrap();
    let (o, took) = run(&["run", big.to_str().unwrap()], tmp.path());
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(
        took < BOUND && stderr(&o).contains("limit"),
        "{}",
        stderr(&o)
    );
}

/// Files of a folder, hidden ones included.
fn names(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

// Recorded: cases `a b`, `a_b` and `a/b` all wrote `a_b.csv`; a 300-character name failed
// `report` with "File name too long" and left six files behind.
#[test]
fn case_names_that_collide_or_are_too_long_get_files_of_their_own() {
    let long = "x".repeat(300);
    let cases = format!("cases:\n  - name: a b\n  - name: a_b\n  - name: a/b\n  - name: {long}\n");
    let t = coaster(|s| {
        s.replace(
            "cases:\n  - name: full\n  - name: empty\n    mass: 5.6 t\n",
            &cases,
        )
        .replace(
            "  each_section_out_of: [full]  # N-1 of the loaded train\n",
            "  each_section_out: false\n",
        )
    });
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("names.yaml");
    std::fs::write(&file, t).unwrap();
    let f = file.to_str().unwrap();
    let (o, _) = run(&["run", f, "--profile", "prof"], tmp.path());
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let csv: Vec<String> = names(&tmp.path().join("prof"))
        .into_iter()
        .filter(|n| n.ends_with(".csv"))
        .collect();
    assert_eq!(csv.len(), 4, "{csv:?}");
    assert!(csv.iter().all(|n| n.len() < 120), "{csv:?}");
    let (o, _) = run(&["report", f, "--out", "rep"], tmp.path());
    assert!(matches!(o.status.code(), Some(0 | 1)), "{}", stderr(&o));
    assert!(tmp.path().join("rep/report.html").is_file());
    // Nothing half-written beside it: only the folders and the lock files.
    for n in names(tmp.path()) {
        assert!(
            !n.contains("partial") && !n.contains("-old"),
            "left behind: {n}"
        );
    }
}

// Recorded: `report --force` over an older report kept its stale files.
#[test]
fn report_force_replaces_the_whole_folder() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("c.yaml");
    std::fs::write(
        &file,
        coaster(|s| s.replace("name: Marrowbank", "name: Stale Marrowbank")),
    )
    .unwrap();
    let f = file.to_str().unwrap();
    std::fs::create_dir(tmp.path().join("rep")).unwrap();
    std::fs::write(tmp.path().join("rep/stale.csv"), "old").unwrap();
    let (o, _) = run(&["report", f, "--out", "rep"], tmp.path());
    assert_ne!(o.status.code(), Some(0), "an existing folder needs --force");
    assert!(tmp.path().join("rep/stale.csv").exists());
    let (o, _) = run(&["report", f, "--out", "rep", "--force"], tmp.path());
    assert!(matches!(o.status.code(), Some(0 | 1)), "{}", stderr(&o));
    assert!(tmp.path().join("rep/report.html").is_file());
    assert!(
        !tmp.path().join("rep/stale.csv").exists(),
        "stale file kept"
    );
}

// Recorded: a 0.1 mm fin reached 1 467 °C and `heat` exited 0 without a word. Here the coaster's
// 9 mm vehicle fins thinned to 0.1 mm pass 175 °C, the softening point of 6061-T6 (from memory:
// the T6 temper is lost above about 175 °C over time; handbook ageing temperature).
#[test]
fn a_fin_past_its_solidus_is_warned() {
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("thin.yaml");
    std::fs::write(
        &file,
        coaster(|s| s.replace("thickness: 9 mm", "thickness: 0.1 mm")),
    )
    .unwrap();
    let (o, took) = run(&["heat", file.to_str().unwrap()], tmp.path());
    let all = format!("{}{}", String::from_utf8_lossy(&o.stdout), stderr(&o));
    assert!(took < Duration::from_secs(30));
    assert!(
        all.contains("solidus") || all.contains("softening"),
        "exit {:?}: {all}",
        o.status.code()
    );
}

// Recorded: a tolerance inside the documented range (rtol 1.1e-14) failed with "Step size
// underflow" naming no field. It now runs; a tolerance outside the range names the field.
#[test]
fn solver_tolerances_run_or_name_the_field() {
    let t = coaster(|s| s.replace("rider:\n", "solver: { rtol: 1.1e-14 }\nrider:\n"));
    let tmp = tempfile::tempdir().unwrap();
    let file = tmp.path().join("tol.yaml");
    std::fs::write(&file, &t).unwrap();
    let (o, _) = run(
        &["run", file.to_str().unwrap(), "--case", "full"],
        tmp.path(),
    );
    let e = stderr(&o);
    assert!(
        o.status.code() == Some(0) || e.contains("solver.rtol"),
        "exit {:?}: {e}",
        o.status.code()
    );
    let t = coaster(|s| s.replace("rider:\n", "solver: { rtol: 1e-20 }\nrider:\n"));
    refused(&["run"], &t, "solver.rtol");
}
