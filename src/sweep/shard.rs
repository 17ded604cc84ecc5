//! Sweeps beyond one machine: shard K of N judges a fixed slice of the samples (the design is
//! drawn whole from the seed, then sliced), and the merge of all N shard files gives exactly the
//! unsharded result.
//!
//! A shard file carries the scenario itself (as self-contained YAML, limits inline), the seed,
//! the sample count, K and N, the force-table designs the shard used and every judged sample's
//! inputs and verdict rows. The merge checks that the files belong together (one scenario, seed,
//! sample count, N and version; every shard once), draws the design again from the scenario,
//! verifies each sample's inputs against it bit for bit, and assembles the result as the
//! unsharded sweep does. Floats read back exactly (`serde_json`'s `float_roundtrip`).

use super::{assemble, design, judge_samples, JudgedSample, SweepError, SweepResult};
use crate::scenario::write::to_yaml;
use crate::scenario::{parse_str, Scenario};
use crate::study::{JudgeOptions, Progress, TableCache};
use serde::{Deserialize, Serialize};
use std::collections::BTreeSet;
use std::ops::Range;

/// The `format` of a shard file.
pub const SHARD_FORMAT: &str = "eddyzone-sweep-shard";

/// Errors of sharding and merging.
#[derive(Debug, thiserror::Error)]
pub enum ShardError {
    /// K is outside 1..=N.
    #[error("shard {shard}/{shards}: the shard number must be 1 to {shards}")]
    BadShard {
        /// K.
        shard: usize,
        /// N.
        shards: usize,
    },
    /// No shard files were given.
    #[error("no shard files to merge")]
    NoShards,
    /// A file is no shard file.
    #[error("{file}: not an eddyzone sweep shard file: {source}")]
    NotShard {
        /// The file.
        file: String,
        /// Why.
        #[source]
        source: serde_json::Error,
    },
    /// A file has another format tag.
    #[error("{file}: not an eddyzone sweep shard file (format '{format}')")]
    Format {
        /// The file.
        file: String,
        /// Its format tag.
        format: String,
    },
    /// Two shards differ in what must be common.
    #[error("{file}: its {what} differs from that of {first} — shards of different sweeps")]
    Mismatch {
        /// The file that differs.
        file: String,
        /// The first file.
        first: String,
        /// What differs (scenario, seed, sample count, shard count, version).
        what: &'static str,
    },
    /// A shard was given twice.
    #[error("shard {shard}/{shards} given twice ({first} and {file})")]
    Duplicate {
        /// K.
        shard: usize,
        /// N.
        shards: usize,
        /// First file.
        first: String,
        /// Second file.
        file: String,
    },
    /// Shards are missing.
    #[error("missing shard(s) {missing:?} of {shards}")]
    Missing {
        /// The missing K.
        missing: Vec<usize>,
        /// N.
        shards: usize,
    },
    /// A shard's samples are not the slice or the draws its header names.
    #[error("{file}: its samples are not those of shard {shard}/{shards} of this sweep ({why})")]
    Corrupt {
        /// The file.
        file: String,
        /// K.
        shard: usize,
        /// N.
        shards: usize,
        /// What is wrong.
        why: &'static str,
    },
    /// The embedded scenario does not read back.
    #[error("{file}: its scenario does not read back: {source}")]
    Scenario {
        /// The file.
        file: String,
        /// Why.
        #[source]
        source: crate::scenario::validate::ScenarioError,
    },
    /// The sweep itself failed.
    #[error(transparent)]
    Sweep(#[from] SweepError),
}

/// A shard file: one slice of a sweep's samples, judged.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ShardFile {
    /// [`SHARD_FORMAT`].
    pub format: String,
    /// The eddyzone version that wrote it.
    pub version: String,
    /// Scenario name (for messages).
    pub scenario_name: String,
    /// Sweep seed.
    pub seed: u64,
    /// Samples of the whole sweep.
    pub samples: usize,
    /// K (1-based).
    pub shard: usize,
    /// N.
    pub shards: usize,
    /// First sample of the slice (0-based).
    pub first_sample: usize,
    /// One past its last sample.
    pub end_sample: usize,
    /// The scenario, self-contained (limits inline), with its `sweep:` block.
    pub scenario_yaml: String,
    /// Identities of the force-table designs the shard's samples used.
    pub table_designs: Vec<crate::dynamics::model::DesignKey>,
    /// The slice's samples, in order.
    pub judged: Vec<JudgedSample>,
}

/// The samples of shard `shard` (1-based) of `shards` among `samples`: contiguous, in order,
/// sizes differing by at most one, their union 0..samples.
pub fn shard_range(
    samples: usize,
    shard: usize,
    shards: usize,
) -> Result<Range<usize>, ShardError> {
    if shards == 0 || shard == 0 || shard > shards {
        return Err(ShardError::BadShard { shard, shards });
    }
    let at = |k: usize| {
        // k·samples/shards without overflow for any realistic count.
        ((k as u128 * samples as u128) / shards as u128) as usize
    };
    Ok(at(shard - 1)..at(shard))
}

/// Judges shard `shard` of `shards` of `scenario`'s sweep.
pub fn run_shard(
    scenario: &Scenario,
    shard: usize,
    shards: usize,
    options: &JudgeOptions,
    progress: &dyn Progress,
) -> Result<ShardFile, ShardError> {
    let sweep = scenario.sweep.as_ref().ok_or(SweepError::NoSweep)?;
    let design = design(scenario)?;
    let range = shard_range(design.values.len(), shard, shards)?;
    let scenario_yaml = to_yaml(scenario).map_err(SweepError::Write)?;
    let cache = TableCache::default();
    let judged = judge_samples(scenario, &design, range.clone(), &cache, options, progress)?;
    let mut table_designs = cache.designs();
    table_designs.sort_unstable();
    Ok(ShardFile {
        format: SHARD_FORMAT.into(),
        version: crate::VERSION.into(),
        scenario_name: scenario.name.clone(),
        seed: sweep.seed,
        samples: design.values.len(),
        shard,
        shards,
        first_sample: range.start,
        end_sample: range.end,
        scenario_yaml,
        table_designs,
        judged,
    })
}

impl ShardFile {
    /// The shard file as JSON.
    pub fn to_json(&self) -> serde_json::Result<String> {
        serde_json::to_string(self)
    }

    /// Reads a shard file (`file` names it in messages).
    pub fn from_json(text: &str, file: &str) -> Result<Self, ShardError> {
        let s: ShardFile = serde_json::from_str(text).map_err(|source| ShardError::NotShard {
            file: file.into(),
            source,
        })?;
        if s.format != SHARD_FORMAT {
            return Err(ShardError::Format {
                file: file.into(),
                format: s.format,
            });
        }
        Ok(s)
    }
}

/// Merges shard files (each with the name it is known by) into the sweep's result, exactly the
/// unsharded one: every shard of one sweep exactly once, in any order.
pub fn merge(
    shards: Vec<(String, ShardFile)>,
    options: &JudgeOptions,
) -> Result<SweepResult, ShardError> {
    let Some((first_name, first)) = shards.first() else {
        return Err(ShardError::NoShards);
    };
    let (first_name, first) = (first_name.clone(), first.clone());
    let mut seen: Vec<Option<String>> = vec![None; first.shards];
    for (name, s) in &shards {
        let mismatch = |what| ShardError::Mismatch {
            file: name.clone(),
            first: first_name.clone(),
            what,
        };
        if s.version != first.version {
            return Err(mismatch("eddyzone version"));
        }
        if s.scenario_yaml != first.scenario_yaml {
            return Err(mismatch("scenario"));
        }
        if s.seed != first.seed {
            return Err(mismatch("seed"));
        }
        if s.samples != first.samples {
            return Err(mismatch("sample count"));
        }
        if s.shards != first.shards {
            return Err(mismatch("shard count"));
        }
        let slot =
            s.shard
                .checked_sub(1)
                .and_then(|k| seen.get_mut(k))
                .ok_or(ShardError::BadShard {
                    shard: s.shard,
                    shards: s.shards,
                })?;
        if let Some(earlier) = slot {
            return Err(ShardError::Duplicate {
                shard: s.shard,
                shards: s.shards,
                first: earlier.clone(),
                file: name.clone(),
            });
        }
        *slot = Some(name.clone());
    }
    let missing: Vec<usize> = (1..=first.shards)
        .filter(|k| seen[k - 1].is_none())
        .collect();
    if !missing.is_empty() {
        return Err(ShardError::Missing {
            missing,
            shards: first.shards,
        });
    }
    let scenario = parse_str(&first.scenario_yaml, &first_name, None).map_err(|source| {
        ShardError::Scenario {
            file: first_name.clone(),
            source,
        }
    })?;
    let design = design(&scenario)?;
    if design.values.len() != first.samples {
        return Err(ShardError::Corrupt {
            file: first_name,
            shard: first.shard,
            shards: first.shards,
            why: "sample count",
        });
    }
    let mut ordered = shards;
    ordered.sort_by_key(|(_, s)| s.shard);
    let mut judged = Vec::with_capacity(first.samples);
    let mut designs = BTreeSet::new();
    for (name, s) in ordered {
        let corrupt = |why| ShardError::Corrupt {
            file: name.clone(),
            shard: s.shard,
            shards: s.shards,
            why,
        };
        let range = shard_range(s.samples, s.shard, s.shards)?;
        if (s.first_sample, s.end_sample) != (range.start, range.end)
            || s.judged.len() != range.len()
        {
            return Err(corrupt("slice"));
        }
        for (j, i) in s.judged.iter().zip(range) {
            let same = design.values.get(i).is_some_and(|v| {
                v.len() == j.inputs.len()
                    && v.iter()
                        .zip(&j.inputs)
                        .all(|(a, b)| a.to_bits() == b.to_bits())
            });
            if j.index != i || !same {
                return Err(corrupt("sample inputs"));
            }
        }
        designs.extend(s.table_designs.iter().copied());
        judged.extend(s.judged);
    }
    Ok(assemble(
        &scenario,
        &design,
        judged,
        designs.len(),
        options,
    )?)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shard_ranges_partition_the_samples() {
        for samples in [0, 1, 7, 100, 2001] {
            for shards in 1..=9 {
                let mut next = 0;
                for k in 1..=shards {
                    let r = shard_range(samples, k, shards).unwrap();
                    assert_eq!(r.start, next);
                    assert!(r.len() <= samples / shards + 1);
                    next = r.end;
                }
                assert_eq!(next, samples);
            }
        }
        assert!(shard_range(10, 0, 3).is_err());
        assert!(shard_range(10, 4, 3).is_err());
    }
}
