//! Fast interpolant of the drag law for the equations of motion.
//!
//! The drag per area is f(v) = v·g(v) with g = f/v even and analytic in v on the real axis (every
//! harmonic is a function of v² there; [`super::layer`], [`super::edge`]); its singularities
//! lie off the real axis at a distance of the order of the critical speed v_c. The table holds
//! g, so that its error is relative to f at every speed, including v → 0.
//!
//! - **Master series.** The singularities of g in the complex v-plane all lie on the imaginary
//!   axis (the poles of the layer terms at the decay rates of the fin's diffusion modes, those
//!   of the edge factors' Lorentzians at σv = ±i/r), so in ζ = ln v the function is analytic in
//!   the strip |Im ζ| < π/2 and one Chebyshev series in ζ converges geometrically over many
//!   octaves at once (Trefethen, *Approximation Theory and Approximation Practice*, 2013, Thm
//!   8.2, with the Bernstein ellipse inside the strip). The range is cut into [0, v_e] (v_e =
//!   v_c/2, at most v₀), where g is even and a series in v² converges fast, and [v_e, V] in ζ;
//!   the ζ-series holds g·w with w = (1 + (v/v_c)²)^¾ (smooth in the strip, and roughly 1/g at
//!   both ends) so that its absolute tail is a relative error of g. Each series interpolates the
//!   model at 17 Chebyshev–Lobatto points, refined to 33 and 65 (the points nest) until its
//!   last two coefficients fall below 1e-11 of the smallest |g| on the panel; a ζ-panel that
//!   does not converge is bisected (at most 5 times). The series is built in three parts, the
//!   fundamental, the third harmonic and the others together, each refined on its own with a
//!   third of the tolerance relative to the fundamental's smallest value (g ≥ g_1), so the small
//!   parts are evaluated at fewer points; trailing coefficients of the sum are dropped within a
//!   quarter of the tolerance. About 45 model evaluations for a table to 20 v_c.
//! - **Evaluation grid.** Each panel is split into S equal intervals (S = 4, 8, … 64, doubled
//!   until every interval passes its check), each holding the degree-5 polynomial in x ∈ [−1, 1]
//!   that interpolates the master series at six Chebyshev–Lobatto points (the interval ends are
//!   shared with the neighbours, so the table is continuous). Checked against the master series
//!   between the outer nodes, where the interpolation error peaks, to 2e-10 relative (the
//!   master series evaluated at the eight points of an interval side by side; a failed S is
//!   retried from the panel that failed). An
//!   evaluation finds its interval from the bits of v/v₀ (the exponent gives the octave, the
//!   leading mantissa bits the interval) and runs one Horner step of five multiply–adds (plain
//!   multiplications and additions: `mul_add` is a library call without FMA in the target).
//! - **Slopes** are the derivative of the interval polynomial: f′ = g + v·g′, with no
//!   finite difference of the model.
//!
//! Because the drag per area depends on conductivity and speed only through σ·v and on remanence
//! as Br² (see [`super::layer`]), one table serves every fin temperature and magnet temperature:
//! f(v; σ', Br') = (Br'/Br)²·f(v·σ'/σ; σ, Br), exactly. Beyond V (or where a panel does not
//! converge, which shortens the table) the exact model is used.
//!
//! A fin displaced from the centre plane ([`super::offset`]) has its own drag table
//! ([`ForceTable::build_offset`], the same construction over the off-centre drag) and a
//! [`LateralTable`] of its lateral force f_y, which is even in v and quadratic at rest: the
//! table holds f_y/v² on the same panels and grid, again relative to f_y at every speed. Both
//! scale with σ·v and Br² as the drag does. Their series are built in one part (the model has no
//! harmonic split for them).

use super::chebyshev::{
    clenshaw, clenshaw_many, coefficients, coefficients_with, lobatto_point, to_monomial,
};
use super::layer::DragModel;
use super::offset::OffsetModel;
use std::sync::OnceLock;

/// Degree of the interval polynomials.
const DEGREE: usize = 5;

/// Coefficients per interval.
const TERMS: usize = DEGREE + 1;

/// Master panels start at this many Chebyshev intervals (17 points) …
const FIRST_MASTER_DEGREE: usize = 16;

/// … and stop refining at this many (65 points).
const MAX_MASTER_DEGREE: usize = 64;

/// A log panel of the master series that does not converge is bisected at most this often.
const MAX_SPLITS: u32 = 5;

/// The even master panel reaches this fraction of the critical speed.
const EVEN_PANEL_FRACTION: f64 = 0.5;

/// The master series' last two coefficients, relative to the smallest |g| on the panel.
const MASTER_TOLERANCE: f64 = 1e-11;

/// The interval polynomials against the master series, relative.
const GRID_TOLERANCE: f64 = 2e-10;

/// Intervals per panel: first try and largest (log₂ 4 = 2 … log₂ 64 = 6).
const GRID_BITS: std::ops::RangeInclusive<u32> = 2..=6;

/// At most this many octaves above the first panel.
const MAX_OCTAVES: u32 = 40;

/// Tabulated drag law of one [`DragModel`], with the model kept for speeds beyond the table.
#[derive(Clone, Debug)]
pub struct ForceTable {
    model: DragModel,
    /// The off-centre model the table interpolates instead of `model` (None: centred fin).
    offset: Option<OffsetModel>,
    max_speed_m_s: f64,
    /// 1/v₀, s/m.
    inverse_base_s_m: f64,
    /// log₂ of the intervals per panel.
    grid_bits: u32,
    /// dx/dv per panel, s/m (x ∈ [−1, 1] the position in the interval).
    panel_scale_s_m: Vec<f64>,
    /// Per interval: g(x) = Σ aᵢ xⁱ, Pa·s/m.
    coefficients: Vec<[f64; TERMS]>,
}

/// The master series of the drag law: an even Chebyshev series in v on [0, v_e] and series in
/// ln v on contiguous panels from v_e up, each of g·w with the weight w(v) = (1 + (v/v_c)²)^¾,
/// which makes g·w vary by less than g over the range so that a tail relative to its smallest
/// value is a relative error bound.
struct Master {
    /// v_e, m/s.
    even_top_m_s: f64,
    /// c_0, c_2, c_4, … of g in T_{2k}(v/v_e) = T_k(2(v/v_e)² − 1).
    even: Vec<f64>,
    /// 1/v_c, s/m.
    inverse_critical_s_m: f64,
    panels: Vec<LogPanel>,
}

/// One master panel [lo, hi] in ζ = ln v: Chebyshev coefficients of g·w in (ζ − mid)/half.
struct LogPanel {
    hi_m_s: f64,
    mid_ln: f64,
    inverse_half_ln: f64,
    series: Vec<f64>,
}

/// w(v) = (1 + (v/v_c)²)^¾ for `inverse_critical` = 1/v_c.
#[inline]
fn weight(speed_m_s: f64, inverse_critical_s_m: f64) -> f64 {
    let r = speed_m_s * inverse_critical_s_m;
    let t = 1.0 + r * r;
    let root = t.sqrt();
    root * root.sqrt()
}

impl Master {
    /// g at 0 ≤ v ≤ the top of the last panel, Pa·s/m.
    fn value(&self, speed_m_s: f64) -> f64 {
        if speed_m_s <= self.even_top_m_s {
            let x = speed_m_s / self.even_top_m_s;
            return clenshaw(&self.even, 2.0 * x * x - 1.0);
        }
        let panel = self
            .panels
            .iter()
            .find(|p| speed_m_s <= p.hi_m_s)
            .or(self.panels.last());
        match panel {
            Some(p) => {
                let x = (speed_m_s.ln() - p.mid_ln) * p.inverse_half_ln;
                clenshaw(&p.series, x) / weight(speed_m_s, self.inverse_critical_s_m)
            }
            None => f64::NAN,
        }
    }

    /// g at the points of `speeds` (as [`Master::value`]): side by side when they share a panel.
    fn values<const P: usize>(&self, speeds: &[f64; P]) -> [f64; P] {
        let (lo, hi) = speeds
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
                (a.min(v), b.max(v))
            });
        if hi <= self.even_top_m_s {
            let y: [f64; P] = std::array::from_fn(|p| {
                let x = speeds[p] / self.even_top_m_s;
                2.0 * x * x - 1.0
            });
            return clenshaw_many(&self.even, &y);
        }
        let mut floor = self.even_top_m_s;
        for panel in &self.panels {
            if lo > floor && hi <= panel.hi_m_s {
                let x: [f64; P] = std::array::from_fn(|p| {
                    (speeds[p].ln() - panel.mid_ln) * panel.inverse_half_ln
                });
                let sums = clenshaw_many(&panel.series, &x);
                return std::array::from_fn(|p| {
                    sums[p] / weight(speeds[p], self.inverse_critical_s_m)
                });
            }
            floor = panel.hi_m_s;
        }
        std::array::from_fn(|p| self.value(speeds[p]))
    }

    /// Upper end of the speeds the series cover, m/s.
    fn top_m_s(&self) -> f64 {
        self.panels.last().map_or(self.even_top_m_s, |p| p.hi_m_s)
    }
}

/// cos(mπ/N), m = 0 … 2N − 1, for the master levels N = 16, 32, 64 (built once).
fn cosine_table(n: usize) -> &'static [f64] {
    static TABLES: [OnceLock<Vec<f64>>; 3] = [OnceLock::new(), OnceLock::new(), OnceLock::new()];
    let level = match n {
        16 => 0,
        32 => 1,
        _ => 2,
    };
    TABLES[level].get_or_init(|| {
        let n = FIRST_MASTER_DEGREE << level;
        (0..2 * n).map(|m| lobatto_point(m, n)).collect()
    })
}

/// A converged series and the smallest |value| it was interpolated from.
struct Series {
    coefficients: Vec<f64>,
    smallest: f64,
}

/// Chebyshev coefficients of the interpolant at the Lobatto points x_j = cos(jπ/N) of N = 16,
/// 32, 64 (nested: only the new points are evaluated), `value(done, x_j, j, N)` giving the value
/// at point j (`done`: the values of this level so far), until `tail(c)` is at most `tolerance`
/// × `scale` (the smallest |value| when `scale` is `None`); `None` if 64 intervals do not reach
/// it or a value is not finite.
fn refined_series(
    mut value: impl FnMut(&[f64], f64, usize, usize) -> f64,
    tail: impl Fn(&[f64]) -> f64,
    tolerance: f64,
    scale: Option<f64>,
) -> Option<Series> {
    let mut n = FIRST_MASTER_DEGREE;
    let mut cosines = cosine_table(n);
    let mut values = Vec::with_capacity(n + 1);
    for (j, &x_j) in cosines.iter().enumerate().take(n + 1) {
        let x = value(&values, x_j, j, n);
        values.push(x);
    }
    loop {
        let c = coefficients_with(&values, cosines);
        let smallest = values.iter().map(|g| g.abs()).fold(f64::INFINITY, f64::min);
        let reference = scale.unwrap_or(smallest);
        let t = tail(&c);
        if !(t.is_finite() && smallest.is_finite()) {
            return None;
        }
        if t <= tolerance * reference {
            return Some(Series {
                coefficients: c,
                smallest,
            });
        }
        if n >= MAX_MASTER_DEGREE {
            return None;
        }
        // The points of 2N: the old ones at even indices, new ones between.
        let m = 2 * n;
        cosines = cosine_table(m);
        let old = std::mem::take(&mut values);
        values.reserve(m + 1);
        for j in 0..=m {
            let x = if j % 2 == 0 {
                old[j / 2]
            } else {
                value(&values, cosines[j], j, m)
            };
            values.push(x);
        }
        n = m;
    }
}

/// The series of g on one master panel in `parts` parts (for the centred drag [`PARTS`]: the
/// fundamental, the third harmonic, the others together), each at its own number of points: the
/// smaller parts converge with fewer. `value(part, done, x_j, j, N)` is the part at point j. Each part's tail is held to a
/// share of the tolerance relative to the first part's smallest value (g ≥ g_1: every harmonic
/// dissipates); the trailing coefficients of the sum are then dropped within a quarter of it.
fn parted_series(
    parts: usize,
    mut value: impl FnMut(usize, &[f64], f64, usize, usize) -> f64,
    tail: impl Fn(&[f64]) -> f64,
) -> Option<Vec<f64>> {
    let share = MASTER_TOLERANCE / parts.max(1) as f64;
    let first = refined_series(|done, x, j, n| value(0, done, x, j, n), &tail, share, None)?;
    let scale = first.smallest;
    let mut sum = first.coefficients;
    for part in 1..parts {
        let more = refined_series(
            |done, x, j, n| value(part, done, x, j, n),
            &tail,
            share,
            Some(scale),
        )?;
        if more.coefficients.len() > sum.len() {
            sum.resize(more.coefficients.len(), 0.0);
        }
        for (s, c) in sum.iter_mut().zip(&more.coefficients) {
            *s += c;
        }
    }
    Some(chopped(sum, 0.25 * MASTER_TOLERANCE * scale))
}

/// Parts of the master series: harmonic indices 0, 1 and 2 onwards.
const PARTS: usize = 3;

/// Part `part` of g at speed v ≥ 0 (harmonic index `part`, the last part all the rest), Pa·s/m;
/// 0 where the model has fewer harmonics.
fn part_g(model: &DragModel, part: usize, speed_m_s: f64) -> f64 {
    let count = model.harmonics().len();
    let end = if part + 1 == PARTS {
        count
    } else {
        (part + 1).min(count)
    };
    (part.min(count)..end)
        .map(|h| model.harmonic_force_over_speed(h, speed_m_s))
        .sum()
}

/// `c` without its trailing coefficients whose magnitudes sum to at most `allowance` (they
/// change the series by no more than that anywhere on [−1, 1], since |T_k| ≤ 1).
fn chopped(mut c: Vec<f64>, allowance: f64) -> Vec<f64> {
    let mut dropped = 0.0;
    while let Some(&last) = c.last() {
        dropped += last.abs();
        if dropped > allowance || c.len() <= 1 {
            break;
        }
        c.pop();
    }
    c
}

/// The function a table interpolates (g = f/v or f_y/v², even in v) in `parts` parts:
/// `value(part, v)` at v ≥ 0 (the low-speed limit at 0), the parts summing to g.
struct Law<'a> {
    parts: usize,
    value: &'a dyn Fn(usize, f64) -> f64,
}

/// The even series of g on [0, v_e] (as coefficients in T_k(2x² − 1), x = v/v_e): the points
/// x_j·v_e with j > N/2 mirror those with N − j (g is even), so only v ≥ 0 is evaluated.
fn even_series(law: &Law, top_m_s: f64) -> Option<Vec<f64>> {
    let c = parted_series(
        law.parts,
        |part, done, x, j, n| {
            if 2 * j > n {
                done.get(n - j).copied().unwrap_or(f64::NAN)
            } else {
                let v = if 2 * j == n { 0.0 } else { top_m_s * x };
                (law.value)(part, v)
            }
        },
        |c| {
            let n = c.len() - 1;
            c[n].abs().max(c[n - 2].abs())
        },
    )?;
    Some(c.iter().step_by(2).copied().collect())
}

/// Log panels covering [lo, hi] (appended to `out`), bisected in ln v where 65 points do not
/// reach the tolerance, at most `depth` times; `false` if some part does not converge (the
/// panels before it are kept).
fn log_panels(
    law: &Law,
    (lo, hi): (f64, f64),
    inverse_critical_s_m: f64,
    depth: u32,
    out: &mut Vec<LogPanel>,
) -> bool {
    let (a, b) = (lo.ln(), hi.ln());
    let (mid, half) = (0.5 * (a + b), 0.5 * (b - a));
    let series = parted_series(
        law.parts,
        |part, _, x, j, n| {
            let v = if j == 0 {
                hi
            } else if j == n {
                lo
            } else {
                (mid + half * x).exp()
            };
            (law.value)(part, v) * weight(v, inverse_critical_s_m)
        },
        |c| {
            let n = c.len() - 1;
            c[n].abs().max(c[n - 1].abs())
        },
    );
    if let Some(series) = series {
        out.push(LogPanel {
            hi_m_s: hi,
            mid_ln: mid,
            inverse_half_ln: 1.0 / half,
            series,
        });
        return true;
    }
    if depth == 0 {
        return false;
    }
    let split = (lo * hi).sqrt();
    log_panels(law, (lo, split), inverse_critical_s_m, depth - 1, out)
        && log_panels(law, (split, hi), inverse_critical_s_m, depth - 1, out)
}

/// Maps the values at x_j = cos(jπ/5), j = 0 … 5, to the monomial coefficients of their
/// degree-5 interpolant: column j is the interpolant of the j-th unit vector.
fn lobatto_to_monomial() -> Option<[[f64; TERMS]; TERMS]> {
    let mut matrix = [[0.0; TERMS]; TERMS];
    for j in 0..TERMS {
        let mut unit = [0.0; TERMS];
        unit[j] = 1.0;
        let cheb: [f64; TERMS] = coefficients(&unit).try_into().ok()?;
        let poly = to_monomial(&cheb);
        for (i, row) in matrix.iter_mut().enumerate() {
            row[j] = poly[i];
        }
    }
    Some(matrix)
}

/// The interval polynomials of one panel [lo, hi] with `s` intervals from the master series, or
/// `None` if one misses the grid tolerance.
fn panel_grid(
    master: &Master,
    to_poly: &[[f64; TERMS]; TERMS],
    (lo, hi): (f64, f64),
    s: usize,
) -> Option<Vec<[f64; TERMS]>> {
    let width = (hi - lo) / s as f64;
    // Between the first two and the last two nodes.
    let probe = 0.5 * (1.0 + lobatto_point(1, DEGREE));
    let nodes: [f64; TERMS] = std::array::from_fn(|j| lobatto_point(j, DEGREE));
    let mut out = Vec::with_capacity(s);
    let mut left = master.value(lo);
    for i in 0..s {
        let (a, b) = (lo + i as f64 * width, lo + (i + 1) as f64 * width);
        let (c, w) = (0.5 * (a + b), 0.5 * width);
        // The right end, the four inner nodes x_j = cos(jπ/5) (x_0 = 1 is the right end, x_5 =
        // −1 the left), the two probes and the left end again (to fill eight).
        let speeds = [
            b,
            c + w * nodes[1],
            c + w * nodes[2],
            c + w * nodes[3],
            c + w * nodes[4],
            c + w * probe,
            c - w * probe,
            a,
        ];
        let g = master.values(&speeds);
        let values = [g[0], g[1], g[2], g[3], g[4], left];
        let poly: [f64; TERMS] =
            std::array::from_fn(|k| (0..TERMS).map(|j| to_poly[k][j] * values[j]).sum());
        for (x, want) in [(probe, g[5]), (-probe, g[6])] {
            let got = horner(&poly, x);
            let ok = (got - want).abs() <= GRID_TOLERANCE * want.abs();
            if !ok {
                return None;
            }
        }
        out.push(poly);
        left = g[0];
    }
    Some(out)
}

/// Σ aᵢ xⁱ for the degree-5 pieces, by Estrin's scheme (Estrin, "Organization of computer
/// systems", Proc. Western Joint Computer Conference, 1960): (a₀ + a₁x) + x²((a₂ + a₃x) +
/// x²(a₄ + a₅x)), three dependent multiply–adds instead of Horner's five, so a lookup waits
/// less on the previous operation's result (the same value to a few ulps: |x| ≤ 1).
#[inline(always)]
fn horner(a: &[f64; TERMS], x: f64) -> f64 {
    const _: () = assert!(TERMS == 6, "Estrin's scheme here is written for degree 5");
    let x2 = x * x;
    let low = a[0] + a[1] * x;
    let mid = a[2] + a[3] * x;
    let high = a[4] + a[5] * x;
    low + x2 * (mid + x2 * high)
}

/// d/dx Σ aᵢ xⁱ.
#[inline(always)]
fn horner_slope(a: &[f64; TERMS], x: f64) -> f64 {
    let mut p = (TERMS - 1) as f64 * a[TERMS - 1];
    for i in (1..TERMS - 1).rev() {
        p = p * x + i as f64 * a[i];
    }
    p
}

impl ForceTable {
    /// Tabulates `model` from 0 to `max_speed_m_s` (m/s). A maximum speed that is not finite and
    /// positive gives an empty table that always uses the exact model. A panel whose series does
    /// not converge (seen for degenerate geometries, e.g. zero clearance with a fin no taller than the
    /// poles) ends the table there (see
    /// [`ForceTable::max_speed_m_s`]) and the exact model serves the speeds above it.
    pub fn build(model: &DragModel, max_speed_m_s: f64) -> Self {
        let law = Law {
            parts: PARTS,
            value: &|part, v| part_g(model, part, v),
        };
        Self::tabulate(model, None, max_speed_m_s, &law)
    }

    /// Tabulates the drag of the off-centre model `offset` from 0 to `max_speed_m_s` (m/s) as
    /// [`ForceTable::build`] does the centred one; its exact model beyond the range is `offset`.
    pub fn build_offset(offset: &OffsetModel, max_speed_m_s: f64) -> Self {
        let g = |_: usize, v: f64| {
            if v > 0.0 {
                offset.drag_per_area_pa(v) / v
            } else {
                offset.low_speed_drag_pa_s_m()
            }
        };
        let law = Law {
            parts: 1,
            value: &g,
        };
        Self::tabulate(offset.model(), Some(offset.clone()), max_speed_m_s, &law)
    }

    /// The table of `law` (g = f/v of the drag, or f_y/v² for a [`LateralTable`]) with the
    /// panels laid out from the critical speed of `model`.
    fn tabulate(
        model: &DragModel,
        offset: Option<OffsetModel>,
        max_speed_m_s: f64,
        law: &Law,
    ) -> Self {
        let mut table = ForceTable {
            model: model.clone(),
            offset,
            max_speed_m_s: 0.0,
            inverse_base_s_m: 0.0,
            grid_bits: *GRID_BITS.start(),
            panel_scale_s_m: Vec::new(),
            coefficients: Vec::new(),
        };
        if !(max_speed_m_s.is_finite() && max_speed_m_s > 0.0) {
            return table;
        }
        let critical = model.critical_speed_m_s();
        let octaves = if critical > 0.0 && critical < max_speed_m_s {
            ((max_speed_m_s / critical).log2().ceil() as u32).min(MAX_OCTAVES)
        } else {
            0
        };
        let base = max_speed_m_s * 2f64.powi(-(octaves as i32));
        table.inverse_base_s_m = 1.0 / base;
        // Panels: [0, v₀], then [2^(q−1)·v₀, 2^q·v₀].
        let bounds = |q: u32| -> (f64, f64) {
            if q == 0 {
                (0.0, base)
            } else {
                (base * 2f64.powi(q as i32 - 1), base * 2f64.powi(q as i32))
            }
        };
        // Master series: even on [0, v_e], v_e = v_c/4 (at most v₀), then log panels to V.
        let even_top = if critical > 0.0 {
            (EVEN_PANEL_FRACTION * critical).min(base)
        } else {
            base
        };
        let Some(even) = even_series(law, even_top) else {
            return table;
        };
        let inverse_critical = if critical > 0.0 {
            1.0 / critical
        } else {
            1.0 / max_speed_m_s
        };
        let mut master = Master {
            even_top_m_s: even_top,
            even,
            inverse_critical_s_m: inverse_critical,
            panels: Vec::new(),
        };
        if even_top < max_speed_m_s {
            log_panels(
                law,
                (even_top, max_speed_m_s),
                inverse_critical,
                MAX_SPLITS,
                &mut master.panels,
            );
        }
        // Grid panels up to the top of the converged series.
        let top = master.top_m_s();
        let panels: Vec<(f64, f64)> = (0..=octaves)
            .map(bounds)
            .take_while(|&(_, hi)| hi <= top)
            .collect();
        let Some(to_poly) = lobatto_to_monomial() else {
            return table;
        };
        // The panel that failed last is tried first at the next S.
        let mut first = 0;
        'bits: for bits in GRID_BITS {
            let s = 1usize << bits;
            let mut parts: Vec<Vec<[f64; TERMS]>> = vec![Vec::new(); panels.len()];
            for q in (first..panels.len()).chain(0..first) {
                match panel_grid(&master, &to_poly, panels[q], s) {
                    Some(part) => parts[q] = part,
                    None => {
                        first = q;
                        continue 'bits;
                    }
                }
            }
            table.grid_bits = bits;
            table.coefficients = parts.concat();
            table.panel_scale_s_m = panels
                .iter()
                .map(|(lo, hi)| 2.0 * s as f64 / (hi - lo))
                .collect();
            table.max_speed_m_s = panels.last().map_or(0.0, |m| m.1);
            return table;
        }
        table
    }

    /// Interval, position x ∈ [−1, 1] in it and dx/dv for |v| = `speed_abs_m_s` inside the
    /// table range: the octave from the exponent of v/v₀, the interval from its leading mantissa
    /// bits.
    #[inline(always)]
    fn locate(&self, speed_abs_m_s: f64) -> Option<(&[f64; TERMS], f64, f64)> {
        let inside = speed_abs_m_s < self.max_speed_m_s;
        if !inside {
            return None;
        }
        let r = speed_abs_m_s * self.inverse_base_s_m;
        let s = (1u64 << self.grid_bits) as f64;
        let (panel, pos) = if r < 1.0 {
            (0usize, r * s)
        } else {
            let bits = r.to_bits();
            let exponent = ((bits >> 52) & 0x7ff) as usize - 1023;
            // The mantissa as a fraction in [0, 1).
            let frac = f64::from_bits((bits & ((1u64 << 52) - 1)) | 1f64.to_bits()) - 1.0;
            (exponent + 1, frac * s)
        };
        let k = (pos as usize).min((1usize << self.grid_bits) - 1);
        let i = (panel << self.grid_bits) + k;
        let c = self.coefficients.get(i)?;
        let scale = *self.panel_scale_s_m.get(panel)?;
        Some((c, 2.0 * (pos - k as f64) - 1.0, scale))
    }

    /// Drag force per unit area in Pa at `speed_m_s` (m/s), at the reference conductivity and
    /// remanence of the model: odd in v, from the table within its range and from the exact model
    /// beyond it. Within range, the relative error is below 1e-9.
    #[inline]
    pub fn force_per_area_pa(&self, speed_m_s: f64) -> f64 {
        match self.locate(speed_m_s.abs()) {
            Some((c, x, _)) => speed_m_s * horner(c, x),
            None => self.exact_pa(speed_m_s),
        }
    }

    /// The exact drag per unit area the table interpolates, Pa: the off-centre model when it has
    /// one, else the centred model.
    fn exact_pa(&self, speed_m_s: f64) -> f64 {
        match &self.offset {
            Some(o) => o.drag_per_area_pa(speed_m_s),
            None => self.model.force_per_area_pa(speed_m_s),
        }
    }

    /// Drag force per unit area in Pa at `speed_m_s` (m/s) for a fin whose conductivity is
    /// `conductivity_ratio` × the model's (σ(T)/σ_ref, > 0) and magnets whose remanence is
    /// `remanence_ratio` × the model's: exact rescaling, f = remanence_ratio²·f_ref(v·conductivity_ratio).
    #[inline]
    pub fn force_per_area_scaled_pa(
        &self,
        speed_m_s: f64,
        conductivity_ratio: f64,
        remanence_ratio: f64,
    ) -> f64 {
        remanence_ratio * remanence_ratio * self.force_per_area_pa(speed_m_s * conductivity_ratio)
    }

    /// Slope d f/d v in Pa·s/m at `speed_m_s` (m/s) at the table's reference conductivity and
    /// remanence (even in v): g + |v|·g′ from the interval polynomial within range, a central
    /// difference of the exact model beyond it. Callers use it for the braking onset and
    /// Jacobian-free checks.
    pub fn slope_pa_s_m(&self, speed_m_s: f64) -> f64 {
        let v = speed_m_s.abs();
        match self.locate(v) {
            Some((c, x, scale)) => horner(c, x) + v * scale * horner_slope(c, x),
            None => {
                // Fourth-order central difference (Abramowitz & Stegun, 1964, 25.3.6) with a
                // step of 1e-3 of the local speed scale.
                let h = 1e-3 * v.max(self.model.critical_speed_m_s());
                let f = |u: f64| self.exact_pa(u);
                (-f(v + 2.0 * h) + 8.0 * f(v + h) - 8.0 * f(v - h) + f(v - 2.0 * h)) / (12.0 * h)
            }
        }
    }

    /// Slope d f/d v in Pa·s/m with conductivity and remanence scaled as in
    /// [`ForceTable::force_per_area_scaled_pa`]: remanence_ratio²·conductivity_ratio·f_ref'(v·conductivity_ratio).
    pub fn slope_scaled_pa_s_m(
        &self,
        speed_m_s: f64,
        conductivity_ratio: f64,
        remanence_ratio: f64,
    ) -> f64 {
        remanence_ratio
            * remanence_ratio
            * conductivity_ratio
            * self.slope_pa_s_m(speed_m_s * conductivity_ratio)
    }

    /// Upper end of the tabulated speed range in m/s (0 for an empty table).
    pub fn max_speed_m_s(&self) -> f64 {
        self.max_speed_m_s
    }

    /// Number of intervals in the table.
    pub fn interval_count(&self) -> usize {
        self.coefficients.len()
    }

    /// The model the table was built from (used beyond the table range; the centred one of an
    /// off-centre table).
    pub fn model(&self) -> &DragModel {
        &self.model
    }

    /// The off-centre model of a table built by [`ForceTable::build_offset`].
    pub fn offset(&self) -> Option<&OffsetModel> {
        self.offset.as_ref()
    }
}

/// Tabulated lateral force of an off-centre fin ([`OffsetModel::lateral_per_area_pa`]): the
/// panels and grid of [`ForceTable`] over g = f_y/v² (even in v, the closed-form low-speed
/// limit at rest), within 1e-9 relative of the model inside its range and the model beyond it.
#[derive(Clone, Debug)]
pub struct LateralTable {
    /// The panels and grid over f_y/v² (only its grid is read).
    grid: ForceTable,
    /// The model, used beyond the grid.
    offset: OffsetModel,
}

impl LateralTable {
    /// Tabulates the lateral force of `offset` from 0 to `max_speed_m_s` (m/s).
    pub fn build(offset: &OffsetModel, max_speed_m_s: f64) -> Self {
        let g = |_: usize, v: f64| {
            if v > 0.0 {
                offset.lateral_per_area_pa(v) / (v * v)
            } else {
                offset.low_speed_lateral_pa_s2_m2()
            }
        };
        let law = Law {
            parts: 1,
            value: &g,
        };
        Self {
            grid: ForceTable::tabulate(offset.model(), None, max_speed_m_s, &law),
            offset: offset.clone(),
        }
    }

    /// Lateral force per unit area in Pa along +y at `speed_m_s` (m/s), at the reference
    /// conductivity and remanence (even in v; negative for a positive offset).
    #[inline]
    pub fn lateral_per_area_pa(&self, speed_m_s: f64) -> f64 {
        let v = speed_m_s.abs();
        match self.grid.locate(v) {
            Some((c, x, _)) => v * v * horner(c, x),
            None => self.offset.lateral_per_area_pa(v),
        }
    }

    /// Lateral force per unit area in Pa with conductivity and remanence scaled as in
    /// [`ForceTable::force_per_area_scaled_pa`]: remanence_ratio²·f_y,ref(v·conductivity_ratio).
    #[inline]
    pub fn lateral_per_area_scaled_pa(
        &self,
        speed_m_s: f64,
        conductivity_ratio: f64,
        remanence_ratio: f64,
    ) -> f64 {
        remanence_ratio * remanence_ratio * self.lateral_per_area_pa(speed_m_s * conductivity_ratio)
    }

    /// Upper end of the tabulated speed range in m/s.
    pub fn max_speed_m_s(&self) -> f64 {
        self.grid.max_speed_m_s
    }

    /// The off-centre model behind the table.
    pub fn offset(&self) -> &OffsetModel {
        &self.offset
    }
}

#[cfg(test)]
mod tests {
    use super::super::test_support::typical_geometry;
    use super::*;

    fn table(max: f64) -> ForceTable {
        let m = DragModel::new(&typical_geometry(), 1.25, 58e6).expect("valid typical model");
        ForceTable::build(&m, max)
    }

    #[test]
    fn matches_model_on_a_dense_grid() {
        // ≤ 1e-9 relative to the direct model at 20 001 speeds including interval ends.
        let t = table(60.0);
        assert_eq!(t.max_speed_m_s(), 60.0);
        for i in 0..=20_000 {
            let v = 60.0 * f64::from(i) / 20_000.0 * (1.0 - 1e-12);
            let (got, want) = (t.force_per_area_pa(v), t.model().force_per_area_pa(v));
            assert!(
                (got - want).abs() <= 1e-9 * want.abs(),
                "v={v} {got} vs {want}"
            );
        }
    }

    #[test]
    fn odd_continuous_and_fallback() {
        let t = table(20.0);
        // Odd: exact by construction (sign applied to the tabulated |v| value).
        assert_eq!(t.force_per_area_pa(-7.3), -t.force_per_area_pa(7.3));
        // Beyond the range: the exact model.
        assert_eq!(t.force_per_area_pa(25.0), t.model().force_per_area_pa(25.0));
        // Continuous at an interval end (shared node): 1e-14 relative.
        let end = 1.0 / t.inverse_base_s_m;
        let (left, right) = (
            t.force_per_area_pa(end * (1.0 - 1e-15)),
            t.force_per_area_pa(end),
        );
        assert!((left / right - 1.0).abs() < 1e-13, "{left} {right}");
        // Slope against a central difference of the model: 1e-6 of peak / critical speed.
        let m = t.model();
        let scale = m.peak_force_per_area_pa() / m.critical_speed_m_s();
        for v in [0.0, 0.5, 3.0, 11.0, 19.0] {
            let fd = (m.force_per_area_pa(v + 1e-4) - m.force_per_area_pa(v - 1e-4)) / 2e-4;
            assert!((t.slope_pa_s_m(v) - fd).abs() < 1e-6 * scale, "v={v}");
        }
        // Empty table for a bad maximum speed: always the model.
        let empty = table(f64::NAN);
        assert_eq!(empty.max_speed_m_s(), 0.0);
        assert_eq!(empty.force_per_area_pa(3.0), m.force_per_area_pa(3.0));
    }
}
