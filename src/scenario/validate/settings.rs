//! Run settings: the integrator tolerances and the rider (axis along the track, low-pass filter).

use super::Validator;
use crate::scenario::raw::{RawRider, RawSolver};
use crate::scenario::{defaults, Axis, FilterSettings, Gravity, Rider, Solver, Track};

impl Validator {
    pub(super) fn solver(&mut self, s: Option<&RawSolver>) -> Option<Solver> {
        let mut out = Solver::default();
        if let Some(s) = s {
            if let Some(r) = &s.rtol {
                if !(r.value > 1e-14 && r.value <= 1e-3) {
                    self.at(&r.referenced, "solver.rtol", "must lie in (1e-14, 1e-3]");
                    return None;
                }
                out.rtol = r.value;
            }
            if let Some(a) = &s.atol {
                if !(a.value > 0.0 && a.value <= 1e-3) {
                    self.at(&a.referenced, "solver.atol", "must lie in (0, 1e-3]");
                    return None;
                }
                out.atol = a.value;
            }
        }
        Some(out)
    }

    pub(super) fn rider(&mut self, r: Option<&RawRider>, track: &Option<Track>) -> Option<Rider> {
        // Default axis: a vertical (or nearly so) track is the rider's spine; otherwise fore–aft.
        let steep = matches!(track, Some(Track { gravity: Gravity::Grade { slope }, .. }) if slope.abs() > defaults::STEEP_SLOPE);
        let default_filter = FilterSettings::default();
        let Some(r) = r else {
            return Some(Rider {
                track_axis: if steep { Axis::Z } else { Axis::X },
                filter: Some(default_filter),
            });
        };
        let track_axis = match r.track_axis.value.as_str() {
            "x" => Axis::X,
            "z" => Axis::Z,
            other => {
                self.at(
                    &r.track_axis.referenced,
                    "rider.track_axis",
                    format!("unknown axis '{other}' (x: fore–aft, seated; z: along the spine)"),
                );
                return None;
            }
        };
        let filter = match &r.filter {
            None => Some(default_filter),
            Some(f) if f.enabled == Some(false) => None,
            Some(f) => {
                let mut fs = default_filter;
                if let Some(c) = &f.corner_hz {
                    if !(c.value > 0.0 && c.value.is_finite()) {
                        self.at(
                            &c.referenced,
                            "rider.filter.corner_hz",
                            "must be greater than zero",
                        );
                        return None;
                    }
                    fs.corner_hz = c.value;
                }
                if let Some(o) = &f.order {
                    if !(1..=8).contains(&o.value) {
                        self.at(&o.referenced, "rider.filter.order", "must be 1 to 8");
                        return None;
                    }
                    fs.order = o.value as usize;
                }
                if let Some(s) = &f.sample_rate_hz {
                    if !(s.value > 2.0 * fs.corner_hz && s.value <= 1e6) {
                        self.at(
                            &s.referenced,
                            "rider.filter.sample_rate_hz",
                            "must exceed twice the corner frequency (and be at most 1 MHz)",
                        );
                        return None;
                    }
                    fs.sample_rate_hz = s.value;
                }
                if fs.corner_hz * 2.0 >= fs.sample_rate_hz {
                    self.push(
                        None,
                        "rider.filter.corner_hz",
                        "must be below half the sample rate",
                    );
                    return None;
                }
                Some(fs)
            }
        };
        Some(Rider { track_axis, filter })
    }
}
