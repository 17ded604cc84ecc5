//! Every default of the scenario format in one place: the value validation fills in when a key
//! is left out, each with where it comes from. The writer (`scenario::write`) writes every value
//! explicitly, so a written file does not depend on these.

use crate::constants::REFERENCE_TEMPERATURE_C;

/// Lateral lane of a fin or magnet section without `lane:` (project convention: a single lane
/// needs no name).
pub const LANE: &str = "main";

/// Fin and magnet temperature without `temperatures:`, the magnet temperature of a measured
/// `force_curve` without `magnet_temp`, and the duty-cycle `ambient`, °C: the reference
/// temperature of conductivities and remanences (20 °C, IEC 60028).
pub const TEMPERATURE_C: f64 = REFERENCE_TEMPERATURE_C;

/// Fin offset of a magnet section without `fin_offset`, m: the fin centred between the rows (as
/// designed; the offset is a tolerance or a failure to study). The writer leaves a zero offset
/// out, so a written centred design reads as before.
pub const FIN_OFFSET_M: f64 = 0.0;

/// Reversible temperature coefficient of remanence without `remanence_temp_coeff`, 1/K: sintered
/// NdFeB is about −0.12 %/K (common practice, manufacturers' grade tables).
pub const REMANENCE_TEMP_COEFF_PER_K: f64 = -0.0012;

/// Air density without `track.air_density`, kg/m³: ISA sea level is 1.225 kg/m³ (ISO 2533:1975);
/// 1.2 kg/m³ is the usual round figure (common practice).
pub const AIR_DENSITY_KG_M3: f64 = 1.2;

/// Along-track slope dz/ds without `track.grade`, `track.angle` or `track.profile`: a level
/// track (project convention).
pub const SLOPE: f64 = 0.0;

/// Start speed without `start.speed`, m/s: released from rest (project convention).
pub const START_SPEED_M_S: f64 = 0.0;

/// Rolling coefficient without `resistance.rolling` (project convention: no resistance unless
/// given; conservative for braking, which then does all the work).
pub const ROLLING_COEFF: f64 = 0.0;

/// Drag area Cd·A without `resistance.drag_area`, m² (as [`ROLLING_COEFF`]).
pub const DRAG_AREA_M2: f64 = 0.0;

/// Constant friction without `resistance.friction`, N (as [`ROLLING_COEFF`]).
pub const FRICTION_N: f64 = 0.0;

/// Speed below which the vehicle counts as stalled, without `stall_speed`, m/s (project choice:
/// far below any braking target, far above the integrator's tolerances).
pub const STALL_SPEED_M_S: f64 = 0.05;

/// Longest simulated time of one case without `time_limit`, s (project choice: far longer than
/// any pass through a brake zone).
pub const TIME_LIMIT_S: f64 = 300.0;

/// Relative tolerance of the integrator without `solver.rtol` (project choice; the README's
/// "Motion" paragraph).
pub const SOLVER_RTOL: f64 = 1e-10;

/// Absolute tolerance of the integrator without `solver.atol` (as [`SOLVER_RTOL`]).
pub const SOLVER_ATOL: f64 = 1e-10;

/// Poles of the rider-acceleration low-pass filter without `rider.filter.order` (common practice
/// for ride accelerations; from memory, check the applicable standard).
pub const FILTER_ORDER: usize = 4;

/// Corner of the rider-acceleration low-pass filter without `rider.filter.corner_hz`, Hz (common
/// practice for ride accelerations; from memory, check the applicable standard).
pub const FILTER_CORNER_HZ: f64 = 5.0;

/// Uniform resampling rate of felt accelerations without `rider.filter.sample_rate_hz` (also used
/// when filtering is off), Hz (project choice: 200 samples per period of the corner frequency).
pub const FILTER_SAMPLE_RATE_HZ: f64 = 1000.0;

/// Differentiation window of onset and release without `rider.rates.window`, s (project choice,
/// common practice: a 10 ms central difference changes the slope of a 5 Hz signal by 0.4 %).
pub const RATE_WINDOW_S: f64 = 0.01;

/// Cell length along track fins for the heat of a pass, m (a tenth of a typical magnet unit,
/// finer than the temperature gradients a pass leaves; project choice).
pub const HEAT_CELL_M: f64 = 0.05;

/// Slope |dz/ds| above which the default rider axis along the track is `z` (along the spine,
/// towers) rather than `x` (fore–aft, seated) (project convention: steeper than about 64°).
pub const STEEP_SLOPE: f64 = 0.9;

/// Gap from the zone end to the vehicle's rear at the start of a backwards entry without
/// `generate.rollback.position`, m (project choice: the rear starts 1 cm clear of the zone).
pub const ROLLBACK_CLEARANCE_M: f64 = 0.01;

/// Cap on the dispatches of a duty cycle run `until_steady` without `duty.max_cycles` (project
/// choice: ends a duty loop that does not settle).
pub const DUTY_MAX_CYCLES: u32 = 1000;

/// Inputs of the magnets' warming by the fins across the gap without `duty.magnets` (common
/// practice, not measured): forced convection in a narrow moving gap 25 W/(m²·K), still air on
/// the magnet face between dispatches 10 W/(m²·K), rolled aluminium or copper fin face
/// emissivity 0.1, coated or painted magnet face 0.8; the estimated mean rise is added to the
/// magnet temperature the checks judge.
pub const MAGNET_EXPOSURE: super::MagnetExposure = super::MagnetExposure {
    gap_film_w_m2_k: 25.0,
    air_film_w_m2_k: 10.0,
    fin_emissivity: 0.1,
    magnet_emissivity: 0.8,
    add_to_magnet_temperature: true,
};

/// Smallest gap between planned modules without `plan.min_spacing`, m (project convention:
/// modules may touch). The slot pitch defaults to module length plus this spacing.
pub const PLAN_MIN_SPACING_M: f64 = 0.0;

/// Source text of a custom material without `source:`.
pub const MATERIAL_SOURCE: &str = "scenario input";

/// Model force factor of a case without `force_factor`: the force model as it is (project
/// convention).
pub const FORCE_FACTOR: f64 = 1.0;
