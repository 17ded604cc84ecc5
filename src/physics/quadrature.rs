//! Gauss–Legendre quadrature rules.
//!
//! Nodes are the zeros of the Legendre polynomial P_n, found by Newton's method from the
//! asymptotic first guess cos(π(i − ¼)/(n + ½)), with P_n and P_n' from the three-term
//! recurrence; weights 2/((1 − x²) P_n'(x)²) (Press et al., *Numerical Recipes*, 3rd ed., 2007,
//! §4.6, `gauleg`).

/// The `n`-point Gauss–Legendre rule on [−1, 1] as (node, weight) pairs in increasing order of
/// the node; exact for polynomials of degree ≤ 2n − 1. Empty for n = 0.
pub(crate) fn gauss_legendre(n: usize) -> Vec<(f64, f64)> {
    let mut rule = vec![(0.0, 0.0); n];
    let nf = n as f64;
    for i in 0..n.div_ceil(2) {
        let mut x = (std::f64::consts::PI * (i as f64 + 0.75) / (nf + 0.5)).cos();
        let mut derivative = 1.0;
        for _ in 0..100 {
            let (mut p0, mut p1) = (1.0, 0.0);
            for j in 0..n {
                let jf = j as f64;
                let p2 = p1;
                p1 = p0;
                p0 = ((2.0 * jf + 1.0) * x * p1 - jf * p2) / (jf + 1.0);
            }
            // p0 = P_n(x), p1 = P_{n−1}(x).
            derivative = nf * (x * p0 - p1) / (x * x - 1.0);
            let step = p0 / derivative;
            x -= step;
            if step.abs() <= 1e-16 {
                break;
            }
        }
        let w = 2.0 / ((1.0 - x * x) * derivative * derivative);
        rule[i] = (-x, w);
        rule[n - 1 - i] = (x, w);
    }
    rule
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn matches_tabulated_nodes_and_integrates_polynomials() {
        // Abramowitz & Stegun (1964), table 25.4, n = 8: x = 0.183434642495650,
        // 0.525532409916329, 0.796666477413627, 0.960289856497536; w = 0.362683783378362,
        // 0.313706645877887, 0.222381034453374, 0.101228536290376 (15 figures; 1e-14).
        let rule = gauss_legendre(8);
        let table = [
            (0.183_434_642_495_65, 0.362_683_783_378_362),
            (0.525_532_409_916_329, 0.313_706_645_877_887),
            (0.796_666_477_413_627, 0.222_381_034_453_374),
            (0.960_289_856_497_536, 0.101_228_536_290_376),
        ];
        for (k, (x, w)) in table.iter().enumerate() {
            let (xn, wn) = rule[4 + k];
            assert!((xn - x).abs() < 1e-14 && (wn - w).abs() < 1e-14);
        }
        // Exact for degree ≤ 2n − 1: ∫ x^j dx over [−1, 1] = 2/(j + 1) for even j, 0 for odd.
        for n in [1usize, 2, 5, 16, 24] {
            let rule = gauss_legendre(n);
            for j in 0..(2 * n) as i32 {
                let q: f64 = rule.iter().map(|(x, w)| w * x.powi(j)).sum();
                let exact = if j % 2 == 0 {
                    2.0 / f64::from(j + 1)
                } else {
                    0.0
                };
                assert!((q - exact).abs() < 1e-13, "n={n} j={j}");
            }
        }
        assert!(gauss_legendre(0).is_empty());
    }
}
