//! Reference checks for the exact envelope check (`Envelope::check`).
//!
//! Sources: analytic sustained levels of synthetic signals read as piecewise linear between
//! samples, and an independent brute-force evaluation written here: the margin
//! allowed(D) − S(D) at every duration where the minimum can lie, each S(D) computed by the
//! per-duration algorithm `sustained_level` (itself checked against the definition in
//! `tests/reference_signals.rs`), plus a dense duration grid that the exact result may never
//! exceed.
//!
//! Why the brute-force candidate set is complete (the argument is independent of the sweep in
//! `Envelope::check`): between two consecutive sample values the components of {y ≥ L} keep
//! their samples and their lengths are linear and falling in L, so W(L), the longest one, is a
//! maximum of falling lines, convex and falling; its inverse S(D) is then convex on the range of
//! D where S stays strictly between those sample values. Where the envelope is also linear,
//! allowed − S is concave, so its minimum lies at an end: an envelope breakpoint, or a D where
//! S(D) is a sample value, i.e. the length of a component of {y ≥ y_k} or of {y > y_k}
//! (the two limits of W at the level y_k). Every such length is a candidate below.

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use approx::assert_relative_eq;
use eddyzone::checks::envelope::{sustained_curve, sustained_level, Envelope};
use eddyzone::checks::filter::UniformSignal;
use proptest::prelude::*;

/// Lengths in steps of every component of {y ≥ level} (or {y > level} when `strict`), for the
/// piecewise-linear reading of `y`: each maximal run of samples inside the set, extended along
/// the neighbouring segments to where the interpolant crosses `level`.
fn component_lengths(y: &[f64], level: f64, strict: bool) -> Vec<f64> {
    let inside = |v: f64| if strict { v > level } else { v >= level };
    let mut out = Vec::new();
    let mut k = 0;
    while k < y.len() {
        if !inside(y[k]) {
            k += 1;
            continue;
        }
        let a = k;
        while k + 1 < y.len() && inside(y[k + 1]) {
            k += 1;
        }
        let b = k;
        let mut steps = (b - a) as f64;
        if a > 0 {
            steps += (y[a] - level) / (y[a] - y[a - 1]);
        }
        if b + 1 < y.len() {
            steps += (y[b] - level) / (y[b] - y[b + 1]);
        }
        out.push(steps);
        k += 1;
    }
    out
}

/// Brute-force worst margin: allowed(D) − S(D) at D = 0, the signal length, every envelope
/// breakpoint and every component length at every sample level (module documentation).
fn brute_force_worst(s: &UniformSignal, env: &Envelope) -> f64 {
    let y = &s.values;
    let mut durations = vec![0.0, s.duration_s()];
    durations.extend(env.points().iter().map(|p| p.0));
    for &level in y {
        for strict in [false, true] {
            durations.extend(
                component_lengths(y, level, strict)
                    .into_iter()
                    .map(|l| l * s.dt_s),
            );
        }
    }
    durations
        .iter()
        .map(|&d| env.allowed_at(d) - sustained_level(s, d))
        .fold(f64::INFINITY, f64::min)
}

/// Zero baseline from 0 to `len_s`, level `level` on the samples in [start_s, start_s + width_s].
fn rectangle(dt_s: f64, len_s: f64, start_s: f64, width_s: f64, level: f64) -> UniformSignal {
    let n = (len_s / dt_s).round() as usize + 1;
    let i0 = (start_s / dt_s).round() as usize;
    let i1 = ((start_s + width_s) / dt_s).round() as usize;
    let values = (0..n)
        .map(|k| if (i0..=i1).contains(&k) { level } else { 0.0 })
        .collect();
    UniformSignal::new(dt_s, 0.0, values).unwrap()
}

/// Analytic: a level-2 rectangle 0.505 s wide (dt = 1 ms, 10 s of signal, like a tower drop
/// sampled at 1 kHz) against allowed(D) = 12.05 − 20·D falling to 0.05 at 0.6 s. S(D) = 2 up to
/// D = 0.505 s and 0 from 0.507 s, so the margin 10.05 − 20·D falls to −0.05 at D = 0.505 s, a
/// duration between the points of the old 1 024-duration grid (every 10 ms here), where it
/// reads +0.05 at 0.50 s. The exact check finds −0.05 at 0.505 s. Tolerance 1e-12.
#[test]
fn sloped_envelope_violated_between_grid_points() {
    let s = rectangle(0.001, 10.0, 1.0, 0.505, 2.0);
    let env = Envelope::new(vec![(0.0, 12.05), (0.6, 0.05)]).unwrap();
    let exact = env.check(&s).unwrap();
    assert!((exact.worst_margin + 0.05).abs() < 1e-12, "{exact:?}");
    assert!((exact.duration_s - 0.505).abs() < 1e-12, "{exact:?}");
    assert!((exact.sustained - 2.0).abs() < 1e-12, "{exact:?}");
    assert!((exact.allowed - 1.95).abs() < 1e-12, "{exact:?}");
    assert_eq!(exact.margin_lower_bound, exact.worst_margin);
    assert!(!exact.passes());
    let grid = env.check_with_grid(&s, 1024).unwrap();
    assert!((grid.worst_margin - 0.05).abs() < 1e-12, "{grid:?}");
    assert!(grid.passes(), "the grid misses the violation");
}

/// Analytic: for a triangle of peak A and base T (zero outside, corners on samples),
/// S(D) = A·(1 − D/T). Envelope 3.5 g flat to 0.5 s, a step down to 2.0 g there, then falling
/// linearly to 0.5 g at 1.6 s. At the step the lower value governs: margin
/// 2.0 − 3·(1 − 0.5/1.6) = −0.0625 g at D = 0.5 s; before it the margin is ≥ 0.5 g, after it
/// it grows (the envelope falls by 1.5/1.1 g/s, S by 3/1.6 g/s). Tolerance 1e-12 (in g).
#[test]
fn triangle_against_stepped_falling_envelope() {
    let dt = 0.01;
    let (a, base) = (3.0, 1.6);
    let values: Vec<f64> = (0..=200)
        .map(|k| {
            let t = k as f64 * dt;
            (a * (1.0 - (t - 1.0).abs() / (base / 2.0))).max(0.0)
        })
        .collect();
    let s = UniformSignal::new(dt, 0.0, values).unwrap();
    let env = Envelope::new(vec![(0.0, 3.5), (0.5, 3.5), (0.5, 2.0), (1.6, 0.5)]).unwrap();
    let r = env.check(&s).unwrap();
    assert!((r.worst_margin + 0.0625).abs() < 1e-12, "{r:?}");
    assert!((r.duration_s - 0.5).abs() < 1e-12, "{r:?}");
    assert!((r.sustained - 2.0625).abs() < 1e-12, "{r:?}");
    assert_relative_eq!(r.allowed, 2.0, max_relative = 1e-12);
}

/// Analytic: a rising envelope. allowed(D) = 1 + D against the same triangle (A = 3, T = 1.6):
/// margin 1 + D − 3·(1 − D/1.6) = −2 + 2.875·D is smallest at D = 0 (the peak): −2. Beyond the
/// signal length (2 s) nothing is sustained. A flat part after a fall binds at its start: with
/// points (0, 3.2), (0.4, 2.0), (2, 2.0) the margin at 0.4 s is 2.0 − 2.25 = −0.25, and later
/// durations only lower S. Tolerance 1e-12.
#[test]
fn rising_envelope_binds_at_the_peak_and_flat_binds_at_its_start() {
    let dt = 0.01;
    let values: Vec<f64> = (0..=200)
        .map(|k| {
            let t = k as f64 * dt;
            (3.0 * (1.0 - (t - 1.0).abs() / 0.8)).max(0.0)
        })
        .collect();
    let s = UniformSignal::new(dt, 0.0, values).unwrap();
    let rising = Envelope::new(vec![(0.0, 1.0), (10.0, 11.0)]).unwrap();
    let r = rising.check(&s).unwrap();
    assert!((r.worst_margin + 2.0).abs() < 1e-12, "{r:?}");
    assert_eq!(r.duration_s, 0.0);
    let flat = Envelope::new(vec![(0.0, 3.2), (0.4, 2.0), (2.0, 2.0)]).unwrap();
    let r = flat.check(&s).unwrap();
    assert!((r.worst_margin + 0.25).abs() < 1e-12, "{r:?}");
    assert!((r.duration_s - 0.4).abs() < 1e-12, "{r:?}");
}

/// Signals: continuous values, or values on a coarse lattice so that plateaus, ties and equal
/// neighbours occur often.
fn signal_values() -> impl Strategy<Value = Vec<f64>> {
    prop_oneof![
        prop::collection::vec(-5.0f64..5.0, 1..40),
        prop::collection::vec((-6i32..=6).prop_map(|k| 0.5 * k as f64), 1..40),
    ]
}

/// Envelopes: 1–8 points; each gap to the previous duration is zero (a step) about a third of
/// the time; levels anywhere in [−6, 6] (so segments rise, fall, are flat or step either way).
/// Durations span up to 1.3 signal lengths; some fall on whole steps.
fn envelope_points(length_s: f64, dt_s: f64) -> impl Strategy<Value = Vec<(f64, f64)>> {
    prop::collection::vec(
        (
            prop_oneof![
                Just(0.0),
                0.0f64..0.5,
                (0u32..8).prop_map(|k| k as f64 * 0.05)
            ],
            prop_oneof![-6.0f64..6.0, (-12i32..=12).prop_map(|k| 0.5 * k as f64)],
        ),
        1..8,
    )
    .prop_map(move |raw| {
        let mut d = 0.0;
        raw.into_iter()
            .map(|(gap, level)| {
                d += gap * 1.3 * length_s.max(dt_s);
                (d, level)
            })
            .collect()
    })
}

fn case() -> impl Strategy<Value = (UniformSignal, Vec<(f64, f64)>)> {
    (
        signal_values(),
        prop_oneof![Just(0.001), Just(0.1), 0.001f64..1.0],
    )
        .prop_flat_map(|(values, dt)| {
            let s = UniformSignal::new(dt, 0.0, values).unwrap();
            let pts = envelope_points(s.duration_s(), dt);
            (Just(s), pts)
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(3000))]

    /// The all-durations curve (`sustained_curve`, one sweep of the exact check's pieces) equals
    /// the per-duration algorithm `sustained_level` (a sliding-window minimum per duration,
    /// checked against the definition in `tests/reference_signals.rs`) at every duration asked,
    /// in any order: every dt/8, whole steps, random durations, the signal's length, beyond it,
    /// and negative or NaN durations. Tolerance 1e-12 absolute (values of order 1–10).
    #[test]
    fn curve_equals_the_per_duration_levels(
        values in signal_values(),
        dt in prop_oneof![Just(0.001), Just(0.1), 0.001f64..1.0],
        extra in prop::collection::vec(-0.2f64..1.3, 0..20),
    ) {
        let s = UniformSignal::new(dt, 0.0, values).unwrap();
        let length = s.duration_s();
        let mut durations: Vec<f64> =
            (0..=8 * (s.len() - 1)).rev().map(|k| k as f64 * dt / 8.0).collect();
        durations.extend(extra.iter().map(|f| f * length.max(dt)));
        durations.extend([length, length + dt, f64::NAN, -dt, 0.0]);
        let curve = sustained_curve(&s, &durations);
        prop_assert_eq!(curve.len(), durations.len());
        for (&d, &c) in durations.iter().zip(&curve) {
            let one = sustained_level(&s, d);
            if one.is_finite() {
                prop_assert!((c - one).abs() <= 1e-12, "D={}: curve {} vs level {}", d, c, one);
            } else {
                prop_assert!(c == one || (c.is_nan() && one.is_nan()), "D={}: {} vs {}", d, c, one);
            }
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(4000))]

    /// The exact check equals the brute-force minimum over the complete candidate set
    /// (1e-12 absolute; values are of order 1–10), never exceeds the margin at any duration of
    /// a dense grid (every dt/8, plus the envelope's breakpoints), and its binding duration
    /// reproduces the margin: allowed(D*) − S(D*) = worst (1e-12).
    #[test]
    fn exact_check_equals_brute_force((s, points) in case()) {
        let env = Envelope::new(points).unwrap();
        let exact = env.check(&s).unwrap();
        let brute = brute_force_worst(&s, &env);
        prop_assert!(
            (exact.worst_margin - brute).abs() <= 1e-12,
            "exact {:?} vs brute force {}", exact, brute
        );
        let grid: Vec<f64> = (0..=8 * (s.len() - 1)).map(|k| k as f64 * s.dt_s / 8.0).collect();
        for (d, level) in grid.iter().zip(sustained_curve(&s, &grid)) {
            let margin = env.allowed_at(*d) - level;
            prop_assert!(exact.worst_margin <= margin + 1e-12, "D={}: {} < {:?}", d, margin, exact);
        }
        let d = exact.duration_s;
        let at_binding = env.allowed_at(d) - sustained_level(&s, d);
        prop_assert!(
            (at_binding - exact.worst_margin).abs() <= 1e-12,
            "at D*={}: {} vs {:?}", d, at_binding, exact
        );
        prop_assert!((exact.sustained - sustained_level(&s, d)).abs() <= 1e-12);
        prop_assert!((exact.allowed - env.allowed_at(d)).abs() <= 1e-12);
        prop_assert_eq!(exact.margin_lower_bound, exact.worst_margin);
        // The dense grid evaluation brackets the exact value from both sides.
        let dense = env.check_with_grid(&s, usize::MAX).unwrap();
        prop_assert!(dense.margin_lower_bound <= exact.worst_margin + 1e-12);
        prop_assert!(exact.worst_margin <= dense.worst_margin + 1e-12);
    }
}
