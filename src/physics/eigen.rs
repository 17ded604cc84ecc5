//! Eigenvalues of a real symmetric matrix and the projections of one vector on its eigenvectors.
//!
//! The finite-height edge model ([`super::edge`]) needs, for a symmetric matrix A and a vector y,
//! the eigenvalues μ_i of A and the components t_i = v_iᵀy of y along the eigenvectors v_i (so that
//! yᵀ(I + X²A²)⁻¹y = Σ t_i²/(1 + X²μ_i²)). The eigenvectors themselves are never formed: the
//! Householder reflections of the tridiagonalisation and the plane rotations of the QL iterations
//! are applied to y directly, which is the standard accumulation of the eigenvector matrix
//! restricted to one row.
//!
//! Algorithms: Householder reduction to tridiagonal form and the implicit QL method with Wilkinson
//! shifts (Bowdler, Martin, Reinsch & Wilkinson, "The QR and QL algorithms for symmetric
//! matrices", Numer. Math. 11, 1968, 293–306; as written in Press et al., *Numerical Recipes*,
//! 3rd ed., 2007, §11.3–11.4, `tred2`/`tqli`).

/// Eigenvalues of the symmetric `n × n` matrix `a` (row-major, both triangles filled) with the
/// projections of `y` on the eigenvectors: returns `(μ_i, t_i)` pairs in no particular order, or
/// `None` if the QL iteration does not converge in 60 sweeps per eigenvalue or an input is not
/// finite. `a` and `y` are overwritten.
pub(crate) fn symmetric_eigen_projections(
    a: &mut [f64],
    y: &mut [f64],
    n: usize,
) -> Option<Vec<(f64, f64)>> {
    if a.len() != n * n || y.len() != n || !a.iter().chain(y.iter()).all(|x| x.is_finite()) {
        return None;
    }
    let (mut d, mut e) = tridiagonalise(a, y, n);
    ql_implicit(&mut d, &mut e, y)?;
    Some(d.into_iter().zip(y.iter().copied()).collect())
}

/// √(a² + b²): the plain formula where the squares can neither overflow nor underflow (it
/// differs from `f64::hypot` by rounding only), `hypot` elsewhere.
#[inline]
fn pythag(a: f64, b: f64) -> f64 {
    let m = a.abs().max(b.abs());
    if m < 1e150 && m > 1e-150 {
        (a * a + b * b).sqrt()
    } else {
        a.hypot(b)
    }
}

/// Σ aᵢbᵢ in four interleaved partial sums (independent additions, so the products pipeline).
fn dot(a: &[f64], b: &[f64]) -> f64 {
    let mut sums = [0.0; 4];
    let (a4, b4) = (a.chunks_exact(4), b.chunks_exact(4));
    let (ar, br) = (a4.remainder(), b4.remainder());
    for (x, y) in a4.zip(b4) {
        for i in 0..4 {
            sums[i] += x[i] * y[i];
        }
    }
    let rest: f64 = ar.iter().zip(br).map(|(x, y)| x * y).sum();
    (sums[0] + sums[1]) + (sums[2] + sums[3]) + rest
}

/// Householder reduction A = Q T Qᵀ; returns the diagonal and the super-diagonal of T
/// (`e[i] = T[i][i+1]`, `e[n−1] = 0`) and replaces `y` by Qᵀy.
fn tridiagonalise(a: &mut [f64], y: &mut [f64], n: usize) -> (Vec<f64>, Vec<f64>) {
    let mut v = vec![0.0; n];
    let mut p = vec![0.0; n];
    for k in 0..n.saturating_sub(2) {
        // x = A[k+1.., k]; reflect it onto a multiple of e_1.
        let scale: f64 = (k + 1..n).map(|i| a[i * n + k].abs()).sum();
        if scale == 0.0 {
            continue;
        }
        let mut norm_sq = 0.0;
        for i in k + 1..n {
            v[i] = a[i * n + k] / scale;
            norm_sq += v[i] * v[i];
        }
        let x0 = v[k + 1];
        let alpha = -x0.signum() * norm_sq.sqrt();
        v[k + 1] = x0 - alpha;
        // H = I − β v vᵀ with β = 2/(vᵀv); vᵀv = norm_sq − x0² + (x0 − α)² = 2(norm_sq − x0 α).
        let vtv = 2.0 * (norm_sq - x0 * alpha);
        if vtv == 0.0 {
            continue;
        }
        let beta = 2.0 / vtv;
        // p = β A v, w = p − (β/2)(pᵀv) v, A ← A − v wᵀ − w vᵀ on the trailing block.
        for i in k + 1..n {
            p[i] = beta * dot(&a[i * n + k + 1..(i + 1) * n], &v[k + 1..n]);
        }
        let ptv: f64 = (k + 1..n).map(|i| p[i] * v[i]).sum();
        let half = 0.5 * beta * ptv;
        for i in k + 1..n {
            p[i] -= half * v[i];
        }
        for i in k + 1..n {
            let (vi, pi) = (v[i], p[i]);
            let row = &mut a[i * n + k + 1..(i + 1) * n];
            for ((x, &vj), &pj) in row.iter_mut().zip(&v[k + 1..n]).zip(&p[k + 1..n]) {
                *x -= vi * pj + pi * vj;
            }
        }
        let sub = alpha * scale;
        a[(k + 1) * n + k] = sub;
        a[k * n + k + 1] = sub;
        for i in k + 2..n {
            a[i * n + k] = 0.0;
            a[k * n + i] = 0.0;
        }
        let vty: f64 = (k + 1..n).map(|i| v[i] * y[i]).sum();
        for i in k + 1..n {
            y[i] -= beta * vty * v[i];
        }
    }
    let d = (0..n).map(|i| a[i * n + i]).collect();
    let e = (0..n)
        .map(|i| if i + 1 < n { a[i * n + i + 1] } else { 0.0 })
        .collect();
    (d, e)
}

/// Implicit QL with shifts on the tridiagonal (d, e); applies every rotation to the row vector
/// `z`, which ends as Wᵀz for the eigenvector matrix W of T. `None` if it does not converge.
fn ql_implicit(d: &mut [f64], e: &mut [f64], z: &mut [f64]) -> Option<()> {
    let n = d.len();
    for l in 0..n {
        let mut iterations = 0;
        loop {
            let mut m = l;
            while m + 1 < n {
                let dd = d[m].abs() + d[m + 1].abs();
                if e[m].abs() <= f64::EPSILON * dd {
                    break;
                }
                m += 1;
            }
            if m == l {
                break;
            }
            iterations += 1;
            if iterations > 60 {
                return None;
            }
            let mut g = (d[l + 1] - d[l]) / (2.0 * e[l]);
            let mut r = pythag(g, 1.0);
            g = d[m] - d[l] + e[l] / (g + r.copysign(g));
            let (mut s, mut c, mut p) = (1.0_f64, 1.0_f64, 0.0_f64);
            let mut underflow = false;
            let mut i = m;
            while i > l {
                i -= 1;
                let f = s * e[i];
                let b = c * e[i];
                r = pythag(f, g);
                e[i + 1] = r;
                if r == 0.0 {
                    d[i + 1] -= p;
                    e[m] = 0.0;
                    underflow = true;
                    break;
                }
                s = f / r;
                c = g / r;
                g = d[i + 1] - p;
                r = (d[i] - g) * s + 2.0 * c * b;
                p = s * r;
                d[i + 1] = g + p;
                g = c * r - b;
                let zf = z[i + 1];
                z[i + 1] = s * z[i] + c * zf;
                z[i] = c * z[i] - s * zf;
            }
            if underflow {
                continue;
            }
            d[l] -= p;
            e[l] = g;
            e[m] = 0.0;
        }
    }
    Some(())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Pseudo-random symmetric matrix (fixed LCG, Knuth MMIX constants) and vector.
    fn random_case(n: usize, seed: u64) -> (Vec<f64>, Vec<f64>) {
        let mut state = seed;
        let mut next = || {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            (state >> 11) as f64 / (1u64 << 53) as f64 - 0.5
        };
        let mut a = vec![0.0; n * n];
        for i in 0..n {
            for j in 0..=i {
                let x = next();
                a[i * n + j] = x;
                a[j * n + i] = x;
            }
        }
        let y = (0..n).map(|_| next()).collect();
        (a, y)
    }

    fn mat_vec(a: &[f64], x: &[f64], n: usize) -> Vec<f64> {
        (0..n)
            .map(|i| (0..n).map(|j| a[i * n + j] * x[j]).sum())
            .collect()
    }

    #[test]
    fn spectral_moments_match_the_matrix() {
        // Identity of the spectral decomposition (any linear-algebra text): yᵀAʲy = Σ t_i² μ_i^j
        // for j = 0…3; checked to 1e-12 relative for several sizes, including 1 and 2.
        for (n, seed) in [(1, 1), (2, 2), (7, 3), (40, 4), (96, 5)] {
            let (a, y) = random_case(n, seed);
            let mut a2 = a.clone();
            let mut y2 = y.clone();
            let pairs = symmetric_eigen_projections(&mut a2, &mut y2, n).expect("converges");
            let mut power = y.clone();
            for j in 0..4 {
                let direct: f64 = y.iter().zip(&power).map(|(p, q)| p * q).sum();
                let spectral: f64 = pairs.iter().map(|(m, t)| t * t * m.powi(j)).sum();
                let scale = pairs
                    .iter()
                    .map(|(m, t)| t * t * m.abs().powi(j))
                    .sum::<f64>();
                assert!(
                    (direct - spectral).abs() <= 1e-12 * scale.max(1e-300),
                    "n={n} j={j}: {direct} vs {spectral}"
                );
                power = mat_vec(&a, &power, n);
            }
        }
    }

    #[test]
    fn eigenvalues_of_a_known_matrix() {
        // The tridiagonal matrix with 2 on the diagonal and −1 beside it has eigenvalues
        // 2 − 2 cos(jπ/(n+1)), j = 1…n (classical result, e.g. Strang, *Linear Algebra and its
        // Applications*, 4th ed., 2006); 1e-13 absolute.
        let n = 12;
        let mut a = vec![0.0; n * n];
        for i in 0..n {
            a[i * n + i] = 2.0;
            if i + 1 < n {
                a[i * n + i + 1] = -1.0;
                a[(i + 1) * n + i] = -1.0;
            }
        }
        let mut y = vec![1.0; n];
        let mut mu: Vec<f64> = symmetric_eigen_projections(&mut a, &mut y, n)
            .expect("converges")
            .iter()
            .map(|p| p.0)
            .collect();
        mu.sort_by(f64::total_cmp);
        for (j, m) in mu.iter().enumerate() {
            let exact = 2.0 - 2.0 * (std::f64::consts::PI * (j + 1) as f64 / (n + 1) as f64).cos();
            assert!((m - exact).abs() < 1e-13);
        }
    }

    #[test]
    fn rejects_non_finite_input() {
        let mut a = vec![1.0, f64::NAN, f64::NAN, 1.0];
        let mut y = vec![1.0, 0.0];
        assert!(symmetric_eigen_projections(&mut a, &mut y, 2).is_none());
        let mut a = vec![1.0];
        let mut y = vec![1.0, 2.0];
        assert!(symmetric_eigen_projections(&mut a, &mut y, 1).is_none());
    }
}
