//! The vehicle's motion through the zone: gravity and resistance (`track`), the brake pairs
//! (`model`) and their overlap along the track (`overlap`), and the integrator with event
//! location (`integrate`). Physics never calls the integrator; the integrator never formats
//! output.

pub mod integrate;
pub mod model;
pub mod overlap;
pub mod track;
pub mod trajectory;

pub use integrate::{simulate_case, RunOptions, Sampling, SolverSettings, MAX_FINS};
pub use model::BrakeTables;
pub use overlap::Overlap;

use crate::physics::PhysicsError;
use crate::scenario::{Fin, Section};
use serde::Serialize;
use std::fmt;

/// Errors of the dynamics layer.
#[derive(Debug, Clone, thiserror::Error)]
pub enum DynamicsError {
    /// A pair's force law could not be built.
    #[error("fin '{fin}' in section '{section}': {source}")]
    Physics {
        /// Fin name.
        fin: String,
        /// Section name.
        section: String,
        /// What the physics layer rejected.
        #[source]
        source: PhysicsError,
    },
    /// A fin and a section are not mounted one on the vehicle and one on the track as the
    /// scenario's arrangement says (validation normally rules this out).
    #[error(
        "fin '{fin}' in section '{section}': inconsistent mounting (one must be on the vehicle, \
         the other on the track, as the arrangement says)"
    )]
    Mounting {
        /// Fin name.
        fin: String,
        /// Section name.
        section: String,
    },
    /// The integrator failed.
    #[error("case '{case}': the integrator failed at t = {t_s:.6} s: {cause}")]
    Integration {
        /// Case name.
        case: String,
        /// Time of failure, s.
        t_s: f64,
        /// What went wrong.
        cause: IntegrationCause,
    },
}

impl DynamicsError {
    /// A physics error of the pair of `fin` and `section`.
    pub fn physics(fin: &Fin, section: &Section, source: PhysicsError) -> Self {
        DynamicsError::Physics {
            fin: fin.name.clone(),
            section: section.name.clone(),
            source,
        }
    }
}

/// Why the integration of a case could not complete.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum IntegrationCause {
    /// The adaptive step shrank to the rounding limit of the time (Dormand–Prince step-size
    /// underflow): the right-hand side is not smooth enough or not finite.
    #[error("step-size underflow")]
    StepSizeUnderflow,
    /// One piece between events needed more steps than the solver allows.
    #[error("more than {steps} steps in one piece")]
    StepLimit {
        /// The step limit of the solver settings.
        steps: u32,
    },
    /// The solver's stiffness test fired repeatedly.
    #[error("the equations of motion became stiff")]
    Stiff,
    /// More pieces than the limit: events follow each other in a loop.
    #[error("too many pieces (events in a loop): more than {pieces}")]
    TooManyPieces {
        /// The piece limit.
        pieces: usize,
    },
    /// The state vector cannot hold this many fins.
    #[error("{fins} fins: at most {max} are supported")]
    TooManyFins {
        /// Fins in the scenario.
        fins: usize,
        /// Most fins supported ([`MAX_FINS`]).
        max: usize,
    },
    /// A quantity of the state or of its rate of change is NaN or infinite.
    #[error("the {0} is not a finite number")]
    NonFinite(Quantity),
}

/// A quantity the integrator carries: an entry of the state or of its rate of change.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Quantity {
    /// Vehicle front position, m.
    Position,
    /// Speed along the track, m/s.
    Speed,
    /// Acceleration along the track, m/s².
    Acceleration,
    /// Energy dissipated by the brakes, J.
    BrakingEnergy,
    /// Brake power, W.
    BrakingPower,
    /// Work done against resistance, J.
    ResistanceEnergy,
    /// Power lost to resistance, W.
    ResistancePower,
    /// Energy dissipated in the named fin, J.
    FinEnergy(String),
    /// Power dissipated in the named fin, W.
    FinPower(String),
}

impl fmt::Display for Quantity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Quantity::Position => write!(f, "position (m)"),
            Quantity::Speed => write!(f, "speed (m/s)"),
            Quantity::Acceleration => write!(f, "acceleration (m/s²)"),
            Quantity::BrakingEnergy => write!(f, "braking energy (J)"),
            Quantity::BrakingPower => write!(f, "braking power (W)"),
            Quantity::ResistanceEnergy => write!(f, "resistance energy (J)"),
            Quantity::ResistancePower => write!(f, "resistance power (W)"),
            Quantity::FinEnergy(fin) => write!(f, "energy of fin '{fin}' (J)"),
            Quantity::FinPower(fin) => write!(f, "power into fin '{fin}' (W)"),
        }
    }
}

/// How a run ended.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Outcome {
    /// Left the zone in its initial direction of travel.
    Cleared,
    /// Came to rest (|v| below the stall speed) inside the zone; a holding brake must take over.
    Stalled,
    /// Reversed and left the zone at the end it came in by.
    RolledBack,
    /// Still in the zone at the time limit.
    TimeLimit,
}

impl Outcome {
    /// The snake-case name used in output.
    pub fn name(self) -> &'static str {
        match self {
            Outcome::Cleared => "cleared",
            Outcome::Stalled => "stalled",
            Outcome::RolledBack => "rolled_back",
            Outcome::TimeLimit => "time_limit",
        }
    }
}

/// One sample of a run.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Sample {
    /// s.
    pub t_s: f64,
    /// Vehicle front, m.
    pub s_m: f64,
    /// m/s.
    pub v_m_s: f64,
    /// m/s².
    pub a_m_s2: f64,
    /// Deceleration along the direction of travel, g.
    pub decel_g: f64,
    /// Rate of change of the deceleration, g/s.
    pub onset_g_s: f64,
    /// Brake force along the track (negative brakes forward motion), N.
    pub brake_force_n: f64,
    /// Gravity along the track, N.
    pub gravity_force_n: f64,
    /// Resistance along the track, N.
    pub resistance_force_n: f64,
    /// cos θ of the mean inclination under the vehicle.
    pub cos_theta: f64,
    /// Mean curvature dθ/ds of the track under the vehicle, 1/m (negative over a crest).
    pub curvature_1_m: f64,
    /// Total fin–magnet overlap of active pairs, m.
    pub overlap_m: f64,
    /// Whether the sample is at an event.
    pub event: bool,
}

/// The largest lateral force of a run: the sum over the fin × section pairs of the force on the
/// fins across the gap, along +y (the side a positive `fin_offset` points to), at the samples
/// inside the zone (every dt and at events). A fin off-centre is pushed back towards the centre
/// plane, so a positive offset gives a negative force; the magnets take the reaction.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct LateralPeak {
    /// The signed lateral force where its size is largest, N (0: no lateral force).
    #[serde(rename = "peak_lateral_force_n")]
    pub force_n: f64,
    /// Vehicle front position there, m (None: no lateral force).
    #[serde(rename = "peak_lateral_position_m")]
    pub position_m: Option<f64>,
    /// Speed there, m/s (None: no lateral force).
    #[serde(rename = "peak_lateral_speed_m_s")]
    pub speed_m_s: Option<f64>,
}

/// Energy dissipated in and temperature of one fin over the pass.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FinHeat {
    /// Fin name.
    pub fin: String,
    /// Energy dissipated in this fin, J.
    pub energy_j: f64,
    /// Temperature before the pass, °C.
    pub start_temp_c: f64,
    /// Temperature at the end of the pass (vehicle fins, no cooling during the pass), °C.
    pub end_temp_c: f64,
}

/// The load between one magnet section and the fins over a run: what its mounting (and the
/// fins') must carry. Forces are on the vehicle along the track's +s; the section's mounting
/// takes the opposite (a track section braking a vehicle moving in +s is pulled in +s).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SectionLoad {
    /// Section name.
    pub section: String,
    /// Largest |force| over the run (five Gauss–Legendre nodes and both ends of every step), N.
    pub peak_force_n: f64,
    /// Time of the peak, s (None: no force).
    pub peak_force_time_s: Option<f64>,
    /// Vehicle front position at the peak, m (None: no force).
    pub peak_force_position_m: Option<f64>,
    /// Impulse ∫F dt of the force on the vehicle along +s, N·s (negative: braking motion in +s).
    pub impulse_n_s: f64,
    /// Energy the section's eddy currents dissipate, −∫F·v dt, J (≥ 0).
    pub energy_j: f64,
}

impl SectionLoad {
    /// No load yet on `section`.
    pub fn zero(section: &Section) -> Self {
        Self {
            section: section.name.clone(),
            peak_force_n: 0.0,
            peak_force_time_s: None,
            peak_force_position_m: None,
            impulse_n_s: 0.0,
            energy_j: 0.0,
        }
    }
}

/// The result of one case. Its `Serialize` is the case as `run --json` prints it: the fields
/// below except the ones marked skipped, and `peak_decel_g` beside `peak_decel_m_s2`.
#[derive(Debug, Clone, Serialize)]
pub struct RunResult {
    /// Case name.
    pub case: String,
    /// kg.
    pub mass_kg: f64,
    /// How it ended.
    pub outcome: Outcome,
    /// Speed when the first fin meets the first active section, m/s (None: never entered).
    pub entry_speed_m_s: Option<f64>,
    /// Signed speed along the track when the vehicle left the zone, m/s.
    pub exit_speed_m_s: Option<f64>,
    /// Lowest |v| between entry and the end of the run (continuous output), m/s.
    pub min_speed_m_s: Option<f64>,
    /// Front position at the stall, m.
    pub stall_position_m: Option<f64>,
    /// Peak deceleration along the direction of travel inside the zone, m/s²: the largest value
    /// of the integrator's continuous output over every step (not only at samples).
    #[serde(flatten, serialize_with = "serialize_peak_decel")]
    pub peak_decel_m_s2: Option<f64>,
    /// Time of the peak, s.
    pub peak_decel_time_s: Option<f64>,
    /// Front position at the peak, m.
    pub peak_decel_position_m: Option<f64>,
    /// Largest rate of rise of deceleration inside the zone, g/s: the backward difference between
    /// consecutive samples (every dt and at events).
    pub peak_onset_g_s: Option<f64>,
    /// From entry to exit (or stall / end), s.
    pub time_in_zone_s: Option<f64>,
    /// Entry time, s.
    #[serde(skip)]
    pub entry_time_s: Option<f64>,
    /// ∫ |brake force · v| dt, J.
    pub braking_energy_j: f64,
    /// Work done against resistance, J.
    #[serde(skip)]
    pub resistance_energy_j: f64,
    /// Kinetic + potential + dissipated − initial, J.
    pub energy_residual_j: f64,
    /// Initial kinetic + potential energy (reference 0 at s = 0), J.
    #[serde(skip)]
    pub initial_energy_j: f64,
    /// Largest |brake force| at the samples (every dt and at events), N.
    pub peak_brake_force_n: f64,
    /// The peak lateral force on the fins (only when some section has its fin off-centre):
    /// `peak_lateral_force_n`, `peak_lateral_position_m`, `peak_lateral_speed_m_s` in output.
    #[serde(flatten, skip_serializing_if = "Option::is_none")]
    pub peak_lateral: Option<LateralPeak>,
    /// Accepted integrator steps.
    pub steps: u64,
    /// Right-hand-side evaluations.
    pub rhs_evaluations: u64,
    /// Whether the direction of travel reversed at some point.
    pub reversed: bool,
    /// End time, s.
    #[serde(skip)]
    pub end_time_s: f64,
    /// Per-fin heat.
    #[serde(skip)]
    pub fins: Vec<FinHeat>,
    /// Per section (scenario order), its peak force, impulse and energy over the run; empty
    /// unless [`RunOptions::section_loads`] asked for them.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub sections: Vec<SectionLoad>,
    /// Warnings (e.g. a measured curve left its range).
    pub warnings: Vec<String>,
    /// Samples (every dt and at events; inside the zone only unless full sampling was asked for).
    #[serde(skip)]
    pub samples: Vec<Sample>,
    /// The integrator's dense output of position and speed, step by step (only when
    /// [`RunOptions::trajectory`] asks for it).
    #[serde(skip)]
    pub trajectory: Vec<trajectory::PathStep>,
}

/// Serializes the peak deceleration as `peak_decel_m_s2` and, beside it, `peak_decel_g` (the
/// same peak in units of standard gravity).
fn serialize_peak_decel<S: serde::Serializer>(
    peak_m_s2: &Option<f64>,
    serializer: S,
) -> Result<S::Ok, S::Error> {
    use serde::ser::SerializeMap;
    let mut map = serializer.serialize_map(Some(2))?;
    map.serialize_entry("peak_decel_m_s2", peak_m_s2)?;
    let peak_g = peak_m_s2.map(|a| a / crate::constants::STANDARD_GRAVITY_M_S2);
    map.serialize_entry("peak_decel_g", &peak_g)?;
    map.end()
}

impl RunResult {
    /// A result with nothing happened yet: outcome `time_limit`, no speeds, no energy.
    pub fn empty(case: &str, mass_kg: f64, initial_energy_j: f64) -> Self {
        Self {
            case: case.to_string(),
            mass_kg,
            outcome: Outcome::TimeLimit,
            reversed: false,
            entry_speed_m_s: None,
            exit_speed_m_s: None,
            min_speed_m_s: None,
            stall_position_m: None,
            peak_decel_m_s2: None,
            peak_decel_time_s: None,
            peak_decel_position_m: None,
            peak_onset_g_s: None,
            time_in_zone_s: None,
            entry_time_s: None,
            braking_energy_j: 0.0,
            resistance_energy_j: 0.0,
            energy_residual_j: 0.0,
            initial_energy_j,
            peak_brake_force_n: 0.0,
            peak_lateral: None,
            steps: 0,
            rhs_evaluations: 0,
            end_time_s: 0.0,
            fins: vec![],
            sections: vec![],
            warnings: vec![],
            samples: vec![],
            trajectory: vec![],
        }
    }

    /// Peak deceleration in units of standard gravity.
    pub fn peak_decel_g(&self) -> Option<f64> {
        self.peak_decel_m_s2
            .map(|a| a / crate::constants::STANDARD_GRAVITY_M_S2)
    }

    /// Peak felt deceleration along the direction of travel inside the zone, g, from the kept
    /// samples (events included): what a rider feels, brake and resistance without gravity.
    /// It differs from [`RunResult::peak_decel_g`] (the vehicle's net deceleration) by the
    /// along-track gravity: 1 g on a vertical tower. None without samples in the zone.
    pub fn peak_felt_decel_g(&self) -> Option<f64> {
        let t0 = self.entry_time_s?;
        let t1 = t0 + self.time_in_zone_s.unwrap_or(f64::INFINITY);
        self.samples
            .iter()
            .filter(|s| s.t_s >= t0 && s.t_s <= t1)
            .map(|s| {
                let dir = if s.v_m_s < 0.0 { -1.0 } else { 1.0 };
                -s.felt_along_track_g(self.mass_kg) * dir
            })
            .reduce(f64::max)
    }
}

impl Sample {
    /// Felt specific force along the track's +s direction, g: brake and resistance over the
    /// weight (gravity acts on rider and seat alike and is not felt).
    pub fn felt_along_track_g(&self, mass_kg: f64) -> f64 {
        (self.brake_force_n + self.resistance_force_n)
            / (mass_kg * crate::constants::STANDARD_GRAVITY_M_S2)
    }
}
