//! Tests of the chart renderer: file formats against their specifications, ink where the data
//! maps, text present, determinism, and no panic on degenerate input.

use super::*;
use proptest::prelude::*;

/// Many cases: background lines, limit paths, legend rows, labels off their lines.
mod many;

const SIZE: (u32, u32) = (800, 500);

/// Decodes PNG bytes with the `png` crate (an independent decoder of the format) into RGB8.
fn decode(bytes: &[u8]) -> (u32, u32, Vec<u8>) {
    let decoder = png::Decoder::new(std::io::Cursor::new(bytes));
    let mut reader = decoder.read_info().expect("the PNG must decode");
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader
        .next_frame(&mut buf)
        .expect("the PNG must have a frame");
    assert_eq!(info.color_type, png::ColorType::Rgb);
    assert_eq!(info.bit_depth, png::BitDepth::Eight);
    buf.truncate(info.buffer_size());
    (info.width, info.height, buf)
}

struct Image {
    w: u32,
    h: u32,
    rgb: Vec<u8>,
}

impl Image {
    fn from_png(bytes: &[u8]) -> Image {
        let (w, h, rgb) = decode(bytes);
        Image { w, h, rgb }
    }
    fn px(&self, x: u32, y: u32) -> (u8, u8, u8) {
        let i = (y as usize * self.w as usize + x as usize) * 3;
        (self.rgb[i], self.rgb[i + 1], self.rgb[i + 2])
    }
    /// Pixel within 30 per channel of `c` (lines are drawn in their exact colour; the margin
    /// allows for blending at line ends).
    fn near(&self, x: u32, y: u32, c: (u8, u8, u8)) -> bool {
        let p = self.px(x, y);
        let d = |a: u8, b: u8| (i32::from(a) - i32::from(b)).abs() <= 30;
        d(p.0, c.0) && d(p.1, c.1) && d(p.2, c.2)
    }
    fn row_count(&self, y: u32, c: (u8, u8, u8)) -> u32 {
        (0..self.w).filter(|&x| self.near(x, y, c)).count() as u32
    }
    fn col_count(&self, x: u32, c: (u8, u8, u8)) -> u32 {
        (0..self.h).filter(|&y| self.near(x, y, c)).count() as u32
    }
    /// Centre of the band of rows holding the most pixels of colour `c`, and that count.
    fn best_row(&self, c: (u8, u8, u8)) -> (f64, u32) {
        let counts: Vec<u32> = (0..self.h).map(|y| self.row_count(y, c)).collect();
        centre_of_max(&counts)
    }
    /// As [`Image::best_row`], counting only the columns in `xs`.
    fn best_row_in(&self, c: (u8, u8, u8), xs: std::ops::Range<u32>) -> (f64, u32) {
        let counts: Vec<u32> = (0..self.h)
            .map(|y| xs.clone().filter(|&x| self.near(x, y, c)).count() as u32)
            .collect();
        centre_of_max(&counts)
    }
    fn best_col(&self, c: (u8, u8, u8)) -> (f64, u32) {
        let counts: Vec<u32> = (0..self.w).map(|x| self.col_count(x, c)).collect();
        centre_of_max(&counts)
    }
    fn non_white(&self) -> usize {
        self.rgb.chunks(3).filter(|p| p != &[255, 255, 255]).count()
    }
    /// Dark pixels (every channel below 110: text and black ink) in a rectangle.
    fn dark_in(&self, xs: std::ops::Range<u32>, ys: std::ops::Range<u32>) -> usize {
        let mut n = 0;
        for y in ys {
            for x in xs.clone() {
                let p = self.px(x, y);
                if p.0 < 110 && p.1 < 110 && p.2 < 110 {
                    n += 1;
                }
            }
        }
        n
    }
}

/// Mean index of the entries equal to the maximum (a thick line covers several rows).
fn centre_of_max(counts: &[u32]) -> (f64, u32) {
    let max = counts.iter().copied().max().unwrap_or(0);
    let idx: Vec<usize> = (0..counts.len()).filter(|&i| counts[i] == max).collect();
    let mean = idx.iter().sum::<usize>() as f64 / idx.len().max(1) as f64;
    (mean, max)
}

fn line(name: &str, points: Vec<(f64, f64)>, color: usize) -> Series {
    Series {
        name: name.into(),
        points,
        color,
        dashed: false,
    }
}

fn sample_chart() -> Chart {
    let speeds: Vec<(f64, f64)> = (0..=50)
        .map(|i| {
            let x = f64::from(i) * 0.5;
            (x, 30.0 * (-x / 12.0).exp())
        })
        .collect();
    let fundamental: Vec<(f64, f64)> = speeds.iter().map(|&(x, v)| (x, v * 0.9 + 1.0)).collect();
    Chart {
        title: "Speed along the brake run & limits".into(),
        x_label: "position along the track (m)".into(),
        y_label: "speed (m/s)".into(),
        series: vec![
            line("case A: harmonic sum", speeds, 0),
            Series {
                name: "case A: fundamental".into(),
                points: fundamental,
                color: 1,
                dashed: true,
            },
        ],
        x_bands: vec![
            Band {
                from: 2.0,
                to: 8.0,
                label: "magnet section 1".into(),
            },
            Band {
                from: 12.0,
                to: 20.0,
                label: "magnet section 2".into(),
            },
        ],
        y_bands: vec![Band {
            from: 4.0,
            to: 7.0,
            label: "exit-speed window".into(),
        }],
        h_lines: vec![RefLine {
            at: 25.0,
            label: "max entry speed".into(),
        }],
        v_lines: vec![RefLine {
            at: 22.0,
            label: "end of zone".into(),
        }],
        x_range: None,
        y_range: None,
        log_x: false,
        background: vec![],
        ref_paths: vec![],
    }
}

// ---------------------------------------------------------------------------------------------
// Palette

/// Okabe & Ito (2008), "Color Universal Design", and Wong, Nature Methods 8:441 (2011), list the
/// eight colours as RGB 0–255: black 0,0,0; orange 230,159,0; sky blue 86,180,233; bluish green
/// 0,158,115; yellow 240,228,66; blue 0,114,178; vermillion 213,94,0; reddish purple 204,121,167.
/// Exact match (tolerance 0).
#[test]
fn palette_is_the_okabe_ito_set() {
    let published: [(u8, u8, u8); 8] = [
        (0, 0, 0),
        (230, 159, 0),
        (86, 180, 233),
        (0, 158, 115),
        (240, 228, 66),
        (0, 114, 178),
        (213, 94, 0),
        (204, 121, 167),
    ];
    let mut ours: Vec<(u8, u8, u8)> = (0..8).map(palette_color).collect();
    let mut theirs = published.to_vec();
    ours.sort_unstable();
    theirs.sort_unstable();
    assert_eq!(
        ours, theirs,
        "the first eight indices are the eight published colours"
    );
    for i in 0..8 {
        assert_eq!(
            palette_color(i),
            palette_color(i + 8),
            "repeats after eight"
        );
    }
    // Yellow has poor contrast on white, so it must not be among the first colours used.
    assert_eq!(palette_color(7), (240, 228, 66));
}

// ---------------------------------------------------------------------------------------------
// PNG format

/// PNG signature and IHDR layout from the PNG specification (W3C / ISO/IEC 15948:2004, §5.2
/// and §11.2.2): 8 signature bytes 137 80 78 71 13 10 26 10, then a chunk of length 13 named
/// "IHDR" holding width and height as big-endian u32. Exact match.
#[test]
fn png_has_signature_and_ihdr_with_requested_size() {
    let bytes = render_png(&sample_chart(), (640, 360)).expect("renders");
    assert_eq!(&bytes[..8], &[137, 80, 78, 71, 13, 10, 26, 10]);
    assert_eq!(&bytes[8..12], &13u32.to_be_bytes());
    assert_eq!(&bytes[12..16], b"IHDR");
    assert_eq!(&bytes[16..20], &640u32.to_be_bytes());
    assert_eq!(&bytes[20..24], &360u32.to_be_bytes());
    let img = Image::from_png(&bytes);
    assert_eq!((img.w, img.h), (640, 360));
    // Not blank: axes, text, bands and lines cover well over 2 % of the canvas.
    assert!(
        img.non_white() > (640 * 360) / 50,
        "non-white pixels: {}",
        img.non_white()
    );
}

// ---------------------------------------------------------------------------------------------
// Ink where the data maps

/// Three horizontal series at y = 0.25, 0.5, 0.75 on an explicit 0–1 y range. A linear axis maps
/// equal data steps to equal pixel steps (definition of a linear scale), and y grows upwards, so
/// the row of 0.5 lies halfway between the rows of 0.25 and 0.75 (tolerance 1.5 px, for rounding
/// of each line to whole pixels) and above the row of 0.25. Each line must cover at least half
/// the image width in its own colour.
#[test]
fn horizontal_lines_land_on_linearly_spaced_rows() {
    let chart = Chart {
        title: "rows".into(),
        x_label: "x (m)".into(),
        y_label: "y (m)".into(),
        series: vec![
            line("quarter", vec![(0.0, 0.25), (1.0, 0.25)], 0),
            line("half", vec![(0.0, 0.5), (1.0, 0.5)], 1),
            line("three quarters", vec![(0.0, 0.75), (1.0, 0.75)], 2),
        ],
        x_range: Some((0.0, 1.0)),
        y_range: Some((0.0, 1.0)),
        ..Chart::default()
    };
    let img = Image::from_png(&render_png(&chart, SIZE).expect("renders"));
    let (r25, n25) = img.best_row(palette_color(0));
    let (r50, n50) = img.best_row(palette_color(1));
    let (r75, n75) = img.best_row(palette_color(2));
    for n in [n25, n50, n75] {
        assert!(
            n > SIZE.0 / 2,
            "a full-width line covers more than half the width: {n}"
        );
    }
    assert!(
        r25 > r50 && r50 > r75,
        "rows {r25} {r50} {r75}: y grows upwards"
    );
    assert!(
        (r50 - (r25 + r75) / 2.0).abs() <= 1.5,
        "row of 0.5 = {r50}, midpoint of 0.25/0.75 rows = {}",
        (r25 + r75) / 2.0
    );
    // The plot area spans most of the height: 0.25→0.75 is half of it.
    assert!(r25 - r75 > f64::from(SIZE.1) * 0.25);
}

/// On a log₁₀ x axis, log10(20) is the midpoint of log10(2) and log10(200), so the column of a
/// vertical line at x = 20 is halfway between those at 2 and 200 (tolerance 1.5 px). On a linear
/// axis it would sit at 0.09 of the way instead, so the check fails if the axis is not
/// logarithmic.
#[test]
fn vertical_lines_land_on_log_spaced_columns() {
    let vline = |x: f64, c: usize| line(&format!("x = {x}"), vec![(x, 0.0), (x, 1.0)], c);
    let chart = Chart {
        title: "columns".into(),
        x_label: "frequency (Hz)".into(),
        y_label: "y (1)".into(),
        series: vec![vline(2.0, 0), vline(20.0, 1), vline(200.0, 2)],
        x_range: Some((1.0, 1000.0)),
        y_range: Some((0.0, 1.0)),
        log_x: true,
        ..Chart::default()
    };
    let img = Image::from_png(&render_png(&chart, SIZE).expect("renders"));
    let (c2, n2) = img.best_col(palette_color(0));
    let (c20, _) = img.best_col(palette_color(1));
    let (c200, _) = img.best_col(palette_color(2));
    assert!(
        n2 > SIZE.1 / 2,
        "a full-height line covers more than half the height: {n2}"
    );
    assert!(c2 < c20 && c20 < c200);
    assert!(
        (c20 - (c2 + c200) / 2.0).abs() <= 1.5,
        "column of 20 = {c20}, midpoint = {}",
        (c2 + c200) / 2.0
    );
}

/// A single point is drawn as a dot of its series colour near the plot centre (the range comes
/// from the data, widened around the lone value, so the point maps to the middle half).
#[test]
fn single_point_is_drawn_as_a_dot() {
    let chart = Chart {
        series: vec![line("one", vec![(3.0, 7.0)], 1)],
        ..Chart::default()
    };
    let img = Image::from_png(&render_png(&chart, SIZE).expect("renders"));
    // The legend (its swatch is a short line of the same colour) takes at most 38 % of the width
    // on the right; look left of it.
    let (row, n_row) = img.best_row_in(palette_color(1), 0..SIZE.0 * 6 / 10);
    let (col, _) = img.best_col(palette_color(1));
    assert!(n_row >= 3, "the dot is a few pixels wide: {n_row}");
    assert!(row > f64::from(SIZE.1) / 4.0 && row < f64::from(SIZE.1) * 3.0 / 4.0);
    assert!(col > f64::from(SIZE.0) / 4.0 && col < f64::from(SIZE.0) * 3.0 / 4.0);
}

/// Dashed series leave gaps: along its row a dashed line has clearly fewer pixels of its colour
/// than the same line solid, yet still more than a quarter of them.
#[test]
fn dashed_series_is_broken() {
    let make = |dashed| Chart {
        series: vec![Series {
            name: "s".into(),
            points: vec![(0.0, 0.5), (1.0, 0.5)],
            color: 0,
            dashed,
        }],
        x_range: Some((0.0, 1.0)),
        y_range: Some((0.0, 1.0)),
        ..Chart::default()
    };
    let solid = Image::from_png(&render_png(&make(false), SIZE).expect("renders"));
    let dashed = Image::from_png(&render_png(&make(true), SIZE).expect("renders"));
    let (_, n_solid) = solid.best_row(palette_color(0));
    let (_, n_dashed) = dashed.best_row(palette_color(0));
    assert!(
        n_dashed < n_solid * 85 / 100,
        "dashed {n_dashed} vs solid {n_solid}"
    );
    assert!(
        n_dashed > n_solid / 4,
        "dashed {n_dashed} vs solid {n_solid}"
    );
}

/// The title is drawn with the embedded font: the top strip above the plot, middle third of the
/// width, holds dark text pixels when there is a title and none without one.
#[test]
fn title_text_is_inked() {
    let with = Chart {
        title: "Braking force against speed".into(),
        series: vec![line("F", vec![(0.0, 0.0), (10.0, 5.0)], 0)],
        ..Chart::default()
    };
    let without = Chart {
        title: String::new(),
        ..with.clone()
    };
    let m = Metrics::for_size(SIZE);
    let strip_h = m.margin + (m.title * 0.8) as u32;
    let xs = SIZE.0 / 3..SIZE.0 * 2 / 3;
    let a = Image::from_png(&render_png(&with, SIZE).expect("renders"));
    let b = Image::from_png(&render_png(&without, SIZE).expect("renders"));
    assert!(
        a.dark_in(xs.clone(), 0..strip_h) > 100,
        "title ink: {}",
        a.dark_in(xs.clone(), 0..strip_h)
    );
    assert_eq!(b.dark_in(xs, 0..strip_h), 0);
}

// ---------------------------------------------------------------------------------------------
// SVG

#[test]
fn svg_names_title_axes_legend_and_draws_each_series() {
    let chart = sample_chart();
    let svg = render_svg(&chart, SIZE).expect("renders");
    assert!(svg.starts_with("<svg"), "{}", &svg[..svg.len().min(80)]);
    assert!(svg.trim_end().ends_with("</svg>"));
    // Text is XML-escaped (XML 1.0 §2.4: '&' must be written as "&amp;").
    assert!(svg.contains("Speed along the brake run &amp; limits"));
    for text in [
        "position along the track (m)",
        "speed (m/s)",
        "case A: harmonic sum",
        "case A: fundamental",
        "magnet section 1",
        "magnet section 2",
        "exit-speed window",
        "max entry speed",
        "end of zone",
    ] {
        // plotters-svg writes each text element as `<text …>\n{text}\n</text>`.
        assert!(
            svg.contains(&format!(">\n{text}\n</text>")),
            "missing text {text:?}"
        );
    }
    // Every series colour appears as the stroke of a polyline.
    for s in &chart.series {
        let (r, g, b) = palette_color(s.color);
        let stroke = format!("stroke=\"#{r:02X}{g:02X}{b:02X}\"");
        let found = svg
            .split('<')
            .any(|tag| tag.starts_with("polyline") && tag.contains(&stroke));
        assert!(found, "no polyline with {stroke}");
    }
    assert!(svg.contains("font-family=\"sans-serif\""));
}

// ---------------------------------------------------------------------------------------------
// Determinism

#[test]
fn same_chart_gives_identical_bytes() {
    let chart = sample_chart();
    assert_eq!(
        render_png(&chart, SIZE).expect("renders"),
        render_png(&chart, SIZE).expect("renders")
    );
    assert_eq!(
        render_svg(&chart, SIZE).expect("renders"),
        render_svg(&chart, SIZE).expect("renders")
    );
    let mut other = chart.clone();
    other.series[0].points[3].1 += 5.0;
    assert_ne!(
        render_png(&chart, SIZE).expect("renders"),
        render_png(&other, SIZE).expect("renders"),
        "a different chart gives different bytes"
    );
}

// ---------------------------------------------------------------------------------------------
// Degenerate input

fn both(chart: &Chart) -> Result<(), PlotError> {
    let png = render_png(chart, (400, 300))?;
    let img = Image::from_png(&png);
    assert_eq!((img.w, img.h), (400, 300));
    let svg = render_svg(chart, (400, 300))?;
    assert!(svg.contains("</svg>"));
    Ok(())
}

#[test]
fn degenerate_inputs_render() {
    let base = Chart {
        title: "t".into(),
        x_label: "x (m)".into(),
        y_label: "y (m)".into(),
        ..Chart::default()
    };
    let with = |series: Vec<Series>| Chart {
        series,
        ..base.clone()
    };
    let cases: Vec<(&str, Chart)> = vec![
        ("empty chart", base.clone()),
        ("empty series", with(vec![line("none", vec![], 0)])),
        (
            "only non-finite points",
            with(vec![line(
                "bad",
                vec![
                    (f64::NAN, 1.0),
                    (1.0, f64::INFINITY),
                    (f64::NEG_INFINITY, f64::NAN),
                ],
                0,
            )]),
        ),
        (
            "mixed NaN",
            with(vec![line(
                "gappy",
                vec![(0.0, 1.0), (1.0, f64::NAN), (2.0, 3.0), (3.0, 2.0)],
                3,
            )]),
        ),
        ("single point", with(vec![line("p", vec![(1.0, 2.0)], 0)])),
        (
            "identical x",
            with(vec![line("v", vec![(2.0, 1.0), (2.0, 5.0), (2.0, 3.0)], 0)]),
        ),
        (
            "all-equal y",
            with(vec![line("h", vec![(0.0, 4.0), (1.0, 4.0), (2.0, 4.0)], 0)]),
        ),
        (
            "all the same point",
            with(vec![line("s", vec![(1.0, 1.0); 5], 0)]),
        ),
        (
            "zero everywhere",
            with(vec![line("z", vec![(0.0, 0.0), (0.0, 0.0)], 0)]),
        ),
        (
            "huge values",
            with(vec![line(
                "big",
                vec![(-f64::MAX, f64::MAX), (f64::MAX, -f64::MAX)],
                0,
            )]),
        ),
        (
            "tiny values",
            with(vec![line(
                "small",
                vec![(0.0, 5e-324), (1e-310, 1e-320)],
                0,
            )]),
        ),
        (
            "large offset",
            with(vec![line("o", vec![(1e12, 1e12), (1e12 + 1e-3, 1e12)], 0)]),
        ),
        (
            "high palette index",
            with(vec![line("c", vec![(0.0, 0.0), (1.0, 1.0)], usize::MAX)]),
        ),
        (
            "log x with non-positive x",
            Chart {
                log_x: true,
                ..with(vec![line(
                    "l",
                    vec![(-1.0, 1.0), (0.0, 2.0), (10.0, 3.0), (100.0, 1.0)],
                    0,
                )])
            },
        ),
        (
            "log x with nothing positive",
            Chart {
                log_x: true,
                x_bands: vec![Band {
                    from: -5.0,
                    to: 0.0,
                    label: "neg".into(),
                }],
                ..with(vec![line("l", vec![(-1.0, 1.0), (0.0, 2.0)], 0)])
            },
        ),
        (
            "bad bands and lines",
            Chart {
                x_bands: vec![
                    Band {
                        from: f64::NAN,
                        to: 1.0,
                        label: "nan".into(),
                    },
                    Band {
                        from: 5.0,
                        to: 1.0,
                        label: String::new(),
                    },
                ],
                y_bands: vec![Band {
                    from: f64::NEG_INFINITY,
                    to: f64::INFINITY,
                    label: "inf".into(),
                }],
                h_lines: vec![RefLine {
                    at: f64::NAN,
                    label: "nan line".into(),
                }],
                v_lines: vec![RefLine {
                    at: f64::INFINITY,
                    label: "inf line".into(),
                }],
                ..with(vec![line("a", vec![(0.0, 0.0), (1.0, 1.0)], 0)])
            },
        ),
        (
            "data outside an explicit range",
            Chart {
                x_range: Some((10.0, 20.0)),
                y_range: Some((10.0, 20.0)),
                h_lines: vec![RefLine {
                    at: 100.0,
                    label: "off".into(),
                }],
                ..with(vec![line("a", vec![(0.0, 0.0), (1.0, 1.0)], 0)])
            },
        ),
        (
            "very long texts",
            Chart {
                title: "T".repeat(500),
                x_label: "x".repeat(500),
                y_label: "y".repeat(500),
                ..with(vec![line(
                    &"n".repeat(500),
                    vec![(0.0, 0.0), (1.0, 1.0)],
                    0,
                )])
            },
        ),
        (
            "many legend entries",
            with(
                (0..60)
                    .map(|i| {
                        line(
                            &format!("case {i}"),
                            vec![(0.0, f64::from(i)), (1.0, 0.0)],
                            i as usize,
                        )
                    })
                    .collect(),
            ),
        ),
    ];
    for (what, chart) in cases {
        both(&chart).unwrap_or_else(|e| panic!("{what}: expected a chart, got {e}"));
    }
}

#[test]
fn invalid_ranges_and_sizes_are_errors() {
    let series = vec![line("a", vec![(1.0, 1.0), (2.0, 2.0)], 0)];
    let bad_ranges = [
        (Some((1.0, 1.0)), None, false),
        (Some((2.0, 1.0)), None, false),
        (None, Some((f64::NAN, 1.0)), false),
        (None, Some((0.0, f64::INFINITY)), false),
        (Some((0.0, 10.0)), None, true),
        (Some((-1.0, 10.0)), None, true),
    ];
    for (x_range, y_range, log_x) in bad_ranges {
        let chart = Chart {
            series: series.clone(),
            x_range,
            y_range,
            log_x,
            ..Chart::default()
        };
        for result in [
            render_png(&chart, SIZE).map(|_| ()),
            render_svg(&chart, SIZE).map(|_| ()),
        ] {
            assert!(
                matches!(result, Err(PlotError::InvalidRange { .. })),
                "{x_range:?} {y_range:?} log {log_x}: {result:?}"
            );
        }
    }
    let chart = Chart {
        series,
        ..Chart::default()
    };
    for size in [(0, 0), (199, 500), (800, 10), (MAX_SIZE_PX + 1, 500)] {
        assert!(matches!(
            render_png(&chart, size),
            Err(PlotError::InvalidSize { .. })
        ));
        assert!(matches!(
            render_svg(&chart, size),
            Err(PlotError::InvalidSize { .. })
        ));
    }
    assert!(render_png(&chart, (MIN_SIZE_PX, MIN_SIZE_PX)).is_ok());
}

fn any_f64() -> impl Strategy<Value = f64> {
    prop_oneof![
        6 => -100.0..100.0f64,
        1 => Just(f64::NAN),
        1 => Just(f64::INFINITY),
        1 => Just(f64::NEG_INFINITY),
        1 => Just(0.0),
        1 => any::<f64>(),
    ]
}

fn any_series() -> impl Strategy<Value = Series> {
    (
        prop::collection::vec((any_f64(), any_f64()), 0..12),
        0usize..20,
        any::<bool>(),
        "[a-z ]{0,12}",
    )
        .prop_map(|(points, color, dashed, name)| Series {
            name,
            points,
            color,
            dashed,
        })
}

fn any_range() -> impl Strategy<Value = Option<(f64, f64)>> {
    prop_oneof![3 => Just(None), 1 => (any_f64(), any_f64()).prop_map(Some)]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]
    /// Arbitrary charts, including NaN, infinities and f64 extremes, render or give a
    /// `PlotError`; they never panic, and a rendered PNG decodes at the requested size.
    #[test]
    fn arbitrary_charts_never_panic(
        series in prop::collection::vec(any_series(), 0..4),
        background in prop::collection::vec(any_series(), 0..3),
        paths in prop::collection::vec(any_series(), 0..2),
        bands in prop::collection::vec((any_f64(), any_f64()), 0..3),
        lines in prop::collection::vec(any_f64(), 0..3),
        x_range in any_range(),
        y_range in any_range(),
        log_x in any::<bool>(),
        w in 200u32..420,
        h in 200u32..320,
    ) {
        let chart = Chart {
            title: "p".into(),
            x_label: "x".into(),
            y_label: "y".into(),
            series,
            x_bands: bands.iter().map(|&(from, to)| Band { from, to, label: "b".into() }).collect(),
            y_bands: bands.iter().map(|&(from, to)| Band { from, to, label: "c".into() }).collect(),
            h_lines: lines.iter().map(|&at| RefLine { at, label: "h".into() }).collect(),
            v_lines: lines.iter().map(|&at| RefLine { at, label: "v".into() }).collect(),
            x_range,
            y_range,
            log_x,
            background,
            ref_paths: paths
                .into_iter()
                .map(|p| RefPath { points: p.points, label: p.name })
                .collect(),
        };
        match render_png(&chart, (w, h)) {
            Ok(bytes) => {
                let img = Image::from_png(&bytes);
                prop_assert_eq!((img.w, img.h), (w, h));
            }
            Err(e) => prop_assert!(matches!(e, PlotError::InvalidRange { .. }), "{e}"),
        }
        let svg = render_svg(&chart, (w, h));
        let svg_ok = svg.is_ok() || matches!(svg, Err(PlotError::InvalidRange { .. }));
        prop_assert!(svg_ok, "{:?}", svg.err());
    }
}
