//! The load each magnet section takes over a run: its peak force, its impulse ∫F dt and the
//! energy it dissipates −∫F·v dt, integrated over every accepted step from the step's continuous
//! output.
//!
//! Within a step the laws are frozen and the state is the quartic continuous extension of
//! Dormand & Prince, so the force of each pair is a smooth function of θ; the integrals use
//! 5-point Gauss–Legendre quadrature on [0, θ_hi] (exact for polynomials of degree 9; nodes and
//! weights from Abramowitz & Stegun, *Handbook of Mathematical Functions*, 1964, table 25.4).
//! The peak is the largest |force| at the nodes and at the step's ends. These integrals are
//! computed beside the integrator's own state (which carries the total braking energy), so
//! their sum is an independent check of the run's energy balance.

use super::context::Ctx;
use super::dopri::{Dense, State};
use super::pieces::Frozen;
use crate::dynamics::RunResult;

/// Gauss–Legendre nodes on [−1, 1] and weights, 5 points (Abramowitz & Stegun 25.4).
const GL5: [(f64, f64); 5] = [
    (-0.906_179_845_938_664, 0.236_926_885_056_189),
    (-0.538_469_310_105_683, 0.478_628_670_499_366),
    (0.0, 0.568_888_888_888_889),
    (0.538_469_310_105_683, 0.478_628_670_499_366),
    (0.906_179_845_938_664, 0.236_926_885_056_189),
];

/// The state of the continuous output at θ (x, v, the energies and fin energies).
pub(super) fn state_at<const N: usize>(dense: &Dense<N>, th: f64, n: usize) -> State<N> {
    let mut y = [0.0; N];
    for (i, yi) in y.iter_mut().enumerate().take(n.min(N)) {
        *yi = dense.value_at_theta(i, th);
    }
    y
}

/// Adds one accepted step (θ from 0 to `th_hi`) to `res.sections` (one entry per scenario
/// section, in order).
pub(super) fn add_step<const N: usize>(
    ctx: &Ctx,
    frozen: &Frozen,
    dense: &Dense<N>,
    th_hi: f64,
    res: &mut RunResult,
) {
    if frozen.pairs.is_empty() || th_hi <= 0.0 || res.sections.is_empty() {
        return;
    }
    let n = 4 + ctx.n_fins;
    let span_s = th_hi * dense.h;
    // Per section: force on the vehicle along +s (the negative of the pairs' drag), N.
    let mut force = vec![0.0; res.sections.len()];
    let mut point = |th: f64, weight_s: f64, res: &mut RunResult| {
        let y = state_at(dense, th, n);
        let (x, v) = (y[0], y[1]);
        force.fill(0.0);
        for &(p, a, b) in &frozen.pairs {
            if let Some(f) = force.get_mut(ctx.pairs[p].spec.section) {
                *f -= ctx.pair_force(p, a + b * x, &y);
            }
        }
        let t = dense.t0 + th * dense.h;
        for (load, &f) in res.sections.iter_mut().zip(&force) {
            if f.abs() > load.peak_force_n {
                load.peak_force_n = f.abs();
                load.peak_force_time_s = Some(t);
                load.peak_force_position_m = Some(x);
            }
            load.impulse_n_s += weight_s * f;
            load.energy_j -= weight_s * f * v;
        }
    };
    for &(node, w) in &GL5 {
        point(0.5 * th_hi * (node + 1.0), 0.5 * span_s * w, res);
    }
    point(0.0, 0.0, res);
    point(th_hi, 0.0, res);
}
