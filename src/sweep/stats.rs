//! Statistics of a sweep: quantiles of a sample, the Wilson score interval of a failure
//! probability, and Spearman's rank correlation.

use serde::Serialize;
use statrs::distribution::{ContinuousCDF, Normal};

/// Quantile `p` ∈ [0, 1] of sorted values by linear interpolation between order statistics
/// (Hyndman & Fan 1996, definition 7; numpy's default): h = (n − 1)p, x[⌊h⌋] + (h − ⌊h⌋)(x[⌊h⌋+1] − x[⌊h⌋]).
pub fn quantile_sorted(sorted: &[f64], p: f64) -> Option<f64> {
    let n = sorted.len();
    if n == 0 {
        return None;
    }
    let h = (n - 1) as f64 * p.clamp(0.0, 1.0);
    let lo = h.floor() as usize;
    let hi = (lo + 1).min(n - 1);
    Some(sorted[lo] + (h - lo as f64) * (sorted[hi] - sorted[lo]))
}

/// The spread of a quantity over the samples.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Spread {
    /// Samples with a value.
    pub count: usize,
    /// Smallest.
    pub min: f64,
    /// 1st percentile.
    pub p1: f64,
    /// 5th percentile.
    pub p5: f64,
    /// Median.
    pub p50: f64,
    /// 95th percentile.
    pub p95: f64,
    /// 99th percentile.
    pub p99: f64,
    /// Largest.
    pub max: f64,
}

impl Spread {
    /// The spread of `values` (any order, finite); `None` when there are none.
    pub fn of(values: &[f64]) -> Option<Self> {
        let mut v: Vec<f64> = values.to_vec();
        v.sort_by(f64::total_cmp);
        let q = |p: f64| quantile_sorted(&v, p);
        Some(Spread {
            count: v.len(),
            min: q(0.0)?,
            p1: q(0.01)?,
            p5: q(0.05)?,
            p50: q(0.5)?,
            p95: q(0.95)?,
            p99: q(0.99)?,
            max: q(1.0)?,
        })
    }
}

/// A proportion with its two-sided confidence intervals: Clopper–Pearson (exact: covers the
/// true proportion with at least the stated confidence for every n and p) and Wilson's score
/// interval (shorter, covering it about as often as stated on average).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Proportion {
    /// Successes (here: failing samples).
    pub count: usize,
    /// Trials (samples).
    pub trials: usize,
    /// count / trials.
    pub estimate: f64,
    /// Lower end of the Clopper–Pearson interval.
    pub low: f64,
    /// Upper end of the Clopper–Pearson interval.
    pub high: f64,
    /// Lower end of the Wilson score interval.
    pub wilson_low: f64,
    /// Upper end of the Wilson score interval.
    pub wilson_high: f64,
    /// Confidence level of the intervals.
    pub confidence: f64,
}

/// `count` successes in `trials` with both intervals at two-sided `confidence`; `None` without
/// trials, with more successes than trials or a confidence outside (0, 1).
pub fn proportion(count: usize, trials: usize, confidence: f64) -> Option<Proportion> {
    let (wilson_low, wilson_high) = wilson(count, trials, confidence)?;
    let (low, high) = clopper_pearson(count, trials, confidence)?;
    Some(Proportion {
        count,
        trials,
        estimate: count as f64 / trials as f64,
        low,
        high,
        wilson_low,
        wilson_high,
        confidence,
    })
}

/// The Clopper–Pearson interval (Clopper & Pearson 1934, "The use of confidence or fiducial
/// limits illustrated in the case of the binomial", Biometrika 26:404–413) from the beta
/// quantiles: [B(α/2; k, n−k+1), B(1−α/2; k+1, n−k)], 0 and 1 at k = 0 and k = n.
pub fn clopper_pearson(count: usize, trials: usize, confidence: f64) -> Option<(f64, f64)> {
    use statrs::distribution::Beta;
    if trials == 0 || count > trials || !(confidence > 0.0 && confidence < 1.0) {
        return None;
    }
    let alpha = 1.0 - confidence;
    let (k, n) = (count as f64, trials as f64);
    let low = if count == 0 {
        0.0
    } else {
        Beta::new(k, n - k + 1.0).ok()?.inverse_cdf(alpha / 2.0)
    };
    let high = if count == trials {
        1.0
    } else {
        Beta::new(k + 1.0, n - k)
            .ok()?
            .inverse_cdf(1.0 - alpha / 2.0)
    };
    Some((low, high))
}

/// The Wilson score interval (Wilson 1927, "Probable inference, the law of succession, and
/// statistical inference", JASA 22:209–212) of `count` successes in `trials` at two-sided
/// `confidence`: (p̂ + z²/2n ± z·√(p̂(1−p̂)/n + z²/4n²)) / (1 + z²/n).
pub fn wilson(count: usize, trials: usize, confidence: f64) -> Option<(f64, f64)> {
    if trials == 0 || count > trials || !(confidence > 0.0 && confidence < 1.0) {
        return None;
    }
    let z = Normal::new(0.0, 1.0)
        .ok()?
        .inverse_cdf(0.5 + confidence / 2.0);
    let n = trials as f64;
    let p = count as f64 / n;
    let z2 = z * z;
    let denom = 1.0 + z2 / n;
    let centre = (p + z2 / (2.0 * n)) / denom;
    let half = z * (p * (1.0 - p) / n + z2 / (4.0 * n * n)).sqrt() / denom;
    Some(((centre - half).max(0.0), (centre + half).min(1.0)))
}

/// Ranks 1..=n of `values`, ties sharing their average rank.
pub fn ranks(values: &[f64]) -> Vec<f64> {
    let mut order: Vec<usize> = (0..values.len()).collect();
    order.sort_by(|&a, &b| values[a].total_cmp(&values[b]));
    let mut out = vec![0.0; values.len()];
    let mut i = 0;
    while i < order.len() {
        let mut j = i;
        while j + 1 < order.len() && values[order[j + 1]] == values[order[i]] {
            j += 1;
        }
        let rank = (i + j) as f64 / 2.0 + 1.0;
        for &k in &order[i..=j] {
            out[k] = rank;
        }
        i = j + 1;
    }
    out
}

/// Pearson's correlation of two equally long series; `None` when either is constant.
pub fn pearson(x: &[f64], y: &[f64]) -> Option<f64> {
    let n = x.len().min(y.len());
    if n < 2 {
        return None;
    }
    let mx = x[..n].iter().sum::<f64>() / n as f64;
    let my = y[..n].iter().sum::<f64>() / n as f64;
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (a, b) in x[..n].iter().zip(&y[..n]) {
        sxy += (a - mx) * (b - my);
        sxx += (a - mx) * (a - mx);
        syy += (b - my) * (b - my);
    }
    (sxx > 0.0 && syy > 0.0).then(|| sxy / (sxx * syy).sqrt())
}

/// Relative spread at or below which a sampled output counts as constant: the force tables are
/// 1e-9 relative to the model and the integration's tolerance is 1e-10, so differences this
/// small are rounding, and ranks taken from them noise.
pub const CONSTANT_SPREAD_REL: f64 = 1e-9;

/// Whether `values` spread by more than [`CONSTANT_SPREAD_REL`] of their largest magnitude (false
/// for no values, or one).
pub fn varies_beyond_rounding(values: &[f64]) -> bool {
    let (lo, hi) = values
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), &v| {
            (l.min(v), h.max(v))
        });
    hi - lo > CONSTANT_SPREAD_REL * lo.abs().max(hi.abs())
}

/// Spearman's rank correlation: Pearson's correlation of the (tie-averaged) ranks.
pub fn spearman(x: &[f64], y: &[f64]) -> Option<f64> {
    pearson(&ranks(x), &ranks(y))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn quantiles_of_one_to_ten() {
        // Definition 7 of Hyndman & Fan (1996) on 1..10: h = 9p, so P5 = 1.45, P50 = 5.5,
        // P95 = 9.55 (numpy.percentile gives the same, from memory).
        let v: Vec<f64> = (1..=10).map(f64::from).collect();
        let s = Spread::of(&v).unwrap();
        assert!((s.p5 - 1.45).abs() < 1e-12);
        assert!((s.p50 - 5.5).abs() < 1e-12);
        assert!((s.p95 - 9.55).abs() < 1e-12);
        assert_eq!((s.min, s.max), (1.0, 10.0));
    }

    #[test]
    fn an_output_constant_to_rounding_does_not_vary() {
        // The vertical felt peak of the sweep demo: 0.9999499987499375 g in every sample but
        // one ulp above in some (rounding of the same number).
        let one = 0.9999499987499375_f64;
        let noisy: Vec<f64> = (0..100)
            .map(|i| {
                if i % 7 == 0 {
                    f64::from_bits(one.to_bits() + 1)
                } else {
                    one
                }
            })
            .collect();
        assert!(!varies_beyond_rounding(&noisy));
        assert!(!varies_beyond_rounding(&[0.0, 0.0]));
        assert!(!varies_beyond_rounding(&[]));
        assert!(!varies_beyond_rounding(&[one * (1.0 + 0.9e-9), one]));
        assert!(varies_beyond_rounding(&[one * (1.0 + 1.1e-9), one]));
        assert!(varies_beyond_rounding(&[-1.0, 1.0]));
    }

    #[test]
    fn ties_share_ranks() {
        assert_eq!(ranks(&[3.0, 1.0, 3.0, 2.0]), vec![3.5, 1.0, 3.5, 2.0]);
    }
}
