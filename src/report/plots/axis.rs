//! One chart axis: its range (from data with margins, or given), its tick positions and the
//! text of its tick labels, and the mapping from data values to pixels for plotters.
//!
//! Linear ticks are "nice numbers" 1, 2 or 5 × 10ᵏ, after P. S. Heckbert, "Nice numbers for
//! graph labels", in *Graphics Gems* (A. S. Glassner, ed.), Academic Press, 1990, pp. 61–63.
//! Logarithmic ticks are whole decades, or 1-2-5 multiples when the range spans less than two
//! decades (common practice in plotting libraries).

use std::ops::Range;

use plotters::coord::ranged1d::{DefaultFormatting, KeyPointHint, KeyPointWeight, Ranged};

use super::PlotError;

/// Largest magnitude any axis end may take; data beyond it are clamped before use so that
/// spans and margins stay finite.
pub(crate) const MAX_MAGNITUDE: f64 = 1e300;
/// Smallest positive value a logarithmic axis may start at.
const MIN_LOG_VALUE: f64 = 1e-300;
/// Fraction of the data span added on each side when the range comes from data.
const MARGIN_FRACTION: f64 = 0.05;
/// Upper bound on the number of tick positions, a guard against numerically degenerate spans.
const MAX_TICKS: usize = 200;

/// Which axis, for error messages.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Which {
    X,
    Y,
}

impl Which {
    fn name(self) -> &'static str {
        match self {
            Which::X => "x",
            Which::Y => "y",
        }
    }
}

/// How tick labels are written.
#[derive(Debug, Clone, Copy, PartialEq)]
enum TickFormat {
    /// Fixed-point with this many decimals.
    Fixed(usize),
    /// Scientific with this many mantissa decimals.
    Scientific(usize),
    /// Logarithmic axis: each label is written with the decimals it needs.
    Log,
}

/// A prepared axis: range, ticks and label format.
#[derive(Debug, Clone)]
pub(crate) struct Axis {
    lo: f64,
    hi: f64,
    log: bool,
    major: Vec<f64>,
    minor: Vec<f64>,
    format: TickFormat,
}

impl Axis {
    /// Builds an axis. `explicit` is the caller's range (validated here); otherwise the range is
    /// the extent of `values` with margins. `target_ticks` is the wished number of major ticks.
    pub(crate) fn new(
        which: Which,
        explicit: Option<(f64, f64)>,
        values: &[f64],
        log: bool,
        target_ticks: usize,
    ) -> Result<Axis, PlotError> {
        let (lo, hi) = match explicit {
            Some((from, to)) => validate_range(which, from, to, log)?,
            None => padded_range(extent(values, log), log),
        };
        let target = target_ticks.clamp(2, 12);
        let (major, minor, format) = if log {
            let (major, minor) = log_ticks(lo, hi, target);
            (major, minor, TickFormat::Log)
        } else {
            let (major, step) = linear_ticks(lo, hi, target);
            (major, Vec::new(), linear_format(lo, hi, step))
        };
        Ok(Axis {
            lo,
            hi,
            log,
            major,
            minor,
            format,
        })
    }

    /// The axis range (data units), low end first.
    pub(crate) fn bounds(&self) -> (f64, f64) {
        (self.lo, self.hi)
    }

    /// The major tick positions (data units).
    pub(crate) fn major_ticks(&self) -> &[f64] {
        &self.major
    }

    /// Data value → axis space (log10 for a logarithmic axis). Non-positive values on a log axis
    /// give NaN, which callers treat as "not drawable".
    pub(crate) fn value_to_axis_space(&self, v: f64) -> f64 {
        if self.log {
            if v > 0.0 {
                v.log10()
            } else {
                f64::NAN
            }
        } else {
            v.clamp(-MAX_MAGNITUDE, MAX_MAGNITUDE)
        }
    }

    /// Axis space → data value (inverse of [`Axis::value_to_axis_space`]).
    pub(crate) fn axis_space_to_value(&self, u: f64) -> f64 {
        if self.log {
            10f64.powf(u)
        } else {
            u
        }
    }

    /// Axis range in axis space.
    pub(crate) fn axis_space_bounds(&self) -> (f64, f64) {
        (
            self.value_to_axis_space(self.lo),
            self.value_to_axis_space(self.hi),
        )
    }

    /// Text of the tick label at `v`.
    pub(crate) fn format_tick(&self, v: f64) -> String {
        let v = if v == 0.0 { 0.0 } else { v }; // no "-0"
        let text = match self.format {
            TickFormat::Fixed(decimals) => format!("{v:.decimals$}"),
            TickFormat::Scientific(_) if v == 0.0 => "0".to_string(),
            TickFormat::Scientific(decimals) => format!("{v:.decimals$e}"),
            TickFormat::Log => format_log_value(v),
        };
        if text.starts_with('-') && text[1..].chars().all(|c| c == '0' || c == '.') {
            text[1..].to_string()
        } else {
            text
        }
    }
}

impl Ranged for Axis {
    type FormatOption = DefaultFormatting;
    type ValueType = f64;

    fn map(&self, value: &f64, limit: (i32, i32)) -> i32 {
        let (u0, u1) = self.axis_space_bounds();
        let u = self.value_to_axis_space(*value);
        let t = (u - u0) / (u1 - u0);
        let t = if t.is_nan() { 0.0 } else { t.clamp(-1e4, 1e4) };
        let px = f64::from(limit.0) + t * (f64::from(limit.1) - f64::from(limit.0));
        // Saturating conversion; `t` is bounded so the value is far inside i32.
        px.round() as i32
    }

    fn key_points<Hint: KeyPointHint>(&self, hint: Hint) -> Vec<f64> {
        match hint.weight() {
            KeyPointWeight::Bold => self.major.clone(),
            KeyPointWeight::Any => {
                let mut all = self.major.clone();
                all.extend_from_slice(&self.minor);
                all
            }
        }
    }

    fn range(&self) -> Range<f64> {
        self.lo..self.hi
    }
}

fn validate_range(which: Which, from: f64, to: f64, log: bool) -> Result<(f64, f64), PlotError> {
    let bad = |reason: &'static str| PlotError::InvalidRange {
        axis: which.name(),
        from,
        to,
        reason,
    };
    if !from.is_finite() || !to.is_finite() {
        return Err(bad("both ends must be finite"));
    }
    if from >= to {
        return Err(bad("the first end must be below the second"));
    }
    if from.abs() > MAX_MAGNITUDE || to.abs() > MAX_MAGNITUDE {
        return Err(bad("the ends must lie within ±1e300"));
    }
    if log && from < MIN_LOG_VALUE {
        return Err(bad("a logarithmic axis needs a positive range"));
    }
    if !log && (to - from) <= 1e-9 * from.abs().max(to.abs()) {
        return Err(bad("the span is too small to resolve in f64"));
    }
    Ok((from, to))
}

/// Low and high of the drawable values (finite; positive on a log axis), clamped to ±1e300.
fn extent(values: &[f64], log: bool) -> Option<(f64, f64)> {
    let mut acc: Option<(f64, f64)> = None;
    for &v in values {
        if !v.is_finite() || (log && v <= 0.0) {
            continue;
        }
        let v = if log {
            v.clamp(MIN_LOG_VALUE, MAX_MAGNITUDE)
        } else {
            v.clamp(-MAX_MAGNITUDE, MAX_MAGNITUDE)
        };
        acc = Some(match acc {
            None => (v, v),
            Some((a, b)) => (a.min(v), b.max(v)),
        });
    }
    acc
}

/// Range from the data extent: a margin of 5 % of the span on each side; a range that starts
/// (ends) at or above (below) zero is not pushed across zero; an empty or zero-width extent is
/// widened so the axis still has a span.
fn padded_range(extent: Option<(f64, f64)>, log: bool) -> (f64, f64) {
    if log {
        let (a, b) = extent.unwrap_or((1.0, 10.0));
        let (la, lb) = (a.log10(), b.log10());
        let pad = if lb - la <= 1e-9 {
            2f64.log10()
        } else {
            MARGIN_FRACTION * (lb - la)
        };
        (
            10f64.powf(la - pad).max(MIN_LOG_VALUE),
            10f64.powf(lb + pad).min(MAX_MAGNITUDE),
        )
    } else {
        let (a, b) = match extent {
            None => return (0.0, 1.0),
            Some(e) => e,
        };
        let scale = a.abs().max(b.abs());
        if b - a <= 1e-9 * scale {
            let half = if scale == 0.0 { 1.0 } else { 0.1 * scale };
            return (a - half, b + half);
        }
        let pad = MARGIN_FRACTION * b - MARGIN_FRACTION * a;
        let mut lo = a - pad;
        let mut hi = b + pad;
        if a >= 0.0 && lo < 0.0 {
            lo = 0.0;
        }
        if b <= 0.0 && hi > 0.0 {
            hi = 0.0;
        }
        (lo, hi)
    }
}

/// Heckbert's nice number: the 1, 2, 5 or 10 × 10ᵏ closest to `x` (rounded), `x` > 0.
fn nice_step(x: f64) -> f64 {
    let exponent = x.log10().floor();
    let magnitude = 10f64.powf(exponent);
    let fraction = x / magnitude;
    let nice = if fraction < 1.5 {
        1.0
    } else if fraction < 3.0 {
        2.0
    } else if fraction < 7.0 {
        5.0
    } else {
        10.0
    };
    nice * magnitude
}

/// Major ticks of a linear axis and their step.
fn linear_ticks(lo: f64, hi: f64, target: usize) -> (Vec<f64>, f64) {
    let span = hi - lo;
    let step = nice_step(span / target as f64);
    if !(step.is_finite() && step > 0.0) {
        return (vec![lo, hi], span);
    }
    let first = (lo / step - 1e-9).ceil();
    let last = (hi / step + 1e-9).floor();
    if !(first.is_finite() && last.is_finite()) || last - first > MAX_TICKS as f64 {
        return (vec![lo, hi], span);
    }
    let mut ticks = Vec::new();
    let mut k = first;
    while k <= last {
        let v = k * step;
        ticks.push(if v == 0.0 { 0.0 } else { v });
        k += 1.0;
    }
    (ticks, step)
}

/// Fixed-point labels with the decimals the step needs, or scientific for very large or very
/// small magnitudes (≥ 1e6 or < 1e-3).
fn linear_format(lo: f64, hi: f64, step: f64) -> TickFormat {
    let step_exponent = step.log10().floor() as i64;
    let max_abs = lo.abs().max(hi.abs());
    if !(1e-3..1e6).contains(&max_abs) {
        let value_exponent = max_abs.log10().floor() as i64;
        TickFormat::Scientific((value_exponent - step_exponent).clamp(0, 6) as usize)
    } else {
        TickFormat::Fixed((-step_exponent).clamp(0, 12) as usize)
    }
}

/// Major and minor ticks of a logarithmic axis (base 10).
fn log_ticks(lo: f64, hi: f64, target: usize) -> (Vec<f64>, Vec<f64>) {
    let k0 = (lo.log10() - 1e-9).ceil() as i32;
    let k1 = (hi.log10() + 1e-9).floor() as i32;
    let in_range = |v: f64| v >= lo * (1.0 - 1e-9) && v <= hi * (1.0 + 1e-9);
    // d · 10^k for every decade k and mantissa d, in order, within the range.
    let multiples = |decades: std::ops::RangeInclusive<i32>, mantissas: &[i32]| -> Vec<f64> {
        decades
            .flat_map(|k| mantissas.iter().map(move |&d| f64::from(d) * 10f64.powi(k)))
            .filter(|&v| in_range(v))
            .collect()
    };
    let decades = (k1 - k0 + 1).max(0) as usize;
    let mut major = Vec::new();
    let mut minor = Vec::new();
    if decades >= 2 {
        let every = decades.div_ceil(target).max(1) as i32;
        for k in k0..=k1 {
            if (k - k0) % every == 0 {
                major.push(10f64.powi(k));
            }
        }
        if every == 1 && decades <= 12 {
            minor = multiples((k0 - 1)..=k1, &[2, 3, 4, 5, 6, 7, 8, 9]);
        }
    } else {
        let kl = lo.log10().floor() as i32;
        let kh = hi.log10().floor() as i32;
        major = multiples(kl..=kh, &[1, 2, 5]);
        if major.len() < 3 {
            major = multiples(kl..=kh, &[1, 2, 3, 4, 5, 6, 7, 8, 9]);
        }
        if major.len() < 2 {
            major = vec![lo, hi];
        }
    }
    (major, minor)
}

/// A log-axis tick value with as many decimals as it needs (plain for 1e-4 ≤ v < 1e6,
/// scientific otherwise).
fn format_log_value(v: f64) -> String {
    if !(v > 0.0 && v.is_finite()) {
        return format!("{v}");
    }
    if (1e-4..1e6).contains(&v) {
        // Digits after the point needed to show the leading significant digit, plus one more
        // when the value is not a single significant digit (e.g. 1.5).
        let lead = -(v.log10().floor() as i64);
        let mut decimals = lead.max(0) as usize;
        let rounded = format!("{v:.decimals$}");
        if rounded
            .parse::<f64>()
            .map(|r| (r - v).abs() > 1e-9 * v)
            .unwrap_or(true)
        {
            decimals += 1;
        }
        format!("{v:.decimals$}")
    } else {
        let text = format!("{v:.1e}");
        text.replace(".0e", "e")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: &[f64], b: &[f64]) -> bool {
        a.len() == b.len()
            && a.iter()
                .zip(b)
                .all(|(x, y)| (x - y).abs() <= 1e-12 * y.abs().max(1.0))
    }

    /// Heckbert (1990), "Nice numbers for graph labels": with rounding, a fraction below 1.5
    /// gives 1, below 3 gives 2, below 7 gives 5, otherwise 10 (times the power of ten).
    #[test]
    fn nice_step_follows_heckbert_rounding() {
        for (x, want) in [
            (0.23, 0.2),
            (1.4, 1.0),
            (1.6, 2.0),
            (4.0, 5.0),
            (8.0, 10.0),
            (350.0, 500.0),
        ] {
            let got = nice_step(x);
            assert!(
                (got - want).abs() <= 1e-12 * want,
                "nice({x}) = {got}, want {want}"
            );
        }
    }

    /// Heckbert's loose labelling of 0–1 with about five ticks: 0, 0.2, …, 1 (tolerance 1e-12).
    #[test]
    fn linear_ticks_of_unit_range() {
        let (ticks, step) = linear_ticks(0.0, 1.0, 5);
        assert!(close(&ticks, &[0.0, 0.2, 0.4, 0.6, 0.8, 1.0]), "{ticks:?}");
        assert!((step - 0.2).abs() < 1e-15);
        let (ticks, _) = linear_ticks(-3.0, 7.0, 5);
        assert!(close(&ticks, &[-2.0, 0.0, 2.0, 4.0, 6.0]), "{ticks:?}");
    }

    /// Decades as majors and 2…9 × 10^k as minors (the usual log grid, common practice).
    #[test]
    fn log_ticks_are_decades_with_minor_digits() {
        let (major, minor) = log_ticks(1.0, 1000.0, 10);
        assert!(close(&major, &[1.0, 10.0, 100.0, 1000.0]), "{major:?}");
        assert_eq!(minor.len(), 24);
        assert!(minor.iter().any(|&v| (v - 30.0).abs() < 1e-12));
        // Less than two decades: 1-2-5 steps, or all digits when those give too few.
        let (major, _) = log_ticks(2.0, 8.0, 10);
        assert!(
            close(&major, &[2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0]),
            "{major:?}"
        );
        let (major, _) = log_ticks(0.15, 6.0, 10);
        assert!(close(&major, &[0.2, 0.5, 1.0, 2.0, 5.0]), "{major:?}");
    }

    #[test]
    fn padded_range_keeps_the_zero_side() {
        // 5 % of the 10-unit span each side, but not below zero for non-negative data.
        assert_eq!(padded_range(Some((0.0, 10.0)), false), (0.0, 10.5));
        assert_eq!(padded_range(Some((2.0, 12.0)), false), (1.5, 12.5));
        assert_eq!(padded_range(Some((-10.0, 0.0)), false), (-10.5, 0.0));
        // Zero width: ±10 % of the value, or ±1 around zero.
        assert_eq!(padded_range(Some((5.0, 5.0)), false), (4.5, 5.5));
        assert_eq!(padded_range(Some((0.0, 0.0)), false), (-1.0, 1.0));
        // Log: 5 % of the decades each side: 1–100 → 10^-0.1 to 10^2.1.
        let (lo, hi) = padded_range(Some((1.0, 100.0)), true);
        assert!((lo - 10f64.powf(-0.1)).abs() < 1e-12 && (hi - 10f64.powf(2.1)).abs() < 1e-9);
    }

    #[test]
    fn tick_labels() {
        let a = Axis::new(Which::Y, Some((-1.0, 1.0)), &[], false, 5).expect("valid");
        let texts: Vec<String> = a.major_ticks().iter().map(|&v| a.format_tick(v)).collect();
        assert_eq!(texts, ["-1.0", "-0.5", "0.0", "0.5", "1.0"]);
        let a = Axis::new(Which::Y, Some((0.0, 3.0e6)), &[], false, 4).expect("valid");
        let texts: Vec<String> = a.major_ticks().iter().map(|&v| a.format_tick(v)).collect();
        assert_eq!(texts, ["0", "1e6", "2e6", "3e6"]);
        for (v, want) in [
            (0.002, "0.002"),
            (20.0, "20"),
            (1.5, "1.5"),
            (1e7, "1e7"),
            (3e-5, "3e-5"),
        ] {
            assert_eq!(format_log_value(v), want);
        }
    }
}
