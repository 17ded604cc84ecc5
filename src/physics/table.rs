//! Fast interpolant of the drag law for the equations of motion.
//!
//! The drag per area is f(v) = v·g(v) with g = f/v even and analytic in v on the real axis (every
//! harmonic is a function of v² there; [`super::layer`], [`super::edge`]); its singularities
//! lie off the real axis at a distance of the order of the critical speed v_c. The table holds
//! g, so that its error is relative to f at every speed, including v → 0.
//!
//! - **Master series.** The range 0 … V is cut into a first panel [0, v₀] (v₀ = V/2^J ≤ v_c)
//!   and octaves [2^(q−1)·v₀, 2^q·v₀]. Seen from an octave, the singularities near ±i·v_c lie
//!   at least as far away as the octave is long, so a Chebyshev series converges geometrically
//!   there (Trefethen, *Approximation Theory and Approximation Practice*, 2013, Thm 8.2). Each
//!   panel interpolates the model at 17 Chebyshev–Lobatto points, refined to 33 and 65 (the
//!   points nest) until its last two coefficients fall below 1e-11 of the smallest |g| on the
//!   panel: a few dozen model evaluations for the whole table.
//! - **Evaluation grid.** Each panel is split into S equal intervals (S = 4, 8, … 64, doubled
//!   until every interval passes its check), each holding the degree-5 polynomial in x ∈ [−1, 1]
//!   that interpolates the master series at six Chebyshev–Lobatto points (the interval ends are
//!   shared with the neighbours, so the table is continuous). Checked against the master series
//!   between the outer nodes, where the interpolation error peaks, to 2e-10 relative. An
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
//! scale with σ·v and Br² as the drag does.

use super::chebyshev::{clenshaw, coefficients, lobatto_point, to_monomial};
use super::layer::DragModel;
use super::offset::OffsetModel;

/// Degree of the interval polynomials.
const DEGREE: usize = 5;

/// Coefficients per interval.
const TERMS: usize = DEGREE + 1;

/// Master panels stop refining at this many Chebyshev intervals (65 points).
const MAX_MASTER_DEGREE: usize = 64;

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

/// g = f/v of the model at speed v ≥ 0, Pa·s/m (the low-speed coefficient at v = 0).
fn model_g(model: &DragModel, speed_m_s: f64) -> f64 {
    if speed_m_s > 0.0 {
        model.force_per_area_pa(speed_m_s) / speed_m_s
    } else {
        model.low_speed_coefficient_pa_s_m()
    }
}

/// The master series of one panel [lo, hi]: Chebyshev coefficients in x = (2v − lo − hi)/(hi − lo),
/// or `None` if 65 points do not reach the tolerance.
fn master_panel(g: &dyn Fn(f64) -> f64, lo: f64, hi: f64) -> Option<Vec<f64>> {
    let (mid, half) = (0.5 * (lo + hi), 0.5 * (hi - lo));
    let at = |j: usize, n: usize| g(mid + half * lobatto_point(j, n));
    let mut n = 16;
    let mut values: Vec<f64> = (0..=n).map(|j| at(j, n)).collect();
    loop {
        let c = coefficients(&values);
        let smallest = values.iter().map(|g| g.abs()).fold(f64::INFINITY, f64::min);
        let tail = c[n].abs().max(c[n - 1].abs());
        if !(tail.is_finite() && smallest.is_finite()) {
            return None;
        }
        if tail <= MASTER_TOLERANCE * smallest {
            return Some(c);
        }
        if n >= MAX_MASTER_DEGREE {
            return None;
        }
        // The points of 2N: the old ones at even indices, new ones between.
        let m = 2 * n;
        values = (0..=m)
            .map(|j| if j % 2 == 0 { values[j / 2] } else { at(j, m) })
            .collect();
        n = m;
    }
}

/// The interval polynomials of one panel [lo, hi] with `s` intervals from its master series, or
/// `None` if one misses the grid tolerance.
fn panel_grid(series: &[f64], lo: f64, hi: f64, s: usize) -> Option<Vec<[f64; TERMS]>> {
    let (mid, half) = (0.5 * (lo + hi), 0.5 * (hi - lo));
    // The master series at speed v (its panel variable is (v − mid)/half).
    let master = |v: f64| clenshaw(series, (v - mid) / half);
    let width = (hi - lo) / s as f64;
    // Between the first two and the last two nodes.
    let probe = 0.5 * (1.0 + lobatto_point(1, DEGREE));
    let mut out = Vec::with_capacity(s);
    let mut left = master(lo);
    for i in 0..s {
        let (a, b) = (lo + i as f64 * width, lo + (i + 1) as f64 * width);
        let (c, w) = (0.5 * (a + b), 0.5 * width);
        let right = master(b);
        // Values at x_j = cos(jπ/5): x_0 = 1 is the right end, x_5 = −1 the left.
        let mut values = [0.0; TERMS];
        for (j, v) in values.iter_mut().enumerate() {
            *v = match j {
                0 => right,
                DEGREE => left,
                _ => master(c + w * lobatto_point(j, DEGREE)),
            };
        }
        let cheb: [f64; TERMS] = coefficients(&values).try_into().ok()?;
        let poly = to_monomial(&cheb);
        for x in [probe, -probe] {
            let want = master(c + w * x);
            let got = horner(&poly, x);
            let ok = (got - want).abs() <= GRID_TOLERANCE * want.abs();
            if !ok {
                return None;
            }
        }
        out.push(poly);
        left = right;
    }
    Some(out)
}

/// Σ aᵢ xⁱ.
#[inline(always)]
fn horner(a: &[f64; TERMS], x: f64) -> f64 {
    let mut p = a[TERMS - 1];
    for &ai in a.iter().rev().skip(1) {
        p = p * x + ai;
    }
    p
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
        Self::tabulate(model, None, max_speed_m_s, &|v| model_g(model, v))
    }

    /// Tabulates the drag of the off-centre model `offset` from 0 to `max_speed_m_s` (m/s) as
    /// [`ForceTable::build`] does the centred one; its exact model beyond the range is `offset`.
    pub fn build_offset(offset: &OffsetModel, max_speed_m_s: f64) -> Self {
        let g = |v: f64| {
            if v > 0.0 {
                offset.drag_per_area_pa(v) / v
            } else {
                offset.low_speed_drag_pa_s_m()
            }
        };
        Self::tabulate(offset.model(), Some(offset.clone()), max_speed_m_s, &g)
    }

    /// The table of `g` (= f/v of the law, or f_y/v² for a [`LateralTable`]) with the panels
    /// laid out from the critical speed of `model`.
    fn tabulate(
        model: &DragModel,
        offset: Option<OffsetModel>,
        max_speed_m_s: f64,
        g: &dyn Fn(f64) -> f64,
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
        let mut masters = Vec::new();
        for q in 0..=octaves {
            let (lo, hi) = bounds(q);
            match master_panel(g, lo, hi) {
                Some(series) => masters.push((lo, hi, series)),
                None => break,
            }
        }
        'bits: for bits in GRID_BITS {
            let s = 1usize << bits;
            let mut grid = Vec::with_capacity(s * masters.len());
            for (lo, hi, series) in &masters {
                match panel_grid(series, *lo, *hi, s) {
                    Some(part) => grid.extend(part),
                    None => continue 'bits,
                }
            }
            table.grid_bits = bits;
            table.coefficients = grid;
            table.panel_scale_s_m = masters
                .iter()
                .map(|(lo, hi, _)| 2.0 * s as f64 / (hi - lo))
                .collect();
            table.max_speed_m_s = masters.last().map_or(0.0, |m| m.1);
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
        let g = |v: f64| {
            if v > 0.0 {
                offset.lateral_per_area_pa(v) / (v * v)
            } else {
                offset.low_speed_lateral_pa_s2_m2()
            }
        };
        Self {
            grid: ForceTable::tabulate(offset.model(), None, max_speed_m_s, &g),
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
