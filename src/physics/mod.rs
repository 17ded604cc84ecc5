//! Drag force of a conducting fin between two rows of permanent magnets.
//!
//! # Model
//!
//! Two rows of alternating magnets (pole pitch τ, magnet thickness h_m, fill f = magnet width /
//! pole pitch) sit on iron back plates (μr → ∞) facing each other; magnets facing each other across
//! the gap are magnetised in the same direction, so the field crosses the gap. A non-magnetic fin of
//! thickness d = 2u is centred in the gap with a clearance c on each side. With L = c + h_m (fin face
//! to iron) and a = u + L (gap centre to iron), harmonic n of the magnet field has wavenumber
//! k_n = nπ/τ; the fin moving at speed v sees it as a travelling wave of angular frequency ω = k_n·v.
//!
//! [`layer`] solves the magnetic diffusion equation through the fin thickness for every odd
//! harmonic (2-D layer theory, derived in [`layer`] from the diffusion equation; the same
//! transfer-relation treatment of conducting layers is in J. R. Melcher, *Continuum
//! Electromechanics*, MIT Press, 1981, ch. 6, cited from memory), so skin effect and field
//! exclusion at speed are part of the result. [`edge`] multiplies each harmonic by the
//! finite-height factor of fin and poles, derived there from the thin-sheet problem of a fin of
//! finite height between the iron planes at every speed (it reduces to the Russell & Norsworthy
//! conductivity factor, Proc. IEE 105A, 1958, at low speed). [`table`]
//! turns the model into a fast interpolant for the equations of motion, and [`measured`]
//! interpolates a measured force curve that replaces the model for a section.
//!
//! The force per metre of overlap is that of a long section and a long fin. [`ends`] gives the
//! end lengths of a section (entry and exit; F = f·(N τ − ℓ_entry − ℓ_exit)) and [`fin_ends`]
//! those of a fin end inside a section (leading and trailing), both functions of σ·v only;
//! [`SectionEndCurve`] is the fast ℓ(v) the equations of motion apply (`dynamics::model`), the
//! fin ends are carried as an allowance in the band. [`uncertainty`] gives the model's relative
//! band (fringing of the pole field, thickness at the fin rim, numerics, recoil permeability,
//! section-end residual, fin ends).
//!
//! Units are SI throughout: metres, tesla, siemens per metre, metres per second, pascal (N/m²).

mod chebyshev;
pub mod edge;
mod eigen;
pub mod ends;
pub mod field;
pub mod fin_ends;
pub mod layer;
pub mod measured;
pub mod offset;
pub(crate) mod quadrature;
pub mod table;
pub mod uncertainty;

pub use edge::{russell_norsworthy, EdgeModel, EdgeResolution, FiniteHeightEdge, PoleField};
pub use ends::{section_end_length_m, section_end_lengths, EndLengths, EndTable, SectionEndCurve};
pub use fin_ends::{fin_end_lengths, FinEndLengths, FinEndTable};
pub use layer::{skin_depth_m, DragModel, HarmonicTerm};
pub use measured::MeasuredCurve;
pub use offset::{offset_forces_per_area_pa, OffsetHarmonic, OffsetModel};
pub use table::{ForceTable, LateralTable};
pub use uncertainty::{recoil_loss, ModelUncertainty, UncertaintyBand, UncertaintyParts};

use serde::{Deserialize, Serialize};

/// Cross-section of one brake section: magnet rows, gap and fin. All lengths in metres.
///
/// The "pole face" is the face of one magnet row seen by the fin; "active height" is the height
/// (transverse to travel, in the fin plane) over which fin and poles overlap.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct BrakeGeometry {
    /// Pole pitch τ: centre-to-centre distance of neighbouring (opposite) magnets along the track, m.
    pub pole_pitch_m: f64,
    /// Magnet thickness h_m, in the direction across the gap, m.
    pub magnet_thickness_m: f64,
    /// Fill f: magnet width along the track divided by the pole pitch, dimensionless, in (0, 1].
    pub magnet_fill: f64,
    /// Clearance c between one fin face and the magnet face opposite it, m (the same on both sides).
    pub clearance_m: f64,
    /// Fin thickness d, m.
    pub fin_thickness_m: f64,
    /// Height of the fin that can pass between the magnet rows, m.
    pub fin_height_m: f64,
    /// Height of the magnet poles, m.
    pub pole_height_m: f64,
}

impl BrakeGeometry {
    /// Active height in metres: the height over which fin and poles overlap,
    /// `min(fin_height_m, pole_height_m)`.
    pub fn active_height_m(&self) -> f64 {
        self.fin_height_m.min(self.pole_height_m)
    }

    /// Overhang in metres: how far the fin extends beyond the poles on each side (above and below),
    /// `max(0, (fin_height_m − pole_height_m)/2)`. The overhang is a return path for the eddy
    /// currents and enters the Russell–Norsworthy edge factor.
    pub fn overhang_m(&self) -> f64 {
        (0.5 * (self.fin_height_m - self.pole_height_m)).max(0.0)
    }

    /// Half the fin thickness u = d/2, m.
    pub fn half_fin_thickness_m(&self) -> f64 {
        0.5 * self.fin_thickness_m
    }

    /// Distance L from a fin face to the iron back plate behind the magnets opposite it,
    /// clearance + magnet thickness, m.
    pub fn fin_face_to_iron_m(&self) -> f64 {
        self.clearance_m + self.magnet_thickness_m
    }

    /// Distance a from the gap centre (fin mid-plane) to either iron back plate, u + L, m.
    pub fn centre_to_iron_m(&self) -> f64 {
        self.half_fin_thickness_m() + self.fin_face_to_iron_m()
    }

    /// Checks that every length is finite, that the pitch, magnet thickness, fin thickness and both
    /// heights are positive, that the clearance is not negative and that the fill lies in (0, 1].
    pub fn validate(&self) -> Result<(), PhysicsError> {
        positive("pole pitch", self.pole_pitch_m)?;
        positive("magnet thickness", self.magnet_thickness_m)?;
        in_unit_interval("magnet fill", self.magnet_fill)?;
        non_negative("clearance", self.clearance_m)?;
        positive("fin thickness", self.fin_thickness_m)?;
        positive("fin height", self.fin_height_m)?;
        positive("pole height", self.pole_height_m)?;
        Ok(())
    }
}

/// Errors of the physics layer: values that the model cannot accept, each naming the quantity.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PhysicsError {
    /// A value is NaN or infinite.
    #[error("{quantity} must be a finite number, got {value}")]
    NotFinite {
        /// Name of the quantity.
        quantity: &'static str,
        /// The value given (SI units).
        value: f64,
    },
    /// A value that must be strictly positive is zero or negative.
    #[error("{quantity} must be greater than zero, got {value}")]
    NotPositive {
        /// Name of the quantity.
        quantity: &'static str,
        /// The value given (SI units).
        value: f64,
    },
    /// A value that must not be negative is negative.
    #[error("{quantity} must not be negative, got {value}")]
    Negative {
        /// Name of the quantity.
        quantity: &'static str,
        /// The value given (SI units).
        value: f64,
    },
    /// A value lies outside the half-open interval (min, max].
    #[error("{quantity} must lie in ({min}, {max}], got {value}")]
    OutOfRange {
        /// Name of the quantity.
        quantity: &'static str,
        /// The value given.
        value: f64,
        /// Exclusive lower bound.
        min: f64,
        /// Inclusive upper bound.
        max: f64,
    },
    /// A measured force curve has no point above zero speed.
    #[error("a measured force curve needs at least one point with speed above zero")]
    EmptyCurve,
    /// Speeds of a measured force curve do not strictly increase.
    #[error(
        "measured force curve: speeds must strictly increase, but point {index} has \
         {speed_m_s} m/s after {previous_speed_m_s} m/s"
    )]
    NotIncreasing {
        /// Zero-based index of the offending point.
        index: usize,
        /// Its speed, m/s.
        speed_m_s: f64,
        /// Speed of the point before it, m/s.
        previous_speed_m_s: f64,
    },
    /// A measured point at zero speed has a non-zero force (a drag brake has none at rest).
    #[error("measured force curve: the point at zero speed must have zero force, got {force_per_m_n} N/m")]
    ForceAtRest {
        /// The force per metre of overlap given at zero speed, N/m.
        force_per_m_n: f64,
    },
    /// The inputs are individually valid but the layer model overflows or underflows with them.
    #[error("the layer model cannot represent this case: {what} is not a finite number")]
    Degenerate {
        /// What came out non-finite.
        what: &'static str,
    },
}

/// Ensures `value` is finite.
pub(crate) fn finite(quantity: &'static str, value: f64) -> Result<f64, PhysicsError> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(PhysicsError::NotFinite { quantity, value })
    }
}

/// Ensures `value` is finite and > 0.
pub(crate) fn positive(quantity: &'static str, value: f64) -> Result<f64, PhysicsError> {
    finite(quantity, value)?;
    if value > 0.0 {
        Ok(value)
    } else {
        Err(PhysicsError::NotPositive { quantity, value })
    }
}

/// Ensures `value` is finite and ≥ 0.
pub(crate) fn non_negative(quantity: &'static str, value: f64) -> Result<f64, PhysicsError> {
    finite(quantity, value)?;
    if value >= 0.0 {
        Ok(value)
    } else {
        Err(PhysicsError::Negative { quantity, value })
    }
}

/// Ensures `value` lies in (0, 1].
fn in_unit_interval(quantity: &'static str, value: f64) -> Result<f64, PhysicsError> {
    finite(quantity, value)?;
    if value > 0.0 && value <= 1.0 {
        Ok(value)
    } else {
        Err(PhysicsError::OutOfRange {
            quantity,
            value,
            min: 0.0,
            max: 1.0,
        })
    }
}

#[cfg(test)]
pub(crate) mod test_support {
    use super::BrakeGeometry;

    /// The typical section (see [`BrakeGeometry::example`]).
    pub fn typical_geometry() -> BrakeGeometry {
        BrakeGeometry::example()
    }
}

impl BrakeGeometry {
    /// An example section for tests, benchmarks and documentation: τ = 50 mm, h_m = 12 mm,
    /// fill 0.9, clearance 5 mm, 10 mm fin, fin height 220 mm, pole height 180 mm.
    pub fn example() -> Self {
        BrakeGeometry {
            pole_pitch_m: 0.050,
            magnet_thickness_m: 0.012,
            magnet_fill: 0.9,
            clearance_m: 0.005,
            fin_thickness_m: 0.010,
            fin_height_m: 0.220,
            pole_height_m: 0.180,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::test_support::typical_geometry;
    use super::*;

    #[test]
    fn heights_and_overhang() {
        // Definitions of the brief: active height = min, overhang = max(0, difference / 2).
        let g = typical_geometry();
        assert!((g.active_height_m() - 0.180).abs() < 1e-15);
        assert!((g.overhang_m() - 0.020).abs() < 1e-15);
        let short_fin = BrakeGeometry {
            fin_height_m: 0.1,
            ..g
        };
        assert!((short_fin.active_height_m() - 0.1).abs() < 1e-15);
        assert_eq!(short_fin.overhang_m(), 0.0);
        assert!((g.centre_to_iron_m() - 0.022).abs() < 1e-15);
    }

    #[test]
    fn validation_names_the_quantity() {
        let g = typical_geometry();
        assert!(g.validate().is_ok());
        let bad = BrakeGeometry {
            magnet_fill: 1.2,
            ..g
        };
        assert!(matches!(
            bad.validate(),
            Err(PhysicsError::OutOfRange {
                quantity: "magnet fill",
                ..
            })
        ));
        let bad = BrakeGeometry {
            clearance_m: -1e-3,
            ..g
        };
        assert!(matches!(
            bad.validate(),
            Err(PhysicsError::Negative {
                quantity: "clearance",
                ..
            })
        ));
        let bad = BrakeGeometry {
            pole_pitch_m: f64::NAN,
            ..g
        };
        assert!(matches!(
            bad.validate(),
            Err(PhysicsError::NotFinite {
                quantity: "pole pitch",
                ..
            })
        ));
        let bad = BrakeGeometry {
            fin_thickness_m: 0.0,
            ..g
        };
        assert!(matches!(
            bad.validate(),
            Err(PhysicsError::NotPositive {
                quantity: "fin thickness",
                ..
            })
        ));
        let zero_clearance = BrakeGeometry {
            clearance_m: 0.0,
            ..g
        };
        assert!(zero_clearance.validate().is_ok());
    }
}
