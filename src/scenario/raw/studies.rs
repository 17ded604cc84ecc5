//! The blocks of repeated and derived studies as written: `duty` (with its lift and magnets),
//! `plan` and `sweep` (same rules as [`super`]: unknown fields denied, quantities unparsed).

use super::*;

/// Repeated dispatches.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawDuty {
    /// Time from one dispatch to the next.
    #[schemars(with = "k::Time")]
    pub interval: Q,
    /// Number of cycles, or the text `until_steady`.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Cycles>")]
    pub cycles: Option<Spanned<CyclesText>>,
    /// Ambient air temperature.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Temperature>")]
    pub ambient: Option<Q>,
    /// Convective film coefficient on both fin faces.
    #[schemars(with = "k::HeatTransfer")]
    pub film_coefficient: Q,
    /// Cap on cycles when running until steady.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<u32>")]
    pub max_cycles: Option<Spanned<u32>>,
    /// The vehicle hauled back through the brake after every dispatch (a tower's lift).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub lift: Option<RawLift>,
    /// The magnets' warming by the hot fins across the gap.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub magnets: Option<RawDutyMagnets>,
}

/// `duty.lift:` — a constant `speed` or a `profile` of `[front position, speed]` points.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawLift {
    /// Constant lift speed.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Speed>")]
    pub speed: Option<Q>,
    /// `[front position, speed]` points, piecewise linear in position (held at the ends).
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "opt_pairs")]
    #[schemars(with = "Option<Vec<(k::Length, k::Speed)>>")]
    pub profile: Option<Vec<Vec<Q>>>,
}

/// `duty.magnets:` — inputs of the magnets' warming across the gap (defaults: common practice).
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawDutyMagnets {
    /// Film coefficient across the gap while the fin passes (default 25 W/(m²·K)).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::HeatTransfer>")]
    pub gap_film_coefficient: Option<Q>,
    /// Film coefficient from the magnet face to the air between dispatches (default 10).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::HeatTransfer>")]
    pub air_film_coefficient: Option<Q>,
    /// Emissivity of the fin face (default 0.1).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Ratio>")]
    pub fin_emissivity: Option<Q>,
    /// Emissivity of the magnet face (default 0.8).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Ratio>")]
    pub magnet_emissivity: Option<Q>,
    /// Add the estimated mean rise to the magnet temperature the grade and magnet-temperature
    /// checks judge (default true).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub add_to_magnet_temperature: Option<bool>,
}

/// `cycles:` — a count or `until_steady`.
#[derive(Debug, Clone, PartialEq)]
pub enum CyclesText {
    /// A count.
    Count(u64),
    /// Any text (validated later).
    Text(String),
}

impl Serialize for CyclesText {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        match self {
            CyclesText::Count(n) => serializer.serialize_u64(*n),
            CyclesText::Text(t) => serializer.serialize_str(t),
        }
    }
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
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawPlan {
    /// Track position where the zone may begin.
    #[schemars(with = "k::Length")]
    pub zone_start: Q,
    /// Longest zone allowed.
    #[schemars(with = "k::Length")]
    pub max_length: Q,
    /// The module catalogue entry (a section without start/name).
    pub module: RawSection,
    /// Clearance settings the module can be built with.
    #[serde(serialize_with = "flow_list")]
    #[schemars(with = "Vec<k::Length>")]
    pub clearances: Vec<Q>,
    /// Smallest gap between modules.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub min_spacing: Option<Q>,
    /// Grid on which module starts are placed (default: module length + spacing).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::Length>")]
    pub slot_pitch: Option<Q>,
}

/// A tolerance and uncertainty study of one case.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawSweep {
    /// The case the samples vary (default: the nominal case).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<String>")]
    pub case: Option<Spanned<String>>,
    /// `monte_carlo` (the default), `latin_hypercube`, `sobol` or `factorial`.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<String>")]
    pub method: Option<Spanned<String>>,
    /// Number of samples (not with `factorial`, which takes every combination).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<u64>")]
    pub samples: Option<Spanned<u64>>,
    /// Seed of the random and scrambled designs (default 0).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<u64>")]
    pub seed: Option<Spanned<u64>>,
    /// The uncertain inputs.
    pub inputs: RawSweepInputs,
}

/// The uncertain inputs of a sweep, each optional.
#[derive(Debug, Default, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawSweepInputs {
    /// Vehicle mass.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub mass: Option<RawUncertain>,
    /// Start speed.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub speed: Option<RawUncertain>,
    /// Start position of the vehicle front.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub position: Option<RawUncertain>,
    /// Clearance of the magnet sections.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub clearance: Option<RawUncertain>,
    /// Fin offset from the centre plane in the magnet sections (less than the clearance).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub fin_offset: Option<RawUncertain>,
    /// Remanence (at 20 °C) of the magnet sections.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub remanence: Option<RawUncertain>,
    /// Conductivity (at 20 °C) of the fins.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub fin_conductivity: Option<RawUncertain>,
    /// Fin temperature before the pass.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub fin_temp: Option<RawUncertain>,
    /// Magnet temperature.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub magnet_temp: Option<RawUncertain>,
    /// Model force factor.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub force_factor: Option<RawUncertain>,
}

/// One uncertain input: its distribution and, for sections and fins, its scope.
#[derive(Debug, Serialize, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawUncertain {
    /// `normal`, `uniform`, `triangular` or `discrete`.
    #[schemars(with = "String")]
    pub distribution: Spanned<String>,
    /// Mean (normal).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::AnyQuantity>")]
    pub mean: Option<Q>,
    /// Standard deviation (normal).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::AnyQuantity>")]
    pub std: Option<Q>,
    /// Lower end (uniform, triangular) or truncation bound (normal).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::AnyQuantity>")]
    pub min: Option<Q>,
    /// Most likely value (triangular).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::AnyQuantity>")]
    pub mode: Option<Q>,
    /// Upper end (uniform, triangular) or truncation bound (normal).
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<k::AnyQuantity>")]
    pub max: Option<Q>,
    /// The equally likely values (discrete).
    #[serde(skip_serializing_if = "Option::is_none", serialize_with = "flow")]
    #[schemars(with = "Option<Vec<k::AnyQuantity>>")]
    pub values: Option<Vec<Q>>,
    /// `all` (one draw for every section or fin, the default) or `each` (one per section or
    /// fin); only for clearance, fin offset, remanence and fin conductivity.
    #[serde(skip_serializing_if = "Option::is_none")]
    #[schemars(with = "Option<String>")]
    pub scope: Option<Spanned<String>>,
}
