//! The scenario: YAML shapes (`raw`), validation (`validate`), the validated model in SI (this
//! module), generated load cases (`cases`), every default of the format (`defaults`) and the
//! writer back to YAML (`write`). Only the validated model reaches physics.

pub mod as_written;
pub mod bounds;
pub mod cases;
pub mod defaults;
pub mod raw;
pub mod schema;
pub mod starters;
pub mod sweep;
pub mod validate;
pub mod write;

use crate::materials::Material;
use serde::Serialize;
use std::path::{Path, PathBuf};

pub use validate::{load, parse_str};

/// A scenario shipped with the project, by its path from the repository root (for tests).
#[cfg(test)]
pub(crate) fn shipped(path: &str) -> Scenario {
    let path = format!("{}/{path}", env!("CARGO_MANIFEST_DIR"));
    load(Path::new(&path)).expect("shipped scenario loads")
}

/// Which side carries the fins.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Arrangement {
    /// Fins on the vehicle, magnet sections along the track (coaster brake runs).
    FinsOnVehicle,
    /// Magnet units on the vehicle, fins along the track (many towers).
    MagnetsOnVehicle,
}

/// Where an element sits: on the vehicle (offset behind its front) or fixed along the track.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Mount {
    /// Vehicle front to the element's leading edge, m.
    Vehicle {
        /// m
        offset_m: f64,
    },
    /// Track position of the element's upstream end, m.
    Track {
        /// m
        start_m: f64,
    },
}

/// The vehicle.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Vehicle {
    /// Nominal mass, kg.
    pub mass_kg: f64,
    /// Front to rear, m.
    pub length_m: f64,
}

/// A conducting fin.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Fin {
    /// Unique name (copies of a repeat get `-1`, `-2`, ...).
    pub name: String,
    /// Where it sits.
    pub mount: Mount,
    /// Along the track, m.
    pub length_m: f64,
    /// Across the pole faces, m.
    pub height_m: f64,
    /// Across the gap, m.
    pub thickness_m: f64,
    /// Its conductor.
    pub material: Material,
    /// Lateral lane; a fin meets only the magnets of its lane.
    pub lane: String,
}

/// Magnet design of a section, for the layer model.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MagnetDesign {
    /// Centre of one pole to the next, m.
    pub pole_pitch_m: f64,
    /// Each row, in the gap direction, m.
    pub magnet_thickness_m: f64,
    /// Magnet width / pole pitch.
    pub magnet_fill: f64,
    /// Remanence at 20 °C, T.
    pub remanence_t: f64,
    /// Magnet face to fin face, each side, m (with the fin centred).
    pub clearance_m: f64,
    /// Magnet extent across the fin, m.
    pub pole_height_m: f64,
    /// Fin displacement from the centre plane between the rows, m (|e| < clearance; positive
    /// towards the row on the +y side, the clearances then c − e there and c + e opposite).
    pub fin_offset_m: f64,
}

/// A measured force–speed table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MeasuredForce {
    /// (speed m/s, force per metre of overlap N/m).
    pub points: Vec<(f64, f64)>,
    /// Fin temperature during the measurement, °C.
    pub fin_temp_c: f64,
    /// Magnet temperature during the measurement, °C.
    pub magnet_temp_c: f64,
}

/// How a section's force is obtained.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ForceSource {
    /// From the layer model.
    Model(MagnetDesign),
    /// From a measured table.
    Measured(MeasuredForce),
}

/// Magnet grade class (the suffix letters), for the maximum working temperature.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum GradeClass {
    /// N: 80 °C.
    N,
    /// M: 100 °C.
    M,
    /// H: 120 °C.
    H,
    /// SH: 150 °C.
    SH,
    /// UH: 180 °C.
    UH,
    /// EH: 200 °C.
    EH,
}

impl GradeClass {
    /// The suffix letters (`N`, `SH`, ...).
    pub fn suffix(self) -> &'static str {
        match self {
            GradeClass::N => "N",
            GradeClass::M => "M",
            GradeClass::H => "H",
            GradeClass::SH => "SH",
            GradeClass::UH => "UH",
            GradeClass::EH => "EH",
        }
    }

    /// Maximum working temperature, °C (common practice: sintered NdFeB grade tables).
    pub fn max_temperature_c(self) -> f64 {
        match self {
            GradeClass::N => 80.0,
            GradeClass::M => 100.0,
            GradeClass::H => 120.0,
            GradeClass::SH => 150.0,
            GradeClass::UH => 180.0,
            GradeClass::EH => 200.0,
        }
    }
}

/// A sintered NdFeB magnet grade as written: its class (the working-temperature limit) and,
/// when the name gives it, the energy-product number (`N40H`: 40, class H). Written back as
/// [`MagnetGrade::name`], so `N40H` stays `N40H`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct MagnetGrade {
    /// Class (suffix letters).
    pub class: GradeClass,
    /// The number of the name (maximum energy product in MGOe), when given.
    pub number: Option<u16>,
}

impl MagnetGrade {
    /// The suffix letters (`N`, `SH`, ...).
    pub fn suffix(self) -> &'static str {
        self.class.suffix()
    }

    /// Maximum working temperature, °C (common practice: sintered NdFeB grade tables).
    pub fn max_temperature_c(self) -> f64 {
        self.class.max_temperature_c()
    }

    /// The grade's name: `N40H`, `N42` with a number; the suffix letters (`SH`, `N`) without.
    pub fn name(self) -> String {
        match (self.number, self.class) {
            (Some(n), GradeClass::N) => format!("N{n}"),
            (Some(n), c) => format!("N{n}{}", c.suffix()),
            (None, c) => c.suffix().to_string(),
        }
    }

    /// Parses the suffix letters (`N`, `SH`) or a full name (`N42SH`, `N40H`, `42SH`); case is
    /// ignored.
    pub fn parse(text: &str) -> Option<Self> {
        let t = text.trim().to_ascii_uppercase();
        let rest = t.strip_prefix('N').unwrap_or(&t);
        let digits = rest.len() - rest.trim_start_matches(|c: char| c.is_ascii_digit()).len();
        let (number, suffix) = rest.split_at(digits);
        let number = if number.is_empty() {
            None
        } else {
            Some(number.parse::<u16>().ok()?)
        };
        let class = match suffix {
            "" if number.is_some() || t.starts_with('N') => GradeClass::N,
            "M" => GradeClass::M,
            "H" => GradeClass::H,
            "SH" => GradeClass::SH,
            "UH" => GradeClass::UH,
            "EH" => GradeClass::EH,
            _ => return None,
        };
        Some(MagnetGrade { class, number })
    }
}

impl Serialize for MagnetGrade {
    fn serialize<S: serde::Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.serialize_str(&self.name())
    }
}

/// A magnet section along the track, or a magnet unit on the vehicle.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Section {
    /// Unique name (copies of a repeat get `-1`, `-2`, ...).
    pub name: String,
    /// Where it sits.
    pub mount: Mount,
    /// Along the track, m.
    pub length_m: f64,
    /// The force law.
    pub force: ForceSource,
    /// Reversible temperature coefficient of remanence, 1/K.
    pub remanence_temp_coeff_per_k: f64,
    /// Grade, when given.
    pub grade: Option<MagnetGrade>,
    /// Lateral lane; magnets act only on the fins of their lane.
    pub lane: String,
}

impl Section {
    /// The magnet design, when the section uses the model.
    pub fn design(&self) -> Option<&MagnetDesign> {
        match &self.force {
            ForceSource::Model(d) => Some(d),
            ForceSource::Measured(_) => None,
        }
    }
}

/// Gravity along the track.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Gravity {
    /// Constant dz/ds (−1 is a vertical fall).
    Grade {
        /// dz/ds.
        slope: f64,
    },
    /// Piecewise-linear elevation (position m, elevation m), strictly increasing positions.
    Profile {
        /// (s m, z m).
        points: Vec<(f64, f64)>,
    },
}

/// The track.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Track {
    /// Gravity along the track.
    pub gravity: Gravity,
    /// kg/m³.
    pub air_density_kg_m3: f64,
}

/// Resistance to motion.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Resistance {
    /// Rolling coefficient μ.
    pub rolling_coeff: f64,
    /// Cd·A, m².
    pub drag_area_m2: f64,
    /// Constant friction, N.
    pub friction_n: f64,
}

impl Default for Resistance {
    /// The scenario defaults ([`defaults::ROLLING_COEFF`], ...): none.
    fn default() -> Self {
        Self {
            rolling_coeff: defaults::ROLLING_COEFF,
            drag_area_m2: defaults::DRAG_AREA_M2,
            friction_n: defaults::FRICTION_N,
        }
    }
}

/// Where a case came from: enough to write the `generate:` block that makes it again.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CaseOrigin {
    /// Written in the scenario (or the implied nominal case).
    Listed,
    /// One section out (N−1).
    SectionOut {
        /// Name of the case it was derived from (listed or corner).
        base: String,
        /// Name of the section that is out.
        section: String,
    },
    /// A corner of the factorial of `generate.corners`.
    Corner {
        /// Every factor of the factorial, in the order of the name parts.
        factors: Vec<CornerLevel>,
    },
    /// A backwards entry (`generate.rollback`).
    Rollback {
        /// Entry speed (magnitude), m/s.
        speed_m_s: f64,
        /// The start position is the default (just downstream of the zone end), not given.
        default_position: bool,
    },
}

/// A quantity the corner factorial varies.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CornerFactor {
    /// Vehicle mass, kg (`empty` / `full`).
    Mass,
    /// Fin temperature before the pass, °C (`cold-fin` / `hot-fin`).
    FinTemp,
    /// Magnet temperature, °C (`cold-magnet` / `hot-magnet`).
    MagnetTemp,
    /// Start speed, m/s (`slow` / `fast`).
    Speed,
}

impl CornerFactor {
    /// Every factor, in the order of the name parts of a corner case.
    pub const ALL: [CornerFactor; 4] = [
        CornerFactor::Mass,
        CornerFactor::FinTemp,
        CornerFactor::MagnetTemp,
        CornerFactor::Speed,
    ];

    /// Name parts of the low and the high end.
    pub fn tags(self) -> [&'static str; 2] {
        match self {
            CornerFactor::Mass => ["empty", "full"],
            CornerFactor::FinTemp => ["cold-fin", "hot-fin"],
            CornerFactor::MagnetTemp => ["cold-magnet", "hot-magnet"],
            CornerFactor::Speed => ["slow", "fast"],
        }
    }

    /// The key under `generate.corners`.
    pub fn key(self) -> &'static str {
        match self {
            CornerFactor::Mass => "mass",
            CornerFactor::FinTemp => "fin_temp",
            CornerFactor::MagnetTemp => "magnet_temp",
            CornerFactor::Speed => "speed",
        }
    }

    /// Sets this factor of a case.
    pub fn apply(self, c: &mut Case, value: f64) {
        match self {
            CornerFactor::Mass => c.mass_kg = value,
            CornerFactor::FinTemp => c.fin_temp_c = value,
            CornerFactor::MagnetTemp => c.magnet_temp_c = value,
            CornerFactor::Speed => c.start_speed_m_s = value,
        }
    }
}

/// One factor of a corner case: the range of the factorial and the end this case takes.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CornerLevel {
    /// Which quantity.
    pub factor: CornerFactor,
    /// Low end of the range (SI; °C for temperatures).
    pub low: f64,
    /// High end of the range.
    pub high: f64,
    /// This case takes the high end.
    pub at_high: bool,
}

impl CornerLevel {
    /// The value this case takes.
    pub fn value(&self) -> f64 {
        if self.at_high {
            self.high
        } else {
            self.low
        }
    }
}

/// One load or failure case, fully resolved.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Case {
    /// Unique name.
    pub name: String,
    /// How it came about.
    pub origin: CaseOrigin,
    /// kg.
    pub mass_kg: f64,
    /// Track position of the vehicle front at t = 0, m.
    pub start_position_m: f64,
    /// m/s along the track.
    pub start_speed_m_s: f64,
    /// The vehicle may start with fins already over magnets (`start: { in_zone: true }`);
    /// otherwise such a start is an input error.
    pub start_in_zone: bool,
    /// Fin temperature before the pass, °C.
    pub fin_temp_c: f64,
    /// Magnet temperature, °C.
    pub magnet_temp_c: f64,
    /// Indices into `Scenario::sections` that are out of service.
    pub disabled: Vec<usize>,
    /// Resistance.
    pub resistance: Resistance,
    /// Model force factor: every section's force on this case is multiplied by it (default
    /// [`defaults::FORCE_FACTOR`]; a sweep samples it to carry the force model's uncertainty).
    pub force_factor: f64,
}

/// Integrator settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Solver {
    /// Relative tolerance (default [`defaults::SOLVER_RTOL`]).
    pub rtol: f64,
    /// Absolute tolerance (default [`defaults::SOLVER_ATOL`]).
    pub atol: f64,
}

impl Default for Solver {
    fn default() -> Self {
        Self {
            rtol: defaults::SOLVER_RTOL,
            atol: defaults::SOLVER_ATOL,
        }
    }
}

/// Rider axis names.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Axis {
    /// Fore–aft.
    X,
    /// Lateral.
    Y,
    /// Along the spine.
    Z,
}

impl Axis {
    /// Lower-case name.
    pub fn name(self) -> &'static str {
        match self {
            Axis::X => "x",
            Axis::Y => "y",
            Axis::Z => "z",
        }
    }
}

/// Low-pass filter for limit evaluation.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct FilterSettings {
    /// Corner, Hz (default [`defaults::FILTER_CORNER_HZ`]).
    pub corner_hz: f64,
    /// Poles (default [`defaults::FILTER_ORDER`]).
    pub order: usize,
    /// Resampling rate, Hz (default [`defaults::FILTER_SAMPLE_RATE_HZ`]).
    pub sample_rate_hz: f64,
    /// Forward and backward (zero phase, the default) or one causal pass.
    pub phase: FilterPhase,
}

/// How the rider-acceleration filter runs.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum FilterPhase {
    /// Forward and backward: no phase shift; `order` counts the poles of both passes.
    #[default]
    Zero,
    /// One causal pass, as an on-board logger filters.
    Causal,
}

/// Which signal onset and release are measured on.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum RateSignal {
    /// The filtered felt acceleration (the default).
    #[default]
    Filtered,
    /// The unfiltered felt acceleration.
    Raw,
}

/// How onset and release are measured.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RateSettings {
    /// Central-difference window, s (default [`defaults::RATE_WINDOW_S`]).
    pub window_s: f64,
    /// The signal differentiated.
    pub signal: RateSignal,
}

impl Default for RateSettings {
    fn default() -> Self {
        Self {
            window_s: defaults::RATE_WINDOW_S,
            signal: RateSignal::Filtered,
        }
    }
}

impl Default for FilterSettings {
    fn default() -> Self {
        Self {
            corner_hz: defaults::FILTER_CORNER_HZ,
            order: defaults::FILTER_ORDER,
            sample_rate_hz: defaults::FILTER_SAMPLE_RATE_HZ,
            phase: FilterPhase::Zero,
        }
    }
}

/// Rider orientation (or, without passengers, the vehicle's axes).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Rider {
    /// Whether the device carries people: a `rider:` block says so (unless it sets
    /// `passengers: false`); without one the device is unmanned (a test sled, a freight
    /// carrier) and output speaks of the vehicle's axes and the payload.
    pub passengers: bool,
    /// The rider axis the track direction is.
    pub track_axis: Axis,
    /// `None` when filtering is switched off.
    pub filter: Option<FilterSettings>,
    /// How onset and release are measured.
    pub rates: RateSettings,
}

/// Peak limits of one axis, g.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Default)]
pub struct PeakLimit {
    /// Largest positive felt acceleration, g.
    pub max_g: Option<f64>,
    /// Most negative felt acceleration, g.
    pub min_g: Option<f64>,
}

/// Envelope curves of one axis: (duration s, allowed g) points.
#[derive(Debug, Clone, PartialEq, Serialize, Default)]
pub struct EnvelopeLimit {
    /// Positive side.
    pub positive: Option<Vec<(f64, f64)>>,
    /// Negative side, as magnitudes.
    pub negative: Option<Vec<(f64, f64)>>,
}

/// The model value of an SI acceleration (m/s²) or onset (m/s³): limits keep them in standard
/// gravities (g, g/s).
pub fn in_g(si: f64) -> f64 {
    si / crate::constants::STANDARD_GRAVITY_M_S2
}

/// Acceptance limits (accelerations in g, see [`in_g`]); every key optional.
#[derive(Debug, Clone, PartialEq, Serialize, Default)]
pub struct Limits {
    /// Where the values come from.
    pub source: Option<String>,
    /// Peak felt acceleration per axis (x, y, z).
    pub peak: [PeakLimit; 3],
    /// Envelopes per axis (x, y, z).
    pub envelope: [EnvelopeLimit; 3],
    /// Largest onset (rate of rise of braking), g/s.
    pub onset_g_s: Option<f64>,
    /// Largest release (rate at which braking falls away), g/s.
    pub release_g_s: Option<f64>,
    /// Combined-axis limits.
    pub combined: Vec<CombinedLimit>,
    /// Lowest exit speed, m/s.
    pub exit_speed_min_m_s: Option<f64>,
    /// Highest exit speed, m/s.
    pub exit_speed_max_m_s: Option<f64>,
    /// Longest time in zone, s.
    pub max_duration_s: Option<f64>,
    /// Lowest front position at rest (a stop), m.
    pub stop_position_min_m: Option<f64>,
    /// Highest front position at rest (the stopping distance of an arrester), m.
    pub stop_position_max_m: Option<f64>,
    /// A stall inside the zone is acceptable.
    pub allow_stall: bool,
    /// A reversal is acceptable.
    pub allow_rollback: bool,
    /// Highest fin temperature, °C.
    pub max_fin_temperature_c: Option<f64>,
    /// Highest magnet temperature, °C.
    pub max_magnet_temperature_c: Option<f64>,
}

/// Two rider axes judged together: at every sample (a₁/s₁)² + (a₂/s₂)² ≤ 1, with each semi-axis
/// s taken on the side (positive or negative) the acceleration is on — a quarter-ellipse per
/// quadrant (the form of combined-acceleration criteria in ride standards, e.g. ASTM F2291; from
/// memory, verify).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CombinedLimit {
    /// The two axes, in x, y, z order.
    pub axes: [Axis; 2],
    /// Per axis: [negative-side magnitude, positive-side level], g (both > 0).
    pub semi_g: [[f64; 2]; 2],
}

/// Number of dispatches to simulate.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Cycles {
    /// Exactly this many.
    Count(u32),
    /// Until the peak changes by less than 0.1 K per cycle, at most this many.
    UntilSteady {
        /// Cap.
        max_cycles: u32,
    },
}

/// Repeated dispatches.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Duty {
    /// s.
    pub interval_s: f64,
    /// How many.
    pub cycles: Cycles,
    /// °C.
    pub ambient_c: f64,
    /// W/(m²·K), on both faces.
    pub film_coefficient_w_m2_k: f64,
    /// The lift (return) pass after every dispatch (None: none).
    pub lift: Option<LiftSpeed>,
    /// The magnets' warming by the fins across the gap.
    pub magnets: MagnetExposure,
}

/// Speed of the lift pass: the vehicle hauled back through the brake after a dispatch.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum LiftSpeed {
    /// Constant speed, m/s.
    Constant(f64),
    /// `(front position m, speed m/s)` points, piecewise linear in position and held beyond the
    /// first and last points; speeds positive, positions increasing.
    Profile(Vec<(f64, f64)>),
}

impl LiftSpeed {
    /// The lift speed with the vehicle front at `x_m`, m/s.
    pub fn at(&self, x_m: f64) -> f64 {
        match self {
            LiftSpeed::Constant(v) => *v,
            LiftSpeed::Profile(p) => crate::numeric::interp_clamped(p, x_m),
        }
    }
}

/// Inputs of the magnets' warming by the hot fins across the gap (defaults in
/// [`defaults::MAGNET_EXPOSURE`], common practice).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct MagnetExposure {
    /// Film coefficient across the gap while the fin passes, W/(m²·K).
    pub gap_film_w_m2_k: f64,
    /// Film coefficient from the magnet face to the air between dispatches, W/(m²·K).
    pub air_film_w_m2_k: f64,
    /// Emissivity of the fin face.
    pub fin_emissivity: f64,
    /// Emissivity of the magnet face.
    pub magnet_emissivity: f64,
    /// Add the estimated mean rise to the magnet temperature the checks judge.
    pub add_to_magnet_temperature: bool,
}

impl Default for MagnetExposure {
    fn default() -> Self {
        defaults::MAGNET_EXPOSURE
    }
}

/// The layout search input.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PlanSpec {
    /// m.
    pub zone_start_m: f64,
    /// m.
    pub max_length_m: f64,
    /// Name of the module entry (`plan.module.name`).
    pub module_name: String,
    /// Module length, m.
    pub module_length_m: f64,
    /// Module magnets (clearance is replaced by each setting).
    pub module: MagnetDesign,
    /// Module remanence coefficient, 1/K.
    pub module_remanence_temp_coeff_per_k: f64,
    /// Module grade.
    pub module_grade: Option<MagnetGrade>,
    /// Clearance settings, m, ascending.
    pub clearances_m: Vec<f64>,
    /// m.
    pub min_spacing_m: f64,
    /// Slot pitch, m.
    pub slot_pitch_m: f64,
}

/// The validated scenario, in SI.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Scenario {
    /// Name.
    pub name: String,
    /// Free text.
    pub description: Option<String>,
    /// The file it was read from.
    #[serde(skip)]
    pub path: Option<PathBuf>,
    /// Which side carries the fins.
    pub arrangement: Arrangement,
    /// Vehicle.
    pub vehicle: Vehicle,
    /// Fins (on the vehicle or the track).
    pub fins: Vec<Fin>,
    /// Magnet sections (on the track) or units (on the vehicle).
    pub sections: Vec<Section>,
    /// Track.
    pub track: Track,
    /// The nominal case: the vehicle mass with the top-level `start`, `temperatures` and
    /// `resistance`. Listed cases default to it; corners and the backwards entry are built from
    /// it. It is one of `cases` only when the scenario lists none.
    pub nominal: Case,
    /// All cases, listed and generated.
    pub cases: Vec<Case>,
    /// Rear of the vehicle past this clears the zone, m.
    pub zone_end_m: f64,
    /// Front of the vehicle upstream of this, moving backwards, has left the zone, m.
    pub zone_start_m: f64,
    /// m/s.
    pub stall_speed_m_s: f64,
    /// s.
    pub time_limit_s: f64,
    /// Integrator.
    pub solver: Solver,
    /// Rider orientation.
    pub rider: Rider,
    /// Limits.
    pub limits: Limits,
    /// Duty cycle.
    pub duty: Option<Duty>,
    /// Layout search.
    pub plan: Option<PlanSpec>,
    /// Tolerance and uncertainty study.
    pub sweep: Option<sweep::Sweep>,
}

impl Scenario {
    /// The file name for messages.
    pub fn file_label(&self) -> String {
        self.path
            .as_deref()
            .map(Path::display)
            .map(|d| d.to_string())
            .unwrap_or_else(|| "<input>".into())
    }

    /// A case by name.
    pub fn case(&self, name: &str) -> Option<&Case> {
        self.cases.iter().find(|c| c.name == name)
    }
}
