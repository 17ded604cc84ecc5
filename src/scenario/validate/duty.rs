//! The duty block: repeated dispatches with Newton cooling between them.

use super::Validator;
use super::{Coord, PointList};
use crate::scenario::bounds;
use crate::scenario::raw::{CyclesText, RawDuty, RawDutyMagnets, RawLift};
use crate::scenario::{defaults, Cycles, Duty, LiftSpeed, MagnetExposure};
use crate::units::Kind;

impl Validator {
    pub(super) fn duty(&mut self, d: &RawDuty) -> Option<Duty> {
        let interval = self.positive(&d.interval, Kind::Time, "duty.interval");
        let film = self.q_where(
            &d.film_coefficient,
            Kind::HeatTransfer,
            "duty.film_coefficient",
            |h| h >= 0.0,
            "must not be negative",
        );
        let ambient = self.temperature(&d.ambient, "duty.ambient", defaults::TEMPERATURE_C);
        let max_cycles = match &d.max_cycles {
            Some(m) if m.value == 0 || m.value > bounds::MAX_CYCLES => {
                self.at(
                    &m.referenced,
                    "duty.max_cycles",
                    format!("must be 1 to {} dispatches", bounds::MAX_CYCLES),
                );
                None
            }
            Some(m) => Some(m.value),
            None => Some(defaults::DUTY_MAX_CYCLES),
        };
        let cycles = match &d.cycles {
            None => Some(Cycles::UntilSteady {
                max_cycles: max_cycles?,
            }),
            Some(c) => match &c.value {
                CyclesText::Count(n) if (1..=u64::from(bounds::MAX_CYCLES)).contains(n) => {
                    Some(Cycles::Count(*n as u32))
                }
                CyclesText::Count(_) => {
                    self.at(
                        &c.referenced,
                        "duty.cycles",
                        format!("must be 1 to {} dispatches", bounds::MAX_CYCLES),
                    );
                    None
                }
                CyclesText::Text(t) if t == "until_steady" => Some(Cycles::UntilSteady {
                    max_cycles: max_cycles?,
                }),
                CyclesText::Text(t) => {
                    self.at(
                        &c.referenced,
                        "duty.cycles",
                        format!("'{t}' is neither a number of cycles nor until_steady"),
                    );
                    None
                }
            },
        };
        if let (Some(Cycles::UntilSteady { .. }), Some(h)) = (&cycles, film) {
            if h == 0.0 {
                self.at(
                    &d.film_coefficient.referenced,
                    "duty.film_coefficient",
                    "is 0 with `cycles: until_steady`: without cooling the fins heat up at every \
                     dispatch and never reach a steady state; give a film coefficient or a number \
                     of cycles",
                );
                return None;
            }
        }
        let lift = match &d.lift {
            Some(l) => Some(self.lift(l)?),
            None => None,
        };
        let magnets = match &d.magnets {
            Some(m) => self.duty_magnets(m)?,
            None => defaults::MAGNET_EXPOSURE,
        };
        Some(Duty {
            interval_s: interval?,
            cycles: cycles?,
            ambient_c: ambient?,
            film_coefficient_w_m2_k: film?,
            lift,
            magnets,
        })
    }

    /// `duty.lift`: exactly one of a constant `speed` and a `profile`.
    fn lift(&mut self, l: &RawLift) -> Option<LiftSpeed> {
        match (&l.speed, &l.profile) {
            (Some(v), None) => self
                .q_where(
                    v,
                    Kind::Speed,
                    "duty.lift.speed",
                    |v| v > 0.0,
                    "must be greater than zero (the lift hauls the vehicle back at this speed)",
                )
                .map(LiftSpeed::Constant),
            (None, Some(p)) => {
                if p.len() > bounds::MAX_LIFT_POINTS {
                    let l = p.first().and_then(|r| r.first()).map(|q| &q.referenced);
                    let message = format!(
                        "{} points: at most {} are accepted",
                        p.len(),
                        bounds::MAX_LIFT_POINTS
                    );
                    match l {
                        Some(l) => self.at(l, "duty.lift.profile", message),
                        None => self.push(None, "duty.lift.profile", message),
                    }
                    return None;
                }
                self.points(
                    p,
                    &PointList {
                        path: "duty.lift.profile",
                        shape: "each point is [front position, speed]",
                        coords: [
                            Coord {
                                kind: Kind::Length,
                                range: None,
                            },
                            Coord {
                                kind: Kind::Speed,
                                range: Some((
                                    |v| v > 0.0,
                                    "the lift speed must be greater than zero",
                                )),
                            },
                        ],
                        step: |(px, _), (x, _)| {
                            (x <= px).then(|| (0, "positions must increase strictly".to_string()))
                        },
                        min_points: 1,
                        too_few: (None, "duty.lift.profile", "at least one point is needed"),
                    },
                )
                .map(LiftSpeed::Profile)
            }
            (Some(v), Some(_)) => {
                self.at(
                    &v.referenced,
                    "duty.lift",
                    "give either `speed` or `profile`, not both",
                );
                None
            }
            (None, None) => {
                self.push(
                    None,
                    "duty.lift",
                    "give the lift's `speed` (e.g. `speed: 1.5 m/s`) or a `profile` of \
                     [front position, speed] points",
                );
                None
            }
        }
    }

    /// `duty.magnets`: film coefficients and emissivities with the defaults of
    /// [`defaults::MAGNET_EXPOSURE`].
    fn duty_magnets(&mut self, m: &RawDutyMagnets) -> Option<MagnetExposure> {
        let d = defaults::MAGNET_EXPOSURE;
        let mut film = |q: &Option<crate::scenario::raw::Q>, path: &str, default: f64| match q {
            Some(q) => self.non_negative(q, Kind::HeatTransfer, path),
            None => Some(default),
        };
        let gap = film(
            &m.gap_film_coefficient,
            "duty.magnets.gap_film_coefficient",
            d.gap_film_w_m2_k,
        );
        let air = film(
            &m.air_film_coefficient,
            "duty.magnets.air_film_coefficient",
            d.air_film_w_m2_k,
        );
        let mut emissivity = |q: &Option<crate::scenario::raw::Q>, path: &str, default: f64| match q
        {
            Some(q) => self.q_where(
                q,
                Kind::Ratio,
                path,
                |e| e > 0.0 && e <= 1.0,
                "an emissivity lies above 0 and at most 1",
            ),
            None => Some(default),
        };
        let fin = emissivity(
            &m.fin_emissivity,
            "duty.magnets.fin_emissivity",
            d.fin_emissivity,
        );
        let magnet = emissivity(
            &m.magnet_emissivity,
            "duty.magnets.magnet_emissivity",
            d.magnet_emissivity,
        );
        Some(MagnetExposure {
            gap_film_w_m2_k: gap?,
            air_film_w_m2_k: air?,
            fin_emissivity: fin?,
            magnet_emissivity: magnet?,
            add_to_magnet_temperature: m
                .add_to_magnet_temperature
                .unwrap_or(d.add_to_magnet_temperature),
        })
    }
}
