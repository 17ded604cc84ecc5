//! Warnings of a study, each said once: the per-case warnings of runs and heat passes grouped
//! by their wording (the numbers in them given as a range, the cases named), and the warning
//! when runs meet the magnets far above the critical speed.

use crate::dynamics::model::{BrakeTables, PairLaw};
use crate::dynamics::RunResult;
use crate::scenario::Scenario;

/// A run that meets the magnets at more than this multiple of the lowest critical speed of its
/// pairs is "far above" it: the force model's edge factor is checked against an independent
/// finite-element solution from 0.1 to 5 × the critical speed (tests/reference_edge.rs) and
/// not beyond.
pub const FAR_ABOVE_CRITICAL: f64 = 5.0;

/// Most case names listed in a grouped warning before "and N more".
const NAMES_SHOWN: usize = 6;

/// A part of a warning's text that may differ between cases: a number or a quoted name.
#[derive(Debug, Clone, PartialEq)]
enum Value {
    /// `12.5`, `-0.25`.
    Number(f64),
    /// The text between single quotes (`'B-3'` → `B-3`).
    Name(String),
}

/// A variable part: where it is in the text and its value.
struct Part {
    at: std::ops::Range<usize>,
    value: Value,
}

/// The variable parts of a text: quoted names (`'B-3'`) and numbers (`12`, `-0.5`), not the
/// digits inside names (`B-3`, `N42SH`).
fn parts(text: &str) -> Vec<Part> {
    let b = text.as_bytes();
    let mut out = Vec::new();
    let mut i = 0;
    while i < b.len() {
        if b[i] == b'\'' {
            if let Some(len) = text[i + 1..].find('\'') {
                let name = &text[i + 1..i + 1 + len];
                out.push(Part {
                    at: i + 1..i + 1 + len,
                    value: Value::Name(name.to_string()),
                });
                i += len + 2;
                continue;
            }
        }
        let starts =
            b[i].is_ascii_digit() || (b[i] == b'-' && b.get(i + 1).is_some_and(u8::is_ascii_digit));
        let inside_word = i > 0 && (b[i - 1].is_ascii_alphanumeric() || b[i - 1] == b'-');
        if !starts || inside_word {
            i += 1;
            continue;
        }
        let mut j = i + 1;
        while j < b.len() && (b[j].is_ascii_digit() || b[j] == b'.') {
            j += 1;
        }
        let end = text[i..j].trim_end_matches('.').len() + i;
        if let Ok(value) = text[i..end].parse::<f64>() {
            out.push(Part {
                at: i..end,
                value: Value::Number(value),
            });
        }
        i = j.max(i + 1);
    }
    out
}

/// The text with its numbers replaced by `#` and its quoted names by `@` (the grouping key).
fn template(text: &str) -> String {
    let mut out = String::new();
    let mut last = 0;
    for p in parts(text) {
        out.push_str(&text[last..p.at.start]);
        out.push(match p.value {
            Value::Number(_) => '#',
            Value::Name(_) => '@',
        });
        last = p.at.end;
    }
    out.push_str(&text[last..]);
    out
}

/// Names as a short list, each once: copies of one repeat folded by their numbers
/// (`B-1`, `B-2`, `B-3`, `B-5` → `B-1…B-3, B-5`), other names as they are, in order of first
/// appearance.
pub fn name_list(names: &[&str]) -> String {
    // (base, numbers) for numbered copies, (name, []) for the rest.
    let mut groups: Vec<(&str, Vec<u64>)> = Vec::new();
    for n in names {
        let (base, number) = match n.rsplit_once('-') {
            Some((b, r)) => match r.parse::<u64>() {
                Ok(k) if r.chars().all(|c| c.is_ascii_digit()) => (b, Some(k)),
                _ => (*n, None),
            },
            None => (*n, None),
        };
        match groups.iter_mut().find(|g| g.0 == base) {
            Some(g) => g.1.extend(number),
            None => groups.push((base, number.into_iter().collect())),
        }
    }
    let mut out: Vec<String> = Vec::new();
    for (base, mut numbers) in groups {
        if numbers.is_empty() {
            out.push(base.to_string());
            continue;
        }
        numbers.sort_unstable();
        numbers.dedup();
        let mut i = 0;
        while i < numbers.len() {
            let mut j = i;
            while j + 1 < numbers.len() && numbers[j + 1] == numbers[j] + 1 {
                j += 1;
            }
            match j - i {
                0 => out.push(format!("{base}-{}", numbers[i])),
                1 => {
                    out.push(format!("{base}-{}", numbers[i]));
                    out.push(format!("{base}-{}", numbers[j]));
                }
                _ => out.push(format!("{base}-{}…{base}-{}", numbers[i], numbers[j])),
            }
            i = j + 1;
        }
    }
    out.join(", ")
}

/// Groups `(case, warning)` pairs by wording: one line per distinct wording, in order of first
/// appearance; a number that differs between the cases is shown as its range (`12.1–15.3`), a
/// quoted name as the list of names (`'B-1…B-7'`), and the line ends with the cases it applies
/// to (all of the scenario's `case_count` cases: "every case").
pub fn grouped(items: &[(String, String)], case_count: usize) -> Vec<String> {
    let mut groups: Vec<(String, Vec<&(String, String)>)> = Vec::new();
    for it in items {
        let key = template(&it.1);
        match groups.iter_mut().find(|g| g.0 == key) {
            Some(g) => g.1.push(it),
            None => groups.push((key, vec![it])),
        }
    }
    groups
        .into_iter()
        .map(|(_, members)| {
            let first = &members[0].1;
            let all: Vec<Vec<Part>> = members.iter().map(|m| parts(&m.1)).collect();
            let mut text = String::new();
            let mut last = 0;
            for (k, p) in all[0].iter().enumerate() {
                text.push_str(&first[last..p.at.start]);
                text.push_str(&merged(&members, &all, k));
                last = p.at.end;
            }
            text.push_str(&first[last..]);
            let mut cases: Vec<&str> = Vec::new();
            for m in &members {
                if !cases.contains(&m.0.as_str()) {
                    cases.push(&m.0);
                }
            }
            let whom = if cases.len() == case_count && case_count > 1 {
                format!("every case ({case_count})")
            } else if cases.len() == 1 {
                format!("case {}", cases[0])
            } else if cases.len() <= NAMES_SHOWN {
                format!("cases {}", cases.join(", "))
            } else {
                format!(
                    "{} cases: {} and {} more",
                    cases.len(),
                    cases[..NAMES_SHOWN].join(", "),
                    cases.len() - NAMES_SHOWN
                )
            };
            format!("{text} ({whom})")
        })
        .collect()
}

/// The `k`-th variable part over the members of a group: a number as its range (as written
/// at its lowest and highest), a name as the list of the names.
fn merged(members: &[&(String, String)], all: &[Vec<Part>], k: usize) -> String {
    let written = |m: usize, p: &Part| members[m].1[p.at.clone()].to_string();
    match &all[0][k].value {
        Value::Number(v0) => {
            let mut lo = (*v0, written(0, &all[0][k]));
            let mut hi = lo.clone();
            for (m, ps) in all.iter().enumerate().skip(1) {
                if let Some(
                    p @ Part {
                        value: Value::Number(x),
                        ..
                    },
                ) = ps.get(k)
                {
                    if *x < lo.0 {
                        lo = (*x, written(m, p));
                    }
                    if *x > hi.0 {
                        hi = (*x, written(m, p));
                    }
                }
            }
            if lo.0 == hi.0 {
                lo.1
            } else {
                format!("{}–{}", lo.1, hi.1)
            }
        }
        Value::Name(_) => {
            let names: Vec<&str> = all
                .iter()
                .enumerate()
                .filter_map(|(m, ps)| ps.get(k).map(|p| &members[m].1[p.at.clone()]))
                .collect();
            name_list(&names)
        }
    }
}

/// The warning when some run meets the magnets at more than [`FAR_ABOVE_CRITICAL`] times the
/// lowest critical speed of its pairs (at the case's fin temperature: σ·v scaling), naming the
/// worst case; `None` when no run does. A case may have several runs (first dispatch and steady
/// state); it counts once.
pub fn far_above_critical(
    s: &Scenario,
    tables: &BrakeTables,
    runs: &[&RunResult],
) -> Option<String> {
    let mut worst: Option<(f64, f64, f64, &str)> = None;
    let mut cases: Vec<&str> = Vec::new();
    let mut far: Vec<&str> = Vec::new();
    for r in runs {
        if !cases.contains(&r.case.as_str()) {
            cases.push(&r.case);
        }
        let Some(case) = s.case(&r.case) else {
            continue;
        };
        let critical = tables
            .pairs
            .iter()
            .filter_map(|p| match &p.law {
                PairLaw::Table { model, .. } => Some(
                    model.critical_speed_m_s()
                        * s.fins[p.fin].material.resistivity_ratio(case.fin_temp_c),
                ),
                PairLaw::Measured { .. } => None,
            })
            .fold(f64::INFINITY, f64::min);
        if !(critical.is_finite() && critical > 0.0) {
            continue;
        }
        let top = r
            .samples
            .iter()
            .filter(|p| p.overlap_m > 0.0)
            .map(|p| p.v_m_s.abs())
            .fold(0.0, f64::max);
        let ratio = top / critical;
        if ratio > FAR_ABOVE_CRITICAL {
            if !far.contains(&r.case.as_str()) {
                far.push(&r.case);
            }
            if worst.is_none_or(|w| ratio > w.0) {
                worst = Some((ratio, top, critical, &r.case));
            }
        }
    }
    worst.map(|(ratio, top, critical, case)| {
        format!(
            "{} of {} case(s) meet the magnets at more than {FAR_ABOVE_CRITICAL}× the critical \
             speed (worst: case {case}, {top:.1} m/s, {ratio:.1}× {critical:.2} m/s): the force \
             model is checked against an independent solution only up to {FAR_ABOVE_CRITICAL}× \
             (README, the model and its limits of validity)",
            far.len(),
            cases.len()
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn items(v: &[(&str, &str)]) -> Vec<(String, String)> {
        v.iter()
            .map(|(a, b)| (a.to_string(), b.to_string()))
            .collect()
    }

    #[test]
    fn numbers_skip_names() {
        let n: Vec<Value> = parts("section B-3 at 12.5 m/s, -0.25 g, N42SH, 80 °C, fin 'W-2'.")
            .into_iter()
            .map(|n| n.value)
            .collect();
        assert_eq!(
            n,
            vec![
                Value::Number(12.5),
                Value::Number(-0.25),
                Value::Number(80.0),
                Value::Name("W-2".into())
            ]
        );
    }

    #[test]
    fn name_lists_fold_copies() {
        assert_eq!(name_list(&["B-1", "B-2", "B-3"]), "B-1…B-3");
        assert_eq!(
            name_list(&["E-1", "E-2", "W-1", "W-3", "W-2", "W-7", "east-fin"]),
            "E-1, E-2, W-1…W-3, W-7, east-fin"
        );
        assert_eq!(name_list(&["car-1", "car-1"]), "car-1");
    }

    #[test]
    fn same_wording_is_one_line_with_ranges_and_cases() {
        let w = grouped(
            &items(&[
                ("full", "left the range at 12.345 m/s (held)"),
                ("empty", "left the range at 15.5 m/s (held)"),
                ("hot", "left the range at 13.0 m/s (held)"),
                (
                    "full",
                    "magnets of 'B-1' at 130 °C exceed the grade's limit of 120 °C",
                ),
                (
                    "full",
                    "magnets of 'B-2' at 130 °C exceed the grade's limit of 120 °C",
                ),
                (
                    "full",
                    "magnets of 'B-3' at 130 °C exceed the grade's limit of 120 °C",
                ),
            ]),
            3,
        );
        assert_eq!(
            w,
            vec![
                "left the range at 12.345–15.5 m/s (held) (every case (3))".to_string(),
                "magnets of 'B-1…B-3' at 130 °C exceed the grade's limit of 120 °C (case full)"
                    .to_string(),
            ]
        );
        let many: Vec<(String, String)> = (0..9)
            .map(|i| (format!("c{i}"), "creeping for 10 s".to_string()))
            .collect();
        let w = grouped(&many, 27);
        assert_eq!(w.len(), 1);
        assert!(
            w[0].ends_with("(9 cases: c0, c1, c2, c3, c4, c5 and 3 more)"),
            "{}",
            w[0]
        );
    }
}
