//! Files that appear whole or not at all.
//!
//! A [`PartialFile`] is written under a hidden temporary name in the folder
//! of its real name (`.<name>.<pid>.partial`), hashed as it is written, and
//! locked while its writer lives. [`Written::commit`] syncs it, renames it
//! to its real name and syncs the folder, so after a crash the real name
//! holds either the old file or the new one, never half of one. A partial
//! file whose writer died (its lock is free) is removed by
//! [`remove_stale_partials`].

use std::fs::{self, File, OpenOptions};
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};

use fs2::FileExt;
use sha2::{Digest, Sha256};

use super::{ExchangeError, hex};
use crate::store::journal::sync_parent;

const PARTIAL_SUFFIX: &str = ".partial";

/// A file being written under a temporary name.
pub(crate) struct PartialFile {
    target: PathBuf,
    temp: PathBuf,
    /// `None` once finished: the [`Written`] owns the file then.
    out: Option<BufWriter<File>>,
    hasher: Sha256,
    bytes: u64,
}

impl PartialFile {
    /// Starts writing what will become `target`.
    pub fn create(target: &Path) -> Result<PartialFile, ExchangeError> {
        let name = target.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
        let temp = target.with_file_name(format!(".{name}.{}{PARTIAL_SUFFIX}", std::process::id()));
        let file = OpenOptions::new()
            .write(true)
            .create(true)
            .truncate(true)
            .open(&temp)
            .map_err(|e| ExchangeError::io("cannot write", &temp, e))?;
        // Held until the file is renamed or dropped: tells a later run the writer is alive.
        // Some network folders cannot lock; the lock is only a hint for clean-up.
        let _ = file.try_lock_exclusive();
        Ok(PartialFile {
            target: target.to_path_buf(),
            temp,
            out: Some(BufWriter::with_capacity(1 << 16, file)),
            hasher: Sha256::new(),
            bytes: 0,
        })
    }

    /// Writes all of `bytes`, naming the file in an error.
    pub fn put(&mut self, bytes: &[u8]) -> Result<(), ExchangeError> {
        self.write_all(bytes).map_err(|e| ExchangeError::io("cannot write", &self.temp, e))
    }

    /// Flushes and syncs the data; the file keeps its temporary name until committed.
    pub fn finish(mut self) -> Result<Written, ExchangeError> {
        let out = self.out.take().ok_or_else(|| ExchangeError::io("cannot write", &self.temp, closed()))?;
        let temp = self.temp.clone();
        // From here on the Written removes the temporary file if it is never committed.
        let mut written = Written {
            target: self.target.clone(),
            temp: temp.clone(),
            file: None,
            committed: false,
            bytes: self.bytes,
            sha256: hex(&std::mem::take(&mut self.hasher).finalize()),
        };
        let file = out.into_inner().map_err(|e| ExchangeError::io("cannot write", &temp, e.into_error()))?;
        file.sync_all().map_err(|e| ExchangeError::io("cannot sync", &temp, e))?;
        written.file = Some(file);
        Ok(written)
    }
}

impl Write for PartialFile {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        let n = self.out.as_mut().ok_or_else(closed)?.write(buf)?;
        self.hasher.update(&buf[..n]);
        self.bytes += n as u64;
        Ok(n)
    }

    fn flush(&mut self) -> io::Result<()> {
        self.out.as_mut().ok_or_else(closed)?.flush()
    }
}

impl Drop for PartialFile {
    fn drop(&mut self) {
        // Never finished (an error on the way): nothing under a real name, and no litter.
        if self.out.take().is_some() {
            let _ = fs::remove_file(&self.temp);
        }
    }
}

fn closed() -> io::Error {
    io::Error::other("the file is already finished")
}

/// A file fully written and synced under its temporary name.
#[derive(Debug)]
pub(crate) struct Written {
    /// The real name it will have.
    pub target: PathBuf,
    temp: PathBuf,
    /// Held open (and locked) until renamed.
    file: Option<File>,
    committed: bool,
    /// Its length.
    pub bytes: u64,
    /// SHA-256 of its content, lowercase hex.
    pub sha256: String,
}

impl Written {
    /// Renames the file to its real name, replacing any file there, and syncs the folder.
    pub fn commit(mut self) -> Result<PathBuf, ExchangeError> {
        fs::rename(&self.temp, &self.target).map_err(|e| ExchangeError::io("cannot rename", &self.temp, e))?;
        self.committed = true;
        self.file = None;
        sync_parent(&self.target)?;
        Ok(self.target.clone())
    }

    /// Gives the file the real name `target` only when no file has it yet
    /// (`Ok(false)` then, and the file stays ready for another name).
    pub fn commit_new(&mut self, target: &Path) -> Result<bool, ExchangeError> {
        match fs::hard_link(&self.temp, target) {
            Ok(()) => {}
            Err(e) if e.kind() == io::ErrorKind::AlreadyExists => return Ok(false),
            Err(_) => {
                // Some shared folders have no hard links: check, then rename.
                if target.exists() {
                    return Ok(false);
                }
                fs::rename(&self.temp, target).map_err(|e| ExchangeError::io("cannot rename", &self.temp, e))?;
            }
        }
        let _ = fs::remove_file(&self.temp);
        self.committed = true;
        self.file = None;
        self.target = target.to_path_buf();
        sync_parent(target)?;
        Ok(true)
    }
}

impl Drop for Written {
    fn drop(&mut self) {
        if !self.committed {
            let _ = fs::remove_file(&self.temp);
        }
    }
}

/// True for the name of a temporary file of [`PartialFile`].
pub(crate) fn is_partial_name(name: &str) -> bool {
    name.starts_with('.') && name.ends_with(PARTIAL_SUFFIX)
}

/// Removes the temporary files in `dir` whose writer is gone (their lock is
/// free): what a killed export or sync left. Returns how many were removed.
pub(crate) fn remove_stale_partials(dir: &Path) -> usize {
    let Ok(entries) = fs::read_dir(dir) else { return 0 };
    let mut removed = 0;
    for entry in entries.flatten() {
        let name = entry.file_name();
        if !is_partial_name(&name.to_string_lossy()) {
            continue;
        }
        let path = entry.path();
        let Ok(file) = OpenOptions::new().write(true).open(&path) else { continue };
        if file.try_lock_exclusive().is_ok() && fs::remove_file(&path).is_ok() {
            removed += 1;
        }
    }
    removed
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nothing_appears_under_the_real_name_until_commit() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("records.jsonl");
        let mut partial = PartialFile::create(&target).unwrap();
        partial.write_all(b"abc").unwrap();
        assert!(!target.exists());
        let written = partial.finish().unwrap();
        assert!(!target.exists());
        // FIPS 180-2 appendix B.1.
        assert_eq!(written.sha256, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
        assert_eq!(written.bytes, 3);
        written.commit().unwrap();
        assert_eq!(fs::read(&target).unwrap(), b"abc");
        let names: Vec<String> =
            fs::read_dir(dir.path()).unwrap().map(|e| e.unwrap().file_name().to_string_lossy().into()).collect();
        assert_eq!(names, ["records.jsonl"]);
    }

    #[test]
    fn an_abandoned_file_leaves_nothing_and_a_live_one_is_not_cleaned_up() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("a.jsonl");
        drop(PartialFile::create(&target).unwrap());
        assert_eq!(fs::read_dir(dir.path()).unwrap().count(), 0);
        let live = PartialFile::create(&target).unwrap();
        assert_eq!(remove_stale_partials(dir.path()), 0, "a file whose writer lives is kept");
        drop(live);
        // A killed writer leaves its file unlocked: it is removed.
        fs::write(dir.path().join(".b.jsonl.999.partial"), b"half").unwrap();
        assert_eq!(remove_stale_partials(dir.path()), 1);
    }

    #[test]
    fn commit_new_never_replaces() {
        let dir = tempfile::tempdir().unwrap();
        let taken = dir.path().join("segment-000001.jsonl");
        fs::write(&taken, b"theirs").unwrap();
        let mut partial = PartialFile::create(&taken).unwrap();
        partial.write_all(b"mine").unwrap();
        let mut written = partial.finish().unwrap();
        assert!(!written.commit_new(&taken).unwrap());
        let next = dir.path().join("segment-000002.jsonl");
        assert!(written.commit_new(&next).unwrap());
        assert_eq!(fs::read(&taken).unwrap(), b"theirs");
        assert_eq!(fs::read(&next).unwrap(), b"mine");
        drop(written);
        assert_eq!(fs::read_dir(dir.path()).unwrap().count(), 2);
    }
}
