//! Zero-phase (forward–backward) Butterworth low-pass filtering, the default way of filtering
//! ride accelerations, and the choice between it and the single causal pass.
//!
//! **Why zero-phase.** A causal low-pass delays what it passes (a 4-pole 5 Hz Butterworth by
//! roughly 0.1 s at low frequencies), so a filtered peak comes late and one near the end of the
//! record is cut short. Measurement practice for ride accelerations filters without phase shift
//! (from memory: ASTM F2137, "Standard Practice for Measuring the Dynamic Characteristics of
//! Amusement Rides and Devices", used with ASTM F2291; verify against the current editions).
//! Running the same filter forward and then backward over the record cancels the phase exactly
//! and squares the magnitude: |H_zp(f)| = |H_pass(f)|².
//!
//! **How the order is counted.** The order is the number of poles of the *combined*
//! forward–backward response, as the "4-pole phaseless" filter of crash-test practice counts it
//! (from memory: SAE J211-1, "Instrumentation for Impact Test", Appendix C, where the digital
//! channel-class filter is a 2-pole Butterworth run forward and backward). So a 4-pole
//! zero-phase filter is a 2-pole design run both ways; its attenuation far above the corner
//! falls at 20·4 = 80 dB per decade, like a 4-pole single pass. The order is therefore even.
//!
//! **Where the corner is.** `corner_hz` is the −3 dB frequency of the combined response,
//! |H_zp(fc)| = 1/√2, as it is for the single pass. Squaring a Butterworth pass designed at fc
//! would put −6 dB there, so the pass of m = order/2 poles is designed at f_d with
//! |H_pass(fc)|² = 1/√2: under the bilinear transform |H_pass(f)|² =
//! 1/(1 + (tan(πf/fs)/tan(πf_d/fs))^(2m)), hence tan(πf_d/fs) = tan(πfc/fs)·(√2 − 1)^(−1/(2m)).
//! For m = 2 the factor is 1.2465 — the same factor as J211's design frequency 2.0775·CFC for a
//! −3 dB frequency of 1.6667·CFC (from memory; J211 applies it before prewarping, which differs
//! by under 1e-4 relative at 5 Hz and 1 kHz). To run a pass designed at the nominal corner both
//! ways instead (−6 dB at that corner), use [`ZeroPhaseButterworth::from_pass`].
//!
//! **Padding.** Before filtering, the signal is extended past both ends and the extension is
//! removed afterwards, as `scipy.signal.filtfilt(b, a, x, padtype=…, padlen=…)` does; each pass
//! starts in the steady state of its first input value (scipy's `lfilter_zi` scaled by it).
//! The default is [`Padding::Constant`], the end values held: before entering and after leaving
//! a brake zone the vehicle coasts with a nearly constant felt acceleration, so a held value is
//! the physical continuation, whereas odd reflection (scipy's default) continues the end slope
//! and even reflection mirrors an edge peak. With a held start value and a steady-state start,
//! the start pad passes unchanged; the end pad lets the forward pass settle before the backward
//! pass starts. Its default length is the number of samples over which the slowest pole of the
//! pass decays by [`PAD_DECAY`] (about 1 s for the default filter), so the result equals
//! filtering the record held at its end values for ever, to that factor of the end excursion.

use super::filter::{Butterworth, SignalError, UniformSignal, DEFAULT_CORNER_HZ, MAX_ORDER};
use std::f64::consts::{PI, SQRT_2};

/// Default order of the zero-phase filter, counted over both passes (a 2-pole pass run forward
/// and backward); common practice, from memory (see the module documentation).
pub const DEFAULT_ZERO_PHASE_ORDER: usize = 4;

/// Residual factor of the slowest pole over the automatic pad length.
pub const PAD_DECAY: f64 = 1e-12;

/// Largest automatic pad length, samples (a guard for corners far below the sample rate).
pub const MAX_AUTO_PAD_SAMPLES: usize = 10_000_000;

/// How the signal is extended past its ends before the forward–backward pass (the `padtype` of
/// `scipy.signal.filtfilt`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Padding {
    /// The end values held: x₀ before the start, x_{n−1} after the end (`padtype='constant'`).
    #[default]
    Constant,
    /// Point reflection about each end value: 2·x₀ − x_k before, 2·x_{n−1} − x_{n−1−k} after
    /// (`padtype='odd'`, scipy's default).
    Odd,
    /// Mirror reflection: x_k before, x_{n−1−k} after (`padtype='even'`).
    Even,
    /// No extension (`padtype=None`).
    None,
}

/// A low-pass Butterworth filter applied forward and backward (zero phase), with padding.
#[derive(Debug, Clone, PartialEq)]
pub struct ZeroPhaseButterworth {
    pass: Butterworth,
    corner_hz: f64,
    padding: Padding,
    pad_samples: Option<usize>,
}

impl ZeroPhaseButterworth {
    /// Designs a zero-phase low-pass of `order` poles counted over both passes (even, 2..=16)
    /// with its combined −3 dB point at `corner_hz`, for a signal sampled at `sample_rate_hz`
    /// (module documentation). Padding: [`Padding::Constant`] of the automatic length.
    ///
    /// Errors: an odd order or one outside 2..=16, sample rate not finite and positive, corner
    /// not finite, not positive or not below the Nyquist frequency.
    pub fn lowpass(order: usize, corner_hz: f64, sample_rate_hz: f64) -> Result<Self, SignalError> {
        let max = 2 * MAX_ORDER;
        if !order.is_multiple_of(2) || !(2..=max).contains(&order) {
            return Err(SignalError::InvalidZeroPhaseOrder { order, max });
        }
        super::filter::check_corner(corner_hz, sample_rate_hz)?;
        let m = order / 2;
        let design_hz = pass_design_hz(m, corner_hz, sample_rate_hz);
        let pass = Butterworth::lowpass(m, design_hz, sample_rate_hz)?;
        Ok(Self {
            pass,
            corner_hz,
            padding: Padding::Constant,
            pad_samples: None,
        })
    }

    /// The project default for ride accelerations: [`DEFAULT_ZERO_PHASE_ORDER`] poles over both
    /// passes, combined −3 dB at [`DEFAULT_CORNER_HZ`] (common practice; from memory).
    pub fn ride_default(sample_rate_hz: f64) -> Result<Self, SignalError> {
        Self::lowpass(DEFAULT_ZERO_PHASE_ORDER, DEFAULT_CORNER_HZ, sample_rate_hz)
    }

    /// Runs an already designed pass forward and backward: order 2·`pass.order()`, combined
    /// gain 1/2 (−6 dB) at the pass's corner. [`ZeroPhaseButterworth::corner_hz`] then reports
    /// the combined −3 dB frequency. Padding: [`Padding::Constant`] of the automatic length.
    pub fn from_pass(pass: Butterworth) -> Self {
        let m = pass.order();
        let fs = pass.sample_rate_hz();
        // Inverse of `pass_design_hz`: where |H_pass|² = 1/√2.
        let t = (PI * pass.corner_hz() / fs).tan() * (SQRT_2 - 1.0).powf(1.0 / (2.0 * m as f64));
        let corner_hz = fs / PI * t.atan();
        Self {
            pass,
            corner_hz,
            padding: Padding::Constant,
            pad_samples: None,
        }
    }

    /// The same filter with another padding; `pad_samples` per end, or None for the automatic
    /// length (for a reflection, at most n − 1 samples of an n-sample signal).
    pub fn with_padding(mut self, padding: Padding, pad_samples: Option<usize>) -> Self {
        self.padding = padding;
        self.pad_samples = pad_samples;
        self
    }

    /// Poles of the combined forward–backward response (twice the pass's).
    pub fn order(&self) -> usize {
        2 * self.pass.order()
    }

    /// −3 dB frequency of the combined response, Hz.
    pub fn corner_hz(&self) -> f64 {
        self.corner_hz
    }

    /// Sample rate the filter was designed for, Hz.
    pub fn sample_rate_hz(&self) -> f64 {
        self.pass.sample_rate_hz()
    }

    /// The single pass that is run forward and backward.
    pub fn pass(&self) -> &Butterworth {
        &self.pass
    }

    /// The padding kind.
    pub fn padding(&self) -> Padding {
        self.padding
    }

    /// The automatic pad length: ⌈ln(PAD_DECAY)/ln(r)⌉ samples for the pass's slowest pole
    /// radius r, capped at [`MAX_AUTO_PAD_SAMPLES`].
    pub fn auto_pad_samples(&self) -> usize {
        let r = self.pass.slowest_pole_radius();
        if !(r > 0.0 && r < 1.0) {
            return 0;
        }
        let k = (PAD_DECAY.ln() / r.ln()).ceil();
        if k.is_finite() && k < MAX_AUTO_PAD_SAMPLES as f64 {
            k as usize
        } else {
            MAX_AUTO_PAD_SAMPLES
        }
    }

    /// The pad length per end used for a signal of `len` samples.
    ///
    /// Errors: an explicit reflection pad of `len` samples or more ([`SignalError::PadTooLong`]).
    pub fn pad_samples_for(&self, len: usize) -> Result<usize, SignalError> {
        let reflect = matches!(self.padding, Padding::Odd | Padding::Even);
        match (self.padding, self.pad_samples) {
            (Padding::None, _) => Ok(0),
            (_, Some(pad)) if reflect && pad > 0 && pad >= len => Err(SignalError::PadTooLong {
                pad_samples: pad,
                len,
            }),
            (_, Some(pad)) => Ok(pad),
            (_, None) if reflect => Ok(self.auto_pad_samples().min(len.saturating_sub(1))),
            (_, None) => Ok(self.auto_pad_samples()),
        }
    }

    /// Filters `x` (sampled at the design rate): pad, filter forward, filter the reversed result,
    /// reverse, remove the pad — `scipy.signal.filtfilt(b, a, x, padtype=…, padlen=…)` with
    /// `method='pad'`. An empty input gives an empty output.
    ///
    /// Errors: a non-finite value, or a reflection pad that is too long.
    pub fn filter(&self, x: &[f64]) -> Result<Vec<f64>, SignalError> {
        if let Some(index) = x.iter().position(|v| !v.is_finite()) {
            return Err(SignalError::NonFiniteValue { index });
        }
        let (Some(&first), Some(&last)) = (x.first(), x.last()) else {
            return Ok(Vec::new());
        };
        let n = x.len();
        let pad = self.pad_samples_for(n)?;
        let mut ext = Vec::with_capacity(n + 2 * pad);
        match self.padding {
            Padding::Constant => ext.extend(std::iter::repeat_n(first, pad)),
            Padding::Odd => ext.extend((1..=pad).rev().map(|k| 2.0 * first - x[k])),
            Padding::Even => ext.extend((1..=pad).rev().map(|k| x[k])),
            Padding::None => {}
        }
        ext.extend_from_slice(x);
        match self.padding {
            Padding::Constant => ext.extend(std::iter::repeat_n(last, pad)),
            Padding::Odd => ext.extend((1..=pad).map(|k| 2.0 * last - x[n - 1 - k])),
            Padding::Even => ext.extend((1..=pad).map(|k| x[n - 1 - k])),
            Padding::None => {}
        }
        let mut y = self.pass.filter(&ext);
        y.reverse();
        let mut y = self.pass.filter(&y);
        y.reverse();
        y.truncate(pad + n);
        y.drain(..pad);
        Ok(y)
    }

    /// Filters a [`UniformSignal`], keeping its grid.
    ///
    /// Errors: the signal breaks the [`UniformSignal`] invariants, its sample rate differs from
    /// the design rate by more than a relative 1e-9, or the padding is too long.
    pub fn filter_signal(&self, signal: &UniformSignal) -> Result<UniformSignal, SignalError> {
        signal.validate()?;
        let signal_hz = signal.sample_rate_hz();
        let filter_hz = self.sample_rate_hz();
        if (signal_hz - filter_hz).abs() > 1e-9 * filter_hz {
            return Err(SignalError::SampleRateMismatch {
                signal_hz,
                filter_hz,
            });
        }
        Ok(UniformSignal {
            dt_s: signal.dt_s,
            t0_s: signal.t0_s,
            values: self.filter(&signal.values)?,
        })
    }

    /// Magnitude of the combined response at `frequency_hz`: the pass's magnitude squared (the
    /// phase is zero). 1 at DC, 1/√2 at [`ZeroPhaseButterworth::corner_hz`].
    pub fn gain_at(&self, frequency_hz: f64) -> f64 {
        self.pass.gain_at(frequency_hz).powi(2)
    }
}

/// Design corner f_d of an m-pole pass whose squared magnitude is 1/√2 at `corner_hz`:
/// tan(πf_d/fs) = tan(πfc/fs)·(√2 − 1)^(−1/(2m)) (module documentation). Below fs/2 for any
/// corner below fs/2.
fn pass_design_hz(m: usize, corner_hz: f64, sample_rate_hz: f64) -> f64 {
    let t = (PI * corner_hz / sample_rate_hz).tan() * (SQRT_2 - 1.0).powf(-1.0 / (2.0 * m as f64));
    sample_rate_hz / PI * t.atan()
}

/// Whether ride accelerations are filtered without phase shift (the default) or in one causal
/// pass: the scenario's `rider.filter.phase`.
pub use crate::scenario::FilterPhase as Phase;

/// A ride-acceleration filter of either [`Phase`], designed from the same three numbers.
#[derive(Debug, Clone, PartialEq)]
pub enum RideFilter {
    /// Zero-phase: `order` poles over both passes, combined −3 dB at the corner.
    Zero(ZeroPhaseButterworth),
    /// One causal pass: `order` poles, −3 dB at the corner.
    Causal(Butterworth),
}

impl RideFilter {
    /// Designs the filter: `order` poles in the sense of `phase` (even for [`Phase::Zero`]),
    /// −3 dB at `corner_hz`, for `sample_rate_hz`.
    ///
    /// Errors: as [`ZeroPhaseButterworth::lowpass`] or [`Butterworth::lowpass`].
    pub fn design(
        phase: Phase,
        order: usize,
        corner_hz: f64,
        sample_rate_hz: f64,
    ) -> Result<Self, SignalError> {
        match phase {
            Phase::Zero => {
                ZeroPhaseButterworth::lowpass(order, corner_hz, sample_rate_hz).map(Self::Zero)
            }
            Phase::Causal => {
                Butterworth::lowpass(order, corner_hz, sample_rate_hz).map(Self::Causal)
            }
        }
    }

    /// Filters `x` sampled at the design rate.
    ///
    /// Errors: a non-finite value (both kinds); a reflection pad that is too long (zero-phase).
    pub fn filter(&self, x: &[f64]) -> Result<Vec<f64>, SignalError> {
        match self {
            Self::Zero(f) => f.filter(x),
            Self::Causal(f) => match x.iter().position(|v| !v.is_finite()) {
                Some(index) => Err(SignalError::NonFiniteValue { index }),
                None => Ok(f.filter(x)),
            },
        }
    }

    /// Filters a [`UniformSignal`], keeping its grid (errors as the filters' `filter_signal`).
    pub fn filter_signal(&self, signal: &UniformSignal) -> Result<UniformSignal, SignalError> {
        match self {
            Self::Zero(f) => f.filter_signal(signal),
            Self::Causal(f) => f.filter_signal(signal),
        }
    }

    /// Magnitude of the response at `frequency_hz`.
    pub fn gain_at(&self, frequency_hz: f64) -> f64 {
        match self {
            Self::Zero(f) => f.gain_at(frequency_hz),
            Self::Causal(f) => f.gain_at(frequency_hz),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rejects_odd_and_out_of_range_orders() {
        for order in [0, 1, 3, 18] {
            assert!(matches!(
                ZeroPhaseButterworth::lowpass(order, 5.0, 1000.0),
                Err(SignalError::InvalidZeroPhaseOrder { .. })
            ));
        }
        assert!(ZeroPhaseButterworth::lowpass(16, 5.0, 1000.0).is_ok());
        assert!(matches!(
            ZeroPhaseButterworth::lowpass(4, 500.0, 1000.0),
            Err(SignalError::InvalidCorner { .. })
        ));
    }

    #[test]
    fn reflection_pads_must_be_shorter_than_the_signal() {
        let f = ZeroPhaseButterworth::ride_default(100.0)
            .unwrap()
            .with_padding(Padding::Odd, Some(5));
        assert!(matches!(
            f.filter(&[1.0; 5]),
            Err(SignalError::PadTooLong { .. })
        ));
        assert_eq!(f.filter(&[1.0; 6]).unwrap().len(), 6);
        // Automatic length is clipped for reflections; constant padding needs no clipping.
        let auto = ZeroPhaseButterworth::ride_default(100.0)
            .unwrap()
            .with_padding(Padding::Even, None);
        assert_eq!(auto.pad_samples_for(3).unwrap(), 2);
        assert!(
            ZeroPhaseButterworth::ride_default(100.0)
                .unwrap()
                .pad_samples_for(3)
                .unwrap()
                > 3
        );
        assert!(matches!(
            auto.filter(&[1.0, f64::NAN]),
            Err(SignalError::NonFiniteValue { index: 1 })
        ));
        assert!(auto.filter(&[]).unwrap().is_empty());
    }
}
