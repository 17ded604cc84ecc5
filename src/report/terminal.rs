//! The readable documents the commands print on the terminal: run table, verdict, heating,
//! plan and force–speed curves. Each reads one result type; none computes.

use super::text::{num, Table};
use super::CAUTION;
use crate::checks::rider::sign_convention;
use crate::checks::Verdict;
use crate::curve::PairCurve;
use crate::dynamics::RunResult;
use crate::plan::{Coverage, Objective, PlanOutcome, PlanResult, Planned, SearchStop};
use crate::scenario::{Rider, Scenario};
use crate::study::warnings::name_list;
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
    // The lateral force columns only when some section has its fin off-centre.
    let lateral = results.iter().any(|r| r.peak_lateral.is_some());
    let mut head = vec![
        "case",
        "outcome",
        "entry_m_s",
        "exit_m_s",
        "min_m_s",
        "stop_m",
        "net_decel_g",
        "felt_decel_g",
        "at_s",
        "at_m",
        "onset_g_s",
        "in_zone_s",
        "energy_kj",
        "residual_j",
        "steps",
        "rhs",
    ];
    if lateral {
        head.extend(["lateral_n", "lateral_at_m", "lateral_at_m_s"]);
    }
    let mut t = Table::new(&head);
    for r in results {
        let mut cells = vec![
            r.case.clone(),
            r.outcome.name().into(),
            num(r.entry_speed_m_s, 2),
            num(r.exit_speed_m_s, 2),
            num(r.min_speed_m_s, 2),
            num(r.stall_position_m, 2),
            num(r.peak_decel_g(), 3),
            num(r.peak_felt_decel_g(), 3),
            num(r.peak_decel_time_s, 3),
            num(r.peak_decel_position_m, 2),
            num(r.peak_onset_g_s, 2),
            num(r.time_in_zone_s, 3),
            num(Some(r.braking_energy_j / 1e3), 1),
            format!("{:.1e}", r.energy_residual_j),
            r.steps.to_string(),
            r.rhs_evaluations.to_string(),
        ];
        if lateral {
            let p = r.peak_lateral.unwrap_or_default();
            cells.extend([
                num(r.peak_lateral.map(|_| p.force_n), 1),
                num(p.position_m, 2),
                num(p.speed_m_s, 2),
            ]);
        }
        t.row(cells);
    }
    t.render()
}

/// The `run` document: title, table, the warnings (each once, see
/// [`crate::study::Study::run_warnings`]).
pub fn run_text(scenario_name: &str, results: &[RunResult], warnings: &[String]) -> String {
    let mut out = String::new();
    outln!(
        out,
        "{} — run through the zone ({} case{})",
        scenario_name,
        results.len(),
        if results.len() == 1 { "" } else { "s" }
    );
    out.push_str(&run_table(results));
    for w in warnings {
        outln!(out, "warning: {w}");
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

/// The `heat` document: per case the cycles and the fins, then a summary (one row per case,
/// the hottest fin against the fin-temperature limit) and the warnings (each once, see
/// [`crate::study::Study::heat_warnings`]).
pub fn heat_text(s: &Scenario, heats: &[CaseHeat], warnings: &[String]) -> String {
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
                 (bound {:.1} K); judged at {:.1} °C",
                r.mean_k,
                r.bound_k,
                h.judged_magnet_temp_c
            );
        }
        if let Some(l) = &h.lift {
            outln!(out, "  {}", lift_line(l));
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
    }
    out.push_str(&heat_summary(s, heats));
    for w in warnings {
        outln!(out, "warning: {w}");
    }
    out
}

/// One line on a lift pass: its speeds, the drag and power the lift must supply, the heat.
pub fn lift_line(l: &crate::thermal::lift::LiftPass) -> String {
    let speed = if l.min_speed_m_s == l.max_speed_m_s {
        format!("{:.2} m/s", l.min_speed_m_s)
    } else {
        format!("{:.2}–{:.2} m/s", l.min_speed_m_s, l.max_speed_m_s)
    };
    format!(
        "lift pass at {speed}: peak drag {:.0} N, peak power {:.1} kW the lift must supply, \
         {:.1} kJ into the fins, {:.1} s in the brake",
        l.peak_drag_n,
        l.peak_power_w / 1e3,
        l.energy_j / 1e3,
        l.time_in_brake_s
    )
}

/// The end of the `heat` document: one row per case and the hottest fin of all.
pub fn heat_summary(s: &Scenario, heats: &[CaseHeat]) -> String {
    let mut out = String::new();
    outln!(out, "\nSummary");
    let mut t = Table::new(&[
        "case",
        "cycles",
        "steady_after",
        "hottest_fin",
        "first_peak_c",
        "steady_peak_c",
        "exit_first_m_s",
        "exit_steady_m_s",
        "decel_first_g",
        "decel_steady_g",
    ]);
    for h in heats {
        let hottest = h.hottest_fin().map(|f| f.fin.clone()).unwrap_or_default();
        t.row(vec![
            h.case.clone(),
            h.cycles.len().to_string(),
            h.cycles_to_steady
                .map_or("—".to_string(), |c| c.to_string()),
            hottest,
            num(Some(h.first_peak_fin_temperature_c), 1),
            num(Some(h.steady_peak_fin_temperature_c), 1),
            num(h.exit_speed_first_m_s, 2),
            num(h.exit_speed_steady_m_s, 2),
            num(h.peak_decel_first_g, 3),
            num(h.peak_decel_steady_g, 3),
        ]);
    }
    out.push_str(&t.render());
    if let Some(h) = super::text::hottest_fin(s, heats) {
        outln!(out, "hottest: {h}");
    }
    out
}

/// The objective of a plan in words.
pub fn objective_text(o: &Objective) -> String {
    match o {
        Objective::Shortest => "shortest zone, then fewest modules".into(),
        Objective::Margin { length_m } => {
            format!("largest worst-case margin within {length_m:.3} m of the zone start")
        }
    }
}

/// A margin with its unit ("0.130 g"), or "-".
fn with_unit(x: Option<f64>, unit: &str) -> String {
    match x {
        Some(_) => format!("{} {unit}", num(x, 3)).trim_end().to_string(),
        None => "-".into(),
    }
}

fn modules_table(out: &mut String, p: &Planned) {
    let mut t = Table::new(&["module", "slot", "start_m", "clearance_mm"]);
    for m in &p.modules {
        t.row(vec![
            m.name.clone(),
            m.slot.to_string(),
            num(Some(m.start_m), 3),
            num(Some(m.clearance_m * 1e3), 1),
        ]);
    }
    out.push_str(&t.render());
}

fn coverage_text(out: &mut String, c: &Coverage) {
    let widths: Vec<String> = c.passes.iter().map(|p| p.width.to_string()).collect();
    let stop = match c.stop {
        SearchStop::Completed => "completed".to_string(),
        SearchStop::CandidateCap { cap } => format!("stopped at the cap of {cap} candidates"),
        SearchStop::TimeCap { seconds } => format!("stopped at the time cap of {seconds} s"),
    };
    let mut parts: Vec<String> = Vec::new();
    if widths.is_empty() {
        parts.push(format!(
            "{} slots × {} settings; no beam pass was needed",
            c.max_slots, c.settings
        ));
    } else {
        parts.push(format!(
            "beam passes of width {} over up to {} slots × {} settings",
            widths.join(", "),
            c.max_slots,
            c.settings
        ));
    }
    if c.exact_through_slots > 0 {
        parts.push(format!(
            "every layout of up to {} slots simulated or soundly excluded",
            c.exact_through_slots
        ));
    }
    parts.push(match c.length_lower_bound_slots {
        Some(l) => format!("no feasible layout has fewer than {l} slots (bound)"),
        None => "the bound excludes every length".into(),
    });
    parts.push(format!(
        "{} probe(s) with every slot at the tightest setting, {} candidates simulated (cap {}), \
         {} local steps, {:.2} s; {stop}",
        c.probes, c.candidates_simulated, c.candidate_cap, c.local_steps, c.elapsed_s
    ));
    outln!(out, "search: {}", parts.join("; "));
    let pruned: usize = c
        .passes
        .iter()
        .map(|p| p.pruned_dead + p.pruned_too_fast)
        .sum();
    let heuristic: usize = c
        .passes
        .iter()
        .map(|p| p.pruned_dominated + p.dropped_by_width)
        .sum();
    outln!(
        out,
        "partial layouts excluded soundly: {pruned}; dropped heuristically (dominance, beam width): {heuristic}"
    );
}

fn binding_table(out: &mut String, p: &Planned) {
    let mut w = Table::new(&["check", "binding_case", "state", "margin"]);
    for b in &p.binding {
        w.row(vec![
            b.check.clone(),
            b.case.clone(),
            b.state.map_or("-", |s| s.name()).to_string(),
            with_unit(b.margin, &b.unit),
        ]);
    }
    out.push_str(&w.render());
}

/// The `plan` document.
pub fn plan_text(name: &str, r: &PlanResult) -> String {
    let mut out = String::new();
    let objective = objective_text(&r.objective);
    match &r.outcome {
        PlanOutcome::Feasible { plan: p, coverage } => {
            outln!(
                out,
                "{name} — plan ({objective}): {} module(s), zone {} → {} m (length {} m), \
                 worst relative margin {}",
                p.module_count,
                num(p.modules.first().map(|m| m.start_m), 3),
                num(Some(p.zone_end_m), 3),
                num(Some(p.zone_length_m), 3),
                num(p.worst_relative_margin, 4),
            );
            if r.objective == Objective::Shortest {
                outln!(
                    out,
                    "{}",
                    if coverage.shortest_proven {
                        "the shortest possible zone: no layout with fewer slots can pass"
                    } else {
                        "the shortest zone found; a shorter one is not excluded (see the search line)"
                    }
                );
            }
            modules_table(&mut out, p);
            outln!(out, "Binding case of each check");
            binding_table(&mut out, p);
            coverage_text(&mut out, coverage);
        }
        PlanOutcome::ProvenInfeasible { reason, coverage } => {
            outln!(out, "{name} — plan ({objective}): PROVEN INFEASIBLE");
            outln!(out, "{reason}");
            coverage_text(&mut out, coverage);
        }
        PlanOutcome::NotFound {
            near_miss,
            coverage,
        } => {
            outln!(
                out,
                "{name} — plan ({objective}): NO LAYOUT FOUND (not a proof that none exists)"
            );
            if let Some(n) = near_miss {
                let p = &n.plan;
                outln!(
                    out,
                    "closest layout: {} module(s), zone {} → {} m; failing:",
                    p.module_count,
                    num(p.modules.first().map(|m| m.start_m), 3),
                    num(Some(p.zone_end_m), 3),
                );
                for f in n.failing.iter().take(8) {
                    outln!(out, "  {f}");
                }
                modules_table(&mut out, p);
            }
            coverage_text(&mut out, coverage);
        }
    }
    out
}

/// The pairs of `curves` grouped by design: pairs whose summary figures are identical (copies
/// of a repeat, sections of one design on several lanes) share a group, in order of first
/// appearance.
pub fn designs(curves: &[PairCurve]) -> Vec<Vec<&PairCurve>> {
    let key = |p: &PairCurve| {
        (
            p.critical_speed_m_s.to_bits(),
            p.peak_force_per_m_n.to_bits(),
            p.edge_factor.map(f64::to_bits),
            p.gap_field_t.map(f64::to_bits),
            p.skin_depth_at_critical_m.map(f64::to_bits),
        )
    };
    let mut groups: Vec<Vec<&PairCurve>> = Vec::new();
    for p in curves {
        match groups.iter_mut().find(|g| key(g[0]) == key(p)) {
            Some(g) => g.push(p),
            None => groups.push(vec![p]),
        }
    }
    groups
}

/// The `curve` document: one summary row per distinct design (the sections and fins it
/// covers, how many pairs), then the points of each design.
pub fn curve_text(scenario_name: &str, curves: &[PairCurve]) -> String {
    let mut out = String::new();
    outln!(out, "{scenario_name} — force–speed curves");
    let mut t = Table::new(&[
        "sections",
        "fins",
        "pairs",
        "critical_speed_m_s",
        "peak_force_per_m_n",
        "edge_factor",
        "gap_field_t",
        "skin_depth_at_critical_mm",
    ]);
    let groups = designs(curves);
    for g in &groups {
        let p = g[0];
        let sections: Vec<&str> = g.iter().map(|c| c.section.as_str()).collect();
        let fins: Vec<&str> = g.iter().map(|c| c.fin.as_str()).collect();
        t.row(vec![
            name_list(&sections),
            name_list(&fins),
            g.len().to_string(),
            num(Some(p.critical_speed_m_s), 3),
            num(Some(p.peak_force_per_m_n), 1),
            num(p.edge_factor, 4),
            num(p.gap_field_t, 4),
            num(p.skin_depth_at_critical_m.map(|d| d * 1e3), 2),
        ]);
    }
    out.push_str(&t.render());
    for g in &groups {
        let p = g[0];
        outln!(out, "\n{} × {}", p.section, p.fin);
        let lateral = p.points.iter().any(|q| q.lateral_per_m_n.is_some());
        let mut head = vec![
            "speed_m_s",
            "force_per_area_pa",
            "fundamental_pa",
            "force_per_m_n",
            "section_end_mm",
            "force_full_overlap_n",
            "force_low_n",
            "force_high_n",
        ];
        if lateral {
            head.extend(["lateral_per_m_n", "lateral_full_overlap_n"]);
        }
        let mut t = Table::new(&head);
        let stride = (p.points.len() / 25).max(1);
        for q in p.points.iter().step_by(stride) {
            let mut row = vec![
                num(Some(q.speed_m_s), 2),
                num(q.force_per_area_pa, 1),
                num(q.force_per_area_fundamental_pa, 1),
                num(Some(q.force_per_m_n), 1),
                num(q.section_end_length_m.map(|l| l * 1e3), 1),
                num(Some(q.force_full_overlap_n), 1),
                num(q.force_full_overlap_low_n, 1),
                num(q.force_full_overlap_high_n, 1),
            ];
            if lateral {
                row.extend([num(q.lateral_per_m_n, 1), num(q.lateral_full_overlap_n, 1)]);
            }
            t.row(row);
        }
        out.push_str(&t.render());
    }
    if curves
        .iter()
        .any(|c| c.points.iter().any(|q| q.band_low_fraction.is_some()))
    {
        outln!(
            out,
            "\nforce_full_overlap_n: the fully overlapped section as the runs use it (per metre × \
             length × (1 − section_end/L)); force_low_n … force_high_n: the model's uncertainty \
             band (fringing across the height, fin thickness at the rim, magnet recoil \
             permeability, numerics, section and fin ends; README \"Force model\")."
        );
    }
    out
}
