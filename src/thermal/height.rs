//! Temperature across the height of a vehicle fin.
//!
//! The magnets cover only a band of a vehicle fin (the active height), and a
//! pass of a second or two leaves little time for the heat to spread, so one lumped temperature
//! averages the peak away. The fin is cut into [`HEIGHT_CELLS`] equal cells across its height;
//! heat flows between them by conduction (1-D, along the height; the thickness is thin and
//! isothermal, the length along the track is heated evenly since every part of a vehicle fin
//! passes every magnet) and leaves both faces by Newton cooling with the same film coefficient
//! everywhere. The edges are adiabatic (the root's contact with the vehicle is neglected, which
//! keeps the peak conservative).
//!
//! The semi-discrete finite-volume system dθ/dt = α·D₂θ − θ/τ + q, with D₂ the second difference
//! with zero-flux ends, is diagonalised by the cosines φ_k(j) = cos(kπ(j + ½)/N) with eigenvalues
//! λ_k = (2α/Δz²)(1 − cos(kπ/N)) (the DCT-II basis of the Neumann second difference: Strang, "The
//! discrete cosine transform", SIAM Review 41, 1999, §2). Uniform face cooling only adds 1/τ to
//! every rate, so each mode is integrated exactly over a step of constant source:
//! a_k ← a_k·e^(−μ_k·Δt) + s_k·(1 − e^(−μ_k·Δt))/μ_k with μ_k = λ_k + 1/τ. Mode 0 is the lumped
//! mean: it rises by exactly E/(m·c_p), so the first law holds to rounding.
//!
//! The fin's thermal conductivity is not a scenario input; it is taken from its electrical
//! conductivity by the Wiedemann–Franz law k = L·σ·T with the Sommerfeld value of the Lorenz
//! number (Kittel, Introduction to Solid State Physics, 8th ed. 2005, ch. 6). For aluminium
//! alloys and copper at room temperature this is within about 10 % of handbook values (6061-T6:
//! 2.44e-8 · 25 MS/m · 293 K = 179 W/(m·K) vs 167; common practice).

/// Cells across the height of a vehicle fin (5 mm cells on a 180 mm fin).
pub const HEIGHT_CELLS: usize = 36;

/// Sommerfeld value of the Lorenz number π²k_B²/(3e²), W·Ω/K² (Kittel 2005, ch. 6).
pub const LORENZ_W_OHM_K2: f64 = 2.443e-8;

/// Temperature of the Wiedemann–Franz estimate, K (20 °C, where σ is given).
const WF_TEMPERATURE_K: f64 = 293.15;

/// Thermal diffusivity k/(ρ·c_p) of a fin material from its electrical conductivity at 20 °C by
/// the Wiedemann–Franz law, m²/s.
pub fn diffusivity_m2_s(material: &crate::materials::Material) -> f64 {
    let k = LORENZ_W_OHM_K2 * material.conductivity_s_m * WF_TEMPERATURE_K;
    k / (material.density_kg_m3 * material.specific_heat_j_kg_k)
}

/// Temperatures across the height of a vehicle fin, cell 0 at one edge.
#[derive(Debug, Clone, PartialEq)]
pub struct HeightProfile {
    /// Fin height, m.
    pub height_m: f64,
    /// Thermal diffusivity, m²/s.
    pub diffusivity_m2_s: f64,
    /// Cell temperatures, °C.
    pub temps_c: Vec<f64>,
}

impl HeightProfile {
    /// A uniform profile of `n` cells.
    pub fn uniform(height_m: f64, diffusivity_m2_s: f64, n: usize, temp_c: f64) -> Self {
        Self {
            height_m,
            diffusivity_m2_s,
            temps_c: vec![temp_c; n.max(1)],
        }
    }

    /// Mean (lumped) temperature, °C.
    pub fn mean_c(&self) -> f64 {
        self.temps_c.iter().sum::<f64>() / self.temps_c.len().max(1) as f64
    }

    /// Hottest cell, °C.
    pub fn peak_c(&self) -> f64 {
        self.temps_c
            .iter()
            .copied()
            .fold(f64::NEG_INFINITY, f64::max)
    }

    /// Cell height, m.
    pub fn cell_m(&self) -> f64 {
        self.height_m / self.temps_c.len().max(1) as f64
    }
}

/// The cosine modes of a profile of `n` cells.
#[derive(Debug, Clone)]
pub struct Modes {
    n: usize,
    /// cos(kπ(j + ½)/n), row k.
    basis: Vec<f64>,
    /// The same values a cell at a time: row j holds cos(kπ(j + ½)/n) for every k.
    by_cell: Vec<f64>,
    /// 1 − cos(kπ/n).
    shape: Vec<f64>,
}

impl Modes {
    /// The modes of `n` cells.
    pub fn new(n: usize) -> Self {
        let n = n.max(1);
        let nf = n as f64;
        let mut basis = Vec::with_capacity(n * n);
        for k in 0..n {
            for j in 0..n {
                basis.push((k as f64 * std::f64::consts::PI * (j as f64 + 0.5) / nf).cos());
            }
        }
        let shape = (0..n)
            .map(|k| 1.0 - (k as f64 * std::f64::consts::PI / nf).cos())
            .collect();
        let by_cell = (0..n * n).map(|i| basis[(i % n) * n + i / n]).collect();
        Self {
            n,
            basis,
            by_cell,
            shape,
        }
    }

    /// The modes of `n` cells, built once per process for the usual [`HEIGHT_CELLS`] (every
    /// vehicle-fin pass and cooling uses them) and on the spot for other counts.
    pub fn of(n: usize) -> std::borrow::Cow<'static, Modes> {
        static USUAL: std::sync::OnceLock<Modes> = std::sync::OnceLock::new();
        if n == HEIGHT_CELLS {
            std::borrow::Cow::Borrowed(USUAL.get_or_init(|| Modes::new(HEIGHT_CELLS)))
        } else {
            std::borrow::Cow::Owned(Modes::new(n))
        }
    }

    fn project(&self, v: &[f64]) -> Vec<f64> {
        let nf = self.n as f64;
        (0..self.n)
            .map(|k| {
                let row = &self.basis[k * self.n..(k + 1) * self.n];
                let s: f64 = row.iter().zip(v).map(|(b, x)| b * x).sum();
                s * if k == 0 { 1.0 / nf } else { 2.0 / nf }
            })
            .collect()
    }

    /// Advances `profile` by `dt_s` with a constant source `source_k_s` (K/s per cell), face
    /// cooling towards `ambient_c` with time constant `tau_s` (infinite: none) and conduction.
    pub fn step(
        &self,
        profile: &mut HeightProfile,
        source_k_s: Option<&[f64]>,
        dt_s: f64,
        tau_s: f64,
        ambient_c: f64,
    ) {
        if profile.temps_c.len() != self.n || dt_s <= 0.0 {
            return;
        }
        let cool = if tau_s.is_finite() && tau_s > 0.0 {
            1.0 / tau_s
        } else {
            0.0
        };
        let base = if cool > 0.0 { ambient_c } else { 0.0 };
        let theta: Vec<f64> = profile.temps_c.iter().map(|t| t - base).collect();
        let a = self.project(&theta);
        let s = source_k_s.map(|q| self.project(q));
        let rate = rate_of(profile);
        let next: Vec<f64> = (0..self.n)
            .map(|k| {
                let mu = rate * self.shape[k] + cool;
                let x = mu * dt_s;
                let mut v = a[k] * (-x).exp();
                if let Some(s) = &s {
                    // (1 − e^(−μΔt))/μ, → Δt as μ → 0.
                    let gain = if x > 1e-12 { -(-x).exp_m1() / mu } else { dt_s };
                    v += s[k] * gain;
                }
                v
            })
            .collect();
        self.reconstruct(&next, &mut profile.temps_c);
        for t in profile.temps_c.iter_mut() {
            *t += base;
        }
    }
}

impl Modes {
    /// Advances `profile` through the `pieces` (Δt_s, share) of a pass: over each piece the
    /// source `share·rise_k[j]/Δt` K/s heats cell j (no face cooling), with conduction across
    /// the height. Works in the modal amplitudes throughout (the same exact step as
    /// [`Modes::step`], without projecting the profile again at every piece, and with the
    /// exponentials reused while Δt repeats); returns the hottest cell at the start and at the end
    /// of every piece, °C.
    pub fn deposit_pieces(
        &self,
        profile: &mut HeightProfile,
        rise_k: &[f64],
        pieces: &[(f64, f64)],
    ) -> f64 {
        let mut peak = profile.peak_c();
        if profile.temps_c.len() != self.n || rise_k.len() != self.n {
            return peak;
        }
        let mut a = self.project(&profile.temps_c);
        if rise_k.iter().all(|r| *r == 0.0) {
            // Nothing to deposit (a pass that never reached the magnets): conduction alone over
            // the pieces' whole length in one step (e^(−μT₁)e^(−μT₂) = e^(−μ(T₁+T₂))). Without
            // a source no cell rises above the hottest one (the discrete maximum principle:
            // e^(−LΔt) of the Neumann second difference is non-negative with unit row sums; from
            // memory, Varga, "Matrix Iterative Analysis", 2000, §8.2), so the peak stands. A
            // run to the time limit is then one step, not one per sample.
            let span: f64 = pieces.iter().map(|p| p.0).filter(|dt| *dt > 0.0).sum();
            if span > 0.0 && span.is_finite() {
                let (mut decay, mut gain) = (vec![1.0; self.n], vec![0.0; self.n]);
                decays_and_gains(&self.shape, rate_of(profile), span, &mut decay, &mut gain);
                for (ak, e) in a.iter_mut().zip(&decay) {
                    *ak *= e;
                }
                self.reconstruct(&a, &mut profile.temps_c);
            }
            return peak;
        }
        let src = self.project(rise_k);
        let rate = rate_of(profile);
        let mut steps = StepCache::new(self.n);
        let mut watch = PeakWatch::new(self, &a);
        let mut moved = false;
        for &(dt, share) in pieces {
            if dt.is_nan() || dt <= 0.0 {
                continue;
            }
            let (decay, gain) = steps.factors(&self.shape, rate, dt);
            let per_s = share / dt;
            for k in 0..self.n {
                a[k] = a[k] * decay[k] + src[k] * per_s * gain[k];
            }
            peak = peak.max(watch.peak(self, &a, peak));
            moved = true;
        }
        if moved {
            self.reconstruct(&a, &mut profile.temps_c);
        }
        peak
    }

    /// The values of the cells `cells` for the modal amplitudes `a`, written into `out`: the
    /// same sums, in the same order, as [`Modes::reconstruct`] gives them (from 0, mode 0
    /// first), four cells at a time in registers along their contiguous rows of `by_cell`.
    fn cell_values(&self, a: &[f64], cells: &[usize], out: &mut Vec<f64>) {
        let n = self.n;
        let a = &a[..n.min(a.len())];
        let row = |j: usize| &self.by_cell[j * n..j * n + a.len()];
        out.clear();
        let mut quads = cells.chunks_exact(4);
        for q in quads.by_ref() {
            let (r0, r1, r2, r3) = (row(q[0]), row(q[1]), row(q[2]), row(q[3]));
            let mut t = [0.0f64; 4];
            for (k, ak) in a.iter().enumerate() {
                t[0] += ak * r0[k];
                t[1] += ak * r1[k];
                t[2] += ak * r2[k];
                t[3] += ak * r3[k];
            }
            out.extend_from_slice(&t);
        }
        for &j in quads.remainder() {
            let mut t = 0.0;
            for (ak, b) in a.iter().zip(row(j)) {
                t += ak * b;
            }
            out.push(t);
        }
    }

    /// The cell values of the modal amplitudes `a`, written into `out`: Σ_k a_k·row_k, a mode
    /// at a time, so the inner loop runs along a contiguous row with independent sums per cell.
    fn reconstruct(&self, a: &[f64], out: &mut [f64]) {
        out.fill(0.0);
        for (ak, row) in a.iter().zip(self.basis.chunks_exact(self.n)) {
            for (t, b) in out.iter_mut().zip(row) {
                *t += ak * b;
            }
        }
    }
}

/// 2α/Δz² of a profile: the rate of the Neumann second difference, per s.
fn rate_of(profile: &HeightProfile) -> f64 {
    let dz = profile.cell_m();
    2.0 * profile.diffusivity_m2_s / (dz * dz)
}

/// The decays and gains of the last three distinct step lengths: sample clocks split an
/// interval at an event now and then (Δt, Δt₁, Δt − Δt₁, Δt, …), and the regular Δt stays.
struct StepCache {
    /// (Δt, decays, gains, last use), Δt NaN while empty.
    slots: [(f64, Vec<f64>, Vec<f64>, u64); 3],
    clock: u64,
}

impl StepCache {
    fn new(n: usize) -> Self {
        let slot = || (f64::NAN, vec![1.0; n], vec![0.0; n], 0);
        Self {
            slots: [slot(), slot(), slot()],
            clock: 0,
        }
    }

    /// e^(−μ_kΔt) and (1 − e^(−μ_kΔt))/μ_k of every mode for a step of `dt`.
    fn factors(&mut self, shape: &[f64], rate: f64, dt: f64) -> (&[f64], &[f64]) {
        self.clock += 1;
        let near = self
            .slots
            .iter()
            .position(|s| (dt - s.0).abs() <= 1e-9 * dt);
        let i = match near {
            Some(i) => {
                let (last_dt, decay, gain, _) = &mut self.slots[i];
                let delta = dt - *last_dt;
                if delta != 0.0 {
                    // Δt off a cached one by rounding (sample times k·dt differ in their
                    // last bits): e^(−μ(Δt + δ)) = e^(−μΔt)(1 − μδ) and the gain grows by
                    // e^(−μΔt)·δ, both to O((μδ)²), below 1e-18 of the values here.
                    for ((s, e), g) in shape.iter().zip(decay.iter_mut()).zip(gain.iter_mut()) {
                        let mu = rate * s;
                        *g += *e * delta;
                        *e *= 1.0 - mu * delta;
                    }
                    *last_dt = dt;
                }
                i
            }
            None => {
                let i = (0..3).min_by_key(|&i| self.slots[i].3).unwrap_or(0);
                let (last_dt, decay, gain, _) = &mut self.slots[i];
                decays_and_gains(shape, rate, dt, decay, gain);
                *last_dt = dt;
                i
            }
        };
        self.slots[i].3 = self.clock;
        (&self.slots[i].1, &self.slots[i].2)
    }
}

/// e^(−μ_kΔt) and (1 − e^(−μ_kΔt))/μ_k (→ Δt as μ → 0) of every mode k over a step, with
/// μ_k = `rate`·`shape[k]`, into `decay` and `gain`. When every μ_kΔt ≤ 0.1 (a piece of a
/// few milliseconds) from their Taylor series, e^(−x) = Σ (−x)^i/i! and
/// (1 − e^(−x))/x = Σ (−x)^i/(i + 1)! summed to the first m ≤ 10 whose next term
/// x_max^(m+1)/(m+1)! is below 2⁻⁶⁰ (≈ 8.7e-19; at most 0.1¹¹/11! ≈ 2.5e-19 for m = 10), one
/// term at a time across the modes: the library's values to rounding at a fraction of the
/// cost. Else the library functions.
fn decays_and_gains(shape: &[f64], rate: f64, dt: f64, decay: &mut [f64], gain: &mut [f64]) {
    let fits = shape.iter().all(|s| (0.0..=0.1).contains(&(rate * s * dt)));
    if !fits {
        for ((s, e), g) in shape.iter().zip(decay.iter_mut()).zip(gain.iter_mut()) {
            let mu = rate * s;
            let x = mu * dt;
            *e = (-x).exp();
            *g = if x > 0.0 { -(-x).exp_m1() / mu } else { dt };
        }
        return;
    }
    // Nested from the highest term: e = 1 − x(1 − x/2(1 − x/3(…))), g = 1 − x/2(1 − x/3(…)).
    const INVERSE: [f64; 12] = [
        0.0,
        1.0,
        1.0 / 2.0,
        1.0 / 3.0,
        1.0 / 4.0,
        1.0 / 5.0,
        1.0 / 6.0,
        1.0 / 7.0,
        1.0 / 8.0,
        1.0 / 9.0,
        1.0 / 10.0,
        1.0 / 11.0,
    ];
    let x_max = shape.iter().fold(0.0f64, |m, s| m.max(rate * s * dt));
    let (mut terms, mut next) = (1, x_max * x_max / 2.0);
    while terms < 10 && next > f64::powi(2.0, -60) {
        terms += 1;
        next *= x_max / (terms + 1) as f64;
    }
    decay.fill(1.0);
    gain.fill(1.0);
    for i in (1..=terms).rev() {
        for ((s, e), g) in shape.iter().zip(decay.iter_mut()).zip(gain.iter_mut()) {
            let x = rate * s * dt;
            *e = 1.0 - x * *e * INVERSE[i];
            *g = 1.0 - x * *g * INVERSE[i + 1];
        }
    }
    for g in gain.iter_mut() {
        *g *= dt;
    }
}

/// The hottest cell of a profile stepped in modal amplitudes, without rebuilding every cell at
/// every step. Mode 0 is 1 in every cell and |cos| ≤ 1 for the others, so no cell rises by more
/// than (a_0 − a_0⁰) + D, D = Σ_{k≥1} |a_k − a_k⁰|, above its value at the last full rebuild
/// (amplitudes a⁰, cells T⁰): only cells with T⁰_j + (a_0 − a_0⁰) + D at or above the running
/// peak can beat it, and only those are summed (in the same order as a full rebuild,
/// so the peak is the same to the last bit). When more than half of the cells qualify, all
/// are rebuilt and become the new reference.
struct PeakWatch {
    base_a: Vec<f64>,
    base_t: Vec<f64>,
    candidates: Vec<usize>,
    values: Vec<f64>,
}

/// x₀ − y₀, Σ_{i≥1}|x_i − y_i| and Σ|x_i| (the last two in four running sums: bounds, the
/// order does not matter). Mode 0 is the mean (its basis row is 1 in every cell), so it moves
/// every cell alike and is kept with its sign.
fn drift_and_scale(x: &[f64], y: &[f64]) -> (f64, f64, f64) {
    let (mut d, mut s) = ([0.0; 4], [0.0; 4]);
    let mean = match (x.first(), y.first()) {
        (Some(a), Some(b)) => a - b,
        _ => 0.0,
    };
    for (cx, cy) in x.chunks(4).zip(y.chunks(4)) {
        for i in 0..cx.len().min(cy.len()) {
            d[i] += (cx[i] - cy[i]).abs();
            s[i] += cx[i].abs();
        }
    }
    // Mode 0 was summed into d[0] as |x₀ − y₀|; take it out again.
    d[0] -= mean.abs();
    (mean, d.iter().sum::<f64>().max(0.0), s.iter().sum())
}

impl PeakWatch {
    fn new(modes: &Modes, a: &[f64]) -> Self {
        let mut base_t = vec![0.0; modes.n];
        modes.reconstruct(a, &mut base_t);
        Self {
            base_a: a.to_vec(),
            base_t,
            candidates: Vec::with_capacity(modes.n),
            values: Vec::with_capacity(modes.n),
        }
    }

    /// The hottest cell for amplitudes `a` if it is above `peak`, else a value not above it.
    fn peak(&mut self, modes: &Modes, a: &[f64], peak: f64) -> f64 {
        let (mean, drift, scale) = drift_and_scale(a, &self.base_a);
        // Rounding of the sums (below 1e-15 of Σ|a|) kept well inside the margin.
        let floor = peak - mean - drift - 1e-12 * (1.0 + scale);
        self.candidates.clear();
        self.candidates
            .extend((0..modes.n).filter(|&j| self.base_t[j] >= floor));
        if 2 * self.candidates.len() > modes.n {
            modes.reconstruct(a, &mut self.base_t);
            self.base_a.copy_from_slice(a);
            return self
                .base_t
                .iter()
                .copied()
                .fold(f64::NEG_INFINITY, f64::max);
        }
        modes.cell_values(a, &self.candidates, &mut self.values);
        self.values
            .iter()
            .copied()
            .fold(f64::NEG_INFINITY, f64::max)
    }
}

/// Shares of a deposit across the cells of a profile for a loss density `density(z)` (any
/// scale, z from cell 0's edge; weights sum to 1; even when the density is nowhere positive).
pub fn height_weights(profile: &HeightProfile, density: &dyn Fn(f64) -> f64) -> Vec<f64> {
    let n = profile.temps_c.len();
    let dz = profile.cell_m();
    // Midpoint rule on 16 sub-cells per cell.
    const SUB: usize = 16;
    let raw: Vec<f64> = (0..n)
        .map(|j| {
            (0..SUB)
                .map(|i| density((j as f64 + (i as f64 + 0.5) / SUB as f64) * dz).max(0.0))
                .sum::<f64>()
        })
        .collect();
    let total: f64 = raw.iter().sum();
    if total > 0.0 && total.is_finite() {
        raw.iter().map(|w| w / total).collect()
    } else {
        vec![1.0 / n as f64; n]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// An independent reference: explicit forward-Euler finite differences on a fine grid
    /// (m sub-cells per cell, time step a fifth of the stability limit Δz²/(2α)), the same
    /// band deposit and face cooling (Incropera & DeWitt, Fundamentals of Heat and Mass
    /// Transfer, 2007, §5.10: explicit finite-difference form of the heat equation).
    #[allow(clippy::too_many_arguments)] // the reference takes the whole problem
    fn explicit_fd(
        h: f64,
        alpha: f64,
        cells: usize,
        m: usize,
        band_m: f64,
        rise_rate_k_s: f64,
        heat_s: f64,
        total_s: f64,
        tau_s: f64,
    ) -> Vec<f64> {
        let nf = cells * m;
        let dz = h / nf as f64;
        let dt = 0.2 * dz * dz / (2.0 * alpha);
        let steps = (total_s / dt).ceil() as usize;
        let dt = total_s / steps as f64;
        // Source per fine cell: the band's mean rate rise_rate·h/band inside the band.
        let q: Vec<f64> = (0..nf)
            .map(|i| {
                let z0 = i as f64 * dz;
                let inside = (band_m.min(z0 + dz) - z0).max(0.0) / dz;
                inside * rise_rate_k_s * h / band_m
            })
            .collect();
        let mut t = vec![0.0; nf];
        for step in 0..steps {
            let on = (step as f64 + 0.5) * dt < heat_s;
            let old = t.clone();
            for i in 0..nf {
                let l = old[i.saturating_sub(1)];
                let r = old[(i + 1).min(nf - 1)];
                let lap = (l - 2.0 * old[i] + r) / (dz * dz);
                t[i] = old[i] + dt * (alpha * lap - old[i] / tau_s + if on { q[i] } else { 0.0 });
            }
        }
        (0..cells)
            .map(|j| t[j * m..(j + 1) * m].iter().sum::<f64>() / m as f64)
            .collect()
    }

    fn model(
        h: f64,
        alpha: f64,
        band_m: f64,
        rise_rate_k_s: f64,
        heat_s: f64,
        total_s: f64,
        tau_s: f64,
    ) -> (HeightProfile, f64) {
        let modes = Modes::new(HEIGHT_CELLS);
        let mut p = HeightProfile::uniform(h, alpha, HEIGHT_CELLS, 0.0);
        let w = height_weights(&p, &|z| if z < band_m { 1.0 } else { 0.0 });
        let q: Vec<f64> = w
            .iter()
            .map(|w| w * rise_rate_k_s * HEIGHT_CELLS as f64)
            .collect();
        let mut peak: f64 = 0.0;
        let n = 30;
        for _ in 0..n {
            modes.step(&mut p, Some(&q), heat_s / n as f64, tau_s, 0.0);
            peak = peak.max(p.peak_c());
        }
        modes.step(&mut p, None, total_s - heat_s, tau_s, 0.0);
        (p, peak)
    }

    #[test]
    fn matches_explicit_finite_differences() {
        // 180 mm aluminium fin, 150 mm band, 40 K rise of the mean over 1.3 s, then 20 s of
        // conduction with cooling (τ = 400 s). Fine grid 5× finer; tolerances: the peak to 0.2 K
        // (0.5 % of the rise), every cell to 1 K (2.5 %: the 5 mm cells smear the step at the band's
        // edge, an O(Δz²) difference of the two discretisations), 0.2 K after 20 s.
        let (h, band, alpha) = (0.18, 0.15, 6.9e-5);
        let (rate, heat_s, total_s, tau) = (40.0 / 1.3, 1.3, 21.3, 400.0);
        let fd_hot = explicit_fd(h, alpha, HEIGHT_CELLS, 5, band, rate, heat_s, heat_s, tau);
        let (p_hot, _) = model(h, alpha, band, rate, heat_s, heat_s, tau);
        let worst = |a: &[f64], b: &[f64]| {
            a.iter()
                .zip(b)
                .map(|(x, y)| (x - y).abs())
                .fold(0.0, f64::max)
        };
        let peak_fd = fd_hot.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        eprintln!(
            "end of heating: peak {} vs {peak_fd}, worst cell {}",
            p_hot.peak_c(),
            worst(&p_hot.temps_c, &fd_hot)
        );
        assert!((p_hot.peak_c() - peak_fd).abs() < 0.2);
        assert!(worst(&p_hot.temps_c, &fd_hot) < 1.0);
        // Right after the pass the band is hotter than the lumped mean by about h/band.
        assert!(p_hot.peak_c() > 1.15 * p_hot.mean_c(), "{}", p_hot.peak_c());
        let fd = explicit_fd(h, alpha, HEIGHT_CELLS, 5, band, rate, heat_s, total_s, tau);
        let (p, _) = model(h, alpha, band, rate, heat_s, total_s, tau);
        eprintln!("after 20 s: worst cell {}", worst(&p.temps_c, &fd));
        assert!(worst(&p.temps_c, &fd) < 0.2);
    }

    #[test]
    fn mean_keeps_the_lumped_energy_balance() {
        // First law: with no cooling the mean rises by E/(m·c_p) = rate·t exactly; with cooling
        // the mean follows Newton's law e^(−t/τ) after the heating (uniform film coefficient).
        let (p, _) = model(0.18, 6.9e-5, 0.15, 10.0, 2.0, 2.0, f64::INFINITY);
        assert!((p.mean_c() - 20.0).abs() < 1e-10, "{}", p.mean_c());
        let (p0, _) = model(0.18, 6.9e-5, 0.15, 10.0, 2.0, 2.0, 300.0);
        let (p1, _) = model(0.18, 6.9e-5, 0.15, 10.0, 2.0, 302.0, 300.0);
        assert!((p1.mean_c() - p0.mean_c() * (-1.0f64).exp()).abs() < 1e-9);
        // Long after the pass the profile is uniform: the lumped value.
        let (p2, _) = model(0.18, 6.9e-5, 0.15, 10.0, 2.0, 2000.0, f64::INFINITY);
        assert!((p2.peak_c() - 20.0).abs() < 1e-6);
    }

    #[test]
    fn wiedemann_franz_is_near_handbook_values() {
        // 6061-T6: k = 167 W/(m·K) (ASM Handbook vol. 2, 1990); estimate within 10 %.
        let m = crate::materials::Material {
            name: "test".into(),
            conductivity_s_m: 25e6,
            temp_coeff_per_k: 0.004,
            density_kg_m3: 2700.0,
            specific_heat_j_kg_k: 896.0,
            source: String::new(),
            softening_c: None,
            solidus_c: None,
        };
        let k = diffusivity_m2_s(&m) * 2700.0 * 896.0;
        assert!((k / 167.0 - 1.0).abs() < 0.1, "{k}");
    }

    /// The modal deposit is the step applied piece by piece (same exact solution; the profile
    /// is only not re-projected between pieces): equal to 1e-9 K on a profile with a hot band,
    /// uneven pieces and a repeated Δt; the hottest cell over the pieces too.
    #[test]
    fn modal_deposit_equals_stepping_piece_by_piece() {
        let n = 24;
        let modes = Modes::new(n);
        let mut a = HeightProfile::uniform(0.18, 6.8e-5, n, 30.0);
        for (j, t) in a.temps_c.iter_mut().enumerate() {
            *t += if (8..16).contains(&j) { 20.0 } else { 0.0 };
        }
        let mut b = a.clone();
        let rise: Vec<f64> = (0..n).map(|j| 1.0 + (j as f64 * 0.3).sin().abs()).collect();
        let pieces = [
            (0.005, 0.1),
            (0.005, 0.3),
            (0.02, 0.2),
            (0.0, 0.0),
            (0.005, 0.4),
            (3.0, 0.0),
        ];
        let peak = modes.deposit_pieces(&mut a, &rise, &pieces);
        let mut peak_b = b.peak_c();
        for &(dt, share) in &pieces {
            if dt > 0.0 {
                let q: Vec<f64> = rise.iter().map(|r| r * share / dt).collect();
                modes.step(&mut b, Some(&q), dt, f64::INFINITY, 0.0);
            }
            peak_b = peak_b.max(b.peak_c());
        }
        for (x, y) in a.temps_c.iter().zip(&b.temps_c) {
            assert!((x - y).abs() < 1e-9, "{x} vs {y}");
        }
        assert!((peak - peak_b).abs() < 1e-9);
    }

    /// Pieces from a 1 ms sample clock (Δt = t_(k+1) − t_k differs from piece to piece in its
    /// last bits, which the deposit takes up without new exponentials): 3 000 pieces against the
    /// exact step applied piece by piece, to 1e-9 K at every cell and for the hottest cell.
    #[test]
    fn modal_deposit_on_a_sample_clock() {
        let n = HEIGHT_CELLS;
        let modes = Modes::new(n);
        let mut a = HeightProfile::uniform(0.2, 6.8e-5, n, 25.0);
        let mut b = a.clone();
        let rise: Vec<f64> = (0..n)
            .map(|j| if (10..20).contains(&j) { 30.0 } else { 2.0 })
            .collect();
        let times: Vec<f64> = (0..=3000).map(|k| f64::from(k) * 1e-3).collect();
        let pieces: Vec<(f64, f64)> = times
            .windows(2)
            .enumerate()
            .map(|(i, w)| (w[1] - w[0], (1.0 + (i as f64 * 0.01).sin()) / 3000.0))
            .collect();
        assert!(
            pieces.iter().any(|p| p.0 != pieces[0].0),
            "the clock's Δt must vary"
        );
        let peak = modes.deposit_pieces(&mut a, &rise, &pieces);
        let mut peak_b = b.peak_c();
        for &(dt, share) in &pieces {
            let q: Vec<f64> = rise.iter().map(|r| r * share / dt).collect();
            modes.step(&mut b, Some(&q), dt, f64::INFINITY, 0.0);
            peak_b = peak_b.max(b.peak_c());
        }
        for (x, y) in a.temps_c.iter().zip(&b.temps_c) {
            assert!((x - y).abs() < 1e-9, "{x} vs {y}");
        }
        assert!((peak - peak_b).abs() < 1e-9, "{peak} vs {peak_b}");
    }

    /// The watched peak equals, to the last bit, the hottest cell of a full rebuild at every
    /// step, on 4 000 steps of amplitudes that drift, jump and heat a band (brute force).
    #[test]
    fn watched_peak_is_the_full_rebuild_peak() {
        let n = HEIGHT_CELLS;
        let modes = Modes::new(n);
        let mut a: Vec<f64> = (0..n).map(|k| 40.0 / (1.0 + k as f64)).collect();
        a[0] = 30.0;
        let mut watch = PeakWatch::new(&modes, &a);
        let mut full = vec![0.0; n];
        modes.reconstruct(&a, &mut full);
        let mut peak = full.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let mut brute = peak;
        let mut rebuilt = 0;
        for step in 0..4000 {
            let s = f64::from(step);
            for (k, x) in a.iter_mut().enumerate() {
                let kf = k as f64;
                *x = *x * (1.0 - 1e-4 * kf) + 1e-3 * (s * 0.01 + kf).sin();
            }
            if step % 997 == 0 {
                a[3] += 5.0;
            }
            peak = peak.max(watch.peak(&modes, &a, peak));
            modes.reconstruct(&a, &mut full);
            brute = brute.max(full.iter().copied().fold(f64::NEG_INFINITY, f64::max));
            assert_eq!(peak.to_bits(), brute.to_bits(), "step {step}");
            if watch.base_a == a {
                rebuilt += 1;
            }
        }
        assert!(rebuilt < 4000, "some steps must be watched, not rebuilt");
    }

    /// Without a source the pieces are one conduction step: equal to stepping them one by one
    /// (1e-9 K, as the other deposit tests; the step-by-step reference re-projects 20 000 times
    /// and drifts by ~2e-11 K) on a profile with a hot band over 20 000 uneven pieces, and the peak is the
    /// starting one (the maximum principle).
    #[test]
    fn no_source_is_one_conduction_step() {
        let n = HEIGHT_CELLS;
        let modes = Modes::new(n);
        let mut a = HeightProfile::uniform(0.18, 9.7e-5, n, 25.0);
        for (j, t) in a.temps_c.iter_mut().enumerate() {
            *t += if (10..20).contains(&j) { 40.0 } else { 0.0 };
        }
        let mut b = a.clone();
        let start_peak = a.peak_c();
        let pieces: Vec<(f64, f64)> = (0..20_000)
            .map(|i| (if i % 3 == 0 { 0.002 } else { 0.005 }, 1e-3))
            .collect();
        let peak = modes.deposit_pieces(&mut a, &vec![0.0; n], &pieces);
        assert_eq!(peak, start_peak);
        let zero = vec![0.0; n];
        for &(dt, _) in &pieces {
            modes.step(&mut b, Some(&zero), dt, f64::INFINITY, 0.0);
        }
        for (x, y) in a.temps_c.iter().zip(&b.temps_c) {
            assert!((x - y).abs() < 1e-9, "{x} vs {y}");
        }
        // Conduction moved heat: the band is cooler than at the start.
        assert!(a.peak_c() < start_peak - 1.0, "{}", a.peak_c());
    }

    /// The gathered cells are the full rebuild's values to the last bit, for subsets of every
    /// size (the four-at-a-time path and its remainder), in any order.
    #[test]
    fn cell_values_are_the_rebuild_values() {
        let n = HEIGHT_CELLS;
        let modes = Modes::new(n);
        let a: Vec<f64> = (0..n)
            .map(|k| (k as f64 * 0.7).sin() * 30.0 / (1.0 + k as f64))
            .collect();
        let mut full = vec![0.0; n];
        modes.reconstruct(&a, &mut full);
        let mut out = Vec::new();
        for size in 0..=n {
            let cells: Vec<usize> = (0..size).map(|i| (i * 7 + size) % n).collect();
            modes.cell_values(&a, &cells, &mut out);
            assert_eq!(out.len(), size);
            for (v, &j) in out.iter().zip(&cells) {
                assert_eq!(v.to_bits(), full[j].to_bits(), "size {size}, cell {j}");
            }
        }
    }

    /// The series of a short step against the library's exp and exp_m1 (the definition), to
    /// 1e-15 relative, over μΔt from 0 to the series' limit 0.1 and beyond it.
    #[test]
    fn decay_and_gain_match_the_library() {
        for i in 0..=400 {
            let x = f64::from(i) * 5e-4;
            let (mu, dt) = (if x == 0.0 { 0.0 } else { x / 1e-3 }, 1e-3);
            let (mut e, mut g) = ([0.0], [0.0]);
            decays_and_gains(&[1.0], mu, dt, &mut e, &mut g);
            let (e, g) = (e[0], g[0]);
            let e_ref = (-x).exp();
            let g_ref = if x > 0.0 { -(-x).exp_m1() / mu } else { dt };
            assert!(
                (e - e_ref).abs() <= 1e-15 * e_ref,
                "x = {x}: {e} vs {e_ref}"
            );
            assert!(
                (g - g_ref).abs() <= 1e-15 * g_ref,
                "x = {x}: {g} vs {g_ref}"
            );
        }
    }
}
