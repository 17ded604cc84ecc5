//! The duty block: repeated dispatches with Newton cooling between them.

use super::Validator;
use crate::scenario::bounds;
use crate::scenario::raw::{CyclesText, RawDuty};
use crate::scenario::{defaults, Cycles, Duty};
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
        Some(Duty {
            interval_s: interval?,
            cycles: cycles?,
            ambient_c: ambient?,
            film_coefficient_w_m2_k: film?,
        })
    }
}
