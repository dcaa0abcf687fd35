//! Writing the output folder atomically: all files or none.
//!
//! The files go into a hidden temporary folder next to the target (same
//! parent, so the final rename stays on one file system), are flushed to
//! disk, and the folder is renamed into place. With `force` an existing
//! folder is first renamed aside, the new one renamed in, and only then the
//! old one deleted. On any failure the temporary folder is removed, so
//! nothing is left behind. This is the only file-system code outside the
//! command line.

use coilwright::export::OutFile;
use std::fs;
use std::io::Write;
use std::path::{Component, Path, PathBuf};

/// Why the output folder could not be written.
#[derive(Debug, thiserror::Error)]
pub enum OutDirError {
    /// The folder exists and `force` was not given.
    #[error("{0} exists; pass --force to replace it (nothing was written)")]
    Exists(PathBuf),
    /// The target exists but is not a folder.
    #[error("{0} exists and is not a folder; refusing to replace it")]
    NotADir(PathBuf),
    /// An output file path is not a plain relative path.
    #[error("output file path `{0}` is not a plain relative path")]
    BadPath(String),
    /// The target is not a nameable folder (such as `.` or `/`).
    #[error("cannot use {0} as the output folder; name a new folder, e.g. -o out")]
    BadTarget(PathBuf),
    /// Two output files have the same path.
    #[error("two output files are both called `{0}`")]
    Duplicate(String),
    /// A file-system operation failed.
    #[error("cannot write {path}: {source}")]
    Io {
        /// Path involved.
        path: PathBuf,
        /// The error.
        source: std::io::Error,
    },
}

fn io(path: &Path) -> impl FnOnce(std::io::Error) -> OutDirError + '_ {
    move |source| OutDirError::Io {
        path: path.to_path_buf(),
        source,
    }
}

/// Checks that `p` is a relative path of normal components ('/' separated).
fn relative(p: &str) -> Result<PathBuf, OutDirError> {
    let path = Path::new(p);
    let ok = !p.is_empty()
        && !p.contains('\\')
        && path.components().all(|c| matches!(c, Component::Normal(_)));
    if ok {
        Ok(path.to_path_buf())
    } else {
        Err(OutDirError::BadPath(p.to_string()))
    }
}

/// A fresh hidden name next to `dir`: `.NAME.KIND-PID-N`.
fn sibling(parent: &Path, name: &str, kind: &str) -> PathBuf {
    let pid = std::process::id();
    let mut n = 0u32;
    loop {
        let p = parent.join(format!(".{name}.{kind}-{pid}-{n}"));
        if !p.exists() {
            return p;
        }
        n += 1;
    }
}

/// Flushes a folder's entries to disk (best effort where unsupported).
fn sync_dir(dir: &Path) {
    if let Ok(f) = fs::File::open(dir) {
        let _ = f.sync_all();
    }
}

/// Writes `files` into a new folder `dir`, atomically.
///
/// Refuses an existing `dir` unless `force`; with `force` an existing
/// folder is replaced only after the new one is complete. The parent
/// folder is created if needed.
pub fn write(dir: &Path, files: &[OutFile], force: bool) -> Result<(), OutDirError> {
    let staging = Staging::new(dir, force)?;
    staging.add(files)?;
    staging.commit()
}

/// An output folder being filled: a hidden temporary folder next to the
/// target, renamed into place by [`Staging::commit`] and removed if the
/// staging is dropped without it. For outputs that grow while the command
/// runs (a sweep's candidate tables), written into [`Staging::path`].
pub struct Staging {
    tmp: PathBuf,
    dir: PathBuf,
    parent: PathBuf,
    name: String,
    force: bool,
    done: bool,
}

impl Staging {
    /// Checks the target (exists without `force`, not a folder, not
    /// nameable) and creates the temporary folder.
    pub fn new(dir: &Path, force: bool) -> Result<Staging, OutDirError> {
        let exists = fs::symlink_metadata(dir).ok();
        match &exists {
            Some(m) if !m.is_dir() => return Err(OutDirError::NotADir(dir.to_path_buf())),
            Some(_) if !force => return Err(OutDirError::Exists(dir.to_path_buf())),
            _ => {}
        }
        let name = dir
            .file_name()
            .ok_or_else(|| OutDirError::BadTarget(dir.to_path_buf()))?
            .to_string_lossy()
            .into_owned();
        let parent = match dir.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        fs::create_dir_all(&parent).map_err(io(&parent))?;
        let tmp = sibling(&parent, &name, "tmp");
        fs::create_dir(&tmp).map_err(io(&tmp))?;
        Ok(Staging {
            tmp,
            dir: dir.to_path_buf(),
            parent,
            name,
            force,
            done: false,
        })
    }

    /// The temporary folder, for files written piece by piece.
    pub fn path(&self) -> &Path {
        &self.tmp
    }

    /// Writes and flushes `files` into the temporary folder (plain relative
    /// paths, no two alike).
    pub fn add(&self, files: &[OutFile]) -> Result<(), OutDirError> {
        let mut seen = std::collections::BTreeSet::new();
        let rel: Vec<PathBuf> = files
            .iter()
            .map(|f| {
                let rel = relative(&f.path)?;
                if !seen.insert(f.path.as_str()) || self.tmp.join(&rel).exists() {
                    return Err(OutDirError::Duplicate(f.path.clone()));
                }
                Ok(rel)
            })
            .collect::<Result<_, _>>()?;
        fill(&self.tmp, files, &rel)
    }

    /// Renames the complete folder into place (replacing an existing one
    /// only with `force`, checked again now).
    pub fn commit(mut self) -> Result<(), OutDirError> {
        if !self.force && fs::symlink_metadata(&self.dir).is_ok() {
            return Err(OutDirError::Exists(self.dir.clone()));
        }
        sync_dir(&self.tmp);
        swap_in(&self.tmp, &self.dir, &self.parent, &self.name)?;
        self.done = true;
        Ok(())
    }
}

impl Drop for Staging {
    fn drop(&mut self) {
        if !self.done {
            let _ = fs::remove_dir_all(&self.tmp);
        }
    }
}

/// Writes and flushes every file into `tmp`.
fn fill(tmp: &Path, files: &[OutFile], rel: &[PathBuf]) -> Result<(), OutDirError> {
    let mut dirs = std::collections::BTreeSet::new();
    dirs.insert(tmp.to_path_buf());
    for (f, r) in files.iter().zip(rel) {
        let path = tmp.join(r);
        if let Some(p) = path.parent() {
            fs::create_dir_all(p).map_err(io(p))?;
            dirs.insert(p.to_path_buf());
        }
        let mut file = fs::File::create(&path).map_err(io(&path))?;
        file.write_all(&f.bytes).map_err(io(&path))?;
        file.sync_all().map_err(io(&path))?;
    }
    for d in dirs.iter().rev() {
        sync_dir(d);
    }
    Ok(())
}

/// Renames the complete `tmp` to `dir`, moving an existing `dir` aside
/// first and deleting it afterwards.
fn swap_in(tmp: &Path, dir: &Path, parent: &Path, name: &str) -> Result<(), OutDirError> {
    if fs::symlink_metadata(dir).is_ok() {
        let old = sibling(parent, name, "old");
        fs::rename(dir, &old).map_err(io(dir))?;
        if let Err(e) = fs::rename(tmp, dir) {
            // Put the old folder back before giving up.
            let _ = fs::rename(&old, dir);
            return Err(io(dir)(e));
        }
        sync_dir(parent);
        // The new folder is in place; a leftover old copy is harmless.
        let _ = fs::remove_dir_all(&old);
    } else {
        fs::rename(tmp, dir).map_err(io(dir))?;
        sync_dir(parent);
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn file(path: &str, text: &str) -> OutFile {
        OutFile {
            path: path.into(),
            role: "test".into(),
            bytes: text.as_bytes().to_vec(),
        }
    }

    fn entries(dir: &Path) -> Vec<String> {
        let mut v: Vec<String> = fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }

    #[test]
    fn writes_all_files_and_leaves_no_temporaries() {
        let root = tempfile::tempdir().unwrap();
        let out = root.path().join("out");
        write(&out, &[file("a.txt", "A"), file("sub/b.txt", "B")], false).unwrap();
        assert_eq!(fs::read_to_string(out.join("a.txt")).unwrap(), "A");
        assert_eq!(fs::read_to_string(out.join("sub/b.txt")).unwrap(), "B");
        assert_eq!(entries(root.path()), vec!["out"]);
    }

    #[test]
    fn refuses_existing_folder_without_force_and_replaces_with_force() {
        let root = tempfile::tempdir().unwrap();
        let out = root.path().join("out");
        fs::create_dir(&out).unwrap();
        fs::write(out.join("old.txt"), "old").unwrap();
        let e = write(&out, &[file("new.txt", "new")], false).unwrap_err();
        assert!(matches!(e, OutDirError::Exists(_)));
        assert_eq!(entries(&out), vec!["old.txt"]);
        write(&out, &[file("new.txt", "new")], true).unwrap();
        assert_eq!(entries(&out), vec!["new.txt"]);
        assert_eq!(entries(root.path()), vec!["out"]);
    }

    #[test]
    fn bad_paths_write_nothing() {
        let root = tempfile::tempdir().unwrap();
        let out = root.path().join("out");
        for bad in ["../x", "/abs", "", "a/../b"] {
            let e = write(&out, &[file("ok.txt", "1"), file(bad, "2")], false).unwrap_err();
            assert!(matches!(e, OutDirError::BadPath(_)), "{bad}: {e}");
        }
        let e = write(&out, &[file("a", "1"), file("a", "2")], false).unwrap_err();
        assert!(matches!(e, OutDirError::Duplicate(_)));
        assert!(entries(root.path()).is_empty());
    }

    #[test]
    fn failure_midway_removes_the_temporary_folder() {
        let root = tempfile::tempdir().unwrap();
        let out = root.path().join("out");
        // "x" is a file, so "x/y" cannot be created inside the temporary folder.
        let e = write(&out, &[file("x", "1"), file("x/y", "2")], false).unwrap_err();
        assert!(matches!(e, OutDirError::Io { .. }), "{e}");
        assert!(entries(root.path()).is_empty());
    }
}
