//! What an append writes: checked records, their stored bytes and index keys.
//!
//! Shared by every store so that they agree on checks, duplicates and keys.

use std::collections::HashMap;

use ulid::Ulid;

use super::{StoreError, keys};
use crate::model::record::{Record, RecordBody};

/// How far a chain of corrections is followed to find the record it starts from.
const MAX_CHAIN: usize = 1000;

/// One record to write.
pub(crate) struct Planned {
    pub record: Record,
    /// The stored form: the record's JSON, exactly the journal line without its newline.
    pub bytes: Vec<u8>,
    /// `by_target` key, when the record has a target.
    pub target_key: Option<Vec<u8>>,
    /// `by_time` key.
    pub time_key: [u8; 24],
    /// `corrections` key, for a correction.
    pub correction_key: Option<[u8; 32]>,
}

/// Everything one append writes.
pub(crate) struct Plan {
    pub new: Vec<Planned>,
    pub skipped: usize,
}

/// Serialises records to their stored form.
pub(crate) fn serialise(records: &[Record]) -> Vec<(Record, Vec<u8>)> {
    records
        .iter()
        .map(|r| {
            // A Record holds only strings, numbers, booleans and ids: serialising cannot fail.
            let bytes = serde_json::to_vec(r).unwrap_or_default();
            (r.clone(), bytes)
        })
        .collect()
}

/// Checks `items` and works out what to write. `stored` returns the stored
/// record with an id, if any.
pub(crate) fn plan(
    items: Vec<(Record, Vec<u8>)>,
    stored: &dyn Fn(Ulid) -> Result<Option<Record>, StoreError>,
) -> Result<Plan, StoreError> {
    let mut skipped = 0;
    let mut fresh: Vec<(Record, Vec<u8>)> = Vec::with_capacity(items.len());
    let mut seen: HashMap<Ulid, usize> = HashMap::new();
    for (record, bytes) in items {
        record.check().map_err(|source| StoreError::Invalid { id: record.id, source })?;
        if let Some(&at) = seen.get(&record.id) {
            if fresh[at].0 != record {
                return Err(StoreError::Conflict { id: record.id });
            }
            skipped += 1;
            continue;
        }
        match stored(record.id)? {
            Some(existing) if existing == record => skipped += 1,
            Some(_) => return Err(StoreError::Conflict { id: record.id }),
            None => {
                seen.insert(record.id, fresh.len());
                fresh.push((record, bytes));
            }
        }
    }
    let in_batch: HashMap<Ulid, &Record> = fresh.iter().map(|(r, _)| (r.id, r)).collect();
    let find = |id: Ulid| -> Result<Option<Record>, StoreError> {
        match in_batch.get(&id) {
            Some(r) => Ok(Some((*r).clone())),
            None => stored(id),
        }
    };
    let mut new = Vec::with_capacity(fresh.len());
    for (record, bytes) in &fresh {
        let millis = effective_millis(record, &find)?;
        new.push(Planned {
            target_key: record.body.target().map(|t| keys::target_key(t, millis, record.id)),
            time_key: keys::time_key(millis, record.id),
            correction_key: record.body.as_correction().map(|c| keys::correction_key(c.supersedes, record.id)),
            record: record.clone(),
            bytes: bytes.clone(),
        });
    }
    Ok(Plan { new, skipped })
}

/// The instant a record is filed under: when it was taken; for a correction,
/// when the record at the start of its chain was taken (so a corrected
/// reading stays where it was in the history), or its own time when that
/// record is not known (yet: sync may bring it later).
pub(crate) fn effective_millis(
    record: &Record,
    find: &dyn Fn(Ulid) -> Result<Option<Record>, StoreError>,
) -> Result<i64, StoreError> {
    let mut current = match &record.body {
        RecordBody::Correction(c) => c.supersedes,
        _ => return Ok(record.taken_at.timestamp_millis()),
    };
    for _ in 0..MAX_CHAIN {
        match find(current)? {
            None => break,
            Some(found) => match &found.body {
                RecordBody::Correction(c) => current = c.supersedes,
                _ => return Ok(found.taken_at.timestamp_millis()),
            },
        }
    }
    Ok(record.taken_at.timestamp_millis())
}
