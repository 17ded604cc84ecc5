//! Heat of one case of the tower demo over its duty cycle (passes with track-fin cells until the
//! steady state), and of one pass. Run with `cargo bench --bench heat`.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use criterion::{criterion_group, criterion_main, Criterion};
use eddyzone::dynamics::BrakeTables;
use eddyzone::thermal::{heat_case, run_pass, HeatOptions, DEFAULT_CELL_M};
use std::hint::black_box;
use std::path::Path;

fn bench_heat(c: &mut Criterion) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenarios/tower-catch-brake.yaml");
    let s = eddyzone::scenario::load(&path).expect("demo scenario loads");
    let tables = BrakeTables::build(&s).expect("tables");
    let case = &s.cases[0];
    let options = HeatOptions::default();
    c.bench_function("heat one case over the duty cycle: tower / full", |b| {
        b.iter(|| black_box(heat_case(&s, &tables, case, &options).expect("heat")))
    });
    let states = eddyzone::thermal::pass::uniform_states(&s, case.fin_temp_c, DEFAULT_CELL_M);
    c.bench_function("one heated pass: tower / full", |b| {
        b.iter(|| {
            black_box(
                run_pass(&s, &tables, case, &states, true, options.sample_dt_s).expect("pass"),
            )
        })
    });
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(10);
    targets = bench_heat
}
criterion_main!(benches);
