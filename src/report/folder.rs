//! Output folders written as a whole: files go into a private sibling folder that is renamed
//! into place when complete, so a killed run leaves the old folder (or none), never a mix; a
//! lock beside the folder keeps two runs from writing into it at once.
//!
//! Layout next to the target `DIR`: `.DIR.eddyzone-lock` (held with an advisory lock for the
//! duration; the operating system releases it when the process ends, however it ends),
//! `.DIR.eddyzone-partial` (the files being written; a stale one from a killed run is removed
//! by the next run, which holds the lock) and, while a folder is replaced, `.DIR.eddyzone-old`.

use super::{OutputError, OutputFile};
use std::fs::{self, File, TryLockError};
use std::path::{Path, PathBuf};

/// How the finished files reach the target folder.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Placement {
    /// The target folder is replaced as a whole (the report: no stale file survives).
    Replace,
    /// The files are moved into the target folder one by one, each rename atomic; other files in
    /// it are kept (profile folders the user may share with other output).
    Merge,
}

/// A folder being written.
#[derive(Debug)]
pub struct Staging {
    target: PathBuf,
    partial: PathBuf,
    old: PathBuf,
    lock_path: PathBuf,
    _lock: File,
    placement: Placement,
}

fn write_error(path: &Path, source: std::io::Error) -> OutputError {
    OutputError::Write {
        path: path.to_path_buf(),
        source,
    }
}

/// Starts writing `target`: takes the lock and prepares an empty private folder.
///
/// Errors: the target has no folder name; another run holds the lock ([`OutputError::Busy`]);
/// the parent folder cannot be created or written.
pub fn stage(target: &Path, placement: Placement) -> Result<Staging, OutputError> {
    let name = target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .ok_or_else(|| {
            write_error(
                target,
                std::io::Error::new(
                    std::io::ErrorKind::InvalidInput,
                    "the output must name a folder",
                ),
            )
        })?;
    let parent = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    fs::create_dir_all(&parent).map_err(|e| write_error(&parent, e))?;
    let lock_path = parent.join(format!(".{name}.eddyzone-lock"));
    let lock = File::options()
        .create(true)
        .truncate(false)
        .write(true)
        .open(&lock_path)
        .map_err(|e| write_error(&lock_path, e))?;
    match lock.try_lock() {
        Ok(()) => {}
        Err(TryLockError::WouldBlock) => {
            return Err(OutputError::Busy {
                path: target.to_path_buf(),
            })
        }
        Err(TryLockError::Error(e)) => return Err(write_error(&lock_path, e)),
    }
    let partial = parent.join(format!(".{name}.eddyzone-partial"));
    let old = parent.join(format!(".{name}.eddyzone-old"));
    for stale in [&partial, &old] {
        if stale.exists() {
            fs::remove_dir_all(stale).map_err(|e| write_error(stale, e))?;
        }
    }
    fs::create_dir(&partial).map_err(|e| write_error(&partial, e))?;
    Ok(Staging {
        target: target.to_path_buf(),
        partial,
        old,
        lock_path,
        _lock: lock,
        placement,
    })
}

impl Staging {
    /// Writes files into the private folder.
    pub fn write(&self, files: &[OutputFile]) -> Result<(), OutputError> {
        for f in files {
            let p = self.partial.join(&f.name);
            fs::write(&p, &f.bytes).map_err(|e| write_error(&p, e))?;
        }
        Ok(())
    }

    /// Puts the finished files in place and releases the lock.
    pub fn commit(self) -> Result<(), OutputError> {
        let target = &self.target;
        if !target.exists() {
            fs::rename(&self.partial, target).map_err(|e| write_error(target, e))?;
        } else {
            match self.placement {
                Placement::Replace => {
                    fs::rename(target, &self.old).map_err(|e| write_error(target, e))?;
                    fs::rename(&self.partial, target).map_err(|e| write_error(target, e))?;
                    fs::remove_dir_all(&self.old).map_err(|e| write_error(&self.old, e))?;
                }
                Placement::Merge => {
                    let entries =
                        fs::read_dir(&self.partial).map_err(|e| write_error(&self.partial, e))?;
                    for entry in entries {
                        let entry = entry.map_err(|e| write_error(&self.partial, e))?;
                        let to = target.join(entry.file_name());
                        fs::rename(entry.path(), &to).map_err(|e| write_error(&to, e))?;
                    }
                    fs::remove_dir(&self.partial).map_err(|e| write_error(&self.partial, e))?;
                }
            }
        }
        // The lock file goes with the lock; a run waiting on the old file fails as busy.
        let _ = fs::remove_file(&self.lock_path);
        Ok(())
    }
}

/// Writes `files` as the folder `target` (see the module documentation).
pub fn write_folder(
    target: &Path,
    files: &[OutputFile],
    placement: Placement,
) -> Result<(), OutputError> {
    let staging = stage(target, placement)?;
    staging.write(files)?;
    staging.commit()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn file(name: &str, text: &str) -> OutputFile {
        OutputFile {
            name: name.into(),
            bytes: text.as_bytes().to_vec(),
        }
    }

    #[test]
    fn replace_leaves_no_stale_file_and_merge_keeps_others() {
        let tmp = tempfile::tempdir().unwrap();
        let dir = tmp.path().join("out");
        write_folder(&dir, &[file("a", "1"), file("b", "2")], Placement::Replace).unwrap();
        write_folder(&dir, &[file("a", "3")], Placement::Replace).unwrap();
        assert_eq!(fs::read_to_string(dir.join("a")).unwrap(), "3");
        assert!(!dir.join("b").exists(), "replaced as a whole");
        write_folder(&dir, &[file("c", "4")], Placement::Merge).unwrap();
        assert!(dir.join("a").exists() && dir.join("c").exists());
        let names: Vec<String> = fs::read_dir(tmp.path())
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        assert_eq!(
            names,
            vec!["out".to_string()],
            "nothing left beside: {names:?}"
        );
    }

    #[test]
    fn a_second_writer_is_refused_while_the_first_holds_the_lock() {
        let tmp = tempfile::tempdir().unwrap();
        let dir = tmp.path().join("out");
        let first = stage(&dir, Placement::Replace).unwrap();
        assert!(matches!(
            stage(&dir, Placement::Replace),
            Err(OutputError::Busy { .. })
        ));
        first.write(&[file("a", "1")]).unwrap();
        first.commit().unwrap();
        // A stale partial folder (a killed run) is cleared by the next one.
        fs::create_dir(tmp.path().join(".out.eddyzone-partial")).unwrap();
        fs::write(tmp.path().join(".out.eddyzone-partial/x"), "stale").unwrap();
        write_folder(&dir, &[file("b", "2")], Placement::Replace).unwrap();
        assert!(!dir.join("x").exists() && dir.join("b").exists());
    }
}
