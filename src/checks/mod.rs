//! Limit checks: the felt acceleration in rider axes (`rider`), resampling and Butterworth
//! filtering (`filter`, `zero_phase`), raw extremes and onset/release rates (`features`),
//! sustained-acceleration envelopes (`envelope`) — pure functions over sampled signals — and
//! the case-by-case verdict against the scenario's limits (`limits`).

/// Uniform resampling and the low-pass Butterworth filter (second-order sections).
pub mod filter;

/// Zero-phase (forward–backward) filtering with padding, the default for ride accelerations.
pub mod zero_phase;

/// Raw extremes over every sample (events included), onset and release rates.
pub mod features;

/// The sustained-acceleration curve S(D) and piecewise-linear envelopes of allowed levels.
pub mod envelope;

/// What the rider feels: specific acceleration in rider axes, raw and filtered.
pub mod rider;

/// Verdicts of each case against the limits.
pub mod limits;

pub use limits::{verdict, CaseTemperatures, CaseVerdict, CheckRow, Verdict, Worst};
