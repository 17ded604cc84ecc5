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
pub mod stats;

pub use sample::{Target, Variable};

use crate::checks::Verdict;
use crate::dynamics::model::table_speed_m_s;
use crate::scenario::sweep::SamplingMethod;
use crate::scenario::write::{to_yaml, WriteError};
use crate::scenario::{parse_str, Scenario};
use crate::study::{JudgeOptions, Progress, Silent, Study, StudyError, TableCache};
use rayon::prelude::*;
use serde::Serialize;
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

/// Runs the sweep of `scenario` (its `sweep:` block) with every case judged by `options`.
pub fn run_sweep(
    scenario: &Scenario,
    options: &JudgeOptions,
    progress: &dyn Progress,
) -> Result<SweepResult, SweepError> {
    let sweep = scenario.sweep.as_ref().ok_or(SweepError::NoSweep)?;
    let base_case = apply::base_case(scenario, sweep)?;
    let vars = sample::variables(scenario, sweep);
    let values = sample::sample_values(sweep, &vars);
    let cases: Vec<_> = values
        .iter()
        .enumerate()
        .map(|(i, v)| apply::sample_case(base_case, &vars, v, i))
        .collect();
    // One speed for every table: that of all samples together.
    let floor = table_speed_m_s(&Scenario {
        cases: cases.clone(),
        ..scenario.clone()
    });
    let cache = TableCache::default();
    progress.stage("sweeping samples", Some(values.len() as u64));
    let judged: Vec<(SampleResult, Verdict)> = cases
        .into_par_iter()
        .zip(values.par_iter())
        .enumerate()
        .map(|(i, (case, v))| {
            let s = apply::sample_scenario(scenario, &vars, v, case);
            let study = Study::with_cache_reaching(s, &cache, floor)?;
            let j = study.judge(options, &Silent)?;
            progress.advance(1);
            let run = j.runs.first();
            let sample = SampleResult {
                index: i,
                inputs: v.clone(),
                pass: j.verdict.pass,
                exit_speed_m_s: run.and_then(|r| r.exit_speed_m_s),
                peak_decel_m_s2: run.and_then(|r| r.peak_decel_m_s2),
                time_in_zone_s: run.and_then(|r| r.time_in_zone_s),
                checks: Vec::new(),
                score: 0.0,
            };
            Ok((sample, j.verdict))
        })
        .collect::<Result<_, StudyError>>()?;
    let keys = check_keys(&judged);
    let samples: Vec<SampleResult> = judged
        .into_iter()
        .map(|(mut s, v)| {
            s.checks = sample_checks(&keys, &v);
            s.score = score(&keys, &s.checks);
            s
        })
        .collect();
    let summaries = summarise(&keys, &vars, &samples)?;
    let failing = samples.iter().filter(|s| !s.pass).count();
    let any_failure =
        proportion(failing, samples.len(), CONFIDENCE).ok_or(SweepError::NoSamples)?;
    let worst = samples
        .iter()
        .min_by(|a, b| a.score.total_cmp(&b.score).then(a.index.cmp(&b.index)))
        .map_or(0, |s| s.index);
    let worst_scenario = apply::sample_scenario(
        scenario,
        &vars,
        &values[worst],
        apply::sample_case(base_case, &vars, &values[worst], worst),
    );
    let worst_yaml = to_yaml(&worst_scenario)?;
    let back = parse_str(&worst_yaml, "<worst sample>", None).map_err(SweepError::Reread)?;
    let worst_verdict = Study::new(back)?.judge(options, &Silent)?.verdict;
    Ok(SweepResult {
        scenario: scenario.name.clone(),
        case: sweep.case.clone(),
        method: sweep.method,
        seed: sweep.seed,
        variables: vars,
        checks: keys,
        samples,
        summaries,
        any_failure,
        worst,
        worst_yaml,
        worst_verdict,
        tables: cache.len(),
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
fn check_keys(judged: &[(SampleResult, Verdict)]) -> Vec<CheckKey> {
    let mut out: Vec<CheckKey> = Vec::new();
    for (_, v) in judged {
        for r in v.cases.iter().flat_map(|c| &c.checks) {
            let key = row_key(r);
            if !out.iter().any(|k| k.key == key) {
                out.push(CheckKey {
                    key,
                    unit: r.unit.clone(),
                    limit: r.limit,
                });
            }
        }
    }
    out
}

fn sample_checks(keys: &[CheckKey], v: &Verdict) -> Vec<SampleCheck> {
    keys.iter()
        .map(|k| {
            let row = v
                .cases
                .iter()
                .flat_map(|c| &c.checks)
                .find(|r| row_key(r) == k.key);
            match row {
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
            }
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
            Ok(CheckSummary {
                check: k.clone(),
                spread: Spread::of(&values),
                failure: proportion(failing, samples.len(), CONFIDENCE)
                    .ok_or(SweepError::NoSamples)?,
                sensitivity,
            })
        })
        .collect()
}
