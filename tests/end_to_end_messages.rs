//! Messages for a scenario with mistakes, with the real binary: one mistake gives one message,
//! every message carries `file:line:column`, a decimal comma says so and shows the corrected
//! text.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::path::PathBuf;
use std::process::Command;

fn bin() -> PathBuf {
    PathBuf::from(env!("CARGO_BIN_EXE_eddyzone"))
}

fn starter() -> String {
    std::fs::read_to_string(
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("scenarios/starters/coaster.yaml"),
    )
    .unwrap()
}

/// `check` on the text: exit code and the error lines.
fn messages(yaml: &str) -> (Option<i32>, Vec<String>) {
    let tmp = tempfile::tempdir().unwrap();
    let f = tmp.path().join("s.yaml");
    std::fs::write(&f, yaml).unwrap();
    let o = Command::new(bin())
        .arg("check")
        .arg("s.yaml")
        .current_dir(tmp.path())
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&o.stderr).into_owned();
    (
        o.status.code(),
        err.lines()
            .filter(|l| l.starts_with("eddyzone: error:"))
            .map(String::from)
            .collect(),
    )
}

/// The line (1-based) of the first occurrence of `needle` in `text`.
fn line_of(text: &str, needle: &str) -> usize {
    text.lines().position(|l| l.contains(needle)).unwrap() + 1
}

/// Asserts exactly one message, at `s.yaml:LINE:COL` with LINE as given, containing `words`.
fn one_message(yaml: &str, line: usize, words: &[&str]) -> String {
    let (code, msgs) = messages(yaml);
    assert_eq!(code, Some(2), "{msgs:?}");
    assert_eq!(msgs.len(), 1, "one mistake, one message: {msgs:#?}");
    let m = &msgs[0];
    let at = format!("s.yaml:{line}:");
    assert!(m.contains(&at), "expected {at} in {m}");
    for w in words {
        assert!(m.contains(w), "expected '{w}' in {m}");
    }
    m.clone()
}

#[test]
fn one_mistake_in_a_section_gives_one_message() {
    let s = starter();
    // Before: a section error also reported "at least one magnet section is needed" at the
    // vehicle mass line.
    let bad = s.replacen("    pole_pitch: 50 mm", "    pole_pitch: -50 mm", 1);
    let m = one_message(
        &bad,
        line_of(&bad, "pole_pitch: -50 mm"),
        &["sections[0].pole_pitch", "got -0.05 m"],
    );
    assert!(!m.contains("at least one"), "{m}");
    let bad = s.replacen("    remanence: 1.25 T", "    remanence: 1.25 mm", 1);
    one_message(
        &bad,
        line_of(&bad, "remanence: 1.25 mm"),
        &["sections[0].remanence", "length", "flux density"],
    );
    // A fin with a mistake: no false "at least one fin".
    let bad = s.replacen("      thickness: 10 mm", "      thickness: 0 mm", 1);
    one_message(
        &bad,
        line_of(&bad, "thickness: 0 mm"),
        &["vehicle.fins[0].thickness"],
    );
    // An empty list still says what is missing.
    let start = s.find("\nsections:").unwrap() + 1;
    let end = s.find("track:").unwrap();
    let bad = format!("{}sections: []\n{}", &s[..start], &s[end..]);
    let (code, msgs) = messages(&bad);
    assert_eq!(code, Some(2));
    assert!(
        msgs.iter()
            .any(|m| m.contains("at least one magnet section")),
        "{msgs:?}"
    );
}

#[test]
fn overlapping_sections_are_located() {
    let s = starter();
    let second = "  - name: T\n    start: 21 m\n    length: 1.0 m\n    pole_pitch: 50 mm\n    \
                  magnet_thickness: 12 mm\n    magnet_fill: 0.85\n    remanence: 1.25 T\n    \
                  clearance: 8 mm\n    pole_height: 150 mm\n";
    let bad = s.replacen("track:\n", &format!("{second}track:\n"), 1);
    one_message(
        &bad,
        line_of(&bad, "start: 21 m"),
        &["sections[1].start", "'B-2' and 'T' overlap"],
    );
    // Copies of one entry that overlap: one message at the pitch, not one per pair.
    let bad = s.replacen("count: 6, pitch: 1.6 m", "count: 6, pitch: 0.5 m", 1);
    one_message(
        &bad,
        line_of(&bad, "pitch: 0.5 m"),
        &["sections[0].repeat.pitch"],
    );
}

#[test]
fn problems_across_fields_have_a_location() {
    let s = starter();
    // A corner range with a zero mass and a profile with one point: checked after reading,
    // located where they are written.
    let bad = s
        .replacen(
            "  each_section_out_of: [full]",
            "  each_section_out_of: [full]\n  corners: { mass: [0 t, 6 t] }",
            1,
        )
        .replacen("    - [60 m, -0.5 m]\n", "", 1);
    let (code, msgs) = messages(&bad);
    assert_eq!(code, Some(2));
    assert_eq!(msgs.len(), 2, "{msgs:#?}");
    let corners = line_of(&bad, "corners:");
    let profile = line_of(&bad, "profile:");
    assert!(
        msgs.iter()
            .any(|m| m.contains(&format!("s.yaml:{corners}:")) && m.contains("corners.mass")),
        "{msgs:#?}"
    );
    assert!(
        msgs.iter().any(|m| m.contains(&format!("s.yaml:{}:", profile + 1))
            && m.contains("track.profile")),
        "{msgs:#?}"
    );
    for m in &msgs {
        let rest = m.strip_prefix("eddyzone: error: s.yaml:").unwrap();
        let mut it = rest.split(':');
        assert!(it.next().unwrap().parse::<u32>().is_ok(), "line in {m}");
        assert!(it.next().unwrap().parse::<u32>().is_ok(), "column in {m}");
    }
}

#[test]
fn a_decimal_comma_is_named_with_the_fix() {
    let s = starter();
    let bad = s.replacen("  mass: 6.0 t ", "  mass: 0,9 t ", 1);
    one_message(
        &bad,
        line_of(&bad, "mass: 0,9 t"),
        &["vehicle.mass", "decimal comma", "'0.9 t'"],
    );
}

/// A command on the text: exit code and the `warning:` lines of its standard output.
fn warnings_of(command: &str, yaml: &str) -> (Option<i32>, Vec<String>) {
    let tmp = tempfile::tempdir().unwrap();
    std::fs::write(tmp.path().join("s.yaml"), yaml).unwrap();
    let o = Command::new(bin())
        .arg(command)
        .arg("s.yaml")
        .current_dir(tmp.path())
        .output()
        .unwrap();
    let out = String::from_utf8_lossy(&o.stdout).into_owned();
    (
        o.status.code(),
        out.lines()
            .filter(|l| l.starts_with("warning:"))
            .map(String::from)
            .collect(),
    )
}

/// The coaster starter with its sections' magnet design replaced by a measured force curve
/// that ends at `top` (m/s); the train enters at 60 km/h.
fn measured_to(top: f64) -> String {
    let design = [
        "    pole_pitch:",
        "    magnet_thickness:",
        "    magnet_fill:",
        "    remanence: ",
        "    clearance:",
        "    pole_height:",
    ];
    let text = starter();
    let kept: Vec<&str> = text
        .lines()
        .filter(|l| !design.iter().any(|d| l.starts_with(d)))
        .map(|l| {
            if l.starts_with("    grade:") {
                "    GRADE"
            } else {
                l
            }
        })
        .collect();
    let curve = format!(
        "    force_curve:\n      fin_temp: 20 °C\n      points: [[0 m/s, 0 N/m], [2 m/s, 30000 N/m], \
         [{top} m/s, 45000 N/m]]\n    grade: N40H"
    );
    let joined = kept.join("\n") + "\n";
    assert!(joined.contains("    GRADE"), "the starter's section");
    joined.replacen("    GRADE", &curve, 1)
}

#[test]
fn leaving_a_measured_curve_is_said_once() {
    // 8 cases (full, empty, six N−1) all enter at 16.7 m/s, above the curve's 10 m/s.
    let yaml = measured_to(10.0);
    let measured = |w: &[String]| -> Vec<String> {
        w.iter()
            .filter(|l| l.contains("measured force curve"))
            .cloned()
            .collect()
    };
    let (code, w) = warnings_of("run", &yaml);
    assert_eq!(code, Some(0));
    let m = measured(&w);
    assert_eq!(m.len(), 1, "{w:#?}");
    assert!(m[0].contains("every case (8)"), "{}", m[0]);
    // The speeds differ between the cases: shown as their range.
    assert!(m[0].contains("–"), "{}", m[0]);
    // Every wording once.
    let mut once = w.clone();
    once.dedup();
    assert_eq!(once, w);
    let (_, w) = warnings_of("check", &yaml);
    assert_eq!(measured(&w).len(), 1, "{w:#?}");
    // A curve that covers every speed of the runs: no such warning.
    let (code, w) = warnings_of("run", &measured_to(30.0));
    assert_eq!(code, Some(0));
    assert!(measured(&w).is_empty(), "{w:#?}");
}

#[test]
fn far_above_the_critical_speed_is_said_once() {
    // Thin-sheet critical speed of the fundamental between iron planes, 2·tanh(k·a)/(μ0·σ·d),
    // where Laithwaite's goodness factor μ0·σ·d·v/(2·tanh(k·a)) is 1 (from memory), with
    // k = π/τ and a = fin centre to iron: copper C11000 (58 MS/m, handbook value), 10 mm fin,
    // 8 mm clearance, 12 mm magnets, τ = 50 mm: a = 5 + 8 + 12 = 25 mm, k·a = 1.571,
    // tanh = 0.917; v_c = 1.834/(1.2566e-6·5.8e7·0.010) = 2.5 m/s. Entering at 90 km/h
    // (25 m/s) is 10×; the model's own critical speed (edge factor and harmonics included) is
    // higher but not twice as high, so every case is more than 5× above it.
    let s = starter()
        .replacen("material: aluminium-6061-t6", "material: copper-c11000", 1)
        .replacen("speed: 60 km/h", "speed: 90 km/h", 1);
    let (code, w) = warnings_of("run", &s);
    assert_eq!(code, Some(0));
    let far: Vec<_> = w.iter().filter(|l| l.contains("critical speed")).collect();
    assert_eq!(far.len(), 1, "{w:#?}");
    assert!(far[0].contains("of 8 case(s)"), "{}", far[0]);
    // The aluminium starter (6061-T6, about 25 MS/m: v_c = 5.8 m/s by the same formula) enters
    // at 2.9×: no warning.
    let (_, w) = warnings_of("run", &starter());
    assert!(!w.iter().any(|l| l.contains("critical speed")), "{w:#?}");
}

#[test]
fn an_unmanned_sled_is_not_spoken_of_as_ridden() {
    // The sled starter has no `rider:` block: `check` speaks of the payload and the vehicle's
    // axes, the profile CSVs name the felt columns by axis.
    let sled = std::fs::read_to_string(
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("scenarios/starters/sled.yaml"),
    )
    .unwrap();
    let tmp = tempfile::tempdir().unwrap();
    std::fs::write(tmp.path().join("sled.yaml"), &sled).unwrap();
    let o = Command::new(bin())
        .args(["check", "sled.yaml"])
        .current_dir(tmp.path())
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0));
    let out = String::from_utf8_lossy(&o.stdout).to_lowercase();
    assert!(!out.contains("rider"), "{out}");
    assert!(out.contains("payload") && out.contains("vehicle"), "{out}");
    let o = Command::new(bin())
        .args(["run", "sled.yaml", "--profile", "p"])
        .current_dir(tmp.path())
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0));
    let csv = std::fs::read_to_string(tmp.path().join("p/heavy.csv")).unwrap();
    let header = csv.lines().next().unwrap();
    assert!(
        header.ends_with("felt_x_raw_g,felt_x_filtered_g,felt_z_raw_g,felt_z_filtered_g"),
        "{header}"
    );
    // On the level track the felt x is −(brake + resistance)/(m·g) while moving forward: at
    // no sample does braking push the payload forward.
    let cols: Vec<&str> = header.split(',').collect();
    let at = |name: &str| cols.iter().position(|c| *c == name).unwrap();
    let (raw, z) = (at("felt_x_raw_g"), at("felt_z_raw_g"));
    for line in csv.lines().skip(1) {
        let v: Vec<f64> = line
            .split(',')
            .map(|x| x.parse().unwrap_or(f64::NAN))
            .collect();
        assert!(v[raw] <= 1e-12, "{line}");
        // Level track: cos θ = 1 across it.
        assert!((v[z] - 1.0).abs() < 1e-12, "{line}");
    }
}
