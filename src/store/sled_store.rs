//! The record store in a data folder: a journal plus a sled database.
//!
//! ```text
//! <data folder>/
//!   tankwalk.lock     held while a tankwalk has the folder open
//!   journal.jsonl     every record, appended and fsynced before a save returns
//!   store/            the sled database: records and their indexes
//! ```
//!
//! Trees of the database: `records` (id → the record's JSON, byte for byte
//! its journal line), `by_target`, `by_time` and `corrections` (index keys,
//! see [`super::keys`]) and `meta` (layout version, device id, and how many
//! bytes of the journal the database holds). The record, its index keys and
//! the journal position are written in one transaction and flushed before a
//! save returns. On opening, any journal lines beyond that position (a save
//! cut short between the journal and the database) are applied.

use std::panic::{AssertUnwindSafe, catch_unwind};
use std::path::{Path, PathBuf};

use sled::Transactional;
use sled::transaction::{ConflictableTransactionError, TransactionError};
use ulid::Ulid;

use super::journal::{self, Header, Writer};
use super::lock::FolderLock;
use super::plan::{self, Plan};
use super::{Appended, SCHEMA_VERSION, Store, StoreError, TimeRange, keys};
use crate::model::record::{DeviceId, Record, Target};

/// The sled database's folder name in the data folder.
pub const DB_DIR: &str = "store";

const META_SCHEMA: &[u8] = b"schema_version";
const META_DEVICE: &[u8] = b"device";
const META_APPLIED: &[u8] = b"journal_applied";

/// How long to wait for sled's own lock on a database just closed in this process.
const LOCK_PATIENCE: std::time::Duration = std::time::Duration::from_secs(3);
const LOCK_RETRY: std::time::Duration = std::time::Duration::from_millis(20);

/// Records applied to the database per transaction when catching up or rebuilding.
pub(crate) const CHUNK: usize = 5_000;

/// What opening had to do before the store was ready.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct OpenReport {
    /// True when the data folder was used for the first time.
    pub created: bool,
    /// Records found in the journal but not yet in the database, now applied.
    pub caught_up: usize,
    /// An unfinished last journal line (never acknowledged), moved to this file.
    pub set_aside: Option<PathBuf>,
}

/// The sled database of a data folder and its trees.
pub(crate) struct Database {
    pub path: PathBuf,
    pub db: sled::Db,
    pub records: sled::Tree,
    pub by_target: sled::Tree,
    pub by_time: sled::Tree,
    pub corrections: sled::Tree,
    pub meta: sled::Tree,
}

impl Database {
    /// Opens (or creates) the database in `path`; a panic inside sled (it
    /// panics on some damaged files) is reported as [`StoreError::Damaged`].
    pub fn open(path: &Path) -> Result<Database, StoreError> {
        // The data folder is locked by the caller, so no other tankwalk holds
        // the database. sled's own lock can still be held for a moment by a
        // database this process has just dropped (sled's threads close its
        // files shortly after), so a refused lock is retried for a while.
        let mut waited = std::time::Duration::ZERO;
        loop {
            match Database::open_once(path) {
                Err(StoreError::InUse { .. }) if waited < LOCK_PATIENCE => {
                    std::thread::sleep(LOCK_RETRY);
                    waited += LOCK_RETRY;
                }
                other => return other,
            }
        }
    }

    fn open_once(path: &Path) -> Result<Database, StoreError> {
        let damaged = |message: String| StoreError::Damaged { path: path.to_path_buf(), message };
        remove_unfinished_snapshots(path)?;
        let opened = catch_unwind(AssertUnwindSafe(|| -> Result<Database, sled::Error> {
            let db = sled::Config::new()
                .path(path)
                // Every save flushes; no background flusher writing every 500 ms.
                .flush_every_ms(None)
                .cache_capacity(64 * 1024 * 1024)
                .open()?;
            Ok(Database {
                path: path.to_path_buf(),
                records: db.open_tree("records")?,
                by_target: db.open_tree("by_target")?,
                by_time: db.open_tree("by_time")?,
                corrections: db.open_tree("corrections")?,
                meta: db.open_tree("meta")?,
                db,
            })
        }));
        match opened {
            Ok(Ok(database)) => Ok(database),
            Ok(Err(sled::Error::Io(e))) if e.to_string().contains("could not acquire lock") => {
                Err(StoreError::InUse { dir: path.parent().unwrap_or(path).to_path_buf(), holder: None })
            }
            Ok(Err(sled::Error::Io(e))) if super::is_disk_full(&e) => {
                Err(StoreError::DiskFull { what: "cannot open the record database", path: path.to_path_buf() })
            }
            // The system refused a write (a file-size limit, a read-only disk, permissions):
            // nothing is damaged, so say what was refused rather than send the person to `rebuild`.
            Ok(Err(sled::Error::Io(e)))
                if matches!(
                    e.kind(),
                    std::io::ErrorKind::FileTooLarge
                        | std::io::ErrorKind::ReadOnlyFilesystem
                        | std::io::ErrorKind::PermissionDenied
                ) =>
            {
                Err(StoreError::Io { what: "cannot open the record database", path: path.to_path_buf(), error: e })
            }
            Ok(Err(sled::Error::Corruption { .. })) => Err(damaged("sled found corrupted data".into())),
            Ok(Err(e)) => Err(damaged(e.to_string())),
            Err(panic) => Err(damaged(panic_message(panic.as_ref()))),
        }
    }

    fn failed(&self, e: impl std::fmt::Display) -> StoreError {
        StoreError::Database { path: self.path.clone(), message: e.to_string() }
    }

    /// A failed write to the database: a full disk said as such.
    fn write_failed(&self, e: &sled::Error) -> StoreError {
        match e {
            sled::Error::Io(io) if super::is_disk_full(io) => {
                StoreError::DiskFull { what: "cannot write the record database", path: self.path.clone() }
            }
            other => self.failed(other),
        }
    }

    fn meta_u64(&self, key: &[u8]) -> Result<Option<u64>, StoreError> {
        match self.meta.get(key).map_err(|e| self.failed(e))? {
            None => Ok(None),
            Some(v) => {
                let bytes: [u8; 8] = v.as_ref().try_into().map_err(|_| self.failed("metadata value unreadable"))?;
                Ok(Some(u64::from_be_bytes(bytes)))
            }
        }
    }

    /// The layout version, the device id and the journal position kept in `meta`.
    pub fn meta(&self) -> Result<(Option<u32>, Option<DeviceId>, u64), StoreError> {
        let schema = match self.meta.get(META_SCHEMA).map_err(|e| self.failed(e))? {
            None => None,
            Some(v) => {
                Some(u32::from_be_bytes(v.as_ref().try_into().map_err(|_| self.failed("layout version unreadable"))?))
            }
        };
        let device = match self.meta.get(META_DEVICE).map_err(|e| self.failed(e))? {
            None => None,
            Some(v) => Some(DeviceId(keys::id_from_bytes(&v).ok_or_else(|| self.failed("device id unreadable"))?)),
        };
        Ok((schema, device, self.meta_u64(META_APPLIED)?.unwrap_or(0)))
    }

    /// Writes the layout version and device id, durably.
    pub fn set_identity(&self, device: DeviceId) -> Result<(), StoreError> {
        let mut batch = sled::Batch::default();
        batch.insert(META_SCHEMA, &SCHEMA_VERSION.to_be_bytes());
        batch.insert(META_DEVICE, &device.0.to_bytes());
        self.meta.apply_batch(batch).map_err(|e| self.failed(e))?;
        self.db.flush().map_err(|e| self.failed(e))?;
        Ok(())
    }

    /// The stored record with `id`.
    pub fn get(&self, id: Ulid) -> Result<Option<Record>, StoreError> {
        match self.records.get(id.to_bytes()).map_err(|e| self.failed(e))? {
            None => Ok(None),
            Some(bytes) => self.parse(id, &bytes).map(Some),
        }
    }

    pub fn parse(&self, id: Ulid, bytes: &[u8]) -> Result<Record, StoreError> {
        serde_json::from_slice(bytes).map_err(|e| self.failed(format!("record {id} is unreadable: {e}")))
    }

    /// Writes everything in `plan` and the new journal position in one
    /// transaction, then flushes.
    pub fn apply(&self, plan: &Plan, journal_applied: u64) -> Result<(), StoreError> {
        let trees = (&self.records, &self.by_target, &self.by_time, &self.corrections, &self.meta);
        let result: Result<(), TransactionError<()>> =
            trees.transaction(|(records, by_target, by_time, corrections, meta)| {
                for p in &plan.new {
                    records.insert(&p.record.id.to_bytes(), p.bytes.as_slice())?;
                    if let Some(key) = &p.target_key {
                        by_target.insert(key.as_slice(), &[])?;
                    }
                    by_time.insert(&p.time_key, &[])?;
                    if let Some(key) = &p.correction_key {
                        corrections.insert(key, &[])?;
                    }
                }
                meta.insert(META_APPLIED, &journal_applied.to_be_bytes())?;
                Ok::<(), ConflictableTransactionError<()>>(())
            });
        match result {
            Ok(()) => {}
            Err(TransactionError::Storage(e)) => return Err(self.write_failed(&e)),
            Err(TransactionError::Abort(())) => return Err(self.failed("the transaction was aborted")),
        }
        self.db.flush().map_err(|e| self.write_failed(&e))?;
        Ok(())
    }

    /// Ids of the records under `targets` (or all) within `range`, newest first, each once.
    pub fn history_ids(&self, targets: &[Target], range: &TimeRange) -> Result<Vec<Ulid>, StoreError> {
        let bounds = range.millis();
        let mut found: Vec<sled::IVec> = Vec::new();
        if targets.is_empty() {
            let (lo, hi) = keys::time_bounds(bounds);
            for item in self.by_time.range(lo..=hi) {
                found.push(item.map_err(|e| self.failed(e))?.0);
            }
        } else {
            for target in targets {
                let (lo, hi) = keys::target_bounds(target, bounds);
                for item in self.by_target.range(lo..=hi) {
                    found.push(item.map_err(|e| self.failed(e))?.0);
                }
            }
        }
        Ok(keys::newest_first(found.iter().map(|k| k.as_ref())))
    }

    /// The records of the ids, in that order.
    pub fn records_of(&self, ids: impl IntoIterator<Item = Ulid>) -> Result<Vec<Record>, StoreError> {
        let mut out = Vec::new();
        for id in ids {
            match self.get(id)? {
                Some(r) => out.push(r),
                None => return Err(self.failed(format!("an index names record {id}, which is missing"))),
            }
        }
        Ok(out)
    }

    pub fn corrections_of(&self, id: Ulid) -> Result<Vec<Record>, StoreError> {
        let mut ids = Vec::new();
        for item in self.corrections.scan_prefix(id.to_bytes()) {
            let (key, _) = item.map_err(|e| self.failed(e))?;
            ids.extend(keys::trailing_id(&key));
        }
        let mut records = self.records_of(ids)?;
        records.sort_by_key(Record::time_key);
        Ok(records)
    }

    /// Plans an append against what is stored.
    pub fn plan(&self, items: Vec<(Record, Vec<u8>)>) -> Result<Plan, StoreError> {
        plan::plan(items, &|id| self.get(id))
    }
}

/// Removes sled's snapshot temporary files (`snap.<lsn>.generating`) left by
/// a process killed while writing one.
///
/// sled 0.34.7 writes a snapshot to `snap.<lsn>.generating`, syncs it and only
/// then renames it to `snap.<lsn>`; the rename is what makes it count. But
/// when it looks for the newest snapshot it takes every name starting with
/// `snap.` and the temporary file sorts last, so after such a kill it reads
/// the half-written file and reports corruption (spacejam/sled#1527; found
/// here by `tests/crash_safety.rs`). The temporary file never holds anything
/// the older snapshot and the log do not, so it is removed. Only called with
/// the data folder locked, so no other process is writing a snapshot.
fn remove_unfinished_snapshots(path: &Path) -> Result<(), StoreError> {
    let entries = match std::fs::read_dir(path) {
        Ok(entries) => entries,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(()),
        Err(e) => return Err(StoreError::io("cannot read", path, e)),
    };
    for entry in entries.flatten() {
        let name = entry.file_name();
        let name = name.to_string_lossy();
        if name.starts_with("snap.") && name.ends_with(".generating") {
            std::fs::remove_file(entry.path()).map_err(|e| StoreError::io("cannot remove", entry.path(), e))?;
        }
    }
    Ok(())
}

/// The text of a caught panic.
pub(crate) fn panic_message(panic: &(dyn std::any::Any + Send)) -> String {
    if let Some(s) = panic.downcast_ref::<&str>() {
        format!("sled stopped: {s}")
    } else if let Some(s) = panic.downcast_ref::<String>() {
        format!("sled stopped: {s}")
    } else {
        "sled stopped".to_string()
    }
}

/// The durable record store of one data folder.
pub struct SledStore {
    dir: PathBuf,
    /// `None` after a failed write until it opens again (see [`SledStore::recover`]).
    database: Option<Database>,
    journal: Writer,
    device: DeviceId,
    opened: OpenReport,
    /// The journal holds records the database may lack (a save whose
    /// database write failed): the database is opened again and caught up
    /// before the next save.
    behind: bool,
    // Declared last so that it is released last.
    _lock: FolderLock,
}

impl std::fmt::Debug for SledStore {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("SledStore").field("dir", &self.dir).field("device", &self.device).finish_non_exhaustive()
    }
}

impl SledStore {
    /// Opens the store in data folder `dir`, creating both on first use.
    ///
    /// Fails with [`StoreError::InUse`] when another process has the folder
    /// open. Journal lines not yet in the database are applied; an
    /// unfinished last line is moved aside (see [`OpenReport`]).
    pub fn open(dir: &Path) -> Result<SledStore, StoreError> {
        let lock = FolderLock::acquire(dir)?;
        let journal_path = dir.join(journal::FILE_NAME);
        let head = journal::scan_header(&journal_path)?;
        let database = Database::open(&dir.join(DB_DIR))?;
        let (schema, stored_device, applied) = database.meta()?;
        if let Some(found) = schema.filter(|v| *v > SCHEMA_VERSION) {
            return Err(StoreError::NewerSchema { found, supported: SCHEMA_VERSION });
        }
        let has_records = !database.records.is_empty();
        let mut opened = OpenReport::default();
        let (device, header_end) = match (head, stored_device) {
            (journal::HeaderState::Good(header, _), Some(device)) if header.device != device => {
                return Err(StoreError::Disagree {
                    message: format!(
                        "the journal belongs to device {} but the database to device {device}",
                        header.device
                    ),
                });
            }
            (journal::HeaderState::Good(header, end), _) => (header.device, end),
            (journal::HeaderState::Missing, _) if has_records => {
                return Err(StoreError::Disagree {
                    message: format!(
                        "the journal {} is missing but the database holds records",
                        journal_path.display()
                    ),
                });
            }
            (journal::HeaderState::Unfinished, _) if !has_records => {
                // A first use cut short while writing the header: start again, keeping the piece.
                opened.set_aside = Some(journal::set_aside_tail(&journal_path, 0)?);
                std::fs::remove_file(&journal_path).map_err(|e| StoreError::io("cannot replace", &journal_path, e))?;
                Self::start_journal(&journal_path, stored_device, &mut opened)?
            }
            (journal::HeaderState::Missing, _) => Self::start_journal(&journal_path, stored_device, &mut opened)?,
            (journal::HeaderState::Unfinished, _) => {
                return Err(StoreError::Journal {
                    path: journal_path,
                    line: 1,
                    message: "the header line is unfinished".into(),
                });
            }
            (journal::HeaderState::Bad(message), _) => {
                return Err(StoreError::Journal { path: journal_path, line: 1, message });
            }
        };
        if stored_device.is_none() || schema.is_none() {
            database.set_identity(device)?;
        }
        let journal_len =
            std::fs::metadata(&journal_path).map_err(|e| StoreError::io("cannot read", &journal_path, e))?.len();
        if applied > journal_len {
            return Err(StoreError::Disagree {
                message: format!(
                    "the journal {} is shorter ({journal_len} bytes) than the database has applied ({applied} bytes)",
                    journal_path.display()
                ),
            });
        }
        let from = applied.max(header_end);
        if from < journal_len {
            let (count, set_aside) = catch_up(&database, &journal_path, from)?;
            opened.caught_up = count;
            opened.set_aside = opened.set_aside.or(set_aside);
        }
        let journal = Writer::open(&journal_path)?;
        Ok(SledStore {
            dir: dir.to_path_buf(),
            database: Some(database),
            journal,
            device,
            opened,
            behind: false,
            _lock: lock,
        })
    }

    fn start_journal(
        path: &Path,
        device: Option<DeviceId>,
        opened: &mut OpenReport,
    ) -> Result<(DeviceId, u64), StoreError> {
        let device = device.unwrap_or_else(DeviceId::generate);
        // A first use cut short between creating the file and writing its
        // header leaves it empty: nothing to keep, so start it again.
        if std::fs::metadata(path).is_ok_and(|m| m.len() == 0) {
            std::fs::remove_file(path).map_err(|e| StoreError::io("cannot replace", path, e))?;
        }
        let writer = Writer::create(path, &Header::new(device))?;
        opened.created = true;
        Ok((device, writer.len()))
    }

    /// The data folder.
    pub fn dir(&self) -> &Path {
        &self.dir
    }

    /// The journal file.
    pub fn journal_path(&self) -> PathBuf {
        self.dir.join(journal::FILE_NAME)
    }

    /// What opening had to do.
    pub fn opened(&self) -> &OpenReport {
        &self.opened
    }

    fn database(&self) -> Result<&Database, StoreError> {
        self.database.as_ref().ok_or_else(|| StoreError::Database {
            path: self.dir.join(DB_DIR),
            message: "it failed to write earlier and has not opened again yet".into(),
        })
    }

    /// After a save whose database write failed (sled refuses every later
    /// write once one has failed, for example on a full disk): opens the
    /// database again and applies the journal lines it lacks.
    fn recover(&mut self) -> Result<(), StoreError> {
        // Drop the failed database first: sled holds its files until then.
        self.database = None;
        let database = Database::open(&self.dir.join(DB_DIR))?;
        let (_, _, applied) = database.meta()?;
        let journal_path = self.journal_path();
        let header_end = match journal::scan_header(&journal_path)? {
            journal::HeaderState::Good(_, end) => end,
            _ => 0,
        };
        let from = applied.max(header_end);
        if from < self.journal.len() {
            catch_up(&database, &journal_path, from)?;
        }
        self.database = Some(database);
        self.behind = false;
        Ok(())
    }
}

/// Applies the journal's lines from byte `from` to the database. Returns how
/// many records were applied and where an unfinished tail was moved.
fn catch_up(database: &Database, journal_path: &Path, from: u64) -> Result<(usize, Option<PathBuf>), StoreError> {
    let first_line = journal::lines_before(journal_path, from)? + 1;
    let scan = journal::scan(journal_path, from, first_line)?;
    if let Some(bad) = scan.bad_lines_inside().next() {
        return Err(StoreError::Journal {
            path: journal_path.to_path_buf(),
            line: bad.number,
            message: bad.message.clone(),
        });
    }
    // Whatever follows the last readable line was never acknowledged: keep it aside.
    let set_aside =
        if scan.good_end() < scan.len { Some(journal::set_aside_tail(journal_path, scan.good_end())?) } else { None };
    let mut count = 0;
    for chunk in scan.records.chunks(CHUNK) {
        let items = chunk.iter().map(|l| (l.record.clone(), l.bytes.clone())).collect();
        let plan = database.plan(items)?;
        count += plan.new.len();
        let end = chunk.last().map_or(from, |l| l.end);
        database.apply(&plan, end)?;
    }
    Ok((count, set_aside))
}

impl Store for SledStore {
    fn device(&self) -> DeviceId {
        self.device
    }

    fn append(&mut self, records: &[Record]) -> Result<Appended, StoreError> {
        if self.behind {
            // Whatever an earlier save left in the journal alone goes in
            // first, so the database's journal position never passes a
            // record it lacks.
            self.recover()?;
        }
        let plan = self.database()?.plan(plan::serialise(records))?;
        let appended = Appended { added: plan.new.len(), skipped: plan.skipped };
        if plan.new.is_empty() {
            return Ok(appended);
        }
        let lines: Vec<Vec<u8>> = plan.new.iter().map(|p| journal::record_line(&p.bytes)).collect();
        // The journal first: once it is synced the records survive whatever
        // happens to the database, and the next open applies them.
        let journal_len = self.journal.append(&lines)?;
        self.database()?.apply(&plan, journal_len).map_err(|e| {
            self.behind = true;
            StoreError::JournalOnly {
                message: match e {
                    StoreError::Database { message, .. } => message,
                    StoreError::DiskFull { .. } => "the disk is full; free some space on it".to_string(),
                    other => other.to_string(),
                },
            }
        })?;
        Ok(appended)
    }

    fn get(&self, id: Ulid) -> Result<Option<Record>, StoreError> {
        self.database()?.get(id)
    }

    fn corrections_of(&self, id: Ulid) -> Result<Vec<Record>, StoreError> {
        self.database()?.corrections_of(id)
    }

    fn history(&self, targets: &[Target], range: &TimeRange) -> Result<Vec<Record>, StoreError> {
        let database = self.database()?;
        let ids = database.history_ids(targets, range)?;
        database.records_of(ids)
    }

    fn all(&self) -> Result<Box<dyn Iterator<Item = Result<Record, StoreError>> + '_>, StoreError> {
        let db = self.database()?;
        Ok(Box::new(db.records.iter().map(move |item| {
            let (key, bytes) = item.map_err(|e| db.failed(e))?;
            let id = keys::id_from_bytes(&key).ok_or_else(|| db.failed("a record key is not an id"))?;
            db.parse(id, &bytes)
        })))
    }

    fn len(&self) -> Result<usize, StoreError> {
        Ok(self.database()?.records.len())
    }
}
