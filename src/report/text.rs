//! Plain-text tables for the terminal.

/// A table with a header row, right-aligned numeric columns and left-aligned text.
#[derive(Debug, Default, Clone)]
pub struct Table {
    header: Vec<String>,
    rows: Vec<Vec<String>>,
}

impl Table {
    /// A table with these column titles.
    pub fn new<S: AsRef<str>>(header: &[S]) -> Self {
        Self {
            header: header.iter().map(|s| s.as_ref().to_string()).collect(),
            rows: vec![],
        }
    }

    /// Adds a row.
    pub fn row(&mut self, cells: Vec<String>) {
        self.rows.push(cells);
    }

    /// Renders with two spaces between columns.
    pub fn render(&self) -> String {
        let n = self.header.len();
        let mut w = vec![0usize; n];
        for r in std::iter::once(&self.header).chain(&self.rows) {
            for (i, c) in r.iter().enumerate().take(n) {
                w[i] = w[i].max(c.chars().count());
            }
        }
        let mut out = String::new();
        for (k, r) in std::iter::once(&self.header).chain(&self.rows).enumerate() {
            let line: Vec<String> = (0..n)
                .map(|i| {
                    let c = r.get(i).map(String::as_str).unwrap_or("");
                    let pad = w[i] - c.chars().count();
                    if i == 0 || c.parse::<f64>().is_err() {
                        format!("{c}{}", " ".repeat(pad))
                    } else {
                        format!("{}{c}", " ".repeat(pad))
                    }
                })
                .collect();
            out.push_str(line.join("  ").trim_end());
            out.push('\n');
            if k == 0 {
                out.push_str(
                    &w.iter()
                        .map(|&x| "-".repeat(x))
                        .collect::<Vec<_>>()
                        .join("  "),
                );
                out.push('\n');
            }
        }
        out
    }
}

/// A number with `digits` decimals, or "-" for None.
pub fn num(x: Option<f64>, digits: usize) -> String {
    match x {
        Some(v) if v.is_finite() => format!("{v:.digits$}"),
        Some(v) => format!("{v}"),
        None => "-".into(),
    }
}

/// The hottest fin of all cases in words: which fin, which case, its peak (the steady peak with
/// a duty block, else the peak after the pass) and its margin to the fin-temperature limit;
/// `None` without fins.
pub fn hottest_fin(
    s: &crate::scenario::Scenario,
    heats: &[crate::thermal::CaseHeat],
) -> Option<String> {
    let (h, f) = heats
        .iter()
        .flat_map(|h| h.fins.iter().map(move |f| (h, f)))
        .max_by(|a, b| {
            a.1.steady_peak_temperature_c
                .total_cmp(&b.1.steady_peak_temperature_c)
        })?;
    let limit = match s.limits.max_fin_temperature_c {
        Some(l) => format!(
            " against the limit of {l:.1} °C (margin {:.1} K)",
            l - f.steady_peak_temperature_c
        ),
        None => " (no fin-temperature limit given)".to_string(),
    };
    let state = if s.duty.is_some() {
        "steady peak"
    } else {
        "peak after the pass"
    };
    Some(format!(
        "fin {} in case {}, {state} {:.1} °C{limit}",
        f.fin, h.case, f.steady_peak_temperature_c
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn aligns() {
        let mut t = Table::new(&["case", "v"]);
        t.row(vec!["a".into(), "1.5".into()]);
        t.row(vec!["long-name".into(), "12.25".into()]);
        let s = t.render();
        assert!(s.contains("long-name  12.25"), "{s}");
        assert!(s.contains("a            1.5"), "{s}");
    }
}
