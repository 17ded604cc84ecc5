//! `eddyzone plan SCENARIO`: the shortest module layout that passes every case (exit 1 when
//! none within the plan's maximum length does).

use super::error::{Error, EXIT_LIMIT_FAILED, EXIT_OK};
use super::progress::Bar;
use super::{emit, load};
use clap::Args;
use eddyzone::plan::{plan, PlanOptions};
use eddyzone::report::json_out::{pretty, PlanJson};
use eddyzone::report::{terminal::plan_text, write_file, OutputError};
use eddyzone::scenario::as_written::planned_yaml;
use eddyzone::scenario::validate::read_input;
use eddyzone::study::{Progress, Silent};
use std::path::PathBuf;

/// Options of `plan`.
#[derive(Debug, Args)]
pub struct PlanArgs {
    /// The scenario file (with a `plan:` block).
    pub scenario: PathBuf,
    /// Print JSON instead of the tables.
    #[arg(long)]
    pub json: bool,
    /// Write a complete scenario with the planned sections to this file.
    #[arg(long)]
    pub write: Option<PathBuf>,
}

/// Runs `plan`.
pub fn execute(a: &PlanArgs) -> Result<i32, Error> {
    let s = load(&a.scenario, None)?;
    if s.plan.is_none() {
        return Err(Error::Usage(format!(
            "{}: no `plan:` block to search with",
            a.scenario.display()
        )));
    }
    let bar = Bar::new();
    let progress: &dyn Progress = if a.json { &Silent } else { &bar };
    let r = plan(&s, &PlanOptions::default(), progress);
    bar.finish();
    let r = r?;
    if let (Some(path), true) = (&a.write, r.feasible) {
        let units = read_input(&a.scenario).ok();
        let yaml = planned_yaml(&r.scenario, units.as_deref()).map_err(OutputError::from)?;
        write_file(path, yaml.as_bytes())?;
    }
    if a.json {
        emit(&pretty(&PlanJson::new(&r))?)?;
    } else {
        emit(&plan_text(&s.name, &r))?;
    }
    Ok(if r.feasible {
        EXIT_OK
    } else {
        EXIT_LIMIT_FAILED
    })
}
