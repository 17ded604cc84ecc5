//! The integrator's dense output of a run, for callers that need the motion between samples
//! (the heat deposited along a track fin): per accepted step the continuous extensions of the
//! position and the speed.
//!
//! Each is the Dormand–Prince 5(4) quartic continuous extension of the step (Hairer, Nørsett &
//! Wanner, Solving Ordinary Differential Equations I, 1993, §II.6), written in the power basis of
//! θ = (t − t0)/h ∈ [0, 1]. Steps belong to pieces (between force kinks and events): within one
//! piece the direction of travel does not change, so the position is monotone in time there.

/// One accepted step of a run, or the part of it up to the event that ended its piece.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PathStep {
    /// Step start, s.
    pub t0_s: f64,
    /// Step length, s.
    pub h_s: f64,
    /// The step is used for θ ∈ [0, θ_end] (1 unless an event cut it short).
    pub theta_end: f64,
    /// Front position x(θ) = Σ c_k θ^k, m.
    pub position_m: [f64; 5],
    /// Speed v(θ) = Σ c_k θ^k, m/s.
    pub speed_m_s: [f64; 5],
    /// Index of the piece the step belongs to (ascending through the run).
    pub piece: u32,
}

/// p(θ) for power-basis coefficients (Horner's rule).
#[inline]
pub fn poly_value(c: &[f64; 5], th: f64) -> f64 {
    c[0] + th * (c[1] + th * (c[2] + th * (c[3] + th * c[4])))
}

/// dp/dθ for power-basis coefficients.
#[inline]
pub fn poly_slope(c: &[f64; 5], th: f64) -> f64 {
    c[1] + th * (2.0 * c[2] + th * (3.0 * c[3] + th * 4.0 * c[4]))
}

impl PathStep {
    /// Front position at θ, m.
    #[inline]
    pub fn position_at(&self, th: f64) -> f64 {
        poly_value(&self.position_m, th)
    }

    /// Speed at θ, m/s.
    #[inline]
    pub fn speed_at(&self, th: f64) -> f64 {
        poly_value(&self.speed_m_s, th)
    }

    /// Position where the step's used part starts and ends, m.
    pub fn span_m(&self) -> (f64, f64) {
        (self.position_m[0], self.position_at(self.theta_end))
    }

    /// The θ ∈ [0, θ_end] where the front is at `x_m` (the position is monotone over the step):
    /// Newton's method on the quartic from the linear guess, kept inside the bracket.
    pub fn theta_at_position(&self, x_m: f64) -> f64 {
        let (x0, x1) = self.span_m();
        if x1 == x0 {
            return 0.0;
        }
        let (mut lo, mut hi) = (0.0, self.theta_end);
        let increasing = x1 > x0;
        let mut th = (((x_m - x0) / (x1 - x0)) * self.theta_end).clamp(lo, hi);
        for _ in 0..40 {
            let r = self.position_at(th) - x_m;
            if r == 0.0 {
                return th;
            }
            if (r > 0.0) == increasing {
                hi = th;
            } else {
                lo = th;
            }
            let d = poly_slope(&self.position_m, th);
            let mut next = th - r / d;
            if !(next > lo && next < hi) {
                next = 0.5 * (lo + hi);
            }
            // 1e-13 of a step: far below the integrator's own error in the position.
            if (next - th).abs() <= 1e-13 || hi - lo <= 1e-13 {
                return next;
            }
            th = next;
        }
        th
    }
}

/// Degree of a power-basis polynomial (highest non-zero coefficient; 0 for a constant).
fn degree(c: &[f64; 5]) -> usize {
    (0..5).rev().find(|&k| c[k] != 0.0).unwrap_or(0)
}

/// The derivative's power-basis coefficients.
fn derivative(c: &[f64; 5]) -> [f64; 5] {
    [c[1], 2.0 * c[2], 3.0 * c[3], 4.0 * c[4], 0.0]
}

/// Roots of p strictly inside (lo, hi), ascending, into `out`; returns how many. The roots of
/// p′ split [lo, hi] into pieces on which p is monotone; each piece with a sign change holds one
/// root, found by bisection to rounding.
fn roots_inside(c: &[f64; 5], lo: f64, hi: f64, out: &mut [f64; 4]) -> usize {
    let deg = degree(c);
    if deg == 0 || hi.is_nan() || lo.is_nan() || hi <= lo {
        return 0;
    }
    if deg == 1 {
        let r = -c[0] / c[1];
        if r > lo && r < hi {
            out[0] = r;
            return 1;
        }
        return 0;
    }
    let mut crit = [0.0; 4];
    let nc = roots_inside(&derivative(c), lo, hi, &mut crit);
    let mut n = 0;
    let mut a = lo;
    for (i, &b) in crit[..nc].iter().chain(std::iter::once(&hi)).enumerate() {
        let (pa, pb) = (poly_value(c, a), poly_value(c, b));
        if i > 0 && pa == 0.0 && n < 4 {
            out[n] = a;
            n += 1;
        } else if pa * pb < 0.0 && n < 4 {
            let (mut l, mut r, mut pl) = (a, b, pa);
            for _ in 0..200 {
                let m = 0.5 * (l + r);
                if m <= l || m >= r {
                    break;
                }
                let pm = poly_value(c, m);
                if (pm < 0.0) == (pl < 0.0) {
                    l = m;
                    pl = pm;
                } else {
                    r = m;
                }
            }
            out[n] = 0.5 * (l + r);
            n += 1;
        }
        a = b;
    }
    n
}

/// Whether p (degree ≤ 3 in the first four coefficients, as the derivative of a quartic) keeps
/// one strict sign on [lo, hi] with a margin far above the rounding of its evaluation: all
/// Bernstein coefficients of p on [lo, hi] of one sign (p lies in their convex hull; Farouki &
/// Rajan, "On the numerical condition of polynomials in Bernstein form", 1987), each at least
/// 1e-9 of Σ|c_k|·max(1, |θ|)^k away from zero. Then p has no root there, and
/// [`roots_inside`] would find none: a shortcut with the same answer.
fn keeps_sign(c: &[f64; 5], lo: f64, hi: f64) -> bool {
    if c[4] != 0.0 || !lo.is_finite() || !hi.is_finite() || hi <= lo {
        return false;
    }
    let w = hi - lo;
    // p(lo + w·s) = Σ a_k s^k: the Taylor coefficients at lo, scaled by w^k.
    let a0 = c[0] + lo * (c[1] + lo * (c[2] + lo * c[3]));
    let a1 = w * (c[1] + lo * (2.0 * c[2] + lo * 3.0 * c[3]));
    let a2 = w * w * (c[2] + lo * 3.0 * c[3]);
    let a3 = w * w * w * c[3];
    // Bernstein coefficients of degree 3 from the power basis: b_i = Σ_k C(i,k)/C(3,k) a_k.
    let b = [
        a0,
        a0 + a1 / 3.0,
        a0 + 2.0 * a1 / 3.0 + a2 / 3.0,
        a0 + a1 + a2 + a3,
    ];
    let r = lo.abs().max(hi.abs()).max(1.0);
    let scale = c[0].abs() + r * (c[1].abs() + r * (c[2].abs() + r * c[3].abs()));
    let margin = 1e-9 * scale;
    b.iter().all(|&x| x > margin) || b.iter().all(|&x| x < -margin)
}

/// The smallest and the largest value of the polynomial p (degree ≤ 4) on [lo, hi], each with
/// its θ: ((θ_min, p_min), (θ_max, p_max)). Candidates are the ends and the roots of p′.
pub fn poly_extrema(c: &[f64; 5], lo: f64, hi: f64) -> ((f64, f64), (f64, f64)) {
    let p_lo = poly_value(c, lo);
    let mut min = (lo, p_lo);
    let mut max = (lo, p_lo);
    let mut crit = [0.0; 4];
    let slope = derivative(c);
    let n = if keeps_sign(&slope, lo, hi) {
        0
    } else {
        roots_inside(&slope, lo, hi, &mut crit)
    };
    for &th in crit[..n].iter().chain(std::iter::once(&hi)) {
        let p = poly_value(c, th);
        if p < min.1 {
            min = (th, p);
        }
        if p > max.1 {
            max = (th, p);
        }
    }
    (min, max)
}

/// Speeds along one piece of a run by position: the piece's steps (in order; the position is
/// monotone over a piece) with their end positions, and the step the last query found, since
/// queries come in nearby order.
pub struct PieceSpeeds<'a> {
    steps: &'a [PathStep],
    /// Position at the end of each step's used part, m.
    ends: Vec<f64>,
    forward: bool,
    last: usize,
}

impl<'a> PieceSpeeds<'a> {
    /// The lookup for the steps of one piece.
    pub fn new(steps: &'a [PathStep]) -> Self {
        let ends: Vec<f64> = steps.iter().map(|s| s.span_m().1).collect();
        let forward = match (steps.first(), ends.last()) {
            (Some(f), Some(&e)) => e >= f.span_m().0,
            _ => true,
        };
        Self {
            steps,
            ends,
            forward,
            last: 0,
        }
    }

    /// The positions the piece starts and ends at, m.
    pub fn span_m(&self) -> Option<(f64, f64)> {
        Some((self.steps.first()?.span_m().0, *self.ends.last()?))
    }

    /// The speed where the front passes `x_m`, m/s (outside the piece's span: at the nearer
    /// end): the step holding x, found by walking from the last one, then the θ there by
    /// [`PathStep::theta_at_position`].
    pub fn speed_at(&mut self, x_m: f64) -> f64 {
        let n = self.steps.len();
        if n == 0 {
            return 0.0;
        }
        // Along the direction of travel: is x beyond the end of step i?
        let beyond = |i: usize| {
            if self.forward {
                self.ends[i] < x_m
            } else {
                self.ends[i] > x_m
            }
        };
        let mut i = self.last.min(n - 1);
        while i + 1 < n && beyond(i) {
            i += 1;
        }
        while i > 0 && !beyond(i - 1) {
            i -= 1;
        }
        self.last = i;
        let step = &self.steps[i];
        step.speed_at(step.theta_at_position(x_m))
    }
}

/// The runs of consecutive steps that belong to one piece, in order.
pub fn pieces(steps: &[PathStep]) -> impl Iterator<Item = &[PathStep]> + '_ {
    steps.chunk_by(|a, b| a.piece == b.piece)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Extremes of p(θ) = (θ − 0.3)(θ − 0.6)(θ − 0.9)·θ on [0, 1] against a 1 000 001-point
    /// scan (brute force), to 1e-12 in value; and of a cubic with its maximum at an end.
    #[test]
    fn extrema_of_a_quartic() {
        // Expanded: θ⁴ − 1.8θ³ + 0.99θ² − 0.162θ.
        let c = [0.0, -0.162, 0.99, -1.8, 1.0];
        let ((_, pmin), (_, pmax)) = poly_extrema(&c, 0.0, 1.0);
        let (mut smin, mut smax) = (f64::INFINITY, f64::NEG_INFINITY);
        for i in 0..=1_000_000 {
            let p = poly_value(&c, f64::from(i) * 1e-6);
            smin = smin.min(p);
            smax = smax.max(p);
        }
        assert!(
            (pmin - smin).abs() < 1e-12 && pmin <= smin + 1e-15,
            "{pmin} vs {smin}"
        );
        assert!((pmax - smax).abs() < 1e-12, "{pmax} vs {smax}");
        // A monotone cubic on [0.2, 0.7]: the extremes are the ends.
        let m = [1.0, 2.0, 0.0, 1.0, 0.0];
        let ((tmin, _), (tmax, _)) = poly_extrema(&m, 0.2, 0.7);
        assert_eq!((tmin, tmax), (0.2, 0.7));
    }

    /// The sign shortcut of [`poly_extrema`] gives the extremes of the full search bit for bit:
    /// on 20 000 random cubics and intervals (a fixed linear congruential sequence, Knuth's
    /// MMIX constants), whenever [`keeps_sign`] holds, [`roots_inside`] finds no root either;
    /// and it never holds for a cubic with a root inside (a sign change between the ends).
    #[test]
    fn sign_shortcut_agrees_with_the_root_search() {
        let mut state = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = || {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            (state >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
        };
        let (mut shortcuts, mut searched) = (0, 0);
        for _ in 0..20_000 {
            let c = [next(), next(), next() * 0.5, next() * 0.2, 0.0];
            let lo = 0.5 * (next() + 1.0) * 0.5;
            let hi = lo + 0.5 * (next() + 1.0);
            let mut crit = [0.0; 4];
            let n = roots_inside(&c, lo, hi, &mut crit);
            if keeps_sign(&c, lo, hi) {
                shortcuts += 1;
                assert_eq!(n, 0, "{c:?} on [{lo}, {hi}]");
            } else {
                searched += 1;
            }
            if poly_value(&c, lo) * poly_value(&c, hi) < 0.0 {
                assert!(!keeps_sign(&c, lo, hi), "{c:?} on [{lo}, {hi}]");
            }
        }
        assert!(
            shortcuts > 1000 && searched > 1000,
            "{shortcuts} {searched}"
        );
        // A quartic term or an empty interval: no shortcut.
        assert!(!keeps_sign(&[1.0, 0.0, 0.0, 0.0, 1.0], 0.0, 1.0));
        assert!(!keeps_sign(&[1.0, 0.0, 0.0, 0.0, 0.0], 1.0, 1.0));
    }

    /// The inverse of a monotone quartic is found to rounding: x(θ) = 1 + 2θ + 0.3θ² − 0.1θ³ +
    /// 0.02θ⁴ at 11 points (common practice: Newton's method on a bracketed monotone root).
    #[test]
    fn position_inverts() {
        let step = PathStep {
            t0_s: 0.0,
            h_s: 0.01,
            theta_end: 0.8,
            position_m: [1.0, 2.0, 0.3, -0.1, 0.02],
            speed_m_s: [0.0; 5],
            piece: 0,
        };
        for i in 0..=10 {
            let th = 0.08 * f64::from(i);
            let x = step.position_at(th);
            assert!((step.theta_at_position(x) - th).abs() < 1e-13, "θ = {th}");
        }
        // Decreasing positions (travel backwards).
        let back = PathStep {
            position_m: [1.0, -2.0, -0.3, 0.1, -0.02],
            ..step
        };
        for th in [0.0, 0.33, 0.8] {
            let x = back.position_at(th);
            assert!((back.theta_at_position(x) - th).abs() < 1e-13, "θ = {th}");
        }
    }
}
