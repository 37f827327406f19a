//! Flat files between laptops: export, import, and sync through a shared folder.
//!
//! - [`export()`] writes the records of a store to a folder: `records.jsonl`
//!   (lossless, the journal's format with its own header, see
//!   `docs/export-format.md`), `readings.csv` (one row a reading for a
//!   spreadsheet, canonical units, NH3 and band derived, text cells that a
//!   spreadsheet would run as a formula neutralised) and `manifest.json`
//!   (counts and a SHA-256 of each file). Every file is written to a
//!   temporary file in the same folder, synced, and renamed, so a crash
//!   never leaves a half file under a real name.
//! - [`import()`] checks each file whole first ([`check::check_file`]: format,
//!   version, every line, the checksum when a manifest is beside it) and
//!   applies nothing of a file with any problem; otherwise it adds the new
//!   records, skips those already stored and sets conflicts aside
//!   ([`conflicts`]).
//! - [`sync()`] is the shared-folder workflow: each laptop imports the
//!   segments the others wrote, then writes the slice of its journal it has
//!   not sent yet as a new segment under `<folder>/<device id>/`.
//!
//! Long operations report [`Progress`] through a callback, so the command
//! line can draw a bar and the screen a gauge with the same code.

mod atomic;
pub mod check;
pub mod conflicts;
pub mod export;
pub mod import;
pub mod manifest;
pub mod spreadsheet;
pub mod sync;

use std::path::PathBuf;

use crate::store::StoreError;

pub use check::{CheckedFile, Problem, check_file};
pub use conflicts::{ConflictFound, ConflictLog};
pub use export::{ExportOptions, ExportSummary, ExportedFile, Formats, export};
pub use import::{Applied, FileOutcome, ImportSummary, import};
pub use sync::{SyncSummary, sync};

/// How far a long operation has got.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Progress {
    /// What is being done.
    pub stage: Stage,
    /// How much is done, in [`Stage::unit`]s.
    pub done: u64,
    /// How much there is in all (0 when unknown).
    pub total: u64,
}

/// The stages of export, import and sync.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Stage {
    /// Writing the records of the store to the export files.
    Exporting,
    /// Reading and checking a file before anything of it is applied.
    Checking(PathBuf),
    /// Saving the records of a checked file.
    Applying(PathBuf),
    /// Writing this laptop's new segment to the shared folder.
    Sending,
}

impl Stage {
    /// What [`Progress::done`] counts: `"records"` or `"bytes"`.
    pub fn unit(&self) -> &'static str {
        match self {
            Stage::Exporting | Stage::Applying(_) => "records",
            Stage::Checking(_) | Stage::Sending => "bytes",
        }
    }

    /// A short label for a progress bar.
    pub fn label(&self) -> String {
        let name = |p: &PathBuf| p.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
        match self {
            Stage::Exporting => "exporting".into(),
            Stage::Checking(p) => format!("checking {}", name(p)),
            Stage::Applying(p) => format!("saving {}", name(p)),
            Stage::Sending => "sending".into(),
        }
    }
}

/// A progress callback that ignores everything.
pub fn no_progress(_: Progress) {}

/// Why an export, import or sync could not run.
#[derive(Debug, thiserror::Error)]
pub enum ExchangeError {
    /// The store failed.
    #[error(transparent)]
    Store(#[from] StoreError),
    /// A file or folder could not be read or written.
    #[error("{what} {}: {error}", .path.display())]
    Io {
        /// What was being done ("cannot write", ...).
        what: &'static str,
        /// The file or folder.
        path: PathBuf,
        /// The system's error. Said in the message, and so not also given as
        /// the error's source (a chain printed in full would say it twice).
        error: std::io::Error,
    },
    /// The shared folder of a sync is missing.
    #[error(
        "the shared folder {} does not exist (is the network folder or USB stick mounted?); create it first to start syncing there",
        .0.display()
    )]
    NoSharedFolder(PathBuf),
    /// A path that must be a folder is not one.
    #[error("{} is not a folder", .0.display())]
    NotAFolder(PathBuf),
    /// A file of our own state (sync state, manifest) could not be read.
    #[error("{}: {message}", .path.display())]
    State {
        /// The file.
        path: PathBuf,
        /// What is wrong.
        message: String,
    },
}

impl ExchangeError {
    pub(crate) fn io(what: &'static str, path: impl Into<PathBuf>, source: std::io::Error) -> ExchangeError {
        ExchangeError::Io { what, path: path.into(), error: source }
    }
}

/// Lowercase hex of bytes (for SHA-256 digests).
pub(crate) fn hex(bytes: &[u8]) -> String {
    use std::fmt::Write;
    bytes.iter().fold(String::with_capacity(bytes.len() * 2), |mut s, b| {
        let _ = write!(s, "{b:02x}");
        s
    })
}

/// SHA-256 of `bytes` as lowercase hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    use sha2::Digest;
    hex(&sha2::Sha256::digest(bytes))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sha256_matches_the_standard_test_vectors() {
        // FIPS 180-2, appendix B.1 ("abc") and the empty message (NIST example values).
        assert_eq!(sha256_hex(b"abc"), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
        assert_eq!(sha256_hex(b""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
    }
}
