//! Checking that the database and the journal agree, and rebuilding the
//! database from the journal.
//!
//! [`examine`] reads both and writes nothing. [`rebuild`] never deletes: it
//! moves the old database folder (and a damaged journal) aside under a
//! time-stamped name, then builds a new database from every record it can
//! read in either, writing a clean journal first when the old one had
//! damaged lines or lacked records the database held.

use std::collections::{BTreeSet, HashMap, HashSet};
use std::io::Write;
use std::panic::{AssertUnwindSafe, catch_unwind};
use std::path::{Path, PathBuf};

use ulid::Ulid;

use super::journal::{self, BadLine, Header};
use super::lock::FolderLock;
use super::plan::{self, Plan};
use super::sled_store::{CHUNK, DB_DIR, Database, panic_message};
use super::{SCHEMA_VERSION, StoreError, keys};
use crate::model::record::{DeviceId, Record};

/// How many ids a report lists for each kind of difference.
pub const LISTED: usize = 20;

/// What [`examine`] found in the journal.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct JournalReport {
    /// The journal file.
    pub path: PathBuf,
    /// Whether it exists.
    pub exists: bool,
    /// Its length in bytes.
    pub len: u64,
    /// The header's device, or why line 1 is not a header.
    pub header: Option<Result<DeviceId, String>>,
    /// Readable record lines.
    pub records: usize,
    /// Lines that cannot be read, with their numbers.
    pub bad_lines: Vec<BadLine>,
    /// Bytes of an unfinished last line (a save cut short; never acknowledged).
    pub unfinished_bytes: u64,
}

/// What [`examine`] found in the database.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct DatabaseReport {
    /// The database folder.
    pub path: PathBuf,
    /// Whether it exists.
    pub exists: bool,
    /// Why it would not open, when it would not.
    pub open_error: Option<String>,
    /// The layout version in its metadata.
    pub schema: Option<u32>,
    /// The device id in its metadata.
    pub device: Option<DeviceId>,
    /// Records stored.
    pub records: usize,
    /// Records whose stored bytes cannot be read.
    pub unreadable: Vec<String>,
    /// How many bytes of the journal it says it holds.
    pub journal_applied: u64,
}

/// Everything [`examine`] found: the two sides and how they differ.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Report {
    /// The data folder.
    pub dir: PathBuf,
    /// The journal.
    pub journal: JournalReport,
    /// The database.
    pub database: DatabaseReport,
    /// Journal records after the position the database holds: the next open
    /// applies them (a save cut short after the journal was written).
    pub pending: Vec<Ulid>,
    /// Journal records missing from the database (other than `pending`), up to [`LISTED`].
    pub missing_from_database: Vec<Ulid>,
    /// How many journal records are missing from the database (other than `pending`).
    pub missing_from_database_count: usize,
    /// Database records missing from the journal, up to [`LISTED`].
    pub missing_from_journal: Vec<Ulid>,
    /// How many database records are missing from the journal.
    pub missing_from_journal_count: usize,
    /// Records in both whose content differs, up to [`LISTED`].
    pub different: Vec<Ulid>,
    /// How many records differ.
    pub different_count: usize,
    /// Index entries missing or left over.
    pub index_problems: Vec<String>,
}

impl Report {
    /// Every problem found, one sentence each; empty when all agree.
    pub fn problems(&self) -> Vec<String> {
        let mut out = Vec::new();
        let j = &self.journal;
        let d = &self.database;
        if !j.exists {
            if d.records > 0 {
                out.push(format!("the journal {} is missing", j.path.display()));
            }
        } else {
            match &j.header {
                Some(Err(e)) => out.push(format!("{}:1: {e}", j.path.display())),
                None => out.push(format!("the journal {} is empty", j.path.display())),
                Some(Ok(device)) if d.device.is_some_and(|d| d != *device) => out.push(format!(
                    "the journal belongs to device {device}, the database to device {}",
                    d.device.map(|d| d.to_string()).unwrap_or_default()
                )),
                Some(Ok(_)) => {}
            }
        }
        for bad in &j.bad_lines {
            out.push(format!("{}:{}: {}", j.path.display(), bad.number, bad.message));
        }
        if j.unfinished_bytes > 0 {
            out.push(format!(
                "the journal ends with an unfinished line of {} bytes (a save cut short, never acknowledged)",
                j.unfinished_bytes
            ));
        }
        if !d.exists {
            if j.records > 0 {
                out.push(format!("the database {} is missing", d.path.display()));
            }
        } else if let Some(e) = &d.open_error {
            out.push(format!("the database will not open: {e}"));
        }
        if let Some(v) = d.schema.filter(|v| *v > SCHEMA_VERSION) {
            out.push(format!("the database has layout version {v}, newer than this tankwalk ({SCHEMA_VERSION})"));
        }
        out.extend(d.unreadable.iter().cloned());
        if d.journal_applied > j.len && j.exists {
            out.push(format!(
                "the journal ({} bytes) is shorter than the database has applied ({} bytes)",
                j.len, d.journal_applied
            ));
        }
        let list = |ids: &[Ulid], count: usize| {
            let mut s: Vec<String> = ids.iter().map(Ulid::to_string).collect();
            if count > ids.len() {
                s.push(format!("and {} more", count - ids.len()));
            }
            s.join(", ")
        };
        if self.missing_from_database_count > 0 {
            out.push(format!(
                "{} journal records are missing from the database: {}",
                self.missing_from_database_count,
                list(&self.missing_from_database, self.missing_from_database_count)
            ));
        }
        if self.missing_from_journal_count > 0 {
            out.push(format!(
                "{} database records are missing from the journal: {}",
                self.missing_from_journal_count,
                list(&self.missing_from_journal, self.missing_from_journal_count)
            ));
        }
        if self.different_count > 0 {
            out.push(format!(
                "{} records differ between the journal and the database: {}",
                self.different_count,
                list(&self.different, self.different_count)
            ));
        }
        out.extend(self.index_problems.iter().cloned());
        out
    }

    /// True when the journal and the database agree (records still pending
    /// from a cut-short save are not a problem: the next open applies them).
    pub fn agrees(&self) -> bool {
        self.problems().is_empty()
    }
}

/// Reads the journal and the database of data folder `dir` and compares
/// them record by record, and the indexes against the records. Changes
/// nothing (sled may tidy its own files when opened).
pub fn examine(dir: &Path) -> Result<Report, StoreError> {
    let _lock = FolderLock::acquire(dir)?;
    let mut report = Report { dir: dir.to_path_buf(), ..Report::default() };

    let journal_path = dir.join(journal::FILE_NAME);
    let scan = journal::scan(&journal_path, 0, 1)?;
    report.journal = JournalReport {
        path: journal_path.clone(),
        exists: journal_path.exists(),
        len: scan.len,
        header: scan.header.clone().map(|h| h.map(|h| h.device)),
        records: scan.records.len(),
        bad_lines: scan.bad_lines.clone(),
        unfinished_bytes: scan.unfinished_from.map_or(0, |from| scan.len - from),
    };

    let db_path = dir.join(DB_DIR);
    report.database.path = db_path.clone();
    report.database.exists = db_path.exists();
    if !report.database.exists {
        return Ok(report);
    }
    let stored = match read_database(&db_path) {
        Ok(stored) => stored,
        Err(message) => {
            report.database.open_error = Some(message);
            return Ok(report);
        }
    };
    report.database.schema = stored.schema;
    report.database.device = stored.device;
    report.database.journal_applied = stored.applied;
    report.database.records = stored.records.len();
    report.database.unreadable = stored.unreadable.clone();

    let in_journal: HashMap<Ulid, &journal::Line> = scan.records.iter().map(|l| (l.record.id, l)).collect();
    for line in &scan.records {
        match stored.records.get(&line.record.id) {
            None if line.start >= stored.applied => report.pending.push(line.record.id),
            None => {
                report.missing_from_database_count += 1;
                if report.missing_from_database.len() < LISTED {
                    report.missing_from_database.push(line.record.id);
                }
            }
            Some((record, bytes)) if *bytes != line.bytes && *record != line.record => {
                report.different_count += 1;
                if report.different.len() < LISTED {
                    report.different.push(line.record.id);
                }
            }
            Some(_) => {}
        }
    }
    for id in stored.records.keys() {
        if !in_journal.contains_key(id) {
            report.missing_from_journal_count += 1;
            if report.missing_from_journal.len() < LISTED {
                report.missing_from_journal.push(*id);
            }
        }
    }
    report.index_problems = stored.index_problems();
    Ok(report)
}

/// Everything read from a database, tolerating damage.
struct StoredData {
    schema: Option<u32>,
    device: Option<DeviceId>,
    applied: u64,
    records: HashMap<Ulid, (Record, Vec<u8>)>,
    unreadable: Vec<String>,
    by_target: BTreeSet<Vec<u8>>,
    by_time: BTreeSet<Vec<u8>>,
    corrections: BTreeSet<Vec<u8>>,
}

impl StoredData {
    /// Index keys that should exist but do not, and those that should not but do.
    fn index_problems(&self) -> Vec<String> {
        let find = |id: Ulid| Ok(self.records.get(&id).map(|(r, _)| r.clone()));
        let (mut by_target, mut by_time, mut corrections) = (BTreeSet::new(), BTreeSet::new(), BTreeSet::new());
        for (record, _) in self.records.values() {
            let Ok(millis) = plan::effective_millis(record, &find) else { continue };
            if let Some(target) = record.body.target() {
                by_target.insert(keys::target_key(target, millis, record.id));
            }
            by_time.insert(keys::time_key(millis, record.id).to_vec());
            if let Some(c) = record.body.as_correction() {
                corrections.insert(keys::correction_key(c.supersedes, record.id).to_vec());
            }
        }
        let mut out = Vec::new();
        for (name, expected, actual) in [
            ("by_target", &by_target, &self.by_target),
            ("by_time", &by_time, &self.by_time),
            ("corrections", &corrections, &self.corrections),
        ] {
            let missing = expected.difference(actual).count();
            let extra = actual.difference(expected).count();
            if missing > 0 {
                out.push(format!("the {name} index lacks {missing} entries"));
            }
            if extra > 0 {
                out.push(format!("the {name} index has {extra} entries for no stored record"));
            }
        }
        out
    }
}

/// Opens the database at `path` and reads all of it; any failure or panic
/// becomes the message returned.
fn read_database(path: &Path) -> Result<StoredData, String> {
    let database = Database::open(path).map_err(|e| match e {
        StoreError::Damaged { message, .. } => message,
        other => other.to_string(),
    })?;
    let read = catch_unwind(AssertUnwindSafe(|| -> Result<StoredData, String> {
        let (schema, device, applied) = database.meta().map_err(|e| e.to_string())?;
        let mut data = StoredData {
            schema,
            device,
            applied,
            records: HashMap::new(),
            unreadable: Vec::new(),
            by_target: BTreeSet::new(),
            by_time: BTreeSet::new(),
            corrections: BTreeSet::new(),
        };
        for item in database.records.iter() {
            let (key, bytes) = item.map_err(|e| e.to_string())?;
            let Some(id) = keys::id_from_bytes(&key) else {
                data.unreadable.push(format!("the database has a record key that is not an id ({} bytes)", key.len()));
                continue;
            };
            match journal::parse_record(&bytes) {
                Ok(record) if record.id == id => {
                    data.records.insert(id, (record, bytes.to_vec()));
                }
                Ok(record) => data.unreadable.push(format!("database record {id} holds record {}", record.id)),
                Err(e) => data.unreadable.push(format!("database record {id} is unreadable: {e}")),
            }
        }
        for (tree, set) in [
            (&database.by_target, &mut data.by_target),
            (&database.by_time, &mut data.by_time),
            (&database.corrections, &mut data.corrections),
        ] {
            for item in tree.iter() {
                set.insert(item.map_err(|e| e.to_string())?.0.to_vec());
            }
        }
        Ok(data)
    }));
    match read {
        Ok(result) => result,
        Err(panic) => Err(panic_message(panic.as_ref())),
    }
}

/// What [`rebuild`] did.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Rebuilt {
    /// Records in the new database.
    pub records: usize,
    /// Of those, records read from the journal.
    pub from_journal: usize,
    /// Of those, records only the old database held (now in the journal too).
    pub from_old_database: usize,
    /// Where the old database folder was moved.
    pub database_moved_to: Option<PathBuf>,
    /// Why the old database could not be read, when it could not (its folder is kept).
    pub old_database_error: Option<String>,
    /// Where the old journal was moved, when a clean one was written.
    pub journal_moved_to: Option<PathBuf>,
    /// Journal lines that could not be read (kept in the moved journal).
    pub bad_lines: Vec<BadLine>,
    /// Records whose old-database content differed from the journal; the journal's was kept.
    pub conflicts: Vec<Ulid>,
    /// The device id kept.
    pub device: Option<DeviceId>,
}

/// Recreates the database of data folder `dir` from the journal (and from
/// whatever the old database still holds that the journal lacks). Nothing is
/// deleted: the old database and a damaged journal are moved aside.
pub fn rebuild(dir: &Path) -> Result<Rebuilt, StoreError> {
    let _lock = FolderLock::acquire(dir)?;
    let mut done = Rebuilt::default();
    let journal_path = dir.join(journal::FILE_NAME);
    let db_path = dir.join(DB_DIR);
    let scan = journal::scan(&journal_path, 0, 1)?;
    done.bad_lines = scan.bad_lines.clone();

    let old = if db_path.exists() {
        match read_database(&db_path) {
            Ok(data) => Some(data),
            Err(message) => {
                done.old_database_error = Some(message);
                None
            }
        }
    } else {
        None
    };

    let header_device = match &scan.header {
        Some(Ok(h)) => Some(h.device),
        _ => None,
    };
    let device = header_device.or(old.as_ref().and_then(|d| d.device)).unwrap_or_else(DeviceId::generate);
    done.device = Some(device);

    // Every record once: the journal's in file order, then those only the old database had.
    let mut union: Vec<(Record, Vec<u8>)> = Vec::with_capacity(scan.records.len());
    let mut seen: HashSet<Ulid> = HashSet::new();
    for line in &scan.records {
        if seen.insert(line.record.id) {
            union.push((line.record.clone(), line.bytes.clone()));
        }
    }
    done.from_journal = union.len();
    if let Some(old) = &old {
        let by_id: HashMap<Ulid, &Record> = scan.records.iter().map(|l| (l.record.id, &l.record)).collect();
        let mut only_old: Vec<&(Record, Vec<u8>)> = Vec::new();
        for (id, stored) in &old.records {
            if seen.contains(id) {
                if by_id.get(id).is_some_and(|r| **r != stored.0) {
                    done.conflicts.push(*id);
                }
            } else {
                only_old.push(stored);
            }
        }
        only_old.sort_by_key(|(r, _)| r.id);
        done.from_old_database = only_old.len();
        union.extend(only_old.into_iter().cloned());
    }
    done.conflicts.sort();

    // The journal must hold every record, cleanly, before the database is built from it.
    let clean = matches!(scan.header, Some(Ok(_)))
        && scan.bad_lines.is_empty()
        && scan.unfinished_from.is_none()
        && done.from_old_database == 0;
    let ends: Vec<u64> = if clean {
        scan.records.iter().map(|l| l.end).collect()
    } else {
        let (ends, moved) = write_clean_journal(&journal_path, device, &union)?;
        done.journal_moved_to = moved;
        ends
    };

    if db_path.exists() {
        let aside = journal::aside_name(&db_path, "damaged");
        journal::rename_durably(&db_path, &aside)?;
        done.database_moved_to = Some(aside);
    }
    let database = Database::open(&db_path)?;
    database.set_identity(device)?;
    let mut offset = 0;
    for (chunk, chunk_ends) in union.chunks(CHUNK).zip(ends.chunks(CHUNK)) {
        let plan = database.plan(chunk.to_vec())?;
        done.records += plan.new.len();
        offset = chunk_ends.last().copied().unwrap_or(offset);
        database.apply(&plan, offset)?;
    }
    if union.is_empty() {
        let header_end = std::fs::metadata(&journal_path).map(|m| m.len()).unwrap_or(0);
        database.apply(&Plan { new: Vec::new(), skipped: 0 }, header_end)?;
    }
    Ok(done)
}

/// Writes a journal holding `records` beside the old one, syncs it, moves the
/// old one aside and puts the new one in its place. Returns the end offset
/// of each record's line and where the old journal went.
fn write_clean_journal(
    path: &Path,
    device: DeviceId,
    records: &[(Record, Vec<u8>)],
) -> Result<(Vec<u64>, Option<PathBuf>), StoreError> {
    let fresh = path.with_file_name(format!("{}.rebuilding", journal::FILE_NAME));
    let write_err = |e| StoreError::io("cannot write", &fresh, e);
    let file = std::fs::File::create(&fresh).map_err(write_err)?;
    let mut out = std::io::BufWriter::new(file);
    let header = Header::new(device).to_line();
    out.write_all(&header).map_err(write_err)?;
    let mut offset = header.len() as u64;
    let mut ends = Vec::with_capacity(records.len());
    for (_, bytes) in records {
        let line = journal::record_line(bytes);
        out.write_all(&line).map_err(write_err)?;
        offset += line.len() as u64;
        ends.push(offset);
    }
    let file = out.into_inner().map_err(|e| write_err(e.into_error()))?;
    file.sync_all().map_err(write_err)?;
    drop(file);
    let moved = if path.exists() {
        let aside = journal::aside_name(path, "damaged");
        journal::rename_durably(path, &aside)?;
        Some(aside)
    } else {
        None
    };
    journal::rename_durably(&fresh, path)?;
    Ok((ends, moved))
}
