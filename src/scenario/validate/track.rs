//! The track block: gravity along the track (a constant grade or angle, or an elevation
//! profile) and the air density.

use super::{loc, Coord, PointList, Validator};
use crate::scenario::raw::{RawTrack, Q};
use crate::scenario::{defaults, Gravity, Track};
use crate::units::Kind;

impl Validator {
    pub(super) fn track(&mut self, t: Option<&RawTrack>) -> Option<Track> {
        let air = match t.and_then(|t| t.air_density.as_ref()) {
            Some(q) => self.non_negative(q, Kind::Density, "track.air_density")?,
            None => defaults::AIR_DENSITY_KG_M3,
        };
        let gravity = match t {
            None => Gravity::Grade {
                slope: defaults::SLOPE,
            },
            Some(t) => match (&t.grade, &t.angle, &t.profile) {
                (None, None, None) => Gravity::Grade {
                    slope: defaults::SLOPE,
                },
                (Some(g), None, None) => Gravity::Grade {
                    slope: self.q_where(
                        g,
                        Kind::Ratio,
                        "track.grade",
                        |g| g.abs() <= 1.0,
                        "must lie within ±100 % (dz/ds along the track)",
                    )?,
                },
                (None, Some(a), None) => {
                    let rad = self.q_where(
                        a,
                        Kind::Angle,
                        "track.angle",
                        |a| a.abs() <= std::f64::consts::FRAC_PI_2 + 1e-12,
                        "must lie within ±90 deg",
                    )?;
                    Gravity::Grade {
                        slope: rad.sin().clamp(-1.0, 1.0),
                    }
                }
                (None, None, Some(points)) => Gravity::Profile {
                    points: self.profile(points)?,
                },
                (g, a, p) => {
                    let l = g
                        .as_ref()
                        .or(a.as_ref())
                        .map(|q| loc(&q.referenced))
                        .unwrap_or(None)
                        .or(p
                            .as_ref()
                            .and_then(|p| p.first())
                            .and_then(|r| r.first())
                            .and_then(|q| loc(&q.referenced)));
                    self.push(l, "track", "give one of `grade`, `angle` or `profile`");
                    return None;
                }
            },
        };
        Some(Track {
            gravity,
            air_density_kg_m3: air,
        })
    }

    pub(super) fn profile(&mut self, raw: &[Vec<Q>]) -> Option<Vec<(f64, f64)>> {
        let length = || Coord {
            kind: Kind::Length,
            range: None,
        };
        self.points(
            raw,
            &PointList {
                path: "track.profile",
                shape: "each point is [position, elevation]",
                coords: [length(), length()],
                step: |(ps, pz), (s, z)| {
                    let slope = ((z - pz) / (s - ps)).abs();
                    if s <= ps {
                        Some((0, "positions must increase strictly".to_string()))
                    } else if slope > 1.0 + 1e-12 {
                        Some((1, format!("|dz/ds| = {slope:.3} > 1: elevation cannot change faster than the distance along the track")))
                    } else {
                        None
                    }
                },
                min_points: 2,
                too_few: (None, "track.profile", "at least two points are needed"),
            },
        )
    }
}
