//! The sections' loads over the runs ([`SectionLoad`]: peak force, impulse ∫F dt, energy
//! −∫F·v dt) as terminal tables and the report's HTML table: per case and section, and the
//! envelope over the cases (per section, the largest of each and the case that sets it).

use super::html::escape;
use super::text::{num, Table};
use crate::dynamics::{RunResult, SectionLoad};
use std::fmt::Write as _;

/// Per section, the largest value of each load over the cases, with the case that sets it.
#[derive(Debug, Clone, PartialEq)]
pub struct LoadEnvelope<'a> {
    /// Section name.
    pub section: &'a str,
    /// Largest peak force, N, and its case.
    pub peak_force: (f64, &'a str),
    /// Largest |impulse|, N·s, and its case.
    pub impulse: (f64, &'a str),
    /// Largest energy, J, and its case.
    pub energy: (f64, &'a str),
}

/// The envelope of every section that appears in the runs, in the order of the first run.
pub fn envelope<'a>(results: &'a [RunResult]) -> Vec<LoadEnvelope<'a>> {
    let mut out: Vec<LoadEnvelope<'a>> = Vec::new();
    for r in results {
        for x in &r.sections {
            let case = r.case.as_str();
            let pos = out.iter().position(|e| e.section == x.section);
            let e = match pos {
                Some(i) => &mut out[i],
                None => {
                    out.push(LoadEnvelope {
                        section: &x.section,
                        peak_force: (x.peak_force_n, case),
                        impulse: (x.impulse_n_s.abs(), case),
                        energy: (x.energy_j, case),
                    });
                    continue;
                }
            };
            let more = |slot: &mut (f64, &'a str), v: f64, case: &'a str| {
                if v > slot.0 {
                    *slot = (v, case);
                }
            };
            more(&mut e.peak_force, x.peak_force_n, case);
            more(&mut e.impulse, x.impulse_n_s.abs(), case);
            more(&mut e.energy, x.energy_j, case);
        }
    }
    out
}

/// The `run` text: the envelope over the cases, or (with `per_case`) every case × section.
/// Empty when the runs carry no loads.
pub fn loads_text(results: &[RunResult], per_case: bool) -> String {
    if results.iter().all(|r| r.sections.is_empty()) {
        return String::new();
    }
    let mut out = String::new();
    if per_case {
        out.push_str(
            "Section loads per case (force on the vehicle along +s; the section's mounting takes \
             the opposite)\n",
        );
        let mut t = Table::new(&[
            "case",
            "section",
            "peak_force_kn",
            "at_s",
            "at_m",
            "impulse_kn_s",
            "energy_kj",
        ]);
        for r in results {
            for x in &r.sections {
                t.row(row_cells(&r.case, x));
            }
        }
        out.push_str(&t.render());
    } else {
        out.push_str(
            "Section loads, largest over the cases (`run --sections`: every case; `--json`: \
             `sections` of each case)\n",
        );
        let mut t = Table::new(&[
            "section",
            "peak_force_kn",
            "case",
            "impulse_kn_s",
            "case",
            "energy_kj",
            "case",
        ]);
        for e in envelope(results) {
            t.row(vec![
                e.section.to_string(),
                num(Some(e.peak_force.0 / 1e3), 2),
                e.peak_force.1.to_string(),
                num(Some(e.impulse.0 / 1e3), 3),
                e.impulse.1.to_string(),
                num(Some(e.energy.0 / 1e3), 1),
                e.energy.1.to_string(),
            ]);
        }
        out.push_str(&t.render());
    }
    out
}

fn row_cells(case: &str, x: &SectionLoad) -> Vec<String> {
    vec![
        case.to_string(),
        x.section.clone(),
        num(Some(x.peak_force_n / 1e3), 2),
        num(x.peak_force_time_s, 3),
        num(x.peak_force_position_m, 2),
        num(Some(x.impulse_n_s / 1e3), 3),
        num(Some(x.energy_j / 1e3), 1),
    ]
}

/// The report's section-load tables (envelope, then every case × section); nothing when the
/// runs carry no loads.
pub fn loads_html(results: &[RunResult], out: &mut String) {
    if results.iter().all(|r| r.sections.is_empty()) {
        return;
    }
    out.push_str(
        "<h2 id=\"section-loads\">Section loads</h2>\n<p>What each magnet section and its \
         mounting carry over a run: the largest force between the section and the fins, the \
         impulse ∫F dt and the energy dissipated −∫F·v dt (forces on the vehicle along the \
         track; the mounting takes the opposite). The energies of a case sum to its braking \
         energy.</p>\n<table id=\"section-load-envelope\">\n<tr><th>section</th><th>peak force \
         (kN)</th><th>case</th><th>|impulse| (kN·s)</th><th>case</th><th>energy (kJ)</th>\
         <th>case</th></tr>\n",
    );
    for e in envelope(results) {
        let _ = writeln!(
            out,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            escape(e.section),
            num(Some(e.peak_force.0 / 1e3), 2),
            escape(e.peak_force.1),
            num(Some(e.impulse.0 / 1e3), 3),
            escape(e.impulse.1),
            num(Some(e.energy.0 / 1e3), 1),
            escape(e.energy.1),
        );
    }
    out.push_str(
        "</table>\n<details>\n<summary>Every case and section</summary>\n\
         <table id=\"section-loads-per-case\">\n<tr><th>case</th><th>section</th><th>peak force \
         (kN)</th><th>at (s)</th><th>at front position (m)</th><th>impulse (kN·s)</th>\
         <th>energy (kJ)</th></tr>\n",
    );
    for r in results {
        for x in &r.sections {
            out.push_str("<tr>");
            for c in row_cells(&r.case, x) {
                let _ = write!(out, "<td>{}</td>", escape(&c));
            }
            out.push_str("</tr>\n");
        }
    }
    out.push_str("</table>\n</details>\n");
}

#[cfg(test)]
mod tests {
    use super::*;

    fn run(case: &str, loads: &[(f64, f64, f64)]) -> RunResult {
        let mut r = RunResult::empty(case, 1000.0, 0.0);
        r.sections = loads
            .iter()
            .enumerate()
            .map(|(i, &(f, j, e))| SectionLoad {
                section: format!("S{i}"),
                peak_force_n: f,
                peak_force_time_s: Some(1.0),
                peak_force_position_m: Some(2.0),
                impulse_n_s: j,
                energy_j: e,
            })
            .collect();
        r
    }

    #[test]
    fn envelope_takes_the_largest_of_each_with_its_case() {
        let runs = [
            run("a", &[(10.0, -5.0, 100.0), (1.0, -1.0, 1.0)]),
            run("b", &[(8.0, -7.0, 50.0), (2.0, -0.5, 3.0)]),
        ];
        let e = envelope(&runs);
        assert_eq!(e.len(), 2);
        assert_eq!(e[0].peak_force, (10.0, "a"));
        assert_eq!(e[0].impulse, (7.0, "b"));
        assert_eq!(e[0].energy, (100.0, "a"));
        assert_eq!(e[1].peak_force, (2.0, "b"));
        assert_eq!(e[1].impulse, (1.0, "a"));
        let text = loads_text(&runs, false);
        assert!(text.contains("S0") && text.contains("S1"), "{text}");
        assert_eq!(loads_text(&runs, true).lines().count(), 1 + 2 + 4);
        assert!(loads_text(&[RunResult::empty("c", 1.0, 0.0)], false).is_empty());
    }
}
