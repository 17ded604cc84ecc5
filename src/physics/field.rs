//! No-load field of the magnet rows: harmonic wavenumbers and amplitudes.
//!
//! Each row is a square wave of magnetisation across the gap: +Br/μ0 over a width f·τ centred on
//! a pole, −Br/μ0 on the next pole, zero in between (recoil permeability taken as 1). Its Fourier
//! series (cosine series about a pole centre) has only odd harmonics,
//!
//! ```text
//! B_rn = (4/(nπ)) · Br · sin(nπf/2),    k_n = nπ/τ,
//! ```
//!
//! the square-wave series of any Fourier-analysis text (e.g. E. Kreyszig, *Advanced Engineering
//! Mathematics*, ch. 11). Solving Laplace's equation for the vector potential between the two
//! iron back plates (tangential H = 0 on the iron at distance a from the gap centre, magnets of
//! thickness h_m against the iron, both rows magnetised the same way across the gap) gives the
//! no-load flux density across the gap at its centre:
//!
//! ```text
//! B_0n = B_rn · sinh(k_n h_m) / sinh(k_n a).
//! ```
//!
//! For long poles (k_n a → 0) this tends to B_rn·h_m/a, the magnetic-circuit result; note that for
//! f = 1 the *fundamental* then tends to (4/π)·Br·h_m/a, while the full field at a pole centre
//! (the harmonic sum) tends to Br·h_m/a.

use super::BrakeGeometry;
use std::f64::consts::PI;

/// Wavenumber k_n = nπ/τ of harmonic `harmonic` (n, odd) for pole pitch `pole_pitch_m` (m), in 1/m.
pub fn wavenumber_per_m(pole_pitch_m: f64, harmonic: u32) -> f64 {
    f64::from(harmonic) * PI / pole_pitch_m
}

/// Source amplitude B_rn = (4/(nπ))·Br·sin(nπf/2) of odd harmonic n of the magnetisation square
/// wave, in tesla, for remanence `remanence_t` (T) and magnet fill f (dimensionless). Zero for
/// even n (the square wave is half-wave symmetric).
pub fn source_amplitude_t(remanence_t: f64, magnet_fill: f64, harmonic: u32) -> f64 {
    if harmonic.is_multiple_of(2) {
        return 0.0;
    }
    let n = f64::from(harmonic);
    4.0 / (n * PI) * remanence_t * (n * PI * magnet_fill / 2.0).sin()
}

/// `sinh(x)/sinh(y)` for 0 < x ≤ y without overflow, dimensionless.
pub(crate) fn sinh_ratio(x: f64, y: f64) -> f64 {
    // sinh(x)/sinh(y) = e^(x−y) · (1 − e^(−2x)) / (1 − e^(−2y)); expm1 keeps small arguments exact.
    (x - y).exp() * ((-2.0 * x).exp_m1() / (-2.0 * y).exp_m1())
}

/// `sinh(x)/cosh(y)` for 0 < x ≤ y without overflow, dimensionless.
pub(crate) fn sinh_cosh_ratio(x: f64, y: f64) -> f64 {
    (x - y).exp() * (-(-2.0 * x).exp_m1() / (1.0 + (-2.0 * y).exp()))
}

/// No-load flux density B_0n across the gap at its centre for one harmonic, in tesla:
/// `source_amplitude_t · sinh(k h_m)/sinh(k a)` with k = `wavenumber_per_m` (1/m), h_m =
/// `magnet_thickness_m` and a = `centre_to_iron_m` (gap centre to iron, m). Computed without
/// overflow for large k·a.
pub fn gap_centre_amplitude_t(
    source_amplitude_t: f64,
    wavenumber_per_m: f64,
    magnet_thickness_m: f64,
    centre_to_iron_m: f64,
) -> f64 {
    source_amplitude_t
        * sinh_ratio(
            wavenumber_per_m * magnet_thickness_m,
            wavenumber_per_m * centre_to_iron_m,
        )
}

/// No-load flux density across the gap at the gap centre, in tesla, at `position_m` (m) along the
/// track measured from the centre of a pole, summed over the odd harmonics up to
/// `highest_harmonic`. The fin is ignored (it is non-magnetic); the geometry is not validated
/// here (use [`BrakeGeometry::validate`] first).
pub fn no_load_gap_field_t(
    geometry: &BrakeGeometry,
    remanence_t: f64,
    position_m: f64,
    highest_harmonic: u32,
) -> f64 {
    let a = geometry.centre_to_iron_m();
    (1..=highest_harmonic)
        .step_by(2)
        .map(|n| {
            let k = wavenumber_per_m(geometry.pole_pitch_m, n);
            let b_rn = source_amplitude_t(remanence_t, geometry.magnet_fill, n);
            gap_centre_amplitude_t(b_rn, k, geometry.magnet_thickness_m, a) * (k * position_m).cos()
        })
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn square_wave_coefficients() {
        // Fourier series of a ±1 square wave with fill 1: 4/(nπ)·(−1)^((n−1)/2) (Kreyszig ch. 11).
        for n in [1u32, 3, 5, 7] {
            let expected = 4.0 / (f64::from(n) * PI) * if n % 4 == 1 { 1.0 } else { -1.0 };
            assert!((source_amplitude_t(1.0, 1.0, n) - expected).abs() < 1e-15);
        }
        assert_eq!(source_amplitude_t(1.25, 0.9, 4), 0.0);
    }

    #[test]
    fn sinh_ratios_match_direct_evaluation() {
        // Direct f64 sinh/cosh where they do not overflow; 1e-13 relative (rounding).
        for (x, y) in [(0.1, 0.3), (1e-6, 2e-6), (2.0, 5.0), (30.0, 31.5)] {
            let direct = f64::sinh(x) / f64::sinh(y);
            assert!((sinh_ratio(x, y) / direct - 1.0).abs() < 1e-13);
            let direct = f64::sinh(x) / f64::cosh(y);
            assert!((sinh_cosh_ratio(x, y) / direct - 1.0).abs() < 1e-13);
        }
        // No overflow far beyond f64::sinh's range; exact value e^(x−y) to rounding.
        assert!((sinh_ratio(1000.0, 1001.0) - (-1.0f64).exp()).abs() < 1e-15);
    }
}
