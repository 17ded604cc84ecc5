//! Raw YAML shapes → the validated `Scenario` in SI. Every problem names the file, the
//! `line:column` where known and the field path; all problems of a file are reported together.
//!
//! This module reads the file and holds the `Validator` core (quantities, names, point lists)
//! and the assembly of the whole scenario; each block of the file has its own module: `vehicle`
//! (materials, fins, repeats), `sections`, `track`, `cases` (cases and generation), `settings`
//! (solver, rider), `limits`, `duty`, `plan`. Defaults come from [`super::defaults`].

mod budget;
mod cases;
mod duty;
mod limits;
mod locate;
mod plan;
mod sections;
mod settings;
mod sweep;
#[cfg(test)]
mod tests;
mod track;
mod vehicle;

use super::raw::*;
use super::*;
use crate::units::{self, Kind};
use serde_saphyr::Spanned;
use std::cell::RefCell;
use std::collections::HashSet;
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

/// Largest scenario or limit-set file read, bytes (project bound: a scenario is a few kB; a file
/// of 10 MB is not one, and reading it must not take the machine's memory).
pub const MAX_INPUT_BYTES: u64 = 10 * 1024 * 1024;

/// Reads an input text file: a regular file (not a device, FIFO or folder, which could block or
/// never end) of at most [`MAX_INPUT_BYTES`], as UTF-8.
pub fn read_input(path: &Path) -> Result<String, std::io::Error> {
    use std::io::{Error, ErrorKind, Read};
    let meta = std::fs::metadata(path)?;
    if !meta.is_file() {
        return Err(Error::new(
            ErrorKind::InvalidInput,
            "not a regular file (a scenario is read from an ordinary file)",
        ));
    }
    if meta.len() > MAX_INPUT_BYTES {
        return Err(Error::new(
            ErrorKind::InvalidInput,
            format!(
                "{} bytes: larger than the {MAX_INPUT_BYTES}-byte limit for a scenario file",
                meta.len()
            ),
        ));
    }
    let mut text = String::new();
    std::fs::File::open(path)?
        .take(MAX_INPUT_BYTES + 1)
        .read_to_string(&mut text)?;
    if text.len() as u64 > MAX_INPUT_BYTES {
        return Err(Error::new(
            ErrorKind::InvalidInput,
            format!("larger than the {MAX_INPUT_BYTES}-byte limit for a scenario file"),
        ));
    }
    Ok(text)
}

/// Reads and validates a scenario file. A `limits_file` is read relative to it.
pub fn load(path: &Path) -> Result<Scenario, ScenarioError> {
    let file = path.display().to_string();
    let text = read_input(path).map_err(|source| ScenarioError::Io {
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
            match read_input(&p) {
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
        _ => {
            locate::fill(&mut v.issues, text);
            Err(ScenarioError::Invalid {
                file: file.to_string(),
                issues: v.issues,
            })
        }
    }
}

/// Collects every problem of a file while turning raw shapes into the model.
#[derive(Default)]
struct Validator {
    issues: Vec<Issue>,
}

/// The range a value must lie in: the test and the message when it fails.
type Range = (fn(f64) -> bool, &'static str);

/// A point against the one before: `None`, or the coordinate to blame and the message.
type Step = fn((f64, f64), (f64, f64)) -> Option<(usize, String)>;

/// One coordinate of a point list: its kind and the range it must lie in.
struct Coord {
    kind: Kind,
    /// `None`: any finite value.
    range: Option<Range>,
}

/// The rules of a list of `[a, b]` points (track profile, envelope curve, measured force curve).
struct PointList<'a> {
    /// Field path of the list; point `i` is `{path}[i]`.
    path: &'a str,
    /// Message when an entry is not a pair.
    shape: &'static str,
    /// The two coordinates.
    coords: [Coord; 2],
    /// A point against the one before.
    step: Step,
    /// Fewest points.
    min_points: usize,
    /// Where, at which path and with which message too few points are reported.
    too_few: (Option<(u64, u64)>, &'a str, &'static str),
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
            Ok(x) => match super::bounds::magnitude_bound(kind) {
                Some((lo, hi, why)) if !(lo..=hi).contains(&x) => {
                    self.at(
                        &q.referenced,
                        path,
                        format!(
                            "{} {} is not plausible: {why}",
                            show(x),
                            if kind == Kind::Temperature {
                                "°C"
                            } else {
                                kind.si_unit()
                            }
                        ),
                    );
                    None
                }
                _ => Some(x),
            },
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
                format!("{what} (got {} {})", show(x), kind.si_unit()),
            );
            None
        }
    }

    /// The length of a fin or a magnet section: at least [`bounds::MIN_ELEMENT_LENGTH_M`].
    fn element_length(&mut self, q: &Q, path: &str) -> Option<f64> {
        self.q_where(
            q,
            Kind::Length,
            path,
            |l| l >= super::bounds::MIN_ELEMENT_LENGTH_M,
            "must be at least 1 mm (each end of a fin or section is an event of the run)",
        )
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

    fn check_name(&mut self, name: &Spanned<String>, path: &str) {
        if name.value.trim().is_empty() {
            self.at(&name.referenced, path, "must not be empty");
        }
    }

    /// Reports the first name used twice, at the entry that repeats it: `names` pairs each
    /// element's name with the index of the raw entry it comes from (every copy of a repeat
    /// carries its entry's index), `raw` holds the entries' names as written.
    fn unique<'a>(
        &mut self,
        names: impl Iterator<Item = (&'a str, usize)>,
        raw: &[&Spanned<String>],
        path: &str,
    ) {
        let mut seen: HashSet<&str> = HashSet::new();
        for (n, at) in names {
            if !seen.insert(n) {
                let l = raw.get(at).and_then(|r| loc(&r.referenced));
                self.push(
                    l,
                    &format!("{path}[{at}].name"),
                    format!("duplicate name '{n}'"),
                );
                return;
            }
        }
    }

    /// A list of `[a, b]` points by the rules of `spec`; `None` when any point is wrong.
    fn points(&mut self, raw: &[Vec<Q>], spec: &PointList) -> Option<Vec<(f64, f64)>> {
        let mut pts: Vec<(f64, f64)> = Vec::new();
        let mut ok = true;
        for (i, pt) in raw.iter().enumerate() {
            let pp = format!("{}[{i}]", spec.path);
            if pt.len() != 2 {
                self.push(pt.first().and_then(|q| loc(&q.referenced)), &pp, spec.shape);
                ok = false;
                continue;
            }
            let mut coord = |k: usize| {
                let c = &spec.coords[k];
                let path = format!("{pp}[{k}]");
                match c.range {
                    Some((test, what)) => self.q_where(&pt[k], c.kind, &path, test, what),
                    None => self.q(&pt[k], c.kind, &path),
                }
            };
            let (Some(a), Some(b)) = (coord(0), coord(1)) else {
                ok = false;
                continue;
            };
            if let Some(&prev) = pts.last() {
                if let Some((k, message)) = (spec.step)(prev, (a, b)) {
                    self.at(&pt[k].referenced, &format!("{pp}[{k}]"), message);
                    ok = false;
                }
            }
            pts.push((a, b));
        }
        if raw.len() < spec.min_points {
            let (l, path, message) = spec.too_few;
            self.push(l, path, message);
            ok = false;
        }
        ok.then_some(pts)
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
        let length_m = self
            .positive(&raw.vehicle.length, Kind::Length, "vehicle.length")
            .and_then(|l| {
                if l > super::bounds::MAX_VEHICLE_LENGTH_M {
                    self.at(
                        &raw.vehicle.length.referenced,
                        "vehicle.length",
                        format!(
                            "{} m is not plausible: a vehicle braked by one zone is shorter than \
                             {} m (the whole train counts; longer ones take minutes to clear)",
                            show(l),
                            super::bounds::MAX_VEHICLE_LENGTH_M
                        ),
                    );
                    None
                } else {
                    Some(l)
                }
            });
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
        let raw_fins = match arrangement {
            Arrangement::FinsOnVehicle => raw.vehicle.fins.as_ref(),
            Arrangement::MagnetsOnVehicle => track_fins,
        };
        let raw_sections = match arrangement {
            Arrangement::FinsOnVehicle => raw.sections.as_ref(),
            Arrangement::MagnetsOnVehicle => raw.vehicle.magnets.as_ref(),
        };
        // Only an empty list: an entry with a mistake has its own message.
        if raw_fins.is_none_or(|f| f.is_empty()) {
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
        if raw_sections.is_none_or(|s| s.is_empty()) {
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
        let stall_speed_m_s = self.opt_positive(
            &raw.stall_speed,
            Kind::Speed,
            "stall_speed",
            defaults::STALL_SPEED_M_S,
        );
        let time_limit_s = match &raw.time_limit {
            Some(q) => self.q_where(
                q,
                Kind::Time,
                "time_limit",
                |t| t > 0.0 && t <= super::bounds::MAX_TIME_LIMIT_S,
                "must lie in (0, 3600] s (an hour in the zone: any brake has stopped or released \
                 the vehicle by then)",
            ),
            None => Some(defaults::TIME_LIMIT_S),
        };
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
            start_in_zone: raw.start.as_ref().and_then(|s| s.in_zone).unwrap_or(false),
            fin_temp_c: fin_temp_c?,
            magnet_temp_c: magnet_temp_c?,
            disabled: vec![],
            resistance: nominal_res?,
            force_factor: defaults::FORCE_FACTOR,
        };
        let mut cases = match &raw.cases {
            None => vec![nominal.clone()],
            Some(list) => self.cases(list, &nominal, &sections),
        };
        let zone_end_m = zone_end_m?;
        if !zone_start_m.is_finite() || !zone_end_m.is_finite() {
            return None;
        }
        if let Some(q) = &raw.zone_end {
            if zone_end_m <= zone_start_m {
                self.at(
                    &q.referenced,
                    "zone_end",
                    format!(
                        "{zone_end_m} m is not downstream of the zone's first magnet or fin at \
                         {zone_start_m} m: every check would see an empty zone"
                    ),
                );
            }
        }
        self.starts_outside_zone(raw, &nominal, &cases, &fins, &sections);
        if let Some(g) = &raw.generate {
            let generated =
                self.generate(g, &cases, &nominal, &sections, zone_end_m, vehicle.length_m);
            cases.extend(generated);
        }
        self.work_budget(raw, &cases, &fins, &sections, duty.as_ref());
        let sweep = raw
            .sweep
            .as_ref()
            .and_then(|r| self.sweep(r, &nominal, &cases, &fins, &sections, duty.as_ref()));
        Some(Scenario {
            name: raw.name.clone(),
            description: raw.description.clone(),
            path: None,
            arrangement,
            vehicle,
            fins,
            sections,
            track: track?,
            nominal,
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
            sweep,
        })
    }
}

/// A number for a message: plain when it reads well, in exponent form when it is very large or
/// very small (`1e18`, not eighteen zeros).
fn show(x: f64) -> String {
    if x != 0.0 && !(1e-3..1e6).contains(&x.abs()) {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

fn lane_of(lane: &Option<String>) -> String {
    lane.clone().unwrap_or_else(|| defaults::LANE.to_string())
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
