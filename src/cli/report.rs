//! `eddyzone report SCENARIO --out DIR`: the HTML report, its figures (PNG and SVG), per-case
//! profile CSVs and summary.json (verdict, runs and fin heat), written atomically into DIR.

use super::error::{Error, EXIT_OK};
use super::load;
use super::progress::Bar;
use clap::Args;
use eddyzone::dynamics::{RunOptions, Sampling};
use eddyzone::report::bundle::{report_bundle, ReportSource};
use eddyzone::report::folder::{write_folder, Placement};
use eddyzone::report::html::generation_stamp;
use eddyzone::study::{HeatDemand, JudgeOptions, Study};
use std::path::PathBuf;

/// Options of `report`.
#[derive(Debug, Args)]
pub struct ReportArgs {
    /// The scenario file.
    pub scenario: PathBuf,
    /// Folder to write the report into.
    #[arg(long)]
    pub out: PathBuf,
    /// Replace an existing folder (as a whole: no file of the old report survives).
    #[arg(long)]
    pub force: bool,
}

/// Runs `report`.
pub fn execute(a: &ReportArgs) -> Result<i32, Error> {
    if a.out.exists() && !a.force {
        return Err(Error::Usage(format!(
            "--out: {} already exists; pass --force to replace it",
            a.out.display()
        )));
    }
    // Loading checks the file (regular, bounded) before its bytes are read for the digest.
    let scenario = load(&a.scenario, None)?;
    let input = eddyzone::scenario::validate::read_input(&a.scenario)
        .map_err(|e| Error::Usage(format!("{}: {e}", a.scenario.display())))?;
    let study = Study::new(scenario)?;
    let options = JudgeOptions {
        run: RunOptions {
            sampling: Sampling::Full,
            section_loads: true,
            ..RunOptions::default()
        },
        heat: HeatDemand::Always,
    };
    let bar = Bar::new();
    // The force curves of the figures do not depend on the runs: computed beside them.
    let (judged, curves) = rayon::join(|| study.judge(&options, &bar), || study.default_curves());
    bar.finish();
    let judged = judged?;
    if let Some(e) = &judged.heat_failure {
        // The verdict does not need the heat; the report says it was not computed.
        eprintln!("warning: fin heat not computed: {e}");
    }
    let source = ReportSource {
        input_name: a
            .scenario
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default(),
        input_bytes: input.as_bytes(),
        generated: generation_stamp(),
    };
    let curves = curves?;
    let bundle = report_bundle(&study, &judged, &curves, &source)?;
    write_folder(&a.out, &bundle.files, Placement::Replace)?;
    eprintln!(
        "wrote {} ({} figures, {} profiles): {}",
        a.out.join("report.html").display(),
        bundle.figures,
        bundle.profiles,
        if judged.verdict.pass { "PASS" } else { "FAIL" }
    );
    Ok(EXIT_OK)
}
