//! Importing records files into a store.
//!
//! Each file is checked whole first ([`check_file`]); a file with any problem
//! is refused and nothing of it is applied. A good file is applied in
//! batches of [`BATCH`] records (one batch for most files), each saved
//! durably: a record already stored with the same content is skipped (so
//! importing again is a no-op), one stored with other content is a conflict,
//! set aside in the [`ConflictLog`] and reported, never overwritten. A crash
//! in the middle of a large file keeps whole batches; importing the file
//! again completes it.

use std::path::PathBuf;

use serde::Serialize;

use super::check::{CheckedFile, Problem, check_file};
use super::conflicts::{self, ConflictFound, ConflictLog};
use super::{ExchangeError, Progress, Stage};
use crate::model::record::Record;
use crate::store::Store;

/// Records saved per batch (and per sled transaction).
pub const BATCH: usize = crate::store::sled_store::CHUNK;

/// How many differing fields a conflict report names.
const DIFFERENCES_LISTED: usize = 4;

/// What applying one checked file did.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct Applied {
    /// Records in the file (each id once).
    pub records: usize,
    /// Records newly saved.
    pub added: usize,
    /// Records already stored with the same content, skipped.
    pub already: usize,
    /// Lines repeating an earlier line of the same file exactly, skipped.
    pub repeated: usize,
    /// Records whose id is stored with other content.
    pub conflicts: Vec<ConflictFound>,
}

/// The outcome of one file of an import.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FileOutcome {
    /// The file.
    pub path: PathBuf,
    /// What was applied, or every problem found (then nothing was applied).
    #[serde(serialize_with = "serialize_result")]
    pub result: Result<Applied, Vec<Problem>>,
    /// Notes that did not stop the import.
    #[serde(serialize_with = "serialize_problems")]
    pub warnings: Vec<Problem>,
    /// The manifest the file's checksum was checked against.
    pub manifest: Option<PathBuf>,
}

/// What an import did, file by file.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct ImportSummary {
    /// One outcome per file, in the order given.
    pub files: Vec<FileOutcome>,
}

impl ImportSummary {
    /// Records newly saved from all files.
    pub fn added(&self) -> usize {
        self.files.iter().filter_map(|f| f.result.as_ref().ok()).map(|a| a.added).sum()
    }

    /// Files refused.
    pub fn refused(&self) -> usize {
        self.files.iter().filter(|f| f.result.is_err()).count()
    }

    /// Conflicts found in all files.
    pub fn conflicts(&self) -> usize {
        self.files.iter().filter_map(|f| f.result.as_ref().ok()).map(|a| a.conflicts.len()).sum()
    }
}

/// Checks and applies each of `files` in turn (see the module documentation).
/// An error is returned only when the store itself fails; bad files are in
/// the summary.
pub fn import(
    store: &mut dyn Store,
    conflicts: &ConflictLog,
    files: &[PathBuf],
    progress: &mut dyn FnMut(Progress),
) -> Result<ImportSummary, ExchangeError> {
    let mut summary = ImportSummary::default();
    for path in files {
        let outcome = match check_file(path, progress) {
            Err(problems) => {
                FileOutcome { path: path.clone(), result: Err(problems), warnings: Vec::new(), manifest: None }
            }
            Ok(checked) => {
                let warnings = checked.warnings.clone();
                let manifest = checked.manifest.clone();
                let applied = apply(store, conflicts, checked, progress)?;
                FileOutcome { path: path.clone(), result: Ok(applied), warnings, manifest }
            }
        };
        summary.files.push(outcome);
    }
    Ok(summary)
}

/// Applies a checked file to `store`.
pub fn apply(
    store: &mut dyn Store,
    conflict_log: &ConflictLog,
    file: CheckedFile,
    progress: &mut dyn FnMut(Progress),
) -> Result<Applied, ExchangeError> {
    let CheckedFile { path, records, repeated, .. } = file;
    let total = records.len() as u64;
    let stage = Stage::Applying(path.clone());
    let mut applied = Applied { records: records.len(), repeated, ..Applied::default() };
    let mut done = 0;
    progress(Progress { stage: stage.clone(), done, total });
    let mut records = records.into_iter().peekable();
    while records.peek().is_some() {
        let mut fresh: Vec<Record> = Vec::with_capacity(BATCH.min(total as usize));
        let mut set_aside: Vec<Record> = Vec::new();
        for line_record in records.by_ref().take(BATCH) {
            done += 1;
            let incoming = line_record.record;
            match store.get(incoming.id)? {
                Some(stored) if stored == incoming => applied.already += 1,
                Some(stored) => {
                    applied.conflicts.push(ConflictFound {
                        file: path.clone(),
                        line: line_record.line,
                        id: incoming.id,
                        differs_in: conflicts::differences(&stored, &incoming, DIFFERENCES_LISTED),
                    });
                    set_aside.push(incoming);
                }
                None => fresh.push(incoming),
            }
        }
        // The incoming versions are kept before anything else is saved: whatever
        // happens next, neither version of a conflict is lost.
        conflict_log.keep(&set_aside)?;
        let appended = store.append(&fresh)?;
        applied.added += appended.added;
        applied.already += appended.skipped;
        progress(Progress { stage: stage.clone(), done, total });
    }
    Ok(applied)
}

fn serialize_problems<S: serde::Serializer>(problems: &[Problem], s: S) -> Result<S::Ok, S::Error> {
    s.collect_seq(problems.iter().map(|p| p.to_string()))
}

fn serialize_result<S: serde::Serializer>(result: &Result<Applied, Vec<Problem>>, s: S) -> Result<S::Ok, S::Error> {
    #[derive(Serialize)]
    #[serde(rename_all = "snake_case")]
    enum View<'a> {
        Applied(&'a Applied),
        Refused(Vec<String>),
    }
    match result {
        Ok(applied) => View::Applied(applied).serialize(s),
        Err(problems) => View::Refused(problems.iter().map(|p| p.to_string()).collect()).serialize(s),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::record::{DeviceId, Reading, RecordBody, Target};
    use crate::store::MemStore;
    use crate::store::journal::{self, Header};
    use std::io::Write;
    use std::path::Path;

    fn reading(ph: f64) -> Record {
        let mut r = Reading::new(Target::Tank("Q1".into()));
        r.measurements.ph = Some(ph);
        Record::new(DeviceId::generate(), "Ana Sousa", chrono::Utc::now().fixed_offset(), RecordBody::Reading(r))
    }

    fn file(dir: &Path, name: &str, records: &[Record]) -> PathBuf {
        let path = dir.join(name);
        let mut f = std::fs::File::create(&path).unwrap();
        f.write_all(&Header::new(DeviceId::generate()).to_line()).unwrap();
        for r in records {
            f.write_all(&journal::record_line(&serde_json::to_vec(r).unwrap())).unwrap();
        }
        path
    }

    #[test]
    fn importing_twice_adds_nothing_the_second_time() {
        let dir = tempfile::tempdir().unwrap();
        let records: Vec<Record> = (0..7).map(|i| reading(6.5 + f64::from(i) / 10.0)).collect();
        let path = file(dir.path(), "a.jsonl", &records);
        let mut store = MemStore::new();
        let log = ConflictLog::in_data_dir(dir.path(), store.device());
        let first = import(&mut store, &log, std::slice::from_ref(&path), &mut super::super::no_progress).unwrap();
        assert_eq!(first.added(), 7);
        let again = import(&mut store, &log, &[path], &mut super::super::no_progress).unwrap();
        assert_eq!(again.added(), 0);
        assert_eq!(again.files[0].result.as_ref().unwrap().already, 7);
        assert_eq!(store.len().unwrap(), 7);
    }

    #[test]
    fn a_conflict_keeps_both_versions_and_the_rest_is_applied() {
        let dir = tempfile::tempdir().unwrap();
        let mut store = MemStore::new();
        let stored = reading(7.0);
        store.append(std::slice::from_ref(&stored)).unwrap();
        let mut incoming = stored.clone();
        incoming.operator = "Someone Else".into();
        let other = reading(7.3);
        let path = file(dir.path(), "b.jsonl", &[incoming.clone(), other.clone()]);
        let log = ConflictLog::in_data_dir(dir.path(), store.device());
        let summary = import(&mut store, &log, &[path], &mut super::super::no_progress).unwrap();
        let applied = summary.files[0].result.as_ref().unwrap();
        assert_eq!((applied.added, applied.conflicts.len()), (1, 1));
        assert_eq!(applied.conflicts[0].line, 2);
        assert_eq!(applied.conflicts[0].differs_in, ["operator"]);
        assert_eq!(store.get(stored.id).unwrap(), Some(stored), "the stored version is never overwritten");
        assert_eq!(log.list().unwrap(), [incoming], "the incoming version is kept");
        assert!(store.get(other.id).unwrap().is_some());
    }

    #[test]
    fn a_bad_file_applies_nothing_and_the_good_ones_are_applied() {
        let dir = tempfile::tempdir().unwrap();
        let good = file(dir.path(), "good.jsonl", &[reading(7.0)]);
        let bad = dir.path().join("bad.jsonl");
        let mut text = std::fs::read(file(dir.path(), "x.jsonl", &[reading(7.1)])).unwrap();
        text.extend_from_slice(b"{\"id\": 3}\n");
        std::fs::write(&bad, text).unwrap();
        let mut store = MemStore::new();
        let log = ConflictLog::in_data_dir(dir.path(), store.device());
        let summary = import(&mut store, &log, &[bad, good], &mut super::super::no_progress).unwrap();
        assert_eq!(summary.refused(), 1);
        assert_eq!(summary.added(), 1);
        assert_eq!(store.len().unwrap(), 1);
    }
}
