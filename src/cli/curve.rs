//! `eddyzone curve SCENARIO`: force–speed curves.

use super::error::{Error, EXIT_OK};
use super::{emit, load, temperature_option};
use clap::{Args, ValueEnum};
use eddyzone::curve::CurveOptions;
use eddyzone::report::{csv_out, json_out, terminal};
use eddyzone::study::Study;
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
    let study = Study::new(load(&a.scenario, None)?)?;
    let speeds = match &a.speeds {
        Some(t) => parse_speeds(t)?,
        None => study.default_speeds(),
    };
    let opts = CurveOptions {
        section: a.section.clone(),
        speeds_m_s: speeds,
        fin_temp_c: temperature_option("--fin-temp", &a.fin_temp)?,
        magnet_temp_c: temperature_option("--magnet-temp", &a.magnet_temp)?,
    };
    let c = study.curves(&opts)?;
    if c.is_empty() {
        let names: Vec<_> = study
            .scenario()
            .sections
            .iter()
            .map(|x| x.name.as_str())
            .collect();
        return Err(Error::Usage(format!(
            "--section: no section named '{}' meets a fin (sections: {})",
            a.section.clone().unwrap_or_default(),
            names.join(", ")
        )));
    }
    match a.format {
        Format::Csv => emit(&String::from_utf8_lossy(&csv_out::curves_csv(&c)?))?,
        Format::Json => emit(&(json_out::curves_json(&c)? + "\n"))?,
        Format::Table => emit(&terminal::curve_text(&study.scenario().name, &c))?,
    }
    Ok(EXIT_OK)
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
