//! `eddyzone plan SCENARIO`: the shortest module layout that passes every case (exit 1 when
//! none within the plan's maximum length does).

use super::{emit, load, write_file};
use crate::error::{Error, EXIT_LIMIT_FAILED, EXIT_OK};
use crate::plan::{plan, PlanOptions, PlanResult};
use crate::report::text::{num, Table};
use crate::scenario::write::to_yaml;
use clap::Args;
use serde::Serialize;
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

/// One module in the JSON output.
#[derive(Debug, Serialize)]
pub struct ModuleJson {
    /// m.
    pub start_m: f64,
    /// m.
    pub clearance_m: f64,
}

/// One binding check in the JSON output.
#[derive(Debug, Serialize)]
pub struct BindingJson {
    /// Check name.
    pub check: String,
    /// Binding case.
    pub case: String,
    /// Margin in the check's unit.
    pub margin: Option<f64>,
}

/// The JSON output of `plan`.
#[derive(Debug, Serialize)]
pub struct PlanJson {
    /// A layout passed every case.
    pub feasible: bool,
    /// m.
    pub zone_length_m: f64,
    /// Modules.
    pub modules: Vec<ModuleJson>,
    /// Binding case and margin of each check.
    pub binding: Vec<BindingJson>,
    /// Infeasible: which constraint binds.
    pub reason: Option<String>,
    /// Candidates simulated.
    pub candidates_simulated: usize,
}

/// JSON form of a plan result.
pub fn plan_json(r: &PlanResult) -> PlanJson {
    PlanJson {
        feasible: r.feasible,
        zone_length_m: r.zone_length_m,
        modules: r
            .modules
            .iter()
            .map(|m| ModuleJson {
                start_m: m.start_m,
                clearance_m: m.clearance_m,
            })
            .collect(),
        binding: r
            .binding
            .iter()
            .map(|b| BindingJson {
                check: b.check.clone(),
                case: b.case.clone(),
                margin: b.margin,
            })
            .collect(),
        reason: r.reason.clone(),
        candidates_simulated: r.candidates_simulated,
    }
}

/// The readable form of a plan result.
pub fn plan_text(name: &str, r: &PlanResult) -> String {
    let mut out = String::new();
    if r.feasible {
        outln!(
            out,
            "{name} — plan: {} module(s), zone length {} m ({} candidates simulated)",
            r.modules.len(),
            num(Some(r.zone_length_m), 3),
            r.candidates_simulated
        );
        let mut t = Table::new(&["module", "start_m", "clearance_mm"]);
        for (i, m) in r.modules.iter().enumerate() {
            t.row(vec![
                format!("P{}", i + 1),
                num(Some(m.start_m), 3),
                num(Some(m.clearance_m * 1e3), 1),
            ]);
        }
        outp!(out, "{}", t.render());
        outln!(out, "Binding case of each check");
    } else {
        outln!(
            out,
            "{name} — plan: INFEASIBLE ({} candidates simulated)",
            r.candidates_simulated
        );
        if let Some(reason) = &r.reason {
            outln!(out, "{reason}");
        }
        outln!(out, "Checks of the last layout tried");
    }
    let mut w = Table::new(&["check", "binding_case", "margin"]);
    for b in &r.binding {
        w.row(vec![b.check.clone(), b.case.clone(), num(b.margin, 3)]);
    }
    outp!(out, "{}", w.render());
    out
}

/// Runs `plan`.
pub fn execute(a: &PlanArgs) -> Result<i32, Error> {
    let s = load(&a.scenario)?;
    if s.plan.is_none() {
        return Err(Error::Usage(format!(
            "{}: no `plan:` block to search with",
            a.scenario.display()
        )));
    }
    let options = PlanOptions {
        progress: !a.json,
        ..PlanOptions::default()
    };
    let r = plan(&s, &options).map_err(|e| Error::Compute(e.to_string()))?;
    if let (Some(path), true) = (&a.write, r.feasible) {
        let yaml = to_yaml(&r.scenario).map_err(|e| Error::Compute(e.to_string()))?;
        write_file(path, yaml.as_bytes())?;
    }
    if a.json {
        emit(
            &(serde_json::to_string_pretty(&plan_json(&r))
                .map_err(|e| Error::Compute(e.to_string()))?
                + "\n"),
        )?;
    } else {
        emit(&plan_text(&s.name, &r))?;
    }
    Ok(if r.feasible {
        EXIT_OK
    } else {
        EXIT_LIMIT_FAILED
    })
}
