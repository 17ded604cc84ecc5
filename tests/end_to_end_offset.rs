//! End-to-end runs of the real binary with a fin off-centre (`fin_offset` on a magnet section):
//! the peak lateral force is reported, points back towards the centre, equals the off-centre
//! model × active height × overlap × section-end factor at the reported point to the table's
//! accuracy, and a centred fin reports nothing new; bad offsets are refused with line:column.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::dynamics::model::{section_end_factor, PairLaw};
use eddyzone::dynamics::BrakeTables;
use eddyzone::physics::{BrakeGeometry, DragModel, OffsetModel};
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// The brake geometry of the test scenario's section and fin (as written in its YAML).
fn geometry() -> BrakeGeometry {
    BrakeGeometry {
        pole_pitch_m: 0.050,
        magnet_thickness_m: 0.012,
        magnet_fill: 0.85,
        clearance_m: 0.006,
        fin_thickness_m: 0.010,
        fin_height_m: 0.180,
        pole_height_m: 0.150,
    }
}

fn run(args: &[&str], dir: &Path) -> Output {
    Command::new(PathBuf::from(env!("CARGO_BIN_EXE_eddyzone")))
        .args(args)
        .current_dir(dir)
        .output()
        .expect("the binary runs")
}

/// One fin (0.6 m, its leading edge 0.5 m behind the front) through one 2 m section at 10 m on
/// a level track; a fin material without temperature coefficient and magnets at 20 °C, so the
/// conductivity and remanence are the reference ones throughout the run.
fn scenario(offset_line: &str) -> String {
    format!(
        "version: 1
name: off-centre
materials:
  flat: {{ conductivity: 30 MS/m, temp_coeff: 0 %/K, density: 2.7 g/cm^3, specific_heat: 900 J/(kg*K) }}
vehicle:
  mass: 800 kg
  length: 3 m
  fins:
    - {{ name: fin, offset: 0.5 m, length: 0.6 m, height: 180 mm, thickness: 10 mm, material: flat }}
sections:
  - name: S
    start: 10 m
    length: 2 m
    pole_pitch: 50 mm
    magnet_thickness: 12 mm
    magnet_fill: 0.85
    remanence: 1.25 T
    clearance: 6 mm
    pole_height: 150 mm
{offset_line}track: {{ grade: 0 }}
start: {{ position: 9 m, speed: 12 m/s }}
temperatures: {{ fin: 20 °C, magnet: 20 °C }}
cases:
  - name: one
"
    )
}

fn write(dir: &Path, name: &str, text: &str) -> String {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p.to_str().unwrap().to_string()
}

fn json(o: &Output) -> serde_json::Value {
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    serde_json::from_slice(&o.stdout).unwrap()
}

/// The lateral force the run should report at front position `x` and speed `v`, N: the exact
/// off-centre model (not the table) × active height × the overlap of the fin [x − 1.1, x − 0.5]
/// with the section [10, 12] × the section-end factor of the scenario's own pair.
fn expected_lateral_n(path: &str, e: f64, x: f64, v: f64) -> f64 {
    let scenario = eddyzone::scenario::load(Path::new(path)).unwrap();
    let tables = BrakeTables::build(&scenario).unwrap();
    let PairLaw::Table {
        section_ends,
        inverse_section_length_per_m,
        active_height_m,
        ..
    } = &tables.pairs[0].law
    else {
        panic!("a model section");
    };
    let g = geometry();
    assert_eq!(*active_height_m, 0.150);
    let model = DragModel::new(&g, 1.25, 30e6).unwrap();
    let per_area = OffsetModel::new(&model, e).unwrap().lateral_per_area_pa(v);
    let overlap = ((x - 0.5).min(12.0) - (x - 1.1).max(10.0)).max(0.0);
    let ends = section_end_factor(
        section_ends.total_m_scaled(v, 1.0),
        *inverse_section_length_per_m,
    );
    per_area * active_height_m * overlap * ends
}

#[test]
fn lateral_force_is_reported_centring_and_equals_the_model() {
    let tmp = tempfile::tempdir().unwrap();
    let mut seen = Vec::new();
    for (mm, e) in [("2 mm", 0.002), ("-2 mm", -0.002)] {
        let p = write(
            tmp.path(),
            "off.yaml",
            &scenario(&format!("    fin_offset: {mm}\n")),
        );
        let j = json(&run(&["run", "--json", &p], tmp.path()));
        let c = &j["cases"][0];
        let f = c["peak_lateral_force_n"].as_f64().unwrap();
        let x = c["peak_lateral_position_m"].as_f64().unwrap();
        let v = c["peak_lateral_speed_m_s"].as_f64().unwrap();
        // Sign convention (README, `physics::offset`): along +y, the side a positive offset
        // points to; the fin is pushed back towards the centre, so the sign is opposite to e.
        assert!(f * e < 0.0, "e={e}: {f} N");
        // Table (≤ 1e-9 relative to the model, `physics::table`) against the exact model at
        // the reported point: 2e-9 relative (the table's accuracy and rounding).
        let want = expected_lateral_n(&p, e, x, v);
        assert!((f / want - 1.0).abs() < 2e-9, "e={e}: {f} vs {want}");
        // The fin was fully inside the section at the peak (overlap 0.6 m: the earliest full
        // overlap, where the speed is highest), and the force is the largest of the run.
        assert!((11.1 - 1e-6..=12.5).contains(&x), "{x}");
        seen.push(f);
        // The table column appears, with the signed value.
        let out = run(&["run", &p], tmp.path());
        let text = String::from_utf8_lossy(&out.stdout);
        let head = text.lines().nth(1).unwrap();
        assert!(
            head.contains("lateral_n") && head.contains("lateral_at_m"),
            "{head}"
        );
        assert!(text.contains(&format!("{f:.1}")), "{text}");
    }
    // The HTML report's run table has the column too.
    let o = run(&["report", "off.yaml", "--out", "rep"], tmp.path());
    assert!(o.status.success(), "{o:?}");
    let html = std::fs::read_to_string(tmp.path().join("rep/report.html")).unwrap();
    assert!(html.contains("<th>peak lateral force (N, along +y)</th>"));
    // Odd in the offset (physics::offset: the lateral force is odd in e, the drag even, so both
    // runs are the same motion): equal and opposite to 1e-12.
    assert!(
        (seen[0] + seen[1]).abs() < 1e-12 * seen[0].abs(),
        "{seen:?}"
    );
}

#[test]
fn centred_fin_reports_no_lateral_force() {
    let tmp = tempfile::tempdir().unwrap();
    for line in ["", "    fin_offset: 0 mm\n"] {
        let p = write(tmp.path(), "centred.yaml", &scenario(line));
        let o = run(&["run", "--json", &p], tmp.path());
        let j = json(&o);
        assert!(j["cases"][0].get("peak_lateral_force_n").is_none());
        let text = String::from_utf8_lossy(&run(&["run", &p], tmp.path()).stdout).into_owned();
        assert!(!text.contains("lateral"), "{text}");
    }
}

#[test]
fn bad_offsets_are_refused_with_their_place() {
    let tmp = tempfile::tempdir().unwrap();
    // The offset line is line 20 of the file, its value at column 17.
    let cases = [
        (
            "    fin_offset: 6 mm\n",
            "must be smaller in size than the clearance",
        ),
        (
            "    fin_offset: -7 mm\n",
            "must be smaller in size than the clearance",
        ),
        ("    fin_offset: 2 kg\n", "fin_offset"),
    ];
    for (line, msg) in cases {
        let p = write(tmp.path(), "bad.yaml", &scenario(line));
        let o = run(&["run", &p], tmp.path());
        assert_eq!(o.status.code(), Some(2), "{line}");
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(
            err.contains("bad.yaml:20:17: sections[0].fin_offset:") && err.contains(msg),
            "{line}: {err}"
        );
    }
    // A measured curve has no lateral force: an offset beside it is refused, not ignored.
    let text = scenario("").replace(
        "    pole_pitch: 50 mm\n",
        "    force_curve: { fin_temp: 20 °C, points: [[0 m/s, 0 N/m], [20 m/s, 3 kN/m]] }\n    fin_offset: 1 mm\n    pole_pitch: 50 mm\n",
    );
    let p = write(tmp.path(), "measured.yaml", &text);
    let o = run(&["run", &p], tmp.path());
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("measured.yaml:15:17: sections[0].fin_offset:")
            && err.contains("measured force curve"),
        "{err}"
    );
}

#[test]
fn sweep_of_the_offset_reports_the_lateral_force() {
    let tmp = tempfile::tempdir().unwrap();
    let block = "sweep:
  case: one
  method: latin_hypercube
  samples: 12
  seed: 5
  inputs:
    fin_offset: { distribution: uniform, min: 0.5 mm, max: 3 mm }
";
    let p = write(
        tmp.path(),
        "sweep.yaml",
        &format!("{}{block}", scenario("")),
    );
    let o = run(
        &["sweep", &p, "--json-file", "out.json", "--figures", "figs"],
        tmp.path(),
    );
    assert!(o.status.code() == Some(0), "{o:?}");
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(text.contains("peak_lateral_force_n"), "{text}");
    // Its ECDF (no limit line) and tornado figures are written beside the checks' ones.
    for f in [
        "ecdf-peak_lateral_force_n.svg",
        "tornado-peak_lateral_force_n.png",
    ] {
        assert!(tmp.path().join("figs").join(f).is_file(), "{f}");
    }
    let svg =
        std::fs::read_to_string(tmp.path().join("figs/ecdf-peak_lateral_force_n.svg")).unwrap();
    assert!(svg.contains("peak_lateral_force_n (N)") && !svg.contains("limit "));
    let j: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(tmp.path().join("out.json")).unwrap())
            .unwrap();
    // Every sample pushed back towards the centre, and the force grows with the offset (the
    // lateral force is odd in e and, in this range, monotone: `physics::offset` low- and
    // high-speed limits ∝ sinh(2ke) and r₋² − r₊²): Spearman's ρ of −1 exactly.
    let lat = &j["lateral"];
    assert_eq!(lat["output"], "peak_lateral_force_n");
    assert!(lat["spread"]["max"].as_f64().unwrap() < 0.0);
    let rho = lat["sensitivity"][0]["spearman"].as_f64().unwrap();
    assert_eq!(lat["sensitivity"][0]["variable"], "fin_offset_m");
    assert!(rho == -1.0, "{rho}");
    // A sample is a single run: the sample with the largest offset, run on its own, reports
    // the same force to 1e-6 (its tables reach another speed, so the table interpolation,
    // ≤ 1e-9 of the model, and the offset written back in mm differ in the last digits).
    let samples = j["samples"].as_array().unwrap();
    let big = samples
        .iter()
        .max_by(|a, b| {
            a["inputs"][0]
                .as_f64()
                .unwrap()
                .total_cmp(&b["inputs"][0].as_f64().unwrap())
        })
        .unwrap();
    let e = big["inputs"][0].as_f64().unwrap();
    let one = write(
        tmp.path(),
        "one.yaml",
        &scenario(&format!("    fin_offset: {} mm\n", e * 1e3)),
    );
    let c = json(&run(&["run", "--json", &one], tmp.path()));
    let (a, b) = (
        big["peak_lateral_force_n"].as_f64().unwrap(),
        c["cases"][0]["peak_lateral_force_n"].as_f64().unwrap(),
    );
    assert!((a / b - 1.0).abs() < 1e-6, "{a} vs {b}");
    // An offset that can reach the clearance is refused at its input, with its place.
    let bad = block.replace("max: 3 mm", "max: 6 mm");
    let p = write(tmp.path(), "bad.yaml", &format!("{}{bad}", scenario("")));
    let o = run(&["sweep", &p], tmp.path());
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("bad.yaml:31:33: sweep.inputs.fin_offset:") && err.contains("6 mm"),
        "{err}"
    );
}

#[test]
fn curve_of_an_off_centre_section_has_its_drag_and_lateral_force() {
    let tmp = tempfile::tempdir().unwrap();
    let p = write(tmp.path(), "off.yaml", &scenario("    fin_offset: 2 mm\n"));
    let speeds = "2:20:2";
    let j = json(&run(
        &["curve", &p, "--format", "json", "--speeds", speeds],
        tmp.path(),
    ));
    let g = geometry();
    let o = OffsetModel::new(&DragModel::new(&g, 1.25, 30e6).unwrap(), 0.002).unwrap();
    let points = j[0]["points"].as_array().unwrap();
    assert_eq!(points.len(), 10);
    for q in points {
        // At 20 °C the curve is the off-centre model itself × the active height (0.15 m):
        // 1e-12 relative (rounding).
        let v = q["speed_m_s"].as_f64().unwrap();
        let drag = q["force_per_area_pa"].as_f64().unwrap();
        let lat = q["lateral_per_m_n"].as_f64().unwrap();
        assert!((drag / o.drag_per_area_pa(v) - 1.0).abs() < 1e-12, "v={v}");
        assert!(
            (lat / (o.lateral_per_area_pa(v) * 0.15) - 1.0).abs() < 1e-12,
            "v={v}"
        );
        assert!(lat < 0.0 && q["lateral_full_overlap_n"].as_f64().unwrap() < 0.0);
    }
    // The CSV carries the two lateral columns after the usual ones; a centred fin has none.
    let csv = run(
        &["curve", &p, "--format", "csv", "--speeds", speeds],
        tmp.path(),
    );
    let head = String::from_utf8_lossy(&csv.stdout)
        .lines()
        .next()
        .unwrap()
        .to_string();
    assert!(
        head.ends_with(",lateral_per_m_n,lateral_full_overlap_n"),
        "{head}"
    );
    let c = write(tmp.path(), "centred.yaml", &scenario(""));
    let csv = run(
        &["curve", &c, "--format", "csv", "--speeds", speeds],
        tmp.path(),
    );
    assert!(!String::from_utf8_lossy(&csv.stdout).contains("lateral"));
}
