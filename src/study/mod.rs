//! The study: one validated scenario with its force tables, the runs of its cases, the fin
//! temperatures they are judged on, and the verdict.
//!
//! Every command goes through a [`Study`]; none assembles the pipeline "force tables → runs →
//! temperatures → verdict" itself. Force tables are built once per distinct design: a
//! [`TableCache`] handed to [`Study::with_cache`] keeps them across the studies of many
//! scenarios (the planner's candidate layouts, a sweep's samples). Long computations report
//! through a [`Progress`] that the command line turns into a progress bar; the library never
//! draws one itself.

pub mod mirror;
pub mod progress;
pub mod warnings;

pub use crate::dynamics::model::TableCache;
pub use progress::{Progress, Silent};

use crate::checks::limits::{check_case, combine_states, verdict_of, JudgedState};
use crate::checks::{verdict, CaseTemperatures, Verdict};
use crate::curve::{curves, CurveOptions, PairCurve};
use crate::dynamics::{simulate_case, BrakeTables, DynamicsError, RunOptions, RunResult, Sampling};
use crate::numeric::{map_each_in_parallel, map_in_parallel};
use crate::scenario::{Case, Scenario};
use crate::thermal::{heat_case, start_from_states, CaseHeat, HeatOptions, ThermalError};
use mirror::{relabel_heat, relabel_run, Mirrors, Relabel};

/// Errors of a study: a computation of the dynamics or thermal layer that could not complete.
#[derive(Debug, thiserror::Error)]
pub enum StudyError {
    /// Building a force law or integrating a case failed.
    #[error(transparent)]
    Dynamics(#[from] DynamicsError),
    /// A heat calculation failed.
    #[error(transparent)]
    Thermal(#[from] ThermalError),
    /// The samples a run would keep exceed [`MAX_SAMPLES`]: refused before the runs start.
    #[error(
        "a sample interval (`--dt`) of {dt_s} s over {span_s:.3} s (case '{case}', the longest) \
         is {per_case} samples per case, {total} over {cases} cases: above the \
         {MAX_SAMPLES}-sample budget; use a sample interval of at least {suggest_s:.1e} s"
    )]
    SampleBudget {
        /// The sample interval asked for, s.
        dt_s: f64,
        /// The longest sampled span of a case, s.
        span_s: f64,
        /// Its case.
        case: String,
        /// Samples of that case.
        per_case: u64,
        /// Samples of all cases.
        total: u64,
        /// Number of cases.
        cases: usize,
        /// The smallest interval within the budget, s.
        suggest_s: f64,
    },
    /// A result came out as NaN or infinite: never printed as a number.
    #[error("case '{case}': {quantity} is not a finite number; the computation cannot be trusted")]
    NotFinite {
        /// The case.
        case: String,
        /// The quantity.
        quantity: String,
    },
}

/// The most samples the runs of one study may keep in memory together (about 112 bytes each, so
/// about 450 MB; common practice for a workstation tool: refuse rather than exhaust memory).
pub const MAX_SAMPLES: u64 = 4_000_000;

/// The first quantity of a run that is not finite, if any.
fn non_finite_run(r: &RunResult) -> Option<String> {
    let optional = [
        ("entry speed", r.entry_speed_m_s),
        ("exit speed", r.exit_speed_m_s),
        ("lowest speed", r.min_speed_m_s),
        ("stall position", r.stall_position_m),
        ("peak deceleration", r.peak_decel_m_s2),
        ("time of the peak", r.peak_decel_time_s),
        ("position of the peak", r.peak_decel_position_m),
        ("onset", r.peak_onset_g_s),
        ("time in the zone", r.time_in_zone_s),
    ];
    let plain = [
        ("braking energy", r.braking_energy_j),
        ("resistance energy", r.resistance_energy_j),
        ("energy residual", r.energy_residual_j),
        ("initial energy", r.initial_energy_j),
        ("peak brake force", r.peak_brake_force_n),
        ("end time", r.end_time_s),
    ];
    optional
        .iter()
        .filter_map(|(n, v)| v.map(|v| (*n, v)))
        .chain(plain)
        .find(|(_, v)| !v.is_finite())
        .map(|(n, _)| n.to_string())
        .or_else(|| {
            r.fins
                .iter()
                .find(|f| ![f.energy_j, f.end_temp_c].iter().all(|v| v.is_finite()))
                .map(|f| format!("the heat of fin '{}'", f.fin))
        })
        .or_else(|| {
            r.samples
                .iter()
                .position(|s| {
                    ![s.t_s, s.s_m, s.v_m_s, s.a_m_s2, s.brake_force_n]
                        .iter()
                        .all(|v| v.is_finite())
                })
                .map(|k| format!("sample {k} of the profile"))
        })
}

/// The first quantity of a heat result that is not finite, if any.
fn non_finite_heat(h: &CaseHeat) -> Option<String> {
    let fins = h.fins.iter().find_map(|f| {
        [
            f.energy_per_pass_j,
            f.peak_temperature_c,
            f.steady_peak_temperature_c,
            f.steady_start_temperature_c,
        ]
        .iter()
        .any(|v| !v.is_finite())
        .then(|| format!("the temperature of fin '{}'", f.fin))
    });
    fins.or_else(|| {
        h.track_profiles.iter().find_map(|p| {
            p.temps
                .iter()
                .any(|(s, t)| !s.is_finite() || !t.is_finite())
                .then(|| format!("the temperature along fin '{}'", p.fin))
        })
    })
    .or_else(|| h.last_run.as_ref().and_then(non_finite_run))
}

/// Every run finite, or the first case and quantity that is not.
fn all_finite_runs(runs: Vec<RunResult>) -> Result<Vec<RunResult>, StudyError> {
    match runs
        .iter()
        .find_map(|r| non_finite_run(r).map(|q| (r.case.clone(), q)))
    {
        Some((case, quantity)) => Err(StudyError::NotFinite { case, quantity }),
        None => Ok(runs),
    }
}

/// When the fin heat is computed by [`Study::judge`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum HeatDemand {
    /// Only when the verdict needs it (a fin-temperature limit is set).
    #[default]
    ForVerdict,
    /// Always (a report shows the heating); a failure is kept in the judgement instead of ending
    /// the study when the verdict does not depend on it.
    Always,
}

/// Options of [`Study::judge`].
#[derive(Debug, Clone, Default)]
pub struct JudgeOptions {
    /// Options of the runs that are judged.
    pub run: RunOptions,
    /// When to compute the fin heat.
    pub heat: HeatDemand,
}

/// The judged study: runs, heat and verdict of every case, in case order.
#[derive(Debug)]
pub struct Judgement {
    /// One run per case (the first dispatch with a duty block).
    pub runs: Vec<RunResult>,
    /// With a duty block, one run per case at the duty cycle's steady state; else empty.
    pub steady_runs: Vec<RunResult>,
    /// One heat result per case; empty when it was not needed or could not be computed.
    pub heat: Vec<CaseHeat>,
    /// Why the heat is missing although it was asked for ([`HeatDemand::Always`] only).
    pub heat_failure: Option<ThermalError>,
    /// The verdict.
    pub verdict: Verdict,
}

/// One scenario with its force tables, ready to run, heat and judge.
#[derive(Debug, Clone)]
pub struct Study {
    scenario: Scenario,
    tables: BrakeTables,
    /// Cases whose results are an earlier case's relabelled ([`mirror`]).
    mirrors: Mirrors,
}

impl Study {
    /// Builds the force tables of `scenario` (one per distinct fin × magnet design).
    pub fn new(scenario: Scenario) -> Result<Self, StudyError> {
        Self::with_cache(scenario, &TableCache::default())
    }

    /// Like [`Study::new`], taking tables from `cache` where it already holds the design and
    /// adding the ones it builds.
    pub fn with_cache(scenario: Scenario, cache: &TableCache) -> Result<Self, StudyError> {
        let tables = BrakeTables::build_cached(&scenario, cache)?;
        Ok(Self::from_parts(scenario, tables))
    }

    /// Like [`Study::with_cache`], with every force table reaching at least
    /// `min_table_speed_m_s` (see [`BrakeTables::build_reaching`]).
    pub fn with_cache_reaching(
        scenario: Scenario,
        cache: &TableCache,
        min_table_speed_m_s: f64,
    ) -> Result<Self, StudyError> {
        let tables = BrakeTables::build_reaching(&scenario, cache, min_table_speed_m_s)?;
        Ok(Self::from_parts(scenario, tables))
    }

    fn from_parts(scenario: Scenario, tables: BrakeTables) -> Self {
        let mirrors = Mirrors::of(&scenario);
        Self {
            scenario,
            tables,
            mirrors,
        }
    }

    /// `compute` of every case, in case order, on the rayon pool. With `mirrored`, a case that
    /// is the relabelling of an earlier one ([`mirror`]) takes that case's result through
    /// `carry` instead, and is computed only when `carry` declines it.
    fn each_case<T, E>(
        &self,
        mirrored: bool,
        compute: impl Fn(usize) -> Result<T, E> + Sync + Send,
        carry: impl Fn(&T, &Relabel, &Case) -> Option<T>,
    ) -> Result<Vec<T>, E>
    where
        T: Send,
        E: Send,
    {
        let cases = &self.scenario.cases;
        let all: Vec<usize> = (0..cases.len()).collect();
        if !mirrored || self.mirrors.carried() == 0 {
            return map_in_parallel(&all, |&i| compute(i));
        }
        let first: Vec<usize> = all
            .iter()
            .copied()
            .filter(|&i| self.mirrors.source_of(i).is_none())
            .collect();
        let mut out: Vec<Option<T>> = all.iter().map(|_| None).collect();
        for (i, r) in first.iter().zip(map_in_parallel(&first, |&i| compute(i))?) {
            out[*i] = Some(r);
        }
        let mut declined = Vec::new();
        for (i, case) in cases.iter().enumerate() {
            if out[i].is_some() {
                continue;
            }
            let carried = self.mirrors.source_of(i).and_then(|(from, relabel)| {
                out[from].as_ref().and_then(|t| carry(t, relabel, case))
            });
            match carried {
                Some(t) => out[i] = Some(t),
                None => declined.push(i),
            }
        }
        for (i, r) in declined
            .iter()
            .zip(map_in_parallel(&declined, |&i| compute(i))?)
        {
            out[*i] = Some(r);
        }
        match out.into_iter().collect::<Option<Vec<T>>>() {
            Some(v) => Ok(v),
            // Every slot is filled above; should one not be, compute them all.
            None => map_in_parallel(&all, |&i| compute(i)),
        }
    }

    /// The scenario.
    pub fn scenario(&self) -> &Scenario {
        &self.scenario
    }

    /// Its force tables.
    pub fn tables(&self) -> &BrakeTables {
        &self.tables
    }

    /// Hands the scenario back.
    pub fn into_scenario(self) -> Scenario {
        self.scenario
    }

    /// Runs every case (in parallel), results in case order. A vehicle fin heated past its
    /// material's softening point or solidus adds a warning to its run.
    ///
    /// A sample interval whose samples could exceed [`MAX_SAMPLES`] is first tried on runs that
    /// keep no fine samples, and refused with [`StudyError::SampleBudget`] when the real spans
    /// need more.
    pub fn run(&self, options: &RunOptions) -> Result<Vec<RunResult>, StudyError> {
        self.sample_budget(options)?;
        let s = &self.scenario;
        let mut runs = all_finite_runs(self.each_case(
            Mirrors::apply_to(options),
            |i| simulate_case(s, &self.tables, &s.cases[i], options),
            |r, relabel, c| relabel_run(s, r, relabel, c),
        )?)?;
        // A sweep drawing fin offsets reports the nominal lateral force too (0 when centred).
        let offset_drawn = s
            .sweep
            .as_ref()
            .is_some_and(|w| w.draws(crate::scenario::sweep::SweepInput::FinOffset));
        for r in &mut runs {
            if offset_drawn {
                r.peak_lateral.get_or_insert_with(Default::default);
            }
            for (f, h) in s.fins.iter().zip(&r.fins) {
                let what = format!("fin '{}'", f.name);
                r.warnings
                    .extend(f.material.temperature_warning(&what, h.end_temp_c));
            }
        }
        Ok(runs)
    }

    /// Refuses, before the real runs, a sample interval that would keep more than
    /// [`MAX_SAMPLES`] samples over all cases. Cheap when the time limit already bounds them.
    fn sample_budget(&self, options: &RunOptions) -> Result<(), StudyError> {
        let s = &self.scenario;
        let dt = options.sample_dt_s;
        let cases = s.cases.len();
        let bound = s.time_limit_s / dt * cases as f64;
        if dt.is_nan() || dt <= 0.0 || bound <= MAX_SAMPLES as f64 {
            return Ok(());
        }
        let coarse = RunOptions {
            sample_dt_s: (s.time_limit_s / 1000.0).max(dt),
            ..options.clone()
        };
        let spans = map_in_parallel(&s.cases, |c| {
            simulate_case(s, &self.tables, c, &coarse).map(|r| {
                let span = match options.sampling {
                    Sampling::Full => r.end_time_s,
                    Sampling::ZoneOnly => r.time_in_zone_s.unwrap_or(0.0),
                };
                (r.case, span)
            })
        })?;
        let per = |span: f64| (span / dt).ceil() as u64 + 1;
        let total: u64 = spans.iter().map(|(_, t)| per(*t)).sum();
        if total <= MAX_SAMPLES {
            return Ok(());
        }
        let (case, span_s) = spans
            .iter()
            .max_by(|a, b| a.1.total_cmp(&b.1))
            .cloned()
            .unwrap_or_default();
        let all_spans: f64 = spans.iter().map(|(_, t)| t).sum();
        Err(StudyError::SampleBudget {
            dt_s: dt,
            span_s,
            case,
            per_case: per(span_s),
            total,
            cases,
            suggest_s: all_spans / (MAX_SAMPLES - cases as u64) as f64,
        })
    }

    /// Fin heat of every case over one pass or the duty cycle (in parallel), in case order.
    pub fn heat(
        &self,
        options: &HeatOptions,
        progress: &dyn Progress,
    ) -> Result<Vec<CaseHeat>, StudyError> {
        self.sample_budget(&RunOptions {
            sample_dt_s: options.sample_dt_s,
            sampling: Sampling::Full,
            ..RunOptions::default()
        })?;
        let s = &self.scenario;
        progress.stage("heating the fins", Some(s.cases.len() as u64));
        let out = self.each_case(
            true,
            |i| {
                let h = heat_case(s, &self.tables, &s.cases[i], options);
                progress.advance(1);
                h
            },
            |h, relabel, c| {
                let carried = relabel_heat(s, h, relabel, c);
                if carried.is_some() {
                    progress.advance(1);
                }
                carried
            },
        )?;
        if let Some((case, quantity)) = out
            .iter()
            .find_map(|h| non_finite_heat(h).map(|q| (h.case.clone(), q)))
        {
            return Err(StudyError::NotFinite { case, quantity });
        }
        Ok(out)
    }

    /// Runs every case, computes the fin temperatures the verdict needs, and judges.
    ///
    /// Without a duty block each case is judged once, from its own fin temperature. With a
    /// duty block each case is judged at the first dispatch and at the duty cycle's steady state
    /// (a run starting from the fin temperatures the cycle reaches before a dispatch), and every
    /// check takes the worse of the two states (the row says which). The fin temperature is
    /// judged on the peak the state reaches: the first pass's, or the steady cycle's.
    pub fn judge(
        &self,
        options: &JudgeOptions,
        progress: &dyn Progress,
    ) -> Result<Judgement, StudyError> {
        let s = &self.scenario;
        progress.stage("running cases", None);
        let runs = self.run(&options.run)?;
        let needed = s.limits.max_fin_temperature_c.is_some() || s.duty.is_some();
        let (heat, heat_failure) = match (options.heat, needed) {
            (HeatDemand::ForVerdict, false) => (Vec::new(), None),
            (_, true) => (self.heat(&HeatOptions::default(), progress)?, None),
            (HeatDemand::Always, false) => match self.heat(&HeatOptions::default(), progress) {
                Ok(h) => (h, None),
                Err(StudyError::Thermal(e)) => (Vec::new(), Some(e)),
                Err(e) => return Err(e),
            },
        };
        let judged = s.limits.max_fin_temperature_c.is_some();
        let (verdict, steady_runs) = if s.duty.is_some() {
            progress.stage("running cases at the steady state", None);
            // The steady states of a mirrored case are its source's relabelled, so its steady
            // run is the source's relabelled too.
            let steady_runs: Vec<RunResult> = self.each_case(
                Mirrors::apply_to(&options.run),
                |i| {
                    let (c, h) = (&s.cases[i], &heat[i]);
                    let o = start_from_states(&h.steady_start, c, options.run.clone());
                    simulate_case(s, &self.tables, c, &o)
                },
                |r, relabel, c| relabel_run(s, r, relabel, c),
            )?;
            let steady_runs = all_finite_runs(steady_runs)?;
            // Each case judged on its own, the cases side by side.
            let states: Vec<_> = s
                .cases
                .iter()
                .zip(heat.iter().zip(runs.iter().zip(&steady_runs)))
                .collect();
            let cases = map_each_in_parallel(&states, |&(c, (h, (first, steady)))| {
                let at = |t: f64, magnet_c: Option<f64>| CaseTemperatures {
                    peak_fin_temperature_c: judged.then_some(t),
                    magnet_temp_c: magnet_c,
                };
                combine_states(&[
                    (
                        JudgedState::First,
                        check_case(s, c, first, at(h.first_peak_fin_temperature_c, None)),
                    ),
                    (
                        JudgedState::Steady,
                        check_case(
                            s,
                            c,
                            steady,
                            at(
                                h.steady_peak_fin_temperature_c,
                                Some(h.judged_magnet_temp_c),
                            ),
                        ),
                    ),
                ])
            });
            (verdict_of(s, cases), steady_runs)
        } else {
            let temps = judged_temperatures(s, &heat);
            (verdict(s, &runs, &temps), Vec::new())
        };
        let mut verdict = verdict;
        // The runs' and heat passes' warnings (measured curve left, creeping, fins past their
        // softening point or solidus) and runs far above the critical speed, each said once.
        let all_runs: Vec<&RunResult> = runs.iter().chain(&steady_runs).collect();
        for w in self.warnings_of_runs(&all_runs).into_iter().chain(
            self.heat_warnings(&heat)
                .into_iter()
                .filter(|w| w.contains("softening point") || w.contains("solidus")),
        ) {
            if !verdict.warnings.contains(&w) {
                verdict.warnings.push(w);
            }
        }
        Ok(Judgement {
            runs,
            steady_runs,
            heat,
            heat_failure,
            verdict,
        })
    }

    /// The warnings of a set of runs, each said once: the runs' own warnings grouped by wording
    /// (see [`warnings::grouped`]) and whether some run meets the magnets far above the
    /// critical speed.
    pub fn run_warnings(&self, runs: &[RunResult]) -> Vec<String> {
        self.warnings_of_runs(&runs.iter().collect::<Vec<_>>())
    }

    /// [`Study::run_warnings`] of runs of any states (a case may appear more than once).
    fn warnings_of_runs(&self, runs: &[&RunResult]) -> Vec<String> {
        let items: Vec<(String, String)> = runs
            .iter()
            .flat_map(|r| r.warnings.iter().map(|w| (r.case.clone(), w.clone())))
            .collect();
        let mut out = warnings::grouped(&items, self.scenario.cases.len());
        out.extend(warnings::far_above_critical(
            &self.scenario,
            &self.tables,
            runs,
        ));
        out
    }

    /// The warnings of the heat of every case (grade limits, no steady state, the runs'
    /// warnings), each said once (see [`warnings::grouped`]).
    pub fn heat_warnings(&self, heats: &[CaseHeat]) -> Vec<String> {
        let items: Vec<(String, String)> = heats
            .iter()
            .flat_map(|h| h.warnings.iter().map(|w| (h.case.clone(), w.clone())))
            .collect();
        warnings::grouped(&items, self.scenario.cases.len())
    }

    /// Force–speed curves of the section × fin pairs.
    pub fn curves(&self, options: &CurveOptions) -> Result<Vec<PairCurve>, StudyError> {
        Ok(curves(&self.scenario, &self.tables, options)?)
    }

    /// The curves of every pair on the default speed grid at the first case's temperatures (the
    /// report's).
    pub fn default_curves(&self) -> Result<Vec<PairCurve>, StudyError> {
        self.curves(&CurveOptions {
            section: None,
            speeds_m_s: self.default_speeds(),
            fin_temp_c: None,
            magnet_temp_c: None,
        })
    }

    /// The default speed grid of [`Study::curves`].
    pub fn default_speeds(&self) -> Vec<f64> {
        crate::curve::default_speeds(&self.scenario, &self.tables)
    }
}

/// The temperatures each case is judged on, from heat computed for the cases (any order; a case
/// without heat gets none): the steady peak fin temperature when the scenario has a
/// fin-temperature limit, otherwise none.
pub fn judged_temperatures(scenario: &Scenario, heat: &[CaseHeat]) -> Vec<CaseTemperatures> {
    let judged = scenario.limits.max_fin_temperature_c.is_some();
    scenario
        .cases
        .iter()
        .map(|c| CaseTemperatures {
            peak_fin_temperature_c: heat
                .iter()
                .find(|h| h.case == c.name)
                .filter(|_| judged)
                .map(|h| h.steady_peak_fin_temperature_c),
            magnet_temp_c: None,
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::Value;

    /// A value as a JSON tree.
    fn json<T: serde::Serialize + ?Sized>(v: &T) -> Value {
        serde_json::to_value(v).unwrap_or(Value::Null)
    }

    /// The largest difference between two JSON trees of the same shape, relative to each
    /// number's size (absolute below `floor`), with the first place where they differ in shape
    /// or text.
    fn largest_difference(
        a: &Value,
        b: &Value,
        floor: f64,
        at: &str,
    ) -> Result<(f64, String), String> {
        match (a, b) {
            (Value::Number(x), Value::Number(y)) => {
                let (x, y) = (
                    x.as_f64().unwrap_or(f64::NAN),
                    y.as_f64().unwrap_or(f64::NAN),
                );
                Ok((
                    (x - y).abs() / x.abs().max(y.abs()).max(floor),
                    at.to_string(),
                ))
            }
            (Value::Array(x), Value::Array(y)) if x.len() == y.len() => x
                .iter()
                .zip(y)
                .enumerate()
                .map(|(k, (x, y))| largest_difference(x, y, floor, &format!("{at}[{k}]")))
                .try_fold((0.0, String::new()), |m, d| {
                    d.map(|d| if d.0 > m.0 { d } else { m })
                }),
            // The integrator's work counts are not results: rounding moves them.
            (Value::Object(x), Value::Object(y)) if x.len() == y.len() => x
                .iter()
                .filter(|(k, _)| !matches!(k.as_str(), "steps" | "rhs_evaluations"))
                .map(|(k, v)| match y.get(k) {
                    // The energy residual is a rounding-sized difference of MJ energies: judged
                    // against 1 kJ (1e-5 of it is ~3e-9 of the tower's braking energy).
                    Some(w) => {
                        let floor = if k == "energy_residual_j" { 1e3 } else { floor };
                        largest_difference(v, w, floor, &format!("{at}.{k}"))
                    }
                    None => Err(format!("{at}.{k} missing")),
                })
                .try_fold((0.0, String::new()), |m, d| {
                    d.map(|d| if d.0 > m.0 { d } else { m })
                }),
            _ if a == b => Ok((0.0, String::new())),
            _ => Err(format!("{at}: {a} against {b}")),
        }
    }

    /// The tower demo's one-unit-out cases come in east/west pairs: the judgement with the west
    /// cases carried over from the east ones agrees with computing every case directly — per
    /// fin and per section in the right places (a missing or wrong relabelling swaps a full face
    /// with a face one unit short: whole percent), in the verdict rows, the heat and the steady
    /// runs — to rounding as the coupled passes amplify it (seen: 8e-7 of a margin, 3e-8 of a
    /// value; both versions are as close to an rtol 1e-13 solve, DEVELOPERS "Open work").
    #[test]
    fn mirrored_cases_match_their_direct_computation() {
        let scenario = crate::scenario::shipped("scenarios/tower-catch-brake.yaml");
        let carried = Study::new(scenario).expect("tables");
        assert_eq!(carried.mirrors.carried(), 12);
        let direct = Study {
            mirrors: Mirrors::default(),
            ..carried.clone()
        };
        let options = JudgeOptions::default();
        let a = carried.judge(&options, &Silent).expect("judged");
        let b = direct.judge(&options, &Silent).expect("judged");
        for (what, x, y) in [
            ("verdict", json(&a.verdict), json(&b.verdict)),
            ("heat", json(&a.heat), json(&b.heat)),
            ("runs", json(&a.runs), json(&b.runs)),
            ("steady runs", json(&a.steady_runs), json(&b.steady_runs)),
        ] {
            let (d, at) = largest_difference(&x, &y, 1e-3, what).expect("the same shape and names");
            assert!(d < 1e-5, "{what}: {d:.1e} at {at}");
        }
        // What the runs do not serialise: the heat of each fin, and the samples (forces against
        // the run's peak: a sample at a unit's edge holds a force of rounding size).
        let fins = |runs: &[RunResult]| -> Value {
            let rows: Vec<Vec<_>> = runs
                .iter()
                .map(|r| {
                    r.fins
                        .iter()
                        .map(|f| (f.fin.clone(), f.energy_j, f.end_temp_c))
                        .collect()
                })
                .collect();
            json(&rows)
        };
        for (what, x, y) in [
            ("runs", &a.runs, &b.runs),
            ("steady runs", &a.steady_runs, &b.steady_runs),
        ] {
            let (d, at) =
                largest_difference(&fins(x), &fins(y), 1e-3, what).expect("the same names");
            assert!(d < 1e-5, "{what}' fins: {d:.1e} at {at}");
            for (r, q) in x.iter().zip(y) {
                assert_eq!(r.samples.len(), q.samples.len(), "{}", r.case);
                let scale = r.peak_brake_force_n.max(1.0);
                for (p, o) in r.samples.iter().zip(&q.samples) {
                    assert!(
                        (p.t_s - o.t_s).abs() < 1e-7 * (1.0 + p.t_s),
                        "{}: {} against {} s",
                        r.case,
                        p.t_s,
                        o.t_s
                    );
                    assert!(
                        (p.v_m_s - o.v_m_s).abs() < 1e-6 * p.v_m_s.abs().max(1.0),
                        "{}",
                        r.case
                    );
                    let df = (p.brake_force_n - o.brake_force_n).abs() / scale;
                    assert!(
                        df < 1e-6,
                        "{}: force {df:.1e} of the peak at {} s",
                        r.case,
                        p.t_s
                    );
                }
            }
        }
        // Per-section loads, asked for as `run --sections` does.
        let loads = RunOptions {
            section_loads: true,
            ..RunOptions::default()
        };
        let (x, y) = (
            json(&carried.run(&loads).expect("runs")),
            json(&direct.run(&loads).expect("runs")),
        );
        let (d, at) = largest_difference(&x, &y, 1e-3, "loads").expect("the same shape and names");
        assert!(d < 1e-5, "section loads: {d:.1e} at {at}");
        // The steady states themselves (not serialised) in the same places.
        for (x, y) in a.heat.iter().zip(&b.heat) {
            for (p, q) in x.steady_start.iter().zip(&y.steady_start) {
                assert!((p.peak_c() - q.peak_c()).abs() < 1e-6, "{}", x.case);
            }
        }
    }
}
