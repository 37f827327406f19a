//! Durable storage of records.
//!
//! The rest of the code sees the small [`Store`] trait. Two stores implement it:
//!
//! - [`SledStore`]: the real one, in a data folder. A save returns only after
//!   the records are appended and fsynced to an append-only JSON Lines
//!   journal (`journal.jsonl`, see `docs/journal-format.md`) and then applied
//!   to the sled database and flushed. The journal is the record of truth:
//!   [`repair::rebuild`] recreates the database from it, and
//!   [`repair::examine`] checks that the two agree.
//! - [`MemStore`]: the same behaviour in memory, for tests of other modules.
//!
//! Records are never changed or deleted: a [`Correction`](crate::model::record::Correction)
//! is a new record; [`history`] resolves the current value and its trail.

pub mod history;
pub mod journal;
mod keys;
mod lock;
pub mod mem;
pub(crate) mod plan;
pub mod repair;
pub mod sled_store;

use std::path::PathBuf;

use chrono::{DateTime, Utc};
use ulid::Ulid;

use crate::model::record::{DeviceId, Record, RecordError, Target};

pub use history::Entry;
pub use mem::MemStore;
pub use sled_store::SledStore;

/// Version of the layout of the sled database, kept in its metadata tree.
pub const SCHEMA_VERSION: u32 = 1;

/// What every store offers.
pub trait Store {
    /// The device this store's new records are made on.
    fn device(&self) -> DeviceId;

    /// Saves `records`, all or none, and returns only when they are durable.
    ///
    /// Every record is checked first ([`Record::check`]); a record whose id is
    /// already stored with the same content is skipped (so saving twice is
    /// harmless), and one whose id is stored with other content is refused
    /// ([`StoreError::Conflict`]). On any error nothing is saved.
    fn append(&mut self, records: &[Record]) -> Result<Appended, StoreError>;

    /// The record with this id.
    fn get(&self, id: Ulid) -> Result<Option<Record>, StoreError>;

    /// The corrections that directly supersede `id`, oldest first.
    fn corrections_of(&self, id: Ulid) -> Result<Vec<Record>, StoreError>;

    /// Records about any of `targets` taken within `range`, newest first,
    /// each once. No targets means every target.
    ///
    /// Callers pass a tank *and* its system to see the readings taken on the
    /// shared water too. A correction is found under the target of its
    /// replacement, at the time of the record it corrects.
    fn history(&self, targets: &[Target], range: &TimeRange) -> Result<Vec<Record>, StoreError>;

    /// Every record, in id order.
    fn all(&self) -> Result<Box<dyn Iterator<Item = Result<Record, StoreError>> + '_>, StoreError>;

    /// How many records are stored.
    fn len(&self) -> Result<usize, StoreError>;

    /// True when no record is stored.
    fn is_empty(&self) -> Result<bool, StoreError> {
        Ok(self.len()? == 0)
    }
}

/// What [`Store::append`] did.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Appended {
    /// Records newly saved.
    pub added: usize,
    /// Records already stored with the same content, skipped.
    pub skipped: usize,
}

/// A closed interval of time; either end may be open.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct TimeRange {
    /// Earliest instant included.
    pub since: Option<DateTime<Utc>>,
    /// Latest instant included.
    pub until: Option<DateTime<Utc>>,
}

impl TimeRange {
    /// All of time.
    pub const ALL: TimeRange = TimeRange { since: None, until: None };

    /// From `since` to `until`, both included.
    pub fn new(since: Option<DateTime<Utc>>, until: Option<DateTime<Utc>>) -> TimeRange {
        TimeRange { since, until }
    }

    /// The range as milliseconds since the Unix epoch, both ends included.
    pub fn millis(&self) -> (i64, i64) {
        (self.since.map_or(i64::MIN, |t| t.timestamp_millis()), self.until.map_or(i64::MAX, |t| t.timestamp_millis()))
    }

    /// Whether `millis` since the Unix epoch lies in the range.
    pub fn contains_millis(&self, millis: i64) -> bool {
        let (lo, hi) = self.millis();
        (lo..=hi).contains(&millis)
    }
}

/// Why a store operation failed.
#[derive(Debug, thiserror::Error)]
pub enum StoreError {
    /// Another process has the data folder open.
    #[error("data folder in use by another tankwalk ({}{})", .dir.display(), .holder.as_deref().map(|h| format!(", {h}")).unwrap_or_default())]
    InUse {
        /// The data folder.
        dir: PathBuf,
        /// Who holds it, when known (for example "process 1234").
        holder: Option<String>,
    },
    /// A record failed its checks; nothing was saved.
    #[error("record {id}: {source}")]
    Invalid {
        /// The record's id.
        id: Ulid,
        /// What is wrong.
        source: RecordError,
    },
    /// A record's id is already stored with other content; nothing was saved.
    #[error("record {id} is already stored with different content; nothing was saved")]
    Conflict {
        /// The record's id.
        id: Ulid,
    },
    /// A file could not be read or written.
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
    /// The disk holding the data folder is full: what was being saved was not.
    #[error(
        "the disk is full: {what} {} (no space left on the device). Nothing of this command was saved; \
         free some space on that disk and try again. Every record saved before is safe", .path.display()
    )]
    DiskFull {
        /// What was being done ("cannot write", ...).
        what: &'static str,
        /// The file or folder.
        path: PathBuf,
    },
    /// The sled database failed.
    #[error("the record database in {} failed: {message}; run `tankwalk doctor`", .path.display())]
    Database {
        /// Its folder.
        path: PathBuf,
        /// sled's message.
        message: String,
    },
    /// The records reached the journal (they are safe, and the next open
    /// applies them) but the database failed to take them.
    #[error(
        "the record is saved in the journal, but the record database failed ({message}); it will be applied \
         the next time the store opens: run `tankwalk doctor` to check"
    )]
    JournalOnly {
        /// What the database said.
        message: String,
    },
    /// The sled database will not open.
    #[error(
        "the record database in {} will not open ({message}); the journal keeps every saved record: \
         run `tankwalk doctor`, then `tankwalk rebuild`", .path.display()
    )]
    Damaged {
        /// Its folder.
        path: PathBuf,
        /// What went wrong.
        message: String,
    },
    /// The journal has a line that cannot be read.
    #[error("{}:{line}: {message}; run `tankwalk doctor`, then `tankwalk rebuild`", .path.display())]
    Journal {
        /// The journal file.
        path: PathBuf,
        /// 1-based line number.
        line: u64,
        /// What is wrong.
        message: String,
    },
    /// The journal and the database disagree in a way opening cannot repair.
    #[error("{message}; run `tankwalk doctor` to see the differences, then `tankwalk rebuild`")]
    Disagree {
        /// What disagrees.
        message: String,
    },
    /// The database was written by a newer tankwalk.
    #[error(
        "the record database has layout version {found}, newer than this tankwalk understands ({supported}); update tankwalk"
    )]
    NewerSchema {
        /// Version found.
        found: u32,
        /// Newest version this build reads.
        supported: u32,
    },
}

impl StoreError {
    pub(crate) fn io(what: &'static str, path: impl Into<PathBuf>, source: std::io::Error) -> StoreError {
        if is_disk_full(&source) {
            return StoreError::DiskFull { what, path: path.into() };
        }
        StoreError::Io { what, path: path.into(), error: source }
    }
}

/// True for the errors of a full disk (or a used-up disk quota).
pub(crate) fn is_disk_full(error: &std::io::Error) -> bool {
    matches!(error.kind(), std::io::ErrorKind::StorageFull | std::io::ErrorKind::QuotaExceeded)
}
