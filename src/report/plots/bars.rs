//! Horizontal bar charts (one labelled bar per row, from zero to its value), rendered to SVG
//! text or PNG bytes: a tornado chart when the rows are sorted by |value|. Same font, palette,
//! sizes and determinism as the line charts; bars with a non-finite value are not drawn (their
//! row and label stay), values beyond the range are cut at its edge.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::axis::{Axis, Which};
use super::text::{ensure_font, fit_text, put_text, text_size};
use super::{
    draw_error, encode_png, line_height, palette_color, rgb, Metrics, PlotError, RefLine,
    AXIS_COLOR, MAX_SIZE_PX, MIN_SIZE_PX, REF_COLOR, TEXT_COLOR, TICK_PX,
};

/// A horizontal bar chart.
#[derive(Debug, Clone, Default)]
pub struct BarChart {
    /// Title on top.
    pub title: String,
    /// Label of the value axis, with its unit.
    pub x_label: String,
    /// The rows, top to bottom.
    pub bars: Vec<Bar>,
    /// The value axis range.
    pub x_range: (f64, f64),
    /// Labelled vertical reference lines (the label above the plot).
    pub v_lines: Vec<RefLine>,
}

/// One bar.
#[derive(Debug, Clone)]
pub struct Bar {
    /// Row label (left of the plot).
    pub label: String,
    /// The bar runs from 0 to this value.
    pub value: f64,
    /// Palette index ([`palette_color`]).
    pub color: usize,
}

/// Renders `chart` as an SVG document of `size_px` pixels.
pub fn render_bars_svg(chart: &BarChart, size_px: (u32, u32)) -> Result<String, PlotError> {
    check(chart, size_px)?;
    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, size_px).into_drawing_area();
        draw(&root, chart, size_px, false)?;
        root.present().map_err(draw_error)?;
    }
    Ok(out)
}

/// Renders `chart` as the bytes of a PNG file (8-bit RGB) of `size_px` pixels.
pub fn render_bars_png(chart: &BarChart, size_px: (u32, u32)) -> Result<Vec<u8>, PlotError> {
    check(chart, size_px)?;
    let (w, h) = size_px;
    let mut rgb_buf = vec![0u8; w as usize * h as usize * 3];
    {
        let root = BitMapBackend::with_buffer(&mut rgb_buf, size_px).into_drawing_area();
        draw(&root, chart, size_px, true)?;
        root.present().map_err(draw_error)?;
    }
    encode_png(&rgb_buf, w, h)
}

fn check(chart: &BarChart, (w, h): (u32, u32)) -> Result<(), PlotError> {
    if !(MIN_SIZE_PX..=MAX_SIZE_PX).contains(&w) || !(MIN_SIZE_PX..=MAX_SIZE_PX).contains(&h) {
        return Err(PlotError::InvalidSize {
            width_px: w,
            height_px: h,
        });
    }
    let (a, b) = chart.x_range;
    if !(a.is_finite() && b.is_finite() && a < b) {
        return Err(PlotError::InvalidRange {
            axis: "x",
            from: a,
            to: b,
            reason: "must be finite and increasing",
        });
    }
    ensure_font()
}

fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    chart: &BarChart,
    (w, h): (u32, u32),
    per_glyph: bool,
) -> Result<(), PlotError> {
    let m = Metrics::for_size((w, h));
    let text = |t: &str, pos, size, color, anchor| {
        put_text(root, per_glyph, t, pos, size, color, anchor, false)
    };
    root.fill(&WHITE).map_err(draw_error)?;
    let title_h = if chart.title.is_empty() {
        0
    } else {
        line_height(m.title) + m.pad
    };
    let room = w.saturating_sub(2 * m.margin);
    let title = fit_text(&chart.title, m.title, room)?;
    text(
        &title,
        ((w / 2) as i32, m.margin as i32),
        m.title,
        TEXT_COLOR,
        (HPos::Center, VPos::Top),
    )?;
    // Label column: the widest label, at most 40 % of the width.
    let cap = w * 2 / 5;
    let mut label_w = 0;
    let mut labels = Vec::with_capacity(chart.bars.len());
    for b in &chart.bars {
        let l = fit_text(&b.label, m.legend, cap)?;
        label_w = label_w.max(text_size(&l, m.legend)?.0);
        labels.push(l);
    }
    let ref_h = if chart.v_lines.is_empty() {
        0
    } else {
        line_height(m.note) + m.pad / 2
    };
    let left = (m.margin + label_w + m.pad) as i32;
    let right = (w - m.margin) as i32 - 1;
    let top = (m.margin + title_h + ref_h) as i32;
    let axis_h = TICK + m.pad / 2 + line_height(m.tick) + m.pad + line_height(m.desc);
    let bottom = (h.saturating_sub(m.margin + axis_h) as i32).max(top + 1);
    let (x0, x1) = chart.x_range;
    let to_px = |v: f64| {
        let t = ((v - x0) / (x1 - x0)).clamp(0.0, 1.0);
        left + (t * f64::from(right - left)).round() as i32
    };
    // Grid and ticks of the value axis.
    let span = f64::from(right - left);
    let ticks_wanted = (span / (8.0 * m.tick)).floor().max(2.0) as usize;
    let axis = Axis::new(Which::X, Some(chart.x_range), &[], false, ticks_wanted)?;
    let grid = BLACK.mix(0.12).stroke_width(1);
    let axis_style = AXIS_COLOR.stroke_width(1);
    for &v in axis.major_ticks() {
        let x = to_px(v);
        root.draw(&PathElement::new(vec![(x, top), (x, bottom)], grid))
            .map_err(draw_error)?;
        root.draw(&PathElement::new(
            vec![(x, bottom), (x, bottom + TICK as i32)],
            axis_style,
        ))
        .map_err(draw_error)?;
        text(
            &axis.format_tick(v),
            (x, bottom + (TICK + m.pad / 2) as i32),
            m.tick,
            TEXT_COLOR,
            (HPos::Center, VPos::Top),
        )?;
    }
    root.draw(&PathElement::new(
        vec![(left, top), (left, bottom), (right, bottom)],
        axis_style,
    ))
    .map_err(draw_error)?;
    let x_label = fit_text(&chart.x_label, m.desc, room)?;
    text(
        &x_label,
        ((left + right) / 2, h as i32 - m.margin as i32),
        m.desc,
        TEXT_COLOR,
        (HPos::Center, VPos::Bottom),
    )?;
    // Rows: bar 60 % of the row height, label centred on it.
    let n = chart.bars.len().max(1) as f64;
    let row = f64::from(bottom - top) / n;
    let zero = to_px(0.0);
    for (i, (b, label)) in chart.bars.iter().zip(&labels).enumerate() {
        let centre = top + (row * (i as f64 + 0.5)).round() as i32;
        let half = ((row * 0.3).round() as i32).max(1);
        text(
            label,
            (left - m.pad as i32, centre),
            m.legend,
            TEXT_COLOR,
            (HPos::Right, VPos::Center),
        )?;
        if !b.value.is_finite() {
            continue;
        }
        let end = to_px(b.value);
        let (a, c) = (zero.min(end), zero.max(end));
        let fill = rgb(palette_color(b.color)).filled();
        root.draw(&Rectangle::new(
            [(a, centre - half), (c.max(a + 1), centre + half)],
            fill,
        ))
        .map_err(draw_error)?;
    }
    // Reference lines on top, their labels above the plot.
    let ref_style = REF_COLOR.stroke_width(m.ref_w);
    for l in &chart.v_lines {
        if !l.at.is_finite() {
            continue;
        }
        let x = to_px(l.at);
        root.draw(&PathElement::new(vec![(x, top), (x, bottom)], ref_style))
            .map_err(draw_error)?;
        let label = fit_text(&l.label, m.note, room / 2)?;
        text(
            &label,
            (x, top - (m.pad / 4) as i32),
            m.note,
            REF_COLOR,
            (HPos::Center, VPos::Bottom),
        )?;
    }
    Ok(())
}

/// Tick length, px.
const TICK: u32 = TICK_PX as u32;

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;

    /// (fill, x, width) of every `<rect>` of an SVG.
    fn rects(svg: &str) -> Vec<(String, f64, f64)> {
        let attr = |el: &str, name: &str| {
            let at = el.find(&format!(" {name}=\""))? + name.len() + 3;
            let end = el[at..].find('"')? + at;
            Some(el[at..end].to_string())
        };
        svg.split("<rect")
            .skip(1)
            .filter_map(|el| {
                let el = &el[..el.find('>')?];
                Some((
                    attr(el, "fill")?.to_ascii_uppercase(),
                    attr(el, "x")?.parse().ok()?,
                    attr(el, "width")?.parse().ok()?,
                ))
            })
            .collect()
    }

    #[test]
    fn every_bar_is_drawn_from_zero_to_its_value() {
        let chart = BarChart {
            title: "t".into(),
            x_label: "rho".into(),
            bars: vec![
                Bar {
                    label: "a".into(),
                    value: 0.8,
                    color: 0,
                },
                Bar {
                    label: "b".into(),
                    value: -0.5,
                    color: 1,
                },
                Bar {
                    label: "c".into(),
                    value: 0.2,
                    color: 0,
                },
            ],
            x_range: (-1.0, 1.0),
            v_lines: vec![RefLine {
                at: 0.0,
                label: "zero".into(),
            }],
        };
        let svg = render_bars_svg(&chart, (800, 500)).unwrap();
        let blue = format!("#{:02X}{:02X}{:02X}", 0, 114, 178);
        let red = format!("#{:02X}{:02X}{:02X}", 213, 94, 0);
        let bars: Vec<_> = rects(&svg)
            .into_iter()
            .filter(|(f, _, _)| *f == blue || *f == red)
            .collect();
        assert_eq!(bars.len(), 3, "a bar is missing: {bars:?}");
        // Lengths in proportion to |value| on a linear axis (±1 px rounding at each end), the
        // positive bars starting where the negative one ends (at zero).
        let (a, b, c) = (&bars[0], &bars[1], &bars[2]);
        assert!((a.2 / c.2 - 4.0).abs() < 0.15, "{bars:?}");
        assert!((a.2 / b.2 - 1.6).abs() < 0.05, "{bars:?}");
        assert!((b.1 + b.2 - a.1).abs() <= 1.0 && (a.1 - c.1).abs() <= 1.0);
        assert_eq!(b.0, red);
        assert!(svg.contains("zero"), "the reference line label is missing");
        // A bad range is refused.
        let bad = BarChart {
            x_range: (1.0, 1.0),
            ..chart
        };
        assert!(render_bars_svg(&bad, (800, 500)).is_err());
        assert!(render_bars_png(&bad, (800, 500)).is_err());
    }
}
