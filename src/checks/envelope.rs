//! The sustained-acceleration curve and envelopes of allowed sustained levels.
//!
//! For a signal y(t), the sustained level over a duration D is
//!
//! S(D) = max over t of ( min over [t, t + D] of y ),
//!
//! the largest level the signal stays at or above for a continuous D seconds. S(0) is the peak,
//! S is non-increasing in D, and for D longer than the signal no level is sustained:
//! S(D) = −∞ ([`f64::NEG_INFINITY`]). A limit envelope gives an allowed level for each duration;
//! a signal passes when S(D) ≤ allowed(D) for every D.
//!
//! The uniformly sampled signal is read as piecewise linear between samples and S is computed
//! exactly for that reading (up to floating-point rounding), for any D, not only multiples of
//! the step: write D = (m + r)·dt with integer m and 0 ≤ r < 1. As the window start slides across
//! one sample interval, both window ends move along straight segments and the set of samples
//! strictly inside the window changes only when an end crosses a sample, so the window minimum
//! is min(L₁(s), L₂(s), C) with L₁, L₂ linear in the start position s and C constant on each of
//! at most two sub-intervals. Its maximum on a sub-interval is min(C, max of min(L₁, L₂)), found
//! at an end of the sub-interval or where L₁ = L₂. C comes from a sliding-window minimum by
//! block prefix/suffix minima (M. van Herk, "A fast algorithm for local minimum and maximum
//! filters on rectangular and octagonal kernels", Pattern Recognition Letters 13, 1992; J. Gil &
//! M. Werman, "Computing 2-D min, median, and max filters", IEEE Trans. PAMI 15, 1993), so one
//! duration costs O(n) with three comparisons per sample.
//! D/dt within a relative 1e-9 of an integer is taken as that integer.

use super::filter::{SignalError, UniformSignal};
use rayon::prelude::*;

/// Default cap on the number of grid durations [`Envelope::check`] evaluates besides the
/// envelope breakpoints (see [`Envelope::check_with_grid`] for what the cap costs in accuracy).
pub const DEFAULT_MAX_GRID_DURATIONS: usize = 1024;

/// Samples × durations above which [`sustained_curve`] runs durations in parallel.
const PARALLEL_WORK: usize = 1 << 20;

/// Relative tolerance for taking D/dt as a whole number of steps.
const STEP_SNAP_REL: f64 = 1e-9;

/// S(D) for `signal` read as piecewise linear: the largest level the signal stays at or above
/// for a continuous `duration_s` seconds (same unit as the signal values).
///
/// `duration_s = 0` gives the peak. A duration longer than the signal, (n − 1)·dt, or an empty
/// signal gives [`f64::NEG_INFINITY`]: no level is sustained that long (so any finite allowed
/// level is respected). Returns NaN when the duration is negative or NaN, or when the signal
/// breaks the [`UniformSignal`] invariants (non-positive step, non-finite values).
pub fn sustained_level(signal: &UniformSignal, duration_s: f64) -> f64 {
    if signal.validate().is_err() || duration_s.is_nan() || duration_s < 0.0 {
        return f64::NAN;
    }
    sustained_level_unchecked(
        &signal.values,
        signal.dt_s,
        duration_s,
        &mut Scratch::default(),
    )
}

/// S(D) for each duration in `durations_s` (see [`sustained_level`]); O(n) per duration, spread
/// over the rayon thread pool when the work (samples × durations) is large.
pub fn sustained_curve(signal: &UniformSignal, durations_s: &[f64]) -> Vec<f64> {
    if signal.validate().is_err() {
        return vec![f64::NAN; durations_s.len()];
    }
    let level = |scratch: &mut Scratch, d: f64| {
        if d.is_nan() || d < 0.0 {
            f64::NAN
        } else {
            sustained_level_unchecked(&signal.values, signal.dt_s, d, scratch)
        }
    };
    if signal.len().saturating_mul(durations_s.len()) < PARALLEL_WORK {
        let mut scratch = Scratch::default();
        durations_s
            .iter()
            .map(|&d| level(&mut scratch, d))
            .collect()
    } else {
        durations_s
            .par_iter()
            .map_init(Scratch::default, |scratch, &d| level(scratch, d))
            .collect()
    }
}

/// The negative-side counterpart of [`sustained_level`]: the lowest level L such that the signal
/// stays at or below L for a continuous `duration_s` seconds, min over t of max over [t, t + D],
/// computed as −S(D) of the negated signal. Non-decreasing in D; [`f64::INFINITY`] for D longer
/// than the signal; NaN for bad input as in [`sustained_level`].
pub fn sustained_level_below(signal: &UniformSignal, duration_s: f64) -> f64 {
    -sustained_level(&signal.negated(), duration_s)
}

/// [`sustained_level_below`] for each duration in `durations_s`.
pub fn sustained_curve_below(signal: &UniformSignal, durations_s: &[f64]) -> Vec<f64> {
    sustained_curve(&signal.negated(), durations_s)
        .into_iter()
        .map(|v| -v)
        .collect()
}

/// Core of [`sustained_level`] for a validated signal and a duration that is not NaN and ≥ 0.
fn sustained_level_unchecked(y: &[f64], dt_s: f64, duration_s: f64, scratch: &mut Scratch) -> f64 {
    let n = y.len();
    if n == 0 {
        return f64::NEG_INFINITY;
    }
    let last = (n - 1) as f64;
    let q = duration_s / dt_s;
    let nearest = q.round();
    let (m_f, r) = if (q - nearest).abs() <= STEP_SNAP_REL * q.max(1.0) {
        (nearest, 0.0)
    } else {
        (q.floor(), q - q.floor())
    };
    if m_f.is_nan() || m_f > last || (m_f == last && r > 0.0) {
        return f64::NEG_INFINITY;
    }
    let m = m_f as usize;
    if m == n - 1 {
        // The only window is the whole signal.
        return y.iter().copied().fold(f64::INFINITY, f64::min);
    }
    // Here n ≥ m + 2. Window start in sample interval i = 0..=n−2−m.
    let mut best = f64::NEG_INFINITY;
    // inner[i] = min(y[i+1 ..= i+m]), the samples strictly inside the window (part 1).
    let inner = if m >= 1 {
        sliding_min(&y[1..n - 1], m, scratch);
        Some(&scratch.suffix)
    } else {
        None
    };
    for i in 0..=(n - 2 - m) {
        let c1 = inner.map_or(f64::INFINITY, |v| v[i]);
        let (ya, yb) = (y[i], y[i + 1]);
        let start_max = ya.max(yb);
        // Part 1: start fraction s in [0, 1 − r]; the end lies on interval j = i + m at
        // fraction r + s. Skipped when even the crude bound min(C, highest value of each end
        // segment) cannot beat the best so far, which prunes most windows.
        let j = i + m;
        let (ea, eb) = (y[j], y[j + 1]);
        if c1.min(start_max).min(ea.max(eb)) > best {
            let part1 =
                max_of_min_lines(|s| lerp(ya, yb, s), |s| lerp(ea, eb, r + s), 0.0, 1.0 - r);
            best = best.max(part1.min(c1));
        }
        // Part 2 (only when r > 0): s in [1 − r, 1]; the end lies on interval j + 1 at fraction
        // r + s − 1, and sample j + 1 is now inside the window.
        if r > 0.0 && j + 2 < n {
            let c2 = c1.min(y[j + 1]);
            let (fa, fb) = (y[j + 1], y[j + 2]);
            if c2.min(start_max).min(fa.max(fb)) > best {
                let part2 = max_of_min_lines(
                    |s| lerp(ya, yb, s),
                    |s| lerp(fa, fb, r + s - 1.0),
                    1.0 - r,
                    1.0,
                );
                best = best.max(part2.min(c2));
            }
        }
    }
    best
}

/// Reusable buffers for [`sliding_min`].
#[derive(Default)]
struct Scratch {
    prefix: Vec<f64>,
    suffix: Vec<f64>,
}

/// Minima of every window z[k..k + w], k = 0..=len − w, left in `scratch.suffix[k]` (van Herk
/// 1992, Gil & Werman 1993): with blocks of w samples, a window spans at most two blocks, so its
/// minimum is min(suffix-min from k to its block's end, prefix-min from the next block's start to
/// k + w − 1). Requires 1 ≤ w ≤ len.
fn sliding_min(z: &[f64], w: usize, scratch: &mut Scratch) {
    let Scratch { prefix, suffix } = scratch;
    prefix.clear();
    prefix.extend_from_slice(z);
    suffix.clear();
    suffix.extend_from_slice(z);
    for block in prefix.chunks_mut(w) {
        for k in 1..block.len() {
            block[k] = block[k].min(block[k - 1]);
        }
    }
    for block in suffix.chunks_mut(w) {
        for k in (0..block.len().saturating_sub(1)).rev() {
            block[k] = block[k].min(block[k + 1]);
        }
    }
    for k in 0..=(z.len() - w) {
        suffix[k] = suffix[k].min(prefix[k + w - 1]);
    }
}

/// Linear interpolation exact at both ends (a at s = 0, b at s = 1) and for a = b.
fn lerp(a: f64, b: f64, s: f64) -> f64 {
    if s == 1.0 {
        b
    } else {
        a + (b - a) * s
    }
}

/// Maximum over s in [s0, s1] of min(l1(s), l2(s)) for two straight lines: at an end or at the
/// crossing.
fn max_of_min_lines(l1: impl Fn(f64) -> f64, l2: impl Fn(f64) -> f64, s0: f64, s1: f64) -> f64 {
    let (a0, b0, a1, b1) = (l1(s0), l2(s0), l1(s1), l2(s1));
    let mut best = a0.min(b0).max(a1.min(b1));
    let (d0, d1) = (a0 - b0, a1 - b1);
    if (d0 > 0.0 && d1 < 0.0) || (d0 < 0.0 && d1 > 0.0) {
        let s = s0 + (s1 - s0) * (d0 / (d0 - d1));
        best = best.max(l1(s).min(l2(s)));
    }
    best
}

/// Allowed sustained level as a function of duration: piecewise linear through the given points,
/// constant beyond the first and last ones.
///
/// Points are (duration_s, allowed) with durations finite, ≥ 0 and non-decreasing; allowed levels
/// are finite and in the same unit as the signals checked against them. Equal durations express a
/// step: at exactly that duration the lowest of the values there governs, just below it the
/// curve approaches the first of them and just above it leaves from the last of them.
#[derive(Debug, Clone, PartialEq)]
pub struct Envelope {
    points: Vec<(f64, f64)>,
}

/// Outcome of [`Envelope::check`]. Levels are in the unit of the signal.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EnvelopeResult {
    /// Smallest allowed(D) − S(D) over the evaluated durations; negative means the signal
    /// exceeds the envelope.
    pub worst_margin: f64,
    /// Duration at which the worst margin occurs, s (the shortest one on a tie).
    pub duration_s: f64,
    /// S at that duration.
    pub sustained: f64,
    /// allowed at that duration.
    pub allowed: f64,
    /// A guaranteed lower bound on allowed(D) − S(D) over **all** durations (not just the
    /// evaluated ones), from S being non-increasing; ≤ `worst_margin`.
    pub margin_lower_bound: f64,
    /// Number of durations evaluated.
    pub durations_evaluated: usize,
}

impl EnvelopeResult {
    /// True when no evaluated duration exceeds the envelope (`worst_margin >= 0`). For a
    /// guaranteed pass at every duration, test `margin_lower_bound >= 0` instead.
    pub fn passes(&self) -> bool {
        self.worst_margin >= 0.0
    }
}

impl Envelope {
    /// Builds an envelope from (duration_s, allowed) points.
    ///
    /// Errors: no points, a duration that is negative or not finite, a level that is not finite,
    /// or durations that decrease.
    pub fn new(points: Vec<(f64, f64)>) -> Result<Self, SignalError> {
        if points.is_empty() {
            return Err(SignalError::EmptyEnvelope);
        }
        for (index, &(duration_s, allowed)) in points.iter().enumerate() {
            if !(duration_s.is_finite() && duration_s >= 0.0) {
                return Err(SignalError::InvalidEnvelopeDuration { index, duration_s });
            }
            if !allowed.is_finite() {
                return Err(SignalError::InvalidEnvelopeLevel { index, allowed });
            }
            if index > 0 && duration_s < points[index - 1].0 {
                return Err(SignalError::EnvelopeDurationDecreasing {
                    index,
                    previous_s: points[index - 1].0,
                    duration_s,
                });
            }
        }
        Ok(Self { points })
    }

    /// The (duration_s, allowed) points as given.
    pub fn points(&self) -> &[(f64, f64)] {
        &self.points
    }

    /// allowed(D) at `duration_s` (signal units): linear interpolation, constant beyond the ends,
    /// the lowest value at a step. NaN for a NaN duration.
    pub fn allowed_at(&self, duration_s: f64) -> f64 {
        self.limits(duration_s).1
    }

    /// (left limit, value, right limit) of allowed at `duration_s`. They differ only at a step.
    fn limits(&self, duration_s: f64) -> (f64, f64, f64) {
        if duration_s.is_nan() {
            return (f64::NAN, f64::NAN, f64::NAN);
        }
        let p = &self.points;
        let lo = p.partition_point(|q| q.0 < duration_s);
        let hi = p.partition_point(|q| q.0 <= duration_s);
        if lo < hi {
            let at = p[lo..hi].iter().map(|q| q.1).fold(f64::INFINITY, f64::min);
            return (p[lo].1, at, p[hi - 1].1);
        }
        let v = if hi == 0 {
            p[0].1
        } else if hi == p.len() {
            p[p.len() - 1].1
        } else {
            let (d0, a0) = p[hi - 1];
            let (d1, a1) = p[hi];
            let s = (duration_s - d0) / (d1 - d0);
            lerp(a0, a1, s)
        };
        (v, v, v)
    }

    /// Checks `signal` against the envelope with at most [`DEFAULT_MAX_GRID_DURATIONS`] grid
    /// durations; see [`Envelope::check_with_grid`].
    pub fn check(&self, signal: &UniformSignal) -> Result<EnvelopeResult, SignalError> {
        self.check_with_grid(signal, DEFAULT_MAX_GRID_DURATIONS)
    }

    /// Checks `signal` against the envelope: margin allowed(D) − S(D) at every envelope
    /// breakpoint within the signal length L = (n − 1)·dt, at L itself, and on the grid
    /// D = k·h, h = stride·dt, k = 0, 1, … ≤ L, where stride = ⌈(n − 1)/max_grid_durations⌉
    /// (at least 1), so at most about `max_grid_durations` + 2 + breakpoints durations are
    /// evaluated, each costing O(n). Durations beyond L need no check (S = −∞ there).
    ///
    /// Why the grid cannot miss much: between two neighbouring evaluated durations Dₐ < D_b the
    /// envelope has no breakpoint, so it is linear there, and S(D) ≤ S(Dₐ) because S is
    /// non-increasing. Hence on [Dₐ, D_b] the margin is at least
    /// min(allowed(Dₐ⁺), allowed(D_b⁻)) − S(Dₐ); the minimum of these bounds and of the evaluated
    /// margins is reported as `margin_lower_bound`. It lies within (largest |slope| of the
    /// envelope)·h of `worst_margin`, so the true worst margin is bracketed by
    /// [`margin_lower_bound`, `worst_margin`] and no violation deeper than slope·h can be
    /// missed; for a stride of 1 the grid is every sample step.
    ///
    /// Errors: the signal breaks the [`UniformSignal`] invariants or has no samples.
    pub fn check_with_grid(
        &self,
        signal: &UniformSignal,
        max_grid_durations: usize,
    ) -> Result<EnvelopeResult, SignalError> {
        signal.validate()?;
        if signal.is_empty() {
            return Err(SignalError::Empty);
        }
        let n = signal.len();
        let dt_s = signal.dt_s;
        let steps = n - 1;
        let length_s = steps as f64 * dt_s;
        let stride = steps.div_ceil(max_grid_durations.max(1)).max(1);
        let h_s = stride as f64 * dt_s;
        let mut durations: Vec<f64> = (0..=steps / stride).map(|k| k as f64 * h_s).collect();
        durations.push(length_s);
        durations.extend(self.points.iter().map(|p| p.0).filter(|&d| d <= length_s));
        durations.sort_by(f64::total_cmp);
        durations.dedup();

        let sustained = sustained_curve(signal, &durations);
        let mut result = EnvelopeResult {
            worst_margin: f64::INFINITY,
            duration_s: 0.0,
            sustained: sustained[0],
            allowed: self.allowed_at(0.0),
            margin_lower_bound: f64::INFINITY,
            durations_evaluated: durations.len(),
        };
        for (k, (&d, &s)) in durations.iter().zip(&sustained).enumerate() {
            let (_, allowed, right) = self.limits(d);
            let margin = allowed - s;
            if margin < result.worst_margin {
                result.worst_margin = margin;
                result.duration_s = d;
                result.sustained = s;
                result.allowed = allowed;
            }
            result.margin_lower_bound = result.margin_lower_bound.min(margin);
            if let Some(&next) = durations.get(k + 1) {
                let (next_left, _, _) = self.limits(next);
                let bound = right.min(next_left) - s;
                result.margin_lower_bound = result.margin_lower_bound.min(bound);
            }
        }
        Ok(result)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn signal(values: Vec<f64>) -> UniformSignal {
        UniformSignal {
            dt_s: 0.1,
            t0_s: 0.0,
            values,
        }
    }

    /// Documented edge cases: empty signal, single sample, infinite or invalid durations.
    #[test]
    fn edge_cases_follow_the_documentation() {
        assert_eq!(sustained_level(&signal(vec![]), 0.0), f64::NEG_INFINITY);
        assert_eq!(sustained_level(&signal(vec![4.0]), 0.0), 4.0);
        assert_eq!(sustained_level(&signal(vec![4.0]), 0.05), f64::NEG_INFINITY);
        let s = signal(vec![1.0, 3.0, 2.0]);
        assert_eq!(sustained_level(&s, f64::INFINITY), f64::NEG_INFINITY);
        assert!(sustained_level(&s, -1.0).is_nan());
        assert!(sustained_level(&s, f64::NAN).is_nan());
        // The whole length: the minimum of the signal.
        assert_eq!(sustained_level(&s, 0.2), 1.0);
        assert_eq!(sustained_level_below(&s, 0.2), 3.0);
        let bad = UniformSignal {
            dt_s: -1.0,
            t0_s: 0.0,
            values: vec![1.0],
        };
        assert!(sustained_level(&bad, 0.0).is_nan());
        let env = Envelope::new(vec![(0.0, 1.0)]).unwrap();
        assert_eq!(env.check(&signal(vec![])), Err(SignalError::Empty));
        let r = env.check_with_grid(&signal(vec![0.5]), 0).unwrap();
        assert_eq!(r.worst_margin, 0.5);
    }

    /// Documented interpolation of the envelope: constant beyond the ends, lowest value at a step.
    #[test]
    fn envelope_interpolation() {
        let env = Envelope::new(vec![(1.0, 5.0), (2.0, 3.0), (2.0, 4.0), (3.0, 1.0)]).unwrap();
        assert_eq!(env.allowed_at(0.0), 5.0);
        assert_eq!(env.allowed_at(1.5), 4.0);
        assert_eq!(env.allowed_at(2.0), 3.0);
        assert_eq!(env.limits(2.0), (3.0, 3.0, 4.0));
        assert_eq!(env.allowed_at(2.5), 2.5);
        assert_eq!(env.allowed_at(10.0), 1.0);
        assert!(env.allowed_at(f64::NAN).is_nan());
    }
}
