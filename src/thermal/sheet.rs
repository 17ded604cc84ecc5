//! Where across its height a fin takes up the heat: the loss density of the thin-sheet
//! eddy-current solution.
//!
//! Russell & Norsworthy ("Eddy currents and wall losses in screened-rotor induction motors",
//! Proc. IEE 105A, 1958) solve the stream function of a thin sheet |z| < b under a pole field
//! |z| < a (overhang o = b − a each side) at low speed, neglecting the field of the eddy currents:
//! ψ'' − k²ψ = S inside the poles, 0 beyond, ψ(±b) = 0, with k = π/τ the wavenumber of the
//! fundamental. The solution is ψ = S/k²·(A·cosh kz − 1) under the poles and
//! ψ = S/k²·B·sinh k(b − |z|) beyond, A = 1/(cosh ka + sinh ka·tanh ko),
//! B = −A·sinh ka / cosh ko. The current J = (−∂zψ, ∂xψ) dissipates, averaged along the track,
//! p(z) ∝ ψ'² + k²ψ²:
//!
//! ```text
//! p(z) = k²·(A²·cosh 2kz − 2A·cosh kz + 1)   (|z| < a),   k²·B²·cosh 2k(b − |z|)   (beyond).
//! ```
//!
//! Its integral over the height divided by that of an infinitely tall sheet, 2a·k², is the
//! Russell–Norsworthy factor K (checked in the tests against
//! [`crate::physics::edge::russell_norsworthy`]). On the tower demo (τ = 60 mm, fin 230 mm, poles
//! 200 mm) it puts 1.28× the mean over the fin's height at mid-height (1.12× the mean over the
//! active height) and 5.2 % of the loss in the overhangs. Used at every speed (the reaction field
//! of the eddy currents, neglected here, spreads the loss towards the edges at high speed).

/// Normalised loss density across the height of a fin (per metre, integrating to 1 over the
/// fin's height), z from the fin's mid-height.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SheetLoss {
    k: f64,
    a: f64,
    b: f64,
    amp_in: f64,
    amp_out: f64,
    norm: f64,
}

impl SheetLoss {
    /// The loss across a fin of `fin_height_m` under poles of `pole_height_m` at pole pitch
    /// `pole_pitch_m` (the band is centred on the fin, the overhang the same on both sides).
    /// None when an input is not positive and finite.
    pub fn new(pole_pitch_m: f64, fin_height_m: f64, pole_height_m: f64) -> Option<Self> {
        let ok = |x: f64| x.is_finite() && x > 0.0;
        if !(ok(pole_pitch_m) && ok(fin_height_m) && ok(pole_height_m)) {
            return None;
        }
        let k = std::f64::consts::PI / pole_pitch_m;
        let b = 0.5 * fin_height_m;
        let a = 0.5 * fin_height_m.min(pole_height_m);
        let o = b - a;
        let amp_in = 1.0 / ((k * a).cosh() + (k * a).sinh() * (k * o).tanh());
        let amp_out = -amp_in * (k * a).sinh() / (k * o).cosh();
        // Closed-form integral over 0 ≤ z ≤ b (doubled for both halves).
        let inside = k
            * k
            * (amp_in * amp_in * (2.0 * k * a).sinh() / (2.0 * k)
                - 2.0 * amp_in * (k * a).sinh() / k
                + a);
        let outside = k * k * amp_out * amp_out * (2.0 * k * o).sinh() / (2.0 * k);
        let norm = 2.0 * (inside + outside);
        (norm.is_finite() && norm > 0.0).then_some(Self {
            k,
            a,
            b,
            amp_in,
            amp_out,
            norm,
        })
    }

    /// Total loss relative to an infinitely tall sheet over the active height (the
    /// Russell–Norsworthy factor K).
    pub fn edge_factor(&self) -> f64 {
        self.norm / (2.0 * self.a * self.k * self.k)
    }

    /// Loss density at height `z_m` from mid-height, 1/m (0 outside the fin).
    pub fn density_per_m(&self, z_m: f64) -> f64 {
        let z = z_m.abs();
        let k = self.k;
        let raw = if z > self.b {
            0.0
        } else if z < self.a {
            k * k
                * (self.amp_in * self.amp_in * (2.0 * k * z).cosh()
                    - 2.0 * self.amp_in * (k * z).cosh()
                    + 1.0)
        } else {
            k * k * self.amp_out * self.amp_out * (2.0 * k * (self.b - z)).cosh()
        };
        raw / self.norm
    }

    /// The largest density over the height, 1/m (on a 1000-point grid and at the band's edge).
    pub fn peak_per_m(&self) -> f64 {
        (0..=1000)
            .map(|i| self.density_per_m(self.b * f64::from(i) / 1000.0))
            .chain([self.density_per_m(self.a * (1.0 - 1e-12))])
            .fold(0.0, f64::max)
    }

    /// The density as a function of the position from the fin's lower edge, z ∈ [0, 2b].
    pub fn from_edge(&self) -> impl Fn(f64) -> f64 + '_ {
        move |z| self.density_per_m(z - self.b)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Independent: the same boundary-value problem by second-order finite differences on 4000
    /// nodes (tridiagonal, Thomas algorithm), the loss from centred differences.
    fn fd_density(tau: f64, h: f64, hp: f64, z_probe: &[f64]) -> Vec<f64> {
        let n = 4000;
        let (k, b, a) = (std::f64::consts::PI / tau, 0.5 * h, 0.5 * h.min(hp));
        let dz = 2.0 * b / n as f64;
        let zs: Vec<f64> = (0..=n).map(|i| -b + i as f64 * dz).collect();
        // Interior unknowns 1..n-1: (ψ[i-1] − (2 + k²dz²)ψ[i] + ψ[i+1]) = dz²·S(z).
        let m = n - 1;
        let diag = -(2.0 + k * k * dz * dz);
        let mut c = vec![0.0; m];
        let mut d: Vec<f64> = (1..n)
            .map(|i| {
                if zs[i].abs() < a {
                    dz * dz * k * k
                } else {
                    0.0
                }
            })
            .collect();
        c[0] = 1.0 / diag;
        d[0] /= diag;
        for i in 1..m {
            let den = diag - c[i - 1];
            c[i] = 1.0 / den;
            d[i] = (d[i] - d[i - 1]) / den;
        }
        let mut psi = vec![0.0; n + 1];
        for i in (0..m).rev() {
            psi[i + 1] = d[i] - if i + 1 < m { c[i] * psi[i + 2] } else { 0.0 };
        }
        let p: Vec<f64> = (0..=n)
            .map(|i| {
                let (l, r) = (i.saturating_sub(1), (i + 1).min(n));
                let g = (psi[r] - psi[l]) / ((r - l) as f64 * dz);
                g * g + k * k * psi[i] * psi[i]
            })
            .collect();
        let total: f64 = p.windows(2).map(|w| 0.5 * (w[0] + w[1]) * dz).sum();
        z_probe
            .iter()
            .map(|z| p[((z + b) / dz).round() as usize] / total)
            .collect()
    }

    #[test]
    fn matches_finite_differences_and_russell_norsworthy() {
        for (tau, h, hp) in [(0.06, 0.23, 0.2), (0.05, 0.18, 0.15), (0.1, 0.2, 0.25)] {
            let s = SheetLoss::new(tau, h, hp).unwrap();
            // Published factor K (Russell & Norsworthy 1958) to 1e-12.
            let (k, a) = (std::f64::consts::PI / tau, 0.5 * h.min(hp));
            let rn = crate::physics::edge::russell_norsworthy(k, a, (0.5 * (h - hp)).max(0.0));
            assert!(
                (s.edge_factor() - rn).abs() < 1e-12,
                "{} vs {rn}",
                s.edge_factor()
            );
            // Finite differences: 1e-3 relative at probes away from the band's edge.
            let b = 0.5 * h;
            let beyond = if b > a { 0.5 * (a + b) } else { 0.9 * a };
            let probes = [0.0, 0.3 * a, 0.8 * a, beyond];
            let fd = fd_density(tau, h, hp, &probes);
            for (z, want) in probes.iter().zip(&fd) {
                let got = s.density_per_m(*z);
                assert!((got / want - 1.0).abs() < 1e-3, "z {z}: {got} vs {want}");
            }
        }
        // Tower demo: mid-height 1.28× the mean over the fin, 5.2 % in the overhangs.
        let s = SheetLoss::new(0.06, 0.23, 0.2).unwrap();
        assert!((s.density_per_m(0.0) * 0.23 - 1.283).abs() < 1e-3);
        let over: f64 = (0..1000)
            .map(|i| s.density_per_m(0.1 + 0.015 * (i as f64 + 0.5) / 1000.0) * 0.015 / 1000.0)
            .sum();
        assert!((2.0 * over - 0.0516).abs() < 5e-4, "{}", 2.0 * over);
    }
}
