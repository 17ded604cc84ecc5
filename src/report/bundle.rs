//! The files of `report`: `report.html`, every figure as SVG and PNG, one profile CSV per case
//! and `summary.json`, built in memory from a judged study; the command writes them.

use super::figures::all_figures;
use super::html::{report_html, ReportInput};
use super::json_out::RunJson;
use super::plots::{render_png, render_svg};
use super::{csv_out, OutputError, OutputFile};
use crate::checks::Verdict;
use crate::curve::PairCurve;
use crate::numeric::map_in_parallel;
use crate::study::{Judgement, Study};
use crate::thermal::CaseHeat;
use serde::Serialize;
use sha2::{Digest, Sha256};

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

/// What the report is made from besides the study.
#[derive(Debug, Clone)]
pub struct ReportSource<'a> {
    /// File name of the scenario as given.
    pub input_name: String,
    /// The scenario file's bytes (for its SHA-256).
    pub input_bytes: &'a [u8],
    /// Generation time stamp text, shown only in `<p id="generated">`.
    pub generated: String,
}

/// The report's files, with counts for the command's message.
#[derive(Debug)]
pub struct ReportBundle {
    /// Every file, named relative to the report folder; `report.html` last.
    pub files: Vec<OutputFile>,
    /// Number of figures (each written as SVG and PNG).
    pub figures: usize,
    /// Number of profile CSVs.
    pub profiles: usize,
}

/// Builds every file of the report of a judged study (runs with full sampling) with its force
/// curves ([`Study::default_curves`]).
pub fn report_bundle(
    study: &Study,
    judged: &Judgement,
    curves: &[PairCurve],
    source: &ReportSource<'_>,
) -> Result<ReportBundle, OutputError> {
    let s = study.scenario();
    // The figures (built, then rendered one per task) beside the profile CSVs.
    let (figures, profiles) = rayon::join(
        || {
            let figs = all_figures(s, &judged.runs, curves, &judged.heat, &judged.verdict);
            let drawn = map_in_parallel(&figs, |f| {
                let plot_error = |source| OutputError::Plot {
                    figure: f.id.clone(),
                    source,
                };
                let svg = render_svg(&f.chart, FIGURE_SIZE_PX).map_err(plot_error)?;
                let png = render_png(&f.chart, FIGURE_SIZE_PX).map_err(plot_error)?;
                Ok::<_, OutputError>((svg, png))
            });
            drawn.map(|d| (figs, d))
        },
        || csv_out::run_profiles(&judged.runs, &s.rider, "profile-"),
    );
    let (figs, drawn) = figures?;
    let profiles = profiles?;
    let mut files = Vec::with_capacity(2 * figs.len() + judged.runs.len() + 2);
    let mut rendered = Vec::with_capacity(figs.len());
    for (f, (svg, png)) in figs.iter().zip(drawn) {
        files.push(OutputFile {
            name: format!("{}.svg", f.id),
            bytes: svg.clone().into_bytes(),
        });
        files.push(OutputFile {
            name: format!("{}.png", f.id),
            bytes: png,
        });
        rendered.push((f, svg));
    }
    let profile_count = profiles.len();
    files.extend(profiles);
    let summary = Summary {
        verdict: &judged.verdict,
        run: RunJson::new(&s.name, &judged.runs),
        heat: &judged.heat,
    };
    files.push(OutputFile {
        name: "summary.json".into(),
        bytes: super::json_out::pretty(&summary)?.into_bytes(),
    });
    let sha: String = Sha256::digest(source.input_bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    let html = report_html(&ReportInput {
        scenario: s,
        input_name: source.input_name.clone(),
        input_sha256: sha,
        input_text: String::from_utf8_lossy(source.input_bytes).into_owned(),
        runs: &judged.runs,
        verdict: &judged.verdict,
        heat: &judged.heat,
        figures: rendered,
        generated: source.generated.clone(),
    });
    files.push(OutputFile {
        name: "report.html".into(),
        bytes: html.into_bytes(),
    });
    Ok(ReportBundle {
        files,
        figures: figs.len(),
        profiles: profile_count,
    })
}
