//! `eddyzone check SCENARIO`: every case against the limits; exit 1 when any check fails.

use super::run::run_all;
use super::{emit, load, select_cases};
use crate::checks::{verdict, CaseTemperatures, Verdict};
use crate::dynamics::RunOptions;
use crate::error::{Error, EXIT_LIMIT_FAILED, EXIT_OK};
use crate::report::text::{num, Table};
use crate::report::CAUTION;
use clap::Args;
use std::path::PathBuf;

/// Options of `check`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The scenario file.
    pub scenario: PathBuf,
    /// Print JSON instead of the tables.
    #[arg(long)]
    pub json: bool,
    /// Check only this case.
    #[arg(long)]
    pub case: Option<String>,
}

/// The readable verdict: one row per case and check, then the worst case of each check.
pub fn verdict_text(v: &Verdict) -> String {
    // `value` is the filtered signal where a filter applies; `raw` the unfiltered one.
    let mut t = Table::new(&[
        "case", "check", "axis", "value", "raw", "limit", "margin", "unit", "result",
    ]);
    for c in &v.cases {
        if c.checks.is_empty() {
            t.row(vec![
                c.case.clone(),
                "(no limits)".into(),
                String::new(),
                String::new(),
                String::new(),
                String::new(),
                String::new(),
                String::new(),
                "pass".into(),
            ]);
        }
        for r in &c.checks {
            t.row(vec![
                c.case.clone(),
                r.check.clone(),
                r.axis.clone().unwrap_or_default(),
                num(r.value, 3),
                r.raw_value.map(|v| format!("{v:.3}")).unwrap_or_default(),
                num(r.limit, 3),
                num(r.margin, 3),
                r.unit.clone(),
                if r.pass { "pass".into() } else { "FAIL".into() },
            ]);
        }
    }
    let mut w = Table::new(&["check", "worst_case", "margin"]);
    for x in &v.worst {
        w.row(vec![x.check.clone(), x.case.clone(), num(x.margin, 3)]);
    }
    let failed: Vec<&str> = v
        .cases
        .iter()
        .filter(|c| !c.pass)
        .map(|c| c.case.as_str())
        .collect();
    let summary = if v.pass {
        "PASS: every check of every case passed".to_string()
    } else {
        format!(
            "FAIL: {} case(s) failed: {}",
            failed.len(),
            failed.join(", ")
        )
    };
    format!(
        "{} — check\n{}\nWorst case of each check\n{}\n{summary}\n\n{CAUTION}\n",
        v.scenario,
        t.render(),
        w.render()
    )
}

/// Runs `check`.
pub fn execute(a: &CheckArgs) -> Result<i32, Error> {
    let mut s = load(&a.scenario)?;
    select_cases(&mut s, &a.case)?;
    let tables = super::run::tables(&s)?;
    let runs = run_all(&s, &tables, &RunOptions::default())?;
    let temps: Vec<CaseTemperatures> = crate::thermal::judged_temperatures(&s, &tables)
        .map_err(|e| Error::Compute(e.to_string()))?;
    let v = verdict(&s, &runs, &temps);
    if a.json {
        emit(
            &(serde_json::to_string_pretty(&v).map_err(|e| Error::Compute(e.to_string()))? + "\n"),
        )?;
    } else {
        emit(&verdict_text(&v))?;
    }
    Ok(if v.pass { EXIT_OK } else { EXIT_LIMIT_FAILED })
}
