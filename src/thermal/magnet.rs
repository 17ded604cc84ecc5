//! Estimate of the magnets' warming by the hot fin across the gap over a day's duty.
//!
//! While a fin passes, each magnet face sees the fin's face across the clearance: convection in
//! the gap q_c = h_g·(T_f − T_m) and radiation between two parallel grey plates
//! q_r = σ_SB·ε_e·(T_f⁴ − T_m⁴) with 1/ε_e = 1/ε_f + 1/ε_m − 1 (Incropera & DeWitt, Fundamentals
//! of Heat and Mass Transfer, 6th ed. 2007, eq. 13.24). Between dispatches the magnet face loses
//! heat to the air with film coefficient h_a. Over a periodic steady duty the heat taken in
//! during a dispatch equals what leaves over the interval (first law over one period), so with a
//! rise small beside the fin's excess the mean rise is
//!
//! ```text
//! ΔT_mean = q(T_f, T_amb)·t_exposed / (h_a·Δt_interval),
//! ```
//!
//! and no magnet can pass the temperature at which a fin held at T_f all the time would be
//! balanced by the face's loss, q(T_f, T_m) = h_a·(T_m − T_amb) (the bound). The fin is taken at
//! its steady peak and the exposure as the whole time in the zone (both conservative). The
//! magnets' own eddy losses are neglected.

/// Stefan–Boltzmann constant, W/(m²·K⁴) (CODATA 2018, exact in the SI).
pub const STEFAN_BOLTZMANN_W_M2_K4: f64 = 5.670_374_419e-8;

/// Kelvin offset of the Celsius scale.
const KELVIN: f64 = 273.15;

/// Inputs of the magnet estimate (the scenario's `duty.magnets`; defaults: common practice, not
/// measured, see [`crate::scenario::defaults::MAGNET_EXPOSURE`]).
pub use crate::scenario::MagnetExposure;

/// The estimate.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct MagnetRise {
    /// Mean rise over the duty, K.
    pub mean_k: f64,
    /// Bound: magnets facing a fin at its peak all the time, K.
    pub bound_k: f64,
}

impl MagnetExposure {
    /// Heat flux from a fin face at `fin_c` to a magnet face at `magnet_c`, W/m².
    pub fn flux_w_m2(&self, fin_c: f64, magnet_c: f64) -> f64 {
        let e = 1.0 / (1.0 / self.fin_emissivity + 1.0 / self.magnet_emissivity - 1.0);
        let (tf, tm) = (fin_c + KELVIN, magnet_c + KELVIN);
        self.gap_film_w_m2_k * (fin_c - magnet_c)
            + STEFAN_BOLTZMANN_W_M2_K4 * e * (tf.powi(4) - tm.powi(4))
    }

    /// Whether every input is usable (film coefficients ≥ 0 and h_a > 0, emissivities in (0, 1]).
    pub fn is_valid(&self) -> bool {
        let eps = |x: f64| x.is_finite() && x > 0.0 && x <= 1.0;
        self.gap_film_w_m2_k.is_finite()
            && self.gap_film_w_m2_k >= 0.0
            && self.air_film_w_m2_k.is_finite()
            && self.air_film_w_m2_k > 0.0
            && eps(self.fin_emissivity)
            && eps(self.magnet_emissivity)
    }

    /// The estimate for a fin at `fin_c` seen for `exposed_s` per dispatch every `interval_s`,
    /// air at `ambient_c` (None for unusable inputs).
    pub fn rise(
        &self,
        fin_c: f64,
        ambient_c: f64,
        exposed_s: f64,
        interval_s: f64,
    ) -> Option<MagnetRise> {
        let finite = [fin_c, ambient_c, exposed_s, interval_s]
            .iter()
            .all(|x| x.is_finite());
        if !(self.is_valid() && finite && exposed_s >= 0.0 && interval_s > 0.0) {
            return None;
        }
        if fin_c <= ambient_c {
            return Some(MagnetRise {
                mean_k: 0.0,
                bound_k: 0.0,
            });
        }
        let mean_k = self.flux_w_m2(fin_c, ambient_c) * exposed_s.min(interval_s)
            / (self.air_film_w_m2_k * interval_s);
        // Bound: bisection on g(T) = q(T_f, T) − h_a·(T − T_amb), decreasing, g(T_amb) > 0,
        // g(T_f) < 0.
        let (mut lo, mut hi) = (ambient_c, fin_c);
        for _ in 0..100 {
            let mid = 0.5 * (lo + hi);
            if self.flux_w_m2(fin_c, mid) > self.air_film_w_m2_k * (mid - ambient_c) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        Some(MagnetRise {
            mean_k: mean_k.min(fin_c - ambient_c),
            bound_k: 0.5 * (lo + hi) - ambient_c,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Independent: a lumped magnet (25 mm NdFeB, ρ·c = 7500·440 J/(m³·K), from memory) stepped
    /// explicitly through 400 dispatches of a 1.5 s exposure every 120 s; its mean rise over the
    /// last period matches the first-law estimate to 5 % (the estimate drives q with the magnet
    /// at ambient, the simulation with its actual temperature; the rise is small beside 80 K).
    #[test]
    fn mean_rise_matches_a_stepped_magnet() {
        let x = MagnetExposure::default();
        let (fin_c, amb, exp_s, int_s) = (100.0, 20.0, 1.5, 120.0);
        let est = x.rise(fin_c, amb, exp_s, int_s).unwrap();
        let cap = 7500.0 * 440.0 * 0.025;
        let dt = 0.01;
        let steps = (int_s / dt) as usize;
        let mut t = amb;
        let mut mean = 0.0;
        for cycle in 0..400 {
            for k in 0..steps {
                let q_in = if (k as f64 + 0.5) * dt < exp_s {
                    x.flux_w_m2(fin_c, t)
                } else {
                    0.0
                };
                t += dt * (q_in - x.air_film_w_m2_k * (t - amb)) / cap;
                if cycle == 399 {
                    mean += (t - amb) / steps as f64;
                }
            }
        }
        assert!(
            (mean / est.mean_k - 1.0).abs() < 0.05,
            "{mean} vs {}",
            est.mean_k
        );
        assert!(est.bound_k > 10.0 * est.mean_k && est.bound_k < fin_c - amb);
    }

    #[test]
    fn radiation_between_plates() {
        // Black plates (ε = 1), no convection: σ(T1⁴ − T2⁴) (Incropera & DeWitt 2007, eq. 1.7).
        let x = MagnetExposure {
            gap_film_w_m2_k: 0.0,
            fin_emissivity: 1.0,
            magnet_emissivity: 1.0,
            ..MagnetExposure::default()
        };
        let q = x.flux_w_m2(100.0, 20.0);
        let want = 5.670_374_419e-8 * (373.15f64.powi(4) - 293.15f64.powi(4));
        assert!((q - want).abs() < 1e-9 * want);
        assert!(x.rise(20.0, 20.0, 1.0, 60.0).unwrap().bound_k == 0.0);
        assert!(x.rise(50.0, 20.0, 1.0, 0.0).is_none());
    }
}
