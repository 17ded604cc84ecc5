//! Raw YAML shapes → the validated `Scenario` in SI. Every problem names the file, the
//! `line:column` where known and the field path; all problems of a file are reported together.

use super::raw::*;
use super::*;
use crate::materials::{self, Material};
use crate::units::{self, Kind};
use serde_saphyr::Spanned;
use std::cell::RefCell;
use std::collections::BTreeMap;
use std::fmt;

/// One problem in a scenario file.
#[derive(Debug, Clone, PartialEq)]
pub struct Issue {
    /// Field path, e.g. `sections[2].clearance`.
    pub path: String,
    /// 1-based line and column, when known.
    pub location: Option<(u64, u64)>,
    /// What is wrong.
    pub message: String,
}

/// Errors of the scenario layer.
#[derive(Debug, thiserror::Error)]
pub enum ScenarioError {
    /// The file could not be read.
    #[error("{file}: cannot read the scenario: {source}")]
    Io {
        /// The file.
        file: String,
        /// Cause.
        source: std::io::Error,
    },
    /// The file is not a valid scenario.
    #[error("{}", format_issues(file, issues))]
    Invalid {
        /// The file.
        file: String,
        /// Every problem found.
        issues: Vec<Issue>,
    },
}

fn format_issues(file: &str, issues: &[Issue]) -> String {
    issues
        .iter()
        .map(|i| {
            let at = match i.location {
                Some((l, c)) => format!("{file}:{l}:{c}"),
                None => file.to_string(),
            };
            format!("{at}: {}: {}", i.path, i.message)
        })
        .collect::<Vec<_>>()
        .join("\n")
}

impl fmt::Display for Issue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.path, self.message)
    }
}

/// Reads and validates a scenario file. A `limits_file` is read relative to it.
pub fn load(path: &Path) -> Result<Scenario, ScenarioError> {
    let file = path.display().to_string();
    let text = std::fs::read_to_string(path).map_err(|source| ScenarioError::Io {
        file: file.clone(),
        source,
    })?;
    let mut s = parse_str(&text, &file, path.parent())?;
    s.path = Some(path.to_path_buf());
    Ok(s)
}

/// Parses YAML into any serde shape, keeping the field path and line:column of the first error.
pub fn parse_yaml<T: serde::de::DeserializeOwned>(
    text: &str,
    file: &str,
) -> Result<T, ScenarioError> {
    let path = RefCell::new(String::new());
    let result: Result<T, serde_saphyr::Error> =
        serde_saphyr::with_deserializer_from_str(text, |de| {
            serde_path_to_error::deserialize(de).map_err(|e| {
                *path.borrow_mut() = e.path().to_string();
                e.into_inner()
            })
        });
    result.map_err(|e| {
        let location = e.location().map(|l| (l.line(), l.column()));
        let message = e.to_string();
        // The crate's message starts with "error: line L column C: " and may carry a snippet.
        let first = message.lines().next().unwrap_or("").trim();
        let first = first.strip_prefix("error: ").unwrap_or(first);
        let first = match first.find(": ") {
            Some(i) if first.starts_with("line ") => &first[i + 2..],
            _ => first,
        };
        let mut p = path.into_inner().replace(".value", "");
        if p.is_empty() || p == "." {
            p = "(document)".into();
        }
        ScenarioError::Invalid {
            file: file.to_string(),
            issues: vec![Issue {
                path: p,
                location,
                message: first.to_string(),
            }],
        }
    })
}

/// Parses and validates scenario text. `base` is where a `limits_file` is looked up.
pub fn parse_str(text: &str, file: &str, base: Option<&Path>) -> Result<Scenario, ScenarioError> {
    let raw: RawScenario = parse_yaml(text, file)?;
    let mut v = Validator::default();
    let file_limits = match &raw.limits_file {
        Some(lf) => {
            let p = base.unwrap_or(Path::new(".")).join(&lf.value);
            match std::fs::read_to_string(&p) {
                Ok(t) => {
                    let lf_name = p.display().to_string();
                    let raw_limits: RawLimitsFile = parse_yaml(&t, &lf_name)?;
                    Some((raw_limits.limits, lf_name))
                }
                Err(e) => {
                    v.at(
                        &lf.referenced,
                        "limits_file",
                        format!("cannot read '{}': {e}", p.display()),
                    );
                    None
                }
            }
        }
        None => None,
    };
    let scenario = v.scenario(&raw, file_limits);
    match scenario {
        Some(s) if v.issues.is_empty() => Ok(s),
        _ => Err(ScenarioError::Invalid {
            file: file.to_string(),
            issues: v.issues,
        }),
    }
}

/// A limit set file: `limits:` at the top, and nothing else but a name.
#[derive(Debug, serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLimitsFile {
    #[allow(dead_code)]
    name: Option<String>,
    limits: RawLimits,
}

#[derive(Default)]
struct Validator {
    issues: Vec<Issue>,
}

fn loc(l: &serde_saphyr::Location) -> Option<(u64, u64)> {
    (l.line() > 0).then(|| (l.line(), l.column()))
}

impl Validator {
    fn push(&mut self, location: Option<(u64, u64)>, path: &str, message: impl Into<String>) {
        self.issues.push(Issue {
            path: path.to_string(),
            location,
            message: message.into(),
        });
    }

    fn at(&mut self, l: &serde_saphyr::Location, path: &str, message: impl Into<String>) {
        self.push(loc(l), path, message);
    }

    /// Any finite value of the kind.
    fn q(&mut self, q: &Q, kind: Kind, path: &str) -> Option<f64> {
        let r = match &q.value {
            QuantityText::Number(n) => units::from_number(kind, *n),
            QuantityText::Text(t) => units::from_text(kind, t),
        };
        match r {
            Ok(x) => Some(x),
            Err(e) => {
                self.at(&q.referenced, path, e.to_string());
                None
            }
        }
    }

    /// A value that must satisfy `ok`, else `what` is reported.
    fn q_where(
        &mut self,
        q: &Q,
        kind: Kind,
        path: &str,
        ok: impl Fn(f64) -> bool,
        what: &str,
    ) -> Option<f64> {
        let x = self.q(q, kind, path)?;
        if ok(x) {
            Some(x)
        } else {
            self.at(
                &q.referenced,
                path,
                format!("{what} (got {x} {})", kind.si_unit()),
            );
            None
        }
    }

    fn positive(&mut self, q: &Q, kind: Kind, path: &str) -> Option<f64> {
        self.q_where(q, kind, path, |x| x > 0.0, "must be greater than zero")
    }

    fn non_negative(&mut self, q: &Q, kind: Kind, path: &str) -> Option<f64> {
        self.q_where(q, kind, path, |x| x >= 0.0, "must not be negative")
    }

    fn opt_positive(&mut self, q: &Option<Q>, kind: Kind, path: &str, default: f64) -> Option<f64> {
        match q {
            Some(q) => self.positive(q, kind, path),
            None => Some(default),
        }
    }

    fn required<'a, T>(
        &mut self,
        x: &'a Option<T>,
        path: &str,
        near: Option<(u64, u64)>,
    ) -> Option<&'a T> {
        if x.is_none() {
            self.push(near, path, "missing field");
        }
        x.as_ref()
    }

    fn scenario(
        &mut self,
        raw: &RawScenario,
        file_limits: Option<(RawLimits, String)>,
    ) -> Option<Scenario> {
        if let Some(ver) = &raw.version {
            if ver.value != 1 {
                self.at(
                    &ver.referenced,
                    "version",
                    format!(
                        "unsupported version {} (this eddyzone reads version 1)",
                        ver.value
                    ),
                );
            }
        }
        let materials = self.materials(&raw.materials);
        let mass_kg = self.positive(&raw.vehicle.mass, Kind::Mass, "vehicle.mass");
        let length_m = self.positive(&raw.vehicle.length, Kind::Length, "vehicle.length");
        let vloc = loc(&raw.vehicle.mass.referenced);

        let track_fins = raw.track.as_ref().and_then(|t| t.fins.as_ref());
        let arrangement = match (
            &raw.vehicle.fins,
            &raw.sections,
            &raw.vehicle.magnets,
            track_fins,
        ) {
            (Some(_), Some(_), None, None) => Some(Arrangement::FinsOnVehicle),
            (None, None, Some(_), Some(_)) => Some(Arrangement::MagnetsOnVehicle),
            _ => {
                self.push(
                    vloc,
                    "vehicle",
                    "exactly one arrangement per scenario: either `vehicle.fins` with `sections` (fins on the \
                     vehicle, magnets along the track) or `vehicle.magnets` with `track.fins` (magnets on the \
                     vehicle, fins along the track)",
                );
                None
            }
        };
        let arrangement = arrangement?;
        let (fins, sections) = match arrangement {
            Arrangement::FinsOnVehicle => (
                self.fins(
                    raw.vehicle.fins.as_deref().unwrap_or(&[]),
                    "vehicle.fins",
                    true,
                    &materials,
                ),
                self.sections(raw.sections.as_deref().unwrap_or(&[]), "sections", false),
            ),
            Arrangement::MagnetsOnVehicle => (
                self.fins(
                    track_fins.map(|v| v.as_slice()).unwrap_or(&[]),
                    "track.fins",
                    false,
                    &materials,
                ),
                self.sections(
                    raw.vehicle.magnets.as_deref().unwrap_or(&[]),
                    "vehicle.magnets",
                    true,
                ),
            ),
        };
        if fins.is_empty() {
            self.push(
                vloc,
                if arrangement == Arrangement::FinsOnVehicle {
                    "vehicle.fins"
                } else {
                    "track.fins"
                },
                "at least one fin is needed",
            );
        }
        if sections.is_empty() {
            self.push(
                vloc,
                if arrangement == Arrangement::FinsOnVehicle {
                    "sections"
                } else {
                    "vehicle.magnets"
                },
                "at least one magnet section is needed",
            );
        }
        if let Some(len) = length_m {
            self.vehicle_elements_fit(raw, arrangement, &fins, &sections, len);
        }

        let track = self.track(raw.track.as_ref());
        let nominal_res =
            self.resistance(raw.resistance.as_ref(), Resistance::default(), "resistance");
        let (start_position_m, start_speed_m_s) =
            self.start(raw.start.as_ref(), None, "start", vloc);
        let (fin_temp_c, magnet_temp_c) = self.temperatures(raw.temperatures.as_ref());

        // Extent of the zone along the track: track elements' span.
        let track_spans: Vec<(f64, f64)> = match arrangement {
            Arrangement::FinsOnVehicle => sections
                .iter()
                .filter_map(|s| track_span(s.mount, s.length_m))
                .collect(),
            Arrangement::MagnetsOnVehicle => fins
                .iter()
                .filter_map(|f| track_span(f.mount, f.length_m))
                .collect(),
        };
        let zone_start_m = track_spans
            .iter()
            .map(|s| s.0)
            .fold(f64::INFINITY, f64::min);
        let last_end = track_spans
            .iter()
            .map(|s| s.1)
            .fold(f64::NEG_INFINITY, f64::max);
        let zone_end_m = match &raw.zone_end {
            Some(q) => self.q(q, Kind::Length, "zone_end"),
            None => Some(last_end),
        };
        let stall_speed_m_s = self.opt_positive(&raw.stall_speed, Kind::Speed, "stall_speed", 0.05);
        let time_limit_s = self.opt_positive(&raw.time_limit, Kind::Time, "time_limit", 300.0);
        let solver = self.solver(raw.solver.as_ref());
        let rider = self.rider(raw.rider.as_ref(), &track);

        let mut limits = Limits::default();
        if let Some((fl, name)) = &file_limits {
            let mut sub = Validator::default();
            sub.limits(fl, &mut limits);
            for mut i in sub.issues {
                i.path = format!("{name}: limits.{}", i.path.trim_start_matches("limits."));
                self.issues.push(i);
            }
        }
        if let Some(rl) = &raw.limits {
            self.limits(rl, &mut limits);
        }
        let duty = raw.duty.as_ref().and_then(|d| self.duty(d));
        let plan = raw.plan.as_ref().and_then(|p| self.plan(p, arrangement));

        let mass_kg = mass_kg?;
        let vehicle = Vehicle {
            mass_kg,
            length_m: length_m?,
        };
        let nominal = Case {
            name: "nominal".into(),
            origin: CaseOrigin::Listed,
            mass_kg,
            start_position_m: start_position_m?,
            start_speed_m_s: start_speed_m_s?,
            fin_temp_c: fin_temp_c?,
            magnet_temp_c: magnet_temp_c?,
            disabled: vec![],
            resistance: nominal_res?,
        };
        let mut cases = match &raw.cases {
            None => vec![nominal.clone()],
            Some(list) => self.cases(list, &nominal, &sections),
        };
        let zone_end_m = zone_end_m?;
        if !zone_start_m.is_finite() || !zone_end_m.is_finite() {
            return None;
        }
        if let Some(g) = &raw.generate {
            let generated =
                self.generate(g, &cases, &nominal, &sections, zone_end_m, vehicle.length_m);
            cases.extend(generated);
        }
        Some(Scenario {
            name: raw.name.clone(),
            description: raw.description.clone(),
            path: None,
            arrangement,
            vehicle,
            fins,
            sections,
            track: track?,
            cases,
            zone_end_m,
            zone_start_m,
            stall_speed_m_s: stall_speed_m_s?,
            time_limit_s: time_limit_s?,
            solver: solver?,
            rider: rider?,
            limits,
            duty,
            plan,
        })
    }

    fn materials(&mut self, raw: &Option<BTreeMap<String, RawMaterial>>) -> Vec<Material> {
        let mut out = materials::builtin();
        for (name, m) in raw.iter().flatten() {
            let p = format!("materials.{name}");
            let conductivity = self.positive(
                &m.conductivity,
                Kind::Conductivity,
                &format!("{p}.conductivity"),
            );
            let temp_coeff = self.q_where(
                &m.temp_coeff,
                Kind::TempCoefficient,
                &format!("{p}.temp_coeff"),
                |a| a > -0.01 && a < 0.1,
                "must lie between -0.01 and 0.1 1/K",
            );
            let density = self.positive(&m.density, Kind::Density, &format!("{p}.density"));
            let specific_heat = self.positive(
                &m.specific_heat,
                Kind::SpecificHeat,
                &format!("{p}.specific_heat"),
            );
            if out.iter().any(|b| &b.name == name) {
                self.at(
                    &m.conductivity.referenced,
                    &p,
                    format!("'{name}' is a built-in material name; choose another"),
                );
                continue;
            }
            if let (Some(c), Some(a), Some(d), Some(h)) =
                (conductivity, temp_coeff, density, specific_heat)
            {
                out.push(Material {
                    name: name.clone(),
                    conductivity_s_m: c,
                    temp_coeff_per_k: a,
                    density_kg_m3: d,
                    specific_heat_j_kg_k: h,
                    source: m.source.clone().unwrap_or_else(|| "scenario input".into()),
                });
            }
        }
        out
    }

    fn mount(
        &mut self,
        offset: &Option<Q>,
        start: &Option<Q>,
        on_vehicle: bool,
        path: &str,
        near: Option<(u64, u64)>,
    ) -> Option<Mount> {
        match (on_vehicle, offset, start) {
            (true, Some(o), None) => self
                .non_negative(o, Kind::Length, &format!("{path}.offset"))
                .map(|offset_m| Mount::Vehicle { offset_m }),
            (false, None, Some(s)) => self
                .q(s, Kind::Length, &format!("{path}.start"))
                .map(|start_m| Mount::Track { start_m }),
            (true, _, Some(s)) => {
                self.at(&s.referenced, &format!("{path}.start"), "an element on the vehicle is placed by `offset` (vehicle front to its leading edge), not `start`");
                None
            }
            (false, Some(o), _) => {
                self.at(&o.referenced, &format!("{path}.offset"), "an element along the track is placed by `start` (its upstream end), not `offset`");
                None
            }
            (true, None, None) => {
                self.push(near, &format!("{path}.offset"), "missing field");
                None
            }
            (false, None, None) => {
                self.push(near, &format!("{path}.start"), "missing field");
                None
            }
        }
    }

    /// Copies of a repeat: (suffix, shift along the track).
    fn repeats(
        &mut self,
        r: &Option<RawRepeat>,
        length_m: Option<f64>,
        path: &str,
    ) -> Vec<(String, f64)> {
        let Some(r) = r else {
            return vec![(String::new(), 0.0)];
        };
        let count = r.count.value;
        if count == 0 || count > 10_000 {
            self.at(
                &r.count.referenced,
                &format!("{path}.repeat.count"),
                "must be between 1 and 10000",
            );
            return vec![];
        }
        let Some(pitch) = self.positive(&r.pitch, Kind::Length, &format!("{path}.repeat.pitch"))
        else {
            return vec![];
        };
        if let Some(len) = length_m {
            if count > 1 && pitch < len {
                self.at(
                    &r.pitch.referenced,
                    &format!("{path}.repeat.pitch"),
                    format!("copies overlap: pitch {pitch} m is shorter than the length {len} m"),
                );
                return vec![];
            }
        }
        if count == 1 {
            return vec![(String::new(), 0.0)];
        }
        (0..count)
            .map(|i| (format!("-{}", i + 1), pitch * f64::from(i)))
            .collect()
    }

    fn fins(
        &mut self,
        raw: &[RawFin],
        path: &str,
        on_vehicle: bool,
        mats: &[Material],
    ) -> Vec<Fin> {
        let mut out = Vec::new();
        for (i, f) in raw.iter().enumerate() {
            let p = format!("{path}[{i}]");
            let near = loc(&f.name.referenced);
            let mount = self.mount(&f.offset, &f.start, on_vehicle, &p, near);
            let length_m = self.positive(&f.length, Kind::Length, &format!("{p}.length"));
            let height_m = self.positive(&f.height, Kind::Length, &format!("{p}.height"));
            let thickness_m = self.positive(&f.thickness, Kind::Length, &format!("{p}.thickness"));
            let material = mats.iter().find(|m| m.name == f.material.value).cloned();
            if material.is_none() {
                let names: Vec<_> = mats.iter().map(|m| m.name.as_str()).collect();
                self.at(
                    &f.material.referenced,
                    &format!("{p}.material"),
                    format!(
                        "undefined material '{}' (known: {})",
                        f.material.value,
                        names.join(", ")
                    ),
                );
            }
            let copies = self.repeats(&f.repeat, length_m, &p);
            self.check_name(&f.name, &format!("{p}.name"));
            if let (
                Some(mount),
                Some(length_m),
                Some(height_m),
                Some(thickness_m),
                Some(material),
            ) = (mount, length_m, height_m, thickness_m, material)
            {
                for (suffix, shift) in copies {
                    out.push(Fin {
                        name: format!("{}{suffix}", f.name.value),
                        mount: shifted(mount, shift),
                        length_m,
                        height_m,
                        thickness_m,
                        material: material.clone(),
                        lane: lane_of(&f.lane),
                    });
                }
            }
        }
        self.unique(
            out.iter().map(|f| f.name.as_str()),
            raw.iter().map(|f| &f.name),
            path,
        );
        out
    }

    fn check_name(&mut self, name: &Spanned<String>, path: &str) {
        if name.value.trim().is_empty() {
            self.at(&name.referenced, path, "must not be empty");
        }
    }

    fn unique<'a>(
        &mut self,
        names: impl Iterator<Item = &'a str>,
        raw: impl Iterator<Item = &'a Spanned<String>> + Clone,
        path: &str,
    ) {
        let mut seen: Vec<&str> = Vec::new();
        for n in names {
            if seen.contains(&n) {
                let at = raw
                    .clone()
                    .position(|r| n.starts_with(r.value.as_str()))
                    .unwrap_or(0);
                let r = raw.clone().nth(at);
                let l = r.map(|r| loc(&r.referenced)).unwrap_or(None);
                self.push(
                    l,
                    &format!("{path}[{at}].name"),
                    format!("duplicate name '{n}'"),
                );
                return;
            }
            seen.push(n);
        }
    }

    fn magnet_design(
        &mut self,
        s: &RawSection,
        p: &str,
        near: Option<(u64, u64)>,
    ) -> Option<MagnetDesign> {
        let pole_pitch = self
            .required(&s.pole_pitch, &format!("{p}.pole_pitch"), near)
            .and_then(|q| self.positive(q, Kind::Length, &format!("{p}.pole_pitch")));
        let magnet_thickness = self
            .required(&s.magnet_thickness, &format!("{p}.magnet_thickness"), near)
            .and_then(|q| self.positive(q, Kind::Length, &format!("{p}.magnet_thickness")));
        let fill = match &s.magnet_fill {
            Some(q) => self.q_where(
                q,
                Kind::Ratio,
                &format!("{p}.magnet_fill"),
                |f| f > 0.0 && f <= 1.0,
                "must lie in (0, 1]",
            ),
            None => {
                self.push(near, &format!("{p}.magnet_fill"), "missing field");
                None
            }
        };
        let remanence = self
            .required(&s.remanence, &format!("{p}.remanence"), near)
            .and_then(|q| {
                self.q_where(
                    q,
                    Kind::FluxDensity,
                    &format!("{p}.remanence"),
                    |b| b > 0.0 && b <= 1.6,
                    "must lie in (0, 1.6] T",
                )
            });
        let clearance = self
            .required(&s.clearance, &format!("{p}.clearance"), near)
            .and_then(|q| self.positive(q, Kind::Length, &format!("{p}.clearance")));
        let pole_height = self
            .required(&s.pole_height, &format!("{p}.pole_height"), near)
            .and_then(|q| self.positive(q, Kind::Length, &format!("{p}.pole_height")));
        Some(MagnetDesign {
            pole_pitch_m: pole_pitch?,
            magnet_thickness_m: magnet_thickness?,
            magnet_fill: fill?,
            remanence_t: remanence?,
            clearance_m: clearance?,
            pole_height_m: pole_height?,
        })
    }

    fn measured(&mut self, fc: &RawForceCurve, p: &str) -> Option<MeasuredForce> {
        let fin_temp_c = self.q(&fc.fin_temp, Kind::Temperature, &format!("{p}.fin_temp"));
        let magnet_temp_c = match &fc.magnet_temp {
            Some(q) => self.q(q, Kind::Temperature, &format!("{p}.magnet_temp")),
            None => Some(crate::constants::REFERENCE_TEMPERATURE_C),
        };
        let mut points = Vec::new();
        let mut ok = true;
        for (i, pt) in fc.points.iter().enumerate() {
            let pp = format!("{p}.points[{i}]");
            if pt.len() != 2 {
                let l = pt.first().map(|q| loc(&q.referenced)).unwrap_or(None);
                self.push(l, &pp, "each point is [speed, force per metre of overlap]");
                ok = false;
                continue;
            }
            let v = self.q_where(
                &pt[0],
                Kind::Speed,
                &format!("{pp}[0]"),
                |v| v >= 0.0,
                "speed must not be negative",
            );
            let f = self.q_where(
                &pt[1],
                Kind::ForcePerLength,
                &format!("{pp}[1]"),
                |f| f >= 0.0,
                "force must not be negative",
            );
            match (v, f) {
                (Some(v), Some(f)) => {
                    if let Some(&(prev, _)) = points.last() {
                        if v <= prev {
                            self.at(
                                &pt[0].referenced,
                                &format!("{pp}[0]"),
                                "speeds must increase strictly",
                            );
                            ok = false;
                        }
                    }
                    points.push((v, f));
                }
                _ => ok = false,
            }
        }
        if fc.points.len() < 2 {
            self.at(
                &fc.fin_temp.referenced,
                &format!("{p}.points"),
                "at least two points are needed",
            );
            ok = false;
        }
        if !ok {
            return None;
        }
        Some(MeasuredForce {
            points,
            fin_temp_c: fin_temp_c?,
            magnet_temp_c: magnet_temp_c?,
        })
    }

    fn section_body(
        &mut self,
        s: &RawSection,
        p: &str,
        near: Option<(u64, u64)>,
    ) -> Option<(ForceSource, f64, Option<MagnetGrade>)> {
        let force = match &s.force_curve {
            Some(fc) => self
                .measured(fc, &format!("{p}.force_curve"))
                .map(ForceSource::Measured),
            None => self.magnet_design(s, p, near).map(ForceSource::Model),
        };
        let beta = match &s.remanence_temp_coeff {
            Some(q) => self.q_where(
                q,
                Kind::TempCoefficient,
                &format!("{p}.remanence_temp_coeff"),
                |b| b > -0.01 && b <= 0.0,
                "must lie in (-1 %/K, 0]",
            ),
            // NdFeB: about −0.12 %/K (common practice, manufacturers' grade tables).
            None => Some(-0.0012),
        };
        let grade = match &s.grade {
            Some(g) => match MagnetGrade::parse(&g.value) {
                Some(x) => Some(Some(x)),
                None => {
                    self.at(
                        &g.referenced,
                        &format!("{p}.grade"),
                        format!(
                            "unknown magnet grade '{}' (N, M, H, SH, UH, EH, or e.g. N42SH)",
                            g.value
                        ),
                    );
                    None
                }
            },
            None => Some(None),
        };
        Some((force?, beta?, grade?))
    }

    fn sections(&mut self, raw: &[RawSection], path: &str, on_vehicle: bool) -> Vec<Section> {
        let mut out = Vec::new();
        for (i, s) in raw.iter().enumerate() {
            let p = format!("{path}[{i}]");
            let near = loc(&s.name.referenced);
            self.check_name(&s.name, &format!("{p}.name"));
            let mount = self.mount(&s.offset, &s.start, on_vehicle, &p, near);
            let length_m = self.positive(&s.length, Kind::Length, &format!("{p}.length"));
            let body = self.section_body(s, &p, near);
            let copies = self.repeats(&s.repeat, length_m, &p);
            if let (Some(mount), Some(length_m), Some((force, beta, grade))) =
                (mount, length_m, body)
            {
                for (suffix, shift) in copies {
                    out.push(Section {
                        name: format!("{}{suffix}", s.name.value),
                        mount: shifted(mount, shift),
                        length_m,
                        force: force.clone(),
                        remanence_temp_coeff_per_k: beta,
                        grade,
                        lane: lane_of(&s.lane),
                    });
                }
            }
        }
        self.unique(
            out.iter().map(|s| s.name.as_str()),
            raw.iter().map(|s| &s.name),
            path,
        );
        // Track elements of one kind must not overlap each other.
        let spans: Vec<(usize, f64, f64)> = out
            .iter()
            .enumerate()
            .filter_map(|(i, s)| track_span(s.mount, s.length_m).map(|(a, b)| (i, a, b)))
            .collect();
        for (k, &(i, a0, a1)) in spans.iter().enumerate() {
            for &(j, b0, b1) in &spans[k + 1..] {
                if out[i].lane == out[j].lane && a0 < b1 - 1e-12 && b0 < a1 - 1e-12 {
                    self.push(
                        None,
                        path,
                        format!(
                            "sections '{}' and '{}' overlap along the track",
                            out[i].name, out[j].name
                        ),
                    );
                }
            }
        }
        out
    }

    fn vehicle_elements_fit(
        &mut self,
        raw: &RawScenario,
        arrangement: Arrangement,
        fins: &[Fin],
        sections: &[Section],
        len: f64,
    ) {
        let items: Vec<(&str, Mount, f64, &str)> = match arrangement {
            Arrangement::FinsOnVehicle => fins
                .iter()
                .map(|f| (f.name.as_str(), f.mount, f.length_m, "vehicle.fins"))
                .collect(),
            Arrangement::MagnetsOnVehicle => sections
                .iter()
                .map(|s| (s.name.as_str(), s.mount, s.length_m, "vehicle.magnets"))
                .collect(),
        };
        for (name, mount, l, path) in items {
            if let Mount::Vehicle { offset_m } = mount {
                if offset_m + l > len + 1e-9 {
                    self.push(loc(&raw.vehicle.length.referenced), path, format!("'{name}' ends {:.3} m behind the front, beyond the vehicle length {len} m", offset_m + l));
                }
            }
        }
    }

    fn track(&mut self, t: Option<&RawTrack>) -> Option<Track> {
        let air = match t.and_then(|t| t.air_density.as_ref()) {
            Some(q) => self.non_negative(q, Kind::Density, "track.air_density")?,
            // ISA sea level is 1.225 kg/m³; 1.2 kg/m³ is the usual round figure (common practice).
            None => 1.2,
        };
        let gravity = match t {
            None => Gravity::Grade { slope: 0.0 },
            Some(t) => match (&t.grade, &t.angle, &t.profile) {
                (None, None, None) => Gravity::Grade { slope: 0.0 },
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

    fn profile(&mut self, raw: &[Vec<Q>]) -> Option<Vec<(f64, f64)>> {
        let mut pts: Vec<(f64, f64)> = Vec::new();
        let mut ok = true;
        for (i, pt) in raw.iter().enumerate() {
            let p = format!("track.profile[{i}]");
            if pt.len() != 2 {
                let l = pt.first().and_then(|q| loc(&q.referenced));
                self.push(l, &p, "each point is [position, elevation]");
                ok = false;
                continue;
            }
            let (Some(s), Some(z)) = (
                self.q(&pt[0], Kind::Length, &format!("{p}[0]")),
                self.q(&pt[1], Kind::Length, &format!("{p}[1]")),
            ) else {
                ok = false;
                continue;
            };
            if let Some(&(ps, pz)) = pts.last() {
                if s <= ps {
                    self.at(
                        &pt[0].referenced,
                        &format!("{p}[0]"),
                        "positions must increase strictly",
                    );
                    ok = false;
                } else if ((z - pz) / (s - ps)).abs() > 1.0 + 1e-12 {
                    self.at(&pt[1].referenced, &format!("{p}[1]"), format!("|dz/ds| = {:.3} > 1: elevation cannot change faster than the distance along the track", ((z - pz) / (s - ps)).abs()));
                    ok = false;
                }
            }
            pts.push((s, z));
        }
        if raw.len() < 2 {
            self.push(None, "track.profile", "at least two points are needed");
            ok = false;
        }
        ok.then_some(pts)
    }

    fn resistance(
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

    fn start(
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
            (None, None) => Some(0.0),
        };
        (pos, speed)
    }

    fn temperature(&mut self, q: &Option<Q>, path: &str, default: f64) -> Option<f64> {
        match q {
            Some(q) => self.q_where(
                q,
                Kind::Temperature,
                path,
                |t| t > -100.0 && t < 1000.0,
                "must lie between -100 °C and 1000 °C",
            ),
            None => Some(default),
        }
    }

    fn temperatures(&mut self, t: Option<&RawTemperatures>) -> (Option<f64>, Option<f64>) {
        let d = crate::constants::REFERENCE_TEMPERATURE_C;
        match t {
            None => (Some(d), Some(d)),
            Some(t) => (
                self.temperature(&t.fin, "temperatures.fin", d),
                self.temperature(&t.magnet, "temperatures.magnet", d),
            ),
        }
    }

    fn section_index(
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

    fn cases(&mut self, list: &[RawCase], nominal: &Case, sections: &[Section]) -> Vec<Case> {
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
                    fin_temp_c,
                    magnet_temp_c,
                    disabled,
                    resistance,
                });
            }
        }
        out
    }

    fn solver(&mut self, s: Option<&RawSolver>) -> Option<Solver> {
        let mut out = Solver {
            rtol: 1e-10,
            atol: 1e-10,
        };
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

    fn rider(&mut self, r: Option<&RawRider>, track: &Option<Track>) -> Option<Rider> {
        // Default axis: a vertical (or nearly so) track is the rider's spine; otherwise fore–aft.
        let steep = matches!(track, Some(Track { gravity: Gravity::Grade { slope }, .. }) if slope.abs() > 0.9);
        let default_filter = FilterSettings {
            corner_hz: 5.0,
            order: 4,
            sample_rate_hz: 1000.0,
        };
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

    fn envelope_points(&mut self, raw: &[Vec<Q>], p: &str) -> Option<Vec<(f64, f64)>> {
        let mut pts: Vec<(f64, f64)> = Vec::new();
        let mut ok = true;
        for (i, pt) in raw.iter().enumerate() {
            let pp = format!("{p}[{i}]");
            if pt.len() != 2 {
                self.push(
                    pt.first().and_then(|q| loc(&q.referenced)),
                    &pp,
                    "each point is [duration, allowed acceleration]",
                );
                ok = false;
                continue;
            }
            let d = self.q_where(
                &pt[0],
                Kind::Time,
                &format!("{pp}[0]"),
                |d| d >= 0.0,
                "duration must not be negative",
            );
            let a = self.q_where(
                &pt[1],
                Kind::Acceleration,
                &format!("{pp}[1]"),
                |a| a >= 0.0,
                "allowed level must not be negative",
            );
            match (d, a) {
                (Some(d), Some(a)) => {
                    if let Some(&(pd, _)) = pts.last() {
                        if d < pd {
                            self.at(
                                &pt[0].referenced,
                                &format!("{pp}[0]"),
                                "durations must not decrease (the envelope must be sorted)",
                            );
                            ok = false;
                        }
                    }
                    pts.push((d, a / crate::constants::STANDARD_GRAVITY_M_S2));
                }
                _ => ok = false,
            }
        }
        if raw.is_empty() {
            self.push(None, p, "at least one point is needed");
            ok = false;
        }
        ok.then_some(pts)
    }

    fn limits(&mut self, r: &RawLimits, out: &mut Limits) {
        const G: f64 = crate::constants::STANDARD_GRAVITY_M_S2;
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
                            out.peak[k].max_g = Some(x / G);
                        }
                    }
                    if let Some(q) = &a.min {
                        if let Some(x) =
                            self.q(q, Kind::Acceleration, &format!("limits.peak.{name}.min"))
                        {
                            out.peak[k].min_g = Some(x / G);
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
                out.onset_g_s = Some(x / G);
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

    fn range(&mut self, r: &Option<Vec<Q>>, kind: Kind, p: &str) -> Option<Option<(f64, f64)>> {
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

    fn generate(
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
            let position = match &r.position {
                Some(q) => self.q(q, Kind::Length, "generate.rollback.position"),
                // Rear just downstream of the zone end: front = zone end + vehicle length + 1 cm.
                None => Some(zone_end_m + vehicle_length_m + 0.01),
            };
            if let (Some(speed), Some(mass), Some(position)) = (speed, mass, position) {
                out.push(cases::rollback(nominal, speed, mass, position));
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

    fn duty(&mut self, d: &RawDuty) -> Option<Duty> {
        let interval = self.positive(&d.interval, Kind::Time, "duty.interval");
        let film = self.q_where(
            &d.film_coefficient,
            Kind::HeatTransfer,
            "duty.film_coefficient",
            |h| h >= 0.0,
            "must not be negative",
        );
        let ambient = self.temperature(
            &d.ambient,
            "duty.ambient",
            crate::constants::REFERENCE_TEMPERATURE_C,
        );
        let max_cycles = match &d.max_cycles {
            Some(m) if m.value == 0 || m.value > 100_000 => {
                self.at(&m.referenced, "duty.max_cycles", "must be 1 to 100000");
                None
            }
            Some(m) => Some(m.value),
            None => Some(1000),
        };
        let cycles = match &d.cycles {
            None => Some(Cycles::UntilSteady {
                max_cycles: max_cycles?,
            }),
            Some(c) => match &c.value {
                CyclesText::Count(n) if (1..=100_000).contains(n) => Some(Cycles::Count(*n as u32)),
                CyclesText::Count(_) => {
                    self.at(&c.referenced, "duty.cycles", "must be 1 to 100000");
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
        Some(Duty {
            interval_s: interval?,
            cycles: cycles?,
            ambient_c: ambient?,
            film_coefficient_w_m2_k: film?,
        })
    }

    fn plan(&mut self, p: &RawPlan, arrangement: Arrangement) -> Option<PlanSpec> {
        let near = loc(&p.zone_start.referenced);
        if arrangement != Arrangement::FinsOnVehicle {
            self.push(near, "plan", "the layout search places magnet modules along the track; it needs fins on the vehicle");
            return None;
        }
        let zone_start = self.q(&p.zone_start, Kind::Length, "plan.zone_start");
        let max_length = self.positive(&p.max_length, Kind::Length, "plan.max_length");
        let module_length = self.positive(&p.module.length, Kind::Length, "plan.module.length");
        let body = self.section_body(&p.module, "plan.module", near);
        let mut clearances = Vec::new();
        for (i, q) in p.clearances.iter().enumerate() {
            if let Some(c) = self.positive(q, Kind::Length, &format!("plan.clearances[{i}]")) {
                clearances.push(c);
            }
        }
        if p.clearances.is_empty() {
            self.push(
                near,
                "plan.clearances",
                "at least one clearance setting is needed",
            );
        }
        clearances.sort_by(f64::total_cmp);
        clearances.dedup();
        let min_spacing = match &p.min_spacing {
            Some(q) => self.non_negative(q, Kind::Length, "plan.min_spacing"),
            None => Some(0.0),
        };
        let (Some(ml), Some(ms)) = (module_length, min_spacing) else {
            return None;
        };
        let slot_pitch = match &p.slot_pitch {
            Some(q) => self.q_where(
                q,
                Kind::Length,
                "plan.slot_pitch",
                |x| x >= ml + ms - 1e-12,
                "must be at least the module length plus the minimum spacing",
            ),
            None => Some(ml + ms),
        };
        let (force, beta, grade) = body?;
        let ForceSource::Model(module) = force else {
            self.push(near, "plan.module.force_curve", "the layout search varies clearance, so the module needs a magnet design, not a measured curve");
            return None;
        };
        let (zs, maxl, sp) = (zone_start?, max_length?, slot_pitch?);
        if ml > maxl {
            self.push(near, "plan.max_length", "shorter than one module");
            return None;
        }
        if clearances.is_empty() {
            return None;
        }
        Some(PlanSpec {
            zone_start_m: zs,
            max_length_m: maxl,
            module_length_m: ml,
            module,
            module_remanence_temp_coeff_per_k: beta,
            module_grade: grade,
            clearances_m: clearances,
            min_spacing_m: ms,
            slot_pitch_m: sp,
        })
    }
}

fn lane_of(lane: &Option<String>) -> String {
    lane.clone().unwrap_or_else(|| "main".to_string())
}

fn shifted(mount: Mount, by: f64) -> Mount {
    match mount {
        Mount::Vehicle { offset_m } => Mount::Vehicle {
            offset_m: offset_m + by,
        },
        Mount::Track { start_m } => Mount::Track {
            start_m: start_m + by,
        },
    }
}

/// (start, end) along the track of a track-mounted element.
pub fn track_span(mount: Mount, length_m: f64) -> Option<(f64, f64)> {
    match mount {
        Mount::Track { start_m } => Some((start_m, start_m + length_m)),
        Mount::Vehicle { .. } => None,
    }
}
