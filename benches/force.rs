//! Benchmarks of the drag law: one direct model evaluation, one table evaluation, building a
//! table, the finite-height edge factors of two harmonics, and the critical-speed search (through
//! `DragModel::new`, which performs it), each with
//! the finite-height factor and with the Russell–Norsworthy conductivity factor of the model
//! before it; the section-end and fin-end tables, the section-end curve of the runs and the
//! uncertainty band.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use criterion::{criterion_group, criterion_main, Criterion};
use eddyzone::physics::{
    BrakeGeometry, DragModel, EdgeModel, EndTable, FinEndTable, FiniteHeightEdge, ForceTable,
    LateralTable, ModelUncertainty, OffsetModel, SectionEndCurve,
};
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
    let old = match DragModel::with_edge_model(
        &geometry,
        1.25,
        58e6,
        EdgeModel::RussellNorsworthyConductivity,
    ) {
        Ok(model) => model,
        Err(error) => panic!("typical geometry must be valid: {error}"),
    };

    let mut speed = 0.0_f64;
    c.bench_function("direct model evaluation", |b| {
        b.iter(|| {
            speed = if speed > 59.0 { 0.137 } else { speed + 0.731 };
            black_box(model.force_per_area_pa(black_box(speed)))
        })
    });
    let mut speed = 0.0_f64;
    c.bench_function(
        "direct model evaluation, Russell-Norsworthy sigma_e (before)",
        |b| {
            b.iter(|| {
                speed = if speed > 59.0 { 0.137 } else { speed + 0.731 };
                black_box(old.force_per_area_pa(black_box(speed)))
            })
        },
    );
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
    c.bench_function("finite-height edge factor of the fundamental", |b| {
        b.iter(|| black_box(FiniteHeightEdge::new(black_box(&geometry), 1)))
    });
    c.bench_function("finite-height edge factor of harmonic 5", |b| {
        b.iter(|| black_box(FiniteHeightEdge::new(black_box(&geometry), 5)))
    });
    c.bench_function(
        "model construction, Russell-Norsworthy sigma_e (before)",
        |b| {
            b.iter(|| {
                black_box(DragModel::with_edge_model(
                    black_box(&geometry),
                    1.25,
                    58e6,
                    EdgeModel::RussellNorsworthyConductivity,
                ))
            })
        },
    );
    c.bench_function(
        "build table to 60 m/s, Russell-Norsworthy sigma_e (before)",
        |b| b.iter(|| black_box(ForceTable::build(black_box(&old), 60.0))),
    );
    c.bench_function("section end table", |b| {
        b.iter(|| black_box(EndTable::new(black_box(&geometry), 58e6)))
    });
    c.bench_function("section end curve to 60 m/s (the runs')", |b| {
        b.iter(|| black_box(SectionEndCurve::new(black_box(&geometry), 58e6, 60.0)))
    });
    let ends = match SectionEndCurve::new(&geometry, 58e6, 60.0) {
        Ok(curve) => curve,
        Err(error) => panic!("typical geometry must be valid: {error}"),
    };
    let mut speed = 0.0_f64;
    c.bench_function("section end curve evaluation", |b| {
        b.iter(|| {
            speed = if speed > 59.0 { 0.137 } else { speed + 0.731 };
            black_box(ends.total_m_scaled(black_box(speed), 1.01))
        })
    });
    c.bench_function("fin end table", |b| {
        b.iter(|| black_box(FinEndTable::new(black_box(&geometry), 58e6)))
    });
    c.bench_function("uncertainty band", |b| {
        b.iter(|| black_box(ModelUncertainty::new(black_box(&model))))
    });
}

/// The fin 2 mm off-centre (clearance 5 mm): its model, drag and lateral tables, evaluations.
fn offset_benches(c: &mut Criterion) {
    let model = DragModel::new(&typical(), 1.25, 58e6).expect("valid typical model");
    let offset = OffsetModel::new(&model, 2e-3).expect("valid offset");
    c.bench_function("off-centre drag and lateral tables to 60 m/s", |b| {
        b.iter(|| {
            black_box((
                ForceTable::build_offset(black_box(&offset), 60.0),
                LateralTable::build(black_box(&offset), 60.0),
            ))
        })
    });
    let mut speed = 0.0_f64;
    c.bench_function("direct off-centre model evaluation (drag)", |b| {
        b.iter(|| {
            speed = if speed > 59.0 { 0.137 } else { speed + 0.731 };
            black_box(offset.drag_per_area_pa(black_box(speed)))
        })
    });
    let lateral = LateralTable::build(&offset, 60.0);
    let mut speed = 0.0_f64;
    c.bench_function("lateral table evaluation", |b| {
        b.iter(|| {
            speed = if speed > 59.0 { 0.137 } else { speed + 0.731 };
            black_box(lateral.lateral_per_area_pa(black_box(speed)))
        })
    });
}

criterion_group!(force, benches, offset_benches);
criterion_main!(force);
