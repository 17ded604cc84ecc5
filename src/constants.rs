//! Physical constants used across eddyzone, each with its source.

/// Vacuum permeability μ0 in H/m. CODATA 2018 recommended value (1.256 637 062 12(19)e-6 N/A²);
/// since the 2019 SI revision it is measured, not defined, and equals 4π×10⁻⁷ to 1e-10 relative.
pub const MU0_H_M: f64 = 1.256_637_062_12e-6;

/// Standard acceleration of gravity in m/s², as adopted by the 3rd CGPM (1901).
pub const STANDARD_GRAVITY_M_S2: f64 = 9.80665;

/// Conductivity of the International Annealed Copper Standard (100 % IACS) at 20 °C in S/m:
/// 1/58 Ω·mm²/m (IEC 60028:1925).
pub const IACS_100_S_M: f64 = 58.0e6;

/// The reference temperature for conductivities and remanences, °C (IEC 60028 uses 20 °C).
pub const REFERENCE_TEMPERATURE_C: f64 = 20.0;

/// Offset between the Celsius and the Kelvin scales (SI Brochure, 9th edition, 2019).
pub const KELVIN_OFFSET: f64 = 273.15;
