//! `eddyzone run SCENARIO`: the vehicle's run through the zone for every case.

use super::emit;
use super::error::{Error, EXIT_OK};
use clap::Args;
use eddyzone::dynamics::{RunOptions, Sampling};
use eddyzone::report::folder::{write_folder, Placement};
use eddyzone::report::json_out::{pretty, RunJson};
use eddyzone::report::{csv_out, loads_out, terminal};
use eddyzone::study::Study;
use std::path::PathBuf;

/// Options of `run`.
#[derive(Debug, Args)]
pub struct RunArgs {
    /// The scenario, JSON output, one case.
    #[command(flatten)]
    pub input: super::CaseInput,
    /// Write one profile CSV per case into this folder.
    #[arg(long)]
    pub profile: Option<PathBuf>,
    /// Print the loads of every section for every case (peak force, impulse, energy), not only
    /// the largest over the cases.
    #[arg(long)]
    pub sections: bool,
    /// Profile sample interval in seconds.
    #[arg(long, default_value_t = 0.001)]
    pub dt: f64,
}

/// Runs `run`.
pub fn execute(a: &RunArgs) -> Result<i32, Error> {
    if !(a.dt.is_finite() && a.dt >= 1e-5 && a.dt <= 1.0) {
        return Err(Error::Usage(format!(
            "--dt: {} s is outside 1e-5 to 1 s",
            a.dt
        )));
    }
    let study = Study::new(a.input.load()?)?;
    let options = RunOptions {
        sample_dt_s: a.dt,
        sampling: if a.profile.is_some() {
            Sampling::Full
        } else {
            Sampling::ZoneOnly
        },
        section_loads: true,
        ..RunOptions::default()
    };
    let results = study.run(&options)?;
    if let Some(dir) = &a.profile {
        write_folder(
            dir,
            &csv_out::run_profiles(&results, &study.scenario().rider, "")?,
            Placement::Merge,
        )?;
    }
    let name = &study.scenario().name;
    if a.input.json {
        emit(&pretty(&RunJson::new(name, &results))?)?;
    } else {
        emit(&terminal::run_text(
            name,
            &results,
            &study.run_warnings(&results),
        ))?;
        emit(&loads_out::loads_text(&results, a.sections))?;
    }
    Ok(EXIT_OK)
}
