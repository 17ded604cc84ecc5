//! Output: tables, CSV, JSON, plots and the HTML report; every format reads the same result types.

/// The files of the HTML report, built in memory from a judged study.
pub mod bundle;
/// CSV writers: force–speed curves and run profiles.
pub mod csv_out;
/// Which cases the figures draw prominently (nominal, worst of a check).
pub mod emphasis;
/// Charts built from results: speed, felt acceleration, sustained curves, force–speed, heating.
pub mod figures;
/// Output folders written as a whole, under a lock.
pub mod folder;
/// The self-contained HTML report.
pub mod html;
/// JSON documents printed by `--json`.
pub mod json_out;
/// Section loads (peak force, impulse, energy) as tables.
pub mod loads_out;
/// Generic line charts rendered to PNG and SVG with an embedded font.
pub mod plots;
/// Figures of a sweep: ECDF per check with its limit, tornado chart of sensitivities.
pub mod sweep_figures;
/// Outputs of a sweep: terminal summary, CSV and JSON.
pub mod sweep_out;
/// The documents the commands print on the terminal.
pub mod terminal;
/// Plain-text tables for the terminal.
pub mod text;

use std::io::Write;
use std::path::{Path, PathBuf};

/// Errors of the output layer: an output that could not be made or written.
#[derive(Debug, thiserror::Error)]
pub enum OutputError {
    /// A figure could not be drawn or encoded.
    #[error("figure '{figure}': {source}")]
    Plot {
        /// The figure's id.
        figure: String,
        /// The cause.
        #[source]
        source: plots::PlotError,
    },
    /// A CSV document could not be made.
    #[error("CSV output: {0}")]
    Csv(#[from] csv::Error),
    /// A JSON document could not be made.
    #[error("JSON output: {0}")]
    Json(#[from] serde_json::Error),
    /// A scenario could not be written faithfully.
    #[error("writing the scenario: {0}")]
    Scenario(#[from] crate::scenario::write::WriteError),
    /// Another run is writing the same output folder.
    #[error(
        "{}: another eddyzone run is writing this folder now; wait for it (or check that none is \
         running)",
        path.display()
    )]
    Busy {
        /// The folder.
        path: PathBuf,
    },
    /// A file or folder could not be written.
    #[error("{}: {source}", path.display())]
    Write {
        /// The file or folder.
        path: PathBuf,
        /// The cause.
        #[source]
        source: std::io::Error,
    },
}

/// A file of an output folder: its name in the folder and its bytes.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct OutputFile {
    /// File name, relative to the folder.
    pub name: String,
    /// Contents.
    pub bytes: Vec<u8>,
}

/// Writes a file atomically (see [`write_atomic`]), naming the path on failure.
pub fn write_file(path: &Path, bytes: &[u8]) -> Result<(), OutputError> {
    write_atomic(path, bytes).map_err(|source| OutputError::Write {
        path: path.to_path_buf(),
        source,
    })
}

/// Creates a folder and its parents, naming the path on failure.
pub fn make_dir(dir: &Path) -> Result<(), OutputError> {
    std::fs::create_dir_all(dir).map_err(|source| OutputError::Write {
        path: dir.to_path_buf(),
        source,
    })
}

/// The caution printed by `check` and carried by the README and the report.
pub const CAUTION: &str = "CAUTION: eddyzone is a concept-stage design aid. Passenger-carrying devices need physical \
testing and sign-off under the applicable standards (e.g. ASTM F2291, EN 13814) and local codes by licensed \
engineers. Shipped limit values are examples, not the standards' text.";

pub use crate::VERSION;

/// Writes a file atomically: a temporary file in the same folder, then a rename, so an
/// interrupted run leaves no half-written file.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let mut tmp = tempfile::NamedTempFile::new_in(dir)?;
    tmp.write_all(bytes)?;
    tmp.as_file().sync_all()?;
    // Temporary files are created private (0600); the result is an ordinary readable file.
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        tmp.as_file()
            .set_permissions(std::fs::Permissions::from_mode(0o644))?;
    }
    tmp.persist(path).map_err(|e| e.error)?;
    Ok(())
}

/// Longest file-name stem written (bytes); a longer name is shortened and made unique with a
/// hash of the whole name.
pub const MAX_STEM: usize = 64;

/// Safe file-name stems for names (cases, fins, designs), in order: letters, digits, `-` and `_`
/// kept, anything else `_`; a stem longer than [`MAX_STEM`] is cut and suffixed with eight hex
/// digits of the name's SHA-256; stems that would collide (case-insensitively, for file systems
/// that fold case) get `-2`, `-3`, … in order of appearance.
pub fn unique_stems<S: AsRef<str>>(names: &[S]) -> Vec<String> {
    use sha2::{Digest, Sha256};
    let mut seen: std::collections::HashSet<String> = std::collections::HashSet::new();
    names
        .iter()
        .map(|n| {
            let n = n.as_ref();
            let mut stem = file_stem(n);
            if stem.len() > MAX_STEM {
                let h: String = Sha256::digest(n.as_bytes())[..4]
                    .iter()
                    .map(|b| format!("{b:02x}"))
                    .collect();
                stem = format!("{}-{h}", &stem[..MAX_STEM - 9]);
            }
            let mut candidate = stem.clone();
            let mut k = 2;
            while !seen.insert(candidate.to_lowercase()) {
                candidate = format!("{stem}-{k}");
                k += 1;
            }
            candidate
        })
        .collect()
}

/// A safe file-name stem for a case or section name.
pub fn file_stem(name: &str) -> String {
    let s: String = name
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '-' || c == '_' {
                c
            } else {
                '_'
            }
        })
        .collect();
    if s.is_empty() {
        "case".into()
    } else {
        s
    }
}
