//! Transverse edge effect: the Russell–Norsworthy conductivity factor.
//!
//! Eddy currents under a pole of finite height must close in the fin above and below the active
//! zone; their return paths add resistance. Russell & Norsworthy ("Eddy currents and wall losses in
//! screened-rotor induction motors", Proc. IEE 105A, 1958, pp. 163–175) solved the thin-sheet
//! current-stream function for a sheet of half-width a_p under the field, with overhangs o beyond
//! it, and expressed the result as a factor on the conductivity:
//!
//! ```text
//! K = 1 − tanh(k a_p) / ( k a_p · [1 + tanh(k a_p) · tanh(k o)] ),   σ_e = K·σ.
//! ```
//!
//! It is a low-speed, thin-sheet result (the eddy-current reaction field is neglected in the
//! current-path calculation); using it at all speeds and for thick fins is the usual engineering
//! approximation and is a limitation of this model.

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

#[cfg(test)]
mod tests {
    use super::*;

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
}
