//! Benchmarks of the drag law: one direct model evaluation, one table evaluation, building a
//! table, and the critical-speed search (through `DragModel::new`, which performs it).

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use criterion::{criterion_group, criterion_main, Criterion};
use eddyzone::physics::{BrakeGeometry, DragModel, ForceTable};
use std::hint::black_box;

/// Typical section of the physics brief: copper fin, NdFeB magnets.
fn typical() -> BrakeGeometry {
    BrakeGeometry::example()
}

fn benches(c: &mut Criterion) {
    let geometry = typical();
    let model = match DragModel::new(&geometry, 1.25, 58e6) {
        Ok(model) => model,
        Err(error) => panic!("typical geometry must be valid: {error}"),
    };
    let table = ForceTable::build(&model, 60.0);

    let mut speed = 0.0_f64;
    c.bench_function("direct model evaluation", |b| {
        b.iter(|| {
            speed = if speed > 59.0 { 0.137 } else { speed + 0.731 };
            black_box(model.force_per_area_pa(black_box(speed)))
        })
    });
    let mut speed = 0.0_f64;
    c.bench_function("table evaluation", |b| {
        b.iter(|| {
            speed = if speed > 59.0 { 0.137 } else { speed + 0.731 };
            black_box(table.force_per_area_pa(black_box(speed)))
        })
    });
    let mut speed = 0.0_f64;
    c.bench_function("table evaluation, scaled", |b| {
        b.iter(|| {
            speed = if speed > 45.0 { 0.137 } else { speed + 0.731 };
            black_box(table.force_per_area_scaled_pa(black_box(speed), 1.2, 0.97))
        })
    });
    c.bench_function("build table to 60 m/s", |b| {
        b.iter(|| black_box(ForceTable::build(black_box(&model), 60.0)))
    });
    c.bench_function("model construction with critical-speed search", |b| {
        b.iter(|| black_box(DragModel::new(black_box(&geometry), 1.25, 58e6)))
    });
}

criterion_group!(force, benches);
criterion_main!(force);
