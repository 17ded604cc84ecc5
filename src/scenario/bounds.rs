//! Physical plausibility and work bounds of a scenario: every value the model accepts lies in a
//! range that some real braking zone could have, and the work a scenario asks for (cases, pairs,
//! heat cells, dispatches) is bounded before any of it starts. Each bound carries its reason,
//! which the validation message quotes. These are project bounds (common practice: generous
//! envelopes around anything a linear eddy-current brake has been built for), not physics.

use crate::units::Kind;

/// The plausible magnitude of a quantity of each kind, in SI (°C for temperatures), with the
/// reason quoted when a value lies outside: `(lowest, highest, reason)`.
pub fn magnitude_bound(kind: Kind) -> Option<(f64, f64, &'static str)> {
    Some(match kind {
        Kind::Length => (
            -MAX_LENGTH_M,
            MAX_LENGTH_M,
            "lengths and positions lie within 100 km (longer than any track or zone)",
        ),
        Kind::Speed => (
            -MAX_SPEED_M_S,
            MAX_SPEED_M_S,
            "speeds lie within 1000 m/s (the air and rolling laws of the model do not hold beyond; no \
             eddy-current brake is built for more)",
        ),
        Kind::Mass => (0.0, 1e7, "masses lie below 10 000 t"),
        Kind::Temperature => (
            -273.15,
            2000.0,
            "temperatures lie between absolute zero and 2000 °C",
        ),
        Kind::Conductivity => (0.0, 1e9, "conductivities lie below 1e9 S/m (silver: 6.3e7 S/m)"),
        Kind::Density => (0.0, 1e5, "densities lie below 1e5 kg/m³"),
        Kind::SpecificHeat => (0.0, 1e5, "specific heats lie below 1e5 J/(kg·K)"),
        Kind::Force => (-1e9, 1e9, "forces lie within 1 GN"),
        Kind::ForcePerLength => (-1e9, 1e9, "forces per metre lie within 1 GN/m"),
        Kind::Area => (0.0, 1e4, "areas lie below 10 000 m²"),
        Kind::Time => (-1e7, 1e7, "times lie within 1e7 s (about four months)"),
        Kind::Acceleration => (-1e5, 1e5, "accelerations lie within about 10 000 g"),
        Kind::Jerk => (-1e7, 1e7, "rates of acceleration lie within about 1e6 g/s"),
        Kind::HeatTransfer => (0.0, 1e6, "film coefficients lie below 1e6 W/(m²·K)"),
        Kind::FluxDensity | Kind::TempCoefficient | Kind::Angle | Kind::Ratio => return None,
    })
}

/// Largest length or position, m.
pub const MAX_LENGTH_M: f64 = 1e5;
/// Longest vehicle, m (a long train of coaster cars is under 50 m, a sled under 20 m; common
/// practice, generous).
pub const MAX_VEHICLE_LENGTH_M: f64 = 1000.0;
/// Largest speed, m/s.
pub const MAX_SPEED_M_S: f64 = 1e3;
/// Smallest pole pitch, m (finer than any magnet row; the field would not reach the fin).
pub const MIN_POLE_PITCH_M: f64 = 1e-3;
/// Smallest length of a fin or a magnet section, m (each end is an event of the integrator).
pub const MIN_ELEMENT_LENGTH_M: f64 = 1e-3;
/// Most copies of one repeated fin or section.
pub const MAX_REPEAT: u32 = 1000;
/// Longest `time_limit`, s (an hour in the zone: any brake has stopped or released by then).
pub const MAX_TIME_LIMIT_S: f64 = 3600.0;
/// Most dispatches of a duty cycle.
pub const MAX_CYCLES: u32 = 10_000;

/// Most points of a lift speed profile (project bound: a lift's speed changes a few times).
pub const MAX_LIFT_POINTS: usize = 1000;
/// Most cases (listed and generated) of one scenario.
pub const MAX_CASES: usize = 10_000;
/// Most fin × magnet pairs summed over the cases (each is evaluated at every step of a run).
pub const MAX_CASE_PAIRS: usize = 2_000_000;
/// Most heat cells along track fins (5 cm cells: 100 km of fin).
pub const MAX_HEAT_CELLS: usize = 2_000_000;
/// Most passes of the duty cycle over all cases (cases × cycles).
pub const MAX_PASSES: usize = 200_000;
/// Most samples of one sweep (each is a full case: at ~1 ms a case, a few minutes on two cores).
pub const MAX_SWEEP_SAMPLES: usize = 1_000_000;
/// Most sampled variables of a sweep (the dimensions of the Sobol sequence used).
pub const MAX_SWEEP_VARIABLES: usize = 256;
/// Most fin × magnet pairs summed over a sweep's samples.
pub const MAX_SWEEP_PAIRS: usize = 50_000_000;
/// Most force tables a sweep may build (each sampled design: ~20 ms a table, ~4 min on two cores).
pub const MAX_SWEEP_TABLES: usize = 20_000;
