//! The readable documents the commands print on the terminal: run table, verdict, heating,
//! plan and force–speed curves. Each reads one result type; none computes.

use super::text::{num, Table};
use super::CAUTION;
use crate::checks::rider::sign_convention;
use crate::checks::Verdict;
use crate::curve::PairCurve;
use crate::dynamics::RunResult;
use crate::plan::PlanResult;
use crate::scenario::{Rider, Scenario};
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

/// The readable verdict: the sign convention, one row per case and check, the worst case of
/// each check, the failing cases and checks, the warnings and the caution.
pub fn verdict_text(v: &Verdict, rider: &Rider) -> String {
    let states = v
        .cases
        .iter()
        .flat_map(|c| &c.checks)
        .any(|r| r.state.is_some());
    // `value` is the filtered signal where a filter applies; `raw` the unfiltered one.
    let mut head = vec!["case", "check", "axis"];
    if states {
        head.push("state");
    }
    head.extend([
        "value", "raw", "limit", "margin", "unit", "at_s", "result", "note",
    ]);
    let mut t = Table::new(&head);
    for c in &v.cases {
        if c.checks.is_empty() {
            let mut cells = vec![String::new(); head.len()];
            cells[0] = c.case.clone();
            cells[1] = "(no limits)".into();
            cells[head.len() - 2] = "pass".into();
            t.row(cells);
        }
        for r in &c.checks {
            let mut cells = vec![
                c.case.clone(),
                r.check.clone(),
                r.axis.clone().unwrap_or_default(),
            ];
            if states {
                cells.push(r.state.map(|s| s.name().to_string()).unwrap_or_default());
            }
            cells.extend([
                num(r.value, 3),
                r.raw_value.map(|v| format!("{v:.3}")).unwrap_or_default(),
                num(r.limit, 3),
                num(r.margin, 3),
                r.unit.clone(),
                r.at_duration_s
                    .map(|d| format!("{d:.3}"))
                    .unwrap_or_default(),
                if r.pass { "pass".into() } else { "FAIL".into() },
                r.not_evaluated
                    .as_ref()
                    .map(|n| format!("not evaluated: {n}"))
                    .unwrap_or_default(),
            ]);
            t.row(cells);
        }
    }
    let mut whead = vec!["check", "worst_case"];
    if states {
        whead.push("state");
    }
    whead.extend(["margin", "at_s"]);
    let mut w = Table::new(&whead);
    for x in &v.worst {
        let mut cells = vec![x.check.clone(), x.case.clone()];
        if states {
            cells.push(x.state.map(|s| s.name().to_string()).unwrap_or_default());
        }
        cells.push(num(x.margin, 3));
        cells.push(
            x.at_duration_s
                .map(|d| format!("{d:.3}"))
                .unwrap_or_default(),
        );
        w.row(cells);
    }
    let mut out = String::new();
    outln!(out, "{} — check", v.scenario);
    outln!(out, "{}", sign_convention(rider));
    if states {
        outln!(
            out,
            "each case is judged at the first dispatch and at the duty cycle's steady state; \
             every row is the worse of the two (state)"
        );
    }
    out.push_str(&t.render());
    outln!(out, "\nWorst case of each check");
    out.push_str(&w.render());
    for warning in &v.warnings {
        outln!(out, "warning: {warning}");
    }
    outln!(out, "");
    out.push_str(&verdict_summary(v));
    outln!(out, "\n{CAUTION}");
    out
}

/// The verdict in words: PASS, or FAIL with the failing cases and, per case, its failing checks.
pub fn verdict_summary(v: &Verdict) -> String {
    let mut out = String::new();
    if v.pass {
        outln!(out, "PASS: every check of every case passed");
        return out;
    }
    let failed: Vec<&str> = v
        .cases
        .iter()
        .filter(|c| !c.pass)
        .map(|c| c.case.as_str())
        .collect();
    outln!(
        out,
        "FAIL: {} case(s) failed: {}",
        failed.len(),
        failed.join(", ")
    );
    for c in v.cases.iter().filter(|c| !c.pass) {
        let checks: Vec<String> = c
            .checks
            .iter()
            .filter(|r| !r.pass)
            .map(|r| r.summary())
            .collect();
        outln!(out, "  {}: {}", c.case, checks.join("; "));
    }
    out
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
        if let Some(r) = h.magnet_rise {
            outln!(
                out,
                "  magnets warmed by the fins across the gap: {:.1} K on average over the duty \
                 (bound {:.1} K)",
                r.mean_k,
                r.bound_k
            );
        }
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
