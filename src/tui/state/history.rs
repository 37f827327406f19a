//! The records the screen shows, with corrections applied: for every reading
//! and event, its current content and the newest record of its chain (which a
//! further correction supersedes).
//!
//! Nothing is lost: a withdrawn record leaves the current view but its id is
//! remembered, and a correction never changes the original's time.

use std::collections::HashMap;

use chrono::{DateTime, FixedOffset};
use ulid::Ulid;

use crate::model::facility::Tank;
use crate::model::record::{Event, Reading, Record, RecordBody, Target};

/// A reading or event as it currently stands.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// The original record's id.
    pub id: Ulid,
    /// The newest record of the chain: the original, or its latest correction.
    pub head: Ulid,
    /// When the original was taken.
    pub taken_at: DateTime<FixedOffset>,
    /// Who made the original.
    pub operator: String,
    /// The current content: a reading or an event (never a correction).
    pub body: RecordBody,
    /// True when a correction replaced the original content.
    pub corrected: bool,
}

impl Entry {
    /// The reading, when the entry is one.
    pub fn reading(&self) -> Option<&Reading> {
        self.body.as_reading()
    }

    /// The event, when the entry is one.
    pub fn event(&self) -> Option<&Event> {
        self.body.as_event()
    }

    fn target(&self) -> Option<&Target> {
        self.body.target()
    }
}

/// Current readings and events by tank or system, each list in time order.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct History {
    by_target: HashMap<Target, Vec<Entry>>,
    /// Head id → the target list holding that entry.
    heads: HashMap<Ulid, Target>,
    /// Corrections whose superseded record is not (yet) known, by that record's id.
    orphans: HashMap<Ulid, Vec<Record>>,
    len: usize,
}

impl History {
    /// Builds the current view from records in any order.
    pub fn from_records(records: impl IntoIterator<Item = Record>) -> History {
        let mut history = History::default();
        let mut records: Vec<Record> = records.into_iter().collect();
        // Originals before corrections; corrections in the order they were made.
        records.sort_by_key(|r| (matches!(r.body, RecordBody::Correction(_)), r.id));
        for record in records {
            history.add(record);
        }
        history
    }

    /// Number of current readings and events.
    pub fn len(&self) -> usize {
        self.len
    }

    /// True when there is nothing.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// Adds one saved record: a new entry, or a correction of one.
    pub fn add(&mut self, record: Record) {
        match &record.body {
            RecordBody::Correction(correction) => {
                let supersedes = correction.supersedes;
                let Some(target) = self.heads.remove(&supersedes) else {
                    self.orphans.entry(supersedes).or_default().push(record);
                    return;
                };
                let list = self.by_target.entry(target.clone()).or_default();
                let Some(at) = list.iter().rposition(|e| e.head == supersedes) else { return };
                let mut entry = list.remove(at);
                self.len -= 1;
                match correction.replacement.as_deref() {
                    // Withdrawn: it leaves the current view.
                    None => {}
                    Some(body) => {
                        entry.body = body.clone();
                        entry.head = record.id;
                        entry.corrected = true;
                        self.insert(entry);
                    }
                }
            }
            RecordBody::Reading(_) | RecordBody::Event(_) | RecordBody::Skip(_) => {
                let entry = Entry {
                    id: record.id,
                    head: record.id,
                    taken_at: record.taken_at,
                    operator: record.operator.clone(),
                    body: record.body.clone(),
                    corrected: false,
                };
                self.insert(entry);
            }
        }
    }

    fn insert(&mut self, entry: Entry) {
        let Some(target) = entry.target().cloned() else { return };
        let head = entry.head;
        self.heads.insert(head, target.clone());
        let list = self.by_target.entry(target).or_default();
        let key = (entry.taken_at, entry.id);
        let at = list.partition_point(|e| (e.taken_at, e.id) <= key);
        list.insert(at, entry);
        self.len += 1;
        // Corrections that arrived before the record they supersede.
        if let Some(waiting) = self.orphans.remove(&head) {
            waiting.into_iter().for_each(|r| self.add(r));
        }
    }

    /// Entries of one target, oldest first.
    pub fn of_target(&self, target: &Target) -> &[Entry] {
        self.by_target.get(target).map_or(&[], Vec::as_slice)
    }

    /// Entries about a tank: its own and its system's, oldest first.
    pub fn of_tank(&self, tank: &Tank) -> Vec<&Entry> {
        let own = self.of_target(&Target::Tank(tank.id.as_str().to_string()));
        let system = tank.system.as_ref().map_or(&[][..], |s| self.of_target(&Target::System(s.as_str().to_string())));
        merge_by_time(own, system)
    }

    /// Readings about a tank (its own and its system's), oldest first.
    pub fn readings_of_tank(&self, tank: &Tank) -> Vec<&Entry> {
        self.of_tank(tank).into_iter().filter(|e| e.reading().is_some()).collect()
    }

    /// The entry whose chain ends at `head`.
    pub fn by_head(&self, head: Ulid) -> Option<&Entry> {
        let target = self.heads.get(&head)?;
        self.of_target(target).iter().rev().find(|e| e.head == head)
    }
}

fn merge_by_time<'a>(a: &'a [Entry], b: &'a [Entry]) -> Vec<&'a Entry> {
    let mut merged = Vec::with_capacity(a.len() + b.len());
    let (mut i, mut j) = (0, 0);
    while i < a.len() || j < b.len() {
        let take_a = j >= b.len() || (i < a.len() && (a[i].taken_at, a[i].id) <= (b[j].taken_at, b[j].id));
        if take_a {
            merged.push(&a[i]);
            i += 1;
        } else {
            merged.push(&b[j]);
            j += 1;
        }
    }
    merged
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::record::{Correction, DeviceId, Measurements};
    use chrono::TimeZone;

    fn at(minute: u32) -> DateTime<FixedOffset> {
        FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 7, minute, 0).unwrap()
    }

    fn reading(n: u128, target: Target, minute: u32, ph: f64) -> Record {
        let mut body = Reading::new(target);
        body.measurements = Measurements { ph: Some(ph), ..Measurements::default() };
        Record {
            id: Ulid::from_parts(1, n),
            device: DeviceId(Ulid::from_parts(0, 1)),
            operator: "Ines".into(),
            taken_at: at(minute),
            body: RecordBody::Reading(body),
        }
    }

    fn correction(n: u128, supersedes: u128, replacement: Option<Record>) -> Record {
        Record {
            id: Ulid::from_parts(2, n),
            device: DeviceId(Ulid::from_parts(0, 1)),
            operator: "Ines".into(),
            taken_at: at(59),
            body: RecordBody::Correction(Correction {
                supersedes: Ulid::from_parts(if supersedes >= 100 { 2 } else { 1 }, supersedes),
                replacement: replacement.map(|r| Box::new(r.body)),
                reason: "typo".into(),
            }),
        }
    }

    fn tank_target() -> Target {
        Target::Tank("B2-07".into())
    }

    fn ph_of(history: &History) -> Vec<f64> {
        history.of_target(&tank_target()).iter().map(|e| e.reading().unwrap().measurements.ph.unwrap()).collect()
    }

    #[test]
    fn entries_are_kept_in_time_order_whatever_the_arrival_order() {
        let history = History::from_records([
            reading(2, tank_target(), 20, 7.2),
            reading(1, tank_target(), 10, 7.1),
            reading(3, tank_target(), 30, 7.3),
        ]);
        assert_eq!(ph_of(&history), [7.1, 7.2, 7.3]);
        assert_eq!(history.len(), 3);
    }

    #[test]
    fn corrections_replace_content_keep_time_and_chain() {
        let mut history =
            History::from_records([reading(1, tank_target(), 10, 7.1), reading(2, tank_target(), 20, 7.2)]);
        history.add(correction(100, 1, Some(reading(0, tank_target(), 0, 6.9))));
        assert_eq!(ph_of(&history), [6.9, 7.2]);
        let entry = &history.of_target(&tank_target())[0];
        assert!(entry.corrected);
        assert_eq!(entry.taken_at, at(10));
        assert_eq!(entry.head, Ulid::from_parts(2, 100));
        // A correction of the correction.
        history.add(correction(101, 100, Some(reading(0, tank_target(), 0, 7.0))));
        assert_eq!(ph_of(&history), [7.0, 7.2]);
        // Withdrawn.
        history.add(correction(102, 101, None));
        assert_eq!(ph_of(&history), [7.2]);
        assert_eq!(history.len(), 1);
    }

    #[test]
    fn a_correction_read_before_its_original_still_applies() {
        let history = History::from_records([
            correction(100, 1, Some(reading(0, tank_target(), 0, 6.9))),
            reading(1, tank_target(), 10, 7.1),
        ]);
        assert_eq!(ph_of(&history), [6.9]);
    }
}
