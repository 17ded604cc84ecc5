//! Uniform resampling of event-driven time series and the low-pass Butterworth filter used on
//! rider accelerations.
//!
//! The filter is designed the classical way: the analogue Butterworth prototype (S. Butterworth,
//! "On the theory of filter amplifiers", Experimental Wireless and the Wireless Engineer 7, 1930)
//! is mapped to discrete time by the bilinear transform with frequency prewarping (A. V.
//! Oppenheim & R. W. Schafer, "Discrete-Time Signal Processing", 3rd ed., 2010, §7.2), and kept as
//! a cascade of second-order sections, which is far less sensitive to coefficient rounding than
//! the expanded transfer-function polynomials (same reference, §6.9).
//!
//! Project default for ride accelerations: a 4-pole filter with a 5 Hz corner
//! (`DEFAULT_ORDER`, `DEFAULT_CORNER_HZ`); this is common practice, quoted from memory. The
//! default way of applying it is zero-phase, forward and backward with padded ends
//! ([`super::zero_phase`], where the order convention is explained); the single causal pass
//! here ([`Butterworth::filter`]) is the option that reproduces an on-board logger.

use num_complex::Complex64;
use std::f64::consts::PI;
use thiserror::Error;

/// Default number of poles for ride-acceleration filtering: the scenario default
/// [`crate::scenario::defaults::FILTER_ORDER`] (common practice; from memory).
pub const DEFAULT_ORDER: usize = crate::scenario::defaults::FILTER_ORDER;

/// Default corner frequency for ride-acceleration filtering, Hz: the scenario default
/// [`crate::scenario::defaults::FILTER_CORNER_HZ`] (common practice; from memory).
pub const DEFAULT_CORNER_HZ: f64 = crate::scenario::defaults::FILTER_CORNER_HZ;

/// Highest filter order accepted by [`Butterworth::lowpass`].
pub const MAX_ORDER: usize = 8;

/// Largest number of samples [`resample_uniform`] will produce (guards against a tiny step
/// exhausting memory: 50 million samples are 400 MB).
pub const MAX_RESAMPLED_SAMPLES: usize = 50_000_000;

/// Relative tolerance used when deciding whether a time span is a whole number of steps, so that
/// a last sample lying on the grid up to rounding is kept.
const GRID_SNAP_REL: f64 = 1e-9;

/// Errors from resampling, filter design and envelope construction.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum SignalError {
    /// The signal has no samples.
    #[error("the signal has no samples")]
    Empty,
    /// Time and value arrays have different lengths.
    #[error("time and value arrays differ in length: {t_len} times, {y_len} values")]
    LengthMismatch {
        /// Number of time stamps.
        t_len: usize,
        /// Number of values.
        y_len: usize,
    },
    /// A time stamp (or the start time) is NaN or infinite.
    #[error("non-finite time at index {index}")]
    NonFiniteTime {
        /// Index of the offending sample.
        index: usize,
    },
    /// A sample value is NaN or infinite.
    #[error("non-finite value at index {index}")]
    NonFiniteValue {
        /// Index of the offending sample.
        index: usize,
    },
    /// Time stamps go backwards.
    #[error("time decreases at index {index}: {previous_s} s then {t_s} s")]
    TimeDecreasing {
        /// Index of the sample whose time is earlier than its predecessor's.
        index: usize,
        /// Time of the preceding sample, s.
        previous_s: f64,
        /// Time of this sample, s.
        t_s: f64,
    },
    /// The sample step is not finite and positive.
    #[error("sample step must be finite and > 0 s, got {dt_s} s")]
    InvalidStep {
        /// The rejected step, s.
        dt_s: f64,
    },
    /// Resampling would produce more than [`MAX_RESAMPLED_SAMPLES`] samples.
    #[error("resampling would produce about {samples:e} samples, more than the limit {limit}")]
    TooManySamples {
        /// Number of samples that would have been produced (as a float: it may not fit a usize).
        samples: f64,
        /// The limit, [`MAX_RESAMPLED_SAMPLES`].
        limit: usize,
    },
    /// The filter order is outside 1..=[`MAX_ORDER`].
    #[error("filter order must be between 1 and {max}, got {order}")]
    InvalidOrder {
        /// The rejected order.
        order: usize,
        /// The largest accepted order.
        max: usize,
    },
    /// The sample rate is not finite and positive.
    #[error("sample rate must be finite and > 0 Hz, got {sample_rate_hz} Hz")]
    InvalidSampleRate {
        /// The rejected sample rate, Hz.
        sample_rate_hz: f64,
    },
    /// The corner frequency is not finite, positive and below the Nyquist frequency.
    #[error(
        "corner frequency must be finite, > 0 Hz and below the Nyquist frequency \
         {nyquist_hz} Hz, got {corner_hz} Hz"
    )]
    InvalidCorner {
        /// The rejected corner frequency, Hz.
        corner_hz: f64,
        /// Half the sample rate, Hz.
        nyquist_hz: f64,
    },
    /// A signal's sample rate differs from the rate the filter was designed for.
    #[error("signal sample rate {signal_hz} Hz does not match the filter's {filter_hz} Hz")]
    SampleRateMismatch {
        /// Sample rate of the signal, 1/dt, Hz.
        signal_hz: f64,
        /// Sample rate the filter was designed for, Hz.
        filter_hz: f64,
    },
    /// A zero-phase filter order that is odd or outside 2..=2·[`MAX_ORDER`] (the order of a
    /// forward–backward filter counts both passes, so it is even).
    #[error(
        "a zero-phase (forward-backward) filter order must be even, between 2 and {max}, \
         got {order}"
    )]
    InvalidZeroPhaseOrder {
        /// The rejected order.
        order: usize,
        /// The largest accepted order.
        max: usize,
    },
    /// A reflected padding needs more samples than the signal has.
    #[error(
        "padding by reflection needs fewer pad samples than signal samples: \
         {pad_samples} pad samples for {len} samples"
    )]
    PadTooLong {
        /// Requested pad length per end, samples.
        pad_samples: usize,
        /// Signal length, samples.
        len: usize,
    },
    /// A differentiation window that is not finite and positive.
    #[error("differentiation window must be finite and > 0 s, got {window_s} s")]
    InvalidWindow {
        /// The rejected window, s.
        window_s: f64,
    },
    /// The signal is shorter than the differentiation window.
    #[error("the signal ({duration_s} s) is shorter than the differentiation window {window_s} s")]
    WindowLongerThanSignal {
        /// The effective window, s.
        window_s: f64,
        /// The signal's span, s.
        duration_s: f64,
    },
    /// An envelope was given no points.
    #[error("an envelope needs at least one point")]
    EmptyEnvelope,
    /// An envelope duration is negative or not finite.
    #[error("envelope point {index}: duration must be finite and >= 0 s, got {duration_s} s")]
    InvalidEnvelopeDuration {
        /// Index of the offending point.
        index: usize,
        /// The rejected duration, s.
        duration_s: f64,
    },
    /// An envelope level is not finite.
    #[error("envelope point {index}: allowed level must be finite, got {allowed}")]
    InvalidEnvelopeLevel {
        /// Index of the offending point.
        index: usize,
        /// The rejected level (signal units).
        allowed: f64,
    },
    /// Envelope durations go backwards.
    #[error(
        "envelope durations must be non-decreasing: point {index} has {duration_s} s after \
         {previous_s} s"
    )]
    EnvelopeDurationDecreasing {
        /// Index of the offending point.
        index: usize,
        /// Duration of the preceding point, s.
        previous_s: f64,
        /// Duration of this point, s.
        duration_s: f64,
    },
}

/// A uniformly sampled signal: `values[k]` is the value at time `t0_s + k·dt_s`.
///
/// Between samples the signal is read as piecewise linear. Values carry whatever unit the caller
/// uses (m/s² for accelerations in this project).
#[derive(Debug, Clone, PartialEq)]
pub struct UniformSignal {
    /// Sample step, s (finite, > 0).
    pub dt_s: f64,
    /// Time of the first sample, s.
    pub t0_s: f64,
    /// Sample values, in the caller's unit.
    pub values: Vec<f64>,
}

impl UniformSignal {
    /// Builds a signal after checking that `dt_s` is finite and positive, `t0_s` finite and every
    /// value finite. An empty value list is allowed.
    pub fn new(dt_s: f64, t0_s: f64, values: Vec<f64>) -> Result<Self, SignalError> {
        let signal = Self { dt_s, t0_s, values };
        signal.validate()?;
        Ok(signal)
    }

    /// Checks the invariants of [`UniformSignal::new`] (the fields are public, so a signal built
    /// by hand may break them).
    pub fn validate(&self) -> Result<(), SignalError> {
        if !(self.dt_s.is_finite() && self.dt_s > 0.0) {
            return Err(SignalError::InvalidStep { dt_s: self.dt_s });
        }
        if !self.t0_s.is_finite() {
            return Err(SignalError::NonFiniteTime { index: 0 });
        }
        if let Some(index) = self.values.iter().position(|v| !v.is_finite()) {
            return Err(SignalError::NonFiniteValue { index });
        }
        Ok(())
    }

    /// Number of samples.
    pub fn len(&self) -> usize {
        self.values.len()
    }

    /// True when there are no samples.
    pub fn is_empty(&self) -> bool {
        self.values.is_empty()
    }

    /// Sample rate 1/dt, Hz.
    pub fn sample_rate_hz(&self) -> f64 {
        1.0 / self.dt_s
    }

    /// Time spanned from the first to the last sample, (n − 1)·dt, s (0 for fewer than two
    /// samples).
    pub fn duration_s(&self) -> f64 {
        self.values.len().saturating_sub(1) as f64 * self.dt_s
    }

    /// Time of sample `index`, t0 + index·dt, s (defined for any index, also past the end).
    pub fn time_s(&self, index: usize) -> f64 {
        self.t0_s + index as f64 * self.dt_s
    }

    /// The same signal with every value negated, used to examine the negative side (for example
    /// braking deceleration as a positive number) with the same envelope machinery.
    pub fn negated(&self) -> Self {
        Self {
            dt_s: self.dt_s,
            t0_s: self.t0_s,
            values: self.values.iter().map(|v| -v).collect(),
        }
    }
}

/// Resamples an irregular time series onto the uniform grid `t_s[0] + k·dt_s`, k = 0, 1, …, up to
/// the last time stamp, by linear interpolation.
///
/// `t_s` must be non-decreasing. Several samples at the same time (an event such as a brake fin
/// entering a magnet row) express a jump: a grid point exactly at that time takes the **last** of
/// them, grid points before it interpolate towards the first of them (the value just before the
/// jump) and grid points after it interpolate from the last, so the jump is not smeared over the
/// preceding interval. The last grid point is kept when the span is a whole number of steps up to
/// a relative rounding of 1e-9.
///
/// Errors: different lengths, no samples, non-finite times or values, decreasing times, a step
/// that is not finite and positive, or more than [`MAX_RESAMPLED_SAMPLES`] output samples.
pub fn resample_uniform(t_s: &[f64], y: &[f64], dt_s: f64) -> Result<UniformSignal, SignalError> {
    validate_series(t_s, y)?;
    if !(dt_s.is_finite() && dt_s > 0.0) {
        return Err(SignalError::InvalidStep { dt_s });
    }
    let n = t_s.len();
    let t0_s = t_s[0];
    let t_end_s = t_s[n - 1];
    let steps = whole_steps(t_end_s - t0_s, dt_s);
    let count_f = steps + 1.0;
    if count_f.is_nan() || count_f > MAX_RESAMPLED_SAMPLES as f64 {
        return Err(SignalError::TooManySamples {
            samples: count_f,
            limit: MAX_RESAMPLED_SAMPLES,
        });
    }
    let count = count_f as usize;
    let mut values = Vec::with_capacity(count);
    // `i` is the largest index with t_s[i] <= tk (the last sample of a group of equal times).
    let mut i = 0usize;
    for k in 0..count {
        let tk = (t0_s + k as f64 * dt_s).min(t_end_s);
        while i + 1 < n && t_s[i + 1] <= tk {
            i += 1;
        }
        if i + 1 >= n {
            values.push(y[n - 1]);
            continue;
        }
        // t_s[i] <= tk < t_s[i + 1], so the interval has positive length; t_s[i + 1] is the first
        // sample of its group, i.e. the left limit of a jump there.
        let (ta, tb) = (t_s[i], t_s[i + 1]);
        let frac = (tk - ta) / (tb - ta);
        values.push(y[i] * (1.0 - frac) + y[i + 1] * frac);
    }
    Ok(UniformSignal { dt_s, t0_s, values })
}

/// Checks an irregular time series: equal lengths, at least one sample, finite times and
/// values, times non-decreasing (equal times are an event: a jump).
pub(super) fn validate_series(t_s: &[f64], y: &[f64]) -> Result<(), SignalError> {
    if t_s.len() != y.len() {
        return Err(SignalError::LengthMismatch {
            t_len: t_s.len(),
            y_len: y.len(),
        });
    }
    if t_s.is_empty() {
        return Err(SignalError::Empty);
    }
    for (index, (&t, &v)) in t_s.iter().zip(y).enumerate() {
        if !t.is_finite() {
            return Err(SignalError::NonFiniteTime { index });
        }
        if !v.is_finite() {
            return Err(SignalError::NonFiniteValue { index });
        }
        if index > 0 && t < t_s[index - 1] {
            return Err(SignalError::TimeDecreasing {
                index,
                previous_s: t_s[index - 1],
                t_s: t,
            });
        }
    }
    Ok(())
}

/// Number of whole steps of `dt_s` in `span_s`, snapping to the nearest integer when within a
/// relative 1e-9 (returned as a float; may be huge or infinite).
fn whole_steps(span_s: f64, dt_s: f64) -> f64 {
    let q = span_s / dt_s;
    let nearest = q.round();
    if (q - nearest).abs() <= GRID_SNAP_REL * q.abs().max(1.0) {
        nearest
    } else {
        q.floor()
    }
}

/// One second-order section b(z)/a(z) with a[0] = 1 (a first-order section has b[2] = a[2] = 0).
#[derive(Debug, Clone, Copy, PartialEq)]
struct Section {
    b: [f64; 3],
    a: [f64; 3],
}

/// A digital low-pass Butterworth filter held as a cascade of second-order sections.
///
/// Design: analogue prototype poles `Ω_c·exp(jπ(2k + N + 1)/(2N))`, k = 0..N−1 (Butterworth
/// 1930), prewarped corner `Ω_c = 2·fs·tan(π·fc/fs)` and bilinear transform
/// `z = (2fs + s)/(2fs − s)` (Oppenheim & Schafer 2010, §7.2). All zeros lie at z = −1; each
/// section is scaled to unit gain at DC, so the cascade has |H(0)| = 1 and |H| = 1/√2 exactly at
/// the corner. Accuracy: rounding the direct-form denominators moves the poles by a relative
/// amount of roughly 1e-16/(fc/fs)², about 1e-12 at fc/fs = 0.005 (corner gain, coefficients);
/// keep fc/fs above about 1e-4.
#[derive(Debug, Clone, PartialEq)]
pub struct Butterworth {
    order: usize,
    corner_hz: f64,
    sample_rate_hz: f64,
    sections: Vec<Section>,
}

/// Checks a low-pass design's rates: the sample rate finite and positive, the corner finite,
/// positive and below the Nyquist frequency `sample_rate_hz / 2`.
pub(crate) fn check_corner(corner_hz: f64, sample_rate_hz: f64) -> Result<(), SignalError> {
    if !(sample_rate_hz.is_finite() && sample_rate_hz > 0.0) {
        return Err(SignalError::InvalidSampleRate { sample_rate_hz });
    }
    let nyquist_hz = 0.5 * sample_rate_hz;
    if !(corner_hz.is_finite() && corner_hz > 0.0 && corner_hz < nyquist_hz) {
        return Err(SignalError::InvalidCorner {
            corner_hz,
            nyquist_hz,
        });
    }
    Ok(())
}

impl Butterworth {
    /// Designs an `order`-pole low-pass filter with its −3 dB corner at `corner_hz` for a signal
    /// sampled at `sample_rate_hz`.
    ///
    /// Errors: order outside 1..=8, sample rate not finite and positive, corner not finite,
    /// not positive or not below the Nyquist frequency `sample_rate_hz / 2`.
    pub fn lowpass(order: usize, corner_hz: f64, sample_rate_hz: f64) -> Result<Self, SignalError> {
        if !(1..=MAX_ORDER).contains(&order) {
            return Err(SignalError::InvalidOrder {
                order,
                max: MAX_ORDER,
            });
        }
        check_corner(corner_hz, sample_rate_hz)?;
        let fs2 = 2.0 * sample_rate_hz;
        // Prewarped analogue corner, rad/s.
        let warped_rad_s = fs2 * (PI * corner_hz / sample_rate_hz).tan();
        let n = order as f64;
        let mut sections = Vec::with_capacity(order.div_ceil(2));
        for k in 0..order / 2 {
            // Upper-left pole of a conjugate pair.
            let angle = PI * (2.0 * k as f64 + n + 1.0) / (2.0 * n);
            let p = Complex64::from_polar(warped_rad_s, angle);
            let z = (Complex64::new(fs2, 0.0) + p) / (Complex64::new(fs2, 0.0) - p);
            let (a1, a2) = (-2.0 * z.re, z.norm_sqr());
            // Unit DC gain for the rounded denominator: 4g = 1 + a1 + a2. For low corners
            // (a1 near −2, a2 near 1) both additions are exact by Sterbenz's lemma (P. H.
            // Sterbenz, "Floating-Point Computation", 1974), so the section's DC gain is 1 to
            // the last bit even though its poles sit close to z = 1.
            let g = 0.25 * ((1.0 + a1) + a2);
            sections.push(Section {
                b: [g, 2.0 * g, g],
                a: [1.0, a1, a2],
            });
        }
        if order % 2 == 1 {
            // Real pole at s = −Ω_c.
            let z = (fs2 - warped_rad_s) / (fs2 + warped_rad_s);
            // Unit DC gain: 2g = 1 − z.
            let g = 0.5 * (1.0 - z);
            sections.push(Section {
                b: [g, g, 0.0],
                a: [1.0, -z, 0.0],
            });
        }
        Ok(Self {
            order,
            corner_hz,
            sample_rate_hz,
            sections,
        })
    }

    /// The project default for ride accelerations: [`DEFAULT_ORDER`] poles, corner
    /// [`DEFAULT_CORNER_HZ`], for a signal sampled at `sample_rate_hz` (common practice; from
    /// memory). Errors as [`Butterworth::lowpass`] (the sample rate must exceed 10 Hz).
    pub fn ride_default(sample_rate_hz: f64) -> Result<Self, SignalError> {
        Self::lowpass(DEFAULT_ORDER, DEFAULT_CORNER_HZ, sample_rate_hz)
    }

    /// Number of poles.
    pub fn order(&self) -> usize {
        self.order
    }

    /// −3 dB corner frequency, Hz.
    pub fn corner_hz(&self) -> f64 {
        self.corner_hz
    }

    /// Sample rate the filter was designed for, Hz.
    pub fn sample_rate_hz(&self) -> f64 {
        self.sample_rate_hz
    }

    /// The transfer function B(z)/A(z) as coefficient vectors of z⁻⁰, z⁻¹, …, z⁻ᴺ, normalised to
    /// `a[0] = 1`: the same convention as `scipy.signal.butter(N, Wn, btype='low', fs=fs)`.
    /// Both have length order + 1. (For filtering, the section form used by
    /// [`Butterworth::filter`] is the more accurate one.)
    pub fn coefficients_ba(&self) -> (Vec<f64>, Vec<f64>) {
        let mut b = vec![1.0];
        let mut a = vec![1.0];
        for s in &self.sections {
            let len = if s.a[2] == 0.0 && s.b[2] == 0.0 { 2 } else { 3 };
            b = poly_mul(&b, &s.b[..len]);
            a = poly_mul(&a, &s.a[..len]);
        }
        (b, a)
    }

    /// Filters `x` (sampled at the design rate) in one causal forward pass, as a data logger
    /// would, through the cascade of sections in transposed direct form II.
    ///
    /// The initial state is the steady state for a constant input equal to `x[0]`, like
    /// `scipy.signal.lfilter(b, a, x, zi=lfilter_zi(b, a)*x[0])`: a signal that starts at a
    /// constant level has no start-up transient. Because the filter is linear with unit DC gain,
    /// this equals `x[0] + H{x − x[0]}` with `H` started at rest, which is how it is computed:
    /// a constant input then comes out exactly unchanged, and rounding scales with the
    /// excursion `x − x[0]` rather than with the level. An empty input gives an empty output;
    /// non-finite inputs propagate into the output (no panic).
    pub fn filter(&self, x: &[f64]) -> Vec<f64> {
        let Some(&x0) = x.first() else {
            return Vec::new();
        };
        let mut out: Vec<f64> = x.iter().map(|v| v - x0).collect();
        for s in &self.sections {
            let [b0, b1, b2] = s.b;
            let [_, a1, a2] = s.a;
            let (mut z1, mut z2) = (0.0, 0.0);
            for v in out.iter_mut() {
                let xin = *v;
                let yout = b0 * xin + z1;
                z1 = b1 * xin - a1 * yout + z2;
                z2 = b2 * xin - a2 * yout;
                *v = yout;
            }
        }
        for v in out.iter_mut() {
            *v += x0;
        }
        out
    }

    /// Filters a [`UniformSignal`] with [`Butterworth::filter`], keeping its grid.
    ///
    /// Errors: the signal breaks the [`UniformSignal`] invariants, or its sample rate 1/dt
    /// differs from the design rate by more than a relative 1e-9.
    pub fn filter_signal(&self, signal: &UniformSignal) -> Result<UniformSignal, SignalError> {
        signal.validate()?;
        let signal_hz = signal.sample_rate_hz();
        if (signal_hz - self.sample_rate_hz).abs() > 1e-9 * self.sample_rate_hz {
            return Err(SignalError::SampleRateMismatch {
                signal_hz,
                filter_hz: self.sample_rate_hz,
            });
        }
        Ok(UniformSignal {
            dt_s: signal.dt_s,
            t0_s: signal.t0_s,
            values: self.filter(&signal.values),
        })
    }

    /// Magnitude of the frequency response |H(e^{jω})| at `frequency_hz`, with
    /// ω = 2π·frequency_hz/fs (dimensionless gain; 1 at DC, 1/√2 at the corner). Symmetric in
    /// the sign of the frequency; NaN for a non-finite frequency.
    pub fn gain_at(&self, frequency_hz: f64) -> f64 {
        if !frequency_hz.is_finite() {
            return f64::NAN;
        }
        let omega = 2.0 * PI * frequency_hz / self.sample_rate_hz;
        let z1 = Complex64::from_polar(1.0, -omega);
        let z2 = z1 * z1;
        let mut gain = 1.0;
        for s in &self.sections {
            let num = s.b[0] + z1 * s.b[1] + z2 * s.b[2];
            let den = s.a[0] + z1 * s.a[1] + z2 * s.a[2];
            gain *= num.norm() / den.norm();
        }
        gain
    }
}

impl Butterworth {
    /// The largest pole magnitude |z| of the cascade (below 1 for a stable design): the
    /// impulse response decays no slower than this factor per sample, up to a polynomial factor.
    pub fn slowest_pole_radius(&self) -> f64 {
        self.sections
            .iter()
            .map(|s| {
                let [_, a1, a2] = s.a;
                let disc = a1 * a1 - 4.0 * a2;
                if disc < 0.0 {
                    // Complex pair: |z|² = a2.
                    a2.sqrt()
                } else {
                    // Real roots of z² + a1·z + a2 (a2 = 0 for a first-order section).
                    let r = disc.sqrt();
                    (0.5 * (-a1 + r)).abs().max((0.5 * (-a1 - r)).abs())
                }
            })
            .fold(0.0, f64::max)
    }
}

/// Product of two polynomials given by their coefficient vectors.
fn poly_mul(p: &[f64], q: &[f64]) -> Vec<f64> {
    let mut out = vec![0.0; p.len() + q.len() - 1];
    for (i, &pi) in p.iter().enumerate() {
        for (j, &qj) in q.iter().enumerate() {
            out[i + j] += pi * qj;
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rejects_bad_design_inputs() {
        assert!(matches!(
            Butterworth::lowpass(0, 5.0, 100.0),
            Err(SignalError::InvalidOrder { .. })
        ));
        assert!(matches!(
            Butterworth::lowpass(9, 5.0, 100.0),
            Err(SignalError::InvalidOrder { .. })
        ));
        assert!(matches!(
            Butterworth::lowpass(4, 50.0, 100.0),
            Err(SignalError::InvalidCorner { .. })
        ));
        assert!(matches!(
            Butterworth::lowpass(4, f64::NAN, 100.0),
            Err(SignalError::InvalidCorner { .. })
        ));
        assert!(matches!(
            Butterworth::lowpass(4, 5.0, 0.0),
            Err(SignalError::InvalidSampleRate { .. })
        ));
    }

    #[test]
    fn resample_rejects_bad_inputs() {
        assert_eq!(resample_uniform(&[], &[], 0.1), Err(SignalError::Empty));
        assert!(matches!(
            resample_uniform(&[0.0, 1.0], &[0.0], 0.1),
            Err(SignalError::LengthMismatch { .. })
        ));
        assert!(matches!(
            resample_uniform(&[0.0, 1.0, 0.5], &[0.0; 3], 0.1),
            Err(SignalError::TimeDecreasing { index: 2, .. })
        ));
        assert!(matches!(
            resample_uniform(&[0.0, 1.0], &[0.0, f64::NAN], 0.1),
            Err(SignalError::NonFiniteValue { index: 1 })
        ));
        assert!(matches!(
            resample_uniform(&[0.0, 1.0], &[0.0, 1.0], 0.0),
            Err(SignalError::InvalidStep { .. })
        ));
        assert!(matches!(
            resample_uniform(&[0.0, 1e300], &[0.0, 1.0], 1e-300),
            Err(SignalError::TooManySamples { .. })
        ));
    }
}
