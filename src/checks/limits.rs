//! Case-by-case verdicts against the scenario's limits: felt peaks, envelopes, onset, exit
//! speed, duration, stall and rollback, fin and magnet temperatures.

use super::envelope::Envelope;
use super::rider::{rider_signals, RiderSignals};
use crate::dynamics::{Outcome, RunResult};
use crate::scenario::{Case, Scenario};
use crate::VERSION;
use serde::Serialize;

/// One check of one case.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckRow {
    /// Check name: peak_max, peak_min, envelope_positive, envelope_negative, onset, exit_speed_min,
    /// exit_speed_max, duration, stall, rollback, outcome, fin_temperature, magnet_temperature,
    /// magnet_grade.
    pub check: String,
    /// Rider axis, for acceleration checks.
    pub axis: Option<String>,
    /// The value found (filtered where a filter applies).
    pub value: Option<f64>,
    /// The raw (unfiltered) value where a filter applies.
    pub raw_value: Option<f64>,
    /// The limit.
    pub limit: Option<f64>,
    /// How far inside the limit (negative: outside), in the check's unit.
    pub margin: Option<f64>,
    /// Unit of value, limit and margin.
    pub unit: String,
    /// Passed.
    pub pass: bool,
    /// For envelopes: the duration at the worst margin, s.
    pub at_duration_s: Option<f64>,
}

/// The verdict on one case.
#[derive(Debug, Clone, Serialize)]
pub struct CaseVerdict {
    /// Case name.
    pub case: String,
    /// Every check passed.
    pub pass: bool,
    /// The checks.
    pub checks: Vec<CheckRow>,
}

/// The worst case of one check.
#[derive(Debug, Clone, Serialize)]
pub struct Worst {
    /// Check name (with axis).
    pub check: String,
    /// Case that binds it.
    pub case: String,
    /// Its margin (None for pass/fail checks without one).
    pub margin: Option<f64>,
}

/// The verdict on a scenario.
#[derive(Debug, Clone, Serialize)]
pub struct Verdict {
    /// Scenario name.
    pub scenario: String,
    /// Tool version.
    pub version: &'static str,
    /// Every check of every case passed.
    pub pass: bool,
    /// Per case.
    pub cases: Vec<CaseVerdict>,
    /// Per check, the case with the smallest margin.
    pub worst: Vec<Worst>,
}

fn row(
    check: &str,
    axis: Option<&str>,
    value: f64,
    limit: f64,
    margin: f64,
    unit: &str,
) -> CheckRow {
    CheckRow {
        check: check.into(),
        axis: axis.map(String::from),
        value: Some(value),
        raw_value: None,
        limit: Some(limit),
        margin: Some(margin),
        unit: unit.into(),
        pass: margin >= 0.0,
        at_duration_s: None,
    }
}

fn flag(check: &str, ok: bool, note_value: Option<f64>, unit: &str) -> CheckRow {
    CheckRow {
        check: check.into(),
        axis: None,
        value: note_value,
        raw_value: None,
        limit: None,
        margin: None,
        unit: unit.into(),
        pass: ok,
        at_duration_s: None,
    }
}

/// Extra temperatures a case is judged on (from the heating analysis).
#[derive(Debug, Clone, Copy, Default)]
pub struct CaseTemperatures {
    /// Highest fin temperature over the pass or the duty cycle, °C.
    pub peak_fin_temperature_c: Option<f64>,
}

/// Checks of one case.
pub fn check_case(
    scenario: &Scenario,
    case: &Case,
    run: &RunResult,
    temps: CaseTemperatures,
) -> CaseVerdict {
    let lim = &scenario.limits;
    let mut rows = Vec::new();
    // How the run ended.
    match run.outcome {
        Outcome::Stalled => rows.push(flag("stall", lim.allow_stall, run.stall_position_m, "m")),
        Outcome::RolledBack => rows.push(flag(
            "rollback",
            lim.allow_rollback,
            run.exit_speed_m_s,
            "m/s",
        )),
        Outcome::TimeLimit => rows.push(flag("outcome", false, Some(run.end_time_s), "s")),
        Outcome::Cleared => {}
    }
    if run.reversed && run.outcome != Outcome::RolledBack && !lim.allow_rollback {
        rows.push(flag("rollback", false, None, "m/s"));
    }
    // Felt acceleration.
    let signals: Option<RiderSignals> = rider_signals(run, &scenario.rider);
    if let Some(sig) = &signals {
        let peaks = sig.peaks();
        for (k, name) in ["x", "y", "z"].iter().enumerate() {
            let p = peaks[k];
            if let Some(max) = lim.peak[k].max_g {
                let mut r = row(
                    "peak_max",
                    Some(name),
                    p.filtered_max_g,
                    max,
                    max - p.filtered_max_g,
                    "g",
                );
                r.raw_value = Some(p.raw_max_g);
                rows.push(r);
            }
            if let Some(min) = lim.peak[k].min_g {
                let mut r = row(
                    "peak_min",
                    Some(name),
                    p.filtered_min_g,
                    min,
                    p.filtered_min_g - min,
                    "g",
                );
                r.raw_value = Some(p.raw_min_g);
                rows.push(r);
            }
            for (side, pts) in [
                ("envelope_positive", &lim.envelope[k].positive),
                ("envelope_negative", &lim.envelope[k].negative),
            ] {
                let Some(pts) = pts else { continue };
                let Ok(env) = Envelope::new(pts.clone()) else {
                    continue;
                };
                let sigv = if side == "envelope_negative" {
                    sig.filtered[k].negated()
                } else {
                    sig.filtered[k].clone()
                };
                if let Ok(res) = env.check(&sigv) {
                    let sustained = if res.sustained.is_finite() {
                        res.sustained
                    } else {
                        0.0
                    };
                    let mut r = row(
                        side,
                        Some(name),
                        sustained,
                        res.allowed,
                        res.worst_margin,
                        "g",
                    );
                    r.at_duration_s = Some(res.duration_s);
                    rows.push(r);
                }
            }
        }
    }
    if let (Some(limit), Some(onset)) = (lim.onset_g_s, run.peak_onset_g_s) {
        rows.push(row("onset", None, onset, limit, limit - onset, "g/s"));
    }
    // Exit speed: judged when the vehicle left the zone forwards.
    if lim.exit_speed_min_m_s.is_some() || lim.exit_speed_max_m_s.is_some() {
        match (run.outcome, run.exit_speed_m_s) {
            (Outcome::Cleared, Some(v)) => {
                let v = v.abs();
                if let Some(lo) = lim.exit_speed_min_m_s {
                    rows.push(row("exit_speed_min", None, v, lo, v - lo, "m/s"));
                }
                if let Some(hi) = lim.exit_speed_max_m_s {
                    rows.push(row("exit_speed_max", None, v, hi, hi - v, "m/s"));
                }
            }
            // A stall inside the zone is judged by the stall check; it does not exit.
            (Outcome::Stalled, _) if lim.allow_stall => {}
            _ => {
                if let Some(lo) = lim.exit_speed_min_m_s {
                    rows.push(CheckRow {
                        check: "exit_speed_min".into(),
                        axis: None,
                        value: None,
                        raw_value: None,
                        limit: Some(lo),
                        margin: None,
                        unit: "m/s".into(),
                        pass: false,
                        at_duration_s: None,
                    });
                }
            }
        }
    }
    if let (Some(limit), Some(d)) = (lim.max_duration_s, run.time_in_zone_s) {
        rows.push(row("duration", None, d, limit, limit - d, "s"));
    }
    if let Some(limit) = lim.max_fin_temperature_c {
        let peak = temps.peak_fin_temperature_c.unwrap_or_else(|| {
            run.fins
                .iter()
                .map(|f| f.end_temp_c)
                .fold(case.fin_temp_c, f64::max)
        });
        rows.push(row(
            "fin_temperature",
            None,
            peak,
            limit,
            limit - peak,
            "°C",
        ));
    }
    if let Some(limit) = lim.max_magnet_temperature_c {
        rows.push(row(
            "magnet_temperature",
            None,
            case.magnet_temp_c,
            limit,
            limit - case.magnet_temp_c,
            "°C",
        ));
    }
    // Each magnet grade's working limit (common practice: sintered NdFeB grade tables).
    let grade_limit = scenario
        .sections
        .iter()
        .enumerate()
        .filter(|(i, _)| !case.disabled.contains(i))
        .filter_map(|(_, s)| s.grade.map(|g| g.max_temperature_c()))
        .fold(f64::INFINITY, f64::min);
    if grade_limit.is_finite() {
        rows.push(row(
            "magnet_grade",
            None,
            case.magnet_temp_c,
            grade_limit,
            grade_limit - case.magnet_temp_c,
            "°C",
        ));
    }
    let pass = rows.iter().all(|r| r.pass);
    CaseVerdict {
        case: case.name.clone(),
        pass,
        checks: rows,
    }
}

/// Verdict on every case; `temps[i]` belongs to `scenario.cases[i]` (may be empty).
pub fn verdict(scenario: &Scenario, runs: &[RunResult], temps: &[CaseTemperatures]) -> Verdict {
    let cases: Vec<CaseVerdict> = scenario
        .cases
        .iter()
        .zip(runs)
        .enumerate()
        .map(|(i, (c, r))| check_case(scenario, c, r, temps.get(i).copied().unwrap_or_default()))
        .collect();
    let mut worst: Vec<(String, String, f64)> = Vec::new();
    for cv in &cases {
        for r in &cv.checks {
            let key = match &r.axis {
                Some(a) => format!("{}.{a}", r.check),
                None => r.check.clone(),
            };
            let m = r.margin.unwrap_or(if r.pass {
                f64::INFINITY
            } else {
                f64::NEG_INFINITY
            });
            let finite = |x: f64| x.is_finite().then_some(x);
            match worst.iter_mut().find(|w| w.0 == key) {
                Some(w) if m < w.2 => {
                    w.2 = m;
                    w.1 = cv.case.clone();
                }
                Some(_) => {}
                None => worst.push((key, cv.case.clone(), m)),
            }
            let _ = finite;
        }
    }
    let worst = worst
        .into_iter()
        .map(|(check, case, m)| Worst {
            check,
            case,
            margin: m.is_finite().then_some(m),
        })
        .collect();
    let pass = cases.iter().all(|c| c.pass);
    Verdict {
        scenario: scenario.name.clone(),
        version: VERSION,
        pass,
        cases,
        worst,
    }
}
