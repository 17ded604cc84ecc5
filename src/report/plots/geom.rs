//! Cutting series into drawable pieces: non-finite points break a line, and every segment is
//! clipped to the plot rectangle so nothing is drawn over the labels or the legend.
//!
//! Segment clipping is the parametric method of Y.-D. Liang and B. A. Barsky, "A new concept and
//! method for line clipping", *ACM Transactions on Graphics* 3(1), 1984, pp. 1–11.

/// An axis-aligned rectangle in axis space (log10 x on a log axis).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Rect {
    pub(crate) u0: f64,
    pub(crate) u1: f64,
    pub(crate) v0: f64,
    pub(crate) v1: f64,
}

impl Rect {
    fn contains(&self, (u, v): (f64, f64)) -> bool {
        u >= self.u0 && u <= self.u1 && v >= self.v0 && v <= self.v1
    }
}

/// Drawable pieces of one series, in axis space.
#[derive(Debug, Clone, Default, PartialEq)]
pub(crate) struct Pieces {
    /// Polylines of two or more points, each inside the rectangle.
    pub(crate) lines: Vec<Vec<(f64, f64)>>,
    /// Isolated points (a run of one point, or a run whose points all coincide) to be marked.
    pub(crate) markers: Vec<(f64, f64)>,
}

/// A point in axis space.
type Point = (f64, f64);

/// Clips the segment `p`–`q` to `r`. Returns the clipped ends and whether the start was kept
/// unchanged (so a polyline may continue through it).
fn clip_segment(p: Point, q: Point, r: &Rect) -> Option<(Point, Point, bool)> {
    let du = q.0 - p.0;
    let dv = q.1 - p.1;
    let mut t0: f64 = 0.0;
    let mut t1: f64 = 1.0;
    // Liang–Barsky: for each edge, p_k t ≤ q_k.
    for (pk, qk) in [
        (-du, p.0 - r.u0),
        (du, r.u1 - p.0),
        (-dv, p.1 - r.v0),
        (dv, r.v1 - p.1),
    ] {
        if pk == 0.0 {
            if qk < 0.0 {
                return None;
            }
        } else {
            let t = qk / pk;
            if pk < 0.0 {
                if t > t1 {
                    return None;
                }
                t0 = t0.max(t);
            } else {
                if t < t0 {
                    return None;
                }
                t1 = t1.min(t);
            }
        }
    }
    if !(t0.is_finite() && t1.is_finite()) || t0 > t1 {
        return None;
    }
    let a = if t0 == 0.0 {
        p
    } else {
        (p.0 + t0 * du, p.1 + t0 * dv)
    };
    let b = if t1 == 1.0 {
        q
    } else {
        (p.0 + t1 * du, p.1 + t1 * dv)
    };
    Some((a, b, t0 == 0.0))
}

/// Splits `points` (axis space; a non-finite coordinate marks a gap) into polylines clipped to
/// `r` and isolated markers.
pub(crate) fn pieces(points: &[(f64, f64)], r: &Rect) -> Pieces {
    let mut out = Pieces::default();
    let mut run: Vec<(f64, f64)> = Vec::new();
    let finite = |p: &(f64, f64)| p.0.is_finite() && p.1.is_finite();
    for p in points.iter().chain(std::iter::once(&(f64::NAN, f64::NAN))) {
        if finite(p) {
            run.push(*p);
        } else if !run.is_empty() {
            add_run(&run, r, &mut out);
            run.clear();
        }
    }
    out
}

fn add_run(run: &[(f64, f64)], r: &Rect, out: &mut Pieces) {
    let first = run[0];
    if run.iter().all(|&p| p == first) {
        if r.contains(first) {
            out.markers.push(first);
        }
        return;
    }
    let mut current: Vec<(f64, f64)> = Vec::new();
    for pair in run.windows(2) {
        let (p, q) = (pair[0], pair[1]);
        match clip_segment(p, q, r) {
            Some((a, b, start_kept)) => {
                if !start_kept || current.is_empty() {
                    flush(&mut current, out);
                    current.push(a);
                }
                current.push(b);
            }
            None => flush(&mut current, out),
        }
    }
    flush(&mut current, out);
}

fn flush(current: &mut Vec<(f64, f64)>, out: &mut Pieces) {
    if current.len() >= 2 {
        out.lines.push(std::mem::take(current));
    } else {
        current.clear();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const UNIT: Rect = Rect {
        u0: 0.0,
        u1: 1.0,
        v0: 0.0,
        v1: 1.0,
    };

    // Expected ends worked by hand from the line equation (exact in binary: halves).
    #[test]
    fn segment_crossing_the_box_is_cut_at_both_edges() {
        let (a, b, kept) = clip_segment((-1.0, 0.5), (2.0, 0.5), &UNIT).expect("crosses the box");
        assert_eq!(a, (0.0, 0.5));
        assert_eq!(b, (1.0, 0.5));
        assert!(!kept);
    }

    #[test]
    fn segment_outside_is_dropped() {
        assert!(clip_segment((-1.0, 2.0), (2.0, 2.0), &UNIT).is_none());
        // Diagonal passing beside the corner: the line u + v = 2.5 misses the unit box.
        assert!(clip_segment((1.5, 1.0), (1.0, 1.5), &UNIT).is_none());
    }

    #[test]
    fn gaps_split_lines_and_lone_points_become_markers() {
        let pts = [
            (0.1, 0.1),
            (0.2, 0.2),
            (f64::NAN, 0.5),
            (0.5, 0.5),
            (f64::INFINITY, 0.3),
            (0.7, 0.7),
            (0.8, 0.8),
        ];
        let p = pieces(&pts, &UNIT);
        assert_eq!(
            p.lines,
            vec![vec![(0.1, 0.1), (0.2, 0.2)], vec![(0.7, 0.7), (0.8, 0.8)]]
        );
        assert_eq!(p.markers, vec![(0.5, 0.5)]);
    }

    #[test]
    fn a_line_leaving_and_reentering_gives_two_pieces() {
        let pts = [(0.25, 0.5), (0.5, 1.5), (0.75, 0.5)];
        let p = pieces(&pts, &UNIT);
        assert_eq!(p.lines.len(), 2);
        assert_eq!(p.lines[0], vec![(0.25, 0.5), (0.375, 1.0)]);
        assert_eq!(p.lines[1], vec![(0.625, 1.0), (0.75, 0.5)]);
    }
}
