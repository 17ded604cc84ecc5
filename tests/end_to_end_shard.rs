//! `eddyzone sweep --shard K/N` and `sweep merge` end to end: the merged shards give the bytes of
//! the unsharded run's CSV, JSON, worst-sample scenario and summary, in any order of the files;
//! shards that do not make one sweep (another seed, another N, a shard missing or given twice,
//! no shard file) are refused with exit 2 and a message naming the fault.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

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

/// The sweep demo's zone with a small sweep block of `samples` samples and `seed`: clearance,
/// fin offset and conductivity draws, so the samples use several force tables and carry the
/// peak lateral force.
fn demo(dir: &Path, name: &str, samples: usize, seed: u64) -> PathBuf {
    let text = std::fs::read_to_string(root().join("scenarios/coaster-sweep.yaml")).unwrap();
    let (zone, _) = text.split_once("\nsweep:").unwrap();
    let limits = root().join("scenarios/limits/coaster-seated-example.yaml");
    let zone = zone.replace(
        "limits_file: limits/coaster-seated-example.yaml",
        &format!("limits_file: {}", limits.display()),
    );
    let block = format!(
        "sweep:
  case: full
  method: latin_hypercube
  samples: {samples}
  seed: {seed}
  inputs:
    mass: {{ distribution: uniform, min: 6.8 t, max: 7.8 t }}
    speed: {{ distribution: normal, mean: 77 km/h, std: 2 km/h, min: 70 km/h, max: 84 km/h }}
    clearance: {{ distribution: discrete, values: [5.5 mm, 6.5 mm] }}
    fin_offset: {{ distribution: discrete, values: [0 mm, 1.5 mm] }}
    fin_conductivity: {{ distribution: discrete, values: [24 MS/m, 26 MS/m], scope: each }}
    force_factor: {{ distribution: normal, mean: 1.0, std: 0.05, min: 0.85, max: 1.15 }}
"
    );
    let p = dir.join(name);
    std::fs::write(&p, format!("{zone}\n{block}")).unwrap();
    p
}

fn s(p: &Path) -> &str {
    p.to_str().unwrap()
}

/// Runs shard `k` of `n` of `scenario` into `dir/<tag>-k.json`.
fn shard(dir: &Path, scenario: &Path, tag: &str, k: usize, n: usize) -> PathBuf {
    let out = dir.join(format!("{tag}-{k}.json"));
    let spec = format!("{k}/{n}");
    let o = eddyzone(&[
        "sweep",
        s(scenario),
        "--shard",
        &spec,
        "--shard-file",
        s(&out),
    ]);
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    out
}

/// The outputs (CSV, JSON file, worst scenario, stdout) of `args` plus output options.
fn outputs(dir: &Path, tag: &str, args: &[&str]) -> (Option<i32>, Vec<Vec<u8>>) {
    let csv = dir.join(format!("{tag}.csv"));
    let json = dir.join(format!("{tag}.json"));
    let worst = dir.join(format!("{tag}-worst.yaml"));
    let mut all: Vec<&str> = args.to_vec();
    all.extend([
        "--csv",
        s(&csv),
        "--json-file",
        s(&json),
        "--write-worst",
        s(&worst),
    ]);
    let o = eddyzone(&all);
    let files = [&csv, &json, &worst]
        .iter()
        .map(|p| std::fs::read(p).unwrap())
        .chain([o.stdout.clone()])
        .collect();
    (o.status.code(), files)
}

#[test]
fn merged_shards_are_the_unsharded_bytes() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let sc = demo(d, "s.yaml", 23, 11);
    let (code, whole) = outputs(d, "whole", &["sweep", s(&sc)]);
    assert!(code == Some(0) || code == Some(1), "exit {code:?}");
    // 23 samples in 4 shards (sizes 5, 6, 6, 6), merged in a shuffled order.
    let files: Vec<PathBuf> = (1..=4).map(|k| shard(d, &sc, "a", k, 4)).collect();
    let order = [&files[2], &files[0], &files[3], &files[1]];
    let mut args = vec!["sweep", "merge"];
    args.extend(order.iter().map(|p| s(p)));
    let (mcode, merged) = outputs(d, "merged", &args);
    assert_eq!(mcode, code);
    for (name, (a, b)) in ["CSV", "JSON", "worst scenario", "summary"]
        .iter()
        .zip(whole.iter().zip(&merged))
    {
        assert!(!a.is_empty(), "{name} is empty");
        assert!(a == b, "the merged {name} differs from the unsharded one");
    }
    // The result is not trivially one table: the draws need several (2 clearances × 2^5
    // conductivity combinations, of which 23 samples use some).
    let j: serde_json::Value = serde_json::from_slice(&whole[1]).unwrap();
    assert!(j["tables"].as_u64().unwrap() > 1);
    assert_eq!(j["samples"].as_array().unwrap().len(), 23);
    // The peak lateral force went through the shards: a column of the CSV, a value in every
    // sample (0 for a centred fin, towards the centre — negative — for the 1.5 mm offset).
    let header = String::from_utf8_lossy(&merged[0]);
    assert!(header
        .lines()
        .next()
        .unwrap()
        .contains("peak_lateral_force_n"));
    assert!(j["lateral"]["spread"]["min"].as_f64().unwrap() < 0.0);
    for smp in j["samples"].as_array().unwrap() {
        let f = smp["peak_lateral_force_n"].as_f64().unwrap();
        let e = smp["inputs"].as_array().unwrap()[3].as_f64().unwrap();
        assert!(if e == 0.0 { f == 0.0 } else { f < 0.0 }, "e={e} f={f}");
    }
    // One shard of one is the whole too.
    let one = shard(d, &sc, "one", 1, 1);
    let (_, single) = outputs(d, "single", &["sweep", "merge", s(&one)]);
    assert!(single[1] == whole[1]);
}

#[test]
fn shards_that_do_not_make_one_sweep_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let sc = demo(d, "s.yaml", 6, 3);
    let other_seed = demo(d, "t.yaml", 6, 4);
    let a: Vec<PathBuf> = (1..=3).map(|k| shard(d, &sc, "a", k, 3)).collect();
    let seed = shard(d, &other_seed, "seed", 2, 3);
    let n2 = shard(d, &sc, "n2", 2, 2);
    let refused = |files: &[&Path], needle: &str| {
        let mut args = vec!["sweep", "merge"];
        args.extend(files.iter().map(|p| s(p)));
        let o = eddyzone(&args);
        let err = String::from_utf8_lossy(&o.stderr).to_string();
        assert_eq!(o.status.code(), Some(2), "{files:?}: {err}");
        assert!(err.contains(needle), "{files:?}: '{err}' lacks '{needle}'");
    };
    refused(&[&a[0], &a[2]], "missing shard(s) [2] of 3");
    refused(&[&a[0], &a[1], &a[1], &a[2]], "shard 2/3 given twice");
    // Another seed changes the scenario's sweep block: refused as another scenario.
    refused(&[&a[0], &seed, &a[2]], "scenario differs");
    refused(&[&a[0], &a[1], &a[2], &n2], "shard count differs");
    let junk = d.join("junk.json");
    std::fs::write(&junk, "{\"format\": 1}").unwrap();
    refused(&[&junk], "not an eddyzone sweep shard file");
    // A bad K/N is a usage error.
    let o = eddyzone(&["sweep", s(&sc), "--shard", "4/3", "--shard-file", s(&junk)]);
    assert_eq!(o.status.code(), Some(2));
    // Together the three shards merge.
    let o = eddyzone(&["sweep", "merge", s(&a[0]), s(&a[1]), s(&a[2])]);
    assert!(matches!(o.status.code(), Some(0 | 1)), "{o:?}");
}
