//! Which cases a figure draws prominently: with dozens of cases (N−1, corners) only the nominal
//! cases and the worst case of each check are drawn in colour and named; the rest are thin light
//! background lines under one legend row.
//!
//! A case's colour is the same in every figure: the prominent cases of the whole report take the
//! palette's colours in case order (listed and backwards-entry cases, then worst cases). Black
//! and yellow are left out of the case colours (black is too close to the limit lines' dark
//! grey, yellow does not read as a thin line on white), so at most [`MAX_PROMINENT`] cases are
//! prominent; beyond that the worst cases of failing checks come first, then the other worst
//! cases, then the listed ones.

use crate::checks::Verdict;
use crate::scenario::{CaseOrigin, Scenario};

/// Palette indices (see [`crate::report::plots::palette_color`]) used for cases: blue,
/// vermillion, bluish green, reddish purple, orange, sky blue.
pub const CASE_COLORS: [usize; 6] = [0, 1, 2, 3, 4, 5];
/// Most cases drawn prominently in a report.
pub const MAX_PROMINENT: usize = CASE_COLORS.len();

/// The prominent cases of a report and what each is the worst of.
#[derive(Debug, Clone, Default)]
pub struct Emphasis {
    /// (case name, colour index, nominal, checks it is the worst of), in colour order.
    cases: Vec<(String, usize, bool, Vec<String>)>,
}

impl Emphasis {
    /// The prominent cases of the scenario `s` under the verdict `v`.
    pub fn new(s: &Scenario, v: &Verdict) -> Self {
        let nominal: Vec<&str> = s
            .cases
            .iter()
            .filter(|c| matches!(c.origin, CaseOrigin::Listed | CaseOrigin::Rollback { .. }))
            .map(|c| c.name.as_str())
            .collect();
        let failing = |check: &str, case: &str| {
            v.cases
                .iter()
                .filter(|c| c.case == case)
                .flat_map(|c| &c.checks)
                .any(|r| !r.pass && r.key() == check)
        };
        // Priority for the limited colours: worst of failing checks, other worst, nominal.
        let mut wanted: Vec<String> = Vec::new();
        let worst_failing = v.worst.iter().filter(|w| failing(&w.check, &w.case));
        let names = worst_failing
            .map(|w| w.case.as_str())
            .chain(v.worst.iter().map(|w| w.case.as_str()))
            .chain(nominal.iter().copied());
        for name in names {
            let known = s.cases.iter().any(|c| c.name == name);
            if known && !wanted.iter().any(|w| w == name) {
                wanted.push(name.to_string());
            }
        }
        wanted.truncate(MAX_PROMINENT);
        // Colours in case order.
        let mut cases = Vec::new();
        for c in s.cases.iter().filter(|c| wanted.contains(&c.name)) {
            let worst: Vec<String> = v
                .worst
                .iter()
                .filter(|w| w.case == c.name)
                .map(|w| match w.state {
                    Some(st) => format!("{} ({})", w.check, st.name()),
                    None => w.check.clone(),
                })
                .collect();
            let colour = CASE_COLORS[cases.len() % CASE_COLORS.len()];
            cases.push((
                c.name.clone(),
                colour,
                nominal.contains(&c.name.as_str()),
                worst,
            ));
        }
        Self { cases }
    }

    /// The colour index of `case` when some figure draws it prominently.
    pub fn color(&self, case: &str) -> Option<usize> {
        self.cases.iter().find(|c| c.0 == case).map(|c| c.1)
    }

    /// Whether a figure whose checks are those with a name starting with one of `checks`
    /// draws `case` prominently (it is nominal or the worst of one of them) and the legend
    /// text saying why: "empty (nominal)\nworst exit_speed_min" (one row per check), … `checks` empty: nominal only.
    pub fn label(&self, case: &str, checks: &[&str]) -> Option<String> {
        let (name, _, nominal, worst) = self.cases.iter().find(|c| c.0 == case)?;
        let relevant: Vec<&str> = worst
            .iter()
            .filter(|w| checks.iter().any(|p| w.starts_with(p)))
            .map(String::as_str)
            .collect();
        if !nominal && relevant.is_empty() {
            return None;
        }
        let mut text = name.clone();
        if *nominal {
            text.push_str(" (nominal)");
        }
        if !relevant.is_empty() {
            text.push_str(&format!("\nworst {}", relevant.join("\nworst ")));
        }
        Some(text)
    }

    /// Number of prominent cases.
    pub fn len(&self) -> usize {
        self.cases.len()
    }

    /// Whether no case is prominent.
    pub fn is_empty(&self) -> bool {
        self.cases.is_empty()
    }
}
