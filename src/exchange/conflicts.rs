//! Conflicts: a record arriving with the id of a stored record but other content.
//!
//! Ids are made once, when a record is first saved, so two versions of one
//! id mean that a file was edited or damaged in a way its checks could not
//! see. Neither version is thrown away and the stored one is never
//! overwritten: the stored version stays in the store (and in `log`), and the
//! incoming version is appended to `conflicts.jsonl` in the data folder, a
//! file in the journal's format (header line, then each incoming record
//! exactly as received, each version once). `tankwalk doctor` lists them;
//! when the incoming version was the right one, a person enters it with
//! `tankwalk correct`, which keeps both in the record's audit trail.

use std::collections::HashSet;
use std::path::{Path, PathBuf};

use serde::Serialize;
use ulid::Ulid;

use super::ExchangeError;
use crate::model::record::{DeviceId, Record};
use crate::store::StoreError;
use crate::store::journal::{self, Header, Writer};

/// The conflicts file's name in the data folder.
pub const FILE_NAME: &str = "conflicts.jsonl";

/// A conflict found by an import or a sync.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ConflictFound {
    /// The file the incoming version came from.
    pub file: PathBuf,
    /// Its line there.
    pub line: u64,
    /// The record id.
    pub id: Ulid,
    /// Where the two versions differ (`operator`, `body.measurements.ph`, ...), at most a few.
    pub differs_in: Vec<String>,
}

impl std::fmt::Display for ConflictFound {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "{}:{}: record {} is already stored with different content (differs in {}); the stored version is \
             kept, the incoming one is set aside in {FILE_NAME}",
            self.file.display(),
            self.line,
            self.id,
            self.differs_in.join(", ")
        )
    }
}

/// The conflicts file of a data folder.
#[derive(Debug, Clone)]
pub struct ConflictLog {
    path: PathBuf,
    device: DeviceId,
}

impl ConflictLog {
    /// The conflicts file of data folder `dir`, whose device is `device`.
    pub fn in_data_dir(dir: &Path, device: DeviceId) -> ConflictLog {
        ConflictLog { path: dir.join(FILE_NAME), device }
    }

    /// The file.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Appends the incoming versions not kept yet, durably. Returns how many were new.
    pub fn keep(&self, incoming: &[Record]) -> Result<usize, ExchangeError> {
        if incoming.is_empty() {
            return Ok(0);
        }
        let kept: HashSet<Vec<u8>> = read(&self.path)?.iter().map(line_bytes).collect();
        let mut fresh = Vec::new();
        let mut seen = HashSet::new();
        for record in incoming {
            let bytes = line_bytes(record);
            if !kept.contains(&bytes) && seen.insert(bytes.clone()) {
                fresh.push(journal::record_line(&bytes));
            }
        }
        if fresh.is_empty() {
            return Ok(0);
        }
        let mut writer = match journal::scan_header(&self.path)? {
            journal::HeaderState::Missing => Writer::create(&self.path, &Header::new(self.device))?,
            _ => Writer::open(&self.path)?,
        };
        writer.append(&fresh)?;
        Ok(fresh.len())
    }

    /// Every incoming version kept, oldest first.
    pub fn list(&self) -> Result<Vec<Record>, StoreError> {
        read(&self.path)
    }
}

fn line_bytes(record: &Record) -> Vec<u8> {
    // A Record holds only strings, numbers, booleans and ids: serialising cannot fail.
    serde_json::to_vec(record).unwrap_or_default()
}

/// The records in the conflicts file at `path` (none when it does not exist).
pub fn read(path: &Path) -> Result<Vec<Record>, StoreError> {
    let scan = journal::scan(path, 0, 1)?;
    Ok(scan.records.into_iter().map(|l| l.record).collect())
}

/// The conflicts kept in data folder `dir` (for `doctor`, without opening the store).
pub fn list(dir: &Path) -> Result<Vec<Record>, StoreError> {
    read(&dir.join(FILE_NAME))
}

/// Where two versions of a record differ, as dotted paths (at most `limit`).
pub fn differences(stored: &Record, incoming: &Record, limit: usize) -> Vec<String> {
    let (a, b) = match (serde_json::to_value(stored), serde_json::to_value(incoming)) {
        (Ok(a), Ok(b)) => (a, b),
        _ => return vec!["content".into()],
    };
    let mut found = Vec::new();
    diff(&a, &b, String::new(), &mut found, limit);
    if found.is_empty() {
        found.push("content".into());
    }
    found
}

fn diff(a: &serde_json::Value, b: &serde_json::Value, path: String, found: &mut Vec<String>, limit: usize) {
    use serde_json::Value;
    if found.len() >= limit || a == b {
        return;
    }
    match (a, b) {
        (Value::Object(x), Value::Object(y)) => {
            let mut keys: Vec<&String> = x.keys().chain(y.keys()).collect();
            keys.sort();
            keys.dedup();
            for key in keys {
                let child = if path.is_empty() { key.clone() } else { format!("{path}.{key}") };
                match (x.get(key), y.get(key)) {
                    (Some(v), Some(w)) => diff(v, w, child, found, limit),
                    _ if found.len() < limit => found.push(child),
                    _ => {}
                }
            }
        }
        _ => found.push(if path.is_empty() { "content".into() } else { path }),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::record::{Reading, RecordBody, Target};

    fn reading(ph: f64) -> Record {
        let mut r = Reading::new(Target::Tank("Q1".into()));
        r.measurements.ph = Some(ph);
        Record::new(DeviceId::generate(), "Ana Sousa", chrono::Utc::now().fixed_offset(), RecordBody::Reading(r))
    }

    #[test]
    fn each_incoming_version_is_kept_once() {
        let dir = tempfile::tempdir().unwrap();
        let log = ConflictLog::in_data_dir(dir.path(), DeviceId::generate());
        assert!(log.list().unwrap().is_empty());
        let (a, b) = (reading(7.0), reading(7.5));
        assert_eq!(log.keep(&[a.clone(), a.clone()]).unwrap(), 1);
        assert_eq!(log.keep(&[a.clone(), b.clone()]).unwrap(), 1);
        assert_eq!(log.list().unwrap(), [a, b]);
    }

    #[test]
    fn differences_name_the_fields() {
        let a = reading(7.0);
        let mut b = a.clone();
        b.operator = "Other".into();
        if let RecordBody::Reading(r) = &mut b.body {
            r.measurements.ph = Some(7.4);
        }
        assert_eq!(differences(&a, &b, 5), ["body.measurements.ph", "operator"]);
        assert_eq!(differences(&a, &b, 1), ["body.measurements.ph"]);
    }
}
