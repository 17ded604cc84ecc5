//! Sampling: the sampled variables of a sweep, the design in the unit hypercube (Monte Carlo,
//! Latin hypercube, Sobol) or the factorial grid, and each distribution's quantile function
//! that maps a point of the hypercube to values.

use crate::scenario::sweep::{Distribution, SamplingMethod, Scope, Sweep, SweepInput, Uncertain};
use crate::scenario::Scenario;
use rand::seq::SliceRandom;
use rand::{RngExt, SeedableRng};
use serde::Serialize;
use statrs::distribution::{ContinuousCDF, Normal};

/// What one sampled variable sets.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Target {
    /// A value of the case (mass, speed, position, temperatures, force factor).
    Case,
    /// Every section that uses the layer model (scope `all`).
    AllSections,
    /// One section (index into `Scenario::sections`; scope `each`).
    Section(usize),
    /// Every fin (scope `all`).
    AllFins,
    /// One fin (index into `Scenario::fins`; scope `each`).
    Fin(usize),
}

/// One sampled variable: an input, what it sets, and its distribution.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Variable {
    /// The input.
    pub input: SweepInput,
    /// What it sets.
    pub target: Target,
    /// Column name: the input's column, with `[element]` for one section or fin.
    pub name: String,
    /// Its distribution.
    pub distribution: Distribution,
}

/// The sampled variables of a sweep, in the order of its inputs (per element in scenario order).
pub fn variables(s: &Scenario, sweep: &Sweep) -> Vec<Variable> {
    let mut out = Vec::new();
    for u in &sweep.inputs {
        let one = |target: Target, name: String| Variable {
            input: u.input,
            target,
            name,
            distribution: u.distribution.clone(),
        };
        match (u.input, u.scope) {
            (i, Scope::Each) if i.of_sections() => {
                for (k, sec) in s.sections.iter().enumerate() {
                    if sec.design().is_some() {
                        let name = format!("{}[{}]", u.input.column(), sec.name);
                        out.push(one(Target::Section(k), name));
                    }
                }
            }
            (i, Scope::All) if i.of_sections() => {
                out.push(one(Target::AllSections, u.input.column().into()));
            }
            (SweepInput::FinConductivity, Scope::Each) => {
                for (k, fin) in s.fins.iter().enumerate() {
                    let name = format!("{}[{}]", u.input.column(), fin.name);
                    out.push(one(Target::Fin(k), name));
                }
            }
            (SweepInput::FinConductivity, Scope::All) => {
                out.push(one(Target::AllFins, u.input.column().into()));
            }
            _ => out.push(one(Target::Case, u.input.column().into())),
        }
    }
    out
}

/// The value of `d` at probability `u` ∈ (0, 1): the inverse of its distribution function (a
/// normal's restricted to its support, [`Distribution::support`]).
pub fn quantile(d: &Distribution, u: f64) -> f64 {
    let u = u.clamp(f64::MIN_POSITIVE, 1.0 - f64::EPSILON / 2.0);
    match d {
        Distribution::Normal { mean, std, .. } => {
            let (lo, hi) = d.support();
            // A standard normal always exists (mean 0, std 1).
            let Ok(z) = Normal::new(0.0, 1.0) else {
                return *mean;
            };
            let (a, b) = (z.cdf((lo - mean) / std), z.cdf((hi - mean) / std));
            let x = mean + std * z.inverse_cdf(a + u * (b - a));
            x.clamp(lo, hi)
        }
        Distribution::Uniform { min, max } => min + u * (max - min),
        Distribution::Triangular { min, mode, max } => {
            let (a, c, b) = (*min, *mode, *max);
            let fc = (c - a) / (b - a);
            if u < fc {
                a + (u * (b - a) * (c - a)).sqrt()
            } else {
                b - ((1.0 - u) * (b - a) * (b - c)).sqrt()
            }
        }
        Distribution::Discrete { values } => {
            let k = ((u * values.len() as f64) as usize).min(values.len() - 1);
            values[k]
        }
    }
}

/// A point of the unit hypercube per sample (`dims` coordinates in (0, 1)), by `method`.
/// Deterministic in the seed; a factorial has no hypercube design (see [`factorial_values`]).
pub fn unit_design(
    method: SamplingMethod,
    samples: usize,
    dims: usize,
    seed: u64,
) -> Vec<Vec<f64>> {
    // Open interval: half a step off 0 for generators that can return 0.
    let open = |u: f64, step: f64| (u + 0.5 * step).min(1.0 - 0.5 * step);
    let mut rng = rand::rngs::Xoshiro256PlusPlus::seed_from_u64(seed);
    let step53 = f64::EPSILON / 2.0;
    match method {
        SamplingMethod::MonteCarlo | SamplingMethod::Factorial => (0..samples)
            .map(|_| {
                (0..dims)
                    .map(|_| open(rng.random::<f64>(), step53))
                    .collect()
            })
            .collect(),
        SamplingMethod::LatinHypercube => {
            let mut design = vec![vec![0.0; dims]; samples];
            let n = samples as f64;
            for j in 0..dims {
                let mut strata: Vec<usize> = (0..samples).collect();
                strata.shuffle(&mut rng);
                for (row, stratum) in design.iter_mut().zip(strata) {
                    row[j] = (stratum as f64 + open(rng.random::<f64>(), step53)) / n;
                }
            }
            design
        }
        SamplingMethod::Sobol => {
            // Owen-scrambled Sobol points (Burley 2020) of 24-bit precision.
            let seed32 = (seed ^ (seed >> 32)) as u32;
            let step24 = 1.0 / f64::from(1u32 << 24);
            (0..samples)
                .map(|i| {
                    (0..dims)
                        .map(|j| {
                            let x = sobol_burley::sample(i as u32, j as u32, seed32);
                            open(f64::from(x), step24)
                        })
                        .collect()
                })
                .collect()
        }
    }
}

/// Every combination of the variables' discrete values, the last variable fastest.
pub fn factorial_values(vars: &[Variable]) -> Vec<Vec<f64>> {
    let mut out: Vec<Vec<f64>> = vec![Vec::new()];
    for v in vars {
        let values: &[f64] = match &v.distribution {
            Distribution::Discrete { values } => values,
            _ => &[],
        };
        out = out
            .into_iter()
            .flat_map(|row| {
                values.iter().map(move |x| {
                    let mut r = row.clone();
                    r.push(*x);
                    r
                })
            })
            .collect();
    }
    out
}

/// The sampled values: one row per sample, one column per variable (SI; °C for temperatures).
pub fn sample_values(sweep: &Sweep, vars: &[Variable]) -> Vec<Vec<f64>> {
    if sweep.method == SamplingMethod::Factorial {
        return factorial_values(vars);
    }
    unit_design(sweep.method, sweep.samples, vars.len(), sweep.seed)
        .into_iter()
        .map(|u| {
            u.iter()
                .zip(vars)
                .map(|(u, v)| quantile(&v.distribution, *u))
                .collect()
        })
        .collect()
}

/// Whether an input's draws change a force table's design (and so cost a table each).
pub fn changes_design(u: &Uncertain) -> bool {
    matches!(
        u.input,
        SweepInput::Clearance
            | SweepInput::FinOffset
            | SweepInput::Remanence
            | SweepInput::FinConductivity
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn triangular_quantile_closed_form() {
        // Median of the symmetric triangular on [0, 2] is 1; F(0.5) = 0.125 (integral of the
        // density x on [0, 1]: x²/2) — textbook (e.g. Evans, Hastings & Peacock, Statistical
        // Distributions, 2000, ch. 40).
        let d = Distribution::Triangular {
            min: 0.0,
            mode: 1.0,
            max: 2.0,
        };
        assert!((quantile(&d, 0.5) - 1.0).abs() < 1e-12);
        assert!((quantile(&d, 0.125) - 0.5).abs() < 1e-12);
    }

    #[test]
    fn truncated_normal_stays_in_bounds() {
        let d = Distribution::Normal {
            mean: 0.0,
            std: 1.0,
            min: Some(-0.5),
            max: Some(2.0),
        };
        for k in 1..1000 {
            let x = quantile(&d, f64::from(k) / 1000.0);
            assert!((-0.5..=2.0).contains(&x));
        }
    }

    #[test]
    fn latin_hypercube_one_point_per_stratum() {
        let n = 50;
        let design = unit_design(SamplingMethod::LatinHypercube, n, 3, 7);
        for j in 0..3 {
            let mut strata: Vec<usize> =
                design.iter().map(|r| (r[j] * n as f64) as usize).collect();
            strata.sort_unstable();
            assert_eq!(strata, (0..n).collect::<Vec<_>>());
        }
    }

    #[test]
    fn factorial_is_every_combination() {
        let v = |name: &str, values: Vec<f64>| Variable {
            input: SweepInput::Mass,
            target: Target::Case,
            name: name.into(),
            distribution: Distribution::Discrete { values },
        };
        let rows = factorial_values(&[v("a", vec![1.0, 2.0]), v("b", vec![3.0, 4.0, 5.0])]);
        assert_eq!(rows.len(), 6);
        assert_eq!(rows[0], vec![1.0, 3.0]);
        assert_eq!(rows[5], vec![2.0, 5.0]);
    }
}
