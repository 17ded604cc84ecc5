//! End-to-end runs of `eddyzone report` (the real binary) in a temporary folder on the coaster
//! demo: every figure file written and readable, the HTML self-contained with the case table and
//! every figure, byte-for-byte reproducible apart from the time-stamp line, an existing folder
//! refused without --force, and (when chromium is installed) the HTML parsed by a real browser.
//! The heating results (figures, the Heating section, summary.json "heat") on the coaster
//! (vehicle fins) and the tower (track fins).

// A test or benchmark may stop at the first surprise.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> PathBuf {
    PathBuf::from(env!("CARGO_BIN_EXE_eddyzone"))
}

fn scenario() -> PathBuf {
    demo("coaster-brake-run")
}

fn demo(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join(format!("scenarios/{name}.yaml"))
}

fn report(out: &Path, extra: &[&str], epoch: Option<&str>) -> Output {
    report_of(&scenario(), out, extra, epoch)
}

fn report_of(scenario: &Path, out: &Path, extra: &[&str], epoch: Option<&str>) -> Output {
    let mut c = Command::new(bin());
    c.arg("report")
        .arg(scenario)
        .arg("--out")
        .arg(out)
        .args(extra);
    match epoch {
        Some(e) => c.env("SOURCE_DATE_EPOCH", e),
        None => c.env_remove("SOURCE_DATE_EPOCH"),
    };
    c.output().expect("the binary runs")
}

fn files(dir: &Path, ext: &str) -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == ext))
        .collect();
    v.sort();
    v
}

/// Decodes a PNG with the png crate and counts pixels that are not the white background.
fn non_background_pixels(path: &Path) -> (u32, u32, usize) {
    let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(path).unwrap()));
    let mut reader = decoder.read_info().expect("PNG header decodes");
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).expect("PNG frame decodes");
    let bpp = info.color_type.samples();
    let data = &buf[..info.buffer_size()];
    let count = data
        .chunks(bpp)
        .filter(|px| px.iter().take(3).any(|&c| c != 255))
        .count();
    (info.width, info.height, count)
}

/// Removes the one line allowed to differ between runs.
fn without_timestamp(html: &str) -> String {
    html.lines()
        .filter(|l| !l.starts_with("<p id=\"generated\">"))
        .collect::<Vec<_>>()
        .join("\n")
}

/// Figures of the coaster demo (fins on the vehicle, a duty block): no track-fin profile.
const FIGURES: [&str; 4] = [
    "speed-position",
    "felt-acceleration",
    "sustained-acceleration",
    "fin-temperature-cycles",
];

/// Asserts a PNG figure exists, has the report size and is drawn (over 1 % ink: axes, text and
/// lines cover well over that on a drawn chart).
fn assert_drawn(png: &Path) {
    assert!(png.is_file(), "{png:?} written");
    assert!(std::fs::metadata(png).unwrap().len() > 0, "{png:?} empty");
    let (w, h, ink) = non_background_pixels(png);
    assert_eq!((w, h), (960, 540), "{png:?} size");
    assert!(
        ink > (w * h) as usize / 100,
        "{png:?}: only {ink} drawn pixels"
    );
}

/// The heat in summary.json against the verdict and the HTML's Heating section: one entry per
/// case in case order; the fin-temperature check judges exactly the steady peak (the heat is
/// computed once); the steady peak is the last cycle's; and by conservation of energy (first law:
/// the braking work is all dissipated as Joule heat in the fins) the fins' first-pass energies
/// sum to the first pass's braking energy, within 1e-4 relative (the cell quadrature's
/// correction stays near 1e-6). Returns the heat entries.
fn check_heat(summary: &serde_json::Value, html: &str) -> Vec<serde_json::Value> {
    let cases = summary["verdict"]["cases"].as_array().unwrap();
    let heat = summary["heat"]
        .as_array()
        .expect("summary.json has \"heat\"");
    assert_eq!(heat.len(), cases.len(), "heat of every case");
    assert!(
        html.contains("<h2 id=\"heating\">Heating</h2>"),
        "Heating section"
    );
    for (c, h) in cases.iter().zip(heat) {
        let name = c["case"].as_str().unwrap();
        assert_eq!(h["case"].as_str(), Some(name), "heat in case order");
        let steady = h["steady_peak_fin_temperature_c"].as_f64().unwrap();
        let cycles = h["cycles"].as_array().unwrap();
        assert!(!cycles.is_empty(), "{name}: at least one pass");
        let last = cycles.last().unwrap()["peak_fin_temperature_c"]
            .as_f64()
            .unwrap();
        assert_eq!(steady, last, "{name}: steady peak is the last cycle's");
        let judged = c["checks"]
            .as_array()
            .unwrap()
            .iter()
            .find(|r| r["check"] == "fin_temperature")
            .expect("fin-temperature check (the demo limits set one)");
        assert_eq!(
            judged["value"].as_f64(),
            Some(steady),
            "{name}: verdict on the steady peak"
        );
        let fins = h["fins"].as_array().unwrap();
        let energy: f64 = fins
            .iter()
            .map(|f| f["energy_per_pass_j"].as_f64().unwrap())
            .sum();
        let braking = cycles[0]["braking_energy_j"].as_f64().unwrap();
        assert!(braking > 0.0, "{name}: the pass brakes");
        assert!(
            (energy - braking).abs() <= 1e-4 * braking,
            "{name}: fin energies {energy} J against braking energy {braking} J"
        );
        // The case's tables: summary rows and one row per fin.
        let stem: String = name
            .chars()
            .map(|ch| {
                if ch.is_ascii_alphanumeric() || ch == '-' || ch == '_' {
                    ch
                } else {
                    '_'
                }
            })
            .collect();
        let table = html
            .split(&format!("<table class=\"heat-table\" id=\"heat-{stem}\">"))
            .nth(1)
            .unwrap_or_else(|| panic!("{name}: heat table"));
        let table = &table[..table.find("</table>").unwrap()];
        for row in [
            "cycles to steady",
            "steady peak fin temperature (°C)",
            "exit speed first → steady (m/s)",
            "peak deceleration first → steady (g)",
        ] {
            assert!(table.contains(&format!("<th>{row}</th>")), "{name}: {row}");
        }
        assert!(
            table.contains(&format!("<td>{steady:.1}</td>")),
            "{name}: steady peak {steady:.1} °C shown"
        );
        let fin_table = html
            .split(&format!(
                "<table class=\"heat-fins\" id=\"heat-fins-{stem}\">"
            ))
            .nth(1)
            .unwrap_or_else(|| panic!("{name}: fin heat table"));
        let fin_table = &fin_table[..fin_table.find("</table>").unwrap()];
        for f in fins {
            let fin = f["fin"].as_str().unwrap();
            let rise = f["rise_per_pass_k"].as_f64().unwrap();
            assert!(rise > 0.0, "{name} {fin}: the pass heats the fin");
            assert!(
                fin_table.contains(&format!(
                    "<tr><td>{fin}</td><td>{}</td><td>{:.2}</td><td>{rise:.2}</td><td>{:.1}</td></tr>",
                    f["mount"].as_str().unwrap(),
                    f["energy_per_pass_j"].as_f64().unwrap() / 1e3,
                    f["steady_peak_temperature_c"].as_f64().unwrap(),
                )),
                "{name}: row of fin {fin}"
            );
        }
    }
    heat.clone()
}

#[test]
fn report_writes_every_file_reproducibly() {
    let tmp = tempfile::tempdir().unwrap();
    let a = tmp.path().join("a");
    let b = tmp.path().join("b");
    let started = std::time::Instant::now();
    let o = report(&a, &[], Some("1700000000"));
    let elapsed = started.elapsed();
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    // Brief: a demo's report in about 3 s (generous bound for a loaded CI machine).
    assert!(elapsed.as_secs_f64() < 15.0, "report took {elapsed:?}");

    let svgs = files(&a, "svg");
    let pngs = files(&a, "png");
    assert_eq!(svgs.len(), pngs.len());
    for f in FIGURES {
        assert!(a.join(format!("{f}.svg")).is_file(), "{f}.svg written");
        assert_drawn(&a.join(format!("{f}.png")));
    }
    // The per-fin bar figure is replaced by the heating figures; the coaster has no track fins.
    assert!(
        !a.join("fin-temperature.svg").exists(),
        "old bar figure gone"
    );
    assert!(
        !a.join("fin-temperature-track.svg").exists(),
        "no track-fin profile without track fins"
    );
    assert!(
        svgs.iter().any(|p| p
            .file_name()
            .unwrap()
            .to_string_lossy()
            .starts_with("force-speed-")),
        "a force–speed figure per section design"
    );
    for p in &pngs {
        assert!(std::fs::metadata(p).unwrap().len() > 0, "{p:?} empty");
        let (w, h, ink) = non_background_pixels(p);
        assert_eq!((w, h), (960, 540), "{p:?} size");
        // Axes, text and lines cover well over 1 % of a drawn chart.
        assert!(
            ink > (w * h) as usize / 100,
            "{p:?}: only {ink} drawn pixels"
        );
    }
    for p in &svgs {
        let t = std::fs::read_to_string(p).unwrap();
        assert!(t.contains("<svg") && t.contains("</svg>"), "{p:?} is SVG");
    }

    // Profiles and summary.
    let csvs = files(&a, "csv");
    let summary: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(a.join("summary.json")).unwrap()).unwrap();
    let cases = summary["verdict"]["cases"].as_array().unwrap();
    assert_eq!(csvs.len(), cases.len(), "one profile per case");
    assert_eq!(
        summary["run"]["cases"].as_array().unwrap().len(),
        cases.len()
    );
    for c in &csvs {
        let t = std::fs::read_to_string(c).unwrap();
        assert!(t.starts_with("t_s,s_m,v_m_s"), "{c:?} header");
        assert!(t.lines().count() > 10, "{c:?} has samples");
    }

    // HTML: case table, every figure inline, no scripts or outside resources.
    let html = std::fs::read_to_string(a.join("report.html")).unwrap();
    assert!(html.contains("<table id=\"case-table\">"));
    let heat = check_heat(&summary, &html);
    assert!(
        heat.iter().all(|h| h["duty"] == true),
        "the coaster's duty block drives the cycles"
    );
    for c in cases {
        let name = c["case"].as_str().unwrap();
        assert!(
            html.contains(&format!("<tr><td>{name}</td>")),
            "{name} in table"
        );
    }
    for p in &svgs {
        let id = p.file_stem().unwrap().to_string_lossy();
        assert!(
            html.contains(&format!("<figure id=\"fig-{id}\">")),
            "{id} in HTML"
        );
    }
    assert_eq!(
        html.matches("<svg").count(),
        svgs.len(),
        "each figure inline once"
    );
    assert!(!html.contains("<script"), "no scripts");
    assert!(
        !html.contains("http://www.w3.org/1999/xhtml\" src"),
        "no sources"
    );
    assert!(!html.contains("<link") && !html.contains("@import") && !html.contains("url("));
    assert!(html.contains("CAUTION"));
    assert!(html.contains(env!("CARGO_PKG_VERSION")));
    assert!(html.contains("<p id=\"generated\">Generated 2023-11-14T22:13:20Z"));

    // SHA-256 of the input, computed here with the sha2 crate.
    use sha2::Digest;
    let digest: String = sha2::Sha256::digest(std::fs::read(scenario()).unwrap())
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    assert!(html.contains(&digest), "input SHA-256 stated");

    // Second run with the clock's time: identical bytes except the time-stamp line.
    let o = report(&b, &[], None);
    assert_eq!(o.status.code(), Some(0));
    let html_b = std::fs::read_to_string(b.join("report.html")).unwrap();
    assert_ne!(html, html_b, "the time stamp differs");
    assert_eq!(without_timestamp(&html), without_timestamp(&html_b));
    for ext in ["svg", "png", "csv", "json"] {
        for p in files(&a, ext) {
            let q = b.join(p.file_name().unwrap());
            assert_eq!(
                std::fs::read(&p).unwrap(),
                std::fs::read(&q).unwrap(),
                "{p:?}"
            );
        }
    }

    // Existing folder: refused without --force (exit 2), overwritten with it.
    let o = report(&a, &[], Some("0"));
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("--force"));
    let o = report(&a, &["--force"], Some("1700000000"));
    assert_eq!(o.status.code(), Some(0));
    assert_eq!(
        std::fs::read_to_string(a.join("report.html")).unwrap(),
        html
    );

    browser_check(&a.join("report.html"), &svgs);
    print_check(&a.join("report.html"), &html);
}

/// The tower demo: fins along the track (magnets on the gondola) and a duty block, so both
/// heating figures, drawn; the track profiles cover the fins' span.
#[test]
fn report_shows_track_fin_heating() {
    let tmp = tempfile::tempdir().unwrap();
    let out = tmp.path().join("tower");
    let o = report_of(&demo("tower-catch-brake"), &out, &[], Some("1700000000"));
    // Exit 0 whatever the verdict (report writes a failing design's report too).
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    for f in ["fin-temperature-track", "fin-temperature-cycles"] {
        let svg = std::fs::read_to_string(out.join(format!("{f}.svg"))).unwrap();
        assert!(
            svg.contains("<svg") && svg.contains("</svg>"),
            "{f}.svg is SVG"
        );
        assert_drawn(&out.join(format!("{f}.png")));
    }
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(html.contains("<figure id=\"fig-fin-temperature-track\">"));
    assert!(html.contains("<figure id=\"fig-fin-temperature-cycles\">"));
    let summary: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("summary.json")).unwrap()).unwrap();
    for h in check_heat(&summary, &html) {
        let profiles = h["track_profiles"].as_array().unwrap();
        assert!(!profiles.is_empty(), "track fins give profiles");
        for p in profiles {
            let temps = p["temps"].as_array().unwrap();
            assert!(temps.len() > 10, "cells along the fin");
            let peak = temps
                .iter()
                .map(|t| t[1].as_f64().unwrap())
                .fold(f64::NEG_INFINITY, f64::max);
            // The profile's hottest cell is no hotter than the case's steady peak.
            assert!(peak <= h["steady_peak_fin_temperature_c"].as_f64().unwrap() + 1e-9);
        }
    }
}

/// Loads the report in headless chromium and checks the parsed DOM, when chromium is installed.
fn browser_check(html: &Path, svgs: &[PathBuf]) {
    let chromium = Path::new("/usr/bin/chromium");
    if !chromium.exists() {
        eprintln!("note: /usr/bin/chromium not found; browser check skipped");
        return;
    }
    let profile = tempfile::tempdir().unwrap();
    let o = Command::new(chromium)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
        ])
        .arg(format!("--user-data-dir={}", profile.path().display()))
        .arg("--dump-dom")
        .arg(format!("file://{}", html.display()))
        .output()
        .expect("chromium runs");
    let dom = String::from_utf8_lossy(&o.stdout);
    assert!(dom.contains("id=\"case-table\""), "case table in the DOM");
    for p in svgs {
        let id = p.file_stem().unwrap().to_string_lossy();
        assert!(dom.contains(&format!("id=\"fig-{id}\"")), "{id} in the DOM");
    }
    assert_eq!(
        dom.matches("<svg").count(),
        svgs.len(),
        "every <svg> parsed"
    );
}

/// Prints the report to PDF with headless chromium and reads the pages back with pdftotext
/// (poppler), when both are installed: every section heading, every figure's caption and the
/// last line of the input file as written are on the pages (nothing cut off by a scrolling
/// box), and the figures start a page of their own.
fn print_check(html_path: &Path, html: &str) {
    let chromium = Path::new("/usr/bin/chromium");
    let pdftotext = Path::new("/usr/bin/pdftotext");
    if !chromium.exists() || !pdftotext.exists() {
        eprintln!("note: chromium or pdftotext not found; print check skipped");
        return;
    }
    let tmp = tempfile::tempdir().unwrap();
    let pdf = tmp.path().join("report.pdf");
    let o = Command::new(chromium)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--no-pdf-header-footer",
        ])
        .arg(format!(
            "--user-data-dir={}",
            tmp.path().join("profile").display()
        ))
        .arg(format!("--print-to-pdf={}", pdf.display()))
        .arg(format!("file://{}", html_path.display()))
        .output()
        .expect("chromium runs");
    assert!(
        pdf.exists(),
        "chromium printed: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    let o = Command::new(pdftotext)
        .arg("-layout")
        .arg(&pdf)
        .arg("-")
        .output()
        .expect("pdftotext runs");
    let text = String::from_utf8_lossy(&o.stdout).into_owned();
    let pages: Vec<&str> = text.split('\u{c}').collect();
    assert!(pages.len() > 2, "several pages");
    // Every <h2> of the report, as printed (markup-free headings).
    let squeeze = |s: &str| s.split_whitespace().collect::<Vec<_>>().join(" ");
    let printed = squeeze(&text);
    let mut headings = 0;
    for part in html.split("<h2 id=\"").skip(1) {
        let title = &part[part.find('>').unwrap() + 1..part.find("</h2>").unwrap()];
        let title = title.replace("&amp;", "&").replace("&#39;", "'");
        assert!(
            printed.contains(&squeeze(&title)),
            "heading '{title}' printed"
        );
        headings += 1;
    }
    assert!(headings >= 6, "{headings} sections");
    let figures = html.matches("<figure id=").count();
    for i in 1..=figures {
        assert!(
            printed.contains(&format!("Figure {i}.")),
            "Figure {i} printed"
        );
    }
    // The input as written is printed whole: its last line is on the pages.
    let start = html.find("id=\"input-text\">").unwrap();
    let input = &html[start..];
    let input = &input[input.find('>').unwrap() + 1..input.find("</pre>").unwrap()];
    let last = input.lines().rev().find(|l| !l.trim().is_empty()).unwrap();
    let last = last
        .replace("&amp;", "&")
        .replace("&#39;", "'")
        .replace("&gt;", ">");
    assert!(
        printed.contains(&squeeze(&last)),
        "last input line '{last}' printed"
    );
    // The figures begin on a new page.
    let fig_page = pages.iter().position(|p| p.contains("Figure 1.")).unwrap();
    let heading_page = pages
        .iter()
        .position(|p| p.lines().any(|l| l.trim() == "Figures"))
        .unwrap();
    assert!(heading_page <= fig_page);
    assert!(
        pages[heading_page].trim_start().starts_with("Figures"),
        "the Figures heading starts its page"
    );
}
