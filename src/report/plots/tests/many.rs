//! Tests of the renderer for charts with many cases: background lines, limit paths, legend
//! rows, reference labels clear of their lines.

use super::*;

/// Background series are drawn 1 px wide in light grey under the series, and all background
/// series of one name share one legend row: 30 background lines and one prominent case give
/// two series rows, no "+N more".
#[test]
fn background_lines_are_thin_light_and_share_a_legend_row() {
    let background: Vec<Series> = (0..30)
        .map(|k| {
            let y = 0.2 + 0.02 * f64::from(k);
            line("30 other cases", vec![(0.0, y), (1.0, y)], 0)
        })
        .collect();
    let chart = Chart {
        series: vec![line("nominal", vec![(0.0, 0.9), (1.0, 0.9)], 1)],
        background,
        x_range: Some((0.0, 1.0)),
        y_range: Some((0.0, 1.0)),
        ..Chart::default()
    };
    let svg = render_svg(&chart, SIZE).expect("renders");
    assert_eq!(svg.matches("30 other cases").count(), 1, "one legend row");
    assert!(!svg.contains("more"), "no row is cut");
    let img = Image::from_png(&render_png(&chart, SIZE).expect("renders"));
    let grey = (185, 185, 185);
    // Left of the legend: a thin line is one row of grey pixels, not two or more.
    let x_mid = SIZE.0 / 4;
    let grey_rows: Vec<u32> = (0..SIZE.1).filter(|&y| img.near(x_mid, y, grey)).collect();
    assert!(
        grey_rows.len() >= 25,
        "most of 30 lines drawn: {}",
        grey_rows.len()
    );
    let runs_of_two = grey_rows.windows(2).filter(|w| w[1] == w[0] + 1).count();
    assert!(
        runs_of_two <= grey_rows.len() / 3,
        "background lines are 1 px wide: {grey_rows:?}"
    );
    // The prominent line keeps its colour and width (at least 2 rows at 800 × 500).
    let (_, n) = img.best_row_in(palette_color(1), 0..SIZE.0 * 6 / 10);
    assert!(n > 100);
}

/// Pixels (x, y) left of the legend where two renderings differ.
fn changed(a: &Image, b: &Image) -> Vec<(u32, u32)> {
    let mut out = Vec::new();
    for y in 0..a.h {
        for x in 0..a.w * 6 / 10 {
            if a.px(x, y) != b.px(x, y) {
                out.push((x, y));
            }
        }
    }
    out
}

/// A limit path is drawn in the reference colour, dashed, and named in the legend; no pixel of
/// it has a case colour.
#[test]
fn limit_path_is_drawn_in_the_reference_style() {
    let make = |paths: Vec<RefPath>| Chart {
        series: vec![line("case", vec![(0.0, 0.2), (1.0, 0.2)], 0)],
        ref_paths: paths,
        x_range: Some((0.0, 1.0)),
        y_range: Some((0.0, 1.0)),
        ..Chart::default()
    };
    let path = RefPath {
        points: vec![(0.0, 0.7), (1.0, 0.7)],
        label: "limit envelope".into(),
    };
    let with_chart = make(vec![path]);
    let svg = render_svg(&with_chart, SIZE).expect("renders");
    assert!(svg.contains("limit envelope"));
    let with = Image::from_png(&render_png(&with_chart, SIZE).expect("renders"));
    // The same legend (and so the same plot area) without the path's points.
    let no_points = RefPath {
        points: vec![],
        label: "limit envelope".into(),
    };
    let without = Image::from_png(&render_png(&make(vec![no_points]), SIZE).expect("renders"));
    let (_, case_row) = with.best_row_in(palette_color(0), 0..SIZE.0 * 6 / 10);
    let diff = changed(&with, &without);
    // The path's own pixels: on its rows (the legend swatch is right of the plot).
    let rows: Vec<u32> = diff.iter().map(|p| p.1).collect();
    let top = rows.iter().copied().min().expect("the path is drawn");
    let bottom = rows.iter().copied().max().expect("the path is drawn");
    assert!(bottom - top <= 4, "one thin line: rows {top}..={bottom}");
    assert!(f64::from(top) < f64::from(case_row), "above the case line");
    let rgb = (REF_COLOR.0, REF_COLOR.1, REF_COLOR.2);
    let inked: Vec<&(u32, u32)> = diff
        .iter()
        .filter(|&&(x, y)| with.near(x, y, rgb))
        .collect();
    for &&(x, y) in &inked {
        for c in 0..8 {
            let p = with.px(x, y);
            assert_ne!(p, palette_color(c), "case colour {c} at ({x}, {y})");
        }
    }
    // Dashed: the line's best row holds clearly fewer pixels than the plot is wide.
    let row = (top + bottom) / 2;
    let n = inked.iter().filter(|p| p.1 == row).count() as u32;
    let w = SIZE.0 * 6 / 10;
    assert!(n > w / 5 && n < w * 85 / 100, "{n} of {w}");
}

/// A reference line's label is never crossed by its own line: every pixel the label adds lies
/// clear of the rows the line occupies (the label sits above it, or below it near the top).
#[test]
fn reference_labels_are_clear_of_their_lines() {
    for at in [0.5, 0.98, 0.02] {
        // A long series name sets the legend's width, so the label's legend row does not
        // change the plot area.
        let make = |lines: Vec<RefLine>| Chart {
            series: vec![line(
                "a series name longer than the label, for the width",
                vec![(0.0, 0.3), (0.2, 0.3)],
                0,
            )],
            h_lines: lines,
            x_range: Some((0.0, 1.0)),
            y_range: Some((0.0, 1.0)),
            ..Chart::default()
        };
        let line_with = |label: &str| RefLine {
            at,
            label: label.into(),
        };
        let png = |c: &Chart| Image::from_png(&render_png(c, SIZE).expect("renders"));
        let labelled = png(&make(vec![line_with("peak max 5.5 g, jpqy")]));
        let bare = png(&make(vec![line_with("")]));
        let none = png(&make(vec![]));
        let line_rows: Vec<u32> = changed(&bare, &none).iter().map(|p| p.1).collect();
        let (lo, hi) = (
            line_rows.iter().copied().min().expect("line drawn"),
            line_rows.iter().copied().max().expect("line drawn"),
        );
        let added = changed(&labelled, &bare);
        assert!(added.len() > 50, "the label is drawn ({} px)", added.len());
        for &(x, y) in &added {
            assert!(
                y + 1 < lo || y > hi + 1,
                "label pixel ({x}, {y}) on the line's rows {lo}..={hi} (line at {at})"
            );
        }
    }
}

/// A series name with a line break gives further legend rows of the same entry.
#[test]
fn multi_line_names_give_further_legend_rows() {
    let chart = Chart {
        series: vec![line(
            "empty (nominal)\nworst exit_speed_min",
            vec![(0.0, 0.5), (1.0, 0.6)],
            1,
        )],
        ..Chart::default()
    };
    let svg = render_svg(&chart, SIZE).expect("renders");
    assert!(svg.contains("empty (nominal)"));
    assert!(svg.contains("worst exit_speed_min"));
}
