//! A store in memory, with the same checks, keys and order as [`SledStore`](super::SledStore):
//! for tests of the modules that read and write records.

use std::collections::{BTreeMap, BTreeSet};

use ulid::Ulid;

use super::plan;
use super::{Appended, Store, StoreError, TimeRange, keys};
use crate::model::record::{DeviceId, Record, Target};

/// Records kept in memory; gone when dropped.
#[derive(Debug, Clone)]
pub struct MemStore {
    device: DeviceId,
    records: BTreeMap<Ulid, Record>,
    by_target: BTreeSet<Vec<u8>>,
    by_time: BTreeSet<[u8; 24]>,
    corrections: BTreeSet<[u8; 32]>,
}

impl MemStore {
    /// An empty store with a new device id.
    pub fn new() -> MemStore {
        MemStore::with_device(DeviceId::generate())
    }

    /// An empty store for `device`.
    pub fn with_device(device: DeviceId) -> MemStore {
        MemStore {
            device,
            records: BTreeMap::new(),
            by_target: BTreeSet::new(),
            by_time: BTreeSet::new(),
            corrections: BTreeSet::new(),
        }
    }
}

impl Default for MemStore {
    fn default() -> Self {
        MemStore::new()
    }
}

impl Store for MemStore {
    fn device(&self) -> DeviceId {
        self.device
    }

    fn append(&mut self, records: &[Record]) -> Result<Appended, StoreError> {
        let plan = plan::plan(plan::serialise(records), &|id| Ok(self.records.get(&id).cloned()))?;
        let appended = Appended { added: plan.new.len(), skipped: plan.skipped };
        for p in plan.new {
            if let Some(key) = p.target_key {
                self.by_target.insert(key);
            }
            self.by_time.insert(p.time_key);
            if let Some(key) = p.correction_key {
                self.corrections.insert(key);
            }
            self.records.insert(p.record.id, p.record);
        }
        Ok(appended)
    }

    fn get(&self, id: Ulid) -> Result<Option<Record>, StoreError> {
        Ok(self.records.get(&id).cloned())
    }

    fn corrections_of(&self, id: Ulid) -> Result<Vec<Record>, StoreError> {
        let lo = keys::correction_key(id, Ulid::nil());
        let hi = keys::correction_key(id, Ulid::max());
        let mut found: Vec<Record> = self
            .corrections
            .range(lo..=hi)
            .filter_map(|k| keys::trailing_id(k))
            .filter_map(|c| self.records.get(&c).cloned())
            .collect();
        found.sort_by_key(Record::time_key);
        Ok(found)
    }

    fn history(&self, targets: &[Target], range: &TimeRange) -> Result<Vec<Record>, StoreError> {
        let bounds = range.millis();
        let mut found: Vec<&[u8]> = Vec::new();
        if targets.is_empty() {
            let (lo, hi) = keys::time_bounds(bounds);
            found.extend(self.by_time.range(lo..=hi).map(|k| k.as_slice()));
        } else {
            for target in targets {
                let (lo, hi) = keys::target_bounds(target, bounds);
                found.extend(self.by_target.range(lo..=hi).map(|k| k.as_slice()));
            }
        }
        Ok(keys::newest_first(found).into_iter().filter_map(|id| self.records.get(&id).cloned()).collect())
    }

    fn all(&self) -> Result<Box<dyn Iterator<Item = Result<Record, StoreError>> + '_>, StoreError> {
        Ok(Box::new(self.records.values().cloned().map(Ok)))
    }

    fn len(&self) -> Result<usize, StoreError> {
        Ok(self.records.len())
    }
}
