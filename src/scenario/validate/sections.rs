//! Magnet sections (along the track) and magnet units (on the vehicle): the magnet design or a
//! measured force curve, remanence coefficient, grade, copies, and overlaps along the track.

use super::{lane_of, loc, shifted, track_span, Coord, PointList, Validator};
use crate::scenario::bounds;
use crate::scenario::raw::{RawForceCurve, RawSection};
use crate::scenario::{defaults, ForceSource, MagnetDesign, MagnetGrade, MeasuredForce, Section};
use crate::units::Kind;

impl Validator {
    pub(super) fn magnet_design(
        &mut self,
        s: &RawSection,
        p: &str,
        near: Option<(u64, u64)>,
    ) -> Option<MagnetDesign> {
        let pole_pitch = self
            .required(&s.pole_pitch, &format!("{p}.pole_pitch"), near)
            .and_then(|q| {
                self.q_where(
                    q,
                    Kind::Length,
                    &format!("{p}.pole_pitch"),
                    |t| t >= bounds::MIN_POLE_PITCH_M,
                    "must be at least 1 mm (a finer row's field would not reach the fin)",
                )
            });
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
        let fin_offset = match (&s.fin_offset, clearance) {
            (None, _) => Some(defaults::FIN_OFFSET_M),
            (Some(q), Some(c)) => self.q_where(
                q,
                Kind::Length,
                &format!("{p}.fin_offset"),
                |e| e.abs() < c,
                &format!(
                    "must be smaller in size than the clearance ({} mm): the fin would touch the magnets",
                    c * 1e3
                ),
            ),
            (Some(q), None) => self.q(q, Kind::Length, &format!("{p}.fin_offset")),
        };
        Some(MagnetDesign {
            pole_pitch_m: pole_pitch?,
            magnet_thickness_m: magnet_thickness?,
            magnet_fill: fill?,
            remanence_t: remanence?,
            clearance_m: clearance?,
            pole_height_m: pole_height?,
            fin_offset_m: fin_offset?,
        })
    }

    pub(super) fn measured(&mut self, fc: &RawForceCurve, p: &str) -> Option<MeasuredForce> {
        let fin_temp_c = self.q(&fc.fin_temp, Kind::Temperature, &format!("{p}.fin_temp"));
        let magnet_temp_c = match &fc.magnet_temp {
            Some(q) => self.q(q, Kind::Temperature, &format!("{p}.magnet_temp")),
            None => Some(defaults::TEMPERATURE_C),
        };
        let path = format!("{p}.points");
        let points = self.points(
            &fc.points,
            &PointList {
                path: &path,
                shape: "each point is [speed, force per metre of overlap]",
                coords: [
                    Coord {
                        kind: Kind::Speed,
                        range: Some((|v| v >= 0.0, "speed must not be negative")),
                    },
                    Coord {
                        kind: Kind::ForcePerLength,
                        range: Some((|f| f >= 0.0, "force must not be negative")),
                    },
                ],
                step: |(prev, _), (v, _)| {
                    (v <= prev).then(|| (0, "speeds must increase strictly".to_string()))
                },
                min_points: 2,
                too_few: (
                    loc(&fc.fin_temp.referenced),
                    &path,
                    "at least two points are needed",
                ),
            },
        )?;
        Some(MeasuredForce {
            points,
            fin_temp_c: fin_temp_c?,
            magnet_temp_c: magnet_temp_c?,
        })
    }

    pub(super) fn section_body(
        &mut self,
        s: &RawSection,
        p: &str,
        near: Option<(u64, u64)>,
    ) -> Option<(ForceSource, f64, Option<MagnetGrade>)> {
        if let (Some(_), Some(q)) = (&s.force_curve, &s.fin_offset) {
            self.at(
                &q.referenced,
                &format!("{p}.fin_offset"),
                "the off-centre fin needs the magnet design (the layer model); a measured force curve has no lateral force",
            );
        }
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
            None => Some(defaults::REMANENCE_TEMP_COEFF_PER_K),
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

    pub(super) fn sections(
        &mut self,
        raw: &[RawSection],
        path: &str,
        on_vehicle: bool,
    ) -> Vec<Section> {
        let mut out = Vec::new();
        let mut sources = Vec::new();
        for (i, s) in raw.iter().enumerate() {
            let p = format!("{path}[{i}]");
            let near = loc(&s.name.referenced);
            self.check_name(&s.name, &format!("{p}.name"));
            let mount = self.mount(&s.offset, &s.start, on_vehicle, &p, near);
            let length_m = self.element_length(&s.length, &format!("{p}.length"));
            let body = self.section_body(s, &p, near);
            let copies = self.repeats(&s.repeat, length_m, &p);
            if let (Some(mount), Some(length_m), Some((force, beta, grade))) =
                (mount, length_m, body)
            {
                for (suffix, shift) in copies {
                    sources.push(i);
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
        let raw_names: Vec<_> = raw.iter().map(|s| &s.name).collect();
        self.unique(
            out.iter()
                .map(|s| s.name.as_str())
                .zip(sources.iter().copied()),
            &raw_names,
            path,
        );
        // Track elements of one kind must not overlap each other.
        let spans: Vec<(usize, f64, f64)> = out
            .iter()
            .enumerate()
            .filter_map(|(i, s)| track_span(s.mount, s.length_m).map(|(a, b)| (i, a, b)))
            .collect();
        let mut blamed: Vec<String> = Vec::new();
        for (k, &(i, a0, a1)) in spans.iter().enumerate() {
            for &(j, b0, b1) in &spans[k + 1..] {
                if out[i].lane == out[j].lane && a0 < b1 - 1e-12 && b0 < a1 - 1e-12 {
                    // Blamed on the entry of the later one (its start, or its repeat pitch
                    // when copies of one entry overlap).
                    let at = sources[j];
                    let entry = &raw[at];
                    let (field, l) = match (&entry.repeat, sources[i] == at) {
                        (Some(r), true) => ("repeat.pitch", loc(&r.pitch.referenced)),
                        _ => (
                            "start",
                            entry.start.as_ref().and_then(|q| loc(&q.referenced)),
                        ),
                    };
                    let field_path = format!("{path}[{at}].{field}");
                    // One mistake, one message: the first overlap an entry causes.
                    if blamed.contains(&field_path) {
                        continue;
                    }
                    self.push(
                        l.or_else(|| loc(&entry.name.referenced)),
                        &field_path,
                        format!(
                            "sections '{}' and '{}' overlap along the track",
                            out[i].name, out[j].name
                        ),
                    );
                    blamed.push(field_path);
                }
            }
        }
        out
    }
}
