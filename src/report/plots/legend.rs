//! The legend beside a chart: one entry per series, band label and labelled reference line.

use std::collections::BTreeMap;

use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::text::{fit_text, put_text, text_size};
use super::{
    draw_error, palette_color, rgb, Chart, Metrics, Plan, PlotError, BACKGROUND_COLOR, BAND_ALPHA,
    BAND_TINTS, REF_COLOR, TEXT_COLOR,
};

/// What a legend row shows beside its text.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Swatch {
    Line {
        color: RGBColor,
        dashed: bool,
    },
    /// A background series: thin light grey.
    Thin {
        dashed: bool,
    },
    /// A further row of the entry above (no swatch).
    Blank,
    Fill {
        tint: RGBColor,
    },
    HLine,
    VLine,
}

#[derive(Debug, Clone, PartialEq)]
pub(super) struct LegendEntry {
    swatch: Swatch,
    text: String,
}

/// A chart's legend with its texts shortened to fit, and the tint of each band label.
pub(super) struct Legend<'c> {
    /// Rows in order: series, band labels, horizontal then vertical reference lines.
    pub entries: Vec<LegendEntry>,
    /// Tint by band label, in order of first appearance.
    pub tints: BTreeMap<&'c str, RGBColor>,
    /// Width of the legend column, px (0 without entries).
    pub width: u32,
}

impl<'c> Legend<'c> {
    /// The legend of `chart` on a canvas `w` px wide.
    pub(super) fn new(chart: &'c Chart, m: &Metrics, w: u32) -> Result<Legend<'c>, PlotError> {
        let mut tints: BTreeMap<&str, RGBColor> = BTreeMap::new();
        let mut entries = Vec::new();
        // An entry's text may hold line breaks: its further lines are rows without a swatch.
        let mut push = |swatch: Swatch, text: &str| {
            for (k, part) in text.split('\n').enumerate() {
                entries.push(LegendEntry {
                    swatch: if k == 0 { swatch } else { Swatch::Blank },
                    text: if k == 0 {
                        part.to_string()
                    } else {
                        format!("  {}", part.trim_start())
                    },
                });
            }
        };
        for (i, s) in chart.series.iter().enumerate() {
            let text = if s.name.is_empty() {
                format!("series {}", i + 1)
            } else {
                s.name.clone()
            };
            let color = rgb(palette_color(s.color));
            push(
                Swatch::Line {
                    color,
                    dashed: s.dashed,
                },
                &text,
            );
        }
        let mut seen: Vec<&str> = Vec::new();
        for s in chart.background.iter().filter(|s| !s.name.is_empty()) {
            if !seen.contains(&s.name.as_str()) {
                seen.push(&s.name);
                push(Swatch::Thin { dashed: s.dashed }, &s.name);
            }
        }
        for band in chart.x_bands.iter().chain(&chart.y_bands) {
            if tints.contains_key(band.label.as_str()) {
                continue;
            }
            let tint = rgb(BAND_TINTS[tints.len() % BAND_TINTS.len()]);
            tints.insert(band.label.as_str(), tint);
            if !band.label.is_empty() {
                entries.push(LegendEntry {
                    swatch: Swatch::Fill { tint },
                    text: band.label.clone(),
                });
            }
        }
        let h_labels = chart.h_lines.iter().map(|l| (&l.label, Swatch::HLine));
        let paths = chart.ref_paths.iter().map(|p| (&p.label, Swatch::HLine));
        let v_labels = chart.v_lines.iter().map(|l| (&l.label, Swatch::VLine));
        for (label, swatch) in h_labels.chain(paths).chain(v_labels) {
            if !label.is_empty() {
                entries.push(LegendEntry {
                    swatch,
                    text: label.clone(),
                });
            }
        }
        let text_max = ((f64::from(w) * 0.38) as u32).saturating_sub(m.swatch_w + 4 * m.pad);
        let mut width = 0;
        for entry in &mut entries {
            entry.text = fit_text(&entry.text, m.legend, text_max)?;
            width = width.max(text_size(&entry.text, m.legend)?.0);
        }
        if !entries.is_empty() {
            width = (width + m.swatch_w + 4 * m.pad).min(w * 2 / 5);
        }
        Ok(Legend {
            entries,
            tints,
            width,
        })
    }
}

/// The legend: one row per entry right of the plot, from the top of the plot area down; rows
/// that do not fit are summarised as "+N more".
pub(super) fn draw_legend<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    plan: &Plan,
    x_left: i32,
    top_px: i32,
    per_glyph: bool,
) -> Result<(), PlotError> {
    if plan.legend.is_empty() {
        return Ok(());
    }
    let m = &plan.m;
    let (_, h) = plan.size;
    let row = m.row_h as i32;
    let x0 = x_left + m.pad as i32;
    let sw = m.swatch_w as i32;
    let rows_fit = ((h as i32 - top_px - m.margin as i32) / row).max(1) as usize;
    let shown = if plan.legend.len() > rows_fit {
        rows_fit - 1
    } else {
        plan.legend.len()
    };
    for (i, entry) in plan.legend.iter().take(shown).enumerate() {
        let cy = top_px + row * i as i32 + row / 2;
        match entry.swatch {
            Swatch::Line { color, dashed } => {
                let style = color.stroke_width(m.line_w);
                let pts = vec![(x0, cy), (x0 + sw, cy)];
                if dashed {
                    let (dash, gap) = m.series_dash;
                    root.draw(&DashedPathElement::new(pts, dash, gap, style))
                } else {
                    root.draw(&PathElement::new(pts, style))
                }
            }
            Swatch::Thin { dashed } => {
                let style = BACKGROUND_COLOR.stroke_width(1);
                let pts = vec![(x0, cy), (x0 + sw, cy)];
                if dashed {
                    let (dash, gap) = m.series_dash;
                    root.draw(&DashedPathElement::new(pts, dash / 2, gap / 2, style))
                } else {
                    root.draw(&PathElement::new(pts, style))
                }
            }
            Swatch::Blank => Ok(()),
            Swatch::Fill { tint } => {
                let half = row / 3;
                root.draw(&Rectangle::new(
                    [(x0, cy - half), (x0 + sw, cy + half)],
                    tint.mix(BAND_ALPHA * 2.0).filled(),
                ))
            }
            Swatch::HLine => root.draw(&DashedPathElement::new(
                vec![(x0, cy), (x0 + sw, cy)],
                m.h_line_dash.0,
                m.h_line_dash.1,
                REF_COLOR.stroke_width(m.ref_w),
            )),
            Swatch::VLine => {
                let half = row / 2 - 2;
                root.draw(&DashedPathElement::new(
                    vec![(x0 + sw / 2, cy - half), (x0 + sw / 2, cy + half)],
                    m.v_line_dots.0,
                    m.v_line_dots.1,
                    REF_COLOR.stroke_width(m.ref_w),
                ))
            }
        }
        .map_err(draw_error)?;
        put_text(
            root,
            per_glyph,
            &entry.text,
            (x0 + sw + m.pad as i32, cy),
            m.legend,
            TEXT_COLOR,
            (HPos::Left, VPos::Center),
            false,
        )?;
    }
    if shown < plan.legend.len() {
        let cy = top_px + row * shown as i32 + row / 2;
        put_text(
            root,
            per_glyph,
            &format!("+{} more", plan.legend.len() - shown),
            (x0, cy),
            m.legend,
            TEXT_COLOR,
            (HPos::Left, VPos::Center),
            false,
        )?;
    }
    Ok(())
}
