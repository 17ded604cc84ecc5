//! The fin off-centre: layer theory with unequal clearances c − e and c + e on the two sides.
//!
//! # Derivation (done here; the centred limit is [`super::layer`])
//!
//! Coordinates as in [`super::layer`]: iron at y = ±a, fin centre displaced to y = e (e > 0:
//! towards the row at +a), fin faces at y± = e ± u, so the fin face to iron distances are
//! L₊ = c + h_m − e and L₋ = c + h_m + e. In the fin (local s = y − e) the potential of one
//! harmonic is no longer even: Â = P·cosh γs + Q·sinh γs, γ² = k² + jωμ0σ. Outside it, as in the
//! centred case, the no-load potential C0·cosh ky (C0 = −j·B_0n/k) plus D±·cosh k(a ∓ y), which
//! keeps Â' = 0 on the iron. Eliminating D± at each face (Â, Â' continuous) gives, with
//! t± = k·tanh(kL±) and r± = sinh(k h_m)/cosh(kL±) (the no-load terms reduce to B_rn·r±):
//!
//! ```text
//! Â'(y₊) + t₊·Â(y₊) = −j·B_rn·r₊ ,     Â'(y₋) − t₋·Â(y₋) = +j·B_rn·r₋ .
//! ```
//!
//! With ch = cosh γu, T = tanh γu, E± = γT + t±, O± = γ + t±T:
//!
//! ```text
//! P·ch = −j·B_rn·(r₊O₋ + r₋O₊)/Δ ,  Q·ch = −j·B_rn·(r₊E₋ − r₋E₊)/Δ ,  Δ = E₊O₋ + E₋O₊ .
//! ```
//!
//! For e = 0 (t₊ = t₋, r₊ = r₋) Q = 0 and P is the centred P of [`super::layer`].
//!
//! **Drag.** ∫J×B along x over the fin thickness (J = −jωσÂ, B_y = jkÂ) is (ωσk/2)∫|Â|²; the
//! cross term P·Q̄·cosh·conj(sinh) is odd in s and integrates to zero, so with
//! W± = 2[sinh(2αu)/(2α) ± sin(2βu)/(2β)]/(cosh 2αu + cos 2βu) (γ = α + jβ)
//!
//! ```text
//! f_x = (k²vσ/2)·B_rn²·(|p|²W₊ + |q|²W₋)/|Δ|²,   p = r₊O₋ + r₋O₊,  q = r₊E₋ − r₋E₊ .
//! ```
//!
//! This equals the loss per area over v (the centred argument of [`super::layer`]) and the
//! Maxwell stress T_xy = B_xB_y/μ0 across the two faces (tests below).
//!
//! **Lateral force** (along y, normal to the fin, per m² of fin in plan). ∫J_zB_x dy with
//! Ĵ = −(Â'' − k²Â)/μ0 is −[|Â'|² − k²|Â|²]/(4μ0) between the faces, which is the Maxwell stress
//! T_yy = (B_y² − B_x²)/(2μ0) at y₊ minus that at y₋ — the two routes agree identically. With
//! the face values of P, Q:
//!
//! ```text
//! f_y = (B_rn²/μ0)·Re[ p·q̄·(k²·T̄ − |γ|²·T) ]/|Δ|² .
//! ```
//!
//! - e = 0: q = 0, so f_y = 0; the drag is the centred drag.
//! - e → −e swaps the sides (t₊ ↔ t₋, r₊ ↔ r₋): p is unchanged and q changes sign, so the drag
//!   is even in e and the lateral force odd.
//! - Low speed (first order in σ for the current, second for the force; h the first-order
//!   response, h'' − k²h = cosh ky in the fin, h' = 0 on the iron):
//!   f_x/v → ½σB_0n²·[u + cosh(2ke)·sinh(2ku)/(2k)] and
//!   f_y/v² → ½μ0σ²B_0n²·sinh(2ke)/(4k²)·[2ku·cosh(k(a − 2u))/cosh(ka) − sinh(2ku)].
//!   The bracket is negative for 0 < 2ku < 2ka (its derivative in x = 2ku is
//!   −[sinh(ka)·sinh x + x·sinh(ka − x)]/cosh(ka) < 0 for x ≤ ka, checked on a grid beyond).
//! - High speed (flux excluded from the fin, Â → 0 on the faces):
//!   f_x → (B_rn²/μ0)(kδ/4)(r₊² + r₋²) with δ = √(2/(μ0σkv)), and
//!   f_y → (B_rn²/(4μ0))·(r₋² − r₊²).
//!
//! **Sign.** For e > 0 both limits give f_y < 0: the fin is pushed away from the nearer row,
//! back towards the centre (a centring, restoring force, as in electrodynamic guidance); the
//! tests check the sign at every speed scanned.
//!
//! **Finite height.** [`offset_forces_per_area_pa`] multiplies each harmonic's drag and lateral
//! force by the same finite-height factor F_n(σv) the centred model uses ([`super::edge`]). That
//! factor is derived for the drag; for the lateral force it is an approximation. At low speed the
//! lateral force is quadratic in the induced current, so its true reduction is nearer F_n²: the
//! factor F_n overstates the lateral force there (on the safe side for guidance and fin loads).

use super::field::{gap_centre_amplitude_t, sinh_cosh_ratio, source_amplitude_t, wavenumber_per_m};
use super::{finite, positive, BrakeGeometry, DragModel, PhysicsError};
use crate::constants::MU0_H_M;
use num_complex::Complex64;

/// One harmonic of the off-centre layer model.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OffsetHarmonic {
    /// Harmonic order n (odd).
    pub order: u32,
    /// Wavenumber k_n, 1/m.
    pub wavenumber_per_m: f64,
    /// Source amplitude B_rn, T (signed).
    pub source_amplitude_t: f64,
    /// No-load gap field at the gap centre B_0n, T.
    pub gap_field_t: f64,
    /// Fin offset e from the centre plane, m (positive towards the row at +y).
    pub fin_offset_m: f64,
    conductivity_s_m: f64,
    half_thickness_m: f64,
    centre_to_iron_m: f64,
    t_plus: f64,
    t_minus: f64,
    r_plus: f64,
    r_minus: f64,
}

/// The fields of the solution at one speed: γ, tanh γu, the weights W±, p, q and Δ.
struct Solution {
    gamma: Complex64,
    tanh: Complex64,
    w_plus: f64,
    w_minus: f64,
    p: Complex64,
    q: Complex64,
    delta: Complex64,
}

impl OffsetHarmonic {
    /// Harmonic `order` for `geometry` (its clearance is the centred one, c), remanence (T),
    /// the conductivity the layer sees (S/m) and fin offset e (m, |e| < c).
    pub fn new(
        geometry: &BrakeGeometry,
        remanence_t: f64,
        conductivity_s_m: f64,
        order: u32,
        fin_offset_m: f64,
    ) -> Result<Self, PhysicsError> {
        geometry.validate()?;
        positive("magnet remanence", remanence_t)?;
        positive("fin conductivity", conductivity_s_m)?;
        finite("fin offset", fin_offset_m)?;
        let c = geometry.clearance_m;
        if fin_offset_m.abs() >= c {
            return Err(PhysicsError::OutOfRange {
                quantity: "fin offset (its size must stay below the clearance)",
                value: fin_offset_m.abs(),
                min: 0.0,
                max: c,
            });
        }
        let k = wavenumber_per_m(geometry.pole_pitch_m, order);
        let h = geometry.magnet_thickness_m;
        let l = geometry.fin_face_to_iron_m();
        let (lp, lm) = (l - fin_offset_m, l + fin_offset_m);
        let b_rn = source_amplitude_t(remanence_t, geometry.magnet_fill, order);
        let a = geometry.centre_to_iron_m();
        Ok(Self {
            order,
            wavenumber_per_m: k,
            source_amplitude_t: b_rn,
            gap_field_t: gap_centre_amplitude_t(b_rn, k, h, a),
            fin_offset_m,
            conductivity_s_m,
            half_thickness_m: geometry.half_fin_thickness_m(),
            centre_to_iron_m: a,
            t_plus: k * (k * lp).tanh(),
            t_minus: k * (k * lm).tanh(),
            r_plus: sinh_cosh_ratio(k * h, k * lp),
            r_minus: sinh_cosh_ratio(k * h, k * lm),
        })
    }

    fn solve(&self, speed_abs_m_s: f64) -> Solution {
        let k = self.wavenumber_per_m;
        let u = self.half_thickness_m;
        let x = k * speed_abs_m_s * MU0_H_M * self.conductivity_s_m;
        let gamma = Complex64::new(k * k, x).sqrt();
        let (al, be) = (gamma.re, gamma.im);
        let (x2, y2) = (2.0 * al * u, 2.0 * be * u);
        // Everything scaled by 2e^{−2αu} (no overflow at any speed).
        let em = (-x2).exp();
        let one_minus = -(-2.0 * x2).exp_m1();
        let (sy, cy) = y2.sin_cos();
        let den = 1.0 + em * em + 2.0 * em * cy;
        let tanh = Complex64::new(one_minus, 2.0 * em * sy) / den;
        let sinc = if y2.abs() < 1e-8 { 1.0 } else { sy / y2 };
        let hyper = one_minus / (2.0 * al);
        let trig = em * 2.0 * u * sinc;
        let (w_plus, w_minus) = (2.0 * (hyper + trig) / den, 2.0 * (hyper - trig) / den);
        let e_p = gamma * tanh + self.t_plus;
        let e_m = gamma * tanh + self.t_minus;
        let o_p = gamma + tanh * self.t_plus;
        let o_m = gamma + tanh * self.t_minus;
        Solution {
            gamma,
            tanh,
            w_plus,
            w_minus,
            p: o_m * self.r_plus + o_p * self.r_minus,
            q: e_m * self.r_plus - e_p * self.r_minus,
            delta: e_p * o_m + e_m * o_p,
        }
    }

    /// Drag per unit area of this harmonic in Pa at `speed_m_s` (odd in v), tall fin.
    pub fn drag_per_area_pa(&self, speed_m_s: f64) -> f64 {
        let s = self.solve(speed_m_s.abs());
        let k = self.wavenumber_per_m;
        let b2 = self.source_amplitude_t * self.source_amplitude_t;
        0.5 * k
            * k
            * speed_m_s
            * self.conductivity_s_m
            * b2
            * (s.p.norm_sqr() * s.w_plus + s.q.norm_sqr() * s.w_minus)
            / s.delta.norm_sqr()
    }

    /// Lateral force per unit area of this harmonic in Pa at `speed_m_s` (even in v), along +y
    /// (negative for e > 0: towards the centre), tall fin.
    pub fn lateral_per_area_pa(&self, speed_m_s: f64) -> f64 {
        let s = self.solve(speed_m_s.abs());
        let k = self.wavenumber_per_m;
        let b2 = self.source_amplitude_t * self.source_amplitude_t;
        let factor = s.tanh.conj() * (k * k) - s.tanh * s.gamma.norm_sqr();
        b2 / MU0_H_M * (s.p * s.q.conj() * factor).re / s.delta.norm_sqr()
    }

    /// Low-speed limit of drag/v, Pa·s/m: ½σB_0n²·[u + cosh(2ke)·sinh(2ku)/(2k)].
    pub fn low_speed_drag_pa_s_m(&self) -> f64 {
        let (k, u, e) = (
            self.wavenumber_per_m,
            self.half_thickness_m,
            self.fin_offset_m,
        );
        0.5 * self.conductivity_s_m
            * self.gap_field_t
            * self.gap_field_t
            * (u + (2.0 * k * e).cosh() * (2.0 * k * u).sinh() / (2.0 * k))
    }

    /// Low-speed limit of lateral force/v², Pa·s²/m²:
    /// ½μ0σ²B_0n²·sinh(2ke)/(4k²)·[2ku·cosh(k(a − 2u))/cosh(ka) − sinh(2ku)].
    pub fn low_speed_lateral_pa_s2_m2(&self) -> f64 {
        let (k, u, e, a) = (
            self.wavenumber_per_m,
            self.half_thickness_m,
            self.fin_offset_m,
            self.centre_to_iron_m,
        );
        let bracket =
            2.0 * k * u * (k * (a - 2.0 * u)).cosh() / (k * a).cosh() - (2.0 * k * u).sinh();
        0.5 * MU0_H_M
            * self.conductivity_s_m
            * self.conductivity_s_m
            * self.gap_field_t
            * self.gap_field_t
            * (2.0 * k * e).sinh()
            / (4.0 * k * k)
            * bracket
    }

    /// High-speed limits (flux excluded from the fin) at `speed_m_s` > 0: (drag, lateral), Pa.
    pub fn high_speed_limits_pa(&self, speed_m_s: f64) -> (f64, f64) {
        let k = self.wavenumber_per_m;
        let b2 = self.source_amplitude_t * self.source_amplitude_t;
        let delta = (2.0 / (MU0_H_M * self.conductivity_s_m * k * speed_m_s)).sqrt();
        let (rp, rm) = (self.r_plus * self.r_plus, self.r_minus * self.r_minus);
        (
            b2 / MU0_H_M * k * delta / 4.0 * (rp + rm),
            b2 / (4.0 * MU0_H_M) * (rm - rp),
        )
    }
}

/// The off-centre model of a whole section: the harmonics of a centred [`DragModel`], each
/// solved with the fin displaced by e and multiplied by the model's finite-height factor
/// F_n(σv) (see the module note), built once so that a force table can evaluate it cheaply.
///
/// Like the centred model it depends on conductivity and speed only through σ·v and on
/// remanence as Br² (drag and lateral force alike), so one table serves every temperature.
#[derive(Clone, Debug)]
pub struct OffsetModel {
    model: DragModel,
    fin_offset_m: f64,
    harmonics: Vec<OffsetHarmonic>,
}

impl OffsetModel {
    /// The section of `model` with its fin displaced by `fin_offset_m` (m, |e| < clearance):
    /// every kept harmonic, each with the conductivity its layer term uses.
    pub fn new(model: &DragModel, fin_offset_m: f64) -> Result<Self, PhysicsError> {
        let harmonics = model
            .harmonics()
            .iter()
            .map(|t| {
                OffsetHarmonic::new(
                    model.geometry(),
                    model.remanence_t(),
                    t.effective_conductivity_s_m,
                    t.order,
                    fin_offset_m,
                )
            })
            .collect::<Result<Vec<_>, _>>()?;
        Ok(Self {
            model: model.clone(),
            fin_offset_m,
            harmonics,
        })
    }

    /// The centred model it was built from.
    pub fn model(&self) -> &DragModel {
        &self.model
    }

    /// Fin offset e from the centre plane, m.
    pub fn fin_offset_m(&self) -> f64 {
        self.fin_offset_m
    }

    /// Drag per unit area of the fundamental alone (with its finite-height factor), Pa.
    pub fn drag_per_area_fundamental_pa(&self, speed_m_s: f64) -> f64 {
        self.sum_over(
            &self.harmonics[..1.min(self.harmonics.len())],
            speed_m_s,
            |h| h.drag_per_area_pa(speed_m_s),
        )
    }

    /// Σ F_n(σv)·term(harmonic) over the kept harmonics.
    fn sum(&self, speed_m_s: f64, term: impl Fn(&OffsetHarmonic) -> f64) -> f64 {
        self.sum_over(&self.harmonics, speed_m_s, term)
    }

    /// Σ F_n(σv)·term(harmonic) over `harmonics`.
    fn sum_over(
        &self,
        harmonics: &[OffsetHarmonic],
        speed_m_s: f64,
        term: impl Fn(&OffsetHarmonic) -> f64,
    ) -> f64 {
        let sigma_v = self.model.conductivity_s_m() * speed_m_s.abs();
        harmonics
            .iter()
            .map(|h| {
                let f = self
                    .model
                    .finite_height_edge(h.order)
                    .map_or(1.0, |e| e.factor(sigma_v));
                f * term(h)
            })
            .sum()
    }

    /// Drag per unit area, Pa, at `speed_m_s` (odd in v).
    pub fn drag_per_area_pa(&self, speed_m_s: f64) -> f64 {
        self.sum(speed_m_s, |h| h.drag_per_area_pa(speed_m_s))
    }

    /// Lateral force per unit area, Pa, along +y at `speed_m_s` (even in v; negative for e > 0:
    /// towards the centre).
    pub fn lateral_per_area_pa(&self, speed_m_s: f64) -> f64 {
        self.sum(speed_m_s, |h| h.lateral_per_area_pa(speed_m_s))
    }

    /// lim_{v→0} drag/v, Pa·s/m (the closed forms of the module note with F_n(0)).
    pub fn low_speed_drag_pa_s_m(&self) -> f64 {
        self.sum(0.0, OffsetHarmonic::low_speed_drag_pa_s_m)
    }

    /// lim_{v→0} lateral/v², Pa·s²/m² (the closed forms of the module note with F_n(0)).
    pub fn low_speed_lateral_pa_s2_m2(&self) -> f64 {
        self.sum(0.0, OffsetHarmonic::low_speed_lateral_pa_s2_m2)
    }
}

/// Drag and lateral force per unit area (Pa) of the fin of `model` displaced by `fin_offset_m`
/// (m, |e| < clearance) at `speed_m_s`: the model's kept harmonics, each with the conductivity
/// its layer term uses and the model's finite-height factor F_n(σv) (see the module note).
pub fn offset_forces_per_area_pa(
    model: &DragModel,
    fin_offset_m: f64,
    speed_m_s: f64,
) -> Result<(f64, f64), PhysicsError> {
    let m = OffsetModel::new(model, fin_offset_m)?;
    Ok((
        m.drag_per_area_pa(speed_m_s),
        m.lateral_per_area_pa(speed_m_s),
    ))
}

#[cfg(test)]
mod tests {
    use super::super::test_support::typical_geometry;
    use super::*;

    fn harmonic(n: u32, e: f64) -> OffsetHarmonic {
        OffsetHarmonic::new(&typical_geometry(), 1.25, 58e6, n, e).expect("valid")
    }

    #[test]
    fn centred_limit_is_the_layer_model() {
        // e = 0: drag equals the centred layer term (1e-12, rounding), lateral force 0.
        let m = DragModel::new(&typical_geometry(), 1.25, 58e6).expect("valid");
        for t in m.harmonics() {
            let h = harmonic(t.order, 0.0);
            for v in [1e-3, 0.5, 5.0, 50.0, 500.0] {
                let want = t.layer_force_per_area_pa(v);
                assert!(
                    (h.drag_per_area_pa(v) / want - 1.0).abs() < 1e-12,
                    "n={}",
                    t.order
                );
                assert!(h.lateral_per_area_pa(v).abs() <= 1e-12 * want.abs());
            }
        }
        let (d, l) = offset_forces_per_area_pa(&m, 0.0, 7.0).expect("valid");
        assert!((d / m.force_per_area_pa(7.0) - 1.0).abs() < 1e-12);
        assert!(l.abs() < 1e-12 * d);
    }

    #[test]
    fn parity_and_sign_in_the_offset() {
        // Drag even, lateral odd in e (1e-12); lateral force towards the centre at every speed.
        for n in [1, 3, 5] {
            for e in [0.5e-3, 2e-3, 4e-3] {
                let (a, b) = (harmonic(n, e), harmonic(n, -e));
                for i in -40..=40 {
                    let v = 10f64.powf(f64::from(i) / 10.0);
                    let (da, db) = (a.drag_per_area_pa(v), b.drag_per_area_pa(v));
                    let (la, lb) = (a.lateral_per_area_pa(v), b.lateral_per_area_pa(v));
                    assert!((da / db - 1.0).abs() < 1e-12);
                    assert!((la + lb).abs() < 1e-12 * la.abs());
                    assert!(la < 0.0, "n={n} e={e} v={v}");
                    assert!(da > harmonic(n, 0.0).drag_per_area_pa(v));
                }
            }
        }
    }

    #[test]
    fn low_and_high_speed_limits() {
        // Closed forms of the module note: 1e-6 at v = 1e-4 m/s (next term O(v²)), 2 % at
        // 1e5 m/s (next term O(δ)).
        let h = harmonic(1, 2e-3);
        let v = 1e-4;
        let d = h.drag_per_area_pa(v) / v;
        assert!((d / h.low_speed_drag_pa_s_m() - 1.0).abs() < 1e-6);
        let l = h.lateral_per_area_pa(v) / (v * v);
        assert!(
            (l / h.low_speed_lateral_pa_s2_m2() - 1.0).abs() < 1e-5,
            "{l}"
        );
        let v = 1e5;
        let (dh, lh) = h.high_speed_limits_pa(v);
        assert!((h.drag_per_area_pa(v) / dh - 1.0).abs() < 0.02);
        assert!((h.lateral_per_area_pa(v) / lh - 1.0).abs() < 0.02);
    }

    #[test]
    fn stress_on_the_faces_equals_force_on_the_current() {
        // ∫J×B through the fin (composite Simpson, 2000 intervals) against the closed forms
        // (Maxwell stress across the faces): 1e-9 relative.
        let h = harmonic(1, 2.5e-3);
        let u = h.half_thickness_m;
        for v in [0.3, 3.0, 30.0] {
            let s = h.solve(v);
            let k = h.wavenumber_per_m;
            let ch_inv = Complex64::new(0.0, -h.source_amplitude_t) / s.delta;
            let (p, q) = (s.p * ch_inv, s.q * ch_inv); // P·ch, Q·ch
            let g = s.gamma;
            let omega_sigma = k * v * h.conductivity_s_m;
            // Â/ch = P·cosh(γs)/ch + …: use cosh(γs)/cosh(γu) directly.
            let chu = (g * u).cosh();
            let field = |y: f64| {
                let a = (p * (g * y).cosh() + q * (g * y).sinh()) / chu;
                let da = (p * (g * y).sinh() + q * (g * y).cosh()) * g / chu;
                let j = Complex64::new(0.0, -omega_sigma) * a;
                let fx = -0.5 * (j * (Complex64::new(0.0, k) * a).conj()).re;
                let fy = 0.5 * (j * da.conj()).re;
                (fx, fy)
            };
            let n = 2000;
            let (mut fx, mut fy) = (0.0, 0.0);
            for i in 0..=n {
                let y = -u + 2.0 * u * f64::from(i) / f64::from(n);
                let w = if i == 0 || i == n {
                    1.0
                } else if i % 2 == 1 {
                    4.0
                } else {
                    2.0
                };
                let (a, b) = field(y);
                fx += w * a;
                fy += w * b;
            }
            let step = 2.0 * u / f64::from(n) / 3.0;
            let (fx, fy) = (fx * step, fy * step);
            assert!((fx / h.drag_per_area_pa(v) - 1.0).abs() < 1e-9, "v={v}");
            assert!((fy / h.lateral_per_area_pa(v) - 1.0).abs() < 1e-9, "v={v}");
        }
    }

    #[test]
    fn offset_tables_match_the_model() {
        // Drag and lateral tables against the off-centre model at 4 001 speeds to 60 m/s
        // (interval ends included): ≤ 1e-9 relative (the accuracy of the centred table,
        // `physics::table`); beyond the range the model itself; even/odd in v exactly.
        let m = DragModel::new(&typical_geometry(), 1.25, 58e6).expect("valid");
        let o = OffsetModel::new(&m, 2e-3).expect("valid");
        let (drag, lateral) = (
            crate::physics::ForceTable::build_offset(&o, 60.0),
            crate::physics::LateralTable::build(&o, 60.0),
        );
        assert_eq!(drag.max_speed_m_s(), 60.0);
        assert_eq!(lateral.max_speed_m_s(), 60.0);
        for i in 0..=4000 {
            let v = 60.0 * f64::from(i) / 4000.0 * (1.0 - 1e-12);
            let (d, l) = (o.drag_per_area_pa(v), o.lateral_per_area_pa(v));
            assert!(
                (drag.force_per_area_pa(v) - d).abs() <= 1e-9 * d.abs(),
                "v={v}"
            );
            assert!(
                (lateral.lateral_per_area_pa(v) - l).abs() <= 1e-9 * l.abs(),
                "v={v}"
            );
        }
        assert!(lateral.lateral_per_area_pa(0.0) == 0.0);
        assert_eq!(
            lateral.lateral_per_area_pa(-7.0),
            lateral.lateral_per_area_pa(7.0)
        );
        assert_eq!(drag.force_per_area_pa(-7.0), -drag.force_per_area_pa(7.0));
        assert_eq!(drag.force_per_area_pa(80.0), o.drag_per_area_pa(80.0));
        assert_eq!(
            lateral.lateral_per_area_pa(80.0),
            o.lateral_per_area_pa(80.0)
        );
        // Low-speed limits: the closed forms the tables hold at rest, against the model at
        // 1e-4 m/s (next term O(v²): 1e-6).
        let v = 1e-4;
        let d0 = o.drag_per_area_pa(v) / v;
        assert!((d0 / o.low_speed_drag_pa_s_m() - 1.0).abs() < 1e-6);
        let l0 = o.lateral_per_area_pa(v) / (v * v);
        assert!((l0 / o.low_speed_lateral_pa_s2_m2() - 1.0).abs() < 1e-5);
    }

    #[test]
    fn offset_must_stay_inside_the_clearance() {
        let g = typical_geometry();
        assert!(OffsetHarmonic::new(&g, 1.25, 58e6, 1, 0.005).is_err());
        assert!(OffsetHarmonic::new(&g, 1.25, 58e6, 1, -0.006).is_err());
        assert!(OffsetHarmonic::new(&g, 1.25, 58e6, 1, f64::NAN).is_err());
        // Low-speed bracket negative over the admissible range 0 < 2ku < 2ka.
        for i in 1..200 {
            let ka = 0.5 + f64::from(i) * 0.02;
            for j in 1..100 {
                let x = 2.0 * ka * f64::from(j) / 100.0;
                let b = x * (ka - x).cosh() / ka.cosh() - x.sinh();
                assert!(b < 0.0, "ka={ka} x={x}");
            }
        }
    }
}
