//! Signal checks on the felt acceleration of one demo case: the sustained-acceleration
//! envelope (exact sweep against the dense 1 024-duration grid it replaces), the zero-phase and
//! causal filters, onset and release. Run with `cargo bench --bench signals`.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use criterion::{criterion_group, criterion_main, Criterion};
use eddyzone::checks::envelope::{Envelope, DEFAULT_MAX_GRID_DURATIONS};
use eddyzone::checks::features::{onset_release, DEFAULT_RATE_WINDOW_S};
use eddyzone::checks::filter::{Butterworth, UniformSignal};
use eddyzone::checks::rider::rider_signals;
use eddyzone::checks::zero_phase::ZeroPhaseButterworth;
use eddyzone::dynamics::{simulate_case, BrakeTables, RunOptions};
use std::hint::black_box;
use std::path::Path;

/// The demo's first case: its filtered braking signal on the rider axis the envelope limits
/// (braking as a positive number), the raw one, and that envelope.
fn demo_signal(name: &str) -> (UniformSignal, UniformSignal, Envelope) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("scenarios")
        .join(name);
    let s = eddyzone::scenario::load(&path).expect("demo scenario loads");
    let tables = BrakeTables::build(&s).expect("tables");
    let run = simulate_case(&s, &tables, &s.cases[0], &RunOptions::default()).expect("runs");
    let sig = rider_signals(&run, &s.rider).expect("rider signals");
    for k in 0..3 {
        let env = &s.limits.envelope[k];
        if let Some(pts) = &env.positive {
            let e = Envelope::new(pts.clone()).expect("envelope");
            return (sig.filtered[k].clone(), sig.raw[k].clone(), e);
        }
        if let Some(pts) = &env.negative {
            let e = Envelope::new(pts.clone()).expect("envelope");
            return (sig.filtered[k].negated(), sig.raw[k].negated(), e);
        }
    }
    panic!("{name} has no envelope limit");
}

fn bench_signals(c: &mut Criterion) {
    for name in ["tower-catch-brake.yaml", "coaster-brake-run.yaml"] {
        let (filtered, raw, env) = demo_signal(name);
        let n = filtered.len();
        c.bench_function(&format!("envelope dense grid: {name} ({n} samples)"), |b| {
            b.iter(|| black_box(env.check_with_grid(&filtered, DEFAULT_MAX_GRID_DURATIONS)))
        });
        c.bench_function(&format!("envelope exact: {name} ({n} samples)"), |b| {
            b.iter(|| black_box(env.check(&filtered)))
        });
        let fs = raw.sample_rate_hz();
        let zp = ZeroPhaseButterworth::ride_default(fs).expect("filter");
        c.bench_function(&format!("zero-phase filter: {name}"), |b| {
            b.iter(|| black_box(zp.filter(&raw.values)))
        });
        let causal = Butterworth::ride_default(fs).expect("filter");
        c.bench_function(&format!("causal filter: {name}"), |b| {
            b.iter(|| black_box(causal.filter(&raw.values)))
        });
        c.bench_function(&format!("onset and release: {name}"), |b| {
            b.iter(|| black_box(onset_release(&filtered, DEFAULT_RATE_WINDOW_S)))
        });
    }
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(20);
    targets = bench_signals
}
criterion_main!(benches);
