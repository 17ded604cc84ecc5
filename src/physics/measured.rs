//! A measured force curve that replaces the model for a section.
//!
//! The points are joined by the monotone piecewise cubic Hermite interpolant of Fritsch & Carlson
//! ("Monotone piecewise cubic interpolation", SIAM J. Numer. Anal. 17, 1980, pp. 238–246): nodal
//! slopes start from the three-point parabola, are set to zero at a local extremum of the data,
//! and are scaled back into the circle α² + β² ≤ 9 (α, β = slope/secant at the two ends of an
//! interval), which makes the interpolant monotone on every interval. So it never overshoots: on
//! each interval it stays between the two data values. The implied point (0, 0) gets the slope of
//! the first secant, which is what the odd extension f(−v) = −f(v) gives (the curve is C1 through
//! zero). Beyond the last point the force is held at its last value.

use super::{non_negative, PhysicsError};
use crate::numeric::CubicHermite;

/// Measured drag force per metre of overlap length against speed, interpolated monotonically.
#[derive(Clone, Debug, PartialEq)]
pub struct MeasuredCurve {
    /// Knot speeds, m/s, starting with 0.
    speeds_m_s: Vec<f64>,
    /// Knot forces per metre of overlap, N/m, starting with 0.
    forces_per_m_n: Vec<f64>,
    /// Knot slopes after the Fritsch–Carlson limiting, N·s/m².
    slopes: Vec<f64>,
}

impl MeasuredCurve {
    /// Builds the curve from `points` = (speed in m/s, force per metre of overlap in N/m).
    /// Speeds must be finite, ≥ 0 and strictly increasing, forces finite and ≥ 0; the point
    /// (0, 0) is implied and may be given explicitly only with zero force. At least one point
    /// must have a speed above zero.
    pub fn new(points: &[(f64, f64)]) -> Result<Self, PhysicsError> {
        let mut speeds = vec![0.0];
        let mut forces = vec![0.0];
        for (index, &(speed, force)) in points.iter().enumerate() {
            non_negative("measured speed", speed)?;
            non_negative("measured force per metre", force)?;
            let previous = speeds[speeds.len() - 1];
            if index == 0 && speed == 0.0 {
                if force != 0.0 {
                    return Err(PhysicsError::ForceAtRest {
                        force_per_m_n: force,
                    });
                }
                continue;
            }
            if speed <= previous {
                return Err(PhysicsError::NotIncreasing {
                    index,
                    speed_m_s: speed,
                    previous_speed_m_s: previous,
                });
            }
            speeds.push(speed);
            forces.push(force);
        }
        if speeds.len() < 2 {
            return Err(PhysicsError::EmptyCurve);
        }
        let slopes = fritsch_carlson_slopes(&speeds, &forces);
        Ok(MeasuredCurve {
            speeds_m_s: speeds,
            forces_per_m_n: forces,
            slopes,
        })
    }

    /// Interval index containing |v| = `x` (< the last speed, not NaN).
    fn interval(&self, x: f64) -> usize {
        self.speeds_m_s
            .partition_point(|&s| s <= x)
            .saturating_sub(1)
            .min(self.speeds_m_s.len().saturating_sub(2))
    }

    /// Hermite value and derivative on interval `k` at |v| = `x`.
    fn hermite(&self, k: usize, x: f64) -> (f64, f64) {
        let (x0, x1) = (self.speeds_m_s[k], self.speeds_m_s[k + 1]);
        let (y0, y1) = (self.forces_per_m_n[k], self.forces_per_m_n[k + 1]);
        let h = x1 - x0;
        let piece = CubicHermite::new(y0, y1, self.slopes[k] * h, self.slopes[k + 1] * h);
        let t = (x - x0) / h;
        (piece.value(t), piece.derivative(t) / h)
    }

    /// Drag force per metre of overlap in N/m at `speed_m_s` (m/s): odd in v, monotone cubic
    /// between the points, held at the last value beyond them; NaN gives NaN.
    pub fn force_per_m_n(&self, speed_m_s: f64) -> f64 {
        let x = speed_m_s.abs();
        if x.is_nan() {
            return f64::NAN;
        }
        let last = self.max_speed_m_s();
        let f = if x >= last {
            self.forces_per_m_n[self.forces_per_m_n.len() - 1]
        } else {
            self.hermite(self.interval(x), x).0
        };
        if speed_m_s < 0.0 {
            -f
        } else {
            f
        }
    }

    /// Slope d(force per metre)/dv in N·s/m² at `speed_m_s` (m/s), even in v; 0 beyond the
    /// last point (where the force is held).
    pub fn slope_per_m_n_s_m(&self, speed_m_s: f64) -> f64 {
        let x = speed_m_s.abs();
        if x.is_nan() {
            return f64::NAN;
        }
        if x >= self.max_speed_m_s() {
            return 0.0;
        }
        self.hermite(self.interval(x), x).1
    }

    /// Whether |`speed_m_s`| lies within the measured range (0 … last speed).
    pub fn covers(&self, speed_m_s: f64) -> bool {
        speed_m_s.abs() <= self.max_speed_m_s()
    }

    /// The highest measured speed, m/s.
    pub fn max_speed_m_s(&self) -> f64 {
        self.speeds_m_s[self.speeds_m_s.len() - 1]
    }

    /// The knots (speed m/s, force per metre N/m), including the implied (0, 0).
    pub fn points(&self) -> impl Iterator<Item = (f64, f64)> + '_ {
        self.speeds_m_s
            .iter()
            .copied()
            .zip(self.forces_per_m_n.iter().copied())
    }
}

/// Fritsch–Carlson (1980) nodal slopes for knots `x` (strictly increasing, x[0] = 0, f(0) = 0)
/// and values `y`.
fn fritsch_carlson_slopes(x: &[f64], y: &[f64]) -> Vec<f64> {
    let n = x.len() - 1; // intervals
    let h: Vec<f64> = (0..n).map(|k| x[k + 1] - x[k]).collect();
    let secant: Vec<f64> = (0..n).map(|k| (y[k + 1] - y[k]) / h[k]).collect();
    let mut m = vec![0.0; n + 1];
    // At v = 0 the odd extension mirrors the first secant onto the negative side.
    m[0] = secant[0];
    for k in 1..n {
        let (d0, d1) = (secant[k - 1], secant[k]);
        m[k] = if d0 * d1 > 0.0 {
            // Slope of the parabola through three points (Fritsch & Carlson, step 1).
            (h[k] * d0 + h[k - 1] * d1) / (h[k - 1] + h[k])
        } else {
            0.0
        };
    }
    m[n] = secant[n - 1];
    for k in 0..n {
        let d = secant[k];
        if d == 0.0 {
            m[k] = 0.0;
            m[k + 1] = 0.0;
            continue;
        }
        let alpha = m[k] / d;
        let beta = m[k + 1] / d;
        let r2 = alpha * alpha + beta * beta;
        if r2 > 9.0 {
            let tau = 3.0 / r2.sqrt();
            m[k] = tau * alpha * d;
            m[k + 1] = tau * beta * d;
        }
    }
    m
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn interpolates_the_data_and_holds_beyond() {
        let c = MeasuredCurve::new(&[(2.0, 800.0), (5.0, 1500.0), (10.0, 1200.0)])
            .expect("valid curve");
        // Passes through every point (Hermite interpolant), exactly up to rounding.
        for (v, f) in [(0.0, 0.0), (2.0, 800.0), (5.0, 1500.0), (10.0, 1200.0)] {
            assert!((c.force_per_m_n(v) - f).abs() < 1e-9);
        }
        assert_eq!(c.force_per_m_n(25.0), 1200.0);
        assert_eq!(c.force_per_m_n(-3.0), -c.force_per_m_n(3.0));
        assert!(c.covers(10.0) && !c.covers(10.1));
        // Linear data are reproduced exactly (Hermite with secant slopes), 1e-12.
        let line = MeasuredCurve::new(&[(1.0, 3.0), (2.0, 6.0), (4.0, 12.0)]).expect("valid");
        for v in [0.3, 1.5, 3.7] {
            assert!((line.force_per_m_n(v) - 3.0 * v).abs() < 1e-12);
        }
        // At the data maximum the slope is zero (Fritsch–Carlson step for extrema).
        assert!(c.slope_per_m_n_s_m(5.0).abs() < 1e-12);
    }

    #[test]
    fn rejects_bad_points() {
        assert_eq!(MeasuredCurve::new(&[]), Err(PhysicsError::EmptyCurve));
        assert_eq!(
            MeasuredCurve::new(&[(0.0, 0.0)]),
            Err(PhysicsError::EmptyCurve)
        );
        assert!(matches!(
            MeasuredCurve::new(&[(0.0, 5.0), (1.0, 2.0)]),
            Err(PhysicsError::ForceAtRest { .. })
        ));
        assert!(matches!(
            MeasuredCurve::new(&[(1.0, 1.0), (1.0, 2.0)]),
            Err(PhysicsError::NotIncreasing { index: 1, .. })
        ));
        assert!(matches!(
            MeasuredCurve::new(&[(1.0, -1.0)]),
            Err(PhysicsError::Negative { .. })
        ));
        assert!(matches!(
            MeasuredCurve::new(&[(f64::NAN, 1.0)]),
            Err(PhysicsError::NotFinite { .. })
        ));
        let c = MeasuredCurve::new(&[(0.0, 0.0), (1.0, 2.0)]).expect("explicit origin is fine");
        assert!(c.force_per_m_n(f64::NAN).is_nan());
    }
}
