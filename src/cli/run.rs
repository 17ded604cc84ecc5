//! `eddyzone run SCENARIO`: the vehicle's run through the zone for every case.

use super::{load, make_dir, select_cases, write_file};
use crate::dynamics::{simulate_case, BrakeTables, RunOptions, RunResult, Sampling};
use crate::error::Error;
use crate::report::text::{num, Table};
use crate::report::{csv_out, file_stem, json_out};
use crate::scenario::Scenario;
use clap::Args;
use rayon::prelude::*;
use std::path::PathBuf;

/// Options of `run`.
#[derive(Debug, Args)]
pub struct RunArgs {
    /// The scenario file.
    pub scenario: PathBuf,
    /// Print JSON instead of the table.
    #[arg(long)]
    pub json: bool,
    /// Run only this case.
    #[arg(long)]
    pub case: Option<String>,
    /// Write one profile CSV per case into this folder.
    #[arg(long)]
    pub profile: Option<PathBuf>,
    /// Profile sample interval in seconds.
    #[arg(long, default_value_t = 0.001)]
    pub dt: f64,
}

/// Runs every case of a scenario in parallel (both cores), results in case order.
pub fn run_all(
    s: &Scenario,
    tables: &BrakeTables,
    options: &RunOptions,
) -> Result<Vec<RunResult>, Error> {
    s.cases
        .par_iter()
        .map(|c| simulate_case(s, tables, c, options).map_err(|e| Error::Compute(e.to_string())))
        .collect()
}

/// The force tables of a scenario, with the error mapped.
pub fn tables(s: &Scenario) -> Result<BrakeTables, Error> {
    BrakeTables::build(s).map_err(|e| Error::Compute(e.to_string()))
}

/// The readable table of run results.
pub fn run_table(results: &[RunResult]) -> String {
    let mut t = Table::new(&[
        "case",
        "outcome",
        "entry_m_s",
        "exit_m_s",
        "min_m_s",
        "peak_decel_g",
        "at_s",
        "at_m",
        "onset_g_s",
        "in_zone_s",
        "energy_kj",
        "residual_j",
        "steps",
        "rhs",
    ]);
    for r in results {
        t.row(vec![
            r.case.clone(),
            r.outcome.name().into(),
            num(r.entry_speed_m_s, 2),
            num(r.exit_speed_m_s, 2),
            num(r.min_speed_m_s, 2),
            num(r.peak_decel_g(), 3),
            num(r.peak_decel_time_s, 3),
            num(r.peak_decel_position_m, 2),
            num(r.peak_onset_g_s, 2),
            num(r.time_in_zone_s, 3),
            num(Some(r.braking_energy_j / 1e3), 1),
            format!("{:.1e}", r.energy_residual_j),
            r.steps.to_string(),
            r.rhs_evaluations.to_string(),
        ]);
    }
    t.render()
}

/// Runs `run`.
pub fn execute(a: &RunArgs) -> Result<i32, Error> {
    if !(a.dt.is_finite() && a.dt >= 1e-5 && a.dt <= 1.0) {
        return Err(Error::Usage(format!(
            "--dt: {} s is outside 1e-5 to 1 s",
            a.dt
        )));
    }
    let mut s = load(&a.scenario)?;
    let mut out = String::new();
    select_cases(&mut s, &a.case)?;
    let full = a.profile.is_some();
    let options = RunOptions {
        sample_dt_s: a.dt,
        sampling: if full {
            Sampling::Full
        } else {
            Sampling::ZoneOnly
        },
        ..RunOptions::default()
    };
    let results = run_all(&s, &tables(&s)?, &options)?;
    if let Some(dir) = &a.profile {
        make_dir(dir)?;
        for r in &results {
            let bytes =
                csv_out::profile_csv(&r.samples, &[]).map_err(|e| Error::Compute(e.to_string()))?;
            write_file(&dir.join(format!("{}.csv", file_stem(&r.case))), &bytes)?;
        }
    }
    if a.json {
        let j = json_out::RunJson::new(&s.name, &results);
        outln!(
            out,
            "{}",
            serde_json::to_string_pretty(&j).map_err(|e| Error::Compute(e.to_string()))?
        );
    } else {
        outln!(
            out,
            "{} — run through the zone ({} case{})",
            s.name,
            results.len(),
            if results.len() == 1 { "" } else { "s" }
        );
        outp!(out, "{}", run_table(&results));
        for r in &results {
            for w in &r.warnings {
                outln!(out, "warning: {}: {w}", r.case);
            }
        }
    }
    super::emit(&out)?;
    Ok(crate::error::EXIT_OK)
}
