//! Gravity along the track and the resistance to motion.
//!
//! The vehicle's mass is taken as spread evenly over its length (common practice in train
//! resistance calculations), so the along-track gravity force is −m·g·(z(front) − z(rear))/L and
//! the potential energy is m·g times the mean elevation under the vehicle. For a constant grade
//! this is the point-mass result.

use crate::constants::STANDARD_GRAVITY_M_S2;
use crate::scenario::{Gravity, Resistance};

/// A piecewise-linear elevation profile, extrapolated with its end slopes.
#[derive(Debug, Clone)]
pub struct TrackModel {
    /// (s, z) points; for a constant grade two points on a straight line.
    points: Vec<(f64, f64)>,
    /// Vehicle length, m.
    length_m: f64,
    /// Air density, kg/m³.
    pub air_density_kg_m3: f64,
}

/// A linear piece z = z0 + slope·(s − s0).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Piece {
    s0: f64,
    z0: f64,
    slope: f64,
}

impl Piece {
    fn z(&self, s: f64) -> f64 {
        self.z0 + self.slope * (s - self.s0)
    }
}

impl TrackModel {
    /// Builds the model for a vehicle of `length_m`.
    pub fn new(gravity: &Gravity, air_density_kg_m3: f64, length_m: f64) -> Self {
        let points = match gravity {
            Gravity::Grade { slope } => vec![(0.0, 0.0), (1.0, *slope)],
            Gravity::Profile { points } => points.clone(),
        };
        Self {
            points,
            length_m,
            air_density_kg_m3,
        }
    }

    /// The linear piece that holds just ahead of `s` in direction `dir` (±1).
    pub fn piece_at(&self, s: f64, dir: f64) -> Piece {
        let p = &self.points;
        let n = p.len();
        // Index of the segment [p[i], p[i+1]] holding s (ties broken by direction).
        let mut i = 0;
        while i + 2 < n && (p[i + 1].0 < s || (p[i + 1].0 == s && dir > 0.0)) {
            i += 1;
        }
        let (a, b) = (p[i], p[i + 1]);
        Piece {
            s0: a.0,
            z0: a.1,
            slope: (b.1 - a.1) / (b.0 - a.0),
        }
    }

    /// Elevation at `s`, m.
    pub fn elevation_m(&self, s: f64) -> f64 {
        self.piece_at(s, 1.0).z(s)
    }

    /// ∫ z ds from 0 to s along the profile (exact for piecewise-linear z).
    fn z_integral(&self, s: f64) -> f64 {
        // Integrate piece by piece between 0 and s, signed.
        let (lo, hi, sign) = if s >= 0.0 {
            (0.0, s, 1.0)
        } else {
            (s, 0.0, -1.0)
        };
        let mut knots: Vec<f64> = vec![lo];
        knots.extend(
            self.points
                .iter()
                .map(|p| p.0)
                .filter(|&k| k > lo && k < hi),
        );
        knots.push(hi);
        let mut total = 0.0;
        for w in knots.windows(2) {
            let (a, b) = (w[0], w[1]);
            let mid = 0.5 * (a + b);
            let piece = self.piece_at(mid, 1.0);
            total += 0.5 * (piece.z(a) + piece.z(b)) * (b - a);
        }
        sign * total
    }

    /// Mean elevation under a vehicle whose front is at `front_m`.
    pub fn mean_elevation_m(&self, front_m: f64) -> f64 {
        (self.z_integral(front_m) - self.z_integral(front_m - self.length_m)) / self.length_m
    }

    /// Positions of the front at which the gravity force has a kink (front or rear on a profile point).
    pub fn kinks(&self) -> Vec<f64> {
        if self.points.len() <= 2 {
            return vec![];
        }
        let inner = &self.points[1..self.points.len() - 1];
        inner
            .iter()
            .flat_map(|p| [p.0, p.0 + self.length_m])
            .collect()
    }

    /// The gravity law frozen on the pieces that hold around `front_m`, moving in `dir`.
    pub fn frozen(&self, front_m: f64, dir: f64) -> FrozenGravity {
        FrozenGravity {
            front: self.piece_at(front_m, dir),
            rear: self.piece_at(front_m - self.length_m, dir),
            length_m: self.length_m,
        }
    }
}

/// Gravity and the track-normal direction on fixed linear pieces under the front and the rear.
#[derive(Debug, Clone, Copy)]
pub struct FrozenGravity {
    front: Piece,
    rear: Piece,
    length_m: f64,
}

impl FrozenGravity {
    /// Mean dz/ds under the vehicle.
    pub fn mean_slope(&self, front_m: f64) -> f64 {
        ((self.front.z(front_m) - self.rear.z(front_m - self.length_m)) / self.length_m)
            .clamp(-1.0, 1.0)
    }

    /// Along-track gravity force on mass `mass_kg`, N (positive forwards).
    pub fn force_n(&self, mass_kg: f64, front_m: f64) -> f64 {
        -mass_kg * STANDARD_GRAVITY_M_S2 * self.mean_slope(front_m)
    }

    /// cos θ of the mean inclination.
    pub fn cos_theta(&self, front_m: f64) -> f64 {
        let s = self.mean_slope(front_m);
        (1.0 - s * s).max(0.0).sqrt()
    }

    /// Mean curvature dθ/ds of the track under the vehicle, 1/m: the change of the inclination
    /// angle from the rear to the front over the vehicle length (negative over a crest, positive
    /// in a dip). A piecewise-linear profile bends only at its points; averaged over the vehicle,
    /// as the gravity force is, the bend is a finite curvature that is constant while neither end
    /// crosses a point (and tends to 1/R for points on an arc of radius R).
    pub fn mean_curvature_1_m(&self) -> f64 {
        let angle = |p: &Piece| p.slope.clamp(-1.0, 1.0).asin();
        (angle(&self.front) - angle(&self.rear)) / self.length_m
    }
}

/// Resistance force magnitude (always against the motion), N: rolling μ·m·g·cos θ, a constant
/// friction and aerodynamic drag ½·ρ·Cd·A·v².
pub fn resistance_magnitude_n(
    r: &Resistance,
    mass_kg: f64,
    cos_theta: f64,
    speed_m_s: f64,
    air_density_kg_m3: f64,
) -> f64 {
    r.rolling_coeff * mass_kg * STANDARD_GRAVITY_M_S2 * cos_theta
        + r.friction_n
        + 0.5 * air_density_kg_m3 * r.drag_area_m2 * speed_m_s * speed_m_s
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn constant_grade_is_point_mass() {
        let t = TrackModel::new(&Gravity::Grade { slope: -0.5 }, 1.2, 3.0);
        let g = t.frozen(10.0, 1.0);
        // m·g·sin θ along a 30° fall (sin 30° = 0.5).
        assert_relative_eq!(
            g.force_n(100.0, 10.0),
            100.0 * 9.80665 * 0.5,
            max_relative = 1e-14
        );
        assert_relative_eq!(g.cos_theta(10.0), 0.75f64.sqrt(), max_relative = 1e-14);
        assert!(t.kinks().is_empty());
    }

    #[test]
    fn mean_elevation_on_a_profile() {
        // A 2 m vehicle fully on the 1-in-2 rise from s = 10 to 20 (z = 0.5·(s − 10)).
        let t = TrackModel::new(
            &Gravity::Profile {
                points: vec![(0.0, 0.0), (10.0, 0.0), (20.0, 5.0), (30.0, 5.0)],
            },
            1.2,
            2.0,
        );
        assert_relative_eq!(
            t.mean_elevation_m(15.0),
            0.5 * (14.0 - 10.0),
            max_relative = 1e-12
        );
        // Straddling the crest at 20: front at 21 → z from 19..20 rising (mean 4.75), 20..21 flat (5).
        assert_relative_eq!(
            t.mean_elevation_m(21.0),
            (4.75 + 5.0) / 2.0,
            max_relative = 1e-12
        );
        assert_eq!(t.kinks(), vec![10.0, 12.0, 20.0, 22.0]);
        // The force is minus the derivative of the potential energy.
        let m = 500.0;
        let (x, h) = (21.0, 1e-5);
        let de = m * 9.80665 * (t.mean_elevation_m(x + h) - t.mean_elevation_m(x - h)) / (2.0 * h);
        assert_relative_eq!(t.frozen(x, 1.0).force_n(m, x), -de, max_relative = 1e-6);
    }

    #[test]
    fn mean_curvature_on_an_arc_is_one_over_the_radius() {
        // Points every 0.5 m of arc on a crest of radius R = 50 m (z = R cos(s/R) − R), a 4 m
        // vehicle: the mean curvature under it is −1/R (textbook geometry of the circle) to
        // within the chord error (~(0.5/R)²).
        let r = 50.0;
        let points: Vec<(f64, f64)> = (-80..=80)
            .map(|k| {
                let s = k as f64 * 0.5;
                (s, r * (s / r).cos() - r)
            })
            .collect();
        let t = TrackModel::new(&Gravity::Profile { points }, 1.2, 4.0);
        for front in [0.25, 2.0, 7.3, 15.0] {
            let k = t.frozen(front, 1.0).mean_curvature_1_m();
            assert_relative_eq!(k, -1.0 / r, max_relative = 1e-3);
        }
        // A dip bends the other way; a straight grade not at all.
        let dip = TrackModel::new(
            &Gravity::Profile {
                points: vec![(0.0, 1.0), (10.0, 0.0), (20.0, 1.0)],
            },
            1.2,
            4.0,
        );
        assert!(dip.frozen(12.0, 1.0).mean_curvature_1_m() > 0.0);
        let grade = TrackModel::new(&Gravity::Grade { slope: -1.0 }, 1.2, 4.0);
        assert_eq!(grade.frozen(5.0, 1.0).mean_curvature_1_m(), 0.0);
    }
}
