//! The report's figures: [`Chart`] descriptions built from a scenario, its runs, its
//! force–speed curves and its fin heat. Rendering is left to [`crate::report::plots`]; this module does no I/O.
//!
//! With many cases only the nominal cases and the worst case of each check the figure shows are
//! drawn in colour and named (see [`Emphasis`]); the others are thin light background lines
//! under one legend row. A prominent case keeps its colour in every figure; limits are drawn in
//! the reference style (dark grey dashed), which no case uses.

use crate::checks::envelope::{sustained_curve, sustained_curve_below};
use crate::checks::rider::rider_signals;
use crate::checks::Verdict;
use crate::curve::{CurvePoint, PairCurve};
use crate::dynamics::RunResult;
use crate::report::emphasis::Emphasis;
use crate::report::plots::{Band, Chart, RefLine, RefPath, Series};
use crate::scenario::validate::track_span;
use crate::scenario::{Axis, Scenario};
use crate::thermal::CaseHeat;
use rayon::prelude::*;

/// One figure of the report.
#[derive(Debug, Clone)]
pub struct Figure {
    /// File stem and HTML id, e.g. `"speed-position"`.
    pub id: String,
    /// Caption for the report.
    pub caption: String,
    /// The chart.
    pub chart: Chart,
}

/// Most points kept per line (a line is thinned evenly beyond this; the ends are kept).
pub const MAX_POINTS_PER_SERIES: usize = 1500;

/// Keeps at most [`MAX_POINTS_PER_SERIES`] points, evenly spaced, always the last.
fn thin(points: Vec<(f64, f64)>) -> Vec<(f64, f64)> {
    let n = points.len();
    if n <= MAX_POINTS_PER_SERIES {
        return points;
    }
    let stride = n.div_ceil(MAX_POINTS_PER_SERIES);
    let mut out: Vec<(f64, f64)> = points.iter().step_by(stride).copied().collect();
    if !(n - 1).is_multiple_of(stride) {
        out.push(points[n - 1]);
    }
    out
}

/// The base name of a repeated element ("B-3" → "B").
fn base_name(name: &str) -> &str {
    match name.rsplit_once('-') {
        Some((b, r)) if !r.is_empty() && r.chars().all(|c| c.is_ascii_digit()) => b,
        _ => name,
    }
}

/// The checks each figure shows (name prefixes of [`crate::checks::CheckRow::key`]).
const SPEED_CHECKS: &[&str] = &["exit_speed", "stall", "stop", "rollback", "min_speed"];
const FELT_CHECKS: &[&str] = &["peak_", "onset", "release"];
const ENVELOPE_CHECKS: &[&str] = &["envelope"];
const FIN_CHECKS: &[&str] = &["fin_temperature"];

/// One line of one case (of one of its parts, e.g. a fin, when `part` is given).
struct CaseLine {
    case: String,
    part: Option<String>,
    points: Vec<(f64, f64)>,
    dashed: bool,
}

/// The prominent lines (nominal cases and the worst of the checks named by `checks`, see
/// [`Emphasis::label`]) as series, and the rest as background series named "N other cases" (per
/// part: "N other cases · east-fin"). A case's parts after its first carry only the part name.
fn case_series(em: &Emphasis, checks: &[&str], lines: Vec<CaseLine>) -> (Vec<Series>, Vec<Series>) {
    let mut others: Vec<&str> = Vec::new();
    for l in &lines {
        if em.label(&l.case, checks).is_none() && !others.contains(&l.case.as_str()) {
            others.push(&l.case);
        }
    }
    let n_others = others.len();
    let mut named: Vec<String> = Vec::new();
    let (mut front, mut back) = (Vec::new(), Vec::new());
    for l in &lines {
        let label = em.label(&l.case, checks);
        match (label, em.color(&l.case)) {
            (Some(label), Some(color)) => {
                let first = !named.contains(&l.case);
                named.push(l.case.clone());
                let name = match (&l.part, first) {
                    // The part after the case's name, before the rows of what it is worst of.
                    (Some(part), true) => match label.split_once('\n') {
                        Some((head, rest)) => format!("{head} · {part}\n{rest}"),
                        None => format!("{label} · {part}"),
                    },
                    (Some(part), false) => format!("{} · {part}", l.case),
                    (None, _) => label,
                };
                front.push(Series {
                    name,
                    points: l.points.clone(),
                    color,
                    dashed: l.dashed,
                });
            }
            _ => back.push(Series {
                name: match &l.part {
                    Some(part) => format!("{n_others} other cases · {part}"),
                    None => format!("{n_others} other cases"),
                },
                points: l.points.clone(),
                color: 0,
                dashed: l.dashed,
            }),
        }
    }
    (front, back)
}

/// Index of the rider axis along the track (0 = x, 2 = z).
fn track_axis_index(s: &Scenario) -> usize {
    match s.rider.track_axis {
        Axis::X => 0,
        Axis::Y => 1,
        Axis::Z => 2,
    }
}

/// Magnet sections fixed along the track, or the track fins when the magnets ride on the vehicle,
/// as x bands in m.
pub fn track_element_bands(s: &Scenario) -> Vec<Band> {
    let band = |(from, to): (f64, f64), label: &str| Band {
        from,
        to,
        label: label.into(),
    };
    let sections: Vec<Band> = s
        .sections
        .iter()
        .filter_map(|x| track_span(x.mount, x.length_m))
        .map(|span| band(span, "magnet sections"))
        .collect();
    if !sections.is_empty() {
        return sections;
    }
    s.fins
        .iter()
        .filter_map(|f| track_span(f.mount, f.length_m))
        .map(|span| band(span, "track fins (magnets on vehicle)"))
        .collect()
}

/// Figure 1: speed (m/s) against front position (m) for every case, with the magnet sections
/// shaded and the exit-speed window of the limits.
pub fn speed_position(s: &Scenario, runs: &[RunResult], em: &Emphasis) -> Chart {
    let lines = runs
        .iter()
        .map(|r| CaseLine {
            case: r.case.clone(),
            part: None,
            points: thin(r.samples.iter().map(|p| (p.s_m, p.v_m_s)).collect()),
            dashed: false,
        })
        .collect();
    let (series, background) = case_series(em, SPEED_CHECKS, lines);
    let mut y_bands = Vec::new();
    let mut h_lines = Vec::new();
    match (s.limits.exit_speed_min_m_s, s.limits.exit_speed_max_m_s) {
        (Some(lo), Some(hi)) => y_bands.push(Band {
            from: lo,
            to: hi,
            label: format!("exit-speed window {lo}–{hi} m/s"),
        }),
        (Some(lo), None) => h_lines.push(RefLine {
            at: lo,
            label: format!("exit speed min {lo} m/s"),
        }),
        (None, Some(hi)) => h_lines.push(RefLine {
            at: hi,
            label: format!("exit speed max {hi} m/s"),
        }),
        (None, None) => {}
    }
    Chart {
        title: "Speed along the track".into(),
        x_label: "vehicle front position (m)".into(),
        y_label: "speed (m/s)".into(),
        series,
        background,
        x_bands: track_element_bands(s),
        y_bands,
        h_lines,
        ..Chart::default()
    }
}

/// Figure 2: felt acceleration (g) along the track against time (s), raw dashed and filtered
/// solid, with the peak limits of that rider axis.
pub fn felt_acceleration(s: &Scenario, runs: &[RunResult], em: &Emphasis) -> Chart {
    let ax = track_axis_index(s);
    let mut lines = Vec::new();
    let mut raw = Vec::new();
    for r in runs {
        let Ok(sig) = rider_signals(r, &s.rider) else {
            continue;
        };
        let pts = |u: &crate::checks::filter::UniformSignal| {
            thin(
                u.values
                    .iter()
                    .enumerate()
                    .map(|(k, v)| (u.t0_s + k as f64 * u.dt_s, *v))
                    .collect(),
            )
        };
        // The raw signal of a prominent case, as a light dashed line under its filtered one.
        if sig.filter_applied && em.label(&r.case, FELT_CHECKS).is_some() {
            raw.push(Series {
                name: "raw (unfiltered) of the cases above".into(),
                points: pts(&sig.raw[ax]),
                color: 0,
                dashed: true,
            });
        }
        lines.push(CaseLine {
            case: r.case.clone(),
            part: None,
            points: pts(&sig.filtered[ax]),
            dashed: false,
        });
    }
    let (series, mut background) = case_series(em, FELT_CHECKS, lines);
    background.extend(raw);
    let axis = s.rider.track_axis.name();
    let peak = s.limits.peak[ax];
    let mut h_lines = Vec::new();
    if let Some(m) = peak.max_g {
        h_lines.push(RefLine {
            at: m,
            label: format!("peak {axis} max {m} g"),
        });
    }
    if let Some(m) = peak.min_g {
        h_lines.push(RefLine {
            at: m,
            label: format!("peak {axis} min {m} g"),
        });
    }
    Chart {
        title: format!(
            "Felt acceleration, {} {axis}",
            crate::checks::rider::axis_word(&s.rider)
        ),
        x_label: "time (s)".into(),
        y_label: format!("felt acceleration {axis} (g)"),
        series,
        background,
        h_lines,
        ..Chart::default()
    }
}

/// Figure 3: sustained acceleration magnitude (g) against duration (s) for every case, on the
/// braking side of the track axis, with the limit envelope's points as a series.
pub fn sustained(s: &Scenario, runs: &[RunResult], em: &Emphasis) -> Chart {
    let ax = track_axis_index(s);
    let env = &s.limits.envelope[ax];
    // Braking is −x for a track along x, +z along the spine (see checks::rider).
    let negative = match (&env.negative, &env.positive) {
        (Some(_), _) => true,
        (None, Some(_)) => false,
        (None, None) => ax == 0,
    };
    let envelope_points = if negative {
        env.negative.clone()
    } else {
        env.positive.clone()
    };
    // One line per run, the runs side by side (rayon keeps their order).
    let lines: Vec<CaseLine> = runs
        .par_iter()
        .filter_map(|r| {
            let sig = rider_signals(r, &s.rider).ok()?;
            let u = &sig.filtered[ax];
            let span = u.dt_s * (u.values.len().saturating_sub(1)) as f64;
            let durations: Vec<f64> = (0..=200).map(|k| span * k as f64 / 200.0).collect();
            let levels = if negative {
                sustained_curve_below(u, &durations)
                    .into_iter()
                    .map(|v| -v)
                    .collect::<Vec<_>>()
            } else {
                sustained_curve(u, &durations)
            };
            Some(CaseLine {
                case: r.case.clone(),
                part: None,
                points: durations.into_iter().zip(levels).collect(),
                dashed: false,
            })
        })
        .collect();
    let (series, background) = case_series(em, ENVELOPE_CHECKS, lines);
    let ref_paths = envelope_points
        .map(|points| RefPath {
            points,
            label: "limit envelope".into(),
        })
        .into_iter()
        .collect();
    let axis = s.rider.track_axis.name();
    let side = if negative { "negative" } else { "positive" };
    Chart {
        title: format!("Sustained acceleration, axis {axis} ({side} side)"),
        x_label: "duration sustained (s)".into(),
        y_label: format!("sustained |acceleration| {axis} (g)"),
        series,
        background,
        ref_paths,
        ..Chart::default()
    }
}

/// Figure 4 (one per distinct section × fin design): force per area (kPa) against speed (m/s),
/// harmonic sum solid and fundamental dashed, the model's uncertainty band dashed around the sum,
/// critical speed marked and the speeds the runs met in the zone shaded. Measured force curves have no per-area form and give no figure.
pub fn force_speed(curves: &[PairCurve], runs: &[RunResult]) -> Vec<(String, Chart)> {
    let mut seen: Vec<(String, String)> = Vec::new();
    let (mut vlo, mut vhi) = (f64::INFINITY, f64::NEG_INFINITY);
    for r in runs {
        for p in r.samples.iter().filter(|p| p.overlap_m > 0.0) {
            vlo = vlo.min(p.v_m_s.abs());
            vhi = vhi.max(p.v_m_s.abs());
        }
    }
    let mut out = Vec::new();
    for c in curves {
        let key = (
            base_name(&c.section).to_string(),
            base_name(&c.fin).to_string(),
        );
        if seen.contains(&key) {
            continue;
        }
        let sum: Vec<(f64, f64)> = c
            .points
            .iter()
            .filter_map(|p| p.force_per_area_pa.map(|f| (p.speed_m_s, f / 1e3)))
            .collect();
        if sum.is_empty() {
            continue;
        }
        let fundamental: Vec<(f64, f64)> = c
            .points
            .iter()
            .filter_map(|p| {
                p.force_per_area_fundamental_pa
                    .map(|f| (p.speed_m_s, f / 1e3))
            })
            .collect();
        let mut series = vec![Series {
            name: "harmonic sum".into(),
            points: sum,
            color: 0,
            dashed: false,
        }];
        if !fundamental.is_empty() {
            series.push(Series {
                name: "fundamental".into(),
                points: fundamental,
                color: 1,
                dashed: true,
            });
        }
        // The model's uncertainty band around the harmonic sum (per area, without the ends).
        let low: fn(&CurvePoint) -> Option<f64> = |p| p.band_low_fraction;
        let high: fn(&CurvePoint) -> Option<f64> = |p| p.band_high_fraction;
        for (name, edge) in [("model band, low", low), ("model band, high", high)] {
            let points: Vec<(f64, f64)> = c
                .points
                .iter()
                .filter_map(|p| Some((p.speed_m_s, p.force_per_area_pa? * (1.0 + edge(p)?) / 1e3)))
                .collect();
            if !points.is_empty() {
                series.push(Series {
                    name: name.into(),
                    points,
                    color: 2,
                    dashed: true,
                });
            }
        }
        let x_bands = if vlo.is_finite() && vhi.is_finite() {
            vec![Band {
                from: vlo,
                to: vhi,
                label: format!("speeds met in the zone {vlo:.1}–{vhi:.1} m/s"),
            }]
        } else {
            Vec::new()
        };
        let chart = Chart {
            title: format!("Force against speed: section {} × fin {}", key.0, key.1),
            x_label: "speed (m/s)".into(),
            y_label: "drag force per overlap area (kPa)".into(),
            series,
            x_bands,
            v_lines: vec![RefLine {
                at: c.critical_speed_m_s,
                label: format!("critical speed {:.2} m/s", c.critical_speed_m_s),
            }],
            ..Chart::default()
        };
        out.push((format!("{}-{}", key.0, key.1), chart));
        seen.push(key);
    }
    out
}

/// The fin-temperature limit of the scenario as a reference line (none without a limit).
fn fin_limit_line(s: &Scenario) -> Vec<RefLine> {
    s.limits
        .max_fin_temperature_c
        .map(|t| RefLine {
            at: t,
            label: format!("fin limit {t} °C"),
        })
        .into_iter()
        .collect()
}

/// Figure 5a: temperature (°C) along each track fin after the last pass of the heat calculation
/// (the steady state of the duty cycle, or the single pass), against track position (m); one
/// series per case (its track fins one after another, a gap between fins), with the
/// fin-temperature limit. None when the
/// scenario has no track fins.
pub fn fin_temperature_track(s: &Scenario, heats: &[CaseHeat], em: &Emphasis) -> Option<Chart> {
    let mut lines = Vec::new();
    for h in heats {
        // One line per track fin, named; the second fin of a pair is dashed (fins on two faces
        // share the same stretch of track).
        let profiles = h.track_profiles.iter().filter(|p| !p.temps.is_empty());
        for (k, p) in profiles.enumerate() {
            lines.push(CaseLine {
                case: h.case.clone(),
                part: Some(p.fin.clone()),
                points: thin(p.temps.clone()),
                dashed: k % 2 == 1,
            });
        }
    }
    if lines.is_empty() {
        return None;
    }
    let (series, background) = case_series(em, FIN_CHECKS, lines);
    let after = if s.duty.is_some() {
        "after the last pass of the duty cycle"
    } else {
        "after the pass"
    };
    Some(Chart {
        title: format!("Track fin temperature {after}"),
        x_label: "track position (m)".into(),
        y_label: "fin temperature (°C)".into(),
        series,
        background,
        h_lines: fin_limit_line(s),
        ..Chart::default()
    })
}

/// Figure 5b: the highest fin temperature (°C) right after each pass against the cycle number,
/// per case, with the fin-temperature limit. None without a duty block.
pub fn fin_temperature_cycles(s: &Scenario, heats: &[CaseHeat], em: &Emphasis) -> Option<Chart> {
    s.duty.as_ref()?;
    let lines: Vec<CaseLine> = heats
        .iter()
        .filter(|h| !h.cycles.is_empty())
        .map(|h| CaseLine {
            case: h.case.clone(),
            part: None,
            points: thin(
                h.cycles
                    .iter()
                    .map(|c| (f64::from(c.cycle), c.peak_fin_temperature_c))
                    .collect(),
            ),
            dashed: false,
        })
        .collect();
    if lines.is_empty() {
        return None;
    }
    let (series, background) = case_series(em, FIN_CHECKS, lines);
    Some(Chart {
        title: "Peak fin temperature over the duty cycle".into(),
        x_label: "cycle (pass number)".into(),
        y_label: "peak fin temperature after the pass (°C)".into(),
        series,
        background,
        h_lines: fin_limit_line(s),
        ..Chart::default()
    })
}

/// Every figure of the report, in report order.
///
/// `heats` is the heat of every case from [`crate::study::Study::heat`], in case order (empty:
/// no heating figures).
pub fn all_figures(
    s: &Scenario,
    runs: &[RunResult],
    curves: &[PairCurve],
    heats: &[CaseHeat],
    verdict: &Verdict,
) -> Vec<Figure> {
    let em = Emphasis::new(s, verdict);
    // The charts that read every sample of every run, built side by side.
    let ((speed_chart, felt_chart), (sustained_chart, designs)) = rayon::join(
        || {
            rayon::join(
                || speed_position(s, runs, &em),
                || felt_acceleration(s, runs, &em),
            )
        },
        || rayon::join(|| sustained(s, runs, &em), || force_speed(curves, runs)),
    );
    let mut v = vec![
        Figure {
            id: "speed-position".into(),
            caption: "Speed against vehicle front position for every case; shaded: magnet \
                      sections (or track fins); band or lines: exit-speed window of the limits."
                .into(),
            chart: speed_chart,
        },
        Figure {
            id: "felt-acceleration".into(),
            caption: format!(
                "Felt (specific) acceleration along the track in {}s; dashed: raw, solid: \
                 filtered; dashed grey: peak limits.",
                crate::checks::rider::axis_word(&s.rider)
            ),
            chart: felt_chart,
        },
        Figure {
            id: "sustained-acceleration".into(),
            caption: "Sustained acceleration level against the time it is held (filtered signal), \
                      with the limit envelope."
                .into(),
            chart: sustained_chart,
        },
    ];
    let stems = crate::report::unique_stems(&designs.iter().map(|d| &d.0).collect::<Vec<_>>());
    for ((_, chart), stem) in designs.into_iter().zip(stems) {
        v.push(Figure {
            id: format!("force-speed-{stem}"),
            caption: "Drag force per overlap area against speed at the first case's \
                      temperatures; solid: harmonic sum, dashed: fundamental; dotted: critical \
                      speed; shaded: speeds the runs met in the zone."
                .into(),
            chart,
        });
    }
    if let Some(chart) = fin_temperature_track(s, heats, &em) {
        v.push(Figure {
            id: "fin-temperature-track".into(),
            caption: "Temperature along the track fins after the last pass of the heat \
                      calculation (steady duty cycle, or the single pass), one line per case \
                      covering every track fin; dashed grey: fin-temperature limit."
                .into(),
            chart,
        });
    }
    if let Some(chart) = fin_temperature_cycles(s, heats, &em) {
        v.push(Figure {
            id: "fin-temperature-cycles".into(),
            caption: "Highest fin temperature right after each pass against the cycle number \
                      of the duty block, per case; dashed grey: fin-temperature limit."
                .into(),
            chart,
        });
    }
    v
}
