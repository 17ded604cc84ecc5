//! CSV writers: force–speed curves and run profiles.

use crate::curve::PairCurve;
use crate::dynamics::Sample;

/// The curve CSV header.
pub const CURVE_HEADER: [&str; 7] = [
    "section",
    "fin",
    "speed_m_s",
    "force_per_area_pa",
    "force_per_area_fundamental_pa",
    "force_per_m_n",
    "force_full_overlap_n",
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

/// All curves as one CSV.
pub fn curves_csv(curves: &[PairCurve]) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(CURVE_HEADER)?;
    for c in curves {
        for p in &c.points {
            w.write_record([
                c.section.clone(),
                c.fin.clone(),
                format!("{}", p.speed_m_s),
                opt(p.force_per_area_pa),
                opt(p.force_per_area_fundamental_pa),
                format!("{}", p.force_per_m_n),
                format!("{}", p.force_full_overlap_n),
            ])?;
        }
    }
    w.into_inner().map_err(|e| csv::Error::from(e.into_error()))
}

/// A run profile as CSV; `extra` adds columns (name, value per sample).
pub fn profile_csv(samples: &[Sample], extra: &[(&str, Vec<f64>)]) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header: Vec<&str> = PROFILE_HEADER.to_vec();
    header.extend(extra.iter().map(|e| e.0));
    w.write_record(&header)?;
    for (i, s) in samples.iter().enumerate() {
        let mut rec = vec![
            format!("{}", s.t_s),
            format!("{}", s.s_m),
            format!("{}", s.v_m_s),
            format!("{}", s.a_m_s2),
            format!("{}", s.decel_g),
            format!("{}", s.brake_force_n),
            format!("{}", s.gravity_force_n),
            format!("{}", s.resistance_force_n),
            format!("{}", s.overlap_m),
        ];
        for e in extra {
            rec.push(e.1.get(i).map(|v| format!("{v}")).unwrap_or_default());
        }
        w.write_record(&rec)?;
    }
    w.into_inner().map_err(|e| csv::Error::from(e.into_error()))
}
