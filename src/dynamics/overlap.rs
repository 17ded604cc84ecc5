//! The overlap of a fin with a magnet section along the track, defined once.
//!
//! One element of a pair rides on the vehicle, the other is fixed to the track. With the vehicle
//! front at x, the vehicle element spans [x − o − l, x − o] (offset o behind the front, length l)
//! and the track element spans [s0, s1]. They overlap on the window
//!
//! ```text
//! lower edge = max(x − o − l, s0),   upper edge = min(x − o, s1),
//! ```
//!
//! when the upper edge lies above the lower one. Each edge either moves with the front (slope 1
//! in x) or sits at an end of the track element (slope 0), so the overlap length is a trapezoid
//! in x with kinks where an edge changes branch: x = s0 + o, s1 + o, s0 + o + l, s1 + o + l.
//! Every overlap in the crate (the integrator's frozen laws and kinks, the heat deposited in the
//! cells of a track fin) is computed from [`Overlap`].

/// Where the two elements of a pair sit along the track.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Overlap {
    /// Offset of the vehicle-mounted element behind the vehicle front, m.
    pub vehicle_offset_m: f64,
    /// Length of the vehicle-mounted element, m.
    pub vehicle_len_m: f64,
    /// Upstream end of the track-mounted element, m.
    pub track_start_m: f64,
    /// Length of the track-mounted element, m.
    pub track_len_m: f64,
}

impl Overlap {
    /// Downstream end of the track-mounted element, m.
    #[inline]
    pub fn track_end_m(&self) -> f64 {
        self.track_start_m + self.track_len_m
    }

    /// The window's lower edge for the front at `x` and its slope in x (1: the vehicle element's
    /// rear end, moving with the front; 0: the track element's upstream end).
    #[inline]
    pub fn lower_edge(&self, x: f64) -> (f64, f64) {
        let rear = x - self.vehicle_offset_m - self.vehicle_len_m;
        if rear > self.track_start_m {
            (rear, 1.0)
        } else {
            (self.track_start_m, 0.0)
        }
    }

    /// The window's upper edge for the front at `x` and its slope in x (1: the vehicle element's
    /// front end; 0: the track element's downstream end).
    #[inline]
    pub fn upper_edge(&self, x: f64) -> (f64, f64) {
        let front = x - self.vehicle_offset_m;
        let end = self.track_end_m();
        if front < end {
            (front, 1.0)
        } else {
            (end, 0.0)
        }
    }

    /// The overlap window [lo, hi] along the track for the front at `x`, m (None: no overlap).
    #[inline]
    pub fn window(&self, x: f64) -> Option<(f64, f64)> {
        let (lo, hi) = (self.lower_edge(x).0, self.upper_edge(x).0);
        (hi > lo).then_some((lo, hi))
    }

    /// Overlap length for the front at `x`, m.
    #[inline]
    pub fn length_m(&self, x: f64) -> f64 {
        (self.upper_edge(x).0 - self.lower_edge(x).0).max(0.0)
    }

    /// The longest overlap, on the plateau of the trapezoid: the shorter element's length, m.
    pub fn full_length_m(&self) -> f64 {
        self.vehicle_len_m.min(self.track_len_m)
    }

    /// Length of the window's part inside [c0, c1] (a cell of a track fin) for the front at `x`, m.
    #[inline]
    pub fn length_within_m(&self, x: f64, c0: f64, c1: f64) -> f64 {
        self.window(x)
            .map_or(0.0, |(lo, hi)| (hi.min(c1) - lo.max(c0)).max(0.0))
    }

    /// The stretch of track the window covers while the front moves over [x_lo, x_hi] (the
    /// window only moves forward with the front), m (None: it never overlaps).
    pub fn swept(&self, x_lo: f64, x_hi: f64) -> Option<(f64, f64)> {
        let (lo, hi) = (self.lower_edge(x_lo).0, self.upper_edge(x_hi).0);
        (hi > lo).then_some((lo, hi))
    }

    /// Front positions where a window edge meets the track position `c0` or `c1`:
    /// [c0 + o, c1 + o, c0 + o + l, c1 + o + l].
    pub fn kinks_at(&self, c0: f64, c1: f64) -> [f64; 4] {
        let (o, l) = (self.vehicle_offset_m, self.vehicle_len_m);
        [c0 + o, c1 + o, c0 + o + l, c1 + o + l]
    }

    /// Front positions where the overlap length has a kink (an edge changes branch).
    pub fn kinks(&self) -> [f64; 4] {
        self.kinks_at(self.track_start_m, self.track_end_m())
    }

    /// The overlap as the linear law α + β·x that holds around `x_mid` (strictly between kinks):
    /// (α, β), or (0, 0) where the elements do not overlap.
    pub fn linear(&self, x_mid: f64) -> (f64, f64) {
        let (lo, dlo) = self.lower_edge(x_mid);
        let (hi, dhi) = self.upper_edge(x_mid);
        if hi - lo <= 0.0 {
            return (0.0, 0.0);
        }
        let beta = dhi - dlo;
        (hi - lo - beta * x_mid, beta)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A 2 m element 1 m behind the front against a 3 m element at [10, 13].
    fn pair() -> Overlap {
        Overlap {
            vehicle_offset_m: 1.0,
            vehicle_len_m: 2.0,
            track_start_m: 10.0,
            track_len_m: 3.0,
        }
    }

    /// The overlap of two segments is a trapezoid in x whose area is the product of the lengths
    /// (the convolution of two indicator functions; common practice), here against a 200 000-point
    /// midpoint quadrature, tolerance 1e-6.
    #[test]
    fn overlap_trapezoid() {
        let p = pair();
        // Element [x-3, x-1] against [10, 13].
        assert_eq!(p.length_m(11.0), 0.0);
        assert_eq!(p.length_m(12.0), 1.0);
        assert_eq!(p.length_m(13.0), 2.0);
        assert_eq!(p.length_m(14.0), 2.0);
        assert_eq!(p.length_m(15.0), 1.0);
        assert_eq!(p.length_m(16.0), 0.0);
        assert_eq!(p.kinks(), [11.0, 14.0, 13.0, 16.0]);
        assert_eq!(p.full_length_m(), p.length_m(13.5));
        assert_eq!(p.window(12.5), Some((10.0, 11.5)));
        assert_eq!(p.window(16.5), None);
        let n = 200_000;
        let (a, b) = (10.0, 18.0);
        let h = (b - a) / n as f64;
        let area: f64 = (0..n)
            .map(|i| p.length_m(a + (i as f64 + 0.5) * h) * h)
            .sum();
        assert!((area - 6.0).abs() < 1e-6, "{area}");
    }

    #[test]
    fn linear_pieces_match() {
        let p = pair();
        for x in [11.5, 13.5, 15.0, 16.5, 20.0, 5.0] {
            let (a, b) = p.linear(x);
            assert!((a + b * x - p.length_m(x)).abs() < 1e-12, "x = {x}");
            assert!(
                (a + b * (x + 0.1) - p.length_m(x + 0.1)).abs() < 1e-12,
                "x = {x}"
            );
        }
    }

    /// Splitting the track element into cells partitions the overlap: the parts inside the
    /// cells add up to the overlap length (additivity of length), exactly up to rounding, 1e-12;
    /// the swept stretch holds every window of the move.
    #[test]
    fn cells_partition_the_window() {
        let p = pair();
        for x in [11.3, 12.0, 13.7, 15.2, 15.99] {
            let parts: f64 = (0..30)
                .map(|k| {
                    let c0 = 10.0 + 0.1 * f64::from(k);
                    p.length_within_m(x, c0, c0 + 0.1)
                })
                .sum();
            assert!((parts - p.length_m(x)).abs() < 1e-12, "x = {x}");
        }
        let (lo, hi) = p.swept(11.5, 15.5).expect("overlaps");
        assert_eq!((lo, hi), (10.0, 13.0));
        for x in [11.5, 12.0, 14.0, 15.5] {
            let (a, b) = p.window(x).expect("overlaps");
            assert!(a >= lo && b <= hi);
        }
        assert_eq!(p.swept(5.0, 11.0), None);
    }
}
