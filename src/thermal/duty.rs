//! Cooling between dispatches and the steady state of a duty cycle.
//!
//! Between passes every fin (vehicle fins as one lump, track fins cell by cell) cools by Newton's
//! law towards the ambient air (vehicle fins conduct across their height meanwhile, see
//! [`super::height`]) with the lumped-capacitance time constant τ = m·c_p/(h·A), A both
//! faces (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed. 2007, §5.2, eq.
//! 5.6): T(Δt) = T_amb + (T − T_amb)·e^(−Δt/τ). For a plate of thickness t heated through its
//! thickness, m/A = ρ·t/2, so τ = ρ·c_p·t/(2h) for the whole fin and for each cell alike. Heat
//! flow along the fin between cells and cooling during the few seconds of a pass are neglected
//! (both make the result conservative for the peak).
//!
//! With a constant rise ΔT per pass the peaks form a geometric series with ratio r = e^(−Δt/τ):
//! T_peak,n = T_amb + ΔT·(1 − rⁿ)/(1 − r) → T_amb + ΔT/(1 − r) (ibid.; the classic result for
//! periodic pulse heating of a lumped body).

use super::pass::FinState;
use crate::scenario::Fin;

/// Peak change per cycle below which the duty cycle counts as steady, K.
pub const STEADY_TOLERANCE_K: f64 = 0.1;

/// Lumped cooling time constant τ = ρ·c_p·t/(2h) of a fin plate cooled on both faces, s
/// (infinite for h = 0).
pub fn time_constant_s(fin: &Fin, film_coefficient_w_m2_k: f64) -> f64 {
    let m = &fin.material;
    if film_coefficient_w_m2_k <= 0.0 {
        return f64::INFINITY;
    }
    m.density_kg_m3 * m.specific_heat_j_kg_k * fin.thickness_m / (2.0 * film_coefficient_w_m2_k)
}

/// Temperature after cooling for `interval_s` from `temp_c` towards `ambient_c` with time
/// constant `tau_s`, °C.
pub fn cool_c(temp_c: f64, ambient_c: f64, interval_s: f64, tau_s: f64) -> f64 {
    let r = if tau_s.is_finite() && tau_s > 0.0 {
        (-interval_s / tau_s).exp()
    } else if tau_s.is_finite() {
        0.0
    } else {
        1.0
    };
    ambient_c + (temp_c - ambient_c) * r
}

/// Cools a fin state in place.
pub fn cool_state(state: &mut FinState, ambient_c: f64, interval_s: f64, tau_s: f64) {
    match state {
        FinState::Height(p) => {
            super::height::Modes::of(p.temps_c.len()).step(p, None, interval_s, tau_s, ambient_c)
        }
        FinState::Field(f) => f
            .temps_c
            .iter_mut()
            .for_each(|t| *t = cool_c(*t, ambient_c, interval_s, tau_s)),
    }
}

/// The steady peak T_amb + ΔT/(1 − e^(−Δt/τ)) of a constant rise ΔT per pass, °C (None when the
/// fin never cools: no steady state).
pub fn steady_peak_c(ambient_c: f64, rise_k: f64, interval_s: f64, tau_s: f64) -> Option<f64> {
    let r = if tau_s.is_finite() {
        (-interval_s / tau_s).exp()
    } else {
        1.0
    };
    (r < 1.0).then(|| ambient_c + rise_k / (1.0 - r))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cooling_is_exponential() {
        // After one time constant 1/e of the excess remains (Newton's law of cooling).
        let t = cool_c(120.0, 20.0, 50.0, 50.0);
        assert!((t - (20.0 + 100.0 * (-1.0f64).exp())).abs() < 1e-12);
        assert_eq!(cool_c(120.0, 20.0, 50.0, f64::INFINITY), 120.0);
    }

    #[test]
    fn series_sums_to_the_steady_peak() {
        // Σ ΔT·rᵏ (geometric series) against the closed form.
        let (dt, tau, rise, amb) = (120.0, 400.0, 12.0, 25.0);
        let mut t = amb;
        let mut peak = t;
        for _ in 0..2000 {
            peak = t + rise;
            t = cool_c(peak, amb, dt, tau);
        }
        let s = steady_peak_c(amb, rise, dt, tau).unwrap();
        assert!((peak - s).abs() < 1e-9, "{peak} vs {s}");
    }
}
