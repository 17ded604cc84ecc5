//! Quantities in the units the user wrote, and the scenario `plan --write` writes.
//!
//! [`AsWritten`] reads the user's YAML text once and remembers the unit of every quantity by its
//! field path (`sections[0].clearance` → `mm`). As a [`Spelling`] it proposes, for a field of
//! the written model, the unit written at the same path, else at the same path with any list
//! index (`vehicle.fins[3].offset` after a repeat was expanded), else the same field name
//! anywhere; for a value written nowhere (a default, a limit from a limit set file)
//! accelerations in `g`, onsets in `g/s`, temperatures in `°C`, the rest in SI. The number is the shortest decimal
//! (12 significant digits first, up to 17) that reads back to exactly the model's value, so a
//! clearance read as `9 mm` is written `9 mm`, not `0.009000000000000001 m`.
//!
//! [`planned_yaml`] writes a scenario produced by the layout search: the modules are named
//! after the plan's module (`module-1`, `module-2`, …), their fields spelled as the module's
//! (`plan.module.*`, clearances as `plan.clearances`, starts as `plan.zone_start`), module
//! positions rounded to 12 significant digits (the search adds slot pitches, `20 + 3 × 1.6`
//! is 24.800000000000001), and so are the positions of the copies of repeated fins (the
//! rounding moves an element by less than 1e-11 of its position).

use super::cases::default_rollback_position;
use super::write::{to_yaml_with, Spelling, WriteError};
use super::{CaseOrigin, Mount, Scenario};
use crate::units::{self, Kind};
use std::collections::BTreeMap;

/// The units of a scenario text, by field path (see the module documentation).
#[derive(Debug, Clone, Default)]
pub struct AsWritten {
    /// Path → unit as written (normalised).
    at: BTreeMap<String, String>,
    /// Path without list indices (`vehicle.fins[].offset`) → unit, first written.
    by_shape: BTreeMap<String, String>,
    /// Last field name → unit, first written.
    by_field: BTreeMap<String, String>,
    /// Whether the scenario is a planned one: `sections[i].*` are spelled as the module.
    planned: bool,
}

impl AsWritten {
    /// The units of `text` (a scenario's YAML); an empty spelling when it does not parse.
    pub fn new(text: &str) -> Self {
        let mut me = AsWritten::default();
        if let Ok(v) = serde_saphyr::from_str::<serde_json::Value>(text) {
            me.walk(&v, "");
        }
        me
    }

    /// [`AsWritten::new`] for the scenario of a layout search (see [`planned_yaml`]).
    pub fn planned(text: &str) -> Self {
        AsWritten {
            planned: true,
            ..AsWritten::new(text)
        }
    }

    fn walk(&mut self, v: &serde_json::Value, path: &str) {
        match v {
            serde_json::Value::Object(m) => {
                for (k, x) in m {
                    let p = if path.is_empty() {
                        k.clone()
                    } else {
                        format!("{path}.{k}")
                    };
                    self.walk(x, &p);
                }
            }
            serde_json::Value::Array(a) => {
                for (i, x) in a.iter().enumerate() {
                    self.walk(x, &format!("{path}[{i}]"));
                }
            }
            serde_json::Value::String(s) => {
                if let Some(u) = units::unit_of(s) {
                    self.by_shape
                        .entry(shape(path))
                        .or_insert_with(|| u.clone());
                    self.by_field
                        .entry(field(path).to_string())
                        .or_insert_with(|| u.clone());
                    self.at.insert(path.to_string(), u);
                }
            }
            _ => {}
        }
    }

    /// Where the unit of a planned module's field is written.
    fn module_path(path: &str) -> Option<String> {
        let rest = path.strip_prefix("sections[")?;
        let (_, field) = rest.split_once("].")?;
        Some(match field {
            "clearance" => "plan.clearances[0]".to_string(),
            "start" => "plan.zone_start".to_string(),
            f => format!("plan.module.{f}"),
        })
    }

    /// The candidate units for `path` of `kind`, best first, each a unit of that kind.
    fn candidates(&self, path: &str, kind: Kind) -> Vec<String> {
        let mut out: Vec<String> = Vec::new();
        let mut add = |u: Option<&String>| {
            if let Some(u) = u {
                if units::in_unit(kind, 0.0, u).is_some() && !out.contains(u) {
                    out.push(u.clone());
                }
            }
        };
        if self.planned {
            if let Some(p) = Self::module_path(path) {
                add(self.at.get(&p));
            }
        }
        add(self.at.get(path));
        add(self.by_shape.get(&shape(path)));
        add(self.by_field.get(field(path)));
        // Nothing written for it (a default, a value from a limit set file): accelerations in
        // g, onsets in g/s, temperatures in °C, the rest in SI; ratios as plain numbers.
        let fallback = match kind {
            Kind::Acceleration => Some("g"),
            Kind::Jerk => Some("g/s"),
            Kind::Temperature => Some("°C"),
            Kind::Ratio => None,
            k => Some(k.si_unit()),
        };
        add(fallback.map(String::from).as_ref());
        out
    }
}

/// The path without its list indices.
fn shape(path: &str) -> String {
    let mut out = String::new();
    let mut skip = false;
    for c in path.chars() {
        match c {
            '[' => {
                skip = true;
                out.push('[');
            }
            ']' => {
                skip = false;
                out.push(']');
            }
            _ if skip => {}
            _ => out.push(c),
        }
    }
    out
}

/// The last field name of a path (`sections[2].clearance` → `clearance`).
fn field(path: &str) -> &str {
    let last = path.rsplit('.').next().unwrap_or(path);
    last.split('[').next().unwrap_or(last)
}

/// The shortest decimal text of `x` with at most `digits` significant digits (no exponent).
pub fn decimal(x: f64, digits: usize) -> String {
    let rounded: f64 = format!("{:.*e}", digits.saturating_sub(1), x)
        .parse()
        .unwrap_or(x);
    let text = format!("{rounded}");
    if text == "-0" {
        "0".into()
    } else {
        text
    }
}

/// Whether two values of `kind` are the same as the model keeps them (accelerations and onsets
/// in g).
fn same(kind: Kind, a: f64, b: f64) -> bool {
    match kind {
        Kind::Acceleration | Kind::Jerk => super::in_g(a) == super::in_g(b),
        _ => a == b,
    }
}

impl Spelling for AsWritten {
    fn spell(&self, path: &str, kind: Kind, si: f64) -> Option<String> {
        // The first unit that gives a short number, else the fewest digits that read back.
        let candidates = self.candidates(path, kind);
        for digits in 12..=17 {
            for unit in &candidates {
                let Some(x) = units::in_unit(kind, si, unit) else {
                    continue;
                };
                let text = format!("{} {unit}", decimal(x, digits));
                if units::from_text(kind, &text).is_ok_and(|y| same(kind, y, si)) {
                    return Some(text);
                }
            }
        }
        None
    }
}

/// The scenario of a layout search as YAML (see the module documentation): `planned` is the
/// scenario the search returned, `base_text` the YAML the user wrote (for the units; without
/// it, SI). The modules take the plan module's name; the text is checked to read back to the
/// written model.
pub fn planned_yaml(planned: &Scenario, base_text: Option<&str>) -> Result<String, WriteError> {
    let mut s = planned.clone();
    if let Some(p) = &s.plan {
        let names: Vec<(String, String)> = s
            .sections
            .iter()
            .enumerate()
            .map(|(i, x)| (x.name.clone(), format!("{}-{}", p.module_name, i + 1)))
            .collect();
        rename_sections(&mut s, &names);
    }
    let tidy = |x: f64| decimal(x, 12).parse::<f64>().unwrap_or(x);
    let mounts = s
        .sections
        .iter_mut()
        .map(|x| &mut x.mount)
        .chain(s.fins.iter_mut().map(|f| &mut f.mount));
    for m in mounts {
        match m {
            Mount::Track { start_m } => *start_m = tidy(*start_m),
            Mount::Vehicle { offset_m } => *offset_m = tidy(*offset_m),
        }
    }
    s.zone_start_m = tidy(s.zone_start_m);
    s.zone_end_m = tidy(s.zone_end_m);
    let (zone_end_m, length_m) = (s.zone_end_m, s.vehicle.length_m);
    for c in &mut s.cases {
        if let CaseOrigin::Rollback {
            default_position: true,
            ..
        } = c.origin
        {
            c.start_position_m = default_rollback_position(zone_end_m, length_m);
        }
    }
    to_yaml_with(&s, &AsWritten::planned(base_text.unwrap_or("")))
}

/// Renames sections (`(old, new)` pairs) and the one-section-out cases named after them.
fn rename_sections(s: &mut Scenario, names: &[(String, String)]) {
    let new_of = |old: &str| names.iter().find(|n| n.0 == old).map(|n| n.1.clone());
    for x in &mut s.sections {
        if let Some(n) = new_of(&x.name) {
            x.name = n;
        }
    }
    for c in &mut s.cases {
        if let CaseOrigin::SectionOut { base, section } = &mut c.origin {
            if let Some(n) = new_of(section) {
                // The name the N−1 generator gives (scenario::cases::each_section_out).
                if c.name == format!("{base}/without-{section}") {
                    c.name = format!("{base}/without-{n}");
                }
                *section = n;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn units_are_found_by_path_shape_field_and_kind() {
        let w = AsWritten::new(
            "vehicle: { mass: 7.4 t, fins: [{ offset: 60 cm }] }\nstart: { speed: 75 km/h }\n\
             sections: [{ clearance: 6 mm }]\nlimits: { onset: 2 m/s^3 }\n",
        );
        assert_eq!(
            w.spell("vehicle.mass", Kind::Mass, 5600.0).as_deref(),
            Some("5.6 t")
        );
        // A copy of a repeat: same shape.
        assert_eq!(
            w.spell("vehicle.fins[3].offset", Kind::Length, 2.5)
                .as_deref(),
            Some("250 cm")
        );
        // 2.8 m is 2.8000000000000003 m when read as 280 cm: written in m, not with 17 digits.
        assert_eq!(
            w.spell("vehicle.fins[3].offset", Kind::Length, 2.8)
                .as_deref(),
            Some("2.8 m")
        );
        // 75 km/h read as 20.833333333333336 m/s is written back as 75 km/h.
        let v = units::from_text(Kind::Speed, "75 km/h").unwrap();
        assert_eq!(
            w.spell("cases[1].start.speed", Kind::Speed, v).as_deref(),
            Some("75 km/h")
        );
        // 9 mm is 0.009000000000000001 m in SI.
        let c = units::from_text(Kind::Length, "9 mm").unwrap();
        assert_eq!(c.to_string(), "0.009000000000000001");
        assert_eq!(
            w.spell("sections[4].clearance", Kind::Length, c).as_deref(),
            Some("9 mm")
        );
        // Accelerations default to g.
        let g = units::from_text(Kind::Acceleration, "-1.5 g").unwrap();
        assert_eq!(
            w.spell("limits.peak.x.min", Kind::Acceleration, g)
                .as_deref(),
            Some("-1.5 g")
        );
        assert_eq!(
            w.spell("limits.onset", Kind::Jerk, 2.0).as_deref(),
            Some("2 m/s^3")
        );
        // Written nowhere: SI (a speed, not in the file's km/h), ratios as plain numbers.
        assert_eq!(
            w.spell("stall_speed", Kind::Speed, 0.05).as_deref(),
            Some("0.05 m/s")
        );
        assert_eq!(w.spell("resistance.rolling", Kind::Ratio, 0.004), None);
    }

    #[test]
    fn decimals_drop_float_noise() {
        assert_eq!(decimal(20.0 + 3.0 * 1.6, 12), "24.8");
        assert_eq!(decimal(0.009000000000000001, 12), "0.009");
        assert_eq!(decimal(75.0, 12), "75");
        assert_eq!(decimal(-0.0, 12), "0");
        assert_eq!(decimal(1.0 / 3.0, 17), "0.3333333333333333");
    }
}
