//! Fin ends inside a section: the leading- and trailing-edge lengths ℓ_lead(v), ℓ_trail(v).
//!
//! A fin of length L_f wholly inside a long section brakes like f(v)·(L_f − ℓ_lead − ℓ_trail).
//! The leading edge (the fin end that moves into the field first) loses force at low speed and
//! gains at high speed; the trailing edge loses, more at speed.
//!
//! # Derivation (done here; checked against a finer, extrapolated solution of the same problem
//! and its periodic limit in `tests/reference_fin_ends.rs`)
//!
//! In the frame of the fin the fundamental of a long section is the wave
//! B_r1·e^{j(ωt + kx)}, ω = k·v (fin moving at +x relative to the magnets). The fin's ends make
//! the problem non-uniform in x but it stays time-periodic, so the steady complex problem
//!
//! ```text
//! ∇²Â − jωμ0σ(x, y)·Â + μ0σ(x, y)·Ê0 = −jk·B_r1·1_magnet(y),   Σ_fin σ(−jωÂ + Ê0) = 0
//! ```
//!
//! is the periodic state a time-stepped (transient) solution settles to. Ê0 is a uniform
//! electric field along z in the fin that makes the net current of the 2-D fin vanish (its
//! eddy currents close through the overhangs above and below the poles). ∂Â/∂y = 0 on the
//! mid-plane (symmetry) and on the iron (μ → ∞); far from the fin the field is the no-load field
//! upstream and the no-load field plus an offset of Â downstream (a net flux of the fin currents
//! through the gap, carried away by the unbounded iron). Second-order finite volumes; a fin of
//! at least 8 τ (longer at low speed, where the end disturbance decays over 1/Re λ, λ² =
//! jωμ0σ·u/a) with 2 τ of air beyond each end; cells τ/20 along x and u/3 across the fin. The
//! deficit of each end is the time-averaged Lorentz force density −½Re(Ĵ B̂_y*) integrated over
//! the fin's half at that end, short of the periodic density (the fin-density convention of
//! [`super::ends`]; only the sum is independent of the convention, and only the sum enters the
//! energy of a passage). The periodic density is the grid's own one-dimensional profile, so the
//! grid error does not grow with the fin length.
//!
//! # Validity
//!
//! Fundamental harmonic only (≥ 98 % of the force; its deficits are applied to the whole force),
//! tall fin, long section (the fin end far from the section ends), the fin longer than ~4 τ so
//! that its two ends do not interact. Checked from 0.01 to 10 × the thin-sheet critical speed:
//! within 0.02 τ of the extrapolated reference up to 5× and 0.05 τ at 10× (each end), 0.01–0.03 τ
//! for the sum. Below 0.01× the lengths are taken ∝ √v (they vanish at rest; the reference
//! gives ℓ ∝ v^0.5 between 0.01× and 0.1×); above 10× the 10× values hold.

use super::field::{source_amplitude_t, wavenumber_per_m};
use super::{positive, BrakeGeometry, PhysicsError};
use crate::constants::MU0_H_M;
use num_complex::Complex64;

/// Leading- and trailing-edge lengths of a fin end inside a section, m (positive: the fin brakes
/// less than its length suggests).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FinEndLengths {
    /// Deficit at the fin end that moves into the field first, m.
    pub leading_m: f64,
    /// Deficit at the fin end that leaves last, m.
    pub trailing_m: f64,
}

impl FinEndLengths {
    /// ℓ_lead + ℓ_trail, m.
    pub fn total_m(&self) -> f64 {
        self.leading_m + self.trailing_m
    }
}

/// Lowest and highest speed ratio (× the thin-sheet critical speed) the FD is used at.
const LOWEST_RATIO: f64 = 0.01;
const HIGHEST_RATIO: f64 = 10.0;

/// Complex banded LU without pivoting (diagonally dominant matrices only), `data` row-major with
/// 2·bw + 1 entries per row, column offset j − i + bw.
fn solve_banded(n: usize, bw: usize, data: &mut [Complex64], b: &mut [Complex64]) {
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
}

/// Cell heights across half the gap — fin (3 cells of u/3), clearance and magnet with cells of
/// about u/3 (at most 12 each) — with the number of fin cells and the index of the first magnet
/// cell.
fn y_cells(g: &BrakeGeometry) -> (Vec<f64>, usize, usize) {
    let u = g.half_fin_thickness_m();
    let target = u / 3.0;
    let split = |len: f64| -> Vec<f64> {
        if len <= 0.0 {
            return Vec::new();
        }
        let n = ((len / target).ceil() as usize).clamp(1, 12);
        vec![len / n as f64; n]
    };
    let mut h = vec![target; 3];
    h.extend(split(g.clearance_m));
    let first_magnet = h.len();
    h.extend(split(g.magnet_thickness_m));
    (h, 3, first_magnet)
}

/// The deficits at one speed ratio inside the FD range.
fn solve(g: &BrakeGeometry, sigma: f64, v: f64) -> Result<FinEndLengths, PhysicsError> {
    let tau = g.pole_pitch_m;
    let k = wavenumber_per_m(tau, 1);
    let omega = k * v;
    let shift = omega * MU0_H_M * sigma;
    let b_r1 = source_amplitude_t(1.0, g.magnet_fill, 1);
    let (hy, nf, first_magnet) = y_cells(g);
    let ny = hy.len();
    let src: Vec<f64> = (0..ny)
        .map(|j| if j >= first_magnet { b_r1 } else { 0.0 })
        .collect();
    // Fin length: 8 τ, or 12/Re λ when the end disturbance reaches further (at most 40 τ).
    let x_avg = shift * g.half_fin_thickness_m() / g.centre_to_iron_m();
    let decay = (0.5 * x_avg).sqrt();
    let fin = (12.0 / decay).clamp(8.0 * tau, 40.0 * tau);
    let margin = 2.0 * tau;
    let hx = tau / 20.0;
    let half_width = 0.5 * fin + margin;
    let nx = (2.0 * half_width / hx).round() as usize;
    let hx = 2.0 * half_width / nx as f64;
    let k_sq = (2.0 - 2.0 * (k * hx).cos()) / (hx * hx);
    let face = |j: usize| 2.0 / (hy[j] + hy[j + 1]);

    // One-dimensional profiles (grid dispersion in x), with and without the fin.
    let profile = |with_fin: bool| -> Vec<Complex64> {
        let mut data = vec![Complex64::new(0.0, 0.0); ny * 3];
        let mut b: Vec<Complex64> = (0..ny)
            .map(|j| Complex64::new(0.0, -k * src[j] * hy[j]))
            .collect();
        for j in 0..ny {
            let mut diag = Complex64::new(-k_sq * hy[j], 0.0);
            if with_fin && j < nf {
                diag -= Complex64::new(0.0, shift * hy[j]);
            }
            if j > 0 {
                data[j * 3] += face(j - 1);
                diag -= face(j - 1);
            }
            if j + 1 < ny {
                data[j * 3 + 2] += face(j);
                diag -= face(j);
            }
            data[j * 3 + 1] += diag;
        }
        solve_banded(ny, 1, &mut data, &mut b);
        b
    };
    let with = profile(true);
    let without = profile(false);
    let xc = |i: i64| -half_width + (i as f64 + 0.5) * hx;
    let in_fin = |x: f64| x.abs() < 0.5 * fin;
    let far = |x: f64, j: usize| without[j] * Complex64::new(0.0, k * x).exp();

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
                diag -= Complex64::new(0.0, shift * hx * hy[j]);
                rhs2[p] = Complex64::new(-MU0_H_M * sigma * hx * hy[j], 0.0);
            }
            for di in [-1i64, 1] {
                let ii = i as i64 + di;
                diag -= hy[j] / hx;
                if (0..nx as i64).contains(&ii) {
                    data[p * w + (ii as usize * ny + j) + bw - p] += hy[j] / hx;
                } else if di < 0 {
                    rhs1[p] -= hy[j] / hx * far(xc(ii), j);
                } else {
                    diag += hy[j] / hx;
                    rhs1[p] -= hy[j] / hx * (far(xc(ii), j) - far(x, j));
                }
            }
            if j > 0 {
                data[p * w + (p - 1) + bw - p] += hx * face(j - 1);
                diag -= hx * face(j - 1);
            }
            if j + 1 < ny {
                data[p * w + (p + 1) + bw - p] += hx * face(j);
                diag -= hx * face(j);
            }
            data[p * w + bw] += diag;
            rhs1[p] +=
                Complex64::new(0.0, -k * src[j] * hx * hy[j]) * Complex64::new(0.0, k * x).exp();
        }
    }
    let mut data2 = data.clone();
    solve_banded(n, bw, &mut data, &mut rhs1);
    solve_banded(n, bw, &mut data2, &mut rhs2);
    let (a1, a2) = (rhs1, rhs2);
    let (mut i1, mut i2, mut area) = (Complex64::new(0.0, 0.0), Complex64::new(0.0, 0.0), 0.0);
    for i in 0..nx {
        if !in_fin(xc(i as i64)) {
            continue;
        }
        for j in 0..nf {
            let cell = hx * hy[j];
            i1 += Complex64::new(0.0, -omega) * a1[i * ny + j] * cell;
            i2 += Complex64::new(0.0, -omega) * a2[i * ny + j] * cell;
            area += cell;
        }
    }
    let e0 = -i1 / (i2 + area);
    let get = |i: i64, j: usize| -> Complex64 {
        if (0..nx as i64).contains(&i) {
            let p = i as usize * ny + j;
            a1[p] + e0 * a2[p]
        } else {
            far(xc(i), j)
        }
    };
    let density =
        |amplitude: &dyn Fn(usize) -> (Complex64, Complex64), uniform: Complex64| -> f64 {
            (0..nf)
                .map(|j| {
                    let (a, by) = amplitude(j);
                    let current = Complex64::new(0.0, -omega * sigma) * a + sigma * uniform;
                    -(current * by.conj()).re * hy[j]
                })
                .sum()
        };
    let zero = Complex64::new(0.0, 0.0);
    let periodic = density(
        &|j| (with[j], Complex64::new(0.0, -(k * hx).sin() / hx) * with[j]),
        zero,
    );
    let (mut front, mut rear) = (0.0, 0.0);
    for i in 0..nx as i64 {
        let x = xc(i);
        if !in_fin(x) {
            continue;
        }
        let f = density(
            &|j| (get(i, j), -(get(i + 1, j) - get(i - 1, j)) / (2.0 * hx)),
            e0,
        );
        if x > 0.0 {
            front += (periodic - f) * hx;
        } else {
            rear += (periodic - f) * hx;
        }
    }
    let lengths = FinEndLengths {
        leading_m: front / periodic,
        trailing_m: rear / periodic,
    };
    if lengths.leading_m.is_finite() && lengths.trailing_m.is_finite() {
        Ok(lengths)
    } else {
        Err(PhysicsError::Degenerate {
            what: "the fin end lengths",
        })
    }
}

/// Thin-sheet critical speed of the fundamental, m/s.
fn critical_speed_m_s(g: &BrakeGeometry, sigma: f64) -> f64 {
    let k = wavenumber_per_m(g.pole_pitch_m, 1);
    2.0 * (k * g.centre_to_iron_m()).tanh() / (MU0_H_M * sigma * g.fin_thickness_m)
}

/// Leading- and trailing-edge lengths of a fin of `geometry` and conductivity
/// `conductivity_s_m` (S/m) inside a long section at fin speed `speed_m_s` (m/s, relative to
/// the magnets; the sign is ignored — the ends are named by the relative motion). Zero at rest.
pub fn fin_end_lengths(
    geometry: &BrakeGeometry,
    conductivity_s_m: f64,
    speed_m_s: f64,
) -> Result<FinEndLengths, PhysicsError> {
    geometry.validate()?;
    positive("fin conductivity", conductivity_s_m)?;
    super::finite("speed", speed_m_s)?;
    let vc = critical_speed_m_s(geometry, conductivity_s_m);
    let ratio = speed_m_s.abs() / vc;
    if ratio == 0.0 {
        return Ok(FinEndLengths {
            leading_m: 0.0,
            trailing_m: 0.0,
        });
    }
    let clamped = ratio.clamp(LOWEST_RATIO, HIGHEST_RATIO);
    let at = solve(geometry, conductivity_s_m, clamped * vc)?;
    let scale = if ratio < LOWEST_RATIO {
        (ratio / LOWEST_RATIO).sqrt()
    } else {
        1.0
    };
    Ok(FinEndLengths {
        leading_m: at.leading_m * scale,
        trailing_m: at.trailing_m * scale,
    })
}

/// Fin end lengths tabulated against σv (3 per decade from 0.01 to 10 × the critical σv,
/// cubic Hermite in ln σv), for one fin design in one magnet design; every fin temperature
/// reads the same table at v·σ(T)/σ.
#[derive(Clone, Debug)]
pub struct FinEndTable {
    conductivity_s_m: f64,
    ln_sigma_v: Vec<f64>,
    leading_m: Vec<f64>,
    trailing_m: Vec<f64>,
}

impl FinEndTable {
    /// Builds the table (10 two-dimensional solutions).
    pub fn new(geometry: &BrakeGeometry, conductivity_s_m: f64) -> Result<Self, PhysicsError> {
        let vc = {
            geometry.validate()?;
            positive("fin conductivity", conductivity_s_m)?;
            critical_speed_m_s(geometry, conductivity_s_m)
        };
        let mut table = FinEndTable {
            conductivity_s_m,
            ln_sigma_v: Vec::new(),
            leading_m: Vec::new(),
            trailing_m: Vec::new(),
        };
        for i in -6..=3 {
            let v = vc * 10f64.powf(f64::from(i) / 3.0);
            let l = solve(geometry, conductivity_s_m, v)?;
            table.ln_sigma_v.push((conductivity_s_m * v).ln());
            table.leading_m.push(l.leading_m);
            table.trailing_m.push(l.trailing_m);
        }
        Ok(table)
    }

    /// The lengths at `speed_m_s` (m/s) for a fin whose conductivity is `conductivity_ratio` ×
    /// the table's: ∝ √v below the table, held above it.
    pub fn lengths_scaled(&self, speed_m_s: f64, conductivity_ratio: f64) -> FinEndLengths {
        let sv = self.conductivity_s_m * conductivity_ratio * speed_m_s.abs();
        if sv == 0.0 {
            return FinEndLengths {
                leading_m: 0.0,
                trailing_m: 0.0,
            };
        }
        let x = sv.ln();
        let first = self.ln_sigma_v[0];
        // √(σv/σv_first) below the table.
        let scale = if x < first {
            (0.5 * (x - first)).exp()
        } else {
            1.0
        };
        FinEndLengths {
            leading_m: scale * super::ends::hermite(&self.ln_sigma_v, &self.leading_m, x),
            trailing_m: scale * super::ends::hermite(&self.ln_sigma_v, &self.trailing_m, x),
        }
    }

    /// The lengths at `speed_m_s` (m/s) with the table's conductivity.
    pub fn lengths(&self, speed_m_s: f64) -> FinEndLengths {
        self.lengths_scaled(speed_m_s, 1.0)
    }
}
