//! Event location: the event functions of a piece and the search for the first sign change on
//! the solver's continuous output.

use super::dopri::Dense;
use super::dopri::State;

/// Event functions: an event happens when one goes from > 0 to ≤ 0.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum Event {
    /// The front reached the lower end of the piece.
    PieceLow,
    /// The front reached the upper end of the piece.
    PieceHigh,
    /// The speed changed sign.
    Reversal,
    /// The speed fell below the stall speed inside the zone.
    Stall,
    /// The rear passed the zone end.
    ClearForward,
    /// The front passed back over the zone start.
    ClearBackward,
}

/// Every event, in the order of [`Watch::values`].
pub(super) const EVENTS: [Event; 6] = [
    Event::PieceLow,
    Event::PieceHigh,
    Event::Reversal,
    Event::Stall,
    Event::ClearForward,
    Event::ClearBackward,
];

/// What the event functions of one piece look at.
pub(super) struct Watch {
    /// The piece's lower end (front position), m.
    pub lo: f64,
    /// The piece's upper end, m.
    pub hi: f64,
    /// Direction of travel, ±1.
    pub dir: f64,
    /// Whether the stall event is armed (inside the zone).
    pub stall_active: bool,
    pub stall_speed: f64,
    pub zone_end: f64,
    pub zone_start: f64,
    pub vehicle_len: f64,
}

impl Watch {
    /// The value of event function `e` at state `y`.
    pub fn g<const N: usize>(&self, e: Event, y: &State<N>) -> f64 {
        self.g_of(e, y[0], y[1])
    }

    /// The value of event function `e` with the front at `x` moving at `v`.
    pub fn g_of(&self, e: Event, x: f64, v: f64) -> f64 {
        match e {
            Event::PieceLow => x - self.lo,
            Event::PieceHigh => self.hi - x,
            Event::Reversal => v * self.dir,
            Event::Stall if self.stall_active => v * self.dir - self.stall_speed,
            Event::Stall => 1.0,
            Event::ClearForward => self.zone_end - (x - self.vehicle_len),
            Event::ClearBackward => x - self.zone_start,
        }
    }

    /// Every event function at `y`, in the order of [`EVENTS`].
    pub fn values<const N: usize>(&self, y: &State<N>) -> [f64; 6] {
        let mut g = [0.0; 6];
        for (i, e) in EVENTS.iter().enumerate() {
            g[i] = self.g(*e, y);
        }
        g
    }
}

/// The earliest event whose function crosses from > 0 to ≤ 0 within the accepted step `d`,
/// located on its continuous output to 1e-9 s (or a few ulps of the step end); (step end, None)
/// when none does on the continuous output after all.
pub(super) fn first_event<const N: usize>(d: &Dense<N>, watch: &Watch) -> (f64, Option<Event>) {
    let (a, b) = (d.t0, d.t1());
    let g_at = |tt: f64, e: Event| watch.g_of(e, d.value(0, tt), d.value(1, tt));
    // Position and speed at the step's ends, once for every event.
    let (xa, va) = (d.value(0, a), d.value(1, a));
    let (xb, vb) = (d.value(0, b), d.value(1, b));
    let mut best: Option<(f64, Event)> = None;
    for e in EVENTS {
        let (ga, gb) = (watch.g_of(e, xa, va), watch.g_of(e, xb, vb));
        if ga > 0.0 && gb <= 0.0 {
            let te = locate(
                a,
                b,
                |tt| g_at(tt, e),
                1e-9_f64.max(4.0 * f64::EPSILON * b.abs()),
            );
            if best.is_none_or(|(tb, eb)| comes_first(te, e, tb, eb)) {
                best = Some((te, e));
            }
        }
    }
    match best {
        Some((te, e)) => (te, Some(e)),
        None => (b, None),
    }
}

/// Whether event `e` at `te` comes before event `eb` at `tb`: earlier, or at the same time
/// (within a few location tolerances) and more decisive. A clearing, a stall or a reversal ends
/// or turns the run; a piece end that coincides with one (a profile point exactly at the
/// clearing position) must not hide it, since the next piece starts with its function already
/// at or below zero and would never see it cross.
fn comes_first(te: f64, e: Event, tb: f64, eb: Event) -> bool {
    const TIE_S: f64 = 4e-9;
    let rank = |e: Event| match e {
        Event::ClearForward | Event::ClearBackward => 0,
        Event::Stall => 1,
        Event::Reversal => 2,
        Event::PieceLow | Event::PieceHigh => 3,
    };
    if (te - tb).abs() <= TIE_S {
        rank(e) < rank(eb)
    } else {
        te < tb
    }
}

/// Finds t in [a, b] where g crosses from > 0 to ≤ 0, to `tol` seconds (bisection with a
/// secant guess: the Illinois variant of regula falsi, Dowell & Jarratt, BIT 11, 1971).
pub(super) fn locate(mut a: f64, mut b: f64, g: impl Fn(f64) -> f64, tol: f64) -> f64 {
    let (mut ga, mut gb) = (g(a), g(b));
    let mut side = 0;
    for _ in 0..200 {
        if b - a <= tol {
            break;
        }
        let mut c = if ga.is_finite() && gb.is_finite() && ga != gb {
            b - gb * (b - a) / (gb - ga)
        } else {
            0.5 * (a + b)
        };
        if !(c > a && c < b) {
            c = 0.5 * (a + b);
        }
        let gc = g(c);
        if gc > 0.0 {
            a = c;
            ga = gc;
            if side == -1 {
                gb *= 0.5;
            }
            side = -1;
        } else {
            b = c;
            gb = gc;
            if side == 1 {
                ga *= 0.5;
            }
            side = 1;
        }
    }
    b
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn locate_finds_a_root() {
        let t = locate(0.0, 2.0, |t| 1.0 - t * t, 1e-12);
        assert!((t - 1.0).abs() < 1e-11);
    }
}
