//! Force–speed curves of each section × fin pair of a scenario, at given fin and magnet
//! temperatures (exact rescaling of the 20 °C model: σ·v and Br²), with the section's end length
//! and the model's uncertainty band ([`crate::physics::uncertainty`]) at every speed. A section
//! with its fin off-centre gives the off-centre drag ([`crate::physics::offset`]) and its lateral
//! force beside it; its critical speed, peak and band are those of the centred fin.

use crate::constants::REFERENCE_TEMPERATURE_C;
use crate::dynamics::model::{remanence_ratio, section_end_factor, BrakeTables, PairLaw};
use crate::dynamics::DynamicsError;
use crate::physics::{skin_depth_m, DragModel, ModelUncertainty, OffsetModel, SectionEndCurve};
use crate::scenario::Scenario;
use serde::Serialize;
use std::sync::Arc;

/// One point of a curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CurvePoint {
    /// m/s.
    pub speed_m_s: f64,
    /// Harmonic sum per m² of pole face, Pa (None for measured curves).
    pub force_per_area_pa: Option<f64>,
    /// Fundamental only, Pa (None for measured curves).
    pub force_per_area_fundamental_pa: Option<f64>,
    /// Per metre of overlap of a long section, N/m.
    pub force_per_m_n: f64,
    /// With the fin fully overlapping the section (min of the two lengths), N: per metre times
    /// that length times the section-end share 1 − ℓ/L, as the equations of motion use it.
    pub force_full_overlap_n: f64,
    /// The section's end length ℓ (entry plus exit), m (None for measured curves).
    pub section_end_length_m: Option<f64>,
    /// Lower edge of the model's uncertainty band, relative (e.g. −0.08; None for measured
    /// curves).
    pub band_low_fraction: Option<f64>,
    /// Upper edge of the band, relative (None for measured curves).
    pub band_high_fraction: Option<f64>,
    /// `force_full_overlap_n` at the band's lower edge, N (None for measured curves).
    pub force_full_overlap_low_n: Option<f64>,
    /// `force_full_overlap_n` at the band's upper edge, N (None for measured curves).
    pub force_full_overlap_high_n: Option<f64>,
    /// Lateral force on the fin along +y per metre of overlap of a long section, N/m (only for
    /// a fin off-centre; negative for a positive offset: towards the centre).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub lateral_per_m_n: Option<f64>,
    /// The lateral force with the fin fully overlapping, as `force_full_overlap_n`, N (only for
    /// a fin off-centre).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub lateral_full_overlap_n: Option<f64>,
}

/// The curve of one section × fin pair.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PairCurve {
    /// Section name.
    pub section: String,
    /// Fin name.
    pub fin: String,
    /// Peak of the force–speed curve, m/s.
    pub critical_speed_m_s: f64,
    /// Force per metre of overlap at the critical speed, N/m.
    pub peak_force_per_m_n: f64,
    /// Russell–Norsworthy factor of the fundamental (None for measured curves).
    pub edge_factor: Option<f64>,
    /// No-load gap-centre field of the fundamental, T (None for measured curves).
    pub gap_field_t: Option<f64>,
    /// Skin depth at the critical speed, m (None for measured curves).
    pub skin_depth_at_critical_m: Option<f64>,
    /// Low-speed force per metre of overlap per m/s, N·s/m² (None for measured curves).
    pub low_speed_coefficient_n_s_m2: Option<f64>,
    /// The points.
    pub points: Vec<CurvePoint>,
}

/// Options of a curve computation.
#[derive(Debug, Clone)]
pub struct CurveOptions {
    /// Only this section (by name; a repeated section's base name selects its copies).
    pub section: Option<String>,
    /// Speeds, m/s.
    pub speeds_m_s: Vec<f64>,
    /// Fin temperature, °C (default: the first case's).
    pub fin_temp_c: Option<f64>,
    /// Magnet temperature, °C (default: the first case's).
    pub magnet_temp_c: Option<f64>,
}

/// Default speed grid: 200 steps up to the larger of 3× the largest critical speed and the
/// scenario's speed bound, rounded to a tidy step.
pub fn default_speeds(scenario: &Scenario, tables: &BrakeTables) -> Vec<f64> {
    let vc = tables
        .pairs
        .iter()
        .map(|p| match &p.law {
            PairLaw::Table { model, .. } => model.critical_speed_m_s(),
            PairLaw::Measured { curve, .. } => curve.max_speed_m_s() / 3.0,
        })
        .fold(0.0, f64::max);
    let vmax = (3.0 * vc).max(crate::dynamics::model::speed_bound_m_s(scenario));
    let raw = vmax / 200.0;
    let mag = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 2.5, 5.0, 10.0]
        .iter()
        .map(|m| m * mag)
        .find(|s| *s >= raw)
        .unwrap_or(raw);
    (1..=200).map(|i| i as f64 * step).collect()
}

fn matches(name: &str, wanted: &str) -> bool {
    name == wanted
        || name
            .strip_prefix(wanted)
            .is_some_and(|r| r.starts_with('-') && r[1..].chars().all(|c| c.is_ascii_digit()))
}

/// Curves of every pair (or one section's pairs). The uncertainty band is computed once per
/// distinct design; it fails (naming the pair) when its extra edge solutions degenerate.
pub fn curves(
    scenario: &Scenario,
    tables: &BrakeTables,
    options: &CurveOptions,
) -> Result<Vec<PairCurve>, DynamicsError> {
    let mut bands: Vec<(Arc<DragModel>, Arc<ModelUncertainty>)> = Vec::new();
    let case = scenario.cases.first();
    let fin_t = options
        .fin_temp_c
        .or(case.map(|c| c.fin_temp_c))
        .unwrap_or(REFERENCE_TEMPERATURE_C);
    let mag_t = options
        .magnet_temp_c
        .or(case.map(|c| c.magnet_temp_c))
        .unwrap_or(REFERENCE_TEMPERATURE_C);
    let mut out = Vec::new();
    for p in &tables.pairs {
        let sec = &scenario.sections[p.section];
        let fin = &scenario.fins[p.fin];
        if let Some(w) = &options.section {
            if !matches(&sec.name, w) {
                continue;
            }
        }
        let full = p.overlap.full_length_m();
        let rho = fin.material.resistivity_ratio(fin_t);
        match &p.law {
            PairLaw::Table {
                table,
                model,
                active_height_m,
                section_ends,
                inverse_section_length_per_m,
                ..
            } => {
                let band = match bands.iter().find(|(m, _)| Arc::ptr_eq(m, model)) {
                    Some((_, b)) => b.clone(),
                    None => {
                        let b = Arc::new(
                            ModelUncertainty::new(model)
                                .map_err(|source| DynamicsError::physics(fin, sec, source))?,
                        );
                        bands.push((model.clone(), b.clone()));
                        b
                    }
                };
                let sr = 1.0 / rho;
                let br = remanence_ratio(
                    sec.remanence_temp_coeff_per_k,
                    mag_t,
                    REFERENCE_TEMPERATURE_C,
                );
                let design = Design {
                    model,
                    offset: table.offset(),
                    band: &band,
                    ends: section_ends,
                    height_m: *active_height_m,
                    inverse_section_length_per_m: *inverse_section_length_per_m,
                    fin_length_m: fin.length_m,
                };
                out.push(model_curve(
                    &sec.name,
                    &fin.name,
                    &design,
                    full,
                    sr,
                    br,
                    &options.speeds_m_s,
                ));
            }
            PairLaw::Measured {
                curve,
                fin_temp_c,
                magnet_temp_c,
            } => {
                let sr = fin.material.resistivity_ratio(*fin_temp_c) / rho;
                let br = remanence_ratio(sec.remanence_temp_coeff_per_k, mag_t, *magnet_temp_c);
                let f = |v: f64| br * br * curve.force_per_m_n(v * sr);
                let points: Vec<CurvePoint> = options
                    .speeds_m_s
                    .iter()
                    .map(|&v| CurvePoint {
                        speed_m_s: v,
                        force_per_area_pa: None,
                        force_per_area_fundamental_pa: None,
                        force_per_m_n: f(v),
                        force_full_overlap_n: f(v) * full,
                        section_end_length_m: None,
                        band_low_fraction: None,
                        band_high_fraction: None,
                        force_full_overlap_low_n: None,
                        force_full_overlap_high_n: None,
                        lateral_per_m_n: None,
                        lateral_full_overlap_n: None,
                    })
                    .collect();
                // Peak of the measured data (a monotone interpolant peaks at a data point).
                let (vc, fc) = curve
                    .points()
                    .map(|(v, _)| (v / sr, f(v / sr)))
                    .fold((0.0, 0.0), |a, b| if b.1 > a.1 { b } else { a });
                out.push(PairCurve {
                    section: sec.name.clone(),
                    fin: fin.name.clone(),
                    critical_speed_m_s: vc,
                    peak_force_per_m_n: fc,
                    edge_factor: None,
                    gap_field_t: None,
                    skin_depth_at_critical_m: None,
                    low_speed_coefficient_n_s_m2: None,
                    points,
                });
            }
        }
    }
    Ok(out)
}

/// What a model curve is drawn from.
struct Design<'a> {
    model: &'a DragModel,
    /// The off-centre model of a fin off-centre.
    offset: Option<&'a OffsetModel>,
    band: &'a ModelUncertainty,
    ends: &'a SectionEndCurve,
    height_m: f64,
    inverse_section_length_per_m: f64,
    fin_length_m: f64,
}

fn model_curve(
    section: &str,
    fin: &str,
    d: &Design<'_>,
    full: f64,
    sigma_ratio: f64,
    br: f64,
    speeds: &[f64],
) -> PairCurve {
    let (model, height) = (d.model, d.height_m);
    let k = br * br;
    let points = speeds
        .iter()
        .map(|&v| {
            let u = v * sigma_ratio;
            let (f, f1) = match d.offset {
                Some(o) => (
                    k * o.drag_per_area_pa(u),
                    k * o.drag_per_area_fundamental_pa(u),
                ),
                None => (
                    k * model.force_per_area_pa(u),
                    k * model.force_per_area_fundamental_pa(u),
                ),
            };
            let ell = d.ends.total_m_scaled(v, sigma_ratio);
            let share = section_end_factor(ell, d.inverse_section_length_per_m);
            let whole = f * height * full * share;
            let lateral = d.offset.map(|o| k * o.lateral_per_area_pa(u) * height);
            let band = d.band.band_for_fin(v, sigma_ratio, d.fin_length_m);
            CurvePoint {
                speed_m_s: v,
                force_per_area_pa: Some(f),
                force_per_area_fundamental_pa: Some(f1),
                force_per_m_n: f * height,
                force_full_overlap_n: whole,
                section_end_length_m: Some(ell),
                band_low_fraction: Some(band.low),
                band_high_fraction: Some(band.high),
                force_full_overlap_low_n: Some(whole * (1.0 + band.low)),
                force_full_overlap_high_n: Some(whole * (1.0 + band.high)),
                lateral_per_m_n: lateral,
                lateral_full_overlap_n: lateral.map(|l| l * full * share),
            }
        })
        .collect();
    let vc = model.critical_speed_m_s() / sigma_ratio;
    let k1 = std::f64::consts::PI / model.geometry().pole_pitch_m;
    let sigma = model.conductivity_s_m() * sigma_ratio;
    PairCurve {
        section: section.to_string(),
        fin: fin.to_string(),
        critical_speed_m_s: vc,
        peak_force_per_m_n: k
            * d.offset
                .map_or(model.force_per_area_pa(vc * sigma_ratio), |o| {
                    o.drag_per_area_pa(vc * sigma_ratio)
                })
            * height,
        edge_factor: Some(model.edge_factor()),
        gap_field_t: Some(model.gap_field_t() * br),
        skin_depth_at_critical_m: Some(skin_depth_m(k1 * vc, sigma)),
        low_speed_coefficient_n_s_m2: Some(
            k * d.offset.map_or(model.low_speed_coefficient_pa_s_m(), |o| {
                o.low_speed_drag_pa_s_m()
            }) * sigma_ratio
                * height,
        ),
        points,
    }
}
