//! CSV writers: force–speed curves and run profiles.

use super::{unique_stems, OutputFile};
use crate::checks::rider::profile_columns;
use crate::curve::PairCurve;
use crate::dynamics::{RunResult, Sample};
use crate::numeric::map_in_parallel;
use crate::scenario::Rider;
use crate::thermal::{CaseHeat, TrackProfile};
use std::fmt::Write as _;

/// The curve CSV header.
pub const CURVE_HEADER: [&str; 12] = [
    "section",
    "fin",
    "speed_m_s",
    "force_per_area_pa",
    "force_per_area_fundamental_pa",
    "force_per_m_n",
    "force_full_overlap_n",
    "section_end_length_m",
    "band_low_fraction",
    "band_high_fraction",
    "force_full_overlap_low_n",
    "force_full_overlap_high_n",
];

/// The run profile CSV header.
pub const PROFILE_HEADER: [&str; 9] = [
    "t_s",
    "s_m",
    "v_m_s",
    "a_m_s2",
    "decel_g",
    "brake_force_n",
    "gravity_force_n",
    "resistance_force_n",
    "overlap_m",
];

fn opt(x: Option<f64>) -> String {
    x.map(|v| format!("{v}")).unwrap_or_default()
}

/// The curve CSV's columns of the lateral force (after [`CURVE_HEADER`], only when some fin is
/// off-centre).
pub const CURVE_LATERAL_HEADER: [&str; 2] = ["lateral_per_m_n", "lateral_full_overlap_n"];

/// All curves as one CSV.
pub fn curves_csv(curves: &[PairCurve]) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let lateral = curves
        .iter()
        .any(|c| c.points.iter().any(|p| p.lateral_per_m_n.is_some()));
    let mut header = CURVE_HEADER.to_vec();
    if lateral {
        header.extend(CURVE_LATERAL_HEADER);
    }
    w.write_record(&header)?;
    for c in curves {
        for p in &c.points {
            let mut row = vec![
                c.section.clone(),
                c.fin.clone(),
                format!("{}", p.speed_m_s),
                opt(p.force_per_area_pa),
                opt(p.force_per_area_fundamental_pa),
                format!("{}", p.force_per_m_n),
                format!("{}", p.force_full_overlap_n),
                opt(p.section_end_length_m),
                opt(p.band_low_fraction),
                opt(p.band_high_fraction),
                opt(p.force_full_overlap_low_n),
                opt(p.force_full_overlap_high_n),
            ];
            if lateral {
                row.extend([opt(p.lateral_per_m_n), opt(p.lateral_full_overlap_n)]);
            }
            w.write_record(&row)?;
        }
    }
    w.into_inner().map_err(|e| csv::Error::from(e.into_error()))
}

/// A run profile as CSV; `extra` adds columns (name, value per sample).
pub fn profile_csv(
    samples: &[Sample],
    extra: &[(&str, Vec<Option<f64>>)],
) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header: Vec<&str> = PROFILE_HEADER.to_vec();
    header.extend(extra.iter().map(|e| e.0));
    w.write_record(&header)?;
    // One buffer per column, reused row after row (no allocation per number).
    let mut rec = vec![String::new(); header.len()];
    for (i, s) in samples.iter().enumerate() {
        let values = [
            s.t_s,
            s.s_m,
            s.v_m_s,
            s.a_m_s2,
            s.decel_g,
            s.brake_force_n,
            s.gravity_force_n,
            s.resistance_force_n,
            s.overlap_m,
        ];
        let cells = values
            .iter()
            .map(|&v| Some(v))
            .chain(extra.iter().map(|e| e.1.get(i).copied().flatten()));
        for (field, value) in rec.iter_mut().zip(cells) {
            field.clear();
            if let Some(v) = value {
                // Writing to a String cannot fail.
                let _ = write!(field, "{v}");
            }
        }
        w.write_record(&rec)?;
    }
    w.into_inner().map_err(|e| csv::Error::from(e.into_error()))
}

/// One profile CSV per run, named `<prefix><case>.csv`, with the felt acceleration raw and
/// filtered on the axes x and z ([`profile_columns`]) after the sample columns.
pub fn run_profiles(
    results: &[RunResult],
    rider: &Rider,
    prefix: &str,
) -> Result<Vec<OutputFile>, csv::Error> {
    let stems = unique_stems(&results.iter().map(|r| &r.case).collect::<Vec<_>>());
    let named: Vec<_> = results.iter().zip(stems).collect();
    map_in_parallel(&named, |(r, stem)| {
        let cols = profile_columns(r, rider);
        let extra: Vec<(&str, Vec<Option<f64>>)> =
            cols.iter().map(|(n, v)| (n.as_str(), v.clone())).collect();
        Ok(OutputFile {
            name: format!("{prefix}{stem}.csv"),
            bytes: profile_csv(&r.samples, &extra)?,
        })
    })
}

/// Temperature along one track fin after the last pass: s, rise of the last pass, temperature.
pub fn track_fin_csv(p: &TrackProfile) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(["s_m", "rise_k", "temp_c"])?;
    for ((s, t), r) in p.temps.iter().zip(&p.rise_k) {
        w.write_record([format!("{s}"), format!("{r}"), format!("{t}")])?;
    }
    w.into_inner().map_err(|e| csv::Error::from(e.into_error()))
}

/// The files of `heat --profile`: per case the last pass (`<case>.csv`, with the temperature of
/// each track fin at the vehicle front's position as a column `<fin>_temp_c`) and the
/// temperature along each track fin (`fin_<fin>_<case>.csv`).
pub fn heat_profiles(heats: &[CaseHeat]) -> Result<Vec<OutputFile>, csv::Error> {
    let mut files: Vec<(String, Vec<u8>)> = Vec::new();
    for h in heats {
        let Some(run) = &h.last_run else { continue };
        let names: Vec<String> = h
            .track_profiles
            .iter()
            .map(|p| format!("{}_temp_c", p.fin))
            .collect();
        // Empty where the vehicle front is not over the fin: there is no temperature there.
        let extra: Vec<(&str, Vec<Option<f64>>)> = h
            .track_profiles
            .iter()
            .zip(&names)
            .map(|(p, name)| {
                (
                    name.as_str(),
                    run.samples.iter().map(|s| p.temp_at(s.s_m)).collect(),
                )
            })
            .collect();
        files.push((h.case.clone(), profile_csv(&run.samples, &extra)?));
        for p in &h.track_profiles {
            files.push((format!("fin_{}_{}", p.fin, h.case), track_fin_csv(p)?));
        }
    }
    let stems = unique_stems(&files.iter().map(|f| &f.0).collect::<Vec<_>>());
    Ok(files
        .into_iter()
        .zip(stems)
        .map(|((_, bytes), stem)| OutputFile {
            name: format!("{stem}.csv"),
            bytes,
        })
        .collect())
}
