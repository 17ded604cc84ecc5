//! Cases: the nominal start, temperatures and resistance, listed cases (each a set of overrides
//! of the nominal one), and generated cases (`generate:` corners, one section out, backwards
//! entry).

use super::{loc, Validator};
use crate::scenario::raw::{RawCase, RawGenerate, RawResistance, RawStart, RawTemperatures, Q};
use crate::scenario::{cases, defaults, Case, CaseOrigin, Resistance, Section};
use crate::units::Kind;
use serde_saphyr::Spanned;

impl Validator {
    pub(super) fn resistance(
        &mut self,
        r: Option<&RawResistance>,
        base: Resistance,
        p: &str,
    ) -> Option<Resistance> {
        let Some(r) = r else { return Some(base) };
        let rolling = match &r.rolling {
            Some(q) => self.q_where(
                q,
                Kind::Ratio,
                &format!("{p}.rolling"),
                |x| (0.0..1.0).contains(&x),
                "must lie in [0, 1)",
            ),
            None => Some(base.rolling_coeff),
        };
        let drag = match &r.drag_area {
            Some(q) => self.non_negative(q, Kind::Area, &format!("{p}.drag_area")),
            None => Some(base.drag_area_m2),
        };
        let friction = match &r.friction {
            Some(q) => self.non_negative(q, Kind::Force, &format!("{p}.friction")),
            None => Some(base.friction_n),
        };
        Some(Resistance {
            rolling_coeff: rolling?,
            drag_area_m2: drag?,
            friction_n: friction?,
        })
    }

    pub(super) fn start(
        &mut self,
        s: Option<&RawStart>,
        base: Option<(f64, f64)>,
        p: &str,
        near: Option<(u64, u64)>,
    ) -> (Option<f64>, Option<f64>) {
        let pos = match (s.and_then(|s| s.position.as_ref()), base) {
            (Some(q), _) => self.q(q, Kind::Length, &format!("{p}.position")),
            (None, Some(b)) => Some(b.0),
            (None, None) => {
                self.push(
                    near,
                    &format!("{p}.position"),
                    "missing field (track position of the vehicle front at the start)",
                );
                None
            }
        };
        let speed = match (s.and_then(|s| s.speed.as_ref()), base) {
            (Some(q), _) => self.q(q, Kind::Speed, &format!("{p}.speed")),
            (None, Some(b)) => Some(b.1),
            (None, None) => Some(defaults::START_SPEED_M_S),
        };
        (pos, speed)
    }

    pub(super) fn temperatures(
        &mut self,
        t: Option<&RawTemperatures>,
    ) -> (Option<f64>, Option<f64>) {
        let d = defaults::TEMPERATURE_C;
        match t {
            None => (Some(d), Some(d)),
            Some(t) => (
                self.temperature(&t.fin, "temperatures.fin", d),
                self.temperature(&t.magnet, "temperatures.magnet", d),
            ),
        }
    }

    pub(super) fn section_index(
        &mut self,
        name: &Spanned<String>,
        sections: &[Section],
        path: &str,
    ) -> Vec<usize> {
        // A repeated section's base name disables every copy.
        let exact: Vec<usize> = sections
            .iter()
            .enumerate()
            .filter(|(_, s)| s.name == name.value)
            .map(|(i, _)| i)
            .collect();
        if !exact.is_empty() {
            return exact;
        }
        let copies: Vec<usize> = sections
            .iter()
            .enumerate()
            .filter(|(_, s)| {
                s.name
                    .strip_prefix(name.value.as_str())
                    .is_some_and(|rest| {
                        rest.starts_with('-') && rest[1..].chars().all(|c| c.is_ascii_digit())
                    })
            })
            .map(|(i, _)| i)
            .collect();
        if copies.is_empty() {
            let names: Vec<_> = sections.iter().map(|s| s.name.as_str()).collect();
            self.at(
                &name.referenced,
                path,
                format!(
                    "no section named '{}' (known: {})",
                    name.value,
                    names.join(", ")
                ),
            );
        }
        copies
    }

    pub(super) fn cases(
        &mut self,
        list: &[RawCase],
        nominal: &Case,
        sections: &[Section],
    ) -> Vec<Case> {
        let mut out: Vec<Case> = Vec::new();
        for (i, c) in list.iter().enumerate() {
            let p = format!("cases[{i}]");
            self.check_name(&c.name, &format!("{p}.name"));
            if out.iter().any(|o| o.name == c.name.value) {
                self.at(
                    &c.name.referenced,
                    &format!("{p}.name"),
                    format!("duplicate case name '{}'", c.name.value),
                );
            }
            let mass = match &c.mass {
                Some(q) => self.positive(q, Kind::Mass, &format!("{p}.mass")),
                None => Some(nominal.mass_kg),
            };
            let (pos, speed) = self.start(
                c.start.as_ref(),
                Some((nominal.start_position_m, nominal.start_speed_m_s)),
                &format!("{p}.start"),
                None,
            );
            let fin = self.temperature(&c.fin_temp, &format!("{p}.fin_temp"), nominal.fin_temp_c);
            let mag = self.temperature(
                &c.magnet_temp,
                &format!("{p}.magnet_temp"),
                nominal.magnet_temp_c,
            );
            let res = self.resistance(
                c.resistance.as_ref(),
                nominal.resistance,
                &format!("{p}.resistance"),
            );
            let mut disabled = Vec::new();
            for (k, d) in c.disabled.iter().flatten().enumerate() {
                disabled.extend(self.section_index(d, sections, &format!("{p}.disabled[{k}]")));
            }
            disabled.sort_unstable();
            disabled.dedup();
            if let (
                Some(mass_kg),
                Some(start_position_m),
                Some(start_speed_m_s),
                Some(fin_temp_c),
                Some(magnet_temp_c),
                Some(resistance),
            ) = (mass, pos, speed, fin, mag, res)
            {
                out.push(Case {
                    name: c.name.value.clone(),
                    origin: CaseOrigin::Listed,
                    mass_kg,
                    start_position_m,
                    start_speed_m_s,
                    start_in_zone: c
                        .start
                        .as_ref()
                        .and_then(|s| s.in_zone)
                        .unwrap_or(nominal.start_in_zone),
                    fin_temp_c,
                    magnet_temp_c,
                    disabled,
                    resistance,
                });
            }
        }
        out
    }

    pub(super) fn range(
        &mut self,
        r: &Option<Vec<Q>>,
        kind: Kind,
        p: &str,
    ) -> Option<Option<(f64, f64)>> {
        let Some(r) = r else { return Some(None) };
        if r.len() != 2 {
            self.push(
                r.first().and_then(|q| loc(&q.referenced)),
                p,
                "give [low, high]",
            );
            return None;
        }
        let lo = self.q(&r[0], kind, &format!("{p}[0]"))?;
        let hi = self.q(&r[1], kind, &format!("{p}[1]"))?;
        if lo > hi {
            self.at(&r[0].referenced, p, "low is above high");
            return None;
        }
        Some(Some((lo, hi)))
    }

    pub(super) fn generate(
        &mut self,
        g: &RawGenerate,
        listed: &[Case],
        nominal: &Case,
        sections: &[Section],
        zone_end_m: f64,
        vehicle_length_m: f64,
    ) -> Vec<Case> {
        let mut base: Vec<Case> = listed.to_vec();
        let mut out = Vec::new();
        let corners = (
            self.range(
                &g.corners.as_ref().and_then(|c| c.mass.clone()),
                Kind::Mass,
                "generate.corners.mass",
            ),
            self.range(
                &g.corners.as_ref().and_then(|c| c.fin_temp.clone()),
                Kind::Temperature,
                "generate.corners.fin_temp",
            ),
            self.range(
                &g.corners.as_ref().and_then(|c| c.magnet_temp.clone()),
                Kind::Temperature,
                "generate.corners.magnet_temp",
            ),
            self.range(
                &g.corners.as_ref().and_then(|c| c.speed.clone()),
                Kind::Speed,
                "generate.corners.speed",
            ),
        );
        if let (Some(m), Some(f), Some(t), Some(v)) = corners {
            if g.corners.is_some() {
                if m.is_some_and(|(lo, _)| lo <= 0.0) {
                    self.push(
                        None,
                        "generate.corners.mass",
                        "masses must be greater than zero",
                    );
                } else {
                    let c = cases::corners(nominal, m, f, t, v);
                    if c.is_empty() {
                        self.push(
                            None,
                            "generate.corners",
                            "give at least one range (mass, fin_temp, magnet_temp, speed)",
                        );
                    }
                    base.extend(c.iter().cloned());
                    out.extend(c);
                }
            }
        }
        if g.each_section_out == Some(true) || g.each_section_out_of.is_some() {
            let targets: Vec<Case> = match &g.each_section_out_of {
                None => base.clone(),
                Some(names) => names
                    .iter()
                    .enumerate()
                    .filter_map(|(i, n)| {
                        let c = base.iter().find(|c| c.name == n.value).cloned();
                        if c.is_none() {
                            self.at(
                                &n.referenced,
                                &format!("generate.each_section_out_of[{i}]"),
                                format!("no case named '{}'", n.value),
                            );
                        }
                        c
                    })
                    .collect(),
            };
            out.extend(cases::each_section_out(&targets, sections));
        }
        if let Some(r) = &g.rollback {
            let speed = self.positive(&r.speed, Kind::Speed, "generate.rollback.speed");
            let mass = match &r.mass {
                Some(q) => self.positive(q, Kind::Mass, "generate.rollback.mass"),
                None => Some(nominal.mass_kg),
            };
            // Given, or `None` for the default (the rear just downstream of the zone end).
            let position = match &r.position {
                Some(q) => self
                    .q(q, Kind::Length, "generate.rollback.position")
                    .map(Some),
                None => Some(None),
            };
            if let (Some(speed), Some(mass), Some(position)) = (speed, mass, position) {
                out.push(match position {
                    Some(p) => cases::rollback(nominal, speed, mass, p),
                    None => {
                        cases::default_rollback(nominal, speed, mass, zone_end_m, vehicle_length_m)
                    }
                });
            }
        }
        let mut names: Vec<&str> = listed.iter().map(|c| c.name.as_str()).collect();
        for c in &out {
            if names.contains(&c.name.as_str()) {
                self.push(
                    None,
                    "generate",
                    format!("generated case '{}' has the name of another case", c.name),
                );
            }
            names.push(&c.name);
        }
        out
    }

    /// A listed case (or the nominal start when no case is listed) must not start with a fin
    /// already over magnets, unless its start says `in_zone: true`: a vehicle placed inside the
    /// zone by mistake would skip the entry the checks judge.
    pub(super) fn starts_outside_zone(
        &mut self,
        raw: &crate::scenario::raw::RawScenario,
        nominal: &Case,
        cases: &[Case],
        fins: &[crate::scenario::Fin],
        sections: &[Section],
    ) {
        let over = |c: &Case| -> Option<(String, String)> {
            let x = c.start_position_m;
            let span = |m: crate::scenario::Mount, len: f64| match m {
                crate::scenario::Mount::Vehicle { offset_m } => (x - offset_m - len, x - offset_m),
                crate::scenario::Mount::Track { start_m } => (start_m, start_m + len),
            };
            fins.iter().find_map(|f| {
                let (a0, a1) = span(f.mount, f.length_m);
                sections
                    .iter()
                    .enumerate()
                    .filter(|(k, s)| s.lane == f.lane && !c.disabled.contains(k))
                    .find(|(_, s)| {
                        let (b0, b1) = span(s.mount, s.length_m);
                        a1.min(b1) - a0.max(b0) > 0.0
                    })
                    .map(|(_, s)| (f.name.clone(), s.name.clone()))
            })
        };
        let message = |c: &Case, fin: &str, sec: &str| {
            format!(
                "the vehicle starts with fin '{fin}' already over section '{sec}' (front at {} m): \
                 start it upstream of the zone, or give `in_zone: true` in this start block for a \
                 vehicle held inside the zone",
                c.start_position_m
            )
        };
        let nominal_near = raw
            .start
            .as_ref()
            .and_then(|s| s.position.as_ref())
            .and_then(|q| loc(&q.referenced));
        let mut nominal_reported = false;
        let listed: Vec<(usize, &RawCase)> = raw.cases.iter().flatten().enumerate().collect();
        if listed.is_empty() {
            if let (false, Some((f, s))) = (nominal.start_in_zone, over(nominal)) {
                self.push(nominal_near, "start.position", message(nominal, &f, &s));
            }
        }
        for (i, rc) in listed {
            let Some(c) = cases
                .iter()
                .find(|c| c.name == rc.name.value && c.origin == CaseOrigin::Listed)
            else {
                continue;
            };
            let Some((f, s)) = over(c).filter(|_| !c.start_in_zone) else {
                continue;
            };
            match rc.start.as_ref().and_then(|s| s.position.as_ref()) {
                Some(q) => self.push(
                    loc(&q.referenced),
                    &format!("cases[{i}].start.position"),
                    message(c, &f, &s),
                ),
                // The case takes the scenario's start: say it once, where it is written.
                None if !nominal_reported => {
                    nominal_reported = true;
                    self.push(nominal_near, "start.position", message(c, &f, &s));
                }
                None => {}
            }
        }
    }
}
