//! Layer theory of the fin: drag force per unit area from the magnetic diffusion equation.
//!
//! # Derivation (done here; checked against an independent finite-difference solution in
//! `tests/reference_physics.rs`)
//!
//! Coordinates: x along the track, y across the gap (fin mid-plane y = 0, iron at y = ±a), z along
//! the fin height. In 2-D the field is described by the z-component A of the vector potential,
//! B_x = ∂A/∂y, B_y = −∂A/∂x. For one harmonic write A = Re[Â(y)·e^{j(ωt − kx)}] in the frame of
//! the fin, where the magnet field travels at the fin speed v, so ω = k·v. Ampère's law with
//! H = B/μ0 − M (magnets of recoil permeability 1) and Ohm's law J = σE = −σ∂A/∂t give
//!
//! ```text
//! Â'' − γ²Â = j·k·μ0·M̂_y ,   γ² = k² + j·ω·μ0·σ(y)
//! ```
//!
//! with μ0·M̂_y = B_rn inside the magnets and 0 elsewhere, σ = σ_e in the fin and 0 elsewhere.
//! Both rows are magnetised the same way across the gap, so Â is even in y. Conditions: Â and Â'
//! continuous at every interface (μ = μ0 and M_x = 0 everywhere outside the iron), Â' = 0 on the
//! iron (μr → ∞, tangential H = 0). In the fin Â = P·cosh(γy); outside it, the no-load solution
//! plus D·cosh(k(a − y)). Matching at the fin face y = u gives
//!
//! ```text
//! P = −j·B_rn·sinh(k h_m) / ( cosh(kL)·γ·sinh(γu) + k·sinh(kL)·cosh(γu) ),   L = a − u,
//! ```
//!
//! which reduces to the no-load potential for σ = 0 (γ = k). The eddy current density is
//! Ĵ = −jωσ_e·Â, and the time-averaged loss per unit fin area (in plan), integrated over the whole
//! fin thickness −u < y < u with |cosh(γy)|² = (cosh 2αy + cos 2βy)/2, γ = α + jβ, is
//!
//! ```text
//! p = (ω²σ_e/2)·|P|²·[ sinh(2αu)/(2α) + sin(2βu)/(2β) ] .
//! ```
//!
//! The drag per unit area is f = p/v (the power the brake takes from the vehicle is all dissipated
//! in the fin):
//!
//! ```text
//! f_n = k²·v·σ_e·|P|²·½·[ sinh(2αu)/(2α) + sin(2βu)/(2β) ]
//! ```
//!
//! — the expression of the project brief, confirmed, with the brief's `P = +j…` differing only in
//! sign (which drops out of |P|²). It is the force on the *whole* fin (both faces together) per
//! square metre of fin area in plan, i.e. per square metre of the pole face of one row. Harmonics
//! are orthogonal over a pole pair, so the total is the sum of the f_n. The force of one fin in one
//! section is f · active height · overlap length.
//!
//! Checks of the closed form (all derived here from the expression above and used as tests):
//! low speed, f/v → σ_e·B_0n²·½·[d/2 + sinh(k d)/(2k)]; thin fin, f → ½σ_e d v B_0n²/(1 + G²) with
//! G = μ0σ_e d v / (2 tanh(k a)) (Laithwaite's goodness factor form; relative error O(k·u));
//! high speed, f → (B_0n²/μ0)(kδ/2)·sinh²(ka)/cosh²(kL) with δ = √(2/(μ0σ_e k v)).
//!
//! # Numerics
//!
//! Every harmonic's constants (k², k·μ0·σ_e, k·tanh(kL), k²σ_e·B_rn²·(sinh(k h_m)/cosh(kL))²) are
//! computed once in [`DragModel::new`]; an evaluation does one complex square root and one real
//! `sinh`/`cosh`/`sin_cos` per harmonic and allocates nothing. For αu ≥ 20 the hyperbolic
//! functions are factored out analytically (relative change < 1e-16), so no input overflows.
//!
//! The harmonic set is fixed when the model is built, not per speed, so that the force is a
//! smooth, exactly odd function of speed and the σ·v rescaling stays exact: odd harmonic n ≤ 31
//! is kept when, somewhere on a log-spaced scan from 10⁻⁴ to 10⁸ times the thin-sheet critical
//! speed, it adds at least 1e-6/16 of the fundamental, so that the at most 15 omitted terms
//! together stay below 1e-6 of the sum (the brief's "stop when a term adds < 1e-6" rule, made
//! speed-independent).
//!
//! # Finite height
//!
//! σ_e above is the conductivity the layer sees. With the default [`EdgeModel::FiniteHeight`]
//! it is the bulk σ, and each harmonic's force is multiplied by the finite-height factor
//! F_n(σv) of [`super::edge`] (Russell–Norsworthy K_n at low speed, the full thin-sheet solution
//! of the finite fin at speed): f_n = F_n(σv)·f_n,layer(σ). With
//! [`EdgeModel::RussellNorsworthyConductivity`] σ_e = K_n·σ at every speed and F_n = 1 (the model
//! before the finite-height factor, kept for comparison). Either way the force depends on σ and
//! v only through σ·v, and on Br as Br².

use super::edge::{russell_norsworthy, EdgeModel, FiniteHeightEdge};
use super::field::{gap_centre_amplitude_t, sinh_cosh_ratio, source_amplitude_t, wavenumber_per_m};
use super::{positive, BrakeGeometry, PhysicsError};
use crate::constants::MU0_H_M;
use crate::numeric::join;
use num_complex::Complex64;

/// Highest harmonic order considered in the sum (odd orders 1, 3, …, 31).
pub const HIGHEST_HARMONIC: u32 = 31;

/// A harmonic is kept if it adds at least this fraction of the fundamental at some speed.
const TERM_THRESHOLD: f64 = 1e-6 / 16.0;

/// Classical skin depth δ = √(2/(ω μ0 σ)) in metres of a non-magnetic conductor (μr = 1) of
/// conductivity `conductivity_s_m` (S/m) at angular frequency `angular_frequency_rad_s` (rad/s);
/// the sign of ω is ignored and ω = 0 gives infinity.
pub fn skin_depth_m(angular_frequency_rad_s: f64, conductivity_s_m: f64) -> f64 {
    (2.0 / (angular_frequency_rad_s.abs() * MU0_H_M * conductivity_s_m)).sqrt()
}

/// Principal square root of `re + j·im` for `re > 0`, `im ≥ 0` (the γ of the diffusion
/// equation): with r = |z|, √z = √((r + re)/2) + j·im/(2√((r + re)/2)); no cancellation since
/// re > 0 (e.g. Press et al., *Numerical Recipes*, 3rd ed., 2007, §5.5).
#[inline]
pub(crate) fn sqrt_right_half_plane(re: f64, im: f64) -> Complex64 {
    let r = re.hypot(im);
    let s = (0.5 * (r + re)).sqrt();
    Complex64::new(s, 0.5 * im / s)
}

/// One harmonic of the layer model: descriptive values (public) and the constants an
/// evaluation needs (private).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HarmonicTerm {
    /// Harmonic order n (odd).
    pub order: u32,
    /// Wavenumber k_n = nπ/τ, 1/m.
    pub wavenumber_per_m: f64,
    /// Source amplitude B_rn of the magnetisation square wave, T (signed).
    pub source_amplitude_t: f64,
    /// No-load flux density B_0n across the gap at its centre, T (signed).
    pub gap_field_t: f64,
    /// Russell–Norsworthy edge factor K_n, dimensionless (the low-speed finite-height factor).
    pub edge_factor: f64,
    /// Conductivity σ_e the layer solution uses for this harmonic, S/m: the bulk σ with
    /// [`EdgeModel::FiniteHeight`], K_n·σ with [`EdgeModel::RussellNorsworthyConductivity`].
    pub effective_conductivity_s_m: f64,
    /// k², 1/m².
    k_sq: f64,
    /// Imaginary part of γ² per unit speed, k·μ0·σ_e, 1/(m²·(m/s)).
    diffusion_per_speed: f64,
    /// k·tanh(kL), 1/m.
    k_tanh_l: f64,
    /// k²·σ_e·B_rn²·(sinh(k h_m)/cosh(kL))², in Pa·s/m per (1/m) — see `force_over_speed`.
    amplitude: f64,
    /// Half fin thickness u, m.
    half_thickness_m: f64,
}

impl HarmonicTerm {
    /// Builds harmonic `order` for a validated geometry, remanence (T) and conductivity (S/m).
    fn new(
        geometry: &BrakeGeometry,
        remanence_t: f64,
        conductivity_s_m: f64,
        order: u32,
        edge_model: EdgeModel,
    ) -> Self {
        let k = wavenumber_per_m(geometry.pole_pitch_m, order);
        let u = geometry.half_fin_thickness_m();
        let l = geometry.fin_face_to_iron_m();
        let a = geometry.centre_to_iron_m();
        let h_m = geometry.magnet_thickness_m;
        let b_rn = source_amplitude_t(remanence_t, geometry.magnet_fill, order);
        let edge_factor =
            russell_norsworthy(k, 0.5 * geometry.active_height_m(), geometry.overhang_m());
        let sigma_e = match edge_model {
            EdgeModel::FiniteHeight => conductivity_s_m,
            EdgeModel::RussellNorsworthyConductivity => edge_factor * conductivity_s_m,
        };
        let r = sinh_cosh_ratio(k * h_m, k * l);
        HarmonicTerm {
            order,
            wavenumber_per_m: k,
            source_amplitude_t: b_rn,
            gap_field_t: gap_centre_amplitude_t(b_rn, k, h_m, a),
            edge_factor,
            effective_conductivity_s_m: sigma_e,
            k_sq: k * k,
            diffusion_per_speed: k * MU0_H_M * sigma_e,
            k_tanh_l: k * (k * l).tanh(),
            amplitude: k * k * sigma_e * (b_rn * r) * (b_rn * r),
            half_thickness_m: u,
        }
    }

    /// All stored numbers are finite.
    fn is_finite(&self) -> bool {
        [
            self.wavenumber_per_m,
            self.source_amplitude_t,
            self.gap_field_t,
            self.edge_factor,
            self.effective_conductivity_s_m,
            self.k_sq,
            self.diffusion_per_speed,
            self.k_tanh_l,
            self.amplitude,
        ]
        .iter()
        .all(|x| x.is_finite())
    }

    /// f_n / v in Pa·s/m at speed `speed_m_s` ≥ 0 (even in v; finite at v = 0).
    #[inline]
    fn force_over_speed(&self, speed_m_s: f64) -> f64 {
        let u = self.half_thickness_m;
        let im = speed_m_s * self.diffusion_per_speed;
        if im == f64::INFINITY {
            return 0.0; // the limit v → ∞ of f/v
        }
        let gamma = sqrt_right_half_plane(self.k_sq, im);
        let au = gamma.re * u;
        let bu = gamma.im * u;
        if au < 20.0 {
            let (sb, cb) = bu.sin_cos();
            // sinh and cosh of αu from one expm1 (accurate for small αu).
            let em = au.exp_m1();
            let e = em + 1.0;
            let sha = 0.5 * em * (1.0 + 1.0 / e);
            let cha = 0.5 * (e + 1.0 / e);
            let sinh_s = Complex64::new(sha * cb, cha * sb);
            let cosh_s = Complex64::new(cha * cb, sha * sb);
            let d = gamma * sinh_s + cosh_s * self.k_tanh_l;
            // ½·[sinh(2αu)/(2α) + sin(2βu)/(2β)] = ½·u·[sinh(2αu)/(2αu) + sin(2βu)/(2βu)],
            // with sinh 2x = 2 sinh x cosh x and sin 2x = 2 sin x cos x.
            let sinhc = if au < 1e-4 {
                1.0 + (2.0 * au) * (2.0 * au) / 6.0
            } else {
                sha * cha / au
            };
            let sinc = if bu < 1e-4 {
                1.0 - (2.0 * bu) * (2.0 * bu) / 6.0
            } else {
                sb * cb / bu
            };
            let bracket = 0.5 * u * (sinhc + sinc);
            self.amplitude * bracket / d.norm_sqr()
        } else {
            // Divide numerator and denominator by e^{2αu}: the remaining terms carry e^{−2αu}
            // < 5e-18 and are dropped.
            let d = gamma + self.k_tanh_l;
            self.amplitude / (2.0 * gamma.re * d.norm_sqr())
        }
    }

    /// The layer force f_n of this harmonic alone in Pa at `speed_m_s` (m/s, odd in v), without
    /// any finite-height factor: the force of a tall fin with the conductivity σ_e of this term.
    pub fn layer_force_per_area_pa(&self, speed_m_s: f64) -> f64 {
        self.force(speed_m_s)
    }

    /// f_n in Pa at signed speed (odd in v).
    #[inline]
    fn force(&self, speed_m_s: f64) -> f64 {
        if speed_m_s.is_infinite() {
            return 0.0;
        }
        speed_m_s * self.force_over_speed(speed_m_s.abs())
    }
}

/// The drag model of one brake section: geometry, magnet remanence and fin conductivity, with all
/// harmonic constants, the finite-height factors, the critical speed and the low-speed
/// coefficient precomputed.
#[derive(Clone, Debug)]
pub struct DragModel {
    geometry: BrakeGeometry,
    remanence_t: f64,
    conductivity_s_m: f64,
    edge_model: EdgeModel,
    terms: Vec<HarmonicTerm>,
    /// Finite-height factor of each term (same order as `terms`); empty for
    /// [`EdgeModel::RussellNorsworthyConductivity`].
    edges: Vec<FiniteHeightEdge>,
    critical_speed_m_s: f64,
    peak_force_per_area_pa: f64,
    low_speed_coefficient_pa_s_m: f64,
}

/// Orders whose finite-height factors are built before the harmonic selection is known: the
/// fundamental is always kept and the third harmonic nearly always, and these two are the
/// costliest factors (the most modes and lamina pairs, [`super::edge::EdgeResolution::for_harmonic`]).
const EARLY_EDGE_ORDERS: [u32; 2] = [1, 3];

/// The kept harmonics (`select`) with their finite-height factors (same order), with the factors
/// of [`EARLY_EDGE_ORDERS`] built side by side with the selection ([`join`]) and the other kept
/// orders' after it; a factor depends only on the geometry and its order, so each is the one
/// built alone. An early factor whose order is not kept is dropped (its error too).
fn edge_factors_beside<S>(
    geometry: &BrakeGeometry,
    select: S,
) -> Result<(Vec<HarmonicTerm>, Vec<FiniteHeightEdge>), PhysicsError>
where
    S: FnOnce() -> Vec<HarmonicTerm> + Send,
{
    let g = *geometry;
    let ((terms, mut late), mut early) = join(
        || {
            let terms = select();
            let late: Vec<_> = terms
                .iter()
                .filter(|t| !EARLY_EDGE_ORDERS.contains(&t.order))
                .map(|t| FiniteHeightEdge::new(&g, t.order))
                .collect();
            (terms, late.into_iter())
        },
        move || EARLY_EDGE_ORDERS.map(|order| Some(FiniteHeightEdge::new(&g, order))),
    );
    let edges = terms
        .iter()
        .map(
            |t| match EARLY_EDGE_ORDERS.iter().position(|&o| o == t.order) {
                Some(i) => early[i].take(),
                None => late.next(),
            },
        )
        .map(|e| {
            e.unwrap_or(Err(PhysicsError::Degenerate {
                what: "the finite-height edge factor",
            }))
        })
        .collect::<Result<Vec<_>, _>>()?;
    Ok((terms, edges))
}

impl DragModel {
    /// Builds the model for `geometry`, magnet remanence `remanence_t` (T, > 0) and fin
    /// conductivity `conductivity_s_m` (S/m, > 0, the bulk value at the fin temperature), with
    /// the finite-height edge factor ([`EdgeModel::FiniteHeight`]).
    ///
    /// Fails on invalid geometry or values, and with [`PhysicsError::Degenerate`] when the
    /// inputs are so extreme that the model's constants are not finite or the force vanishes.
    pub fn new(
        geometry: &BrakeGeometry,
        remanence_t: f64,
        conductivity_s_m: f64,
    ) -> Result<Self, PhysicsError> {
        Self::with_edge_model(
            geometry,
            remanence_t,
            conductivity_s_m,
            EdgeModel::FiniteHeight,
        )
    }

    /// As [`DragModel::new`] with a chosen treatment of the finite height.
    pub fn with_edge_model(
        geometry: &BrakeGeometry,
        remanence_t: f64,
        conductivity_s_m: f64,
        edge_model: EdgeModel,
    ) -> Result<Self, PhysicsError> {
        geometry.validate()?;
        positive("magnet remanence", remanence_t)?;
        positive("fin conductivity", conductivity_s_m)?;

        let fundamental = HarmonicTerm::new(geometry, remanence_t, conductivity_s_m, 1, edge_model);
        if !fundamental.is_finite() {
            return Err(PhysicsError::Degenerate {
                what: "the fundamental harmonic",
            });
        }
        // Thin-sheet critical speed of the fundamental, 2·tanh(k a)/(μ0 σ_e d): the speed scale.
        let reference_speed_m_s = 2.0
            * (fundamental.wavenumber_per_m * geometry.centre_to_iron_m()).tanh()
            / (MU0_H_M * fundamental.effective_conductivity_s_m * geometry.fin_thickness_m);
        if !(reference_speed_m_s.is_finite() && reference_speed_m_s > 0.0) {
            return Err(PhysicsError::Degenerate {
                what: "the characteristic speed",
            });
        }

        // Harmonic selection on a log grid 1e-4 … 1e8 × the reference speed (16 per decade).
        // With the finite-height factor each layer term is weighed by its low-speed factor K_n
        // against the fundamental's layer term: F_n ≥ K_n and F_1 stays within a factor 1.3 of
        // 1, so the omitted terms stay near the 1e-6 target.
        let weight = |t: &HarmonicTerm| match edge_model {
            EdgeModel::FiniteHeight => t.edge_factor,
            EdgeModel::RussellNorsworthyConductivity => 1.0,
        };
        let scan: Vec<f64> = (-64..=128)
            .map(|i| reference_speed_m_s * 10f64.powf(f64::from(i) / 16.0))
            .collect();
        let base: Vec<f64> = scan
            .iter()
            .map(|&v| fundamental.force_over_speed(v) * weight(&fundamental))
            .collect();
        let select = || {
            let mut terms = vec![fundamental];
            for order in (3..=HIGHEST_HARMONIC).step_by(2) {
                let term =
                    HarmonicTerm::new(geometry, remanence_t, conductivity_s_m, order, edge_model);
                if !term.is_finite() {
                    continue;
                }
                let keep = scan
                    .iter()
                    .zip(&base)
                    .any(|(&v, &b)| term.force_over_speed(v) * weight(&term) >= TERM_THRESHOLD * b);
                if keep {
                    terms.push(term);
                }
            }
            terms
        };
        let (terms, edges) = match edge_model {
            EdgeModel::FiniteHeight => edge_factors_beside(geometry, select)?,
            EdgeModel::RussellNorsworthyConductivity => (select(), Vec::new()),
        };

        let mut model = DragModel {
            geometry: *geometry,
            remanence_t,
            conductivity_s_m,
            edge_model,
            terms,
            edges,
            critical_speed_m_s: 0.0,
            peak_force_per_area_pa: 0.0,
            low_speed_coefficient_pa_s_m: 0.0,
        };
        model.low_speed_coefficient_pa_s_m = (0..model.terms.len())
            .map(|i| model.term_force_over_speed(i, 0.0))
            .sum();
        let critical = model.search_critical_speed(reference_speed_m_s);
        let peak = model.force_per_area_pa(critical);
        if !(critical.is_finite()
            && critical > 0.0
            && peak.is_finite()
            && peak > 0.0
            && model.low_speed_coefficient_pa_s_m.is_finite())
        {
            return Err(PhysicsError::Degenerate {
                what: "the peak drag force",
            });
        }
        model.critical_speed_m_s = critical;
        model.peak_force_per_area_pa = peak;
        Ok(model)
    }

    /// f_n/v of kept term `index` at speed `speed_abs_m_s` ≥ 0, edge factor included, Pa·s/m.
    #[inline]
    fn term_force_over_speed(&self, index: usize, speed_abs_m_s: f64) -> f64 {
        let layer = self.terms[index].force_over_speed(speed_abs_m_s);
        match self.edges.get(index) {
            Some(edge) => layer * edge.factor(self.conductivity_s_m * speed_abs_m_s),
            None => layer,
        }
    }

    /// f_n/v of kept harmonic `index` (in the order of [`DragModel::harmonics`]) at speed
    /// `speed_abs_m_s` ≥ 0, finite-height factor included, Pa·s/m: the terms whose sum is
    /// `force_per_area_pa(v)/v`; NaN for an index beyond the kept harmonics.
    pub(crate) fn harmonic_force_over_speed(&self, index: usize, speed_abs_m_s: f64) -> f64 {
        if index < self.terms.len() {
            self.term_force_over_speed(index, speed_abs_m_s)
        } else {
            f64::NAN
        }
    }

    /// Speed of the maximum of the harmonic sum: a scan at 16 points per decade over
    /// 10⁻²…10² × `reference_speed_m_s` (widened by 4 decades at a time, up to 10⁻¹⁸…10¹⁸, if the
    /// maximum lies at an end), then a
    /// golden-section search in ln v on the bracketing interval (Kiefer, "Sequential minimax search
    /// for a maximum", Proc. AMS 4, 1953) down to 1e-10 in ln v.
    fn search_critical_speed(&self, reference_speed_m_s: f64) -> f64 {
        let ln_ref = reference_speed_m_s.ln();
        let step = std::f64::consts::LN_10 / 16.0;
        let (mut lo_i, mut hi_i) = (-32_i32, 32_i32);
        let mut best_i = 0;
        for _ in 0..5 {
            let mut best = f64::NEG_INFINITY;
            for i in lo_i..=hi_i {
                let f = self.force_per_area_pa((ln_ref + f64::from(i) * step).exp());
                if f > best {
                    best = f;
                    best_i = i;
                }
            }
            if best_i == lo_i {
                lo_i -= 64;
            } else if best_i == hi_i {
                hi_i += 64;
            } else {
                break;
            }
        }
        let objective = |ln_v: f64| self.force_per_area_pa(ln_v.exp());
        let mut a = ln_ref + f64::from(best_i - 1) * step;
        let mut b = ln_ref + f64::from(best_i + 1) * step;
        let ratio = 0.5 * (5f64.sqrt() - 1.0);
        let mut c = b - ratio * (b - a);
        let mut d = a + ratio * (b - a);
        let (mut fc, mut fd) = (objective(c), objective(d));
        while b - a > 1e-10 {
            if fc >= fd {
                b = d;
                d = c;
                fd = fc;
                c = b - ratio * (b - a);
                fc = objective(c);
            } else {
                a = c;
                c = d;
                fc = fd;
                d = a + ratio * (b - a);
                fd = objective(d);
            }
        }
        (0.5 * (a + b)).exp()
    }

    /// Drag force per unit area in Pa (N per m² of fin area in plan between the rows, both fin
    /// faces together) at fin speed `speed_m_s` (m/s) relative to the magnets: the harmonic sum.
    /// Odd in speed (the force opposes the motion when multiplied by −sign(v) by the caller),
    /// zero at rest, → 0 as |v| → ∞; NaN gives NaN.
    pub fn force_per_area_pa(&self, speed_m_s: f64) -> f64 {
        if speed_m_s.is_infinite() {
            return 0.0;
        }
        let x = speed_m_s.abs();
        let sum: f64 = (0..self.terms.len())
            .map(|i| self.term_force_over_speed(i, x))
            .sum();
        speed_m_s * sum
    }

    /// Drag force per unit area in Pa of the fundamental harmonic alone, at `speed_m_s` (m/s).
    pub fn force_per_area_fundamental_pa(&self, speed_m_s: f64) -> f64 {
        if self.terms.is_empty() || speed_m_s.is_infinite() {
            return 0.0;
        }
        speed_m_s * self.term_force_over_speed(0, speed_m_s.abs())
    }

    /// Drag force per unit area in Pa of harmonic `order` alone (odd, whether or not it is kept
    /// in the sum), at `speed_m_s` (m/s); 0 for even orders. A harmonic that is not kept gets its
    /// finite-height factor built on the spot (NaN if that fails).
    pub fn force_per_area_harmonic_pa(&self, order: u32, speed_m_s: f64) -> f64 {
        if order.is_multiple_of(2) {
            return 0.0;
        }
        if let Some(i) = self.terms.iter().position(|t| t.order == order) {
            if speed_m_s.is_infinite() {
                return 0.0;
            }
            return speed_m_s * self.term_force_over_speed(i, speed_m_s.abs());
        }
        let term = HarmonicTerm::new(
            &self.geometry,
            self.remanence_t,
            self.conductivity_s_m,
            order,
            self.edge_model,
        );
        let factor = match self.edge_model {
            EdgeModel::FiniteHeight => FiniteHeightEdge::new(&self.geometry, order)
                .map_or(f64::NAN, |e| e.factor(self.conductivity_s_m * speed_m_s)),
            EdgeModel::RussellNorsworthyConductivity => 1.0,
        };
        term.force(speed_m_s) * factor
    }

    /// Drag force per unit area in Pa at `speed_m_s` (m/s) of the same section with an infinitely
    /// tall fin and poles (no edge effect): the layer sum with the bulk conductivity over the
    /// kept harmonics. The reference of [`DragModel::edge_factor_at`].
    pub fn force_per_area_tall_fin_pa(&self, speed_m_s: f64) -> f64 {
        self.terms
            .iter()
            .map(|t| {
                HarmonicTerm::new(
                    &self.geometry,
                    self.remanence_t,
                    self.conductivity_s_m,
                    t.order,
                    EdgeModel::FiniteHeight,
                )
                .force(speed_m_s)
            })
            .sum()
    }

    /// The edge factor of the whole force at `speed_m_s` (m/s): force per area over the force
    /// per area of the same section with a tall fin ([`DragModel::force_per_area_tall_fin_pa`]),
    /// dimensionless. At rest it is the low-speed limit (the K_n weighted by the harmonics'
    /// low-speed coefficients).
    pub fn edge_factor_at(&self, speed_m_s: f64) -> f64 {
        let v = if speed_m_s == 0.0 {
            1e-9 * self.critical_speed_m_s
        } else {
            speed_m_s
        };
        self.force_per_area_pa(v) / self.force_per_area_tall_fin_pa(v)
    }

    /// The finite-height factor of harmonic `order` if it is kept and the model uses
    /// [`EdgeModel::FiniteHeight`].
    pub fn finite_height_edge(&self, order: u32) -> Option<&FiniteHeightEdge> {
        self.terms
            .iter()
            .position(|t| t.order == order)
            .and_then(|i| self.edges.get(i))
    }

    /// The treatment of the finite height this model uses.
    pub fn edge_model(&self) -> EdgeModel {
        self.edge_model
    }

    /// Drag force per metre of overlap length in N/m at `speed_m_s` (m/s): force per area × active
    /// height. Comparable to a [`super::MeasuredCurve`].
    pub fn force_per_length_n_m(&self, speed_m_s: f64) -> f64 {
        self.force_per_area_pa(speed_m_s) * self.geometry.active_height_m()
    }

    /// Drag force in N on one fin in one section at `speed_m_s` (m/s) with `overlap_length_m` (m)
    /// of fin between the magnet rows: force per area × active height × overlap length.
    pub fn force_on_fin_n(&self, speed_m_s: f64, overlap_length_m: f64) -> f64 {
        self.force_per_length_n_m(speed_m_s) * overlap_length_m
    }

    /// The harmonics kept in the sum, fundamental first.
    pub fn harmonics(&self) -> &[HarmonicTerm] {
        &self.terms
    }

    /// Russell–Norsworthy edge factor of the fundamental, K_1, dimensionless: the low-speed edge
    /// factor (see [`DragModel::edge_factor_at`] for the factor at speed).
    pub fn edge_factor(&self) -> f64 {
        self.terms.first().map_or(0.0, |t| t.edge_factor)
    }

    /// No-load flux density of the fundamental across the gap at its centre, B_01, in T (≥ 0 for
    /// positive remanence).
    pub fn gap_field_t(&self) -> f64 {
        self.terms.first().map_or(0.0, |t| t.gap_field_t)
    }

    /// Critical speed in m/s: the speed of maximum drag of the harmonic sum (to ~1e-10 relative).
    pub fn critical_speed_m_s(&self) -> f64 {
        self.critical_speed_m_s
    }

    /// The maximum drag force per unit area in Pa, at the critical speed.
    pub fn peak_force_per_area_pa(&self) -> f64 {
        self.peak_force_per_area_pa
    }

    /// Low-speed coefficient lim_{v→0} f/v of the harmonic sum, in Pa·s/m:
    /// Σ K_n·σ·B_0n²·½·[d/2 + sinh(k_n d)/(2k_n)] (either edge model).
    pub fn low_speed_coefficient_pa_s_m(&self) -> f64 {
        self.low_speed_coefficient_pa_s_m
    }

    /// Skin depth in m of the fin material at the fundamental frequency seen at `speed_m_s`:
    /// ω = k_1·|v|, bulk conductivity σ (not σ_e). Infinite at rest.
    pub fn skin_depth_at_m(&self, speed_m_s: f64) -> f64 {
        let k1 = wavenumber_per_m(self.geometry.pole_pitch_m, 1);
        skin_depth_m(k1 * speed_m_s, self.conductivity_s_m)
    }

    /// Bulk fin conductivity σ the model was built with, S/m.
    pub fn conductivity_s_m(&self) -> f64 {
        self.conductivity_s_m
    }

    /// Magnet remanence Br the model was built with, T.
    pub fn remanence_t(&self) -> f64 {
        self.remanence_t
    }

    /// The section geometry.
    pub fn geometry(&self) -> &BrakeGeometry {
        &self.geometry
    }
}

#[cfg(test)]
mod tests {
    use super::super::test_support::typical_geometry;
    use super::*;

    fn copper() -> DragModel {
        DragModel::new(&typical_geometry(), 1.25, 58e6).expect("valid typical model")
    }

    /// The factors built beside the harmonic selection are the ones built alone, one per kept
    /// harmonic in order, for several designs (fewer and more harmonics kept, thin and thick
    /// fins, short and long pitches).
    #[test]
    fn edge_factors_beside_the_selection_are_the_ones_built_alone() {
        for (pitch_m, thickness_m, sigma) in [
            (0.05, 0.009, 25e6),
            (0.1, 0.004, 58e6),
            (0.03, 0.012, 58e6),
            (0.2, 0.006, 20e6),
        ] {
            let mut g = typical_geometry();
            g.pole_pitch_m = pitch_m;
            g.fin_thickness_m = thickness_m;
            let model = DragModel::new(&g, 1.25, sigma).expect("valid");
            let want: Vec<FiniteHeightEdge> = model
                .terms
                .iter()
                .map(|t| FiniteHeightEdge::new(&g, t.order).expect("valid"))
                .collect();
            assert_eq!(model.edges, want, "pitch {pitch_m} m");
            assert!(model.terms.len() >= 2, "pitch {pitch_m} m");
        }
    }

    /// The closed form of the brief, written out term by term with complex sinh/cosh from
    /// num-complex, for comparison with the rearranged, overflow-safe evaluation.
    fn brief_formula(g: &BrakeGeometry, br: f64, sigma: f64, n: u32, v: f64, rn: bool) -> f64 {
        let k = wavenumber_per_m(g.pole_pitch_m, n);
        let b_rn = source_amplitude_t(br, g.magnet_fill, n);
        let ke = russell_norsworthy(k, 0.5 * g.active_height_m(), g.overhang_m());
        let se = if rn { sigma * ke } else { sigma };
        let (u, l, h) = (
            g.half_fin_thickness_m(),
            g.fin_face_to_iron_m(),
            g.magnet_thickness_m,
        );
        let gamma = Complex64::new(k * k, k * v * MU0_H_M * se).sqrt();
        let p = Complex64::new(0.0, b_rn * (k * h).sinh())
            / ((gamma * (gamma * u).sinh()) * (k * l).cosh()
                + (gamma * u).cosh() * (k * (k * l).sinh()));
        let (al, be) = (gamma.re, gamma.im);
        let bracket = (2.0 * al * u).sinh() / (2.0 * al)
            + if be == 0.0 {
                u
            } else {
                (2.0 * be * u).sin() / (2.0 * be)
            };
        k * k * v * se * p.norm_sqr() * 0.5 * bracket
    }

    #[test]
    fn rearranged_evaluation_matches_the_closed_form() {
        // Same formula, two arrangements; 1e-12 relative (rounding only). The layer terms use
        // the bulk σ with the finite-height factor and K_n·σ with the old edge model.
        let g = typical_geometry();
        for (model, rn) in [
            (copper(), false),
            (
                DragModel::with_edge_model(
                    &g,
                    1.25,
                    58e6,
                    EdgeModel::RussellNorsworthyConductivity,
                )
                .expect("valid"),
                true,
            ),
        ] {
            for &v in &[1e-3, 0.3, 3.0, 30.0, 300.0] {
                for t in model.harmonics() {
                    let direct = brief_formula(&g, 1.25, 58e6, t.order, v, rn);
                    let fast = t.force(v);
                    assert!((fast / direct - 1.0).abs() < 1e-12, "n={} v={v}", t.order);
                }
            }
        }
    }

    #[test]
    fn scaled_branch_is_continuous() {
        // Either side of αu = 20 the two arrangements agree to rounding (dropped terms < 5e-18).
        let m = copper();
        let t = m.harmonics()[0];
        let u = t.half_thickness_m;
        // speed where α u = 20: α² − β² = k², αβ = X/2 → X = 2αβ with β = √(α² − k²).
        let alpha = 20.0 / u;
        let x = 2.0 * alpha * (alpha * alpha - t.k_sq).sqrt();
        let v = x / t.diffusion_per_speed;
        let below = t.force_over_speed(v * (1.0 - 1e-9));
        let above = t.force_over_speed(v * (1.0 + 1e-9));
        assert!((below / above - 1.0).abs() < 1e-8);
    }

    #[test]
    fn typical_section_is_plausible() {
        // Brief: critical speed of a few m/s to a few tens of m/s for the typical section.
        let m = copper();
        assert!(m.critical_speed_m_s() > 1.0 && m.critical_speed_m_s() < 50.0);
        assert!(m.harmonics().len() >= 4 && m.harmonics().len() <= 16);
        assert!(m.harmonics().iter().all(|t| t.order % 2 == 1));
        assert_eq!(m.force_per_area_pa(0.0), 0.0);
        assert_eq!(m.force_per_area_pa(f64::INFINITY), 0.0);
        assert!(m.force_per_area_pa(f64::NAN).is_nan());
        assert!(m.force_per_area_pa(1e300).is_finite());
        assert_eq!(m.force_per_area_pa(f64::MAX), 0.0);
    }

    #[test]
    fn rejects_bad_values() {
        let g = typical_geometry();
        assert!(matches!(
            DragModel::new(&g, 0.0, 58e6),
            Err(PhysicsError::NotPositive {
                quantity: "magnet remanence",
                ..
            })
        ));
        assert!(matches!(
            DragModel::new(&g, 1.25, f64::INFINITY),
            Err(PhysicsError::NotFinite {
                quantity: "fin conductivity",
                ..
            })
        ));
        // Extreme but valid inputs give a model or a typed error, never a panic.
        for (pitch, clearance) in [(1e-9, 0.005), (1e3, 0.005), (0.05, 1e6), (1e-300, 1e-300)] {
            let g = BrakeGeometry {
                pole_pitch_m: pitch,
                clearance_m: clearance,
                ..g
            };
            let _ = DragModel::new(&g, 1.25, 58e6);
        }
    }

    #[test]
    fn skin_depth_formula() {
        // δ = √(2/(ωμ0σ)): copper at 50 Hz ≈ 9.3 mm (handbook tables); 0.05 mm (rounding).
        let d = skin_depth_m(2.0 * std::f64::consts::PI * 50.0, 58e6);
        assert!((d - 9.3e-3).abs() < 5e-5);
        assert!(skin_depth_m(0.0, 58e6).is_infinite());
    }
}
