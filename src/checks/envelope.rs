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
//!
//! # The exact envelope check
//!
//! **Definition.** The samples y₀ … y_{n−1} (step dt) are read as the piecewise-linear function
//! y(t) through them on [0, T], T = (n − 1)·dt, and S(D) = max over t of min over [t, t + D] of
//! y for 0 ≤ D ≤ T (the largest level L such that {y ≥ L} contains an interval of length ≥ D,
//! lengths measured on the interpolated signal, not in whole samples). This is the definition
//! the dense grid used before, so results change only by what the grid missed. S is continuous,
//! non-increasing and piecewise linear on [0, T]; S(D) = −∞ beyond T.
//!
//! **Reformulation.** With F(D) = min over D′ ≤ D of allowed(D′) (the envelope's running
//! minimum, non-increasing) and W(L) the longest component of {y ≥ L},
//!
//! min over D of (allowed(D) − S(D)) = min over levels L of (F(W(L)) − L)
//!                                   = min over L and components C of {y ≥ L} of (F(|C|) − L),
//!
//! because S(D) ≥ L exactly when W(L) ≥ D, and F is non-increasing (so the longest component is
//! the worst, and any component may be used). No upper envelope of components is needed.
//!
//! **Sweep.** Between consecutive sample values a component keeps the same samples and its two
//! ends move along fixed segments, so |C| is linear in L; such a piece is identified by the
//! sample t that is the leftmost minimum inside it, bounded by the last sample before t that is
//! < y_t and the first after t that is < y_t; it covers the levels from y_t down to the higher
//! of those two. All pieces come from one pass with a monotone stack (n pieces at most). On a
//! piece, F(|C(L)|) − L is linear between the levels where |C(L)| meets a breakpoint of F, so
//! its minimum is at the piece's two ends or at those levels (solved from the linear |C(L)|);
//! evaluating them gives the minimum exactly (up to rounding). A piece whose bound
//! F(|C| at its lowest level) − (its highest level) cannot beat the best so far is skipped.
//! Lengths and envelope durations are counted in steps and, like D/dt above, snapped to a whole
//! number within a relative 1e-9, so a component of exactly k steps meets a step of the
//! envelope at k·dt. Cost for n samples and an envelope of m points: O(n·log m + K) time, K ≤
//! n·m the breakpoints of F crossed by the pieces (few in practice), O(n + m) memory. The
//! binding duration is the shortest D with allowed(D) = F(|C|) at the worst candidate; S there
//! equals the binding level.

use super::filter::{SignalError, UniformSignal};

/// A customary cap on the number of grid durations for [`Envelope::check_with_grid`] besides the
/// envelope breakpoints (the value the grid evaluation used before [`Envelope::check`] became
/// exact; see [`Envelope::check_with_grid`] for what the cap costs in accuracy).
pub const DEFAULT_MAX_GRID_DURATIONS: usize = 1024;

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

/// S(D) for each duration in `durations_s` (see [`sustained_level`]), all at once from the
/// pieces of the exact envelope check's sweep (O(n·log m) for n samples and m durations instead
/// of O(n) per duration). The same values as [`sustained_level`] at each duration, to rounding
/// (`tests/reference_envelope.rs` compares them).
pub fn sustained_curve(signal: &UniformSignal, durations_s: &[f64]) -> Vec<f64> {
    let mut out = vec![f64::NAN; durations_s.len()];
    if signal.validate().is_err() {
        return out;
    }
    let usable = |d: f64| !(d.is_nan() || d < 0.0);
    if signal.values.is_empty() {
        for (o, &d) in out.iter_mut().zip(durations_s) {
            if usable(d) {
                *o = f64::NEG_INFINITY;
            }
        }
        return out;
    }
    let last = (signal.len() - 1) as f64;
    // Durations in steps (snapped as in `sustained_level`), the ones the pieces answer sorted.
    let mut asked: Vec<(f64, usize)> = Vec::with_capacity(durations_s.len());
    for (i, &d) in durations_s.iter().enumerate() {
        if !usable(d) {
            continue;
        }
        let q = snap_steps(d, signal.dt_s);
        if q.is_nan() || q > last {
            out[i] = f64::NEG_INFINITY;
        } else {
            asked.push((q, i));
        }
    }
    asked.sort_by(|a, b| a.0.total_cmp(&b.0));
    let steps: Vec<f64> = asked.iter().map(|a| a.0).collect();
    for (level, &(_, i)) in sustained_at_sorted_steps(&signal.values, &steps)
        .into_iter()
        .zip(&asked)
    {
        out[i] = level;
    }
    out
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
    let q = snap_steps(duration_s, dt_s);
    let (m_f, r) = (q.floor(), q - q.floor());
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
    /// Smallest allowed(D) − S(D): over every duration for [`Envelope::check`], over the
    /// evaluated durations for [`Envelope::check_with_grid`]; negative means the signal exceeds
    /// the envelope.
    pub worst_margin: f64,
    /// Duration at which the worst margin occurs, s (the shortest one on a tie).
    pub duration_s: f64,
    /// S at that duration.
    pub sustained: f64,
    /// allowed at that duration.
    pub allowed: f64,
    /// A guaranteed lower bound on allowed(D) − S(D) over **all** durations (not just the
    /// evaluated ones), from S being non-increasing; ≤ `worst_margin` (equal to it for the
    /// exact [`Envelope::check`]).
    pub margin_lower_bound: f64,
    /// Number of durations evaluated (grid), or of candidate (level, duration) points examined
    /// (exact check).
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

    /// Checks `signal` against the envelope exactly: the smallest allowed(D) − S(D) over **every**
    /// duration D ≥ 0 (not a grid), with the binding duration, for the piecewise-linear reading
    /// of the signal (see the module documentation for the algorithm and its cost, O(n) for the
    /// sweep plus the envelope breakpoints each component crosses).
    ///
    /// The result has `margin_lower_bound == worst_margin` (nothing is left between grid points)
    /// and `durations_evaluated` counts the candidate (level, duration) points examined. The
    /// binding duration is the shortest D at which the margin is reached: where the envelope is
    /// flat or rising past its running minimum, the start of that stretch.
    ///
    /// Errors: the signal breaks the [`UniformSignal`] invariants or has no samples.
    pub fn check(&self, signal: &UniformSignal) -> Result<EnvelopeResult, SignalError> {
        signal.validate()?;
        if signal.is_empty() {
            return Err(SignalError::Empty);
        }
        let floor = Floor::new(&self.points, signal.dt_s);
        let best = exact_worst(&signal.values, &floor);
        let (_, duration_s) = floor.first_reaching(best.allowed, best.steps, signal.dt_s);
        Ok(EnvelopeResult {
            worst_margin: best.margin,
            duration_s,
            sustained: best.level,
            allowed: best.allowed,
            margin_lower_bound: best.margin,
            durations_evaluated: best.candidates,
        })
    }

    /// Checks `signal` against the envelope on a grid of durations (the dense evaluation that
    /// [`Envelope::check`] replaces, kept as a cross-check and for benchmarks): margin
    /// allowed(D) − S(D) at every envelope breakpoint within the signal length L = (n − 1)·dt, at L itself, and on the grid
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

/// The running minimum of an envelope, F(q) = min over q' ≤ q of allowed(q'), with durations q
/// in sample steps (D/dt, snapped to a whole number within a relative 1e-9 as in
/// [`sustained_level`]). Non-increasing and piecewise linear through its points; where two
/// points share a duration (a step down) the lower value holds at that duration.
struct Floor {
    /// Durations in steps (non-decreasing, the first is 0).
    q: Vec<f64>,
    /// The same durations in seconds, as given where they come from an envelope point.
    d_s: Vec<f64>,
    /// Levels (non-increasing).
    a: Vec<f64>,
}

/// A number of steps (≥ 0) snapped to the nearest whole number when within a relative
/// [`STEP_SNAP_REL`] of it.
fn snap_whole(q: f64) -> f64 {
    let nearest = q.round();
    if (q - nearest).abs() <= STEP_SNAP_REL * q.max(1.0) {
        nearest
    } else {
        q
    }
}

/// `duration_s` in steps of `dt_s`, snapped by [`snap_whole`].
fn snap_steps(duration_s: f64, dt_s: f64) -> f64 {
    snap_whole(duration_s / dt_s)
}

impl Floor {
    /// F for `points` (validated by [`Envelope::new`], so not empty) on a grid of step `dt_s`.
    /// allowed is constant before the first point, so F starts flat from D = 0. Along each
    /// segment F stays at the running minimum m until allowed falls below m: F then follows
    /// allowed from the crossing (or the step) to the segment's end.
    fn new(points: &[(f64, f64)], dt_s: f64) -> Self {
        let first = points.first().map_or(0.0, |p| p.1);
        let mut floor = Self {
            q: vec![0.0],
            d_s: vec![0.0],
            a: vec![first],
        };
        let mut m = first;
        for w in points.windows(2) {
            let ((d0, a0), (d1, a1)) = (w[0], w[1]);
            if a1 >= m {
                continue;
            }
            // a0 ≥ m ≥ a1 with a1 < m: the crossing of m lies in [d0, d1] (d0 itself at a step).
            let start_s = d0 + (d1 - d0) * ((a0 - m) / (a0 - a1));
            floor.push(start_s, snap_steps(start_s, dt_s), m);
            floor.push(d1, snap_steps(d1, dt_s), a1);
            m = a1;
        }
        floor
    }

    fn push(&mut self, d_s: f64, q: f64, a: f64) {
        let (last_q, last_a) = match (self.q.last(), self.a.last()) {
            (Some(&q), Some(&a)) => (q, a),
            _ => (f64::NEG_INFINITY, f64::INFINITY),
        };
        if q <= last_q && a >= last_a {
            return;
        }
        self.q.push(q.max(last_q));
        self.d_s.push(d_s);
        self.a.push(a.min(last_a));
    }

    /// F(x), x in steps (≥ 0): the lowest value at a shared duration, linear in between,
    /// constant past the last point.
    fn at(&self, x: f64) -> f64 {
        let hi = self.q.partition_point(|&q| q <= x);
        if hi == 0 {
            return self.a[0];
        }
        if self.q[hi - 1] == x || hi == self.q.len() {
            return self.a[hi - 1];
        }
        let (q0, q1) = (self.q[hi - 1], self.q[hi]);
        lerp(self.a[hi - 1], self.a[hi], (x - q0) / (q1 - q0))
    }

    /// The shortest duration (steps, seconds) at which F reaches `value` = F(x): the first point
    /// carrying exactly that value (the start of a flat stretch), else x itself (inside a
    /// falling stretch).
    fn first_reaching(&self, value: f64, x: f64, dt_s: f64) -> (f64, f64) {
        let j = self.a.partition_point(|&a| a > value);
        match (self.a.get(j), self.q.get(j), self.d_s.get(j)) {
            (Some(&a), Some(&q), Some(&d_s)) if a == value && q <= x => (q, d_s),
            _ => (x, x * dt_s),
        }
    }
}

/// The worst candidate found by [`exact_worst`].
struct Binding {
    /// F(steps) − level.
    margin: f64,
    /// Component length at the binding level, steps.
    steps: f64,
    /// The binding level (S at the binding duration).
    level: f64,
    /// F at `steps` (allowed at the binding duration).
    allowed: f64,
    /// Candidates examined.
    candidates: usize,
}

impl Binding {
    /// Takes the candidate (component length `steps` at `level`) when it is worse, or equally
    /// bad at a shorter binding duration.
    fn offer(&mut self, floor: &Floor, steps: f64, level: f64) {
        self.candidates += 1;
        let allowed = floor.at(steps);
        let margin = allowed - level;
        let better = margin < self.margin
            || (margin == self.margin
                && floor.first_reaching(allowed, steps, 1.0).0
                    < floor.first_reaching(self.allowed, self.steps, 1.0).0);
        if better {
            *self = Self {
                margin,
                steps,
                level,
                allowed,
                candidates: self.candidates,
            };
        }
    }
}

/// min over D of allowed(D) − S(D) for the piecewise-linear reading of `y` (not empty), as
/// min over levels L and components C of {y ≥ L} of F(|C|) − L (module documentation).
///
/// One left-to-right pass with a stack of sample indices whose values never decrease upwards:
/// when sample t is popped by k (y[k] < y[t]), the sample below it, p, is the last one before t
/// with y[p] ≤ y[t], and k the first one after t with y[k] < y[t]. If y[p] < y[t], the samples
/// p+1 ..= k−1 are exactly the component of {y ≥ L} around t for every L in
/// [max(y[p], y[k]), y[t]], with its ends on the segments (p, p+1) and (k−1, k), so its length
/// is linear in L there; if y[p] = y[t] the same component is handled when p is popped.
/// Every component of every level belongs to exactly one such piece.
fn exact_worst(y: &[f64], floor: &Floor) -> Binding {
    let mut best = Binding {
        margin: f64::INFINITY,
        steps: 0.0,
        level: f64::NAN,
        allowed: f64::NAN,
        candidates: 0,
    };
    for_each_piece(y, |piece| consider_piece(&piece, floor, &mut best));
    best
}

/// One piece of [`exact_worst`]'s sweep: the component of {y ≥ L} around sample `t`, bounded by
/// the samples `prev` and `next` (None at the signal's ends), for the levels L from y[t] down to
/// the higher of the bounding samples.
struct Piece<'a> {
    y: &'a [f64],
    prev: Option<usize>,
    t: usize,
    next: Option<usize>,
}

impl Piece<'_> {
    /// The piece's highest level y[t] and lowest level (the higher bounding sample).
    fn levels(&self) -> (f64, f64) {
        let hi = self.y[self.t];
        let lo = match (self.prev, self.next) {
            (Some(p), Some(k)) => self.y[p].max(self.y[k]),
            (Some(p), None) => self.y[p],
            (None, Some(k)) => self.y[k],
            (None, None) => hi,
        };
        (hi, lo)
    }

    /// Length in steps of the component at `level`: the samples a..=b plus the parts of the
    /// bounding segments above the level (y[a] > y[p] and y[b] > y[k], so no division by zero).
    fn length(&self, level: f64) -> f64 {
        let y = self.y;
        let a = self.prev.map_or(0, |p| p + 1);
        let b = self.next.map_or(y.len() - 1, |k| k - 1);
        let mut steps = (b - a) as f64;
        if let Some(p) = self.prev {
            steps += (y[a] - level) / (y[a] - y[p]);
        }
        if let Some(k) = self.next {
            steps += (y[b] - level) / (y[b] - y[k]);
        }
        steps
    }
}

/// Calls `visit` with every piece of `y` (not empty), from one left-to-right pass with a stack of
/// sample indices whose values never decrease upwards (see [`exact_worst`]).
fn for_each_piece<'a>(y: &'a [f64], mut visit: impl FnMut(Piece<'a>)) {
    let mut stack: Vec<usize> = Vec::with_capacity(64);
    for k in 0..=y.len() {
        // k = n flushes the stack: those samples have no smaller one after them.
        let next = y.get(k).map(|&v| (k, v));
        while let Some(&t) = stack.last() {
            if next.is_some_and(|(_, v)| y[t] <= v) {
                break;
            }
            stack.pop();
            let prev = stack.last().copied();
            if prev.is_some_and(|p| y[p] == y[t]) {
                continue;
            }
            visit(Piece {
                y,
                prev,
                t,
                next: next.map(|(k, _)| k),
            });
        }
        if next.is_some() {
            stack.push(k);
        }
    }
}

/// Offers the candidates of one piece (see [`exact_worst`]). On the piece the length ℓ(L) is
/// linear and falling in L, F(ℓ) − L is linear between the levels where ℓ meets a breakpoint of
/// F, so the candidates are the two ends and those levels.
fn consider_piece(piece: &Piece<'_>, floor: &Floor, best: &mut Binding) {
    let (hi, lo) = piece.levels();
    // Snapped like the durations in `sustained_level`, so a component of a whole number of steps
    // meets an envelope step at that duration.
    let (len_hi, len_lo) = (snap_whole(piece.length(hi)), snap_whole(piece.length(lo)));
    // F is non-increasing and ℓ ≤ len_lo, L ≤ hi on the piece: nothing here can be worse.
    if floor.at(len_lo) - hi > best.margin {
        return;
    }
    best.offer(floor, len_hi, hi);
    if lo < hi {
        best.offer(floor, len_lo, lo);
    }
    if len_lo > len_hi {
        let first = floor.q.partition_point(|&q| q <= len_hi);
        for &x in floor.q[first..].iter().take_while(|&&x| x < len_lo) {
            let level = hi - (hi - lo) * ((x - len_hi) / (len_lo - len_hi));
            best.offer(floor, x, level);
        }
    }
}

/// S at every duration of `steps` (durations in steps of the signal, sorted ascending, each
/// ≤ n − 1) for the samples `y` (not empty), from the pieces of [`exact_worst`]'s sweep: a
/// component of a piece is at least q steps long for every level from the piece's top down
/// to where its (linear) length reaches q, so S(q) = max over pieces of y[t] where the length
/// at the top is ≥ q, else of the level where the length equals q, when the piece's longest
/// length reaches q. One pass, O(n·log m) plus the durations inside each piece's length range.
fn sustained_at_sorted_steps(y: &[f64], steps: &[f64]) -> Vec<f64> {
    let m = steps.len();
    // tops[j]: the highest piece top whose top length covers steps[j] and no later duration.
    let mut tops = vec![f64::NEG_INFINITY; m];
    let mut out = vec![f64::NEG_INFINITY; m];
    for_each_piece(y, |piece| {
        let (hi, lo) = piece.levels();
        let (len_hi, len_lo) = (piece.length(hi), piece.length(lo));
        let covered = steps.partition_point(|&q| q <= len_hi);
        if covered > 0 {
            tops[covered - 1] = tops[covered - 1].max(hi);
        }
        if len_lo > len_hi {
            for (o, &q) in out[covered..]
                .iter_mut()
                .zip(&steps[covered..])
                .take_while(|(_, &q)| q <= len_lo)
            {
                let level = hi - (hi - lo) * ((q - len_hi) / (len_lo - len_hi));
                *o = o.max(level);
            }
        }
    });
    let mut running = f64::NEG_INFINITY;
    for j in (0..m).rev() {
        running = running.max(tops[j]);
        out[j] = out[j].max(running);
    }
    out
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
