//! Chebyshev interpolation on an interval: values at the Chebyshev–Lobatto points
//! x_j = cos(jπ/N), j = 0 … N, give the coefficients of the interpolant p(x) = Σ c_k T_k(x) by a
//! discrete cosine transform of type I, and p is evaluated by Clenshaw's recurrence
//! (L. N. Trefethen, *Approximation Theory and Approximation Practice*, SIAM, 2013, ch. 3–4;
//! C. W. Clenshaw, "A note on the summation of Chebyshev series", MTAC 9, 1955). The points of
//! N nest in those of 2N, so a series can be refined by evaluating only the new points.

/// The Chebyshev–Lobatto point x_j = cos(jπ/N) on [−1, 1].
pub(crate) fn lobatto_point(j: usize, n: usize) -> f64 {
    (std::f64::consts::PI * j as f64 / n as f64).cos()
}

/// The interpolant of `values` (at x_j = cos(jπ/N), N = len − 1 ≥ 1) as Chebyshev coefficients
/// c_0 … c_N of p(x) = Σ c_k T_k(x): c_k = (2/N)·Σ″_j f_j cos(jkπ/N), with the first and last
/// terms of the sum and the coefficients c_0 and c_N halved.
pub(crate) fn coefficients(values: &[f64]) -> Vec<f64> {
    let n = values.len().saturating_sub(1);
    // cos(mπ/N) for m = 0 … 2N − 1: jk mod 2N indexes it.
    let cosines: Vec<f64> = (0..2 * n).map(|m| lobatto_point(m, n)).collect();
    coefficients_with(values, &cosines)
}

/// [`coefficients`] with the table cos(mπ/N), m = 0 … 2N − 1, given (`cosines.len()` = 2N).
pub(crate) fn coefficients_with(values: &[f64], cosines: &[f64]) -> Vec<f64> {
    let n = values.len().saturating_sub(1);
    if n == 0 || cosines.len() != 2 * n {
        return values.to_vec();
    }
    (0..=n)
        .map(|k| {
            let sum: f64 = values
                .iter()
                .enumerate()
                .map(|(j, &f)| {
                    let w = if j == 0 || j == n { 0.5 } else { 1.0 };
                    w * f * cosines[(j * k) % (2 * n)]
                })
                .sum();
            let w = if k == 0 || k == n { 0.5 } else { 1.0 };
            w * 2.0 * sum / n as f64
        })
        .collect()
}

/// Σ c_k T_k(x) by Clenshaw's recurrence.
pub(crate) fn clenshaw(c: &[f64], x: f64) -> f64 {
    let (mut b1, mut b2) = (0.0, 0.0);
    for &ck in c.iter().skip(1).rev() {
        let b0 = 2.0 * x * b1 - b2 + ck;
        b2 = b1;
        b1 = b0;
    }
    x * b1 - b2 + c.first().copied().unwrap_or(0.0)
}

/// Σ c_k T_k(x_p) at every point of `x` by Clenshaw's recurrence, the points side by side (the
/// same operations as [`clenshaw`] per point, so the same values).
pub(crate) fn clenshaw_many<const P: usize>(c: &[f64], x: &[f64; P]) -> [f64; P] {
    let two_x: [f64; P] = std::array::from_fn(|p| 2.0 * x[p]);
    let (mut b1, mut b2) = ([0.0; P], [0.0; P]);
    for &ck in c.iter().skip(1).rev() {
        for p in 0..P {
            let b0 = two_x[p] * b1[p] - b2[p] + ck;
            b2[p] = b1[p];
            b1[p] = b0;
        }
    }
    let c0 = c.first().copied().unwrap_or(0.0);
    std::array::from_fn(|p| x[p] * b1[p] - b2[p] + c0)
}

/// Monomial coefficients a_0 … a_N of Σ c_k T_k(x) = Σ a_i x^i, from the three-term recurrence
/// T_{k+1} = 2x·T_k − T_{k−1} (fine for the low degrees used here: |coefficients of T_k| ≤ 2^k).
pub(crate) fn to_monomial<const M: usize>(c: &[f64; M]) -> [f64; M] {
    let mut out = [0.0; M];
    let (mut prev, mut cur) = ([0.0; M], [0.0; M]);
    // T_0 = 1, T_1 = x.
    prev[0] = 1.0;
    if M > 1 {
        cur[1] = 1.0;
    }
    for (k, &ck) in c.iter().enumerate() {
        let t = match k {
            0 => prev,
            1 => cur,
            _ => {
                let mut next = [0.0; M];
                for i in 0..M {
                    let shifted = if i > 0 { 2.0 * cur[i - 1] } else { 0.0 };
                    next[i] = shifted - prev[i];
                }
                prev = cur;
                cur = next;
                next
            }
        };
        for i in 0..M {
            out[i] += ck * t[i];
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The interpolant of a polynomial of degree ≤ N is the polynomial itself: T_3 and
    /// 1 + x − 2x⁴ from N = 4 and 8 points, against the closed forms (1e-14).
    #[test]
    fn reproduces_polynomials() {
        for n in [4usize, 8] {
            let f = |x: f64| 1.0 + x - 2.0 * x.powi(4);
            let values: Vec<f64> = (0..=n).map(|j| f(lobatto_point(j, n))).collect();
            let c = coefficients(&values);
            for i in 0..=20 {
                let x = -1.0 + 0.1 * f64::from(i);
                assert!((clenshaw(&c, x) - f(x)).abs() < 1e-14, "{n} {x}");
            }
        }
        // T_3 = 4x³ − 3x: coefficient vector e_3.
        let values: Vec<f64> = (0..=4)
            .map(|j| {
                let x = lobatto_point(j, 4);
                4.0 * x * x * x - 3.0 * x
            })
            .collect();
        let c = coefficients(&values);
        for (k, ck) in c.iter().enumerate() {
            let want = if k == 3 { 1.0 } else { 0.0 };
            assert!((ck - want).abs() < 1e-15, "c_{k} = {ck}");
        }
        let m = to_monomial(&[0.0, 0.0, 0.0, 1.0]);
        assert_eq!(m, [0.0, -3.0, 0.0, 4.0]);
    }

    /// exp on [−1, 1] from 17 points: the interpolation error is below 1e-15 (Trefethen 2013,
    /// Thm 8.2, ρ → ∞ for an entire function), checked at 201 points.
    #[test]
    fn converges_for_an_entire_function() {
        let n = 16;
        let values: Vec<f64> = (0..=n).map(|j| lobatto_point(j, n).exp()).collect();
        let c = coefficients(&values);
        for i in 0..=200 {
            let x = -1.0 + 0.01 * f64::from(i);
            assert!((clenshaw(&c, x) - x.exp()).abs() < 2e-15 * x.exp(), "{x}");
        }
    }
}
