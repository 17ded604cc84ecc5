//! Fast interpolant of the drag law for the equations of motion.
//!
//! A piecewise cubic Hermite interpolant (C1; e.g. de Boor, *A Practical Guide to Splines*, 1978,
//! ch. IV) of f(v) on a uniform grid 0 … max speed, with the nodal slopes taken from the model by a
//! fourth-order central difference. The number of intervals is doubled until the error at every
//! interval midpoint (where the Hermite error term t²(1−t)²·h⁴·f⁗/24 peaks) is below 2e-9 of the
//! model's peak force, leaving a factor of 5 to the 1e-8 target. Each interval stores its four
//! polynomial coefficients, so an evaluation is an index computation and one Horner step, with no
//! search and no allocation.
//!
//! Because the drag per area depends on conductivity and speed only through σ·v and on remanence as
//! Br² (see [`super::layer`]), one table serves every fin temperature and magnet temperature:
//! f(v; σ', Br') = (Br'/Br)²·f(v·σ'/σ; σ, Br), exactly.

use super::layer::DragModel;
use crate::numeric::CubicHermite;

/// Largest number of intervals (8 MiB of coefficients); beyond it the table range is shortened
/// and the exact model is used above it.
const MAX_INTERVALS: usize = 1 << 18;

/// Target error at interval midpoints, as a fraction of the peak force.
const BUILD_TOLERANCE: f64 = 2e-9;

/// Tabulated drag law of one [`DragModel`], with the model kept for speeds beyond the table.
#[derive(Clone, Debug)]
pub struct ForceTable {
    model: DragModel,
    max_speed_m_s: f64,
    inverse_step_s_m: f64,
    /// Per interval: the cubic in t ∈ [0, 1), the position in the interval; Pa.
    coefficients: Vec<CubicHermite>,
}

/// Slope df/dv of the model in Pa·s/m at `speed_m_s`, by the fourth-order central difference
/// (−f(v+2h) + 8f(v+h) − 8f(v−h) + f(v−2h))/(12h) (Abramowitz & Stegun, 1964, 25.3.6).
fn model_slope(model: &DragModel, speed_m_s: f64, step_m_s: f64) -> f64 {
    let f = |v: f64| model.force_per_area_pa(v);
    let h = step_m_s;
    (-f(speed_m_s + 2.0 * h) + 8.0 * f(speed_m_s + h) - 8.0 * f(speed_m_s - h)
        + f(speed_m_s - 2.0 * h))
        / (12.0 * h)
}

impl ForceTable {
    /// Tabulates `model` from 0 to `max_speed_m_s` (m/s). A maximum speed that is not finite and
    /// positive gives an empty table that always uses the exact model. If the accuracy target
    /// (1e-8 of the peak force) would need more than 2¹⁸ intervals, the table range is shortened
    /// (see [`ForceTable::max_speed_m_s`]) and the exact model serves the speeds above it.
    pub fn build(model: &DragModel, max_speed_m_s: f64) -> Self {
        let mut table = ForceTable {
            model: model.clone(),
            max_speed_m_s: 0.0,
            inverse_step_s_m: 0.0,
            coefficients: Vec::new(),
        };
        if !(max_speed_m_s.is_finite() && max_speed_m_s > 0.0) {
            return table;
        }
        let peak = model.peak_force_per_area_pa();
        let critical = model.critical_speed_m_s();
        let mut range = max_speed_m_s;
        loop {
            let mut intervals = 16usize;
            while intervals <= MAX_INTERVALS {
                if let Some(coefficients) = Self::try_build(model, range, intervals, peak, critical)
                {
                    table.max_speed_m_s = range;
                    table.inverse_step_s_m = intervals as f64 / range;
                    table.coefficients = coefficients;
                    return table;
                }
                intervals *= 2;
            }
            range *= 0.5;
            if range < 1e-3 * critical {
                return table;
            }
        }
    }

    /// Coefficients for `intervals` equal intervals over [0, range], or `None` if a midpoint
    /// misses the tolerance.
    fn try_build(
        model: &DragModel,
        range: f64,
        intervals: usize,
        peak: f64,
        critical: f64,
    ) -> Option<Vec<CubicHermite>> {
        let step = range / intervals as f64;
        let node = |i: usize| -> (f64, f64) {
            let v = i as f64 * step;
            // Difference step: 1e-3 of the local speed scale (max of v and the critical speed).
            let h = 1e-3 * v.max(critical);
            (model.force_per_area_pa(v), model_slope(model, v, h) * step)
        };
        let mut coefficients = Vec::with_capacity(intervals);
        let (mut p0, mut m0) = node(0);
        for i in 0..intervals {
            let (p1, m1) = node(i + 1);
            let c = CubicHermite::new(p0, p1, m0, m1);
            let mid = (i as f64 + 0.5) * step;
            let interpolated = c.value(0.5);
            let error = (interpolated - model.force_per_area_pa(mid)).abs();
            if error.is_nan() || error > BUILD_TOLERANCE * peak {
                return None;
            }
            coefficients.push(c);
            p0 = p1;
            m0 = m1;
        }
        Some(coefficients)
    }

    /// Interval index and position t ∈ [0, 1] for |v| = `speed_abs_m_s` inside the table range.
    #[inline(always)]
    fn locate(&self, speed_abs_m_s: f64) -> Option<(&CubicHermite, f64)> {
        if speed_abs_m_s < self.max_speed_m_s {
            let s = speed_abs_m_s * self.inverse_step_s_m;
            let i = s as usize; // s ≥ 0 and finite here; the cast truncates toward zero
            let c = self.coefficients.get(i)?;
            Some((c, s - i as f64))
        } else {
            None
        }
    }

    /// Drag force per unit area in Pa at `speed_m_s` (m/s), at the reference conductivity and
    /// remanence of the model: odd in v, from the table within its range and from the exact model
    /// beyond it. Within range, |error| ≤ 1e-8 of the peak force.
    #[inline]
    pub fn force_per_area_pa(&self, speed_m_s: f64) -> f64 {
        match self.locate(speed_m_s.abs()) {
            Some((c, t)) => {
                let f = c.value(t);
                if speed_m_s < 0.0 {
                    -f
                } else {
                    f
                }
            }
            None => self.model.force_per_area_pa(speed_m_s),
        }
    }

    /// Drag force per unit area in Pa at `speed_m_s` (m/s) for a fin whose conductivity is
    /// `conductivity_ratio` × the model's (σ(T)/σ_ref, > 0) and magnets whose remanence is
    /// `remanence_ratio` × the model's: exact rescaling, f = remanence_ratio²·f_ref(v·conductivity_ratio).
    #[inline]
    pub fn force_per_area_scaled_pa(
        &self,
        speed_m_s: f64,
        conductivity_ratio: f64,
        remanence_ratio: f64,
    ) -> f64 {
        remanence_ratio * remanence_ratio * self.force_per_area_pa(speed_m_s * conductivity_ratio)
    }

    /// Slope d f/d v in Pa·s/m at `speed_m_s` (m/s) at the table's reference conductivity and
    /// remanence (even in v): the derivative of the interpolant within range (continuous, since
    /// the interpolant is C1), a central difference of the exact model beyond it. Callers use it
    /// for the braking onset and Jacobian-free checks.
    pub fn slope_pa_s_m(&self, speed_m_s: f64) -> f64 {
        match self.locate(speed_m_s.abs()) {
            Some((c, t)) => self.inverse_step_s_m * c.derivative(t),
            None => {
                let h = 1e-3 * speed_m_s.abs().max(self.model.critical_speed_m_s());
                model_slope(&self.model, speed_m_s, h)
            }
        }
    }

    /// Slope d f/d v in Pa·s/m with conductivity and remanence scaled as in
    /// [`ForceTable::force_per_area_scaled_pa`]: remanence_ratio²·conductivity_ratio·f_ref'(v·conductivity_ratio).
    pub fn slope_scaled_pa_s_m(
        &self,
        speed_m_s: f64,
        conductivity_ratio: f64,
        remanence_ratio: f64,
    ) -> f64 {
        remanence_ratio
            * remanence_ratio
            * conductivity_ratio
            * self.slope_pa_s_m(speed_m_s * conductivity_ratio)
    }

    /// Upper end of the tabulated speed range in m/s (0 for an empty table).
    pub fn max_speed_m_s(&self) -> f64 {
        self.max_speed_m_s
    }

    /// Number of intervals in the table.
    pub fn interval_count(&self) -> usize {
        self.coefficients.len()
    }

    /// The model the table was built from (used beyond the table range).
    pub fn model(&self) -> &DragModel {
        &self.model
    }
}

#[cfg(test)]
mod tests {
    use super::super::test_support::typical_geometry;
    use super::*;

    fn table(max: f64) -> ForceTable {
        let m = DragModel::new(&typical_geometry(), 1.25, 58e6).expect("valid typical model");
        ForceTable::build(&m, max)
    }

    #[test]
    fn matches_model_on_a_dense_grid() {
        // Target of the brief: ≤ 1e-8 of the peak force, checked against the direct model at
        // 20 001 speeds including interval ends and points off the build checks.
        let t = table(60.0);
        let peak = t.model().peak_force_per_area_pa();
        for i in 0..=20_000 {
            let v = 60.0 * f64::from(i) / 20_000.0 * (1.0 - 1e-12);
            let err = (t.force_per_area_pa(v) - t.model().force_per_area_pa(v)).abs();
            assert!(err <= 1e-8 * peak, "v={v} err={err}");
        }
    }

    #[test]
    fn odd_c1_and_fallback() {
        let t = table(20.0);
        // Odd: exact by construction (sign applied to the tabulated |v| value).
        assert_eq!(t.force_per_area_pa(-7.3), -t.force_per_area_pa(7.3));
        // Beyond the range: the exact model.
        assert_eq!(t.force_per_area_pa(25.0), t.model().force_per_area_pa(25.0));
        // C1 at an interior node: slopes from both sides agree (same nodal slope), 1e-9 relative.
        let v = (5.0 * t.inverse_step_s_m).round() / t.inverse_step_s_m;
        let left = t.slope_pa_s_m(v * (1.0 - 1e-13));
        let right = t.slope_pa_s_m(v * (1.0 + 1e-13));
        assert!((left / right - 1.0).abs() < 1e-9);
        // Slope against a central difference of the model: 1e-6 of peak / critical speed.
        let m = t.model();
        let scale = m.peak_force_per_area_pa() / m.critical_speed_m_s();
        for v in [0.0, 0.5, 3.0, 11.0] {
            let fd = (m.force_per_area_pa(v + 1e-4) - m.force_per_area_pa(v - 1e-4)) / 2e-4;
            assert!((t.slope_pa_s_m(v) - fd).abs() < 1e-6 * scale, "v={v}");
        }
        // Empty table for a bad maximum speed: always the model.
        let empty = table(f64::NAN);
        assert_eq!(empty.max_speed_m_s(), 0.0);
        assert_eq!(empty.force_per_area_pa(3.0), m.force_per_area_pa(3.0));
    }
}
