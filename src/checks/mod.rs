//! Limit checks on sampled rider-acceleration signals: resampling, Butterworth filtering and
//! sustained-acceleration envelopes. Pure functions over sampled signals; no scenario knowledge.

/// Uniform resampling and the low-pass Butterworth filter (second-order sections).
pub mod filter;

/// The sustained-acceleration curve S(D) and piecewise-linear envelopes of allowed levels.
pub mod envelope;
