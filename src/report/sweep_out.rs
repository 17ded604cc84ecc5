//! Outputs of a sweep: the terminal summary (spread, failure probability and sensitivities per
//! check, the worst sample) and every sample's inputs and outputs as CSV and JSON.

use super::json_out::pretty;
use super::text::{num, Table};
use crate::sweep::stats::Spread;
use crate::sweep::{Sensitivity, SweepResult};

/// A number with enough digits for any check (`{:.4}` trimmed is too coarse for speeds).
fn sig(x: f64) -> String {
    if x != 0.0 && !(1e-3..1e6).contains(&x.abs()) {
        format!("{x:.4e}")
    } else {
        format!("{x:.4}")
    }
}

/// min, P1, P5, P50, P95, P99, max (empty without values).
fn spread_cells(sp: Option<&Spread>) -> [String; 7] {
    let q = |f: fn(&Spread) -> f64| sp.map(f).map_or(String::new(), sig);
    [
        q(|s| s.min),
        q(|s| s.p1),
        q(|s| s.p5),
        q(|s| s.p50),
        q(|s| s.p95),
        q(|s| s.p99),
        q(|s| s.max),
    ]
}

/// The three variables of largest |ρ|, `name +0.97, …`.
fn most_sensitive(s: &[Sensitivity]) -> String {
    let top: Vec<String> = s
        .iter()
        .take(3)
        .map(|x| format!("{} {:+.2}", x.variable, x.spearman))
        .collect();
    top.join(", ")
}

/// The terminal summary of a sweep.
pub fn sweep_text(r: &SweepResult) -> String {
    let mut out = format!(
        "{}: sweep of case '{}' — {} samples ({}, seed {}), {} sampled variables, {} force \
         tables\n\n",
        r.scenario,
        r.case,
        r.samples.len(),
        r.method.key(),
        r.seed,
        r.variables.len(),
        r.tables
    );
    let mut t = Table::new(&[
        "check",
        "unit",
        "limit",
        "min",
        "P1",
        "P5",
        "P50",
        "P95",
        "P99",
        "max",
        "P(fail)",
        "95% interval",
        "most sensitive to (Spearman)",
    ]);
    for s in &r.summaries {
        let mut row = vec![
            s.check.key.clone(),
            s.check.unit.clone(),
            s.check.limit.map_or(String::new(), sig),
        ];
        row.extend(spread_cells(s.spread.as_ref()));
        row.extend([
            format!("{:.4}", s.failure.estimate),
            format!("[{:.4}, {:.4}]", s.failure.low, s.failure.high),
            most_sensitive(&s.sensitivity),
        ]);
        t.row(row);
    }
    out.push_str(&t.render());
    if let Some(l) = &r.lateral {
        out.push('\n');
        out.push_str(&output_table(l));
    }
    let a = &r.any_failure;
    out.push_str(&format!(
        "\nany check failing: {}/{} samples, P = {:.4}, 95 % interval [{:.4}, {:.4}] \
         (Clopper-Pearson; Wilson [{:.4}, {:.4}])\n",
        a.count, a.trials, a.estimate, a.low, a.high, a.wilson_low, a.wilson_high
    ));
    if let Some(w) = r.samples.get(r.worst) {
        let inputs: Vec<String> = r
            .variables
            .iter()
            .zip(&w.inputs)
            .map(|(v, x)| format!("{} = {}", v.name, sig(*x)))
            .collect();
        out.push_str(&format!(
            "worst sample: {} (smallest margin relative to its limit: {}) — {}\n  judged on its own: {}\n",
            w.index,
            num(Some(w.score), 4),
            inputs.join(", "),
            if r.worst_verdict.pass { "PASS" } else { "FAIL" }
        ));
    }
    out
}

/// The spread and sensitivities of one run output (the peak lateral force), as a table.
fn output_table(o: &crate::sweep::OutputSummary) -> String {
    let mut t = Table::new(&[
        "output",
        "unit",
        "min",
        "P1",
        "P5",
        "P50",
        "P95",
        "P99",
        "max",
        "most sensitive to (Spearman)",
    ]);
    let mut row = vec![o.output.clone(), o.unit.clone()];
    row.extend(spread_cells(o.spread.as_ref()));
    row.push(most_sensitive(&o.sensitivity));
    t.row(row);
    t.render()
}

/// Every sample as CSV: index, input values, pass, run outputs (the peak lateral force only
/// when some sample has one), then each check's value and pass.
pub fn samples_csv(r: &SweepResult) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header: Vec<String> = vec!["sample".into()];
    header.extend(r.variables.iter().map(|v| v.name.clone()));
    header.extend(
        [
            "pass",
            "exit_speed_m_s",
            "peak_decel_m_s2",
            "time_in_zone_s",
        ]
        .map(String::from),
    );
    let lateral = r.lateral.is_some();
    if lateral {
        header.push("peak_lateral_force_n".into());
    }
    for k in &r.checks {
        let unit = k.unit.replace('/', "_").replace(' ', "");
        header.push(if unit.is_empty() {
            format!("{}_value", k.key)
        } else {
            format!("{}_{unit}", k.key)
        });
        header.push(format!("{}_pass", k.key));
    }
    w.write_record(&header)?;
    let opt = |x: Option<f64>| x.map(|v| format!("{v}")).unwrap_or_default();
    for s in &r.samples {
        let mut row: Vec<String> = vec![s.index.to_string()];
        row.extend(s.inputs.iter().map(|x| format!("{x}")));
        row.push(s.pass.to_string());
        row.extend([s.exit_speed_m_s, s.peak_decel_m_s2, s.time_in_zone_s].map(opt));
        if lateral {
            row.push(opt(s.peak_lateral_force_n));
        }
        for c in &s.checks {
            row.push(opt(c.value));
            row.push(c.pass.to_string());
        }
        w.write_record(&row)?;
    }
    w.into_inner().map_err(|e| csv::Error::from(e.into_error()))
}

/// The whole result as JSON (variables, checks, summaries, every sample, the worst sample's
/// scenario and verdict).
pub fn sweep_json(r: &SweepResult) -> serde_json::Result<String> {
    pretty(r)
}
