//! Acceptance limits (from a `limits_file` and inline): peaks and sustained-acceleration
//! envelopes per rider axis, onset, exit-speed window, duration, stall and reversal,
//! temperatures. Accelerations are kept in g ([`in_g`]).

use super::{loc, Coord, PointList, Validator};
use crate::scenario::raw::{RawAxes, RawLimits, RawSides, Q};
use crate::scenario::{in_g, Axis, CombinedLimit, Limits};
use crate::units::Kind;

impl Validator {
    pub(super) fn envelope_points(&mut self, raw: &[Vec<Q>], p: &str) -> Option<Vec<(f64, f64)>> {
        let pts = self.points(
            raw,
            &PointList {
                path: p,
                shape: "each point is [duration, allowed acceleration]",
                coords: [
                    Coord {
                        kind: Kind::Time,
                        range: Some((|d| d >= 0.0, "duration must not be negative")),
                    },
                    Coord {
                        kind: Kind::Acceleration,
                        range: Some((|a| a >= 0.0, "allowed level must not be negative")),
                    },
                ],
                step: |(pd, _), (d, _)| {
                    (d < pd).then(|| {
                        (
                            0,
                            "durations must not decrease (the envelope must be sorted)".to_string(),
                        )
                    })
                },
                min_points: 1,
                too_few: (None, p, "at least one point is needed"),
            },
        )?;
        Some(pts.into_iter().map(|(d, a)| (d, in_g(a))).collect())
    }

    pub(super) fn limits(&mut self, r: &RawLimits, out: &mut Limits) {
        if let Some(s) = &r.source {
            out.source = Some(s.clone());
        }
        if let Some(peak) = &r.peak {
            for (k, axis) in [(0, &peak.x), (1, &peak.y), (2, &peak.z)] {
                let name = ["x", "y", "z"][k];
                if let Some(a) = axis {
                    if let Some(q) = &a.max {
                        if let Some(x) =
                            self.q(q, Kind::Acceleration, &format!("limits.peak.{name}.max"))
                        {
                            out.peak[k].max_g = Some(in_g(x));
                        }
                    }
                    if let Some(q) = &a.min {
                        if let Some(x) =
                            self.q(q, Kind::Acceleration, &format!("limits.peak.{name}.min"))
                        {
                            out.peak[k].min_g = Some(in_g(x));
                        }
                    }
                    if let (Some(hi), Some(lo)) = (out.peak[k].max_g, out.peak[k].min_g) {
                        if lo > hi {
                            self.push(
                                a.max.as_ref().and_then(|q| loc(&q.referenced)),
                                &format!("limits.peak.{name}"),
                                "min is above max",
                            );
                        }
                    }
                }
            }
        }
        if let Some(env) = &r.envelope {
            for (k, axis) in [(0, &env.x), (1, &env.y), (2, &env.z)] {
                let name = ["x", "y", "z"][k];
                if let Some(a) = axis {
                    if let Some(p) = &a.positive {
                        out.envelope[k].positive =
                            self.envelope_points(p, &format!("limits.envelope.{name}.positive"));
                    }
                    if let Some(p) = &a.negative {
                        out.envelope[k].negative =
                            self.envelope_points(p, &format!("limits.envelope.{name}.negative"));
                    }
                }
            }
        }
        if let Some(q) = &r.onset {
            if let Some(x) = self.positive(q, Kind::Jerk, "limits.onset") {
                out.onset_g_s = Some(in_g(x));
            }
        }
        if let Some(q) = &r.release {
            if let Some(x) = self.positive(q, Kind::Jerk, "limits.release") {
                out.release_g_s = Some(in_g(x));
            }
        }
        if let Some(list) = &r.combined {
            out.combined.clear();
            for (i, c) in list.iter().enumerate() {
                let p = format!("limits.combined[{i}]");
                if let Some(l) = self.combined(c, &p) {
                    out.combined.push(l);
                }
            }
        }
        if let Some(w) = &r.exit_speed {
            if let Some(q) = &w.min {
                out.exit_speed_min_m_s = self.non_negative(q, Kind::Speed, "limits.exit_speed.min");
            }
            if let Some(q) = &w.max {
                out.exit_speed_max_m_s = self.non_negative(q, Kind::Speed, "limits.exit_speed.max");
            }
            if let (Some(lo), Some(hi)) = (out.exit_speed_min_m_s, out.exit_speed_max_m_s) {
                if lo > hi {
                    self.push(
                        w.min.as_ref().and_then(|q| loc(&q.referenced)),
                        "limits.exit_speed",
                        "min is above max",
                    );
                }
            }
        }
        if let Some(q) = &r.max_duration {
            out.max_duration_s = self.positive(q, Kind::Time, "limits.max_duration");
        }
        if let Some(b) = r.allow_stall {
            out.allow_stall = b;
        }
        if let Some(b) = r.allow_rollback {
            out.allow_rollback = b;
        }
        if let Some(q) = &r.max_fin_temperature {
            out.max_fin_temperature_c =
                self.temperature(&Some(q.clone()), "limits.max_fin_temperature", 0.0);
        }
        if let Some(q) = &r.max_magnet_temperature {
            out.max_magnet_temperature_c =
                self.temperature(&Some(q.clone()), "limits.max_magnet_temperature", 0.0);
        }
    }

    /// One combined-axis limit: exactly two axes, each with both semi-axes positive.
    fn combined(&mut self, c: &RawAxes<RawSides>, p: &str) -> Option<CombinedLimit> {
        let given: Vec<(Axis, &RawSides)> = [(Axis::X, &c.x), (Axis::Y, &c.y), (Axis::Z, &c.z)]
            .into_iter()
            .filter_map(|(a, s)| s.as_ref().map(|s| (a, s)))
            .collect();
        let [(a1, s1), (a2, s2)] = given[..] else {
            let near = given.first().and_then(|(_, s)| loc(&s.positive.referenced));
            self.push(
                near,
                p,
                format!(
                    "a combined limit names exactly two axes, each with its positive and \
                     negative semi-axis (e.g. {{ x: {{ positive: 2 g, negative: 1.5 g }}, z: \
                     {{ positive: 6 g, negative: 2 g }} }}); {} given",
                    given.len()
                ),
            );
            return None;
        };
        let mut semi = [[0.0; 2]; 2];
        let mut ok = true;
        for (k, (a, s)) in [(a1, s1), (a2, s2)].into_iter().enumerate() {
            for (j, (side, q)) in [("negative", &s.negative), ("positive", &s.positive)]
                .into_iter()
                .enumerate()
            {
                match self.positive(q, Kind::Acceleration, &format!("{p}.{}.{side}", a.name())) {
                    Some(x) => semi[k][j] = in_g(x),
                    None => ok = false,
                }
            }
        }
        ok.then_some(CombinedLimit {
            axes: [a1, a2],
            semi_g: semi,
        })
    }
}
