//! `eddyzone heat SCENARIO`: fin heating over a pass and over the duty cycle of every case.

use super::{load, make_dir, select_cases, write_file};
use crate::dynamics::BrakeTables;
use crate::error::Error;
use crate::report::text::{num, Table};
use crate::report::{csv_out, file_stem, VERSION};
use crate::scenario::Scenario;
use crate::thermal::{heat_all, CaseHeat, HeatOptions};
use clap::Args;
use serde::Serialize;
use std::path::PathBuf;

/// Options of `heat`.
#[derive(Debug, Args)]
pub struct HeatArgs {
    /// The scenario file.
    pub scenario: PathBuf,
    /// Print JSON instead of the tables.
    #[arg(long)]
    pub json: bool,
    /// Only this case.
    #[arg(long)]
    pub case: Option<String>,
    /// Write the last pass of each case (`<case>.csv`, with a temperature column per track fin)
    /// and the temperature along each track fin (`fin_<fin>_<case>.csv`) into this folder.
    #[arg(long)]
    pub profile: Option<PathBuf>,
}

/// One fin in `heat --json`.
#[derive(Debug, Serialize)]
struct FinJson<'a> {
    fin: &'a str,
    mount: &'a str,
    energy_per_pass_j: f64,
    rise_per_pass_k: f64,
    peak_temperature_c: f64,
    steady_peak_temperature_c: f64,
    cycles_to_steady: Option<u32>,
    time_constant_s: Option<f64>,
}

/// One case in `heat --json`.
#[derive(Debug, Serialize)]
struct CaseJson<'a> {
    case: &'a str,
    fins: Vec<FinJson<'a>>,
    steady_peak_fin_temperature_c: f64,
    cycles_to_steady: Option<u32>,
    cycles_run: usize,
    exit_speed_first_m_s: Option<f64>,
    exit_speed_steady_m_s: Option<f64>,
    peak_decel_first_g: Option<f64>,
    peak_decel_steady_g: Option<f64>,
    magnet_temp_c: f64,
    cycles: &'a [crate::thermal::CycleRow],
    warnings: &'a [String],
}

/// The `heat --json` document.
#[derive(Debug, Serialize)]
struct HeatJson<'a> {
    version: &'a str,
    scenario: &'a str,
    duty: Option<crate::scenario::Duty>,
    note: Option<&'a str>,
    cases: Vec<CaseJson<'a>>,
}

const SINGLE_PASS_NOTE: &str =
    "no duty block: a single pass (steady = first pass, cycles_to_steady = 1)";

fn json_doc<'a>(s: &'a Scenario, heats: &'a [CaseHeat]) -> HeatJson<'a> {
    HeatJson {
        version: VERSION,
        scenario: &s.name,
        duty: s.duty,
        note: s.duty.is_none().then_some(SINGLE_PASS_NOTE),
        cases: heats
            .iter()
            .map(|h| CaseJson {
                case: &h.case,
                fins: h
                    .fins
                    .iter()
                    .map(|f| FinJson {
                        fin: &f.fin,
                        mount: f.mount,
                        energy_per_pass_j: f.energy_per_pass_j,
                        rise_per_pass_k: f.rise_per_pass_k,
                        peak_temperature_c: f.peak_temperature_c,
                        steady_peak_temperature_c: f.steady_peak_temperature_c,
                        cycles_to_steady: f.cycles_to_steady,
                        time_constant_s: f.time_constant_s,
                    })
                    .collect(),
                steady_peak_fin_temperature_c: h.steady_peak_fin_temperature_c,
                cycles_to_steady: h.cycles_to_steady,
                cycles_run: h.cycles.len(),
                exit_speed_first_m_s: h.exit_speed_first_m_s,
                exit_speed_steady_m_s: h.exit_speed_steady_m_s,
                peak_decel_first_g: h.peak_decel_first_g,
                peak_decel_steady_g: h.peak_decel_steady_g,
                magnet_temp_c: h.magnet_temp_c,
                cycles: &h.cycles,
                warnings: &h.warnings,
            })
            .collect(),
    }
}

fn text_doc(s: &Scenario, heats: &[CaseHeat]) -> String {
    let mut out = String::new();
    match &s.duty {
        Some(d) => outln!(
            out,
            "{} — fin heating over the duty cycle (interval {:.0} s, ambient {:.1} °C, film coefficient {:.1} W/(m²·K))",
            s.name,
            d.interval_s,
            d.ambient_c,
            d.film_coefficient_w_m2_k
        ),
        None => outln!(
            out,
            "{} — fin heating over one pass ({SINGLE_PASS_NOTE})",
            s.name
        ),
    }
    for h in heats {
        outln!(out, "");
        outln!(
            out,
            "case {} (magnets at {:.1} °C): {} cycle{}, steady after {}",
            h.case,
            h.magnet_temp_c,
            h.cycles.len(),
            if h.cycles.len() == 1 { "" } else { "s" },
            h.cycles_to_steady
                .map_or("—".to_string(), |c| c.to_string())
        );
        let mut t = Table::new(&[
            "cycle",
            "exit_m_s",
            "peak_decel_g",
            "energy_kj",
            "peak_fin_c",
        ]);
        for r in &h.cycles {
            t.row(vec![
                r.cycle.to_string(),
                num(r.exit_speed_m_s, 3),
                num(r.peak_decel_g, 3),
                num(Some(r.braking_energy_j / 1e3), 1),
                num(Some(r.peak_fin_temperature_c), 2),
            ]);
        }
        outp!(out, "{}", t.render());
        let mut f = Table::new(&[
            "fin",
            "mount",
            "energy_kj",
            "rise_k",
            "peak_c",
            "steady_peak_c",
            "steady_after",
            "tau_s",
        ]);
        for fin in &h.fins {
            f.row(vec![
                fin.fin.clone(),
                fin.mount.into(),
                num(Some(fin.energy_per_pass_j / 1e3), 1),
                num(Some(fin.rise_per_pass_k), 2),
                num(Some(fin.peak_temperature_c), 2),
                num(Some(fin.steady_peak_temperature_c), 2),
                fin.cycles_to_steady
                    .map_or("—".to_string(), |c| c.to_string()),
                num(fin.time_constant_s, 0),
            ]);
        }
        outp!(out, "{}", f.render());
        outln!(
            out,
            "steady peak fin temperature {:.2} °C; exit speed {} → {} m/s, peak deceleration {} → {} g",
            h.steady_peak_fin_temperature_c,
            num(h.exit_speed_first_m_s, 3),
            num(h.exit_speed_steady_m_s, 3),
            num(h.peak_decel_first_g, 3),
            num(h.peak_decel_steady_g, 3)
        );
        for w in &h.warnings {
            outln!(out, "warning: {}: {w}", h.case);
        }
    }
    out
}

fn fin_csv(p: &crate::thermal::TrackProfile) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(["s_m", "rise_k", "temp_c"])?;
    for ((s, t), r) in p.temps.iter().zip(&p.rise_k) {
        w.write_record([format!("{s}"), format!("{r}"), format!("{t}")])?;
    }
    w.into_inner().map_err(|e| csv::Error::from(e.into_error()))
}

fn write_profiles(dir: &PathBuf, heats: &[CaseHeat]) -> Result<(), Error> {
    make_dir(dir)?;
    for h in heats {
        let Some(run) = &h.last_run else { continue };
        // Temperature of each track fin at the vehicle front's position, after the last pass.
        let names: Vec<String> = h
            .track_profiles
            .iter()
            .map(|p| format!("{}_temp_c", p.fin))
            .collect();
        let extra: Vec<(&str, Vec<f64>)> = h
            .track_profiles
            .iter()
            .zip(&names)
            .map(|(p, name)| {
                let col = run
                    .samples
                    .iter()
                    .map(|s| temp_at(p, s.s_m).unwrap_or(f64::NAN))
                    .collect();
                (name.as_str(), col)
            })
            .collect();
        let bytes = csv_out::profile_csv(&run.samples, &extra)
            .map_err(|e| Error::Compute(e.to_string()))?;
        write_file(&dir.join(format!("{}.csv", file_stem(&h.case))), &bytes)?;
        for p in &h.track_profiles {
            let bytes = fin_csv(p).map_err(|e| Error::Compute(e.to_string()))?;
            write_file(
                &dir.join(format!(
                    "fin_{}_{}.csv",
                    file_stem(&p.fin),
                    file_stem(&h.case)
                )),
                &bytes,
            )?;
        }
    }
    Ok(())
}

/// Temperature of the cell holding `s_m` (None outside the fin).
fn temp_at(p: &crate::thermal::TrackProfile, s_m: f64) -> Option<f64> {
    let n = p.temps.len();
    if n == 0 {
        return None;
    }
    // Cell centres are ascending; the cell holding s is the one with the nearest centre.
    let half = if n > 1 {
        0.5 * (p.temps[1].0 - p.temps[0].0)
    } else {
        f64::INFINITY
    };
    if s_m < p.temps[0].0 - half || s_m > p.temps[n - 1].0 + half {
        return None;
    }
    let k = p.temps.partition_point(|c| c.0 < s_m);
    let best = match k {
        0 => 0,
        k if k >= n => n - 1,
        k => {
            if (p.temps[k].0 - s_m) < (s_m - p.temps[k - 1].0) {
                k
            } else {
                k - 1
            }
        }
    };
    Some(p.temps[best].1)
}

/// Runs `heat`.
pub fn execute(a: &HeatArgs) -> Result<i32, Error> {
    let mut s = load(&a.scenario)?;
    select_cases(&mut s, &a.case)?;
    let tables = BrakeTables::build(&s).map_err(|e| Error::Compute(e.to_string()))?;
    let heats = heat_all(&s, &tables, &HeatOptions::default())
        .map_err(|e| Error::Compute(e.to_string()))?;
    if let Some(dir) = &a.profile {
        write_profiles(dir, &heats)?;
    }
    let out = if a.json {
        let mut o = serde_json::to_string_pretty(&json_doc(&s, &heats))
            .map_err(|e| Error::Compute(e.to_string()))?;
        o.push('\n');
        o
    } else {
        text_doc(&s, &heats)
    };
    super::emit(&out)?;
    Ok(crate::error::EXIT_OK)
}
