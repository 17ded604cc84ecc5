//! The vehicle block: custom materials, fins (on the vehicle or along the track), placement of
//! an element (`offset` or `start`), repeats, and whether the vehicle's elements fit on it.

use super::{lane_of, loc, shifted, Validator};
use crate::materials::{self, Material};
use crate::scenario::bounds;
use crate::scenario::raw::{RawFin, RawMaterial, RawRepeat, RawScenario, Q};
use crate::scenario::{defaults, Arrangement, Fin, Mount, Section};
use crate::units::Kind;
use std::collections::BTreeMap;

impl Validator {
    pub(super) fn materials(
        &mut self,
        raw: &Option<BTreeMap<String, RawMaterial>>,
    ) -> Vec<Material> {
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
            let softening = m
                .softening
                .as_ref()
                .map(|q| self.temperature(&Some(q.clone()), &format!("{p}.softening"), 0.0));
            let solidus = m
                .solidus
                .as_ref()
                .map(|q| self.temperature(&Some(q.clone()), &format!("{p}.solidus"), 0.0));
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
                    source: m
                        .source
                        .clone()
                        .unwrap_or_else(|| defaults::MATERIAL_SOURCE.into()),
                    softening_c: softening.flatten(),
                    solidus_c: solidus.flatten(),
                });
            }
        }
        out
    }

    pub(super) fn mount(
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
    pub(super) fn repeats(
        &mut self,
        r: &Option<RawRepeat>,
        length_m: Option<f64>,
        path: &str,
    ) -> Vec<(String, f64)> {
        let Some(r) = r else {
            return vec![(String::new(), 0.0)];
        };
        let count = r.count.value;
        if count == 0 || count > bounds::MAX_REPEAT {
            self.at(
                &r.count.referenced,
                &format!("{path}.repeat.count"),
                format!(
                    "must be between 1 and {} (every copy is a fin or section of its own; a \
                     longer run of copies is not a braking zone)",
                    bounds::MAX_REPEAT
                ),
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
        if f64::from(count - 1) * pitch > bounds::MAX_LENGTH_M {
            self.at(
                &r.pitch.referenced,
                &format!("{path}.repeat.pitch"),
                format!(
                    "{count} copies at {pitch} m span more than {} km: longer than any track",
                    bounds::MAX_LENGTH_M / 1e3
                ),
            );
            return vec![];
        }
        if count == 1 {
            return vec![(String::new(), 0.0)];
        }
        (0..count)
            .map(|i| (format!("-{}", i + 1), pitch * f64::from(i)))
            .collect()
    }

    pub(super) fn fins(
        &mut self,
        raw: &[RawFin],
        path: &str,
        on_vehicle: bool,
        mats: &[Material],
    ) -> Vec<Fin> {
        let mut out = Vec::new();
        let mut sources = Vec::new();
        for (i, f) in raw.iter().enumerate() {
            let p = format!("{path}[{i}]");
            let near = loc(&f.name.referenced);
            let mount = self.mount(&f.offset, &f.start, on_vehicle, &p, near);
            let length_m = self.element_length(&f.length, &format!("{p}.length"));
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
                    sources.push(i);
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
        let raw_names: Vec<_> = raw.iter().map(|f| &f.name).collect();
        self.unique(
            out.iter().map(|f| f.name.as_str()).zip(sources),
            &raw_names,
            path,
        );
        out
    }

    pub(super) fn vehicle_elements_fit(
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
}
