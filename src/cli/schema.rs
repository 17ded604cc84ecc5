//! `eddyzone schema`: the JSON Schema of the scenario format (or of a limit set file), for an
//! editor's YAML support.

use super::emit;
use super::error::{Error, EXIT_OK};
use clap::Args;
use eddyzone::scenario::schema::{limits_file_schema, scenario_schema};

/// Options of `schema`.
#[derive(Debug, Args)]
pub struct SchemaArgs {
    /// The schema of a limit set file (`limits_file:`) instead of a scenario.
    #[arg(long)]
    pub limits_file: bool,
}

/// Runs `schema`.
pub fn execute(a: &SchemaArgs) -> Result<i32, Error> {
    let schema = if a.limits_file {
        limits_file_schema()
    } else {
        scenario_schema()
    };
    emit(&(serde_json::to_string_pretty(&schema)? + "\n"))?;
    Ok(EXIT_OK)
}
