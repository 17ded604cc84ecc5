//! The scenario as written in YAML: serde shapes, unknown fields denied, quantities unparsed.
//!
//! Nothing here is in SI yet; `validate` turns these shapes into the model in `scenario::model`.

use serde::de::{self, Deserializer, Visitor};
use serde::Deserialize;
use serde_saphyr::Spanned;
use std::collections::BTreeMap;
use std::fmt;

/// A quantity as written: a plain number (SI) or "value unit" text.
#[derive(Debug, Clone, PartialEq)]
pub enum QuantityText {
    /// A bare number, read in the SI unit of the field's kind.
    Number(f64),
    /// "value unit" text.
    Text(String),
}

impl<'de> Deserialize<'de> for QuantityText {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        struct V;
        impl Visitor<'_> for V {
            type Value = QuantityText;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a number or a \"value unit\" string")
            }
            fn visit_f64<E: de::Error>(self, v: f64) -> Result<QuantityText, E> {
                Ok(QuantityText::Number(v))
            }
            fn visit_i64<E: de::Error>(self, v: i64) -> Result<QuantityText, E> {
                Ok(QuantityText::Number(v as f64))
            }
            fn visit_u64<E: de::Error>(self, v: u64) -> Result<QuantityText, E> {
                Ok(QuantityText::Number(v as f64))
            }
            fn visit_str<E: de::Error>(self, v: &str) -> Result<QuantityText, E> {
                Ok(QuantityText::Text(v.to_string()))
            }
        }
        deserializer.deserialize_any(V)
    }
}

/// A quantity with the place it was written.
pub type Q = Spanned<QuantityText>;

/// The whole scenario file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawScenario {
    /// Format version; only 1 exists.
    pub version: Option<Spanned<u32>>,
    /// A name for the scenario.
    pub name: String,
    /// Free text.
    pub description: Option<String>,
    /// Custom materials by name.
    pub materials: Option<BTreeMap<String, RawMaterial>>,
    /// The vehicle, with its fins or its magnet units.
    pub vehicle: RawVehicle,
    /// Magnet sections fixed along the track (vehicle-fin arrangement).
    pub sections: Option<Vec<RawSection>>,
    /// The track: gravity profile and, in the vehicle-magnet arrangement, the fins.
    pub track: Option<RawTrack>,
    /// Resistance to motion (nominal).
    pub resistance: Option<RawResistance>,
    /// Where and how fast the vehicle starts (nominal).
    pub start: Option<RawStart>,
    /// Nominal temperatures.
    pub temperatures: Option<RawTemperatures>,
    /// Load and failure cases.
    pub cases: Option<Vec<RawCase>>,
    /// Track position the vehicle's rear must pass to clear the zone.
    pub zone_end: Option<Q>,
    /// Speed below which the vehicle counts as stalled.
    pub stall_speed: Option<Q>,
    /// Longest simulated time of one case.
    pub time_limit: Option<Q>,
    /// Integrator settings.
    pub solver: Option<RawSolver>,
    /// Which rider axis the track direction is.
    pub rider: Option<RawRider>,
    /// A limit set file to read first (path relative to this scenario).
    pub limits_file: Option<Spanned<String>>,
    /// Acceptance limits (override the limit file's keys).
    pub limits: Option<RawLimits>,
    /// Generated cases.
    pub generate: Option<RawGenerate>,
    /// Repeated dispatches.
    pub duty: Option<RawDuty>,
    /// Layout search.
    pub plan: Option<RawPlan>,
}

/// A custom material.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawMaterial {
    /// At 20 °C.
    pub conductivity: Q,
    /// Temperature coefficient of resistance at 20 °C.
    pub temp_coeff: Q,
    /// Density.
    pub density: Q,
    /// Specific heat capacity.
    pub specific_heat: Q,
    /// Where the values come from.
    pub source: Option<String>,
}

/// The vehicle.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawVehicle {
    /// Nominal mass.
    pub mass: Q,
    /// Overall length, front to rear.
    pub length: Q,
    /// Fins carried by the vehicle.
    pub fins: Option<Vec<RawFin>>,
    /// Magnet units carried by the vehicle.
    pub magnets: Option<Vec<RawSection>>,
}

/// Identical copies of an element at a fixed pitch.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawRepeat {
    /// Number of copies (including the first).
    pub count: Spanned<u32>,
    /// Distance from one copy's start to the next.
    pub pitch: Q,
}

/// A conducting fin, on the vehicle (`offset`) or along the track (`start`).
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawFin {
    /// Unique name.
    pub name: Spanned<String>,
    /// Vehicle front to the fin's leading edge (vehicle fins).
    pub offset: Option<Q>,
    /// Track position of the fin's upstream end (track fins).
    pub start: Option<Q>,
    /// Along the track.
    pub length: Q,
    /// Extent across the magnets' pole faces.
    pub height: Q,
    /// Across the gap.
    pub thickness: Q,
    /// A built-in or custom material name.
    pub material: Spanned<String>,
    /// Lateral lane: fins and magnets interact only on the same lane (default `main`).
    pub lane: Option<String>,
    /// Optional copies.
    pub repeat: Option<RawRepeat>,
}

/// A measured force–speed table.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawForceCurve {
    /// Fin temperature during the measurement.
    pub fin_temp: Q,
    /// Magnet temperature during the measurement (default 20 °C).
    pub magnet_temp: Option<Q>,
    /// `[speed, force per metre of overlap]` pairs.
    pub points: Vec<Vec<Q>>,
}

/// A magnet section (track) or magnet unit (vehicle).
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawSection {
    /// Unique name.
    pub name: Spanned<String>,
    /// Track position of the upstream end (track sections).
    pub start: Option<Q>,
    /// Vehicle front to the unit's leading edge (vehicle magnets).
    pub offset: Option<Q>,
    /// Along the track.
    pub length: Q,
    /// Centre of one pole to the next.
    pub pole_pitch: Option<Q>,
    /// Each row, in the gap direction.
    pub magnet_thickness: Option<Q>,
    /// Magnet width / pole pitch.
    pub magnet_fill: Option<Q>,
    /// At 20 °C.
    pub remanence: Option<Q>,
    /// Reversible temperature coefficient of remanence.
    pub remanence_temp_coeff: Option<Q>,
    /// Magnet face to fin face, each side, fin centred.
    pub clearance: Option<Q>,
    /// Magnet extent across the fin.
    pub pole_height: Option<Q>,
    /// Magnet grade letter(s) (N, M, H, SH, UH, EH) for the temperature limit.
    pub grade: Option<Spanned<String>>,
    /// Measured table replacing the model.
    pub force_curve: Option<RawForceCurve>,
    /// Lateral lane: fins and magnets interact only on the same lane (default `main`).
    pub lane: Option<String>,
    /// Optional copies.
    pub repeat: Option<RawRepeat>,
}

/// The track.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawTrack {
    /// Constant grade (rise over run; `-100 %` falls one metre per metre).
    pub grade: Option<Q>,
    /// Constant inclination (`-90 deg` is a vertical fall).
    pub angle: Option<Q>,
    /// `[position, elevation]` points.
    pub profile: Option<Vec<Vec<Q>>>,
    /// Air density.
    pub air_density: Option<Q>,
    /// Fins fixed along the track (vehicle-magnet arrangement).
    pub fins: Option<Vec<RawFin>>,
}

/// Resistance to motion.
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawResistance {
    /// Rolling coefficient μ (force μ·m·g·cos θ).
    pub rolling: Option<Q>,
    /// Aerodynamic drag area Cd·A.
    pub drag_area: Option<Q>,
    /// Constant friction force.
    pub friction: Option<Q>,
}

/// Start state.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawStart {
    /// Track position of the vehicle's front.
    pub position: Option<Q>,
    /// Speed along the track (negative runs backwards).
    pub speed: Option<Q>,
}

/// Temperatures.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawTemperatures {
    /// Fin temperature before the pass.
    pub fin: Option<Q>,
    /// Magnet temperature.
    pub magnet: Option<Q>,
}

/// One load or failure case.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawCase {
    /// Unique name.
    pub name: Spanned<String>,
    /// Free text.
    pub description: Option<String>,
    /// Mass override.
    pub mass: Option<Q>,
    /// Start override.
    pub start: Option<RawStart>,
    /// Fin temperature override.
    pub fin_temp: Option<Q>,
    /// Magnet temperature override.
    pub magnet_temp: Option<Q>,
    /// Sections (or magnet units) out of service.
    pub disabled: Option<Vec<Spanned<String>>>,
    /// Resistance override (fields given replace the nominal ones).
    pub resistance: Option<RawResistance>,
}

/// Integrator settings.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawSolver {
    /// Relative tolerance.
    pub rtol: Option<Spanned<f64>>,
    /// Absolute tolerance.
    pub atol: Option<Spanned<f64>>,
}

/// Rider axes.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawRider {
    /// The rider axis the track direction is: `x` or `z`.
    pub track_axis: Spanned<String>,
    /// Low-pass filter for limit evaluation.
    pub filter: Option<RawFilter>,
}

/// Low-pass filter settings.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawFilter {
    /// Off switch.
    pub enabled: Option<bool>,
    /// Corner frequency in Hz.
    pub corner_hz: Option<Spanned<f64>>,
    /// Poles.
    pub order: Option<Spanned<u32>>,
    /// Resampling rate in Hz.
    pub sample_rate_hz: Option<Spanned<f64>>,
}

/// A peak limit per sign.
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawSignedLimit {
    /// Largest positive value.
    pub max: Option<Q>,
    /// Most negative value.
    pub min: Option<Q>,
}

/// Envelope curves per sign.
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawSignedEnvelope {
    /// Positive side: `[duration, allowed]` points.
    pub positive: Option<Vec<Vec<Q>>>,
    /// Negative side: `[duration, allowed magnitude]` points.
    pub negative: Option<Vec<Vec<Q>>>,
}

/// A window.
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawWindow {
    /// Lower bound.
    pub min: Option<Q>,
    /// Upper bound.
    pub max: Option<Q>,
}

/// One entry per rider axis: `x` fore–aft, `y` lateral, `z` along the spine.
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawAxes<T> {
    /// Fore–aft.
    pub x: Option<T>,
    /// Lateral.
    pub y: Option<T>,
    /// Along the spine.
    pub z: Option<T>,
}

/// Acceptance limits.
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawLimits {
    /// Where these values come from.
    pub source: Option<String>,
    /// Peak felt acceleration per rider axis.
    pub peak: Option<RawAxes<RawSignedLimit>>,
    /// Sustained-acceleration envelopes per rider axis.
    pub envelope: Option<RawAxes<RawSignedEnvelope>>,
    /// Largest rate of change of braking deceleration.
    pub onset: Option<Q>,
    /// Exit-speed window.
    pub exit_speed: Option<RawWindow>,
    /// Longest time in the zone.
    pub max_duration: Option<Q>,
    /// Whether a stall inside the zone is acceptable (a holding brake follows).
    pub allow_stall: Option<bool>,
    /// Whether a reversal is acceptable.
    pub allow_rollback: Option<bool>,
    /// Highest fin temperature.
    pub max_fin_temperature: Option<Q>,
    /// Highest magnet temperature.
    pub max_magnet_temperature: Option<Q>,
}

/// Case generation.
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawGenerate {
    /// One case per section out (N−1); `true` for every listed case.
    pub each_section_out: Option<bool>,
    /// Restrict N−1 to these cases.
    pub each_section_out_of: Option<Vec<Spanned<String>>>,
    /// The full factorial of ranges.
    pub corners: Option<RawCorners>,
    /// A backwards entry from the downstream end.
    pub rollback: Option<RawRollback>,
}

/// Corner ranges: each `[low, high]`.
#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawCorners {
    /// `[empty, full]`.
    pub mass: Option<Vec<Q>>,
    /// `[cold, hot]`.
    pub fin_temp: Option<Vec<Q>>,
    /// `[cold, hot]`.
    pub magnet_temp: Option<Vec<Q>>,
    /// `[low, high]` entry speed.
    pub speed: Option<Vec<Q>>,
}

/// A rollback case.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawRollback {
    /// Speed entering backwards (magnitude).
    pub speed: Q,
    /// Mass (default nominal).
    pub mass: Option<Q>,
    /// Start position of the vehicle front (default: just downstream of the zone).
    pub position: Option<Q>,
}

/// Repeated dispatches.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawDuty {
    /// Time from one dispatch to the next.
    pub interval: Q,
    /// Number of cycles, or the text `until_steady`.
    pub cycles: Option<Spanned<CyclesText>>,
    /// Ambient air temperature.
    pub ambient: Option<Q>,
    /// Convective film coefficient on both fin faces.
    pub film_coefficient: Q,
    /// Cap on cycles when running until steady.
    pub max_cycles: Option<Spanned<u32>>,
}

/// `cycles:` — a count or `until_steady`.
#[derive(Debug, Clone, PartialEq)]
pub enum CyclesText {
    /// A count.
    Count(u64),
    /// Any text (validated later).
    Text(String),
}

impl<'de> Deserialize<'de> for CyclesText {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        struct V;
        impl Visitor<'_> for V {
            type Value = CyclesText;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("a whole number of cycles or until_steady")
            }
            fn visit_u64<E: de::Error>(self, v: u64) -> Result<CyclesText, E> {
                Ok(CyclesText::Count(v))
            }
            fn visit_i64<E: de::Error>(self, v: i64) -> Result<CyclesText, E> {
                u64::try_from(v)
                    .map(CyclesText::Count)
                    .map_err(|_| E::custom("cycles must not be negative"))
            }
            fn visit_str<E: de::Error>(self, v: &str) -> Result<CyclesText, E> {
                Ok(CyclesText::Text(v.to_string()))
            }
        }
        deserializer.deserialize_any(V)
    }
}

/// The layout search.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawPlan {
    /// Track position where the zone may begin.
    pub zone_start: Q,
    /// Longest zone allowed.
    pub max_length: Q,
    /// The module catalogue entry (a section without start/name).
    pub module: RawSection,
    /// Clearance settings the module can be built with.
    pub clearances: Vec<Q>,
    /// Smallest gap between modules.
    pub min_spacing: Option<Q>,
    /// Grid on which module starts are placed (default: module length + spacing).
    pub slot_pitch: Option<Q>,
}
