//! One tank's history as the assessment takes it: the tank's own readings and
//! events and those of the system it shares water with, each at its current
//! value after corrections.
//!
//! [`current_records`] turns store entries into plain records holding their
//! current values; [`TankHistory`] picks a tank's part of them and builds the
//! [`rules::assess`](crate::rules::assess) inputs, so every caller (report,
//! screen, `record`, `log`) assesses a stored reading the same way.

use chrono::{DateTime, Duration, FixedOffset, Utc};

use crate::model::facility::{Facility, Tank};
use crate::model::record::{Event, Reading, Record, RecordBody, Target};
use crate::rules::{Assessment, DatedEvent, Inputs, PastReading, RulesConfig, assess};
use crate::store::{Entry, Store, StoreError, TimeRange, history};

/// The current value of every entry that is not withdrawn, oldest first.
///
/// Each record keeps its original's id, device, operator and time (when the
/// sample was taken and by whom) and carries the current body.
pub fn current_records(entries: &[Entry]) -> Vec<Record> {
    let mut records: Vec<Record> = entries
        .iter()
        .filter_map(|entry| {
            let body = entry.current()?;
            if matches!(body, RecordBody::Correction(_)) {
                return None;
            }
            Some(Record { body: body.clone(), ..entry.original.clone() })
        })
        .collect();
    records.sort_by_key(Record::time_key);
    records
}

/// The current records about any of `targets` (all when empty) within `range`,
/// oldest first.
pub fn load<S: Store + ?Sized>(store: &S, targets: &[Target], range: &TimeRange) -> Result<Vec<Record>, StoreError> {
    Ok(current_records(&history::entries(store, targets, range)?))
}

/// The targets whose records make a tank's history: the tank and its system.
pub fn targets_of(tank: &Tank) -> Vec<Target> {
    let mut targets = vec![Target::Tank(tank.id.as_str().to_string())];
    if let Some(system) = &tank.system {
        targets.push(Target::System(system.as_str().to_string()));
    }
    targets
}

/// A stored reading with its record.
#[derive(Debug, Clone, Copy)]
pub struct DatedReading<'a> {
    /// When it was taken, UTC.
    pub at: DateTime<Utc>,
    /// The record (id, operator, local time).
    pub record: &'a Record,
    /// The reading.
    pub reading: &'a Reading,
}

/// A stored event with its record.
#[derive(Debug, Clone, Copy)]
pub struct DatedRecordEvent<'a> {
    /// When it was done, UTC.
    pub at: DateTime<Utc>,
    /// The record (id, operator, local time).
    pub record: &'a Record,
    /// The event.
    pub event: &'a Event,
}

/// One tank's readings and events (its own and its system's), oldest first.
#[derive(Debug, Clone)]
pub struct TankHistory<'a> {
    /// The tank.
    pub tank: &'a Tank,
    /// Readings of the tank and of its system.
    pub readings: Vec<DatedReading<'a>>,
    /// Events on the tank and on its system.
    pub events: Vec<DatedRecordEvent<'a>>,
}

/// What is known of a tank at one moment: the newest reading with the
/// chemistry, and what was seen of the fish around it.
#[derive(Debug, Clone, PartialEq)]
pub struct TankState {
    /// When the reading assessed was taken (the one with the chemistry, when any).
    pub at: DateTime<Utc>,
    /// The same, with the offset it was taken at.
    pub taken_at: DateTime<FixedOffset>,
    /// Who took it.
    pub operator: String,
    /// Where the water was sampled (the tank or its system).
    pub target: Target,
    /// The reading assessed: measurements of the newest complete sample in
    /// the window, the signs and deaths of every reading in it, the newest note.
    pub reading: Reading,
    /// When the newest reading of the window was taken.
    pub last_seen: DateTime<FixedOffset>,
}

impl<'a> TankHistory<'a> {
    /// The part of `records` (current values) about `tank` and its system.
    pub fn new(tank: &'a Tank, records: &'a [Record]) -> TankHistory<'a> {
        TankHistory::of_targets(tank, records, &targets_of(tank))
    }

    /// The part of `records` about any of `targets`, assessed as `tank`: for a
    /// whole system, the system and every tank on it.
    pub fn of_targets(tank: &'a Tank, records: &'a [Record], targets: &[Target]) -> TankHistory<'a> {
        let mut readings = Vec::new();
        let mut events = Vec::new();
        for record in records {
            let at = record.taken_at.with_timezone(&Utc);
            match &record.body {
                RecordBody::Reading(reading) if targets.contains(&reading.target) => {
                    readings.push(DatedReading { at, record, reading });
                }
                RecordBody::Event(event) if targets.contains(&event.target) => {
                    events.push(DatedRecordEvent { at, record, event });
                }
                _ => {}
            }
        }
        readings.sort_by_key(|r| r.record.time_key());
        events.sort_by_key(|e| e.record.time_key());
        TankHistory { tank, readings, events }
    }

    /// Readings taken before `before`, as the assessment's history.
    pub fn past_readings(&self, before: DateTime<Utc>) -> Vec<PastReading<'a>> {
        self.readings.iter().filter(|r| r.at < before).map(|r| PastReading { at: r.at, reading: r.reading }).collect()
    }

    /// Every event, as the assessment takes them.
    pub fn dated_events(&self) -> Vec<DatedEvent<'a>> {
        self.events.iter().map(|e| DatedEvent { at: e.at, kind: &e.event.kind }).collect()
    }

    /// Events after `after` up to `until`, both as UTC instants.
    pub fn events_between(&self, after: DateTime<Utc>, until: DateTime<Utc>) -> Vec<DatedRecordEvent<'a>> {
        self.events.iter().filter(|e| e.at > after && e.at <= until).copied().collect()
    }

    /// The tank's state as of `at`: readings within `window` before the newest
    /// one taken up to `at`, merged (see [`TankState::reading`]). `None` when
    /// nothing was read by then.
    pub fn state_at(&self, at: DateTime<Utc>, window: Duration) -> Option<TankState> {
        let upto: Vec<&DatedReading<'a>> = self.readings.iter().filter(|r| r.at <= at).collect();
        let newest = *upto.last()?;
        let recent: Vec<&DatedReading<'a>> =
            upto.iter().rev().take_while(|r| newest.at - r.at <= window).copied().collect();
        // Newest first: the chemistry of the newest complete sample, else of the newest reading.
        let chemistry = recent.iter().find(|r| r.reading.water_sample().is_some()).copied().unwrap_or(newest);
        let mut reading = Reading::new(chemistry.reading.target.clone());
        reading.measurements = chemistry.reading.measurements.clone();
        for r in &recent {
            let seen = &r.reading.observations;
            for sign in seen.signs() {
                reading.observations.set(sign, true);
            }
            reading.observations.deaths = reading.observations.deaths.saturating_add(seen.deaths);
        }
        reading.note = recent.iter().find_map(|r| r.reading.note.clone());
        Some(TankState {
            at: chemistry.at,
            taken_at: chemistry.record.taken_at,
            operator: chemistry.record.operator.clone(),
            target: chemistry.reading.target.clone(),
            reading,
            last_seen: newest.record.taken_at,
        })
    }

    /// Assesses `reading`, taken at `at`, with this history and these events.
    pub fn assess(
        &self,
        facility: &Facility,
        reading: &Reading,
        at: DateTime<Utc>,
        config: &RulesConfig,
    ) -> Assessment {
        let history = self.past_readings(at);
        let events = self.dated_events();
        assess(&Inputs { facility, tank: self.tank, reading, at, history: &history, events: &events, config })
    }

    /// Assesses the tank's state (see [`TankHistory::state_at`]).
    pub fn assess_state(&self, facility: &Facility, state: &TankState, config: &RulesConfig) -> Assessment {
        self.assess(facility, &state.reading, state.at, config)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::record::{DeviceId, EventKind, Measurements, Temperature, TotalAmmonia};
    use crate::store::MemStore;
    use chrono::TimeZone;
    use ulid::Ulid;

    fn room() -> Facility {
        let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-rooms/harbourside-holding.toml");
        Facility::load(&path).unwrap()
    }

    fn at(hour: u32, minute: u32) -> DateTime<FixedOffset> {
        FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, hour, minute, 0).unwrap()
    }

    fn record(n: u64, when: DateTime<FixedOffset>, body: RecordBody) -> Record {
        let millis = u64::try_from(when.timestamp_millis()).unwrap();
        Record {
            id: Ulid::from_parts(millis, u128::from(n)),
            device: DeviceId(Ulid::from_parts(1, 1)),
            operator: "Ines Okafor".into(),
            taken_at: when,
            body,
        }
    }

    fn chemistry(target: Target, tan: f64) -> RecordBody {
        let mut r = Reading::new(target);
        r.measurements = Measurements {
            temperature: Some(Temperature::celsius(25.0)),
            ph: Some(7.8),
            total_ammonia: Some(TotalAmmonia { value: tan, basis: crate::core::units::AmmoniaBasis::N }),
            ..Measurements::default()
        };
        RecordBody::Reading(r)
    }

    #[test]
    fn a_tank_sees_its_systems_readings_and_merges_what_was_seen_with_the_chemistry() {
        let facility = room();
        let tank = facility.tank("B-07").unwrap();
        let system = Target::System(tank.system.as_ref().unwrap().to_string());
        let own = Target::Tank(tank.id.to_string());
        let mut sick = Reading::new(own.clone());
        sick.observations.gasping = true;
        sick.observations.deaths = 2;
        sick.note = Some("two at the surface".into());
        let records = vec![
            record(1, at(7, 0) - Duration::days(1), chemistry(system.clone(), 0.2)),
            record(2, at(7, 20), chemistry(system.clone(), 1.5)),
            record(3, at(7, 21), RecordBody::Reading(sick)),
            record(
                4,
                at(8, 0),
                RecordBody::Event(Event { target: system.clone(), kind: EventKind::FeedingHeld, note: None }),
            ),
            record(5, at(7, 25), chemistry(Target::Tank("Q-1".into()), 3.0)),
        ];
        let history = TankHistory::new(tank, &records);
        assert_eq!(history.readings.len(), 3, "the other tank's reading is not part of it");
        assert_eq!(history.events.len(), 1);
        let state = history.state_at(at(9, 0).with_timezone(&Utc), Duration::hours(24)).unwrap();
        assert_eq!(state.taken_at, at(7, 20), "the reading with the chemistry is the one assessed");
        assert_eq!(state.target, system);
        assert_eq!(state.last_seen, at(7, 21));
        assert!(state.reading.observations.gasping);
        assert_eq!(state.reading.observations.deaths, 2);
        assert_eq!(state.reading.note.as_deref(), Some("two at the surface"));
        let assessment = history.assess_state(&facility, &state, &RulesConfig::default());
        assert!(assessment.raised_by.iter().any(|r| r == "gasping"), "{:?}", assessment.raised_by);
        assert!(assessment.trend.is_some(), "yesterday's reading is history");
        let since = history.events_between(state.at, at(9, 0).with_timezone(&Utc));
        assert_eq!(since.len(), 1);
        assert!(history.state_at(at(6, 0).with_timezone(&Utc) - Duration::days(2), Duration::hours(24)).is_none());
    }

    #[test]
    fn current_records_follow_corrections_and_drop_withdrawn_ones() {
        use crate::model::record::Correction;
        let mut store = MemStore::new();
        let first = record(1, at(7, 0), chemistry(Target::Tank("Q-1".into()), 0.5));
        let second = record(2, at(7, 5), chemistry(Target::Tank("Q-2".into()), 0.5));
        let fix = record(
            3,
            at(9, 0),
            RecordBody::Correction(Correction {
                supersedes: first.id,
                replacement: Some(Box::new(chemistry(Target::Tank("Q-1".into()), 0.25))),
                reason: "misread".into(),
            }),
        );
        let withdraw = record(
            4,
            at(9, 1),
            RecordBody::Correction(Correction {
                supersedes: second.id,
                replacement: None,
                reason: "wrong tank".into(),
            }),
        );
        store.append(&[first.clone(), second, fix, withdraw]).unwrap();
        let records = load(&store, &[], &TimeRange::ALL).unwrap();
        assert_eq!(records.len(), 1);
        assert_eq!(records[0].id, first.id);
        assert_eq!(records[0].taken_at, first.taken_at);
        let tan = records[0].body.as_reading().unwrap().measurements.tan_n_mg_l();
        assert_eq!(tan, Some(0.25));
    }
}
