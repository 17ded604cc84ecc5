//! Reference checks of the sweep's statistics and sampling against published values.

use eddyzone::scenario::sweep::{Distribution, SamplingMethod};
use eddyzone::sweep::sample::{quantile, unit_design};
use eddyzone::sweep::stats::{clopper_pearson, spearman, wilson, Spread};

/// Newcombe 1998, "Two-sided confidence intervals for the single proportion: comparison of seven
/// methods", Statistics in Medicine 17:857–872, Table II: the Wilson score (method 3) and
/// Clopper–Pearson exact (method 5) 95 % intervals of four worked examples, printed to four
/// decimals (recomputed with scipy 1.17 `norm.ppf` / `beta.ppf`, same digits). Tolerance: half a
/// unit of the last printed decimal.
#[test]
fn intervals_match_newcombe_1998() {
    let cases = [
        (81, 263, (0.2553, 0.3662), (0.2527, 0.3676)),
        (15, 148, (0.0624, 0.1605), (0.0578, 0.1617)),
        (0, 20, (0.0000, 0.1611), (0.0000, 0.1684)),
        (1, 29, (0.0061, 0.1718), (0.0009, 0.1776)),
    ];
    for (k, n, w, cp) in cases {
        let (wl, wh) = wilson(k, n, 0.95).unwrap();
        let (cl, ch) = clopper_pearson(k, n, 0.95).unwrap();
        for (got, want) in [(wl, w.0), (wh, w.1), (cl, cp.0), (ch, cp.1)] {
            assert!((got - want).abs() <= 5e-5, "{k}/{n}: {got} vs {want}");
        }
    }
}

/// Clopper–Pearson at k = 0 has the closed form 1 − (α/2)^(1/n) (Clopper & Pearson 1934);
/// tolerance 1e-12.
#[test]
fn clopper_pearson_closed_form_at_zero() {
    for n in [1usize, 5, 50, 1000] {
        let (lo, hi) = clopper_pearson(0, n, 0.95).unwrap();
        assert_eq!(lo, 0.0);
        let want = 1.0 - 0.025f64.powf(1.0 / n as f64);
        assert!((hi - want).abs() < 1e-12, "n = {n}: {hi} vs {want}");
    }
}

/// Spearman's ρ of the worked example of IQ against hours of television (ten people), −29/165
/// (the classic textbook example, from memory; scipy 1.17 `spearmanr` gives −0.17575757575757575),
/// and a series with ties (scipy `spearmanr`: 0.9200335844703181). Tolerance 1e-12.
#[test]
fn spearman_matches_scipy() {
    let iq = [
        106.0, 100.0, 86.0, 101.0, 99.0, 103.0, 97.0, 113.0, 112.0, 110.0,
    ];
    let tv = [7.0, 27.0, 2.0, 50.0, 28.0, 29.0, 20.0, 12.0, 6.0, 17.0];
    assert!((spearman(&iq, &tv).unwrap() + 29.0 / 165.0).abs() < 1e-12);
    let x = [1.0, 2.0, 2.0, 3.0, 4.0, 4.0, 4.0, 5.0];
    let y = [2.0, 1.0, 3.0, 3.0, 5.0, 4.0, 6.0, 8.0];
    assert!((spearman(&x, &y).unwrap() - 0.9200335844703181).abs() < 1e-12);
}

/// The truncated normal's quantiles: with bounds at ±∞ in effect (8σ) the median is the mean and
/// the 97.5 % point is μ + 1.959963984540054σ (Φ⁻¹(0.975), Abramowitz & Stegun 1964, table
/// 26.5); truncated to [μ, ∞) the median is μ + Φ⁻¹(0.75)σ = μ + 0.6744897501960817σ (the
/// half-normal's median). Tolerance 1e-9 σ.
#[test]
fn normal_quantiles() {
    let d = Distribution::Normal {
        mean: 10.0,
        std: 2.0,
        min: None,
        max: None,
    };
    assert!((quantile(&d, 0.5) - 10.0).abs() < 2e-9);
    assert!((quantile(&d, 0.975) - (10.0 + 2.0 * 1.959963984540054)).abs() < 2e-9);
    let half = Distribution::Normal {
        mean: 10.0,
        std: 2.0,
        min: Some(10.0),
        max: None,
    };
    assert!((quantile(&half, 0.5) - (10.0 + 2.0 * 0.6744897501960817)).abs() < 2e-9);
}

/// Every design fills the unit square evenly: the sample mean of each coordinate is 1/2 within
/// four standard errors of a uniform mean (1/√(12n)) — common practice for a generator check;
/// Latin hypercube and Sobol points are far more even than that.
#[test]
fn designs_are_uniform() {
    let n = 4096;
    for m in [
        SamplingMethod::MonteCarlo,
        SamplingMethod::LatinHypercube,
        SamplingMethod::Sobol,
    ] {
        let d = unit_design(m, n, 3, 11);
        for j in 0..3 {
            let col: Vec<f64> = d.iter().map(|r| r[j]).collect();
            assert!(col.iter().all(|u| *u > 0.0 && *u < 1.0));
            let mean = col.iter().sum::<f64>() / n as f64;
            let se = 1.0 / (12.0 * n as f64).sqrt();
            assert!((mean - 0.5).abs() < 4.0 * se, "{m:?} dim {j}: mean {mean}");
            let s = Spread::of(&col).unwrap();
            assert!(
                (s.p50 - 0.5).abs() < 0.05,
                "{m:?} dim {j}: median {}",
                s.p50
            );
        }
    }
}
