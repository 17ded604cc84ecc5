//! The Dormand–Prince 5(4) method with its continuous extension of order 4, on fixed-size
//! arrays: no allocation per step or per piece.
//!
//! Coefficients: Dormand & Prince, "A family of embedded Runge–Kutta formulae", J. Comp. Appl.
//! Math. 6, 1980; the dense output and the step-size control (PI controller with α = 0.2 − 0.75·β,
//! the step-size bounds, the stiffness test) follow Hairer, Nørsett & Wanner, Solving Ordinary
//! Differential Equations I, 2nd ed. 1993, §II.4–II.6 and their DOPRI5 code, in the arrangement of
//! ode_solvers' `Dopri5` (the crate this replaces; a test checks step for step that both give the
//! same numbers).
//!
//! One stage evaluation is one right-hand-side call; the last stage is the derivative at the new
//! point (first same as last), so an accepted step costs six calls. The right-hand side does not
//! depend on time (autonomous equations of motion), so the stage times are not needed.

// The stage sums index several parallel arrays entry by entry (in the order the reference
// implementation adds them, so that both give the same numbers).
#![allow(clippy::excessive_precision, clippy::needless_range_loop)]

use super::solver::SolverSettings;

/// A state (or its rate of change) of N entries.
pub(super) type State<const N: usize> = [f64; N];

/// a_ij, row i = stage 2…7 (row 7 is the fifth-order solution b_j).
const A: [[f64; 6]; 6] = [
    [1.0 / 5.0, 0.0, 0.0, 0.0, 0.0, 0.0],
    [3.0 / 40.0, 9.0 / 40.0, 0.0, 0.0, 0.0, 0.0],
    [44.0 / 45.0, -56.0 / 15.0, 32.0 / 9.0, 0.0, 0.0, 0.0],
    [
        19372.0 / 6561.0,
        -25360.0 / 2187.0,
        64448.0 / 6561.0,
        -212.0 / 729.0,
        0.0,
        0.0,
    ],
    [
        9017.0 / 3168.0,
        -355.0 / 33.0,
        46732.0 / 5247.0,
        49.0 / 176.0,
        -5103.0 / 18656.0,
        0.0,
    ],
    [
        35.0 / 384.0,
        0.0,
        500.0 / 1113.0,
        125.0 / 192.0,
        -2187.0 / 6784.0,
        11.0 / 84.0,
    ],
];

/// Dense-output weights d_i (stages 1, 3, 4, 5, 6, 7; d_2 = 0).
const D: [f64; 7] = [
    -12715105075.0 / 11282082432.0,
    0.0,
    87487479700.0 / 32700410799.0,
    -10690763975.0 / 1880347072.0,
    701980252875.0 / 199316789632.0,
    -1453857185.0 / 822651844.0,
    69997945.0 / 29380423.0,
];

/// Error weights e_i = b_i − b̂_i (e_2 = 0).
const E: [f64; 7] = [
    71.0 / 57600.0,
    0.0,
    -71.0 / 16695.0,
    71.0 / 1920.0,
    -17253.0 / 339200.0,
    22.0 / 525.0,
    -1.0 / 40.0,
];

/// Stiffness test threshold on h·|λ| (Hairer & Wanner, Solving ODE II, §IV.2: 3.25 for DOPRI5).
const STIFF_THRESHOLD: f64 = 3.25;
/// Positive stiffness tests in a row that count as stiff (DOPRI5: 15).
const STIFF_LIMIT: u32 = 15;
/// Negative tests in a row that reset the count (DOPRI5: 6).
const NON_STIFF_RESET: u32 = 6;

/// The continuous extension of one accepted step from t0 over h:
/// y(t0 + θh) = r0 + θ(r1 + (1−θ)(r2 + θ(r3 + (1−θ)·r4))), θ ∈ [0, 1]. It meets the step's end
/// values and end derivatives (a quartic Hermite-type interpolant, order 4).
#[derive(Clone, Copy, Debug)]
pub(super) struct Dense<const N: usize> {
    /// Step start, s.
    pub t0: f64,
    /// Step length, s.
    pub h: f64,
    /// Coefficients r0…r4.
    pub r: [State<N>; 5],
}

impl<const N: usize> Dense<N> {
    /// The step's end time, s.
    #[inline]
    pub fn t1(&self) -> f64 {
        self.t0 + self.h
    }

    /// Entry `i` at time `t`.
    #[inline]
    pub fn value(&self, i: usize, t: f64) -> f64 {
        let th = (t - self.t0) / self.h;
        self.value_at_theta(i, th)
    }

    /// Entry `i` at θ.
    #[inline]
    pub fn value_at_theta(&self, i: usize, th: f64) -> f64 {
        let th1 = 1.0 - th;
        let r = &self.r;
        r[0][i] + (r[1][i] + (r[2][i] + (r[3][i] + r[4][i] * th1) * th) * th1) * th
    }

    /// d/dt of entry `i` at θ (the interpolant's slope: at θ = 0 and 1 the step's end
    /// derivatives).
    #[inline]
    pub fn rate_at_theta(&self, i: usize, th: f64) -> f64 {
        let [_, b, c, d, e] = self.poly(i);
        (b + th * (2.0 * c + th * (3.0 * d + th * 4.0 * e))) / self.h
    }

    /// Power-basis coefficients of entry `i` in θ: p(θ) = Σ c_k θ^k, k = 0…4.
    pub fn poly(&self, i: usize) -> [f64; 5] {
        let (r0, r1, r2, r3, r4) = (
            self.r[0][i],
            self.r[1][i],
            self.r[2][i],
            self.r[3][i],
            self.r[4][i],
        );
        // θ(r1 + (1−θ)(r2 + θ(r3 + (1−θ) r4))) expanded.
        [r0, r1 + r2, r3 - r2 + r4, -r3 - 2.0 * r4, r4]
    }
}

/// How an attempt to integrate failed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(super) enum StepFailure {
    /// More attempts than the settings allow.
    StepLimit,
    /// The step shrank to the rounding limit of the time.
    Underflow,
    /// The stiffness test fired repeatedly.
    Stiff,
}

/// The step-size controller's memory.
#[derive(Clone, Copy, Debug)]
struct Controller {
    fac_old: f64,
    reject: bool,
}

impl Controller {
    fn new() -> Self {
        Self {
            fac_old: 1e-4,
            reject: false,
        }
    }
}

/// The Dormand–Prince stepper on one piece: the current point, its derivative (first same as
/// last), the proposed step, the controller and the counters. Times run forward only.
pub(super) struct Stepper<const N: usize> {
    /// Current time, s.
    pub t: f64,
    /// Current state.
    pub y: State<N>,
    /// Derivative at (t, y).
    pub f: State<N>,
    /// Next step to try, s.
    pub h: f64,
    /// The last accepted step's continuous extension.
    pub dense: Dense<N>,
    /// Right-hand-side evaluations.
    pub evaluations: u64,
    /// Accepted steps.
    pub accepted: u64,
    attempts: u32,
    stiff_hits: u32,
    non_stiff: u32,
    controller: Controller,
    alpha: f64,
    settings: SolverSettings,
    k: [State<N>; 7],
    /// Entries in use (the rest stay 0 in every state and derivative, and add nothing to any
    /// sum; the error norm still divides by N).
    used: usize,
}

impl<const N: usize> Stepper<N> {
    /// A stepper at (t, y) with derivative `f` there (already evaluated by the caller, not
    /// counted) and a first step `h` (≤ 0: chosen by [`Stepper::initial_step`]).
    pub fn new(settings: &SolverSettings, t: f64, y: State<N>, f: State<N>, h: f64) -> Self {
        Self {
            t,
            y,
            f,
            h,
            dense: Dense {
                t0: t,
                h: 0.0,
                r: [[0.0; N]; 5],
            },
            evaluations: 0,
            accepted: 0,
            attempts: 0,
            stiff_hits: 0,
            non_stiff: 0,
            controller: Controller::new(),
            alpha: 0.2 - 0.75 * settings.beta,
            settings: *settings,
            k: [[0.0; N]; 7],
            used: N,
        }
    }

    /// The entries in use (see [`Stepper::using`]).
    pub fn used(&self) -> usize {
        self.used.min(N)
    }

    /// Only the first `used` entries (at most N) are stepped: the caller's right-hand side
    /// leaves the others 0, as they are in the start state and derivative. The steps are the
    /// same, bit for bit, as stepping all N (0 adds nothing to a sum; the error norm still
    /// divides by N).
    pub fn using(mut self, used: usize) -> Self {
        // With atol = 0 an unused entry's error scale is 0 and its 0/0 enters the norm: step
        // them all then, as before.
        if self.settings.atol > 0.0 {
            self.used = used.min(N);
        }
        self
    }

    /// The first step from the derivatives at the start and one explicit Euler step (Hairer,
    /// Nørsett & Wanner 1993, §II.4, "Starting step size"; one evaluation, counted): sets and
    /// returns `h`.
    pub fn initial_step(&mut self, rhs: &mut impl FnMut(&State<N>, &mut State<N>)) -> f64 {
        let s = &self.settings;
        let n = self.used.min(N);
        let f0 = self.f;
        let (mut d0, mut d1) = (0.0, 0.0);
        for i in 0..n {
            let sc = s.atol + self.y[i].abs() * s.rtol;
            d0 += (self.y[i] / sc) * (self.y[i] / sc);
            d1 += (f0[i] / sc) * (f0[i] / sc);
        }
        let mut h0 = if d0 < 1e-10 || d1 < 1e-10 {
            1e-6
        } else {
            0.01 * (d0 / d1).sqrt()
        };
        h0 = h0.min(s.h_max_s);
        let y1: State<N> = std::array::from_fn(|i| self.y[i] + f0[i] * h0);
        let mut f1 = [0.0; N];
        rhs(&y1, &mut f1);
        let mut d2 = 0.0;
        for i in 0..n {
            let sc = s.atol + self.y[i].abs() * s.rtol;
            d2 += ((f1[i] - f0[i]) / sc) * ((f1[i] - f0[i]) / sc);
        }
        d2 = d2.sqrt() / h0;
        let h1 = if d1.sqrt().max(d2.abs()) <= 1e-15 {
            1e-6_f64.max(h0.abs() * 1e-3)
        } else {
            (0.01 / d1.sqrt().max(d2)).powf(1.0 / 5.0)
        };
        self.evaluations += 1;
        self.h = (100.0 * h0.abs()).min(h1.min(s.h_max_s));
        self.h
    }

    /// Attempts steps until one is accepted, not beyond `t_end`. Ok(true): the accepted step
    /// reached `t_end`. The accepted step's continuous extension is in `dense`, the new point in
    /// `t`, `y`, `f`.
    pub fn step(
        &mut self,
        rhs: &mut impl FnMut(&State<N>, &mut State<N>),
        t_end: f64,
    ) -> Result<bool, StepFailure> {
        loop {
            if self.attempts > self.settings.max_steps {
                return Err(StepFailure::StepLimit);
            }
            if 0.1 * self.h.abs() <= f64::EPSILON * self.t.abs() {
                return Err(StepFailure::Underflow);
            }
            let mut last = false;
            if self.t + 1.01 * self.h - t_end > 0.0 {
                self.h = t_end - self.t;
                last = true;
            }
            self.attempts += 1;
            if let Some(h_new) = self.attempt(rhs)? {
                self.h = h_new;
                return Ok(last);
            }
        }
    }

    /// The fifth-order solution of one step from the start of the last accepted step to `t`
    /// inside it (no error control; five evaluations, counted). Used for the state at an event,
    /// which is then as accurate as a step end rather than the order-4 continuous extension.
    pub fn restep_to(
        &mut self,
        rhs: &mut impl FnMut(&State<N>, &mut State<N>),
        t: f64,
    ) -> State<N> {
        let h = t - self.dense.t0;
        let n = self.used.min(N);
        let y0 = self.dense.r[0];
        let mut k = [[0.0; N]; 6];
        k[0] = self.k[0];
        let mut y = y0;
        for stage in 1..7 {
            y = y0;
            for (j, a) in A[stage - 1].iter().enumerate().take(stage) {
                for i in 0..n {
                    y[i] += k[j][i] * h * a;
                }
            }
            if stage < 6 {
                rhs(&y, &mut k[stage]);
            }
        }
        self.evaluations += 5;
        y
    }

    /// One attempt with the current h: Some(next h) when accepted (state advanced), None when
    /// rejected (h reduced).
    fn attempt(
        &mut self,
        rhs: &mut impl FnMut(&State<N>, &mut State<N>),
    ) -> Result<Option<f64>, StepFailure> {
        let h = self.h;
        let s = self.settings;
        let n = self.used.min(N);
        self.k[0] = self.f;
        let mut y_next = [0.0; N];
        let mut y_stiff = [0.0; N];
        for stage in 1..7 {
            y_next = self.y;
            for (j, a) in A[stage - 1].iter().enumerate().take(stage) {
                let kj = &self.k[j];
                for i in 0..n {
                    y_next[i] += kj[i] * h * a;
                }
            }
            rhs(&y_next, &mut self.k[stage]);
            if stage == 5 {
                y_stiff = y_next;
            }
        }
        self.evaluations += 6;
        let k = &self.k;
        // k[6] is the derivative at the new point.
        let mut dense4 = [0.0; N];
        let mut err = 0.0;
        for i in 0..n {
            dense4[i] = (k[0][i] * D[0]
                + k[2][i] * D[2]
                + k[3][i] * D[3]
                + k[4][i] * D[4]
                + k[5][i] * D[5]
                + k[6][i] * D[6])
                * h;
            let e = (k[0][i] * E[0]
                + k[2][i] * E[2]
                + k[3][i] * E[3]
                + k[4][i] * E[4]
                + k[5][i] * E[5]
                + k[6][i] * E[6])
                * h;
            let sc = s.atol + self.y[i].abs().max(y_next[i].abs()) * s.rtol;
            err += (e / sc) * (e / sc);
        }
        err = (err / N as f64).sqrt();

        let facc1 = 1.0 / s.fac_min;
        let facc2 = 1.0 / s.fac_max;
        let fac11 = err.powf(self.alpha);
        let fac =
            facc2.max(facc1.min(fac11 * self.controller.fac_old.powf(-s.beta) / s.safety_factor));
        let mut h_new = h / fac;
        if err > 1.0 {
            self.h = h / facc1.min(fac11 / s.safety_factor);
            self.controller.reject = true;
            return Ok(None);
        }
        self.controller.fac_old = err.max(1e-4);
        if h_new.abs() > s.h_max_s {
            h_new = s.h_max_s;
        }
        if self.controller.reject {
            h_new = h_new.abs().min(h.abs());
        }
        self.controller.reject = false;
        self.accepted += 1;

        if self
            .accepted
            .is_multiple_of(u64::from(s.stiffness_test_every))
            || self.stiff_hits > 0
        {
            let (mut num, mut den) = (0.0, 0.0);
            for i in 0..n {
                let dk = k[6][i] - k[5][i];
                let dy = y_next[i] - y_stiff[i];
                num += dk * dk;
                den += dy * dy;
            }
            let h_lamb = if den > 0.0 {
                h * (num / den).sqrt()
            } else {
                0.0
            };
            if h_lamb > STIFF_THRESHOLD {
                self.stiff_hits += 1;
                self.non_stiff = 0;
                if self.stiff_hits == STIFF_LIMIT {
                    return Err(StepFailure::Stiff);
                }
            } else {
                self.non_stiff += 1;
                if self.non_stiff == NON_STIFF_RESET {
                    self.stiff_hits = 0;
                }
            }
        }

        let mut r = [[0.0; N]; 5];
        for i in 0..n {
            let ydiff = y_next[i] - self.y[i];
            let bspl = k[0][i] * h - ydiff;
            r[0][i] = self.y[i];
            r[1][i] = ydiff;
            r[2][i] = bspl;
            r[3][i] = -k[6][i] * h + ydiff - bspl;
            r[4][i] = dense4[i];
        }
        self.dense = Dense { t0: self.t, h, r };
        self.f = k[6];
        self.y = y_next;
        self.t += h;
        Ok(Some(h_new))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use ode_solvers::{Dopri5, OutputType, SVector, System};

    /// Damped pendulum with quadratic drag and its dissipated energy, padded to 4 entries.
    fn pendulum(y: &State<4>, dy: &mut State<4>) {
        dy[0] = y[1];
        dy[1] = -y[0].sin() - 0.2 * y[1] * y[1].abs();
        dy[2] = 0.2 * y[1] * y[1] * y[1].abs();
        dy[3] = 0.0;
    }

    struct Pendulum {
        steps: Vec<(f64, [f64; 4])>,
    }

    impl System<f64, SVector<f64, 4>> for Pendulum {
        fn system(&self, _t: f64, y: &SVector<f64, 4>, dy: &mut SVector<f64, 4>) {
            let mut d = [0.0; 4];
            pendulum(&[y[0], y[1], y[2], y[3]], &mut d);
            dy.copy_from_slice(&d);
        }
        fn solout(&mut self, t: f64, y: &SVector<f64, 4>, _dy: &SVector<f64, 4>) -> bool {
            self.steps.push((t, [y[0], y[1], y[2], y[3]]));
            false
        }
    }

    /// Reference: ode_solvers' `Dopri5` (the general-purpose implementation of the same method
    /// and controller) with the same settings gives the same accepted steps, bit for bit, and
    /// the same number of evaluations (it evaluates the start derivative twice more: once for
    /// its starting-step estimate and once for the first stage).
    #[test]
    fn same_steps_as_ode_solvers() {
        let settings = SolverSettings {
            h_max_s: 0.7,
            ..SolverSettings::default()
        };
        let y0 = [2.5, 0.0, 0.0, 0.0];
        let t_end = 20.0;
        let mut reference = Dopri5::from_param(
            Pendulum { steps: Vec::new() },
            0.0,
            t_end,
            0.0,
            SVector::<f64, 4>::from(y0),
            settings.rtol,
            settings.atol,
            settings.safety_factor,
            settings.beta,
            settings.fac_min,
            settings.fac_max,
            settings.h_max_s,
            0.0,
            settings.max_steps,
            settings.stiffness_test_every,
            OutputType::Sparse,
        );
        let stats = reference.integrate().expect("reference integrates");
        let mut f0 = [0.0; 4];
        pendulum(&y0, &mut f0);
        let mut rhs = pendulum;
        let mut s = Stepper::new(&settings, 0.0, y0, f0, 0.0);
        s.initial_step(&mut rhs);
        let mut ours = Vec::new();
        loop {
            let last = s.step(&mut rhs, t_end).expect("steps");
            ours.push((s.t, s.y));
            if last {
                break;
            }
        }
        let theirs: Vec<(f64, [f64; 4])> = reference.x_out()[1..]
            .iter()
            .zip(&reference.y_out()[1..])
            .map(|(t, y)| (*t, [y[0], y[1], y[2], y[3]]))
            .collect();
        assert!(ours.len() > 50, "{} steps", ours.len());
        assert_eq!(ours, theirs);
        assert_eq!(s.accepted, u64::from(stats.accepted_steps));
        assert_eq!(s.evaluations + 2, u64::from(stats.num_eval));
    }

    /// Logistic growth y' = y(1 − y), y(0) = 0.1, has y = 1/(1 + 9e^(−t)) (Verhulst 1838; common
    /// practice as a test equation). With tolerances 1e-10 (steps up to 0.12 of the time scale):
    /// the end value agrees with the exact solution to 1e-10 and a step re-taken to an interior
    /// time to 1e-9; over every step's quarter points the continuous extension is within 5e-9
    /// and its slope within 2e-7. The samples of a run used to evaluate the right-hand side at a
    /// cubic Hermite interpolant of the step ends (numeric::HermiteWeights): the extension's
    /// state is checked to be ten times closer than that interpolant, and its slope no worse
    /// than 1.5× the derivative evaluated there.
    #[test]
    fn logistic_growth_against_the_exact_solution() {
        let exact = |t: f64| 1.0 / (1.0 + 9.0 * (-t).exp());
        let f = |y: f64| y * (1.0 - y);
        let mut rhs = |y: &State<2>, dy: &mut State<2>| {
            dy[0] = f(y[0]);
            dy[1] = 0.0;
        };
        let settings = SolverSettings::default();
        let y0 = [0.1, 0.0];
        let mut f0 = [0.0; 2];
        rhs(&y0, &mut f0);
        let mut s = Stepper::new(&settings, 0.0, y0, f0, 0.0);
        s.initial_step(&mut rhs);
        // Largest errors: extension value and slope; Hermite value and f there.
        let mut worst = [0.0f64; 4];
        loop {
            let last = s.step(&mut rhs, 10.0).expect("steps");
            let d = s.dense;
            let (ya, yb) = (d.r[0][0], d.r[0][0] + d.r[1][0]);
            for q in 1..4 {
                let th = f64::from(q) / 4.0;
                let y = exact(d.t0 + th * d.h);
                let hermite =
                    crate::numeric::HermiteWeights::at(th).blend(d.h, ya, f(ya), yb, f(yb));
                let errors = [
                    d.value_at_theta(0, th) - y,
                    d.rate_at_theta(0, th) - f(y),
                    hermite - y,
                    f(hermite) - f(y),
                ];
                for (w, e) in worst.iter_mut().zip(errors) {
                    *w = w.max(e.abs());
                }
            }
            if last {
                break;
            }
        }
        assert!((s.y[0] - exact(10.0)).abs() < 1e-10);
        assert!(worst[0] < 5e-9 && worst[1] < 2e-7, "{worst:?}");
        assert!(
            worst[0] * 10.0 < worst[2] && worst[1] < 1.5 * worst[3],
            "{worst:?}"
        );
        // Re-take the last step to its midpoint.
        let mid = s.dense.t0 + 0.5 * s.dense.h;
        let y = s.restep_to(&mut rhs, mid);
        assert!((y[0] - exact(mid)).abs() < 1e-9);
    }
}
