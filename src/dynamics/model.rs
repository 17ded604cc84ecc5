//! The brake model of one case: every fin × magnet-section pair on the same lane, its overlap as
//! a function of the vehicle position, and its force law at the case's temperatures.
//!
//! Force tables are built once per scenario at the reference state (20 °C fin, 20 °C magnets)
//! and rescaled exactly: the layer force depends on conductivity and speed only through σ·v, and
//! on remanence as Br², so a fin at T sees f_ref(v·σ(T)/σ20)·(Br(T)/Br20)².
//!
//! A section of length L (N poles) brakes like a long section shortened by its end length ℓ(v)
//! ([`crate::physics::ends`]): the force per metre of overlap is scaled by
//! [`section_end_factor`] = 1 − ℓ(v)/L. Spread over the overlap this way, the energy of a whole
//! passage is exact to first order in ℓ whether the fin or the section is the longer element
//! (each section end spends a fin length inside the overlap window, and the window's area is
//! L·L_f), and the overlap stays linear between kinks.
//!
//! A section whose fin runs off-centre (`fin_offset` ≠ 0) has its drag from the off-centre
//! model ([`crate::physics::offset`]) and a second table of the lateral force on the fin along
//! +y (the side a positive offset points to; negative for a positive offset: back towards the
//! centre). The lateral force per metre of overlap is scaled exactly as the drag: the same
//! temperature rescaling (σ·v, Br²), active height, model force factor and section-end factor
//! 1 − ℓ(v)/L. The end factor and ℓ are those of the drag of the centred fin; applying them to
//! the lateral force and to the off-centre drag is an approximation (the ends of the lateral
//! force are not derived), stated in the README. A centred section (offset 0) uses the centred
//! table as before, bit for bit.

use super::overlap::Overlap;
use super::DynamicsError;
use crate::constants::REFERENCE_TEMPERATURE_C;
use crate::numeric::join;
use crate::physics::{
    BrakeGeometry, DragModel, ForceTable, LateralTable, MeasuredCurve, OffsetModel, SectionEndCurve,
};
use crate::scenario::{
    Arrangement, Case, Fin, ForceSource, MagnetDesign, Mount, Scenario, Section,
};
use std::sync::Arc;

/// How a pair's force per metre of overlap is obtained.
#[derive(Debug, Clone)]
pub enum PairLaw {
    /// Layer model through a reference table; force per metre = table · active height.
    Table {
        /// f(v) per m² of pole face at 20 °C.
        table: Arc<ForceTable>,
        /// The model behind the table (for reports).
        model: Arc<DragModel>,
        /// m.
        active_height_m: f64,
        /// End length ℓ(v) of the section's design at 20 °C.
        section_ends: Arc<SectionEndCurve>,
        /// 1 / length of the section (the magnet element), 1/m.
        inverse_section_length_per_m: f64,
        /// f_y(v) per m² of pole face at 20 °C of a fin off-centre (None: centred, no lateral
        /// force).
        lateral: Option<Arc<LateralTable>>,
    },
    /// Measured force per metre of overlap.
    Measured {
        /// The curve.
        curve: Arc<MeasuredCurve>,
        /// Fin temperature of the measurement, °C.
        fin_temp_c: f64,
        /// Magnet temperature of the measurement, °C.
        magnet_temp_c: f64,
    },
}

/// A fin × section pair: where its elements sit along the track and the force law at 20 °C.
#[derive(Debug, Clone)]
pub struct PairSpec {
    /// Index into `Scenario::fins`.
    pub fin: usize,
    /// Index into `Scenario::sections`.
    pub section: usize,
    /// The two elements along the track (their overlap window as the vehicle moves).
    pub overlap: Overlap,
    /// Force law.
    pub law: PairLaw,
}

/// Force tables of a scenario, built once and shared by its cases.
#[derive(Debug, Clone)]
pub struct BrakeTables {
    /// One entry per pair.
    pub pairs: Vec<PairSpec>,
}

/// The brake geometry of a fin in a section's magnets.
pub fn geometry(fin: &Fin, design: &MagnetDesign) -> BrakeGeometry {
    BrakeGeometry {
        pole_pitch_m: design.pole_pitch_m,
        magnet_thickness_m: design.magnet_thickness_m,
        magnet_fill: design.magnet_fill,
        clearance_m: design.clearance_m,
        fin_thickness_m: fin.thickness_m,
        fin_height_m: fin.height_m,
        pole_height_m: design.pole_height_m,
    }
}

/// The layer model of a fin in a section (20 °C); None for a section with a measured curve.
pub fn drag_model(fin: &Fin, section: &Section) -> Result<Option<DragModel>, DynamicsError> {
    section
        .design()
        .map(|design| model_in(fin, section, design))
        .transpose()
}

/// The layer model of a fin in the magnets of `design` (20 °C).
fn model_in(
    fin: &Fin,
    section: &Section,
    design: &MagnetDesign,
) -> Result<DragModel, DynamicsError> {
    DragModel::new(
        &geometry(fin, design),
        design.remanence_t,
        fin.material.conductivity_s_m,
    )
    .map_err(|source| DynamicsError::physics(fin, section, source))
}

/// An upper bound on the speeds any case of the scenario reaches, m/s, from the energy: brakes
/// and resistance only take energy out, so at a front position x, v(x)² ≤ v₀² + 2g·(z̄(x₀) − z̄(x))
/// with z̄ the mean elevation under the vehicle (the potential of [`super::track`]). A run stays
/// between its start, the zone start (where a rollback ends) and the rear clearing the zone end,
/// so z̄(x) there is at least the lowest elevation under the vehicle over that stretch
/// (piecewise-linear profile: its lowest point or an end). 1 % and 0.5 m/s are added for the
/// integrator's error; a faster run is still right, read from the exact model.
pub fn reachable_speed_m_s(scenario: &Scenario) -> f64 {
    use crate::constants::STANDARD_GRAVITY_M_S2 as G;
    let track = super::track::TrackModel::new(
        &scenario.track.gravity,
        scenario.track.air_density_kg_m3,
        scenario.vehicle.length_m,
    );
    let length = scenario.vehicle.length_m;
    let top_sq = scenario
        .cases
        .iter()
        .map(|c| {
            let x0 = c.start_position_m;
            let lo = x0.min(scenario.zone_start_m) - length;
            let hi = x0.max(scenario.zone_end_m + length);
            let drop = track.mean_elevation_m(x0) - track.lowest_elevation_m(lo, hi);
            c.start_speed_m_s * c.start_speed_m_s + 2.0 * G * drop.max(0.0)
        })
        .fold(0.0, f64::max);
    1.01 * top_sq.sqrt() + 0.5
}

/// A generous upper bound on the speeds any case of the scenario reaches, m/s (the speed range
/// of force curves): 1.25 × the energy bound from the largest drop to the zone end, plus 5 m/s.
pub fn speed_bound_m_s(scenario: &Scenario) -> f64 {
    use crate::constants::STANDARD_GRAVITY_M_S2 as G;
    let track = super::track::TrackModel::new(
        &scenario.track.gravity,
        scenario.track.air_density_kg_m3,
        scenario.vehicle.length_m,
    );
    let top = scenario
        .cases
        .iter()
        .map(|c| c.start_speed_m_s.abs())
        .fold(0.0, f64::max);
    // Largest drop from any start to the zone end.
    let drop = scenario
        .cases
        .iter()
        .map(|c| {
            track.elevation_m(c.start_position_m)
                - track
                    .elevation_m(scenario.zone_end_m)
                    .min(track.elevation_m(scenario.zone_start_m))
        })
        .fold(0.0, f64::max)
        .max(0.0);
    1.25 * (top * top + 2.0 * G * drop).sqrt() + 5.0
}

/// The speed the force tables of a scenario reach: [`reachable_speed_m_s`] times the largest
/// conductivity ratio σ(T)/σ20 of any case's fin temperature (a cold fin reads the table at
/// v·σ(T)/σ20).
pub fn table_speed_m_s(scenario: &Scenario) -> f64 {
    let max_ratio = scenario
        .cases
        .iter()
        .flat_map(|c| {
            scenario
                .fins
                .iter()
                .map(move |f| 1.0 / f.material.resistivity_ratio(c.fin_temp_c))
        })
        .fold(1.0, f64::max);
    reachable_speed_m_s(scenario) * max_ratio
}

/// Force tables of distinct designs, shared across the studies of many scenarios (the planner's
/// candidates, a sweep's samples). A design is the fin's and magnets' geometry, remanence and
/// conductivity; a table is reused when it reaches the speed a scenario needs.
#[derive(Debug, Default)]
pub struct TableCache {
    entries: std::sync::Mutex<Vec<CachedTable>>,
}

/// The identity of a force-table design: every input of [`DragModel::new`] and the fin
/// offset, bit for bit.
pub type DesignKey = [u64; 10];

#[derive(Debug, Clone)]
struct CachedTable {
    key: DesignKey,
    max_speed_m_s: f64,
    table: Arc<ForceTable>,
    model: Arc<DragModel>,
    section_ends: Arc<SectionEndCurve>,
    lateral: Option<Arc<LateralTable>>,
}

impl TableCache {
    /// Number of distinct tables held.
    pub fn len(&self) -> usize {
        self.entries.lock().map_or(0, |e| e.len())
    }

    /// The designs of the tables held: one opaque identity per table, equal for equal designs
    /// (a sweep's shards report theirs, and their union counts the whole sweep's tables).
    pub fn designs(&self) -> Vec<DesignKey> {
        self.entries
            .lock()
            .map_or_else(|_| Vec::new(), |e| e.iter().map(|c| c.key).collect())
    }

    /// Whether it holds no table.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    fn find(&self, key: &DesignKey, max_speed_m_s: f64) -> Option<CachedTable> {
        let entries = self.entries.lock().ok()?;
        entries
            .iter()
            .find(|c| &c.key == key && c.max_speed_m_s >= max_speed_m_s)
            .cloned()
    }

    fn insert(&self, entry: CachedTable) {
        if let Ok(mut entries) = self.entries.lock() {
            entries.retain(|c| c.key != entry.key || c.max_speed_m_s > entry.max_speed_m_s);
            entries.push(entry);
        }
    }
}

/// The identity of a layer-model design: every input of [`DragModel::new`] and the fin offset,
/// bit for bit.
fn design_key(
    g: &BrakeGeometry,
    remanence_t: f64,
    conductivity_s_m: f64,
    fin_offset_m: f64,
) -> DesignKey {
    [
        g.pole_pitch_m,
        g.magnet_thickness_m,
        g.magnet_fill,
        g.clearance_m,
        g.fin_thickness_m,
        g.fin_height_m,
        g.pole_height_m,
        remanence_t,
        conductivity_s_m,
        fin_offset_m,
    ]
    .map(f64::to_bits)
}

impl BrakeTables {
    /// Whether some pair has a lateral force (a section with its fin off-centre).
    pub fn has_lateral(&self) -> bool {
        self.pairs.iter().any(|p| {
            matches!(
                p.law,
                PairLaw::Table {
                    lateral: Some(_),
                    ..
                }
            )
        })
    }

    /// Builds every pair's force law for the scenario. Pairs with the same fin design and magnet
    /// design share one table; the table reaches the top speed times the largest conductivity
    /// ratio of any case (a cold fin reads the table at v·σ(T)/σ20).
    pub fn build(scenario: &Scenario) -> Result<Self, DynamicsError> {
        Self::build_cached(scenario, &TableCache::default())
    }

    /// Like [`BrakeTables::build`], taking tables from `cache` and adding the ones it builds.
    pub fn build_cached(scenario: &Scenario, cache: &TableCache) -> Result<Self, DynamicsError> {
        Self::build_reaching(scenario, cache, 0.0)
    }

    /// Like [`BrakeTables::build_cached`], with every table reaching at least
    /// `min_table_speed_m_s` (a sweep builds all its samples' tables to one common speed, so a
    /// sample's forces do not depend on which sample filled the cache first).
    pub fn build_reaching(
        scenario: &Scenario,
        cache: &TableCache,
        min_table_speed_m_s: f64,
    ) -> Result<Self, DynamicsError> {
        let vmax = table_speed_m_s(scenario).max(min_table_speed_m_s);
        let mut pairs = Vec::new();
        for (fi, fin) in scenario.fins.iter().enumerate() {
            for (si, sec) in scenario.sections.iter().enumerate() {
                if fin.lane != sec.lane {
                    continue;
                }
                let law = pair_law(fin, sec, vmax, cache)?;
                pairs.push(PairSpec {
                    fin: fi,
                    section: si,
                    overlap: placement(scenario.arrangement, fin, sec)?,
                    law,
                });
            }
        }
        Ok(Self { pairs })
    }
}

/// The force law of a fin in a section: a table of the layer model reaching `vmax` (from
/// `cache` when it holds one for this design), or the section's measured curve.
fn pair_law(
    fin: &Fin,
    sec: &Section,
    vmax: f64,
    cache: &TableCache,
) -> Result<PairLaw, DynamicsError> {
    match &sec.force {
        ForceSource::Model(design) => {
            let g = geometry(fin, design);
            let key = design_key(
                &g,
                design.remanence_t,
                fin.material.conductivity_s_m,
                design.fin_offset_m,
            );
            let (table, model, section_ends, lateral) = match cache.find(&key, vmax) {
                Some(c) => (c.table, c.model, c.section_ends, c.lateral),
                None => {
                    // The drag model with its tables and the section-end curve are independent:
                    // built side by side.
                    let (built, section_ends) = join(
                        || -> Result<_, DynamicsError> {
                            let model = Arc::new(model_in(fin, sec, design)?);
                            let (table, lateral) = if design.fin_offset_m == 0.0 {
                                (Arc::new(ForceTable::build(&model, vmax)), None)
                            } else {
                                let offset = OffsetModel::new(&model, design.fin_offset_m)
                                    .map_err(|source| DynamicsError::physics(fin, sec, source))?;
                                (
                                    Arc::new(ForceTable::build_offset(&offset, vmax)),
                                    Some(Arc::new(LateralTable::build(&offset, vmax))),
                                )
                            };
                            Ok((model, table, lateral))
                        },
                        {
                            let sigma_s_m = fin.material.conductivity_s_m;
                            move || SectionEndCurve::new(&g, sigma_s_m, vmax)
                        },
                    );
                    let (model, table, lateral) = built?;
                    let section_ends = Arc::new(
                        section_ends.map_err(|source| DynamicsError::physics(fin, sec, source))?,
                    );
                    cache.insert(CachedTable {
                        key,
                        max_speed_m_s: vmax,
                        table: table.clone(),
                        model: model.clone(),
                        section_ends: section_ends.clone(),
                        lateral: lateral.clone(),
                    });
                    (table, model, section_ends, lateral)
                }
            };
            Ok(PairLaw::Table {
                active_height_m: model.geometry().active_height_m(),
                table,
                model,
                section_ends,
                inverse_section_length_per_m: 1.0 / sec.length_m,
                lateral,
            })
        }
        ForceSource::Measured(m) => {
            let curve = MeasuredCurve::new(&m.points)
                .map_err(|source| DynamicsError::physics(fin, sec, source))?;
            Ok(PairLaw::Measured {
                curve: Arc::new(curve),
                fin_temp_c: m.fin_temp_c,
                magnet_temp_c: m.magnet_temp_c,
            })
        }
    }
}

/// Where the pair's vehicle and track elements sit: the fin rides on the vehicle and the section
/// is on the track, or the other way round, as the arrangement says.
fn placement(arrangement: Arrangement, fin: &Fin, sec: &Section) -> Result<Overlap, DynamicsError> {
    let (vehicle_offset_m, vehicle_len_m, track_start_m, track_len_m) =
        match (arrangement, fin.mount, sec.mount) {
            (Arrangement::FinsOnVehicle, Mount::Vehicle { offset_m }, Mount::Track { start_m }) => {
                (offset_m, fin.length_m, start_m, sec.length_m)
            }
            (
                Arrangement::MagnetsOnVehicle,
                Mount::Track { start_m },
                Mount::Vehicle { offset_m },
            ) => (offset_m, sec.length_m, start_m, fin.length_m),
            _ => {
                return Err(DynamicsError::Mounting {
                    fin: fin.name.clone(),
                    section: sec.name.clone(),
                })
            }
        };
    Ok(Overlap {
        vehicle_offset_m,
        vehicle_len_m,
        track_start_m,
        track_len_m,
    })
}

/// A pair's force law at the case's magnet temperature; the fin temperature is applied per call.
#[derive(Debug, Clone)]
pub struct ActivePair {
    /// The pair.
    pub spec: PairSpec,
    /// Br(T)/Br_ref of the magnets for this case.
    pub remanence_ratio: f64,
    /// Fin resistivity temperature coefficient, 1/K.
    pub fin_alpha_per_k: f64,
    /// Fin resistivity ratio ρ(T_ref)/ρ(20 °C) of the law's reference (1 for tables).
    pub reference_resistivity_ratio: f64,
    /// The case's model force factor: a plain multiplier on the force (1 for the model as it is).
    pub force_factor: f64,
}

impl ActivePair {
    /// Force per metre of overlap at `speed_m_s` with the fin at `fin_temp_c`, N/m (odd in v).
    #[inline]
    pub fn force_per_m_n(&self, speed_m_s: f64, fin_temp_c: f64) -> f64 {
        // σ(T)/σ_ref = ρ_ref/ρ(T).
        let sigma_ratio = self.reference_resistivity_ratio / self.resistivity_ratio(fin_temp_c);
        self.force_per_m_at_sigma(speed_m_s, sigma_ratio)
    }

    /// The fin's resistivity at `fin_temp_c` relative to 20 °C, ρ(T)/ρ20 = 1 + α(T − 20 °C)
    /// (at least 0.05).
    #[inline]
    pub fn resistivity_ratio(&self, fin_temp_c: f64) -> f64 {
        (1.0 + self.fin_alpha_per_k * (fin_temp_c - REFERENCE_TEMPERATURE_C)).max(0.05)
    }

    /// Force per metre of overlap at `speed_m_s` for a fin whose resistivity is ρ20 divided by
    /// `inverse_resistivity_ratio` (that is, 1/[`ActivePair::resistivity_ratio`], computed once
    /// per cell of a temperature field), N/m.
    #[inline]
    pub fn force_per_m_at_inverse_resistivity(
        &self,
        speed_m_s: f64,
        inverse_resistivity_ratio: f64,
    ) -> f64 {
        self.force_per_m_at_sigma(
            speed_m_s,
            self.reference_resistivity_ratio * inverse_resistivity_ratio,
        )
    }

    /// Σ part·(force per metre of overlap) over parts of the overlap whose fin resistivity
    /// differs: `parts` yields (ρ20/ρ(T), length of the part in m); N. The same sum as
    /// [`ActivePair::force_per_m_at_inverse_resistivity`] part by part, with the law's constant
    /// factors taken out of the sum (the cells of a track fin's temperature field).
    #[inline]
    pub fn force_over_parts_n(
        &self,
        speed_m_s: f64,
        parts: impl Iterator<Item = (f64, f64)>,
    ) -> f64 {
        match &self.spec.law {
            PairLaw::Table { table, .. } => {
                // f = Br²·f_ref(|v|·σ_k)·h_a·(1 − ℓ(v, σ_k)/L)·sign(v) for each part.
                let f = self.table_over_parts(speed_m_s, parts, |u| table.force_per_area_pa(u));
                if speed_m_s < 0.0 {
                    -f
                } else {
                    f
                }
            }
            PairLaw::Measured { .. } => parts
                .map(|(inv_rho, part)| {
                    self.force_per_m_at_inverse_resistivity(speed_m_s, inv_rho) * part
                })
                .sum(),
        }
    }

    /// Lateral force on the fin along +y over parts of the overlap as in
    /// [`ActivePair::force_over_parts_n`], N (even in v; 0 for a centred fin or a measured law).
    #[inline]
    pub fn lateral_over_parts_n(
        &self,
        speed_m_s: f64,
        parts: impl Iterator<Item = (f64, f64)>,
    ) -> f64 {
        match &self.spec.law {
            PairLaw::Table {
                lateral: Some(lateral),
                ..
            } => self.table_over_parts(speed_m_s, parts, |u| lateral.lateral_per_area_pa(u)),
            _ => 0.0,
        }
    }

    /// Force·Br²·(force factor)·h_a·Σ per_area(|v|·σ_k)·part·(1 − ℓ(v, σ_k)/L) of a table law
    /// over `parts` (ρ20/ρ(T), length in m), with `per_area` the reference law per m² at a
    /// speed (0 for a measured law).
    #[inline]
    fn table_over_parts(
        &self,
        speed_m_s: f64,
        parts: impl Iterator<Item = (f64, f64)>,
        per_area: impl Fn(f64) -> f64,
    ) -> f64 {
        let PairLaw::Table {
            active_height_m,
            section_ends,
            inverse_section_length_per_m,
            ..
        } = &self.spec.law
        else {
            return 0.0;
        };
        let scale = speed_m_s.abs() * self.reference_resistivity_ratio;
        // The law's two lookups for the last conductivity met: parts in cells at the same
        // temperature (a uniform field: every part) reuse them, the same numbers.
        let mut last: Option<(u64, f64, f64)> = None;
        let sum: f64 = parts
            .map(|(inv_rho, part)| {
                let (per_area_pa, end_factor) = match last {
                    Some((bits, a, e)) if bits == inv_rho.to_bits() => (a, e),
                    _ => {
                        let sigma_ratio = self.reference_resistivity_ratio * inv_rho;
                        let a = per_area(scale * inv_rho);
                        let e = section_end_factor(
                            section_ends.total_m_scaled(speed_m_s, sigma_ratio),
                            *inverse_section_length_per_m,
                        );
                        last = Some((inv_rho.to_bits(), a, e));
                        (a, e)
                    }
                };
                per_area_pa * part * end_factor
            })
            .sum();
        let r2 = self.remanence_ratio * self.remanence_ratio;
        self.force_factor * r2 * sum * active_height_m
    }

    /// Lateral force on the fin along +y per metre of overlap at `speed_m_s` with the fin at
    /// `fin_temp_c`, N/m: the drag's scaling (see [`ActivePair::force_per_m_n`]) applied to the
    /// lateral table; 0 for a centred fin or a measured law.
    #[inline]
    pub fn lateral_per_m_n(&self, speed_m_s: f64, fin_temp_c: f64) -> f64 {
        let PairLaw::Table {
            lateral: Some(lateral),
            active_height_m,
            section_ends,
            inverse_section_length_per_m,
            ..
        } = &self.spec.law
        else {
            return 0.0;
        };
        let sigma_ratio = self.reference_resistivity_ratio / self.resistivity_ratio(fin_temp_c);
        self.force_factor
            * (lateral.lateral_per_area_scaled_pa(speed_m_s, sigma_ratio, self.remanence_ratio)
                * active_height_m
                * section_end_factor(
                    section_ends.total_m_scaled(speed_m_s, sigma_ratio),
                    *inverse_section_length_per_m,
                ))
    }

    /// Whether the pair has a lateral force (a table law with the fin off-centre).
    pub fn has_lateral(&self) -> bool {
        matches!(
            self.spec.law,
            PairLaw::Table {
                lateral: Some(_),
                ..
            }
        )
    }

    /// Force per metre of overlap at `speed_m_s` for a fin conductivity `sigma_ratio` × the law's
    /// reference conductivity, N/m ([`ActivePair::force_per_m_n`] with `sigma_ratio` =
    /// ρ_ref/ρ(T) computed by the caller, once for many speeds: the same number).
    #[inline(always)]
    pub fn force_per_m_at_sigma(&self, speed_m_s: f64, sigma_ratio: f64) -> f64 {
        let per_m = match &self.spec.law {
            PairLaw::Table {
                table,
                active_height_m,
                section_ends,
                inverse_section_length_per_m,
                ..
            } => {
                table.force_per_area_scaled_pa(speed_m_s, sigma_ratio, self.remanence_ratio)
                    * active_height_m
                    * section_end_factor(
                        section_ends.total_m_scaled(speed_m_s, sigma_ratio),
                        *inverse_section_length_per_m,
                    )
            }
            PairLaw::Measured { curve, .. } => {
                self.remanence_ratio
                    * self.remanence_ratio
                    * curve.force_per_m_n(speed_m_s * sigma_ratio)
            }
        };
        self.force_factor * per_m
    }

    /// Whether a measured law covers this speed (always true for tables).
    pub fn covers(&self, speed_m_s: f64, fin_temp_c: f64) -> bool {
        match &self.spec.law {
            PairLaw::Table { .. } => true,
            PairLaw::Measured { curve, .. } => curve.covers(
                speed_m_s.abs() * self.reference_resistivity_ratio
                    / self.resistivity_ratio(fin_temp_c),
            ),
        }
    }
}

/// The share of a long section's force that a section of length L (`inverse_length_per_m` =
/// 1/L) with end length `end_length_m` (m) gives: 1 − ℓ/L, not below 0 (a section shorter than
/// its end length); NaN stays NaN.
#[inline(always)]
pub fn section_end_factor(end_length_m: f64, inverse_length_per_m: f64) -> f64 {
    let share = 1.0 - end_length_m * inverse_length_per_m;
    if share < 0.0 {
        0.0
    } else {
        share
    }
}

/// Remanence ratio Br(T)/Br(T_ref) for a reversible coefficient β: (1 + β(T − 20))/(1 + β(T_ref − 20)).
pub fn remanence_ratio(beta_per_k: f64, temp_c: f64, reference_c: f64) -> f64 {
    let r = (1.0 + beta_per_k * (temp_c - REFERENCE_TEMPERATURE_C))
        / (1.0 + beta_per_k * (reference_c - REFERENCE_TEMPERATURE_C));
    r.max(0.0)
}

/// Whether two pairs brake alike wherever the vehicle is: the same force law ([`same_law`]) and
/// the same overlap window. Only the fin and section indices may differ.
pub fn same_brake(a: &ActivePair, b: &ActivePair) -> bool {
    same_law(a, b) && a.spec.overlap == b.spec.overlap
}

/// Whether two pairs have the same drag per metre of overlap at every speed and fin
/// temperature: the same force law (the same shared table and end curve, or the same measured
/// curve, with equal heights and section lengths) and the same case ratios. Their overlap
/// windows, fins and sections may differ: two sections of one design under one fin give that
/// fin the same force per metre, bit for bit.
pub fn same_law(a: &ActivePair, b: &ActivePair) -> bool {
    let law = match (&a.spec.law, &b.spec.law) {
        (
            PairLaw::Table {
                table: ta,
                section_ends: ea,
                active_height_m: ha,
                inverse_section_length_per_m: la,
                ..
            },
            PairLaw::Table {
                table: tb,
                section_ends: eb,
                active_height_m: hb,
                inverse_section_length_per_m: lb,
                ..
            },
        ) => Arc::ptr_eq(ta, tb) && Arc::ptr_eq(ea, eb) && ha == hb && la == lb,
        (PairLaw::Measured { curve: ca, .. }, PairLaw::Measured { curve: cb, .. }) => {
            Arc::ptr_eq(ca, cb)
        }
        _ => false,
    };
    law && a.remanence_ratio == b.remanence_ratio
        && a.fin_alpha_per_k == b.fin_alpha_per_k
        && a.reference_resistivity_ratio == b.reference_resistivity_ratio
        && a.force_factor == b.force_factor
}

/// Mirror fins of a case: for each fin, the earlier fin (itself not a mirror) whose pairs brake
/// alike one for one and in order ([`same_brake`]), if any. Two such fins at equal temperatures
/// take equal forces and equal heat at every point of every run (a twin-fin layout, common
/// practice on towers and sleds to balance the lateral loads), so callers may evaluate one and
/// count it twice. Whether their temperatures are equal is the caller's to check.
pub fn mirror_fins(pairs: &[ActivePair], n_fins: usize) -> Vec<Option<usize>> {
    let of_fin = |f: usize| pairs.iter().filter(move |p| p.spec.fin == f);
    let mut mirror = vec![None; n_fins];
    for j in 0..n_fins {
        mirror[j] = (0..j).filter(|&i| mirror[i].is_none()).find(|&i| {
            of_fin(i).count() == of_fin(j).count()
                && of_fin(i).zip(of_fin(j)).all(|(a, b)| same_brake(a, b))
        });
    }
    mirror
}

/// The active pairs of a case (disabled sections removed).
pub fn active_pairs(scenario: &Scenario, tables: &BrakeTables, case: &Case) -> Vec<ActivePair> {
    tables
        .pairs
        .iter()
        .filter(|p| !case.disabled.contains(&p.section))
        .map(|p| {
            let sec = &scenario.sections[p.section];
            let fin = &scenario.fins[p.fin];
            let alpha = fin.material.temp_coeff_per_k;
            let (mag_ref, fin_ref_rho) = match &p.law {
                PairLaw::Table { .. } => (REFERENCE_TEMPERATURE_C, 1.0),
                PairLaw::Measured {
                    fin_temp_c,
                    magnet_temp_c,
                    ..
                } => (
                    *magnet_temp_c,
                    (1.0 + alpha * (fin_temp_c - REFERENCE_TEMPERATURE_C)).max(0.05),
                ),
            };
            let br = remanence_ratio(sec.remanence_temp_coeff_per_k, case.magnet_temp_c, mag_ref);
            ActivePair {
                spec: p.clone(),
                remanence_ratio: br,
                fin_alpha_per_k: alpha,
                reference_resistivity_ratio: fin_ref_rho,
                force_factor: case.force_factor,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn section_end_factor_shortens_the_section() {
        // 20 poles of 50 mm with ℓ = 0.44 τ: 2.2 % less than a long section (the issue's
        // figure for 20–30-pole modules); ℓ < 0 brakes more; never negative; NaN propagates.
        assert!((section_end_factor(0.022, 1.0) - 0.978).abs() < 1e-12);
        assert!(section_end_factor(-0.01, 1.0) > 1.0);
        assert_eq!(section_end_factor(0.3, 1.0 / 0.2), 0.0);
        assert!(section_end_factor(f64::NAN, 1.0).is_nan());
    }

    #[test]
    fn remanence_ratio_linear() {
        // Br(80 °C)/Br(20 °C) = 1 − 0.0012·60 = 0.928.
        assert!((remanence_ratio(-0.0012, 80.0, 20.0) - 0.928).abs() < 1e-12);
    }

    /// The lookups reused for parts at the same conductivity give the force of the plain
    /// computation (both lookups for every part) bit for bit: the tower demo's pair, parts in
    /// runs of equal and of different conductivities, at several speeds of either sign.
    #[test]
    fn reused_lookups_match_the_plain_sum() {
        let s = crate::scenario::shipped("scenarios/tower-catch-brake.yaml");
        let tables = BrakeTables::build(&s).expect("tables");
        let pairs = active_pairs(&s, &tables, &s.cases[2]);
        let pair = &pairs[0];
        let PairLaw::Table {
            table,
            section_ends,
            active_height_m,
            inverse_section_length_per_m,
            ..
        } = &pair.spec.law
        else {
            panic!("a table law")
        };
        let parts = [
            (0.91, 0.013),
            (0.91, 0.05),
            (0.91, 0.05),
            (0.87, 0.05),
            (0.87, 0.05),
            (0.91, 0.05),
            (0.8, 0.021),
        ];
        for v in [-23.0f64, 0.4, 3.0, 11.7, 25.2] {
            let plain: f64 = parts
                .iter()
                .map(|&(inv_rho, part)| {
                    let sigma = pair.reference_resistivity_ratio * inv_rho;
                    table.force_per_area_pa(v.abs() * pair.reference_resistivity_ratio * inv_rho)
                        * part
                        * section_end_factor(
                            section_ends.total_m_scaled(v, sigma),
                            *inverse_section_length_per_m,
                        )
                })
                .sum();
            let r2 = pair.remanence_ratio * pair.remanence_ratio;
            let plain = pair.force_factor * r2 * plain * active_height_m;
            let plain = if v < 0.0 { -plain } else { plain };
            let reused = pair.force_over_parts_n(v, parts.iter().copied());
            assert_eq!(
                reused.to_bits(),
                plain.to_bits(),
                "{v} m/s: {reused} vs {plain}"
            );
        }
    }
}
