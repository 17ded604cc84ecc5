//! Features of ride signals besides the filter and the envelope: the raw extremes over every
//! sample of a run (event samples included) and the onset and release rates of a uniformly
//! sampled signal.
//!
//! **Raw extremes.** The integrator's samples are not uniform: besides the fixed output step
//! there are event samples where a fin edge meets a section edge, and the largest raw value
//! often sits there. Resampling onto a uniform grid interpolates between samples and so can
//! miss them; [`raw_extremes`] reads the series as it is. Read as piecewise linear, its
//! extremes are at samples, so the largest and smallest sample are exact.
//!
//! **Onset and release.** The rate of change over a differentiation window w is the central
//! difference r(t_k) = (y(t_k + w/2) − y(t_k − w/2))/w on the samples, with w rounded to a whole
//! even number of steps 2h, h ≥ 1 (the window actually used is reported). Onset is the largest
//! rate of rise, release the largest rate of fall (reported as a positive number), each with
//! the time of the window's centre. The default window [`DEFAULT_RATE_WINDOW_S`] = 10 ms is
//! common practice (no standard is cited): short against the 200 ms period of the 5 Hz filter
//! corner, so on a filtered signal the difference is the derivative to within the sinc factor
//! sin(πfw)/(πfw) = 0.9959 at 5 Hz, while on a raw signal a jump at an event is spread over
//! 10 ms instead of one integrator step.

use super::filter::{validate_series, SignalError, UniformSignal};

/// Default differentiation window for onset and release, s (common practice; see the module
/// documentation).
pub const DEFAULT_RATE_WINDOW_S: f64 = 0.01;

/// Largest and smallest value of a series and when they occur.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Extremes {
    /// Largest value (signal units).
    pub max: f64,
    /// Time of the first sample carrying it, s.
    pub max_time_s: f64,
    /// Smallest value (signal units).
    pub min: f64,
    /// Time of the first sample carrying it, s.
    pub min_time_s: f64,
}

/// The extremes of a non-uniform series over every sample, events (equal times) included.
/// Times must not decrease, as for [`super::filter::resample_uniform`].
///
/// Errors: different lengths, no samples, a non-finite time or value, decreasing times.
pub fn raw_extremes(t_s: &[f64], y: &[f64]) -> Result<Extremes, SignalError> {
    validate_series(t_s, y)?;
    let mut out = Extremes {
        max: f64::NEG_INFINITY,
        max_time_s: f64::NAN,
        min: f64::INFINITY,
        min_time_s: f64::NAN,
    };
    for (&t, &v) in t_s.iter().zip(y) {
        if v > out.max {
            out.max = v;
            out.max_time_s = t;
        }
        if v < out.min {
            out.min = v;
            out.min_time_s = t;
        }
    }
    Ok(out)
}

/// The extremes of a uniformly sampled signal (every sample).
///
/// Errors: the signal breaks the [`UniformSignal`] invariants or has no samples.
pub fn uniform_extremes(signal: &UniformSignal) -> Result<Extremes, SignalError> {
    signal.validate()?;
    let t: Vec<f64> = (0..signal.len()).map(|k| signal.time_s(k)).collect();
    raw_extremes(&t, &signal.values)
}

/// One extreme rate of change.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rate {
    /// Rate, signal units per second (g/s for a signal in g); for release, the rate of fall as
    /// a positive number.
    pub per_s: f64,
    /// Centre of the window where it occurs (the first on a tie), s.
    pub time_s: f64,
}

/// Onset and release of a signal over one differentiation window.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OnsetRelease {
    /// Largest rate of rise (negative if the signal never rises over a window).
    pub onset: Rate,
    /// Largest rate of fall, as a positive number (negative if it never falls).
    pub release: Rate,
    /// The window used, 2h·dt, s.
    pub window_s: f64,
}

/// Onset and release of `signal` over a central-difference window of about `window_s` (module
/// documentation): h = max(1, round(window_s / (2·dt))) steps each side of the centre sample.
///
/// For braking felt as a negative value (−x when seated), pass the negated signal so onset is
/// the rise of the deceleration.
///
/// Errors: the signal breaks the [`UniformSignal`] invariants; the window is not finite and
/// positive; the signal is shorter than the window used (fewer than 2h + 1 samples).
pub fn onset_release(signal: &UniformSignal, window_s: f64) -> Result<OnsetRelease, SignalError> {
    signal.validate()?;
    if !(window_s.is_finite() && window_s > 0.0) {
        return Err(SignalError::InvalidWindow { window_s });
    }
    let dt = signal.dt_s;
    let half = (window_s / (2.0 * dt)).round().max(1.0);
    let used_s = 2.0 * half * dt;
    let y = &signal.values;
    if half >= y.len() as f64 / 2.0 {
        return Err(SignalError::WindowLongerThanSignal {
            window_s: used_s,
            duration_s: signal.duration_s(),
        });
    }
    // Here 2·half < n, so half fits a usize.
    let h = half as usize;
    let mut onset = Rate {
        per_s: f64::NEG_INFINITY,
        time_s: f64::NAN,
    };
    let mut release = onset;
    for (k, w) in y.windows(2 * h + 1).enumerate() {
        let rate = (w[2 * h] - w[0]) / used_s;
        let centre = signal.time_s(k + h);
        if rate > onset.per_s {
            onset = Rate {
                per_s: rate,
                time_s: centre,
            };
        }
        if -rate > release.per_s {
            release = Rate {
                per_s: -rate,
                time_s: centre,
            };
        }
    }
    Ok(OnsetRelease {
        onset,
        release,
        window_s: used_s,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rejects_bad_inputs() {
        let s = UniformSignal::new(0.001, 0.0, vec![0.0; 5]).unwrap();
        assert!(matches!(
            onset_release(&s, 0.0),
            Err(SignalError::InvalidWindow { .. })
        ));
        assert!(matches!(
            onset_release(&s, f64::NAN),
            Err(SignalError::InvalidWindow { .. })
        ));
        // h = 3 needs 7 samples.
        assert!(matches!(
            onset_release(&s, 0.006),
            Err(SignalError::WindowLongerThanSignal { .. })
        ));
        assert!(onset_release(&s, 0.004).is_ok());
        assert_eq!(raw_extremes(&[], &[]), Err(SignalError::Empty));
        assert!(matches!(
            raw_extremes(&[0.0, 1.0], &[0.0]),
            Err(SignalError::LengthMismatch { .. })
        ));
        assert!(matches!(
            raw_extremes(&[1.0, 0.0], &[0.0, 0.0]),
            Err(SignalError::TimeDecreasing { .. })
        ));
        assert!(matches!(
            raw_extremes(&[0.0, 1.0], &[0.0, f64::INFINITY]),
            Err(SignalError::NonFiniteValue { index: 1 })
        ));
    }
}
