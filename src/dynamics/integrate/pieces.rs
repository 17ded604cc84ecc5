//! Piece selection between kinks and freezing the laws on a piece.
//!
//! The kinks of the brake overlaps (see [`crate::dynamics::overlap`]) and of the track profile
//! split the front's path into pieces. On a piece every overlap is linear in x, gravity is on
//! fixed profile pieces and resistance has the sign of the direction of travel.

use super::context::Ctx;
use crate::dynamics::model::ActivePair;
use crate::dynamics::track::{FrozenGravity, TrackModel};

/// The frozen laws of one piece.
pub(super) struct Frozen {
    /// (pair index, α, β): overlap = α + β·x.
    pub pairs: Vec<(usize, f64, f64)>,
    pub gravity: FrozenGravity,
    /// +1 or −1: direction of travel, for the sign of resistance.
    pub dir: f64,
    /// Σα and Σβ over the pairs: the total overlap is Σα + Σβ·x.
    pub overlap_sum: (f64, f64),
    /// Per entry of `pairs`: its force per metre of overlap is that of the entry before it (the
    /// same fin and law group, [`Ctx::law_group`], neither a mirror copy), so the right-hand
    /// side evaluates it once for both.
    pub reuse: Vec<bool>,
    /// Mean curvature of the track under the vehicle on this piece, 1/m (constant on a piece).
    pub curvature_1_m: f64,
    /// The entries of `pairs` as runs that share one force per metre: (fin, the pair whose law
    /// gives it, first entry, end of the run). Filled only when the case is plain
    /// ([`Ctx::plain`]: no temperature field and no mirror copy), empty otherwise.
    pub runs: Vec<(usize, usize, usize, usize)>,
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

/// The index of the piece of the kink list holding x, ties broken by the direction of travel:
/// piece i is [kinks[i − 1], kinks[i]] (unbounded at the ends).
pub(super) fn piece_index(kinks: &[f64], x: f64, dir: f64) -> usize {
    if dir >= 0.0 {
        kinks.partition_point(|&k| k <= x)
    } else {
        kinks.partition_point(|&k| k < x)
    }
}

/// The ends [lo, hi] of piece `idx`.
pub(super) fn piece_bounds(kinks: &[f64], idx: usize) -> (f64, f64) {
    let lo = if idx == 0 {
        f64::NEG_INFINITY
    } else {
        kinks[idx - 1]
    };
    let hi = kinks.get(idx).copied().unwrap_or(f64::INFINITY);
    (lo, hi)
}

/// The piece [lo, hi] of the kink list holding x, ties broken by the direction of travel.
pub(super) fn piece(kinks: &[f64], x: f64, dir: f64) -> (f64, f64) {
    piece_bounds(kinks, piece_index(kinks, x, dir))
}

impl Frozen {
    /// No laws yet (a buffer for [`Frozen::refreeze`]).
    pub fn empty(track: &TrackModel) -> Self {
        Self {
            pairs: Vec::new(),
            gravity: track.frozen(0.0, 1.0),
            dir: 1.0,
            overlap_sum: (0.0, 0.0),
            reuse: Vec::new(),
            curvature_1_m: 0.0,
            runs: Vec::new(),
        }
    }

    /// Freezes the laws of the piece [lo, hi] holding the front at `x`, read at a point strictly
    /// inside it, in place (the pair list keeps its allocation from piece to piece).
    pub fn refreeze(&mut self, ctx: &Ctx, track: &TrackModel, lo: f64, hi: f64, x: f64, dir: f64) {
        let mid = match (lo.is_finite(), hi.is_finite()) {
            (true, true) => 0.5 * (lo + hi),
            (true, false) => lo.max(x) + 1.0,
            (false, true) => hi.min(x) - 1.0,
            (false, false) => x,
        };
        self.pairs.clear();
        self.pairs
            .extend(ctx.pairs.iter().enumerate().filter_map(|(i, p)| {
                let (a, b) = p.spec.overlap.linear(mid);
                (a != 0.0 || b != 0.0).then_some((i, a, b))
            }));
        self.reuse.clear();
        self.reuse.push(false);
        self.reuse.extend(self.pairs.windows(2).map(|w| {
            let (p, q) = (w[0].0, w[1].0);
            ctx.law_group[p] == ctx.law_group[q] && !ctx.is_copy[p] && !ctx.is_copy[q]
        }));
        self.reuse.truncate(self.pairs.len());
        self.runs.clear();
        if ctx.plain {
            for (k, (&(p, _, _), &reuse)) in self.pairs.iter().zip(&self.reuse).enumerate() {
                match self.runs.last_mut() {
                    Some(run) if reuse => run.3 = k + 1,
                    _ => self.runs.push((ctx.pairs[p].spec.fin, p, k, k + 1)),
                }
            }
        }
        self.gravity = track.frozen(mid, 1.0);
        self.curvature_1_m = self.gravity.mean_curvature_1_m();
        self.dir = dir;
        self.overlap_sum = self
            .pairs
            .iter()
            .fold((0.0, 0.0), |(a, b), &(_, al, be)| (a + al, b + be));
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
