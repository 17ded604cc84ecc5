//! Run settings: the integrator tolerances and the rider (axis along the track, low-pass filter).

use super::Validator;
use crate::scenario::raw::{RawRates, RawRider, RawSolver};
use crate::scenario::{
    defaults, Axis, FilterPhase, FilterSettings, Gravity, RateSettings, RateSignal, Rider, Solver,
    Track,
};
use crate::units::Kind;

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
                passengers: false,
                track_axis: if steep { Axis::Z } else { Axis::X },
                filter: Some(default_filter),
                rates: RateSettings::default(),
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
                if let Some(ph) = &f.phase {
                    fs.phase = match ph.value.as_str() {
                        "zero" => FilterPhase::Zero,
                        "causal" => FilterPhase::Causal,
                        other => {
                            self.at(
                                &ph.referenced,
                                "rider.filter.phase",
                                format!(
                                    "unknown phase '{other}' (zero: forward and backward, no \
                                     phase shift; causal: one pass)"
                                ),
                            );
                            return None;
                        }
                    };
                }
                if let Some(o) = &f.order {
                    let ok = match fs.phase {
                        FilterPhase::Causal => (1..=8).contains(&o.value),
                        FilterPhase::Zero => (2..=16).contains(&o.value) && o.value % 2 == 0,
                    };
                    if !ok {
                        let msg = match fs.phase {
                            FilterPhase::Causal => "must be 1 to 8 (one causal pass)",
                            FilterPhase::Zero => {
                                "must be even, 2 to 16: a zero-phase filter of order n is a \
                                 pass of order n/2 run forward and backward (use phase: causal \
                                 for an odd order)"
                            }
                        };
                        self.at(&o.referenced, "rider.filter.order", msg);
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
                        f.corner_hz.as_ref().and_then(|c| super::loc(&c.referenced)),
                        "rider.filter.corner_hz",
                        "must be below half the sample rate",
                    );
                    return None;
                }
                Some(fs)
            }
        };
        let rates = self.rates(r.rates.as_ref())?;
        Some(Rider {
            passengers: r.passengers.unwrap_or(true),
            track_axis,
            filter,
            rates,
        })
    }

    fn rates(&mut self, r: Option<&RawRates>) -> Option<RateSettings> {
        let mut out = RateSettings::default();
        let Some(r) = r else { return Some(out) };
        if let Some(q) = &r.window {
            out.window_s = self.positive(q, Kind::Time, "rider.rates.window")?;
        }
        if let Some(sig) = &r.signal {
            out.signal = match sig.value.as_str() {
                "filtered" => RateSignal::Filtered,
                "raw" => RateSignal::Raw,
                other => {
                    self.at(
                        &sig.referenced,
                        "rider.rates.signal",
                        format!("unknown signal '{other}' (filtered or raw)"),
                    );
                    return None;
                }
            };
        }
        Some(out)
    }
}
