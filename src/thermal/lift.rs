//! The lift pass: the vehicle hauled back through the brake at a constant speed (a tower's
//! gondola carrying its magnets up through the fins).
//!
//! At constant speed v the drag of a pair is f(v, T)·L(x), L the overlap for the front at x, so
//! the lift must supply F(x) = Σ f·L(x) and the power F·v. Every point of one element is covered
//! while the front travels the other element's length, so over the whole lift a pair deposits
//! f·l_vehicle·|cell ∩ track element| in a cell of a track fin and f·l_vehicle·l_track in a
//! vehicle fin: ∫ F dx over the travel equals the deposited heat (first law; checked in the tests
//! against a numerical integral of the drag). The fins are taken at their temperature before the
//! lift (the lift's own heat does not feed back).

use super::height::height_weights;
use super::pass::{fin_capacity, FinState};
use super::ThermalError;
use crate::dynamics::model::{active_pairs, ActivePair};
use crate::dynamics::BrakeTables;
use crate::scenario::{Case, Scenario};

/// What one lift pass does.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct LiftPass {
    /// Lift speed, m/s.
    pub speed_m_s: f64,
    /// Largest drag the lift must overcome, N.
    pub peak_drag_n: f64,
    /// Largest power the lift must supply for the brake, W.
    pub peak_power_w: f64,
    /// Heat deposited in the fins, J.
    pub energy_j: f64,
}

/// The drag of the pairs for the front at `x_m`, N (|f| at the given temperature per pair).
pub fn drag_n(pairs: &[(&ActivePair, f64)], speed_m_s: f64, x_m: f64) -> f64 {
    pairs
        .iter()
        .map(|(p, t)| p.force_per_m_n(speed_m_s, *t).abs() * p.spec.overlap.length_m(x_m))
        .sum()
}

/// Peak drag over the travel: F(x) is piecewise linear with breaks at the pairs' kinks, so its
/// largest value is at one of them, N.
pub fn peak_drag_n(pairs: &[(&ActivePair, f64)], speed_m_s: f64) -> f64 {
    pairs
        .iter()
        .flat_map(|(p, _)| p.spec.overlap.kinks())
        .map(|x| drag_n(pairs, speed_m_s, x))
        .fold(0.0, f64::max)
}

/// Heat a pair deposits over a whole lift in the track stretch [c0, c1], J (f in N/m).
pub fn pair_heat_j(pair: &ActivePair, force_per_m_n: f64, c0: f64, c1: f64) -> f64 {
    let o = &pair.spec.overlap;
    let inside = (c1.min(o.track_end_m()) - c0.max(o.track_start_m)).max(0.0);
    force_per_m_n.abs() * o.vehicle_len_m * inside
}

/// Runs a lift at `speed_m_s` after a pass: the fins' heat is added to `states` (track fins cell
/// by cell, vehicle fins across the height by the pass's loss distribution, at once: the lift is
/// slow beside the spreading it would allow, which keeps the peak conservative). The force law
/// reads each fin's mean temperature.
pub fn apply_lift(
    scenario: &Scenario,
    tables: &BrakeTables,
    case: &Case,
    states: &mut [FinState],
    speed_m_s: f64,
) -> Result<LiftPass, ThermalError> {
    if !(speed_m_s.is_finite() && speed_m_s > 0.0) {
        return Err(ThermalError::Input(format!(
            "lift speed {speed_m_s} m/s: must be positive"
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
    let peak_drag_n = peak_drag_n(&with_t, speed_m_s);
    let mut energy_j = 0.0;
    for (i, state) in states.iter_mut().enumerate() {
        let mine: Vec<(&ActivePair, f64)> = with_t
            .iter()
            .filter(|(p, _)| p.spec.fin == i)
            .map(|(p, t)| (*p, p.force_per_m_n(speed_m_s, *t)))
            .collect();
        if mine.is_empty() {
            continue;
        }
        let cap = fin_capacity(&scenario.fins[i], i, tables)?;
        match state {
            FinState::Height(profile) => {
                let e: f64 = mine
                    .iter()
                    .map(|(p, f)| pair_heat_j(p, *f, f64::NEG_INFINITY, f64::INFINITY))
                    .sum();
                let weights = match &cap.sheet {
                    Some(sheet) => height_weights(profile, &sheet.from_edge()),
                    None => height_weights(profile, &|_| 1.0),
                };
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
                    let e: f64 = mine
                        .iter()
                        .map(|(p, f)| pair_heat_j(p, *f, field.start_m + c0, field.start_m + c1))
                        .sum();
                    *t += e / (cap.per_m_j_m_k * (c1 - c0).max(1e-12));
                    energy_j += e;
                }
            }
        }
    }
    Ok(LiftPass {
        speed_m_s,
        peak_drag_n,
        peak_power_w: peak_drag_n * speed_m_s,
        energy_j,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dynamics::BrakeTables;

    #[test]
    fn drag_times_travel_is_the_deposited_heat() {
        // Tower demo: trapezoid rule on a 0.5 mm grid of ∫ F dx over the whole travel vs the
        // closed-form heat per pair (first law); tolerance 1e-6 relative.
        let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("scenarios/tower-catch-brake.yaml");
        let s = crate::scenario::load(&p).unwrap();
        let tables = BrakeTables::build(&s).unwrap();
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
        let peak = peak_drag_n(&with_t, v);
        assert!(peak * (hi - lo) >= work && peak > 0.0);
        // Applied to the fins: Σ ρ·c_p·t·h_e·ΔT·len over the cells is the same heat (first law).
        let mut states = crate::thermal::pass::uniform_states(&s, 40.0, 0.05);
        let lift = apply_lift(&s, &tables, &s.cases[0], &mut states, v).unwrap();
        assert!((lift.energy_j / heat - 1.0).abs() < 1e-9);
        let stored: f64 = states
            .iter()
            .enumerate()
            .map(|(i, st)| {
                let cap = fin_capacity(&s.fins[i], i, &tables).unwrap();
                match st {
                    FinState::Field(f) => f
                        .temps_c
                        .iter()
                        .enumerate()
                        .map(|(k, t)| {
                            let c0 = k as f64 * f.cell_m;
                            let len = s.fins[i].length_m.min(c0 + f.cell_m) - c0;
                            cap.per_m_j_m_k * (t - 40.0) * len
                        })
                        .sum::<f64>(),
                    FinState::Height(p) => cap.whole_j_k * (p.mean_c() - 40.0),
                }
            })
            .sum();
        assert!((stored / heat - 1.0).abs() < 1e-9, "{stored} vs {heat}");
    }
}
