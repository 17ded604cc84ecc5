//! Fin ends inside a section: the leading- and trailing-edge deficits from a 2-D solution.
//!
//! In the frame of the fin the field of a long section is a sum of harmonics travelling past the
//! fin, e^{j(ωt + kx)} with ω = k·v (fin moving at +x relative to the magnets). A fin end at
//! x = 0 makes the problem non-uniform in x but leaves it time-periodic; each harmonic is then a
//! steady complex problem ∇²Â − jωμ0σ(x, y)Â = −jk·B_rn·1_magnet(y), and the time-averaged force
//! is the sum over harmonics (cross terms average out). This is the periodic steady state a
//! transient (time-stepped) solution settles to, obtained directly. The fin occupies x < 0 for a
//! leading edge and x > 0 for a trailing edge. Second-order finite volumes, ∂Â/∂y = 0 on the
//! mid-plane and the iron (μ → ∞), the exact one-dimensional profiles (with and without fin) as
//! Dirichlet values at x = ±X. The deficit is ∫(f_periodic − f(x))dx of the time-averaged
//! Lorentz force density −½Re(Ĵ B̂_y*) over the fin (the fin-density convention of
//! `src/physics/ends.rs`). Sources: the formulation is the standard time-harmonic eddy-current
//! problem (e.g. Stoll, *The Analysis of Eddy Currents*, Clarendon Press, 1974, from memory);
//! the periodic limit is the layer theory checked first. Tolerances beside each check.

#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]
use eddyzone::constants::MU0_H_M;
use eddyzone::physics::field::{source_amplitude_t, wavenumber_per_m};
use eddyzone::physics::{fin_end_lengths, BrakeGeometry, DragModel, FinEndTable};
use num_complex::Complex64;
use std::f64::consts::PI;

mod common;
use common::{copper_section, critical_m_s, section, ALUMINIUM_S_M, COPPER_S_M};

/// Complex banded LU without pivoting (diagonally dominant: diffusion plus an imaginary shift).
fn solve_banded(
    n: usize,
    bw: usize,
    mut data: Vec<Complex64>,
    mut b: Vec<Complex64>,
) -> Vec<Complex64> {
    let w = 2 * bw + 1;
    for k in 0..n {
        let inv = 1.0 / data[k * w + bw];
        for i in k + 1..(k + bw + 1).min(n) {
            let l = data[i * w + k + bw - i] * inv;
            if l == Complex64::new(0.0, 0.0) {
                continue;
            }
            for j in k + 1..(k + bw + 1).min(n) {
                let u = data[k * w + j + bw - k];
                data[i * w + j + bw - i] -= l * u;
            }
            let bk = b[k];
            b[i] -= l * bk;
        }
    }
    for i in (0..n).rev() {
        let mut s = b[i];
        let hi = (i + bw + 1).min(n);
        for (o, bj) in b[i + 1..hi].iter().enumerate() {
            s -= data[i * w + bw + 1 + o] * bj;
        }
        b[i] = s / data[i * w + bw];
    }
    b
}

/// One-dimensional profile Â(y) on the cell grid (with or without the fin), for harmonic k
/// (source −jk·src), with `k_sq` standing for k² in the x-part of the Laplacian (the exact k², or
/// the discrete (2 − 2 cos k hx)/hx² of the 2-D grid, so that deep in the fin the grid solution
/// is this profile exactly).
fn profile(
    (hy, nf, ny): (f64, usize, usize),
    k: f64,
    k_sq: f64,
    shift: f64,
    src: &[f64],
    with_fin: bool,
) -> Vec<Complex64> {
    let mut data = vec![Complex64::new(0.0, 0.0); ny * 3];
    for j in 0..ny {
        let mut diag = Complex64::new(-k_sq * hy, 0.0);
        if with_fin && j < nf {
            diag -= Complex64::new(0.0, shift * hy);
        }
        for jj in [j as i64 - 1, j as i64 + 1] {
            if (0..ny as i64).contains(&jj) {
                data[j * 3 + (jj - j as i64 + 1) as usize] += 1.0 / hy;
                diag -= 1.0 / hy;
            }
        }
        data[j * 3 + 1] += diag;
    }
    solve_banded(
        ny,
        1,
        data,
        src.iter()
            .map(|&s| Complex64::new(0.0, -k * s * hy))
            .collect(),
    )
}

/// A fin of length `fin_m` centred in a domain with `margin_m` of air at each end, with the
/// condition that the net current through the fin vanishes (its eddy currents close through the
/// overhangs above and below, so in 2-D a uniform field Ê0 along z adjusts the current:
/// Ĵ = σ(−jωÂ + Ê0), Σ Ĵ = 0). Solved as Â = Â₁ + Ê0·Â₂ (two banded solves). Far from the fin
/// the field is the no-load field up to a uniform offset of Â on one side (a net flux of the
/// fin's currents through the gap, returned by the unbounded iron at no cost): no-load values
/// upstream, zero x-derivative of the disturbance downstream. Returns the (leading, trailing)
/// deficits in units of τ: the front and rear halves of the fin (fundamental harmonic), and the
/// periodic force density.
fn finite_fin(
    g: &BrakeGeometry,
    sigma: f64,
    v: f64,
    (hx, hy): (f64, f64),
    fin_m: f64,
    margin_m: f64,
) -> (f64, f64, f64) {
    let order = 1;
    let tau = g.pole_pitch_m;
    let k = wavenumber_per_m(tau, order);
    let omega = k * v;
    let shift = omega * MU0_H_M * sigma;
    let b_rn = source_amplitude_t(1.0, g.magnet_fill, order);
    let cells = |len: f64| (len / hy).round() as usize;
    let (nf, ng, nm) = (
        cells(g.half_fin_thickness_m()),
        cells(g.clearance_m),
        cells(g.magnet_thickness_m),
    );
    let ny = nf + ng + nm;
    let src: Vec<f64> = (0..ny)
        .map(|j| if j >= nf + ng { b_rn } else { 0.0 })
        .collect();
    let half_width = 0.5 * fin_m + margin_m;
    let nx = (2.0 * half_width / hx).round() as usize;
    let hx = 2.0 * half_width / nx as f64;
    let k_sq = (2.0 - 2.0 * (k * hx).cos()) / (hx * hx);
    let with = profile((hy, nf, ny), k, k_sq, shift, &src, true);
    let without = profile((hy, nf, ny), k, k_sq, shift, &src, false);
    let xc = |i: i64| -half_width + (i as f64 + 0.5) * hx;
    let in_fin = |x: f64| x.abs() < 0.5 * fin_m;
    let far = |x: f64, j: usize| -> Complex64 { without[j] * Complex64::new(0.0, k * x).exp() };
    let n = nx * ny;
    let bw = ny;
    let w = 2 * bw + 1;
    let mut data = vec![Complex64::new(0.0, 0.0); n * w];
    let mut rhs1 = vec![Complex64::new(0.0, 0.0); n];
    let mut rhs2 = vec![Complex64::new(0.0, 0.0); n];
    for i in 0..nx {
        let x = xc(i as i64);
        for j in 0..ny {
            let p = i * ny + j;
            let mut diag = Complex64::new(0.0, 0.0);
            if in_fin(x) && j < nf {
                diag -= Complex64::new(0.0, shift * hx * hy);
                // +μ0σÊ0 on the left-hand side → −μ0σ·hx·hy per unit Ê0 on the right.
                rhs2[p] = Complex64::new(-MU0_H_M * sigma * hx * hy, 0.0);
            }
            for di in [-1i64, 1] {
                let ii = i as i64 + di;
                diag -= hy / hx;
                if (0..nx as i64).contains(&ii) {
                    data[p * w + (ii as usize * ny + j) + bw - p] += hy / hx;
                } else if di < 0 {
                    // Upstream end: the no-load field (fixes the gauge of Â).
                    rhs1[p] -= hy / hx * far(xc(ii), j);
                } else {
                    // Downstream end: the disturbance has zero x-derivative, so flux may pass
                    // into the iron there (ghost = own value + no-load difference).
                    diag += hy / hx;
                    rhs1[p] -= hy / hx * (far(xc(ii), j) - far(x, j));
                }
            }
            for jj in [j as i64 - 1, j as i64 + 1] {
                if (0..ny as i64).contains(&jj) {
                    data[p * w + (i * ny + jj as usize) + bw - p] += hx / hy;
                    diag -= hx / hy;
                }
            }
            data[p * w + bw] += diag;
            rhs1[p] +=
                Complex64::new(0.0, -k * src[j] * hx * hy) * Complex64::new(0.0, k * x).exp();
        }
    }
    let a1 = solve_banded(n, bw, data.clone(), rhs1);
    let a2 = solve_banded(n, bw, data, rhs2);
    // Net current Σ σ(−jωÂ + Ê0) over fin cells = 0.
    let (mut i1, mut i2, mut cells_in) = (Complex64::new(0.0, 0.0), Complex64::new(0.0, 0.0), 0.0);
    for i in 0..nx {
        if !in_fin(xc(i as i64)) {
            continue;
        }
        for j in 0..nf {
            i1 += Complex64::new(0.0, -omega) * a1[i * ny + j];
            i2 += Complex64::new(0.0, -omega) * a2[i * ny + j];
            cells_in += 1.0;
        }
    }
    let e0 = -i1 / (i2 + cells_in);
    let a: Vec<Complex64> = a1.iter().zip(&a2).map(|(x, y)| x + e0 * y).collect();
    let get = |i: i64, j: usize| -> Complex64 {
        if (0..nx as i64).contains(&i) {
            a[i as usize * ny + j]
        } else {
            far(xc(i), j)
        }
    };
    let density = |i: i64| -> f64 {
        (0..nf)
            .map(|j| {
                let am = get(i, j);
                let by = -(get(i + 1, j) - get(i - 1, j)) / (2.0 * hx);
                let current = Complex64::new(0.0, -omega * sigma) * am + sigma * e0;
                -0.5 * (current * by.conj()).re * hy * 2.0
            })
            .sum()
    };
    let periodic: f64 = (0..nf)
        .map(|j| {
            let current = Complex64::new(0.0, -omega * sigma) * with[j];
            let by = Complex64::new(0.0, -(k * hx).sin() / hx) * with[j];
            -0.5 * (current * by.conj()).re * hy * 2.0
        })
        .sum();
    let (mut front, mut rear) = (0.0, 0.0);
    for i in 0..nx as i64 {
        let x = xc(i);
        if !in_fin(x) {
            continue;
        }
        let d = (periodic - density(i)) * hx;
        if x > 0.0 {
            front += d;
        } else {
            rear += d;
        }
    }
    (front / periodic / tau, rear / periodic / tau, periodic)
}

/// Richardson-extrapolated (leading, trailing) deficits in units of τ from grids (τ/20, u/3) and
/// (τ/40, u/6), fin of 16 τ with 4 τ of air each side.
fn reference(g: &BrakeGeometry, sigma: f64, v: f64) -> (f64, f64) {
    let tau = g.pole_pitch_m;
    let hy = g.half_fin_thickness_m() / 3.0;
    let c = finite_fin(g, sigma, v, (tau / 20.0, hy), 16.0 * tau, 4.0 * tau);
    let f = finite_fin(g, sigma, v, (tau / 40.0, hy / 2.0), 16.0 * tau, 4.0 * tau);
    ((4.0 * f.0 - c.0) / 3.0, (4.0 * f.1 - c.1) / 3.0)
}

#[test]
fn periodic_limit_is_the_layer_theory() {
    // The one-dimensional profile (the solution deep inside the fin) must give the layer force
    // of the harmonic (bulk σ): O(h²) in hy, 1e-4 after Richardson extrapolation.
    let g = section();
    let m = DragModel::new(&g, 1.0, ALUMINIUM_S_M).expect("valid");
    let k = PI / g.pole_pitch_m;
    let b_r1 = source_amplitude_t(1.0, g.magnet_fill, 1);
    for r in [0.1, 1.0, 5.0] {
        let v = r * critical_m_s(&g, ALUMINIUM_S_M);
        let omega = k * v;
        let force = |hy: f64| -> f64 {
            let cells = |len: f64| (len / hy).round() as usize;
            let (nf, ng, nm) = (
                cells(g.half_fin_thickness_m()),
                cells(g.clearance_m),
                cells(g.magnet_thickness_m),
            );
            let ny = nf + ng + nm;
            let src: Vec<f64> = (0..ny)
                .map(|j| if j >= nf + ng { b_r1 } else { 0.0 })
                .collect();
            let p = profile(
                (hy, nf, ny),
                k,
                k * k,
                omega * MU0_H_M * ALUMINIUM_S_M,
                &src,
                true,
            );
            (0..nf)
                .map(|j| {
                    let current = Complex64::new(0.0, -omega * ALUMINIUM_S_M) * p[j];
                    let by = Complex64::new(0.0, -k) * p[j];
                    0.5 * (current * by.conj()).re * hy * 2.0
                })
                .sum()
        };
        let (c, f) = (force(0.0015), force(0.00075));
        let extrapolated = (4.0 * f - c) / 3.0;
        let layer = m.harmonics()[0].layer_force_per_area_pa(v);
        assert!(
            (extrapolated / layer - 1.0).abs() < 1e-4,
            "{r}: {extrapolated} vs {layer}"
        );
    }
}

#[test]
fn reference_is_independent_of_domain_and_fin_length() {
    // The deficits belong to the ends: fin 8 τ or 16 τ long, 2 τ or 4 τ of air beyond, give the
    // same values to 0.005 τ at 0.3, 1 and 5 × the critical speed.
    let g = section();
    let tau = g.pole_pitch_m;
    let hy = g.half_fin_thickness_m() / 3.0;
    for r in [0.3, 1.0, 5.0] {
        let v = r * critical_m_s(&g, ALUMINIUM_S_M);
        let a = finite_fin(
            &g,
            ALUMINIUM_S_M,
            v,
            (tau / 20.0, hy),
            16.0 * tau,
            4.0 * tau,
        );
        let b = finite_fin(&g, ALUMINIUM_S_M, v, (tau / 20.0, hy), 8.0 * tau, 2.0 * tau);
        assert!(
            (a.0 - b.0).abs() < 0.005 && (a.1 - b.1).abs() < 0.005,
            "{r}: {a:?} {b:?}"
        );
    }
}

#[test]
fn model_matches_the_reference() {
    // The model (src/physics/fin_ends.rs: one grid τ/20 × u/3, fin ≥ 8 τ) against the reference
    // (two grids, Richardson, fin 16 τ) from 0.03 to 10 × the critical speed, two sections:
    // each end within 0.02 τ up to 5× and 0.05 τ at 10×, the sum within 0.03 τ (0.08 τ at 10×,
    // where the single grid is coarse for the wake: 0.3 % of the force of a 24 τ fin).
    for (g, sigma) in [(section(), ALUMINIUM_S_M), (copper_section(), COPPER_S_M)] {
        let tau = g.pole_pitch_m;
        let vc = critical_m_s(&g, sigma);
        let table = FinEndTable::new(&g, sigma).expect("valid");
        for r in [0.03, 0.1, 0.3, 1.0, 2.0, 3.0, 5.0, 10.0] {
            let v = r * vc;
            let (lead, trail) = reference(&g, sigma, v);
            let model = fin_end_lengths(&g, sigma, v).expect("valid");
            let (ml, mt) = (model.leading_m / tau, model.trailing_m / tau);
            let tab = table.lengths(v);
            println!(
                "τ {:.0} mm {r}×: reference lead {lead:.4} trail {trail:.4} sum {:.4} | model {ml:.4} {mt:.4} {:.4} | table {:.4} {:.4}",
                tau * 1e3,
                lead + trail,
                ml + mt,
                tab.leading_m / tau,
                tab.trailing_m / tau
            );
            let (each, sum) = if r > 5.0 { (0.05, 0.08) } else { (0.02, 0.03) };
            assert!((ml - lead).abs() < each && (mt - trail).abs() < each, "{r}");
            assert!((ml + mt - lead - trail).abs() < sum, "{r}");
            // The table (10 solutions, 3 per decade) within 0.02 τ of the direct model.
            assert!(
                (tab.total_m() - model.total_m()).abs() < 0.02 * tau,
                "{r}: table"
            );
        }
    }
}
