//! Generic line charts rendered to SVG text or PNG bytes.
//!
//! The report layer describes a chart with [`Chart`] (lines, shaded bands, labelled reference
//! lines) and gets back the file contents from [`render_svg`] or [`render_png`]; this module does
//! no file I/O and knows nothing about brakes. Text is drawn with DejaVu Sans, embedded in the
//! binary and registered (once per process, as plotters' `"sans-serif"` family) with plotters'
//! `ab_glyph` support, so rendering needs no font library on the machine; in PNGs each glyph is
//! placed by the font's own metrics (see `glyphs`). Output is deterministic: the same chart and
//! size give the same bytes.
//!
//! Layout: title on top, the plot with light grid lines, tick labels and axis labels, and a
//! legend on the right naming every series, band label and reference line (rows that do not fit
//! are counted as "+N more"; over-long texts are shortened with "…").
//!
//! Input that cannot be drawn is skipped, never a panic: non-finite points (and points with
//! x ≤ 0 on a logarithmic x axis) are not drawn and break the line there, a run of a single
//! point is drawn as a dot, segments are clipped to the plot, and zero-width data ranges are
//! widened. An explicit range that is not finite, not increasing or (on a log axis) not positive
//! is a [`PlotError::InvalidRange`]; a size outside [`MIN_SIZE_PX`]..=[`MAX_SIZE_PX`] is a
//! [`PlotError::InvalidSize`].

mod axis;
pub mod bars;
mod geom;
mod glyphs;
mod legend;
#[cfg(test)]
mod tests;
mod text;

use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use axis::{Axis, Which};
use geom::Rect;
use glyphs::line_height;
use legend::{draw_legend, Legend, LegendEntry};
use text::{ensure_font, fit_text, put_text, text_size};

/// A chart: lines over shaded spans and reference lines. Labels carry units, e.g.
/// `"speed (m/s)"`; numbers are in whatever unit the labels state.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Chart {
    /// Title drawn above the plot; empty for none.
    pub title: String,
    /// X-axis label with its unit, e.g. `"position along the track (m)"`.
    pub x_label: String,
    /// Y-axis label with its unit, e.g. `"speed (m/s)"`.
    pub y_label: String,
    /// The lines, drawn in order (later on top).
    pub series: Vec<Series>,
    /// Shaded vertical spans (x from–to over the full height), e.g. magnet sections.
    pub x_bands: Vec<Band>,
    /// Shaded horizontal spans (y from–to over the full width), e.g. an exit-speed window.
    pub y_bands: Vec<Band>,
    /// Horizontal reference lines (limits), drawn dashed and labelled.
    pub h_lines: Vec<RefLine>,
    /// Vertical reference markers (e.g. a critical speed), drawn dotted and labelled.
    pub v_lines: Vec<RefLine>,
    /// X range in x-label units (low, high); `None`: from the data, bands and lines, with a 5 %
    /// margin on each side.
    pub x_range: Option<(f64, f64)>,
    /// Y range in y-label units (low, high); `None`: as for `x_range`.
    pub y_range: Option<(f64, f64)>,
    /// Logarithmic (base 10) x axis; points, bands and lines at x ≤ 0 are then not drawn.
    pub log_x: bool,
    /// Context lines drawn thin and light grey under the series (e.g. the many cases that are
    /// neither nominal nor the worst of a check); their `color` is not used. Series with the
    /// same name share one legend row (an empty name gives none).
    pub background: Vec<Series>,
    /// Limit curves (e.g. an envelope of level against duration), drawn like the horizontal
    /// reference lines (dark grey dashed, a style no series of the palette uses) and named in
    /// the legend.
    pub ref_paths: Vec<RefPath>,
}

/// A limit drawn as a polyline in the reference-line style.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct RefPath {
    /// Points (x, y) in axis-label units; a non-finite point breaks the line.
    pub points: Vec<(f64, f64)>,
    /// Legend text; empty for none.
    pub label: String,
}

/// One line of a chart.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Series {
    /// Name shown in the legend (an empty name is shown as "series N"); a line break starts a
    /// further legend row of the same entry (e.g. what a case is the worst of).
    pub name: String,
    /// Points (x, y) in axis-label units, joined in order; a non-finite point breaks the line.
    pub points: Vec<(f64, f64)>,
    /// Palette index, see [`palette_color`]; use the same index for the same case everywhere.
    pub color: usize,
    /// Draw the line dashed (e.g. a fundamental against the harmonic sum).
    pub dashed: bool,
}

/// A shaded span between two values of one axis. Bands with the same label share a colour and
/// one legend entry.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Band {
    /// One end of the span, in that axis' label units.
    pub from: f64,
    /// The other end of the span (either order is accepted).
    pub to: f64,
    /// Legend text; an empty label gives no legend entry.
    pub label: String,
}

/// A labelled reference line at one value of an axis.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct RefLine {
    /// Position on the axis, in that axis' label units.
    pub at: f64,
    /// Text drawn beside the line and in the legend; empty for none.
    pub label: String,
}

/// Why a chart could not be rendered.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PlotError {
    /// The image size is outside [`MIN_SIZE_PX`]..=[`MAX_SIZE_PX`] on a side.
    #[error(
        "image size {width_px}×{height_px} px is not supported: each side must be \
         {MIN_SIZE_PX} to {MAX_SIZE_PX} px"
    )]
    InvalidSize {
        /// Requested width, px.
        width_px: u32,
        /// Requested height, px.
        height_px: u32,
    },
    /// An explicit axis range cannot be used.
    #[error("{axis} range ({from}, {to}) is invalid: {reason}")]
    InvalidRange {
        /// `"x"` or `"y"`.
        axis: &'static str,
        /// Given low end, axis-label units.
        from: f64,
        /// Given high end, axis-label units.
        to: f64,
        /// What is wrong with it.
        reason: &'static str,
    },
    /// The embedded font could not be parsed or registered.
    #[error("the embedded font could not be loaded")]
    Font,
    /// The drawing backend reported an error.
    #[error("drawing the chart failed: {0}")]
    Draw(String),
    /// PNG encoding failed.
    #[error("encoding the PNG failed: {0}")]
    Encode(String),
}

/// Smallest accepted image side, px.
pub const MIN_SIZE_PX: u32 = 200;
/// Largest accepted image side, px (a 4096 × 4096 RGB canvas is 48 MiB).
pub const MAX_SIZE_PX: u32 = 4096;

/// DejaVu Sans (Bitstream Vera derived; licence in `assets/fonts/DejaVu-LICENSE.txt`).
static FONT_TTF: &[u8] = include_bytes!(concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/assets/fonts/DejaVuSans.ttf"
));
/// Family name the embedded font is registered under; SVG text names it, so a viewer without
/// DejaVu falls back to its own sans-serif.
const FAMILY: &str = "sans-serif";

/// Okabe–Ito colour-blind-safe palette (M. Okabe and K. Ito, "Color Universal Design (CUD): how
/// to make figures and presentations that are friendly to colorblind people", 2008; also
/// B. Wong, "Points of view: Color blindness", *Nature Methods* 8, 441, 2011), reordered so the
/// colours that read best as thin lines on white come first and yellow comes last.
const PALETTE: [(u8, u8, u8); 8] = [
    (0, 114, 178),   // blue
    (213, 94, 0),    // vermillion
    (0, 158, 115),   // bluish green
    (204, 121, 167), // reddish purple
    (230, 159, 0),   // orange
    (86, 180, 233),  // sky blue
    (0, 0, 0),       // black
    (240, 228, 66),  // yellow
];

/// Tints for bands, by distinct band label in order of first appearance (Okabe–Ito hues and a
/// neutral grey), drawn at [`BAND_ALPHA`].
const BAND_TINTS: [(u8, u8, u8); 5] = [
    (0, 158, 115),
    (86, 180, 233),
    (230, 159, 0),
    (120, 120, 120),
    (204, 121, 167),
];
const BAND_ALPHA: f64 = 0.18;
/// Colour of background series (thin, light): context, not to be read line by line.
const BACKGROUND_COLOR: RGBColor = RGBColor(185, 185, 185);
/// Colour of reference lines and their labels.
const REF_COLOR: RGBColor = RGBColor(70, 70, 70);
const TEXT_COLOR: RGBColor = RGBColor(25, 25, 25);

/// The RGB colour (0–255 each) for palette index `index`: Okabe–Ito's eight colour-blind-safe
/// colours, repeating after eight. Index 0 is blue, 1 vermillion, 2 bluish green.
pub fn palette_color(index: usize) -> (u8, u8, u8) {
    PALETTE[index % PALETTE.len()]
}

/// Renders `chart` as an SVG document of `size_px` = (width, height) pixels.
///
/// Text is kept as `<text>` elements naming the `sans-serif` family; layout is measured with
/// the embedded font.
pub fn render_svg(chart: &Chart, size_px: (u32, u32)) -> Result<String, PlotError> {
    let plan = Plan::new(chart, size_px)?;
    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, size_px).into_drawing_area();
        draw(&root, &plan, false)?;
        root.present().map_err(draw_error)?;
    }
    Ok(out)
}

/// Renders `chart` as the bytes of a PNG file (8-bit RGB) of `size_px` = (width, height) pixels.
pub fn render_png(chart: &Chart, size_px: (u32, u32)) -> Result<Vec<u8>, PlotError> {
    let plan = Plan::new(chart, size_px)?;
    let (w, h) = size_px;
    let mut rgb = vec![0u8; w as usize * h as usize * 3];
    {
        let root = BitMapBackend::with_buffer(&mut rgb, size_px).into_drawing_area();
        draw(&root, &plan, true)?;
        root.present().map_err(draw_error)?;
    }
    encode_png(&rgb, w, h)
}

fn encode_png(rgb: &[u8], w: u32, h: u32) -> Result<Vec<u8>, PlotError> {
    let mut bytes = Vec::new();
    {
        let mut encoder = png::Encoder::new(&mut bytes, w, h);
        encoder.set_color(png::ColorType::Rgb);
        encoder.set_depth(png::BitDepth::Eight);
        let enc = |e: png::EncodingError| PlotError::Encode(e.to_string());
        let mut writer = encoder.write_header().map_err(enc)?;
        writer.write_image_data(rgb).map_err(enc)?;
        writer.finish().map_err(enc)?;
    }
    Ok(bytes)
}

fn draw_error<E: std::fmt::Display>(e: E) -> PlotError {
    PlotError::Draw(e.to_string())
}

fn rgb((r, g, b): (u8, u8, u8)) -> RGBColor {
    RGBColor(r, g, b)
}

/// One series ready to draw, in data units.
#[derive(Debug, Clone)]
struct PreparedSeries {
    color: RGBColor,
    /// Stroke width, px (background series 1 px).
    width: u32,
    /// (dash, gap) px of a dashed line.
    dash: Option<(u32, u32)>,
    lines: Vec<Vec<(f64, f64)>>,
    markers: Vec<(f64, f64)>,
}

/// Sizes scaled to the canvas, px.
#[derive(Debug, Clone, Copy)]
struct Metrics {
    title: f64,
    desc: f64,
    tick: f64,
    legend: f64,
    note: f64,
    margin: u32,
    line_w: u32,
    ref_w: u32,
    swatch_w: u32,
    row_h: u32,
    pad: u32,
    /// (dash, gap) of dashed series, px.
    series_dash: (u32, u32),
    /// (dash, gap) of horizontal reference lines, px.
    h_line_dash: (u32, u32),
    /// (dot, gap) of vertical reference lines, px.
    v_line_dots: (u32, u32),
}

impl Metrics {
    fn for_size((w, h): (u32, u32)) -> Metrics {
        let s = (f64::from(w) / 800.0)
            .min(f64::from(h) / 500.0)
            .clamp(0.75, 3.0);
        let px = |v: f64| (v * s).round().max(1.0) as u32;
        let (line_w, ref_w) = (px(2.0), px(1.5));
        let dash = |d: u32| (d, d * 2 / 3);
        let dot = ref_w.max(1) + 1;
        Metrics {
            title: 21.0 * s,
            desc: 17.0 * s,
            tick: 15.0 * s,
            legend: 15.0 * s,
            note: 13.0 * s,
            margin: px(14.0),
            line_w,
            ref_w,
            swatch_w: px(30.0),
            row_h: px(22.0),
            pad: px(8.0),
            series_dash: dash(line_w * 4),
            h_line_dash: dash((f64::from(ref_w) * 4.0).round() as u32),
            v_line_dots: (dot, dot + 1),
        }
    }
}

/// Everything computed before drawing: axes, layout, pieces to draw, legend.
#[derive(Debug, Clone)]
struct Plan {
    size: (u32, u32),
    m: Metrics,
    title: String,
    x_label: String,
    y_label: String,
    x: Axis,
    y: Axis,
    x_label_area: u32,
    y_label_area: u32,
    legend_w: u32,
    legend: Vec<LegendEntry>,
    /// The background series first, then the series, then the reference paths, in drawing
    /// order.
    series: Vec<PreparedSeries>,
    /// (from, to, tint) clipped to the x range.
    x_bands: Vec<(f64, f64, RGBColor)>,
    /// (from, to, tint) clipped to the y range.
    y_bands: Vec<(f64, f64, RGBColor)>,
    h_lines: Vec<(f64, String)>,
    v_lines: Vec<(f64, String)>,
    has_data: bool,
}

impl Plan {
    fn new(chart: &Chart, size: (u32, u32)) -> Result<Plan, PlotError> {
        let (w, h) = size;
        if !(MIN_SIZE_PX..=MAX_SIZE_PX).contains(&w) || !(MIN_SIZE_PX..=MAX_SIZE_PX).contains(&h) {
            return Err(PlotError::InvalidSize {
                width_px: w,
                height_px: h,
            });
        }
        ensure_font()?;
        let m = Metrics::for_size(size);
        let Legend {
            entries: legend,
            tints,
            width: legend_w,
        } = Legend::new(chart, &m, w)?;

        // Axes: ranges from everything that is drawn, unless given.
        let mut xs: Vec<f64> = Vec::new();
        let mut ys: Vec<f64> = Vec::new();
        let all_points = chart
            .series
            .iter()
            .chain(&chart.background)
            .map(|s| &s.points)
            .chain(chart.ref_paths.iter().map(|p| &p.points));
        for points in all_points {
            for &(x, y) in points {
                let x_ok = x.is_finite() && (!chart.log_x || x > 0.0);
                if x_ok && y.is_finite() {
                    xs.push(x);
                    ys.push(y);
                }
            }
        }
        let has_data = !xs.is_empty();
        xs.extend(chart.x_bands.iter().flat_map(|b| [b.from, b.to]));
        xs.extend(chart.v_lines.iter().map(|l| l.at));
        ys.extend(chart.y_bands.iter().flat_map(|b| [b.from, b.to]));
        ys.extend(chart.h_lines.iter().map(|l| l.at));

        let chart_w = w.saturating_sub(legend_w);
        let est_plot_w = f64::from(chart_w) - 2.0 * f64::from(m.margin) - 6.0 * m.tick;
        let est_plot_h = f64::from(h) - 2.0 * f64::from(m.margin) - 2.0 * m.title - 4.0 * m.tick;
        let x_ticks = (est_plot_w / (8.0 * m.tick)).floor().max(2.0) as usize;
        let y_ticks = (est_plot_h / (4.0 * m.tick)).floor().max(2.0) as usize;
        let x = Axis::new(Which::X, chart.x_range, &xs, chart.log_x, x_ticks)?;
        let y = Axis::new(Which::Y, chart.y_range, &ys, false, y_ticks)?;

        let mut tick_w = 0;
        let mut tick_h = text_size("0", m.tick)?.1;
        for &v in y.major_ticks() {
            tick_w = tick_w.max(text_size(&y.format_tick(v), m.tick)?.0);
        }
        for &v in x.major_ticks() {
            tick_h = tick_h.max(text_size(&x.format_tick(v), m.tick)?.1);
        }
        let desc_h = line_height(m.desc);
        let gap = m.pad / 2;
        let tick_px = TICK_PX as u32;
        // Capped so that the plot keeps some room even with absurdly long tick labels (they
        // then run off the left edge instead).
        let y_label_area = (tick_px + gap + tick_w + m.pad + desc_h).min(chart_w * 2 / 5);
        let x_label_area = (tick_px + gap + tick_h + m.pad + desc_h).min(h * 2 / 5);

        let text_room = chart_w.saturating_sub(2 * m.margin);
        let title = fit_text(&chart.title, m.title, text_room)?;
        let x_label = fit_text(
            &chart.x_label,
            m.desc,
            text_room.saturating_sub(y_label_area),
        )?;
        let y_label = fit_text(
            &chart.y_label,
            m.desc,
            h.saturating_sub(2 * m.margin + x_label_area + line_height(m.title) + m.pad),
        )?;

        // Geometry in axis space.
        let (u0, u1) = x.axis_space_bounds();
        let (v0, v1) = y.axis_space_bounds();
        let rect = Rect { u0, u1, v0, v1 };
        // (points, colour, width, dash) in drawing order.
        let dash_of = |dashed: bool, d: (u32, u32)| dashed.then_some(d);
        let background = chart.background.iter().map(|s| {
            let dash = dash_of(s.dashed, (m.series_dash.0 / 2, m.series_dash.1 / 2));
            (&s.points, BACKGROUND_COLOR, 1, dash)
        });
        let front = chart.series.iter().map(|s| {
            let color = rgb(palette_color(s.color));
            (&s.points, color, m.line_w, dash_of(s.dashed, m.series_dash))
        });
        let limits = chart
            .ref_paths
            .iter()
            .map(|p| (&p.points, REF_COLOR, m.ref_w, Some(m.h_line_dash)));
        let series = background
            .chain(front)
            .chain(limits)
            .map(|(points, color, width, dash)| {
                let pts: Vec<(f64, f64)> = points
                    .iter()
                    .map(|&(px, py)| (x.value_to_axis_space(px), y.value_to_axis_space(py)))
                    .collect();
                let pieces = geom::pieces(&pts, &rect);
                let back =
                    |(u, v): (f64, f64)| (x.axis_space_to_value(u), y.axis_space_to_value(v));
                PreparedSeries {
                    color,
                    width,
                    dash,
                    lines: pieces
                        .lines
                        .into_iter()
                        .map(|l| l.into_iter().map(back).collect())
                        .collect(),
                    markers: pieces.markers.into_iter().map(back).collect(),
                }
            })
            .collect();

        let clip_bands = |bands: &[Band], a: &Axis| -> Vec<(f64, f64, RGBColor)> {
            let (lo, hi) = a.bounds();
            bands
                .iter()
                .filter_map(|b| {
                    let (f, t) = (b.from.min(b.to), b.from.max(b.to));
                    if !(f.is_finite() && t.is_finite()) || t < lo || f > hi {
                        return None;
                    }
                    let tint = tints.get(b.label.as_str()).copied().unwrap_or(REF_COLOR);
                    Some((f.max(lo), t.min(hi), tint))
                })
                .collect()
        };
        let x_bands = clip_bands(&chart.x_bands, &x);
        let y_bands = clip_bands(&chart.y_bands, &y);
        let in_range = |lines: &[RefLine], a: &Axis| -> Vec<(f64, String)> {
            let (lo, hi) = a.bounds();
            lines
                .iter()
                .filter(|l| l.at.is_finite() && l.at >= lo && l.at <= hi)
                .map(|l| (l.at, l.label.clone()))
                .collect()
        };
        let h_lines = in_range(&chart.h_lines, &y);
        let v_lines = in_range(&chart.v_lines, &x);

        Ok(Plan {
            size,
            m,
            title,
            x_label,
            y_label,
            x,
            y,
            x_label_area,
            y_label_area,
            legend_w,
            legend,
            series,
            x_bands,
            y_bands,
            h_lines,
            v_lines,
            has_data,
        })
    }
}

fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    plan: &Plan,
    per_glyph: bool,
) -> Result<(), PlotError> {
    let m = &plan.m;
    let text = |t: &str, pos, size, color, anchor, rotate| {
        put_text(root, per_glyph, t, pos, size, color, anchor, rotate)
    };
    root.fill(&WHITE).map_err(draw_error)?;
    let (w, h) = plan.size;
    let chart_w = w - plan.legend_w;
    let (chart_area, _) = root.split_horizontally(chart_w);

    let title_h = if plan.title.is_empty() {
        0
    } else {
        line_height(m.title) + m.pad
    };
    let mut chart = ChartBuilder::on(&chart_area)
        .margin(m.margin)
        .margin_top(m.margin + title_h)
        .margin_right(if plan.legend_w > 0 { m.pad } else { m.margin })
        .x_label_area_size(plan.x_label_area)
        .y_label_area_size(plan.y_label_area)
        .build_cartesian_2d(plan.x.clone(), plan.y.clone())
        .map_err(draw_error)?;
    let (xlo, xhi) = plan.x.bounds();
    let (ylo, yhi) = plan.y.bounds();

    // Bands under everything.
    let x_spans = plan
        .x_bands
        .iter()
        .map(|&(f, t, tint)| ([(f, ylo), (t, yhi)], tint));
    let y_spans = plan
        .y_bands
        .iter()
        .map(|&(f, t, tint)| ([(xlo, f), (xhi, t)], tint));
    for (corners, tint) in x_spans.chain(y_spans) {
        let fill = tint.mix(BAND_ALPHA).filled();
        chart
            .draw_series(std::iter::once(Rectangle::new(corners, fill)))
            .map_err(draw_error)?;
    }

    // Grid only; axes, ticks and their labels are drawn below so text is placed by our metrics.
    chart
        .configure_mesh()
        .disable_axes()
        .bold_line_style(BLACK.mix(0.12).stroke_width(1))
        .light_line_style(BLACK.mix(0.05).stroke_width(1))
        .draw()
        .map_err(draw_error)?;

    let (px, py) = chart.plotting_area().get_pixel_range();
    let (left, right, top, bottom) = (px.start, px.end - 1, py.start, py.end - 1);
    let axis = AXIS_COLOR.stroke_width(1);
    let frame = AXIS_COLOR.mix(0.35).stroke_width(1);
    root.draw(&PathElement::new(
        vec![(left, top), (right, top), (right, bottom)],
        frame,
    ))
    .map_err(draw_error)?;
    root.draw(&PathElement::new(
        vec![(left, top), (left, bottom), (right, bottom)],
        axis,
    ))
    .map_err(draw_error)?;

    // Tick marks and labels.
    let gap = (m.pad / 2) as i32;
    let x_ticks: Vec<(i32, String)> = plan
        .x
        .major_ticks()
        .iter()
        .map(|&v| (chart.backend_coord(&(v, ylo)).0, plan.x.format_tick(v)))
        .collect();
    let every = label_stride(&x_ticks, m.tick, m.pad)?;
    for (i, (x, label)) in x_ticks.iter().enumerate() {
        root.draw(&PathElement::new(
            vec![(*x, bottom), (*x, bottom + TICK_PX)],
            axis,
        ))
        .map_err(draw_error)?;
        if i % every == 0 {
            text(
                label,
                (*x, bottom + TICK_PX + gap),
                m.tick,
                TEXT_COLOR,
                (HPos::Center, VPos::Top),
                false,
            )?;
        }
    }
    for &v in plan.y.major_ticks() {
        let (_, y) = chart.backend_coord(&(xlo, v));
        root.draw(&PathElement::new(
            vec![(left - TICK_PX, y), (left, y)],
            axis,
        ))
        .map_err(draw_error)?;
        let label = plan.y.format_tick(v);
        text(
            &label,
            (left - TICK_PX - gap, y),
            m.tick,
            TEXT_COLOR,
            (HPos::Right, VPos::Center),
            false,
        )?;
    }

    // Title and axis labels.
    let mid_x = (left + right) / 2;
    let mid_y = (top + bottom) / 2;
    text(
        &plan.title,
        (chart_w as i32 / 2, m.margin as i32),
        m.title,
        TEXT_COLOR,
        (HPos::Center, VPos::Top),
        false,
    )?;
    text(
        &plan.x_label,
        (mid_x, h as i32 - m.margin as i32 / 2),
        m.desc,
        TEXT_COLOR,
        (HPos::Center, VPos::Bottom),
        false,
    )?;
    text(
        &plan.y_label,
        (m.margin as i32 / 2, mid_y),
        m.desc,
        TEXT_COLOR,
        (HPos::Center, VPos::Top),
        true,
    )?;

    // Reference lines.
    let ref_style = REF_COLOR.stroke_width(m.ref_w);
    for (at, _) in &plan.h_lines {
        chart
            .draw_series(std::iter::once(DashedPathElement::new(
                vec![(xlo, *at), (xhi, *at)],
                m.h_line_dash.0,
                m.h_line_dash.1,
                ref_style,
            )))
            .map_err(draw_error)?;
    }
    for (at, _) in &plan.v_lines {
        chart
            .draw_series(std::iter::once(DashedPathElement::new(
                vec![(*at, ylo), (*at, yhi)],
                m.v_line_dots.0,
                m.v_line_dots.1,
                ref_style,
            )))
            .map_err(draw_error)?;
    }

    // Series.
    for s in &plan.series {
        let style = s.color.stroke_width(s.width);
        for line in &s.lines {
            if let Some((dash, gap)) = s.dash {
                chart
                    .draw_series(std::iter::once(DashedPathElement::new(
                        line.iter().copied(),
                        dash.max(1),
                        gap.max(1),
                        style,
                    )))
                    .map_err(draw_error)?;
            } else {
                chart
                    .draw_series(std::iter::once(PathElement::new(line.clone(), style)))
                    .map_err(draw_error)?;
            }
        }
        let r = s.width + 2;
        chart
            .draw_series(
                s.markers
                    .iter()
                    .map(|&p| Circle::new(p, r, s.color.filled())),
            )
            .map_err(draw_error)?;
    }

    // Labels of reference lines.
    for (at, label) in &plan.h_lines {
        let (_, y) = chart.backend_coord(&(xlo, *at));
        // Clear of the line's own width (its label is never crossed by it).
        let clear = gap + m.ref_w as i32;
        let near_top = y - top < line_height(m.note) as i32 + 2 * clear;
        let (y, v) = if near_top {
            (y + clear, VPos::Top)
        } else {
            (y - clear, VPos::Bottom)
        };
        text(
            label,
            (right - gap, y),
            m.note,
            REF_COLOR,
            (HPos::Right, v),
            false,
        )?;
    }
    for (at, label) in &plan.v_lines {
        let (x, _) = chart.backend_coord(&(*at, yhi));
        let near_right = right - x < text_size(label, m.note)?.0 as i32 + 2 * gap;
        let (x, hpos) = if near_right {
            (x - gap, HPos::Right)
        } else {
            (x + gap, HPos::Left)
        };
        text(
            label,
            (x, top + gap),
            m.note,
            REF_COLOR,
            (hpos, VPos::Top),
            false,
        )?;
    }

    if !plan.has_data {
        text(
            "no data",
            (mid_x, mid_y),
            m.desc,
            NOTE_GREY,
            (HPos::Center, VPos::Center),
            false,
        )?;
    }

    draw_legend(root, plan, chart_w as i32, top, per_glyph)
}

/// Length of the tick marks outside the plot, px.
const TICK_PX: i32 = 5;
const AXIS_COLOR: RGBColor = RGBColor(90, 90, 90);
const NOTE_GREY: RGBColor = RGBColor(120, 120, 120);

/// Every how many x ticks a label is written so that neighbouring labels do not touch.
fn label_stride(ticks: &[(i32, String)], size: f64, pad: u32) -> Result<usize, PlotError> {
    if ticks.len() < 2 {
        return Ok(1);
    }
    let mut widest = 0;
    for (_, t) in ticks {
        widest = widest.max(text_size(t, size)?.0);
    }
    let spacing = ticks
        .windows(2)
        .map(|p| (p[1].0 - p[0].0).abs())
        .min()
        .unwrap_or(1)
        .max(1);
    let need = (widest + pad) as i32;
    Ok(((need + spacing - 1) / spacing).max(1) as usize)
}
