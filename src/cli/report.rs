//! `eddyzone report SCENARIO --out DIR`: the HTML report, its figures (PNG and SVG), per-case
//! profile CSVs and summary.json (verdict, runs and fin heat), written atomically into DIR.

use super::run::run_all;
use super::{load, make_dir, write_file};
use crate::checks::{verdict, Verdict};
use crate::curve::{curves, default_speeds, CurveOptions};
use crate::dynamics::{BrakeTables, RunOptions, Sampling};
use crate::error::{Error, EXIT_OK};
use crate::report::figures::all_figures;
use crate::report::html::{report_html, utc_timestamp, ReportInput};
use crate::report::json_out::RunJson;
use crate::report::plots::{render_png, render_svg};
use crate::report::{csv_out, file_stem};
use crate::thermal::temperatures_from_heat;
use crate::thermal::{heat_all, CaseHeat, HeatOptions};
use clap::Args;
use indicatif::{ProgressBar, ProgressDrawTarget};
use serde::Serialize;
use sha2::{Digest, Sha256};
use std::path::PathBuf;

/// Options of `report`.
#[derive(Debug, Args)]
pub struct ReportArgs {
    /// The scenario file.
    pub scenario: PathBuf,
    /// Folder to write the report into.
    #[arg(long)]
    pub out: PathBuf,
    /// Overwrite files in an existing folder.
    #[arg(long)]
    pub force: bool,
}

/// Figure size in the files and the report, px.
pub const FIGURE_SIZE_PX: (u32, u32) = (960, 540);

/// summary.json: the verdict, the runs and the fin heat.
#[derive(Debug, Serialize)]
pub struct Summary<'a> {
    /// The verdict.
    pub verdict: &'a Verdict,
    /// The runs.
    pub run: RunJson<'a>,
    /// Fin heat of every case (duty cycle or single pass), in case order; empty when it could
    /// not be computed.
    pub heat: &'a [CaseHeat],
}

/// The generation time: `SOURCE_DATE_EPOCH` (seconds, UTC) when set, else the clock.
fn generated() -> String {
    let from_env = std::env::var("SOURCE_DATE_EPOCH")
        .ok()
        .and_then(|v| v.trim().parse::<i64>().ok());
    let secs = from_env.unwrap_or_else(|| {
        std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map(|d| d.as_secs() as i64)
            .unwrap_or(0)
    });
    format!("{} (UTC)", utc_timestamp(secs))
}

fn compute<E: std::fmt::Display>(e: E) -> Error {
    Error::Compute(e.to_string())
}

/// Runs `report`.
pub fn execute(a: &ReportArgs) -> Result<i32, Error> {
    if a.out.exists() && !a.force {
        return Err(Error::Usage(format!(
            "--out: {} already exists; pass --force to overwrite its files",
            a.out.display()
        )));
    }
    let input = std::fs::read(&a.scenario)
        .map_err(|e| Error::Usage(format!("{}: {e}", a.scenario.display())))?;
    let s = load(&a.scenario)?;
    let sha: String = Sha256::digest(&input)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();

    let bar = ProgressBar::with_draw_target(None, ProgressDrawTarget::stderr());
    bar.set_message("running cases");
    let options = RunOptions {
        sampling: Sampling::Full,
        ..RunOptions::default()
    };
    let tables = BrakeTables::build(&s).map_err(compute)?;
    let runs = run_all(&s, &tables, &options)?;
    bar.set_message("heating the fins");
    // The heat is computed once: its steady peaks feed the verdict, the figures and the tables.
    let heat = match heat_all(&s, &tables, &HeatOptions::default()) {
        Ok(h) => h,
        // Without a fin-temperature limit the verdict does not need the heat; the report still
        // goes out, with the Heating section saying it was not computed.
        Err(e) if s.limits.max_fin_temperature_c.is_none() => {
            eprintln!("warning: fin heat not computed: {e}");
            Vec::new()
        }
        Err(e) => return Err(compute(e)),
    };
    let temps = temperatures_from_heat(&s, &heat);
    let v = verdict(&s, &runs, &temps);
    let c = curves(
        &s,
        &tables,
        &CurveOptions {
            section: None,
            speeds_m_s: default_speeds(&s, &tables),
            fin_temp_c: None,
            magnet_temp_c: None,
        },
    );
    let figs = all_figures(&s, &runs, &c, &heat);

    make_dir(&a.out)?;
    bar.set_length((figs.len() + runs.len() + 2) as u64);
    bar.set_message("writing figures");
    let mut rendered = Vec::with_capacity(figs.len());
    for f in &figs {
        let svg = render_svg(&f.chart, FIGURE_SIZE_PX).map_err(compute)?;
        let png = render_png(&f.chart, FIGURE_SIZE_PX).map_err(compute)?;
        write_file(&a.out.join(format!("{}.svg", f.id)), svg.as_bytes())?;
        write_file(&a.out.join(format!("{}.png", f.id)), &png)?;
        rendered.push((f, svg));
        bar.inc(1);
    }
    bar.set_message("writing profiles");
    for r in &runs {
        let bytes = csv_out::profile_csv(&r.samples, &[]).map_err(compute)?;
        write_file(
            &a.out.join(format!("profile-{}.csv", file_stem(&r.case))),
            &bytes,
        )?;
        bar.inc(1);
    }
    let summary = Summary {
        verdict: &v,
        run: RunJson::new(&s.name, &runs),
        heat: &heat,
    };
    let json = serde_json::to_string_pretty(&summary).map_err(compute)? + "\n";
    write_file(&a.out.join("summary.json"), json.as_bytes())?;
    bar.inc(1);
    let input_name = a
        .scenario
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let html = report_html(&ReportInput {
        scenario: &s,
        input_name,
        input_sha256: sha,
        runs: &runs,
        verdict: &v,
        heat: &heat,
        figures: rendered,
        generated: generated(),
    });
    write_file(&a.out.join("report.html"), html.as_bytes())?;
    bar.inc(1);
    bar.finish_and_clear();
    eprintln!(
        "wrote {} ({} figures, {} profiles): {}",
        a.out.join("report.html").display(),
        figs.len(),
        runs.len(),
        if v.pass { "PASS" } else { "FAIL" }
    );
    Ok(EXIT_OK)
}
