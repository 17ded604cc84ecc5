//! Case setup: everything of a case that does not change during the run, and the forces and
//! derivatives of the state under the frozen laws of one piece.

use super::dopri::State;
use super::options::{RunOptions, Sampling, TempField};
use super::pieces::{kinks, Frozen};
use super::solver::SolverSettings;
use crate::constants::STANDARD_GRAVITY_M_S2 as G;
use crate::dynamics::model::{
    active_pairs, mirror_fins, same_law, ActivePair, BrakeTables, PairLaw,
};
use crate::dynamics::track::{resistance_magnitude_n, TrackModel};
use crate::scenario::{Case, Mount, Resistance, Scenario};

/// The brake pairs, fins and resistance of a case: what the right-hand side needs.
pub(super) struct Ctx {
    pub mass_kg: f64,
    pub vehicle_len_m: f64,
    pub pairs: Vec<ActivePair>,
    /// Per fin: heat capacity (vehicle fins with feedback) or None (fixed temperature).
    pub fin_capacity_j_k: Vec<Option<f64>>,
    pub fin_start_c: Vec<f64>,
    /// Per fin: temperature field (track fins in a duty cycle).
    pub fin_fields: Vec<Option<FieldLaw>>,
    pub resistance: Resistance,
    pub air_density: f64,
    pub n_fins: usize,
    /// Some pair has a lateral force (a fin off-centre): the run records its peak.
    pub lateral: bool,
    /// Per pair: whether it is a copy of an earlier pair on a mirror fin at the same
    /// temperatures ([`mirror_fins`]); its force is its original's.
    pub is_copy: Vec<bool>,
    /// Per pair: the fins of its copies (empty for most pairs), which take its force and heat.
    pub copy_fins: Vec<Vec<usize>>,
    /// Per pair: the first pair of its fin with the same force law ([`same_law`]; itself for
    /// most pairs, and always for a fin with a temperature field). Pairs of one group have the
    /// same force per metre of overlap in every state, so a piece computes it once for the
    /// group's consecutive pairs ([`Frozen::reuse`]).
    pub law_group: Vec<usize>,
    /// Some pair has a measured force curve (whose speed range a run may leave).
    pub measured: bool,
    /// No fin has a temperature field and no pair is a mirror copy: the right-hand side sums
    /// the piece's runs of pairs that share a force per metre ([`Frozen::runs`]).
    pub plain: bool,
}

/// A track fin's temperature field as the force law reads it: per cell the inverse of the
/// resistivity ratio ρ20/ρ(T_k), computed once per run.
#[derive(PartialEq)]
pub(super) struct FieldLaw {
    /// Track position of the first cell's upstream end, m.
    start_m: f64,
    /// Cell length, m.
    cell_m: f64,
    /// ρ20/ρ(T_k) per cell.
    inverse_resistivity: Vec<f64>,
}

impl FieldLaw {
    fn new(field: &TempField, alpha_per_k: f64) -> Self {
        Self {
            start_m: field.start_m,
            cell_m: field.cell_m,
            inverse_resistivity: field
                .temps_c
                .iter()
                .map(|t| {
                    1.0 / (1.0 + alpha_per_k * (t - crate::constants::REFERENCE_TEMPERATURE_C))
                        .max(0.05)
                })
                .collect(),
        }
    }
}

/// One case made ready to run: the right-hand side's data, the track, the kinks of the force
/// laws, the solver settings and the scenario's limits of the run.
pub(super) struct CaseSetup<'a> {
    pub ctx: Ctx,
    pub track: TrackModel,
    /// Sorted front positions where some law has a kink.
    pub kinks: Vec<f64>,
    pub solver: SolverSettings,
    pub case: &'a Case,
    pub scenario: &'a Scenario,
    /// Sample interval, s (at least 1 µs).
    pub sample_dt_s: f64,
    pub sampling: Sampling,
    /// Keep the dense output in the result.
    pub trajectory: bool,
    /// Integrate the load of every section ([`RunOptions::section_loads`]).
    pub section_loads: bool,
    /// Some section of the scenario has its fin off-centre: the result reports the peak lateral
    /// force (0 when this case's pairs have none).
    pub lateral_reported: bool,
}

impl<'a> CaseSetup<'a> {
    /// Pairs, fin temperatures and capacities, track and kinks of `case`.
    pub fn new(
        scenario: &'a Scenario,
        tables: &BrakeTables,
        case: &'a Case,
        options: &RunOptions,
    ) -> Self {
        let track = TrackModel::new(
            &scenario.track.gravity,
            scenario.track.air_density_kg_m3,
            scenario.vehicle.length_m,
        );
        let n_fins = scenario.fins.len();
        let fin_start_c: Vec<f64> = match &options.fin_start_temps_c {
            Some(t) if t.len() == n_fins => t.clone(),
            _ => vec![case.fin_temp_c; n_fins],
        };
        let fin_capacity_j_k = scenario
            .fins
            .iter()
            .map(|f| match f.mount {
                Mount::Vehicle { .. } if options.thermal_feedback => Some(
                    f.material.density_kg_m3
                        * f.material.specific_heat_j_kg_k
                        * f.length_m
                        * f.height_m
                        * f.thickness_m,
                ),
                _ => None,
            })
            .collect();
        let fin_fields: Vec<Option<FieldLaw>> = match &options.track_fin_fields {
            Some(f) if f.len() == n_fins => f
                .iter()
                .zip(&scenario.fins)
                .map(|(field, fin)| {
                    field
                        .as_ref()
                        .map(|t| FieldLaw::new(t, fin.material.temp_coeff_per_k))
                })
                .collect(),
            _ => (0..n_fins).map(|_| None).collect(),
        };
        let pairs = active_pairs(scenario, tables, case);
        let mut ctx = Ctx {
            mass_kg: case.mass_kg,
            vehicle_len_m: scenario.vehicle.length_m,
            lateral: pairs.iter().any(ActivePair::has_lateral),
            is_copy: vec![false; pairs.len()],
            copy_fins: vec![Vec::new(); pairs.len()],
            law_group: law_groups(&pairs, &fin_fields),
            measured: pairs
                .iter()
                .any(|p| matches!(p.spec.law, PairLaw::Measured { .. })),
            pairs,
            fin_capacity_j_k,
            fin_start_c,
            fin_fields,
            resistance: case.resistance,
            air_density: scenario.track.air_density_kg_m3,
            n_fins,
            plain: false,
        };
        ctx.mark_copies();
        ctx.plain = !ctx.is_copy.iter().any(|&c| c) && ctx.fin_fields.iter().all(Option::is_none);
        let kinks = kinks(&ctx.pairs, &track);
        Self {
            ctx,
            track,
            kinks,
            solver: options
                .solver
                .unwrap_or_else(|| SolverSettings::from_block(&scenario.solver)),
            case,
            scenario,
            sample_dt_s: options.sample_dt_s.max(1e-6),
            sampling: options.sampling,
            trajectory: options.trajectory,
            section_loads: options.section_loads,
            lateral_reported: tables.has_lateral(),
        }
    }

    /// Potential energy with the front at `x` (reference 0 at s = 0), J.
    pub fn potential_energy_j(&self, x: f64) -> f64 {
        self.case.mass_kg * G * self.track.mean_elevation_m(x)
    }
}

/// Per pair: the first pair of the same fin with the same force law ([`same_law`]), or the pair
/// itself (always for a fin with a temperature field, whose force depends on the window).
fn law_groups(pairs: &[ActivePair], fin_fields: &[Option<FieldLaw>]) -> Vec<usize> {
    (0..pairs.len())
        .map(|q| {
            let fin = pairs[q].spec.fin;
            if fin_fields.get(fin).is_some_and(Option::is_some) {
                return q;
            }
            (0..q)
                .find(|&p| pairs[p].spec.fin == fin && same_law(&pairs[p], &pairs[q]))
                .unwrap_or(q)
        })
        .collect()
}

impl Ctx {
    /// Marks the pairs of mirror fins that start at the same temperatures (equal start, heat
    /// capacity and field) as copies of their originals: the run evaluates each force once and
    /// gives it to every copy, with the same result as evaluating them all (to rounding: the
    /// sum over pairs is taken in another order).
    fn mark_copies(&mut self) {
        let mirror = mirror_fins(&self.pairs, self.n_fins);
        for (j, m) in mirror.iter().enumerate() {
            let Some(i) = *m else { continue };
            if self.fin_start_c[i] != self.fin_start_c[j]
                || self.fin_capacity_j_k[i] != self.fin_capacity_j_k[j]
                || self.fin_fields[i] != self.fin_fields[j]
            {
                continue;
            }
            let originals: Vec<usize> = (0..self.pairs.len())
                .filter(|&p| self.pairs[p].spec.fin == i)
                .collect();
            let copies = (0..self.pairs.len()).filter(|&q| self.pairs[q].spec.fin == j);
            for (p, q) in originals.into_iter().zip(copies) {
                self.is_copy[q] = true;
                self.copy_fins[p].push(j);
            }
        }
    }

    /// Temperature of `fin` in the state `y`, °C.
    #[inline]
    pub fn fin_temp<const N: usize>(&self, fin: usize, y: &State<N>) -> f64 {
        match self.fin_capacity_j_k[fin] {
            Some(c) => self.fin_start_c[fin] + y[4 + fin] / c,
            None => self.fin_start_c[fin],
        }
    }

    /// The derivatives of the state `y` under the frozen laws `fr`.
    #[inline]
    pub fn eval<const N: usize>(&self, fr: &Frozen, y: &State<N>, dy: &mut State<N>) {
        let (x, v) = (y[0], y[1]);
        let mut brake = 0.0;
        for p in dy.iter_mut().skip(4).take(self.n_fins) {
            *p = 0.0;
        }
        // The force per metre of the last pair evaluated, reused by the next pairs of its law
        // group: the same number the pair's own evaluation gives.
        let mut per_m = 0.0;
        if self.plain {
            // The same products and sums in the same order as the general loop below.
            for &(fin, law, lo, hi) in &fr.runs {
                let per_m = self.pairs[law].force_per_m_n(v, self.fin_temp(fin, y));
                for &(_, a, b) in &fr.pairs[lo..hi] {
                    let f = per_m * (a + b * x);
                    brake -= f;
                    dy[4 + fin] += f * v;
                }
            }
        }
        let general = if self.plain { &[][..] } else { &fr.pairs[..] };
        for (&(p, a, b), &reuse) in general.iter().zip(&fr.reuse) {
            if self.is_copy[p] {
                continue;
            }
            let ov = a + b * x;
            let f = if reuse {
                per_m * ov
            } else {
                let (f, rate) = self.pair_force_and_rate(p, ov, y);
                per_m = rate;
                f
            };
            brake -= f;
            dy[4 + self.pairs[p].spec.fin] += f * v;
            for &fin in &self.copy_fins[p] {
                brake -= f;
                dy[4 + fin] += f * v;
            }
        }
        let (gravity, cos_theta) = fr.gravity.force_and_cos(self.mass_kg, x);
        let resistance = -fr.dir
            * resistance_magnitude_n(
                &self.resistance,
                self.mass_kg,
                cos_theta,
                v,
                self.air_density,
            );
        dy[0] = v;
        dy[1] = (brake + gravity + resistance) / self.mass_kg;
        dy[2] = -brake * v;
        dy[3] = -resistance * v;
    }

    /// The drag of pair `p` with the overlap `ov` (m) in the state `y`, N: odd in the speed, so
    /// the force on the vehicle along +s is its negative.
    #[inline]
    pub fn pair_force<const N: usize>(&self, p: usize, ov: f64, y: &State<N>) -> f64 {
        self.pair_force_and_rate(p, ov, y).0
    }

    /// [`Ctx::pair_force`] and the force per metre of overlap it is the product of (NaN for a
    /// fin with a temperature field, whose force is summed over the window's cells).
    #[inline(always)]
    fn pair_force_and_rate<const N: usize>(&self, p: usize, ov: f64, y: &State<N>) -> (f64, f64) {
        let (x, v) = (y[0], y[1]);
        let pair = &self.pairs[p];
        let fin = pair.spec.fin;
        match &self.fin_fields[fin] {
            Some(field) => (field_force(pair, field, x, v, ov), f64::NAN),
            None => {
                let per_m = pair.force_per_m_n(v, self.fin_temp(fin, y));
                (per_m * ov, per_m)
            }
        }
    }

    /// The lateral force on the fin of pair `p` along +y with the overlap `ov` (m) in the state
    /// `y`, N (even in the speed; 0 for a centred fin).
    #[inline]
    pub fn pair_lateral<const N: usize>(&self, p: usize, ov: f64, y: &State<N>) -> f64 {
        let (x, v) = (y[0], y[1]);
        let pair = &self.pairs[p];
        let fin = pair.spec.fin;
        match &self.fin_fields[fin] {
            Some(field) if ov > 0.0 => {
                pair.lateral_over_parts_n(v, field_parts(pair, field, x, ov))
            }
            Some(_) => 0.0,
            None => pair.lateral_per_m_n(v, self.fin_temp(fin, y)) * ov,
        }
    }

    /// Whether static resistance (rolling and friction) holds the vehicle at rest against
    /// gravity in the state `y`.
    pub fn static_hold<const N: usize>(&self, fr: &Frozen, y: &State<N>) -> bool {
        let x = y[0];
        let gravity = fr.gravity.force_n(self.mass_kg, x);
        let static_res = self.resistance.rolling_coeff * self.mass_kg * G * fr.gravity.cos_theta(x)
            + self.resistance.friction_n;
        gravity.abs() <= static_res
    }
}

/// Force of a pair whose track fin has a temperature field, for the front at `x` with the
/// overlap length `ov` of the piece's frozen law: the window (from its lower edge, of length
/// `ov`) is split at cell boundaries and each part uses its cell's temperature.
fn field_force(pair: &ActivePair, field: &FieldLaw, x: f64, v: f64, ov: f64) -> f64 {
    if ov.is_nan() || ov <= 0.0 {
        return 0.0;
    }
    pair.force_over_parts_n(v, field_parts(pair, field, x, ov))
}

/// The parts of the overlap window (from its lower edge, of length `ov` > 0) in the cells of
/// `field`: (ρ20/ρ(T_k), length of the part in m).
fn field_parts<'a>(
    pair: &ActivePair,
    field: &'a FieldLaw,
    x: f64,
    ov: f64,
) -> impl Iterator<Item = (f64, f64)> + 'a {
    let lo = pair.spec.overlap.lower_edge(x).0;
    let hi = lo + ov;
    let first = ((lo - field.start_m) / field.cell_m).floor().max(0.0) as usize;
    field
        .inverse_resistivity
        .iter()
        .enumerate()
        .skip(first)
        .map(move |(k, &inv_rho)| {
            let c0 = field.start_m + k as f64 * field.cell_m;
            (c0, inv_rho, hi.min(c0 + field.cell_m) - lo.max(c0))
        })
        .take_while(move |&(c0, _, _)| c0 < hi)
        .filter(|&(_, _, part)| part > 0.0)
        .map(|(_, inv_rho, part)| (inv_rho, part))
}
