//! Transverse edge effect: the finite height of the fin and of the poles, at every speed.
//!
//! Eddy currents under a pole of finite height must close in the fin above and below the active
//! zone. Russell & Norsworthy ("Eddy currents and wall losses in screened-rotor induction motors",
//! Proc. IEE 105A, 1958, pp. 163–175) solved the thin-sheet stream function for a sheet of
//! half-height a_p under the field with overhangs o beyond it, neglecting the field of the eddy
//! currents, and expressed the result as a factor on the conductivity:
//!
//! ```text
//! K = 1 − tanh(k a_p) / ( k a_p · [1 + tanh(k a_p) · tanh(k o)] ),   σ_e = K·σ.
//! ```
//!
//! That is exact at low speed. Used as σ_e at every speed it makes the high-speed force (which
//! falls as 1/σ) tend to 1/K times the force of a tall fin, while the true factor rises far more
//! slowly. This module derives the factor at every speed ([`FiniteHeightEdge`]); the old use of K
//! stays available as [`EdgeModel::RussellNorsworthyConductivity`] for comparison.
//!
//! # Derivation (done here; checked against an independent finite-element solution in
//! `tests/reference_edge.rs`)
//!
//! Coordinates as in [`super::layer`]: x along the track, y across the gap (fin mid-plane y = 0,
//! iron at y = ±a), z along the height (fin |z| < b = a_p + o, poles |z| < a_p). One harmonic
//! of the pole field, B_s(y, z)·e^{j(ωt − kx)} with ω = k·v in the frame of the fin, is taken as
//! the no-load field B_0·cosh(ky) for |z| < a_p and zero beyond (no fringing across the height;
//! see [`super::uncertainty`]).
//!
//! *Laminae.* The fin is cut into 2P laminae of thickness d/(2P) at the mid-points y_l of the
//! slices, each a thin sheet of conductance σ·d·w (w = 1/(2P)) carrying in-plane currents. This
//! neglects the current across the thickness (J_y) — exact for a tall fin, where the currents
//! run along z, and a boundary-layer effect of width ~d at the fin rim otherwise.
//!
//! *Sheet equation.* In lamina l the current is J = ∇×(ψ_l ŷ) = (−∂ψ_l/∂z, 0, ∂ψ_l/∂x), which is
//! divergence-free and, with ψ_l = 0 on |z| = b, does not leave the fin. Faraday's law on the
//! sheet, (∇×E)_y = −∂B_y/∂t with E = J/(σ d w), gives
//!
//! ```text
//! (∂z² − k²) ψ_l = jωσ d w · [ B_s(y_l, z) + B_r(y_l, z) ] .
//! ```
//!
//! *Reaction field.* For a sheet at y' carrying the stream function ψ̂ e^{−jkx + jqz}, the scalar
//! potential jumps by ψ̂ across the sheet, vanishes on the iron (tangential H = 0 for μ → ∞) and
//! satisfies Laplace's equation with κ² = k² + q²; its B_y at y is G(κ; y, y')·ψ̂ with
//!
//! ```text
//! G(κ; y, y') = μ0 κ cosh(κ(a − y_>)) cosh(κ(a + y_<)) / sinh(2κa),
//! ```
//!
//! (y_> = max, y_< = min), which for y = y' = 0 is μ0κ·coth(κa)/2 — Laithwaite's goodness factor
//! G = μ0σdv/(2 tanh(ka)) for a tall thin sheet. The iron planes are taken as unbounded in z and
//! the field of the sheet currents is taken with its full z-spread (the q-integral below), so the
//! reaction field of a finite-height current pattern is exact within the model.
//!
//! *Galerkin.* Symmetry in z (centred fin) and in y (both rows alike) leaves, per lamina pair,
//! the even modes φ_m = cos(p_m z), p_m = (2m − 1)π/(2b), m = 1…M, which vanish at z = ±b. They
//! diagonalise the resistive operator: ∫φ_m(−∂z² + k²)φ_n dz = b(p_m² + k²)δ_mn. The source
//! projects to s_m = cosh(k y_l)·2 sin(p_m a_p)/p_m, and the reaction matrix is
//!
//! ```text
//! R_{lm, l'n} = (1/π) ∫_0^∞ [G(κ; y_l, y_l') + G(κ; y_l, −y_l')] φ̂_m(q) φ̂_n(q) dq,
//! φ̂_m(q) = ∫_{−b}^{b} cos(p_m z) e^{−jqz} dz = 2 p_m b · sinc((q − p_m) b) / (p_m + q) .
//! ```
//!
//! With D = diag(b(p_m² + k²)/w) and X = ωσd = k·d·(σv) the system is (D + jX·R)ψ = −jX·s. Both
//! D and R are symmetric positive definite, so with D^{−½} R D^{−½} = V diag(μ_i) Vᵀ and
//! t = Vᵀ D^{−½} s the modes decouple and the loss ½ψᴴDψ/(σd) per unit length is a sum of
//! Lorentzians. Dividing by v, the force per metre of track of the finite fin is
//!
//! ```text
//! f_finite ∝ σv · Σ_i t_i² / (1 + (r_i·σv)²),   r_i = k d μ_i ,
//! ```
//!
//! and the same construction for a tall fin (one mode per lamina, D = k²/w, κ = k, source
//! cosh(k y_l)) gives f_tall ∝ σv · Σ_j T_j² / (1 + (R_j·σv)²) per unit height, with the same
//! constant. The finite-height factor of this harmonic is therefore
//!
//! ```text
//! F(σv) = [ Σ_i w_i / (1 + (r_i σv)²) ] / [ Σ_j W_j / (1 + (R_j σv)²) ],
//! w_i = t_i² / (2a_p Σ_j T_j²),   W_j = T_j² / Σ_j T_j² ,
//! ```
//!
//! a function of σ·v only. At σv → 0 the numerator is Σ_m 4k² sin²(p_m a_p)/(2a_p b p_m²(p_m² +
//! k²)), the Fourier series of the Russell–Norsworthy solution, so F(0) = K. The truncated series
//! falls short of K by the tail beyond mode M (a few 1e-6 for the pole heights of practice); that
//! remainder is added as one more term whose rate is the diagonal estimate for mode M + 1,
//! r ≈ R_max·(k/κ)·coth(κa)/coth(ka) with κ² = p_{M+1}² + k² (the rate of the tall fin scaled by
//! reaction over resistance of one cosine mode), so F(0) = K holds to rounding and the test of the
//! low-speed limit checks the truncation instead.
//!
//! *Use.* The drag of harmonic n is the layer force of [`super::layer`] with the bulk
//! conductivity (thickness, skin effect and field exclusion of a tall fin) times F_n(σv) (the
//! finite height). The two effects are combined as a product; the laminated reference solution
//! (finite height *and* thickness together) checks the product.
//!
//! # Resolution and cost
//!
//! The fundamental uses 2 lamina pairs and M = clamp(⌈2.5 k b⌉ + 4, 8, 32) modes, harmonic 3
//! (about 1.6 % of the force) 2 pairs and at most 24 modes, higher harmonics (< 0.1 % together)
//! 1 pair and at most 8 modes (their factor to ~2 %, i.e. < 2e-5 of the force). The q-integral
//! runs on Gauss–Legendre panels (8 nodes per period π/b of cos²(qb)) up to Q = max(1.5 p_M,
//! 40/b), plus the tail beyond Q with cos² replaced by its mean ½ (doubling the node density or
//! Q changes the factor by < 1e-4 from 0.1 to 20 × the critical speed). The eigen-decomposition
//! is done once when the model is built; an evaluation is a sum of at most 64 + 2 Lorentzians for
//! the fundamental, 48 + 2 for harmonic 3 and 8 + 1 for each higher one, plus one remainder term
//! each (terms that never reach 1e-9 of the sum are dropped into the remainder).

use super::eigen::symmetric_eigen_projections;
use super::field::gap_centre_amplitude_t;
use super::quadrature::gauss_legendre;
use super::{BrakeGeometry, PhysicsError};
use crate::constants::MU0_H_M;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// A Lorentzian term is dropped (into the remainder) when it stays below this fraction of its
/// sum at every σv.
const PRUNE: f64 = 1e-9;

/// Russell–Norsworthy edge factor K (dimensionless, in [0, 1)) for wavenumber `k_per_m` (1/m),
/// half active height `half_active_height_m` (m) and overhang `overhang_m` (m, beyond the poles on
/// each side).
///
/// K → 1 for a very tall sheet and K → 0 as k·a_p → 0. A negative overhang counts as zero; a
/// non-positive k·a_p returns 0 (the limit); NaN inputs return NaN.
pub fn russell_norsworthy(k_per_m: f64, half_active_height_m: f64, overhang_m: f64) -> f64 {
    let x = k_per_m * half_active_height_m;
    let ko = k_per_m * overhang_m.max(0.0);
    if x.is_nan() || ko.is_nan() {
        return f64::NAN;
    }
    if x <= 0.0 {
        return 0.0;
    }
    let t = x.tanh();
    1.0 - t / (x * (1.0 + t * ko.tanh()))
}

/// How a [`super::DragModel`] accounts for the finite height of fin and poles.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
pub enum EdgeModel {
    /// The finite-height factor F_n(σv) of this module on the force of each harmonic (valid at
    /// every speed; reduces to Russell–Norsworthy at low speed). The default.
    #[default]
    FiniteHeight,
    /// The Russell–Norsworthy factor K_n on the conductivity at every speed (the model before
    /// the finite-height factor; overestimates the drag above about half the critical speed).
    RussellNorsworthyConductivity,
}

/// The pole field across the height that drives the eddy currents.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum PoleField {
    /// B_0·cosh(ky) for |z| < a_p and 0 beyond (no fringing; the field of the layer theory cut off
    /// at the pole edges — Russell & Norsworthy's assumption, used by the drag model).
    #[default]
    Uniform,
    /// The field of magnets of height 2a_p on unbounded iron planes: each height wavenumber q of
    /// the magnetisation's step profile carries the layer no-load transfer at κ² = k² + q²,
    /// B_y(y, q) ∝ sinh(κh_m)/sinh(κa)·cosh(κy), so the field fringes past the pole edges over
    /// about the gap a − h_m (used for the uncertainty of the uniform model).
    Fringing,
}

/// Resolution of the Galerkin solution: cosine modes across the height and lamina pairs across
/// the thickness (0 pairs = one thin sheet at the mid-plane).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct EdgeResolution {
    /// Number M of even cosine modes across the height, ≥ 1.
    pub modes: usize,
    /// Number P of lamina pairs across the thickness (0: a single sheet at y = 0).
    pub lamina_pairs: usize,
}

impl EdgeResolution {
    /// The resolution used by the drag model for harmonic `order` of `geometry`.
    pub fn for_harmonic(geometry: &BrakeGeometry, order: u32) -> Self {
        let k = f64::from(order) * PI / geometry.pole_pitch_m;
        let kb = k * fin_half_height_m(geometry);
        let raw = (2.5 * kb).ceil() + 4.0;
        if order == 1 {
            EdgeResolution {
                modes: raw.clamp(8.0, 32.0) as usize,
                lamina_pairs: 2,
            }
        } else if order == 3 {
            EdgeResolution {
                modes: raw.clamp(8.0, 24.0) as usize,
                lamina_pairs: 2,
            }
        } else {
            EdgeResolution {
                modes: raw.clamp(4.0, 8.0) as usize,
                lamina_pairs: 1,
            }
        }
    }
}

/// Half the height b of the fin part that matters: active half-height plus overhang, m.
fn fin_half_height_m(geometry: &BrakeGeometry) -> f64 {
    0.5 * geometry.active_height_m() + geometry.overhang_m()
}

/// Finite-height factor of one harmonic: F(σv) = Σ w_i/(1 + r_i²(σv)²) / Σ W_j/(1 + R_j²(σv)²)
/// (see the module docs). Depends on conductivity and speed only through σ·v.
#[derive(Clone, Debug, PartialEq)]
pub struct FiniteHeightEdge {
    /// (w_i, r_i²) of the finite fin, r in s/S (1/(σv)).
    numerator: Vec<[f64; 2]>,
    /// (W_j, R_j²) of the tall fin.
    denominator: Vec<[f64; 2]>,
    /// Russell–Norsworthy K = F(0).
    low_speed_factor: f64,
}

/// Lamina mid-points y_l > 0 (m) and the weight w of one lamina, for `pairs` pairs over the fin
/// thickness; 0 pairs is one sheet at y = 0 of weight 1.
fn laminae(half_thickness_m: f64, pairs: usize) -> (Vec<f64>, f64) {
    if pairs == 0 {
        return (vec![0.0], 1.0);
    }
    let count = 2 * pairs;
    let width = 2.0 * half_thickness_m / count as f64;
    let ys = (pairs..count)
        .map(|l| -half_thickness_m + (l as f64 + 0.5) * width)
        .collect();
    (ys, 1.0 / count as f64)
}

/// B_y at y per unit stream-function jump of a sheet at y' between iron planes at ±a, for the
/// in-plane wavenumber κ (1/m): μ0 κ cosh(κ(a − y_>)) cosh(κ(a + y_<)) / sinh(2κa), in T per A,
/// evaluated without overflow.
fn sheet_kernel(kappa: f64, a: f64, y: f64, yp: f64) -> f64 {
    let (hi, lo) = if y >= yp { (y, yp) } else { (yp, y) };
    let p = kappa * (a - hi);
    let q = kappa * (a + lo);
    let c = 2.0 * kappa * a;
    // cosh p cosh q / sinh c = ½ e^{p+q−c} (1 + e^{−2p})(1 + e^{−2q}) / (1 − e^{−2c}).
    sheet_from_parts(
        MU0_H_M * kappa * 0.5,
        p + q - c,
        (-2.0 * p).exp(),
        (-2.0 * q).exp(),
        -(-2.0 * c).exp_m1(),
    )
}

/// [`sheet_kernel`] from its parts: the prefactor μ0κ/2, p + q − c, e^(−2p), e^(−2q) and
/// 1 − e^(−2c) (one formula for the plain and the shared-exponential kernels).
#[inline(always)]
fn sheet_from_parts(pre: f64, exponent: f64, ep: f64, eq: f64, denom: f64) -> f64 {
    pre * exponent.exp() * (1.0 + ep) * (1.0 + eq) / denom
}

/// Kernel of a lamina pair: the sheet at y_l sees the sheets at +y_l' and −y_l' (same currents);
/// a single mid-plane sheet (y = 0) sees only itself.
fn pair_kernel(kappa: f64, a: f64, y: f64, yp: f64, single_sheet: bool) -> f64 {
    if single_sheet {
        sheet_kernel(kappa, a, y, yp)
    } else {
        sheet_kernel(kappa, a, y, yp) + sheet_kernel(kappa, a, y, -yp)
    }
}

/// [`pair_kernel`] for every lamina pair at one κ, with the exponentials the sheets share
/// computed once: e^(−2κ(a − y_l)) and e^(−2κ(a + y_l)) per lamina and e^(−4κa) once, instead of
/// four per sheet. The same operations in the same order on the same operands as
/// [`sheet_kernel`], so the same values to the last bit (κ(a + (−y)) is κ(a − y) exactly).
struct SharedKernel {
    /// κ(a − y_l) and κ(a + y_l).
    p: Vec<f64>,
    q: Vec<f64>,
    /// e^(−2p_l) and e^(−2q_l).
    ep: Vec<f64>,
    eq: Vec<f64>,
}

impl SharedKernel {
    fn new(count: usize) -> Self {
        Self {
            p: vec![0.0; count],
            q: vec![0.0; count],
            ep: vec![0.0; count],
            eq: vec![0.0; count],
        }
    }

    /// Writes `weight`·pair_kernel(κ, a, y_li, y_lj) into `out[li·n + lj]` for li ≤ lj.
    fn fill(&mut self, kappa: f64, a: f64, ys: &[f64], single: bool, weight: f64, out: &mut [f64]) {
        for (l, &y) in ys.iter().enumerate() {
            self.p[l] = kappa * (a - y);
            self.q[l] = kappa * (a + y);
            self.ep[l] = (-2.0 * self.p[l]).exp();
            self.eq[l] = (-2.0 * self.q[l]).exp();
        }
        let c = 2.0 * kappa * a;
        let pre = MU0_H_M * kappa * 0.5;
        let denom = -(-2.0 * c).exp_m1();
        // One sheet with its upper end at lamina `hi` (p) and its lower end at `lo` (q, or the
        // mirror lamina −y_lo, whose κ(a + lo) is p of `lo`).
        let sheet = |hi: usize, lo_p: f64, lo_e: f64| {
            sheet_from_parts(pre, self.p[hi] + lo_p - c, self.ep[hi], lo_e, denom)
        };
        let nl = ys.len();
        for li in 0..nl {
            for lj in li..nl {
                let (hi, lo) = if ys[li] >= ys[lj] { (li, lj) } else { (lj, li) };
                let mut k = sheet(hi, self.q[lo], self.eq[lo]);
                if !single {
                    k += sheet(li, self.p[lj], self.ep[lj]);
                }
                out[li * nl + lj] = weight * k;
            }
        }
    }
}

/// The quadrature nodes of the reaction matrix, kept so that its sums run node-innermost: per
/// node the pair kernels g(l, l′) (l ≤ l′, weight included) and the mode amplitudes φ_m, each
/// node's amplitudes padded with zeros to a multiple of [`NodeSums::BLOCK`].
///
/// [`NodeSums::upper_triangle`] gives every element R[(l,m),(l′,n)] = Σ_q (g_q φ_qm) φ_qn as the
/// per-node accumulation did, the same products added in the same node order from 0, so the same
/// value to the last bit; only the loops are turned round, so that a block of the sums stays in
/// registers while the nodes stream past.
struct NodeSums {
    laminae: usize,
    modes: usize,
    /// Padded length of one node's amplitudes.
    stride: usize,
    /// Pair kernels, node-major, `laminae·(laminae + 1)/2` per node.
    kernels: Vec<f64>,
    /// Mode amplitudes, node-major, `stride` per node.
    amplitudes: Vec<f64>,
}

impl NodeSums {
    /// Sums computed side by side in registers.
    const BLOCK: usize = 8;

    fn new(laminae: usize, modes: usize, nodes: usize) -> Self {
        let stride = modes.div_ceil(Self::BLOCK) * Self::BLOCK;
        let pairs = laminae * (laminae + 1) / 2;
        Self {
            laminae,
            modes,
            stride,
            kernels: Vec::with_capacity(nodes * pairs),
            amplitudes: Vec::with_capacity(nodes * stride),
        }
    }

    /// Adds a node: `kernel[l·laminae + l′]` for l ≤ l′ and the amplitudes `phi` (one per mode).
    fn push(&mut self, kernel: &[f64], phi: &[f64]) {
        let nl = self.laminae;
        for li in 0..nl {
            self.kernels
                .extend_from_slice(&kernel[li * nl + li..(li + 1) * nl]);
        }
        self.amplitudes.extend_from_slice(phi);
        let padded = self.amplitudes.len().div_ceil(Self::BLOCK) * Self::BLOCK;
        self.amplitudes.resize(padded, 0.0);
    }

    /// Writes the upper triangle of the reaction matrix (`n = laminae·modes` square, row-major,
    /// index l·modes + m) into `r`; the rest of `r` is left as it is.
    fn upper_triangle(&self, r: &mut [f64]) {
        let (nl, m, stride) = (self.laminae, self.modes, self.stride);
        let n = nl * m;
        let pairs = nl * (nl + 1) / 2;
        let count = self.amplitudes.len() / stride;
        let mut gm = vec![0.0; count];
        let mut pair = 0;
        for li in 0..nl {
            for lj in li..nl {
                for mi in 0..m {
                    for (q, g) in gm.iter_mut().enumerate() {
                        *g = self.kernels[q * pairs + pair] * self.amplitudes[q * stride + mi];
                    }
                    let row = (li * m + mi) * n + lj * m;
                    let start = if li == lj { mi } else { 0 };
                    let mut j0 = start - start % Self::BLOCK;
                    while j0 < m {
                        let mut acc = [0.0; Self::BLOCK];
                        for (&g, node) in gm.iter().zip(self.amplitudes.chunks_exact(stride)) {
                            for (s, &x) in acc.iter_mut().zip(&node[j0..j0 + Self::BLOCK]) {
                                *s += g * x;
                            }
                        }
                        let (from, to) = (j0.max(start), (j0 + Self::BLOCK).min(m));
                        r[row + from..row + to].copy_from_slice(&acc[from - j0..to - j0]);
                        j0 += Self::BLOCK;
                    }
                }
                pair += 1;
            }
        }
    }
}

/// sin(x)/x, 1 at 0.
fn sinc(x: f64) -> f64 {
    if x.abs() < 1e-4 {
        1.0 - x * x / 6.0
    } else {
        x.sin() / x
    }
}

/// Lorentzian weights and squared rates (w, r²) with r = k d μ from eigenpairs (μ, t): w = t²·scale.
fn lorentzians(pairs: &[(f64, f64)], kd: f64, scale: f64) -> Vec<[f64; 2]> {
    pairs
        .iter()
        .map(|&(mu, t)| [t * t * scale, (kd * mu) * (kd * mu)])
        .collect()
}

/// Σ w/(1 + r² s²) over `terms` at s = σ·v.
#[inline]
fn lorentzian_sum(terms: &[[f64; 2]], s_sq: f64) -> f64 {
    terms.iter().map(|t| t[0] / (1.0 + t[1] * s_sq)).sum()
}

impl FiniteHeightEdge {
    /// The factor of harmonic `order` (odd) of a validated `geometry` at the drag model's
    /// resolution ([`EdgeResolution::for_harmonic`]).
    pub fn new(geometry: &BrakeGeometry, order: u32) -> Result<Self, PhysicsError> {
        Self::with_resolution(
            geometry,
            order,
            EdgeResolution::for_harmonic(geometry, order),
        )
    }

    /// The factor of harmonic `order` at a chosen resolution (for convergence studies).
    pub fn with_resolution(
        geometry: &BrakeGeometry,
        order: u32,
        resolution: EdgeResolution,
    ) -> Result<Self, PhysicsError> {
        Self::with_pole_field(geometry, order, resolution, PoleField::Uniform)
    }

    /// The factor with a chosen model of the pole field across the height (see [`PoleField`]).
    pub fn with_pole_field(
        geometry: &BrakeGeometry,
        order: u32,
        resolution: EdgeResolution,
        pole_field: PoleField,
    ) -> Result<Self, PhysicsError> {
        geometry.validate()?;
        let degenerate = PhysicsError::Degenerate {
            what: "the finite-height edge factor",
        };
        let m_count = resolution.modes.max(1);
        let k = f64::from(order) * PI / geometry.pole_pitch_m;
        let a = geometry.centre_to_iron_m();
        let ap = 0.5 * geometry.active_height_m();
        let b = fin_half_height_m(geometry);
        let d = geometry.fin_thickness_m;
        let mut low_speed_factor = russell_norsworthy(k, ap, geometry.overhang_m());
        let single = resolution.lamina_pairs == 0;
        let (ys, w) = laminae(geometry.half_fin_thickness_m(), resolution.lamina_pairs);
        let nl = ys.len();
        let n = nl * m_count;
        let p: Vec<f64> = (1..=m_count)
            .map(|m| (2 * m - 1) as f64 * PI / (2.0 * b))
            .collect();

        // Reaction matrix by quadrature over q ≥ 0: panels, then the tail beyond Q.
        let mut r = vec![0.0; n * n];
        let q_max = (1.5 * p[m_count - 1]).max(40.0 / b);
        let width = PI / b;
        let panels = (q_max / width).ceil() as usize;
        let q_max = panels as f64 * width;
        let gauss8 = gauss_legendre(8);
        let h_m = geometry.magnet_thickness_m;
        let mut fringed = vec![0.0; n];
        let mut phi = vec![0.0; m_count];
        let mut kern = vec![0.0; nl * nl];
        let mut shared = SharedKernel::new(nl);
        // Every node's kernel values and mode amplitudes, then the sums over the nodes
        // (`NodeSums`): the nodes of the panels, then those of the tail, in order.
        let mut nodes = NodeSums::new(nl, m_count, 8 * (panels + 1));
        let mut add_node = |q: f64, weight: f64, phi: &[f64]| {
            let kappa = q.hypot(k);
            shared.fill(kappa, a, &ys, single, weight, &mut kern);
            nodes.push(&kern, phi);
        };
        for panel in 0..panels {
            let mid = (panel as f64 + 0.5) * width;
            for &(x, wg) in &gauss8 {
                let q = mid + 0.5 * width * x;
                // φ̂_m = 2 p_m b·sinc((q − p_m)b)/(p_m + q) with sin((q − p_m)b) = −(−1)^m'
                // cos(qb) (p_m b = (m' + ½)π, m' = m − 1): one cosine per node. The panels are
                // centred on the p_m, so |q − p_m|·b ≥ 0.28 at every Gauss node.
                let cos_qb = (q * b).cos();
                let mut sign = -2.0 * cos_qb;
                for (f, &pm) in phi.iter_mut().zip(&p) {
                    let x = (q - pm) * b;
                    *f = if x.abs() < 1e-4 {
                        2.0 * pm * b * sinc(x) / (pm + q)
                    } else {
                        sign * pm / ((q - pm) * (q + pm))
                    };
                    sign = -sign;
                }
                let weight = 0.5 * width * wg / PI;
                add_node(q, weight, &phi);
                if pole_field == PoleField::Fringing {
                    // s_lm = (1/π)∫ φ̂_m(q) B̂_s(q) dq with B̂_s = box̂(q)·S(κ)cosh(κ y_l)/S(k).
                    let kappa = q.hypot(k);
                    let spread =
                        2.0 * ap * sinc(q * ap) * gap_centre_amplitude_t(1.0, kappa, h_m, a)
                            / gap_centre_amplitude_t(1.0, k, h_m, a);
                    for (l, &yl) in ys.iter().enumerate() {
                        let across = weight * spread * (kappa * yl).cosh();
                        for (m, f) in phi.iter().enumerate() {
                            fringed[l * m_count + m] += across * f;
                        }
                    }
                }
            }
        }
        // Tail: φ̂_m φ̂_n → (−1)^{m+n} 4 p_m p_n cos²(qb)/((q² − p_m²)(q² − p_n²)) with cos² → ½;
        // q = Q/t maps (Q, ∞) to (0, 1) with dq = Q/t² dt, so φ̂_m φ̂_n dq becomes
        // (−1)^{m+n}·2 p_m p_n·Q t²/((Q² − p_m²t²)(Q² − p_n²t²)) dt = φ_m φ_n dt with
        // φ_m = ±√(2Q)·p_m t/(Q² − p_m²t²), which the same accumulation takes.
        for &(x, wg) in &gauss8 {
            let t = 0.5 * (x + 1.0);
            let q = q_max / t;
            for (mi, (f, &pm)) in phi.iter_mut().zip(&p).enumerate() {
                let sign = if mi % 2 == 0 { 1.0 } else { -1.0 };
                *f = sign * (2.0 * q_max).sqrt() * pm * t / (q_max * q_max - pm * pm * t * t);
            }
            add_node(q, 0.5 * wg / PI, &phi);
        }
        nodes.upper_triangle(&mut r);
        // Symmetric fill of the lower triangle.
        for i in 0..n {
            for j in 0..i {
                r[i * n + j] = r[j * n + i];
            }
        }

        // Scale by D^{−½}: D = b (p_m² + k²)/w per lamina.
        let inv_sqrt_d: Vec<f64> = (0..n)
            .map(|i| (w / (b * (p[i % m_count].powi(2) + k * k))).sqrt())
            .collect();
        for i in 0..n {
            for j in 0..n {
                r[i * n + j] *= inv_sqrt_d[i] * inv_sqrt_d[j];
            }
        }
        let mut y: Vec<f64> = (0..n)
            .map(|i| {
                let (l, m) = (i / m_count, i % m_count);
                let source = match pole_field {
                    PoleField::Uniform => (k * ys[l]).cosh() * 2.0 * (p[m] * ap).sin() / p[m],
                    PoleField::Fringing => fringed[i],
                };
                inv_sqrt_d[i] * source
            })
            .collect();
        let finite = symmetric_eigen_projections(&mut r, &mut y, n).ok_or(degenerate.clone())?;

        // Tall fin with the same laminae: D = k²/w, κ = k, source cosh(k y_l).
        let mut r_tall: Vec<f64> = (0..nl * nl)
            .map(|i| {
                let (li, lj) = (i / nl, i % nl);
                pair_kernel(k, a, ys[li], ys[lj], single) * w / (k * k)
            })
            .collect();
        let mut y_tall: Vec<f64> = ys
            .iter()
            .map(|&yl| (k * yl).cosh() * w.sqrt() / k)
            .collect();
        let tall =
            symmetric_eigen_projections(&mut r_tall, &mut y_tall, nl).ok_or(degenerate.clone())?;
        let tall_sum: f64 = tall.iter().map(|(_, t)| t * t).sum();

        let kd = k * d;
        let mut numerator = lorentzians(&finite, kd, 1.0 / (2.0 * ap * tall_sum));
        let denominator = lorentzians(&tall, kd, 1.0 / tall_sum);
        let all_finite = numerator
            .iter()
            .chain(&denominator)
            .all(|t| t[0].is_finite() && t[1].is_finite() && t[1] >= 0.0)
            && low_speed_factor.is_finite();
        if !all_finite || numerator.is_empty() {
            return Err(degenerate);
        }
        // Drop terms that stay below 1e-9 of the sum on a scan of σv (10⁻⁴…10⁶ of the slowest
        // tall-fin rate's inverse), keeping their weight for the remainder.
        let s_ref = 1.0
            / denominator
                .iter()
                .map(|t| t[1].sqrt())
                .fold(0.0, f64::max)
                .max(f64::MIN_POSITIVE);
        let scan: Vec<f64> = (-16..=24)
            .map(|i| (s_ref * 10f64.powf(f64::from(i) / 4.0)).powi(2))
            .collect();
        let totals: Vec<f64> = scan
            .iter()
            .map(|&s2| lorentzian_sum(&numerator, s2))
            .collect();
        numerator.retain(|t| {
            scan.iter()
                .zip(&totals)
                .any(|(&s2, &tot)| t[0] / (1.0 + t[1] * s2) >= PRUNE * tot)
        });
        // Remainder K − Σ w_i: the modes beyond M, given the rate of the first of them in the
        // diagonal estimate r(κ) ≈ R_max·(k/κ)·coth(κa)/coth(ka), κ² = p_{M+1}² + k² (the rate of
        // a tall fin scaled by the reaction over the resistance of one cosine mode).
        // With the fringing field the static limit has no closed form: F(0) is the Galerkin sum.
        if pole_field == PoleField::Fringing {
            low_speed_factor = numerator.iter().map(|t| t[0]).sum();
        }
        let kept: f64 = numerator.iter().map(|t| t[0]).sum();
        let remainder = low_speed_factor - kept;
        let r_max = denominator.iter().map(|t| t[1]).fold(0.0, f64::max).sqrt();
        let p_next = (2 * m_count + 1) as f64 * PI / (2.0 * b);
        let kappa = p_next.hypot(k);
        let coth = |x: f64| 1.0 / x.tanh();
        let r_rem = r_max * (k / kappa) * coth(kappa * a) / coth(k * a);
        if remainder != 0.0 && r_rem.is_finite() {
            numerator.push([remainder, r_rem * r_rem]);
        }
        Ok(FiniteHeightEdge {
            numerator,
            denominator,
            low_speed_factor,
        })
    }

    /// The factor F at `sigma_speed_s_s` = σ·v (conductivity in S/m times speed in m/s; the sign
    /// is ignored), dimensionless: finite-height drag over tall-fin drag of this harmonic.
    #[inline]
    pub fn factor(&self, sigma_speed_s_s: f64) -> f64 {
        let s2 = sigma_speed_s_s * sigma_speed_s_s;
        if !s2.is_finite() {
            return self.high_speed_factor();
        }
        lorentzian_sum(&self.numerator, s2) / lorentzian_sum(&self.denominator, s2)
    }

    /// F(0): the Russell–Norsworthy factor K of this harmonic (with [`PoleField::Fringing`], the
    /// static limit of the fringing field).
    pub fn low_speed_factor(&self) -> f64 {
        self.low_speed_factor
    }

    /// lim F as σv → ∞: Σ w_i/r_i² / Σ W_j/R_j² (terms with r = 0 are never resistive-limited
    /// and are left out of this limit; there are none for a valid geometry).
    pub fn high_speed_factor(&self) -> f64 {
        let tail = |terms: &[[f64; 2]]| -> f64 {
            terms
                .iter()
                .filter(|t| t[1] > 0.0)
                .map(|t| t[0] / t[1])
                .sum()
        };
        tail(&self.numerator) / tail(&self.denominator)
    }

    /// Number of Lorentzian terms evaluated (numerator and denominator).
    pub fn term_count(&self) -> usize {
        self.numerator.len() + self.denominator.len()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The shared-exponential kernels equal `pair_kernel` bit for bit, for one sheet and for
    /// one to three lamina pairs, over κa from 1e-3 to 1e3.
    #[test]
    fn shared_kernel_is_pair_kernel_to_the_bit() {
        let (a, half) = (0.0105, 0.0045);
        for pairs in 0..=3 {
            let (ys, _) = laminae(half, pairs);
            let nl = ys.len();
            let single = pairs == 0;
            let mut shared = SharedKernel::new(nl);
            let mut out = vec![0.0; nl * nl];
            for i in 0..200 {
                let kappa = 10f64.powf(-1.0 + 0.03 * f64::from(i));
                shared.fill(kappa, a, &ys, single, 0.37, &mut out);
                for li in 0..nl {
                    for lj in li..nl {
                        let want = 0.37 * pair_kernel(kappa, a, ys[li], ys[lj], single);
                        assert_eq!(out[li * nl + lj].to_bits(), want.to_bits(), "κ = {kappa}");
                    }
                }
            }
        }
    }

    /// The node-innermost sums equal the per-node accumulation they replaced bit for bit (each
    /// element gets the same products added in the same node order), for one to six laminae
    /// (one sheet, one to three lamina pairs, and odd counts) and mode counts on both sides of
    /// the register block; the elements below the diagonal are left alone.
    #[test]
    fn node_sums_are_the_per_node_accumulation_to_the_bit() {
        for (nl, m_count) in [(1, 1), (1, 8), (2, 7), (2, 19), (4, 9), (6, 24), (3, 17)] {
            let n = nl * m_count;
            let nodes = 37;
            let mut sums = NodeSums::new(nl, m_count, nodes);
            let mut per_node = vec![0.0; n * n];
            // Deterministic values of both signs and wide range.
            let value = |i: usize| {
                ((i as f64 * 0.7548776662).fract() - 0.4) * 10f64.powi((i % 7) as i32 - 3)
            };
            for q in 0..nodes {
                let kern: Vec<f64> = (0..nl * nl).map(|i| value(q * 131 + i)).collect();
                let phi: Vec<f64> = (0..m_count).map(|i| value(q * 977 + 50 + i)).collect();
                sums.push(&kern, &phi);
                for li in 0..nl {
                    for lj in li..nl {
                        let g = kern[li * nl + lj];
                        for mi in 0..m_count {
                            let gm = g * phi[mi];
                            let row = (li * m_count + mi) * n + lj * m_count;
                            let start = if li == lj { mi } else { 0 };
                            for mj in start..m_count {
                                per_node[row + mj] += gm * phi[mj];
                            }
                        }
                    }
                }
            }
            let mut r = vec![f64::NAN; n * n];
            sums.upper_triangle(&mut r);
            for i in 0..n {
                for j in 0..n {
                    let (li, mi, lj, mj) = (i / m_count, i % m_count, j / m_count, j % m_count);
                    let written = li < lj || (li == lj && mi <= mj);
                    if written {
                        assert_eq!(
                            r[i * n + j].to_bits(),
                            per_node[i * n + j].to_bits(),
                            "{nl}×{m_count} at ({i}, {j})"
                        );
                    } else {
                        assert!(r[i * n + j].is_nan(), "{nl}×{m_count}: ({i}, {j}) written");
                    }
                }
            }
        }
    }

    #[test]
    fn hand_computed_values() {
        // Hand computation with tanh(1) = 0.761594155955765 (standard value):
        // k·a_p = 1, no overhang: K = 1 − tanh 1 = 0.238405844044235.
        assert!((russell_norsworthy(1.0, 1.0, 0.0) - 0.238_405_844_044_235).abs() < 1e-14);
        // k·a_p = 1, k·o = 1: K = 1 − tanh 1 / (1 + tanh² 1) = 0.517985...
        let t = 0.761_594_155_955_765_f64;
        let expected = 1.0 - t / (1.0 + t * t);
        assert!((russell_norsworthy(2.0, 0.5, 0.5) - expected).abs() < 1e-14);
    }

    #[test]
    fn limits() {
        // Tall sheet: K = 1 − 1/(k a_p) to within e^(−2 k a_p); K → 0 for k a_p → 0 (K ≈ (k a_p)²/3).
        assert!((russell_norsworthy(1.0, 1e6, 0.0) - (1.0 - 1e-6)).abs() < 1e-15);
        let small = russell_norsworthy(1.0, 1e-3, 0.0);
        assert!((small / (1e-6 / 3.0) - 1.0).abs() < 1e-3);
        assert_eq!(russell_norsworthy(1.0, 0.0, 0.0), 0.0);
        assert!(russell_norsworthy(f64::NAN, 1.0, 0.0).is_nan());
        // An overhang always helps (more return path), monotonically.
        let mut last = russell_norsworthy(50.0, 0.09, 0.0);
        for o in [0.001, 0.005, 0.01, 0.02, 0.1] {
            let k = russell_norsworthy(50.0, 0.09, o);
            assert!(k > last);
            last = k;
        }
    }

    fn geometry(pole_m: f64, overhang_m: f64) -> BrakeGeometry {
        BrakeGeometry {
            pole_pitch_m: 0.05,
            magnet_thickness_m: 0.012,
            magnet_fill: 0.9,
            clearance_m: 0.006,
            fin_thickness_m: 0.009,
            fin_height_m: pole_m + 2.0 * overhang_m,
            pole_height_m: pole_m,
        }
    }

    #[test]
    fn cosine_series_reproduces_russell_norsworthy() {
        // The Galerkin sum at σv = 0 before the remainder is the Fourier series of the
        // Russell–Norsworthy solution (Proc. IEE 105A, 1958): with 400 modes it must agree with
        // the closed form to 2e-7 (tail ~ 1/M³); at the model's resolution to 1e-4.
        for (pole, over) in [(0.1, 0.0), (0.15, 0.03), (0.3, 0.06)] {
            let g = geometry(pole, over);
            let k = PI / g.pole_pitch_m;
            let ap = 0.5 * pole;
            let b = ap + over;
            let series = |m_count: usize| -> f64 {
                (1..=m_count)
                    .map(|m| {
                        let p = (2 * m - 1) as f64 * PI / (2.0 * b);
                        4.0 * k * k * (p * ap).sin().powi(2)
                            / (2.0 * ap * b * p * p * (p * p + k * k))
                    })
                    .sum()
            };
            let rn = russell_norsworthy(k, ap, over);
            assert!((series(400) / rn - 1.0).abs() < 2e-7, "{pole} {over}");
            let m = EdgeResolution::for_harmonic(&g, 1).modes;
            assert!(
                (series(m) / rn - 1.0).abs() < 1e-4,
                "{pole} {over}: M = {m}"
            );
        }
    }

    #[test]
    fn factor_limits() {
        // F(0) = K by construction; F → 1 for a tall fin at every speed (|F − 1| ≤ 2/(k a_p));
        // F is finite and positive at extreme σv.
        let g = geometry(0.15, 0.0);
        let e = FiniteHeightEdge::new(&g, 1).expect("valid");
        assert_eq!(e.factor(0.0), e.low_speed_factor());
        assert!(e.factor(f64::INFINITY).is_finite() && e.factor(1e300) > 0.0);
        let tall = geometry(10.0, 0.0);
        let k = PI / tall.pole_pitch_m;
        let e = FiniteHeightEdge::new(&tall, 1).expect("valid");
        for s in [0.0, 1e6, 1e7, 1e8, 1e9, 1e12] {
            assert!(
                (e.factor(s) - 1.0).abs() <= 2.0 / (k * 5.0),
                "σv = {s}: {}",
                e.factor(s)
            );
        }
    }
}
