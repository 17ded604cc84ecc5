//! The validated model written back as scenario YAML (version 1): [`Scenario`] → the raw shapes
//! of [`super::raw`] → YAML through serde-saphyr's serializer, so reading and writing share one
//! schema.
//!
//! The file is self-contained: limits inline (no `limits_file`), every default explicit, repeats
//! expanded (one entry per copy, under the copy's name), custom materials listed. Generated cases
//! are written as the `generate:` block that makes them again (from each case's
//! [`CaseOrigin`]), not as listed cases. Quantities are written in SI with Rust's shortest
//! round-trip form of the number (`"0.009000000000000001 m"`), temperatures in °C, ratios as
//! plain numbers, limits kept in g in m/s² (m/s³ for onset). [`to_yaml`] reads its own text back
//! and returns it only when that gives the same model.
//!
//! Units other than SI: a [`Spelling`] may propose the text of any quantity (for example the unit
//! the user wrote); the writer takes it only when it reads back to exactly the model value, else
//! it writes SI. [`Si`] proposes nothing.

use super::raw::*;
use super::validate::{parse_str, ScenarioError};
use super::*;
use crate::materials;
use crate::units::{self, Kind};
use serde_saphyr::{Location, Spanned};
use std::collections::BTreeMap;

mod studies;

/// Errors of the writer.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// The serializer failed.
    #[error("cannot write the scenario as YAML: {0}")]
    Yaml(#[from] serde_saphyr::SerializeError),
    /// The written text is not a valid scenario.
    #[error("the written scenario does not read back: {0}")]
    Reread(#[source] ScenarioError),
    /// The written text reads back to a different model.
    #[error("the written scenario reads back with a different `{field}`")]
    NotFaithful {
        /// The first part of the model that differs.
        field: &'static str,
    },
}

/// Proposes the text of a quantity.
pub trait Spelling {
    /// Text for the quantity at field `path` (as in the written file, e.g.
    /// `sections[2].clearance`) of `kind`, whose value is `si` (SI; °C for temperatures), or
    /// `None` for SI.
    fn spell(&self, path: &str, kind: Kind, si: f64) -> Option<String>;
}

/// Every quantity in SI.
#[derive(Debug, Clone, Copy, Default)]
pub struct Si;

impl Spelling for Si {
    fn spell(&self, _path: &str, _kind: Kind, _si: f64) -> Option<String> {
        None
    }
}

/// The scenario as raw shapes, every quantity in SI.
pub fn to_raw(s: &Scenario) -> RawScenario {
    to_raw_with(s, &Si)
}

/// The scenario as raw shapes, quantities spelled by `spelling` where it reads back exactly.
pub fn to_raw_with(s: &Scenario, spelling: &dyn Spelling) -> RawScenario {
    Writer { spelling }.scenario(s)
}

/// The scenario as YAML text, every quantity in SI, checked to read back to the same model.
pub fn to_yaml(s: &Scenario) -> Result<String, WriteError> {
    to_yaml_with(s, &Si)
}

/// [`to_yaml`] with quantities spelled by `spelling` where it reads back exactly.
pub fn to_yaml_with(s: &Scenario, spelling: &dyn Spelling) -> Result<String, WriteError> {
    let body = serde_saphyr::to_string(&to_raw_with(s, spelling))?;
    let text = format!(
        "# Written by eddyzone {}: self-contained (limits inline, every default explicit).\n{body}",
        crate::VERSION
    );
    let back = parse_str(&text, "<written scenario>", None).map_err(WriteError::Reread)?;
    match first_difference(s, &back) {
        Some(field) => Err(WriteError::NotFaithful { field }),
        None => Ok(text),
    }
}

/// The first part of the model in which `a` and `b` differ (the file `path` is not compared).
pub fn first_difference(a: &Scenario, b: &Scenario) -> Option<&'static str> {
    let same = [
        ("name", a.name == b.name),
        ("description", a.description == b.description),
        ("arrangement", a.arrangement == b.arrangement),
        ("vehicle", a.vehicle == b.vehicle),
        ("fins", a.fins == b.fins),
        ("sections", a.sections == b.sections),
        ("track", a.track == b.track),
        ("nominal", a.nominal == b.nominal),
        ("cases", a.cases == b.cases),
        ("zone_end_m", a.zone_end_m == b.zone_end_m),
        ("zone_start_m", a.zone_start_m == b.zone_start_m),
        ("stall_speed_m_s", a.stall_speed_m_s == b.stall_speed_m_s),
        ("time_limit_s", a.time_limit_s == b.time_limit_s),
        ("solver", a.solver == b.solver),
        ("rider", a.rider == b.rider),
        ("limits", a.limits == b.limits),
        ("duty", a.duty == b.duty),
        ("plan", a.plan == b.plan),
        ("sweep", a.sweep == b.sweep),
    ];
    same.iter().find(|(_, eq)| !eq).map(|(f, _)| *f)
}

/// The SI value (m/s² or m/s³) of a limit kept in g: `g·g₀`, which [`in_g`] maps back to `g`
/// for every value the reader produces (they are `z/g₀` of some read `z`). A value set otherwise
/// may have no SI form that reads back exactly; [`to_yaml`] then reports `limits`.
fn si_of_g(g: f64) -> f64 {
    g * crate::constants::STANDARD_GRAVITY_M_S2
}

fn spanned<T>(value: T) -> Spanned<T> {
    Spanned::new(value, Location::UNKNOWN, Location::UNKNOWN)
}

struct Writer<'a> {
    spelling: &'a dyn Spelling,
}

impl Writer<'_> {
    /// A quantity of `kind` with the value `si` (SI; °C for temperatures) at `path`.
    fn q(&self, path: &str, kind: Kind, si: f64) -> Q {
        let proposed = self
            .spelling
            .spell(path, kind, si)
            .filter(|t| units::from_text(kind, t).is_ok_and(|x| x == si));
        spanned(match (proposed, kind) {
            (Some(t), _) => QuantityText::Text(t),
            (None, Kind::Ratio) => QuantityText::Number(si),
            (None, Kind::Temperature) => QuantityText::Text(format!("{si:?} °C")),
            (None, _) => QuantityText::Text(format!("{si:?} {}", kind.si_unit())),
        })
    }

    /// A limit the model keeps in g (or g/s), written as an SI acceleration (or onset).
    fn q_g(&self, path: &str, kind: Kind, g: f64) -> Q {
        self.q(path, kind, si_of_g(g))
    }

    fn pair(&self, path: &str, kinds: [Kind; 2], p: (f64, f64)) -> Vec<Q> {
        vec![
            self.q(&format!("{path}[0]"), kinds[0], p.0),
            self.q(&format!("{path}[1]"), kinds[1], p.1),
        ]
    }

    fn scenario(&self, s: &Scenario) -> RawScenario {
        let (vehicle_fins, track_fins, sections, magnets) = match s.arrangement {
            Arrangement::FinsOnVehicle => (
                Some(self.fins(&s.fins, "vehicle.fins")),
                None,
                Some(self.sections(&s.sections, "sections")),
                None,
            ),
            Arrangement::MagnetsOnVehicle => (
                None,
                Some(self.fins(&s.fins, "track.fins")),
                None,
                Some(self.sections(&s.sections, "vehicle.magnets")),
            ),
        };
        let n = &s.nominal;
        RawScenario {
            version: Some(spanned(1)),
            name: s.name.clone(),
            description: s.description.clone(),
            materials: custom_materials(&s.fins).map(|m| self.materials(&m)),
            vehicle: RawVehicle {
                mass: self.q("vehicle.mass", Kind::Mass, s.vehicle.mass_kg),
                length: self.q("vehicle.length", Kind::Length, s.vehicle.length_m),
                fins: vehicle_fins,
                magnets,
            },
            sections,
            track: Some(self.track(&s.track, track_fins)),
            resistance: Some(self.resistance(&n.resistance, "resistance")),
            start: Some(self.start(n, "start")),
            temperatures: Some(RawTemperatures {
                fin: Some(self.q("temperatures.fin", Kind::Temperature, n.fin_temp_c)),
                magnet: Some(self.q("temperatures.magnet", Kind::Temperature, n.magnet_temp_c)),
            }),
            cases: Some(self.listed_cases(s)),
            zone_end: Some(self.q("zone_end", Kind::Length, s.zone_end_m)),
            stall_speed: Some(self.q("stall_speed", Kind::Speed, s.stall_speed_m_s)),
            time_limit: Some(self.q("time_limit", Kind::Time, s.time_limit_s)),
            solver: Some(RawSolver {
                rtol: Some(spanned(s.solver.rtol)),
                atol: Some(spanned(s.solver.atol)),
            }),
            rider: Some(self.rider(&s.rider)),
            limits_file: None,
            limits: Some(self.limits(&s.limits)),
            generate: self.generate(s),
            duty: s.duty.as_ref().map(|d| self.duty(d)),
            plan: s.plan.as_ref().map(|p| self.plan(p)),
            sweep: s.sweep.as_ref().map(|w| self.sweep(w)),
        }
    }

    fn materials(&self, list: &[&materials::Material]) -> BTreeMap<String, RawMaterial> {
        list.iter()
            .map(|m| {
                let p = format!("materials.{}", m.name);
                let raw = RawMaterial {
                    conductivity: self.q(
                        &format!("{p}.conductivity"),
                        Kind::Conductivity,
                        m.conductivity_s_m,
                    ),
                    temp_coeff: self.q(
                        &format!("{p}.temp_coeff"),
                        Kind::TempCoefficient,
                        m.temp_coeff_per_k,
                    ),
                    density: self.q(&format!("{p}.density"), Kind::Density, m.density_kg_m3),
                    specific_heat: self.q(
                        &format!("{p}.specific_heat"),
                        Kind::SpecificHeat,
                        m.specific_heat_j_kg_k,
                    ),
                    source: Some(m.source.clone()),
                    softening: m
                        .softening_c
                        .map(|t| self.q(&format!("{p}.softening"), Kind::Temperature, t)),
                    solidus: m
                        .solidus_c
                        .map(|t| self.q(&format!("{p}.solidus"), Kind::Temperature, t)),
                };
                (m.name.clone(), raw)
            })
            .collect()
    }

    /// `offset` (on the vehicle) or `start` (along the track).
    fn mount(&self, m: Mount, p: &str) -> (Option<Q>, Option<Q>) {
        match m {
            Mount::Vehicle { offset_m } => (
                Some(self.q(&format!("{p}.offset"), Kind::Length, offset_m)),
                None,
            ),
            Mount::Track { start_m } => (
                None,
                Some(self.q(&format!("{p}.start"), Kind::Length, start_m)),
            ),
        }
    }

    fn fins(&self, fins: &[Fin], path: &str) -> Vec<RawFin> {
        fins.iter()
            .enumerate()
            .map(|(i, f)| {
                let p = format!("{path}[{i}]");
                let (offset, start) = self.mount(f.mount, &p);
                RawFin {
                    name: spanned(f.name.clone()),
                    offset,
                    start,
                    length: self.q(&format!("{p}.length"), Kind::Length, f.length_m),
                    height: self.q(&format!("{p}.height"), Kind::Length, f.height_m),
                    thickness: self.q(&format!("{p}.thickness"), Kind::Length, f.thickness_m),
                    material: spanned(f.material.name.clone()),
                    lane: Some(f.lane.clone()),
                    repeat: None,
                }
            })
            .collect()
    }

    /// A section without name or placement: its length, force law, coefficient and grade.
    fn section_body(
        &self,
        name: &str,
        length_m: f64,
        force: &ForceSource,
        beta: f64,
        grade: Option<MagnetGrade>,
        p: &str,
    ) -> RawSection {
        let design = |f: &str, kind: Kind, x: f64| Some(self.q(&format!("{p}.{f}"), kind, x));
        let (d, force_curve) = match force {
            ForceSource::Model(d) => (Some(d), None),
            ForceSource::Measured(m) => (None, Some(self.force_curve(m, p))),
        };
        RawSection {
            name: spanned(name.to_string()),
            start: None,
            offset: None,
            length: self.q(&format!("{p}.length"), Kind::Length, length_m),
            pole_pitch: d.and_then(|d| design("pole_pitch", Kind::Length, d.pole_pitch_m)),
            magnet_thickness: d
                .and_then(|d| design("magnet_thickness", Kind::Length, d.magnet_thickness_m)),
            magnet_fill: d.and_then(|d| design("magnet_fill", Kind::Ratio, d.magnet_fill)),
            remanence: d.and_then(|d| design("remanence", Kind::FluxDensity, d.remanence_t)),
            remanence_temp_coeff: Some(self.q(
                &format!("{p}.remanence_temp_coeff"),
                Kind::TempCoefficient,
                beta,
            )),
            clearance: d.and_then(|d| design("clearance", Kind::Length, d.clearance_m)),
            pole_height: d.and_then(|d| design("pole_height", Kind::Length, d.pole_height_m)),
            fin_offset: d
                .filter(|d| d.fin_offset_m != defaults::FIN_OFFSET_M)
                .and_then(|d| design("fin_offset", Kind::Length, d.fin_offset_m)),
            grade: grade.map(|g| spanned(g.name())),
            force_curve,
            lane: None,
            repeat: None,
        }
    }

    fn force_curve(&self, m: &MeasuredForce, p: &str) -> RawForceCurve {
        let p = format!("{p}.force_curve");
        RawForceCurve {
            fin_temp: self.q(&format!("{p}.fin_temp"), Kind::Temperature, m.fin_temp_c),
            magnet_temp: Some(self.q(
                &format!("{p}.magnet_temp"),
                Kind::Temperature,
                m.magnet_temp_c,
            )),
            points: m
                .points
                .iter()
                .enumerate()
                .map(|(i, &pt)| {
                    self.pair(
                        &format!("{p}.points[{i}]"),
                        [Kind::Speed, Kind::ForcePerLength],
                        pt,
                    )
                })
                .collect(),
        }
    }

    fn sections(&self, sections: &[Section], path: &str) -> Vec<RawSection> {
        sections
            .iter()
            .enumerate()
            .map(|(i, s)| {
                let p = format!("{path}[{i}]");
                let (offset, start) = self.mount(s.mount, &p);
                RawSection {
                    offset,
                    start,
                    lane: Some(s.lane.clone()),
                    ..self.section_body(
                        &s.name,
                        s.length_m,
                        &s.force,
                        s.remanence_temp_coeff_per_k,
                        s.grade,
                        &p,
                    )
                }
            })
            .collect()
    }

    fn track(&self, t: &Track, fins: Option<Vec<RawFin>>) -> RawTrack {
        let (grade, profile) = match &t.gravity {
            Gravity::Grade { slope } => (Some(self.q("track.grade", Kind::Ratio, *slope)), None),
            Gravity::Profile { points } => (
                None,
                Some(
                    points
                        .iter()
                        .enumerate()
                        .map(|(i, &pt)| {
                            self.pair(
                                &format!("track.profile[{i}]"),
                                [Kind::Length, Kind::Length],
                                pt,
                            )
                        })
                        .collect(),
                ),
            ),
        };
        RawTrack {
            grade,
            angle: None,
            profile,
            air_density: Some(self.q("track.air_density", Kind::Density, t.air_density_kg_m3)),
            fins,
        }
    }

    fn resistance(&self, r: &Resistance, p: &str) -> RawResistance {
        RawResistance {
            rolling: Some(self.q(&format!("{p}.rolling"), Kind::Ratio, r.rolling_coeff)),
            drag_area: Some(self.q(&format!("{p}.drag_area"), Kind::Area, r.drag_area_m2)),
            friction: Some(self.q(&format!("{p}.friction"), Kind::Force, r.friction_n)),
        }
    }

    fn start(&self, c: &Case, p: &str) -> RawStart {
        RawStart {
            position: Some(self.q(&format!("{p}.position"), Kind::Length, c.start_position_m)),
            speed: Some(self.q(&format!("{p}.speed"), Kind::Speed, c.start_speed_m_s)),
            in_zone: c.start_in_zone.then_some(true),
        }
    }

    /// The listed cases with every value explicit, `disabled` by section name.
    fn listed_cases(&self, s: &Scenario) -> Vec<RawCase> {
        s.cases
            .iter()
            .filter(|c| c.origin == CaseOrigin::Listed)
            .enumerate()
            .map(|(i, c)| {
                let p = format!("cases[{i}]");
                let disabled: Vec<Spanned<String>> = c
                    .disabled
                    .iter()
                    .filter_map(|&k| s.sections.get(k).map(|x| spanned(x.name.clone())))
                    .collect();
                RawCase {
                    name: spanned(c.name.clone()),
                    description: None,
                    mass: Some(self.q(&format!("{p}.mass"), Kind::Mass, c.mass_kg)),
                    start: Some(self.start(c, &format!("{p}.start"))),
                    fin_temp: Some(self.q(
                        &format!("{p}.fin_temp"),
                        Kind::Temperature,
                        c.fin_temp_c,
                    )),
                    magnet_temp: Some(self.q(
                        &format!("{p}.magnet_temp"),
                        Kind::Temperature,
                        c.magnet_temp_c,
                    )),
                    disabled: (!disabled.is_empty()).then_some(disabled),
                    resistance: Some(self.resistance(&c.resistance, &format!("{p}.resistance"))),
                    force_factor: (c.force_factor != defaults::FORCE_FACTOR)
                        .then(|| self.q(&format!("{p}.force_factor"), Kind::Ratio, c.force_factor)),
                }
            })
            .collect()
    }

    /// The `generate:` block that makes the generated cases again, from their origins.
    fn generate(&self, s: &Scenario) -> Option<RawGenerate> {
        let mut bases: Vec<&str> = Vec::new();
        let mut corners = None;
        let mut rollback = None;
        for c in &s.cases {
            match &c.origin {
                CaseOrigin::Listed => {}
                CaseOrigin::SectionOut { base, .. } => {
                    if !bases.contains(&base.as_str()) {
                        bases.push(base);
                    }
                }
                CaseOrigin::Corner { factors } => {
                    corners = corners.or_else(|| Some(self.corners(factors)));
                }
                CaseOrigin::Rollback {
                    speed_m_s,
                    default_position,
                } => {
                    rollback = rollback.or_else(|| {
                        Some(RawRollback {
                            speed: self.q("generate.rollback.speed", Kind::Speed, *speed_m_s),
                            mass: Some(self.q("generate.rollback.mass", Kind::Mass, c.mass_kg)),
                            position: (!default_position).then(|| {
                                self.q(
                                    "generate.rollback.position",
                                    Kind::Length,
                                    c.start_position_m,
                                )
                            }),
                        })
                    });
                }
            }
        }
        if bases.is_empty() && corners.is_none() && rollback.is_none() {
            return None;
        }
        Some(RawGenerate {
            each_section_out: None,
            each_section_out_of: (!bases.is_empty())
                .then(|| bases.iter().map(|b| spanned(b.to_string())).collect()),
            corners,
            rollback,
        })
    }

    fn corners(&self, factors: &[CornerLevel]) -> RawCorners {
        let range = |factor: CornerFactor, kind: Kind| {
            factors.iter().find(|f| f.factor == factor).map(|f| {
                let p = format!("generate.corners.{}", factor.key());
                vec![
                    self.q(&format!("{p}[0]"), kind, f.low),
                    self.q(&format!("{p}[1]"), kind, f.high),
                ]
            })
        };
        RawCorners {
            mass: range(CornerFactor::Mass, Kind::Mass),
            fin_temp: range(CornerFactor::FinTemp, Kind::Temperature),
            magnet_temp: range(CornerFactor::MagnetTemp, Kind::Temperature),
            speed: range(CornerFactor::Speed, Kind::Speed),
        }
    }

    fn rider(&self, r: &Rider) -> RawRider {
        let filter = match r.filter {
            None => RawFilter {
                enabled: Some(false),
                corner_hz: None,
                order: None,
                sample_rate_hz: None,
                phase: None,
            },
            Some(f) => RawFilter {
                enabled: None,
                corner_hz: Some(spanned(f.corner_hz)),
                order: Some(spanned(u32::try_from(f.order).unwrap_or(u32::MAX))),
                sample_rate_hz: Some(spanned(f.sample_rate_hz)),
                phase: Some(spanned(
                    match f.phase {
                        FilterPhase::Zero => "zero",
                        FilterPhase::Causal => "causal",
                    }
                    .to_string(),
                )),
            },
        };
        RawRider {
            track_axis: spanned(r.track_axis.name().to_string()),
            passengers: (!r.passengers).then_some(false),
            filter: Some(filter),
            rates: Some(RawRates {
                window: Some(self.q("rider.rates.window", Kind::Time, r.rates.window_s)),
                signal: Some(spanned(
                    match r.rates.signal {
                        RateSignal::Filtered => "filtered",
                        RateSignal::Raw => "raw",
                    }
                    .to_string(),
                )),
            }),
        }
    }

    fn limits(&self, l: &Limits) -> RawLimits {
        const AXES: [&str; 3] = ["x", "y", "z"];
        let peak = axes(std::array::from_fn(|k| {
            let p = &l.peak[k];
            let at = |end: &str, g: Option<f64>| {
                g.map(|g| {
                    let path = format!("limits.peak.{}.{end}", AXES[k]);
                    self.q_g(&path, Kind::Acceleration, g)
                })
            };
            (p.max_g.is_some() || p.min_g.is_some()).then(|| RawSignedLimit {
                max: at("max", p.max_g),
                min: at("min", p.min_g),
            })
        }));
        let envelope = axes(std::array::from_fn(|k| {
            let e = &l.envelope[k];
            let side = |name: &str, pts: &Option<Vec<(f64, f64)>>| {
                pts.as_ref().map(|pts| {
                    pts.iter()
                        .enumerate()
                        .map(|(i, &(d, g))| {
                            let p = format!("limits.envelope.{}.{name}[{i}]", AXES[k]);
                            vec![
                                self.q(&format!("{p}[0]"), Kind::Time, d),
                                self.q_g(&format!("{p}[1]"), Kind::Acceleration, g),
                            ]
                        })
                        .collect()
                })
            };
            (e.positive.is_some() || e.negative.is_some()).then(|| RawSignedEnvelope {
                positive: side("positive", &e.positive),
                negative: side("negative", &e.negative),
            })
        }));
        let exit = |end: &str, v: Option<f64>| {
            v.map(|v| self.q(&format!("limits.exit_speed.{end}"), Kind::Speed, v))
        };
        RawLimits {
            source: l.source.clone(),
            peak,
            envelope,
            onset: l.onset_g_s.map(|g| self.q_g("limits.onset", Kind::Jerk, g)),
            release: l
                .release_g_s
                .map(|g| self.q_g("limits.release", Kind::Jerk, g)),
            combined: (!l.combined.is_empty()).then(|| {
                l.combined
                    .iter()
                    .enumerate()
                    .map(|(i, c)| {
                        let mut sides: [Option<RawSides>; 3] = [None, None, None];
                        for (k, a) in c.axes.iter().enumerate() {
                            let p = format!("limits.combined[{i}].{}", a.name());
                            sides[*a as usize] = Some(RawSides {
                                negative: self.q_g(
                                    &format!("{p}.negative"),
                                    Kind::Acceleration,
                                    c.semi_g[k][0],
                                ),
                                positive: self.q_g(
                                    &format!("{p}.positive"),
                                    Kind::Acceleration,
                                    c.semi_g[k][1],
                                ),
                            });
                        }
                        let [x, y, z] = sides;
                        RawAxes { x, y, z }
                    })
                    .collect()
            }),
            exit_speed: (l.exit_speed_min_m_s.is_some() || l.exit_speed_max_m_s.is_some()).then(
                || RawWindow {
                    min: exit("min", l.exit_speed_min_m_s),
                    max: exit("max", l.exit_speed_max_m_s),
                },
            ),
            max_duration: l
                .max_duration_s
                .map(|t| self.q("limits.max_duration", Kind::Time, t)),
            stop_position: (l.stop_position_min_m.is_some() || l.stop_position_max_m.is_some())
                .then(|| RawWindow {
                    min: l
                        .stop_position_min_m
                        .map(|v| self.q("limits.stop_position.min", Kind::Length, v)),
                    max: l
                        .stop_position_max_m
                        .map(|v| self.q("limits.stop_position.max", Kind::Length, v)),
                }),
            allow_stall: Some(l.allow_stall),
            allow_rollback: Some(l.allow_rollback),
            max_fin_temperature: l
                .max_fin_temperature_c
                .map(|t| self.q("limits.max_fin_temperature", Kind::Temperature, t)),
            max_magnet_temperature: l
                .max_magnet_temperature_c
                .map(|t| self.q("limits.max_magnet_temperature", Kind::Temperature, t)),
        }
    }
}

/// Materials of the fins that are not built in (or differ from the built-in of that name),
/// each once; `None` when there are none.
fn custom_materials(fins: &[Fin]) -> Option<Vec<&materials::Material>> {
    let mut out: Vec<&materials::Material> = Vec::new();
    for f in fins {
        let builtin = materials::find_builtin(&f.material.name).is_some_and(|b| b == f.material);
        if !builtin && !out.iter().any(|m| m.name == f.material.name) {
            out.push(&f.material);
        }
    }
    (!out.is_empty()).then_some(out)
}

/// The per-axis entries, `None` when no axis has one.
fn axes<T>(items: [Option<T>; 3]) -> Option<RawAxes<T>> {
    let [x, y, z] = items;
    let any = x.is_some() || y.is_some() || z.is_some();
    any.then_some(RawAxes { x, y, z })
}
