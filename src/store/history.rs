//! History as people read it: each reading or event with its current value
//! and the corrections that led to it.
//!
//! A correction may supersede the original or an earlier correction; all of
//! them form the original's chain. The current value is the replacement of
//! the newest correction in the chain (by when it was made, then id), so two
//! laptops correcting the same reading end with the same answer and both
//! corrections in the trail. A correction without a replacement withdraws
//! the record.

use std::collections::{HashSet, VecDeque};

use ulid::Ulid;

use super::{Store, StoreError, TimeRange};
use crate::model::record::{Record, RecordBody, Target};

/// Longest chain of corrections followed back to its original.
const MAX_CHAIN: usize = 1000;

/// A reading or an event and its chain of corrections.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// The record as first saved.
    pub original: Record,
    /// Every correction in its chain, oldest first.
    pub corrections: Vec<Record>,
}

impl Entry {
    /// The newest correction, which decides the current value.
    pub fn latest_correction(&self) -> Option<&Record> {
        self.corrections.last()
    }

    /// The current value; `None` when the record was withdrawn.
    pub fn current(&self) -> Option<&RecordBody> {
        match self.latest_correction() {
            None => Some(&self.original.body),
            Some(c) => c.body.as_correction().and_then(|c| c.replacement.as_deref()),
        }
    }

    /// The id of the record holding the current value.
    pub fn current_id(&self) -> Ulid {
        self.latest_correction().map_or(self.original.id, |c| c.id)
    }

    /// The id the newest correction supersedes, when corrected.
    pub fn supersedes(&self) -> Option<Ulid> {
        self.latest_correction().and_then(|c| c.body.as_correction()).map(|c| c.supersedes)
    }

    /// True when at least one correction exists.
    pub fn is_corrected(&self) -> bool {
        !self.corrections.is_empty()
    }

    /// True when the newest correction withdraws the record.
    pub fn is_withdrawn(&self) -> bool {
        self.current().is_none()
    }

    /// The newest value that was not a withdrawal: what a new correction starts from.
    pub fn last_value(&self) -> &RecordBody {
        self.corrections
            .iter()
            .rev()
            .filter_map(|c| c.body.as_correction().and_then(|c| c.replacement.as_deref()))
            .next()
            .unwrap_or(&self.original.body)
    }

    /// The current target (the original's when withdrawn).
    pub fn target(&self) -> Option<&Target> {
        self.current().and_then(RecordBody::target).or_else(|| self.original.body.target())
    }

    /// Every record of the entry, the original first, then the corrections oldest first.
    pub fn trail(&self) -> impl Iterator<Item = &Record> {
        std::iter::once(&self.original).chain(&self.corrections)
    }
}

/// The original a record belongs to: itself, or the start of its correction
/// chain. `None` when the chain leads to a record this store does not hold.
pub fn original_of<S: Store + ?Sized>(store: &S, record: Record) -> Result<Option<Record>, StoreError> {
    let mut current = record;
    for _ in 0..MAX_CHAIN {
        let supersedes = match &current.body {
            RecordBody::Correction(c) => c.supersedes,
            _ => return Ok(Some(current)),
        };
        match store.get(supersedes)? {
            Some(r) => current = r,
            None => return Ok(None),
        }
    }
    Ok(None)
}

/// The entry of `original` with its whole chain of corrections.
pub fn entry_of<S: Store + ?Sized>(store: &S, original: Record) -> Result<Entry, StoreError> {
    let mut corrections = Vec::new();
    let mut seen = HashSet::from([original.id]);
    let mut queue = VecDeque::from([original.id]);
    while let Some(id) = queue.pop_front() {
        for c in store.corrections_of(id)? {
            if seen.insert(c.id) {
                queue.push_back(c.id);
                corrections.push(c);
            }
        }
    }
    corrections.sort_by_key(Record::time_key);
    Ok(Entry { original, corrections })
}

/// The entry that record `id` belongs to (as original or as a correction).
pub fn entry<S: Store + ?Sized>(store: &S, id: Ulid) -> Result<Option<Entry>, StoreError> {
    let Some(record) = store.get(id)? else { return Ok(None) };
    match original_of(store, record)? {
        Some(original) => entry_of(store, original).map(Some),
        None => Ok(None),
    }
}

/// The entries about any of `targets` (all when empty) taken within `range`,
/// newest first. Withdrawn entries are included: check [`Entry::is_withdrawn`].
pub fn entries<S: Store + ?Sized>(store: &S, targets: &[Target], range: &TimeRange) -> Result<Vec<Entry>, StoreError> {
    let mut originals = Vec::new();
    let mut seen = HashSet::new();
    for record in store.history(targets, range)? {
        let Some(original) = original_of(store, record)? else { continue };
        if range.contains_millis(original.taken_at.timestamp_millis()) && seen.insert(original.id) {
            originals.push(original);
        }
    }
    originals.sort_by_key(|r| std::cmp::Reverse(r.time_key()));
    originals.into_iter().map(|o| entry_of(store, o)).collect()
}
