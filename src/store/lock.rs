//! One tankwalk at a time per data folder.
//!
//! sled locks its own files, but the journal, `doctor` and `rebuild` need the
//! whole folder: a lock file is taken before anything in the folder is read
//! or written, and released when the process ends, however it ends (the
//! operating system drops the lock with the file).

use std::fs::{File, OpenOptions};
use std::io::{Read, Seek, SeekFrom, Write};
use std::path::{Path, PathBuf};

use fs2::FileExt;

use super::StoreError;

/// How long a refused lock is retried before another tankwalk is reported.
const PATIENCE: std::time::Duration = std::time::Duration::from_millis(1500);

/// The lock file's name in the data folder.
pub(crate) const FILE_NAME: &str = "tankwalk.lock";

/// Holds the data folder until dropped.
#[derive(Debug)]
pub(crate) struct FolderLock {
    _file: File,
}

impl FolderLock {
    /// Takes the lock on `dir` (created if missing), or says who holds it.
    pub(crate) fn acquire(dir: &Path) -> Result<FolderLock, StoreError> {
        std::fs::create_dir_all(dir).map_err(|e| StoreError::io("cannot create the data folder", dir, e))?;
        let path: PathBuf = dir.join(FILE_NAME);
        let mut file = OpenOptions::new()
            .read(true)
            .write(true)
            .create(true)
            .truncate(false)
            .open(&path)
            .map_err(|e| StoreError::io("cannot open", &path, e))?;
        // A lock can be held for a moment by a process that is just starting
        // another program (a forked child keeps the open file until it execs),
        // so a refusal is retried briefly before it is reported.
        let started = std::time::Instant::now();
        let mut locked = file.try_lock_exclusive().is_ok();
        while !locked && started.elapsed() < PATIENCE {
            std::thread::sleep(std::time::Duration::from_millis(25));
            locked = file.try_lock_exclusive().is_ok();
        }
        if !locked {
            let mut holder = String::new();
            let _ = file.read_to_string(&mut holder);
            let holder = holder.trim();
            return Err(StoreError::InUse {
                dir: dir.to_path_buf(),
                holder: (!holder.is_empty()).then(|| holder.to_string()),
            });
        }
        // Say who holds it, for the message another process prints; best effort.
        let _ = file
            .set_len(0)
            .and_then(|()| file.seek(SeekFrom::Start(0)))
            .and_then(|_| write!(file, "process {}", std::process::id()));
        Ok(FolderLock { _file: file })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_second_lock_is_refused_until_the_first_is_dropped() {
        let dir = tempfile::tempdir().unwrap();
        let first = FolderLock::acquire(dir.path()).unwrap();
        let err = FolderLock::acquire(dir.path()).unwrap_err();
        let message = err.to_string();
        assert!(message.starts_with("data folder in use by another tankwalk"), "{message}");
        assert!(message.contains(&format!("process {}", std::process::id())), "{message}");
        drop(first);
        FolderLock::acquire(dir.path()).unwrap();
    }
}
