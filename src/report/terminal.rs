//! The readable documents the commands print on the terminal: run table, verdict, heating,
//! plan and force–speed curves. Each reads one result type; none computes.

use super::text::{num, Table};
use super::CAUTION;
use crate::checks::Verdict;
use crate::curve::PairCurve;
use crate::dynamics::RunResult;
use crate::plan::PlanResult;
use crate::scenario::Scenario;
use crate::thermal::CaseHeat;

/// Appends a formatted line to a `String`.
macro_rules! outln {
    ($buf:expr, $($arg:tt)*) => {{ use std::fmt::Write as _; let _ = writeln!($buf, $($arg)*); }};
}

/// The note of a heat calculation without a duty block.
pub const SINGLE_PASS_NOTE: &str =
    "no duty block: a single pass (steady = first pass, cycles_to_steady = 1)";

/// The table of run results.
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

/// The `run` document: title, table, warnings.
pub fn run_text(scenario_name: &str, results: &[RunResult]) -> String {
    let mut out = String::new();
    outln!(
        out,
        "{} — run through the zone ({} case{})",
        scenario_name,
        results.len(),
        if results.len() == 1 { "" } else { "s" }
    );
    out.push_str(&run_table(results));
    for r in results {
        for w in &r.warnings {
            outln!(out, "warning: {}: {w}", r.case);
        }
    }
    out
}

/// The readable verdict: one row per case and check, then the worst case of each check.
pub fn verdict_text(v: &Verdict) -> String {
    // `value` is the filtered signal where a filter applies; `raw` the unfiltered one.
    let mut t = Table::new(&[
        "case", "check", "axis", "value", "raw", "limit", "margin", "unit", "result",
    ]);
    for c in &v.cases {
        if c.checks.is_empty() {
            let mut cells = vec![String::new(); 9];
            cells[0] = c.case.clone();
            cells[1] = "(no limits)".into();
            cells[8] = "pass".into();
            t.row(cells);
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

/// The `heat` document: per case the cycles and the fins.
pub fn heat_text(s: &Scenario, heats: &[CaseHeat]) -> String {
    let mut out = String::new();
    match &s.duty {
        Some(d) => outln!(
            out,
            "{} — fin heating over the duty cycle (interval {:.0} s, ambient {:.1} °C, film coefficient {:.1} W/(m²·K))",
            s.name,
            d.interval_s,
            d.ambient_c,
            d.film_coefficient_w_m2_k
        ),
        None => outln!(
            out,
            "{} — fin heating over one pass ({SINGLE_PASS_NOTE})",
            s.name
        ),
    }
    for h in heats {
        outln!(out, "");
        outln!(
            out,
            "case {} (magnets at {:.1} °C): {} cycle{}, steady after {}",
            h.case,
            h.magnet_temp_c,
            h.cycles.len(),
            if h.cycles.len() == 1 { "" } else { "s" },
            h.cycles_to_steady
                .map_or("—".to_string(), |c| c.to_string())
        );
        let mut t = Table::new(&[
            "cycle",
            "exit_m_s",
            "peak_decel_g",
            "energy_kj",
            "peak_fin_c",
        ]);
        for r in &h.cycles {
            t.row(vec![
                r.cycle.to_string(),
                num(r.exit_speed_m_s, 3),
                num(r.peak_decel_g, 3),
                num(Some(r.braking_energy_j / 1e3), 1),
                num(Some(r.peak_fin_temperature_c), 2),
            ]);
        }
        out.push_str(&t.render());
        let mut f = Table::new(&[
            "fin",
            "mount",
            "energy_kj",
            "rise_k",
            "peak_c",
            "steady_peak_c",
            "steady_after",
            "tau_s",
        ]);
        for fin in &h.fins {
            f.row(vec![
                fin.fin.clone(),
                fin.mount.into(),
                num(Some(fin.energy_per_pass_j / 1e3), 1),
                num(Some(fin.rise_per_pass_k), 2),
                num(Some(fin.peak_temperature_c), 2),
                num(Some(fin.steady_peak_temperature_c), 2),
                fin.cycles_to_steady
                    .map_or("—".to_string(), |c| c.to_string()),
                num(fin.time_constant_s, 0),
            ]);
        }
        out.push_str(&f.render());
        outln!(
            out,
            "steady peak fin temperature {:.2} °C; exit speed {} → {} m/s, peak deceleration {} → {} g",
            h.steady_peak_fin_temperature_c,
            num(h.exit_speed_first_m_s, 3),
            num(h.exit_speed_steady_m_s, 3),
            num(h.peak_decel_first_g, 3),
            num(h.peak_decel_steady_g, 3)
        );
        for w in &h.warnings {
            outln!(out, "warning: {}: {w}", h.case);
        }
    }
    out
}

/// The `plan` document.
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
        out.push_str(&t.render());
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
    out.push_str(&w.render());
    out
}

/// The `curve` document: a summary row per pair, then the points of the first pair of each
/// distinct design (repeated copies share one curve).
pub fn curve_text(scenario_name: &str, curves: &[PairCurve]) -> String {
    let mut out = String::new();
    outln!(out, "{scenario_name} — force–speed curves");
    let mut t = Table::new(&[
        "section",
        "fin",
        "critical_speed_m_s",
        "peak_force_per_m_n",
        "edge_factor",
        "gap_field_t",
        "skin_depth_at_critical_mm",
    ]);
    for p in curves {
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
    out.push_str(&t.render());
    let mut seen: Vec<(&str, &str)> = Vec::new();
    for p in curves {
        let base = (
            p.section.split('-').next().unwrap_or(&p.section),
            p.fin.split('-').next().unwrap_or(&p.fin),
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
        out.push_str(&t.render());
    }
    out
}
