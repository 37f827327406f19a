//! A tank's timeline: its readings, events and skips from the store (current
//! values after corrections, withdrawn records left out), together with those
//! of its system, ready for [`rules::assess`](crate::rules::assess).
//!
//! Every screen and command that shows an assessment of stored readings goes
//! through here, so that `record`, `log`, the walk and the report all judge a
//! reading against the same history and events.

use std::collections::HashMap;

use chrono::{DateTime, Duration, Utc};

use crate::model::facility::{Facility, Tank};
use crate::model::record::{EventKind, Reading, RecordBody, Target};
use crate::rules::{Assessment, DatedEvent, Inputs, PastReading, RulesConfig, assess};
use crate::store::{Entry, Store, StoreError, TimeRange, history};

/// How far before a reading the assessment looks: the trend window (14 days)
/// and the at-risk window after events (14 days) with a margin, and the
/// newest feeding hold, which may be older.
pub const LOOK_BACK: Duration = Duration::days(31);

/// One tank's (and its system's) stored history, oldest first.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Timeline {
    /// Readings: when taken, the original's id, the current value.
    pub readings: Vec<(DateTime<Utc>, ulid::Ulid, Reading)>,
    /// Events: when, and what.
    pub events: Vec<(DateTime<Utc>, EventKind)>,
    /// Skips: when, and why.
    pub skips: Vec<(DateTime<Utc>, String)>,
}

impl Timeline {
    /// The timeline of history entries (any order; withdrawn ones are left out).
    pub fn from_entries<'a>(entries: impl IntoIterator<Item = &'a Entry>) -> Timeline {
        let mut timeline = Timeline::default();
        for entry in entries {
            let at = entry.original.taken_at.with_timezone(&Utc);
            match entry.current() {
                Some(RecordBody::Reading(r)) => timeline.readings.push((at, entry.original.id, r.clone())),
                Some(RecordBody::Event(e)) => timeline.events.push((at, e.kind.clone())),
                Some(RecordBody::Skip(s)) => timeline.skips.push((at, s.reason.clone())),
                Some(RecordBody::Correction(_)) | None => {}
            }
        }
        timeline.readings.sort_by_key(|r| (r.0, r.1));
        timeline.events.sort_by_key(|e| e.0);
        timeline.skips.sort_by_key(|s| s.0);
        timeline
    }

    /// The timeline of `tank` within `range`, widened by [`LOOK_BACK`] at the
    /// start so the first readings in the range are judged against the weeks
    /// before them.
    pub fn load<S: Store + ?Sized>(
        store: &S,
        facility: &Facility,
        tank: &Tank,
        range: &TimeRange,
    ) -> Result<Timeline, StoreError> {
        let widened = TimeRange::new(range.since.map(|s| s - LOOK_BACK), range.until);
        let entries = history::entries(store, &targets_of(facility, tank), &widened)?;
        Ok(Timeline::from_entries(&entries))
    }

    /// The assessment of `reading`, taken at `at`, against the readings and
    /// events of this timeline before it.
    pub fn assess(
        &self,
        facility: &Facility,
        tank: &Tank,
        reading: &Reading,
        at: DateTime<Utc>,
        config: &RulesConfig,
    ) -> Assessment {
        let from = at - LOOK_BACK;
        let history: Vec<PastReading<'_>> = self
            .readings
            .iter()
            .filter(|(t, _, _)| *t < at && *t >= from)
            .map(|(t, _, r)| PastReading { at: *t, reading: r })
            .collect();
        let events: Vec<DatedEvent<'_>> =
            self.events.iter().filter(|(t, _)| *t <= at).map(|(t, kind)| DatedEvent { at: *t, kind }).collect();
        assess(&Inputs { facility, tank, reading, at, history: &history, events: &events, config })
    }
}

/// Assesses stored readings, loading each tank's timeline once.
///
/// A reading on a tank is judged for that tank. A reading on a system applies
/// to every tank on it: it is judged for each, and the most severe assessment
/// (highest band, then highest latent band) is returned, so the most sensitive
/// species on the shared water decides.
pub struct Assessor<'a, S: Store + ?Sized> {
    store: &'a S,
    facility: &'a Facility,
    range: TimeRange,
    config: RulesConfig,
    timelines: HashMap<String, Timeline>,
}

impl<'a, S: Store + ?Sized> Assessor<'a, S> {
    /// An assessor for readings taken within `range` (their history is read
    /// from [`LOOK_BACK`] before it).
    pub fn new(store: &'a S, facility: &'a Facility, range: TimeRange) -> Assessor<'a, S> {
        Assessor { store, facility, range, config: RulesConfig::default(), timelines: HashMap::new() }
    }

    fn timeline(&mut self, tank: &Tank) -> Result<&Timeline, StoreError> {
        let key = tank.id.as_str().to_string();
        if !self.timelines.contains_key(&key) {
            let timeline = Timeline::load(self.store, self.facility, tank, &self.range)?;
            self.timelines.insert(key.clone(), timeline);
        }
        Ok(&self.timelines[&key])
    }

    /// The assessment of `reading` on `target` taken at `at`; `None` when the
    /// target is not in the room.
    pub fn assess(
        &mut self,
        target: &Target,
        reading: &Reading,
        at: DateTime<Utc>,
    ) -> Result<Option<Assessment>, StoreError> {
        let facility = self.facility;
        let tanks: Vec<&Tank> = match target {
            Target::Tank(id) => facility.tank(id).into_iter().collect(),
            Target::System(id) => facility.system(id).map(|s| facility.tanks_on(s)).unwrap_or_default(),
        };
        let mut worst: Option<Assessment> = None;
        for tank in tanks {
            let config = self.config;
            let assessment = self.timeline(tank)?.assess(facility, tank, reading, at, &config);
            let severity = |a: &Assessment| (a.band, a.latent.map(|l| l.band));
            if worst.as_ref().is_none_or(|w| severity(&assessment) > severity(w)) {
                worst = Some(assessment);
            }
        }
        Ok(worst)
    }
}

/// The targets whose records belong to `tank`: the tank and, when it shares
/// water, its system.
pub fn targets_of(facility: &Facility, tank: &Tank) -> Vec<Target> {
    let mut targets = vec![Target::Tank(tank.id.as_str().to_string())];
    if let Some(system) = facility.system_of(tank) {
        targets.push(Target::System(system.id.as_str().to_string()));
    }
    targets
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::core::units::AmmoniaBasis;
    use crate::model::record::{DeviceId, Event, Record, Temperature, TotalAmmonia};
    use crate::store::MemStore;
    use chrono::TimeZone;

    fn room() -> Facility {
        let path = concat!(env!("CARGO_MANIFEST_DIR"), "/sample-rooms/harbourside-holding.toml");
        Facility::load(std::path::Path::new(path)).unwrap()
    }

    fn reading(target: Target, tan: f64) -> Reading {
        let mut r = Reading::new(target);
        r.measurements.temperature = Some(Temperature::celsius(25.0));
        r.measurements.ph = Some(7.6);
        r.measurements.total_ammonia = Some(TotalAmmonia { value: tan, basis: AmmoniaBasis::N });
        r
    }

    #[test]
    fn system_readings_and_events_reach_the_tank() {
        let facility = room();
        let tank = facility.tank("A-03").unwrap();
        let device = DeviceId::generate();
        let day = |d: u32| Utc.with_ymd_and_hms(2026, 11, d, 8, 0, 0).unwrap().fixed_offset();
        let mut store = MemStore::with_device(device);
        let system = Target::System("RACK-A".into());
        let records: Vec<Record> = (1..=5)
            .map(|d| {
                Record::new(device, "Ines", day(d), RecordBody::Reading(reading(system.clone(), 0.2 * f64::from(d))))
            })
            .chain([Record::new(
                device,
                "Ines",
                day(3),
                RecordBody::Event(Event { target: system.clone(), kind: EventKind::FeedingHeld, note: None }),
            )])
            .collect();
        store.append(&records).unwrap();
        let timeline = Timeline::load(&store, &facility, tank, &TimeRange::new(None, None)).unwrap();
        assert_eq!(timeline.readings.len(), 5);
        assert_eq!(timeline.events.len(), 1);
        let (at, _, newest) = timeline.readings.last().unwrap();
        let a = timeline.assess(&facility, tank, newest, *at, &RulesConfig::default());
        let trend = a.tan_trend.expect("five readings give a trend");
        assert!((trend.rate_per_day - 0.2).abs() < 1e-9, "{trend:?}");
        assert_eq!(trend.readings, 5);
        // Feeding was held on day 3 and ammonia is at 1.0 mg/L: keep holding.
        assert!(a.actions.iter().any(|x| x.kind == crate::rules::ActionKind::HoldFeeding));
    }
}
