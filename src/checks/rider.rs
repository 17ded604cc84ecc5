//! What the rider feels: the specific (felt) acceleration in rider axes fixed to the vehicle, raw
//! and filtered.
//!
//! Axes are fixed to the vehicle, which faces the track's +s direction. Along the track the felt
//! acceleration is (brake + resistance)/(m·g) in track coordinates: gravity acts on rider and seat
//! alike and is not felt. Across the track the rider feels the track-normal part of gravity,
//! cos θ. Signs follow the usual ride convention (e.g. ASTM F2291, from memory): with the track
//! along x (seated, facing +s) braking while moving forward is −x (thrown forward, "eyes front")
//! and braking while rolling back is +x (pressed into the seat back, "eyes back"); with the track
//! along the spine z (a tower descending towards +s) braking while descending is +z (pressed into
//! the seat) and braking while moving up is −z.
use super::features::raw_extremes;
use super::filter::{resample_uniform, SignalError, UniformSignal};
use super::zero_phase::RideFilter;
use crate::constants::STANDARD_GRAVITY_M_S2 as G;
use crate::dynamics::RunResult;
use crate::scenario::{defaults, Axis, Rider};
use serde::Serialize;

/// The felt acceleration of one run on the three rider axes, uniformly sampled, in g.
#[derive(Debug, Clone)]
pub struct RiderSignals {
    /// Raw signals per axis (x, y, z).
    pub raw: [UniformSignal; 3],
    /// Filtered signals per axis (equal to raw when filtering is off).
    pub filtered: [UniformSignal; 3],
    /// Whether a filter was applied.
    pub filter_applied: bool,
    /// Extremes of the raw signals per axis over every sample of the run, events included
    /// (the uniform resampling would miss a peak that sits on an event).
    pub raw_extremes: [(f64, f64); 3],
    /// Felt deceleration in the direction of travel, g (positive while braking), raw.
    pub braking_raw: UniformSignal,
    /// The same from the filtered felt acceleration.
    pub braking_filtered: UniformSignal,
}

/// Peaks of one axis.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct AxisPeaks {
    /// Largest raw value, g.
    pub raw_max_g: f64,
    /// Smallest raw value, g.
    pub raw_min_g: f64,
    /// Largest filtered value, g.
    pub filtered_max_g: f64,
    /// Smallest filtered value, g.
    pub filtered_min_g: f64,
}

fn extremes(s: &UniformSignal) -> (f64, f64) {
    s.values
        .iter()
        .fold((f64::NEG_INFINITY, f64::INFINITY), |(hi, lo), &v| {
            (hi.max(v), lo.min(v))
        })
}

impl RiderSignals {
    /// Peaks per axis.
    pub fn peaks(&self) -> [AxisPeaks; 3] {
        std::array::from_fn(|i| {
            let (rh, rl) = self.raw_extremes[i];
            let (fh, fl) = extremes(&self.filtered[i]);
            AxisPeaks {
                raw_max_g: rh,
                raw_min_g: rl,
                filtered_max_g: fh,
                filtered_min_g: fl,
            }
        })
    }
}

/// The sign convention of the felt acceleration for a rider block, in one sentence (without
/// passengers: the vehicle's axes and no rider's words).
pub fn sign_convention(rider: &Rider) -> String {
    if !rider.passengers {
        let a = rider.track_axis.name();
        let (fwd, back) = match rider.track_axis {
            Axis::Z => ("+", "−"),
            _ => ("−", "+"),
        };
        return format!(
            "acceleration in g felt by the payload, on axes fixed to the vehicle (no passengers; \
             track along {a}, vehicle facing +s): braking while moving towards +s is {fwd}{a}, \
             braking while moving back is {back}{a}"
        );
    }
    match rider.track_axis {
        Axis::Z => "felt acceleration in g on rider axes fixed to the vehicle (track along the \
                    spine z): braking while descending is +z (into the seat), braking while \
                    moving up is −z"
            .into(),
        axis => {
            let a = axis.name();
            format!(
                "felt acceleration in g on rider axes fixed to the vehicle (track along {a}, \
                 rider facing +s): braking while moving forward is −{a} (eyes front), braking \
                 while rolling back is +{a} (eyes back)"
            )
        }
    }
}

/// "rider axis" with passengers, "vehicle axis" without.
pub fn axis_word(rider: &Rider) -> &'static str {
    if rider.passengers {
        "rider axis"
    } else {
        "vehicle axis"
    }
}

/// Columns of a run's profile: the felt acceleration at each sample on the track axis and the
/// axis normal to the track (x and z), raw (from the sample) and filtered (the filtered signal
/// of [`rider_signals`], linear between its grid points), in g: `(name, values)` named
/// `felt_<axis>_raw_g` and `felt_<axis>_filtered_g`. Without a filter the two are equal; a run
/// whose signals cannot be formed (too few samples) has no filtered values (`None`: empty cells).
pub fn profile_columns(run: &RunResult, rider: &Rider) -> Vec<(String, Vec<Option<f64>>)> {
    let sig = rider_signals(run, rider).ok();
    let (along_index, along_sign) = match rider.track_axis {
        Axis::Z => (2, -1.0),
        _ => (0, 1.0),
    };
    let mut out = Vec::new();
    for (k, name) in [(0usize, "x"), (2, "z")] {
        let raw: Vec<Option<f64>> = run
            .samples
            .iter()
            .map(|s| {
                Some(if k == along_index {
                    along_sign * felt_along_track_g(s, run.mass_kg)
                } else {
                    felt_normal_g(s)
                })
            })
            .collect();
        let filtered: Vec<Option<f64>> = run
            .samples
            .iter()
            .map(|s| {
                sig.as_ref()
                    .and_then(|sig| at_time(&sig.filtered[k], s.t_s))
            })
            .collect();
        out.push((format!("felt_{name}_raw_g"), raw));
        out.push((format!("felt_{name}_filtered_g"), filtered));
    }
    out
}

/// A uniform signal at time `t_s`, linear between grid points, held at its ends; `None` for an
/// empty signal.
fn at_time(u: &UniformSignal, t_s: f64) -> Option<f64> {
    let n = u.values.len();
    if n == 0 {
        return None;
    }
    let x = ((t_s - u.t0_s) / u.dt_s).clamp(0.0, (n - 1) as f64);
    let i = (x.floor() as usize).min(n - 1);
    let j = (i + 1).min(n - 1);
    let f = x - i as f64;
    Some(u.values[i] * (1.0 - f) + u.values[j] * f)
}

/// Why the felt acceleration of a run could not be formed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RiderSignalError {
    /// The run has fewer than two samples in the zone (it never entered, or left at once).
    #[error("the run has fewer than two samples in the zone")]
    TooFewSamples,
    /// Resampling or the filter design failed.
    #[error(transparent)]
    Signal(#[from] SignalError),
}

/// Felt specific force along the track's +s direction (the vehicle's x), in g: negative while
/// braking a vehicle moving forward, positive while braking one rolling back.
pub fn felt_along_track_g(s: &crate::dynamics::Sample, mass_kg: f64) -> f64 {
    s.felt_along_track_g(mass_kg)
}

/// Felt specific force normal to the track (seat-normal, towards the track), in g: the normal
/// component of gravity, cos θ, plus the centripetal term v²·κ/g of the track's curvature under
/// the vehicle (lighter over a crest, heavier in a dip; textbook circular motion a = v²/R).
pub fn felt_normal_g(s: &crate::dynamics::Sample) -> f64 {
    s.cos_theta + s.v_m_s * s.v_m_s * s.curvature_1_m / G
}

/// Felt acceleration along the track and normal to it from a run's samples (inside the zone),
/// resampled at the filter's rate and filtered (single pass) when the rider block asks for it.
pub fn rider_signals(run: &RunResult, rider: &Rider) -> Result<RiderSignals, RiderSignalError> {
    let mut t = Vec::with_capacity(run.samples.len());
    let mut along = Vec::with_capacity(run.samples.len());
    let mut normal = Vec::with_capacity(run.samples.len());
    let mut dir = Vec::with_capacity(run.samples.len());
    for s in &run.samples {
        if t.last().is_some_and(|&l: &f64| s.t_s < l) {
            continue;
        }
        t.push(s.t_s);
        along.push(felt_along_track_g(s, run.mass_kg));
        normal.push(felt_normal_g(s));
        dir.push(if s.v_m_s < 0.0 { -1.0 } else { 1.0 });
    }
    if t.len() < 2 || t[t.len() - 1] <= t[0] {
        return Err(RiderSignalError::TooFewSamples);
    }
    let ea = raw_extremes(&t, &along)?;
    let en = raw_extremes(&t, &normal)?;
    let rate = rider
        .filter
        .map_or(defaults::FILTER_SAMPLE_RATE_HZ, |f| f.sample_rate_hz);
    let dt = 1.0 / rate;
    let along = resample_uniform(&t, &along, dt)?;
    let normal = resample_uniform(&t, &normal, dt)?;
    // Direction of travel on the grid: the sign of the sample at or before each grid time.
    let dir_u: Vec<f64> = (0..along.values.len())
        .map(|k| {
            let tk = along.t0_s + k as f64 * dt;
            let i = t.partition_point(|&x| x <= tk).saturating_sub(1);
            dir[i]
        })
        .collect();
    let filter = match rider.filter {
        Some(f) => Some(RideFilter::design(f.phase, f.order, f.corner_hz, rate)?),
        None => None,
    };
    let along_f = match &filter {
        Some(f) => f.filter_signal(&along)?,
        None => along.clone(),
    };
    let normal_f = match &filter {
        Some(f) => f.filter_signal(&normal)?,
        None => normal.clone(),
    };
    let braking = |u: &UniformSignal| UniformSignal {
        values: u.values.iter().zip(&dir_u).map(|(v, d)| -d * v).collect(),
        ..u.clone()
    };
    let braking_raw = braking(&along);
    let braking_filtered = braking(&along_f);
    let zero = UniformSignal {
        values: vec![0.0; along.values.len()],
        ..along.clone()
    };
    let neg = |u: UniformSignal| UniformSignal {
        values: u.values.iter().map(|v| -v).collect(),
        ..u
    };
    let (raw, filtered, raw_extremes) = match rider.track_axis {
        Axis::X => (
            [along, zero.clone(), normal],
            [along_f, zero, normal_f],
            [(ea.max, ea.min), (0.0, 0.0), (en.max, en.min)],
        ),
        // Along the spine: braking while descending presses into the seat (+z); the normal
        // part is fore–aft.
        _ => (
            [normal, zero.clone(), neg(along)],
            [normal_f, zero, neg(along_f)],
            [(en.max, en.min), (0.0, 0.0), (-ea.min, -ea.max)],
        ),
    };
    Ok(RiderSignals {
        raw,
        filtered,
        filter_applied: filter.is_some(),
        raw_extremes,
        braking_raw,
        braking_filtered,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dynamics::Sample;
    use crate::scenario::FilterSettings;

    fn run_with(samples: Vec<Sample>) -> RunResult {
        let mut r = empty_run();
        r.samples = samples;
        r
    }

    /// A seated rider (track along x) without a filter.
    fn seated_unfiltered() -> Rider {
        Rider {
            passengers: true,
            track_axis: Axis::X,
            filter: None,
            rates: Default::default(),
        }
    }

    fn empty_run() -> RunResult {
        RunResult::empty("c", 1000.0, 0.0)
    }

    fn sample(t: f64, brake: f64, cos: f64) -> Sample {
        Sample {
            t_s: t,
            s_m: t,
            v_m_s: 10.0,
            a_m_s2: 0.0,
            decel_g: 0.0,
            onset_g_s: 0.0,
            brake_force_n: brake,
            gravity_force_n: 0.0,
            resistance_force_n: 0.0,
            cos_theta: cos,
            curvature_1_m: 0.0,
            overlap_m: 0.0,
            event: false,
        }
    }

    #[test]
    fn braking_is_minus_x_seated_and_plus_z_on_a_tower() {
        // 1 g of braking on 1000 kg is 9806.65 N (definition of the standard g).
        let samples: Vec<Sample> = (0..1000)
            .map(|i| sample(i as f64 * 1e-3, -9806.65, 1.0))
            .collect();
        let r = run_with(samples);
        let seated = seated_unfiltered();
        let s = rider_signals(&r, &seated).unwrap();
        assert!((s.peaks()[0].raw_min_g + 1.0).abs() < 1e-12);
        assert!((s.peaks()[2].raw_max_g - 1.0).abs() < 1e-12);
        let tower = Rider {
            passengers: true,
            track_axis: Axis::Z,
            filter: Some(FilterSettings {
                corner_hz: 5.0,
                order: 4,
                sample_rate_hz: 1000.0,
                phase: Default::default(),
            }),
            rates: Default::default(),
        };
        let s = rider_signals(&r, &tower).unwrap();
        assert!((s.peaks()[2].raw_max_g - 1.0).abs() < 1e-12);
        // A constant signal passes the filter unchanged (steady-state start).
        assert!((s.peaks()[2].filtered_max_g - 1.0).abs() < 1e-9);
    }

    #[test]
    fn braking_while_rolling_back_is_plus_x_seated() {
        // Rolling back (v < 0) the brake pushes towards +s: 1 g on 1000 kg is +9806.65 N, felt
        // as +x (into the seat back) by a rider facing +s (axes fixed to the vehicle).
        let samples: Vec<Sample> = (0..1000)
            .map(|i| Sample {
                v_m_s: -10.0,
                ..sample(i as f64 * 1e-3, 9806.65, 1.0)
            })
            .collect();
        let r = run_with(samples);
        let seated = seated_unfiltered();
        let s = rider_signals(&r, &seated).unwrap();
        assert!((s.peaks()[0].raw_max_g - 1.0).abs() < 1e-12);
        assert!(s.peaks()[0].raw_min_g > 0.999);
        let tower = Rider {
            passengers: true,
            track_axis: Axis::Z,
            filter: None,
            rates: Default::default(),
        };
        // Moving up the tower (towards −s) the brake pushes down: −z.
        let s = rider_signals(&r, &tower).unwrap();
        assert!((s.peaks()[2].raw_min_g + 1.0).abs() < 1e-12);
    }

    #[test]
    fn profile_columns_follow_the_samples() {
        // Braking ramps up linearly: 0 to 1 g over 1 s on 1000 kg (9806.65 N = 1 g·1000 kg).
        let samples: Vec<Sample> = (0..=1000)
            .map(|i| {
                let t = i as f64 * 1e-3;
                sample(t, -9806.65 * t, 0.5)
            })
            .collect();
        let r = run_with(samples);
        let seated = seated_unfiltered();
        let cols = profile_columns(&r, &seated);
        let names: Vec<&str> = cols.iter().map(|c| c.0.as_str()).collect();
        assert_eq!(
            names,
            [
                "felt_x_raw_g",
                "felt_x_filtered_g",
                "felt_z_raw_g",
                "felt_z_filtered_g"
            ]
        );
        for (i, s) in r.samples.iter().enumerate() {
            let raw_x = cols[0].1[i].unwrap();
            assert!((raw_x + s.t_s).abs() < 1e-12, "raw x = -t g");
            // Unfiltered: the resampled signal at the sample times (same 1 ms grid).
            assert!((cols[1].1[i].unwrap() - raw_x).abs() < 1e-9);
            assert_eq!(cols[2].1[i], Some(0.5));
        }
        // Along the spine the track axis is z and braking while descending is +z.
        let tower = Rider {
            track_axis: Axis::Z,
            ..seated
        };
        let cols = profile_columns(&r, &tower);
        assert_eq!(cols[2].0, "felt_z_raw_g");
        assert!((cols[2].1[500].unwrap() - 0.5).abs() < 1e-12);
        assert_eq!(cols[0].1[500], Some(0.5));
    }

    #[test]
    fn too_few_samples_is_an_error_not_a_silence() {
        let r = run_with(vec![sample(0.0, 0.0, 1.0)]);
        let seated = seated_unfiltered();
        assert_eq!(
            rider_signals(&r, &seated).err(),
            Some(RiderSignalError::TooFewSamples)
        );
    }

    #[test]
    fn over_a_crest_the_rider_is_lighter_by_v_squared_over_r() {
        // Level crest of radius 50 m at 20 m/s: felt normal 1 − v²/(g·R) = 1 − 400/490.3325 g
        // (textbook uniform circular motion, a = v²/R).
        let samples: Vec<Sample> = (0..1000)
            .map(|i| Sample {
                v_m_s: 20.0,
                curvature_1_m: -1.0 / 50.0,
                ..sample(i as f64 * 1e-3, 0.0, 1.0)
            })
            .collect();
        let r = run_with(samples);
        let rider = seated_unfiltered();
        let s = rider_signals(&r, &rider).unwrap();
        let expected = 1.0 - 400.0 / (9.80665 * 50.0);
        assert!(
            (s.peaks()[2].raw_max_g - expected).abs() < 1e-12,
            "{:?}",
            s.peaks()[2]
        );
    }
}
