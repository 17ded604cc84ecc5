//! `eddyzone sweep SCENARIO`: the scenario's `sweep:` block — every sample judged, the spread of
//! each check, its failure probability and sensitivities; exit 1 when any sample fails a limit.
//! `--shard K/N --shard-file FILE` judges one slice and writes it; `sweep merge SHARD...` gives
//! the whole result from all N shard files.

use super::error::{Error, EXIT_LIMIT_FAILED, EXIT_OK};
use super::progress::Bar;
use super::{emit, load};
use clap::{Args, Subcommand};
use eddyzone::report::sweep_figures::sweep_figures;
use eddyzone::report::sweep_out::{samples_csv, sweep_json, sweep_text};
use eddyzone::report::{make_dir, write_file};
use eddyzone::study::{JudgeOptions, Progress, Silent};
use eddyzone::sweep::shard::{merge, run_shard, ShardFile};
use eddyzone::sweep::{run_sweep, SweepResult};
use std::path::PathBuf;

/// Options of `sweep`.
#[derive(Debug, Args)]
#[command(args_conflicts_with_subcommands = true, subcommand_negates_reqs = true)]
pub struct SweepArgs {
    /// `merge`: combine shard files.
    #[command(subcommand)]
    pub command: Option<SweepCommand>,
    /// The scenario file (with a `sweep:` block).
    #[arg(required = true)]
    pub scenario: Option<PathBuf>,
    /// Judge only shard K of N (1 ≤ K ≤ N): a fixed slice of the samples, written to
    /// `--shard-file` for `sweep merge`.
    #[arg(long, value_name = "K/N", value_parser = parse_shard, requires = "shard_file",
          conflicts_with_all = ["json", "csv", "json_file", "write_worst", "figures"])]
    pub shard: Option<(usize, usize)>,
    /// The shard file to write (with `--shard`).
    #[arg(long, value_name = "FILE", requires = "shard")]
    pub shard_file: Option<PathBuf>,
    /// The outputs.
    #[command(flatten)]
    pub out: SweepOutputs,
}

/// The outputs of a sweep (and of a merge).
#[derive(Debug, Args)]
pub struct SweepOutputs {
    /// Print the whole result (every sample included) as JSON instead of the summary.
    #[arg(long)]
    pub json: bool,
    /// Write every sample's inputs and outputs as CSV to this file.
    #[arg(long)]
    pub csv: Option<PathBuf>,
    /// Write the whole result as JSON to this file.
    #[arg(long)]
    pub json_file: Option<PathBuf>,
    /// Write the worst sample as a complete scenario to this file (`check` reproduces it).
    #[arg(long)]
    pub write_worst: Option<PathBuf>,
    /// Write the figures (per check an ECDF with its limit line and a tornado chart of the
    /// sensitivities, SVG and PNG) into this folder.
    #[arg(long, value_name = "DIR")]
    pub figures: Option<PathBuf>,
}

/// Subcommands of `sweep`.
#[derive(Debug, Subcommand)]
pub enum SweepCommand {
    /// Combine the shard files of one sweep (every shard 1..N once) into its whole result,
    /// exactly that of the unsharded sweep (exit 1 when any sample fails a limit).
    Merge(MergeArgs),
}

/// Options of `sweep merge`.
#[derive(Debug, Args)]
pub struct MergeArgs {
    /// The shard files (any order).
    #[arg(required = true)]
    pub shards: Vec<PathBuf>,
    /// The outputs.
    #[command(flatten)]
    pub out: SweepOutputs,
}

fn parse_shard(text: &str) -> Result<(usize, usize), String> {
    let bad = || format!("'{text}': expected K/N with 1 ≤ K ≤ N, e.g. 3/8");
    let (k, n) = text.split_once('/').ok_or_else(bad)?;
    let k: usize = k.trim().parse().map_err(|_| bad())?;
    let n: usize = n.trim().parse().map_err(|_| bad())?;
    if k == 0 || k > n {
        return Err(bad());
    }
    Ok((k, n))
}

/// Runs `sweep`.
pub fn execute(a: &SweepArgs) -> Result<i32, Error> {
    if let Some(SweepCommand::Merge(m)) = &a.command {
        return execute_merge(m);
    }
    let Some(path) = &a.scenario else {
        return Err(Error::Usage("sweep: a scenario file is needed".into()));
    };
    let s = load(path, None)?;
    if s.sweep.is_none() {
        return Err(Error::Usage(format!(
            "{}: no `sweep:` block to sample",
            path.display()
        )));
    }
    let bar = Bar::new();
    if let (Some((k, n)), Some(file)) = (a.shard, &a.shard_file) {
        let r = run_shard(&s, k, n, &JudgeOptions::default(), &bar);
        bar.finish();
        let r = r?;
        write_file(file, r.to_json()?.as_bytes())?;
        emit(&format!(
            "{}: shard {k}/{n} — samples {}..{} of {} judged, written to {}\n",
            r.scenario_name,
            r.first_sample,
            r.end_sample,
            r.samples,
            file.display()
        ))?;
        return Ok(EXIT_OK);
    }
    let progress: &dyn Progress = if a.out.json { &Silent } else { &bar };
    let r = run_sweep(&s, &JudgeOptions::default(), progress);
    bar.finish();
    outputs(&a.out, &r?)
}

fn execute_merge(m: &MergeArgs) -> Result<i32, Error> {
    let mut shards = Vec::with_capacity(m.shards.len());
    for p in &m.shards {
        let name = p.display().to_string();
        let text = std::fs::read_to_string(p)
            .map_err(|e| Error::Usage(format!("{name}: cannot read the shard file: {e}")))?;
        shards.push((name.clone(), ShardFile::from_json(&text, &name)?));
    }
    let r = merge(shards, &JudgeOptions::default())?;
    outputs(&m.out, &r)
}

/// Writes the outputs of a whole result; the exit code of its verdict.
fn outputs(o: &SweepOutputs, r: &SweepResult) -> Result<i32, Error> {
    if let Some(path) = &o.write_worst {
        write_file(path, r.worst_yaml.as_bytes())?;
    }
    if let Some(path) = &o.csv {
        write_file(path, &samples_csv(r)?)?;
    }
    if let Some(path) = &o.json_file {
        write_file(path, sweep_json(r)?.as_bytes())?;
    }
    if let Some(dir) = &o.figures {
        make_dir(dir)?;
        for f in sweep_figures(r)? {
            write_file(&dir.join(format!("{}.svg", f.name)), f.svg.as_bytes())?;
            write_file(&dir.join(format!("{}.png", f.name)), &f.png)?;
        }
    }
    if o.json {
        emit(&sweep_json(r)?)?;
    } else {
        emit(&sweep_text(r))?;
    }
    Ok(if r.any_failure.count == 0 {
        EXIT_OK
    } else {
        EXIT_LIMIT_FAILED
    })
}
