//! Case setup: everything of a case that does not change during the run, and the forces and
//! derivatives of the state under the frozen laws of one piece.

use super::options::{RunOptions, Sampling, TempField};
use super::pieces::{kinks, Frozen};
use super::solver::SolverSettings;
use crate::constants::STANDARD_GRAVITY_M_S2 as G;
use crate::dynamics::model::{active_pairs, ActivePair, BrakeTables};
use crate::dynamics::track::{resistance_magnitude_n, TrackModel};
use crate::scenario::{Case, Mount, Resistance, Scenario};
use ode_solvers::SVector;

/// The brake pairs, fins and resistance of a case: what the right-hand side needs.
pub(super) struct Ctx {
    pub mass_kg: f64,
    pub vehicle_len_m: f64,
    pub pairs: Vec<ActivePair>,
    /// Per fin: heat capacity (vehicle fins with feedback) or None (fixed temperature).
    pub fin_capacity_j_k: Vec<Option<f64>>,
    pub fin_start_c: Vec<f64>,
    /// Per fin: temperature field (track fins in a duty cycle).
    pub fin_fields: Vec<Option<TempField>>,
    pub resistance: Resistance,
    pub air_density: f64,
    pub n_fins: usize,
}

/// Forces at a state under a frozen law.
#[derive(Clone, Copy, Default)]
pub(super) struct Forces {
    pub brake_n: f64,
    pub gravity_n: f64,
    pub resistance_n: f64,
    pub cos_theta: f64,
    pub overlap_m: f64,
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
        let fin_fields = match &options.track_fin_fields {
            Some(f) if f.len() == n_fins => f.clone(),
            _ => vec![None; n_fins],
        };
        let ctx = Ctx {
            mass_kg: case.mass_kg,
            vehicle_len_m: scenario.vehicle.length_m,
            pairs: active_pairs(scenario, tables, case),
            fin_capacity_j_k,
            fin_start_c,
            fin_fields,
            resistance: case.resistance,
            air_density: scenario.track.air_density_kg_m3,
            n_fins,
        };
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
        }
    }

    /// Potential energy with the front at `x` (reference 0 at s = 0), J.
    pub fn potential_energy_j(&self, x: f64) -> f64 {
        self.case.mass_kg * G * self.track.mean_elevation_m(x)
    }
}

impl Ctx {
    /// Temperature of `fin` in the state `y`, °C.
    pub fn fin_temp<const N: usize>(&self, fin: usize, y: &SVector<f64, N>) -> f64 {
        match self.fin_capacity_j_k[fin] {
            Some(c) => self.fin_start_c[fin] + y[4 + fin] / c,
            None => self.fin_start_c[fin],
        }
    }

    /// Forces and, when `dy` is given, the derivatives.
    pub fn eval<const N: usize>(
        &self,
        fr: &Frozen,
        y: &SVector<f64, N>,
        dy: Option<&mut SVector<f64, N>>,
    ) -> Forces {
        let (x, v) = (y[0], y[1]);
        let mut brake = 0.0;
        let mut overlap = 0.0;
        let mut fin_power = [0.0f64; 16];
        let mut fin_power_vec: Vec<f64> = Vec::new();
        let use_vec = self.n_fins > fin_power.len();
        if use_vec {
            fin_power_vec = vec![0.0; self.n_fins];
        }
        for &(p, a, b) in &fr.pairs {
            let ov = a + b * x;
            let pair = &self.pairs[p];
            let fin = pair.spec.fin;
            let f = match &self.fin_fields[fin] {
                Some(field) => field_force(pair, field, x, v, ov),
                None => pair.force_per_m_n(v, self.fin_temp(fin, y)) * ov,
            };
            brake -= f;
            overlap += ov;
            let power = f * v;
            if use_vec {
                fin_power_vec[fin] += power;
            } else {
                fin_power[fin] += power;
            }
        }
        let gravity = fr.gravity.force_n(self.mass_kg, x);
        let cos_theta = fr.gravity.cos_theta(x);
        let resistance = -fr.dir
            * resistance_magnitude_n(
                &self.resistance,
                self.mass_kg,
                cos_theta,
                v,
                self.air_density,
            );
        if let Some(dy) = dy {
            dy[0] = v;
            dy[1] = (brake + gravity + resistance) / self.mass_kg;
            dy[2] = -brake * v;
            dy[3] = -resistance * v;
            for i in 0..self.n_fins {
                dy[4 + i] = if use_vec {
                    fin_power_vec[i]
                } else {
                    fin_power[i]
                };
            }
        }
        Forces {
            brake_n: brake,
            gravity_n: gravity,
            resistance_n: resistance,
            cos_theta,
            overlap_m: overlap,
        }
    }

    /// Whether static resistance (rolling and friction) holds the vehicle at rest against
    /// gravity in the state `y`.
    pub fn static_hold<const N: usize>(&self, fr: &Frozen, y: &SVector<f64, N>) -> bool {
        let f = self.eval(fr, y, None);
        let static_res = self.resistance.rolling_coeff * self.mass_kg * G * f.cos_theta
            + self.resistance.friction_n;
        f.gravity_n.abs() <= static_res
    }
}

/// Force of a pair whose track fin has a temperature field, for the front at `x` with the
/// overlap length `ov` of the piece's frozen law: the window (from its lower edge, of length
/// `ov`) is split at cell boundaries and each part uses its cell's temperature.
fn field_force(pair: &ActivePair, field: &TempField, x: f64, v: f64, ov: f64) -> f64 {
    if ov.is_nan() || ov <= 0.0 {
        return 0.0;
    }
    let lo = pair.spec.overlap.lower_edge(x).0;
    let hi = lo + ov;
    let mut total = 0.0;
    for (k, c0, c1) in field.cells_touching(lo, hi) {
        let part = hi.min(c1) - lo.max(c0);
        if part > 0.0 {
            total += pair.force_per_m_n(v, field.temps_c[k]) * part;
        }
    }
    total
}
