//! `eddyzone curve SCENARIO`: force–speed curves.

use super::{load, temperature_option};
use crate::curve::{curves, default_speeds, CurveOptions};
use crate::dynamics::BrakeTables;
use crate::error::Error;
use crate::report::text::{num, Table};
use crate::report::{csv_out, json_out};
use clap::{Args, ValueEnum};
use std::path::PathBuf;

/// Output formats of `curve`.
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum Format {
    /// A readable table.
    Table,
    /// CSV, one row per point.
    Csv,
    /// JSON, one object per section × fin.
    Json,
}

/// Options of `curve`.
#[derive(Debug, Args)]
pub struct CurveArgs {
    /// The scenario file.
    pub scenario: PathBuf,
    /// Only this section (a repeated section's base name selects its copies).
    #[arg(long)]
    pub section: Option<String>,
    /// Speeds in m/s as FROM:TO:STEP (default: 200 steps up to 3× the critical speed or the run's top speed).
    #[arg(long)]
    pub speeds: Option<String>,
    /// Fin temperature (°C, or with a unit: "318 K"); default: the first case's.
    #[arg(long)]
    pub fin_temp: Option<String>,
    /// Magnet temperature (°C, or with a unit); default: the first case's.
    #[arg(long)]
    pub magnet_temp: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
}

/// Parses FROM:TO:STEP.
pub fn parse_speeds(text: &str) -> Result<Vec<f64>, Error> {
    let bad = || {
        Error::Usage(format!("--speeds: '{text}' is not FROM:TO:STEP in m/s with 0 ≤ FROM ≤ TO and STEP > 0 (e.g. 0.5:60:0.5)"))
    };
    let parts: Vec<f64> = text
        .split(':')
        .map(|p| p.trim().parse::<f64>())
        .collect::<Result<_, _>>()
        .map_err(|_| bad())?;
    let [from, to, step] = parts[..] else {
        return Err(bad());
    };
    if !(from.is_finite()
        && to.is_finite()
        && step.is_finite()
        && from >= 0.0
        && to >= from
        && step > 0.0)
    {
        return Err(bad());
    }
    let n = ((to - from) / step + 1e-9).floor() as usize + 1;
    if n > 1_000_000 {
        return Err(Error::Usage("--speeds: more than a million points".into()));
    }
    Ok((0..n).map(|i| from + i as f64 * step).collect())
}

/// Runs `curve`.
pub fn execute(a: &CurveArgs) -> Result<i32, Error> {
    let s = load(&a.scenario)?;
    let mut out = String::new();
    let tables = BrakeTables::build(&s).map_err(|e| Error::Compute(e.to_string()))?;
    let speeds = match &a.speeds {
        Some(t) => parse_speeds(t)?,
        None => default_speeds(&s, &tables),
    };
    let opts = CurveOptions {
        section: a.section.clone(),
        speeds_m_s: speeds,
        fin_temp_c: temperature_option("--fin-temp", &a.fin_temp)?,
        magnet_temp_c: temperature_option("--magnet-temp", &a.magnet_temp)?,
    };
    let c = curves(&s, &tables, &opts);
    if c.is_empty() {
        let names: Vec<_> = s.sections.iter().map(|x| x.name.as_str()).collect();
        return Err(Error::Usage(format!(
            "--section: no section named '{}' meets a fin (sections: {})",
            a.section.clone().unwrap_or_default(),
            names.join(", ")
        )));
    }
    match a.format {
        Format::Csv => {
            let bytes = csv_out::curves_csv(&c).map_err(|e| Error::Compute(e.to_string()))?;
            outp!(out, "{}", String::from_utf8_lossy(&bytes));
        }
        Format::Json => outln!(
            out,
            "{}",
            json_out::curves_json(&c).map_err(|e| Error::Compute(e.to_string()))?
        ),
        Format::Table => {
            outln!(out, "{} — force–speed curves", s.name);
            let mut t = Table::new(&[
                "section",
                "fin",
                "critical_speed_m_s",
                "peak_force_per_m_n",
                "edge_factor",
                "gap_field_t",
                "skin_depth_at_critical_mm",
            ]);
            for p in &c {
                t.row(vec![
                    p.section.clone(),
                    p.fin.clone(),
                    num(Some(p.critical_speed_m_s), 3),
                    num(Some(p.peak_force_per_m_n), 1),
                    num(p.edge_factor, 4),
                    num(p.gap_field_t, 4),
                    num(p.skin_depth_at_critical_m.map(|d| d * 1e3), 2),
                ]);
            }
            outp!(out, "{}", t.render());
            // Points of the first pair of each distinct section design (repeated copies share one curve).
            let mut seen: Vec<(String, String)> = Vec::new();
            for p in &c {
                let base = (
                    p.section
                        .split('-')
                        .next()
                        .unwrap_or(&p.section)
                        .to_string(),
                    p.fin.split('-').next().unwrap_or(&p.fin).to_string(),
                );
                if seen.contains(&base) {
                    continue;
                }
                seen.push(base);
                outln!(out, "\n{} × {}", p.section, p.fin);
                let mut t = Table::new(&[
                    "speed_m_s",
                    "force_per_area_pa",
                    "fundamental_pa",
                    "force_per_m_n",
                    "force_full_overlap_n",
                ]);
                let stride = (p.points.len() / 25).max(1);
                for q in p.points.iter().step_by(stride) {
                    t.row(vec![
                        num(Some(q.speed_m_s), 2),
                        num(q.force_per_area_pa, 1),
                        num(q.force_per_area_fundamental_pa, 1),
                        num(Some(q.force_per_m_n), 1),
                        num(Some(q.force_full_overlap_n), 1),
                    ]);
                }
                outp!(out, "{}", t.render());
            }
        }
    }
    super::emit(&out)?;
    Ok(crate::error::EXIT_OK)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn speeds_parse() {
        let v = parse_speeds("0.5:2:0.5").unwrap();
        assert_eq!(v, vec![0.5, 1.0, 1.5, 2.0]);
        assert!(parse_speeds("2:1:0.5").is_err());
        assert!(parse_speeds("0:1:0").is_err());
        assert!(parse_speeds("a:b").is_err());
        assert!(parse_speeds("0:nan:1").is_err());
    }
}
