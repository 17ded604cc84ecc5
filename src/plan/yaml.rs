//! A validated scenario written back as scenario YAML (version 1), so that a planned layout can
//! be read by `eddyzone check`. Every quantity is written in SI with its unit; floats use Rust's
//! shortest round-trip form, so the file reads back to the same values.

use crate::materials;
use crate::scenario::{
    Arrangement, CaseOrigin, Cycles, ForceSource, Gravity, Mount, Scenario, Section,
};
use std::fmt::Write as _;

/// A corner dimension: YAML key, unit, and the case value.
type Dim = (
    &'static str,
    &'static str,
    fn(&crate::scenario::Case) -> f64,
);

fn q(x: f64, unit: &str) -> String {
    format!("\"{x:?} {unit}\"")
}

fn text(s: &str) -> String {
    serde_json::to_string(s).unwrap_or_else(|_| "\"\"".into())
}

fn section_yaml(out: &mut String, s: &Section, indent: &str) {
    let _ = writeln!(out, "{indent}- name: {}", text(&s.name));
    match s.mount {
        Mount::Track { start_m } => {
            let _ = writeln!(out, "{indent}  start: {}", q(start_m, "m"));
        }
        Mount::Vehicle { offset_m } => {
            let _ = writeln!(out, "{indent}  offset: {}", q(offset_m, "m"));
        }
    }
    let _ = writeln!(out, "{indent}  length: {}", q(s.length_m, "m"));
    match &s.force {
        ForceSource::Model(d) => {
            let _ = writeln!(out, "{indent}  pole_pitch: {}", q(d.pole_pitch_m, "m"));
            let _ = writeln!(
                out,
                "{indent}  magnet_thickness: {}",
                q(d.magnet_thickness_m, "m")
            );
            let _ = writeln!(out, "{indent}  magnet_fill: {:?}", d.magnet_fill);
            let _ = writeln!(out, "{indent}  remanence: {}", q(d.remanence_t, "T"));
            let _ = writeln!(out, "{indent}  clearance: {}", q(d.clearance_m, "m"));
            let _ = writeln!(out, "{indent}  pole_height: {}", q(d.pole_height_m, "m"));
        }
        ForceSource::Measured(m) => {
            let _ = writeln!(out, "{indent}  force_curve:");
            let _ = writeln!(out, "{indent}    fin_temp: {}", q(m.fin_temp_c, "°C"));
            let _ = writeln!(out, "{indent}    magnet_temp: {}", q(m.magnet_temp_c, "°C"));
            let _ = writeln!(out, "{indent}    points:");
            for (v, f) in &m.points {
                let _ = writeln!(out, "{indent}      - [{}, {}]", q(*v, "m/s"), q(*f, "N/m"));
            }
        }
    }
    let _ = writeln!(
        out,
        "{indent}  remanence_temp_coeff: {}",
        q(s.remanence_temp_coeff_per_k, "1/K")
    );
    if let Some(g) = s.grade {
        let _ = writeln!(out, "{indent}  grade: {g:?}");
    }
    let _ = writeln!(out, "{indent}  lane: {}", text(&s.lane));
}

/// Writes the scenario as YAML. Listed cases are written with every value explicit (their
/// `disabled` lists by section name); corner, one-section-out and backwards-entry cases are
/// written as a `generate` block that reproduces them. The zone end is written explicitly.
pub fn scenario_yaml(s: &Scenario) -> String {
    let mut o = String::new();
    let _ = writeln!(
        o,
        "# Written by eddyzone {} (plan --write).",
        crate::VERSION
    );
    let _ = writeln!(o, "version: 1");
    let _ = writeln!(o, "name: {}", text(&s.name));
    if let Some(d) = &s.description {
        let _ = writeln!(o, "description: {}", text(d));
    }
    // Custom materials.
    let mut custom = Vec::new();
    for f in &s.fins {
        let same = materials::find_builtin(&f.material.name).is_some_and(|b| {
            b.conductivity_s_m == f.material.conductivity_s_m
                && b.temp_coeff_per_k == f.material.temp_coeff_per_k
                && b.density_kg_m3 == f.material.density_kg_m3
                && b.specific_heat_j_kg_k == f.material.specific_heat_j_kg_k
        });
        if !same
            && !custom
                .iter()
                .any(|m: &&materials::Material| m.name == f.material.name)
        {
            custom.push(&f.material);
        }
    }
    if !custom.is_empty() {
        let _ = writeln!(o, "materials:");
        for m in custom {
            let _ = writeln!(o, "  {}:", text(&m.name));
            let _ = writeln!(o, "    conductivity: {}", q(m.conductivity_s_m, "S/m"));
            let _ = writeln!(o, "    temp_coeff: {}", q(m.temp_coeff_per_k, "1/K"));
            let _ = writeln!(o, "    density: {}", q(m.density_kg_m3, "kg/m^3"));
            let _ = writeln!(
                o,
                "    specific_heat: {}",
                q(m.specific_heat_j_kg_k, "J/(kg*K)")
            );
            let _ = writeln!(o, "    source: {}", text(&m.source));
        }
    }
    let _ = writeln!(o, "vehicle:");
    let _ = writeln!(o, "  mass: {}", q(s.vehicle.mass_kg, "kg"));
    let _ = writeln!(o, "  length: {}", q(s.vehicle.length_m, "m"));
    let fins_key = match s.arrangement {
        Arrangement::FinsOnVehicle => "  fins:",
        Arrangement::MagnetsOnVehicle => "  magnets:",
    };
    let mut fins = String::new();
    for f in &s.fins {
        let _ = writeln!(fins, "    - name: {}", text(&f.name));
        match f.mount {
            Mount::Vehicle { offset_m } => {
                let _ = writeln!(fins, "      offset: {}", q(offset_m, "m"));
            }
            Mount::Track { start_m } => {
                let _ = writeln!(fins, "      start: {}", q(start_m, "m"));
            }
        }
        let _ = writeln!(fins, "      length: {}", q(f.length_m, "m"));
        let _ = writeln!(fins, "      height: {}", q(f.height_m, "m"));
        let _ = writeln!(fins, "      thickness: {}", q(f.thickness_m, "m"));
        let _ = writeln!(fins, "      material: {}", text(&f.material.name));
        let _ = writeln!(fins, "      lane: {}", text(&f.lane));
    }
    let mut secs = String::new();
    for sec in &s.sections {
        section_yaml(&mut secs, sec, "  ");
    }
    match s.arrangement {
        Arrangement::FinsOnVehicle => {
            let _ = writeln!(o, "{fins_key}");
            o.push_str(&fins);
            let _ = writeln!(o, "sections:");
            o.push_str(&secs);
        }
        Arrangement::MagnetsOnVehicle => {
            let _ = writeln!(o, "{fins_key}");
            for sec in &s.sections {
                section_yaml(&mut o, sec, "    ");
            }
        }
    }
    let _ = writeln!(o, "track:");
    match &s.track.gravity {
        Gravity::Grade { slope } => {
            let _ = writeln!(o, "  grade: {slope:?}");
        }
        Gravity::Profile { points } => {
            let _ = writeln!(o, "  profile:");
            for (x, z) in points {
                let _ = writeln!(o, "    - [{}, {}]", q(*x, "m"), q(*z, "m"));
            }
        }
    }
    let _ = writeln!(
        o,
        "  air_density: {}",
        q(s.track.air_density_kg_m3, "kg/m^3")
    );
    if s.arrangement == Arrangement::MagnetsOnVehicle {
        let _ = writeln!(o, "  fins:");
        o.push_str(&fins);
    }
    // Nominal values: a corner case carries them in its unvaried dimensions; else the first case.
    let corners: Vec<_> = s
        .cases
        .iter()
        .filter(|c| c.origin == CaseOrigin::Corner)
        .collect();
    let listed: Vec<_> = s
        .cases
        .iter()
        .filter(|c| c.origin == CaseOrigin::Listed)
        .collect();
    let nominal = corners.first().or(listed.first()).copied();
    if let Some(n) = nominal {
        let _ = writeln!(o, "resistance:");
        let _ = writeln!(o, "  rolling: {:?}", n.resistance.rolling_coeff);
        let _ = writeln!(o, "  drag_area: {}", q(n.resistance.drag_area_m2, "m^2"));
        let _ = writeln!(o, "  friction: {}", q(n.resistance.friction_n, "N"));
        let _ = writeln!(o, "start:");
        let _ = writeln!(o, "  position: {}", q(n.start_position_m, "m"));
        let _ = writeln!(o, "  speed: {}", q(n.start_speed_m_s, "m/s"));
        let _ = writeln!(o, "temperatures:");
        let _ = writeln!(o, "  fin: {}", q(n.fin_temp_c, "°C"));
        let _ = writeln!(o, "  magnet: {}", q(n.magnet_temp_c, "°C"));
    }
    if !listed.is_empty() {
        let _ = writeln!(o, "cases:");
        for c in &listed {
            let _ = writeln!(o, "  - name: {}", text(&c.name));
            let _ = writeln!(o, "    mass: {}", q(c.mass_kg, "kg"));
            let _ = writeln!(o, "    start:");
            let _ = writeln!(o, "      position: {}", q(c.start_position_m, "m"));
            let _ = writeln!(o, "      speed: {}", q(c.start_speed_m_s, "m/s"));
            let _ = writeln!(o, "    fin_temp: {}", q(c.fin_temp_c, "°C"));
            let _ = writeln!(o, "    magnet_temp: {}", q(c.magnet_temp_c, "°C"));
            let _ = writeln!(o, "    resistance:");
            let _ = writeln!(o, "      rolling: {:?}", c.resistance.rolling_coeff);
            let _ = writeln!(
                o,
                "      drag_area: {}",
                q(c.resistance.drag_area_m2, "m^2")
            );
            let _ = writeln!(o, "      friction: {}", q(c.resistance.friction_n, "N"));
            let names: Vec<String> = c
                .disabled
                .iter()
                .filter_map(|&i| s.sections.get(i).map(|x| text(&x.name)))
                .collect();
            if !names.is_empty() {
                let _ = writeln!(o, "    disabled: [{}]", names.join(", "));
            }
        }
    }
    let _ = writeln!(o, "zone_end: {}", q(s.zone_end_m, "m"));
    let _ = writeln!(o, "stall_speed: {}", q(s.stall_speed_m_s, "m/s"));
    let _ = writeln!(o, "time_limit: {}", q(s.time_limit_s, "s"));
    let _ = writeln!(o, "solver:");
    let _ = writeln!(o, "  rtol: {:?}", s.solver.rtol);
    let _ = writeln!(o, "  atol: {:?}", s.solver.atol);
    // Generated cases.
    let bases = super::section_out_bases(s);
    let rollback = s.cases.iter().find(|c| c.origin == CaseOrigin::Rollback);
    if !corners.is_empty() || !bases.is_empty() || rollback.is_some() {
        let _ = writeln!(o, "generate:");
        if !corners.is_empty() {
            let _ = writeln!(o, "  corners:");
            let dims: [Dim; 4] = [
                ("mass", "kg", |c| c.mass_kg),
                ("fin_temp", "°C", |c| c.fin_temp_c),
                ("magnet_temp", "°C", |c| c.magnet_temp_c),
                ("speed", "m/s", |c| c.start_speed_m_s),
            ];
            for (key, unit, get) in dims {
                let lo = corners.iter().map(|c| get(c)).fold(f64::INFINITY, f64::min);
                let hi = corners
                    .iter()
                    .map(|c| get(c))
                    .fold(f64::NEG_INFINITY, f64::max);
                // A dimension is in the factorial when its name appears in the case names.
                let tag = match key {
                    "mass" => "full",
                    "fin_temp" => "hot-fin",
                    "magnet_temp" => "hot-magnet",
                    _ => "fast",
                };
                if corners.iter().any(|c| c.name.split('/').any(|p| p == tag)) {
                    let _ = writeln!(o, "    {key}: [{}, {}]", q(lo, unit), q(hi, unit));
                }
            }
        }
        if !bases.is_empty() {
            let names: Vec<String> = bases.iter().map(|b| text(b)).collect();
            let _ = writeln!(o, "  each_section_out_of: [{}]", names.join(", "));
        }
        if let Some(r) = rollback {
            let _ = writeln!(o, "  rollback:");
            let _ = writeln!(o, "    speed: {}", q(r.start_speed_m_s.abs(), "m/s"));
            let _ = writeln!(o, "    mass: {}", q(r.mass_kg, "kg"));
            let _ = writeln!(o, "    position: {}", q(r.start_position_m, "m"));
        }
    }
    let _ = writeln!(o, "rider:");
    let _ = writeln!(o, "  track_axis: {}", s.rider.track_axis.name());
    let _ = writeln!(o, "  filter:");
    match s.rider.filter {
        None => {
            let _ = writeln!(o, "    enabled: false");
        }
        Some(f) => {
            let _ = writeln!(o, "    enabled: true");
            let _ = writeln!(o, "    corner_hz: {:?}", f.corner_hz);
            let _ = writeln!(o, "    order: {}", f.order);
            let _ = writeln!(o, "    sample_rate_hz: {:?}", f.sample_rate_hz);
        }
    }
    let l = &s.limits;
    let _ = writeln!(o, "limits:");
    if let Some(src) = &l.source {
        let _ = writeln!(o, "  source: {}", text(src));
    }
    let axes = ["x", "y", "z"];
    if l.peak
        .iter()
        .any(|p| p.max_g.is_some() || p.min_g.is_some())
    {
        let _ = writeln!(o, "  peak:");
        for (k, p) in l.peak.iter().enumerate() {
            let mut parts = Vec::new();
            if let Some(x) = p.max_g {
                parts.push(format!("max: {}", q(x, "g")));
            }
            if let Some(x) = p.min_g {
                parts.push(format!("min: {}", q(x, "g")));
            }
            if !parts.is_empty() {
                let _ = writeln!(o, "    {}: {{ {} }}", axes[k], parts.join(", "));
            }
        }
    }
    if l.envelope
        .iter()
        .any(|e| e.positive.is_some() || e.negative.is_some())
    {
        let _ = writeln!(o, "  envelope:");
        for (k, e) in l.envelope.iter().enumerate() {
            if e.positive.is_none() && e.negative.is_none() {
                continue;
            }
            let _ = writeln!(o, "    {}:", axes[k]);
            for (side, pts) in [("positive", &e.positive), ("negative", &e.negative)] {
                if let Some(pts) = pts {
                    let list: Vec<String> = pts
                        .iter()
                        .map(|(d, g)| format!("[{}, {}]", q(*d, "s"), q(*g, "g")))
                        .collect();
                    let _ = writeln!(o, "      {side}: [{}]", list.join(", "));
                }
            }
        }
    }
    if let Some(x) = l.onset_g_s {
        let _ = writeln!(o, "  onset: {}", q(x, "g/s"));
    }
    if l.exit_speed_min_m_s.is_some() || l.exit_speed_max_m_s.is_some() {
        let mut parts = Vec::new();
        if let Some(x) = l.exit_speed_min_m_s {
            parts.push(format!("min: {}", q(x, "m/s")));
        }
        if let Some(x) = l.exit_speed_max_m_s {
            parts.push(format!("max: {}", q(x, "m/s")));
        }
        let _ = writeln!(o, "  exit_speed: {{ {} }}", parts.join(", "));
    }
    if let Some(x) = l.max_duration_s {
        let _ = writeln!(o, "  max_duration: {}", q(x, "s"));
    }
    let _ = writeln!(o, "  allow_stall: {}", l.allow_stall);
    let _ = writeln!(o, "  allow_rollback: {}", l.allow_rollback);
    if let Some(x) = l.max_fin_temperature_c {
        let _ = writeln!(o, "  max_fin_temperature: {}", q(x, "°C"));
    }
    if let Some(x) = l.max_magnet_temperature_c {
        let _ = writeln!(o, "  max_magnet_temperature: {}", q(x, "°C"));
    }
    if let Some(d) = &s.duty {
        let _ = writeln!(o, "duty:");
        let _ = writeln!(o, "  interval: {}", q(d.interval_s, "s"));
        match d.cycles {
            Cycles::Count(n) => {
                let _ = writeln!(o, "  cycles: {n}");
            }
            Cycles::UntilSteady { max_cycles } => {
                let _ = writeln!(o, "  cycles: until_steady");
                let _ = writeln!(o, "  max_cycles: {max_cycles}");
            }
        }
        let _ = writeln!(o, "  ambient: {}", q(d.ambient_c, "°C"));
        let _ = writeln!(
            o,
            "  film_coefficient: {}",
            q(d.film_coefficient_w_m2_k, "W/(m^2*K)")
        );
    }
    o
}
