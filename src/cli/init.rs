//! `eddyzone init KIND [FILE]`: a commented starter scenario, on standard output or into FILE
//! (an existing FILE only with `--force`).

use super::emit;
use super::error::{Error, EXIT_OK};
use clap::{Args, ValueEnum};
use eddyzone::report::write_file;
use eddyzone::scenario::starters::{starter, Starter};
use std::path::PathBuf;

/// The starters `init` writes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Kind {
    /// The catch brake of a free-fall tower (magnets on the gondola, fins on the tower).
    Tower,
    /// A coaster brake run (fins under the cars, magnet sections along the track).
    Coaster,
    /// Rollback brakes on a launch track (the train enters backwards).
    Rollback,
    /// The arrester of an unmanned test sled (no rider block).
    Sled,
}

/// Options of `init`.
#[derive(Debug, Args)]
pub struct InitArgs {
    /// Which starter.
    #[arg(value_enum)]
    pub kind: Kind,
    /// Write it to this file (default: standard output).
    pub file: Option<PathBuf>,
    /// Overwrite an existing FILE.
    #[arg(long)]
    pub force: bool,
}

/// Runs `init`.
pub fn execute(a: &InitArgs) -> Result<i32, Error> {
    let name = a
        .kind
        .to_possible_value()
        .map(|v| v.get_name().to_string())
        .unwrap_or_default();
    let s: &Starter =
        starter(&name).ok_or_else(|| Error::Usage(format!("init: no starter named '{name}'")))?;
    let Some(path) = &a.file else {
        emit(s.text)?;
        return Ok(EXIT_OK);
    };
    if path.exists() && !a.force {
        return Err(Error::Usage(format!(
            "{} already exists; pass --force to overwrite it",
            path.display()
        )));
    }
    write_file(path, s.text.as_bytes())?;
    eprintln!(
        "wrote {}: a starter {} ({}), invented numbers; try `eddyzone check {}`",
        path.display(),
        name,
        s.about,
        path.display()
    );
    Ok(EXIT_OK)
}
