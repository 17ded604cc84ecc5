//! One full case of each demo scenario and of the small benchmark case (compute only: tables
//! built once outside the loop), and the table build itself. Run with `cargo bench --bench run`.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use criterion::{criterion_group, criterion_main, Criterion};
use eddyzone::dynamics::{simulate_case, BrakeTables, RunOptions};
use std::hint::black_box;
use std::path::Path;

fn load(path: &str) -> eddyzone::scenario::Scenario {
    eddyzone::scenario::load(&Path::new(env!("CARGO_MANIFEST_DIR")).join(path))
        .expect("scenario loads")
}

fn bench_cases(c: &mut Criterion) {
    for path in [
        "benches/data/small-coaster.yaml",
        "scenarios/coaster-brake-run.yaml",
        "scenarios/tower-catch-brake.yaml",
    ] {
        let name = Path::new(path)
            .file_name()
            .and_then(|n| n.to_str())
            .unwrap_or(path);
        let s = load(path);
        let tables = BrakeTables::build(&s).expect("tables");
        let opts = RunOptions::default();
        let case = &s.cases[0];
        c.bench_function(&format!("run one case: {name} / {}", case.name), |b| {
            b.iter(|| black_box(simulate_case(&s, &tables, case, &opts).expect("runs")))
        });
        c.bench_function(&format!("build force tables: {name}"), |b| {
            b.iter(|| black_box(BrakeTables::build(&s).expect("tables")))
        });
    }
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(20);
    targets = bench_cases
}
criterion_main!(benches);
