//! Small numerical building blocks shared by the layers above (the lowest layer: it depends on
//! nothing in the crate).
//!
//! Cubic Hermite interpolation on one interval: the cubic p(t), t ∈ [0, 1], with p(0) = y0,
//! p(1) = y1, p'(0) = d0 and p'(1) = d1, where the end slopes are taken with respect to t (the
//! slope in the interval's own variable times the interval length). It reproduces every cubic
//! exactly and is C1 across intervals that share nodal values and slopes (de Boor, *A Practical
//! Guide to Splines*, 1978, ch. IV). Two equivalent forms are offered, one definition each:
//!
//! - [`CubicHermite`]: the power-basis coefficients p(t) = c0 + c1·t + c2·t² + c3·t³, evaluated
//!   by Horner's rule. For one scalar function evaluated many times (force tables, measured
//!   curves): build once, evaluate in three multiply–adds.
//! - [`HermiteWeights`]: the four cardinal basis functions h00, h10, h01, h11 at one t, for
//!   blending many quantities at the same t (all entries of a state vector between two step ends).

/// Piecewise-linear interpolation through `points` (x increasing), held at the first and last
/// values beyond them; 0 for no points.
pub fn interp_clamped(points: &[(f64, f64)], x: f64) -> f64 {
    let (Some(&(x0, y0)), Some(&(xn, yn))) = (points.first(), points.last()) else {
        return 0.0;
    };
    if x <= x0 {
        return y0;
    }
    if x >= xn {
        return yn;
    }
    let k = points
        .partition_point(|p| p.0 <= x)
        .clamp(1, points.len() - 1);
    let ((xa, ya), (xb, yb)) = (points[k - 1], points[k]);
    if xb > xa {
        ya + (yb - ya) * (x - xa) / (xb - xa)
    } else {
        yb
    }
}

/// A cubic Hermite piece in power-basis form on t ∈ [0, 1].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CubicHermite {
    /// c0 + c1·t + c2·t² + c3·t³.
    coefficients: [f64; 4],
}

impl CubicHermite {
    /// The piece with end values `y0`, `y1` and end slopes `d0`, `d1` with respect to t.
    #[inline]
    pub fn new(y0: f64, y1: f64, d0: f64, d1: f64) -> Self {
        Self {
            coefficients: [
                y0,
                d0,
                3.0 * (y1 - y0) - 2.0 * d0 - d1,
                2.0 * (y0 - y1) + d0 + d1,
            ],
        }
    }

    /// The power-basis coefficients [c0, c1, c2, c3].
    pub fn coefficients(&self) -> [f64; 4] {
        self.coefficients
    }

    /// p(t).
    #[inline(always)]
    pub fn value(&self, t: f64) -> f64 {
        let c = &self.coefficients;
        c[0] + t * (c[1] + t * (c[2] + t * c[3]))
    }

    /// dp/dt at t (divide by the interval length for the slope in the interval's variable).
    #[inline(always)]
    pub fn derivative(&self, t: f64) -> f64 {
        let c = &self.coefficients;
        c[1] + t * (2.0 * c[2] + 3.0 * t * c[3])
    }
}

/// The cubic Hermite basis functions at one t ∈ [0, 1]:
/// p(t) = h00·y0 + h10·d0 + h01·y1 + h11·d1.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HermiteWeights {
    /// [h00, h10, h01, h11].
    weights: [f64; 4],
}

impl HermiteWeights {
    /// The weights at `t` (not clamped; callers keep t in [0, 1]).
    #[inline]
    pub fn at(t: f64) -> Self {
        let (t2, t3) = (t * t, t * t * t);
        Self {
            weights: [
                2.0 * t3 - 3.0 * t2 + 1.0,
                t3 - 2.0 * t2 + t,
                -2.0 * t3 + 3.0 * t2,
                t3 - t2,
            ],
        }
    }

    /// The interpolated value for end values `y0`, `y1` and end slopes `s0`, `s1` in the
    /// interval's own variable over an interval of length `h` (the slopes are scaled by h here).
    #[inline(always)]
    pub fn blend(&self, h: f64, y0: f64, s0: f64, y1: f64, s1: f64) -> f64 {
        let w = &self.weights;
        w[0] * y0 + w[1] * h * s0 + w[2] * y1 + w[3] * h * s1
    }
}

/// `f` over `items` in order, in parallel (rayon) when there are at least two; the first error
/// in item order when any fails. One item runs on the calling thread, so a one-case command does
/// not start the thread pool (its start — reading the CPU quota, spawning a thread per core —
/// costs a small run more than the run itself).
pub fn map_in_parallel<T, R, E, F>(items: &[T], f: F) -> Result<Vec<R>, E>
where
    T: Sync,
    R: Send,
    E: Send,
    F: Fn(&T) -> Result<R, E> + Sync + Send,
{
    map_each_in_parallel(items, f).into_iter().collect()
}

/// `f` over `items` in order, on the rayon pool when there are at least two (one item on the
/// calling thread).
pub fn map_each_in_parallel<T, R, F>(items: &[T], f: F) -> Vec<R>
where
    T: Sync,
    R: Send,
    F: Fn(&T) -> R + Sync + Send,
{
    use rayon::prelude::*;
    if items.len() < 2 {
        items.iter().map(f).collect()
    } else {
        items.par_iter().map(f).collect()
    }
}

/// `a()` and `b()` side by side, their results as a pair: on the rayon pool's work stealing when
/// called from inside it (a sweep's or planner's parallel loop), else with `b` offered to one
/// thread of its own — so a one-case command builds a table's independent parts on both cores
/// without starting the pool. Whoever comes first runs `b`: when `a` is done and the thread has
/// not yet taken `b` (a new thread can take a millisecond to be scheduled on a virtual machine),
/// the caller runs it itself instead of waiting, and the late thread finds nothing to do. If the
/// thread cannot be started, `b` runs after `a` on the caller. A panic in `b` is carried over
/// to the caller.
pub fn join<A, B, RA, RB>(a: A, b: B) -> (RA, RB)
where
    A: FnOnce() -> RA + Send,
    B: FnOnce() -> RB + Send + 'static,
    RA: Send,
    RB: Send + 'static,
{
    use std::panic::{catch_unwind, resume_unwind, AssertUnwindSafe};
    use std::sync::{mpsc, Arc, Mutex};
    if rayon::current_thread_index().is_some() {
        return rayon::join(a, b);
    }
    let task = Arc::new(Mutex::new(Some(b)));
    let offered = Arc::clone(&task);
    let (done, result) = mpsc::sync_channel(1);
    // Detached: the caller never waits for the thread itself, only for a result it has claimed
    // to compute; a thread that claims nothing ends on its own.
    let _ = std::thread::Builder::new().spawn(move || {
        let claimed = offered.lock().ok().and_then(|mut slot| slot.take());
        if let Some(f) = claimed {
            let _ = done.send(catch_unwind(AssertUnwindSafe(f)));
        }
    });
    let ra = a();
    let unclaimed = task.lock().ok().and_then(|mut slot| slot.take());
    let rb = match unclaimed {
        Some(f) => f(),
        None => match result.recv() {
            Ok(Ok(rb)) => rb,
            Ok(Err(payload)) => resume_unwind(payload),
            Err(_) => resume_unwind(Box::new("join: the second task was lost")),
        },
    };
    (ra, rb)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Hermite interpolation is exact for cubics (de Boor, 1978, ch. IV): both forms reproduce
    /// p(t) = 2 − t + 0.5t² + 3t³ on an interval [a, a + h] from its end values and slopes, to
    /// 1e-12 relative, and the power form's derivative matches p'.
    #[test]
    fn both_forms_reproduce_a_cubic() {
        let p = |x: f64| 2.0 - x + 0.5 * x * x + 3.0 * x * x * x;
        let dp = |x: f64| -1.0 + x + 9.0 * x * x;
        let (a, h) = (0.7, 1.9);
        let piece = CubicHermite::new(p(a), p(a + h), dp(a) * h, dp(a + h) * h);
        for i in 0..=20 {
            let t = f64::from(i) / 20.0;
            let x = a + t * h;
            let scale = p(x).abs().max(1.0);
            assert!((piece.value(t) - p(x)).abs() < 1e-12 * scale, "t = {t}");
            assert!((piece.derivative(t) / h - dp(x)).abs() < 1e-12 * dp(x).abs().max(1.0));
            let w = HermiteWeights::at(t);
            let blended = w.blend(h, p(a), dp(a), p(a + h), dp(a + h));
            assert!((blended - p(x)).abs() < 1e-12 * scale, "t = {t}");
        }
    }

    /// The basis functions form a partition of unity in the values (h00 + h01 = 1) and hit the
    /// end conditions exactly (common practice: the defining properties of the cardinal basis).
    #[test]
    fn weights_meet_the_end_conditions() {
        assert_eq!(HermiteWeights::at(0.0).weights, [1.0, 0.0, 0.0, 0.0]);
        assert_eq!(HermiteWeights::at(1.0).weights, [0.0, 0.0, 1.0, 0.0]);
        for t in [0.1, 0.5, 0.93] {
            let w = HermiteWeights::at(t).weights;
            assert!((w[0] + w[2] - 1.0).abs() < 1e-15);
        }
        let c = CubicHermite::new(1.0, 4.0, 0.5, -2.0);
        assert_eq!(c.value(0.0), 1.0);
        assert_eq!(c.value(1.0), 4.0);
        assert_eq!(c.derivative(0.0), 0.5);
        assert_eq!(c.derivative(1.0), -2.0);
    }

    /// Linear interpolation reproduces a straight line between nodes and holds beyond the ends
    /// (definition).
    #[test]
    fn interp_clamped_is_linear_between_nodes_and_held_beyond() {
        let p = [(0.0, 1.0), (2.0, 3.0), (4.0, 3.0), (5.0, 0.0)];
        assert_eq!(interp_clamped(&p, -1.0), 1.0);
        assert_eq!(interp_clamped(&p, 9.0), 0.0);
        assert!((interp_clamped(&p, 1.0) - 2.0).abs() < 1e-15);
        assert!((interp_clamped(&p, 3.0) - 3.0).abs() < 1e-15);
        assert!((interp_clamped(&p, 4.5) - 1.5).abs() < 1e-15);
        assert_eq!(interp_clamped(&p, 2.0), 3.0);
        assert_eq!(interp_clamped(&[], 2.0), 0.0);
        assert_eq!(interp_clamped(&[(1.0, 7.0)], 2.0), 7.0);
    }

    /// Both paths (one item on the caller, many on the pool) keep the order and report an error.
    #[test]
    fn map_in_parallel_keeps_order_and_errors() {
        let square = |x: &u32| if *x == 7 { Err(*x) } else { Ok(x * x) };
        assert_eq!(map_in_parallel(&[3u32], square), Ok(vec![9]));
        assert_eq!(map_in_parallel(&[] as &[u32], square), Ok(vec![]));
        let many: Vec<u32> = (0..100).filter(|&x| x != 7).collect();
        let want: Vec<u32> = many.iter().map(|x| x * x).collect();
        assert_eq!(map_in_parallel(&many, square), Ok(want));
        assert_eq!(map_in_parallel(&[1u32, 7, 2], square), Err(7));
        assert_eq!(map_in_parallel(&[7u32], square), Err(7));
    }

    /// `join` gives both results in order from the caller's thread and from inside the pool
    /// (rayon's join); the second task runs on another thread when that thread takes it first
    /// (here `a` waits until it has), and on the caller when `a` ends first; a panic in the
    /// second task reaches the caller.
    #[test]
    fn join_runs_both_tasks_outside_and_inside_the_pool() {
        use std::sync::atomic::{AtomicBool, Ordering};
        use std::sync::Arc;
        use std::time::{Duration, Instant};
        let caller = std::thread::current().id();
        let started = Arc::new(AtomicBool::new(false));
        let flag = Arc::clone(&started);
        let (a, (b, b_thread)) = join(
            || {
                let t0 = Instant::now();
                while !started.load(Ordering::Acquire) && t0.elapsed() < Duration::from_secs(20) {
                    std::thread::yield_now();
                }
                6 * 7
            },
            move || {
                flag.store(true, Ordering::Release);
                ("b", std::thread::current().id())
            },
        );
        assert_eq!((a, b), (42, "b"));
        assert_ne!(b_thread, caller);
        // An instant `a`: `b` may run on either thread; the results are the same.
        for i in 0..50 {
            assert_eq!(join(|| i, move || i * 2), (i, i * 2));
        }
        let inside = rayon::ThreadPoolBuilder::new()
            .num_threads(2)
            .build()
            .map(|pool| pool.install(|| join(|| 1, || 2)));
        assert_eq!(inside.ok(), Some((1, 2)));
        let caught = std::panic::catch_unwind(|| join(|| 1, || -> i32 { panic!("second task") }));
        assert!(caught.is_err());
    }
}
