//! The self-contained HTML report: one file with inline CSS and inline SVG figures, no scripts,
//! no external fonts or addresses. Apart from the one line `<p id="generated">…</p>`, the same
//! inputs give the same bytes.

use crate::checks::rider::sign_convention;
use crate::checks::Verdict;
use crate::dynamics::RunResult;
use crate::report::figures::Figure;
use crate::report::text::num;
use crate::report::{CAUTION, VERSION};
use crate::scenario::as_written::AsWritten;
use crate::scenario::write::{to_yaml, to_yaml_with};
use crate::scenario::Scenario;
use crate::thermal::CaseHeat;
use std::fmt::Write as _;

/// Everything the report shows.
#[derive(Debug)]
pub struct ReportInput<'a> {
    /// The validated scenario.
    pub scenario: &'a Scenario,
    /// File name of the input as given.
    pub input_name: String,
    /// Lower-case hex SHA-256 of the input file's bytes.
    pub input_sha256: String,
    /// The input file's text as the user wrote it.
    pub input_text: String,
    /// Runs, in case order.
    pub runs: &'a [RunResult],
    /// The verdict.
    pub verdict: &'a Verdict,
    /// Fin heat of every case from the thermal layer, in case order (empty: not computed).
    pub heat: &'a [CaseHeat],
    /// Figures with their rendered SVG documents, in report order.
    pub figures: Vec<(&'a Figure, String)>,
    /// Generation time stamp text (UTC), shown only in `<p id="generated">`.
    pub generated: String,
}

/// Escapes text for HTML element content and attribute values.
pub fn escape(text: &str) -> String {
    let mut o = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => o.push_str("&amp;"),
            '<' => o.push_str("&lt;"),
            '>' => o.push_str("&gt;"),
            '"' => o.push_str("&quot;"),
            '\'' => o.push_str("&#39;"),
            _ => o.push(c),
        }
    }
    o
}

/// The SVG document without any XML prolog, ready to inline.
fn inline_svg(svg: &str) -> &str {
    match svg.find("<svg") {
        Some(i) => &svg[i..],
        None => svg,
    }
}

const STYLE: &str = "body{font-family:sans-serif;max-width:1100px;margin:1em auto;padding:0 1em;\
color:#191919;line-height:1.4}table{border-collapse:collapse;margin:.5em 0 1em}\
th,td{border:1px solid #bbb;padding:2px 6px;text-align:left;font-size:90%}th{background:#eee}\
td.fail{color:#a00;font-weight:bold}td.pass{color:#060}pre{background:#f6f6f6;padding:.5em;\
overflow:auto;font-size:85%;max-height:40em}figure{margin:1em 0}figure svg{max-width:100%;\
height:auto}.caution{border:2px solid #a60;padding:.5em;background:#fff8ec}\
pre.input{max-height:none;white-space:pre-wrap}\
@media print{body{max-width:none;margin:0;padding:0;font-size:10pt}\
pre,pre.input{max-height:none;overflow:visible;white-space:pre-wrap;background:none;font-size:8pt}\
figure{break-inside:avoid;page-break-inside:avoid}figure svg{width:100%;max-height:24cm}\
table{break-inside:auto}tr{break-inside:avoid;page-break-inside:avoid}\
th,td{font-size:8pt;padding:1px 3px}h2{break-after:avoid;page-break-after:avoid}\
h2#figures,h2#inputs-as-written{break-before:page;page-break-before:always}\
.caution{background:none}}";

/// The model, its assumptions and its limits of validity, as HTML list items.
const MODEL_NOTES: [&str; 7] = [
    "Drag force per area from a two-dimensional layer model: the magnet rows' field as a Fourier \
     series of pole-pitch harmonics, eddy currents in the fin solved layer by layer (diffusion \
     equation, travelling-field solution); force is summed over harmonics.",
    "Two-dimensional theory: no longitudinal end effects at the entry and exit of a section; \
     the force of a pair is the per-length force times the fin–section overlap.",
    "Finite fin and pole height: a finite-height solution at every speed (the fin as thin \
     laminae with the reaction field between the iron planes), whose low-speed limit is the \
     Russell–Norsworthy edge factor (R. L. Russell and K. H. Norsworthy, \"Eddy currents and \
     wall losses in screened-rotor induction motors\", Proc. IEE 105A, 1958); checked against \
     an independent finite-element solution from 0.1 to 5 times the critical speed, not \
     beyond (a warning says when runs go further).",
    "Recoil (relative) permeability of the magnets taken as 1; conductor resistivity and \
     magnet remanence are taken at each case's temperatures.",
    "Vehicle mass spread evenly along the vehicle length (gravity from the mean inclination \
     under the vehicle); the vehicle is rigid.",
    "Felt acceleration along the track is (brake + resistance)/(m g); filtered as the rider \
     block sets, or by default (Butterworth low-pass).",
    "Concept-stage estimates: validity ends where the geometry leaves the thin-fin, small-gap \
     regime or where measured force curves are extrapolated beyond their range.",
];

fn verdict_table(v: &Verdict, out: &mut String) {
    out.push_str(
        "<table id=\"case-table\">\n<tr><th>case</th><th>check</th><th>axis</th><th>state</th>\
         <th>value</th><th>limit</th><th>margin</th><th>unit</th><th>binds at (s)</th>\
         <th>result</th><th>note</th></tr>\n",
    );
    for c in &v.cases {
        if c.checks.is_empty() {
            let _ = writeln!(
                out,
                "<tr><td>{}</td><td>(no limits)</td><td></td><td></td><td></td><td></td><td></td>\
                 <td></td><td></td><td class=\"pass\">pass</td><td></td></tr>",
                escape(&c.case)
            );
        }
        for r in &c.checks {
            let (cls, txt) = if r.pass {
                ("pass", "pass")
            } else {
                ("fail", "FAIL")
            };
            let _ =
                writeln!(
                out,
                "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td>\
                 <td>{}</td><td>{}</td><td class=\"{cls}\">{txt}</td><td>{}</td></tr>",
                escape(&c.case),
                escape(&r.check),
                escape(r.axis.as_deref().unwrap_or("")),
                r.state.map(|s| s.name()).unwrap_or(""),
                escape(&num(r.value, 3)),
                escape(&num(r.limit, 3)),
                escape(&num(r.margin, 3)),
                escape(&r.unit),
                r.at_duration_s.map(|d| format!("{d:.3}")).unwrap_or_default(),
                escape(
                    &r.not_evaluated
                        .as_ref()
                        .map(|n| format!("not evaluated: {n}"))
                        .unwrap_or_default()
                ),
            );
        }
    }
    out.push_str("</table>\n");
}

/// The verdict in words: every failing case with its failing checks; the warnings about the
/// limit set.
fn verdict_words(v: &Verdict, out: &mut String) {
    if !v.pass {
        out.push_str("<ul id=\"failures\">\n");
        for c in v.cases.iter().filter(|c| !c.pass) {
            let checks: Vec<String> = c
                .checks
                .iter()
                .filter(|r| !r.pass)
                .map(|r| r.summary())
                .collect();
            let _ = writeln!(
                out,
                "<li><b>{}</b>: {}</li>",
                escape(&c.case),
                escape(&checks.join("; "))
            );
        }
        out.push_str("</ul>\n");
    }
    for w in &v.warnings {
        let _ = writeln!(out, "<p class=\"warning\">Warning: {}</p>", escape(w));
    }
}

/// The runs, one row each; the peak lateral force (signed along +y) only when some run has it.
fn runs_table(runs: &[RunResult], out: &mut String) {
    let lateral = runs.iter().any(|r| r.peak_lateral.is_some());
    out.push_str(
        "<table id=\"run-table\">\n<tr><th>case</th><th>mass (kg)</th><th>outcome</th>\
         <th>entry speed (m/s)</th><th>exit speed (m/s)</th><th>min speed (m/s)</th>\
         <th>peak deceleration (g)</th><th>peak onset (g/s)</th><th>time in zone (s)</th>\
         <th>braking energy (kJ)</th>",
    );
    if lateral {
        out.push_str("<th>peak lateral force (N, along +y)</th>");
    }
    out.push_str("</tr>\n");
    for r in runs {
        let cell = if lateral {
            format!("<td>{}</td>", num(r.peak_lateral.map(|p| p.force_n), 1))
        } else {
            String::new()
        };
        let _ = writeln!(
            out,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td>\
             <td>{}</td><td>{}</td><td>{}</td>{cell}</tr>",
            escape(&r.case),
            num(Some(r.mass_kg), 0),
            r.outcome.name(),
            num(r.entry_speed_m_s, 2),
            num(r.exit_speed_m_s, 2),
            num(r.min_speed_m_s, 2),
            num(r.peak_decel_g(), 3),
            num(r.peak_onset_g_s, 2),
            num(r.time_in_zone_s, 3),
            num(Some(r.braking_energy_j / 1e3), 1),
        );
    }
    out.push_str("</table>\n");
}

/// "first → steady" with `digits` decimals; a dash for a missing value.
fn first_to_steady(first: Option<f64>, steady: Option<f64>, digits: usize) -> String {
    format!("{} → {}", num(first, digits), num(steady, digits))
}

/// The heating in short, before the figures: one row per case (passes, the hottest fin, its
/// peak after the first pass and at the end) and the hottest fin of all against the limit.
fn heating_summary(s: &Scenario, heats: &[CaseHeat], out: &mut String) {
    out.push_str("<h3 id=\"heating-summary\">Heating in short</h3>\n");
    if heats.is_empty() {
        out.push_str("<p>Fin heat was not computed.</p>\n");
        return;
    }
    out.push_str(
        "<table id=\"heat-summary\">\n<tr><th>case</th><th>passes</th><th>steady after</th>\
         <th>hottest fin</th><th>peak after the first pass (°C)</th><th>peak at the end (°C)\
         </th></tr>\n",
    );
    for h in heats {
        let hottest = h.hottest_fin().map(|f| f.fin.as_str()).unwrap_or("");
        let _ = writeln!(
            out,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            escape(&h.case),
            h.cycles.len(),
            h.cycles_to_steady
                .map_or("—".to_string(), |c| c.to_string()),
            escape(hottest),
            num(Some(h.first_peak_fin_temperature_c), 1),
            num(Some(h.steady_peak_fin_temperature_c), 1),
        );
    }
    out.push_str("</table>\n");
    if let Some(h) = crate::report::text::hottest_fin(s, heats) {
        let _ = writeln!(
            out,
            "<p id=\"heat-hottest\">Hottest: {}. Per case and fin: Heating, after the \
             figures.</p>",
            escape(&h)
        );
    }
}

/// The Heating section: per case the duty-cycle summary and a table of its fins.
fn heating_section(s: &Scenario, heats: &[CaseHeat], out: &mut String) {
    out.push_str("<h2 id=\"heating\">Heating</h2>\n");
    let basis = match &s.duty {
        Some(d) => {
            let until = match d.cycles {
                crate::scenario::Cycles::Count(n) => format!("for {n} passes"),
                crate::scenario::Cycles::UntilSteady { max_cycles } => format!(
                    "until the peak fin temperature changes by less than {} K per cycle (at \
                     most {max_cycles} passes)",
                    crate::thermal::STEADY_TOLERANCE_K
                ),
            };
            format!(
                "Passes repeated every {} s with Newton cooling to {} °C between them, {until}; \
                 each pass runs at the fin temperatures it meets. Energy and rise per pass are \
                 those of the first pass; steady values are those of the last.",
                num(Some(d.interval_s), 0),
                num(Some(d.ambient_c), 1),
            )
        }
        None => "No duty block: one pass from each case's fin temperature.".to_string(),
    };
    let _ = writeln!(out, "<p>{}</p>", escape(&basis));
    if heats.is_empty() {
        out.push_str("<p>Fin heat was not computed.</p>\n");
        return;
    }
    for h in heats {
        let stem = crate::report::file_stem(&h.case);
        let _ = writeln!(out, "<h3>Case {}</h3>", escape(&h.case));
        let _ = writeln!(
            out,
            "<table class=\"heat-table\" id=\"heat-{}\">\n\
             <tr><th>cycles to steady</th><td>{}</td></tr>\n\
             <tr><th>steady peak fin temperature (°C)</th><td>{}</td></tr>\n\
             <tr><th>exit speed first → steady (m/s)</th><td>{}</td></tr>\n\
             <tr><th>peak deceleration first → steady (g)</th><td>{}</td></tr>\n</table>",
            escape(&stem),
            h.cycles_to_steady
                .map(|c| c.to_string())
                .unwrap_or_else(|| format!("not reached in {}", h.cycles.len())),
            num(Some(h.steady_peak_fin_temperature_c), 1),
            escape(&first_to_steady(
                h.exit_speed_first_m_s,
                h.exit_speed_steady_m_s,
                2
            )),
            escape(&first_to_steady(
                h.peak_decel_first_g,
                h.peak_decel_steady_g,
                3
            )),
        );
        let _ = writeln!(
            out,
            "<table class=\"heat-fins\" id=\"heat-fins-{}\">\n<tr><th>fin</th><th>mount</th>\
             <th>energy per pass (kJ)</th><th>rise per pass (K)</th><th>steady peak (°C)</th>\
             </tr>",
            escape(&stem)
        );
        for f in &h.fins {
            let _ = writeln!(
                out,
                "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                escape(&f.fin),
                f.mount,
                num(Some(f.energy_per_pass_j / 1e3), 2),
                num(Some(f.rise_per_pass_k), 2),
                num(Some(f.steady_peak_temperature_c), 1),
            );
        }
        out.push_str("</table>\n");
        if let Some(r) = h.magnet_rise {
            let _ = writeln!(
                out,
                "<p>Magnets warmed by the fins across the gap: {} K on average over the duty \
                 (bound {} K); judged at {} °C.</p>",
                num(Some(r.mean_k), 1),
                num(Some(r.bound_k), 1),
                num(Some(h.judged_magnet_temp_c), 1)
            );
        }
        if let Some(l) = &h.lift {
            let _ = writeln!(
                out,
                "<p>{}.</p>",
                escape(&crate::report::terminal::lift_line(l))
            );
        }
        for w in &h.warnings {
            let _ = writeln!(out, "<p class=\"warning\">Warning: {}</p>", escape(w));
        }
    }
}

/// The report as one HTML document.
pub fn report_html(r: &ReportInput<'_>) -> String {
    let s = r.scenario;
    let mut o = String::new();
    let title = escape(&s.name);
    let _ = write!(
        o,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <title>{title} — eddyzone report</title>\n<style>{STYLE}</style>\n</head>\n<body>\n\
         <h1>{title}</h1>\n"
    );
    if let Some(d) = &s.description {
        let _ = writeln!(o, "<p>{}</p>", escape(d.trim()));
    }
    let _ = writeln!(
        o,
        "<p class=\"caution\" id=\"caution\">{}</p>",
        escape(CAUTION)
    );
    let _ = writeln!(
        o,
        "<table id=\"provenance\">\n<tr><th>tool</th><td>eddyzone {}</td></tr>\n\
         <tr><th>input file</th><td>{}</td></tr>\n<tr><th>input SHA-256</th><td><code>{}</code>\
         </td></tr>\n</table>",
        escape(VERSION),
        escape(&r.input_name),
        escape(&r.input_sha256)
    );
    let _ = writeln!(
        o,
        "<p id=\"generated\">Generated {}</p>",
        escape(&r.generated)
    );

    // Verdict.
    let _ = writeln!(
        o,
        "<h2 id=\"verdict\">Verdict: {}</h2>",
        if r.verdict.pass {
            "PASS — every check of every case passed"
        } else {
            "FAIL — at least one check failed"
        }
    );
    verdict_words(r.verdict, &mut o);
    let _ = writeln!(
        o,
        "<p id=\"signs\">{}.</p>",
        escape(&sign_convention(&s.rider))
    );
    if let Some(src) = &s.limits.source {
        let _ = writeln!(o, "<p>Limits: {}</p>", escape(src));
    }
    if s.duty.is_some() {
        o.push_str(
            "<p>Each case is judged at the first dispatch and at the duty cycle's steady state; \
             every row is the worse of the two (state).</p>\n",
        );
    }
    o.push_str("<h3>Cases against the limits</h3>\n");
    verdict_table(r.verdict, &mut o);
    o.push_str(
        "<h3 id=\"worst\">Worst case of each check</h3>\n<table id=\"worst-table\">\n\
         <tr><th>check</th><th>worst case</th><th>state</th><th>margin</th>\
         <th>binds at (s)</th></tr>\n",
    );
    for w in &r.verdict.worst {
        let _ = writeln!(
            o,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            escape(&w.check),
            escape(&w.case),
            w.state.map(|s| s.name()).unwrap_or(""),
            num(w.margin, 3),
            w.at_duration_s
                .map(|d| format!("{d:.3}"))
                .unwrap_or_default()
        );
    }
    o.push_str("</table>\n");
    heating_summary(s, r.heat, &mut o);

    // Figures.
    o.push_str("<h2 id=\"figures\">Figures</h2>\n");
    for (i, (f, svg)) in r.figures.iter().enumerate() {
        let _ = writeln!(
            o,
            "<figure id=\"fig-{}\">\n{}\n<figcaption>Figure {}. {}</figcaption>\n</figure>",
            escape(&f.id),
            inline_svg(svg).trim_end(),
            i + 1,
            escape(&f.caption)
        );
    }

    o.push_str("<h2 id=\"runs\">Runs</h2>\n");
    runs_table(r.runs, &mut o);
    super::loads_out::loads_html(r.runs, &mut o);
    heating_section(s, r.heat, &mut o);

    // Model.
    o.push_str("<h2 id=\"model\">Model, assumptions and limits of validity</h2>\n<ul>\n");
    for n in MODEL_NOTES {
        let _ = writeln!(o, "<li>{}</li>", escape(n));
    }
    o.push_str("</ul>\n");

    // The inputs as written, then as read (every default explicit) in the same units.
    let _ = writeln!(
        o,
        "<h2 id=\"inputs-as-written\">Inputs as written</h2>\n<p>The scenario file {} as \
         given, line by line.</p>\n<pre class=\"input\" id=\"input-text\">{}</pre>",
        escape(&r.input_name),
        escape(&r.input_text)
    );
    let _ = writeln!(
        o,
        "<table id=\"inputs\">\n<tr><th>vehicle mass</th><td>{} kg</td></tr>\n\
         <tr><th>vehicle length</th><td>{} m</td></tr>\n<tr><th>fins</th><td>{}</td></tr>\n\
         <tr><th>magnet sections</th><td>{}</td></tr>\n<tr><th>cases</th><td>{}</td></tr>\n\
         <tr><th>zone</th><td>{} m to {} m</td></tr>\n</table>",
        s.vehicle.mass_kg,
        s.vehicle.length_m,
        s.fins.len(),
        s.sections.len(),
        s.cases.len(),
        s.zone_start_m,
        s.zone_end_m
    );
    o.push_str(
        "<h2 id=\"scenario\">Scenario as read</h2>\n<p>The validated scenario written back in \
         the file's units: every default explicit, repeats expanded into their copies, generated \
         cases as the block that makes them, limits inline (accelerations in g).</p>\n",
    );
    let as_read = to_yaml_with(s, &AsWritten::new(&r.input_text))
        .or_else(|_| to_yaml(s))
        .unwrap_or_else(|e| format!("(not shown: {e})"));
    let _ = writeln!(
        o,
        "<pre class=\"input\" id=\"scenario-as-read\">{}</pre>",
        escape(&as_read)
    );
    o.push_str("</body>\n</html>\n");
    o
}

/// The generation time stamp of a report: `SOURCE_DATE_EPOCH` (seconds, UTC) when set, else the
/// clock, as "YYYY-MM-DDThh:mm:ssZ (UTC)".
pub fn generation_stamp() -> String {
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

/// UTC date and time `YYYY-MM-DDTHH:MM:SSZ` of `secs` seconds after 1970-01-01T00:00:00Z.
///
/// Civil date from a day count after H. Hinnant, "chrono-Compatible Low-Level Date
/// Algorithms" (`civil_from_days`), 2013.
pub fn utc_timestamp(secs: i64) -> String {
    let days = secs.div_euclid(86_400);
    let rem = secs.rem_euclid(86_400);
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    format!(
        "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}Z",
        rem / 3600,
        rem % 3600 / 60,
        rem % 60
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn timestamps_match_known_dates() {
        // Reference values: POSIX time of known instants (e.g. `date -u -d @SECS`).
        assert_eq!(utc_timestamp(0), "1970-01-01T00:00:00Z");
        assert_eq!(utc_timestamp(951_782_400), "2000-02-29T00:00:00Z");
        assert_eq!(utc_timestamp(1_700_000_000), "2023-11-14T22:13:20Z");
        assert_eq!(utc_timestamp(-1), "1969-12-31T23:59:59Z");
    }

    #[test]
    fn escapes_markup() {
        assert_eq!(escape("a<b & \"c\""), "a&lt;b &amp; &quot;c&quot;");
    }
}
