//! The lift pass: the vehicle hauled back through the brake after a dispatch (a tower's gondola
//! carrying its magnets up through the fins), at a constant speed or along a speed profile
//! v(x) of the front position (`duty.lift`).
//!
//! At lift speed v the drag of a pair is f(v, T)·L(x), L the overlap for the front at x, so
//! the lift must supply F(x) = Σ f(v(x))·L(x) and the power F·v. All the work goes into the
//! fins (first law): a pair deposits ∫ f(v(x))·|window(x) ∩ cell| dx in a cell of a track fin and
//! ∫ f(v(x))·L(x) dx in a vehicle fin. At constant speed these are closed forms (every point of
//! one element is covered while the front travels the other element's length): f·l_vehicle·
//! |cell ∩ track element| and f·l_vehicle·l_track. Along a profile the integrand is smooth
//! between the window's kinks (`Overlap::kinks_at`) and the profile's points, so an 8-point
//! Gauss–Legendre rule on each piece between them is accurate to rounding for the piecewise
//! linear v(x) (checked in the tests against the closed form and against a fine trapezoid rule
//! of the drag). The fins are taken at their temperature before the lift (the lift's own heat
//! does not feed back), and the heat is applied at once: the lift is slow beside the spreading it
//! would allow, which keeps the peak conservative.
//!
//! The magnets face the fins for the lift's time in the brake as well, which the magnets'
//! warming estimate adds to the pass's time in the zone.

use super::pass::{deposit_weights, FinCapacity, FinState};
use super::ThermalError;
use crate::dynamics::model::{active_pairs, ActivePair};
use crate::dynamics::BrakeTables;
use crate::physics::quadrature::gauss_legendre;
use crate::scenario::{Case, LiftSpeed, Scenario};

/// Gauss–Legendre points on each smooth piece of a lift integral.
const LIFT_GAUSS_POINTS: usize = 8;

/// Points per piece on which a profile lift's peak drag and power are sought (besides the
/// pieces' ends).
const LIFT_PEAK_POINTS: usize = 16;

/// What one lift pass does.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct LiftPass {
    /// Lowest lift speed over the brake, m/s.
    pub min_speed_m_s: f64,
    /// Highest lift speed over the brake, m/s.
    pub max_speed_m_s: f64,
    /// Largest drag the lift must overcome, N.
    pub peak_drag_n: f64,
    /// Largest power the lift must supply for the brake, W.
    pub peak_power_w: f64,
    /// Heat deposited in the fins (the work the lift does against the brake), J.
    pub energy_j: f64,
    /// Time some pair overlaps during the lift, s.
    pub time_in_brake_s: f64,
}

/// The drag of the pairs for the front at `x_m`, N (|f| at the given temperature per pair).
pub fn drag_n(pairs: &[(&ActivePair, f64)], speed_m_s: f64, x_m: f64) -> f64 {
    pairs
        .iter()
        .map(|(p, t)| p.force_per_m_n(speed_m_s, *t).abs() * p.spec.overlap.length_m(x_m))
        .sum()
}

/// Heat a pair deposits over a whole lift at constant speed in the track stretch [c0, c1], J
/// (f in N/m).
pub fn pair_heat_j(pair: &ActivePair, force_per_m_n: f64, c0: f64, c1: f64) -> f64 {
    let o = &pair.spec.overlap;
    let inside = (c1.min(o.track_end_m()) - c0.max(o.track_start_m)).max(0.0);
    force_per_m_n.abs() * o.vehicle_len_m * inside
}

/// ∫ g over [lo, hi] split at `breaks` (sorted or not), with an 8-point Gauss–Legendre rule on
/// each piece.
fn integrate_pieces(lo: f64, hi: f64, breaks: &[f64], g: impl Fn(f64) -> f64) -> f64 {
    let rule = gauss_legendre(LIFT_GAUSS_POINTS);
    pieces(lo, hi, breaks)
        .map(|(a, b)| {
            let (m, h) = (0.5 * (a + b), 0.5 * (b - a));
            rule.iter().map(|(x, w)| w * g(m + h * x)).sum::<f64>() * h
        })
        .sum()
}

/// The pieces of [lo, hi] between the `breaks` inside it.
fn pieces(lo: f64, hi: f64, breaks: &[f64]) -> impl Iterator<Item = (f64, f64)> {
    let mut pts: Vec<f64> = std::iter::once(lo)
        .chain(breaks.iter().copied().filter(|b| *b > lo && *b < hi))
        .chain(std::iter::once(hi))
        .collect();
    pts.sort_by(f64::total_cmp);
    pts.dedup();
    let pairs: Vec<(f64, f64)> = pts.windows(2).map(|w| (w[0], w[1])).collect();
    pairs.into_iter().filter(|(a, b)| b > a)
}

/// The profile's positions (none for a constant speed).
fn profile_breaks(speed: &LiftSpeed) -> Vec<f64> {
    match speed {
        LiftSpeed::Constant(_) => Vec::new(),
        LiftSpeed::Profile(p) => p.iter().map(|q| q.0).collect(),
    }
}

/// Heat a pair with force law `f(v)` (N/m) deposits over a whole lift along `speed` in the
/// track stretch [c0, c1] (infinite bounds: the whole pair), J.
fn pair_heat_along_j(
    pair: &ActivePair,
    speed: &LiftSpeed,
    f: &dyn Fn(f64) -> f64,
    c0: f64,
    c1: f64,
) -> f64 {
    if let LiftSpeed::Constant(v) = speed {
        return pair_heat_j(pair, f(*v), c0, c1);
    }
    let o = &pair.spec.overlap;
    let (c0, c1) = (c0.max(o.track_start_m), c1.min(o.track_end_m()));
    if c1 <= c0 {
        return 0.0;
    }
    let k = o.kinks_at(c0, c1);
    let mut breaks = profile_breaks(speed);
    breaks.extend(k);
    breaks.extend(o.kinks());
    let (lo, hi) = (k[0], k[3]);
    integrate_pieces(lo, hi, &breaks, |x| {
        f(speed.at(x)).abs() * o.length_within_m(x, c0, c1)
    })
}

/// The front positions a lift passes with some pair overlapping: [first kink, last kink].
fn travel(pairs: &[(&ActivePair, f64)]) -> Option<(f64, f64)> {
    let (lo, hi) = pairs
        .iter()
        .flat_map(|(p, _)| p.spec.overlap.kinks())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| {
            (a.min(x), b.max(x))
        });
    (hi > lo).then_some((lo, hi))
}

/// Peak drag and power over the travel, N and W. F(x) is piecewise linear at constant speed
/// with breaks at the pairs' kinks, so its largest value is at one of them; along a profile the
/// pieces between kinks and profile points are also searched at [`LIFT_PEAK_POINTS`] points.
pub fn peak_drag_and_power(pairs: &[(&ActivePair, f64)], speed: &LiftSpeed) -> (f64, f64) {
    let Some((lo, hi)) = travel(pairs) else {
        return (0.0, 0.0);
    };
    let mut breaks = profile_breaks(speed);
    breaks.extend(pairs.iter().flat_map(|(p, _)| p.spec.overlap.kinks()));
    let inner = match speed {
        LiftSpeed::Constant(_) => 0,
        LiftSpeed::Profile(_) => LIFT_PEAK_POINTS,
    };
    let mut peak = (0.0f64, 0.0f64);
    for (a, b) in pieces(lo, hi, &breaks) {
        for i in 0..=inner + 1 {
            let x = a + (b - a) * i as f64 / (inner + 1) as f64;
            let v = speed.at(x);
            let d = drag_n(pairs, v, x);
            peak = (peak.0.max(d), peak.1.max(d * v));
        }
    }
    peak
}

/// Runs a lift along `speed` after a pass: the fins' heat is added to `states` (track fins cell
/// by cell, vehicle fins across the height by the pass's loss distribution, at once). The force
/// law reads each fin's mean temperature before the lift.
pub fn apply_lift(
    scenario: &Scenario,
    tables: &BrakeTables,
    case: &Case,
    states: &mut [FinState],
    speed: &LiftSpeed,
    caps: &[FinCapacity],
) -> Result<LiftPass, ThermalError> {
    let speeds: Vec<f64> = match speed {
        LiftSpeed::Constant(v) => vec![*v],
        LiftSpeed::Profile(p) => p.iter().map(|q| q.1).collect(),
    };
    if speeds.is_empty() || speeds.iter().any(|v| !(v.is_finite() && *v > 0.0)) {
        return Err(ThermalError::Input(format!(
            "lift speeds {speeds:?} m/s: must be positive"
        )));
    }
    let pairs = active_pairs(scenario, tables, case);
    let with_t: Vec<(&ActivePair, f64)> = pairs
        .iter()
        .map(|p| {
            (
                p,
                states
                    .get(p.spec.fin)
                    .map_or(case.fin_temp_c, FinState::mean_c),
            )
        })
        .collect();
    let (peak_drag_n, peak_power_w) = peak_drag_and_power(&with_t, speed);
    let (lo, hi) = travel(&with_t).unwrap_or((0.0, 0.0));
    // v is linear on each piece between profile points: ∫ dx/v = Δx·ln(v1/v0)/(v1 − v0) exactly.
    let time_in_brake_s: f64 = pieces(lo, hi, &profile_breaks(speed))
        .map(|(a, b)| {
            let (v0, v1) = (speed.at(a), speed.at(b));
            if (v1 - v0).abs() <= 1e-12 * v0 {
                (b - a) / v0
            } else {
                (b - a) * (v1 / v0).ln() / (v1 - v0)
            }
        })
        .sum();
    let speeds_over: Vec<f64> = std::iter::once(speed.at(lo))
        .chain(std::iter::once(speed.at(hi)))
        .chain(match speed {
            LiftSpeed::Constant(_) => Vec::new(),
            LiftSpeed::Profile(p) => p
                .iter()
                .filter(|q| q.0 > lo && q.0 < hi)
                .map(|q| q.1)
                .collect(),
        })
        .collect();
    let mut energy_j = 0.0;
    let states_len = states.len();
    for (i, state) in states.iter_mut().enumerate() {
        let mine: Vec<(&ActivePair, f64)> = with_t
            .iter()
            .filter(|(p, _)| p.spec.fin == i)
            .copied()
            .collect();
        if mine.is_empty() {
            continue;
        }
        let heat_in = |c0: f64, c1: f64| -> f64 {
            mine.iter()
                .map(|(p, t)| pair_heat_along_j(p, speed, &|v| p.force_per_m_n(v, *t), c0, c1))
                .sum()
        };
        let Some(cap) = caps.get(i) else {
            return Err(ThermalError::Input(format!(
                "{} fin capacities for {} fins",
                caps.len(),
                states_len
            )));
        };
        match state {
            FinState::Height(profile) => {
                let e = heat_in(f64::NEG_INFINITY, f64::INFINITY);
                let weights = deposit_weights(profile, cap);
                let n = profile.temps_c.len() as f64;
                for (t, w) in profile.temps_c.iter_mut().zip(&weights) {
                    *t += w * n * e / cap.whole_j_k;
                }
                energy_j += e;
            }
            FinState::Field(field) => {
                let len_m = scenario.fins[i].length_m;
                for (k, t) in field.temps_c.iter_mut().enumerate() {
                    let c0 = k as f64 * field.cell_m;
                    let c1 = len_m.min(c0 + field.cell_m);
                    let e = heat_in(field.start_m + c0, field.start_m + c1);
                    *t += e / (cap.per_m_j_m_k * (c1 - c0).max(1e-12));
                    energy_j += e;
                }
            }
        }
    }
    Ok(LiftPass {
        min_speed_m_s: speeds_over.iter().copied().fold(f64::INFINITY, f64::min),
        max_speed_m_s: speeds_over.iter().copied().fold(0.0, f64::max),
        peak_drag_n,
        peak_power_w,
        energy_j,
        time_in_brake_s,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dynamics::BrakeTables;
    use crate::thermal::pass::{fin_capacities, fin_capacity};

    #[test]
    fn drag_times_travel_is_the_deposited_heat() {
        // Tower demo: trapezoid rule on a 0.5 mm grid of ∫ F dx over the whole travel vs the
        // closed-form heat per pair (first law); tolerance 1e-6 relative.
        let (s, tables) = tower();
        let pairs = crate::dynamics::model::active_pairs(&s, &tables, &s.cases[0]);
        let with_t: Vec<(&ActivePair, f64)> = pairs.iter().map(|p| (p, 40.0)).collect();
        let v = 1.0;
        let heat: f64 = pairs
            .iter()
            .map(|p| {
                pair_heat_j(
                    p,
                    p.force_per_m_n(v, 40.0),
                    f64::NEG_INFINITY,
                    f64::INFINITY,
                )
            })
            .sum();
        let (lo, hi) = pairs
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
                let k = p.spec.overlap.kinks();
                let (kl, kh) = k.iter().fold((a, b), |(x, y), &z| (x.min(z), y.max(z)));
                (kl, kh)
            });
        let n = ((hi - lo) / 5e-4).ceil() as usize;
        let dx = (hi - lo) / n as f64;
        let work: f64 = (0..n)
            .map(|i| {
                let x = lo + i as f64 * dx;
                0.5 * (drag_n(&with_t, v, x) + drag_n(&with_t, v, x + dx)) * dx
            })
            .sum();
        assert!(heat > 0.0);
        assert!((work / heat - 1.0).abs() < 1e-6, "{work} vs {heat}");
        let (peak, power) = peak_drag_and_power(&with_t, &LiftSpeed::Constant(v));
        assert!(peak * (hi - lo) >= work && peak > 0.0);
        assert!((power - peak * v).abs() <= 1e-12 * power);
        // Applied to the fins: Σ ρ·c_p·t·h_e·ΔT·len over the cells is the same heat (first law).
        let mut states = crate::thermal::pass::uniform_states(&s, 40.0, 0.05);
        let lift = apply_lift(
            &s,
            &tables,
            &s.cases[0],
            &mut states,
            &LiftSpeed::Constant(v),
            &fin_capacities(&s, &tables).unwrap(),
        )
        .unwrap();
        assert!((lift.energy_j / heat - 1.0).abs() < 1e-9);
        assert!((lift.time_in_brake_s - (hi - lo) / v).abs() < 1e-9 * lift.time_in_brake_s);
        assert_eq!((lift.min_speed_m_s, lift.max_speed_m_s), (v, v));
        let stored = stored_j(&s, &tables, &states, 40.0);
        assert!((stored / heat - 1.0).abs() < 1e-9, "{stored} vs {heat}");
    }

    /// The tower demo with its fins at 40 °C: the tables, the pairs and the travel.
    fn tower() -> (Scenario, BrakeTables) {
        let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("scenarios/tower-catch-brake.yaml");
        let s = crate::scenario::load(&p).unwrap();
        let tables = BrakeTables::build(&s).unwrap();
        (s, tables)
    }

    /// Heat stored in the fins above a uniform `t0`, J (Σ ρ·c_p·volume·ΔT).
    fn stored_j(s: &Scenario, tables: &BrakeTables, states: &[FinState], t0: f64) -> f64 {
        states
            .iter()
            .enumerate()
            .map(|(i, st)| {
                let cap = fin_capacity(&s.fins[i], i, tables).unwrap();
                match st {
                    FinState::Field(f) => f
                        .temps_c
                        .iter()
                        .enumerate()
                        .map(|(k, t)| {
                            let c0 = k as f64 * f.cell_m;
                            let len = s.fins[i].length_m.min(c0 + f.cell_m) - c0;
                            cap.per_m_j_m_k * (t - t0) * len
                        })
                        .sum::<f64>(),
                    FinState::Height(p) => cap.whole_j_k * (p.mean_c() - t0),
                }
            })
            .sum()
    }

    /// A profile of equal speeds is the constant lift: the Gauss pieces reproduce the closed
    /// form cell by cell to 1e-9 (the integrand is piecewise linear in x there, which an 8-point
    /// rule integrates exactly).
    #[test]
    fn flat_profile_is_the_constant_lift() {
        let (s, tables) = tower();
        let v = 1.3;
        let mut a = crate::thermal::pass::uniform_states(&s, 40.0, 0.05);
        let mut b = a.clone();
        let flat = LiftSpeed::Profile(vec![(-50.0, v), (3.0, v), (60.0, v)]);
        let caps = fin_capacities(&s, &tables).unwrap();
        let la = apply_lift(
            &s,
            &tables,
            &s.cases[0],
            &mut a,
            &LiftSpeed::Constant(v),
            &caps,
        )
        .unwrap();
        let lb = apply_lift(&s, &tables, &s.cases[0], &mut b, &flat, &caps).unwrap();
        assert!((la.energy_j / lb.energy_j - 1.0).abs() < 1e-9);
        assert!((la.peak_drag_n / lb.peak_drag_n - 1.0).abs() < 1e-9);
        assert!((la.time_in_brake_s / lb.time_in_brake_s - 1.0).abs() < 1e-9);
        for (x, y) in a.iter().zip(&b) {
            if let (FinState::Field(x), FinState::Field(y)) = (x, y) {
                for (tx, ty) in x.temps_c.iter().zip(&y.temps_c) {
                    assert!((tx - ty).abs() < 1e-9 * (tx - 40.0).abs().max(1e-6));
                }
            }
        }
    }

    /// First law along a varying profile (0.4 m/s rising to 3 m/s across the brake and back to
    /// 1 m/s): a trapezoid rule of the drag F(x) = Σ f(v(x))·L(x) on a 0.5 mm grid over the
    /// travel equals the heat the lift deposits (1e-6) and the heat the fins store (1e-9);
    /// ∫ dx/v over the travel against the same grid (1e-6); the peak drag bounds the grid's.
    #[test]
    fn profile_lift_work_is_the_deposited_heat() {
        let (s, tables) = tower();
        let case = &s.cases[0];
        let pairs = active_pairs(&s, &tables, case);
        let with_t: Vec<(&ActivePair, f64)> = pairs.iter().map(|p| (p, 40.0)).collect();
        let (lo, hi) = travel(&with_t).unwrap();
        let span = hi - lo;
        let profile = LiftSpeed::Profile(vec![
            (lo + 0.1 * span, 0.4),
            (lo + 0.55 * span, 3.0),
            (lo + 0.9 * span, 1.0),
        ]);
        let mut states = crate::thermal::pass::uniform_states(&s, 40.0, 0.05);
        let caps = fin_capacities(&s, &tables).unwrap();
        let lift = apply_lift(&s, &tables, case, &mut states, &profile, &caps).unwrap();
        let n = (span / 5e-4).ceil() as usize;
        let dx = span / n as f64;
        let f = |x: f64| drag_n(&with_t, profile.at(x), x);
        let work: f64 = (0..n)
            .map(|i| {
                let x = lo + i as f64 * dx;
                0.5 * (f(x) + f(x + dx)) * dx
            })
            .sum();
        let time: f64 = (0..n)
            .map(|i| {
                let x = lo + i as f64 * dx;
                0.5 * (1.0 / profile.at(x) + 1.0 / profile.at(x + dx)) * dx
            })
            .sum();
        let grid_peak = (0..=n).map(|i| f(lo + i as f64 * dx)).fold(0.0, f64::max);
        assert!(work > 0.0);
        assert!(
            (lift.energy_j / work - 1.0).abs() < 1e-6,
            "{} vs {work}",
            lift.energy_j
        );
        let stored = stored_j(&s, &tables, &states, 40.0);
        assert!((stored / lift.energy_j - 1.0).abs() < 1e-9);
        assert!((lift.time_in_brake_s / time - 1.0).abs() < 1e-6);
        assert!(lift.peak_drag_n >= grid_peak * (1.0 - 1e-3) && lift.peak_drag_n > 0.0);
        assert_eq!((lift.min_speed_m_s, lift.max_speed_m_s), (0.4, 3.0));
    }
}
