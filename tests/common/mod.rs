//! Pieces shared by the test binaries: the sections of the end-effect references and the
//! number scanner of the fuzz harnesses. Each binary uses some of them.

#![allow(dead_code)]

use eddyzone::constants::MU0_H_M;
use eddyzone::physics::BrakeGeometry;
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
