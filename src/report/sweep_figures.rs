//! Figures of a sweep: per check with values, the empirical distribution function (ECDF) of the
//! samples' values with the check's limit as a labelled vertical line, and a tornado chart of
//! the inputs' Spearman rank correlations with it (largest |ρ| on top). Written as SVG and PNG
//! files `ecdf-<check>.svg|png` and `tornado-<check>.svg|png` (`sweep --figures DIR`); the same
//! two for the peak lateral force when the sweep has it (`ecdf-peak_lateral_force_n`, no limit).

use super::plots::bars::{render_bars_png, render_bars_svg, Bar, BarChart};
use super::plots::{render_png, render_svg, Chart, RefLine, Series};
use super::OutputError;
use crate::sweep::{CheckSummary, Sensitivity, SweepResult};

/// Size of the sweep figures, px.
pub const FIGURE_SIZE_PX: (u32, u32) = (900, 540);

/// One figure: its file name without extension, SVG text and PNG bytes.
#[derive(Debug, Clone)]
pub struct SweepFigure {
    /// File name without extension (`ecdf-<check>`, `tornado-<check>`).
    pub name: String,
    /// The SVG document.
    pub svg: String,
    /// The PNG file.
    pub png: Vec<u8>,
}

/// A check key as a file-name part (letters, digits, `_`, `-`, `.`; others as `_`).
fn file_part(key: &str) -> String {
    key.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || matches!(c, '_' | '-' | '.') {
                c
            } else {
                '_'
            }
        })
        .collect()
}

fn with_unit(name: &str, unit: &str) -> String {
    if unit.is_empty() {
        name.to_string()
    } else {
        format!("{name} ({unit})")
    }
}

/// The ECDF chart of check `j` of a sweep. `None` when no sample has a value for it.
pub fn ecdf_chart(r: &SweepResult, j: usize) -> Option<Chart> {
    let s: &CheckSummary = r.summaries.get(j)?;
    let values: Vec<f64> = r
        .samples
        .iter()
        .filter_map(|x| x.checks.get(j).and_then(|c| c.value))
        .collect();
    let k = &s.check;
    let title = format!(
        "{}: {} samples, P(fail) = {:.4} [{:.4}, {:.4}]",
        k.key, s.failure.trials, s.failure.estimate, s.failure.low, s.failure.high
    );
    ecdf(&title, &k.key, &k.unit, k.limit, &values)
}

/// The ECDF chart of `values`: the step function F(x) = (number of values ≤ x)/n through the
/// sorted values (a vertical step at each), and `limit` as a labelled vertical line. `None`
/// without values.
pub fn ecdf(
    title: &str,
    key: &str,
    unit: &str,
    limit: Option<f64>,
    values: &[f64],
) -> Option<Chart> {
    if values.is_empty() {
        return None;
    }
    let mut values = values.to_vec();
    values.sort_by(f64::total_cmp);
    let n = values.len() as f64;
    let mut points = Vec::with_capacity(2 * values.len());
    for (i, v) in values.iter().enumerate() {
        points.push((*v, i as f64 / n));
        points.push((*v, (i + 1) as f64 / n));
    }
    let v_lines = limit
        .map(|l| RefLine {
            at: l,
            label: with_unit(&format!("limit {l}"), unit),
        })
        .into_iter()
        .collect();
    Some(Chart {
        title: title.into(),
        x_label: with_unit(key, unit),
        y_label: "fraction of samples at or below".into(),
        series: vec![Series {
            name: "samples (ECDF)".into(),
            points,
            color: 0,
            dashed: false,
        }],
        v_lines,
        y_range: Some((0.0, 1.0)),
        ..Chart::default()
    })
}

/// The tornado chart of check `j`: one bar per input, its Spearman ρ with the check's value,
/// largest |ρ| on top (blue: the value grows with the input; vermillion: it falls). `None`
/// without sensitivities.
pub fn tornado_chart(r: &SweepResult, j: usize) -> Option<BarChart> {
    let s = r.summaries.get(j)?;
    tornado(&s.check.key, "check", &s.sensitivity)
}

/// The tornado chart of the sensitivities of `key` (a `what`: check or output); `None` without
/// sensitivities.
fn tornado(key: &str, what: &str, sensitivity: &[Sensitivity]) -> Option<BarChart> {
    if sensitivity.is_empty() {
        return None;
    }
    Some(BarChart {
        title: format!("{key}: sensitivity to the inputs"),
        x_label: format!("Spearman rank correlation ρ with the {what}'s value"),
        bars: sensitivity
            .iter()
            .map(|x| Bar {
                label: format!("{} {:+.2}", x.variable, x.spearman),
                value: x.spearman,
                color: usize::from(x.spearman < 0.0),
            })
            .collect(),
        x_range: (-1.0, 1.0),
        v_lines: vec![RefLine {
            at: 0.0,
            label: String::new(),
        }],
    })
}

fn plot(figure: &str, source: super::plots::PlotError) -> OutputError {
    OutputError::Plot {
        figure: figure.to_string(),
        source,
    }
}

/// Every figure of the sweep, in the order of its checks, then the peak lateral force's.
pub fn sweep_figures(r: &SweepResult) -> Result<Vec<SweepFigure>, OutputError> {
    let mut out = Vec::new();
    for (j, s) in r.summaries.iter().enumerate() {
        push_pair(
            &mut out,
            &file_part(&s.check.key),
            ecdf_chart(r, j),
            tornado_chart(r, j),
        )?;
    }
    if let Some(l) = &r.lateral {
        let values: Vec<f64> = r
            .samples
            .iter()
            .filter_map(|s| s.peak_lateral_force_n)
            .collect();
        let title = format!(
            "{}: {} samples (force on the fins along +y)",
            l.output,
            values.len()
        );
        push_pair(
            &mut out,
            &file_part(&l.output),
            ecdf(&title, &l.output, &l.unit, None, &values),
            tornado(&l.output, "output", &l.sensitivity),
        )?;
    }
    Ok(out)
}

/// Renders the ECDF and tornado charts of one check or output (those there are).
fn push_pair(
    out: &mut Vec<SweepFigure>,
    part: &str,
    ecdf: Option<Chart>,
    tornado: Option<BarChart>,
) -> Result<(), OutputError> {
    if let Some(c) = ecdf {
        let name = format!("ecdf-{part}");
        out.push(SweepFigure {
            svg: render_svg(&c, FIGURE_SIZE_PX).map_err(|e| plot(&name, e))?,
            png: render_png(&c, FIGURE_SIZE_PX).map_err(|e| plot(&name, e))?,
            name,
        });
    }
    if let Some(c) = tornado {
        let name = format!("tornado-{part}");
        out.push(SweepFigure {
            svg: render_bars_svg(&c, FIGURE_SIZE_PX).map_err(|e| plot(&name, e))?,
            png: render_bars_png(&c, FIGURE_SIZE_PX).map_err(|e| plot(&name, e))?,
            name,
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;

    #[test]
    fn ecdf_is_the_empirical_distribution_with_its_limit_line() {
        // F(x) = #{values ≤ x}/n (the empirical distribution function, e.g. Wasserman, All of
        // Statistics, 2004, §7.1): at 3 of 4 values it reaches 3/4.
        let c = ecdf(
            "t",
            "exit_speed_min",
            "m/s",
            Some(2.5),
            &[4.0, 1.0, 3.0, 2.0],
        )
        .unwrap();
        let p = &c.series[0].points;
        assert_eq!(p.len(), 8);
        assert_eq!(p[5], (3.0, 0.75));
        assert_eq!(p[7], (4.0, 1.0));
        assert_eq!(c.v_lines.len(), 1);
        assert_eq!(c.v_lines[0].at, 2.5);
        // Drawn: the limit's label and its grey (70, 70, 70) line are in the SVG, and absent
        // without a limit.
        let with = render_svg(&c, FIGURE_SIZE_PX).unwrap();
        let without = render_svg(
            &ecdf("t", "exit_speed_min", "m/s", None, &[4.0, 1.0, 3.0, 2.0]).unwrap(),
            FIGURE_SIZE_PX,
        )
        .unwrap();
        assert!(with.contains("limit 2.5 (m/s)"));
        assert!(!without.contains("limit 2.5"));
        let grey = |svg: &str| svg.matches("#464646").count();
        assert!(grey(&with) > grey(&without), "the limit line is not drawn");
        assert!(ecdf("t", "k", "", None, &[]).is_none());
    }
}
