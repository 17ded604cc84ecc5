//! Tolerance and uncertainty studies: the samples of a scenario's `sweep:` block, each an
//! ordinary case judged through a [`Study`], and their statistics — the spread of every check,
//! the probability of failing it with 95 % intervals (Clopper–Pearson, Wilson), a Spearman sensitivity ranking,
//! and the worst sample as a complete scenario.
//!
//! Samples run in parallel and share one [`TableCache`] (tables keyed by design). Every table
//! reaches one common speed (that of all samples together), so a sample's forces do not depend
//! on which sample built the table first: the same seed gives the same result, bit for bit.
//! The worst sample is written as a scenario and judged again on its own, as `check` judges the
//! file; that verdict is the one reported for it (its own tables reach only its own speed, so
//! its numbers may differ from its row of the sweep in the last digits of the table
//! interpolation).

pub mod apply;
pub mod sample;
pub mod shard;
pub mod stats;

pub use sample::{Target, Variable};

use crate::checks::Verdict;
use crate::dynamics::model::table_speed_m_s;
use crate::scenario::sweep::SamplingMethod;
use crate::scenario::write::{to_yaml, WriteError};
use crate::scenario::{parse_str, Scenario};
use crate::study::{JudgeOptions, Progress, Silent, Study, StudyError, TableCache};
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use stats::{proportion, spearman, Proportion, Spread};

/// Confidence level of the failure-probability intervals.
pub const CONFIDENCE: f64 = 0.95;

/// Errors of a sweep.
#[derive(Debug, thiserror::Error)]
pub enum SweepError {
    /// The scenario has no `sweep:` block.
    #[error("the scenario has no `sweep:` block")]
    NoSweep,
    /// The case the sweep varies is not in the scenario.
    #[error("the sweep varies case '{0}', which the scenario does not have")]
    NoCase(String),
    /// There are no samples to judge (validation keeps a sweep at one or more).
    #[error("the sweep has no samples")]
    NoSamples,
    /// A sample could not be computed.
    #[error(transparent)]
    Study(#[from] StudyError),
    /// The worst sample could not be written as a scenario.
    #[error("the worst sample: {0}")]
    Write(#[from] WriteError),
    /// The written worst sample does not read back.
    #[error("the worst sample does not read back as a scenario: {0}")]
    Reread(#[source] crate::scenario::validate::ScenarioError),
}

/// One check of the verdict, as a column of the sweep.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckKey {
    /// `check`, `check.axis` or `check.axis.state` (e.g. `peak_min.x`).
    pub key: String,
    /// Unit of its value.
    pub unit: String,
    /// Its limit (the same in every sample).
    pub limit: Option<f64>,
}

/// One check in one sample.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SampleCheck {
    /// The value found, if evaluated.
    pub value: Option<f64>,
    /// Margin to the limit (negative: outside).
    pub margin: Option<f64>,
    /// Passed.
    pub pass: bool,
}

/// One sample: its input values, run outputs and checks.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SampleResult {
    /// 0-based sample number.
    pub index: usize,
    /// One value per sweep variable (SI; °C for temperatures).
    pub inputs: Vec<f64>,
    /// Every check passed.
    pub pass: bool,
    /// Exit speed, m/s (None: did not exit).
    pub exit_speed_m_s: Option<f64>,
    /// Peak deceleration, m/s².
    pub peak_decel_m_s2: Option<f64>,
    /// Time in the zone, s.
    pub time_in_zone_s: Option<f64>,
    /// Peak lateral force on the fins, N (signed along +y; only when some fin is off-centre,
    /// [`crate::dynamics::LateralPeak`]).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub peak_lateral_force_n: Option<f64>,
    /// One entry per [`CheckKey`] (a check the sample's verdict lacks counts as failed).
    pub checks: Vec<SampleCheck>,
    /// Smallest margin relative to its limit over the checks (−∞ for a failed check without a
    /// margin): the worst sample has the lowest.
    pub score: f64,
}

/// How one input variable moves a check.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Sensitivity {
    /// Variable name (column).
    pub variable: String,
    /// Spearman's rank correlation of the variable and the check's value.
    pub spearman: f64,
}

/// The statistics of one run output (not a check: it has no limit) over the samples.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OutputSummary {
    /// The output's key (`peak_lateral_force_n`).
    pub output: String,
    /// Its unit.
    pub unit: String,
    /// Spread of its value over the samples that have one.
    pub spread: Option<Spread>,
    /// Variables by decreasing |ρ|.
    pub sensitivity: Vec<Sensitivity>,
}

/// The statistics of one check over the samples.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckSummary {
    /// The check.
    pub check: CheckKey,
    /// Spread of its value over the samples where it was evaluated.
    pub spread: Option<Spread>,
    /// Probability of failing it, with its 95 % intervals (Clopper–Pearson and Wilson).
    pub failure: Proportion,
    /// Variables by decreasing |ρ|.
    pub sensitivity: Vec<Sensitivity>,
}

/// The result of a sweep.
#[derive(Debug, Clone, Serialize)]
pub struct SweepResult {
    /// Scenario name.
    pub scenario: String,
    /// The case varied.
    pub case: String,
    /// Sampling method.
    pub method: SamplingMethod,
    /// Seed.
    pub seed: u64,
    /// The sampled variables.
    pub variables: Vec<Variable>,
    /// The checks (columns of [`SampleResult::checks`]).
    pub checks: Vec<CheckKey>,
    /// Every sample, in order.
    pub samples: Vec<SampleResult>,
    /// Per check statistics, in the order of `checks`.
    pub summaries: Vec<CheckSummary>,
    /// The peak lateral force over the samples (only when some fin is off-centre or the
    /// sweep draws `fin_offset`).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub lateral: Option<OutputSummary>,
    /// Probability that a sample fails any check.
    pub any_failure: Proportion,
    /// Index of the worst sample.
    pub worst: usize,
    /// The worst sample as a complete scenario (YAML, read-back checked).
    pub worst_yaml: String,
    /// The worst sample judged on its own from that file (what `check` reports for it).
    pub worst_verdict: Verdict,
    /// Force tables held after the sweep (one per distinct design).
    pub tables: usize,
}

/// The sample design of a sweep, drawn whole from its seed: the variables, every sample's
/// values and the one speed every force table reaches (that of all samples together). A shard
/// draws the same design and judges a slice of it, so the shards' union is the whole sweep.
#[derive(Debug, Clone)]
pub struct Design {
    /// The sampled variables.
    pub variables: Vec<Variable>,
    /// One row per sample, one value per variable.
    pub values: Vec<Vec<f64>>,
    /// The speed every table reaches, m/s.
    pub table_speed_m_s: f64,
}

/// Draws the design of `scenario`'s `sweep:` block.
pub fn design(scenario: &Scenario) -> Result<Design, SweepError> {
    let sweep = scenario.sweep.as_ref().ok_or(SweepError::NoSweep)?;
    let base_case = apply::base_case(scenario, sweep)?;
    let variables = sample::variables(scenario, sweep);
    let values = sample::sample_values(sweep, &variables);
    let cases: Vec<_> = values
        .iter()
        .enumerate()
        .map(|(i, v)| apply::sample_case(base_case, &variables, v, i))
        .collect();
    let table_speed_m_s = table_speed_m_s(&Scenario {
        cases,
        ..scenario.clone()
    });
    Ok(Design {
        variables,
        values,
        table_speed_m_s,
    })
}

/// One row of a sample's verdict, as the sample leaves its run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct JudgedRow {
    /// `check`, `check.axis` or `check.axis.state`.
    pub key: String,
    /// Unit of value and limit.
    pub unit: String,
    /// The limit.
    pub limit: Option<f64>,
    /// The value found.
    pub value: Option<f64>,
    /// Margin to the limit.
    pub margin: Option<f64>,
    /// Passed.
    pub pass: bool,
}

/// One judged sample before the columns of all samples are known: what a shard file holds.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct JudgedSample {
    /// 0-based sample number.
    pub index: usize,
    /// One value per sweep variable.
    pub inputs: Vec<f64>,
    /// Every check passed.
    pub pass: bool,
    /// Exit speed, m/s.
    pub exit_speed_m_s: Option<f64>,
    /// Peak deceleration, m/s².
    pub peak_decel_m_s2: Option<f64>,
    /// Time in the zone, s.
    pub time_in_zone_s: Option<f64>,
    /// Peak lateral force on the fins, N (only when some fin is off-centre).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub peak_lateral_force_n: Option<f64>,
    /// Its verdict's rows, in order.
    pub rows: Vec<JudgedRow>,
}

/// Judges the samples `range` of `design` (tables from `cache`, each reaching the design's
/// common speed).
pub fn judge_samples(
    scenario: &Scenario,
    design: &Design,
    range: std::ops::Range<usize>,
    cache: &TableCache,
    options: &JudgeOptions,
    progress: &dyn Progress,
) -> Result<Vec<JudgedSample>, SweepError> {
    let sweep = scenario.sweep.as_ref().ok_or(SweepError::NoSweep)?;
    let base_case = apply::base_case(scenario, sweep)?;
    let vars = &design.variables;
    let values = design.values.get(range.clone()).unwrap_or(&[]);
    // A sample drawing a zero offset everywhere has no lateral table: its lateral force is 0.
    let offset_drawn = sweep.draws(crate::scenario::sweep::SweepInput::FinOffset);
    progress.stage("sweeping samples", Some(values.len() as u64));
    let judged = values
        .par_iter()
        .enumerate()
        .map(|(k, v)| {
            let i = range.start + k;
            let case = apply::sample_case(base_case, vars, v, i);
            let s = apply::sample_scenario(scenario, vars, v, case);
            let study = Study::with_cache_reaching(s, cache, design.table_speed_m_s)?;
            let j = study.judge(options, &Silent)?;
            progress.advance(1);
            let run = j.runs.first();
            let rows = j
                .verdict
                .cases
                .iter()
                .flat_map(|c| &c.checks)
                .map(|r| JudgedRow {
                    key: row_key(r),
                    unit: r.unit.clone(),
                    limit: r.limit,
                    value: r.value,
                    margin: r.margin,
                    pass: r.pass,
                })
                .collect();
            Ok(JudgedSample {
                index: i,
                inputs: v.clone(),
                pass: j.verdict.pass,
                exit_speed_m_s: run.and_then(|r| r.exit_speed_m_s),
                peak_decel_m_s2: run.and_then(|r| r.peak_decel_m_s2),
                time_in_zone_s: run.and_then(|r| r.time_in_zone_s),
                peak_lateral_force_n: run
                    .and_then(|r| r.peak_lateral.map(|p| p.force_n))
                    .or(offset_drawn.then_some(0.0)),
                rows,
            })
        })
        .collect::<Result<_, StudyError>>()?;
    Ok(judged)
}

/// Runs the sweep of `scenario` (its `sweep:` block) with every case judged by `options`.
pub fn run_sweep(
    scenario: &Scenario,
    options: &JudgeOptions,
    progress: &dyn Progress,
) -> Result<SweepResult, SweepError> {
    let design = design(scenario)?;
    let cache = TableCache::default();
    let all = 0..design.values.len();
    let judged = judge_samples(scenario, &design, all, &cache, options, progress)?;
    assemble(scenario, &design, judged, cache.len(), options)
}

/// The result of a sweep from its judged samples (every sample of `design`, in order): the
/// columns, statistics, the worst sample written and judged on its own. `tables` is the number
/// of distinct force tables the samples used.
pub fn assemble(
    scenario: &Scenario,
    design: &Design,
    judged: Vec<JudgedSample>,
    tables: usize,
    options: &JudgeOptions,
) -> Result<SweepResult, SweepError> {
    let sweep = scenario.sweep.as_ref().ok_or(SweepError::NoSweep)?;
    let base_case = apply::base_case(scenario, sweep)?;
    let vars = &design.variables;
    let keys = check_keys(&judged);
    let samples: Vec<SampleResult> = judged
        .into_iter()
        .map(|j| {
            let checks = sample_checks(&keys, &j.rows);
            SampleResult {
                index: j.index,
                inputs: j.inputs,
                pass: j.pass,
                exit_speed_m_s: j.exit_speed_m_s,
                peak_decel_m_s2: j.peak_decel_m_s2,
                time_in_zone_s: j.time_in_zone_s,
                peak_lateral_force_n: j.peak_lateral_force_n,
                score: score(&keys, &checks),
                checks,
            }
        })
        .collect();
    let summaries = summarise(&keys, vars, &samples)?;
    let lateral = output_summary("peak_lateral_force_n", "N", vars, &samples, |s| {
        s.peak_lateral_force_n
    });
    let failing = samples.iter().filter(|s| !s.pass).count();
    let any_failure =
        proportion(failing, samples.len(), CONFIDENCE).ok_or(SweepError::NoSamples)?;
    let worst = samples
        .iter()
        .min_by(|a, b| a.score.total_cmp(&b.score).then(a.index.cmp(&b.index)))
        .map_or(0, |s| s.index);
    let worst_values = design.values.get(worst).ok_or(SweepError::NoSamples)?;
    let worst_scenario = apply::sample_scenario(
        scenario,
        vars,
        worst_values,
        apply::sample_case(base_case, vars, worst_values, worst),
    );
    let worst_yaml = to_yaml(&worst_scenario)?;
    let back = parse_str(&worst_yaml, "<worst sample>", None).map_err(SweepError::Reread)?;
    let worst_verdict = Study::new(back)?.judge(options, &Silent)?.verdict;
    Ok(SweepResult {
        scenario: scenario.name.clone(),
        case: sweep.case.clone(),
        method: sweep.method,
        seed: sweep.seed,
        variables: vars.clone(),
        checks: keys,
        samples,
        summaries,
        lateral,
        any_failure,
        worst,
        worst_yaml,
        worst_verdict,
        tables,
    })
}

/// The key of a verdict row: check, axis, state.
fn row_key(r: &crate::checks::CheckRow) -> String {
    let mut k = r.check.clone();
    if let Some(a) = &r.axis {
        k = format!("{k}.{a}");
    }
    if let Some(s) = r.state {
        k = format!("{k}.{}", s.name());
    }
    k
}

/// Every check of the samples' verdicts, in order of first appearance.
fn check_keys(judged: &[JudgedSample]) -> Vec<CheckKey> {
    let mut out: Vec<CheckKey> = Vec::new();
    for r in judged.iter().flat_map(|j| &j.rows) {
        if !out.iter().any(|k| k.key == r.key) {
            out.push(CheckKey {
                key: r.key.clone(),
                unit: r.unit.clone(),
                limit: r.limit,
            });
        }
    }
    out
}

fn sample_checks(keys: &[CheckKey], rows: &[JudgedRow]) -> Vec<SampleCheck> {
    keys.iter()
        .map(|k| match rows.iter().find(|r| r.key == k.key) {
            Some(r) => SampleCheck {
                value: r.value,
                margin: r.margin,
                pass: r.pass,
            },
            None => SampleCheck {
                value: None,
                margin: None,
                pass: false,
            },
        })
        .collect()
}

/// The smallest relative margin of a sample's checks (margin / |limit|, the margin itself when
/// the limit is zero or absent; −∞ for a failed check without a margin).
fn score(keys: &[CheckKey], checks: &[SampleCheck]) -> f64 {
    keys.iter()
        .zip(checks)
        .map(|(k, c)| match (c.margin, k.limit) {
            (Some(m), Some(l)) if l != 0.0 => m / l.abs(),
            (Some(m), _) => m,
            (None, _) if !c.pass => f64::NEG_INFINITY,
            (None, _) => f64::INFINITY,
        })
        .fold(f64::INFINITY, f64::min)
}

fn summarise(
    keys: &[CheckKey],
    vars: &[Variable],
    samples: &[SampleResult],
) -> Result<Vec<CheckSummary>, SweepError> {
    keys.iter()
        .enumerate()
        .map(|(j, k)| {
            let with_value: Vec<(usize, f64)> = samples
                .iter()
                .enumerate()
                .filter_map(|(i, s)| s.checks[j].value.map(|v| (i, v)))
                .collect();
            let values: Vec<f64> = with_value.iter().map(|(_, v)| *v).collect();
            let failing = samples.iter().filter(|s| !s.checks[j].pass).count();
            Ok(CheckSummary {
                check: k.clone(),
                spread: Spread::of(&values),
                failure: proportion(failing, samples.len(), CONFIDENCE)
                    .ok_or(SweepError::NoSamples)?,
                sensitivity: sensitivities(vars, samples, &with_value),
            })
        })
        .collect()
}

/// Spearman's ρ of every variable against the values (sample index, value), by decreasing |ρ|;
/// none when the values are constant to rounding ([`stats::varies_beyond_rounding`]).
fn sensitivities(
    vars: &[Variable],
    samples: &[SampleResult],
    with_value: &[(usize, f64)],
) -> Vec<Sensitivity> {
    let values: Vec<f64> = with_value.iter().map(|(_, v)| *v).collect();
    // A value constant to rounding ranks its samples by noise: no ranking.
    if !stats::varies_beyond_rounding(&values) {
        return Vec::new();
    }
    let mut sensitivity: Vec<Sensitivity> = vars
        .iter()
        .enumerate()
        .filter_map(|(m, var)| {
            let x: Vec<f64> = with_value
                .iter()
                .map(|(i, _)| samples[*i].inputs[m])
                .collect();
            spearman(&x, &values).map(|rho| Sensitivity {
                variable: var.name.clone(),
                spearman: rho,
            })
        })
        .collect();
    sensitivity.sort_by(|a, b| b.spearman.abs().total_cmp(&a.spearman.abs()));
    sensitivity
}

/// The spread and sensitivities of a run output over the samples that have it (None when no
/// sample has it).
fn output_summary(
    output: &str,
    unit: &str,
    vars: &[Variable],
    samples: &[SampleResult],
    value: impl Fn(&SampleResult) -> Option<f64>,
) -> Option<OutputSummary> {
    let with_value: Vec<(usize, f64)> = samples
        .iter()
        .enumerate()
        .filter_map(|(i, s)| value(s).map(|v| (i, v)))
        .collect();
    if with_value.is_empty() {
        return None;
    }
    let values: Vec<f64> = with_value.iter().map(|(_, v)| *v).collect();
    Some(OutputSummary {
        output: output.to_string(),
        unit: unit.to_string(),
        spread: Spread::of(&values),
        sensitivity: sensitivities(vars, samples, &with_value),
    })
}
