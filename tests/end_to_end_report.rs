//! End-to-end runs of `eddyzone report` (the real binary) in a temporary folder on the coaster
//! demo: every figure file written and readable, the HTML self-contained with the case table and
//! every figure, byte-for-byte reproducible apart from the time-stamp line, an existing folder
//! refused without --force, and (when chromium is installed) the HTML parsed by a real browser.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> PathBuf {
    PathBuf::from(env!("CARGO_BIN_EXE_eddyzone"))
}

fn scenario() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("scenarios/coaster-brake-run.yaml")
}

fn report(out: &Path, extra: &[&str], epoch: Option<&str>) -> Output {
    let mut c = Command::new(bin());
    c.arg("report")
        .arg(scenario())
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

const FIGURES: [&str; 4] = [
    "speed-position",
    "felt-acceleration",
    "sustained-acceleration",
    "fin-temperature",
];

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
        assert!(a.join(format!("{f}.png")).is_file(), "{f}.png written");
    }
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
