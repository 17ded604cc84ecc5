//! The sweep demo: a whole sweep (every sample judged, statistics, the worst sample re-judged) and
//! the run-type part alone (each sample's case integrated on shared tables, no verdict). Figures
//! are per sample (criterion's throughput). Run with `cargo bench --bench sweep`.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use eddyzone::dynamics::{simulate_case, BrakeTables, RunOptions};
use eddyzone::study::{JudgeOptions, Silent};
use eddyzone::sweep::{apply, run_sweep, sample};
use rayon::prelude::*;
use std::hint::black_box;
use std::path::Path;

const SAMPLES: usize = 400;

fn demo() -> eddyzone::scenario::Scenario {
    let mut s = eddyzone::scenario::load(
        &Path::new(env!("CARGO_MANIFEST_DIR")).join("scenarios/coaster-sweep.yaml"),
    )
    .expect("demo scenario loads");
    if let Some(w) = s.sweep.as_mut() {
        w.samples = SAMPLES;
    }
    s
}

fn bench_sweep(c: &mut Criterion) {
    let s = demo();
    let mut g = c.benchmark_group("sweep demo");
    g.throughput(Throughput::Elements(SAMPLES as u64));
    g.sample_size(10);
    g.bench_function("judged samples (run_sweep)", |b| {
        b.iter(|| black_box(run_sweep(&s, &JudgeOptions::default(), &Silent).expect("sweeps")))
    });
    // Run-type outputs: the samples' cases (mass, speed, temperatures, force factor) on the
    // nominal design's tables.
    let sweep = s.sweep.clone().unwrap();
    let vars = sample::variables(&s, &sweep);
    let values = sample::sample_values(&sweep, &vars);
    let base = apply::base_case(&s, &sweep).unwrap();
    let cases: Vec<_> = values
        .iter()
        .enumerate()
        .map(|(i, v)| apply::sample_case(base, &vars, v, i))
        .collect();
    let tables = BrakeTables::build(&s).expect("tables");
    let opts = RunOptions::default();
    // Each run is reduced to its run-type outputs as the sweep reduces each sample (its samples
    // are dropped where they were made, not held for all 400 cases).
    g.bench_function("run-type samples (cases on shared tables)", |b| {
        b.iter(|| {
            let runs: Vec<_> = cases
                .par_iter()
                .map(|c| {
                    let r = simulate_case(&s, &tables, c, &opts).expect("runs");
                    (
                        r.exit_speed_m_s,
                        r.peak_decel_m_s2,
                        r.peak_onset_g_s,
                        r.time_in_zone_s,
                    )
                })
                .collect();
            black_box(runs)
        })
    });
    g.finish();
}

criterion_group!(benches, bench_sweep);
criterion_main!(benches);
