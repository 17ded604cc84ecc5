//! Case-by-case verdicts against the scenario's limits: felt peaks, envelopes, onset, exit
//! speed, duration, stall and rollback, fin and magnet temperatures.

use super::envelope::Envelope;
use super::features::onset_release;
use super::rider::{rider_signals, RiderSignalError, RiderSignals};

/// The felt acceleration of a run, or why it could not be formed.
type Signals = Result<RiderSignals, RiderSignalError>;
use crate::dynamics::{Outcome, RunResult};
use crate::numeric::map_each_in_parallel;
use crate::scenario::{Case, RateSignal, Scenario};
use crate::VERSION;
use serde::Serialize;

/// The fin temperatures a case was judged at.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum JudgedState {
    /// The first dispatch of the duty cycle (fins at the case's temperature).
    First,
    /// The duty cycle's steady state (fins at the temperatures they meet then).
    Steady,
}

impl JudgedState {
    /// The snake-case name used in output.
    pub fn name(self) -> &'static str {
        match self {
            JudgedState::First => "first",
            JudgedState::Steady => "steady",
        }
    }
}

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
    /// Why the check could not be evaluated (the row then fails unless the reason is an outcome
    /// the limits allow).
    pub not_evaluated: Option<String>,
    /// Which judged state this row comes from (None without a duty block: one state).
    pub state: Option<JudgedState>,
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
    /// The state that binds it (None without a duty block).
    pub state: Option<JudgedState>,
    /// For envelopes: the duration at which it binds, s.
    pub at_duration_s: Option<f64>,
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
    /// What the limit set leaves unconstrained (see [`limit_warnings`]).
    pub warnings: Vec<String>,
}

impl Verdict {
    /// The failing checks, as (case, check name with axis) pairs in case order.
    pub fn failures(&self) -> Vec<(&str, String)> {
        self.cases
            .iter()
            .flat_map(|c| {
                c.checks
                    .iter()
                    .filter(|r| !r.pass)
                    .map(move |r| (c.case.as_str(), r.key()))
            })
            .collect()
    }
}

impl CheckRow {
    /// The row in a few words for a list of failures: "peak_min.x (margin -0.120 g)" or
    /// "exit_speed_min (not evaluated: stalled in the zone)".
    pub fn summary(&self) -> String {
        match (self.margin, &self.not_evaluated) {
            (Some(m), _) => format!("{} (margin {m:.3} {})", self.key(), self.unit),
            (None, Some(n)) => format!("{} (not evaluated: {n})", self.key()),
            (None, None) => self.key(),
        }
    }

    /// Check name with its axis ("peak_min.x"), the key rows are matched by.
    pub fn key(&self) -> String {
        match &self.axis {
            Some(a) => format!("{}.{a}", self.check),
            None => self.check.clone(),
        }
    }
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
        not_evaluated: None,
        state: None,
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
        not_evaluated: None,
        state: None,
    }
}

/// A row for a limit that could not be evaluated: it fails unless `allowed` (an outcome the
/// limits accept explains why there is no value).
fn unevaluated(
    check: &str,
    axis: Option<&str>,
    limit: Option<f64>,
    unit: &str,
    reason: impl Into<String>,
    allowed: bool,
) -> CheckRow {
    CheckRow {
        check: check.into(),
        axis: axis.map(String::from),
        value: None,
        raw_value: None,
        limit,
        margin: None,
        unit: unit.into(),
        pass: allowed,
        at_duration_s: None,
        not_evaluated: Some(reason.into()),
        state: None,
    }
}

/// Extra temperatures a case is judged on (from the heating analysis).
#[derive(Debug, Clone, Copy, Default)]
pub struct CaseTemperatures {
    /// Highest fin temperature over the pass or the duty cycle, °C.
    pub peak_fin_temperature_c: Option<f64>,
    /// Magnet temperature to judge instead of the case's input (the input plus the magnets'
    /// estimated warming by the fins over the duty), °C.
    pub magnet_temp_c: Option<f64>,
}

/// The sides of a rider axis: (name of the check, whether it judges the negative side).
const SIDES: [(&str, bool); 2] = [("positive", false), ("negative", true)];

/// Felt-acceleration checks of one case: peaks and envelopes on every axis with a limit.
fn acceleration_rows(scenario: &Scenario, signals: &Signals, rows: &mut Vec<CheckRow>) {
    let lim = &scenario.limits;
    for (k, name) in ["x", "y", "z"].iter().enumerate() {
        let axis = Some(*name);
        let peak = lim.peak[k];
        let sides: [(&str, Option<f64>, bool); 2] = [
            ("peak_max", peak.max_g, false),
            ("peak_min", peak.min_g, true),
        ];
        for (check, limit, negative) in sides {
            let Some(limit) = limit else { continue };
            match &signals {
                Err(e) => rows.push(unevaluated(
                    check,
                    axis,
                    Some(limit),
                    "g",
                    e.to_string(),
                    false,
                )),
                Ok(sig) => {
                    let p = sig.peaks()[k];
                    let (value, raw, margin) = if negative {
                        (p.filtered_min_g, p.raw_min_g, p.filtered_min_g - limit)
                    } else {
                        (p.filtered_max_g, p.raw_max_g, limit - p.filtered_max_g)
                    };
                    let mut r = row(check, axis, value, limit, margin, "g");
                    r.raw_value = Some(raw);
                    rows.push(r);
                }
            }
        }
        for (side, negative) in SIDES {
            let pts = if negative {
                &lim.envelope[k].negative
            } else {
                &lim.envelope[k].positive
            };
            let Some(pts) = pts else { continue };
            let check = format!("envelope_{side}");
            let result = Envelope::new(pts.clone()).and_then(|env| match signals {
                Err(e) => Ok(Err(e.to_string())),
                Ok(sig) => {
                    let u = if negative {
                        sig.filtered[k].negated()
                    } else {
                        sig.filtered[k].clone()
                    };
                    env.check(&u).map(Ok)
                }
            });
            match result {
                Ok(Ok(res)) => {
                    let sustained = if res.sustained.is_finite() {
                        res.sustained
                    } else {
                        0.0
                    };
                    let mut r = row(&check, axis, sustained, res.allowed, res.worst_margin, "g");
                    r.at_duration_s = Some(res.duration_s);
                    rows.push(r);
                }
                Ok(Err(reason)) => rows.push(unevaluated(&check, axis, None, "g", reason, false)),
                Err(e) => rows.push(unevaluated(&check, axis, None, "g", e.to_string(), false)),
            }
        }
    }
}

/// Onset (rate of rise of the felt deceleration in the direction of travel) and release (rate at
/// which it falls away), g/s, by a central difference over `rider.rates.window` on the filtered
/// (default) or raw felt acceleration.
fn rate_rows(scenario: &Scenario, signals: &Signals, rows: &mut Vec<CheckRow>) {
    let lim = &scenario.limits;
    let wanted = [("onset", lim.onset_g_s), ("release", lim.release_g_s)];
    if wanted.iter().all(|w| w.1.is_none()) {
        return;
    }
    let rates = &scenario.rider.rates;
    let measured = signals.as_ref().map_err(|e| e.to_string()).and_then(|sig| {
        let u = match rates.signal {
            RateSignal::Filtered => &sig.braking_filtered,
            RateSignal::Raw => &sig.braking_raw,
        };
        onset_release(u, rates.window_s).map_err(|e| e.to_string())
    });
    for (check, limit) in wanted {
        let Some(limit) = limit else { continue };
        match &measured {
            Ok(m) => {
                let r = if check == "onset" { m.onset } else { m.release };
                rows.push(row(check, None, r.per_s, limit, limit - r.per_s, "g/s"));
            }
            Err(e) => rows.push(unevaluated(
                check,
                None,
                Some(limit),
                "g/s",
                e.clone(),
                false,
            )),
        }
    }
}

/// Combined-axis limits: at every filtered sample (a₁/s₁)² + (a₂/s₂)² with each semi-axis on
/// the side of its sign; the value is the square root of the largest (1 is the boundary).
fn combined_rows(scenario: &Scenario, signals: &Signals, rows: &mut Vec<CheckRow>) {
    let lim = &scenario.limits;
    if lim.combined.is_empty() {
        return;
    }
    for c in &lim.combined {
        let axis = format!("{}+{}", c.axes[0].name(), c.axes[1].name());
        match signals {
            Err(e) => rows.push(unevaluated(
                "combined",
                Some(&axis),
                Some(1.0),
                "1",
                e.to_string(),
                false,
            )),
            Ok(sig) => {
                let a = &sig.filtered[c.axes[0] as usize].values;
                let b = &sig.filtered[c.axes[1] as usize].values;
                let side = |v: f64, k: usize| {
                    if v < 0.0 {
                        c.semi_g[k][0]
                    } else {
                        c.semi_g[k][1]
                    }
                };
                let worst = a
                    .iter()
                    .zip(b)
                    .map(|(&x, &y)| (x / side(x, 0)).powi(2) + (y / side(y, 1)).powi(2))
                    .fold(0.0, f64::max)
                    .sqrt();
                rows.push(row("combined", Some(&axis), worst, 1.0, 1.0 - worst, "1"));
            }
        }
    }
}

/// Exit-speed checks. The value is the signed speed along the track at the exit (+ downstream,
/// as in `run`); the limits apply to the speed in the direction of travel, so for a vehicle
/// leaving backwards the limit is shown with the same (negative) sign.
fn exit_speed_rows(scenario: &Scenario, run: &RunResult, rows: &mut Vec<CheckRow>) {
    let lim = &scenario.limits;
    let bounds = [
        ("exit_speed_min", lim.exit_speed_min_m_s, false),
        ("exit_speed_max", lim.exit_speed_max_m_s, true),
    ];
    for (check, limit, is_max) in bounds {
        let Some(limit) = limit else { continue };
        match (run.outcome, run.exit_speed_m_s) {
            (Outcome::Cleared, Some(v)) => {
                let dir = if v < 0.0 { -1.0 } else { 1.0 };
                let margin = if is_max {
                    limit - v.abs()
                } else {
                    v.abs() - limit
                };
                rows.push(row(check, None, v, dir * limit, margin, "m/s"));
            }
            (Outcome::Stalled, _) if is_max => {
                // Stopped inside the zone: the exit speed is zero.
                rows.push(row(check, None, 0.0, limit, limit, "m/s"));
            }
            (Outcome::Stalled, _) => rows.push(unevaluated(
                check,
                None,
                Some(limit),
                "m/s",
                "stalled in the zone (judged by the stall check)",
                lim.allow_stall,
            )),
            (Outcome::RolledBack, _) => rows.push(unevaluated(
                check,
                None,
                Some(limit),
                "m/s",
                "rolled back out of the entry end (judged by the rollback check)",
                lim.allow_rollback,
            )),
            (Outcome::TimeLimit, _) | (Outcome::Cleared, None) => rows.push(unevaluated(
                check,
                None,
                Some(limit),
                "m/s",
                "the vehicle did not leave the zone",
                false,
            )),
        }
    }
}

/// Stop-position checks (arresters): the front position where the vehicle came to rest against
/// the window. A vehicle that did not stop in the zone fails with the reason.
fn stop_position_rows(scenario: &Scenario, run: &RunResult, rows: &mut Vec<CheckRow>) {
    let lim = &scenario.limits;
    let bounds = [
        ("stop_position_min", lim.stop_position_min_m, false),
        ("stop_position_max", lim.stop_position_max_m, true),
    ];
    for (check, limit, is_max) in bounds {
        let Some(limit) = limit else { continue };
        match (run.outcome, run.stall_position_m) {
            (Outcome::Stalled, Some(x)) => {
                let margin = if is_max { limit - x } else { x - limit };
                rows.push(row(check, None, x, limit, margin, "m"));
            }
            (outcome, _) => {
                let why = match outcome {
                    Outcome::Cleared => "the vehicle left the zone without stopping",
                    Outcome::RolledBack => "the vehicle rolled back out of the entry end",
                    _ => "the vehicle did not come to rest within the time limit",
                };
                rows.push(unevaluated(check, None, Some(limit), "m", why, false));
            }
        }
    }
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
    let signals = rider_signals(run, &scenario.rider);
    acceleration_rows(scenario, &signals, &mut rows);
    combined_rows(scenario, &signals, &mut rows);
    rate_rows(scenario, &signals, &mut rows);
    exit_speed_rows(scenario, run, &mut rows);
    stop_position_rows(scenario, run, &mut rows);
    if let Some(limit) = lim.max_duration_s {
        match run.time_in_zone_s {
            Some(d) => rows.push(row("duration", None, d, limit, limit - d, "s")),
            None => rows.push(unevaluated(
                "duration",
                None,
                Some(limit),
                "s",
                "the vehicle never entered the zone",
                false,
            )),
        }
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
    let magnet_c = temps.magnet_temp_c.unwrap_or(case.magnet_temp_c);
    if let Some(limit) = lim.max_magnet_temperature_c {
        rows.push(row(
            "magnet_temperature",
            None,
            magnet_c,
            limit,
            limit - magnet_c,
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
            magnet_c,
            grade_limit,
            grade_limit - magnet_c,
            "°C",
        ));
    }
    // A value that is not finite cannot pass.
    for r in &mut rows {
        if [r.value, r.margin].iter().flatten().any(|x| !x.is_finite()) {
            r.pass = false;
            r.not_evaluated
                .get_or_insert_with(|| "the value is not a finite number".into());
        }
    }
    let pass = rows.iter().all(|r| r.pass);
    CaseVerdict {
        case: case.name.clone(),
        pass,
        checks: rows,
    }
}

/// Which of two rows of the same check is worse: a failing row over a passing one, then the
/// smaller margin, then an unevaluated row over an evaluated one.
fn worse<'a>(a: &'a CheckRow, b: &'a CheckRow) -> &'a CheckRow {
    if a.pass != b.pass {
        return if a.pass { b } else { a };
    }
    match (a.margin, b.margin) {
        (Some(x), Some(y)) => {
            if y < x {
                b
            } else {
                a
            }
        }
        (None, Some(_)) => a,
        (Some(_), None) => b,
        (None, None) => a,
    }
}

/// The verdict of a case judged in several states: every check's row is the worst of the
/// states, tagged with the state it comes from. Rows of a check that only one state has are
/// kept as they are.
pub fn combine_states(states: &[(JudgedState, CaseVerdict)]) -> CaseVerdict {
    let mut rows: Vec<CheckRow> = Vec::new();
    for (state, cv) in states {
        for r in &cv.checks {
            let mut r = r.clone();
            r.state = Some(*state);
            match rows.iter_mut().find(|x| x.key() == r.key()) {
                Some(x) => {
                    if std::ptr::eq(worse(x, &r), &r) {
                        *x = r;
                    }
                }
                None => rows.push(r),
            }
        }
    }
    let case = states.first().map(|s| s.1.case.clone()).unwrap_or_default();
    CaseVerdict {
        case,
        pass: rows.iter().all(|r| r.pass),
        checks: rows,
    }
}

/// What a limit set leaves unconstrained on the braking side of the track axis, one sentence
/// per gap naming the field: braking while moving forward is −x (track along x) or +z (track
/// along the spine); rolling back it is the other side.
pub fn limit_warnings(scenario: &Scenario) -> Vec<String> {
    let lim = &scenario.limits;
    let axis = scenario.rider.track_axis;
    let k = axis as usize;
    let name = axis.name();
    let axes = if scenario.rider.passengers {
        "rider axes"
    } else {
        "vehicle axes"
    };
    let forward = scenario.cases.iter().any(|c| c.start_speed_m_s >= 0.0);
    let backward =
        scenario.cases.iter().any(|c| c.start_speed_m_s < 0.0) || (lim.allow_rollback && forward);
    // Whether braking moving forward is the negative side of the track axis.
    let forward_negative = !matches!(axis, crate::scenario::Axis::Z);
    let mut out = Vec::new();
    for (moving, present) in [("moving forward", forward), ("rolling back", backward)] {
        if !present {
            continue;
        }
        let negative = forward_negative == (moving == "moving forward");
        let (peak_key, peak_set, env_key, env_set) = if negative {
            (
                "min",
                lim.peak[k].min_g.is_some(),
                "negative",
                lim.envelope[k].negative.is_some(),
            )
        } else {
            (
                "max",
                lim.peak[k].max_g.is_some(),
                "positive",
                lim.envelope[k].positive.is_some(),
            )
        };
        let sign = if negative { "negative" } else { "positive" };
        if !peak_set {
            out.push(format!(
                "limits.peak.{name}.{peak_key} is not set: braking {moving} gives {sign} {name} \
                 ({axes} fixed to the vehicle), so the peak felt braking is unlimited"
            ));
        }
        let env_given = lim.envelope[k].negative.is_some() || lim.envelope[k].positive.is_some();
        if env_given && !env_set {
            out.push(format!(
                "limits.envelope.{name}.{env_key} is not set: braking {moving} gives {sign} \
                 {name}, so the sustained felt braking is unlimited"
            ));
        }
    }
    out
}

/// Verdict on every case; `temps[i]` belongs to `scenario.cases[i]` (may be empty).
pub fn verdict(scenario: &Scenario, runs: &[RunResult], temps: &[CaseTemperatures]) -> Verdict {
    // Each case judged on its own, the cases side by side.
    let judged: Vec<(usize, (&Case, &RunResult))> =
        scenario.cases.iter().zip(runs).enumerate().collect();
    let cases: Vec<CaseVerdict> = map_each_in_parallel(&judged, |&(i, (c, r))| {
        check_case(scenario, c, r, temps.get(i).copied().unwrap_or_default())
    });
    verdict_of(scenario, cases)
}

/// The scenario's verdict from its case verdicts (in case order): the worst case of each check
/// and the limit-set warnings.
pub fn verdict_of(scenario: &Scenario, cases: Vec<CaseVerdict>) -> Verdict {
    let mut worst: Vec<(String, &str, f64, &CheckRow)> = Vec::new();
    for cv in &cases {
        for r in &cv.checks {
            let key = r.key();
            let m = r.margin.unwrap_or(if r.pass {
                f64::INFINITY
            } else {
                f64::NEG_INFINITY
            });
            match worst.iter_mut().find(|w| w.0 == key) {
                Some(w) if m < w.2 => {
                    w.1 = &cv.case;
                    w.2 = m;
                    w.3 = r;
                }
                Some(_) => {}
                None => worst.push((key, &cv.case, m, r)),
            }
        }
    }
    let worst = worst
        .into_iter()
        .map(|(check, case, m, r)| Worst {
            check,
            case: case.to_string(),
            margin: m.is_finite().then_some(m),
            state: r.state,
            at_duration_s: r.at_duration_s,
        })
        .collect();
    let pass = cases.iter().all(|c| c.pass);
    Verdict {
        scenario: scenario.name.clone(),
        version: VERSION,
        pass,
        cases,
        worst,
        warnings: limit_warnings(scenario),
    }
}
