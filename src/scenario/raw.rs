//! The scenario as written in YAML: serde shapes, unknown fields denied, quantities unparsed.
//!
//! Nothing here is in SI yet; `validate` turns these shapes into the model of `scenario`. The
//! same shapes serialize back (`scenario::write`): a quantity as the number or text it was read
//! from, `Spanned` values without their locations, absent keys left out, point lists as flow
//! pairs (`[a, b]`).

use super::schema as k;
use schemars::JsonSchema;
use serde::de::{self, Deserializer, Visitor};
use serde::{Deserialize, Serialize, Serializer};
use serde_saphyr::{FlowSeq, Spanned};
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

impl Serialize for QuantityText {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        match self {
            QuantityText::Number(x) => serializer.serialize_f64(*x),
            QuantityText::Text(t) => serializer.serialize_str(t),
        }
    }
}

/// A quantity with the place it was written.
pub type Q = Spanned<QuantityText>;

/// A short list written on one line: `[a, b, c]`.
fn flow<T: Serialize, S: Serializer>(v: &Option<Vec<T>>, serializer: S) -> Result<S::Ok, S::Error> {
    match v {
        Some(v) => FlowSeq(v).serialize(serializer),
        None => serializer.serialize_none(),
    }
}

/// [`flow`] of a list that is always there.
fn flow_list<T: Serialize, S: Serializer>(v: &[T], serializer: S) -> Result<S::Ok, S::Error> {
    FlowSeq(v).serialize(serializer)
}

/// A list of `[a, b]` points, one point per line.
fn pairs<S: Serializer>(v: &[Vec<Q>], serializer: S) -> Result<S::Ok, S::Error> {
    serializer.collect_seq(v.iter().map(FlowSeq))
}

/// [`pairs`] of an optional list.
fn opt_pairs<S: Serializer>(v: &Option<Vec<Vec<Q>>>, serializer: S) -> Result<S::Ok, S::Error> {
    match v {
        Some(v) => pairs(v, serializer),
        None => serializer.serialize_none(),
    }
}

/// The whole scenario file.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawScenario {
    /// Format version; only 1 exists.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<u32>")]
    pub version: Option<Spanned<u32>>,
    /// A name for the scenario.
    pub name: String,
    /// Free text.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub description: Option<String>,
    /// Custom materials by name.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub materials: Option<BTreeMap<String, RawMaterial>>,
    /// The vehicle, with its fins or its magnet units.
    pub vehicle: RawVehicle,
    /// Magnet sections fixed along the track (vehicle-fin arrangement).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub sections: Option<Vec<RawSection>>,
    /// The track: gravity profile and, in the vehicle-magnet arrangement, the fins.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub track: Option<RawTrack>,
    /// Resistance to motion (nominal).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub resistance: Option<RawResistance>,
    /// Where and how fast the vehicle starts (nominal).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub start: Option<RawStart>,
    /// Nominal temperatures.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub temperatures: Option<RawTemperatures>,
    /// Load and failure cases.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub cases: Option<Vec<RawCase>>,
    /// Track position the vehicle's rear must pass to clear the zone.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub zone_end: Option<Q>,
    /// Speed below which the vehicle counts as stalled.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Speed>")]
    pub stall_speed: Option<Q>,
    /// Longest simulated time of one case.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Time>")]
    pub time_limit: Option<Q>,
    /// Integrator settings.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub solver: Option<RawSolver>,
    /// Which rider axis the track direction is.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub rider: Option<RawRider>,
    /// A limit set file to read first (path relative to this scenario).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<String>")]
    pub limits_file: Option<Spanned<String>>,
    /// Acceptance limits (override the limit file's keys).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub limits: Option<RawLimits>,
    /// Generated cases.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub generate: Option<RawGenerate>,
    /// Repeated dispatches.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub duty: Option<RawDuty>,
    /// Layout search.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub plan: Option<RawPlan>,
    /// Tolerance and uncertainty study.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub sweep: Option<RawSweep>,
}

/// A custom material.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawMaterial {
    /// At 20 °C.
    #[schemars(with = "k::Conductivity")]
    pub conductivity: Q,
    /// Temperature coefficient of resistance at 20 °C.
    #[schemars(with = "k::TempCoefficient")]
    pub temp_coeff: Q,
    /// Density.
    #[schemars(with = "k::Density")]
    pub density: Q,
    /// Specific heat capacity.
    #[schemars(with = "k::SpecificHeat")]
    pub specific_heat: Q,
    /// Where the values come from.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub source: Option<String>,
    /// Softening point (a warning above it).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub softening: Option<Q>,
    /// Solidus (a warning at or above it).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub solidus: Option<Q>,
}

/// The vehicle.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawVehicle {
    /// Nominal mass.
    #[schemars(with = "k::Mass")]
    pub mass: Q,
    /// Overall length, front to rear.
    #[schemars(with = "k::Length")]
    pub length: Q,
    /// Fins carried by the vehicle.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub fins: Option<Vec<RawFin>>,
    /// Magnet units carried by the vehicle.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub magnets: Option<Vec<RawSection>>,
}

/// Identical copies of an element at a fixed pitch.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawRepeat {
    /// Number of copies (including the first).
    #[schemars(with = "u32")]
    pub count: Spanned<u32>,
    /// Distance from one copy's start to the next.
    #[schemars(with = "k::Length")]
    pub pitch: Q,
}

/// A conducting fin, on the vehicle (`offset`) or along the track (`start`).
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawFin {
    /// Unique name.
    #[schemars(with = "String")]
    pub name: Spanned<String>,
    /// Vehicle front to the fin's leading edge (vehicle fins).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub offset: Option<Q>,
    /// Track position of the fin's upstream end (track fins).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub start: Option<Q>,
    /// Along the track.
    #[schemars(with = "k::Length")]
    pub length: Q,
    /// Extent across the magnets' pole faces.
    #[schemars(with = "k::Length")]
    pub height: Q,
    /// Across the gap.
    #[schemars(with = "k::Length")]
    pub thickness: Q,
    /// A built-in or custom material name.
    #[schemars(with = "String")]
    pub material: Spanned<String>,
    /// Lateral lane: fins and magnets interact only on the same lane (default `main`).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub lane: Option<String>,
    /// Optional copies.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub repeat: Option<RawRepeat>,
}

/// A measured force–speed table.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawForceCurve {
    /// Fin temperature during the measurement.
    #[schemars(with = "k::Temperature")]
    pub fin_temp: Q,
    /// Magnet temperature during the measurement (default 20 °C).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub magnet_temp: Option<Q>,
    /// `[speed, force per metre of overlap]` pairs.
    #[serde(serialize_with = "pairs")]
    #[schemars(with = "Vec<(k::Speed, k::ForcePerLength)>")]
    pub points: Vec<Vec<Q>>,
}

/// A magnet section (track) or magnet unit (vehicle).
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawSection {
    /// Unique name.
    #[schemars(with = "String")]
    pub name: Spanned<String>,
    /// Track position of the upstream end (track sections).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub start: Option<Q>,
    /// Vehicle front to the unit's leading edge (vehicle magnets).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub offset: Option<Q>,
    /// Along the track.
    #[schemars(with = "k::Length")]
    pub length: Q,
    /// Centre of one pole to the next.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub pole_pitch: Option<Q>,
    /// Each row, in the gap direction.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub magnet_thickness: Option<Q>,
    /// Magnet width / pole pitch.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Ratio>")]
    pub magnet_fill: Option<Q>,
    /// At 20 °C.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::FluxDensity>")]
    pub remanence: Option<Q>,
    /// Reversible temperature coefficient of remanence.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::TempCoefficient>")]
    pub remanence_temp_coeff: Option<Q>,
    /// Magnet face to fin face, each side, fin centred.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub clearance: Option<Q>,
    /// Fin displacement from the centre plane (default 0; positive towards the +y row, less
    /// than the clearance in size).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub fin_offset: Option<Q>,
    /// Magnet extent across the fin.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub pole_height: Option<Q>,
    /// Magnet grade letter(s) (N, M, H, SH, UH, EH) for the temperature limit.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<String>")]
    pub grade: Option<Spanned<String>>,
    /// Measured table replacing the model.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub force_curve: Option<RawForceCurve>,
    /// Lateral lane: fins and magnets interact only on the same lane (default `main`).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub lane: Option<String>,
    /// Optional copies.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub repeat: Option<RawRepeat>,
}

/// The track.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawTrack {
    /// Constant grade (rise over run; `-100 %` falls one metre per metre).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Ratio>")]
    pub grade: Option<Q>,
    /// Constant inclination (`-90 deg` is a vertical fall).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Angle>")]
    pub angle: Option<Q>,
    /// `[position, elevation]` points.
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "opt_pairs")]
    #[schemars(with = "Option<Vec<(k::Length, k::Length)>>")]
    pub profile: Option<Vec<Vec<Q>>>,
    /// Air density.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Density>")]
    pub air_density: Option<Q>,
    /// Fins fixed along the track (vehicle-magnet arrangement).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub fins: Option<Vec<RawFin>>,
}

/// Resistance to motion.
#[derive(Debug, Default, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawResistance {
    /// Rolling coefficient μ (force μ·m·g·cos θ).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Ratio>")]
    pub rolling: Option<Q>,
    /// Aerodynamic drag area Cd·A.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Area>")]
    pub drag_area: Option<Q>,
    /// Constant friction force.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Force>")]
    pub friction: Option<Q>,
}

/// Start state.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawStart {
    /// Track position of the vehicle's front.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub position: Option<Q>,
    /// Speed along the track (negative runs backwards).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Speed>")]
    pub speed: Option<Q>,
    /// The vehicle may start with fins already over magnets (e.g. held in a rollback zone).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub in_zone: Option<bool>,
}

/// Temperatures.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawTemperatures {
    /// Fin temperature before the pass.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub fin: Option<Q>,
    /// Magnet temperature.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub magnet: Option<Q>,
}

/// One load or failure case.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawCase {
    /// Unique name.
    #[schemars(with = "String")]
    pub name: Spanned<String>,
    /// Free text.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub description: Option<String>,
    /// Mass override.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Mass>")]
    pub mass: Option<Q>,
    /// Start override.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub start: Option<RawStart>,
    /// Fin temperature override.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub fin_temp: Option<Q>,
    /// Magnet temperature override.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub magnet_temp: Option<Q>,
    /// Sections (or magnet units) out of service.
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "flow")]
    #[schemars(with = "Option<Vec<String>>")]
    pub disabled: Option<Vec<Spanned<String>>>,
    /// Resistance override (fields given replace the nominal ones).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub resistance: Option<RawResistance>,
    /// Model force factor: every section force of this case times this (default 1).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Ratio>")]
    pub force_factor: Option<Q>,
}

/// Integrator settings.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawSolver {
    /// Relative tolerance.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<f64>")]
    pub rtol: Option<Spanned<f64>>,
    /// Absolute tolerance.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<f64>")]
    pub atol: Option<Spanned<f64>>,
}

/// Rider axes.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawRider {
    /// The rider axis the track direction is: `x` or `z`.
    #[schemars(with = "String", extend("enum" = ["x", "z"]))]
    pub track_axis: Spanned<String>,
    /// Whether the device carries people (default true with a `rider:` block; a scenario
    /// without one is unmanned).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub passengers: Option<bool>,
    /// Low-pass filter for limit evaluation.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub filter: Option<RawFilter>,
    /// How onset and release are measured.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub rates: Option<RawRates>,
}

/// How onset and release are measured.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawRates {
    /// Central-difference window.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Time>")]
    pub window: Option<Q>,
    /// `filtered` (the default) or `raw`.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<String>", extend("enum" = ["filtered", "raw"]))]
    pub signal: Option<Spanned<String>>,
}

/// The two semi-axes of one rider axis in a combined-axis limit.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawSides {
    /// Allowed level on the positive side.
    #[schemars(with = "k::Acceleration")]
    pub positive: Q,
    /// Allowed magnitude on the negative side.
    #[schemars(with = "k::Acceleration")]
    pub negative: Q,
}

/// Low-pass filter settings.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawFilter {
    /// Off switch.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub enabled: Option<bool>,
    /// Corner frequency in Hz.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<f64>")]
    pub corner_hz: Option<Spanned<f64>>,
    /// Poles.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<u32>")]
    pub order: Option<Spanned<u32>>,
    /// Resampling rate in Hz.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<f64>")]
    pub sample_rate_hz: Option<Spanned<f64>>,
    /// `zero` (forward and backward, the default) or `causal` (one pass).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<String>", extend("enum" = ["zero", "causal"]))]
    pub phase: Option<Spanned<String>>,
}

/// A peak limit per sign.
#[derive(Debug, Default, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawSignedLimit {
    /// Largest positive value.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Acceleration>")]
    pub max: Option<Q>,
    /// Most negative value.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Acceleration>")]
    pub min: Option<Q>,
}

/// Envelope curves per sign.
#[derive(Debug, Default, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawSignedEnvelope {
    /// Positive side: `[duration, allowed]` points.
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "opt_pairs")]
    #[schemars(with = "Option<Vec<(k::Time, k::Acceleration)>>")]
    pub positive: Option<Vec<Vec<Q>>>,
    /// Negative side: `[duration, allowed magnitude]` points.
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "opt_pairs")]
    #[schemars(with = "Option<Vec<(k::Time, k::Acceleration)>>")]
    pub negative: Option<Vec<Vec<Q>>>,
}

/// A window.
#[derive(Debug, Default, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawWindow {
    /// Lower bound.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Speed>")]
    pub min: Option<Q>,
    /// Upper bound.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Speed>")]
    pub max: Option<Q>,
}

/// One entry per rider axis: `x` fore–aft, `y` lateral, `z` along the spine.
#[derive(Debug, Default, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawAxes<T> {
    /// Fore–aft.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub x: Option<T>,
    /// Lateral.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub y: Option<T>,
    /// Along the spine.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub z: Option<T>,
}

/// Acceptance limits.
#[derive(Debug, Default, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawLimits {
    /// Where these values come from.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub source: Option<String>,
    /// Peak felt acceleration per rider axis.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub peak: Option<RawAxes<RawSignedLimit>>,
    /// Sustained-acceleration envelopes per rider axis.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub envelope: Option<RawAxes<RawSignedEnvelope>>,
    /// Largest rate of change of braking deceleration.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Jerk>")]
    pub onset: Option<Q>,
    /// Largest rate at which braking deceleration falls away.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Jerk>")]
    pub release: Option<Q>,
    /// Combined-axis limits: two rider axes judged together on a quarter-ellipse boundary.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub combined: Option<Vec<RawAxes<RawSides>>>,
    /// Exit-speed window.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub exit_speed: Option<RawWindow>,
    /// Longest time in the zone.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Time>")]
    pub max_duration: Option<Q>,
    /// Window of the front position where the vehicle comes to rest (arresters, stopping brakes).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub stop_position: Option<RawWindow>,
    /// Whether a stall inside the zone is acceptable (a holding brake follows).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub allow_stall: Option<bool>,
    /// Whether a reversal is acceptable.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub allow_rollback: Option<bool>,
    /// Highest fin temperature.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub max_fin_temperature: Option<Q>,
    /// Highest magnet temperature.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub max_magnet_temperature: Option<Q>,
}

/// A limit set file (`limits_file:`): `limits:` and an optional name, nothing else.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawLimitsFile {
    /// A name for the limit set.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub name: Option<String>,
    /// The limits.
    pub limits: RawLimits,
}

/// Case generation.
#[derive(Debug, Default, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawGenerate {
    /// One case per section out (N−1); `true` for every listed case.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub each_section_out: Option<bool>,
    /// Restrict N−1 to these cases.
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "flow")]
    #[schemars(with = "Option<Vec<String>>")]
    pub each_section_out_of: Option<Vec<Spanned<String>>>,
    /// The full factorial of ranges.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub corners: Option<RawCorners>,
    /// A backwards entry from the downstream end.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub rollback: Option<RawRollback>,
}

/// Corner ranges: each `[low, high]`.
#[derive(Debug, Default, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawCorners {
    /// `[empty, full]`.
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "flow")]
    #[schemars(with = "Option<[k::Mass; 2]>")]
    pub mass: Option<Vec<Q>>,
    /// `[cold, hot]`.
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "flow")]
    #[schemars(with = "Option<[k::Temperature; 2]>")]
    pub fin_temp: Option<Vec<Q>>,
    /// `[cold, hot]`.
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "flow")]
    #[schemars(with = "Option<[k::Temperature; 2]>")]
    pub magnet_temp: Option<Vec<Q>>,
    /// `[low, high]` entry speed.
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "flow")]
    #[schemars(with = "Option<[k::Speed; 2]>")]
    pub speed: Option<Vec<Q>>,
}

/// A rollback case.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawRollback {
    /// Speed entering backwards (magnitude).
    #[schemars(with = "k::Speed")]
    pub speed: Q,
    /// Mass (default nominal).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Mass>")]
    pub mass: Option<Q>,
    /// Start position of the vehicle front (default: just downstream of the zone).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub position: Option<Q>,
}

mod studies;
pub use studies::*;
