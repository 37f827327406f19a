//! Exporting a store to a folder: `records.jsonl`, `readings.csv`, `manifest.json`.
//!
//! The store is read once, in id order, and every file is streamed to a
//! temporary file beside its real name. Only when all are written and
//! synced does the old manifest go, the new files take their names, and the
//! new manifest follow; so at every moment each real name holds a whole
//! file, and a manifest present always describes the files beside it.

use std::fs;
use std::path::{Path, PathBuf};

use chrono::{DateTime, Utc};
use serde::Serialize;

use super::atomic::{PartialFile, Written, remove_stale_partials};
use super::manifest::{self, FileEntry, KindCounts, Manifest};
use super::spreadsheet::{ReadingsCsv, RoomContext, reading_row};
use super::{ExchangeError, Progress, Stage};
use crate::model::facility::Facility;
use crate::model::record::{Record, RecordBody};
use crate::store::journal::{self, Header, sync_parent};
use crate::store::{Store, history, plan};

/// The lossless records file of an export.
pub const RECORDS_FILE: &str = "records.jsonl";
/// The spreadsheet file of an export.
pub const READINGS_FILE: &str = "readings.csv";

/// Which files an export writes.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub enum Formats {
    /// Only the lossless JSON Lines.
    Jsonl,
    /// Only the spreadsheet CSV.
    Csv,
    /// Both.
    #[default]
    Both,
}

impl Formats {
    /// Whether the JSON Lines file is written.
    pub fn jsonl(self) -> bool {
        matches!(self, Formats::Jsonl | Formats::Both)
    }

    /// Whether the CSV file is written.
    pub fn csv(self) -> bool {
        matches!(self, Formats::Csv | Formats::Both)
    }
}

/// What to export.
#[derive(Debug, Clone, Default)]
pub struct ExportOptions<'a> {
    /// Which files.
    pub formats: Formats,
    /// Only records taken at or after this instant (a correction counts at
    /// the time of the record it corrects).
    pub since: Option<DateTime<Utc>>,
    /// The room, for each tank's species band edges and salinity in the CSV;
    /// without one the default edges are used and the CSV says so.
    pub room: Option<&'a Facility>,
    /// The room's file, named in the manifest.
    pub room_file: Option<PathBuf>,
}

/// One file written by an export.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ExportedFile {
    /// Where.
    pub path: PathBuf,
    /// [`manifest::RECORDS`] or [`manifest::READINGS_CSV`].
    pub content: &'static str,
    /// Length.
    pub bytes: u64,
    /// SHA-256, lowercase hex.
    pub sha256: String,
    /// Records or rows.
    pub count: u64,
}

/// What an export wrote.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ExportSummary {
    /// The folder.
    pub dir: PathBuf,
    /// The data files, JSON Lines first.
    pub files: Vec<ExportedFile>,
    /// The manifest.
    pub manifest: PathBuf,
    /// Records selected (written to the JSON Lines when it was asked for).
    pub records: u64,
    /// Of them, by kind.
    pub kinds: KindCounts,
    /// Reading rows (current values, withdrawn readings left out).
    pub rows: u64,
    /// Earliest and latest time a selected record was taken.
    pub taken_first: Option<DateTime<Utc>>,
    /// See `taken_first`.
    pub taken_last: Option<DateTime<Utc>>,
    /// True when the CSV's bands use the default edges because no room was given.
    pub default_edges: bool,
    /// The moment the store was read.
    pub until: DateTime<Utc>,
    /// Temporary files of an earlier, interrupted export that were removed.
    pub stale_removed: usize,
}

/// Exports `store` to folder `dir` (created when missing).
pub fn export(
    store: &dyn Store,
    dir: &Path,
    options: &ExportOptions<'_>,
    progress: &mut dyn FnMut(Progress),
) -> Result<ExportSummary, ExchangeError> {
    if dir.exists() && !dir.is_dir() {
        return Err(ExchangeError::NotAFolder(dir.to_path_buf()));
    }
    fs::create_dir_all(dir).map_err(|e| ExchangeError::io("cannot create", dir, e))?;
    let stale_removed = remove_stale_partials(dir);
    let until = Utc::now();
    let total = store.len()? as u64;

    let mut jsonl = if options.formats.jsonl() {
        let mut file = PartialFile::create(&dir.join(RECORDS_FILE))?;
        let mut header = Header::new(store.device());
        header.created_at = until;
        header.since = options.since;
        header.until = Some(until);
        file.put(&header.to_line())?;
        Some(file)
    } else {
        None
    };
    let mut csv = if options.formats.csv() {
        let file = PartialFile::create(&dir.join(READINGS_FILE))?;
        Some(ReadingsCsv::new(file).map_err(|e| csv_error(dir, e))?)
    } else {
        None
    };
    let mut room = RoomContext::new(options.room);
    let since_millis = options.since.map(|s| s.timestamp_millis());
    let mut selected = Selected::default();
    let mut row_range = Range::default();
    let mut done = 0;
    progress(Progress { stage: Stage::Exporting, done, total });
    for record in store.all()? {
        let record = record?;
        done += 1;
        if done % 4096 == 0 {
            progress(Progress { stage: Stage::Exporting, done, total });
        }
        if let Some(since) = since_millis {
            let at = match record.body {
                RecordBody::Correction(_) => plan::effective_millis(&record, &|id| store.get(id))?,
                _ => record.taken_at.timestamp_millis(),
            };
            if at < since {
                continue;
            }
        }
        selected.count(&record);
        if let Some(file) = &mut jsonl {
            // A Record holds only strings, numbers, booleans and ids: serialising cannot fail.
            let bytes = serde_json::to_vec(&record).unwrap_or_default();
            file.put(&journal::record_line(&bytes))?;
        }
        if let Some(csv) = &mut csv
            && let Some(cells) = row_of(store, &mut room, &record)?
        {
            csv.row(&cells).map_err(|e| csv_error(dir, e))?;
            row_range.add(&record);
        }
    }
    progress(Progress { stage: Stage::Exporting, done, total });

    // Everything is written under temporary names; now sync them and give them their names.
    let mut written: Vec<(Written, &'static str, u64)> = Vec::new();
    if let Some(file) = jsonl {
        written.push((file.finish()?, manifest::RECORDS, selected.records));
    }
    let rows = csv.as_ref().map_or(0, ReadingsCsv::rows);
    if let Some(csv) = csv {
        let file = csv.into_inner().map_err(|e| ExchangeError::io("cannot write", dir.join(READINGS_FILE), e))?;
        written.push((file.finish()?, manifest::READINGS_CSV, rows));
    }
    let entries: Vec<FileEntry> = written
        .iter()
        .map(|(w, content, count)| {
            let range = if *content == manifest::RECORDS { &selected.range } else { &row_range };
            FileEntry {
                name: w.target.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default(),
                content: (*content).into(),
                bytes: w.bytes,
                sha256: w.sha256.clone(),
                count: *count,
                kinds: (*content == manifest::RECORDS).then_some(selected.kinds),
                taken_first: range.first,
                taken_last: range.last,
            }
        })
        .collect();
    let manifest = Manifest {
        format: manifest::FORMAT.into(),
        version: manifest::VERSION,
        device: store.device(),
        created_at: until,
        since: options.since,
        room: options.room_file.as_ref().map(|p| p.display().to_string()),
        files: entries,
        caution: crate::CAUTION.into(),
    };
    let manifest_path = dir.join(manifest::FILE_NAME);
    let mut manifest_file = PartialFile::create(&manifest_path)?;
    manifest_file.put(manifest.to_text().as_bytes())?;
    let manifest_written = manifest_file.finish()?;
    // Without the old manifest, files replaced one by one are never checked against it.
    match fs::remove_file(&manifest_path) {
        Ok(()) => sync_parent(&manifest_path)?,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {}
        Err(e) => return Err(ExchangeError::io("cannot replace", &manifest_path, e)),
    }
    let mut files = Vec::new();
    for (w, content, count) in written {
        let (bytes, sha256) = (w.bytes, w.sha256.clone());
        let path = w.commit()?;
        files.push(ExportedFile { path, content, bytes, sha256, count });
    }
    manifest_written.commit()?;
    Ok(ExportSummary {
        dir: dir.to_path_buf(),
        files,
        manifest: manifest_path,
        records: selected.records,
        kinds: selected.kinds,
        rows,
        taken_first: selected.range.first,
        taken_last: selected.range.last,
        default_edges: options.formats.csv() && !room.has_room(),
        until,
        stale_removed,
    })
}

/// The CSV row of `record`, when it is an original whose current value is a reading.
fn row_of(
    store: &dyn Store,
    room: &mut RoomContext<'_>,
    record: &Record,
) -> Result<Option<Vec<super::spreadsheet::Cell>>, ExchangeError> {
    if matches!(record.body, RecordBody::Correction(_)) {
        return Ok(None);
    }
    if store.corrections_of(record.id)?.is_empty() {
        return Ok(record.body.as_reading().map(|r| reading_row(room, record, r, record.id, false)));
    }
    let Some(entry) = history::entry(store, record.id)? else { return Ok(None) };
    Ok(match entry.current() {
        Some(RecordBody::Reading(r)) => Some(reading_row(room, record, r, entry.current_id(), true)),
        _ => None,
    })
}

fn csv_error(dir: &Path, e: csv::Error) -> ExchangeError {
    let path = dir.join(READINGS_FILE);
    match e.into_kind() {
        csv::ErrorKind::Io(e) => ExchangeError::io("cannot write", path, e),
        other => ExchangeError::io("cannot write", path, std::io::Error::other(format!("{other:?}"))),
    }
}

/// Earliest and latest taken-at.
#[derive(Debug, Default)]
struct Range {
    first: Option<DateTime<Utc>>,
    last: Option<DateTime<Utc>>,
}

impl Range {
    fn add(&mut self, record: &Record) {
        let at = record.taken_at.with_timezone(&Utc);
        self.first = Some(self.first.map_or(at, |f| f.min(at)));
        self.last = Some(self.last.map_or(at, |l| l.max(at)));
    }
}

/// Counts of the records selected.
#[derive(Debug, Default)]
struct Selected {
    records: u64,
    kinds: KindCounts,
    range: Range,
}

impl Selected {
    fn count(&mut self, record: &Record) {
        self.records += 1;
        let kinds = &mut self.kinds;
        match record.body {
            RecordBody::Reading(_) => kinds.readings += 1,
            RecordBody::Event(_) => kinds.events += 1,
            RecordBody::Correction(_) => kinds.corrections += 1,
            RecordBody::Skip(_) => kinds.skips += 1,
        }
        self.range.add(record);
    }
}
