//! The report's figures with dozens of cases (the tower demo: 3 listed cases and 24 N−1 cases):
//! the nominal cases and the worst case of each check the figure shows are drawn in colour and
//! named as such, the rest are background lines under one legend row; limits are drawn in a
//! style no case uses; every line of the track-fin figure names its fin; no legend is cut.
//! The worst cases come from the verdict (`checks::limits`), which these tests do not recompute.

// A test may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use eddyzone::dynamics::{RunOptions, Sampling};
use eddyzone::report::emphasis::CASE_COLORS;
use eddyzone::report::figures::{all_figures, Figure};
use eddyzone::report::plots::{palette_color, render_svg};
use eddyzone::scenario::{load, Mount};
use eddyzone::study::{HeatDemand, JudgeOptions, Judgement, Silent, Study};
use std::path::Path;

fn tower() -> (Study, Judgement, Vec<Figure>) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenarios/tower-catch-brake.yaml");
    let study = Study::new(load(&path).unwrap()).unwrap();
    let options = JudgeOptions {
        run: RunOptions {
            sampling: Sampling::Full,
            ..RunOptions::default()
        },
        heat: HeatDemand::Always,
    };
    let judged = study.judge(&options, &Silent).unwrap();
    let curves = study.default_curves().unwrap();
    let figs = all_figures(
        study.scenario(),
        &judged.runs,
        &curves,
        &judged.heat,
        &judged.verdict,
    );
    (study, judged, figs)
}

fn figure<'a>(figs: &'a [Figure], id: &str) -> &'a Figure {
    figs.iter()
        .find(|f| f.id == id)
        .unwrap_or_else(|| panic!("figure {id}"))
}

#[test]
fn dozens_of_cases_read_as_nominal_worst_and_background() {
    let (study, judged, figs) = tower();
    let s = study.scenario();
    assert_eq!(s.cases.len(), 27, "the demo has 27 cases");
    // The figure of each check family, by the check's name.
    let figure_of = |check: &str| -> Option<&str> {
        [
            ("exit_speed", "speed-position"),
            ("peak_", "felt-acceleration"),
            ("onset", "felt-acceleration"),
            ("release", "felt-acceleration"),
            ("envelope", "sustained-acceleration"),
            ("fin_temperature", "fin-temperature-track"),
        ]
        .iter()
        .find(|(p, _)| check.starts_with(p))
        .map(|(_, id)| *id)
    };
    let mut labelled = 0;
    for w in &judged.verdict.worst {
        let Some(id) = figure_of(&w.check) else {
            continue;
        };
        let f = figure(&figs, id);
        let named = f.chart.series.iter().any(|x| {
            x.name.starts_with(w.case.as_str()) && x.name.contains(&format!("worst {}", w.check))
        });
        assert!(
            named,
            "{id}: worst case '{}' of {} not labelled",
            w.case, w.check
        );
        labelled += 1;
    }
    assert!(labelled >= 6, "the demo's checks have figures: {labelled}");
    for f in figs.iter().filter(|f| !f.id.starts_with("force-speed")) {
        let c = &f.chart;
        // Every listed case is drawn prominently and says it is nominal.
        for case in ["full", "empty", "full-hot"] {
            let prominent = c
                .series
                .iter()
                .any(|x| x.name.starts_with(&format!("{case} (nominal)")));
            assert!(prominent, "{}: nominal '{case}' not named", f.id);
        }
        // Few coloured lines, the rest in the background under one legend row (per fin).
        assert!(c.series.len() <= 12, "{}: {} series", f.id, c.series.len());
        assert!(c.background.len() >= 20, "{}: background", f.id);
        let mut names: Vec<&str> = c.background.iter().map(|x| x.name.as_str()).collect();
        names.sort_unstable();
        names.dedup();
        assert!(names.len() <= 2, "{}: background rows {names:?}", f.id);
        // Case colours only: never black or yellow, never the limits' style.
        for x in &c.series {
            assert!(
                CASE_COLORS.contains(&x.color),
                "{}: colour {}",
                f.id,
                x.color
            );
            let (r, g, b) = palette_color(x.color);
            assert!(
                i32::from(r.abs_diff(g)) + i32::from(g.abs_diff(b)) + i32::from(r.abs_diff(b)) > 60,
                "{}: case colour {:?} is a grey like the limits",
                f.id,
                (r, g, b)
            );
            assert!(
                !x.name.contains("limit"),
                "{}: a limit drawn as a case",
                f.id
            );
        }
        // No legend is cut.
        let svg = render_svg(c, (960, 540)).unwrap();
        assert!(!svg.contains(" more<"), "{}: legend cut", f.id);
    }
    // The limit envelope is a limit path, not a case-styled series.
    let sus = &figure(&figs, "sustained-acceleration").chart;
    assert_eq!(sus.ref_paths.len(), 1);
    // A prominent case has the same colour in every figure.
    for case in ["full", "empty", "full-hot"] {
        let colours: Vec<usize> = figs
            .iter()
            .flat_map(|f| &f.chart.series)
            .filter(|x| x.name.starts_with(&format!("{case} ")) && !x.name.contains("model"))
            .map(|x| x.color)
            .collect();
        assert!(
            colours.windows(2).all(|w| w[0] == w[1]),
            "{case}: {colours:?}"
        );
    }
}

#[test]
fn every_line_of_the_track_fin_figure_names_its_fin() {
    let (study, _, figs) = tower();
    let fins: Vec<&str> = study
        .scenario()
        .fins
        .iter()
        .filter(|f| matches!(f.mount, Mount::Track { .. }))
        .map(|f| f.name.as_str())
        .collect();
    assert_eq!(fins.len(), 2);
    let c = &figure(&figs, "fin-temperature-track").chart;
    for x in c.series.iter().chain(&c.background) {
        let first_row = x.name.lines().next().unwrap_or("");
        let fin = fins
            .iter()
            .filter(|f| first_row.contains(&format!("· {f}")))
            .count();
        assert_eq!(fin, 1, "line '{}' does not name one fin", x.name);
    }
    // Each prominent case has one line per fin.
    for fin in &fins {
        let n = c.series.iter().filter(|x| x.name.contains(fin)).count();
        assert_eq!(n, c.series.len() / 2, "{fin}");
    }
}
