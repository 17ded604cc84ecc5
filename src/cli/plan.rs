//! `eddyzone plan SCENARIO`: the module layout that passes every case — the shortest one, or
//! the one with the largest worst-case margin at a given length (exit 1 when none is found or
//! none can exist).

use super::error::{Error, EXIT_LIMIT_FAILED, EXIT_OK};
use super::progress::Bar;
use super::{emit, load};
use clap::{Args, ValueEnum};
use eddyzone::plan::{plan, Objective, PlanOptions};
use eddyzone::report::json_out::{pretty, PlanJson};
use eddyzone::report::{terminal::plan_text, write_file, OutputError};
use eddyzone::scenario::as_written::planned_yaml;
use eddyzone::scenario::validate::read_input;
use eddyzone::study::{Progress, Silent};
use std::path::PathBuf;

/// What `plan` optimises.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ObjectiveArg {
    /// The shortest zone, then the fewest modules.
    Shortest,
    /// The largest worst-case margin within `--length` of the zone start.
    Margin,
}

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
    /// Overwrite the `--write` file when it exists.
    #[arg(long)]
    pub force: bool,
    /// What to optimise.
    #[arg(long, value_enum, default_value_t = ObjectiveArg::Shortest)]
    pub objective: ObjectiveArg,
    /// Zone length for `--objective margin` (m, or with a unit: "64.5 m").
    #[arg(long)]
    pub length: Option<String>,
    /// Most candidate layouts to simulate (default: 64 × settings × slots plus the local pass).
    #[arg(long)]
    pub max_candidates: Option<usize>,
    /// Wall-clock cap on the search, s (default: none).
    #[arg(long)]
    pub max_seconds: Option<f64>,
}

/// The objective the options ask for.
fn objective(a: &PlanArgs) -> Result<Objective, Error> {
    match (a.objective, &a.length) {
        (ObjectiveArg::Shortest, None) => Ok(Objective::Shortest),
        (ObjectiveArg::Shortest, Some(_)) => Err(Error::Usage(
            "--length: only with --objective margin".into(),
        )),
        (ObjectiveArg::Margin, None) => Err(Error::Usage(
            "--objective margin needs --length (e.g. --length \"64.5 m\")".into(),
        )),
        (ObjectiveArg::Margin, Some(t)) => {
            let t = t.trim();
            let text = if t.parse::<f64>().is_ok() {
                format!("{t} m")
            } else {
                t.to_string()
            };
            let length_m = eddyzone::units::from_text(eddyzone::units::Kind::Length, &text)
                .map_err(|e| Error::Usage(format!("--length: {e}")))?;
            if !(length_m.is_finite() && length_m > 0.0) {
                return Err(Error::Usage(format!(
                    "--length: '{t}' is not a positive length"
                )));
            }
            Ok(Objective::Margin { length_m })
        }
    }
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
    if let Some(path) = &a.write {
        if path.exists() && !a.force {
            return Err(Error::Usage(format!(
                "--write: {} exists; add --force to overwrite it",
                path.display()
            )));
        }
    }
    if a.max_seconds.is_some_and(|t| !(t.is_finite() && t > 0.0)) {
        return Err(Error::Usage(
            "--max-seconds: must be a positive number".into(),
        ));
    }
    let options = PlanOptions {
        objective: objective(a)?,
        max_candidates: a.max_candidates,
        max_seconds: a.max_seconds,
        ..PlanOptions::default()
    };
    let bar = Bar::new();
    let progress: &dyn Progress = if a.json { &Silent } else { &bar };
    let r = plan(&s, &options, progress);
    bar.finish();
    let r = r?;
    match (&a.write, r.feasible()) {
        (Some(path), Some(p)) => {
            let units = read_input(&a.scenario).ok();
            let yaml = planned_yaml(&p.scenario, units.as_deref()).map_err(OutputError::from)?;
            write_file(path, yaml.as_bytes())?;
            eprintln!(
                "wrote {}: {} planned module(s) in place of the scenario's {} section(s)",
                path.display(),
                p.module_count,
                s.sections.len()
            );
        }
        (Some(path), None) => {
            eprintln!("nothing written to {}: no feasible layout", path.display())
        }
        (None, _) => {}
    }

    if a.json {
        emit(&pretty(&PlanJson::new(&r))?)?;
    } else {
        emit(&plan_text(&s.name, &r))?;
    }
    Ok(if r.feasible().is_some() {
        EXIT_OK
    } else {
        EXIT_LIMIT_FAILED
    })
}
