//! Pieces shared by the test binaries: the sections of the end-effect references and the
//! number scanner of the fuzz harnesses. Each binary uses some of them.

#![allow(dead_code)]

use eddyzone::constants::MU0_H_M;
use eddyzone::physics::BrakeGeometry;
use num_complex::Complex64;
use std::f64::consts::PI;

/// The section of the example (tall fin: the end model is 2-D), aluminium 26 MS/m.
pub fn section() -> BrakeGeometry {
    BrakeGeometry {
        pole_pitch_m: 0.050,
        magnet_thickness_m: 0.012,
        magnet_fill: 0.9,
        clearance_m: 0.006,
        fin_thickness_m: 0.009,
        fin_height_m: 1.0,
        pole_height_m: 1.0,
    }
}

/// A second, different section: longer pitch, copper, thin fin, small clearance, lower fill.
pub fn copper_section() -> BrakeGeometry {
    BrakeGeometry {
        pole_pitch_m: 0.080,
        magnet_thickness_m: 0.018,
        magnet_fill: 0.75,
        clearance_m: 0.003,
        fin_thickness_m: 0.006,
        fin_height_m: 1.0,
        pole_height_m: 1.0,
    }
}

pub const ALUMINIUM_S_M: f64 = 26e6;
pub const COPPER_S_M: f64 = 58e6;

/// The thin-sheet critical speed 2·tanh(k·a)/(μ0·σ·d) (Reitz 1970; Saslow 1992), m/s.
pub fn critical_m_s(g: &BrakeGeometry, sigma: f64) -> f64 {
    let k = PI / g.pole_pitch_m;
    2.0 * (k * g.centre_to_iron_m()).tanh() / (MU0_H_M * sigma * g.fin_thickness_m)
}

/// Byte ranges of the numbers of `text` (digits and dots after a non-alphanumeric character).
pub fn numbers(text: &str) -> Vec<(usize, usize)> {
    let b = text.as_bytes();
    let mut out = vec![];
    let mut i = 0;
    while i < b.len() {
        if b[i].is_ascii_digit() && (i == 0 || !(b[i - 1] as char).is_ascii_alphanumeric()) {
            let s = i;
            while i < b.len() && (b[i].is_ascii_digit() || b[i] == b'.') {
                i += 1;
            }
            out.push((s, i));
        } else {
            i += 1;
        }
    }
    out
}

/// One layer of a gap stack for the finite-difference references, from one iron plate to the
/// other.
pub struct Layer {
    pub thickness_m: f64,
    pub conductivity_s_m: f64,
    /// μ0·M_y of the magnet in the layer, T (0 for air and fin).
    pub magnetisation_t: f64,
    pub cells: usize,
}

/// Cells of a stack: (length m, σ S/m, μ0·M T, layer index).
pub fn stack_cells(layers: &[Layer]) -> Vec<(f64, f64, f64, usize)> {
    let mut cells = Vec::new();
    for (index, layer) in layers.iter().enumerate() {
        let h = layer.thickness_m / layer.cells as f64;
        for _ in 0..layer.cells {
            cells.push((h, layer.conductivity_s_m, layer.magnetisation_t, index));
        }
    }
    cells
}

/// Finite-volume (second-order) solution of d²A/dy² − (k² + jωμ0σ(y))·A = j·k·μ0·M_y(y) on the
/// cells, ω = k·v, with dA/dy = 0 on the iron (tangential H = 0 at μr → ∞); A the complex
/// amplitude of A_z ∝ e^{j(ωt − kx)} at the cell ends. Ampère's law with H = B/μ0 − M and
/// J = −σ ∂A/∂t (standard magnetoquasistatics; Jackson, Classical Electrodynamics, 3rd ed., 1999,
/// §5.18); the tridiagonal system by the Thomas algorithm (Conte & de Boor, Elementary Numerical
/// Analysis, 1980, §3.7).
pub fn solve_cells(cells: &[(f64, f64, f64, usize)], k: f64, speed_m_s: f64) -> Vec<Complex64> {
    let omega = k * speed_m_s;
    let nodes = cells.len() + 1;
    let j = Complex64::new(0.0, 1.0);
    let zero = Complex64::new(0.0, 0.0);
    let (mut lower, mut diag, mut upper, mut rhs) = (
        vec![zero; nodes],
        vec![zero; nodes],
        vec![zero; nodes],
        vec![zero; nodes],
    );
    for (c, &(h, sigma, m, _)) in cells.iter().enumerate() {
        let g = 1.0 / h;
        let q = (k * k + j * omega * MU0_H_M * sigma) * (h / 2.0);
        diag[c] -= g + q;
        diag[c + 1] -= g + q;
        upper[c] += g;
        lower[c + 1] += g;
        let s = j * k * m * (h / 2.0);
        rhs[c] += s;
        rhs[c + 1] += s;
    }
    let (mut cp, mut dp) = (vec![zero; nodes], vec![zero; nodes]);
    cp[0] = upper[0] / diag[0];
    dp[0] = rhs[0] / diag[0];
    for i in 1..nodes {
        let den = diag[i] - lower[i] * cp[i - 1];
        cp[i] = upper[i] / den;
        dp[i] = (rhs[i] - lower[i] * dp[i - 1]) / den;
    }
    let mut a = vec![zero; nodes];
    a[nodes - 1] = dp[nodes - 1];
    for i in (0..nodes - 1).rev() {
        a[i] = dp[i] - cp[i] * a[i + 1];
    }
    a
}
