//! `eddyzone heat SCENARIO`: fin heating over a pass and over the duty cycle of every case.

use super::emit;
use super::error::{Error, EXIT_OK};
use super::progress::Bar;
use clap::Args;
use eddyzone::report::folder::{write_folder, Placement};
use eddyzone::report::json_out::{pretty, HeatJson};
use eddyzone::report::{csv_out, terminal};
use eddyzone::study::Study;
use eddyzone::thermal::HeatOptions;
use std::path::PathBuf;

/// Options of `heat`.
#[derive(Debug, Args)]
pub struct HeatArgs {
    /// The scenario, JSON output, one case.
    #[command(flatten)]
    pub input: super::CaseInput,
    /// Write the last pass of each case (`<case>.csv`, with a temperature column per track fin)
    /// and the temperature along each track fin (`fin_<fin>_<case>.csv`) into this folder.
    #[arg(long)]
    pub profile: Option<PathBuf>,
}

/// Runs `heat`.
pub fn execute(a: &HeatArgs) -> Result<i32, Error> {
    let study = Study::new(a.input.load()?)?;
    let bar = Bar::new();
    let heats = study.heat(&HeatOptions::default(), &bar);
    bar.finish();
    let heats = heats?;
    if let Some(dir) = &a.profile {
        write_folder(dir, &csv_out::heat_profiles(&heats)?, Placement::Merge)?;
    }
    let s = study.scenario();
    if a.input.json {
        emit(&pretty(&HeatJson::new(s, &heats))?)?;
    } else {
        emit(&terminal::heat_text(
            s,
            &heats,
            &study.heat_warnings(&heats),
        ))?;
    }
    Ok(EXIT_OK)
}
