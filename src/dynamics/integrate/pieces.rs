//! Piece selection between kinks and freezing the laws on a piece.
//!
//! The kinks of the brake overlaps (see [`crate::dynamics::overlap`]) and of the track profile
//! split the front's path into pieces. On a piece every overlap is linear in x, gravity is on
//! fixed profile pieces and resistance has the sign of the direction of travel.

use super::context::Ctx;
use crate::dynamics::model::ActivePair;
use crate::dynamics::track::{FrozenGravity, TrackModel};

/// The frozen laws of one piece.
#[derive(Clone)]
pub(super) struct Frozen {
    /// (pair index, α, β): overlap = α + β·x.
    pub pairs: Vec<(usize, f64, f64)>,
    pub gravity: FrozenGravity,
    /// +1 or −1: direction of travel, for the sign of resistance.
    pub dir: f64,
}

/// Sorted, de-duplicated kink positions of the front.
pub(super) fn kinks(pairs: &[ActivePair], track: &TrackModel) -> Vec<f64> {
    let mut k: Vec<f64> = pairs.iter().flat_map(|p| p.spec.overlap.kinks()).collect();
    k.extend(track.kinks());
    k.retain(|x| x.is_finite());
    k.sort_by(f64::total_cmp);
    k.dedup_by(|a, b| (*a - *b).abs() < 1e-12);
    k
}

/// The piece [lo, hi] of the kink list holding x, ties broken by the direction of travel.
pub(super) fn piece(kinks: &[f64], x: f64, dir: f64) -> (f64, f64) {
    let idx = if dir >= 0.0 {
        kinks.partition_point(|&k| k <= x)
    } else {
        kinks.partition_point(|&k| k < x)
    };
    let lo = if idx == 0 {
        f64::NEG_INFINITY
    } else {
        kinks[idx - 1]
    };
    let hi = if idx == kinks.len() {
        f64::INFINITY
    } else {
        kinks[idx]
    };
    (lo, hi)
}

/// The laws of the piece [lo, hi] holding the front at `x`, read at a point strictly inside it.
pub(super) fn freeze(ctx: &Ctx, track: &TrackModel, lo: f64, hi: f64, x: f64, dir: f64) -> Frozen {
    let mid = match (lo.is_finite(), hi.is_finite()) {
        (true, true) => 0.5 * (lo + hi),
        (true, false) => lo.max(x) + 1.0,
        (false, true) => hi.min(x) - 1.0,
        (false, false) => x,
    };
    let pairs = ctx
        .pairs
        .iter()
        .enumerate()
        .filter_map(|(i, p)| {
            let (a, b) = p.spec.overlap.linear(mid);
            (a != 0.0 || b != 0.0).then_some((i, a, b))
        })
        .collect();
    Frozen {
        pairs,
        gravity: track.frozen(mid, 1.0),
        dir,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pieces_by_direction() {
        let k = [1.0, 2.0, 3.0];
        assert_eq!(piece(&k, 2.0, 1.0), (2.0, 3.0));
        assert_eq!(piece(&k, 2.0, -1.0), (1.0, 2.0));
        assert_eq!(piece(&k, 0.0, 1.0), (f64::NEG_INFINITY, 1.0));
        assert_eq!(piece(&k, 5.0, 1.0), (3.0, f64::INFINITY));
    }
}
