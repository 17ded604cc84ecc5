//! The sweep block: the case it varies, the sampling method and count, each uncertain input's
//! distribution (in the units of its quantity) and scope, and the sweep's work budget.

use super::{loc, show, Validator};
use crate::scenario::bounds;
use crate::scenario::raw::{RawSweep, RawUncertain, Q};
use crate::scenario::sweep::{Distribution, SamplingMethod, Scope, Sweep, SweepInput, Uncertain};
use crate::scenario::{Case, Cycles, Duty, Fin, Section};
use crate::units::Kind;

/// The range every draw of an input must lie in, with its message.
fn rule(input: SweepInput) -> (fn(f64) -> bool, &'static str) {
    match input {
        SweepInput::Mass | SweepInput::FinConductivity => {
            (|x| x > 0.0, "must be greater than zero")
        }
        SweepInput::Speed | SweepInput::Position => (|_| true, ""),
        SweepInput::Clearance => (|x| x > 0.0 && x < 1.0, "must lie in (0, 1) m"),
        // Against the clearance in `Validator::offsets_inside_clearances`.
        SweepInput::FinOffset => (|x| x.abs() < 1.0, "must lie in (-1, 1) m"),
        SweepInput::Remanence => (|b| b > 0.0 && b <= 1.6, "must lie in (0, 1.6] T"),
        SweepInput::FinTemp | SweepInput::MagnetTemp => (
            |t| t > -100.0 && t < 1000.0,
            "must lie between -100 °C and 1000 °C",
        ),
        SweepInput::ForceFactor => (|f| f > 0.0 && f <= 10.0, "must lie in (0, 10]"),
    }
}

fn raw_input(r: &RawSweep, input: SweepInput) -> Option<&RawUncertain> {
    let i = &r.inputs;
    match input {
        SweepInput::Mass => i.mass.as_ref(),
        SweepInput::Speed => i.speed.as_ref(),
        SweepInput::Position => i.position.as_ref(),
        SweepInput::Clearance => i.clearance.as_ref(),
        SweepInput::FinOffset => i.fin_offset.as_ref(),
        SweepInput::Remanence => i.remanence.as_ref(),
        SweepInput::FinConductivity => i.fin_conductivity.as_ref(),
        SweepInput::FinTemp => i.fin_temp.as_ref(),
        SweepInput::MagnetTemp => i.magnet_temp.as_ref(),
        SweepInput::ForceFactor => i.force_factor.as_ref(),
    }
}

/// How many sampled variables an input is: one per model section (fin) with scope `each`.
pub fn variables(u: &Uncertain, fins: &[Fin], sections: &[Section]) -> usize {
    match (u.scope, u.input) {
        (Scope::Each, i) if i.of_sections() => {
            sections.iter().filter(|s| s.design().is_some()).count()
        }
        (Scope::Each, SweepInput::FinConductivity) => fins.len(),
        _ => 1,
    }
}

impl Validator {
    /// A standard deviation: a positive difference of the kind (of temperatures in K or °C,
    /// which have one size).
    fn spread(&mut self, q: &Q, kind: Kind, path: &str) -> Option<f64> {
        use crate::scenario::raw::QuantityText;
        if kind != Kind::Temperature {
            return self.positive(q, kind, path);
        }
        let x = self.q(q, kind, path)?;
        let zero = match &q.value {
            QuantityText::Text(t) => {
                let unit = t
                    .trim()
                    .trim_start_matches(|c: char| c.is_ascii_digit() || "+-.eE".contains(c))
                    .trim();
                crate::units::from_text(kind, &format!("0 {unit}")).unwrap_or(0.0)
            }
            QuantityText::Number(_) => 0.0,
        };
        let d = x - zero;
        if d > 0.0 {
            Some(d)
        } else {
            self.at(
                &q.referenced,
                path,
                format!("must be greater than zero (got {} K)", show(d)),
            );
            None
        }
    }

    fn sweep_value(&mut self, q: &Option<Q>, kind: Kind, path: &str) -> Option<Option<f64>> {
        match q {
            Some(q) => self.q(q, kind, path).map(Some),
            None => Some(None),
        }
    }

    fn uncertain(&mut self, u: &RawUncertain, input: SweepInput, p: &str) -> Option<Uncertain> {
        let (ok, what) = rule(input);
        let kind = input.kind();
        let near = loc(&u.distribution.referenced);
        let d = u.distribution.value.as_str();
        let allowed: &[&str] = match d {
            "normal" => &["mean", "std", "min", "max"],
            "uniform" => &["min", "max"],
            "triangular" => &["min", "mode", "max"],
            "discrete" => &["values"],
            other => {
                self.push(
                    near,
                    &format!("{p}.distribution"),
                    format!(
                        "'{other}' is not a distribution (normal, uniform, triangular, discrete)"
                    ),
                );
                return None;
            }
        };
        let given = [
            ("mean", u.mean.as_ref()),
            ("std", u.std.as_ref()),
            ("min", u.min.as_ref()),
            ("mode", u.mode.as_ref()),
            ("max", u.max.as_ref()),
        ];
        let mut fine = true;
        for (key, q) in given {
            if let (Some(q), false) = (q, allowed.contains(&key)) {
                self.at(
                    &q.referenced,
                    &format!("{p}.{key}"),
                    format!(
                        "not a parameter of the {d} distribution (it takes {})",
                        allowed.join(", ")
                    ),
                );
                fine = false;
            }
        }
        if let (Some(v), false) = (&u.values, allowed.contains(&"values")) {
            let l = v.first().and_then(|q| loc(&q.referenced)).or(near);
            self.push(
                l,
                &format!("{p}.values"),
                format!("not a parameter of the {d} distribution"),
            );
            fine = false;
        }
        let need = |v: &mut Self, x: Option<f64>, key: &str| {
            if x.is_none() {
                v.push(
                    near,
                    &format!("{p}.{key}"),
                    format!("missing field (the {d} distribution needs it)"),
                );
            }
            x
        };
        let mean = self.sweep_value(&u.mean, kind, &format!("{p}.mean"));
        let std = match &u.std {
            Some(q) => self.spread(q, kind, &format!("{p}.std")).map(Some),
            None => Some(None),
        };
        let min = self.sweep_value(&u.min, kind, &format!("{p}.min"));
        let mode = self.sweep_value(&u.mode, kind, &format!("{p}.mode"));
        let max = self.sweep_value(&u.max, kind, &format!("{p}.max"));
        let (mean, std, min, mode, max) = (mean?, std?, min?, mode?, max?);
        let distribution = match d {
            "normal" => Distribution::Normal {
                mean: need(self, mean, "mean")?,
                std: need(self, std, "std")?,
                min,
                max,
            },
            "uniform" => Distribution::Uniform {
                min: need(self, min, "min")?,
                max: need(self, max, "max")?,
            },
            "triangular" => Distribution::Triangular {
                min: need(self, min, "min")?,
                mode: need(self, mode, "mode")?,
                max: need(self, max, "max")?,
            },
            _ => {
                let Some(list) = &u.values else {
                    need(self, None, "values");
                    return None;
                };
                let mut values = Vec::new();
                for (k, q) in list.iter().enumerate() {
                    values.push(self.q(q, kind, &format!("{p}.values[{k}]")));
                }
                let values: Option<Vec<f64>> = values.into_iter().collect();
                let values = values?;
                if values.is_empty() {
                    self.push(near, &format!("{p}.values"), "give at least one value");
                    return None;
                }
                Distribution::Discrete { values }
            }
        };
        if !fine {
            return None;
        }
        let (lo, hi) = distribution.support();
        let order_ok = match &distribution {
            Distribution::Normal { mean, min, max, .. } => {
                min.is_none_or(|a| a <= *mean) && max.is_none_or(|b| b >= *mean)
            }
            Distribution::Triangular { min, mode, max } => min <= mode && mode <= max && min < max,
            Distribution::Uniform { min, max } => min < max,
            Distribution::Discrete { .. } => true,
        };
        if !order_ok {
            self.push(
                near,
                p,
                "the parameters are out of order (min < max; a triangular's mode and a normal's \
                 mean lie between min and max)",
            );
            return None;
        }
        if !ok(lo) || !ok(hi) {
            let unit = if kind == Kind::Temperature {
                "°C"
            } else {
                kind.si_unit()
            };
            self.push(
                near,
                p,
                format!(
                    "draws reach [{}, {}] {unit}, but {} {what}{}",
                    show(lo),
                    show(hi),
                    input.key(),
                    if matches!(distribution, Distribution::Normal { .. }) {
                        " (bound the normal with min and max)"
                    } else {
                        ""
                    }
                ),
            );
            return None;
        }
        let scope = match &u.scope {
            None => Scope::All,
            Some(s) if !input.per_element() => {
                self.at(
                    &s.referenced,
                    &format!("{p}.scope"),
                    "only clearance, fin_offset, remanence and fin_conductivity have a scope \
                     (the case's inputs take one value per sample)",
                );
                return None;
            }
            Some(s) => match s.value.as_str() {
                "all" => Scope::All,
                "each" => Scope::Each,
                other => {
                    self.at(
                        &s.referenced,
                        &format!("{p}.scope"),
                        format!("'{other}' is neither all nor each"),
                    );
                    return None;
                }
            },
        };
        Some(Uncertain {
            input,
            distribution,
            scope,
        })
    }

    pub(super) fn sweep(
        &mut self,
        r: &RawSweep,
        nominal: &Case,
        cases: &[Case],
        fins: &[Fin],
        sections: &[Section],
        duty: Option<&Duty>,
    ) -> Option<Sweep> {
        let case = match &r.case {
            None => nominal.name.clone(),
            Some(c) if c.value == nominal.name || cases.iter().any(|k| k.name == c.value) => {
                c.value.clone()
            }
            Some(c) => {
                let names: Vec<&str> = cases.iter().map(|k| k.name.as_str()).collect();
                self.at(
                    &c.referenced,
                    "sweep.case",
                    format!(
                        "no case named '{}' (cases: nominal, {})",
                        c.value,
                        names.join(", ")
                    ),
                );
                return None;
            }
        };
        let method = match &r.method {
            None => SamplingMethod::MonteCarlo,
            Some(m) => match SamplingMethod::ALL.iter().find(|k| k.key() == m.value) {
                Some(k) => *k,
                None => {
                    self.at(
                        &m.referenced,
                        "sweep.method",
                        format!(
                            "'{}' is not a sampling method (monte_carlo, latin_hypercube, sobol, \
                             factorial)",
                            m.value
                        ),
                    );
                    return None;
                }
            },
        };
        let mut inputs = Vec::new();
        let mut fine = true;
        for input in SweepInput::ALL {
            if let Some(u) = raw_input(r, input) {
                let p = format!("sweep.inputs.{}", input.key());
                match self.uncertain(u, input, &p) {
                    Some(u) => inputs.push(u),
                    None => fine = false,
                }
            }
        }
        if inputs.iter().any(|u| u.input.of_sections())
            && !sections.iter().any(|s| s.design().is_some())
        {
            self.push(
                None,
                "sweep.inputs",
                "clearance, fin_offset and remanence need a section that uses the layer model \
                 (every section here has a measured force curve)",
            );
            fine = false;
        }
        if !self.offsets_inside_clearances(r, &inputs, sections) {
            fine = false;
        }
        let start = r.inputs_near();
        if inputs.is_empty() && fine {
            self.push(start, "sweep.inputs", "give at least one uncertain input");
            return None;
        }
        if !fine {
            return None;
        }
        let dims: usize = inputs.iter().map(|u| variables(u, fins, sections)).sum();
        let samples = match (method, &r.samples) {
            (SamplingMethod::Factorial, Some(n)) => {
                self.at(
                    &n.referenced,
                    "sweep.samples",
                    "a factorial takes every combination of the discrete values: leave samples out",
                );
                return None;
            }
            (SamplingMethod::Factorial, None) => {
                let mut n: usize = 1;
                for u in &inputs {
                    let Distribution::Discrete { values } = &u.distribution else {
                        self.push(
                            start,
                            &format!("sweep.inputs.{}", u.input.key()),
                            "a factorial needs every input as a discrete list",
                        );
                        return None;
                    };
                    for _ in 0..variables(u, fins, sections) {
                        n = n.saturating_mul(values.len());
                    }
                }
                n
            }
            (_, None) => {
                self.push(start, "sweep.samples", "missing field (how many samples)");
                return None;
            }
            (_, Some(n)) => usize::try_from(n.value).unwrap_or(usize::MAX),
        };
        let near = r
            .samples
            .as_ref()
            .and_then(|n| loc(&n.referenced))
            .or(start);
        if samples == 0 || samples > bounds::MAX_SWEEP_SAMPLES {
            self.push(
                near,
                "sweep.samples",
                format!(
                    "{samples} samples: a sweep takes 1 to {} samples (the budget of one study)",
                    bounds::MAX_SWEEP_SAMPLES
                ),
            );
            return None;
        }
        if method == SamplingMethod::Sobol && dims > bounds::MAX_SWEEP_VARIABLES {
            self.push(
                start,
                "sweep.inputs",
                format!(
                    "{dims} sampled variables: the Sobol sequence has {} dimensions; use scope \
                     all or fewer inputs",
                    bounds::MAX_SWEEP_VARIABLES
                ),
            );
            return None;
        }
        if let Some(u) = inputs.iter().find(|u| u.input == SweepInput::Position) {
            self.starts_stay_outside(u, &case, nominal, cases, fins, sections, start);
        }
        let sweep = Sweep {
            case,
            method,
            samples,
            seed: r.seed.as_ref().map_or(0, |s| s.value),
            inputs,
        };
        self.sweep_budget(&sweep, near, fins, sections, duty);
        Some(sweep)
    }

    /// A sampled start position must not put a fin over magnets at either end of its support
    /// (unless the case starts `in_zone`): every sample must be a case validation accepts.
    #[allow(clippy::too_many_arguments)]
    fn starts_stay_outside(
        &mut self,
        u: &Uncertain,
        case: &str,
        nominal: &Case,
        cases: &[Case],
        fins: &[Fin],
        sections: &[Section],
        near: Option<(u64, u64)>,
    ) {
        let base = cases.iter().find(|c| c.name == case).unwrap_or(nominal);
        if base.start_in_zone {
            return;
        }
        let (lo, hi) = u.distribution.support();
        for x in [lo, hi] {
            let mut c = base.clone();
            c.start_position_m = x;
            if let Some((f, s)) = super::cases::first_overlap(&c, fins, sections) {
                self.push(
                    near,
                    "sweep.inputs.position",
                    format!(
                        "a start at {} m puts fin '{f}' over section '{s}': keep every draw \
                         upstream of the zone (or start the case `in_zone: true`)",
                        show(x)
                    ),
                );
                return;
            }
        }
    }

    /// Refuses a sweep whose pairs, force tables or dispatches exceed the budgets of
    /// [`bounds`] before any of it runs.
    fn sweep_budget(
        &mut self,
        s: &Sweep,
        near: Option<(u64, u64)>,
        fins: &[Fin],
        sections: &[Section],
        duty: Option<&Duty>,
    ) {
        let pairs: usize = fins
            .iter()
            .map(|f| sections.iter().filter(|k| k.lane == f.lane).count())
            .sum();
        let model_pairs: usize = fins
            .iter()
            .map(|f| {
                sections
                    .iter()
                    .filter(|k| k.lane == f.lane && k.design().is_some())
                    .count()
            })
            .sum();
        let case_pairs = pairs.saturating_mul(s.samples);
        if case_pairs > bounds::MAX_SWEEP_PAIRS {
            self.push(
                near,
                "sweep.samples",
                format!(
                    "{} samples × {pairs} fin–magnet pairs is {case_pairs} pairs to integrate: \
                     above the {}-pair budget of a sweep",
                    s.samples,
                    bounds::MAX_SWEEP_PAIRS
                ),
            );
        }
        // Designs: each distinct clearance, offset, remanence or conductivity draw is a force
        // table.
        let design = [
            SweepInput::Clearance,
            SweepInput::FinOffset,
            SweepInput::Remanence,
            SweepInput::FinConductivity,
        ];
        let mut distinct: usize = 1;
        for u in s.inputs.iter().filter(|u| design.contains(&u.input)) {
            let per = match &u.distribution {
                Distribution::Discrete { values } => values.len(),
                _ => s.samples,
            };
            for _ in 0..variables(u, fins, sections) {
                distinct = distinct.saturating_mul(per);
            }
        }
        // Tables per sampled design: distinct fin designs × distinct section designs (each
        // element its own with scope `each`).
        let each = |i: SweepInput| {
            s.inputs
                .iter()
                .any(|u| u.input == i && u.scope == Scope::Each)
        };
        let fin_designs = if each(SweepInput::FinConductivity) {
            fins.len()
        } else {
            distinct_count(fins, |a, b| {
                a.thickness_m == b.thickness_m
                    && a.height_m == b.height_m
                    && a.material == b.material
            })
        };
        let model: Vec<&Section> = sections.iter().filter(|k| k.design().is_some()).collect();
        let section_designs = if each(SweepInput::Clearance)
            || each(SweepInput::FinOffset)
            || each(SweepInput::Remanence)
        {
            model.len()
        } else {
            distinct_count(&model, |a, b| a.design() == b.design())
        };
        let per_design = fin_designs.saturating_mul(section_designs).min(model_pairs);
        let tables = if distinct > 1 {
            distinct.min(s.samples).saturating_mul(per_design)
        } else {
            0
        };
        if tables > bounds::MAX_SWEEP_TABLES {
            self.push(
                near,
                "sweep.samples",
                format!(
                    "up to {tables} force tables to build (one per sampled design and fin–magnet \
                     pair, ~20 ms each): above the {}-table budget; sample fewer, or give \
                     clearance, remanence and conductivity as discrete values",
                    bounds::MAX_SWEEP_TABLES
                ),
            );
        }
        if let Some(d) = duty {
            let per_case = match d.cycles {
                Cycles::Count(n) => n,
                Cycles::UntilSteady { max_cycles } => max_cycles,
            } as usize;
            let passes = per_case.saturating_mul(s.samples);
            if passes > bounds::MAX_PASSES {
                self.push(
                    near,
                    "sweep.samples",
                    format!(
                        "up to {per_case} dispatches × {} samples is {passes} passes: above the \
                         {}-pass budget",
                        s.samples,
                        bounds::MAX_PASSES
                    ),
                );
            }
        }
    }
}

impl Validator {
    /// Whether every draw of the fin offset stays inside every draw of the clearance in every
    /// model section (the swept values where swept, the section's own otherwise); one message at
    /// the offset (or the clearance) input when not.
    fn offsets_inside_clearances(
        &mut self,
        r: &RawSweep,
        inputs: &[Uncertain],
        sections: &[Section],
    ) -> bool {
        let support = |i: SweepInput| {
            inputs
                .iter()
                .find(|u| u.input == i)
                .map(|u| u.distribution.support())
        };
        let (offset, clearance) = (
            support(SweepInput::FinOffset),
            support(SweepInput::Clearance),
        );
        if offset.is_none() && clearance.is_none() {
            return true;
        }
        let worst = sections
            .iter()
            .filter_map(|s| s.design())
            .map(|d| {
                let e = offset.map_or(d.fin_offset_m.abs(), |(lo, hi)| lo.abs().max(hi.abs()));
                let c = clearance.map_or(d.clearance_m, |(lo, _)| lo);
                (e, c)
            })
            .find(|(e, c)| e >= c);
        let Some((e, c)) = worst else {
            return true;
        };
        let (key, raw) = if offset.is_some() {
            ("fin_offset", r.inputs.fin_offset.as_ref())
        } else {
            ("clearance", r.inputs.clearance.as_ref())
        };
        self.push(
            raw.and_then(|u| loc(&u.distribution.referenced)),
            &format!("sweep.inputs.{key}"),
            format!(
                "a fin offset of {} mm reaches a clearance of {} mm: every offset drawn must be \
                 smaller in size than every clearance (the fin would touch the magnets)",
                show(e * 1e3),
                show(c * 1e3)
            ),
        );
        false
    }
}

/// The number of distinct items under `same`.
fn distinct_count<T>(items: &[T], same: impl Fn(&T, &T) -> bool) -> usize {
    let mut seen: Vec<&T> = Vec::new();
    for x in items {
        if !seen.iter().any(|y| same(x, y)) {
            seen.push(x);
        }
    }
    seen.len()
}

impl RawSweep {
    /// The place of the first input written, for messages about the block as a whole.
    fn inputs_near(&self) -> Option<(u64, u64)> {
        let i = &self.inputs;
        [
            &i.mass,
            &i.speed,
            &i.position,
            &i.clearance,
            &i.fin_offset,
            &i.remanence,
            &i.fin_conductivity,
            &i.fin_temp,
            &i.magnet_temp,
            &i.force_factor,
        ]
        .into_iter()
        .flatten()
        .find_map(|u| loc(&u.distribution.referenced))
        .or_else(|| self.method.as_ref().and_then(|m| loc(&m.referenced)))
        .or_else(|| self.case.as_ref().and_then(|m| loc(&m.referenced)))
    }
}
