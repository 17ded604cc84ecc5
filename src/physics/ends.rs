//! Longitudinal ends of a magnet section: the end lengths ℓ_entry(v), ℓ_exit(v).
//!
//! A section of N poles (N magnets per row at pitch τ, alternating) with a fin that runs through
//! it and beyond both ends brakes like a long section shortened by a length ℓ(v) = ℓ_entry(v) +
//! ℓ_exit(v) that does not depend on N once N is a few poles:
//!
//! ```text
//! F = f(v) · (N τ − ℓ_entry(v) − ℓ_exit(v)) ,
//! ```
//!
//! with f the force per metre of the periodic model. "Entry" is the end where fin material enters
//! the field (upstream in the magnet frame), "exit" the end where it leaves (downstream, where
//! the eddy currents trail out of the section).
//!
//! # Derivation (done here; checked against an independent 2-D finite-difference solution of
//! finite sections in `tests/reference_ends.rs`)
//!
//! 2-D (x along the track, y across the gap; tall fin), magnet frame, fin moving at +v, iron
//! planes y = ±a unbounded in x (μ → ∞), magnets only over the section. The problem is linear and
//! invariant along x except for the source, so each Fourier component e^{jκx} of the
//! magnetisation responds independently as in the layer theory with ω = κv. For the fin region
//! the layer solution gives B_y = Ã(κ)·cosh(γy)/cosh(γu), γ² = κ² + jκμ0σv, with
//!
//! ```text
//! Ã(κ) = −jκ·Q,  Q = j·(sinh(κh_m)/cosh(κL)) / (γ tanh(γu) + κ tanh(κL))
//! ```
//!
//! per unit source amplitude (matching A and ∂A/∂y at the fin face as in [`super::layer`], here
//! with e^{jκx}). The fin force density is σvB_y² (Lorentz force of J = σvB_y), so the force of a
//! source with spectrum m̂(κ) is ∫|m̂|²·φ̃(κ)dκ/2π, φ̃ = σv|Ã|²∫|cosh γy|²dy/|cosh γu|². One
//! magnet has m̂ = ρ̂(κ) = 2 sin(κfτ/2)/κ (per unit remanence), the section Σ_i (−1)^i e^{−jκx_i}
//! ρ̂; with C(x) the inverse transform of φ = ρ̂²φ̃,
//!
//! ```text
//! F_N = Σ_{|m|<N} (N − |m|) (−1)^m C(mτ) = N·f̄τ − Σ_m |m| (−1)^m C(mτ) + (terms ∝ C beyond N τ),
//! ```
//!
//! so ℓ f̄ = Σ_m |m|(−1)^m C(mτ). With Σ_m |m| e^{jmθ} = −1/(2 sin²(θ/2)) (Hadamard finite part;
//! θ = κτ + π) this becomes one integral,
//!
//! ```text
//! ℓ = −(1/(2π f̄)) · f.p.∫_0^∞ φ(κ) / cos²(κτ/2) dκ ,   f̄ = (2/τ²) Σ_{p odd > 0} φ(pπ/τ),
//! ```
//!
//! with double poles at the odd harmonics. The C(mτ) decay over the lengths on which the field of
//! the eddy currents spreads; at low speed the longest is 1/k*, k* = μ0σdv/(2a) (the wavenumber
//! below which a long wave is excluded by the thin fin), so for N τ·k* ≲ 2 the N-independence is
//! only approximate (see the validity below).
//!
//! *Split.* The split into the two ends is the first moment of the fin force density: for a long
//! section ∫x·δ(x)dx (δ = periodic minus actual density) grows as ℓ_exit·N τ; expanding ∫x f dx
//! over magnet pairs gives
//!
//! ```text
//! ℓ_exit = ℓ/2 + S₂/(2 f̄ τ) − Σ_m (−1)^m E(mτ)/(f̄ τ) ,
//! ```
//!
//! where E(s) = σv ∫∫ ξ b(ξ, y) b(ξ + s, y) dξ dy (b the fin field of one magnet), so that
//! Σ_m (−1)^m E(mτ) = (2/τ) Σ_{p>0} Re[σv ∫ (−j ∂_κ b̂)* b̂ dy]_{κ = pπ/τ}, and S₂ is the first
//! moment ∫_0^{2τ} x f_per dx of the periodic density less its mean part, a double sum over
//! harmonic pairs, S₂ = (σv/τ²) Σ_{p+p'≠0} (−1)^{(p+p')/2} (2τ/(jK)) ∫ c_p c_{p'} dy, K =
//! (p+p')π/τ, c_p the fin field of harmonic p (c_{−p} = c_p*). Entry = ℓ − exit.
//!
//! # Numerics and validity
//!
//! The finite part is taken panel by panel between the poles' midpoints, subtracting φ(κ_n) +
//! φ'(κ_n)·(…) at each pole (16-point Gauss–Legendre on each half panel, graded towards κ = 0
//! when k* is small); panels are added until φ is below 1e-13 of its peak. The harmonic sums run
//! over p ≤ 31 like the layer model. Assumptions: tall fin (no transverse edges: the
//! finite-height factor is applied to f separately), iron planes continuing beyond the section,
//! N identical magnets (no end magnets of other width), fin longer than the section and
//! extending past both ends by more than the wake. The FD check (two sections, 0.1–5 × the
//! critical speed) gives the section force within 0.2 % for N ≥ 8 at every speed and within
//! 0.2 % for N = 4 from 0.5 × the critical speed; below that a 4-pole section brakes up to 0.8 %
//! more than f·(Nτ − ℓ) (its ℓ is ~0.03 τ lower: the long-wave spread 1/k* covers the section).

use super::quadrature::gauss_legendre;
use super::{positive, BrakeGeometry, PhysicsError};
use crate::constants::MU0_H_M;
use crate::numeric::CubicHermite;
use num_complex::Complex64;
use std::f64::consts::PI;

/// Quadrature of the finite-part integral: panels are added until φ is below `tolerance` × its
/// peak, with `nodes`-point Gauss–Legendre on each half panel.
#[derive(Clone, Copy, Debug)]
struct Precision {
    tolerance: f64,
    nodes: usize,
}

/// The precision of [`section_end_lengths`] and [`EndTable`].
const FULL: Precision = Precision {
    tolerance: 1e-13,
    nodes: 16,
};

/// The precision of [`SectionEndCurve`] (ℓ/L enters the force; checked against [`FULL`] in
/// `curve_follows_the_direct_solution`).
const CURVE: Precision = Precision {
    tolerance: 1e-8,
    nodes: 8,
};

/// Highest odd harmonic in the periodic sums of the split (as in the layer model).
const HIGHEST_HARMONIC: u32 = 31;

/// End lengths of one section at one speed, in metres (positive: the section brakes less than
/// its length suggests).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EndLengths {
    /// Deficit at the end where fin material enters the field, m.
    pub entry_m: f64,
    /// Deficit at the end where fin material leaves the field, m.
    pub exit_m: f64,
}

impl EndLengths {
    /// ℓ = entry + exit, m.
    pub fn total_m(&self) -> f64 {
        self.entry_m + self.exit_m
    }
}

/// tanh of a complex number with Re z ≥ 0, without overflow: (1 − e^{−2z})/(1 + e^{−2z}).
fn tanh_c(z: Complex64) -> Complex64 {
    let e = (-2.0 * z).exp();
    (1.0 - e) / (1.0 + e)
}

/// ∫_{−u}^{u} cosh(g₁y) cosh(g₂y) dy / (cosh(g₁u) cosh(g₂u)), Re g ≥ 0, without overflow.
fn cosh_overlap(g1: Complex64, g2: Complex64, u: f64) -> Complex64 {
    let (t1, t2) = (tanh_c(g1 * u), tanh_c(g2 * u));
    let sum = (t1 + t2) / (g1 + g2);
    let diff = g1 - g2;
    let second = if diff.norm() > 1e-7 * (g1 + g2).norm() {
        (t1 - t2) / diff
    } else {
        let t = tanh_c(0.5 * (g1 + g2) * u);
        u * (1.0 - t * t)
    };
    sum + second
}

/// The fin field of one Fourier component: amplitude Ã (B_y at the fin face per unit source
/// amplitude) and γ, at wavenumber κ > 0.
#[derive(Clone, Copy, Debug)]
struct Wave {
    amplitude: Complex64,
    gamma: Complex64,
}

/// Geometry and σv of a section, for the wave responses.
#[derive(Clone, Copy, Debug)]
struct Section {
    u: f64,
    l: f64,
    h_m: f64,
    pitch: f64,
    fill: f64,
    sigma_v: f64,
}

impl Section {
    /// γ = √(κ² + jκμ0σv), the principal root (algebraically, for κ² > 0 and σv ≥ 0).
    #[inline]
    fn gamma(&self, kappa: f64) -> Complex64 {
        let (re, im) = (kappa * kappa, kappa * MU0_H_M * self.sigma_v);
        if re > 0.0 && im >= 0.0 {
            super::layer::sqrt_right_half_plane(re, im)
        } else {
            Complex64::new(re, im).sqrt()
        }
    }

    fn wave(&self, kappa: f64) -> Wave {
        let gamma = self.gamma(kappa);
        let ratio = super::field::sinh_cosh_ratio(kappa * self.h_m, kappa * self.l);
        let denominator = gamma * tanh_c(gamma * self.u) + kappa * (kappa * self.l).tanh();
        let q = Complex64::new(0.0, ratio) / denominator;
        Wave {
            amplitude: Complex64::new(0.0, -kappa) * q,
            gamma,
        }
    }

    /// ρ̂(κ) = 2 sin(κfτ/2)/κ, the transform of one magnet (unit remanence), m.
    fn magnet(&self, kappa: f64) -> f64 {
        let x = 0.5 * kappa * self.fill * self.pitch;
        if x.abs() < 1e-8 {
            self.fill * self.pitch
        } else {
            2.0 * x.sin() / kappa
        }
    }

    /// φ(κ) = σv ρ̂² |Ã|² ∫|cosh γy|²dy/|cosh γu|², the force kernel of one magnet.
    ///
    /// As [`Section::wave`] and [`cosh_overlap`] with one complex tanh: for g₁ = γ*, g₂ = γ the
    /// overlap is Re t/Re γ + Im t/Im γ with t = tanh(γu) (tanh(γ*u) = t*), the tanh the wave's
    /// denominator uses; nearly real γ takes [`cosh_overlap`]'s series branch.
    fn kernel(&self, kappa: f64) -> f64 {
        if kappa <= 0.0 {
            return 0.0;
        }
        let gamma = self.gamma(kappa);
        let t = tanh_c(gamma * self.u);
        let ratio = super::field::sinh_cosh_ratio(kappa * self.h_m, kappa * self.l);
        let denominator = gamma * t + kappa * (kappa * self.l).tanh();
        let amplitude = Complex64::new(0.0, -kappa) * (Complex64::new(0.0, ratio) / denominator);
        // |γ* − γ| > 1e-7·|γ* + γ| as in `cosh_overlap`.
        let overlap = if 2.0 * gamma.im.abs() > 1e-7 * (2.0 * gamma.re).abs() {
            t.re / gamma.re + t.im / gamma.im
        } else {
            cosh_overlap(gamma.conj(), gamma, self.u).re
        };
        self.sigma_v * self.magnet(kappa).powi(2) * amplitude.norm_sqr() * overlap
    }
}

/// A solved section: the section, its harmonics (κ_p, wave), f̄ and ℓ (m).
type Solved = (Section, Vec<(f64, Wave)>, f64, f64);

/// The wave responses of a section at fin speed `speed_m_s` (m/s; the sign is ignored, at most
/// 1e-6 × the critical speed is used at rest): the section, its harmonics (κ_p, wave), f̄ and the
/// total end length ℓ (m).
fn total_end_length(
    geometry: &BrakeGeometry,
    conductivity_s_m: f64,
    speed_m_s: f64,
    precision: Precision,
) -> Result<Solved, PhysicsError> {
    geometry.validate()?;
    positive("fin conductivity", conductivity_s_m)?;
    super::finite("speed", speed_m_s)?;
    let a = geometry.centre_to_iron_m();
    let d = geometry.fin_thickness_m;
    let tau = geometry.pole_pitch_m;
    let k1 = PI / tau;
    // Thin-sheet critical speed of the fundamental: the speed scale.
    let v_c = 2.0 * (k1 * a).tanh() / (MU0_H_M * conductivity_s_m * d);
    let v = speed_m_s.abs().max(1e-6 * v_c);
    let s = Section {
        u: geometry.half_fin_thickness_m(),
        l: geometry.fin_face_to_iron_m(),
        h_m: geometry.magnet_thickness_m,
        pitch: tau,
        fill: geometry.magnet_fill,
        sigma_v: conductivity_s_m * v,
    };
    // f̄ and the harmonic waves.
    let harmonics: Vec<(f64, Wave)> = (1..=HIGHEST_HARMONIC)
        .step_by(2)
        .map(|p| {
            let kappa = f64::from(p) * k1;
            (kappa, s.wave(kappa))
        })
        .collect();
    let mean: f64 = harmonics.iter().map(|&(kp, _)| s.kernel(kp)).sum::<f64>() * 2.0 / (tau * tau);
    let total = -finite_part_integral(&s, k1, a, d, precision) / (2.0 * PI * mean);
    if total.is_finite() && mean > 0.0 {
        Ok((s, harmonics, mean, total))
    } else {
        Err(PhysicsError::Degenerate {
            what: "the section end lengths",
        })
    }
}

/// The total end length ℓ = ℓ_entry + ℓ_exit (m) of a section with `geometry` and fin
/// conductivity `conductivity_s_m` (S/m) at fin speed `speed_m_s` (m/s): the part of
/// [`section_end_lengths`] the force of a whole passage needs, without the split.
pub fn section_end_length_m(
    geometry: &BrakeGeometry,
    conductivity_s_m: f64,
    speed_m_s: f64,
) -> Result<f64, PhysicsError> {
    total_end_length(geometry, conductivity_s_m, speed_m_s, FULL).map(|(_, _, _, total)| total)
}

/// End lengths of a section with `geometry` and fin conductivity `conductivity_s_m` (S/m) at fin
/// speed `speed_m_s` (m/s, relative to the magnets; the sign is ignored — the ends are named by
/// the relative motion). At zero speed the low-speed limit is returned.
pub fn section_end_lengths(
    geometry: &BrakeGeometry,
    conductivity_s_m: f64,
    speed_m_s: f64,
) -> Result<EndLengths, PhysicsError> {
    let (s, harmonics, mean, total) =
        total_end_length(geometry, conductivity_s_m, speed_m_s, FULL)?;
    let tau = s.pitch;
    let k1 = PI / tau;
    let degenerate = PhysicsError::Degenerate {
        what: "the section end lengths",
    };

    // Split: S₂ over harmonic pairs (p, p' of either sign, p + p' ≠ 0).
    let signed: Vec<(i64, Complex64, Complex64)> = harmonics
        .iter()
        .zip((1..=HIGHEST_HARMONIC).step_by(2))
        .flat_map(|(&(kp, w), p)| {
            let c = w.amplitude * s.magnet(kp);
            [
                (i64::from(p), c, w.gamma),
                (-i64::from(p), c.conj(), w.gamma.conj()),
            ]
        })
        .collect();
    let mut s2 = Complex64::new(0.0, 0.0);
    for &(p, cp, gp) in &signed {
        for &(q, cq, gq) in &signed {
            let sum = p + q;
            if sum == 0 {
                continue;
            }
            let big_k = sum as f64 * k1;
            let sign = if (sum / 2) % 2 == 0 { 1.0 } else { -1.0 };
            s2 +=
                cp * cq * cosh_overlap(gp, gq, s.u) * sign * 2.0 * tau / Complex64::new(0.0, big_k);
        }
    }
    let s2 = s.sigma_v / (tau * tau) * s2.re;
    // Σ(−1)^m E(mτ) = (2/τ) Σ_{p>0} Re[σv ∫ (−j ∂_κ b̂)* b̂ dy] at κ_p (central difference).
    let field = |kappa: f64| -> (Complex64, Complex64) {
        let w = s.wave(kappa);
        (w.amplitude * s.magnet(kappa), w.gamma)
    };
    let mut e_sum = 0.0;
    for &(kp, _) in &harmonics {
        let h = 1e-6 * kp;
        let (c0, g0) = field(kp);
        let (cp, gp) = field(kp + h);
        let (cm, gm) = field(kp - h);
        let derivative = (cp.conj() * c0 * cosh_overlap(gp.conj(), g0, s.u)
            - cm.conj() * c0 * cosh_overlap(gm.conj(), g0, s.u))
            / (2.0 * h);
        e_sum += (Complex64::new(0.0, -1.0) * derivative).re * s.sigma_v;
    }
    let e_sum = 2.0 / tau * e_sum;
    let exit = 0.5 * total + s2 / (2.0 * mean * tau) - e_sum / (mean * tau);
    let lengths = EndLengths {
        entry_m: total - exit,
        exit_m: exit,
    };
    if lengths.entry_m.is_finite() && lengths.exit_m.is_finite() && mean > 0.0 {
        Ok(lengths)
    } else {
        Err(degenerate)
    }
}

/// f.p.∫_0^∞ φ(κ)/cos²(κτ/2) dκ, panel by panel around the poles κ_n = (2n+1)π/τ, until three
/// panels in a row have φ(κ_n) below the tolerance × its peak.
fn finite_part_integral(s: &Section, k1: f64, a: f64, d: f64, precision: Precision) -> f64 {
    let tau = s.pitch;
    let gauss = gauss_legendre(precision.nodes);
    let scale = 2.0 / tau; // dκ/dt with t = κτ/2
                           // Low-speed crossover k* = μ0σdv/(2a), as t* = k*τ/2.
    let t_star = MU0_H_M * s.sigma_v * d / (2.0 * a) * tau / 2.0;
    // Nodes s, half-width × weight, sin s and cos s of the plain panel [−π/2, 0, π/2].
    let plain: Vec<(f64, f64, f64, f64)> = [(-0.5 * PI, 0.0), (0.0, 0.5 * PI)]
        .iter()
        .flat_map(|&(lo, hi)| {
            let half = 0.5 * (hi - lo);
            let mid = 0.5 * (hi + lo);
            gauss.iter().map(move |&(x, wg)| {
                let sv = mid + half * x;
                let (sn, cs) = sv.sin_cos();
                (sv, half * wg, sn, cs)
            })
        })
        .collect();
    let mut total = 0.0;
    let mut peak: f64 = 0.0;
    let mut quiet = 0;
    for n in 0..400usize {
        let t_n = n as f64 * PI + 0.5 * PI;
        let kappa_n = scale * t_n;
        let h = 1e-5 * k1;
        let psi0 = s.kernel(kappa_n);
        let dpsi0 = scale * (s.kernel(kappa_n + h) - s.kernel(kappa_n - h)) / (2.0 * h);
        peak = peak.max(psi0.abs());
        // Breakpoints in s = t − t_n over [−π/2, π/2]; panel 0 is graded towards t = 0.
        let mut breaks = vec![-0.5 * PI];
        if n == 0 && t_star < 0.5 * PI {
            let mut t = t_star / 8.0;
            while t < 0.5 * PI {
                breaks.push(t - t_n);
                t *= 4.0;
            }
        }
        breaks.extend([0.0, 0.5 * PI]);
        let mut panel = 0.0;
        if breaks.len() == 3 {
            // The plain panel: its nodes (and their sines and cosines) are the same every time.
            for &(sv, half_wg, sn, cs) in &plain {
                let psi = s.kernel(scale * (t_n + sv));
                panel += half_wg * (psi - psi0 - dpsi0 * sn * cs) / (sn * sn);
            }
        } else {
            for w in breaks.windows(2) {
                let (lo, hi) = (w[0], w[1]);
                let half = 0.5 * (hi - lo);
                let mid = 0.5 * (hi + lo);
                for &(x, wg) in &gauss {
                    let sv = mid + half * x;
                    let psi = s.kernel(scale * (t_n + sv));
                    let (sn, cs) = sv.sin_cos();
                    panel += half * wg * (psi - psi0 - dpsi0 * sn * cs) / (sn * sn);
                }
            }
        }
        total += scale * panel;
        if psi0.abs() < precision.tolerance * peak {
            quiet += 1;
            if quiet >= 3 {
                break;
            }
        } else {
            quiet = 0;
        }
    }
    total
}

/// End lengths tabulated against σv for one section (log grid 10⁻³…10³ × the thin-sheet
/// critical σv, 8 per decade, cubic Hermite in ln(σv) with slopes from the neighbours), so that
/// one design serves every fin temperature exactly as the force table does. Outside the grid
/// the end values hold (ℓ tends to constants at both ends of the speed range).
#[derive(Clone, Debug)]
pub struct EndTable {
    conductivity_s_m: f64,
    ln_sigma_v: Vec<f64>,
    entry_m: Vec<f64>,
    exit_m: Vec<f64>,
}

impl EndTable {
    /// Builds the table for `geometry` with fin conductivity `conductivity_s_m` (S/m).
    pub fn new(geometry: &BrakeGeometry, conductivity_s_m: f64) -> Result<Self, PhysicsError> {
        geometry.validate()?;
        positive("fin conductivity", conductivity_s_m)?;
        let k1 = PI / geometry.pole_pitch_m;
        let sv_c =
            2.0 * (k1 * geometry.centre_to_iron_m()).tanh() / (MU0_H_M * geometry.fin_thickness_m);
        let mut table = EndTable {
            conductivity_s_m,
            ln_sigma_v: Vec::new(),
            entry_m: Vec::new(),
            exit_m: Vec::new(),
        };
        for i in -24..=24 {
            let sv = sv_c * 10f64.powf(f64::from(i) / 8.0);
            let l = section_end_lengths(geometry, conductivity_s_m, sv / conductivity_s_m)?;
            table.ln_sigma_v.push(sv.ln());
            table.entry_m.push(l.entry_m);
            table.exit_m.push(l.exit_m);
        }
        Ok(table)
    }

    /// End lengths at fin speed `speed_m_s` (m/s) with the table's conductivity.
    pub fn lengths(&self, speed_m_s: f64) -> EndLengths {
        self.lengths_scaled(speed_m_s, 1.0)
    }

    /// End lengths at `speed_m_s` (m/s) for a fin whose conductivity is `conductivity_ratio` × the
    /// table's (the same σv).
    pub fn lengths_scaled(&self, speed_m_s: f64, conductivity_ratio: f64) -> EndLengths {
        let x = (self.conductivity_s_m * conductivity_ratio * speed_m_s.abs()).ln();
        EndLengths {
            entry_m: hermite(&self.ln_sigma_v, &self.entry_m, x),
            exit_m: hermite(&self.ln_sigma_v, &self.exit_m, x),
        }
    }
}

/// Speeds per decade at which [`SectionEndCurve`] solves for ℓ.
const CURVE_PER_DECADE: f64 = 3.0;

/// Intervals of the uniform speed grid of [`SectionEndCurve`].
const CURVE_INTERVALS: usize = 256;

/// The total end length ℓ(v) of one section design for the equations of motion. ℓ is solved
/// (as [`section_end_length_m`] with 8 instead of 16 Gauss nodes per half panel, its panels
/// stopped at 1e-8 instead of 1e-13 of the peak) at 3 speeds per decade
/// from 0.01 × the thin-sheet critical speed to the top speed, joined by cubic Hermite in ln(σv)
/// (ℓ held below the first speed, where the force is below 2 % of its peak and ℓ within 0.05 τ
/// of its low-speed value), and sampled on 256 equal speed intervals from 0 to the top speed as
/// a C1 cubic Hermite (values and slopes of the joined curve at the nodes; C1 so that the
/// adaptive integrator sees a smooth force), so that an evaluation is a multiply, an index and
/// one cubic. Beyond the top speed
/// the last value holds. Error against the direct solution below 0.01 τ from 0.01 × the critical
/// speed up (`curve_follows_the_direct_solution`), i.e. 0.05 % of the force of a 20-pole
/// section. About 9 solutions for a top speed of 4 × the critical speed.
#[derive(Clone, Debug)]
pub struct SectionEndCurve {
    inverse_step_s_m: f64,
    last: f64,
    /// Per interval: the cubic in t ∈ [0, 1), m.
    pieces: Vec<CubicHermite>,
}

impl SectionEndCurve {
    /// ℓ(v) of `geometry` with fin conductivity `conductivity_s_m` (S/m) from 0 to
    /// `max_speed_m_s` (m/s, at that conductivity; a fin at another temperature reads it at
    /// v·σ(T)/σ).
    pub fn new(
        geometry: &BrakeGeometry,
        conductivity_s_m: f64,
        max_speed_m_s: f64,
    ) -> Result<Self, PhysicsError> {
        positive("top speed of the end-length curve", max_speed_m_s)?;
        geometry.validate()?;
        positive("fin conductivity", conductivity_s_m)?;
        let k1 = PI / geometry.pole_pitch_m;
        let v_c = 2.0 * (k1 * geometry.centre_to_iron_m()).tanh()
            / (MU0_H_M * conductivity_s_m * geometry.fin_thickness_m);
        let first = 1e-2 * v_c;
        let top = max_speed_m_s.max(10.0 * first);
        let count = ((top / first).log10() * CURVE_PER_DECADE).ceil().max(1.0) as usize;
        let step = (top / first).ln() / count as f64;
        let mut ln_v = Vec::with_capacity(count + 1);
        let mut totals = Vec::with_capacity(count + 1);
        for i in 0..=count {
            let x = first.ln() + i as f64 * step;
            ln_v.push(x);
            let (_, _, _, total) = total_end_length(geometry, conductivity_s_m, x.exp(), CURVE)?;
            totals.push(total);
        }
        let at = |v: f64| {
            if v <= first {
                totals[0]
            } else {
                hermite(&ln_v, &totals, v.ln())
            }
        };
        let h = top / CURVE_INTERVALS as f64;
        // Values and slopes (× h, by a central difference of the joined curve) at the nodes.
        let delta = 1e-3 * h;
        let node = |i: usize| {
            let v = i as f64 * h;
            let slope =
                (at(v + delta) - at((v - delta).max(0.0))) / (v + delta - (v - delta).max(0.0));
            (at(v), slope * h)
        };
        let mut pieces = Vec::with_capacity(CURVE_INTERVALS);
        let (mut y0, mut d0) = node(0);
        for i in 0..CURVE_INTERVALS {
            let (y1, d1) = node(i + 1);
            pieces.push(CubicHermite::new(y0, y1, d0, d1));
            (y0, d0) = (y1, d1);
        }
        Ok(SectionEndCurve {
            inverse_step_s_m: 1.0 / h,
            last: CURVE_INTERVALS as f64,
            pieces,
        })
    }

    /// ℓ at fin speed `speed_m_s` (m/s) for a fin whose conductivity is `conductivity_ratio` ×
    /// the curve's, m (NaN in gives NaN out).
    #[inline]
    pub fn total_m_scaled(&self, speed_m_s: f64, conductivity_ratio: f64) -> f64 {
        let s = speed_m_s.abs() * conductivity_ratio * self.inverse_step_s_m;
        if s < self.last {
            let i = s as usize; // 0 ≤ s < last here
            match self.pieces.get(i) {
                Some(c) => c.value(s - i as f64),
                None => f64::NAN,
            }
        } else if s.is_nan() {
            f64::NAN
        } else {
            self.pieces.last().map_or(f64::NAN, |c| c.value(1.0))
        }
    }

    /// ℓ at fin speed `speed_m_s` (m/s) with the curve's conductivity, m.
    pub fn total_m(&self, speed_m_s: f64) -> f64 {
        self.total_m_scaled(speed_m_s, 1.0)
    }

    /// The top speed of the curve, m/s.
    pub fn max_speed_m_s(&self) -> f64 {
        self.last / self.inverse_step_s_m
    }
}

/// Cubic Hermite interpolation on a uniform grid `xs` with central-difference slopes (one-sided
/// at the ends), held constant outside; NaN in gives NaN out.
pub(crate) fn hermite(xs: &[f64], ys: &[f64], x: f64) -> f64 {
    let n = xs.len();
    if x.is_nan() || n == 0 {
        return f64::NAN;
    }
    if x <= xs[0] {
        return ys[0];
    }
    if x >= xs[n - 1] {
        return ys[n - 1];
    }
    let h = xs[1] - xs[0];
    let i = (((x - xs[0]) / h) as usize).min(n - 2);
    let slope = |j: usize| -> f64 {
        if j == 0 {
            (ys[1] - ys[0]) / h
        } else if j == n - 1 {
            (ys[n - 1] - ys[n - 2]) / h
        } else {
            (ys[j + 1] - ys[j - 1]) / (2.0 * h)
        }
    };
    let t = (x - xs[i]) / h;
    let (m0, m1) = (slope(i) * h, slope(i + 1) * h);
    let (t2, t3) = (t * t, t * t * t);
    (2.0 * t3 - 3.0 * t2 + 1.0) * ys[i]
        + (t3 - 2.0 * t2 + t) * m0
        + (-2.0 * t3 + 3.0 * t2) * ys[i + 1]
        + (t3 - t2) * m1
}

#[cfg(test)]
mod tests {
    use super::*;

    fn section() -> BrakeGeometry {
        BrakeGeometry {
            pole_pitch_m: 0.05,
            magnet_thickness_m: 0.012,
            magnet_fill: 0.9,
            clearance_m: 0.006,
            fin_thickness_m: 0.009,
            fin_height_m: 0.15,
            pole_height_m: 0.15,
        }
    }

    #[test]
    fn mean_force_matches_the_layer_model() {
        // f̄ of this module (one-magnet kernel at the harmonics ≤ 31) must equal the layer
        // model's tall-fin force per area for unit remanence (the same physics written two ways;
        // the model drops harmonics below 1e-6/16 of the fundamental): 1e-6.
        let g = section();
        let m = super::super::DragModel::new(&g, 1.0, 26e6).expect("valid");
        for v in [0.5, 6.0, 30.0] {
            let s = Section {
                u: g.half_fin_thickness_m(),
                l: g.fin_face_to_iron_m(),
                h_m: g.magnet_thickness_m,
                pitch: g.pole_pitch_m,
                fill: g.magnet_fill,
                sigma_v: 26e6 * v,
            };
            let mean: f64 = (1..=HIGHEST_HARMONIC)
                .step_by(2)
                .map(|p| s.kernel(f64::from(p) * PI / g.pole_pitch_m))
                .sum::<f64>()
                * 2.0
                / g.pole_pitch_m.powi(2);
            let layer = m.force_per_area_tall_fin_pa(v);
            assert!((mean / layer - 1.0).abs() < 1e-6, "{v}: {mean} vs {layer}");
        }
    }

    #[test]
    fn table_reproduces_direct_values_and_scales_with_sigma_v() {
        // Table vs direct at off-grid speeds: 2e-3 τ (interpolation); σv scaling exact.
        let g = section();
        let t = EndTable::new(&g, 26e6).expect("valid");
        for v in [0.7, 3.3, 11.0, 27.0] {
            let direct = section_end_lengths(&g, 26e6, v).expect("valid");
            let table = t.lengths(v);
            assert!((direct.entry_m - table.entry_m).abs() < 2e-3 * g.pole_pitch_m);
            assert!((direct.exit_m - table.exit_m).abs() < 2e-3 * g.pole_pitch_m);
            let scaled = t.lengths_scaled(v / 1.3, 1.3);
            assert!((scaled.entry_m - table.entry_m).abs() < 1e-12);
        }
        assert!(t.lengths(f64::NAN).entry_m.is_nan());
        assert!(t.lengths(0.0).total_m().is_finite());
    }

    #[test]
    fn curve_follows_the_direct_solution() {
        // The uniform-speed curve against ℓ solved at off-grid speeds from 0.01 × the critical
        // speed (7.7 m/s here) up, 0.01 τ (the interpolation error; ℓ itself spans about 0.65 τ);
        // below, within 0.05 τ of the low-speed value; held beyond the top speed; σv scaling
        // exact.
        let g = section();
        let c = SectionEndCurve::new(&g, 26e6, 40.0).expect("valid");
        let rest = section_end_length_m(&g, 26e6, 1e-4).expect("valid");
        assert!((c.total_m(0.0) - rest).abs() < 0.05 * g.pole_pitch_m);
        for v in [0.08, 0.4, 0.93, 2.7, 6.1, 11.3, 19.9, 33.3, 39.9] {
            let direct = section_end_length_m(&g, 26e6, v).expect("valid");
            let split = section_end_lengths(&g, 26e6, v).expect("valid").total_m();
            assert!((direct - split).abs() < 1e-12 * g.pole_pitch_m, "{v}");
            let got = c.total_m(v);
            assert!(
                (got - direct).abs() < 0.01 * g.pole_pitch_m,
                "{v}: {got} vs {direct}"
            );
            assert!((c.total_m_scaled(v / 1.3, 1.3) - got).abs() < 1e-12, "{v}");
        }
        assert_eq!(c.total_m(50.0), c.total_m(40.0));
        assert_eq!(c.total_m(-6.1), c.total_m(6.1));
        assert!(c.total_m(f64::NAN).is_nan());
        assert!(SectionEndCurve::new(&g, 26e6, 0.0).is_err());
    }
}
